"""Checks that judge what they claim to judge: validity ranges of every correlation used, and contact
temperatures judged by the surface the line makes, not by the weather.

Thresholds: −10 °C cold contact and 60 °C hot contact (common practice, as in solver.checks);
published ranges: Colebrook (1939) / Moody (1944) chart up to ε/D = 0.05, Churchill & Bernstein
(1977) Re·Pr ≥ 0.2, Churchill & Chu (1975) Ra ≤ 1e12, Nusselt film condensation laminar
(film Reynolds number below about 1,800), the Magnus dew-point constants of Alduchov & Eskridge
(1996) over their stated air-temperature range.
"""

from __future__ import annotations

import pytest

from solver.march import solve
from solver.model import (
    Alternative, Feed, FixedWall, Layer, Pipe, PureFluid, Segment, SolutionFluid, SteamTracer, StillAir, Wind,
)

CP = pytest.importorskip("CoolProp.CoolProp")


def _codes(result, code):
    return [c for c in result.checks if c.code == code]


def test_insulated_line_in_a_freezing_yard_is_no_cold_contact_hazard():
    # invented: 10 °C water, 50 mm wool, −25 °C air: the cladding sits at about the air temperature
    alt = Alternative(
        name="Winter", fluid=PureFluid(name="Water"),
        feed=Feed(inlet_temperature_K=283.15, inlet_pressure_Pa=4e5, mass_flow_kg_per_s=2.0),
        segments=[Segment(name="Yard", length_m=30.0, pipe=Pipe(nps="2", schedule="40"),
                          insulation=[Layer(material="mineral wool", thickness_m=0.05, conductivity_W_per_mK=0.04)],
                          surroundings=StillAir(temperature_K=248.15))],
    )
    r = solve(alt)
    assert r.min_outer_surface_temperature_K < 263.15  # the surface is below −10 °C ...
    assert not _codes(r, "COLD_SURFACE")  # ... because of the weather, not the line


def test_bare_brine_line_in_a_warm_room_is_a_cold_contact_hazard():
    # invented: −25 °C propylene-glycol brine through a bare pipe in a 20 °C plant room
    alt = Alternative(
        name="Brine", fluid=SolutionFluid(solute="MPG", concentration=0.5),
        feed=Feed(inlet_temperature_K=248.15, inlet_pressure_Pa=4e5, mass_flow_kg_per_s=1.5),
        segments=[Segment(name="Room", length_m=10.0, pipe=Pipe(nps="1-1/2", schedule="40"),
                          surroundings=StillAir(temperature_K=293.15))],
    )
    r = solve(alt)
    assert r.min_outer_surface_temperature_K < 263.15
    assert _codes(r, "COLD_SURFACE")


def test_roughness_beyond_colebrooks_range_is_flagged():
    # ε/D = 0.1: twice the top of the Moody chart
    alt = Alternative(
        name="Rough", fluid=PureFluid(name="Water"),
        feed=Feed(inlet_temperature_K=293.15, inlet_pressure_Pa=6e5, mass_flow_kg_per_s=2.0),
        segments=[Segment(name="Scaled", length_m=10.0,
                          pipe=Pipe(bore="diameter", inner_diameter_m=0.03, wall_thickness_m=0.003, roughness_m=0.003))],
    )
    flagged = [c for c in _codes(solve(alt), "CORRELATION_RANGE") if "Colebrook" in c.message]
    assert flagged and flagged[0].segment == 0
    ok = alt.model_copy(deep=True)
    ok.segments[0].pipe = Pipe(bore="diameter", inner_diameter_m=0.03, wall_thickness_m=0.003, roughness_m=0.0003)
    assert not [c for c in _codes(solve(ok), "CORRELATION_RANGE") if "Colebrook" in c.message]


def test_dew_point_formula_outside_its_air_temperature_range_is_flagged():
    alt = Alternative(
        name="Arctic", fluid=PureFluid(name="Water"),
        feed=Feed(inlet_temperature_K=283.15, inlet_pressure_Pa=4e5, mass_flow_kg_per_s=2.0),
        segments=[Segment(name="Tundra", length_m=5.0, pipe=Pipe(nps="2", schedule="40"),
                          insulation=[Layer(material="mineral wool", thickness_m=0.1, conductivity_W_per_mK=0.04)],
                          surroundings=Wind(temperature_K=223.15, wind_speed_m_per_s=2.0, relative_humidity=0.8))],
    )
    assert [c for c in _codes(solve(alt), "CORRELATION_RANGE") if "dew-point" in c.message]


def test_steam_tracer_that_cannot_heat_the_line_says_so():
    # 1.5 bar(a) steam (111 °C) tracing a 150 °C line: the tracer gives nothing
    alt = Alternative(
        name="Hot line", fluid=PureFluid(name="Water"),
        feed=Feed(inlet_temperature_K=423.15, inlet_pressure_Pa=10e5, mass_flow_kg_per_s=1.0),
        segments=[Segment(name="Traced", length_m=20.0, pipe=Pipe(nps="2", schedule="40"),
                          steam_tracer=SteamTracer(steam_pressure_Pa=1.5e5),
                          insulation=[Layer(material="mineral wool", thickness_m=0.05, conductivity_W_per_mK=0.04)],
                          surroundings=StillAir(temperature_K=293.15))],
    )
    r = solve(alt)
    assert _codes(r, "TRACER_IDLE")
    assert r.heat_input_tracing_W == pytest.approx(0.0, abs=1e-9)


def test_turbulent_condensate_film_is_flagged():
    # a very cold, large pipe under high-pressure steam condenses a thick film: beyond Nusselt's laminar theory
    alt = Alternative(
        name="Big heater", fluid=PureFluid(name="Water"),
        feed=Feed(inlet_temperature_K=280.0, inlet_pressure_Pa=20e5, mass_flow_kg_per_s=60.0),
        segments=[Segment(name="Heater", length_m=5.0, pipe=Pipe(nps="24", schedule="40"),
                          surroundings=FixedWall(wall_temperature_K=None, steam_pressure_Pa=40e5))],
    )
    def flagged(a):
        return [c for c in _codes(solve(a), "CORRELATION_RANGE") if "condensate film" in c.message]
    assert flagged(alt)
    # an NPS 2 heater on 3.5 bar(a) steam keeps a laminar film
    small = alt.model_copy(deep=True)
    small.feed.mass_flow_kg_per_s = 1.0
    small.segments[0] = Segment(name="Heater", length_m=5.0, pipe=Pipe(nps="2", schedule="40"),
                                surroundings=FixedWall(wall_temperature_K=None, steam_pressure_Pa=3.5e5))
    assert not flagged(small)
