"""The report's charts, checked on the geometry the painter draws from (issue 7, item 5).

What a reader of the PDF would notice: a limit label printed over a curve, round-off blown up into a
steep slope on a flat line, segment boundaries drawn once per alternative so they look like data
spikes. Each is checked on :func:`app.reporting.chart.layout_chart`, which ``draw_chart`` paints.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from app.reporting.chart import alternative_chart, layout_chart, overlay_chart, tick_text
from app.reporting.pdf import ensure_gui_application
from solver import solve
from solver.model import Alternative, Segment
from solver.project_io import load_project

ROOT = Path(__file__).resolve().parent.parent
TRACED = ROOT / "sample_projects" / "traced_residue_line.json"
PT = 600 / 72.0  # device units per point at the report's 600 dpi


@pytest.fixture(scope="module")
def device():
    from PySide6.QtGui import QImage

    ensure_gui_application()
    image = QImage(10, 10, QImage.Format_ARGB32)
    image.setDotsPerMeterX(round(600 / 0.0254))  # the PDF writer's resolution, so fonts measure alike
    image.setDotsPerMeterY(round(600 / 0.0254))
    return image


@pytest.fixture(scope="module")
def traced():
    project = load_project(TRACED)
    return project, [solve(a) for a in project.alternatives]


def _rect():
    from PySide6.QtCore import QRectF

    width = 178 / 25.4 * 600  # A4 less the report's margins, in 600 dpi device units
    return QRectF(0, 0, width, width * 0.62)


def _layouts(project, results, system="SI"):
    charts = [alternative_chart(r, system, project.targets, a.limits) for r, a in zip(results, project.alternatives)]
    charts.append(overlay_chart(results, system, project.targets))
    return charts


@pytest.mark.parametrize("system", ["SI", "US"])
def test_limit_labels_never_cover_data(device, traced, system):
    project, results = traced
    for chart in _layouts(project, results, system):
        g = layout_chart(chart, _rect(), PT, device)
        labelled = [pg for pg in g.panels if pg.label_boxes]
        assert labelled, "the traced sample has targets and limits: some panel must carry their labels"
        all_boxes = [box for pg in g.panels for _, box, _ in pg.label_boxes]
        for pg in g.panels:
            for hl, box, text in pg.label_boxes:
                assert text == hl.label  # printed whole, not elided
                assert not box.intersects(pg.area), (text, box, pg.area)  # outside the plot area
                assert box.right() <= g.rect.right() + 1e-6  # and still on the page
                for series, lines in pg.curves:
                    for pts in lines:
                        inside = ((pts[:, 0] >= box.left()) & (pts[:, 0] <= box.right())
                                  & (pts[:, 1] >= box.top()) & (pts[:, 1] <= box.bottom()))
                        assert not inside.any(), (text, series.label)
            for _, box, text in pg.label_boxes:  # and labels never over each other
                others = [b for b in all_boxes if b is not box]
                assert not any(box.intersects(b) for b in others), text
        # segment names sit in a band above the plot, not over the curves
        for box, name in g.name_boxes:
            assert not any(box.intersects(pg.area) for pg in g.panels), name


def test_limit_label_states_the_value(device, traced):
    project, results = traced
    # traced sample: wall limit and target 110 °C, bulk minimum 55 °C, outlet minimum 60 °C (its JSON)
    chart = alternative_chart(results[0], "SI", project.targets, project.alternatives[0].limits)
    labels = sorted(h.label for h in chart.panels[0].hlines)
    assert labels == ["max wall 110.0 °C", "min bulk 55.0 °C", "min outlet 60.0 °C"]


@pytest.mark.parametrize("system, minimum", [("SI", 2.0), ("US", 3.6)])  # 2 K = 3.6 °F (1 K = 1.8 °F)
def test_flat_line_axis_keeps_a_minimum_span(device, system, minimum):
    # a blank alternative (water at 20 °C in still air at 20 °C): the temperatures move by round-off
    result = solve(Alternative(segments=[Segment()]))
    assert np.ptp(result.profile.bulk_temperature_K) < 1e-3  # precondition: the series is flat
    g = layout_chart(alternative_chart(result, system), _rect(), PT, device)
    temperature, pressure = g.panels
    lo, hi = temperature.y_range
    assert minimum <= hi - lo <= 1.5 * minimum  # the minimum, padded; not blown up either
    assert len(temperature.y_ticks) >= 2
    labels = [tick_text(t, temperature.y_step) for t in temperature.y_ticks]
    assert all("e" not in s.lower() for s in labels), labels
    assert max(len(s) for s in labels) <= 5, labels  # "20.5", not "20.00012"
    # pressure: at least 1 % of the absolute pressure (3 bar here), so a small drop is not a cliff
    p_lo, p_hi = pressure.y_range
    p_bar = 3.0 if system == "SI" else 3.0 * 14.503774  # 1 bar = 14.503774 psi
    assert 0.01 * p_bar * 0.999 <= p_hi - p_lo <= 1.5 * 0.01 * p_bar


def test_tick_labels_have_no_exponents():
    for lo, hi in [(0.0, 1e-4), (1e5, 1e5 + 3.0), (2.0e6, 9.0e6), (-3.0, 3.0)]:
        from app.reporting.chart import nice_ticks

        ticks = nice_ticks(lo, hi)
        step = ticks[1] - ticks[0]
        for t in ticks:
            text = tick_text(t, step)
            assert "e" not in text.lower(), text
            assert float(text.replace("\u2212", "-")) == pytest.approx(t, abs=step * 1e-6)


def test_overlay_draws_each_boundary_once(device, traced):
    project, results = traced
    n_segments = len(project.alternatives[0].segments)
    assert all(len(r.segments) == n_segments for r in results)  # precondition: same segments in each
    chart = overlay_chart(results, "SI", project.targets)
    g = layout_chart(chart, _rect(), PT, device)
    for pg in g.panels:
        # one line per internal boundary (5 segments: 4 boundaries), however many alternatives overlay
        assert len(pg.boundary_xs) == n_segments - 1
        assert len(set(round(x, 3) for x in pg.boundary_xs)) == n_segments - 1
    assert [name for _, _, name in chart.segments] == [s.name for s in project.alternatives[0].segments]


def test_overlay_boundaries_of_different_splits_are_merged(device):
    a = Alternative(name="A", segments=[Segment(name="one", length_m=50.0), Segment(name="two", length_m=50.0)])
    b = Alternative(name="B", segments=[Segment(name="one", length_m=50.0), Segment(name="two", length_m=25.0),
                                        Segment(name="three", length_m=25.0)])
    chart = overlay_chart([solve(a), solve(b)], "SI")
    assert sorted(chart.boundaries) == pytest.approx([50.0, 75.0])  # 50 m shared, 75 m from B only
    assert chart.segments == []  # the splits differ: no one set of names fits both
