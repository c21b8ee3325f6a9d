"""``ladder shock`` on the demo book: json, csv and table output, and refused input (exit 2)."""

from ladder.demo import demo_source
import csv
import io
import json

import pytest

from ladder.cli import main

DEMO = str(demo_source())


def run(capsys, *args):
    code = main(["shock", DEMO, *args])
    out, err = capsys.readouterr()
    return code, out, err


def test_json_has_the_issue_fields(capsys):
    code, out, err = run(capsys, "--format", "json")
    assert code == 0 and err == ""
    doc = json.loads(out)
    assert doc["as_of"] == "2026-11-30"
    assert doc["base_value"] > 0 and 0 < doc["effective_duration"] < 5
    assert isinstance(doc["effective_convexity"], float)
    assert list(doc["key_rate_durations"])[:3] == ["1M", "3M", "6M"]
    assert sum(doc["key_rate_durations"].values()) == pytest.approx(doc["effective_duration"], abs=1e-6, rel=0)
    assert len(doc["scenarios"]) == 25
    assert 0 < doc["spread_duration"] < 5 and all("spread_duration" in h for h in doc["holdings"])
    for scenario in doc["scenarios"]:
        assert {"name", "shift_bp", "value", "change", "change_pct", "est_duration",
                "est_duration_convexity"} <= set(scenario)
    by_name = {s["name"]: s for s in doc["scenarios"]}
    assert by_name["+100 bp"]["shift_bp"] == 100.0 and by_name["+100 bp"]["change"] < 0
    assert by_name["recession-rally"]["shift_bp"] is None and by_name["recession-rally"]["change"] > 0
    assert by_name["credit +100 bp"]["shift_bp"] is None and by_name["credit +100 bp"]["change"] < 0


def test_bp_list_chooses_the_parallel_moves(capsys):
    code, out, _ = run(capsys, "--bp=-300,-100,0,100,300", "--format", "json")
    assert code == 0
    assert [s["shift_bp"] for s in json.loads(out)["scenarios"]] == [-300.0, -100.0, 0.0, 100.0, 300.0]


def test_bp_list_after_a_space_may_start_with_a_negative_shift(capsys):
    code, out, _ = run(capsys, "--bp", "-50,25", "--format", "json")
    assert code == 0
    assert [s["shift_bp"] for s in json.loads(out)["scenarios"]] == [-50.0, 25.0]


def test_scenarios_file_with_bp_list(capsys, tmp_path):
    path = tmp_path / "moves.csv"
    path.write_text("scenario,tenor,shift_bp\nbull steepener,3M,-80\nbull steepener,10Y,-20\n")
    code, out, _ = run(capsys, "--bp=50", "--scenarios", str(path), "--format", "json")
    assert code == 0
    assert [s["name"] for s in json.loads(out)["scenarios"]] == ["+50 bp", "bull steepener"]


def test_csv_rows_by_level(capsys):
    code, out, _ = run(capsys, "--bp=-100,100", "--format", "csv")
    assert code == 0
    rows = list(csv.DictReader(io.StringIO(out)))
    levels = {r["level"] for r in rows}
    assert levels == {"portfolio", "rung", "sector", "holding"}
    portfolio = [r for r in rows if r["level"] == "portfolio"]
    # Our own scenario names are number-like labels (a sign, digits, words): no formula, so no quote
    # (formula text from input files is quoted: tests/test_neutralize.py).
    assert [r["scenario"] for r in portfolio] == ["-100 bp", "+100 bp"]
    assert float(portfolio[1]["change"]) < 0 < float(portfolio[0]["change"])
    assert sum(1 for r in rows if r["level"] == "holding") == 2 * 69


def test_table_is_readable_and_carries_the_caution(capsys):
    code, out, _ = run(capsys, "--bp=-100,100")
    assert code == 0
    for text in ("Key-rate durations", "Portfolio under each scenario", "Change in value by maturity rung",
                 "Change in value by sector", "+100 bp", "Decision support only"):
        assert text in out


def test_bad_bp_list_is_refused_with_every_problem(capsys):
    code, out, err = run(capsys, "--bp=10,abc,2000")
    assert code == 2 and out == ""
    assert "--bp:0:2: 'abc' is not a number of basis points" in err
    assert "--bp:0:3: shift 2000 bp is beyond +/-1000 bp" in err
    assert "nothing was computed" in err and "Traceback" not in err


def test_bad_bp_list_and_bad_book_are_refused_together(capsys, tmp_path):
    code = main(["shock", str(tmp_path), "--bp=x"])
    _, err = capsys.readouterr()
    assert code == 2
    assert "--bp:0:1: 'x' is not a number of basis points" in err and "book.toml" in err


def test_bad_scenarios_file_is_refused(capsys, tmp_path):
    path = tmp_path / "moves.csv"
    path.write_text("scenario,tenor,shift_bp\nodd,4Y,10\n")
    code, out, err = run(capsys, "--scenarios", str(path))
    assert code == 2 and out == ""
    assert f"{path}:2:2: tenor 4Y is not on the curve" in err


def test_a_spread_move_for_an_unknown_sector_or_bucket_is_refused(capsys, tmp_path):
    path = tmp_path / "credit.csv"
    path.write_text("scenario,tenor,shift_bp,sector,bucket\nwide,,50,corprate,\nwide,,90,corporate,BB\n")
    code, out, err = run(capsys, "--scenarios", str(path))
    assert code == 2 and out == ""
    assert f"{path}:2:4: unknown sector 'corprate'" in err and f"{path}:3:5: unknown rating bucket 'BB'" in err


def test_table_shows_spread_durations_and_a_combined_scenario(capsys, tmp_path):
    path = tmp_path / "credit.csv"
    path.write_text("scenario,tenor,shift_bp,sector,bucket\nsell-off,2Y,50,,\nsell-off,,100,corporate,\n")
    code, out, _ = run(capsys, "--scenarios", str(path), "--format", "json")
    doc = json.loads(out)
    (selloff,) = doc["scenarios"]
    corporate = [h for h in doc["holdings"] if h["sector"] == "corporate"]
    assert selloff["spread_moves_bp"] == [{"sector": "corporate", "bucket": "", "bp": 100.0}]
    assert all(h["spread_duration"] > 0 for h in corporate)
    code, out, _ = run(capsys, "--scenarios", str(path))
    assert code == 0
    for text in ("Spread duration by holding", "Scenarios that move spreads", "sell-off", "DEMO-CORP-0601"):
        assert text in out
