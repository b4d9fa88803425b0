"""Calorun's look: one colour-blind-safe palette, pens and severity marks for every view.

Colours come from the Okabe–Ito palette (Okabe & Ito, "Color Universal Design", 2008), which
stays distinguishable under the common forms of colour-vision deficiency. Colour is never the
only cue: curves also differ in line style, and each severity has its own shape and letter.

Qt objects are created lazily (a QApplication must exist before pixmaps/icons are made);
plain colour constants are hex strings so non-Qt code (reports) can use them too.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

from solver.results import SEVERITY_ORDER

# --------------------------------------------------------------------------- palette (hex)

OKABE_ITO: dict[str, str] = {
    "black": "#000000",
    "orange": "#E69F00",
    "sky_blue": "#56B4E9",
    "bluish_green": "#009E73",
    "yellow": "#F0E442",
    "blue": "#0072B2",
    "vermillion": "#D55E00",
    "reddish_purple": "#CC79A7",
}

# Neutral tones for chrome (ours): calm greys with a slight blue cast.
INK = "#1F2A33"  # main text
INK_MUTED = "#5B6770"  # secondary text
GRID = "#D9DEE2"
PANEL_BG = "#FFFFFF"
CANVAS_BG = "#F6F8F9"
SELECTION = OKABE_ITO["blue"]
SELECTION_FILL = "#E3EFF7"
HOVER_FILL = "#EEF2F4"

# What each thing on a plot or in the Line Strip is drawn in.
CURVE_COLOURS: dict[str, str] = {
    "bulk": OKABE_ITO["blue"],
    "inner_wall": OKABE_ITO["vermillion"],
    "outer_surface": OKABE_ITO["orange"],
    "saturation": OKABE_ITO["reddish_purple"],
    "pressure": OKABE_ITO["bluish_green"],
    "limit": "#3A3A3A",
    "boundary": "#9AA5AD",
    "cursor": "#7A8790",
    "marker": OKABE_ITO["reddish_purple"],
}

#: One colour per alternative in overlaid plots (Okabe–Ito, yellow left out: too pale on white).
ALTERNATIVE_COLOURS: tuple[str, ...] = (
    OKABE_ITO["blue"], OKABE_ITO["vermillion"], OKABE_ITO["bluish_green"], OKABE_ITO["reddish_purple"],
    OKABE_ITO["orange"], OKABE_ITO["sky_blue"], OKABE_ITO["black"],
)
#: Line styles cycled with the colours, so colour is never the only cue.
ALTERNATIVE_STYLES: tuple[str, ...] = ("solid", "dash", "dashdot", "dot")

# Verdicts and severities as text colours on white (the amber is darkened from Okabe–Ito orange so
# it reads as text).
MET_COLOUR = OKABE_ITO["bluish_green"]
MISSED_COLOUR = OKABE_ITO["vermillion"]
WARNING_TEXT = "#A86A00"
#: DesignVerdict.level -> colour of the verdict text.
VERDICT_COLOURS: dict[str, str] = {
    "danger": MISSED_COLOUR, "missed": MISSED_COLOUR, "warning": WARNING_TEXT, "met": MET_COLOUR,
}
#: DesignVerdict.level -> symbol shown with the verdict, so colour is never the only cue.
VERDICT_SYMBOLS: dict[str, str] = {"danger": "✗", "missed": "✗", "warning": "!", "met": "✓"}
SEVERITY_WORDS: dict[str, tuple[str, str]] = {
    "danger": ("DANGER", OKABE_ITO["vermillion"]), "warning": ("WARNING", WARNING_TEXT),
    "info": ("INFO", OKABE_ITO["blue"]),
}

# Printed report chrome (ours): headings and header rules, table rules, header shading.
ACCENT = "#2E4A62"
RULE = "#C9D1D7"
SHADE = "#EEF2F5"

# Line Strip symbols
PIPE_WALL = "#4A5660"  # steel
FLUID_FILL = "#D6ECF8"  # light sky blue: the fluid inside
HEAT_INPUT = OKABE_ITO["vermillion"]  # zig-zag tracing line
JACKET = OKABE_ITO["orange"]  # shell band (jacket medium, fixed wall)
INSULATION_FILL = "#F3E9C6"  # sand
INSULATION_HATCH = "#A88B3C"
GROUND = "#7B5E3B"  # soil hatch (brown, paired with a hatch pattern)
GROUND_FILL = "#EFE6DA"
WIND = OKABE_ITO["sky_blue"]
FITTING = INK
FLOW_ARROW = OKABE_ITO["blue"]


# --------------------------------------------------------------------------- severity


@dataclass(frozen=True)
class SeverityStyle:
    """How a severity is shown: colour + shape + letter + word, so colour is never the only cue."""

    key: str
    word: str  # shown in text next to the icon
    letter: str  # drawn inside the shape
    shape: str  # "circle" | "triangle" | "octagon"
    colour: str
    rank: int  # higher = more severe


SEVERITIES: dict[str, SeverityStyle] = {
    "info": SeverityStyle("info", "Info", "i", "circle", OKABE_ITO["blue"], SEVERITY_ORDER["info"]),
    "warning": SeverityStyle("warning", "Warning", "!", "triangle", OKABE_ITO["orange"], SEVERITY_ORDER["warning"]),
    "danger": SeverityStyle("danger", "Danger", "×", "octagon", OKABE_ITO["vermillion"], SEVERITY_ORDER["danger"]),
}
OK_STYLE = SeverityStyle("ok", "OK", "✓", "circle", OKABE_ITO["bluish_green"], -1)


def severity_style(severity: str) -> SeverityStyle:
    try:
        return SEVERITIES[severity]
    except KeyError:
        raise KeyError(f"unknown severity {severity!r}; expected one of {sorted(SEVERITIES)}") from None


# --------------------------------------------------------------------------- Qt helpers (lazy)


def qcolor(hex_colour: str, alpha: int = 255):
    """A new QColor for ``hex_colour`` (callers may change it); the parsing is done once per colour."""
    c = _parsed_colour(hex_colour, alpha)
    return type(c)(c)


@lru_cache(maxsize=256)
def _parsed_colour(hex_colour: str, alpha: int):
    from PySide6.QtGui import QColor

    c = QColor(hex_colour)
    c.setAlpha(alpha)
    return c


def curve_pen(key: str, width: float = 2.0, style: str = "solid"):
    """A cosmetic pen for a plot curve; ``style`` is solid | dash | dot | dashdot."""
    return colour_pen(CURVE_COLOURS[key], width, style)


def colour_pen(colour: str, width: float = 2.0, style: str = "solid"):
    """A cosmetic pen of ``colour`` (hex) for a plot; ``style`` is solid | dash | dot | dashdot."""
    from PySide6.QtCore import Qt
    from PySide6.QtGui import QPen

    pen = QPen(qcolor(colour))
    pen.setWidthF(width)
    pen.setCosmetic(True)
    pen.setStyle(
        {
            "solid": Qt.SolidLine,
            "dash": Qt.DashLine,
            "dot": Qt.DotLine,
            "dashdot": Qt.DashDotLine,
        }[style]
    )
    return pen


def paint_severity_mark(painter, rect, style: SeverityStyle) -> None:
    """Draw a severity mark (shape filled with its colour, white letter) into ``rect``."""
    import math

    from PySide6.QtCore import QPointF, Qt
    from PySide6.QtGui import QFont, QPen, QPolygonF

    painter.save()
    painter.setRenderHint(painter.RenderHint.Antialiasing, True)
    r = rect.adjusted(1, 1, -1, -1)
    painter.setPen(QPen(qcolor(style.colour).darker(130), 1))
    painter.setBrush(qcolor(style.colour))
    cx, cy = r.center().x(), r.center().y()
    if style.shape == "circle":
        painter.drawEllipse(r)
        text_rect = r
    elif style.shape == "triangle":
        poly = QPolygonF([QPointF(cx, r.top()), QPointF(r.right(), r.bottom()), QPointF(r.left(), r.bottom())])
        painter.drawPolygon(poly)
        text_rect = r.adjusted(0, r.height() * 0.22, 0, 0)
    else:  # octagon
        rad = min(r.width(), r.height()) / 2
        pts = [
            QPointF(cx + rad * math.cos(math.pi / 8 + k * math.pi / 4), cy + rad * math.sin(math.pi / 8 + k * math.pi / 4))
            for k in range(8)
        ]
        painter.drawPolygon(QPolygonF(pts))
        text_rect = r
    font = QFont(painter.font())
    font.setBold(True)
    font.setPixelSize(max(7, int(r.height() * 0.62)))
    painter.setFont(font)
    painter.setPen(qcolor("#FFFFFF") if style.key != "warning" else qcolor(INK))
    painter.drawText(text_rect, Qt.AlignCenter, style.letter)
    painter.restore()


@lru_cache(maxsize=None)
def severity_icon(severity: str, size: int = 16):
    """A QIcon for a severity ('info' | 'warning' | 'danger' | 'ok')."""
    from PySide6.QtCore import QRectF, Qt
    from PySide6.QtGui import QIcon, QPainter, QPixmap

    style = OK_STYLE if severity == "ok" else severity_style(severity)
    icon = QIcon()
    for scale in (1, 2):
        pm = QPixmap(size * scale, size * scale)
        pm.fill(Qt.transparent)
        p = QPainter(pm)
        paint_severity_mark(p, QRectF(0, 0, size * scale, size * scale), style)
        p.end()
        pm.setDevicePixelRatio(scale)
        icon.addPixmap(pm)
    return icon


def severity_rank(severity: str) -> int:
    """Higher is worse: the solver's one severity order (solver.results.SEVERITY_ORDER)."""
    return SEVERITY_ORDER.get(severity, -1)
