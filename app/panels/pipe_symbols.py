"""The Line Strip's drawings: the pipe with its wall model, the symbols and their legend.

Calorun's own symbols (``SYMBOLS``): a line on the wall for electric tracing, its shape telling the
heater's kind (a zig-zag for constant output, a smooth wave for self-limiting, a square wave for a
thermostat's on/off; the same colour, so the shape alone tells them apart), a small tube along
the underside of the pipe for a steam tracer, a hatched band for insulation (thicker band, thicker insulation), a shell band for a jacket, a solid shell for
a wall held at a temperature, soil hatching for a buried run, streamlines for wind, a double
outline for adiabatic, a diamond for fittings, a finned block for heat sinks and an arrow for elevation. Painting only: the
canvas that places the blocks and handles the mouse is :mod:`app.panels.line_strip`.
"""

from __future__ import annotations

import math

from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import QBrush, QFont, QFontMetrics, QPainter, QPainterPath, QPen, QPixmap, QPolygonF
from PySide6.QtWidgets import QSizePolicy, QWidget

from typing import Union

from app import style
from app.units import format_value


# Symbol legend: key -> (title, explanation). The legend row and tooltips use it.
SYMBOLS: dict[str, tuple[str, str]] = {
    "heat_input": ("Constant tracing", "zig-zag on the pipe wall: electric tracing of constant output"),
    "heater_self_limiting": ("Self-limiting", "smooth wave on the pipe wall: self-limiting tracing, "
                                              "its output falls as the pipe warms"),
    "heater_thermostat": ("Thermostat", "square wave on the pipe wall: tracing switched on and off by a thermostat"),
    "steam_tracer": ("Steam tracer", "small tube along the underside of the pipe: steam tube tracer(s)"),
    "insulation": ("Insulation", "hatched band; thicker band = thicker insulation"),
    "jacket": ("Jacket", "outer shell band: a jacket or bath medium at its own temperature"),
    "fixed_wall": ("Fixed wall T", "solid shell on the pipe: wall held at a temperature (e.g. steam)"),
    "buried": ("Buried", "ground line with soil hatching above the pipe"),
    "wind": ("Wind", "streamlines: ambient air with wind"),
    "adiabatic": ("Adiabatic", "double outline: no exchange with the surroundings"),
    "bare": ("Still air", "plain pipe: still ambient air, no extras"),
    "fittings": ("Fittings", "diamond with the number of fittings"),
    "heat_sinks": ("Heat sinks", "finned block with the number of supports, valves, flanges and other items "
                                 "that lose heat beyond the pipe"),
    "elevation": ("Elevation", "arrow up or down with the elevation change"),
}

BORE_HALF = 8  # half height of the drawn bore
TRACER_PX = 6.0  # room a drawn steam tracer takes below the pipe wall (the insulation wraps it too)
STEAM_TRACER = style.OKABE_ITO["reddish_purple"]  # not the tracing zig-zag's colour: another heat source

#: heater kind -> the shape of its line on the wall (one colour for all electric tracing: the shape tells
#: the kind, so colour is never the cue; a sharp zig-zag, a smooth wave, a square on/off wave)
HEATER_SHAPES: dict[str, str] = {"constant": "zigzag", "self_limiting": "wave", "thermostat": "square"}
#: a smooth wave at the zig-zag's period reads as one more zig-zag: drawn twice as long, it reads as a wave
_PERIOD_SCALE = {"wave": 2.0, "square": 1.25}
#: heater kind -> its legend key in SYMBOLS
HEATER_SYMBOLS: dict[str, str] = {"constant": "heat_input", "self_limiting": "heater_self_limiting",
                                  "thermostat": "heater_thermostat"}


def font_px(base: QFont, px: int, bold: bool = False) -> QFont:
    """``base`` at ``px`` pixels (the strip is drawn in pixels, whatever the screen)."""
    f = QFont(base)
    f.setPixelSize(px)
    f.setBold(bold)
    return f


def insulation_band_px(total_thickness_m: float) -> float:
    """Drawn insulation band thickness: grows with thickness, 4..18 px (saturates at 150 mm).

    Capped whatever the thickness (1e308 m, or an infinite sum of layers) and 0 for anything that
    is not a positive number: the drawing must stay on the canvas."""
    if not total_thickness_m > 0:  # (NaN too)
        return 0.0
    return 4.0 + 14.0 * min(1.0, total_thickness_m / 0.15)


def wall_model(segment) -> str:
    """Which wall model a segment shows: heat input is reported on top of the surroundings."""
    kind = segment.surroundings.kind
    return {
        "still_air": "bare",
        "wind": "wind",
        "buried": "buried",
        "jacket": "jacket",
        "fixed_wall": "fixed_wall",
        "adiabatic": "adiabatic",
    }.get(kind, "bare")


def wall_summary(segment, system: str, compact: bool = False) -> str:
    """One short line saying what happens at the wall, e.g. 'traced 30 W/m · ins 50 mm · still air'
    ('self-limiting 30 W/m', 'thermostat 30 W/m' for those heaters: their rated output per metre of pipe).

    ``compact`` drops the words the drawing already says (the zig-zag is the tracing, the
    hatched band the insulation) for a narrow block: '30 W/m · 50 mm · still air'.
    """
    return " · ".join(wall_summary_parts(segment, system, compact))


def wall_summary_parts(segment, system: str, compact: bool = False) -> list[str]:
    """The pieces of :func:`wall_summary`, so a narrow block can put them on two lines."""
    parts: list[str] = []
    s = segment.surroundings
    traced, ins = ("", "") if compact else ("traced ", "ins ")
    heater = getattr(segment, "heater", None)
    if heater is not None:
        q = format_value(segment.heat_input_W_per_m, "power_per_length", system, digits=3)
        word = {"constant": "", "self_limiting": "self-lim. " if compact else "self-limiting ",
                "thermostat": "thermostat "}[heater.kind]
        parts.append((word or traced) + q)
    tracer = getattr(segment, "steam_tracer", None)
    if tracer is not None:
        pressure = format_value(tracer.steam_pressure_Pa, "pressure", system, digits=3)
        if compact:
            parts.append(("tracer " if tracer.count == 1 else f"{tracer.count} tracers ") + pressure)
        else:
            parts.append(("steam tracer " if tracer.count == 1 else f"{tracer.count} steam tracers ") + pressure)
    total_ins = sum(layer.thickness_m for layer in segment.insulation)
    if total_ins > 0 and s.kind != "fixed_wall":
        parts.append(ins + format_value(total_ins, "thickness", system, digits=3))
    if s.kind == "still_air":
        parts.append(("air " + format_value(s.temperature_K, "temperature", system)) if not parts else "still air")
    elif s.kind == "wind":
        parts.append("wind " + format_value(s.wind_speed_m_per_s, "speed", system, digits=2))
    elif s.kind == "buried":
        parts.append("buried " + format_value(s.depth_m, "depth", system, digits=2))
    elif s.kind == "jacket":
        parts.append("jacket " + format_value(s.medium_temperature_K, "temperature", system))
    elif s.kind == "fixed_wall":
        if s.wall_temperature_K is not None:
            parts.append("wall " + format_value(s.wall_temperature_K, "temperature", system))
        else:
            parts.append("steam " + format_value(s.steam_pressure_Pa, "pressure", system, digits=3))
    elif s.kind == "adiabatic":
        parts.append("adiabatic")
    return parts


# --------------------------------------------------------------------------- symbol painting


def _zigzag_path(x0: float, x1: float, y: float, amp: float, period: float, shape: str = "zigzag") -> QPainterPath:
    """The heater's line from x0 to x1 about y: ``"zigzag"``, ``"wave"`` (smooth) or ``"square"``."""
    path = QPainterPath(QPointF(x0, y))
    x, up = x0, True
    if shape == "square":
        path.moveTo(QPointF(x0, y - amp))
        while x < x1:
            level = y - amp if up else y + amp
            x = min(x + period / 2, x1)
            path.lineTo(QPointF(x, level))
            if x < x1:
                path.lineTo(QPointF(x, y + amp if up else y - amp))
            up = not up
        return path
    while x < x1:
        x_next = min(x + period / 2, x1)
        peak = y - amp if up else y + amp
        if shape == "wave":  # half a sine period as one cubic (control points at the peak height)
            path.cubicTo(QPointF(x + (x_next - x) * 0.36, peak), QPointF(x + (x_next - x) * 0.64, peak),
                         QPointF(x_next, y))
        else:
            path.lineTo(QPointF(x_next, peak))
        x = x_next
        up = not up
    return path


# Stroking a long antialiased zig-zag cost ~2.5 ms per run (most of a strip repaint), so each
# (pen, amplitude, period) is stroked once into a long pixmap and the runs are copied from it.
_ZIGZAG_LENGTH = 2048  # px of zig-zag held in a cached pixmap; longer runs are stroked directly
_ZIGZAG_PAD = 3  # px around the stroke (pen width and antialiasing)
_zigzag_pixmaps: dict[tuple, QPixmap] = {}


def _zigzag_pixmap(pen: QPen, amp: float, period: float, dpr: float, shape: str = "zigzag") -> QPixmap:
    key = (pen.color().rgba(), pen.widthF(), amp, period, dpr, shape)
    pix = _zigzag_pixmaps.get(key)
    if pix is None:
        w, h = _ZIGZAG_LENGTH + 2 * _ZIGZAG_PAD, 2 * (amp + _ZIGZAG_PAD)
        pix = QPixmap(int(math.ceil(w * dpr)), int(math.ceil(h * dpr)))
        pix.setDevicePixelRatio(dpr)
        pix.fill(Qt.transparent)
        q = QPainter(pix)
        try:  # a painter left open on a pixmap that is then dropped takes the app down
            q.setRenderHint(QPainter.Antialiasing, True)
            q.setPen(pen)
            q.setBrush(Qt.NoBrush)
            q.drawPath(_zigzag_path(_ZIGZAG_PAD, _ZIGZAG_PAD + _ZIGZAG_LENGTH, h / 2, amp, period, shape))
        finally:
            q.end()
        _zigzag_pixmaps[key] = pix
    return pix


def _zigzag(painter: QPainter, x0: float, x1: float, y: float, amp: float = 2.6, period: float = 8.0,
            shape: str = "zigzag") -> None:
    """A heater's line (``HEATER_SHAPES``) from x0 to x1 about y with the painter's pen (copied from a cached
    stroke)."""
    span = x1 - x0
    if span <= 0:
        return
    if span > _ZIGZAG_LENGTH:
        painter.drawPath(_zigzag_path(x0, x1, y, amp, period, shape))
        return
    dev = painter.device()
    dpr = dev.devicePixelRatioF() if dev is not None else 1.0
    pix = _zigzag_pixmap(painter.pen(), amp, period, dpr, shape)
    h = 2 * (amp + _ZIGZAG_PAD)
    w = span + 2 * _ZIGZAG_PAD - 1  # the stroke ends at x1 (+ about a pixel of its width)
    painter.drawPixmap(QRectF(x0 - _ZIGZAG_PAD, y - h / 2, w, h), pix, QRectF(0, 0, w * dpr, h * dpr))


_streamline_pixmaps: dict[tuple, QPixmap] = {}


def _streamline(painter: QPainter, x0: float, y: float, length: float) -> None:
    """A short wavy arrow (ambient wind) from (x0, y), copied from a cached drawing of it."""
    pix, pad, w, h, dpr = _streamline_pixmap(painter, length)
    painter.drawPixmap(QRectF(x0 - pad, y - h / 2, w, h), pix, QRectF(0, 0, w * dpr, h * dpr))


def _streamline_pixmap(painter: QPainter, length: float) -> tuple[QPixmap, float, float, float, float]:
    """(pixmap, pad, width, height, device pixel ratio) of a streamline in the painter's pen and
    brush; a wide wind block draws dozens, so :func:`paint_pipe` looks it up once per block."""
    pen, brush = painter.pen(), painter.brush()
    dev = painter.device()
    dpr = dev.devicePixelRatioF() if dev is not None else 1.0
    key = (pen.color().rgba(), pen.widthF(), brush.style().value, brush.color().rgba(), length, dpr,
           painter.testRenderHint(QPainter.Antialiasing))
    pix = _streamline_pixmaps.get(key)
    pad = 3.0 + pen.widthF()
    w, h = length + 2 * pad, 2 * (3.0 + pad)
    if pix is None:
        pix = QPixmap(int(math.ceil(w * dpr)), int(math.ceil(h * dpr)))
        pix.setDevicePixelRatio(dpr)
        pix.fill(Qt.transparent)
        q = QPainter(pix)
        try:
            q.setRenderHint(QPainter.Antialiasing, key[-1])
            q.setPen(pen)
            q.setBrush(brush)
            _stroke_streamline(q, pad, h / 2, length)
        finally:
            q.end()
        _streamline_pixmaps[key] = pix
    return pix, pad, w, h, dpr


def _stroke_streamline(painter: QPainter, x0: float, y: float, length: float) -> None:
    path = QPainterPath(QPointF(x0, y))
    path.cubicTo(QPointF(x0 + length * 0.33, y - 3), QPointF(x0 + length * 0.66, y + 3), QPointF(x0 + length, y))
    painter.drawPath(path)
    painter.drawLine(QPointF(x0 + length, y), QPointF(x0 + length - 4, y - 3))
    painter.drawLine(QPointF(x0 + length, y), QPointF(x0 + length - 4, y + 3))


def diamond(painter: QPainter, cx: float, cy: float, r: float = 4.0) -> None:
    painter.drawPolygon(QPolygonF([QPointF(cx, cy - r), QPointF(cx + r, cy), QPointF(cx, cy + r), QPointF(cx - r, cy)]))


def heat_sink_mark(painter: QPainter, cx: float, cy: float, r: float = 4.5) -> None:
    """A heat sink: a small block with three fins below it (heat leaving), centred on (cx, cy); the
    painter's pen and brush."""
    painter.drawRect(QRectF(cx - r, cy - r, 2 * r, r))
    for dx in (-r + 1, 0.0, r - 1):
        painter.drawLine(QPointF(cx + dx, cy), QPointF(cx + dx, cy + r))


def elevation_arrow(painter: QPainter, x: float, y_mid: float, up: bool, size: float = 5.0) -> None:
    tip = y_mid - size if up else y_mid + size
    base = y_mid + size if up else y_mid - size
    painter.drawLine(QPointF(x, base), QPointF(x, tip))
    d = 3.2 if up else -3.2
    painter.drawPolygon(QPolygonF([QPointF(x, tip), QPointF(x - 3.2, tip + d), QPointF(x + 3.2, tip + d)]))


def paint_pipe(
    painter: QPainter,
    rect: QRectF,
    yc: float,
    *,
    model: str,
    insulation_px: float,
    heat_input: Union[bool, str],
    bore_half: float = BORE_HALF,
    compact: bool = False,
    steam_tracer: bool = False,
) -> float:
    """Paint one run of pipe with its wall model between rect.left and rect.right.

    ``heat_input`` is the heater's kind (``"constant"``, ``"self_limiting"``, ``"thermostat"``; True is
    constant, False or "" none). ``steam_tracer`` draws a steam tube tracer along the underside of the
    pipe, inside the insulation. Returns the half height of the outer extent (so callers can place things below it).
    """
    painter.save()
    try:  # the caller's painter comes back as it was, whatever happens here
        return _paint_pipe(painter, rect, yc, model, insulation_px, heat_input, bore_half, compact, steam_tracer)
    finally:
        painter.restore()


def _paint_pipe(painter: QPainter, rect: QRectF, yc: float, model: str, insulation_px: float,
                heat_input: Union[bool, str],
                bore_half: float, compact: bool, steam_tracer: bool) -> float:
    x0, x1 = rect.left(), rect.right()
    painter.setRenderHint(QPainter.Antialiasing, True)
    ext, insulation_px, shell, outer = _layers(model, insulation_px, bore_half, steam_tracer, compact)
    tracer_px = _tracer_px(model, steam_tracer, compact)

    if model == "buried":
        # soil around the pipe and a ground surface above it, hatched
        painter.setPen(Qt.NoPen)
        painter.setBrush(style.qcolor(style.GROUND_FILL))
        cover, tick = (4.0, 4.0) if compact else (12.0, 6.0)
        painter.drawRect(QRectF(x0, yc - outer - cover, x1 - x0, 2 * outer + cover + 4))
        gy = yc - outer - cover
        painter.setPen(QPen(style.qcolor(style.GROUND), 1.4))
        painter.drawLine(QPointF(x0, gy), QPointF(x1, gy))
        painter.setPen(QPen(style.qcolor(style.GROUND), 1.0))
        x = x0 + 3
        while x < x1 - 2:
            painter.drawLine(QPointF(x, gy), QPointF(x + tick * 0.8, gy - tick))
            x += 7

    if model == "jacket":
        band = QRectF(x0, yc - outer, x1 - x0, 2 * outer)
        painter.setPen(QPen(style.qcolor(style.JACKET).darker(115), 1.4))
        painter.setBrush(style.qcolor(style.JACKET, 70))
        painter.drawRect(band)
        # medium: short wavy marks inside the shell band (top and bottom)
        painter.setPen(QPen(style.qcolor(style.JACKET).darker(140), 1.0))
        for y in (yc - outer + shell / 2, yc + outer - shell / 2):
            x = x0 + 4
            while x < x1 - 10:
                p = QPainterPath(QPointF(x, y))
                p.cubicTo(QPointF(x + 2, y - 2), QPointF(x + 4, y + 2), QPointF(x + 6, y))
                painter.drawPath(p)
                x += 10
    if model == "fixed_wall":
        band = QRectF(x0, yc - outer, x1 - x0, 2 * outer)
        painter.setPen(QPen(style.qcolor(style.JACKET).darker(150), 1.4))
        painter.setBrush(style.qcolor(style.JACKET))
        painter.drawRect(band)

    if insulation_px > 0:
        ins_half = ext + tracer_px + insulation_px
        ins = QRectF(x0, yc - ins_half, x1 - x0, 2 * ins_half)
        painter.setPen(QPen(style.qcolor(style.INSULATION_HATCH), 1.0))
        painter.setBrush(style.qcolor(style.INSULATION_FILL))
        painter.drawRect(ins)
        hatch = QBrush(style.qcolor(style.INSULATION_HATCH, 150), Qt.BDiagPattern)
        painter.setPen(Qt.NoPen)
        painter.setBrush(hatch)
        painter.drawRect(ins)

    # the pipe: steel wall around the fluid
    painter.setPen(QPen(style.qcolor(style.PIPE_WALL), 1.0))
    painter.setBrush(style.qcolor(style.PIPE_WALL))
    painter.drawRect(QRectF(x0, yc - ext, x1 - x0, 2 * ext))
    painter.setPen(Qt.NoPen)
    painter.setBrush(style.qcolor(style.FLUID_FILL))
    painter.drawRect(QRectF(x0, yc - bore_half, x1 - x0, 2 * bore_half))

    if heat_input:
        shape = HEATER_SHAPES.get(heat_input if isinstance(heat_input, str) else "constant", "zigzag")
        pen = QPen(style.qcolor(style.HEAT_INPUT), 1.7)
        painter.setPen(pen)
        painter.setBrush(Qt.NoBrush)
        off, amp, period = (2.0, 1.6, 6.0) if compact else (3.0, 2.6, 8.0)
        # with a steam tracer below, the zig-zag keeps to the top so the two stay apart
        for y in (yc - ext - off,) + (() if tracer_px else (yc + ext + off,)):
            _zigzag(painter, x0 + 2, x1 - 2, y, amp, period * _PERIOD_SCALE.get(shape, 1.0), shape)

    if tracer_px:
        _steam_tube(painter, x0 + 2, x1 - 2, yc + ext + 0.5, tracer_px - 1.0)

    if model == "adiabatic":
        painter.setPen(QPen(style.qcolor(style.INK), 1.2))
        painter.setBrush(Qt.NoBrush)
        for d in (2.5, 6.0):
            painter.drawRect(QRectF(x0 + 1, yc - outer - d, x1 - x0 - 2, 2 * (outer + d)))

    if model == "wind":
        painter.setPen(QPen(style.qcolor(style.WIND).darker(115), 1.3))
        painter.setBrush(style.qcolor(style.WIND).darker(115))
        n = max(1, int((x1 - x0 - 10) // 38))
        pix, pad, w, h, dpr = _streamline_pixmap(painter, 22)
        source = QRectF(0, 0, w * dpr, h * dpr)
        for k in range(n):
            xs = x0 + 6 + k * 38
            painter.drawPixmap(QRectF(xs - pad, yc - outer - 7 - h / 2, w, h), pix, source)
            painter.drawPixmap(QRectF(xs + 10 - pad, yc + outer + 7 - h / 2, w, h), pix, source)

    return outer + _MARKS_OUTSIDE.get(model, 0.0)


#: room the outline (adiabatic) or the streamlines (wind) take outside the pipe's outer layer [px]
_MARKS_OUTSIDE = {"adiabatic": 6.0, "wind": 10.0}


def _tracer_px(model: str, steam_tracer: bool, compact: bool = False) -> float:
    """Room the drawn steam tracer takes below the wall [px]; none where the model refuses a tracer."""
    if not steam_tracer or model in ("jacket", "fixed_wall"):
        return 0.0
    return TRACER_PX * (0.6 if compact else 1.0)


def _layers(model: str, insulation_px: float, bore_half: float,
            steam_tracer: bool = False, compact: bool = False) -> tuple[float, float, float, float]:
    """(pipe outer surface, insulation band, shell band, outermost layer): half heights [px]."""
    ext = bore_half + 2
    if model == "fixed_wall":
        insulation_px = 0.0  # insulation plays no part with a fixed wall
    shell = {"fixed_wall": 6.0, "jacket": 7.0}.get(model, 0.0)
    return ext, insulation_px, shell, ext + _tracer_px(model, steam_tracer, compact) + insulation_px + shell


def pipe_extent(segment, bore_half: float = BORE_HALF) -> float:
    """Half height of the pipe :func:`paint_pipe` draws for ``segment`` (what goes below it starts there)."""
    model = wall_model(segment)
    ins = insulation_band_px(sum(layer.thickness_m for layer in segment.insulation))
    tracer = getattr(segment, "steam_tracer", None) is not None
    return _layers(model, ins, bore_half, tracer)[3] + _MARKS_OUTSIDE.get(model, 0.0)


def _steam_tube(painter: QPainter, x0: float, x1: float, top: float, height: float) -> None:
    """A steam tube tracer: a small round-ended tube with a dashed core (the steam) from x0 to x1."""
    if x1 - x0 < 4 or height <= 0:
        return
    colour = style.qcolor(STEAM_TRACER)
    tube = QRectF(x0, top, x1 - x0, height)
    painter.setPen(QPen(colour.darker(160), 1.2))
    painter.setBrush(colour)
    painter.drawRoundedRect(tube, height / 2, height / 2)
    if height >= 4:
        core = QPen(style.qcolor("#FFFFFF"), 1.2, Qt.DashLine)  # the steam inside the tube
        core.setDashPattern([2.0, 2.0])
        painter.setPen(core)
        y = top + height / 2
        painter.drawLine(QPointF(x0 + height / 2 + 1, y), QPointF(x1 - height / 2 - 1, y))


# --------------------------------------------------------------------------- legend


class SymbolLegend(QWidget):
    """A row of the Line Strip's symbols with short names; the tooltip explains each."""

    ORDER = ("heat_input", "heater_self_limiting", "heater_thermostat", "steam_tracer", "insulation", "jacket",
             "fixed_wall", "buried", "wind", "adiabatic", "fittings", "heat_sinks", "elevation")

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setFixedHeight(26)
        self.setSizePolicy(QSizePolicy.Expanding, QSizePolicy.Fixed)
        rows = "".join(f"<tr><td><b>{SYMBOLS[k][0]}</b></td><td>{SYMBOLS[k][1]}</td></tr>" for k in SYMBOLS)
        self.setToolTip(f"<table cellspacing='4'>{rows}</table>")

    def paintEvent(self, event) -> None:  # noqa: N802
        p = QPainter(self)
        p.setRenderHint(QPainter.Antialiasing, True)
        f = font_px(self.font(), 10)
        p.setFont(f)
        fm = QFontMetrics(f)
        x, yc = 8.0, self.height() / 2
        for key in self.ORDER:
            title = SYMBOLS[key][0]
            w_sym = 26.0
            if x + w_sym + fm.horizontalAdvance(title) > self.width():
                break
            r = QRectF(x, 0, w_sym, 0)
            if key == "fittings":
                p.setPen(QPen(style.qcolor(style.FITTING), 1.2))
                p.setBrush(style.qcolor("#FFFFFF"))
                diamond(p, x + 13, yc)
            elif key == "heat_sinks":
                p.setPen(QPen(style.qcolor(style.FITTING), 1.2))
                p.setBrush(style.qcolor("#FFFFFF"))
                heat_sink_mark(p, x + 13, yc)
            elif key == "elevation":
                p.setPen(QPen(style.qcolor(style.INK), 1.4))
                p.setBrush(style.qcolor(style.INK))
                elevation_arrow(p, x + 9, yc, True)
                elevation_arrow(p, x + 18, yc, False)
            else:
                model = key if key in ("jacket", "fixed_wall", "buried", "wind", "adiabatic") else "bare"
                paint_pipe(
                    p,
                    r,
                    yc,
                    model=model if key != "wind" else "bare",
                    insulation_px=3.0 if key == "insulation" else 0.0,
                    heat_input=next((k for k, v in HEATER_SYMBOLS.items() if v == key), ""),
                    bore_half=3.0 if key != "buried" else 2.0,
                    compact=True,
                    steam_tracer=key == "steam_tracer",
                )
                if key == "wind":
                    p.setPen(QPen(style.qcolor(style.WIND).darker(115), 1.2))
                    p.setBrush(style.qcolor(style.WIND).darker(115))
                    _streamline(p, x + 2, yc - 7, 20)
            p.setPen(style.qcolor(style.INK_MUTED))
            tx = x + w_sym + 5
            p.drawText(QRectF(tx, 0, fm.horizontalAdvance(title) + 4, self.height()), Qt.AlignLeft | Qt.AlignVCenter, title)
            x = tx + fm.horizontalAdvance(title) + 16
        p.end()
