"""Line Strip: the segments of the current alternative drawn in flow order.

Each segment is a block whose width follows its length (with a minimum so short ones stay
clickable). The block shows the wall model with Calorun's own symbols (drawn by
:mod:`app.panels.pipe_symbols`), the name, length, elevation change and fittings. Captions are
measured: one that does not fit is shortened (a compact wording first, then an ellipsis) and
the block's tooltip gives it in full. Click selects, drag reorders; insert, duplicate, delete
and move are the shared actions of :class:`app.segment_actions.SegmentActions`. The strip keeps
no copy of the design: it reads ``doc.current_alternative`` on every paint (block pictures and
captions are cached by what they show, so only changed blocks in view are drawn again).
"""

from __future__ import annotations

import html
import math
import sys
from collections import OrderedDict
from dataclasses import dataclass, replace
from functools import lru_cache
from typing import Optional

from PySide6.QtCore import QPointF, QRect, QRectF, QSize, Qt, Signal
from PySide6.QtGui import QColor, QFont, QFontMetrics, QPainter, QPen, QPixmap, QPolygonF
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
from app.panels.pipe_symbols import (
    BORE_HALF,
    SymbolLegend,
    diamond,
    elevation_arrow,
    font_px,
    heat_sink_mark,
    insulation_band_px,
    paint_pipe,
    pipe_extent,
    wall_model,
    wall_summary,
    wall_summary_parts,
)
from app.messages import heater_words
from app.panels.heat_sinks_table import SINK_KINDS
from app.segment_actions import SegmentActions
from app.units import format_value
from app.widgets.elided import ElidedLabel

MIN_BLOCK_WIDTH = 120  # px: short segments stay clickable, their captions fit on two lines
GAP = 6  # px between blocks (a flange joint is drawn in it)
LEFT_MARGIN = 64  # px: flow arrow
RIGHT_MARGIN = 30
CANVAS_HEIGHT = 150
PIPE_CENTRE_Y = 84
BLOCK_PAD = 2  # px kept around a block's picture: pens and antialiasing reach a little past its edges
BLOCK_CACHE_SIZE = 400  # block pictures kept (a 60-segment line in view twice over, with hover/selection)
BLOCK_CACHE_BYTES = 32 * 2**20  # and at most this much memory for them (a few full views on a large screen)
CAPTION_CACHE_SIZE = 400


def segment_key(seg) -> tuple:
    """Everything of a segment that its block shows (name, length, elevation, wall, tracer, fittings).

    Plain values only: a model object is not a safe cache key (it is mutable and validated on assignment).
    """
    return (seg.name, seg.length_m, seg.elevation_change_m,
            tuple(seg.heater.__dict__.items()) if seg.heater is not None else None,
            tuple(layer.thickness_m for layer in seg.insulation), tuple(f.count for f in seg.fittings),
            tuple(h.count for h in seg.heat_sinks),
            tuple(seg.surroundings.__dict__.items()),
            tuple(seg.steam_tracer.__dict__.items()) if seg.steam_tracer is not None else None)


def _bytes(pix: QPixmap) -> int:
    return pix.width() * pix.height() * 4


@lru_cache(maxsize=64)
def _colour(hex_colour: str) -> QColor:
    """A shared colour for painting (never changed: setPen/setBrush copy it)."""
    return style.qcolor(hex_colour)


@lru_cache(maxsize=64)
def _pen(hex_colour: str, width: float) -> QPen:
    """A shared pen for painting (never changed: setPen copies it)."""
    return QPen(style.qcolor(hex_colour), width)


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
    # only the proportions matter: scaled by the longest, so no sum overflows (1e308 m + 1e308 m);
    # a length that is not a positive number is drawn at the minimum
    lengths = [min(v, sys.float_info.max) if v > 0 else 0.0 for v in lengths]  # (NaN > 0 is False)
    longest = max(lengths)
    lengths = [v / longest for v in lengths] if longest > 0 else lengths
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


@dataclass(frozen=True)
class Caption:
    """One piece of text in a block: what is drawn, where, and the whole text it stands for."""

    kind: str  # "name", "length", "elevation", "fittings", "heat_sinks", "wall"
    text: str  # as drawn
    wording: str  # the wording chosen for the room (a compact one for a narrow block), before eliding
    full: str  # the whole caption (the block's tooltip says it)
    rect: QRectF
    font: QFont
    up: bool = True  # elevation only: the line rises

    @property
    def elided(self) -> bool:
        return self.text != self.wording


def _fit(text: str, font: QFont, room: float) -> str:
    return QFontMetrics(font).elidedText(text, Qt.ElideRight, int(math.floor(max(0.0, room))))


def _width(text: str, font: QFont) -> float:
    return float(QFontMetrics(font).horizontalAdvance(text))


def _two_lines(parts: list[str], font: QFont, room_a: float, room_b: float) -> Optional[tuple[str, str]]:
    """``parts`` split over an upper and a lower line that both fit their rooms (the upper as
    full as it can be), or None when no split fits."""
    sep = " · "
    for k in range(len(parts) - 1, 0, -1):
        upper, lower = sep.join(parts[:k]), sep.join(parts[k:])
        if _width(upper, font) <= room_a and _width(lower, font) <= room_b:
            return upper, lower
    return None


def block_captions(seg, r: QRectF, system: str, base: QFont, *, marked: bool = False,
                   outer: float = 2 * BORE_HALF) -> list[Caption]:
    """Where each caption of segment ``seg`` goes in its block ``r``, measured in its font.

    ``marked``: a check mark takes the top-right corner. ``outer``: half height of the drawn
    pipe (fittings go below it). A caption too wide for its room is shortened: a smaller font
    for the name; for the wall, the compact wording and then two lines; an ellipsis only as a
    last resort (the block's tooltip then gives it in full).
    """
    inner = r.adjusted(6, 0, -6, 0)
    room = inner.width()
    out: list[Caption] = []

    name_room = room - (16 if marked else 0)
    f_name = font_px(base, 12, True)
    if _width(seg.name, f_name) > name_room:
        f_name = font_px(base, 11, True)
    out.append(Caption("name", _fit(seg.name, f_name, name_room), seg.name, seg.name,
                       QRectF(inner.left(), r.top() + 4, name_room, 16), f_name))

    f_small, f_tiny = font_px(base, 11), font_px(base, 10)
    gap, arrow = 6.0, 12.0  # between pieces on a row; the elevation arrow left of its figure
    length = format_value(seg.length_m, "length", system, digits=3)
    dz = seg.elevation_change_m
    ez = format_value(abs(dz), "elevation", system, digits=2) if abs(dz) > 1e-9 else ""
    length_room = room
    elevation_below = False  # no room beside the length: it goes to the row under the pipe
    if ez:
        ew = _width(ez, f_small)
        if _width(length, f_small) + gap + arrow + ew <= room:
            length_room = room - arrow - ew - gap
            out.append(Caption("elevation", ez, ez, ez, QRectF(inner.right() - ew, r.top() + 22, ew, 14),
                               f_small, dz > 0))
        else:
            elevation_below = True
    out.append(Caption("length", _fit(length, f_small, length_room), length, length,
                       QRectF(inner.left(), r.top() + 22, length_room, 14), f_small))

    # the rows under the pipe: the fittings marker (left) and a displaced elevation (right) on the
    # upper row, the wall in words on the lower row, or on both rows when a block is narrow
    fittings = sum(f.count for f in seg.fittings)
    fit_text = f"×{fittings}" if fittings else ""
    sinks = sum(h.count for h in seg.heat_sinks)
    sink_text = f"×{sinks}" if sinks else ""
    fit_w = 12 + _width(fit_text, f_tiny) + gap if fittings else 0.0
    sink_w = 13 + _width(sink_text, f_tiny) + gap if sinks else 0.0
    left = fit_w + sink_w
    markers = bool(fittings or sinks)
    right = arrow + _width(ez, f_small) + gap if elevation_below else 0.0
    full = wall_summary(seg, system)
    compact_parts = wall_summary_parts(seg, system, compact=True)
    compact = " · ".join(compact_parts)
    row_b = r.bottom() - 16
    row_a = row_b - 15
    marker_y = min(PIPE_CENTRE_Y + outer + 9, r.bottom() - 26) - 7  # just under the pipe
    lines: list[tuple[str, float, float, float]] = []  # (wording, x, y, room)
    if _width(full, f_tiny) <= room:
        lines = [(full, inner.left(), row_b, room)]
    elif _width(compact, f_tiny) <= room:
        lines = [(compact, inner.left(), row_b, room)]
    else:  # two lines; the fittings marker takes the start of whichever row has room for it
        for marker_row in ((row_a, row_b) if markers else (row_a,)):
            a_left = left if marker_row == row_a else 0.0
            b_left = left if marker_row == row_b else 0.0
            split = _two_lines(compact_parts, f_tiny, room - a_left - right, room - b_left)
            if split is not None:
                lines = [(split[0], inner.left() + a_left, row_a, room - a_left - right),
                         (split[1], inner.left() + b_left, row_b, room - b_left)]
                marker_y = marker_row
                break
        else:  # does not fit even so: one line, shortened (the tooltip says it all)
            lines = [(compact, inner.left(), row_b, room)]
    if len(lines) == 2 and elevation_below:
        upper_y = row_a
    else:
        upper_y = marker_y
    if fittings:
        out.append(Caption("fittings", _fit(fit_text, f_tiny, room - 12), fit_text, fit_text,
                           QRectF(inner.left() + 12, marker_y, min(_width(fit_text, f_tiny), room - 12), 14), f_tiny))
    if sinks:
        sink_room = max(0.0, room - fit_w - 13)
        out.append(Caption("heat_sinks", _fit(sink_text, f_tiny, sink_room), sink_text, sink_text,
                           QRectF(inner.left() + fit_w + 13, marker_y, min(_width(sink_text, f_tiny), sink_room), 14),
                           f_tiny))
    if elevation_below:
        er = max(0.0, room - (left if marker_y == upper_y and markers else 0.0) - arrow)
        w = min(_width(ez, f_small), er)
        out.append(Caption("elevation", _fit(ez, f_small, er), ez, ez,
                           QRectF(inner.right() - w, upper_y, w, 14), f_small, dz > 0))
    for wording, x, y, line_room in lines:
        out.append(Caption("wall", _fit(wording, f_tiny, line_room), wording, full,
                           QRectF(x, y, line_room, 14), f_tiny))
    return out


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
        self._pixmap: Optional[QPixmap] = None  # what is in view, as last drawn (see paintEvent)
        self._pixmap_key: tuple = ()
        self._blocks: OrderedDict[tuple, QPixmap] = OrderedDict()  # block pictures, least recently used first
        self._block_bytes = 0  # memory the block pictures take
        self._caption_cache: OrderedDict[tuple, list[Caption]] = OrderedDict()
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

    def captions(self, index: int) -> list[Caption]:
        seg = self._segments()[index]
        r = self.block_rects()[index]
        marked = index in self.strip.findings_by_segment()
        local = self._block_captions(seg, segment_key(seg), r.width(), self.strip.doc.unit_system,
                                     self.font(), self.font().key(), marked)
        return [replace(cap, rect=cap.rect.translated(r.left(), 0)) for cap in local]

    # ---- painting
    #
    # Each block is drawn into its own pixmap, kept while what it shows is the same (its segment's
    # drawn content, width, selection, hover, check mark, units, font), and a paint puts together
    # only the blocks in view: an edit redraws the blocks it changed (or resized), not the strip.
    # A block's pixmap is copied at its position rounded to a device pixel (at most half a pixel
    # off), so a block that only moves along is not redrawn.

    def forget_drawings(self) -> None:
        """Drop the cached block pictures and captions (new project, other units)."""
        self._blocks.clear()
        self._block_bytes = 0
        self._caption_cache.clear()
        self._pixmap = None
        self._pixmap_key = ()

    def _block_captions(self, seg, content: tuple, width: float, system: str, base: QFont, font_key: str,
                        marked: bool) -> list[Caption]:
        """Captions of a block of ``width`` whose left edge is at x = 0 (measured once per content)."""
        key = (content, width, self.height(), system, font_key, marked)
        caps = self._caption_cache.get(key)
        if caps is None:
            r = QRectF(0, 4, width, self.height() - 8)
            caps = block_captions(seg, r, system, base, marked=marked, outer=pipe_extent(seg))
            self._caption_cache[key] = caps
            while len(self._caption_cache) > CAPTION_CACHE_SIZE:
                self._caption_cache.popitem(last=False)
        else:
            self._caption_cache.move_to_end(key)
        return caps

    def _block_pixmap(self, seg, content: tuple, key: tuple, width: float, state: str, severity: str,
                      system: str, base: QFont, font_key: str, dpr: float) -> QPixmap:
        """The picture of one block (left edge at x = BLOCK_PAD), drawn again only when ``key`` is new."""
        pix = self._blocks.get(key)
        if pix is not None:
            self._blocks.move_to_end(key)
            return pix
        h = self.height()
        pix = QPixmap(max(1, int(math.ceil((width + 2 * BLOCK_PAD) * dpr))), max(1, int(math.ceil(h * dpr))))
        pix.setDevicePixelRatio(dpr)
        pix.fill(_colour(style.CANVAS_BG))
        p = QPainter(pix)
        try:  # a painter left open on a pixmap that is then dropped takes the app down
            self._paint_block(p, seg, content, width, h, state, severity, system, base, font_key)
        finally:
            p.end()
        self._blocks[key] = pix
        self._block_bytes += _bytes(pix)
        while len(self._blocks) > 1 and (len(self._blocks) > BLOCK_CACHE_SIZE or self._block_bytes > BLOCK_CACHE_BYTES):
            self._block_bytes -= _bytes(self._blocks.popitem(last=False)[1])
        return pix

    def _paint_block(self, p: QPainter, seg, content: tuple, width: float, h: int, state: str, severity: str,
                     system: str, base: QFont, font_key: str) -> None:
        p.setRenderHint(QPainter.Antialiasing, True)
        p.translate(BLOCK_PAD, 0)
        r = QRectF(0, 4, width, h - 8)
        # background: selection / hover
        if state == "selected":
            p.setPen(_pen(style.SELECTION, 2.0))
            p.setBrush(_colour(style.SELECTION_FILL))
            p.drawRoundedRect(r.adjusted(1, 1, -1, -1), 6, 6)
        elif state == "hover":
            p.setPen(Qt.NoPen)
            p.setBrush(_colour(style.HOVER_FILL))
            p.drawRoundedRect(r.adjusted(1, 1, -1, -1), 6, 6)
        # the pipe with its wall model
        paint_pipe(
            p,
            QRectF(0, 0, width, 0),
            PIPE_CENTRE_Y,
            model=wall_model(seg),
            insulation_px=insulation_band_px(sum(layer.thickness_m for layer in seg.insulation)),
            heat_input=seg.heater.kind if seg.heater is not None else "",
            steam_tracer=seg.steam_tracer is not None,
        )
        if severity:
            style.paint_severity_mark(p, QRectF(r.right() - 20, r.top() + 5, 14, 14), style.severity_style(severity))
        for cap in self._block_captions(seg, content, width, system, base, font_key, bool(severity)):
            self._draw_caption(p, cap)

    def paintEvent(self, event) -> None:  # noqa: N802 (Qt name)
        # What is in view (the scroll area's viewport; all of it when grabbed) is kept as one picture
        # and put together again only when what it shows changed: a result that leaves the check
        # marks as they were, or an expose, just copies it.
        area = event.rect() | self.visibleRegion().boundingRect()
        findings = self.strip.findings_by_segment()
        doc = self.strip.doc
        segs = self._segments()
        rects = self.block_rects()
        dpr = self.devicePixelRatioF()
        base = self.font()
        font_key = base.key()
        system = doc.unit_system
        selected = doc.selected_segment
        left, right = area.left() - GAP, area.right() + 1 + GAP
        shown = []  # (index, where the block's picture goes, its key)
        for i, (seg, r) in enumerate(zip(segs, rects)):
            if r.right() < left or r.left() > right:
                continue
            content = segment_key(seg)
            state = "selected" if i == selected else "hover" if i == self._hover else ""
            severity = findings.get(i, "")
            key = (content, r.width(), self.height(), dpr, font_key, system, state, severity)
            x = round((r.left() - BLOCK_PAD) * dpr) / dpr
            shown.append((i, x, key, seg, content, r.width(), state, severity))
        picture_key = (area.getRect(), self.width(), self.height(), dpr, font_key, len(segs),
                       rects[-1].right() if rects else 0.0, tuple((i, x, key) for i, x, key, *_ in shown),
                       self._dragging, self._drop_gap)
        if self._pixmap is None or picture_key != self._pixmap_key:
            pix = QPixmap(max(1, int(math.ceil(area.width() * dpr))), max(1, int(math.ceil(area.height() * dpr))))
            pix.setDevicePixelRatio(dpr)
            painter = QPainter(pix)
            try:
                painter.translate(-area.left(), -area.top())
                self._render(painter, findings, area=area, rects=rects, shown=shown)
            finally:
                painter.end()
            self._pixmap, self._pixmap_key = pix, picture_key
        p = QPainter(self)
        p.drawPixmap(area.topLeft(), self._pixmap)
        p.end()

    def _render(self, p: QPainter, findings: dict[int, str], *, area: QRect, rects: list[QRectF],
                shown: list[tuple]) -> None:
        """Put the picture of ``area`` together: the flow arrows, the blocks ``shown`` (each from its
        cached picture, drawn first if need be), the flange joints and the drop indicator."""
        p.setRenderHint(QPainter.Antialiasing, True)
        p.fillRect(area, _colour(style.CANVAS_BG))
        system = self.strip.doc.unit_system
        base = self.font()
        font_key = base.key()
        dpr = self.devicePixelRatioF()
        yc = PIPE_CENTRE_Y

        for _i, x, key, seg, content, width, state, severity in shown:
            pix = self._block_pixmap(seg, content, key, width, state, severity, system, base, font_key, dpr)
            p.drawPixmap(QPointF(x, 0), pix)

        # inlet flow arrow and outlet (after the blocks: a block's picture has a margin of background)
        if area.left() < LEFT_MARGIN:
            f_tiny = font_px(base, 10)
            p.setPen(_pen(style.FLOW_ARROW, 2.4))
            p.setBrush(_colour(style.FLOW_ARROW))
            ax0, ax1 = 10.0, LEFT_MARGIN - 8.0
            p.drawLine(QPointF(ax0, yc), QPointF(ax1 - 8, yc))
            p.drawPolygon(QPolygonF([QPointF(ax1, yc), QPointF(ax1 - 10, yc - 6), QPointF(ax1 - 10, yc + 6)]))
            p.setFont(f_tiny)
            p.setPen(_colour(style.FLOW_ARROW))
            p.drawText(QRectF(0, yc - 30, LEFT_MARGIN - 4, 14), Qt.AlignCenter, "Flow")
            p.setPen(_colour(style.INK_MUTED))
            p.drawText(QRectF(0, yc + 12, LEFT_MARGIN - 4, 14), Qt.AlignCenter, "inlet")
        if rects and rects[-1].right() - GAP < area.right() + 1:
            right = rects[-1].right()
            p.setFont(font_px(base, 10))
            p.setPen(_colour(style.INK_MUTED))
            p.drawText(QRectF(right + 2, yc + 12, RIGHT_MARGIN + 10, 14), Qt.AlignLeft, "out")
            p.setPen(_pen(style.PIPE_WALL, 1.6))
            p.drawLine(QPointF(right + 4, yc), QPointF(right + RIGHT_MARGIN - 8, yc))
            p.drawLine(QPointF(right + RIGHT_MARGIN - 8, yc), QPointF(right + RIGHT_MARGIN - 13, yc - 4))
            p.drawLine(QPointF(right + RIGHT_MARGIN - 8, yc), QPointF(right + RIGHT_MARGIN - 13, yc + 4))

        # flange joints between blocks (those beside a block in view)
        if shown:
            p.setPen(_pen(style.PIPE_WALL, 2.0))
            first, last = shown[0][0], shown[-1][0]
            for a, b in zip(rects[max(0, first - 1):last + 1], rects[max(1, first):last + 2]):
                x = (a.right() + b.left()) / 2
                p.drawLine(QPointF(x, yc - BORE_HALF - 6), QPointF(x, yc + BORE_HALF + 6))

        # drop indicator while dragging
        if self._dragging and self._drop_gap >= 0 and rects:
            if self._drop_gap < len(rects):
                x = rects[self._drop_gap].left() - GAP / 2
            else:
                x = rects[-1].right() + GAP / 2
            p.setPen(_pen(style.SELECTION, 3.0))
            p.drawLine(QPointF(x, 6), QPointF(x, self.height() - 6))

    @staticmethod
    def _draw_caption(p: QPainter, cap: Caption) -> None:
        p.setFont(cap.font)
        if cap.kind == "fittings":
            p.setPen(_pen(style.FITTING, 1.2))
            p.setBrush(_colour("#FFFFFF"))
            diamond(p, cap.rect.left() - 7, cap.rect.center().y())
        if cap.kind == "heat_sinks":
            p.setPen(_pen(style.FITTING, 1.2))
            p.setBrush(_colour("#FFFFFF"))
            heat_sink_mark(p, cap.rect.left() - 7, cap.rect.center().y())
        if cap.kind == "elevation":
            p.setPen(_pen(style.INK, 1.4))
            p.setBrush(_colour(style.INK))
            elevation_arrow(p, cap.rect.left() - 7, cap.rect.center().y(), cap.up)
        p.setPen(_colour(style.INK if cap.kind in ("name", "fittings", "heat_sinks") else style.INK_MUTED))
        # the rect is as wide as the text measured; a pixel or two of slack so nothing is cut
        p.drawText(cap.rect.adjusted(0, 0, 2, 0), Qt.AlignLeft | Qt.AlignVCenter, cap.text)

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
            self.strip.segment_actions.delete_selected()
            return
        super().keyPressEvent(event)



# --------------------------------------------------------------------------- the panel


class LineStrip(QWidget):
    """The Line Strip panel: toolbar, the strip of segments, a symbol legend.

    ``LineStrip(doc, actions)`` observes the Document. Its edits are the shared
    :class:`~app.segment_actions.SegmentActions` (the window's Edit menu shows the same
    actions); given none, the strip makes its own. The names ``insert_action``,
    ``duplicate_action``, ``delete_action``, ``move_left_action`` and ``move_right_action``
    refer to those shared actions.
    """

    status_message = Signal(str)  # short user-facing messages (also shown in the hint label)

    def __init__(self, doc, actions: Optional[SegmentActions] = None, parent=None):
        super().__init__(parent)
        self.doc = doc
        self.setObjectName("LineStrip")
        self.setWindowTitle("Line Strip")
        self.segment_actions = actions if actions is not None else SegmentActions(doc, self)
        self.segment_actions.attach_to(self)  # Insert, Ctrl+D, Delete... while the focus is in the strip
        self.segment_actions.message.connect(self.say)

        a = self.segment_actions
        self.toolbar = QToolBar("Line Strip", self)
        self.toolbar.setIconSize(QSize(14, 14))
        self.toolbar.setToolButtonStyle(Qt.ToolButtonTextOnly)
        title = QLabel("<b>Line Strip</b>")
        title.setContentsMargins(4, 0, 12, 0)
        self.toolbar.addWidget(title)
        self.toolbar.addActions([a.insert_before, a.insert_after, a.duplicate, a.delete])
        self.toolbar.addSeparator()
        self.toolbar.addActions([a.move_up, a.move_down])
        self.hint = ElidedLabel("")
        self.hint.setStyleSheet(f"color: {style.INK_MUTED}; padding-left: 12px;")
        self.toolbar.addWidget(self.hint)
        self.summary = QLabel("")
        self.summary.setStyleSheet(f"color: {style.INK_MUTED}; padding-right: 6px;")
        self.summary.setSizePolicy(QSizePolicy.Minimum, QSizePolicy.Preferred)
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
        # block pictures of another project or in other units will not be shown again
        doc.project_replaced.connect(self.canvas.forget_drawings)
        doc.units_changed.connect(lambda _s: self.canvas.forget_drawings())
        self.refresh()

    # ---- the shared actions under the names the strip has always used

    @property
    def insert_action(self):
        return self.segment_actions.insert_after

    @property
    def duplicate_action(self):
        return self.segment_actions.duplicate

    @property
    def delete_action(self):
        return self.segment_actions.delete

    @property
    def move_left_action(self):
        return self.segment_actions.move_up

    @property
    def move_right_action(self):
        return self.segment_actions.move_down

    def delete_selected(self) -> bool:
        return self.segment_actions.delete_selected()

    # ---- helpers

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
        total = sum(s.length_m for s in segs)
        system = self.doc.unit_system
        self.summary.setText(
            f"{n} segment{'s' if n != 1 else ''} · {format_value(total, 'length', system, digits=4)} total"
        )
        self.canvas.setMinimumWidth(self.canvas.minimum_width_for(n))
        self.canvas.update()

    def context_menu(self) -> QMenu:
        return self.segment_actions.fill_menu(QMenu(self))

    def segment_rect(self, index: int) -> QRect:
        """Where segment ``index`` is drawn, in canvas coordinates (for tests and tooltips)."""
        return self.canvas.block_rects()[index].toRect()

    def captions(self, index: int) -> list[Caption]:
        """The captions of segment ``index`` as the canvas draws them now."""
        return self.canvas.captions(index)

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
        if seg.heater is not None:
            rows.append("Electric tracing: " + heater_words(seg.heater, system))
        for f in seg.fittings:
            name = f.label or f.kind.replace("_", " ")
            rows.append(f"Fitting: {f.count} × {name}")
        for h in seg.heat_sinks:
            name = SINK_KINDS.get(h.kind, h.kind).lower() + (f" ({h.label})" if h.label else "")
            rows.append(f"Heat sink: {h.count} × {name}")
        res = getattr(self.doc, "result", None)
        if res is not None:
            for c in res.checks:
                if c.segment == index:
                    rows.append(f"{style.severity_style(c.severity).word}: {units.check_message(c, self.doc.unit_system)}")
        return "<br>".join(rows[:1] + [html.escape(r) for r in rows[1:]])

    def move_segment(self, src: int, dst: int) -> bool:
        """Drag and drop: move segment ``src`` to index ``dst`` through the shared move edit."""
        return self.segment_actions.move(src, dst)
