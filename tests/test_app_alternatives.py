"""Alternatives panel and Side-by-Side view (pytest-qt, offscreen).

The panel's edits go through undoable commands; the Side-by-Side numbers are
checked against values computed here from independent solves (differences by
subtraction, verdicts by comparing with the limit).
"""

from __future__ import annotations

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import Qt  # noqa: E402

from app import comparison, units  # noqa: E402
from app.document import Document  # noqa: E402
from app.panels.alternatives_panel import AlternativesPanel  # noqa: E402
from app.panels.side_by_side import SideBySidePanel  # noqa: E402
from solver import solve  # noqa: E402
from solver.model import Alternative, Layer, Project, Segment, Targets, Wind  # noqa: E402


def _project() -> Project:
    """Invented demo: one water line, three insulation choices."""

    def alt(name, thickness):
        layers = [Layer(thickness_m=thickness, conductivity_W_per_mK=0.04)]
        return Alternative(name=name, segments=[
            Segment(name="Run", length_m=50.0, insulation=layers, surroundings=Wind(temperature_K=268.15)),
            Segment(name="Drop", length_m=6.0, elevation_change_m=-4.0, insulation=layers),
        ])

    return Project(name="Demo line", alternatives=[alt("A 20 mm", 0.02), alt("B 50 mm", 0.05), alt("C 80 mm", 0.08)],
                   baseline="B 50 mm")


@pytest.fixture
def doc(qtbot):
    d = Document(_project())
    yield d
    d.shutdown()


@pytest.fixture
def panel(qtbot, doc):
    p = AlternativesPanel(doc)
    qtbot.addWidget(p)
    return p


def _names(doc):
    return [a.name for a in doc.project.alternatives]


def test_lists_alternatives_and_marks_baseline(panel, doc):
    texts = [panel.list.item(i).text() for i in range(panel.list.count())]
    assert len(texts) == 3
    assert "baseline" in texts[1] and "baseline" not in texts[0]
    assert panel.list.item(1).font().bold()


def test_selecting_switches_current_alternative(panel, doc):
    panel.list.setCurrentRow(2)
    assert doc.current_index == 2
    assert doc.current_alternative.name == "C 80 mm"
    doc.set_current_alternative(0)
    assert panel.list.currentRow() == 0


def test_add_blank_and_undo(panel, doc):
    panel.add_blank()
    assert len(doc.project.alternatives) == 4
    assert doc.current_index == 3 and panel.list.count() == 4
    doc.undo_stack.undo()
    assert _names(doc) == ["A 20 mm", "B 50 mm", "C 80 mm"] and panel.list.count() == 3
    doc.undo_stack.redo()
    assert len(doc.project.alternatives) == 4


def test_duplicate_current(panel, doc):
    doc.set_current_alternative(0)
    panel.duplicate_current()
    assert _names(doc) == ["A 20 mm", "A 20 mm (copy)", "B 50 mm", "C 80 mm"]
    assert doc.project.alternatives[1].segments == doc.project.alternatives[0].segments
    assert doc.current_index == 1
    panel.duplicate_current()  # a copy of the copy gets its own name
    assert "A 20 mm (copy) (copy)" in _names(doc)
    doc.undo_stack.undo()
    doc.undo_stack.undo()
    assert _names(doc) == ["A 20 mm", "B 50 mm", "C 80 mm"]


def test_rename_follows_baseline_and_rejects_duplicates(panel, doc):
    assert panel.rename(1, "B wool 50")
    assert _names(doc)[1] == "B wool 50" and doc.project.baseline == "B wool 50"
    assert not panel.rename(0, "C 80 mm")  # taken
    assert panel.message.isVisibleTo(panel) and "C 80 mm" in panel.message.text()
    assert not panel.rename(0, "   ")
    assert _names(doc)[0] == "A 20 mm"
    doc.undo_stack.undo()
    assert _names(doc)[1] == "B 50 mm" and doc.project.baseline == "B 50 mm"


def test_rename_by_editing_the_item(panel, doc):
    item = panel.list.item(0)
    item.setText("A thin")  # what the inline editor commits
    assert _names(doc)[0] == "A thin"
    assert doc.undo_stack.count() == 1


def test_delete_and_undo(panel, doc):
    doc.set_current_alternative(1)
    panel.delete_current()
    assert _names(doc) == ["A 20 mm", "C 80 mm"]
    assert doc.project.baseline is None  # the baseline went with it: the first is the reference
    doc.undo_stack.undo()
    assert _names(doc) == ["A 20 mm", "B 50 mm", "C 80 mm"] and doc.project.baseline == "B 50 mm"


def test_cannot_delete_last(qtbot):
    d = Document(Project(alternatives=[Alternative(segments=[Segment()])]))
    p = AlternativesPanel(d)
    qtbot.addWidget(p)
    assert not p.delete_button.isEnabled()
    assert not p.delete_current()
    assert len(d.project.alternatives) == 1
    d.shutdown()


def test_reorder_keeps_current(panel, doc):
    doc.set_current_alternative(2)
    panel.move_current(-1)
    assert _names(doc) == ["A 20 mm", "C 80 mm", "B 50 mm"]
    assert doc.current_alternative.name == "C 80 mm" and doc.current_index == 1
    assert panel.list.currentRow() == 1
    panel.move_current(-1)
    assert _names(doc)[0] == "C 80 mm"
    assert not panel.up_button.isEnabled()
    doc.undo_stack.undo()
    doc.undo_stack.undo()
    assert _names(doc) == ["A 20 mm", "B 50 mm", "C 80 mm"]
    assert doc.current_alternative.name == "C 80 mm"


def test_set_baseline_undoable(panel, doc):
    doc.set_current_alternative(2)
    panel.set_baseline_current()
    assert doc.project.baseline == "C 80 mm"
    assert "baseline" in panel.list.item(2).text()
    doc.undo_stack.undo()
    assert doc.project.baseline == "B 50 mm"


# --------------------------------------------------------------------------- Side-by-Side


@pytest.fixture
def sbs(qtbot, doc):
    p = SideBySidePanel(doc)
    qtbot.addWidget(p)
    p.show()  # the panel asks for results only while it is shown
    p.solve_all_now()
    return p


def test_side_by_side_key_figures_against_baseline(sbs, doc):
    t = sbs.figures_table
    assert t.columnCount() == 3
    assert "baseline" in t.horizontalHeaderItem(1).text()
    results = [solve(a) for a in doc.project.alternatives]  # independent solves
    spec = next(s for s in comparison.KEY_FIGURE_SPECS if s.key == "heat_loss_W")
    row = sbs.row_of("heat_loss_W")
    assert t.verticalHeaderItem(row).text() == spec.indented_label()  # the one list's label
    for col in (0, 2):
        diff = results[col].heat_loss_W - results[1].heat_loss_W
        value_line, diff_line = t.item(row, col).text().split("\n")  # the difference on its own line
        assert value_line == units.format_value(results[col].heat_loss_W, "power", "SI")
        assert diff_line == comparison.format_difference(diff, results[1].heat_loss_W, spec, "SI")
    assert "\n" not in t.item(row, 1).text()  # the baseline: no difference line
    # thinner insulation loses more heat (physics sanity: Fourier's law through the layer)
    assert results[0].heat_loss_W > results[1].heat_loss_W > results[2].heat_loss_W


def test_side_by_side_targets_met_or_missed(qtbot, doc):
    results = [solve(a) for a in doc.project.alternatives]
    # an outlet-temperature minimum halfway between A and C: one of them must miss it
    limit = 0.5 * (results[0].outlet_temperature_K + results[2].outlet_temperature_K)
    doc.project.targets = Targets(outlet_temperature_min_K=limit)
    p = SideBySidePanel(doc)
    qtbot.addWidget(p)
    p.solve_all_now()
    t = p.targets_table
    assert t.rowCount() == 2 and t.columnCount() == 3  # the verdict, then the one target
    assert t.verticalHeaderItem(1).text().endswith(units.format_value(limit, "temperature", "SI"))  # ≥ the limit
    assert t.item(1, 0).data(Qt.UserRole) != t.item(1, 2).data(Qt.UserRole)
    for i, r in enumerate(results):
        item = t.item(1, i)
        assert item.data(Qt.UserRole) == (r.outlet_temperature_K >= limit)
        assert item.text().startswith("\u2713 met" if item.data(Qt.UserRole) else "\u2717 missed")
        verdict = comparison.design_verdict(doc.project.targets, r)
        assert t.item(0, i).data(Qt.UserRole) == verdict.level


def test_side_by_side_overlay_and_checks(sbs, doc):
    assert set(sbs._curves) == set(_names(doc))
    sbs.set_overlaid(["A 20 mm"])
    assert set(sbs._curves) == {"A 20 mm"}
    # segment boundaries: drawn once per position (all three share the geometry), in both plots
    assert len(sbs._boundaries) == 2 * (len(doc.project.alternatives[0].segments) - 1)
    names_in_checks = {sbs.checks_table.item(r, 0).text() for r in range(sbs.checks_table.rowCount())}
    assert names_in_checks == set(_names(doc))


def test_side_by_side_follows_edits(qtbot, sbs, doc, panel):
    panel.add_blank()
    sbs.wait_for_results()
    qtbot.waitUntil(lambda: sbs.figures_table.columnCount() == 4, timeout=20000)
    doc.set_unit_system("US")
    assert "°F" in sbs.figures_table.item(sbs.row_of("outlet_temperature_K"), 0).text()
