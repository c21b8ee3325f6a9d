"""An investment policy as data: what ``policy.toml`` says, after validation.

Percentages are percent of the whole portfolio (0-100) on the policy's basis; maturities in calendar
days or years from the check date; durations in years; ratings as written (validated symbols).
Each limit keeps its key path in the file (``key``), which is its rule id in every result.
"""

from __future__ import annotations

import datetime as dt
import re
from dataclasses import dataclass

import numpy as np

from ladder.market.dates import add_months

BASES = ("market", "book", "face")
TESTING_MODES = ("at_purchase", "continuous")
OLD_TESTING_NAMES = {"at_all_times": "continuous"}   # the earlier name of continuous testing, still read
FAMILY_SCOPES = ("family", "issuer")
_BARE_KEY = re.compile(r"^[A-Za-z0-9_-]+$")


def key_path(*parts) -> str:
    """A TOML-style key path: ``key_path("issuers", "Northwind Bank", "max_pct")`` ->
    ``issuers."Northwind Bank".max_pct``; integers become ``[i]``."""
    out = ""
    for part in parts:
        if isinstance(part, int):
            out += f"[{part}]"
            continue
        text = part if _BARE_KEY.match(part) else '"' + part.replace("\\", "\\\\").replace('"', '\\"') + '"'
        out += ("." if out else "") + text
    return out


def issuer_key(name: str) -> str:
    """How issuer names are matched: case-insensitive, runs of blanks as one space."""
    return " ".join(str(name).split()).casefold()


@dataclass(frozen=True)
class MaturityLimit:
    """A maximum remaining term, as written: ``amount`` days, or years (whole months)."""

    amount: float
    unit: str   # "days" | "years"
    key: str

    def days(self, as_of) -> int:
        """The limit in calendar days from ``as_of``; years are counted on the calendar (month steps)."""
        if self.unit == "days":
            return int(self.amount)
        months = int(round(self.amount * 12))
        end = add_months(np.array([as_of], dtype="datetime64[D]"), months)[0]
        return int((end - np.datetime64(as_of, "D")).astype(np.int64))

    def approx_days(self) -> float:
        """A calendar-free length for comparing limits (a year as 365.25 days)."""
        return self.amount if self.unit == "days" else self.amount * 365.25

    def describe(self) -> str:
        amount = f"{self.amount:g}"
        return f"{amount} {self.unit[:-1] if amount == '1' else self.unit}"


@dataclass(frozen=True)
class LiquidityFloor:
    """At least ``min_pct`` of the portfolio matures within ``within_days`` calendar days."""

    within_days: int
    min_pct: float
    key: str   # e.g. "portfolio.liquidity[0].min_pct"


@dataclass(frozen=True)
class PortfolioRules:
    max_effective_duration: float | None = None   # years
    max_wam_days: float | None = None             # days
    max_maturity: MaturityLimit | None = None
    issuer_max_pct: float | None = None           # default cap for every issuer
    callable_max_pct: float | None = None
    liquidity: tuple[LiquidityFloor, ...] = ()
    cash_needs_horizon_months: int | None = None


@dataclass(frozen=True)
class SectorRule:
    """Limits for one sector (``ladder.book.holdings.SECTORS``)."""

    name: str
    allowed: bool = True
    max_pct: float | None = None
    min_pct: float | None = None
    max_maturity: MaturityLimit | None = None
    min_long_rating: str | None = None
    min_short_rating: str | None = None
    issuer_max_pct: float | None = None     # per issuer, its holdings in this sector
    callable_max_pct: float | None = None   # callables in this sector
    issuer_cap_exempt: bool = False         # issuers here are exempt from portfolio.issuer_max_pct

    def key(self, field: str) -> str:
        return key_path("sectors", self.name, field)


@dataclass(frozen=True)
class IssuerRule:
    """A named issuer: its own cap in place of the default, or exempt from the default."""

    name: str
    max_pct: float | None = None
    exempt: bool = False

    def key(self, field: str) -> str:
        return key_path("issuers", self.name, field)


@dataclass(frozen=True)
class Policy:
    name: str
    version: str
    adopted: dt.date
    basis: str = "market"            # one of BASES
    testing: str = "continuous"      # one of TESTING_MODES: the default for share limits
    rule_testing: tuple[tuple[str, str], ...] = ()   # (rule id, mode) from the [rules] tables
    rule_per: tuple[tuple[str, str], ...] = ()       # (rule id, "family" | "issuer") from the [rules] tables
    near_pct: float = 90.0           # near when headroom is under (100 - near_pct)% of the limit
    cure_days: int | None = None
    split: str = "lowest"            # ladder.market.ratings.SPLIT_RULES
    portfolio: PortfolioRules = PortfolioRules()
    sectors: tuple[SectorRule, ...] = ()
    issuers: tuple[IssuerRule, ...] = ()
    source: str = "policy.toml"
    lines: tuple[tuple[str, int], ...] = ()   # (key path, line in the file)

    def sector(self, name: str) -> SectorRule | None:
        return next((s for s in self.sectors if s.name == name), None)

    def testing_of(self, key: str, default: str | None) -> str:
        """The testing mode of rule ``key``: its [rules] table's, else ``default`` (the rule kind's),
        else the policy's own ``testing``."""
        return dict(self.rule_testing).get(key) or default or self.testing

    def per_of(self, key: str) -> str:
        """Whether issuer limit ``key`` applies per issuer family (the default) or per single issuer."""
        return dict(self.rule_per).get(key, "family")

    def line(self, key: str) -> int:
        """Line of ``key`` in the policy file (0 if unknown)."""
        return dict(self.lines).get(key, 0)

    @property
    def title(self) -> str:
        """Name, version and adoption date, as printed with every result."""
        return f"{self.name}, version {self.version}, adopted {self.adopted.isoformat()}"
