"""From the converged march to the Result: node profiles, segment spans, heat accounting, key figures.

The profile has its own nodes per segment (the boundary node repeated), so wall and surface
values can jump where the wall model changes. Cell-wise quantities are reported at a node as
the value of the cell downstream of it (the cell upstream for a segment's outlet node); film
coefficients are re-evaluated at the nodes from the converged bulk state.
"""

from __future__ import annotations

import math

import numpy as np

from solver import checks as checks_mod, correlations
from solver.films import air_film_parts, condensate_resistance, inside_nusselt
from solver.line import GRAVITY, LineGrid, SegmentSetup
from solver.model import Alternative
from solver.resistances import segment_resistances
from solver.results import PressureDropBreakdown, Profile, Result, SegmentSpan
from solver.state import MarchState


def line_result(alt: Alternative, fluid, line: LineGrid, state: MarchState, margin: float | None = None,
                light: bool = False) -> Result:
    """Key figures, node profiles, checks and methods of the converged line.

    ``margin``: the project's design margin for the tracing the checks suggest (None: DesignCases' default).
    ``light``: the key figures only (a search's variants): no checks, methods or heat-path resistances."""
    T, p, Q_cell, m_dot, h0 = state.T, state.p, state.Q_cell, state.m_dot, state.h_in
    # Heat input = tracing + heat from heating or cooling media (jacket, fixed wall; signed);
    # heat loss = heat to the ambient (air, soil). duty = heat input − heat loss.
    media = (line.kinds == "jacket") | (line.kinds == "fixed_wall")
    tracing_cell = (state.q_heater + state.q_tracer) * line.dx  # electric heaters (as delivered) and steam tracing
    media_cell = np.where(media, Q_cell - tracing_cell, 0.0)
    q_loss_cell = np.where(media, 0.0, tracing_cell - Q_cell)  # W to the ambient per cell
    heat_tracing = float(np.sum(tracing_cell))
    heat_media = float(np.sum(media_cell))
    duty = float(np.sum(Q_cell))
    h_out = float(fluid.enthalpy(np.array([T[-1]]), np.array([p[-1]]))[0])
    # duty = m·Δ(h + v²/2 + g z): potential and kinetic energy of the flow take their share
    potential = m_dot * GRAVITY * float(np.sum(line.dz))
    potential += m_dot * float(state.kinetic_nodes[-1] - state.kinetic_nodes[0])
    residual = m_dot * (state.h_nodes[-1] - h0) + potential - duty
    # the enthalpy re-evaluated from (T, p) at the outlet checks the inversion, not just the sum
    residual = max(residual, m_dot * (h_out - h0) + potential - duty, key=abs)

    prof, spans = _node_profiles(line, state, fluid, tracing_cell + media_cell)

    wall = prof.inner_wall_temperature_K
    surf = prof.outer_surface_temperature_K
    i_wmax, i_wmin = int(np.argmax(wall)), int(np.argmin(wall))
    i_bmin = int(np.argmin(T))
    surf_exposed = checks_mod.exposed_mask(line, prof)
    if surf_exposed.any():
        i_smax = int(np.argmax(np.where(surf_exposed, surf, -np.inf)))
        i_smin = int(np.argmin(np.where(surf_exposed, surf, np.inf)))
        smax, smax_x = float(surf[i_smax]), float(prof.x_m[i_smax])
        smin, smin_x = float(surf[i_smin]), float(prof.x_m[i_smin])
    else:
        smax = smax_x = smin = smin_x = math.nan
    velocity, Re = state.velocity, state.Re
    return Result(
        name=alt.name,
        fluid_label=fluid.label,
        mass_flow_kg_per_s=m_dot,
        profile=prof,
        segments=spans,
        checks=[] if light else checks_mod.line_checks(alt, fluid, line, state, prof, margin),
        inlet_temperature_K=alt.feed.inlet_temperature_K,
        inlet_pressure_Pa=alt.feed.inlet_pressure_Pa,
        outlet_temperature_K=float(T[-1]),
        outlet_pressure_Pa=float(p[-1]),
        pressure_drop=PressureDropBreakdown(
            friction_Pa=float(np.sum(state.dp_friction)),
            fittings_Pa=float(np.sum(state.dp_fittings)),
            elevation_Pa=float(np.sum(state.dp_elevation)),
            acceleration_Pa=float(np.sum(state.dp_accel)),
        ),
        duty_W=duty,
        heat_input_W=heat_tracing + heat_media,
        heat_input_tracing_W=heat_tracing,
        heat_input_media_W=heat_media,
        heat_loss_W=float(np.sum(q_loss_cell)),
        heat_sink_loss_W=float(np.sum(state.q_sink * line.dx)),
        energy_balance_residual_W=float(residual),
        min_bulk_temperature_K=float(T[i_bmin]),
        min_bulk_position_m=float(line.x_node[i_bmin]),
        max_inner_wall_temperature_K=float(wall[i_wmax]),
        max_inner_wall_position_m=float(prof.x_m[i_wmax]),
        min_inner_wall_temperature_K=float(wall[i_wmin]),
        min_inner_wall_position_m=float(prof.x_m[i_wmin]),
        max_outer_surface_temperature_K=smax,
        max_outer_surface_position_m=smax_x,
        min_outer_surface_temperature_K=smin,
        min_outer_surface_position_m=smin_x,
        pump_power_W=float(np.sum(m_dot / state.rho * state.dp_cell)),  # local volume flow × pressure drop
        residence_time_s=float(np.sum(line.dx / velocity)),
        velocity_range_m_per_s=(float(np.min(velocity)), float(np.max(velocity))),
        reynolds_range=(float(np.min(Re)), float(np.max(Re))),
        cells=line.n,
        methods=[] if light else checks_mod.methods_used(line, state),
        resistances=[] if light else segment_resistances(line, state),
    )


def _node_profiles(line: LineGrid, state: MarchState, fluid, heat_in_cell: np.ndarray, with_spans: bool = True):
    """Values at nodes. Each segment contributes its own nodes, so wall values can jump at a boundary.

    ``heat_in_cell`` is the heat input per cell [W] (tracing and heating or cooling media). With variants
    stacked (:mod:`solver.batch`: arrays (V, n)) the profile's arrays are (V, nodes); ``with_spans``
    False skips the per-segment spans (None is returned for them).
    """
    # node k of a segment uses the cell downstream of it, the outlet node the cell upstream
    # profile node j of segment s is line node j - s (each earlier segment repeats one boundary node)
    segs = line.segments
    nodes_per_seg = line.cells_per_seg + 1
    seg_of_node = np.repeat(np.arange(len(segs)), nodes_per_seg)
    ni = np.arange(seg_of_node.size) - seg_of_node
    cell_stop = line.seg_first_cell + line.cells_per_seg
    ci = np.minimum(ni, (cell_stop - 1)[seg_of_node])
    m_dot = state.m_dot
    x = line.x_node[..., ni]
    Tm = state.T[..., ni]
    pn = state.p[..., ni]
    pr = fluid.props(Tm, pn)
    Dn = line.D[..., ci]
    An = line.area[..., ci]
    velocity = m_dot / (pr.rho * An)
    sound = fluid.speed_of_sound(Tm, pn)  # None for solutions and user tables (liquids: Mach negligible)
    mach = None if sound is None else velocity / sound
    Re = m_dot * Dn / (An * pr.mu)
    Pr = pr.cp * pr.mu / pr.k
    rel_rough = line.rel_rough[..., ci]
    f = correlations.friction_factor(Re, rel_rough)
    # the local coefficient at the node's own distance along its entry length (inf: developed); at
    # the very start of an entry it is unbounded (clipped to X_OVER_D_MIN) and the wall meets the bulk
    seg_origin = line.entry_origin[..., seg_of_node]
    x_entry = np.where(np.isinf(seg_origin), np.inf, x - np.where(np.isinf(seg_origin), 0.0, seg_origin))
    x_over_d = np.maximum(x_entry, 0.0) / Dn
    boundary = line.boundary if isinstance(line.boundary, str) else np.broadcast_to(line.boundary[ci], Re.shape)
    Nu = inside_nusselt(Re, Pr, f, x_over_d, boundary, rel_rough, line.developing[..., ci])
    h_i = Nu * pr.k / Dn * _at_nodes(state.wall_factor, line, ni, ci) * state.factors.inside_film
    r_in = 1.0 / (h_i * math.pi * Dn)
    r_a = r_in + line.r_foul[..., ci] + line.r_wall[..., ci]
    r_out = state.r_out_total[..., ci].copy()  # the cells' converged outside path: the start for the nodes' own
    tinf = np.nan_to_num(line.t_inf[..., ci], nan=0.0)
    # fixed heat input (constant heaters, thermostats at their duty); a self-limiting heater joins the steam
    # tracers' path (conductance s to T0), as in the march
    duty = np.nan_to_num(state.duty, nan=0.0)
    q_in = line.q_in[..., ci] + line.q_thermostat[..., ci] * duty[..., seg_of_node]
    g_st = state.g_tracer[..., ci]
    g_sl = state.g_heater[..., ci]
    g_t = g_st + g_sl
    t0_heater = line.t0_heater[..., ci]
    with np.errstate(invalid="ignore", divide="ignore"):
        t_t = np.where(g_t > 0.0, (g_st * line.t_tracer[..., ci] + g_sl * t0_heater) / np.where(g_t > 0.0, g_t, 1.0),
                       0.0)
    sink_ratio = line.sink_insulated_ratio[..., ci]
    g_sink_fixed = state.g_sink_fixed[..., ci]
    fm = line.film_mask[..., ci]
    cm = line.cond_mask[..., ci]
    r_ins_n = line.r_ins[..., ci]
    t_surface_film = None
    for _ in range(3 if (fm.any() or cm.any()) else 1):
        # the outside path at the node's own temperatures: a few fixed-point steps from the cell values
        q_fluid, t_heated = _node_heat(q_in, Tm, r_a, r_out, tinf, g_t, t_t, _node_sink(r_out, sink_ratio, g_sink_fixed))
        if state.air is not None and fm.any():
            d_out = line.d_outer[..., ci][fm]
            if t_surface_film is None:
                t_surface_film = state.T_surface[..., ci][fm]
            else:
                g_film = np.where(np.isfinite(r_out[fm]), 1.0 / (r_out[fm] - r_ins_n[fm]), 0.0)
                t_surface_film = (t_heated[fm] + r_ins_n[fm] * g_film * tinf[fm]) / (1.0 + r_ins_n[fm] * g_film)
            vertical = line.vertical_length[..., ci][fm]
            kw = {"vertical_length": vertical} if vertical.any() else {}
            h_conv, h_rad = air_film_parts(state.air, t_surface_film, line.t_inf[..., ci][fm], d_out,
                                           line.wind_speed[..., ci][fm], line.emissivity[..., ci][fm], state.factors,
                                           **kw)
            r_out[fm] = r_ins_n[fm] + 1.0 / ((h_conv + h_rad) * math.pi * d_out)
        if cm.any():
            r_out[cm] = condensate_resistance(line.steam_pressure[..., ci][cm], line.d_pipe_outer[..., ci][cm],
                                              line.r_steam_foul[..., ci][cm], t_heated[cm], state.factors)
    g_sink_n = _node_sink(r_out, sink_ratio, g_sink_fixed)
    q_fluid, t_heated = _node_heat(q_in, Tm, r_a, r_out, tinf, g_t, t_t, g_sink_n)
    t_inner_wall = Tm + q_fluid * r_in
    q_tracer = g_t * (t_t - t_heated)  # steam tracers and self-limiting heaters
    q_loss = q_in + q_tracer - q_fluid  # W/m to the surroundings (or from a heating medium, negative)
    q_sink = g_sink_n * (t_heated - tinf)  # the part of it the heat sinks lose
    q_heater = q_in + np.maximum(g_sl * (t0_heater - t_heated), 0.0)
    # the outer surface: over insulation for air/buried; the pipe outer wall for jacket/fixed/adiabatic;
    # the pipe's own loss crosses the insulation (the sinks' loss leaves through their own surfaces)
    over_insulation = np.repeat([s.kind in ("still_air", "wind", "buried") for s in segs], nodes_per_seg)
    t_surface = np.where(over_insulation, t_heated - (q_loss - q_sink) * r_ins_n, t_heated)
    spans = [] if with_spans else None
    Q_cell, dp_cell = state.Q_cell, state.dp_cell
    # heater output and sink loss per segment, all segments in one reduction each
    heater_seg = np.add.reduceat(state.q_heater * line.dx, line.seg_first_cell, axis=-1).tolist()
    sink_seg = np.add.reduceat(state.q_sink * line.dx, line.seg_first_cell, axis=-1).tolist()
    duty_seg = state.duty.tolist()
    x_start = line.x_node[..., line.seg_first_cell].tolist()
    x_end = line.x_node[..., cell_stop].tolist()
    for s in segs if with_spans else ():
        a, b = s.cells.start, s.cells.stop
        # per-segment sums as np.sum does them (pairwise), so the figures do not move at round-off
        duty = float(np.add.reduce(Q_cell[a:b]))
        heat_in = float(np.add.reduce(heat_in_cell[a:b]))
        spans.append(SegmentSpan(
            index=s.index, name=s.name, x_start_m=x_start[s.index],
            x_end_m=x_end[s.index], inner_diameter_m=s.inner_diameter_m,
            outer_diameter_m=s.outer_diameter_m, node_start=s.nodes.start, node_end=s.nodes.stop - 1,
            fittings_K=_segment_K(s, Re[s.nodes]), duty_W=duty, heat_input_W=heat_in,
            heat_loss_W=heat_in - duty, pressure_drop_Pa=float(np.add.reduce(dp_cell[a:b])),
            heater_kind=s.heater_kind, heater_rated_W_per_m=s.heat_input_W_per_m,
            heater_output_W_per_m=heater_seg[s.index] / s.length_m,
            thermostat_duty=duty_seg[s.index], heat_sink_loss_W=sink_seg[s.index],
        ))
    prof = Profile(
        x_m=x, bulk_temperature_K=Tm, inner_wall_temperature_K=t_inner_wall,
        outer_surface_temperature_K=t_surface, pressure_Pa=pn,
        heat_flux_W_per_m2=q_fluid / (math.pi * Dn), heat_to_fluid_W_per_m=q_fluid, heat_loss_W_per_m=q_loss,
        inside_coefficient_W_per_m2K=h_i, reynolds=Re, velocity_m_per_s=velocity, density_kg_per_m3=pr.rho,
        saturation_temperature_K=fluid.saturation_temperature(pn), mach_number=mach,
        heater_output_W_per_m=q_heater,
    )
    return prof, spans


def _at_nodes(cell_values: np.ndarray, line: LineGrid, ni: np.ndarray, ci: np.ndarray) -> np.ndarray:
    """A cell quantity at the profile nodes, second order: the mean of the two cells either side of
    an interior node, extrapolated linearly at a segment's first and last node (values do not cross
    segment boundaries, where the wall model may change)."""
    first = line.seg_first_cell[line.seg_of_cell[ci]]
    last = first + line.cells_per_seg[line.seg_of_cell[ci]] - 1
    up = np.maximum(ni - 1, first)  # the cell upstream of the node, within the segment
    v = 0.5 * (cell_values[..., up] + cell_values[..., np.minimum(ni, last)])
    # segment ends: extrapolate from the two nearest cells (weights by cell centres)
    at_start = ni == first
    at_end = ni > last
    for mask, a, b in ((at_start, first, np.minimum(first + 1, last)), (at_end, last, np.maximum(last - 1, first))):
        if mask.any():
            ia, ib = a[mask], b[mask]
            xa, xb = line.x_mid[..., ia], line.x_mid[..., ib]
            xn = line.x_node[..., ni[mask]]
            with np.errstate(invalid="ignore", divide="ignore"):
                w = np.where(ia != ib, (xn - xa) / (xb - xa), 0.0)
            v[..., mask] = cell_values[..., ia] + w * (cell_values[..., ib] - cell_values[..., ia])
    return v


def _node_sink(r_out, ratio, g_fixed):
    """Heat-sink conductance at the nodes [W/(m·K)]: insulated length scales the node's own outside path."""
    with np.errstate(divide="ignore"):
        g_out = np.where(np.isfinite(r_out) & (r_out > 0.0), 1.0 / r_out, 0.0)
    return g_fixed + ratio * g_out


def _node_heat(q_in, Tm, r_a, r_out, t_inf, g_t, t_t, g_sink=0.0):
    """Heat to the fluid [W/m] and the heated-node temperature [K] at nodes, for given resistances.

    The heated node (pipe outer wall) takes the heat input q_in, loses through R_o (and the heat sinks'
    g_s) to T∞ and gains from steam tracers and self-limiting heaters through 1/g_t from T_t:
    T_h = (q_in + Tm/R_a + (1/R_o + g_s)·T∞ + g_t·T_t)/(1/R_a + 1/R_o + g_s + g_t).
    """
    with np.errstate(divide="ignore"):
        g_out = np.where(np.isinf(r_out), 0.0, 1.0 / r_out)  # inf for a fixed wall (R_o = 0)
    fixed = np.isinf(g_out)
    g_out = g_out + g_sink
    g_a = 1.0 / r_a
    g_sum = g_a + np.where(fixed, 0.0, g_out) + g_t
    t_heated = (q_in + g_a * Tm + np.where(fixed, 0.0, g_out) * t_inf + g_t * t_t) / g_sum
    t_heated = np.where(fixed, t_inf, t_heated)
    q_fluid = (t_heated - Tm) * g_a
    return q_fluid, t_heated


def _segment_K(s: SegmentSetup, re_nodes: np.ndarray) -> float:
    """The segment's fittings K at the mean Reynolds number of its nodes."""
    if not s.fittings:
        return 0.0
    # the mean as ndarray.mean computes it (pairwise sum / count), without its per-call overhead
    return s.fittings_loss.at(float(np.add.reduce(re_nodes)) / re_nodes.size)


def stacked_key_figures(alts: list, fluid, line: LineGrid, state: MarchState) -> list[dict]:
    """The key figures of variants marched together (:mod:`solver.batch`), all at once.

    The same figures, by the same formulas, as :func:`line_result` gives each variant in
    ``Result.key_figures()`` (arrays (V, n) reduced along the line instead of one line at a time);
    no checks, segment spans, methods or resistances. ``fluid`` takes states of any shape.
    """
    T, p, Q_cell, m_dot, h0 = state.T, state.p, state.Q_cell, state.m_dot, state.h_in
    media = (line.kinds == "jacket") | (line.kinds == "fixed_wall")
    tracing_cell = (state.q_heater + state.q_tracer) * line.dx
    media_cell = np.where(media, Q_cell - tracing_cell, 0.0)
    q_loss_cell = np.where(media, 0.0, tracing_cell - Q_cell)
    heat_tracing = np.sum(tracing_cell, axis=-1)
    heat_media = np.sum(media_cell, axis=-1)
    duty = np.sum(Q_cell, axis=-1)
    h_out = fluid.enthalpy(T[:, -1], p[:, -1])
    mdot = m_dot[:, 0]
    potential = mdot * GRAVITY * np.sum(line.dz, axis=-1)
    potential = potential + mdot * (state.kinetic_nodes[:, -1] - state.kinetic_nodes[:, 0])
    res_a = mdot * (state.h_nodes[:, -1] - h0[:, 0]) + potential - duty
    res_b = mdot * (h_out - h0[:, 0]) + potential - duty
    residual = np.where(np.abs(res_b) > np.abs(res_a), res_b, res_a)

    prof, _ = _node_profiles(line, state, fluid, tracing_cell + media_cell, with_spans=False)
    wall, surf, x = prof.inner_wall_temperature_K, prof.outer_surface_temperature_K, prof.x_m
    rows = np.arange(T.shape[0])
    i_wmax, i_wmin = np.argmax(wall, axis=-1), np.argmin(wall, axis=-1)
    i_bmin = np.argmin(T, axis=-1)
    in_air = np.repeat(np.array([s.kind in ("still_air", "wind") for s in line.segments]), line.cells_per_seg + 1)
    if in_air.any():
        i_smax = np.argmax(np.where(in_air, surf, -np.inf), axis=-1)
        i_smin = np.argmin(np.where(in_air, surf, np.inf), axis=-1)
        smax, smax_x = surf[rows, i_smax], x[rows, i_smax]
        smin, smin_x = surf[rows, i_smin], x[rows, i_smin]
    else:
        smax = smax_x = smin = smin_x = np.full(rows.size, math.nan)
    first = line.seg_first_cell
    seg_len = (line.x_node[:, first + line.cells_per_seg] - line.x_node[:, first])
    seg_loss = (np.add.reduceat(tracing_cell + media_cell, first, axis=-1) - np.add.reduceat(Q_cell, first, axis=-1))
    loss_per_m = np.max(seg_loss / seg_len, axis=-1)
    dp = [np.sum(a, axis=-1) for a in (state.dp_friction, state.dp_fittings, state.dp_elevation, state.dp_accel)]
    pump = np.sum(m_dot / state.rho * state.dp_cell, axis=-1)
    residence = np.sum(line.dx / state.velocity, axis=-1)
    v_min, v_max = np.min(state.velocity, axis=-1), np.max(state.velocity, axis=-1)
    re_min, re_max = np.min(state.Re, axis=-1), np.max(state.Re, axis=-1)
    heat_loss = np.sum(q_loss_cell, axis=-1)
    sink_loss = np.sum(state.q_sink * line.dx, axis=-1)
    out = []
    for v, alt in enumerate(alts):
        out.append({
            "outlet_temperature_K": float(T[v, -1]),
            "outlet_pressure_Pa": float(p[v, -1]),
            "pressure_drop_Pa": alt.feed.inlet_pressure_Pa - float(p[v, -1]),
            "pressure_drop_friction_Pa": float(dp[0][v]),
            "pressure_drop_fittings_Pa": float(dp[1][v]),
            "pressure_drop_elevation_Pa": float(dp[2][v]),
            "pressure_drop_acceleration_Pa": float(dp[3][v]),
            "duty_W": float(duty[v]),
            "heat_input_W": float(heat_tracing[v] + heat_media[v]),
            "heat_input_tracing_W": float(heat_tracing[v]),
            "heat_input_media_W": float(heat_media[v]),
            "heat_loss_W": float(heat_loss[v]),
            "heat_sink_loss_W": float(sink_loss[v]),
            "max_heat_loss_per_length_W_per_m": float(loss_per_m[v]),
            "energy_balance_residual_W": float(residual[v]),
            "min_bulk_temperature_K": float(T[v, i_bmin[v]]),
            "min_bulk_position_m": float(line.x_node[v, i_bmin[v]]),
            "max_inner_wall_temperature_K": float(wall[v, i_wmax[v]]),
            "max_inner_wall_position_m": float(x[v, i_wmax[v]]),
            "min_inner_wall_temperature_K": float(wall[v, i_wmin[v]]),
            "min_inner_wall_position_m": float(x[v, i_wmin[v]]),
            "max_outer_surface_temperature_K": float(smax[v]),
            "max_outer_surface_position_m": float(smax_x[v]),
            "min_outer_surface_temperature_K": float(smin[v]),
            "min_outer_surface_position_m": float(smin_x[v]),
            "pump_power_W": float(pump[v]),
            "residence_time_s": float(residence[v]),
            "min_velocity_m_per_s": float(v_min[v]),
            "max_velocity_m_per_s": float(v_max[v]),
            "min_reynolds": float(re_min[v]),
            "max_reynolds": float(re_max[v]),
            "mass_flow_kg_per_s": float(mdot[v]),
            "inlet_temperature_K": alt.feed.inlet_temperature_K,
            "inlet_pressure_Pa": alt.feed.inlet_pressure_Pa,
        })
    return out
