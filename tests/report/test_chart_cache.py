"""Issue 18: each chart is drawn once and reused while its content is the same (a cache keyed by content)."""

from ladder.report import files
from ladder.report.charts import chart_key
from ladder.report.model import Chart

CHART = Chart("Maturities by month", "bar", ("Dec", "Jan"), (("face", (1.0, 2.0)),), "month", "face")


def test_a_chart_is_drawn_once_and_read_back(tmp_path, monkeypatch):
    drawn = []
    monkeypatch.setattr(files, "chart_png", lambda chart: drawn.append(chart) or f"png {chart.title}".encode())
    first = files.cached_drawing(tmp_path)(CHART)
    again = files.cached_drawing(tmp_path)(CHART)       # a later run: a new drawing function, same folder
    assert first == again == b"png Maturities by month"
    assert drawn == [CHART]
    assert (tmp_path / f"{chart_key(CHART)}.png").read_bytes() == first


def test_any_change_of_content_is_a_new_key():
    changed = (Chart(CHART.title, "line", CHART.categories, CHART.series, CHART.x_label, CHART.y_label),
               Chart(CHART.title, "bar", CHART.categories, (("face", (1.0, 2.0000000001)),), "month", "face"),
               Chart("Maturities by rung", "bar", CHART.categories, CHART.series, "month", "face"))
    keys = {chart_key(c) for c in changed}
    assert len(keys) == 3 and chart_key(CHART) not in keys
    assert chart_key(CHART) == chart_key(Chart(*[getattr(CHART, f) for f in CHART.__dataclass_fields__]))
