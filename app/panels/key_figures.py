"""Key Figures: the headline numbers of the current result in the chosen unit system.

The rows are the one list of key figures, :data:`solver.results.KEY_FIGURES`, grouped as it
groups them, with its labels, so this panel, Side-by-Side, the CLI and the report say the same
thing. Above the table, the at-a-glance design verdict (targets and checks judged together).
Values come straight from the Result (SI) through ``app.units``; nothing is computed here beyond
picking and formatting. Beside each value, once the Document has them, its ± from the methods'
published accuracy (:mod:`solver.uncertainty`), as a difference in the value's unit.

Above the table, the design cases side by side (operating, worst, hot; :mod:`app.design_figures`):
the maintain check, the lowest bulk and highest wall temperatures, heat sinks, heater output and the
shortest hold after a power failure, with the hot case's caution under them.
"""

from __future__ import annotations

from PySide6.QtCore import QEvent, QSize, Qt, QTimer
from PySide6.QtGui import QBrush, QFont
from PySide6.QtWidgets import (
    QAbstractItemView,
    QFrame,
    QHeaderView,
    QLabel,
    QScrollArea,
    QStyle,
    QTableWidget,
    QTableWidgetItem,
    QToolTip,
    QVBoxLayout,
    QWidget,
)

from app import design_figures, style, trace
from app.comparison import design_verdict
from app.texts import key_figure_parts, plus_minus_text
from app.units import format_value
from solver.results import KEY_FIGURES, KeyFigure, key_figure

COLUMNS = ("Figure", "Value", "Note", "±")
PM_COLUMN = 3  # shown beside the value (moved there on screen; the columns keep their indices)
#: The figures' table is never lower than this [px] (its header and a few rows); below it the panel scrolls.
MIN_TABLE_HEIGHT = 120

#: Two figures shown together as "min – max" by :meth:`KeyFiguresPanel.value_text`.
RANGES: dict[str, tuple[str, str]] = {
    "velocity_range": ("min_velocity_m_per_s", "max_velocity_m_per_s"),
    "reynolds_range": ("min_reynolds", "max_reynolds"),
}


def figure_row(figure: KeyFigure, values: dict[str, float], system: str) -> tuple[str, str, str, str]:
    """(label, value text, note, method) of one key figure in ``system`` (see texts.key_figure_parts)."""
    return (*key_figure_parts(figure, values, system), figure.method)


def key_figure_rows(result, system: str) -> list[tuple[str, str, str, str, str]]:
    """Rows of (key, label, value text, note, method) for ``result`` in ``system``.

    Group headings (one per ``KeyFigure.group``, in the order of :data:`KEY_FIGURES`) have key
    ``""`` and empty value, note and method. Keys are those of ``Result.key_figures()``.
    """
    values = result.key_figures()
    rows: list[tuple[str, str, str, str, str]] = []
    group = None
    for figure in KEY_FIGURES:
        if figure.group != group:
            group = figure.group
            rows.append(("", group, "", "", ""))
        rows.append((figure.key, *figure_row(figure, values, system)))
    return rows


class DesignCasesTable(QWidget):
    """The design cases side by side for the result on show: ``table`` (label + one column per case),
    ``where`` (which segments do not hold) and ``caution`` (the hot case's caution) QLabels."""

    HEADERS = ("", *design_figures.CASE_TITLES.values())

    def __init__(self, parent=None):
        super().__init__(parent)
        self.rows: list = []
        self.table = QTableWidget(0, len(self.HEADERS), self)
        self.table.setObjectName("DesignCasesTable")
        self.table.setHorizontalHeaderLabels(list(self.HEADERS))
        self.table.verticalHeader().hide()
        self.table.setEditTriggers(QAbstractItemView.NoEditTriggers)
        self.table.setSelectionMode(QAbstractItemView.NoSelection)
        self.table.setShowGrid(False)
        self.table.setWordWrap(True)
        self.table.setTextElideMode(Qt.ElideNone)
        self.table.setHorizontalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
        self.table.setVerticalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
        self.table.verticalHeader().setDefaultSectionSize(22)
        # short labels sized to their contents; the three cases share the rest and wrap when narrow
        h = self.table.horizontalHeader()
        h.setSectionResizeMode(0, QHeaderView.ResizeToContents)
        for col in range(1, len(self.HEADERS)):
            h.setSectionResizeMode(col, QHeaderView.Stretch)
        h.setDefaultAlignment(Qt.AlignLeft | Qt.AlignVCenter)
        # rows refitted to their wrapped texts once the columns have their widths (after any resize)
        self._fit_timer = QTimer(self)
        self._fit_timer.setSingleShot(True)
        self._fit_timer.setInterval(0)
        self._fit_timer.timeout.connect(self._fit_height)
        h.sectionResized.connect(lambda *_a: self._fit_timer.start())
        for col, text in enumerate(("", "Each segment's own surroundings, flowing: the ordinary solve.",
                                    "Coldest design air, strongest wind (the line standing still unless set "
                                    "otherwise): what the tracing must hold.",
                                    "Warmest design air, no flow, heaters at full output: how hot the pipe gets.")):
            if text:
                self.table.horizontalHeaderItem(col).setToolTip(text)
        self.where = QLabel("")
        self.where.setWordWrap(True)
        self.caution = QLabel("")
        self.caution.setWordWrap(True)
        self.caution.setStyleSheet(f"color: {style.WARNING_TEXT}; padding: 2px 6px; font-size: 8.5pt;")
        title = QLabel("Design cases")
        title.setStyleSheet(f"color: {style.SELECTION}; font-weight: 600; padding: 4px 6px 2px 6px;")
        lay = QVBoxLayout(self)
        lay.setContentsMargins(0, 0, 0, 4)
        lay.setSpacing(2)
        lay.addWidget(title)
        lay.addWidget(self.table)
        lay.addWidget(self.where)
        lay.addWidget(self.caution)

    def show_result(self, result, system: str, hold=None, hold_pending: bool = False) -> None:
        """Fill from ``result.design`` and its Hold Time ``hold`` (hidden when the result has no design)."""
        design = getattr(result, "design", None)
        if design is None:
            self.rows = []
            self.hide()
            return
        rows = design_figures.case_rows(result, system, hold, hold_pending)
        if hold_pending:  # the last Hold Time figure stays until the new one is in (a few ms): no flicker
            before = {r.key: r for r in self.rows}
            rows = [before.get("hold", r) if r.key == "hold" else r for r in rows]
        self.rows = rows
        if self.table.rowCount() != len(self.rows):
            self.table.setRowCount(len(self.rows))
        for i, row in enumerate(self.rows):
            for col, text in enumerate((row.label, *row.texts)):
                item = self.table.item(i, col)
                if item is None:
                    item = QTableWidgetItem("")
                    if col == 0:
                        item.setForeground(QBrush(style.qcolor(style.INK)))
                    self.table.setItem(i, col, item)
                if item.text() != text:
                    item.setText(text)
                colour = style.INK
                if text.startswith("✗"):
                    colour = style.MISSED_COLOUR
                elif text.startswith("✓"):
                    colour = style.MET_COLOUR
                elif text.endswith("⚠"):
                    colour = style.WARNING_TEXT
                if col > 0:
                    item.setForeground(QBrush(style.qcolor(colour if text != "—" else style.INK_MUTED)))
                item.setToolTip(f"{row.label}: {text}\n{row.tip}" if row.tip else "")
        self._fit_height()
        self._fit_timer.start()
        short = [s for s in design.segments if s.holds is False]
        if short:
            fmt = design_figures.formatter(system)
            worst = max(short, key=lambda s: s.required_output_W_per_m - s.available_output_W_per_m)
            where = "at " + short[0].name if len(short) == 1 else f"at {len(short)} segments"
            self.where.setText(
                f"✗ Worst case does not hold {where}. Largest shortfall: "
                f"{worst.name} {design.tracing_words(worst.index, fmt).removesuffix(': does not hold')}.")
            self.where.setToolTip("Does not hold at: " + ", ".join(s.name for s in short)
                                  + ". The Segment Card gives each segment's need.")
            self.where.setStyleSheet(f"color: {style.MISSED_COLOUR}; padding: 2px 6px;")
        elif design.worst_case_error:
            self.where.setText(f"✗ Worst case: {design.worst_case_error}")
            self.where.setStyleSheet(f"color: {style.MISSED_COLOUR}; padding: 2px 6px;")
        else:
            self.where.setText("")
        self.where.setVisible(bool(self.where.text()))
        self.caution.setText(design_figures.HOT_CASE_SHORT if design.notes else "")
        self.caution.setToolTip(" ".join(design.notes))
        self.caution.setVisible(bool(design.notes))
        self.show()

    def _fit_height(self) -> None:
        """Rows as tall as their wrapped texts, the table as tall as its rows (it never scrolls)."""
        if not self.rows:
            return
        self.table.resizeRowsToContents()
        header = self.table.horizontalHeader().sizeHint().height()
        self.table.setFixedHeight(header + sum(self.table.rowHeight(i) for i in range(len(self.rows))) + 4)

    def text(self, key: str, case: str) -> str:
        """The shown text of row ``key`` (e.g. 'maintain', 'lowest', 'hot_wall', 'hold') in ``case``
        ('operating', 'worst', 'hot')."""
        for i, row in enumerate(self.rows):
            if row.key == key:
                return self.table.item(i, 1 + design_figures.CASES.index(case)).text()
        raise KeyError(f"no design-case row {key!r}; shown: {', '.join(r.key for r in self.rows)}")


class _FiguresTable(QTableWidget):
    """The figures' table: it asks for :data:`MIN_TABLE_HEIGHT` and takes whatever height is left over (the
    panel's scroll area sizes its body to the heights its parts ask for, when the dock is lower than that)."""

    def __init__(self, *args):
        super().__init__(*args)
        self.setMinimumHeight(MIN_TABLE_HEIGHT)

    def sizeHint(self) -> QSize:  # noqa: N802 (Qt)
        return QSize(super().sizeHint().width(), MIN_TABLE_HEIGHT)


class KeyFiguresPanel(QWidget):
    """``KeyFiguresPanel(doc)``: the verdict and a table of headline results; observes the Document.

    Public: ``table`` (QTableWidget), ``verdict`` (QLabel), ``verdict_level`` (the shown
    ``DesignVerdict.level`` or ""), ``scroll_area`` (all under the verdict: it scrolls when the dock is
    too low for the design cases and a few rows of the table), :meth:`value_text` (key -> displayed value text).
    """

    def __init__(self, doc, parent=None):
        super().__init__(parent)
        self.doc = doc
        self.setObjectName("KeyFigures")
        self.setWindowTitle("Key Figures")
        self._row_of: dict[str, int] = {}
        self._layout: list[str] = []  # key of each row the table holds ("" for a heading)
        self._label_width = -1  # width of the label column the row heights were fitted to
        self.verdict_level = ""
        self._verdict_for: tuple = ()  # (targets, result, unit system) the verdict was shown for
        self._shown_for: tuple = ()  # (result, unit system, stale) the table shows

        # the verdict: symbol + words + colour, so colour is never the only cue
        self.verdict = QLabel("")
        self.verdict.setObjectName("KeyFiguresVerdict")
        self.verdict.setWordWrap(True)
        self.verdict.hide()

        self.note = QLabel("")
        self.note.setWordWrap(True)
        self.note.setStyleSheet(f"color: {style.INK_MUTED}; padding: 3px 6px;")

        self.table = _FiguresTable(0, len(COLUMNS), self)
        self.table.setHorizontalHeaderLabels(list(COLUMNS))
        self.table.verticalHeader().hide()
        self.table.setEditTriggers(QAbstractItemView.NoEditTriggers)
        self.table.setSelectionBehavior(QAbstractItemView.SelectRows)
        self.table.setShowGrid(False)
        self.table.setAlternatingRowColors(False)
        # a long label wraps onto a second line rather than being cut (values and notes are
        # sized to their contents, so they never need to)
        self.table.setWordWrap(True)
        self.table.setTextElideMode(Qt.ElideNone)
        self.table.setHorizontalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
        h = self.table.horizontalHeader()
        h.setSectionResizeMode(0, QHeaderView.Stretch)
        h.setSectionResizeMode(1, QHeaderView.ResizeToContents)
        h.setSectionResizeMode(2, QHeaderView.ResizeToContents)
        # the ± column only widens (see _fit_pm_column): between an edit's result and its bands it is
        # empty, and a column that shrank and grew back would re-lay out the table twice per edit
        h.setSectionResizeMode(PM_COLUMN, QHeaderView.Fixed)
        h.moveSection(PM_COLUMN, 2)
        self._pm_width = 0
        self.table.horizontalHeaderItem(PM_COLUMN).setToolTip(
            "± from the methods' published accuracy (uncertainty bands); not input errors nor the model's assumptions")
        h.setDefaultAlignment(Qt.AlignLeft | Qt.AlignVCenter)
        h.sectionResized.connect(self._label_column_resized)
        self.table.viewport().installEventFilter(self)  # pointing at a figure shows how it was computed
        self.table.verticalHeader().setDefaultSectionSize(22)
        # row heights follow the label column's width, refitted once after a burst of resizes
        self._fit_timer = QTimer(self)
        self._fit_timer.setSingleShot(True)
        self._fit_timer.setInterval(0)
        self._fit_timer.timeout.connect(self.fit_rows)

        self.design = DesignCasesTable(self)
        self.design.hide()
        # under the verdict, the rest scrolls as one when the dock is lower than the note, the design cases
        # and a few rows of the table need at its width (a Target Finder or Sweep open above it), rather than
        # being drawn over each other; when they fit, the table takes the rest of the height as before
        body = QWidget()
        body.setObjectName("KeyFiguresBody")
        body_lay = QVBoxLayout(body)
        body_lay.setContentsMargins(0, 0, 0, 0)
        body_lay.setSpacing(0)
        for part, stretch in ((self.note, 0), (self.design, 0), (self.table, 1)):
            body_lay.addWidget(part, stretch)
        self.scroll_area = QScrollArea()
        self.scroll_area.setWidget(body)
        self.scroll_area.setWidgetResizable(True)
        self.scroll_area.setFrameShape(QFrame.NoFrame)
        self.scroll_area.setHorizontalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
        lay = QVBoxLayout(self)
        lay.setContentsMargins(0, 0, 0, 0)
        lay.setSpacing(0)
        lay.addWidget(self.verdict)
        lay.addWidget(self.scroll_area, 1)

        # the document holds the result and whether it is stale; this view only redraws
        doc.result_ready.connect(lambda _r: self.refresh())
        doc.bands_ready.connect(self._on_bands)
        doc.hold_time_ready.connect(lambda r: self._show_design() if r is self.doc.result else None)
        doc.solve_failed.connect(lambda _m: self.refresh())
        doc.units_changed.connect(lambda _s: self.refresh())
        doc.project_replaced.connect(self.refresh)
        doc.project_changed.connect(self._show_verdict)  # the targets may have changed
        doc.current_alternative_changed.connect(lambda _i: self.refresh())
        self.refresh()

    # ------------------------------------------------------------------ verdict

    def _show_verdict(self) -> None:
        res = self.doc.result
        if res is None:
            self.verdict.hide()
            self.verdict_level = ""
            self._verdict_for = ()
            return
        targets = self.doc.project.targets
        shown_for = (targets, res, self.doc.unit_system)
        if (self._verdict_for and self._verdict_for[0] is targets and self._verdict_for[1] is res
                and self._verdict_for[2] == shown_for[2]):
            return  # every edit asks before its result arrives: the verdict on screen stands
        self._verdict_for = shown_for
        verdict = design_verdict(targets, res)
        level = verdict.level
        symbol = style.VERDICT_SYMBOLS[level]
        text = f"{symbol}  {verdict.text()}"
        if self.verdict.text() != text:
            self.verdict.setText(text)
            self.verdict.setToolTip(
                "Design targets and checks judged together: a design with a danger or warning "
                "check is never shown as simply met. The Checks list gives every finding.")
        if level != self.verdict_level:  # re-polishing costs a few ms: only when the level changes
            colour = style.VERDICT_COLOURS[level]
            self.verdict.setStyleSheet(
                f"color: {colour}; font-weight: 600; background: {style.CANVAS_BG};"
                f"border-left: 5px solid {colour}; padding: 4px 6px;")
            self.verdict.setAccessibleDescription(level)
            self.verdict_level = level
        self.verdict.show()

    # ------------------------------------------------------------------ table

    def refresh(self) -> None:
        res = self.doc.result
        shown_for = (res, self.doc.unit_system, self.doc.result_is_stale)
        if res is not None and self._shown_for and self._shown_for[0] is res and self._shown_for[1:] == shown_for[1:]:
            # the result on screen published again (e.g. after an edit of the project's name or
            # targets, which changes no alternative): only the verdict may differ
            self._show_verdict()
            return
        self._shown_for = shown_for
        if res is None:
            self.table.setRowCount(0)
            self._row_of = {}
            self._layout = []
            self.design.show_result(None, self.doc.unit_system)
            self._show_verdict()
            self.note.setText("Key figures appear once the line is solved.")
            return
        self._show_verdict()
        system = self.doc.unit_system
        note = f"{res.name} · {res.fluid_label} · {res.cells} cells"
        if self.doc.result_is_stale:
            note = "Stale: the last edit could not be solved; these figures are from the previous result. " + note
        self.note.setText(note)
        sheet = (f"color: {style.INK if self.doc.result_is_stale else style.INK_MUTED}; padding: 3px 6px;"
                 + ("background: #FCF0D8;" if self.doc.result_is_stale else ""))
        if self.note.styleSheet() != sheet:  # re-polishing costs a few ms: only when it changes
            self.note.setStyleSheet(sheet)
        self._show_design()
        rows = key_figure_rows(res, system)
        layout = [row[0] for row in rows]
        if layout != self._layout:
            self._build_rows(rows)
        # the rows keep their items: only texts that changed are set (re-creating ~70 items per
        # result cost ~30 ms). Each item change would make the view re-measure its
        # resize-to-contents columns, so the model stays quiet and announces one change at the end.
        model = self.table.model()
        was_blocked = model.blockSignals(True)
        try:
            labels_changed = self._fill(rows)
            self._fill_pm()
        finally:
            model.blockSignals(was_blocked)
        if not was_blocked and rows:
            model.dataChanged.emit(model.index(0, 0), model.index(len(rows) - 1, len(COLUMNS) - 1), [])
        if labels_changed:
            self._label_width = -1
            self._fit_timer.start()

    def _fill(self, rows) -> bool:
        """Set the texts that changed; return whether a label changed (its row may need refitting)."""
        labels_changed = False
        for i, (key, label, value, note, method) in enumerate(rows):
            if not key:
                continue
            a, b, c = self.table.item(i, 0), self.table.item(i, 1), self.table.item(i, 2)
            if a.text() != label:  # e.g. heat loss that turned into a gain
                a.setText(label)
                labels_changed = True
            if b.text() != value:
                b.setText(value)
            if c.text() != note:
                c.setText(note)
            # the whole row and how the figure is computed, on every cell
            tip = f"{label.strip()}: {value}" + (f" ({note})" if note else "") + f"\n{method}"
            if b.toolTip() != tip:
                for col in range(len(COLUMNS)):
                    self.table.item(i, col).setToolTip(tip)
        return labels_changed

    def _build_rows(self, rows) -> None:
        """Create the items of every row once (headings styled and spanning); values are filled in later."""
        self.table.clearSpans()
        self.table.setRowCount(len(rows))
        self._row_of = {}
        heading_font = QFont(self.table.font())
        heading_font.setBold(True)
        for i, (key, label, _value, _note, _method) in enumerate(rows):
            a, b, c, d = QTableWidgetItem(label), QTableWidgetItem(""), QTableWidgetItem(""), QTableWidgetItem("")
            if not key:
                a.setFont(heading_font)
                a.setForeground(QBrush(style.qcolor(style.SELECTION)))
                for it in (a, b, c, d):
                    it.setBackground(QBrush(style.qcolor(style.CANVAS_BG)))
            else:
                self._row_of[key] = i
                b.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
                c.setForeground(QBrush(style.qcolor(style.INK_MUTED)))
                d.setForeground(QBrush(style.qcolor(style.INK_MUTED)))
            self.table.setItem(i, 0, a)
            self.table.setItem(i, 1, b)
            self.table.setItem(i, 2, c)
            self.table.setItem(i, PM_COLUMN, d)
            if not key:
                self.table.setSpan(i, 0, 1, len(COLUMNS))  # a heading never shares its row
        self._layout = [row[0] for row in rows]
        self._label_width = -1
        self._fit_timer.start()

    def _show_design(self) -> None:
        res = self.doc.result
        self.design.show_result(res, self.doc.unit_system, self.doc.hold_time_of(res), self.doc.hold_time_pending(res))

    # ------------------------------------------------------------------ ± from the uncertainty bands

    def _on_bands(self, _name: str, bands) -> None:
        if self.doc.result is None or bands.base is not self.doc.result or not self._row_of:
            return
        model = self.table.model()
        was_blocked = model.blockSignals(True)
        try:
            self._fill_pm()
        finally:
            model.blockSignals(was_blocked)
        if not was_blocked:
            n = self.table.rowCount()
            model.dataChanged.emit(model.index(0, PM_COLUMN), model.index(n - 1, PM_COLUMN), [])

    def _fill_pm(self) -> None:
        """Write each figure's ± (empty until the bands of the result on screen are in)."""
        bands = self.doc.bands_for_result(self.doc.result)
        system = self.doc.unit_system
        widest = 0
        fm = self.table.fontMetrics()
        for key, row in self._row_of.items():
            item = self.table.item(row, PM_COLUMN)
            text, tip = self.pm_parts(key, bands, system)
            if item.text() != text:
                item.setText(text)
            if tip and item.toolTip() != tip:
                item.setToolTip(tip)
            if text:
                widest = max(widest, fm.horizontalAdvance(text))
        self._fit_pm_column(widest)

    def _fit_pm_column(self, text_width: int) -> None:
        """Widen the ± column to its widest text (never narrower than its header); it does not shrink."""
        header = self.table.horizontalHeader()
        hm = header.style().pixelMetric(QStyle.PM_HeaderMargin, None, header)
        need = max(text_width + 2 * self._text_margin() + 4,
                   header.fontMetrics().horizontalAdvance(COLUMNS[PM_COLUMN]) + 2 * hm + 4)
        if need > self._pm_width:
            self._pm_width = need
            header.resizeSection(PM_COLUMN, need)

    @staticmethod
    def pm_parts(key: str, bands, system: str) -> tuple[str, str]:
        """``('± 0.8 K', tooltip)`` of one figure; ``('', '')`` without bands or without a ±."""
        spec = key_figure(key)
        text = plus_minus_text(bands.key_figure_pm.get(key) if bands is not None else None, spec, system)
        if not text:
            return "", ""
        ranked = sorted(((c.key_figure_pm.get(key, 0.0), c) for c in bands.contributions), key=lambda e: -e[0])
        parts = [f"{c.label} ({c.accuracy_text}): ± {format_value(v, spec.difference_quantity, system, digits=2)}"
                 for v, c in ranked[:3] if v > 0]
        tip = (f"{spec.label.strip()} {text}: the methods' published accuracy, combined by root-sum-square. "
               "Largest: " + "; ".join(parts) + ". Not input errors nor the model's assumptions.")
        return text, tip

    def pm_text(self, key: str) -> str:
        """The displayed ± of a figure, e.g. ``'± 0.8 K'`` ("" until the bands are in)."""
        return self.table.item(self._row_of[key], PM_COLUMN).text()

    def trace_text(self, key: str) -> str:
        """How figure ``key`` of the result on show was computed (:func:`app.trace.key_figure_trace`):
        method, published sources, and the segment and inputs behind it; '' without a result."""
        res = self.doc.result
        if res is None or not key:
            return ""
        return trace.key_figure_trace(key, res, self.doc.current_alternative, self.doc.unit_system)

    def eventFilter(self, obj, event) -> bool:
        # built when pointed at, not with every result: all figures' texts together take several ms
        if event.type() == QEvent.ToolTip and obj is self.table.viewport():
            item = self.table.itemAt(event.pos())
            if item is not None and item.column() == PM_COLUMN:
                return super().eventFilter(obj, event)  # the ± column says where its ± comes from
            key = self._layout[item.row()] if item is not None and item.row() < len(self._layout) else ""
            text = self.trace_text(key)
            if text:
                QToolTip.showText(event.globalPos(), text, self.table.viewport())
                return True
        return super().eventFilter(obj, event)

    def _label_column_resized(self, index: int, _old: int, new: int) -> None:
        if index == 0 and new != self._label_width:
            self._fit_timer.start()

    def fit_rows(self) -> None:
        """Give each row the height its wrapped label needs at the label column's width.

        Only rows whose label wraps are measured by the view; the others keep the default
        height, so a refit costs well under a millisecond.
        """
        width = self.table.columnWidth(0)
        if width == self._label_width or width <= 0:
            return
        self._label_width = width
        default = self.table.verticalHeader().defaultSectionSize()
        fm = self.table.fontMetrics()
        room = width - 2 * self._text_margin()
        for i, key in enumerate(self._layout):
            if not key:
                continue
            text = self.table.item(i, 0).text()
            if fm.horizontalAdvance(text) <= room:
                if self.table.rowHeight(i) != default:
                    self.table.setRowHeight(i, default)
            else:
                self.table.resizeRowToContents(i)
                if self.table.rowHeight(i) < default:
                    self.table.setRowHeight(i, default)

    def _text_margin(self) -> int:
        """Horizontal margin the style keeps on each side of an item's text."""
        return self.table.style().pixelMetric(QStyle.PM_FocusFrameHMargin, None, self.table) + 1

    def value_text(self, key: str) -> str:
        """The displayed value of a figure, e.g. ``value_text('outlet_temperature_K') -> '71.3 °C'``.

        ``'velocity_range'`` and ``'reynolds_range'`` give the pair of min and max figures as
        ``'0.219 – 0.250 m/s'``.
        """
        if key in RANGES:
            lo, hi = RANGES[key]
            low, high = self.value_text(lo), self.value_text(hi)
            unit = high.partition(" ")[2]
            if unit and low.endswith(" " + unit):
                low = low[: -len(unit) - 1]
            return f"{low} – {high}"
        return self.table.item(self._row_of[key], 1).text()
