"""Side-by-Side: the project's alternatives compared, laid out to be read at a glance.

Top to bottom: a key of the alternatives (number, line sample, full name; its check boxes choose
which are overlaid), the temperature and pressure profiles of the chosen alternatives side by side,
and a table with one column per alternative: Key Figures (the value, and below it the difference
from the baseline), the design targets with each alternative's verdict (targets and checks judged
together), and the Checks. Column widths come from the measured text, so names are never cut.

Solving belongs to the Document's runner: this view asks for the results it shows
(:meth:`Document.request_results`) and redraws as they arrive (``alternative_solved``); it keeps no
results, threads or generations of its own. Numbers and verdicts come from :mod:`app.comparison`,
the same code the summary report uses.
"""

from __future__ import annotations

import math
from typing import Optional

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QSize, Qt, QTimer, Signal
from PySide6.QtGui import QColor, QFont, QFontMetrics, QIcon, QPainter, QPen, QPixmap
from PySide6.QtWidgets import (
    QAbstractItemView,
    QApplication,
    QCheckBox,
    QGridLayout,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QSplitter,
    QStyle,
    QStyledItemDelegate,
    QStyleOptionViewItem,
    QTableWidget,
    QTableWidgetItem,
    QTabWidget,
    QVBoxLayout,
    QWidget,
)

from app import comparison, style, units
from app.axes import minimum_span
from solver.results import Result, check_sort_key

_PEN_STYLES = {"solid": Qt.SolidLine, "dash": Qt.DashLine, "dot": Qt.DotLine, "dashdot": Qt.DashDotLine}
#: the most alternatives the layout is drawn for (more still work: the table scrolls sideways)
DESIGNED_FOR = 6
_CELL_PADDING = 14  # px left and right of the text in a cell, together
_ICON_W, _ICON_H = 26, 12  # line sample in the column headers


def alternative_colour(index: int) -> str:
    return style.ALTERNATIVE_COLOURS[index % len(style.ALTERNATIVE_COLOURS)]


def alternative_style(index: int) -> str:
    """Colour and line style both change from one alternative to the next (as in the report's overlay)."""
    return style.ALTERNATIVE_STYLES[index % len(style.ALTERNATIVE_STYLES)]


def alternative_pen(index: int, width: float = 2.0, alpha: int = 255) -> QPen:
    pen = QPen(style.qcolor(alternative_colour(index), alpha))
    pen.setWidthF(width)
    pen.setCosmetic(True)
    pen.setStyle(_PEN_STYLES[alternative_style(index)])
    return pen


def line_sample_icon(index: int, width: int = _ICON_W, height: int = _ICON_H) -> QIcon:
    """A short line in the alternative's colour and style: the key between table, list and plots."""
    icon = QIcon()
    for scale in (1, 2):
        pm = QPixmap(width * scale, height * scale)
        pm.fill(Qt.transparent)
        p = QPainter(pm)
        p.setRenderHint(QPainter.Antialiasing, True)
        pen = alternative_pen(index, 2.4 * scale)
        pen.setCosmetic(False)
        p.setPen(pen)
        y = height * scale / 2
        p.drawLine(1 * scale, int(y), (width - 1) * scale, int(y))
        p.end()
        pm.setDevicePixelRatio(scale)
        icon.addPixmap(pm)
    return icon


def wrap_lines(text: str, fm: QFontMetrics, max_lines: int = 2) -> tuple[str, int]:
    """``text`` broken at spaces into at most ``max_lines`` lines, as narrow as that allows.

    Returns (text with newlines, width of its widest line in px). Whole words only: a name is
    never cut inside a word.
    """
    words = text.split(" ")
    best = (text, fm.horizontalAdvance(text))
    if max_lines <= 1 or len(words) == 1:
        return best
    for i in range(1, len(words)):
        head = " ".join(words[:i])
        rest, rest_w = wrap_lines(" ".join(words[i:]), fm, max_lines - 1)
        w = max(fm.horizontalAdvance(head), rest_w)
        if w < best[1]:
            best = (f"{head}\n{rest}", w)
    return best


def text_width(text: str, fm: QFontMetrics) -> int:
    """Width in px of the widest line of ``text``."""
    return max((fm.horizontalAdvance(line) for line in text.split("\n")), default=0)


#: item data role: True when every line of the cell is drawn in the item's colour (a verdict)
ONE_COLOUR_ROLE = Qt.UserRole + 1


def _even_out(needed: list[int], room: int) -> list[int]:
    """Column widths: each at least what it needs; the room left over widens the narrowest first,
    up to the widest, so the columns come as close to equal (a grid) as the room allows."""
    widths = list(needed)
    if not widths:
        return widths
    spare = room - sum(widths)
    target = max(widths)
    while spare > 0:
        low = min(widths)
        if low >= target:
            break
        narrowest = [i for i, w in enumerate(widths) if w == low]
        above = min((w for w in widths if w > low), default=target)
        step = min(above - low, spare // len(narrowest))
        if step <= 0:
            break
        for i in narrowest:
            widths[i] += step
        spare -= step * len(narrowest)
    return widths


class _TwoToneDelegate(QStyledItemDelegate):
    """Cells of two lines: the first in the item's colour (ink by default), the second muted.

    The value stays in front; the difference from the baseline sits under it, quieter. A verdict
    keeps its colour on both lines (``ONE_COLOUR_ROLE``).
    """

    def paint(self, painter, option, index) -> None:
        opt = QStyleOptionViewItem(option)
        self.initStyleOption(opt, index)
        text = index.data(Qt.DisplayRole) or ""  # opt.text has its newlines turned into line separators
        opt.text = ""
        widget = opt.widget
        (widget.style() if widget else QApplication.style()).drawControl(QStyle.CE_ItemViewItem, opt, painter, widget)
        lines = text.split("\n")
        fg = index.data(Qt.ForegroundRole)
        first = fg.color() if fg is not None else QColor(style.INK)
        rest = first if index.data(ONE_COLOUR_ROLE) else QColor(style.INK_MUTED)
        align = index.data(Qt.TextAlignmentRole)
        align = Qt.AlignmentFlag(int(align)) if align is not None else (Qt.AlignLeft | Qt.AlignVCenter)
        horizontal = align & (Qt.AlignLeft | Qt.AlignRight | Qt.AlignHCenter)
        fm = QFontMetrics(opt.font)
        rect = opt.rect.adjusted(_CELL_PADDING // 2, 0, -_CELL_PADDING // 2, 0)
        block = fm.lineSpacing() * len(lines)
        top = rect.top() + max(0, (rect.height() - block) // 2)
        painter.save()
        painter.setFont(opt.font)
        painter.setClipRect(opt.rect)
        for i, line in enumerate(lines):
            painter.setPen(first if i == 0 else rest)
            if horizontal & Qt.AlignRight:
                x = rect.right() - fm.horizontalAdvance(line)
            elif horizontal & Qt.AlignHCenter:
                x = rect.left() + (rect.width() - fm.horizontalAdvance(line)) // 2
            else:
                x = rect.left()
            painter.drawText(x, top + i * fm.lineSpacing() + fm.ascent(), line)
        painter.restore()

    def sizeHint(self, option, index) -> QSize:  # noqa: N802 (Qt name)
        text = index.data(Qt.DisplayRole) or ""
        fm = option.fontMetrics
        return QSize(text_width(text, fm) + _CELL_PADDING, fm.lineSpacing() * max(1, text.count("\n") + 1) + 6)


class AlternativeKey(QWidget):
    """The chooser and colour key in one: a check box per alternative, number + line sample + full name.

    Laid out in as many columns as fit, so six long names take two rows of a few lines' height
    instead of a third of the width.
    """

    toggled = Signal(str, bool)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setObjectName("sideBySideChooser")
        self.boxes: list[QCheckBox] = []
        self._grid = QGridLayout(self)
        self._grid.setContentsMargins(2, 2, 2, 2)
        self._grid.setHorizontalSpacing(18)
        self._grid.setVerticalSpacing(2)
        self._columns = 0

    def set_alternatives(self, names: list[str], baseline: Optional[str], hidden: set[str]) -> None:
        for box in self.boxes:
            self._grid.removeWidget(box)
            box.setParent(None)  # gone from the screen now, not when the event loop gets round to it
            box.deleteLater()
        self.boxes = []
        for i, name in enumerate(names):
            text = f"{i + 1}  {name}" + ("  (baseline)" if name == baseline else "")
            box = QCheckBox(text, self)
            box.setIcon(line_sample_icon(i))
            box.setIconSize(QSize(_ICON_W, _ICON_H))
            box.setChecked(name not in hidden)
            box.setToolTip(f"Alternative {i + 1}: {name}" + (" — the baseline differences are taken from" if name == baseline else "")
                           + "\nTick to overlay its profiles.")
            if name == baseline:
                f = box.font()
                f.setBold(True)
                box.setFont(f)
            box.setProperty("alternative", name)
            box.toggled.connect(lambda on, n=name: self.toggled.emit(n, on))
            self.boxes.append(box)
        self._columns = 0
        self._reflow()

    def _reflow(self) -> None:
        if not self.boxes:
            return
        widest = max(b.sizeHint().width() for b in self.boxes) + self._grid.horizontalSpacing()
        columns = max(1, min(len(self.boxes), (self.width() - 4) // max(widest, 1)))
        if columns == self._columns:
            return
        self._columns = columns
        for b in self.boxes:
            self._grid.removeWidget(b)
        for i, b in enumerate(self.boxes):
            self._grid.addWidget(b, i // columns, i % columns)
        for c in range(len(self.boxes)):
            self._grid.setColumnStretch(c, 0)
        self._grid.setColumnStretch(columns, 1)

    def resizeEvent(self, event) -> None:  # noqa: N802 (Qt name)
        super().resizeEvent(event)
        self._reflow()


class SideBySidePanel(QWidget):
    """Compare alternatives: key and chooser, overlaid profiles, Key Figures vs baseline, targets, checks."""

    results_updated = Signal()

    def __init__(self, doc, parent=None):
        super().__init__(parent)
        self.doc = doc
        self.setObjectName("SideBySidePanel")
        self._hidden: set[str] = set()  # alternative names not overlaid
        self._curves: dict[str, tuple] = {}
        self._boundaries: list[tuple] = []  # (line, plot), drawn once per position for all shown
        self._chooser_state: tuple = ()
        self._sized = False
        self._request_timer = QTimer(self)
        self._request_timer.setSingleShot(True)
        self._request_timer.setInterval(60)
        self._request_timer.timeout.connect(self._request)
        self._redraw_timer = QTimer(self)
        self._redraw_timer.setSingleShot(True)
        self._redraw_timer.setInterval(30)  # several alternatives arriving together: one redraw
        self._redraw_timer.timeout.connect(self.redraw)

        # --- the key and chooser
        self.chooser = AlternativeKey(self)
        self.chooser.toggled.connect(self._on_choice_changed)
        self.status = QLabel("", self)
        self.status.setObjectName("sideBySideStatus")
        self.status.setWordWrap(True)

        # --- plots, side by side
        self.temperature_plot = pg.PlotWidget(background="w")
        self.pressure_plot = pg.PlotWidget(background="w")
        for p in (self.temperature_plot, self.pressure_plot):
            p.showGrid(x=True, y=True, alpha=0.25)
            p.setMinimumHeight(110)  # the window must fit a 1280×800 screen
        self.pressure_plot.setXLink(self.temperature_plot)
        plots = QWidget(self)
        ph = QHBoxLayout(plots)
        ph.setContentsMargins(0, 0, 0, 0)
        ph.setSpacing(6)
        ph.addWidget(self.temperature_plot, 1)
        ph.addWidget(self.pressure_plot, 1)

        # --- tables
        self.figures_table = QTableWidget(self)
        self.figures_table.setObjectName("keyFiguresTable")
        self.targets_table = QTableWidget(self)
        self.targets_table.setObjectName("targetsTable")
        self.checks_table = QTableWidget(self)
        self.checks_table.setObjectName("checksTable")
        self._delegate = _TwoToneDelegate(self)
        for t in (self.figures_table, self.targets_table, self.checks_table):
            t.setEditTriggers(QAbstractItemView.NoEditTriggers)
            t.setSelectionMode(QAbstractItemView.NoSelection)
            t.setWordWrap(False)
            t.horizontalHeader().setDefaultAlignment(Qt.AlignLeft | Qt.AlignVCenter)
            t.horizontalHeader().setMinimumSectionSize(40)
            t.verticalHeader().setDefaultAlignment(Qt.AlignLeft | Qt.AlignVCenter)
            t.setHorizontalScrollMode(QAbstractItemView.ScrollPerPixel)
            t.setVerticalScrollMode(QAbstractItemView.ScrollPerPixel)
        for t in (self.figures_table, self.targets_table):
            t.setItemDelegate(self._delegate)
            t.horizontalHeader().setSectionResizeMode(QHeaderView.Fixed)
            t.verticalHeader().setSectionResizeMode(QHeaderView.Fixed)
            t.setIconSize(QSize(_ICON_W, _ICON_H))
        self.checks_table.setWordWrap(True)
        self.checks_table.verticalHeader().setVisible(False)
        self.checks_table.verticalHeader().setSectionResizeMode(QHeaderView.ResizeToContents)
        self.tabs = QTabWidget(self)
        self.tabs.setDocumentMode(True)
        self.tabs.addTab(self.figures_table, "Key Figures")
        self.tabs.addTab(self.targets_table, "Targets and verdict")
        self.tabs.addTab(self.checks_table, "Checks")

        self.splitter = QSplitter(Qt.Vertical, self)
        self.splitter.addWidget(plots)
        self.splitter.addWidget(self.tabs)
        self.splitter.setStretchFactor(0, 2)
        self.splitter.setStretchFactor(1, 3)
        self.splitter.setChildrenCollapsible(False)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(6, 4, 6, 4)
        layout.setSpacing(4)
        layout.addWidget(self.chooser)
        layout.addWidget(self.splitter, 1)
        layout.addWidget(self.status)

        doc.project_replaced.connect(self._on_project_replaced)
        doc.project_changed.connect(self.schedule)
        doc.alternative_solved.connect(self._on_alternative_solved)
        doc.units_changed.connect(lambda _s: self.redraw())
        self._rebuild_chooser()

    # ------------------------------------------------------------------ results (from the Document's runner)

    def schedule(self) -> None:
        """Ask the Document for what changed, soon (debounced); the view updates as results arrive.

        Hidden, it does nothing: an edit elsewhere costs no comparison work; showing it catches up.
        """
        if not self.isVisible():
            return
        self._rebuild_chooser()
        self._request_timer.start()

    def _on_project_replaced(self) -> None:
        self._hidden.clear()
        self.schedule()

    def _request(self) -> None:
        if not self.isVisible():
            return  # hidden: ask when shown (showEvent), so edits elsewhere stay quick
        self.doc.request_results()
        self.redraw()  # what is held already shows at once; the rest as it arrives

    def _on_alternative_solved(self, _name: str, _result, _error: str) -> None:
        if self.isVisible():
            self._redraw_timer.start()

    def solve_all_now(self) -> None:
        """Solve what is not held on this thread and redraw (scripts, tests)."""
        self._request_timer.stop()
        self.doc.results_now()
        self._rebuild_chooser()
        self.redraw()

    def wait_for_results(self, timeout_ms: int = 30000) -> None:
        """Process events until the Document holds every alternative's outcome, then redraw (tests)."""
        import time

        deadline = time.perf_counter() + timeout_ms / 1000.0
        while time.perf_counter() < deadline:
            QApplication.processEvents()
            if len(self.outcomes()) == len(self.doc.project.alternatives) and not self.doc.background_solving:
                break
            time.sleep(0.002)
        self.redraw()

    def outcomes(self) -> list[tuple[str, Optional[Result], Optional[str]]]:
        """(name, result, error) for every alternative whose outcome the Document holds, in project order."""
        out = []
        for i, alt in enumerate(self.doc.project.alternatives):
            held = self.doc.outcome_for(i)
            if held is not None:
                out.append((alt.name, held[0], held[1] or None))
        return out

    # ------------------------------------------------------------------ chooser

    def _rebuild_chooser(self) -> None:
        names = [a.name for a in self.doc.project.alternatives]
        state = (tuple(names), self.doc.project.baseline)
        self._hidden &= set(names)
        if state == self._chooser_state:
            return
        self._chooser_state = state
        self.chooser.set_alternatives(names, self._baseline_name(names), self._hidden)

    def _baseline_name(self, names: list[str]) -> Optional[str]:
        return names[comparison.baseline_index(names, self.doc.project.baseline)] if names else None

    def _on_choice_changed(self, name: str, shown: bool) -> None:
        if shown:
            self._hidden.discard(name)
        else:
            self._hidden.add(name)
        self.redraw()

    def set_overlaid(self, names) -> None:
        """Overlay exactly these alternatives."""
        wanted = set(names)
        self._hidden = {a.name for a in self.doc.project.alternatives if a.name not in wanted}
        self._chooser_state = ()
        self._rebuild_chooser()
        self.redraw()

    # ------------------------------------------------------------------ drawing

    def redraw(self) -> None:
        self._redraw_timer.stop()
        self._rebuild_chooser()
        system = self.doc.unit_system
        outcomes = self.outcomes()
        solved = [(n, r) for n, r, e in outcomes if r is not None]
        failed = [(n, e) for n, r, e in outcomes if r is None]
        n_alts = len(self.doc.project.alternatives)
        if len(outcomes) < n_alts:
            self.status.setText(f"Solving {n_alts - len(outcomes)} of {comparison.plural(n_alts, 'alternative')}…")
            self.status.setStyleSheet(f"color: {style.INK_MUTED};")
        elif failed:
            self.status.setText("Not solved (left out of the comparison): "
                                + "; ".join(f"{n}: {e}" for n, e in failed))
            self.status.setStyleSheet(f"color: {style.MISSED_COLOUR};")
        else:
            self.status.setText(f"{comparison.plural(len(solved), 'alternative')} solved; differences are "
                                f"against the baseline, {self._baseline_name([n for n, _ in solved]) or '—'}.")
            self.status.setStyleSheet(f"color: {style.INK_MUTED};")
        self._draw_plots(solved, system)
        self._fill_figures(solved, system)
        self._fill_targets(solved, system)
        self._fill_checks(solved)
        self.results_updated.emit()

    def _index_of(self, name: str) -> int:
        for i, a in enumerate(self.doc.project.alternatives):
            if a.name == name:
                return i
        return 0

    def _draw_plots(self, solved, system: str) -> None:
        tp, pp = self.temperature_plot.getPlotItem(), self.pressure_plot.getPlotItem()
        shown = {n for n, _ in solved if n not in self._hidden}
        for name in list(self._curves):
            if name not in shown:
                c_bulk, c_wall, c_pres = self._curves.pop(name)
                tp.removeItem(c_bulk)
                tp.removeItem(c_wall)
                pp.removeItem(c_pres)
        for line, plot in self._boundaries:
            plot.removeItem(line)
        self._boundaries = []
        ends: dict[float, list[str]] = {}  # boundary position (display units) -> "1: Pipe rack east", ...
        t_range, p_range = [math.inf, -math.inf], [math.inf, -math.inf]
        for name, r in solved:
            if name not in shown:
                continue
            i = self._index_of(name)
            x = units.to_display(np.asarray(r.profile.x_m, dtype=float), "length", system)
            bulk = units.to_display(np.asarray(r.profile.bulk_temperature_K, dtype=float), "temperature", system)
            wall = units.to_display(np.asarray(r.profile.inner_wall_temperature_K, dtype=float), "temperature", system)
            pres = units.to_display(np.asarray(r.profile.pressure_Pa, dtype=float), "pressure", system)
            if name not in self._curves:
                # created once per alternative shown; later redraws only set their data
                c_bulk = tp.plot(pen=alternative_pen(i, 2.4))
                c_wall = tp.plot(pen=alternative_pen(i, 1.0, alpha=140))  # same colour and style, thin
                c_pres = pp.plot(pen=alternative_pen(i, 2.0))
                self._curves[name] = (c_bulk, c_wall, c_pres)
            c_bulk, c_wall, c_pres = self._curves[name]
            c_bulk.setPen(alternative_pen(i, 2.4))
            c_wall.setPen(alternative_pen(i, 1.0, alpha=140))
            c_pres.setPen(alternative_pen(i, 2.0))
            c_bulk.setData(x, bulk)
            c_wall.setData(x, wall)
            c_pres.setData(x, pres)
            for arr, rng in ((bulk, t_range), (wall, t_range), (pres, p_range)):
                finite = arr[np.isfinite(arr)]
                if finite.size:
                    rng[0], rng[1] = min(rng[0], float(finite.min())), max(rng[1], float(finite.max()))
            for span in r.segments[:-1]:
                xb = round(float(units.to_display(span.x_end_m, "length", system)), 6)
                ends.setdefault(xb, []).append(f"{i + 1}: end of '{span.name}'")
        boundary_pen = QPen(QColor(style.CURVE_COLOURS["boundary"]))
        boundary_pen.setCosmetic(True)
        boundary_pen.setWidthF(1.0)
        boundary_pen.setStyle(Qt.DashLine)
        for xb, where in sorted(ends.items()):
            for plot in (tp, pp):
                line = pg.InfiniteLine(pos=xb, angle=90, pen=boundary_pen)
                line.setZValue(-10)  # behind the curves
                line.setToolTip("Segment boundary\n" + "\n".join(where))
                plot.addItem(line)
                self._boundaries.append((line, plot))
        # the one rule for the smallest value span (round-off on a flat profile must not look like a slope)
        min_t = minimum_span("temperature", system)
        min_p = minimum_span("pressure", system, p_range)
        for plot, rng, span in ((tp, t_range, min_t), (pp, p_range, min_p)):
            vb = plot.getViewBox()
            if math.isfinite(rng[0]) and rng[1] - rng[0] < span:
                mid = 0.5 * (rng[0] + rng[1])
                vb.enableAutoRange(axis=pg.ViewBox.YAxis, enable=False)
                vb.setYRange(mid - span / 2, mid + span / 2, padding=0.05)
            else:
                vb.enableAutoRange(axis=pg.ViewBox.YAxis, enable=True)
        tp.setTitle("Temperature: bulk (thick), inner wall (thin)", size="9pt")
        pp.setTitle("Pressure", size="9pt")
        tp.setLabel("left", f"Temperature [{units.label('temperature', system)}]")
        pp.setLabel("left", f"Pressure [{units.label('pressure', system)}]")
        for plot in (tp, pp):
            plot.setLabel("bottom", f"Position from inlet [{units.label('length', system)}]")

    # ------------------------------------------------------------------ tables

    def _alternative_headers(self, table: QTableWidget, names: list[str], baseline: str, values: list[int],
                             first_column: int = 0) -> None:
        """Set the column headers (number, line sample, the full name) and the column widths.

        ``values``: the width each column's cells need [px]. The names wrap on two lines, or on
        three when two would not let every column fit; the columns are all as wide as the widest
        needs when that fits (a grid reads more easily), else each as wide as it needs.
        """
        header = table.horizontalHeader()
        bold = QFont(header.font())
        bold.setBold(True)
        fonts = {False: QFontMetrics(header.font()), True: QFontMetrics(bold)}
        # the room once the row labels and a vertical scroll bar have theirs (the viewport may not know yet)
        room = (table.width() - 2 * table.frameWidth() - table.verticalHeader().sizeHint().width()
                - table.verticalScrollBar().sizeHint().width()
                - sum(table.columnWidth(c) for c in range(first_column)))
        labels = []
        for name in names:
            i = self._index_of(name)
            labels.append((i, name, f"{i + 1}  {name}" + (" (baseline)" if name == baseline else "")))
        for lines in (2, 3):
            wrapped = [wrap_lines(label, fonts[name == baseline], lines) for _i, name, label in labels]
            needed = [max(v, w + _ICON_W + 8 + _CELL_PADDING) for v, (_t, w) in zip(values, wrapped)]
            if sum(needed) <= room or lines == 3:
                break
        widths = _even_out(needed, room)
        for ci, ((i, name, _label), (text, _w)) in enumerate(zip(labels, wrapped)):
            is_base = name == baseline
            item = QTableWidgetItem(line_sample_icon(i), text)
            item.setToolTip(f"Alternative {i + 1}: {name}" + ("\nThe baseline: differences below are against it." if is_base else ""))
            item.setTextAlignment(Qt.AlignLeft | Qt.AlignVCenter)
            if is_base:
                item.setFont(bold)
            table.setHorizontalHeaderItem(first_column + ci, item)
            table.setColumnWidth(first_column + ci, widths[ci])

    @staticmethod
    def _set_row_heights(table: QTableWidget, fm: QFontMetrics) -> None:
        """Rows of two lines (value and difference); taller where a cell has more lines."""
        line = fm.lineSpacing()
        for r in range(table.rowCount()):
            lines = 2
            for c in range(table.columnCount()):
                item = table.item(r, c)
                if item is not None:
                    lines = max(lines, item.text().count("\n") + 1)
            table.setRowHeight(r, lines * line + 8)

    def _fill_figures(self, solved, system: str) -> None:
        t = self.figures_table
        t.clear()
        if not solved:
            t.setRowCount(0)
            t.setColumnCount(0)
            return
        names = [n for n, _ in solved]
        results = [r for _, r in solved]
        table = comparison.compare(results, self.doc.project.baseline)
        baseline = table.baseline_name
        fm = QFontMetrics(t.font())
        t.setColumnCount(len(names))
        t.setRowCount(len(table.rows) + 1)
        needed = [0] * len(names)
        # first row: the verdict at a glance (targets and checks together)
        head = QTableWidgetItem("Verdict")
        head.setToolTip("Design targets met, and the danger and warning Checks, of each alternative")
        t.setVerticalHeaderItem(0, head)
        for ci, r in enumerate(results):
            item = self._verdict_item(r, detail=False, fm=fm)
            t.setItem(0, ci, item)
            needed[ci] = max(needed[ci], text_width(item.text(), fm) + _CELL_PADDING)
        self._row_of = {}
        for ri, row in enumerate(table.rows, start=1):
            self._row_of[row.key] = ri
            head = QTableWidgetItem(row.spec.indented_label())
            head.setToolTip(row.spec.method)
            head.setData(Qt.UserRole, row.key)
            t.setVerticalHeaderItem(ri, head)
            ref = row.values[table.baseline_index]
            for ci, v in enumerate(row.values):
                text = comparison.format_figure(v, row.spec, system)
                if ci != table.baseline_index and v is not None:
                    text += "\n" + comparison.format_difference(row.differences[ci], ref, row.spec, system)
                item = QTableWidgetItem(text)
                item.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
                item.setToolTip(f"{row.label} — {names[ci]}")
                t.setItem(ri, ci, item)
                needed[ci] = max(needed[ci], text_width(text, fm) + _CELL_PADDING)
        self._set_row_heights(t, fm)
        self._alternative_headers(t, names, baseline, needed)

    def row_of(self, key: str) -> int:
        """The Key Figures table row of a figure key (row 0 is the verdict)."""
        return self._row_of[key]

    def _verdict_item(self, result: Result, detail: bool, fm: QFontMetrics) -> QTableWidgetItem:
        verdict = comparison.design_verdict(self.doc.project.targets, result)
        symbol = style.VERDICT_SYMBOLS.get(verdict.level, "")
        parts = verdict.text(detail=detail).split(" · ")
        # the targets first, the checks below (a warning is never hidden behind "met"); a check's
        # finding wraps so it does not set the column width
        lines = [parts[0]]
        for part in parts[1:]:
            count, _colon, finding = part.partition(": ")
            lines.append(count + (":" if finding else ""))
            if finding:
                lines.extend(wrap_lines(finding, fm, 2)[0].split("\n"))
        if not detail and len(lines) > 2:
            lines = [lines[0], " · ".join(lines[1:])]
        item = QTableWidgetItem(f"{symbol} " + "\n".join(lines))
        item.setForeground(QColor(style.VERDICT_COLOURS[verdict.level]))
        item.setData(Qt.UserRole, verdict.level)
        item.setData(ONE_COLOUR_ROLE, True)
        item.setToolTip(verdict.text(detail=True))
        item.setTextAlignment(Qt.AlignLeft | Qt.AlignVCenter)
        return item

    def _fill_targets(self, solved, system: str) -> None:
        """The verdict of each alternative, then each target (its limit under its name) met or missed."""
        t = self.targets_table
        t.clear()
        targets = self.doc.project.targets
        if not solved:
            t.setRowCount(1)
            t.setColumnCount(1)
            t.setHorizontalHeaderLabels([""])
            t.setVerticalHeaderLabels([""])
            t.setItem(0, 0, QTableWidgetItem("Nothing solved yet."))
            t.setColumnWidth(0, 400)
            return
        names = [n for n, _ in solved]
        results = [r for _, r in solved]
        baseline = names[comparison.baseline_index(names, self.doc.project.baseline)]
        per_alt = [comparison.target_verdicts(targets, r) for r in results]
        rows = per_alt[0] if per_alt else []
        fm = QFontMetrics(t.font())
        t.setColumnCount(len(results))
        t.setRowCount(len(rows) + 1)
        needed = [0] * len(names)
        head = QTableWidgetItem("Verdict" if comparison.targets_set(targets) else "Verdict\n(no targets set)")
        head.setToolTip("Design targets met, and the danger and warning Checks, of each alternative")
        t.setVerticalHeaderItem(0, head)
        for ci, r in enumerate(results):
            item = self._verdict_item(r, detail=True, fm=fm)
            t.setItem(0, ci, item)
            needed[ci] = max(needed[ci], text_width(item.text(), fm) + _CELL_PADDING)
        for ri, v0 in enumerate(rows, start=1):
            t.setVerticalHeaderItem(ri, QTableWidgetItem(f"{v0.label}\n{comparison.format_target(v0, system)}"))
            for ci, verdicts in enumerate(per_alt):
                v = verdicts[ri - 1]
                word = f"{style.VERDICT_SYMBOLS['met']} met" if v.met else f"{style.VERDICT_SYMBOLS['missed']} missed"
                item = QTableWidgetItem(f"{word}\n{units.format_value(v.value, v.quantity, system)}")
                item.setForeground(QColor(style.MET_COLOUR if v.met else style.MISSED_COLOUR))
                item.setData(Qt.UserRole, bool(v.met))
                item.setTextAlignment(Qt.AlignLeft | Qt.AlignVCenter)
                t.setItem(ri, ci, item)
                needed[ci] = max(needed[ci], text_width(item.text(), fm) + _CELL_PADDING)
        self._set_row_heights(t, fm)
        self._alternative_headers(t, names, baseline, needed)

    def _fill_checks(self, solved) -> None:
        t = self.checks_table
        t.clear()
        system = self.doc.unit_system
        rows = []  # (alternative index, name, severity, where, finding)
        for name, r in solved:
            i = self._index_of(name)
            alt = self.doc.project.alternatives[i]
            if not r.checks:
                rows.append((i, name, "ok", "", "No findings."))
            for c in sorted(r.checks, key=check_sort_key):
                where = []
                if c.segment is not None and 0 <= c.segment < len(alt.segments):
                    where.append(alt.segments[c.segment].name)
                if c.x_m is not None and math.isfinite(c.x_m):
                    where.append(units.format_value(c.x_m, "length", system))
                rows.append((i, name, c.severity, " at ".join(where), units.check_message(c, system)))
        t.setColumnCount(4)
        t.setRowCount(len(rows))
        t.setHorizontalHeaderLabels(["Alternative", "Severity", "Where", "Finding"])
        fm = QFontMetrics(t.font())
        widths = [fm.horizontalAdvance("Alternative"), fm.horizontalAdvance("Severity"), fm.horizontalAdvance("Where")]
        for ri, (i, name, severity, where, finding) in enumerate(rows):
            alt_item = QTableWidgetItem(line_sample_icon(i), name)
            alt_item.setToolTip(f"Alternative {i + 1}: {name}")
            t.setItem(ri, 0, alt_item)
            sev = style.OK_STYLE if severity == "ok" else style.severity_style(severity)
            sev_item = QTableWidgetItem(style.severity_icon(severity), sev.word)
            sev_item.setForeground(QColor(style.SEVERITY_WORDS.get(severity, ("", style.MET_COLOUR))[1]))
            t.setItem(ri, 1, sev_item)
            t.setItem(ri, 2, QTableWidgetItem(where))
            t.setItem(ri, 3, QTableWidgetItem(finding))
            widths[0] = max(widths[0], fm.horizontalAdvance(name) + _ICON_W + 8)
            widths[1] = max(widths[1], fm.horizontalAdvance(sev.word) + 22)
            widths[2] = max(widths[2], fm.horizontalAdvance(where))
        t.setIconSize(QSize(_ICON_W, 14))
        for c, w in enumerate(widths):
            t.setColumnWidth(c, w + _CELL_PADDING + 6)
        t.horizontalHeader().setSectionResizeMode(3, QHeaderView.Stretch)

    def showEvent(self, event) -> None:  # noqa: N802 (Qt name)
        super().showEvent(event)
        if not self._sized:
            self._sized = True
            h = max(self.splitter.height(), 400)
            self.splitter.setSizes([int(h * 0.36), h - int(h * 0.36)])  # the table gets most: it holds the numbers
        self.schedule()

    def resizeEvent(self, event) -> None:  # noqa: N802 (Qt name)
        super().resizeEvent(event)
        if self.isVisible() and self.figures_table.columnCount():
            self._redraw_timer.start()  # column widths follow the room there is
