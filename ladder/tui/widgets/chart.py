"""A terminal chart (textual-plotext) that builds its picture once per size, theme and data."""

from __future__ import annotations

from collections.abc import Callable

from textual_plotext import PlotextPlot


class Chart(PlotextPlot):
    """``PlotextPlot`` with the built picture kept until the data, size or theme change: plotext
    builds the whole canvas in Python, so showing a view again must not build it again."""

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self._version = 0
        self._picture = None
        self._picture_key = None

    def draw(self, paint: Callable) -> None:
        """Replace the chart's data: ``paint(plt)`` draws on a cleared plot."""
        self.plt.clear_data()
        self.plt.clear_figure()
        paint(self.plt)
        self._version += 1
        self.refresh()

    def render(self):
        key = (self.size.width, self.size.height, self.app.theme, self._version)
        if key != self._picture_key:
            self._picture = super().render()
            self._picture_key = key
        return self._picture
