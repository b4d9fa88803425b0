"""Every input bounded, strictly typed and, in a file, present (issue 9, deliverable 1).

What a user would notice: a project file with an absurd number (an insulation layer of 1e308 m, air
at 1 K or 1999 K) is refused on loading with the field's path and the value, never solved or drawn;
a typo such as ``"6"`` or ``true`` for a length is refused instead of read as 6 m or 1 m; a missing
length, bore, fluid or flow is refused with its path instead of becoming 10 m of NPS 2 carrying
1 kg/s of water. The bounds are ours, chosen in ``solver.model`` (each with its reason there); the
values below sit well outside what any process line has ("common practice").
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest
from pydantic import ValidationError

from solver.errors import ProjectFileError
from solver.model import (
    NAME_MAX_CHARS,
    TEXT_MAX_CHARS,
    Alternative,
    Buried,
    Feed,
    Fitting,
    FixedWall,
    Jacket,
    Layer,
    Limits,
    Pipe,
    Project,
    PureFluid,
    Segment,
    SteamTracer,
    StillAir,
    TableFluid,
    TableRow,
    Targets,
    Wind,
)
from solver.project_io import dump_project, parse_project

ROOT = Path(__file__).resolve().parents[1]


def every_kind() -> Project:
    """A project with every model object that holds a number (values plausible, invented)."""
    rows = [TableRow(temperature_K=t, density_kg_per_m3=950.0, specific_heat_J_per_kgK=2100.0,
                     viscosity_Pa_s=mu, conductivity_W_per_mK=0.14) for t, mu in ((280.0, 0.5), (380.0, 0.02))]
    traced = Segment(name="Traced", length_m=40.0, pipe=Pipe(nps="2", schedule="40"), heat_input_W_per_m=20.0,
                     insulation=[Layer(thickness_m=0.05, conductivity_W_per_mK=0.04)],
                     fittings=[Fitting(kind="elbow_90_standard", count=2), Fitting(kind="custom", K=2.0)],
                     steam_tracer=SteamTracer(steam_pressure_Pa=4e5), inside_fouling_m2K_per_W=1e-4,
                     surroundings=StillAir(temperature_K=268.15, film_coefficient_W_per_m2K=10.0))
    windy = Segment(name="Windy", length_m=30.0, elevation_change_m=3.0,
                    pipe=Pipe(bore="diameter", inner_diameter_m=0.05, wall_thickness_m=0.004, roughness_m=4.5e-5,
                              wall_conductivity_W_per_mK=45.0),
                    surroundings=Wind(temperature_K=258.15, wind_speed_m_per_s=8.0, film_coefficient_W_per_m2K=30.0))
    buried = Segment(name="Buried", length_m=60.0, surroundings=Buried(depth_m=1.2, soil_conductivity_W_per_mK=1.5))
    jacket = Segment(name="Jacket", length_m=5.0, surroundings=Jacket(medium_temperature_K=390.0,
                                                                      film_coefficient_W_per_m2K=3000.0))
    steam = Segment(name="Steam", length_m=4.0, surroundings=FixedWall(wall_temperature_K=None, steam_pressure_Pa=5e5,
                                                                       steam_side_fouling_m2K_per_W=1e-4))
    return Project(
        name="Bounds", alternatives=[
            Alternative(name="Table", fluid=TableFluid(rows=rows, freezing_point_K=270.0, boiling_point_K=500.0),
                        feed=Feed(inlet_temperature_K=350.0, inlet_pressure_Pa=5e5, mass_flow_kg_per_s=1.0),
                        segments=[traced, windy, buried, jacket, steam],
                        limits=Limits(max_inner_wall_temperature_K=450.0, min_bulk_temperature_K=300.0)),
            Alternative(name="Water", fluid=PureFluid(name="Water"),
                        feed=Feed(inlet_temperature_K=300.0, mass_flow_kg_per_s=None, volume_flow_m3_per_s=1e-3),
                        segments=[Segment(name="Held", length_m=10.0,
                                          surroundings=FixedWall(wall_temperature_K=350.0))]),
        ],
        targets=Targets(outlet_temperature_min_K=310.0, outlet_temperature_max_K=400.0,
                        max_inner_wall_temperature_K=460.0, max_pressure_drop_Pa=2e5, max_heat_input_W=5e4),
    )


def raw() -> dict:
    return json.loads(dump_project(every_kind()))


def put(data: dict, path: str, value) -> dict:
    """Set ``alternatives[0].segments[1].length_m`` style ``path`` in the raw dict."""
    *head, last = _parts(path)
    node = data
    for part in head:
        node = node[part]
    node[last] = value
    return data


def _parts(path: str) -> list:
    out: list = []
    for piece in path.replace("]", "").split("."):
        name, *indices = piece.split("[")
        out.append(name)
        out += [int(i) for i in indices]
    return out


def problems_of(data: dict) -> dict[str, str]:
    with pytest.raises(ProjectFileError) as info:
        parse_project(json.dumps(data))
    return dict(info.value.problems)


A0, A1 = "alternatives[0]", "alternatives[1]"
S = A0 + ".segments"

# (path, a value far outside, words of the refusal) — the unit in the words comes from the key
TOO_BIG = [
    (f"{S}[0].insulation[0].thickness_m", 1e308, "must be at most 1 m, got 1e+308 m"),  # the issue's crash
    (f"{S}[0].length_m", 1e6, "at most 100000 m"),
    (f"{S}[0].heater.output_W_per_m", 1e9, "at most 10000 W/m"),
    (f"{S}[0].inside_fouling_m2K_per_W", 5.0, "at most 0.01 m²·K/W"),
    (f"{S}[0].insulation[0].conductivity_W_per_mK", 1e9, "at most 500 W/(m·K)"),
    (f"{S}[0].fittings[1].K", 1e12, "at most 1000"),
    (f"{S}[0].fittings[0].count", 10**9, "at most 10000"),
    (f"{S}[0].steam_tracer.steam_pressure_Pa", 1e9, "at most 2e+07 Pa"),
    (f"{S}[0].steam_tracer.tube_outer_diameter_m", 2.0, "at most 0.06 m"),
    (f"{S}[0].steam_tracer.count", 50, "at most 12"),
    (f"{S}[0].surroundings.temperature_K", 1999.0, "at most 473.15 K"),  # the issue: air at 1,999 K
    (f"{S}[0].surroundings.film_coefficient_W_per_m2K", 1e7, "at most 1000 W/(m²·K)"),
    (f"{S}[1].pipe.inner_diameter_m", 30.0, "at most 3 m"),
    (f"{S}[1].pipe.wall_thickness_m", 1.0, "at most 0.1 m"),
    (f"{S}[1].pipe.roughness_m", 0.5, "at most 0.01 m"),
    (f"{S}[1].pipe.wall_conductivity_W_per_mK", 1e5, "at most 500 W/(m·K)"),
    (f"{S}[1].surroundings.wind_speed_m_per_s", 1e4, "at most 100 m/s"),
    (f"{S}[1].surroundings.temperature_K", 1e4, "at most 473.15 K"),
    (f"{S}[2].surroundings.soil_temperature_K", 900.0, "at most 373.15 K"),
    (f"{S}[2].surroundings.depth_m", 1e5, "at most 100 m"),
    (f"{S}[2].surroundings.soil_conductivity_W_per_mK", 1e3, "at most 10 W/(m·K)"),
    (f"{S}[3].surroundings.medium_temperature_K", 5000.0, "at most 1000 K"),
    (f"{S}[3].surroundings.film_coefficient_W_per_m2K", 1e9, "at most 100000 W/(m²·K)"),
    (f"{S}[4].surroundings.steam_pressure_Pa", 1e9, "at most 2e+07 Pa"),
    (f"{S}[4].surroundings.steam_side_fouling_m2K_per_W", 1.0, "at most 0.01 m²·K/W"),
    (f"{A1}.segments[0].surroundings.wall_temperature_K", 3000.0, "at most 1000 K"),
    (f"{A0}.feed.inlet_temperature_K", 1e4, "at most 1000 K"),
    (f"{A0}.feed.inlet_pressure_Pa", 1e12, "at most 1e+08 Pa"),
    (f"{A0}.feed.mass_flow_kg_per_s", 1e9, "at most 100000 kg/s"),
    (f"{A1}.feed.volume_flow_m3_per_s", 1e6, "at most 100 m³/s"),
    (f"{A0}.fluid.rows[1].temperature_K", 5000.0, "at most 1000 K"),
    (f"{A0}.fluid.rows[0].density_kg_per_m3", 1e9, "at most 25000 kg/m³"),
    (f"{A0}.fluid.rows[0].specific_heat_J_per_kgK", 1e9, "at most 50000 J/(kg·K)"),
    (f"{A0}.fluid.rows[0].viscosity_Pa_s", 1e9, "at most 100000 Pa·s"),
    (f"{A0}.fluid.rows[0].conductivity_W_per_mK", 1e9, "at most 200 W/(m·K)"),
    (f"{A0}.fluid.freezing_point_K", 1e5, "at most 1000 K"),
    (f"{A0}.fluid.boiling_point_K", 1e5, "at most 1000 K"),
    (f"{A0}.limits.max_inner_wall_temperature_K", 1e5, "at most 1000 K"),
    (f"{A0}.limits.min_bulk_temperature_K", 1e5, "at most 1000 K"),
    ("targets.outlet_temperature_min_K", 1e5, "at most 1000 K"),
    ("targets.outlet_temperature_max_K", 1e5, "at most 1000 K"),
    ("targets.max_inner_wall_temperature_K", 1e5, "at most 1000 K"),
    ("targets.max_pressure_drop_Pa", 1e15, "at most 1e+08 Pa"),
    ("targets.max_heat_input_W", 1e15, "at most 1e+09 W"),
]

# (path, a value far below, words): zero or negative reads "more than 0", a tiny positive "at least"
TOO_SMALL = [
    (f"{S}[0].length_m", -2, "must be more than 0 m, got -2 m"),
    (f"{S}[0].length_m", 1e-300, "at least 0.001 m"),
    (f"{S}[0].surroundings.temperature_K", 1.0, "at least 173.15 K"),  # the issue: air at 1 K
    (f"{S}[0].insulation[0].thickness_m", 1e-9, "at least 0.0001 m"),
    (f"{S}[1].pipe.inner_diameter_m", 1e-300, "at least 0.001 m"),
    (f"{S}[1].surroundings.wind_speed_m_per_s", 1e-300, "at least 0.1 m/s"),
    (f"{S}[2].surroundings.soil_temperature_K", 100.0, "at least 223.15 K"),
    (f"{S}[2].surroundings.depth_m", 1e-6, "at least 0.01 m"),
    (f"{S}[0].heater.output_W_per_m", -5.0, "at least 0 W/m"),
    (f"{A0}.feed.mass_flow_kg_per_s", 5e-324, "at least 1e-06 kg/s"),
    (f"{A0}.feed.inlet_pressure_Pa", 1.0, "at least 1000 Pa"),
    (f"{A0}.feed.inlet_temperature_K", 0, "must be more than 0 K"),
    (f"{A1}.feed.volume_flow_m3_per_s", 1e-300, "at least 1e-09 m³/s"),
    (f"{S}[4].surroundings.steam_pressure_Pa", 10.0, "at least 1000 Pa"),
    (f"{A0}.fluid.rows[0].viscosity_Pa_s", 1e-300, "at least 1e-06 Pa·s"),
]


@pytest.mark.parametrize("path, value, words", TOO_BIG + TOO_SMALL, ids=lambda v: str(v)[:50])
def test_a_value_out_of_range_is_refused_naming_field_and_value(path, value, words):
    found = problems_of(put(raw(), path, value))
    assert path in found, found
    assert words in found[path]


def test_the_edges_of_each_range_are_accepted():
    # a long line, a large bore, thick insulation, the coldest and hottest air, strong tracing: all
    # plausible (common practice), so all must load
    data = raw()
    for path, value in [(f"{S}[0].length_m", 1e5), (f"{S}[0].insulation[0].thickness_m", 1.0),
                        (f"{S}[0].surroundings.temperature_K", 173.15), (f"{S}[1].surroundings.temperature_K", 473.15),
                        (f"{S}[0].heater.output_W_per_m", 1e4), (f"{S}[1].pipe.inner_diameter_m", 3.0),
                        (f"{A0}.feed.inlet_pressure_Pa", 1e8), (f"{A0}.feed.mass_flow_kg_per_s", 1e-6)]:
        put(data, path, value)
    project = parse_project(json.dumps(data))
    assert project.alternatives[0].segments[0].insulation[0].thickness_m == 1.0


def test_elevation_is_bounded_by_the_length():
    found = problems_of(put(raw(), f"{S}[0].elevation_change_m", -1e300))
    assert "alternatives[0].segments[0].elevation_change_m" in found


def test_bounds_hold_when_editing_in_the_app_too():
    # the model refuses on assignment, so an editor cannot store what a file may not hold
    layer = Layer(thickness_m=0.05, conductivity_W_per_mK=0.04)
    with pytest.raises(ValidationError):
        layer.thickness_m = 1e308
    with pytest.raises(ValidationError):
        StillAir(temperature_K=1.0)
    assert layer.thickness_m == 0.05


def test_the_bounds_can_be_read_from_the_model():
    """The fuzz strategies read the bounds by introspection: they must be in the field metadata."""
    def bounds(model, name):
        info = model.model_fields[name]
        metadata = list(info.metadata)
        for arg in getattr(info.annotation, "__args__", ()):  # Optional[Annotated[float, ...]]
            metadata += list(getattr(arg, "__metadata__", ()))
        flat = [c for m in metadata for c in (getattr(m, "metadata", None) or [m])]
        return ([getattr(c, "ge", getattr(c, "gt", None)) for c in flat if hasattr(c, "ge") or hasattr(c, "gt")],
                [getattr(c, "le", getattr(c, "lt", None)) for c in flat if hasattr(c, "le") or hasattr(c, "lt")])

    lows, highs = bounds(Layer, "thickness_m")
    assert min(highs) == 1.0 and max(lows) == 1e-4
    lows, highs = bounds(Pipe, "inner_diameter_m")
    assert min(highs) == 3.0
    lows, highs = bounds(StillAir, "temperature_K")
    assert (max(lows), min(highs)) == (173.15, 473.15)


# --------------------------------------------------------------------------- strict types in a file


@pytest.mark.parametrize("bad", ["6", True, False, None, [6], {"value": 6}])
def test_a_number_given_as_text_or_boolean_is_refused(bad):
    # issue 9: "6" became 6 m and true became 1 m
    found = problems_of(put(raw(), f"{S}[1].length_m", bad))
    assert repr(bad)[:20] in found[f"{S}[1].length_m"] or "valid" in found[f"{S}[1].length_m"]
    assert "valid number" in found[f"{S}[1].length_m"]


@pytest.mark.parametrize("bad", ["2", True, 2.0])
def test_a_count_must_be_a_whole_json_number(bad):
    found = problems_of(put(raw(), f"{S}[0].fittings[0].count", bad))
    assert "valid integer" in found[f"{S}[0].fittings[0].count"]


def test_whole_numbers_are_fine_for_decimals():
    data = put(put(raw(), f"{S}[0].length_m", 40), f"{A0}.feed.inlet_temperature_K", 350)
    project = parse_project(json.dumps(data))
    assert project.alternatives[0].segments[0].length_m == 40.0


def test_code_can_still_build_the_model_from_python_numbers():
    # the app builds models from parsed entries; strictness is for files only
    assert Segment(length_m=12, pipe=Pipe(nps="1", schedule="80")).length_m == 12.0


# --------------------------------------------------------------------------- keys a file must give


@pytest.mark.parametrize("path, key", [
    (f"{S}[2]", "length_m"),
    (f"{S}[2]", "pipe"),
    (A0, "feed"),
    (A1, "fluid"),
    (f"{A0}.feed", "inlet_temperature_K"),
    (f"{A1}.fluid", "name"),
    (f"{S}[0].pipe", "nps"),
    (f"{S}[0].pipe", "schedule"),
])
def test_a_missing_key_that_defines_the_line_is_refused_with_its_path(path, key):
    data = raw()
    node = data
    for part in _parts(path):
        node = node[part]
    del node[key]
    found = problems_of(data)
    assert found.get(f"{path}.{key}") == "required, missing", found


def test_a_missing_flow_is_refused():
    # neither flow given: the default 1 kg/s must not stand in (issue 9)
    data = raw()
    del data["alternatives"][0]["feed"]["mass_flow_kg_per_s"]
    del data["alternatives"][0]["feed"]["volume_flow_m3_per_s"]
    found = problems_of(data)
    assert "mass_flow_kg_per_s" in found[f"{A0}.feed"] and "None" in found[f"{A0}.feed"]


def test_a_heating_medium_must_be_given():
    # a fixed wall or a jacket with nothing said would heat the line at a default temperature
    data = raw()
    wall = data["alternatives"][1]["segments"][0]["surroundings"]
    del wall["wall_temperature_K"], wall["steam_pressure_Pa"]
    del data["alternatives"][0]["segments"][3]["surroundings"]["medium_temperature_K"]
    found = problems_of(data)
    assert "wall_temperature_K=None" in found[f"{A1}.segments[0].surroundings"]
    assert found[f"{S}[3].surroundings.medium_temperature_K"] == "required, missing"


def test_a_missing_key_is_reported_with_every_other_problem():
    data = raw()
    del data["alternatives"][0]["segments"][2]["length_m"]
    data["alternatives"][1]["segments"][0]["surroundings"]["wall_temperature_K"] = 1e9
    found = problems_of(data)
    assert found[f"{S}[2].length_m"] == "required, missing"
    assert "at most 1000 K" in found[f"{A1}.segments[0].surroundings.wall_temperature_K"]


def test_the_cli_words_missing_keys_with_their_label():
    from app.cli import project_problems

    data = raw()
    del data["alternatives"][0]["segments"][2]["length_m"]
    with pytest.raises(ProjectFileError) as info:
        parse_project(json.dumps(data))
    _, lines = project_problems(info.value, "SI")
    assert lines[0].startswith("alternatives[0].segments[2].length_m — Length needs a value"), lines


def test_optional_keys_may_be_left_out():
    # a short hand-written file: no surroundings, fittings, insulation or limits (their defaults are
    # "none" or still air, stated in the file format) - it loads
    text = json.dumps({"format": "calorun-project", "schema_version": 1, "alternatives": [{
        "fluid": {"kind": "pure", "name": "Water"},
        "feed": {"inlet_temperature_K": 330.0, "mass_flow_kg_per_s": 0.5},
        "segments": [{"length_m": 20.0, "pipe": {"nps": "2", "schedule": "40"}}]}]})
    assert parse_project(text).alternatives[0].segments[0].length_m == 20.0


def test_every_sample_project_gives_every_required_key():
    for path in sorted((ROOT / "sample_projects").glob("*.json")) + [ROOT / "app" / "demo_project.json"]:
        parse_project(path.read_text(encoding="utf-8"))


# --------------------------------------------------------------------------- text


@pytest.mark.parametrize("path", ["name", "description", "prepared_by", "revision", f"{A0}.name",
                                  f"{A0}.description", f"{S}[0].name", f"{S}[0].fittings[1].label",
                                  f"{S}[0].insulation[0].material"])
def test_a_lone_surrogate_is_refused_on_load(path):
    # "\ud800" in JSON is a lone UTF-16 surrogate: it cannot be written as UTF-8, so a project holding
    # it could never be saved (issue 9); it is refused where it enters
    data = put(raw(), path, "Line \ud800 A")
    text = json.dumps(data)
    assert "\\ud800" in text  # json escapes it, exactly as a hostile file would hold it
    with pytest.raises(ProjectFileError) as info:
        parse_project(text)
    found = dict(info.value.problems)
    assert "cannot be saved (U+D800)" in found[path]


def test_a_lone_surrogate_is_refused_when_editing():
    project = every_kind()
    with pytest.raises(ValidationError) as info:
        project.name = "Line \udfff"
    assert "U+DFFF" in str(info.value)
    assert project.name == "Bounds"
    from app.messages import validation_message

    assert "cannot be saved (U+DFFF)" in validation_message(info.value, "SI")


def test_names_and_descriptions_have_a_length_limit():
    data = put(put(raw(), "name", "N" * (NAME_MAX_CHARS + 1)), "description", "D" * (TEXT_MAX_CHARS + 1))
    found = problems_of(data)
    assert f"at most {NAME_MAX_CHARS:,} characters" in found["name"]
    assert f"at most {TEXT_MAX_CHARS:,} characters" in found["description"]
    data = put(put(raw(), "name", "N" * NAME_MAX_CHARS), "description", "D" * TEXT_MAX_CHARS)
    assert len(parse_project(json.dumps(data)).name) == NAME_MAX_CHARS


def test_a_ten_million_character_name_gets_a_short_message():
    # issue 9: a 10-million-character name stalled the report; it is refused with a short message
    found = problems_of(put(raw(), f"{A0}.name", "x" * 10_000_000))
    assert len(found[f"{A0}.name"]) < 300 and "10,000,000" in found[f"{A0}.name"]


def test_the_cli_words_the_issues_crash_case_with_the_label():
    # 1e308 m shown in mm overflows a float: the message must still come, in the user's words
    from app.cli import project_problems

    data = put(raw(), f"{S}[0].insulation[0].thickness_m", 1e308)
    with pytest.raises(ProjectFileError) as info:
        parse_project(json.dumps(data))
    for system in ("SI", "US"):
        _, lines = project_problems(info.value, system)
        assert any("Insulation thickness (layer 1) must be at most" in line for line in lines), lines


def test_numbers_in_a_file_are_finite():
    # JSON has no NaN or Infinity, but Python's reader takes both tokens and 1e999 becomes inf
    for token in ("NaN", "Infinity", "1e999"):
        text = json.dumps(raw()).replace('"length_m": 40.0', f'"length_m": {token}', 1)
        with pytest.raises(ProjectFileError) as info:
            parse_project(text)
        assert f"{S}[0].length_m" in dict(info.value.problems)
    assert not math.isnan(parse_project(json.dumps(raw())).alternatives[0].segments[0].length_m)


def test_the_schema_lists_the_keys_a_file_must_give():
    # `calorun schema` describes the file: a tool that checks files against it refuses the same gaps
    defs = Project.model_json_schema()["$defs"]
    assert {"length_m", "pipe"} <= set(defs["Segment"]["required"])
    assert {"fluid", "feed", "segments"} <= set(defs["Alternative"]["required"])
    assert "inlet_temperature_K" in defs["Feed"]["required"]
    assert defs["Layer"]["properties"]["thickness_m"]["maximum"] == 1.0


def test_solution_concentration_beyond_its_solutes_range_is_refused_on_the_field():
    # CoolProp's INCOMP fit for potassium carbonate (MKC) covers mass fractions 0–0.4 (its fraction_max,
    # re-checked against CoolProp in tests/test_properties.py); the model's 0–1 alone would let 0.61 through
    import pytest
    from pydantic import ValidationError

    from solver.model import SolutionFluid

    with pytest.raises(ValidationError, match=r"Potassium carbonate is defined for 0 to 0\.4.*got 0\.61"):
        SolutionFluid(solute="MKC", concentration=0.61)
    assert SolutionFluid(solute="MKC", concentration=0.4).concentration == 0.4
