"""Design cases of a traced or insulated line: worst case, hot case, and the tracing each segment needs.

Besides the operating case (each segment's own surroundings, the ordinary solve), the project's
:class:`~solver.model.DesignCases` define

* the **worst case**: every segment in air at the coldest design air temperature in the strongest
  design wind (as :class:`~solver.model.Wind`; a film coefficient entered for the operating case is
  dropped, the film is computed for the design wind), a buried segment at the worst soil temperature
  when one is given; jackets and fixed walls unchanged. With ``worst_no_flow`` the line stands still:
  each segment settles where its heating (heater per its kind, steam tracer) balances the loss through
  its outside path plus its heat sinks. Without it the flowing line is marched in those surroundings.
* the **hot case**: still air at the warmest design air temperature, no flow, heaters at full output
  (a thermostat taken as failed on): the highest pipe-wall temperature under the heater.

With the flow stopped a segment's fluid, pipe wall and heater share one temperature (the fluid has
no flow to carry heat away, so in the steady state no heat crosses the inside film). The outer air
film and the insulation are evaluated at the temperatures of that balance, iterated to a fixed point;
the air film is :func:`solver.films.air_film_parts`, the same model as the march's.

The **tracing need** (common practice in trace-heating design): the heat a segment loses per metre at
the worst case with the pipe held at the maintain temperature, plus its heat sinks per metre, both
times (1 + design margin), is the output the heater must deliver at that temperature.
"""

from __future__ import annotations

import dataclasses

import math
from dataclasses import dataclass, field
from typing import Callable, Optional

import numpy as np

from solver import correlations, hold_time as hold_time_mod, insulation
from solver.errors import SolverError
from solver.films import AirAtOneAtmosphere, air_film_parts
from solver.heat_sinks import sink_conductances
from solver.line import LineGrid, build_line
from solver.model import (Alternative, Buried, ConstantHeater, DesignCases, SelfLimitingHeater, StillAir,
                          ThermostatHeater, Wind)
from solver.properties import fluid_model

#: Freeze protection without a maintain temperature: hold the freezing point plus this (common practice).
FREEZE_PROTECTION_MARGIN_K = 5.0
#: Shown next to the hot case's highest wall temperature (the issue's caution; wording ours).
HOT_CASE_CAUTION = (
    "The highest pipe-wall temperature of the hot case is the pipe's, under the heater: the heater's own "
    "sheath runs hotter. The heater maker's stabilised-design data and the applicable standard for trace "
    "heating in hazardous areas decide the temperature class.")
#: Kinds of surroundings the design cases change and the tracing need applies to.
EXPOSED_KINDS = ("still_air", "wind", "buried")
#: No-flow kinds a standing segment can settle in (a fixed wall or a jacket sets the temperature itself).
_STANDING_KINDS = ("still_air", "wind", "buried", "adiabatic")


# --------------------------------------------------------------------------- the cases as alternatives


def case_alternative(alt: Alternative, cases: DesignCases, case: str) -> Alternative:
    """The alternative in the surroundings of design case ``case`` ("worst" or "hot"); see the module."""
    if case not in ("worst", "hot"):
        raise ValueError(f"design case must be 'worst' or 'hot', got {case!r}")
    segments = []
    for seg in alt.segments:
        sur = seg.surroundings
        new = sur
        if isinstance(sur, (StillAir, Wind)) and not getattr(sur, "indoors", False):  # indoor air: as entered
            if case == "worst":
                new = Wind(temperature_K=cases.worst_air_temperature_K, wind_speed_m_per_s=cases.worst_wind_speed_m_per_s,
                           emissivity=sur.emissivity)
            else:
                new = StillAir(temperature_K=cases.hot_air_temperature_K, emissivity=sur.emissivity)
        elif isinstance(sur, Buried) and case == "worst" and cases.worst_soil_temperature_K is not None:
            new = sur.model_copy(update={"soil_temperature_K": cases.worst_soil_temperature_K})
        segments.append(seg if new is sur else seg.model_copy(update={"surroundings": new}))
    return alt.model_copy(update={"segments": segments})


# --------------------------------------------------------------------------- outside path, per segment


class OutsidePath:
    """Each segment's path from the pipe's outer wall to its surroundings, at any pipe temperature.

    Per metre of pipe: the conductance through insulation and outer film (or soil, or jacket film)
    and that of the heat sinks (equivalent lengths of the segment's insulated and bare pipe, and direct
    W/K, from :func:`solver.heat_sinks.sink_conductances`). Built once from the line of a case
    alternative; :meth:`conductances` evaluates the air films at the given temperatures. Arrays are
    per segment; every method takes ``rows`` (segment index per row) so several scenarios of the same
    segments can be evaluated together.
    """

    def __init__(self, alt: Alternative, line: LineGrid):
        first = line.seg_first_cell
        setups = line.segments
        self.n = len(setups)
        self.names = [s.name for s in setups]
        self.kind = np.array([s.kind for s in setups])
        self.length_m = np.array([s.length_m for s in setups])
        self.t_inf = np.nan_to_num(line.t_inf[first], nan=0.0)
        self.film = line.film_mask[first].copy()
        self.r_fixed = line.r_fixed_out[first].copy()  # whole outside path where no air film is computed
        self.r_ins = line.r_ins[first].copy()
        self.d_out = line.d_outer[first].copy()
        self.d_pipe = np.array([s.pipe_outer_diameter_m for s in setups])
        self.wind = line.wind_speed[first].copy()
        self.emissivity = line.emissivity[first].copy()
        self.vertical = line.vertical_length[first].copy()
        self.g_tracer = line.g_tracer[first].copy()
        self.t_tracer = line.t_tracer[first].copy()
        self.layer_resistances = [list(s.layer_resistances) for s in setups]
        # insulation with the catalogue k(T): its resistance is worked out at each call's temperatures
        self.kt_layers = [tuple(getattr(s, "insulation_layers", ())) for s in setups]
        self.kt = np.array([bool(layers) for layers in self.kt_layers], dtype=bool)
        self.r_soil = np.array([s.soil_resistance for s in setups])
        self.exposed = np.isin(self.kind, EXPOSED_KINDS)
        self.standing = np.isin(self.kind, _STANDING_KINDS)
        self.air = AirAtOneAtmosphere.get() if self.film.any() else None
        # heat sinks per metre of pipe; they lose heat only to air or soil
        l_ins, l_bare, g_dir, r_bare_soil = (np.zeros(self.n) for _ in range(4))
        for s, seg in zip(setups, alt.segments):
            if not self.exposed[s.index]:
                continue
            totals = sink_conductances(seg, s.pipe_outer_diameter_m)
            l_ins[s.index] = totals.insulated_equivalent_length_m / s.length_m
            l_bare[s.index] = totals.bare_equivalent_length_m / s.length_m
            g_dir[s.index] = totals.direct_W_per_K / s.length_m
            if totals.bare_equivalent_length_m > 0 and isinstance(seg.surroundings, Buried):
                sur = seg.surroundings
                r_bare_soil[s.index] = float(correlations.buried_cylinder_resistance(
                    s.pipe_outer_diameter_m, sur.depth_m, sur.soil_conductivity_W_per_mK))
        self.sink_insulated_m_per_m, self.sink_bare_m_per_m, self.sink_direct_W_per_mK = l_ins, l_bare, g_dir
        self.r_bare_soil = r_bare_soil
        self.any_sinks = bool((l_ins > 0).any() or (l_bare > 0).any() or (g_dir > 0).any())

    def surface_start(self, rows: np.ndarray, t_pipe: np.ndarray) -> np.ndarray:
        """A first outer-surface temperature: halfway between the pipe and the surroundings."""
        return 0.5 * (t_pipe + self.t_inf[rows])

    def _insulation_at(self, rows, t_pipe, t_surf, film, r_ins_rows, r_fixed):
        """Insulation resistance of the k(T) segments at these temperatures (solver.insulation): between the
        pipe and the outer surface in air, or the insulation's outer face against the soil (from the series
        split at the last resistances; the caller's iteration settles it)."""
        r_ins_rows, r_fixed = r_ins_rows.copy(), r_fixed.copy()
        for k in np.flatnonzero(self.kt):
            sel = rows == k
            if not sel.any():
                continue
            if film[sel].all():
                t_cold = t_surf[sel]
            else:  # buried: the face against the soil
                share = self.r_soil[k] / max(r_ins_rows[sel][0] + self.r_soil[k], 1e-300)
                t_cold = self.t_inf[k] + (t_pipe[sel] - self.t_inf[k]) * share
            r_total, _ = insulation.layer_resistances(self.kt_layers[k], self.d_pipe[k], t_pipe[sel], t_cold,
                                                      field_prefix=f"segments[{k}].insulation")
            r_ins_rows[sel] = r_total
            if not film[sel].all():
                r_fixed[sel] = r_total + self.r_soil[k]
        return r_ins_rows, r_fixed

    def conductances(self, rows: np.ndarray, t_pipe: np.ndarray, t_surface: np.ndarray):
        """Per row: (pipe-to-surroundings conductance, heat-sink conductance [W/(m·K)] per metre of pipe,
        the outer surface temperature from the surface balance at these films [K]).

        The air film is evaluated at ``t_surface`` (the caller iterates: pass the returned surface
        temperature back in); a bare heat sink's film at the pipe temperature on the pipe's own diameter.
        """
        r_fixed = self.r_fixed[rows]
        r_ins_rows = self.r_ins[rows]
        t_surf = np.array(t_surface, dtype=float, copy=True)
        film = self.film[rows]
        if self.kt.any():
            r_ins_rows, r_fixed = self._insulation_at(rows, t_pipe, t_surf, film, r_ins_rows, r_fixed)
        with np.errstate(divide="ignore"):
            g_pipe = np.where(np.isfinite(r_fixed), 1.0 / r_fixed, 0.0)
        g_bare = np.zeros(rows.size)
        if film.any():
            fr = rows[film]
            t_inf = self.t_inf[fr]
            vertical = self.vertical[fr]
            kw = {"vertical_length": vertical} if vertical.any() else {}
            h_conv, h_rad = air_film_parts(self.air, t_surf[film], t_inf, self.d_out[fr], self.wind[fr],
                                           self.emissivity[fr], **kw)
            g_film = (h_conv + h_rad) * math.pi * self.d_out[fr]
            r_ins = r_ins_rows[film]
            g_pipe[film] = 1.0 / (r_ins + 1.0 / g_film)
            # the surface balance, as in the march: (T_p − T_s)/R_ins = g_film (T_s − T∞)
            t_surf[film] = (t_pipe[film] + r_ins * g_film * t_inf) / (1.0 + r_ins * g_film)
            bare = self.sink_bare_m_per_m[fr] > 0
            if bare.any():
                hb_c, hb_r = air_film_parts(self.air, t_pipe[film][bare], t_inf[bare], self.d_pipe[fr][bare],
                                            self.wind[fr][bare], self.emissivity[fr][bare])
                gb = np.zeros(fr.size)
                gb[bare] = (hb_c + hb_r) * math.pi * self.d_pipe[fr][bare]
                g_bare[film] = gb
        soil = self.r_bare_soil[rows] > 0
        g_bare[soil] = 1.0 / self.r_bare_soil[rows][soil]
        # (sinks lose only to air or soil, where g_pipe is finite: a fixed wall's infinite one is left out)
        l_ins = self.sink_insulated_m_per_m[rows]
        g_sink = (np.where(l_ins > 0, l_ins * np.where(np.isfinite(g_pipe), g_pipe, 0.0), 0.0)
                  + self.sink_bare_m_per_m[rows] * g_bare + self.sink_direct_W_per_mK[rows])
        return g_pipe, g_sink, t_surf


# --------------------------------------------------------------------------- heaters as linear pieces


@dataclass(frozen=True)
class HeaterLaw:
    """Each segment's electric heater, per metre of pipe: kind code, full output, slope, zero-output and
    set-point temperatures (arrays per segment). kind: 0 none, 1 constant, 2 self-limiting, 3 thermostat."""

    kind: np.ndarray
    full_W_per_m: np.ndarray
    slope_W_per_mK: np.ndarray
    zero_output_K: np.ndarray
    set_point_K: np.ndarray

    @classmethod
    def of(cls, alt: Alternative) -> "HeaterLaw":
        n = len(alt.segments)
        kind, full, slope = np.zeros(n, dtype=int), np.zeros(n), np.zeros(n)
        zero, sp = np.full(n, np.nan), np.full(n, np.nan)
        for i, seg in enumerate(alt.segments):
            h = seg.heater
            if isinstance(h, ConstantHeater):
                kind[i], full[i] = 1, h.full_output_per_pipe_metre
            elif isinstance(h, SelfLimitingHeater):
                kind[i], full[i] = 2, h.full_output_per_pipe_metre
                slope[i], zero[i] = h.slope_W_per_mK, h.zero_output_temperature_K
            elif isinstance(h, ThermostatHeater):
                kind[i], full[i], sp[i] = 3, h.full_output_per_pipe_metre, h.set_point_K
        return cls(kind, full, slope, zero, sp)

    def output(self, rows: np.ndarray, t_pipe: np.ndarray) -> np.ndarray:
        """Output per metre of pipe at ``t_pipe`` with the heater on [W/m] (a thermostat's full output)."""
        k = self.kind[rows]
        out = np.where((k == 1) | (k == 3), self.full_W_per_m[rows], 0.0)
        sl = k == 2
        if sl.any():
            out[sl] = np.maximum(self.slope_W_per_mK[rows][sl] * (self.zero_output_K[rows][sl] - t_pipe[sl]), 0.0)
        return out


def standing_temperature(path: OutsidePath, heaters: HeaterLaw, rows: np.ndarray, *, heater_on: bool = True,
                         thermostat_controls: bool = True, tracer_on: bool = True, iterations: int = 60,
                         tol_K: float = 1e-6):
    """Where each standing segment settles: heating = loss through the outside path + heat sinks.

    Returns (temperature [K], electric heater output [W/m], thermostat duty [-] or NaN, tracer heat [W/m]).
    The balance is linear in the pipe temperature for fixed films, so each pass solves it exactly
    (piece by piece: a self-limiting heater's straight line, clamped at zero above its zero-output
    temperature; a steam tracer gives heat only below its steam temperature) and then re-evaluates
    the films; ``thermostat_controls`` False takes a thermostat as failed on (the hot case). A segment
    with no outside path and net heating has no steady state: +inf.
    """
    n = rows.size
    t_inf = path.t_inf[rows]
    kind = heaters.kind[rows] if heater_on else np.zeros(n, dtype=int)
    q_full = heaters.full_W_per_m[rows]
    s, tz, sp = heaters.slope_W_per_mK[rows], heaters.zero_output_K[rows], heaters.set_point_K[rows]
    g_t = path.g_tracer[rows] if tracer_on else np.zeros(n)
    t_t = path.t_tracer[rows]
    T = t_inf.copy()
    t_surf = path.surface_start(rows, T)
    duty = np.full(n, np.nan)
    for _ in range(iterations):
        g_pipe, g_sink, t_surf = path.conductances(rows, T, t_surf)
        G = g_pipe + g_sink
        # try every piece, keep the consistent one: heater linear part on/off, tracer on/off
        a = G * t_inf
        b = G.copy()
        const = (kind == 1) | (kind == 3)
        a = a + np.where(const, q_full, 0.0)
        sl = (kind == 2)
        a_sl, b_sl = a + np.where(sl, s * np.nan_to_num(tz), 0.0), b + np.where(sl, s, 0.0)
        T_new = _with_tracer(a_sl, b_sl, g_t, t_t)
        above = sl & (T_new > tz)  # past zero output the heater gives nothing
        if above.any():
            T_new[above] = _with_tracer(a[above], b[above], g_t[above], t_t[above])
        if thermostat_controls:
            th = kind == 3
            hold = th & (T_new >= sp)
            if hold.any():
                # the set point held when full output reaches it; else full output all the time
                T_off = _with_tracer(G[hold] * t_inf[hold], G[hold], g_t[hold], t_t[hold])
                held = T_off < sp[hold]
                idx = np.flatnonzero(hold)
                T_new[idx[held]] = sp[idx[held]]
                T_new[idx[~held]] = T_off[~held]
        step = np.nanmax(np.abs(np.where(np.isfinite(T_new), T_new - T, 0.0))) if n else 0.0
        T = T_new
        if step < tol_K:
            break
    q_heat = heaters.output(rows, np.where(np.isfinite(T), T, 0.0)) if heater_on else np.zeros(n)
    q_tracer = np.where(T < t_t, g_t * (t_t - T), 0.0)
    if heater_on and thermostat_controls:
        th = kind == 3
        g_pipe, g_sink, _ = path.conductances(rows, T, t_surf)
        need = (g_pipe + g_sink) * (T - t_inf) - q_tracer
        duty[th] = np.clip(need[th] / np.where(q_full[th] > 0, q_full[th], 1.0), 0.0, 1.0)
        q_heat[th] = duty[th] * q_full[th]
    return T, q_heat, duty, q_tracer


def _with_tracer(a, b, g_t, t_t):
    """Solve a − b·T + g_t·(T_t − T)⁺ = 0 for T (the tracer's part only while T < T_t).

    Without any path to surroundings (b = 0, adiabatic) net heating has no steady state (+inf) and
    no heating leaves the temperature undetermined (NaN).
    """
    with np.errstate(divide="ignore", invalid="ignore"):
        t_off = np.where(b > 0, a / np.where(b > 0, b, 1.0), np.where(a > 0, np.inf, np.nan))
        bt = b + g_t
        t_on = np.where(bt > 0, (a + g_t * t_t) / np.where(bt > 0, bt, 1.0), t_off)
    tracer = g_t > 0
    out = np.where(tracer & (t_on < t_t), t_on, t_off)
    # the tracer's steam temperature between the two: the tracer holds the pipe there (no heat either way)
    return np.where(tracer & (t_on >= t_t) & (t_off < t_t), t_t, out)


# --------------------------------------------------------------------------- results


@dataclass(frozen=True)
class SegmentDesign:
    """One segment in the design cases (SI; NaN where a figure does not apply).

    ``exposed``: in air or buried (the design cases and the tracing need apply). Worst case:
    ``worst_surroundings_temperature_K``, ``worst_temperature_K`` (the lowest bulk temperature: standing
    still, or along the segment when the worst case flows), ``worst_heater_output_W_per_m`` (electric,
    delivered), ``worst_tracer_heat_W_per_m`` (steam), ``worst_thermostat_duty`` (0–1, NaN without a
    thermostat). Hot case: ``hot_wall_temperature_K`` (pipe wall under the heater, standing still,
    heater at full output), ``hot_heater_output_W_per_m``. Tracing need at ``maintain_temperature_K``:
    ``heat_loss_W_per_m`` (pipe, worst case, no margin), ``heat_sinks_W_per_m`` (no margin),
    ``design_margin`` (fraction), ``required_output_W_per_m`` = (loss + sinks)·(1 + margin),
    ``available_output_W_per_m`` (electric at the maintain temperature, full output for constant and
    thermostat, plus a steam tracer's heat there), ``holds`` (None where not assessed).
    """

    index: int
    name: str
    exposed: bool
    heater_kind: str  # "none", "constant", "self_limiting", "thermostat"
    worst_surroundings_temperature_K: float
    worst_temperature_K: float
    worst_heater_output_W_per_m: float
    worst_tracer_heat_W_per_m: float
    worst_thermostat_duty: float
    hot_wall_temperature_K: float
    hot_heater_output_W_per_m: float
    maintain_temperature_K: float
    heat_loss_W_per_m: float
    heat_sinks_W_per_m: float
    design_margin: float
    required_output_W_per_m: float
    available_output_W_per_m: float
    holds: Optional[bool]

    def to_dict(self) -> dict:
        out = {}
        for key, value in self.__dict__.items():
            out[key] = None if isinstance(value, float) and not math.isfinite(value) else value
        return out


_HEATER_KINDS = {0: "none", 1: "constant", 2: "self_limiting", 3: "thermostat"}


@dataclass
class DesignResult:
    """The design cases of one alternative (see the module): per segment :class:`SegmentDesign`, and the
    hold time after the flow stops (:class:`solver.hold_time.HoldTime`, None when it does not apply).

    ``maintain_temperature_K`` and ``maintain_basis`` say what the tracing must hold and why ("maintain
    temperature", "minimum bulk temperature", "freezing point + 5 K (common practice)"; None and "" when
    none applies). ``worst_case_error``: why the flowing worst case has no solution (it froze, say), else "".
    ``notes``: plain sentences to show with the design cases (the hot case's caution,
    :data:`HOT_CASE_CAUTION`).
    """

    cases: DesignCases
    worst_no_flow: bool
    maintain_temperature_K: Optional[float]
    maintain_basis: str
    freezing_point_K: Optional[float]
    segments: list[SegmentDesign]
    worst_case_error: str = ""
    notes: list[str] = field(default_factory=list)
    _hold_time: object = field(default=None, repr=False)
    _hold_source: tuple = field(default=None, repr=False)  # (alternative, operating Result) until first read

    @property
    def hold_time(self):
        """The Hold Time (:class:`solver.hold_time.HoldTime`, None when no segment can stand still).

        Worked out when first read (some milliseconds: ~40 exact exponential steps per segment and
        scenario), so a live solve that never shows it does not pay for it.
        """
        if self._hold_source is not None:
            alt, operating = self._hold_source
            worst_alt = case_alternative(alt, self.cases, "worst")
            path = OutsidePath(worst_alt, build_line(worst_alt, 1.0, 4))
            heaters = HeaterLaw.of(alt)
            # the warmest each segment's heating can hold it standing still bounds the temperatures followed
            t_held = standing_temperature(path, heaters, np.flatnonzero(path.standing))[0]
            self._hold_time = hold_time_mod.hold_time(alt, operating, path, heaters, fluid_model(alt.fluid),
                                                      self.maintain_temperature_K, self.freezing_point_K, t_held)
            self._hold_source = None
        return self._hold_time

    @property
    def holds(self) -> Optional[bool]:
        """True when every assessed segment holds; None when none is assessed."""
        verdicts = [s.holds for s in self.segments if s.holds is not None]
        return None if not verdicts else all(verdicts)

    @property
    def hot_wall_temperature_K(self) -> float:
        """The highest pipe-wall temperature of the hot case over the line [K] (NaN when none applies)."""
        values = [s.hot_wall_temperature_K for s in self.segments if math.isfinite(s.hot_wall_temperature_K)]
        return max(values) if values else math.nan

    def tracing_words(self, index: int, formatter: Optional[Callable[[str, float], str]] = None) -> str:
        """The tracing need of segment ``index`` in plain words: "needs 18.4 W/m at 5.0 °C; has 25.0 W/m: OK"
        (the need includes the segment's design margin, ``SegmentDesign.design_margin``).

        ``formatter(kind, value)`` writes a value ("T" kelvin, "q" W/m), as for
        :func:`solver.results.render_message`; the default writes SI with °C.
        """
        fmt = formatter or _words_si
        s = self.segments[index]
        if not s.exposed:
            return "not assessed: the segment is not in air or soil"
        if s.holds is None:
            return "not assessed: no maintain temperature (set one, a minimum bulk temperature, or a freezing fluid)"
        has = fmt("q", s.available_output_W_per_m) if s.available_output_W_per_m > 0 else "no heating"
        if s.required_output_W_per_m <= 0.0:
            # surroundings at or above the maintain temperature (indoors, say): nothing to make up
            return (f"needs no heating to hold {fmt('T', s.maintain_temperature_K)} (its surroundings, "
                    f"{fmt('T', s.worst_surroundings_temperature_K)}, are warmer): OK")
        verdict = "OK" if s.holds else "does not hold"
        return (f"needs {fmt('q', s.required_output_W_per_m)} at {fmt('T', s.maintain_temperature_K)}; "
                f"has {has}: {verdict}")

    def to_dict(self) -> dict:
        out = {
            "worst_air_temperature_K": self.cases.worst_air_temperature_K,
            "worst_wind_speed_m_per_s": self.cases.worst_wind_speed_m_per_s,
            "worst_soil_temperature_K": self.cases.worst_soil_temperature_K,
            "worst_no_flow": self.worst_no_flow,
            "hot_air_temperature_K": self.cases.hot_air_temperature_K,
            "maintain_temperature_K": self.maintain_temperature_K,
            "maintain_basis": self.maintain_basis,
            "freezing_point_K": self.freezing_point_K,
            "holds": self.holds,
            "hot_wall_temperature_K": _json(self.hot_wall_temperature_K),
            "worst_case_error": self.worst_case_error,
            "notes": list(self.notes),
            "segments": [s.to_dict() for s in self.segments],
        }
        if self.hold_time is not None:
            out["hold_time"] = self.hold_time.to_dict()
        return out


def _json(v: float):
    return None if not math.isfinite(v) else float(v)


def _words_si(kind: str, value: float) -> str:
    if kind == "T":
        return f"{value - 273.15:.1f} °C"
    return f"{value:.1f} W/m"


# --------------------------------------------------------------------------- evaluate


def maintain_temperature(alt: Alternative, freezing_point_K: Optional[float]) -> tuple[Optional[float], str]:
    """What the tracing must hold and why (see :class:`~solver.model.Limits`)."""
    if alt.limits.maintain_temperature_K is not None:
        return alt.limits.maintain_temperature_K, "maintain temperature"
    if alt.limits.min_bulk_temperature_K is not None:
        return alt.limits.min_bulk_temperature_K, "minimum bulk temperature"
    if freezing_point_K is not None:
        return freezing_point_K + FREEZE_PROTECTION_MARGIN_K, "freezing point + 5 K (common practice)"
    return None, ""


def freezing_point(alt: Alternative, fluid=None) -> Optional[float]:
    """The fluid's freezing point at the feed pressure [K], None for a gas or a fluid without one."""
    fluid = fluid or fluid_model(alt.fluid)
    if fluid.compressible:
        return None
    t = fluid.freezing_temperature(alt.feed.inlet_pressure_Pa)
    return float(t) if t is not None and math.isfinite(t) else None


def evaluate(alt: Alternative, operating, cases: DesignCases, *, solve: Optional[Callable] = None,
             hold_time: bool = True) -> DesignResult:
    """The design cases of ``alt`` (``operating``: its operating :class:`~solver.results.Result`).

    ``solve``: the line solver (``solver.march.solve``, which passes itself), for the flowing worst case
    (handed in, so this module and the march do not import each other).

    ``hold_time`` False leaves the Hold Time out (``DesignResult.hold_time`` is then None); otherwise it
    is worked out when first read.
    """
    fluid = fluid_model(alt.fluid)
    t_freeze = freezing_point(alt, fluid)
    t_maintain, basis = maintain_temperature(alt, t_freeze)
    n = len(alt.segments)
    rows = np.arange(n)
    heaters = HeaterLaw.of(alt)

    worst_alt = case_alternative(alt, cases, "worst")
    worst_line = build_line(worst_alt, 1.0, 4)
    worst = OutsidePath(worst_alt, worst_line)
    hot_alt = case_alternative(alt, cases, "hot")
    hot = OutsidePath(hot_alt, build_line(hot_alt, 1.0, 4))

    notes: list[str] = [HOT_CASE_CAUTION]
    error = ""
    # worst case: standing still, or flowing in the worst surroundings
    if cases.worst_no_flow:
        t_w, q_w, duty_w, qt_w = standing_temperature(worst, heaters, rows)
    else:
        q_w = duty_w = qt_w = np.full(n, np.nan)  # what a heater delivers along a flowing segment varies
        if solve is None:
            raise ValueError("a flowing worst case (worst_no_flow False) needs the line solver: pass solve")
        try:
            flowing = solve(worst_alt)
        except SolverError as exc:
            error = str(exc)
            t_w = np.full(n, np.nan)
        else:
            bulk = flowing.profile.bulk_temperature_K
            t_w = np.array([float(bulk[sp.node_start:sp.node_end + 1].min()) for sp in flowing.segments])
    t_hot, q_hot, _, _ = standing_temperature(hot, heaters, rows, thermostat_controls=False)

    # tracing need at the maintain temperature, worst surroundings
    if t_maintain is not None:
        t_m = np.full(n, t_maintain)
        t_surf = worst.surface_start(rows, t_m)
        for _ in range(30):
            g_pipe, g_sink, t_new = worst.conductances(rows, t_m, t_surf)
            moved = float(np.max(np.abs(t_new - t_surf))) if n else 0.0
            t_surf = t_new
            if moved < 1e-6:
                break
        g_pipe, g_sink, _ = worst.conductances(rows, t_m, t_surf)
        loss = g_pipe * (t_m - worst.t_inf)
        sinks = g_sink * (t_m - worst.t_inf)
        available = heaters.output(rows, t_m) + np.where(t_m < worst.t_tracer, worst.g_tracer * (worst.t_tracer - t_m), 0.0)
    else:
        loss = sinks = available = np.full(n, np.nan)

    out = []
    for i, seg in enumerate(alt.segments):
        margin = seg.design_margin if seg.design_margin is not None else cases.design_margin
        exposed = bool(worst.exposed[i])
        required = (loss[i] + sinks[i]) * (1.0 + margin) if exposed else math.nan
        holds = None
        if exposed and t_maintain is not None:
            holds = bool(available[i] >= required)
        standing = bool(worst.standing[i])
        out.append(SegmentDesign(
            index=i, name=seg.name, exposed=exposed, heater_kind=_HEATER_KINDS[int(heaters.kind[i])],
            worst_surroundings_temperature_K=float(worst.t_inf[i]) if exposed else math.nan,
            worst_temperature_K=float(t_w[i]) if (standing or not cases.worst_no_flow) else math.nan,
            worst_heater_output_W_per_m=float(q_w[i]) if standing else math.nan,
            worst_tracer_heat_W_per_m=float(qt_w[i]) if standing else math.nan,
            worst_thermostat_duty=float(duty_w[i]) if standing else math.nan,
            hot_wall_temperature_K=float(t_hot[i]) if bool(hot.standing[i]) else math.nan,
            hot_heater_output_W_per_m=float(q_hot[i]) if bool(hot.standing[i]) else math.nan,
            maintain_temperature_K=float(t_maintain) if (t_maintain is not None and exposed) else math.nan,
            heat_loss_W_per_m=float(loss[i]) if exposed else math.nan,
            heat_sinks_W_per_m=float(sinks[i]) if exposed else math.nan,
            design_margin=float(margin),
            required_output_W_per_m=float(required),
            available_output_W_per_m=float(available[i]) if exposed else math.nan,
            holds=holds,
        ))
    result = DesignResult(cases=cases, worst_no_flow=cases.worst_no_flow, maintain_temperature_K=t_maintain,
                          maintain_basis=basis, freezing_point_K=t_freeze, segments=out, worst_case_error=error,
                          notes=notes)
    if hold_time:
        result._hold_source = (alt, operating)  # worked out when first read: see DesignResult.hold_time
    return result


# --------------------------------------------------------------------------- checks from the design cases


def design_checks(alt: Alternative, design: DesignResult, operating) -> list:
    """The design cases' findings as Checks, so the Checks list and the design verdict carry them.

    * ``DESIGN_NOT_HELD``: in the worst case the tracing (with the margin) cannot hold the maintain
      temperature in some exposed segment: danger when the maintain temperature guards a freezing point,
      else a warning. The message names the largest shortfall.
    * ``HOT_CASE_WALL``: in the hot case the pipe wall under the heater exceeds the alternative's
      inner-wall limit (a warning; the heater's own sheath runs hotter still).
    * ``WORST_CASE_FAILED``: the flowing worst case has no solution (it froze, say): a warning naming why.
    """
    from solver.checks import _T, _q  # the one token format of check messages (shown in the reader's units)
    from solver.results import Check, render_message

    cases = design.cases
    where_case = (f"the worst case ({_T(cases.worst_air_temperature_K)} air, "
                  f"{cases.worst_wind_speed_m_per_s:g} m/s wind{', no flow' if design.worst_no_flow else ''})")
    starts = {sp.index: sp.x_start_m for sp in operating.segments}
    out = []
    short = [sd for sd in design.segments if sd.holds is False]
    if short and design.maintain_temperature_K is not None:
        worst = max(short, key=lambda sd: sd.required_output_W_per_m - sd.available_output_W_per_m)
        sur = alt.segments[worst.index].surroundings
        if getattr(sur, "indoors", False):
            where_case = (f"the worst case (indoors: the building's air as entered, {_T(sur.temperature_K)}"
                          f"{', no flow' if design.worst_no_flow else ''})")
        guards_freezing = design.freezing_point_K is not None and \
            design.maintain_temperature_K <= design.freezing_point_K + 5.0 + 1e-9
        others = f" {len(short) - 1} more segment(s) fall short too." if len(short) > 1 else ""
        out.append(Check(
            "danger" if guards_freezing else "warning", "DESIGN_NOT_HELD",
            f"In {where_case} the tracing cannot hold {_T(design.maintain_temperature_K)}, the "
            f"{design.maintain_basis}, in segment {worst.name!r}: it needs {_q(worst.required_output_W_per_m)} "
            f"with a {worst.design_margin * 100:.0f} % margin and has {_q(worst.available_output_W_per_m)}.{others}",
            segment=worst.index, x_m=starts.get(worst.index)))
    limit = alt.limits.max_inner_wall_temperature_K
    hot = [sd for sd in design.segments if math.isfinite(sd.hot_wall_temperature_K)
           and sd.heater_kind != "none" and limit is not None and sd.hot_wall_temperature_K > limit]
    if hot:
        top = max(hot, key=lambda sd: sd.hot_wall_temperature_K)
        out.append(Check(
            "warning", "HOT_CASE_WALL",
            f"In the hot case ({_T(cases.hot_air_temperature_K)} air, no flow, heaters full on) the pipe wall "
            f"under the heater in segment {top.name!r} reaches {_T(top.hot_wall_temperature_K)}, above the "
            f"wall-temperature limit ({_T(limit)}). {HOT_CASE_CAUTION}",
            segment=top.index, x_m=starts.get(top.index)))
    if design.worst_case_error:
        out.append(Check("warning", "WORST_CASE_FAILED",
                         f"The flowing worst case has no solution: {design.worst_case_error}"))
    return [dataclasses.replace(ch, message=render_message(ch.message, None), template=ch.message)
            if "⟦" in ch.message else ch for ch in out]
