"""Pricing: cash-flow matrix, fixed-coupon bonds, money-market instruments, curve, spreads, callables."""
