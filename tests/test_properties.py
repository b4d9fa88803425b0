"""Tests of solver.properties against external references (named beside each value)."""

import numpy as np
import pytest

from solver.errors import PropertyRangeError
from solver.model import PureFluid, SolutionFluid, TableFluid, TableRow
from solver.catalogue import SOLUTIONS
from solver.properties import PURE_FLUIDS, fluid_model

CP = pytest.importorskip("CoolProp.CoolProp")


def water():
    return fluid_model(PureFluid(name="Water"))


# IAPWS-IF97 release (2007), Table 5 verification values. Our source is IAPWS-95
# (CoolProp HEOS); IF97 reproduces IAPWS-95 to about 0.01-0.1 %, hence 0.1 %.
@pytest.mark.parametrize(
    "T, p, v, h_kJ, cp_kJ",
    [
        (300.0, 3e6, 0.100215168e-2, 0.115331273e3, 0.417301218e1),   # IF97 Table 5
        (300.0, 80e6, 0.971180894e-3, 0.184142828e3, 0.401008987e1),  # IF97 Table 5
        (500.0, 3e6, 0.120241800e-2, 0.975542239e3, 0.465580682e1),   # IF97 Table 5
    ],
)
def test_water_if97_verification_points(T, p, v, h_kJ, cp_kJ):
    pr = water().props(np.array([T]), np.array([p]))
    assert pr.rho[0] == pytest.approx(1.0 / v, rel=1e-3)
    assert pr.h[0] == pytest.approx(h_kJ * 1e3, rel=1e-3)
    assert pr.cp[0] == pytest.approx(cp_kJ * 1e3, rel=1e-3)


@pytest.mark.parametrize("T, p_MPa", [(293.15, 0.2), (333.15, 0.5), (363.15, 1.0), (420.0, 2.0)])
def test_water_vs_iapws_library(T, p_MPa):
    iapws = pytest.importorskip("iapws")
    ref = iapws.IAPWS95(T=T, P=p_MPa)  # IAPWS-95 + IAPWS 2008 viscosity + 2011 conductivity
    pr = water().props(np.array([T]), np.array([p_MPa * 1e6]))
    assert pr.rho[0] == pytest.approx(ref.rho, rel=1e-3)
    assert pr.cp[0] == pytest.approx(ref.cp * 1e3, rel=1e-3)
    assert pr.mu[0] == pytest.approx(ref.mu, rel=5e-3)
    assert pr.k[0] == pytest.approx(ref.k, rel=5e-3)
    ref97 = iapws.IAPWS97(T=T, P=p_MPa)  # IAPWS-IF97
    assert pr.rho[0] == pytest.approx(1.0 / ref97.v, rel=1e-3)


def test_water_saturation_at_one_atmosphere():
    # IAPWS-95 normal boiling point 373.124 K (from memory; ITS-90 value)
    assert water().saturation_temperature(np.array([101325.0]))[0] == pytest.approx(373.124, abs=0.01)
    assert np.isnan(water().saturation_temperature(np.array([30e6]))[0])  # above p_crit 22.064 MPa (IAPWS-95)


def test_water_boiling_region_is_direct_not_interpolated():
    m = water()
    ts = m.saturation_temperature(np.array([101325.0]))[0]
    T = np.array([ts - 0.3, ts + 0.3])
    p = np.full(2, 101325.0)
    pr = m.props(T, p)
    # liquid below, vapour above (CoolProp HEOS direct, to 1e-9)
    for j in range(2):
        assert pr.rho[j] == pytest.approx(CP.PropsSI("D", "T", T[j], "P", p[j], "Water"), rel=1e-9)
    assert m.phase_is_liquid(T, p).tolist() == [True, False]
    # a two-phase enthalpy cannot be turned into a temperature
    h_mid = 0.5 * (CP.PropsSI("H", "P", 101325.0, "Q", 0, "Water") + CP.PropsSI("H", "P", 101325.0, "Q", 1, "Water"))
    with pytest.raises(PropertyRangeError, match="two-phase"):
        m.temperature(np.array([h_mid]), np.array([101325.0]))


def test_enthalpy_temperature_round_trip_pure():
    m = water()
    T = np.linspace(280.0, 360.0, 2000)
    p = np.linspace(6e5, 2e5, 2000)
    h = m.enthalpy(T, p)
    assert np.max(np.abs(m.temperature(h, p) - T)) < 1e-9  # exact inverse of the interpolant


@pytest.mark.parametrize("name, R", [("Air", 8.314462618 / 0.02896546), ("Nitrogen", 8.314462618 / 0.0280134)])
def test_gas_density_ideal_gas_and_coolprop(name, R):
    # closed form rho = p / (R T) at low pressure; R from CODATA 2018 and molar masses
    # (Air 28.96546 g/mol, Lemmon et al. 2000; N2 28.0134 g/mol)
    m = fluid_model(PureFluid(name=name))
    assert m.compressible
    T = np.array([280.0, 320.0, 400.0])
    p = np.array([1e5, 1.2e5, 0.9e5])
    rho = m.props(T, p).rho
    assert np.allclose(rho, p / (R * T), rtol=5e-3)
    direct = [CP.PropsSI("D", "T", a, "P", b, name) for a, b in zip(T, p)]  # CoolProp direct
    assert np.allclose(rho, direct, rtol=1e-3)


def test_meg_freezing_and_state():
    m = fluid_model(SolutionFluid(solute="MEG", concentration=0.3))
    assert m.label == "Ethylene glycol 30 % (mass)"
    assert m.freezing_temperature() == pytest.approx(258.57, abs=0.01)  # CoolProp T_freeze, PLATFORM.md
    pr = m.props(np.array([300.0]), np.array([3e5]))
    for got, q in zip(pr, ["D", "C", "V", "L", "H"]):
        ref = CP.PropsSI(q, "T", 300.0, "P", 3e5, "INCOMP::MEG[0.3]")  # CoolProp INCOMP direct
        # h: 0.1 % of cp * 100 K (~0.1 K equivalent), since h's zero is arbitrary
        assert got[0] == pytest.approx(ref, rel=1e-3 if q != "H" else 0, abs=0 if q != "H" else 1e-3 * 3600 * 100)
    with pytest.raises(PropertyRangeError, match="Ethylene glycol.*freezing.*T = 250.00 K"):
        m.props(np.array([250.0]), np.array([3e5]))
    h = m.enthalpy(np.array([270.0, 330.0]), np.array([3e5, 2e5]))
    assert np.max(np.abs(m.temperature(h, np.array([3e5, 2e5])) - [270.0, 330.0])) < 1e-9


def test_solution_catalogue_matches_coolprop():
    for code, (_label, basis, fmin, fmax) in SOLUTIONS.items():
        assert CP.PropsSI("fraction_min", "", 0, "", 0, f"INCOMP::{code}") == pytest.approx(fmin)  # CoolProp
        assert CP.PropsSI("fraction_max", "", 0, "", 0, f"INCOMP::{code}") == pytest.approx(fmax)  # CoolProp
        st = CP.AbstractState("INCOMP", code)
        if basis == "mass":
            with pytest.raises(ValueError):  # CoolProp refuses volume fractions for mass-based fluids
                st.set_volu_fractions([0.1])
        m = fluid_model(SolutionFluid(solute=code, concentration=min(0.1, fmax)))
        T = np.array([max(m.T_min_K + 1.0, 280.0)])
        pr = m.props(T, np.array([2e5]))
        assert pr.rho[0] == pytest.approx(CP.PropsSI("D", "T", T[0], "P", 2e5, f"INCOMP::{code}[{min(0.1, fmax)}]"), rel=1e-3)
    for name in PURE_FLUIDS:
        assert fluid_model(PureFluid(name=name)).T_min_K > 0


def table():
    rows = [TableRow(temperature_K=t, density_kg_per_m3=r, specific_heat_J_per_kgK=c, viscosity_Pa_s=mu,
                     conductivity_W_per_mK=k)
            for t, r, c, mu, k in [(280.0, 900.0, 2000.0, 0.1, 0.15), (320.0, 880.0, 2100.0, 0.02, 0.14),
                                   (360.0, 860.0, 2300.0, 0.008, 0.13)]]
    return fluid_model(TableFluid(name="Product", rows=rows, freezing_point_K=275.0, boiling_point_K=450.0))


def test_table_fluid():
    m = table()
    assert m.label == "Product (user table)"
    p = np.full(3, 1e5)
    pr = m.props(np.array([280.0, 320.0, 360.0]), p)
    assert pr.rho.tolist() == pytest.approx([900.0, 880.0, 860.0], rel=1e-12)  # the rows themselves
    assert pr.mu.tolist() == pytest.approx([0.1, 0.02, 0.008], rel=1e-12)
    mid = m.props(np.array([300.0]), np.array([1e5]))
    assert mid.mu[0] == pytest.approx(np.sqrt(0.1 * 0.02), rel=1e-12)  # log-linear: geometric mean
    # exact integral of the linear cp from 280 K to 300 K: 20*(2000+2050)/2, plus p/rho
    assert mid.h[0] == pytest.approx(20 * 2025.0 + 1e5 / 890.0, rel=1e-12)
    T = np.linspace(280.0, 360.0, 101)
    h = m.enthalpy(T, np.full(101, 5e5))
    assert np.max(np.abs(m.temperature(h, np.full(101, 5e5)) - T)) < 1e-9
    with pytest.raises(PropertyRangeError, match="Product.*no extrapolation"):
        m.props(np.array([365.0]), np.array([1e5]))
    assert m.saturation_temperature(np.array([1e5]))[0] == 450.0
    assert m.freezing_temperature() == 275.0


def test_random_states_vs_coolprop():
    # seeded random states away from saturation (>= 8 K) and the critical region (|T/Tc-1| < 0.15, 0.3-2 pc); CoolProp HEOS direct
    rng = np.random.default_rng(7)
    for name in ["Water", "Nitrogen", "Methane", "CarbonDioxide"]:
        m = fluid_model(PureFluid(name=name))
        T = rng.uniform(max(m.T_min_K + 2.0, 230.0), min(m.T_max_K, 600.0), 60)
        p = np.exp(rng.uniform(np.log(2e4), np.log(2e7), 60))
        ts = m.saturation_temperature(p)
        near_crit = (np.abs(T / m.T_crit - 1) < 0.15) & (p > 0.3 * m.p_crit) & (p < 2.0 * m.p_crit)
        keep = (np.isnan(ts) | (np.abs(T - ts) > 8.0)) & ~near_crit
        T, p = T[keep], p[keep]
        pr = m.props(T, p)
        for j in range(len(T)):
            ref = [CP.PropsSI(q, "T", T[j], "P", p[j], name) for q in ("D", "C", "V", "L", "H")]
            assert pr.rho[j] == pytest.approx(ref[0], rel=1e-3), (name, T[j], p[j])
            assert pr.cp[j] == pytest.approx(ref[1], rel=1e-3), (name, T[j], p[j])
            assert pr.mu[j] == pytest.approx(ref[2], rel=5e-3), (name, T[j], p[j])
            assert pr.k[j] == pytest.approx(ref[3], rel=5e-3), (name, T[j], p[j])
            assert pr.h[j] == pytest.approx(ref[4], abs=1e-3 * max(abs(ref[4]), 100.0 * ref[1])), (name, T[j], p[j])


def test_out_of_range_pure():
    with pytest.raises(PropertyRangeError, match="Water"):
        water().props(np.array([250.0]), np.array([1e5]))


def _steep_table(rho_hot):
    from solver.model import TableFluid, TableRow

    rows = [TableRow(temperature_K=280.0 + 10.0 * i, density_kg_per_m3=1000.0 + (rho_hot - 1000.0) * i / 10,
                     specific_heat_J_per_kgK=2000.0, viscosity_Pa_s=1e-3, conductivity_W_per_mK=0.15)
            for i in range(11)]
    return TableFluid(name="steep", rows=rows)


def test_table_inversion_holds_where_the_fixed_point_diverges():
    # at 100 MPa a density falling 1000 -> 300 kg/m³ over 100 K makes d(p/rho)/dT = p·7/rho² ≈ 4,400 J/(kg·K)
    # near the hot end, above cp = 2,000: the plain fixed point T = u⁻¹(h − p/rho(T)) diverges there, while
    # h = u + p/rho still rises with T (closed form: dh/dT = cp − p·rho'/rho² > 0), so exactly one T holds
    import numpy as np

    from solver.properties import fluid_model

    model = fluid_model(_steep_table(300.0))
    T = np.linspace(281.0, 379.0, 60)
    p = np.full(T.shape, 1e8)
    assert np.all(np.diff(model.enthalpy(T, p)) > 0)
    assert np.max(np.abs(model.temperature(model.enthalpy(T, p), p) - T)) < 1e-6


def test_table_whose_enthalpy_falls_at_the_feed_pressure_is_refused():
    # density rising with temperature (1000 -> 4000 kg/m³ over 100 K, rho' = 30 kg/(m³·K)): at 100 MPa and the
    # cold end p/rho falls by p·rho'/rho² = 3,000 J/(kg·K) against cp = 2,000, so h(T) falls there and no heat
    # balance can be closed (closed form); at 3 bar it rises and the line solves
    import pytest

    from solver import solve
    from solver.errors import SolverError
    from solver.model import Alternative, Feed, Segment

    alt = Alternative(fluid=_steep_table(4000.0), feed=Feed(inlet_temperature_K=300.0, inlet_pressure_Pa=1e8),
                      segments=[Segment(length_m=10.0)])
    with pytest.raises(SolverError, match="would fall with temperature"):
        solve(alt)
    solve(alt.model_copy(update={"feed": Feed(inlet_temperature_K=300.0, inlet_pressure_Pa=3e5)}))
