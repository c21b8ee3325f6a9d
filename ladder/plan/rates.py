"""The curve a scenario sees on every future date of the plan.

A scenario moves today's par yields (``ladder.risk.scenarios``) and the plan then needs the curve
on later dates, for reinvestment yields, fund yields, call decisions and horizon prices. Two rules:
- ``stay`` (the default): the curve keeps its shape in time to maturity, so on every future date
  the discount factor over t years is today's ``DF(t)``: rates move by the scenario and stay there.
  The default because it answers the treasurer's question "what if rates move this much and stay",
  keeps each scenario's income a plain function of its shift, and does not build the term premium
  of an upward-sloping curve into the forecast as expected rate rises (forwards are known to be
  poor forecasts of future rates; common practice in income-at-risk work is the sustained shock).
- ``forward``: the curve follows today's implied forwards, ``DF_s(t) = DF(s + t) / DF(s)``.
Times are ACT/365F years (the curve measure). A spread ``z`` is added as a continuously
compounded z-spread, as ``ladder.pricing.spreads`` does for every holding priced from the curve.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.market.calendar import bond_calendar
from ladder.market.dates import add_months, days_between, is_month_end, to_days
from ladder.pricing.curve import Curve

RULES = ("stay", "forward")
SHORT_RATE_MONTHS = 1          # a fund's yield moves with the one-month rate
SINGLE_PAYMENT_MAX_MONTHS = 12  # purchases up to a year pay once at maturity (bills, CP, CDs)


def modified_following(dates) -> np.ndarray:
    """Each date rolled to the next bond-market business day unless that is in the next month, then
    to the previous one (ISDA 2006 Definitions 4.12(b), "Modified Following"; from memory)."""
    return np.busday_offset(to_days(dates), 0, roll="modifiedfollowing", busdaycal=bond_calendar())


@dataclass(frozen=True, eq=False)
class RatePath:
    """A scenario's curve today (``curve``) and the ``rule`` (one of ``RULES``) for later dates."""

    curve: Curve
    rule: str = "stay"

    def __post_init__(self) -> None:
        if self.rule not in RULES:
            raise ValueError(f"unknown rates rule {self.rule!r}; use one of {', '.join(RULES)}")

    def discount(self, on, tau) -> np.ndarray:
        """Discount factor seen on date ``on`` over ``tau`` ACT/365F years (broadcast together)."""
        tau = np.asarray(tau, dtype=np.float64)
        if self.rule == "stay":
            return self.curve.discount(np.maximum(tau, 0.0))
        t0 = np.broadcast_to(self.curve.years(to_days(on)), np.broadcast_shapes(np.shape(on), tau.shape))
        return self.curve.discount(t0 + np.maximum(tau, 0.0)) / self.curve.discount(t0)

    def short_rate(self, on) -> np.ndarray:
        """Simple ACT/365F rate for one month (1/12 year) seen on each of ``on``."""
        on = to_days(on)
        tau = SHORT_RATE_MONTHS / 12.0
        return (1.0 / self.discount(on, np.full(on.shape, tau)) - 1.0) / tau

    def purchase_terms(self, on, months: int, z: float) -> "PurchaseTerms":
        """The par security bought on each of ``on`` (P,) for ``months``, at z-spread ``z`` (decimal).

        Up to ``SINGLE_PAYMENT_MAX_MONTHS`` it pays once: 100 (1 + y tau) at maturity, y simple on
        ACT/365F over tau = days / 365 to the (rolled) maturity, priced at 100. Beyond, a semiannual note: coupons of y / 2 per
        100 on its half-year dates (31 CFR 356 App. B I.A: half the annual rate whatever the days)
        and 100 at maturity, with y the par yield, sum(y/2 G_j) + G_n = 1, G = DF e^(-z tau).
        Accrual dates step from the purchase date (end-of-month rule); payments roll Modified
        Following so a month-end purchase is repaid within the month it is due.
        """
        on = to_days(on)
        eom = is_month_end(on)[:, None]
        if months <= SINGLE_PAYMENT_MAX_MONTHS:
            steps = np.array([months])
        else:
            if months % 6:
                raise ValueError(f"a note of {months} months is not whole half-years")
            steps = np.arange(6, months + 1, 6)
        accrual = add_months(on[:, None], steps[None, :], eom)
        pay = modified_following(accrual)
        if months <= SINGLE_PAYMENT_MAX_MONTHS:
            accrual = pay                                  # interest runs to the repayment day
            tau = days_between(on[:, None], pay) / 365.0
            g = self.discount(on[:, None], tau) * np.exp(-z * tau)
            y = (1.0 / g[:, 0] - 1.0) / tau[:, 0]
            coupon = (y * tau[:, 0])[:, None] * 100.0
        else:
            tau = days_between(on[:, None], accrual) / 365.0
            g = self.discount(on[:, None], tau) * np.exp(-z * tau)
            y = 2.0 * (1.0 - g[:, -1]) / g.sum(axis=1)
            coupon = np.broadcast_to(50.0 * y[:, None], accrual.shape).copy()
        principal = np.zeros(accrual.shape)
        principal[:, -1] = 100.0
        starts = np.concatenate([on[:, None], accrual[:, :-1]], axis=1)
        return PurchaseTerms(on, y, starts, accrual, pay, coupon, principal, z)


@dataclass(frozen=True, eq=False)
class PurchaseTerms:
    """Securities bought at 100 on ``on`` (P,): yield ``y`` (P,) decimal; per 100 face, (P, k) for each
    accrual period: ``accrual_start``, ``accrual_end``, ``pay_date``, ``coupon``, ``principal``."""

    on: np.ndarray
    y: np.ndarray
    accrual_start: np.ndarray
    accrual_end: np.ndarray
    pay_date: np.ndarray
    coupon: np.ndarray
    principal: np.ndarray
    z: float

    def value(self, path: RatePath, at) -> np.ndarray:
        """Dirty value per 100 on date ``at`` of each security still running: its flows paid after
        ``at`` discounted on ``path`` at its z-spread (0 for one repaid by then)."""
        at = np.datetime64(at, "D")
        tau = days_between(at, self.pay_date) / 365.0
        later = self.pay_date > at
        df = path.discount(at, np.where(later, tau, 0.0)) * np.exp(-self.z * np.where(later, tau, 0.0))
        return np.where(later, (self.coupon + self.principal) * df, 0.0).sum(axis=1)
