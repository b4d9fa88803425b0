"""Messages in the user's words (app.messages): labels, display units, no file keys, no library text.

Unit conversions in the expected texts come from the definitions of the units (1 ft = 0.3048 m,
T[°F] = T[°C]·9/5 + 32). What a message must not contain is what a user would not understand:
the file's key names (``length_m``) and pydantic's own phrases ("Input should be ...").
"""

from __future__ import annotations

import json
import re
import typing

import pytest
from pydantic import BaseModel, ValidationError

from app import comparison, messages, units
from solver import model
from solver.model import Alternative, Feed, Project, Segment
from solver.project_io import dump_project

# pydantic's wording (pydantic 2 error messages); none of it may reach the user.
PYDANTIC_WORDS = ("Input should", "Value error", "Field required", "Extra inputs", "valid number",
                  "unable to parse", "Input tag", "List should")


def _spaced(text: str) -> str:
    """The text with its no-break spaces (number to unit) as plain spaces, to compare wording."""
    return text.replace("\u00a0", " ")


def _models() -> list[type[BaseModel]]:
    return [m for m in vars(model).values()
            if isinstance(m, type) and issubclass(m, BaseModel) and m.__module__ == model.__name__
            and not m.__name__.startswith("_")]


def _model_keys() -> set[str]:
    return {name for m in _models() for name in m.model_fields if "_" in name}


def _numeric(annotation) -> bool:
    args = typing.get_args(annotation)
    if args and typing.get_origin(annotation) is typing.Annotated:
        return _numeric(args[0])
    if args:
        return any(_numeric(a) for a in args if a is not type(None))
    return annotation in (float, int)


def _errors(data: dict) -> ValidationError:
    with pytest.raises(ValidationError) as info:
        Project.model_validate(data)
    return info.value


def _broken_project() -> dict:
    """A project file with one of each kind of mistake a person makes in a file."""
    data = json.loads(dump_project(Project(alternatives=[Alternative(segments=[Segment()])])))
    alt = data["alternatives"][0]
    seg = alt["segments"][0]
    seg["length_m"] = -5
    seg["heat_input_W_per_m"] = "lots"
    seg["insulation"] = [{"thickness_m": 0}]
    seg["fittings"] = [{"kind": "custom"}, {"count": 0}]
    seg["pipe"]["nps"] = "2.7"
    seg["colour"] = "red"
    seg["surroundings"] = {"kind": "jacket", "medium_temperature_K": -3, "film_coefficient_W_per_m2K": None}
    alt["feed"]["mass_flow_kg_per_s"] = None
    alt["fluid"] = {"kind": "solution", "concentration": 1.5}
    alt["segments"] += [
        {"length_m": 5, "elevation_change_m": 8},
        {"length_m": 5, "surroundings": {"kind": "indoors"}},
        {"length_m": 5, "surroundings": {"kind": "still_air", "emissivity": 2, "relative_humidity": 3}},
        {"length_m": 5, "heat_input_W_per_m": 10, "surroundings": {"kind": "fixed_wall"}},
        {"length_m": 5, "pipe": {"bore": "diameter"}},
    ]
    row = {"density_kg_per_m3": 1000, "specific_heat_J_per_kgK": 4000, "viscosity_Pa_s": 1e-3,
           "conductivity_W_per_mK": 0.6}
    data["alternatives"].append({"name": "Table", "segments": [],
                                 "fluid": {"kind": "table", "rows": [dict(row, temperature_K=300),
                                                                     dict(row, temperature_K=290)]}})
    data["targets"]["max_heat_input_W"] = 0
    return data


@pytest.mark.parametrize("system, expected", [
    ("SI", "Length must be more than 0 m; you entered \u22125 m"),
    ("US", "Length must be more than 0 ft; you entered \u221216.404 ft"),  # 5 m / 0.3048 m/ft
])
def test_negative_length_reads_with_label_and_unit(system, expected):
    with pytest.raises(ValidationError) as info:
        Segment(length_m=-5.0)
    text = messages.validation_message(info.value, system)
    assert _spaced(text) == expected
    assert "\u00a0" in text.rsplit("entered", 1)[1]  # a wrapped line never parts "−5" from "m"


def test_the_cli_form_keeps_the_file_path():
    data = json.loads(dump_project(Project(alternatives=[Alternative(segments=[Segment()] * 3)])))
    data["alternatives"][0]["segments"][2]["length_m"] = -5
    text = _spaced(messages.validation_message(_errors(data), "SI", with_path=True))
    assert text == "alternatives[0].segments[2].length_m — Length must be more than 0 m; you entered \u22125 m"


@pytest.mark.parametrize("system", units.UNIT_SYSTEMS)
def test_no_file_key_or_pydantic_wording_in_any_message(system):
    keys = _model_keys()
    found = messages.problems(_errors(_broken_project()), system)
    assert len(found) >= 15
    for path, message in found:
        words = set(re.findall(r"[A-Za-z0-9_]+", message))
        assert not words & keys, (path, message)
        for phrase in PYDANTIC_WORDS:
            assert phrase not in message, (path, message)


def test_model_rules_are_told_in_the_users_units():
    text = _spaced(messages.validation_message(_errors(_broken_project()), "US"))
    assert "Elevation change must not be more than the length" in text
    assert "26.247 ft over 16.404 ft" in text  # 8 m and 5 m in feet (1 ft = 0.3048 m)
    assert "Give the flow: a mass flow or a volume flow" in text
    assert "A custom fitting needs its loss coefficient K" in text
    assert "Count (fitting 2) must be at least 1; you entered 0" in text
    assert "Insulation thickness (layer 1) must be more than 0 in" in text
    # −3 K is below absolute zero: −459.67 °F is 0 K (definition of the Fahrenheit scale)
    assert "Medium temperature must be above absolute zero (\u2212459.67 °F)" in text
    assert "Concentration must be at most 100 %; you entered 150 %" in text
    assert "Table temperatures must increase row by row; row 2 has 62.33 °F after 80.33 °F" in text
    assert "An alternative needs at least 1 segment" in text
    # a schema-1 tracing power is read as a constant heater's output (solver.model), and refused as such
    assert "Heater output must be a number; you entered 'lots'" in text


def test_every_numeric_field_has_a_label_and_the_quantity_its_key_names():
    """Each number in the model has a label and a quantity whose SI unit is the one in its key name."""
    import pint

    reg = units.registry()
    suffix_unit = {"_K": "kelvin", "_m": "m", "_Pa": "Pa", "_W": "W", "_W_per_m": "W/m", "_W_per_mK": "W/m/K",
                   "_W_per_K": "W/K",
                   "_W_per_m2K": "W/m**2/K", "_m2K_per_W": "m**2*K/W", "_m_per_s": "m/s", "_kg_per_s": "kg/s", "_m3_per_s": "m**3/s",
                   "_kg_per_m3": "kg/m**3", "_J_per_kgK": "J/kg/K", "_Pa_s": "Pa*s"}
    checked = 0
    for m in _models():
        for name, f in m.model_fields.items():
            if not _numeric(f.annotation):
                continue
            info = messages.field_info(name)
            assert name in messages.FIELDS, f"{m.__name__}.{name} has no label"
            assert info.quantity in units.QUANTITIES, (m.__name__, name, info)
            suffix = max((s for s in suffix_unit if name.endswith(s)), key=len, default=None)
            if suffix is None:
                continue  # a plain number: emissivity, fraction, count, K
            base = reg.Quantity(1, units._SI_BASE[info.quantity])
            try:
                base.to(suffix_unit[suffix])
            except pint.errors.DimensionalityError:
                pytest.fail(f"{m.__name__}.{name}: quantity {info.quantity} is not in {suffix_unit[suffix]}")
            checked += 1
    assert checked >= 30


@pytest.mark.parametrize("path, label", [
    ("alternatives[0].segments[1].surroundings.still_air.temperature_K", "Air temperature"),
    ("surroundings.jacket.film_coefficient_W_per_m2K", "Jacket film coefficient"),
    ("insulation[1].thickness_m", "Insulation thickness"),
    ("fluid.rows[0].temperature_K", "Table temperature"),
    ("targets.max_inner_wall_temperature_K", "Inner-wall temperature target (at most)"),
    ("limits.max_inner_wall_temperature_K", "Max inner-wall temperature"),
    ("feed.volume_flow_m3_per_s", "Volume flow"),
    ("freezing point", "Freezing point"),  # a label given as it is
])
def test_labels_follow_where_the_field_sits(path, label):
    assert messages.field_label(path) == label


def test_mass_flow_typed_as_volume_flow_and_back():
    assert _spaced(messages.wrong_kind("35 gpm", "gpm", "volume_flow", "mass_flow", "SI")) == (
        "35 gpm is a volume flow — choose Volume flow, or give a mass flow such as 1200 kg/h")
    text = _spaced(messages.wrong_kind("900 kg/h", "kg/h", "mass_flow", "volume_flow", "US",
                                       field="feed.volume_flow_m3_per_s"))
    assert text == "Volume flow: 900 kg/h is a mass flow — choose Mass flow, or give a volume flow such as 35 gpm"


def test_a_prefix_gives_a_sub_model_its_place():
    with pytest.raises(ValidationError) as info:
        Feed(mass_flow_kg_per_s=-1.0)
    assert [(p, _spaced(m)) for p, m in messages.problems(info.value, "SI", prefix="alternatives[1].feed")] == [
        ("alternatives[1].feed.mass_flow_kg_per_s", "Mass flow must be more than 0 kg/h; you entered \u22123\u2009600 kg/h")]


def test_plural():
    assert messages.plural(1, "warning") == "1 warning"
    assert messages.plural(3, "warning") == "3 warnings"
    assert messages.plural(0, "danger") == "0 dangers"
    assert messages.plural(2, "info", "info") == "2 info"
    assert comparison.plural is messages.plural  # one rule for every count the app prints
    verdict = comparison.DesignVerdict(targets_met=1, targets_total=1, danger=0, warning=3)
    assert "3 warnings" in verdict.text() and "3 warning " not in verdict.text() + " "


def test_catalogue_refusals_name_the_field_by_its_label():
    from solver.errors import InputError

    text = messages.input_error_message(
        InputError("pipe.inner_diameter_m", None, "bore 'diameter' needs inner_diameter_m and wall_thickness_m"), "SI")
    assert text.startswith("Inner diameter: ")
    assert not set(re.findall(r"[A-Za-z0-9_]+", text)) & _model_keys(), text


def test_heater_and_heat_sink_rules_are_told_in_the_users_units():
    """The model's heater and heat-sink rules (solver.model) in the user's words; 1 ft = 0.3048 m,
    T[°F] = T[°C]·9/5 + 32, 1 W/K = 1.8956 Btu/(h·°F) (1 Btu/h = 0.293 071 W)."""
    data = json.loads(dump_project(Project(alternatives=[Alternative(segments=[Segment()])])))
    seg = data["alternatives"][0]["segments"][0]
    seg["surroundings"] = {"kind": "fixed_wall", "wall_temperature_K": 423.15}
    seg["heater"] = {"kind": "thermostat", "output_W_per_m": 10 / 0.3048, "set_point_K": 278.15, "count": 2}
    data["alternatives"][0]["segments"].append(  # (a field's error stops the segment's own rules: apart)
        {"length_m": 5, "heat_sinks": [{"kind": "valve", "bare_length_m": 0.3048, "loss_W_per_K": 1.0}]})
    data["alternatives"][0]["segments"].append(
        {"length_m": 5, "heater": {"kind": "self_limiting", "output_low_W_per_m": 10, "temperature_low_K": 283.15,
                                   "output_high_W_per_m": 5, "temperature_high_K": 273.15}})
    found = messages.problems(_errors(data), "US")
    text = _spaced("\n".join(m for _p, m in found))
    assert ("Electric tracing cannot be combined with a fixed wall temperature (the wall already has its "
            "temperature); you entered thermostat-controlled 10 W/ft set at 41 °F × 2 runs") in text
    assert ("A heat sink takes one of equivalent length, bare pipe length or loss per kelvin, not several; "
            "you entered bare pipe length 1 ft and loss per kelvin 1.8956 Btu/(h·°F)") in text
    assert "Upper rating temperature must be above the lower rating temperature; you entered 32 °F and 50 °F" in text
    keys = _model_keys()
    for path, message in found:
        assert not set(re.findall(r"[A-Za-z0-9_]+", message)) & keys, (path, message)
