"""Parameters of the Target Finder and Sweep (solver.variants): each kind changes what it should and
nothing else; values outside the model's bounds are refused with the parameter and the value named.

The bounds are the model's own (solver.model); the insulation list is common practice (from memory) as
its docstring says; NPS sizes per schedule are ASME B36.10M's table (solver.catalogue).
"""

from __future__ import annotations

import pytest

from solver.errors import InputError
from solver.model import (Alternative, Buried, ConstantHeater, Feed, FixedWall, Jacket, Layer, Pipe, Segment,
                          SelfLimitingHeater, SteamTracer, StillAir, Wind)
from solver.variants import (PARAMETER_KINDS, STANDARD_INSULATION_THICKNESSES_M, Parameter, model_bounds,
                             parse_parameter, solve_variants)


def _alt() -> Alternative:
    """One segment of each sort a parameter acts on (not meant to be solved)."""
    return Alternative(name="Every kind", feed=Feed(inlet_temperature_K=330.0, mass_flow_kg_per_s=1.0), segments=[
        Segment(name="Traced", length_m=20.0, heater=ConstantHeater(output_W_per_m=20.0),
                insulation=[Layer(thickness_m=0.05, conductivity_W_per_mK=0.04)], surroundings=StillAir()),
        Segment(name="Steam traced", length_m=30.0, steam_tracer=SteamTracer(steam_pressure_Pa=4e5),
                insulation=[Layer(thickness_m=0.04), Layer(material="aluminium sheet", thickness_m=0.0008,
                                                           conductivity_W_per_mK=200.0)],
                surroundings=Wind()),
        Segment(name="Steam wall", length_m=5.0, elevation_change_m=-4.0,
                surroundings=FixedWall(wall_temperature_K=None, steam_pressure_Pa=6e5)),
        Segment(name="Jacketed", length_m=6.0, surroundings=Jacket(medium_temperature_K=380.0)),
        Segment(name="Held wall", length_m=7.0,
                pipe=Pipe(bore="diameter", inner_diameter_m=0.05, wall_thickness_m=0.003),
                surroundings=FixedWall(wall_temperature_K=390.0)),
        Segment(name="Self-limiting", length_m=40.0, surroundings=Buried(),
                heater=SelfLimitingHeater(output_low_W_per_m=30.0, temperature_low_K=283.15,
                                          output_high_W_per_m=10.0, temperature_high_K=338.15)),
    ])


def _flat(obj, prefix="") -> dict:
    if isinstance(obj, dict):
        out = {}
        for k, v in obj.items():
            out.update(_flat(v, f"{prefix}{k}."))
        return out
    if isinstance(obj, list):
        out = {}
        for i, v in enumerate(obj):
            out.update(_flat(v, f"{prefix}{i}."))
        return out
    return {prefix.rstrip("."): obj}


def _changes(before: Alternative, after: Alternative) -> dict:
    a, b = _flat(before.model_dump()), _flat(after.model_dump())
    return {k: (a.get(k), b.get(k)) for k in set(a) | set(b) if a.get(k) != b.get(k)}


# (parameter, value, the paths that must change, and to what; None = only that it changed)
CASES = [
    (Parameter("heater_output"), 40.0, {"segments.0.heater.output_W_per_m": 40.0,
                                        "segments.5.heater.output_low_W_per_m": 40.0,
                                        "segments.5.heater.output_high_W_per_m": 10.0 * 40.0 / 30.0}),
    (Parameter("insulation_thickness"), 0.08, {"segments.0.insulation.0.thickness_m": 0.08,
                                               "segments.1.insulation.0.thickness_m": 0.08}),  # cladding kept
    (Parameter("mass_flow"), 2.5, {"feed.mass_flow_kg_per_s": 2.5}),
    (Parameter("volume_flow"), 0.002, {"feed.mass_flow_kg_per_s": None, "feed.volume_flow_m3_per_s": 0.002}),
    (Parameter("bore"), "3", {f"segments.{i}.pipe.nps": "3" for i in (0, 1, 2, 3, 5)}),
    (Parameter("inlet_temperature"), 350.0, {"feed.inlet_temperature_K": 350.0}),
    (Parameter("steam_pressure"), 8e5, {"segments.1.steam_tracer.steam_pressure_Pa": 8e5,
                                        "segments.2.surroundings.steam_pressure_Pa": 8e5}),
    (Parameter("medium_temperature"), 400.0, {"segments.3.surroundings.medium_temperature_K": 400.0,
                                              "segments.4.surroundings.wall_temperature_K": 400.0}),
    (Parameter("segment_length", (2,)), 12.0, {"segments.2.length_m": 12.0}),
]


@pytest.mark.parametrize("parameter, value, expected", CASES, ids=[c[0].kind for c in CASES])
def test_apply_changes_what_it_should_and_nothing_else(parameter, value, expected):
    alt = _alt()
    before = alt.model_dump()
    new = parameter.apply(alt, value)
    assert alt.model_dump() == before  # the input is not touched
    changes = _changes(alt, new)
    assert set(changes) == set(expected)
    for path, want in expected.items():
        assert changes[path][1] == pytest.approx(want) if isinstance(want, float) else changes[path][1] == want


def test_apply_to_segments_without_the_thing_adds_it():
    alt = _alt()
    # a heater where there was none: a constant heater of that output
    new = Parameter("heater_output", (1,)).apply(alt, 12.0)
    assert new.segments[1].heater == ConstantHeater(output_W_per_m=12.0)
    # insulation where there was none: a copy of the first insulated segment's layer
    new = Parameter("insulation_thickness", (5,)).apply(alt, 0.03)
    assert new.segments[5].insulation == [Layer(thickness_m=0.03, conductivity_W_per_mK=0.04)]
    assert set(_changes(alt, new)) == {"segments.5.insulation.0.material", "segments.5.insulation.0.thickness_m",
                                       "segments.5.insulation.0.conductivity_W_per_mK"}
    # no insulated segment anywhere: mineral wool at the catalogue's k(T)
    bare = alt.model_copy(update={"segments": [s.model_copy(update={"insulation": []}) for s in alt.segments]})
    new = Parameter("insulation_thickness", (0,)).apply(bare, 0.025)
    assert new.segments[0].insulation == [Layer(material="mineral wool", thickness_m=0.025)]


@pytest.mark.parametrize("parameter, value", [
    (Parameter("heater_output"), -1.0),
    (Parameter("heater_output"), 2e4),
    (Parameter("insulation_thickness"), 0.0),
    (Parameter("insulation_thickness"), 1.5),
    (Parameter("mass_flow"), 0.0),
    (Parameter("volume_flow"), 1e3),
    (Parameter("bore"), "30"),
    (Parameter("inlet_temperature"), 20.0),
    (Parameter("steam_pressure"), 5e7),
    (Parameter("medium_temperature"), 1500.0),
    (Parameter("segment_length", (2,)), 3.0),  # shorter than its 4 m fall: the model's rule
    (Parameter("segment_length", (0,)), float("nan")),
    (Parameter("mass_flow"), "a lot"),
], ids=lambda x: x.kind if isinstance(x, Parameter) else repr(x))
def test_bad_values_are_refused_naming_parameter_and_value(parameter, value):
    with pytest.raises(InputError) as info:
        parameter.apply(_alt(), value)
    assert info.value.field == parameter.kind
    assert repr(value) in str(info.value) or str(value) in str(info.value)


def test_heater_output_refuses_a_fixed_wall_segment_and_self_limiting_zero():
    with pytest.raises(InputError, match="Held wall"):
        Parameter("heater_output", (4,)).apply(_alt(), 10.0)
    with pytest.raises(InputError, match="heater_output"):
        Parameter("heater_output", (5,)).apply(_alt(), 0.0)


def test_bounds_are_the_models():
    # solver.model: heater output 0..10 kW/m, layer 0.1 mm..1 m, steam 1 kPa..20 MPa
    assert model_bounds("heater_output") == (0.0, 1e4)
    assert model_bounds("insulation_thickness") == (1e-4, 1.0)
    assert model_bounds("steam_pressure") == (1e3, 2e7)


def test_parameter_words_lists_and_records():
    alt = _alt()
    p = Parameter("heater_output")
    assert p.segment_indices(alt) == [0, 5]
    assert p.label(alt) == "Heater output, segments 1, 6 (Traced, Self-limiting)"
    assert Parameter("heater_output", (1, 2)).quantity == "power_per_length"
    assert Parameter("medium_temperature").label(alt) == "Medium temperature, segments 4–5 (Jacketed, Held wall)"
    assert p.value_text(25.0) == "25 W/m"
    assert Parameter("insulation_thickness").value_text(0.04) == "40 mm"
    assert Parameter("bore").value_text("2") == "NPS 2"
    assert Parameter("insulation_thickness").discrete and Parameter("bore").discrete and not p.discrete
    # 13/20/25/30/40/50/65/80/100 mm (common practice, from memory: see the constant's comment)
    assert [round(t * 1000) for t in STANDARD_INSULATION_THICKNESSES_M] == [13, 20, 25, 30, 40, 50, 65, 80, 100]
    # ASME B36.10M: schedule 40 has no NPS 22 (22 in is listed for 10, 20, 30, STD, XS only)
    sizes = Parameter("bore").standard_values(alt)
    assert "2" in sizes and "24" in sizes and "22" not in sizes
    assert Parameter("segment_length", (2,)).current_value(alt) == 5.0
    assert p.current_value(alt) == 20.0
    assert Parameter.from_dict(Parameter("bore", (0, 3)).to_dict()) == Parameter("bore", (0, 3))
    lo, hi = Parameter("mass_flow").default_range(alt)
    assert (lo, hi) == (0.25, 4.0)


def test_parameter_needs_what_it_acts_on():
    with pytest.raises(InputError, match="segment_length"):
        Parameter("segment_length")
    with pytest.raises(InputError, match="feed"):
        Parameter("mass_flow", (0,))
    with pytest.raises(InputError, match="unknown parameter"):
        Parameter("colour")
    with pytest.raises(InputError, match="no such segment"):
        Parameter("heater_output", (9,)).apply(_alt(), 5.0)
    only_air = Alternative(segments=[Segment()])
    with pytest.raises(InputError, match="steam"):
        Parameter("steam_pressure").apply(only_air, 5e5)


def test_parse_parameter_forms():
    alt = _alt()
    assert parse_parameter("heater_output", alt) == Parameter("heater_output")
    assert parse_parameter("heater_output:1-2", alt) == Parameter("heater_output", (0, 1))
    assert parse_parameter("insulation_thickness:all", alt) == Parameter("insulation_thickness")
    assert parse_parameter("segment_length:Steam wall", alt) == Parameter("segment_length", (2,))
    assert parse_parameter("bore:1,Jacketed", alt) == Parameter("bore", (0, 3))
    for bad in ("segment_length", "heater_output:9", "heater_output:Nowhere", "speed"):
        with pytest.raises(InputError):
            parse_parameter(bad, alt)
    assert set(PARAMETER_KINDS) == {"heater_output", "insulation_thickness", "mass_flow", "volume_flow", "bore",
                                    "inlet_temperature", "steam_pressure", "medium_temperature", "segment_length"}


def test_solve_variants_keeps_order_and_refusals():
    alt = Alternative(name="Short", segments=[Segment(length_m=20.0, heater=ConstantHeater(output_W_per_m=5.0))])
    variants = solve_variants(alt, Parameter("heater_output"), [0.0, 50.0, -3.0, 20.0])
    assert [v.value for v in variants] == [0.0, 50.0, -3.0, 20.0]
    assert [v.ok for v in variants] == [True, True, False, True]
    assert variants[2].alternative is None and variants[2].outcome.error.field == "heater_output"
    outlets = [v.key_figures["outlet_temperature_K"] for v in variants if v.ok]
    assert outlets[0] < outlets[2] < outlets[1]  # more heat, warmer outlet
