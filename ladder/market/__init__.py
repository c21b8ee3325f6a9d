"""Market conventions: day counts, the bond-market calendar, tenors and coupon schedules."""
