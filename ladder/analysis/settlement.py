"""Trades settle through the book's cash account: a buy is paid from it, a sale credits it.

The cash account (``[cash] account`` of book.toml) is a fund holding whose face is the balance in
currency units. On each trade's settlement date (``settle_date``, default the valuation date):
- a buy costs its dirty price x face / 100 (clean + accrued, accrued by the holding's own day count);
- a sale brings in the same on the holding sold; its realized gain is proceeds less accrued less the
  amortized cost of the face sold on the settlement date (effective-interest method,
  ``ladder.pricing.amortization``; a holding with no book price is carried at its clean market value,
  so no gain is realized on it).
``funded_from`` names where the money comes from or goes: the cash account (empty), another fund
holding (journaled as a sale or purchase of that fund at 100, through the cash account), or
``new_money`` (journaled as a deposit or withdrawal). Every journal ``amount`` is cash into (+) or out
of (-) the cash account, so the account's balance is its opening balance plus every amount. A book
with no cash account treats every trade as new money. A buy the paying account cannot pay leaves a
``shortfall``: a breach in the what-if, a refusal when booking. Cash moves in cents: every amount is
rounded to the cent (common practice), so the balance is the opening balance plus the amounts exactly.
"""

from __future__ import annotations

import datetime as dt
import math
from dataclasses import dataclass, replace

import numpy as np

from ladder.analysis.valuation import value_book
from ladder.errors import Problems
from ladder.folder.book_file import Book
from ladder.folder.journal import JournalEntry
from ladder.book.holdings import Holdings
from ladder.policy.trades import NEW_MONEY, Trades, apply_trades
from ladder.pricing.amortization import amortize

FUNDING_REASON = "new money for"   # how a trade's new-money deposit or withdrawal line begins its reason
CENT = 0.005   # currency units: a balance within half a cent of covering a payment covers it


@dataclass(frozen=True)
class TradeEconomics:
    """One trade as it settles: prices per 100, money in currency units, ``amount`` into (+) or out of
    (-) the paying account, ``book_value`` the amortized cost of what left (a sale) or arrived (a buy,
    its clean cost), ``realized_gain`` NaN for a buy; ``account`` paid or credited and its balance
    before and after; ``shortfall`` what the account lacks to pay a buy (0 if it can)."""

    id: str
    action: str
    row: int
    settle_date: dt.date
    face: float
    price: float
    ytm: float
    accrued: float
    amount: float
    book_value: float
    realized_gain: float
    account: str
    cash_before: float
    cash_after: float
    shortfall: float

    def to_json(self) -> dict:
        out = {k: getattr(self, k) for k in self.__dataclass_fields__}
        out["settle_date"] = self.settle_date.isoformat()
        out["ytm_pct"] = 100.0 * out.pop("ytm")
        return {k: (None if isinstance(v, float) and not math.isfinite(v) else v) for k, v in out.items()}


@dataclass(frozen=True, eq=False)
class Settlement:
    """The holdings after the trades settled, the journal lines, each trade's economics and the
    cash account's balance before and after (NaN when the book has none)."""

    holdings: Holdings
    entries: tuple[JournalEntry, ...]
    trades: tuple[TradeEconomics, ...]
    account: str
    cash_before: float
    cash_after: float

    @property
    def shortfalls(self) -> tuple[TradeEconomics, ...]:
        return tuple(t for t in self.trades if t.shortfall > 0)

    def refuse_shortfalls(self, where: str, row_of=None) -> None:
        """Raise InputError naming each trade its account cannot pay (``where`` is the file or option)."""
        problems = Problems()
        for t in self.shortfalls:
            problems.add(where, t.row, 0, f"{t.action} {t.id}: {t.account} holds {t.cash_before:,.2f} and the "
                         f"trade costs {-t.amount:,.2f}; short by {t.shortfall:,.2f}. Fund it (funded_from) or "
                         "deposit first (ladder cash --deposit); nothing was written")
        problems.raise_if_any()


def cash_balance(book: Book, holdings: Holdings | None = None) -> float:
    """The cash account's balance (its face, currency units); NaN when the book names none."""
    h = book.holdings if holdings is None else holdings
    hit = h.id == book.cash_account
    return float(h.face[hit].sum()) if book.cash_account and hit.any() else math.nan


def _priced(book: Book, holdings: Holdings, date: dt.date):
    """(clean, accrued, ytm) per 100 of ``holdings`` valued on ``date`` with the book's curve and spreads."""
    v = value_book(book.with_holdings(holdings), date)
    return v.clean, v.accrued, v.measures.ytm


def _amortized(holdings: Holdings, date: dt.date, clean: np.ndarray) -> np.ndarray:
    """Clean amortized cost per 100 on ``date``; the clean price where the holding has no book price."""
    known = ~np.isnan(holdings.book_price) & ~np.isnat(holdings.purchase_date)
    cost = np.array(clean, dtype=np.float64)
    if known.any():
        sub = holdings.take(known)
        cost[known] = amortize(sub).cost(np.array([date], dtype="datetime64[D]"))[:, 0]
    return cost


def settle_trades(book: Book, trades: Trades, reason: str = "") -> Settlement:
    """``trades`` settled through the book's cash account (see the module docstring)."""
    h = book.holdings
    n = len(trades)
    default = np.datetime64(book.valuation_date)
    dates = np.full(n, default) if trades.settle_date is None else np.where(np.isnat(trades.settle_date), default,
                                                                            trades.settle_date)
    funded = np.full(n, "", dtype=object) if trades.funded_from is None else trades.funded_from
    buys = trades.action == "buy"
    clean, accrued, ytm, book_value = (np.full(n, np.nan) for _ in range(4))
    held = {hid: i for i, hid in enumerate(h.id)}
    for day in np.unique(dates):
        date = day.astype(dt.date)
        rows = np.flatnonzero((dates == day) & buys)
        if len(rows):
            clean[rows], accrued[rows], ytm[rows] = _priced(book, trades.holdings.take(rows), date)
            book_value[rows] = clean[rows] * trades.holdings.face[rows] / 100.0
        rows = np.flatnonzero((dates == day) & ~buys)
        if len(rows):
            sold = h.take(np.array([held[hid] for hid in trades.holdings.id[rows]], dtype=np.int64))
            clean[rows], accrued[rows], ytm[rows] = _priced(book, sold, date)
            book_value[rows] = _amortized(sold, date, clean[rows]) * trades.holdings.face[rows] / 100.0
    face = trades.holdings.face
    amount = np.round(np.where(buys, -1.0, 1.0) * (clean + accrued) * face / 100.0, 2)   # cash moves in cents
    book_value = np.round(book_value, 2)
    balances = {hid: float(f) for hid, f, k in zip(h.id, h.face, h.kind) if k == "fund"}
    account = book.cash_account
    entries, economics = [], []
    for i in range(n):
        date, hid, action = dates[i].astype(dt.date), str(trades.holdings.id[i]), str(trades.action[i])
        source = funded[i] or (account if account else NEW_MONEY)
        paying = account if source == NEW_MONEY else source
        before = balances.get(paying, math.nan)
        money = float(amount[i])
        if source == NEW_MONEY and account:
            entries.append(JournalEntry(date, "deposit" if money < 0 else "withdraw", account, -money, -money, 100.0,
                                        f"{FUNDING_REASON} {action} {hid}", book_value=-money))
        elif source != account and account:      # another fund pays or receives through the cash account
            entries.append(JournalEntry(date, "sell" if money < 0 else "buy", source, abs(money), -money, 100.0,
                                        f"{'funds' if money < 0 else 'receives'} {action} {hid}",
                                        book_value=abs(money)))
        if paying in balances and source != NEW_MONEY:
            balances[paying] += money
        after = balances.get(paying, math.nan)
        shortfall = max(0.0, -after) if money < 0 and source != NEW_MONEY and after < -CENT else 0.0
        gain = math.nan if buys[i] else money - float(accrued[i] * face[i] / 100.0) - float(book_value[i])
        entries.append(JournalEntry(date, action, hid, float(face[i]), money, float(clean[i]), reason,
                                    book_value=float(book_value[i])))
        economics.append(TradeEconomics(hid, action, int(trades.holdings.row[i]), date, float(face[i]),
                                        float(clean[i]), float(ytm[i]), float(accrued[i] * face[i] / 100.0), money,
                                        float(book_value[i]), gain, paying if source != NEW_MONEY else NEW_MONEY,
                                        before if source != NEW_MONEY else math.nan,
                                        after if source != NEW_MONEY else math.nan, shortfall))
    opening = {hid: float(f) for hid, f, k in zip(h.id, h.face, h.kind) if k == "fund"}
    new = _bought_at_cost(apply_trades(h, trades), trades, clean, dates, default)
    if account and account in opening and account not in set(new.id):    # sold in full: the account stays, empty
        new = Holdings.concat([new, replace(h.take(h.id == account), face=np.zeros(1))])
    faces = np.array([f + balances.get(hid, 0.0) - opening.get(hid, 0.0) for hid, f in zip(new.id, new.face)],
                     dtype=np.float64)    # the accounts' moves on top of the trades' own
    new = replace(new, face=faces)
    return Settlement(new, tuple(entries), tuple(economics), account, cash_balance(book), cash_balance(book, new))


def _bought_at_cost(holdings: Holdings, trades: Trades, clean, dates, valuation) -> Holdings:
    """Bought lots settled on the valuation date without a book price carry their clean trade price
    and that date as book price and purchase date (their amortized cost starts there)."""
    buys = np.flatnonzero(trades.action == "buy")
    pos = {hid: i for i, hid in enumerate(holdings.id)}
    price, bought = holdings.book_price.copy(), holdings.purchase_date.copy()
    for i in buys:
        j = pos[trades.holdings.id[i]]
        if np.isnan(price[j]) and dates[i] == valuation:
            price[j], bought[j] = round(float(clean[i]), 6), valuation
    return replace(holdings, book_price=price, purchase_date=bought)
