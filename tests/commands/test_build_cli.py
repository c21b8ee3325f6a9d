"""``ladder build`` end to end (a subprocess, as a user runs it) on temporary copies of the demo book.

Sources: issue 7's contract (--out writes the columns ``ladder check --trade`` reads; --apply adds the
trades after a confirmation, atomically, keeping a backup; bad input is refused with clear messages and
nothing written; applying a build leaves a book ``ladder check`` passes); the CLI's exit statuses
(0 ok, 1 no ladder fits, 2 bad input).
"""

from ladder.demo import demo_source, write_demo
import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
DEMO = demo_source()


def ladder(*args, stdin: str | None = None) -> subprocess.CompletedProcess:
    env = {k: v for k, v in os.environ.items() if k != "COLUMNS"}
    return subprocess.run([sys.executable, "-m", "ladder.cli", *map(str, args)], capture_output=True, text=True,
                          cwd=ROOT, timeout=600, env=env, input=stdin)


@pytest.fixture
def book(tmp_path) -> Path:
    folder = tmp_path / "tessaline"
    write_demo(folder)
    return folder


def test_json_build_writes_trades_that_ladder_check_passes(book, tmp_path):
    out = tmp_path / "trades.csv"
    run = ladder("build", book, "--cash", "25,000,000", "--rungs", "12x3M", "--out", out, "--format", "json")
    assert run.returncode == 0, run.stderr
    doc = json.loads(run.stdout)                     # stdout is the document alone (no solver chatter)
    assert doc["status"] == "built" and doc["rungs"] == "12x3M"
    assert doc["compliance"]["status"] != "breach"
    assert doc["after"]["market_value"] == pytest.approx(doc["before"]["market_value"] + 25_000_000, rel=1e-9, abs=0)
    assert doc["after"]["yield_to_worst_pct"] >= doc["naive_even_ladder"]["yield_to_worst_pct"]
    header = out.read_text().splitlines()[0].split(",")
    assert header[0] == "id" and header[-2:] == ["action", "funded_from"]     # issue 14: the new cash is new_money
    assert len(out.read_text().splitlines()) == len(doc["trades"]) + 1
    check = ladder("check", book, "--trade", out, "--format", "json")
    assert check.returncode == 0, check.stderr
    assert json.loads(check.stdout)["status"] != "breach"


def test_apply_adds_the_trades_with_a_backup_and_the_book_checks(book):
    original = (book / "holdings.csv").read_text()
    run = ladder("build", book, "--cash", "25000000", "--apply", "--yes")
    assert run.returncode == 0, run.stderr
    assert "Proposed trades" in run.stdout and "Applied" in run.stdout
    assert [p.read_text() for p in (book / "versions").glob("*/holdings.csv")] == [original]
    rows = (book / "holdings.csv").read_text().splitlines()
    assert len(rows) > len(original.splitlines())
    assert any(r.startswith("GENERIC-") for r in rows)
    check = ladder("check", book)
    assert check.returncode == 0, check.stdout + check.stderr


def test_apply_asks_for_confirmation(book):
    original = (book / "holdings.csv").read_text()
    refused = ladder("build", book, "--cash", "25000000", "--apply")          # stdin is not a terminal
    assert refused.returncode == 2 and "add --yes" in refused.stderr
    assert (book / "holdings.csv").read_text() == original and not (book / "versions").exists()


@pytest.mark.parametrize("args, words", [
    (("--cash", "-5"), "negative"),
    (("--cash", "lots"), "'lots' is not a number"),
    (("--cash", "25,000,00"), "comma out of place"),
    (("--cash", "1000000", "--rungs", "6x1Y"), "past the policy's maximum maturity"),
    (("--cash", "1000000", "--rungs", "3 months"), "not a tenor"),
    (("--cash", "1000000", "--rung-band", "2,1"), "0 <= LOW <= 1 <= HIGH"),
])
def test_bad_input_is_refused_and_nothing_written(book, tmp_path, args, words):
    original = (book / "holdings.csv").read_text()
    out = tmp_path / "trades.csv"
    run = ladder("build", book, *args, "--out", out, "--apply", "--yes")
    assert run.returncode == 2
    assert words in run.stderr and "Traceback" not in run.stderr
    assert (book / "holdings.csv").read_text() == original and not out.exists()


def test_offerings_without_quotes_are_refused(book, tmp_path):
    offerings = tmp_path / "offerings.csv"
    header = (DEMO / "holdings.csv").read_text().splitlines()[0] + ",available_face,min_lot,lot_increment"
    offerings.write_text(header + "\nOF-1,agency,Federal Orchard Credit Bank,,1000000,2028-05-15,4.0,,,2025-05-15,"
                                  ",AA+,,,,,,,,,,,5000000,1000000,1000\n")
    run = ladder("build", book, "--cash", "1000000", "--offerings", offerings)
    assert run.returncode == 2 and "OF-1 has no quote" in run.stderr


def test_no_ladder_fits_exits_1_and_names_the_conflict(book, tmp_path):
    out = tmp_path / "trades.csv"
    run = ladder("build", book, "--cash", "25000000", "--fresh", "--out", out)
    assert run.returncode == 1
    assert "portfolio.cash_needs_horizon_months" in run.stdout and not out.exists()
