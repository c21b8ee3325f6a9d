"""Workstation benchmark: view switches on a 10,074-holding book against the demo book's, and the
Holdings table against filling Textual's built-in DataTable with the same rows.

Run: ``python tests/bench/bench_workstation.py`` (a few minutes: it waits for the 10k book's cash
plan). Times are wall seconds from the switch to the harness's next idle screen, taken once every
façade task has landed, so no worker competes for the interpreter; printed as milliseconds and as
ratios to references measured in the same run (the demo book; Textual's built-in DataTable).
"""

from __future__ import annotations

import asyncio
import csv
import statistics
import sys
import tempfile
import time
from pathlib import Path

from ladder.folder.book_file import load_book
from ladder.demo import demo_source, write_demo

COPIES = 146
ROUNDS = 3


def big_book(folder: Path):
    write_demo(folder)
    rows = list(csv.DictReader(open(demo_source() / "holdings.csv", newline="", encoding="utf-8")))
    with open(folder / "holdings.csv", "w", newline="", encoding="utf-8") as out:
        writer = csv.DictWriter(out, fieldnames=list(rows[0]))
        writer.writeheader()
        for copy in range(COPIES):
            # the first copy keeps its ids, among them the cash account that book.toml names
            writer.writerows(dict(row, id=f"{row['id']}-{copy:03d}" if copy else row["id"]) for row in rows)
    return load_book(folder)


async def switches(book) -> dict[str, float]:
    """Median wall seconds to show each view once every figure is computed."""
    from ladder.tui.app import VIEWS, make_app

    app = make_app(book)
    times: dict[str, list[float]] = {name: [] for name, _, _ in VIEWS}
    async with app.run_test(size=(160, 45)) as pilot:
        while app.results.pending:
            await pilot.pause(0.2)
        for name, _, _ in VIEWS:        # first showing builds each view's table from the results
            app.action_show_view(name)
            await pilot.pause()
        for _ in range(ROUNDS):
            for name, _, _ in VIEWS:
                start = time.perf_counter()
                app.action_show_view(name)
                await pilot.pause()
                times[name].append(time.perf_counter() - start)
        app.action_show_view("holdings")
        await pilot.pause()
        start = time.perf_counter()
        app.query_one("#holdings-table").sort_by("market_value", True)
        await pilot.pause()
        sort = time.perf_counter() - start
        app.exit()
    out = {name: statistics.median(t) for name, t in times.items()}
    out["sort holdings by market value"] = sort
    return out


async def builtin_table_fill(book) -> float:
    """Seconds to fill Textual's DataTable with the Holdings rows of ``book`` (the reference)."""
    from textual.app import App
    from textual.widgets import DataTable

    from ladder.analysis.valuation import value_book
    from ladder.tui.views.holdings import holdings_frame

    frame = holdings_frame(value_book(book))
    rows = list(zip(*[frame.text[c.key] for c in frame.columns]))

    class Fill(App):
        def compose(self):
            yield DataTable()

    app = Fill()
    async with app.run_test(size=(160, 45)) as pilot:
        table = app.query_one(DataTable)
        table.add_columns(*[c.label for c in frame.columns])
        start = time.perf_counter()
        table.add_rows(rows)
        await pilot.pause()
        return time.perf_counter() - start


def main() -> None:
    with tempfile.TemporaryDirectory() as folder:
        big = big_book(Path(folder) / "big")
        demo = load_book(demo_source())
        small = asyncio.run(switches(demo))
        large = asyncio.run(switches(big))
        fill = asyncio.run(builtin_table_fill(big))
    print(f"{'view':<32}{'demo ms':>10}{'10k ms':>10}{'10k/demo':>10}")
    for name in large:
        print(f"{name:<32}{small[name] * 1e3:>10.1f}{large[name] * 1e3:>10.1f}{large[name] / small[name]:>10.2f}")
    worst = max(v for k, v in large.items() if not k.startswith("sort"))
    print(f"built-in DataTable filled with the 10,074 Holdings rows: {fill * 1e3:.0f} ms "
          f"({fill / worst:.1f} x the slowest 10k view switch)")


if __name__ == "__main__":
    sys.exit(main())
