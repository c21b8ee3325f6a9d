"""A generated 10,074-holding book: the app opens it, computes through the façade in workers and,
once they have finished, switches through every view without error."""

from __future__ import annotations

import asyncio

from conftest import SIZE
from conftest import settle


def test_a_ten_thousand_holding_book_opens_and_every_view_shows(big_book):
    from ladder.tui.app import VIEWS, make_app

    seen = {}

    async def main():
        app = make_app(big_book)
        async with app.run_test(size=SIZE) as pilot:
            await settle(app, pilot)       # every façade task has landed (no polling of the clock)
            for name, key, _ in VIEWS + VIEWS[:1]:
                await pilot.press(key)
                await pilot.pause()
                seen[name] = app.query_one("#views").current
            seen["rows"] = app.query_one("#holdings-table").row_count
            await pilot.press("right", "right", "right", "right", "right", "right", "s")
            await pilot.pause()
            table = app.query_one("#holdings-table")
            seen["sorted"] = table.sort_key
            seen["errors"] = {k: v for k, v in app.results.errors.items()}
            seen["landed"] = set(app.results.values)
            await pilot.press("q")

    asyncio.run(main())
    assert {name: seen[name] for name, _, _ in VIEWS} == {name: name for name, _, _ in VIEWS}
    assert seen["rows"] == len(big_book.holdings) == 10_074
    assert seen["sorted"] == "face"
    assert seen["errors"] == {}
    assert {"valuation", "check", "shock", "plan"} <= seen["landed"]
