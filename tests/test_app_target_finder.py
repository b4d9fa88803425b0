"""The Target Finder dock, used as a plant engineer uses it on the demo project (invented data, Fernbrook Works).

References outside the panel: the answer is re-solved on its own with ``solver.solve`` and its key figures are
compared with the targets directly (the kelvin/degree Celsius offset 273.15 K is the SI definition); for a
standard-size answer, the next smaller standard thickness, also solved on its own, must miss a target.
"""

from __future__ import annotations

import pytest

pytest.importorskip("pytestqt")

from app.document import Document  # noqa: E402
from app.main_window import MainWindow, load_demo_project  # noqa: E402
from app.panels.target_finder_panel import TargetFinderPanel, value_words  # noqa: E402
from solver import solve  # noqa: E402
from solver.variants import STANDARD_INSULATION_THICKNESSES_M  # noqa: E402

TRACE_15 = "Trace 15 W/m, 80 mm wool"
C = 273.15  # K at 0 °C (SI definition of the degree Celsius)
TIMEOUT_MS = 20_000


@pytest.fixture
def finder(qtbot):
    doc = Document(load_demo_project())
    panel = TargetFinderPanel(doc)
    qtbot.addWidget(panel)
    panel.resize(1300, 420)
    panel.show()
    panel.set_alternative(TRACE_15)
    yield panel
    panel.shutdown()
    doc.shutdown()


def run_find(qtbot, panel) -> None:
    with qtbot.waitSignal(panel.search_finished, timeout=TIMEOUT_MS):
        assert panel.find(), panel.status.text()


def insulation_targets(panel, bulk_min_C: float) -> None:
    panel.picker.set_kind("insulation_thickness")
    panel.targets.clear()
    panel.targets.set_target("surface_max", 50.0 + C)
    panel.targets.set_target("bulk_min", bulk_min_C + C)


def test_smallest_insulation_for_surface_and_bulk_shows_the_binding_target(qtbot, finder):
    insulation_targets(finder, 55.0)
    run_find(qtbot, finder)
    r = finder.result
    assert r is not None and r.feasible, finder.status.text()
    assert r.value in STANDARD_INSULATION_THICKNESSES_M
    # shown: the value (big), the binding target in words, a margin row per target, every key figure
    assert finder.value_label.text() == value_words(r.parameter, r.value, "SI")
    assert "Binding" in finder.binding_label.text()
    assert "at least 55.0 °C" in finder.binding_label.text() or "at most 50.0 °C" in finder.binding_label.text()
    assert finder.margins_table.rowCount() == 2
    assert finder.figures_table.rowCount() > 10
    assert finder.make_button.isVisible() and finder.infeasible_box.isHidden()
    # the answer, solved on its own, meets both targets (reference: the solver itself, key figures in K)
    alone = solve(r.alternative)
    assert alone.max_outer_surface_temperature_K <= 50.0 + C
    assert alone.min_bulk_temperature_K >= 55.0 + C


def test_one_standard_step_smaller_misses_a_target(qtbot, finder):
    """A target the thinnest sizes miss (bulk at least 70 °C with a 75 °C inlet): the answer is not the
    smallest size, and the next smaller one, solved on its own, falls below 70 °C somewhere."""
    insulation_targets(finder, 70.0)
    run_find(qtbot, finder)
    r = finder.result
    assert r.feasible, r.explanation
    sizes = list(STANDARD_INSULATION_THICKNESSES_M)
    i = sizes.index(r.value)
    assert i > 0
    smaller = r.parameter.apply(finder.base_alternative, sizes[i - 1])
    res = solve(smaller)
    assert res.min_bulk_temperature_K < 70.0 + C or res.max_outer_surface_temperature_K > 50.0 + C
    assert solve(r.alternative).min_bulk_temperature_K >= 70.0 + C


def test_make_alternative_is_one_undo_step_and_carries_its_record(qtbot, finder):
    doc = finder.doc
    insulation_targets(finder, 55.0)
    run_find(qtbot, finder)
    before = [a.name for a in doc.project.alternatives]
    name = finder.make_alternative()
    assert name is not None
    after = [a.name for a in doc.project.alternatives]
    assert len(after) == len(before) + 1
    assert after[after.index(TRACE_15) + 1] == name  # right after the one searched
    assert doc.current_alternative.name == name  # and selected
    origin = doc.current_alternative.origin
    assert origin.tool == "Target Finder"
    assert origin.base_alternative == TRACE_15
    assert origin.binding and origin.searched
    assert len(origin.target_limits) == 2
    doc.undo_stack.undo()
    assert [a.name for a in doc.project.alternatives] == before


def test_no_value_meets_the_targets_says_why_and_offers_no_answer(qtbot, finder):
    """Bulk at least 120 °C while the inner wall stays at or below 110 °C cannot both hold with any heater
    output: the inner wall is hotter than the bulk wherever heat flows into the fluid (heat flows from hot to
    cold: second law)."""
    finder.picker.set_kind("heater_output")
    finder.targets.clear()
    finder.targets.set_target("bulk_min", 120.0 + C)
    finder.targets.set_target("inner_wall_max", 110.0 + C)
    run_find(qtbot, finder)
    r = finder.result
    assert r is not None and not r.feasible
    assert finder.infeasible_box.isVisible()
    text = finder.infeasible_box.text()
    assert r.explanation and len(r.explanation) > 30
    assert "°C" in text or "W/m" in text
    assert "_" not in r.explanation.split("(")[0]  # plain words, not a key such as bulk_min
    assert finder.make_button.isHidden()
    assert finder.make_alternative() is None


def test_unreadable_target_is_refused_naming_the_field(qtbot, finder):
    finder.targets.clear()
    finder.targets.boxes["surface_max"].setChecked(True)
    finder.targets.edits["surface_max"].setText("warm")
    assert not finder.find()
    assert "Outer surface at most" in finder.status.text()
    assert "warm" in finder.status.text()
    assert not finder.searching


def test_no_target_ticked_is_refused_in_plain_words(qtbot, finder):
    finder.targets.clear()
    assert not finder.find()
    assert "Tick at least one target" in finder.status.text()


def test_cancel_discards_the_answer(qtbot, finder):
    insulation_targets(finder, 55.0)
    with qtbot.waitSignal(finder.search_finished, timeout=TIMEOUT_MS):
        assert finder.find()
        finder.cancel()
    assert "Cancelled" in finder.status.text()
    assert finder.find_button.isEnabled() and not finder.cancel_button.isEnabled()
    # the worker finishes its search; its answer never reaches the view
    qtbot.waitUntil(lambda: finder.runner._pool.activeThreadCount() == 0, timeout=TIMEOUT_MS)
    qtbot.wait(50)
    assert finder.result is None
    assert finder.value_label.text() == "—"


def test_default_maintain_target_comes_from_the_alternative(qtbot, finder):
    """The demo alternative's minimum bulk limit (55 °C, invented data) is the maintain target's default."""
    edit = finder.targets.edits["bulk_min"]
    assert edit.value() == pytest.approx(finder.base_alternative.limits.min_bulk_temperature_K)


def test_tools_menu_opens_the_docks_hidden_by_default(qtbot):
    win = MainWindow(interactive=False, remember=False)
    qtbot.addWidget(win)
    win.load_demo()
    win.show()
    assert win.finder_dock.isHidden() and win.sweep_dock.isHidden()
    win.finder_action.trigger()
    assert win.finder_dock.isVisible()
    win.sweep_action.trigger()
    assert win.sweep_dock.isVisible()
    win.target_finder.shutdown()
    win.sweep_panel.shutdown()
    win.doc.shutdown()


def test_answer_and_range_in_us_customary_units(qtbot, finder):
    """13 mm is 0.5118 in (the inch is 25.4 mm exactly); 80 W/m is 24.38 W/ft (the foot is 0.3048 m)."""
    finder.doc.set_unit_system("US")
    finder.picker.set_kind("heater_output")
    assert finder.picker.upper_edit.unit_label.text() == "W/ft"
    assert float(finder.picker.upper_edit.text()) == pytest.approx(80.0 * 0.3048, rel=1e-4)
    insulation_targets(finder, 55.0)
    assert finder.targets.edits["surface_max"].unit_label.text() == "°F"
    run_find(qtbot, finder)
    if finder.result.value == pytest.approx(0.013):
        assert finder.value_label.text() == "0.5118 in"
    assert finder.value_label.text().endswith(" in")
    assert "122.0 °F" in finder.margins_table.item(1, 0).text() or "122.0 °F" in finder.margins_table.item(0, 0).text()


def test_a_range_running_downwards_is_refused_with_its_values(qtbot, finder):
    insulation_targets(finder, 55.0)
    finder.picker.set_kind("heater_output")
    finder.picker.set_range(50.0, 10.0)
    assert not finder.find()
    assert "50 W/m" in finder.status.text() and "10 W/m" in finder.status.text()
    assert finder.value_label.text() == "—"


def test_a_parameter_that_does_not_apply_is_refused_in_words(qtbot, finder):
    """The demo line has no steam tracer (invented data): varying the steam pressure is refused, no key shown."""
    insulation_targets(finder, 55.0)
    finder.picker.set_kind("steam_pressure")
    assert not finder.find()
    assert finder.status.text().startswith("Steam pressure: ")
    assert "steam_pressure" not in finder.status.text()
