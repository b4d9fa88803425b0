"""The resistance breakdown per segment (issue 8 item 8) against hand calculations.

Each heat path is computed here by hand from published relations through the reference libraries:
conduction through cylinders with ``ht.conduction.R_cylinder``, the buried-pipe shape factor with
``ht.conduction.S_isothermal_pipe_to_plane``, natural convection with ``ht``'s Churchill–Chu,
wind with ``ht``'s Churchill–Bernstein, radiation with ``ht.radiation.q_rad``, the inside film with
``ht``'s Gnielinski and ``fluids``' Colebrook, pipe dimensions from ``fluids.piping`` (ASME B36.10M),
and air at 1 atm from CoolProp. The fluid has constant properties and flows fast, so the bulk
temperature hardly changes along a segment and a hand calculation at the inlet temperature holds
for the whole segment; the flow arrives fully developed, so the inside film is Gnielinski's
fully developed value.
"""

from __future__ import annotations

import json
import math

import pytest
from CoolProp.CoolProp import PropsSI
from fluids.friction import Colebrook
from fluids.piping import nearest_pipe
from ht.conduction import R_cylinder, S_isothermal_pipe_to_plane
from ht.conv_external import Nu_cylinder_Churchill_Bernstein
from ht.conv_free_immersed import Nu_horizontal_cylinder_Churchill_Chu
from ht.conv_internal import turbulent_Gnielinski
from ht.radiation import q_rad

from solver.march import solve
from solver.model import (
    Adiabatic,
    Alternative,
    Buried,
    Feed,
    FixedWall,
    Jacket,
    Layer,
    Pipe,
    Segment,
    StillAir,
    TableFluid,
    TableRow,
    Wind,
)

G = 9.80665  # standard gravity (CGPM 1901)
CP, RHO, MU, K = 4000.0, 1000.0, 1.0e-3, 0.6  # a constant-property, water-like liquid (invented)
M_DOT = 5.0  # kg/s: fast, so the bulk changes by hundredths of a kelvin over a segment
T_IN = 353.15
K_STEEL = 45.0  # W/(m·K), entered, so the wall does not depend on a material table
ROUGHNESS = 4.5e-5  # m, entered (commercial steel, common practice)
_NPS, DI, DO, _WALL = nearest_pipe(NPS=2, schedule="40")  # ASME B36.10M via fluids: 52.48 / 60.3 mm


def constant_liquid() -> TableFluid:
    row = dict(density_kg_per_m3=RHO, specific_heat_J_per_kgK=CP, viscosity_Pa_s=MU, conductivity_W_per_mK=K)
    return TableFluid(name="Constant", rows=[TableRow(temperature_K=250.0, **row), TableRow(temperature_K=450.0, **row)])


def line(surroundings, insulation=(), fouling=0.0, length=10.0, heat=0.0) -> Alternative:
    seg = Segment(name="Run", length_m=length,
                  pipe=Pipe(nps="2", schedule="40", wall_conductivity_W_per_mK=K_STEEL, roughness_m=ROUGHNESS),
                  insulation=list(insulation), surroundings=surroundings, inside_fouling_m2K_per_W=fouling,
                  heat_input_W_per_m=heat)
    return Alternative(name="hand", fluid=constant_liquid(),
                       feed=Feed(inlet_temperature_K=T_IN, inlet_pressure_Pa=8e5, mass_flow_kg_per_s=M_DOT,
                                 inlet_flow="developed"),
                       segments=[seg])


def mean_exchange_by_hand(t_medium: float, total: float, length: float = 10.0) -> float:
    """Heat per metre [W/m] from a medium at a fixed temperature through a uniform resistance per metre:
    the exponential approach of the bulk, Q = m·cp·(T∞ − T_in)·(1 − exp(−L / (m·cp·R′))) (closed form)."""
    mcp = M_DOT * CP
    return mcp * (t_medium - T_IN) * -math.expm1(-length / (mcp * total)) / length


def inside_film_by_hand() -> float:
    """1/(h π D) with Gnielinski (1976) fully developed, Colebrook (1939) friction [K·m/W]."""
    re = 4.0 * M_DOT / (math.pi * DI * MU)
    pr = CP * MU / K
    h = turbulent_Gnielinski(Re=re, Pr=pr, fd=Colebrook(re, ROUGHNESS / DI)) * K / DI
    return 1.0 / (h * math.pi * DI)


def air_film_by_hand(t_s: float, t_air: float, d: float, emissivity: float, wind: float = 0.0) -> tuple[float, float]:
    """(h_conv, h_rad) [W/(m²·K)]: Churchill–Chu (1975) natural convection, with wind Churchill–Bernstein
    (1977) combined with it by Churchill's (1977) cube rule; grey-body radiation by ht.q_rad; air at
    1 atm and the film temperature from CoolProp."""
    t_f = 0.5 * (t_s + t_air)
    rho = PropsSI("D", "T", t_f, "P", 101325.0, "Air")
    mu = PropsSI("V", "T", t_f, "P", 101325.0, "Air")
    k = PropsSI("L", "T", t_f, "P", 101325.0, "Air")
    cp = PropsSI("C", "T", t_f, "P", 101325.0, "Air")
    nu = mu / rho
    pr = cp * mu / k
    gr = G * (1.0 / t_f) * abs(t_s - t_air) * d**3 / nu**2
    nu_n = Nu_horizontal_cylinder_Churchill_Chu(Pr=pr, Gr=gr)
    if wind > 0:
        nu_f = Nu_cylinder_Churchill_Bernstein(Re=wind * d / nu, Pr=pr)
        nu_n = (nu_f**3 + nu_n**3) ** (1.0 / 3.0)
    h_rad = q_rad(emissivity, t_s, t_air) / (t_s - t_air)
    return nu_n * k / d, h_rad


def outside_in_air_by_hand(r_inner: float, r_ins: float, t_air: float, d: float, emissivity: float,
                           wind: float = 0.0):
    """Fixed point on the surface temperature: (heat loss W/m, surface K, h_conv, h_rad)."""
    t_s = 0.5 * (T_IN + t_air)
    for _ in range(200):
        h_c, h_r = air_film_by_hand(t_s, t_air, d, emissivity, wind)
        r_film = 1.0 / ((h_c + h_r) * math.pi * d)
        q = (T_IN - t_air) / (r_inner + r_ins + r_film)
        t_s = t_air + q * r_film
    return q, t_s, h_c, h_r


# --------------------------------------------------------------------------- still air, two layers


TWO_LAYERS = [Layer(material="mineral wool", thickness_m=0.025, conductivity_W_per_mK=0.040),
              Layer(material="calcium silicate", thickness_m=0.010, conductivity_W_per_mK=0.065)]


@pytest.fixture(scope="module")
def still_air():
    alt = line(StillAir(temperature_K=283.15, emissivity=0.8), TWO_LAYERS, fouling=2.0e-4)
    res = solve(alt)
    return res, res.resistances[0]


def test_each_layer_is_its_cylinder_by_material_innermost_first(still_air):
    _, seg = still_air
    d1 = DO + 2 * 0.025
    # ht.conduction.R_cylinder: ln(Do/Di)/(2πkL), here per metre
    assert seg.part("insulation_1").label == "Insulation 1: mineral wool"
    assert seg.part("insulation_2").label == "Insulation 2: calcium silicate"
    assert seg.part("insulation_1").resistance_K_m_per_W == pytest.approx(R_cylinder(DO, d1, 0.040, 1.0), rel=1e-9)
    assert seg.part("insulation_2").resistance_K_m_per_W == pytest.approx(R_cylinder(d1, d1 + 0.02, 0.065, 1.0),
                                                                          rel=1e-9)
    assert seg.part("pipe_wall").resistance_K_m_per_W == pytest.approx(R_cylinder(DI, DO, K_STEEL, 1.0), rel=2e-3)
    # fouling resistance per m² of bore surface, spread over the bore's perimeter π·D_i
    assert seg.part("inside_fouling").resistance_K_m_per_W == pytest.approx(2.0e-4 / (math.pi * DI), rel=2e-3)


def test_inside_film_is_gnielinski_fully_developed(still_air):
    _, seg = still_air
    assert seg.part("inside_film").resistance_K_m_per_W == pytest.approx(inside_film_by_hand(), rel=0.01)


def test_outer_film_is_churchill_chu_in_parallel_with_radiation_at_the_reported_surface(still_air):
    _, seg = still_air
    d_out = DO + 2 * 0.035
    h_c, h_r = air_film_by_hand(seg.surface_temperature_K, 283.15, d_out, 0.8)
    # air from the solver's 1 K table (within 0.1 %) and the mean over the segment: well within 1 %
    assert seg.part("convection").resistance_K_m_per_W == pytest.approx(1 / (h_c * math.pi * d_out), rel=0.01)
    assert seg.part("radiation").resistance_K_m_per_W == pytest.approx(1 / (h_r * math.pi * d_out), rel=0.01)
    assert seg.part("outer_air_film").resistance_K_m_per_W == pytest.approx(1 / ((h_c + h_r) * math.pi * d_out),
                                                                             rel=0.01)
    # the branches carry the film's heat in proportion to their coefficients
    assert seg.part("radiation").carries_percent == pytest.approx(100 * h_r / (h_c + h_r), abs=0.5)
    assert seg.part("convection").branch_of == seg.part("radiation").branch_of == "outer_air_film"


def test_heat_loss_and_shares_match_the_whole_path_by_hand(still_air):
    res, seg = still_air
    d1 = DO + 0.05
    r_parts = {
        "inside_film": inside_film_by_hand(),
        "inside_fouling": 2.0e-4 / (math.pi * DI),
        "pipe_wall": R_cylinder(DI, DO, K_STEEL, 1.0),
        "insulation_1": R_cylinder(DO, d1, 0.040, 1.0),
        "insulation_2": R_cylinder(d1, d1 + 0.02, 0.065, 1.0),
    }
    inner = r_parts["inside_film"] + r_parts["inside_fouling"] + r_parts["pipe_wall"]
    q, t_s, h_c, h_r = outside_in_air_by_hand(inner, r_parts["insulation_1"] + r_parts["insulation_2"], 283.15,
                                              d1 + 0.02, 0.8)
    r_parts["outer_air_film"] = 1.0 / ((h_c + h_r) * math.pi * (d1 + 0.02))
    total = sum(r_parts.values())
    assert seg.heat_loss_W_per_m == pytest.approx(q, rel=0.005)
    assert seg.surface_temperature_K == pytest.approx(t_s, abs=0.05)
    assert seg.total_K_m_per_W == pytest.approx(total, rel=0.005)
    for key, r in r_parts.items():
        assert seg.part(key).share_percent == pytest.approx(100 * r / total, abs=0.3), key
    # the figure is the segment's own heat loss in the Result, per metre
    span = res.segments[0]
    assert seg.heat_loss_W_per_m == pytest.approx(span.heat_loss_W / (span.x_end_m - span.x_start_m), rel=1e-9)
    # the loss leaves through the outside path: from the pipe's outer wall through the insulation and film
    t_heated = T_IN - q * inner
    assert seg.heat_loss_W_per_m == pytest.approx((t_heated - 283.15) / seg.outside_K_m_per_W, rel=0.005)


# --------------------------------------------------------------------------- wind


def test_wind_film_is_churchill_bernstein_with_natural_convection_by_hand():
    wool = [Layer(material="mineral wool", thickness_m=0.04, conductivity_W_per_mK=0.045)]
    seg = solve(line(Wind(temperature_K=268.15, wind_speed_m_per_s=6.0, emissivity=0.9), wool)).resistances[0]
    d_out = DO + 0.08
    inner = inside_film_by_hand() + R_cylinder(DI, DO, K_STEEL, 1.0)
    q, t_s, h_c, h_r = outside_in_air_by_hand(inner, R_cylinder(DO, d_out, 0.045, 1.0), 268.15, d_out, 0.9, wind=6.0)
    assert seg.part("convection").label == "Convection (wind)"
    assert seg.part("convection").resistance_K_m_per_W == pytest.approx(1 / (h_c * math.pi * d_out), rel=0.01)
    assert seg.part("radiation").resistance_K_m_per_W == pytest.approx(1 / (h_r * math.pi * d_out), rel=0.02)
    assert seg.heat_loss_W_per_m == pytest.approx(q, rel=0.005)


# --------------------------------------------------------------------------- buried, jacket, held wall, adiabatic


def test_buried_soil_is_the_shape_factor_after_the_insulation():
    wool = [Layer(material="mineral wool", thickness_m=0.03, conductivity_W_per_mK=0.04)]
    seg = solve(line(Buried(soil_temperature_K=278.15, depth_m=1.0, soil_conductivity_W_per_mK=1.2),
                     wool)).resistances[0]
    d_out = DO + 0.06
    # ht: S = 2πL/arccosh(2Z/D) for a cylinder below an isothermal plane (Incropera Table 4.1)
    r_soil = 1.0 / (S_isothermal_pipe_to_plane(d_out, 1.0, 1.0) * 1.2)
    r_ins = R_cylinder(DO, d_out, 0.04, 1.0)
    assert seg.part("soil").resistance_K_m_per_W == pytest.approx(r_soil, rel=1e-6)
    assert seg.part("insulation_1").resistance_K_m_per_W == pytest.approx(r_ins, rel=1e-9)
    total = inside_film_by_hand() + R_cylinder(DI, DO, K_STEEL, 1.0) + r_ins + r_soil
    assert -seg.heat_loss_W_per_m == pytest.approx(mean_exchange_by_hand(278.15, total), rel=0.005)
    assert seg.part("soil").share_percent == pytest.approx(100 * r_soil / total, abs=0.3)


def test_jacket_film_and_no_insulation_and_heat_as_input():
    jacket = Jacket(medium_temperature_K=393.15, film_coefficient_W_per_m2K=800.0)
    seg = solve(line(jacket, [Layer(thickness_m=0.05, conductivity_W_per_mK=0.04)])).resistances[0]
    r_jacket = 1.0 / (800.0 * math.pi * DO)  # film entered, on the pipe's outer surface
    assert seg.part("jacket_film").resistance_K_m_per_W == pytest.approx(r_jacket, rel=2e-3)
    assert not any(p.key.startswith("insulation") for p in seg.parts)  # insulation plays no part
    total = inside_film_by_hand() + R_cylinder(DI, DO, K_STEEL, 1.0) + r_jacket
    assert seg.heat_loss_W_per_m == 0.0  # the jacket's heat is heat input, nothing goes to the ambient
    assert seg.heat_input_W_per_m == pytest.approx(mean_exchange_by_hand(393.15, total), rel=0.005)
    assert seg.heat_to_fluid_W_per_m == pytest.approx(seg.heat_input_W_per_m, rel=1e-9)


def test_wall_held_at_temperature_has_no_outside_resistance():
    seg = solve(line(FixedWall(wall_temperature_K=373.15))).resistances[0]
    assert seg.part("wall_held").resistance_K_m_per_W == 0.0
    assert seg.outside_K_m_per_W == 0.0
    total = inside_film_by_hand() + R_cylinder(DI, DO, K_STEEL, 1.0)
    assert seg.heat_to_fluid_W_per_m == pytest.approx(mean_exchange_by_hand(373.15, total), rel=0.005)


def test_adiabatic_outside_is_infinite_and_writes_strict_json():
    res = solve(line(Adiabatic(), [Layer(thickness_m=0.05, conductivity_W_per_mK=0.04)], heat=0.0))
    seg = res.resistances[0]
    assert math.isinf(seg.total_K_m_per_W)
    assert seg.part("adiabatic").share_percent == 100.0
    assert seg.heat_loss_W_per_m == pytest.approx(0.0, abs=1e-6)
    out = res.to_dict()["segments"][0]["resistances"]
    json.dumps(out, allow_nan=False)  # JSON has no infinity: null
    assert out["total_K_m_per_W"] is None


def test_traced_segment_heat_loss_is_the_input_not_taken_by_the_fluid():
    """With tracing, the heat that leaves is q_in − q_fluid; the pipe wall sits above the bulk."""
    wool = [Layer(material="mineral wool", thickness_m=0.04, conductivity_W_per_mK=0.04)]
    seg = solve(line(StillAir(temperature_K=283.15, emissivity=0.9), wool, heat=30.0)).resistances[0]
    assert seg.heat_input_W_per_m == pytest.approx(30.0, rel=1e-9)
    assert seg.heat_loss_W_per_m + seg.heat_to_fluid_W_per_m == pytest.approx(30.0, rel=1e-6)
    # the wall between the fluid and the heated node: T_h = T_b + q_fluid·R_a; loss through R_o
    r_a = inside_film_by_hand() + R_cylinder(DI, DO, K_STEEL, 1.0)
    t_heated = T_IN + seg.heat_to_fluid_W_per_m * r_a
    assert seg.heat_loss_W_per_m == pytest.approx((t_heated - 283.15) / seg.outside_K_m_per_W, rel=0.005)


# --------------------------------------------------------------------------- steam on the pipe, steam tracer


def test_condensing_steam_film_is_nusselt_on_a_horizontal_tube_and_fouling_by_hand():
    p_steam, r_foul = 4.0e5, 1.0e-4
    alt = line(FixedWall(wall_temperature_K=None, steam_pressure_Pa=p_steam, steam_side_fouling_m2K_per_W=r_foul),
               length=2.0)
    res = solve(alt)
    seg = res.resistances[0]
    t_sat = PropsSI("T", "P", p_steam, "Q", 0, "Water")
    span = res.segments[0]
    # the pipe's outer wall, length-mean of the profile's nodes (with steam on the pipe that is its surface)
    walls = res.profile.outer_surface_temperature_K[span.node_start:span.node_end + 1]
    t_w = float(walls.mean())
    t_f = 0.5 * (t_sat + t_w)
    rho_l, k_l, mu_l, cp_l = (PropsSI(q, "T", t_f, "P", p_steam * 2, "Water") for q in ("D", "L", "V", "C"))
    rho_v = PropsSI("D", "T", t_sat, "Q", 1, "Water")
    h_fg = PropsSI("H", "T", t_sat, "Q", 1, "Water") - PropsSI("H", "T", t_sat, "Q", 0, "Water")
    h_fg_mod = h_fg + 0.68 * cp_l * (t_sat - t_w)  # Rohsenow (1956): condensate subcooling in the film
    # Nusselt (1916): vertical plate 0.943 [...]^(1/4) with L; horizontal tube 0.728 [...]^(1/4) with D
    from ht.condensation import Nusselt_laminar
    h_tube = Nusselt_laminar(t_sat, t_w, rho_v, rho_l, k_l, mu_l, h_fg_mod, DO) * 0.728 / 0.943
    r_film = 1.0 / (h_tube * math.pi * DO)
    # the solver takes the film at each cell's wall temperature; h varies as ΔT^(-1/4), so the mean is close
    assert seg.part("condensate_film").resistance_K_m_per_W == pytest.approx(r_film, rel=0.01)
    assert seg.part("steam_fouling").resistance_K_m_per_W == pytest.approx(r_foul / (math.pi * DO), rel=2e-3)
    total = inside_film_by_hand() + R_cylinder(DI, DO, K_STEEL, 1.0) + r_film + r_foul / (math.pi * DO)
    assert seg.heat_input_W_per_m == pytest.approx(mean_exchange_by_hand(t_sat, total, 2.0), rel=0.01)
    assert seg.heat_loss_W_per_m == 0.0


def test_steam_tracer_is_a_parallel_path_from_the_steam():
    from solver.model import SteamTracer

    wool = [Layer(material="mineral wool", thickness_m=0.05, conductivity_W_per_mK=0.04)]
    alt = line(StillAir(temperature_K=273.15, emissivity=0.9), wool)
    alt.segments[0] = alt.segments[0].model_copy(update={
        "steam_tracer": SteamTracer(steam_pressure_Pa=4.5e5, count=2, contact="cement")})
    seg = solve(alt).resistances[0]
    tr = seg.tracer
    assert tr is not None and tr.conductance_W_per_mK > 0
    assert tr.steam_temperature_K == pytest.approx(PropsSI("T", "P", 4.5e5, "Q", 0, "Water"), abs=0.05)
    # the tracer is not a term of the series path from the fluid to the air
    assert all(not p.key.startswith("tracer") for p in seg.parts)
    assert seg.heat_input_W_per_m == pytest.approx(tr.heat_W_per_m, rel=1e-9)
    # at the pipe wall (the heated node): T_h = T_b + q_fluid·R_a; the tracer gives g·(T_steam − T_h)
    r_a = inside_film_by_hand() + R_cylinder(DI, DO, K_STEEL, 1.0)
    t_heated = T_IN + seg.heat_to_fluid_W_per_m * r_a
    assert tr.heat_W_per_m == pytest.approx(tr.conductance_W_per_mK * (tr.steam_temperature_K - t_heated), rel=0.005)
    assert seg.heat_loss_W_per_m == pytest.approx((t_heated - 273.15) / seg.outside_K_m_per_W, rel=0.005)


# --------------------------------------------------------------------------- the JSON a user reads


def test_solve_json_has_every_segments_heat_path(tmp_path):
    """`calorun solve --json` (a subprocess, as a user runs it) carries each segment's breakdown."""
    import os
    import subprocess
    import sys
    from pathlib import Path

    from solver.model import Project
    from solver.project_io import save_project

    root = Path(__file__).resolve().parent.parent
    alt = line(Buried(soil_temperature_K=278.15, depth_m=1.0, soil_conductivity_W_per_mK=1.2),
               [Layer(material="foam glass", thickness_m=0.03, conductivity_W_per_mK=0.045)])
    alt.segments.append(alt.segments[0].model_copy(update={"name": "Rack", "surroundings": StillAir()}))
    path = tmp_path / "p.json"
    save_project(Project(name="json", alternatives=[alt]), path)
    env = dict(os.environ, PYTHONPATH=str(root))
    env.pop("QT_QPA_PLATFORM", None)
    out = subprocess.run([sys.executable, "-m", "app.cli", "solve", str(path), "--json"], cwd=root, env=env,
                         capture_output=True, text=True, timeout=120)
    assert out.returncode == 0, out.stderr
    data = json.loads(out.stdout, parse_constant=lambda c: pytest.fail(f"not strict JSON: {c}"))
    segs = data["alternatives"][0]["segments"] if "alternatives" in data else data["segments"]
    buried, rack = segs[0]["resistances"], segs[1]["resistances"]
    assert [p["key"] for p in buried["parts"]] == ["inside_film", "pipe_wall", "insulation_1", "soil"]
    assert buried["parts"][2]["label"] == "Insulation: foam glass"
    assert [p["key"] for p in rack["parts"]][-3:] == ["outer_air_film", "convection", "radiation"]
    for r, s in ((buried, segs[0]), (rack, segs[1])):
        length = s["x_end_m"] - s["x_start_m"]
        assert r["heat_loss_W_per_m"] == pytest.approx(s["heat_loss_W"] / length, rel=1e-9)
        assert sum(p["share_percent"] for p in r["parts"] if "share_percent" in p) == pytest.approx(100.0)
