"""The report's "Design for the worst case" section and the sample projects' design cases (issue 10 items 7, 8).

The PDF's text is read back with pypdf (an independent PDF reader) and compared with what the solver
computes for the same alternatives, written in the words the app uses (app.design_figures, app.units).
The projects are the invented Fernbrook Works samples.
"""

from __future__ import annotations

import math
import re
from pathlib import Path

import pytest

pypdf = pytest.importorskip("pypdf")

from app import design_figures, units  # noqa: E402
from app.report import write_report  # noqa: E402
from solver import solve  # noqa: E402
from solver.model import SelfLimitingHeater, PureFluid, Wind, StillAir  # noqa: E402
from solver.project_io import load_project  # noqa: E402

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = sorted((ROOT / "sample_projects").glob("*.json"))
FREEZE = ROOT / "sample_projects" / "makeup_water_freeze_protection.json"
DEMO = ROOT / "app" / "demo_project.json"


def _norm(text: str) -> str:
    """Whitespace-insensitive text (PDF extraction breaks lines; numbers use thin spaces)."""
    text = text.replace("\u2009", " ").replace("\u00a0", " ")
    for ligature, letters in (("\ufb00", "ff"), ("\ufb01", "fi"), ("\ufb02", "fl"), ("\ufb03", "ffi"), ("\ufb04", "ffl")):
        text = text.replace(ligature, letters)
    return re.sub(r"\s+", " ", text).strip()


def _text(path: Path) -> str:
    return _norm(" ".join(page.extract_text() or "" for page in pypdf.PdfReader(str(path)).pages))


def _sections(text: str, names) -> dict[str, str]:
    """Each alternative's part of the report, from its heading to the next one (or the methods)."""
    out = {}
    for i, name in enumerate(names):
        start = text.index("ALTERNATIVE", text.index(name) - 40 if i else text.index("ALTERNATIVE"))
        start = text.index(name, start)
        end = text.index(names[i + 1], start + len(name) + 1) if i + 1 < len(names) else text.index("Methods and correlations")
        out[name] = text[start:end]
    return out


@pytest.fixture(scope="module")
def freeze_report(tmp_path_factory):
    project = load_project(FREEZE)
    results = {a.name: solve(a, design=project.design_cases) for a in project.alternatives}
    path = write_report(project, tmp_path_factory.mktemp("design") / "freeze.pdf", date="2026-12-02")
    return project, results, _text(path)


def test_report_has_the_design_section_with_the_solved_numbers(freeze_report):
    project, results, text = freeze_report
    names = [a.name for a in project.alternatives]
    sections = _sections(text, names)
    words = design_figures.formatter("SI")
    for name in names:
        part, d = sections[name], results[name].design
        assert "Design for the worst case" in part
        # the conditions used, and who decides them
        assert "air at −25.0 °C in a 10.0 m/s wind, the flow stopped" in part
        assert "site's meteorological data and the owner's specification decide them" in part
        for s in d.segments:
            # the verdict per segment, margin included ("needs 7.65 W/m at 5.0 °C; has 12.6 W/m: OK")
            assert _norm(d.tracing_words(s.index, words)) in part, (name, s.name)
            # the hot case's highest wall temperature, and the caution beside it
            assert units.format_value(s.hot_wall_temperature_K, "temperature", "SI") in part
        assert "heater's own sheath runs hotter" in part and "hazardous areas" in part
        # hold time after a power failure, as the operator reads it
        for h in d.hold_time.segments:
            assert design_figures.duration_text(h.to_freezing_off_s) in part, (name, h.name)
    # what a user would notice: the traced line holds, the untraced one does not
    assert "does not hold" not in sections["Self-limiting, 40 mm wool"]
    assert sections["No tracing, 40 mm wool"].count("does not hold") == 3
    # the latent heat behind the freezing plateau is named with its source
    assert "333.6 kJ/kg" in text


def test_report_given_results_without_design_cases_still_has_them(tmp_path):
    # the app may hand in results solved without the design cases: the report adds them (a copy)
    project = load_project(FREEZE)
    alt = project.alternatives[2]
    plain = solve(alt)
    path = write_report(project, tmp_path / "given.pdf", alternatives=[alt.name], results={alt.name: plain})
    assert plain.design is None  # the caller's result is left as it was
    text = _text(path)
    d = solve(alt, design=project.design_cases).design
    assert "Design for the worst case" in text
    assert _norm(d.tracing_words(0, design_figures.formatter("SI"))) in text


def test_report_of_the_demo_shows_the_property_table_and_the_self_limiting_heater(tmp_path):
    project = load_project(DEMO)
    alt = project.alternatives[0]
    path = write_report(project, tmp_path / "demo.pdf", alternatives=[alt.name], unit_system="US")
    text = _text(path)
    # the user's property table as entered, with its freezing point (demo data: 12 °C = 53.6 °F)
    assert "Fluid property table (as entered)" in text
    assert "Freezing point: 53.6 °F" in text and "Latent heat of fusion: not given" in text
    for row in alt.fluid.rows[:3]:
        assert units.format_value(row.temperature_K, "temperature", "US", with_unit=False) in text
    # the heater as the trade specifies it, in the reader's units (40 W/m = 12.2 W/ft; 10 °C = 50.0 °F)
    assert "self-limiting 12.2 W/ft at 50.0 °F" in text
    assert "Design for the worst case" in text and "°F" in text.split("Design for the worst case")[1]


# --------------------------------------------------------------------------- samples


@pytest.mark.parametrize("path", SAMPLES + [DEMO], ids=lambda p: p.stem)
def test_every_sample_solves_with_its_design_cases(path):
    project = load_project(path)
    for alt in project.alternatives:
        r = solve(alt, design=project.design_cases)
        assert r.design is not None and len(r.design.segments) == len(alt.segments)
        r.design.to_dict()  # the Hold Time too


def test_the_demo_self_limiting_alternative_is_self_limiting():
    project = load_project(DEMO)
    alt = next(a for a in project.alternatives if "self-limiting" in a.description.lower())
    assert all(isinstance(s.heater, SelfLimitingHeater) for s in alt.segments)
    assert "invented demo rating" in alt.description
    r = solve(alt, design=project.design_cases)
    # a self-limiting heater gives less where the pipe is warmer: the hot case (no flow, 35 °C air) delivers
    # less than the worst case (no flow, −20 °C air) on every segment in air (the rating falls with temperature;
    # the buried road crossing keeps its soil temperature in both cases, and so does the indoor unit feed its air)
    in_air = [s for s, seg in zip(r.design.segments, alt.segments)
              if isinstance(seg.surroundings, (StillAir, Wind)) and not getattr(seg.surroundings, "indoors", False)]
    assert len(in_air) == 3
    for s in in_air:
        assert s.hot_heater_output_W_per_m < s.worst_heater_output_W_per_m, s.name


def test_the_freeze_protection_sample_is_what_the_issue_asks_for():
    project = load_project(FREEZE)
    cases = project.design_cases
    assert cases.worst_air_temperature_K == pytest.approx(248.15) and cases.worst_wind_speed_m_per_s == 10.0
    traced = project.alternatives[0]
    assert isinstance(traced.fluid, PureFluid) and traced.fluid.name == "Water"
    assert all(s.pipe.nps in ("1", "2") for s in traced.segments)
    assert any(isinstance(s.surroundings, Wind) for s in traced.segments)
    assert all(isinstance(s.heater, SelfLimitingHeater) for s in traced.segments)
    kinds = {h.kind for s in traced.segments for h in s.heat_sinks}
    assert {"valve", "flange_pair", "pipe_support"} <= kinds
    assert all(layer.material == "mineral wool" for s in traced.segments for layer in s.insulation)
    # the hold time matters: after a power failure the water reaches 0 °C within hours, not days
    for alt in project.alternatives:
        hold = solve(alt, design=cases).design.hold_time
        assert hold.freezing_point_K == pytest.approx(273.16, abs=0.01)  # water's triple point (IAPWS), CoolProp
        for h in hold.segments:
            assert math.isfinite(h.to_freezing_off_s) and h.to_freezing_off_s < 24 * 3600, (alt.name, h.name)
    # the traced alternative holds its maintain temperature in the worst case; the untraced one does not
    assert solve(traced, design=cases).design.holds is True
    assert solve(project.alternatives[2], design=cases).design.holds is False
    assert any(isinstance(s.surroundings, StillAir) for s in traced.segments)  # the pump-house end
