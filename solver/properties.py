"""Fluid properties for the line solver: tabulated once, interpolated fast.

Sources
-------
* Pure fluids: CoolProp ``HEOS`` reference equations of state (IAPWS-95 for
  water) with CoolProp's transport models.
* Aqueous solutions: CoolProp ``INCOMP`` library (fits to published data).
* User tables: the rows of a :class:`~solver.model.TableFluid`.

Speed design
------------
A CoolProp call costs ~4 µs (INCOMP) to ~80 µs (HEOS) per state; the solver
needs thousands of states per solve. Every fluid is therefore sampled on
*fixed* knots that do not depend on the request, memoised per fluid, and
interpolated with numpy. Because the knots are fixed, the cache cannot change
an answer, only its cost.

* Pure fluids: knots every 1 K in temperature and 40 per decade in pressure
  (1 kPa ... 100 MPa), filled lazily in chunks of 16 x 8 knots around the
  requested states. Bilinear in (T, ln p) of ``ln rho``, ``cp``, ``ln mu``,
  ``k`` and ``h`` (``ln rho`` is exactly linear in ``ln p`` for an ideal gas).
  A cell whose corners lie on both sides of the saturation line, or that
  touches an invalid knot (below the melting line), is never interpolated:
  states in such a cell are evaluated directly with CoolProp ("correct side"),
  and a state that is itself two-phase raises :class:`PropertyRangeError`.
* Solutions and user tables (liquids): temperature-only knots (1 K for
  solutions, the user's rows for tables). ``rho``, ``cp``, ``k`` linear,
  ``ln mu`` linear, internal energy ``u`` the exact integral of the
  piecewise-linear ``cp``. Pressure enters only the enthalpy, through the
  incompressible-liquid relation ``h = u(T) + p / rho(T)`` (the same definition
  CoolProp's INCOMP backend uses), so frictional pressure loss shows up as
  heating. For tables, ``u = 0`` at the first row.

``enthalpy`` and ``temperature`` are exact inverses of each other on the
interpolant (to round-off), except in the direct-evaluation cells next to the
saturation line where CoolProp's own flash tolerance applies.

CoolProp is imported lazily (inside functions) to keep start-up short.
"""

from __future__ import annotations

import json
import math
import threading
from functools import lru_cache
from typing import NamedTuple, Optional, Union

import numpy as np

from solver._numeric import clip as _clip

from solver.catalogue import SOLUTIONS
from solver.errors import InputError, PropertyRangeError
from solver.model import PureFluid, SolutionFluid, TableFluid

# --------------------------------------------------------------------------- catalogues

#: Pure fluids offered in the GUI: CoolProp HEOS name -> label.
PURE_FLUIDS: dict[str, str] = {
    "Water": "Water",
    "Air": "Air",
    "Nitrogen": "Nitrogen",
    "Oxygen": "Oxygen",
    "CarbonDioxide": "Carbon dioxide",
    "Methane": "Methane",
    "Ammonia": "Ammonia",
}


# Pure-fluid grid (global, fixed): T knots every _DT kelvin from 0 K, p knots
# _PPD per decade from 10**(_LOGP0) Pa.
_DT = 1.0
_PPD = 40
_LOGP0 = 3.0          # 1 kPa
_LOGP1 = 8.0          # 100 MPa
_T_CAP = 1000.0       # process lines; keeps the table small
_CHUNK_T = 16
_CHUNK_P = 8
# value columns in the pure-fluid table
_LNRHO, _CP, _LNMU, _K, _H = range(5)


class Props(NamedTuple):
    """Properties at a set of states (numpy arrays of the states' shape)."""

    rho: np.ndarray  #: density [kg/m³]
    cp: np.ndarray   #: isobaric specific heat [J/(kg K)]
    mu: np.ndarray   #: dynamic viscosity [Pa s]
    k: np.ndarray    #: thermal conductivity [W/(m K)]
    h: np.ndarray    #: specific enthalpy [J/kg]


def _states(T, p):
    T = np.asarray(T, dtype=float)
    p = np.asarray(p, dtype=float)
    if T.shape != p.shape:
        T, p = np.broadcast_arrays(T, p)
    return T, p


# --------------------------------------------------------------------------- base


class FluidModel:
    """Common interface of a fluid's property model (see module docstring).

    Attributes
    ----------
    label : str — human-readable name for the GUI and reports.
    compressible : bool — the fluid is treated as a gas by default (see
        :class:`PureFluidModel`); liquids from solutions and tables are never.
    T_min_K, T_max_K : float — validity limits of the property source [K].
    """

    label: str = ""
    compressible: bool = False
    T_min_K: float = 0.0
    T_max_K: float = 0.0

    def props(self, T, p) -> Props:  # pragma: no cover - abstract
        raise NotImplementedError

    def enthalpy(self, T, p) -> np.ndarray:
        """Specific enthalpy [J/kg] at temperature T [K] and pressure p [Pa abs]."""
        return self.props(T, p).h

    def temperature(self, h, p) -> np.ndarray:  # pragma: no cover - abstract
        raise NotImplementedError

    def saturation_temperature(self, p) -> np.ndarray:  # pragma: no cover - abstract
        raise NotImplementedError

    def freezing_temperature(self, p=None) -> Optional[float]:  # pragma: no cover - abstract
        raise NotImplementedError

    def is_gas(self, T, p) -> np.ndarray:
        """True where the state is vapour or supercritical gas (always False for liquids)."""
        T, _ = _states(T, p)
        return np.zeros(T.shape, dtype=bool)

    def speed_of_sound(self, T, p) -> Optional[np.ndarray]:
        """Speed of sound [m/s] at (T, p), or None where the property source has none (CoolProp's
        solutions, user tables: liquids, whose Mach number in a pipe is negligible)."""
        return None

    def phase_is_liquid(self, T, p) -> np.ndarray:
        """True where the state is liquid: below the saturation temperature at p
        (where one exists) and not gas. For the boiling check."""
        T, p = _states(T, p)
        ts = self.saturation_temperature(p)
        below = np.where(np.isnan(ts), True, T < ts)
        return below & ~self.is_gas(T, p)

    # shared checks ------------------------------------------------------
    def _check_finite(self, T, p):
        if T.size == 0 or (np.isfinite(T.min() + T.max()) and p.min() > 0.0 and np.isfinite(p.max())):
            return
        bad = ~(np.isfinite(T) & np.isfinite(p)) | (p <= 0.0)
        if bad.any():
            i = int(np.flatnonzero(bad.ravel())[0])
            raise PropertyRangeError(self.label, "temperature and pressure must be finite and pressure positive",
                                     float(T.ravel()[i]), float(p.ravel()[i]))

    def _check_T_range(self, T, p, lo, hi, why_lo, why_hi):
        if T.size == 0 or (T.min() >= lo and T.max() <= hi):
            return
        low = T < lo
        if low.any():
            i = int(np.flatnonzero(low.ravel())[0])
            raise PropertyRangeError(self.label, why_lo, float(T.ravel()[i]), float(p.ravel()[i]))
        high = T > hi
        if high.any():
            i = int(np.flatnonzero(high.ravel())[0])
            raise PropertyRangeError(self.label, why_hi, float(T.ravel()[i]), float(p.ravel()[i]))


# --------------------------------------------------------------------------- liquids on T-only knots


class _LiquidTableModel(FluidModel):
    """Liquid on temperature knots: linear rho, cp, k, ln mu; exact integral u of cp;
    h = u(T) + p / rho(T)."""

    def _set_knots(self, T, rho, cp, mu, k):
        self._T = np.asarray(T, float)
        dT = np.diff(self._T)
        self._rho = np.asarray(rho, float)
        self._cp = np.asarray(cp, float)
        self._lnmu = np.log(np.asarray(mu, float))
        self._k = np.asarray(k, float)
        self._dT = dT
        self._a = np.diff(self._cp) / dT               # cp slope per cell
        u = np.concatenate([[0.0], np.cumsum(0.5 * (self._cp[:-1] + self._cp[1:]) * dT)])
        self._u = u
        self._drho = np.diff(self._rho) / dT
        self._dlnmu = np.diff(self._lnmu) / dT
        self._dk = np.diff(self._k) / dT

    def _cell(self, T):
        i = np.searchsorted(self._T, T, side="right") - 1
        return _clip(i, 0, len(self._T) - 2)

    def _check(self, T, p):
        self._check_finite(T, p)
        self._check_T_range(T, p, self.T_min_K, self.T_max_K, self._why_low, self._why_high)

    def _u_rho(self, T, i):
        x = T - self._T[i]
        u = self._u[i] + x * (self._cp[i] + 0.5 * self._a[i] * x)
        rho = self._rho[i] + self._drho[i] * x
        return u, rho

    def props(self, T, p) -> Props:
        T, p = _states(T, p)
        self._check(T, p)
        i = self._cell(T)
        x = T - self._T[i]
        cp = self._cp[i] + self._a[i] * x
        u = self._u[i] + x * (self._cp[i] + 0.5 * self._a[i] * x)
        rho = self._rho[i] + self._drho[i] * x
        mu = np.exp(self._lnmu[i] + self._dlnmu[i] * x)
        k = self._k[i] + self._dk[i] * x
        return Props(rho, cp, mu, k, u + self._h_offset + p / rho)

    def enthalpy(self, T, p) -> np.ndarray:
        T, p = _states(T, p)
        self._check(T, p)
        u, rho = self._u_rho(T, self._cell(T))
        return u + self._h_offset + p / rho

    def _T_from_u(self, u):
        j = _clip(np.searchsorted(self._u, u, side="right") - 1, 0, len(self._T) - 2)
        du = u - self._u[j]
        c = self._cp[j]
        # root of a/2 x^2 + c x - du = 0 in the numerically stable form
        x = 2.0 * du / (c + np.sqrt(np.maximum(c * c + 2.0 * self._a[j] * du, 0.0)))
        return self._T[j] + x

    def temperature(self, h, p) -> np.ndarray:
        """Temperature [K] from specific enthalpy h [J/kg] and pressure p [Pa abs]
        (inverse of :meth:`enthalpy` to round-off)."""
        h, p = _states(h, p)
        self._check_finite(h, p)
        hu = h - self._h_offset
        u_lo = self._u[0] + p / self._rho[0]
        u_hi = self._u[-1] + p / self._rho[-1]
        out = (hu < u_lo - 1e-9 * np.abs(u_lo)) | (hu > u_hi + 1e-9 * np.abs(u_hi))
        rho = np.full(h.shape, float(np.mean(self._rho)))
        T = self._T_from_u(hu - p / rho)
        for _ in range(40):
            T = _clip(T, self._T[0], self._T[-1])
            _, rho = self._u_rho(T, self._cell(T))
            T_new = self._T_from_u(hu - p / rho)
            done = np.max(np.abs(T_new - T), initial=0.0) < 1e-12 * 1000.0
            T = T_new
            if done:
                break
        inside = ~out
        T = np.where(inside, _clip(T, self._T[0], self._T[-1]), T)
        # the fixed point diverges where p/rho changes faster with T than u does (high pressure, a steep
        # density column); bisection over the table then finds the state whose enthalpy is h
        stray = inside & (np.abs(self.enthalpy(np.where(inside, T, self._T[0]), p) - h)
                          > 1e-9 * np.maximum(np.abs(h), 1.0))
        if stray.any():
            T[stray] = self._bisect(h[stray], p[stray])
        self._check(T, p)  # names the first state outside the valid range
        return T

    def enthalpy_falls_at(self, p: float) -> Optional[float]:
        """The first knot temperature [K] above which h(T, p) = u(T) + p/rho(T) does not rise, or None.

        Where the density rises with temperature steeply enough, p/rho falls faster than u rises at high
        pressure: the liquid model then has no single temperature for an enthalpy, and cannot be used.
        """
        knots = self._T[(self._T >= self.T_min_K) & (self._T <= self.T_max_K)]  # e.g. not below a freezing point
        # h can dip inside a table interval while rising from knot to knot (found by the solver fuzz: a
        # minimum between two rows at 374 bar), so each interval is sampled, not only its ends
        share = np.linspace(0.0, 1.0, 33)[:-1]
        T = np.append((knots[:-1, None] + np.diff(knots)[:, None] * share).ravel(), knots[-1:])
        h = self.enthalpy(T, np.full(T.shape, float(p)))
        bad = np.flatnonzero(np.diff(h) <= 0.0)
        if not bad.size:
            return None
        return float(knots[np.searchsorted(knots, T[bad[0]], side="right") - 1])

    def _bisect(self, h, p):
        """T with enthalpy(T, p) = h by bisection over the table's range (h rising with T), to round-off."""
        lo = np.full(h.shape, self._T[0])
        hi = np.full(h.shape, self._T[-1])
        for _ in range(80):
            mid = 0.5 * (lo + hi)
            below = self.enthalpy(mid, p) < h
            lo = np.where(below, mid, lo)
            hi = np.where(below, hi, mid)
        return 0.5 * (lo + hi)

    def freezing_temperature(self, p=None) -> Optional[float]:
        return self._freeze


class SolutionModel(_LiquidTableModel):
    """Aqueous solution from CoolProp INCOMP on 1 K knots from the freezing point
    (or CoolProp's T_min) to CoolProp's T_max. Pressure enters only h."""

    def __init__(self, spec: SolutionFluid):
        code = spec.solute
        if code not in SOLUTIONS:
            raise InputError("fluid.solute", code, f"unknown solution code; offered: {', '.join(SOLUTIONS)}")
        name, basis, fmin, fmax = SOLUTIONS[code]
        x = spec.concentration
        if not (fmin <= x <= fmax):
            raise InputError("fluid.concentration", x,
                             f"{name} is defined for {fmin:g} to {fmax:g} ({basis} fraction)")
        self.code, self.basis, self.concentration = code, basis, x
        self.label = f"{name} {100 * x:g} % ({basis})"
        self.compressible = False
        import CoolProp.CoolProp as CP

        st = CP.AbstractState("INCOMP", code)
        (st.set_mass_fractions if basis == "mass" else st.set_volu_fractions)([x])
        tmin, tmax = st.Tmin(), st.Tmax()
        try:
            tf = float(CP.PropsSI("T_freeze", "", 0, "", 0, f"INCOMP::{code}[{x}]"))
        except ValueError:
            tf = float("nan")
        # CoolProp gives ~0 K for solutions without a freezing curve (e.g. MITSW)
        self._freeze = tf if (math.isfinite(tf) and tf > tmin) else None
        lo = self._freeze if self._freeze is not None else tmin
        knots = np.arange(math.ceil(lo), math.floor(tmax) + 1.0, 1.0)
        if knots[0] > lo:
            knots = np.concatenate([[lo], knots])
        if knots[-1] < tmax:
            knots = np.concatenate([knots, [tmax]])
        cols = np.full((len(knots), 5), np.nan)
        p_ref = 1e7  # INCOMP rho, cp, mu, k, u do not depend on p; a high p clears the psat check (MITSW)
        for n, t in enumerate(knots):
            try:
                st.update(CP.PT_INPUTS, p_ref, float(t))
                cols[n] = st.rhomass(), st.cpmass(), st.viscosity(), st.conductivity(), st.umass()
            except ValueError:
                pass  # no data at this knot: outside the valid span below
        # The fits can fail inside their stated range: magnesium chloride at 30 % gives a negative
        # conductivity below -86 °C (found by the app fuzz). The usable range is the longest run of knots
        # with valid properties; below or above it a state is refused like one beyond the data.
        valid = np.all(np.isfinite(cols), axis=1) & np.all(cols[:, :4] > 0.0, axis=1)
        if not valid.any():
            raise PropertyRangeError(self.label, "the solution data give no valid properties at any temperature")
        edges = np.flatnonzero(np.diff(np.concatenate([[0], valid.astype(np.int8), [0]])))
        starts, stops = edges[0::2], edges[1::2]
        longest = int(np.argmax(stops - starts))
        span = slice(int(starts[longest]), int(stops[longest]))
        trimmed_low = span.start > 0
        if span.stop - span.start < 2:
            raise PropertyRangeError(self.label, "the solution data give valid properties at one temperature only")
        knots, cols = knots[span], cols[span]
        if trimmed_low:
            self._freeze = None  # the data stop above the stated freezing point: that edge is the data's
        self._set_knots(knots, cols[:, 0], cols[:, 1], cols[:, 2], cols[:, 3])
        # anchor h to CoolProp's own h at the first knot and 1 atm
        st.update(CP.PT_INPUTS, 101325.0, float(knots[0]))
        self._h_offset = st.hmass() - 101325.0 / st.rhomass()
        self.T_min_K, self.T_max_K = float(knots[0]), float(knots[-1])
        self._why_low = ("below the freezing point of the solution" if self._freeze is not None
                         else "below the lowest temperature of the solution data")
        self._why_high = "above the highest temperature of the solution data"

    def saturation_temperature(self, p) -> np.ndarray:
        """NaN: CoolProp's INCOMP library has no boiling point for solutions. The
        check is left to the solution's T_max (which is at or below ~100 °C for
        most entries at atmospheric pressure)."""
        p = np.asarray(p, dtype=float)
        return np.full(p.shape, np.nan)


class UserTableModel(_LiquidTableModel):
    """User-tabulated liquid: interpolation between rows (viscosity in its
    logarithm), no extrapolation; u = 0 at the first row."""

    def __init__(self, spec: TableFluid):
        self.label = f"{spec.name} (user table)"
        self.compressible = False
        r = spec.rows
        self._set_knots([x.temperature_K for x in r], [x.density_kg_per_m3 for x in r],
                        [x.specific_heat_J_per_kgK for x in r], [x.viscosity_Pa_s for x in r],
                        [x.conductivity_W_per_mK for x in r])
        self._h_offset = 0.0
        self._freeze = spec.freezing_point_K
        self._boil = spec.boiling_point_K
        lo = float(self._T[0])
        self._why_low = "below the first row of the property table (no extrapolation)"
        if self._freeze is not None and self._freeze > lo:
            lo = float(self._freeze)
            self._why_low = "below the freezing point given with the table"
        self.T_min_K, self.T_max_K = lo, float(self._T[-1])
        self._why_high = "above the last row of the property table (no extrapolation)"

    def saturation_temperature(self, p) -> np.ndarray:
        """The table's fixed boiling point, or NaN when none is given."""
        p = np.asarray(p, dtype=float)
        return np.full(p.shape, np.nan if self._boil is None else float(self._boil))


# --------------------------------------------------------------------------- pure fluids


class PureFluidModel(FluidModel):
    """Pure fluid from CoolProp HEOS, bilinear on a lazily filled (T, ln p) grid.

    ``compressible`` rule: True when the fluid cannot be a liquid at 1 atm above
    250 K, i.e. its normal boiling point (or, if its triple point lies above
    1 atm, its triple-point temperature) is below 250 K. This holds for Air,
    Nitrogen, Oxygen, Methane, Carbon dioxide and Ammonia and not for Water.
    It is a fluid-level default only; use :meth:`is_gas` for the actual state
    (e.g. liquid ammonia under pressure).
    """

    def __init__(self, spec: PureFluid):
        import CoolProp.CoolProp as CP

        name = spec.name
        try:
            st = CP.AbstractState("HEOS", name)
        except ValueError:
            raise InputError("fluid.name", name, "unknown pure fluid for CoolProp HEOS") from None
        self.name = name
        self.label = PURE_FLUIDS.get(name, name)
        self._CP = CP
        self._st = st
        self._lock = threading.RLock()
        self.T_crit = st.T_critical()
        self.p_crit = st.p_critical()
        self.T_triple = st.Ttriple()
        self.p_triple = st.trivial_keyed_output(CP.iP_triple)
        self.T_min_K = float(st.Tmin())
        self.T_max_K = float(min(st.Tmax(), _T_CAP))
        self.p_min_Pa = 10.0 ** _LOGP0
        self.p_max_Pa = float(min(st.pmax(), 10.0 ** _LOGP1))
        # grid
        self._i0 = int(math.floor(self.T_min_K / _DT))
        self._nT = int(math.ceil(self.T_max_K / _DT)) - self._i0 + 1
        self._nP = int(round((_LOGP1 - _LOGP0) * _PPD)) + 1
        self._lnp0 = _LOGP0 * math.log(10.0)
        self._dlnp = math.log(10.0) / _PPD
        self._tab = None  # allocated on first use (np.zeros: pages committed lazily)
        self._side = None
        self._filled = np.zeros((-(-self._nT // _CHUNK_T), -(-self._nP // _CHUNK_P)), dtype=bool)
        self._sat = None
        self._sat_arr = None  # saturation temperature at each pressure knot (NaN where none)
        self._sat_known = None
        nbp = self._tsat_scalar(101325.0)
        self.compressible = bool((nbp if math.isfinite(nbp) else self.T_triple) < 250.0)

    # ---- CoolProp direct -------------------------------------------------
    def _tsat_scalar(self, p):
        if not (self.p_triple <= p < self.p_crit):
            return float("nan")
        with self._lock:
            try:
                self._st.update(self._CP.PQ_INPUTS, p, 0.0)
                return float(self._st.T())
            except ValueError:
                return float("nan")

    def _direct(self, T, p):
        """One state straight from CoolProp: (rho, cp, mu, k, h); raises PropertyRangeError."""
        st = self._st
        with self._lock:
            try:
                st.update(self._CP.PT_INPUTS, p, T)
                out = (st.rhomass(), st.cpmass(), st.viscosity(), st.conductivity(), st.hmass())
            except ValueError as exc:
                raise PropertyRangeError(self.label, f"outside CoolProp's range ({str(exc).strip()[:120]})", T, p) from None
        if not all(math.isfinite(v) for v in out) or min(out[:4]) <= 0:
            raise PropertyRangeError(self.label, "CoolProp returned no valid properties", T, p)
        return out

    # ---- grid --------------------------------------------------------------
    def _fill(self, ci0, ci1, ck0, ck1):
        if self._tab is None:
            self._tab = np.zeros((self._nT, self._nP, 5))
            self._tab_a = np.zeros((self._nT, self._nP))  # speed of sound, read only by speed_of_sound()
            self._side = np.zeros((self._nT, self._nP), dtype=np.int8)
            self._flat = self._tab.reshape(self._nT * self._nP, 5)
            self._badcell = np.zeros((self._nT, self._nP), dtype=bool)
        CP = self._CP
        st = self._st
        for ci in range(ci0, ci1 + 1):
            for ck in range(ck0, ck1 + 1):
                if self._filled[ci, ck]:
                    continue
                for kk in range(ck * _CHUNK_P, min((ck + 1) * _CHUNK_P, self._nP)):
                    p = math.exp(self._lnp0 + kk * self._dlnp)
                    ts = self._sat_T_at_knot(kk, p)
                    for ii in range(ci * _CHUNK_T, min((ci + 1) * _CHUNK_T, self._nT)):
                        T = (ii + self._i0) * _DT
                        row = self._tab[ii, kk]
                        side = 0
                        if math.isfinite(ts):
                            side = -1 if T < ts else 1
                        elif p < self.p_crit and T > self.T_crit:
                            side = 1
                        elif p < self.p_triple:
                            side = 1
                        try:
                            if T < self.T_min_K or T > self.T_max_K + _DT:
                                raise ValueError("outside range")
                            st.update(CP.PT_INPUTS, p, T)
                            v = (st.rhomass(), st.cpmass(), st.viscosity(), st.conductivity(), st.hmass())
                            if not all(math.isfinite(x) for x in v) or min(v[:4]) <= 0:
                                raise ValueError("invalid")
                            row[:] = (math.log(v[0]), v[1], math.log(v[2]), v[3], v[4])
                            self._tab_a[ii, kk] = st.speed_sound()
                        except ValueError:
                            row[:] = np.nan
                            self._tab_a[ii, kk] = np.nan
                            side = 2  # invalid knot: never interpolated
                        self._side[ii, kk] = side
                self._filled[ci, ck] = True
        # cells that must not be interpolated (cell (i, k) spans knots i..i+1, k..k+1)
        s = self._side
        c = np.stack([s[:-1, :-1], s[1:, :-1], s[:-1, 1:], s[1:, 1:]])
        self._badcell[:-1, :-1] = (c == 2).any(axis=0) | ((c == -1).any(axis=0) & (c == 1).any(axis=0))

    def _sat_T_at_knot(self, kk, p):
        if self._sat is None:
            self._sat = {}
        ts = self._sat.get(kk)
        if ts is None:
            ts = self._tsat_scalar(p)
            self._sat[kk] = ts
        return ts

    def _ensure(self, i, kk):
        """Fill the chunks covering cells (i, kk) and (i+1, kk+1)."""
        ci0, ci1 = int(i.min()) // _CHUNK_T, (int(i.max()) + 1) // _CHUNK_T
        ck0, ck1 = int(kk.min()) // _CHUNK_P, (int(kk.max()) + 1) // _CHUNK_P
        if ci0 == ci1 and ck0 == ck1 and self._filled[ci0, ck0]:
            return
        ci1 = min(ci1, self._filled.shape[0] - 1)
        ck1 = min(ck1, self._filled.shape[1] - 1)
        if not self._filled[ci0:ci1 + 1, ck0:ck1 + 1].all():
            with self._lock:
                self._fill(ci0, ci1, ck0, ck1)

    def _p_index(self, p):
        y = (np.log(p) - self._lnp0) / self._dlnp
        kk = _clip(np.floor(y).astype(np.intp), 0, self._nP - 2)
        return kk, y - kk

    def _check(self, T, p):
        self._check_finite(T, p)
        self._check_T_range(T, p, self.T_min_K, self.T_max_K,
                            "below the lowest temperature of the fluid's equation of state",
                            f"above the highest temperature covered ({self.T_max_K:g} K)")
        if p.min() < self.p_min_Pa or p.max() > self.p_max_Pa:
            bad = (p < self.p_min_Pa) | (p > self.p_max_Pa)
            j = int(np.flatnonzero(bad.ravel())[0])
            raise PropertyRangeError(self.label, f"pressure outside the data's range of {self.p_min_Pa / 1e5:g} to "
                                                 f"{self.p_max_Pa / 1e5:g} bar(a)",
                                     float(T.ravel()[j]), float(p.ravel()[j]))

    def _bad_cells(self, i, kk):
        return self._badcell[i, kk]

    def props(self, T, p) -> Props:
        """Properties at temperatures T [K] and pressures p [Pa abs] (arrays of equal shape)."""
        T, p = _states(T, p)
        shape = T.shape
        T, p = T.ravel(), p.ravel()
        # one pass of reductions serves the range checks and the table look-up (this is the hot path)
        t_lo, t_hi = float(T.min(initial=np.inf)), float(T.max(initial=-np.inf))
        p_lo, p_hi = float(p.min(initial=np.inf)), float(p.max(initial=-np.inf))
        if not (self.T_min_K <= t_lo and t_hi <= self.T_max_K and self.p_min_Pa <= p_lo and p_hi <= self.p_max_Pa
                and math.isfinite(t_lo + t_hi + p_lo + p_hi)):
            self._check(T, p)  # raises with the first offending state
        x = T * (1.0 / _DT) - self._i0
        i = np.floor(x).astype(np.intp)
        np.minimum(i, self._nT - 2, out=i)
        wt = x - i
        y = (np.log(p) - self._lnp0) * (1.0 / self._dlnp)
        kk = np.floor(y).astype(np.intp)
        np.minimum(kk, self._nP - 2, out=kk)
        wp = y - kk
        # the chunks of the knots the look-up reads: of the cells (i, kk) as clipped above, so a state on the
        # table's top edge (p = 100 MPa, i.e. kk = nP - 2 with wp = 1) also fills the knots below the edge. They
        # carry a weight of 1 - wp, round-off but not zero: left unfilled (zeros) on a first call, they made
        # the same state give different last bits before and after another look-up filled them (solver fuzz).
        i_lo = min(int(t_lo / _DT - self._i0), self._nT - 2)
        i_hi = min(int(t_hi / _DT - self._i0), self._nT - 2)
        k_lo = min(int((math.log(p_lo) - self._lnp0) / self._dlnp), self._nP - 2)
        k_hi = min(int((math.log(p_hi) - self._lnp0) / self._dlnp), self._nP - 2)
        ci0, ci1 = i_lo // _CHUNK_T, (i_hi + 1) // _CHUNK_T
        ck0, ck1 = k_lo // _CHUNK_P, (k_hi + 1) // _CHUNK_P
        ci1 = min(ci1, self._filled.shape[0] - 1)
        ck1 = min(ck1, self._filled.shape[1] - 1)
        if not (ci0 == ci1 and ck0 == ck1 and self._filled[ci0, ck0]) and \
                not self._filled[ci0:ci1 + 1, ck0:ck1 + 1].all():
            with self._lock:
                self._fill(ci0, ci1, ck0, ck1)
        flat = self._flat
        f = i * self._nP + kk
        nP = self._nP
        a = (1.0 - wt)[:, None]
        b = wt[:, None]
        tk = np.take
        v = ((tk(flat, f, axis=0) * a + tk(flat, f + nP, axis=0) * b) * (1.0 - wp)[:, None]
             + (tk(flat, f + 1, axis=0) * a + tk(flat, f + nP + 1, axis=0) * b) * wp[:, None])
        rho = np.exp(v[:, _LNRHO])
        mu = np.exp(v[:, _LNMU])
        cp, k, h = v[:, _CP], v[:, _K], v[:, _H]
        bad = np.take(self._badcell.ravel(), f)
        if bad.any():
            for j in np.flatnonzero(bad):
                rho[j], cp[j], mu[j], k[j], h[j] = self._direct(float(T[j]), float(p[j]))
        return Props(rho.reshape(shape), cp.reshape(shape), mu.reshape(shape), k.reshape(shape), h.reshape(shape))

    def speed_of_sound(self, T, p) -> np.ndarray:
        """Speed of sound [m/s] at temperatures T [K] and pressures p [Pa abs] (CoolProp HEOS), bilinear
        in (T, ln p) on the same fixed knots as :meth:`props`; cells next to the saturation line directly."""
        T, p = _states(T, p)
        shape = T.shape
        T, p = T.ravel(), p.ravel()
        self._check(T, p)
        if T.size == 0:
            return np.zeros(shape)
        x = T * (1.0 / _DT) - self._i0
        i = np.minimum(np.floor(x).astype(np.intp), self._nT - 2)
        wt = x - i
        kk, wp = self._p_index(p)
        self._ensure(i, kk)
        A = self._tab_a
        a = ((A[i, kk] * (1.0 - wt) + A[i + 1, kk] * wt) * (1.0 - wp)
             + (A[i, kk + 1] * (1.0 - wt) + A[i + 1, kk + 1] * wt) * wp)
        bad = self._badcell[i, kk] | ~np.isfinite(a)
        for j in np.flatnonzero(bad):
            a[j] = self._direct_speed_of_sound(float(T[j]), float(p[j]))
        return a.reshape(shape)

    def _direct_speed_of_sound(self, T, p):
        with self._lock:
            try:
                self._st.update(self._CP.PT_INPUTS, p, T)
                a = float(self._st.speed_sound())
            except ValueError as exc:
                raise PropertyRangeError(self.label, f"outside CoolProp's range ({str(exc).strip()[:120]})", T, p) from None
        if not (math.isfinite(a) and a > 0.0):
            raise PropertyRangeError(self.label, "CoolProp returned no speed of sound", T, p)
        return a

    def _h_at(self, i, kk, wp):
        """Enthalpy on the pressure line at knots ``i`` for the search in :meth:`temperature`.

        An invalid knot (NaN: inside air's bubble-to-dew band, below the melting line) takes the
        value of the nearest valid knot below it on the same line; NaN only where there is none.
        This keeps "h at knot <= h" monotonic in the knot index, so the bisection finds the one
        cell that holds h from any starting bracket, i.e. whatever earlier solves have filled.
        """
        H = self._tab[:, :, _H]
        out = H[i, kk] * (1.0 - wp) + H[i, kk + 1] * wp
        invalid = np.isnan(out)
        if invalid.any():
            for j in np.flatnonzero(invalid):
                out[j] = self._h_below(int(i[j]), int(kk[j]), float(wp[j]))
        return out

    def _h_below(self, i, kk, wp):
        """h of the nearest valid knot at or below knot i on the line between pressure knots kk, kk+1."""
        H = self._tab[:, :, _H]
        for j in range(i, max(int(math.ceil(self.T_min_K / _DT)) - self._i0, 0) - 1, -1):
            self._ensure(np.array([j]), np.array([kk]))
            v = H[j, kk] * (1.0 - wp) + H[j, kk + 1] * wp
            if not math.isnan(v):
                return v
        return math.nan

    def temperature(self, h, p) -> np.ndarray:
        """Temperature [K] from specific enthalpy h [J/kg] and pressure p [Pa abs].

        Exact inverse of the interpolated :meth:`enthalpy` (h is piecewise linear
        in T at fixed p); near the saturation line CoolProp's (p, h) flash is used,
        and a two-phase (p, h) state raises PropertyRangeError.
        """
        h, p = _states(h, p)
        shape = h.shape
        h, p = h.ravel(), p.ravel()
        self._check_finite(h, p)
        self._check(np.full(p.shape, self.T_min_K), p)
        kk, wp = self._p_index(p)
        n = len(h)
        # bracket [lo, hi] in knot index, grown chunk by chunk from the filled region
        i_lo_lim = int(math.ceil(self.T_min_K / _DT)) - self._i0
        i_hi_lim = int(math.floor(self.T_max_K / _DT)) - self._i0
        filled_ci = np.flatnonzero(self._filled.any(axis=1))
        if len(filled_ci):
            start_lo, start_hi = filled_ci[0] * _CHUNK_T, min((filled_ci[-1] + 1) * _CHUNK_T - 1, i_hi_lim)
        else:
            mid = int(round(min(max(300.0, self.T_min_K + 20.0), self.T_max_K) / _DT)) - self._i0
            start_lo, start_hi = mid - _CHUNK_T // 2, mid + _CHUNK_T // 2
        lo = np.full(n, max(start_lo, i_lo_lim), dtype=np.intp)
        hi = np.full(n, min(start_hi, i_hi_lim), dtype=np.intp)
        for _ in range(400):
            self._ensure(np.concatenate([lo, hi - 1]), kk)
            h_lo, h_hi = self._h_at(lo, kk, wp), self._h_at(hi, kk, wp)
            nan = np.isnan(h_lo)
            lo = np.where(nan, lo + 1, lo)  # invalid knots (melting line): step inward
            need_dn = ~nan & (h < h_lo) & (lo > i_lo_lim)
            need_up = (h >= h_hi) & (hi < i_hi_lim)  # h strictly below h_hi: one answer from any start
            if not (nan.any() or need_dn.any() or need_up.any()):
                break
            lo = np.where(need_dn, np.maximum(lo - _CHUNK_T, i_lo_lim), lo)
            hi = np.where(need_up, np.minimum(hi + _CHUNK_T, i_hi_lim), hi)
            if (lo >= hi).any():
                break
        h_lo, h_hi = self._h_at(lo, kk, wp), self._h_at(hi, kk, wp)
        outside = ~((h >= h_lo) & (h <= h_hi))
        if outside.any():
            j = int(np.flatnonzero(outside)[0])
            raise PropertyRangeError(self.label, f"enthalpy {h[j]:.6g} J/kg outside the covered temperature range "
                                     f"{self.T_min_K:g} to {self.T_max_K:g} K", None, float(p[j]))
        # bisection on knot index (h is monotonic in T along a pressure line)
        while True:
            gap = hi - lo > 1
            if not gap.any():
                break
            mid = (lo + hi) // 2
            hm = self._h_at(mid, kk, wp)
            up = gap & (h >= hm)
            dn = gap & ~up
            lo = np.where(up, mid, lo)
            hi = np.where(dn, mid, hi)
        h_lo, h_hi = self._h_at(lo, kk, wp), self._h_at(hi, kk, wp)
        frac = np.where(h_hi > h_lo, (h - h_lo) / np.where(h_hi > h_lo, h_hi - h_lo, 1.0), 0.0)
        T = (lo + self._i0 + frac) * _DT
        bad = self._bad_cells(lo, kk)
        if bad.any():
            for j in np.flatnonzero(bad):
                T[j] = self._direct_T(float(h[j]), float(p[j]))
        return T.reshape(shape)

    def _direct_T(self, h, p):
        st = self._st
        with self._lock:
            try:
                st.update(self._CP.HmassP_INPUTS, h, p)
                T, q = float(st.T()), float(st.Q())
            except ValueError as exc:
                raise PropertyRangeError(self.label, f"outside CoolProp's range ({str(exc).strip()[:120]})", None, p) from None
        if 0.0 <= q <= 1.0:
            raise PropertyRangeError(self.label, f"two-phase state (vapour quality {q:.3f}); two-phase flow is "
                                     "outside the solver's scope", T, p)
        if not (self.T_min_K <= T <= self.T_max_K):
            raise PropertyRangeError(self.label, "temperature outside the covered range", T, p)
        return T

    # ---- saturation and phase -------------------------------------------------
    def saturation_temperature(self, p) -> np.ndarray:
        """Saturation (boiling) temperature [K] at p [Pa abs]; NaN at or above the
        critical pressure or below the triple-point pressure. Interpolates 1/T_sat
        linearly in ln p on the pressure knots (Clausius-Clapeyron makes this
        nearly exact)."""
        p = np.asarray(p, dtype=float)
        kk, wp = self._p_index(_clip(np.where(np.isfinite(p) & (p > 0), p, 1.0), self.p_min_Pa, self.p_max_Pa))
        if self._sat_arr is None:
            self._sat_arr = np.full(self._nP + 1, np.nan)
            self._sat_known = np.zeros(self._nP + 1, dtype=bool)
        k_lo, k_hi = int(kk.min(initial=0)), int(kk.max(initial=0)) + 1
        if not self._sat_known[k_lo:k_hi + 1].all():
            for k in range(k_lo, k_hi + 1):
                if not self._sat_known[k]:
                    self._sat_arr[k] = self._sat_T_at_knot(k, math.exp(self._lnp0 + k * self._dlnp))
                    self._sat_known[k] = True
        t0 = self._sat_arr[kk]
        t1 = self._sat_arr[kk + 1]
        ts = 1.0 / ((1.0 - wp) / t0 + wp / t1)
        # a pressure interval holding the critical or triple point: direct
        edge = np.isfinite(p) & (np.isnan(t0) | np.isnan(t1)) & (p > 0)
        for j in np.flatnonzero(edge.ravel()):
            ts.ravel()[j] = self._tsat_scalar(float(p.ravel()[j]))
        ts = np.where(np.isfinite(p) & (p >= self.p_triple) & (p < self.p_crit), ts, np.nan)
        return ts

    def freezing_temperature(self, p=None) -> Optional[float]:
        """Triple-point temperature [K] (the melting line's low-pressure end); CoolProp's
        equations are not valid below it."""
        return float(self.T_triple)

    def is_gas(self, T, p) -> np.ndarray:
        """True where the state is vapour (above saturation) or above the critical temperature."""
        T, p = _states(T, p)
        ts = self.saturation_temperature(p)
        return (T >= self.T_crit) | (np.isfinite(ts) & (T > ts)) | (p < self.p_triple)


# --------------------------------------------------------------------------- phase of a state

#: A state this close to its saturation temperature counts as *at* saturation (boiling or condensing):
#: the line solver keeps property look-ups 0.05 K to the feed's side of the saturation line.
SATURATION_BAND_K = 0.05


def state_phase(fluid: FluidModel, T: float, p: float) -> tuple[str, float]:
    """The phase of one state, ``'liquid'``, ``'gas'`` (vapour or above the critical temperature) or
    ``'saturated'`` (within :data:`SATURATION_BAND_K` of boiling), and the saturation temperature at p [K]
    (NaN where there is none: solutions, user tables without a boiling point, beyond the critical point).

    Solutions and user tables are liquids; a user table's boiling point is a check, not a phase.
    """
    if not isinstance(fluid, PureFluidModel):
        return "liquid", float("nan")
    tsat = float(fluid.saturation_temperature(np.array([p]))[0])
    if math.isfinite(tsat):
        if abs(T - tsat) <= SATURATION_BAND_K:
            return "saturated", tsat
        return ("liquid" if T < tsat else "gas"), tsat
    return ("gas" if bool(fluid.is_gas(np.array([T]), np.array([p]))[0]) else "liquid"), tsat


# --------------------------------------------------------------------------- factory


@lru_cache(maxsize=64)
def _model_from_json(key: str) -> FluidModel:
    d = json.loads(key)
    kind = d.get("kind")
    if kind == "pure":
        return PureFluidModel(PureFluid.model_validate(d))
    if kind == "solution":
        return SolutionModel(SolutionFluid.model_validate(d))
    if kind == "table":
        return UserTableModel(TableFluid.model_validate(d))
    raise InputError("fluid.kind", kind, "unknown fluid kind")


def fluid_model(spec: Union[PureFluid, SolutionFluid, TableFluid]) -> FluidModel:
    """The property model of a fluid spec, built once and cached per spec
    (keyed on ``spec.model_dump_json()``)."""
    return _model_from_json(spec.model_dump_json())
