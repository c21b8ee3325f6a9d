"""The report as one self-contained HTML page: charts embedded as base64 PNG images."""

from __future__ import annotations

import base64

from ladder.neutralize import safe_html as escape
from ladder.report.cells import cell_text, is_number
from ladder.report.charts import chart_png
from ladder.report.model import Report, Section, Table

STYLE = """
body { font-family: sans-serif; margin: 2em; color: #111; }
h1 { font-size: 1.5em; } h2 { font-size: 1.2em; border-bottom: 1px solid #999; margin-top: 2em; }
h3 { font-size: 1em; }
table { border-collapse: collapse; font-size: 0.8em; margin-bottom: 1em; }
th, td { border: 1px solid #bbb; padding: 2px 6px; } th { background: #eee; }
td.n { text-align: right; white-space: nowrap; font-variant-numeric: tabular-nums; } tr.total td { font-weight: bold; }
.cautions { border: 1px solid #999; padding: 0.5em 1em; background: #f7f7f7; }
.signature { margin-top: 2.5em; border-top: 1px solid #000; width: 28em; padding-top: 0.2em; }
@media print { h2 { page-break-before: always; } }
"""


def _cells(table: Table, row_index: int, row: tuple, tag: str = "td") -> str:
    out = []
    for c, value in enumerate(row):
        kind = table.kind(row_index, c)
        css = ' class="n"' if is_number(kind) and not isinstance(value, str) else ""
        out.append(f"<{tag}{css}>{escape(cell_text(value, kind))}</{tag}>")
    return "".join(out)


def table_html(table: Table) -> str:
    head = "".join(f"<th>{escape(c.title)}</th>" for c in table.columns)
    body = "".join(f"<tr>{_cells(table, i, row)}</tr>" for i, row in enumerate(table.rows))
    if not table.rows:
        body = f'<tr><td colspan="{len(table.columns)}">none</td></tr>'
    if table.total is not None:
        body += f'<tr class="total">{_cells(table, -1, table.total)}</tr>'
    return f"<h3>{escape(table.title)}</h3>\n<table><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>"


def section_html(section: Section) -> str:
    parts = [f'<section id="{escape(section.key)}"><h2>{escape(section.title)}</h2>']
    parts += [f"<p>{escape(note)}</p>" for note in section.notes[:1]]
    parts += [table_html(t) for t in section.tables]
    for chart in section.charts:
        data = base64.b64encode(chart_png(chart)).decode("ascii")
        parts.append(f'<figure><img src="data:image/png;base64,{data}" alt="{escape(chart.title)}">'
                     f"<figcaption>{escape(chart.title)}</figcaption></figure>")
    parts += [f"<p>{escape(note)}</p>" for note in section.notes[1:]]
    parts += [f'<div class="signature">{escape(line)}</div>' for line in section.signatures]
    parts.append("</section>")
    return "\n".join(parts)


def cautions_html(report: Report) -> str:
    items = "".join(f"<li>{escape(c)}</li>" for c in report.cautions)
    return f'<div class="cautions"><strong>Cautions</strong><ul>{items}</ul></div>'


def report_html(report: Report) -> str:
    """The whole report; the cautions open and close it."""
    body = "\n".join(section_html(s) for s in report.sections)
    return (f'<!DOCTYPE html>\n<html lang="en"><head><meta charset="utf-8"><title>{escape(report.title)}</title>'
            f"<style>{STYLE}</style></head><body>\n<h1>{escape(report.title)}</h1>\n"
            f"<p>Period {report.period_start.isoformat()} (exclusive) to {report.as_of.isoformat()}.</p>\n"
            f"{cautions_html(report)}\n{body}\n{cautions_html(report)}\n</body></html>\n")
