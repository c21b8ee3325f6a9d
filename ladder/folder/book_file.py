"""A book folder: ``book.toml`` plus the holdings, curve, policy, cash-needs and scenario files.

``load_book`` reads every file, collects every problem in all of them, and either returns a whole
``Book`` or raises one ``InputError``: nothing is half-loaded. File formats: docs/formats.md.
"""

from __future__ import annotations

import datetime as dt
import difflib
import tomllib
from dataclasses import dataclass, field, replace
from pathlib import Path

import numpy as np

from ladder.book.cash_needs import CashNeeds, read_cash_needs
from ladder.book.families import Families, read_families
from ladder.book.holdings import SECTORS, Holdings
from ladder.book.holdings_file import read_holdings
from ladder.errors import InputError, Problems
from ladder.folder.transaction import recover
from ladder.folder.versions import MAX_KEEP
from ladder.market.tenors import tenor_months
from ladder.policy.model import Policy
from ladder.policy.policy_file import load_policy
from ladder.policy.toml_lines import KeyLines
from ladder.pricing.curve import ParCurve, bootstrap
from ladder.pricing.curve_file import read_curve
from ladder.pricing.spread_fit import fit_levels, quoted_z_spreads_bp
from ladder.pricing.spreads import RATING_BUCKETS, SpreadCurve, SpreadTable
from ladder.risk.scenarios import Scenario, read_scenarios

BOOK_FILE = "book.toml"
DEFAULT_FILES = {"holdings": "holdings.csv", "curve": "curve.csv", "policy": "policy.toml",
                 "cash_needs": "cash_needs.csv", "scenarios": "scenarios.csv", "issuers": "issuers.csv"}
OPTIONAL_FILES = ("scenarios", "issuers")
REINVEST_RULES = ("match_needs", "longest_rung", "target_tenor", "fund")
TOP_KEYS = ("name", "base_currency", "valuation_date", "files", "spreads", "reinvest", "model", "history", "build", "cash")
# The builder's purchases (common practice: the institutional round lot is 1,000,000 face).
# MAX_TICKET refuses a figure typed with too many zeros.
DEFAULT_MIN_TICKET, DEFAULT_LOT = 1_000_000.0, 1_000_000.0
MAX_TICKET = 1e10
SPREAD_BUCKETS = RATING_BUCKETS + ("default",)
# Defaults of the callable model (Hull-White): see docs/methods.md for where they come from.
DEFAULT_MEAN_REVERSION = 0.03
DEFAULT_VOLATILITY = 0.01
MAX_SPREAD_BP = 2000.0
FIT_KEY = "fit_to_quotes"     # [spreads] key: sectors whose curves are fitted to their quoted holdings
# Spreads over the government curve (bp) for holdings without a quote, by sector, rating bucket and
# tenor: INVENTED defaults of a realistic shape for high-grade US paper, not market data
# (docs/formats.md): short tenors tighter than long ones, wider for lower buckets; money-market
# sectors by short-term bucket. A [spreads] table in book.toml replaces them sector by sector.
_MONEY_MARKET = ("1M", "3M", "6M", "1Y")
_NOTES = ("3M", "1Y", "2Y", "5Y", "10Y")


def _points(tenors: tuple[str, ...], *bp: float) -> dict[str, float]:
    return dict(zip(tenors, bp))


DEFAULT_SPREADS_BP: dict[str, dict[str, float | dict[str, float]]] = {
    "treasury": {"default": 0.0},
    "agency": {"AAA": _points(_NOTES, 4, 6, 8, 12, 18), "AA": _points(_NOTES, 6, 9, 11, 16, 22),
               "A": _points(_NOTES, 12, 18, 24, 34, 45)},
    "supranational": {"AAA": _points(_NOTES, 5, 7, 10, 14, 20), "AA": _points(_NOTES, 8, 12, 16, 24, 32),
                      "A": _points(_NOTES, 14, 20, 28, 40, 52)},
    "municipal": {"AAA": _points(_NOTES, 8, 12, 16, 26, 40), "AA": _points(_NOTES, 12, 18, 24, 36, 52),
                  "A": _points(_NOTES, 20, 30, 40, 60, 80), "BBB": _points(_NOTES, 40, 55, 70, 100, 130)},
    "corporate": {"AAA": _points(_NOTES, 3, 14, 22, 38, 55), "AA": _points(_NOTES, 5, 20, 30, 50, 70),
                  "A": _points(_NOTES, 10, 30, 45, 75, 100), "BBB": _points(_NOTES, 28, 55, 75, 115, 150)},
    "commercial_paper": {"A-1+": _points(_MONEY_MARKET, 6, 10, 14, 20), "A-1": _points(_MONEY_MARKET, 10, 16, 22, 30),
                         "A-2": _points(_MONEY_MARKET, 25, 35, 42, 55), "A-3": _points(_MONEY_MARKET, 45, 60, 70, 85)},
    "cd": {"A-1+": _points(_MONEY_MARKET, 8, 12, 16, 22), "A-1": _points(_MONEY_MARKET, 12, 18, 24, 32),
           "A-2": _points(_MONEY_MARKET, 28, 38, 46, 60), "default": _points(_MONEY_MARKET, 18, 26, 32, 42)},
    "deposit": {"A-1+": _points(_MONEY_MARKET, 5, 8, 12, 18), "A-1": _points(_MONEY_MARKET, 8, 12, 16, 24),
                "A-2": _points(_MONEY_MARKET, 22, 30, 38, 50), "default": _points(_MONEY_MARKET, 12, 18, 24, 32)},
    "fund": {"default": 0.0},
}


@dataclass(frozen=True)
class ReinvestSettings:
    """Where maturing money goes in the cash plan (``[reinvest]`` of book.toml)."""

    rule: str = "match_needs"
    target_tenor: str = "2Y"
    min_cash_buffer: float = 0.0


@dataclass(frozen=True)
class ModelSettings:
    """Hull-White parameters for callables: mean reversion a (per year), absolute volatility sigma."""

    mean_reversion: float = DEFAULT_MEAN_REVERSION
    volatility: float = DEFAULT_VOLATILITY


@dataclass(frozen=True)
class BuildSettings:
    """Purchases of the builder (``[build]`` of book.toml), face in currency units: a security at least
    ``min_ticket``, a generic one in steps of ``lot``."""

    min_ticket: float = DEFAULT_MIN_TICKET
    lot: float = DEFAULT_LOT


@dataclass(frozen=True, eq=False)
class Book:
    """Everything in a book folder, validated."""

    folder: Path
    name: str
    currency: str
    valuation_date: dt.date
    files: dict[str, Path]
    holdings: Holdings
    curve: ParCurve
    policy: Policy
    cash_needs: CashNeeds
    scenarios: tuple[Scenario, ...]
    spreads: SpreadTable = field(default_factory=dict)   # sector -> bucket -> SpreadCurve (bp by tenor)
    reinvest: ReinvestSettings = ReinvestSettings()
    model: ModelSettings = ModelSettings()
    families: Families = Families.none()
    build: BuildSettings = BuildSettings()
    cash_account: str = ""    # id of the fund holding that settles every trade, maturity and transfer

    def with_holdings(self, holdings: Holdings) -> "Book":
        """The same book with other holdings (a what-if or an applied trade)."""
        return replace(self, holdings=holdings)


def _unknown(problems: Problems, file: str, lines: KeyLines, path: tuple, key: str, known) -> None:
    close = difflib.get_close_matches(key, list(known), n=1, cutoff=0.6)
    hint = f"; did you mean {close[0]!r}?" if close else ""
    line, column = lines.find(path)
    problems.add(file, line, column, f"unknown key {'.'.join(map(str, path))!r}{hint} Known: {', '.join(known)}")


class _Settings:
    """Validation of book.toml's values; every problem goes to ``problems`` with its line."""

    def __init__(self, file: str, text: str, problems: Problems):
        self.file, self.problems, self.lines = file, problems, KeyLines(text)

    def error(self, path: tuple, message: str) -> None:
        line, column = self.lines.find(path)
        self.problems.add(self.file, line, column, f"{'.'.join(map(str, path))}: {message}")

    def table(self, data: dict, key: str, known) -> dict:
        value = data.get(key, {})
        if not isinstance(value, dict):
            self.error((key,), "must be a table")
            return {}
        for name in value:
            if known is not None and name not in known:
                _unknown(self.problems, self.file, self.lines, (key, name), name, known)
        return value

    def number(self, path: tuple, value, default: float, low: float, high: float) -> float:
        if value is None:
            return default
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            self.error(path, f"must be a number, not {value!r}")
            return default
        if not low <= value <= high:
            self.error(path, f"{value} is out of range; expected {low:g} to {high:g}")
            return default
        return float(value)


def _spread_curve(s: _Settings, path: tuple, value) -> SpreadCurve:
    """A bucket's spread: a number of bp (flat), or a table of tenor = bp (``{ 3M = 12, 5Y = 75 }``)."""
    if not isinstance(value, dict):
        return SpreadCurve.flat(s.number(path, value, 0.0, -MAX_SPREAD_BP, MAX_SPREAD_BP))
    points: dict[float, float] = {}
    for tenor, bp in value.items():
        try:
            years = tenor_months(tenor) / 12.0
        except ValueError as exc:
            s.error(path + (tenor,), str(exc))
            continue
        if years in points:
            s.error(path + (tenor,), f"tenor {tenor} is given twice (as another label of the same length)")
        points[years] = s.number(path + (tenor,), bp, 0.0, -MAX_SPREAD_BP, MAX_SPREAD_BP)
    if not value:
        s.error(path, "an empty table; give basis points, or tenor = basis points such as { 3M = 12, 5Y = 75 }")
    return SpreadCurve.of(points) if points else SpreadCurve.flat(0.0)


def _fit_sectors(s: _Settings, value) -> tuple[str, ...]:
    """``[spreads].fit_to_quotes``: the sectors whose curves are fitted to their quoted holdings."""
    if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
        s.error(("spreads", FIT_KEY), 'must be a list of sectors in quotes, e.g. ["corporate", "cd"]')
        return ()
    for i, sector in enumerate(value):
        if sector not in SECTORS:
            s.error(("spreads", FIT_KEY, i), f"{sector!r} is not a sector; known: {', '.join(SECTORS)}")
    return tuple(v for v in value if v in SECTORS)


def _read_settings(path: Path, problems: Problems):
    """(name, currency, valuation date, files, holdings file to read, (spreads, sectors to fit), reinvest,
    model, build) from book.toml, or None."""
    label = str(path)
    try:
        text = path.read_text(encoding="utf-8-sig")
        data = tomllib.loads(text)
    except FileNotFoundError:
        problems.add(label, 0, 0, f"no {BOOK_FILE} here; a book folder needs one (see docs/formats.md)")
        return None
    except (OSError, UnicodeDecodeError, tomllib.TOMLDecodeError) as exc:
        problems.add(label, 0, 0, f"cannot be read: {exc}")
        return None
    except RecursionError:
        problems.add(label, 0, 0, "cannot be read: tables or arrays are nested too deeply; "
                                  "book.toml needs at most three levels (see docs/formats.md)")
        return None
    s = _Settings(label, text, problems)
    for key in data:
        if key not in TOP_KEYS:
            _unknown(problems, label, s.lines, (key,), key, TOP_KEYS)
    name = str(data.get("name", path.parent.name))
    currency = data.get("base_currency", "USD")
    if not (isinstance(currency, str) and len(currency) == 3 and currency.isalpha()):
        s.error(("base_currency",), f"{currency!r} is not a three-letter currency code such as USD")
    valuation = data.get("valuation_date")
    if isinstance(valuation, dt.datetime) or not isinstance(valuation, dt.date):
        s.error(("valuation_date",), "must be a date written YYYY-MM-DD (no quotes), e.g. 2026-11-30")
        valuation = None
    files = {key: path.parent / DEFAULT_FILES[key] for key in DEFAULT_FILES}
    named = s.table(data, "files", DEFAULT_FILES)
    for key, value in named.items():
        if isinstance(value, str) and value:
            files[key] = path.parent / value
        else:
            s.error(("files", key), "must be a file name in quotes")
    spreads = {sector: {b: _spread_curve(s, ("spreads", sector, b), v) for b, v in buckets.items()}
               for sector, buckets in DEFAULT_SPREADS_BP.items()}
    fit: tuple[str, ...] = ()
    for sector, buckets in s.table(data, "spreads", SECTORS + (FIT_KEY,)).items():
        if sector == FIT_KEY:
            fit = _fit_sectors(s, buckets)
            continue
        if not isinstance(buckets, dict):
            s.error(("spreads", sector), "must be a table of rating bucket = basis points")
            continue
        for bucket in buckets:
            if bucket not in SPREAD_BUCKETS:
                _unknown(problems, label, s.lines, ("spreads", sector, bucket), bucket, SPREAD_BUCKETS)
        spreads[sector] = {b: _spread_curve(s, ("spreads", sector, b), v) for b, v in buckets.items()}
    source = _holdings_source(label, files["holdings"], "holdings" in named, problems)
    r = s.table(data, "reinvest", ("rule", "target_tenor", "min_cash_buffer"))
    rule = r.get("rule", ReinvestSettings.rule)
    if rule not in REINVEST_RULES:
        s.error(("reinvest", "rule"), f"{rule!r} is not one of {', '.join(REINVEST_RULES)}")
        rule = ReinvestSettings.rule
    tenor = str(r.get("target_tenor", ReinvestSettings.target_tenor))
    try:
        tenor_months(tenor)
    except ValueError as exc:
        s.error(("reinvest", "target_tenor"), str(exc))
    buffer = s.number(("reinvest", "min_cash_buffer"), r.get("min_cash_buffer"), 0.0, 0.0, 1e15)
    keep = s.table(data, "history", ("keep",)).get("keep")
    if keep is not None and (isinstance(keep, bool) or not isinstance(keep, int) or not 1 <= keep <= MAX_KEEP):
        s.error(("history", "keep"), f"must be a whole number of versions from 1 to {MAX_KEEP}, not {keep!r}")
    m = s.table(data, "model", ("mean_reversion", "volatility"))
    model = ModelSettings(
        s.number(("model", "mean_reversion"), m.get("mean_reversion"), DEFAULT_MEAN_REVERSION, 1e-6, 5.0),
        s.number(("model", "volatility"), m.get("volatility"), DEFAULT_VOLATILITY, 0.0, 0.2))
    account = s.table(data, "cash", ("account",)).get("account", "")
    if not isinstance(account, str):
        s.error(("cash", "account"), "must be a holding id in quotes, e.g. \"MMF-01\"")
        account = ""
    return (name, currency, valuation, files, source, (spreads, fit), ReinvestSettings(rule, tenor, buffer), model,
            _build(s, data), (account, s.lines.find(("cash", "account"))))


def _build(s: _Settings, data: dict) -> BuildSettings:
    """``[build]``: tickets and lot, positive face amounts up to ``MAX_TICKET``; the ticket a whole number of lots."""
    b = s.table(data, "build", ("min_ticket", "lot"))
    got = {}
    for key, default in (("min_ticket", DEFAULT_MIN_TICKET), ("lot", DEFAULT_LOT)):
        value = b.get(key, default)
        if isinstance(value, bool) or not isinstance(value, (int, float)) or not 0 < value <= MAX_TICKET:
            s.error(("build", key), f"{value!r} is not a face amount; expected a number above 0 and at most "
                                    f"{MAX_TICKET:,.0f}")
            value = default
        got[key] = float(value)
    ticket, lot = got["min_ticket"], got["lot"]
    if lot > ticket or abs(ticket / lot - round(ticket / lot)) > 1e-9:
        s.error(("build", "min_ticket"), f"{ticket:,.0f} is not a whole number of lots of {lot:,.0f}")
    return BuildSettings(**got)


def _collect(problems: Problems, read, *args):
    """``read(*args)``, its InputError's problems moved into ``problems`` (result None then)."""
    try:
        return read(*args)
    except InputError as error:
        problems.extend(error)
        return None


def _holdings_source(label: str, path: Path, named: bool, problems: Problems) -> Path:
    """holdings.csv, or holdings.xlsx when that is the only holdings file and none is named; both
    present and none named is a problem (which one is the book's is not ours to guess)."""
    if named:
        return path
    workbook = path.with_suffix(".xlsx")
    if workbook.exists() and path.exists():
        problems.add(label, 0, 0, f"both {path.name} and {workbook.name} are here and [files] names neither; "
                                  f'name the book\'s holdings file, e.g. [files] holdings = "{path.name}"')
    return workbook if workbook.exists() and not path.exists() else path


def load_book(folder) -> Book:
    """The book in ``folder`` (or a path to its book.toml); raises ``InputError`` with every problem.
    An interrupted change is first finished or undone (``ladder.folder.transaction.recover``)."""
    folder = Path(folder)
    if folder.is_file():
        folder = folder.parent
    recover(folder)
    problems = Problems()
    settings = _read_settings(folder / BOOK_FILE, problems)
    if settings is None:
        problems.raise_if_any()
    name, currency, valuation, files, source, (spreads, fit), reinvest, model, build, (account, at) = settings
    files["holdings"] = source      # the file read is the file written
    holdings = None
    if valuation is not None:
        holdings, _ = read_holdings(source, valuation, problems, cash_account=account)
    if account and holdings is not None and len(holdings):     # an empty book has nothing to value
        where = np.flatnonzero(holdings.id == account)
        if not len(where):
            problems.add(str(folder / BOOK_FILE), at[0], at[1], f"cash.account: {account!r} is not a holding of "
                         f"the book ({source.name}); name the sweep or money-market fund that settles trades")
        elif holdings.kind[where[0]] != "fund":
            problems.add(str(folder / BOOK_FILE), at[0], at[1], f"cash.account: {account!r} is a "
                         f"{holdings.kind[where[0]]} holding; the cash account must be a fund (kind fund)")
    for key in ("curve", "policy", "cash_needs"):
        if not files[key].exists():
            problems.add(str(files[key]), 0, 0, f"file not found; a book needs its {key} file (see docs/formats.md)")
    curve = _collect(problems, read_curve, files["curve"]) if files["curve"].exists() else None
    policy = _collect(problems, load_policy, files["policy"]) if files["policy"].exists() else None
    needs = _collect(problems, read_cash_needs, files["cash_needs"]) if files["cash_needs"].exists() else None
    scenarios: tuple[Scenario, ...] = ()
    if curve is not None and files["scenarios"].exists():
        scenarios = _collect(problems, read_scenarios, files["scenarios"], curve) or ()
    families = (_collect(problems, read_families, files["issuers"]) if files["issuers"].exists() else None) \
        or Families.none()
    problems.raise_if_any()
    if fit:
        z_bp = quoted_z_spreads_bp(holdings, bootstrap(curve, np.datetime64(valuation)), valuation)
        spreads, _ = fit_levels(spreads, holdings, valuation, z_bp, fit)
    return Book(folder, name, currency, valuation, files, holdings, curve, policy, needs, scenarios,
                spreads, reinvest, model, families, build, account)
