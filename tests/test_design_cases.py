"""Design cases (solver.design_cases): worst and hot case standing still, and the tracing each segment needs.

A buried, insulated segment has a constant outside path, so the standing balances have closed forms:
R' = ln(D2/D1)/(2π k_ins) + acosh(2z/D2)/(2π k_soil) (conduction through a cylindrical layer, and a
cylinder below an isothermal surface: Incropera & DeWitt, Table 4.1, case 1).
"""

from __future__ import annotations

import math

import pytest

from solver.march import solve
from solver.model import (Alternative, Buried, ConstantHeater, DesignCases, Feed, HeatSink, Layer, Limits, Pipe,
                          PureFluid, Segment, SelfLimitingHeater, StillAir, ThermostatHeater)

D_IN, WALL, T_INS, K_INS = 0.0525, 0.0039, 0.03, 0.040
D_PIPE = D_IN + 2 * WALL
D_INS = D_PIPE + 2 * T_INS
DEPTH, K_SOIL, LENGTH = 1.0, 1.2, 20.0


def _r_outside():
    return (math.log(D_INS / D_PIPE) / (2 * math.pi * K_INS)
            + math.acosh(2 * DEPTH / D_INS) / (2 * math.pi * K_SOIL))  # Incropera & DeWitt Table 4.1, case 1


def _line(t_soil=263.15, heater=None, limits=None, sinks=(), margin=None, t_in=288.15):
    seg = Segment(name="Buried run", length_m=LENGTH,
                  pipe=Pipe(bore="diameter", inner_diameter_m=D_IN, wall_thickness_m=WALL),
                  insulation=[Layer(material="mineral wool", thickness_m=T_INS, conductivity_W_per_mK=K_INS)],
                  surroundings=Buried(soil_temperature_K=t_soil, depth_m=DEPTH, soil_conductivity_W_per_mK=K_SOIL),
                  heater=heater, heat_sinks=list(sinks), design_margin=margin)
    return Alternative(name="Buried", fluid=PureFluid(name="Water"),
                       feed=Feed(inlet_temperature_K=t_in, inlet_pressure_Pa=300_000.0, mass_flow_kg_per_s=1.0),
                       segments=[seg], limits=limits or Limits())


def test_self_limiting_standing_equilibrium_is_the_root_of_the_linear_balance():
    # Hand solution: output s·(Tz − T) with s = (30 − 10)/(60 − 10) = 0.4 W/(m·K), Tz = 10 °C + 30/0.4 = 85 °C;
    # standing still s·(Tz − T) = (T − T∞)/R'  =>  T = (s·Tz + T∞/R')/(s + 1/R').
    heater = SelfLimitingHeater(output_low_W_per_m=30.0, temperature_low_K=283.15,
                                output_high_W_per_m=10.0, temperature_high_K=333.15)
    t_soil = 263.15
    design = solve(_line(t_soil, heater=heater), design=DesignCases()).design
    s, tz, r = 0.4, 358.15, _r_outside()
    expected = (s * tz + t_soil / r) / (s + 1.0 / r)
    seg = design.segments[0]
    assert seg.worst_temperature_K == pytest.approx(expected, abs=1e-6)
    assert seg.worst_heater_output_W_per_m == pytest.approx(s * (tz - expected), rel=1e-6)


def test_tracing_need_is_loss_plus_sinks_with_margin():
    # common practice in trace-heating design: required = (pipe loss at the maintain temperature + heat sinks)
    # × (1 + margin). Pipe loss per metre (T_m − T∞)/R'; sinks: 2 items of 1.5 m of the same insulated pipe
    # and 3 items of 0.2 W/K direct, spread over the 20 m segment.
    t_soil, t_m, margin = 263.15, 278.15, 0.25
    sinks = [HeatSink(kind="valve", count=2, equivalent_length_m=1.5), HeatSink(kind="other", count=3, loss_W_per_K=0.2)]
    alt = _line(t_soil, heater=ConstantHeater(output_W_per_m=12.0), limits=Limits(maintain_temperature_K=t_m),
                sinks=sinks, margin=margin)
    design = solve(alt, design=DesignCases()).design
    seg = design.segments[0]
    loss = (t_m - t_soil) / _r_outside()
    sink = (2 * 1.5 * loss + 3 * 0.2 * (t_m - t_soil)) / LENGTH
    assert seg.heat_loss_W_per_m == pytest.approx(loss, rel=1e-9)
    assert seg.heat_sinks_W_per_m == pytest.approx(sink, rel=1e-9)
    required = (loss + sink) * (1 + margin)
    assert seg.required_output_W_per_m == pytest.approx(required, rel=1e-9)
    assert seg.available_output_W_per_m == 12.0
    assert seg.holds is (12.0 >= required)
    words = design.tracing_words(0)
    assert words.startswith(f"needs {required:.1f} W/m at 5.0 °C")
    assert words.endswith(": OK" if seg.holds else ": does not hold")


def test_maintain_temperature_falls_back_to_freeze_protection():
    # no maintain or minimum temperature on a water line: hold the freezing point + 5 K (common practice);
    # water's freezing point in the model is CoolProp's triple point, 273.16 K
    design = solve(_line(), design=DesignCases()).design
    assert design.maintain_temperature_K == pytest.approx(273.16 + 5.0, abs=1e-6)
    assert "common practice" in design.maintain_basis
    # the project's project-wide margin applies where the segment sets none
    assert design.segments[0].design_margin == DesignCases().design_margin


def test_thermostat_holds_its_set_point_in_the_worst_case_and_fails_on_in_the_hot_case():
    # worst case: full output 60 W/m could reach T∞ + q·R' > set point, so it holds the set point;
    # hot case: the thermostat failed on, T = T∞ + q·R' (the soil is the same in both: no worst soil given)
    t_soil, q, sp = 268.15, 60.0, 288.15
    alt = _line(t_soil, heater=ThermostatHeater(output_W_per_m=q, set_point_K=sp))
    seg = solve(alt, design=DesignCases()).design.segments[0]
    r = _r_outside()
    assert t_soil + q * r > sp
    assert seg.worst_temperature_K == pytest.approx(sp, abs=1e-9)
    assert seg.worst_thermostat_duty == pytest.approx((sp - t_soil) / r / q, rel=1e-6)
    assert seg.hot_wall_temperature_K == pytest.approx(t_soil + q * r, rel=1e-9)


def test_worst_soil_temperature_replaces_the_segments_own():
    # the closed form again, now at the project's worst soil temperature: T = T∞,worst + q·R'
    q = 10.0
    alt = _line(283.15, heater=ConstantHeater(output_W_per_m=q))
    seg = solve(alt, design=DesignCases(worst_soil_temperature_K=263.15)).design.segments[0]
    assert seg.worst_surroundings_temperature_K == 263.15
    assert seg.worst_temperature_K == pytest.approx(263.15 + q * _r_outside(), rel=1e-9)


def _air_line(heater_w=None):
    seg = Segment(name="Rack", length_m=30.0, pipe=Pipe(nps="2", schedule="40"),
                  insulation=[Layer(material="mineral wool", thickness_m=0.05, conductivity_W_per_mK=0.040)],
                  surroundings=StillAir(temperature_K=293.15),
                  heater=None if heater_w is None else ConstantHeater(output_W_per_m=heater_w))
    return Alternative(name="Air", fluid=PureFluid(name="Water"),
                       feed=Feed(inlet_temperature_K=293.15, inlet_pressure_Pa=300_000.0, mass_flow_kg_per_s=1.0),
                       segments=[seg], limits=Limits(maintain_temperature_K=278.15))


def test_colder_and_windier_worst_case_needs_more_tracing():
    # what a user notices: a harsher worst case asks more of the heater, never less
    mild = solve(_air_line(10.0), design=DesignCases(worst_air_temperature_K=263.15, worst_wind_speed_m_per_s=2.0))
    harsh = solve(_air_line(10.0), design=DesignCases(worst_air_temperature_K=243.15, worst_wind_speed_m_per_s=20.0))
    a, b = mild.design.segments[0], harsh.design.segments[0]
    assert b.required_output_W_per_m > a.required_output_W_per_m
    assert b.worst_temperature_K < a.worst_temperature_K
    assert b.worst_surroundings_temperature_K == 243.15
    # the insulation carries almost all of the resistance: loss ≈ (T_m − T∞)/R'_ins within the film's share
    r_ins = math.log((0.0603 + 0.1) / 0.0603) / (2 * math.pi * 0.040)
    assert b.heat_loss_W_per_m == pytest.approx((278.15 - 243.15) / r_ins, rel=0.03)
    assert b.heat_loss_W_per_m < (278.15 - 243.15) / r_ins


def test_bare_pipe_loss_in_the_design_wind_matches_churchill_bernstein_and_radiation():
    # A bare NPS 2 pipe held at the maintain temperature (5 °C) in the design wind (10 m/s) at −20 °C:
    # loss per metre = (h_conv + h_rad)·π·D·(T_m − T∞), h_conv from Churchill–Bernstein (the `ht` library),
    # air properties from CoolProp at the film temperature, h_rad = εσ(Ts² + T∞²)(Ts + T∞), ε = 0.9.
    # Natural convection adds under 0.1 % by Churchill's cube rule at this wind (so 1 % tolerance).
    import CoolProp.CoolProp as CP
    from ht.conv_external import Nu_cylinder_Churchill_Bernstein

    t_m, t_air, wind, d = 278.15, 253.15, 10.0, 0.0603  # NPS 2 outside diameter, ASME B36.10M
    seg = Segment(name="Bare", length_m=10.0, pipe=Pipe(nps="2", schedule="40"), surroundings=StillAir())
    alt = Alternative(name="Bare", fluid=PureFluid(name="Water"),
                      feed=Feed(inlet_temperature_K=293.15, inlet_pressure_Pa=300_000.0, mass_flow_kg_per_s=1.0),
                      segments=[seg], limits=Limits(maintain_temperature_K=t_m))
    got = solve(alt, design=DesignCases(worst_air_temperature_K=t_air, worst_wind_speed_m_per_s=wind))
    t_film = 0.5 * (t_m + t_air)
    rho, mu, k, cp = (CP.PropsSI(q, "T", t_film, "P", 101325.0, "Air") for q in ("D", "V", "L", "C"))
    re, pr = rho * wind * d / mu, cp * mu / k
    h_conv = Nu_cylinder_Churchill_Bernstein(re, pr) * k / d
    h_rad = 0.9 * 5.670374419e-8 * (t_m**2 + t_air**2) * (t_m + t_air)
    expected = (h_conv + h_rad) * math.pi * d * (t_m - t_air)
    assert got.design.segments[0].heat_loss_W_per_m == pytest.approx(expected, rel=0.01)


def test_flowing_worst_case_arrives_warmer_than_standing_still():
    # flowing, a warm feed carries heat along; standing still the unheated line settles at the air temperature
    still = solve(_air_line(), design=DesignCases(worst_no_flow=True)).design.segments[0]
    flowing = solve(_air_line(), design=DesignCases(worst_no_flow=False)).design.segments[0]
    assert still.worst_temperature_K == pytest.approx(DesignCases().worst_air_temperature_K, abs=1e-6)
    assert flowing.worst_temperature_K > still.worst_temperature_K + 5.0


def test_solve_without_design_cases_has_none():
    assert solve(_line()).design is None


# --------------------------------------------------------------------------- the design cases reach the Checks


def _codes(result, code):
    return [c for c in result.checks if c.code == code]


def test_tracing_that_cannot_hold_the_worst_case_is_a_check_naming_the_segment():
    # freeze protection (no maintain temperature given: freezing point + 5 K, common practice) of water, buried
    # at -10 °C soil: R' from the closed form above; 2 W/m cannot hold 5 °C (needs (5 + 10)/R' × 1.2)
    t_soil = 263.15
    weak = solve(_line(t_soil, heater=ConstantHeater(output_W_per_m=2.0)), design=DesignCases())
    [check] = _codes(weak, "DESIGN_NOT_HELD")
    # water's freezing point at 3 bar(a) is 0.02 K below 0 °C (CoolProp's melting line): take the result's
    assert weak.design.maintain_temperature_K == pytest.approx(278.15, abs=0.05)
    needed = (weak.design.maintain_temperature_K - t_soil) / _r_outside() * 1.2
    assert check.severity == "danger" and check.segment == 0 and "'Buried run'" in check.message
    import re
    shown = [float(v) for v in re.findall(r"⟦q:([-\d.]+)⟧", check.template)]
    assert shown[0] == pytest.approx(needed, rel=1e-6) and shown[1] == pytest.approx(2.0)
    strong = solve(_line(t_soil, heater=ConstantHeater(output_W_per_m=needed * 1.01)), design=DesignCases())
    assert not _codes(strong, "DESIGN_NOT_HELD")
    plain = solve(_line(t_soil, heater=ConstantHeater(output_W_per_m=2.0)))  # no design cases asked: no such check
    assert not _codes(plain, "DESIGN_NOT_HELD")


def test_hot_case_wall_above_the_limit_is_a_check():
    # hot case standing still, heater full on: T = T_soil + q·R' (closed form); a limit below it is flagged
    q, t_soil = 20.0, 263.15
    t_hot = t_soil + q * _r_outside()  # the hot case keeps the buried segment's soil (only air changes)
    low = solve(_line(t_soil, heater=ConstantHeater(output_W_per_m=q),
                      limits=Limits(max_inner_wall_temperature_K=t_hot - 2.0)), design=DesignCases())
    [check] = _codes(low, "HOT_CASE_WALL")
    assert check.segment == 0 and "sheath runs hotter" in check.message
    high = solve(_line(t_soil, heater=ConstantHeater(output_W_per_m=q),
                       limits=Limits(max_inner_wall_temperature_K=t_hot + 2.0)), design=DesignCases())
    assert not _codes(high, "HOT_CASE_WALL")


def test_indoor_air_keeps_its_temperature_in_the_design_cases():
    # a run inside a heated building does not see the outdoor design ambient (common practice: indoor lines
    # are designed for the building's own minimum); the outdoor run beside it does
    hall = Segment(name="Hall", length_m=20.0, pipe=Pipe(nps="2", schedule="40"),
                   insulation=[Layer(thickness_m=0.025, conductivity_W_per_mK=0.04)],
                   surroundings=StillAir(temperature_K=288.15, indoors=True))
    yard = hall.model_copy(update={"name": "Yard", "surroundings": StillAir(temperature_K=288.15)})
    alt = Alternative(name="Hall and yard", fluid=PureFluid(name="Water"),
                      feed=Feed(inlet_temperature_K=293.15, inlet_pressure_Pa=3e5, mass_flow_kg_per_s=0.5),
                      segments=[hall, yard])
    cases = DesignCases(worst_air_temperature_K=248.15, hot_air_temperature_K=313.15)
    result = solve(alt, design=cases)
    inside, outside = result.design.segments
    assert inside.worst_surroundings_temperature_K == pytest.approx(288.15)
    assert outside.worst_surroundings_temperature_K == pytest.approx(248.15)
    # untraced, standing still: each settles at its own air (closed form: no heat input), 15 °C and -25 °C
    assert inside.worst_temperature_K == pytest.approx(288.15, abs=1e-6)
    assert outside.worst_temperature_K == pytest.approx(248.15, abs=1e-6)
    assert inside.hot_wall_temperature_K == pytest.approx(288.15, abs=1e-6)
    assert inside.holds is True and outside.holds is False  # freeze protection: 5 °C held indoors only
    [check] = [c for c in result.checks if c.code == "DESIGN_NOT_HELD"]
    assert "'Yard'" in check.message and "'Hall'" not in check.message


def test_a_segment_in_warmer_air_needs_no_heating_in_words():
    # indoors at 15 °C, freeze protection holds 5 °C with nothing: the words say so instead of a negative need
    hall = Segment(name="Hall", length_m=20.0, pipe=Pipe(nps="2", schedule="40"),
                   surroundings=StillAir(temperature_K=288.15, indoors=True))
    alt = Alternative(name="Hall", fluid=PureFluid(name="Water"),
                      feed=Feed(inlet_temperature_K=293.15, inlet_pressure_Pa=3e5, mass_flow_kg_per_s=0.5),
                      segments=[hall])
    design = solve(alt, design=DesignCases()).design
    words = design.tracing_words(0)
    assert words.startswith("needs no heating to hold 5.0 °C") and "15.0 °C" in words and words.endswith("OK")
    assert "-" not in words.split("hold")[1]
