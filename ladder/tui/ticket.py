"""The trade ticket's form as a one-trade trades file, checked through the façade. No Textual.

The ticket writes its trade as a trades file (``ladder.policy.trades``: the holdings columns plus
``action``, ``settle_date`` and ``funded_from``) in a private temporary folder and has ``ladder.analysis.check.check_trade_file`` read it,
so a ticket is validated exactly as a trades file on the command line is.
"""

from __future__ import annotations

import csv
import tempfile
from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np

from ladder.book.holdings_file import COLUMNS
from ladder.errors import InputError, Problems

TICKET_FILE = "ticket.csv"
SETTLEMENT = ("settle_date", "funded_from")    # optional trades-file columns (ladder.policy.trades)
BUY_FIELDS = ("id", "sector", "issuer", "kind", "face", "maturity_date", "coupon_pct", "rating", "short_rating",
              "price", "yield_pct") + SETTLEMENT
SELL_FIELDS = ("id", "face") + SETTLEMENT


@dataclass(frozen=True)
class Ticket:
    """What the form says: ``action`` buy | sell and the columns typed (text, as in a file)."""

    action: str
    fields: dict[str, str]

    def label(self) -> str:
        return f"{self.action} {self.fields.get('face', '')} {self.fields.get('id', '')}".strip()


def ticket_row(ticket: Ticket, holdings) -> dict[str, str]:
    """The trades-file row: a sell is the holding's own row (``ladder.folder.save.holdings_rows``)
    with the face to sell (InputError when the book holds no such id: nothing to complete it from)."""
    row = {name: ticket.fields.get(name, "").strip() for name in COLUMNS}
    if ticket.action == "sell":
        hit = np.flatnonzero(holdings.id == row["id"])
        if not len(hit):
            problems = Problems()
            problems.add(TICKET_FILE, 2, COLUMNS.index("id") + 1,
                         f"{row['id'] or 'an empty id'} is not in the book, so it cannot be sold")
            problems.raise_if_any()
        from ladder.folder.save import holdings_rows

        row = dict(holdings_rows(holdings.take(hit[:1]))[0], face=row["face"])
    row["action"] = ticket.action
    row.update({name: ticket.fields.get(name, "").strip() for name in SETTLEMENT})
    return row


def check_ticket(book, ticket: Ticket, valuation=None):
    """The façade's what-if (``TradeWhatIf``) for the ticket; InputError lists what is wrong in it,
    each problem as ``ticket.csv:2:column: message``."""
    from ladder.analysis.check import check_proposed
    from ladder.policy.trades import read_trades

    row = ticket_row(ticket, book.holdings)
    with tempfile.TemporaryDirectory(prefix="ladder-ticket-") as folder:
        path = Path(folder) / TICKET_FILE
        with open(path, "w", newline="", encoding="utf-8") as out:
            writer = csv.DictWriter(out, fieldnames=list(COLUMNS) + ["action", *SETTLEMENT])
            writer.writeheader()
            writer.writerow(row)
        try:
            trades = read_trades(path, book.holdings, book.valuation_date)
        except InputError as error:
            raise InputError([replace(p, file=TICKET_FILE) for p in error.problems]) from None
    return check_proposed(book, trades, before=valuation)


def booked_trades(whatif):
    """The ticket's trades as they would be booked: a buy with no book price at its trade price on
    the valuation date (as the what-if measured it)."""
    from dataclasses import replace as change

    trades = whatif.trades
    h = trades.holdings
    after = whatif.after
    position = {hid: k for k, hid in enumerate(after.holdings.id)}
    buy = trades.action == "buy"
    clean = np.array([after.clean[position[hid]] if hid in position else np.nan for hid in h.id])
    missing = buy & np.isnan(h.book_price)
    held = change(h, book_price=np.where(missing, clean, h.book_price),
                  purchase_date=np.where(missing, np.datetime64(after.as_of, "D"), h.purchase_date))
    return change(trades, holdings=held)
