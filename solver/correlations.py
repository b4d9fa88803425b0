"""Friction and heat-transfer correlations for the line solver.

Every function takes numpy arrays (or floats), broadcasts its arguments, and
returns a numpy array; all quantities are SI. Nothing here loops over elements:
the solver calls these on whole lines (thousands of cells) several times per
solve. Reference libraries (fluids, ht) are used by the tests only.

Conventions
-----------
* ``Re``, ``Pr``, ``Ra``, ``Nu`` are based on the pipe bore (inside) or the
  outer diameter (outside), as each docstring says.
* ``f`` is always the Darcy friction factor (four times the Fanning factor).
* Validity ranges live in :data:`VALIDITY`; :func:`out_of_range` turns them
  into boolean masks the solver reports as Checks. The functions themselves
  never refuse a value just because it lies outside the published range; they
  refuse only values the equation cannot take (Re <= 0, negative x, ...).
"""

from __future__ import annotations

import functools
import math

import numpy as np

from solver._numeric import clip as _clip

from solver.errors import InputError

__all__ = [
    "METHODS",
    "VALIDITY",
    "CorrelationInputError",
    "STEFAN_BOLTZMANN",
    "RE_LAMINAR_MAX",
    "RE_TURBULENT_MIN",
    "RE_COLEBROOK_MIN",
    "X_OVER_D_MIN",
    "buried_cylinder_resistance",
    "colebrook",
    "cylinder_wall_resistance",
    "dew_point_magnus",
    "flow_regime",
    "friction_factor",
    "nusselt_churchill_bernstein",
    "nusselt_churchill_chu_cylinder",
    "nusselt_gnielinski",
    "nusselt_inside",
    "nusselt_laminar",
    "nusselt_mixed",
    "out_of_range",
    "radiation_coefficient",
]

#: Stefan–Boltzmann constant [W/(m² K⁴)], CODATA 2018 (exact in the 2019 SI).
STEFAN_BOLTZMANN = 5.670374419e-8

#: Upper Reynolds number of laminar pipe flow used throughout (common practice).
RE_LAMINAR_MAX = 2300.0
#: Reynolds number from which Gnielinski's transition blend hands over to the
#: turbulent equation (Gnielinski 1995; VDI Heat Atlas 2010, G1).
RE_TURBULENT_MIN = 1.0e4
#: Reynolds number from which the Colebrook equation is used for friction.
RE_COLEBROOK_MIN = 4000.0
#: Smallest x/D the entry-length equations are evaluated at. Both the laminar
#: entry terms and the turbulent entrance factor grow without bound as x -> 0;
#: clipping keeps the arrays finite when a cell centre sits on the inlet.
X_OVER_D_MIN = 1.0e-6

_LN10 = math.log(10.0)
_COLEBROOK_MAX_STEPS = 30

#: One-line citations of every method in this module; the report prints them.
METHODS: dict[str, str] = {
    "laminar_friction": "Hagen–Poiseuille: f = 64/Re for fully developed laminar pipe flow (closed form)",
    "colebrook": (
        "Colebrook, C. F. (1939) Turbulent flow in pipes, with particular reference to the transition "
        "region between the smooth and rough pipe laws. J. Inst. Civil Eng. 11, 133–156"
    ),
    "friction_transition": (
        "Engineering bridge (not a correlation): f interpolated linearly in Re between 64/2300 and "
        "Colebrook at Re = 4000"
    ),
    "laminar_entry": (
        "Gnielinski, V. in VDI Heat Atlas, 2nd ed. (2010), ch. G1: local Nusselt number, simultaneously "
        "developing laminar pipe flow; limits 3.657 / 4.364 from Shah, R. K. & London, A. L. (1978) "
        "Laminar Flow Forced Convection in Ducts, Academic Press"
    ),
    "gnielinski": (
        "Gnielinski, V. (1976) New equations for heat and mass transfer in turbulent pipe and channel "
        "flow. Int. Chem. Eng. 16, 359–368; local entrance factor per VDI Heat Atlas (2010) G1"
    ),
    "transition_blend": (
        "Gnielinski, V. (1995) Ein neues Berechnungsverfahren für die Wärmeübertragung im "
        "Übergangsbereich zwischen laminarer und turbulenter Rohrströmung. Forsch. Ingenieurwes. 61, 240–248"
    ),
    "churchill_chu": (
        "Churchill, S. W. & Chu, H. H. S. (1975) Correlating equations for laminar and turbulent free "
        "convection from a horizontal cylinder. Int. J. Heat Mass Transfer 18, 1049–1053"
    ),
    "churchill_bernstein": (
        "Churchill, S. W. & Bernstein, M. (1977) A correlating equation for forced convection from "
        "gases and liquids to a circular cylinder in crossflow. J. Heat Transfer 99, 300–306"
    ),
    "mixed_convection": (
        "Churchill, S. W. (1977) A comprehensive correlating equation for laminar, assisting, forced "
        "and free convection. AIChE J. 23, 10–16: Nu = (Nu_F³ + Nu_N³)^(1/3), an approximation"
    ),
    "dew_point": (
        "Magnus formula with the constants of Alduchov, O. A. & Eskridge, R. E. (1996) Improved Magnus form "
        "approximation of saturation vapor pressure. J. Appl. Meteorol. 35, 601–609"
    ),
    "radiation": "Grey-body exchange with large surroundings, h_r = εσ(Ts² + T∞²)(Ts + T∞) (closed form)",
    "cylinder_wall": "Conduction through a cylindrical wall, R' = ln(Do/Di)/(2πk) (closed form)",
    "buried_cylinder": (
        "Conduction shape factor of a cylinder buried in a semi-infinite medium with an isothermal "
        "surface, S' = 2π/arccosh(2z/D) (Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, "
        "Table 4.1)"
    ),
}

#: Published validity ranges, method -> {dimensionless group: (low, high)}.
#: Bounds are inclusive. ``out_of_range`` uses these.
VALIDITY: dict[str, dict[str, tuple[float, float]]] = {
    # Gnielinski (1976): 2300 < Re < 5e6 and 0.5 < Pr < 2000 (as quoted in Rohsenow, Hartnett & Cho,
    # Handbook of Heat Transfer 1998, and VDI Heat Atlas G1). Many texts quote Re >= 3000.
    "gnielinski": {"Re": (2300.0, 5.0e6), "Pr": (0.5, 2000.0)},
    # Churchill & Chu (1975) recommend Ra >= 1e-5; Incropera gives the upper limit Ra <= 1e12.
    "churchill_chu": {"Ra": (1.0e-5, 1.0e12)},
    # Churchill & Bernstein (1977): all Re·Pr >= 0.2.
    "churchill_bernstein": {"RePr": (0.2, math.inf)},
    # VDI Heat Atlas (2010) G1 laminar equations: laminar flow Re <= 2300. The Prandtl range
    # 0.1 <= Pr <= 1000 for the simultaneous-entry term is quoted from memory.
    "laminar_entry": {"Re": (0.0, RE_LAMINAR_MAX), "Pr": (0.1, 1000.0)},
    # Colebrook (1939): turbulent flow; the Re and roughness span of the Moody (1944) chart.
    "colebrook": {"Re": (RE_COLEBROOK_MIN, 1.0e8), "relative_roughness": (0.0, 0.05)},
}


class CorrelationInputError(InputError, ValueError):
    """A value a correlation cannot take. Both an :class:`InputError` and a ``ValueError``."""


# --------------------------------------------------------------------------- helpers


def _first_bad(values: np.ndarray, bad: np.ndarray):
    """The first offending element, as a plain float for the error message."""
    return float(np.broadcast_to(values, bad.shape)[bad].flat[0])


def _require_positive(name: str, values) -> np.ndarray:
    values = np.asarray(values, dtype=float)
    bad = ~(values > 0.0)  # also catches NaN
    if bad.any():
        raise CorrelationInputError(name, _first_bad(values, bad), "must be > 0")
    return values


def _require_non_negative(name: str, values) -> np.ndarray:
    values = np.asarray(values, dtype=float)
    bad = ~(values >= 0.0)
    if bad.any():
        raise CorrelationInputError(name, _first_bad(values, bad), "must be >= 0")
    return values


def _x_over_d(x_over_D) -> np.ndarray:
    """x/D clipped to [X_OVER_D_MIN, inf]; ``None`` or ``inf`` mean fully developed."""
    if x_over_D is None:
        return np.asarray(np.inf)
    x = np.asarray(x_over_D, dtype=float)
    bad = ~(x >= 0.0)
    if bad.any():
        raise CorrelationInputError("x_over_D", _first_bad(x, bad), "must be >= 0 (distance from the inlet)")
    return np.maximum(x, X_OVER_D_MIN)


def _boundary(boundary: str) -> str:
    if boundary in ("T", "q"):
        return boundary
    raise CorrelationInputError(
        "boundary", boundary, "must be 'T' (uniform wall temperature) or 'q' (uniform heat flux)"
    )


# --------------------------------------------------------------------------- friction


def colebrook(Re, relative_roughness):
    r"""Colebrook–White equation (Colebrook 1939), solved: Darcy friction factor.

    .. math::
        \frac{1}{\sqrt{f}} = -2\log_{10}\left(\frac{\varepsilon/D}{3.7}
        + \frac{2.51}{Re\sqrt{f}}\right)

    Solved for :math:`y = 1/\sqrt{f}` by vectorised Newton iteration, started
    from the Swamee–Jain (1976) explicit approximation. Newton converges
    quadratically here: the next step is smaller than 0.2·(step/y)² relative (for f < 0.15),
    so iteration stops once the largest relative step is below 1e-6, which
    leaves a relative error below ~2e-13 in 1/sqrt(f) (typically 3 steps).

    Parameters
    ----------
    Re : array_like — Reynolds number based on the bore [-], > 0
    relative_roughness : array_like — absolute roughness / bore, ε/D [-], >= 0

    Returns
    -------
    f : ndarray — Darcy friction factor [-]

    Validity
    --------
    Turbulent flow, Re >= ~4000; the Moody chart covers 4e3 <= Re <= 1e8,
    0 <= ε/D <= 0.05 (``VALIDITY['colebrook']``). The equation is solved at
    any Re > 0 it is given; below 4000 it is not physical.

    Examples
    --------
    At Re = 1e5 and ε/D = 1e-4 the Moody (1944) chart reads f ≈ 0.0185; the
    ``fluids`` documentation gives ``Colebrook(1E5, 1E-4) = 0.018513866077471``:

    >>> round(float(colebrook(1e5, 1e-4)), 6)
    0.018514
    """
    Re = _require_positive("Re", Re)
    eD = _require_non_negative("relative_roughness", relative_roughness)
    return _colebrook(Re, eD)


def _colebrook(Re: np.ndarray, eD: np.ndarray) -> np.ndarray:
    """Newton solution of Colebrook–White on checked arrays (see colebrook)."""
    a = eD / 3.7
    b = 2.51 / Re
    c = 2.0 / _LN10
    cb = c * b
    # Swamee–Jain (1976) start: 1/sqrt(f) = -2 log10(eD/3.7 + 5.74/Re^0.9), within ~1 % of f.
    y = np.log(a + 5.74 * Re**-0.9)
    y *= -c
    for _ in range(_COLEBROOK_MAX_STEPS):
        s = b * y
        s += a
        g = np.log(s)
        g *= c
        g += y
        s = cb / s
        s += 1.0
        g /= s  # Newton step: g(y) / g'(y)
        y -= g
        # Newton converges quadratically here (the next step is below 0.2·(step/y)² relative),
        # so |step/y| < 1e-6 means the remaining relative error in 1/sqrt(f) is < ~2e-13.
        g /= y
        if max(-np.min(g, initial=0.0), np.max(g, initial=0.0)) < 1e-6:
            break
    return 1.0 / (y * y)


@functools.lru_cache(maxsize=256)
def _colebrook_at_1e4(relative_roughness: float) -> float:
    """colebrook(1e4, ε/D) for one roughness; cached (a pure function of its argument)."""
    return float(colebrook(RE_TURBULENT_MIN, relative_roughness))


def friction_factor(Re, relative_roughness):
    """Darcy friction factor for every regime of pipe flow.

    * Re <= 2300: laminar, f = 64/Re (Hagen–Poiseuille, closed form).
    * Re >= 4000: Colebrook–White (1939), solved; see :func:`colebrook`.
    * 2300 < Re < 4000: linear interpolation in Re between 64/2300 and the
      Colebrook value at Re = 4000 (same ε/D). This is an engineering bridge
      that keeps f continuous, not a correlation: friction in this range is not
      predictable, and the solver flags the regime.

    Parameters
    ----------
    Re : array_like — Reynolds number based on the bore [-], must be > 0
    relative_roughness : array_like — ε/D [-], >= 0 (ignored in laminar flow)

    Returns
    -------
    f : ndarray — Darcy friction factor [-]

    Validity
    --------
    Laminar: Re <= 2300. Colebrook: as :func:`colebrook`.

    Examples
    --------
    Laminar, f = 64/Re (Hagen–Poiseuille): 64/1000 = 0.064; turbulent, the
    Colebrook value above (fluids: 0.018513866 at Re = 1e5, ε/D = 1e-4):

    >>> float(friction_factor(1000.0, 1e-4))
    0.064
    >>> round(float(friction_factor(1e5, 1e-4)), 6)
    0.018514
    """
    Re = _require_positive("Re", Re)
    eD = _require_non_negative("relative_roughness", relative_roughness)
    # whole arrays in one regime skip the others (same values: the blend weight is 0 or 1 there)
    re_min, re_max = float(np.min(Re)), float(np.max(Re))
    if re_max <= RE_LAMINAR_MAX:
        return 64.0 / Re
    if re_min >= RE_COLEBROOK_MIN:
        return _colebrook(Re, eD)
    f = _colebrook(np.maximum(Re, RE_COLEBROOK_MIN), eD)  # Colebrook at 4000 wherever Re <= 4000
    f_laminar = 64.0 / np.minimum(Re, RE_LAMINAR_MAX)
    weight = _clip((Re - RE_LAMINAR_MAX) * (1.0 / (RE_COLEBROOK_MIN - RE_LAMINAR_MAX)), 0.0, 1.0)
    f -= f_laminar
    f *= weight
    f += f_laminar
    return f


# --------------------------------------------------------------------------- inside heat transfer


def flow_regime(Re):
    """Flow regime code: 0 laminar (Re <= 2300), 1 transitional, 2 turbulent (Re >= 1e4).

    The limits are those of Gnielinski's (1995) transition blend, VDI Heat Atlas
    (2010) G1: laminar up to Re = 2300, fully turbulent from Re = 1e4.

    Parameters
    ----------
    Re : array_like — Reynolds number based on the bore [-]

    Returns
    -------
    regime : ndarray of int8

    Validity
    --------
    Circular pipes with ordinary inlet disturbance; a very quiet inlet can stay laminar beyond 2300.

    Examples
    --------
    >>> flow_regime([1000.0, 2300.0, 5000.0, 1e4]).tolist()
    [0, 0, 1, 2]
    """
    Re = np.asarray(Re, dtype=float)
    return (Re > RE_LAMINAR_MAX).astype(np.int8) + (Re >= RE_TURBULENT_MIN).astype(np.int8)


def nusselt_laminar(Re, Pr, x_over_D, boundary):
    r"""Local Nusselt number, simultaneously developing laminar flow in a circular pipe.

    Method: Gnielinski's superposition in VDI Heat Atlas, 2nd ed. (2010),
    chapter G1, local forms (the mean forms use other constants). With
    :math:`Gz_x = Re\,Pr\,D/x`:

    Uniform wall temperature (``boundary='T'``):

    .. math::
        Nu_x = \left[3.657^3 + 0.7^3 + (Nu_2 - 0.7)^3 + Nu_3^3\right]^{1/3},\quad
        Nu_2 = 1.077\,Gz_x^{1/3},\quad
        Nu_3 = \tfrac{1}{2}\left(\frac{2}{1+22Pr}\right)^{1/6} Gz_x^{1/2}

    Uniform heat flux (``boundary='q'``):

    .. math::
        Nu_x = \left[4.364^3 + 0.6^3 + (Nu_2 - 0.6)^3 + Nu_3^3\right]^{1/3},\quad
        Nu_2 = 1.302\,Gz_x^{1/3},\quad
        Nu_3 = 0.462\,Pr^{1/3}\,(Re\,D/x)^{1/2}

    The first terms are the fully developed values of Shah & London (1978),
    3.657 and 48/11 = 4.364, which the equation tends to as x/D -> ∞. The
    second terms are the Lévêque thermal-entry asymptotes (1.077 and 1.302 are
    2/3 of the mean-value constants 1.615 and 1.953); the third are the
    developing-velocity (flat-plate-like) terms (0.462 is half of the mean 0.924;
    the 'T' term is half of the mean term). The 'q' form was checked against
    Shah & London's local thermal-entry equations; see the tests.

    Parameters
    ----------
    Re : array_like — Reynolds number based on the bore [-], > 0
    Pr : array_like — Prandtl number [-], > 0
    x_over_D : array_like — distance from the heated inlet / bore [-], >= 0;
        clipped to at least ``X_OVER_D_MIN`` = 1e-6 (the entry terms are
        infinite at x = 0). ``np.inf`` gives the fully developed value.
    boundary : {'T', 'q'} — uniform wall temperature or uniform heat flux

    Returns
    -------
    Nu : ndarray — local Nusselt number based on the bore [-]

    Validity
    --------
    Laminar, Re <= 2300; Pr 0.1–1000 (``VALIDITY['laminar_entry']``).

    Examples
    --------
    Fully developed (x/D -> ∞), the values of Shah & London (1978): 3.657 for a
    uniform wall temperature and 48/11 = 4.364 for a uniform heat flux:

    >>> round(float(nusselt_laminar(1000.0, 5.0, np.inf, "T")), 3)
    3.657
    >>> round(float(nusselt_laminar(1000.0, 5.0, np.inf, "q")), 3)
    4.364
    """
    boundary = _boundary(boundary)
    Re = np.asarray(Re, dtype=float)
    Pr = np.asarray(Pr, dtype=float)
    d_over_x = 1.0 / _x_over_d(x_over_D)
    return _laminar(Re, Pr, d_over_x, np.cbrt(Pr), boundary)


def _laminar(Re, Pr, d_over_x, cbrt_Pr, boundary):
    """VDI G1 local laminar Nusselt number on checked arrays (see nusselt_laminar)."""
    re_d_over_x = Re * d_over_x
    cbrt_graetz = np.cbrt(re_d_over_x) * cbrt_Pr
    if boundary == "T":
        nu_1, b = 3.657, 0.7
        nu_2 = 1.077 * cbrt_graetz
        # (2/(1+22Pr))^(1/6) (Re Pr D/x)^(1/2) = sqrt(cbrt(2/(1+22Pr)) Re Pr D/x)
        nu_3 = 0.5 * np.sqrt(np.cbrt(2.0 / (1.0 + 22.0 * Pr)) * (re_d_over_x * Pr))
    else:
        nu_1, b = 48.0 / 11.0, 0.6
        nu_2 = 1.302 * cbrt_graetz
        nu_3 = 0.462 * cbrt_Pr * np.sqrt(re_d_over_x)
    nu_2 -= b
    return np.cbrt((nu_1**3 + b**3) + nu_2 * nu_2 * nu_2 + nu_3 * nu_3 * nu_3)


def nusselt_gnielinski(Re, Pr, f_darcy, x_over_D=None):
    r"""Gnielinski (1976) turbulent pipe-flow Nusselt number, optionally local in the entrance.

    .. math::
        Nu = \frac{(f/8)(Re - 1000)\,Pr}{1 + 12.7\sqrt{f/8}\,(Pr^{2/3} - 1)}
        \left[1 + \tfrac{1}{3}\left(\frac{D}{x}\right)^{2/3}\right]

    The bracket is the local entrance factor of VDI Heat Atlas (2010) G1; its
    mean over a length L is the familiar :math:`1 + (D/L)^{2/3}`. Without
    ``x_over_D`` the factor is 1 (fully developed).

    Parameters
    ----------
    Re : array_like — Reynolds number based on the bore [-]
    Pr : array_like — Prandtl number [-]
    f_darcy : array_like — Darcy friction factor [-] (e.g. from :func:`friction_factor`)
    x_over_D : array_like or None — distance from the inlet / bore [-], >= 0,
        clipped to at least ``X_OVER_D_MIN``; ``None`` for fully developed flow

    Returns
    -------
    Nu : ndarray — Nusselt number based on the bore [-]

    Validity
    --------
    2300 < Re < 5e6 (3000 in many texts), 0.5 < Pr < 2000 (``VALIDITY['gnielinski']``).

    Examples
    --------
    The ``ht`` documentation example ``turbulent_Gnielinski(Re=1E5, Pr=1.2, fd=0.0185)``
    gives 254.62682749359632 (fully developed):

    >>> round(float(nusselt_gnielinski(1e5, 1.2, 0.0185)), 4)
    254.6268
    """
    Re = np.asarray(Re, dtype=float)
    Pr = np.asarray(Pr, dtype=float)
    d_over_x = 0.0 if x_over_D is None else 1.0 / _x_over_d(x_over_D)
    return _gnielinski(Re, Pr, np.asarray(f_darcy, dtype=float), np.cbrt(Pr), d_over_x)


def _gnielinski(Re, Pr, f_darcy, cbrt_Pr, d_over_x):
    """Gnielinski with the local entrance factor on checked arrays (see nusselt_gnielinski)."""
    f8 = f_darcy / 8.0
    nu = f8 * (Re - 1000.0) * Pr / (1.0 + 12.7 * np.sqrt(f8) * (cbrt_Pr * cbrt_Pr - 1.0))
    if np.ndim(d_over_x) == 0 and d_over_x == 0.0:
        return nu
    entry = np.cbrt(d_over_x)
    return nu * (1.0 + (1.0 / 3.0) * entry * entry)


def nusselt_inside(Re, Pr, f_darcy, x_over_D, boundary, relative_roughness=0.0):
    r"""Local inside Nusselt number of a circular pipe in every flow regime.

    * Re <= 2300: :func:`nusselt_laminar` (simultaneously developing, local).
    * Re >= 1e4: :func:`nusselt_gnielinski` with ``f_darcy`` and the local
      entrance factor.
    * 2300 < Re < 1e4: Gnielinski's (1995) transition blend, as in VDI Heat
      Atlas (2010) G1:

      .. math::
          Nu = (1-\gamma)\,Nu_{lam}(Re{=}2300) + \gamma\,Nu_{turb}(Re{=}10^4),\quad
          \gamma = \frac{Re - 2300}{10^4 - 2300}

      Both end values at the same x/D, Pr and boundary condition;
      :math:`Nu_{turb}(10^4)` uses f = ``friction_factor(1e4, relative_roughness)``.
      The blend is continuous at both ends by construction; at Re = 1e4 it
      meets the turbulent branch exactly when ``f_darcy`` there is also
      ``friction_factor(1e4, relative_roughness)``.

    Parameters
    ----------
    Re : array_like — Reynolds number based on the bore [-], > 0
    Pr : array_like — Prandtl number [-], > 0
    f_darcy : array_like — Darcy friction factor at Re [-] (used only where Re >= 1e4)
    x_over_D : array_like — distance from the heated inlet / bore [-], >= 0;
        clipped to at least ``X_OVER_D_MIN``; ``np.inf`` for fully developed
    boundary : {'T', 'q'} — laminar wall condition: uniform temperature or heat flux
        (turbulent Nusselt numbers do not depend on it noticeably for Pr > 0.5)
    relative_roughness : array_like — ε/D [-] for the friction factor at Re = 1e4

    Returns
    -------
    Nu : ndarray — local Nusselt number based on the bore [-]

    Validity
    --------
    As the three parts: ``VALIDITY['laminar_entry']`` and ``VALIDITY['gnielinski']``;
    transitional results carry the uncertainty of the regime itself.

    Examples
    --------
    Fully developed laminar flow with a uniform heat flux, 4.364 (Shah & London 1978);
    turbulent flow, Gnielinski as in the ``ht`` example (254.6268 at Re = 1e5, Pr = 1.2, f = 0.0185):

    >>> round(float(nusselt_inside(1000.0, 5.0, 0.064, np.inf, "q")), 3)
    4.364
    >>> round(float(nusselt_inside(1e5, 1.2, 0.0185, np.inf, "q")), 4)
    254.6268
    """
    boundary = _boundary(boundary)
    Re = _require_positive("Re", Re)
    Pr = _require_positive("Pr", Pr)
    d_over_x = 1.0 / _x_over_d(x_over_D)
    cbrt_Pr = np.cbrt(Pr)
    # whole arrays in one regime skip the others (same values: the blend weight is 0 or 1 there)
    re_min, re_max = float(np.min(Re)), float(np.max(Re))
    if re_min >= RE_TURBULENT_MIN:
        return _gnielinski(Re, Pr, np.asarray(f_darcy, dtype=float), cbrt_Pr, d_over_x)
    if re_max <= RE_LAMINAR_MAX:
        return _laminar(Re, Pr, d_over_x, cbrt_Pr, boundary)
    nu_laminar = _laminar(np.minimum(Re, RE_LAMINAR_MAX), Pr, d_over_x, cbrt_Pr, boundary)
    turbulent = Re >= RE_TURBULENT_MIN
    relative_roughness = np.asarray(relative_roughness, dtype=float)
    if relative_roughness.ndim == 0:
        f_at_1e4 = _colebrook_at_1e4(float(relative_roughness))  # one value: skip the array machinery
    else:
        # a line has one roughness per segment: solve Colebrook once per distinct value
        values, where = np.unique(relative_roughness, return_inverse=True)
        f_at_1e4 = np.array([_colebrook_at_1e4(float(v)) for v in values])[where.reshape(relative_roughness.shape)]
    f_turb = np.where(turbulent, f_darcy, f_at_1e4)
    nu_turbulent = _gnielinski(np.maximum(Re, RE_TURBULENT_MIN), Pr, f_turb, cbrt_Pr, d_over_x)
    gamma = _clip((Re - RE_LAMINAR_MAX) * (1.0 / (RE_TURBULENT_MIN - RE_LAMINAR_MAX)), 0.0, 1.0)
    nu_turbulent -= nu_laminar
    nu_turbulent *= gamma
    nu_turbulent += nu_laminar
    return nu_turbulent


# --------------------------------------------------------------------------- outside heat transfer


def nusselt_churchill_chu_cylinder(Ra, Pr):
    r"""Churchill & Chu (1975): natural convection from an isothermal horizontal cylinder.

    .. math::
        Nu_D = \left\{0.60 + \frac{0.387\,Ra_D^{1/6}}
        {\left[1 + (0.559/Pr)^{9/16}\right]^{8/27}}\right\}^2

    Parameters
    ----------
    Ra : array_like — Rayleigh number based on the outer diameter, g β ΔT D³/(ν α) [-], >= 0
    Pr : array_like — Prandtl number at the film temperature [-], > 0

    Returns
    -------
    Nu : ndarray — mean Nusselt number based on the outer diameter [-]

    Validity
    --------
    1e-5 <= Ra <= 1e12, all Pr (``VALIDITY['churchill_chu']``).

    Examples
    --------
    The ``ht`` documentation example ``Nu_horizontal_cylinder_Churchill_Chu(Pr=0.69, Gr=2.63E9)``
    gives 139.13493970073597; here Ra = Gr·Pr:

    >>> round(float(nusselt_churchill_chu_cylinder(2.63e9 * 0.69, 0.69)), 4)
    139.1349
    """
    Ra = np.asarray(Ra, dtype=float)
    Pr = np.asarray(Pr, dtype=float)
    root = 0.60 + 0.387 * Ra ** (1.0 / 6.0) / (1.0 + (0.559 / Pr) ** (9.0 / 16.0)) ** (8.0 / 27.0)
    return root * root


def nusselt_churchill_bernstein(Re, Pr):
    r"""Churchill & Bernstein (1977): forced convection, circular cylinder in cross-flow.

    .. math::
        Nu_D = 0.3 + \frac{0.62\,Re_D^{1/2}\,Pr^{1/3}}{\left[1 + (0.4/Pr)^{2/3}\right]^{1/4}}
        \left[1 + \left(\frac{Re_D}{282000}\right)^{5/8}\right]^{4/5}

    Parameters
    ----------
    Re : array_like — Reynolds number based on the outer diameter and free-stream velocity [-]
    Pr : array_like — Prandtl number at the film temperature [-], > 0

    Returns
    -------
    Nu : ndarray — mean Nusselt number based on the outer diameter [-]

    Validity
    --------
    Re·Pr >= 0.2 (``VALIDITY['churchill_bernstein']``, group ``RePr``).

    Examples
    --------
    Air across a cylinder at Re = 6071, Pr = 0.70: Nu ≈ 40.6 in Incropera & DeWitt's
    worked example (from memory); the ``ht`` documentation example
    ``Nu_cylinder_Churchill_Bernstein(6071, 0.7)`` gives 40.63708594124974:

    >>> round(float(nusselt_churchill_bernstein(6071.0, 0.7)), 4)
    40.6371
    """
    Re = np.asarray(Re, dtype=float)
    Pr = np.asarray(Pr, dtype=float)
    return 0.3 + (0.62 * np.sqrt(Re) * np.cbrt(Pr) / (1.0 + (0.4 / Pr) ** (2.0 / 3.0)) ** 0.25) * (
        1.0 + (Re / 282000.0) ** 0.625
    ) ** 0.8


def nusselt_mixed(Nu_forced, Nu_natural):
    r"""Churchill (1977) combination of forced and natural convection.

    .. math::
        Nu = \left(Nu_F^3 + Nu_N^3\right)^{1/3}

    An approximation commonly used for assisting and transverse flow (wind
    across a horizontal pipe); for opposing flow it overestimates.

    Parameters
    ----------
    Nu_forced : array_like — forced-convection Nusselt number [-], >= 0
    Nu_natural : array_like — natural-convection Nusselt number [-], >= 0

    Returns
    -------
    Nu : ndarray — combined Nusselt number [-]

    Validity
    --------
    Assisting and transverse flow, any Re and Ra where each part is valid; an
    approximation (Churchill 1977), optimistic for opposing flow.

    Examples
    --------
    Equal parts combine to 2^(1/3) = 1.26 times either (closed form):

    >>> round(float(nusselt_mixed(10.0, 10.0)), 4)
    12.5992
    """
    Nu_forced = np.asarray(Nu_forced, dtype=float)
    Nu_natural = np.asarray(Nu_natural, dtype=float)
    return np.cbrt(Nu_forced**3 + Nu_natural**3)


def radiation_coefficient(T_surface_K, T_surroundings_K, emissivity):
    r"""Linearised radiation coefficient of a grey surface in large surroundings.

    .. math::
        h_r = \varepsilon\,\sigma\,(T_s^2 + T_\infty^2)(T_s + T_\infty)

    so that :math:`q'' = h_r (T_s - T_\infty)` equals
    :math:`\varepsilon\sigma(T_s^4 - T_\infty^4)` exactly.

    Parameters
    ----------
    T_surface_K : array_like — surface temperature [K], > 0
    T_surroundings_K : array_like — temperature of the surroundings [K], > 0
    emissivity : array_like — hemispherical emissivity of the surface [-], 0..1

    Returns
    -------
    h_r : ndarray — radiation heat-transfer coefficient [W/(m² K)]

    Source: the Stefan–Boltzmann law for a small grey surface in large isothermal
    surroundings (e.g. Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, ch. 1).

    Validity
    --------
    A grey, diffuse surface that sees only surroundings much larger than itself, at one
    temperature; no absorbing gas between them.

    Examples
    --------
    A surface at 350 K with ε = 0.9 in surroundings at 300 K loses
    εσ(Ts⁴ − T∞⁴) = 352.45 W/m² (closed form), so h_r = 352.45 / 50 K = 7.049:

    >>> round(float(radiation_coefficient(350.0, 300.0, 0.9)), 3)
    7.049
    """
    Ts = _require_positive("T_surface_K", T_surface_K)
    Tinf = _require_positive("T_surroundings_K", T_surroundings_K)
    eps = np.asarray(emissivity, dtype=float)
    bad = ~((eps >= 0.0) & (eps <= 1.0))
    if bad.any():
        raise CorrelationInputError("emissivity", _first_bad(eps, bad), "must lie between 0 and 1")
    return eps * STEFAN_BOLTZMANN * (Ts * Ts + Tinf * Tinf) * (Ts + Tinf)


def cylinder_wall_resistance(D_inner_m, D_outer_m, conductivity):
    r"""Conduction resistance of a cylindrical wall per unit length (closed form).

    .. math::
        R' = \frac{\ln(D_o/D_i)}{2\pi k}

    Parameters
    ----------
    D_inner_m : array_like — inner diameter [m], > 0
    D_outer_m : array_like — outer diameter [m], >= D_inner_m (equal gives 0)
    conductivity : array_like — thermal conductivity of the wall [W/(m K)], > 0

    Returns
    -------
    R : ndarray — resistance per metre of pipe [K m/W]

    Source: Fourier's law for steady radial conduction through a cylindrical shell
    (e.g. Incropera & DeWitt, ch. 3).

    Validity
    --------
    Steady, radial conduction with a constant conductivity; no contact resistance.

    Examples
    --------
    A wall whose outer diameter is twice its inner, with k = 1 W/(m K):
    ln 2 / (2π) = 0.1103 K m/W (closed form):

    >>> round(float(cylinder_wall_resistance(0.1, 0.2, 1.0)), 4)
    0.1103
    """
    Di = _require_positive("D_inner_m", D_inner_m)
    Do = _require_positive("D_outer_m", D_outer_m)
    k = _require_positive("conductivity", conductivity)
    shape = np.broadcast(Di, Do).shape
    bad = np.broadcast_to(Do < Di, shape)
    if bad.any():
        raise CorrelationInputError(
            "D_outer_m", _first_bad(Do, bad), f"must not be smaller than D_inner_m = {_first_bad(Di, bad)!r} m"
        )
    return np.log(Do / Di) / (2.0 * math.pi * k)


def buried_cylinder_resistance(D_outer_m, depth_m, soil_conductivity):
    r"""Conduction resistance per unit length between a buried cylinder and the ground surface.

    Conduction shape factor of an isothermal cylinder of diameter D with its
    centreline at depth z in a semi-infinite medium whose surface is
    isothermal (Incropera & DeWitt, Table 4.1):

    .. math::
        R' = \frac{\operatorname{arccosh}(2z/D)}{2\pi k_{soil}}

    Parameters
    ----------
    D_outer_m : array_like — outer diameter of the buried pipe or its insulation [m], > 0
    depth_m : array_like — depth of the pipe centreline below the surface [m], > D/2
    soil_conductivity : array_like — thermal conductivity of the soil [W/(m K)], > 0

    Returns
    -------
    R : ndarray — resistance per metre of pipe [K m/W]

    Raises
    ------
    CorrelationInputError (a ValueError) when the depth does not exceed D/2,
    naming the depth and the diameter.

    Validity
    --------
    Steady conduction, uniform soil, an isothermal ground surface and an isothermal
    pipe surface; z > D/2.

    Examples
    --------
    A 0.2 m pipe with its centreline 1 m deep in soil of k = 1.2 W/(m K):
    arccosh(10) / (2π · 1.2) = 0.3970 K m/W (closed form, Incropera & DeWitt Table 4.1):

    >>> round(float(buried_cylinder_resistance(0.2, 1.0, 1.2)), 4)
    0.397
    """
    D = _require_positive("D_outer_m", D_outer_m)
    z = np.asarray(depth_m, dtype=float)
    k = _require_positive("soil_conductivity", soil_conductivity)
    bad = ~(2.0 * z > D)
    if np.any(bad):
        shape = np.broadcast(z, D).shape
        bad = np.broadcast_to(bad, shape)
        raise CorrelationInputError(
            "depth_m",
            _first_bad(z, bad),
            f"centreline depth must exceed half the outer diameter D_outer_m = {_first_bad(D, bad)!r} m",
        )
    return np.arccosh(2.0 * z / D) / (2.0 * math.pi * k)


# --------------------------------------------------------------------------- validity


def out_of_range(method: str, **groups) -> np.ndarray:
    """Boolean mask, True where any given group lies outside ``VALIDITY[method]``.

    Bounds are inclusive; NaN counts as out of range. Groups not given are not
    checked.

    Parameters
    ----------
    method : str — a key of :data:`VALIDITY`
    **groups : array_like — dimensionless groups by the names used in
        ``VALIDITY[method]`` (e.g. ``Re=..., Pr=...``)

    Returns
    -------
    mask : ndarray of bool, the broadcast shape of the groups

    Examples
    --------
    Gnielinski (1976) is published for 0.5 < Pr < 2000 (``VALIDITY['gnielinski']``):

    >>> out_of_range("gnielinski", Re=1e5, Pr=[0.7, 5000.0]).tolist()
    [False, True]
    """
    try:
        ranges = VALIDITY[method]
    except KeyError:
        raise CorrelationInputError("method", method, f"unknown; known methods: {sorted(VALIDITY)}") from None
    mask = np.asarray(False)
    for name, values in groups.items():
        if name not in ranges:
            raise CorrelationInputError("groups", name, f"not a group of {method!r}; its groups: {sorted(ranges)}")
        low, high = ranges[name]
        values = np.asarray(values, dtype=float)
        mask = mask | ~((values >= low) & (values <= high))
    return mask


def dew_point_magnus(T_air_K, relative_humidity):
    r"""Dew point of moist air, Magnus formula (Alduchov & Eskridge 1996 constants).

    .. math::
        \gamma = \ln(\varphi) + \frac{a\,t}{b + t},\qquad
        t_d = \frac{b\,\gamma}{a - \gamma},\qquad a = 17.625,\ b = 243.04\ ^\circ C

    Parameters
    ----------
    T_air_K : array_like — air temperature [K]
    relative_humidity : array_like — relative humidity φ over water [-], 0 < φ <= 1

    Returns
    -------
    T_dew : ndarray — dew point [K]

    Validity
    --------
    −40 °C <= t <= 50 °C, saturation vapour pressure within 0.4 % (Alduchov & Eskridge 1996).

    Examples
    --------
    Air at 30 °C and 60 % relative humidity: psychrometric tables give a dew point of
    21.4 °C (from memory):

    >>> round(float(dew_point_magnus(303.15, 0.60)) - 273.15, 1)
    21.4
    """
    t = np.asarray(T_air_K, dtype=float) - 273.15
    phi = _require_positive("relative_humidity", relative_humidity)
    a, b = 17.625, 243.04
    gamma = np.log(np.minimum(phi, 1.0)) + a * t / (b + t)
    return b * gamma / (a - gamma) + 273.15
