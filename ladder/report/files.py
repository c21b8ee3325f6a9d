"""Writing the report's files: html, xlsx or md (with its chart images) into an output folder.

Every file is replaced atomically: text through ``ladder.folder.save.write_atomic``, binary files
(xlsx, png) through ``write_bytes_atomic`` (the same rule for bytes): a failure midway leaves the
previous file as it was.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from ladder.errors import naming
from ladder.folder.save import write_atomic
from ladder.report.charts import chart_png
from ladder.report.html import report_html
from ladder.report.markdown import report_md
from ladder.report.model import Report
from ladder.report.xlsx import report_xlsx

FORMATS = ("html", "xlsx", "md")


def write_bytes_atomic(path: Path, data: bytes) -> None:
    """Replace ``path`` with ``data``: a temporary file in the same folder, flushed, then ``os.replace``."""
    path = Path(path)
    handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(handle, "wb") as out:
            out.write(data)
            out.flush()
            os.fsync(out.fileno())
        os.replace(temporary, path)
    except BaseException:
        Path(temporary).unlink(missing_ok=True)
        raise


def report_stem(report: Report, folder_name: str) -> str:
    return f"{folder_name}-report-{report.as_of.isoformat()}"


def _put(path: Path, data: str | bytes) -> None:
    """One report file, atomically; an error of the operating system names ``path``."""
    with naming(path):
        if isinstance(data, str):
            write_atomic(path, data)
        else:
            write_bytes_atomic(path, data)


def write_report(report: Report, out: Path, fmt: str, folder_name: str) -> list[Path]:
    """Write ``report`` as ``fmt`` into ``out`` (created if needed); returns the files written."""
    out = Path(out)
    with naming(out):
        out.mkdir(parents=True, exist_ok=True)
    stem = report_stem(report, folder_name)
    if fmt == "html":
        path = out / f"{stem}.html"
        _put(path, report_html(report))
        return [path]
    if fmt == "xlsx":
        path = out / f"{stem}.xlsx"
        _put(path, report_xlsx(report))
        return [path]
    if fmt != "md":
        raise ValueError(f"unknown report format {fmt!r}; known: {', '.join(FORMATS)}")
    written, names = [], {}
    for s in report.sections:
        for k, chart in enumerate(s.charts):
            image = out / f"{stem}-{s.key}-{k + 1}.png"
            _put(image, chart_png(chart))
            names[(s.key, k)] = image.name
            written.append(image)
    path = out / f"{stem}.md"
    _put(path, report_md(report, names))
    return [path] + written
