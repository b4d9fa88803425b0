"""Document and commands: undoable edits, validation before change, the solve runner.

The model and solver are the references here: after every command the Document's project must
equal the model built directly (pydantic), undo must restore the exact previous model, and the
result the Document publishes must equal an independent ``solver.solve`` of the same alternative.
"""

from __future__ import annotations

import math

import pytest
from pydantic import ValidationError

pytest.importorskip("pytestqt")

from app import commands as C  # noqa: E402
from app.document import Document  # noqa: E402
from solver import solve  # noqa: E402
from solver.model import Alternative, FixedWall, Layer, Project, Segment, StillAir  # noqa: E402


def make_project() -> Project:
    # a small invented line: water through three bare or insulated runs in still air
    segs = [
        Segment(name="A", length_m=20.0, heat_input_W_per_m=30.0,
                insulation=[Layer(thickness_m=0.05, conductivity_W_per_mK=0.04)]),
        Segment(name="B", length_m=15.0),
        Segment(name="C", length_m=5.0, surroundings=StillAir(temperature_K=278.15)),
    ]
    alt = Alternative(name="Base", segments=segs)
    alt = alt.model_copy(update={"feed": alt.feed.model_copy(update={"inlet_temperature_K": 333.15})})
    return Project(name="Test line", alternatives=[alt])


@pytest.fixture
def doc(qtbot):
    d = Document(make_project())
    yield d
    d.shutdown()


def names(doc) -> list[str]:
    return [s.name for s in doc.current_alternative.segments]


def test_insert_move_delete_and_undo_restore_exact_model(doc):
    before = doc.project.model_dump()
    doc.push(C.InsertSegment(doc, 0, 1, Segment(name="New")))
    assert names(doc) == ["A", "New", "B", "C"]
    assert doc.selected_segment == 1  # the inserted segment is selected
    doc.push(C.MoveSegment(doc, 0, 1, 3))
    assert names(doc) == ["A", "B", "C", "New"]
    assert doc.selected_segment == 3  # the selection follows the moved segment
    doc.push(C.RemoveSegment(doc, 0, 0))
    assert names(doc) == ["B", "C", "New"]
    doc.push(C.DuplicateSegment(doc, 0, 0))
    assert names(doc) == ["B", "B (copy)", "C", "New"]
    assert doc.undo_stack.count() == 4
    for _ in range(4):
        doc.undo_stack.undo()
    assert doc.project.model_dump() == before
    for _ in range(4):
        doc.undo_stack.redo()
    assert names(doc) == ["B", "B (copy)", "C", "New"]


def test_compound_edit_is_one_undo_step(doc):
    seg_before = doc.current_alternative.segments[0]
    assert seg_before.heat_input_W_per_m == 30.0
    # a fixed wall cannot take tracing (model rule), so the switch clears the heat input in the same step
    doc.push(C.SetSegmentFields(doc, 0, 0, {"surroundings": {"kind": "fixed_wall"}, "heater": None}))
    seg = doc.current_alternative.segments[0]
    assert isinstance(seg.surroundings, FixedWall) and seg.heat_input_W_per_m == 0.0
    assert doc.undo_stack.count() == 1
    doc.undo_stack.undo()
    assert doc.current_alternative.segments[0] == seg_before


def test_macro_groups_commands(doc):
    with doc.macro("Lengthen all"):
        for i in range(3):
            doc.push(C.SetSegmentField(doc, 0, i, "length_m", 50.0))
    assert [s.length_m for s in doc.current_alternative.segments] == [50.0] * 3
    assert doc.undo_stack.count() == 1
    doc.undo_stack.undo()
    assert [s.length_m for s in doc.current_alternative.segments] == [20.0, 15.0, 5.0]


@pytest.mark.parametrize(
    "path, value",
    [
        ("length_m", -2.0),  # PositiveFloat in the model
        ("elevation_change_m", 25.0),  # |elevation| must not exceed length (20 m)
        ("heat_input_W_per_m", float("nan")),  # NaN refused (allow_inf_nan=False)
        ("surroundings", {"kind": "fixed_wall"}),  # fixed wall with 30 W/m tracing is refused
        ("insulation.0.thickness_m", 0.0),
    ],
)
def test_invalid_value_raises_before_any_change(doc, path, value):
    before = doc.project.model_dump()
    with pytest.raises(ValidationError):
        C.SetSegmentField(doc, 0, 0, path, value)
    assert doc.project.model_dump() == before
    assert doc.undo_stack.count() == 0
    assert not doc.modified


def test_last_segment_cannot_be_removed(qtbot):
    d = Document(Project(alternatives=[Alternative(segments=[Segment()])]))
    with pytest.raises(ValueError, match="at least one segment"):
        C.RemoveSegment(d, 0, 0)


def test_duplicate_alternative_name_refused(doc):
    doc.push(C.InsertAlternative(doc, 1, doc.project.alternatives[0].model_copy(update={"name": "Other"})))
    with pytest.raises(ValidationError):
        C.SetAlternativeField(doc, 1, "name", "Base")
    assert [a.name for a in doc.project.alternatives] == ["Base", "Other"]


def test_modified_follows_clean_state(doc, qtbot):
    assert not doc.modified
    with qtbot.waitSignal(doc.modified_changed):
        doc.push(C.SetFeedField(doc, 0, "inlet_temperature_K", 340.0))
    assert doc.modified
    doc.undo_stack.undo()
    assert not doc.modified  # back at the saved state
    doc.undo_stack.redo()
    doc.mark_saved()
    assert not doc.modified


def test_result_matches_independent_solve_after_edit(doc, qtbot):
    with qtbot.waitSignal(doc.result_ready, timeout=30000):
        doc.request_solve()
    first = doc.result
    with qtbot.waitSignal(doc.result_ready, timeout=30000):
        doc.push(C.SetSegmentField(doc, 0, 0, "length_m", 60.0))
    reference = solve(doc.current_alternative)  # the solver called directly on the edited model
    assert doc.result.outlet_temperature_K == pytest.approx(reference.outlet_temperature_K, abs=1e-9)
    assert doc.result.profile.x_m[-1] == pytest.approx(80.0)  # 60 + 15 + 5 m
    assert doc.result.outlet_temperature_K != first.outlet_temperature_K


def test_burst_of_edits_ends_with_result_of_last_model(doc, qtbot):
    results = []
    doc.result_ready.connect(results.append)
    for i in range(12):
        doc.push(C.SetSegmentField(doc, 0, 1, "length_m", 10.0 + i))
    qtbot.waitUntil(lambda: bool(results) and not doc.solving, timeout=30000)
    assert len(results) < 12  # debounced and stale results dropped
    assert results[-1].profile.x_m[-1] == pytest.approx(20.0 + 21.0 + 5.0)
    reference = solve(doc.current_alternative)
    assert results[-1].outlet_temperature_K == pytest.approx(reference.outlet_temperature_K, abs=1e-9)


def test_solver_error_emits_solve_failed_and_keeps_result(doc, qtbot):
    with qtbot.waitSignal(doc.result_ready, timeout=30000):
        doc.request_solve()
    good = doc.result
    # a pipe centreline 20 mm deep cannot hold a pipe of 60.3 mm OD (NPS 2, ASME B36.10M) under ground:
    # the model accepts the depth, the solver refuses it and says which field
    from solver.model import Buried

    with qtbot.waitSignal(doc.solve_failed, timeout=30000) as blocker:
        doc.push(C.SetSegmentField(doc, 0, 1, "surroundings", Buried(depth_m=0.02)))
    message = blocker.args[0]
    assert "depth" in message and "0.02 m" in message
    assert doc.result is good and doc.result_is_stale


def test_unit_switch_changes_no_model(doc, qtbot):
    before = doc.project.model_dump()
    with qtbot.waitSignal(doc.units_changed) as blocker:
        doc.set_unit_system("US")
    assert blocker.args == ["US"]
    assert doc.project.model_dump() == before
    with pytest.raises(ValueError):
        doc.set_unit_system("imperial")


def test_selection_and_alternative_switch(doc, qtbot):
    doc.push(C.InsertAlternative(doc, 1, Alternative(name="Short", segments=[Segment(name="only")])))
    doc.select_segment(2)
    with qtbot.waitSignal(doc.current_alternative_changed):
        doc.set_current_alternative(1)
    assert doc.selected_segment == 0  # clamped to the one segment of "Short"
    with qtbot.waitSignal(doc.result_ready, timeout=30000):
        pass
    assert doc.result.name == "Short"
    with qtbot.waitSignal(doc.position_marked) as blocker:
        doc.mark_position(math.nan)
    assert math.isnan(blocker.args[0])


def test_results_arrive_on_the_gui_thread(doc, qtbot):
    from PySide6.QtCore import QThread
    from PySide6.QtWidgets import QApplication

    threads = []
    doc.result_ready.connect(lambda _r: threads.append(QThread.currentThread()))
    with qtbot.waitSignal(doc.result_ready, timeout=30000):
        doc.request_solve()  # first solve of a project: on the worker thread
    qtbot.wait(50)
    with qtbot.waitSignal(doc.result_ready, timeout=30000):
        doc.push(C.SetSegmentField(doc, 0, 2, "length_m", 7.0))  # quick solve: may run inline
    gui = QApplication.instance().thread()
    assert threads and all(t is gui or t == gui for t in threads)


def test_undo_of_an_edit_in_another_alternative_shows_that_alternative(doc, qtbot):
    from app.commands import InsertAlternative

    doc.push(InsertAlternative(doc, 1, doc.project.alternatives[0].model_copy(update={"name": "Other"})))
    doc.set_current_alternative(1)
    before = doc.project.alternatives[1].segments[0].heat_input_W_per_m
    doc.push(C.SetSegmentField(doc, 1, 0, "heater.output_W_per_m", before + 40.0))
    doc.set_current_alternative(0)
    doc.undo_stack.undo()
    assert doc.current_index == 1  # the undone change is on screen, not out of sight
    assert doc.project.alternatives[1].segments[0].heat_input_W_per_m == before
