"""Many variants solved together (solver.batch) give what each gives solved on its own.

The reference is the solver's own one-by-one solve (solver.march.solve), whose physics the rest
of the suite checks against published methods; the issue's criterion is agreement to 1e-9
relative. Each case also asserts that the variants really were marched together, so a batch
path that silently fell back to one-by-one solving would not pass.
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest

from solver.batch import BatchOutcome, solve_batch
from solver.errors import CalorunError
from solver.march import solve
from solver.model import ConstantHeater, Feed, Layer
from solver.project_io import load_project

ROOT = Path(__file__).resolve().parent.parent
DEMO = load_project(ROOT / "app" / "demo_project.json")
REL = 1e-9  # the agreement criterion


def _close(a: float, b: float) -> bool:
    if isinstance(a, float) and math.isnan(a):
        return isinstance(b, float) and math.isnan(b)
    return a == b or abs(a - b) <= REL * max(abs(a), abs(b)) or abs(a - b) < 1e-12


def _assert_same(outcomes: list[BatchOutcome], alts) -> None:
    assert len(outcomes) == len(alts)
    for o, alt in zip(outcomes, alts):
        ref = solve(alt).key_figures()
        assert o.ok, o.error
        for key, value in ref.items():
            assert _close(value, o.key_figures[key]), (alt.name, key, value, o.key_figures[key])


def _with_heater(alt, w_per_m: float):
    segs = [s.model_copy(update={"heater": ConstantHeater(output_W_per_m=w_per_m)}) for s in alt.segments]
    return alt.model_copy(update={"segments": segs, "name": f"{w_per_m:g} W/m"})


def test_heater_output_variants_equal_one_by_one():
    base = DEMO.alternatives[1]  # constant heater, table fluid, air, wind and buried segments, fittings
    alts = [_with_heater(base, w) for w in (5.0, 9.5, 15.0, 22.0, 31.0, 40.0)]
    out = solve_batch(alts)
    assert all(o.together for o in out)
    assert all(o.result is None for o in out)  # key figures only
    _assert_same(out, alts)
    # the variants stop on their own passes: 5 W/m and 40 W/m are far apart, yet each equals its own solve
    assert out[0].key_figures["outlet_temperature_K"] < out[-1].key_figures["outlet_temperature_K"]


def test_self_limiting_heater_scaled_and_feed_variants():
    base = DEMO.alternatives[0]  # self-limiting heater: output follows the pipe wall
    alts = []
    for flow in (0.15, 0.4, 1.1):
        for t_in in (330.0, 348.15):
            feed = base.feed.model_copy(update={"mass_flow_kg_per_s": flow, "inlet_temperature_K": t_in})
            alts.append(base.model_copy(update={"feed": feed, "name": f"{flow} kg/s {t_in} K"}))
    out = solve_batch(alts)
    assert all(o.together for o in out)
    _assert_same(out, alts)


def test_insulation_thickness_variants_build_their_own_lines():
    base = DEMO.alternatives[2]  # no tracing
    alts = []
    for t in (0.013, 0.025, 0.05, 0.1):
        segs = [s.model_copy(update={"insulation": [Layer(material="mineral wool", thickness_m=t,
                                                          conductivity_W_per_mK=0.045)]}) for s in base.segments]
        alts.append(base.model_copy(update={"segments": segs, "name": f"{t * 1000:g} mm"}))
    out = solve_batch(alts)
    assert sum(o.together for o in out) >= 2
    _assert_same(out, alts)


def test_water_line_with_coolprop_properties():
    project = load_project(ROOT / "sample_projects" / "makeup_water_freeze_protection.json")
    base = project.alternatives[0]
    alts = [base.model_copy(update={"feed": base.feed.model_copy(update={"inlet_temperature_K": t}),
                                    "name": f"{t} K"}) for t in (279.15, 283.15, 288.15)]
    out = solve_batch(alts)
    _assert_same(out, alts)


def test_full_results_with_profiles_equal_one_by_one():
    base = DEMO.alternatives[1]
    alts = [_with_heater(base, w) for w in (8.0, 25.0)]
    out = solve_batch(alts, profiles=True)
    for o, alt in zip(out, alts):
        ref = solve(alt)
        assert o.together and o.result is not None
        assert [c.code for c in o.result.checks] == [c.code for c in ref.checks]
        for col, values in ref.profile.columns().items():
            got = o.result.profile.columns()[col]
            assert all(_close(float(a), float(b)) for a, b in zip(values, got)), col
        assert [s.heat_loss_W for s in o.result.segments] == pytest.approx([s.heat_loss_W for s in ref.segments],
                                                                            rel=REL)


def test_a_failing_variant_carries_its_own_error_and_spares_the_others():
    base = DEMO.alternatives[2]  # no tracing: a trickle of flow freezes in the winter air
    good = [base.model_copy(update={"name": "ok 1"}),
            base.model_copy(update={"feed": base.feed.model_copy(update={"inlet_temperature_K": 340.0}),
                                    "name": "ok 2"})]
    bad = base.model_copy(update={"feed": base.feed.model_copy(update={"mass_flow_kg_per_s": 1e-4}), "name": "bad"})
    alts = [good[0], bad, good[1]]
    with pytest.raises(CalorunError) as alone:
        solve(bad)
    out = solve_batch(alts)
    assert not out[1].ok
    assert str(out[1].error) == str(alone.value)
    _assert_same([out[0], out[2]], good)


def test_progress_and_cancel():
    base = DEMO.alternatives[1]
    alts = [_with_heater(base, w) for w in (10.0, 20.0, 30.0)]
    seen = []
    out = solve_batch(alts, progress=lambda done, total: seen.append((done, total)))
    assert len(out) == 3 and seen[-1] == (3, 3)
    assert solve_batch(alts, cancelled=lambda: True) == []


def test_volume_flow_feed_is_converted_per_variant():
    base = DEMO.alternatives[1]
    alts = [base.model_copy(update={"feed": Feed(**{**base.feed.model_dump(), "mass_flow_kg_per_s": None,
                                                    "volume_flow_m3_per_s": q}), "name": f"{q}"})
            for q in (2e-4, 5e-4)]
    _assert_same(solve_batch(alts), alts)


def test_steam_jacket_variants_with_heat_from_media():
    project = load_project(ROOT / "sample_projects" / "steam_jacketed_heater.json")
    for base in project.alternatives:
        alts = [base.model_copy(update={"feed": base.feed.model_copy(update={"mass_flow_kg_per_s": f}),
                                        "name": f"{f} kg/s"})
                for f in (0.8 * base.feed.mass_flow_kg_per_s, base.feed.mass_flow_kg_per_s)]
        out = solve_batch(alts)
        assert all(o.together for o in out), base.name
        _assert_same(out, alts)


def test_cooled_wall_variants():
    """A wall held colder than the fluid (a cooler): heat from media is negative, losses elsewhere positive."""
    from solver.model import FixedWall

    project = load_project(ROOT / "sample_projects" / "steam_jacketed_heater.json")
    base = project.alternatives[0]
    alts = []
    for t_wall in (290.0, 300.0):
        segs = [s.model_copy(update={"surroundings": FixedWall(wall_temperature_K=t_wall)})
                if s.surroundings.kind == "fixed_wall" else s for s in base.segments]
        alts.append(base.model_copy(update={"segments": segs, "name": f"wall {t_wall} K",
                                            "feed": base.feed.model_copy(update={"inlet_temperature_K": 350.0})}))
    out = solve_batch(alts)
    assert all(o.together for o in out)
    assert all(o.key_figures["heat_input_media_W"] < 0 for o in out)
    _assert_same(out, alts)


def test_answers_do_not_depend_on_chunks_or_threads(monkeypatch):
    """Chunks of stacked variants may march on several threads: the answers are the same bits either way."""
    import solver.batch as batch_mod

    base = DEMO.alternatives[1]
    alts = [_with_heater(base, w) for w in (6.0, 12.0, 18.0, 24.0, 30.0, 36.0, 40.0, 8.0)]
    one = solve_batch(alts, threads=1)
    monkeypatch.setattr(batch_mod, "MAX_STACK_CELLS", 2 * 700)  # two variants of the demo per chunk
    many = solve_batch(alts, threads=3)
    assert all(o.together for o in many)
    assert [o.key_figures for o in many] == [o.key_figures for o in one]


def test_jacket_and_steam_tracer_variants_equal_one_by_one():
    """A jacket (heat from a medium) and a steam tracer (tracing heat that is not an electric heater's) marched
    together: heat from media, tracing heat and losses are split as a solve on its own splits them. (Found by
    mutation testing: no other batch case has a jacket or a steam tracer.)"""
    from solver.model import Jacket, SteamTracer

    base = DEMO.alternatives[2]  # no tracing, 80 mm wool
    segs = list(base.segments)
    segs[0] = segs[0].model_copy(update={"surroundings": Jacket(medium_temperature_K=365.0,
                                                                film_coefficient_W_per_m2K=800.0),
                                         "heater": ConstantHeater(output_W_per_m=12.0), "insulation": []})
    segs[1] = segs[1].model_copy(update={"steam_tracer": SteamTracer(steam_pressure_Pa=4e5)})
    alts = [base.model_copy(update={"segments": segs, "name": f"{f} kg/s",
                                    "feed": base.feed.model_copy(update={"mass_flow_kg_per_s": f})})
            for f in (0.3, 0.45, 0.7)]
    out = solve_batch(alts)
    assert all(o.together for o in out)
    _assert_same(out, alts)
    ref = solve(alts[0]).key_figures()
    assert ref["heat_input_media_W"] > 0 and ref["heat_input_tracing_W"] > 0


def test_a_line_with_no_surface_in_air_marched_together():
    """Adiabatic run, constant properties: no outer surface in air (its figures NaN, as a solve on its own gives
    them), and the outlet is the energy balance To = Ti + q'·L/(m·cp) (Incropera et al., Fundamentals of Heat and
    Mass Transfer, ch. 8; friction adds Δp/(ρ·cp), under 1e-3 K here). (Found by mutation testing.)"""
    from solver.model import Adiabatic, Alternative, Pipe, Segment, TableFluid, TableRow

    rows = [TableRow(temperature_K=t, density_kg_per_m3=1000.0, specific_heat_J_per_kgK=4000.0,
                     viscosity_Pa_s=1e-3, conductivity_W_per_mK=0.6) for t in (280.0, 400.0)]
    alts = [Alternative(name=f"{q} W/m", fluid=TableFluid(name="constant", rows=rows),
                        feed=Feed(inlet_temperature_K=300.0, mass_flow_kg_per_s=0.5, inlet_flow="developed"),
                        segments=[Segment(name="Run", length_m=100.0, pipe=Pipe(nps="2", schedule="40"),
                                          heater=ConstantHeater(output_W_per_m=q), surroundings=Adiabatic())])
            for q in (50.0, 100.0, 200.0)]
    out = solve_batch(alts)
    assert all(o.together for o in out)
    _assert_same(out, alts)
    for o, q in zip(out, (50.0, 100.0, 200.0)):
        assert math.isnan(o.key_figures["max_outer_surface_temperature_K"])
        assert o.key_figures["outlet_temperature_K"] == pytest.approx(300.0 + q * 100.0 / (0.5 * 4000.0), abs=1e-3)


def test_heat_sink_variants_equal_one_by_one():
    """Supports and a valve on the traced demo line (heat sinks): their loss is summed per variant as a solve on
    its own sums it. (Found by mutation testing: no other batch case has heat sinks.)"""
    from solver.model import HeatSink

    base = DEMO.alternatives[1]
    segs = list(base.segments)
    segs[0] = segs[0].model_copy(update={"heat_sinks": [HeatSink(kind="pipe_support", count=6),
                                                        HeatSink(kind="valve")]})
    alts = [_with_heater(base.model_copy(update={"segments": segs}), w) for w in (10.0, 20.0, 35.0)]
    out = solve_batch(alts)
    assert all(o.together for o in out)
    _assert_same(out, alts)
    assert all(o.key_figures["heat_sink_loss_W"] > 0 for o in out)


def test_a_variant_that_boils_is_refused_as_on_its_own():
    """Water at 4 bar(a) boils at 143.6 °C (IAPWS-IF97 through CoolProp): 3 kW/m into 50 g/s fed at 365 K boils it
    in the first segment, 20 W/m does not. Marched together, the boiling variant gets the error its own solve
    gives and the other its own figures. (Found by mutation testing.)"""
    project = load_project(ROOT / "sample_projects" / "makeup_water_freeze_protection.json")
    base = project.alternatives[0]
    alts = []
    for q in (20.0, 3000.0):
        segs = [s.model_copy(update={"heater": ConstantHeater(output_W_per_m=q)}) for s in base.segments]
        alts.append(base.model_copy(update={"segments": segs, "name": f"{q:g} W/m", "feed": base.feed.model_copy(
            update={"inlet_temperature_K": 365.0, "mass_flow_kg_per_s": 0.05})}))
    with pytest.raises(CalorunError) as alone:
        solve(alts[1])
    assert "boiling point" in str(alone.value)
    out = solve_batch(alts)
    assert not out[1].ok and str(out[1].error) == str(alone.value)
    _assert_same([out[0]], [alts[0]])


def test_a_mixed_batch_gives_each_its_own_outcome_in_order():
    """One call with what must not march together and what must: a gas (nitrogen, solved alone for choking), a feed
    outside its fluid table (refused as on its own), two fluids on one layout (each its own properties), flows given
    as volume (converted per variant), a thermostat and insulation with the catalogue's k(T) (both solved alone),
    and a layout of one. Every outcome equals the one-by-one solve, in order; the pairs that can march together
    do. (Found by mutation testing of solver.batch._groups and solve_batch.)"""
    from solver.model import TableFluid, TableRow, ThermostatHeater

    gas = load_project(ROOT / "sample_projects" / "nitrogen_header_outdoors.json").alternatives[0]
    base = DEMO.alternatives[1]  # constant heater, table fluid
    bad = base.model_copy(update={"name": "too hot", "feed": base.feed.model_copy(
        update={"inlet_temperature_K": 900.0})})
    rows = [TableRow(temperature_K=t, density_kg_per_m3=rho, specific_heat_J_per_kgK=cp, viscosity_Pa_s=mu,
                     conductivity_W_per_mK=0.13) for t, rho, cp, mu in ((250.0, 980.0, 1900.0, 0.02),
                                                                        (450.0, 860.0, 2400.0, 0.002))]
    other_fluid = base.model_copy(update={"name": "other fluid", "fluid": TableFluid(name="other oil", rows=rows)})
    by_volume = [base.model_copy(update={"name": f"{q} m3/s", "feed": Feed(**{
        **base.feed.model_dump(), "mass_flow_kg_per_s": None, "volume_flow_m3_per_s": q})}) for q in (3e-4, 6e-4)]
    thermostat = base.model_copy(update={"name": "thermostat", "segments": [s.model_copy(update={
        "heater": ThermostatHeater(output_W_per_m=20.0, set_point_K=340.0)}) for s in base.segments]})
    k_of_t = base.model_copy(update={"name": "k(T)", "segments": [s.model_copy(update={
        "insulation": [Layer(material="mineral wool", thickness_m=0.05)]}) for s in base.segments]})
    one_of_a_kind = base.model_copy(update={"name": "short", "segments": base.segments[:2]})
    alts = [gas, bad, base, other_fluid, *by_volume, thermostat, k_of_t, one_of_a_kind,
            _with_heater(other_fluid, 30.0)]
    out = solve_batch(alts)
    assert len(out) == len(alts)
    for o, alt in zip(out, alts):
        try:
            ref = solve(alt).key_figures()
        except CalorunError as exc:
            assert not o.ok and str(o.error) == str(exc), alt.name
            continue
        assert o.ok, (alt.name, o.error)
        for key, value in ref.items():
            assert _close(value, o.key_figures[key]), (alt.name, key, value, o.key_figures[key])
    together = {alt.name: o.together for o, alt in zip(out, alts)}
    assert together["other fluid"] and together["30 W/m"] and together["0.0003 m3/s"] and together[base.name]
    assert not any(together[n] for n in ("NPS 2 bare", "too hot", "thermostat", "k(T)", "short"))


def test_profiles_on_threads_and_a_group_of_one(monkeypatch):
    """Full results come back on the threaded path too (two chunks of the demo on two threads); a variant whose
    layout no other shares is solved on its own. The figures equal the one-by-one solves."""
    import solver.batch as batch_mod

    base = DEMO.alternatives[1]
    alts = [_with_heater(base, w) for w in (8.0, 16.0, 24.0, 32.0)]
    lone = base.model_copy(update={"name": "short", "segments": base.segments[:2]})
    monkeypatch.setattr(batch_mod, "MAX_STACK_CELLS", 2 * 700)  # two variants of the demo per chunk
    out = solve_batch([*alts, lone], profiles=True, threads=2)
    assert all(o.together and o.result is not None for o in out[:4])
    assert not out[4].together and out[4].result is not None
    _assert_same(out, [*alts, lone])


def test_a_variant_out_of_pressure_is_a_refusal_not_an_internal_error(caplog):
    """A group with a variant whose pressure runs out falls back to one-by-one solves as a solver refusal;
    the stacked path once broke on the way (formatting an array in the message), which only a log showed."""
    import logging

    base = DEMO.alternatives[1]
    alts = [base.model_copy(update={"feed": base.feed.model_copy(update={"mass_flow_kg_per_s": f}),
                                    "name": f"{f} kg/s"}) for f in (0.4, 40.0)]
    with pytest.raises(CalorunError) as alone:
        solve(alts[1])
    with caplog.at_level(logging.WARNING, logger="solver.batch"):
        out = solve_batch(alts)
    assert [r for r in caplog.records if r.name == "solver.batch"] == []
    assert out[0].ok and not out[1].ok and str(out[1].error) == str(alone.value)
