"""Loss coefficients of pipe fittings and valves.

Three methods, each with its published source:

- ``hooper_2k`` -- Hooper, W.B. (1981) "The two-K method predicts head losses in
  pipe fittings", Chem. Eng. 88(17), 96-100::

      K = K1/Re + Kinf * (1 + 1/D)        D = actual bore [in]

- ``darby_3k`` -- Darby, R. (2001) "Correlate pressure drops through fittings",
  Chem. Eng. 108(4), 127-130 (data of Silverberg & Darby, Chem. Eng. 106(7),
  1999)::

      K = K1/Re + Ki * (1 + Kd / D**0.3)  D = nominal size [in]

  The nominal size is found from the bore by interpolating along the
  schedule 40 bores of ASME B36.10M (linear between sizes, extrapolated from the
  end segment above NPS 24, proportional below NPS 1/8).

- ``fixed`` -- a constant K (entrances, exit).

Validity (as stated by the authors, from memory): both methods were fitted to
turbulent and laminar data for Re from about 10 upward; Hooper's constants for
sizes from about 1/2 in to 24 in; Darby's cover about 1/2 in to 24 in as well.
The solver reports out-of-range use through its Checks, not here.
"""

from __future__ import annotations

import bisect
import math
from dataclasses import dataclass
from fractions import Fraction
from typing import Literal

import numpy as np

from solver import catalogue
from solver.errors import InputError
from solver.model import Fitting

INCH_M = 0.0254

_HOOPER = "Hooper, W.B. (1981), Chem. Eng. 88(17), 96-100, 2-K table"
_DARBY = "Darby, R. (2001), Chem. Eng. 108(4), 127-130, 3-K table"
_CRANE = "Crane Co., Technical Paper No. 410, 'Flow of Fluids through Valves, Fittings and Pipe'"
#: The sources of the catalogue's loss coefficients, for the list of methods a solve used.
SOURCES = (_DARBY, _HOOPER, _CRANE)


@dataclass(frozen=True)
class FittingType:
    """A catalogue fitting: label for the GUI, method, constants and source.

    coefficients: ``(K1, Kinf)`` for ``hooper_2k``; ``(K1, Ki, Kd)`` for
    ``darby_3k`` (Kd in in^0.3); ``(K,)`` for ``fixed``.
    """

    label: str
    method: Literal["hooper_2k", "darby_3k", "fixed"]
    coefficients: tuple[float, ...]
    source: str


def _d(label, k1, ki, kd, row):
    return FittingType(label, "darby_3k", (k1, ki, kd), f"{_DARBY}: {row}")


def _h(label, k1, kinf, row):
    return FittingType(label, "hooper_2k", (k1, kinf), f"{_HOOPER}: {row}")


FITTINGS: dict[str, FittingType] = {
    # elbows
    "elbow_90_standard": _d("90° elbow, standard, flanged/welded (r/D 1)", 800.0, 0.091, 4.0,
                            "elbow 90°, flanged/welded/bends, r/D = 1"),
    "elbow_90_standard_threaded": _d("90° elbow, standard, threaded (r/D 1)", 800.0, 0.14, 4.0,
                                     "elbow 90°, threaded, standard, r/D = 1"),
    "elbow_90_long_radius": _h("90° elbow, long radius (r/D 1.5)", 800.0, 0.20,
                               "elbow 90°, long radius R/D = 1.5, all types"),
    "elbow_90_long_radius_threaded": _d("90° elbow, long radius, threaded (r/D 1.5)", 800.0, 0.071, 4.2,
                                        "elbow 90°, threaded, long radius, r/D = 1.5"),
    "bend_90_r2d": _d("90° bend, r/D 2", 800.0, 0.056, 3.9, "elbow 90°, r/D = 2"),
    "bend_90_r4d": _d("90° bend, r/D 4", 800.0, 0.066, 3.9, "elbow 90°, r/D = 4"),
    "bend_90_r6d": _d("90° bend, r/D 6", 800.0, 0.075, 4.2, "elbow 90°, r/D = 6"),
    "elbow_90_mitred_1_weld": _d("90° mitred elbow, 1 weld (90°)", 1000.0, 0.27, 4.0,
                                 "elbow 90°, mitered, 1 weld"),
    "elbow_90_mitred_2_welds": _d("90° mitred elbow, 2 welds (45°)", 800.0, 0.068, 4.1,
                                  "elbow 90°, mitered, 2 welds"),
    "elbow_90_mitred_3_welds": _d("90° mitred elbow, 3 welds (30°)", 800.0, 0.035, 4.2,
                                  "elbow 90°, mitered, 3 welds"),
    "elbow_45_standard": _h("45° elbow, standard (r/D 1)", 500.0, 0.20,
                            "elbow 45°, standard R/D = 1, all types"),
    "elbow_45_standard_threaded": _d("45° elbow, standard, threaded (r/D 1)", 500.0, 0.071, 4.2,
                                     "elbow 45°, threaded standard, r/D = 1"),
    "elbow_45_long_radius": _d("45° elbow, long radius (r/D 1.5)", 500.0, 0.052, 4.0,
                               "elbow 45°, long radius, r/D = 1.5"),
    "elbow_180_return": _d("180° return, flanged/welded (r/D 1)", 1000.0, 0.12, 4.0,
                           "elbow 180°, flanged, r/D = 1"),
    "elbow_180_return_threaded": _d("180° return, threaded close return (r/D 1)", 1000.0, 0.23, 4.0,
                                    "elbow 180°, threaded, close-return bend, r/D = 1"),
    "elbow_180_long_radius": _d("180° return, long radius (r/D 1.5)", 1000.0, 0.10, 4.0,
                                "elbow 180°, all, r/D = 1.5"),
    # tees
    "tee_through_run": _d("Tee, flow through run, flanged/welded", 150.0, 0.05, 4.0,
                          "tee, run-through, flanged, r/D = 1"),
    "tee_through_run_threaded": _d("Tee, flow through run, threaded", 200.0, 0.091, 4.0,
                                   "tee, run-through, threaded, r/D = 1"),
    "tee_through_branch": _d("Tee, flow through branch, flanged/welded", 800.0, 0.28, 4.0,
                             "tee, through-branch (as elbow), flanged, r/D = 1"),
    "tee_through_branch_threaded": _d("Tee, flow through branch, threaded", 500.0, 0.274, 4.0,
                                      "tee, through-branch (as elbow), threaded, r/D = 1"),
    "tee_through_branch_stub_in": _d("Tee, flow through branch, stub-in", 1000.0, 0.34, 4.0,
                                     "tee, through-branch (as elbow), stub-in branch"),
    # valves
    "gate_valve_full": _d("Gate valve, full bore, open", 300.0, 0.037, 3.9, "valve, gate, standard, β = 1"),
    "ball_valve": _d("Ball valve, full bore, open", 300.0, 0.017, 3.5, "valve, ball, standard, β = 1"),
    "plug_valve": _d("Plug valve, straight through, open", 300.0, 0.084, 3.9, "valve, plug, straight through"),
    "globe_valve": _d("Globe valve, standard, open", 1500.0, 1.7, 3.6, "valve, globe, standard, β = 1"),
    "angle_valve_45": _d("Angle valve 45°, open", 950.0, 0.25, 4.0, "valve, angle, 45°, full line size, β = 1"),
    "angle_valve_90": _d("Angle valve 90°, open", 1000.0, 0.69, 4.0, "valve, angle, 90°, full line size, β = 1"),
    "diaphragm_valve": _d("Diaphragm valve, dam type, open", 1000.0, 0.69, 4.9, "valve, diaphragm, dam type"),
    "butterfly_valve": _h("Butterfly valve, open", 800.0, 0.25, "valve, butterfly"),
    "check_valve_swing": _d("Check valve, swing", 1500.0, 0.46, 4.0, "valve, swing check"),
    "check_valve_lift": _d("Check valve, lift", 2000.0, 2.85, 3.8, "valve, lift check"),
    "check_valve_tilting_disc": _h("Check valve, tilting disc", 1000.0, 0.5, "valve, check, tilting-disc"),
    # entrances and exit
    "pipe_entrance_sharp": FittingType("Pipe entrance, sharp-edged (flush)", "fixed", (0.5,),
                                       f"{_CRANE}: sharp-edged entrance K = 0.5"),
    "pipe_entrance_rounded": FittingType("Pipe entrance, well rounded (r/D ≥ 0.15)", "fixed", (0.04,),
                                         f"{_CRANE}: rounded entrance, r/d ≥ 0.15, K = 0.04"),
    "pipe_exit": FittingType("Pipe exit into a large vessel", "fixed", (1.0,),
                             f"{_CRANE}: exit K = 1.0 (all kinetic energy lost)"),
}

CUSTOM = "custom"


def fitting_labels() -> dict[str, str]:
    """Catalogue keys -> labels for the GUI, plus ``"custom"`` (K entered directly)."""
    labels = {key: f.label for key, f in FITTINGS.items()}
    labels[CUSTOM] = "Custom (enter K)"
    return labels


def _build_sch40() -> tuple[np.ndarray, np.ndarray]:
    sizes, bores = [], []
    for key in catalogue.nps_sizes():
        if "40" in catalogue.schedules_for(key):
            whole, _, frac = key.partition("-")
            sizes.append(float(Fraction(whole) + (Fraction(frac) if frac else 0)))
            bores.append(catalogue.pipe_dimensions(key, "40")[0])
    return np.array(sizes), np.array(bores)


_SCH40_NPS_IN, _SCH40_BORE_M = _build_sch40()
# the same table as plain floats, for the scalar path (one segment's bore at a time)
_SCH40_NPS_LIST = _SCH40_NPS_IN.tolist()
_SCH40_BORE_LIST = _SCH40_BORE_M.tolist()


def equivalent_nps_inches(inner_diameter_m):
    """Nominal size [in] whose schedule 40 bore (ASME B36.10M) equals the given bore [m].

    Linear interpolation between sizes; above NPS 24 extrapolated from the last
    segment; below NPS 1/8 proportional to the bore. Used by the 3-K method,
    whose diameter is the nominal size.
    """
    d = np.asarray(inner_diameter_m, dtype=float)
    x, y = _SCH40_BORE_M, _SCH40_NPS_IN
    inside = np.interp(d, x, y)
    above = y[-1] + (d - x[-1]) * (y[-1] - y[-2]) / (x[-1] - x[-2])
    below = y[0] * d / x[0]
    return np.where(d > x[-1], above, np.where(d < x[0], below, inside))


def _equivalent_nps_inches_scalar(d: float) -> float:
    """:func:`equivalent_nps_inches` for one float bore, in plain floats.

    The same arithmetic in the same order as ``np.interp`` (bracketing point, exact hit on a
    table bore, slope times offset plus the lower size) and the two extrapolations, so the
    result is bit-for-bit that of the array path; it only skips numpy's per-call overhead.
    """
    x, y = _SCH40_BORE_LIST, _SCH40_NPS_LIST
    if d > x[-1]:
        return y[-1] + (d - x[-1]) * (y[-1] - y[-2]) / (x[-1] - x[-2])
    if d < x[0]:
        return y[0] * d / x[0]
    j = bisect.bisect_right(x, d) - 1
    if j == len(x) - 1 or x[j] == d:
        return y[j]
    return (y[j + 1] - y[j]) / (x[j + 1] - x[j]) * (d - x[j]) + y[j]


def hooper_2k(K1, K_inf, Re, inner_diameter_m):
    """Hooper 2-K loss coefficient.

    Source: Hooper, W.B. (1981), Chem. Eng. 88(17), 96-100.
    Equation: K = K1/Re + K_inf * (1 + 1/D_in).

    K1 : constant [-]; K_inf : constant [-]; Re : Reynolds number in the pipe [-];
    inner_diameter_m : bore [m] (converted to inches, D_in [in]).
    Validity: laminar and turbulent flow, bores about 1/2-24 in (from memory).
    """
    d_in = np.asarray(inner_diameter_m, dtype=float) / INCH_M
    return K1 / np.asarray(Re, dtype=float) + K_inf * (1.0 + 1.0 / d_in)


def darby_3k(K1, Ki, Kd, Re, inner_diameter_m):
    """Darby 3-K loss coefficient.

    Source: Darby, R. (2001), Chem. Eng. 108(4), 127-130.
    Equation: K = K1/Re + Ki * (1 + Kd / D_n^0.3), D_n the nominal size [in],
    taken from the bore with :func:`equivalent_nps_inches`.

    K1 : [-]; Ki : [-]; Kd : [in^0.3]; Re : Reynolds number in the pipe [-];
    inner_diameter_m : bore [m].
    Validity: laminar and turbulent flow, nominal sizes about 1/2-24 in (from memory).
    """
    d_n = equivalent_nps_inches(inner_diameter_m)
    return K1 / np.asarray(Re, dtype=float) + Ki * (1.0 + Kd / d_n**0.3)


def _k_field(field: str) -> str:
    return field[: -len(".kind")] + ".K" if field.endswith(".kind") else f"{field}.K"


def fitting_K(kind: str, Re, inner_diameter_m, K=None, *, field: str = "fitting.kind"):
    """Loss coefficient of one fitting [-], referred to the pipe velocity head.

    kind : catalogue key (see ``FITTINGS``) or ``"custom"``
    Re : Reynolds number in the pipe [-], scalar or numpy array (> 0)
    inner_diameter_m : bore of the pipe [m] (> 0)
    K : loss coefficient for ``"custom"`` [-]
    field : path of ``kind`` in the project, used in error messages

    Returns a float for scalar input, else an array shaped like ``Re``.
    Raises :class:`InputError` for an unknown kind, a custom fitting without K,
    a non-positive Reynolds number or bore.
    """
    if isinstance(Re, (float, int)) and isinstance(inner_diameter_m, (float, int)):
        return _fitting_K_scalar(kind, Re, inner_diameter_m, K, field, None)
    scalar = np.ndim(Re) == 0 and np.ndim(inner_diameter_m) == 0
    if kind == CUSTOM:
        if K is None or not np.isfinite(K) or K < 0:
            raise InputError(_k_field(field), K, "a 'custom' fitting needs a loss coefficient K >= 0")
        value = np.broadcast_to(float(K), np.broadcast(np.asarray(Re), np.asarray(inner_diameter_m)).shape)
        return float(K) if scalar else np.array(value)
    fitting = FITTINGS.get(kind)
    if fitting is None:
        raise InputError(field, kind, f"unknown fitting; known: {', '.join(fitting_labels())}")
    re_arr = np.asarray(Re, dtype=float)
    if not np.all(np.isfinite(re_arr)) or np.any(re_arr <= 0):
        raise InputError("Re", Re, "the Reynolds number must be positive and finite for a fitting loss")
    d_arr = np.asarray(inner_diameter_m, dtype=float)
    if not np.all(np.isfinite(d_arr)) or np.any(d_arr <= 0):
        raise InputError("inner_diameter_m", inner_diameter_m, "the bore must be positive")
    if fitting.method == "hooper_2k":
        result = hooper_2k(*fitting.coefficients, re_arr, d_arr)
    elif fitting.method == "darby_3k":
        result = darby_3k(*fitting.coefficients, re_arr, d_arr)
    else:
        result = np.broadcast_to(fitting.coefficients[0], np.broadcast(re_arr, d_arr).shape).astype(float)
    return float(result) if scalar else np.asarray(result, dtype=float)


def _field_text(field: str, index) -> str:
    """The path of a fitting's ``kind``: ``field`` itself, or ``<field>[<index>].kind`` in a list."""
    return field if index is None else f"{field}[{index}].kind"


@dataclass(frozen=True)
class FittingsLoss:
    """A segment's fittings at its bore, ready to evaluate at any Reynolds number.

    ``terms``: per fitting ``(count, K1, rest)`` with K = K1/Re + rest (``K1`` None for a
    constant K), the Re-free part worked out once with the very operations of
    :func:`fitting_K`, so :meth:`at` gives the value of :func:`fittings_K_total` to the bit.
    ``a``, ``b``: the sum as K(Re) = a/Re + b, the form the march uses (both the 2-K and the
    3-K method have it at a fixed bore), solved from the values at Re 1e3 and 1e6.
    """

    terms: tuple[tuple[int, float | None, float], ...]
    a: float
    b: float

    def at(self, Re: float) -> float:
        """Sum of count x K at Reynolds number ``Re`` [-]."""
        re = float(Re)
        if not math.isfinite(re) or re <= 0:
            if any(k1 is not None for _, k1, _ in self.terms):
                raise InputError("Re", Re, "the Reynolds number must be positive and finite for a fitting loss")
        total = 0.0
        for count, k1, rest in self.terms:
            total = total + count * (rest if k1 is None else k1 / re + rest)
        return total


def _fitting_terms(kind: str, d: float, K, field: str, index, Re=None) -> tuple[float | None, float]:
    """``(K1, rest)`` of one fitting at bore ``d``: K = K1/Re + rest (K1 None: K = rest).

    With ``Re`` given, it is checked where :func:`fitting_K` checks it (before the bore).
    """
    if kind == CUSTOM:
        if K is None or not math.isfinite(K) or K < 0:
            raise InputError(_k_field(_field_text(field, index)), K,
                             "a 'custom' fitting needs a loss coefficient K >= 0")
        return None, float(K)
    fitting = FITTINGS.get(kind)
    if fitting is None:
        raise InputError(_field_text(field, index), kind, f"unknown fitting; known: {', '.join(fitting_labels())}")
    if Re is not None and not (math.isfinite(Re) and Re > 0):
        raise InputError("Re", Re, "the Reynolds number must be positive and finite for a fitting loss")
    if not math.isfinite(d) or d <= 0:
        raise InputError("inner_diameter_m", d, "the bore must be positive")
    if fitting.method == "hooper_2k":
        K1, K_inf = fitting.coefficients
        return K1, K_inf * (1.0 + 1.0 / (d / INCH_M))
    if fitting.method == "darby_3k":
        K1, Ki, Kd = fitting.coefficients
        return K1, Ki * (1.0 + Kd / _equivalent_nps_inches_scalar(d) ** 0.3)
    return None, float(fitting.coefficients[0])


def _fitting_K_scalar(kind: str, Re, inner_diameter_m, K, field: str, index) -> float:
    """:func:`fitting_K` for a float Reynolds number and bore, in plain floats.

    The same checks, messages and arithmetic (operation for operation) as the array path, so
    the value is identical; a solve asks for a few of these per segment, where numpy's per-call
    overhead on scalars was most of the cost. ``field`` is the path of ``kind``, or with an
    ``index`` the prefix of a list of fittings (the path is only spelt out for an error).
    """
    k1, rest = _fitting_terms(kind, float(inner_diameter_m), K, field, index, Re=Re)
    return rest if k1 is None else k1 / float(Re) + rest


#: (kind, count, K) of each fitting and the bore -> FittingsLoss. A value key: an edited
#: fitting or bore is a different key, and a hit holds the very numbers a fresh build gives.
_LOSS_CACHE: dict[tuple, FittingsLoss] = {}
_LOSS_CACHE_SIZE = 4096


def fittings_loss(fittings: list[Fitting], inner_diameter_m: float,
                  field_prefix: str = "fittings") -> FittingsLoss:
    """A segment's fittings at its bore (see :class:`FittingsLoss`), remembered by value.

    Errors name the fitting as :func:`fittings_K_total` does, e.g. ``fittings[2].kind``.
    """
    d = float(inner_diameter_m)
    key = (tuple((f.kind, f.count, f.K) for f in fittings), d)
    loss = _LOSS_CACHE.get(key)
    if loss is None:
        terms = tuple((f.count, *_fitting_terms(f.kind, d, f.K, field_prefix, i)) for i, f in enumerate(fittings))
        probe = FittingsLoss(terms, 0.0, 0.0)
        k1, k2 = probe.at(1e3), probe.at(1e6)
        a = (k1 - k2) / (1e-3 - 1e-6)
        loss = FittingsLoss(terms, a, k2 - a * 1e-6)
        if len(_LOSS_CACHE) >= _LOSS_CACHE_SIZE:
            _LOSS_CACHE.clear()
        _LOSS_CACHE[key] = loss
    return loss


def fittings_K_total(fittings: list[Fitting], Re, inner_diameter_m, field_prefix: str = "fittings"):
    """Sum of count x K over a segment's fittings [-] (float, or array shaped like ``Re``).

    Errors name the fitting, e.g. ``fittings[2].kind``.
    """
    if isinstance(Re, (float, int)) and isinstance(inner_diameter_m, (float, int)):
        total = 0.0  # one segment at one Reynolds number: plain floats, same sum in the same order
        for i, f in enumerate(fittings):
            total = total + f.count * _fitting_K_scalar(f.kind, Re, inner_diameter_m, f.K, field_prefix, i)
        return total
    total = 0.0 if np.ndim(Re) == 0 else np.zeros(np.shape(Re))
    for i, f in enumerate(fittings):
        k = fitting_K(f.kind, Re, inner_diameter_m, K=f.K, field=f"{field_prefix}[{i}].kind")
        total = total + f.count * k
    return total
