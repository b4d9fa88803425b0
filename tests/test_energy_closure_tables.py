"""User tables with steep property columns: the reported temperatures keep the first law to round-off.

Found by the solver fuzz (seed 20261202): on an adiabatic line and on a 1000-bar downhill line the outlet
temperature was taken one Newton step from the enthalpy balance, which left h(T_out, p_out) 0.1–5 J/kg away
from it (an energy-balance residual of up to 3 W with no heat flowing at all); and a table whose enthalpy
dips *between* two rows at the feed pressure was solved instead of refused. The reference is the first law
itself: m·Δ(h + v²/2 + g·z) = Q, with h re-evaluated from the reported outlet temperature and pressure.
"""

import pytest

from solver.errors import SolverError
from solver.march import solve
from solver.model import Alternative, Feed, Pipe, Segment, TableFluid, TableRow
from solver.model import Adiabatic, Buried, SteamTracer
from solver.properties import fluid_model


def _row(t, rho, cp, mu, k):
    return TableRow(temperature_K=t, density_kg_per_m3=rho, specific_heat_J_per_kgK=cp, viscosity_Pa_s=mu,
                    conductivity_W_per_mK=k)


def _steep_table(cp_third_row: float) -> TableFluid:
    # a density column that rises, then collapses by a factor of 80 (as a generated table may)
    return TableFluid(name="Test product", freezing_point_K=305.17, boiling_point_K=640.0, rows=[
        _row(277.38, 9905.6, 4196.4, 0.394, 0.205),
        _row(347.58, 12674.8, 3243.0, 1e-6, 200.0),
        _row(415.67, 163.3, cp_third_row, 0.004, 0.532),
        _row(483.28, 1081.4, 1500.0, 7.0e-5, 0.01),
        _row(542.82, 950.0, 3723.0, 4.8e-5, 0.18),
        _row(622.76, 1.0, 6587.5, 2.3e-6, 0.6),
    ])


def _adiabatic_traced(fluid: TableFluid) -> Alternative:
    return Alternative(
        name="Steep table", fluid=fluid,
        feed=Feed(inlet_temperature_K=425.156, inlet_pressure_Pa=3.746e7, mass_flow_kg_per_s=0.5982),
        segments=[Segment(name="S1", length_m=10.0, pipe=Pipe(nps="1-1/2", schedule="5S", wall_conductivity_W_per_mK=500.0),
                          steam_tracer=SteamTracer(steam_pressure_Pa=1.5e5, tube_outer_diameter_m=0.003),
                          surroundings=Adiabatic())])


def _first_law_residual(alt: Alternative, result) -> float:
    fluid = fluid_model(alt.fluid)
    h_in = float(fluid.enthalpy([alt.feed.inlet_temperature_K], [alt.feed.inlet_pressure_Pa])[0])
    h_out = float(fluid.enthalpy([result.outlet_temperature_K], [result.outlet_pressure_Pa])[0])
    return result.mass_flow_kg_per_s * (h_out - h_in) - result.duty_W  # no elevation; kinetic energy below 1 mW here


def test_adiabatic_line_of_a_steep_table_keeps_its_enthalpy():
    alt = _adiabatic_traced(_steep_table(26147.1))
    result = solve(alt)
    # the steam (0.5 bar g, 111 °C) is colder than the fluid: no heat flows, so h_out = h_in to round-off
    assert abs(result.duty_W) < 1e-6
    assert abs(_first_law_residual(alt, result)) < 1e-4  # was −0.065 W
    assert abs(result.energy_balance_residual_W) < 1e-4


def test_downhill_line_at_1000_bar_keeps_its_enthalpy():
    fluid = TableFluid(name="Test product", rows=[_row(224.36, 709.8, 2500.0, 0.343, 0.556),
                                                  _row(295.48, 973.8, 1597.3, 0.026, 0.01)])
    alt = Alternative(
        name="Deep drop", fluid=fluid,
        feed=Feed(inlet_temperature_K=279.65, inlet_pressure_Pa=1e8, mass_flow_kg_per_s=1.778, inlet_flow="developed"),
        segments=[Segment(name="Buried run", length_m=79.33, elevation_change_m=-60.88,
                          pipe=Pipe(nps="20", schedule="STD", material="galvanised steel"),
                          surroundings=Buried(soil_temperature_K=273.1, depth_m=0.3, soil_conductivity_W_per_mK=0.62))])
    result = solve(alt)
    scale = abs(result.duty_W)
    assert scale > 100.0  # the line does lose heat to the soil
    assert abs(result.energy_balance_residual_W) < 1e-6 * scale + 1e-3  # was 0.037 W of 709 W


def test_table_whose_enthalpy_dips_between_two_rows_is_refused():
    # with cp 6588 J/(kg·K) at 142.5 °C, h = u + p/ρ at 374.6 bar falls between the rows at 142.5 and 210 °C
    # (the density rises from 163 to 1081 kg/m³ there) while still rising from row to row
    fluid = _steep_table(6587.5)
    model = fluid_model(fluid)
    h_rows = model.enthalpy([415.67, 483.28], [3.746e7, 3.746e7])
    assert h_rows[1] > h_rows[0]  # the rows alone would not show it
    assert model.enthalpy_falls_at(3.746e7) == pytest.approx(415.67)
    with pytest.raises(SolverError, match="density column"):
        solve(_adiabatic_traced(fluid))


def test_a_line_that_reaches_its_surroundings_in_one_cell_warns_nothing():
    # NTU of some million per cell (1 mg/s through a bare pipe): exp(-NTU) underflows to 0, which is right
    # (the fluid leaves the cell at the surroundings' temperature); found by the app fuzz as a stray
    # "divide by zero in log" warning. Closed form: T_out = T_air for NTU -> infinity.
    import warnings
    from solver.model import PureFluid, StillAir
    alt = Alternative(name="Trickle", fluid=PureFluid(name="Water"),
                      feed=Feed(inlet_temperature_K=330.0, inlet_pressure_Pa=3e5, mass_flow_kg_per_s=1e-6),
                      segments=[Segment(name="Bare", length_m=100.0, pipe=Pipe(nps="2", schedule="40"),
                                        surroundings=StillAir(temperature_K=290.0))])
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        result = solve(alt, cells_per_segment=1)
    assert result.outlet_temperature_K == pytest.approx(290.0, abs=1e-6)
