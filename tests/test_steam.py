"""Condensing steam on a pipe, steam tube tracers and fouling hints (solver.steam, solver.fouling).

References: Çengel's worked example of steam condensing on a horizontal tube (from memory); the
``ht`` library's Nusselt film-condensation function; the ``iapws`` library (IAPWS-IF97, an
implementation independent of CoolProp) for water properties; steam-table saturation temperatures;
TEMA fouling resistances as Incropera & DeWitt reprint them (from memory).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from ht.condensation import Nusselt_laminar
from iapws import IAPWS97

from solver import correlations, steam
from solver.errors import InputError
from solver.fouling import fouling_hints

# Çengel, Heat Transfer: A Practical Approach, 2nd ed., Example 10-5 (from memory): steam at 40 °C
# (7.38 kPa) condenses on a horizontal 3 cm tube held at 30 °C. Properties as the book takes them:
# h_fg and ρ_v at 40 °C, the liquid at the film temperature 35 °C. The book gets h = 9292 W/(m² K),
# Q = 8757 W per metre of tube and 0.00360 kg/s of condensate per metre.
CENGEL = dict(T_sat_K=313.15, T_wall_K=303.15, D_outer_m=0.03, rho_liquid=994.0, rho_vapour=0.05,
              h_fg=2407e3, cp_liquid=4178.0, k_liquid=0.623, mu_liquid=0.720e-3)

# Incropera & DeWitt (and Çengel, ch. 10): the horizontal-tube constant 0.729 against the vertical
# plate's 0.943 = 2√2/3, with the tube diameter in place of the plate height.
TUBE_OVER_PLATE = 0.729 / (2.0 * math.sqrt(2.0) / 3.0)


def test_nusselt_film_condensation_reproduces_the_worked_example():
    h = float(correlations.condensation_horizontal_tube(**CENGEL))
    assert h == pytest.approx(9292.0, rel=1e-3)  # the book rounds h'_fg to 2435 kJ/kg, g = 9.81
    q_per_m = h * math.pi * 0.03 * 10.0
    assert q_per_m == pytest.approx(8757.0, rel=1e-3)


@pytest.mark.parametrize("t_sat, t_wall, d, rho_l, rho_v, h_fg, cp_l, k_l, mu_l", [
    (313.15, 303.15, 0.03, 994.0, 0.05, 2407e3, 4178.0, 0.623, 0.720e-3),
    (424.0, 380.0, 0.0603, 930.0, 2.6, 2.11e6, 4250.0, 0.68, 0.21e-3),
    (370.0, 350.0, 0.1, 585.0, 7.0, 776900.0, 2200.0, 0.091, 158.9e-6),  # ht's own hydrocarbon example
])
def test_nusselt_film_condensation_against_ht(t_sat, t_wall, d, rho_l, rho_v, h_fg, cp_l, k_l, mu_l):
    # ht.Nusselt_laminar is the vertical-plate form; with L = D and the tube constant it is the tube,
    # fed Rohsenow's corrected latent heat (Incropera & DeWitt eq. 10.35)
    h_fg_corrected = h_fg + 0.68 * cp_l * (t_sat - t_wall)
    expected = TUBE_OVER_PLATE * Nusselt_laminar(t_sat, t_wall, rho_v, rho_l, k_l, mu_l, h_fg_corrected, d)
    got = float(correlations.condensation_horizontal_tube(t_sat, t_wall, d, rho_l, rho_v, h_fg, cp_l, k_l, mu_l))
    assert got == pytest.approx(expected, rel=2e-4)  # ht uses g = 9.80665 too; the rest is round-off


def test_no_condensation_when_the_wall_is_at_or_above_saturation():
    # the decided behaviour (docstring): nothing condenses, coefficient 0, and the heat flux is
    # continuous through T_w = T_sat (h·ΔT -> 0 from the condensing side, no inf or NaN)
    args = dict(CENGEL)
    for t_wall in (313.15, 313.2, 350.0):
        args["T_wall_K"] = t_wall
        assert float(correlations.condensation_horizontal_tube(**args)) == 0.0
    args["T_wall_K"] = 313.15 - 1e-6
    h = float(correlations.condensation_horizontal_tube(**args))
    assert math.isfinite(h) and h * 1e-6 < 1.0  # W/m² (93 kW/m² at ΔT = 10 K): the flux vanishes as ΔT -> 0
    args["T_wall_K"] = 313.15 - 0.01  # above the 1 mK floor: the ΔT^(-1/4) law of the film itself
    h_small = float(correlations.condensation_horizontal_tube(**args))
    assert h_small / 9294.0 == pytest.approx((10.0 / 0.01) ** 0.25, rel=0.01)


@pytest.mark.parametrize("p_Pa, t_C", [
    # saturation temperatures from the steam tables (IAPWS-IF97, e.g. Rogers & Mayhew; from memory)
    (101_325.0, 99.97),
    (400_000.0, 143.61),
    (1_000_000.0, 179.88),
    (4_000_000.0, 250.35),
])
def test_saturation_temperature_against_steam_tables(p_Pa, t_C):
    assert steam.saturation_temperature_K(p_Pa) - 273.15 == pytest.approx(t_C, abs=0.02)
    assert float(steam.saturation_temperatures_K(np.array([p_Pa, p_Pa]))[1]) - 273.15 == pytest.approx(t_C, abs=0.02)


def _h_iapws(p_Pa, t_wall, d):
    """Hand calculation: IAPWS-IF97 properties (iapws) in ht's Nusselt equation, tube constant."""
    sat = IAPWS97(P=p_Pa / 1e6, x=0.0)
    vap = IAPWS97(P=p_Pa / 1e6, x=1.0)
    t_sat = sat.T
    film = IAPWS97(T=0.5 * (t_sat + t_wall), x=0.0)  # saturated liquid at the film temperature
    h_fg = (vap.h - sat.h) * 1e3
    h_fg_corrected = h_fg + 0.68 * film.cp * 1e3 * (t_sat - t_wall)
    return TUBE_OVER_PLATE * Nusselt_laminar(t_sat, t_wall, vap.rho, film.rho, film.k, film.mu, h_fg_corrected, d)


@pytest.mark.parametrize("p_Pa, dT, d", [
    (7_381.0, 10.0, 0.03),
    (200_000.0, 5.0, 0.0334),
    (500_000.0, 30.0, 0.0603),
    (1_000_000.0, 60.0, 0.1143),
    (4_000_000.0, 2.0, 0.2191),
])
def test_condensing_film_coefficient_against_an_iapws_hand_calculation(p_Pa, dT, d):
    t_sat = IAPWS97(P=p_Pa / 1e6, x=0.0).T
    expected = _h_iapws(p_Pa, t_sat - dT, d)
    got = float(steam.condensing_film_coefficient(p_Pa, np.array([t_sat - dT]), d)[0])
    assert got == pytest.approx(expected, rel=3e-3)  # IAPWS-IF97 against IAPWS-95 (CoolProp) properties


def test_condensing_film_coefficient_worked_example_with_real_properties():
    # Çengel's 9292 W/(m² K) (from memory) with table properties; ours use IAPWS-95 properties
    assert float(steam.condensing_film_coefficient(7381.0, 303.15, 0.03)) == pytest.approx(9292.0, rel=3e-3)


def test_condensate_film_reynolds_of_the_worked_example():
    # Çengel: 0.00360 kg/s per metre of tube; each side carries half, Re = 4(ṁ'/2)/μ_l with μ_l = 0.720e-3
    expected = 4.0 * (0.00360 / 2.0) / 0.720e-3
    got = float(steam.condensate_film_reynolds(7381.0, np.array([303.15]), 0.03)[0])
    assert got == pytest.approx(expected, rel=0.01)
    assert not correlations.out_of_range("film_condensation", Re_film=got)  # laminar (Re_δ < 1800)


def test_film_resistance_is_open_where_nothing_condenses():
    t_sat = steam.saturation_temperature_K(300_000.0)
    r = steam.condensate_film_resistance(300_000.0, np.array([t_sat - 10.0, t_sat + 5.0]), 0.0603)
    h = float(_h_iapws(300_000.0, t_sat - 10.0, 0.0603))
    assert r[0] == pytest.approx(1.0 / (h * math.pi * 0.0603), rel=3e-3)
    assert r[1] == math.inf


def test_saturated_water_table_against_coolprop_and_iapws():
    table = steam._SaturatedWater.get()
    fresh = steam._SaturatedWater.from_coolprop()  # the shipped file holds exactly what CoolProp gives
    assert np.array_equal(table.rows, fresh.rows)
    # between the knots, against IAPWS-IF97 (iapws): saturated liquid and vapour at x.5 K
    for t in (300.5, 350.5, 420.5, 480.5, 550.5):
        liq, vap = IAPWS97(T=t, x=0.0), IAPWS97(T=t, x=1.0)
        rho_l, cp_l, mu_l, k_l = (float(v) for v in table.liquid(t))
        rho_v, h_fg = (float(v) for v in table.vapour(t))
        assert rho_l == pytest.approx(liq.rho, rel=2e-4)
        assert cp_l == pytest.approx(liq.cp * 1e3, rel=2e-3)
        assert mu_l == pytest.approx(liq.mu, rel=2e-3)
        assert k_l == pytest.approx(liq.k, rel=3e-3)
        assert rho_v == pytest.approx(vap.rho, rel=2e-3)
        assert h_fg == pytest.approx((vap.h - liq.h) * 1e3, rel=1e-3)


@pytest.mark.parametrize("p_Pa", [100.0, 25e6, math.nan])
def test_steam_pressure_outside_water_is_refused_naming_the_field(p_Pa):
    with pytest.raises(InputError) as info:
        steam.condensing_film_coefficient(p_Pa, 300.0, 0.06)
    assert "steam_pressure_Pa" in str(info.value)


# --------------------------------------------------------------------------- tracers


def test_tracer_conductance_published_ranges():
    # published tracing-design values for one 1/2 in tracer (from memory; solver.steam docstring):
    # bare about 0.3–1.0 W/(m·K), in heat-transfer cement about 4–10 W/(m·K), cement roughly ten times bare
    bare = steam.tracer_conductance_W_per_mK("bare", 0.0127)
    cement = steam.tracer_conductance_W_per_mK("cement", 0.0127)
    assert 0.3 <= bare <= 1.0
    assert 4.0 <= cement <= 10.0
    assert 5.0 <= cement / bare <= 15.0
    # a 3/8 in tube has less surface and a narrower cement fillet than a 1/2 in one
    assert steam.tracer_conductance_W_per_mK("bare", 0.009525) < bare


def test_tracer_heat_follows_the_pipe_temperature_and_never_cools():
    p = 450_000.0
    t_sat = steam.saturation_temperature_K(p)  # 147.9 °C (steam tables, from memory)
    assert t_sat - 273.15 == pytest.approx(147.9, abs=0.1)
    g = 2 * steam.tracer_conductance_W_per_mK("cement", 0.0127)
    q = steam.tracer_heat_W_per_m(p, 2, "cement", 0.0127, np.array([t_sat - 50.0, t_sat - 10.0, t_sat + 5.0]))
    assert q[0] == pytest.approx(g * 50.0)
    assert q[1] == pytest.approx(g * 10.0)
    assert q[2] == 0.0


def test_tracer_contact_must_be_known():
    with pytest.raises(InputError) as info:
        steam.tracer_conductance_W_per_mK("glued", 0.0127)
    assert "contact" in str(info.value)


# --------------------------------------------------------------------------- fouling


def test_fouling_hints_agree_with_the_tema_values_incropera_reprints():
    # Incropera & DeWitt, Table 11.1 (from TEMA; from memory): steam (non-oil-bearing) 0.0001 m²K/W,
    # fuel oil 0.0009, sea water below 50 °C 0.0001, refrigerant liquids 0.0002
    by_service = {h.service: h for h in fouling_hints()}
    assert by_service["Steam, clean (oil-free)"].typical_m2K_per_W == pytest.approx(0.0001, rel=0.15)
    assert by_service["Heavy fuel oil no. 6"].typical_m2K_per_W == pytest.approx(0.0009, rel=0.15)
    assert by_service["Sea water"].typical_m2K_per_W == pytest.approx(0.0001, rel=0.15)
    assert by_service["Refrigerant liquid"].typical_m2K_per_W == pytest.approx(0.0002, rel=0.15)
    for h in fouling_hints():
        assert h.low_m2K_per_W <= h.typical_m2K_per_W <= h.high_m2K_per_W, h.service


def test_saturation_temperature_against_iapws_over_the_range():
    # IAPWS-IF97 (iapws) against the table's IAPWS-95 values: the two formulations agree to a few mK
    p = np.geomspace(1_000.0, 20e6, 60)
    expected = np.array([IAPWS97(P=x / 1e6, x=0.0).T for x in p])
    assert np.max(np.abs(steam.saturation_temperatures_K(p) - expected)) < 0.015
