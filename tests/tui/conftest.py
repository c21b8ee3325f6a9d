"""Fixtures for the workstation tests: the demo book, a copy to save into, a 10,000-holding book.

``drive(book, script)`` opens the app on ``book`` in Textual's headless test harness, waits until
every façade task has landed, and runs ``script(app, pilot)`` (a coroutine function).
"""

from __future__ import annotations

import asyncio
import csv

import pytest

from ladder.folder.book_file import load_book
from ladder.demo import demo_source, write_demo

SIZE = (160, 45)
BIG_COPIES = 146          # 146 x the demo's 69 holdings = 10,074 holdings


async def settle(app, pilot) -> None:
    """Wait for every worker (façade tasks, ticket, builder) and the screen to catch up."""
    await pilot.pause()
    await app.workers.wait_for_complete()
    await pilot.pause()


def drive(book, script, size=SIZE):
    from ladder.tui.app import make_app

    async def main():
        app = make_app(book)
        async with app.run_test(size=size) as pilot:
            await settle(app, pilot)
            await script(app, pilot)
        return app

    return asyncio.run(main())


@pytest.fixture(scope="session")
def demo_book(tmp_path_factory):
    """The demo book, from a copy of its own files (never what a run left in the demo folder)."""
    return load_book(write_demo(tmp_path_factory.mktemp("demo") / "book"))


@pytest.fixture
def book_copy(tmp_path):
    """A private copy of the demo book folder (for saving), loaded."""
    folder = tmp_path / "book"
    write_demo(folder)
    return load_book(folder)


@pytest.fixture(scope="session")
def big_book(tmp_path_factory):
    """The demo book with its holdings repeated under new ids: 10,074 holdings."""
    folder = tmp_path_factory.mktemp("big") / "book"
    write_demo(folder)
    with open(demo_source() / "holdings.csv", newline="", encoding="utf-8") as source:
        rows = list(csv.DictReader(source))
    with open(folder / "holdings.csv", "w", newline="", encoding="utf-8") as out:
        writer = csv.DictWriter(out, fieldnames=list(rows[0]))
        writer.writeheader()
        for copy in range(BIG_COPIES):
            # the first copy keeps its ids, among them the cash account that book.toml names
            writer.writerows(dict(row, id=f"{row['id']}-{copy:03d}" if copy else row["id"]) for row in rows)
    return load_book(folder)
