"""Key Figures never draws its parts over each other, however low its dock.

With a Target Finder or Sweep open above (a tab beside the Line Strip, ~400 px high) the Key Figures dock of a
1600 × 1000 window is about 340 px high: less than the verdict, the note, the design cases (a table that never
scrolls, the "does not hold" line, the hot-case caution) and the figures' table need. Those parts once kept
their heights in slots too small for them, and the design-case rows ("Heater output", "Power failure") were
drawn under the orange caution. Now the part under the verdict scrolls as one.
"""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pytest  # noqa: E402
from PySide6.QtCore import QRect  # noqa: E402
from PySide6.QtGui import QFontMetrics  # noqa: E402
from PySide6.QtWidgets import QLabel, QWidget  # noqa: E402

from app.main_window import MainWindow, load_demo_project  # noqa: E402


def _parts(panel) -> list[QWidget]:
    """The parts stacked in the panel, top to bottom (the design block's own parts instead of the block)."""
    design = panel.design
    design_parts = [design.layout().itemAt(i).widget() for i in range(design.layout().count())]
    return [panel.verdict, panel.note, *design_parts, panel.table]


def _rect(widget: QWidget, panel: QWidget) -> QRect:
    return QRect(widget.mapTo(panel, widget.rect().topLeft()), widget.size())


def _overlaps(panel) -> list[str]:
    """Every pair of visible parts whose rectangles (in the panel's coordinates) intersect, and every wrapped
    label given less height than its text needs at its width (its last lines cut off or drawn over the next)."""
    shown = [w for w in _parts(panel) if w.isVisible() and w.height() > 0]
    found = []
    for i, a in enumerate(shown):
        for b in shown[i + 1:]:
            ra, rb = _rect(a, panel), _rect(b, panel)
            if ra.intersects(rb):
                name = lambda w: (w.text()[:30] if isinstance(w, QLabel) else type(w).__name__)  # noqa: E731
                found.append(f"{name(a)!r} {ra.getRect()} overlaps {name(b)!r} {rb.getRect()}")
        if isinstance(a, QLabel) and a.wordWrap() and a.text():
            need = a.heightForWidth(a.width())
            if a.height() < need:
                found.append(f"{a.text()[:30]!r} is {a.height()} px high, its text needs {need} px")
    return found


@pytest.fixture
def window(qtbot):
    win = MainWindow(interactive=False, remember=False)
    qtbot.addWidget(win)
    with qtbot.waitSignal(win.doc.result_ready, timeout=30000):
        win.doc.set_project(load_demo_project())
    # "Trace 15 W/m, 80 mm wool" (invented demo data): the worst case does not hold at 3 segments, so the
    # design block shows its table, the "does not hold" line and the hot-case caution together
    with qtbot.waitSignal(win.doc.result_ready, timeout=30000):
        win.doc.set_current_alternative(1)
    yield win
    win.doc.shutdown()


def _settle(qtbot, win) -> None:
    qtbot.wait(300)  # the docks' queued resizes and the tables' row fitting (timers of 0 ms)
    win.doc.solve_now()
    qtbot.wait(300)


@pytest.mark.parametrize("tool", ["finder_dock", "sweep_dock"])
def test_design_cases_not_drawn_over_each_other_with_a_tool_open(qtbot, window, tool):
    window.resize(1600, 1000)
    window.show()
    window.show_tool(getattr(window, tool))
    _settle(qtbot, window)
    panel = window.key_figures
    assert window.key_dock.isVisible() and panel.design.isVisible()
    assert panel.design.where.isVisible() and panel.design.caution.isVisible()
    assert panel.height() < 450, "the tool should leave the Key Figures low here (what this test is about)"
    assert _overlaps(panel) == []
    # the design table keeps every row: its height is its rows' (it never scrolls), whatever the dock's
    table = panel.design.table
    rows = sum(table.rowHeight(i) for i in range(table.rowCount()))
    assert table.height() >= rows + table.horizontalHeader().height()
    # and the rest can be scrolled to: the figures' table keeps a usable height below them
    assert panel.table.height() >= 120
    bar = panel.scroll_area.verticalScrollBar()
    assert bar.maximum() > 0, "lower than its parts need: the part under the verdict scrolls"


@pytest.mark.parametrize("height", [1056, 900, 700])
def test_no_overlap_at_other_heights_and_no_scroll_when_it_fits(qtbot, window, height):
    window.resize(1600, height)
    window.show()
    _settle(qtbot, window)
    panel = window.key_figures
    assert _overlaps(panel) == []
    if height >= 1056:  # the normal screen: the figures' table fills the dock, nothing scrolls
        assert panel.scroll_area.verticalScrollBar().maximum() == 0


@pytest.mark.parametrize("tool", ["finder_dock", "sweep_dock"])
def test_profile_axis_titles_never_run_into_each_other(qtbot, window, tool):
    """With a tool open the Profiles' two plots are short: a title longer than its plot once ran into the
    other plot's ("p [bar(a)]" drawn into "T [°C]"). A title is shown only where it fits its plot."""
    window.resize(1600, 1000)
    window.show()
    window.show_tool(getattr(window, tool))
    _settle(qtbot, window)
    profiles = window.profiles
    shown = []
    for plot in (profiles.temperature_plot, profiles.pressure_plot):
        axis = plot.getAxis("left")
        if axis.label.isVisible():
            shown.append(axis.label.mapRectToScene(axis.label.boundingRect()))
            # the rule: a title is shown only where its text fits along its own plot
            width = QFontMetrics(profiles.font()).horizontalAdvance(axis.labelText)
            assert width + 6 <= plot.vb.height(), axis.labelText
    if len(shown) == 2:
        assert not shown[0].intersects(shown[1]), "the two axis titles run into each other"
