"""Hold Time: what each segment's temperature does after the flow stops, in time.

Each segment is one lumped heat capacity per metre of pipe — the standing fluid, the pipe wall and a
share of the insulation — behind the same outside path as the design cases (insulation, outer film or
soil, heat sinks; :class:`solver.design_cases.OutsidePath`) in the worst-case surroundings, with its
heating per kind: a constant heater, a self-limiting heater following its straight line, an ideal
thermostat (on below its set point, off above; at the set point it holds it when full output can,
the on/off cycles averaging to the set point: no switching band is modelled), a steam tracer while the
pipe is below its steam temperature. Per metre,

    C' dT/dt = q'_heat(T) − (T − T∞)·(G'_pipe + G'_sinks)

is linear in T between *events* (a heater or tracer switching, the thermostat reaching its set point,
the freezing point, a reported limit), so within a step it is integrated exactly by the exponential
and every event time is found in closed form (a logarithm): for constant coefficients the integration
is exact whatever the step. Only the outer air film (and the insulation's k(T)) change with the
temperature; they are tabulated against each segment's temperature once (24 knots, the surface balance
closed at each) and taken at each step's middle temperature (extrapolated from the step before):
40 steps over a first span of some time constants,
then more while a segment is still on its way to a temperature it will reach (up to 30 days).

Freezing: a fluid with a known latent heat (water: 6.01 kJ/mol = 333.6 kJ/kg, enthalpy of fusion of
ice at 0 °C, CRC Handbook of Chemistry and Physics, from memory; the issue's 334 kJ/kg; a user table
gives its own) stays at its freezing point while the latent heat m'·L is drawn out (the plateau), then
cools on. Below "frozen solid" the curve goes on with the liquid's heat capacity, which is only
indicative (ice has about half the specific heat of water). Solutions freeze gradually over a range
and get no plateau.

When lumping is valid. One temperature for fluid and wall needs the standing fluid's own conduction
resistance to be small against the outside path: Biot number Bi = h·L_c/k with L_c = V/A = D/4 and h
the outside path referred to the bore, Bi = 1/(4π·k_fluid·R'_out). Lumped capacitance is accurate
below Bi ≈ 0.1 (Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, §5.1–5.2); above it the
core stays warmer than the wall, ice forms at the wall first and the lumped times are optimistic for
the wall: each segment's Bi is reported and a warning is given above 0.1. A gas line's capacity is
almost all its pipe wall (and insulation), which is one temperature whatever the gas does: no Biot
number is given for a gas (NaN). Insulated lines are far
below (NPS 2 water, 50 mm mineral wool: Bi ≈ 0.04); bare pipes in wind are not. Natural convection in
the standing fluid lowers its internal resistance, so the conduction Biot number is conservative.

Insulation heat capacity: the share taken is the quasi-steady one. While the pipe cools slowly the
temperature through the insulation keeps the steady conduction profile, so a shell at radius r
changes by w(r) = R'(r → surroundings)/R'(pipe → surroundings) of the pipe's change; the insulation
adds ∫ ρc·w(r)·2πr dr (half its whole capacity for a thin layer, less for a thick one, where most of
the material lies far out: a third for 50 mm on NPS 2). This holds when the insulation's own diffusion time, thickness²/α (about 1–2 h for 50 mm of
mineral wool), is short against the cooldown time constant (about 10 h and more for an insulated
liquid line): common practice in lumped estimates, from the steady conduction solution. For liquid
lines the insulation adds under 10 % of the capacity; for gas lines it can dominate with the wall.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Optional

import numpy as np

from solver import catalogue
from solver.model import PureFluid, TableFluid

#: Latent heat of fusion of water [J/kg]: 6.01 kJ/mol / 18.015 g/mol (CRC Handbook, from memory).
WATER_LATENT_HEAT_J_PER_KG = 333.6e3
#: Lumped capacitance is accurate below this Biot number (Incropera & DeWitt §5.2).
BIOT_LIMIT = 0.1
#: The longest time followed [s]: 30 days; a threshold not reached by then counts as held.
HORIZON_MAX_S = 30 * 86400.0
STEPS = 40

# Density [kg/m³] and specific heat [J/(kg·K)] of pipe materials near 300 K. Metals: Incropera & DeWitt,
# Table A.1 (plain carbon steel 7854/434, AISI 304 7900/477, pure copper 8933/385, Armco iron for cast
# iron 7870/447; from memory); plastics: typical values, from memory.
PIPE_HEAT_CAPACITY = {
    "carbon steel": (7854.0, 434.0),
    "galvanised steel": (7854.0, 434.0),
    "stainless steel": (7900.0, 477.0),
    "copper": (8933.0, 385.0),
    "cast iron": (7870.0, 447.0),
    "PVC": (1380.0, 1000.0),
    "HDPE": (955.0, 1900.0),
    "PP": (905.0, 1900.0),
}
# Insulation: typical installed density [kg/m³] and specific heat [J/(kg·K)] (from memory; check the
# maker's data). Unknown materials (cladding, foils) add no capacity.
INSULATION_HEAT_CAPACITY = {
    "mineral wool": (120.0, 840.0),
    "calcium silicate": (240.0, 840.0),
    "cellular glass": (120.0, 840.0),
    "polyurethane foam": (40.0, 1400.0),
    "flexible elastomeric foam": (60.0, 1500.0),
    "perlite": (200.0, 840.0),
    "aerogel blanket": (150.0, 1000.0),
}


@dataclass(frozen=True)
class SegmentHold:
    """One segment after the flow stops (SI). Times [s] from the moment the flow stops: ``math.inf`` = it
    never gets there (holds), None = does not apply (no such temperature, no heater, no freezing fluid).

    ``*_off_s``: all heating off (power or steam failure); ``*_on_s``: heating per its kind.
    ``to_limit``: to the maintain temperature; ``to_freezing``: to the freezing point;
    ``frozen_solid``: until the latent heat is drawn out; ``warm_up_s``: from the worst-case ambient
    (frozen, where the fluid freezes there) to the maintain temperature with the heating on.
    """

    index: int
    name: str
    start_temperature_K: float
    capacity_J_per_mK: float  # sensible heat capacity per metre: fluid + wall + insulation share
    fluid_capacity_J_per_mK: float
    wall_capacity_J_per_mK: float
    insulation_capacity_J_per_mK: float  # the quasi-steady share (see the module)
    latent_heat_J_per_m: float  # 0 when no plateau
    outside_resistance_K_m_per_W: float  # pipe to surroundings incl. heat sinks, at the start
    time_constant_s: float  # capacity × outside resistance
    biot_number: float
    to_limit_off_s: Optional[float]
    to_limit_on_s: Optional[float]
    to_freezing_off_s: Optional[float]
    to_freezing_on_s: Optional[float]
    frozen_solid_off_s: Optional[float]
    frozen_solid_on_s: Optional[float]
    warm_up_s: Optional[float]

    @property
    def freezing_plateau_off_s(self) -> Optional[float]:
        """How long it stays at the freezing point while it freezes, heating off [s] (inf: never freezes)."""
        return _plateau(self.to_freezing_off_s, self.frozen_solid_off_s)

    @property
    def freezing_plateau_on_s(self) -> Optional[float]:
        """As :attr:`freezing_plateau_off_s`, heating on."""
        return _plateau(self.to_freezing_on_s, self.frozen_solid_on_s)

    def to_dict(self) -> dict:
        """JSON form: the fields and the plateaus. JSON has no infinity: a time that is never reached is
        written null and its key listed in ``never_reached`` (for a cooldown: it holds; for the warm-up: it
        never gets warm enough); a time that does not apply is null and not listed."""
        out = dict(self.__dict__)
        out["freezing_plateau_off_s"] = self.freezing_plateau_off_s
        out["freezing_plateau_on_s"] = self.freezing_plateau_on_s
        out["never_reached"] = [k for k, v in out.items() if k.endswith("_s") and v == math.inf]
        return {k: (None if isinstance(v, float) and not math.isfinite(v) else v) for k, v in out.items()}


def _plateau(start: Optional[float], end: Optional[float]) -> Optional[float]:
    if start is None or end is None:
        return None
    return math.inf if math.isinf(start) or math.isinf(end) else end - start


@dataclass
class HoldTime:
    """Hold Time of the segments a standing line applies to (in air, buried, adiabatic), with the curves.

    ``time_s`` (k,), ``bulk_off_K`` / ``bulk_on_K`` / ``warm_up_K`` (k, segments of the alternative;
    NaN columns where it does not apply): bulk temperature against time since the flow stopped with the
    heating off and on, and from the worst-case ambient with it on.
    """

    limit_temperature_K: Optional[float]
    freezing_point_K: Optional[float]
    latent_heat_J_per_kg: Optional[float]
    latent_heat_source: str
    time_s: np.ndarray
    bulk_off_K: np.ndarray
    bulk_on_K: np.ndarray
    warm_up_K: np.ndarray
    segments: list[SegmentHold]
    warnings: list[str] = field(default_factory=list)

    def to_dict(self, include_curves: bool = False) -> dict:
        out = {
            "limit_temperature_K": self.limit_temperature_K,
            "freezing_point_K": self.freezing_point_K,
            "latent_heat_J_per_kg": self.latent_heat_J_per_kg,
            "latent_heat_source": self.latent_heat_source,
            "horizon_s": float(self.time_s[-1]),
            "warnings": list(self.warnings),
            "segments": [s.to_dict() for s in self.segments],
        }
        if include_curves:
            clean = lambda a: [[None if not math.isfinite(v) else float(v) for v in row] for row in a.tolist()]  # noqa: E731
            out["curves"] = {"time_s": self.time_s.tolist(), "bulk_off_K": clean(self.bulk_off_K),
                             "bulk_on_K": clean(self.bulk_on_K), "warm_up_K": clean(self.warm_up_K)}
        return out


def latent_heat(fluid_spec) -> tuple[Optional[float], str]:
    """Latent heat of fusion [J/kg] and its source, or (None, why not)."""
    if isinstance(fluid_spec, PureFluid) and fluid_spec.name.strip().lower() in ("water", "h2o"):
        return WATER_LATENT_HEAT_J_PER_KG, "water: 333.6 kJ/kg (6.01 kJ/mol, CRC Handbook, from memory)"
    if isinstance(fluid_spec, TableFluid):
        value = getattr(fluid_spec, "latent_heat_J_per_kg", None)
        if value is not None:
            return float(value), "the fluid table's latent heat"
        return None, "the fluid table gives no latent heat: no freezing plateau"
    return None, "no latent heat known for this fluid: no freezing plateau"


_GAUSS_8 = np.polynomial.legendre.leggauss(8)  # 8-point Gauss–Legendre: exact for the smooth ln weights to ~1e-10


def insulation_share(layers, d_pipe_outer_m: float, layer_resistances: list, r_total: float) -> float:
    """The insulation's quasi-steady heat capacity per metre [J/(m·K)] (see the module).

    ``layers``: the segment's insulation (material, thickness), innermost first; ``layer_resistances``:
    (material, K·m/W) per layer as the outside path uses them; ``r_total``: pipe to surroundings [K·m/W].
    """
    if not layers or not layer_resistances or not math.isfinite(r_total) or r_total <= 0:
        return 0.0
    nodes, weights = _GAUSS_8
    r_after = np.cumsum([r for _, r in layer_resistances][::-1])[::-1]  # this layer and all outside it
    total = 0.0
    r_in = 0.5 * d_pipe_outer_m
    for j, (layer, (_, r_layer)) in enumerate(zip(layers, layer_resistances)):
        r_out = r_in + layer.thickness_m
        rho_c = INSULATION_HEAT_CAPACITY.get(layer.material.strip().lower())
        if rho_c is not None and r_layer > 0:
            # outside this layer: the layers beyond it and the film or soil
            r_outside_layer = r_after[j] - r_layer + (r_total - r_after[0])
            radius = r_in + (r_out - r_in) * 0.5 * (nodes + 1.0)
            # the layer's own resistance from radius r to its outer face, in proportion of ln
            part = r_layer * np.log(r_out / radius) / math.log(r_out / r_in)
            w = (part + r_outside_layer) / r_total
            total += rho_c[0] * rho_c[1] * float(np.sum(weights * w * 2.0 * math.pi * radius)) * 0.5 * (r_out - r_in)
        r_in = r_out
    return total


def _wall_capacity(material: str, d_in: float, d_out: float) -> float:
    key = catalogue._material_key(material) or "carbon steel"
    rho, c = PIPE_HEAT_CAPACITY.get(key, PIPE_HEAT_CAPACITY["carbon steel"])
    return rho * c * 0.25 * math.pi * (d_out * d_out - d_in * d_in)


# --------------------------------------------------------------------------- the integrator


class _Rows:
    """Scenarios stacked as rows (segment index per row) and integrated together."""

    def __init__(self, path, heaters, seg, t0, phi0, capacity, latent, heat_on, t_freeze, thresholds, downward, t_high):
        self.path, self.heaters, self.seg = path, heaters, seg
        self.T, self.phi = t0.astype(float).copy(), phi0.astype(float).copy()
        self.C, self.L = capacity, latent
        k = heaters.kind[seg]
        self.kind = np.where(heat_on, k, 0)
        self.q = heaters.full_W_per_m[seg]
        self.s, self.tz, self.sp = heaters.slope_W_per_mK[seg], heaters.zero_output_K[seg], heaters.set_point_K[seg]
        self.g_t = np.where(heat_on, path.g_tracer[seg], 0.0)
        self.t_t = path.t_tracer[seg]
        self.t_inf = path.t_inf[seg]
        self.t_f = np.full(seg.size, np.nan if t_freeze is None else t_freeze)
        self.thresholds = thresholds  # (rows, m) reported temperatures, NaN where none
        self.downward = downward  # per row: cooling (report on the way down) or warming
        self.reached = np.full(thresholds.shape, np.nan)
        self.solid_at = np.full(seg.size, np.nan)
        self._tabulate(t_high)
        self._prepare()
        self.last = None  # temperatures at the start of the last step and its length
        # a threshold already passed at the start is reached at once
        past = np.where(downward[:, None], self.T[:, None] <= thresholds, self.T[:, None] >= thresholds)
        self.reached[past] = 0.0

    def _tabulate(self, t_high, knots: int = 24, passes: int = 8) -> None:
        """The outside conductance (pipe + sinks) per row against temperature, with the surface balance
        closed at each knot: evaluated once here, interpolated at every step (the air films are the
        costly part, and a row's conductance depends on its own temperature only)."""
        lo = np.fmin(np.fmin(self.T, self.t_inf), np.nan_to_num(self.t_f, nan=np.inf)) - 1.0
        hi = np.fmax(np.fmax(self.T, np.nan_to_num(t_high, nan=-np.inf, posinf=-np.inf)), self.t_inf) + 1.0
        self.t_lo, self.t_span = lo, hi - lo
        temps = lo[:, None] + self.t_span[:, None] * np.linspace(0.0, 1.0, knots)[None, :]
        rows = np.repeat(self.seg, knots)
        flat = temps.ravel()
        t_surf = self.path.surface_start(rows, flat)
        for _ in range(passes):
            g_pipe, g_sink, t_surf = self.path.conductances(rows, flat, t_surf)
        self.g_table = (g_pipe + g_sink).reshape(temps.shape)
        self.knots = knots

    def conductance(self, T: np.ndarray) -> np.ndarray:
        pos = np.clip((T - self.t_lo) / self.t_span * (self.knots - 1), 0.0, self.knots - 1 - 1e-9)
        i = pos.astype(int)
        f = pos - i
        r = np.arange(T.size)
        return self.g_table[r, i] * (1.0 - f) + self.g_table[r, i + 1] * f

    def heading_on(self, eventual: np.ndarray) -> bool:
        """True while a row has a reported temperature or its frozen-solid state still ahead: its standing
        temperature ``eventual`` lies beyond it (NaN: none)."""
        with np.errstate(invalid="ignore"):
            beyond = np.where(self.downward[:, None], eventual[:, None] < self.thresholds,
                              eventual[:, None] > self.thresholds)
            solid = (self.L > 0) & self.downward & np.isnan(self.solid_at) & (eventual < self.t_f)
        return bool((beyond & np.isnan(self.reached)).any() or solid.any())

    def _prepare(self) -> None:
        """What stays the same through the integration: masks, constant parts, fixed event temperatures."""
        k = self.kind
        self.any_sl, self.any_tr, self.any_th = bool((k == 2).any()), bool((self.g_t > 0).any()), bool((k == 3).any())
        self.any_latent = bool((self.L > 0).any())
        self.a_const = np.where(k == 1, self.q, 0.0)
        self.sl_mask, self.tr_mask, self.th_mask = k == 2, self.g_t > 0, k == 3
        self.sl_a = np.where(self.sl_mask, self.s * np.nan_to_num(self.tz), 0.0)
        self.tr_a = np.where(self.tr_mask, self.g_t * self.t_t, 0.0)
        fixed = [np.where(self.sl_mask, self.tz, np.nan), np.where(self.tr_mask, self.t_t, np.nan),
                 np.where(self.th_mask, self.sp, np.nan), np.where(self.L > 0, np.nan, self.t_f)]
        fixed += [self.thresholds[:, j] for j in range(self.thresholds.shape[1])]
        # column 0 is the freezing point where it is an event now (it depends on the phase and direction)
        self.theta = np.column_stack([np.full(self.T.size, np.nan)] + fixed)
        self.row_index = np.arange(self.T.size)

    def step(self, t0: float, dt: float, eps: float = 1e-9) -> None:
        # the conductance at the step's mid-temperature, extrapolated from the last step (second order in
        # the step where the films and k(T) change with temperature; exact where nothing does)
        if self.last is None:
            t_mid = self.T
        else:
            t_prev, dt_prev = self.last
            t_mid = self.T + 0.5 * (self.T - t_prev) * (dt / dt_prev)
        self.last = (self.T.copy(), dt)
        G = self.conductance(t_mid)
        remaining = np.full(self.seg.size, dt)
        theta = self.theta
        for _ in range(24):
            live = remaining > 0
            if not live.any():
                return
            T = self.T
            a, b, held = self._linear(G, T, eps)
            rate = np.where(held, 0.0, a - b * T)
            moving = ~held
            if self.any_latent:
                # the freezing plateau: at the freezing point while latent heat is drawn out or put back
                at_f = (self.L > 0) & (np.abs(T - self.t_f) <= eps)
                net_f = np.where(held, 0.0, a - b * self.t_f)
                plateau = at_f & (((self.phi > 0) & (self.phi < 1)) | ((self.phi <= 0) & (net_f < 0))
                                  | ((self.phi >= 1) & (net_f > 0)))
                with np.errstate(divide="ignore", invalid="ignore"):
                    t_plateau = np.where(net_f < 0, (1.0 - self.phi) * self.L / -net_f,
                                         np.where(net_f > 0, self.phi * self.L / net_f, np.inf))
                moving &= ~plateau
                theta[:, 0] = np.where((self.L > 0) & (((self.phi <= 0) & (rate < 0)) | ((self.phi >= 1) & (rate > 0))),
                                       self.t_f, np.nan)
            # events while the temperature moves: switch points, the freezing point, reported thresholds;
            # each crossing time in closed form, t = C·d/rate · (−ln(1 − u)/u), u = b·d/rate
            d = theta - T[:, None]
            with np.errstate(divide="ignore", invalid="ignore"):
                u = b[:, None] * d / rate[:, None]
                ok = (d * rate[:, None] > 0) & (np.abs(d) > eps) & (u < 1.0)
                u_safe = np.where(ok, u, 0.5)
                factor = np.where(np.abs(u_safe) > 1e-12, -np.log1p(-u_safe) / u_safe, 1.0)
                t_cross = np.where(ok, self.C[:, None] * d / rate[:, None] * factor, np.inf)
            which = np.argmin(t_cross, axis=1)
            t_event = np.where(moving, t_cross[self.row_index, which], np.inf)
            if self.any_latent:
                t_event = np.where(plateau, t_plateau, t_event)
            adv = np.where(live, np.minimum(t_event, remaining), 0.0)
            hit = live & (t_event <= remaining)
            # advance: the exact exponential while moving
            x = b * adv / self.C
            phi_x = np.where(x > 1e-12, -np.expm1(-x) / np.where(x > 1e-12, x, 1.0), 1.0)
            T_new = np.where(moving, T + rate * adv / self.C * phi_x, T)
            snap = hit & moving
            if snap.any():
                T_new[snap] = theta[self.row_index[snap], which[snap]]
            now = t0 + (dt - remaining) + adv
            if self.any_latent:
                # latent bookkeeping on the plateau
                with np.errstate(divide="ignore", invalid="ignore"):
                    dphi = np.where(plateau, -net_f * adv / np.where(self.L > 0, self.L, 1.0), 0.0)
                phi_new = np.clip(self.phi + dphi, 0.0, 1.0)
                ends = hit & plateau
                phi_new[ends] = np.where(net_f[ends] < 0, 1.0, 0.0)
                newly_solid = ends & (net_f < 0) & np.isnan(self.solid_at)
                self.solid_at[newly_solid] = now[newly_solid]
                self.phi = phi_new
            self.T = T_new
            remaining = np.where(hit, remaining - adv, 0.0)
            if snap.any():
                first = (np.abs(T_new[:, None] - self.thresholds) <= eps) & np.isnan(self.reached)
                if first.any():
                    self.reached[first] = np.broadcast_to(now[:, None], first.shape)[first]
        # a step that switched more often than this ends where it is (never seen: a guard only)

    def _linear(self, G, T, eps):
        """Net heating per metre as a − b·T in the current mode, and the rows a thermostat holds."""
        a = G * self.t_inf + self.a_const
        b = G
        if self.any_sl or self.any_tr:
            base_rate = a - b * T
            if self.any_sl:
                sl_on = self.sl_mask & ((T < self.tz - eps) | ((np.abs(T - self.tz) <= eps) & (base_rate < 0)))
                a = a + np.where(sl_on, self.sl_a, 0.0)
                b = b + np.where(sl_on, self.s, 0.0)
            if self.any_tr:
                tr_on = self.tr_mask & ((T < self.t_t - eps) | ((np.abs(T - self.t_t) <= eps) & (base_rate < 0)))
                a = a + np.where(tr_on, self.tr_a, 0.0)
                b = b + np.where(tr_on, self.g_t, 0.0)
        held = np.zeros(T.size, dtype=bool)
        if self.any_th:
            th = self.th_mask
            at_sp = th & (np.abs(T - self.sp) <= eps)
            rate_off = a - b * T
            rate_on = rate_off + self.q
            on = th & ((T < self.sp - eps) | (at_sp & (rate_off < 0) & (rate_on <= 0)))
            held = at_sp & (rate_off < 0) & (rate_on > 0)
            a = a + np.where(on, self.q, 0.0)
        return a, b, held


def hold_time(alt, operating, path, heaters, fluid, t_limit: Optional[float], t_freeze: Optional[float],
              t_held: np.ndarray) -> Optional[HoldTime]:
    """Hold Time of ``alt`` (see the module); None when no segment can stand (every one has a jacket or a
    fixed wall).

    ``operating``: the operating :class:`~solver.results.Result` (start temperatures); ``path``: the
    worst case's :class:`solver.design_cases.OutsidePath`; ``heaters``: its ``HeaterLaw``; ``fluid``: the
    fluid model; ``t_limit`` / ``t_freeze``: the maintain temperature and the freezing point [K] or None;
    ``t_held``: where each standing segment's heating holds it standing still [K] (per standing segment,
    in order): the warmest the heating-on curves can get.
    """
    segs = np.flatnonzero(path.standing)
    if segs.size == 0:
        return None
    n_all = len(alt.segments)
    bulk, pressure, x = (operating.profile.bulk_temperature_K, operating.profile.pressure_Pa, operating.profile.x_m)
    t0 = np.empty(segs.size)
    p0 = np.empty(segs.size)
    for j, i in enumerate(segs):
        span = operating.segments[i]
        sl = slice(span.node_start, span.node_end + 1)
        length = x[sl][-1] - x[sl][0]
        t0[j] = np.trapezoid(bulk[sl], x[sl]) / length if length > 0 else float(bulk[sl].mean())
        p0[j] = float(pressure[sl].mean())
    props = fluid.props(np.clip(t0, fluid.T_min_K, fluid.T_max_K), p0)
    d_in = np.array([operating.segments[i].inner_diameter_m for i in segs])
    d_po = path.d_pipe[segs]
    c_fluid = props.rho * props.cp * 0.25 * math.pi * d_in**2
    c_wall = np.array([_wall_capacity(alt.segments[i].pipe.material, d_in[j], d_po[j]) for j, i in enumerate(segs)])
    t_s = path.surface_start(segs, t0)
    for _ in range(10):  # settle the surface temperature for the start figures
        g_pipe, g_sink, t_new = path.conductances(segs, t0, t_s)
        settled = bool(np.all(np.abs(t_new - t_s) < 1e-3))
        t_s = t_new
        if settled:
            break
    with np.errstate(divide="ignore"):
        r_pipe = np.where(g_pipe > 0, 1.0 / g_pipe, np.inf)
        r_out = np.where(g_pipe + g_sink > 0, 1.0 / (g_pipe + g_sink), np.inf)
    c_ins = np.array([insulation_share(alt.segments[i].insulation, path.d_pipe[i], path.layer_resistances[i], r_pipe[j])
                      for j, i in enumerate(segs)])
    capacity = c_fluid + c_wall + c_ins
    L_f, L_source = latent_heat(alt.fluid) if t_freeze is not None else (None, "no freezing point")
    latent = np.full(segs.size, 0.0 if L_f is None else L_f) * props.rho * 0.25 * math.pi * d_in**2
    with np.errstate(divide="ignore"):
        biot = np.where(np.isfinite(r_pipe), 1.0 / (4.0 * math.pi * props.k * r_pipe), 0.0)
    if fluid.compressible:
        biot = np.full(segs.size, np.nan)  # a gas holds almost no heat: the lumped temperature is the wall's
    tau = capacity * r_out

    # scenarios: heating off, heating on (from the operating temperature); warm-up from the worst ambient
    heated = (heaters.kind[segs] > 0) | (path.g_tracer[segs] > 0)
    warm = np.flatnonzero(heated & path.exposed[segs] & (t_limit is not None))
    n = segs.size
    rows_seg = np.concatenate([segs, segs, segs[warm]])
    rows_j = np.concatenate([np.arange(n), np.arange(n), warm])
    heat_on = np.concatenate([np.zeros(n, bool), np.ones(n, bool), np.ones(warm.size, bool)])
    downward = np.concatenate([np.ones(2 * n, bool), np.zeros(warm.size, bool)])
    t_start = np.concatenate([t0, t0, path.t_inf[segs[warm]]])
    frozen_start = np.zeros(rows_seg.size)
    if t_freeze is not None and L_f is not None:
        frozen_start[2 * n:] = (t_start[2 * n:] < t_freeze).astype(float)
    nan = np.nan
    thresholds = np.column_stack([
        np.full(rows_seg.size, nan if t_limit is None else t_limit),
        np.where(downward, nan if t_freeze is None else t_freeze, nan),
    ])
    # the warmest a row can get: its start, or where its heating holds it standing still
    t_high = np.concatenate([t0, t_held, t_held[warm]])
    rows = _Rows(path, heaters, rows_seg, t_start, frozen_start, capacity[rows_j], latent[rows_j], heat_on,
                 t_freeze, thresholds, downward, t_high)

    # how long to follow: a few time constants and the plateau with the heating off, 1 h to 30 days; then
    # longer while a row still heads for a temperature it has not reached (its standing one lies beyond)
    t_inf = path.t_inf[segs]
    with np.errstate(divide="ignore", invalid="ignore"):
        plateau = np.where((t_freeze is not None) & (latent > 0) & (t_inf < (t_freeze or 0.0)),
                           latent / ((g_pipe + g_sink) * ((t_freeze or 0.0) - t_inf)), 0.0)
    span = np.nan_to_num(6.0 * tau + plateau, nan=0.0, posinf=HORIZON_MAX_S)
    horizon = float(np.clip(span.max(initial=0.0), 3600.0, HORIZON_MAX_S))
    times = list(horizon * (np.arange(STEPS + 1) / STEPS) ** 1.5)
    curves = [rows.T.copy()]
    for k in range(STEPS):
        rows.step(times[k], times[k + 1] - times[k])
        curves.append(rows.T.copy())
    standing_off = np.where(path.kind[segs] == "adiabatic", np.nan, t_inf)
    eventual = np.concatenate([standing_off, t_held, t_held[warm]])
    while times[-1] < HORIZON_MAX_S and rows.heading_on(eventual):
        t_end = min(2.0 * times[-1], HORIZON_MAX_S)
        for t in np.linspace(times[-1], t_end, STEPS // 2 + 1)[1:].tolist():
            rows.step(times[-1], t - times[-1])
            times.append(t)
            curves.append(rows.T.copy())
    times = np.array(times)
    curves = np.array(curves)

    def reached(col, part):
        sl = {"off": slice(0, n), "on": slice(n, 2 * n)}[part]
        v = rows.reached[sl, col]
        return np.where(np.isnan(v), np.inf, v)

    lim_off, lim_on = reached(0, "off"), reached(0, "on")
    frz_off, frz_on = reached(1, "off"), reached(1, "on")
    solid_off = np.where(np.isnan(rows.solid_at[:n]), np.inf, rows.solid_at[:n])
    solid_on = np.where(np.isnan(rows.solid_at[n:2 * n]), np.inf, rows.solid_at[n:2 * n])
    warm_time = np.full(n, np.nan)
    if warm.size:
        w = rows.reached[2 * n:, 0]
        warm_time[warm] = np.where(np.isnan(w), np.inf, w)

    out_curves = {name: np.full((times.size, n_all), np.nan) for name in ("off", "on", "warm")}
    out_curves["off"][:, segs] = curves[:, :n]
    out_curves["on"][:, segs] = curves[:, n:2 * n]
    out_curves["warm"][:, segs[warm]] = curves[:, 2 * n:]

    records, warnings, high_biot = [], [], []
    plateau_applies = t_freeze is not None and L_f is not None
    for j, i in enumerate(segs):
        name = alt.segments[i].name
        exposed = bool(path.exposed[i])
        records.append(SegmentHold(
            index=int(i), name=name, start_temperature_K=float(t0[j]), capacity_J_per_mK=float(capacity[j]),
            fluid_capacity_J_per_mK=float(c_fluid[j]), wall_capacity_J_per_mK=float(c_wall[j]),
            insulation_capacity_J_per_mK=float(c_ins[j]), latent_heat_J_per_m=float(latent[j]),
            outside_resistance_K_m_per_W=float(r_out[j]), time_constant_s=float(tau[j]), biot_number=float(biot[j]),
            to_limit_off_s=float(lim_off[j]) if t_limit is not None else None,
            to_limit_on_s=float(lim_on[j]) if t_limit is not None else None,
            to_freezing_off_s=float(frz_off[j]) if t_freeze is not None else None,
            to_freezing_on_s=float(frz_on[j]) if t_freeze is not None else None,
            frozen_solid_off_s=float(solid_off[j]) if plateau_applies else None,
            frozen_solid_on_s=float(solid_on[j]) if plateau_applies else None,
            warm_up_s=float(warm_time[j]) if (exposed and bool(heated[j]) and t_limit is not None) else None,
        ))
        if biot[j] > BIOT_LIMIT:
            high_biot.append(f"{i + 1} {name!r} ({biot[j]:.2f})")
    if high_biot:
        # one sentence for all such segments: the reason is the same for each
        named = ", ".join(high_biot[:6]) + (f" and {len(high_biot) - 6} more" if len(high_biot) > 6 else "")
        warnings.append(
            f"Biot number above {BIOT_LIMIT} in segment{'s' if len(high_biot) > 1 else ''} {named}: the "
            "standing fluid's own conduction resistance is not small against the outside path, so its core stays "
            "warmer than the wall and ice or a cold layer forms at the wall before the lumped temperature gets "
            "there; the lumped times are optimistic for the wall (lumped capacitance: Bi < 0.1, Incropera & DeWitt "
            "§5.2).")
    return HoldTime(limit_temperature_K=t_limit, freezing_point_K=t_freeze,
                    latent_heat_J_per_kg=L_f if t_freeze is not None else None, latent_heat_source=L_source,
                    time_s=times, bulk_off_K=out_curves["off"], bulk_on_K=out_curves["on"],
                    warm_up_K=out_curves["warm"], segments=records, warnings=warnings)
