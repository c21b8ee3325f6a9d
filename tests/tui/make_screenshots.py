"""Save the SVG screenshots of docs/workstation.md: every view of the demo book, as Textual draws it,
at 160x45 (``NAME.svg``) and at 80x24 (``NAME-80x24.svg``).

Run from the repository root: ``python tests/tui/make_screenshots.py`` (not a test; pytest skips it).
"""

from __future__ import annotations

import asyncio
import contextlib
import io
import sys
import tempfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).parent))

from conftest import settle  # noqa: E402

from ladder.demo import demo_source  # noqa: E402

OUT = Path(__file__).resolve().parents[2] / "docs" / "img"
SIZES = {(160, 45): "", (80, 24): "-80x24"}


async def main() -> None:
    with tempfile.TemporaryDirectory() as folder:
        lived = lived_copy(Path(folder))
        for size, suffix in SIZES.items():
            await shoot_all(size, suffix, lived)


def lived_copy(folder: Path) -> Path:
    """A demo copy a month on: November's month-end recorded, rolled to 31 December, a withdrawal,
    December's month-end recorded (for the Cash and History views)."""
    from ladder.cli import main as ladder
    from ladder.demo import write_demo

    book = write_demo(folder / "book")
    with contextlib.redirect_stdout(io.StringIO()):
        for args in (["report", str(book), "--out", str(folder / "out")], ["roll", str(book), "--to", "2026-12-31"],
                     ["cash", str(book), "--withdraw", "2000000", "--memo", "payroll"],
                     ["report", str(book), "--out", str(folder / "out")]):
            assert ladder(args) == 0, args
    return book


async def shoot_all(size: tuple[int, int], suffix: str, lived: Path) -> None:
    from ladder.tui.app import make_app

    app = make_app(lived)
    async with app.run_test(size=size) as pilot:
        await settle(app, pilot)
        for name, key in (("cash", "a"), ("history", "m")):
            await pilot.press(key)
            await settle(app, pilot)
            app.save_screenshot(f"{name}{suffix}.svg", str(OUT))
            print("saved", OUT / f"{name}{suffix}.svg")
        await pilot.press("ctrl+q")

    app = make_app(demo_source())
    async with app.run_test(size=size) as pilot:
        await settle(app, pilot)

        async def shoot(name: str, *keys: str) -> None:
            if keys:
                await pilot.press(*keys)
            await settle(app, pilot)
            app.save_screenshot(f"{name}{suffix}.svg", str(OUT))
            print("saved", OUT / f"{name}{suffix}.svg")

        await shoot("holdings")
        await shoot("holding-detail", *["down"] * 24, "enter")
        await pilot.press("escape")
        await shoot("ladder", "l")
        await shoot("policy", "p")
        await shoot("rates", "r")
        await shoot("cash-plan", "c")
        await shoot("curve", "y")
        await pilot.press("h", "home", "down", "down", "x")     # a sale of DEMO-TSY-0103, with its realized gain
        await shoot("trade-ticket", "ctrl+g")
        await shoot("builder", "b", "f", *"25000000", "ctrl+g", "escape")
        await pilot.press("ctrl+q")


if __name__ == "__main__":
    asyncio.run(main())
