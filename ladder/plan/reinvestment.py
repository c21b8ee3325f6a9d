"""What maturing money is reinvested in: the rule, the tenor bought, the sector and its spread.

Rules (``book.toml`` ``[reinvest].rule``, overridden by ``--reinvest``):
- ``longest_rung``: buy at the far end of the ladder's longest occupied rung (``ladder.risk.rungs``:
  a book whose longest holding is in the 3-5Y rung buys 5Y notes), so the ladder keeps its shape as
  the short rungs run off; in the open 5Y+ rung, the whole years that reach the longest maturity.
  The tenor is cut back to the longest within the policy's maximum maturity when it is longer (whole
  months up to a year, whole half-years beyond); a book of funds alone buys 3M;
- ``target_tenor``: buy at ``target_tenor``; a tenor beyond the policy's maximum maturity is refused;
- ``fund``: hold it in the fund sector (the cash stays in the fund and earns its yield);
- ``match_needs`` (the default): maturities placed to arrive by the cash needs the ladder does not
  already cover, the rest at the ``longest_rung`` tenor (``ladder.plan.matching``); its menu is
  ``MENU_MONTHS`` and the long-end tenor, each within the policy's maximum maturity for the sector.
The bought security is a par security of ``sector`` (default: treasury) bought at 100, priced on the
scenario's curve at that sector's spread (``ladder.plan.rates.RatePath.purchase_terms``). The spread
is the face-weighted average spread of the book's own (non-callable) holdings of that sector as the
valuation found it (the z-spread solved from a quote, or the ``[spreads]`` table); when the book
holds none, the sector's ``[spreads]`` entry (``default``, else the first bucket given) at the bought tenor; for
Treasuries with neither, 0 (the curve is the government curve). ``spread_bp`` is NaN until
``with_spread`` fills it from the valuation.
"""

from __future__ import annotations

import datetime as dt
import math
from dataclasses import dataclass, replace

import numpy as np

from ladder.folder.book_file import REINVEST_RULES, SPREAD_BUCKETS, Book
from ladder.book.holdings import SECTORS
from ladder.errors import Problems
from ladder.market.dates import add_months, is_month_end
from ladder.market.tenors import tenor_label, tenor_months
from ladder.plan.rates import SINGLE_PAYMENT_MAX_MONTHS
from ladder.risk.rungs import RUNG_END_MONTHS, rung_index

DEFAULT_SECTOR = "treasury"
MENU_MONTHS = (1, 3, 6, 9, 12, 24, 36)   # bills up to a year, then 2Y and 3Y notes (common practice)


@dataclass(frozen=True)
class Reinvestment:
    """The resolved reinvestment: rule, tenor in months (0 for the fund rule), sector, spread (bp),
    minimum cash buffer (currency), and a note when the tenor was cut to the policy's maximum."""

    rule: str
    months: int
    sector: str
    spread_bp: float
    buffer: float
    note: str = ""
    tenors: tuple[int, ...] = ()

    @property
    def menu(self) -> tuple[int, ...]:
        """Every tenor (months) the rule may buy: the menu for ``match_needs``, else its one tenor."""
        return self.tenors if self.tenors else ((self.months,) if self.months else ())

    @property
    def tenor(self) -> str:
        return tenor_label(self.months) if self.months else ""


def _limit_days(book: Book, sector: str, as_of: dt.date):
    """The shortest maximum maturity that applies to ``sector`` (days from ``as_of``) and its key."""
    limits = [book.policy.portfolio.max_maturity]
    rule = book.policy.sector(sector)
    limits.append(rule.max_maturity if rule else None)
    found = [(limit.days(as_of), limit) for limit in limits if limit is not None]
    return min(found, key=lambda pair: pair[0]) if found else (None, None)


def _tenor_days(as_of: dt.date, months: int) -> int:
    start = np.datetime64(as_of, "D")
    return int((add_months(np.array([start]), months, is_month_end(start))[0] - start).astype(np.int64))


def _longest_rung_months(book: Book, as_of: dt.date) -> int:
    h = book.holdings
    held = h.kind != "fund"
    if not held.any():
        return RUNG_END_MONTHS[0]
    k = int(rung_index(np.datetime64(as_of, "D"), h.maturity[held]).max())
    if k < len(RUNG_END_MONTHS):
        return RUNG_END_MONTHS[k]
    longest = int(np.max((h.maturity[held].astype("datetime64[M]") - np.datetime64(as_of, "M")).astype(int)))
    return 12 * math.ceil(longest / 12)


def _cut_to(months: int, limit_days: int, as_of: dt.date) -> int:
    """The longest purchase tenor up to ``months`` not beyond ``limit_days`` (whole months up to a
    year, whole half-years beyond); at least one month."""
    tenors = [m for m in [*range(1, SINGLE_PAYMENT_MAX_MONTHS + 1), *range(18, months + 1, 6)] if m <= months]
    fits = [m for m in tenors if _tenor_days(as_of, m) <= limit_days]
    return max(fits, default=1)


def sector_spread_bp(book: Book, sector: str, spreads: np.ndarray, months: int) -> float | None:
    """The bought sector's spread in bp (see the module docstring), None if there is none.

    ``spreads`` (n,) decimal: each holding's spread from the valuation (z-spread or, from the table);
    ``months`` the bought tenor, where the table's curve is read.
    """
    h = book.holdings
    rows = (h.sector == sector) & (h.kind != "fund") & ~h.callable & np.isfinite(spreads)
    if rows.any():
        return float(1e4 * (spreads[rows] * h.face[rows]).sum() / h.face[rows].sum())
    table = book.spreads.get(sector, {})
    for bucket in ("default", *SPREAD_BUCKETS):
        if bucket in table:
            return float(table[bucket].at(months / 12.0))
    return 0.0 if sector == "treasury" else None


def resolve_reinvestment(book: Book, as_of: dt.date, rule: str | None = None, tenor: str | None = None,
                         sector: str | None = None, buffer: float | None = None) -> Reinvestment:
    """The reinvestment for ``book`` on ``as_of``: book.toml's settings, each overridable (a ``tenor``
    alone means the target_tenor rule); raises ``InputError`` with every problem (unknown rule or
    sector, a bad tenor, one beyond the policy, a tenor with another rule)."""
    settings = book.reinvest
    problems = Problems()
    if tenor is not None and rule not in (None, "target_tenor"):
        problems.add("--tenor", 0, 0, f"--tenor is the tenor of the target_tenor rule, not of {rule!r}")
    rule = ("target_tenor" if tenor is not None else settings.rule) if rule is None else rule
    sector = DEFAULT_SECTOR if sector is None else sector
    buffer = settings.min_cash_buffer if buffer is None else float(buffer)
    if rule not in REINVEST_RULES:
        problems.add("--reinvest", 0, 0, f"{rule!r} is not a reinvestment rule; use one of {', '.join(REINVEST_RULES)}")
    if sector not in SECTORS or sector == "fund":
        problems.add("--sector", 0, 0, f"{sector!r} is not a sector to buy; use one of "
                                       f"{', '.join(s for s in SECTORS if s != 'fund')}")
    if not (math.isfinite(buffer) and buffer >= 0):
        problems.add("--buffer", 0, 0, f"the minimum cash buffer must be zero or more, not {buffer:g}")
    problems.raise_if_any()
    if rule == "fund":
        return Reinvestment(rule, 0, "fund", 0.0, buffer)
    allowed = book.policy.sector(sector)
    if allowed is not None and not allowed.allowed:
        problems.add(book.policy.source, book.policy.line(allowed.key("allowed")), 0,
                     f"the policy does not allow the {sector} sector, so the plan cannot buy it; choose another --sector")
    limit, limit_rule = _limit_days(book, sector, as_of)
    note = ""
    if rule == "target_tenor":
        label = tenor if tenor is not None else settings.target_tenor
        source = "--tenor" if tenor is not None else "book.toml"
        try:
            months = tenor_months(label)
        except ValueError as error:
            problems.add(source, 0, 0, str(error))
            months = 0
        if months > SINGLE_PAYMENT_MAX_MONTHS and months % 6:
            problems.add(source, 0, 0, f"tenor {label}: purchases longer than {SINGLE_PAYMENT_MAX_MONTHS}M are "
                                       "semiannual notes; give whole half-years (18M, 2Y, 30M, ...)")
        elif months and limit is not None and _tenor_days(as_of, months) > limit:
            problems.add(source, 0, 0, f"reinvestment tenor {tenor_label(months)} is beyond the policy's maximum "
                                       f"maturity of {limit_rule.describe()} ({limit_rule.key}) for {sector}")
    else:
        months = _longest_rung_months(book, as_of)
        if limit is not None and _tenor_days(as_of, months) > limit:
            cut = _cut_to(months, limit, as_of)
            note = (f"the longest rung asks for {tenor_label(months)}, beyond the policy's maximum maturity "
                    f"of {limit_rule.describe()} ({limit_rule.key}); buying {tenor_label(cut)} instead")
            months = cut
    problems.raise_if_any()
    tenors = ()
    if rule == "match_needs":
        tenors = tuple(sorted({m for m in MENU_MONTHS if m < months and (limit is None or _tenor_days(as_of, m) <= limit)}
                              | {months}))
    return Reinvestment(rule, months, sector, float("nan"), buffer, note, tenors)


def with_spread(reinvestment: Reinvestment, book: Book, spreads: np.ndarray) -> Reinvestment:
    """``reinvestment`` with the bought sector's spread (bp) from the valuation's ``spreads`` (n,);
    raises ``InputError`` when the sector has none."""
    if reinvestment.rule == "fund":
        return replace(reinvestment, spread_bp=0.0)
    spread = sector_spread_bp(book, reinvestment.sector, spreads, reinvestment.months)
    if spread is None:
        problems = Problems()
        problems.add(str(book.folder / "book.toml"), 0, 0,
                     f"[spreads] has no spread for sector {reinvestment.sector!r} and the book holds none of it; "
                     "add a 'default' for the sector or buy another --sector")
        problems.raise_if_any()
    return replace(reinvestment, spread_bp=spread)
