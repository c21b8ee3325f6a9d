"""The workstation's save: one transaction under the book's lock, refused over files changed on
disk since the book was loaded, with a reload that re-applies the pending trades."""

from __future__ import annotations

import io
from contextlib import redirect_stdout

import numpy as np

from ladder.cli import main
from ladder.folder.book_file import load_book
from ladder.folder.journal import read_journal
from conftest import drive, settle


def _book_a_buy(app, pilot, face: str):
    view = app.query_one("#trade")
    view.fill("buy", id="NEW-CORP-1", sector="corporate", issuer="Brand New Issuer Inc", face=face,
              maturity_date="2029-06-15", coupon_pct="4.5", rating="AA", price="100.5")


def test_save_over_a_book_changed_on_disk_is_refused_and_reload_reapplies_the_pending_trade(book_copy):
    folder = book_copy.folder
    h = book_copy.holdings
    matured = int(((h.maturity <= np.datetime64("2026-12-31")) & (h.kind != "fund")).sum())   # funds never mature
    seen = {}

    async def script(app, pilot):
        await pilot.press("t")
        await pilot.pause()
        _book_a_buy(app, pilot, "1000000")
        await pilot.press("ctrl+g")
        await settle(app, pilot)
        await pilot.press("ctrl+b", "y")
        await settle(app, pilot)
        with redirect_stdout(io.StringIO()):           # meanwhile, a roll from the command line
            seen["roll"] = main(["roll", str(folder), "--to", "2026-12-31"])
        seen["on_disk"] = (folder / "holdings.csv").read_bytes()
        await pilot.press("ctrl+s")
        await settle(app, pilot)
        seen["question"] = str(app.screen.query_one("#question-text").render())
        seen["after_refusal"] = (folder / "holdings.csv").read_bytes()
        await pilot.press("y")                         # reload and re-apply
        await settle(app, pilot)
        seen["count"] = len(app.book.holdings)
        seen["unsaved"] = dict(app.unsaved)
        await pilot.press("ctrl+s")
        await settle(app, pilot)
        seen["saved"] = dict(app.unsaved)

    drive(book_copy, script)
    assert seen["roll"] == 0
    assert "changed on disk" in seen["question"] and "holdings.csv" in seen["question"]
    assert "re-apply your 1 pending trade" in seen["question"]
    assert seen["after_refusal"] == seen["on_disk"]                # the refused save wrote nothing
    assert seen["count"] == len(book_copy.holdings) - matured + 1   # the roll's book plus the trade
    assert "holdings" in seen["unsaved"] and seen["saved"] == {}
    reread = load_book(folder)
    assert "NEW-CORP-1" in set(reread.holdings.id) and len(reread.holdings) == seen["count"]
    assert not ((reread.holdings.maturity <= np.datetime64("2026-12-31")) & (reread.holdings.kind != "fund")).any()
    actions = [e.action for e in read_journal(folder)]   # the roll credits coupons and dividends too (issue 14)
    assert actions.count("mature") == matured and actions[-1] == "buy"


def test_reload_drops_a_pending_sale_of_a_holding_rolled_off_meanwhile(book_copy):
    folder = book_copy.folder
    h = book_copy.holdings
    first = int(np.argmin(np.where(h.kind == "fund", np.datetime64("2100-01-01"), h.maturity)))
    gone = str(h.id[first])
    seen = {}

    async def script(app, pilot):
        app.on_holdings_view_sell_wanted(type("Sell", (), {"row": first})())
        await pilot.pause()
        await pilot.press("ctrl+g")
        await settle(app, pilot)
        await pilot.press("ctrl+b", "y")
        await settle(app, pilot)
        with redirect_stdout(io.StringIO()):
            main(["roll", str(folder), "--to", "2026-12-31"])
        notices = []
        app.notify = lambda message, **options: notices.append(message)     # what the user is told
        await pilot.press("ctrl+s")
        await settle(app, pilot)
        await pilot.press("y")
        await settle(app, pilot)
        seen["pending"] = list(app.pending)
        seen["unsaved"] = dict(app.unsaved)
        seen["notices"] = " ".join(notices)

    drive(book_copy, script)
    assert seen["pending"] == [] and "holdings" not in seen["unsaved"]
    assert f"sell {gone}: no longer in the book" in seen["notices"]
