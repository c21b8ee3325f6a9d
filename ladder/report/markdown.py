"""The report as Markdown: pipe tables, notes, chart images linked beside the file."""

from __future__ import annotations

from ladder.neutralize import safe_markdown as _cell
from ladder.report.cells import cell_text
from ladder.report.model import Report, Table


def table_md(table: Table) -> str:
    lines = [f"**{_cell(table.title)}**", "", "| " + " | ".join(_cell(c.title) for c in table.columns) + " |",
             "|" + "|".join("---:" if c.kind not in ("text", "date") else "---" for c in table.columns) + "|"]
    rows = [(i, r) for i, r in enumerate(table.rows)] + ([(-1, table.total)] if table.total is not None else [])
    for i, row in rows:
        lines.append("| " + " | ".join(_cell(cell_text(v, table.kind(i, c))) for c, v in enumerate(row)) + " |")
    if not table.rows:
        lines.append("| none |" + " |" * (len(table.columns) - 1))
    return "\n".join(lines)


def report_md(report: Report, image_names: dict[tuple[str, int], str] | None = None) -> str:
    """The whole report; ``image_names`` maps (section key, chart index) to the PNG file written beside it."""
    cautions = "\n".join(f"> - {_cell(c)}" for c in report.cautions)
    out = [f"# {_cell(report.title)}", "", f"Period {report.period_start.isoformat()} (exclusive) to "
           f"{report.as_of.isoformat()}.", "", "> **Cautions**", cautions, ""]
    for s in report.sections:
        out += [f"## {_cell(s.title)}", ""]
        out += [_cell(note) + "\n" for note in s.notes[:1]]
        out += [table_md(t) + "\n" for t in s.tables]
        for k, chart in enumerate(s.charts):
            name = (image_names or {}).get((s.key, k))
            if name:
                out += [f"![{_cell(chart.title)}]({name})", ""]
        out += [_cell(note) + "\n" for note in s.notes[1:]]
        out += [f"{_cell(line)}: ______________________________\n" for line in s.signatures]
    out += ["---", "", "> **Cautions**", cautions, ""]
    return "\n".join(out)
