"""The line set up for the march: segments resolved into numbers, then into cells.

One :class:`LineGrid` holds everything about the line that does not depend on
the temperature: per-cell geometry, wall and insulation resistances, heat
input, the surroundings' temperature and the fixed part of the outside path,
and the fittings' loss coefficients. The cells of all segments are
concatenated in flow order; a segment's cells are contiguous, so each segment
carries a slice into the cell arrays (and one into the profile's nodes, where
every segment repeats its boundary node so that wall values can jump there).
"""

from __future__ import annotations

import copy
import functools
import math
from dataclasses import dataclass, field

import numpy as np

from solver import catalogue, correlations, fittings as fittings_mod, heat_sinks as heat_sinks_mod, insulation, steam
from solver.errors import InputError
from solver.factors import NEUTRAL, MethodFactors
from solver.model import (Adiabatic, Alternative, Buried, ConstantHeater, FixedWall, Jacket, SelfLimitingHeater,
                          StillAir, ThermostatHeater, Wind)

GRAVITY = 9.80665  # m/s², standard gravity (CGPM 1901)
AMBIENT_PRESSURE_PA = 101_325.0  # air around the line, standard atmosphere
#: A run in air rising more than this share of its length (sin 45°) loses heat as a vertical surface.
STEEP_RISE_RATIO = math.sin(math.radians(45.0))


@dataclass
class SegmentSetup:
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
    cells: slice = field(default_factory=lambda: slice(0, 0))  # this segment's cells in the line's cell arrays
    nodes: slice = field(default_factory=lambda: slice(0, 0))  # its nodes in the profile (boundary nodes repeated)
    fittings_loss: object = None  # fittings.FittingsLoss at this bore, when there are fittings
    layer_resistances: list = field(default_factory=list)  # (material, K·m/W) per insulation layer, innermost first
    insulation_layers: tuple = ()  # the model's layers where one takes the catalogue k(T) and carries heat
    inside_fouling_resistance: float = 0.0  # K·m/W
    soil_resistance: float = 0.0  # K·m/W (buried only)
    jacket_resistance: float = 0.0  # K·m/W (jacket film only)
    steam_pressure_Pa: float = math.nan  # condensing steam on the pipe (fixed wall by steam pressure)
    steam_fouling_resistance: float = 0.0  # K·m/W on the steam side
    tracer_conductance: float = 0.0  # W/(m·K), all steam tracers of the segment together
    tracer_temperature_K: float = math.nan  # saturation temperature of the tracer steam
    vertical_length_m: float = 0.0  # height of a steep run in air (natural convection as a vertical surface)
    entry_origin_m: float = 0.0  # where this segment's entry length starts, along the line; inf = developed
    entry_developing: bool = True  # velocity develops with the temperature (False: thermal entry only)
    heater_kind: str = ""  # "constant", "self_limiting", "thermostat"; "" without a heater
    heater_constant_W_per_m: float = 0.0  # constant heater's output per metre of pipe
    heater_full_W_per_m: float = 0.0  # thermostat heater's full output per metre of pipe
    heater_slope_W_per_mK: float = 0.0  # self-limiting: output falls by this per K of pipe temperature, per m of pipe
    heater_zero_output_K: float = 0.0  # self-limiting: the pipe temperature where its output reaches zero
    set_point_K: float = math.nan  # thermostat set point
    sinks: heat_sinks_mod.SinkTotals = field(default_factory=heat_sinks_mod.SinkTotals)
    sink_bare_as_insulated: bool = False  # buried or jacket: bare sink length taken as insulated pipe


@dataclass
class LineGrid:
    """The line in cells: per-cell arrays (length n, flow order) that do not change while marching.

    Resistances are per metre of pipe [K·m/W]; ``r_fixed_out`` is the whole outside path where it
    does not depend on temperature (``inf`` adiabatic, 0 fixed wall); where ``film_mask`` is set the
    outer air film is computed from the surface temperature and added to ``r_ins``. ``boundary`` is
    the laminar wall condition, ``'T'`` or ``'q'`` for the whole line or one per cell. Fittings on a
    segment give K(Re) = ``k_a``/Re + ``k_b`` (one pair per segment).
    """

    segments: list[SegmentSetup]
    seg_of_cell: np.ndarray  # index of the segment of each cell
    dx: np.ndarray  # cell length [m]
    x_node: np.ndarray  # the n + 1 cell edges along the line [m]
    x_mid: np.ndarray  # cell centres [m]
    D: np.ndarray  # bore [m]
    area: np.ndarray  # flow area [m²]
    rel_rough: np.ndarray  # ε/D [-]
    r_wall: np.ndarray
    r_ins: np.ndarray  # where a layer takes the catalogue k(T), the march sets it (and r_fixed_out) every pass
    q_in: np.ndarray  # constant heater output at the pipe's outer wall [W/m of pipe] (thermostats: see q_thermostat)
    t_inf: np.ndarray  # surroundings' temperature [K]; NaN for adiabatic
    d_outer: np.ndarray  # diameter facing the surroundings [m]
    dz: np.ndarray  # rise over the cell [m]
    length_cell_share: np.ndarray  # cell length / segment length
    kinds: np.ndarray  # surroundings kind of each cell
    boundary: object  # 'T', 'q' or an array of them per cell
    r_fixed_out: np.ndarray
    film_mask: np.ndarray
    wind_speed: np.ndarray  # [m/s]
    emissivity: np.ndarray  # [-]
    k_a: np.ndarray  # per segment
    k_b: np.ndarray  # per segment
    seg_first_cell: np.ndarray  # per segment
    cells_per_seg: np.ndarray  # per segment
    has_fittings: list[bool] = field(default_factory=list)  # per segment
    r_foul: np.ndarray = None  # inside fouling [K·m/W]
    cond_mask: np.ndarray = None  # condensing steam on the pipe (coefficient from the wall temperature)
    steam_pressure: np.ndarray = None  # [Pa], NaN where no condensing steam
    r_steam_foul: np.ndarray = None  # steam-side fouling [K·m/W]
    d_pipe_outer: np.ndarray = None  # pipe outside diameter [m]
    g_tracer: np.ndarray = None  # steam tracer conductance [W/(m·K)], 0 without
    t_tracer: np.ndarray = None  # tracer steam temperature [K], 0 without
    vertical_length: np.ndarray = None  # [m] height of a steep run in air, 0 elsewhere
    x0_entry: np.ndarray = None  # cell start, distance from where its entry length starts [m]; inf developed
    x1_entry: np.ndarray = None  # cell end, likewise
    developing: np.ndarray = None  # per cell: velocity develops too (simultaneous entry)
    # heaters (per cell, W/m of pipe): a thermostat's full output (times its segment's duty); a self-limiting
    # heater's slope s [W/(m·K)] and zero-output temperature T0 [K]: q = s·(T0 − T_h) while T_h < T0
    q_thermostat: np.ndarray = None
    s_heater: np.ndarray = None
    t0_heater: np.ndarray = None
    thermostat_segments: np.ndarray = None  # indices of segments with a thermostat heater
    set_points: np.ndarray = None  # their set points [K]
    # heat sinks, spread evenly over their segment's cells, per metre of pipe: metres of insulated pipe (a
    # multiple of the outside path's conductance), metres of bare pipe (air film at the pipe's outer
    # diameter), direct conductance [W/(m·K)]
    sink_insulated_ratio: np.ndarray = None
    sink_bare_ratio: np.ndarray = None
    sink_direct: np.ndarray = None
    sink_bare_film: np.ndarray = None  # the film entered for the surroundings [W/(m²·K)]; NaN = computed
    entry_origin: np.ndarray = None  # per segment: where its entry length starts along the line [m]; inf developed

    @property
    def any_self_limiting(self) -> bool:
        return bool(np.any(self.s_heater > 0.0))

    @property
    def any_thermostat(self) -> bool:
        return self.thermostat_segments is not None and self.thermostat_segments.size > 0

    @property
    def any_sink(self) -> bool:
        return bool(np.any(self.sink_insulated_ratio > 0.0) or np.any(self.sink_bare_ratio > 0.0)
                    or np.any(self.sink_direct > 0.0))

    @property
    def n(self) -> int:
        """Cells along the line (per variant, when variants are stacked: solver.batch)."""
        return self.dx.shape[-1]

    @property
    def any_fittings(self) -> bool:
        return any(self.has_fittings)

    @property
    def any_tracer(self) -> bool:
        return bool(np.any(self.g_tracer > 0.0))

    def segment_at(self, i_node: int) -> SegmentSetup:
        """The segment of cell edge ``i_node`` (the outlet edge belongs to the last cell)."""
        return self.segments[int(self.seg_of_cell[min(i_node, self.n - 1)])]


def build_line(alt: Alternative, refine: float, cells_per_segment: int | None,
               factors: MethodFactors = NEUTRAL) -> LineGrid:
    """Resolve the alternative's segments and lay them out in cells; see :class:`LineGrid`.

    ``factors`` scales the insulation and soil conductivities, the jacket film, the tracer contact
    and the fittings (the uncertainty bands; all 1 in an ordinary solve).
    """
    setups = _resolve_segments(alt, factors)
    _entry_origins(setups, alt.feed.inlet_flow)
    _cells_for(setups, refine, cells_per_segment)

    counts = np.array([s.n_cells for s in setups])
    seg_of_cell = np.repeat(np.arange(len(setups)), counts)
    first = first_node = 0
    for s in setups:
        s.cells = slice(first, first + s.n_cells)
        s.nodes = slice(first_node, first_node + s.n_cells + 1)
        first += s.n_cells
        first_node += s.n_cells + 1
    dx, x_node = _cells_along(setups, counts, seg_of_cell)
    x_mid = 0.5 * (x_node[:-1] + x_node[1:])

    def per_cell(attr):
        return np.array([getattr(s, attr) for s in setups], dtype=float)[seg_of_cell]

    D = per_cell("inner_diameter_m")
    seg_len = per_cell("length_m")
    kinds = np.array([s.kind for s in setups])[seg_of_cell]
    boundary = np.where(kinds == "fixed_wall", "T", "q")

    # outside path pieces that do not depend on temperature, per segment, then spread over its cells
    r_fixed_seg = [math.inf] * len(setups)  # inf for adiabatic
    film_seg = [False] * len(setups)  # air film computed from temperature
    wind_seg = [0.0] * len(setups)
    emissivity_seg = [0.0] * len(setups)
    for s in setups:
        i = s.index
        sur = s.surroundings
        if isinstance(sur, Adiabatic):
            r_fixed_seg[i] = math.inf
        elif isinstance(sur, FixedWall):
            r_fixed_seg[i] = 0.0
        elif isinstance(sur, Jacket):
            r_fixed_seg[i] = s.jacket_resistance
        elif isinstance(sur, Buried):
            r_fixed_seg[i] = s.insulation_resistance + s.soil_resistance
        elif isinstance(sur, (StillAir, Wind)):
            if sur.film_coefficient_W_per_m2K is not None:
                r_fixed_seg[i] = s.insulation_resistance + 1.0 / (sur.film_coefficient_W_per_m2K * math.pi * s.outer_diameter_m)
            else:
                film_seg[i] = True
            emissivity_seg[i] = sur.emissivity
            if isinstance(sur, Wind):
                wind_seg[i] = sur.wind_speed_m_per_s
    kinds_steam = np.array([math.isfinite(s.steam_pressure_Pa) for s in setups], dtype=bool)[seg_of_cell]
    r_fixed_out = np.array(r_fixed_seg, dtype=float)[seg_of_cell]
    film_mask = np.array(film_seg, dtype=bool)[seg_of_cell]
    wind_speed = np.array(wind_seg, dtype=float)[seg_of_cell]
    emissivity = np.array(emissivity_seg, dtype=float)[seg_of_cell]

    # fittings: K(Re) = A/Re + B per segment (both 2-K and 3-K methods have this form at a fixed bore)
    k_a = np.zeros(len(setups))
    k_b = np.zeros(len(setups))
    for s in setups:
        if s.fittings:
            s.fittings_loss = fittings_mod.fittings_loss(s.fittings, s.inner_diameter_m,
                                                         field_prefix=f"segments[{s.index}].fittings")
            k_a[s.index], k_b[s.index] = s.fittings_loss.a, s.fittings_loss.b
    if factors.fittings != 1.0:
        k_a, k_b = k_a * factors.fittings, k_b * factors.fittings

    # entry lengths: each cell's edges measured from where its entry starts (inf: fully developed)
    origin = per_cell("entry_origin_m")
    x0_entry = x_node[:-1] - origin
    x1_entry = x_node[1:] - origin
    if np.isinf(origin).any():
        developed = np.isinf(origin)
        x0_entry[developed] = np.inf
        x1_entry[developed] = np.inf

    return LineGrid(
        segments=setups,
        seg_of_cell=seg_of_cell,
        dx=dx,
        x_node=x_node,
        x_mid=x_mid,
        D=D,
        area=0.25 * math.pi * D**2,
        rel_rough=per_cell("roughness_m") / D,
        r_wall=per_cell("wall_resistance"),
        r_ins=per_cell("insulation_resistance"),
        q_in=per_cell("heater_constant_W_per_m"),
        t_inf=per_cell("medium_temperature_K"),
        d_outer=per_cell("outer_diameter_m"),
        dz=per_cell("elevation_change_m") * dx / seg_len,
        length_cell_share=dx / seg_len,
        kinds=kinds,
        boundary=str(boundary[0]) if (boundary == boundary[0]).all() else boundary,
        r_fixed_out=r_fixed_out,
        film_mask=film_mask,
        wind_speed=wind_speed,
        emissivity=emissivity,
        k_a=k_a,
        k_b=k_b,
        seg_first_cell=np.cumsum([0] + [s.n_cells for s in setups[:-1]]),
        cells_per_seg=counts,
        has_fittings=[bool(s.fittings) for s in setups],
        r_foul=per_cell("inside_fouling_resistance"),
        cond_mask=kinds_steam,
        steam_pressure=per_cell("steam_pressure_Pa"),
        r_steam_foul=per_cell("steam_fouling_resistance"),
        d_pipe_outer=per_cell("pipe_outer_diameter_m"),
        g_tracer=per_cell("tracer_conductance"),
        t_tracer=np.nan_to_num(per_cell("tracer_temperature_K"), nan=0.0),
        vertical_length=per_cell("vertical_length_m") * film_mask,
        x0_entry=x0_entry,
        x1_entry=x1_entry,
        developing=np.array([s.entry_developing for s in setups], dtype=bool)[seg_of_cell],
        entry_origin=np.array([s.entry_origin_m for s in setups], dtype=float),
        **_heater_and_sink_cells(setups, seg_of_cell),
    )


def with_heaters(line: LineGrid, alt: Alternative) -> LineGrid | None:
    """``line`` with the heaters of ``alt``'s segments, without building it anew; None when that would
    change more than the heater arrays.

    For variants that differ from the line's alternative only in their heaters (a search on heater output):
    the same segments otherwise (the very same pipe, insulation, surroundings, fittings and heat sinks) and
    the same kind of heater, on where it was on. The heaters then change the heater numbers of the segment
    set-ups and the heater arrays; the cells, the entry lengths and everything else stay.
    """
    if len(alt.segments) != len(line.segments):
        return None
    setups = []
    for s, seg in zip(line.segments, alt.segments):
        numbers = _heater_numbers(seg.heater)
        if (numbers.get("heater_kind", "") != s.heater_kind
                or (seg.heat_input_W_per_m > 0.0) != (s.heat_input_W_per_m > 0.0)):
            return None
        new = copy.copy(s)  # (dataclasses.replace re-runs __init__: ten times slower here)
        new.heat_input_W_per_m = seg.heat_input_W_per_m
        new.__dict__.update(numbers)
        setups.append(new)
    out = copy.copy(line)
    out.__dict__.update(_heater_and_sink_cells(setups, line.seg_of_cell))
    out.segments = setups
    out.q_in = np.array([s.heater_constant_W_per_m for s in setups], dtype=float)[line.seg_of_cell]
    return out


def same_but_heaters(a: Alternative, b: Alternative) -> bool:
    """Whether ``b``'s segments are ``a``'s (the same objects) except for their heaters, with the same feed's
    entry condition: what :func:`with_heaters` can reuse a line for."""
    if len(a.segments) != len(b.segments) or a.feed.inlet_flow != b.feed.inlet_flow:
        return False
    for sa, sb in zip(a.segments, b.segments):
        if sa is sb:
            continue
        for name in type(sa).model_fields:
            if name != "heater" and getattr(sa, name) is not getattr(sb, name):
                return False
    return True


def _heater_and_sink_cells(setups: list[SegmentSetup], seg_of_cell: np.ndarray) -> dict:
    """LineGrid's heater and heat-sink arrays (zeros where a line has none: no per-segment work then)."""
    n = seg_of_cell.size
    thermo = [s for s in setups if s.heater_kind == "thermostat"]
    out = {"thermostat_segments": np.array([s.index for s in thermo], dtype=int),
           "set_points": np.array([s.set_point_K for s in thermo], dtype=float)}
    if thermo:
        out["q_thermostat"] = np.array([s.heater_full_W_per_m for s in setups])[seg_of_cell]
    else:
        out["q_thermostat"] = np.zeros(n)
    if any(s.heater_kind == "self_limiting" for s in setups):
        sl = np.array([(s.heater_slope_W_per_mK, s.heater_zero_output_K) for s in setups])[seg_of_cell]
        out["s_heater"], out["t0_heater"] = sl[:, 0].copy(), sl[:, 1].copy()
    else:
        out["s_heater"], out["t0_heater"] = np.zeros(n), np.zeros(n)
    if any(s.sinks.any for s in setups):
        rows = np.array([
            ((s.sinks.insulated_equivalent_length_m
              + (s.sinks.bare_equivalent_length_m if s.sink_bare_as_insulated else 0.0)) / s.length_m,
             0.0 if s.sink_bare_as_insulated else s.sinks.bare_equivalent_length_m / s.length_m,
             s.sinks.direct_W_per_K / s.length_m,
             _entered_film(s.surroundings)) for s in setups])[seg_of_cell]
        for k, key in enumerate(("sink_insulated_ratio", "sink_bare_ratio", "sink_direct", "sink_bare_film")):
            out[key] = rows[:, k].copy()
    else:
        out.update(sink_insulated_ratio=np.zeros(n), sink_bare_ratio=np.zeros(n), sink_direct=np.zeros(n),
                   sink_bare_film=np.full(n, np.nan))
    return out


def _entered_film(sur) -> float:
    """The outer film coefficient a user entered for air [W/(m²·K)]; NaN where it is computed or not in air."""
    h = getattr(sur, "film_coefficient_W_per_m2K", None) if isinstance(sur, (StillAir, Wind)) else None
    return math.nan if h is None else float(h)


def _resolve_segments(alt: Alternative, factors: MethodFactors = NEUTRAL) -> list[SegmentSetup]:
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
        layers = []
        layers_kt = ()
        if not isinstance(sur, (FixedWall, Jacket)) and insulation.uses_table(seg.insulation):
            # a layer without its own k takes the catalogue k(T): a first value between the feed's and the
            # surroundings' temperatures; the march sets it from each pass's temperatures (solver.insulation)
            t_out = getattr(sur, "temperature_K", getattr(sur, "soil_temperature_K", alt.feed.inlet_temperature_K))
            r_total, r_parts = insulation.layer_resistances(
                seg.insulation, d_po, alt.feed.inlet_temperature_K, t_out, factors.insulation_conductivity,
                f"{prefix}.insulation")
            layers = [(layer.material, float(r)) for layer, r in zip(seg.insulation, r_parts)]
            r_ins = float(r_total)
            d = d_po + 2.0 * sum(layer.thickness_m for layer in seg.insulation)
            layers_kt = tuple(seg.insulation) if isinstance(sur, (StillAir, Wind, Buried)) else ()
        elif not isinstance(sur, (FixedWall, Jacket)):
            for layer in seg.insulation:
                d_next = d + 2.0 * layer.thickness_m
                r_layer = _cylinder_resistance(d, d_next, layer.conductivity_W_per_mK * factors.insulation_conductivity)
                layers.append((layer.material, r_layer))
                r_ins += r_layer
                d = d_next
        steam_p = math.nan
        r_steam_foul = 0.0
        r_soil = 0.0
        r_jacket = 0.0
        if isinstance(sur, (StillAir, Wind)):
            t_inf = sur.temperature_K
        elif isinstance(sur, Buried):
            t_inf = sur.soil_temperature_K
            if sur.depth_m <= d / 2:
                raise InputError(
                    f"{prefix}.surroundings.depth_m", sur.depth_m,
                    f"the pipe centreline must lie deeper than its outer radius ({d / 2:.3f} m)",
                )
            r_soil = _buried_resistance(d, sur.depth_m, sur.soil_conductivity_W_per_mK * factors.soil_conductivity)
        elif isinstance(sur, Jacket):
            t_inf = sur.medium_temperature_K
            r_jacket = 1.0 / (sur.film_coefficient_W_per_m2K * factors.jacket_film * math.pi * d_po)
        elif isinstance(sur, FixedWall):
            if sur.wall_temperature_K is not None:
                t_inf = sur.wall_temperature_K
            else:
                t_inf = _steam_temperature(sur.steam_pressure_Pa, f"{prefix}.surroundings.steam_pressure_Pa")
                steam_p = sur.steam_pressure_Pa
                r_steam_foul = sur.steam_side_fouling_m2K_per_W / (math.pi * d_po)
        else:  # adiabatic
            t_inf = math.nan
        g_tracer, t_tracer = 0.0, math.nan
        if seg.steam_tracer is not None:
            tr = seg.steam_tracer
            t_tracer = _steam_temperature(tr.steam_pressure_Pa, f"{prefix}.steam_tracer.steam_pressure_Pa")
            g_tracer = tr.count * factors.tracer_conductance * steam.tracer_conductance_W_per_mK(
                tr.contact, tr.tube_outer_diameter_m)
        # a steep run in air loses heat like a vertical surface of its height, not a horizontal cylinder
        steep = abs(seg.elevation_change_m) > STEEP_RISE_RATIO * seg.length_m
        heater = _heater_numbers(seg.heater)
        sinks = heat_sinks_mod.sink_conductances(seg, d_po)
        # heat sinks with a held wall or an adiabatic outside are refused by the model (Segment), on entry
        setups.append(
            SegmentSetup(
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
                layer_resistances=layers,
                insulation_layers=layers_kt,
                inside_fouling_resistance=seg.inside_fouling_m2K_per_W / (math.pi * d_in),
                soil_resistance=r_soil,
                jacket_resistance=r_jacket,
                steam_pressure_Pa=steam_p,
                steam_fouling_resistance=r_steam_foul,
                tracer_conductance=g_tracer,
                tracer_temperature_K=t_tracer,
                vertical_length_m=abs(seg.elevation_change_m) if steep else 0.0,
                sinks=sinks,
                # under soil or in a jacket a bare item has no air film of its own: it loses like insulated pipe
                sink_bare_as_insulated=isinstance(sur, (Buried, Jacket)),
                **heater,
            )
        )
    return setups


def _heater_numbers(heater) -> dict:
    """The heater as numbers per metre of pipe, for SegmentSetup (see its heater fields)."""
    if heater is None:
        return {}
    if isinstance(heater, ConstantHeater):
        return {"heater_kind": "constant", "heater_constant_W_per_m": heater.full_output_per_pipe_metre}
    if isinstance(heater, ThermostatHeater):
        return {"heater_kind": "thermostat", "heater_full_W_per_m": heater.full_output_per_pipe_metre,
                "set_point_K": heater.set_point_K}
    if isinstance(heater, SelfLimitingHeater):
        return {"heater_kind": "self_limiting", "heater_slope_W_per_mK": heater.slope_W_per_mK,
                "heater_zero_output_K": heater.zero_output_temperature_K}
    raise TypeError(f"unknown heater {type(heater).__name__}")


def _steam_temperature(p_steam: float, field_name: str) -> float:
    """Saturation temperature of steam at ``p_steam`` [K]; an InputError naming the field outside water's range."""
    return steam.saturation_temperature_K(p_steam, field_name)


def _entry_origins(setups: list[SegmentSetup], inlet_flow: str) -> None:
    """Where each segment's entry length starts (DESIGN: the entry rule).

    * The first segment: at the line inlet when the flow develops from there (fed from a vessel
      or header: velocity and temperature develop together); nowhere (fully developed) when the
      flow arrives developed from long upstream piping.
    * A change of bore restarts both (the flow re-develops after a reducer).
    * A change of the wall's thermal condition — another kind of surroundings, or heat input
      (tracing, steam tracer) switched on or off — restarts the thermal entry only: the velocity
      profile is already developed there.
    * Otherwise the entry carries on from the segment before: a run of like segments is one entry.
    """
    x = 0.0
    for k, s in enumerate(setups):
        if k == 0:
            if inlet_flow == "developed":
                s.entry_origin_m, s.entry_developing = math.inf, False
            else:
                s.entry_origin_m, s.entry_developing = 0.0, True
        else:
            prev = setups[k - 1]
            if not math.isclose(s.inner_diameter_m, prev.inner_diameter_m, rel_tol=1e-9):
                s.entry_origin_m, s.entry_developing = x, True
            elif _thermal_condition(s) != _thermal_condition(prev):
                s.entry_origin_m, s.entry_developing = x, False
            else:
                s.entry_origin_m, s.entry_developing = prev.entry_origin_m, prev.entry_developing
        x += s.length_m


def _thermal_condition(s: SegmentSetup) -> tuple:
    """What the entry rule compares between neighbours: the surroundings' kind and whether heat is put in."""
    return (s.kind, s.heat_input_W_per_m > 0.0 or s.tracer_conductance > 0.0)


@functools.lru_cache(maxsize=1024)
def _buried_resistance(d_outer: float, depth: float, k_soil: float) -> float:
    """correlations.buried_cylinder_resistance as a float, remembered by its three values (a pure
    function of them, so a remembered value is the one it would compute again)."""
    return float(correlations.buried_cylinder_resistance(d_outer, depth, k_soil))


def _cylinder_resistance(d_inner: float, d_outer: float, k: float) -> float:
    """Conduction through a cylindrical layer per unit length, ln(Do/Di)/(2πk) [K·m/W] (closed form;
    the scalar twin of correlations.cylinder_wall_resistance, which validates arrays)."""
    return math.log(d_outer / d_inner) / (2.0 * math.pi * k) if d_outer > d_inner else 0.0


def _cells_for(setups: list[SegmentSetup], refine: float, cells_per_segment: int | None) -> None:
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


def _cells_along(setups: list[SegmentSetup], counts: np.ndarray, seg_of_cell: np.ndarray):
    """Cell lengths and the n + 1 cell edges along the whole line [m], all segments at once.

    Within a segment the edges are at s·L for s = i/n; where an entry length starts at the
    segment's inlet, s is replaced by s² so the cells cluster where the entry effects are steep (the
    inside coefficient is singular at an entry start; s² keeps the bulk there grid-independent to
    well under 0.01 K on the sample projects, s^1.5 did not).
    """
    n = int(counts.sum())
    first_cell = np.concatenate([[0], np.cumsum(counts)[:-1]])
    local = np.arange(n) - np.repeat(first_cell, counts)  # position of each cell within its segment
    step = 1.0 / counts.astype(float)
    lo = local * step[seg_of_cell]
    hi = (local + 1) * step[seg_of_cell]
    hi[local == counts[seg_of_cell] - 1] = 1.0  # the last edge exactly at the segment's end
    x_start = np.empty(len(setups))
    acc = 0.0
    for s in setups:  # sums in flow order, as the segments are laid end to end
        x_start[s.index] = acc
        acc += s.length_m
    clustered = np.array([s.entry_origin_m == x_start[s.index] for s in setups], dtype=bool)[seg_of_cell]
    lo = np.where(clustered, lo * lo, lo)
    hi = np.where(clustered, hi * hi, hi)
    seg_len = np.array([s.length_m for s in setups], dtype=float)[seg_of_cell]
    dx = seg_len * hi - seg_len * lo
    x_node = np.empty(n + 1)
    x_node[0] = 0.0
    x_node[1:] = x_start[seg_of_cell] + seg_len * hi
    return dx, x_node
