"""Messages in the user's words: field labels, display units, no JSON keys, no library wording.

No Qt here (a headless module like :mod:`app.units`): the CLI prints these messages and the
GUI's editors show them under the box that was refused.

- :func:`field_label` / :func:`field_info`: the label and quantity of any model field, from a
  path as the file writes it (``alternatives[0].segments[2].length_m`` -> ``"Length"``, length).
- :func:`field_problem`: one refused value, e.g. ``"Length must be more than 0 m; you entered −5 m"``.
- :func:`problems` / :func:`validation_message`: every error of a ``pydantic.ValidationError`` in
  those words (the CLI keeps the file path in front: ``"alternatives[0].segments[2].length_m — …"``).
- :func:`value_required`, :func:`unreadable_entry`, :func:`unknown_unit`, :func:`wrong_kind`: what
  :func:`app.units.parse` says about a typed entry it cannot take ("35 gpm is a volume flow —
  choose Volume flow, or give a mass flow such as 1200 kg/h").
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from typing import Any, Iterable, Mapping, Optional, Sequence, Union

from app import units

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
    "film_coefficient_W_per_m2K": FieldInfo("Film coefficient", "film_coefficient"),
    "wind_speed_m_per_s": FieldInfo("Wind speed", "speed"),
    "soil_temperature_K": FieldInfo("Soil temperature", "temperature"),
    "depth_m": FieldInfo("Depth to centreline", "depth"),
    "soil_conductivity_W_per_mK": FieldInfo("Soil conductivity", "conductivity"),
    "medium_temperature_K": FieldInfo("Medium temperature", "temperature"),
    "wall_temperature_K": FieldInfo("Wall temperature", "temperature"),
    "steam_pressure_Pa": FieldInfo("Steam pressure", "pressure"),
    # Fluid
    "fluid": FieldInfo("Fluid"),
    "solute": FieldInfo("Solution"),
    "concentration": FieldInfo("Concentration", "fraction"),
    "rows": FieldInfo("Property table"),
    "freezing_point_K": FieldInfo("Freezing point", "temperature"),
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
    # Limits
    "limits": FieldInfo("Limits"),
    "max_inner_wall_temperature_K": FieldInfo("Max inner-wall temperature", "temperature"),
    "min_bulk_temperature_K": FieldInfo("Min bulk temperature", "temperature"),
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
}

#: Parts of a path that set the context of the fields below them (lists, sub-models, union tags).
_CONTEXTS = {"rows", "insulation", "pipe", "fittings", "surroundings", "fluid", "segments", "alternatives",
             "targets", "limits", "feed", "still_air", "wind", "buried", "jacket", "fixed_wall", "adiabatic",
             "pure", "solution", "table"}
_UNION_TAGS = {"pure", "solution", "table", "still_air", "wind", "buried", "jacket", "fixed_wall", "adiabatic"}

#: A whole item of a list or a sub-model, for errors about the item rather than one field.
OBJECTS: dict[str, str] = {
    "alternatives": "Alternative", "segments": "Segment", "insulation": "Insulation layer",
    "fittings": "Fitting", "rows": "Table row", "pipe": "Pipe", "feed": "Feed", "surroundings": "Surroundings",
    "fluid": "Fluid", "limits": "Limits", "targets": "Targets",
}

#: Position words for items of the lists inside a segment or fluid (1-based, as people count).
_ITEM_WORDS = {"insulation": "layer", "fittings": "fitting", "rows": "row", "segments": "segment",
               "alternatives": "alternative"}

_UNIT_SUFFIX = re.compile(
    r"_(K|m|Pa|W|s|W_per_m|W_per_mK|W_per_m2K|m_per_s|kg_per_s|m3_per_s|kg_per_m3|J_per_kgK|Pa_s)$")


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
    words = _UNIT_SUFFIX.sub("", name).replace("_", " ").strip()
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
            if context not in _UNION_TAGS and context not in ("surroundings", "fluid"):
                break  # the nearest list or sub-model decides; tags above it do not
    if name in FIELDS:
        return FIELDS[name]
    if name in OBJECTS:
        return FieldInfo(OBJECTS[name])
    return FieldInfo(_words_of(name))


def field_label(path: Path) -> str:
    """The label the user knows the field by: ``'feed.mass_flow_kg_per_s'`` -> ``'Mass flow'``."""
    return field_info(path).label


def item_words(path: Path, lists: Iterable[str] = ("insulation", "fittings", "rows")) -> str:
    """Where in a list the field sits, in words: ``'insulation[1].thickness_m'`` -> ``'layer 2'``."""
    parts = split_path(path)
    out = []
    for i, part in enumerate(parts[:-1]):
        if isinstance(part, str) and part in lists and isinstance(parts[i + 1], int) and part in _ITEM_WORDS:
            out.append(f"{_ITEM_WORDS[part]} {parts[i + 1] + 1}")
    return ", ".join(out)


# --------------------------------------------------------------------------- values in words


def _is_number(value: Any) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def entered(value: Any, quantity: str, system: str) -> str:
    """A value as the message quotes it: a number in the field's display unit, text in quotes."""
    if _is_number(value) and quantity and math.isfinite(value):
        return units.format_exact(float(value), quantity, system)
    if _is_number(value):
        return f"{value:g}".replace("-", units.MINUS)
    if value is None:
        return "nothing"
    if isinstance(value, str):
        return f"'{value}'" if value.strip() else "an empty entry"
    if isinstance(value, (list, tuple)):
        return f"a list of {len(value)}"
    if isinstance(value, Mapping):
        return "a group of settings"
    return repr(value)


def _limit(value: Any, quantity: str, system: str) -> str:
    if _is_number(value) and quantity:
        return units.format_exact(float(value), quantity, system)
    return f"{value}"


#: Plain words for each kind of quantity (for "give a mass flow such as ...").
QUANTITY_WORDS: dict[str, str] = {
    "temperature": "temperature", "temperature_difference": "temperature difference",
    "pressure": "pressure", "pressure_difference": "pressure difference", "length": "length",
    "elevation": "elevation change", "diameter": "diameter", "thickness": "thickness",
    "roughness": "roughness", "depth": "depth", "mass_flow": "mass flow", "volume_flow": "volume flow",
    "power": "power", "power_per_length": "power per length", "heat_flux": "heat flux",
    "film_coefficient": "film coefficient", "conductivity": "thermal conductivity", "velocity": "velocity",
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
    "conductivity": ("0.04 W/(m·K)", "0.023 Btu/(h·ft·°F)"),
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
    return re.sub(r"(\d) (?=\S)", "\\1" + units.NO_BREAK_SPACE, us if system == "US" else si)


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
    return _required(field_label(field) if field and field != "value" else "This field", quantity, system)


def _required(subject: str, quantity: str, system: str) -> str:
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


# --------------------------------------------------------------------------- refused values


_BOUNDS = {  # pydantic error type -> (ctx key, words)
    "greater_than": ("gt", "more than"),
    "greater_than_equal": ("ge", "at least"),
    "less_than": ("lt", "less than"),
    "less_than_equal": ("le", "at most"),
}
_NOT_A_NUMBER = {"float_parsing", "float_type", "int_parsing", "int_type", "decimal_parsing", "decimal_type",
                 "complex_type", "number_type"}


def field_problem(path: Path, error: Union[str, Mapping[str, Any]], value: Any, system: str,
                  ctx: Optional[Mapping[str, Any]] = None) -> str:
    """One refused value in the user's words, naming the field by its label, in the display unit.

    ``error`` is a pydantic error type (``"greater_than"``, with ``ctx={"gt": 0}``), a whole
    pydantic error dict, or a plain message (a model validator's ``"... , got X"``). E.g.
    ``field_problem("segments[2].length_m", "greater_than", -5, "SI", {"gt": 0})`` ->
    ``"Length must be more than 0 m; you entered −5 m"``.
    """
    if isinstance(error, Mapping):
        ctx = error.get("ctx") or ctx
        kind = str(error.get("type", ""))
        message = str(error.get("msg", ""))
    elif re.fullmatch(r"[a-z_]+", error or ""):
        kind, message = error, ""
    else:
        kind, message = "value_error", error
    ctx = ctx or {}
    info = field_info(path)
    label, quantity = info.label, info.quantity
    where = item_words(path)
    subject = f"{label} ({where})" if where else label

    if kind in _BOUNDS:
        key, words = _BOUNDS[kind]
        bound = ctx.get(key)
        if quantity == "temperature" and kind == "greater_than" and bound == 0:
            text = f"{subject} must be above absolute zero ({_limit(0.0, quantity, system)})"
        else:
            text = f"{subject} must be {words} {_limit(bound, quantity, system)}"
        return f"{text}; you entered {entered(value, quantity, system)}"
    if kind in _NOT_A_NUMBER:
        if value is None:
            return _required(subject, quantity, system)
        return f"{subject} must be a number; you entered {entered(value, '', system)}"
    if kind == "finite_number":
        return f"{subject} must be a finite number; you entered {entered(value, '', system)}"
    if kind == "int_from_float":
        return f"{subject} must be a whole number; you entered {entered(value, '', system)}"
    if kind == "missing":
        return _required(subject, quantity, system)
    if kind == "extra_forbidden":
        name = split_path(path)[-1] if split_path(path) else "?"
        return f"'{name}' is not a setting Calorun knows here; remove it or check its spelling"
    if kind == "literal_error":
        expected = str(ctx.get("expected", "")).replace(" or ", ", ")
        return f"{subject} must be one of {expected}; you entered {entered(value, '', system)}"
    if kind in ("union_tag_invalid", "union_tag_not_found"):
        expected = ctx.get("expected_tags", "")
        tag = ctx.get("tag")
        if tag is None:
            return f"{subject} needs its kind, one of {expected}"
        return f"{subject}: kind '{tag}' is not known; use one of {expected}"
    if kind == "too_short":
        return _too_short(path, ctx)
    if kind == "too_long":
        return f"{subject} may hold at most {ctx.get('max_length')}; it holds {ctx.get('actual_length')}"
    if kind in ("string_type", "string_too_short", "string_too_long"):
        return f"{subject} must be text; you entered {entered(value, '', system)}"
    if kind in ("list_type", "tuple_type"):
        return f"{subject} must be a list; you entered {entered(value, '', system)}"
    if kind in ("model_type", "dict_type", "model_attributes_type"):
        return f"{subject} must be a group of settings; you entered {entered(value, '', system)}"
    if kind in ("bool_type", "bool_parsing"):
        return f"{subject} must be true or false; you entered {entered(value, '', system)}"
    if kind == "value_error" or message:
        return _value_error(path, message.removeprefix("Value error, "), value, system)
    return f"{subject}: not accepted; you entered {entered(value, quantity, system)}"


def _too_short(path: Path, ctx: Mapping[str, Any]) -> str:
    parts = [p for p in split_path(path) if isinstance(p, str)]
    name = parts[-1] if parts else ""
    n = ctx.get("min_length", 1)
    what = {"segments": ("An alternative", "segment"), "alternatives": ("A project", "alternative"),
            "rows": ("A property table", "row")}.get(name)
    if what:
        return f"{what[0]} needs at least {plural(n, what[1])}"
    return f"{field_label(path)} needs at least {n} entries"


def plural(n: int, word: str, words: str = "") -> str:
    """``'1 warning'``, ``'3 warnings'``."""
    return f"{n} {word if n == 1 else (words or word + 's')}"


# A model validator's message (solver.model) -> the user's words. Each rule: the message pattern and
# a function of (match, the object's values, unit system).

def _get(obj: Any, key: str) -> Any:
    if isinstance(obj, Mapping):
        return obj.get(key)
    return getattr(obj, key, None)


def _elevation_rule(m, obj, system):
    dz, length = _get(obj, "elevation_change_m"), _get(obj, "length_m")
    if _is_number(dz) and _is_number(length):
        return (f"Elevation change must not be more than the length; you entered "
                f"{entered(dz, 'elevation', system)} over {entered(length, 'length', system)}")
    return "Elevation change must not be more than the length"


def _tracing_rule(m, obj, system):
    q = _get(obj, "heat_input_W_per_m")
    return ("Tracing power cannot be combined with a fixed wall temperature (the wall already has its "
            f"temperature); you entered {entered(q, 'power_per_length', system)} — set it to 0 or choose other "
            "surroundings")


def _flow_rule(m, obj, system):
    mass, volume = _get(obj, "mass_flow_kg_per_s"), _get(obj, "volume_flow_m3_per_s")
    if mass is None and volume is None:
        return "Give the flow: a mass flow or a volume flow"
    return (f"Give a mass flow or a volume flow, not both; you entered {entered(mass, 'mass_flow', system)} "
            f"and {entered(volume, 'volume_flow', system)}")


def _fixed_wall_rule(m, obj, system):
    t, p = _get(obj, "wall_temperature_K"), _get(obj, "steam_pressure_Pa")
    if t is None and p is None:
        return "Give the wall temperature or the steam pressure that holds it"
    return (f"Give the wall temperature or the steam pressure, not both; you entered "
            f"{entered(t, 'temperature', system)} and {entered(p, 'pressure', system)}")


def _rows_rule(m, obj, system):
    row, t_after, t_before = int(m.group(1)), float(m.group(2)), float(m.group(3))
    return (f"Table temperatures must increase row by row; row {row + 1} has "
            f"{entered(t_after, 'temperature', system)} after {entered(t_before, 'temperature', system)}")


_VALUE_RULES: tuple[tuple[re.Pattern, Any], ...] = (
    (re.compile(r"^elevation_change_m must not exceed length_m"), _elevation_rule),
    (re.compile(r"^heat_input_W_per_m cannot be combined with a fixed wall"), _tracing_rule),
    (re.compile(r"^give exactly one of mass_flow_kg_per_s or volume_flow_m3_per_s"), _flow_rule),
    (re.compile(r"^give exactly one of wall_temperature_K or steam_pressure_Pa"), _fixed_wall_rule),
    (re.compile(r"^bore 'nps' needs nps and schedule"),
     lambda m, obj, s: "A bore given by NPS needs both the NPS and the schedule"),
    (re.compile(r"^bore 'diameter' needs inner_diameter_m"),
     lambda m, obj, s: "A bore given by diameter needs the inner diameter"),
    (re.compile(r"^bore 'diameter' needs wall_thickness_m"),
     lambda m, obj, s: "A bore given by diameter needs the wall thickness (0 for a thin wall)"),
    (re.compile(r"^a 'custom' fitting needs its loss coefficient K"),
     lambda m, obj, s: "A custom fitting needs its loss coefficient K"),
    (re.compile(r"temperatures must increase row by row; row (\d+) has ([-+0-9.eE]+) K after ([-+0-9.eE]+) K"),
     _rows_rule),
    (re.compile(r"^alternative names must be unique; alternatives\[\d+\]\.name '(.*)' is repeated"),
     lambda m, obj, s: f"Alternative names must be unique; '{m.group(1)}' is used twice"),
    (re.compile(r"^baseline '(.*)' names no alternative"),
     lambda m, obj, s: f"The baseline '{m.group(1)}' names no alternative of this project"),
)

_KEY_TOKEN = re.compile(r"\b[a-z][a-z0-9]*(?:_[A-Za-z0-9]+)+\b")


def _scrub(text: str) -> str:
    """Model field names in a message -> the user's labels (lower case inside a sentence)."""
    def one(m: re.Match) -> str:
        name = m.group(0)
        if name in FIELDS or _UNIT_SUFFIX.search(name):
            label = field_label(name)
            return label if label.isupper() or label[:3].isupper() else label[:1].lower() + label[1:]
        return name.replace("_", " ")
    return _KEY_TOKEN.sub(one, text)


def _value_error(path: Path, message: str, value: Any, system: str) -> str:
    for pattern, rule in _VALUE_RULES:
        m = pattern.search(message)
        if m:
            return rule(m, value, system)
    info = field_info(path)
    parts = split_path(path)
    names = [p for p in parts if isinstance(p, str)]
    is_field = bool(names) and names[-1] in FIELDS and not isinstance(parts[-1], int) and names[-1] not in OBJECTS
    reason, _, got = message.rpartition(", got ")
    if not reason:
        reason, got = message, ""
    reason = _scrub(reason)
    if is_field and got:
        shown = entered(value, info.quantity, system) if value is not None or got == "None" else got
        text = f"{info.label}: {reason}; you entered {shown}"
    elif got:
        text = f"{reason[:1].upper()}{reason[1:]}; you entered {_scrub(got)}"
    else:
        text = reason[:1].upper() + reason[1:]
    return text


def input_error_message(exc, system: str) -> str:
    """A :class:`solver.errors.InputError` (a value the tables do not hold) in the user's words.

    ``InputError("pipe.schedule", "160", "schedule not available for NPS 2; available: 40, 80")`` ->
    ``"Schedule: schedule not available for NPS 2; available: 40, 80; you entered '160'"``.
    """
    info = field_info(exc.field)
    return f"{info.label}: {_scrub(exc.reason)}; you entered {entered(exc.value, info.quantity, system)}"


# --------------------------------------------------------------------------- whole validation errors


def _strip_tags(loc: tuple) -> tuple:
    """The file path leaves out the union tag pydantic puts after ``fluid``/``surroundings``."""
    return tuple(p for i, p in enumerate(loc)
                 if not (isinstance(p, str) and p in _UNION_TAGS and i > 0 and loc[i - 1] in ("fluid", "surroundings")))


def path_text(loc: Sequence) -> str:
    """``('alternatives', 0, 'segments', 2, 'length_m')`` -> ``'alternatives[0].segments[2].length_m'``."""
    out = ""
    for part in loc:
        out += f"[{part}]" if isinstance(part, int) else ("." if out else "") + str(part)
    return out


def problems(exc, system: str, prefix: Path = "") -> list[tuple[str, str]]:
    """Every error of a ``pydantic.ValidationError`` as ``(file path, message in the user's words)``.

    ``prefix`` is where the validated object sits (``"segments[2]"`` when a Segment was
    validated; ``"fluid"`` for a fluid): it completes the path and lets the labels know their
    context. The path has no union tags (``surroundings.length_m``, not ``surroundings.wind...``).
    """
    head = split_path(prefix) if prefix else ()
    out = []
    for err in exc.errors(include_url=False):
        loc = head + tuple(err.get("loc", ()))
        message = field_problem(loc, err, err.get("input"), system)
        out.append((path_text(_strip_tags(loc)), message))
    return out


def validation_message(exc, system: str, prefix: Path = "", with_path: bool = False) -> str:
    """One line per error in the user's words (no JSON keys, no pydantic wording).

    ``with_path=True`` puts the file path in front (``"alternatives[0].segments[2].length_m — Length
    must be more than 0 m; you entered −5 m"``) for the CLI; editors leave it out, as the box that
    was refused is the field.
    """
    lines = []
    for path, message in problems(exc, system, prefix):
        lines.append(f"{path} — {message}" if with_path and path else message)
    return "\n".join(dict.fromkeys(lines))  # one line per distinct problem, in order
