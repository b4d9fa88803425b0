"""Target Finder paths the other finder tests leave unwatched (found by mutation testing, scripts/mutation.sh).

Check values come from outside the finder: the energy balance for internal flow, q' = m·cp·(To − Ti)/L
(Incropera et al., Fundamentals of Heat and Mass Transfer, ch. 8), on a line with constant properties, no
loss (adiabatic) and a uniform heater; the liquid's enthalpy also carries p/ρ, so friction warms it by
Δp/(ρ·cp) ≈ 4e-4 K here, inside the tolerance (Brent's 1e-4 relative, doubled). Lists, ranges and unit
words are definitions (0 °C = 273.15 K; the standard insulation list of solver.variants, whose source is
common practice, from memory; the NPS sizes of ASME B36.10M in solver.catalogue). Discrete answers are
checked against one-by-one solves (solver.march.solve) of every listed value.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from solver.errors import InputError
from solver.march import solve
from solver.model import Adiabatic, Alternative, ConstantHeater, Feed, Pipe, Segment, TableFluid, TableRow
from solver.project_io import load_project
from solver.target_finder import RELATIVE_TOLERANCE, SCAN_POINTS, Target, find, parse_target
from solver.variants import STANDARD_INSULATION_THICKNESSES_M, Parameter

DEMO = Path(__file__).resolve().parent.parent / "app" / "demo_project.json"

RHO, CP, MU, K = 1000.0, 4000.0, 1e-3, 0.6  # constant properties (a water-like table)
M_DOT, T_IN, LENGTH = 0.5, 300.0, 100.0
HEATER = Parameter("heater_output")
TOL = 2 * RELATIVE_TOLERANCE


def _q_for(t_out: float) -> float:
    """Heater output [W/m] that brings the feed to ``t_out`` [K]: q' = m·cp·(To − Ti)/L (Incropera, ch. 8)."""
    return M_DOT * CP * (t_out - T_IN) / LENGTH


def _run(t_low=280.0, t_high=400.0) -> Alternative:
    rows = [TableRow(temperature_K=t, density_kg_per_m3=RHO, specific_heat_J_per_kgK=CP, viscosity_Pa_s=MU,
                     conductivity_W_per_mK=K) for t in (t_low, t_high)]
    return Alternative(name="Closed form", fluid=TableFluid(name="constant", rows=rows),
                       feed=Feed(inlet_temperature_K=T_IN, mass_flow_kg_per_s=M_DOT, inlet_flow="developed"),
                       segments=[Segment(name="Run", length_m=LENGTH, pipe=Pipe(nps="2", schedule="40"),
                                         heater=ConstantHeater(output_W_per_m=10.0), surroundings=Adiabatic())])


@pytest.fixture(scope="module")
def run():
    return _run()


@pytest.fixture(scope="module")
def trace15():
    return next(a for a in load_project(DEMO).alternatives if a.name == "Trace 15 W/m, 80 mm wool")


def _searched(lo_text: str, hi_text: str) -> str:
    return (f"Heater output, segment 1 (Run) from {lo_text} to {hi_text}: {SCAN_POINTS} values scanned, then "
            "Brent's method (scipy brentq) on each target's margin to 0.01 % of the value")


# --------------------------------------------------------------------------- continuous: what the answer says


def test_continuous_answer_states_range_method_and_binding_target(run):
    """outlet ≥ 310 K: q' = 0.5·4000·10/100 = 200 W/m (energy balance); the words give the range searched
    (0 W/m, the default lower end, to the 500 W/m asked), the method and the binding target with its margin."""
    t_out = 310.0
    result = find(run, HEATER, [Target("outlet_min", t_out)], upper=500.0)
    assert result.feasible and result.value == pytest.approx(_q_for(t_out), rel=TOL)
    assert (result.lower, result.upper) == (0.0, 500.0)
    assert result.searched == _searched("0 W/m", "500 W/m")
    assert result.explanation == ("200 W/m is the least heater output from 0 W/m to 500 W/m that meets every "
                                  "target (binding: outlet temperature at least 36.9 °C (margin 0.0 K)).")
    assert result.record()["searched"] == result.searched
    # the scan, Brent's steps and the full re-solve of the answer are all counted
    assert result.evaluations >= SCAN_POINTS + 2
    assert result.key_figures["outlet_temperature_K"] >= t_out


def test_lowest_value_of_the_range_already_meeting_every_target(run):
    """From 300 W/m up, the outlet is already 315 K (energy balance): the answer is the range's low end, said
    so; its margin, 5 K, is stated. At 200 W/m the outlet is 310 K plus the friction's 4e-4 K: a margin
    well below 1 K still counts as met."""
    result = find(run, HEATER, [Target("outlet_min", 310.0)], lower=300.0, upper=600.0)
    assert result.feasible and result.value == 300.0
    assert (result.lower, result.upper) == (300.0, 600.0)
    assert result.searched == _searched("300 W/m", "600 W/m")
    assert result.explanation == ("300 W/m, the lowest heater output searched, already meets every target "
                                  "(binding: outlet temperature at least 36.9 °C (margin 5.0 K)).")
    result = find(run, HEATER, [Target("outlet_min", 310.0)], lower=200.0, upper=600.0)
    assert result.feasible and result.value == 200.0
    assert result.explanation.startswith("200 W/m, the lowest heater output searched, already meets every target")
    assert 0.0 <= result.margins["outlet temperature at least 36.9 °C"] < 1e-3


def test_narrow_band_between_two_scanned_values(run):
    """311 K ≤ outlet ≤ 313 K needs 220 to 260 W/m (energy balance), a band inside one step of the scan
    (0, 100, ..., 600 W/m): neither scanned neighbour meets both targets, the band is still found."""
    lo_q, hi_q = _q_for(311.0), _q_for(313.0)
    assert lo_q == pytest.approx(220.0) and hi_q == pytest.approx(260.0)
    result = find(run, HEATER, [Target("outlet_min", 311.0), Target("outlet_max", 313.0)], upper=600.0)
    assert result.feasible
    assert result.value == pytest.approx(lo_q, rel=TOL)
    assert result.explanation.startswith("220 W/m is the least heater output from 0 W/m to 600 W/m that meets "
                                         "every target (a narrow band between two values scanned)")
    assert result.binding == Target("outlet_min", 311.0)
    assert result.margins["outlet temperature at most 39.9 °C"] == pytest.approx(2.0, abs=1e-3)
    assert (result.lower, result.upper) == (0.0, 600.0)


@pytest.mark.parametrize("t_min, t_max", [(310.25, 310.75), (314.5, 314.9)], ids=["near-200", "near-300"])
def test_narrow_band_close_to_a_scanned_value(run, t_min, t_max):
    """Bands of 205–215 W/m and 290–298 W/m (energy balance), each less than 1 K of margin from the scanned
    200 or 300 W/m: the least value of the band is found all the same."""
    result = find(run, HEATER, [Target("outlet_min", t_min), Target("outlet_max", t_max)], upper=600.0)
    assert result.feasible and result.value == pytest.approx(_q_for(t_min), rel=TOL)
    assert "(a narrow band between two values scanned)" in result.explanation
    assert t_min <= solve(HEATER.apply(run, result.value)).outlet_temperature_K <= t_max


def test_targets_pulling_apart_name_both_roots(run):
    """outlet ≥ 312.5 K needs at least 250 W/m, outlet ≤ 311.5 K allows at most 230 W/m (energy balance):
    no value meets both, and the words give both bounds."""
    result = find(run, HEATER, [Target("outlet_min", 312.5), Target("outlet_max", 311.5)], upper=600.0)
    assert not result.feasible and result.value is None
    assert result.explanation == ("Heater output cannot reach an outlet temperature of 39.4 °C without the outlet "
                                  "passing 38.4 °C: that needs at least 250 W/m, and above 230 W/m the outlet "
                                  "passes 38.4 °C.")
    assert result.searched == _searched("0 W/m", "600 W/m")
    assert (result.lower, result.upper) == (0.0, 600.0)


def test_a_range_without_width_is_refused(run):
    with pytest.raises(InputError) as info:
        find(run, HEATER, [Target("outlet_min", 310.0)], lower=50.0, upper=50.0)
    assert info.value.field == "heater_output" and "(50.0, 50.0)" in str(info.value)
    assert "lower end below its upper end" in str(info.value)
    with pytest.raises(InputError, match="heater_output"):
        find(run, HEATER, [Target("outlet_min", 310.0)], lower=60.0, upper=50.0)


def test_infeasible_answer_keeps_the_range_searched(run):
    """Even 500 W/m brings the outlet only to 325 K = 51.85 °C (energy balance; 51.9 °C with the
    friction's 4e-4 K): 330 K is out of reach."""
    result = find(run, HEATER, [Target("outlet_min", 330.0)], upper=500.0)
    assert not result.feasible
    assert result.explanation.startswith("No heater output in the range searched can reach an outlet temperature "
                                         "of 56.9 °C: even at 500 W/m the outlet falls to 51.9 °C (at least 56.9 °C "
                                         "wanted)")
    assert result.searched == _searched("0 W/m", "500 W/m")
    assert (result.lower, result.upper) == (0.0, 500.0)


def _cooling_run() -> Alternative:
    """The run bare in still air at −10 °C, its fluid table starting at 298 K: with little heat the bulk cools
    out of the table and the line fails to solve (the solver's refusal, not a finder's choice)."""
    from solver.model import StillAir

    alt = _run(t_low=298.0)
    seg = alt.segments[0].model_copy(update={"surroundings": StillAir(temperature_K=263.15)})
    return alt.model_copy(update={"segments": [seg]})


def test_values_below_the_answer_that_fail_to_solve_are_said():
    """0 W/m fails to solve (the bulk leaves the table), 100 W/m solves and meets outlet ≥ 299 K: between them
    nothing can be searched, so the scanned value is the answer and the words say a smaller one may exist."""
    alt = _cooling_run()
    with pytest.raises(Exception, match="below the range of the fluid data"):
        solve(HEATER.apply(alt, 0.0))
    result = find(alt, HEATER, [Target("outlet_min", 299.0)], upper=600.0)
    assert result.feasible and result.value == 100.0
    assert result.explanation.startswith("100 W/m meets every target; below it, down to 0 W/m, the line could not "
                                         "be searched (it fails to solve there), so a smaller value may exist")
    assert solve(HEATER.apply(alt, 100.0)).outlet_temperature_K >= 299.0


def test_a_solve_failing_inside_the_bracket_falls_back_to_the_values_solved(run, monkeypatch):
    """Brent's method meets a value that fails to solve (made to fail here: beside the scanned values only the
    first value Brent's method tries solves): the answer is the smallest value solved that meets every target,
    with words saying that below it the line could not be searched — never an error, never a value not solved.
    Energy balance: outlet ≥ 310.5 K needs 210 W/m, which is where the secant through the scanned 200 and
    300 W/m (margins −0.5 and +4.5 K, linear in q') lands first."""
    import numpy as np

    import solver.target_finder as tf
    from solver.batch import BatchOutcome
    from solver.errors import SolverError
    from solver.variants import Variant

    scanned = {float(v) for v in np.linspace(0.0, 600.0, SCAN_POINTS)}
    real = tf.solve_prepared
    probes = []

    def first_probe_only(prepared, **kw):
        keep = []
        for p in prepared:
            if p[0] not in scanned:
                probes.append(p[0])
            if p[0] in scanned or p[0] == probes[0]:  # (the first probe again: the answer's full re-solve)
                keep.append(p)
        solved = {v.value: v for v in real(keep, **kw)} if keep else {}
        return [solved.get(p[0]) or Variant(p[0], p[2], BatchOutcome(error=SolverError("made to fail")), p[1])
                for p in prepared]

    monkeypatch.setattr(tf, "solve_prepared", first_probe_only)
    targets = [Target("outlet_min", 310.5)]
    result = find(run, HEATER, targets, upper=600.0)
    monkeypatch.undo()
    assert len(probes) >= 2  # the second value Brent's method tried failed
    assert result.feasible
    assert result.value == pytest.approx(_q_for(310.5), rel=TOL) and result.value < 300.0
    assert result.explanation.startswith(f"{HEATER.value_text(result.value)} meets every target; below it, down to "
                                         "200 W/m, the line could not be searched")
    assert solve(HEATER.apply(run, result.value)).outlet_temperature_K >= 310.5


def test_a_failure_everywhere_inside_the_bracket_keeps_the_scanned_value(run, monkeypatch):
    """As above, but nothing between the scanned values solves: the scanned 300 W/m is kept, said so."""
    import numpy as np

    import solver.target_finder as tf
    from solver.batch import BatchOutcome
    from solver.errors import SolverError
    from solver.variants import Variant

    scanned = {float(v) for v in np.linspace(0.0, 600.0, SCAN_POINTS)}
    real = tf.solve_prepared

    def only_scanned(prepared, **kw):
        keep = [p for p in prepared if p[0] in scanned]
        solved = {v.value: v for v in real(keep, **kw)} if keep else {}
        return [solved.get(p[0]) or Variant(p[0], p[2], BatchOutcome(error=SolverError("made to fail")), p[1])
                for p in prepared]

    monkeypatch.setattr(tf, "solve_prepared", only_scanned)
    result = find(run, HEATER, [Target("outlet_min", 310.5)], upper=600.0)
    monkeypatch.undo()
    assert result.feasible and result.value == 300.0
    assert result.explanation.startswith("300 W/m meets every target; below it, down to 200 W/m, the line could "
                                         "not be searched")


def test_requests_without_targets_or_with_other_things_are_refused(run):
    with pytest.raises(InputError) as info:
        find(run, HEATER, [])
    assert info.value.field == "targets" and "give at least one target to meet" in str(info.value)
    with pytest.raises(InputError) as info:
        find(run, HEATER, ["outlet_min=40C"])
    assert info.value.field == "targets" and "outlet_min=40C" in str(info.value)
    assert "each target must be a Target" in str(info.value)


# --------------------------------------------------------------------------- discrete: lists, trims and words

INSULATION = Parameter("insulation_thickness")
BORE = Parameter("bore")
LIST_SOURCE = ("; the list is common practice for preformed pipe sections / mineral-wool pipe sections (typical "
               "makers' ranges, from memory), not a standard")


def test_a_list_of_ones_own_whose_first_value_already_meets(trace15):
    """bulk ≥ 72 °C; the list given is 50 and 80 mm: 50 mm (its bulk, solved on its own, 73.7 °C) is the answer,
    the smallest of that list; the words name no source for a list the user gave."""
    bulk_50 = solve(INSULATION.apply(trace15, 0.05)).key_figures()["min_bulk_temperature_K"]
    assert bulk_50 >= 345.15
    result = find(trace15, INSULATION, [parse_target("bulk_min=72C")], values=[0.08, 0.05])
    assert result.feasible and result.value == 0.05
    assert result.searched == "Insulation thickness, all 5 segments over 2 standard values: 50 mm, 80 mm"
    margin = f"{bulk_50 - 345.15:.1f} K"
    assert result.explanation == ("50 mm is the smallest insulation thickness on the list, and it meets every target "
                                  f"(binding: bulk temperature everywhere at least 72.0 °C (margin {margin})).")


def test_the_standard_list_trimmed_to_the_range_given_ends_included(trace15):
    """lower 25 mm and upper 65 mm keep 25, 30, 40, 50 and 65 mm of the standard list, both ends included."""
    result = find(trace15, INSULATION, [parse_target("bulk_min=72C")], lower=0.025, upper=0.065)
    assert result.searched == ("Insulation thickness, all 5 segments over 5 standard values: 25 mm, 30 mm, 40 mm, "
                               "50 mm, 65 mm" + LIST_SOURCE)
    assert (result.lower, result.upper) == (0.025, 0.065)
    assert result.value == 0.03 and result.evaluations == 5 + 1
    assert result.explanation.startswith("30 mm is the smallest insulation thickness on the list that meets every "
                                         "target; 25 mm misses: bulk temperature everywhere at least 72.0 °C: the "
                                         "bulk falls to 71.4 °C")
    with pytest.raises(InputError) as info:
        find(trace15, INSULATION, [parse_target("bulk_min=72C")], lower=0.2)
    assert info.value.field == "insulation_thickness" and "no standard value lies in the range given" in str(info.value)
    assert "0.2" in str(info.value)


def test_the_binding_target_is_the_one_that_rules_out_the_size_below(trace15):
    """At 30 mm the inner wall (75.0 °C solved on its own, 75.01 °C allowed) has a smaller share of margin than
    the bulk, but it is met at 25 mm too: the bulk, missed at 25 mm, is what rules out the thinner size."""
    at_25, at_30 = (solve(INSULATION.apply(trace15, t)).key_figures() for t in (0.025, 0.03))
    assert at_25["min_bulk_temperature_K"] < 345.15 <= at_30["min_bulk_temperature_K"]
    assert at_25["max_inner_wall_temperature_K"] <= 348.16 and at_30["max_inner_wall_temperature_K"] <= 348.16
    wall_share = (348.16 - at_30["max_inner_wall_temperature_K"]) / 348.16
    bulk_share = (at_30["min_bulk_temperature_K"] - 345.15) / 345.15
    assert wall_share < bulk_share
    targets = [parse_target("bulk_min=72C"), parse_target("inner_wall_max=75.01C")]
    result = find(trace15, INSULATION, targets)
    assert result.feasible and result.value == 0.03
    assert result.binding == targets[0] and result.binding_text == "bulk temperature everywhere at least 72.0 °C"
    # the words already say what rules out 25 mm: no binding words after them
    assert result.explanation == ("30 mm is the smallest insulation thickness on the list that meets every target; "
                                  "25 mm misses: bulk temperature everywhere at least 72.0 °C: the bulk falls to "
                                  "71.4 °C in Unit feed.")
    # the same with the list given as 25 and 30 mm (the answer the second of two)
    given = find(trace15, INSULATION, targets, values=[0.025, 0.03])
    assert given.value == 0.03 and given.binding == targets[0]
    # an outer surface of at most 24.5 °C too (25.2 °C at 25 mm, 24.2 °C at 30 mm, solved on their own):
    # both misses of 25 mm are named
    assert at_25["max_outer_surface_temperature_K"] > 297.65 >= at_30["max_outer_surface_temperature_K"]
    both = find(trace15, INSULATION, [*targets, parse_target("surface_max=24.5C")])
    assert both.value == 0.03
    assert "71.4 °C in Unit feed; outer surface at most 24.5 °C: the outer surface is 25.2 °C" in both.explanation


def test_two_targets_that_no_listed_size_meets_together(trace15):
    """Fixed 15 W/m: more insulation lifts the bulk and the inner wall together; bulk ≥ 74.5 °C and inner wall
    ≤ 75.1 °C are each met on the list, never at one size. The sizes named are those the one-by-one solves
    give."""
    targets = [parse_target("bulk_min=74.5C"), parse_target("inner_wall_max=75.1C")]
    figs = {t: solve(INSULATION.apply(trace15, t)).key_figures() for t in STANDARD_INSULATION_THICKNESSES_M}
    bulk_ok = [t for t, f in figs.items() if f["min_bulk_temperature_K"] >= targets[0].value]
    wall_ok = [t for t, f in figs.items() if f["max_inner_wall_temperature_K"] <= targets[1].value]
    assert bulk_ok == [0.08, 0.1] and wall_ok == [0.013, 0.02, 0.025, 0.03, 0.04, 0.05]
    result = find(trace15, INSULATION, targets)
    assert not result.feasible
    assert result.explanation == ("No insulation thickness on the list meets every target at once: 'bulk "
                                  "temperature everywhere at least 74.5 °C' is met only at 80 mm, 100 mm, 'inner "
                                  "wall at most 75.1 °C' only at 13 mm to 50 mm.")
    assert result.searched.endswith(LIST_SOURCE)
    # a third target, outlet ≤ 70.5 °C, met only at 13 and 20 mm (one-by-one solves): two pairs pull apart
    assert [t for t, f in figs.items() if f["outlet_temperature_K"] <= 343.65] == [0.013, 0.02]
    result = find(trace15, INSULATION, [*targets, parse_target("outlet_max=70.5C")], lower=0.013, upper=0.1)
    assert result.explanation == ("No insulation thickness on the list meets every target at once: 'bulk "
                                  "temperature everywhere at least 74.5 °C' is met only at 80 mm, 100 mm, 'inner "
                                  "wall at most 75.1 °C' only at 13 mm to 50 mm; 'bulk temperature everywhere at "
                                  "least 74.5 °C' is met only at 80 mm, 100 mm, 'outlet temperature at most 70.5 °C' "
                                  "only at 13 mm, 20 mm.")
    assert (result.lower, result.upper) == (0.013, 0.1) and not result.feasible


def test_a_size_below_that_fails_to_solve_is_named_with_its_error(trace15):
    """NPS 1/2 cannot pass the demo's 0.4 kg/s from 6 bar(a) (the solver refuses it on its own); NPS 3/4 can
    (341 kPa, solved on its own): the answer for a pressure drop of at most 400 kPa, its words naming why the
    size below is out. The full NPS list is named by its ends and source."""
    with pytest.raises(Exception) as info:
        solve(BORE.apply(trace15, "1/2"))
    assert solve(BORE.apply(trace15, "3/4")).key_figures()["pressure_drop_Pa"] <= 4e5
    result = find(trace15, BORE, [parse_target("pressure_drop_max=400kPa")])
    assert result.feasible and result.value == "3/4"
    assert result.explanation.startswith("NPS 3/4 is the smallest bore on the list that meets every target; NPS 1/2 "
                                         f"misses: it fails to solve: {info.value}")
    assert "(binding: pressure drop at most 400 kPa (margin" in result.explanation
    assert result.searched == ("Bore, all 5 segments over 23 standard values: NPS 1/8 to NPS 24; the list is the "
                               "NPS sizes of ASME B36.10M/B36.19M in the segments' schedule")
    given = find(trace15, BORE, [parse_target("pressure_drop_max=400kPa")], values=["1/2", "3/4", "1"])
    assert given.value == "3/4"
    assert given.searched == "Bore, all 5 segments over 3 standard values: NPS 1/2, NPS 3/4, NPS 1"


def test_sizes_that_all_fail_to_solve_and_figures_that_do_not_apply(trace15, run):
    with pytest.raises(Exception) as info:
        solve(BORE.apply(trace15, "1/8"))
    result = find(trace15, BORE, [parse_target("pressure_drop_max=400kPa")], values=["1/8", "1/4"])
    assert not result.feasible and result.value is None
    assert result.explanation == f"The line fails to solve at every value tried: {info.value}"
    assert result.searched == "Bore, all 5 segments over 2 standard values: NPS 1/8, NPS 1/4"
    # the closed-form run has no surface in air: an outer-surface target cannot be judged on it
    result = find(run, BORE, [parse_target("surface_max=50C")], values=["2", "3"], lower="2", upper="3")
    assert not result.feasible
    assert result.explanation == ("'outer surface at most 50.0 °C' cannot be judged on this line: max outer-surface "
                                  "temperature (in air) does not apply to it (no surface of the line is in air).")
    assert (result.lower, result.upper) == ("2", "3")


def test_a_bore_bound_outside_the_schedule_is_refused(trace15):
    """ASME B36.10M lists no NPS 22 in schedule 40 (the demo's)."""
    with pytest.raises(InputError) as info:
        find(trace15, BORE, [parse_target("pressure_drop_max=400kPa")], lower="22")
    assert info.value.field == "bore" and "'22'" in str(info.value)
    assert "is not a size of the segments' schedule" in str(info.value)


def test_design_cases_are_solved_only_for_the_design_targets(trace15):
    """The design cases cost a solve per case: a search without a worst-case or hold-time target leaves them out
    even when the project's are passed; a design target without them is refused, naming the field."""
    demo = load_project(DEMO)
    result = find(trace15, INSULATION, [parse_target("bulk_min=72C")], design=demo.design_cases)
    assert result.feasible and result.result.design is None and "hold_time_s" not in result.key_figures
    with pytest.raises(InputError) as info:
        find(trace15, INSULATION, [parse_target("hold_time_min=8h")])
    assert info.value.field == "design"
    assert "the worst-case and hold-time targets need the project's design cases" in str(info.value)


def test_a_continuous_search_that_cannot_judge_keeps_its_range(run):
    """The closed-form run has no surface in air: an outer-surface target cannot be judged, said at once."""
    result = find(run, HEATER, [parse_target("surface_max=50C")], upper=600.0)
    assert not result.feasible and result.value is None
    assert result.explanation.startswith("'outer surface at most 50.0 °C' cannot be judged on this line")
    assert result.searched == _searched("0 W/m", "600 W/m")
    assert (result.lower, result.upper) == (0.0, 600.0)


def test_a_narrow_band_that_cannot_be_searched_is_no_error(run, monkeypatch):
    """311–313 K out needs 220–260 W/m (energy balance), between the scanned 200 and 300 W/m; when nothing between
    them solves (made to fail here), the finder finds no value and raises nothing. (Its words then say no value
    meets both targets at once, though the band could not be searched.)"""
    import numpy as np

    import solver.target_finder as tf
    from solver.batch import BatchOutcome
    from solver.errors import SolverError
    from solver.variants import Variant

    scanned = {float(v) for v in np.linspace(0.0, 600.0, SCAN_POINTS)}
    real = tf.solve_prepared

    def only_scanned(prepared, **kw):
        keep = [p for p in prepared if p[0] in scanned]
        solved = {v.value: v for v in real(keep, **kw)} if keep else {}
        return [solved.get(p[0]) or Variant(p[0], p[2], BatchOutcome(error=SolverError("made to fail")), p[1])
                for p in prepared]

    monkeypatch.setattr(tf, "solve_prepared", only_scanned)
    result = find(run, HEATER, [Target("outlet_min", 311.0), Target("outlet_max", 313.0)], upper=600.0)
    monkeypatch.undo()
    assert not result.feasible and result.value is None and result.explanation


def test_discrete_refusals_name_the_bore_and_a_missed_target_keeps_the_range(trace15):
    """An NPS that the ASME B36.10M table does not have is refused as a bore, in the list or as a bound; a target
    missed on the whole (trimmed) list keeps the range searched in the answer."""
    for kw in ({"values": ["2", "99"]}, {"lower": "99"}):
        with pytest.raises(InputError) as info:
            find(trace15, BORE, [parse_target("pressure_drop_max=400kPa")], **kw)
        assert info.value.field == "bore", kw
    result = find(trace15, INSULATION, [parse_target("surface_max=15C")], lower=0.05)
    assert not result.feasible and (result.lower, result.upper) == (0.05, None)
    assert result.searched == ("Insulation thickness, all 5 segments over 4 standard values: 50 mm, 65 mm, 80 mm, "
                               "100 mm" + LIST_SOURCE)
