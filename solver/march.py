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
coarse cells stay stable. The heat of each cell is added to the enthalpy,
``h_{i+1} = h_i + Q_i / m``, and temperature follows from (h, p): the energy
balance closes to round-off by construction.

Properties, film coefficients and pressure are evaluated vectorised over all
cells at once, at cell means, and iterated to a fixed point; only the linear
bulk-temperature recurrence runs cell by cell.

Assumptions (also listed in every result): steady flow, single phase, no axial
conduction, kinetic and potential energy neglected in the energy balance,
no viscosity correction for wall temperature, the entry lengths counted from the
line inlet, fittings losses spread evenly over their segment.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from solver._numeric import clip as _clip

from solver import catalogue, correlations, fittings as fittings_mod
from solver.errors import CalorunError, InputError, PropertyRangeError, SolverError
from solver.model import (
    Adiabatic,
    Alternative,
    Buried,
    FixedWall,
    Jacket,
    PureFluid,
    StillAir,
    Wind,
)
from solver.properties import PureFluidModel, fluid_model
from solver.results import Check, PressureDropBreakdown, Profile, Result, SegmentSpan, render_message

GRAVITY = 9.80665  # m/s², standard gravity (CGPM 1901)
AMBIENT_PRESSURE_PA = 101_325.0  # air around the line, standard atmosphere
BURN_THRESHOLD_K = 333.15  # 60 °C contact burn threshold for metal-like surfaces (common practice)
COLD_CONTACT_K = 263.15  # −10 °C, cold-contact injury threshold (common practice)

ASSUMPTIONS = [
    "Steady, single-phase flow; no axial heat conduction in fluid or wall.",
    "Potential energy is in the energy balance; kinetic energy is neglected (typically well under 0.01 K).",
    "Properties evaluated at the local bulk temperature and pressure; no wall-viscosity correction.",
    "Hydrodynamic and thermal entry lengths counted from the line inlet.",
    "Fittings losses spread evenly over the length of their segment.",
    "Heat input (tracing) enters at the outer surface of the pipe wall, under the insulation.",
    "With a jacket or fixed wall temperature, insulation layers play no part.",
    "Outer film in air at 1 atm; radiation to surroundings at the air temperature.",
    "Friction heats the fluid (enthalpy includes flow work), so an adiabatic liquid line warms slightly.",
]


# --------------------------------------------------------------------------- set-up


@dataclass
class _SegmentSetup:
    index: int
    name: str
    length_m: float
    inner_diameter_m: float
    pipe_outer_diameter_m: float
    outer_diameter_m: float  # over insulation (the surface facing the surroundings)
    roughness_m: float
    wall_resistance: float  # K·m/W
    insulation_resistance: float  # K·m/W
    heat_input_W_per_m: float
    kind: str
    medium_temperature_K: float
    elevation_change_m: float
    n_cells: int
    surroundings: object
    fittings: list
    cells: np.ndarray = None  # indices of this segment's cells in the line
    node_range: tuple = (0, 0)  # first and last index of this segment's nodes in the profile


def _resolve_segments(alt: Alternative) -> list[_SegmentSetup]:
    setups = []
    for i, seg in enumerate(alt.segments):
        prefix = f"segments[{i}]"
        rp = catalogue.resolve_pipe(seg.pipe, field_prefix=f"{prefix}.pipe")
        d_in = rp.inner_diameter_m
        d_po = rp.outer_diameter_m
        r_wall = _cylinder_resistance(d_in, d_po, rp.wall_conductivity_W_per_mK)
        sur = seg.surroundings
        d = d_po
        r_ins = 0.0
        if not isinstance(sur, (FixedWall, Jacket)):
            for layer in seg.insulation:
                d_next = d + 2.0 * layer.thickness_m
                r_ins += _cylinder_resistance(d, d_next, layer.conductivity_W_per_mK)
                d = d_next
        if isinstance(sur, (StillAir, Wind)):
            t_inf = sur.temperature_K
        elif isinstance(sur, Buried):
            t_inf = sur.soil_temperature_K
            if sur.depth_m <= d / 2:
                raise InputError(
                    f"{prefix}.surroundings.depth_m", sur.depth_m,
                    f"the pipe centreline must lie deeper than its outer radius ({d / 2:.3f} m)",
                )
        elif isinstance(sur, Jacket):
            t_inf = sur.medium_temperature_K
        elif isinstance(sur, FixedWall):
            if sur.wall_temperature_K is not None:
                t_inf = sur.wall_temperature_K
            else:
                water = fluid_model(PureFluid(name="Water"))
                t_inf = float(water.saturation_temperature(np.array([sur.steam_pressure_Pa]))[0])
                if not math.isfinite(t_inf):
                    raise InputError(
                        f"{prefix}.surroundings.steam_pressure_Pa", sur.steam_pressure_Pa,
                        "no saturation temperature at this pressure (above the critical point of water?)",
                    )
        else:  # adiabatic
            t_inf = math.nan
        setups.append(
            _SegmentSetup(
                index=i,
                name=seg.name,
                length_m=seg.length_m,
                inner_diameter_m=d_in,
                pipe_outer_diameter_m=d_po,
                outer_diameter_m=d,
                roughness_m=rp.roughness_m,
                wall_resistance=r_wall,
                insulation_resistance=r_ins,
                heat_input_W_per_m=seg.heat_input_W_per_m,
                kind=sur.kind,
                medium_temperature_K=t_inf,
                elevation_change_m=seg.elevation_change_m,
                n_cells=0,
                surroundings=sur,
                fittings=list(seg.fittings),
            )
        )
    return setups


def _cylinder_resistance(d_inner: float, d_outer: float, k: float) -> float:
    """Conduction through a cylindrical layer per unit length, ln(Do/Di)/(2πk) [K·m/W] (closed form;
    the scalar twin of correlations.cylinder_wall_resistance, which validates arrays)."""
    return math.log(d_outer / d_inner) / (2.0 * math.pi * k) if d_outer > d_inner else 0.0


def _cells_for(setups: list[_SegmentSetup], refine: float, cells_per_segment: int | None) -> None:
    """Choose cells per segment: enough to resolve entry effects and the temperature change.

    Second-order accurate in cell size (mid-cell properties, exact exponential in
    each cell), so a few hundred cells per segment are grid-independent to well
    under 0.01 K; the count grows with length-to-diameter ratio.
    """
    for s in setups:
        if cells_per_segment is not None:
            n = cells_per_segment
        else:
            l_over_d = s.length_m / s.inner_diameter_m
            n = int(math.ceil(40 + 12 * math.log10(1 + l_over_d) ** 2))
        s.n_cells = max(4, int(math.ceil(n * refine)))


# --------------------------------------------------------------------------- solve


def solve(
    alternative: Alternative,
    *,
    refine: float = 1.0,
    cells_per_segment: int | None = None,
    max_iterations: int = 60,
    tolerance_K: float = 1e-3,
) -> Result:
    """Solve one alternative and return its :class:`~solver.results.Result`.

    ``refine`` scales the automatic cell counts (2.0 doubles them: the grid
    check); ``cells_per_segment`` fixes them. Raises only
    :class:`~solver.errors.CalorunError` subclasses.
    """
    try:
        return _solve(alternative, refine, cells_per_segment, max_iterations, tolerance_K)
    except PropertyRangeError as exc:
        raise SolverError(f"fluid property out of range: {exc}", alternative=alternative.name) from None
    except InputError as exc:
        raise _located_input_error(alternative, exc) from None
    except CalorunError:
        raise
    except (FloatingPointError, ZeroDivisionError, OverflowError) as exc:  # defensive: never a raw traceback
        raise SolverError(f"numerical failure ({exc})", alternative=alternative.name) from None


def _located_input_error(alt: Alternative, exc: InputError) -> InputError:
    """Say which alternative and segment (by number from 1 and by name) an input problem is in."""
    import re

    where = f"alternative {alt.name!r}"
    m = re.match(r"segments\[(\d+)\]", exc.field)
    if m and int(m.group(1)) < len(alt.segments):
        k = int(m.group(1))
        where += f", segment {k + 1} {alt.segments[k].name!r}"
    located = InputError(exc.field, exc.value, exc.reason)
    located.args = (f"{where}: {exc}",)
    located.alternative = alt.name
    return located


def _solve(alt: Alternative, refine: float, cells_per_segment, max_iterations: int, tol: float) -> Result:
    fluid = fluid_model(alt.fluid)
    feed = alt.feed
    t_in = feed.inlet_temperature_K
    p_in = feed.inlet_pressure_Pa
    _check_state_in_range(fluid, t_in, p_in, alt.name)
    props_in = fluid.props(np.array([t_in]), np.array([p_in]))
    if feed.mass_flow_kg_per_s is not None:
        m_dot = feed.mass_flow_kg_per_s
    else:
        m_dot = feed.volume_flow_m3_per_s * float(props_in.rho[0])

    setups = _resolve_segments(alt)
    _cells_for(setups, refine, cells_per_segment)

    # ---- cell geometry (cells of all segments concatenated)
    seg_of_cell = np.concatenate([np.full(s.n_cells, s.index) for s in setups])
    first = 0
    for s in setups:
        s.cells = np.arange(first, first + s.n_cells)
        first += s.n_cells
    dx_list, x_start = [], 0.0
    x_nodes_line = [0.0]
    for s in setups:
        edges = _cell_edges(s.length_m, s.n_cells, clustered=(s.index == 0))
        dx_list.append(np.diff(edges))
        x_nodes_line.extend((x_start + edges[1:]).tolist())
        x_start += s.length_m
    dx = np.concatenate(dx_list)
    x_node = np.array(x_nodes_line)  # n+1 nodes along the whole line
    x_mid = 0.5 * (x_node[:-1] + x_node[1:])
    n = dx.size

    def per_cell(attr):
        return np.array([getattr(s, attr) for s in setups], dtype=float)[seg_of_cell]

    D = per_cell("inner_diameter_m")
    area = 0.25 * math.pi * D**2
    rel_rough = per_cell("roughness_m") / D
    r_wall = per_cell("wall_resistance")
    r_ins = per_cell("insulation_resistance")
    q_in = per_cell("heat_input_W_per_m")
    t_inf = per_cell("medium_temperature_K")
    d_outer = per_cell("outer_diameter_m")
    seg_len = per_cell("length_m")
    dz = per_cell("elevation_change_m") * dx / seg_len
    kinds = np.array([s.kind for s in setups])[seg_of_cell]
    boundary = np.where(kinds == "fixed_wall", "T", "q")
    boundary_cells = str(boundary[0]) if (boundary == boundary[0]).all() else boundary

    # outside path pieces that do not depend on temperature
    r_fixed_out = np.full(n, np.inf)  # for adiabatic
    film_mask = np.zeros(n, dtype=bool)  # air film computed from temperature
    for s in setups:
        sel = seg_of_cell == s.index
        sur = s.surroundings
        if isinstance(sur, Adiabatic):
            r_fixed_out[sel] = np.inf
        elif isinstance(sur, FixedWall):
            r_fixed_out[sel] = 0.0
        elif isinstance(sur, Jacket):
            r_fixed_out[sel] = 1.0 / (sur.film_coefficient_W_per_m2K * math.pi * s.pipe_outer_diameter_m)
        elif isinstance(sur, Buried):
            r_fixed_out[sel] = s.insulation_resistance + float(
                correlations.buried_cylinder_resistance(s.outer_diameter_m, sur.depth_m, sur.soil_conductivity_W_per_mK)
            )
        elif isinstance(sur, (StillAir, Wind)):
            if sur.film_coefficient_W_per_m2K is not None:
                r_fixed_out[sel] = s.insulation_resistance + 1.0 / (sur.film_coefficient_W_per_m2K * math.pi * s.outer_diameter_m)
            else:
                film_mask[sel] = True
    wind_speed = np.zeros(n)
    emissivity = np.zeros(n)
    for s in setups:
        sel = seg_of_cell == s.index
        if isinstance(s.surroundings, Wind):
            wind_speed[sel] = s.surroundings.wind_speed_m_per_s
        if isinstance(s.surroundings, (StillAir, Wind)):
            emissivity[sel] = s.surroundings.emissivity
    air = _AirAtOneAtmosphere.get() if film_mask.any() else None

    # fittings: K(Re) = A/Re + B per segment (both 2-K and 3-K methods have this form at a fixed bore)
    seg_first_cell = np.cumsum([0] + [s.n_cells for s in setups[:-1]])
    cells_per_seg = np.array([s.n_cells for s in setups])
    has_fittings = [bool(s.fittings) for s in setups]
    k_a = np.zeros(len(setups))
    k_b = np.zeros(len(setups))
    for s in setups:
        if s.fittings:
            prefix = f"segments[{s.index}].fittings"
            k1 = float(fittings_mod.fittings_K_total(s.fittings, 1e3, s.inner_diameter_m, field_prefix=prefix))
            k2 = float(fittings_mod.fittings_K_total(s.fittings, 1e6, s.inner_diameter_m, field_prefix=prefix))
            k_a[s.index] = (k1 - k2) / (1e-3 - 1e-6)
            k_b[s.index] = k2 - k_a[s.index] * 1e-6
    any_fittings = any(has_fittings)
    length_cell_share = dx / seg_len

    # ---- fixed-point iteration
    T = np.full(n + 1, t_in)
    p = np.full(n + 1, p_in)
    T_surface = np.where(np.isfinite(t_inf), 0.5 * (t_in + np.nan_to_num(t_inf, nan=t_in)), t_in)
    e_corr = np.zeros(n)  # temperature change not explained by Q / (m cp): pressure effect, cp curvature
    h0 = float(props_in.h[0])
    t_lo, t_hi = fluid.T_min_K, fluid.T_max_K
    t_inf_eff = np.nan_to_num(t_inf, nan=0.0)
    r_ins_film = r_ins[film_mask]
    d_film = d_outer[film_mask]
    area_film = math.pi * d_film
    converged = False
    last_change = math.inf
    h_target = None  # enthalpy at the nodes from the last pass (None before the first)
    Q_cell = None  # heat to the fluid per cell from the last pass
    last_step = math.inf
    strikes = 0
    tsat_in = float(fluid.saturation_temperature(np.array([p_in]))[0])
    liquid_feed = bool(math.isfinite(tsat_in) and t_in < tsat_in)
    tsat_nodes = None
    sat_possible = isinstance(fluid, PureFluidModel) and bool(
        np.isfinite(fluid.saturation_temperature(np.array([p_in, max(p_in * 0.5, 2e3)]))).any())
    for iteration in range(max_iterations):
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
            change = max(float(np.max(np.abs(T_true - T))), last_step)
            if change < tol:
                converged = True
                # one more Newton step on h(T, p) = h_target so the reported temperatures agree with
                # the enthalpy balance to round-off, not just to the iteration tolerance
                pt = fluid.props(np.clip(T_true, t_lo, t_hi), p)
                T = T_true + (h_target - pt.h) / pt.cp
                break
            last_change = change
        rho = 0.5 * (pn.rho[:-1] + pn.rho[1:])
        cp = 0.5 * (pn.cp[:-1] + pn.cp[1:])
        if h_target is not None:
            # with this pass's cp, the recurrence reproduces T_true from last pass's heat
            e_corr = np.diff(T_true) - Q_cell / (m_dot * cp)
        mu = np.sqrt(pn.mu[:-1] * pn.mu[1:])  # viscosity varies exponentially with T
        k = 0.5 * (pn.k[:-1] + pn.k[1:])
        velocity = m_dot / (rho * area)
        Re = m_dot * D / (area * mu)
        Pr = cp * mu / k
        f = correlations.friction_factor(Re, rel_rough)
        Nu = _nusselt_inside(Re, Pr, f, x_mid / D, boundary_cells, rel_rough)
        h_inside = Nu * k / D
        r_in = 1.0 / (h_inside * math.pi * D)
        r_a = r_in + r_wall

        # outside path; the air film depends on the outer surface temperature (iterated with the rest)
        r_out_total = r_fixed_out.copy()
        if air is not None:
            h_out = _air_film(air, T_surface[film_mask], t_inf[film_mask], d_film,
                              wind_speed[film_mask], emissivity[film_mask])
            r_out_total[film_mask] = r_ins_film + 1.0 / (h_out * area_film)
        finite_out = np.isfinite(r_out_total)
        u_prime = np.zeros(n)
        u_prime[finite_out] = 1.0 / (r_a[finite_out] + r_out_total[finite_out])
        source = q_in * (1.0 - r_a * u_prime)  # share of heat input reaching the fluid [W/m]

        # exact exponential per cell: ΔT = [source + U'(T∞ − T_i)] dx/(m cp) · φ(NTU)
        mcp = m_dot * cp
        ntu = u_prime * dx / mcp
        decay = np.exp(-ntu)
        one_minus = -np.expm1(-ntu)  # = NTU·φ(NTU)
        phi = np.where(ntu > 1e-12, one_minus / np.maximum(ntu, 1e-300), 1.0)
        gain = (source * dx / mcp) * phi + one_minus * t_inf_eff
        T_new = _linear_recurrence(decay, gain + e_corr, t_in)
        dT_heat = np.diff(T_new) - e_corr
        Q_cell = mcp * dT_heat  # heat to fluid in each cell [W]
        h_nodes = np.empty(n + 1)
        h_nodes[0] = h0
        # energy: d(h + g z) = dQ / m, so a liquid running downhill does not seem to cool
        np.cumsum(Q_cell / m_dot - GRAVITY * dz, out=h_nodes[1:])
        h_nodes[1:] += h0

        # pressure: friction + fittings + elevation + acceleration (density from the previous iterate)
        dyn = 0.5 * rho * velocity**2
        dp_friction = f * dx / D * dyn
        if any_fittings:
            re_mean = np.add.reduceat(Re * dx, seg_first_cell) / np.add.reduceat(dx, seg_first_cell)
            K_seg = k_a / re_mean + k_b
            dp_fittings = np.repeat(K_seg, cells_per_seg) * length_cell_share * dyn
        else:
            dp_fittings = np.zeros(n)
        dp_elevation = rho * GRAVITY * dz
        rho_nodes = _node_density(fluid, T, p, rho)
        G = m_dot / area
        dp_accel = G**2 * (1.0 / rho_nodes[1:] - 1.0 / rho_nodes[:-1])
        dp_cell = dp_friction + dp_fittings + dp_elevation + dp_accel
        p_new = np.empty(n + 1)
        p_new[0] = p_in
        np.cumsum(dp_cell, out=p_new[1:])
        p_new[1:] = p_in - p_new[1:]
        if p_new[-1] <= 0.0 or np.any(p_new <= 0.0):
            i_bad = int(np.argmax(p_new <= 0.0))
            seg_bad = setups[int(seg_of_cell[min(i_bad, n - 1)])]
            raise SolverError(
                "pressure falls to zero: the line cannot pass this flow at this inlet pressure "
                f"(pressure drop exceeds {p_in / 1e5:.3g} bar before the outlet)",
                alternative=alt.name, segment=seg_bad.name, x_m=float(x_node[i_bad]),
            )

        # outer surface temperature for the film coefficient
        if air is not None:
            q_loss = q_in[film_mask] - Q_cell[film_mask] / dx[film_mask]
            r_film = r_out_total[film_mask] - r_ins_film
            T_surface[film_mask] = t_inf[film_mask] + q_loss * r_film
        last_step = max(float(np.max(np.abs(T_new - T))), float(np.max(np.abs(p_new - p))) * 1e-5)
        # a phase change or a state beyond the fluid data on two passes in a row is real, not a transient
        tsat_nodes = fluid.saturation_temperature(p_new) if sat_possible else None
        problem = _phase_or_range_problem(fluid, T_new, p_new, t_lo, t_hi, liquid_feed, tsat_nodes)
        if problem is not None:
            strikes += 1
            if strikes >= 2:
                i_bad, message = problem
                seg_bad = setups[int(seg_of_cell[min(i_bad, n - 1)])]
                raise SolverError(message, alternative=alt.name, segment=seg_bad.name, x_m=float(x_node[i_bad]))
        else:
            strikes = 0
        T = _clip(T_new, t_lo - 50.0, t_hi + 50.0)
        T_surface = np.maximum(T_surface, 1.0)
        p = p_new
        h_target = h_nodes

    if not converged:
        raise SolverError(
            f"the march did not settle (last change {last_change:.2g} K after {max_iterations} passes); "
            "the flow may be near choking or the line near a phase change",
            alternative=alt.name,
        )
    if np.any(T < t_lo) or np.any(T > t_hi):
        i_bad = int(np.argmax((T < t_lo) | (T > t_hi)))
        seg_bad = setups[int(seg_of_cell[min(i_bad, n - 1)])]
        raise SolverError(
            f"bulk temperature leaves the range of the fluid data ({t_lo - 273.15:.1f} to {t_hi - 273.15:.1f} °C) "
            f"at {T[i_bad] - 273.15:.1f} °C",
            alternative=alt.name, segment=seg_bad.name, x_m=float(x_node[i_bad]),
        )

    # ---- final cell quantities consistent with the converged state
    # Heat input = tracing + heat from heating or cooling media (jacket, fixed wall; signed);
    # heat loss = heat to the ambient (air, soil). duty = heat input − heat loss.
    media = (kinds == "jacket") | (kinds == "fixed_wall")
    tracing_cell = q_in * dx
    media_cell = np.where(media, Q_cell - tracing_cell, 0.0)
    q_loss_cell = np.where(media, 0.0, tracing_cell - Q_cell)  # W to the ambient per cell
    heat_tracing = float(np.sum(tracing_cell))
    heat_media = float(np.sum(media_cell))
    heat_input_total = heat_tracing + heat_media
    duty = float(np.sum(Q_cell))
    heat_loss = float(np.sum(q_loss_cell))
    h_out = float(fluid.enthalpy(np.array([T[-1]]), np.array([p[-1]]))[0])
    potential = m_dot * GRAVITY * float(np.sum(dz))
    residual = m_dot * (h_nodes[-1] - h0) + potential - duty
    # the enthalpy re-evaluated from (T, p) at the outlet checks the inversion, not just the sum
    residual = max(residual, m_dot * (h_out - h0) + potential - duty, key=abs)

    # ---- node profiles, per segment with the boundary node repeated (wall values jump there)
    prof, spans = _node_profiles(
        setups, seg_of_cell, x_node, T, p, dx, D, area, rel_rough, boundary_cells, fluid, m_dot, r_wall, r_ins,
        r_fixed_out, film_mask, air, t_inf, d_outer, wind_speed, emissivity, q_in, T_surface, r_a, u_prime,
        Q_cell, q_loss_cell, tracing_cell + media_cell, dp_friction + dp_fittings + dp_elevation + dp_accel,
    )

    breakdown = PressureDropBreakdown(
        friction_Pa=float(np.sum(dp_friction)),
        fittings_Pa=float(np.sum(dp_fittings)),
        elevation_Pa=float(np.sum(dp_elevation)),
        acceleration_Pa=float(np.sum(dp_accel)),
    )
    wall = prof.inner_wall_temperature_K
    surf = prof.outer_surface_temperature_K
    i_wmax, i_wmin = int(np.argmax(wall)), int(np.argmin(wall))
    surf_exposed = _exposed_mask(setups, prof)
    if surf_exposed.any():
        i_smax = int(np.argmax(np.where(surf_exposed, surf, -np.inf)))
        i_smin = int(np.argmin(np.where(surf_exposed, surf, np.inf)))
        smax, smax_x = float(surf[i_smax]), float(prof.x_m[i_smax])
        smin, smin_x = float(surf[i_smin]), float(prof.x_m[i_smin])
    else:
        smax = smax_x = smin = smin_x = math.nan
    rho_mean_cells = rho
    volume_flow_cells = m_dot / rho_mean_cells
    pump_power = float(np.sum(volume_flow_cells * (dp_friction + dp_fittings + dp_elevation + dp_accel)))
    residence = float(np.sum(dx / velocity))

    checks = _checks(alt, fluid, setups, prof, seg_of_cell, x_mid, Re, Pr, velocity, T_surface, film_mask,
                     t_inf, d_outer, wind_speed, air)
    checks += _no_flow_checks(alt, fluid, setups, seg_of_cell, x_mid, q_in, t_inf, r_out_total)
    checks += _dew_point_checks(setups, prof)
    checks.sort(key=lambda ch: ({"danger": 0, "warning": 1, "info": 2}[ch.severity],
                                ch.x_m if ch.x_m is not None else 0.0))
    checks = [dataclasses.replace(ch, message=render_message(ch.message, None), template=ch.message)
              if "⟦" in ch.message else ch for ch in checks]
    methods = _methods_used(Re, film_mask, kinds, wind_speed, has_fittings)
    return Result(
        name=alt.name,
        fluid_label=fluid.label,
        mass_flow_kg_per_s=m_dot,
        profile=prof,
        segments=spans,
        checks=checks,
        inlet_temperature_K=t_in,
        inlet_pressure_Pa=p_in,
        outlet_temperature_K=float(T[-1]),
        outlet_pressure_Pa=float(p[-1]),
        pressure_drop=breakdown,
        duty_W=duty,
        heat_input_W=heat_input_total,
        heat_input_tracing_W=heat_tracing,
        heat_input_media_W=heat_media,
        heat_loss_W=heat_loss,
        energy_balance_residual_W=float(residual),
        max_inner_wall_temperature_K=float(wall[i_wmax]),
        max_inner_wall_position_m=float(prof.x_m[i_wmax]),
        min_inner_wall_temperature_K=float(wall[i_wmin]),
        min_inner_wall_position_m=float(prof.x_m[i_wmin]),
        max_outer_surface_temperature_K=smax,
        max_outer_surface_position_m=smax_x,
        min_outer_surface_temperature_K=smin,
        min_outer_surface_position_m=smin_x,
        pump_power_W=pump_power,
        residence_time_s=residence,
        velocity_range_m_per_s=(float(np.min(velocity)), float(np.max(velocity))),
        reynolds_range=(float(np.min(Re)), float(np.max(Re))),
        cells=n,
        methods=methods,
    )


# --------------------------------------------------------------------------- pieces


def _cell_edges(length: float, n: int, clustered: bool) -> np.ndarray:
    """Cell edges on [0, L]; near the line inlet cells are clustered where entry effects are steep."""
    s = np.linspace(0.0, 1.0, n + 1)
    if clustered:
        s = s**1.5
    return length * s


def _nusselt_inside(Re, Pr, f, x_over_d, boundary, rel_rough):
    """Inside Nusselt number where the laminar wall condition ('T' or 'q') differs between cells."""
    if isinstance(boundary, str):
        return correlations.nusselt_inside(Re, Pr, f, x_over_d, boundary, relative_roughness=rel_rough)
    kinds = np.unique(boundary)
    if kinds.size == 1:
        return correlations.nusselt_inside(Re, Pr, f, x_over_d, str(kinds[0]), relative_roughness=rel_rough)
    out = np.empty(Re.shape)
    for kind in kinds:
        sel = boundary == kind
        out[sel] = correlations.nusselt_inside(Re[sel], Pr[sel], f[sel], x_over_d[sel], str(kind),
                                               relative_roughness=rel_rough[sel])
    return out


def _linear_recurrence(decay: np.ndarray, gain: np.ndarray, start: float) -> np.ndarray:
    """T[0] = start, T[i+1] = decay[i] T[i] + gain[i], with 0 < decay <= 1.

    Closed form with cumulative products, T[n] = P[n] (start + Σ_{k<n} gain[k] / P[k+1]),
    P[n] = Π_{k<n} decay[k], evaluated in logarithms. The error stays at round-off
    times the number of cells because each term is scaled back by P[n] <= P[k+1].
    Where the products would underflow (a very strongly coupled line) a plain loop
    takes over.
    """
    log_p = np.empty(decay.size + 1)
    log_p[0] = 0.0
    np.cumsum(np.log(decay), out=log_p[1:])
    if log_p[-1] > -600.0:
        inv = np.exp(-log_p[1:])
        acc = np.empty(decay.size + 1)
        acc[0] = start
        np.cumsum(gain * inv, out=acc[1:])
        acc[1:] += start
        return acc * np.exp(log_p)
    out = [start]
    t = start
    for a, b in zip(decay.tolist(), gain.tolist()):
        t = a * t + b
        out.append(t)
    return np.array(out)


def _node_density(fluid, T, p, rho_cells):
    if not fluid.compressible:
        # liquids: the density change along the line is tiny; acceleration from cell densities
        r = np.empty(T.size)
        r[1:-1] = 0.5 * (rho_cells[:-1] + rho_cells[1:])
        r[0], r[-1] = rho_cells[0], rho_cells[-1]
        return r
    return fluid.props(T, p).rho


class _AirAtOneAtmosphere:
    """Air properties at 1 atm on 1 K knots from 150 K to 900 K, from the CoolProp air model.

    Built once per process (the knots are fixed, so it cannot change an answer);
    linear interpolation in temperature is well within 0.1 % for these smooth functions.
    """

    _instance = None

    def __init__(self):
        air = fluid_model(PureFluid(name="Air"))
        self.t_knots = np.arange(150.0, 901.0, 1.0)
        ap = air.props(self.t_knots, np.full(self.t_knots.shape, AMBIENT_PRESSURE_PA))
        self.nu = ap.mu / ap.rho  # kinematic viscosity [m²/s]
        self.alpha = ap.k / (ap.rho * ap.cp)  # thermal diffusivity [m²/s]
        self.k = ap.k
        self.T_min_K, self.T_max_K = 150.0, 900.0

    @classmethod
    def get(cls) -> "_AirAtOneAtmosphere":
        if cls._instance is None:
            cls._instance = cls()
        return cls._instance

    def at(self, t):
        t = _clip(t, self.T_min_K, self.T_max_K)
        tk = self.t_knots
        return np.interp(t, tk, self.nu), np.interp(t, tk, self.alpha), np.interp(t, tk, self.k)


def _air_film(air, t_surface, t_air, d_outer, wind_speed, emissivity):
    """Outer film coefficient in air [W/m²K]: natural (Churchill–Chu) and forced (Churchill–Bernstein)
    convection combined by Churchill's cube rule, plus radiation to surroundings at air temperature."""
    t_film = 0.5 * (t_surface + t_air)
    nu_kin, alpha, k_air = air.at(t_film)
    pr = nu_kin / alpha
    beta = 1.0 / t_film  # ideal gas
    dT = np.maximum(np.abs(t_surface - t_air), 1e-3)
    ra = GRAVITY * beta * dT * d_outer**3 / (nu_kin * alpha)
    nu_nat = correlations.nusselt_churchill_chu_cylinder(ra, pr)
    re = wind_speed * d_outer / nu_kin
    nu_forced = np.where(wind_speed > 0, correlations.nusselt_churchill_bernstein(np.maximum(re, 1e-9), pr), 0.0)
    nu = np.where(wind_speed > 0, correlations.nusselt_mixed(nu_forced, nu_nat), nu_nat)
    h_conv = nu * k_air / d_outer
    h_rad = correlations.radiation_coefficient(t_surface, t_air, emissivity)
    return h_conv + h_rad


def _node_profiles(setups, seg_of_cell, x_node, T, p, dx, D, area, rel_rough, boundary, fluid, m_dot, r_wall,
                   r_ins, r_fixed_out, film_mask, air, t_inf, d_outer, wind_speed, emissivity, q_in, T_surface,
                   r_a_cells, u_cells, Q_cell, q_loss_cell, input_cell, dp_cell):
    """Values at nodes. Each segment contributes its own nodes, so wall values can jump at a boundary."""
    node_index, cell_index = [], []
    start_node = 0
    for s in setups:
        cells = s.cells
        nodes = np.arange(cells[0], cells[-1] + 2)
        node_index.append(nodes)
        # node k of the segment uses the cell downstream of it, the outlet node the cell upstream
        cell_index.append(np.concatenate((cells, [cells[-1]])))
        start_node += nodes.size
    ni = np.concatenate(node_index)
    ci = np.concatenate(cell_index)
    x = x_node[ni]
    Tm = T[ni]
    pn = p[ni]
    pr = fluid.props(Tm, pn)
    Dn = D[ci]
    An = area[ci]
    velocity = m_dot / (pr.rho * An)
    Re = m_dot * Dn / (An * pr.mu)
    Pr = pr.cp * pr.mu / pr.k
    f = correlations.friction_factor(Re, rel_rough[ci])
    # the local coefficient is unbounded at x = 0; report the inlet node at half the first cell
    x_over_d = np.maximum(x, 0.5 * dx[0]) / Dn
    Nu = _nusselt_inside(Re, Pr, f, x_over_d, boundary if isinstance(boundary, str) else boundary[ci], rel_rough[ci])
    h_i = Nu * pr.k / Dn
    r_in = 1.0 / (h_i * math.pi * Dn)
    r_a = r_in + r_wall[ci]
    r_out = r_fixed_out[ci].copy()
    fm = film_mask[ci]
    if air is not None and fm.any():
        h_out = _air_film(air, T_surface[ci][fm], t_inf[ci][fm], d_outer[ci][fm], wind_speed[ci][fm], emissivity[ci][fm])
        r_out[fm] = r_ins[ci][fm] + 1.0 / (h_out * math.pi * d_outer[ci][fm])
    u = np.where(np.isinf(r_out), 0.0, 1.0 / (r_a + r_out))
    tinf = np.nan_to_num(t_inf[ci], nan=0.0)
    q_fluid = q_in[ci] * (1.0 - r_a * u) + u * (tinf - Tm)  # W/m into the fluid at this node
    t_inner_wall = Tm + q_fluid * r_in
    t_heated = Tm + q_fluid * r_a
    q_loss = q_in[ci] - q_fluid
    # the outer surface: over insulation for air/buried; the pipe outer wall for jacket/fixed/adiabatic
    kinds = np.array([s.kind for s in setups])[seg_of_cell[ci]]
    r_ins_n = r_ins[ci]
    t_surface = np.where(np.isin(kinds, ("still_air", "wind", "buried")), t_heated - q_loss * r_ins_n, t_heated)
    t_sat = fluid.saturation_temperature(pn)
    spans = []
    offset = 0
    for s, nodes in zip(setups, node_index):
        cells = s.cells
        k0, k1 = offset, offset + nodes.size - 1
        s.node_range = (k0, k1)
        duty = float(np.sum(Q_cell[cells]))
        heat_in = float(np.sum(input_cell[cells]))
        spans.append(SegmentSpan(
            index=s.index, name=s.name, x_start_m=float(x_node[nodes[0]]), x_end_m=float(x_node[nodes[-1]]),
            inner_diameter_m=s.inner_diameter_m, outer_diameter_m=s.outer_diameter_m, node_start=k0, node_end=k1,
            fittings_K=_segment_K(s, Re[k0:k1 + 1]), duty_W=duty, heat_input_W=heat_in,
            heat_loss_W=heat_in - duty, pressure_drop_Pa=float(np.sum(dp_cell[cells])),
        ))
        offset += nodes.size
    prof = Profile(
        x_m=x, bulk_temperature_K=Tm, inner_wall_temperature_K=t_inner_wall,
        outer_surface_temperature_K=t_surface, pressure_Pa=pn,
        heat_flux_W_per_m2=q_fluid / (math.pi * Dn), heat_to_fluid_W_per_m=q_fluid, heat_loss_W_per_m=q_loss,
        inside_coefficient_W_per_m2K=h_i, reynolds=Re, velocity_m_per_s=velocity, density_kg_per_m3=pr.rho,
        saturation_temperature_K=t_sat,
    )
    return prof, spans


def _segment_K(s: _SegmentSetup, re_nodes: np.ndarray) -> float:
    if not s.fittings:
        return 0.0
    return float(fittings_mod.fittings_K_total(s.fittings, float(np.mean(re_nodes)), s.inner_diameter_m,
                                               field_prefix=f"segments[{s.index}].fittings"))


def _exposed_mask(setups, prof: Profile) -> np.ndarray:
    """Nodes whose outer surface people can touch (in air)."""
    mask = np.zeros(prof.x_m.size, dtype=bool)
    for span, s in zip([s.node_range for s in setups], setups):
        if s.kind in ("still_air", "wind"):
            mask[span[0]:span[1] + 1] = True
    return mask


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
                i = int(np.argmax(bad))
                return i, (f"the liquid reaches boiling ({c(tsat[i])} at {p[i] / 1e5:.3g} bar(a)): two-phase flow is "
                           "outside Calorun's scope. Raise the pressure, or lower the heat input or wall temperature.")
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


def _check_state_in_range(fluid, t, p, alt_name):
    if not (fluid.T_min_K <= t <= fluid.T_max_K):
        raise SolverError(
            f"inlet temperature {t - 273.15:.1f} °C is outside the range of the fluid data "
            f"({fluid.T_min_K - 273.15:.1f} to {fluid.T_max_K - 273.15:.1f} °C) for {fluid.label}",
            alternative=alt_name,
        )


# --------------------------------------------------------------------------- checks


def _T(t: float) -> str:
    """A temperature [K] inside a check message, shown later in the reader's units."""
    return f"⟦T:{float(t):.6f}⟧"


def _dT(d: float) -> str:
    return f"⟦dT:{float(d):.6f}⟧"


def _v(v: float) -> str:
    return f"⟦v:{float(v):.6f}⟧"


def _q(q: float) -> str:
    return f"⟦q:{float(q):.6f}⟧"


def _first_where(mask: np.ndarray):
    idx = np.flatnonzero(mask)
    return int(idx[0]) if idx.size else None


def _checks(alt, fluid, setups, prof, seg_of_cell, x_mid, Re, Pr, velocity, T_surface, film_mask, t_inf, d_outer,
            wind_speed, air) -> list[Check]:
    out: list[Check] = []
    spans = [s.node_range for s in setups]
    Tm = prof.bulk_temperature_K
    Tw = prof.inner_wall_temperature_K
    Ts = prof.outer_surface_temperature_K
    tsat = prof.saturation_temperature_K
    x = prof.x_m

    def per_segment(mask, severity, code, message_fn):
        for s, (a, b) in zip(setups, spans):
            i = _first_where(mask[a:b + 1])
            if i is not None:
                k = a + i
                out.append(Check(severity, code, message_fn(s, k), segment=s.index, x_m=float(x[k])))

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
    for s in setups:
        sel = s.cells
        trans = sel[regime[sel] == 1]
        if trans.size:
            out.append(Check("warning", "TRANSITIONAL_FLOW",
                             f"Transitional flow (Re {Re[trans].min():,.0f} to {Re[trans].max():,.0f}): heat transfer and "
                             "friction are uncertain by tens of percent between Re 2,300 and 10,000.",
                             segment=s.index, x_m=float(x_mid[trans[0]])))

    # velocity (common practice ranges)
    for s in setups:
        sel = s.cells
        v = velocity[sel]
        if fluid.compressible:
            if v.max() > 30.0:
                i = sel[int(np.argmax(v))]
                out.append(Check("warning", "VELOCITY_HIGH",
                                 f"Gas velocity {_v(v.max())} exceeds about {_v(30.0)} (common practice): noise, erosion "
                                 "and a large pressure drop.", segment=s.index, x_m=float(x_mid[i])))
        else:
            if v.max() > 3.0:
                i = sel[int(np.argmax(v))]
                out.append(Check("warning", "VELOCITY_HIGH",
                                 f"Liquid velocity {_v(v.max())} exceeds about {_v(3.0)} (common practice): erosion, noise "
                                 "and pressure surge on valve closure.", segment=s.index, x_m=float(x_mid[i])))
            elif v.min() < 0.3 and not any(ch.code == "VELOCITY_LOW" for ch in out):
                # one note for the line is enough: slow flow is usually a design choice, not a fault
                i = sel[int(np.argmin(v))]
                slow = sum(1 for t in setups if velocity[t.cells].min() < 0.3)
                more = f" ({slow} of {len(setups)} segments)" if len(setups) > 1 else ""
                out.append(Check("info", "VELOCITY_LOW",
                                 f"Liquid velocity {_v(v.min())} is below about {_v(0.3)}{more} (common practice): "
                                 "settling, fouling and poor heat transfer.", segment=s.index, x_m=float(x_mid[i])))

    # surfaces people can touch
    for s, (a, b) in zip(setups, spans):
        if s.kind in ("still_air", "wind"):
            seg_ts = Ts[a:b + 1]
            if seg_ts.max() >= BURN_THRESHOLD_K:
                k = a + int(np.argmax(seg_ts))
                out.append(Check("warning", "HOT_SURFACE",
                                 f"Outer surface reaches {c(Ts[k])}: hot enough to burn on contact (above about {_T(BURN_THRESHOLD_K)}, "
                                 "common practice). Insulate or guard for personnel protection.",
                                 segment=s.index, x_m=float(x[k])))
            if seg_ts.min() <= COLD_CONTACT_K:
                k = a + int(np.argmin(seg_ts))
                out.append(Check("warning", "COLD_SURFACE",
                                 f"Outer surface falls to {c(Ts[k])}: cold enough to injure on contact (below about "
                                 f"{_T(COLD_CONTACT_K)}, common practice). Insulate or guard.", segment=s.index, x_m=float(x[k])))
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

    # correlations outside their validity
    regime_turb = regime == 2
    bad_g = regime_turb & correlations.out_of_range("gnielinski", Re=Re, Pr=Pr)
    bad_l = (regime == 0) & correlations.out_of_range("laminar_entry", Pr=Pr)
    for mask, name in ((bad_g, "Gnielinski"), (bad_l, "laminar entry")):
        for s in setups:
            cells = s.cells
            sel = cells[mask[cells]]
            if sel.size:
                out.append(Check("warning", "CORRELATION_RANGE",
                                 f"The {name} correlation is used outside its published range here "
                                 f"(Re {Re[sel].min():,.0f}–{Re[sel].max():,.0f}, Pr {Pr[sel].min():.3g}–{Pr[sel].max():.3g}).",
                                 segment=s.index, x_m=float(x_mid[sel[0]])))
    if air is not None and film_mask.any():
        t_film = 0.5 * (T_surface + np.nan_to_num(t_inf, nan=293.15))
        nu_kin, alpha, _ = air.at(t_film)
        ra = GRAVITY / t_film * np.abs(T_surface - np.nan_to_num(t_inf, nan=293.15)) * d_outer**3 / (nu_kin * alpha)
        bad_cc = film_mask & (ra > correlations.VALIDITY["churchill_chu"]["Ra"][1])
        for s in setups:
            cells = s.cells
            sel = cells[bad_cc[cells]]
            if sel.size:
                out.append(Check("warning", "CORRELATION_RANGE",
                                 f"Natural convection outside the Churchill–Chu range (Ra up to {ra[sel].max():.2g}).",
                                 segment=s.index, x_m=float(x_mid[sel[0]])))
    out.sort(key=lambda ch: ({"danger": 0, "warning": 1, "info": 2}[ch.severity], ch.x_m if ch.x_m is not None else 0.0))
    return out


def _no_flow_checks(alt, fluid, setups, seg_of_cell, x_mid, q_in, t_inf, r_out_total) -> list[Check]:
    """Where the line would settle if the flow stopped (common practice in tracing design).

    With no flow the fluid in a cell comes to the temperature at which the heat input
    balances the loss through the outside path: T = T∞ + q'_in · R_o (per unit length).
    Compared with the freezing point and the alternative's minimum bulk temperature. The
    outer film is taken at its flowing value, a fair estimate for insulated lines.
    """
    if fluid.compressible:
        return []
    limits = []
    t_freeze = fluid.freezing_temperature(alt.feed.inlet_pressure_Pa)
    if t_freeze is not None and math.isfinite(t_freeze):
        limits.append((t_freeze, "the freezing point"))
    if alt.limits.min_bulk_temperature_K is not None:
        limits.append((alt.limits.min_bulk_temperature_K, "the minimum bulk temperature"))
    if not limits:
        return []
    limit_T, limit_name = max(limits)
    cold, hot = [], []  # (t_eq, segment, cell) per segment
    t_max_wall = alt.limits.max_inner_wall_temperature_K
    for s in setups:
        if s.kind not in ("still_air", "wind", "buried"):
            continue
        cells = s.cells
        t_eq = t_inf[cells] + q_in[cells] * r_out_total[cells]
        i = int(np.argmin(t_eq))
        if t_eq[i] < limit_T:
            cold.append((float(t_eq[i]), s, int(cells[i])))
        j = int(np.argmax(t_eq))
        if t_max_wall is not None and q_in[cells][j] > 0 and t_eq[j] > t_max_wall:
            hot.append((float(t_eq[j]), s, int(cells[j])))
    out = []
    if cold:
        t_eq, s, c = min(cold, key=lambda item: item[0])
        needed = max(max((limit_T - t_inf[cc]) / r_out_total[cc] for _, _, cc in cold), 0.0)
        others = f" {len(cold) - 1} more segment(s) too." if len(cold) > 1 else ""
        out.append(Check(
            "warning", "NO_FLOW_HOLD",
            f"If the flow stops, the line here settles at about {_T(t_eq)} (heat input "
            f"{_q(q_in[c])}), below {limit_name} ({_T(limit_T)}).{others} About {_q(needed)} of "
            "tracing would hold the limit at no flow; or provide drain-down (common practice in tracing design).",
            segment=s.index, x_m=float(x_mid[c])))
    if hot:
        t_eq, s, c = max(hot, key=lambda item: item[0])
        out.append(Check(
            "warning", "NO_FLOW_OVERHEAT",
            f"If the flow stops, the tracing here heats the line to about {_T(t_eq)}, above the "
            f"wall-temperature limit ({_T(t_max_wall)}). Use self-limiting tracing or a controller "
            "(common practice in tracing design).", segment=s.index, x_m=float(x_mid[c])))
    return out


def _dew_point_checks(setups, prof: Profile) -> list[Check]:
    """Moisture condenses on an outer surface colder than the dew point of the surrounding air."""
    out = []
    for s, (a, b) in zip(setups, [s.node_range for s in setups]):
        rh = getattr(s.surroundings, "relative_humidity", None)
        if rh is None or rh <= 0.0:
            continue
        t_dew = float(correlations.dew_point_magnus(s.medium_temperature_K, rh))
        seg_ts = prof.outer_surface_temperature_K[a:b + 1]
        k = int(np.argmin(seg_ts))
        if seg_ts[k] < t_dew:
            out.append(Check(
                "warning", "SURFACE_CONDENSATION",
                f"Outer surface at {_T(seg_ts[k])} is below the dew point of the surrounding air "
                f"({_T(t_dew)} at {100 * rh:.0f} % relative humidity): moisture condenses, wetting the "
                "insulation and corroding the pipe under it. Thicken the insulation or add a vapour barrier.",
                segment=s.index, x_m=float(prof.x_m[a + k])))
    return out


def _methods_used(Re, film_mask, kinds, wind_speed, has_fittings) -> list[str]:
    m = correlations.METHODS
    regime = correlations.flow_regime(Re)
    used = []
    if (regime == 0).any() or (regime == 1).any():
        used.append(f"Laminar inside heat transfer, developing flow: {m['laminar_entry']}")
        used.append(f"Laminar friction factor: {m['laminar_friction']}")
    if (regime == 1).any():
        used.append(f"Friction in transition: {m['friction_transition']}")
        used.append(f"Transition 2,300 < Re < 10,000: {m['transition_blend']}")
    if (regime >= 1).any():
        used.append(f"Turbulent inside heat transfer: {m['gnielinski']}")
        used.append(f"Turbulent friction factor: {m['colebrook']}")
    if film_mask.any():
        used.append(f"Natural convection, horizontal cylinder: {m['churchill_chu']}")
        used.append(f"Thermal radiation to surroundings: {m['radiation']}")
    if (wind_speed > 0).any():
        used.append(f"Wind in cross-flow: {m['churchill_bernstein']}")
        used.append(f"Mixed convection: {m['mixed_convection']}")
    if (kinds == "buried").any():
        used.append(f"Buried pipe: {m['buried_cylinder']}")
    used.append(f"Dew point of surrounding air (when humidity is given): {m['dew_point']}")
    if any(has_fittings):
        used.append(f"Fittings loss coefficients: {fittings_mod._DARBY}; {fittings_mod._HOOPER}; {fittings_mod._CRANE}")
    used.append("Fluid properties: CoolProp (Bell et al. 2014) or user table")
    return used
