"""Results of a policy check: one ``RuleResult`` per rule, with the groups and holdings behind it.

Status order, best to worst: ``pass``, ``near`` (within the warning band of a limit), ``review``
(over a limit by drift after purchase, or a downgrade since purchase: a documented decision is
needed, not a forced sale), ``breach``. A check's status is the worst of its rules.

Units: ``pct`` percent of the portfolio on the policy's basis; ``years``; ``days``; ``currency``;
``long_rating`` / ``short_rating`` (limit and actual are symbols, headroom in notches).
"""

from __future__ import annotations

import datetime as dt
import math
from dataclasses import dataclass

PASS, NEAR, REVIEW, BREACH = "pass", "near", "review", "breach"
STATUSES = (PASS, NEAR, REVIEW, BREACH)
RANK = {s: i for i, s in enumerate(STATUSES)}

Value = float | str | None


def worst(statuses) -> str:
    """The worst of ``statuses`` (``pass`` if there are none)."""
    return max(statuses, key=RANK.__getitem__, default=PASS)


def json_value(value):
    """A JSON-ready scalar: non-finite floats become None, dates ISO text."""
    if isinstance(value, float):
        return value if math.isfinite(value) else None
    if isinstance(value, dt.date):
        return value.isoformat()
    return value


def group_label(group: str, members) -> str:
    """``"Greystone Bank (family: Greystone Bank, Greystone Sweep)"``; the group alone when it has no
    other member than itself."""
    if not members or list(members) == [group]:
        return group
    return f"{group} (family: {', '.join(members)})"


@dataclass(frozen=True)
class Finding:
    """One group a rule measures (an issuer family or issuer, a sector, a holding, a month, or the
    portfolio); ``members`` are the issuers of a family group."""

    group: str
    limit: Value
    actual: Value
    headroom: float | None
    status: str
    holdings: tuple[str, ...]
    members: tuple[str, ...] = ()

    @property
    def label(self) -> str:
        """The group's name, with the members of a family other than the family's own name."""
        return group_label(self.group, self.members)

    def to_json(self) -> dict:
        return {"group": self.group, "members": list(self.members), "limit": json_value(self.limit),
                "actual": json_value(self.actual), "headroom": json_value(self.headroom), "status": self.status,
                "holdings": list(self.holdings)}


@dataclass(frozen=True)
class RuleResult:
    """One rule: its id (key path in the policy file), the rule in words and how the book stands.

    ``limit``/``actual``/``headroom`` are those of the worst group (headroom > 0 is room left);
    ``holdings`` are the ids behind every group that is not ``pass``; ``findings`` lists those groups,
    worst first. ``basis`` is the percentage basis for rules measured on it (else None).
    ``cure_by`` is the check date plus the policy's cure period, for a ``review``. ``testing`` is the
    rule's testing mode; ``group`` the worst group's name; ``per`` ("family" | "issuer") and
    ``members`` (the worst family's issuers) are set for an issuer limit.
    """

    rule: str
    text: str
    limit: Value
    actual: Value
    headroom: float | None
    status: str
    holdings: tuple[str, ...]
    basis: str | None
    unit: str
    findings: tuple[Finding, ...] = ()
    cure_by: dt.date | None = None
    testing: str = "continuous"
    per: str | None = None
    members: tuple[str, ...] = ()
    group: str = ""

    @property
    def worst_group(self) -> str:
        """The worst group's name with a family's members ("" for a rule with one group)."""
        return group_label(self.group, self.members) if self.group != "portfolio" else ""

    def to_json(self) -> dict:
        return {"rule": self.rule, "text": self.text, "limit": json_value(self.limit),
                "actual": json_value(self.actual), "headroom": json_value(self.headroom),
                "status": self.status, "holdings": list(self.holdings), "basis": self.basis, "unit": self.unit,
                "testing": self.testing, "per": self.per, "group": self.group, "members": list(self.members),
                "cure_by": json_value(self.cure_by), "findings": [f.to_json() for f in self.findings]}


@dataclass(frozen=True)
class CheckResult:
    """Every rule of a policy checked against a book on ``as_of``."""

    as_of: dt.date
    policy_name: str
    policy_version: str
    policy_adopted: dt.date
    basis: str
    testing: str
    status: str
    rules: tuple[RuleResult, ...]

    @property
    def policy_title(self) -> str:
        return f"{self.policy_name}, version {self.policy_version}, adopted {self.policy_adopted.isoformat()}"

    def rule(self, key: str) -> RuleResult:
        """The result of the rule with id ``key``; KeyError if the policy has no such rule."""
        for r in self.rules:
            if r.rule == key:
                return r
        raise KeyError(key)

    def counts(self) -> dict[str, int]:
        """How many rules are at each status."""
        return {s: sum(r.status == s for r in self.rules) for s in STATUSES}

    def to_json(self) -> dict:
        return {"as_of": self.as_of.isoformat(), "status": self.status,
                "policy": {"name": self.policy_name, "version": self.policy_version,
                           "adopted": self.policy_adopted.isoformat(), "basis": self.basis,
                           "testing": self.testing},
                "rules": [r.to_json() for r in self.rules]}
