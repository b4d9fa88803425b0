"""Checks on a converged line, and the list of methods it used.

Everything here reads a converged state (:class:`solver.state.MarchState`), the line in cells
(:class:`solver.line.LineGrid`) and the node profile; nothing is solved. Each check has a severity
(``info``, ``warning``, ``danger``), a stable upper-case code (its short title is in
``solver.results.CHECK_TITLES``), a plain message that says what it means and what to do, the
segment and the position. Values in messages are tokens (``_T(kelvin)``, ``_dT``, ``_v``, ``_q``)
so each reader sees them in their own units (``solver.results.render_message``).
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from solver import correlations, films, fittings as fittings_mod, fouling, steam
from solver.line import LineGrid
from solver.model import DesignCases
from solver.properties import state_phase
from solver.results import Check, Profile, check_sort_key, render_message
from solver.state import MarchState

BURN_THRESHOLD_K = 333.15  # 60 °C contact burn threshold for metal-like surfaces (common practice)
COLD_CONTACT_K = 263.15  # −10 °C, cold-contact injury threshold (common practice)
#: Mach number above which gas flow is no longer treated as incompressible (common practice: the density
#: change from the flow's own speed passes about 5 %).
MACH_COMPRESSIBLE = 0.3
#: Mach number taken as close to choking: the friction length left to Mach 1 is fL/D ≈ 0.015 (Fanno,
#: γ = 1.4), so small changes choke the line (our call; see the NEAR_CHOKING message).
MACH_NEAR_CHOKING = 0.9
#: A surface counts as made hot or cold by the line only when it differs from the air by more than this.
SURFACE_MARGIN_K = 1.0


def line_checks(alt, fluid, line: LineGrid, state: MarchState, prof: Profile,
                margin: float | None = None) -> list[Check]:
    """Every check on the solved line, worst first and then in flow order, messages in SI text.

    ``margin``: the project's design margin on heat loss for the tracing the checks suggest (None: the
    default of DesignCases; a segment's own design_margin wins)."""
    checks = _checks(alt, fluid, line, state, prof)
    checks += _no_flow_checks(alt, fluid, line, state, margin)
    checks += _dew_point_checks(line, prof)
    checks.sort(key=check_sort_key)
    return [dataclasses.replace(ch, message=render_message(ch.message, None), template=ch.message)
            if "⟦" in ch.message else ch for ch in checks]


def _T(t: float) -> str:
    """A temperature [K] inside a check message, shown later in the reader's units."""
    return f"⟦T:{float(t):.6f}⟧"


def _dT(d: float) -> str:
    return f"⟦dT:{float(d):.6f}⟧"


def _v(v: float) -> str:
    return f"⟦v:{float(v):.6f}⟧"


def _q(q: float) -> str:
    return f"⟦q:{float(q):.6f}⟧"


def _n(n: float) -> str:
    """A dimensionless number (Reynolds, Prandtl, Rayleigh) in the one number format."""
    return f"⟦n:{float(n):.6g}⟧"


def _first_in_each(mask: np.ndarray, starts: np.ndarray, stops: np.ndarray) -> list:
    """For each range [start, stop) of ``mask``: the first index where it holds, or None.

    One pass over the mask for the whole line instead of one per segment; most masks of a
    sound design are empty.
    """
    idx = np.flatnonzero(mask)
    if not idx.size:
        return [None] * len(starts)
    pos = np.searchsorted(idx, starts)  # the first index at or after each start (or past the end)
    first = idx[np.minimum(pos, idx.size - 1)]
    return [k if a <= k < b else None for k, a, b in zip(first.tolist(), starts.tolist(), stops.tolist())]


def _where_in_each(mask: np.ndarray, starts: np.ndarray, stops: np.ndarray) -> list[np.ndarray]:
    """For each range [start, stop) of ``mask``: the indices where it holds (ascending)."""
    idx = np.flatnonzero(mask)
    if not idx.size:
        return [idx] * len(starts)
    lo = np.searchsorted(idx, starts).tolist()
    hi = np.searchsorted(idx, stops).tolist()
    return [idx[a:b] for a, b in zip(lo, hi)]


def _checks(alt, fluid, line: LineGrid, state: MarchState, prof: Profile) -> list[Check]:
    out: list[Check] = []
    setups = line.segments
    x_mid = line.x_mid
    Re, Pr, velocity = state.Re, state.Pr, state.velocity
    Tm = prof.bulk_temperature_K
    Tw = prof.inner_wall_temperature_K
    Ts = prof.outer_surface_temperature_K
    tsat = prof.saturation_temperature_K
    x = prof.x_m

    node_start = np.array([s.nodes.start for s in setups])
    node_stop = np.array([s.nodes.stop for s in setups])
    cell_start = line.seg_first_cell
    cell_stop = cell_start + line.cells_per_seg

    def per_segment(mask, severity, code, message_fn):
        for s, k in zip(setups, _first_in_each(mask, node_start, node_stop)):
            if k is not None:
                out.append(Check(severity, code, message_fn(s, k), segment=s.index, x_m=float(x[k])))

    def cells_where(mask):
        """Per segment, its cells (line indices) where ``mask`` holds."""
        return _where_in_each(mask, cell_start, cell_stop)

    def per_cells(mask, severity, code, message_fn):
        """One check per segment with cells where ``mask`` holds, at the first of them;
        ``message_fn(segment, its cells)`` writes the message."""
        for s, sel in zip(setups, cells_where(mask)):
            if sel.size:
                out.append(Check(severity, code, message_fn(s, sel), segment=s.index, x_m=float(x_mid[sel[0]])))

    c = _T  # temperatures in messages are tokens, shown in the user's units (see results.render_message)

    # boiling / flashing, or condensation for a gas
    p_in = alt.feed.inlet_pressure_Pa
    tsat_in = float(fluid.saturation_temperature(np.array([p_in]))[0])
    has_sat = np.isfinite(tsat)
    is_liquid_feed = math.isfinite(tsat_in) and alt.feed.inlet_temperature_K < tsat_in
    if has_sat.any():
        if is_liquid_feed:
            per_segment(has_sat & (Tm >= tsat), "danger", "BOILING_BULK",
                        lambda s, k: f"Bulk reaches boiling ({c(Tm[k])} at saturation {c(tsat[k])}): the liquid flashes; "
                                     "two-phase flow is outside this model and results past here are not valid.")
            per_segment(has_sat & (Tw >= tsat) & (Tm < tsat), "warning", "BOILING_WALL",
                        lambda s, k: f"Inner wall at {c(Tw[k])} reaches saturation ({c(tsat[k])}): local boiling at the "
                                     "wall (fouling, vapour pockets). Lower the wall temperature or raise the pressure.")
            margin = has_sat & (Tm < tsat) & (Tm >= tsat - 5.0)
            per_segment(margin, "warning", "NEAR_BOILING",
                        lambda s, k: f"Bulk within {_dT(5.0)} of boiling ({c(Tm[k])}, saturation {c(tsat[k])}).")
        else:
            per_segment(has_sat & (Tm <= tsat), "danger", "CONDENSING_BULK",
                        lambda s, k: f"Bulk gas cools to saturation ({c(Tm[k])}): condensate forms; "
                                     "two-phase flow is outside this model.")
            per_segment(has_sat & (Tw <= tsat) & (Tm > tsat), "warning", "CONDENSING_WALL",
                        lambda s, k: f"Inner wall at {c(Tw[k])} is below the saturation temperature {c(tsat[k])}: "
                                     "condensate forms on the wall.")

    # the feed's phase, when it was left to the inlet state: a vapour feed of a fluid that is liquid in
    # ambient conditions (steam rather than hot water) may not be what was meant
    if alt.feed.phase is None and not fluid.compressible:
        phase, tsat_feed = state_phase(fluid, alt.feed.inlet_temperature_K, p_in)
        if phase == "gas" and math.isfinite(tsat_feed):
            out.append(Check("info", "GAS_PHASE_FEED",
                             f"The feed is vapour: {fluid.label} at {c(alt.feed.inlet_temperature_K)} is above its "
                             f"boiling point ({c(tsat_feed)} at {p_in / 1e5:.4g} bar(a)), so the line is solved as a "
                             "gas. If it is meant to be liquid, raise the inlet pressure or lower the inlet "
                             "temperature; setting the feed's phase to liquid makes Calorun refuse such a state.",
                             segment=0, x_m=0.0))

    # freezing
    t_freeze = fluid.freezing_temperature(p_in)
    if t_freeze is not None and math.isfinite(t_freeze):
        per_segment(Tm <= t_freeze, "danger", "FREEZING_BULK",
                    lambda s, k: f"Bulk at {c(Tm[k])} is at or below the freezing point {c(t_freeze)}: the line can freeze.")
        per_segment((Tw <= t_freeze) & (Tm > t_freeze), "warning", "FREEZING_WALL",
                    lambda s, k: f"Inner wall at {c(Tw[k])} is below the freezing point {c(t_freeze)}: "
                                 "a frozen layer can build up on the wall.")
        per_segment((Tm > t_freeze) & (Tm <= t_freeze + 3.0), "warning", "NEAR_FREEZING",
                    lambda s, k: f"Bulk within {_dT(3.0)} of the freezing point ({c(Tm[k])}, freezing {c(t_freeze)}).")

    # user limits
    lim = alt.limits
    if lim.max_inner_wall_temperature_K is not None:
        tl = lim.max_inner_wall_temperature_K
        per_segment(Tw > tl, "danger", "WALL_LIMIT",
                    lambda s, k: f"Inner wall at {c(Tw[k])} exceeds the wall-temperature limit {c(tl)}.")
    if lim.min_bulk_temperature_K is not None:
        tb = lim.min_bulk_temperature_K
        per_segment(Tm < tb, "danger", "MIN_BULK_LIMIT",
                    lambda s, k: f"Bulk at {c(Tm[k])} falls below the minimum bulk temperature {c(tb)}.")

    # flow regime (cells -> segments)
    regime = correlations.flow_regime(Re)
    per_cells(regime == 1, "warning", "TRANSITIONAL_FLOW",
              lambda s, trans: (
                  f"Transitional flow (Re {_n(Re[trans].min())} to {_n(Re[trans].max())}): heat transfer and "
                  "friction are uncertain by tens of percent between Re 2,300 and 10,000."))

    # velocity (common practice ranges)
    # per-segment extremes in one pass (max and min are exact, so the same numbers as per slice)
    v_max_seg = np.maximum.reduceat(velocity, cell_start).tolist()
    v_min_seg = np.minimum.reduceat(velocity, cell_start).tolist()
    for s in setups:
        v_max, v_min = v_max_seg[s.index], v_min_seg[s.index]
        if fluid.compressible:
            if v_max > 30.0:
                i = s.cells.start + int(np.argmax(velocity[s.cells]))
                out.append(Check("warning", "VELOCITY_HIGH",
                                 f"Gas velocity {_v(v_max)} exceeds about {_v(30.0)} (common practice): noise, erosion "
                                 "and a large pressure drop.", segment=s.index, x_m=float(x_mid[i])))
        else:
            if v_max > 3.0:
                i = s.cells.start + int(np.argmax(velocity[s.cells]))
                out.append(Check("warning", "VELOCITY_HIGH",
                                 f"Liquid velocity {_v(v_max)} exceeds about {_v(3.0)} (common practice): erosion, noise "
                                 "and pressure surge on valve closure.", segment=s.index, x_m=float(x_mid[i])))
            elif v_min < 0.3 and not any(ch.code == "VELOCITY_LOW" for ch in out):
                # one note for the line is enough: slow flow is usually a design choice, not a fault
                i = s.cells.start + int(np.argmin(velocity[s.cells]))
                slow = sum(1 for t in v_min_seg if t < 0.3)
                more = f" ({slow} of {len(setups)} segments)" if len(setups) > 1 else ""
                out.append(Check("info", "VELOCITY_LOW",
                                 f"Liquid velocity {_v(v_min)} is below about {_v(0.3)}{more} (common practice): "
                                 "settling, fouling and poor heat transfer.", segment=s.index, x_m=float(x_mid[i])))

    # compressibility (gas lines): Mach number at the nodes; one check per segment, at the first node past
    # the threshold, with the segment's highest value
    mach = prof.mach_number
    if mach is not None and float(mach.max()) > MACH_COMPRESSIBLE:
        cp_nodes = fluid.props(Tm, prof.pressure_Pa).cp
        recovery = 0.5 * prof.velocity_m_per_s ** 2 / cp_nodes  # v²/2cp: how far a wall's recovery temperature can rise
        for s, k in zip(setups, _first_in_each(mach > MACH_COMPRESSIBLE, node_start, node_stop)):
            if k is None:
                continue
            span = slice(s.nodes.start, s.nodes.stop)
            peak = float(mach[span].max())
            if peak >= MACH_NEAR_CHOKING:
                k = s.nodes.start + int(np.argmax(mach[span] >= MACH_NEAR_CHOKING))
                out.append(Check("danger", "NEAR_CHOKING",
                                 f"Mach {peak:.2f}: the flow is close to choking (Mach 1). At Mach {MACH_NEAR_CHOKING:g} "
                                 "the friction length left to choking is only fL/D ≈ 0.015 (Fanno, γ = 1.4), under a "
                                 "metre of typical pipe: a little more flow or length, or a little less inlet pressure, "
                                 "chokes the line, and the results here change steeply. Use a larger bore or a higher "
                                 "inlet pressure.", segment=s.index, x_m=float(x[k])))
            else:
                out.append(Check("warning", "MACH_HIGH",
                                 f"Mach {peak:.2f} (above about {MACH_COMPRESSIBLE:g} from here on, common practice for "
                                 "treating gas flow as incompressible): the march includes the kinetic energy and the "
                                 "density change, but the friction and heat-transfer correlations come from "
                                 "incompressible flow, and the wall sees a recovery temperature up to "
                                 f"{_dT(float(recovery[span].max()))} above the bulk (v²/2cp), which is not modelled.",
                                 segment=s.index, x_m=float(x[k])))

    # surfaces people can touch: judged by the surface temperature the LINE makes. In a freezing yard
    # every surface is cold; a contact hazard is a surface the line makes hotter (or colder) than the
    # air around it and beyond the threshold.
    ts_max_seg = np.maximum.reduceat(Ts, node_start).tolist()
    ts_min_seg = np.minimum.reduceat(Ts, node_start).tolist()
    for s in setups:
        a = s.nodes.start
        if s.kind in ("still_air", "wind"):
            t_air = s.medium_temperature_K
            if ts_max_seg[s.index] >= BURN_THRESHOLD_K and ts_max_seg[s.index] > t_air + SURFACE_MARGIN_K:
                k = a + int(np.argmax(Ts[s.nodes]))
                out.append(Check("warning", "HOT_SURFACE",
                                 f"Outer surface reaches {c(Ts[k])}: hot enough to burn on contact (above about {_T(BURN_THRESHOLD_K)}, "
                                 "common practice). Insulate or guard for personnel protection.",
                                 segment=s.index, x_m=float(x[k])))
            if ts_min_seg[s.index] <= COLD_CONTACT_K and ts_min_seg[s.index] < t_air - SURFACE_MARGIN_K:
                k = a + int(np.argmin(Ts[s.nodes]))
                out.append(Check("warning", "COLD_SURFACE",
                                 f"Outer surface falls to {c(Ts[k])}, {_dT(t_air - Ts[k])} below the air: cold enough "
                                 f"to injure on contact (below about {_T(COLD_CONTACT_K)}, common practice). Insulate or guard.",
                                 segment=s.index, x_m=float(x[k])))
        elif s.kind in ("jacket", "fixed_wall") and math.isfinite(s.medium_temperature_K):
            if s.medium_temperature_K >= BURN_THRESHOLD_K:
                out.append(Check("warning", "HOT_JACKET",
                                 f"The jacket or heating medium is at {c(s.medium_temperature_K)}: its outer shell burns "
                                 f"on contact unless insulated (above about {_T(BURN_THRESHOLD_K)}, common practice).",
                                 segment=s.index, x_m=float(x[a])))
            if alt.segments[s.index].insulation:
                out.append(Check("info", "INSULATION_IGNORED",
                                 "Insulation layers play no part with a jacket or fixed wall temperature; "
                                 "they would insulate the jacket, not the line.", segment=s.index, x_m=float(x[a])))

    # correlations outside their validity, each where the solve used it
    regime_turb = regime == 2
    bad_g = regime_turb & correlations.out_of_range("gnielinski", Re=Re, Pr=Pr)
    bad_l = (regime == 0) & correlations.out_of_range("laminar_entry", Pr=Pr)
    bad_cb = (Re >= correlations.RE_COLEBROOK_MIN) & correlations.out_of_range(
        "colebrook", Re=Re, relative_roughness=line.rel_rough)
    for mask, name in ((bad_g, "Gnielinski"), (bad_l, "laminar entry")):
        per_cells(mask, "warning", "CORRELATION_RANGE",
                  lambda s, sel: (
                      f"The {name} correlation is used outside its published range here "
                      f"(Re {_n(Re[sel].min())}–{_n(Re[sel].max())}, Pr {_n(Pr[sel].min())}–{_n(Pr[sel].max())})."))
    lo_ed, hi_ed = correlations.VALIDITY["colebrook"]["relative_roughness"]
    per_cells(bad_cb, "warning", "CORRELATION_RANGE",
              lambda s, sel: (
                  f"The Colebrook friction factor is used outside its published range here (relative "
                  f"roughness ε/D {_n(line.rel_rough[sel].max())}, Re {_n(Re[sel].min())}–{_n(Re[sel].max())}; "
                  f"published for ε/D up to {_n(hi_ed)}): the pressure drop is uncertain."))
    if state.wall_groups is not None:
        per_cells(_property_ratio_out_of_range(state, regime), "warning", "CORRELATION_RANGE",
                  lambda s, sel: (
                      "The bulk-to-wall property correction is used outside its published range here "
                      "(the wall is far hotter or colder than the bulk; the factor is held at its value at "
                      "the range's edge): the inside coefficient is uncertain."))
    film_mask, air = line.film_mask, state.air
    if air is not None and film_mask.any():
        _air_film_range_checks(line, state, per_cells)
    if line.cond_mask.any():
        # Nusselt's film theory holds for a laminar condensate film
        cm = line.cond_mask
        re_film = np.zeros(line.n)
        re_film[cm] = steam.condensate_film_reynolds(line.steam_pressure[cm], state.T_heated[cm], line.d_pipe_outer[cm])
        hi = correlations.VALIDITY["film_condensation"]["Re_film"][1]
        per_cells(cm & correlations.out_of_range("film_condensation", Re_film=re_film), "warning", "CORRELATION_RANGE",
                  lambda s, sel: (
                      f"The condensate film is no longer laminar here (film Reynolds number up to "
                      f"{_n(re_film[sel].max())}; Nusselt's theory holds below about {_n(hi)})."))
    if line.any_tracer:
        idle = (line.g_tracer > 0) & (state.g_tracer == 0)
        per_cells(idle, "info", "TRACER_IDLE",
                  lambda s, sel: (
                      f"The pipe is at or above the tracer's steam temperature ({_T(s.tracer_temperature_K)}) "
                      "here: the steam tracer gives no heat. A higher steam pressure would."))
    return out


def _property_ratio_out_of_range(state: MarchState, regime: np.ndarray) -> np.ndarray:
    """Cells whose bulk-to-wall ratio lies outside the range of the correction used there: the viscosity
    ratio in laminar and transitional liquid flow, the Prandtl ratio in turbulent and transitional liquid
    flow, the temperature ratio in turbulent and transitional gas flow (laminar gases are not corrected)."""
    g = state.wall_groups
    if state.gas:
        return (regime >= 1) & correlations.out_of_range("property_ratio_gas", T_ratio=g["T_ratio"])
    bad_mu = (regime <= 1) & correlations.out_of_range("property_ratio_liquid", mu_ratio=g["mu_ratio"])
    bad_pr = (regime >= 1) & correlations.out_of_range("property_ratio_liquid", Pr_ratio=g["Pr_ratio"])
    return bad_mu | bad_pr


def _air_film_range_checks(line: LineGrid, state: MarchState, per_cells) -> None:
    """Churchill–Chu (lower and upper Ra; on risers the vertical form and its thin-cylinder limit) and
    Churchill–Bernstein (Re·Pr) ranges, where the outer film in air is computed."""
    film_mask, air = line.film_mask, state.air
    fm = film_mask
    vertical_f, ra_f, thin_f = films.free_convection_groups(
        air, state.T_surface[fm], line.t_inf[fm], line.d_outer[fm], line.vertical_length[fm])
    n = line.n
    ra = np.full(n, np.nan)
    thin = np.full(n, np.inf)
    vertical = np.zeros(n, dtype=bool)
    ra[fm], thin[fm], vertical[fm] = ra_f, thin_f, vertical_f
    bad_h = fm & ~vertical & correlations.out_of_range("churchill_chu", Ra=np.nan_to_num(ra, nan=1.0))
    bad_v = fm & vertical & correlations.out_of_range("churchill_chu_vertical", Ra=np.nan_to_num(ra, nan=1.0))
    for mask, what, name in ((bad_h, "horizontal cylinder", "churchill_chu"),
                             (bad_v, "vertical surface", "churchill_chu_vertical")):
        lo, hi = correlations.VALIDITY[name]["Ra"]
        per_cells(mask, "warning", "CORRELATION_RANGE",
                  lambda s, sel: (
                      f"Natural convection ({what}) outside the Churchill–Chu range "
                      f"(Ra {_n(ra[sel].min())}–{_n(ra[sel].max())}; published {_n(lo)}–{_n(hi)})."))
    bad_thin = fm & vertical & correlations.out_of_range("churchill_chu_vertical", D_Gr_quarter_over_L=thin)
    per_cells(bad_thin, "info", "CORRELATION_RANGE",
              lambda s, sel: (
                  "This riser is slender for its height: the vertical-plate correlation used for its "
                  "natural convection understates a thin vertical cylinder's loss somewhat "
                  "(the plate form holds when D/L ≥ 35/Gr_L^¼; Incropera & DeWitt §9.6)."))
    windy = fm & (line.wind_speed > 0)
    if windy.any():
        t_film = 0.5 * (state.T_surface + np.nan_to_num(line.t_inf, nan=293.15))
        _, alpha, _ = air.at(t_film)
        re_pr = line.wind_speed * line.d_outer / alpha  # Re·Pr = V·D/ν · ν/α
        bad_w = windy & correlations.out_of_range("churchill_bernstein", RePr=re_pr)
        per_cells(bad_w, "warning", "CORRELATION_RANGE",
                  lambda s, sel: (
                      f"Wind convection outside the Churchill–Bernstein range (Re·Pr {_n(re_pr[sel].min())}; "
                      "published from 0.2): the outer film is uncertain."))


#: The margin on heat loss when the checks suggest tracing: DesignCases' default (common practice 10–25 %).
DEFAULT_DESIGN_MARGIN = float(DesignCases.model_fields["design_margin"].default)


def _no_flow_checks(alt, fluid, line: LineGrid, state: MarchState, margin: float | None = None) -> list[Check]:
    """Where the line would settle if the flow stopped (common practice in tracing design).

    With no flow the fluid in a cell comes to the temperature at which the heater balances the loss
    through the outside path and the heat sinks, G = 1/R_o + g_sink per unit length:
    constant output and a thermostat (taken at full output: it holds only what full output can)
    T = T∞ + q'/G; a self-limiting heater q' = s·(T0 − T) gives T = (s·T0 + G·T∞)/(s + G) while that is
    below T0 (the linear equation solved). Below the freezing point the product freezes in the line, a
    danger to the plant (``NO_FLOW_FREEZE``); below only the alternative's minimum bulk temperature it is
    a warning (``NO_FLOW_HOLD``). The tracing suggested holds the limit with the design margin on the
    loss (``segment.design_margin``, else ``margin``, else DesignCases' default). The outer film and the
    bare heat sinks' film are taken at their flowing values, a fair estimate for insulated lines.
    """
    if fluid.compressible:
        return []
    limits = []
    t_freeze = fluid.freezing_temperature(alt.feed.inlet_pressure_Pa)
    if t_freeze is not None and math.isfinite(t_freeze):
        limits.append((t_freeze, "the freezing point"))
    else:
        t_freeze = None
    if alt.limits.min_bulk_temperature_K is not None:
        limits.append((alt.limits.min_bulk_temperature_K, "the minimum bulk temperature"))
    if not limits:
        return []
    limit_T, limit_name = max(limits)
    t_inf, r_out_total, x_mid = line.t_inf, state.r_out_total, line.x_mid
    cold, hot = [], []  # (t_eq, segment, cell) per segment
    t_max_wall = alt.limits.max_inner_wall_temperature_K
    # the settling temperature of every cell exposed to air or soil, NaN elsewhere; then per segment
    # its extremes in one pass (max and min are exact) and the first cell that reaches them
    exposed_seg = np.array([s.kind in ("still_air", "wind", "buried") for s in line.segments])
    exposed = np.repeat(exposed_seg, line.cells_per_seg)
    with np.errstate(divide="ignore"):
        g_loss = np.where(np.isfinite(r_out_total) & (r_out_total > 0.0), 1.0 / r_out_total, 0.0)
    if state.g_sink is not None:
        g_loss = g_loss + state.g_sink
    q_fixed = line.q_in + line.q_thermostat  # constant output; thermostats at full output
    s_sl, t0 = line.s_heater, line.t0_heater
    t_inf_0 = np.nan_to_num(t_inf, nan=0.0)
    with np.errstate(divide="ignore", invalid="ignore"):
        t_eq_all = (q_fixed + s_sl * t0 + g_loss * t_inf_0) / (s_sl + g_loss)
        # a self-limiting heater above its zero-output temperature gives nothing: the line settles where
        # its other heat balances the loss
        off = (s_sl > 0.0) & (t_eq_all > t0)
        t_eq_all = np.where(off, t_inf_0 + q_fixed / g_loss, t_eq_all)
    q_at_eq = q_fixed + np.where(off, 0.0, s_sl * (t0 - t_eq_all))  # heater output at the settled temperature
    t_eq = np.full(line.n, np.nan)
    t_eq[exposed] = t_eq_all[exposed]
    t_eq_min = np.minimum.reduceat(t_eq, line.seg_first_cell).tolist()
    t_hot = t_eq
    if line.any_thermostat:
        # a working thermostat switches off at its set point: stopped, it heats the line no further
        # (failed on, it is the hot design case's business)
        set_point = np.full(len(line.segments), np.inf)
        set_point[line.thermostat_segments] = line.set_points
        t_hot = np.minimum(t_eq, set_point[line.seg_of_cell])
    t_eq_max = np.maximum.reduceat(t_hot, line.seg_first_cell).tolist() if t_max_wall is not None else None
    for s in line.segments:
        if not exposed_seg[s.index]:
            continue
        cells = s.cells
        if t_eq_min[s.index] < limit_T:
            i = cells.start + int(np.argmin(t_eq[cells]))
            cold.append((float(t_eq[i]), s, i))
        if t_eq_max is not None and t_eq_max[s.index] > t_max_wall:
            j = cells.start + int(np.argmax(t_hot[cells]))
            if q_at_eq[j] > 0:
                hot.append((float(t_hot[j]), s, j))
    out = []
    if cold:
        t_eq, s, c = min(cold, key=lambda item: item[0])
        alt_margin = DEFAULT_DESIGN_MARGIN if margin is None else float(margin)
        margins = [alt.segments[cs.index].design_margin for _, cs, _ in cold]
        margins = [alt_margin if m is None else m for m in margins]
        # the tracing that holds the limit in each cold segment's worst cell, with that segment's margin
        needs = [(limit_T - t_inf[cc]) * g_loss[cc] * (1.0 + m) for (_, _, cc), m in zip(cold, margins)]
        k_need = int(np.argmax(needs))
        needed, m_need = max(needs[k_need], 0.0), margins[k_need]
        with_margin = f"with a {m_need * 100:.0f} % margin on the loss"
        heater = _heater_words(s, q_at_eq[c])
        frozen = [item for item in cold if t_freeze is not None and item[0] < t_freeze]
        if frozen:
            # the held limit may be the minimum bulk temperature above the freezing point
            held = "the freezing point" if limit_T == t_freeze else f"{limit_name} ({_T(limit_T)})"
            others = f" {len(frozen) - 1} more segment(s) freeze too." if len(frozen) > 1 else ""
            out.append(Check(
                "danger", "NO_FLOW_FREEZE",
                f"If the flow stops, the line here settles at about {_T(t_eq)} ({heater}), "
                f"below the freezing point ({_T(t_freeze)}): the product freezes in the line.{others} About "
                f"{_q(needed)} of tracing ({with_margin}) would hold {held} at no flow; or provide drain-down "
                "(common practice in tracing design).",
                segment=s.index, x_m=float(x_mid[c])))
        else:
            others = f" {len(cold) - 1} more segment(s) too." if len(cold) > 1 else ""
            out.append(Check(
                "warning", "NO_FLOW_HOLD",
                f"If the flow stops, the line here settles at about {_T(t_eq)} ({heater}), "
                f"below {limit_name} ({_T(limit_T)}).{others} About {_q(needed)} of "
                f"tracing ({with_margin}) would hold the limit at no flow; or provide drain-down (common practice "
                "in tracing design).",
                segment=s.index, x_m=float(x_mid[c])))
    if hot:
        t_eq, s, c = max(hot, key=lambda item: item[0])
        fix = ("Use a lower output or a controller" if s.heater_kind == "self_limiting"
               else "Use self-limiting tracing or a controller")
        out.append(Check(
            "warning", "NO_FLOW_OVERHEAT",
            f"If the flow stops, the tracing here heats the line to about {_T(t_eq)}, above the "
            f"wall-temperature limit ({_T(t_max_wall)}). {fix} "
            "(common practice in tracing design).", segment=s.index, x_m=float(x_mid[c])))
    return out


def _heater_words(s, q_eq: float) -> str:
    """What the segment's heater gives at the settled temperature, for the no-flow messages."""
    if s.heater_kind == "self_limiting":
        return f"the self-limiting heater gives {_q(q_eq)} there"
    if s.heater_kind == "thermostat":
        return f"heat input {_q(q_eq)}, the thermostat's heater at full output"
    return f"heat input {_q(q_eq)}"


def _dew_point_checks(line: LineGrid, prof: Profile) -> list[Check]:
    """Moisture condenses on an outer surface colder than the dew point of the surrounding air."""
    out = []
    for s in line.segments:
        rh = getattr(s.surroundings, "relative_humidity", None)
        if rh is None or rh <= 0.0:
            continue
        t_dew = float(correlations.dew_point_magnus(s.medium_temperature_K, rh))
        if "dew_point" in correlations.VALIDITY and correlations.out_of_range(
                "dew_point", T_air_K=np.array([s.medium_temperature_K])).any():
            lo, hi = correlations.VALIDITY["dew_point"]["T_air_K"]
            out.append(Check(
                "warning", "CORRELATION_RANGE",
                f"The dew-point formula is used outside its published range (air at {_T(s.medium_temperature_K)}; "
                f"published {_T(lo)} to {_T(hi)}): the dew point is uncertain.",
                segment=s.index, x_m=float(prof.x_m[s.nodes.start])))
        seg_ts = prof.outer_surface_temperature_K[s.nodes]
        k = int(np.argmin(seg_ts))
        if seg_ts[k] < t_dew:
            out.append(Check(
                "warning", "SURFACE_CONDENSATION",
                f"Outer surface at {_T(seg_ts[k])} is below the dew point of the surrounding air "
                f"({_T(t_dew)} at {100 * rh:.0f} % relative humidity): moisture condenses, wetting the "
                "insulation and corroding the pipe under it. Thicken the insulation or add a vapour barrier.",
                segment=s.index, x_m=float(prof.x_m[s.nodes.start + k])))
    return out


def exposed_mask(line: LineGrid, prof: Profile) -> np.ndarray:
    """Nodes whose outer surface people can touch (in air)."""
    mask = np.zeros(prof.x_m.size, dtype=bool)
    in_air = np.array([s.kind in ("still_air", "wind") for s in line.segments])
    mask[:] = np.repeat(in_air, line.cells_per_seg + 1)
    return mask


def methods_used(line: LineGrid, state: MarchState) -> list[str]:
    """The published methods this solve used, with their citations (the report prints this list)."""
    m = correlations.METHODS
    regime = correlations.flow_regime(state.Re)
    used = []
    if (regime == 0).any() or (regime == 1).any():
        used.append(f"Laminar inside heat transfer, mean values over each cell of the entry length: {m['laminar_entry']}")
        used.append(f"Laminar friction factor: {m['laminar_friction']}")
    if (regime == 1).any():
        used.append(f"Friction in transition: {m['friction_transition']}")
        used.append(f"Transition 2,300 < Re < 10,000: {m['transition_blend']}")
    if (regime >= 1).any():
        used.append(f"Turbulent inside heat transfer: {m['gnielinski']}")
        used.append(f"Turbulent friction factor: {m['colebrook']}")
    used.append(ENTRY_RULE)
    if state.wall_factor is not None and not np.allclose(state.wall_factor, 1.0):
        key = "property_ratio_gas" if state.gas else "property_ratio_liquid"
        used.append(f"Bulk-to-wall property correction: {m[key]}")
    if np.any(line.r_foul > 0):
        used.append(f"Inside fouling resistance as entered; typical values: {fouling.FOULING_SOURCE}")
    if line.film_mask.any():
        if np.any(line.film_mask & (line.vertical_length == 0)):
            used.append(f"Natural convection, horizontal cylinder: {m['churchill_chu']}")
        if np.any(line.vertical_length > 0):
            used.append(f"Natural convection on steep runs, vertical surface: {m['churchill_chu_vertical']}")
        used.append(f"Thermal radiation to surroundings: {m['radiation']}")
    if (line.wind_speed > 0).any():
        used.append(f"Wind in cross-flow: {m['churchill_bernstein']}")
        used.append(f"Mixed convection: {m['mixed_convection']}")
    if (line.kinds == "buried").any():
        used.append(f"Buried pipe: {m['buried_cylinder']}")
    if line.cond_mask.any():
        used.append(f"Condensing steam on the pipe: {m['film_condensation']}")
    if line.any_tracer:
        used.append(f"Steam tracer contact: {steam.TRACER_SOURCE}")
    used.append(f"Dew point of surrounding air (when humidity is given): {m['dew_point']}")
    if line.any_fittings:
        used.append(f"Fittings loss coefficients: {'; '.join(fittings_mod.SOURCES)}")
    used.append("Fluid properties: CoolProp (Bell et al. 2014) or user table")
    return used


#: How the entry length is laid out along the line (solver.line._entry_origins), for the methods list.
ENTRY_RULE = (
    "Entry lengths: from the line inlet when the flow develops there (or none when it arrives fully "
    "developed); restarted where the bore changes (velocity and temperature) or the thermal condition of the "
    "wall changes (temperature only); film coefficients are cell means of the local values"
)
