"""Save the SVG screenshots of docs/workstation.md: every view of the demo book, as Textual draws it,
at 160x45 (``NAME.svg``) and at 80x24 (``NAME-80x24.svg``).

Run from the repository root: ``python tests/tui/make_screenshots.py`` (not a test; pytest skips it).
"""

from __future__ import annotations

import asyncio
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).parent))

from conftest import settle  # noqa: E402

from ladder.demo import demo_source  # noqa: E402

OUT = Path(__file__).resolve().parents[2] / "docs" / "img"
SIZES = {(160, 45): "", (80, 24): "-80x24"}


async def main() -> None:
    for size, suffix in SIZES.items():
        await shoot_all(size, suffix)


async def shoot_all(size: tuple[int, int], suffix: str) -> None:
    from ladder.tui.app import make_app

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
        await pilot.press("t")
        app.query_one("#trade").fill("buy", id="NEW-CORP-1", sector="corporate", issuer="Brand New Issuer Inc",
                                     face="40000000", maturity_date="2029-06-15", coupon_pct="4.5", rating="AA",
                                     price="100.5")
        await shoot("trade-ticket", "ctrl+g")
        await shoot("builder", "b", "f", *"25000000", "ctrl+g", "escape")
        await pilot.press("ctrl+q")


if __name__ == "__main__":
    asyncio.run(main())
