"""A segment's heat path in words and numbers, for the Segment Card's bar, the report and the tooltips.

No Qt and no physics here (a headless module like :mod:`app.texts`): the numbers are the solver's
:class:`solver.resistances.SegmentResistances`; this module writes them in the reader's units
(:mod:`app.units`) and says in one line what dominates. The colours of the parts are in
:mod:`app.heat_path_style`.
"""

from __future__ import annotations

import math

from app import units
from solver.resistances import AIR_FILM, ResistancePart, SegmentResistances

RESISTANCE = "resistance_per_length"

#: Short names for the bar's labels, where the full label would not fit.
SHORT_LABELS: dict[str, str] = {
    "inside_film": "inside film",
    "inside_fouling": "fouling",
    "pipe_wall": "wall",
    AIR_FILM: "air film",
    "outer_film_entered": "outer film",
    "soil": "soil",
    "jacket_film": "jacket film",
    "condensate_film": "condensate",
    "steam_fouling": "steam fouling",
    "wall_held": "held wall",
    "adiabatic": "adiabatic",
}


def short_label(part: ResistancePart) -> str:
    if part.key.startswith("insulation_"):
        return part.label.partition(": ")[2] or "insulation"
    return SHORT_LABELS.get(part.key, part.label.lower())


def resistance_text(value: float, system: str, with_unit: bool = True) -> str:
    """A resistance per metre in the reader's units; "∞" for an adiabatic outside."""
    if math.isinf(value):
        return "∞ (no exchange)"
    return units.format_value(value, RESISTANCE, system, digits=3, with_unit=with_unit)


def percent_text(share: float) -> str:
    """A share in percent, to whole percent unless it is small ("0.4 %", "< 0.1 %")."""
    if not math.isfinite(share):
        return "—"
    if share == 0:
        return "0 %"
    if share < 0.1:
        return "< 0.1 %"
    return f"{share:.1f} %" if share < 10 else f"{share:.0f} %"


def part_tooltip(part: ResistancePart, res: SegmentResistances, system: str) -> str:
    """Label, resistance and share of one series part (and its branches, for the air film)."""
    text = f"{part.label}: {resistance_text(part.resistance_K_m_per_W, system)}, {percent_text(part.share_percent)} of the path"
    for b in res.parts:
        if b.branch_of == part.key:
            text += (f"\n   ∥ {b.label}: {resistance_text(b.resistance_K_m_per_W, system)}, "
                     f"carries {percent_text(b.carries_percent)} of the film's heat")
    return text


def heat_text(res: SegmentResistances, system: str) -> str:
    """The segment's heat per metre in one line, e.g. ``'Heat loss 27.3 W/m · to fluid 4.1 W/m'``."""
    q = lambda v: units.format_value(v, "power_per_length", system, digits=3)  # noqa: E731
    if res.kind in ("jacket", "fixed_wall"):
        source = ("jacket" if res.kind == "jacket"
                  else "steam" if any(p.key == "condensate_film" for p in res.parts) else "held wall")
        head = f"From the {source} {q(res.heat_input_W_per_m)}"
    elif res.heat_loss_W_per_m < 0:
        head = f"Heat gained {q(-res.heat_loss_W_per_m)}"
    else:
        head = f"Heat loss {q(res.heat_loss_W_per_m)}"
    text = f"{head} · to fluid {q(res.heat_to_fluid_W_per_m)}"
    if res.tracer is not None:
        text += f" · from steam tracer {q(res.tracer.heat_W_per_m)}"
    return text


def dominant_text(res: SegmentResistances, system: str) -> str:
    """What holds the heat back most, e.g. ``'the insulation (mineral wool) takes 91 % of the path'``."""
    series = [p for p in res.series_parts() if p.share_percent > 0.0]
    if not series:
        return ""
    top = max(series, key=lambda p: p.share_percent)
    if math.isinf(top.resistance_K_m_per_W):
        return ("no heat passes to the surroundings (adiabatic)" if top.key == "adiabatic"
                else f"the {top.label.lower()} passes no heat")
    name = f"the insulation ({short_label(top)})" if top.key.startswith("insulation_") else f"the {top.label.lower()}"
    return f"{name} takes {percent_text(top.share_percent)} of the path"


def total_text(res: SegmentResistances, system: str) -> str:
    """``'Total 3.88 K·m/W from the fluid to the surroundings'`` (to the jacket medium, the steam, the held wall)."""
    to = {"jacket": "the jacket medium", "fixed_wall": "the steam" if any(p.key == "condensate_film" for p in res.parts)
          else "the held wall"}.get(res.kind, "the surroundings")
    if math.isinf(res.total_K_m_per_W):
        # adiabatic, or steam on a pipe already hotter than the steam: it does not condense
        return "No heat passes to the surroundings (adiabatic)" if res.kind == "adiabatic" else \
            f"No heat passes between the fluid and {to}"
    return f"Total {resistance_text(res.total_K_m_per_W, system)} from the fluid to {to}"


def tracer_text(res: SegmentResistances, system: str) -> str:
    """The steam tracer as a parallel path from the steam, or ''."""
    tr = res.tracer
    if tr is None:
        return ""
    return (f"Steam tracer (in parallel, from steam at {units.format_value(tr.steam_temperature_K, 'temperature', system)}): "
            f"{units.format_value(tr.conductance_W_per_mK, 'conductivity', system, digits=3)} "
            f"= {resistance_text(tr.resistance_K_m_per_W, system)}, gives {units.format_value(tr.heat_W_per_m, 'power_per_length', system, digits=3)}")


def table_rows(res: SegmentResistances, system: str, with_unit: bool = True) -> list[tuple[str, str, str, str]]:
    """Rows of (key, label, resistance text, share text) from the fluid outwards; air-film branches
    follow the film with their share of its heat ("carries 62 %"), the tracer last."""
    rows = []
    for p in res.parts:
        r = resistance_text(p.resistance_K_m_per_W, system, with_unit)
        if p.branch_of:
            rows.append((p.key, f"∥ {p.label}", r, f"carries {percent_text(p.carries_percent)}"))
        else:
            rows.append((p.key, p.label, r, percent_text(p.share_percent)))
    if res.tracer is not None:
        rows.append(("tracer", "Steam tracer (parallel path from the steam)",
                     resistance_text(res.tracer.resistance_K_m_per_W, system, with_unit), "—"))
    return rows
