"""Where an alternative came from: the Target Finder's answer or a point picked from a Sweep.

A :class:`solver.model.SearchRecord` (``Alternative.origin``) says what was varied, over what range,
against which targets, which target binds and the value found; a Sweep's record keeps its points.
This module makes such a record from a sweep pick (:func:`sweep_record`; the finder's comes from
``FinderResult.record()``), words the feasible band of a sweep (:func:`feasible_runs`,
:func:`feasible_words`), and writes the report's section (:func:`search_section`) with the sweep
plot (:func:`sweep_chart`), drawn like the profile charts.

No physics here. The top of the module imports no Qt (the ``find`` and ``sweep`` commands use the
words); only the report's section and chart do, when called.
"""

from __future__ import annotations

import math
import re
from typing import Callable, Optional, Sequence

from app import units
from app import texts
from app.texts import esc, shorten
from solver.errors import InputError

#: What a search record written by another version (or for an alternative edited since) can raise when it is
#: read back: the report then words it as the record wrote it. Anything else is a bug and is raised.
_RECORD_ERRORS = (InputError, ValueError, TypeError, KeyError, IndexError)
from solver.model import NAME_MAX_CHARS, MAX_POINT_FIGURES, MAX_SWEEP_POINTS, Alternative, SearchRecord, SweepPoint
from solver.results import KEY_FIGURE_BY_KEY, KEY_FIGURES

#: Target kind (solver.target_finder.TARGET_KINDS) -> the key figure it is judged on, for drawing it on a
#: Sweep's plot. The design-case targets (worst case, hold time) are judged on the design cases, not on a
#: key figure, and are not drawn.
TARGET_FIGURES: dict[str, str] = {
    "outlet_min": "outlet_temperature_K",
    "outlet_max": "outlet_temperature_K",
    "bulk_min": "min_bulk_temperature_K",
    "inner_wall_max": "max_inner_wall_temperature_K",
    "surface_max": "max_outer_surface_temperature_K",
    "heat_loss_per_m_max": "max_heat_loss_per_length_W_per_m",
    "pressure_drop_max": "pressure_drop_Pa",
}
#: Target kind -> the quantity of its value and margin (app.units names); margins are differences.
TARGET_QUANTITIES: dict[str, str] = {
    "outlet_min": "temperature", "outlet_max": "temperature", "bulk_min": "temperature",
    "inner_wall_max": "temperature", "surface_max": "temperature", "worst_case_bulk_min": "temperature",
    "heat_loss_per_m_max": "power_per_length", "pressure_drop_max": "pressure_difference", "hold_time_min": "time",
}
_DIFFERENCE = {"temperature": "temperature_difference"}
#: Target kind -> the few words a chart's limit line is labelled with ("max surface 50.0 °C").
TARGET_SHORT: dict[str, str] = {
    "outlet_min": "min outlet", "outlet_max": "max outlet", "bulk_min": "min bulk", "inner_wall_max": "max wall",
    "surface_max": "max surface", "heat_loss_per_m_max": "max loss", "pressure_drop_max": "max \u0394p",
}

#: The figures a Sweep shows when none are chosen: what a tracing or insulation design is judged by.
DEFAULT_FIGURES: tuple[str, ...] = ("outlet_temperature_K", "min_bulk_temperature_K", "max_inner_wall_temperature_K",
                                    "max_outer_surface_temperature_K")
#: At most this many curves per panel of the report's sweep plot (one per figure and second value).
MAX_CURVES = 8


# --------------------------------------------------------------------------- words


def target_kind(target) -> str:
    """The kind of a target (a solver.target_finder.Target or its dict)."""
    return target.get("kind", "") if isinstance(target, dict) else getattr(target, "kind", "")


def target_figure(target) -> str:
    """The key figure a target is judged on, or '' (design-case targets: not a key figure)."""
    spec = getattr(target, "spec", None)
    figure = getattr(spec, "figure", None) if spec is not None else TARGET_FIGURES.get(target_kind(target))
    return figure if figure in KEY_FIGURE_BY_KEY else ""


def _target_quantity(target) -> str:
    spec = getattr(target, "spec", None)
    return getattr(spec, "quantity", None) or TARGET_QUANTITIES.get(target_kind(target), "dimensionless")


def margin_text(target, margin: Optional[float], system: str) -> str:
    """A target's margin in the reader's units, signed: "+3.2 K" met, "−1.5 K" missed, "—" unknown."""
    if margin is None or not math.isfinite(margin):
        return "—"
    quantity = _target_quantity(target)
    if quantity == "time":
        from app.design_figures import duration_text

        return ("+" if margin >= 0 else "\u2212") + duration_text(abs(margin))
    quantity = _DIFFERENCE.get(quantity, quantity)
    text = units.format_value(abs(margin), quantity, system, digits=3)
    return ("+" if margin >= 0 else "\u2212") + text


def _formatter(value: float, quantity: str, system: str) -> str:
    """A value in the one number format, without trailing zeros after the point ("13 mm", not "13.00 mm")."""
    text = units.format_value(value, quantity, system)
    if quantity in ("temperature", "temperature_difference"):
        return text  # one decimal, as everywhere
    return re.sub(r"(\d)\.(\d*?)0+(?=\D|$)", lambda m: m.group(1) + ("." + m.group(2) if m.group(2) else ""), text)


def number_text(value: float, quantity: str, system: str) -> str:
    """A value in ``system``'s display unit, without the unit and without trailing zeros ("5", "12.5")."""
    text = units.format_value(value, quantity, system, with_unit=False)
    if quantity in ("temperature", "temperature_difference"):
        return text
    return re.sub(r"(\d)\.(\d*?)0+$", lambda m: m.group(1) + ("." + m.group(2) if m.group(2) else ""), text)


def target_words(target, system: str) -> str:
    """A target in plain words in ``system``'s units ("outer surface at most 50.0 °C")."""
    text = getattr(target, "text", None)
    return text(system, formatter=_formatter) if callable(text) else str(target)


def meets_all(targets: Sequence, figures: Optional[dict]) -> Optional[bool]:
    """Whether the key figures meet every target (a margin of 0 meets it); None when unknown (no
    figures: the variant could not be solved)."""
    if figures is None:
        return None
    try:
        margins = [t.margin(figures) for t in targets]
    except (KeyError, TypeError, ValueError):
        return None
    return all(m is not None and math.isfinite(m) and m >= 0 for m in margins)


def feasible_runs(values: Sequence[float], met: Sequence[Optional[bool]]) -> list[tuple[int, int]]:
    """``(first, last)`` indices of each run of consecutive points that meet every target, the points
    in the order given (ascending values)."""
    runs: list[tuple[int, int]] = []
    start = None
    for i, ok in enumerate(met):
        if ok:
            if start is None:
                start = i
        elif start is not None:
            runs.append((start, i - 1))
            start = None
    if start is not None:
        runs.append((start, len(met) - 1))
    return runs


def feasible_words(values: Sequence, met: Sequence[Optional[bool]], words: Callable[[object], str]) -> str:
    """The band(s) of a sweep where every target is met, in words, at the points solved:
    "targets met from 12.5 to 27 W/m", "targets met at 40 mm only", "targets met from 5 to 10 W/m and from
    30 to 40 W/m", or "no value swept meets every target"."""
    runs = feasible_runs(values, met)
    if not runs:
        return "no value swept meets every target"
    if len(runs) == 1 and runs[0] == (0, len(values) - 1):
        return f"targets met at every value swept ({words(values[0])} to {words(values[-1])})"
    parts = [f"at {words(values[a])} only" if a == b else f"from {words(values[a])} to {words(values[b])}"
             for a, b in runs]
    return "targets met " + " and ".join(parts)


def unique_name(existing: Sequence[str], wanted: str) -> str:
    """:func:`app.texts.unique_name`, kept within the model's name length."""
    return texts.unique_name(existing, wanted[:NAME_MAX_CHARS - 6])


def _number_or_text(value):
    if isinstance(value, str):
        return value
    try:
        v = float(value)
    except (TypeError, ValueError):
        return str(value)
    return v if math.isfinite(v) else None


def point_figures(figures: Optional[dict], keys: Sequence[str]) -> dict[str, float]:
    """The chosen key figures of one variant, finite ones only (at most the model's limit)."""
    if not figures:
        return {}
    out = {}
    for k in keys:
        v = figures.get(k)
        if isinstance(v, (int, float)) and not isinstance(v, bool) and math.isfinite(v):
            out[k] = float(v)
        if len(out) >= MAX_POINT_FIGURES:
            break
    return out


def value_text(parameter, value, system: str) -> str:
    """A parameter's value in words in ``system``'s display units ("40 mm", "NPS 2", "25 W/m")."""
    return parameter.value_text(value, system, formatter=_formatter)


def _figures_of(variant) -> Optional[dict]:
    """A variant's figures: its key figures and, where it was solved with the design cases, the design
    figures the worst-case and hold-time targets read; None when it could not be solved."""
    from solver.target_finder import figures_of

    return figures_of(variant)


def sweep_record(base: Alternative, parameter, variants: Sequence, *, targets: Sequence = (), pick=None, pick2=None,
                 figures: Sequence[str] = DEFAULT_FIGURES, searched: str = "", system: str = "SI",
                 parameter2=None) -> SearchRecord:
    """The provenance of an alternative picked from a Sweep of ``base`` over ``parameter`` (and
    ``parameter2`` for a grid): its points (each variant's value(s) and chosen key figures, the
    figures the targets are judged on included; at most :data:`solver.model.MAX_SWEEP_POINTS`, evenly
    thinned beyond), the targets with the binding one at the pick, and the band where all are met.

    ``variants``: ``solver.variants.Variant`` items (``value``, ``value2``, ``outcome.key_figures``), in
    the order swept. ``pick``/``pick2``: the value(s) the new alternative takes.
    """
    keys = list(dict.fromkeys([*figures, *(target_figure(t) for t in targets if target_figure(t))]))
    chosen = list(variants)
    if len(chosen) > MAX_SWEEP_POINTS:
        step = len(chosen) / MAX_SWEEP_POINTS
        chosen = [chosen[int(i * step)] for i in range(MAX_SWEEP_POINTS)]
    points = []
    for v in chosen:
        value = _number_or_text(v.value)
        value2 = _number_or_text(v.value2) if parameter2 is not None and v.value2 is not None else None
        if value is None:
            continue
        points.append(SweepPoint(value=value, value2=value2, figures=point_figures(_figures_of(v), keys)))

    at_pick = None
    for v in variants:
        if _same(v.value, pick) and (parameter2 is None or _same(v.value2, pick2)):
            at_pick = _figures_of(v)
            break
    binding = ""
    if targets and at_pick:
        # the least margin as a share of its target's value (as the Target Finder compares targets of kinds)
        margins = [(t.margin(at_pick), t) for t in targets]
        margins = [(t.relative_margin(m) if hasattr(t, "relative_margin") else m, t) for m, t in margins
                   if m is not None and math.isfinite(m)]
        if margins:
            binding = target_words(min(margins, key=lambda e: e[0])[1], system)
    text = value_text(parameter, pick, system) if pick is not None else ""
    if parameter2 is not None and pick2 is not None:
        text += f", {value_text(parameter2, pick2, system)}"
    explanation = f"Picked from a Sweep of {len(variants):,} variants."
    if targets:
        met = [meets_all(targets, _figures_of(v)) for v in variants]
        if parameter2 is None:
            band = feasible_words([v.value for v in variants], met, lambda x: value_text(parameter, x, system))
            explanation += f" Across the sweep, {band}."
        else:
            bands = []
            for w in dict.fromkeys(v.value2 for v in variants):
                rows = [(v.value, m) for v, m in zip(variants, met) if _same(v.value2, w)]
                bands.append(f"with {value_text(parameter2, w, system)}, " + feasible_words(
                    [r[0] for r in rows], [r[1] for r in rows], lambda x: value_text(parameter, x, system)))
            explanation += " Across the grid: " + "; ".join(bands) + "."
        if at_pick is not None:
            explanation += (" The value picked meets every target." if meets_all(targets, at_pick)
                            else " The value picked does not meet every target.")
    label2 = parameter2.label(base) if parameter2 is not None else ""
    return SearchRecord(
        tool="Sweep", base_alternative=base.name, parameter=parameter.to_dict(), parameter_text=parameter.label(base),
        parameter2=parameter2.to_dict() if parameter2 is not None else None, parameter2_text=label2,
        searched=searched, targets=[target_words(t, system) for t in targets],
        target_limits=[t.to_dict() for t in targets], binding=binding, value_text=text[:NAME_MAX_CHARS],
        value=_number_or_text(pick) if pick is not None else None,
        value2=_number_or_text(pick2) if pick2 is not None else None,
        explanation=explanation, sweep_points=points,
    )


def _same(a, b) -> bool:
    if isinstance(a, str) or isinstance(b, str):
        return a == b
    try:
        return abs(float(a) - float(b)) <= 1e-9 * max(1.0, abs(float(b)))
    except (TypeError, ValueError):
        return False


# --------------------------------------------------------------------------- the record, read back


def _parameter(data: Optional[dict]):
    """The solver.variants.Parameter a record names, or None (an unknown kind from another version)."""
    if not data:
        return None
    try:
        from solver.variants import Parameter

        return Parameter.from_dict(dict(data))
    except _RECORD_ERRORS:  # a record from another version still reports in words
        return None


def _targets(record: SearchRecord) -> list:
    """The record's targets as solver.target_finder.Target objects (those that can be read back)."""
    out = []
    try:
        from solver.target_finder import Target
    except ImportError:
        return out
    for d in record.target_limits:
        try:
            out.append(Target.from_dict(dict(d)))
        except _RECORD_ERRORS:  # shown in the record's own words instead
            continue
    return out


def record_rows(record: SearchRecord, system: str) -> list[tuple[str, str]]:
    """The record as (label, plain words) rows; targets and the value in ``system`` where they can be
    read back, else in the words the search wrote."""
    targets = _targets(record)
    target_texts = ([target_words(t, system) for t in targets] if len(targets) == len(record.target_limits)
                    and targets else list(record.targets))
    parameter = _parameter(record.parameter)
    found_text = record.value_text
    if parameter is not None and record.value is not None and record.parameter2 is None:
        try:
            found_text = value_text(parameter, record.value, system)
        except _RECORD_ERRORS:  # the words the search wrote
            pass
    binding = record.binding
    if binding and targets and binding in record.targets:
        i = record.targets.index(binding)
        if i < len(targets):
            binding = target_words(targets[i], system)
    varied = record.parameter_text or (parameter.kind.replace("_", " ") if parameter is not None else "—")
    if record.parameter2 is not None:
        varied += f"; and {record.parameter2_text or 'a second parameter'}"
    found = "Value picked" if record.tool == "Sweep" else "Value found"
    rows = [
        ("Tool", record.tool),
        ("Started from", f"alternative “{shorten(record.base_alternative)}”"),
        ("Varied", varied),
        ("Searched", record.searched or "—"),
        ("Targets", "; ".join(target_texts) if target_texts else "none"),
        ("Binding target", binding or ("—" if target_texts else "no targets")),
        (found, found_text or "—"),
    ]
    return rows


# --------------------------------------------------------------------------- the report


def still_as_found(alt: Alternative, project=None) -> Optional[str]:
    """Whether ``alt`` is still what its search made: None when it is (the alternative it started from,
    with the value found applied, equals it but for name and description), else the reason in words; the
    record then tells how it was first made, not what it is now."""
    record = alt.origin
    if record is None or project is None:
        return None
    base = next((a for a in project.alternatives if a.name == record.base_alternative), None)
    if base is None:
        return (f"the alternative it started from, “{shorten(record.base_alternative)}”, is no longer in the project, "
                "so it cannot be told whether this alternative was changed since")
    parameter = _parameter(record.parameter)
    parameter2 = _parameter(record.parameter2) if record.parameter2 else None
    if parameter is None or record.value is None or (record.parameter2 and (parameter2 is None or record.value2 is None)):
        return None  # a record without the value (or from another version): nothing to compare
    try:
        expected = parameter.apply(base, record.value)
        if parameter2 is not None:
            expected = parameter2.apply(expected, record.value2)
    except _RECORD_ERRORS:  # the base was changed so that the value no longer applies
        return f"“{shorten(base.name)}” has changed since, and the value found no longer applies to it"
    skip = {"name", "description", "origin"}
    if expected.model_dump(exclude=skip) == alt.model_dump(exclude=skip):
        return None
    return (f"this alternative is no longer “{shorten(base.name)}” with the value found: it (or "
            f"“{shorten(base.name)}”) has been changed since")


def search_section(doc, alt: Alternative, system: str, project=None) -> None:
    """The report's short section on how ``alt`` was found (nothing for an alternative made by hand):
    the record as a table, the explanation, and the Sweep's plot when it kept its points; with ``project``,
    a note when the alternative (or the one it started from) has been changed since."""
    record = alt.origin
    if record is None:
        return
    title = "Found by the Target Finder" if record.tool == "Target Finder" else "Picked from a Sweep"
    doc.heading(3, esc(title))
    rows = [[esc(label), esc(text)] for label, text in record_rows(record, system)]
    doc.table(["Search", ""], rows, widths=[22, 78], font_pt=8.0)
    if record.explanation:
        doc.add(f"<p>{esc(record.explanation)}</p>")
    changed = still_as_found(alt, project)
    if changed:
        from app.style import OKABE_ITO

        doc.box(f"<b>Changed since the search.</b> {esc(changed[:1].upper() + changed[1:])}; the record above "
                "tells how it was first made, the results below are those of the alternative as it is now.",
                OKABE_ITO["orange"], "#FFF6E8")
    doc.add('<p class="small muted">The search solved variants of the alternative it started from, changing only what '
            'it varied; the results below are those of this alternative, solved again in full. Targets of the search '
            'are its own; the project’s design targets are judged as for every alternative.</p>')
    chart = sweep_chart(record, system)
    if chart is not None:
        doc.figure(chart)


def _x_of(parameter, value, system: str) -> Optional[float]:
    """A swept value as a number on the plot's axis: in the parameter's display unit; a standard size
    (an NPS name) as its nominal number; None when it cannot be placed."""
    if isinstance(value, str):
        from fractions import Fraction

        text = value.upper().removeprefix("NPS").strip()
        try:
            whole, _, frac = text.partition("-")
            return float(Fraction(whole) + (Fraction(frac) if frac else 0))
        except (ValueError, ZeroDivisionError):
            return None
    quantity = getattr(parameter, "quantity", "") if parameter is not None else ""
    if quantity in units.QUANTITIES:
        return float(units.to_display(float(value), quantity, system))
    return float(value)


def _x_label(record: SearchRecord, parameter, system: str, text_values: bool) -> str:
    words = record.parameter_text or "Value"
    quantity = getattr(parameter, "quantity", "") if parameter is not None else ""
    if text_values:
        return f"{words} [NPS]"
    if quantity in units.QUANTITIES:
        label = units.label(quantity, system)
        return f"{words} [{label}]" if label else words
    return f"{words} [SI]"


def sweep_chart(record: SearchRecord, system: str):
    """The Sweep's key figures against the value swept (a curve per figure; per second value on a
    grid), the targets as limit lines, where every target is met drawn solid (dotted where not), and the
    value picked marked; None when the record kept no points."""
    points = record.sweep_points
    if not points:
        return None
    from app.reporting.chart import Chart, HLine, Panel, Series, _legend_limits
    from app.axes import minimum_span
    from app.style import ALTERNATIVE_COLOURS, ALTERNATIVE_STYLES, CURVE_COLOURS, OKABE_ITO
    import numpy as np

    parameter = _parameter(record.parameter)
    targets = _targets(record)
    placed = [(_x_of(parameter, p.value, system), p) for p in points]
    placed = [(x, p) for x, p in placed if x is not None and math.isfinite(x)]
    if not placed:
        return None
    text_values = isinstance(points[0].value, str)
    present = {k for _, p in placed for k in p.figures}
    figures = [spec for spec in KEY_FIGURES if spec.key in present]
    if not figures:
        return None
    second = list(dict.fromkeys(p.value2 for _, p in placed))  # [None] for a 1-D sweep
    parameter2 = _parameter(record.parameter2) if record.parameter2 else None
    grid = second != [None]
    if grid:
        # one curve per second value: only the figures the targets read (else the first), at most two
        wanted = [k for k in (target_figure(t) for t in targets) if k in present] or [figures[0].key]
        figures = [spec for spec in figures if spec.key in wanted][:2]
        if len(second) > len(ALTERNATIVE_COLOURS):
            step = (len(second) - 1) / (len(ALTERNATIVE_COLOURS) - 1)
            second = [second[round(i * step)] for i in range(len(ALTERNATIVE_COLOURS))]

    def second_text(v) -> str:
        if v is None:
            return ""
        if parameter2 is not None:
            try:
                return value_text(parameter2, v, system)
            except _RECORD_ERRORS:  # the words the sweep wrote
                pass
        return str(v)

    # panels: temperatures together, then each other quantity (at most three panels)
    by_quantity: dict[str, list] = {}
    for spec in figures:
        by_quantity.setdefault(spec.quantity, []).append(spec)
    order = sorted(by_quantity, key=lambda q: (q != "temperature", list(by_quantity).index(q)))[:3]
    figure_colour = {"outlet_temperature_K": OKABE_ITO["bluish_green"], "min_bulk_temperature_K": CURVE_COLOURS["bulk"],
                     "max_inner_wall_temperature_K": CURVE_COLOURS["inner_wall"],
                     "max_outer_surface_temperature_K": CURVE_COLOURS["outer_surface"]}
    drawn_targets = [(t, target_figure(t)) for t in targets if target_figure(t)]
    met = [meets_all(targets, p.figures) if targets else None for _, p in placed]
    any_split = bool(targets) and any(m for m in met) and not all(m for m in met)

    panels = []
    colour_index = 0
    for quantity in order:
        series = []
        for i, spec in enumerate(by_quantity[quantity]):
            colour = figure_colour.get(spec.key)
            if colour is None:
                colour = ALTERNATIVE_COLOURS[(2 + colour_index) % len(ALTERNATIVE_COLOURS)]
                colour_index += 1
            for j, v2 in enumerate(second[:MAX_CURVES]):
                rows = sorted((x, p.figures.get(spec.key, math.nan), m)
                              for (x, p), m in zip(placed, met) if p.value2 == v2)
                x = np.array([r[0] for r in rows], dtype=float)
                y = np.asarray(units.to_display(np.array([r[1] for r in rows], dtype=float), spec.quantity, system),
                               dtype=float)
                if grid:  # colour: the second value; line style: the figure
                    colour = ALTERNATIVE_COLOURS[j % len(ALTERNATIVE_COLOURS)]
                    style = ALTERNATIVE_STYLES[i % len(ALTERNATIVE_STYLES)]
                    label = (f"{spec.label}, " if len(figures) > 1 else "") + second_text(v2)
                else:
                    style, label = "solid", spec.label
                if any_split:  # thick where every target is met, thin (dotted on a single sweep) where not
                    ok = np.array([bool(r[2]) for r in rows])
                    series.append(Series("", x, y, colour, style if grid else "dot", 0.8))
                    series.append(Series(label, x, np.where(ok, y, np.nan), colour, style, 2.0))
                else:
                    series.append(Series(label, x, y, colour, style, 1.5))
        hlines = []
        for t, key in drawn_targets:
            if KEY_FIGURE_BY_KEY[key].quantity != quantity:
                continue
            value = t.to_dict().get("value") if hasattr(t, "to_dict") else None
            if isinstance(value, (int, float)) and math.isfinite(value):
                hlines.append(HLine(float(units.to_display(float(value), quantity, system)),
                                    f"{TARGET_SHORT.get(target_kind(t), 'target')} {_formatter(value, quantity, system)}"))
        label = units.label(quantity, system)
        ys = np.concatenate([s.y for s in series]) if series else np.array([])
        span = minimum_span(quantity, system, ys) if quantity in units.QUANTITIES else 0.0
        title = "Temperature" if quantity == "temperature" else (by_quantity[quantity][0].label
                                                                 if len(by_quantity[quantity]) == 1 else quantity.replace("_", " ").capitalize())
        panels.append(Panel(f"{title} [{label}]" if label else title, series, hlines, span))

    chosen = _x_of(parameter, record.value, system) if record.value is not None else None
    legend_extra = _legend_limits([h for p in panels for h in p.hlines])
    if any_split:
        legend_extra.append((f"thick: every target met; {'thin' if grid else 'dotted'}: not", "#6B7780", "solid"))
    boundaries = []
    if chosen is not None and math.isfinite(chosen):
        boundaries = [chosen]
        word = "picked" if record.tool == "Sweep" else "found"
        legend_extra.append((f"value {word}: {record.value_text}" if record.value_text else f"value {word}",
                             CURVE_COLOURS["boundary"], "dash"))
    what = record.parameter_text or "the value swept"
    title = f"Sweep over {what[:1].lower() + what[1:]}"
    if grid:
        per = (record.parameter2_text or "the second value").split(",")[0].lower()
        title = f"Sweep over {what.split(',')[0].lower()} — one curve per {per}"
    return Chart(
        title=shorten(title, 110),
        x_label=_x_label(record, parameter, system, text_values),
        panels=panels,
        boundaries=boundaries,
        legend_extra=legend_extra,
        aspect=0.55 if len(panels) == 1 else 0.7,
    )

