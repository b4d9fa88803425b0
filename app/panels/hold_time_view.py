"""Hold Time: what the line's temperature does after the flow stops, heating off (power failure) and on.

Plots the bulk temperature of the coldest few segments against the hours since the flow stopped
(:class:`solver.hold_time.HoldTime`, worked out with the result on the solve thread), the freezing
point and the maintain temperature as horizontal lines, and under it a table per segment: time to
the maintain temperature and to freezing with the heating off and on, frozen solid, warm-up, and the
Biot number with its warning. Pointing at the plot reads every shown curve at that time.

Curves are created once and updated with ``setData``; colours are the Okabe–Ito alternative
colours of :mod:`app.style`, and heating off / on differ in line style too (solid / dashed).
"""

from __future__ import annotations

import math
from typing import Optional

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt
from PySide6.QtGui import QBrush, QPen
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHeaderView,
    QLabel,
    QSplitter,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from app import design_figures, style, units
from app.panels.profiles import LegendStrip, plain_plot, plot_stack
from solver.hold_time import BIOT_LIMIT

#: Curves closer than this all along [K] are drawn as one (one would hide the other); the table has each.
ALIKE_K = 0.3
#: At most this many segments are drawn (the coldest: first to reach the limit with the heating off).
MAX_CURVES = 4

COLUMNS = ("Segment", "To maintain\npower off", "To maintain\nheating on", "To freezing\npower off",
           "To freezing\nheating on", "Frozen solid\npower off", "Warm-up\nfrom cold", "Biot\nnumber")
_COLUMN_TIPS = (
    "",
    "Time from the operating temperature down to the maintain temperature after the flow stops, all heating off.",
    "As before, with the heating on (per its kind). 'holds': not reached within 30 days.",
    "Time to the fluid's freezing point after the flow stops, all heating off (power failure).",
    "Time to the freezing point with the heating on.",
    "Time until the latent heat is drawn out and the fluid is frozen solid, heating off.",
    "From the worst-case ambient (frozen where the fluid freezes there) up to the maintain temperature, heating "
    "on. 'never': the heating cannot get it there.",
    f"Standing fluid's conduction against the outside path; above {BIOT_LIMIT} the lumped times are "
    "optimistic for the wall (Incropera & DeWitt §5.2).",
)


def _pen(colour: str, dashed: bool) -> QPen:
    return style.colour_pen(colour, 2.0, "dash" if dashed else "solid")


def coldest_segments(hold, limit: int = MAX_CURVES) -> list[list[int]]:
    """The segments to draw, as groups of segment indices (of the alternative) whose curves are alike
    (within :data:`ALIKE_K`, heating off and on: one curve would hide the other), coldest first: the first to
    reach the maintain temperature (or freezing) with the heating off, then the lowest at the end.
    At most ``limit`` groups."""
    def rank(s):
        first = s.to_limit_off_s if s.to_limit_off_s is not None else s.to_freezing_off_s
        first = math.inf if first is None else first
        end = hold.bulk_off_K[-1, s.index]
        return (first, end if math.isfinite(end) else math.inf, s.index)

    groups: list[list[int]] = []
    for s in sorted(hold.segments, key=rank):
        i = s.index
        for g in groups:
            j = g[0]
            if (np.allclose(hold.bulk_off_K[:, i], hold.bulk_off_K[:, j], atol=ALIKE_K, rtol=0.0, equal_nan=True)
                    and np.allclose(hold.bulk_on_K[:, i], hold.bulk_on_K[:, j], atol=ALIKE_K, rtol=0.0, equal_nan=True)):
                g.append(i)
                break
        else:
            if len(groups) < limit:
                groups.append([i])
    return groups


class HoldTimeView(QWidget):
    """``HoldTimeView(doc)``: the Hold Time of the current alternative; observes the Document.

    Public: ``plot`` (pg.PlotItem), ``curves`` (list of (off, on) PlotDataItems), ``shown`` (segment
    indices drawn), ``freezing_line`` / ``limit_line`` (pg.InfiniteLine), ``table``, ``note``,
    ``readout``, ``warnings`` (QLabels), :meth:`cell` (row, column -> text), :meth:`readout_at`.
    """

    def __init__(self, doc, parent: Optional[QWidget] = None):
        super().__init__(parent)
        self.doc = doc
        self.setObjectName("HoldTime")
        self.setWindowTitle("Hold Time")
        self.hold = None  # the HoldTime on show
        self.shown: list[int] = []  # segment index of each drawn curve
        self.groups: list[list[int]] = []  # per drawn curve, the segments it stands for
        self._shown_for: tuple = ()

        # labels here never wrap (one line each, the readout one line per curve): the view fills the room
        # it is given (see hasHeightForWidth), and a wrapped label would not get the height it needs
        self.note = QLabel("")
        self.note.setStyleSheet(f"color: {style.INK}; padding: 3px 6px;")
        self.legend = LegendStrip(self)
        self.graphics = pg.PlotWidget(background=style.PANEL_BG)
        self.graphics.setMinimumHeight(120)  # (in the main window the dock scrolls below this view's minimum)
        self.plot: pg.PlotItem = self.graphics.getPlotItem()
        plain_plot(self.plot)
        self.plot.setLabel("bottom", "Hours since the flow stopped", color=style.INK)
        self.curves: list[tuple[pg.PlotDataItem, pg.PlotDataItem]] = []
        for k in range(MAX_CURVES):
            colour = style.ALTERNATIVE_COLOURS[k % len(style.ALTERNATIVE_COLOURS)]
            off = pg.PlotDataItem([], [], pen=_pen(colour, False))
            on = pg.PlotDataItem([], [], pen=_pen(colour, True))
            self.plot.addItem(off)
            self.plot.addItem(on)
            self.curves.append((off, on))
        # the two temperatures are named in the legend strip (with their values), never over the curves
        self.freezing_line = pg.InfiniteLine(angle=0, movable=False, pen=style.colour_pen(style.OKABE_ITO["blue"], 1.5, "dashdot"))
        self.limit_line = pg.InfiniteLine(angle=0, movable=False, pen=style.colour_pen(style.CURVE_COLOURS["limit"], 1.5, "dot"))
        self.cursor = pg.InfiniteLine(angle=90, movable=False,
                                      pen=pg.mkPen(style.CURVE_COLOURS["cursor"], width=1, style=Qt.DotLine))
        for line in (self.freezing_line, self.limit_line, self.cursor):
            self.plot.addItem(line, ignoreBounds=True)
            line.hide()
        self.graphics.scene().sigMouseMoved.connect(self._on_mouse_moved)
        self.readout = QLabel("")
        self.readout.setTextFormat(Qt.RichText)
        self.readout.setStyleSheet(f"color: {style.INK}; padding: 2px 6px;")

        self.table = QTableWidget(0, len(COLUMNS), self)
        self.table.setHorizontalHeaderLabels(list(COLUMNS))
        for col, tip in enumerate(_COLUMN_TIPS):
            if tip:
                self.table.horizontalHeaderItem(col).setToolTip(tip)
        self.table.verticalHeader().hide()
        self.table.setEditTriggers(QAbstractItemView.NoEditTriggers)
        self.table.setSelectionBehavior(QAbstractItemView.SelectRows)
        self.table.setShowGrid(False)
        self.table.verticalHeader().setDefaultSectionSize(22)
        h = self.table.horizontalHeader()
        h.setSectionResizeMode(QHeaderView.Stretch)
        h.setSectionResizeMode(0, QHeaderView.ResizeToContents)
        self.table.setMinimumHeight(96)  # the header and three segments at least
        self.warnings = QLabel("")
        self.warnings.setStyleSheet(f"color: {style.WARNING_TEXT}; padding: 2px 6px;")

        top = plot_stack(self.legend, self.graphics, self.readout)
        bottom = QWidget()
        bottom_lay = QVBoxLayout(bottom)
        bottom_lay.setContentsMargins(0, 0, 0, 0)
        bottom_lay.setSpacing(0)
        bottom_lay.addWidget(self.table, 1)
        bottom_lay.addWidget(self.warnings)
        split = QSplitter(Qt.Vertical, self)
        split.addWidget(top)
        split.addWidget(bottom)
        split.setStretchFactor(0, 3)
        split.setStretchFactor(1, 2)
        split.setChildrenCollapsible(False)
        self.splitter = split
        lay = QVBoxLayout(self)
        lay.setContentsMargins(0, 0, 0, 0)
        lay.setSpacing(0)
        lay.addWidget(self.note)
        lay.addWidget(split, 1)

        doc.result_ready.connect(lambda _r: self.refresh())
        doc.solve_failed.connect(lambda _m: self.refresh())
        doc.units_changed.connect(lambda _s: self.refresh())
        doc.current_alternative_changed.connect(lambda _i: self.refresh())
        doc.project_replaced.connect(self.refresh)
        doc.hold_time_ready.connect(lambda r: self.refresh() if r is self.doc.result else None)
        self.refresh()

    # ------------------------------------------------------------------ showing a result

    def refresh(self, shown: bool = False) -> None:
        """Show the Hold Time of the result on screen. In a shown window while this view is out of
        sight (a tab behind the Checks) it waits until it is shown (``shown``: it is being shown now)."""
        res = self.doc.result
        system = self.doc.unit_system
        if self.doc.hold_time_pending(res):
            return  # its Hold Time is on its way (hold_time_ready): the last one stays until then
        if (not shown and self.window() is not self and self.window().isVisible()
                and (not self.isVisible() or self.visibleRegion().isEmpty())):
            self._shown_for = ()
            return  # a tab out of sight in a shown window: drawn when shown (refresh(shown=True))
        key = (res, system, self.doc.result_is_stale, self.doc.last_error)
        if self._shown_for and self._shown_for[0] is res and self._shown_for[1:] == key[1:]:
            return
        self._shown_for = key
        design = getattr(res, "design", None)
        hold = self.doc.hold_time_of(res)  # worked out on the worker, never here
        if hold is None:
            self._clear()
            if res is None:
                msg = (f"The line did not solve: {self.doc.last_error}" if self.doc.last_error
                       else "The Hold Time appears once the line is solved.")
            elif design is None:
                msg = "The Hold Time appears once the line is solved with its design cases."
            else:
                msg = "No Hold Time: no segment can stand still in air or soil (jackets and fixed walls hold their own)."
            self.note.setText(msg)
            return
        self.hold = hold
        self._show_curves(res, hold, system)
        self._fill_table(hold)
        cases = design.cases
        wind = units.format_value(cases.worst_wind_speed_m_per_s, "velocity", system, digits=3)
        n_all = len(hold.segments)
        n_drawn = sum(len(g) for g in self.groups)
        which = (f"the coldest {n_drawn} of {n_all} segments" if n_drawn < n_all
                 else ("the segment" if n_all == 1 else f"all {n_all} segments"))
        heated = any(on.yData is not None and len(on.yData) for _off, on in self.curves)
        note = (f"After the flow stops, worst case ({units.format_value(cases.worst_air_temperature_K, 'temperature', system)}, "
                f"wind {wind}): {which}" + ("." if heated else "; no heating on these."))
        if self.doc.result_is_stale:
            note = "Stale: the last edit could not be solved; this is the previous result. " + note
        self.note.setText(note)
        warnings = list(hold.warnings)
        if warnings and all("Biot number" in w for w in warnings):
            count = sum(1 for s in hold.segments if math.isfinite(s.biot_number) and s.biot_number > BIOT_LIMIT)
            where = "1 segment" if count == 1 else f"{count} segments"
            warnings = [f"⚠ Biot number above {BIOT_LIMIT} at {where}: the times are optimistic for the wall "
                        "(point here)."]
        self.warnings.setText("\n".join(warnings))
        self.warnings.setToolTip("\n".join(hold.warnings))
        self.warnings.setVisible(bool(warnings))

    def hasHeightForWidth(self) -> bool:  # noqa: N802 (Qt)
        # the legend's wrapping would make a scroll area size this view to its full preferred height;
        # it fills the room it is given instead (scrolling only below its minimum)
        return False

    def heightForWidth(self, _width: int) -> int:  # noqa: N802 (Qt)
        return -1  # (a scroll area asks this whatever hasHeightForWidth says)

    def showEvent(self, event) -> None:  # noqa: N802 (Qt)
        super().showEvent(event)
        self.refresh(shown=True)

    def _clear(self) -> None:
        self.hold = None
        self.shown = []
        for off, on in self.curves:
            off.setData([], [])
            on.setData([], [])
        for line in (self.freezing_line, self.limit_line, self.cursor):
            line.hide()
        self.legend.set_entries([])
        self.table.setRowCount(0)
        self.readout.setText("")
        self.warnings.setText("")
        self.warnings.hide()

    def _show_curves(self, res, hold, system: str) -> None:
        self.groups = coldest_segments(hold)
        self.shown = [g[0] for g in self.groups]
        hours = np.asarray(hold.time_s, dtype=float) / 3600.0
        u = units.unit("temperature", system)
        entries = []
        heated = False  # any heating-on curve that differs from its power-off one
        names = {s.index: s.name for s in hold.segments}
        for k, (off, on) in enumerate(self.curves):
            if k < len(self.shown):
                i = self.shown[k]
                off.setData(hours, u.from_si(hold.bulk_off_K[:, i]))
                on_values = hold.bulk_on_K[:, i]
                if np.allclose(on_values, hold.bulk_off_K[:, i], equal_nan=True):
                    on.setData([], [])  # no heating: the dashed curve would only hide the solid one
                else:
                    on.setData(hours, u.from_si(on_values))
                    heated = True
                alike = len(self.groups[k]) - 1
                entries.append((names[i] + (f" and {alike} alike" if alike else ""), off.opts["pen"]))
            else:
                off.setData([], [])
                on.setData([], [])
        if heated:
            entries.append(("power off", _pen(style.INK_MUTED, False)))
            entries.append(("heating on", _pen(style.INK_MUTED, True)))
        self.plot.setLabel("left", f"Bulk temperature [{u.label}]", color=style.INK)
        lows, highs = [], []
        for i in self.shown:
            for arr in (hold.bulk_off_K[:, i], hold.bulk_on_K[:, i]):
                finite = arr[np.isfinite(arr)]
                if finite.size:
                    lows.append(float(finite.min()))
                    highs.append(float(finite.max()))
        for line, value, words in ((self.freezing_line, hold.freezing_point_K, "freezing"),
                                   (self.limit_line, hold.limit_temperature_K, "maintain")):
            if value is None:
                line.hide()
                continue
            line.setValue(float(u.from_si(value)))
            entries.append((f"{words} {units.format_value(value, 'temperature', system)}", line.pen))
            line.show()
            lows.append(value)
            highs.append(value)
        self.legend.set_entries(entries)
        if lows and hours.size:
            lo, hi = float(u.from_si(min(lows))), float(u.from_si(max(highs)))
            pad = max(0.05 * (hi - lo), 1.0)
            self.plot.setRange(xRange=(0.0, float(hours[-1])), yRange=(lo - pad, hi + pad), padding=0)
        self.cursor.hide()
        self.readout.setText("Point at the plot to read the temperatures at that time.")

    def _fill_table(self, hold) -> None:
        self.table.setRowCount(len(hold.segments))
        for r, s in enumerate(hold.segments):
            biot = "—" if not math.isfinite(s.biot_number) else f"{s.biot_number:.2f}"
            warn = math.isfinite(s.biot_number) and s.biot_number > BIOT_LIMIT
            texts = (s.name, design_figures.duration_text(s.to_limit_off_s),
                     design_figures.duration_text(s.to_limit_on_s), design_figures.duration_text(s.to_freezing_off_s),
                     design_figures.duration_text(s.to_freezing_on_s), design_figures.duration_text(s.frozen_solid_off_s),
                     design_figures.duration_text(s.warm_up_s, never="never"), biot + (" ⚠" if warn else ""))
            for col, text in enumerate(texts):
                item = self.table.item(r, col)
                if item is None:
                    item = QTableWidgetItem("")
                    if col:
                        item.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
                    self.table.setItem(r, col, item)
                item.setText(text)
                colour = style.WARNING_TEXT if (col == 7 and warn) else (style.INK_MUTED if text == "—" else style.INK)
                item.setForeground(QBrush(style.qcolor(colour)))
            k = next((k for k, g in enumerate(self.groups) if s.index in g), None)
            if k is not None:  # the row's swatch: the colour of its curve
                colour = style.ALTERNATIVE_COLOURS[k % len(style.ALTERNATIVE_COLOURS)]
                self.table.item(r, 0).setText(f"■ {s.name}")
                self.table.item(r, 0).setForeground(QBrush(style.qcolor(colour)))
                self.table.item(r, 0).setToolTip(f"{s.name}: drawn in this colour")

    def cell(self, row: int, column: int) -> str:
        """The text of a table cell (the swatch in front of a drawn segment's name left out)."""
        text = self.table.item(row, column).text()
        return text[2:] if column == 0 and text.startswith("■ ") else text

    # ------------------------------------------------------------------ pointing

    def _on_mouse_moved(self, scene_pos) -> None:
        if self.hold is None or not self.plot.sceneBoundingRect().contains(scene_pos):
            return
        hours = self.plot.vb.mapSceneToView(scene_pos).x()
        self.show_cursor(hours)

    def show_cursor(self, hours: float) -> None:
        """Put the cursor at ``hours`` since the flow stopped and fill the readout (also for tests)."""
        if self.hold is None:
            return
        self.cursor.setValue(hours)
        self.cursor.show()
        self.readout.setText(self.readout_at(hours))

    def readout_at(self, hours: float) -> str:
        """Rich text: each drawn segment's bulk temperature at the time nearest ``hours``, off and on."""
        hold = self.hold
        if hold is None or not self.shown:
            return ""
        t = np.asarray(hold.time_s, dtype=float) / 3600.0
        hours = min(max(hours, 0.0), float(t[-1]))
        system = self.doc.unit_system
        names = {s.index: s.name for s in hold.segments}

        def at(curve) -> float:
            return float(np.interp(hours, t, curve)) if np.isfinite(curve).all() else math.nan

        parts = [f"<b>{design_figures.duration_text(hours * 3600.0)} after the flow stopped</b>"]
        for k, i in enumerate(self.shown):
            colour = style.ALTERNATIVE_COLOURS[k % len(style.ALTERNATIVE_COLOURS)]
            t_off, t_on = at(hold.bulk_off_K[:, i]), at(hold.bulk_on_K[:, i])
            alike = len(self.groups[k]) - 1
            text = f"<span style='color:{colour}'>■</span> {names[i]}" + (f" (and {alike} alike): " if alike else ": ")
            if t_on == t_off or not math.isfinite(t_on):  # no heating: one curve
                text += units.format_value(t_off, "temperature", system)
            else:
                text += (f"power off {units.format_value(t_off, 'temperature', system)}, "
                         f"heating on {units.format_value(t_on, 'temperature', system)}")
            parts.append(text)
        return "<br>".join(parts)
