"""The report files: html in a real headless browser, xlsx through openpyxl against ``ladder value``,
md, formula neutralizing in xlsx and csv output."""

from __future__ import annotations

import base64
import datetime as dt
import io
import json
import os
import re
import shutil
import subprocess
from contextlib import redirect_stdout

import pytest
from openpyxl import load_workbook

from ladder.cli import main
from ladder.report.files import write_report
from ladder.folder.journal import JournalEntry
from ladder.report.model import Column, Report, Section, Table
from ladder.report.xlsx import report_xlsx

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")
# On a developer's machine without chromium the browser tests skip; under CI (CI set) they run and fail,
# since CI must install it (.ci/run does).
needs_chromium = pytest.mark.skipif(CHROMIUM is None and not os.environ.get("CI"),
                                    reason="chromium is not installed (apt-get install chromium)")
PROBE = """<script>window.addEventListener('load', () => {
  const broken = [...document.images].filter(i => !i.complete || i.naturalWidth === 0).length;
  document.body.setAttribute('data-images', String(document.images.length));
  document.body.setAttribute('data-broken', String(broken));
});</script></body>"""


def _rendered_dom(tmp_path, html: str) -> str:
    """The DOM after load, from headless Debian chromium, with a probe counting broken images."""
    assert CHROMIUM, "chromium is not installed (apt-get install chromium); CI must install it"
    page = tmp_path / "page.html"
    page.write_text(html.replace("</body>", PROBE), encoding="utf-8")
    run = subprocess.run(
        [CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
         "--disable-component-update", "--disable-sync", "--no-first-run", f"--user-data-dir={tmp_path / 'profile'}",
         "--virtual-time-budget=10000", "--dump-dom", page.as_uri()],
        capture_output=True, text=True, timeout=180)
    assert run.returncode == 0, run.stderr[-2000:]
    return run.stdout


def _images(dom: str) -> tuple[int, int]:
    body = re.search(r"<body[^>]*>", dom).group(0)
    return (int(re.search(r'data-images="(\d+)"', body).group(1)), int(re.search(r'data-broken="(\d+)"', body).group(1)))


@needs_chromium
def test_html_renders_every_section_and_every_image(first_month, tmp_path):
    folder, _, m = first_month
    (path,) = write_report(m.report, tmp_path / "out", "html", "tessaline")
    dom = _rendered_dom(tmp_path, path.read_text(encoding="utf-8"))
    for section in m.report.sections:
        assert re.search(rf"<h2>{re.escape(section.title.replace(chr(39), '&#x27;'))}</h2>", dom) or \
            f"<h2>{section.title}</h2>" in dom, section.title
    for caution in m.report.cautions:
        assert dom.count(caution.replace("'", "&#x27;")) + dom.count(caution) >= 2   # opens and closes the page
    images, broken = _images(dom)
    assert images == sum(len(s.charts) for s in m.report.sections) == 3
    assert broken == 0


@needs_chromium
def test_the_browser_probe_sees_a_broken_image(tmp_path):
    bad = base64.b64encode(b"not a png").decode()
    dom = _rendered_dom(tmp_path, f'<html><body><img src="data:image/png;base64,{bad}"></body></html>')
    assert _images(dom) == (1, 1)


def _value_totals(folder) -> dict:
    out = io.StringIO()
    with redirect_stdout(out):
        assert main(["value", str(folder), "--format", "json"]) == 0
    return json.loads(out.getvalue())["totals"]


def test_xlsx_numbers_formats_and_totals_equal_ladder_value(first_month, tmp_path):
    folder, _, m = first_month
    (path,) = write_report(m.report, tmp_path, "xlsx", "tessaline")
    workbook = load_workbook(path)
    assert workbook.sheetnames == ["Cover", "Summary", "Holdings", "Activity", "Allocation", "Maturities",
                                   "Rate shocks", "Income", "Certificate"]
    sheet = workbook["Holdings"]
    header = [c.value for c in sheet[4]]
    total = next(row for row in sheet.iter_rows(min_row=5) if row[0].value == "Total")
    cell = {name: total[header.index(name)] for name in ("Face", "Market value", "Share of portfolio")}
    totals = _value_totals(folder)
    assert cell["Face"].value == pytest.approx(totals["face"], abs=0.005, rel=0)
    assert cell["Market value"].value == pytest.approx(totals["market_value"], abs=0.005, rel=0)
    assert cell["Market value"].number_format == "#,##0.00"
    assert cell["Share of portfolio"].value == pytest.approx(1.0, rel=1e-12, abs=0)
    assert cell["Share of portfolio"].number_format == "0.000%"
    first = sheet[5]
    assert isinstance(first[header.index("Maturity")].value, dt.datetime)
    assert first[header.index("Book yield")].number_format == "0.000%"
    assert 0 < first[header.index("Book yield")].value < 0.1                 # a fraction, shown in percent
    summary = workbook["Summary"]
    mv = next(r for r in summary.iter_rows() if r[0].value == "Ending market value (with accrued interest)")
    assert mv[1].value == pytest.approx(totals["market_value"], abs=0.005, rel=0)
    cover = [c.value for c in workbook["Cover"]["A"] if c.value]
    assert all(c in cover for c in m.report.cautions)


HOSTILE = ("=HYPERLINK(\"http://x\")", "+1+2", "-3+4", "@SUM(A1)", "\tcmd", "\rcmd")


def test_xlsx_neutralizes_formula_text():
    table = Table("t", (Column("reason", "Reason"), Column("amount", "Amount", "money")),
                  tuple((text, -5.0) for text in HOSTILE))
    report = Report("r", "b", dt.date(2026, 11, 30), dt.date(2026, 10, 31), (Section("activity", "Activity", (table,)),), ())
    sheet = load_workbook(io.BytesIO(report_xlsx(report)))["Activity"]
    cells = [sheet.cell(row=5 + k, column=1) for k in range(len(HOSTILE))]
    # (the xlsx XML reads a carriage return back as a line feed)
    assert [c.value for c in cells] == ["'" + text.replace("\r", "\n") for text in HOSTILE]
    assert all(c.data_type == "s" for c in cells)
    assert [sheet.cell(row=5 + k, column=2).value for k in range(len(HOSTILE))] == [-5.0] * len(HOSTILE)


def test_journal_reason_reaches_the_xlsx_neutralized():
    from ladder.report.holdings_table import activity_table

    entries = tuple(JournalEntry(dt.date(2026, 11, 2), "note", "X", reason=text) for text in HOSTILE)
    report = Report("r", "b", dt.date(2026, 11, 30), dt.date(2026, 10, 31),
                    (Section("activity", "Activity", (activity_table(entries),)),), ())
    sheet = load_workbook(io.BytesIO(report_xlsx(report)))["Activity"]
    reasons = [sheet.cell(row=5 + k, column=7).value for k in range(len(HOSTILE))]
    assert reasons == ["'" + text.replace("\r", "\n") for text in HOSTILE]


def test_md_has_every_section_the_cautions_and_signature_lines(first_month, tmp_path):
    _, _, m = first_month
    paths = write_report(m.report, tmp_path, "md", "tessaline")
    text = paths[0].read_text(encoding="utf-8")
    for section in m.report.sections:
        assert f"## {section.title}" in text
    for caution in m.report.cautions:
        assert text.count(caution) == 2
    assert "Prepared by" in text and "Reviewed by" in text
    assert len(paths) == 4 and all(p.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n" for p in paths[1:])
    for p in paths[1:]:
        assert f"]({p.name})" in text
