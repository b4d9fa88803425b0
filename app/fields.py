"""What the user calls each field of the project and what it takes: labels, quantities, examples.

No Qt and no imports from the rest of the app: :mod:`app.units` words its refusals of a typed entry
with these ("Mass flow: 35 gpm is a volume flow — choose Volume flow, or give a mass flow such as
1200 kg/h"), and :mod:`app.messages` words refused values with them.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from typing import Iterable, Sequence, Union

NO_BREAK_SPACE = "\u00a0"  # between a number and its unit, so a wrapped message never splits "−5 m"

Path = Union[str, Sequence[Union[str, int]]]


@dataclass(frozen=True)
class FieldInfo:
    """What the user calls a field and the :mod:`app.units` quantity it holds ("" when not a number)."""

    label: str
    quantity: str = ""


# --------------------------------------------------------------------------- the fields of solver.model

#: Model field name -> label and quantity, as the Segment Card, Feed and dialogs label them.
FIELDS: dict[str, FieldInfo] = {
    # Segment
    "name": FieldInfo("Name"),
    "length_m": FieldInfo("Length", "length"),
    "elevation_change_m": FieldInfo("Elevation change", "elevation"),
    "heat_input_W_per_m": FieldInfo("Tracing power", "power_per_length"),
    "heater": FieldInfo("Heater"),
    "heat_sinks": FieldInfo("Heat sinks"),
    "design_margin": FieldInfo("Design margin", "fraction"),
    "inside_fouling_m2K_per_W": FieldInfo("Inside fouling", "fouling_resistance"),
    "steam_tracer": FieldInfo("Steam tracer"),
    "pipe": FieldInfo("Pipe"),
    "fittings": FieldInfo("Fittings"),
    "insulation": FieldInfo("Insulation"),
    "surroundings": FieldInfo("Surroundings"),
    # Pipe
    "bore": FieldInfo("Bore given by"),
    "nps": FieldInfo("NPS"),
    "schedule": FieldInfo("Schedule"),
    "inner_diameter_m": FieldInfo("Inner diameter", "diameter"),
    "wall_thickness_m": FieldInfo("Wall thickness", "thickness"),
    "material": FieldInfo("Material"),
    "roughness_m": FieldInfo("Roughness", "roughness"),
    "wall_conductivity_W_per_mK": FieldInfo("Wall conductivity", "conductivity"),
    # Layer
    "thickness_m": FieldInfo("Thickness", "thickness"),
    "conductivity_W_per_mK": FieldInfo("Thermal conductivity", "conductivity"),
    # Fitting
    "kind": FieldInfo("Kind"),
    "count": FieldInfo("Count", "dimensionless"),
    "K": FieldInfo("Loss coefficient K", "dimensionless"),
    "label": FieldInfo("Label"),
    # Surroundings
    "temperature_K": FieldInfo("Air temperature", "temperature"),
    "emissivity": FieldInfo("Surface emissivity", "dimensionless"),
    "relative_humidity": FieldInfo("Relative humidity", "fraction"),
    "indoors": FieldInfo("Indoors"),
    "film_coefficient_W_per_m2K": FieldInfo("Film coefficient", "film_coefficient"),
    "wind_speed_m_per_s": FieldInfo("Wind speed", "speed"),
    "soil_temperature_K": FieldInfo("Soil temperature", "temperature"),
    "depth_m": FieldInfo("Depth to centreline", "depth"),
    "soil_conductivity_W_per_mK": FieldInfo("Soil conductivity", "conductivity"),
    "medium_temperature_K": FieldInfo("Medium temperature", "temperature"),
    "wall_temperature_K": FieldInfo("Wall temperature", "temperature"),
    "steam_pressure_Pa": FieldInfo("Steam pressure", "pressure"),
    "steam_side_fouling_m2K_per_W": FieldInfo("Steam-side fouling", "fouling_resistance"),
    # SteamTracer
    "tube_outer_diameter_m": FieldInfo("Tracer tube outside diameter", "diameter"),
    "contact": FieldInfo("Tracer contact"),
    # Heaters (electric tracing): outputs are per metre of heater
    "output_W_per_m": FieldInfo("Heater output", "power_per_length"),
    "output_low_W_per_m": FieldInfo("Output at the lower rating temperature", "power_per_length"),
    "temperature_low_K": FieldInfo("Lower rating temperature", "temperature"),
    "output_high_W_per_m": FieldInfo("Output at the upper rating temperature", "power_per_length"),
    "temperature_high_K": FieldInfo("Upper rating temperature", "temperature"),
    "set_point_K": FieldInfo("Thermostat set point", "temperature"),
    "heater_per_pipe_length": FieldInfo("Heater per metre of pipe", "dimensionless"),
    # HeatSink
    "equivalent_length_m": FieldInfo("Equivalent length", "length"),
    "bare_length_m": FieldInfo("Bare pipe length", "length"),
    "loss_W_per_K": FieldInfo("Loss per kelvin", "conductance"),
    # DesignCases
    "design_cases": FieldInfo("Design cases"),
    "worst_air_temperature_K": FieldInfo("Worst-case air temperature", "temperature"),
    "worst_wind_speed_m_per_s": FieldInfo("Worst-case wind speed", "speed"),
    "worst_soil_temperature_K": FieldInfo("Worst-case soil temperature", "temperature"),
    "worst_no_flow": FieldInfo("No flow in the worst case"),
    "hot_air_temperature_K": FieldInfo("Hot-case air temperature", "temperature"),
    # Fluid
    "fluid": FieldInfo("Fluid"),
    "solute": FieldInfo("Solution"),
    "concentration": FieldInfo("Concentration", "fraction"),
    "rows": FieldInfo("Property table"),
    "freezing_point_K": FieldInfo("Freezing point", "temperature"),
    "latent_heat_J_per_kg": FieldInfo("Latent heat of fusion", "energy_per_mass"),
    "boiling_point_K": FieldInfo("Boiling point", "temperature"),
    "density_kg_per_m3": FieldInfo("Density", "density"),
    "specific_heat_J_per_kgK": FieldInfo("Specific heat", "specific_heat"),
    "viscosity_Pa_s": FieldInfo("Viscosity", "viscosity"),
    # Feed
    "feed": FieldInfo("Feed"),
    "inlet_temperature_K": FieldInfo("Inlet temperature", "temperature"),
    "inlet_pressure_Pa": FieldInfo("Inlet pressure", "pressure"),
    "mass_flow_kg_per_s": FieldInfo("Mass flow", "mass_flow"),
    "volume_flow_m3_per_s": FieldInfo("Volume flow", "volume_flow"),
    "inlet_flow": FieldInfo("Flow at inlet"),
    # Limits
    "limits": FieldInfo("Limits"),
    "max_inner_wall_temperature_K": FieldInfo("Max inner-wall temperature", "temperature"),
    "min_bulk_temperature_K": FieldInfo("Min bulk temperature", "temperature"),
    "maintain_temperature_K": FieldInfo("Maintain temperature", "temperature"),
    # Targets
    "targets": FieldInfo("Targets"),
    "outlet_temperature_min_K": FieldInfo("Outlet temperature target (at least)", "temperature"),
    "outlet_temperature_max_K": FieldInfo("Outlet temperature target (at most)", "temperature"),
    "max_pressure_drop_Pa": FieldInfo("Pressure drop target (at most)", "pressure_difference"),
    "max_heat_input_W": FieldInfo("Heat input target (at most)", "power"),
    # Alternative, Project
    "segments": FieldInfo("Segments"),
    "alternatives": FieldInfo("Alternatives"),
    "description": FieldInfo("Description"),
    "prepared_by": FieldInfo("Prepared by"),
    "revision": FieldInfo("Revision"),
    "baseline": FieldInfo("Baseline"),
    "format": FieldInfo("File format"),
    "schema_version": FieldInfo("File version"),
    # SearchRecord, SweepPoint: how a Target Finder or Sweep made an alternative (numbers in SI)
    "origin": FieldInfo("Search record"),
    "sweep_points": FieldInfo("Sweep points"),
    "parameter": FieldInfo("Varied parameter", "dimensionless"),
    "parameter2": FieldInfo("Second varied parameter", "dimensionless"),
    "target_limits": FieldInfo("Search targets", "dimensionless"),
    "value": FieldInfo("Value found", "dimensionless"),
    "value2": FieldInfo("Second parameter's value", "dimensionless"),
    "figures": FieldInfo("Key figures at the point", "dimensionless"),
}

#: (the part of the path the field sits in, field name) -> label where the bare name says too little.
CONTEXT_FIELDS: dict[tuple[str, str], FieldInfo] = {
    ("rows", "temperature_K"): FieldInfo("Table temperature", "temperature"),
    ("insulation", "thickness_m"): FieldInfo("Insulation thickness", "thickness"),
    ("insulation", "conductivity_W_per_mK"): FieldInfo("Insulation conductivity", "conductivity"),
    ("insulation", "material"): FieldInfo("Insulation material"),
    ("pipe", "material"): FieldInfo("Pipe material"),
    ("fittings", "kind"): FieldInfo("Fitting"),
    ("fittings", "label"): FieldInfo("Fitting label"),
    ("surroundings", "kind"): FieldInfo("Outside"),
    ("fluid", "kind"): FieldInfo("Fluid kind"),
    ("fluid", "name"): FieldInfo("Fluid"),
    ("segments", "name"): FieldInfo("Segment name"),
    ("alternatives", "name"): FieldInfo("Alternative name"),
    ("alternatives", "description"): FieldInfo("Alternative description"),
    ("still_air", "film_coefficient_W_per_m2K"): FieldInfo("Outer film coefficient", "film_coefficient"),
    ("wind", "film_coefficient_W_per_m2K"): FieldInfo("Outer film coefficient", "film_coefficient"),
    ("jacket", "film_coefficient_W_per_m2K"): FieldInfo("Jacket film coefficient", "film_coefficient"),
    ("targets", "max_inner_wall_temperature_K"): FieldInfo("Inner-wall temperature target (at most)", "temperature"),
    ("steam_tracer", "steam_pressure_Pa"): FieldInfo("Tracer steam pressure", "pressure"),
    ("steam_tracer", "count"): FieldInfo("Number of tracer tubes", "dimensionless"),
    ("heater", "count"): FieldInfo("Heater runs", "dimensionless"),
    ("heat_sinks", "count"): FieldInfo("Heat sink count", "dimensionless"),
    ("heat_sinks", "kind"): FieldInfo("Heat sink"),
    ("heat_sinks", "label"): FieldInfo("Heat sink label"),
    ("design_cases", "design_margin"): FieldInfo("Project design margin", "fraction"),
    ("sweep_points", "value"): FieldInfo("Swept value", "dimensionless"),
}

#: Parts of a path that set the context of the fields below them (lists, sub-models, union tags).
_CONTEXTS = {"rows", "insulation", "pipe", "fittings", "surroundings", "fluid", "segments", "alternatives",
             "targets", "limits", "feed", "steam_tracer", "heater", "heat_sinks", "design_cases",
             "constant", "self_limiting", "thermostat", "still_air", "wind", "buried", "jacket", "fixed_wall", "adiabatic",
             "pure", "solution", "table"}
UNION_TAGS = {"pure", "solution", "table", "still_air", "wind", "buried", "jacket", "fixed_wall", "adiabatic",
              "constant", "self_limiting", "thermostat"}

#: A whole item of a list or a sub-model, for errors about the item rather than one field.
OBJECTS: dict[str, str] = {
    "alternatives": "Alternative", "segments": "Segment", "insulation": "Insulation layer",
    "fittings": "Fitting", "rows": "Table row", "pipe": "Pipe", "feed": "Feed", "surroundings": "Surroundings",
    "fluid": "Fluid", "limits": "Limits", "targets": "Targets", "steam_tracer": "Steam tracer",
    "heater": "Heater", "heat_sinks": "Heat sink", "design_cases": "Design cases",
}

#: Position words for items of the lists inside a segment or fluid (1-based, as people count).
_ITEM_WORDS = {"insulation": "layer", "fittings": "fitting", "rows": "row", "heat_sinks": "heat sink", "segments": "segment",
               "alternatives": "alternative"}

UNIT_SUFFIX = re.compile(
    r"_(K|m|Pa|W|s|W_per_m|W_per_K|W_per_mK|W_per_m2K|m2K_per_W|m_per_s|kg_per_s|m3_per_s|kg_per_m3|J_per_kgK|Pa_s)$")


def split_path(path: Path) -> tuple:
    """``'alternatives[0].segments[2].length_m'`` -> ``('alternatives', 0, 'segments', 2, 'length_m')``."""
    if not isinstance(path, str):
        return tuple(path)
    parts: list = []
    for piece in path.split("."):
        for m in re.finditer(r"([^\[\]]+)|\[(\d+)\]", piece):
            if m.group(1) is not None:
                parts.append(int(m.group(1)) if m.group(1).isdigit() else m.group(1))
            else:
                parts.append(int(m.group(2)))
    return tuple(parts)


def _words_of(name: str) -> str:
    """A label from a name the table does not know: unit suffix off, words spaced, capital first."""
    words = UNIT_SUFFIX.sub("", name).replace("_", " ").strip()
    return words[:1].upper() + words[1:] if words else name


def field_info(path: Path) -> FieldInfo:
    """The label and quantity of the field at ``path`` (a file path, a dotted path or a loc tuple).

    A text that is no model path (e.g. ``"freezing point"``) comes back as a label as it is, with
    a capital first letter.
    """
    parts = split_path(path)
    names = [p for p in parts if isinstance(p, str)]
    if not names:
        return FieldInfo("Value")
    name = names[-1]
    for context in reversed(names[:-1]):
        if context in _CONTEXTS:
            hit = CONTEXT_FIELDS.get((context, name))
            if hit is not None:
                return hit
            if context not in UNION_TAGS and context not in ("surroundings", "fluid"):
                break  # the nearest list or sub-model decides; tags above it do not
    if name in FIELDS:
        return FIELDS[name]
    if name in OBJECTS:
        return FieldInfo(OBJECTS[name])
    return FieldInfo(_words_of(name))


def field_label(path: Path) -> str:
    """The label the user knows the field by: ``'feed.mass_flow_kg_per_s'`` -> ``'Mass flow'``."""
    return field_info(path).label


def item_words(path: Path, lists: Iterable[str] = ("insulation", "fittings", "heat_sinks", "rows")) -> str:
    """Where in a list the field sits, in words: ``'insulation[1].thickness_m'`` -> ``'layer 2'``."""
    parts = split_path(path)
    out = []
    for i, part in enumerate(parts[:-1]):
        if isinstance(part, str) and part in lists and isinstance(parts[i + 1], int) and part in _ITEM_WORDS:
            out.append(f"{_ITEM_WORDS[part]} {parts[i + 1] + 1}")
    return ", ".join(out)


#: Plain words for each kind of quantity (for "give a mass flow such as ...").
QUANTITY_WORDS: dict[str, str] = {
    "temperature": "temperature", "temperature_difference": "temperature difference",
    "pressure": "pressure", "pressure_difference": "pressure difference", "length": "length",
    "elevation": "elevation change", "diameter": "diameter", "thickness": "thickness",
    "roughness": "roughness", "depth": "depth", "mass_flow": "mass flow", "volume_flow": "volume flow",
    "power": "power", "power_per_length": "power per length", "heat_flux": "heat flux",
    "film_coefficient": "film coefficient", "conductance": "heat loss per kelvin", "fouling_resistance": "fouling resistance", "conductivity": "thermal conductivity", "velocity": "velocity",
    "speed": "speed", "density": "density", "specific_heat": "specific heat", "viscosity": "viscosity",
    "time": "time", "energy_per_mass": "energy per mass", "dimensionless": "plain number",
    "fraction": "fraction", "mass": "mass", "volume": "volume", "area": "area", "energy": "energy",
    "kinematic_viscosity": "kinematic viscosity", "frequency": "frequency",
}

#: An example entry of each quantity in each unit system (round, typed as a person would).
EXAMPLES: dict[str, tuple[str, str]] = {
    "temperature": ("80 °C", "176 °F"),
    "temperature_difference": ("5 K", "9 °F"),
    "pressure": ("3 bar(g) or 4 bar(a)", "45 psig or 60 psia"),
    "pressure_difference": ("50 kPa", "7 psi"),
    "length": ("120 m", "400 ft"),
    "elevation": ("3 m", "10 ft"),
    "diameter": ("52.5 mm", "2 in"),
    "thickness": ("50 mm", "2 in"),
    "roughness": ("0.045 mm", "0.0018 in"),
    "depth": ("1.2 m", "4 ft"),
    "mass_flow": ("1200 kg/h", "2600 lb/h"),
    "volume_flow": ("8 m³/h", "35 gpm"),
    "power": ("12 kW", "40000 Btu/h"),
    "power_per_length": ("30 W/m", "10 W/ft"),
    "heat_flux": ("500 W/m²", "160 Btu/(h·ft²)"),
    "film_coefficient": ("1000 W/(m²·K)", "176 Btu/(h·ft²·°F)"),
    "fouling_resistance": ("0.0002 m²·K/W", "0.001 h·ft²·°F/Btu"),
    "conductivity": ("0.04 W/(m·K)", "0.023 Btu/(h·ft·°F)"),
    "conductance": ("0.5 W/K", "0.95 Btu/(h·°F)"),
    "velocity": ("2 m/s", "6 ft/s"),
    "speed": ("5 m/s", "10 mph"),
    "density": ("1000 kg/m³", "62.4 lb/ft³"),
    "specific_heat": ("4.18 kJ/(kg·K)", "1 Btu/(lb·°F)"),
    "viscosity": ("1 mPa·s", "1 cP"),
    "time": ("60 s", "60 s"),
    "energy_per_mass": ("100 kJ/kg", "43 Btu/lb"),
    "dimensionless": ("0.9", "0.9"),
    "fraction": ("30 %", "30 %"),
}

#: A field of the same Feed that takes the typed kind instead: (field's quantity, typed kind) -> its label.
SIBLING_FIELDS: dict[tuple[str, str], str] = {
    ("mass_flow", "volume_flow"): "Volume flow",
    ("volume_flow", "mass_flow"): "Mass flow",
}


def _a(words: str) -> str:
    return ("an " if words[:1].lower() in "aeio" else "a ") + words


def example(quantity: str, system: str) -> str:
    """A typical entry of ``quantity`` in ``system``, e.g. ``'1200 kg/h'``."""
    si, us = EXAMPLES.get(quantity, ("", ""))
    return re.sub(r"(\d) (?=\S)", "\\1" + NO_BREAK_SPACE, us if system == "US" else si)


def _expected(quantity: str, system: str) -> str:
    words = _a(QUANTITY_WORDS.get(quantity, quantity.replace("_", " ")))
    ex = example(quantity, system)
    return f"{words} such as {ex}" if ex else words


def _with_field(field: str, text: str) -> str:
    """``'Mass flow: ' + text`` when the field is named; a generic ``'value'`` is left out."""
    if not field or field == "value":
        return text
    return f"{field_label(field)}: {text}"


def value_required(field: str, quantity: str = "", system: str = "SI") -> str:
    """``'Length needs a value, e.g. 120 m'``: an empty entry where one is required."""
    return needs_value(field_label(field) if field and field != "value" else "This field", quantity, system)


def needs_value(subject: str, quantity: str, system: str) -> str:
    ex = example(quantity, system) if quantity else ""
    return f"{subject} needs a value" + (f", e.g. {ex}" if ex else "")


def unreadable_entry(text: str, quantity: str, system: str, field: str = "") -> str:
    """An entry that does not start with a number (``'abc'``)."""
    return _with_field(field, f"'{text.strip()}' is not a number; give {_expected(quantity, system)}")


def unknown_unit(text: str, unit_text: str, quantity: str, system: str, field: str = "") -> str:
    """A unit nobody defined (``'12 furlongs/fortnight'`` is fine, ``'12 foo'`` is not)."""
    return _with_field(field, f"'{unit_text}' is not a unit Calorun knows; give {_expected(quantity, system)}")


def wrong_kind(text: str, unit_text: str, kind: str, quantity: str, system: str, field: str = "") -> str:
    """A unit of another kind of quantity, with the field that takes it when there is one.

    ``'35 gpm is a volume flow — choose Volume flow, or give a mass flow such as 1200 kg/h'``;
    ``'psi is a pressure unit; give a temperature such as 80 °C'``.
    """
    typed = QUANTITY_WORDS.get(kind, "")
    sibling = SIBLING_FIELDS.get((quantity, kind))
    if sibling:
        return _with_field(field, f"{text.strip()} is {_a(typed)} — choose {sibling}, "
                                  f"or give {_expected(quantity, system)}")
    if typed:
        return _with_field(field, f"{unit_text} is {_a(typed)} unit; give {_expected(quantity, system)}")
    return _with_field(field, f"{unit_text} is not a unit of {QUANTITY_WORDS.get(quantity, quantity)}; "
                              f"give {_expected(quantity, system)}")


