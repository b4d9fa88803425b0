"""The outside heat paths against independent hand calculations and published worked examples.

Each path — still air (natural convection + radiation, over insulation), wind (forced + natural
convection + radiation), buried (soil shape factor, over insulation) and a jacket (given film
coefficient) — is solved as a one-segment line with :func:`solver.solve`. At a node in the
middle of the segment the heat loss per metre and the outer-surface temperature are then worked
out again by hand from the solver's bulk temperature there:

* the inside film is taken from the solver (``profile.inside_coefficient_W_per_m2K``; it is
  checked against Gnielinski/Shah & London in tests/test_correlations.py) — everything outside
  of it is computed here independently;
* conduction through the pipe wall and insulation: ``ht.conduction.R_cylinder``
  (ln(Do/Di)/(2πkL), Incropera & DeWitt eq. 3.28);
* natural convection: ``ht.conv_free_immersed.Nu_horizontal_cylinder_Churchill_Chu``
  (Churchill & Chu 1975); wind: ``ht.conv_external.Nu_cylinder_Churchill_Bernstein``
  (Churchill & Bernstein 1977), the two combined by Churchill's (1977) cube rule
  Nu = (Nu_F³ + Nu_N³)^(1/3);
* air properties from CoolProp (``PropsSI``, Lemmon et al. 2000 air model) at the film
  temperature and 1 atm, β = 1/T_film (ideal gas);
* radiation: εσ(Ts⁴ − T∞⁴) with σ from ``scipy.constants`` (CODATA);
* buried: conduction shape factor ``ht.conduction.S_isothermal_pipe_to_plane``
  (2πL / arccosh(2z/D), Incropera & DeWitt Table 4.1);
* the surface heat balance (conduction in = convection + radiation out) is solved with
  ``scipy.optimize.brentq``.

The tolerances (0.1 % on heat per metre, 0.02 K on the surface) leave room for the solver's air
table (1 K knots, linear interpolation: < 0.1 %; the agreement seen is about 1e-5) and nothing more, so each of these breaks turns
a test red (seen in a private copy): outer convection doubled, radiation removed, wind Reynolds
number doubled, insulation dropped (air and buried), jacket film resistance doubled, soil
resistance halved or doubled.

The published examples at the end carry their source beside each value; where the source was not
at hand the value is marked "from memory" and the tolerance is looser, with the reason.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from solver import solve
from solver.model import Alternative, Buried, Feed, Jacket, Layer, Pipe, PureFluid, Segment, StillAir, Wind

CP = pytest.importorskip("CoolProp.CoolProp")
ht = pytest.importorskip("ht")
from scipy.constants import Stefan_Boltzmann as SIGMA  # noqa: E402  CODATA value
from scipy.optimize import brentq  # noqa: E402

G = 9.80665  # standard gravity (CGPM 1901)
P_ATM = 101_325.0  # standard atmosphere

# A steel pipe given by its bore and wall (not from the catalogue), so the geometry is known here.
D_IN, WALL, K_STEEL = 0.0525, 0.0039, 45.0  # ~NPS 2 sch 40; carbon steel about 45 W/(m K) (common practice)
D_PIPE = D_IN + 2 * WALL
PIPE = Pipe(bore="diameter", inner_diameter_m=D_IN, wall_thickness_m=WALL, wall_conductivity_W_per_mK=K_STEEL,
            roughness_m=4.5e-5)
WATER = PureFluid(name="Water")


def _line(surroundings, insulation=(), *, t_in=353.15, m_dot=1.5, length=20.0, pipe=PIPE, p_in=8e5):
    """One segment of hot water: turbulent, short, so the bulk hardly changes along it."""
    return Alternative(
        name="Heat path", fluid=WATER,
        feed=Feed(inlet_temperature_K=t_in, inlet_pressure_Pa=p_in, mass_flow_kg_per_s=m_dot),
        segments=[Segment(name="Run", length_m=length, pipe=pipe, insulation=list(insulation),
                          surroundings=surroundings)],
    )


def _mid_node(r):
    """Index of the profile node nearest the middle of the one segment, with its bulk and inside h."""
    prof = r.profile
    i = int(np.argmin(np.abs(prof.x_m - 0.5 * prof.x_m[-1])))
    return i, float(prof.bulk_temperature_K[i]), float(prof.inside_coefficient_W_per_m2K[i])


def _solve(alt):
    # a tight fixed point, so what is compared is the model, not the iteration tolerance
    return solve(alt, tolerance_K=1e-7)


def _assert_line_balance(r, alt):
    """The loss per metre checked at a node must also be what the march took from the fluid:
    the loss along the line (the profile's W/m, trapezoid rule) equals the line's heat loss, and
    that equals the water's enthalpy drop, m (h_in − h_out), with both enthalpies from CoolProp
    (IAPWS-95). Without this a march that used another outside resistance than the node values
    would go unseen."""
    prof = r.profile
    along = float(np.trapezoid(prof.heat_loss_W_per_m, prof.x_m))
    assert r.heat_loss_W == pytest.approx(along, rel=2e-3)
    feed = alt.feed
    h_in = CP.PropsSI("H", "T", feed.inlet_temperature_K, "P", feed.inlet_pressure_Pa, "Water")
    h_out = CP.PropsSI("H", "T", r.outlet_temperature_K, "P", r.outlet_pressure_Pa, "Water")
    assert r.mass_flow_kg_per_s * (h_in - h_out) == pytest.approx(r.heat_loss_W, rel=2e-3)


# --------------------------------------------------------------------------- hand calculation


def air_at(t_film):
    """ν, α, k, Pr of air at 1 atm from CoolProp (reference EOS and transport models)."""
    rho = CP.PropsSI("D", "T", t_film, "P", P_ATM, "Air")
    mu = CP.PropsSI("V", "T", t_film, "P", P_ATM, "Air")
    k = CP.PropsSI("L", "T", t_film, "P", P_ATM, "Air")
    cp = CP.PropsSI("C", "T", t_film, "P", P_ATM, "Air")
    return mu / rho, k / (rho * cp), k, cp * mu / k


def h_convection(t_s, t_air, d, wind=0.0):
    """Outer convection coefficient [W/m²K] from ht: Churchill–Chu, Churchill–Bernstein, cube rule."""
    t_f = 0.5 * (t_s + t_air)
    nu, alpha, k, pr = air_at(t_f)
    gr = G * (1.0 / t_f) * abs(t_s - t_air) * d**3 / nu**2
    nu_nat = ht.conv_free_immersed.Nu_horizontal_cylinder_Churchill_Chu(pr, gr)
    if wind > 0:
        nu_forced = ht.conv_external.Nu_cylinder_Churchill_Bernstein(wind * d / nu, pr)
        nusselt = (nu_forced**3 + nu_nat**3) ** (1.0 / 3.0)  # Churchill (1977)
    else:
        nusselt = nu_nat
    return nusselt * k / d


def q_radiation(t_s, t_air, d, emissivity):
    """Grey surface in large surroundings at the air temperature [W/m]: εσ(Ts⁴ − T∞⁴) πD."""
    return emissivity * SIGMA * (t_s**4 - t_air**4) * math.pi * d


def hand_air_path(t_bulk, h_inside, t_air, layers=(), emissivity=0.9, wind=0.0):
    """Heat loss per metre and surface temperature by the surface heat balance (brentq)."""
    r_inner = 1.0 / (h_inside * math.pi * D_IN) + ht.conduction.R_cylinder(D_IN, D_PIPE, K_STEEL, 1.0)
    d = D_PIPE
    for thickness, k in layers:
        r_inner += ht.conduction.R_cylinder(d, d + 2 * thickness, k, 1.0)
        d += 2 * thickness

    def out_minus_in(t_s):
        q_out = h_convection(t_s, t_air, d, wind) * math.pi * d * (t_s - t_air) + q_radiation(t_s, t_air, d, emissivity)
        return q_out - (t_bulk - t_s) / r_inner

    t_s = brentq(out_minus_in, t_air + 1e-6, t_bulk - 1e-9, xtol=1e-10)
    return (t_bulk - t_s) / r_inner, t_s


def _r_inside_and_wall(h_inside):
    return 1.0 / (h_inside * math.pi * D_IN) + ht.conduction.R_cylinder(D_IN, D_PIPE, K_STEEL, 1.0)


# --------------------------------------------------------------------------- still air


STILL_LAYERS = [(0.03, 0.04)]  # 30 mm mineral wool at 0.04 W/(m K) (a typical value, common practice)


@pytest.mark.parametrize("layers,emissivity", [((), 0.9), (STILL_LAYERS, 0.9), ((), 0.1)],
                         ids=["bare", "insulated", "bare low-emissivity"])
def test_still_air_against_hand_calculation(layers, emissivity):
    alt = _line(StillAir(temperature_K=288.15, emissivity=emissivity),
                [Layer(thickness_m=t, conductivity_W_per_mK=k) for t, k in layers])
    r = _solve(alt)
    i, t_bulk, h_i = _mid_node(r)
    q_hand, ts_hand = hand_air_path(t_bulk, h_i, 288.15, layers, emissivity)
    assert float(r.profile.heat_loss_W_per_m[i]) == pytest.approx(q_hand, rel=1e-3)
    assert float(r.profile.outer_surface_temperature_K[i]) == pytest.approx(ts_hand, abs=0.02)
    _assert_line_balance(r, alt)


# --------------------------------------------------------------------------- wind


@pytest.mark.parametrize("layers,wind", [((), 3.0), (((0.04, 0.04),), 8.0)], ids=["bare 3 m/s", "insulated 8 m/s"])
def test_wind_against_hand_calculation(layers, wind):
    alt = _line(Wind(temperature_K=268.15, wind_speed_m_per_s=wind, emissivity=0.8),
                [Layer(thickness_m=t, conductivity_W_per_mK=k) for t, k in layers])
    r = _solve(alt)
    i, t_bulk, h_i = _mid_node(r)
    q_hand, ts_hand = hand_air_path(t_bulk, h_i, 268.15, layers, 0.8, wind)
    assert float(r.profile.heat_loss_W_per_m[i]) == pytest.approx(q_hand, rel=1e-3)
    assert float(r.profile.outer_surface_temperature_K[i]) == pytest.approx(ts_hand, abs=0.02)
    _assert_line_balance(r, alt)


def test_light_wind_on_a_thin_pipe_still_feels_natural_convection():
    """At 0.2 m/s on a bare 21 mm pipe natural convection is about half of the forced Nusselt
    number, so the cube-rule combination (Churchill 1977) shows: dropping the natural part or
    the forced part moves the loss by several per cent."""
    pipe = Pipe(bore="diameter", inner_diameter_m=0.0158, wall_thickness_m=0.0028, wall_conductivity_W_per_mK=K_STEEL)
    alt = _line(Wind(temperature_K=278.15, wind_speed_m_per_s=0.2, emissivity=0.0), pipe=pipe, m_dot=0.4, length=5.0)
    r = _solve(alt)
    i, t_bulk, h_i = _mid_node(r)
    d_o = 0.0158 + 2 * 0.0028
    r_inner = 1.0 / (h_i * math.pi * 0.0158) + ht.conduction.R_cylinder(0.0158, d_o, K_STEEL, 1.0)
    t_s = brentq(lambda ts: h_convection(ts, 278.15, d_o, 0.2) * math.pi * d_o * (ts - 278.15) - (t_bulk - ts) / r_inner,
                 278.15 + 1e-6, t_bulk)
    assert float(r.profile.heat_loss_W_per_m[i]) == pytest.approx((t_bulk - t_s) / r_inner, rel=1e-3)
    assert float(r.profile.outer_surface_temperature_K[i]) == pytest.approx(t_s, abs=0.02)
    _assert_line_balance(r, alt)


# --------------------------------------------------------------------------- buried


@pytest.mark.parametrize("layers,depth,k_soil", [((), 0.8, 1.2), (((0.02, 0.03),), 1.5, 0.8)],
                         ids=["bare", "insulated"])
def test_buried_against_shape_factor(layers, depth, k_soil):
    alt = _line(Buried(soil_temperature_K=281.15, depth_m=depth, soil_conductivity_W_per_mK=k_soil),
                [Layer(thickness_m=t, conductivity_W_per_mK=k) for t, k in layers])
    r = _solve(alt)
    i, t_bulk, h_i = _mid_node(r)
    r_total = _r_inside_and_wall(h_i)
    d = D_PIPE
    for thickness, k in layers:
        r_total += ht.conduction.R_cylinder(d, d + 2 * thickness, k, 1.0)
        d += 2 * thickness
    r_soil = 1.0 / (k_soil * ht.conduction.S_isothermal_pipe_to_plane(d, depth, 1.0))
    q_hand = (t_bulk - 281.15) / (r_total + r_soil)
    assert float(r.profile.heat_loss_W_per_m[i]) == pytest.approx(q_hand, rel=1e-3)
    # the surface facing the soil (over the insulation): soil temperature + q' R_soil
    assert float(r.profile.outer_surface_temperature_K[i]) == pytest.approx(281.15 + q_hand * r_soil, abs=0.02)
    _assert_line_balance(r, alt)


# --------------------------------------------------------------------------- jacket


@pytest.mark.parametrize("h_jacket,t_medium", [(1500.0, 393.15), (300.0, 283.15)], ids=["heating", "cooling"])
def test_jacket_against_series_resistances(h_jacket, t_medium):
    alt = _line(Jacket(medium_temperature_K=t_medium, film_coefficient_W_per_m2K=h_jacket), t_in=333.15, length=5.0)
    r = _solve(alt)
    i, t_bulk, h_i = _mid_node(r)
    r_jacket = 1.0 / (h_jacket * math.pi * D_PIPE)
    q_to_fluid = (t_medium - t_bulk) / (_r_inside_and_wall(h_i) + r_jacket)
    assert float(r.profile.heat_to_fluid_W_per_m[i]) == pytest.approx(q_to_fluid, rel=1e-3)
    # the jacket side of the pipe wall: medium temperature − q' R_jacket
    assert float(r.profile.outer_surface_temperature_K[i]) == pytest.approx(t_medium - q_to_fluid * r_jacket, abs=0.02)
    # heat from the jacket counts as heat input, not as a negative loss
    assert r.heat_loss_W == 0.0
    assert r.heat_input_media_W == pytest.approx(r.duty_W, rel=1e-9)
    # what the march gave the water: the jacket's W/m along the line, and m Δh from CoolProp (IAPWS-95)
    prof = r.profile
    assert r.duty_W == pytest.approx(float(np.trapezoid(prof.heat_to_fluid_W_per_m, prof.x_m)), rel=2e-3)
    h_in = CP.PropsSI("H", "T", alt.feed.inlet_temperature_K, "P", alt.feed.inlet_pressure_Pa, "Water")
    h_out = CP.PropsSI("H", "T", r.outlet_temperature_K, "P", r.outlet_pressure_Pa, "Water")
    assert r.mass_flow_kg_per_s * (h_out - h_in) == pytest.approx(r.duty_W, rel=2e-3)


# --------------------------------------------------------------------------- published examples


def test_buried_hot_water_pipe_cengel_example():
    """Çengel, Heat and Mass Transfer (2nd ed.), Example 3-17 (example number from memory; the
    problem statement is reproduced in several public problem sets): a 10 cm hot-water pipe,
    30 m long, centreline 0.5 m below the surface, pipe surface 80 °C, ground surface 10 °C,
    soil k = 0.9 W/(m K). Solution: S = 2πL / ln(4z/D) = 62.9 m, Q = S k ΔT = 3.96 kW (answer from
    memory, recomputed here from the published data). The book's ln(4z/D) is the z > 1.5 D form of
    arccosh(2z/D); the two differ by 0.1 % here, so 1 % covers it."""
    pipe = Pipe(bore="diameter", inner_diameter_m=0.096, wall_thickness_m=0.002, wall_conductivity_W_per_mK=400.0)
    alt = _line(Buried(soil_temperature_K=283.15, depth_m=0.5, soil_conductivity_W_per_mK=0.9),
                pipe=pipe, t_in=353.15, m_dot=6.0, length=30.0)
    r = _solve(alt)
    # the pipe surface stays within a few tenths of a kelvin of the water (turbulent, copper-like wall)
    surface = r.profile.outer_surface_temperature_K
    assert np.all(np.abs(surface - 353.15) < 0.5)
    q_book = 3960.0 / 30.0  # W/m
    # scale the book's loss to the solver's own (slightly lower) mean surface temperature
    scale = (float(surface.mean()) - 283.15) / 70.0
    assert r.heat_loss_W == pytest.approx(30.0 * q_book * scale, rel=0.01)


def test_cylinder_in_cross_flow_incropera_experiment():
    """Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, Example 7.4 (number from memory;
    the data are reproduced in a public course notebook): a 12.7 mm cylinder in air at 26.2 °C and
    10 m/s, surface 128.4 °C; 85 % of 46 W leaves 94 mm of it by convection, so the measured
    h = 0.85 · 46 / (π · 0.0127 · 0.094 · 102.2) = 102 W/(m² K). The Churchill–Bernstein correlation
    claims about ±20 % on data of this kind (Churchill & Bernstein 1977); the book's own comparison
    falls a few per cent below the measurement, so 10 % is asked here."""
    h_measured = 0.85 * 46.0 / (math.pi * 0.0127 * 0.094 * (128.4 - 26.2))
    assert h_measured == pytest.approx(102.0, abs=0.1)
    pipe = Pipe(bore="diameter", inner_diameter_m=0.0107, wall_thickness_m=0.001, wall_conductivity_W_per_mK=400.0)
    t_air = 26.2 + 273.15
    alt = _line(Wind(temperature_K=t_air, wind_speed_m_per_s=10.0, emissivity=0.0), pipe=pipe,
                t_in=128.6 + 273.15, m_dot=0.5, length=1.0, p_in=10e5)
    r = _solve(alt)
    i, _, _ = _mid_node(r)
    t_s = float(r.profile.outer_surface_temperature_K[i])
    assert t_s == pytest.approx(128.4 + 273.15, abs=0.5)
    h_solver = float(r.profile.heat_loss_W_per_m[i]) / (math.pi * 0.0127 * (t_s - t_air))
    assert h_solver == pytest.approx(h_measured, rel=0.10)


def test_bare_steam_pipe_natural_convection_worked_example():
    """msubbu.in worked problem "Heat loss by convection to air": a 100 mm horizontal pipe at 170 °C
    in still air at 30 °C, air properties at 100 °C, Nu = 0.53 (Gr Pr)^(1/4) (McAdams' laminar
    horizontal-cylinder form): h = 8.07 W/(m² K), 1419.8 W over 4 m, 355 W/m of convection. Calorun
    uses Churchill–Chu (1975), which gives about 8 % less at this Rayleigh number (5e6); the two
    correlations' published scatter is of that size, so 12 % is asked. Radiation is switched off
    (ε = 0) to compare convection alone."""
    pipe = Pipe(bore="diameter", inner_diameter_m=0.096, wall_thickness_m=0.002, wall_conductivity_W_per_mK=400.0)
    alt = _line(StillAir(temperature_K=303.15, emissivity=0.0), pipe=pipe, t_in=443.15 + 0.05, m_dot=5.0,
                length=4.0, p_in=15e5)
    r = _solve(alt)
    i, _, _ = _mid_node(r)
    t_s = float(r.profile.outer_surface_temperature_K[i])
    assert t_s == pytest.approx(443.15, abs=0.5)
    h_solver = float(r.profile.heat_loss_W_per_m[i]) / (math.pi * 0.1 * (t_s - 303.15))
    assert h_solver == pytest.approx(8.07, rel=0.12)
    # the whole 4 m, scaled to the solver's surface temperature (h barely moves over 0.2 K)
    assert r.heat_loss_W == pytest.approx(1419.8 * (t_s - 303.15) / 140.0, rel=0.12)


@pytest.mark.parametrize("nps,q_table", [("1", 169.0), ("2", 285.0), ("4", 501.0), ("6", 696.0)])
def test_bare_steel_pipe_in_still_air_against_published_table(nps, q_table):
    """Engineering ToolBox, "Steam Pipes - Heat Losses (W/m)": bare horizontal steel pipes in still
    air at 10–25 °C, 100 K above the air: DN 25 169 W/m, DN 50 285 W/m, DN 100 501 W/m, DN 150
    696 W/m. The table states neither its emissivity nor its correlation; with ε = 0.8 (oxidised
    steel, common practice) Calorun lies within 2–5 % of it from 1" to 6", so 8 % is asked.
    Convection and radiation are each about half of the loss here, so losing either, or doubling
    the convection, is far outside this band."""
    alt = _line(StillAir(temperature_K=293.15, emissivity=0.8), pipe=Pipe(nps=nps, schedule="40"),
                t_in=393.15 + 0.05, m_dot=3.0, length=2.0, p_in=5e5)
    r = _solve(alt)
    i, _, _ = _mid_node(r)
    t_s = float(r.profile.outer_surface_temperature_K[i])
    assert t_s == pytest.approx(393.15, abs=1.5)
    # per 100 K, scaled from the solver's surface temperature (within 1.3 K of 100 K above the air)
    q_per_100K = float(r.profile.heat_loss_W_per_m[i]) * 100.0 / (t_s - 293.15)
    assert q_per_100K == pytest.approx(q_table, rel=0.08)


# --------------------------------------------------------------------------- bad input to the outside path


# saturated water at 1.5 bar condensing on a 60 mm tube 10 K below saturation (IAPWS-95 values, rounded)
_STEAM_FILM = dict(T_sat_K=384.5, T_wall_K=374.5, D_outer_m=0.06, rho_liquid=951.0, rho_vapour=0.86,
                   h_fg=2.226e6, cp_liquid=4227.0, k_liquid=0.683, mu_liquid=2.5e-4)


@pytest.mark.parametrize("function,good,field,bad,reason", [
    ("radiation_coefficient", dict(T_surface_K=350.0, T_surroundings_K=300.0, emissivity=0.9),
     "T_surface_K", 0.0, "> 0"),
    ("radiation_coefficient", dict(T_surface_K=350.0, T_surroundings_K=300.0, emissivity=0.9),
     "T_surroundings_K", -5.0, "> 0"),
    ("radiation_coefficient", dict(T_surface_K=350.0, T_surroundings_K=300.0, emissivity=0.9),
     "emissivity", 1.2, "between 0 and 1"),
    ("cylinder_wall_resistance", dict(D_inner_m=0.05, D_outer_m=0.06, conductivity=45.0), "D_inner_m", 0.0, "> 0"),
    ("cylinder_wall_resistance", dict(D_inner_m=0.05, D_outer_m=0.06, conductivity=45.0), "D_outer_m", -0.06, "> 0"),
    ("cylinder_wall_resistance", dict(D_inner_m=0.05, D_outer_m=0.06, conductivity=45.0), "conductivity", 0.0, "> 0"),
    ("cylinder_wall_resistance", dict(D_inner_m=0.05, D_outer_m=0.06, conductivity=45.0), "D_outer_m", 0.04,
     "smaller than D_inner_m = 0.05 m"),
    ("buried_cylinder_resistance", dict(D_outer_m=0.2, depth_m=1.0, soil_conductivity=1.2), "D_outer_m", 0.0, "> 0"),
    ("buried_cylinder_resistance", dict(D_outer_m=0.2, depth_m=1.0, soil_conductivity=1.2),
     "soil_conductivity", -1.0, "> 0"),
    ("buried_cylinder_resistance", dict(D_outer_m=0.2, depth_m=1.0, soil_conductivity=1.2), "depth_m", 0.08,
     "half the outer diameter D_outer_m = 0.2 m"),
] + [
    # Nusselt's film condensation on a horizontal tube (the steam-heated pipe's outside film)
    ("condensation_horizontal_tube", dict(_STEAM_FILM), field, bad, reason)
    for field, bad, reason in [("D_outer_m", 0.0, "> 0"), ("rho_liquid", -1.0, "> 0"), ("rho_vapour", -0.5, ">= 0"),
                               ("h_fg", 0.0, "> 0"), ("cp_liquid", -4.0, "> 0"), ("k_liquid", 0.0, "> 0"),
                               ("mu_liquid", -1e-3, "> 0")]
])
def test_outside_path_correlations_name_the_bad_input(function, good, field, bad, reason):
    """What a user sees when a value cannot be used: the field by name, the value, and why
    (DESIGN: bad input gets a clear message naming the field and the value)."""
    from solver import correlations
    from solver.errors import InputError

    with pytest.raises(InputError) as info:
        getattr(correlations, function)(**{**good, field: bad})
    assert info.value.field == field
    assert info.value.value == bad
    assert reason in info.value.reason
    # the same inputs, all good, give a finite positive value
    assert float(getattr(correlations, function)(**good)) > 0.0


def test_outside_path_resistances_take_arrays_either_way():
    """One call per line: the wall and soil resistances of many cells at once, arrays on either side,
    equal cell by cell to ht's scalar ones (ht.conduction.R_cylinder; 1/(k S) with
    ht.conduction.S_isothermal_pipe_to_plane); a bad element is named with its own value."""
    from solver import correlations
    from solver.errors import InputError

    d_in = np.array([0.05, 0.06, 0.07])
    got = correlations.cylinder_wall_resistance(d_in, 0.08, 45.0)
    assert got == pytest.approx([ht.conduction.R_cylinder(d, 0.08, 45.0, 1.0) for d in d_in], rel=1e-12)
    d_out = np.array([0.06, 0.08, 0.1])
    got = correlations.cylinder_wall_resistance(0.05, d_out, 45.0)
    assert got == pytest.approx([ht.conduction.R_cylinder(0.05, d, 45.0, 1.0) for d in d_out], rel=1e-12)
    with pytest.raises(InputError) as info:
        correlations.cylinder_wall_resistance(np.array([0.05, 0.09]), 0.08, 45.0)
    assert (info.value.field, info.value.value) == ("D_outer_m", 0.08) and "D_inner_m = 0.09 m" in info.value.reason
    with pytest.raises(InputError) as info:
        correlations.cylinder_wall_resistance(0.05, np.array([0.06, 0.04]), 45.0)
    assert (info.value.field, info.value.value) == ("D_outer_m", 0.04)

    depth = np.array([0.5, 1.0, 2.0])
    got = correlations.buried_cylinder_resistance(0.2, depth, 1.2)
    assert got == pytest.approx([1.0 / (1.2 * ht.conduction.S_isothermal_pipe_to_plane(0.2, z, 1.0)) for z in depth],
                                rel=1e-12)
    with pytest.raises(InputError) as info:
        correlations.buried_cylinder_resistance(0.2, np.array([1.0, 0.05]), 1.2)
    assert (info.value.field, info.value.value) == ("depth_m", 0.05)
    with pytest.raises(InputError) as info:
        correlations.buried_cylinder_resistance(np.array([0.2, 3.0]), 1.0, 1.2)
    assert (info.value.field, info.value.value) == ("depth_m", 1.0) and "D_outer_m = 3.0 m" in info.value.reason


def test_black_and_bare_metal_ends_of_the_emissivity_range():
    """ε = 1 (a black body) and ε = 0 are both allowed: radiation εσ(Ts⁴ − T∞⁴) (Stefan–Boltzmann,
    σ from CODATA) at the two ends of the range; a segment with ε = 1 solves."""
    from solver import correlations

    h_black = float(correlations.radiation_coefficient(400.0, 300.0, 1.0))
    assert h_black * 100.0 == pytest.approx(SIGMA * (400.0**4 - 300.0**4), rel=1e-8)  # σ to 7 digits
    assert float(correlations.radiation_coefficient(400.0, 300.0, 0.0)) == 0.0
    r = _solve(_line(StillAir(temperature_K=288.15, emissivity=1.0)))
    i, t_bulk, h_i = _mid_node(r)
    q_hand, _ = hand_air_path(t_bulk, h_i, 288.15, (), 1.0)
    assert float(r.profile.heat_loss_W_per_m[i]) == pytest.approx(q_hand, rel=1e-3)


def test_a_gently_sloping_run_is_still_a_horizontal_cylinder():
    """A run rising 3 m over 20 m (8.6°) is far from steep: its natural convection is still that of
    a horizontal cylinder (Churchill & Chu 1975, via ht), exactly as for the level run."""
    seg_alt = _line(StillAir(temperature_K=288.15, emissivity=0.9))
    seg = seg_alt.segments[0].model_copy(update={"elevation_change_m": 3.0})
    alt = seg_alt.model_copy(update={"segments": [seg]})
    r = _solve(alt)
    i, t_bulk, h_i = _mid_node(r)
    q_hand, ts_hand = hand_air_path(t_bulk, h_i, 288.15, (), 0.9)
    assert float(r.profile.heat_loss_W_per_m[i]) == pytest.approx(q_hand, rel=1e-3)
    assert float(r.profile.outer_surface_temperature_K[i]) == pytest.approx(ts_hand, abs=0.02)
