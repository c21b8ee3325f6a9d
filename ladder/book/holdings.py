"""The holdings of a book as a struct of arrays: one numpy array per field, one row per holding.

Conventions: rates are decimals (0.0425), prices per 100 face, money in currency units, dates
``datetime64[D]`` with ``NaT`` for "not given", text fields ``object`` arrays with ``""`` for
"not given".
"""

from __future__ import annotations

from dataclasses import dataclass, fields, replace

import numpy as np

SECTORS = (
    "treasury", "agency", "supranational", "municipal", "corporate",
    "commercial_paper", "cd", "fund", "deposit",
)
KINDS = ("fixed", "zero", "discount", "at_maturity", "fund")
DAY_COUNTS = ("30/360", "30E/360", "ACT/360", "ACT/365F", "ACT/ACT", "ACT/ACT-ISDA")
FREQUENCIES = (1, 2, 4, 12)

# Defaults by sector: (kind, day count). Common practice in the US market: Treasury notes accrue
# ACT/ACT on their semiannual period; agency, supranational, municipal and corporate notes 30/360;
# commercial paper and CDs are money-market instruments on ACT/360; fund yields accrue ACT/365F.
SECTOR_DEFAULTS: dict[str, tuple[str, str]] = {
    "treasury": ("fixed", "ACT/ACT"),
    "agency": ("fixed", "30/360"),
    "supranational": ("fixed", "30/360"),
    "municipal": ("fixed", "30/360"),
    "corporate": ("fixed", "30/360"),
    "commercial_paper": ("discount", "ACT/360"),
    "cd": ("at_maturity", "ACT/360"),
    "fund": ("fund", "ACT/365F"),
    "deposit": ("at_maturity", "ACT/360"),
}
# Discount instruments quoted by discount rate use ACT/360 whatever their sector (bills, CP).
KIND_DAY_COUNT = {"discount": "ACT/360"}

# Sectors whose holdings cannot be sold before maturity unless the holdings file says otherwise:
# bank CDs and term deposits are usually held to maturity (common practice; a negotiable CD trades).
NOT_NEGOTIABLE = ("cd", "deposit")

QUOTE_NONE, QUOTE_PRICE, QUOTE_YIELD, QUOTE_DISCOUNT = "", "price", "yield", "discount"
NO_CALL = -1


@dataclass(frozen=True, eq=False)
class Holdings:
    """Every holding of a book, one row each. See the module docstring for units."""

    id: np.ndarray                  # object, unique
    sector: np.ndarray              # object, one of SECTORS
    issuer: np.ndarray              # object
    kind: np.ndarray                # object, one of KINDS
    face: np.ndarray                # float64, par amount in currency units
    maturity: np.ndarray            # datetime64[D]
    coupon: np.ndarray              # float64, annual decimal (0 for zero/discount/fund)
    frequency: np.ndarray           # int64, coupons a year (0 for instruments without coupons)
    day_count: np.ndarray           # object, one of DAY_COUNTS
    issue_date: np.ndarray          # datetime64[D], NaT if not given
    first_coupon: np.ndarray        # datetime64[D], NaT if not given
    rating: np.ndarray              # object, long-term rating as given ("" if none)
    short_rating: np.ndarray        # object
    rating_at_purchase: np.ndarray  # object
    quote_type: np.ndarray          # object, one of QUOTE_* ("" = price from the curve)
    quote: np.ndarray               # float64: clean price per 100, or decimal yield / discount rate
    book_price: np.ndarray          # float64, clean per 100 at purchase; NaN if not given
    purchase_date: np.ndarray       # datetime64[D], NaT if not given
    first_call: np.ndarray          # datetime64[D], NaT if not callable
    call_frequency: np.ndarray      # int64: NO_CALL, 0 = once, else calls a year
    call_price: np.ndarray          # float64, per 100
    negotiable: np.ndarray          # bool: can be sold before maturity (see ``NOT_NEGOTIABLE``)
    price_date: np.ndarray          # datetime64[D], date of the quote; NaT: the valuation date
    row: np.ndarray                 # int64, 1-based source row in the holdings file (0 if made in code)

    def __len__(self) -> int:
        return len(self.id)

    @property
    def callable(self) -> np.ndarray:
        """Boolean mask of holdings with call terms."""
        return ~np.isnat(self.first_call)

    def take(self, index) -> "Holdings":
        """The holdings at ``index`` (a boolean mask or integer positions), as a new Holdings."""
        return replace(self, **{f.name: getattr(self, f.name)[index] for f in fields(self)})

    @staticmethod
    def concat(parts: "list[Holdings]") -> "Holdings":
        """One Holdings made of ``parts`` in order."""
        return Holdings(**{f.name: np.concatenate([getattr(p, f.name) for p in parts])
                           for f in fields(Holdings)})


_TEXT_FIELDS = ("id", "sector", "issuer", "kind", "day_count", "rating", "short_rating",
                "rating_at_purchase", "quote_type")
_DATE_FIELDS = ("maturity", "issue_date", "first_coupon", "purchase_date", "first_call", "price_date")


def make_holdings(**columns) -> Holdings:
    """Holdings from equal-length sequences, in the model's units; missing fields take their defaults.

    Required: ``id``, ``sector``, ``face``, ``maturity``. Defaults: issuer = id, kind and day count
    from the sector (``SECTOR_DEFAULTS``), coupon 0, frequency 2 for ``fixed`` else 0, no quote,
    no call, call price 100, negotiable unless the sector is in ``NOT_NEGOTIABLE``, row 0.
    """
    n = len(columns["id"])

    def text(name, default=""):
        values = columns.get(name)
        return np.array([default] * n if values is None else [("" if v is None else str(v)) for v in values],
                        dtype=object)

    def dates(name):
        values = columns.get(name)
        return np.array(["NaT"] * n if values is None else [v or "NaT" for v in values], dtype="datetime64[D]")

    def numbers(name, default, dtype=np.float64):
        values = columns.get(name)
        return np.full(n, default, dtype=dtype) if values is None else np.asarray(values, dtype=dtype)

    sector = text("sector")
    kind = text("kind")
    kind = np.where(kind == "", [SECTOR_DEFAULTS.get(s, ("fixed", ""))[0] for s in sector], kind).astype(object)
    day_count = text("day_count")
    default_dc = [KIND_DAY_COUNT.get(k, SECTOR_DEFAULTS.get(s, ("", "ACT/360"))[1]) for s, k in zip(sector, kind)]
    day_count = np.where(day_count == "", default_dc, day_count).astype(object)
    frequency = numbers("frequency", -1, np.int64)
    frequency = np.where(frequency >= 0, frequency, np.where(kind == "fixed", 2, 0))
    issuer = text("issuer")
    return Holdings(
        id=text("id"), sector=sector, issuer=np.where(issuer == "", text("id"), issuer).astype(object),
        kind=kind, face=numbers("face", np.nan), maturity=dates("maturity"),
        coupon=numbers("coupon", 0.0), frequency=frequency, day_count=day_count,
        issue_date=dates("issue_date"), first_coupon=dates("first_coupon"),
        rating=text("rating"), short_rating=text("short_rating"), rating_at_purchase=text("rating_at_purchase"),
        quote_type=text("quote_type"), quote=numbers("quote", np.nan), book_price=numbers("book_price", np.nan),
        purchase_date=dates("purchase_date"), first_call=dates("first_call"), price_date=dates("price_date"),
        call_frequency=numbers("call_frequency", NO_CALL, np.int64), call_price=numbers("call_price", 100.0),
        negotiable=_negotiable(columns.get("negotiable"), sector),
        row=numbers("row", 0, np.int64),
    )


def _negotiable(values, sector: np.ndarray) -> np.ndarray:
    """``values`` (True, False or None for the sector's default) as a bool array."""
    default = ~np.isin(sector, NOT_NEGOTIABLE)
    if values is None:
        return default
    return np.array([d if v is None else bool(v) for v, d in zip(values, default)], dtype=bool)
