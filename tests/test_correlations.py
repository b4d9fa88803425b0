"""Checks of solver.correlations against published values, closed forms and reference libraries.

Reference libraries (fluids, ht) are imported here only; the solver never imports them.
"""

from __future__ import annotations

import math
import warnings

import numpy as np
import pytest
from fluids.friction import Colebrook
from ht.conv_external import Nu_cylinder_Churchill_Bernstein
from ht.conv_free_immersed import Nu_horizontal_cylinder_Churchill_Chu
from ht.conv_internal import turbulent_Gnielinski

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


def test_friction_factor_turbulent_is_colebrook_and_bridge_is_linear():
    # Turbulent branch equals fluids' Colebrook; the bridge is linear in Re between
    # 64/2300 and Colebrook(4000) (our documented engineering bridge).
    eD = 2e-4
    for Re in (4000.0, 1e4, 3e6):
        assert corr.friction_factor(Re, eD) == pytest.approx(Colebrook(Re, eD), rel=1e-9)
    f_low, f_high = 64.0 / 2300.0, Colebrook(4000.0, eD)
    Re = np.array([2300.0, 2700.0, 3150.0, 3999.0, 4000.0])
    expected = f_low + (Re - 2300.0) / 1700.0 * (f_high - f_low)
    np.testing.assert_allclose(corr.friction_factor(Re, eD), expected, rtol=1e-9)


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
def test_laminar_decreases_along_the_pipe(boundary, Pr):
    # Physics of the entry region (Shah & London 1978): local Nu falls monotonically with x.
    x_over_D = np.logspace(-3, 6, 400)
    Nu = corr.nusselt_laminar(1500.0, Pr, x_over_D, boundary)
    assert np.all(np.diff(Nu) < 0)


def _shah_london_local_T(x_star):
    # Shah & London (1978) local Nusselt number, thermal entry (Graetz problem), uniform wall T,
    # x* = x/(D Re Pr); as reproduced in Lienhard, A Heat Transfer Textbook, Eq. 7.28 (from memory).
    return np.where(
        x_star <= 1e-3, 1.077 * x_star ** (-1 / 3) - 0.7, 3.657 + 6.874 * (1e3 * x_star) ** -0.488 * np.exp(-57.2 * x_star)
    )


def _shah_london_local_q(x_star):
    # Shah & London (1978) local Nusselt number, thermal entry, uniform heat flux (from memory).
    return np.where(
        x_star <= 5e-5,
        1.302 * x_star ** (-1 / 3) - 1.0,
        np.where(
            x_star <= 1.5e-3,
            1.302 * x_star ** (-1 / 3) - 0.5,
            4.364 + 8.68 * (1e3 * x_star) ** -0.506 * np.exp(-41.0 * x_star),
        ),
    )


@pytest.mark.parametrize("boundary, reference", [("T", _shah_london_local_T), ("q", _shah_london_local_q)])
def test_laminar_thermal_entry_matches_shah_london(boundary, reference):
    # With a very large Pr the velocity profile is developed and the VDI equation reduces to the
    # thermal-entry (Graetz) problem. Short entry (x* <= 5e-3): within 2 %; further down, the
    # superposition overshoots by up to ~6 % near x* = 0.05 (VDI G1 states a few per cent).
    Re, Pr = 1000.0, 1e8
    x_star = np.array([1e-4, 3e-4, 1e-3, 2e-3, 5e-3])
    Nu = corr.nusselt_laminar(Re, Pr, x_star * Re * Pr, boundary)
    np.testing.assert_allclose(Nu, reference(x_star), rtol=0.02)
    x_star = np.array([1e-2, 2e-2, 5e-2, 0.1, 0.3])
    Nu = corr.nusselt_laminar(Re, Pr, x_star * Re * Pr, boundary)
    np.testing.assert_allclose(Nu, reference(x_star), rtol=0.06)


def test_laminar_thermal_entry_table_values():
    # Kays & Crawford, Convective Heat and Mass Transfer, Graetz solution tables (from memory),
    # x+ = 2x/(D Re Pr): uniform wall T x+ = 0.001 -> 12.86, 0.01 -> 5.99;
    # uniform flux x+ = 0.01 -> 7.49. Tolerance 2 % (accuracy of the superposition).
    Re, Pr = 1000.0, 1e8
    x_over_D = lambda x_plus: x_plus / 2 * Re * Pr  # noqa: E731
    assert corr.nusselt_laminar(Re, Pr, x_over_D(0.001), "T") == pytest.approx(12.86, rel=0.02)
    assert corr.nusselt_laminar(Re, Pr, x_over_D(0.01), "T") == pytest.approx(5.99, rel=0.02)
    assert corr.nusselt_laminar(Re, Pr, x_over_D(0.01), "q") == pytest.approx(7.49, rel=0.02)


def test_laminar_simultaneous_entry_exceeds_thermal_entry():
    # A developing velocity profile raises heat transfer near the inlet (Shah & London 1978):
    # at Pr = 0.7 the local Nu must exceed the thermal-entry (Pr -> inf) value at the same x*.
    Re = 1000.0
    x_star = np.array([1e-3, 1e-2])
    for boundary in ("T", "q"):
        simultaneous = corr.nusselt_laminar(Re, 0.7, x_star * Re * 0.7, boundary)
        thermal_only = corr.nusselt_laminar(Re, 1e8, x_star * Re * 1e8, boundary)
        assert np.all(simultaneous > thermal_only)


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


def test_gnielinski_local_entrance_factor():
    # VDI Heat Atlas (2010) G1: local factor 1 + (1/3)(D/x)^(2/3); its mean over 0..L must be
    # the published mean factor 1 + (D/L)^(2/3). Check the integral numerically (closed form).
    Re, Pr, fd = 5e4, 3.0, 0.021
    fully_developed = corr.nusselt_gnielinski(Re, Pr, fd)
    assert corr.nusselt_gnielinski(Re, Pr, fd, 8.0) == pytest.approx(fully_developed * (1 + 0.25 / 3), rel=1e-12)
    L_over_D = 20.0
    edges = np.linspace(0.0, L_over_D, 200001)
    centres = 0.5 * (edges[1:] + edges[:-1])
    mean_local = np.mean(corr.nusselt_gnielinski(Re, Pr, fd, centres)) / fully_developed
    assert mean_local == pytest.approx(1 + (1 / L_over_D) ** (2 / 3), rel=2e-3)


@pytest.mark.parametrize("boundary", ["T", "q"])
@pytest.mark.parametrize("eD", [0.0, 1e-3])
def test_transition_blend_is_continuous(boundary, eD):
    # Gnielinski (1995): Nu = (1-γ) Nu_lam(2300) + γ Nu_turb(1e4); continuous at both ends.
    Pr = np.array([0.7, 5.0, 80.0])
    x_over_D = np.array([3.0, 40.0, 1e4])
    lam = corr.nusselt_laminar(2300.0, Pr, x_over_D, boundary)
    below = corr.nusselt_inside(2300.0, Pr, 64 / 2300.0, x_over_D, boundary, relative_roughness=eD)
    just_above = corr.nusselt_inside(np.nextafter(2300.0, 3000.0), Pr, 0.04, x_over_D, boundary, relative_roughness=eD)
    np.testing.assert_allclose(below, lam, rtol=1e-12)
    np.testing.assert_allclose(just_above, lam, rtol=1e-9)

    f_1e4 = corr.friction_factor(1e4, eD)
    turb = corr.nusselt_gnielinski(1e4, Pr, f_1e4, x_over_D)
    at = corr.nusselt_inside(1e4, Pr, f_1e4, x_over_D, boundary, relative_roughness=eD)
    just_below = corr.nusselt_inside(np.nextafter(1e4, 0.0), Pr, 0.5, x_over_D, boundary, relative_roughness=eD)
    np.testing.assert_allclose(at, turb, rtol=1e-12)
    np.testing.assert_allclose(just_below, turb, rtol=1e-9)


def test_transition_blend_is_linear_in_reynolds():
    # Gnielinski (1995): γ = (Re - 2300)/(1e4 - 2300); the midpoint is the average of the ends.
    Pr, x_over_D, eD = 4.0, 60.0, 5e-5
    lam = corr.nusselt_laminar(2300.0, Pr, x_over_D, "T")
    turb = corr.nusselt_gnielinski(1e4, Pr, Colebrook(1e4, eD), x_over_D)  # fluids' Colebrook at 1e4
    mid = corr.nusselt_inside(6150.0, Pr, 0.03, x_over_D, "T", relative_roughness=eD)
    assert mid == pytest.approx(0.5 * (lam + turb), rel=1e-9)


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


def test_cylinder_wall_resistance_closed_form():
    # Closed form ln(Do/Di)/(2πk): NPS 2 sch 40 steel, bore 52.48 mm, OD 60.3 mm (ASME B36.10M), k = 45 W/mK.
    R = corr.cylinder_wall_resistance(0.05248, 0.0603, 45.0)
    assert R == pytest.approx(math.log(0.0603 / 0.05248) / (2 * math.pi * 45.0), rel=1e-14)
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


def test_every_validity_method_has_a_citation():
    required = {"gnielinski", "churchill_chu", "churchill_bernstein", "laminar_entry", "colebrook"}
    assert required <= set(corr.VALIDITY)
    assert set(corr.VALIDITY) <= set(corr.METHODS)
    for key, citation in corr.METHODS.items():
        assert isinstance(citation, str) and citation.strip() and "\n" not in citation, key
    for ranges in corr.VALIDITY.values():
        for low, high in ranges.values():
            assert low < high


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
