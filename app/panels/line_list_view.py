"""Line List: a batch run's results as a table, one row per line, to sort, filter and drill into.

File ▸ Open Line List… picks a results folder (``calorun batch … -o OUT``) or its ``results.csv``.
The table shows the results list as written (its columns and units, as in the CSV), numbers in the
one number format and sorted as numbers, the verdict with its mark and colour (:mod:`app.style`,
through :func:`app.reporting.portfolio.verdict_label`; colour is never the only cue). A filter box
matches tag, service, verdict and message; a verdict filter narrows to one verdict.

Double-click (or Enter, or "Open line") asks the window to open the line's project file
``OUT/lines/<safe tag>.json`` (:func:`app.line_batch.safe_tag`) through its normal open path
(:attr:`LineListView.open_requested`), so the unsaved-changes prompt, Recent files and Save (back
to that same file) all work as for any project. A line that could not be designed has no project
file: its message is shown instead.
"""

from __future__ import annotations

import csv
import math
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Optional

from PySide6.QtCore import QAbstractTableModel, QModelIndex, QSortFilterProxyModel, Qt, Signal
from PySide6.QtGui import QAction, QFont, QKeySequence
from PySide6.QtWidgets import (
    QAbstractItemView,
    QComboBox,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QLineEdit,
    QPushButton,
    QTableView,
    QVBoxLayout,
    QWidget,
)

from app import style, units
from app.messages import plural
from app.reporting.portfolio import LINE_VERDICTS, verdict_colour, verdict_level
from app.style import INK_MUTED
from solver.results import CHECK_TITLES

RESULTS_CSV = "results.csv"
LINES_FOLDER = "lines"
PROJECT_SUFFIX = ".json"
#: Sort role: a key that orders numbers as numbers, blanks last, verdicts best first.
SORT_ROLE = Qt.UserRole + 1
#: Verdict filter entries: (label, verdicts shown; empty = all).
VERDICT_FILTERS: tuple[tuple[str, tuple[str, ...]], ...] = (
    ("All verdicts", ()),
    ("OK", ("ok",)),
    ("Warning", ("warning",)),
    ("Fails", ("fails",)),
    ("Not designed", ("error",)),
    ("Fails or not designed", ("fails", "error")),
    ("Anything but OK", ("warning", "fails", "error")),
)
_WORDS = {"ok": "OK", "warning": "Warning", "fails": "Fails", "error": "Not designed"}
#: The icon of each verdict (app.style's severity marks: shape + colour).
_ICONS = {"met": "ok", "warning": "warning", "missed": "danger", "danger": "danger"}
_INTEGER = re.compile(r"^\s*[-+]?\d+\s*$")
_INFINITE_WORDS = {"inf", "infinity", "indefinitely", "holds", "never"}


class LineListError(ValueError):
    """A results list that cannot be shown; the message names the file and why."""


def safe_tag(tag: str) -> str:
    """The file-name stem of a line's files, as the batch run names them (app.line_batch.safe_tag)."""
    from app.line_batch import safe_tag as batch_safe_tag

    return batch_safe_tag(tag)


@dataclass
class LineListData:
    """A results list read from disk: the folder of the run, its CSV, the header and the rows (text)."""

    folder: Path
    csv_path: Path
    header: list[str]
    rows: list[list[str]]
    tag_column: int
    verdict_column: Optional[int]
    message_column: Optional[int]
    worst_check_column: Optional[int] = None
    search_columns: list[int] = field(default_factory=list)

    def project_path(self, row: int) -> Path:
        return self.folder / LINES_FOLDER / (safe_tag(self.rows[row][self.tag_column]) + PROJECT_SUFFIX)

    def verdict(self, row: int) -> str:
        return self.rows[row][self.verdict_column].strip().lower() if self.verdict_column is not None else ""

    def message(self, row: int) -> str:
        return self.rows[row][self.message_column].strip() if self.message_column is not None else ""


def _column(header: list[str], *names: str) -> Optional[int]:
    """The first column whose name (before any "[unit]") is one of ``names``, case and spaces ignored."""
    keys = [h.split("[")[0].strip().lower() for h in header]
    for name in names:
        if name in keys:
            return keys.index(name)
    return None


def read_results(path) -> LineListData:
    """The results list of a batch run: ``path`` is the run's folder (holding results.csv) or the CSV itself."""
    p = Path(path)
    csv_path = p / RESULTS_CSV if p.is_dir() else p
    if not csv_path.is_file():
        where = f"{p} holds no {RESULTS_CSV}" if p.is_dir() else f"{p} is not a file"
        raise LineListError(f"{where}: pick the folder a batch run wrote (calorun batch … -o FOLDER) or its "
                            f"{RESULTS_CSV}")
    try:
        with open(csv_path, newline="", encoding="utf-8-sig") as fh:
            table = list(csv.reader(fh))
    except (OSError, UnicodeDecodeError, csv.Error) as exc:
        raise LineListError(f"{csv_path} could not be read: {getattr(exc, 'strerror', None) or exc}") from None
    if not table or not any(c.strip() for c in table[0]):
        raise LineListError(f"{csv_path} is empty: no header row")
    header = [h.strip() for h in table[0]]
    tag = _column(header, "tag")
    if tag is None:
        raise LineListError(f"{csv_path} has no 'tag' column: is it a Calorun results list? "
                            f"(its columns: {', '.join(header[:8])}{'…' if len(header) > 8 else ''})")
    width = len(header)
    rows = [(r + [""] * width)[:width] for r in table[1:] if any(c.strip() for c in r)]
    verdict = _column(header, "verdict")
    message = _column(header, "message")
    search = [c for c in (tag, _column(header, "service"), verdict, message, _column(header, "worst check"))
              if c is not None]
    return LineListData(csv_path.parent, csv_path, header, rows, tag, verdict, message, _column(header, "worst check"),
                        search)


def _check_title(code: str) -> str:
    """A check's code in plain words (solver.results.CHECK_TITLES), as the Checks list names it."""
    code = code.strip()
    title = CHECK_TITLES.get(code, code.replace("_", " ").lower())
    return title[:1].upper() + title[1:]


def _number(text: str) -> Optional[float]:
    t = text.strip()
    if not t:
        return None
    if t.lower() in _INFINITE_WORDS:
        return math.inf
    try:
        return float(t)
    except ValueError:
        return None


class LineListModel(QAbstractTableModel):
    """The rows of a results list; numbers shown in the one number format and sorted as numbers."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.data_: Optional[LineListData] = None
        self._numbers: list[list[Optional[float]]] = []
        self._numeric: list[bool] = []

    def set_data(self, data: Optional[LineListData]) -> None:
        self.beginResetModel()
        self.data_ = data
        self._numbers = [[_number(c) for c in row] for row in data.rows] if data else []
        self._numeric = []
        if data:
            for j in range(len(data.header)):
                filled = [row[j] for row in data.rows if row[j].strip()]
                numbers = [self._numbers[i][j] for i, row in enumerate(data.rows) if row[j].strip()]
                self._numeric.append(bool(filled) and all(n is not None for n in numbers)
                                     and j not in (data.tag_column,))
        self.endResetModel()

    def rowCount(self, parent=QModelIndex()) -> int:  # noqa: N802 (Qt)
        return 0 if parent.isValid() or self.data_ is None else len(self.data_.rows)

    def columnCount(self, parent=QModelIndex()) -> int:  # noqa: N802 (Qt)
        return 0 if parent.isValid() or self.data_ is None else len(self.data_.header)

    def headerData(self, section, orientation, role=Qt.DisplayRole):  # noqa: N802 (Qt)
        if self.data_ is None or orientation != Qt.Horizontal:
            return None
        if role == Qt.DisplayRole:
            h = self.data_.header[section]
            return h[:1].upper() + h[1:]
        if role == Qt.ToolTipRole:
            return self.data_.header[section]
        return None

    def is_numeric(self, column: int) -> bool:
        return 0 <= column < len(self._numeric) and self._numeric[column]

    def data(self, index, role=Qt.DisplayRole):
        d = self.data_
        if d is None or not index.isValid():
            return None
        r, c = index.row(), index.column()
        text = d.rows[r][c]
        verdict_col = c == d.verdict_column
        if role == Qt.DisplayRole:
            if verdict_col:
                v = text.strip().lower()
                return _WORDS.get(v, text)
            if c == d.worst_check_column and text.strip():
                return _check_title(text)
            n = self._numbers[r][c]
            if self.is_numeric(c) and n is not None and math.isfinite(n) and not _INTEGER.match(text):
                return units.format_number(n, digits=4)  # the one number format; whole numbers as written
            return text
        if role == SORT_ROLE:
            if verdict_col:
                v = text.strip().lower()
                return (0, float(LINE_VERDICTS.index(v)) if v in LINE_VERDICTS else 99.0, "")
            n = self._numbers[r][c]
            if n is not None:
                return (0, n, "")
            return (1, 0.0, text.lower()) if text.strip() else (2, 0.0, "")
        if role == Qt.ForegroundRole and verdict_col:
            return style.qcolor(verdict_colour(text.strip().lower()))
        if role == Qt.FontRole and verdict_col:
            font = QFont()
            font.setBold(True)
            return font
        if role == Qt.DecorationRole and verdict_col:
            return style.severity_icon(_ICONS[verdict_level(text.strip().lower())])
        if role == Qt.TextAlignmentRole:
            return int(Qt.AlignRight | Qt.AlignVCenter) if self.is_numeric(c) else int(Qt.AlignLeft | Qt.AlignVCenter)
        if role == Qt.ToolTipRole:
            if c == d.worst_check_column and text.strip():
                return f"{_check_title(text)} ({text.strip()})"
            message = d.message(r)
            return f"{d.rows[r][d.tag_column]}: {message}" if message else None
        return None


class LineListProxy(QSortFilterProxyModel):
    """Sorts by :data:`SORT_ROLE` keys (numbers as numbers, blanks last); filters by words and verdict."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.words = ""
        self.verdicts: tuple[str, ...] = ()
        self.setSortRole(SORT_ROLE)

    def set_words(self, text: str) -> None:
        self._refilter(lambda: setattr(self, "words", text.strip().lower()))

    def set_verdicts(self, verdicts: tuple[str, ...]) -> None:
        self._refilter(lambda: setattr(self, "verdicts", tuple(verdicts)))

    def _refilter(self, change) -> None:
        if hasattr(self, "beginFilterChange"):  # Qt 6.9+: the rows filter changes, the columns stay
            self.beginFilterChange()
            change()
            self.endFilterChange(QSortFilterProxyModel.Direction.Rows)
        else:  # pragma: no cover - older Qt
            change()
            self.invalidateRowsFilter()

    def lessThan(self, left, right) -> bool:  # noqa: N802 (Qt)
        a, b = left.data(SORT_ROLE), right.data(SORT_ROLE)
        if a is None or b is None:
            return False
        # blanks last whichever way the column is sorted
        if a[0] == 2 or b[0] == 2:
            if a[0] == b[0]:
                return left.row() < right.row()
            descending = self.sortOrder() == Qt.DescendingOrder
            return (b[0] == 2) != descending
        if a == b:
            return left.row() < right.row()  # stable: list order among equals
        return a < b

    def filterAcceptsRow(self, source_row, source_parent) -> bool:  # noqa: N802 (Qt)
        d = self.sourceModel().data_
        if d is None:
            return False
        if self.verdicts and d.verdict(source_row) not in self.verdicts:
            return False
        if not self.words:
            return True
        row = d.rows[source_row]
        haystack = " ".join(row[c] for c in d.search_columns).lower()
        if d.worst_check_column is not None and row[d.worst_check_column].strip():
            haystack += " " + _check_title(row[d.worst_check_column]).lower()
        if d.verdict_column is not None:
            haystack += " " + _WORDS.get(d.verdict(source_row), "").lower()
        return all(word in haystack for word in self.words.split())


class LineListView(QWidget):
    """The Line List: a results list to sort, filter and open lines from."""

    #: the path of a line's project file to open as the project (the window's normal open path)
    open_requested = Signal(str)
    #: a short message for the status line
    status = Signal(str)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.data_: Optional[LineListData] = None
        self.model = LineListModel(self)
        self.proxy = LineListProxy(self)
        self.proxy.setSourceModel(self.model)

        self.source_label = QLabel("No line list open: File ▸ Open Line List… and pick a batch run's folder.")
        self.source_label.setWordWrap(True)
        self.source_label.setTextInteractionFlags(Qt.TextSelectableByMouse)
        self.filter_edit = QLineEdit()
        self.filter_edit.setPlaceholderText("Filter: tag, service, verdict or message words…")
        self.filter_edit.setClearButtonEnabled(True)
        self.filter_edit.setToolTip("Rows whose tag, service, verdict, worst check or message contain every word")
        self.filter_edit.textChanged.connect(self._on_filter)
        self.verdict_combo = QComboBox()
        for label, verdicts in VERDICT_FILTERS:
            self.verdict_combo.addItem(label, verdicts)
        self.verdict_combo.setToolTip("Show lines of one verdict only")
        self.verdict_combo.currentIndexChanged.connect(self._on_verdict)
        self.open_button = QPushButton("Open line")
        self.open_button.setToolTip("Open the selected line's project file (double-click a row does the same); "
                                    "Save writes back to that file")
        self.open_button.clicked.connect(self.open_selected)
        self.shown_label = QLabel("")
        self.shown_label.setStyleSheet(f"color: {INK_MUTED};")

        self.table = QTableView()
        self.table.setModel(self.proxy)
        self.table.setSortingEnabled(True)
        self.table.sortByColumn(-1, Qt.AscendingOrder)  # list order until a header is clicked
        self.table.setSelectionBehavior(QAbstractItemView.SelectRows)
        self.table.setSelectionMode(QAbstractItemView.SingleSelection)
        self.table.setEditTriggers(QAbstractItemView.NoEditTriggers)
        self.table.setAlternatingRowColors(True)
        self.table.setWordWrap(False)
        self.table.verticalHeader().setVisible(False)
        self.table.verticalHeader().setDefaultSectionSize(self.table.fontMetrics().height() + 6)
        self.table.horizontalHeader().setSectionResizeMode(QHeaderView.Interactive)
        self.table.horizontalHeader().setStretchLastSection(False)
        self.table.horizontalHeader().setDefaultAlignment(Qt.AlignLeft | Qt.AlignVCenter)
        self.table.doubleClicked.connect(self.open_index)
        enter = QAction("Open line", self.table)  # Enter on a row (not `activated`: a double-click emits it too)
        enter.setShortcuts([QKeySequence(Qt.Key_Return), QKeySequence(Qt.Key_Enter)])
        enter.setShortcutContext(Qt.WidgetShortcut)
        enter.triggered.connect(self.open_selected)
        self.table.addAction(enter)
        self.table.selectionModel().currentRowChanged.connect(lambda cur, _prev: self._show_detail(cur))

        self.detail = QLabel("")
        self.detail.setWordWrap(True)
        self.detail.setTextInteractionFlags(Qt.TextSelectableByMouse)
        self.detail.setTextFormat(Qt.PlainText)
        self.detail.setMinimumHeight(self.detail.fontMetrics().lineSpacing() * 2 + 6)
        self.detail.setAlignment(Qt.AlignTop | Qt.AlignLeft)

        bar = QHBoxLayout()
        bar.addWidget(self.filter_edit, 3)
        bar.addWidget(self.verdict_combo, 1)
        bar.addWidget(self.shown_label)
        bar.addWidget(self.open_button)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(6, 4, 6, 4)
        layout.addWidget(self.source_label)
        layout.addLayout(bar)
        layout.addWidget(self.table, 1)
        layout.addWidget(self.detail)
        self._update_counts()

    # ------------------------------------------------------------------ loading

    def load(self, path) -> LineListData:
        """Show the results list at ``path`` (a batch run's folder or its results.csv); raises
        :class:`LineListError` (the view keeps what it showed) when it cannot be read."""
        data = read_results(path)
        self.data_ = data
        self.model.set_data(data)
        self.table.sortByColumn(-1, Qt.AscendingOrder)
        self.proxy.sort(-1)
        self._fit_columns()
        counts = {v: 0 for v in LINE_VERDICTS}
        for i in range(len(data.rows)):
            v = data.verdict(i)
            counts[v] = counts.get(v, 0) + 1
        words = " · ".join(f"{n} {_WORDS.get(v, v).lower() if v != 'ok' else 'OK'}" for v, n in counts.items() if n)
        self.source_label.setText(f"{data.csv_path}  —  {plural(len(data.rows), 'line')}"
                                  + (f": {words}" if words else "")
                                  + ". Double-click a line to open it as the project; Save writes back to its file.")
        self.source_label.setToolTip(str(data.csv_path))
        self.detail.setText("")
        self._update_counts()
        return data

    def _fit_columns(self) -> None:
        header = self.table.horizontalHeader()
        fm = self.table.fontMetrics()
        d = self.data_
        for c in range(self.model.columnCount()):
            title = self.model.headerData(c, Qt.Horizontal) or ""
            sample = [self.model.data(self.model.index(r, c)) or "" for r in range(min(200, self.model.rowCount()))]
            width = max([fm.horizontalAdvance(title)] + [fm.horizontalAdvance(str(s)) for s in sample]) + 28
            if d is not None and c == d.verdict_column:
                width += self.table.iconSize().width() if self.table.iconSize().width() > 0 else 20
            cap = 420 if d is not None and c == d.message_column else 220
            header.resizeSection(c, min(max(width, 48), cap))

    # ------------------------------------------------------------------ filtering

    def _on_filter(self, text: str) -> None:
        self.proxy.set_words(text)
        self._update_counts()

    def _on_verdict(self, index: int) -> None:
        self.proxy.set_verdicts(self.verdict_combo.itemData(index) or ())
        self._update_counts()

    def set_filter(self, text: str) -> None:
        self.filter_edit.setText(text)

    def set_verdict_filter(self, label: str) -> None:
        i = self.verdict_combo.findText(label)
        if i < 0:
            raise ValueError(f"verdict filter: {label!r} is not one of "
                             f"{', '.join(lbl for lbl, _ in VERDICT_FILTERS)}")
        self.verdict_combo.setCurrentIndex(i)

    def _update_counts(self) -> None:
        total = self.model.rowCount()
        shown = self.proxy.rowCount()
        self.shown_label.setText(f"{shown} of {total} shown" if total and shown != total else "")
        self.open_button.setEnabled(shown > 0)

    # ------------------------------------------------------------------ rows

    def shown_tags(self) -> list[str]:
        """The tags in the order the table shows them (sorted and filtered)."""
        d = self.data_
        if d is None:
            return []
        return [d.rows[self.proxy.mapToSource(self.proxy.index(i, 0)).row()][d.tag_column]
                for i in range(self.proxy.rowCount())]

    def _source_row(self, index) -> Optional[int]:
        if index is None or not index.isValid():
            return None
        if index.model() is self.proxy:
            index = self.proxy.mapToSource(index)
        return index.row()

    def _show_detail(self, index) -> None:
        row = self._source_row(index)
        d = self.data_
        if d is None or row is None:
            self.detail.setText("")
            return
        v = d.verdict(row)
        message = d.message(row)
        self.detail.setText(f"{d.rows[row][d.tag_column]} — {_WORDS.get(v, v or 'no verdict')}"
                            + (f": {message}" if message else ""))

    def open_selected(self) -> bool:
        return self.open_index(self.table.currentIndex())

    def open_index(self, index) -> bool:
        """Open the line of ``index`` (a table or model index): emits :attr:`open_requested` with its
        project file; a line without one (not designed, or its file is gone) says why instead."""
        row = self._source_row(index)
        d = self.data_
        if d is None or row is None:
            return False
        self._show_detail(self.model.index(row, 0))
        tag = d.rows[row][d.tag_column]
        path = d.project_path(row)
        if not path.is_file():
            message = d.message(row)
            if d.verdict(row) == "error":
                text = f"{tag} was not designed, so it has no project file to open: {message or 'no reason recorded'}"
            else:
                text = (f"{tag}: its project file {path} is not there (moved or deleted?); run the list again "
                        "to write it")
            self.detail.setText(text)
            self.status.emit(text)
            return False
        self.status.emit(f"Opening line {tag} from {path}")
        self.open_requested.emit(str(path))
        return True
