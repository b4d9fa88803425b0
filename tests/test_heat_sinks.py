"""Heat sinks (supports, valves, flanges, pumps, instruments) in the energy balance of their segment.

Closed forms with the outside path computed by hand (thin-walled pipe, one insulation layer of constant
conductivity, outer film entered): per metre R_o = ln(D2/D1)/(2πk) + 1/(h·π·D2), any heat-transfer text.
"""

import math

import pytest

from solver.errors import InputError
from solver.heat_sinks import catalogue_length_m, sink_conductances
from solver.march import solve
from solver.model import (
    Adiabatic,
    Alternative,
    Buried,
    ConstantHeater,
    Feed,
    HeatSink,
    Layer,
    Pipe,
    Segment,
    StillAir,
    TableFluid,
    TableRow,
)

D1, D2, K_INS, H_OUT = 0.05, 0.15, 0.04, 10.0
R_O = math.log(D2 / D1) / (2 * math.pi * K_INS) + 1.0 / (H_OUT * math.pi * D2)  # K·m/W
T_AIR = 253.15
CP = 4000.0


def constant_liquid():
    row = dict(density_kg_per_m3=1000.0, specific_heat_J_per_kgK=CP, viscosity_Pa_s=1e-3, conductivity_W_per_mK=0.6)
    return TableFluid(name="Constant", rows=[TableRow(temperature_K=200.0, **row), TableRow(temperature_K=450.0, **row)])


def line(length, sinks=(), *, heater=None, t_in=333.15, m_dot=0.2, surroundings=None) -> Alternative:
    return Alternative(
        name="Sinks", fluid=constant_liquid(),
        # developed flow and constant properties: the inside film is the same all along (closed forms hold)
        feed=Feed(inlet_temperature_K=t_in, inlet_pressure_Pa=3e5, mass_flow_kg_per_s=m_dot, inlet_flow="developed"),
        segments=[Segment(name="Run", length_m=length,
                          pipe=Pipe(bore="diameter", inner_diameter_m=D1, wall_thickness_m=0.0),
                          heater=heater, heat_sinks=list(sinks),
                          insulation=[Layer(thickness_m=(D2 - D1) / 2, conductivity_W_per_mK=K_INS)],
                          surroundings=surroundings or StillAir(temperature_K=T_AIR, film_coefficient_W_per_m2K=H_OUT))],
    )


SUPPORTS = [HeatSink(kind="pipe_support", count=20, equivalent_length_m=0.5)]  # N = 20, e = 0.5 m


def test_supports_as_equivalent_length_against_the_exponential_cooldown():
    # Constant coefficients: T_out = T∞ + (T_in − T∞)·exp(−L/(m·cp·(R_a + R_o·L/(L + N·e)))), the bulk's
    # exponential along a line (any heat-transfer text), with N·e metres of the same insulated pipe in
    # parallel on the outside. R_o by hand; R_a, the inside film (0.3 % of the path), from the solve.
    L, ne = 50.0, 20 * 0.5
    r = solve(line(L, SUPPORTS))
    r_a = r.resistances[0].part("inside_film").resistance_K_m_per_W
    t_out = T_AIR + (333.15 - T_AIR) * math.exp(-L / (0.2 * CP * (r_a + R_O * L / (L + ne))))
    loss = 0.2 * CP * (333.15 - t_out)
    assert r.heat_loss_W == pytest.approx(loss, rel=2e-4)
    # the same line without supports loses the exponential's share of L alone
    bare = solve(line(L))
    assert r.heat_loss_W / bare.heat_loss_W == pytest.approx(
        (1 - math.exp(-L / (0.2 * CP * (r_a + R_O * L / (L + ne))))) / (1 - math.exp(-L / (0.2 * CP * (r_a + R_O)))),
        rel=2e-4)


def test_segment_with_supports_loses_what_a_longer_segment_loses():
    # N supports of equivalent length e on L metres lose like L + N·e metres of the pipe (trace-heating
    # practice's definition of the equivalent length); exact as the inside film's share R_a/R_o → 0,
    # here 0.3 %, so equal to well within 1 %.
    L, ne = 50.0, 20 * 0.5
    with_sinks = solve(line(L, SUPPORTS))
    longer = solve(line(L + ne))
    assert with_sinks.heat_loss_W == pytest.approx(longer.heat_loss_W, rel=5e-3)
    assert with_sinks.heat_loss_W != pytest.approx(solve(line(L)).heat_loss_W, rel=5e-2)
    # the sinks' share is reported as its own line, part of the heat loss
    seg = with_sinks.segments[0]
    assert 0.0 < with_sinks.heat_sink_loss_W < with_sinks.heat_loss_W
    assert seg.heat_sink_loss_W == pytest.approx(with_sinks.heat_sink_loss_W)
    assert seg.heat_loss_W_per_m == pytest.approx(with_sinks.heat_loss_W / L)
    assert seg.pipe_heat_loss_W_per_m == pytest.approx((with_sinks.heat_loss_W - with_sinks.heat_sink_loss_W) / L)
    assert abs(with_sinks.energy_balance_residual_W) < 1e-6 * with_sinks.heat_loss_W


@pytest.mark.parametrize("sink, g_sink", [
    # insulated equivalent: N·e metres of the pipe's own path, (N·e)/R_o W/K
    (HeatSink(kind="valve", count=4, equivalent_length_m=1.5), 6.0 / R_O),
    # bare pipe: the entered outer film on the pipe's own outside diameter, h·π·D1·L_bare W/K
    (HeatSink(kind="other", count=2, bare_length_m=0.4), H_OUT * math.pi * D1 * 0.8),
    # a direct loss per kelvin
    (HeatSink(kind="other", count=3, loss_W_per_K=0.25), 0.75),
], ids=["insulated", "bare", "direct"])
def test_traced_line_settles_where_the_heater_replaces_pipe_and_sink_losses(sink, g_sink):
    # A constant heater q' on L metres, fed at its own no-flow equilibrium: the whole segment sits at
    # T = T∞ + q'·L/(L/R_o + G_sink) (heat balance of the segment, closed form), and loses q'·L, of which
    # G_sink·(T − T∞) through the sinks.
    L, q = 100.0, 12.0
    t_eq = T_AIR + q * L / (L / R_O + g_sink)
    r = solve(line(L, [sink], heater=ConstantHeater(output_W_per_m=q), t_in=t_eq, m_dot=0.05))
    assert r.outlet_temperature_K == pytest.approx(t_eq, abs=2e-3)
    assert r.heat_loss_W == pytest.approx(q * L, rel=1e-4)
    assert r.heat_sink_loss_W == pytest.approx(g_sink * (t_eq - T_AIR), rel=1e-3)


def test_bare_metre_in_still_air_loses_more_than_an_insulated_metre():
    # What a user expects: a metre of bare pipe (computed air film) loses more than a metre of the insulated.
    still = StillAir(temperature_K=T_AIR)
    bare = solve(line(50.0, [HeatSink(kind="other", bare_length_m=1.0)], surroundings=still))
    insulated = solve(line(50.0, [HeatSink(kind="other", equivalent_length_m=1.0)], surroundings=still))
    assert bare.heat_sink_loss_W > 3.0 * insulated.heat_sink_loss_W


def test_buried_bare_sink_counts_as_insulated_pipe_and_adiabatic_refuses():
    soil = Buried(soil_temperature_K=278.15, depth_m=1.0, soil_conductivity_W_per_mK=1.2)
    as_bare = solve(line(50.0, [HeatSink(kind="other", bare_length_m=2.0)], surroundings=soil))
    as_insulated = solve(line(50.0, [HeatSink(kind="other", equivalent_length_m=2.0)], surroundings=soil))
    assert as_bare.heat_sink_loss_W == pytest.approx(as_insulated.heat_sink_loss_W, rel=1e-9)
    with pytest.raises(ValueError, match="heat_sinks"):  # refused on entry by the model (pydantic's error)
        line(50.0, SUPPORTS, surroundings=Adiabatic())


def test_catalogue_lengths_follow_the_published_allowance_table():
    # a maker's published trace-heating design guide, allowance table (metric; common practice, the maker
    # unnamed by project rule): flanged valve DN 50 0.76 m, pump DN 100 3.05 m, flange DN 150 0.99 m; another
    # guide's example: pipe support at DN 25 0.3 m. Outside diameters of
    # NPS 2, 4, 6 and 1 per ASME B36.10M.
    assert catalogue_length_m("valve", 0.0603) == pytest.approx(0.76)
    assert catalogue_length_m("pump", 0.1143) == pytest.approx(3.05)
    assert catalogue_length_m("flange_pair", 0.1683) == pytest.approx(0.99)
    assert catalogue_length_m("pipe_support", 0.0334) == pytest.approx(0.3)
    seg = Segment(heat_sinks=[HeatSink(kind="valve", count=2), HeatSink(kind="valve", equivalent_length_m=5.0),
                              HeatSink(kind="other", loss_W_per_K=0.4)])
    totals = sink_conductances(seg, 0.0603)
    assert totals.insulated_equivalent_length_m == pytest.approx(2 * 0.76 + 5.0)  # an item's own length wins
    assert totals.direct_W_per_K == pytest.approx(0.4)
