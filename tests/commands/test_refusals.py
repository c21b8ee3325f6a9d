"""Refusals, not accidents: an import applies only when confirmed and one that would empty the book says so; an empty book loads and
every command says there is nothing to value; a curve too short for a rotation leaves it out."""

from __future__ import annotations

import csv
import io
import json

import pytest
from cli_books import digest, run

from ladder.demo import write_demo
from ladder.folder.book_file import load_book

HOLDINGS = 69      # the demo book's holdings


@pytest.fixture
def book(tmp_path):
    return write_demo(tmp_path / "book")


def custodian(book, tmp_path, keep: int):
    """A custodian file with the header and the book's first ``keep`` holdings."""
    lines = (book / "holdings.csv").read_text(encoding="utf-8").splitlines(keepends=True)
    path = tmp_path / "custodian.csv"
    path.write_text("".join(lines[:1 + keep]), encoding="utf-8")
    return path


def without_cash_account(book) -> None:
    """The book with no ``[cash].account`` (trades are new money), so a file without its row can be applied."""
    toml = book / "book.toml"
    toml.write_text(toml.read_text(encoding="utf-8").replace('account = "DEMO-MMF-0901"', ""), encoding="utf-8")


@pytest.mark.parametrize("keep, words", [(0, f"remove every holding ({HOLDINGS})"),
                                         (50, f"remove 19 of the book's {HOLDINGS} holdings (more than 20%)")])
def test_an_import_that_removes_too_much_is_refused_without_a_terminal(book, tmp_path, capsys, keep, words):
    before = digest(book)
    code, out, err = run(capsys, "import", book, custodian(book, tmp_path, keep), "--apply", "--remove-missing")
    assert code == 2 and words in err and "add --yes" in err and out == ""
    assert digest(book) == before


def test_an_import_keeps_what_is_missing_at_the_custodian_unless_told_and_asks_first(book, tmp_path, capsys):
    without_cash_account(book)      # the kept rows leave out the funds, the cash account among them
    before = digest(book)
    # without a terminal --apply needs --yes, whatever it would change
    code, _, err = run(capsys, "import", book, custodian(book, tmp_path, 56), "--apply")
    assert code == 2 and "add --yes" in err and digest(book) == before
    # 13 of 69 missing at the custodian: kept (breaks to investigate), so nothing to apply
    code, out, _ = run(capsys, "import", book, custodian(book, tmp_path, 56), "--apply", "--yes")
    assert code == 0 and "13 break(s)" in out and "Nothing to apply" in out
    assert len(load_book(book).holdings) == HOLDINGS and digest(book) == before
    # --remove-missing removes them: 13 = 18.8% <= 20%
    assert run(capsys, "import", book, custodian(book, tmp_path, 56), "--apply", "--yes", "--remove-missing")[0] == 0
    assert len(load_book(book).holdings) == 56
    # 40 kept: 16 of 56 = 28.6%: refused at the default, named as such, without --yes
    code, _, err = run(capsys, "import", book, custodian(book, tmp_path, 40), "--apply", "--remove-missing")
    assert code == 2 and "remove 16 of the book's 56 holdings (more than 20%)" in err
    # every holding: --yes, as a script says it means it
    assert run(capsys, "import", book, custodian(book, tmp_path, 0), "--apply", "--yes", "--remove-missing")[0] == 0
    assert len(load_book(book).holdings) == 0


def test_an_import_that_would_remove_the_cash_account_is_refused_with_nothing_written(book, tmp_path, capsys):
    before = digest(book)
    # the first 63 holdings kept: the cash account DEMO-MMF-0901 (row 64) is among the 6 missing
    assert (book / "holdings.csv").read_text(encoding="utf-8").splitlines()[64].startswith("DEMO-MMF-0901,")
    code, out, err = run(capsys, "import", book, custodian(book, tmp_path, 63), "--apply", "--yes",
                         "--remove-missing")
    assert code == 2 and "the cash account 'DEMO-MMF-0901'" in err and out == "" and digest(book) == before


def test_an_import_asks_on_a_terminal_and_no_keeps_the_book(book, tmp_path, capsys, monkeypatch):
    without_cash_account(book)
    before = digest(book)
    monkeypatch.setattr("sys.stdin.isatty", lambda: True)
    monkeypatch.setattr("builtins.input", lambda prompt: "n")
    code, _, err = run(capsys, "import", book, custodian(book, tmp_path, 0), "--apply", "--remove-missing")
    assert code == 0 and "Not applied." in err and digest(book) == before


EMPTY_COMMANDS = [["value"], ["value", "--format", "csv"], ["shock"], ["check"], ["plan"], ["report"],
                  ["check", "--format", "json"], ["shock", "--format", "json"]]


@pytest.mark.parametrize("command", EMPTY_COMMANDS, ids=[" ".join(c) for c in EMPTY_COMMANDS])
def test_an_empty_book_says_there_is_nothing_to_value(book, capsys, command):
    header = (book / "holdings.csv").read_text(encoding="utf-8").splitlines()[0]
    (book / "holdings.csv").write_text(header + "\n", encoding="utf-8")
    before = digest(book)
    code, out, err = run(capsys, command[0], book, *command[1:])
    assert code == 0 and "Traceback" not in err
    if "json" in command:
        assert json.loads(out)["holdings"] == 0 and "nothing to value" in json.loads(out)["nothing_to_value"]
    elif "csv" in command:
        assert out == "" and "nothing to value" in err
    else:
        assert out.count("\n") == 1 and "holdings.csv holds no holdings: there is nothing to value" in out
    assert digest(book) == before                 # the report records nothing either


def test_a_curve_too_short_for_the_rotations_still_shocks(book, capsys):
    (book / "curve.csv").write_text("tenor,par_yield_pct\n3M,4.2\n1Y,4.0\n", encoding="utf-8")
    (book / "scenarios.csv").unlink()
    code, out, err = run(capsys, "shock", book, "--format", "csv")
    names = {r["scenario"] for r in csv.DictReader(io.StringIO(out)) if r["level"] == "portfolio"}
    assert code == 0 and "-300 bp" in names and "short end +100 bp" in names
    assert not any("steepener" in n or "flattener" in n for n in names)       # no tenor beyond the 2Y pivot
