"""The new heat paths wired into the march, checked against closed forms and independent hand calculations.

* a steam tube tracer on an otherwise adiabatic line is an exponential approach to the steam
  temperature with U' = 1/(R_inside + R_wall + 1/(n·C)) (closed form of the energy balance);
* condensing steam on the pipe: at every node the heat to the fluid equals Nusselt's film
  condensation on a horizontal tube at the reported pipe wall (the textbook form, evaluated here
  with CoolProp directly; Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, §10.7);
* inside fouling adds R''_f/(π D) in series (TEMA's definition of a fouling resistance);
* a steep riser in still air loses heat as a vertical surface (Churchill & Chu 1975, vertical
  plate, as ``ht.Nu_vertical_plate_Churchill`` implements it);
* the entry rule: the flow developing from the inlet or arriving developed (Gnielinski through
  ``ht.turbulent_Gnielinski``), restarts at a change of wall condition, none between like segments.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from solver import steam
from solver.march import solve
from solver.model import (
    Adiabatic, Alternative, Feed, FixedWall, Layer, Pipe, PureFluid, Segment, SteamTracer, StillAir,
)

CP = pytest.importorskip("CoolProp.CoolProp")
ht = pytest.importorskip("ht")
fluids = pytest.importorskip("fluids")

NPS2 = Pipe(nps="2", schedule="40")  # ASME B36.10M: 60.3 mm OD, 52.5 mm bore
G = 9.80665


def _water(t_K: float, p: float = 5e5):
    return {q: CP.PropsSI(q, "T", t_K, "P", p, "Water") for q in ("C", "V", "L", "D")}


def test_steam_tracer_on_adiabatic_line_is_an_exponential_approach_to_the_steam():
    # invented: two bare tracers at 4.5 bar(a) on a 100 m water line, perfectly insulated outside
    tracer = SteamTracer(steam_pressure_Pa=4.5e5, count=2, contact="bare")
    alt = Alternative(
        name="Traced by steam", fluid=PureFluid(name="Water"),
        feed=Feed(inlet_temperature_K=293.15, inlet_pressure_Pa=5e5, mass_flow_kg_per_s=0.5, inlet_flow="developed"),
        segments=[Segment(name="Traced", length_m=100.0, pipe=NPS2, steam_tracer=tracer, surroundings=Adiabatic())],
    )
    r = solve(alt)
    t_steam = CP.PropsSI("T", "P", 4.5e5, "Q", 1.0, "Water")  # IAPWS-95 via CoolProp
    g = 2 * steam.tracer_conductance_W_per_mK("bare", 0.0127)
    t_mean = 0.5 * (r.inlet_temperature_K + r.outlet_temperature_K)
    w = _water(t_mean)
    d_i, d_o = 0.0525, 0.0603
    re = 4 * 0.5 / (math.pi * d_i * w["V"])
    pr = w["C"] * w["V"] / w["L"]
    fd = fluids.friction.friction_factor(Re=re, eD=4.5e-5 / d_i)
    h_i = ht.conv_internal.turbulent_Gnielinski(Re=re, Pr=pr, fd=fd) * w["L"] / d_i
    r_a = 1 / (h_i * math.pi * d_i) + ht.conduction.R_cylinder(d_i, d_o, 45.0, 1.0)  # carbon steel ~45 W/mK
    u = 1.0 / (r_a + 1.0 / g)
    t_out = t_steam - (t_steam - 293.15) * math.exp(-u * 100.0 / (0.5 * w["C"]))
    assert r.outlet_temperature_K == pytest.approx(t_out, abs=0.03)
    # all heat comes from the tracers and stays in the fluid
    assert r.heat_input_tracing_W == pytest.approx(r.duty_W, rel=1e-6)
    assert abs(r.heat_loss_W) < 1e-6 * r.duty_W


def _nusselt_condensation_h(t_sat: float, t_w: float, d: float) -> float:
    """Nusselt (1916) film condensation on a horizontal tube with Rohsenow's latent heat, from CoolProp."""
    t_f = 0.5 * (t_sat + t_w)
    p = CP.PropsSI("P", "T", t_sat, "Q", 0, "Water")
    rho_l = CP.PropsSI("D", "T", t_f, "Q", 0, "Water")
    mu_l = CP.PropsSI("V", "T", t_f, "Q", 0, "Water")
    k_l = CP.PropsSI("L", "T", t_f, "Q", 0, "Water")
    cp_l = CP.PropsSI("C", "T", t_f, "Q", 0, "Water")
    rho_v = CP.PropsSI("D", "P", p, "Q", 1, "Water")
    h_fg = CP.PropsSI("H", "P", p, "Q", 1, "Water") - CP.PropsSI("H", "P", p, "Q", 0, "Water")
    h_fg_mod = h_fg + 0.68 * cp_l * (t_sat - t_w)
    return 0.729 * (G * rho_l * (rho_l - rho_v) * h_fg_mod * k_l**3 / (mu_l * (t_sat - t_w) * d)) ** 0.25


def _steam_jacket(fouling: float = 0.0) -> Alternative:
    return Alternative(
        name="Steam heater", fluid=PureFluid(name="Water"),
        feed=Feed(inlet_temperature_K=293.15, inlet_pressure_Pa=6e5, mass_flow_kg_per_s=1.2),
        segments=[Segment(name="Heater", length_m=8.0, pipe=NPS2,
                          surroundings=FixedWall(wall_temperature_K=None, steam_pressure_Pa=3.5e5,
                                                 steam_side_fouling_m2K_per_W=fouling))],
    )


def test_condensing_steam_heat_flux_matches_nusselt_film_condensation_at_every_node():
    r = solve(_steam_jacket())
    t_sat = CP.PropsSI("T", "P", 3.5e5, "Q", 1.0, "Water")
    d_o = 0.0603
    prof = r.profile
    for i in range(2, prof.x_m.size, 17):
        t_w = float(prof.outer_surface_temperature_K[i])  # the pipe's outer wall under the condensate
        q = _nusselt_condensation_h(t_sat, t_w, d_o) * math.pi * d_o * (t_sat - t_w)
        assert float(prof.heat_to_fluid_W_per_m[i]) == pytest.approx(q, rel=0.01)


def test_condensate_film_and_fouling_make_the_steam_heater_less_optimistic_than_a_wall_at_saturation():
    t_sat = CP.PropsSI("T", "P", 3.5e5, "Q", 1.0, "Water")
    ideal = _steam_jacket()
    ideal.segments[0].surroundings = FixedWall(wall_temperature_K=t_sat)
    q_ideal = solve(ideal).duty_W
    q_film = solve(_steam_jacket()).duty_W
    # TEMA typical steam-side fouling 0.0001 m²K/W (from memory): one more resistance in series
    q_fouled = solve(_steam_jacket(fouling=1e-4)).duty_W
    assert q_fouled < q_film < q_ideal
    assert 0.03 < 1.0 - q_film / q_ideal < 0.40  # the film costs several percent on a water heater


def test_inside_fouling_adds_its_resistance_in_series():
    # a fixed wall temperature, developed turbulent flow: ln(ΔT_in/ΔT_out) = L/(m cp (R_in + R_f + R_wall))
    def line(fouling):
        return Alternative(
            name="Fouled", fluid=PureFluid(name="Water"),
            feed=Feed(inlet_temperature_K=293.15, inlet_pressure_Pa=6e5, mass_flow_kg_per_s=1.0, inlet_flow="developed"),
            segments=[Segment(name="Wall", length_m=20.0, pipe=Pipe(bore="diameter", inner_diameter_m=0.05,
                                                                     wall_thickness_m=0.0),
                              inside_fouling_m2K_per_W=fouling, surroundings=FixedWall(wall_temperature_K=333.15))],
        )
    r_f = 3.5e-4  # m²K/W, TEMA typical for treated cooling water (from memory)
    for fouling in (0.0, r_f):
        r = solve(line(fouling))
        cp = _water(0.5 * (r.inlet_temperature_K + r.outlet_temperature_K))["C"]
        # the line's mean resistance per metre from the closed form of a wall at fixed temperature ...
        r_line = 20.0 / (1.0 * cp * math.log((333.15 - r.inlet_temperature_K) / (333.15 - r.outlet_temperature_K)))
        # ... less the inside film it reports (thin wall: no wall resistance) leaves the fouling
        r_film = float(np.mean(1.0 / (r.profile.inside_coefficient_W_per_m2K * math.pi * 0.05)))
        assert r_line - r_film == pytest.approx(fouling / (math.pi * 0.05), abs=0.01 * r_f / (math.pi * 0.05))


def test_a_steep_riser_in_still_air_loses_heat_as_a_vertical_surface():
    # invented: a 12 m bare riser carrying hot water; Churchill & Chu (1975) vertical plate over its height
    alt = Alternative(
        name="Riser", fluid=PureFluid(name="Water"),
        feed=Feed(inlet_temperature_K=353.15, inlet_pressure_Pa=6e5, mass_flow_kg_per_s=0.8),
        segments=[Segment(name="Riser", length_m=12.0, elevation_change_m=12.0, pipe=NPS2,
                          surroundings=StillAir(temperature_K=293.15, emissivity=0.0))],
    )
    r = solve(alt)
    i = r.profile.x_m.size // 2
    t_s = float(r.profile.outer_surface_temperature_K[i])
    t_f = 0.5 * (t_s + 293.15)
    air = {q: CP.PropsSI(q, "T", t_f, "P", 101325.0, "Air") for q in ("C", "V", "L", "D")}
    nu = air["V"] / air["D"]
    pr = air["C"] * air["V"] / air["L"]
    gr = G / t_f * (t_s - 293.15) * 12.0**3 / nu**2
    h = ht.conv_free_immersed.Nu_vertical_plate_Churchill(pr, gr) * air["L"] / 12.0
    assert float(r.profile.heat_loss_W_per_m[i]) == pytest.approx(h * math.pi * 0.0603 * (t_s - 293.15), rel=0.01)


def _turbulent_line(inlet_flow: str, surroundings_2=None, d2: float = 0.05) -> Alternative:
    s2 = surroundings_2 or Adiabatic()
    return Alternative(
        name="Entry", fluid=PureFluid(name="Water"),
        feed=Feed(inlet_temperature_K=303.15, inlet_pressure_Pa=6e5, mass_flow_kg_per_s=1.0, inlet_flow=inlet_flow),
        segments=[
            Segment(name="A", length_m=10.0, pipe=Pipe(bore="diameter", inner_diameter_m=0.05, wall_thickness_m=0.004),
                    surroundings=Adiabatic()),
            Segment(name="B", length_m=10.0, pipe=Pipe(bore="diameter", inner_diameter_m=d2, wall_thickness_m=0.004),
                    surroundings=s2),
        ],
    )


def test_flow_arriving_developed_has_the_developed_coefficient_at_the_inlet():
    developed = solve(_turbulent_line("developed"))
    developing = solve(_turbulent_line("developing"))
    w = _water(303.15, 6e5)
    re = 4 * 1.0 / (math.pi * 0.05 * w["V"])
    pr = w["C"] * w["V"] / w["L"]
    fd = fluids.friction.friction_factor(Re=re, eD=4.5e-5 / 0.05)
    h_fd = ht.conv_internal.turbulent_Gnielinski(Re=re, Pr=pr, fd=fd) * w["L"] / 0.05
    assert developed.profile.inside_coefficient_W_per_m2K[0] == pytest.approx(h_fd, rel=0.005)
    # 1 m from a vessel: the local entrance factor 1 + (1/3)(D/x)^(2/3) (VDI Heat Atlas G1) ≈ 1.045
    i = int(np.searchsorted(developing.profile.x_m, 1.0))
    x = developing.profile.x_m[i]
    assert developing.profile.inside_coefficient_W_per_m2K[i] == pytest.approx(
        h_fd * (1 + (0.05 / x) ** (2 / 3) / 3), rel=0.01)


def test_thermal_entry_restarts_where_the_wall_condition_changes_and_not_between_like_segments():
    jacket = FixedWall(wall_temperature_K=353.15)
    restarted = solve(_turbulent_line("developed", surroundings_2=jacket))
    b = restarted.segments[1]
    h = restarted.profile.inside_coefficient_W_per_m2K
    # just inside the heated segment the coefficient is well above its developed value downstream
    assert h[b.node_start + 1] > 1.5 * h[b.node_end]
    # and the inner wall meets the bulk at the very start of the new thermal entry (to the clip of
    # x/D at 1e-6, where the coefficient is large but finite)
    wall, bulk = restarted.profile.inner_wall_temperature_K, restarted.profile.bulk_temperature_K
    assert wall[b.node_start] - bulk[b.node_start] < 0.01 * (wall[b.node_end] - bulk[b.node_end])
    # two like segments are one entry: splitting a line in two changes nothing
    one = Alternative(name="One", fluid=PureFluid(name="Water"),
                      feed=Feed(inlet_temperature_K=303.15, inlet_pressure_Pa=6e5, mass_flow_kg_per_s=1.0),
                      segments=[Segment(name="J", length_m=20.0, pipe=NPS2, surroundings=jacket)])
    two = one.model_copy(deep=True)
    two.segments = [Segment(name="J1", length_m=7.0, pipe=NPS2, surroundings=jacket),
                    Segment(name="J2", length_m=13.0, pipe=NPS2, surroundings=jacket)]
    assert solve(two).outlet_temperature_K == pytest.approx(solve(one).outlet_temperature_K, abs=0.002)


def test_inside_coefficient_at_nodes_carries_the_property_correction_of_the_node_itself():
    # the steam-jacketed sample (invented demo): water heated turbulently in the jacket. At a node the
    # reported coefficient must be Gnielinski (ht) × the VDI local entrance factor 1 + ⅓(D/x)^(2/3), x from
    # where the jacket's thermal entry starts, × (Pr_b/Pr_w)^0.11 (Gnielinski; VDI Heat Atlas G1) with
    # CoolProp properties at the node's own bulk and inner-wall temperatures — also at the segment's ends
    from pathlib import Path
    from solver import catalogue
    from solver.project_io import load_project
    alt = load_project(Path(__file__).resolve().parent.parent / "sample_projects" / "steam_jacketed_heater.json").alternatives[0]
    r = solve(alt)
    span = r.segments[1]
    rp = catalogue.resolve_pipe(alt.segments[1].pipe)
    d = rp.inner_diameter_m
    for i in (span.node_start + 3, (span.node_start + span.node_end) // 2, span.node_end):
        t, p = float(r.profile.bulk_temperature_K[i]), float(r.profile.pressure_Pa[i])
        t_w = float(r.profile.inner_wall_temperature_K[i])
        b, w = _water(t, p), _water(t_w, p)
        pr, pr_w = b["C"] * b["V"] / b["L"], w["C"] * w["V"] / w["L"]
        re = 4 * alt.feed.mass_flow_kg_per_s / (math.pi * d * b["V"])
        fd = fluids.friction.friction_factor(Re=re, eD=rp.roughness_m / d)
        x = float(r.profile.x_m[i]) - span.x_start_m
        h = (ht.conv_internal.turbulent_Gnielinski(Re=re, Pr=pr, fd=fd) * b["L"] / d
             * (1 + (d / x) ** (2 / 3) / 3) * (pr / pr_w) ** 0.11)
        assert r.profile.inside_coefficient_W_per_m2K[i] == pytest.approx(h, rel=2e-3), i
