"""Policy checks of a book, and of a book after proposed trades (the what-if before a trade)."""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, replace

import numpy as np

from ladder.analysis.settlement import Settlement, settle_trades
from ladder.analysis.valuation import Valuation, value_book
from ladder.folder.book_file import Book
from ladder.policy.checker import check
from ladder.policy.measures import PositionMeasures, cash_by_month
from ladder.policy.results import CheckResult
from ladder.policy.trades import Trades, read_trades
from ladder.policy.whatif import TradeCheck, check_trades


def coverage_months(book: Book) -> int:
    return book.policy.portfolio.cash_needs_horizon_months or 1


def position_measures(book: Book, v: Valuation) -> PositionMeasures:
    """What the rule checker reads, from a valuation of ``book``."""
    return PositionMeasures(v.holdings, np.datetime64(v.as_of), v.market_value, v.book_value, v.effective_duration,
                            v.days_to_maturity,
                            cash_by_month(v.pricer.cash_flows, v.holdings.face, v.as_of, coverage_months(book)),
                            holdings_file=str(book.files["holdings"]),
                            family=book.families.families(v.holdings.issuer))


@dataclass(frozen=True, eq=False)
class BookCheck:
    valuation: Valuation
    result: CheckResult


def check_book(book: Book, at: dt.date | None = None, valuation: Valuation | None = None) -> BookCheck:
    """Every rule of the book's policy against its holdings at ``at`` (default: valuation date)."""
    v = valuation or value_book(book, at)
    return BookCheck(v, check(book.policy, position_measures(book, v), book.cash_needs))


@dataclass(frozen=True, eq=False)
class TradeWhatIf:
    """Every rule and the risk figures before and after proposed trades."""

    before: Valuation
    after: Valuation
    trades: Trades
    check: TradeCheck
    settlement: Settlement

    @property
    def status(self) -> str:
        """The check's status after the trades; ``breach`` too when the cash account cannot pay (the
        built-in rule ``cash_account``)."""
        return "breach" if self.settlement.shortfalls else self.check.status

    def to_json(self) -> dict:
        s = self.settlement
        cash_rule = {"rule": "cash_account", "text": f"the cash account {s.account or '(none)'} pays every buy",
                     "limit": 0.0, "actual": sum(t.shortfall for t in s.shortfalls),
                     "status": "breach" if s.shortfalls else "pass",
                     "holdings": [t.id for t in s.shortfalls]}
        out = self.check.to_json()
        return {"as_of": out.pop("as_of"), "status": self.status,
                "economics": [t.to_json() for t in s.trades],
                "cash": {"account": s.account, "before": s.cash_before, "after": s.cash_after},
                **out, "status_check": self.check.status, "cash_rule": cash_rule}


def _priced_buys(trades: Trades, after: Valuation) -> Valuation:
    """Buys with no ``book_price`` are booked at their trade (market) price: their book value is their
    clean market value, as a purchase at that price would be recorded."""
    buys = np.isin(after.holdings.id, trades.holdings.id[trades.action == "buy"])
    missing = buys & np.isnan(after.book_value)
    if not missing.any():
        return after
    book_value = np.where(missing, after.clean * after.holdings.face / 100.0, after.book_value)
    return replace(after, book_value=book_value, unrealized_gain=np.where(missing, 0.0, after.unrealized_gain))


def check_proposed(book: Book, trades: Trades, at: dt.date | None = None,
                   before: Valuation | None = None) -> TradeWhatIf:
    """The what-if for ``trades`` (already read and validated against the book)."""
    before = before or value_book(book, at)
    settled = settle_trades(book, trades)
    after = _priced_buys(trades, value_book(book.with_holdings(settled.holdings), before.as_of))
    result = check_trades(book.policy, position_measures(book, before), position_measures(book, after), trades,
                          book.cash_needs)
    return TradeWhatIf(before, after, trades, result, settled)


def check_trade_file(book: Book, path, at: dt.date | None = None) -> TradeWhatIf:
    """The what-if for the trades in ``path`` (holdings columns plus ``action`` = buy | sell)."""
    return check_proposed(book, read_trades(path, book.holdings, book.valuation_date), at)
