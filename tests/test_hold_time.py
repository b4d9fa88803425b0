"""Hold Time (solver.hold_time) against closed-form solutions and the issue's lumped estimate.

A buried segment has a constant outside path (no air film): conduction through insulation,
ln(D2/D1)/(2πk), and the soil's shape factor, R' = acosh(2z/D)/(2π k_soil) (a cylinder below an
isothermal surface, Incropera & DeWitt, Table 4.1, case 1). With the properties taken at the start
temperature the lumped cooldown is then Newton cooling, T(t) = T∞ + (T0 − T∞)·exp(−t/τ), τ = C'·R'.
"""

from __future__ import annotations

import math

import CoolProp.CoolProp as CP
import numpy as np
import pytest

from solver.march import solve
from solver.model import (Alternative, Buried, DesignCases, Feed, Layer, Limits, Pipe, PureFluid, Segment,
                          SelfLimitingHeater, ThermostatHeater)

D_IN, WALL = 0.0525, 0.0039  # NPS 2 Sch 40 bore and wall (ASME B36.10M: 52.5 mm, 3.91 mm)
D_OUT = D_IN + 2 * WALL
STEEL_RHO_C = 7854.0 * 434.0  # plain carbon steel at 300 K, Incropera & DeWitt Table A.1
DEPTH, K_SOIL = 1.0, 1.2


def _soil_r(d):
    return math.acosh(2 * DEPTH / d) / (2 * math.pi * K_SOIL)  # Incropera & DeWitt Table 4.1, case 1


def _buried_line(t_soil, t_in=288.15, heater=None, limits=None, insulation=()):
    seg = Segment(name="Buried run", length_m=20.0,
                  pipe=Pipe(bore="diameter", inner_diameter_m=D_IN, wall_thickness_m=WALL),
                  surroundings=Buried(soil_temperature_K=t_soil, depth_m=DEPTH, soil_conductivity_W_per_mK=K_SOIL),
                  heater=heater, insulation=list(insulation))
    return Alternative(name="Buried", fluid=PureFluid(name="Water"),
                       feed=Feed(inlet_temperature_K=t_in, inlet_pressure_Pa=300_000.0, mass_flow_kg_per_s=2.0),
                       segments=[seg], limits=limits or Limits())


def _fluid_capacity(t, p=300_000.0):
    """ρ·cp·A per metre of water at (t, p) from CoolProp (the reference library)."""
    rho = CP.PropsSI("D", "T", t, "P", p, "Water")
    cp = CP.PropsSI("C", "T", t, "P", p, "Water")
    return rho, rho * cp * math.pi * D_IN**2 / 4


def _hold(alt, cases=None):
    result = solve(alt, design=cases or DesignCases())
    return result.design.hold_time


def test_cooldown_follows_newton_cooling():
    # closed form: T(t) = T∞ + (T0 − T∞) e^(−t/τ), τ = (m'c_fluid + m'c_steel)·R'_soil; constant properties
    t_soil = 278.15
    alt = _buried_line(t_soil, t_in=333.15, limits=Limits(min_bulk_temperature_K=303.15))
    ht = _hold(alt)
    seg = ht.segments[0]
    t0 = seg.start_temperature_K
    _, c_fluid = _fluid_capacity(t0)
    c_wall = STEEL_RHO_C * math.pi * (D_OUT**2 - D_IN**2) / 4
    tau = (c_fluid + c_wall) * _soil_r(D_OUT)
    expected = t_soil + (t0 - t_soil) * np.exp(-ht.time_s / tau)
    got = ht.bulk_off_K[:, 0]
    assert np.allclose(got - t_soil, expected - t_soil, rtol=1e-4, atol=0.0)
    # time to the minimum bulk temperature, t = τ ln((T0 − T∞)/(T_lim − T∞))
    t_lim = tau * math.log((t0 - t_soil) / (303.15 - t_soil))
    assert seg.to_limit_off_s == pytest.approx(t_lim, rel=1e-4)
    assert seg.time_constant_s == pytest.approx(tau, rel=1e-4)


def test_time_to_freeze_solid_with_latent_heat():
    # Hand calculation (closed form, constant properties at the start temperature T0):
    #   sensible cooling to 0 °C:  t1 = τ ln((T0 − T∞)/(Tf − T∞)),  τ = C'·R'
    #   plateau while it freezes:  t2 = m'·L·R'/(Tf − T∞)  (the loss at Tf drawn from the latent heat)
    # with m' = ρ·π·D²/4 of water, L = 333.6 kJ/kg (6.01 kJ/mol, CRC Handbook, from memory; the issue: 334),
    # Tf = 273.16 K (CoolProp's triple point, the model's freezing point), soil at −10 °C.
    # e.g. here: C' ≈ 9.0 + 2.5 kJ/(m·K), R' ≈ 0.50 K·m/W → τ ≈ 1.6 h; m'L ≈ 0.72 MJ/m → t2 ≈ 10 h.
    t_soil, t_f, L = 263.15, 273.16, 333.6e3
    alt = _buried_line(t_soil, t_in=288.15)
    seg = _hold(alt).segments[0]
    t0 = seg.start_temperature_K
    rho, c_fluid = _fluid_capacity(t0)
    r = _soil_r(D_OUT)
    tau = (c_fluid + STEEL_RHO_C * math.pi * (D_OUT**2 - D_IN**2) / 4) * r
    t1 = tau * math.log((t0 - t_soil) / (t_f - t_soil))
    t2 = rho * math.pi * D_IN**2 / 4 * L * r / (t_f - t_soil)
    assert seg.to_freezing_off_s == pytest.approx(t1, rel=1e-4)
    assert seg.frozen_solid_off_s == pytest.approx(t1 + t2, rel=1e-4)


def test_issue_nps2_water_line_reaches_freezing_in_hours():
    # From the issue, a lumped estimate: an NPS 2 water line with 50 mm mineral wool at −20 °C takes roughly
    # 5–6 h to reach 0 °C and tens of hours more to freeze solid. The issue gives no start temperature; 10 °C
    # reproduces its figure (τ ≈ 13 h: C' ≈ 12 kJ/(m·K), R' ≈ 3.9 K·m/W at k = 0.040 W/(m·K)). Checked for
    # the order of magnitude, not the digit.
    from solver.model import Wind

    seg = Segment(name="Outdoor run", length_m=30.0, pipe=Pipe(nps="2", schedule="40"),
                  insulation=[Layer(material="mineral wool", thickness_m=0.05, conductivity_W_per_mK=0.040)],
                  surroundings=Wind(temperature_K=268.15, wind_speed_m_per_s=3.0))
    alt = Alternative(name="Water", fluid=PureFluid(name="Water"),
                      feed=Feed(inlet_temperature_K=283.15, inlet_pressure_Pa=300_000.0, mass_flow_kg_per_s=1.0),
                      segments=[seg])
    ht = _hold(alt, DesignCases(worst_air_temperature_K=253.15, worst_wind_speed_m_per_s=10.0))
    hold = ht.segments[0]
    assert 4.5 * 3600 < hold.to_freezing_off_s < 7.0 * 3600
    assert 20 * 3600 < hold.frozen_solid_off_s - hold.to_freezing_off_s < 80 * 3600
    # Biot number 1/(4π k R'): water's k from CoolProp, R' of the insulation alone (the film adds about 1 %):
    # 1/(4π · 0.58 · 3.89) ≈ 0.035, well below 0.1 (lumping valid, Incropera & DeWitt §5.2): no warning
    r_ins = math.log((0.0603 + 0.1) / 0.0603) / (2 * math.pi * 0.040)
    k_water = CP.PropsSI("L", "T", hold.start_temperature_K, "P", 300_000.0, "Water")
    assert hold.biot_number == pytest.approx(1 / (4 * math.pi * k_water * r_ins), rel=0.03)
    assert not ht.warnings


def test_thermostat_warms_up_and_holds_its_set_point():
    # Closed form with the heater on (constant output q below the set point): T(t) = T_eq + (T_start − T_eq)e^(−t/τ),
    # T_eq = T∞ + q·R'. Warm-up from the soil temperature to the maintain temperature:
    #   t = τ ln((T_eq − T∞)/(T_eq − T_m)).
    # With the flow stopped from 60 °C it cools to the set point and stays there (it holds: never reaches T_m).
    t_soil, q, sp, t_m = 278.15, 80.0, 303.15, 298.15
    alt = _buried_line(t_soil, t_in=333.15, heater=ThermostatHeater(output_W_per_m=q, set_point_K=sp),
                       limits=Limits(maintain_temperature_K=t_m))
    result = solve(alt, design=DesignCases())
    ht = result.design.hold_time
    seg = ht.segments[0]
    r = _soil_r(D_OUT)
    c_wall = STEEL_RHO_C * math.pi * (D_OUT**2 - D_IN**2) / 4
    # the warm-up rows carry the start segment's capacity (properties at the operating temperature)
    _, c_fluid = _fluid_capacity(seg.start_temperature_K)
    tau = (c_fluid + c_wall) * r
    t_eq = t_soil + q * r
    assert t_eq > sp  # full output can hold the set point
    assert seg.warm_up_s == pytest.approx(tau * math.log((t_eq - t_soil) / (t_eq - t_m)), rel=1e-4)
    assert seg.to_limit_on_s == math.inf
    assert ht.bulk_on_K[-1, 0] == pytest.approx(sp, abs=1e-6)
    # steady, standing still: the duty that holds the set point is the loss over the full output
    duty = (sp - t_soil) / r / q
    assert result.design.segments[0].worst_thermostat_duty == pytest.approx(duty, rel=1e-6)


def test_self_limiting_heater_slows_the_cooldown_and_never_freezes_where_it_holds():
    # with a self-limiting heater whose standing equilibrium is above 0 °C the line never freezes (holds),
    # the closed form of the linear balance s(Tz − T) = (T − T∞)/R' (see test_design_cases for the value)
    t_soil = 263.15
    heater = SelfLimitingHeater(output_low_W_per_m=30.0, temperature_low_K=283.15,
                                output_high_W_per_m=10.0, temperature_high_K=333.15)
    alt = _buried_line(t_soil, t_in=288.15, heater=heater)
    seg = _hold(alt).segments[0]
    assert seg.to_freezing_on_s == math.inf
    assert math.isfinite(seg.to_freezing_off_s)


def test_biot_number_warns_for_a_bare_pipe_in_wind():
    # Bi = 1/(4π k R'): bare NPS 2 in the design wind of 10 m/s, R' = 1/(h π D) with h of some 50–70 W/(m²·K)
    # (wind on a 60 mm cylinder, common practice) gives Bi of about 0.8–1.2, above 0.1 (lumped capacitance
    # criterion, Incropera & DeWitt §5.2)
    from solver.model import StillAir

    seg = Segment(name="Bare", length_m=10.0, pipe=Pipe(nps="2", schedule="40"), surroundings=StillAir())
    alt = Alternative(name="Bare", fluid=PureFluid(name="Water"),
                      feed=Feed(inlet_temperature_K=288.15, inlet_pressure_Pa=300_000.0, mass_flow_kg_per_s=1.0),
                      segments=[seg])
    ht = _hold(alt)
    assert 0.5 < ht.segments[0].biot_number < 2.0
    assert any("Biot number" in w and "Bare" in w for w in ht.warnings)


def test_a_heater_too_weak_to_hold_slows_freezing_by_its_output():
    # Hand calculation with a constant heater q below the loss at the freezing point (closed form):
    #   cooling towards T_eq = T∞ + q·R':   t1 = τ ln((T0 − T_eq)/(Tf − T_eq))
    #   plateau, net loss (Tf − T∞)/R' − q:  t2 = m'·L / ((Tf − T∞)/R' − q)
    # (L = 333.6 kJ/kg, CRC Handbook, from memory; Tf = 273.16 K, CoolProp's triple point)
    from solver.model import ConstantHeater

    t_soil, t_f, L, q = 263.15, 273.16, 333.6e3, 8.0
    alt = _buried_line(t_soil, t_in=288.15, heater=ConstantHeater(output_W_per_m=q))
    seg = _hold(alt).segments[0]
    t0 = seg.start_temperature_K
    rho, c_fluid = _fluid_capacity(t0)
    r = _soil_r(D_OUT)
    tau = (c_fluid + STEEL_RHO_C * math.pi * (D_OUT**2 - D_IN**2) / 4) * r
    t_eq = t_soil + q * r
    assert t_eq < t_f  # too weak: it freezes
    t1 = tau * math.log((t0 - t_eq) / (t_f - t_eq))
    t2 = rho * math.pi * D_IN**2 / 4 * L / ((t_f - t_soil) / r - q)
    assert seg.to_freezing_on_s == pytest.approx(t1, rel=1e-4)
    assert seg.frozen_solid_on_s == pytest.approx(t1 + t2, rel=1e-4)
