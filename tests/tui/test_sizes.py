"""Every view keeps its main figures on screen at 80x24, 120x40 and 220x60 (issue 19).

The checks read the text Textual actually drew (the screen's compositor), not widget state: a table
that holds the right rows but is squeezed to its header fails here.
"""

from __future__ import annotations

import numpy as np
import pytest

from conftest import drive, settle
from ladder.analysis.build import build_ladder
from ladder.analysis.check import check_book
from ladder.analysis.plan import plan_book
from ladder.analysis.shock import shock_book
from ladder.analysis.valuation import value_book
from ladder.risk.rungs import RUNGS, rung_index
from ladder.tui import format as fmt

SIZES = [(80, 24), (120, 40), (220, 60)]
MIN_ROWS = 8
CASH = "25000000"


def screen_lines(app) -> list[str]:
    """The text of every line of the screen as drawn (the compositor's strips)."""
    return ["".join(segment.text for segment in strip) for strip in app.screen._compositor.render_strips()]


def rows_starting(lines: list[str], keys) -> int:
    """How many of ``keys`` begin a line (after the one-cell margin): rows of a table on screen."""
    starts = {line[1:].split("  ")[0].rstrip("…") for line in lines}
    return sum(any(key.startswith(s) and s for s in starts) for key in keys)


@pytest.fixture(scope="module")
def expected(demo_book):
    v = value_book(demo_book)
    return {"valuation": v, "check": check_book(demo_book).result, "shock": shock_book(demo_book),
            "plan": plan_book(demo_book), "build": build_ladder(demo_book, CASH)}


@pytest.mark.parametrize("size", SIZES, ids=[f"{w}x{h}" for w, h in SIZES])
def test_every_view_shows_its_key_figures(demo_book, expected, size):
    screens = {}

    async def script(app, pilot):
        async def shoot(name, *keys):
            if keys:
                await pilot.press(*keys)
            await settle(app, pilot)
            screens[name] = screen_lines(app)

        await shoot("holdings")
        for name, key in [("ladder", "l"), ("policy", "p"), ("rates", "r"), ("plan", "c"), ("curve", "y")]:
            await shoot(name, key)
        await shoot("builder", "b", "f", *CASH, "ctrl+g")
        await pilot.press("t")
        app.query_one("#trade").fill("buy", id="NEW-CORP-1", sector="corporate", issuer="Brand New Issuer Inc",
                                     face="40000000", maturity_date="2029-06-15", coupon_pct="4.5", rating="AA",
                                     price="100.5", funded_from="new_money")
        await shoot("trade", "ctrl+g")
        await shoot("booked", "ctrl+b", *"breach", "enter")

    drive(demo_book, script, size=size)
    width, height = size
    for name, lines in screens.items():
        assert len(lines) == height and all(len(line) == width for line in lines), name
        assert sum("not investment advice" in line for line in lines) == 1, name     # the caution: one line
        assert all(f"{key} " in lines[1] for key in "hlprcambyt"), name              # the whole view bar

    v = expected["valuation"]
    text = "\n".join(screens["holdings"])
    assert rows_starting(screens["holdings"], v.holdings.id) >= MIN_ROWS
    assert fmt.money(v.market_value[0]) in text and fmt.money(v.totals.market_value) in text

    index = rung_index(np.datetime64(v.as_of), v.holdings.maturity)
    face = np.bincount(index, v.holdings.face, len(RUNGS))
    assert rows_starting(screens["ladder"], RUNGS) == len(RUNGS)
    assert all(fmt.money(f) in "\n".join(screens["ladder"]) for f in face)

    check = expected["check"]
    worst = next(r for r in check.rules if r.status == "review")
    text = "\n".join(screens["policy"])
    assert rows_starting(screens["policy"], [r.rule for r in check.rules]) >= MIN_ROWS
    assert worst.rule in text and "REVIEW" in text and "-1 notch" in text

    shock = expected["shock"]
    text = "\n".join(screens["rates"])
    assert rows_starting(screens["rates"], [s.name for s in shock.scenarios]) >= MIN_ROWS
    assert all(fmt.money(x) in text for x in shock.portfolio.value[0][:MIN_ROWS])
    flowing = " ".join(line.strip() for line in screens["rates"])        # the summary wraps on narrow screens
    assert f"spread duration {fmt.number(shock.portfolio_spread_duration, 3)}" in flowing
    if height >= 30:      # the spread-duration table is a secondary pane: folded on short screens
        exposed = shock.valuation.holdings.id[shock.spread_duration != 0]
        assert rows_starting(screens["rates"], exposed) >= 3

    pr = expected["plan"].projection
    ends = [str(d) for d in pr.periods.end]
    text = "\n".join(screens["plan"])
    assert rows_starting(screens["plan"], ends) >= MIN_ROWS
    assert all(fmt.money(x) in text for x in pr.closing_cash[:MIN_ROWS])

    tenors = list(demo_book.curve.tenors)
    text = "\n".join(screens["curve"])
    assert rows_starting(screens["curve"], tenors) >= MIN_ROWS
    assert all(fmt.percent(y) in text for y in demo_book.curve.par_yields[:MIN_ROWS])

    build = expected["build"]
    h = build.trades.holdings
    text = "\n".join(screens["builder"])
    assert "BUILT" in text
    assert all(fmt.money(f) in text and str(m) in text for f, m in zip(h.face, h.maturity))   # every trade sized

    text = "\n".join(screens["trade"])
    assert "BREACH" in text and "portfolio.issuer_max_pct" in text

    assert screens["booked"][0].startswith(" UNSAVED ")      # the badge opens the top line


@pytest.fixture(scope="module")
def lived_book(tmp_path_factory):
    """A demo copy with a month of life: November's month-end recorded, rolled to 31 December
    (coupons, maturities, dividends journaled), a withdrawal, December's month-end recorded."""
    import contextlib
    import io

    from ladder.cli import main
    from ladder.demo import write_demo
    from ladder.folder.book_file import load_book

    folder = write_demo(tmp_path_factory.mktemp("lived") / "book")
    out = tmp_path_factory.mktemp("reports")
    with contextlib.redirect_stdout(io.StringIO()):
        assert main(["report", str(folder), "--out", str(out)]) == 0
        assert main(["roll", str(folder), "--to", "2026-12-31"]) == 0
        assert main(["cash", str(folder), "--withdraw", "2000000", "--memo", "payroll"]) == 0
        assert main(["report", str(folder), "--out", str(out)]) == 0
    return load_book(folder)


@pytest.mark.parametrize("size", SIZES, ids=[f"{w}x{h}" for w, h in SIZES])
def test_cash_and_history_views_show_their_key_figures(lived_book, size):
    from ladder.analysis.cash_activity import cash_activity
    from ladder.report.history import month_ends

    screens = {}

    async def script(app, pilot):
        for name, key in [("cash", "a"), ("history", "m")]:
            await pilot.press(key)
            await settle(app, pilot)
            screens[name] = screen_lines(app)
        await pilot.press("a", "slash", *"coupons", "enter")
        await settle(app, pilot)
        screens["coupons"] = screen_lines(app)

    drive(lived_book, script, size=size)
    a = cash_activity(lived_book)
    text = "\n".join(screens["cash"])
    assert f"balance {fmt.money(a.balance, 2)}" in text
    assert rows_starting(screens["cash"], [str(e.date) for e in a.entries]) >= 1
    shown = sum(fmt.money(e.amount, 2, sign=True) in text for e in a.entries)
    assert shown >= min(MIN_ROWS, len(a.entries))
    coupons = a.rows({"coupon", "dividend"})
    text = "\n".join(screens["coupons"])
    assert f"{len(coupons)} of {len(a.entries)} lines" in text
    assert "withdraw" not in text and "mature " not in text

    m = month_ends(lived_book)
    text = "\n".join(screens["history"])
    assert len(m.as_of) == 2 and rows_starting(screens["history"], [str(d) for d in m.as_of]) == 2
    assert all(fmt.money(x) in text for x in m.market_value)
    assert all(fmt.percent(y) in text for y in m.market_yield)


def test_cash_plan_compares_the_reinvestment_rules(demo_book):
    from ladder.analysis.plan import compare_records, compare_rules

    screens = {}

    async def script(app, pilot):
        await pilot.press("c", "o")
        await settle(app, pilot)
        screens["compare"] = screen_lines(app)

    drive(demo_book, script, size=(120, 40))
    records = compare_records(compare_rules(demo_book))
    text = "\n".join(screens["compare"])
    rules = {r["rule"].replace("_", " ") for r in records}
    assert all(rule in text for rule in rules)
    assert sum(fmt.money(r["income_24m"]) in text for r in records) >= MIN_ROWS
