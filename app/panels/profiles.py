"""Profiles: temperatures and pressure along the line (pyqtgraph), with a hover readout.

Two stacked plots share the position axis: bulk, inner-wall and outer-surface temperature
(saturation temperature dashed where the fluid has one), and pressure. Segment boundaries are
vertical lines named after the segment that starts there; the alternative's limits are dashed
horizontal lines, named in the right-hand margin at their height so no label ever covers a curve.
Every axis keeps a sensible minimum span (a line that holds its temperature does not blow
round-off up into a slope) and tick labels never use exponents. Curves are created once and
updated with ``setData``; arrays are converted to the display unit system on the way in. When a
solve fails the last curves stay and a note says they are stale.
"""

from __future__ import annotations

import math
import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QLineF, QPointF, QRectF, QSize, Qt
from PySide6.QtGui import QBrush, QColor, QFont, QFontMetrics, QPainter, QPen
from PySide6.QtWidgets import QGraphicsSimpleTextItem, QLabel, QSizePolicy, QVBoxLayout, QWidget

from app import style
from app.units import format_value, from_display, label as unit_label, to_display, unit

# curve key -> (legend name, Profile attribute, line style, width)
TEMPERATURE_CURVES: dict[str, tuple[str, str, str, float]] = {
    "bulk": ("Bulk", "bulk_temperature_K", "solid", 2.6),
    "inner_wall": ("Inner wall", "inner_wall_temperature_K", "solid", 1.8),
    "outer_surface": ("Outer surface", "outer_surface_temperature_K", "dot", 2.0),
    "saturation": ("Saturation", "saturation_temperature_K", "dash", 1.6),
}


#: Smallest span of each value axis as an SI difference (K, Pa). Below it, round-off and tiny real
#: changes would fill the plot's height and read as a steep slope: 2 K is about the resolution at
#: which an engineer reads a temperature profile, 0.1 bar a pressure profile (common practice).
MIN_SPAN_SI: dict[str, float] = {"temperature": 2.0, "pressure": 10_000.0}

#: Limit lines: key -> (short name shown in the margin, full name for the tooltip, curve colour key).
LIMIT_NAMES: dict[str, tuple[str, str, str]] = {
    "max_wall": ("max wall", "Maximum inner-wall temperature", "inner_wall"),
    "min_bulk": ("min bulk", "Minimum bulk temperature", "bulk"),
}


def _display(values, quantity: str, system: str) -> np.ndarray:
    return to_display(np.asarray(values, dtype=float), quantity, system)


def min_span(quantity: str, system: str) -> float:
    """The smallest span of an axis showing ``quantity`` ('temperature' or 'pressure'), in display units."""
    return MIN_SPAN_SI[quantity] * unit(quantity, system).scale  # a span: the scale, no offset


class _PlainAxis(pg.AxisItem):
    """An axis whose tick labels are plain decimals, never exponent form ("2e-05", "1.2e+04")."""

    def tickStrings(self, values, scale, spacing):
        step = spacing * scale
        places = max(0, math.ceil(-math.log10(step))) if step > 0 and math.isfinite(step) else 0
        out = []
        for v in values:
            text = f"{v * scale:.{places}f}"
            out.append(text[1:] if text.startswith("-") and float(text) == 0 else text)  # no "-0.0"
        return out


class _GridLines(pg.GraphicsObject):
    """Grid lines of a plot at its axes' ticks, drawn behind the curves in solid colours.

    Same places and strengths as pyqtgraph's own grid (``showGrid``), whose faint lines are drawn
    with transparency over the whole view by each axis: blending those cost ~10 ms per repaint.
    On the plain plot background a colour mixed in advance looks the same and draws quickly.
    """

    def __init__(self, plot: pg.PlotItem, alpha: float, colour: str, background: str):
        super().__init__()
        self.plot = plot
        self.alpha = alpha
        self._ink = style.qcolor(colour)
        self._paper = style.qcolor(background)
        self.setAcceptedMouseButtons(Qt.NoButton)
        self.setAcceptHoverEvents(False)
        self.setZValue(-1000)
        plot.vb.sigRangeChanged.connect(self._moved)
        plot.vb.sigResized.connect(self._moved)

    def _moved(self, *_args) -> None:
        self.prepareGeometryChange()
        self.update()

    def boundingRect(self) -> QRectF:
        return self.plot.vb.viewRect()

    def _mixed(self, alpha: float) -> QColor:
        a = min(1.0, max(0.0, alpha / 255.0))
        ink, paper = self._ink, self._paper
        return QColor(round(ink.red() * a + paper.red() * (1 - a)),
                      round(ink.green() * a + paper.green() * (1 - a)),
                      round(ink.blue() * a + paper.blue() * (1 - a)))

    def paint(self, p, *_args) -> None:
        vb = self.plot.vb
        rect = vb.viewRect()
        p.setRenderHint(p.RenderHint.Antialiasing, False)
        grid = int(min(255, max(0, self.alpha * 255)))
        for name, lo, hi, pixels in (("bottom", rect.left(), rect.right(), vb.width()),
                                     ("left", rect.top(), rect.bottom(), vb.height())):
            if pixels <= 0 or hi <= lo:
                continue
            levels = self.plot.getAxis(name).tickValues(lo, hi, pixels)
            # strongest level last, so it is the one seen where levels coincide
            for i in reversed(range(len(levels))):
                ticks = levels[i][1]
                alpha = 255 / (i + 1) * grid / 255.0 * min(1.0, max(0.0, 0.05 * pixels / (len(ticks) + 1)))
                pen = QPen(self._mixed(alpha), 0)
                pen.setCosmetic(True)
                p.setPen(pen)
                if name == "bottom":
                    lines = [QLineF(v, rect.top(), v, rect.bottom()) for v in ticks if lo <= v <= hi]
                else:
                    lines = [QLineF(rect.left(), v, rect.right(), v) for v in ticks if lo <= v <= hi]
                if lines:
                    p.drawLines(lines)


class LegendStrip(QWidget):
    """The curves' names, each after a short stretch of its own pen, wrapped onto as many rows as
    the width needs (a legend inside the plot either hides a curve or pushes the plots out of a
    narrow panel). Public: ``entries`` (list of (name, pen)), :meth:`rows` (width -> rows of names).
    """

    SAMPLE = 24  # px of line drawn before each name
    GAP = 16  # px between entries
    PAD = 6  # px at the left and right

    def __init__(self, parent=None):
        super().__init__(parent)
        self.entries: list[tuple[str, QPen]] = []
        sp = QSizePolicy(QSizePolicy.Preferred, QSizePolicy.Preferred)
        sp.setHeightForWidth(True)
        self.setSizePolicy(sp)
        self.setAutoFillBackground(True)  # the plots' paper, so legend and plots read as one
        palette = self.palette()
        palette.setColor(self.backgroundRole(), style.qcolor(style.PANEL_BG))
        self.setPalette(palette)

    def set_entries(self, entries) -> None:
        names = [name for name, _pen in entries]
        if names == [name for name, _pen in self.entries]:
            return
        self.entries = [(name, QPen(pen)) for name, pen in entries]
        self.updateGeometry()
        self.update()

    def _entry_width(self, name: str) -> int:
        return self.SAMPLE + 6 + self.fontMetrics().horizontalAdvance(name)

    def rows(self, width: int) -> list[list[str]]:
        """The names on each row at ``width`` pixels."""
        rows: list[list[str]] = [[]]
        x = self.PAD
        for name, _pen in self.entries:
            w = self._entry_width(name)
            if rows[-1] and x + w > width - self.PAD:
                rows.append([])
                x = self.PAD
            rows[-1].append(name)
            x += w + self.GAP
        return rows

    def _row_height(self) -> int:
        return self.fontMetrics().height() + 6

    def hasHeightForWidth(self) -> bool:
        return True

    def heightForWidth(self, width: int) -> int:
        return len(self.rows(width)) * self._row_height() + 4

    def sizeHint(self):
        width = 2 * self.PAD + sum(self._entry_width(n) + self.GAP for n, _p in self.entries)
        return QSize(width, self._row_height() + 4)

    def minimumSizeHint(self):
        return QSize(0, self._row_height() + 4)

    def paintEvent(self, _event) -> None:
        p = QPainter(self)
        p.setRenderHint(QPainter.Antialiasing, True)
        pens = dict(self.entries)
        row_h = self._row_height()
        fm = self.fontMetrics()
        for r, names in enumerate(self.rows(self.width())):
            y = 2 + r * row_h + row_h / 2
            x = self.PAD
            for name in names:
                p.setPen(pens[name])
                p.drawLine(QPointF(x, y), QPointF(x + self.SAMPLE, y))
                p.setPen(style.qcolor(style.INK))
                p.drawText(QPointF(x + self.SAMPLE + 6, y + (fm.ascent() - fm.descent()) / 2), name)
                x += self._entry_width(name) + self.GAP
        p.end()


class ProfilesPanel(QWidget):
    """``ProfilesPanel(doc)``: plots of the current result; observes the Document.

    Public for tests and other panels: ``curves`` (dict of PlotDataItem: bulk, inner_wall,
    outer_surface, saturation, pressure), ``temperature_plot``, ``pressure_plot``,
    ``readout`` (QLabel), ``stale_note`` (QLabel), ``marker_lines``, ``limit_lines``,
    :meth:`readout_at` (x_m -> text).
    """

    def __init__(self, doc, parent=None):
        super().__init__(parent)
        self.doc = doc
        self.setObjectName("Profiles")
        self.setWindowTitle("Profiles")
        self._result = None  # the result on screen (may be stale)
        self._boundaries: list[tuple[pg.InfiniteLine, pg.InfiniteLine]] = []
        self._hover_x_m: float = math.nan
        self._boundary_names: list[tuple[float, float, str]] = []
        self._labels_system = ""  # unit system the axis labels were last written in
        self._short_labels: dict[int, tuple[str, bool]] = {}  # plot id -> (system, value-axis title short)
        self._grid_lines: list[_GridLines] = []

        self.stale_note = QLabel("")
        self.stale_note.setWordWrap(True)
        self.stale_note.setStyleSheet(
            f"background: #FCF0D8; color: {style.INK}; border: 1px solid {style.OKABE_ITO['orange']};"
            "border-radius: 4px; padding: 4px 8px;"
        )
        self.stale_note.hide()

        self.graphics = pg.GraphicsLayoutWidget()
        self.graphics.setBackground(style.PANEL_BG)
        self.graphics.ci.setContentsMargins(4, 4, 8, 4)
        self.graphics.ci.setSpacing(2)
        # a legend row of its own above the plots, so it never hides a curve
        self.legend = LegendStrip(self)
        self.temperature_plot: pg.PlotItem = self.graphics.addPlot(
            row=0, col=0, axisItems={name: _PlainAxis(name) for name in ("left", "bottom", "right")})
        self.pressure_plot: pg.PlotItem = self.graphics.addPlot(
            row=1, col=0, axisItems={name: _PlainAxis(name) for name in ("left", "bottom", "right")})
        self.graphics.ci.layout.setRowStretchFactor(0, 3)
        self.graphics.ci.layout.setRowStretchFactor(1, 2)
        self.pressure_plot.setXLink(self.temperature_plot)
        for plot in (self.temperature_plot, self.pressure_plot):
            grid = _GridLines(plot, 0.18, style.INK_MUTED, style.PANEL_BG)
            plot.vb.addItem(grid, ignoreBounds=True)
            self._grid_lines.append(grid)
            plot.setMenuEnabled(True)
            plot.hideButtons()
            for name in ("left", "bottom"):
                ax = plot.getAxis(name)
                ax.setPen(pg.mkPen(style.INK_MUTED))
                ax.setTextPen(pg.mkPen(style.INK))
                ax.enableAutoSIPrefix(False)
                ax.setStyle(tickLength=0)  # the grid lines (_GridLines) mark the ticks, as pyqtgraph's grid did
            plot.getAxis("left").setWidth(64)
            # the right margin holds the limit names (both plots, so their x axes stay aligned)
            right = plot.getAxis("right")
            right.setPen(pg.mkPen(style.GRID))
            right.setStyle(showValues=False, tickLength=0)
            right.setTicks([[], []])
            plot.vb.sigResized.connect(self._fit_axis_labels)
        self.temperature_plot.getAxis("bottom").setStyle(showValues=False)
        # segment names along the top, centred on each segment (set in _layout_boundary_labels)
        self.temperature_plot.showAxis("top")
        self.top_axis = self.temperature_plot.getAxis("top")
        self.top_axis.setPen(pg.mkPen(style.GRID))
        self.top_axis.setTextPen(pg.mkPen(style.INK_MUTED))
        # the names are measured with the font they are drawn in, so an elided name always fits
        self._name_font = QFont(self.font())
        self._name_font.setPointSizeF(max(7.0, self._name_font.pointSizeF() - 0.5))
        self.top_axis.setStyle(tickLength=0, autoExpandTextSpace=True, hideOverlappingLabels=False,
                               tickFont=self._name_font)
        self.top_axis.setGrid(False)
        self.top_axis.setHeight(22)

        self.curves: dict[str, pg.PlotDataItem] = {}
        for key, (name, _attr, line, width) in TEMPERATURE_CURVES.items():
            curve = pg.PlotDataItem([], [], pen=style.curve_pen(key, width, line), name=name, antialias=True)
            # saturation can sit far from the other curves: show it where in range, never squash the view
            self.temperature_plot.addItem(curve, ignoreBounds=(key == "saturation"))
            self.curves[key] = curve
        self.curves["pressure"] = self.pressure_plot.plot(
            [], [], pen=style.curve_pen("pressure", 2.2), name="Pressure", antialias=True
        )
        self.legend.set_entries([(c.name(), c.opts["pen"]) for c in self.curves.values()])
        # an invisible curve through the limits so auto-range keeps them in view
        self._limit_extent = pg.PlotCurveItem([], [], pen=pg.mkPen(0, 0, 0, 0))
        self.temperature_plot.addItem(self._limit_extent)

        # limit lines are named in the right-hand margin at their height, never over the curves
        self.limit_lines: dict[str, pg.InfiniteLine] = {}
        self.limit_labels: dict[str, QGraphicsSimpleTextItem] = {}
        self._limit_font = QFont(self.font())
        self._limit_font.setPointSizeF(max(7.0, self._limit_font.pointSizeF() - 0.5))
        for key, (_short, _full, colour_key) in LIMIT_NAMES.items():
            colour = style.CURVE_COLOURS[colour_key]
            line = pg.InfiniteLine(angle=0, movable=False, pen=pg.mkPen(colour, width=1.3, style=Qt.DashLine))
            line.hide()
            self.temperature_plot.addItem(line, ignoreBounds=True)
            self.limit_lines[key] = line
            label = QGraphicsSimpleTextItem(self.temperature_plot)  # a child of the plot, outside its view box
            label.setFont(self._limit_font)
            label.setBrush(QBrush(style.qcolor(colour).darker(115)))
            label.setAcceptedMouseButtons(Qt.NoButton)
            label.hide()
            self.limit_labels[key] = label
        self._margin_width = -1  # width of the right margin last set (the limit names need room)

        cursor_pen = pg.mkPen(style.CURVE_COLOURS["cursor"], width=1, style=Qt.DotLine)
        self.cursor_lines = [pg.InfiniteLine(angle=90, movable=False, pen=cursor_pen) for _ in range(2)]
        marker_pen = pg.mkPen(style.CURVE_COLOURS["marker"], width=2)
        self.marker_lines = [
            pg.InfiniteLine(
                angle=90,
                movable=False,
                pen=marker_pen,
                label="",
                labelOpts={"position": 0.06, "color": style.CURVE_COLOURS["marker"], "fill": (255, 255, 255, 220),
                           "anchors": [(0, 0), (0, 0)]},
            ),
            pg.InfiniteLine(angle=90, movable=False, pen=marker_pen),
        ]
        for plot, cursor, marker in zip((self.temperature_plot, self.pressure_plot), self.cursor_lines, self.marker_lines):
            cursor.hide()
            marker.hide()
            plot.addItem(cursor, ignoreBounds=True)
            plot.addItem(marker, ignoreBounds=True)
            cursor.setZValue(20)
            marker.setZValue(19)

        self.readout = QLabel("")
        self.readout.setTextFormat(Qt.RichText)
        self.readout.setWordWrap(True)
        self.readout.setSizePolicy(QSizePolicy.Expanding, QSizePolicy.Fixed)
        self.readout.setMinimumHeight(36)
        self.readout.setStyleSheet(
            f"color: {style.INK}; background: {style.CANVAS_BG}; border-top: 1px solid {style.GRID}; padding: 3px 8px;"
        )

        lay = QVBoxLayout(self)
        lay.setContentsMargins(0, 0, 0, 0)
        lay.setSpacing(2)
        lay.addWidget(self.stale_note)
        lay.addWidget(self.legend)
        lay.addWidget(self.graphics, 1)
        lay.addWidget(self.readout)

        self.graphics.scene().sigMouseMoved.connect(self._on_mouse_moved)
        self.temperature_plot.vb.sigXRangeChanged.connect(self._layout_boundary_labels)
        self.temperature_plot.vb.sigResized.connect(self._layout_boundary_labels)
        self.temperature_plot.vb.sigRangeChanged.connect(self._layout_limit_labels)
        self.temperature_plot.vb.sigResized.connect(self._layout_limit_labels)
        doc.result_ready.connect(self._on_result)
        doc.solve_failed.connect(self._on_failed)
        doc.units_changed.connect(lambda _s: self.refresh())
        doc.project_changed.connect(self._update_limits)
        doc.project_replaced.connect(self._on_replaced)
        doc.current_alternative_changed.connect(lambda _i: self._on_replaced())
        doc.position_marked.connect(self.mark_position)
        self._marked_x_m = math.nan
        self._result = getattr(doc, "result", None)
        self.refresh()

    # ------------------------------------------------------------------ updates

    def _on_result(self, result) -> None:
        self._result = result
        self.stale_note.hide()
        self.refresh()

    def _on_failed(self, message: str) -> None:
        if self._result is None:
            self.stale_note.setText(f"<b>No result.</b> The line could not be solved: {message}")
        else:
            self.stale_note.setText(
                f"<b>Stale:</b> the last edit could not be solved, so the curves show the previous result. {message}"
            )
        self.stale_note.show()

    def _on_replaced(self) -> None:
        self._result = getattr(self.doc, "result", None)
        self.stale_note.hide()
        self.mark_position(math.nan)
        self.refresh()

    def _show_in_legend(self, curve, show: bool) -> None:
        """A curve with nothing to draw (no saturation for this fluid) leaves the legend."""
        entries = [(c.name(), c.opts["pen"]) for c in self.curves.values() if c is not curve or show]
        self.legend.set_entries(entries)

    def refresh(self) -> None:
        """Redraw everything from the result on screen in the current unit system."""
        system = self.doc.unit_system
        if system != self._labels_system:  # setLabel re-lays out the axis: only when units change
            self._labels_system = system
            self._fit_axis_labels()
            self.pressure_plot.setLabel("bottom", f"Position from inlet [{unit_label('length', system)}]", color=style.INK)
            for plot, quantity in ((self.temperature_plot, "temperature"), (self.pressure_plot, "pressure")):
                plot.vb.setLimits(minYRange=min_span(quantity, system))
        res = self._result
        if res is None:
            for c in self.curves.values():
                c.setData([], [])
            self._set_boundaries([], system)
            self.readout.setText(f"<span style='color:{style.INK_MUTED}'>No result yet.</span>")
        else:
            prof = res.profile
            x = _display(prof.x_m, "length", system)
            for key, (_name, attr, _line, _w) in TEMPERATURE_CURVES.items():
                y = _display(getattr(prof, attr), "temperature", system)
                if key == "saturation":
                    has_sat = bool(np.isfinite(y).any())
                    self.curves[key].setVisible(has_sat)
                    self.curves[key].setData(x, y, connect="finite")
                    self._show_in_legend(self.curves[key], has_sat)
                else:
                    self.curves[key].setData(x, y)
            self.curves["pressure"].setData(x, _display(prof.pressure_Pa, "pressure", system))
            self._set_boundaries(res.segments, system)
            if math.isfinite(self._hover_x_m):
                self.show_cursor(self._hover_x_m)
            else:
                self.readout.setText(
                    f"<span style='color:{style.INK_MUTED}'>Point at the plots to read the values at a position.</span>"
                )
        self._update_limits()
        self.mark_position(self._marked_x_m)
        self._settle_ranges()

    def _settle_ranges(self) -> None:
        """Apply the pending auto-range now rather than at the start of the next paint.

        pyqtgraph moves the view range in ``prepareForPaint``; done there, the moved axes and
        segment labels ask for a second full repaint right after the first. Settling here gives
        one repaint per result.
        """
        for plot in (self.temperature_plot, self.pressure_plot):
            plot.vb.prepareForPaint()

    def _set_boundaries(self, spans, system: str) -> None:
        """Vertical lines at each segment start (named) and at the outlet; a pool of lines is reused."""
        wanted = len(spans) + (1 if spans else 0)
        while len(self._boundaries) < wanted:
            pen = pg.mkPen(style.CURVE_COLOURS["boundary"], width=1)
            top = pg.InfiniteLine(angle=90, movable=False, pen=pen)
            bottom = pg.InfiniteLine(angle=90, movable=False, pen=pen)
            self.temperature_plot.addItem(top, ignoreBounds=True)
            self.pressure_plot.addItem(bottom, ignoreBounds=True)
            self._boundaries.append((top, bottom))
        for k, (top, bottom) in enumerate(self._boundaries):
            if k < len(spans):
                xd = float(to_display(spans[k].x_start_m, "length", system))
                text = spans[k].name
            elif k < wanted:
                xd = float(to_display(spans[-1].x_end_m, "length", system))
                text = ""
            else:
                top.hide()
                bottom.hide()
                continue
            if top.value() != xd:  # the segment layout often stays as it was
                top.setValue(xd)
                bottom.setValue(xd)
            top.show()
            bottom.show()
        self._boundary_names = [(float(to_display(sp.x_start_m, "length", system)),
                                 float(to_display(sp.x_end_m, "length", system)), sp.name) for sp in spans]
        self._layout_boundary_labels()

    def _layout_boundary_labels(self, *_args) -> None:
        """Name each segment on the top axis, centred on its span, elided to the room it has."""
        names = self._boundary_names
        vb = self.temperature_plot.vb
        (x0, x1), _ = vb.viewRange()
        px_per_unit = vb.width() / (x1 - x0) if x1 > x0 and vb.width() > 0 else 0.0
        fm = QFontMetrics(self._name_font)
        ticks = []
        for start, end, name in names:
            lo, hi = max(start, x0), min(end, x1)
            if hi <= lo:
                continue
            room = int((hi - lo) * px_per_unit) - 10
            # an elided name keeps at least two letters; the full name is the axis's tooltip
            text = fm.elidedText(name, Qt.ElideRight, room) if room > 0 else ""
            if text and len(text.rstrip("…")) >= min(2, len(name)) and fm.horizontalAdvance(text) <= room:
                ticks.append(((lo + hi) / 2, text))
        self.top_axis.setTicks([ticks, []])

    def segment_name_at(self, x_display: float) -> str:
        """The full name of the segment at position ``x_display`` (display units), or ""."""
        for start, end, name in self._boundary_names:
            if start <= x_display <= end:
                return name
        return ""

    def _update_limits(self) -> None:
        system = self.doc.unit_system
        limits = self.doc.current_alternative.limits
        values = {
            "max_wall": limits.max_inner_wall_temperature_K,
            "min_bulk": limits.min_bulk_temperature_K,
        }
        extent = []
        for key, value in values.items():
            line, label = self.limit_lines[key], self.limit_labels[key]
            if value is None:
                line.hide()
                label.hide()
                continue
            yd = float(to_display(value, "temperature", system))
            line.setValue(yd)
            short, full, _colour = LIMIT_NAMES[key]
            shown = format_value(value, "temperature", system)
            text = f"{short}\n{shown}"
            if label.text() != text:
                label.setText(text)
                label.setToolTip(f"{full}: {shown} (a limit of this alternative, set in the Feed)")
            line.show()
            extent.append(yd)
        if extent and self._result is not None:
            x0 = float(to_display(self._result.profile.x_m[0], "length", system))
            self._limit_extent.setData([x0] * len(extent), extent)
        else:
            self._limit_extent.setData([], [])
        self._fit_margin()
        self._layout_limit_labels()

    def _fit_margin(self) -> None:
        """Give both plots a right margin as wide as the widest limit name (none without limits)."""
        shown = [self.limit_labels[k] for k, line in self.limit_lines.items() if line.isVisible()]
        width = int(math.ceil(max(lab.boundingRect().width() for lab in shown))) + 10 if shown else 0
        if width == self._margin_width:
            return
        self._margin_width = width
        for plot in (self.temperature_plot, self.pressure_plot):
            if width:
                plot.showAxis("right")
                plot.getAxis("right").setWidth(width)
            else:
                plot.hideAxis("right")

    def _layout_limit_labels(self, *_args) -> None:
        """Put each limit's name in the right margin, centred on its line, the two never overlapping."""
        plot, vb = self.temperature_plot, self.temperature_plot.vb
        box = plot.mapRectFromItem(vb, vb.boundingRect())  # the view box in the plot's coordinates
        (_x0, _x1), (y0, y1) = vb.viewRange()
        placed = []
        for key, line in self.limit_lines.items():
            label = self.limit_labels[key]
            if not line.isVisible() or not (y0 <= line.value() <= y1):
                label.hide()  # a limit scrolled out of view is not named at the edge
                continue
            y = plot.mapFromItem(vb, vb.mapFromView(QPointF(0.0, line.value()))).y()
            placed.append([y - label.boundingRect().height() / 2, label])
        placed.sort(key=lambda p: p[0])
        for i in range(1, len(placed)):  # push a label down below the one above it
            above = placed[i - 1][0] + placed[i - 1][1].boundingRect().height() + 1
            placed[i][0] = max(placed[i][0], above)
        if placed:  # and the lowest back up into the plot, pushing the others with it
            overshoot = placed[-1][0] + placed[-1][1].boundingRect().height() - plot.boundingRect().bottom()
            if overshoot > 0:
                for p in placed:
                    p[0] -= overshoot
        for top, label in placed:
            label.setPos(box.right() + 5, max(plot.boundingRect().top(), top))
            label.show()

    def _fit_axis_labels(self, *_args) -> None:
        """Title each value axis in full where the plot is tall enough, else in short ("T [°C]")."""
        system = self.doc.unit_system
        fm = QFontMetrics(self.font())
        for plot, quantity, full, short in ((self.temperature_plot, "temperature", "Temperature", "T"),
                                            (self.pressure_plot, "pressure", "Pressure", "p")):
            u = unit_label(quantity, system)
            long_text = f"{full} [{u}]"
            use_short = fm.horizontalAdvance(long_text) + 6 > plot.vb.height()
            state = (system, use_short)
            if self._short_labels.get(id(plot)) != state:  # setLabel re-lays out the axis
                self._short_labels[id(plot)] = state
                plot.setLabel("left", f"{short} [{u}]" if use_short else long_text, color=style.INK)

    # ------------------------------------------------------------------ position marker and hover

    def mark_position(self, x_m: float) -> None:
        """Show (or with NaN hide) the marker line at ``x_m`` on both plots."""
        self._marked_x_m = float(x_m)
        if not math.isfinite(self._marked_x_m):
            for m in self.marker_lines:
                m.hide()
            return
        system = self.doc.unit_system
        xd = float(to_display(self._marked_x_m, "length", system))
        for m in self.marker_lines:
            m.setValue(xd)
            m.show()
        self.marker_lines[0].label.setFormat(f"▼ {format_value(self._marked_x_m, 'length', system)}")

    def _on_mouse_moved(self, scene_pos) -> None:
        if self._result is None:
            return
        if self.top_axis.sceneBoundingRect().contains(scene_pos):  # the names may be elided: say them in full
            xd = self.temperature_plot.vb.mapSceneToView(scene_pos).x()
            name = self.segment_name_at(xd)
            if self.top_axis.toolTip() != name:
                self.top_axis.setToolTip(name)
        for plot in (self.temperature_plot, self.pressure_plot):
            if plot.sceneBoundingRect().contains(scene_pos):
                xd = plot.vb.mapSceneToView(scene_pos).x()
                x_m = float(from_display(xd, "length", self.doc.unit_system))
                self.show_cursor(x_m)
                return
        for c in self.cursor_lines:
            c.hide()

    def show_cursor(self, x_m: float) -> None:
        """Put the hover cursor at ``x_m`` and fill the readout (also used by tests)."""
        self._hover_x_m = x_m
        xd = float(to_display(x_m, "length", self.doc.unit_system))
        for c in self.cursor_lines:
            c.setValue(xd)
            c.show()
        self._show_readout(x_m)

    def _show_readout(self, x_m: float) -> None:
        self.readout.setText(self.readout_at(x_m))

    def readout_at(self, x_m: float) -> str:
        """Rich text with every profile value at the node nearest to ``x_m``."""
        res = self._result
        if res is None:
            return ""
        prof = res.profile
        xs = np.asarray(prof.x_m, dtype=float)
        if xs.size == 0:
            return ""
        x_m = min(max(x_m, xs[0]), xs[-1])
        i = int(np.clip(np.searchsorted(xs, x_m), 0, xs.size - 1))
        if i > 0 and abs(xs[i - 1] - x_m) <= abs(xs[i] - x_m):
            i -= 1
        system = self.doc.unit_system
        seg_name = ""
        for span in res.segments:
            if span.node_start <= i <= span.node_end:
                seg_name = span.name
                if i < span.node_end:
                    break

        def sw(key: str) -> str:  # a coloured swatch tying the number to its curve
            return f"<span style='color:{style.CURVE_COLOURS[key]}'>■</span>"

        parts = [
            f"<b>x = {format_value(xs[i], 'length', system)}</b>" + (f" ({seg_name})" if seg_name else ""),
            f"{sw('bulk')} bulk {format_value(prof.bulk_temperature_K[i], 'temperature', system)}",
            f"{sw('inner_wall')} inner wall {format_value(prof.inner_wall_temperature_K[i], 'temperature', system)}",
            f"{sw('outer_surface')} outer surface {format_value(prof.outer_surface_temperature_K[i], 'temperature', system)}",
        ]
        tsat = float(prof.saturation_temperature_K[i])
        if math.isfinite(tsat):
            parts.append(f"{sw('saturation')} saturation {format_value(tsat, 'temperature', system)}")
        parts += [
            f"{sw('pressure')} pressure {format_value(prof.pressure_Pa[i], 'pressure', system)}",
            f"Re {format_value(prof.reynolds[i], 'dimensionless', system, digits=3)}",
            f"velocity {format_value(prof.velocity_m_per_s[i], 'velocity', system, digits=3)}",
            f"h {format_value(prof.inside_coefficient_W_per_m2K[i], 'film_coefficient', system, digits=3)}",
            f"heat flux {format_value(prof.heat_flux_W_per_m2[i], 'heat_flux', system, digits=3)}",
        ]
        return " &nbsp;·&nbsp; ".join(parts)
