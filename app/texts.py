"""Plain words about a design: fluid, pipe, wall, surroundings, fittings, key figures, methods.

No Qt here (a headless module like :mod:`app.units`): the report writes these words into its
HTML, and any other view or the CLI may print them too. Values are converted for display with
:mod:`app.units` in the reader's unit system, the unit stated beside every value. The results are
plain, unescaped text; :func:`esc` escapes them for HTML.
"""

from __future__ import annotations

import dataclasses
import html
import math
from typing import Iterable, Mapping

from app import units
from solver.errors import CalorunError
from solver.model import (
    Adiabatic,
    Buried,
    FixedWall,
    Jacket,
    PureFluid,
    Segment,
    SolutionFluid,
    StillAir,
    TableFluid,
    Wind,
)
from solver.results import KeyFigure, Result

__all__ = [
    "esc", "fmt", "num", "ulabel", "fluid_text", "fluid_source_text", "surroundings_text", "pipe_text",
    "insulation_text", "fittings_text", "heater_text", "heat_sinks_text", "steam_tracer_text", "fouling_text", "CONTACT_WORDS", "method_entries", "key_figure_label_and_value",
    "shorten", "capped", "unexpected_failure", "SHORT_NAME_CHARS", "HEADING_NAME_CHARS", "FULL_TEXT_CAP_CHARS",
]

#: A name in a table cell, a chart label or a list is shown up to this many characters, then "…".
SHORT_NAME_CHARS = 60
#: A name in a heading or the running header: up to this many characters, then "…".
HEADING_NAME_CHARS = 120
#: The one place a text is printed in full stops here, with a note of its true length: a
#: 10-million-character name would otherwise stall the layout of the whole document.
FULL_TEXT_CAP_CHARS = 2000


def esc(text) -> str:
    """Escape any text for HTML (quotes too), so typed ``<b>`` or ``&`` print as typed."""
    return html.escape("" if text is None else str(text), quote=True)


def shorten(text, limit: int = SHORT_NAME_CHARS) -> str:
    """``text`` as is when it has at most ``limit`` characters, else its first ``limit − 1`` and "…"
    (line breaks and tabs read as spaces, so a shortened name stays on one line)."""
    text = "" if text is None else str(text)
    if len(text) <= limit:
        return text
    return " ".join(text[: max(limit - 1, 1)].split()) + "…"


def capped(text, cap: int = FULL_TEXT_CAP_CHARS, what: str = "name") -> str:
    """The full ``text`` where a reader looks it up, but never more than ``cap`` characters: beyond,
    cut with a note of its true length ("… (name shortened: 10,000,000 characters)")."""
    text = "" if text is None else str(text)
    if len(text) <= cap:
        return text
    return f"{text[:cap]}… ({what} shortened: {len(text):,} characters)"


def unexpected_failure(exc: BaseException) -> str:
    """A solve that failed in a way the solver does not word (a numerical fault), in plain words."""
    return (f"the calculation failed on a numerical problem it could not place on the line ({type(exc).__name__}: "
            f"{exc}); this is a fault in Calorun, not a finding about the design: please report it with the project file")


def fmt(value, quantity: str, system: str, digits: int = 4) -> str:
    """A value in display units with its unit, e.g. ``'80.0 °C'``."""
    return units.format_value(value, quantity, system, digits=digits)


def num(value, quantity: str, system: str, digits: int = 4) -> str:
    """A value in display units without its unit (for table columns that state it in the header)."""
    return units.format_value(value, quantity, system, digits=digits, with_unit=False)


def ulabel(quantity: str, system: str) -> str:
    """The display unit of ``quantity``, or a dash for dimensionless quantities."""
    return units.label(quantity, system) or "-"


def fluid_text(fluid) -> str:
    """The one description of a fluid, as the solver's fluid model names it in its results.

    E.g. ``'Ethylene glycol 30 % (mass)'``, ``'Water'``, ``'Residue R-7 (user table)'``. A fluid the
    property library refuses (the solve fails too, and says why) is described from its entry.
    """
    from solver.properties import fluid_model

    try:
        return fluid_model(fluid).label
    except CalorunError:
        if isinstance(fluid, PureFluid):
            return fluid.name
        if isinstance(fluid, SolutionFluid):
            return f"{fluid.solute} solution {fluid.concentration * 100:g} %"
        if isinstance(fluid, TableFluid):
            return f"{fluid.name} (user table)"
        return str(fluid)


def fluid_source_text(fluid) -> str:
    """Where the fluid's properties come from."""
    if isinstance(fluid, PureFluid):
        return "CoolProp, pure fluid"
    if isinstance(fluid, SolutionFluid):
        return "CoolProp incompressible library, aqueous solution"
    if isinstance(fluid, TableFluid):
        return f"the user's table, {len(fluid.rows)} rows (not extrapolated)"
    return "—"


def surroundings_text(s, system: str) -> str:
    """What a segment's outside exchanges heat with."""
    t = lambda v: fmt(v, "temperature", system)  # noqa: E731
    if isinstance(s, (StillAir, Wind)):
        out = (f"Still air at {t(s.temperature_K)}" if isinstance(s, StillAir)
               else f"Wind {fmt(s.wind_speed_m_per_s, 'velocity', system)} at {t(s.temperature_K)}")
        out += f", emissivity {s.emissivity:g}"
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
            out = f"Steam at {fmt(s.steam_pressure_Pa, 'pressure', system)} condensing on the pipe (condensate film)"
            if s.steam_side_fouling_m2K_per_W > 0:
                out += f", steam-side fouling {units.format_exact(s.steam_side_fouling_m2K_per_W, 'fouling_resistance', system, 3)}"
            return out
        return f"Wall held at {t(s.wall_temperature_K)} (idealised)"
    if isinstance(s, Adiabatic):
        return "Adiabatic (no exchange)"
    return str(getattr(s, "kind", s))


#: how a steam tracer tube touches the pipe, in words (SteamTracer.contact -> words)
CONTACT_WORDS = {"bare": "bare, wired to the pipe", "cement": "bedded in heat-transfer cement"}


def steam_tracer_text(tracer, system: str) -> str:
    """A segment's steam tracer in words, or ``'none'``.

    E.g. ``'2 steam tracer tubes of 12.7 mm OD, bedded in heat-transfer cement, steam at 4.5 bar(a)'``.
    """
    if tracer is None:
        return "none"
    tubes = "1 steam tracer tube" if tracer.count == 1 else f"{tracer.count} steam tracer tubes"
    size = units.format_exact(tracer.tube_outer_diameter_m, "diameter", system, digits=3)
    return (f"{tubes} of {size} OD, {CONTACT_WORDS.get(tracer.contact, tracer.contact)}, "
            f"steam at {fmt(tracer.steam_pressure_Pa, 'pressure', system, 3)}")


def fouling_text(seg: Segment, system: str) -> str:
    """The segment's fouling allowances, or ``'none'`` (inside; steam side when steam heats the wall)."""
    parts = []
    if seg.inside_fouling_m2K_per_W > 0:
        parts.append(f"inside {units.format_exact(seg.inside_fouling_m2K_per_W, 'fouling_resistance', system, 3)}")
    steam_side = getattr(seg.surroundings, "steam_side_fouling_m2K_per_W", 0.0)
    if steam_side > 0 and getattr(seg.surroundings, "steam_pressure_Pa", None) is not None:
        parts.append(f"steam side {units.format_exact(steam_side, 'fouling_resistance', system, 3)}")
    return "; ".join(parts) if parts else "none"


def pipe_text(seg: Segment, system: str) -> str:
    """The pipe as the trade names it (NPS and schedule) or by its bore and wall, and its material."""
    p = seg.pipe
    if p.bore == "nps":
        out = f"NPS {p.nps} sch. {p.schedule}"
    else:
        out = f"ID {fmt(p.inner_diameter_m, 'diameter', system)}, wall {fmt(p.wall_thickness_m, 'thickness', system)}"
    return f"{out}, {p.material}"


def insulation_text(seg: Segment, system: str) -> str:
    """Insulation layers from the pipe outwards, or ``'none'``."""
    if not seg.insulation:
        return "none"
    def k_text(layer) -> str:
        if layer.conductivity_W_per_mK is None:
            return "k(T) from its material specification"
        return f"k {fmt(layer.conductivity_W_per_mK, 'conductivity', system, digits=3)}"

    return "; ".join(
        f"{fmt(layer.thickness_m, 'thickness', system)} {layer.material} ({k_text(layer)})"
        for layer in seg.insulation
    )


def heater_text(seg: Segment, system: str) -> str:
    """The segment's electric heater as the trade specifies it, or ``'none'``: "constant 25 W/m",
    "self-limiting 40 W/m at 10 °C → 25 W/m at 65 °C", "thermostat 20 W/m, set point 5 °C"; per metre of
    heater, with the runs and the spiral ratio when not one straight run."""
    h = seg.heater
    if h is None:
        return "none"
    q = lambda v: fmt(v, "power_per_length", system, digits=3)  # noqa: E731
    t = lambda v: fmt(v, "temperature", system)  # noqa: E731
    if h.kind == "self_limiting":
        text = f"self-limiting {q(h.output_low_W_per_m)} at {t(h.temperature_low_K)} → {q(h.output_high_W_per_m)} at {t(h.temperature_high_K)}"
    elif h.kind == "thermostat":
        text = f"thermostat {q(h.output_W_per_m)}, set point {t(h.set_point_K)}"
    else:
        text = f"constant {q(h.output_W_per_m)}"
    runs = []
    if h.count != 1:
        runs.append(f"{h.count} runs")
    if h.heater_per_pipe_length != 1.0:
        runs.append(f"{h.heater_per_pipe_length:g} m of heater per m of pipe")
    return text + (f" ({', '.join(runs)})" if runs else "")


def heat_sinks_text(seg: Segment) -> str:
    """The segment's heat sinks with their counts ("4 × pipe support; 1 × valve"), or ``'none'``."""
    if not seg.heat_sinks:
        return "none"
    return "; ".join(f"{h.count} × {h.label or h.kind.replace('_', ' ')}" for h in seg.heat_sinks)


def fittings_text(seg: Segment) -> str:
    """Fittings with their counts, or ``'none'``."""
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
    from solver.correlations import METHODS

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


def key_figure_parts(spec: KeyFigure, figures: Mapping[str, float], system: str,
                     indent: str = "   ") -> tuple[str, str, str]:
    """One Key Figure as ``(label, value text, note)`` in the reader's units: the one way every view
    writes a figure.

    The label is the list's label (indented with ``indent`` under the figure it is a share of); a
    negative value of a figure with a ``negative_label`` is shown under that label with its sign
    turned ("Heat gained from surroundings 4.6 kW", not "Heat loss −4.6 kW"). The note says where
    the value occurs (``position_key``: "at 12.3 m"; "none in air" when there is no such surface)
    or the inlet value it is read against (``inlet_key``: "inlet 75.0 °C").
    """
    value = figures.get(spec.key)
    finite = value is not None and math.isfinite(value)
    label = spec.indented_label(indent)
    if spec.negative_label and finite and value < 0:
        label = dataclasses.replace(spec, label=spec.negative_label).indented_label(indent)
        value = -value
    note = ""
    if spec.position_key:
        position = figures.get(spec.position_key)
        if not finite:
            note = "none in air"
        elif position is not None and math.isfinite(position):
            note = "at " + fmt(position, "length", system)
    elif spec.inlet_key:
        note = "inlet " + fmt(figures.get(spec.inlet_key), spec.quantity, system)
    return label, fmt(value, spec.quantity, system), note


def key_figure_label_and_value(spec: KeyFigure, figures: Mapping[str, float], system: str,
                               indent: str = "   ") -> tuple[str, str]:
    """One Key Figure as ``(label, value text)``, the position where it occurs after the value
    ("79.6 °C at 185.0 m"); "—" for a figure that does not apply (e.g. no surface in air)."""
    label, value, note = key_figure_parts(spec, figures, system, indent)
    if spec.position_key:
        return label, (f"{value} {note}" if note.startswith("at ") else "—")
    return label, value


def plus_minus_text(pm, spec: KeyFigure, system: str) -> str:
    """``'± 0.8 K'``: a key figure's ± in the reader's units, as a difference quantity; "" when there is
    none or it reads as nothing at the display's precision ("0.0 K", "< 0.001 m/s")."""
    if pm is None or not pm > 0:
        return ""
    shown = units.format_value(pm, spec.difference_quantity, system, digits=2)
    if shown.startswith("<") or not any(ch in "123456789" for ch in shown.split(" ")[0]):
        return ""
    return "± " + shown


def unique_name(existing: Iterable[str], wanted: str) -> str:
    """``wanted``, or ``wanted (2)``, ``wanted (3)``... whichever is not taken.

    The one rule for every name the program makes up (new and copied segments and
    alternatives), so names look alike wherever they come from.
    """
    taken = set(existing)
    if wanted not in taken:
        return wanted
    n = 2
    while f"{wanted} ({n})" in taken:
        n += 1
    return f"{wanted} ({n})"
