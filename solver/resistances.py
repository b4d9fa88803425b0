"""Why a segment loses what it loses: its heat path as resistances in series, per metre of pipe.

From the fluid outwards: inside film, inside fouling, pipe wall (these three lie between the bulk
and the *heated node*, the pipe's outer wall, where tracing enters), then the outside path to the
surroundings: each insulation layer and the outer air film, or the soil, or the jacket film, or the
condensate film and steam-side fouling of steam condensing on the pipe. A wall held at a fixed
temperature has no outside resistance (0); an adiabatic outside an infinite one. The outer air film
is convection and radiation in parallel: each is reported as its own resistance 1/(h·π·D_out), with
the share of the film's heat it carries, under the film they form together. A steam tube tracer is
a separate path from the steam to the heated node, in parallel with everything else; it is reported
beside the series path (its conductance, its steam temperature, the heat it gives), not in it.

Everything is read from the converged march (:class:`solver.state.MarchState`) and the line in
cells (:class:`solver.line.LineGrid`); nothing is solved here. Every solve reduces all segments at
once (``np.add.reduceat`` over the segments' contiguous cells, about 0.5 ms for 60 segments and
7,700 cells on the 2-core machine under load); the labelled per-segment records are built when first
read (:class:`LineResistances`).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Optional

import numpy as np

# Kinds of surroundings whose outside path runs through the insulation (with a jacket or a wall held
# at temperature the insulation plays no part).
_THROUGH_INSULATION = ("still_air", "wind", "buried", "adiabatic")
_IN_AIR = ("still_air", "wind")
#: How a segment's per-cell values are averaged (see :func:`segment_resistances`), for readers of the JSON.
AVERAGING = ("length-mean of each series resistance (parts add up to the mean total); convection and "
             "radiation split the mean air film by their length-mean coefficients")
#: The key of the outer air film, the series part that convection and radiation are branches of.
AIR_FILM = "outer_air_film"


def _json_float(v: float) -> Optional[float]:
    """JSON has no infinity or NaN: an adiabatic outside or a part that does not apply is null."""
    return float(v) if math.isfinite(v) else None


@dataclass(slots=True)
class ResistancePart:
    """One part of a segment's heat path, per metre of pipe.

    A series part has ``share_percent``: its resistance as a share of the series total (the share of
    the temperature drop from the fluid to the surroundings that it takes). A parallel branch
    (convection or radiation under the outer air film) names that part in ``branch_of`` and gives in
    ``carries_percent`` the share of that part's heat it carries; its ``share_percent`` is NaN, for
    it is not a term of the series sum.
    """

    key: str  # inside_film, inside_fouling, pipe_wall, insulation_<k>, outer_air_film, convection, ...
    label: str
    resistance_K_m_per_W: float
    share_percent: float = math.nan
    branch_of: str = ""
    carries_percent: float = math.nan

    @property
    def in_series(self) -> bool:
        return not self.branch_of

    def to_dict(self) -> dict:
        out = {"key": self.key, "label": self.label,
               "resistance_K_m_per_W": _json_float(self.resistance_K_m_per_W)}
        if self.branch_of:
            out["branch_of"] = self.branch_of
            out["carries_percent"] = _json_float(self.carries_percent)
        else:
            out["share_percent"] = _json_float(self.share_percent)
        return out


@dataclass(slots=True)
class TracerPath:
    """Steam tube tracers: a path from the steam to the pipe wall, in parallel with the series path."""

    conductance_W_per_mK: float  # all tubes together, per metre of pipe, as in use (0 where they give no heat)
    steam_temperature_K: float
    heat_W_per_m: float  # what the tracers give to the pipe, per metre

    @property
    def resistance_K_m_per_W(self) -> float:
        return 1.0 / self.conductance_W_per_mK if self.conductance_W_per_mK > 0 else math.inf

    def to_dict(self) -> dict:
        return {"conductance_W_per_mK": self.conductance_W_per_mK,
                "resistance_K_m_per_W": _json_float(self.resistance_K_m_per_W),
                "steam_temperature_K": self.steam_temperature_K, "heat_W_per_m": self.heat_W_per_m}


@dataclass(slots=True)
class SegmentResistances:
    """The heat path of one segment, length-averaged, per metre of pipe [K·m/W], and its heat per metre.

    ``parts`` run from the fluid outwards; the branches of the outer air film follow it. ``total``
    is the series sum from the bulk to the surroundings (``inf`` adiabatic); ``outside`` the part of
    it from the heated node (the pipe's outer wall) to the surroundings, the path the heat loss
    takes. Heat per metre is the segment's heat over its length [W/m]: ``heat_loss`` to the ambient
    (air, soil; negative when the ambient heats the line; 0 for a jacket or a held wall, whose
    exchange is heat input), ``heat_to_fluid``, ``heat_input`` (tracing, steam tracers, heating or
    cooling media). ``outer_film_*`` and ``surface_temperature_K`` are the length-mean air film
    coefficients and outer surface temperature where the air film is computed (NaN elsewhere).
    """

    index: int
    name: str
    kind: str
    length_m: float
    parts: list[ResistancePart]
    total_K_m_per_W: float
    outside_K_m_per_W: float
    heat_loss_W_per_m: float
    heat_to_fluid_W_per_m: float
    heat_input_W_per_m: float
    outer_film_convection_W_per_m2K: float = math.nan
    outer_film_radiation_W_per_m2K: float = math.nan
    surface_temperature_K: float = math.nan
    tracer: Optional[TracerPath] = None

    def series_parts(self) -> list[ResistancePart]:
        return [p for p in self.parts if p.in_series]

    def part(self, key: str) -> ResistancePart:
        for p in self.parts:
            if p.key == key:
                return p
        raise KeyError(f"segment {self.name!r} has no resistance part {key!r}; "
                       f"it has {', '.join(p.key for p in self.parts)}")

    def to_dict(self) -> dict:
        return {
            "segment": self.index,
            "name": self.name,
            "kind": self.kind,
            "parts": [p.to_dict() for p in self.parts],
            "total_K_m_per_W": _json_float(self.total_K_m_per_W),
            "outside_K_m_per_W": _json_float(self.outside_K_m_per_W),
            "heat_loss_W_per_m": self.heat_loss_W_per_m,
            "heat_to_fluid_W_per_m": self.heat_to_fluid_W_per_m,
            "heat_input_W_per_m": self.heat_input_W_per_m,
            "outer_film_convection_W_per_m2K": _json_float(self.outer_film_convection_W_per_m2K),
            "outer_film_radiation_W_per_m2K": _json_float(self.outer_film_radiation_W_per_m2K),
            "surface_temperature_K": _json_float(self.surface_temperature_K),
            "tracer": self.tracer.to_dict() if self.tracer is not None else None,
            "averaging": AVERAGING,
        }


# rows of the per-cell table reduced over the segments in one call
(_R_IN, _R_FOUL, _R_WALL, _R_INS, _R_FILM, _H_CONV, _H_RAD, _R_OTHER, _R_COND, _R_SFOUL, _G_TR, _Q_TR, _T_SURF,
 _Q, _Q_IN) = range(15)


def segment_resistances(line, state) -> "LineResistances":
    """One :class:`SegmentResistances` per segment of the converged line, in flow order (a sequence).

    Averaging along a segment. Each *series* resistance is length-averaged as it is
    (R̄ = Σ R·dx / L). That keeps the series sum meaningful: the mean of a sum is the sum of the
    means, so the parts add up exactly to the length-mean total and their shares to 100 %. (Averaging
    each part's conductance 1/R and inverting would weight every part differently, and the inverted
    parts would no longer add up to any total of the segment.) The *parallel* branches of the outer air
    film are combined per cell first (h_conv + h_rad), that film resistance averaged like the other
    series parts, and the split of the mean film between the branches taken from their length-mean
    coefficients, which are what add in parallel: R_conv = R̄_film·(h̄_conv + h̄_rad)/h̄_conv and the
    same for radiation, so 1/R_conv + 1/R_rad = 1/R̄_film exactly. Within a segment the coefficients
    vary only through temperature and the entrance region, so the means are close to any local value.

    The heat per metre is taken from the march's own cell heats, so it is the segment's figure in
    the Result (``SegmentSpan.heat_loss_W`` / length), not a re-estimate from the resistances.
    """
    starts = line.seg_first_cell
    n = line.n
    dx = line.dx
    segs = line.segments
    seg_kind = [s.kind for s in segs]
    counts = line.cells_per_seg
    film = np.asarray(line.film_mask, dtype=bool)
    # per-cell masks spread from the segments (comparing the cells' kind strings costs more)
    through_ins = np.repeat([k in _THROUGH_INSULATION for k in seg_kind], counts)
    in_air = np.repeat([k in _IN_AIR for k in seg_kind], counts)
    buried = np.repeat([k == "buried" for k in seg_kind], counts)
    jacket = np.repeat([k == "jacket" for k in seg_kind], counts)

    rows = np.zeros((15, n))
    rows[_R_IN] = state.r_in
    rows[_R_FOUL] = line.r_foul
    rows[_R_WALL] = line.r_wall
    rows[_R_INS] = np.where(through_ins, line.r_ins, 0.0)
    if film.any():
        # whole-array operations: masked gathers and scatters cost more on lines that are mostly in air
        hc, hr = rows[_H_CONV], rows[_H_RAD]
        np.copyto(hc, state.h_conv_out, where=film)
        np.copyto(hr, state.h_rad_out, where=film)
        g_film = (hc + hr) * (math.pi * line.d_outer)
        np.divide(1.0, g_film, out=rows[_R_FILM], where=film)
        np.copyto(rows[_T_SURF], state.T_surface, where=film)
    # outside parts that do not depend on temperature: a film entered for air, the soil (both after the
    # insulation, which r_fixed_out includes), a jacket film; a held wall is 0 and adiabatic is inf
    r_fixed = line.r_fixed_out
    fixed_after_ins = ~film & np.isfinite(r_fixed) & (in_air | buried)
    rows[_R_OTHER] = np.where(fixed_after_ins, r_fixed - line.r_ins, 0.0)
    rows[_R_OTHER, jacket] = r_fixed[jacket]
    cond = np.asarray(line.cond_mask, dtype=bool)
    if cond.any():
        rows[_R_COND, cond] = state.r_cond[cond]
        rows[_R_SFOUL, cond] = line.r_steam_foul[cond]
    if line.any_tracer:
        rows[_G_TR] = state.g_tracer  # in use: 0 where the pipe is as hot as the steam and it gives nothing
        rows[_Q_TR] = state.q_tracer
    sums = np.add.reduceat(np.multiply(rows, dx, out=rows), starts, axis=1)
    # the cell heats are already per cell [W], not per metre
    sums[_Q] = np.add.reduceat(state.Q_cell, starts)
    sums[_Q_IN] = np.add.reduceat(state.q_heater * dx, starts)  # electric heaters as delivered
    length = np.add.reduceat(dx, starts)
    sums[:_Q] /= length
    t_tracer = np.asarray(line.t_tracer, dtype=float)[starts]
    segments = tuple((s.index, s.name, s.kind, tuple(s.layer_resistances), s.tracer_conductance > 0.0) for s in segs)
    return LineResistances(segments, sums, length, t_tracer, line.wind_speed[starts] > 0.0)


class LineResistances(Sequence):
    """The line's :class:`SegmentResistances`, one per segment in flow order (a read-only sequence).

    Every solve reduces its cells to per-segment means (a few arrays); the records with their labelled
    parts are built when a segment is first read (the Segment Card reads one, the JSON and the report
    all), so a solve nobody inspects pays only for the arrays. It holds no reference to the line's
    cells.
    """

    __slots__ = ("_segments", "_table", "_length", "_t_tracer", "_wind", "_built")

    def __init__(self, segments, table, length, t_tracer, wind):
        # (index, name, kind, ((material, K·m/W) per layer), has a steam tracer) per segment
        self._segments = segments
        self._table = table  # rows as the module's row constants: means up to _Q, then sums [W]
        self._length = length
        self._t_tracer = t_tracer
        self._wind = wind
        self._built: list = [None] * len(segments)

    def __len__(self) -> int:
        return len(self._segments)

    def __getitem__(self, i):
        if isinstance(i, slice):
            return [self[k] for k in range(*i.indices(len(self)))]
        rec = self._built[i]
        if rec is None:
            rec = self._built[i] = self._build(i if i >= 0 else i + len(self))
        return rec

    def __repr__(self) -> str:
        return f"LineResistances({list(self)!r})"

    def _build(self, i: int) -> SegmentResistances:
        index, name, kind, layers, has_tracer = self._segments[i]
        col = self._table[:, i].tolist()
        L = float(self._length[i])
        parts: list[tuple[str, str, float]] = [("inside_film", "Inside film", col[_R_IN])]
        if col[_R_FOUL] > 0.0:
            parts.append(("inside_fouling", "Inside fouling", col[_R_FOUL]))
        parts.append(("pipe_wall", "Pipe wall", col[_R_WALL]))
        inner = sum(r for _, _, r in parts)  # bulk to heated node
        if kind in _THROUGH_INSULATION:
            parts += _insulation_parts(layers, col[_R_INS])
        branches: list[ResistancePart] = []
        h_conv = h_rad = t_surf = math.nan
        if kind in _IN_AIR and col[_R_FILM] > 0.0:
            r_film = col[_R_FILM]
            h_conv, h_rad, t_surf = col[_H_CONV], col[_H_RAD], col[_T_SURF]
            parts.append((AIR_FILM, "Outer air film (convection ∥ radiation)", r_film))
            h_sum = h_conv + h_rad
            for key, label, h in (("convection", "Convection (wind)" if self._wind[i] else "Convection (natural)",
                                   h_conv), ("radiation", "Radiation", h_rad)):
                branches.append(ResistancePart(key, label, r_film * h_sum / h if h > 0.0 else math.inf,
                                               branch_of=AIR_FILM, carries_percent=100.0 * h / h_sum))
        elif kind in _IN_AIR:
            parts.append(("outer_film_entered", "Outer film (as entered)", col[_R_OTHER]))
        elif kind == "buried":
            parts.append(("soil", "Soil", col[_R_OTHER]))
        elif kind == "jacket":
            parts.append(("jacket_film", "Jacket film", col[_R_OTHER]))
        elif kind == "fixed_wall" and col[_R_COND] > 0.0:
            fouling = col[_R_SFOUL]
            parts.append(("condensate_film", "Condensate film", max(col[_R_COND] - fouling, 0.0)))
            if fouling > 0.0:
                parts.append(("steam_fouling", "Steam-side fouling", fouling))
        elif kind == "fixed_wall":
            parts.append(("wall_held", "Wall held at temperature", 0.0))
        else:  # adiabatic
            parts.append(("adiabatic", "No exchange (adiabatic)", math.inf))
        total = sum(r for _, _, r in parts)
        series = [ResistancePart(key, label, r, _share(r, total)) for key, label, r in parts]
        if branches:
            k = next(j for j, p in enumerate(series) if p.key == AIR_FILM)
            series[k + 1:k + 1] = branches
        duty = col[_Q]
        heat_in = col[_Q_IN]
        tracer = None
        if has_tracer:
            tracer = TracerPath(col[_G_TR], float(self._t_tracer[i]), col[_Q_TR])
            heat_in += col[_Q_TR] * L
        if kind in ("jacket", "fixed_wall"):
            heat_in = duty  # the medium's heat is heat input; nothing goes to the ambient
        return SegmentResistances(
            index=index, name=name, kind=kind, length_m=L, parts=series,
            total_K_m_per_W=total, outside_K_m_per_W=total - inner,
            heat_loss_W_per_m=(heat_in - duty) / L, heat_to_fluid_W_per_m=duty / L, heat_input_W_per_m=heat_in / L,
            outer_film_convection_W_per_m2K=h_conv, outer_film_radiation_W_per_m2K=h_rad,
            surface_temperature_K=t_surf, tracer=tracer,
        )


def _share(r: float, total: float) -> float:
    """Percent of the series total; with an infinite total (adiabatic) the infinite part takes it all."""
    if math.isinf(total):
        return 100.0 if math.isinf(r) else 0.0
    return 100.0 * r / total if total > 0.0 else 0.0


def _insulation_parts(layers, r_ins_mean: float) -> list[tuple[str, str, float]]:
    """Each insulation layer, innermost first, labelled by its material.

    The layers' own resistances give the split; they are scaled to the insulation resistance the
    march used along the segment (the same unless that changes along it), so the parts add up to it.
    """
    if not layers:
        return []
    r_sum = sum(r for _, r in layers)
    scale = r_ins_mean / r_sum if r_sum > 0.0 else 1.0
    many = len(layers) > 1
    out = []
    for k, (material, r) in enumerate(layers, start=1):
        name = (material or "insulation").strip()
        label = f"Insulation {k}: {name}" if many else f"Insulation: {name}"
        out.append((f"insulation_{k}", label, r * scale))
    return out
