"""Line Strip: the segments of the current alternative drawn in flow order.

Each segment is a block whose width follows its length (with a minimum so short ones stay
clickable). The block shows the wall model with Calorun's own symbols (see ``SYMBOLS``), the
name, length, elevation change and fittings. Click selects, drag reorders; insert, duplicate,
delete and move act through undoable commands pushed on the Document. The strip keeps no copy
of the design: it reads ``doc.current_alternative`` on every paint.
"""

from __future__ import annotations

import html
import math
from typing import Optional

from PySide6.QtCore import QPointF, QRect, QRectF, QSize, Qt, Signal
from PySide6.QtGui import (
    QAction,
    QBrush,
    QFont,
    QFontMetrics,
    QKeySequence,
    QPainter,
    QPainterPath,
    QPen,
    QPixmap,
    QPolygonF,
)
from PySide6.QtWidgets import (
    QApplication,
    QLabel,
    QMenu,
    QScrollArea,
    QSizePolicy,
    QToolBar,
    QToolTip,
    QVBoxLayout,
    QWidget,
)

from app import style, units
from app.units import format_value

# Symbol legend: key -> (title, explanation). The legend row and tooltips use it.
SYMBOLS: dict[str, tuple[str, str]] = {
    "heat_input": ("Heat input", "zig-zag on the pipe wall: tracing, W per metre"),
    "insulation": ("Insulation", "hatched band; thicker band = thicker insulation"),
    "jacket": ("Jacket", "outer shell band: a jacket or bath medium at its own temperature"),
    "fixed_wall": ("Fixed wall T", "solid shell on the pipe: wall held at a temperature (e.g. steam)"),
    "buried": ("Buried", "ground line with soil hatching above the pipe"),
    "wind": ("Wind", "streamlines: ambient air with wind"),
    "adiabatic": ("Adiabatic", "double outline: no exchange with the surroundings"),
    "bare": ("Still air", "plain pipe: still ambient air, no extras"),
    "fittings": ("Fittings", "diamond with the number of fittings"),
    "elevation": ("Elevation", "arrow up or down with the elevation change"),
}

MIN_BLOCK_WIDTH = 104  # px: short segments stay clickable and readable
GAP = 6  # px between blocks (a flange joint is drawn in it)
LEFT_MARGIN = 64  # px: flow arrow
RIGHT_MARGIN = 30
CANVAS_HEIGHT = 150
PIPE_CENTRE_Y = 84
BORE_HALF = 8  # half height of the drawn bore


def _font(base: QFont, px: int, bold: bool = False) -> QFont:
    f = QFont(base)
    f.setPixelSize(px)
    f.setBold(bold)
    return f


def block_widths(lengths: list[float], available: float, minimum: float = MIN_BLOCK_WIDTH) -> list[float]:
    """Widths proportional to ``lengths`` summing to ``available``, none below ``minimum``.

    Blocks that would fall below the minimum are fixed at it; the rest share what is left in
    proportion to length. If even the minimum does not fit, every block gets the minimum.
    """
    n = len(lengths)
    if n == 0:
        return []
    if available <= n * minimum:
        return [float(minimum)] * n
    fixed: set[int] = set()
    while True:
        free = available - minimum * len(fixed)
        total = sum(lengths[i] for i in range(n) if i not in fixed)
        if total <= 0:
            return [available / n] * n
        scale = free / total
        newly = {i for i in range(n) if i not in fixed and lengths[i] * scale < minimum}
        if not newly:
            return [float(minimum) if i in fixed else lengths[i] * scale for i in range(n)]
        fixed |= newly


def insulation_band_px(total_thickness_m: float) -> float:
    """Drawn insulation band thickness: grows with thickness, 4..18 px (saturates at 150 mm)."""
    if total_thickness_m <= 0:
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


def wall_summary(segment, system: str) -> str:
    """One short line saying what happens at the wall, e.g. 'traced 30 W/m · ins 50 mm · still air'."""
    parts: list[str] = []
    s = segment.surroundings
    if segment.heat_input_W_per_m > 0:
        parts.append("traced " + format_value(segment.heat_input_W_per_m, "power_per_length", system, digits=3))
    total_ins = sum(layer.thickness_m for layer in segment.insulation)
    if total_ins > 0 and s.kind != "fixed_wall":
        parts.append("ins " + format_value(total_ins, "thickness", system, digits=3))
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
    return " · ".join(parts)


# --------------------------------------------------------------------------- symbol painting


def _zigzag_path(x0: float, x1: float, y: float, amp: float, period: float) -> QPainterPath:
    path = QPainterPath(QPointF(x0, y))
    x, up = x0, True
    while x < x1:
        x = min(x + period / 2, x1)
        path.lineTo(QPointF(x, y - amp if up else y + amp))
        up = not up
    return path


# Stroking a long antialiased zig-zag cost ~2.5 ms per run (most of a strip repaint), so each
# (pen, amplitude, period) is stroked once into a long pixmap and the runs are copied from it.
_ZIGZAG_LENGTH = 2048  # px of zig-zag held in a cached pixmap; longer runs are stroked directly
_ZIGZAG_PAD = 3  # px around the stroke (pen width and antialiasing)
_zigzag_pixmaps: dict[tuple, QPixmap] = {}


def _zigzag_pixmap(pen: QPen, amp: float, period: float, dpr: float) -> QPixmap:
    key = (pen.color().rgba(), pen.widthF(), amp, period, dpr)
    pix = _zigzag_pixmaps.get(key)
    if pix is None:
        w, h = _ZIGZAG_LENGTH + 2 * _ZIGZAG_PAD, 2 * (amp + _ZIGZAG_PAD)
        pix = QPixmap(int(math.ceil(w * dpr)), int(math.ceil(h * dpr)))
        pix.setDevicePixelRatio(dpr)
        pix.fill(Qt.transparent)
        q = QPainter(pix)
        q.setRenderHint(QPainter.Antialiasing, True)
        q.setPen(pen)
        q.setBrush(Qt.NoBrush)
        q.drawPath(_zigzag_path(_ZIGZAG_PAD, _ZIGZAG_PAD + _ZIGZAG_LENGTH, h / 2, amp, period))
        q.end()
        _zigzag_pixmaps[key] = pix
    return pix


def _zigzag(painter: QPainter, x0: float, x1: float, y: float, amp: float = 2.6, period: float = 8.0) -> None:
    """A zig-zag from x0 to x1 about y with the painter's pen (copied from a cached stroke)."""
    span = x1 - x0
    if span <= 0:
        return
    if span > _ZIGZAG_LENGTH:
        painter.drawPath(_zigzag_path(x0, x1, y, amp, period))
        return
    dev = painter.device()
    dpr = dev.devicePixelRatioF() if dev is not None else 1.0
    pix = _zigzag_pixmap(painter.pen(), amp, period, dpr)
    h = 2 * (amp + _ZIGZAG_PAD)
    w = span + 2 * _ZIGZAG_PAD - 1  # the stroke ends at x1 (+ about a pixel of its width)
    painter.drawPixmap(QRectF(x0 - _ZIGZAG_PAD, y - h / 2, w, h), pix, QRectF(0, 0, w * dpr, h * dpr))


_streamline_pixmaps: dict[tuple, QPixmap] = {}


def _streamline(painter: QPainter, x0: float, y: float, length: float) -> None:
    """A short wavy arrow (ambient wind) from (x0, y), copied from a cached drawing of it."""
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
        q.setRenderHint(QPainter.Antialiasing, key[-1])
        q.setPen(pen)
        q.setBrush(brush)
        _stroke_streamline(q, pad, h / 2, length)
        q.end()
        _streamline_pixmaps[key] = pix
    painter.drawPixmap(QRectF(x0 - pad, y - h / 2, w, h), pix, QRectF(0, 0, w * dpr, h * dpr))


def _stroke_streamline(painter: QPainter, x0: float, y: float, length: float) -> None:
    path = QPainterPath(QPointF(x0, y))
    path.cubicTo(QPointF(x0 + length * 0.33, y - 3), QPointF(x0 + length * 0.66, y + 3), QPointF(x0 + length, y))
    painter.drawPath(path)
    painter.drawLine(QPointF(x0 + length, y), QPointF(x0 + length - 4, y - 3))
    painter.drawLine(QPointF(x0 + length, y), QPointF(x0 + length - 4, y + 3))


def _diamond(painter: QPainter, cx: float, cy: float, r: float = 4.0) -> None:
    painter.drawPolygon(QPolygonF([QPointF(cx, cy - r), QPointF(cx + r, cy), QPointF(cx, cy + r), QPointF(cx - r, cy)]))


def _elevation_arrow(painter: QPainter, x: float, y_mid: float, up: bool, size: float = 5.0) -> None:
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
    heat_input: bool,
    bore_half: float = BORE_HALF,
    compact: bool = False,
) -> float:
    """Paint one run of pipe with its wall model between rect.left and rect.right.

    Returns the half height of the outer extent (so callers can place things below it).
    """
    x0, x1 = rect.left(), rect.right()
    painter.save()
    painter.setRenderHint(QPainter.Antialiasing, True)
    ext = bore_half + 2  # pipe outer surface
    shell = 0.0
    if model == "fixed_wall":
        insulation_px = 0.0  # insulation plays no part with a fixed wall
    if model in ("jacket", "fixed_wall"):
        shell = 6.0 if model == "fixed_wall" else 7.0

    outer = ext + insulation_px + shell

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
        ins_half = ext + insulation_px
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
        pen = QPen(style.qcolor(style.HEAT_INPUT), 1.7)
        painter.setPen(pen)
        painter.setBrush(Qt.NoBrush)
        off, amp, period = (2.0, 1.6, 6.0) if compact else (3.0, 2.6, 8.0)
        for y in (yc - ext - off, yc + ext + off):
            _zigzag(painter, x0 + 2, x1 - 2, y, amp, period)

    if model == "adiabatic":
        painter.setPen(QPen(style.qcolor(style.INK), 1.2))
        painter.setBrush(Qt.NoBrush)
        for d in (2.5, 6.0):
            painter.drawRect(QRectF(x0 + 1, yc - outer - d, x1 - x0 - 2, 2 * (outer + d)))
        outer += 6.0

    if model == "wind":
        painter.setPen(QPen(style.qcolor(style.WIND).darker(115), 1.3))
        painter.setBrush(style.qcolor(style.WIND).darker(115))
        n = max(1, int((x1 - x0 - 10) // 38))
        for k in range(n):
            xs = x0 + 6 + k * 38
            _streamline(painter, xs, yc - outer - 7, 22)
            _streamline(painter, xs + 10, yc + outer + 7, 22)
        outer += 10.0

    painter.restore()
    return outer


# --------------------------------------------------------------------------- the canvas


class StripCanvas(QWidget):
    """Paints the blocks and handles mouse and keyboard; owned by :class:`LineStrip`."""

    def __init__(self, strip: "LineStrip"):
        super().__init__(strip)
        self.strip = strip
        self.setFocusPolicy(Qt.StrongFocus)
        self.setMouseTracking(True)
        self.setFixedHeight(CANVAS_HEIGHT)
        self.setSizePolicy(QSizePolicy.Expanding, QSizePolicy.Fixed)
        self._hover = -1
        self._press_index = -1
        self._press_pos: Optional[QPointF] = None
        self._dragging = False
        self._drop_gap = -1
        self._pixmap: Optional[QPixmap] = None  # the strip as last drawn (see paintEvent)
        self._pixmap_key: tuple = ()
        self.setAccessibleName("Line Strip")

    # ---- geometry

    def _segments(self):
        return self.strip.doc.current_alternative.segments

    def block_rects(self) -> list[QRectF]:
        segs = self._segments()
        n = len(segs)
        avail = max(0.0, self.width() - LEFT_MARGIN - RIGHT_MARGIN - GAP * (n - 1))
        widths = block_widths([s.length_m for s in segs], avail)
        rects, x = [], float(LEFT_MARGIN)
        for w in widths:
            rects.append(QRectF(x, 4, w, self.height() - 8))
            x += w + GAP
        return rects

    def minimum_width_for(self, n: int) -> int:
        return LEFT_MARGIN + RIGHT_MARGIN + n * MIN_BLOCK_WIDTH + GAP * max(0, n - 1)

    def index_at(self, pos: QPointF) -> int:
        for i, r in enumerate(self.block_rects()):
            if r.adjusted(-GAP / 2, 0, GAP / 2, 0).contains(pos):
                return i
        return -1

    def gap_at(self, x: float) -> int:
        """Insertion gap (0..n) nearest to x: gap g lies before block g."""
        rects = self.block_rects()
        for i, r in enumerate(rects):
            if x < r.center().x():
                return i
        return len(rects)

    def sizeHint(self) -> QSize:
        return QSize(max(900, self.minimum_width_for(len(self._segments()))), CANVAS_HEIGHT)

    # ---- painting

    def _cache_key(self, findings: dict[int, str]) -> tuple:
        """Everything the strip picture depends on; equal keys give the same picture."""
        doc = self.strip.doc
        system = doc.unit_system
        segs = tuple(
            (seg.name, seg.length_m, seg.elevation_change_m, wall_model(seg),
             sum(layer.thickness_m for layer in seg.insulation), seg.heat_input_W_per_m > 0,
             sum(f.count for f in seg.fittings), wall_summary(seg, system))
            for seg in self._segments()
        )
        return (segs, system, self.width(), self.height(), self.devicePixelRatioF(), self.font().key(),
                doc.selected_segment, self._hover, tuple(sorted(findings.items())),
                self._dragging, self._drop_gap)

    def paintEvent(self, event) -> None:  # noqa: N802 (Qt name)
        # The picture is kept in a pixmap and redrawn only when what it shows changed: a result
        # that leaves the check marks as they were, an expose or a scroll just copy it.
        findings = self.strip.findings_by_segment()
        key = self._cache_key(findings)
        if self._pixmap is None or key != self._pixmap_key:
            dpr = self.devicePixelRatioF()
            pix = QPixmap(max(1, int(math.ceil(self.width() * dpr))), max(1, int(math.ceil(self.height() * dpr))))
            pix.setDevicePixelRatio(dpr)
            painter = QPainter(pix)
            self._render(painter, findings)
            painter.end()
            self._pixmap, self._pixmap_key = pix, key
        p = QPainter(self)
        p.drawPixmap(0, 0, self._pixmap)
        p.end()

    def _render(self, p: QPainter, findings: dict[int, str]) -> None:
        p.setRenderHint(QPainter.Antialiasing, True)
        p.fillRect(self.rect(), style.qcolor(style.CANVAS_BG))
        doc = self.strip.doc
        system = doc.unit_system
        segs = self._segments()
        rects = self.block_rects()
        selected = doc.selected_segment
        base = self.font()
        f_name, f_small, f_tiny = _font(base, 12, True), _font(base, 11), _font(base, 10)
        yc = PIPE_CENTRE_Y

        # inlet flow arrow
        p.setPen(QPen(style.qcolor(style.FLOW_ARROW), 2.4))
        p.setBrush(style.qcolor(style.FLOW_ARROW))
        ax0, ax1 = 10.0, LEFT_MARGIN - 8.0
        p.drawLine(QPointF(ax0, yc), QPointF(ax1 - 8, yc))
        p.drawPolygon(QPolygonF([QPointF(ax1, yc), QPointF(ax1 - 10, yc - 6), QPointF(ax1 - 10, yc + 6)]))
        p.setFont(f_tiny)
        p.setPen(style.qcolor(style.FLOW_ARROW))
        p.drawText(QRectF(0, yc - 30, LEFT_MARGIN - 4, 14), Qt.AlignCenter, "Flow")
        p.setPen(style.qcolor(style.INK_MUTED))
        p.drawText(QRectF(0, yc + 12, LEFT_MARGIN - 4, 14), Qt.AlignCenter, "inlet")
        if rects:
            right = rects[-1].right()
            p.drawText(QRectF(right + 2, yc + 12, RIGHT_MARGIN + 10, 14), Qt.AlignLeft, "out")
            p.setPen(QPen(style.qcolor(style.PIPE_WALL), 1.6))
            p.drawLine(QPointF(right + 4, yc), QPointF(right + RIGHT_MARGIN - 8, yc))
            p.drawLine(QPointF(right + RIGHT_MARGIN - 8, yc), QPointF(right + RIGHT_MARGIN - 13, yc - 4))
            p.drawLine(QPointF(right + RIGHT_MARGIN - 8, yc), QPointF(right + RIGHT_MARGIN - 13, yc + 4))

        for i, (seg, r) in enumerate(zip(segs, rects)):
            # background: selection / hover
            if i == selected:
                p.setPen(QPen(style.qcolor(style.SELECTION), 2.0))
                p.setBrush(style.qcolor(style.SELECTION_FILL))
                p.drawRoundedRect(r.adjusted(1, 1, -1, -1), 6, 6)
            elif i == self._hover:
                p.setPen(Qt.NoPen)
                p.setBrush(style.qcolor(style.HOVER_FILL))
                p.drawRoundedRect(r.adjusted(1, 1, -1, -1), 6, 6)

            inner = r.adjusted(6, 0, -6, 0)
            # name
            p.setFont(f_name)
            p.setPen(style.qcolor(style.INK))
            fm = QFontMetrics(f_name)
            name_w = inner.width() - (16 if i in findings else 0)
            p.drawText(
                QRectF(inner.left(), r.top() + 4, name_w, 16),
                Qt.AlignLeft | Qt.AlignVCenter,
                fm.elidedText(seg.name, Qt.ElideRight, int(name_w)),
            )
            if i in findings:
                sev = findings[i]
                style.paint_severity_mark(p, QRectF(inner.right() - 14, r.top() + 5, 14, 14), style.severity_style(sev))
            # length and elevation
            p.setFont(f_small)
            p.setPen(style.qcolor(style.INK_MUTED))
            length_text = format_value(seg.length_m, "length", system, digits=3)
            p.drawText(QRectF(inner.left(), r.top() + 22, inner.width(), 14), Qt.AlignLeft | Qt.AlignVCenter, length_text)
            dz = seg.elevation_change_m
            if abs(dz) > 1e-9:
                up = dz > 0
                ez = format_value(abs(dz), "elevation", system, digits=2)
                ew = QFontMetrics(f_small).horizontalAdvance(ez)
                ex = inner.right() - ew
                p.drawText(QRectF(ex, r.top() + 22, ew + 2, 14), Qt.AlignLeft | Qt.AlignVCenter, ez)
                p.setPen(QPen(style.qcolor(style.INK), 1.4))
                p.setBrush(style.qcolor(style.INK))
                _elevation_arrow(p, ex - 7, r.top() + 29, up)

            # the pipe with its wall model
            model = wall_model(seg)
            ins_px = insulation_band_px(sum(layer.thickness_m for layer in seg.insulation))
            outer = paint_pipe(
                p,
                QRectF(r.left(), 0, r.width(), 0),
                yc,
                model=model,
                insulation_px=ins_px,
                heat_input=seg.heat_input_W_per_m > 0,
            )

            # fittings
            count = sum(f.count for f in seg.fittings)
            if count:
                fy = min(yc + outer + 9, r.bottom() - 26)
                p.setPen(QPen(style.qcolor(style.FITTING), 1.2))
                p.setBrush(style.qcolor("#FFFFFF"))
                _diamond(p, inner.left() + 5, fy)
                p.setFont(f_tiny)
                p.setPen(style.qcolor(style.INK))
                p.drawText(QRectF(inner.left() + 12, fy - 7, 60, 14), Qt.AlignLeft | Qt.AlignVCenter, f"×{count}")

            # what happens at the wall, in words
            p.setFont(f_tiny)
            p.setPen(style.qcolor(style.INK_MUTED))
            summary = wall_summary(seg, system)
            p.drawText(
                QRectF(inner.left(), r.bottom() - 16, inner.width(), 14),
                Qt.AlignLeft | Qt.AlignVCenter,
                QFontMetrics(f_tiny).elidedText(summary, Qt.ElideRight, int(inner.width())),
            )

        # flange joints between blocks
        p.setPen(QPen(style.qcolor(style.PIPE_WALL), 2.0))
        for a, b in zip(rects, rects[1:]):
            x = (a.right() + b.left()) / 2
            p.drawLine(QPointF(x, yc - BORE_HALF - 6), QPointF(x, yc + BORE_HALF + 6))

        # drop indicator while dragging
        if self._dragging and self._drop_gap >= 0 and rects:
            if self._drop_gap < len(rects):
                x = rects[self._drop_gap].left() - GAP / 2
            else:
                x = rects[-1].right() + GAP / 2
            p.setPen(QPen(style.qcolor(style.SELECTION), 3.0))
            p.drawLine(QPointF(x, 6), QPointF(x, self.height() - 6))

    # ---- mouse

    def mousePressEvent(self, event) -> None:  # noqa: N802
        self.setFocus(Qt.MouseFocusReason)
        i = self.index_at(event.position())
        if event.button() in (Qt.LeftButton, Qt.RightButton) and i >= 0 and i != self.strip.doc.selected_segment:
            self.strip.doc.select_segment(i)
        if event.button() == Qt.LeftButton:
            self._press_index = i
            self._press_pos = event.position()
            self._dragging = False
        super().mousePressEvent(event)

    def mouseMoveEvent(self, event) -> None:  # noqa: N802
        pos = event.position()
        if self._press_pos is not None and self._press_index >= 0 and event.buttons() & Qt.LeftButton:
            if not self._dragging and (pos - self._press_pos).manhattanLength() >= QApplication.startDragDistance():
                self._dragging = True
                self.setCursor(Qt.ClosedHandCursor)
            if self._dragging:
                self._drop_gap = self.gap_at(pos.x())
                self.update()
                return
        h = self.index_at(pos)
        if h != self._hover:
            self._hover = h
            self.update()

    def mouseReleaseEvent(self, event) -> None:  # noqa: N802
        if self._dragging and event.button() == Qt.LeftButton:
            src, gap = self._press_index, self.gap_at(event.position().x())
            dst = gap if gap <= src else gap - 1
            self._dragging = False
            self._drop_gap = -1
            self.unsetCursor()
            if dst != src:
                self.strip.move_segment(src, dst)
            self.update()
        self._press_pos = None
        self._press_index = -1
        super().mouseReleaseEvent(event)

    def leaveEvent(self, event) -> None:  # noqa: N802
        self._hover = -1
        self.update()
        super().leaveEvent(event)

    def contextMenuEvent(self, event) -> None:  # noqa: N802
        i = self.index_at(QPointF(event.pos()))
        if i >= 0 and i != self.strip.doc.selected_segment:
            self.strip.doc.select_segment(i)
        self.strip.context_menu().exec(event.globalPos())

    def event(self, e) -> bool:
        if e.type() == e.Type.ToolTip:
            i = self.index_at(QPointF(e.pos()))
            if i >= 0:
                QToolTip.showText(e.globalPos(), self.strip.segment_tooltip(i), self)
            else:
                QToolTip.hideText()
                e.ignore()
            return True
        return super().event(e)

    # ---- keyboard (actions carry Insert / Ctrl+D / Delete / Ctrl+Left/Right)

    def keyPressEvent(self, event) -> None:  # noqa: N802
        doc = self.strip.doc
        n = len(self._segments())
        key = event.key()
        sel = doc.selected_segment
        if key in (Qt.Key_Left, Qt.Key_Right) and not event.modifiers() & Qt.ControlModifier:
            step = -1 if key == Qt.Key_Left else 1
            doc.select_segment(min(n - 1, max(0, (sel if sel >= 0 else 0) + (step if sel >= 0 else 0))))
            return
        if key == Qt.Key_Home:
            doc.select_segment(0)
            return
        if key == Qt.Key_End:
            doc.select_segment(n - 1)
            return
        if key in (Qt.Key_Delete, Qt.Key_Backspace):
            # reached only when the Delete action is disabled: say why
            self.strip.delete_selected()
            return
        super().keyPressEvent(event)


# --------------------------------------------------------------------------- legend


class SymbolLegend(QWidget):
    """A row of the Line Strip's symbols with short names; the tooltip explains each."""

    ORDER = ("heat_input", "insulation", "jacket", "fixed_wall", "buried", "wind", "adiabatic", "fittings", "elevation")

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setFixedHeight(26)
        self.setSizePolicy(QSizePolicy.Expanding, QSizePolicy.Fixed)
        rows = "".join(f"<tr><td><b>{SYMBOLS[k][0]}</b></td><td>{SYMBOLS[k][1]}</td></tr>" for k in SYMBOLS)
        self.setToolTip(f"<table cellspacing='4'>{rows}</table>")

    def paintEvent(self, event) -> None:  # noqa: N802
        p = QPainter(self)
        p.setRenderHint(QPainter.Antialiasing, True)
        f = _font(self.font(), 10)
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
                _diamond(p, x + 13, yc)
            elif key == "elevation":
                p.setPen(QPen(style.qcolor(style.INK), 1.4))
                p.setBrush(style.qcolor(style.INK))
                _elevation_arrow(p, x + 9, yc, True)
                _elevation_arrow(p, x + 18, yc, False)
            else:
                model = key if key in ("jacket", "fixed_wall", "buried", "wind", "adiabatic") else "bare"
                paint_pipe(
                    p,
                    r,
                    yc,
                    model=model if key != "wind" else "bare",
                    insulation_px=3.0 if key == "insulation" else 0.0,
                    heat_input=key == "heat_input",
                    bore_half=3.0 if key != "buried" else 2.0,
                    compact=True,
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


# --------------------------------------------------------------------------- the panel


class LineStrip(QWidget):
    """The Line Strip panel: toolbar, the strip of segments, a symbol legend.

    ``LineStrip(doc)`` observes the Document; every change goes through commands pushed with
    ``doc.push``. Public actions (QAction): ``insert_action``, ``duplicate_action``,
    ``delete_action``, ``move_left_action``, ``move_right_action``.
    """

    status_message = Signal(str)  # short user-facing messages (also shown in the hint label)

    def __init__(self, doc, parent=None):
        super().__init__(parent)
        self.doc = doc
        self.setObjectName("LineStrip")
        self.setWindowTitle("Line Strip")

        self.insert_action = self._action("Insert after", QKeySequence(Qt.Key_Insert), self.insert_after,
                                          "Insert a new segment after the selected one (Insert)")
        self.duplicate_action = self._action("Duplicate", QKeySequence("Ctrl+D"), self.duplicate_selected,
                                             "Duplicate the selected segment (Ctrl+D)")
        self.delete_action = self._action("Delete", QKeySequence(Qt.Key_Delete), self.delete_selected,
                                          "Delete the selected segment (Delete)")
        self.move_left_action = self._action("◀ Move up-stream", QKeySequence("Ctrl+Left"), lambda: self.move_selected(-1),
                                             "Move the selected segment one place towards the inlet (Ctrl+Left)")
        self.move_right_action = self._action("Move down-stream ▶", QKeySequence("Ctrl+Right"), lambda: self.move_selected(1),
                                              "Move the selected segment one place towards the outlet (Ctrl+Right)")

        self.toolbar = QToolBar("Line Strip", self)
        self.toolbar.setIconSize(QSize(14, 14))
        self.toolbar.setToolButtonStyle(Qt.ToolButtonTextOnly)
        title = QLabel("<b>Line Strip</b>")
        title.setContentsMargins(4, 0, 12, 0)
        self.toolbar.addWidget(title)
        for a in (self.insert_action, self.duplicate_action, self.delete_action):
            self.toolbar.addAction(a)
        self.toolbar.addSeparator()
        self.toolbar.addAction(self.move_left_action)
        self.toolbar.addAction(self.move_right_action)
        self.hint = QLabel("")
        self.hint.setStyleSheet(f"color: {style.INK_MUTED}; padding-left: 12px;")
        self.toolbar.addWidget(self.hint)
        self.summary = QLabel("")
        self.summary.setStyleSheet(f"color: {style.INK_MUTED}; padding-right: 6px;")
        spacer = QWidget()
        spacer.setSizePolicy(QSizePolicy.Expanding, QSizePolicy.Preferred)
        self.toolbar.addWidget(spacer)
        self.toolbar.addWidget(self.summary)

        self.canvas = StripCanvas(self)
        self.scroll = QScrollArea(self)
        self.scroll.setWidget(self.canvas)
        self.scroll.setWidgetResizable(True)
        self.scroll.setVerticalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
        self.scroll.setHorizontalScrollBarPolicy(Qt.ScrollBarAsNeeded)
        self.scroll.setFrameShape(QScrollArea.NoFrame)
        self.scroll.setFixedHeight(CANVAS_HEIGHT + 16)
        self.legend = SymbolLegend(self)

        lay = QVBoxLayout(self)
        lay.setContentsMargins(0, 0, 0, 0)
        lay.setSpacing(0)
        lay.addWidget(self.toolbar)
        lay.addWidget(self.scroll)
        lay.addWidget(self.legend)

        for sig in (doc.project_replaced, doc.project_changed, doc.result_ready):
            sig.connect(self.refresh)
        doc.current_alternative_changed.connect(lambda _i: self.refresh())
        doc.selection_changed.connect(lambda _i: self.refresh())
        doc.units_changed.connect(lambda _s: self.refresh())
        self.refresh()

    # ---- helpers

    def _action(self, text: str, shortcut: QKeySequence, slot, tip: str) -> QAction:
        a = QAction(text, self)
        a.setShortcut(shortcut)
        a.setShortcutContext(Qt.WidgetWithChildrenShortcut)
        a.setToolTip(tip)
        a.setStatusTip(tip)
        a.triggered.connect(slot)
        self.addAction(a)
        return a

    def _segments(self):
        return self.doc.current_alternative.segments

    def findings_by_segment(self) -> dict[int, str]:
        """Worst severity per segment index from the current result (for the corner mark)."""
        res = getattr(self.doc, "result", None)
        out: dict[int, str] = {}
        if res is None:
            return out
        for c in res.checks:
            if c.segment is None:
                continue
            if c.severity == "info":
                continue  # only warnings and dangers earn a mark on the strip
            if style.severity_rank(c.severity) > style.severity_rank(out.get(c.segment, "")):
                out[c.segment] = c.severity
        return out

    def say(self, text: str) -> None:
        self.hint.setText(text)
        self.status_message.emit(text)

    def refresh(self) -> None:
        segs = self._segments()
        n = len(segs)
        sel = self.doc.selected_segment
        has_sel = 0 <= sel < n
        self.insert_action.setEnabled(True)
        self.duplicate_action.setEnabled(has_sel)
        if n <= 1:
            tip = "A line needs at least one segment: the only segment cannot be deleted."
        elif not has_sel:
            tip = "Select a segment to delete it."
        else:
            tip = "Delete the selected segment (Delete)"
        self.delete_action.setEnabled(has_sel and n > 1)
        self.delete_action.setToolTip(tip)
        self.delete_action.setStatusTip(tip)
        self.move_left_action.setEnabled(has_sel and sel > 0)
        self.move_right_action.setEnabled(has_sel and sel < n - 1)
        total = sum(s.length_m for s in segs)
        system = self.doc.unit_system
        self.summary.setText(
            f"{n} segment{'s' if n != 1 else ''} · {format_value(total, 'length', system, digits=4)} total"
        )
        self.canvas.setMinimumWidth(self.canvas.minimum_width_for(n))
        self.canvas.update()

    def context_menu(self) -> QMenu:
        m = QMenu(self)
        for a in (self.insert_action, self.duplicate_action, self.delete_action):
            m.addAction(a)
        m.addSeparator()
        m.addAction(self.move_left_action)
        m.addAction(self.move_right_action)
        return m

    def segment_rect(self, index: int) -> QRect:
        """Where segment ``index`` is drawn, in canvas coordinates (for tests and tooltips)."""
        return self.canvas.block_rects()[index].toRect()

    def segment_tooltip(self, index: int) -> str:
        seg = self._segments()[index]
        system = self.doc.unit_system
        pipe = seg.pipe
        if pipe.bore == "nps":
            bore = f"NPS {pipe.nps} schedule {pipe.schedule}"
        else:
            bore = "bore " + format_value(pipe.inner_diameter_m, "diameter", system)
        rows = [
            f"<b>{html.escape(seg.name)}</b>",
            f"Length {format_value(seg.length_m, 'length', system)}, {bore}, {pipe.material}",
            "Wall: " + wall_summary(seg, system),
        ]
        if seg.elevation_change_m:
            rows.append(f"Elevation change {format_value(seg.elevation_change_m, 'elevation', system)}")
        for layer in seg.insulation:
            rows.append(f"Layer: {layer.material}, {format_value(layer.thickness_m, 'thickness', system)}")
        for f in seg.fittings:
            name = f.label or f.kind.replace("_", " ")
            rows.append(f"Fitting: {f.count} × {name}")
        res = getattr(self.doc, "result", None)
        if res is not None:
            for c in res.checks:
                if c.segment == index:
                    rows.append(f"{style.severity_style(c.severity).word}: {units.check_message(c, self.doc.unit_system)}")
        return "<br>".join(rows[:1] + [html.escape(r) for r in rows[1:]])

    # ---- edits (through commands)

    def _alt_index(self) -> int:
        return self.doc.current_index

    def _unique_name(self, stem: str = "Segment") -> str:
        names = {s.name for s in self._segments()}
        k = len(names) + 1
        while f"{stem} {k}" in names:
            k += 1
        return f"{stem} {k}"

    def insert_after(self) -> None:
        from solver.model import Segment

        from app.commands import InsertSegment

        segs = self._segments()
        sel = self.doc.selected_segment
        pos = sel + 1 if 0 <= sel < len(segs) else len(segs)
        template = segs[sel] if 0 <= sel < len(segs) else segs[-1]
        # same bore as its neighbour (a line usually keeps its size); default wall otherwise
        new = Segment(name=self._unique_name(), pipe=template.pipe.model_copy(deep=True))
        self.doc.push(InsertSegment(self.doc, self._alt_index(), pos, new))
        self.doc.select_segment(pos)
        self.say(f"Inserted {new.name}")

    def duplicate_selected(self) -> None:
        from app.commands import DuplicateSegment

        sel = self.doc.selected_segment
        if not 0 <= sel < len(self._segments()):
            self.say("Select a segment to duplicate it.")
            return
        self.doc.push(DuplicateSegment(self.doc, self._alt_index(), sel))
        self.doc.select_segment(sel + 1)
        self.say("Duplicated the segment")

    def delete_selected(self) -> None:
        from app.commands import RemoveSegment

        segs = self._segments()
        sel = self.doc.selected_segment
        if len(segs) <= 1:
            self.say("A line needs at least one segment: the only segment cannot be deleted.")
            return
        if not 0 <= sel < len(segs):
            self.say("Select a segment to delete it.")
            return
        name = segs[sel].name
        self.doc.push(RemoveSegment(self.doc, self._alt_index(), sel))
        self.doc.select_segment(min(sel, len(self._segments()) - 1))
        self.say(f"Deleted {name} (Undo brings it back)")

    def move_selected(self, step: int) -> None:
        sel = self.doc.selected_segment
        n = len(self._segments())
        if 0 <= sel < n and 0 <= sel + step < n:
            self.move_segment(sel, sel + step)

    def move_segment(self, src: int, dst: int) -> None:
        """Move segment ``src`` so that it ends at index ``dst`` (a MoveSegment command)."""
        from app.commands import MoveSegment

        n = len(self._segments())
        if src == dst or not (0 <= src < n and 0 <= dst < n):
            return
        self.doc.push(MoveSegment(self.doc, self._alt_index(), src, dst))
        self.doc.select_segment(dst)
