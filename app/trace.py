"""How a figure or a finding was computed: the method and its source, and the segment inputs behind it.

No Qt here (a headless module): Key Figures and Checks show these texts as tooltips, and the CLI or
the report may print them. Nothing is computed that the Result does not hold: the method texts are
the one list of Key Figures (:data:`solver.results.KEY_FIGURES`), the published methods are
``Result.methods`` and :data:`solver.correlations.METHODS`, the thresholds are the solver's own
constants, and the segment's inputs are its model entries written with :mod:`app.texts`.

The texts are plain (no HTML) with one item per line, in the reader's units.
"""

from __future__ import annotations

import math
import re
from typing import Optional

import numpy as np

from app import heat_path, texts, units
from solver import checks as solver_checks, correlations
from solver.line import STEEP_RISE_RATIO
from solver.model import Alternative
from solver.results import KEY_FIGURE_BY_KEY, Check, Result, plain_number

# --------------------------------------------------------------------------- methods

#: METHODS key -> the short name a tooltip gives it (the source follows it, shortened).
METHOD_NAMES: dict[str, str] = {
    "laminar_entry": "Laminar inside heat transfer, developing flow",
    "laminar_friction": "Laminar friction factor",
    "transition_blend": "Inside heat transfer in transition",
    "friction_transition": "Friction in transition",
    "gnielinski": "Turbulent inside heat transfer",
    "colebrook": "Turbulent friction factor",
    "churchill_chu": "Natural convection, horizontal cylinder",
    "churchill_chu_vertical": "Natural convection, vertical surface",
    "churchill_bernstein": "Wind in cross-flow",
    "mixed_convection": "Wind and natural convection combined",
    "radiation": "Radiation to surroundings",
    "cylinder_wall": "Conduction through the pipe wall and insulation",
    "buried_cylinder": "Buried pipe (conduction shape factor)",
    "film_condensation": "Condensing steam film on the pipe",
    "dew_point": "Dew point of the surrounding air",
    "property_ratio_liquid": "Property-ratio correction, liquids",
    "property_ratio_gas": "Property-ratio correction, gases",
}

_YEAR_END = re.compile(r"^(.*?\(\d{4}\))")


def short_source(source: str, limit: int = 90) -> str:
    """A citation cut after its author and year ("Churchill, S. W. & Chu, H. H. S. (1975)"), or to ``limit``."""
    m = _YEAR_END.match(source)
    if m and len(m.group(1)) <= limit:
        return m.group(1)
    return source if len(source) <= limit else source[: limit - 1].rstrip() + "…"


def method_line(key: str) -> str:
    """``'Natural convection, horizontal cylinder — Churchill, S. W. & Chu, H. H. S. (1975)'``; '' if unknown."""
    source = correlations.METHODS.get(key)
    if source is None:
        return ""
    return f"{METHOD_NAMES.get(key, key.replace('_', ' '))} — {short_source(source)}"


def _topic(method_text: str) -> str:
    """What a line of ``Result.methods`` bears on: 'pressure', 'both' (fluid properties), 'tracer' (steam
    tracer contact), 'none' (dew point: checks only) or 'heat'."""
    name = method_text.partition(":")[0].lower()
    if "tracer" in name:
        return "tracer"
    if "friction" in name or "fitting" in name:
        return "pressure"
    if "propert" in name and "ratio" not in name:
        return "both"
    if "dew point" in name:
        return "none"
    return "heat"


#: key figure -> the topics of ``Result.methods`` that bear on it (others list no published method)
_FIGURE_TOPICS: dict[str, tuple[str, ...]] = {
    "outlet_temperature_K": ("heat", "tracer", "both"),
    "outlet_pressure_Pa": ("pressure", "both"),
    "pressure_drop_Pa": ("pressure", "both"),
    "pressure_drop_friction_Pa": ("pressure", "both"),
    "pressure_drop_fittings_Pa": ("pressure",),
    "pressure_drop_elevation_Pa": ("both",),
    "pressure_drop_acceleration_Pa": ("both",),
    "pump_power_W": ("pressure", "both"),
    "duty_W": ("heat", "tracer", "both"),
    "heat_input_W": ("heat", "tracer"),
    "heat_input_tracing_W": ("tracer",),  # electric tracing is an entry; steam tracers follow their contact
    "heat_input_media_W": ("heat",),
    "heat_loss_W": ("heat", "tracer"),
    "max_inner_wall_temperature_K": ("heat", "tracer", "both"),
    "min_inner_wall_temperature_K": ("heat", "tracer", "both"),
    "max_outer_surface_temperature_K": ("heat", "tracer"),
    "min_outer_surface_temperature_K": ("heat", "tracer"),
    "min_velocity_m_per_s": ("both",),
    "max_velocity_m_per_s": ("both",),
    "min_reynolds": ("both",),
    "max_reynolds": ("both",),
    "residence_time_s": ("both",),
    "mass_flow_kg_per_s": ("both",),
}


def figure_methods(key: str, result: Result) -> list[str]:
    """The lines of ``result.methods`` that bear on this key figure, each shortened to name — source."""
    topics = _FIGURE_TOPICS.get(key, ())
    out = []
    for m in result.methods:
        text = str(m)
        if _topic(text) in topics:
            name, sep, source = text.partition(": ")
            out.append(f"{name} — {short_source(source)}" if sep else short_source(text))
    return out


# --------------------------------------------------------------------------- where on the line


_REGIME_WORDS = ("laminar", "transitional", "turbulent")


def segment_of_node(result: Result, node: int) -> Optional[int]:
    for s in result.segments:
        if s.node_start <= node <= s.node_end:
            return s.index
    return None


#: figures read at one node of the profile: key -> the profile column they are an extreme of
_AT_NODE: dict[str, str] = {
    "max_inner_wall_temperature_K": "inner_wall_temperature_K",
    "min_inner_wall_temperature_K": "inner_wall_temperature_K",
    "max_outer_surface_temperature_K": "outer_surface_temperature_K",
    "min_outer_surface_temperature_K": "outer_surface_temperature_K",
    "min_velocity_m_per_s": "velocity_m_per_s",
    "max_velocity_m_per_s": "velocity_m_per_s",
    "min_reynolds": "reynolds",
    "max_reynolds": "reynolds",
}


def figure_node(key: str, result: Result) -> Optional[int]:
    """The profile node a positional figure (extreme wall, surface, velocity, Reynolds) was read at, or None.

    The figure is a value of the profile column, so the first node holding it is the one an arg-max
    or arg-min picked; a figure that does not apply (no surface in air: NaN) has none.
    """
    column = _AT_NODE.get(key)
    value = result.key_figures().get(key)
    if column is None or value is None or not math.isfinite(value):
        return None
    miss = np.abs(np.asarray(getattr(result.profile, column), dtype=float) - value)
    miss = np.where(np.isfinite(miss), miss, np.inf)
    k = int(np.argmin(miss))
    return k if math.isfinite(miss[k]) else None


def flow_regime_text(result: Result, node: int, system: str) -> str:
    """``'turbulent, Re 19 700, velocity 1.20 m/s'`` at a profile node."""
    re_n = float(result.profile.reynolds[node])
    regime = int(correlations.flow_regime(np.array([re_n]))[0])
    v = units.format_value(float(result.profile.velocity_m_per_s[node]), "velocity", system, digits=3)
    return f"{_REGIME_WORDS[regime]}, Re {plain_number(re_n)}, velocity {v}"


def local_methods(alt: Alternative, result: Result, index: int, node: Optional[int]) -> list[str]:
    """The published methods that acted in this segment: inside by the flow regime there, outside by its
    surroundings (natural convection as a vertical surface on a steep run)."""
    keys = []
    if node is not None:
        regime = int(correlations.flow_regime(np.array([float(result.profile.reynolds[node])]))[0])
        keys.append(("laminar_entry", "transition_blend", "gnielinski")[regime])
    seg = alt.segments[index]
    kind = seg.surroundings.kind
    entered = getattr(seg.surroundings, "film_coefficient_W_per_m2K", None) is not None
    if kind in ("still_air", "wind") and not entered:
        steep = abs(seg.elevation_change_m) > STEEP_RISE_RATIO * seg.length_m
        keys.append("churchill_chu_vertical" if steep and "churchill_chu_vertical" in correlations.METHODS
                    else "churchill_chu")
        if kind == "wind":
            keys += ["churchill_bernstein", "mixed_convection"]
        keys.append("radiation")
    elif kind == "buried":
        keys.append("buried_cylinder")
    elif kind == "fixed_wall" and getattr(seg.surroundings, "steam_pressure_Pa", None) is not None:
        keys.append("film_condensation")
    out = [line for line in (method_line(k) for k in keys) if line]
    # the line-wide entries that act in this segment too: the property-ratio correction of the inside
    # film, a steam tracer's contact, fouling allowances
    wanted = ["ratio"] + (["tracer"] if seg.steam_tracer is not None else [])
    if seg.inside_fouling_m2K_per_W or getattr(seg.surroundings, "steam_side_fouling_m2K_per_W", 0.0):
        wanted.append("fouling")
    for m in result.methods:
        name, sep, source = str(m).partition(": ")
        if sep and any(w in name.lower() for w in wanted):
            out.append(f"{name} — {short_source(source)}")
    if kind in ("still_air", "wind") and entered:
        out.append("Outer film coefficient as entered")
    elif kind == "jacket":
        out.append("Jacket film coefficient as entered")
    return out


def segment_inputs(alt: Alternative, result: Result, index: int, system: str, focus: str = "heat") -> list[str]:
    """The entries of segment ``index`` that drive its heat (``focus='heat'``: heat input, insulation,
    surroundings, fouling and its heat path) or its flow (``'flow'``: length, rise, fittings and its
    pressure drop), one per line after a first line naming the segment."""
    seg = alt.segments[index]
    span = result.segments[index]
    pos = units.format_range(span.x_start_m, span.x_end_m, "length", system)
    lines = [f"Segment {index + 1} “{seg.name}” ({pos})",
             f"  Pipe: {texts.pipe_text(seg, system)}"]
    if focus == "flow":
        rise = units.format_value(seg.elevation_change_m, "elevation", system)
        lines.append(f"  Length {units.format_value(seg.length_m, 'length', system)}, rise {rise}")
        lines.append(f"  Fittings: {texts.fittings_text(seg)}")
        dp = units.format_value(span.pressure_drop_Pa, "pressure_difference", system)
        lines.append(f"  Pressure drop of the segment: {dp}")
        return lines
    heat = []
    if seg.heat_input_W_per_m > 0:
        heat.append(f"tracing {units.format_value(seg.heat_input_W_per_m, 'power_per_length', system, 3)}")
    if seg.steam_tracer is not None:
        heat.append(texts.steam_tracer_text(seg.steam_tracer, system))
    lines.append(f"  Heat input: {'; '.join(heat) if heat else 'none'}")
    if seg.surroundings.kind not in ("jacket", "fixed_wall"):
        lines.append(f"  Insulation: {texts.insulation_text(seg, system)}")
    lines.append(f"  Surroundings: {texts.surroundings_text(seg.surroundings, system)}")
    fouling = texts.fouling_text(seg, system)
    if fouling != "none":
        lines.append(f"  Fouling: {fouling}")
    if index < len(result.resistances):
        res = result.resistances[index]
        dominant = heat_path.dominant_text(res, system)
        heat = heat_path.heat_text(res, system)
        lines.append(f"  Heat path: {heat[:1].lower() + heat[1:]}" + (f"; {dominant}" if dominant else ""))
    return lines


def _same_line(alt: Optional[Alternative], result: Result) -> bool:
    """Whether the result is of this alternative's segments as they stand (not a stale result)."""
    return (alt is not None and len(alt.segments) == len(result.segments)
            and all(a.name == s.name for a, s in zip(alt.segments, result.segments)))


# --------------------------------------------------------------------------- key figures


def key_figure_trace(key: str, result: Result, alt: Optional[Alternative], system: str) -> str:
    """How Key Figure ``key`` was computed: its method, the published methods behind it, and, where
    it is read at one place (an extreme wall or surface temperature, velocity, Reynolds number) or
    dominated by one segment (heat loss, pressure drop), that segment with its inputs."""
    spec = KEY_FIGURE_BY_KEY[key]
    label, value, note = texts.key_figure_parts(spec, result.key_figures(), system, indent="")
    lines = [f"{label[:1].upper() + label[1:]}: {value}" + (f" ({note})" if note else ""), f"How: {spec.method}"]
    node = figure_node(key, result)
    index = segment_of_node(result, node) if node is not None else _driving_segment(key, result)
    if index is not None and _same_line(alt, result):
        seg_lines = segment_inputs(alt, result, index, system, "heat" if "heat" in _FIGURE_TOPICS.get(key, ()) else "flow")
        lines.append(("Where: " if node is not None else _driving_words(key)) + seg_lines[0])
        lines += seg_lines[1:]
        if node is not None:
            lines.append(f"  Flow there: {flow_regime_text(result, node, system)}")
        local = local_methods(alt, result, index, node) if key in _HEAT_AT_NODE else []
        if local:
            lines.append("Methods there:")
            lines += [f"  {m}" for m in local]
    methods = figure_methods(key, result)
    if methods and not (index is not None and key in _HEAT_AT_NODE):
        lines.append("Methods:")
        lines += [f"  {m}" for m in methods]
    return "\n".join(lines)


_HEAT_AT_NODE = ("max_inner_wall_temperature_K", "min_inner_wall_temperature_K",
                 "max_outer_surface_temperature_K", "min_outer_surface_temperature_K", "heat_loss_W")


def _driving_segment(key: str, result: Result) -> Optional[int]:
    """The segment that contributes most to a line total: heat loss (per metre), pressure drop."""
    if key == "heat_loss_W" and result.resistances:
        sign = 1.0 if result.heat_loss_W >= 0 else -1.0
        return max(result.resistances, key=lambda r: sign * r.heat_loss_W_per_m).index
    if key in ("pressure_drop_Pa", "pressure_drop_friction_Pa", "outlet_pressure_Pa") and result.segments:
        return max(result.segments, key=lambda s: s.pressure_drop_Pa).index
    return None


def _driving_words(key: str) -> str:
    return "Most per metre: " if key == "heat_loss_W" else "Largest drop: "


# --------------------------------------------------------------------------- checks


def _t(kelvin: float, system: str) -> str:
    return units.format_value(kelvin, "temperature", system)


def check_basis(code: str, system: str) -> str:
    """The rule behind a finding: what is compared with what, the threshold and its source."""
    burn, cold = _t(solver_checks.BURN_THRESHOLD_K, system), _t(solver_checks.COLD_CONTACT_K, system)
    basis = {
        "BOILING_BULK": "Bulk temperature at or above the saturation temperature at the local pressure "
                        "(CoolProp); two-phase flow is outside the model.",
        "BOILING_WALL": "Inner-wall temperature at or above saturation at the local pressure while the bulk "
                        "is below it: boiling at the wall (saturation from CoolProp).",
        "NEAR_BOILING": "Bulk within 5 K of saturation at the local pressure (margin: common practice).",
        "CONDENSING_BULK": "Bulk gas at or below its saturation temperature at the local pressure (CoolProp).",
        "CONDENSING_WALL": "Inner wall below the gas's saturation temperature while the bulk is above it.",
        "FREEZING_BULK": "Bulk at or below the fluid's freezing point (CoolProp or the user's table).",
        "FREEZING_WALL": "Inner wall at or below the freezing point while the bulk is above it.",
        "NEAR_FREEZING": "Bulk within 3 K of the freezing point (margin: common practice).",
        "WALL_LIMIT": "Inner wall above the alternative's wall-temperature limit (the user's entry).",
        "MIN_BULK_LIMIT": "Bulk below the alternative's minimum bulk temperature (the user's entry).",
        "TRANSITIONAL_FLOW": "Reynolds number between 2,300 and 10,000: heat transfer by the transition blend "
                             f"({short_source(correlations.METHODS['transition_blend'])}), friction bridged "
                             "between laminar and Colebrook; uncertain by tens of percent.",
        "VELOCITY_HIGH": "Velocity above the usual upper limit for the fluid (liquid or gas; common practice, "
                         "value in the finding).",
        "VELOCITY_LOW": "Liquid velocity below the usual lower limit (common practice, value in the finding).",
        "MACH_HIGH": f"Mach number (velocity over the speed of sound from CoolProp) above "
                     f"{solver_checks.MACH_COMPRESSIBLE:g}, where gas flow stops being treated as incompressible "
                     "(common practice).",
        "NEAR_CHOKING": f"Mach number at or above {solver_checks.MACH_NEAR_CHOKING:g}: the friction length left to "
                        "choking is fL/D ≈ 0.015 (Fanno flow, γ = 1.4; Shapiro 1953).",
        "GAS_PHASE_FEED": "Feed above its boiling point at the inlet pressure (saturation from CoolProp) for a fluid "
                          "that is liquid in ambient conditions, with no phase given for the feed.",
        "HOT_SURFACE": f"Outer surface in air at or above {burn}, the contact-burn threshold for metal-like "
                       "surfaces (common practice).",
        "COLD_SURFACE": f"Outer surface in air at or below {cold}, the cold-contact injury threshold "
                        "(common practice).",
        "HOT_JACKET": f"Jacket or heating medium at or above {burn}, the contact-burn threshold (common practice).",
        "INSULATION_IGNORED": "With a jacket or a wall held at temperature the heat path has no insulation: "
                              "the layers entered play no part.",
        "CORRELATION_RANGE": "A correlation is used outside its published range of validity.",
        "NO_FLOW_FREEZE": "With the flow stopped each cell settles where what its heater delivers balances "
                          "the loss through the outside path and its heat sinks: T = T∞ + q′(T) / G′ (per metre; "
                          "a self-limiting heater's output falls with T, a thermostat's runs full; outer film at "
                          "its flowing value); below the freezing point (common practice in tracing design).",
        "NO_FLOW_HOLD": "With the flow stopped: T = T∞ + q′(T) / G′ (outside path and heat sinks per metre) "
                        "below the minimum bulk temperature (common practice in tracing design).",
        "NO_FLOW_OVERHEAT": "With the flow stopped: T = T∞ + q′(T) / G′ above the wall-temperature limit "
                            "(common practice in tracing design).",
        "DESIGN_NOT_HELD": "Worst case (design cases of the project: coldest air, strongest wind, optionally no "
                           "flow): required output = (loss per metre at the maintain temperature + heat sinks "
                           "per metre) × (1 + design margin) against what the heater delivers at the maintain "
                           "temperature (common practice in trace-heating design).",
        "HOT_CASE_WALL": "Hot case (warmest air, no flow, heaters full on): the pipe wall settles where the "
                         "heater's full output balances the loss; compared with the inner-wall limit. The "
                         "heater's own sheath runs hotter: its maker's stabilised-design data and the applicable "
                         "standard for trace heating in hazardous areas decide (common practice).",
        "WORST_CASE_FAILED": "The flowing worst case (design cases with flow) is solved like the operating case "
                             "in the worst surroundings; its refusal is quoted.",
        "TRACER_IDLE": "Pipe wall at or above the saturation temperature of the tracer's steam (CoolProp): "
                       "the steam cannot condense, so the tracer gives no heat there.",
        "SURFACE_CONDENSATION": "Outer surface below the dew point of the surrounding air, "
                                f"{short_source(correlations.METHODS['dew_point'])}.",
    }
    return basis.get(code, "See the finding's message.")


#: VALIDITY key -> words that name it in a CORRELATION_RANGE message
_RANGE_NAMES: dict[str, tuple[str, ...]] = {
    "gnielinski": ("gnielinski",),
    "laminar_entry": ("laminar",),
    "churchill_chu": ("churchill–chu", "churchill-chu", "natural convection"),
    "churchill_chu_vertical": ("vertical",),
    "churchill_bernstein": ("churchill–bernstein", "churchill-bernstein", "wind"),
    "film_condensation": ("condens",),
    "colebrook": ("colebrook", "roughness"),
    "dew_point": ("dew point", "dew-point", "magnus"),
    "laminar_friction": ("laminar friction", "hagen"),
    "transition_blend": ("transition blend",),
    "property_ratio_liquid": ("sieder", "viscosity ratio", "prandtl ratio", "property-ratio", "property ratio",
                              "property correction", "bulk-to-wall"),
    "property_ratio_gas": ("temperature ratio", "property-ratio", "property ratio", "property correction",
                           "bulk-to-wall"),
}

#: dimensionless groups of ``VALIDITY`` as a reader writes them
_GROUP_NAMES: dict[str, str] = {
    "RePr": "Re·Pr", "Re_film": "film Re", "T_air_K": "air temperature [K]", "relative_roughness": "ε/D",
    "mu_ratio": "μ_b/μ_w", "Pr_ratio": "Pr_b/Pr_w", "T_ratio": "T_b/T_w", "D_Gr_quarter_over_L": "(D/L)·Gr^¼",
}


def validity_lines(message: str) -> list[str]:
    """The published ranges of the correlations a CORRELATION_RANGE finding names (all when it names none)."""
    text = message.lower()
    keys = [k for k in correlations.VALIDITY if any(w in text for w in _RANGE_NAMES.get(k, (k.replace("_", " "),)))]
    if "vertical" in text and "churchill_chu_vertical" in keys and "churchill_chu" in keys:
        keys.remove("churchill_chu")
    out = []
    for k in keys or list(correlations.VALIDITY):
        ranges = ", ".join(f"{_GROUP_NAMES.get(g, g.replace('_', ' '))} {_bound(lo)} to {_bound(hi)}"
                           for g, (lo, hi) in correlations.VALIDITY[k].items())
        line = method_line(k) or k.replace("_", " ")
        out.append(f"  {line}: valid for {ranges}")
    return out


_SUPERSCRIPT = str.maketrans("-0123456789", "⁻⁰¹²³⁴⁵⁶⁷⁸⁹")


def _bound(v: float) -> str:
    """A range limit as people write it: 2 300, 0.5, 5 × 10⁶, 10¹², 10⁻⁵, ∞."""
    if math.isinf(v):
        return "∞" if v > 0 else "−∞"
    if v != 0 and not 1e-3 <= abs(v) < 1e6:
        exponent = int(math.floor(math.log10(abs(v))))
        mantissa = round(v / 10.0**exponent, 2)
        power = "10" + str(exponent).translate(_SUPERSCRIPT)
        return power if mantissa == 1 else f"{mantissa:g} × {power}"
    return units.format_number(v, digits=4).rstrip("0").rstrip(".") if "." in units.format_number(v, digits=4) \
        else units.format_number(v, digits=4)


_FLOW_CHECKS = ("VELOCITY_HIGH", "VELOCITY_LOW")


def check_trace(check: Check, result: Optional[Result], alt: Optional[Alternative], system: str) -> str:
    """How a finding was reached: its rule and threshold with their source, the published ranges for a
    correlation outside its range, and the inputs of the segment where it applies."""
    lines = [f"{check.title[:1].upper() + check.title[1:]} ({check.code})", f"Rule: {check_basis(check.code, system)}"]
    if check.code == "CORRELATION_RANGE":
        lines.append("Published ranges:")
        lines += validity_lines(check.message)
    index = check.segment
    if result is not None and index is not None and 0 <= index < len(result.segments) and _same_line(alt, result):
        node = None
        if check.x_m is not None and math.isfinite(check.x_m):
            span = result.segments[index]
            x = result.profile.x_m[span.node_start:span.node_end + 1]
            node = span.node_start + int(np.argmin(np.abs(x - check.x_m)))
        seg_lines = segment_inputs(alt, result, index, system, "flow" if check.code in _FLOW_CHECKS else "heat")
        lines.append("Where: " + seg_lines[0] + (f" at {units.format_value(check.x_m, 'length', system)}"
                                                  if check.x_m is not None else ""))
        lines += seg_lines[1:]
        if node is not None:
            lines.append(f"  Flow there: {flow_regime_text(result, node, system)}")
        if check.code.startswith("NO_FLOW") and index < len(result.resistances):
            r_o = result.resistances[index].outside_K_m_per_W
            lines.append(f"  Outside path R_o: {heat_path.resistance_text(r_o, system)}")
    return "\n".join(lines)
