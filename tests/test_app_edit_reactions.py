"""Views show every edit, wherever it was made, although they now refresh only what changed.

The Segment Card, the Feed and the Alternatives list compare the model with what they show and
fill only what differs; Checks and Key Figures redraw when a result arrives, not at the edit.
What a user would notice if that went wrong: a value edited elsewhere (a command, an undo) not
shown, or a tooltip or verdict left over from before. The reference for each check is the model
value the edit set (what the user typed), read back from the widgets.

The Document solves a lone edit on the GUI thread even when the solve is not quick (it would
fight the repaint on the worker); a burst of edits must still give few solves and end solved.
"""

from __future__ import annotations

import time

import pytest

pytest.importorskip("pytestqt")

import solver  # noqa: E402
from app import commands as C  # noqa: E402
from app.document import Document  # noqa: E402
from app.panels.alternatives_panel import AlternativesPanel  # noqa: E402
from app.panels.checks_panel import ChecksPanel, count_text  # noqa: E402
from app.panels.feed_panel import FeedPanel  # noqa: E402
from app.panels.segment_card import SegmentCard  # noqa: E402
from solver.model import Alternative, Layer, Project, Segment  # noqa: E402

REAL_SOLVE = solver.solve


def make_project() -> Project:
    # invented example: a traced run and an untraced tail, two alternatives
    def alt(name, mm):
        return Alternative(name=name, segments=[
            Segment(name="Run", length_m=40.0, heat_input_W_per_m=15.0,
                    insulation=[Layer(thickness_m=mm / 1000, conductivity_W_per_mK=0.04)]),
            Segment(name="Tail", length_m=8.0),
        ])

    return Project(name="Reactions test line", alternatives=[alt("Thin", 20), alt("Thick", 80)])


@pytest.fixture
def doc(qtbot):
    d = Document(make_project())
    yield d
    d.shutdown()


def test_segment_card_shows_edits_made_elsewhere_and_their_undo(qtbot, doc):
    card = SegmentCard(doc)
    qtbot.addWidget(card)
    doc.select_segment(0)
    # edits made outside the card (as the Line Strip or a script would), one section each
    doc.push(C.SetSegmentFields(doc, 0, 0, {"pipe.nps": "3", "pipe.schedule": "80"}))
    doc.push(C.SetSegmentField(doc, 0, 0, "heater.output_W_per_m", 42.0))
    doc.push(C.SetSegmentField(doc, 0, 0, "insulation", [Layer(thickness_m=0.065, conductivity_W_per_mK=0.04)]))
    assert (card.nps_combo.currentText(), card.schedule_combo.currentText()) == ("3", "80")
    assert card.heater.edits["constant.output_W_per_m"].text() == "42"
    assert card.layer_table.cellWidget(0, 1).text() == "65"  # mm in SI
    # an edit of the other segment leaves the card's segment as shown
    doc.push(C.SetSegmentField(doc, 0, 1, "length_m", 9.5))
    assert card.heater.edits["constant.output_W_per_m"].text() == "42"
    for _ in range(4):
        doc.undo_stack.undo()
    first = make_project().alternatives[0].segments[0]  # as the project was made
    assert card.layer_table.cellWidget(0, 1).text() == "20"
    assert card.heater.edits["constant.output_W_per_m"].text() == "15"
    assert (card.nps_combo.currentText(), card.schedule_combo.currentText()) == (first.pipe.nps, first.pipe.schedule)


def test_segment_card_edit_typed_in_the_card_then_undone(qtbot, doc):
    card = SegmentCard(doc)
    qtbot.addWidget(card)
    doc.select_segment(1)
    card.length_edit.setText("12.5")
    card.length_edit.commit()
    assert doc.current_alternative.segments[1].length_m == pytest.approx(12.5)
    assert card.length_edit.text() == "12.5"
    doc.undo_stack.undo()
    assert card.length_edit.text() == "8"  # the model's value again (8 m in the project above)
    # a refused entry is said in the box and stays there through an edit elsewhere
    card.length_edit.setText("-3")
    card.length_edit.commit()
    assert card.length_edit.has_error
    doc.push(C.SetSegmentField(doc, 0, 0, "heater.output_W_per_m", 20.0))
    assert card.length_edit.text() == "-3" and card.length_edit.has_error


def test_feed_shows_an_edit_made_elsewhere_and_its_undo(qtbot, doc):
    feed = FeedPanel(doc)
    qtbot.addWidget(feed)
    doc.push(C.SetAlternativeField(doc, 0, "feed.inlet_temperature_K", 353.15))  # 80 °C
    assert feed.temp_edit.text() == "80"
    doc.push(C.SetSegmentField(doc, 0, 0, "length_m", 41.0))  # a segment edit: the feed stays
    assert feed.temp_edit.text() == "80"
    doc.undo_stack.undo()
    doc.undo_stack.undo()
    assert float(feed.temp_edit.text()) == pytest.approx(make_project().alternatives[0].feed.inlet_temperature_K - 273.15,
                                                         abs=0.05)


def test_alternatives_row_follows_an_edit_and_its_result(qtbot, doc):
    panel = AlternativesPanel(doc)
    qtbot.addWidget(panel)
    doc.solve_now()
    item = panel.list.item(0)
    assert "48 m" in item.toolTip()  # 40 m + 8 m
    assert item.data(0x0100 + 2) != ""  # a verdict mark once solved
    doc.push(C.SetSegmentField(doc, 0, 1, "length_m", 10.0))
    assert "50 m" in panel.list.item(0).toolTip()
    assert "48 m" in panel.list.item(1).toolTip()  # the other alternative is untouched
    doc.push(C.RenameAlternative(doc, 1, "Thick wool"))
    assert panel.list.item(1).data(0x0100) == "Thick wool"


def test_checks_show_the_findings_of_the_edited_line_once_solved(qtbot, doc):
    panel = ChecksPanel(doc)
    qtbot.addWidget(panel)
    doc.solve_now()
    # no tracing on a long untraced tail: the checks list must change with the result
    doc.push(C.SetSegmentField(doc, 0, 0, "heater", None))
    doc.solve_now()
    assert panel.tree.topLevelItemCount() > 0
    assert panel.header.toolTip() == count_text(doc.result.check_counts())


class SlowSolve:
    """``solver.solve`` that burns ``cpu_s`` of CPU first, as a long line does; counts calls."""

    def __init__(self, cpu_s: float):
        self.cpu_s = cpu_s
        self.calls = 0

    def __call__(self, alternative, **options):
        self.calls += 1
        end = time.thread_time() + self.cpu_s
        while time.thread_time() < end:
            pass
        return REAL_SOLVE(alternative, **options)


def test_a_lone_edit_on_a_slow_line_is_solved_before_the_repaint(qtbot, doc, monkeypatch):
    from PySide6.QtCore import QThread
    from PySide6.QtWidgets import QApplication

    slow = SlowSolve(0.06)  # above the old 35 ms limit, below SYNC_SOLVE_LIMIT_S (0.1 s)
    monkeypatch.setattr(solver, "solve", slow)
    with qtbot.waitSignal(doc.result_ready, timeout=30000):
        doc.request_solve()  # first solve of a project: on the worker thread
    qtbot.wait(100)
    threads = []
    doc.result_ready.connect(lambda _r: threads.append(QThread.currentThread()))
    doc.push(C.SetSegmentField(doc, 0, 1, "length_m", 11.0))
    QApplication.processEvents()  # one pass: the posted solve runs ahead of the repaint
    assert threads and threads[0] == QApplication.instance().thread()
    assert doc.result.segments[1].x_end_m - doc.result.segments[1].x_start_m == pytest.approx(11.0)


def test_a_burst_of_edits_on_a_slow_line_gives_few_solves_and_ends_solved(qtbot, doc, monkeypatch):
    from PySide6.QtWidgets import QApplication

    slow = SlowSolve(0.06)
    monkeypatch.setattr(solver, "solve", slow)
    with qtbot.waitSignal(doc.result_ready, timeout=30000):
        doc.request_solve()
    qtbot.wait(100)
    slow.calls = 0
    for i in range(10):  # each edit as soon as the GUI thread is free, as queued key presses are
        doc.push(C.SetSegmentField(doc, 0, 1, "length_m", 9.0 + 0.5 * i))
        QApplication.processEvents()
    qtbot.waitUntil(lambda: not doc.solving, timeout=30000)
    assert slow.calls <= 3  # the first edit's solve and the burst's last (one spare for timing)
    span = doc.result.segments[1]
    assert span.x_end_m - span.x_start_m == pytest.approx(13.5)


def test_key_figures_redraw_the_same_result_in_new_units_and_after_an_undo(qtbot, doc):
    from app.panels.key_figures import KeyFiguresPanel

    panel = KeyFiguresPanel(doc)
    qtbot.addWidget(panel)
    first = doc.solve_now()
    si = panel.value_text("outlet_temperature_K")
    doc.set_unit_system("US")  # the same Result object, shown again in °F
    t_f = (first.outlet_temperature_K - 273.15) * 9 / 5 + 32  # definition of the Fahrenheit scale
    assert panel.value_text("outlet_temperature_K").endswith("°F")
    assert float(panel.value_text("outlet_temperature_K").split()[0]) == pytest.approx(t_f, abs=0.15)
    doc.set_unit_system("SI")
    doc.push(C.SetSegmentField(doc, 0, 0, "heater.output_W_per_m", 60.0))
    doc.solve_now()
    assert panel.value_text("outlet_temperature_K") != si  # four times the tracing: a warmer outlet
    doc.undo_stack.undo()
    doc.solve_now()  # the held result comes back (the same object as before)
    assert doc.result is first
    assert panel.value_text("outlet_temperature_K") == si
