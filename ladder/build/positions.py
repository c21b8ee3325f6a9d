"""What the builder knows about each security, per unit of face, on the settlement date.

The façade fills a ``Positions`` from a valuation (``ladder.analysis.build``); the program reads
only this. Money per unit of face (a price of 99.5 per 100 is 0.995), yields decimal, durations in
years, days calendar days from settlement, cash flows per coverage month
(``ladder.policy.measures.cash_by_month``).
"""

from __future__ import annotations

from dataclasses import dataclass, fields, replace

import numpy as np

from ladder.book.holdings import Holdings
from ladder.policy.model import issuer_key


@dataclass(frozen=True, eq=False)
class Positions:
    holdings: Holdings
    mv: np.ndarray          # dirty price per unit face (a fund: 1)
    book: np.ndarray        # book value per unit face (a purchase: its clean price)
    yld: np.ndarray         # yield to worst, decimal (``Valuation.yield_to_worst``): to worst for callables, else to maturity
    duration: np.ndarray    # effective duration, years
    days: np.ndarray        # calendar days to final maturity (a fund: 1)
    flows: np.ndarray       # (n, months) principal + coupons per unit face in each coverage month

    def __len__(self) -> int:
        return len(self.holdings)

    def basis(self, basis: str) -> np.ndarray:
        """Value per unit face on a policy's percentage basis."""
        return {"market": self.mv, "book": self.book, "face": np.ones(len(self))}[basis]

    @property
    def fund(self) -> np.ndarray:
        return self.holdings.kind == "fund"

    @property
    def issuer_keys(self) -> np.ndarray:
        return np.array([issuer_key(x) for x in self.holdings.issuer], dtype=object)

    def take(self, index) -> "Positions":
        return replace(self, holdings=self.holdings.take(index),
                       **{f.name: getattr(self, f.name)[index] for f in fields(self) if f.name != "holdings"})

    @staticmethod
    def concat(parts: "list[Positions]") -> "Positions":
        return Positions(Holdings.concat([p.holdings for p in parts]),
                         **{f.name: np.concatenate([getattr(p, f.name) for p in parts])
                            for f in fields(Positions) if f.name != "holdings"})
