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

import functools
import math
from dataclasses import dataclass, field

import numpy as np

from solver import catalogue, correlations, fittings as fittings_mod
from solver.errors import InputError
from solver.model import Adiabatic, Alternative, Buried, FixedWall, Jacket, PureFluid, StillAir, Wind
from solver.properties import fluid_model

GRAVITY = 9.80665  # m/s², standard gravity (CGPM 1901)
AMBIENT_PRESSURE_PA = 101_325.0  # air around the line, standard atmosphere


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
    r_ins: np.ndarray
    q_in: np.ndarray  # heat input at the pipe's outer wall [W/m]
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

    @property
    def n(self) -> int:
        return self.dx.size

    @property
    def any_fittings(self) -> bool:
        return any(self.has_fittings)

    def segment_at(self, i_node: int) -> SegmentSetup:
        """The segment of cell edge ``i_node`` (the outlet edge belongs to the last cell)."""
        return self.segments[int(self.seg_of_cell[min(i_node, self.n - 1)])]


def build_line(alt: Alternative, refine: float, cells_per_segment: int | None) -> LineGrid:
    """Resolve the alternative's segments and lay them out in cells; see :class:`LineGrid`."""
    setups = _resolve_segments(alt)
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
            r_fixed_seg[i] = 1.0 / (sur.film_coefficient_W_per_m2K * math.pi * s.pipe_outer_diameter_m)
        elif isinstance(sur, Buried):
            r_fixed_seg[i] = s.insulation_resistance + _buried_resistance(
                s.outer_diameter_m, sur.depth_m, sur.soil_conductivity_W_per_mK)
        elif isinstance(sur, (StillAir, Wind)):
            if sur.film_coefficient_W_per_m2K is not None:
                r_fixed_seg[i] = s.insulation_resistance + 1.0 / (sur.film_coefficient_W_per_m2K * math.pi * s.outer_diameter_m)
            else:
                film_seg[i] = True
            emissivity_seg[i] = sur.emissivity
            if isinstance(sur, Wind):
                wind_seg[i] = sur.wind_speed_m_per_s
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
        q_in=per_cell("heat_input_W_per_m"),
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
    )


def _resolve_segments(alt: Alternative) -> list[SegmentSetup]:
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
            )
        )
    return setups


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

    Each segment's edges are those of :func:`_cell_edges` (the same numbers: ``np.linspace``
    is ``i · (1/n)`` with the last edge exactly 1), offset by the lengths of the segments
    before it; only the first segment, clustered, is laid out on its own.
    """
    n = int(counts.sum())
    first = setups[0]
    edges0 = _cell_edges(first.length_m, first.n_cells, clustered=True)
    dx = np.empty(n)
    x_node = np.empty(n + 1)
    x_node[0] = 0.0
    m = first.n_cells
    dx[:m] = np.diff(edges0)
    x_node[1:m + 1] = edges0[1:]  # x_start 0.0 + edges, as for every segment
    if len(setups) > 1:
        rest = seg_of_cell[m:]
        # position of each later cell within its segment: 0 .. n_cells - 1
        local = np.arange(m, n) - np.repeat(np.cumsum(counts)[:-1], counts[1:])
        length = np.array([s.length_m for s in setups], dtype=float)
        step = 1.0 / counts.astype(float)  # linspace's step for one segment
        lo = local * step[rest]  # linspace(0, 1, k + 1)[local] (+ 0.0 start changes nothing)
        hi = (local + 1) * step[rest]
        last = local == counts[rest] - 1
        hi[last] = 1.0  # linspace sets its end point exactly
        seg_len = length[rest]
        edge_hi = seg_len * hi
        dx[m:] = edge_hi - seg_len * lo
        x_start = []
        acc = 0.0
        for s in setups:  # sums in flow order, as the segments are laid end to end
            x_start.append(acc)
            acc += s.length_m
        x_node[m + 1:] = np.array(x_start)[rest] + edge_hi
    return dx, x_node


def _cell_edges(length: float, n: int, clustered: bool) -> np.ndarray:
    """Cell edges on [0, L]; near the line inlet cells are clustered where entry effects are steep."""
    s = np.linspace(0.0, 1.0, n + 1)
    if clustered:
        s = s**1.5
    return length * s
