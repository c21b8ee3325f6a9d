"""A terminal chart (textual-plotext) in the app's own colours, that builds its picture once per
size, theme and data."""

from __future__ import annotations

import math
from collections.abc import Callable

from textual.color import Color
from textual_plotext import PlotextPlot

# Series take theme colours in this order, each with its own marker, so no series is told apart by
# colour alone. Bars take the fill characters.
SERIES_COLOURS = ("primary", "warning", "accent", "success", "secondary", "error")
LINE_MARKERS = ("braille", "•", "+", "x", "o", "*")
BAR_MARKERS = ("█", "▒", "░", "▓")


class Series:
    """Style of the ``i``-th series of a chart from the app's theme: ``line(i)`` and ``bar(i)`` give
    plotext keyword arguments (colour and marker)."""

    def __init__(self, variables: dict[str, str]) -> None:
        self.colours = [Color.parse(variables[name]).rgb for name in SERIES_COLOURS if variables.get(name)]

    def colour(self, i: int):
        return self.colours[i % len(self.colours)]

    def line(self, i: int) -> dict:
        return {"color": self.colour(i), "marker": LINE_MARKERS[i % len(LINE_MARKERS)]}

    def bar(self, i: int) -> dict:
        return {"color": self.colour(i), "marker": BAR_MARKERS[i % len(BAR_MARKERS)]}


def nice_ticks(low: float, high: float, count: int = 5) -> tuple[list[float], list[str]]:
    """Round y ticks covering ``low`` to ``high`` (steps of 1, 2, 2.5 or 5 times a power of ten),
    with their labels written with as many decimals as the step needs."""
    if not high > low:
        low, high = low - 0.5, high + 0.5
    raw = (high - low) / max(count - 1, 1)
    power = 10.0 ** math.floor(math.log10(raw))
    step = next(m * power for m in (1, 2, 2.5, 5, 10) if m * power >= raw * (1 - 1e-12))
    first, last = math.floor(low / step + 1e-9), math.ceil(high / step - 1e-9)
    digits = next(d for d in range(12) if abs(round(step, d) - step) <= 1e-9 * step)
    ticks = [round(k * step, digits) for k in range(first, last + 1)]
    return ticks, [f"{t + 0.0:,.{digits}f}" for t in ticks]


def y_ticks(plt, low: float, high: float, count: int = 5) -> None:
    """Set round y ticks and limits from ``low`` to ``high``: plotext's own labels of long numbers
    can run into the axis."""
    ticks, labels = nice_ticks(low, high, count)
    plt.ylim(ticks[0], ticks[-1])
    plt.yticks(ticks, labels)


class Chart(PlotextPlot):
    """``PlotextPlot`` with the built picture kept until the data, size or theme change: plotext
    builds the whole canvas in Python, so showing a view again must not build it again."""

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self._version = 0
        self._paint: Callable | None = None
        self._painted = None
        self._picture = None
        self._picture_key = None

    def draw(self, paint: Callable) -> None:
        """Replace the chart's data: ``paint(plt, series)`` draws on a cleared plot, ``series`` a
        ``Series`` of the current theme."""
        self._paint = paint
        self._version += 1
        self.refresh()

    def render(self):
        key = (self.size.width, self.size.height, self.app.theme, self._version)
        if key != self._picture_key:
            if self._paint is not None and self._painted != key[2:]:
                self.plt.clear_data()
                self.plt.clear_figure()
                self._paint(self.plt, Series(self.app.theme_variables))
                self._painted = key[2:]
            self._picture = super().render()
            self._picture_key = key
        return self._picture
