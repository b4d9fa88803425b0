"""The line solver: march bulk enthalpy and pressure along the segments in series.

Model (DESIGN §3). At each position the fluid at bulk temperature Tm exchanges
heat through the inside film and the pipe wall with the *heated node*, the outer
surface of the pipe wall, where tracing heat (W/m) enters. From there a path of
resistances (insulation layers, outer film or soil) leads to the surroundings at
T∞. Per unit length, with R_a = R_in + R_wall and R_o the outside path:

    q'_fluid = q'_in (1 − R_a U') + U' (T∞ − Tm),      U' = 1 / (R_a + R_o)

Uniform heat flux is U' = 0; a fixed wall temperature is R_o = 0; adiabatic is
q'_in = 0 and U' = 0. Within a cell the coefficients are constant and the bulk
temperature follows the exact exponential of ``m cp dTm/dx = q'_fluid(Tm)``, so
coarse cells stay stable. The heat of each cell is added to the total energy
of the flow, ``h_{i+1} + v_{i+1}²/2 + g z_{i+1} = h_i + v_i²/2 + g z_i + Q_i / m``
(v from the node density), and temperature follows from (h, p): the energy
balance closes to round-off by construction, and a fast gas cools as it speeds up.

A gas line whose flow reaches the speed of sound has no steady march: the solve
stops with where it chokes and the largest flow the line passes
(:mod:`solver.choking`). A liquid whose pressure or temperature reaches its
boiling point stops with where and why (flashing or boiling); a feed at its
boiling point, or in the other phase than the Feed says, is refused.

Properties, film coefficients and pressure are evaluated vectorised over all
cells at once, at cell means, and iterated to a fixed point; only the linear
bulk-temperature recurrence runs cell by cell.

The line in cells comes from :mod:`solver.line`, the film coefficients from :mod:`solver.films`;
the converged state (:class:`solver.state.MarchState`) goes on to :mod:`solver.profiles`, which
builds the Result, and to :mod:`solver.checks`.
What every solve assumes is listed in ``solver.results.ASSUMPTIONS``.
"""

from __future__ import annotations

import math
import re

import numpy as np

from solver import choking, correlations, insulation
from solver._numeric import clip as _clip
from solver.errors import CalorunError, InputError, PropertyRangeError, SolverError
from solver.factors import NEUTRAL, MethodFactors
from solver.films import AirAtOneAtmosphere, air_film_parts, condensate_resistance, inside_nusselt_mean
from solver.line import GRAVITY, LineGrid, build_line
from solver.choking import Stretch
from solver.model import Alternative, DesignCases
from solver.profiles import line_result
from solver.properties import PureFluidModel, fluid_model, state_phase
from solver.results import Result, check_sort_key
from solver.state import MarchState


# --------------------------------------------------------------------------- solve


def solve(
    alternative: Alternative,
    *,
    refine: float = 1.0,
    cells_per_segment: int | None = None,
    max_iterations: int = 60,
    tolerance_K: float = 1e-3,
    factors: MethodFactors | None = None,
    design: DesignCases | None = None,
) -> Result:
    """Solve one alternative and return its :class:`~solver.results.Result`.

    ``refine`` scales the automatic cell counts (2.0 doubles them: the grid
    check); ``cells_per_segment`` fixes them. ``factors`` scales the methods' results (the
    uncertainty bands; None = every method as published). ``design`` (the project's design cases)
    also evaluates the worst and hot cases, the tracing need and the hold time into
    ``result.design`` (:class:`solver.design_cases.DesignResult`; None when not asked). Raises only
    :class:`~solver.errors.CalorunError` subclasses.
    """
    try:
        result = _solve(alternative, refine, cells_per_segment, max_iterations, tolerance_K, factors or NEUTRAL,
                        design.design_margin if design is not None else None)
        if design is not None:
            from solver import design_cases  # only when asked: a plain solve does not load it

            result.design = design_cases.evaluate(alternative, result, design, solve=solve)
            result.checks = sorted([*result.checks, *design_cases.design_checks(alternative, result.design, result)],
                                   key=check_sort_key)
        return result
    except PropertyRangeError as exc:
        raise _property_error(alternative, None, exc, None, None) from None
    except correlations.CorrelationInputError as exc:
        # a correlation handed a value no physical state gives: the inputs are beyond what the methods take
        raise SolverError(_breakdown_words(exc.field), alternative=alternative.name) from None
    except InputError as exc:
        raise _located_input_error(alternative, exc) from None
    except CalorunError:
        raise
    except (FloatingPointError, ZeroDivisionError, OverflowError):  # defensive: never a raw traceback
        raise SolverError(_breakdown_words(None), alternative=alternative.name) from None


#: What the correlations call their inputs, in words for a user.
_QUANTITY_WORDS = {"Re": "Reynolds number", "Pr": "Prandtl number", "relative_roughness": "relative roughness",
                   "D": "bore", "L": "length", "x": "position", "mu": "viscosity", "k": "conductivity"}


def _breakdown_words(name: str | None) -> str:
    what = f"the {_QUANTITY_WORDS.get(name, name)} comes out without a finite value" if name else \
        "a value grows beyond what the computer's numbers can hold"
    return (f"the solution breaks down numerically ({what}). This comes from inputs far outside the usual range: "
            "check the lengths, bores, insulation thicknesses, flows, heat inputs and temperatures.")


def _breakdown_error(alt: Alternative, line: LineGrid, name: str | None, T_nodes, p_nodes) -> SolverError:
    """A numerical breakdown, located at the first node whose state or cell whose geometry is not a finite
    positive number, when there is one."""
    message = _breakdown_words(name)
    bad_node = None
    if T_nodes is not None and p_nodes is not None:
        bad = ~(np.isfinite(T_nodes) & np.isfinite(p_nodes) & (p_nodes > 0.0))
        if bad.any():
            bad_node = int(np.argmax(bad))
    if bad_node is None:
        cells = ~(np.isfinite(line.dx) & np.isfinite(line.D) & (line.D > 0.0) & np.isfinite(line.r_wall))
        if cells.any():
            bad_node = int(np.argmax(cells))
    if bad_node is None:
        return SolverError(message, alternative=alt.name)
    seg = line.segment_at(bad_node)
    return SolverError(message, alternative=alt.name, segment=seg.name, x_m=float(line.x_node[bad_node]))


def _property_error(alt: Alternative, line: LineGrid | None, exc: PropertyRangeError, T_nodes, p_nodes) -> SolverError:
    """A state outside the fluid's property data, in plain words, located at the node of the march pass
    that reached it when it is one of them."""
    state = []
    t, p = exc.temperature_K, exc.pressure_Pa
    if t is not None and math.isfinite(t):
        state.append(f"{t - 273.15:.1f} °C")
    if p is not None and math.isfinite(p):
        state.append(f"{p / 1e5:.4g} bar(a)")
    reason = exc.reason.split(" (")[0] if "CoolProp" in exc.reason else exc.reason  # never the library's text
    message = (f"the fluid reaches a state its property data do not cover"
               f"{' (' + ', '.join(state) + ')' if state else ''}: {exc.fluid}, {reason}.")
    err = SolverError(message, alternative=alt.name)
    feed = alt.feed
    if p == feed.inlet_pressure_Pa and (t is None or not math.isfinite(t) or t == feed.inlet_temperature_K):
        # the feed itself (checked before any march): that is where it is
        return SolverError(f"at the inlet, {message}", alternative=alt.name)
    if line is not None and T_nodes is not None and p is not None and math.isfinite(p):
        hit = np.flatnonzero(p_nodes == p)
        if t is not None and hit.size > 1:
            hit = hit[np.argsort(np.abs(T_nodes[hit] - t), kind="stable")]
        if hit.size:
            i = int(hit[0])
            seg = line.segment_at(i)
            err = SolverError(message, alternative=alt.name, segment=seg.name, x_m=float(line.x_node[i]))
    return err


def _located_input_error(alt: Alternative, exc: InputError) -> InputError:
    """Say which alternative and segment (by number from 1 and by name) an input problem is in."""
    where = f"alternative {alt.name!r}"
    m = re.match(r"segments\[(\d+)\]", exc.field)
    if m and int(m.group(1)) < len(alt.segments):
        k = int(m.group(1))
        where += f", segment {k + 1} {alt.segments[k].name!r}"
    located = InputError(exc.field, exc.value, exc.reason)
    located.args = (f"{where}: {_input_words(exc)}",)
    located.alternative = alt.name
    return located


#: unit suffixes of the model's keys, longest first, and how a user writes the unit
_KEY_UNITS = (("_m2K_per_W", "m²·K/W"), ("_W_per_mK", "W/(m·K)"), ("_W_per_m", "W/m"), ("_kg_per_s", "kg/s"),
              ("_m3_per_s", "m³/s"), ("_m_per_s", "m/s"), ("_Pa", "Pa"), ("_K", "K"), ("_m", "m"))


def _input_words(exc: InputError) -> str:
    """An input problem in words: 'surroundings depth: <reason>, got 0.3347 m', not the file key and a raw float."""
    parts = [p for p in re.split(r"\.|\[\d+\]", exc.field) if p and p not in ("segments", "alternatives")]
    if not parts:
        return str(exc)
    name, unit = parts[-1], ""
    for suffix, text in _KEY_UNITS:
        if name.endswith(suffix):
            name, unit = name[: -len(suffix)], text
            break
    owner = parts[-2].replace("_", " ") + " " if len(parts) > 1 else ""
    value = exc.value
    if isinstance(value, float):
        value = f"{value:.4g}" + (f" {unit}" if unit else "")
    else:
        value = repr(value)
    return f"{owner}{name.replace('_', ' ')}: {exc.reason}, got {value}"


def _solve(alt: Alternative, refine: float, cells_per_segment, max_iterations: int, tol: float,
           factors: MethodFactors, margin: float | None = None) -> Result:
    fluid = fluid_model(alt.fluid)
    feed = alt.feed
    t_in = feed.inlet_temperature_K
    p_in = feed.inlet_pressure_Pa
    _check_state_in_range(fluid, t_in, alt.name)
    _check_liquid_model(fluid, p_in, alt.name)
    _check_feed_phase(alt, fluid)
    props_in = fluid.props(np.array([t_in]), np.array([p_in]))
    if feed.mass_flow_kg_per_s is not None:
        m_dot = feed.mass_flow_kg_per_s
    else:
        m_dot = feed.volume_flow_m3_per_s * float(props_in.rho[0])
    line = build_line(alt, refine, cells_per_segment, factors)
    seen: dict = {}
    try:
        state = _march(alt, fluid, line, m_dot, float(props_in.h[0]), max_iterations, tol, factors, seen)
    except PropertyRangeError as exc:
        raise _property_error(alt, line, exc, seen.get("T"), seen.get("p")) from None
    except correlations.CorrelationInputError as exc:
        raise _breakdown_error(alt, line, exc.field, seen.get("T"), seen.get("p")) from None
    return line_result(alt, fluid, line, state, margin)  # the project's margin for the no-flow checks' advice


def _march(alt: Alternative, fluid, line: LineGrid, m_dot: float, h0: float, max_iterations: int,
           tol: float, factors: MethodFactors = NEUTRAL, seen: dict | None = None, feed=None) -> MarchState:
    """Iterate properties, film coefficients, heat and pressure over all cells to a fixed point.

    The fixed point is reached when, between two passes, no bulk, inner-wall, outer-surface or
    heated-wall temperature moves by ``tol`` or more and no pressure by ``tol`` × 1 bar or more:
    every reported temperature has settled, not only the bulk.

    ``feed`` = (inlet temperatures, inlet pressures), each shape (V, 1), marches V variants at once
    (:mod:`solver.batch`): ``line`` is then stacked (cell arrays (V, n)), ``m_dot`` and ``h0`` are (V, 1),
    and each variant's state is kept from the pass where it alone would have stopped, so it is the state a
    solve of that variant on its own reaches. A stacked march raises on any failure; the caller then
    solves the variants one by one, which says what failed where.
    """
    batch = feed is not None  # variants stacked along a first axis (solver.batch); 1-D arrays otherwise
    if batch:
        t_in, p_in = feed  # per variant, shape (V, 1)
    else:
        t_in = alt.feed.inlet_temperature_K
        p_in = alt.feed.inlet_pressure_Pa
    n = line.n
    dx, D, area, rel_rough = line.dx, line.D, line.area, line.rel_rough
    cells = np.zeros_like(dx)  # the shape of a cell array (V, n) or (n,)
    t_inf, dz, film_mask, cond_mask = line.t_inf, line.dz, line.film_mask, line.cond_mask
    air = AirAtOneAtmosphere.get() if film_mask.any() else None
    any_cond = bool(cond_mask.any())
    x0_over_d, x1_over_d = line.x0_entry / D, line.x1_entry / D

    nodes = np.zeros(cells.shape[:-1] + (n + 1,))
    T = nodes + t_in
    p = nodes + p_in
    t_in_cells = cells + t_in
    T_surface = np.where(np.isfinite(t_inf), 0.5 * (t_in_cells + np.where(np.isfinite(t_inf), t_inf, t_in_cells)),
                         t_in_cells)
    T_wall = t_in_cells.copy()  # inner wall (the surface the fluid touches), cell means
    T_heated = t_in_cells.copy()  # outer surface of the pipe wall (where tracing heat enters), cell means
    if any_cond:
        T_heated[cond_mask] = 0.5 * (t_in_cells[cond_mask] + t_inf[cond_mask])
    e_corr = np.zeros_like(cells)  # temperature change not explained by Q / (m cp): pressure effect, cp curvature
    t_lo, t_hi = fluid.T_min_K, fluid.T_max_K
    t_inf_eff = np.nan_to_num(t_inf, nan=0.0)
    r_ins_film = line.r_ins[film_mask]
    d_film = line.d_outer[film_mask]
    area_film = math.pi * d_film
    vertical_film = line.vertical_length[film_mask]
    vertical_kw = {"vertical_length": vertical_film} if vertical_film.any() else {}
    converged = False
    last_change = math.inf
    h_target = None  # enthalpy at the nodes from the last pass (None before the first)
    Q_cell = None  # heat to the fluid per cell from the last pass
    last_step = math.inf
    strikes = 0
    if batch:  # every variant on the same side of saturation (solver.batch groups them so)
        liquid_feed, gas_feed = feed_sides(fluid, float(t_in.flat[0]), float(p_in.flat[0]))
        p_in_max = float(np.max(p_in))
    else:
        liquid_feed, gas_feed = feed_sides(fluid, t_in, p_in)
        p_in_max = p_in
    tsat_nodes = None
    mach_peak = 0.0
    choke_strikes = 0
    p_floor = float(getattr(fluid, "p_min_Pa", 0.0))  # the property data end here (CoolProp grid: 1 kPa)
    sat_possible = isinstance(fluid, PureFluidModel) and bool(
        np.isfinite(fluid.saturation_temperature(np.array([p_in_max, max(p_in_max * 0.5, 2e3)]))).any())
    h_conv = h_rad = np.zeros(0)
    r_cond = np.full_like(cells, np.nan)
    wall_factor = np.ones_like(cells)
    wall_groups = None
    g_tracer = g_tracer_pass = line.g_tracer
    heaters = _HeaterState(line, t_in, air, factors)
    kept = _Kept(batch)  # each variant's state from the pass where it stopped
    kt_insulation = insulation.any_on_line(line)
    first_pass = True
    if air is not None:
        # a first surface temperature from the surface balance with the wall at the inlet temperature:
        # a halfway guess leaves the surface tens of kelvin out and costs two more passes
        t_in_film = t_in_cells[film_mask]
        for _ in range(3):
            h_conv, h_rad = air_film_parts(air, T_surface[film_mask], t_inf[film_mask], d_film,
                                           line.wind_speed[film_mask], line.emissivity[film_mask], factors,
                                           **vertical_kw)
            T_surface[film_mask] = _surface_temperature(t_in_film, t_inf[film_mask], r_ins_film, d_film, h_conv + h_rad)
    if seen is None:
        seen = {}
    for _ in range(max_iterations):
        seen["T"], seen["p"] = T, p  # the pass's states, to locate a property failure
        # properties at the nodes; cell values are the means of their two nodes (second order)
        T_eval = _clip(T, t_lo, t_hi)
        if sat_possible:
            # keep property look-ups on the feed's side of saturation while a pass overshoots
            if tsat_nodes is None:
                tsat_nodes = fluid.saturation_temperature(p)
            ok = np.isfinite(tsat_nodes)
            if liquid_feed:
                T_eval = np.where(ok, np.minimum(T_eval, tsat_nodes - 0.05), T_eval)
            else:
                T_eval = np.where(ok, np.maximum(T_eval, tsat_nodes + 0.05), T_eval)
        pn = fluid.props(T_eval, p)
        if h_target is not None:
            # temperature from (h, p): a Newton step on h(T, p) = h_target; the part of the temperature
            # change not explained by Q/(m cp) (pressure effect, cp curvature) feeds the recurrence
            T_true = T + (h_target - pn.h) / pn.cp
            change = np.maximum(np.max(np.abs(T_true - T), axis=-1), last_step)
            stops = (change < tol) & ~kept.done
            if np.any(stops):
                # one more Newton step on h(T, p) = h_target so the reported temperatures agree with
                # the enthalpy balance to round-off, not just to the iteration tolerance
                pt = fluid.props(np.clip(T_true, t_lo, t_hi), p)
                T_final = T_true + (h_target - pt.h) / pt.cp
                T_final = _exact_where_newton_misses(fluid, T_final, h_target, p, t_lo, t_hi)
                if p.max() > p_in_max:  # downhill the pressure rises: the table's enthalpy must still rise with T
                    _check_liquid_model(fluid, float(p.max()), alt.name, "at the highest line pressure,")
                kept.take(stops, T=T_final, p=p, h_nodes=h_nodes, ke_nodes=ke_nodes, Q_cell=Q_cell,
                          T_surface=T_surface, r_out_total=r_out_total, Re=Re, Pr=Pr, velocity=velocity, rho=rho,
                          dp_friction=dp_friction, dp_fittings=dp_fittings, dp_elevation=dp_elevation,
                          dp_accel=dp_accel, r_in=r_in, wall_factor=wall_factor, h_conv=_on_cells(h_conv, film_mask),
                          h_rad=_on_cells(h_rad, film_mask), r_cond=r_cond, g_tracer_pass=g_tracer_pass,
                          T_heated=T_heated, T_wall=T_wall, g_heater=heaters.g_heater, g_sink=heaters.g_sink,
                          g_sink_fixed=heaters.g_sink_fixed, q_fixed=heaters.q_fixed,
                          **({"wall_" + k: v for k, v in wall_groups.items()} if wall_groups else {}))
                if kept.done.all():
                    converged = True
                    break
            last_change = float(np.max(change))
        rho = 0.5 * (pn.rho[..., :-1] + pn.rho[..., 1:])
        cp = 0.5 * (pn.cp[..., :-1] + pn.cp[..., 1:])
        if h_target is not None:
            # with this pass's cp, the recurrence reproduces T_true from last pass's heat
            e_corr = np.diff(T_true) - Q_cell / (m_dot * cp)
        mu = np.sqrt(pn.mu[..., :-1] * pn.mu[..., 1:])  # viscosity varies exponentially with T
        k = 0.5 * (pn.k[..., :-1] + pn.k[..., 1:])
        velocity = m_dot / (rho * area)
        Re = m_dot * D / (area * mu)
        Pr = cp * mu / k
        f = correlations.friction_factor(Re, rel_rough)
        # cell means of the inside coefficient over each cell's stretch of its entry length
        Nu = inside_nusselt_mean(Re, Pr, f, x0_over_d, x1_over_d, line.boundary, rel_rough, line.developing)
        if not first_pass:
            wall_factor, wall_groups = _wall_property_factor(fluid, Re, Pr, mu, T, T_wall, p, t_lo, t_hi, liquid_feed,
                                                             tsat_nodes if sat_possible else None)
        h_inside = Nu * wall_factor * (k / D) * factors.inside_film
        r_in = 1.0 / (h_inside * math.pi * D)
        r_a = r_in + line.r_foul + line.r_wall

        insulation_step = 0.0
        if kt_insulation and not first_pass:
            # insulation with the catalogue k(T): at the last pass's pipe-wall and surface temperatures
            insulation_step = insulation.update_line(line, T_heated, r_out_total, factors.insulation_conductivity)
            r_ins_film = line.r_ins[film_mask]
        # outside path; the air film and the condensate film depend on temperatures (iterated with the rest)
        r_out_total = line.r_fixed_out.copy()
        if air is not None:
            h_conv, h_rad = air_film_parts(air, T_surface[film_mask], t_inf[film_mask], d_film,
                                           line.wind_speed[film_mask], line.emissivity[film_mask], factors,
                                           **vertical_kw)
            r_out_total[film_mask] = r_ins_film + 1.0 / ((h_conv + h_rad) * area_film)
        if any_cond:
            r_cond = np.full_like(cells, np.nan)
            r_cond[cond_mask] = condensate_resistance(line.steam_pressure[cond_mask], line.d_pipe_outer[cond_mask],
                                                      line.r_steam_foul[cond_mask], T_heated[cond_mask], factors)
            r_out_total[cond_mask] = r_cond[cond_mask]
        g_tracer_pass = g_tracer
        # heaters and heat sinks at this pass's temperatures: a self-limiting heater joins the steam tracers'
        # path (conductance s to T0), heat sinks the outside path; thermostats set their duty within the pass
        T_new, Q_cell, tm_cell = heaters.heat_pass(line, r_a, r_out_total, m_dot * cp, e_corr, t_in, t_inf_eff,
                                                   g_tracer, T_heated)
        # energy: d(h + v²/2 + g z) = dQ / m, so a liquid running downhill does not seem to cool and a fast
        # gas cools as it accelerates. The kinetic energy at a node is that of the cell upstream of it
        # (the first cell at the inlet), so a change of bore takes its kinetic energy in the new segment's
        # first cell and the sum telescopes to the outlet's v²/2 − the inlet's.
        ke_nodes = _kinetic_energy(m_dot, area, pn.rho)
        h_nodes = np.empty_like(nodes)
        h_nodes[..., :1] = h0
        np.cumsum(Q_cell / m_dot - GRAVITY * dz - (ke_nodes[..., 1:] - ke_nodes[..., :-1]), axis=-1,
                  out=h_nodes[..., 1:])
        h_nodes[..., 1:] += h0

        # pressure: friction + fittings + elevation + acceleration (density from the previous iterate)
        dp_parts = _pressure_drops(line, fluid, m_dot, T, p, rho, velocity, Re, f * factors.friction)
        dp_friction, dp_fittings, dp_elevation, dp_accel = dp_parts
        dp_cell = dp_friction + dp_fittings + dp_elevation + dp_accel
        p_new = np.empty_like(nodes)
        p_new[..., :1] = p_in
        np.cumsum(dp_cell, axis=-1, out=p_new[..., 1:])
        p_new[..., 1:] = p_in - p_new[..., 1:]
        if np.any(p_new <= p_floor):
            if batch:  # which variant and where: the one-by-one solves say it
                raise SolverError("a variant runs out of pressure", alternative=alt.name)
            # no pressure left: a gas has choked, a liquid with a boiling point has flashed on the way
            raise _pressure_failure(alt, fluid, line, m_dot, T_new, p_new, p_floor, liquid_feed, sat_possible)
        if gas_feed and not batch:  # (solver.batch marches only liquids together)
            # the speed of sound only where the flow is fast enough to matter (no offered gas is below
            # about 200 m/s, so under 50 m/s the Mach number stays below 0.25)
            v_nodes = np.sqrt(2.0 * ke_nodes)
            if v_nodes.max() > 50.0:
                sound = fluid.speed_of_sound(T_eval, p)
                if sound is not None:
                    mach_peak = float(np.max(v_nodes / sound))
                    if mach_peak >= 1.0:
                        choke_strikes += 1
                        if choke_strikes >= 2:  # two passes in a row: the flow has choked, not a transient
                            raise _choked(alt, fluid, line, m_dot, int(np.argmax(v_nodes / sound >= 1.0)))
                    else:
                        choke_strikes = 0

        # the wall temperatures of this pass: inner wall (fluid side) and the heated node
        q_fluid = Q_cell / dx
        T_wall_new = tm_cell + q_fluid * r_in
        T_heated_new = tm_cell + q_fluid * r_a
        wall_step = np.max(np.abs(T_wall_new - T_wall), axis=-1)
        if any_cond:
            wall_step = np.maximum(wall_step, _row_max(np.abs(T_heated_new - T_heated), cond_mask))
        if heaters.follows_wall:
            # a self-limiting heater's output, a thermostat's duty and a bare heat sink's film follow the pipe wall
            wall_step = np.maximum(wall_step, np.max(np.abs(T_heated_new - T_heated), axis=-1))
        T_wall, T_heated = T_wall_new, T_heated_new
        if line.any_tracer:
            # a steam tracer only heats: where the pipe is at or above its steam temperature it gives nothing
            g_tracer = np.where(T_heated < line.t_tracer, line.g_tracer, 0.0)
        # outer surface temperature for the film coefficient: the surface balance closed per cell
        surface_step = 0.0
        if air is not None:
            t_surf_new = _surface_temperature(T_heated[film_mask], t_inf[film_mask], r_ins_film, d_film, h_conv + h_rad)
            surface_step = _row_max(np.abs(_on_cells(t_surf_new, film_mask) - T_surface), film_mask)
            T_surface[film_mask] = t_surf_new
        last_step = np.maximum.reduce([np.max(np.abs(T_new - T), axis=-1), np.max(np.abs(p_new - p), axis=-1) * 1e-5,
                                       wall_step, np.broadcast_to(surface_step, np.shape(wall_step)),
                                       np.broadcast_to(insulation_step, np.shape(wall_step))])
        first_pass = False
        # a phase change or a state beyond the fluid data on two passes in a row is real, not a transient
        tsat_nodes = fluid.saturation_temperature(p_new) if sat_possible else None
        if batch:
            # any variant leaving single-phase flow or the fluid data: the caller solves them one by one,
            # which tells a transient from a real stop and says where
            if _any_phase_or_range_problem(T_new, t_lo, t_hi, liquid_feed, tsat_nodes):
                raise SolverError("a variant leaves single-phase flow or the fluid data", alternative=alt.name)
        problem = None if batch else _phase_or_range_problem(fluid, T_new, p_new, t_lo, t_hi, liquid_feed,
                                                             tsat_nodes)
        if problem is not None:
            strikes += 1
            if strikes >= 2:
                i_bad, message = problem
                if message == "boiling":
                    raise _boiling_error(alt, fluid, line, m_dot, T_new, p_new, tsat_nodes, i_bad)
                raise SolverError(message, alternative=alt.name, segment=line.segment_at(i_bad).name,
                                  x_m=float(line.x_node[i_bad]))
        else:
            strikes = 0
        T = _clip(T_new, t_lo - 50.0, t_hi + 50.0)
        T_surface = np.maximum(T_surface, 1.0)
        p = p_new
        h_target = h_nodes

    if not converged:
        if batch:
            raise SolverError("the variants marched together did not all settle", alternative=alt.name)
        if gas_feed and mach_peak > 0.8:
            raise _choked(alt, fluid, line, m_dot, None)
        raise SolverError(
            f"the march did not settle (last change {last_change:.2g} K after {max_iterations} passes); "
            "the flow may be near choking or the line near a phase change",
            alternative=alt.name,
        )
    # the kept state replaces the last pass's: each variant's own stopping pass
    T, p, h_nodes, ke_nodes, Q_cell = kept["T"], kept["p"], kept["h_nodes"], kept["ke_nodes"], kept["Q_cell"]
    T_surface, r_out_total, Re, Pr = kept["T_surface"], kept["r_out_total"], kept["Re"], kept["Pr"]
    velocity, rho, r_in, wall_factor = kept["velocity"], kept["rho"], kept["r_in"], kept["wall_factor"]
    dp_friction, dp_fittings = kept["dp_friction"], kept["dp_fittings"]
    dp_elevation, dp_accel = kept["dp_elevation"], kept["dp_accel"]
    r_cond, g_tracer_pass, T_heated, T_wall = kept["r_cond"], kept["g_tracer_pass"], kept["T_heated"], kept["T_wall"]
    heaters.g_heater, heaters.g_sink = kept["g_heater"], kept["g_sink"]
    heaters.g_sink_fixed, heaters.q_fixed = kept["g_sink_fixed"], kept["q_fixed"]
    if wall_groups:
        wall_groups = {k: kept["wall_" + k] for k in wall_groups}
    if np.any(T < t_lo) or np.any(T > t_hi):
        if batch:
            raise SolverError("a variant leaves the range of the fluid data", alternative=alt.name)
        i_bad = int(np.argmax((T < t_lo) | (T > t_hi)))
        raise SolverError(
            f"bulk temperature leaves the range of the fluid data ({t_lo - 273.15:.1f} to {t_hi - 273.15:.1f} °C) "
            f"at {T[i_bad] - 273.15:.1f} °C",
            alternative=alt.name, segment=line.segment_at(i_bad).name, x_m=float(line.x_node[i_bad]),
        )
    h_conv_out, h_rad_out = kept["h_conv"], kept["h_rad"]
    q_tracer = g_tracer_pass * (line.t_tracer - T_heated) if line.any_tracer else np.zeros_like(cells)
    q_heater, q_sink = heaters.delivered(line, T_heated)
    if batch:
        return MarchState(
            m_dot=m_dot, h_in=h0, T=T, p=p, h_nodes=h_nodes, kinetic_nodes=ke_nodes, Q_cell=Q_cell,
            T_surface=T_surface, r_out_total=r_out_total, Re=Re, Pr=Pr, velocity=velocity, rho=rho,
            dp_friction=dp_friction, dp_fittings=dp_fittings, dp_elevation=dp_elevation, dp_accel=dp_accel, air=air,
            r_in=r_in, wall_factor=wall_factor, h_conv_out=h_conv_out, h_rad_out=h_rad_out, r_cond=r_cond,
            q_tracer=q_tracer, T_heated=T_heated, T_wall=T_wall, factors=factors, gas=bool(fluid.compressible),
            wall_groups=wall_groups, g_tracer=g_tracer_pass, q_heater=q_heater, g_heater=heaters.g_heater,
            duty=np.full(cells.shape[:-1] + (len(line.segments),), np.nan), g_sink=heaters.g_sink,
            g_sink_fixed=heaters.g_sink_fixed, q_sink=q_sink)
    if kt_insulation:  # each k(T) layer at the solved temperatures, for the heat path; refused beyond its rating
        insulation.finish_line(line, T_heated, r_out_total, factors.insulation_conductivity)
    return MarchState(
        m_dot=m_dot, h_in=h0, T=T, p=p, h_nodes=h_nodes, kinetic_nodes=ke_nodes, Q_cell=Q_cell, T_surface=T_surface,
        r_out_total=r_out_total, Re=Re, Pr=Pr, velocity=velocity, rho=rho,
        dp_friction=dp_friction, dp_fittings=dp_fittings, dp_elevation=dp_elevation, dp_accel=dp_accel, air=air,
        r_in=r_in, wall_factor=wall_factor, h_conv_out=h_conv_out, h_rad_out=h_rad_out, r_cond=r_cond,
        q_tracer=q_tracer, T_heated=T_heated, T_wall=T_wall, factors=factors, gas=bool(fluid.compressible),
        wall_groups=wall_groups, g_tracer=g_tracer_pass,
        q_heater=q_heater, g_heater=heaters.g_heater, duty=heaters.duty_per_segment(len(line.segments)),
        g_sink=heaters.g_sink, g_sink_fixed=heaters.g_sink_fixed, q_sink=q_sink,
    )


# --------------------------------------------------------------------------- pieces


def feed_sides(fluid, t_in: float, p_in: float) -> tuple[bool, bool]:
    """(liquid feed, gas feed): which side of saturation the feed is on, as the march treats it."""
    tsat_in = float(fluid.saturation_temperature(np.array([p_in]))[0])
    liquid_feed = bool(math.isfinite(tsat_in) and t_in < tsat_in)
    gas_feed = bool(fluid.compressible and not liquid_feed) or bool(
        isinstance(fluid, PureFluidModel) and math.isfinite(tsat_in) and t_in > tsat_in)
    return liquid_feed, gas_feed


class _Kept:
    """The state each variant had on the pass where it stopped (one variant: the whole state, once)."""

    def __init__(self, batch: bool):
        self.batch = batch
        self.done = np.bool_(False)  # (an array per variant once the first stops)
        self.store: dict = {}

    def take(self, rows, **arrays) -> None:
        if not self.batch:
            self.store = {k: v.copy() for k, v in arrays.items()}
            self.done = np.bool_(True)
            return
        if np.ndim(self.done) == 0:
            self.done = np.zeros(rows.shape, dtype=bool)
        for k, v in arrays.items():
            if k not in self.store:
                self.store[k] = np.array(v, copy=True)
            else:
                self.store[k][rows] = v[rows]
        self.done = self.done | rows

    def __getitem__(self, key):
        return self.store[key]


def _on_cells(values: np.ndarray, mask: np.ndarray) -> np.ndarray:
    """Values given where ``mask`` is set, spread onto the cells (NaN elsewhere)."""
    out = np.full(mask.shape, np.nan)
    out[mask] = values
    return out


def _row_max(values: np.ndarray, mask: np.ndarray):
    """The largest of ``values`` (>= 0) where ``mask`` is set, per variant (0 where none is)."""
    return np.max(np.where(mask, values, 0.0), axis=-1)


def _any_phase_or_range_problem(T, t_lo, t_hi, liquid_feed, tsat) -> bool:
    """Whether any node has left single-phase flow or the fluid data (see _phase_or_range_problem)."""
    bad = (T < t_lo) | (T > t_hi)
    if tsat is not None:
        finite = np.isfinite(tsat)
        bad |= finite & ((T >= tsat) if liquid_feed else (T <= tsat))
    return bool(bad.any())


def _wall_property_factor(fluid, Re, Pr, mu, T_nodes, T_wall, p_nodes, t_lo, t_hi, liquid_feed, tsat_nodes):
    """The property-ratio factor on the inside coefficient per cell, from the last pass's inner wall,
    and the ratios it was formed from (for the validity check)."""
    T_bulk = 0.5 * (T_nodes[..., :-1] + T_nodes[..., 1:])
    if fluid.compressible:
        groups = {"T_ratio": T_bulk / T_wall}
        return correlations.wall_property_factor(Re, None, None, None, None, T_bulk, T_wall, True), groups
    p_cell = 0.5 * (p_nodes[..., :-1] + p_nodes[..., 1:])
    t_eval = _clip(T_wall, t_lo, t_hi)
    if tsat_nodes is not None and liquid_feed:
        # a wall above boiling is flagged by the checks; its properties are taken just below it
        tsat_cell = np.minimum(tsat_nodes[..., :-1], tsat_nodes[..., 1:])
        t_eval = np.where(np.isfinite(tsat_cell), np.minimum(t_eval, tsat_cell - 0.05), t_eval)
    pw = fluid.props(t_eval, p_cell)
    pr_wall = pw.cp * pw.mu / pw.k
    groups = {"mu_ratio": mu / pw.mu, "Pr_ratio": Pr / pr_wall}
    return correlations.wall_property_factor(Re, Pr, pr_wall, mu, pw.mu, T_bulk, T_wall, False), groups


def _exact_where_newton_misses(fluid, T, h_target, p, t_lo, t_hi):
    """The node temperatures whose enthalpy is the balance's, to round-off.

    The last Newton step (with cp as the slope) leaves h(T, p) a fraction of a J/kg from the balance
    where cp or the density of a table fluid changes steeply within a step (found by the solver fuzz:
    residuals of 0.1–5 J/kg on an adiabatic line). There, Newton steps with the slope of h itself
    (central difference) continue from the march's own temperature: a local root, on the branch the
    march followed (a global inverse could land on another temperature with the same enthalpy).
    """
    inside = (T >= t_lo) & (T <= t_hi)
    if not inside.all():
        return T  # reported as leaving the fluid data's range by the caller
    tol = 1e-11 * np.maximum(np.abs(h_target), 1e4)
    T = T.copy()
    for _ in range(20):
        miss = np.abs(fluid.enthalpy(T, p) - h_target) > tol
        if not miss.any():
            break
        t, pm, ht = T[miss], p[miss], h_target[miss]
        eps = np.maximum(1e-4, 1e-7 * t)
        lo, hi = np.maximum(t - eps, t_lo), np.minimum(t + eps, t_hi)
        slope = (fluid.enthalpy(hi, pm) - fluid.enthalpy(lo, pm)) / (hi - lo)
        if not np.all(slope > 0.0):
            break  # h does not rise with T here: the checks and the liquid-model test judge such a fluid
        T[miss] = np.clip(t + (ht - fluid.enthalpy(t, pm)) / slope, t_lo, t_hi)
    return T


def _surface_temperature(t_heated, t_inf, r_ins, d_out, h_film):
    """Outer surface temperature in air, with the surface balance closed at the pass's heated-wall temperature.

    At the surface, heat conducted through the insulation equals the heat the air film carries away:
    (T_h − T_s)/R_ins = h·π·D·(T_s − T∞), with h the film coefficient at the last surface temperature
    (the pass's own, so no film is evaluated twice). h depends weakly on T_s, so each such step cuts
    the error several-fold; the march's passes repeat it until nothing moves.
    """
    g_film = h_film * (math.pi * d_out)
    # series: heated node -> insulation -> surface -> film -> air
    return (t_heated + r_ins * g_film * t_inf) / (1.0 + r_ins * g_film)


class _HeaterState:
    """Electric heaters and heat sinks through the march's passes (one per solve).

    * constant heaters: a fixed source (``line.q_in``);
    * self-limiting heaters: q = s·(T0 − T_h), clamped at 0 — a conductance s to T0 while the pipe wall is
      below T0, in parallel with the steam tracers' path (whether it gives heat is taken from the last
      pass's wall, as for the tracers);
    * thermostats: one duty (0–1) per segment that holds the segment's coldest pipe wall at the set point,
      full output where even that cannot, off where the wall is above it without heat. Within a pass the
      heat balance is linear in the duties, so a secant step per segment (all segments at once) finds
      them there; the duties carry over to the next pass as its start;
    * heat sinks: insulated equivalent length as a multiple of the outside path's conductance, bare length
      through the air film at the pipe's outer diameter at the pipe wall's temperature, direct W/K; all to
      the surroundings, added to the outside path.
    """

    #: A thermostat's coldest wall within this of its set point is held [K].
    DUTY_TOL_K = 1e-5

    def __init__(self, line: LineGrid, t_in: float, air, factors: MethodFactors):
        self.any_sl = line.any_self_limiting
        self.any_thermo = line.any_thermostat
        self._seg = line.thermostat_segments
        self.any_sink = line.any_sink
        self.factors = factors
        self.bare_computed = (line.sink_bare_ratio > 0.0) & np.isnan(line.sink_bare_film)
        self.air = (air or AirAtOneAtmosphere.get()) if self.bare_computed.any() else None
        self.follows_wall = self.any_sl or self.any_thermo or bool(np.any(line.sink_bare_ratio > 0.0))
        self.duty = np.full(line.thermostat_segments.size, 0.5) if self.any_thermo else np.zeros(0)
        self.g_heater = np.zeros_like(line.dx)  # self-limiting slope in use [W/(m·K)]
        self.g_sink = np.zeros_like(line.dx)  # sink conductance in use [W/(m·K)]
        self.g_sink_fixed = np.zeros_like(line.dx)  # its part that does not scale with the outside path (bare, direct)
        self.q_fixed = line.q_in  # fixed heat input of the last pass [W/m] (constant + thermostats)

    def duty_per_segment(self, n_segments: int) -> np.ndarray:
        out = np.full(n_segments, np.nan)
        return out if not self.any_thermo else _put(out, self._seg, self.duty)

    def _sinks(self, line: LineGrid, r_out_total, T_heated) -> np.ndarray:
        g_fixed = line.sink_direct.copy()
        bare = line.sink_bare_ratio > 0.0
        if bare.any():
            h = np.nan_to_num(line.sink_bare_film, nan=0.0)
            bc = self.bare_computed
            if bc.any():
                vertical = line.vertical_length[bc]
                kw = {"vertical_length": vertical} if vertical.any() else {}
                h_conv, h_rad = air_film_parts(self.air, T_heated[bc], line.t_inf[bc], line.d_pipe_outer[bc],
                                               line.wind_speed[bc], line.emissivity[bc], self.factors, **kw)
                h[bc] = h_conv + h_rad
            g_fixed += line.sink_bare_ratio * h * (math.pi * line.d_pipe_outer)
        g_out = np.zeros_like(line.dx)
        finite = np.isfinite(r_out_total) & (r_out_total > 0.0)
        g_out[finite] = 1.0 / r_out_total[finite]
        self.g_sink_fixed = g_fixed
        return g_fixed + line.sink_insulated_ratio * g_out

    def heat_pass(self, line: LineGrid, r_a, r_out_total, mcp, e_corr, t_in, t_inf_eff, g_tracer, T_heated):
        """One heat pass with the heaters and sinks at the last pass's wall temperatures (see _heat_pass)."""
        g_sink = self._sinks(line, r_out_total, T_heated) if self.any_sink else None
        if g_sink is not None:
            self.g_sink = g_sink
        g_src, t_src = g_tracer, None
        if self.any_sl:
            self.g_heater = np.where(T_heated < line.t0_heater, line.s_heater, 0.0)
            g_src = g_tracer + self.g_heater
            t_steam = line.t_tracer if line.any_tracer else 0.0
            with np.errstate(invalid="ignore", divide="ignore"):
                t_src = np.where(g_src > 0.0, (g_tracer * t_steam + self.g_heater * line.t0_heater)
                                 / np.where(g_src > 0.0, g_src, 1.0), 0.0)
        args = (line, r_a, r_out_total, mcp, e_corr, t_in, t_inf_eff, g_src, t_src, g_sink)
        if not self.any_thermo:
            return _heat_pass(*args, line.q_in)
        return self._thermostats(line, r_a, args)

    def _thermostats(self, line: LineGrid, r_a, args):
        seg, starts, seg_of_cell = line.thermostat_segments, line.seg_first_cell, line.seg_of_cell
        duty_seg = np.zeros(len(line.segments))

        def run(d):
            duty_seg[seg] = d
            q = line.q_in + line.q_thermostat * duty_seg[seg_of_cell]
            T_new, Q_cell, tm, u = _heat_pass(*args, q, with_u=True)
            # the pipe wall at the cells' edges: within a cell it is linear in the bulk,
            # T_h = T + R_a·q'(T) with dT_h/dT = 1 − R_a·U', so its coldest point is at an edge (the cell
            # means would miss it by half a cell's change)
            t_h_mean = tm + Q_cell / line.dx * r_a
            slope = 1.0 - r_a * u
            coldest = np.minimum(t_h_mean + slope * (T_new[:-1] - tm), t_h_mean + slope * (T_new[1:] - tm))
            return (T_new, Q_cell, tm), q, np.minimum.reduceat(coldest, starts)[seg] - line.set_points

        def settled(d, f):
            return (np.abs(f) < self.DUTY_TOL_K) | ((d >= 1.0) & (f <= 0.0)) | ((d <= 0.0) & (f >= 0.0))

        d0 = self.duty
        out, q, f0 = run(d0)
        done = settled(d0, f0)
        # the second point: a quarter of full output towards the set point
        d1 = np.where(done, d0, np.clip(d0 - np.sign(f0) * 0.25, 0.0, 1.0))
        d_last, step = d0, 0.25
        for _ in range(12):
            if done.all():
                break
            out, q, f1 = run(d1)
            d_last = d1
            done = settled(d1, f1)
            if done.all():
                break
            dd = d1 - d0
            with np.errstate(invalid="ignore", divide="ignore"):
                slope = (f1 - f0) / np.where(dd != 0.0, dd, 1.0)
            good = (dd != 0.0) & (slope > 0.0)
            # the wall rises with the duty; where the secant cannot say by how much, step on halving
            d_next = np.where(good, d1 - f1 / np.where(good, slope, 1.0), d1 - np.sign(f1) * step)
            step *= 0.5
            d0, f0 = d1, f1
            d1 = np.where(done, d1, np.clip(d_next, 0.0, 1.0))
        self.duty = d_last
        self.q_fixed = q
        return out

    def delivered(self, line: LineGrid, T_heated):
        """Heater output [W/m of pipe] and heat-sink loss [W/m] per cell at the converged wall."""
        q = self.q_fixed.copy() if self.any_thermo else line.q_in.copy()
        if self.any_sl:
            q += self.g_heater * (line.t0_heater - T_heated)
        q_sink = self.g_sink * (T_heated - np.nan_to_num(line.t_inf, nan=0.0)) if self.any_sink else np.zeros_like(line.dx)
        return q, q_sink


def _put(out: np.ndarray, where, values) -> np.ndarray:
    out[where] = values
    return out


def _heat_pass(line: LineGrid, r_a, r_out_total, mcp, e_corr, t_in: float, t_inf_eff, g_tracer,
               t_source=None, g_sink=None, q_in=None, with_u=False):
    """Bulk temperature at the cell edges, heat to the fluid per cell [W] and the cell-mean bulk for one pass.

    Per cell the coefficients are constant and the bulk follows the exact exponential:
    ΔT = [source + U'(T_e − T_i)] dx/(m cp) · φ(NTU), with φ(NTU) = (1 − e^−NTU)/NTU.
    The heated node (the pipe's outer wall) leads to the surroundings through ``r_out_total`` and,
    where there are steam tracers, to their steam through 1/g_tracer: two paths in parallel, one
    path of conductance G_e = 1/R_o + g_t to the temperature T_e = (T∞/R_o + g_t·T_t)/G_e
    (``g_tracer`` per cell: 0 where there is no tracer or it gives no heat).
    A self-limiting heater, q = s·(T0 − T_h) while T_h < T0, is the same kind of path (conductance s to
    T0): ``g_tracer`` and ``t_source`` are then the tracers' and the heater's together (``t_source``
    None: the tracers' steam). Heat sinks (``g_sink`` [W/(m·K)], to T∞) add to the outside path; ``q_in``
    is the fixed heat input [W/m] (None: the line's constant heaters). ``with_u``: also return U' per cell.
    ``e_corr`` is the temperature change not explained by Q/(m cp) (pressure effect, cp curvature).
    """
    dx = line.dx
    finite_out = np.isfinite(r_out_total)
    g_out = np.zeros_like(dx)
    with np.errstate(divide="ignore"):
        g_out[finite_out] = 1.0 / r_out_total[finite_out]  # inf where R_o = 0 (a fixed wall)
    if g_sink is not None:
        g_out = g_out + g_sink  # sinks lose to the same surroundings (none on a held wall: refused in solver.line)
    if q_in is None:
        q_in = line.q_in
    t_e = t_inf_eff
    if t_source is not None or line.any_tracer:
        g_t = g_tracer
        t_src = line.t_tracer if t_source is None else t_source
        with np.errstate(invalid="ignore"):
            g_e = g_out + g_t
            t_e = np.where(g_t > 0, (g_out * t_inf_eff + g_t * t_src) / np.where(g_e > 0, g_e, 1.0),
                           t_inf_eff)
        g_out = g_e
    u_prime = np.zeros_like(dx)
    has_path = g_out > 0
    with np.errstate(divide="ignore"):
        u_prime[has_path] = 1.0 / (r_a[has_path] + 1.0 / g_out[has_path])
    source = q_in * (1.0 - r_a * u_prime)  # share of heat input reaching the fluid [W/m]
    ntu = u_prime * dx / mcp
    decay = np.exp(-ntu)
    one_minus = -np.expm1(-ntu)  # = NTU·φ(NTU)
    phi = np.where(ntu > 1e-12, one_minus / np.maximum(ntu, 1e-300), 1.0)
    gain = (source * dx / mcp) * phi + one_minus * t_e
    T_new = _linear_recurrence(decay, gain + e_corr, t_in)
    dT_heat = np.diff(T_new) - e_corr
    Q_cell = mcp * dT_heat  # heat to fluid in each cell [W]
    # the cell-mean bulk of the exponential: T_i + w·ΔT with w = (1 − φ)/(1 − e^−NTU) (1/2 + NTU/12 for
    # small NTU, where the closed form cancels), so mean wall temperatures follow the same profile
    w = np.where(ntu > 1e-5, (1.0 - phi) / np.where(ntu > 1e-5, one_minus, 1.0), 0.5 + ntu / 12.0)
    tm_cell = T_new[..., :-1] + w * np.diff(T_new)
    if with_u:
        return T_new, Q_cell, tm_cell, u_prime
    return T_new, Q_cell, tm_cell


def _pressure_drops(line: LineGrid, fluid, m_dot: float, T, p, rho, velocity, Re, f):
    """Pressure drop per cell [Pa] by cause: friction, fittings, elevation, acceleration.

    Fittings act on their segment's mean Reynolds number, spread over its length; the
    acceleration term uses the densities of the previous iterate.
    """
    dx, D, area, dz = line.dx, line.D, line.area, line.dz
    dyn = 0.5 * rho * velocity**2
    dp_friction = f * dx / D * dyn
    if line.any_fittings:
        first = line.seg_first_cell
        re_mean = np.add.reduceat(Re * dx, first, axis=-1) / np.add.reduceat(dx, first, axis=-1)
        K_seg = line.k_a / re_mean + line.k_b
        dp_fittings = np.repeat(K_seg, line.cells_per_seg, axis=-1) * line.length_cell_share * dyn
    else:
        dp_fittings = np.zeros_like(dx)
    dp_elevation = rho * GRAVITY * dz
    rho_nodes = _node_density(fluid, T, p, rho)
    G = m_dot / area
    dp_accel = G**2 * (1.0 / rho_nodes[..., 1:] - 1.0 / rho_nodes[..., :-1])
    return dp_friction, dp_fittings, dp_elevation, dp_accel


def _kinetic_energy(m_dot: float, area: np.ndarray, rho_nodes: np.ndarray) -> np.ndarray:
    """v²/2 at the nodes [J/kg]: the cell upstream's bore (the first cell's at the inlet), the node's density."""
    a_up = np.empty(rho_nodes.shape)
    a_up[..., 0] = area[..., 0]
    a_up[..., 1:] = area
    v = m_dot / (rho_nodes * a_up)
    return 0.5 * v * v


def _linear_recurrence(decay: np.ndarray, gain: np.ndarray, start: float) -> np.ndarray:
    """T[0] = start, T[i+1] = decay[i] T[i] + gain[i], with 0 < decay <= 1.

    Closed form with cumulative products, T[n] = P[n] (start + Σ_{k<n} gain[k] / P[k+1]),
    P[n] = Π_{k<n} decay[k], evaluated in logarithms. The error stays at round-off
    times the number of cells because each term is scaled back by P[n] <= P[k+1].
    Where the products would underflow (a very strongly coupled line) a plain loop
    takes over.
    """
    shape = decay.shape[:-1] + (decay.shape[-1] + 1,)
    log_p = np.empty(shape)
    log_p[..., 0] = 0.0
    with np.errstate(divide="ignore"):  # decay underflows to 0 past NTU 745: -inf sends it to the loop below
        np.cumsum(np.log(decay), axis=-1, out=log_p[..., 1:])
    if np.all(log_p[..., -1] > -600.0):
        inv = np.exp(-log_p[..., 1:])
        acc = np.empty(shape)
        acc[..., :1] = start
        np.cumsum(gain * inv, axis=-1, out=acc[..., 1:])
        acc[..., 1:] += start
        return acc * np.exp(log_p)
    if decay.ndim > 1:  # variants marched together: each its own recurrence
        return np.array([_linear_recurrence(d, g, float(np.ravel(s)[0]))
                         for d, g, s in zip(decay, gain, np.broadcast_to(start, (decay.shape[0], 1)))])
    out = [start]
    t = start
    for a, b in zip(decay.tolist(), gain.tolist()):
        t = a * t + b
        out.append(t)
    return np.array(out)


def _node_density(fluid, T, p, rho_cells):
    if not fluid.compressible:
        # liquids: the density change along the line is tiny; acceleration from cell densities
        r = np.empty(T.shape)
        r[..., 1:-1] = 0.5 * (rho_cells[..., :-1] + rho_cells[..., 1:])
        r[..., 0], r[..., -1] = rho_cells[..., 0], rho_cells[..., -1]
        return r
    return fluid.props(T, p).rho


def _phase_or_range_problem(fluid, T, p, t_lo, t_hi, liquid_feed, tsat):
    """The first node where the bulk leaves single-phase flow or the fluid data, with a plain message.

    ``tsat`` is the saturation temperature at the nodes for a pure fluid, else None: only real
    saturation physics stops the march; a user table's fixed boiling point is a check.
    """
    c = lambda t: f"{t - 273.15:.1f} °C"  # noqa: E731
    if tsat is not None:
        finite = np.isfinite(tsat)
        if liquid_feed:
            bad = finite & (T >= tsat)
            if bad.any():
                return int(np.argmax(bad)), "boiling"
        else:
            bad = finite & (T <= tsat)
            if bad.any():
                i = int(np.argmax(bad))
                return i, (f"the gas cools to its condensation temperature ({c(tsat[i])} at {p[i] / 1e5:.3g} bar(a)): "
                           "two-phase flow is outside Calorun's scope. Insulate or heat the line.")
    low = T < t_lo
    if low.any():
        i = int(np.argmax(low))
        t_freeze = fluid.freezing_temperature(float(p[i]))
        if t_freeze is not None and math.isfinite(t_freeze) and abs(t_freeze - t_lo) < 0.5:
            return i, (f"the bulk cools to the freezing point of {fluid.label} ({c(t_freeze)}): the line freezes. "
                       "Insulate, trace, or raise the flow or the inlet temperature.")
        return i, f"the bulk cools below the range of the fluid data ({c(t_lo)} for {fluid.label})."
    high = T > t_hi
    if high.any():
        i = int(np.argmax(high))
        return i, f"the bulk heats above the range of the fluid data ({c(t_hi)} for {fluid.label})."
    return None


def _segment_words(line: LineGrid, k: int) -> str:
    """'segment 3 'Header'': a segment by its number from 1 and its name."""
    s = line.segments[k]
    return f"segment {s.index + 1} {s.name!r}"


def _stretches(line: LineGrid) -> list[Stretch]:
    x0 = line.x_node[line.seg_first_cell].tolist()
    return [Stretch(s.name, x0[s.index], s.length_m, s.inner_diameter_m, s.roughness_m / s.inner_diameter_m,
                    (float(line.k_a[s.index]), float(line.k_b[s.index]))) for s in line.segments]


def _choked(alt: Alternative, fluid, line: LineGrid, m_dot: float, i_node: int | None) -> SolverError:
    """The flow reaches the speed of sound: where, and the largest mass flow the line can pass.

    Where and how much come from the published relations for flow with friction (Fanno, and
    isothermal for a line that holds its temperature; :mod:`solver.choking`) from the feed's state,
    so they do not depend on how far the march got. ``i_node`` is where the march saw Mach 1, used
    only when the adiabatic relations find no choking (a heated gas chokes earlier than Fanno flow).
    """
    t_in, p_in = alt.feed.inlet_temperature_K, alt.feed.inlet_pressure_Pa
    props = fluid.props(np.array([t_in]), np.array([p_in]))
    rho_in, mu_in = float(props.rho[0]), float(props.mu[0])
    sound = fluid.speed_of_sound(np.array([t_in]), np.array([p_in]))
    a_in = float(sound[0]) if sound is not None else math.sqrt(1.4 * p_in / rho_in)
    gamma = max(a_in * a_in * rho_in / p_in, 1.01)  # ideal-gas γ that gives this speed of sound
    stretches = _stretches(line)
    area_in = math.pi * stretches[0].diameter_m ** 2 / 4.0
    where = choking.choke_point(stretches, m_dot, m_dot / (rho_in * area_in * a_in), gamma, mu_in)
    if where is not None:
        k, x = where
    else:
        i = i_node if i_node is not None else line.n
        k, x = int(line.seg_of_cell[min(i, line.n - 1)]), float(line.x_node[i])
    m_adiabatic = choking.max_mass_flow(stretches, rho_in, a_in, gamma, mu_in)
    m_isothermal = choking.max_mass_flow(stretches, rho_in, a_in, gamma, mu_in, isothermal=True)
    if where is None:
        # the march reaches Mach 1 although the adiabatic relations just pass this flow: it is at the edge
        err = SolverError(
            f"the flow reaches the speed of sound in {_segment_words(line, k)} at x = {x:.2f} m: the line is at the "
            f"edge of choking. The relations for adiabatic flow put its limit at {m_adiabatic:.4g} kg/s from "
            f"{p_in / 1e5:.3g} bar(a) inlet ({m_isothermal:.4g} kg/s isothermal), hardly above the {m_dot:.4g} kg/s "
            "asked for; heat added to a gas brings choking earlier. Use a larger bore, a shorter line, a higher "
            "inlet pressure or less flow.", alternative=alt.name)
        err.segment, err.x_m = line.segments[k].name, float(x)
        return err
    vapour = ""
    if isinstance(fluid, PureFluidModel) and not fluid.compressible:
        # a fluid that is liquid in ambient conditions, fed as vapour: say so, it may not be what was meant
        tsat_in = float(fluid.saturation_temperature(np.array([p_in]))[0])
        if math.isfinite(tsat_in):
            vapour = (f"the feed is vapour ({fluid.label} at {t_in - 273.15:.1f} °C is above its boiling point "
                      f"{tsat_in - 273.15:.1f} °C at {p_in / 1e5:.4g} bar(a)), and ")
    message = vapour + (
        f"the flow chokes (reaches the speed of sound) in {_segment_words(line, k)} at x = {x:.2f} m: this line can "
        f"pass at most {m_adiabatic:.4g} kg/s at {p_in / 1e5:.3g} bar(a) inlet (adiabatic choked flow, Fanno "
        f"relations; {m_isothermal:.4g} kg/s if the gas held its inlet temperature, isothermal choked flow), and the "
        f"feed asks for {m_dot:.4g} kg/s. Use a larger bore, a shorter line, a higher inlet pressure or less flow."
    )
    err = SolverError(message, alternative=alt.name)
    err.segment, err.x_m = line.segments[k].name, float(x)
    return err


def _boiling_error(alt, fluid, line: LineGrid, m_dot, T, p, tsat, i: int) -> SolverError:
    """A liquid reaching its boiling point at node ``i`` (the first at or past it): located between the
    nodes where the bulk meets the saturation temperature, and named for its cause, flashing as the
    pressure falls or boiling as it is heated."""
    x = float(line.x_node[i])
    t_at, p_at, ts_at = float(T[i]), float(p[i]), float(tsat[i])
    k = line.segment_at(i).index
    if i > 0:
        g0, g1 = float(T[i - 1] - tsat[i - 1]), float(T[i] - tsat[i])
        if g0 < 0.0 <= g1 and g1 > g0:
            w = -g0 / (g1 - g0)
            lerp = lambda a: float(a[i - 1] + w * (a[i] - a[i - 1]))  # noqa: E731
            x, t_at, p_at, ts_at = lerp(line.x_node), lerp(T), lerp(p), lerp(tsat)
            k = int(line.seg_of_cell[i - 1])
    tsat_in = float(fluid.saturation_temperature(np.array([alt.feed.inlet_pressure_Pa]))[0])
    where = f"{_segment_words(line, k)} at x = {x:.2f} m"
    t_in = alt.feed.inlet_temperature_K
    if not math.isfinite(tsat_in) or (tsat_in - ts_at) > (t_at - t_in):
        # the boiling point fell further than the bulk warmed: the pressure loss brings it to boil
        message = (
            f"the liquid reaches its boiling point and flashes as its pressure falls, in {where}: the pressure is "
            f"down to {p_at / 1e5:.3g} bar(a), where {fluid.label} boils at {ts_at - 273.15:.1f} °C (bulk "
            f"{t_at - 273.15:.1f} °C). Calorun models single-phase flow: the line cannot pass {m_dot:.3g} kg/s from "
            f"{alt.feed.inlet_pressure_Pa / 1e5:.3g} bar(a) inlet. Raise the inlet pressure, or use a larger bore or "
            "less flow.")
    else:
        message = (
            f"the liquid reaches its boiling point in {where}: {ts_at - 273.15:.1f} °C at {p_at / 1e5:.3g} bar(a). "
            "Calorun models single-phase flow. Raise the pressure, or lower the heat input or wall temperature.")
    err = SolverError(message, alternative=alt.name)
    err.segment, err.x_m = line.segments[k].name, x
    return err


def _pressure_failure(alt, fluid, line: LineGrid, m_dot, T, p, p_floor, liquid_feed, sat_possible) -> SolverError:
    """No pressure left before the outlet, said as what happens: choking, flashing, or the pump's shortfall."""
    i_zero = int(np.argmax(p <= p_floor))
    if not liquid_feed and fluid.compressible or (sat_possible and not liquid_feed):
        return _choked(alt, fluid, line, m_dot, i_zero)
    seg = line.segment_at(i_zero)
    if liquid_feed and sat_possible:
        # the pressure falls through the vapour pressure before it reaches zero: the liquid flashes there
        p_eval = np.maximum(p, p_floor)
        tsat = fluid.saturation_temperature(p_eval)
        boils = (np.isfinite(tsat) & (T >= tsat)) | (p <= p_floor)
        return _boiling_error(alt, fluid, line, m_dot, T, p_eval, np.where(np.isfinite(tsat), tsat, T),
                              int(np.argmax(boils)))
    return SolverError(
        f"the pressure falls to zero in {_segment_words(line, seg.index)}: the line cannot pass {m_dot:.3g} kg/s from "
        f"{alt.feed.inlet_pressure_Pa / 1e5:.3g} bar(a) inlet (the pressure drop exceeds the inlet pressure before "
        "the outlet). Raise the inlet pressure, or use a larger bore or less flow.",
        alternative=alt.name, segment=seg.name, x_m=float(line.x_node[i_zero]),
    )


_PHASE_WORDS = {"liquid": "liquid", "gas": "gas (vapour)"}


def _check_feed_phase(alt: Alternative, fluid) -> None:
    """Refuse a feed at its boiling point (Calorun models single-phase flow) or in the other phase than
    the Feed says it is meant to be, naming the phase and the boiling point."""
    t_in, p_in = alt.feed.inlet_temperature_K, alt.feed.inlet_pressure_Pa
    phase, tsat = state_phase(fluid, t_in, p_in)
    at = f"{t_in - 273.15:.1f} °C at {p_in / 1e5:.4g} bar(a)"
    if phase == "saturated":
        raise SolverError(
            f"the feed is at its boiling point: {at} ({fluid.label} boils at {tsat - 273.15:.1f} °C at this "
            "pressure, where liquid and vapour coexist). Calorun models single-phase flow: "
            f"enter an inlet temperature below the boiling point (liquid) or above it (vapour), or change the "
            "inlet pressure.", alternative=alt.name)
    wanted = alt.feed.phase
    if wanted is not None and wanted != phase:
        boils = (f"; {fluid.label} boils at {tsat - 273.15:.1f} °C at this pressure" if math.isfinite(tsat)
                 else " (above its critical point)" if phase == "gas" else "")
        fix = ("lower the inlet temperature or raise the inlet pressure" if wanted == "liquid"
               else "raise the inlet temperature or lower the inlet pressure")
        raise SolverError(
            f"the feed is meant to be {_PHASE_WORDS[wanted]}, but {fluid.label} at {at} is "
            f"{_PHASE_WORDS[phase]}{boils}. To feed it as {wanted.replace('gas', 'gas (vapour)')}, {fix}; or set "
            f"the feed's phase to {phase}.", alternative=alt.name)


def _check_liquid_model(fluid, p_in: float, alt_name: str, where: str = "at the feed pressure of") -> None:
    """Refuse a liquid table whose enthalpy model does not rise with temperature at the feed pressure (or
    at the highest pressure along the line, ``where="at the highest line pressure,"``)."""
    falls = getattr(fluid, "enthalpy_falls_at", None)
    t_bad = falls(p_in) if falls is not None else None
    if t_bad is not None:
        raise SolverError(
            f"{where} {p_in / 1e5:.4g} bar(a) the enthalpy of {fluid.label} would fall with "
            f"temperature above {t_bad - 273.15:.1f} °C (its density rises with temperature too steeply for "
            "a liquid at this pressure), so no temperature can be given to a heat balance: check the density "
            "column of the fluid table or the feed pressure",
            alternative=alt_name,
        )


def _check_state_in_range(fluid, t, alt_name):
    if not (fluid.T_min_K <= t <= fluid.T_max_K):
        raise SolverError(
            f"inlet temperature {t - 273.15:.1f} °C is outside the range of the fluid data "
            f"({fluid.T_min_K - 273.15:.1f} to {fluid.T_max_K - 273.15:.1f} °C) for {fluid.label}",
            alternative=alt_name,
        )
