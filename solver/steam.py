"""Saturated steam heating a pipe: saturation, the condensate film, and steam tube tracers.

Two ways a segment can be heated by steam (see ``solver.model``):

* steam condensing on the pipe itself (``FixedWall`` with a steam pressure, e.g. a steam jacket):
  between the steam at T_sat and the pipe's outer wall lie the condensate film
  (:func:`condensing_film_coefficient`, Nusselt film condensation on a horizontal tube) and any
  steam-side fouling;
* steam tube tracers along the pipe under its insulation (``SteamTracer``): each passes
  :func:`tracer_conductance_W_per_mK` × (T_sat − T_pipe wall) per metre of pipe.

Water properties come from CoolProp's IAPWS-95 water (``HEOS::Water``), the same source as
``solver.properties``. CoolProp is slow per state (~250 µs for a saturated state with transport
properties), so the saturated-liquid and -vapour properties are tabulated on fixed 1 K knots from
the triple point to 640 K (shipped as ``solver/data/water_saturation.csv``) and interpolated (a fixed
table cannot change an answer, only its cost; a test checks it against CoolProp). Saturation temperatures of a pressure come from the same
table (within 0.3 mK of CoolProp), so steam needs no CoolProp call at all.
"""

from __future__ import annotations

import math
import threading
from pathlib import Path

import numpy as np

from solver import correlations
from solver.errors import InputError

#: Temperature span of the saturated-water table [K]: the triple point of water to 640 K
#: (saturation pressure 20.3 MPa; the critical point is 647.096 K, where h_fg -> 0).
T_TABLE_MIN_K = 273.16
T_TABLE_MAX_K = 640.0
_DT_KNOT = 1.0
WATER_TABLE = Path(__file__).with_name("data") / "water_saturation.csv"


class _SaturatedWater:
    """Saturated water on fixed 1 K temperature knots, from CoolProp's IAPWS-95 water.

    Columns: saturation pressure, liquid density, liquid cp, ln(liquid viscosity), liquid
    conductivity, vapour density, latent heat. Liquid properties of the condensate film are taken on
    the saturation line at the film temperature (the film is liquid slightly below saturation at the
    steam pressure; the pressure effect on a liquid is far below 0.1 %). The table ships with the
    package (``solver/data/water_saturation.csv``, written by ``scripts/make_water_table.py`` from
    :meth:`from_coolprop` with every digit kept) because building it costs ~0.4 s of CoolProp calls;
    a test checks the file against CoolProp. Linear interpolation (ln μ for the viscosity) stays
    within 0.01 % of CoolProp below 600 K (0.05 % for the vapour density; 0.3 % in cp at 639 K, next
    to the critical point).
    """

    _instance = None
    _lock = threading.Lock()
    COLUMNS = ("T_K", "p_sat_Pa", "rho_liquid", "cp_liquid", "ln_mu_liquid", "k_liquid", "rho_vapour", "h_fg")

    def __init__(self, rows: np.ndarray):
        self.t, self.p_sat, self.rho_l, self.cp_l, self.ln_mu_l, self.k_l, self.rho_v, self.h_fg = rows.T
        self.rows = rows
        self.ln_p_sat = np.log(self.p_sat)  # for the saturation temperature of a pressure
        self.inv_t = 1.0 / self.t

    @classmethod
    def from_coolprop(cls) -> "_SaturatedWater":
        """The table computed afresh from CoolProp (what the shipped file holds)."""
        import CoolProp  # lazily: start-up stays short

        st = CoolProp.AbstractState("HEOS", "Water")
        # the triple point, then whole kelvins up to 640 K
        t = np.concatenate([[T_TABLE_MIN_K], np.arange(274.0, T_TABLE_MAX_K + 0.5 * _DT_KNOT, _DT_KNOT)])
        rows = np.empty((t.size, 8))
        for i, ti in enumerate(t.tolist()):
            st.update(CoolProp.QT_INPUTS, 0.0, ti)
            p, rho_l, cp_l, mu_l, k_l, h_l = (st.p(), st.rhomass(), st.cpmass(), st.viscosity(),
                                              st.conductivity(), st.hmass())
            st.update(CoolProp.QT_INPUTS, 1.0, ti)
            rows[i] = (ti, p, rho_l, cp_l, math.log(mu_l), k_l, st.rhomass(), st.hmass() - h_l)
        return cls(rows)

    @classmethod
    def from_file(cls, path: Path = WATER_TABLE) -> "_SaturatedWater":
        return cls(np.loadtxt(path, delimiter=",", comments="#"))

    def write(self, path: Path = WATER_TABLE) -> None:
        """Write the table with every digit (repr round-trips a float64 exactly)."""
        lines = ["# Saturated water from CoolProp's IAPWS-95 water (HEOS::Water); "
                 "written by scripts/make_water_table.py",
                 "# T [K], p_sat [Pa], rho_liquid [kg/m3], cp_liquid [J/(kg K)], ln(mu_liquid [Pa s]), "
                 "k_liquid [W/(m K)], rho_vapour [kg/m3], h_fg [J/kg]"]
        lines += [",".join(repr(v) for v in row) for row in self.rows.tolist()]
        path.write_text("\n".join(lines) + "\n", encoding="utf-8")

    @classmethod
    def get(cls) -> "_SaturatedWater":
        if cls._instance is None:
            with cls._lock:
                if cls._instance is None:
                    cls._instance = cls.from_file() if WATER_TABLE.exists() else cls.from_coolprop()
        return cls._instance

    def liquid(self, t):
        """(ρ_l, c_p,l, μ_l, k_l) of saturated liquid at temperatures t [K] (clipped to the table)."""
        t = np.clip(t, T_TABLE_MIN_K, T_TABLE_MAX_K)
        tk = self.t
        return (np.interp(t, tk, self.rho_l), np.interp(t, tk, self.cp_l),
                np.exp(np.interp(t, tk, self.ln_mu_l)), np.interp(t, tk, self.k_l))

    def vapour(self, t_sat):
        """(ρ_v, h_fg) of saturated vapour at saturation temperatures t_sat [K]."""
        return np.interp(t_sat, self.t, self.rho_v), np.interp(t_sat, self.t, self.h_fg)


def saturation_temperatures_K(p_steam_Pa, field: str = "steam_pressure_Pa") -> np.ndarray:
    """Saturation temperature [K] of steam at absolute pressures [Pa] (scalar or array), IAPWS-95.

    From the saturated-water table: 1/T_sat interpolated linearly in ln p between the 1 K knots
    (Clausius–Clapeyron makes this nearly exact: within 0.3 mK of CoolProp over the whole range),
    so no CoolProp call is needed. Raises :class:`InputError` naming ``field`` when a pressure lies
    outside the covered range: 611.7 Pa (the triple point) to 20.3 MPa (saturation at 640 K; the
    critical point is 22.06 MPa, where condensing steam stops being a meaningful idea).
    """
    table = _SaturatedWater.get()
    p = np.asarray(p_steam_Pa, dtype=float)
    lo, hi = float(table.p_sat[0]), float(table.p_sat[-1])
    bad = ~((p >= lo) & (p <= hi))  # also NaN
    if bad.any():
        value = float(p[bad].flat[0]) if p.ndim else float(p)
        raise InputError(field, value, f"steam pressure must lie between {lo:.4g} Pa and {hi / 1e6:.4g} MPa absolute "
                                       "(triple point of water to 640 K saturation)")
    return 1.0 / np.interp(np.log(p), table.ln_p_sat, table.inv_t)


def saturation_temperature_K(p_steam_Pa: float, field: str = "steam_pressure_Pa") -> float:
    """:func:`saturation_temperatures_K` of one pressure, as a float.

    >>> round(saturation_temperature_K(101325.0) - 273.15, 3)  # the normal boiling point, 99.974 °C (IAPWS-95)
    99.974
    """
    return float(saturation_temperatures_K(float(p_steam_Pa), field))


def condensing_film_coefficient(p_steam_Pa, t_wall_K, d_outer_m, factor: float = 1.0):
    """Condensing-steam film coefficient on the outside of a horizontal pipe [W/(m² K)], per cell.

    Nusselt film condensation with Rohsenow's latent heat
    (:func:`solver.correlations.condensation_horizontal_tube`), condensate properties at the film
    temperature (T_sat + T_wall)/2 and vapour properties at T_sat, from the saturated-water table.
    0 where the wall is at or above the steam's saturation temperature (no condensation).

    Parameters
    ----------
    p_steam_Pa : float or array_like — absolute steam pressure [Pa] (one per segment, or per cell)
    t_wall_K : array_like — pipe outer-wall temperature per cell [K]
    d_outer_m : float or array_like — pipe outer diameter [m]
    factor : float — multiplier for the uncertainty bands (``MethodFactors.condensation``)

    Returns
    -------
    h : ndarray — film coefficient per cell on the pipe's outer surface [W/(m² K)]

    Steam at 7.381 kPa (40 °C) on a 3 cm tube at 30 °C: Çengel, Heat Transfer, Example 10-5 (2nd ed.,
    from memory) gets 9292 W/(m² K) with its table properties; with IAPWS-95 properties:

    >>> round(float(condensing_film_coefficient(7381.0, 303.15, 0.03)))
    9282
    """
    t_sat = saturation_temperatures_K(p_steam_Pa)
    table = _SaturatedWater.get()
    t_wall = np.asarray(t_wall_K, dtype=float)
    rho_l, cp_l, mu_l, k_l = table.liquid(0.5 * (t_sat + t_wall))
    rho_v, h_fg = table.vapour(t_sat)
    h = correlations.condensation_horizontal_tube(t_sat, t_wall, d_outer_m, rho_l, rho_v, h_fg, cp_l, k_l, mu_l)
    return h * factor if factor != 1.0 else h


def condensate_film_resistance(p_steam_Pa, t_wall_K, d_outer_m, factor: float = 1.0):
    """Resistance of the condensate film per metre of pipe, 1/(h π D) [K·m/W], per cell.

    ``inf`` (no warning) where nothing condenses (the wall at or above T_sat): an open circuit,
    the steam neither heats nor cools the pipe there. Steam-side fouling adds R''_f/(π D) in series.
    """
    h = condensing_film_coefficient(p_steam_Pa, t_wall_K, d_outer_m, factor)
    g = h * (math.pi * np.asarray(d_outer_m, dtype=float))
    return np.divide(1.0, g, out=np.full(np.shape(g), np.inf), where=g > 0.0)


def condensate_film_reynolds(p_steam_Pa: float, t_wall_K, d_outer_m, h=None):
    """Film Reynolds number Re_δ = 4Γ/μ_l of the condensate leaving a horizontal pipe, per cell [-].

    Γ is the condensate per unit length of pipe on each side of the tube (half the condensate
    rate per metre, ṁ' = h π D (T_sat − T_w) / h'_fg), so Re_δ = 2 ṁ'/μ_l (Çengel, Heat
    Transfer, ch. 10: wetted perimeter 2L for a horizontal tube). For
    ``out_of_range("film_condensation", Re_film=...)``; ``h`` may pass the coefficients already
    computed by :func:`condensing_film_coefficient`.
    """
    t_sat = saturation_temperatures_K(p_steam_Pa)
    table = _SaturatedWater.get()
    t_wall = np.asarray(t_wall_K, dtype=float)
    if h is None:
        h = condensing_film_coefficient(p_steam_Pa, t_wall, d_outer_m)
    _, cp_l, mu_l, _ = table.liquid(0.5 * (t_sat + t_wall))
    _, h_fg = table.vapour(t_sat)
    d_t = np.maximum(t_sat - t_wall, 0.0)
    m_per_m = h * math.pi * np.asarray(d_outer_m, dtype=float) * d_t / (h_fg + 0.68 * cp_l * d_t)
    return 2.0 * m_per_m / mu_l


# --------------------------------------------------------------------------- steam tube tracers

#: Contact conductance between one steam tracer and the pipe, per metre of pipe, per metre of tracer
#: outside diameter [W/(m·K) per m of tube OD], by contact. Published tracing-design values are
#: quoted in Btu/(h·ft·°F) per tracer for 3/8 in and 1/2 in tubes; these are FROM MEMORY
#: (tracer manufacturers' steam-tracing design guides; Kohli, I. P. (1979) Steam tracing of
#: pipelines, Chem. Eng. 86(7), 155–160; Perry's Chemical Engineers' Handbook, "tracing"):
#:
#: * bare tracer wired to the pipe: about 0.4 Btu/(h·ft·°F) for a 1/2 in tube, i.e. 0.68 W/(m·K);
#:   published values range over about 0.3–1.0 W/(m·K) per tracer for 3/8–1/2 in tubes,
#:   depending on how tightly it is wired and on the air space.
#: * tracer bedded in heat-transfer cement: roughly ten times the bare value, about
#:   4.4 Btu/(h·ft·°F) = 7.6 W/(m·K) for a 1/2 in tube; published range about 4–10 W/(m·K).
#:
#: Both scale with the tube's outside diameter (the bare tracer's surface facing the air space and
#: the width of the cement fillet, about 2–3 tube diameters, both grow with it), normalised to the
#: 1/2 in (12.7 mm) tube.
TRACER_CONDUCTANCE_PER_M_OD: dict[str, float] = {
    "bare": 0.68 / 0.0127,
    "cement": 7.6 / 0.0127,
}
#: The from-memory range of the 1/2 in values [W/(m·K)], for the uncertainty bands and the editors.
TRACER_CONDUCTANCE_RANGE_HALF_INCH: dict[str, tuple[float, float]] = {
    "bare": (0.3, 1.0),
    "cement": (4.0, 10.0),
}
TRACER_SOURCE = (
    "Tracer-to-pipe contact conductance from published steam-tracing design values (manufacturers' "
    "steam-tracing design guides; Kohli 1979, Chem. Eng. 86(7) 155–160), from memory: bare tracer about "
    "0.68 W/(m·K), in heat-transfer cement about 7.6 W/(m·K) per 1/2 in tracer, scaled with the tube diameter"
)


def tracer_conductance_W_per_mK(contact: str, tube_outer_diameter_m: float) -> float:
    """Conductance between one steam tube tracer and the pipe wall, per metre of pipe [W/(m·K)].

    Model: heat from the tracers to the pipe per metre = count × C × (T_sat − T_pipe outer wall),
    with C from this function, T_sat the tracer steam's saturation temperature.

    Assumptions (they are those behind the published design values):

    * The tracer runs along the pipe under the pipe's insulation; C covers every path from the
      tracer to the pipe: for a bare tracer the few points of metal contact plus convection and
      radiation across the air space under the insulation, for a cemented tracer conduction
      through the cement fillet. The condensing film inside the tracer and the tube wall are
      small against these and are included.
    * The air space itself is otherwise ignored: the insulation is taken to start at the pipe's
      outer wall at the pipe's temperature. The heat the tracer loses straight into the insulation
      is the steam's loss, not the pipe's, so it is not counted; the warmer air space makes the
      pipe's real loss a little smaller than computed (a conservative error).
    * The tracer is meant to heat. Where the pipe is at or above T_sat no steam condenses in the
      tracer; heat would then flow into the tracer only through the much weaker vapour film inside
      it, so :func:`tracer_heat_W_per_m` clips at zero (the tracer neither heats nor cools). A march
      that treats the tracers as a linear conductance count × C to T_sat (exact while the pipe is
      below T_sat) overstates that cooling and should flag the cells where the pipe is above T_sat.

    Values (from memory, see ``TRACER_CONDUCTANCE_PER_M_OD``): bare 0.68 W/(m·K) and cement
    7.6 W/(m·K) for a 1/2 in (12.7 mm) tube, proportional to the tube diameter.

    >>> round(tracer_conductance_W_per_mK("bare", 0.0127), 2), round(tracer_conductance_W_per_mK("cement", 0.0127), 1)
    (0.68, 7.6)
    """
    try:
        per_m = TRACER_CONDUCTANCE_PER_M_OD[contact]
    except KeyError:
        raise InputError("steam_tracer.contact", contact, "must be 'bare' or 'cement'") from None
    d = float(tube_outer_diameter_m)
    if not (math.isfinite(d) and d > 0.0):
        raise InputError("steam_tracer.tube_outer_diameter_m", d, "must be more than 0 m")
    return per_m * d


def tracer_heat_W_per_m(p_steam_Pa: float, count: int, contact: str, tube_outer_diameter_m: float,
                        t_wall_K, factor: float = 1.0):
    """Heat from ``count`` steam tracers into the pipe wall per metre of pipe [W/m], per cell.

    count × C × max(T_sat − T_wall, 0); see :func:`tracer_conductance_W_per_mK`.
    ``factor`` is ``MethodFactors.tracer_conductance`` for the uncertainty bands.
    """
    c = count * tracer_conductance_W_per_mK(contact, tube_outer_diameter_m) * factor
    t_sat = saturation_temperatures_K(p_steam_Pa, field="steam_tracer.steam_pressure_Pa")
    return c * np.maximum(t_sat - np.asarray(t_wall_K, dtype=float), 0.0)
