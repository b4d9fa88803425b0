"""Messages in the user's words: field labels, display units, no JSON keys, no library wording.

No Qt here (a headless module like :mod:`app.units`): the CLI prints these messages and the
GUI's editors show them under the box that was refused.

- :func:`field_label` / :func:`field_info`: the label and quantity of any model field, from a
  path as the file writes it (``alternatives[0].segments[2].length_m`` -> ``"Length"``, length).
- :func:`field_problem`: one refused value, e.g. ``"Length must be more than 0 m; you entered −5 m"``.
- :func:`problems` / :func:`validation_message`: every error of a ``pydantic.ValidationError`` in
  those words (the CLI keeps the file path in front: ``"alternatives[0].segments[2].length_m — …"``).
- :func:`value_required`, :func:`unreadable_entry`, :func:`unknown_unit`, :func:`wrong_kind` (from
  :mod:`app.fields`, re-exported): what :func:`app.units.parse` says about a typed entry it cannot take ("35 gpm is a volume flow —
  choose Volume flow, or give a mass flow such as 1200 kg/h").
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from typing import Any, Iterable, Mapping, Optional, Sequence, Union

from app import units
from app.fields import (  # noqa: F401 - the entry wording is re-exported: callers know it as messages.*
    FIELDS,
    OBJECTS,
    UNION_TAGS,
    UNIT_SUFFIX,
    FieldInfo,
    Path,
    example,
    field_info,
    field_label,
    item_words,
    needs_value,
    split_path,
    unknown_unit,
    unreadable_entry,
    value_required,
    wrong_kind,
)

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
            return needs_value(subject, quantity, system)
        return f"{subject} must be a number; you entered {entered(value, '', system)}"
    if kind == "finite_number":
        return f"{subject} must be a finite number; you entered {entered(value, '', system)}"
    if kind == "int_from_float":
        return f"{subject} must be a whole number; you entered {entered(value, '', system)}"
    if kind == "missing":
        return needs_value(subject, quantity, system)
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
    """Electric tracing on a held wall: the wall already has its temperature, so the heater has no place."""
    heater = _get(obj, "heater")
    entry = heater_words(heater, system) if heater is not None else ""
    if not entry:  # a file of schema 1 or a message without the heater: the figure the model quotes
        q = _number_in(m.string)
        entry = entered(q, "power_per_length", system) if q is not None else ""
    return ("Electric tracing cannot be combined with a fixed wall temperature (the wall already has its "
            f"temperature){'; you entered ' + entry if entry else ''} — choose no heater or other surroundings")


#: Heater kind -> what the editor and the messages call it (order = the editor's choices after "none").
HEATER_KINDS: dict[str, str] = {
    "constant": "Constant output",
    "self_limiting": "Self-limiting (output falls as the pipe warms)",
    "thermostat": "Thermostat-controlled",
}


def heater_words(heater: Any, system: str) -> str:
    """A heater in a few words, in the user's units: ``'constant output 25 W/m × 2 runs'``."""
    kind = _get(heater, "kind")
    runs = _get(heater, "count")
    ratio = _get(heater, "heater_per_pipe_length")
    if kind == "self_limiting":
        lo, t_lo = _get(heater, "output_low_W_per_m"), _get(heater, "temperature_low_K")
        hi, t_hi = _get(heater, "output_high_W_per_m"), _get(heater, "temperature_high_K")
        text = (f"self-limiting {entered(lo, 'power_per_length', system)} at {entered(t_lo, 'temperature', system)}, "
                f"{entered(hi, 'power_per_length', system)} at {entered(t_hi, 'temperature', system)}")
    elif kind == "thermostat":
        text = (f"thermostat-controlled {entered(_get(heater, 'output_W_per_m'), 'power_per_length', system)} "
                f"set at {entered(_get(heater, 'set_point_K'), 'temperature', system)}")
    elif kind == "constant":
        text = f"constant output {entered(_get(heater, 'output_W_per_m'), 'power_per_length', system)}"
    else:
        return ""
    if _is_number(runs) and runs != 1:
        text += f" × {plural(int(runs), 'run')}"
    if _is_number(ratio) and ratio != 1:
        text += f", {units.format_number(float(ratio), 3)} m of heater per m of pipe"
    return text


def _number_in(text: str, after: str = ", got ") -> Optional[float]:
    """The first number after ``after`` in a model validator's message (None when there is none)."""
    _, _, got = text.rpartition(after)
    hit = re.match(r"\s*([-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?)", got)
    return float(hit.group(1)) if hit else None


def _heater_total_rule(m, obj, system):
    total = _number_in(m.string)
    heater = _get(obj, "heater")
    shown = f"; you entered {heater_words(heater, system)}" if heater is not None else ""
    if total is not None:
        shown += f", {entered(total, 'power_per_length', system)} per length of pipe"
    return ("Heater output per length of pipe (output × runs × heater per metre of pipe) must be at most "
            f"{entered(1e4, 'power_per_length', system)}{shown}")


def _rating_temperatures_rule(m, obj, system):
    lo, hi = _get(obj, "temperature_low_K"), _get(obj, "temperature_high_K")
    return ("Upper rating temperature must be above the lower rating temperature; you entered "
            f"{entered(hi, 'temperature', system)} and {entered(lo, 'temperature', system)}")


def _rating_outputs_rule(m, obj, system):
    lo, hi = _get(obj, "output_low_W_per_m"), _get(obj, "output_high_W_per_m")
    return ("Output at the upper rating temperature must be below the output at the lower one (a self-limiting "
            f"heater gives less when hotter); you entered {entered(hi, 'power_per_length', system)} and "
            f"{entered(lo, 'power_per_length', system)}")


def _one_sink_size_rule(m, obj, system):
    given = [f"{label} {entered(_get(obj, key), quantity, system)}" for key, label, quantity in (
        ("equivalent_length_m", "equivalent length", "length"), ("bare_length_m", "bare pipe length", "length"),
        ("loss_W_per_K", "loss per kelvin", "conductance")) if _get(obj, key) is not None]
    return ("A heat sink takes one of equivalent length, bare pipe length or loss per kelvin, not several; "
            f"you entered {' and '.join(given)}")


def _flow_rule(m, obj, system):
    mass, volume = _get(obj, "mass_flow_kg_per_s"), _get(obj, "volume_flow_m3_per_s")
    if mass is None and volume is None:
        return "Give the flow: a mass flow or a volume flow"
    return (f"Give a mass flow or a volume flow, not both; you entered {entered(mass, 'mass_flow', system)} "
            f"and {entered(volume, 'volume_flow', system)}")


def _fixed_wall_rule(m, obj, system):
    t, p = _get(obj, "wall_temperature_K"), _get(obj, "steam_pressure_Pa")
    if t is None and p is None:
        return "Give the wall temperature, or the pressure of the steam that heats the wall"
    return (f"Give the wall temperature or the steam pressure, not both; you entered "
            f"{entered(t, 'temperature', system)} and {entered(p, 'pressure', system)}")


_OUTSIDE_WORDS = {"jacket": "a jacket: the jacket already sets what is outside the pipe",
                  "fixed_wall": "a fixed wall (held temperature or condensing steam): the wall already has its heat"}


def _steam_tracer_rule(m, obj, system):
    """A tracer with a jacket or a fixed wall: the outside is already set, so the tracer has no place."""
    tracer, outside = _get(obj, "steam_tracer"), _get(obj, "surroundings")
    kind = _get(outside, "kind") if outside is not None else None
    with_what = _OUTSIDE_WORDS.get(kind, "these surroundings")
    count, pressure = _get(tracer, "count"), _get(tracer, "steam_pressure_Pa")
    entry = ""
    if _is_number(count) and _is_number(pressure):
        tubes = plural(int(count), "tube")
        entry = f"; you entered {tubes} with steam at {entered(pressure, 'pressure', system)}"
    return f"Steam tracer cannot be combined with {with_what}{entry} — remove the tracer or choose other surroundings"


def _rows_rule(m, obj, system):
    row, t_after, t_before = int(m.group(1)), float(m.group(2)), float(m.group(3))
    return (f"Table temperatures must increase row by row; row {row + 1} has "
            f"{entered(t_after, 'temperature', system)} after {entered(t_before, 'temperature', system)}")


_VALUE_RULES: tuple[tuple[re.Pattern, Any], ...] = (
    (re.compile(r"^elevation_change_m must not exceed length_m"), _elevation_rule),
    (re.compile(r"^heat_input_W_per_m cannot be combined with a fixed wall"), _tracing_rule),
    (re.compile(r"^heater output per metre of pipe .* must be at most"), _heater_total_rule),
    (re.compile(r"^temperature_high_K must be above temperature_low_K"), _rating_temperatures_rule),
    (re.compile(r"^output_high_W_per_m must be below output_low_W_per_m"), _rating_outputs_rule),
    (re.compile(r"^give at most one of equivalent_length_m, bare_length_m or loss_W_per_K"), _one_sink_size_rule),
    (re.compile(r"^an 'other' heat sink needs"),
     lambda m, obj, s: "An 'other' heat sink needs its size: an equivalent length, a bare pipe length or a loss per kelvin"),
    (re.compile(r"^give heater or heat_input_W_per_m, not both"),
     lambda m, obj, s: "Give the heater or the tracing power, not both"),
    (re.compile(r"^give exactly one of mass_flow_kg_per_s or volume_flow_m3_per_s"), _flow_rule),
    (re.compile(r"^give exactly one of wall_temperature_K or steam_pressure_Pa"), _fixed_wall_rule),
    (re.compile(r"^steam_tracer cannot be combined with a jacket or a fixed wall"), _steam_tracer_rule),
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
        if name in FIELDS or UNIT_SUFFIX.search(name):
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
    """The file path leaves out the union tag pydantic puts after ``fluid``/``surroundings``/``heater``."""
    return tuple(p for i, p in enumerate(loc)
                 if not (isinstance(p, str) and p in UNION_TAGS and i > 0
                         and loc[i - 1] in ("fluid", "surroundings", "heater")))


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
