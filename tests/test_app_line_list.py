"""The Line List view (File ▸ Open Line List…): a batch run's results list as a table that sorts numbers
as numbers, filters by words and verdict, and opens a line's project file in the window through the
normal open path (Save writes back to that file); a line that was not designed says why.

The results folder is written here the way a batch run writes it: results.csv from
:func:`app.line_batch.results_csv_text` over :class:`solver.line_design.LineResult` rows, and
``lines/<safe tag>.json`` project files. The figures are invented (a fictional plant, Fernbrook Works);
what is checked is order, filtering and files, against orders worked out by hand in the comments.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import Qt  # noqa: E402

from app import commands as C  # noqa: E402
from app.line_batch import LINES_FOLDER, results_csv_text, safe_tag  # noqa: E402
from app.main_window import MainWindow  # noqa: E402
from app.panels.line_list_view import LineListError, LineListView, read_results  # noqa: E402
from solver.line_design import LineResult  # noqa: E402
from solver.model import Alternative, Layer, Project, Segment  # noqa: E402
from solver.project_io import load_project, save_project  # noqa: E402


def _project(tag: str) -> Project:
    # invented: one traced, insulated run named by its tag
    seg = Segment(name="Run", length_m=25.0, heat_input_W_per_m=15.0,
                  insulation=[Layer(thickness_m=0.04, conductivity_W_per_mK=0.04)])
    return Project(name=f"Line {tag}", alternatives=[Alternative(name=tag, segments=[seg])])


#: (tag, verdict, heat loss per metre [W/m], message). Heat losses chosen so that text order and number
#: order differ: as text "100" < "20" < "9.5"; as numbers 9.5 < 20 < 100.
LINES = [
    ("FW-2-RS-1001", "ok", 9.5, ""),
    ("FW-2-RS-1002", "fails", 100.0, "In the worst case the bulk falls to 1.0 °C, below the maintain temperature 5.0 °C."),
    ("FW-3-CW-1003", "warning", 20.0, "The outer surface reaches 62 °C: personnel protection (common practice)."),
    ("FW-BAD-9", "error", math.nan, "row 5, column 'length [m]': '-3' — the length must be more than 0 m"),
]


@pytest.fixture
def run_folder(tmp_path) -> Path:
    out = tmp_path / "run"
    (out / LINES_FOLDER).mkdir(parents=True)
    results = []
    for i, (tag, verdict, q, message) in enumerate(LINES):
        results.append(LineResult(tag=tag, row=i + 2, verdict=verdict, message=message, heat_loss_W_per_m=q,
                                  length_m=25.0 if verdict != "error" else math.nan))
        if verdict != "error":  # a line that was not designed has no project file
            save_project(_project(tag), out / LINES_FOLDER / (safe_tag(tag) + ".json"))
    (out / "results.csv").write_text(results_csv_text(results, "SI"), encoding="utf-8-sig")
    return out


def _heat_loss_column(view: LineListView) -> int:
    return next(i for i, h in enumerate(view.data_.header) if h.startswith("heat loss ["))


def test_reads_a_folder_or_its_csv_and_refuses_others(run_folder, tmp_path):
    a, b = read_results(run_folder), read_results(run_folder / "results.csv")
    assert [r[a.tag_column] for r in a.rows] == [t for t, *_ in LINES] == [r[b.tag_column] for r in b.rows]
    with pytest.raises(LineListError, match="holds no results.csv"):
        read_results(tmp_path)
    bad = tmp_path / "other.csv"
    bad.write_text("name,length\nA,3\n", encoding="utf-8")
    with pytest.raises(LineListError, match="no 'tag' column"):
        read_results(bad)


def test_sorts_numbers_as_numbers_blank_last_and_verdicts_best_first(qtbot, run_folder):
    view = LineListView()
    qtbot.addWidget(view)
    view.load(run_folder)
    assert view.shown_tags() == [t for t, *_ in LINES]  # list order until a header is clicked
    col = _heat_loss_column(view)
    view.table.sortByColumn(col, Qt.AscendingOrder)
    # 9.5 < 20 < 100 as numbers (as text it would be "100" < "20" < "9.5"); the blank (not designed) last
    assert view.shown_tags() == ["FW-2-RS-1001", "FW-3-CW-1003", "FW-2-RS-1002", "FW-BAD-9"]
    view.table.sortByColumn(col, Qt.DescendingOrder)
    assert view.shown_tags() == ["FW-2-RS-1002", "FW-3-CW-1003", "FW-2-RS-1001", "FW-BAD-9"]
    view.table.sortByColumn(view.data_.verdict_column, Qt.AscendingOrder)
    # verdicts in their own order (ok, warning, fails, error), not alphabetically
    assert view.shown_tags() == ["FW-2-RS-1001", "FW-3-CW-1003", "FW-2-RS-1002", "FW-BAD-9"]
    # the verdict reads as a word with a mark (icon) and a colour
    index = view.proxy.index(3, view.data_.verdict_column)
    assert index.data() == "Not designed"
    assert index.data(Qt.DecorationRole) is not None and index.data(Qt.ForegroundRole) is not None


def test_filter_box_and_verdict_filter(qtbot, run_folder):
    view = LineListView()
    qtbot.addWidget(view)
    view.load(run_folder)
    view.set_filter("rs-1002")  # a tag, case ignored
    assert view.shown_tags() == ["FW-2-RS-1002"]
    view.set_filter("personnel protection")  # words of a message
    assert view.shown_tags() == ["FW-3-CW-1003"]
    view.set_filter("not designed")  # the verdict's word
    assert view.shown_tags() == ["FW-BAD-9"]
    view.set_filter("")
    view.set_verdict_filter("Fails or not designed")
    assert view.shown_tags() == ["FW-2-RS-1002", "FW-BAD-9"]
    assert view.shown_label.text() == "2 of 4 shown"
    view.set_filter("FW-2")
    assert view.shown_tags() == ["FW-2-RS-1002"]
    with pytest.raises(ValueError, match="verdict filter"):
        view.set_verdict_filter("Bogus")


@pytest.fixture
def win(qtbot):
    w = MainWindow(interactive=False)
    qtbot.addWidget(w)
    w.show()
    yield w
    w.doc.shutdown()


def _double_click(qtbot, view: LineListView, tag: str) -> None:
    row = view.shown_tags().index(tag)
    table = view.table
    table.scrollTo(view.proxy.index(row, 0))
    rect = table.visualRect(view.proxy.index(row, 0))
    qtbot.mouseClick(table.viewport(), Qt.LeftButton, pos=rect.center())
    qtbot.mouseDClick(table.viewport(), Qt.LeftButton, pos=rect.center())


def test_double_click_opens_the_line_and_save_writes_back(qtbot, win, run_folder):
    assert win.open_line_list(run_folder)
    assert win.line_list_dock.isVisible()
    assert "Open Line List…" in [a.text().replace("&", "") for a in win.menuBar().actions()[0].menu().actions()]
    path = run_folder / LINES_FOLDER / "FW-3-CW-1003.json"
    with qtbot.waitSignal(win.doc.project_replaced, timeout=10000):
        _double_click(qtbot, win.line_list, "FW-3-CW-1003")
    assert win.doc.path == path
    assert win.doc.project.name == "Line FW-3-CW-1003"
    # an edit, then Save: written back to the line's own file
    win.doc.push(C.SetProjectField(win.doc, "revision", "B"))
    assert win.doc.modified
    assert win.save()
    assert load_project(path).revision == "B"
    assert not win.doc.modified


def test_open_line_goes_through_the_unsaved_changes_prompt(qtbot, win, run_folder):
    win.open_line_list(run_folder)
    win.doc.push(C.SetProjectField(win.doc, "revision", "unsaved"))
    asked = []
    win.ask_save_changes = lambda: asked.append(True) or "cancel"
    _double_click(qtbot, win.line_list, "FW-2-RS-1001")
    assert asked == [True]
    assert win.doc.project.revision == "unsaved" and win.doc.path is None  # cancelled: nothing replaced


def test_error_row_shows_its_message_and_opens_nothing(qtbot, win, run_folder):
    win.open_line_list(run_folder)
    before = win.doc.project
    with qtbot.waitSignal(win.line_list.status, timeout=5000) as blocker:
        _double_click(qtbot, win.line_list, "FW-BAD-9")
    assert "was not designed" in blocker.args[0] and "'-3'" in blocker.args[0]
    assert "the length must be more than 0 m" in win.line_list.detail.text()
    assert win.doc.project is before and win.doc.path is None
    # a designed line whose file has gone says so too
    (run_folder / LINES_FOLDER / "FW-2-RS-1001.json").unlink()
    assert not win.line_list.open_index(win.line_list.proxy.index(0, 0))
    assert "is not there" in win.line_list.detail.text()


def test_unreadable_list_says_why_and_keeps_the_view(win, tmp_path, run_folder):
    assert win.open_line_list(run_folder)
    assert not win.open_line_list(tmp_path / "nothing-here")
    title, text = win.messages[-1]
    assert title == "Cannot open line list" and "nothing-here" in text
    assert len(win.line_list.shown_tags()) == len(LINES)
