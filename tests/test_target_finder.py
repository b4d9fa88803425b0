"""Target Finder (solver.target_finder): closed forms, minimal answers, plain-words refusals, the demo.

Check values come from outside the code: the energy balance for internal flow and the exponential
outlet temperature of a pipe at a fixed wall temperature (Incropera et al., Fundamentals of Heat and Mass
Transfer, ch. 8), with the inside coefficient from the ``ht`` package (Gnielinski) and the friction
factor from ``fluids`` (Colebrook); the demo's targets are the issue's.
"""

from __future__ import annotations

import math
import time
from pathlib import Path

import pytest

from solver.errors import InputError
from solver.march import solve
from solver.model import (Adiabatic, Alternative, ConstantHeater, Feed, FixedWall, Pipe, Segment,
                          TableFluid, TableRow)
from solver.project_io import load_project
from solver.target_finder import (RELATIVE_TOLERANCE, FinderResult, Target, figures_of, find, parse_target)
from solver.variants import Parameter, STANDARD_INSULATION_THICKNESSES_M

DEMO = Path(__file__).resolve().parent.parent / "app" / "demo_project.json"

RHO, CP, MU, K = 1000.0, 4000.0, 1e-3, 0.6  # constant properties (a water-like table)
M_DOT, T_IN = 0.5, 300.0


def _constant_fluid(t_low=280.0, t_high=400.0) -> TableFluid:
    rows = [TableRow(temperature_K=t, density_kg_per_m3=RHO, specific_heat_J_per_kgK=CP, viscosity_Pa_s=MU,
                     conductivity_W_per_mK=K) for t in (t_low, t_high)]
    return TableFluid(name="constant", rows=rows)


def _line(segment: Segment, fluid=None, t_in=T_IN, m_dot=M_DOT) -> Alternative:
    return Alternative(name="Closed form", fluid=fluid or _constant_fluid(),
                       feed=Feed(inlet_temperature_K=t_in, mass_flow_kg_per_s=m_dot, inlet_flow="developed"),
                       segments=[segment])


@pytest.fixture(scope="module")
def demo():
    return load_project(DEMO)


@pytest.fixture(scope="module")
def trace15(demo):
    return next(a for a in demo.alternatives if a.name == "Trace 15 W/m, 80 mm wool")


def _meets_all(result: FinderResult, alt: Alternative, design=None) -> bool:
    fresh = solve(alt, design=design)
    return all(t.margin(fresh) >= 0 for t in result.targets)


# --------------------------------------------------------------------------- closed forms


def test_heater_output_for_an_outlet_temperature_is_the_energy_balance():
    """Uniform heat flux, constant properties, no loss: q' = m·cp·ΔT / L.

    Source: the textbook energy balance for internal flow, Incropera et al., Fundamentals of Heat and Mass
    Transfer, ch. 8 (q = m·cp·(To − Ti)). The liquid's enthalpy also carries p/ρ, so friction warms it by
    Δp/(ρ·cp) (here 4e-4 K of 10 K, 4e-5 relative): inside the tolerance, which is Brent's, 1e-4 relative,
    doubled.
    """
    length, t_out = 100.0, 310.0
    alt = _line(Segment(name="Run", length_m=length, pipe=Pipe(nps="2", schedule="40"),
                        heater=ConstantHeater(output_W_per_m=10.0), surroundings=Adiabatic()))
    result = find(alt, Parameter("heater_output"), [Target("outlet_min", t_out)], upper=500.0)
    assert result.feasible
    expected = M_DOT * CP * (t_out - T_IN) / length  # 200 W/m
    assert result.value == pytest.approx(expected, rel=2 * RELATIVE_TOLERANCE)
    assert result.binding == Target("outlet_min", t_out)

    # the value is per metre of heater: two runs need half each (solver.variants.Parameter.apply)
    two = alt.model_copy(update={"segments": [alt.segments[0].model_copy(
        update={"heater": ConstantHeater(output_W_per_m=10.0, count=2)})]})
    result2 = find(two, Parameter("heater_output"), [Target("outlet_min", t_out)], upper=500.0)
    assert result2.value == pytest.approx(expected / 2, rel=2 * RELATIVE_TOLERANCE)


def test_length_for_an_outlet_temperature_follows_the_exponential_solution():
    """Wall held at Ts: (Ts − To)/(Ts − Ti) = exp(−U'·L/(m·cp)), so L = (m·cp/U')·ln((Ts − Ti)/(Ts − To)).

    Source: Incropera et al., Fundamentals of Heat and Mass Transfer, ch. 8 (constant surface temperature).
    U' = 1/(1/(h·π·Di) + ln(Do/Di)/(2π·k_wall)), h from Gnielinski's correlation as the ``ht`` package
    gives it (ht.conv_internal.turbulent_Gnielinski) with the Colebrook friction factor of ``fluids``; the
    flow arrives developed and the properties are constant, so h is the same along the line. Tolerance:
    Brent's 1e-4 relative, doubled (measured 5e-5).
    """
    ht = pytest.importorskip("ht")
    fluids = pytest.importorskip("fluids")
    from solver.catalogue import PIPE_MATERIALS, pipe_dimensions

    t_wall, t_out = 360.0, 340.0
    alt = _line(Segment(name="Heated", length_m=40.0, pipe=Pipe(nps="2", schedule="40"),
                        surroundings=FixedWall(wall_temperature_K=t_wall)))
    result = find(alt, Parameter("segment_length", (0,)), [Target("outlet_min", t_out)])
    assert result.feasible

    di, do, _ = pipe_dimensions("2", "40")
    steel = PIPE_MATERIALS["carbon steel"]
    velocity = M_DOT / RHO / (math.pi / 4 * di ** 2)
    re, pr = RHO * velocity * di / MU, MU * CP / K
    fd = fluids.friction.friction_factor(Re=re, eD=steel.roughness_m / di)
    h = ht.conv_internal.turbulent_Gnielinski(Re=re, Pr=pr, fd=fd) * K / di
    u_per_m = 1.0 / (1.0 / (h * math.pi * di) + math.log(do / di) / (2 * math.pi * steel.conductivity_W_per_mK))
    expected = M_DOT * CP / u_per_m * math.log((t_wall - T_IN) / (t_wall - t_out))  # 13.23 m
    assert result.value == pytest.approx(expected, rel=2 * RELATIVE_TOLERANCE)


# --------------------------------------------------------------------------- the answer is minimal


def test_continuous_answer_meets_every_target_and_a_little_less_does_not(trace15):
    """Outlet at least 76 °C and outer surface at most 50 °C (issue's demo line): the least heater output."""
    targets = [parse_target("outlet_min=76C"), parse_target("surface_max=50C")]
    result = find(trace15, Parameter("heater_output"), targets)
    assert result.feasible and result.alternative is not None
    assert _meets_all(result, result.alternative)
    assert result.key_figures["outlet_temperature_K"] >= 349.15
    less = Parameter("heater_output").apply(trace15, result.value * (1 - 5 * RELATIVE_TOLERANCE))
    assert not _meets_all(result, less)
    assert result.binding.kind == "outlet_min"
    assert set(result.margins) == {t.text() for t in targets}
    shown = Parameter("heater_output").value_text(result.value)
    assert result.alternative.name == f"{trace15.name} — heater {shown}"
    assert result.result is not None and result.result.profile is not None  # the full re-solve


@pytest.mark.parametrize("kind, targets", [
    ("insulation_thickness", ["bulk_min=72C"]),
    ("bore", ["pressure_drop_max=20kPa"]),  # elevation alone is 16.5 kPa: NPS 3 gives 18.4, 2-1/2 20.8
])
def test_discrete_answer_meets_every_target_and_one_step_smaller_fails(trace15, kind, targets):
    parameter = Parameter(kind)
    targets = [parse_target(t) for t in targets]
    result = find(trace15, parameter, targets)
    assert result.feasible
    values = parameter.standard_values(trace15)
    i = values.index(result.value)
    assert i > 0, "the case is meant to have a smaller standard value"
    assert _meets_all(result, result.alternative)
    smaller = parameter.apply(trace15, values[i - 1])
    assert not _meets_all(result, smaller)
    assert parameter.value_text(values[i - 1]) in result.explanation  # says what the step below misses
    assert result.evaluations == len(values) + 1  # one solve_batch of the list + the full re-solve


# --------------------------------------------------------------------------- plain words when nothing works


def test_infeasible_surface_too_hot_even_at_the_thickest(trace15):
    # Tank outlet stands in still air at 15 °C: no insulation brings its surface down to 15 °C
    result = find(trace15, Parameter("insulation_thickness"), [parse_target("surface_max=15C")])
    assert not result.feasible and result.value is None and result.alternative is None
    assert "no insulation thickness on the list" in result.explanation.lower()
    assert "even at 100 mm" in result.explanation and "15.0 °C" in result.explanation


def test_infeasible_two_targets_pull_apart(trace15):
    # more heat lifts the outlet and the inner wall together: 76 °C out needs a wall above 77 °C
    targets = [parse_target("outlet_min=76C"), parse_target("inner_wall_max=77C")]
    result = find(trace15, Parameter("heater_output"), targets)
    assert not result.feasible
    text = result.explanation
    assert "cannot reach an outlet temperature of 76.0 °C without the inner wall passing 77.0 °C" in text
    assert "needs at least" in text and "W/m" in text


def test_infeasible_even_the_lowest_value_violates_a_maximum(trace15):
    result = find(trace15, Parameter("heater_output"), [parse_target("surface_max=20C")], lower=20.0, upper=60.0)
    assert not result.feasible
    assert "even at 20 W/m the outer surface is" in result.explanation


def test_infeasible_line_fails_to_solve_everywhere():
    # the table stops at 320 K; 100 W/m and more take 50 g/s of it far beyond that in 100 m
    alt = _line(Segment(name="Run", length_m=100.0, pipe=Pipe(nps="2", schedule="40"),
                        heater=ConstantHeater(output_W_per_m=100.0), surroundings=Adiabatic()),
                fluid=_constant_fluid(290.0, 320.0), t_in=315.0, m_dot=0.05)
    result = find(alt, Parameter("heater_output"), [Target("outlet_max", 318.0)], lower=100.0, upper=500.0)
    assert not result.feasible
    assert result.explanation.startswith("The line fails to solve at every value tried:")


def test_infeasible_bulk_target_above_the_feed(trace15):
    result = find(trace15, Parameter("heater_output"), [parse_target("bulk_min=90C")])
    assert not result.feasible
    assert "the feed enters at 75.0 °C" in result.explanation


def test_infeasible_where_the_figure_sits_outside_the_segments_varied(demo, trace15):
    # heating only Road crossing cannot lift the worst case of Tank outlet, which stands in air unheated
    result = find(trace15, Parameter("heater_output", (2,)), [parse_target("worst_case_bulk_min=60C")],
                  design=demo.design_cases)
    assert not result.feasible
    assert "even at 80 W/m the worst-case bulk falls to" in result.explanation
    assert result.explanation.endswith("Tank outlet is not among the segments varied.")


def test_bore_range_trims_the_list(trace15):
    result = find(trace15, Parameter("bore"), [parse_target("pressure_drop_max=20kPa")], lower="3", upper="6")
    assert result.feasible and result.value == "3"
    assert "over 5 standard values: NPS 3, NPS 3-1/2, NPS 4, NPS 5, NPS 6" in result.searched


def test_bad_requests_are_refused_with_the_field_named(trace15):
    with pytest.raises(InputError, match="targets"):
        find(trace15, Parameter("heater_output"), [])
    with pytest.raises(InputError, match="design"):
        find(trace15, Parameter("heater_output"), [parse_target("hold_time_min=8h")])
    with pytest.raises(InputError, match="heater_output.*-5"):
        find(trace15, Parameter("heater_output"), [parse_target("bulk_min=55C")], lower=-5.0, upper=10.0)
    with pytest.raises(InputError, match="surface_max=50"):
        parse_target("surface_max=50")  # a temperature needs its unit
    with pytest.raises(InputError, match="unknown target"):
        parse_target("colour_max=3K")


def test_words_follow_the_formatter_given(trace15):
    """The app passes its own unit formatter: the explanation, the searched words, the value and the record are
    written with it; the next search without one is SI again."""
    fmt = lambda value, quantity, system: f"<{quantity}:{value:.4g}:{system}>"  # noqa: E731
    targets = [parse_target("bulk_min=72C")]
    result = find(trace15, Parameter("insulation_thickness"), targets, system="US", formatter=fmt)
    assert result.value_text == "<thickness:0.03:US>"
    assert "<thickness:0.025:US> misses" in result.explanation and "<temperature:345.1:US>" in result.explanation
    assert "<thickness:0.013:US>" in result.searched
    assert result.alternative.name.endswith("insulation <thickness:0.03:US>")
    assert result.record()["targets"] == ["bulk temperature everywhere at least <temperature:345.1:US>"]
    again = find(trace15, Parameter("insulation_thickness"), targets)
    assert again.value_text == "30 mm" and "<" not in again.explanation


def test_parse_target_units():
    # conversions: 0 °C = 273.15 K (definition), 1 bar = 1e5 Pa, 1 h = 3600 s, °F: (F − 32)·5/9 + 273.15
    assert parse_target("bulk_min=55C") == Target("bulk_min", 328.15)
    assert parse_target("surface_max=140F").value == pytest.approx(333.15)
    assert parse_target("pressure_drop_max=0.5bar") == Target("pressure_drop_max", 5e4)
    assert parse_target("hold_time_min=8h") == Target("hold_time_min", 28800.0)
    assert parse_target("heat_loss_per_m_max=20W/m") == Target("heat_loss_per_m_max", 20.0)
    t = Target("surface_max", 323.15)
    assert t.text() == "outer surface at most 50.0 °C"
    assert Target.from_dict(t.to_dict()) == t
    assert t.margin({"max_outer_surface_temperature_K": 320.15}) == pytest.approx(3.0)
    assert Target("bulk_min", 328.15).margin({"min_bulk_temperature_K": 320.15}) == pytest.approx(-8.0)


# --------------------------------------------------------------------------- design targets


def test_hold_time_target_reads_the_design_cases(demo, trace15):
    """hold_time_min reads the shortest time to freezing after a power failure (DesignResult.hold_time)."""
    result = find(trace15, Parameter("insulation_thickness"), [parse_target("hold_time_min=8h")],
                  design=demo.design_cases)
    assert result.feasible
    held = solve(result.alternative, design=demo.design_cases)
    shortest = min(s.to_freezing_off_s for s in held.design.hold_time.segments)
    assert shortest >= 8 * 3600.0
    assert figures_of(held)["hold_time_s"] == shortest
    values = list(STANDARD_INSULATION_THICKNESSES_M)
    i = values.index(result.value)
    if i > 0:
        smaller = solve(Parameter("insulation_thickness").apply(trace15, values[i - 1]), design=demo.design_cases)
        assert min(s.to_freezing_off_s for s in smaller.design.hold_time.segments) < 8 * 3600.0


# --------------------------------------------------------------------------- the demo scenario of the issue


def test_demo_smallest_insulation_for_surface_and_bulk(trace15):
    """"Smallest insulation that keeps the outer surface below 50 °C and the bulk above 55 °C with 15 W/m"."""
    targets = [parse_target("surface_max=50C"), parse_target("bulk_min=55C")]
    find(trace15, Parameter("insulation_thickness"), targets)  # warm (imports, tables)
    start = time.perf_counter()
    result = find(trace15, Parameter("insulation_thickness"), targets)
    elapsed = time.perf_counter() - start
    print(f"\nTarget Finder, demo, insulation list: {elapsed * 1e3:.0f} ms, {result.evaluations} solves")
    assert result.feasible and result.value in STANDARD_INSULATION_THICKNESSES_M
    assert _meets_all(result, result.alternative)
    assert result.binding in targets
    assert "insulation" in result.alternative.name
    record = result.record()
    assert record["tool"] == "Target Finder" and record["base_alternative"] == trace15.name
    assert record["targets"] == [t.text() for t in targets] and record["binding"] == result.binding.text()
    from solver.model import SearchRecord

    SearchRecord.model_validate(record)  # the model keeps it as it is (Alternative.origin)
    values = list(STANDARD_INSULATION_THICKNESSES_M)
    i = values.index(result.value)
    if i > 0:
        assert not _meets_all(result, Parameter("insulation_thickness").apply(trace15, values[i - 1]))
    else:
        # the thinnest on the list already does it: the step below the list, no insulation, must not
        bare = trace15.model_copy(update={"segments": [s.model_copy(update={"insulation": []})
                                                       for s in trace15.segments]})
        assert not _meets_all(result, bare)


def test_demo_continuous_heater_output_timing(trace15):
    targets = [parse_target("surface_max=50C"), parse_target("bulk_min=55C"), parse_target("outlet_min=76C")]
    find(trace15, Parameter("heater_output"), targets)
    start = time.perf_counter()
    result = find(trace15, Parameter("heater_output"), targets)
    elapsed = time.perf_counter() - start
    print(f"\nTarget Finder, demo, heater output: {elapsed * 1e3:.0f} ms, {result.evaluations} solves")
    assert result.feasible and result.binding.kind == "outlet_min"
