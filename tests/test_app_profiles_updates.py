"""Profiles after an edit: dense curves keep every peak, and the axes hold still for small edits
(pytest-qt, offscreen)."""

from __future__ import annotations

import numpy as np
import pytest
from PySide6.QtWidgets import QApplication

from app.commands import SetSegmentField
from app.document import Document
from app.axes import thin
from app.panels.profiles import ProfilesPanel
from solver.model import Alternative, Feed, Project, Segment


def test_thinning_keeps_the_lowest_and_highest_point_of_every_pixel_column():
    # reference: a plain loop over the pixel columns (independent of the vectorised code)
    rng = np.random.default_rng(7)
    x = np.sort(rng.uniform(0.0, 2200.0, 7800))
    y = np.cumsum(rng.normal(size=x.size))
    y[3901] += 40.0  # a one-node spike, as at a short hot fitting
    x0, x1, columns = -44.0, 2244.0, 1400
    xt, yt = thin(x, y, x0, x1, columns)
    assert xt.size <= 2 * columns + 2 < x.size  # about two points per pixel column
    assert (xt[0], xt[-1]) == (x[0], x[-1])  # the curve still runs from inlet to outlet
    assert np.all(np.diff(xt) >= 0)
    col, col_t = ((x - x0) * columns / (x1 - x0)).astype(int), ((xt - x0) * columns / (x1 - x0)).astype(int)
    for c in np.unique(col):
        kept = yt[col_t == c]
        assert y[col == c].min() in kept and y[col == c].max() in kept, c
    assert yt.max() == y.max()  # the spike is drawn


def cooling_line_doc() -> Document:
    """An invented bare hot-water line in still air at 20 °C (cools along its length)."""
    segs = [Segment(name="Pump discharge", length_m=12.0), Segment(name="Rack run", length_m=80.0),
            Segment(name="Nozzle", length_m=1.0)]
    alt = Alternative(name="Axes test", segments=segs, feed=Feed(inlet_temperature_K=363.15, mass_flow_kg_per_s=0.1))
    return Document(Project(name="Axes test line", alternatives=[alt]))


def test_a_small_edit_keeps_the_axes_and_a_large_one_moves_them(qtbot):
    doc = cooling_line_doc()
    try:
        panel = ProfilesPanel(doc)
        qtbot.addWidget(panel)
        panel.resize(1000, 500)
        panel.show()
        doc.solve_now()
        QApplication.processEvents()
        before = [plot.vb.viewRange() for plot in (panel.temperature_plot, panel.pressure_plot)]
        doc.push(SetSegmentField(doc, 0, 1, "length_m", 81.0))  # 1 m more rack: a small edit
        result = doc.solve_now()
        after = [plot.vb.viewRange() for plot in (panel.temperature_plot, panel.pressure_plot)]
        assert after == before  # axes (and their tick labels) hold still while the user fine-tunes
        (x0, x1), (t0, t1) = after[0]
        assert x0 <= result.profile.x_m[0] and result.profile.x_m[-1] <= x1
        t = result.profile.bulk_temperature_K - 273.15
        assert t0 <= t.min() and t.max() <= t1

        doc.push(SetSegmentField(doc, 0, 1, "length_m", 400.0))  # five times the rack: the view follows
        result = doc.solve_now()
        (x0, x1), (t0, t1) = panel.temperature_plot.vb.viewRange()
        assert x1 >= result.profile.x_m[-1] and x1 < 1.1 * result.profile.x_m[-1]  # filled, not a sliver
        t = result.profile.inner_wall_temperature_K - 273.15
        assert t0 <= t.min() and t.max() <= t1
    finally:
        doc.shutdown()
