"""Solve many variants of a line together (Sweep, Target Finder, Line List).

:func:`solve_batch` takes a list of alternatives and returns one :class:`BatchOutcome` per
alternative, in order. Variants whose lines have the same cell layout (the same fluid, the same
cells per segment, the same kinds of surroundings, heaters and fittings) are marched together:
their cell arrays are stacked along a new first axis and every pass of the march works on all of
them at once (:func:`solver.march._march` with ``feed``); each variant keeps the state of the pass
where it alone would have stopped, so its answer is the answer of a solve of its own. What cannot
be marched together is solved one by one with :func:`solver.march.solve`: a gas (choking), a
thermostat (per-segment duty iteration), insulation with a temperature-dependent conductivity, a
group of one, and any group whose stacked march fails — then each of its variants is solved on
its own, which says what failed where. A variant that fails carries its error; the others are not
affected.

With ``profiles=False`` ("key figures only") each outcome has the key figures but no Result: the
node profiles the extremes need are computed, the checks, the heat-path resistances and the
methods list are not. ``profiles=True`` gives the full Result, equal to :func:`solver.march.solve`'s.
"""

from __future__ import annotations

import json
import logging
import os
from concurrent.futures import ThreadPoolExecutor, as_completed
from dataclasses import dataclass, fields
from typing import Callable, Optional, Sequence

import numpy as np

from solver.errors import CalorunError
from solver.factors import NEUTRAL
from solver.line import LineGrid, build_line
from solver.model import Alternative, DesignCases

log = logging.getLogger(__name__)

#: Cells marched together at most (a group of more variants goes in chunks; beyond about this many the
#: arrays outgrow the processor caches and nothing is gained).
MAX_STACK_CELLS = 60_000


@dataclass
class BatchOutcome:
    """One variant's answer: its key figures (SI, keys of ``Result.key_figures()``), the full Result
    when profiles were asked for, or the error that stopped it (then both are None)."""

    key_figures: Optional[dict] = None
    result: object = None  # solver.results.Result when profiles=True
    error: Optional[CalorunError] = None
    together: bool = False  # marched together with others (False: solved on its own)

    @property
    def ok(self) -> bool:
        return self.error is None


def solve_batch(alternatives: Sequence[Alternative], *, profiles: bool = False, design: DesignCases | None = None,
                progress: Callable[[int, int], None] | None = None,
                cancelled: Callable[[], bool] | None = None, threads: int | None = None) -> list[BatchOutcome]:
    """Solve every alternative; see the module docstring. ``design`` evaluates the design cases too
    (each variant then gets ``result.design``; such variants are solved one by one, with profiles).
    ``progress(done, total)`` is called as variants finish; ``cancelled()`` returning True stops the
    work early (the outcomes not reached are missing: the list is shorter). ``threads``: how many chunks of
    stacked variants march at once (None: one per processor core; 1: one after the other)."""
    total = len(alternatives)
    out: list[Optional[BatchOutcome]] = [None] * total
    done = 0

    def finish(i: int, outcome: BatchOutcome) -> None:
        nonlocal done
        out[i] = outcome
        done += 1
        if progress is not None:
            progress(done, total)

    groups, alone = ({}, list(range(total))) if design is not None else _groups(alternatives)
    chunks = []
    for members in groups.values():
        step = max(1, MAX_STACK_CELLS // max(1, members[0][1].n))
        chunks.extend(members[start:start + step] for start in range(0, len(members), step))
    alone.extend(i for chunk in chunks if len(chunk) == 1 for i, *_ in chunk)
    chunks = [c for c in chunks if len(c) > 1]
    workers = min(len(chunks), threads if threads is not None else (os.cpu_count() or 1))
    if workers > 1:
        # numpy lets go of the interpreter lock inside its array operations, which are most of a stacked
        # march: chunks on threads use the other cores. Each chunk is marched on its own, so the answers
        # do not depend on the number of threads.
        with ThreadPoolExecutor(max_workers=workers) as pool:
            pending = {pool.submit(_march_together, alternatives, chunk, profiles): chunk for chunk in chunks}
            for future in as_completed(pending):
                solved = future.result()
                if solved is None:
                    alone.extend(i for i, *_ in pending[future])
                    continue
                for i, outcome in solved:
                    finish(i, outcome)
                if cancelled is not None and cancelled():
                    for f in pending:
                        f.cancel()
                    break
    else:
        for chunk in chunks:
            if cancelled is not None and cancelled():
                break
            solved = _march_together(alternatives, chunk, profiles)
            if solved is None:
                alone.extend(i for i, *_ in chunk)
                continue
            for i, outcome in solved:
                finish(i, outcome)
    for i in sorted(alone):
        if cancelled is not None and cancelled():
            break
        finish(i, _solve_alone(alternatives[i], profiles, design))
    # a cancelled run returns the outcomes reached, in order, up to the first one missing
    result = []
    for o in out:
        if o is None:
            break
        result.append(o)
    return result


def _solve_alone(alt: Alternative, profiles: bool, design) -> BatchOutcome:
    from solver.march import solve

    try:
        result = solve(alt, design=design)
    except CalorunError as exc:
        return BatchOutcome(error=exc)
    return BatchOutcome(key_figures=result.key_figures(), result=result if (profiles or design is not None) else None)


# --------------------------------------------------------------------------- grouping


def _groups(alternatives: Sequence[Alternative]):
    """Variants that can march together, by layout: {key: [(index, line, fluid, m_dot, h0)]}; and the
    indices of those that cannot (solved on their own).

    Set-up is shared where variants share it: one fluid model per fluid, one feed check and inlet state
    per feed, one line per set of segments, and a line whose variants differ only in their heaters is
    reused with the heaters changed (:func:`solver.line.with_heaters`).
    """
    from solver import insulation, march
    from solver.line import same_but_heaters, with_heaters
    from solver.properties import fluid_model

    groups: dict = {}
    alone: list[int] = []
    fluids: dict = {}  # id(fluid) -> (fluid, key, model)
    feeds: dict = {}
    lines: dict = {}
    template = None  # (alternative, line) of the last line built
    for i, alt in enumerate(alternatives):
        try:
            known = fluids.get(id(alt.fluid))
            if known is None or known[0] is not alt.fluid:
                fkey = json.dumps(alt.fluid.model_dump(mode="json"), sort_keys=True)
                model = next((m for _, k, m in fluids.values() if k == fkey), None) or fluid_model(alt.fluid)
                known = fluids[id(alt.fluid)] = (alt.fluid, fkey, model)
            _, fkey, fluid = known
            feed = alt.feed
            t_in, p_in = feed.inlet_temperature_K, feed.inlet_pressure_Pa
            fk = (fkey, t_in, p_in, feed.phase, feed.mass_flow_kg_per_s, feed.volume_flow_m3_per_s)
            if fk not in feeds:
                march._check_state_in_range(fluid, t_in, alt.name)
                march._check_liquid_model(fluid, p_in, alt.name)
                march._check_feed_phase(alt, fluid)
                liquid, gas = march.feed_sides(fluid, t_in, p_in)
                props_in = fluid.props(np.array([t_in]), np.array([p_in]))
                m_dot = feed.mass_flow_kg_per_s if feed.mass_flow_kg_per_s is not None else \
                    feed.volume_flow_m3_per_s * float(props_in.rho[0])
                feeds[fk] = (liquid, gas, m_dot, float(props_in.h[0]))
            liquid, gas, m_dot, h0 = feeds[fk]
            if gas:
                alone.append(i)
                continue
            lkey = (tuple(id(s) for s in alt.segments), feed.inlet_flow)
            line = lines.get(lkey)
            if line is None:
                if template is not None and same_but_heaters(template[0], alt):
                    line = with_heaters(template[1], alt)
                if line is None:
                    line = build_line(alt, 1.0, None, NEUTRAL)
                    template = (alt, line)
                lines[lkey] = line
            if line.any_thermostat or insulation.any_on_line(line):
                alone.append(i)
                continue
        except Exception:  # noqa: BLE001 - whatever it is, the solve on its own reports it properly
            alone.append(i)
            continue
        key = (fkey, liquid, tuple(line.cells_per_seg.tolist()), line.film_mask.tobytes(), line.cond_mask.tobytes(),
               tuple(line.kinds.tolist()), str(line.boundary) if isinstance(line.boundary, str)
               else line.boundary.tobytes(), line.developing.tobytes(), tuple(line.has_fittings),
               line.any_self_limiting, line.any_sink, line.any_tracer, bool(np.isinf(line.x0_entry).any()))
        groups.setdefault(key, []).append((i, line, fluid, m_dot, h0))
    return groups, alone


# --------------------------------------------------------------------------- marching together

_SHARED = {"segments", "seg_of_cell", "seg_first_cell", "cells_per_seg", "has_fittings", "boundary",
           "thermostat_segments", "set_points"}


def stack_lines(lines: Sequence[LineGrid]) -> LineGrid:
    """One LineGrid whose cell and segment arrays are the variants' stacked along a new first axis."""
    first = lines[0]
    kw = {}
    for f in fields(LineGrid):
        value = getattr(first, f.name)
        if f.name in _SHARED or not isinstance(value, np.ndarray):
            kw[f.name] = value
        else:
            kw[f.name] = np.stack([getattr(g, f.name) for g in lines])
    return LineGrid(**kw)


class _Stacked:
    """A fluid model taking states of any shape (the models work on flat arrays)."""

    def __init__(self, fluid):
        self._f = fluid

    @property
    def __class__(self):  # isinstance() sees the model's class
        return type(self._f)

    def __getattr__(self, name):
        return getattr(self._f, name)

    def props(self, T, p):
        T, p = np.broadcast_arrays(np.asarray(T, float), np.asarray(p, float))
        out = self._f.props(T.ravel(), p.ravel())
        return type(out)(*(np.reshape(v, T.shape) for v in out))

    def enthalpy(self, T, p):
        T, p = np.broadcast_arrays(np.asarray(T, float), np.asarray(p, float))
        return np.reshape(self._f.enthalpy(T.ravel(), p.ravel()), T.shape)

    def speed_of_sound(self, T, p):
        T, p = np.broadcast_arrays(np.asarray(T, float), np.asarray(p, float))
        a = self._f.speed_of_sound(T.ravel(), p.ravel())
        return None if a is None else np.reshape(a, T.shape)

    def saturation_temperature(self, p):
        p = np.asarray(p, float)
        return np.reshape(self._f.saturation_temperature(p.ravel()), p.shape)


def _march_together(alternatives, members, profiles: bool):
    """March ``members`` (one layout group) together; None when that fails (then each is solved alone)."""
    from solver.march import _march
    from solver.profiles import line_result, stacked_key_figures

    idx = [m[0] for m in members]
    lines = [m[1] for m in members]
    fluid = members[0][2]
    alts = [alternatives[i] for i in idx]
    m_dot = np.array([m[3] for m in members])[:, None]
    h0 = np.array([m[4] for m in members])[:, None]
    t_in = np.array([a.feed.inlet_temperature_K for a in alts])[:, None]
    p_in = np.array([a.feed.inlet_pressure_Pa for a in alts])[:, None]
    try:
        with np.errstate(all="ignore"):
            stacked, stacked_fluid = stack_lines(lines), _Stacked(fluid)
            state = _march(alts[0], stacked_fluid, stacked, m_dot, h0, 60, 1e-3, NEUTRAL, {}, feed=(t_in, p_in))
    except Exception as exc:  # noqa: BLE001 - any failure: the variants are solved one by one, which says what and where
        _fell_back(exc)
        return None
    out = []
    if not profiles:
        try:
            with np.errstate(all="ignore"):
                figures = stacked_key_figures(alts, stacked_fluid, stacked, state)
        except Exception as exc:  # noqa: BLE001 - as above
            _fell_back(exc)
            return None
        return [(i, BatchOutcome(key_figures=kf, together=True)) for i, kf in zip(idx, figures)]
    for v, (i, line) in enumerate(zip(idx, lines)):
        sv = _row(state, v)
        try:
            result = line_result(alts[v], fluid, line, sv, None)
        except CalorunError as exc:
            out.append((i, BatchOutcome(error=exc, together=True)))
            continue
        out.append((i, BatchOutcome(key_figures=result.key_figures(), result=result if profiles else None,
                                    together=True)))
    return out


def _fell_back(exc: Exception) -> None:
    """A stacked march that failed: a solver refusal is expected (the one-by-one solves say which variant and
    why); anything else may be a bug of the stacked path, so it is logged with its traceback rather than hidden
    (the answers stay right: the variants are solved one by one)."""
    if not isinstance(exc, (CalorunError, FloatingPointError, ZeroDivisionError, OverflowError)):
        log.warning("variants could not be marched together; solving them one by one", exc_info=exc)


def _row(state, v: int):
    """Variant ``v``'s MarchState out of a stacked one."""
    from solver.state import MarchState

    kw = {}
    for f in fields(MarchState):
        value = getattr(state, f.name)
        if isinstance(value, np.ndarray):
            value = value[v]
            if f.name in ("m_dot", "h_in"):
                value = float(value[0])
        elif isinstance(value, dict):
            value = {k: a[v] for k, a in value.items()}
        kw[f.name] = value
    return MarchState(**kw)
