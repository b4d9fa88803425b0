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
    "PROPERTY_RATIO_RANGES",
    "STANDARD_GRAVITY",
    "CONDENSATION_DT_MIN_K",
    "buried_cylinder_resistance",
    "condensation_horizontal_tube",
    "colebrook",
    "cylinder_wall_resistance",
    "dew_point_magnus",
    "flow_regime",
    "friction_factor",
    "nusselt_churchill_bernstein",
    "nusselt_churchill_chu_cylinder",
    "nusselt_churchill_chu_vertical",
    "nusselt_gnielinski",
    "nusselt_inside",
    "nusselt_inside_mean",
    "nusselt_laminar",
    "nusselt_mixed",
    "out_of_range",
    "radiation_coefficient",
    "wall_property_factor",
]

#: Stefan–Boltzmann constant [W/(m² K⁴)], CODATA 2018 (exact in the 2019 SI).
STEFAN_BOLTZMANN = 5.670374419e-8

#: Standard gravity [m/s²] (CGPM 1901), for the condensate film.
STANDARD_GRAVITY = 9.80665
#: Smallest saturation-minus-wall difference [K] the film-condensation equation is evaluated at
#: (h grows as ΔT^(-1/4) towards ΔT = 0; see condensation_horizontal_tube).
CONDENSATION_DT_MIN_K = 1.0e-3

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

#: Ranges of the property ratios the wall corrections are published for (the factor is held at its
#: value at the bound beyond them; ``VALIDITY`` flags the cell):
#: Sieder & Tate (1936) 0.0044 <= μ_b/μ_w <= 9.75 (as quoted in Incropera & DeWitt, ch. 8; from memory);
#: Gnielinski (1976) / VDI Heat Atlas (2010) G1 liquids 0.1 <= Pr_b/Pr_w <= 10 (from memory);
#: VDI Heat Atlas (2010) G1 gases 0.5 <= T_b/T_w <= 1.5.
PROPERTY_RATIO_RANGES: dict[str, tuple[float, float]] = {
    "mu_ratio": (0.0044, 9.75),
    "Pr_ratio": (0.1, 10.0),
    "T_ratio": (0.5, 1.5),
}

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
        "Churchill, S. W. (1977) Friction-factor equation spans all fluid-flow regimes. Chem. Eng. 84(24), "
        "91–92; 2300 < Re < 4000, scaled to meet 64/Re at 2300 (faded out by Re = 2500) and Colebrook at 4000"
    ),
    "laminar_entry": (
        "Gnielinski, V. in VDI Heat Atlas, 2nd ed. (2010), ch. G1: mean-value equations of laminar pipe flow, "
        "thermal or simultaneous entry, uniform wall temperature or heat flux (cell means taken from them); "
        "limits 3.657 / 4.364 from Shah, R. K. & London, A. L. (1978) Laminar Flow Forced Convection in Ducts, "
        "Academic Press"
    ),
    "gnielinski": (
        "Gnielinski, V. (1976) New equations for heat and mass transfer in turbulent pipe and channel "
        "flow. Int. Chem. Eng. 16, 359–368; mean entrance factor 1 + (D/L)^(2/3) per VDI Heat Atlas (2010) G1"
    ),
    "transition_blend": (
        "Gnielinski, V. (1995) Ein neues Berechnungsverfahren für die Wärmeübertragung im "
        "Übergangsbereich zwischen laminarer und turbulenter Rohrströmung. Forsch. Ingenieurwes. 61, 240–248"
    ),
    "property_ratio_liquid": (
        "Liquids: laminar, Sieder, E. N. & Tate, G. E. (1936) Heat transfer and pressure drop of liquids in "
        "tubes. Ind. Eng. Chem. 28, 1429–1435: Nu·(μ_b/μ_w)^0.14; turbulent, Gnielinski (1976) / VDI Heat "
        "Atlas (2010) G1: Nu·(Pr_b/Pr_w)^0.11; transition weighted as the Gnielinski (1995) blend"
    ),
    "property_ratio_gas": (
        "Gases: turbulent, VDI Heat Atlas (2010) G1 (Gnielinski): Nu·(T_b/T_w)^0.45; laminar, no correction "
        "(exponent 0, Kays, W. M. & Crawford, M. E. (1993) Convective Heat and Mass Transfer, 3rd ed., "
        "McGraw-Hill); transition weighted as the Gnielinski (1995) blend"
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
    "churchill_chu_vertical": (
        "Churchill, S. W. & Chu, H. H. S. (1975) Correlating equations for laminar and turbulent free "
        "convection from a vertical plate. Int. J. Heat Mass Transfer 18, 1323–1329 (a riser as a vertical "
        "plate of its height; Incropera & DeWitt §9.6.1)"
    ),
    "film_condensation": (
        "Nusselt, W. (1916) Die Oberflächenkondensation des Wasserdampfes. Z. VDI 60, 541–546, 569–575: "
        "laminar film condensation on a horizontal tube, h = 0.729[gρ_l(ρ_l−ρ_v)h'_fg k_l³/(μ_l ΔT D)]^¼, with "
        "Rohsenow, W. M. (1956) Trans. ASME 78, 1645–1648: h'_fg = h_fg + 0.68 c_p,l ΔT; as in Incropera & "
        "DeWitt, Fundamentals of Heat and Mass Transfer, ch. 10"
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
    # Churchill & Chu (1975) vertical plate: data 0.1 <= Ra_L <= 1e12. A vertical cylinder is a plate
    # when D/L >= 35/Gr_L^(1/4) (Incropera & DeWitt §9.6.1): group D_Gr_quarter_over_L = (D/L)·Gr_L^(1/4).
    "churchill_chu_vertical": {"Ra": (0.1, 1.0e12), "D_Gr_quarter_over_L": (35.0, math.inf)},
    # Nusselt (1916) laminar film: film Reynolds number 4Γ/μ_l below 1800 (Incropera & DeWitt ch. 10,
    # the laminar-wavy to turbulent transition; Γ per unit length of tube on each side).
    "film_condensation": {"Re_film": (0.0, 1800.0)},
    # VDI Heat Atlas (2010) G1 laminar equations: laminar flow Re <= 2300. The Prandtl range
    # 0.1 <= Pr <= 1000 for the simultaneous-entry term is quoted from memory.
    "laminar_entry": {"Re": (0.0, RE_LAMINAR_MAX), "Pr": (0.1, 1000.0)},
    # Hagen–Poiseuille: laminar flow, Re <= 2300 (common practice for the upper limit).
    "laminar_friction": {"Re": (0.0, RE_LAMINAR_MAX)},
    # Gnielinski (1995) / VDI Heat Atlas (2010) G1: the blend covers 2300 <= Re <= 1e4.
    "transition_blend": {"Re": (RE_LAMINAR_MAX, RE_TURBULENT_MIN)},
    # Alduchov & Eskridge (1996): their Magnus constants (AERK) over water for −40 °C <= t <= 50 °C, saturation
    # vapour pressure within 0.4 % there. Group T_air_K: the air temperature in kelvin.
    "dew_point": {"T_air_K": (233.15, 323.15)},
    # Colebrook (1939): turbulent flow; the Re and roughness span of the Moody (1944) chart.
    "colebrook": {"Re": (RE_COLEBROOK_MIN, 1.0e8), "relative_roughness": (0.0, 0.05)},
    # Property-ratio corrections (see PROPERTY_RATIO_RANGES): liquids μ_b/μ_w for laminar cells (Sieder & Tate),
    # Pr_b/Pr_w for turbulent cells (Gnielinski); gases T_b/T_w for turbulent cells (VDI G1).
    "property_ratio_liquid": {
        "mu_ratio": PROPERTY_RATIO_RANGES["mu_ratio"],
        "Pr_ratio": PROPERTY_RATIO_RANGES["Pr_ratio"],
    },
    "property_ratio_gas": {"T_ratio": PROPERTY_RATIO_RANGES["T_ratio"]},
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
    r"""Darcy friction factor for every regime of pipe flow.

    * Re <= 2300: laminar, f = 64/Re (Hagen–Poiseuille, closed form).
    * Re >= 4000: Colebrook–White (1939), solved; see :func:`colebrook`.
    * 2300 < Re < 4000: Churchill's (1977) all-regime equation,

      .. math::
          f = 8\left[\left(\frac{8}{Re}\right)^{12} + (A + B)^{-3/2}\right]^{1/12},\quad
          A = \left[2.457 \ln\frac{1}{(7/Re)^{0.9} + 0.27\,\varepsilon/D}\right]^{16},\quad
          B = \left(\frac{37530}{Re}\right)^{16}

      scaled so that f is continuous where the regimes meet: Churchill's curve starts its rise before
      Re = 2300 and lies 10.8 % above 64/2300 there, and Colebrook at 4000 lies 1.7–3 % below it
      (ε/D <= 0.05). The first ratio is faded out linearly over 2300 <= Re <= 2500, the second faded in
      linearly over 2500 <= Re <= 4000. So f equals 64/Re at 2300 and Colebrook at 4000, Churchill
      exactly at 2500, and lies within 2 % of Churchill (3 % for ε/D > 1e-3) from 2500 to 4000; between 2300
      and 2500 it rises from 64/2300 onto Churchill's curve (up to 9.8 % below it at 2300).
      Friction in this range depends on the inlet and on disturbances; the solver flags the regime.

    Parameters
    ----------
    Re : array_like — Reynolds number based on the bore [-], must be > 0
    relative_roughness : array_like — ε/D [-], >= 0 (ignored in laminar flow)

    Returns
    -------
    f : ndarray — Darcy friction factor [-]

    Validity
    --------
    Laminar: Re <= 2300. Colebrook: as :func:`colebrook`. Transition: as Churchill (1977), no stated range.

    Examples
    --------
    Laminar, f = 64/Re (Hagen–Poiseuille): 64/1000 = 0.064; turbulent, the
    Colebrook value above (fluids: 0.018513866 at Re = 1e5, ε/D = 1e-4); in the transition at
    Re = 2500, Churchill (1977), ``fluids.friction.Churchill_1977(2500, 1e-4)`` = 0.0351513:

    >>> float(friction_factor(1000.0, 1e-4))
    0.064
    >>> round(float(friction_factor(1e5, 1e-4)), 6)
    0.018514
    >>> round(float(friction_factor(2500.0, 1e-4)), 5)
    0.03515
    """
    Re = _require_positive("Re", Re)
    eD = _require_non_negative("relative_roughness", relative_roughness)
    # whole arrays in one regime skip the others
    re_min, re_max = float(np.min(Re)), float(np.max(Re))
    if re_max <= RE_LAMINAR_MAX:
        return 64.0 / Re
    if re_min >= RE_COLEBROOK_MIN:
        return _colebrook(Re, eD)
    Re, eD = np.broadcast_arrays(Re, eD)
    f = np.empty(Re.shape)
    laminar = Re <= RE_LAMINAR_MAX
    turbulent = Re >= RE_COLEBROOK_MIN
    between = ~(laminar | turbulent)
    f[laminar] = 64.0 / Re[laminar]
    if turbulent.any():
        f[turbulent] = _colebrook(Re[turbulent], eD[turbulent])
    f[between] = _friction_transition(Re[between], eD[between])
    return f


#: End of the fade that takes Churchill's (1977) curve down to 64/Re at Re = 2300 (see friction_factor).
RE_FRICTION_FADE = 2500.0


def _churchill_1977(Re, eD):
    """Churchill (1977) all-regime Darcy friction factor on checked arrays (see friction_factor)."""
    # integer powers by squaring and x^(1/12) as sqrt(sqrt(cbrt(x))): several times faster than np.power
    a = np.log((7.0 / Re) ** 0.9 + 0.27 * eD)
    a *= -2.457
    a *= a
    a *= a
    a *= a
    a *= a  # A = (2.457 ln(...))^16
    b = 37530.0 / Re
    b *= b
    b *= b
    b *= b
    b *= b  # B = (37530/Re)^16
    a += b
    a *= np.sqrt(a)  # (A + B)^1.5
    laminar = 8.0 / Re
    laminar *= laminar * laminar
    laminar *= laminar
    laminar *= laminar  # (8/Re)^12
    laminar += 1.0 / a
    return 8.0 * np.sqrt(np.sqrt(np.cbrt(laminar)))


@functools.lru_cache(maxsize=256)
def _transition_end_ratios(relative_roughness: float) -> tuple[float, float]:
    """(64/2300, Colebrook at 4000) over Churchill at the same Re and ε/D; cached per roughness."""
    eD = np.asarray(relative_roughness)
    low = (64.0 / RE_LAMINAR_MAX) / float(_churchill_1977(RE_LAMINAR_MAX, eD))
    high = float(_colebrook(np.asarray(RE_COLEBROOK_MIN), eD)) / float(_churchill_1977(RE_COLEBROOK_MIN, eD))
    return low, high


def _friction_transition(Re, eD):
    """Churchill (1977) scaled to meet 64/Re at 2300 and Colebrook at 4000 (see friction_factor)."""
    if Re.size == 0:
        return Re
    smallest, largest = float(np.min(eD)), float(np.max(eD))
    if smallest == largest:
        low, high = _transition_end_ratios(smallest)
    else:
        values, where = np.unique(eD, return_inverse=True)  # one roughness per segment: few distinct values
        ends = np.array([_transition_end_ratios(float(v)) for v in values])[where.reshape(eD.shape)]
        low, high = ends[..., 0], ends[..., 1]
    fade_low = _clip((RE_FRICTION_FADE - Re) * (1.0 / (RE_FRICTION_FADE - RE_LAMINAR_MAX)), 0.0, 1.0)
    fade_high = _clip((Re - RE_FRICTION_FADE) * (1.0 / (RE_COLEBROOK_MIN - RE_FRICTION_FADE)), 0.0, 1.0)
    scale = 1.0 + fade_low * (low - 1.0) + fade_high * (high - 1.0)
    return _churchill_1977(Re, eD) * scale


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


#: Constants of the VDI Heat Atlas (2010) G1 laminar mean-value equations per wall condition:
#: (fully developed Nu_1, offset b of the thermal-entry term, constant a of the thermal-entry term).
#: VDI prints Nu_1 = 3.66; 3.657 is the unrounded value of Shah & London (1978) (0.08 % apart).
_LAMINAR_MEAN = {"T": (3.657, 0.7, 1.615), "q": (48.0 / 11.0, 0.6, 1.953)}
#: Smallest c1² + c1·c0 + c0² of the mean entrance factor: its value at x0 = x1 = X_OVER_D_MIN.
_S_MIN = 3.0 * X_OVER_D_MIN ** (2.0 / 3.0)
#: 0.924⁶: the 'q' developing-velocity term 0.924 Pr^(1/3) (Re D/L)^(1/2), cubed, is Gz·sqrt(0.924⁶ Gz / Pr).
_N3_Q = 0.924**6


def _laminar_constants(boundary, Pr, developing):
    """(Nu_1, b, a, k) for the wall condition(s), k such that Nu_3³ = Gz·sqrt(k·Gz); k is None
    where no cell has a developing velocity profile. ``boundary`` is 'T', 'q' or an array of them."""
    if isinstance(boundary, str):
        nu_1, b, a = _LAMINAR_MEAN[_boundary(boundary)]
        k = None
        developing = np.asarray(developing, dtype=bool)
        if developing.ndim or developing:
            k = 2.0 / (1.0 + 22.0 * Pr) if boundary == "T" else _N3_Q / Pr
    else:
        kinds = np.asarray(boundary)
        is_T = kinds == "T"
        bad = ~(is_T | (kinds == "q"))
        if bad.any():
            _boundary(str(kinds[bad].flat[0]))  # raises, naming the value
        nu_1 = np.where(is_T, _LAMINAR_MEAN["T"][0], _LAMINAR_MEAN["q"][0])
        b = np.where(is_T, _LAMINAR_MEAN["T"][1], _LAMINAR_MEAN["q"][1])
        a = np.where(is_T, _LAMINAR_MEAN["T"][2], _LAMINAR_MEAN["q"][2])
        developing = np.asarray(developing, dtype=bool)
        k = None
        if developing.ndim or developing:
            k = np.where(is_T, 2.0 / (1.0 + 22.0 * Pr), _N3_Q / Pr)
    if k is not None and developing.ndim:
        k = np.where(developing, k, 0.0)
    return nu_1, b, a, k


def _laminar_mean_terms(gz, nu_1, b, a, k):
    """VDI G1 mean Nusselt number over [0, L] at Gz = Re Pr D/L (finite, >= 0): returns
    (Nu_m, Nu_m − Nu_1, a·Gz^(1/3), Nu_3³), the differences formed without cancellation."""
    au = a * np.cbrt(gz)
    # b³ + (au − b)³ = au·(au² − 3b·au + 3b²); the bracket is >= 0.75 b², so no cancellation
    delta = au - 3.0 * b
    delta *= au
    delta += 3.0 * b * b
    delta *= au
    n3 = 0.0
    if k is not None:
        n3 = gz * np.sqrt(gz * k)
        delta += n3
    nu_m = np.cbrt(nu_1 * nu_1 * nu_1 + delta)
    excess = delta / (nu_m * nu_m + nu_m * nu_1 + nu_1 * nu_1)  # Nu_m − Nu_1 = delta / (sum of squares)
    return nu_m, excess, au, n3


def _laminar_local(Re, Pr, d_over_x, consts):
    """d(x·Nu_m)/dx of the VDI mean-value equation at D/x (>= 0; 0 means fully developed)."""
    nu_1, b, a, k = consts
    nu_m, _, au, n3 = _laminar_mean_terms(Re * Pr * d_over_x, nu_1, b, a, k)
    # x dNu_m/dx = −[a u (a u − b)² + (3/2) Nu_3³] / (3 Nu_m²), u = Gz^(1/3)
    d = au - b
    d *= d
    d *= au
    d += 1.5 * n3
    d /= 3.0 * nu_m * nu_m
    return nu_m - d


def _laminar_x_excess(Re, Pr, x, consts):
    """(x/D)·(Nu_m(x) − Nu_1) at x/D; 0 where x is 0 (the limit) or infinite (dropped: the
    caller divides it by an infinite cell length)."""
    nu_1, b, a, k = consts
    ordinary = (x > 0.0) & (x < np.inf)
    if ordinary.all():
        _, excess, _, _ = _laminar_mean_terms(Re * Pr / x, nu_1, b, a, k)
        return excess * x
    if not ordinary.any():
        return np.zeros(np.broadcast(Re, Pr, x).shape)
    x_safe = np.where(ordinary, x, 1.0)
    _, excess, _, _ = _laminar_mean_terms(Re * Pr / x_safe, nu_1, b, a, k)
    excess *= x_safe
    return np.where(ordinary, excess, 0.0)


def _gnielinski_developed(Re, Pr, f_darcy, cbrt_Pr):
    """Gnielinski (1976), fully developed, on checked arrays (see nusselt_gnielinski)."""
    f8 = f_darcy / 8.0
    return f8 * (Re - 1000.0) * Pr / (1.0 + 12.7 * np.sqrt(f8) * (cbrt_Pr * cbrt_Pr - 1.0))


def _local_entrance(d_over_x):
    """Local turbulent entrance factor 1 + ⅓ (D/x)^(2/3) = d/dx of x·[1 + (D/x)^(2/3)]."""
    if np.ndim(d_over_x) == 0 and d_over_x == 0.0:
        return 1.0
    c = np.cbrt(d_over_x)
    return 1.0 + (1.0 / 3.0) * (c * c)


def _cube_roots(x0, x1):
    """(x0^(1/3), x1^(1/3)). A line's cells follow one another (x0 of a cell is x1 of the one before,
    except where an entry restarts), so the roots of x1 serve for x0 and only the restarts need their own."""
    c1 = np.cbrt(x1)
    if x0.ndim == 1 and x0.shape == x1.shape and x0.size > 1:
        c0 = np.empty_like(c1)
        c0[1:] = c1[:-1]
        restart = np.flatnonzero(x0[1:] != x1[:-1]) + 1
        c0[0] = np.cbrt(x0[0])
        if restart.size:
            c0[restart] = np.cbrt(x0[restart])
        return c0, c1
    return np.cbrt(x0), c1


def _mean_entrance(x0, x1):
    """Cell mean of the local entrance factor over [x0, x1] (in bores):
    [x·(1 + x^(-2/3))] from x0 to x1, divided by x1 − x0, = 1 + 1/(c1² + c1·c0 + c0²), c = x^(1/3).
    Exact, free of cancellation; 1 when x1 is infinite; the local factor when x0 = x1."""
    c0, c1 = _cube_roots(x0, x1)
    s = c1 + c0
    s *= c1  # c1·(c1 + c0), not c1² + c1·c0: finite times zero where x1 = inf and x0 = 0
    s += c0 * c0
    return 1.0 + 1.0 / np.maximum(s, _S_MIN)  # x0 = x1 = 0: the local factor at X_OVER_D_MIN


def _in_regimes(Re, Pr, f_darcy, relative_roughness, laminar, entrance):
    """Gnielinski's (1995) regimes: laminar(Re) gives the laminar Nusselt number at Re (same cells),
    entrance() the turbulent entrance factor of the cells (called only if some cell needs it)."""
    # whole arrays in one regime skip the others (same values: the blend weight is 0 or 1 there)
    re_min, re_max = float(np.min(Re)), float(np.max(Re))
    if re_max <= RE_LAMINAR_MAX:
        return laminar(Re)
    cbrt_Pr = np.cbrt(Pr)
    if re_min >= RE_TURBULENT_MIN:
        return _gnielinski_developed(Re, Pr, np.asarray(f_darcy, dtype=float), cbrt_Pr) * entrance()
    nu_laminar = laminar(np.minimum(Re, RE_LAMINAR_MAX))
    turbulent = Re >= RE_TURBULENT_MIN
    relative_roughness = np.asarray(relative_roughness, dtype=float)
    if relative_roughness.ndim == 0:
        f_at_1e4 = _colebrook_at_1e4(float(relative_roughness))  # one value: skip the array machinery
    else:
        # a line has one roughness per segment: solve Colebrook once per distinct value
        values, where = np.unique(relative_roughness, return_inverse=True)
        f_at_1e4 = np.array([_colebrook_at_1e4(float(v)) for v in values])[where.reshape(relative_roughness.shape)]
    f_turb = np.where(turbulent, f_darcy, f_at_1e4)
    nu_turbulent = _gnielinski_developed(np.maximum(Re, RE_TURBULENT_MIN), Pr, f_turb, cbrt_Pr) * entrance()
    gamma = _clip((Re - RE_LAMINAR_MAX) * (1.0 / (RE_TURBULENT_MIN - RE_LAMINAR_MAX)), 0.0, 1.0)
    nu_turbulent -= nu_laminar  # both have the full shape: each carries Re and the cell positions
    nu_turbulent *= gamma
    nu_turbulent += nu_laminar
    return nu_turbulent


def nusselt_laminar(Re, Pr, x_over_D, boundary, developing=True):
    r"""Local Nusselt number of laminar pipe flow: the x-derivative of the VDI G1 mean-value equation.

    Method: Gnielinski's mean-value equations, VDI Heat Atlas, 2nd ed. (2010), chapter G1
    (Nu_m over a heated length L from the inlet, :math:`Gz = Re\,Pr\,D/L`):

    .. math::
        Nu_m = \left[Nu_1^3 + b^3 + (a\,Gz^{1/3} - b)^3 + Nu_3^3\right]^{1/3}

    * uniform wall temperature (``'T'``): :math:`Nu_1 = 3.657`, :math:`b = 0.7`, :math:`a = 1.615`,
      :math:`Nu_3 = \left(\frac{2}{1+22Pr}\right)^{1/6} Gz^{1/2}`;
    * uniform heat flux (``'q'``): :math:`Nu_1 = 48/11 = 4.364`, :math:`b = 0.6`, :math:`a = 1.953`,
      :math:`Nu_3 = 0.924\,Pr^{1/3}\,(Re\,D/L)^{1/2}`.

    :math:`Nu_1` are the fully developed values of Shah & London (1978) (VDI prints 3.66);
    the second term is the Lévêque thermal-entry asymptote, the third (``developing=True``)
    the developing velocity profile of a flow that starts at the inlet with a flat profile.
    The local value returned here is the one whose integral is that mean,
    :math:`Nu_x = d(x\,Nu_m)/dx = Nu_m - [a u (a u - b)^2 + \tfrac{3}{2} Nu_3^3] / (3 Nu_m^2)`
    with :math:`u = Gz^{1/3}` at L = x, so that cell means of it are exactly
    :func:`nusselt_inside_mean` and node values agree with cell values.

    Deviations (tests/test_inside_published.py), x* = x/(D Re Pr): against the exact Graetz series
    (developed velocity, ``developing=False``) the mean is within 0.5 % ('T') and 0.9 % ('q') for
    1e-3 <= x* <= 1, the local value within 1.3 % and 1.4 %; the local 'T' value dips up to 1.3 %
    below 3.657 near x* = 0.1–0.2 and rises back to it (a property of the published fit; the exact
    local value never falls below 3.657). Simultaneously developing, 'T': within 2 % of Baehr &
    Stephan's mean-value equation over most of 0.7 <= Pr <= 1e4, 1 <= Gz <= 1e5, at most −4.6 %
    (Pr 0.7, Gz 10) and −3.0 % (Pr 100, Gz 1e5) — the spread between two published fits.

    Parameters
    ----------
    Re : array_like — Reynolds number based on the bore [-], > 0
    Pr : array_like — Prandtl number [-], > 0
    x_over_D : array_like — distance from where the thermal entry starts / bore [-], >= 0;
        clipped to at least ``X_OVER_D_MIN`` = 1e-6 (the entry terms are infinite at x = 0).
        ``np.inf`` gives the fully developed value.
    boundary : {'T', 'q'} or array of them — uniform wall temperature or uniform heat flux
    developing : bool or array of bool — True: velocity and temperature develop together from the
        inlet (the Nu_3 term); False: thermal entry only, the velocity profile already developed

    Returns
    -------
    Nu : ndarray — local Nusselt number based on the bore [-]

    Validity
    --------
    Laminar, Re <= 2300; 0.1 <= Pr <= 1000 (``VALIDITY['laminar_entry']``).

    Examples
    --------
    Fully developed (x/D -> ∞), the values of Shah & London (1978): 3.657 for a
    uniform wall temperature and 48/11 = 4.364 for a uniform heat flux:

    >>> round(float(nusselt_laminar(1000.0, 5.0, np.inf, "T")), 3)
    3.657
    >>> round(float(nusselt_laminar(1000.0, 5.0, np.inf, "q")), 3)
    4.364

    Near the inlet the thermal-entry term dominates; Lévêque's asymptote (Shah & London 1978)
    is 1.077 x*^(-1/3) − 0.7 = 49.29 at x* = 1e-5:

    >>> round(float(nusselt_laminar(1000.0, 1.0, 1e-5 * 1000.0, "T", developing=False)), 1)
    49.3
    """
    Re = _require_positive("Re", Re)
    Pr = _require_positive("Pr", Pr)
    d_over_x = 1.0 / _x_over_d(x_over_D)
    return _laminar_local(Re, Pr, d_over_x, _laminar_constants(boundary, Pr, developing))


def nusselt_gnielinski(Re, Pr, f_darcy, x_over_D=None):
    r"""Gnielinski (1976) turbulent pipe-flow Nusselt number, optionally local in the entrance.

    .. math::
        Nu = \frac{(f/8)(Re - 1000)\,Pr}{1 + 12.7\sqrt{f/8}\,(Pr^{2/3} - 1)}
        \left[1 + \tfrac{1}{3}\left(\frac{D}{x}\right)^{2/3}\right]

    The mean entrance factor over a length L is :math:`1 + (D/L)^{2/3}` (VDI Heat Atlas 2010, G1);
    the bracket is its local form, :math:`d/dx\{x[1 + (D/x)^{2/3}]\}`, so its mean over [0, L] is
    exactly the published factor. Without ``x_over_D`` the factor is 1 (fully developed).

    Parameters
    ----------
    Re : array_like — Reynolds number based on the bore [-]
    Pr : array_like — Prandtl number [-]
    f_darcy : array_like — Darcy friction factor [-] (e.g. from :func:`friction_factor`)
    x_over_D : array_like or None — distance from the inlet / bore [-], >= 0,
        clipped to at least ``X_OVER_D_MIN``; ``None`` or ``np.inf`` for fully developed flow

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
    return _gnielinski_developed(Re, Pr, np.asarray(f_darcy, dtype=float), np.cbrt(Pr)) * _local_entrance(d_over_x)


def nusselt_inside(Re, Pr, f_darcy, x_over_D, boundary, relative_roughness=0.0, developing=True):
    r"""Local inside Nusselt number of a circular pipe in every flow regime.

    * Re <= 2300: :func:`nusselt_laminar` (the local value of the VDI G1 mean-value equation).
    * Re >= 1e4: :func:`nusselt_gnielinski` with ``f_darcy`` and the local
      entrance factor 1 + ⅓(D/x)^(2/3).
    * 2300 < Re < 1e4: Gnielinski's (1995) transition blend, as in VDI Heat
      Atlas (2010) G1:

      .. math::
          Nu = (1-\gamma)\,Nu_{lam}(Re{=}2300) + \gamma\,Nu_{turb}(Re{=}10^4),\quad
          \gamma = \frac{Re - 2300}{10^4 - 2300}

      Both end values at the same x/D, Pr and boundary condition;
      :math:`Nu_{turb}(10^4)` uses f = ``friction_factor(1e4, relative_roughness)``.
      At Re = 1e4 it meets the turbulent branch exactly when ``f_darcy`` there is also
      ``friction_factor(1e4, relative_roughness)``.

    Every branch is d(x·Nu_m)/dx of its published mean-value equation, so the mean of
    this local value over a cell is :func:`nusselt_inside_mean`.

    Parameters
    ----------
    Re : array_like — Reynolds number based on the bore [-], > 0
    Pr : array_like — Prandtl number [-], > 0
    f_darcy : array_like — Darcy friction factor at Re [-] (used only where Re > 2300)
    x_over_D : array_like — distance from where the entry starts / bore [-], >= 0;
        clipped to at least ``X_OVER_D_MIN``; ``np.inf`` for fully developed
    boundary : {'T', 'q'} or array of them — laminar wall condition: uniform temperature or heat
        flux (turbulent Nusselt numbers do not depend on it noticeably for Pr > 0.5)
    relative_roughness : array_like — ε/D [-] for the friction factor at Re = 1e4
    developing : bool or array of bool — laminar flow only: True, the velocity profile develops
        from the inlet with the temperature; False, it arrives developed (thermal entry only)

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
    Re = _require_positive("Re", Re)
    Pr = _require_positive("Pr", Pr)
    d_over_x = 1.0 / _x_over_d(x_over_D)
    consts = _laminar_constants(boundary, Pr, developing)
    return _in_regimes(
        Re, Pr, f_darcy, relative_roughness,
        lambda re: _laminar_local(re, Pr, d_over_x, consts), lambda: _local_entrance(d_over_x),
    )


def nusselt_inside_mean(Re, Pr, f_darcy, x0_over_D, x1_over_D, boundary, relative_roughness=0.0, developing=True):
    r"""Mean inside Nusselt number over a cell [x0, x1] of a circular pipe, every flow regime.

    From the published mean-value equations :math:`Nu_m(L)` (mean over [0, L] from where the
    entry starts), exactly:

    .. math::
        \overline{Nu}_{[x_0, x_1]} = \frac{x_1\,Nu_m(x_1) - x_0\,Nu_m(x_0)}{x_1 - x_0}

    * laminar: the VDI Heat Atlas (2010) G1 mean-value equations (see :func:`nusselt_laminar`),
      evaluated as :math:`Nu_1 + [x_1 (Nu_m - Nu_1)(x_1) - x_0 (Nu_m - Nu_1)(x_0)]/(x_1 - x_0)`
      with :math:`Nu_m - Nu_1` formed without cancellation, so long, short cells stay exact;
    * turbulent: Gnielinski (1976) with the mean entrance factor :math:`1 + (D/L)^{2/3}`
      (VDI G1), which over a cell is :math:`1 + 1/(c_1^2 + c_1 c_0 + c_0^2)`,
      :math:`c = (x/D)^{1/3}`;
    * 2300 < Re < 1e4: Gnielinski's (1995) linear blend of the two means (see :func:`nusselt_inside`).

    The result does not depend on how a length is cut into cells: the length-weighted mean of
    the cell values over [0, L] is :math:`Nu_m(L)`, and as cells shrink the cell value tends to
    the local value of :func:`nusselt_inside`.

    Parameters
    ----------
    Re : array_like — Reynolds number based on the bore [-], > 0
    Pr : array_like — Prandtl number [-], > 0
    f_darcy : array_like — Darcy friction factor at Re [-] (used only where Re > 2300)
    x0_over_D : array_like — start of the cell, measured from where the entry starts, / bore [-], >= 0
    x1_over_D : array_like — end of the cell / bore [-], > x0_over_D; ``x0 = x1 = np.inf`` means
        fully developed (also any x1 = inf); x1 = x0 gives the local value there
    boundary : {'T', 'q'} or array of them — laminar wall condition: uniform temperature or heat flux
    relative_roughness : array_like — ε/D [-] for the friction factor at Re = 1e4
    developing : bool or array of bool — laminar flow only: True, the velocity profile develops
        from the inlet with the temperature; False, it arrives developed (thermal entry only)

    Returns
    -------
    Nu : ndarray — mean Nusselt number of the cell based on the bore [-]

    Validity
    --------
    As :func:`nusselt_inside`.

    Examples
    --------
    Over the first 10 bores of turbulent flow the mean entrance factor is 1 + 10^(-2/3) = 1.2154
    (VDI Heat Atlas G1) on Gnielinski's 254.6268 (``ht`` example, Re = 1e5, Pr = 1.2, f = 0.0185):

    >>> round(float(nusselt_inside_mean(1e5, 1.2, 0.0185, 0.0, 10.0, "q")), 2)
    309.48

    Fully developed laminar flow, uniform wall temperature: 3.657 (Shah & London 1978):

    >>> round(float(nusselt_inside_mean(1000.0, 5.0, 0.064, np.inf, np.inf, "T")), 3)
    3.657
    """
    Re = _require_positive("Re", Re)
    Pr = _require_positive("Pr", Pr)
    x0 = _require_non_negative("x0_over_D", x0_over_D)
    x1 = _require_non_negative("x1_over_D", x1_over_D)
    shorter = x1 < x0
    if np.any(shorter):
        shorter = np.broadcast_to(shorter, np.broadcast(x0, x1).shape)
        raise CorrelationInputError(
            "x1_over_D", _first_bad(x1, shorter), f"must not be less than x0_over_D = {_first_bad(x0, shorter)!r}"
        )
    consts = _laminar_constants(boundary, Pr, developing)
    same = x1 == x0  # zero-length cells (and inf = inf): the local value there
    any_same = bool(np.any(same))
    with np.errstate(invalid="ignore"):  # inf − inf where x0 = x1 = inf: replaced by 1 below
        span = x1 - x0
    if any_same:
        span = np.where(same, 1.0, span)
    x0_is_zero = not np.any(x0)

    def laminar(re):
        nu = _laminar_x_excess(re, Pr, x1, consts)
        if not x0_is_zero:
            nu = nu - _laminar_x_excess(re, Pr, x0, consts)
        nu = nu / span
        nu += consts[0]
        if any_same and np.any(same & (x0 < np.inf)):
            local = _laminar_local(re, Pr, 1.0 / np.maximum(x0, X_OVER_D_MIN), consts)
            nu = np.where(same, local, nu)
        return nu

    return _in_regimes(Re, Pr, f_darcy, relative_roughness, laminar, lambda: _mean_entrance(x0, x1))


def _ratio_log(name_bulk, bulk, name_wall, wall, low, high):
    """ln of bulk/wall clipped to [low, high]; both values required (> 0) for the cells that use them."""
    if bulk is None or wall is None:
        missing = name_bulk if bulk is None else name_wall
        raise CorrelationInputError(missing, None, "is needed for the property-ratio correction of these cells")
    ratio = _require_positive(name_bulk, bulk) / _require_positive(name_wall, wall)
    return np.log(_clip(ratio, low, high))


def wall_property_factor(Re, Pr_bulk, Pr_wall, mu_bulk, mu_wall, T_bulk_K, T_wall_K, gas):
    r"""Factor on the constant-property inside Nusselt number for property variation across the film.

    Each correlation with the correction its own source recommends:

    * laminar liquid (VDI G1 mean-value equations): Sieder & Tate (1936),
      :math:`(\mu_b/\mu_w)^{0.14}`, as Kays & Crawford (1993) also recommend;
    * turbulent liquid (Gnielinski 1976; VDI Heat Atlas 2010, G1): :math:`(Pr_b/Pr_w)^{0.11}`;
    * turbulent gas (Gnielinski; VDI Heat Atlas G1): :math:`(T_b/T_w)^{0.45}` (heating and cooling);
    * laminar gas: 1 — Kays & Crawford (1993) give exponent 0 for heating and cooling
      (the variable-property laminar solutions of Worsøe-Schmidt);
    * 2300 < Re < 1e4: the laminar and turbulent factors weighted like Gnielinski's (1995) Nusselt
      blend, :math:`(1-\gamma) K_{lam} + \gamma K_{turb}`, γ = (Re − 2300)/(1e4 − 2300).

    Each ratio is clipped to the range its source covers (``PROPERTY_RATIO_RANGES``, the same numbers as
    ``VALIDITY['property_ratio_liquid']`` and ``VALIDITY['property_ratio_gas']``): beyond it the factor
    stays at its value at the bound, and the solver flags the cell.

    Parameters
    ----------
    Re : array_like — Reynolds number based on the bore, bulk properties [-], > 0
    Pr_bulk, Pr_wall : array_like or None — Prandtl number at the bulk and at the inner-wall temperature [-], > 0
        (needed for turbulent and transitional liquid cells)
    mu_bulk, mu_wall : array_like or None — dynamic viscosity at the bulk and at the inner-wall temperature
        [Pa s], > 0 (needed for laminar and transitional liquid cells)
    T_bulk_K, T_wall_K : array_like or None — bulk and inner-wall temperature [K], > 0 (needed for
        turbulent and transitional gas cells)
    gas : bool or array of bool — True where the fluid is a gas (vapour), False for a liquid

    Returns
    -------
    K : ndarray — factor on the Nusselt number (and film coefficient) [-]

    Validity
    --------
    Sieder & Tate: 0.0044 <= μ_b/μ_w <= 9.75; Gnielinski, liquids: 0.1 <= Pr_b/Pr_w <= 10;
    gases: 0.5 <= T_b/T_w <= 1.5 (turbulent), see ``PROPERTY_RATIO_RANGES``.

    Examples
    --------
    A viscous oil heated in laminar flow, bulk viscosity 9 times that at the wall: Sieder–Tate gives
    9^0.14 = 1.360 (``ht.wall_factor_Nu(9, 1, turbulent=False, liquid=True)`` gives the same,
    Kays & Crawford's exponent 0.14). At 18 times, beyond Sieder & Tate's 9.75, the factor is held
    at 9.75^0.14 = 1.376 rather than 18^0.14 = 1.499, and the cell is flagged:

    >>> round(float(wall_property_factor(500.0, None, None, 9.0e-2, 1.0e-2, None, None, False)), 3)
    1.36
    >>> round(float(wall_property_factor(500.0, None, None, 18.0e-2, 1.0e-2, None, None, False)), 3)
    1.376

    Air heated turbulently, bulk 300 K, wall 400 K: (300/400)^0.45 = 0.8786 (VDI Heat Atlas G1):

    >>> round(float(wall_property_factor(5e4, None, None, None, None, 300.0, 400.0, True)), 4)
    0.8786
    """
    Re = _require_positive("Re", Re)
    gas = np.asarray(gas, dtype=bool)
    all_gas, any_gas = bool(np.all(gas)), bool(np.any(gas))
    re_min, re_max = float(np.min(Re)), float(np.max(Re))
    laminar_part = re_min < RE_TURBULENT_MIN  # some cell has a laminar share
    turbulent_part = re_max > RE_LAMINAR_MAX
    lo_mu, hi_mu = PROPERTY_RATIO_RANGES["mu_ratio"]
    lo_pr, hi_pr = PROPERTY_RATIO_RANGES["Pr_ratio"]
    lo_t, hi_t = PROPERTY_RATIO_RANGES["T_ratio"]

    log_laminar = 0.0  # laminar gas: exponent 0
    if laminar_part and not all_gas:
        log_laminar = 0.14 * _ratio_log("mu_bulk", mu_bulk, "mu_wall", mu_wall, lo_mu, hi_mu)
        if any_gas:
            log_laminar = np.where(gas, 0.0, log_laminar)
    if not turbulent_part:
        return np.exp(log_laminar) * np.ones_like(Re)
    log_turbulent = 0.0
    if not all_gas:
        log_turbulent = 0.11 * _ratio_log("Pr_bulk", Pr_bulk, "Pr_wall", Pr_wall, lo_pr, hi_pr)
    if any_gas:
        log_gas = 0.45 * _ratio_log("T_bulk_K", T_bulk_K, "T_wall_K", T_wall_K, lo_t, hi_t)
        log_turbulent = log_gas if all_gas else np.where(gas, log_gas, log_turbulent)
    k_turbulent = np.exp(log_turbulent) * np.ones_like(Re)
    if re_min >= RE_TURBULENT_MIN:
        return k_turbulent
    k_laminar = np.exp(log_laminar)
    gamma = _clip((Re - RE_LAMINAR_MAX) * (1.0 / (RE_TURBULENT_MIN - RE_LAMINAR_MAX)), 0.0, 1.0)
    return k_laminar + gamma * (k_turbulent - k_laminar)


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
    # fractional powers through cbrt/sqrt and exp/log: the same values, about 20 % faster than np.power
    prandtl = np.cbrt(0.4 / Pr)
    prandtl *= prandtl
    prandtl += 1.0
    prandtl = np.sqrt(np.sqrt(prandtl))  # [1 + (0.4/Pr)^(2/3)]^(1/4)
    with np.errstate(divide="ignore"):  # Re = 0: log 0 = -inf, exp(-inf) = 0, as 0^(5/8)
        large = np.exp(0.625 * np.log(Re * (1.0 / 282000.0)))
    large = np.exp(0.8 * np.log1p(large))  # [1 + (Re/282000)^(5/8)]^(4/5)
    return 0.3 + 0.62 * np.sqrt(Re) * np.cbrt(Pr) / prandtl * large


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
    return np.cbrt(Nu_forced * Nu_forced * Nu_forced + Nu_natural * Nu_natural * Nu_natural)  # x*x*x: faster than x**3


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


def nusselt_churchill_chu_vertical(Ra_L, Pr):
    r"""Churchill & Chu (1975): natural convection from an isothermal vertical plate, all Ra.

    .. math::
        Nu_L = \left\{0.825 + \frac{0.387\,Ra_L^{1/6}}
        {\left[1 + (0.492/Pr)^{9/16}\right]^{8/27}}\right\}^2

    One equation for the laminar and the turbulent boundary layer (the mean over the height).
    A vertical cylinder (a riser) behaves as a vertical plate of its height when its boundary
    layer is thin against its radius, i.e. when D/L >= 35 / Gr_L^(1/4) (Incropera & DeWitt,
    Fundamentals of Heat and Mass Transfer, §9.6.1, after Sparrow & Gregg 1956); a thinner
    cylinder loses more than the plate equation says (curvature thins the boundary layer), so
    the plate value is then low. ``VALIDITY['churchill_chu_vertical']`` holds both limits
    (group ``D_Gr_quarter_over_L`` = (D/L)·Gr_L^(1/4) >= 35).

    Parameters
    ----------
    Ra_L : array_like — Rayleigh number based on the height L, g β ΔT L³/(ν α) [-], >= 0
    Pr : array_like — Prandtl number at the film temperature [-], > 0

    Returns
    -------
    Nu_L : ndarray — mean Nusselt number based on the height, h L / k [-]

    Validity
    --------
    0.1 <= Ra_L <= 1e12, all Pr (Churchill & Chu 1975 fitted data over this range; Incropera &
    DeWitt, eq. 9.26 of the 6th ed., from memory, apply it over the entire range of Ra_L); isothermal surface.

    Source: Churchill, S. W. & Chu, H. H. S. (1975) Correlating equations for laminar and
    turbulent free convection from a vertical plate. Int. J. Heat Mass Transfer 18, 1323–1329.

    Examples
    --------
    The ``ht`` documentation example ``Nu_vertical_plate_Churchill(Pr=0.69, Gr=2.63E9)``
    (Incropera & DeWitt, Example 9.2) gives 147.16185223770603; here Ra = Gr·Pr:

    >>> round(float(nusselt_churchill_chu_vertical(2.63e9 * 0.69, 0.69)), 4)
    147.1619
    """
    Ra_L = np.asarray(Ra_L, dtype=float)
    Pr = np.asarray(Pr, dtype=float)
    root = 0.825 + 0.387 * Ra_L ** (1.0 / 6.0) / (1.0 + (0.492 / Pr) ** (9.0 / 16.0)) ** (8.0 / 27.0)
    return root * root


def condensation_horizontal_tube(T_sat_K, T_wall_K, D_outer_m, rho_liquid, rho_vapour, h_fg,
                                 cp_liquid, k_liquid, mu_liquid):
    r"""Nusselt (1916) laminar film condensation of a pure saturated vapour on a horizontal tube.

    Mean coefficient over the tube's circumference, with Rohsenow's (1956) corrected latent heat
    (it counts the subcooling of the condensate film):

    .. math::
        h = 0.729\left[\frac{g\,\rho_l(\rho_l-\rho_v)\,h'_{fg}\,k_l^3}
        {\mu_l\,(T_{sat}-T_w)\,D}\right]^{1/4},\qquad
        h'_{fg} = h_{fg} + 0.68\,c_{p,l}\,(T_{sat}-T_w)

    Textbook form and practice: Incropera & DeWitt, Fundamentals of Heat and Mass Transfer,
    ch. 10 (6th ed. eqs. 10.41 and 10.35, numbers from memory; also Çengel, Heat Transfer,
    ch. 10): the liquid properties
    ρ_l, c_p,l, k_l, μ_l at the film temperature (T_sat + T_w)/2, ρ_v and h_fg at T_sat.

    Small and negative temperature differences (decided here, and why):

    * As T_sat − T_w -> 0 the film thins to nothing and h grows as (T_sat − T_w)^(−1/4), while
      the heat flux h·(T_sat − T_w) falls to zero as (T_sat − T_w)^(3/4). The difference is taken
      as at least ``CONDENSATION_DT_MIN_K`` = 1e-3 K so h stays finite; below that the flux
      still goes to zero (linearly), so nothing jumps.
    * T_w >= T_sat (the wall is as hot as or hotter than the steam): no vapour condenses and the
      coefficient returned is 0. What is left is natural convection of the vapour itself, two to
      three orders of magnitude weaker than condensation; taking it as zero means a fluid hotter
      than the steam gives no heat to it (a slight under-estimate of its cooling). With 0 the heat
      flux h·(T_sat − T_w) is continuous through T_w = T_sat (it is 0 on both sides), so an
      iteration on the wall temperature does not chatter there.

    Parameters
    ----------
    T_sat_K : array_like — saturation temperature of the vapour [K]
    T_wall_K : array_like — outer wall (condensing surface) temperature [K]
    D_outer_m : array_like — outer diameter of the tube [m], > 0
    rho_liquid, rho_vapour : array_like — densities of the condensate (film temperature) and of the
        saturated vapour [kg/m³]
    h_fg : array_like — latent heat at T_sat [J/kg], > 0
    cp_liquid, k_liquid, mu_liquid : array_like — condensate specific heat [J/(kg K)], conductivity
        [W/(m K)] and dynamic viscosity [Pa s] at the film temperature

    Returns
    -------
    h : ndarray — mean condensing-film coefficient on the outer surface [W/(m² K)]; 0 where
        T_wall_K >= T_sat_K

    Validity
    --------
    Laminar condensate film: film Reynolds number Re_δ = 4Γ/μ_l < 1800 with Γ the condensate
    per unit length of tube on each side (Re_δ = 2 ṁ'/μ_l; ``VALIDITY['film_condensation']``; on a
    single horizontal tube it is rarely exceeded). Quiescent, pure vapour: vapour shear is
    ignored, and non-condensable gas (air in the steam) lowers h far below this value. A wavy
    film (Re_δ above ~30) condenses somewhat better than this equation says (a conservative
    error for heating).

    Examples
    --------
    Steam at 40 °C (7.38 kPa) on a 3 cm tube at 30 °C, properties as in Çengel, Heat Transfer,
    condensation on a horizontal tube (Example 10-5 of the 2nd ed., from memory: h = 9292
    W/(m² K)); the difference is the book's rounding of h'_fg and g = 9.81 m/s²:

    >>> round(float(condensation_horizontal_tube(313.15, 303.15, 0.03, 994.0, 0.05, 2407e3,
    ...                                          4178.0, 0.623, 0.720e-3)))
    9294
    >>> float(condensation_horizontal_tube(313.15, 320.0, 0.03, 994.0, 0.05, 2407e3, 4178.0, 0.623, 0.720e-3))
    0.0
    """
    T_sat = np.asarray(T_sat_K, dtype=float)
    T_w = np.asarray(T_wall_K, dtype=float)
    D = _require_positive("D_outer_m", D_outer_m)
    rho_l = _require_positive("rho_liquid", rho_liquid)
    rho_v = _require_non_negative("rho_vapour", rho_vapour)
    h_fg = _require_positive("h_fg", h_fg)
    cp_l = _require_positive("cp_liquid", cp_liquid)
    k_l = _require_positive("k_liquid", k_liquid)
    mu_l = _require_positive("mu_liquid", mu_liquid)
    d_t = T_sat - T_w
    d_t_eff = np.maximum(d_t, CONDENSATION_DT_MIN_K)
    h_fg_corrected = h_fg + 0.68 * cp_l * d_t_eff
    h = 0.729 * np.sqrt(np.sqrt(
        STANDARD_GRAVITY * rho_l * (rho_l - rho_v) * h_fg_corrected * k_l**3 / (mu_l * d_t_eff * D)))
    return np.where(d_t > 0.0, h, 0.0)


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
