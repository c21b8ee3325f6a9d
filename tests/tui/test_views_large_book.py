"""A generated 10,074-holding book: the app opens it, computes through the façade in a worker and, once
the valuation, check and shock have landed, switches through every view without error while the slow
cash plan may still be computing. The test waits for the shock's result message, never on the clock."""

from __future__ import annotations

import asyncio

from conftest import SIZE


def test_a_ten_thousand_holding_book_opens_and_every_view_shows(big_book):
    from ladder.tui.app import VIEWS, make_app
    from ladder.tui.app import Computed

    seen = {}

    async def main():
        app = make_app(big_book)
        shock = asyncio.Event()        # set when the shock's result reaches the app (the third task; the plan is last)

        def arrived(message) -> None:
            if isinstance(message, Computed) and message.task == "shock":
                shock.set()

        async with app.run_test(size=SIZE, message_hook=arrived) as pilot:
            await shock.wait()
            await pilot.pause()            # the app handles the message
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
    assert {"valuation", "check", "shock"} <= seen["landed"]
