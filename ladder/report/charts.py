"""Charts of the report as PNG images, drawn with matplotlib (Agg backend, no display needed)."""

from __future__ import annotations

import hashlib
import io
from importlib.metadata import version
from pathlib import Path

import numpy as np

from ladder.report.model import Chart

DPI = 110
SIZE = (7.5, 3.4)


def chart_key(chart: Chart) -> str:
    """A name for the chart's image that changes whenever the image would: a SHA-256 of the chart's
    content (its repr: titles, categories, exact values), the size, this module's code and the
    matplotlib version."""
    content = repr((chart, DPI, SIZE, version("matplotlib"))).encode() + Path(__file__).read_bytes()
    return hashlib.sha256(content).hexdigest()


def chart_png(chart: Chart) -> bytes:
    """The PNG bytes of ``chart``: grouped bars or lines, one series a colour, with a legend."""
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure

    figure = Figure(figsize=SIZE, dpi=DPI)
    axes = figure.add_subplot()
    x = np.arange(len(chart.categories))
    if chart.kind == "bar":
        width = 0.8 / max(len(chart.series), 1)
        for k, (name, values) in enumerate(chart.series):
            axes.bar(x + (k - (len(chart.series) - 1) / 2) * width, values, width, label=name)
    else:
        for name, values in chart.series:
            axes.plot(x, values, marker="o", label=name)
    axes.set_xticks(x, chart.categories, fontsize=8, rotation=0 if len(x) <= 12 else 45)
    axes.set_title(chart.title, fontsize=10)
    axes.set_xlabel(chart.x_label, fontsize=9)
    axes.set_ylabel(chart.y_label, fontsize=9)
    axes.grid(axis="y", alpha=0.3)
    axes.legend(fontsize=8)
    figure.tight_layout()
    buffer = io.BytesIO()
    figure.savefig(buffer, format="png")
    return buffer.getvalue()
