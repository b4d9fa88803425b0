"""Project files: JSON round trip, every bad input named with its path and value, atomic save.

The expectations are those of issue 2 item 2 (DESIGN §4): e.g.
``alternatives[1].segments[3].length_m: must be > 0, got -2``. JSON itself is RFC 8259.
"""

from __future__ import annotations

import copy
import json
import os

import pytest

from solver import project_io
from solver.errors import ProjectFileError
from solver.model import (
    Adiabatic,
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
    SolutionFluid,
    StillAir,
    TableFluid,
    TableRow,
    Targets,
    Wind,
)
from solver.project_io import dump_project, load_project, parse_project, save_project


def rich_project() -> Project:
    """Every kind of fluid, bore, fitting and surroundings, several alternatives."""
    rows = [TableRow(temperature_K=t, density_kg_per_m3=rho, specific_heat_J_per_kgK=2000.0 + t,
                     viscosity_Pa_s=mu, conductivity_W_per_mK=0.15)
            for t, rho, mu in ((280.0, 960.0, 2.5), (320.0, 940.0, 0.3), (380.0, 910.0, 0.04))]
    segs = [
        Segment(name="Still air", length_m=12.5, pipe=Pipe(nps="2", schedule="40"), heat_input_W_per_m=25.0,
                insulation=[Layer(material="mineral wool", thickness_m=0.04, conductivity_W_per_mK=0.04)],
                fittings=[Fitting(kind="elbow_90_standard", count=2), Fitting(kind="custom", K=1.7, label="strainer")],
                surroundings=StillAir(temperature_K=268.15, emissivity=0.3)),
        Segment(name="Wind", length_m=30.0, elevation_change_m=-4.0,
                pipe=Pipe(bore="diameter", inner_diameter_m=0.0409, wall_thickness_m=0.0032, material="stainless steel",
                          roughness_m=1.5e-5, wall_conductivity_W_per_mK=16.0),
                surroundings=Wind(temperature_K=258.15, wind_speed_m_per_s=9.0, film_coefficient_W_per_m2K=40.0)),
        Segment(name="Buried", length_m=80.0, pipe=Pipe(nps="1-1/2", schedule="80"),
                surroundings=Buried(soil_temperature_K=281.0, depth_m=0.9, soil_conductivity_W_per_mK=1.5)),
        Segment(name="Jacket", length_m=6.0, surroundings=Jacket(medium_temperature_K=393.15, film_coefficient_W_per_m2K=2500.0)),
        Segment(name="Steam", length_m=4.0, surroundings=FixedWall(wall_temperature_K=None, steam_pressure_Pa=4.5e5)),
        Segment(name="Adiabatic", length_m=3.0, surroundings=Adiabatic()),
    ]
    return Project(
        name="Tank farm transfer line", description="Invented plant; all values illustrative. Ünïcödé °C",
        prepared_by="Process group", revision="B",
        alternatives=[
            Alternative(name="Base", fluid=TableFluid(name="Wax blend", rows=rows, freezing_point_K=275.0),
                        feed=Feed(inlet_temperature_K=330.0, inlet_pressure_Pa=6e5, mass_flow_kg_per_s=1.5),
                        segments=segs, limits=Limits(max_inner_wall_temperature_K=400.0, min_bulk_temperature_K=300.0)),
            Alternative(name="Glycol", fluid=SolutionFluid(solute="MPG", concentration=0.4),
                        feed=Feed(inlet_temperature_K=270.0, inlet_pressure_Pa=4e5, mass_flow_kg_per_s=None,
                                  volume_flow_m3_per_s=0.002),
                        segments=segs[:4]),
            Alternative(name="Nitrogen", fluid=PureFluid(name="Nitrogen"), segments=[segs[0], segs[1], segs[0], segs[2]]),
        ],
        baseline="Glycol",
        targets=Targets(outlet_temperature_min_K=305.0, max_pressure_drop_Pa=2e5),
    )


def raw() -> dict:
    return json.loads(dump_project(rich_project()))


def problems_of(data) -> list[tuple[str, str]]:
    text = data if isinstance(data, str) else json.dumps(data)
    with pytest.raises(ProjectFileError) as info:
        parse_project(text)
    assert info.value.problems, "a ProjectFileError must list its problems"
    return info.value.problems


def find(problems, path):
    hits = [msg for p, msg in problems if p == path]
    assert hits, f"no problem at {path!r}; got {problems}"
    return hits[0]


# --------------------------------------------------------------------------- round trip


def test_round_trip_equal_and_byte_identical():
    project = rich_project()
    text = dump_project(project)
    again = parse_project(text)
    assert again == project
    assert dump_project(again) == text
    data = json.loads(text)  # plain JSON (RFC 8259): no NaN/Infinity tokens, format tag and version present
    assert data["format"] == "calorun-project" and data["schema_version"] == 2
    assert "NaN" not in text and "Infinity" not in text
    assert text.endswith("\n")


def test_round_trip_through_a_file(tmp_path):
    project = rich_project()
    path = save_project(project, tmp_path / "line.json")
    assert load_project(path) == project
    assert path.read_text(encoding="utf-8") == dump_project(project)
    assert json.loads(path.read_text(encoding="utf-8"))["description"].endswith("Ünïcödé °C")


# --------------------------------------------------------------------------- bad input


def test_negative_length_names_path_and_value():
    data = raw()
    data["alternatives"][0]["segments"][3]["length_m"] = -2
    msg = find(problems_of(data), "alternatives[0].segments[3].length_m")
    assert "-2" in msg and "0" in msg  # "must be > 0, got -2" (issue 2 example)
    data = raw()
    data["alternatives"][2]["segments"][3]["length_m"] = -2
    assert "-2" in find(problems_of(data), "alternatives[2].segments[3].length_m")


def test_unknown_fluid_kind():
    data = raw()
    data["alternatives"][1]["fluid"]["kind"] = "plasma"
    problems = problems_of(data)
    paths = [p for p, _ in problems]
    assert any(p.startswith("alternatives[1].fluid") for p in paths), problems
    text = " ".join(m for p, m in problems if p.startswith("alternatives[1].fluid"))
    assert "plasma" in text


def test_unknown_surroundings_kind():
    data = raw()
    data["alternatives"][0]["segments"][2]["surroundings"]["kind"] = "lava"
    problems = problems_of(data)
    text = " ".join(m for p, m in problems if p.startswith("alternatives[0].segments[2].surroundings"))
    assert "lava" in text, problems


def test_missing_field():
    data = raw()
    del data["alternatives"][0]["fluid"]["rows"][1]["viscosity_Pa_s"]
    msg = find(problems_of(data), "alternatives[0].fluid.rows[1].viscosity_Pa_s")
    assert "missing" in msg
    data = raw()
    del data["alternatives"]
    assert "missing" in find(problems_of(data), "alternatives")


def test_wrong_type():
    data = raw()
    data["alternatives"][0]["segments"][1]["length_m"] = "thirty"
    assert "thirty" in find(problems_of(data), "alternatives[0].segments[1].length_m")
    data = raw()
    data["alternatives"][0]["segments"] = {"not": "a list"}
    assert "not" in find(problems_of(data), "alternatives[0].segments")


def test_other_value_errors_name_the_value():
    data = raw()
    data["alternatives"][0]["segments"][0]["surroundings"]["emissivity"] = 1.4
    assert "1.4" in find(problems_of(data), "alternatives[0].segments[0].surroundings.emissivity")
    data = raw()
    data["alternatives"][0]["feed"]["inlet_pressure_Pa"] = 0
    assert "0" in find(problems_of(data), "alternatives[0].feed.inlet_pressure_Pa")
    data = raw()
    data["alternatives"][0]["segments"][0]["unexpected_key_m"] = 3
    problems = problems_of(data)
    assert any(p == "alternatives[0].segments[0].unexpected_key_m" for p, _ in problems), problems
    data = raw()
    data["alternatives"][0]["segments"][0]["fittings"][0]["count"] = 0
    assert "0" in find(problems_of(data), "alternatives[0].segments[0].fittings[0].count")


def test_model_level_rules_name_their_values():
    data = raw()
    data["alternatives"][0]["segments"][0]["elevation_change_m"] = 20.0  # more than the 12.5 m length
    problems = problems_of(data)
    text = " ".join(m for p, m in problems if p.startswith("alternatives[0].segments[0]"))
    assert "20" in text and "12.5" in text, problems
    data = raw()
    rows = data["alternatives"][0]["fluid"]["rows"]
    rows[1]["temperature_K"], rows[2]["temperature_K"] = rows[2]["temperature_K"], rows[1]["temperature_K"]
    text = " ".join(m for p, m in problems_of(data) if p.startswith("alternatives[0].fluid"))
    assert "380" in text and "320" in text


def test_every_problem_is_reported():
    data = raw()
    data["alternatives"][0]["segments"][0]["length_m"] = -1
    data["alternatives"][1]["feed"]["inlet_temperature_K"] = -5
    data["alternatives"][2]["segments"][1]["pipe"]["inner_diameter_m"] = "wide"
    problems = problems_of(data)
    paths = {p for p, _ in problems}
    assert {"alternatives[0].segments[0].length_m", "alternatives[1].feed.inlet_temperature_K",
            "alternatives[2].segments[1].pipe.inner_diameter_m"} <= paths
    with pytest.raises(ProjectFileError) as info:
        parse_project(json.dumps(data))
    # the exception text itself lists every problem with its path (what the CLI and GUI show)
    for path in ("alternatives[0].segments[0].length_m", "alternatives[1].feed.inlet_temperature_K"):
        assert path in str(info.value)


def test_bad_format_tag():
    data = raw()
    data["format"] = "some-other-tool"
    msg = find(problems_of(data), "format")
    assert "some-other-tool" in msg and "calorun-project" in msg
    data = raw()
    del data["format"]
    assert "None" in find(problems_of(data), "format")


def test_newer_schema_version():
    data = raw()
    data["schema_version"] = 99
    msg = find(problems_of(data), "schema_version")
    assert "99" in msg and "2" in msg
    data["schema_version"] = "one"
    assert "one" in find(problems_of(data), "schema_version")


def test_invalid_json():
    problems = problems_of('{"format": "calorun-project", "schema_version": 1,\n  "name": oops}')
    text = " ".join(m for _, m in problems)
    assert "line 2" in text and "column" in text
    problems = problems_of("[1, 2, 3]")
    assert "list" in " ".join(m for _, m in problems)


def test_missing_and_unreadable_files(tmp_path):
    with pytest.raises(ProjectFileError) as info:
        load_project(tmp_path / "nope.json")
    assert "nope.json" in str(info.value)
    bad = tmp_path / "latin1.json"
    bad.write_bytes(b'{"name": "\xe9"}')
    with pytest.raises(ProjectFileError):
        load_project(bad)


def test_migrations_run_before_validation(monkeypatch):
    """A registered migration rewrites an older raw dict (issue 2 item 2: migrations on raw JSON)."""
    data = raw()
    data["schema_version"] = 0
    data["title"] = data.pop("name")  # an imaginary version-0 key

    def v0_to_v1(d):
        d = dict(d)
        d["name"] = d.pop("title")
        return d

    monkeypatch.setitem(project_io.MIGRATIONS, 0, v0_to_v1)
    assert parse_project(json.dumps(data)) == rich_project()
    monkeypatch.delitem(project_io.MIGRATIONS, 0)
    assert "0" in find(problems_of(data), "schema_version")


# --------------------------------------------------------------------------- atomic save


def test_save_is_atomic_when_replace_fails(tmp_path, monkeypatch):
    target = tmp_path / "line.json"
    target.write_text("OLD CONTENT\n", encoding="utf-8")
    before = sorted(os.listdir(tmp_path))

    def boom(src, dst):
        raise OSError("disk full (simulated)")

    monkeypatch.setattr(os, "replace", boom)
    with pytest.raises(OSError, match="simulated"):
        save_project(rich_project(), target)
    assert target.read_text(encoding="utf-8") == "OLD CONTENT\n"
    assert sorted(os.listdir(tmp_path)) == before  # no temporary file left behind


def test_save_is_atomic_when_write_fails(tmp_path, monkeypatch):
    target = tmp_path / "line.json"
    target.write_text("OLD CONTENT\n", encoding="utf-8")

    def boom(fd):
        raise OSError("fsync failed (simulated)")

    monkeypatch.setattr(os, "fsync", boom)
    with pytest.raises(OSError, match="simulated"):
        save_project(rich_project(), target)
    assert target.read_text(encoding="utf-8") == "OLD CONTENT\n"
    assert os.listdir(tmp_path) == ["line.json"]


def test_save_overwrites_and_refuses_a_folder(tmp_path):
    target = tmp_path / "line.json"
    target.write_text("OLD\n", encoding="utf-8")
    save_project(rich_project(), target)
    assert parse_project(target.read_text(encoding="utf-8")) == rich_project()
    assert os.listdir(tmp_path) == ["line.json"]
    folder = tmp_path / "folder.json"
    folder.mkdir()
    with pytest.raises(OSError):
        save_project(rich_project(), folder)
    assert folder.is_dir() and not any(folder.iterdir())


def test_parse_does_not_mutate_input_dict():
    data = raw()
    snapshot = copy.deepcopy(data)
    project_io.project_from_dict(data)
    assert data == snapshot


def test_unknown_nps_and_schedule_are_refused_on_load_with_their_paths():
    # ASME B36.10M lists no NPS 2-3/8 and no schedule 170 for NPS 2 (schedules of NPS 2: 5S ... XXS)
    text = json.dumps({"format": "calorun-project", "schema_version": 1, "alternatives": [{"name": "A", "segments": [
        {"name": "S1", "length_m": 50, "pipe": {"nps": "2-3/8", "schedule": "40"}},
        {"name": "S2", "length_m": 5, "pipe": {"nps": "2", "schedule": "170"}}]}]})
    with pytest.raises(ProjectFileError) as info:
        parse_project(text)
    problems = dict(info.value.problems)
    assert "got '2-3/8'" in problems["alternatives[0].segments[0].pipe.nps"]
    assert "got '170'" in problems["alternatives[0].segments[1].pipe.schedule"]
    assert "40" in problems["alternatives[0].segments[1].pipe.schedule"]  # lists what exists


def test_saved_files_get_the_usual_permissions_not_the_temporary_files(tmp_path):
    # mkstemp makes 0600 files; a saved project should be readable like any other file (common practice)
    from solver.safe_write import atomic_write_text

    umask = os.umask(0o022)
    try:
        new = atomic_write_text(tmp_path / "new.txt", "x")
        assert new.stat().st_mode & 0o777 == 0o644
        existing = tmp_path / "shared.txt"
        existing.write_text("old")
        existing.chmod(0o664)
        atomic_write_text(existing, "new")
        assert existing.stat().st_mode & 0o777 == 0o664 and existing.read_text() == "new"
    finally:
        os.umask(umask)


def test_schema_1_tracing_becomes_a_constant_heater():
    # schema 1 (before heaters) gave tracing as one number per metre of pipe; the file keeps its meaning
    data = json.loads(dump_project(rich_project()))
    data["schema_version"] = 1
    for seg in data["alternatives"][0]["segments"]:
        seg.pop("heater", None), seg.pop("heat_sinks", None), seg.pop("design_margin", None)
        seg["heat_input_W_per_m"] = 0.0
    data.pop("design_cases", None)
    data["alternatives"][0]["limits"].pop("maintain_temperature_K", None)
    segs = data["alternatives"][0]["segments"]
    segs[0]["heat_input_W_per_m"] = 25.0
    project = parse_project(json.dumps(data))
    first = project.alternatives[0].segments[0]
    assert first.heater is not None and first.heater.kind == "constant"
    assert first.heater.output_W_per_m == 25.0 and first.heat_input_W_per_m == 25.0
    assert all(s.heater is None for s in project.alternatives[0].segments[1:])
    assert json.loads(dump_project(project))["schema_version"] == 2
    segs[0]["heat_input_W_per_m"] = -5.0  # still refused, on the heater it became
    msg = find(problems_of(json.dumps(data)), "alternatives[0].segments[0].heater.output_W_per_m")
    assert "-5" in msg
