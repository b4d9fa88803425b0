"""Heat accounting by source, the energy equation with elevation, dew point and no-flow checks."""

import math
from pathlib import Path

import pytest

from solver import correlations
from solver.march import solve
from solver.model import (
    Adiabatic,
    Alternative,
    Feed,
    FixedWall,
    Layer,
    Limits,
    Pipe,
    Segment,
    SolutionFluid,
    StillAir,
    TableFluid,
    TableRow,
)


def constant_liquid(cp=4000.0, rho=1000.0, mu=1e-3, k=0.6, freezing=None):
    """A constant-property liquid (two identical rows) for closed-form checks."""
    row = dict(density_kg_per_m3=rho, specific_heat_J_per_kgK=cp, viscosity_Pa_s=mu, conductivity_W_per_mK=k)
    return TableFluid(name="Constant", rows=[TableRow(temperature_K=250.0, **row), TableRow(temperature_K=450.0, **row)],
                      freezing_point_K=freezing)


def test_dew_point_magnus_values():
    # Magnus formula, Alduchov & Eskridge (1996) constants: at 30 °C and 60 % the dew point is
    # 21.4 °C (psychrometric tables give 21.4 °C, from memory); at saturation it is the air temperature.
    assert float(correlations.dew_point_magnus(303.15, 0.60)) - 273.15 == pytest.approx(21.39, abs=0.02)
    assert float(correlations.dew_point_magnus(293.15, 1.0)) == pytest.approx(293.15, abs=1e-9)
    # 20 °C, 50 %: 9.3 °C (psychrometric tables, from memory)
    assert float(correlations.dew_point_magnus(293.15, 0.50)) - 273.15 == pytest.approx(9.3, abs=0.1)


def test_liquid_running_downhill_adiabatically_does_not_cool():
    # Energy balance with potential energy (closed form): h + g z is conserved without wall heat.
    # For a constant-property liquid h = cp T + p/ρ, and the pressure gained by falling (ρ g Δz) is
    # exactly the potential energy lost, so only friction changes T: ΔT = Δp_friction / (ρ cp) >= 0.
    alt = Alternative(
        name="Downhill", fluid=constant_liquid(),
        feed=Feed(inlet_temperature_K=300.0, inlet_pressure_Pa=3e5, mass_flow_kg_per_s=1.0),
        segments=[Segment(name="Drop", length_m=40.0, elevation_change_m=-40.0,
                          pipe=Pipe(nps="2", schedule="40"), surroundings=Adiabatic())],
    )
    r = solve(alt)
    friction = r.pressure_drop.friction_Pa + r.pressure_drop.fittings_Pa
    expected_rise = friction / (1000.0 * 4000.0)
    assert r.outlet_temperature_K - 300.0 == pytest.approx(expected_rise, rel=1e-3, abs=1e-7)
    assert r.pressure_drop.elevation_Pa == pytest.approx(-1000.0 * 9.80665 * 40.0, rel=1e-9)  # ρ g Δz
    assert abs(r.energy_balance_residual_W) < 1e-6


def test_fixed_wall_heat_counts_as_heat_input_not_negative_loss():
    alt = Alternative(
        name="Jacketed", fluid=constant_liquid(),
        feed=Feed(inlet_temperature_K=300.0, inlet_pressure_Pa=3e5, mass_flow_kg_per_s=0.5),
        segments=[Segment(name="Jacket", length_m=10.0, pipe=Pipe(nps="2", schedule="40"),
                          surroundings=FixedWall(wall_temperature_K=400.0)),
                  Segment(name="Bare run", length_m=20.0, pipe=Pipe(nps="2", schedule="40"),
                          surroundings=StillAir(temperature_K=290.0))],
    )
    r = solve(alt)
    # what a user reads in Key Figures: the wall's heat is input (no tracing here), the hall air takes a loss
    assert r.heat_input_tracing_W == 0.0
    assert r.heat_input_media_W > 0.0
    assert r.heat_input_W == pytest.approx(r.heat_input_media_W)
    assert r.heat_loss_W > 0.0  # the bare run loses heat to the hall air
    jacket, bare = r.segments
    assert jacket.heat_loss_W == 0.0 and jacket.heat_input_W > 0.0
    assert bare.heat_input_W == 0.0 and bare.heat_loss_W > 0.0


def _cold_line(thickness_m):
    return Alternative(
        name="Chilled", fluid=SolutionFluid(solute="MEG", concentration=0.3),
        feed=Feed(inlet_temperature_K=278.15, inlet_pressure_Pa=3e5, mass_flow_kg_per_s=2.0),
        segments=[Segment(name="Hall", length_m=30.0, pipe=Pipe(nps="2", schedule="40"),
                          insulation=[Layer(thickness_m=thickness_m, conductivity_W_per_mK=0.036)] if thickness_m else [],
                          surroundings=StillAir(temperature_K=303.15, relative_humidity=0.7))],
    )


def test_surface_condensation_flagged_below_dew_point_only():
    dew = float(correlations.dew_point_magnus(303.15, 0.7))  # 24.1 °C (Magnus, Alduchov & Eskridge 1996)
    bare = solve(_cold_line(0.0))
    assert bare.min_outer_surface_temperature_K < dew
    c = [c for c in bare.checks if c.code == "SURFACE_CONDENSATION"]
    assert c and c[0].severity == "warning" and c[0].segment == 0
    thick = solve(_cold_line(0.08))
    assert thick.min_outer_surface_temperature_K > dew
    assert not any(c.code == "SURFACE_CONDENSATION" for c in thick.checks)


def _no_flow_line(tracing):
    return Alternative(
        name="Held", fluid=constant_liquid(freezing=285.0),
        feed=Feed(inlet_temperature_K=340.0, inlet_pressure_Pa=3e5, mass_flow_kg_per_s=0.5),
        segments=[Segment(name="Rack", length_m=50.0, pipe=Pipe(bore="diameter", inner_diameter_m=0.05,
                                                                 wall_thickness_m=0.0),
                          heat_input_W_per_m=tracing,
                          insulation=[Layer(thickness_m=0.05, conductivity_W_per_mK=0.04)],
                          surroundings=StillAir(temperature_K=263.15, film_coefficient_W_per_m2K=10.0))],
        limits=Limits(min_bulk_temperature_K=313.15, max_inner_wall_temperature_K=373.15),
    )


def test_no_flow_hold_against_closed_form():
    # No flow: T = T∞ + q' R_o with R_o = ln(D2/D1)/(2πk) + 1/(h π D2) (conduction through a cylinder
    # and an outer film, closed form). The tracing that holds 40 °C is (40 °C − T∞) / R_o; the check
    # suggests it with the design margin on the loss (20 %, DesignCases' default; common practice 10–25 %).
    r_o = math.log(0.15 / 0.05) / (2 * math.pi * 0.04) + 1.0 / (10.0 * math.pi * 0.15)
    needed = (313.15 - 263.15) / r_o
    r = solve(_no_flow_line(5.0))
    c = [c for c in r.checks if c.code == "NO_FLOW_HOLD"]
    assert c, [x.code for x in r.checks]
    # settles at 286.1 K: above the 285 K freezing point, below only the 40 °C minimum bulk: a warning
    assert 263.15 + 5.0 * r_o > 285.0
    assert c[0].severity == "warning"
    assert not any(x.code == "NO_FLOW_FREEZE" for x in r.checks)
    assert f"{263.15 + 5.0 * r_o - 273.15:.1f} °C" in c[0].message
    assert f"About {needed * 1.2:.0f} W/m" in c[0].message and "with a 20 % margin" in c[0].message
    held = solve(_no_flow_line(needed * 1.05))
    assert not any(c.code == "NO_FLOW_HOLD" for c in held.checks)


def test_no_flow_below_freezing_is_a_danger_against_closed_form():
    # Untraced, the stopped line settles at the air temperature, T = T∞ + 0 · R_o = −10 °C (closed form),
    # below the 285 K freezing point: the product freezes in the line, a danger, not a warning.
    r_o = math.log(0.15 / 0.05) / (2 * math.pi * 0.04) + 1.0 / (10.0 * math.pi * 0.15)
    r = solve(_no_flow_line(0.0))
    c = [c for c in r.checks if c.code == "NO_FLOW_FREEZE"]
    assert c and c[0].severity == "danger", [(x.code, x.severity) for x in r.checks]
    assert "-10.0 °C" in c[0].message and "11.9 °C" in c[0].message  # settling point; freezing point 285 K
    # the advice holds the higher limit, the 40 °C minimum bulk temperature: (40 °C − T∞) / R_o, with the
    # 20 % design margin (DesignCases' default, common practice)
    assert f"About {1.2 * (313.15 - 263.15) / r_o:.0f} W/m" in c[0].message and "40.0 °C" in c[0].message
    assert not any(x.code == "NO_FLOW_HOLD" for x in r.checks)  # one finding, at its worst severity


def test_sample_untraced_residue_line_freezes_with_flow_stopped():
    # sample_projects/traced_residue_line.json (invented demo data): the product freezes at 12 °C and the
    # untraced alternative sits in −5 °C air. With no flow and no tracing the line settles at the air
    # temperature (closed form T = T∞ + q' R_o with q' = 0), so the no-flow finding is a danger.
    from solver.project_io import load_project

    project = load_project(Path(__file__).resolve().parent.parent / "sample_projects" / "traced_residue_line.json")
    alt = next(a for a in project.alternatives if a.name == "No tracing, 80 mm wool")
    assert alt.fluid.freezing_point_K == pytest.approx(285.15)
    r = solve(alt)
    c = [c for c in r.checks if c.code == "NO_FLOW_FREEZE"]
    assert c and c[0].severity == "danger", [(x.code, x.severity) for x in r.checks]
    assert "-5.0 °C" in c[0].message
    assert r.checks[0].code == "NO_FLOW_FREEZE"  # worst first
    assert c[0].title == "freezes with the flow stopped"
    # the traced alternatives hold the product with the flow stopped
    for name in ("Trace 25 W/m, 50 mm wool", "Trace 15 W/m, 80 mm wool"):
        traced = solve(next(a for a in project.alternatives if a.name == name))
        assert not any(x.code in ("NO_FLOW_FREEZE", "NO_FLOW_HOLD") for x in traced.checks), name


def test_no_flow_overheat_when_tracing_exceeds_wall_limit():
    r_o = math.log(0.15 / 0.05) / (2 * math.pi * 0.04) + 1.0 / (10.0 * math.pi * 0.15)
    q = (400.0 - 263.15) / r_o  # settles at 400 K > 373.15 K wall limit (closed form as above)
    r = solve(_no_flow_line(q))
    assert any(c.code == "NO_FLOW_OVERHEAT" and c.severity == "warning" for c in r.checks)
