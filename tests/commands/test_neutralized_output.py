"""Input text reaches each destination neutralized: the markdown and html report, the saved holdings
csv and the build's trades file (formula prefixes), and the terminal (control characters).
Source for the rules: OWASP "CSV Injection"; see tests/test_neutralize.py for each helper."""

from __future__ import annotations

import datetime as dt
from types import SimpleNamespace

import numpy as np

from ladder.book.holdings import make_holdings
from ladder.book.holdings_file import read_holdings
from ladder.cli import main
from ladder.commands.build import trades_csv
from ladder.demo import write_demo
from ladder.errors import Problems
from ladder.folder.save import holdings_change
from ladder.policy.trades import Trades
from ladder.report.html import report_html
from ladder.report.markdown import report_md
from ladder.report.model import Column, Report, Section, Table

HOSTILE_ISSUER = "<script>alert(1)</script> =HYPERLINK(\"http://x\")"
FORMULA_ID = "@SUM(A1)"


def _holdings():
    return make_holdings(id=[FORMULA_ID, "B2"], sector=["corporate", "agency"],
                         issuer=["=HYPERLINK(\"http://x\",\"y\")", "Invented Farm Credit Bank"],
                         face=[1e6, 2e6], maturity=[np.datetime64("2029-03-15")] * 2, coupon=[0.04, 0.03],
                         rating=["A", "AA+"])


def test_report_markdown_and_html_escape_input_text():
    table = Table("Holdings", (Column("issuer", "Issuer"),), ((HOSTILE_ISSUER,), ("a | b",)))
    report = Report("Book <b>", "b", dt.date(2026, 11, 30), dt.date(2026, 10, 31),
                    (Section("holdings", "Holdings", (table,)),), ())
    md, page = report_md(report), report_html(report)
    for text in (md, page):
        assert "<script>" not in text and "<b>" not in text and "&lt;script&gt;" in text
    assert "| a \\| b |" in md                   # the cell cannot split the table row


def test_saved_holdings_quote_formula_text_and_read_back_as_they_were(tmp_path):
    path = tmp_path / "holdings.csv"
    (_, data), = holdings_change(SimpleNamespace(files={"holdings": path}), _holdings()).items()
    text = data.decode("utf-8")
    assert "'@SUM(A1)" in text and "'=HYPERLINK" in text
    path.write_text(text, encoding="utf-8")
    problems = Problems()
    back, _ = read_holdings(path, dt.date(2026, 11, 30), problems)
    assert not problems and list(back.id) == [FORMULA_ID, "B2"]
    assert back.issuer[0] == "=HYPERLINK(\"http://x\",\"y\")"


def test_build_trades_file_quotes_formula_text():
    h = _holdings()
    result = SimpleNamespace(trades=Trades(h, np.array(["buy", "buy"], dtype=object), "offerings.csv"))
    text = trades_csv(result)
    assert "'@SUM(A1)" in text and "'=HYPERLINK" in text and ",=" not in text and ",@" not in text


def test_escape_sequences_in_an_id_never_reach_the_terminal(tmp_path, capsys):
    book = write_demo(tmp_path / "book")
    path = book / "holdings.csv"
    lines = path.read_text(encoding="utf-8").splitlines(keepends=True)
    lines[1] = "DEMO\x1b]0;owned\x07\x1b[2J[bold]X[/" + lines[1][lines[1].index(","):]
    path.write_text("".join(lines), encoding="utf-8")
    assert main(["value", str(book)]) == 0
    out = capsys.readouterr().out
    assert "\x1b" not in out and "\x07" not in out
    assert "DEMO]0;owned" in out                  # the id is shown (rich may fold it), its brackets as text


def test_problems_quoting_input_text_reach_the_terminal_without_control_characters(tmp_path, capsys):
    book = write_demo(tmp_path / "book")
    header, first = (book / "holdings.csv").read_text(encoding="utf-8").splitlines()[:2]
    trades = tmp_path / "trades.csv"
    trades.write_text(f"{header},action\nX\x1b[2J{first[first.index(','):]},sell\n", encoding="utf-8")
    assert main(["check", str(book), "--trade", str(trades)]) == 2
    err = capsys.readouterr().err
    assert "X[2J is not in the book" in err and "\x1b" not in err
