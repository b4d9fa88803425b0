"""The summary report: a paginated PDF a reviewer can read without the app.

Works headless (``calorun report PROJECT.json -o summary.pdf``): when no Qt
application exists one is created on the offscreen platform. The body is a
``QTextDocument`` built from HTML (tables keep whole rows on a page and repeat
their header rows); profile plots are drawn as vector graphics with
``QPainter`` straight into the PDF through a text-object handler, so they stay
crisp at any zoom. Every piece of text the user typed (names, descriptions,
labels) goes through :func:`html.escape`, so ``<b>`` or ``&`` print as typed.

No physics here: numbers come from :func:`solver.solve` results, converted for
display with :mod:`app.units` in the chosen unit system, units stated beside
every value.
"""

from __future__ import annotations

import datetime as _dt
import html
import dataclasses
import math
import os
from dataclasses import dataclass, field
from pathlib import Path
from typing import Iterable, Mapping, Optional, Sequence

import numpy as np

from app import comparison, units
from solver.model import (
    Adiabatic,
    Alternative,
    Buried,
    FixedWall,
    Jacket,
    Project,
    PureFluid,
    Segment,
    SolutionFluid,
    StillAir,
    TableFluid,
    Wind,
)
from solver.results import Result

try:  # the shared palette (helper "views"); fall back to the same Okabe–Ito hex values
    from app.style import CURVE_COLOURS, INK, INK_MUTED, OKABE_ITO
except Exception:  # pragma: no cover - only while app.style is missing
    OKABE_ITO = {
        "black": "#000000", "orange": "#E69F00", "sky_blue": "#56B4E9", "bluish_green": "#009E73",
        "yellow": "#F0E442", "blue": "#0072B2", "vermillion": "#D55E00", "reddish_purple": "#CC79A7",
    }
    INK, INK_MUTED = "#1F2A33", "#5B6770"
    CURVE_COLOURS = {
        "bulk": OKABE_ITO["blue"], "inner_wall": OKABE_ITO["vermillion"], "outer_surface": OKABE_ITO["orange"],
        "saturation": OKABE_ITO["reddish_purple"], "pressure": OKABE_ITO["bluish_green"],
        "limit": "#3A3A3A", "boundary": "#9AA5AD",
    }

#: One colour per alternative in overlaid plots (Okabe–Ito, yellow left out: too pale on white).
ALTERNATIVE_COLOURS: tuple[str, ...] = (
    OKABE_ITO["blue"], OKABE_ITO["vermillion"], OKABE_ITO["bluish_green"], OKABE_ITO["reddish_purple"],
    OKABE_ITO["orange"], OKABE_ITO["sky_blue"], OKABE_ITO["black"],
)
#: Line styles cycled with the colours, so colour is never the only cue.
ALTERNATIVE_STYLES: tuple[str, ...] = ("solid", "dash", "dashdot", "dot")

MET_COLOUR = OKABE_ITO["bluish_green"]
MISSED_COLOUR = OKABE_ITO["vermillion"]
ACCENT = "#2E4A62"  # headings and table header rules (ours)
RULE = "#C9D1D7"
SHADE = "#EEF2F5"

SEVERITY_WORDS = {"danger": ("DANGER", OKABE_ITO["vermillion"]), "warning": ("WARNING", "#A86A00"), "info": ("INFO", OKABE_ITO["blue"])}

CAUTIONS: tuple[str, ...] = (
    "Results are engineering estimates from idealised models and published correlations; their "
    "uncertainty is often 10–25 % for film coefficients and more in transitional flow. They are not "
    "a substitute for a design check.",
    "Hot surfaces burn: heated lines and their supports can exceed safe touch temperatures; provide "
    "personnel protection where the outer surface is hot.",
    "A heated liquid that is blocked in (valves closed on both sides) expands and can overpressure "
    "the line; provide thermal relief.",
    "Lines can freeze or boil: loss of tracing, flow or insulation, or a control failure, can take "
    "the fluid outside the range computed here.",
    "Tracing in hazardous (classified) areas has temperature-class limits on the maximum sheath and "
    "surface temperature; this tool does not certify compliance.",
    "Defer to local codes, the applicable piping and electrical standards, the equipment "
    "manufacturers' data and licensed engineering review before anything is bought or built.",
)

ASSUMPTIONS: tuple[str, ...] = (
    "Steady state: no start-up, shut-down or cycling transients.",
    "One-dimensional flow marched along the line in flow order; the fluid is single-phase. Where a "
    "check reports boiling, flashing or freezing, the results beyond that point are not valid.",
    "Fluid properties from CoolProp (pure fluids, aqueous solutions) or from the user's table, "
    "evaluated locally along the line; table data are not extrapolated.",
    "Heat input (tracing) is uniform around the pipe and along each segment and enters at the outer "
    "surface of the pipe wall, under the insulation; local hot spots at a tracer's contact line "
    "are not modelled.",
    "Pipe wall and insulation layers conduct radially with the constant conductivities entered or "
    "taken from the material catalogue; no contact resistance between layers.",
    "Outside: natural convection or wind in cross-flow plus radiation to surroundings at the ambient "
    "temperature; a buried pipe loses heat by conduction to a ground surface at the soil temperature.",
    "Fittings act through loss coefficients K on the local velocity head; elevation changes act "
    "through the local density.",
    "Hydraulic power is the local volume flow times the pressure drop summed along "
    "the line; divide by the pump efficiency for shaft power.",
    "Correlations are used within their published ranges where possible; a check is raised when a "
    "state falls outside a correlation's range or in transitional flow.",
)


# --------------------------------------------------------------------------- small helpers


def esc(text) -> str:
    """Escape any text for the report's HTML (quotes too)."""
    return html.escape("" if text is None else str(text), quote=True)


def fmt(value, quantity: str, system: str, digits: int = 4) -> str:
    return units.format_value(value, quantity, system, digits=digits)


def _num(value, quantity: str, system: str, digits: int = 4) -> str:
    return units.format_value(value, quantity, system, digits=digits, with_unit=False)


def ulabel(quantity: str, system: str) -> str:
    return units.label(quantity, system) or "-"


def fluid_text(fluid) -> str:
    """Plain (unescaped) description of a fluid."""
    if isinstance(fluid, PureFluid):
        return f"{fluid.name} (pure fluid, CoolProp)"
    if isinstance(fluid, SolutionFluid):
        return f"{fluid.solute} solution, {fluid.concentration * 100:.0f} % (aqueous, CoolProp incompressible)"
    if isinstance(fluid, TableFluid):
        return f"{fluid.name} (user table, {len(fluid.rows)} rows)"
    return str(fluid)


def surroundings_text(s, system: str) -> str:
    """Plain (unescaped) description of a segment's surroundings."""
    t = lambda v: fmt(v, "temperature", system)  # noqa: E731
    if isinstance(s, StillAir):
        out = f"Still air at {t(s.temperature_K)}, emissivity {s.emissivity:g}"
        if s.film_coefficient_W_per_m2K is not None:
            out += f", outer film {fmt(s.film_coefficient_W_per_m2K, 'film_coefficient', system)} (entered)"
        return out
    if isinstance(s, Wind):
        out = f"Wind {fmt(s.wind_speed_m_per_s, 'velocity', system)} at {t(s.temperature_K)}, emissivity {s.emissivity:g}"
        if s.film_coefficient_W_per_m2K is not None:
            out += f", outer film {fmt(s.film_coefficient_W_per_m2K, 'film_coefficient', system)} (entered)"
        return out
    if isinstance(s, Buried):
        return (
            f"Buried {fmt(s.depth_m, 'depth', system)} deep, soil at {t(s.soil_temperature_K)}, "
            f"k {fmt(s.soil_conductivity_W_per_mK, 'conductivity', system)}"
        )
    if isinstance(s, Jacket):
        return f"Jacket medium at {t(s.medium_temperature_K)}, film {fmt(s.film_coefficient_W_per_m2K, 'film_coefficient', system)}"
    if isinstance(s, FixedWall):
        if s.steam_pressure_Pa is not None:
            return f"Wall held by condensing steam at {fmt(s.steam_pressure_Pa, 'pressure', system)}"
        return f"Wall held at {t(s.wall_temperature_K)}"
    if isinstance(s, Adiabatic):
        return "Adiabatic (no exchange)"
    return str(getattr(s, "kind", s))


def pipe_text(seg: Segment, system: str) -> str:
    p = seg.pipe
    if p.bore == "nps":
        out = f"NPS {p.nps} sch. {p.schedule}"
    else:
        out = f"ID {fmt(p.inner_diameter_m, 'diameter', system)}, wall {fmt(p.wall_thickness_m, 'thickness', system)}"
    return f"{out}, {p.material}"


def insulation_text(seg: Segment, system: str) -> str:
    if not seg.insulation:
        return "none"
    return "; ".join(
        f"{fmt(layer.thickness_m, 'thickness', system)} {layer.material} "
        f"(k {fmt(layer.conductivity_W_per_mK, 'conductivity', system, digits=3)})"
        for layer in seg.insulation
    )


def fittings_text(seg: Segment) -> str:
    if not seg.fittings:
        return "none"
    parts = []
    for f in seg.fittings:
        name = f.label or f.kind.replace("_", " ")
        if f.kind == "custom" and f.K is not None:
            name += f" (K {f.K:g})"
        parts.append(f"{f.count} × {name}")
    return "; ".join(parts)


def method_entries(results: Iterable[Result]) -> list[tuple[str, str]]:
    """Methods used across ``results`` as ``(name, source)``, in first-use order, without repeats.

    A method the solver names by a key of ``solver.correlations.METHODS`` gets
    that entry's published source.
    """
    try:
        from solver.correlations import METHODS
    except Exception:  # pragma: no cover - correlations module missing
        METHODS = {}
    seen: set[str] = set()
    out: list[tuple[str, str]] = []
    for r in results:
        for m in r.methods:
            text = str(m)
            if text in seen:
                continue
            seen.add(text)
            if text in METHODS:
                out.append((text.replace("_", " "), METHODS[text]))
            else:
                name, sep, source = text.partition(": ")
                out.append((name, source) if sep and len(name) < 60 else ("", text))
    return out


# --------------------------------------------------------------------------- plots (drawn with QPainter)


@dataclass
class Series:
    label: str
    x: np.ndarray
    y: np.ndarray
    colour: str
    style: str = "solid"  # solid | dash | dot | dashdot
    width_pt: float = 1.4


@dataclass
class HLine:
    y: float
    label: str
    colour: str = "#3A3A3A"


@dataclass
class Panel:
    y_label: str
    series: list[Series]
    hlines: list[HLine] = field(default_factory=list)


@dataclass
class Boundaries:
    """Segment spans of one alternative: [(x_start, x_end, name)] in display units."""

    spans: list[tuple[float, float, str]]
    colour: Optional[str] = None  # None: grey dashed lines with names (single alternative)
    label: str = ""


@dataclass
class Chart:
    title: str
    x_label: str
    panels: list[Panel]
    boundaries: list[Boundaries] = field(default_factory=list)
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


def _tick_text(v: float, step: float) -> str:
    decimals = max(0, -int(math.floor(math.log10(step))) if step > 0 else 0)
    if step >= 1 and abs(step - round(step)) < 1e-9:
        decimals = 0
    elif step > 0 and abs(step * 10 - round(step * 10)) < 1e-9:
        decimals = max(decimals, 1)
    return f"{v:.{decimals}f}".replace("-", "\u2212")


def _data_range(panel: Panel) -> tuple[float, float]:
    lo, hi = math.inf, -math.inf
    for s in panel.series:
        y = np.asarray(s.y, dtype=float)
        y = y[np.isfinite(y)]
        if y.size:
            lo, hi = min(lo, float(y.min())), max(hi, float(y.max()))
    for h in panel.hlines:
        if math.isfinite(h.y):
            lo, hi = min(lo, h.y), max(hi, h.y)
    if not math.isfinite(lo):
        return 0.0, 1.0
    if hi - lo < 1e-9 * max(1.0, abs(hi)):
        pad = max(abs(hi) * 0.01, 0.5)
        return lo - pad, hi + pad
    pad = 0.06 * (hi - lo)
    return lo - pad, hi + pad


def draw_chart(painter, rect, chart: Chart, pt: float) -> None:
    """Draw ``chart`` into ``rect`` (device units). ``pt`` = device units per typographic point."""
    from PySide6.QtCore import QPointF, QRectF, Qt
    from PySide6.QtGui import QColor, QFont, QFontMetricsF, QPainterPath, QPen

    painter.save()
    painter.setRenderHint(painter.RenderHint.Antialiasing, True)
    base_font = QFont()
    base_font.setFamilies(["DejaVu Sans", "Liberation Sans", "Arial", "Helvetica"])
    base_font.setPointSizeF(7.5)
    small = QFont(base_font)
    small.setPointSizeF(6.5)
    title_font = QFont(base_font)
    title_font.setPointSizeF(8.5)
    title_font.setBold(True)
    painter.setFont(base_font)
    fm = QFontMetricsF(base_font, painter.device())
    fms = QFontMetricsF(small, painter.device())
    line_h = fm.height()

    ink = QColor(INK)
    muted = QColor(INK_MUTED)
    grid_pen = QPen(QColor("#DDE3E8"), 0.4 * pt)
    axis_pen = QPen(QColor("#6B7780"), 0.6 * pt)

    # Title
    painter.setFont(title_font)
    painter.setPen(ink)
    title_h = QFontMetricsF(title_font, painter.device()).height()
    painter.drawText(QRectF(rect.left(), rect.top(), rect.width(), title_h), int(Qt.AlignLeft | Qt.AlignVCenter), chart.title)

    # Legend entries (unique labels, in order)
    legend: list[tuple[str, str, str]] = []
    seen = set()
    for panel in chart.panels:
        for s in panel.series:
            if s.label and s.label not in seen:
                seen.add(s.label)
                legend.append((s.label, s.colour, s.style))
    painter.setFont(small)
    swatch = 14 * pt
    gap = 8 * pt
    legend_rows: list[list[tuple[str, str, str, float]]] = [[]]
    x_cursor = 0.0
    for lab, col, sty in legend:
        w = swatch + 3 * pt + fms.horizontalAdvance(lab) + gap
        if x_cursor + w > rect.width() and legend_rows[-1]:
            legend_rows.append([])
            x_cursor = 0.0
        legend_rows[-1].append((lab, col, sty, x_cursor))
        x_cursor += w
    legend_h = len(legend_rows) * fms.height() * 1.25 if legend else 0.0
    ly = rect.bottom() - legend_h
    for row in legend_rows:
        for lab, col, sty, lx in row:
            cy = ly + fms.height() * 0.62
            painter.setPen(_pen(col, 1.6 * pt, sty))
            painter.drawLine(QPointF(rect.left() + lx, cy), QPointF(rect.left() + lx + swatch, cy))
            painter.setPen(ink)
            painter.drawText(QPointF(rect.left() + lx + swatch + 3 * pt, ly + fms.ascent()), lab)
        ly += fms.height() * 1.25

    # Plot area
    painter.setFont(base_font)
    top = rect.top() + title_h + 3 * pt
    bottom = rect.bottom() - legend_h - 2 * pt
    x_label_h = line_h * 2.3  # tick labels + axis label
    left_margin = fm.horizontalAdvance("\u22120000.0") + line_h * 1.6
    right = rect.right() - 4 * pt
    plot_left = rect.left() + left_margin
    panel_gap = line_h * 0.8
    n = len(chart.panels)
    avail = bottom - top - x_label_h - panel_gap * (n - 1)
    weights = [1.6 if i == 0 and n > 1 else 1.0 for i in range(n)]
    heights = [avail * w / sum(weights) for w in weights]

    # x range from all series
    xs = [np.asarray(s.x, dtype=float) for p in chart.panels for s in p.series if len(s.x)]
    x_lo = min(float(np.nanmin(x)) for x in xs) if xs else 0.0
    x_hi = max(float(np.nanmax(x)) for x in xs) if xs else 1.0
    if x_hi <= x_lo:
        x_hi = x_lo + 1.0
    x_ticks = nice_ticks(x_lo, x_hi, 8)
    x_step = (x_ticks[1] - x_ticks[0]) if len(x_ticks) > 1 else 1.0

    def X(v):
        return plot_left + (v - x_lo) / (x_hi - x_lo) * (right - plot_left)

    y_top = top
    for i, panel in enumerate(chart.panels):
        h = heights[i]
        area = QRectF(plot_left, y_top, right - plot_left, h)
        y_lo, y_hi = _data_range(panel)
        y_ticks = nice_ticks(y_lo, y_hi, 6 if h > 4 * line_h * 2 else 4)
        y_step = (y_ticks[1] - y_ticks[0]) if len(y_ticks) > 1 else 1.0

        def Y(v, area=area, y_lo=y_lo, y_hi=y_hi):
            return area.bottom() - (v - y_lo) / (y_hi - y_lo) * area.height()

        painter.fillRect(area, QColor("#FFFFFF"))
        # grid + y tick labels
        painter.setFont(small)
        for t in y_ticks:
            yy = Y(t)
            painter.setPen(grid_pen)
            painter.drawLine(QPointF(area.left(), yy), QPointF(area.right(), yy))
            painter.setPen(muted)
            txt = _tick_text(t, y_step)
            painter.drawText(
                QRectF(rect.left(), yy - fms.height() / 2, left_margin - 4 * pt - line_h * 0.2, fms.height()),
                int(Qt.AlignRight | Qt.AlignVCenter),
                txt,
            )
        for t in x_ticks:
            xx = X(t)
            painter.setPen(grid_pen)
            painter.drawLine(QPointF(xx, area.top()), QPointF(xx, area.bottom()))
        # y axis label, rotated
        painter.save()
        painter.setFont(base_font)
        painter.setPen(ink)
        painter.translate(rect.left() + line_h * 0.1, area.center().y())
        painter.rotate(-90)
        painter.drawText(QRectF(-h / 2, 0, h, line_h), int(Qt.AlignCenter), panel.y_label)
        painter.restore()

        # segment boundaries
        painter.setClipRect(area)
        for bi, b in enumerate(chart.boundaries):
            if b.colour is None:
                painter.setPen(_pen(CURVE_COLOURS.get("boundary", "#9AA5AD"), 0.7 * pt, "dash"))
                for x0, x1, name in b.spans[:-1]:
                    painter.drawLine(QPointF(X(x1), area.top()), QPointF(X(x1), area.bottom()))
                if i == 0:
                    painter.setFont(small)
                    painter.setPen(muted)
                    for x0, x1, name in b.spans:
                        w = X(x1) - X(x0)
                        if w > fms.horizontalAdvance("W…") + 4 * pt:
                            txt = fms.elidedText(name, Qt.ElideRight, w - 4 * pt)
                            painter.drawText(QRectF(X(x0), area.top() + 1 * pt, w, fms.height()), int(Qt.AlignCenter), txt)
            else:
                # coloured ticks along the top edge, one row per alternative
                painter.setPen(QPen(QColor(b.colour), 1.2 * pt))
                y0 = area.top() + (bi * 4 + 1) * pt
                for x0, x1, name in b.spans[:-1]:
                    painter.drawLine(QPointF(X(x1), y0), QPointF(X(x1), y0 + 6 * pt))
                    painter.setPen(_pen(b.colour, 0.5 * pt, "dot"))
                    painter.drawLine(QPointF(X(x1), y0 + 6 * pt), QPointF(X(x1), area.bottom()))
                    painter.setPen(QPen(QColor(b.colour), 1.2 * pt))

        # limit lines
        painter.setFont(small)
        for hl in panel.hlines:
            if not math.isfinite(hl.y):
                continue
            painter.setPen(_pen(hl.colour, 0.8 * pt, "dashdot"))
            yy = Y(hl.y)
            painter.drawLine(QPointF(area.left(), yy), QPointF(area.right(), yy))
            tw = fms.horizontalAdvance(hl.label)
            label_rect = QRectF(area.left() + 4 * pt, yy - fms.height() - 1 * pt, tw + 4 * pt, fms.height())
            if label_rect.top() < area.top():
                label_rect.moveTop(yy + 1 * pt)
            painter.fillRect(label_rect, QColor(255, 255, 255, 220))
            painter.setPen(QColor(hl.colour))
            painter.drawText(label_rect, int(Qt.AlignCenter), hl.label)

        # curves
        for s in panel.series:
            x = np.asarray(s.x, dtype=float)
            y = np.asarray(s.y, dtype=float)
            path = QPainterPath()
            pen_down = False
            for xv, yv in zip(x, y):
                if not (math.isfinite(xv) and math.isfinite(yv)):
                    pen_down = False
                    continue
                if pen_down:
                    path.lineTo(X(xv), Y(yv))
                else:
                    path.moveTo(X(xv), Y(yv))
                    pen_down = True
            pen = _pen(s.colour, s.width_pt * pt, s.style)
            pen.setJoinStyle(Qt.RoundJoin)
            painter.setPen(pen)
            painter.setBrush(Qt.NoBrush)
            painter.drawPath(path)
        painter.setClipping(False)

        # frame
        painter.setPen(axis_pen)
        painter.setBrush(Qt.NoBrush)
        painter.drawRect(area)
        y_top += h + panel_gap

    # x tick labels and axis label under the last panel
    painter.setFont(small)
    painter.setPen(muted)
    last_bottom = y_top - panel_gap
    for t in x_ticks:
        xx = X(t)
        txt = _tick_text(t, x_step)
        painter.drawText(QRectF(xx - 30 * pt, last_bottom + 1.5 * pt, 60 * pt, fms.height()), int(Qt.AlignHCenter | Qt.AlignTop), txt)
    painter.setFont(base_font)
    painter.setPen(ink)
    painter.drawText(
        QRectF(plot_left, last_bottom + fms.height() + 2 * pt, right - plot_left, line_h),
        int(Qt.AlignHCenter | Qt.AlignTop),
        chart.x_label,
    )
    painter.restore()


def _pen(colour: str, width: float, style: str):
    from PySide6.QtCore import Qt
    from PySide6.QtGui import QColor, QPen

    pen = QPen(QColor(colour), width)
    pen.setCapStyle(Qt.FlatCap)
    pen.setStyle(
        {"solid": Qt.SolidLine, "dash": Qt.DashLine, "dot": Qt.DotLine, "dashdot": Qt.DashDotLine}.get(style, Qt.SolidLine)
    )
    return pen


def alternative_chart(result: Result, system: str, targets=None, limits=None) -> Chart:
    """Temperatures and pressure along the line of one alternative."""
    p = result.profile
    tq = lambda v: units.to_display(np.asarray(v, dtype=float), "temperature", system)  # noqa: E731
    x = units.to_display(np.asarray(p.x_m, dtype=float), "length", system)
    temps = [
        Series("Bulk", x, tq(p.bulk_temperature_K), CURVE_COLOURS["bulk"], "solid", 1.6),
        Series("Inner wall", x, tq(p.inner_wall_temperature_K), CURVE_COLOURS["inner_wall"], "dash", 1.3),
        Series("Outer surface", x, tq(p.outer_surface_temperature_K), CURVE_COLOURS["outer_surface"], "dot", 1.4),
    ]
    sat = tq(p.saturation_temperature_K)
    finite_sat = sat[np.isfinite(sat)]
    if finite_sat.size:
        main = np.concatenate([np.asarray(s.y)[np.isfinite(s.y)] for s in temps] or [np.array([0.0])])
        span = max(float(main.max() - main.min()), 10.0)
        if float(finite_sat.min()) < float(main.max()) + 0.6 * span:
            temps.append(Series("Saturation", x, sat, CURVE_COLOURS["saturation"], "dashdot", 1.0))
    hlines = []
    limit_colour = CURVE_COLOURS.get("limit", "#3A3A3A")
    if targets is not None:
        if targets.max_inner_wall_temperature_K is not None:
            hlines.append(HLine(float(tq(targets.max_inner_wall_temperature_K)), "target: max wall", limit_colour))
        if targets.outlet_temperature_min_K is not None:
            hlines.append(HLine(float(tq(targets.outlet_temperature_min_K)), "target: outlet min", limit_colour))
        if targets.outlet_temperature_max_K is not None:
            hlines.append(HLine(float(tq(targets.outlet_temperature_max_K)), "target: outlet max", limit_colour))
    if limits is not None and limits.max_inner_wall_temperature_K is not None:
        hlines.append(HLine(float(tq(limits.max_inner_wall_temperature_K)), "limit: max wall", limit_colour))
    if limits is not None and limits.min_bulk_temperature_K is not None:
        hlines.append(HLine(float(tq(limits.min_bulk_temperature_K)), "limit: min bulk", limit_colour))
    hlines = _merge_close_lines(hlines)
    press = Series("Pressure", x, units.to_display(np.asarray(p.pressure_Pa, dtype=float), "pressure", system), CURVE_COLOURS["pressure"], "solid", 1.5)
    spans = [
        (units.to_display(s.x_start_m, "length", system), units.to_display(s.x_end_m, "length", system), s.name)
        for s in result.segments
    ]
    return Chart(
        title=f"Profiles along the line — {result.name}",
        x_label=f"Position from inlet [{ulabel('length', system)}]",
        panels=[
            Panel(f"Temperature [{ulabel('temperature', system)}]", temps, hlines),
            Panel(f"Pressure [{ulabel('pressure', system)}]", [press]),
        ],
        boundaries=[Boundaries(spans)],
    )


def overlay_chart(results: Sequence[Result], system: str, targets=None) -> Chart:
    """Bulk and inner-wall temperature and pressure of several alternatives overlaid."""
    temps, press, bounds = [], [], []
    for i, r in enumerate(results):
        colour = ALTERNATIVE_COLOURS[i % len(ALTERNATIVE_COLOURS)]
        style = ALTERNATIVE_STYLES[(i // len(ALTERNATIVE_COLOURS)) % len(ALTERNATIVE_STYLES)]
        p = r.profile
        x = units.to_display(np.asarray(p.x_m, dtype=float), "length", system)
        temps.append(Series(r.name, x, units.to_display(np.asarray(p.bulk_temperature_K, dtype=float), "temperature", system), colour, style, 1.6))
        temps.append(Series("", x, units.to_display(np.asarray(p.inner_wall_temperature_K, dtype=float), "temperature", system), colour, "dot", 0.9))
        press.append(Series(r.name, x, units.to_display(np.asarray(p.pressure_Pa, dtype=float), "pressure", system), colour, style, 1.5))
        bounds.append(
            Boundaries(
                [(units.to_display(s.x_start_m, "length", system), units.to_display(s.x_end_m, "length", system), s.name) for s in r.segments],
                colour,
                r.name,
            )
        )
    hlines = []
    if targets is not None:
        tq = lambda v: float(units.to_display(v, "temperature", system))  # noqa: E731
        if targets.outlet_temperature_min_K is not None:
            hlines.append(HLine(tq(targets.outlet_temperature_min_K), "target: outlet min"))
        if targets.outlet_temperature_max_K is not None:
            hlines.append(HLine(tq(targets.outlet_temperature_max_K), "target: outlet max"))
        if targets.max_inner_wall_temperature_K is not None:
            hlines.append(HLine(tq(targets.max_inner_wall_temperature_K), "target: max wall"))
    return Chart(
        title="Alternatives overlaid — bulk temperature (thick) and inner-wall temperature (dotted); pressure",
        x_label=f"Position from inlet [{ulabel('length', system)}]",
        panels=[
            Panel(f"Temperature [{ulabel('temperature', system)}]", temps, hlines),
            Panel(f"Pressure [{ulabel('pressure', system)}]", press),
        ],
        boundaries=bounds,
        aspect=0.7,
    )


# --------------------------------------------------------------------------- HTML body

_CSS = f"""
body {{ color: {INK}; }}
h1 {{ font-size: 17pt; color: {ACCENT}; margin-top: 0px; margin-bottom: 2px; }}
h2 {{ font-size: 12.5pt; color: {ACCENT}; margin-top: 14px; margin-bottom: 5px; }}
h3 {{ font-size: 10pt; color: {ACCENT}; margin-top: 10px; margin-bottom: 4px; }}
p {{ margin-top: 2px; margin-bottom: 4px; }}
.muted {{ color: {INK_MUTED}; }}
.small {{ font-size: 7.5pt; }}
.kicker {{ font-size: 8pt; color: {INK_MUTED}; }}
table.grid {{ border-collapse: collapse; }}
table.grid th {{ background-color: {SHADE}; color: {ACCENT}; font-weight: bold; text-align: left;
               border-bottom: 1px solid {ACCENT}; padding: 2px 5px 2px 5px; }}
table.grid td {{ border-bottom: 0.5px solid {RULE}; padding: 2px 5px 2px 5px; vertical-align: top; }}
td.num, th.num {{ text-align: right; }}
.met {{ color: {MET_COLOUR}; font-weight: bold; }}
.missed {{ color: {MISSED_COLOUR}; font-weight: bold; }}
.diff {{ color: {INK_MUTED}; font-size: 7.5pt; }}
"""


@dataclass
class _Table:
    headers: Sequence[str]
    rows: Sequence[Sequence[str]]
    num_cols: Sequence[int] = ()
    widths: Optional[Sequence[int]] = None
    font_pt: float = 8.0
    raw: Optional[str] = None  # a one-row box drawn as given (never split)
    splits: set = field(default_factory=set)  # body-row indices that start a new page


@dataclass
class _Heading:
    level: int
    html: str
    style: str = ""
    break_before: bool = False


class _Html:
    """The report body as parts (HTML strings, tables, headings, figures).

    Tables and headings stay objects so the renderer can start a new page in
    front of a row or heading that Qt would otherwise split or strand.
    """

    def __init__(self):
        self.parts: list = []
        self.figures: list[Chart] = []
        self.table_map: list[tuple[_Table, int]] = []  # per rendered <table>: (table, first body row)
        self.heading_map: list[_Heading] = []

    def add(self, s: str) -> None:
        self.parts.append(s)

    def heading(self, level: int, html_text: str, style: str = "") -> None:
        self.parts.append(_Heading(level, html_text, style))

    def figure(self, chart: Chart) -> None:
        self.add(f'<p align="center">[[CALORUN-FIGURE-{len(self.figures)}]]</p>')
        self.figures.append(chart)

    def page_break(self) -> None:
        self.add('<p style="page-break-before: always; margin: 0px;"></p>')

    def box(self, inner_html: str, border: str, background: str) -> None:
        raw = (
            f'<table width="100%" cellspacing="0" cellpadding="5" style="margin-top: 6px; margin-bottom: 4px;">'
            f'<tr><td style="border-left: 3px solid {border}; background-color: {background};">{inner_html}</td></tr></table>'
        )
        self.parts.append(_Table((), (), raw=raw))

    def table(self, headers: Sequence[str], rows: Sequence[Sequence[str]], num_cols: Sequence[int] = (), widths: Sequence[int] | None = None, font_pt: float = 8.0) -> None:
        """A table; headers and cells are HTML already (escape user text first)."""
        self.parts.append(_Table(headers, rows, tuple(num_cols), widths, font_pt))

    def _table_html(self, t: _Table, first: int, last: int, page_break: bool) -> str:
        brk = " page-break-before: always;" if page_break else ""
        out = [f'<table class="grid" width="100%" cellspacing="0" style="font-size: {t.font_pt}pt;{brk}"><thead><tr>']
        for i, h in enumerate(t.headers):
            cls = ' class="num"' if i in t.num_cols else ""
            w = f' width="{t.widths[i]}%"' if t.widths else ""
            out.append(f"<th{cls}{w}>{h}</th>")
        out.append("</tr></thead><tbody>")
        for row in t.rows[first:last]:
            out.append("<tr>")
            for i, c in enumerate(row):
                cls = ' class="num"' if i in t.num_cols else ""
                out.append(f"<td{cls}>{c}</td>")
            out.append("</tr>")
        out.append("</tbody></table>")
        return "".join(out)

    def html(self) -> str:
        self.table_map = []
        self.heading_map = []
        body = []
        for part in self.parts:
            if isinstance(part, str):
                body.append(part)
            elif isinstance(part, _Heading):
                self.heading_map.append(part)
                style = part.style + (" page-break-before: always;" if part.break_before else "")
                attr = f' style="{style.strip()}"' if style.strip() else ""
                body.append(f"<h{part.level}{attr}>{part.html}</h{part.level}>")
            elif part.raw is not None:
                self.table_map.append((part, 0))
                body.append(part.raw)
            else:
                cuts = [0] + sorted(s for s in part.splits if 0 < s < len(part.rows)) + [len(part.rows)]
                for a, b in zip(cuts[:-1], cuts[1:]):
                    self.table_map.append((part, a))
                    body.append(self._table_html(part, a, b, page_break=a > 0))
        return f"<html><head><style>{_CSS}</style></head><body>{''.join(body)}</body></html>"


@dataclass
class _Outcome:
    alternative: Alternative
    result: Optional[Result]
    error: Optional[str]


def _verdict_cell(v: comparison.TargetVerdict, system: str) -> str:
    value = fmt(v.value, v.quantity, system)
    if v.met:
        return f'<span class="met">\u2713 met</span><br><span class="diff">{esc(value)}</span>'
    return f'<span class="missed">\u2717 missed</span><br><span class="diff">{esc(value)}</span>'


def _job_sentence(project: Project, outcomes: Sequence[_Outcome], system: str) -> str:
    base = project.baseline_alternative()
    feed = base.feed
    if feed.mass_flow_kg_per_s is not None:
        flow = fmt(feed.mass_flow_kg_per_s, "mass_flow", system)
    else:
        flow = fmt(feed.volume_flow_m3_per_s, "volume_flow", system)
    length = sum(s.length_m for s in base.segments)
    n_alt = len(outcomes)
    targets = "against the project's design targets" if comparison.targets_set(project.targets) else "(no design targets set)"
    return (
        f"Carry {esc(fluid_text(base.fluid).split(' (')[0])} at {esc(flow)}, entering at "
        f"{esc(fmt(feed.inlet_temperature_K, 'temperature', system))} and {esc(fmt(feed.inlet_pressure_Pa, 'pressure', system))}, "
        f"through {len(base.segments)} segment{'s' if len(base.segments) != 1 else ''} "
        f"({esc(fmt(length, 'length', system))} in the baseline) and judge "
        f"{n_alt} alternative{'s' if n_alt != 1 else ''} by temperature, wall temperature, pressure drop and "
        f"heat {targets}."
    )


def build_html(project: Project, outcomes: Sequence[_Outcome], system: str, date_text: str) -> _Html:
    doc = _Html()
    solved = [o.result for o in outcomes if o.result is not None]
    failed = [o for o in outcomes if o.result is None]
    baseline_name = project.baseline_alternative().name

    # ---- title block
    doc.add('<p class="kicker">CALORUN · LINE DESIGN SUMMARY</p>')
    doc.heading(1, esc(project.name))
    if project.description:
        doc.add(f'<p>{esc(project.description)}</p>')
    unit_word = "SI (°C, bar(a), kPa, kW, mm, m)" if system == "SI" else "US customary (°F, psia, psi, Btu/h, in, ft)"
    title_rows = [
        ["Prepared by", esc(project.prepared_by) or '<span class="muted">not stated</span>'],
        ["Revision", esc(project.revision) or '<span class="muted">not stated</span>'],
        ["Date", esc(date_text)],
        ["Alternatives", ", ".join(esc(o.alternative.name) + (" <i>(baseline)</i>" if o.alternative.name == baseline_name else "") for o in outcomes)],
        ["Units", esc(unit_word) + "; pressures are absolute unless marked as a drop"],
    ]
    doc.table(["Project", ""], title_rows, widths=[22, 78], font_pt=8.5)

    doc.heading(2, "The job")
    doc.add(f"<p>{_job_sentence(project, outcomes, system)}</p>")

    # ---- cautions up front, in short
    doc.box(
        "<b>Caution.</b> These are engineering estimates. Heated lines can burn, overpressure when blocked in, "
        "boil or freeze; tracing in hazardous areas has temperature-class limits. Defer to local codes, the "
        "applicable piping and electrical standards and licensed engineering review. See “Cautions” at the end.",
        OKABE_ITO["orange"], "#FFF6E8",
    )

    # ---- verdicts at a glance
    doc.heading(2, "Verdict at a glance")
    glance_rows = []
    for o in outcomes:
        name = esc(o.alternative.name) + (" <i>(baseline)</i>" if o.alternative.name == baseline_name else "")
        if o.result is None:
            glance_rows.append([name, '<span class="missed">not solved</span>', "—", "—", "—", esc(o.error or "")])
            continue
        r = o.result
        verdicts = comparison.target_verdicts(project.targets, r)
        if verdicts:
            n_met = sum(v.met for v in verdicts)
            cls = "met" if n_met == len(verdicts) else "missed"
            vt = f'<span class="{cls}">{n_met} of {len(verdicts)} targets met</span>'
        else:
            vt = '<span class="muted">no targets set</span>'
        counts = {s: sum(c.severity == s for c in r.checks) for s in ("danger", "warning", "info")}
        checks = ", ".join(f"{counts[s]} {s}" for s in ("danger", "warning", "info") if counts[s]) or "none"
        glance_rows.append([
            name, vt, esc(fmt(r.outlet_temperature_K, "temperature", system)),
            esc(fmt(r.max_inner_wall_temperature_K, "temperature", system)),
            esc(fmt(r.pressure_drop_Pa, "pressure_difference", system)), esc(checks),
        ])
    doc.table(
        ["Alternative", "Targets", "Outlet temperature", "Max inner wall", "Pressure drop", "Checks"],
        glance_rows, num_cols=(2, 3, 4), widths=[24, 18, 15, 14, 13, 16],
    )

    # ---- comparison and targets
    if solved:
        table = comparison.compare(solved, baseline_name)
        doc.heading(2, "Key Figures compared")
        ref_note = f"Differences are against the baseline, <b>{esc(table.baseline_name)}</b>"
        if table.baseline_name != baseline_name:
            ref_note += f" (the project baseline {esc(baseline_name)} could not be solved)"
        doc.add(f'<p class="small muted">{ref_note}; a change in percent is shown where it helps.</p>')
        headers = ["Key figure"] + [
            esc(n) + (" <i>(baseline)</i>" if i == table.baseline_index else "") for i, n in enumerate(table.names)
        ]
        rows = []
        for row in table.rows:
            cells = [esc(row.label.strip()) if not row.label.startswith(" ") else f"&nbsp;&nbsp;&nbsp;{esc(row.label.strip())}"]
            ref = row.values[table.baseline_index]
            for i, v in enumerate(row.values):
                c = esc(comparison.format_figure(v, row.spec, system))
                if i != table.baseline_index and v is not None:
                    c += f'<br><span class="diff">{esc(comparison.format_difference(row.differences[i], ref, row.spec, system))}</span>'
                cells.append(c)
            rows.append(cells)
        n = len(table.names)
        doc.table(headers, rows, num_cols=tuple(range(1, n + 1)), font_pt=8.0 if n <= 4 else 7.0)
        if failed:
            doc.add('<p class="small missed">Not in this comparison (could not be solved): ' + ", ".join(esc(o.alternative.name) for o in failed) + ".</p>")

        doc.heading(2, "Design targets")
        if comparison.targets_set(project.targets):
            per_alt = [comparison.target_verdicts(project.targets, r) for r in solved]
            rows = []
            for j, v0 in enumerate(per_alt[0]):
                cells = [esc(v0.label), esc(comparison.format_target(v0, system))]
                cells += [_verdict_cell(vs[j], system) for vs in per_alt]
                rows.append(cells)
            overall = ["<b>All targets</b>", ""]
            for vs in per_alt:
                overall.append('<span class="met">\u2713 all met</span>' if comparison.all_met(vs) else '<span class="missed">\u2717 not all met</span>')
            rows.append(overall)
            doc.table(["Target", "Limit"] + [esc(r.name) for r in solved], rows, num_cols=(), font_pt=8.0 if n <= 4 else 7.0)
            doc.add('<p class="small muted">\u2713 met: the value is on the allowed side of the limit or equal to it. \u2717 missed: it is not, or the value is undefined.</p>')
        else:
            doc.add('<p class="muted">No design targets are set on this project.</p>')

        if len(solved) > 1:
            doc.figure(overlay_chart(solved, system, project.targets))

    # ---- each alternative
    for o in outcomes:
        _alternative_section(doc, project, o, system, baseline_name)

    # ---- methods, assumptions, cautions
    doc.page_break()
    doc.heading(2, "Methods and correlations")
    entries = method_entries(solved)
    if entries:
        doc.add('<p class="small">As used by the solver for the alternatives in this report, with their published sources.</p>')
        doc.table(["Method", "Source"], [[esc(a), esc(b)] for a, b in entries], widths=[24, 76], font_pt=7.5)
    else:
        doc.add('<p class="muted">No alternative was solved, so no methods were used.</p>')
    doc.add(
        '<p class="small">Units: display conversion by exact factors (1 in = 25.4 mm, 1 lb = 0.45359237 kg, '
        "1 psi = 6894.757 Pa, International Table Btu = 1055.056 J); gauge pressure = absolute − 101.325 kPa.</p>"
    )
    doc.heading(2, "Assumptions and limits")
    doc.add("<ul>" + "".join(f"<li>{esc(a)}</li>" for a in ASSUMPTIONS) + "</ul>")
    doc.heading(2, "Cautions")
    doc.add("<ul>" + "".join(f"<li>{esc(c)}</li>" for c in CAUTIONS) + "</ul>")
    doc.add(f'<p class="small muted">Produced with Calorun on {esc(date_text)}. Check values that matter by an independent method.</p>')
    return doc


def _alternative_section(doc: _Html, project: Project, o: _Outcome, system: str, baseline_name: str) -> None:
    alt = o.alternative
    r = o.result
    doc.page_break()
    tag = " — baseline" if alt.name == baseline_name else ""
    doc.add(f'<p class="kicker">ALTERNATIVE{esc(tag.upper())}</p>')
    doc.heading(2, esc(alt.name), "margin-top: 0px;")
    if alt.description:
        doc.add(f"<p>{esc(alt.description)}</p>")
    feed = alt.feed
    if feed.mass_flow_kg_per_s is not None:
        flow = f"{fmt(feed.mass_flow_kg_per_s, 'mass_flow', system)} (mass flow)"
    else:
        flow = f"{fmt(feed.volume_flow_m3_per_s, 'volume_flow', system)} (volume flow at inlet)"
    rows = [
        ["Fluid", esc(fluid_text(alt.fluid))],
        ["Inlet temperature", esc(fmt(feed.inlet_temperature_K, "temperature", system))],
        ["Inlet pressure", esc(fmt(feed.inlet_pressure_Pa, "pressure", system))],
        ["Flow", esc(flow)],
    ]
    if alt.limits.max_inner_wall_temperature_K is not None:
        rows.append(["Wall-temperature limit", esc(fmt(alt.limits.max_inner_wall_temperature_K, "temperature", system))])
    if alt.limits.min_bulk_temperature_K is not None:
        rows.append(["Minimum bulk temperature", esc(fmt(alt.limits.min_bulk_temperature_K, "temperature", system))])
    doc.heading(3, "Feed")
    doc.table(["Feed", ""], rows, widths=[28, 72])

    doc.heading(3, "Segments (in flow order)")
    L, D, P = ulabel("length", system), ulabel("diameter", system), ulabel("power_per_length", system)
    seg_rows = []
    for i, s in enumerate(alt.segments):
        span = r.segments[i] if r is not None and i < len(r.segments) else None
        bore = esc(pipe_text(s, system))
        if span is not None:
            bore += f'<br><span class="diff">ID {esc(_num(span.inner_diameter_m, "diameter", system))} {D}</span>'
        fit = esc(fittings_text(s))
        if span is not None and s.fittings:
            fit += f'<br><span class="diff">ΣK {span.fittings_K:.3g}</span>'
        seg_rows.append([
            str(i + 1), esc(s.name), esc(_num(s.length_m, "length", system)), bore,
            esc(_num(s.elevation_change_m, "elevation", system)) if s.elevation_change_m else "0",
            fit, esc(_num(s.heat_input_W_per_m, "power_per_length", system)) if s.heat_input_W_per_m else "—",
            esc(insulation_text(s, system)), esc(surroundings_text(s.surroundings, system)),
        ])
    doc.table(
        ["#", "Name", f"Length [{L}]", "Pipe", f"Rise [{ulabel('elevation', system)}]", "Fittings", f"Heat input [{P}]", "Insulation", "Surroundings"],
        seg_rows, num_cols=(0, 2, 4, 6), widths=[3, 11, 7, 15, 6, 14, 8, 16, 20], font_pt=7.0,
    )

    if r is None:
        doc.box(f"<b>This alternative could not be solved.</b><br>{esc(o.error)}", MISSED_COLOUR, "#FCEDE5")
        return

    doc.heading(3, "Key Figures")
    kf = r.key_figures()
    left = [
        ("Outlet temperature", fmt(r.outlet_temperature_K, "temperature", system)),
        ("Outlet pressure", fmt(r.outlet_pressure_Pa, "pressure", system)),
        ("Pressure drop", fmt(r.pressure_drop_Pa, "pressure_difference", system)),
        ("  friction / fittings", f"{fmt(r.pressure_drop.friction_Pa, 'pressure_difference', system)} / {fmt(r.pressure_drop.fittings_Pa, 'pressure_difference', system)}"),
        ("  elevation / acceleration", f"{fmt(r.pressure_drop.elevation_Pa, 'pressure_difference', system)} / {fmt(r.pressure_drop.acceleration_Pa, 'pressure_difference', system)}"),
        ("Hydraulic power (flow × Δp)", fmt(r.pump_power_W, "power", system)),
        ("Mass flow", fmt(r.mass_flow_kg_per_s, "mass_flow", system)),
        ("Residence time", fmt(r.residence_time_s, "time", system)),
        ("Velocity range", f"{fmt(r.velocity_range_m_per_s[0], 'velocity', system, 3)} – {fmt(r.velocity_range_m_per_s[1], 'velocity', system, 3)}"),
        ("Reynolds number range", f"{fmt(r.reynolds_range[0], 'dimensionless', system, 3)} – {fmt(r.reynolds_range[1], 'dimensionless', system, 3)}"),
    ]
    right = [
        ("Heat duty to fluid", fmt(r.duty_W, "power", system)),
        ("Heat input", fmt(r.heat_input_W, "power", system)),
        ("  tracing / jackets and heated walls",
         f"{fmt(r.heat_input_tracing_W, 'power', system)} / {fmt(r.heat_input_media_W, 'power', system)}"),
        (("Heat loss to ambient", fmt(r.heat_loss_W, "power", system)) if r.heat_loss_W >= 0 else
         ("Heat gained from ambient", fmt(-r.heat_loss_W, "power", system))),
        ("Max inner-wall temperature", f"{fmt(r.max_inner_wall_temperature_K, 'temperature', system)} at {fmt(r.max_inner_wall_position_m, 'length', system)}"),
        ("Min inner-wall temperature", f"{fmt(r.min_inner_wall_temperature_K, 'temperature', system)} at {fmt(r.min_inner_wall_position_m, 'length', system)}"),
        ("Max outer-surface temperature (in air)", _at(r.max_outer_surface_temperature_K, r.max_outer_surface_position_m, system)),
        ("Min outer-surface temperature (in air)", _at(r.min_outer_surface_temperature_K, r.min_outer_surface_position_m, system)),
    ]
    left += [("", "")] * (len(right) - len(left))
    right += [("", "")] * (len(left) - len(right))
    rows = []
    for (a, av), (b, bv) in zip(left, right):
        la = f"&nbsp;&nbsp;&nbsp;{esc(a.strip())}" if a.startswith(" ") else esc(a)
        lb = f"&nbsp;&nbsp;&nbsp;{esc(b.strip())}" if b.startswith(" ") else esc(b)
        rows.append([la, esc(av), lb, esc(bv)])
    doc.table(["Key figure", "Value", "Key figure", "Value"], rows, num_cols=(1, 3), widths=[24, 22, 27, 27])
    doc.add(
        f'<p class="small muted">Energy balance: heat input − losses − duty = {esc(fmt(kf["energy_balance_residual_W"], "power", system))} '
        f"(residual, should be ~0); {r.cells} cells.</p>"
    )

    doc.heading(3, "Per segment")
    seg_res = []
    for s in r.segments:
        seg_res.append([
            str(s.index + 1), esc(s.name),
            f"{esc(_num(s.x_start_m, 'length', system))} – {esc(_num(s.x_end_m, 'length', system))}",
            esc(_num(s.inner_diameter_m, "diameter", system)), esc(_num(s.outer_diameter_m, "diameter", system)),
            esc(_num(s.heat_input_W, "power", system)), esc(_num(s.heat_loss_W, "power", system)),
            esc(_num(s.duty_W, "power", system)), esc(_num(s.pressure_drop_Pa, "pressure_difference", system)),
        ])
    W, PD = ulabel("power", system), ulabel("pressure_difference", system)
    doc.table(
        ["#", "Name", f"Position [{L}]", f"Bore [{D}]", f"Outer Ø [{D}]", f"Heat input [{W}]", f"Heat loss [{W}]", f"Duty [{W}]", f"Δp [{PD}]"],
        seg_res, num_cols=(0, 2, 3, 4, 5, 6, 7, 8), widths=[3, 19, 14, 9, 10, 12, 11, 11, 11], font_pt=7.5,
    )
    doc.add('<p class="small muted">Outer Ø is over the insulation. Duty is the heat taken up by the fluid (negative when it cools).</p>')

    doc.figure(alternative_chart(r, system, project.targets, alt.limits))

    doc.heading(3, "Checks")
    if r.checks:
        order = {"danger": 0, "warning": 1, "info": 2}
        rows = []
        for c in sorted(r.checks, key=lambda c: order.get(c.severity, 3)):
            word, colour = SEVERITY_WORDS.get(c.severity, (c.severity.upper(), INK))
            where = []
            if c.segment is not None and 0 <= c.segment < len(alt.segments):
                where.append(esc(alt.segments[c.segment].name))
            if c.x_m is not None and math.isfinite(c.x_m):
                where.append(esc(fmt(c.x_m, "length", system)))
            rows.append([f'<span style="color: {colour}; font-weight: bold;">{word}</span>', " at ".join(where) or "whole line", esc(units.check_message(c, system))])
        doc.table(["Severity", "Where", "Finding"], rows, widths=[11, 20, 69], font_pt=7.5)
    else:
        doc.add('<p><span class="met">\u2713 No findings.</span> No check raised a warning or note for this alternative.</p>')

    verdicts = comparison.target_verdicts(project.targets, r)
    if verdicts:
        doc.heading(3, "Design targets")
        doc.table(
            ["Target", "Limit", "Value", "Verdict"],
            [[esc(v.label), esc(comparison.format_target(v, system)), esc(fmt(v.value, v.quantity, system)),
              '<span class="met">\u2713 met</span>' if v.met else '<span class="missed">\u2717 missed</span>'] for v in verdicts],
            num_cols=(2,), widths=[40, 20, 20, 20],
        )


# --------------------------------------------------------------------------- rendering


def ensure_gui_application():
    """The running Qt application, or a new offscreen one when there is none (headless).

    A QApplication (not only a QGuiApplication), so widgets can still be made
    later in the same process (e.g. the app or a widget test after a report).
    """
    from PySide6.QtCore import QCoreApplication

    app = QCoreApplication.instance()
    if app is None:
        os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
        from PySide6.QtWidgets import QApplication

        app = QApplication(["calorun-report"])
    return app


def _find_break(doc, page_h: float, body: "_Html") -> bool:
    """Find the first table row that straddles a page boundary, or heading left
    alone at a page foot, in the laid-out ``doc``; mark it in ``body`` to start a
    new page. Returns whether anything was marked (then lay out again).

    Qt may split a multi-line row across pages; a reviewer should never have to
    join half-rows, so such a row starts the next page (header row repeated).
    """
    from PySide6.QtGui import QTextCursor

    layout = doc.documentLayout()
    layout.documentSize()  # forces the layout

    def page_of(y: float) -> int:
        return int(y // page_h)

    def block_span(block) -> tuple[float, float]:
        r = layout.blockBoundingRect(block)
        bl = block.layout()
        if bl is None or bl.lineCount() == 0:
            return r.top(), r.bottom()
        first, last = bl.lineAt(0), bl.lineAt(bl.lineCount() - 1)
        return r.top() + first.y(), r.top() + last.y() + last.height()

    def row_span(table, row: int) -> tuple[float, float]:
        top, bottom = math.inf, -math.inf
        for col in range(table.columns()):
            cell = table.cellAt(row, col)
            if not cell.isValid():
                continue
            t, _ = block_span(cell.firstCursorPosition().block())
            _, b = block_span(cell.lastCursorPosition().block())
            top, bottom = min(top, t), max(bottom, b)
        return top, bottom

    def straddles(top: float, bottom: float) -> bool:
        return (
            math.isfinite(top) and math.isfinite(bottom) and bottom - top < page_h * 0.9
            and page_of(top + 1e-6) != page_of(bottom - 1e-6)
        )

    table_index = -1
    heading_index = -1
    block = doc.begin()
    last_table = None
    while block.isValid():
        table = QTextCursor(block).currentTable()
        if table is not None:
            if last_table is None or table.firstPosition() != last_table:
                last_table = table.firstPosition()
                table_index += 1
                part, first_row = body.table_map[table_index]
                if part.raw is None:
                    header_rows = table.format().headerRowCount()
                    for row in range(header_rows, table.rows()):
                        if straddles(*row_span(table, row)):
                            part.splits.add(first_row + row - header_rows)
                            return True
            block = block.next()
            continue
        last_table = None
        if block.blockFormat().headingLevel() > 0:
            heading_index += 1
            heading = body.heading_map[heading_index]
            top, _ = block_span(block)
            follow_bottom = None
            nxt = block.next()
            for _ in range(2):  # the next block, or the first row of a table right after a note
                if not nxt.isValid():
                    break
                ntable = QTextCursor(nxt).currentTable()
                if ntable is not None:
                    first_body = min(ntable.format().headerRowCount(), ntable.rows() - 1)
                    follow_bottom = row_span(ntable, first_body)[1]
                    break
                follow_bottom = block_span(nxt)[1]
                if nxt.text().strip():
                    nn = nxt.next()
                    if nn.isValid() and QTextCursor(nn).currentTable() is not None:
                        nxt = nn
                        continue
                    break
                nxt = nxt.next()
            if follow_bottom is not None and not heading.break_before and straddles(top, follow_bottom):
                heading.break_before = True
                return True
        block = block.next()
    return False


_LAYOUT_HOOK = None  # callable(doc, page_height) run on the final layout (for tests)


def _render_pdf(html_doc: _Html, path: Path, title: str, header_text: str, system: str) -> int:
    from PySide6.QtCore import QMarginsF, QPointF, QRectF, QSizeF, Qt
    from PySide6.QtGui import (
        QColor,
        QFont,
        QFontMetricsF,
        QPageLayout,
        QPageSize,
        QPainter,
        QPdfWriter,
        QPen,
        QTextBlockFormat,
        QTextCursor,
        QTextDocument,
    )

    writer = QPdfWriter(str(path))
    writer.setResolution(600)
    writer.setTitle(title)
    writer.setCreator("Calorun")
    page = QPageSize(QPageSize.Letter if system == "US" else QPageSize.A4)
    writer.setPageLayout(QPageLayout(page, QPageLayout.Portrait, QMarginsF(16, 14, 16, 14), QPageLayout.Millimeter))
    dpi = writer.resolution()
    pt = dpi / 72.0
    paint = writer.pageLayout().paintRectPixels(dpi)
    width, height = float(paint.width()), float(paint.height())
    header_h = 16 * pt
    footer_h = 16 * pt
    body_h = height - header_h - footer_h

    font = QFont()
    font.setFamilies(["DejaVu Sans", "Liberation Sans", "Arial", "Helvetica"])
    font.setPointSizeF(9.0)

    # Qt scales block line heights and margins from its logical pixels to the
    # device; measure the factor once rather than assume a platform dpi.
    probe = QTextDocument()
    probe.documentLayout().setPaintDevice(writer)
    probe.setDocumentMargin(0)
    probe.setPlainText("a\nb")
    first = probe.begin()
    pcur = QTextCursor(first)
    pbf = pcur.blockFormat()
    pbf.setLineHeight(1000.0, QTextBlockFormat.LineHeightTypes.FixedHeight.value)
    pcur.setBlockFormat(pbf)
    probe.setPageSize(QSizeF(width, 1e9))
    probe.documentLayout().documentSize()
    scale = (probe.documentLayout().blockBoundingRect(first.next()).top() - probe.documentLayout().blockBoundingRect(first).top()) / 1000.0
    if not (scale > 0 and math.isfinite(scale)):
        scale = dpi / 96.0

    def build():
        doc = QTextDocument()
        doc.documentLayout().setPaintDevice(writer)  # before the page size, or text comes out tiny
        doc.setDefaultFont(font)
        doc.setDocumentMargin(0)
        doc.setHtml(html_doc.html())
        # Figures: an empty block of fixed line height holds the place; the chart
        # is painted as vector graphics over it once the pages are laid out.
        blocks = []
        for i, chart in enumerate(html_doc.figures):
            cursor = doc.find(f"[[CALORUN-FIGURE-{i}]]")
            if cursor.isNull():
                raise RuntimeError(f"report figure {i} placeholder not found")
            cursor.removeSelectedText()
            bf = cursor.blockFormat()
            fig_h = min(width * chart.aspect, body_h * 0.95)
            bf.setLineHeight(fig_h / scale, QTextBlockFormat.LineHeightTypes.FixedHeight.value)
            bf.setTopMargin(0)
            bf.setBottomMargin(6 * pt / scale)
            cursor.setBlockFormat(bf)
            blocks.append((cursor.block(), chart, fig_h))
        doc.setPageSize(QSizeF(width, body_h))
        return doc, blocks

    for _ in range(200):
        doc, figure_blocks = build()
        if not _find_break(doc, body_h, html_doc):
            break
    if _LAYOUT_HOOK is not None:  # tests inspect the final layout
        _LAYOUT_HOOK(doc, body_h)
    pages = doc.pageCount()
    layout = doc.documentLayout()
    figures_by_page: dict[int, list] = {}
    for block, chart, fig_h in figure_blocks:
        r = layout.blockBoundingRect(block)
        # Qt keeps the fixed-height line whole: on this page if it fits, else on the next.
        top = r.top()
        page_index = int(top // body_h)
        if page_index != int((top + fig_h - 1e-6) // body_h):
            page_index += 1
            top = page_index * body_h
        figures_by_page.setdefault(page_index, []).append((QRectF(0, top, width, fig_h), chart))

    small = QFont(font)
    small.setPointSizeF(7.5)
    painter = QPainter()
    if not painter.begin(writer):
        raise OSError(f"cannot write the report to {path}")
    try:
        fm = QFontMetricsF(small, writer)
        head = fm.elidedText(header_text, Qt.ElideRight, width * 0.7)
        for i in range(pages):
            if i:
                writer.newPage()
            painter.save()
            painter.translate(0, header_h - i * body_h)
            doc.drawContents(painter, QRectF(0, i * body_h, width, body_h))
            for rect, chart in figures_by_page.get(i, []):
                draw_chart(painter, rect, chart, pt)
            painter.restore()
            painter.setFont(small)
            painter.setPen(QColor(INK_MUTED))
            painter.drawText(QRectF(0, 0, width, header_h - 5 * pt), int(Qt.AlignLeft | Qt.AlignBottom), head)
            painter.drawText(QRectF(0, 0, width, header_h - 5 * pt), int(Qt.AlignRight | Qt.AlignBottom), "Line design summary")
            painter.setPen(QPen(QColor(RULE), 0.6 * pt))
            painter.drawLine(QPointF(0, header_h - 3.5 * pt), QPointF(width, header_h - 3.5 * pt))
            fy = height - footer_h
            painter.drawLine(QPointF(0, fy + 3.5 * pt), QPointF(width, fy + 3.5 * pt))
            painter.setPen(QColor(INK_MUTED))
            painter.drawText(QRectF(0, fy + 5 * pt, width, footer_h - 5 * pt), int(Qt.AlignLeft | Qt.AlignTop), "Calorun")
            painter.drawText(
                QRectF(0, fy + 5 * pt, width, footer_h - 5 * pt), int(Qt.AlignHCenter | Qt.AlignTop),
                "Engineering estimate — defer to codes, standards and licensed review",
            )
            painter.drawText(QRectF(0, fy + 5 * pt, width, footer_h - 5 * pt), int(Qt.AlignRight | Qt.AlignTop), f"Page {i + 1} of {pages}")
    finally:
        painter.end()
    return pages


def solve_alternatives(alternatives: Sequence[Alternative], results: Optional[Mapping[str, object]] = None) -> list[_Outcome]:
    """Solve each alternative (or take its result from ``results``); failures become messages."""
    from solver import solve

    outcomes = []
    for alt in alternatives:
        given = (results or {}).get(alt.name)
        if isinstance(given, Result):
            outcomes.append(_Outcome(alt, given, None))
            continue
        if isinstance(given, BaseException):
            outcomes.append(_Outcome(alt, None, str(given)))
            continue
        try:
            outcomes.append(_Outcome(alt, solve(alt), None))
        except Exception as exc:  # a failed solve is reported in the PDF, not a crash
            from solver.errors import CalorunError

            msg = str(exc) if isinstance(exc, CalorunError) else f"unexpected {type(exc).__name__}: {exc}"
            outcomes.append(_Outcome(alt, None, msg))
    return outcomes


def select_alternatives(project: Project, names: Optional[Sequence[str]]) -> list[Alternative]:
    """The alternatives named (in project order), or all; an unknown name is an error naming it."""
    if not names:
        return list(project.alternatives)
    known = {a.name for a in project.alternatives}
    unknown = [n for n in names if n not in known]
    if unknown:
        raise ValueError(
            f"alternative: {', '.join(repr(n) for n in unknown)} not in the project "
            f"(it has {', '.join(repr(n) for n in sorted(known))})"
        )
    wanted = set(names)
    return [a for a in project.alternatives if a.name in wanted]


def write_report(
    project: Project | str | os.PathLike,
    path: str | os.PathLike,
    unit_system: str = "SI",
    alternatives: Optional[Sequence[str]] = None,
    results: Optional[Mapping[str, object]] = None,
    date: Optional[str] = None,
) -> Path:
    """Write the summary report of ``project`` as a PDF at ``path`` and return the path.

    ``alternatives``: names to include (default all, in project order).
    ``results``: name -> Result (or an exception) already solved, e.g. by the
    app; the rest are solved here. A solve failure is reported in the PDF.
    ``date``: the date printed (default today, ISO format). Works with no
    display; writes atomically (temporary file, then rename).
    """
    if unit_system not in units.UNIT_SYSTEMS:
        raise ValueError(f"unit_system: expected one of {', '.join(units.UNIT_SYSTEMS)}, got {unit_system!r}")
    if not isinstance(project, Project):
        from solver.project_io import load_project

        project = load_project(project)
    chosen = select_alternatives(project, alternatives)
    outcomes = solve_alternatives(chosen, results)
    date_text = date or _dt.date.today().isoformat()
    html_doc = build_html(project, outcomes, unit_system, date_text)

    ensure_gui_application()
    path = Path(path)
    if not path.parent.is_dir():
        raise FileNotFoundError(f"the folder {path.parent} does not exist")
    if path.is_dir():
        raise IsADirectoryError(f"{path} is a folder, not a file name")
    tmp = path.with_name(f".{path.name}.tmp")
    try:
        _render_pdf(html_doc, tmp, project.name, project.name, unit_system)
        if not tmp.exists() or tmp.stat().st_size == 0:
            raise OSError(f"cannot write the report to {path}")
        os.replace(tmp, path)
    except BaseException:
        try:
            tmp.unlink()
        except OSError:
            pass
        raise
    return path


def _at(value_K: float, position_m: float, system: str) -> str:
    """'22.2 °C at 185.0 m', or a dash when the figure does not apply (no segment in air)."""
    if value_K is None or not math.isfinite(value_K):
        return "— (no segment in air)"
    return f"{fmt(value_K, 'temperature', system)} at {fmt(position_m, 'length', system)}"


def _merge_close_lines(lines: list) -> list:
    """Lines at (nearly) the same value share one label, so labels never print over each other."""
    merged: list = []
    for line in lines:
        for i, other in enumerate(merged):
            if abs(other.y - line.y) < 1e-6 * max(1.0, abs(line.y)):
                kind_a, _, what_a = other.label.partition(": ")
                kind_b, _, what_b = line.label.partition(": ")
                label = f"{kind_a} and {kind_b}: {what_a}" if what_a == what_b else f"{other.label}; {line.label}"
                merged[i] = dataclasses.replace(other, label=label)
                break
        else:
            merged.append(line)
    return merged
