"""``ladder value`` end to end (a subprocess, as a user runs it).

Sources: issue 2's contract (the json document and its fields, exit status 0 / 2, problems on stderr
with no traceback, the totals' definitions: market-value-weighted semiannual bond-equivalent yield,
MV-weighted modified duration and convexity, total DV01, WAM in days).
"""

from ladder.demo import demo_source, write_demo
import csv
import io
import json
import os
import re
import subprocess
import sys
from pathlib import Path

import pytest

from ladder.folder.book_file import load_book

ROOT = Path(__file__).resolve().parents[2]
DEMO = demo_source()
HOLDING_FIELDS = ("id", "clean_price", "accrued", "dirty_price", "market_value", "ytm_pct", "macaulay_duration",
                  "modified_duration", "convexity", "dv01", "book_value", "unrealized_gain")
TOTAL_FIELDS = ("face", "market_value", "book_value", "unrealized_gain", "yield_to_worst_pct", "modified_duration",
                "convexity", "dv01", "wam_days")


def ladder(*args, columns: int | None = None) -> subprocess.CompletedProcess:
    env = {k: v for k, v in os.environ.items() if k != "COLUMNS"}
    if columns:
        env["COLUMNS"] = str(columns)
    return subprocess.run([sys.executable, "-m", "ladder.cli", *map(str, args)], capture_output=True, text=True,
                          cwd=ROOT, timeout=300, env=env)


@pytest.fixture(scope="module")
def demo(tmp_path_factory) -> Path:
    """A copy of the demo book's tracked files. The demo must load as it is: no fallback policy."""
    copy = tmp_path_factory.mktemp("demo") / "tessaline"
    write_demo(copy)
    load_book(copy)
    return copy


@pytest.fixture(scope="module")
def document(demo) -> dict:
    done = ladder("value", demo, "--format", "json")
    assert done.returncode == 0, done.stderr
    return json.loads(done.stdout)


def test_json_document_has_the_contract_fields(document):
    # issue 2 contract: {"as_of", "holdings": [...], "totals": {...}} with at least these fields
    assert set(document) >= {"as_of", "holdings", "totals"}
    assert document["as_of"] == "2026-11-30"                    # the book's valuation date by default
    assert 40 <= len(document["holdings"]) <= 80
    for record in document["holdings"]:
        assert set(record) >= set(HOLDING_FIELDS), record["id"]
        for name in HOLDING_FIELDS[1:9]:
            assert isinstance(record[name], float), (record["id"], name)
    assert set(document["totals"]) >= set(TOTAL_FIELDS)
    assert all(isinstance(document["totals"][name], float) for name in TOTAL_FIELDS)


def test_json_figures_are_consistent(document):
    # issue 2's definitions: dirty = clean + accrued (per 100); market value = dirty x face / 100;
    # DV01 = currency gained for a 1 bp fall = modified duration x dirty x face / 100 x 1e-4
    # (REFERENCES 3: DV01 = ModD x P x 0.0001 per 100); unrealized = clean value - book value
    for r in document["holdings"]:
        assert r["dirty_price"] == pytest.approx(r["clean_price"] + r["accrued"], abs=2e-8, rel=0)
        assert r["market_value"] == pytest.approx(r["dirty_price"] * r["face"] / 100, abs=0.01, rel=0)
        assert r["dv01"] == pytest.approx(r["modified_duration"] * r["dirty_price"] * r["face"] / 100 * 1e-4,
                                          rel=1e-7, abs=1e-4)
        if r["book_value"] is not None:
            assert r["unrealized_gain"] == pytest.approx(r["clean_price"] * r["face"] / 100 - r["book_value"],
                                                         abs=0.02, rel=0)


def test_json_totals_follow_their_definitions(document):
    # issue 2: MV-weighted semiannual bond-equivalent yield, MV-weighted modified duration and convexity,
    # total DV01, MV-weighted days to maturity (WAM)
    h, t = document["holdings"], document["totals"]
    mv = sum(r["market_value"] for r in h)

    def weighted(name):
        return sum(r[name] * r["market_value"] for r in h) / mv

    assert t["market_value"] == pytest.approx(mv, abs=0.01 * len(h), rel=0)
    assert t["face"] == pytest.approx(sum(r["face"] for r in h), abs=0.01, rel=0)
    assert t["dv01"] == pytest.approx(sum(r["dv01"] for r in h), abs=1e-3 * len(h), rel=0)
    # issue 16: the portfolio's one yield is to worst for callables and to maturity (bond-equivalent) for
    # the rest, MV-weighted; records round to 1e-8 percent, so 1e-6 percent absolute covers the rounding
    worst = sum((r["yield_to_worst_pct"] if r["callable"] else r["bey_pct"]) * r["market_value"] for r in h) / mv
    assert t["yield_to_worst_pct"] == pytest.approx(worst, rel=0, abs=1e-6)
    assert any(r["callable"] and r["yield_to_worst_pct"] < r["bey_pct"] - 0.5 for r in h)   # DEMO-AGY-0321
    assert t["modified_duration"] == pytest.approx(weighted("modified_duration"), abs=1e-6, rel=0)
    assert t["convexity"] == pytest.approx(weighted("convexity"), abs=1e-6, rel=0)
    assert t["wam_days"] == pytest.approx(weighted("days_to_maturity"), abs=1e-3, rel=0)
    # semiannual bond-equivalent: an annual-pay holding's BEY is 2((1 + y)^(1/2) - 1), below its own yield
    for r in h:
        if r["kind"] == "fixed" and r["ytm_pct"] is not None:
            assert r["bey_pct"] <= r["ytm_pct"] + 1e-9


def test_csv_and_table_formats(demo, document):
    done = ladder("value", demo, "--format", "csv")
    assert done.returncode == 0, done.stderr
    rows = list(csv.DictReader(io.StringIO(done.stdout)))
    assert [r["id"] for r in rows] == [r["id"] for r in document["holdings"]]
    assert set(HOLDING_FIELDS) <= set(rows[0])
    assert float(rows[0]["clean_price"]) == pytest.approx(document["holdings"][0]["clean_price"], abs=1e-8, rel=0)
    table = ladder("value", demo, columns=220)
    assert table.returncode == 0, table.stderr
    assert "Totals" in table.stdout
    assert all(r["id"] in table.stdout for r in document["holdings"])


def test_table_is_readable_at_80_columns(demo, document):
    # issue 2: "The table is a rich table a person can read". On an 80-column terminal, or when the
    # output goes to a file or a pipe (rich then uses 80 columns), each holding's id must still show.
    table = ladder("value", demo, columns=80)
    assert table.returncode == 0, table.stderr
    missing = [r["id"] for r in document["holdings"] if r["id"] not in table.stdout]
    assert missing == [], f"{len(missing)} of {len(document['holdings'])} ids cut off at 80 columns"


def test_at_moves_the_settlement_date(demo, document, tmp_path):
    # issue 2: --at is the settlement date. Holdings maturing by then (and the funds, whose maturity_date is
    # the next day their money is available) are taken out of a copy of the book first.
    later = "2026-12-15"
    copy = tmp_path / "later"
    write_demo(copy)
    lines = (copy / "holdings.csv").read_text(encoding="utf-8").splitlines()
    at = lines[0].split(",").index("maturity_date")
    kept = [lines[0]] + [line for line in lines[1:] if line.split(",")[at] > later]
    (copy / "holdings.csv").write_text("\n".join(kept) + "\n", encoding="utf-8")
    toml = copy / "book.toml"       # its cash account (a fund) is taken out too: the copy names none
    toml.write_text(toml.read_text(encoding="utf-8").replace('account = "DEMO-MMF-0901"', ""), encoding="utf-8")
    done = ladder("value", copy, "--at", later, "--format", "json")
    assert done.returncode == 0, done.stderr
    moved = json.loads(done.stdout)
    assert moved["as_of"] == later and len(moved["holdings"]) == len(kept) - 1
    before = {r["id"]: r for r in document["holdings"]}
    assert all(r["days_to_maturity"] == before[r["id"]]["days_to_maturity"] - 15 for r in moved["holdings"])


def test_bad_book_exits_2_with_every_problem_and_no_traceback(demo, tmp_path):
    # issue 2: a book with problems is refused whole (exit 2), every problem on stderr as file:row:column
    bad = tmp_path / "bad"
    write_demo(bad)
    lines = (bad / "holdings.csv").read_text(encoding="utf-8").splitlines()
    header = lines[0].split(",")
    row = lines[1].split(",")
    row[header.index("maturity_date")] = "2027-02-30"
    lines[1] = ",".join(row)
    (bad / "holdings.csv").write_text("\n".join(lines) + "\n", encoding="utf-8")
    (bad / "book.toml").write_text("flavour = 1\n" + (bad / "book.toml").read_text(encoding="utf-8"), encoding="utf-8")
    done = ladder("value", bad, "--format", "json")
    assert done.returncode == 2
    assert done.stdout == ""
    assert "Traceback" not in done.stderr
    column = header.index("maturity_date") + 1
    assert re.search(rf"holdings\.csv:2:{column}: maturity_date '2027-02-30' is not a date", done.stderr)
    assert re.search(r"book\.toml:1:\d+: unknown key 'flavour'", done.stderr)


def test_missing_book_folder_exits_2(tmp_path):
    done = ladder("value", tmp_path / "nowhere")
    assert done.returncode == 2 and "Traceback" not in done.stderr and "book.toml" in done.stderr
