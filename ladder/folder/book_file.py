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

from ladder.book.cash_needs import CashNeeds, read_cash_needs
from ladder.book.holdings import SECTORS, Holdings
from ladder.book.holdings_file import read_holdings
from ladder.errors import InputError, Problems
from ladder.market.tenors import tenor_months
from ladder.policy.model import Policy
from ladder.policy.policy_file import load_policy
from ladder.policy.toml_lines import KeyLines
from ladder.pricing.curve import ParCurve
from ladder.pricing.curve_file import read_curve
from ladder.risk.scenarios import Scenario, read_scenarios

BOOK_FILE = "book.toml"
DEFAULT_FILES = {"holdings": "holdings.csv", "curve": "curve.csv", "policy": "policy.toml",
                 "cash_needs": "cash_needs.csv", "scenarios": "scenarios.csv"}
OPTIONAL_FILES = ("scenarios",)
REINVEST_RULES = ("match_needs", "longest_rung", "target_tenor", "fund")
TOP_KEYS = ("name", "base_currency", "valuation_date", "files", "spreads", "reinvest", "model")
SPREAD_BUCKETS = ("AAA", "AA", "A", "BBB", "A-1+", "A-1", "A-2", "A-3", "default")
# Defaults of the callable model (Hull-White): see docs/methods.md for where they come from.
DEFAULT_MEAN_REVERSION = 0.03
DEFAULT_VOLATILITY = 0.01
MAX_SPREAD_BP = 2000.0
# Spreads over the government curve (bp) for holdings without a quote, by sector and rating bucket;
# invented defaults of a realistic size for high-grade US paper (docs/formats.md). A [spreads]
# table in book.toml replaces them sector by sector.
DEFAULT_SPREADS_BP: dict[str, dict[str, float]] = {
    "treasury": {"default": 0.0},
    "agency": {"AAA": 10.0, "AA": 14.0, "A": 30.0},
    "supranational": {"AAA": 12.0, "AA": 20.0, "A": 35.0},
    "municipal": {"AAA": 22.0, "AA": 32.0, "A": 55.0, "BBB": 95.0},
    "corporate": {"AAA": 35.0, "AA": 48.0, "A": 72.0, "BBB": 115.0},
    "commercial_paper": {"A-1+": 12.0, "A-1": 20.0, "A-2": 40.0, "A-3": 70.0},
    "cd": {"A-1+": 15.0, "A-1": 22.0, "A-2": 45.0, "default": 30.0},
    "deposit": {"A-1+": 10.0, "A-1": 15.0, "A-2": 35.0, "default": 20.0},
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
    spreads: dict[str, dict[str, float]] = field(default_factory=dict)   # sector -> bucket -> bp
    reinvest: ReinvestSettings = ReinvestSettings()
    model: ModelSettings = ModelSettings()

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


def _read_settings(path: Path, problems: Problems):
    """(name, currency, valuation date, files, spreads, reinvest, model) from book.toml, or None."""
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
    for key, value in s.table(data, "files", DEFAULT_FILES).items():
        if isinstance(value, str) and value:
            files[key] = path.parent / value
        else:
            s.error(("files", key), "must be a file name in quotes")
    spreads = dict(DEFAULT_SPREADS_BP)
    for sector, buckets in s.table(data, "spreads", SECTORS).items():
        if not isinstance(buckets, dict):
            s.error(("spreads", sector), "must be a table of rating bucket = basis points")
            continue
        for bucket in buckets:
            if bucket not in SPREAD_BUCKETS:
                _unknown(problems, label, s.lines, ("spreads", sector, bucket), bucket, SPREAD_BUCKETS)
        spreads[sector] = {b: s.number(("spreads", sector, b), v, 0.0, -MAX_SPREAD_BP, MAX_SPREAD_BP)
                           for b, v in buckets.items()}
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
    m = s.table(data, "model", ("mean_reversion", "volatility"))
    model = ModelSettings(
        s.number(("model", "mean_reversion"), m.get("mean_reversion"), DEFAULT_MEAN_REVERSION, 1e-6, 5.0),
        s.number(("model", "volatility"), m.get("volatility"), DEFAULT_VOLATILITY, 0.0, 0.2))
    return name, currency, valuation, files, spreads, ReinvestSettings(rule, tenor, buffer), model


def _collect(problems: Problems, read, *args):
    """``read(*args)``, its InputError's problems moved into ``problems`` (result None then)."""
    try:
        return read(*args)
    except InputError as error:
        problems.extend(error)
        return None


def _holdings_path(files: dict[str, Path], named: bool) -> Path:
    """holdings.csv, or holdings.xlsx when that is the only holdings file and none is named."""
    path = files["holdings"]
    if not named and not path.exists() and path.with_suffix(".xlsx").exists():
        return path.with_suffix(".xlsx")
    return path


def load_book(folder) -> Book:
    """The book in ``folder`` (or a path to its book.toml); raises ``InputError`` with every problem."""
    folder = Path(folder)
    if folder.is_file():
        folder = folder.parent
    problems = Problems()
    settings = _read_settings(folder / BOOK_FILE, problems)
    if settings is None:
        problems.raise_if_any()
    name, currency, valuation, files, spreads, reinvest, model = settings
    named = "holdings" in (tomllib.loads((folder / BOOK_FILE).read_text(encoding="utf-8-sig")).get("files") or {})
    holdings = None
    if valuation is not None:
        holdings, _ = read_holdings(_holdings_path(files, named), valuation, problems)
    for key in ("curve", "policy", "cash_needs"):
        if not files[key].exists():
            problems.add(str(files[key]), 0, 0, f"file not found; a book needs its {key} file (see docs/formats.md)")
    curve = _collect(problems, read_curve, files["curve"]) if files["curve"].exists() else None
    policy = _collect(problems, load_policy, files["policy"]) if files["policy"].exists() else None
    needs = _collect(problems, read_cash_needs, files["cash_needs"]) if files["cash_needs"].exists() else None
    scenarios: tuple[Scenario, ...] = ()
    if curve is not None and files["scenarios"].exists():
        scenarios = _collect(problems, read_scenarios, files["scenarios"], curve) or ()
    if needs is not None and valuation is not None:
        for row, date in zip(needs.row, needs.date):
            if date < valuation:
                problems.add(str(files["cash_needs"]), int(row), 1,
                             f"cash need dated {date} is before the valuation date {valuation}")
    problems.raise_if_any()
    return Book(folder, name, currency, valuation, files, holdings, curve, policy, needs, scenarios,
                spreads, reinvest, model)
