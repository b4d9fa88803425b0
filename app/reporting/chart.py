"""The report's profile charts, drawn as vector graphics with QPainter.

A chart is described as plain data (:class:`Chart`: panels of series and limit lines, segment
boundaries) by :func:`alternative_chart` and :func:`overlay_chart`, laid out by
:func:`layout_chart` into device coordinates (:class:`ChartGeometry`), and painted by
:func:`draw_chart`. Layout and painting are apart so the rules a reader relies on can be checked
on the geometry: labels sit outside the plot area and never cover a curve, every axis spans at
least a sensible minimum, and segment boundaries are drawn once.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Optional, Sequence

import numpy as np
from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import QColor, QFont, QFontMetricsF, QPainterPath, QPen, QPolygonF

from app import units
from app.axes import minimum_span, thin
from app.style import ALTERNATIVE_COLOURS, ALTERNATIVE_STYLES, CURVE_COLOURS, INK, INK_MUTED
from app.texts import fmt, shorten, ulabel
from solver.results import Result

LIMIT_STYLE = "dashdot"
BAND_STYLE = "band"  # legend style of a shaded uncertainty band
BAND_ALPHA = 56  # of 255: the tint of a band, the curve's own colour
BAND_LEGEND = "shaded: uncertainty (methods' published accuracy)"


@dataclass
class Series:
    label: str  # "" keeps it out of the legend
    x: np.ndarray
    y: np.ndarray
    colour: str
    style: str = "solid"  # solid | dash | dot | dashdot
    width_pt: float = 1.4


@dataclass
class HLine:
    """A horizontal target or limit line; its label is printed beside the plot, never over it."""

    y: float
    label: str
    colour: str = CURVE_COLOURS["limit"]


@dataclass
class Band:
    """A shaded band between ``lower`` and ``upper`` (display units), behind the curves."""

    x: np.ndarray
    lower: np.ndarray
    upper: np.ndarray
    colour: str


@dataclass
class Panel:
    y_label: str
    series: list[Series]
    hlines: list[HLine] = field(default_factory=list)
    min_span: float = 0.0  # smallest y span in display units
    bands: list[Band] = field(default_factory=list)


@dataclass
class Chart:
    title: str
    x_label: str
    panels: list[Panel]
    #: Segment spans [(x_start, x_end, name)] named in a band above the plot; empty: no names.
    segments: list[tuple[float, float, str]] = field(default_factory=list)
    #: Positions of segment boundaries (display units), each drawn once per panel.
    boundaries: list[float] = field(default_factory=list)
    #: Legend entries beyond the series: (label, colour, style).
    legend_extra: list[tuple[str, str, str]] = field(default_factory=list)
    aspect: float = 0.62  # height / width


def nice_ticks(lo: float, hi: float, target: int = 6) -> list[float]:
    """Round tick positions covering [lo, hi] (1-2-2.5-5 steps)."""
    if not (math.isfinite(lo) and math.isfinite(hi)):
        return []
    if hi <= lo:
        return [lo]
    raw = (hi - lo) / max(target - 1, 1)
    mag = 10 ** math.floor(math.log10(raw))
    step = next((m * mag for m in (1, 2, 2.5, 5, 10) if m * mag >= raw), 10 * mag)
    start = math.ceil(lo / step - 1e-9) * step
    out = []
    v = start
    while v <= hi + step * 1e-9:
        out.append(0.0 if abs(v) < step * 1e-9 else v)
        v += step
    return out


def tick_text(v: float, step: float) -> str:
    """A tick label with as many decimals as the step needs; never an exponent."""
    decimals = max(0, -int(math.floor(math.log10(step)))) if step > 0 else 0
    if step >= 1 and abs(step - round(step)) < 1e-9:
        decimals = 0
    elif step > 0 and abs(step * 10 - round(step * 10)) < 1e-9:
        decimals = max(decimals, 1)
    elif step > 0 and abs(step * 100 - round(step * 100)) < 1e-9 * max(1.0, step * 100):
        decimals = max(decimals, 2)  # 0.25 steps
    text = f"{v:.{min(decimals, 9)}f}"
    if float(text) == 0:
        text = text.lstrip("-")
    return text.replace("-", "\u2212")


def data_range(panel: Panel) -> tuple[float, float]:
    """The y range of a panel: its data and lines, at least ``min_span`` wide, padded 6 %."""
    lo, hi = math.inf, -math.inf
    for s in list(panel.series) + [Series("", b.x, np.concatenate([b.lower, b.upper]), b.colour) for b in panel.bands]:
        y = np.asarray(s.y, dtype=float)
        y = y[np.isfinite(y)]
        if y.size:
            lo, hi = min(lo, float(y.min())), max(hi, float(y.max()))
    for h in panel.hlines:
        if math.isfinite(h.y):
            lo, hi = min(lo, h.y), max(hi, h.y)
    if not math.isfinite(lo):
        return 0.0, 1.0
    # never narrower than the panel's minimum, nor than float resolution at this size
    floor = max(panel.min_span, 1e-9 * max(1.0, abs(hi), abs(lo)))
    if hi - lo < floor:
        mid = 0.5 * (lo + hi)
        lo, hi = mid - floor / 2, mid + floor / 2
    pad = 0.06 * (hi - lo)
    return lo - pad, hi + pad


# --------------------------------------------------------------------------- layout


@dataclass
class PanelGeometry:
    """Where one panel goes on the device, and what is drawn in it."""

    panel: Panel
    area: QRectF  # the plot area (curves are clipped to it)
    y_range: tuple[float, float]
    y_ticks: list[float]
    y_step: float
    curves: list[tuple[Series, list[np.ndarray]]]  # per series: polylines (n×2 device points)
    boundary_xs: list[float]  # device x of each boundary line drawn in this panel
    limit_ys: list[tuple[HLine, float]]  # each limit line and its device y
    label_boxes: list[tuple[HLine, QRectF, str]]  # the line's label box (right margin) and its text
    band_polygons: list[tuple[Band, list[np.ndarray]]] = field(default_factory=list)  # per band: closed polygons


@dataclass
class ChartGeometry:
    rect: QRectF
    title_rect: QRectF
    name_boxes: list[tuple[QRectF, str]]  # segment names in the band above the plot
    panels: list[PanelGeometry]
    x_range: tuple[float, float]
    x_ticks: list[float]
    x_step: float
    legend: list[tuple[QPointF, str, str, str]]  # (top-left, label, colour, style)
    fonts: dict


def _fonts():
    base = QFont()
    base.setFamilies(["DejaVu Sans", "Liberation Sans", "Arial", "Helvetica"])
    base.setPointSizeF(7.5)
    small = QFont(base)
    small.setPointSizeF(6.5)
    title = QFont(base)
    title.setPointSizeF(8.5)
    title.setBold(True)
    return {"base": base, "small": small, "title": title}


def _runs(ok: np.ndarray) -> list[tuple[int, int]]:
    """``(start, stop)`` of each run of True in ``ok``."""
    edges = np.flatnonzero(np.diff(np.concatenate(([0], ok.astype(np.int8), [0]))))
    return list(zip(edges[::2].tolist(), edges[1::2].tolist()))


def _thinned(x: np.ndarray, y: np.ndarray, columns: Optional[int]) -> tuple[np.ndarray, np.ndarray]:
    """A run of finite points thinned to what ``columns`` columns across its x range can show
    (:func:`app.axes.thin`: each column keeps its lowest and highest point); a line of a million
    nodes draws as a few thousand."""
    if columns is None or x.size < 3 or not np.all(np.diff(x) >= 0):
        return x, y
    return thin(x, y, float(x[0]), float(x[-1]), columns)


def _polylines(x: np.ndarray, y: np.ndarray, X, Y, columns: Optional[int] = None) -> list[np.ndarray]:
    """Device polylines of a series, broken where a value is missing (NaN); each thinned to
    ``columns`` columns across the plot (None: every point)."""
    out = []
    for a, b in _runs(np.isfinite(x) & np.isfinite(y)):
        xs, ys = _thinned(x[a:b], y[a:b], columns)
        out.append(np.column_stack([X(xs), Y(ys)]))
    return out


def _spread(centres: list[float], height: float, lo: float, hi: float) -> list[float]:
    """Move label centres (sorted, top to bottom) apart by ``height`` within [lo, hi]."""
    out = list(centres)
    for i in range(1, len(out)):
        out[i] = max(out[i], out[i - 1] + height)
    if out and out[-1] > hi:
        out[-1] = hi
        for i in range(len(out) - 2, -1, -1):
            out[i] = min(out[i], out[i + 1] - height)
    return out


def layout_chart(chart: Chart, rect: QRectF, pt: float, device) -> ChartGeometry:
    """Lay ``chart`` out in ``rect`` on ``device`` (``pt`` = device units per typographic point)."""
    fonts = _fonts()
    fm = QFontMetricsF(fonts["base"], device)
    fms = QFontMetricsF(fonts["small"], device)
    line_h, small_h = fm.height(), fms.height()
    title_rect = QRectF(rect.left(), rect.top(), rect.width(), QFontMetricsF(fonts["title"], device).height())

    # legend rows at the foot
    entries: list[tuple[str, str, str]] = []
    for panel in chart.panels:
        for s in panel.series:
            if s.label and s.label not in [e[0] for e in entries]:
                entries.append((s.label, s.colour, s.style))
    entries += chart.legend_extra
    swatch, gap = 14 * pt, 8 * pt
    rows: list[list[tuple[str, str, str, float]]] = [[]]
    cursor = 0.0
    for label, colour, style in entries:
        w = swatch + 3 * pt + fms.horizontalAdvance(label) + gap
        if cursor + w > rect.width() and rows[-1]:
            rows.append([])
            cursor = 0.0
        rows[-1].append((label, colour, style, cursor))
        cursor += w
    legend_h = len(rows) * small_h * 1.25 if entries else 0.0
    legend = [
        (QPointF(rect.left() + lx, rect.bottom() - legend_h + r * small_h * 1.25), label, colour, style)
        for r, row in enumerate(rows) for label, colour, style, lx in row
    ]

    # y ranges and ticks first: the left margin fits the widest tick label
    n = len(chart.panels)
    ranges = [data_range(p) for p in chart.panels]
    band_h = small_h + 2 * pt if chart.segments else 0.0
    top = title_rect.bottom() + 3 * pt + band_h
    bottom = rect.bottom() - legend_h - 2 * pt
    x_label_h = small_h + 2 * pt + line_h
    panel_gap = line_h * 0.8
    avail = bottom - top - x_label_h - panel_gap * (n - 1)
    weights = [1.6 if i == 0 and n > 1 else 1.0 for i in range(n)]
    heights = [avail * w / sum(weights) for w in weights]
    ticks = [nice_ticks(lo, hi, 6 if h > 8 * line_h else 4) for (lo, hi), h in zip(ranges, heights)]
    steps = [(t[1] - t[0]) if len(t) > 1 else 1.0 for t in ticks]
    widest_tick = max((fms.horizontalAdvance(tick_text(v, s)) for t, s in zip(ticks, steps) for v in t), default=0.0)
    left_margin = line_h * 1.3 + 3 * pt + widest_tick + 4 * pt

    # right margin: room for the widest limit label (at most 30 % of the width), or a hair
    label_texts = [h.label for p in chart.panels for h in p.hlines if math.isfinite(h.y)]
    leader = 6 * pt
    right_margin = 4 * pt
    if label_texts:
        right_margin = min(max(fms.horizontalAdvance(t) for t in label_texts) + leader + 3 * pt, rect.width() * 0.3)
    plot_left, plot_right = rect.left() + left_margin, rect.right() - right_margin

    xs = [np.asarray(s.x, dtype=float) for p in chart.panels for s in p.series if len(s.x)]
    xs = [x[np.isfinite(x)] for x in xs]
    x_lo = min((float(x.min()) for x in xs if x.size), default=0.0)
    x_hi = max((float(x.max()) for x in xs if x.size), default=1.0)
    if x_hi - x_lo < 1e-9 * max(1.0, abs(x_hi)):
        x_hi = x_lo + 1.0
    x_ticks = nice_ticks(x_lo, x_hi, 8)

    def X(v):
        return plot_left + (np.asarray(v, dtype=float) - x_lo) / (x_hi - x_lo) * (plot_right - plot_left)

    # columns to thin curves to: four per point of plot width, far finer than a pen can show
    columns = max(int((plot_right - plot_left) / pt * 4), 16)
    name_boxes = []
    narrowest = fms.horizontalAdvance("W…") + 4 * pt
    for x0, x1, name in chart.segments:
        w = float(X(x1) - X(x0))
        if w > narrowest:
            text = fms.elidedText(name, Qt.ElideRight, w - 4 * pt)
            name_boxes.append((QRectF(float(X(x0)), top - band_h, w, small_h), text))

    panels, y_top = [], top
    for panel, (y_lo, y_hi), h, t, s in zip(chart.panels, ranges, heights, ticks, steps):
        area = QRectF(plot_left, y_top, plot_right - plot_left, h)

        def Y(v, area=area, y_lo=y_lo, y_hi=y_hi):
            return area.bottom() - (np.asarray(v, dtype=float) - y_lo) / (y_hi - y_lo) * area.height()

        curves = [(sr, _polylines(np.asarray(sr.x, dtype=float), np.asarray(sr.y, dtype=float), X, Y, columns))
                  for sr in panel.series]
        bands = []
        for band in panel.bands:
            bx, lo_, hi_ = (np.asarray(v, dtype=float) for v in (band.x, band.lower, band.upper))
            polys = []
            for a, b in _runs(np.isfinite(bx) & np.isfinite(lo_) & np.isfinite(hi_)):
                # each run of values: the upper edge, then the lower back (each edge thinned on its own)
                ux, uy = _thinned(bx[a:b], hi_[a:b], columns)
                lx, ly = _thinned(bx[a:b], lo_[a:b], columns)
                polys.append(np.vstack([np.column_stack([X(ux), Y(uy)]),
                                        np.column_stack([X(lx[::-1]), Y(ly[::-1])])]))
            bands.append((band, polys))
        bxs = [float(v) for v in X(np.asarray(chart.boundaries, dtype=float))
               if plot_left < float(v) < plot_right]
        if len(bxs) > (plot_right - plot_left) / (3 * pt):
            bxs = []  # boundaries closer than 3 pt would shade the plot grey, not mark segments
        limits = sorted(((hl, float(Y(hl.y))) for hl in panel.hlines if math.isfinite(hl.y)), key=lambda e: e[1])
        centres = _spread([yy for _, yy in limits], small_h, area.top(), area.bottom())
        boxes = []
        for (hl, _), cy in zip(limits, centres):
            text = fms.elidedText(hl.label, Qt.ElideRight, right_margin - leader - 3 * pt)
            boxes.append((hl, QRectF(plot_right + leader, cy - small_h / 2, fms.horizontalAdvance(text) + 1 * pt, small_h), text))
        panels.append(PanelGeometry(panel, area, (y_lo, y_hi), t, s, curves, bxs, limits, boxes, bands))
        y_top += h + panel_gap

    return ChartGeometry(rect, title_rect, name_boxes, panels, (x_lo, x_hi), x_ticks,
                         (x_ticks[1] - x_ticks[0]) if len(x_ticks) > 1 else 1.0, legend, fonts)


# --------------------------------------------------------------------------- painting


def pen(colour: str, width: float, style: str) -> QPen:
    p = QPen(QColor(colour), width)
    p.setCapStyle(Qt.FlatCap)
    p.setStyle({"solid": Qt.SolidLine, "dash": Qt.DashLine, "dot": Qt.DotLine,
                "dashdot": Qt.DashDotLine}.get(style, Qt.SolidLine))
    return p


def draw_chart(painter, rect: QRectF, chart: Chart, pt: float) -> ChartGeometry:
    """Draw ``chart`` into ``rect`` (device units) and return the geometry drawn."""
    g = layout_chart(chart, rect, pt, painter.device())
    fonts = g.fonts
    fms = QFontMetricsF(fonts["small"], painter.device())
    line_h = QFontMetricsF(fonts["base"], painter.device()).height()
    ink, muted = QColor(INK), QColor(INK_MUTED)
    grid_pen = QPen(QColor("#DDE3E8"), 0.4 * pt)
    boundary_pen = pen(CURVE_COLOURS["boundary"], 0.5 * pt, "dash")
    x_lo, x_hi = g.x_range

    painter.save()
    painter.setRenderHint(painter.RenderHint.Antialiasing, True)
    painter.setFont(fonts["title"])
    painter.setPen(ink)
    painter.drawText(g.title_rect, int(Qt.AlignLeft | Qt.AlignVCenter), chart.title)

    painter.setFont(fonts["small"])
    for corner, label, colour, style in g.legend:
        cy = corner.y() + fms.height() * 0.62
        if style == BAND_STYLE:
            tint = QColor(colour)
            tint.setAlpha(2 * BAND_ALPHA)
            painter.setPen(QPen(tint, 5 * pt))
        else:
            painter.setPen(pen(colour, 1.6 * pt, style))
        painter.drawLine(QPointF(corner.x(), cy), QPointF(corner.x() + 14 * pt, cy))
        painter.setPen(ink)
        painter.drawText(QPointF(corner.x() + 17 * pt, corner.y() + fms.ascent()), label)

    painter.setPen(muted)
    for box, text in g.name_boxes:
        painter.drawText(box, int(Qt.AlignCenter), text)

    def X(v):
        a = g.panels[0].area
        return a.left() + (v - x_lo) / (x_hi - x_lo) * a.width()

    for pg in g.panels:
        area = pg.area
        painter.fillRect(area, QColor("#FFFFFF"))
        painter.setFont(fonts["small"])
        y_lo, y_hi = pg.y_range
        for t in pg.y_ticks:
            yy = area.bottom() - (t - y_lo) / (y_hi - y_lo) * area.height()
            painter.setPen(grid_pen)
            painter.drawLine(QPointF(area.left(), yy), QPointF(area.right(), yy))
            painter.setPen(muted)
            painter.drawText(QRectF(rect.left(), yy - fms.height() / 2, area.left() - rect.left() - 4 * pt, fms.height()),
                             int(Qt.AlignRight | Qt.AlignVCenter), tick_text(t, pg.y_step))
        painter.setPen(grid_pen)
        for t in g.x_ticks:
            painter.drawLine(QPointF(X(t), area.top()), QPointF(X(t), area.bottom()))
        painter.save()
        painter.setFont(fonts["base"])
        painter.setPen(ink)
        painter.translate(rect.left(), area.center().y())
        painter.rotate(-90)
        painter.drawText(QRectF(-area.height() / 2, 0, area.height(), line_h * 1.3), int(Qt.AlignCenter), pg.panel.y_label)
        painter.restore()

        painter.setClipRect(area)
        painter.setPen(boundary_pen)
        for bx in pg.boundary_xs:
            painter.drawLine(QPointF(bx, area.top()), QPointF(bx, area.bottom()))
        for hl, yy in pg.limit_ys:
            painter.setPen(pen(hl.colour, 0.8 * pt, LIMIT_STYLE))
            painter.drawLine(QPointF(area.left(), yy), QPointF(area.right(), yy))
        painter.setPen(Qt.NoPen)
        for band, polys in pg.band_polygons:
            tint = QColor(band.colour)
            tint.setAlpha(BAND_ALPHA)
            painter.setBrush(tint)
            for poly in polys:
                painter.drawPolygon(QPolygonF([QPointF(px, py) for px, py in poly]))
        for series, lines in pg.curves:
            path = QPainterPath()
            for line in lines:
                path.moveTo(*line[0])
                for px, py in line[1:]:
                    path.lineTo(px, py)
            p = pen(series.colour, series.width_pt * pt, series.style)
            p.setJoinStyle(Qt.RoundJoin)
            painter.setPen(p)
            painter.setBrush(Qt.NoBrush)
            painter.drawPath(path)
        painter.setClipping(False)
        painter.setPen(QPen(QColor("#6B7780"), 0.6 * pt))
        painter.setBrush(Qt.NoBrush)
        painter.drawRect(area)

        # limit labels in the right margin, joined to their line by a short leader
        painter.setFont(fonts["small"])
        for (hl, yy), (_, box, text) in zip(pg.limit_ys, pg.label_boxes):
            painter.setPen(pen(hl.colour, 0.5 * pt, "solid"))
            painter.drawLine(QPointF(area.right(), yy), QPointF(box.left() - 1 * pt, box.center().y()))
            painter.setPen(QColor(hl.colour))
            painter.drawText(box, int(Qt.AlignLeft | Qt.AlignVCenter), text)

    last = g.panels[-1].area
    painter.setFont(fonts["small"])
    painter.setPen(muted)
    for t in g.x_ticks:
        painter.drawText(QRectF(X(t) - 30 * pt, last.bottom() + 1.5 * pt, 60 * pt, fms.height()),
                         int(Qt.AlignHCenter | Qt.AlignTop), tick_text(t, g.x_step))
    painter.setFont(fonts["base"])
    painter.setPen(ink)
    painter.drawText(QRectF(last.left(), last.bottom() + fms.height() + 2 * pt, last.width(), line_h),
                     int(Qt.AlignHCenter | Qt.AlignTop), chart.x_label)
    painter.restore()
    return g


# --------------------------------------------------------------------------- the report's charts


def _limit_lines(entries: Sequence[tuple[str, Optional[float]]], system: str) -> list[HLine]:
    """Target and limit lines ``(name, value_K)``; lines at the same value share one label
    (``'max wall 110.0 °C'``), so labels never print over each other."""
    by_value: dict[float, list[str]] = {}
    for name, value in entries:
        if value is None:
            continue
        key = round(float(value), 6)
        names = by_value.setdefault(key, [])
        if name not in names:
            names.append(name)
    return [HLine(float(units.to_display(v, "temperature", system)), f"{', '.join(names)} {fmt(v, 'temperature', system)}")
            for v, names in by_value.items()]


def _spans(result: Result, system: str) -> list[tuple[float, float, str]]:
    """``(x_start, x_end, name)`` of each segment, in display units; names shortened (a chart shows
    at most a few dozen characters in a span)."""
    if not result.segments:
        return []
    starts = _display([s.x_start_m for s in result.segments], "length", system)
    ends = _display([s.x_end_m for s in result.segments], "length", system)
    return [(float(a), float(b), shorten(s.name)) for a, b, s in zip(starts, ends, result.segments)]


def _display(values, quantity: str, system: str) -> np.ndarray:
    return np.asarray(units.to_display(np.asarray(values, dtype=float), quantity, system), dtype=float)


def _legend_limits(hlines) -> list[tuple[str, str, str]]:
    return [("target or limit", CURVE_COLOURS["limit"], LIMIT_STYLE)] if hlines else []


def alternative_chart(result: Result, system: str, targets=None, limits=None, bands=None) -> Chart:
    """Temperatures and pressure along the line of one alternative; with ``bands``
    (:class:`solver.uncertainty.Bands` of this result) bulk, inner wall and outer surface are shaded."""
    p = result.profile
    x = _display(p.x_m, "length", system)
    shaded = []
    if bands is not None and bands.width_K > 0:
        bx = _display(bands.x_m, "length", system)
        shaded = [Band(bx, _display(bands.lower[q], "temperature", system), _display(bands.upper[q], "temperature", system),
                       CURVE_COLOURS[key])
                  for key, q in (("outer_surface", "outer_surface_temperature_K"),
                                 ("inner_wall", "inner_wall_temperature_K"), ("bulk", "bulk_temperature_K"))]
    temps = [
        Series("Bulk", x, _display(p.bulk_temperature_K, "temperature", system), CURVE_COLOURS["bulk"], "solid", 1.6),
        Series("Inner wall", x, _display(p.inner_wall_temperature_K, "temperature", system), CURVE_COLOURS["inner_wall"], "dash", 1.3),
        Series("Outer surface", x, _display(p.outer_surface_temperature_K, "temperature", system), CURVE_COLOURS["outer_surface"], "dot", 1.4),
    ]
    sat = _display(p.saturation_temperature_K, "temperature", system)
    finite_sat = sat[np.isfinite(sat)]
    if finite_sat.size:  # saturation only when it is near enough to matter on this scale
        main = np.concatenate([s.y[np.isfinite(s.y)] for s in temps])
        span = max(float(main.max() - main.min()), 10.0) if main.size else 10.0
        if main.size and float(finite_sat.min()) < float(main.max()) + 0.6 * span:
            temps.append(Series("Saturation", x, sat, CURVE_COLOURS["saturation"], "dashdot", 1.0))
    entries = []
    if targets is not None:
        entries += [("max wall", targets.max_inner_wall_temperature_K), ("min outlet", targets.outlet_temperature_min_K),
                    ("max outlet", targets.outlet_temperature_max_K)]
    if limits is not None:
        entries += [("max wall", limits.max_inner_wall_temperature_K), ("min bulk", limits.min_bulk_temperature_K)]
    hlines = _limit_lines(entries, system)
    press = _display(p.pressure_Pa, "pressure", system)
    return Chart(
        title=f"Profiles along the line — {shorten(result.name)}",
        x_label=f"Position from inlet [{ulabel('length', system)}]",
        panels=[
            Panel(f"Temperature [{ulabel('temperature', system)}]", temps, hlines, minimum_span("temperature", system),
                  bands=shaded),
            Panel(f"Pressure [{ulabel('pressure', system)}]", [Series("Pressure", x, press, CURVE_COLOURS["pressure"], "solid", 1.5)],
                  min_span=minimum_span("pressure", system, press)),
        ],
        segments=_spans(result, system),
        boundaries=[x1 for _, x1, _ in _spans(result, system)[:-1]],
        legend_extra=_legend_limits(hlines) + ([(BAND_LEGEND, CURVE_COLOURS["bulk"], BAND_STYLE)] if shaded else []),
    )


def _same_spans(spans: Sequence[list[tuple[float, float, str]]]) -> bool:
    first = spans[0]
    return all(len(s) == len(first) and all(a[2] == b[2] and abs(a[1] - b[1]) <= 1e-6 * max(1.0, abs(a[1]))
                                            for a, b in zip(s, first)) for s in spans[1:])


def overlay_chart(results: Sequence[Result], system: str, targets=None) -> Chart:
    """Bulk and inner-wall temperature and pressure of several alternatives overlaid.

    Segment boundaries are drawn once, thin and grey, at every position where any alternative has
    one; segment names are printed only when all alternatives share the same segments.
    """
    temps, press, all_press = [], [], []
    for i, r in enumerate(results):
        colour = ALTERNATIVE_COLOURS[i % len(ALTERNATIVE_COLOURS)]
        style = ALTERNATIVE_STYLES[i % len(ALTERNATIVE_STYLES)]  # equal curves stay visible as two
        p = r.profile
        x = _display(p.x_m, "length", system)
        temps.append(Series(shorten(r.name), x, _display(p.bulk_temperature_K, "temperature", system), colour, style, 1.6))
        temps.append(Series("", x, _display(p.inner_wall_temperature_K, "temperature", system), colour, "dot", 0.9))
        press.append(Series(shorten(r.name), x, _display(p.pressure_Pa, "pressure", system), colour, style, 1.5))
        all_press.append(press[-1].y)
    spans = [_spans(r, system) for r in results]
    # every boundary of every alternative, once: sorted, a position within round-off of the last kept is the same
    positions: list[float] = []
    for x1 in sorted(x1 for s in spans for _, x1, _ in s[:-1]):
        if not positions or abs(x1 - positions[-1]) > 1e-6 * max(1.0, abs(x1)):
            positions.append(x1)
    entries = []
    if targets is not None:
        entries = [("min outlet", targets.outlet_temperature_min_K), ("max outlet", targets.outlet_temperature_max_K),
                   ("max wall", targets.max_inner_wall_temperature_K)]
    hlines = _limit_lines(entries, system)
    return Chart(
        title="Alternatives overlaid — bulk temperature (thick) and inner-wall temperature (dotted); pressure",
        x_label=f"Position from inlet [{ulabel('length', system)}]",
        panels=[
            Panel(f"Temperature [{ulabel('temperature', system)}]", temps, hlines, minimum_span("temperature", system)),
            Panel(f"Pressure [{ulabel('pressure', system)}]", press,
                  min_span=minimum_span("pressure", system, np.concatenate(all_press) if all_press else ())),
        ],
        segments=spans[0] if spans and _same_spans(spans) else [],
        boundaries=sorted(positions),
        legend_extra=[("inner wall (dotted)", INK_MUTED, "dot")] + _legend_limits(hlines),
        aspect=0.7,
    )
