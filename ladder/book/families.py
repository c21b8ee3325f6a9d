"""Issuer families: which issuers belong together (a parent and its affiliates), from ``issuers.csv``.

The file has columns ``issuer,parent``, one issuer a row; the parent may itself have a parent (a
chain), and the top of a chain names the family. An issuer not listed is its own family. Names are
matched as the policy matches them: case-insensitive, runs of blanks as one space
(``ladder.policy.model.issuer_key``'s rule, repeated here because the book layer sits below policy).
Refused whole (``InputError``): an issuer given two different parents, an issuer its own parent,
and a cycle of parents, each as ``file:row:column``.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.book.table_file import read_rows
from ladder.errors import Problems

COLUMNS = ("issuer", "parent")


def name_key(name: str) -> str:
    """Case-insensitive, runs of blanks as one space."""
    return " ".join(str(name).split()).casefold()


@dataclass(frozen=True)
class Families:
    """``parent``: issuer key -> the parent's name as written; ``names``: issuer key -> a spelling."""

    parent: dict[str, str]
    names: dict[str, str]

    @staticmethod
    def none() -> "Families":
        return Families({}, {})

    def __len__(self) -> int:
        return len(self.parent)

    def family_of(self, issuer: str) -> str:
        """The family's name (the top of the issuer's chain of parents, as written), or the issuer."""
        name, seen = str(issuer), set()
        while name_key(name) in self.parent and name_key(name) not in seen:
            seen.add(name_key(name))
            name = self.parent[name_key(name)]
        return self.names.get(name_key(name), name)

    def families(self, issuers) -> np.ndarray:
        """The family name of each issuer in ``issuers`` (object array; one lookup per distinct name)."""
        issuers = np.asarray(issuers, dtype=object)
        distinct, inverse = np.unique(issuers.astype(str), return_inverse=True)
        return np.array([self.family_of(x) for x in distinct] + [""], dtype=object)[:-1][inverse.reshape(-1)]


def read_families(path) -> Families:
    """Read ``issuers.csv`` at ``path``; raises ``InputError`` listing every problem."""
    name = str(path)
    problems = Problems()
    parent: dict[str, str] = {}
    first_row: dict[str, int] = {}
    names: dict[str, str] = {}
    for line, cell in read_rows(path, COLUMNS, problems):
        (issuer_col, issuer), (parent_col, boss) = cell["issuer"], cell["parent"]
        for col, text, what in ((issuer_col, issuer, "issuer"), (parent_col, boss, "parent")):
            if not text:
                problems.add(name, line, col, f"{what} is empty")
        if not issuer or not boss:
            continue
        key = name_key(issuer)
        if key == name_key(boss):
            problems.add(name, line, parent_col, f"{issuer} is given as its own parent")
            continue
        if key in parent and name_key(parent[key]) != name_key(boss):
            problems.add(name, line, parent_col, f"{issuer} already has the parent {parent[key]} "
                                                 f"(row {first_row[key]}); an issuer belongs to one family")
            continue
        parent.setdefault(key, boss)
        first_row.setdefault(key, line)
        names.setdefault(key, issuer)
        names.setdefault(name_key(boss), boss)
    for key, row in first_row.items():
        chain, at = [key], name_key(parent[key])
        while at in parent and at not in chain:
            chain.append(at)
            at = name_key(parent[at])
        if at == key:
            loop = " -> ".join(names[k] for k in chain + [key])
            problems.add(name, row, 2, f"a cycle of parents: {loop}")
    problems.raise_if_any()
    return Families(parent, names)
