"""Read and validate ``policy.toml`` (schema in docs/policy.md) into a ``Policy``.

Every problem is collected (unknown or misspelt keys with suggestions, wrong types, values out of
range, rules that contradict each other), each as ``file:line:column: key.path: message``, and the
file is refused whole: nothing is checked against half a policy.
"""

from __future__ import annotations

import datetime as dt
import difflib
import re
import tomllib
from dataclasses import replace
from pathlib import Path

from ladder.book.holdings import SECTORS
from ladder.errors import Problems
from ladder.market import ratings
from ladder.policy.model import (
    BASES, FAMILY_SCOPES, OLD_TESTING_NAMES, TESTING_MODES, IssuerRule, LiquidityFloor, MaturityLimit, Policy, PortfolioRules, SectorRule,
    issuer_key, key_path,
)
from ladder.policy.rules import compile_rules
from ladder.policy.toml_lines import KeyLines

_TOML_POSITION = re.compile(r"\s*\(at line (\d+), column (\d+)\)\s*$")
_MISSING = object()
_TOP = ("policy", "ratings", "portfolio", "sectors", "issuers", "rules")


def load_policy(path) -> Policy:
    """Read the policy file at ``path``; raises ``InputError`` listing every problem."""
    path = Path(path)
    problems = Problems()
    try:
        text = path.read_text(encoding="utf-8-sig")
    except (OSError, UnicodeDecodeError) as exc:
        problems.add(str(path), 0, 0, f"cannot read the policy file: {exc}")
        problems.raise_if_any()
    return parse_policy(text, str(path))


def parse_policy(text: str, file: str = "policy.toml") -> Policy:
    """Validate the TOML ``text`` of a policy; ``file`` names it in problems."""
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        problems = Problems()
        message = str(exc)
        where = _TOML_POSITION.search(message)
        line, column = (int(where.group(1)), int(where.group(2))) if where else (0, 0)
        problems.add(file, line, column, f"not valid TOML: {_TOML_POSITION.sub('', message)}")
        problems.raise_if_any()
    except RecursionError:
        problems = Problems()
        problems.add(file, 0, 0, "not valid as a policy: tables or arrays are nested too deeply "
                                 "(a policy needs at most four levels; see docs/policy.md)")
        problems.raise_if_any()
    reader = _Reader(file, KeyLines(text))
    policy = reader.policy(data)
    reader.problems.raise_if_any()
    return policy


def _kind_of(value) -> str:
    if isinstance(value, bool):
        return "true/false"
    if isinstance(value, (int, float)):
        return "a number"
    if isinstance(value, str):
        return f"the text {value!r}"
    if isinstance(value, dt.datetime):
        return "a date and time"
    if isinstance(value, dt.date):
        return "a date"
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, list):
        return "a list"
    return type(value).__name__


def _hint(word: str, choices) -> str:
    close = difflib.get_close_matches(word, list(choices), n=1, cutoff=0.6)
    return f" (did you mean {close[0]!r}?)" if close else ""


class _Reader:
    """Walks the parsed TOML, taking known keys and recording problems at their lines."""

    def __init__(self, file: str, lines: KeyLines):
        self.file = file
        self.lines = lines
        self.problems = Problems()

    def add(self, path: tuple, message: str) -> None:
        line, column = self.lines.find(path)
        self.problems.add(self.file, line, column, f"{key_path(*path)}: {message}" if path else message)

    # -- typed getters: each pops its key so that what is left over is unknown -----------------------
    def _pop(self, table: dict, key: str):
        return table.pop(key, _MISSING)

    def text(self, table, path, key, required=False, choices=None, default=None):
        value = self._pop(table, key)
        if value is _MISSING:
            if required:
                self.add(path, f"missing {key!r} (text)")
            return default
        if not isinstance(value, str) or not value.strip():
            self.add(path + (key,), f"expected text, got {_kind_of(value)}")
            return default
        if choices is not None and value not in choices:
            self.add(path + (key,), f"{value!r} is not one of {', '.join(choices)}{_hint(value, choices)}")
            return default
        return value

    def boolean(self, table, path, key, default=False):
        value = self._pop(table, key)
        if value is _MISSING:
            return default
        if not isinstance(value, bool):
            self.add(path + (key,), f"expected true or false, got {_kind_of(value)}")
            return default
        return value

    def date(self, table, path, key):
        value = self._pop(table, key)
        if value is _MISSING:
            self.add(path, f"missing {key!r} (a date such as {key} = 2025-01-15)")
            return None
        if isinstance(value, dt.datetime) or not isinstance(value, dt.date):
            hint = " written without quotes" if isinstance(value, str) else ""
            self.add(path + (key,), f"expected a date{hint} such as {key} = 2025-01-15, got {_kind_of(value)}")
            return None
        return value

    def number(self, table, path, key, low=None, high=None, low_open=False, integer=False, unit=""):
        """A number in [low, high] (or (low, high] with ``low_open``); None if absent or refused."""
        value = self._pop(table, key)
        if value is _MISSING:
            return None
        where = path + (key,)
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            self.add(where, f"expected {'a whole number' if integer else 'a number'}{unit}, got {_kind_of(value)}")
            return None
        if value != value or value in (float("inf"), float("-inf")):
            self.add(where, f"expected a finite number{unit}, got {value!r}")
            return None
        if integer and value != int(value):
            self.add(where, f"expected a whole number{unit}, got {value!r}")
            return None
        if low is not None and (value <= low if low_open else value < low):
            self.add(where, f"must be {'above' if low_open else 'at least'} {low!r}{unit}, got {value!r}")
            return None
        if high is not None and value > high:
            self.add(where, f"must be at most {high!r}{unit}, got {value!r}")
            return None
        return int(value) if integer else float(value)

    def pct(self, table, path, key):
        return self.number(table, path, key, 0, 100, unit=" (percent of the portfolio, 0 to 100)")

    def rating(self, table, path, key, long_term: bool):
        value = self._pop(table, key)
        if value is _MISSING:
            return None
        where = path + (key,)
        if not isinstance(value, str):
            self.add(where, f"expected a rating symbol, got {_kind_of(value)}")
            return None
        scale, other = ((ratings.LONG_NOTCH, ratings.SHORT_NOTCH) if long_term
                        else (ratings.SHORT_NOTCH, ratings.LONG_NOTCH))
        if value in scale:
            return value
        hint = ratings.suggest(value, scale)
        more = f"did you mean {' or '.join(repr(h) for h in hint)}?" if hint else ""
        if value in other:
            twin = "min_short_rating" if long_term else "min_long_rating"
            self.add(where, f"{value!r} is a {'short' if long_term else 'long'}-term rating "
                            f"({more + ' ' if more else ''}or did you mean {twin}?)")
            return None
        self.add(where, f"unknown {'long' if long_term else 'short'}-term rating {value!r}"
                        f"{' (' + more + ')' if more else ''}")
        return None

    def maturity(self, table, path):
        days = self.number(table, path, "max_maturity_days", 0, low_open=True, integer=True, unit=" days")
        years = self.number(table, path, "max_maturity_years", 0, low_open=True, unit=" years")
        if days is not None and years is not None:
            self.add(path + ("max_maturity_years",), "give max_maturity_days or max_maturity_years, not both")
            return None
        if years is not None:
            if abs(years * 12 - round(years * 12)) > 1e-9:
                self.add(path + ("max_maturity_years",),
                         f"{years!r} years is not a whole number of months; use max_maturity_days instead")
                return None
            return MaturityLimit(years, "years", key_path(*path, "max_maturity_years"))
        if days is not None:
            return MaturityLimit(days, "days", key_path(*path, "max_maturity_days"))
        return None

    def table(self, parent: dict, path: tuple, key: str) -> dict:
        value = self._pop(parent, key)
        if value is _MISSING:
            return {}
        if not isinstance(value, dict):
            self.add(path + (key,), f"expected a table [{key_path(*path, key)}], got {_kind_of(value)}")
            return {}
        return dict(value)

    def leftovers(self, table: dict, path: tuple, known) -> None:
        """Report every key left in ``table`` as unknown, with the nearest known key."""
        where = f" in [{key_path(*path)}]" if path else " at the top of the file"
        for key in table:
            self.add(path + (key,), f"unknown key {key!r}{where}{_hint(key, known)}")

    # -- sections ---------------------------------------------------------------------------------
    def policy(self, data: dict) -> Policy:
        data = dict(data)
        present = isinstance(data.get("policy"), dict)
        if "policy" not in data:
            self.add((), "missing the [policy] table (name, version, adopted)")
        head = self.table(data, (), "policy")
        p = ("policy",)
        name = self.text(head, p, "name", required=present)
        version = self.text(head, p, "version", required=present)
        adopted = self.date(head, p, "adopted") if present else None
        basis = self.text(head, p, "basis", choices=BASES, default="market")
        testing = self.text(head, p, "testing", choices=TESTING_MODES + tuple(OLD_TESTING_NAMES),
                            default="continuous")
        testing = OLD_TESTING_NAMES.get(testing, testing)
        near = self.number(head, p, "near_pct", 0, 100, low_open=True, unit=" (percent of a limit)")
        cure = self.number(head, p, "cure_days", 0, integer=True, unit=" days")
        self.leftovers(head, p, ("name", "version", "adopted", "basis", "testing", "near_pct", "cure_days"))

        rating_table = self.table(data, (), "ratings")
        split = self.text(rating_table, ("ratings",), "split", choices=ratings.SPLIT_RULES, default="lowest")
        self.leftovers(rating_table, ("ratings",), ("split",))

        portfolio = self.portfolio(self.table(data, (), "portfolio"))
        sectors = self.sectors(self.table(data, (), "sectors"))
        issuers = self.issuers(self.table(data, (), "issuers"))
        options = self.rule_options(self.table(data, (), "rules"))
        self.leftovers(data, (), _TOP)
        self.contradictions(portfolio, sectors, issuers)
        lines = tuple((key_path(*path), line) for path, (line, _) in self.lines.positions.items())
        policy = Policy(name=name or "", version=version or "", adopted=adopted or dt.date.min, basis=basis,
                        testing=testing, near_pct=90.0 if near is None else near, cure_days=cure, split=split,
                        portfolio=portfolio, sectors=sectors, issuers=issuers, source=self.file, lines=lines)
        return self.with_options(policy, options)

    def rule_options(self, t: dict) -> dict[str, dict[str, str]]:
        """``[rules."<rule id>"]`` tables: ``testing`` and, for an issuer limit, ``per``."""
        out = {}
        for rule_id, body in t.items():
            where = ("rules", rule_id)
            if not isinstance(body, dict):
                self.add(where, f'expected a table [rules."{rule_id}"] with testing and/or per, got {_kind_of(body)}')
                continue
            body = dict(body)
            got = {"testing": self.text(body, where, "testing", choices=TESTING_MODES),
                   "per": self.text(body, where, "per", choices=FAMILY_SCOPES)}
            self.leftovers(body, where, ("testing", "per"))
            out[rule_id] = {k: v for k, v in got.items() if v is not None}
        return out

    def with_options(self, policy: Policy, options: dict[str, dict[str, str]]) -> Policy:
        """The policy with its [rules] options, each checked against the rules the policy states."""
        if not options:
            return policy
        rules = {r.key: r for r in compile_rules(policy)}
        for rule_id, got in options.items():
            if rule_id not in rules:
                self.add(("rules", rule_id), f"the policy states no rule {rule_id!r}{_hint(rule_id, rules)}; "
                                             "a rule id is its key path, as check results show it")
            elif "per" in got and rules[rule_id].per is None:
                self.add(("rules", rule_id, "per"), "per applies only to issuer limits")
        return replace(policy, rule_testing=tuple((k, v["testing"]) for k, v in options.items() if "testing" in v),
                       rule_per=tuple((k, v["per"]) for k, v in options.items() if "per" in v))

    def portfolio(self, t: dict) -> PortfolioRules:
        p = ("portfolio",)
        rules = PortfolioRules(
            max_effective_duration=self.number(t, p, "max_effective_duration", 0, 100, low_open=True, unit=" years"),
            max_wam_days=self.number(t, p, "max_wam_days", 0, low_open=True, unit=" days"),
            max_maturity=self.maturity(t, p),
            issuer_max_pct=self.pct(t, p, "issuer_max_pct"),
            callable_max_pct=self.pct(t, p, "callable_max_pct"),
            liquidity=self.liquidity(t, p),
            cash_needs_horizon_months=self.number(t, p, "cash_needs_horizon_months", 1, 600, integer=True,
                                                  unit=" months"),
        )
        self.leftovers(t, p, ("max_effective_duration", "max_wam_days", "max_maturity_days", "max_maturity_years",
                              "issuer_max_pct", "callable_max_pct", "liquidity", "cash_needs_horizon_months"))
        return rules

    def liquidity(self, t: dict, p: tuple) -> tuple[LiquidityFloor, ...]:
        value = self._pop(t, "liquidity")
        if value is _MISSING:
            return ()
        if not isinstance(value, list):
            self.add(p + ("liquidity",), f"expected a list of {{within_days, min_pct}} tables, got {_kind_of(value)}")
            return ()
        floors, seen = [], {}
        for i, item in enumerate(value):
            where = p + ("liquidity", i)
            if not isinstance(item, dict):
                self.add(where, f"expected a table {{within_days = ..., min_pct = ...}}, got {_kind_of(item)}")
                continue
            item = dict(item)
            days = self.number(item, where, "within_days", 0, low_open=True, integer=True, unit=" days")
            pct = self.pct(item, where, "min_pct")
            for key, got in (("within_days", days), ("min_pct", pct)):
                if got is None and key not in dict(value[i]):
                    self.add(where, f"missing {key!r}")
            self.leftovers(item, where, ("within_days", "min_pct"))
            if days is None or pct is None:
                continue
            if days in seen:
                self.add(where + ("within_days",),
                         f"a second floor for {days} days (the first is portfolio.liquidity[{seen[days]}])")
                continue
            seen[days] = i
            floors.append(LiquidityFloor(days, pct, key_path(*where, "min_pct")))
        return tuple(floors)

    def sectors(self, t: dict) -> tuple[SectorRule, ...]:
        out = []
        for name, body in t.items():
            where = ("sectors", name)
            if name not in SECTORS:
                self.add(where, f"unknown sector {name!r}{_hint(name, SECTORS)}; sectors are {', '.join(SECTORS)}")
                continue
            if not isinstance(body, dict):
                self.add(where, f"expected a table [sectors.{name}], got {_kind_of(body)}")
                continue
            body = dict(body)
            rule = SectorRule(
                name=name,
                allowed=self.boolean(body, where, "allowed", default=True),
                max_pct=self.pct(body, where, "max_pct"),
                min_pct=self.pct(body, where, "min_pct"),
                max_maturity=self.maturity(body, where),
                min_long_rating=self.rating(body, where, "min_long_rating", long_term=True),
                min_short_rating=self.rating(body, where, "min_short_rating", long_term=False),
                issuer_max_pct=self.pct(body, where, "issuer_max_pct"),
                callable_max_pct=self.pct(body, where, "callable_max_pct"),
                issuer_cap_exempt=self.boolean(body, where, "issuer_cap_exempt"),
            )
            self.leftovers(body, where, ("allowed", "max_pct", "min_pct", "max_maturity_days", "max_maturity_years",
                                         "min_long_rating", "min_short_rating", "issuer_max_pct",
                                         "callable_max_pct", "issuer_cap_exempt"))
            out.append(rule)
        return tuple(out)

    def issuers(self, t: dict) -> tuple[IssuerRule, ...]:
        out, seen = [], {}
        for name, body in t.items():
            where = ("issuers", name)
            if not isinstance(body, dict):
                self.add(where, f'expected a table [issuers."{name}"], got {_kind_of(body)}')
                continue
            body = dict(body)
            rule = IssuerRule(name=name, max_pct=self.pct(body, where, "max_pct"),
                              exempt=self.boolean(body, where, "exempt"))
            given = set(t[name])
            self.leftovers(body, where, ("max_pct", "exempt"))
            if issuer_key(name) in seen:
                self.add(where, f"the same issuer as [issuers.{key_path(seen[issuer_key(name)])}] "
                                "(names match ignoring case and spacing)")
                continue
            seen[issuer_key(name)] = name
            if rule.exempt and "max_pct" in given:
                self.add(where + ("exempt",), "an exempt issuer has no cap: give max_pct or exempt = true, not both")
                continue
            if not given & {"max_pct", "exempt"}:
                self.add(where, "give the issuer's own cap (max_pct) or exempt = true")
                continue
            out.append(rule)
        return tuple(out)

    # -- rules that cannot all hold -------------------------------------------------------------------
    def contradictions(self, portfolio: PortfolioRules, sectors, issuers) -> None:
        allowed = [s for s in sectors if s.allowed]
        for s in sectors:
            where = ("sectors", s.name)
            if not s.allowed and s.min_pct:
                self.add(where + ("min_pct",), f"a minimum of {s.min_pct:g}% in a sector that is not allowed")
            if s.min_pct is not None and s.max_pct is not None and s.min_pct > s.max_pct:
                self.add(where + ("min_pct",), f"the minimum {s.min_pct:g}% is above the maximum "
                                               f"{s.max_pct:g}% (line {self.lines.find(where + ('max_pct',))[0]})")
            for field in ("issuer_max_pct", "callable_max_pct"):
                cap = getattr(s, field)
                if cap is not None and s.max_pct is not None and cap > s.max_pct:
                    line = self.lines.find(where + ("max_pct",))[0]
                    self.add(where + (field,), f"{cap:g}% is above the sector's own cap of {s.max_pct:g}% "
                                               f"(line {line}), so it can never apply")
            if (s.issuer_max_pct is not None and portfolio.issuer_max_pct is not None
                    and not s.issuer_cap_exempt and s.issuer_max_pct > portfolio.issuer_max_pct):
                self.add(where + ("issuer_max_pct",),
                         f"{s.issuer_max_pct:g}% is above portfolio.issuer_max_pct = {portfolio.issuer_max_pct:g}% "
                         f"(line {self.lines.find(('portfolio', 'issuer_max_pct'))[0]}), which also applies to these "
                         "issuers; to let them go higher, set issuer_cap_exempt = true in this sector")
            if s.max_maturity and portfolio.max_maturity and _longer(s.max_maturity, portfolio.max_maturity):
                self.add(where + (s.max_maturity.key.rsplit(".", 1)[1],),
                         f"{s.max_maturity.describe()} is longer than the portfolio maximum of "
                         f"{portfolio.max_maturity.describe()} ({portfolio.max_maturity.key}, line "
                         f"{self.lines.find(('portfolio', portfolio.max_maturity.key.rsplit('.', 1)[1]))[0]})")
        floors = sum(s.min_pct or 0.0 for s in sectors)
        if floors > 100 + 1e-9:
            first = next(s for s in sectors if s.min_pct)
            self.add(("sectors", first.name, "min_pct"),
                     f"the sector minimums add up to {floors:g}%, more than the whole portfolio")
        if allowed:
            room = sum(100.0 if s.max_pct is None else s.max_pct for s in allowed)
            if room < 100 - 1e-9:
                self.add(("sectors",), f"the caps of the allowed sectors ({', '.join(s.name for s in allowed)}) add "
                                       f"up to {room:g}%: a fully invested portfolio cannot comply")


def _longer(a: MaturityLimit, b: MaturityLimit) -> bool:
    """True when limit ``a`` is surely longer than ``b`` (a day of slack between days and years)."""
    if a.unit == b.unit:
        return a.amount > b.amount + 1e-9
    return a.approx_days() > b.approx_days() + 1.0
