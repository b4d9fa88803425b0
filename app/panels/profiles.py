"""Profiles: temperatures and pressure along the line (pyqtgraph), with a hover readout.

Two stacked plots share the position axis: bulk, inner-wall and outer-surface temperature
(saturation temperature dashed where the fluid has one), and pressure. Segment boundaries are
vertical lines (one item per plot) named after the segment that starts there; the alternative's
limits are dashed horizontal lines, named in the right-hand margin at their height so no label
ever covers a curve. Every axis keeps a sensible minimum span (a line that holds its temperature
does not blow round-off up into a slope) and tick labels never use exponents. Curves are created
once and updated with ``setData``; arrays are converted to the display unit system on the way in.
When a solve fails the last curves stay and a note says they are stale.

Uncertainty bands (the methods' published accuracy, :mod:`solver.uncertainty`) arrive from the
Document after the result; bulk, inner-wall and outer-surface temperature are then shaded around
their curves in a light tint of the curve's colour, behind the curves, with a legend entry.
A new result hides the shading until its own bands come.

Cheap to update after an edit (an edit is followed by its result, so only the result redraws):
the axis ranges are computed here from the result, rounded to nice values and kept while the new
curves still fill them (the axes then keep their pictures); segment names and boundaries change
only with the segment layout, limit lines only with the limits or the unit system; dense curves
are thinned to the extremes of each pixel column and drawn without antialiasing.
"""

from __future__ import annotations

import math

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QLineF, QPointF, QRectF, QSize, Qt
from PySide6.QtGui import QBrush, QColor, QFont, QFontMetrics, QPainter, QPainterPath, QPen, QPolygonF
from PySide6.QtWidgets import QGraphicsSimpleTextItem, QLabel, QSizePolicy, QVBoxLayout, QWidget

from app import style
from app.axes import FILL_SHARE, keeps, minimum_span, position_range, thin, value_range
from app.units import format_value, from_display, label as unit_label, to_display, unit

# curve key -> (legend name, Profile attribute, line style, width)
TEMPERATURE_CURVES: dict[str, tuple[str, str, str, float]] = {
    "bulk": ("Bulk", "bulk_temperature_K", "solid", 2.6),
    "inner_wall": ("Inner wall", "inner_wall_temperature_K", "solid", 1.8),
    "outer_surface": ("Outer surface", "outer_surface_temperature_K", "dot", 2.0),
    "saturation": ("Saturation", "saturation_temperature_K", "dash", 1.6),
}


#: Shaded uncertainty bands: curve key -> Bands key (solver.uncertainty.BAND_QUANTITIES).
BAND_CURVES: dict[str, str] = {
    "bulk": "bulk_temperature_K",
    "inner_wall": "inner_wall_temperature_K",
    "outer_surface": "outer_surface_temperature_K",
}
BAND_LEGEND = "shaded: uncertainty (methods' published accuracy)"
BAND_ALPHA = 46  # of 255: light enough that overlapping bands and the grid still read


#: Limit lines: key -> (short name shown in the margin, full name for the tooltip, curve colour key).
LIMIT_NAMES: dict[str, tuple[str, str, str]] = {
    "max_wall": ("max wall", "Maximum inner-wall temperature", "inner_wall"),
    "min_bulk": ("min bulk", "Minimum bulk temperature", "bulk"),
}


def _display(values, quantity: str, system: str) -> np.ndarray:
    return to_display(np.asarray(values, dtype=float), quantity, system)


def _finite_span(*arrays) -> tuple[float, float]:
    """(lowest, highest) of the finite values of ``arrays``; (nan, nan) when there are none. An axis
    range is never taken from an infinity, and an all-NaN curve raises no warning."""
    finite = [v[np.isfinite(v)] for v in (np.asarray(a, dtype=float) for a in arrays)]
    finite = [v for v in finite if v.size]
    if not finite:
        return math.nan, math.nan
    return min(float(v.min()) for v in finite), max(float(v.max()) for v in finite)


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


class _AcrossView(pg.GraphicsObject):
    """An item that draws across the whole visible view of a plot (its bounds follow the view)."""

    def __init__(self, plot: pg.PlotItem, z: float):
        super().__init__()
        self.plot = plot
        self.setAcceptedMouseButtons(Qt.NoButton)
        self.setAcceptHoverEvents(False)
        self.setZValue(z)
        plot.vb.sigRangeChanged.connect(self._moved)
        plot.vb.sigResized.connect(self._moved)

    def _moved(self, *_args) -> None:
        self.prepareGeometryChange()
        self.update()

    def boundingRect(self) -> QRectF:
        return self.plot.vb.viewRect()


class _BoundaryLines(_AcrossView):
    """Every segment boundary of a plot as one item: vertical lines at ``positions`` (display
    units) from the bottom of the view to its top, behind the curves. One item instead of one
    line item per boundary: a 60-segment line has 61 boundaries per plot."""

    def __init__(self, plot: pg.PlotItem, pen: QPen):
        super().__init__(plot, z=-500)  # above the grid, below the curves
        self.pen = QPen(pen)
        self.pen.setCosmetic(True)
        self.positions: tuple[float, ...] = ()

    def set_positions(self, positions) -> None:
        positions = tuple(float(v) for v in positions)
        if positions != self.positions:
            self.positions = positions
            self.update()

    def paint(self, p, *_args) -> None:
        rect = self.plot.vb.viewRect()
        lines = [QLineF(v, rect.top(), v, rect.bottom()) for v in self.positions if rect.left() <= v <= rect.right()]
        if lines:
            p.setRenderHint(p.RenderHint.Antialiasing, False)
            p.setPen(self.pen)
            p.drawLines(lines)


class _BandFill(pg.GraphicsObject):
    """A shaded band between a lower and an upper curve (display units), one filled path, no outline.

    Built once per set of bands (not per edit); broken where a value is missing (no surface in air).
    """

    def __init__(self, colour: str):
        super().__init__()
        self.setAcceptedMouseButtons(Qt.NoButton)
        self.setAcceptHoverEvents(False)
        self.setZValue(-50)  # above the grid and the boundaries (the view box lifts those to -99), behind the curves
        self.brush = QBrush(style.qcolor(colour, BAND_ALPHA))
        self.path = QPainterPath()

    def set_band(self, x, lower, upper) -> None:
        self.prepareGeometryChange()
        path = QPainterPath()
        ok = np.isfinite(x) & np.isfinite(lower) & np.isfinite(upper)
        edges = np.flatnonzero(np.diff(np.concatenate(([0], ok.astype(np.int8), [0]))))
        for start, stop in zip(edges[::2], edges[1::2]):
            xs = x[start:stop]
            pts = [QPointF(a, b) for a, b in zip(xs.tolist(), upper[start:stop].tolist())]
            pts += [QPointF(a, b) for a, b in zip(xs[::-1].tolist(), lower[start:stop][::-1].tolist())]
            path.addPolygon(QPolygonF(pts))
            path.closeSubpath()
        self.path = path
        self.update()

    def boundingRect(self) -> QRectF:
        return self.path.boundingRect()

    def paint(self, p, *_args) -> None:
        if not self.path.isEmpty():
            p.setRenderHint(p.RenderHint.Antialiasing, False)
            p.fillPath(self.path, self.brush)


class _GridLines(_AcrossView):
    """Grid lines of a plot at its axes' ticks, drawn behind the curves in solid colours.

    Same places and strengths as pyqtgraph's own grid (``showGrid``), whose faint lines are drawn
    with transparency over the whole view by each axis: blending those cost ~10 ms per repaint.
    On the plain plot background a colour mixed in advance looks the same and draws quickly.
    """

    def __init__(self, plot: pg.PlotItem, alpha: float, colour: str, background: str):
        super().__init__(plot, z=-1000)
        self.alpha = alpha
        self._ink = style.qcolor(colour)
        self._paper = style.qcolor(background)
        self._drawn: tuple = ((), [])  # (view rect and size, [(pen, lines)]): a repaint of an unmoved view reuses them

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
        key = (rect.getRect(), vb.width(), vb.height())
        if self._drawn[0] != key:
            self._drawn = (key, self._strokes(rect))
        for pen, lines in self._drawn[1]:
            p.setPen(pen)
            p.drawLines(lines)

    def _strokes(self, rect: QRectF) -> list[tuple[QPen, list[QLineF]]]:
        """The grid's lines in ``rect`` (view coordinates), grouped by pen, strongest level last."""
        vb = self.plot.vb
        strokes = []
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
                if name == "bottom":
                    lines = [QLineF(v, rect.top(), v, rect.bottom()) for v in ticks if lo <= v <= hi]
                else:
                    lines = [QLineF(rect.left(), v, rect.right(), v) for v in ticks if lo <= v <= hi]
                if lines:
                    strokes.append((pen, lines))
        return strokes


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


def style_axes(plot: pg.PlotItem, names=("left", "bottom")) -> None:
    """The app's axes: lines in muted ink, tick labels in ink (Profiles, Hold Time, Sweep)."""
    for name in names:
        ax = plot.getAxis(name)
        ax.setPen(pg.mkPen(style.INK_MUTED))
        ax.setTextPen(pg.mkPen(style.INK))


def plain_plot(plot: pg.PlotItem) -> None:
    """A plot of the design views (Hold Time, Sweep): a light grid, the app's axes, no menu or buttons."""
    plot.showGrid(x=True, y=True, alpha=0.25)
    plot.setMenuEnabled(False)
    plot.hideButtons()
    style_axes(plot)


def plot_stack(legend: QWidget, graphics: QWidget, readout: QWidget) -> QWidget:
    """The legend strip above the plot (which takes the height) and the readout under it, without gaps."""
    stack = QWidget()
    lay = QVBoxLayout(stack)
    lay.setContentsMargins(0, 0, 0, 0)
    lay.setSpacing(0)
    lay.addWidget(legend)
    lay.addWidget(graphics, 1)
    lay.addWidget(readout)
    return stack


class ProfilesPanel(QWidget):
    """``ProfilesPanel(doc)``: plots of the current result; observes the Document.

    Public for tests and other panels: ``curves`` (dict of PlotDataItem: bulk, inner_wall,
    outer_surface, saturation, pressure; dense curves hold thinned data, see :func:`app.axes.thin`),
    ``temperature_plot``, ``pressure_plot``, ``readout`` (QLabel), ``stale_note`` (QLabel),
    ``marker_lines``, ``limit_lines``, ``boundary_lines`` (one per plot; ``positions`` in display
    units), :meth:`readout_at` (x_m -> text).

    It listens to results, not to edits: every edit of the current alternative is followed by a
    result (or a failure), so reacting to the edit too would only paint the plots twice.
    """

    def __init__(self, doc, parent=None):
        super().__init__(parent)
        self.doc = doc
        self.setObjectName("Profiles")
        self.setWindowTitle("Profiles")
        self._result = None  # the result on screen (may be stale)
        self._hover_x_m: float = math.nan
        self._layout_key: tuple = ()  # (unit system, segment starts, ends and names) on screen
        self._limits_key: tuple = ()  # (unit system, limit values) on screen
        self._top_ticks: list = []  # the segment names last given to the top axis
        self._display_data: dict[str, tuple[np.ndarray, np.ndarray]] = {}  # curve key -> full (x, y), display units
        self._drawn_key: tuple = ()  # (data id, view x range, pixel width) the curves were thinned for
        self._follow_x = True  # False once the user pans or zooms the position axis
        self._follow_y: dict[int, bool] = {}  # plot id -> value axis follows the results
        self._range_system = ""  # unit system the view ranges were computed in
        self._refreshing = False
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
            style_axes(plot)
            for name in ("left", "bottom"):
                ax = plot.getAxis(name)
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
        # hideOverlappingLabels=0: the names are elided to fit their segments, so none runs past the
        # axis; pyqtgraph's default 15 px allowance widens the axis's bounds over both side axes,
        # and every change of the names would then repaint those too
        self.top_axis.setStyle(tickLength=0, autoExpandTextSpace=True, hideOverlappingLabels=0,
                               tickFont=self._name_font)
        self.top_axis.setGrid(False)
        self.top_axis.setHeight(22)

        self.curves: dict[str, pg.PlotDataItem] = {}
        for key, (name, _attr, line, width) in TEMPERATURE_CURVES.items():
            curve = pg.PlotDataItem([], [], pen=style.curve_pen(key, width, line), name=name, antialias=False)
            # saturation can sit far from the other curves: show it where in range, never squash the view
            self.temperature_plot.addItem(curve, ignoreBounds=(key == "saturation"))
            self.curves[key] = curve
        self.curves["pressure"] = self.pressure_plot.plot(
            [], [], pen=style.curve_pen("pressure", 2.2), name="Pressure", antialias=False
        )
        self.legend.set_entries([(c.name(), c.opts["pen"]) for c in self.curves.values()])
        self.bands = None  # the uncertainty bands shaded (solver.uncertainty.Bands), or None
        self._hidden_from_legend = None  # a curve with nothing to draw (no saturation)
        self._band_legend = False  # the shading's legend entry is shown (from the first bands on)
        self.band_fills: dict[str, _BandFill] = {}
        for key in BAND_CURVES:
            fill = _BandFill(style.CURVE_COLOURS[key])
            fill.hide()
            self.temperature_plot.addItem(fill, ignoreBounds=True)
            self.band_fills[key] = fill
        self._band_pen = QPen(style.qcolor(style.CURVE_COLOURS["bulk"], 2 * BAND_ALPHA))
        self._band_pen.setWidthF(9.0)
        boundary_pen = pg.mkPen(style.CURVE_COLOURS["boundary"], width=1)
        self.boundary_lines = [_BoundaryLines(plot, boundary_pen) for plot in (self.temperature_plot, self.pressure_plot)]
        for plot, lines in zip((self.temperature_plot, self.pressure_plot), self.boundary_lines):
            plot.vb.addItem(lines, ignoreBounds=True)
            # the ranges are set here from each result (_set_ranges); pyqtgraph's auto-range would
            # move the axes, and so redraw them, at every result
            plot.vb.disableAutoRange()
            self._follow_y[id(plot)] = True
            plot.vb.sigRangeChangedManually.connect(lambda mask, plot=plot: self._moved_by_user(plot, mask))

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
        self.temperature_plot.vb.sigXRangeChanged.connect(self._draw_curves)
        self.temperature_plot.vb.sigResized.connect(self._draw_curves)
        doc.result_ready.connect(self._on_result)
        doc.bands_ready.connect(self._on_bands)
        doc.solve_failed.connect(self._on_failed)
        doc.units_changed.connect(lambda _s: self.refresh())
        doc.project_replaced.connect(self._on_replaced)
        doc.current_alternative_changed.connect(lambda _i: self._on_replaced())
        doc.position_marked.connect(self.mark_position)
        self._marked_x_m = math.nan
        self._result = getattr(doc, "result", None)
        self.bands = doc.bands_for_result(self._result)
        self.refresh()

    # ------------------------------------------------------------------ updates

    def _on_result(self, result) -> None:
        self._result = result
        self.bands = self.doc.bands_for_result(result)  # held already (e.g. an undo), else on their way
        self.stale_note.hide()
        self.refresh()

    def _on_bands(self, _name: str, bands) -> None:
        if bands is not self.bands and self._result is not None and bands.base is self._result:
            self.bands = bands
            self._show_bands()

    def _show_bands(self) -> None:
        """Shade the bands of the result on screen (hide the shading when there are none)."""
        bands = self.bands if self._result is not None else None  # always those of the result on screen
        system = self.doc.unit_system
        shown = bands is not None and bands.width_K > 0
        for key, fill in self.band_fills.items():
            if not shown:
                if fill.isVisible():
                    fill.hide()
                continue
            q = BAND_CURVES[key]
            fill.set_band(_display(bands.x_m, "length", system), _display(bands.lower[q], "temperature", system),
                          _display(bands.upper[q], "temperature", system))
            fill.setVisible(self.curves[key].isVisible())
        self._update_legend()

    def _on_failed(self, message: str) -> None:
        if self._result is None:
            self.stale_note.setText(f"<b>No result.</b> The line could not be solved: {message}")
        else:
            self.stale_note.setText(
                f"<b>Stale:</b> the last edit could not be solved, so the curves show the previous result. {message}"
            )
        self.stale_note.show()
        self._update_limits()  # an edited limit shows even when the line could not be solved

    def _on_replaced(self) -> None:
        self._result = getattr(self.doc, "result", None)
        self.bands = self.doc.bands_for_result(self._result)
        self.stale_note.hide()
        self.mark_position(math.nan)
        self._follow_x = True  # another line: its own view
        for plot in (self.temperature_plot, self.pressure_plot):
            self._follow_y[id(plot)] = True
        self.refresh()

    def _moved_by_user(self, plot: pg.PlotItem, mask) -> None:
        """A pan or zoom by the user: that axis stays where the user put it until another line is shown."""
        if mask[0]:
            self._follow_x = False
        if mask[1]:
            self._follow_y[id(plot)] = False

    def _show_in_legend(self, curve, show: bool) -> None:
        """A curve with nothing to draw (no saturation for this fluid) leaves the legend."""
        self._hidden_from_legend = None if show else curve
        self._update_legend()

    def _update_legend(self) -> None:
        hidden = self._hidden_from_legend
        entries = [(c.name(), c.opts["pen"]) for c in self.curves.values() if c is not hidden]
        # once shaded, the entry stays (the shading goes from an edit's result until its bands come; a
        # legend that lost and regained a row would re-lay out the plots twice per edit)
        self._band_legend = self._band_legend or any(fill.isVisible() for fill in self.band_fills.values())
        if self._band_legend:
            entries.append((BAND_LEGEND, self._band_pen))
        self.legend.set_entries(entries)

    def refresh(self) -> None:
        """Redraw everything from the result on screen in the current unit system."""
        system = self.doc.unit_system
        if system != self._labels_system:  # setLabel re-lays out the axis: only when units change
            self._labels_system = system
            self._fit_axis_labels()
            self.pressure_plot.setLabel("bottom", f"Position from inlet [{unit_label('length', system)}]", color=style.INK)
            for plot, quantity in ((self.temperature_plot, "temperature"), (self.pressure_plot, "pressure")):
                plot.vb.setLimits(minYRange=minimum_span(quantity, system))
        res = self._result
        self._refreshing = True  # the curves are drawn once, after the ranges are set
        try:
            if res is None:
                self._display_data = {}
                self._set_boundaries([], system)
                self.readout.setText(f"<span style='color:{style.INK_MUTED}'>No result yet.</span>")
            else:
                prof = res.profile
                x = _display(prof.x_m, "length", system)
                data = {}
                for key, (_name, attr, _line, _w) in TEMPERATURE_CURVES.items():
                    data[key] = (x, _display(getattr(prof, attr), "temperature", system))
                data["pressure"] = (x, _display(prof.pressure_Pa, "pressure", system))
                self._display_data = data
                has_sat = bool(np.isfinite(data["saturation"][1]).any())
                self.curves["saturation"].setVisible(has_sat)
                self._show_in_legend(self.curves["saturation"], has_sat)
                self._set_boundaries(res.segments, system)
                if math.isfinite(self._hover_x_m):
                    self.show_cursor(self._hover_x_m)
                else:
                    self.readout.setText(
                        f"<span style='color:{style.INK_MUTED}'>Point at the plots to read the values at a position.</span>"
                    )
            self._update_limits()
            self._set_ranges()
            self._show_bands()
        finally:
            self._refreshing = False
        self._drawn_key = ()  # new data: draw whatever the view
        self._draw_curves()
        self.mark_position(self._marked_x_m)

    def _limit_values(self) -> list[float]:
        """The limits shown as lines, in display units."""
        return [line.value() for line in self.limit_lines.values() if line.isVisible()]

    def _set_ranges(self) -> None:
        """Set each axis's range from the result (never pyqtgraph's auto-range), before any paint.

        The range is rounded to nice values and kept while the new data still fill it (see
        :func:`app.axes.keeps`), so a small edit leaves the axes as they were and they are not redrawn.
        An axis the user panned or zoomed stays put; one the user set back to automatic from the
        plot's menu follows the results again.
        """
        data = self._display_data
        system = self.doc.unit_system
        new_system = system != self._range_system
        self._range_system = system
        if new_system:  # a range the user set is in the old units: show the whole line again
            self._follow_x = True
            self._follow_y = {key: True for key in self._follow_y}
        for plot in (self.temperature_plot, self.pressure_plot):
            auto_x, auto_y = plot.vb.state["autoRange"]
            if auto_x or auto_y:  # "View all" / "Auto" from the plot's menu: follow the results again
                self._follow_x = self._follow_x or bool(auto_x)
                self._follow_y[id(plot)] = self._follow_y[id(plot)] or bool(auto_y)
                plot.vb.disableAutoRange()
        if not data:
            return
        x = data["bulk"][0]
        if x.size == 0:
            return
        tvb, pvb = self.temperature_plot.vb, self.pressure_plot.vb
        x_range = None
        if self._follow_x:
            lo, hi = float(x[0]), float(x[-1])
            if not (math.isfinite(lo) and math.isfinite(hi)):
                pass  # no range from positions that are not numbers (nothing sensible to show)
            elif new_system or not keeps(tvb.viewRange()[0], lo, hi, 0.0, FILL_SHARE["x"]):
                x_range = position_range(lo, hi)
        temps = [data[k][1] for k in ("bulk", "inner_wall", "outer_surface")]
        t_lo, t_hi = _finite_span(*temps)
        limits = self._limit_values()
        if limits:
            t_lo, t_hi = min(t_lo, *limits), max(t_hi, *limits)
        p = data["pressure"][1]
        for vb, plot, lo, hi, quantity in ((tvb, self.temperature_plot, t_lo, t_hi, "temperature"),
                                           (pvb, self.pressure_plot, *_finite_span(p), "pressure")):
            y_range = None
            smallest = minimum_span(quantity, system, (lo, hi))
            if self._follow_y[id(plot)] and math.isfinite(lo) and math.isfinite(hi):
                if new_system or not keeps(vb.viewRange()[1], lo, hi, smallest, FILL_SHARE["y"]):
                    y_range = value_range(lo, hi, smallest)
            if vb is tvb and x_range is not None:
                vb.setRange(xRange=x_range, yRange=y_range, padding=0.0)
            elif y_range is not None:
                vb.setRange(yRange=y_range, padding=0.0)

    def _draw_curves(self, *_args) -> None:
        """Give the curves their data, thinned to about two points per pixel column of the view.

        Run after each result and when the view's position range or width changes (a zoom shows
        the detail again). Sparse curves (under one point per two pixels) keep antialiasing; dense
        ones draw without it (there it hardly shows, and costs most of a curve's paint).
        """
        if self._refreshing:
            return
        vb = self.temperature_plot.vb
        (x0, x1), _ = vb.viewRange()
        columns = int(vb.width()) if vb.width() >= 50 else 1000  # not laid out yet: a typical width
        key = (id(self._display_data), round(x0, 9), round(x1, 9), columns)
        if key == self._drawn_key:
            return
        self._drawn_key = key
        if not self._display_data:
            for c in self.curves.values():
                c.setData([], [])
            return
        for name, curve in self.curves.items():
            x, y = self._display_data[name]
            xt, yt = thin(x, y, x0, x1, columns)
            smooth = xt.size < columns / 2
            if name == "saturation":
                curve.setData(xt, yt, connect="finite", antialias=smooth)
            else:
                curve.setData(xt, yt, antialias=smooth)

    def _set_boundaries(self, spans, system: str) -> None:
        """Lines at each segment start and at the outlet, and the names; only when the layout changes."""
        names = [(float(to_display(sp.x_start_m, "length", system)),
                  float(to_display(sp.x_end_m, "length", system)), sp.name) for sp in spans]
        key = (system, tuple(names))
        if key == self._layout_key:  # an edit seldom moves the segments: keep lines and names
            return
        self._layout_key = key
        positions = [start for start, _end, _name in names] + ([names[-1][1]] if names else [])
        for lines in self.boundary_lines:
            lines.set_positions(positions)
        self._boundary_names = names
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
            room = int(min((hi - lo) * px_per_unit, 1e6)) - 10  # (a deep zoom: no int of a huge float)
            # an elided name keeps at least two letters; the full name is the axis's tooltip
            text = fm.elidedText(name, Qt.ElideRight, room) if room > 0 else ""
            if text and len(text.rstrip("…")) >= min(2, len(name)) and fm.horizontalAdvance(text) <= room:
                ticks.append(((lo + hi) / 2, text))
        if ticks != self._top_ticks:  # setTicks throws the axis's picture away, even for equal ticks
            self._top_ticks = ticks
            self.top_axis.setTicks([ticks, []])

    def segment_name_at(self, x_display: float) -> str:
        """The full name of the segment at position ``x_display`` (display units), or ""."""
        for start, end, name in self._boundary_names:
            if start <= x_display <= end:
                return name
        return ""

    def _update_limits(self) -> None:
        """Show the current alternative's limits; nothing is touched while they and the units stay."""
        system = self.doc.unit_system
        limits = self.doc.current_alternative.limits
        values = {
            "max_wall": limits.max_inner_wall_temperature_K,
            "min_bulk": limits.min_bulk_temperature_K,
        }
        shown_key = (system, tuple(values.values()))
        if shown_key == self._limits_key:
            return
        self._limits_key = shown_key
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
        self._fit_margin()
        self._layout_limit_labels()
        if not self._refreshing:  # a new limit outside the view (a failed solve keeps the curves)
            self._set_ranges()

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
        """Title each value axis in full where the plot is tall enough, else in short ("T [°C]"); where
        not even that fits (a short plot while a tool dock is open) no title, so two titles never run into
        each other: the legend and the hover readout still say what the curve is and its unit."""
        system = self.doc.unit_system
        fm = QFontMetrics(self.font())
        for plot, quantity, full, short in ((self.temperature_plot, "temperature", "Temperature", "T"),
                                            (self.pressure_plot, "pressure", "Pressure", "p")):
            u = unit_label(quantity, system)
            long_text, short_text = f"{full} [{u}]", f"{short} [{u}]"
            room = plot.vb.height()
            text = long_text if fm.horizontalAdvance(long_text) + 6 <= room else (
                short_text if fm.horizontalAdvance(short_text) + 6 <= room else "")
            state = (system, text)
            if self._short_labels.get(id(plot)) != state:  # setLabel re-lays out the axis
                self._short_labels[id(plot)] = state
                axis = plot.getAxis("left")
                if text:
                    plot.setLabel("left", text, color=style.INK)
                    axis.showLabel(True)
                else:
                    axis.showLabel(False)
                axis.setToolTip(long_text)

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
        ]
        mach = prof.mach_number
        if mach is not None and float(np.max(mach)) >= 0.1:  # gas lines fast enough for Mach to matter
            parts.append(f"Mach {format_value(mach[i], 'dimensionless', system, digits=2)}")
        parts += [
            f"h {format_value(prof.inside_coefficient_W_per_m2K[i], 'film_coefficient', system, digits=3)}",
            f"heat flux {format_value(prof.heat_flux_W_per_m2[i], 'heat_flux', system, digits=3)}",
        ]
        return " &nbsp;·&nbsp; ".join(parts)
