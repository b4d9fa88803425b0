"""Checks: the findings of the current result, most severe first.

Each row shows a severity mark (shape + colour + word, so colour is never the only cue), the
message and where it applies (segment name, position in display units). Messages wrap onto as
many lines as they need, so none is cut. Clicking a row selects the segment and marks the
position on the Profiles. An empty list says so plainly. The order is the one every list of
checks uses (:func:`solver.results.check_sort_key`).
"""

from __future__ import annotations

import html
import math

from PySide6.QtCore import QEvent, QSize, Qt
from PySide6.QtGui import QBrush, QFont
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHeaderView,
    QLabel,
    QStyle,
    QStyledItemDelegate,
    QStyleOptionViewItem,
    QToolTip,
    QTreeWidget,
    QTreeWidgetItem,
    QVBoxLayout,
    QWidget,
)

from app import style, trace, units
from app.comparison import plural
from app.units import format_value
from solver.results import check_sort_key

COLUMNS = ("Severity", "Finding", "Segment", "Position")
ROLE_CHECK = Qt.UserRole + 1


def sorted_checks(checks) -> list:
    """Worst first, then in flow order: :func:`solver.results.check_sort_key`."""
    return sorted(checks, key=check_sort_key)


#: Words of the counts in the header (singular, plural): "1 warning", "3 warnings", "2 info".
COUNT_WORDS: dict[str, tuple[str, str]] = {
    "danger": ("danger", "dangers"),
    "warning": ("warning", "warnings"),
    "info": ("info", "info"),
}


def count_text(counts: dict[str, int]) -> str:
    """Plain counts, worst first, e.g. ``'1 danger · 3 warnings'``; ``'No findings'`` for none."""
    parts = [plural(n, *COUNT_WORDS[k]) for k, n in counts.items() if n]
    return " · ".join(parts) if parts else "No findings"


class _WrappingDelegate(QStyledItemDelegate):
    """Measures an item at its column's width, so a wrapped message gets the rows it needs.

    A tree view asks for row heights with no width in the style option, which makes every
    message one (cut) line; this gives it the column width.
    """

    def __init__(self, tree: QTreeWidget, column: int):
        super().__init__(tree)
        self._tree = tree
        self._column = column  # the one column that wraps; the others size to their one line

    def sizeHint(self, option, index) -> QSize:
        if index.column() != self._column:
            return super().sizeHint(option, index)
        opt = QStyleOptionViewItem(option)
        self.initStyleOption(opt, index)
        rect = opt.rect
        rect.setWidth(self._tree.columnWidth(index.column()))
        rect.setHeight(1 << 14)  # any valid height: the style measures the wrapped text
        opt.rect = rect
        size = self._tree.style().sizeFromContents(QStyle.CT_ItemViewItem, opt, QSize(), self._tree)
        return QSize(size.width(), size.height() + 4)  # a little air between wrapped findings


class ChecksPanel(QWidget):
    """``ChecksPanel(doc)``: a list of the current result's findings; observes the Document.

    Public: ``tree`` (QTreeWidget; each row's check object under ``ROLE_CHECK`` in column 0),
    ``header`` (QLabel with counts), :meth:`activate_row`.
    """

    def __init__(self, doc, parent=None):
        super().__init__(parent)
        self.doc = doc
        self.setObjectName("Checks")
        self.setWindowTitle("Checks")

        self.header = QLabel("")
        self.header.setTextFormat(Qt.RichText)
        self.header.setStyleSheet(f"color: {style.INK}; padding: 3px 6px;")

        self.tree = QTreeWidget(self)
        self.tree.setColumnCount(len(COLUMNS))
        self.tree.setHeaderLabels(list(COLUMNS))
        self.tree.setRootIsDecorated(False)
        self.tree.setUniformRowHeights(False)
        self.tree.setWordWrap(True)
        self.tree.setTextElideMode(Qt.ElideNone)
        self.tree.setItemDelegate(_WrappingDelegate(self.tree, COLUMNS.index("Finding")))
        self.tree.setAlternatingRowColors(True)
        self.tree.setSelectionMode(QAbstractItemView.SingleSelection)
        self.tree.setAllColumnsShowFocus(True)
        self.tree.setAccessibleName("Checks")
        h = self.tree.header()
        h.setStretchLastSection(False)
        h.setSectionResizeMode(0, QHeaderView.ResizeToContents)
        h.setSectionResizeMode(1, QHeaderView.Stretch)
        h.setSectionResizeMode(2, QHeaderView.ResizeToContents)
        h.setSectionResizeMode(3, QHeaderView.ResizeToContents)
        # a wider or narrower message column re-wraps the messages
        h.sectionResized.connect(lambda col, _old, _new: col == 1 and self.tree.scheduleDelayedItemsLayout())
        self.tree.itemClicked.connect(lambda item, _col: self.activate_row(item))
        self.tree.itemActivated.connect(lambda item, _col: self.activate_row(item))
        self.tree.viewport().installEventFilter(self)  # pointing at a finding shows how it was reached

        lay = QVBoxLayout(self)
        lay.setContentsMargins(0, 0, 0, 0)
        lay.setSpacing(0)
        lay.addWidget(self.header)
        lay.addWidget(self.tree, 1)
        # the full text of the current finding (rows elide long messages)
        self.detail = QLabel("")
        self.detail.setWordWrap(True)
        self.detail.setTextInteractionFlags(Qt.TextSelectableByMouse)
        self.detail.setStyleSheet(
            f"color: {style.INK}; background: {style.CANVAS_BG}; border-top: 1px solid {style.GRID}; padding: 4px 6px;"
        )
        self.detail.hide()
        lay.addWidget(self.detail)
        self.tree.currentItemChanged.connect(self._show_detail)

        # the document holds the result and whether it is stale; this view only redraws
        doc.result_ready.connect(lambda _r: self.refresh())
        doc.solve_failed.connect(lambda _m: self.refresh())
        doc.units_changed.connect(lambda _s: self.refresh())
        # an edit shows here through its result or failure, which refresh the list; refreshing at
        # the edit as well rebuilt the old findings once more (~2 ms). A renamed segment is no
        # exception: the name is part of what is solved, so a new result follows the rename.
        doc.project_replaced.connect(self.refresh)
        doc.current_alternative_changed.connect(lambda _i: self.refresh())
        self.refresh()

    def _segment_name(self, index) -> str:
        if index is None:
            return "whole line"
        segs = self.doc.current_alternative.segments
        if 0 <= index < len(segs):
            return segs[index].name
        if self.doc.result is not None and 0 <= index < len(self.doc.result.segments):
            return self.doc.result.segments[index].name
        return f"segment {index + 1}"

    def refresh(self) -> None:
        self.tree.clear()
        self.detail.hide()
        system = self.doc.unit_system
        res = self.doc.result
        if res is None:
            self.header.setText(f"<span style='color:{style.INK_MUTED}'>Checks appear once the line is solved.</span>")
            return
        checks = sorted_checks(res.checks)
        counts = res.check_counts()
        parts = []
        for k, n in counts.items():
            if n:  # the number in the severity's colour, the words from count_text's grammar
                number, _, words = plural(n, *COUNT_WORDS[k]).partition(" ")
                parts.append(f"<span style='color:{style.SEVERITIES[k].colour}'><b>{number}</b></span> {words}")
        head = " · ".join(parts) if parts else "No findings"
        self.header.setToolTip(count_text(counts))
        if self.doc.result_is_stale:
            head += f" &nbsp;<span style='color:{style.INK_MUTED}'>(stale: the last edit could not be solved)</span>"
        self.header.setText(head)

        bold = QFont(self.tree.font())
        bold.setBold(True)
        if not checks:
            item = QTreeWidgetItem(["OK", "No findings: every check passed for this alternative.", "", ""])
            item.setIcon(0, style.severity_icon("ok"))
            item.setForeground(1, QBrush(style.qcolor(style.INK_MUTED)))
            item.setFlags(Qt.ItemIsEnabled)
            self.tree.addTopLevelItem(item)
            return
        for c in checks:
            sev = style.severity_style(c.severity)
            pos = format_value(c.x_m, "length", system) if c.x_m is not None else "—"
            text = units.check_message(c, self.doc.unit_system)
            item = QTreeWidgetItem([sev.word, text, self._segment_name(c.segment), pos])
            item.setIcon(0, style.severity_icon(c.severity))
            item.setFont(0, bold)
            item.setForeground(0, QBrush(style.qcolor(sev.colour).darker(125)))
            item.setToolTip(1, text)
            item.setToolTip(0, f"{sev.word} ({c.code})")
            item.setTextAlignment(3, Qt.AlignRight | Qt.AlignVCenter)
            item.setData(0, ROLE_CHECK, c)
            self.tree.addTopLevelItem(item)

    def trace_text(self, check) -> str:
        """How a finding was reached (:func:`app.trace.check_trace`): its rule, threshold and source, and
        the inputs of its segment."""
        return trace.check_trace(check, self.doc.result, self.doc.current_alternative, self.doc.unit_system)

    def eventFilter(self, obj, event) -> bool:
        if event.type() == QEvent.ToolTip and obj is self.tree.viewport():
            item = self.tree.itemAt(event.pos())
            check = item.data(0, ROLE_CHECK) if item is not None else None
            if check is not None:
                QToolTip.showText(event.globalPos(), self.trace_text(check), self.tree.viewport())
                return True
        return super().eventFilter(obj, event)

    def _show_detail(self, item, _previous=None) -> None:
        check = item.data(0, ROLE_CHECK) if item is not None else None
        if check is None:
            self.detail.hide()
            return
        sev = style.severity_style(check.severity)
        self.detail.setText(f"<b style='color:{style.qcolor(sev.colour).darker(125).name()}'>{sev.word}</b> — {html.escape(units.check_message(check, self.doc.unit_system))}")
        self.detail.show()

    def activate_row(self, item: QTreeWidgetItem) -> None:
        """Select the finding's segment and mark its position on the Profiles."""
        check = item.data(0, ROLE_CHECK)
        if check is None:
            return
        if check.segment is not None:
            self.doc.select_segment(check.segment)
        x = check.x_m
        if x is None and check.segment is not None and self.doc.result is not None and check.segment < len(self.doc.result.segments):
            span = self.doc.result.segments[check.segment]
            x = 0.5 * (span.x_start_m + span.x_end_m)
        self.doc.mark_position(float(x) if x is not None else math.nan)
