"""The colours of a heat path's parts, for the Segment Card's bar and the report's table.

Plain hex colours from the palette of :mod:`app.style` (Okabe–Ito and the Line Strip's tones), so the
bar and the printed table colour a part alike; the words are :mod:`app.heat_path`'s.
"""

from __future__ import annotations

from dataclasses import dataclass

from app import style
from app.heat_path import part_tooltip, short_label
from solver.resistances import AIR_FILM, SegmentResistances

#: Part key (or its prefix before ``_<n>``) -> fill colour. Fluid side blue, steel grey, insulation
#: sand and ochre (alternating layers), air film green, soil brown, jacket orange, steam blue/purple.
PART_COLOURS: dict[str, str] = {
    "inside_film": style.OKABE_ITO["sky_blue"],
    "inside_fouling": style.OKABE_ITO["reddish_purple"],
    "pipe_wall": style.PIPE_WALL,
    "insulation_odd": style.OKABE_ITO["yellow"],
    "insulation_even": style.INSULATION_HATCH,
    AIR_FILM: style.OKABE_ITO["bluish_green"],
    "outer_film_entered": style.OKABE_ITO["bluish_green"],
    "convection": style.OKABE_ITO["bluish_green"],
    "radiation": style.OKABE_ITO["vermillion"],
    "soil": style.GROUND,
    "jacket_film": style.JACKET,
    "condensate_film": style.OKABE_ITO["blue"],
    "steam_fouling": style.OKABE_ITO["reddish_purple"],
    "wall_held": style.CURVE_COLOURS["boundary"],
    "adiabatic": style.CURVE_COLOURS["boundary"],
}


def part_colour(key: str) -> str:
    """The fill colour of a part (insulation layers alternate two tones, innermost first)."""
    if key.startswith("insulation_"):
        k = int(key.rpartition("_")[2] or 1)
        return PART_COLOURS["insulation_odd" if k % 2 else "insulation_even"]
    return PART_COLOURS.get(key, style.INK_MUTED)


def text_colour_on(fill: str) -> str:
    """White or ink, whichever reads better on ``fill`` (relative luminance, WCAG 2 formula)."""
    r, g, b = (int(fill[i:i + 2], 16) / 255.0 for i in (1, 3, 5))
    lin = [c / 12.92 if c <= 0.03928 else ((c + 0.055) / 1.055) ** 2.4 for c in (r, g, b)]
    lum = 0.2126 * lin[0] + 0.7152 * lin[1] + 0.0722 * lin[2]
    return "#FFFFFF" if lum < 0.30 else style.INK


@dataclass(frozen=True)
class BarPart:
    """One block of the stacked bar: a series part with a share of the total above zero."""

    key: str
    label: str
    short: str
    colour: str
    share_percent: float
    tooltip: str


def bar_parts(res: SegmentResistances, system: str) -> list[BarPart]:
    """The blocks of the stacked bar, from the fluid outwards (parts with no share are left out)."""
    out = []
    for p in res.series_parts():
        if not (p.share_percent > 0.0):
            continue
        out.append(BarPart(p.key, p.label, short_label(p), part_colour(p.key), p.share_percent,
                           part_tooltip(p, res, system)))
    return out
