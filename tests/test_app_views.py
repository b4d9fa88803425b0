"""Views of the desktop app: Line Strip, Profiles, Checks, Key Figures (pytest-qt, offscreen).

The views observe the real Document (app.document) and show real solver results
(solver.solve). Unit conversions checked here are computed independently from the unit
definitions (not through app.units): degF = K * 9/5 - 459.67 and 1 ft = 0.3048 m exactly
(NIST SP 811, appendix B), 1 psi = 6894.757 Pa (NIST SP 811), 1 bar = 1e5 Pa (SI brochure).
The line below is an invented example, not a real plant.
"""

from __future__ import annotations

import dataclasses
import math
import re

import numpy as np
import pytest
from PySide6.QtCore import QEvent, QPointF, Qt
from PySide6.QtGui import QMouseEvent
from PySide6.QtWidgets import QApplication

from app.commands import SetAlternativeField, SetSegmentField
from app.document import Document
from app.panels.checks_panel import ROLE_CHECK, ChecksPanel
from app.panels.key_figures import KeyFiguresPanel
from app.panels.line_strip import MIN_BLOCK_WIDTH, LineStrip, block_widths
from app.panels.profiles import ProfilesPanel
from solver.model import Adiabatic, Alternative, Buried, Fitting, FixedWall, Jacket, Layer, Project, Segment, Wind
from solver.results import Check

FT = 0.3048  # m, exact (NIST SP 811)
PSI = 6894.757  # Pa (NIST SP 811, to 7 significant figures)


def k_to_f(t_k):
    return np.asarray(t_k) * 9.0 / 5.0 - 459.67  # definition of the Fahrenheit scale


def demo_project() -> Project:
    """An invented line: pump discharge, traced rack run, buried crossing, windy bridge, jacket, steam, nozzle."""
    segs = [
        Segment(name="Pump discharge", length_m=4, fittings=[Fitting(count=3)], elevation_change_m=2.5),
        Segment(name="Rack run", length_m=60, heat_input_W_per_m=30,
                insulation=[Layer(thickness_m=0.05, conductivity_W_per_mK=0.04)]),
        Segment(name="Road crossing", length_m=18, surroundings=Buried(), elevation_change_m=-1.5),
        Segment(name="Bridge", length_m=25, surroundings=Wind(),
                insulation=[Layer(thickness_m=0.1, conductivity_W_per_mK=0.04)]),
        Segment(name="Jacketed valve", length_m=3, surroundings=Jacket(), fittings=[Fitting(kind="gate_valve_full")]),
        Segment(name="Steam heated", length_m=12, surroundings=FixedWall()),
        Segment(name="Tank nozzle", length_m=2, surroundings=Adiabatic()),
    ]
    return Project(name="Views test line", alternatives=[Alternative(segments=segs)])


@pytest.fixture
def doc(qtbot):
    d = Document(demo_project())
    yield d
    d.shutdown()


def names(doc) -> list[str]:
    return [s.name for s in doc.current_alternative.segments]


def show(qtbot, widget, w=1400, h=240):
    qtbot.addWidget(widget)
    widget.resize(w, h)
    widget.show()
    qtbot.waitExposed(widget)
    QApplication.processEvents()
    return widget


def send_mouse(widget, kind, pos: QPointF, button=Qt.LeftButton, buttons=Qt.LeftButton):
    gpos = QPointF(widget.mapToGlobal(pos.toPoint()))
    ev = QMouseEvent(kind, pos, gpos, button, buttons, Qt.NoModifier)
    QApplication.sendEvent(widget, ev)


# --------------------------------------------------------------------------- Line Strip


def test_block_widths_proportional_with_minimum():
    # closed form: unclamped widths share the rest in proportion to length
    w = block_widths([10.0, 30.0, 1.0], 1000.0, minimum=100.0)
    assert sum(w) == pytest.approx(1000.0)
    assert w[2] == pytest.approx(100.0)  # 1 m would be 24 px: raised to the minimum
    assert w[1] / w[0] == pytest.approx(3.0)
    assert w[0] == pytest.approx(900.0 * 10 / 40)
    # no room: everyone gets the minimum (the canvas then scrolls)
    assert block_widths([1.0, 2.0], 150.0, minimum=100.0) == [100.0, 100.0]


def test_strip_renders_all_segments_and_click_selects(qtbot, doc):
    strip = show(qtbot, LineStrip(doc))
    rects = [strip.segment_rect(i) for i in range(7)]
    assert len(strip.canvas.block_rects()) == 7
    assert all(r.width() >= MIN_BLOCK_WIDTH - 1 for r in rects)
    assert rects[1].width() > rects[3].width() > rects[0].width()  # 60 m > 25 m > 4 m
    assert all(a.right() < b.left() for a, b in zip(rects, rects[1:]))  # flow order, left to right
    assert not strip.grab().isNull()

    qtbot.mouseClick(strip.canvas, Qt.LeftButton, pos=rects[3].center())
    assert doc.selected_segment == 3
    assert strip.move_left_action.isEnabled() and strip.delete_action.isEnabled()
    assert "Bridge" in strip.segment_tooltip(3)
    assert doc.undo_stack.count() == 0  # selecting is not an edit


def test_drag_reorders_through_a_command(qtbot, doc):
    strip = show(qtbot, LineStrip(doc))
    before = names(doc)
    r0, r2 = strip.segment_rect(0), strip.segment_rect(2)
    start = QPointF(r0.center())
    send_mouse(strip.canvas, QEvent.MouseButtonPress, start, buttons=Qt.LeftButton)
    # drag past the middle of block 2: drop into the gap after it
    for x in np.linspace(start.x(), r2.center().x() + 10, 8):
        send_mouse(strip.canvas, QEvent.MouseMove, QPointF(x, start.y()), button=Qt.NoButton)
    send_mouse(strip.canvas, QEvent.MouseButtonRelease, QPointF(r2.center().x() + 10, start.y()), buttons=Qt.NoButton)

    assert names(doc) == before[1:3] + [before[0]] + before[3:]
    assert doc.undo_stack.count() == 1
    assert "Move" in doc.undo_stack.text(0)
    assert doc.selected_segment == 2  # the selection follows the moved segment
    doc.undo_stack.undo()
    assert names(doc) == before


def test_keyboard_insert_duplicate_move_delete(qtbot, doc):
    strip = show(qtbot, LineStrip(doc))
    strip.activateWindow()
    strip.canvas.setFocus()
    qtbot.waitUntil(lambda: strip.canvas.hasFocus())
    doc.select_segment(1)
    before = names(doc)

    qtbot.keyClick(strip.canvas, Qt.Key_Right, Qt.ControlModifier)  # move down-stream
    assert names(doc)[2] == before[1] and doc.selected_segment == 2

    qtbot.keyClick(strip.canvas, Qt.Key_Insert)
    assert len(names(doc)) == 8 and doc.selected_segment == 3
    assert names(doc)[3] not in before  # a new, uniquely named segment after the selected one
    # the new segment keeps the bore of the one it follows
    assert doc.current_alternative.segments[3].pipe == doc.current_alternative.segments[2].pipe

    doc.select_segment(0)
    qtbot.keyClick(strip.canvas, Qt.Key_D, Qt.ControlModifier)
    segs = doc.current_alternative.segments
    assert len(segs) == 9 and segs[1].length_m == segs[0].length_m and segs[1].fittings == segs[0].fittings

    qtbot.keyClick(strip.canvas, Qt.Key_Delete)
    assert len(names(doc)) == 8
    assert doc.undo_stack.count() == 4
    for _ in range(4):
        doc.undo_stack.undo()
    assert names(doc) == before


def test_toolbar_and_context_menu_hold_the_actions(qtbot, doc):
    strip = show(qtbot, LineStrip(doc))
    toolbar_actions = strip.toolbar.actions()
    menu_actions = strip.context_menu().actions()
    for a in (strip.insert_action, strip.duplicate_action, strip.delete_action):
        assert a in toolbar_actions and a in menu_actions
    doc.select_segment(6)
    strip.duplicate_action.trigger()
    assert names(doc)[7].startswith("Tank nozzle") and len(names(doc)) == 8


def test_delete_refuses_the_last_segment(qtbot):
    d = Document(Project(alternatives=[Alternative(segments=[Segment(name="Only run")])]))
    try:
        strip = show(qtbot, LineStrip(d))
        strip.canvas.setFocus()
        assert not strip.delete_action.isEnabled()
        assert "at least one segment" in strip.delete_action.statusTip()
        qtbot.keyClick(strip.canvas, Qt.Key_Delete)
        strip.delete_selected()
        assert names(d) == ["Only run"]
        assert d.undo_stack.count() == 0
        assert "at least one segment" in strip.hint.text()
    finally:
        d.shutdown()


# --------------------------------------------------------------------------- Profiles


def test_profiles_curves_show_the_result_in_display_units(qtbot, doc):
    doc.project.alternatives[0].limits.max_inner_wall_temperature_K = 413.15  # model set before any view
    panel = show(qtbot, ProfilesPanel(doc), 1100, 600)
    result = doc.solve_now()
    prof = result.profile

    x, y = panel.curves["bulk"].getData()
    np.testing.assert_allclose(x, prof.x_m)  # metres in SI
    np.testing.assert_allclose(y, prof.bulk_temperature_K - 273.15)  # °C = K - 273.15 (SI brochure)
    _, yw = panel.curves["inner_wall"].getData()
    np.testing.assert_allclose(yw, prof.inner_wall_temperature_K - 273.15)
    _, yp = panel.curves["pressure"].getData()
    np.testing.assert_allclose(yp, prof.pressure_Pa / 1e5)  # bar = 1e5 Pa
    assert panel.limit_lines["max_wall"].isVisible()
    assert panel.limit_lines["max_wall"].value() == pytest.approx(140.0)
    assert not panel.limit_lines["min_bulk"].isVisible()
    # a boundary at every segment start and at the outlet
    visible = list(panel.boundary_lines[0].positions)
    assert sorted(visible) == pytest.approx([s.x_start_m for s in result.segments] + [result.segments[-1].x_end_m])

    doc.set_unit_system("US")
    x, y = panel.curves["bulk"].getData()
    np.testing.assert_allclose(x, prof.x_m / FT)
    np.testing.assert_allclose(y, k_to_f(prof.bulk_temperature_K))
    _, yp = panel.curves["pressure"].getData()
    np.testing.assert_allclose(yp, prof.pressure_Pa / PSI, rtol=1e-6)
    assert "°F" in panel.temperature_plot.getAxis("left").labelText
    assert panel.limit_lines["max_wall"].value() == pytest.approx(413.15 * 1.8 - 459.67)


def test_profiles_readout_marker_and_stale_note(qtbot, doc):
    panel = show(qtbot, ProfilesPanel(doc), 1100, 600)
    result = doc.solve_now()
    prof = result.profile
    i = len(prof.x_m) // 3
    panel.show_cursor(float(prof.x_m[i]))
    text = panel.readout.text()
    for word in ("bulk", "inner wall", "outer surface", "pressure", "Re", "velocity", "h ", "heat flux"):
        assert word in text
    assert f"{prof.bulk_temperature_K[i] - 273.15:.1f} °C" in text

    doc.mark_position(50.0)
    assert panel.marker_lines[0].isVisible() and panel.marker_lines[0].value() == pytest.approx(50.0)
    doc.mark_position(math.nan)
    assert not panel.marker_lines[0].isVisible()

    x_before, y_before = (a.copy() for a in panel.curves["bulk"].getData())
    doc.solve_failed.emit("segments[1].length_m: must be positive")
    assert panel.stale_note.isVisibleTo(panel) and "previous result" in panel.stale_note.text()
    x_after, y_after = panel.curves["bulk"].getData()
    np.testing.assert_array_equal(y_after, y_before)  # the last good curves stay
    doc.result_ready.emit(result)
    assert not panel.stale_note.isVisibleTo(panel)


def test_edit_resolves_and_replots(qtbot, doc):
    panel = show(qtbot, ProfilesPanel(doc), 1000, 500)
    figures = KeyFiguresPanel(doc)
    qtbot.addWidget(figures)
    doc.solve_now()
    outlet_before = panel.curves["bulk"].getData()[1][-1]
    text_before = figures.value_text("outlet_temperature_K")
    with qtbot.waitSignal(doc.result_ready, timeout=20000):
        doc.push(SetSegmentField(doc, 0, 5, "length_m", 2.0))  # a much shorter steam-heated run
    outlet_after = panel.curves["bulk"].getData()[1][-1]
    assert outlet_after < outlet_before - 1.0  # less heating: colder outlet
    assert figures.value_text("outlet_temperature_K") != text_before
    assert panel.curves["bulk"].getData()[1][-1] == pytest.approx(doc.result.outlet_temperature_K - 273.15)


# --------------------------------------------------------------------------- Checks


def test_checks_sorted_click_selects_and_marks(qtbot, doc):
    panel = show(qtbot, ChecksPanel(doc), 800, 300)
    result = doc.solve_now()
    extra = [
        Check("info", "test_info", "An informative finding.", segment=0, x_m=1.0),
        Check("danger", "test_danger", "A dangerous finding.", segment=3, x_m=90.0),
    ]
    # as the document does: it holds the result the views read, then signals
    doc.result = dataclasses.replace(result, checks=list(result.checks) + extra)
    doc.result_ready.emit(doc.result)
    tree = panel.tree
    ranks = {"danger": 2, "warning": 1, "info": 0}
    sev = [tree.topLevelItem(i).data(0, ROLE_CHECK).severity for i in range(tree.topLevelItemCount())]
    assert len(sev) == len(result.checks) + 2
    assert sev == sorted(sev, key=lambda s: -ranks[s])
    # the line's own findings may hold a danger too (its design cases): the injected one is found by its code
    row = next(i for i in range(tree.topLevelItemCount()) if tree.topLevelItem(i).data(0, ROLE_CHECK).code == "test_danger")
    first = tree.topLevelItem(row)
    assert first.text(0) == "Danger" and first.text(2) == "Bridge" and first.text(3) == "90.0 m"

    doc.select_segment(0)
    with qtbot.waitSignal(doc.position_marked) as marked:
        rect = tree.visualItemRect(first)
        qtbot.mouseClick(tree.viewport(), Qt.LeftButton, pos=rect.center())
    assert doc.selected_segment == 3
    assert marked.args[0] == pytest.approx(90.0)
    assert "dangerous" in panel.detail.text()

    doc.set_unit_system("US")
    row = next(i for i in range(panel.tree.topLevelItemCount())
               if panel.tree.topLevelItem(i).data(0, ROLE_CHECK).code == "test_danger")
    assert panel.tree.topLevelItem(row).text(3) == f"{90.0 / FT:.1f} ft"  # 295.3 ft


def test_checks_empty_says_no_findings(qtbot, doc):
    panel = show(qtbot, ChecksPanel(doc), 600, 200)
    result = doc.solve_now()
    doc.result = dataclasses.replace(result, checks=[])
    doc.result_ready.emit(doc.result)
    assert panel.tree.topLevelItemCount() == 1
    assert "No findings" in panel.tree.topLevelItem(0).text(1)
    assert panel.tree.topLevelItem(0).data(0, ROLE_CHECK) is None
    with qtbot.assertNotEmitted(doc.position_marked):
        panel.activate_row(panel.tree.topLevelItem(0))


# --------------------------------------------------------------------------- Key Figures


def _number(text: str) -> float:
    m = re.match(r"^\s*(-?[\d\u2009.]+(?:e[-+]?\d+)?)", text)
    assert m, text
    return float(m.group(1).replace("\u2009", ""))


def test_key_figures_in_si_and_after_switch_to_us(qtbot, doc):
    panel = show(qtbot, KeyFiguresPanel(doc), 520, 620)
    r = doc.solve_now()

    assert panel.value_text("outlet_temperature_K") == f"{r.outlet_temperature_K - 273.15:.1f} °C"
    assert panel.value_text("max_inner_wall_temperature_K") == f"{r.max_inner_wall_temperature_K - 273.15:.1f} °C"
    assert panel.value_text("pressure_drop_Pa").endswith("kPa")
    assert _number(panel.value_text("pressure_drop_Pa")) == pytest.approx(r.pressure_drop_Pa / 1e3, rel=1e-3)
    assert _number(panel.value_text("outlet_pressure_Pa")) == pytest.approx(r.outlet_pressure_Pa / 1e5, rel=1e-3)
    assert _number(panel.value_text("duty_W")) == pytest.approx(r.duty_W / 1e3, rel=1e-3)
    assert panel.value_text("reynolds_range").count("–") == 1
    for key in ("pressure_drop_friction_Pa", "pressure_drop_fittings_Pa", "pressure_drop_elevation_Pa",
                "pressure_drop_acceleration_Pa", "heat_input_W", "heat_loss_W", "energy_balance_residual_W",
                "min_inner_wall_temperature_K", "max_outer_surface_temperature_K", "velocity_range",
                "pump_power_W", "residence_time_s"):
        assert panel.value_text(key) not in ("", "—"), key

    doc.set_unit_system("US")
    assert panel.value_text("outlet_temperature_K") == f"{float(k_to_f(r.outlet_temperature_K)):.1f} °F"
    assert panel.value_text("pressure_drop_Pa").endswith("psi")
    assert _number(panel.value_text("pressure_drop_Pa")) == pytest.approx(r.pressure_drop_Pa / PSI, rel=1e-3)
    assert panel.value_text("outlet_pressure_Pa").endswith("psia")
    # 1 Btu/h = 0.29307107 W (IT Btu, NIST SP 811)
    assert _number(panel.value_text("duty_W")) == pytest.approx(r.duty_W / 0.29307107, rel=1e-3)
    row = panel._row_of["max_inner_wall_temperature_K"]
    assert panel.table.item(row, 2).text() == f"at {r.max_inner_wall_position_m / FT:.1f} ft"


def test_key_figures_follow_an_edit_of_the_feed(qtbot, doc):
    panel = show(qtbot, KeyFiguresPanel(doc), 520, 620)
    doc.solve_now()
    with qtbot.waitSignal(doc.result_ready, timeout=20000):
        doc.push(SetAlternativeField(doc, 0, "feed.mass_flow_kg_per_s", 2.0))
    # mass flow shown in kg/h: 2 kg/s = 7200 kg/h
    assert _number(panel.value_text("mass_flow_kg_per_s")) == pytest.approx(7200.0)


# --------------------------------------------------------------------------- redraw cost (DESIGN §6)


def test_key_figures_update_their_items_in_place_and_resize_the_columns(qtbot, doc):
    panel = show(qtbot, KeyFiguresPanel(doc), 900, 620)
    doc.solve_now()
    row = panel._row_of["mass_flow_kg_per_s"]
    item = panel.table.item(row, 1)
    doc.push(SetAlternativeField(doc, 0, "feed.mass_flow_kg_per_s", 2.0))
    doc.solve_now()
    QApplication.processEvents()
    assert panel.table.item(row, 1) is item  # the same item, new text
    # 2 kg/s = 7200 kg/h (1 h = 3600 s, exact)
    assert _number(panel.value_text("mass_flow_kg_per_s")) == pytest.approx(7200.0)
    assert item.toolTip().startswith("Mass flow: " + item.text())
    # the one change notice the model sends still lets the value column fit its longer texts
    assert panel.table.columnWidth(1) >= panel.table.sizeHintForColumn(1) > 0


def test_strip_picture_is_reused_until_what_it_shows_changes(qtbot, doc):
    strip = show(qtbot, LineStrip(doc))
    doc.solve_now()
    strip.canvas.repaint()
    first = strip.canvas._pixmap
    assert first is not None
    doc.result_ready.emit(doc.result)  # same check marks: the picture is copied, not redrawn
    strip.canvas.repaint()
    assert strip.canvas._pixmap is first
    doc.select_segment(3)
    strip.canvas.repaint()
    assert strip.canvas._pixmap is not first  # selection shows: redrawn
    image_selected = strip.canvas.grab().toImage()
    doc.push(SetSegmentField(doc, 0, 1, "length_m", 120.0))  # block widths move
    strip.canvas.repaint()
    assert strip.canvas.grab().toImage() != image_selected


def test_profiles_take_the_new_range_before_painting(qtbot, doc):
    panel = show(qtbot, ProfilesPanel(doc), 1000, 500)
    doc.solve_now()
    QApplication.processEvents()
    doc.push(SetSegmentField(doc, 0, 1, "length_m", 400.0))  # a much longer line
    result = doc.solve_now()
    # no event processed yet: the view already spans the new line, so the first paint is the last
    (x0, x1), _ = panel.temperature_plot.vb.viewRange()
    assert x0 <= result.profile.x_m[0] and x1 >= result.profile.x_m[-1]
    labels = [text for _x, text in panel.top_axis._tickLevels[0]] if panel.top_axis._tickLevels else []
    assert any("Rack" in t for t in labels)
    # grid lines sit behind the curves
    grids = panel._grid_lines
    assert len(grids) == 2 and all(g.zValue() < panel.curves["bulk"].zValue() for g in grids)
    assert grids[0].boundingRect() == panel.temperature_plot.vb.viewRect()
