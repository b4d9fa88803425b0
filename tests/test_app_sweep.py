"""The Sweep dock on the demo project (invented data, Fernbrook Works): heater output from 5 to 40 W/m.

References outside the panel: every plotted point is re-solved on its own with ``solver.solve`` (°C = K −
273.15, the SI definition); the shaded band's edge is the linear interpolation of the limiting figure between
the two points around it (closed form, checked against hand numbers in ``test_feasible_bands_by_hand``); the
US header and numbers use the foot, 0.3048 m exactly (international yard and pound agreement, 1959).
"""

from __future__ import annotations

import csv
import io

import numpy as np
import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import QTimer  # noqa: E402

from app.document import Document  # noqa: E402
from app.main_window import load_demo_project  # noqa: E402
from app.panels.sweep_panel import SweepPanel, feasible_bands  # noqa: E402
from solver import solve  # noqa: E402

TRACE_15 = "Trace 15 W/m, 80 mm wool"
C = 273.15  # K at 0 °C (SI definition)
FT = 0.3048  # m, exactly
TIMEOUT_MS = 30_000


@pytest.fixture
def panel(qtbot):
    doc = Document(load_demo_project())
    p = SweepPanel(doc)
    qtbot.addWidget(p)
    p.resize(1500, 430)
    p.show()
    p.set_alternative(TRACE_15)
    yield p
    p.shutdown()
    doc.shutdown()


def heater_sweep(p, points: int = 8, lo: float = 5.0, hi: float = 40.0) -> None:
    p.picker.set_kind("heater_output")
    p.picker.set_range(lo, hi)
    p.picker.set_points(points)
    p.targets.clear()
    p.targets.set_target("surface_max", 50.0 + C)
    p.targets.set_target("bulk_min", 55.0 + C)
    p.targets.set_target("inner_wall_max", 80.0 + C)


def run_to_end(qtbot, p) -> None:
    with qtbot.waitSignal(p.run_finished, timeout=TIMEOUT_MS):
        assert p.run(), p.status.text()


def test_feasible_bands_by_hand():
    """Edges where a margin crosses zero, linear between points: −1 → +1 crosses at 0.5; +3 → −1 at 2.75."""
    assert feasible_bands([0, 1, 2, 3], [[-1.0], [1.0], [3.0], [-1.0]]) == [(0.5, 2.75)]
    assert feasible_bands([0, 1, 2], [[1.0, 2.0], [1.0, 2.0], [1.0, 2.0]]) == [(0.0, 2.0)]
    assert feasible_bands([0, 1, 2], [[-1.0], [-2.0], [-3.0]]) == []
    # two targets: the band starts where the later of the two is met (the first met from 0.25, the second 0.5)
    assert feasible_bands([0, 1], [[-1.0, -1.0], [3.0, 1.0]]) == [(0.5, 1.0)]
    # a failed solve (no margin): the edge at the midpoint
    assert feasible_bands([0, 2], [[np.nan], [1.0]]) == [(1.0, 2.0)]


def test_heater_output_sweep_fills_plot_and_table_and_shades_the_band(qtbot, panel):
    heater_sweep(panel)
    run_to_end(qtbot, panel)
    assert len(panel.variants) == 8 and all(v.ok for v in panel.variants)
    assert panel.table.rowCount() == 8
    assert panel.progress.value() == 8
    xs = [v.value for v in panel.variants]
    assert xs == pytest.approx(list(np.linspace(5.0, 40.0, 8)))
    # each plotted curve holds every point, the solver's own numbers in °C (each variant solved on its own)
    curve = panel.curves[("max_inner_wall_temperature_K", 0)]
    x_plot, y_plot = curve.getData()
    alone = [solve(v.alternative) for v in panel.variants]
    wall_C = np.array([r.max_inner_wall_temperature_K for r in alone]) - C
    assert x_plot == pytest.approx(xs)
    assert y_plot == pytest.approx(wall_C, rel=1e-9)
    # targets as limit lines on the temperature chart
    assert sorted(line.value() for line in panel.limit_lines) == pytest.approx([50.0, 55.0, 80.0])
    # one band: from the first value to where the inner wall passes 80 °C, interpolated linearly
    assert len(panel.bands) == 1
    left, right = panel.bands[0]
    assert left == pytest.approx(5.0)
    i = int(np.nonzero(wall_C > 80.0)[0][0])
    assert i > 0
    edge = xs[i - 1] + (xs[i] - xs[i - 1]) * (80.0 - wall_C[i - 1]) / (wall_C[i] - wall_C[i - 1])
    assert right == pytest.approx(edge, rel=1e-9)
    assert "Every target met" in panel.feasible_label.text()


def test_pointing_reads_the_nearest_point(qtbot, panel):
    heater_sweep(panel)
    run_to_end(qtbot, panel)
    text = panel.readout_at(19.0)  # nearest point: 20 W/m
    assert "20 W/m" in text
    assert "Outlet temperature" in text and "°C" in text


def test_csv_export_writes_units_in_the_header(qtbot, panel, tmp_path):
    heater_sweep(panel)
    run_to_end(qtbot, panel)
    path = tmp_path / "sweep.csv"
    assert panel.export_csv(str(path))
    rows = list(csv.reader(io.StringIO(path.read_text(encoding="utf-8-sig"))))
    assert rows[0][0] == "Heater output [W/m]"
    assert "Outlet temperature [°C]" in rows[0]
    assert len(rows) == 1 + 8
    assert float(rows[1][0]) == pytest.approx(5.0)
    col = rows[0].index("Outlet temperature [°C]")
    assert float(rows[1][col]) == pytest.approx(panel.variants[0].key_figures["outlet_temperature_K"] - C, rel=1e-12)
    # the user's unit system: US customary
    panel.doc.set_unit_system("US")
    us = tmp_path / "sweep_us.csv"
    assert panel.export_csv(str(us))
    head, first = list(csv.reader(io.StringIO(us.read_text(encoding="utf-8-sig"))))[:2]
    assert head[0] == "Heater output [W/ft]"
    assert "Outlet temperature [°F]" in head
    assert float(first[0]) == pytest.approx(5.0 * FT)


def test_a_picked_point_becomes_an_alternative_one_undo_step(qtbot, panel):
    heater_sweep(panel)
    run_to_end(qtbot, panel)
    doc = panel.doc
    before = [a.name for a in doc.project.alternatives]
    panel.select_point(3)  # 20 W/m
    assert panel.make_button.isEnabled()
    name = panel.make_alternative()
    assert doc.current_alternative.name == name
    assert len(doc.project.alternatives) == len(before) + 1
    new = doc.current_alternative
    assert new.segments[0].heater.output_W_per_m == pytest.approx(20.0)
    origin = new.origin
    assert origin.tool == "Sweep" and origin.base_alternative == TRACE_15
    assert len(origin.sweep_points) == 8
    assert origin.sweep_points[3].value == pytest.approx(20.0)
    assert "inner wall at most 80.0 °C" in origin.targets
    doc.undo_stack.undo()
    assert [a.name for a in doc.project.alternatives] == before


def test_cancel_stops_a_long_sweep_and_the_gui_stays_responsive(qtbot, panel):
    heater_sweep(panel, points=400)
    ticks = []
    timer = QTimer()
    timer.setInterval(10)
    timer.timeout.connect(lambda: ticks.append(1))
    timer.start()
    with qtbot.waitSignal(panel.points_added, timeout=TIMEOUT_MS):
        assert panel.run()
    # the GUI thread keeps running its timers while the worker solves
    seen = len(ticks)
    qtbot.waitUntil(lambda: len(ticks) >= seen + 5, timeout=TIMEOUT_MS)
    assert panel.running
    with qtbot.waitSignal(panel.run_finished, timeout=TIMEOUT_MS):
        panel.cancel_button.click()
    timer.stop()
    kept = len(panel.variants)
    assert 0 < kept < 400
    assert "Cancelled" in panel.status.text()
    assert panel.run_button.isEnabled()
    # the worker stops after the variant under way; nothing more reaches the view
    qtbot.waitUntil(lambda: panel.runner._pool.activeThreadCount() == 0, timeout=TIMEOUT_MS)
    qtbot.wait(50)
    assert len(panel.variants) == kept
    assert panel.table.rowCount() == kept


def test_grid_sweep_draws_one_curve_per_value_of_the_second_parameter(qtbot, panel):
    heater_sweep(panel, points=4)
    panel.grid_box.setChecked(True)
    panel.picker2.set_kind("insulation_thickness")
    panel.set_figures(["outlet_temperature_K"])
    run_to_end(qtbot, panel)
    n2 = len(panel.picker2.values())
    assert len(panel.variants) == 4 * n2
    for j in range(n2):
        x, y = panel.curves[("outlet_temperature_K", j)].getData()
        assert len(x) == 4


def test_clicking_the_plot_picks_the_nearest_point(qtbot, panel):
    from PySide6.QtCore import QPointF, Qt

    heater_sweep(panel)
    run_to_end(qtbot, panel)
    qtbot.wait(50)  # laid out
    plot = panel.plots["temperature"]
    y = panel.variants[5].key_figures["outlet_temperature_K"] - C
    scene = plot.vb.mapViewToScene(QPointF(29.0, y))  # nearest swept value: 30 W/m (index 5)
    view = panel.graphics
    qtbot.mouseClick(view.viewport(), Qt.LeftButton, pos=view.mapFromScene(scene))
    qtbot.waitUntil(lambda: panel.selected is not None, timeout=5000)
    assert panel.selected == 5
    assert panel.make_button.isEnabled()
    assert "30 W/m" in panel.readout.text()
