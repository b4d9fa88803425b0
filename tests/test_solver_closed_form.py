"""The line solver against closed forms and reference libraries.

Constant-property liquids are built as user table fluids with two identical rows
(250 K and 450 K), so the textbook closed forms hold exactly:

* uniform heat flux: Tm(x) = Tin + q' x / (m cp)  (energy balance)
* uniform wall temperature: (Ts − Tm)/(Ts − Tin) = exp(−P ∫h dx / (m cp))  (energy balance
  on a slice with Newton's law of cooling; e.g. Incropera & DeWitt, Fundamentals of Heat and
  Mass Transfer, eq. 8.42)
* fully developed laminar Nusselt numbers 4.364 (= 48/11, uniform flux) and 3.657 (uniform
  wall temperature): Shah, R. K. & London, A. L. (1978) Laminar Flow Forced Convection in
  Ducts, Academic Press.
* Hagen–Poiseuille f = 64/Re; Colebrook–White from the reference library ``fluids``.

Table liquids carry h = u(T) + p/ρ (solver/properties.py), so with constant ρ and cp the
exact energy balance of an incompressible liquid is
``cp (T − Tin) + (p − p_in)/ρ = q' x / m`` (flow work). The expected temperatures below
include that flow-work term where it is not negligible.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from solver.line import GRAVITY
from solver.march import solve
from solver.model import (
    Adiabatic,
    Alternative,
    Feed,
    Fitting,
    FixedWall,
    Layer,
    Pipe,
    Segment,
    StillAir,
    TableFluid,
    TableRow,
)

fluids = pytest.importorskip("fluids")


def constant_fluid(rho=1000.0, cp=4000.0, mu=1e-3, k=0.6, name="Constant liquid") -> TableFluid:
    rows = [
        TableRow(temperature_K=t, density_kg_per_m3=rho, specific_heat_J_per_kgK=cp,
                 viscosity_Pa_s=mu, conductivity_W_per_mK=k)
        for t in (250.0, 450.0)
    ]
    return TableFluid(name=name, rows=rows)


def bore(d: float) -> Pipe:
    # wall_thickness_m = 0: the inner wall is the heated / fixed wall (no wall resistance)
    return Pipe(bore="diameter", inner_diameter_m=d, wall_thickness_m=0.0, roughness_m=0.0)


# --------------------------------------------------------------------------- uniform heat flux

RHO, CP, MU, K = 1000.0, 2000.0, 0.01, 0.5  # Pr = cp mu / k = 40
D = 0.05
M_DOT = 0.01  # Re = 4 m / (π D μ) = 25.5: laminar
Q_PRIME = 5.0  # W/m
LENGTH = 200.0  # x/D = 4000 >> Re·Pr = 1000: fully developed at the outlet


@pytest.fixture(scope="module")
def uniform_flux_result():
    seg = Segment(name="Traced run", length_m=LENGTH, pipe=bore(D), heat_input_W_per_m=Q_PRIME,
                  surroundings=Adiabatic())
    alt = Alternative(name="Uniform flux", fluid=constant_fluid(RHO, CP, MU, K),
                      feed=Feed(inlet_temperature_K=300.0, inlet_pressure_Pa=3e5, mass_flow_kg_per_s=M_DOT),
                      segments=[seg])
    return solve(alt)


def test_uniform_flux_bulk_temperature_is_linear(uniform_flux_result):
    r = uniform_flux_result
    x = r.profile.x_m
    p = r.profile.pressure_Pa
    t_in = 300.0
    # closed-form energy balance of an incompressible liquid with h = cp T + p/ρ:
    # cp (Tm − Tin) + (p − p_in)/ρ = q' x / m
    expected = t_in + Q_PRIME * x / (M_DOT * CP) - (p - 3e5) / (RHO * CP)
    rise = Q_PRIME * LENGTH / (M_DOT * CP)  # 50 K
    err = np.max(np.abs(r.profile.bulk_temperature_K - expected))
    assert err < 1e-4 * rise, err
    # and without the flow-work term the classic Tin + q'x/(m cp) still agrees to 1e-4 of the rise
    classic = t_in + Q_PRIME * x / (M_DOT * CP)
    assert np.max(np.abs(r.profile.bulk_temperature_K - classic)) < 1e-4 * rise
    # outlet key figure and the duty: q' L (closed form)
    assert r.duty_W == pytest.approx(Q_PRIME * LENGTH, rel=1e-9)
    assert r.heat_loss_W == pytest.approx(0.0, abs=1e-9 * Q_PRIME * LENGTH)


def test_uniform_flux_pressure_is_hagen_poiseuille(uniform_flux_result):
    r = uniform_flux_result
    area = math.pi * D**2 / 4
    v = M_DOT / (RHO * area)
    re = RHO * v * D / MU
    # Hagen–Poiseuille: Δp = 64/Re · L/D · ρ V²/2 (closed form)
    dp = 64.0 / re * LENGTH / D * 0.5 * RHO * v**2
    assert r.pressure_drop_Pa == pytest.approx(dp, rel=1e-6)


def test_uniform_flux_fully_developed_wall_to_bulk_difference(uniform_flux_result):
    r = uniform_flux_result
    x = r.profile.x_m
    far = x > 0.9 * LENGTH  # Graetz number Re Pr D/x < 0.28 here: fully developed
    # Shah & London (1978): Nu = 48/11 = 4.364 for fully developed laminar flow, uniform flux
    h_fd = 4.364 * K / D
    dT_expected = Q_PRIME / (h_fd * math.pi * D)
    dT = (r.profile.inner_wall_temperature_K - r.profile.bulk_temperature_K)[far]
    assert np.all(np.abs(dT / dT_expected - 1.0) < 0.01), dT / dT_expected
    nu = r.profile.inside_coefficient_W_per_m2K[far] * D / K
    assert np.all(np.abs(nu / 4.364 - 1.0) < 0.01)
    # entry region: the local Nusselt number falls monotonically towards 4.364 (Shah & London 1978:
    # Nu_x > Nu_fd everywhere in the thermal entry for uniform flux)
    # Calorun's local value is d(x·Nu_m)/dx of the VDI G1 mean-value equation, which undershoots the
    # limit by up to 1.4 % around x* ≈ 0.2 before settling (see correlations.nusselt_laminar): it falls
    # steeply from the inlet and never lies more than 1.5 % below 4.364
    nu_all = r.profile.inside_coefficient_W_per_m2K * D / K
    assert nu_all[1] > 2.0 * 4.364 and np.all(nu_all >= 4.364 * 0.985)


def test_uniform_flux_thermal_entry_against_shah_london():
    """Local Nu in the thermal entry, uniform flux, against Shah & London (1978) eq. for
    Nu_x,H (thermally developing, hydrodynamically developed, x* = x/(D Re Pr)),
    equations quoted from memory:
    Nu = 1.302 x*^(-1/3) − 1 for x* <= 5e-5... used here in the mid range:
    Nu = 1.302 x*^(-1/3) − 0.5 for 0.00005 <= x* <= 0.0015 (Shah & London 1978, eq. 5.83);
    valid as Pr → ∞ (hydrodynamically developed), so a very viscous liquid is used."""
    fl = constant_fluid(rho=1000.0, cp=4000.0, mu=5.0, k=0.2)  # Pr = 1e5
    d = 0.05
    m = 0.02  # Re ≈ 0.1; Re Pr ≈ 1e4
    seg = Segment(name="Entry", length_m=0.7, pipe=bore(d), heat_input_W_per_m=1.0, surroundings=Adiabatic())
    alt = Alternative(name="Entry", fluid=fl, feed=Feed(inlet_temperature_K=300.0, inlet_pressure_Pa=5e5,
                                                       mass_flow_kg_per_s=m), segments=[seg])
    r = solve(alt, cells_per_segment=200)
    x = r.profile.x_m
    re = 4 * m / (math.pi * d * 5.0)
    pr = 4000.0 * 5.0 / 0.2
    xs = x / (d * re * pr)
    sel = (xs >= 2e-4) & (xs <= 1.4e-3)
    assert sel.sum() > 10
    nu_sl = 1.302 * xs[sel] ** (-1.0 / 3.0) - 0.5  # Shah & London (1978)
    nu = r.profile.inside_coefficient_W_per_m2K[sel] * d / 0.2
    # the solver's VDI G1 superposition vs the Shah & London local form: within 5 %
    assert np.all(np.abs(nu / nu_sl - 1.0) < 0.05), (nu / nu_sl).min()


# --------------------------------------------------------------------------- uniform wall temperature

T_WALL = 360.0
T_IN = 300.0
# water-like constant liquid: Pr = 6.67; m = 0.05 kg/s in D = 0.05 m gives Re = 1273 (laminar),
# Re·Pr = 8490; flow-work heating m (dp/dx)/(ρ h P) ≈ 2e-6 K, negligible against Ts − Tm > 0.5 K
W_RHO, W_CP, W_MU, W_K, W_M = 1000.0, 4000.0, 1e-3, 0.6, 0.05
W_LENGTH = 220.0  # x* = x/(D Re Pr) up to 0.52


@pytest.fixture(scope="module")
def uniform_wall_result():
    seg = Segment(name="Steam-held run", length_m=W_LENGTH, pipe=bore(D),
                  surroundings=FixedWall(wall_temperature_K=T_WALL))
    alt = Alternative(name="Uniform wall", fluid=constant_fluid(W_RHO, W_CP, W_MU, W_K),
                      feed=Feed(inlet_temperature_K=T_IN, inlet_pressure_Pa=3e5, mass_flow_kg_per_s=W_M),
                      segments=[seg])
    return solve(alt)


def test_uniform_wall_exponential_decay(uniform_wall_result):
    r = uniform_wall_result
    x = r.profile.x_m
    tm = r.profile.bulk_temperature_K
    h = r.profile.inside_coefficient_W_per_m2K
    # start past the steep entry so the node values of h integrate accurately (trapezoid rule),
    # stop while Ts − Tm > 0.5 K (flow-work heating stays below 1e-5 of the difference)
    sel = (x >= 10.0) & (T_WALL - tm > 0.5)
    xs, hs, ts = x[sel], h[sel], tm[sel]
    assert xs[-1] - xs[0] > 50.0
    h_int = np.concatenate([[0.0], np.cumsum(0.5 * (hs[1:] + hs[:-1]) * np.diff(xs))])
    # closed form (Incropera & DeWitt eq. 8.42): (Ts − Tm(x))/(Ts − Tm(x0)) = exp(−P ∫h dx / (m cp))
    expected = np.exp(-math.pi * D * h_int / (W_M * W_CP))
    ratio = (T_WALL - ts) / (T_WALL - ts[0])
    assert np.max(np.abs(ratio / expected - 1.0)) < 1e-4
    # the wall stays where it was put (wall_thickness 0: inner wall = fixed wall)
    assert np.allclose(r.profile.inner_wall_temperature_K, T_WALL, atol=1e-9)


def test_uniform_wall_fully_developed_nusselt(uniform_wall_result):
    r = uniform_wall_result
    x = r.profile.x_m
    re = 4 * W_M / (math.pi * D * W_MU)
    pr = W_CP * W_MU / W_K
    far = x / (D * re * pr) > 0.3  # x* > 0.3: fully developed (Shah & London 1978)
    assert far.sum() > 10
    nu = r.profile.inside_coefficient_W_per_m2K[far] * D / W_K
    # Shah & London (1978): Nu = 3.657 for fully developed laminar flow, uniform wall temperature.
    # Calorun's local value is d(x·Nu_m)/dx of the VDI G1 mean-value equation, which dips up to
    # 1.3 % below 3.657 around x* = 0.1–0.5 before it settles (see correlations.nusselt_laminar)
    assert np.all(np.abs(nu / 3.657 - 1.0) < 0.015)
    # over the fully developed part the decay follows exp(−P h_fd Δx/(m cp)) with h_fd = 3.657 k/D
    i1 = int(np.argmax(far))
    i2 = int(np.searchsorted(x, x[i1] + 40.0))
    ratio = (T_WALL - r.profile.bulk_temperature_K[i2]) / (T_WALL - r.profile.bulk_temperature_K[i1])
    h_fd = 3.657 * W_K / D
    expected = math.exp(-math.pi * D * h_fd * (x[i2] - x[i1]) / (W_M * W_CP))
    # within 2 %: the VDI mean-value equation's local form lies up to 1.9 % below 3.657 here
    assert ratio == pytest.approx(expected, rel=0.02)


# --------------------------------------------------------------------------- pressure


def _adiabatic_alt(fl, d, length, m, *, elevation=0.0, fittings=(), pipe=None, p_in=5e5):
    seg = Segment(name="Run", length_m=length, pipe=pipe or bore(d), elevation_change_m=elevation,
                  fittings=list(fittings), surroundings=Adiabatic())
    return Alternative(name="Hydraulics", fluid=fl,
                       feed=Feed(inlet_temperature_K=320.0, inlet_pressure_Pa=p_in, mass_flow_kg_per_s=m),
                       segments=[seg])


def test_laminar_pressure_drop_hagen_poiseuille():
    rho, mu, d, length, m = 998.0, 0.02, 0.04, 120.0, 0.05
    r = solve(_adiabatic_alt(constant_fluid(rho=rho, mu=mu), d, length, m))
    v = m / (rho * math.pi * d**2 / 4)
    re = rho * v * d / mu
    assert re < 2300
    dp = 64.0 / re * length / d * 0.5 * rho * v**2  # Hagen–Poiseuille (closed form)
    assert r.pressure_drop.friction_Pa == pytest.approx(dp, rel=1e-6)
    assert r.pressure_drop_Pa == pytest.approx(dp, rel=1e-6)
    assert r.pressure_drop.acceleration_Pa == pytest.approx(0.0, abs=1e-9 * dp)


@pytest.mark.parametrize("roughness", [0.0, 4.5e-5])
def test_turbulent_pressure_drop_colebrook_darcy_weisbach(roughness):
    rho, mu, d, length, m = 998.0, 1e-3, 0.0525, 80.0, 4.0
    pipe = Pipe(bore="diameter", inner_diameter_m=d, wall_thickness_m=0.0, roughness_m=roughness)
    r = solve(_adiabatic_alt(constant_fluid(rho=rho, mu=mu), d, length, m, pipe=pipe))
    v = m / (rho * math.pi * d**2 / 4)
    re = rho * v * d / mu
    f = fluids.friction.Colebrook(re, roughness / d)  # reference library, exact Colebrook solution
    dp = f * length / d * 0.5 * rho * v**2  # Darcy–Weisbach
    assert r.pressure_drop.friction_Pa == pytest.approx(dp, rel=1e-6)


def test_elevation_pressure_is_rho_g_dz():
    rho, d, length, m, dz = 1030.0, 0.05, 30.0, 0.5, 12.0
    r = solve(_adiabatic_alt(constant_fluid(rho=rho, mu=2e-3), d, length, m, elevation=dz))
    # hydrostatics: Δp = ρ g Δz, g = 9.80665 m/s² (standard gravity, CGPM 1901)
    assert GRAVITY == 9.80665
    assert r.pressure_drop.elevation_Pa == pytest.approx(rho * 9.80665 * dz, rel=1e-9)
    r_down = solve(_adiabatic_alt(constant_fluid(rho=rho, mu=2e-3), d, length, m, elevation=-dz))
    assert r_down.pressure_drop.elevation_Pa == pytest.approx(-rho * 9.80665 * dz, rel=1e-9)


def test_fittings_darby_and_hooper_against_fluids():
    rho, mu, m = 998.0, 1e-3, 2.0
    pipe = Pipe(bore="nps", nps="2", schedule="40", roughness_m=4.5e-5)
    d = 0.0525  # ASME B36.10M NPS 2 sch 40: OD 60.3 mm, wall 3.91 mm -> bore 52.48 mm
    fittings_list = [Fitting(kind="elbow_90_standard", count=4), Fitting(kind="elbow_90_long_radius", count=2)]
    r = solve(_adiabatic_alt(constant_fluid(rho=rho, mu=mu), d, 25.0, m, fittings=fittings_list, pipe=pipe))
    d_in = r.segments[0].inner_diameter_m
    assert d_in == pytest.approx(0.05248, abs=2e-5)  # ASME B36.10M
    v = m / (rho * math.pi * d_in**2 / 4)
    re = rho * v * d_in / mu
    # fluids: Darby 3-K (NPS 2 in; equivalent nominal size of a sch 40 bore) and Hooper 2-K (bore in inches)
    k_darby = fluids.fittings.Darby3K(NPS=2.0, Re=re, name="Elbow, 90°, flanged, welded, bends, (r/D = 1)")
    k_hooper = fluids.fittings.Hooper2K(Di=d_in / 0.0254, Re=re,
                                        name="Elbow, 90°, Long-radius (R/D = 1.5), All types")
    k_total = 4 * k_darby + 2 * k_hooper
    assert r.segments[0].fittings_K == pytest.approx(k_total, rel=1e-4)
    assert r.pressure_drop.fittings_Pa == pytest.approx(k_total * 0.5 * rho * v**2, rel=1e-4)


# --------------------------------------------------------------------------- traced line losing heat


def test_traced_insulated_line_approaches_its_holding_temperature():
    """Tracing under insulation with a fixed outside resistance R_o and the inside + wall path R_a:
    per metre the fluid gets q' − (T_h − T∞)/R_o with the heated node at T_h = Tm + q'_fluid R_a,
    so m cp dTm/dx = q' R_o/(R_a + R_o) − (Tm − T∞)/(R_a + R_o) (series resistances, closed form).
    Its solution approaches the holding temperature T_eq = T∞ + q' R_o exponentially with the
    length m cp (R_a + R_o) — the textbook traced-line result. Laminar flow fully developed from
    x* = x/(D Re Pr) > 1 on (Nu = 4.364, uniform flux, Shah & London 1978), so R_a is known there.
    This watches how tracing heat is split between the fluid and the surroundings in the march."""
    cp, k, d = 2000.0, 0.15, 0.05
    m_dot, q_trace, t_air, h_out = 0.002, 5.0, 260.0, 10.0
    t_ins, k_ins = 0.05, 0.02
    seg = Segment(name="Traced", length_m=120.0, pipe=bore(d), heat_input_W_per_m=q_trace,
                  insulation=[Layer(thickness_m=t_ins, conductivity_W_per_mK=k_ins)],
                  surroundings=StillAir(temperature_K=t_air, film_coefficient_W_per_m2K=h_out))
    alt = Alternative(name="Traced oil", fluid=constant_fluid(rho=900.0, cp=cp, mu=0.05, k=k),
                      feed=Feed(inlet_temperature_K=330.0, inlet_pressure_Pa=3e5, mass_flow_kg_per_s=m_dot),
                      segments=[seg])
    r = solve(alt)
    d_out = d + 2 * t_ins
    r_o = math.log(d_out / d) / (2 * math.pi * k_ins) + 1.0 / (h_out * math.pi * d_out)  # K·m/W
    r_a = 1.0 / (4.364 * k / d * math.pi * d)  # fully developed laminar film, no wall (wall_thickness 0)
    t_eq = t_air + q_trace * r_o  # 304.8 K
    x, tm = r.profile.x_m, r.profile.bulk_temperature_K
    x_fd = d * (4 * m_dot / (math.pi * d * 0.05)) * (cp * 0.05 / k)  # x* = 1: 34 m
    i1 = int(np.searchsorted(x, x_fd + 5.0))
    assert tm[i1] - t_eq > 5.0  # still well away from the holding temperature there
    expected = t_eq + (tm[i1] - t_eq) * np.exp(-(x[i1:] - x[i1]) / (m_dot * cp * (r_a + r_o)))
    assert np.max(np.abs(tm[i1:] - expected)) < 0.01
    # the heat lost per metre at the outlet is what crosses R_o from the heated node (closed form)
    t_heated = tm[-1] + r.profile.heat_to_fluid_W_per_m[-1] * r_a
    assert float(r.profile.heat_loss_W_per_m[-1]) == pytest.approx((t_heated - t_air) / r_o, rel=1e-3)


def test_thermal_entry_restarts_where_the_wall_condition_changes():
    """A very viscous liquid (Pr = 1e5, laminar) runs 0.5 m unheated, then meets a wall held at
    360 K: a new thermal boundary layer starts there, so the local Nusselt number in the heated
    segment follows the thermal-entry solution at x' measured from the segment's start — Shah &
    London (1978), uniform wall temperature, hydrodynamically developed: Nu_x = 1.077 x*^(−1/3) − 0.7
    for x* = x'/(D Re Pr) <= 0.01 (equation quoted from memory, so 6 % is asked) — and matches a
    line that starts with the heated segment."""
    fl = constant_fluid(rho=1000.0, cp=4000.0, mu=5.0, k=0.2)  # Pr = 1e5
    d, m = 0.05, 0.02  # Re ≈ 0.1, Re Pr ≈ 1e4
    feed = Feed(inlet_temperature_K=300.0, inlet_pressure_Pa=5e5, mass_flow_kg_per_s=m)
    heated = Segment(name="Held wall", length_m=0.7, pipe=bore(d), surroundings=FixedWall(wall_temperature_K=360.0))
    lead_in = Segment(name="Lead-in", length_m=0.5, pipe=bore(d), surroundings=Adiabatic())
    r = solve(Alternative(name="Restart", fluid=fl, feed=feed, segments=[lead_in, heated]), cells_per_segment=200)
    fresh = solve(Alternative(name="Fresh", fluid=fl, feed=feed, segments=[heated]), cells_per_segment=200)
    s = r.segments[1]
    x = r.profile.x_m[s.node_start:s.node_end + 1] - 0.5
    nu = r.profile.inside_coefficient_W_per_m2K[s.node_start:s.node_end + 1] * d / 0.2
    re, pr = 4 * m / (math.pi * d * 5.0), 4000.0 * 5.0 / 0.2
    xs = x / (d * re * pr)
    sel = (xs >= 2e-4) & (xs <= 1.4e-3)
    assert sel.sum() > 10
    nu_sl = 1.077 * xs[sel] ** (-1.0 / 3.0) - 0.7  # Shah & London (1978), from memory
    assert np.all(np.abs(nu[sel] / nu_sl - 1.0) < 0.06), (nu[sel] / nu_sl).min()
    # the same wall from the inlet: equal to 1 % (node values are cell means, and a line's first
    # segment has its cells packed towards the inlet, a later segment evenly spaced ones)
    nu_fresh = np.interp(x[sel], fresh.profile.x_m, fresh.profile.inside_coefficient_W_per_m2K) * d / 0.2
    assert nu[sel] == pytest.approx(nu_fresh, rel=0.01)
    # and the liquid warms as the restarted entry says: (Tw − Tm)/(Tw − Tm,0) = exp(−4 Nu_m x*) with the
    # mean Nu_m = 1.615 x*^(−1/3) − 0.7 (Shah & London 1978, uniform wall temperature, x* <= 0.005;
    # from memory) — the heating fraction within 6 %
    tm = r.profile.bulk_temperature_K[s.node_start:s.node_end + 1]
    theta = (360.0 - tm) / (360.0 - tm[0])
    nu_m = 1.615 * xs[sel] ** (-1.0 / 3.0) - 0.7
    assert np.all(np.abs((1.0 - theta[sel]) / (1.0 - np.exp(-4.0 * nu_m * xs[sel])) - 1.0) < 0.06)


def test_very_long_held_wall_line_reaches_the_wall_temperature():
    """A slow laminar flow along 400 m of wall held at 360 K: the number of transfer units
    π D h L/(m cp) is about 700, so by the closed form (Ts − Tm)/(Ts − Tin) = exp(−NTU) the liquid
    leaves at the wall temperature to round-off and never passes it (second law). This is the
    range where the march's recurrence can no longer use its cumulative-product form."""
    seg = Segment(name="Long held run", length_m=400.0, pipe=bore(D), surroundings=FixedWall(wall_temperature_K=T_WALL))
    alt = Alternative(name="Saturates", fluid=constant_fluid(W_RHO, W_CP, W_MU, W_K),
                      feed=Feed(inlet_temperature_K=T_IN, inlet_pressure_Pa=3e5, mass_flow_kg_per_s=0.001),
                      segments=[seg])
    r = solve(alt)
    tm = r.profile.bulk_temperature_K
    assert r.outlet_temperature_K == pytest.approx(T_WALL, abs=1e-6)
    assert np.all(np.diff(tm) >= -1e-9) and np.all(tm <= T_WALL + 1e-6)
    # NTU over the first metre with the fully developed 3.657 (Shah & London 1978) is about 1.7: warm quickly
    i1 = int(np.searchsorted(r.profile.x_m, 5.0))
    assert T_WALL - tm[i1] < 1e-2 * (T_WALL - T_IN)
