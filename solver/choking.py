"""Choked gas flow: where a line chokes and the largest mass flow it can pass.

The line solver marches pressure with the real gas; when a gas line's flow reaches the speed of
sound no steady march exists any more, and the user needs two plain facts: *where* the flow
chokes and *how much* the line can pass at this inlet pressure. Both come from the published
relations for constant-area flow with wall friction, segment by segment:

* Adiabatic (Fanno flow), Darcy friction factor f, ratio of specific heats γ:

  .. math::
      \\frac{f L^*}{D} = \\frac{1 - M^2}{\\gamma M^2}
          + \\frac{\\gamma + 1}{2\\gamma}\\ln\\frac{(\\gamma + 1) M^2}{2 + (\\gamma - 1) M^2}

  (Shapiro, *The Dynamics and Thermodynamics of Compressible Fluid Flow*, 1953, ch. 6), the
  friction length L* left from Mach M to Mach 1.
* Isothermal flow, M_T = v / √(p/ρ) (the isothermal Mach number, √γ·M for an ideal gas):

  .. math::
      \\frac{f L^*}{D} = \\frac{1 - M_T^2}{M_T^2} + \\ln M_T^2

  (Shapiro 1953, ch. 6; the same relation underlies ``fluids.compressible.isothermal_gas`` and
  ``P_isothermal_critical_flow``), the flow choking at M_T = 1.

Fittings count as their equivalent friction length K (= f L_eq / D), spread over their segment
as in the march. At a change of bore the adiabatic flow keeps its stagnation state (isentropic
area relation); the isothermal flow keeps its density across the joint, so M_T scales with the
area ratio. The gas is taken as ideal with γ and the isothermal sound speed √(p/ρ) of the inlet
state (from the line's own property data); friction factors at each segment's inlet Reynolds
number. These are the textbook bounds, not the march: a heated gas chokes somewhat earlier and a
cooled one later (Rayleigh flow), which the message says.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from solver import correlations


@dataclass(frozen=True)
class Stretch:
    """One segment as the choking relations see it."""

    name: str
    x_start_m: float
    length_m: float
    diameter_m: float
    relative_roughness: float
    fittings_K: tuple[float, float]  # K = a / Re + b for the segment's fittings (0, 0 without)


def fanno_length(mach: float, gamma: float) -> float:
    """f L*/D from Mach ``mach`` to Mach 1 in adiabatic flow with friction (Fanno) [-]."""
    m2 = mach * mach
    return (1.0 - m2) / (gamma * m2) + (gamma + 1.0) / (2.0 * gamma) * math.log(
        (gamma + 1.0) * m2 / (2.0 + (gamma - 1.0) * m2))


def isothermal_length(mach_t: float) -> float:
    """f L*/D from isothermal Mach number ``mach_t`` (v/√(p/ρ)) to 1 in isothermal flow with friction [-]."""
    m2 = mach_t * mach_t
    return (1.0 - m2) / m2 + math.log(m2)


def _area_function(mach: float, gamma: float) -> float:
    """Mass flow per unit area relative to stagnation, up to a constant: M (1 + (γ−1)/2 M²)^(−(γ+1)/(2(γ−1)))."""
    return mach * (1.0 + 0.5 * (gamma - 1.0) * mach * mach) ** (-(gamma + 1.0) / (2.0 * (gamma - 1.0)))


def _invert(fn, target: float, decreasing: bool) -> float:
    """The subsonic Mach number in (0, 1) with fn(M) = target (fn monotonic there), by bisection."""
    lo, hi = 1e-9, 1.0
    for _ in range(100):
        mid = 0.5 * (lo + hi)
        above = fn(mid) > target
        if above == decreasing:
            lo = mid
        else:
            hi = mid
    return 0.5 * (lo + hi)


def _friction_length(s: Stretch, m_dot: float, mu: float) -> tuple[float, float]:
    """(f/D per metre of the segment, K of its fittings) at the segment's Reynolds number."""
    area = math.pi * s.diameter_m ** 2 / 4.0
    re = m_dot * s.diameter_m / (area * mu)
    f = float(correlations.friction_factor(re, s.relative_roughness))
    a, b = s.fittings_K
    return f / s.diameter_m, (a / re + b if (a or b) else 0.0)


def choke_point(stretches: list[Stretch], m_dot: float, mach_in: float, gamma: float, mu: float,
                isothermal: bool = False) -> tuple[int, float] | None:
    """Where the flow reaches Mach 1 (segment index, x [m]), or None if it leaves the line subsonic.

    ``mach_in`` is the Mach number (isothermal Mach number when ``isothermal``) at the inlet of the
    first segment; ``mu`` the viscosity for the friction factors [Pa s].
    """
    length_fn = isothermal_length if isothermal else (lambda m: fanno_length(m, gamma))
    mach = mach_in
    if mach >= 1.0:
        return 0, stretches[0].x_start_m
    for j, s in enumerate(stretches):
        if j:
            prev = stretches[j - 1]
            ratio = (prev.diameter_m / s.diameter_m) ** 2  # A_prev / A_this
            if isothermal:
                mach = mach * ratio
            else:
                target = _area_function(mach, gamma) * ratio
                if target >= _area_function(1.0, gamma):
                    return j, s.x_start_m  # chokes at the reducer
                mach = _invert(lambda m: _area_function(m, gamma), target, decreasing=False)
            if mach >= 1.0:
                return j, s.x_start_m
        f_per_m, k = _friction_length(s, m_dot, mu)
        per_m = f_per_m + k / s.length_m  # fittings spread over the segment
        left = length_fn(mach)
        used = per_m * s.length_m
        if used >= left:
            return j, s.x_start_m + left / per_m
        mach = _invert(length_fn, left - used, decreasing=True)
    return None


def max_mass_flow(stretches: list[Stretch], rho_in: float, sound_in: float, gamma: float, mu: float,
                  isothermal: bool = False) -> float:
    """The largest mass flow [kg/s] the line passes before it chokes at its outlet, for a fixed inlet
    state (density ``rho_in``, speed of sound ``sound_in``; the isothermal relation takes the
    isothermal sound speed √(p/ρ) = a/√γ)."""
    area = math.pi * stretches[0].diameter_m ** 2 / 4.0
    a_ref = sound_in / math.sqrt(gamma) if isothermal else sound_in
    lo, hi = 0.0, 1.0  # inlet Mach number
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        m_dot = rho_in * area * a_ref * mid
        if choke_point(stretches, m_dot, mid, gamma, mu, isothermal) is None:
            lo = mid
        else:
            hi = mid
    return rho_in * area * a_ref * lo
