"""Checks of solver.correlations against published values, closed forms and reference libraries.

Reference libraries (fluids, ht) are imported here only; the solver never imports them.
"""

from __future__ import annotations

import math
import warnings

import numpy as np
import pytest
from fluids.friction import Churchill_1977, Colebrook
from ht.conduction import R_cylinder
from ht.conv_external import Nu_cylinder_Churchill_Bernstein
from ht.conv_free_immersed import Nu_horizontal_cylinder_Churchill_Chu
from ht.conv_internal import turbulent_Gnielinski
from ht.core import wall_factor, wall_factor_Nu

from solver import InputError
from solver import correlations as corr


# ----------------------------------------------------------------------------- friction


def test_colebrook_matches_fluids_over_moody_range():
    # Reference: fluids.friction.Colebrook (exact Lambert-W solution, numerical fallback).
    Re, eD = np.meshgrid(np.logspace(np.log10(4e3), 8, 41), np.r_[0.0, np.logspace(-7, np.log10(0.05), 25)])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)  # fluids' own overflow fallback at high Re·eD
        reference = np.vectorize(Colebrook)(Re, eD)
    ours = corr.colebrook(Re, eD)
    assert ours.shape == Re.shape
    np.testing.assert_allclose(ours, reference, rtol=1e-9, atol=0)


def test_colebrook_solves_its_own_equation():
    # Closed form: the Colebrook (1939) equation itself, 1/sqrt(f) = -2 log10(eD/3.7 + 2.51/(Re sqrt(f))).
    Re = np.logspace(np.log10(4e3), 8, 200)[:, None]
    eD = np.array([0.0, 1e-6, 1e-4, 1e-3, 1e-2, 0.05])[None, :]
    f = corr.colebrook(Re, eD)
    residual = 1 / np.sqrt(f) + 2 * np.log10(eD / 3.7 + 2.51 / (Re * np.sqrt(f)))
    assert np.max(np.abs(residual) * np.sqrt(f)) < 1e-12


def test_colebrook_published_example():
    # fluids documentation example: Colebrook(1E5, 1E-4) = 0.018513866077471.
    assert corr.colebrook(1e5, 1e-4) == pytest.approx(0.018513866077471, rel=1e-12)


def test_friction_factor_laminar_is_64_over_re():
    # Closed form: Hagen–Poiseuille, f = 64/Re.
    Re = np.array([1.0, 10.0, 500.0, 2000.0, 2300.0])
    np.testing.assert_allclose(corr.friction_factor(Re, 1e-3), 64.0 / Re, rtol=1e-15)


def test_friction_factor_turbulent_is_colebrook():
    # Reference: fluids.friction.Colebrook, also where a line mixes regimes.
    eD = 2e-4
    Re = np.array([4000.0, 1e4, 3e6])
    np.testing.assert_allclose(corr.friction_factor(Re, eD), [Colebrook(r, eD) for r in Re], rtol=1e-9)
    mixed = corr.friction_factor(np.array([1000.0, 3000.0, 4000.0, 1e5]), eD)
    assert mixed[0] == 0.064 and mixed[2] == pytest.approx(Colebrook(4000.0, eD), rel=1e-9)
    assert mixed[3] == pytest.approx(Colebrook(1e5, eD), rel=1e-9)


@pytest.mark.parametrize("eD", [0.0, 1e-4, 1e-3, 1e-2, 0.05])
def test_friction_transition_follows_churchill_1977(eD):
    # Reference: fluids.friction.Churchill_1977. From Re = 2500 to 4000 within 2 % of it for ε/D <= 1e-3 and 3 %
    # above (Colebrook at 4000 lies up to 3 % below Churchill); at Re = 2500 Churchill itself. From 2300 the
    # value rises from Hagen–Poiseuille's 64/2300 onto Churchill's curve, which lies 10.8 % above 64/2300 there.
    Re = np.linspace(2500.0, 4000.0, 61)
    reference = np.array([Churchill_1977(r, eD) for r in Re])
    np.testing.assert_allclose(corr.friction_factor(Re, eD), reference, rtol=0.02 if eD <= 1e-3 else 0.03)
    assert corr.friction_factor(2500.0, eD) == pytest.approx(Churchill_1977(2500.0, eD), rel=1e-9)
    # the regimes meet without a step: 64/Re (Hagen–Poiseuille) at 2300, fluids' Colebrook at 4000
    assert corr.friction_factor(np.nextafter(2300.0, 3000.0), eD) == pytest.approx(64 / 2300, rel=1e-9)
    assert corr.friction_factor(np.nextafter(4000.0, 0.0), eD) == pytest.approx(Colebrook(4000.0, eD), rel=1e-9)
    between = corr.friction_factor(np.linspace(2300.0, 2500.0, 21), eD)
    assert np.all(np.diff(between) > 0)  # rising onto Churchill's curve, as the flow leaves the laminar state


def test_friction_transition_on_a_line_of_mixed_roughness():
    # A line whose segments differ in roughness, its cells in the transition band: each cell on the curve of its own
    # roughness. References: Hagen–Poiseuille 64/Re at 2300, fluids' Colebrook at 4000, fluids' Churchill_1977 in
    # between; the fades are linear in the scale on Churchill (friction_factor's docstring), so at 2400 the scale is
    # the mean of 1 and (64/2300)/Churchill(2300), at 3250 the mean of 1 and Colebrook(4000)/Churchill(4000).
    rough = [1e-4, 1e-2]
    eD = np.array(rough * 4)
    Re = np.repeat([np.nextafter(2300.0, 3000.0), 2400.0, 3250.0, np.nextafter(4000.0, 0.0)], 2)
    expected = [64 / 2300] * 2
    expected += [Churchill_1977(2400.0, e) * (1 + 0.5 * ((64 / 2300) / Churchill_1977(2300.0, e) - 1)) for e in rough]
    expected += [Churchill_1977(3250.0, e) * (1 + 0.5 * (Colebrook(4000.0, e) / Churchill_1977(4000.0, e) - 1))
                 for e in rough]
    expected += [Colebrook(4000.0, e) for e in rough]
    np.testing.assert_allclose(corr.friction_factor(Re, eD), expected, rtol=1e-6)


def test_friction_factor_rejects_non_positive_reynolds():
    with pytest.raises(ValueError, match="Re"):
        corr.friction_factor(np.array([1000.0, 0.0]), 0.0)
    with pytest.raises(InputError, match="relative_roughness"):
        corr.friction_factor(5000.0, -1e-4)


def test_flow_regime_codes():
    # Regime limits 2300 and 1e4 as used by Gnielinski (1995) / VDI Heat Atlas G1.
    regime = corr.flow_regime(np.array([100.0, 2300.0, 2300.1, 9999.0, 1e4, 1e6]))
    assert regime.tolist() == [0, 0, 1, 1, 2, 2]


# ----------------------------------------------------------------------------- laminar entry


@pytest.mark.parametrize("boundary, limit", [("T", 3.657), ("q", 4.364)])
def test_laminar_tends_to_fully_developed_limits(boundary, limit):
    # Shah & London (1978): fully developed Nu = 3.657 (uniform wall T), 48/11 = 4.364 (uniform flux).
    Nu = corr.nusselt_laminar(1000.0, 7.0, np.array([1e9, 1e12, np.inf]), boundary)
    np.testing.assert_allclose(Nu, limit, rtol=2e-3)
    assert corr.nusselt_laminar(1000.0, 7.0, np.inf, boundary) == pytest.approx(limit, rel=1e-4)


@pytest.mark.parametrize("boundary", ["T", "q"])
@pytest.mark.parametrize("Pr", [0.7, 7.0, 500.0])
@pytest.mark.parametrize("developing", [True, False])
def test_laminar_mean_falls_with_length(boundary, Pr, developing):
    # Physics of the entry region (Shah & London 1978): the mean Nusselt number over [0, L] falls
    # monotonically as L grows, towards the fully developed value.
    L_over_D = np.logspace(-3, 6, 400)
    Nu = corr.nusselt_inside_mean(1500.0, Pr, 64 / 1500, 0.0, L_over_D, boundary, developing=developing)
    assert np.all(np.diff(Nu) < 0)
    assert Nu[-1] == pytest.approx(3.657 if boundary == "T" else 48 / 11, rel=0.01)


def test_laminar_thermal_entry_table_values():
    # Kays & Crawford, Convective Heat and Mass Transfer, Graetz solution tables (from memory),
    # x+ = 2x/(D Re Pr): uniform wall T x+ = 0.001 -> 12.86, 0.01 -> 5.99; uniform flux x+ = 0.01 -> 7.49.
    # Local values of the VDI mean-value equation (thermal entry only): within 1.2 %; tolerance 2 %.
    Re, Pr = 1000.0, 1.0
    x_over_D = lambda x_plus: x_plus / 2 * Re * Pr  # noqa: E731
    assert corr.nusselt_laminar(Re, Pr, x_over_D(0.001), "T", developing=False) == pytest.approx(12.86, rel=0.02)
    assert corr.nusselt_laminar(Re, Pr, x_over_D(0.01), "T", developing=False) == pytest.approx(5.99, rel=0.02)
    assert corr.nusselt_laminar(Re, Pr, x_over_D(0.01), "q", developing=False) == pytest.approx(7.49, rel=0.02)


def test_laminar_simultaneous_entry_exceeds_thermal_entry():
    # A developing velocity profile raises heat transfer near the inlet (Shah & London 1978):
    # at Pr = 0.7 the local Nu must exceed the thermal-entry value at the same x*; far down they agree.
    Re, Pr = 1000.0, 0.7
    x_over_D = np.array([1e-3, 1e-2]) * Re * Pr
    for boundary in ("T", "q"):
        simultaneous = corr.nusselt_laminar(Re, Pr, x_over_D, boundary)
        thermal_only = corr.nusselt_laminar(Re, Pr, x_over_D, boundary, developing=False)
        assert np.all(simultaneous > thermal_only)
        assert corr.nusselt_laminar(Re, Pr, 1e7, boundary) == pytest.approx(
            float(corr.nusselt_laminar(Re, Pr, 1e7, boundary, developing=False)), rel=1e-3)


def test_laminar_clips_zero_and_rejects_negative_x():
    # x = 0 is clipped to X_OVER_D_MIN (documented); a negative distance is an input error.
    at_zero = corr.nusselt_laminar(1000.0, 5.0, 0.0, "T")
    at_min = corr.nusselt_laminar(1000.0, 5.0, corr.X_OVER_D_MIN, "T")
    assert np.isfinite(at_zero) and at_zero == at_min
    with pytest.raises(ValueError, match="x_over_D"):
        corr.nusselt_laminar(1000.0, 5.0, np.array([1.0, -2.0]), "T")
    with pytest.raises(ValueError, match="boundary"):
        corr.nusselt_laminar(1000.0, 5.0, 1.0, "wall")


# ----------------------------------------------------------------------------- turbulent and transition


def test_gnielinski_matches_ht():
    # Reference: ht.conv_internal.turbulent_Gnielinski(Re, Pr, fd).
    rng = np.random.default_rng(7)
    Re = rng.uniform(3e3, 5e6, 300)
    Pr = 10 ** rng.uniform(np.log10(0.5), np.log10(2000), 300)
    fd = corr.friction_factor(Re, 1e-4)
    reference = np.array([turbulent_Gnielinski(r, p, f) for r, p, f in zip(Re, Pr, fd)])
    np.testing.assert_allclose(corr.nusselt_gnielinski(Re, Pr, fd), reference, rtol=1e-10)
    # ht documentation example: turbulent_Gnielinski(Re=1E5, Pr=1.2, fd=0.0185) = 254.62682749359632.
    assert corr.nusselt_gnielinski(1e5, 1.2, 0.0185) == pytest.approx(254.62682749359632, rel=1e-12)
    # 10 bores from the inlet: ht's value times the local entrance factor 1 + ⅓(D/x)^(2/3) (VDI G1's mean factor
    # 1 + (D/x)^(2/3) differentiated).
    local = corr.nusselt_gnielinski(1e5, 1.2, 0.0185, np.array([10.0, 1e3]))
    np.testing.assert_allclose(local, 254.62682749359632 * (1 + np.array([10.0, 1e3]) ** (-2 / 3) / 3), rtol=1e-12)


@pytest.mark.parametrize("boundary, laminar", [("T", 3.657), ("q", 48 / 11)])
@pytest.mark.parametrize("eD", [0.0, 1e-3])
def test_transition_blend_follows_gnielinski_1995(boundary, laminar, eD):
    # Gnielinski (1995): Nu = (1-γ) Nu_lam(2300) + γ Nu_turb(1e4), γ = (Re - 2300)/7700, for fully developed flow:
    # laminar end Shah & London (1978), turbulent end ht's Gnielinski with fluids' Colebrook at Re = 1e4.
    # The ends meet the neighbouring regimes (the friction given is ignored below 1e4).
    Pr = np.array([0.7, 5.0, 80.0])
    turbulent = np.array([turbulent_Gnielinski(1e4, p, Colebrook(1e4, eD)) for p in Pr])
    for Re, gamma in ((np.nextafter(2300.0, 3000.0), 0.0), (6150.0, 0.5), (np.nextafter(1e4, 0.0), 1.0)):
        Nu = corr.nusselt_inside(Re, Pr, 0.5, np.inf, boundary, relative_roughness=eD)
        np.testing.assert_allclose(Nu, (1 - gamma) * laminar + gamma * turbulent, rtol=2e-4)


def test_nusselt_inside_turbulent_uses_given_friction_and_broadcasts():
    # Turbulent branch = Gnielinski (ht reference) times the VDI local entrance factor.
    Re = np.array([1e4, 2e5, 3e6])
    Pr = 6.5
    fd = np.array([0.031, 0.016, 0.0105])
    x_over_D = 125.0
    expected = np.array([turbulent_Gnielinski(r, Pr, f) for r, f in zip(Re, fd)]) * (
        1 + (1 / 3) * (1 / x_over_D) ** (2 / 3)
    )
    np.testing.assert_allclose(corr.nusselt_inside(Re, Pr, fd, x_over_D, "q"), expected, rtol=1e-10)
    # Mixed scalar/array inputs broadcast; a 2-D grid keeps its shape.
    grid = corr.nusselt_inside(np.array([[500.0], [5e3], [5e4]]), np.array([1.0, 10.0]), 0.02, 50.0, "T")
    assert grid.shape == (3, 2)
    assert np.all(np.isfinite(grid))


def test_a_line_spanning_transition_and_turbulence():
    # One call for a line whose cells run from the transition band into turbulent flow (a heated oil thinning along
    # the line): each cell as in its own regime. Turbulent cells: ht's Gnielinski with the friction given (fluids'
    # Colebrook) and ht's (Pr_b/Pr_w)^0.11; the transition cell: Gnielinski's (1995) blend, γ = 0.5 at Re = 6150,
    # of Shah & London's 4.364 and ht's Gnielinski at 1e4 with Colebrook(1e4).
    eD, Pr = 1e-4, 5.0
    Re = np.array([6150.0, 5e4, 2e5])
    fd = np.array([Colebrook(r, eD) for r in Re])
    nu = corr.nusselt_inside_mean(Re, Pr, fd, np.inf, np.inf, "q", eD)
    expected = [0.5 * 48 / 11 + 0.5 * turbulent_Gnielinski(1e4, Pr, Colebrook(1e4, eD))]
    expected += [turbulent_Gnielinski(r, Pr, f) for r, f in zip(Re[1:], fd[1:])]
    np.testing.assert_allclose(nu, expected, rtol=2e-4)
    factor = corr.wall_property_factor(Re[1:], np.array([5.0, 5.0]), np.array([2.5, 2.5]), 1e-3, 1e-3, None, None, False)
    turbulent = wall_factor(Pr=5.0, Pr_wall=2.5, property_option="Prandtl", Pr_heating_coeff=0.11, Pr_cooling_coeff=0.11)
    mixed = corr.wall_property_factor(np.array([6150.0, 5e4]), 5.0, 2.5, 1e-3, 1e-3, None, None, False)
    np.testing.assert_allclose(factor, turbulent, rtol=1e-12)
    assert mixed[1] == pytest.approx(turbulent, rel=1e-12)


def test_fully_developed_laminar_cells_on_their_own():
    # Cells that are all fully developed (x0 = x1 = inf, no finite zero-length cell among them): Shah & London's
    # (1978) 3.657 (uniform wall temperature) and 48/11 (uniform heat flux), not NaN from inf − inf.
    for boundary, limit in (("T", 3.657), ("q", 48 / 11)):
        assert corr.nusselt_inside_mean(1000.0, 5.0, 0.064, np.inf, np.inf, boundary) == pytest.approx(limit, rel=1e-12)
        np.testing.assert_allclose(corr.nusselt_inside_mean(1000.0, 5.0, 0.064, np.full(3, np.inf), np.full(3, np.inf),
                                                            boundary), limit, rtol=1e-12)


# ----------------------------------------------------------------------------- property-ratio correction


def test_property_factor_liquids_match_ht():
    # Laminar: Sieder & Tate (μ_b/μ_w)^0.14, the exponent Kays & Crawford give (ht.wall_factor_Nu, laminar liquid).
    # Turbulent: Gnielinski / VDI G1 (Pr_b/Pr_w)^0.11 for heating and cooling (ht.wall_factor, Prandtl option).
    mu_b = np.array([2e-3, 9e-3, 1e-3, 1e-3])
    mu_w = np.array([1e-3, 1e-3, 2e-3, 4e-3])
    laminar = corr.wall_property_factor(1000.0, None, None, mu_b, mu_w, None, None, False)
    np.testing.assert_allclose(laminar, [wall_factor_Nu(b, w, turbulent=False, liquid=True) for b, w in zip(mu_b, mu_w)],
                               rtol=1e-12)
    # the viscous oil of the example: μ_b/μ_w = 9 gives 9^0.14 = 1.360 (hand value)
    assert laminar[1] == pytest.approx(1.3602, abs=1e-4)
    Pr_b = np.array([5.0, 80.0, 3.0])
    Pr_w = np.array([2.5, 20.0, 6.0])
    turbulent = corr.wall_property_factor(5e4, Pr_b, Pr_w, 1e-3, 1e-3, None, None, False)
    expected = [wall_factor(Pr=b, Pr_wall=w, property_option="Prandtl", Pr_heating_coeff=0.11, Pr_cooling_coeff=0.11)
                for b, w in zip(Pr_b, Pr_w)]
    np.testing.assert_allclose(turbulent, expected, rtol=1e-12)


def test_property_factor_gases_match_ht():
    # Turbulent: VDI Heat Atlas G1 (T_b/T_w)^0.45 (ht.wall_factor, temperature option with that exponent);
    # laminar: none, Kays & Crawford's exponent 0 (ht.wall_factor_Nu, laminar gas, gives 1).
    T_b = np.array([300.0, 500.0, 400.0])
    T_w = np.array([400.0, 400.0, 300.0])
    turbulent = corr.wall_property_factor(5e4, None, None, None, None, T_b, T_w, True)
    expected = [wall_factor(T=b, T_wall=w, property_option="Temperature", T_heating_coeff=0.45, T_cooling_coeff=0.45)
                for b, w in zip(T_b, T_w)]
    np.testing.assert_allclose(turbulent, expected, rtol=1e-12)
    laminar = corr.wall_property_factor(1500.0, None, None, None, None, T_b, T_w, True)
    np.testing.assert_allclose(laminar, wall_factor_Nu(1.5e-5, 1.3e-5, turbulent=False, liquid=False), rtol=0)


def test_property_factor_holds_at_the_published_range_and_flags_beyond():
    # Sieder & Tate's data reach μ_b/μ_w = 9.75 (Incropera, from memory): an oil at 18 gets 9.75^0.14 = 1.376,
    # not 18^0.14 = 1.499, and VALIDITY flags it; the gas ratio is held at 1.5 (VDI G1).
    factor = corr.wall_property_factor(800.0, None, None, 18.0, 1.0, None, None, False)
    assert factor == pytest.approx(wall_factor_Nu(9.75, 1.0, turbulent=False, liquid=True), rel=1e-12)
    assert corr.out_of_range("property_ratio_liquid", mu_ratio=18.0)
    hot_gas = corr.wall_property_factor(5e4, None, None, None, None, 900.0, 300.0, True)
    assert hot_gas == pytest.approx(1.5**0.45, rel=1e-12)
    assert corr.out_of_range("property_ratio_gas", T_ratio=3.0)


def test_property_factor_in_transition_and_mixed_lines():
    # Transition: weighted like Gnielinski's (1995) Nusselt blend, so the factor meets the laminar value (ht, laminar
    # liquid) at Re = 2300 and the turbulent one (ht, Prandtl 0.11) at 1e4; a line of gas and liquid cells
    # (a two-fluid comparison) gets each cell's own correction.
    laminar = wall_factor_Nu(3e-3, 1e-3, turbulent=False, liquid=True)
    turbulent = wall_factor(Pr=30.0, Pr_wall=10.0, property_option="Prandtl", Pr_heating_coeff=0.11,
                            Pr_cooling_coeff=0.11)
    Re = np.array([2300.0, 6150.0, 1e4])
    factor = corr.wall_property_factor(Re, 30.0, 10.0, 3e-3, 1e-3, None, None, False)
    np.testing.assert_allclose(factor, [laminar, 0.5 * (laminar + turbulent), turbulent], rtol=1e-12)
    gas = np.array([True, False])
    mixed = corr.wall_property_factor(np.array([5e4, 5e4]), 30.0, 10.0, 3e-3, 1e-3, 300.0, 400.0, gas)
    np.testing.assert_allclose(mixed, [0.75**0.45, turbulent], rtol=1e-12)
    mixed_laminar = corr.wall_property_factor(np.array([900.0, 900.0]), 30.0, 10.0, 3e-3, 1e-3, 300.0, 400.0, gas)
    np.testing.assert_allclose(mixed_laminar, [1.0, laminar], rtol=1e-12)
    with pytest.raises(ValueError, match="T_bulk_K"):
        corr.wall_property_factor(5e4, None, None, None, None, None, 400.0, True)


# ----------------------------------------------------------------------------- outside


def test_churchill_chu_matches_ht():
    # Reference: ht.conv_free_immersed.Nu_horizontal_cylinder_Churchill_Chu(Pr, Gr), Ra = Gr·Pr.
    Pr = np.array([0.69, 0.71, 5.0, 100.0, 0.02])
    Gr = np.array([2.63e9, 1e3, 1e6, 10.0, 1e8])
    reference = np.array([Nu_horizontal_cylinder_Churchill_Chu(p, g) for p, g in zip(Pr, Gr)])
    np.testing.assert_allclose(corr.nusselt_churchill_chu_cylinder(Gr * Pr, Pr), reference, rtol=1e-12)
    # Incropera Example 9.2 (as in ht's docs): Pr = 0.69, Gr = 2.63e9 -> Nu = 139.13493970073597.
    assert corr.nusselt_churchill_chu_cylinder(0.69 * 2.63e9, 0.69) == pytest.approx(139.13493970073597, rel=1e-12)


def test_churchill_bernstein_matches_ht():
    # Reference: ht.conv_external.Nu_cylinder_Churchill_Bernstein(Re, Pr).
    Re = np.array([1.0, 40.0, 6071.0, 1e5, 5e6])
    Pr = np.array([0.7, 0.71, 0.7, 7.0, 300.0])
    reference = np.array([Nu_cylinder_Churchill_Bernstein(r, p) for r, p in zip(Re, Pr)])
    np.testing.assert_allclose(corr.nusselt_churchill_bernstein(Re, Pr), reference, rtol=1e-12)
    # Incropera Example 7.3 (as in ht's docs): Re = 6071, Pr = 0.7 -> Nu = 40.63708594124974.
    assert corr.nusselt_churchill_bernstein(6071.0, 0.7) == pytest.approx(40.63708594124974, rel=1e-12)


def test_mixed_convection_cube_sum():
    # Churchill (1977): Nu = (Nu_F^3 + Nu_N^3)^(1/3); 3-4-5-like check: (3^3 + 4^3)^(1/3) = 91^(1/3).
    assert corr.nusselt_mixed(3.0, 4.0) == pytest.approx(91 ** (1 / 3), rel=1e-14)
    np.testing.assert_allclose(corr.nusselt_mixed(np.array([0.0, 7.0]), np.array([5.0, 0.0])), [5.0, 7.0])


def test_radiation_coefficient_reproduces_fourth_power_law():
    # Closed form: h_r (Ts - T∞) = ε σ (Ts^4 - T∞^4), σ = 5.670374419e-8 W/m²K⁴ (CODATA 2018).
    Ts = np.array([350.0, 500.0, 900.0])
    Tinf = 293.15
    eps = 0.8
    h_r = corr.radiation_coefficient(Ts, Tinf, eps)
    np.testing.assert_allclose(h_r * (Ts - Tinf), eps * 5.670374419e-8 * (Ts**4 - Tinf**4), rtol=1e-13)
    with pytest.raises(ValueError, match="emissivity"):
        corr.radiation_coefficient(350.0, 293.15, 1.2)


def test_cylinder_wall_resistance_matches_ht():
    # Reference: ht.conduction.R_cylinder(Di, Do, k, L) for 1 m of NPS 2 sch 40 steel, bore 52.48 mm,
    # OD 60.3 mm (ASME B36.10M), k = 45 W/mK: 4.9126e-4 K m/W.
    R = corr.cylinder_wall_resistance(0.05248, 0.0603, 45.0)
    assert R == pytest.approx(R_cylinder(0.05248, 0.0603, 45.0, 1.0), rel=1e-12)
    assert corr.cylinder_wall_resistance(0.1, 0.1, 1.0) == 0.0
    with pytest.raises(ValueError, match="D_outer_m"):
        corr.cylinder_wall_resistance(0.1, 0.09, 1.0)


def test_buried_cylinder_resistance_closed_form():
    # Incropera Table 4.1, case 2: S' = 2π/cosh⁻¹(2z/D). Hand computation for D = 0.2 m, z = 1.0 m,
    # k = 1.2 W/mK: cosh⁻¹(10) = ln(10 + √99) = 2.99322284612638; R' = 2.99322.../(2π·1.2).
    expected = math.log(10 + math.sqrt(99)) / (2 * math.pi * 1.2)
    assert corr.buried_cylinder_resistance(0.2, 1.0, 1.2) == pytest.approx(expected, rel=1e-14)
    assert expected == pytest.approx(0.39698, rel=1e-4)  # hand value 2.99322/7.53982
    # Deep burial: cosh⁻¹(2z/D) -> ln(4z/D) (closed-form asymptote).
    assert corr.buried_cylinder_resistance(0.1, 100.0, 1.0) == pytest.approx(
        math.log(4 * 100.0 / 0.1) / (2 * math.pi), rel=1e-7
    )


def test_buried_cylinder_too_shallow_raises():
    with pytest.raises(ValueError) as info:
        corr.buried_cylinder_resistance(0.3, 0.15, 1.0)
    message = str(info.value)
    assert "depth_m" in message and "0.15" in message and "0.3" in message
    assert isinstance(info.value, InputError)


# ----------------------------------------------------------------------------- validity and citations


def test_out_of_range_masks():
    # Published ranges: Gnielinski (1976) 2300 < Re < 5e6, 0.5 < Pr < 2000; Churchill & Chu Ra <= 1e12;
    # Churchill & Bernstein Re·Pr >= 0.2.
    mask = corr.out_of_range("gnielinski", Re=np.array([1e3, 1e4, 1e4, 1e7]), Pr=np.array([1.0, 1.0, 0.1, 1.0]))
    assert mask.tolist() == [True, False, True, True]
    assert corr.out_of_range("churchill_chu", Ra=np.array([1e3, 1e13])).tolist() == [False, True]
    assert corr.out_of_range("churchill_bernstein", RePr=np.array([0.1, 0.2, 1e6])).tolist() == [True, False, False]
    assert corr.out_of_range("colebrook", Re=np.nan)
    with pytest.raises(ValueError, match="method"):
        corr.out_of_range("dittus", Re=1e4)
    with pytest.raises(ValueError, match="Gr"):
        corr.out_of_range("churchill_chu", Gr=1e4)


# Published ranges, one row per correlation the solver uses: (method, group, low, high, source).
PUBLISHED_RANGES = [
    ("colebrook", "relative_roughness", 0.0, 0.05, "Moody (1944) chart, the span Colebrook's equation is used over"),
    ("colebrook", "Re", 4000.0, 1e8, "Moody (1944) chart"),
    ("gnielinski", "Re", 2300.0, 5e6, "Gnielinski (1976), as quoted in VDI Heat Atlas G1"),
    ("gnielinski", "Pr", 0.5, 2000.0, "Gnielinski (1976)"),
    ("laminar_entry", "Re", 0.0, 2300.0, "laminar flow (VDI Heat Atlas G1)"),
    ("laminar_entry", "Pr", 0.1, 1000.0, "VDI Heat Atlas G1 (from memory)"),
    ("laminar_friction", "Re", 0.0, 2300.0, "laminar flow, common practice"),
    ("transition_blend", "Re", 2300.0, 1e4, "Gnielinski (1995)"),
    ("churchill_chu", "Ra", 1e-5, 1e12, "Churchill & Chu (1975); upper limit Incropera & DeWitt"),
    ("churchill_bernstein", "RePr", 0.2, math.inf, "Churchill & Bernstein (1977)"),
    ("dew_point", "T_air_K", 233.15, 323.15, "Alduchov & Eskridge (1996): -40 to 50 °C over water"),
    ("property_ratio_liquid", "mu_ratio", 0.0044, 9.75, "Sieder & Tate (1936) as quoted by Incropera (from memory)"),
    ("property_ratio_liquid", "Pr_ratio", 0.1, 10.0, "Gnielinski (1976) / VDI Heat Atlas G1 (from memory)"),
    ("property_ratio_gas", "T_ratio", 0.5, 1.5, "VDI Heat Atlas G1"),
]


@pytest.mark.parametrize("method, group, low, high, source", PUBLISHED_RANGES)
def test_validity_ranges_are_the_published_ones(method, group, low, high, source):
    # Inside the published range nothing is flagged; just outside it the cell is flagged (source in the row).
    inside = [low, high] if math.isfinite(high) else [low, 10 * low + 1]
    assert not corr.out_of_range(method, **{group: np.array(inside)}).any(), source
    outside = [low * (1 - 1e-6) - 1e-12] + ([high * (1 + 1e-6)] if math.isfinite(high) else [])
    assert corr.out_of_range(method, **{group: np.array(outside)}).all(), source


def test_module_imports_no_reference_library_or_qt():
    # Design rule: the solver module uses numpy only (fluids/ht are test references; no Qt, no pydantic).
    import ast
    import inspect

    tree = ast.parse(inspect.getsource(corr))
    imported = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            imported.update(alias.name.split(".")[0] for alias in node.names)
        elif isinstance(node, ast.ImportFrom) and node.module:
            imported.add(node.module.split(".")[0])
    assert imported.isdisjoint({"fluids", "ht", "PySide6", "pyqtgraph", "pydantic", "scipy", "app"})
