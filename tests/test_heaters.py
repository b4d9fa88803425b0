"""Heaters as the trade specifies them: constant, self-limiting (output falls with the pipe temperature)
and thermostat-controlled, in the steady solve.

Reference values are closed forms with the outside path computed by hand: a thin-walled pipe, one
insulation layer of constant conductivity and an outer film entered directly, so per metre
R_o = ln(D2/D1)/(2πk) + 1/(h·π·D2) (conduction through a cylinder plus a film; any heat-transfer text).
A very small flow over a long line lets the fluid settle where the heater's output balances the loss
(the no-flow equilibrium) well before the outlet.
"""

import math

import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

from solver.march import solve
from solver.model import (
    Alternative,
    ConstantHeater,
    Feed,
    Layer,
    Pipe,
    Segment,
    SelfLimitingHeater,
    StillAir,
    TableFluid,
    TableRow,
    ThermostatHeater,
    Wind,
)

D1, D2, K_INS, H_OUT = 0.05, 0.15, 0.04, 10.0
R_O = math.log(D2 / D1) / (2 * math.pi * K_INS) + 1.0 / (H_OUT * math.pi * D2)  # K·m/W, closed form
T_AIR = 253.15  # −20 °C


def constant_liquid(cp=4000.0, rho=1000.0, mu=1e-3, k=0.6):
    """A constant-property liquid (two identical rows) for closed-form checks."""
    row = dict(density_kg_per_m3=rho, specific_heat_J_per_kgK=cp, viscosity_Pa_s=mu, conductivity_W_per_mK=k)
    return TableFluid(name="Constant", rows=[TableRow(temperature_K=200.0, **row),
                                             TableRow(temperature_K=450.0, **row)])


def settling_line(heater, *, t_in=293.15, t_air=T_AIR, m_dot=2e-4, length=300.0, insulation=0.05) -> Alternative:
    """A long line with a very small flow: it settles at its no-flow equilibrium well before the outlet
    (the bulk approaches it over m·cp·R_o ≈ 4 m here)."""
    return Alternative(
        name="Settling", fluid=constant_liquid(),
        feed=Feed(inlet_temperature_K=t_in, inlet_pressure_Pa=3e5, mass_flow_kg_per_s=m_dot),
        segments=[Segment(name="Run", length_m=length,
                          pipe=Pipe(bore="diameter", inner_diameter_m=D1, wall_thickness_m=0.0),
                          heater=heater,
                          insulation=[Layer(thickness_m=insulation, conductivity_W_per_mK=K_INS)],
                          surroundings=StillAir(temperature_K=t_air, film_coefficient_W_per_m2K=H_OUT))],
    )


# A self-limiting heater as a maker's sheet gives it (invented numbers): 30 W/m at 0 °C, 10 W/m at 65 °C,
# straight line between and beyond (common practice).
SELF_LIMITING = SelfLimitingHeater(output_low_W_per_m=30.0, temperature_low_K=273.15,
                                   output_high_W_per_m=10.0, temperature_high_K=338.15)


def test_self_limiting_equilibrium_against_the_linear_equation():
    # At equilibrium q = s·(T0 − T) = (T − T∞)/R_o, so T = (s·T0 + T∞/R_o)/(s + 1/R_o): the hand solution of
    # the linear equation, with s and T0 from the two rating points and R_o by hand (module docstring).
    s = (30.0 - 10.0) / (338.15 - 273.15)  # W/(m·K)
    t0 = 273.15 + 30.0 / s  # the temperature where the straight line reaches zero output
    t_eq = (s * t0 + T_AIR / R_O) / (s + 1.0 / R_O)
    q_eq = s * (t0 - t_eq)
    r = solve(settling_line(SELF_LIMITING))
    assert r.outlet_temperature_K == pytest.approx(t_eq, abs=5e-3)
    assert r.profile.heater_output_W_per_m[-1] == pytest.approx(q_eq, rel=1e-3)
    assert r.profile.heat_loss_W_per_m[-1] == pytest.approx(q_eq, rel=1e-3)
    seg = r.segments[0]
    assert seg.heater_kind == "self_limiting"
    # colder than the equilibrium at the inlet (20 °C) the heater gives more there than at the outlet
    assert r.profile.heater_output_W_per_m[0] > r.profile.heater_output_W_per_m[-1]
    assert abs(r.energy_balance_residual_W) < 1e-6 * abs(r.heat_input_W)


def test_self_limiting_spiral_and_runs_scale_the_output_per_pipe_metre():
    # Two runs spiralled 1.5 m of heater per m of pipe: s and the output at each temperature scale by 3,
    # T0 stays (common practice: output per pipe metre = per heater metre × runs × spiral ratio).
    heater = SELF_LIMITING.model_copy(update={"count": 2, "heater_per_pipe_length": 1.5})
    s = 3.0 * (30.0 - 10.0) / (338.15 - 273.15)
    t0 = 273.15 + 3.0 * 30.0 / s
    t_eq = (s * t0 + T_AIR / R_O) / (s + 1.0 / R_O)
    r = solve(settling_line(heater))
    assert r.outlet_temperature_K == pytest.approx(t_eq, abs=5e-3)


def test_self_limiting_above_zero_output_gives_nothing():
    # In 40 °C air... the heater's zero-output temperature is 97.5 °C; a feed at 120 °C cooling towards 40 °C
    # crosses it: above it the heater gives nothing (clamped at 0), below it the straight line.
    r = solve(settling_line(SELF_LIMITING, t_in=393.15, t_air=313.15, m_dot=0.02, length=40.0))
    q = r.profile.heater_output_W_per_m
    assert q[0] == 0.0
    assert min(q) >= 0.0


def test_thermostat_holds_the_set_point_at_the_coldest_wall():
    # Set point 5 °C, full output 40 W/m. Where the line has settled at the set point the heater replaces the
    # loss (T_set − T∞)/R_o, so the duty is that loss over the full output (closed form, R_o by hand).
    t_set = 278.15
    r = solve(settling_line(ThermostatHeater(output_W_per_m=40.0, set_point_K=t_set)))
    seg = r.segments[0]
    duty = (t_set - T_AIR) / R_O / 40.0
    assert seg.thermostat_duty == pytest.approx(duty, rel=1e-3)
    # the coldest pipe wall (thin wall: the inner wall is the heated wall) sits at the set point
    assert r.min_inner_wall_temperature_K == pytest.approx(t_set, abs=5e-3)
    assert seg.heater_output_W_per_m == pytest.approx(duty * 40.0, rel=1e-3)
    assert abs(r.energy_balance_residual_W) < 1e-6 * abs(r.heat_input_W)


def test_thermostat_that_cannot_hold_runs_at_full_output():
    # 5 W/m cannot hold 5 °C against the (T_set − T∞)/R_o ≈ 5.4 W/m loss: full output, and the line settles at
    # T∞ + q·R_o (closed form), below the set point.
    r = solve(settling_line(ThermostatHeater(output_W_per_m=5.0, set_point_K=278.15)))
    assert r.segments[0].thermostat_duty == 1.0
    assert r.outlet_temperature_K == pytest.approx(T_AIR + 5.0 * R_O, abs=5e-3)


def test_thermostat_is_off_when_the_line_is_hotter_than_its_set_point():
    # A 60 °C feed in 30 °C air never falls to a 5 °C set point: the heater stays off.
    r = solve(settling_line(ThermostatHeater(output_W_per_m=40.0, set_point_K=278.15), t_in=333.15, t_air=303.15,
                            m_dot=0.05, length=50.0))
    seg = r.segments[0]
    assert seg.thermostat_duty == 0.0
    assert seg.heater_output_W_per_m == 0.0
    assert r.heat_input_tracing_W == 0.0


def test_heater_kind_and_output_reach_the_json():
    r = solve(settling_line(SELF_LIMITING))
    seg = r.to_dict()["segments"][0]
    assert seg["heater_kind"] == "self_limiting"
    assert seg["heater_rated_W_per_m"] == pytest.approx(30.0)
    assert 0.0 < seg["heater_output_W_per_m"] < 30.0  # falls as the pipe warms above 0 °C
    assert seg["thermostat_duty_fraction"] is None
    assert "heater_output_W_per_m" in r.to_dict()["profile"]


# --------------------------------------------------------------------------- monotone behaviour

_TOL_K = 3e-3  # the march settles to 1e-3 K per pass


def _heater(kind, output, runs):
    if kind == "constant":
        return ConstantHeater(output_W_per_m=output, count=runs)
    if kind == "thermostat":
        return ThermostatHeater(output_W_per_m=output, set_point_K=283.15, count=runs)
    return SelfLimitingHeater(output_low_W_per_m=output, temperature_low_K=273.15,
                              output_high_W_per_m=0.3 * output, temperature_high_K=338.15, count=runs)


def _temperatures(r):
    p = r.profile
    return (p.bulk_temperature_K, p.inner_wall_temperature_K, p.outer_surface_temperature_K)


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(kind=st.sampled_from(["constant", "self_limiting", "thermostat"]),
       output=st.floats(1.0, 10.0), more=st.floats(1.05, 2.0), runs=st.integers(1, 2),
       t_in=st.floats(275.0, 340.0), t_air=st.floats(243.15, 283.15), m_dot=st.floats(1e-3, 0.5),
       wind=st.booleans())
def test_more_heater_output_never_lowers_any_temperature(kind, output, more, runs, t_in, t_air, m_dot, wind):
    # What a user would notice: turning the heater up (any kind: its output scaled at every temperature)
    # never makes any part of the line colder.
    def line(q):
        # at most 40 W/m through R_o ≈ 2.7 K·m/W: the line stays inside the fluid table (below 450 K)
        alt = settling_line(_heater(kind, q, runs), t_in=t_in, t_air=t_air, m_dot=m_dot, length=60.0,
                            insulation=0.02)
        if wind:
            alt.segments[0].surroundings = Wind(temperature_K=t_air, wind_speed_m_per_s=8.0)
        return alt

    low, high = solve(line(output)), solve(line(output * more))
    for a, b in zip(_temperatures(low), _temperatures(high)):
        assert (b >= a - _TOL_K).all()


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(kind=st.sampled_from(["none", "constant", "self_limiting", "thermostat"]),
       output=st.floats(2.0, 15.0), thickness=st.floats(0.01, 0.08), more=st.floats(0.005, 0.05),
       t_in=st.floats(275.0, 340.0), t_air=st.floats(243.15, 273.0), m_dot=st.floats(1e-3, 0.5))
def test_more_insulation_never_raises_the_loss(kind, output, thickness, more, t_in, t_air, m_dot):
    # the line is everywhere warmer than the air (fed above it, heated or not), so heat flows out everywhere
    # (at most 15 W/m through R_o ≤ 7.4 K·m/W: the line stays inside the fluid table, below 450 K)
    def line(t):
        heater = None if kind == "none" else _heater(kind, output, 1)
        return settling_line(heater, t_in=t_in, t_air=t_air, m_dot=m_dot, length=60.0, insulation=t)

    thin, thick = solve(line(thickness)), solve(line(thickness + more))
    assert thin.heat_loss_W > 0.0
    assert thick.heat_loss_W <= thin.heat_loss_W * (1 + 1e-9) + _TOL_K * 60.0 / R_O


# --------------------------------------------------------------------------- the no-flow check


def _hold_check(heater, limit_K, margin=None):
    alt = settling_line(heater, t_in=345.0, m_dot=0.5, length=50.0)
    alt.limits.min_bulk_temperature_K = limit_K
    alt.segments[0].design_margin = margin
    return [c for c in solve(alt).checks if c.code == "NO_FLOW_HOLD"]


def test_no_flow_check_uses_the_self_limiting_heaters_output_at_the_settled_temperature():
    # With the flow stopped a self-limiting heater settles where s·(T0 − T) = (T − T∞)/R_o: the linear
    # equation solved by hand (as above: 48.7 °C), not at its rated output. The tracing suggested holds 60 °C
    # with the 20 % design margin on the loss (DesignCases' default; common practice 10–25 %):
    # 1.2·(60 °C − T∞)/R_o.
    s = (30.0 - 10.0) / (338.15 - 273.15)
    t0 = 273.15 + 30.0 / s
    t_eq = (s * t0 + T_AIR / R_O) / (s + 1.0 / R_O)
    (c,) = _hold_check(SELF_LIMITING, 333.15)
    assert f"settles at about {t_eq - 273.15:.1f} °C" in c.message
    assert f"gives {s * (t0 - t_eq):.0f} W/m" in c.message
    assert f"About {1.2 * (333.15 - T_AIR) / R_O:.0f} W/m" in c.message and "with a 20 % margin" in c.message
    # a segment's own margin wins over the project's
    (c,) = _hold_check(SELF_LIMITING, 333.15, margin=0.1)
    assert f"About {1.1 * (333.15 - T_AIR) / R_O:.0f} W/m" in c.message and "with a 10 % margin" in c.message


def test_no_flow_check_takes_a_thermostat_at_full_output():
    # Stopped, a thermostat that cannot reach its set point runs at full output: T = T∞ + q_full·R_o.
    (c,) = _hold_check(ThermostatHeater(output_W_per_m=6.0, set_point_K=313.15), 313.15)
    assert f"settles at about {T_AIR + 6.0 * R_O - 273.15:.1f} °C" in c.message


def test_a_working_thermostat_does_not_overheat_a_stopped_line():
    # 40 W/m stopped settles at T∞ + q·R_o ≈ 163 °C (closed form), above a 100 °C wall limit: flagged for a
    # constant heater; a thermostat set to 60 °C switches off there, so the same heater is not.
    def line(heater):
        alt = settling_line(heater, t_in=345.0, m_dot=0.5, length=50.0)
        alt.limits.max_inner_wall_temperature_K = 373.15
        alt.limits.min_bulk_temperature_K = 275.15  # the no-flow check runs where there is a lower limit
        return {c.code for c in solve(alt).checks}

    assert T_AIR + 40.0 * R_O > 373.15
    assert "NO_FLOW_OVERHEAT" in line(ConstantHeater(output_W_per_m=40.0))
    assert "NO_FLOW_OVERHEAT" not in line(ThermostatHeater(output_W_per_m=40.0, set_point_K=333.15))


@pytest.mark.parametrize("heater", [SELF_LIMITING, ThermostatHeater(output_W_per_m=40.0, set_point_K=278.15)],
                         ids=["self_limiting", "thermostat"])
def test_heater_results_do_not_depend_on_the_cells(heater):
    # What a user would notice: doubling the cells moves neither the outlet, the delivered output nor the duty.
    alt = settling_line(heater, t_in=293.15, m_dot=0.01, length=200.0)
    a, b = solve(alt), solve(alt, refine=2.0)
    assert b.outlet_temperature_K == pytest.approx(a.outlet_temperature_K, abs=0.01)
    assert b.segments[0].heater_output_W_per_m == pytest.approx(a.segments[0].heater_output_W_per_m, rel=1e-3)
    if heater.kind == "thermostat":
        assert b.segments[0].thermostat_duty == pytest.approx(a.segments[0].thermostat_duty, rel=1e-3)
