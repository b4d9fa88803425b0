"""Side-by-Side read as a user reads it: five or six alternatives with long names in the main window.

The references are the text itself and the solver: a column must be at least as wide as its
header's lines and its values measured with the font they are drawn in (QFontMetrics), the names
must be shown in full, the verdict must agree with ``comparison.design_verdict`` (which counts the
checks), checks must follow the solver's one severity order, and showing the view must not solve
anything the Document already holds (solver calls counted by wrapping ``solver.solve``).
"""

from __future__ import annotations

from pathlib import Path

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import Qt, QThreadPool  # noqa: E402
from PySide6.QtGui import QColor, QFont, QFontMetrics  # noqa: E402

import solver  # noqa: E402
from app import comparison, style  # noqa: E402
from app.main_window import MainWindow  # noqa: E402
from solver.model import ConstantHeater  # noqa: E402
from solver.project_io import load_project  # noqa: E402
from solver.results import SEVERITY_ORDER, check_sort_key  # noqa: E402

SAMPLE = Path(__file__).resolve().parent.parent / "sample_projects" / "traced_residue_line.json"
ICON_AND_GAP = 26 + 6  # the line sample drawn before a header's text


def long_named_project(n: int):
    """The sample residue line (invented demo data) as ``n`` alternatives with long, similar names."""
    base = load_project(SAMPLE)
    template = base.alternatives[0]

    def variant(name, tracing, mm, material):
        segs = [s.model_copy(update={"heater": ConstantHeater(output_W_per_m=tracing),
                                     "pipe": s.pipe.model_copy(update={"material": material}),
                                     "insulation": [s.insulation[0].model_copy(update={"thickness_m": mm / 1000})]})
                for s in template.segments]
        return template.model_copy(update={"name": name, "segments": segs})

    alts = [
        variant("Trace 25 W/m, 50 mm mineral wool, carbon steel", 25, 50, "carbon steel"),
        variant("Trace 15 W/m, 80 mm mineral wool, carbon steel", 15, 80, "carbon steel"),
        variant("No tracing, 80 mm mineral wool, carbon steel", 0, 80, "carbon steel"),
        variant("Trace 25 W/m, 50 mm mineral wool, stainless", 25, 50, "stainless steel"),
        variant("Trace 20 W/m, 65 mm mineral wool, stainless", 20, 65, "stainless steel"),
        variant("Trace 10 W/m, 100 mm mineral wool, carbon steel", 10, 100, "carbon steel"),
    ][:n]
    return base.model_copy(update={"alternatives": alts, "baseline": alts[0].name})



def comparing_window(qtbot, n: int, size: tuple[int, int]) -> MainWindow:
    win = MainWindow(interactive=False)
    qtbot.addWidget(win)
    win.doc.set_project(long_named_project(n))
    win.resize(*size)
    win.show()
    win.centre_tabs.setCurrentWidget(win.side_by_side)
    sbs = win.side_by_side
    qtbot.waitUntil(lambda: len(sbs.outcomes()) == n and not win.doc.background_solving, timeout=60000)
    qtbot.waitUntil(lambda: sbs.figures_table.columnCount() == n, timeout=10000)
    qtbot.wait(100)  # the last resize and redraw
    return win


def header_width_needed(table, column: int) -> int:
    """Width the header text needs, measured with the header's font (bold for the baseline)."""
    item = table.horizontalHeaderItem(column)
    font = QFont(table.horizontalHeader().font())
    font.setBold(item.font().bold())
    fm = QFontMetrics(font)
    return max(fm.horizontalAdvance(line) for line in item.text().split("\n")) + ICON_AND_GAP


def cell_width_needed(table, row: int, column: int) -> int:
    fm = QFontMetrics(table.font())
    return max(fm.horizontalAdvance(line) for line in table.item(row, column).text().split("\n"))


@pytest.mark.parametrize("n, size", [(5, (1600, 1000)), (6, (1600, 1000)), (6, (1280, 800))])
def test_columns_are_as_wide_as_their_text_and_names_are_whole(qtbot, n, size):
    win = comparing_window(qtbot, n, size)
    sbs = win.side_by_side
    t = sbs.figures_table
    names = [a.name for a in win.doc.project.alternatives]
    for c in range(n):
        header = t.horizontalHeaderItem(c).text()
        assert names[c] in header.replace("\n", " ")  # the full name, never cut
        assert header.count("\n") <= 2  # at most three lines
        width = t.columnWidth(c)
        assert width >= header_width_needed(t, c), (names[c], width)
        for r in range(t.rowCount()):
            assert width >= cell_width_needed(t, r, c), (t.verticalHeaderItem(r).text(), names[c])
        assert width >= 120  # never the 35-60 px columns of the old layout
    if (n, size) == (5, (1600, 1000)):
        # all five columns in view at once: no sideways scrolling at 1600×1000
        assert sum(t.columnWidth(c) for c in range(n)) <= t.viewport().width()
        assert not t.horizontalScrollBar().isVisible()
    # values and their differences from the baseline on separate lines, never wrapped inside a line
    row = sbs.row_of("outlet_temperature_K")
    assert t.item(row, 1).text().count("\n") == 1
    assert "\n" not in t.item(row, 0).text()  # the baseline has no difference line
    win.doc.shutdown()


def test_the_chooser_is_a_compact_key_above_the_plots(qtbot):
    win = comparing_window(qtbot, 6, (1280, 800))
    sbs = win.side_by_side
    # the plots get the width; the chooser sits above them in a few short rows
    assert sbs.temperature_plot.width() + sbs.pressure_plot.width() >= 0.9 * sbs.width()
    assert sbs.chooser.height() <= 0.15 * sbs.height()
    boxes = sbs.chooser.boxes
    assert len(boxes) == 6
    for box, alt in zip(boxes, win.doc.project.alternatives):
        assert alt.name in box.text()
        assert box.fontMetrics().horizontalAdvance(box.text()) <= box.width()  # not cut
    boxes[2].setChecked(False)  # hide "No tracing"
    assert set(sbs._curves) == {a.name for a in win.doc.project.alternatives} - {"No tracing, 80 mm mineral wool, carbon steel"}
    # the editing panels make room while comparing and come back with the Profiles
    assert win.feed_dock.isHidden() and win.key_dock.isHidden()
    win.centre_tabs.setCurrentWidget(win.profiles)
    assert not win.feed_dock.isHidden() and not win.key_dock.isHidden() and not win.checks_dock.isHidden()
    win.doc.shutdown()


def test_a_design_with_a_warning_is_never_shown_as_simply_met(qtbot):
    win = comparing_window(qtbot, 3, (1600, 1000))
    sbs = win.side_by_side
    results = [win.doc.result_for(i) for i in range(3)]
    levels = []
    for table, row in ((sbs.figures_table, 0), (sbs.targets_table, 0)):
        for c, r in enumerate(results):
            verdict = comparison.design_verdict(win.doc.project.targets, r)
            item = table.item(row, c)
            assert item.data(Qt.UserRole) == verdict.level
            assert item.foreground().color() == QColor(style.VERDICT_COLOURS[verdict.level])
            if verdict.warning:
                assert f"{verdict.warning} warning" in item.text()
            if verdict.danger:
                assert f"{verdict.danger} danger" in item.text()
            if verdict.level != "met":
                assert not item.text().startswith(style.VERDICT_SYMBOLS["met"])
            levels.append(verdict.level)
    # the sample line: all targets met by the traced designs, yet the flow-stopped cases warn or freeze
    assert "warning" in levels and "danger" in levels
    win.doc.shutdown()


def test_checks_follow_the_one_severity_order(qtbot):
    win = comparing_window(qtbot, 3, (1600, 1000))
    t = win.side_by_side.checks_table
    rows = [(t.item(r, 0).text(), t.item(r, 1).text().lower()) for r in range(t.rowCount())]
    for name in {n for n, _ in rows}:
        ranks = [SEVERITY_ORDER[s] for n, s in rows if n == name and s in SEVERITY_ORDER]
        assert ranks == sorted(ranks, reverse=True), name  # worst first
        r = win.doc.result_for(name)
        expected = [c.severity for c in sorted(r.checks, key=check_sort_key)]
        assert [s for n, s in rows if n == name] == expected
    win.doc.shutdown()


def test_showing_the_side_by_side_solves_nothing_the_document_holds(qtbot, monkeypatch):
    calls = []
    real = solver.solve

    def counting(alternative, **options):
        calls.append(alternative.name)
        return real(alternative, **options)

    monkeypatch.setattr(solver, "solve", counting)
    win = MainWindow(interactive=False)
    qtbot.addWidget(win)
    win.doc.set_project(long_named_project(4))
    win.resize(1600, 1000)
    win.show()
    win.doc.results_now()  # e.g. solved earlier for a report
    assert sorted(calls) == sorted(a.name for a in win.doc.project.alternatives)
    win.centre_tabs.setCurrentWidget(win.side_by_side)
    sbs = win.side_by_side
    qtbot.waitUntil(lambda: sbs.figures_table.columnCount() == 4, timeout=10000)
    qtbot.wait(150)
    assert len(calls) == 4  # nothing solved again
    assert sbs.findChildren(QThreadPool) == []  # no thread pool of its own: the Document's runner only
    win.doc.shutdown()
