"""Command options that were tested only at model level, now through ``ladder.cli.main`` on a copy of the
demo book: ``plan --sector/--buffer/--rates/--at``, ``build --allow-sales``, ``report --no-record`` and
``shock --at``.

Sources: each command's ``--help`` (the option's contract); the demo's holdings.csv, cash_needs.csv and
book.toml for hand-computed figures; 31 CFR 356 App. B VI for a bill's price from its discount rate.
"""

import json

import pytest

from ladder.demo import write_demo as copy_demo
from ladder.cli import main


@pytest.fixture(scope="module")
def book(tmp_path_factory):
    """A copy for the commands that only read the book."""
    return copy_demo(tmp_path_factory.mktemp("options") / "tessaline")


def run_json(capsys, *args) -> dict:
    status = main([str(a) for a in args] + ["--format", "json"])
    out = capsys.readouterr()
    assert status == 0, out.err
    return json.loads(out.out)


def plan(capsys, book, *options) -> dict:
    return run_json(capsys, "plan", book, *options)


def test_plan_sector_buys_that_sector_at_its_spread(book, capsys):
    treasury = plan(capsys, book)
    agency = plan(capsys, book, "--sector", "agency")
    assert (treasury["reinvestment"]["sector"], agency["reinvestment"]["sector"]) == ("treasury", "agency")
    extra_bp = agency["reinvestment"]["spread_bp"] - treasury["reinvestment"]["spread_bp"]
    assert extra_bp > 5                          # book.toml: agencies trade 10-30 bp over, Treasuries at 0
    # The spread is added to continuously compounded zero rates; a semiannual yield y moves by (1 + y/2)
    # times that (d/dz of 2(e^(z/2) - 1)), derived. Tolerance 0.05 bp: the purchase is a coupon bond,
    # not a zero, so its yield moves a little less (measured gap 0.02 bp).
    y = treasury["periods"][0]["reinvest_yield_pct"] / 100
    moved_bp = 100 * (agency["periods"][0]["reinvest_yield_pct"] - treasury["periods"][0]["reinvest_yield_pct"])
    assert moved_bp == pytest.approx(extra_bp * (1 + y / 2), rel=0, abs=0.05)
    # what is bought and when is the same, so the higher yield can only add income
    assert agency["income_12m"]["base"] > treasury["income_12m"]["base"]


def test_plan_buffer_is_the_cash_kept_before_reinvesting(book, capsys):
    # a single-tenor rule buys everything above the buffer (match_needs may keep more)
    default = plan(capsys, book, "--reinvest", "longest_rung")
    assert default["reinvestment"]["min_cash_buffer"] == 10_000_000          # book.toml [reinvest]
    smaller = plan(capsys, book, "--reinvest", "longest_rung", "--buffer", "5000000")
    assert smaller["reinvestment"]["min_cash_buffer"] == 5_000_000
    first, first_default = smaller["periods"][0], default["periods"][0]
    # the month's cash before any purchase is the same; less kept means at least as much bought, and the
    # cash kept never falls below the buffer (the policy's purchase limits may keep more in cash)
    assert first["cash_before_sales"] == first_default["cash_before_sales"]
    assert first["closing_cash"] >= 5_000_000 - 0.01 and first_default["closing_cash"] >= 10_000_000 - 0.01
    assert first["reinvested"] >= first_default["reinvested"] - 0.01
    assert first["closing_cash"] + first["reinvested"] == pytest.approx(
        first_default["closing_cash"] + first_default["reinvested"], rel=0, abs=0.01)


def test_plan_forward_rates_reinvest_on_todays_forwards(book, capsys):
    stay = plan(capsys, book, "--reinvest", "longest_rung")           # one 5-year purchase a period
    forward = plan(capsys, book, "--reinvest", "longest_rung", "--rates", "forward")
    assert (stay["reinvestment"]["rates"], forward["reinvestment"]["rates"]) == ("stay", "forward")
    months = [(s["reinvest_yield_pct"], f["reinvest_yield_pct"]) for s, f in zip(stay["periods"], forward["periods"])
              if s["reinvest_yield_pct"] is not None][:4]
    assert len(months) == 4
    # curve.csv rises from 3Y 3.76% through 5Y 3.89% to 7Y 4.02%: a 5-year purchase one month or more
    # ahead yields more on today's forwards than on today's curve (textbook: forwards exceed spot rates
    # on a rising curve), and more the later it is made
    assert all(f > s for s, f in months)
    assert [f for _, f in months] == sorted({f for _, f in months})


def test_plan_at_starts_the_projection_at_the_settlement_date(book, capsys):
    base = plan(capsys, book)
    later = plan(capsys, book, "--at", "2026-12-07")
    assert (base["as_of"], later["as_of"]) == ("2026-11-30", "2026-12-07")
    first = later["periods"][0]
    assert (first["start"], first["end"]) == ("2026-12-08", "2026-12-31")
    # cash_needs.csv, all after 7 December: 8.9m + 6.0m + 3.0m - 7.5m
    assert first["needs"] == base["periods"][0]["needs"] == 10_400_000
    # coupons paid from 1 to 7 December were received before the settlement date
    assert 0 < first["coupons"] < base["periods"][0]["coupons"]


def test_shock_at_values_the_book_at_the_settlement_date(book, capsys):
    at_valuation = run_json(capsys, "shock", book, "--bp=-100,0,100")
    later = run_json(capsys, "shock", book, "--bp=-100,0,100", "--at", "2026-12-07")
    assert (at_valuation["as_of"], later["as_of"]) == ("2026-11-30", "2026-12-07")
    bill = {doc["as_of"]: next(h for h in doc["holdings"] if h["id"] == "DEMO-TSY-0101")
            for doc in (at_valuation, later)}
    # DEMO-TSY-0101: 8,000,000 face, discount rate 3.668%, matures 2026-12-17 (holdings.csv);
    # 31 CFR 356 App. B VI: price = 100 (1 - d t / 360), t the days to maturity (17, then 10)
    assert bill["2026-11-30"]["base_value"] == pytest.approx(8e6 * (1 - 0.03668 * 17 / 360), rel=0, abs=0.01)
    assert bill["2026-12-07"]["base_value"] == pytest.approx(8e6 * (1 - 0.03668 * 10 / 360), rel=0, abs=0.01)
    # a week less to maturity: a shorter book, so less duration
    assert later["effective_duration"] < at_valuation["effective_duration"]


def test_build_allow_sales_may_sell_and_never_does_worse(tmp_path, capsys):
    book = copy_demo(tmp_path / "tessaline")
    held = {h["id"]: float(h["face"]) for h in run_json(capsys, "value", book)["holdings"]}
    keep = run_json(capsys, "build", book, "--cash", "25000000")
    free = run_json(capsys, "build", book, "--cash", "25000000", "--allow-sales")
    assert (keep["allow_sales"], free["allow_sales"]) == (False, True)
    assert {t["action"] for t in keep["trades"]} == {"buy"}
    sales = [t for t in free["trades"] if t["action"] == "sell"]
    assert sales
    for sale in sales:                           # each sale names a holding and sells at most its face
        assert 0 < float(sale["face"]) <= held[sale["id"]]
    for doc in (keep, free):                     # the cash is invested either way, and the policy holds
        assert doc["after"]["market_value"] == pytest.approx(doc["before"]["market_value"] + 25_000_000,
                                                             rel=0, abs=0.05)
        assert doc["compliance"]["status"] != "breach"
    # every ladder the build without sales may choose is open to the one with sales
    assert free["after"]["yield_to_worst_pct"] >= keep["after"]["yield_to_worst_pct"]
    assert (book / "holdings.csv").read_text() == (copy_demo(tmp_path / "again") / "holdings.csv").read_text()


def test_report_no_record_writes_the_files_and_leaves_the_history_alone(tmp_path, capsys):
    book = copy_demo(tmp_path / "tessaline")
    value = run_json(capsys, "value", book)["totals"]["market_value"]
    status = main(["report", str(book), "--format", "md", "--out", str(tmp_path / "once"), "--no-record"])
    out = capsys.readouterr().out
    assert status == 0
    assert not (book / "history.sqlite").exists() and "Recorded" not in out
    text = (tmp_path / "once" / "tessaline-report-2026-11-30.md").read_text(encoding="utf-8")
    # the report's ending market value is ladder value's total
    assert f"| Ending market value (with accrued interest) | {value:,.2f} |" in text
    assert "no earlier month-end is recorded in the history" in text

    status = main(["report", str(book), "--format", "md", "--out", str(tmp_path / "recorded")])
    assert status == 0
    assert "Recorded the month-end 2026-11-30" in capsys.readouterr().out
    recorded = (book / "history.sqlite").read_bytes()

    status = main(["report", str(book), "--format", "md", "--out", str(tmp_path / "again"), "--no-record"])
    assert status == 0
    assert "Recorded" not in capsys.readouterr().out
    assert (book / "history.sqlite").read_bytes() == recorded
    assert (tmp_path / "again" / "tessaline-report-2026-11-30.md").exists()
