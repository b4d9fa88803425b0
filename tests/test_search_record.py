"""Where an alternative came from (issue 11, deliverable 4): the search record in the model and the file,
and the report's section on it.

What a user would notice: a project saved before the Target Finder and Sweep existed opens as it did and is
written back byte for byte; an alternative the finder or a sweep made keeps its record through save and load;
an absurd record (a million sweep points, a key that is no figure) is refused with its path; the report states
what was searched, over what range, against which targets, the binding one and the value, and draws a sweep's
figures against the value swept with the targets as lines. Check values come from independent solves
(solver.solve) and from exact unit definitions (1 ft = 0.3048 m, NIST SP 811 appendix B).
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest

from solver import solve
from solver.model import MAX_SWEEP_POINTS, Project, SearchRecord, SweepPoint
from solver.project_io import dump_project, load_project, parse_project

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "app" / "demo_project.json"
BASE = "Trace 15 W/m, 80 mm wool"


def _demo() -> Project:
    return load_project(DEMO)


def _base(project: Project):
    return next(a for a in project.alternatives if a.name == BASE)


def _sweep_variants(values=(5.0, 10.0, 15.0, 20.0, 25.0, 30.0)):
    from solver.sweep import sweep
    from solver.variants import Parameter

    project = _demo()
    alt = _base(project)
    parameter = Parameter("heater_output")
    variants = [v for chunk in sweep(alt, parameter, list(values)) for v in chunk]
    return project, alt, parameter, variants


def _with(project: Project, alt) -> Project:
    data = project.model_dump()
    data["alternatives"].append(alt.model_dump())
    return Project.model_validate(data)


# --------------------------------------------------------------------------- the file


def test_a_file_without_search_records_loads_and_is_written_back_unchanged():
    # the demo project was written before search records existed
    text = DEMO.read_text(encoding="utf-8")
    project = parse_project(text)
    assert all(a.origin is None for a in project.alternatives)
    assert dump_project(project) == text
    assert '"origin"' not in dump_project(project)


def test_a_record_round_trips_through_save_and_load(tmp_path):
    from solver.project_io import save_project

    project = _demo()
    alt = _base(project)
    record = SearchRecord(
        tool="Sweep", base_alternative=alt.name, parameter={"kind": "bore", "segments": [0, 2]},
        parameter_text="Bore, segments 1, 3", parameter2={"kind": "heater_output", "segments": []},
        parameter2_text="Heater output, all 5 segments", searched="4 sizes from NPS 1 to NPS 3",
        targets=["outer surface at most 50.0 °C"], target_limits=[{"kind": "surface_max", "value": 323.15}],
        binding="outer surface at most 50.0 °C", value_text="NPS 1-1/2, 20 W/m", value="1-1/2", value2=20.0,
        explanation="Picked by hand from the grid.",
        sweep_points=[SweepPoint(value="1-1/2", value2=20.0, figures={"outlet_temperature_K": 345.5}),
                      SweepPoint(value="2", value2=20.0)])
    made = alt.model_copy(update={"name": "Picked", "origin": record})
    path = save_project(_with(project, made), tmp_path / "with origin.json")
    again = load_project(path)
    assert again.alternatives[-1].origin == record
    assert again == _with(project, made)
    # the file holds the record under the alternative, in SI
    raw = json.loads(path.read_text(encoding="utf-8"))
    assert raw["alternatives"][-1]["origin"]["target_limits"][0]["value"] == 323.15


def _file_with_origin(origin: dict) -> str:
    raw = json.loads(DEMO.read_text(encoding="utf-8"))
    raw["alternatives"][0]["origin"] = origin
    return json.dumps(raw)


def _problems(text: str) -> dict:
    from solver.errors import ProjectFileError

    with pytest.raises(ProjectFileError) as info:
        parse_project(text)
    return dict(info.value.problems)


GOOD = {"tool": "Target Finder", "base_alternative": "A", "parameter": {"kind": "heater_output", "segments": []}}


def test_too_many_sweep_points_are_refused_with_the_path():
    # issue 11's bound for a kept sweep: at most 2,000 points (a fine 1-D sweep or a 45 × 45 grid)
    points = [{"value": float(i), "figures": {"outlet_temperature_K": 300.0}} for i in range(2_000)]
    assert len(parse_project(_file_with_origin({**GOOD, "tool": "Sweep", "sweep_points": points}))
               .alternatives[0].origin.sweep_points) == 2_000
    found = _problems(_file_with_origin({**GOOD, "tool": "Sweep", "sweep_points": points + [{"value": 1.0}]}))
    assert "alternatives[0].origin.sweep_points" in found
    assert "at most 2000" in found["alternatives[0].origin.sweep_points"]


@pytest.mark.parametrize("origin, path", [
    ({**GOOD, "tool": "Guess"}, "alternatives[0].origin.tool"),
    ({**GOOD, "sweep_points": [{"value": 1.0, "figures": {"not a key": 1.0}}]}, "alternatives[0].origin.sweep_points[0]"),
    ({**GOOD, "sweep_points": [{"value": 1.0, "figures": {"outlet_temperature_K": "hot"}}]},
     "alternatives[0].origin.sweep_points[0].figures.outlet_temperature_K"),
    ({**GOOD, "explanation": "x" * 10_001}, "alternatives[0].origin.explanation"),
    ({**GOOD, "targets": ["t"] * 21}, "alternatives[0].origin.targets"),
    ({"tool": "Sweep", "parameter": {"kind": "heater_output"}}, "alternatives[0].origin.base_alternative"),
])
def test_a_bad_record_is_refused_with_its_path(origin, path):
    found = _problems(_file_with_origin(origin))
    assert any(p.startswith(path) for p in found), found


def test_the_schema_describes_the_record():
    from app.cli import main

    import contextlib
    import io

    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        assert main(["schema"]) == 0
    schema = json.loads(out.getvalue())
    record = schema["$defs"]["SearchRecord"]
    assert record["properties"]["sweep_points"]["maxItems"] == MAX_SWEEP_POINTS
    assert set(record["required"]) >= {"tool", "base_alternative", "parameter"}
    assert "origin" in schema["$defs"]["Alternative"]["properties"]


# --------------------------------------------------------------------------- words


def test_feasible_band_in_words():
    from app.reporting.search import feasible_runs, feasible_words

    values = [5, 10, 15, 20, 25, 30]
    words = lambda v: f"{v} W/m"  # noqa: E731
    assert feasible_runs(values, [False, True, True, False, True, None]) == [(1, 2), (4, 4)]
    assert feasible_words(values, [False, True, True, False, True, None], words) == \
        "targets met from 10 W/m to 15 W/m and at 25 W/m only"
    assert feasible_words(values, [False] * 6, words) == "no value swept meets every target"
    assert feasible_words(values, [True] * 6, words).startswith("targets met at every value swept")


def test_sweep_record_keeps_the_points_and_names_the_binding_target():
    from app.reporting.search import DEFAULT_FIGURES, sweep_record
    from solver.target_finder import parse_target

    project, alt, parameter, variants = _sweep_variants()
    targets = [parse_target("bulk_min=74C"), parse_target("inner_wall_max=80C")]
    record = sweep_record(alt, parameter, variants, targets=targets, pick=20.0, figures=DEFAULT_FIGURES,
                          searched="6 values from 5 W/m to 30 W/m")
    assert record.tool == "Sweep" and record.value == 20.0 and record.value_text == "20 W/m"
    assert [p.value for p in record.sweep_points] == [5.0, 10.0, 15.0, 20.0, 25.0, 30.0]
    # every point's figures as an independent solve of that variant gives them
    again = solve(parameter.apply(alt, 25.0)).key_figures()
    point = record.sweep_points[4]
    for key in DEFAULT_FIGURES:
        assert point.figures[key] == pytest.approx(again[key], rel=1e-9)
    # the binding target is the one with the least margin at the pick (margins from a solve of its own)
    at_pick = solve(parameter.apply(alt, 20.0)).key_figures()
    bulk_margin = at_pick["min_bulk_temperature_K"] - (74 + 273.15)
    wall_margin = (80 + 273.15) - at_pick["max_inner_wall_temperature_K"]
    expected = "bulk temperature everywhere at least" if bulk_margin / 347.15 < wall_margin / 353.15 else "inner wall"
    assert record.binding.startswith(expected)
    assert "targets met from" in record.explanation
    # it is a valid part of a project
    made = parameter.apply(alt, 20.0).model_copy(update={"name": "Picked", "origin": record})
    assert parse_project(dump_project(_with(project, made))).alternatives[-1].origin == record


def test_a_long_sweep_is_thinned_to_the_models_limit():
    from app.reporting.search import sweep_record
    from solver.batch import BatchOutcome
    from solver.variants import Parameter, Variant

    project = _demo()
    alt = _base(project)
    many = [Variant(float(i), None, BatchOutcome(key_figures={"outlet_temperature_K": 300.0 + i * 1e-3}))
            for i in range(5 * MAX_SWEEP_POINTS)]
    record = sweep_record(alt, Parameter("heater_output"), many, pick=10.0, figures=["outlet_temperature_K"])
    assert len(record.sweep_points) == MAX_SWEEP_POINTS
    assert record.sweep_points[0].value == 0.0 and record.sweep_points[1].value == 5.0


# --------------------------------------------------------------------------- the report


@pytest.fixture(scope="module")
def picked_project():
    from app.reporting.search import DEFAULT_FIGURES, sweep_record
    from solver.target_finder import parse_target

    project, alt, parameter, variants = _sweep_variants()
    targets = [parse_target("surface_max=50C"), parse_target("bulk_min=74C")]
    record = sweep_record(alt, parameter, variants, targets=targets, pick=20.0, figures=DEFAULT_FIGURES,
                          searched="6 values from 5 W/m to 30 W/m")
    made = parameter.apply(alt, 20.0).model_copy(update={"name": "Picked at 20 W/m", "origin": record})
    return _with(project, made)


def _body(project: Project, names, system="SI"):
    from app.report import solve_alternatives
    from app.reporting.content import build_html

    chosen = [a for a in project.alternatives if a.name in names]
    outcomes = solve_alternatives(chosen, design=project.design_cases)
    return build_html(project, outcomes, system, "2026-12-03", bands_max_cells=0)


def _text(html: str) -> str:
    import re

    return re.sub(r"\s+", " ", re.sub(r"<[^>]+>", " ", html)).replace("&#x27;", "'").replace("&quot;", '"')


def test_the_report_says_how_the_alternative_was_found(picked_project):
    body = _body(picked_project, ["Picked at 20 W/m"])
    text = _text(body.html())
    assert "Picked from a Sweep" in text
    for words in ("Started from", f"“{BASE}”", "Heater output, all 5 segments", "6 values from 5 W/m to 30 W/m",
                  "outer surface at most 50.0 °C", "bulk temperature everywhere at least 74.0 °C", "Binding target",
                  "Value picked 20 W/m"):
        assert words in text, words
    charts = [c for c in body.figures if c.title.startswith("Sweep")]
    assert len(charts) == 1


def test_an_alternative_made_by_hand_has_no_search_section(picked_project):
    body = _body(picked_project, [BASE])
    text = _text(body.html())
    assert "Picked from a Sweep" not in text and "Found by the Target Finder" not in text
    assert not [c for c in body.figures if c.title.startswith("Sweep")]


def test_the_sweep_chart_draws_figures_targets_and_the_pick(picked_project):
    from app.reporting.search import sweep_chart

    record = picked_project.alternatives[-1].origin
    chart = sweep_chart(record, "SI")
    temperature = chart.panels[0]
    assert temperature.y_label == "Temperature [°C]"
    # target lines at the targets' values in °C (T[°C] = T[K] − 273.15, by definition)
    assert sorted(round(h.y, 6) for h in temperature.hlines) == [50.0, 74.0]
    assert chart.boundaries == [pytest.approx(20.0)]
    assert "Heater output" in chart.x_label and "[W/m]" in chart.x_label
    # each point drawn at its value; the outlet curve as the record holds it, in °C
    outlet = [s for s in temperature.series if s.label == "Outlet temperature"][0]
    assert list(outlet.x) == [5.0, 10.0, 15.0, 20.0, 25.0, 30.0]
    kept = [p.figures["outlet_temperature_K"] - 273.15 for p in record.sweep_points]
    shown = [y for y in outlet.y if not math.isnan(y)]
    assert all(any(abs(y - k) < 1e-9 for k in kept) for y in shown) and shown


def test_the_sweep_chart_in_us_units(picked_project):
    from app.reporting.search import sweep_chart

    chart = sweep_chart(picked_project.alternatives[-1].origin, "US")
    # W/ft = W/m × 0.3048 (1 ft = 0.3048 m exactly, NIST SP 811)
    assert chart.boundaries == [pytest.approx(20.0 * 0.3048)]
    assert "[W/ft]" in chart.x_label
    assert sorted(round(h.y, 6) for h in chart.panels[0].hlines) == [122.0, pytest.approx(165.2)]


def test_a_grid_sweep_draws_one_curve_per_second_value():
    from app.reporting.search import sweep_chart, sweep_record
    from app.style import ALTERNATIVE_COLOURS
    from solver.sweep import sweep
    from solver.target_finder import parse_target
    from solver.variants import Parameter

    project = _demo()
    alt = _base(project)
    thickness, heater = Parameter("insulation_thickness"), Parameter("heater_output")
    variants = [v for chunk in sweep(alt, thickness, [0.02, 0.04, 0.08], parameter2=heater, values2=[10.0, 20.0])
                for v in chunk]
    record = sweep_record(alt, thickness, variants, targets=[parse_target("bulk_min=74C")], pick=0.04, pick2=20.0,
                          parameter2=heater)
    assert record.value_text == "40 mm, 20 W/m" and len(record.sweep_points) == 6
    assert "with 10 W/m" in record.explanation and "with 20 W/m" in record.explanation
    chart = sweep_chart(record, "SI")
    drawn = [s for s in chart.panels[0].series if s.label]
    # the figure the target reads, once per heater output, each in its own colour
    assert [s.label for s in drawn] == ["10 W/m", "20 W/m"]
    assert [s.colour for s in drawn] == list(ALTERNATIVE_COLOURS[:2])
    assert chart.title == "Sweep over insulation thickness — one curve per heater output"
    # the 20 W/m curve at 80 mm is the bulk minimum of an independent solve of that variant, in °C
    again = solve(heater.apply(thickness.apply(alt, 0.08), 20.0)).key_figures()["min_bulk_temperature_K"] - 273.15
    all_y = [s for s in chart.panels[0].series if s.colour == ALTERNATIVE_COLOURS[1]]
    assert any(abs(y - again) < 1e-9 for s in all_y for y in s.y if not math.isnan(y))


def test_the_report_says_when_the_alternative_was_changed_after_the_search(picked_project):
    picked = picked_project.alternatives[-1]
    assert "Changed since the search" not in _body(picked_project, [picked.name]).html()
    # a hand edit after the search (one segment 1 m longer): the record no longer describes it
    edited = picked.model_copy(update={"segments": [picked.segments[0].model_copy(
        update={"length_m": picked.segments[0].length_m + 1.0}), *picked.segments[1:]]})
    data = picked_project.model_dump()
    data["alternatives"][-1] = edited.model_dump()
    text = _text(_body(Project.model_validate(data), [picked.name]).html())
    assert "Changed since the search" in text and "has been changed since" in text
    # the alternative it started from removed: said, not judged
    data = picked_project.model_dump()
    data["alternatives"] = [a for a in data["alternatives"] if a["name"] != BASE]
    data["baseline"] = None
    text = _text(_body(Project.model_validate(data), [picked.name]).html())
    assert "is no longer in the project" in text
