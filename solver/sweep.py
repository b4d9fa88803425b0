"""Sweep: vary one parameter over a list of values (or two, as a grid) and read key figures against it.

:func:`sweep` yields the variants in chunks as they solve, so a plot can grow while the rest is being
solved; each chunk is one :func:`solver.batch.solve_batch` call. :func:`sweep_csv` writes the table
with the units in the header ("Outlet temperature [°C]").
"""

from __future__ import annotations

import csv
import io
import math
from typing import Callable, Iterator, Optional, Sequence

from solver.errors import InputError
from solver.model import Alternative, DesignCases
from solver.results import KEY_FIGURE_BY_KEY
from solver.target_finder import DESIGN_FIGURE_LABELS, figures_of
from solver.variants import PARAMETER_KINDS, Parameter, Variant, make_variants, si_unit, solve_prepared

#: unit_of(quantity, system) -> (label, scale, offset): display = SI · scale + offset (app.units.unit gives
#: objects with these attributes; a tuple does too).
UnitOf = Callable[[str, str], object]



def sweep(alt: Alternative, parameter: Parameter, values: Sequence, *, parameter2: Optional[Parameter] = None,
          values2: Optional[Sequence] = None, chunk: int = 50, design: Optional[DesignCases] = None,
          progress: Optional[Callable[[int, int], None]] = None,
          cancelled: Optional[Callable[[], bool]] = None) -> Iterator[list[Variant]]:
    """Solve ``alt`` at each value of ``parameter`` (with ``parameter2``: at each pair of ``values`` ×
    ``values2``, the first parameter outer), yielding the variants in order, ``chunk`` at a time.

    Key figures only (no profiles); ``design`` adds the design cases (for the worst-case and hold-time
    figures). A value the model refuses is a variant with ``alternative`` None and the InputError as its
    outcome's error. ``progress(done, total)`` after each chunk; ``cancelled()`` True stops before the next
    chunk (and inside one, between variants).
    """
    if parameter2 is not None and values2 is None:
        raise InputError("values2", None, "a second parameter needs its own values")
    if chunk < 1:
        raise InputError("chunk", chunk, "must be at least 1")
    prepared = make_variants(alt, parameter, list(values), parameter2, list(values2) if values2 is not None else None)
    total = len(prepared)
    done = 0
    for start in range(0, total, chunk):
        if cancelled is not None and cancelled():
            return
        part = prepared[start:start + chunk]
        variants = solve_prepared(part, design=design, cancelled=cancelled)
        done += len(variants)
        if variants:
            yield variants
        if progress is not None:
            progress(done, total)
        if len(variants) < len(part):  # cancelled inside the chunk
            return


def figure_label(key: str) -> tuple[str, str]:
    """(label, quantity) of a figure a sweep can tabulate: a key figure or a design figure."""
    if key in DESIGN_FIGURE_LABELS:
        return DESIGN_FIGURE_LABELS[key]
    try:
        kf = KEY_FIGURE_BY_KEY[key]
    except KeyError:
        known = ", ".join([*KEY_FIGURE_BY_KEY, *DESIGN_FIGURE_LABELS])
        raise InputError("figures", key, f"no such figure; known: {known}") from None
    if kf.part_of:  # "tracing" alone says little in a table: "Heat input: tracing"
        return f"{KEY_FIGURE_BY_KEY[kf.part_of].label}: {kf.label}", kf.quantity
    return kf.label, kf.quantity


def _unit(quantity: str, system: str, unit_of: Optional[UnitOf]) -> tuple[str, float, float]:
    if unit_of is not None:
        u = unit_of(quantity, system)
        if isinstance(u, tuple):
            return u
        return u.label, u.scale, u.offset
    return si_unit(quantity)


def _header(label: str, unit_label: str) -> str:
    return f"{label} [{unit_label}]" if unit_label else label


def _number(value, scale: float, offset: float) -> str:
    if value is None:
        return ""
    value = float(value)
    if math.isinf(value):
        return "inf" if value > 0 else "-inf"
    if not math.isfinite(value):
        return ""
    return repr(value * scale + offset)


def sweep_csv(variants: Sequence[Variant], parameter: Parameter, figures: list[str], system: str = "SI",
              parameter2: Optional[Parameter] = None, unit_of: Optional[UnitOf] = None) -> str:
    """The sweep as CSV: a header with the units ("Heater output [W/m]", "Outlet temperature [°C]"), one row per
    variant, the parameter value(s) first, then the figures, then "error" (why a variant has no figures).

    Numbers are plain (machine-readable, full precision) in the display units: the engineer's SI (°C,
    bar(a), kPa, mm, kW ...) unless ``unit_of(quantity, system)`` gives others (the app passes
    ``app.units.unit`` for the user's system). A bore is written as its NPS text.
    """
    params = [p for p in (parameter, parameter2) if p is not None]
    heads, units = [], []
    for p in params:
        if p.kind == "bore":
            heads.append("Bore [NPS]")
            units.append(None)
        else:
            u = _unit(p.quantity, system, unit_of)
            heads.append(_header(PARAMETER_KINDS[p.kind], u[0]))
            units.append(u)
    fig_units = []
    for key in figures:
        label, quantity = figure_label(key)
        u = _unit(quantity, system, unit_of)
        heads.append(_header(label, u[0]))
        fig_units.append(u)
    heads.append("error")
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(heads)
    for v in variants:
        row = []
        for value, u in zip((v.value, v.value2)[:len(params)], units):
            row.append(str(value) if u is None else _number(value, u[1], u[2]))
        figs = figures_of(v) or {}
        for key, u in zip(figures, fig_units):
            row.append(_number(figs.get(key), u[1], u[2]))
        row.append("" if v.outcome.ok else str(v.outcome.error))
        writer.writerow(row)
    return out.getvalue()


def pick(alt: Alternative, parameter: Parameter, variants: Sequence[Variant], picked: Variant, *,
         parameter2: Optional[Parameter] = None, targets: Sequence = (), figures: Optional[Sequence[str]] = None,
         searched: str = "") -> tuple[Alternative, dict]:
    """A point picked from a Sweep, made an alternative: (the alternative, named after what changed —
    "Trace 15 W/m — heater 25 W/m" —, and its provenance record, a SearchRecord of solver.model as a dict).

    ``variants``: the sweep (its points are kept in the record with ``figures``, default every key figure;
    non-finite figures are left out); ``targets``: the Targets drawn on the plot (the binding one is the
    least margin at the point); ``searched``: the words for what was swept (default: the parameter(s) and the
    range of values).
    """
    from solver.target_finder import answer_name

    if picked.alternative is None or not picked.ok:
        raise InputError("picked", picked.value, f"the point has no solution to keep: {picked.outcome.error}")
    name = answer_name(alt, parameter, picked.value)
    if parameter2 is not None:
        name = answer_name(alt.model_copy(update={"name": name}), parameter2, picked.value2)
    new = picked.alternative.model_copy(update={"name": name})
    if not searched:
        parts = [f"{parameter.label(alt)} from {parameter.value_text(_first(variants, 'value'))} to "
                 f"{parameter.value_text(_last(variants, 'value'))}"]
        if parameter2 is not None:
            parts.append(f"{parameter2.label(alt)} from {parameter2.value_text(_first(variants, 'value2'))} to "
                         f"{parameter2.value_text(_last(variants, 'value2'))}")
        searched = " × ".join(parts) + f": {len(variants)} variants"
    margins = [(t.relative_margin(t.margin(picked)), t) for t in targets if not math.isnan(t.margin(picked))]
    binding = min(margins, key=lambda p: p[0])[1] if margins else None
    value_text = parameter.value_text(picked.value)
    if parameter2 is not None:
        value_text += f", {parameter2.value_text(picked.value2)}"
    points = []
    for v in variants:
        figs = figures_of(v) or {}
        keys = figures if figures is not None else [k for k in figs if k in KEY_FIGURE_BY_KEY]
        kept = {k: float(figs[k]) for k in keys if isinstance(figs.get(k), (int, float)) and math.isfinite(figs[k])}
        points.append({"value": _swept(v.value), "value2": _swept(v.value2), "figures": kept})
    record = {
        "tool": "Sweep",
        "base_alternative": alt.name,
        "parameter": parameter.to_dict(),
        "parameter_text": parameter.label(alt),
        "parameter2": parameter2.to_dict() if parameter2 is not None else None,
        "parameter2_text": parameter2.label(alt) if parameter2 is not None else "",
        "searched": searched,
        "targets": [t.text() for t in targets],
        "target_limits": [t.to_dict() for t in targets],
        "binding": binding.text() if binding is not None else "",
        "value_text": value_text,
        "value": _swept(picked.value),
        "value2": _swept(picked.value2),
        "explanation": "",
        "sweep_points": points,
    }
    return new, record


def _swept(value):
    return None if value is None else (value if isinstance(value, str) else float(value))


def _first(variants, attr):
    return getattr(variants[0], attr)


def _last(variants, attr):
    return getattr(variants[-1], attr)
