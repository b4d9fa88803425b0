"""The report's sections: what the summary says, as HTML parts of a :class:`~app.reporting.pdf.Body`.

No physics here: numbers come from solved :class:`solver.results.Result` objects, labelled by the
one list of Key Figures (:data:`solver.results.KEY_FIGURES`) and converted for display with
:mod:`app.units` in the reader's unit system, units stated beside every value. Every piece of text
the user typed (names, descriptions, labels) goes through :func:`app.texts.esc`, so ``<b>`` or
``&`` print as typed.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass
from typing import Optional, Sequence

from app import comparison, heat_path, heat_path_style, units
from app.reporting.chart import alternative_chart, overlay_chart
from app.reporting.design import design_section, property_table
from app.reporting.search import search_section
from app.reporting.pdf import Body
from app.style import (
    ACCENT,
    INK,
    INK_MUTED,
    MET_COLOUR,
    MISSED_COLOUR,
    OKABE_ITO,
    RULE,
    SEVERITY_WORDS,
    SHADE,
    VERDICT_COLOURS,
    VERDICT_SYMBOLS,
)
from app.texts import (
    HEADING_NAME_CHARS,
    capped,
    esc,
    fittings_text,
    fluid_source_text,
    fluid_text,
    fmt,
    heater_text,
    insulation_text,
    key_figure_label_and_value,
    method_entries,
    num,
    pipe_text,
    plus_minus_text,
    shorten,
    surroundings_text,
    ulabel,
)
from solver.model import Alternative, Project, Segment
from solver.results import ASSUMPTIONS, CAUTIONS, CAUTIONS_BANNER, KEY_FIGURES, Result, check_sort_key, key_figure
from solver.uncertainty import BANDS_CAUTION, Bands, band_plan, line_bands

#: Uncertainty bands re-solve the line about a dozen times (two solves per method it uses); the
#: report computes them for lines up to this many cells (a few hundred segments, a few seconds) and
#: says so for longer ones, unless asked (``calorun report --uncertainty``).
BANDS_MAX_CELLS = 30_000
#: Up to this many segments the segment tables have one row per segment; a longer line gets one row
#: per segment design (segments alike but for name and length), since hundreds of near-identical
#: rows neither read well nor lay out in reasonable time.
FULL_TABLE_SEGMENTS = 60
#: At most this many design rows; the designs covering the least length are then summed in one row.
MAX_DESIGN_ROWS = 40
#: At most this many rows of checks; the rest (no worse than the last shown) are counted.
MAX_CHECK_ROWS = 120
#: Full segment names listed under a table when shortened there, at most this many.
MAX_FULL_NAMES = 20

CSS = f"""
body {{ color: {INK}; }}
h1 {{ font-size: 17pt; color: {ACCENT}; margin-top: 0px; margin-bottom: 2px; }}
h2 {{ font-size: 12.5pt; color: {ACCENT}; margin-top: 14px; margin-bottom: 5px; }}
h3 {{ font-size: 10pt; color: {ACCENT}; margin-top: 10px; margin-bottom: 4px; }}
p {{ margin-top: 2px; margin-bottom: 4px; }}
.muted {{ color: {INK_MUTED}; }}
.small {{ font-size: 7.5pt; }}
.kicker {{ font-size: 8pt; color: {INK_MUTED}; }}
table.grid {{ border-collapse: collapse; }}
table.grid th {{ background-color: {SHADE}; color: {ACCENT}; font-weight: bold; text-align: left;
               border-bottom: 1px solid {ACCENT}; padding: 2px 5px 2px 5px; }}
table.grid td {{ border-bottom: 0.5px solid {RULE}; padding: 2px 5px 2px 5px; vertical-align: top; }}
td.num, th.num {{ text-align: right; }}
.met {{ color: {MET_COLOUR}; font-weight: bold; }}
.missed {{ color: {MISSED_COLOUR}; font-weight: bold; }}
.diff {{ color: {INK_MUTED}; font-size: 7.5pt; }}
"""

_NBSP3 = "\u00a0" * 3  # indent that survives HTML white-space collapsing


@dataclass
class Outcome:
    """One alternative in the report: its result, or why it could not be solved; its uncertainty
    bands (:class:`solver.uncertainty.Bands`; computed by :func:`build_html` when not given)."""

    alternative: Alternative
    result: Optional[Result]
    error: Optional[str]
    bands: Optional[Bands] = None
    bands_error: str = ""
    design_error: str = ""  # why the design cases could not be evaluated (the line itself solved)


def add_bands(outcomes: Sequence[Outcome], max_cells: Optional[int] = BANDS_MAX_CELLS) -> None:
    """Give each solved outcome without bands its bands (perturb and re-solve; a fraction of a second
    per alternative of usual size). A perturbed solve the solver refuses is named in the Bands; a bug
    leaves the outcome without bands and says why. A line of more than ``max_cells`` cells (None: no
    limit) gets none, and the report says why and how to get them."""
    for o in outcomes:
        if o.result is None or o.bands is not None:
            continue
        if max_cells is not None and o.result.cells > max_cells:
            solves = len(band_plan(o.alternative))
            o.bands_error = (f"not computed for this long line ({o.result.cells:,} cells, more than {max_cells:,}): "
                             f"they take {comparison.plural(solves, 'more solve')} of the whole line; "
                             "`calorun report --uncertainty` computes them")
            continue
        try:
            o.bands = line_bands(o.alternative, o.result)
        except (ArithmeticError, ValueError, RuntimeError, TypeError, AssertionError) as exc:  # a solver bug
            o.bands_error = f"unexpected {type(exc).__name__}: {exc}"


def verdict_html(verdict: comparison.DesignVerdict, detail: bool = True) -> str:
    """The design verdict (targets and checks), coloured by its level, with a mark so colour is
    never the only cue."""
    return (f'<span style="color: {VERDICT_COLOURS[verdict.level]}; font-weight: bold;">'
            f'{VERDICT_SYMBOLS[verdict.level]} {esc(verdict.text(detail))}</span>')


def _name(o: Outcome, baseline_name: str) -> str:
    return esc(shorten(o.alternative.name)) + (" <i>(baseline)</i>" if o.alternative.name == baseline_name else "")


def _job_sentence(project: Project, outcomes: Sequence[Outcome], system: str) -> str:
    base = project.baseline_alternative()
    feed = base.feed
    if feed.mass_flow_kg_per_s is not None:
        flow = fmt(feed.mass_flow_kg_per_s, "mass_flow", system)
    else:
        flow = fmt(feed.volume_flow_m3_per_s, "volume_flow", system)
    length = sum(s.length_m for s in base.segments)
    targets = "against the project's design targets" if comparison.targets_set(project.targets) else "(no design targets set)"
    return (
        f"Carry {esc(fluid_text(base.fluid))} at {esc(flow)}, entering at "
        f"{esc(fmt(feed.inlet_temperature_K, 'temperature', system))} and {esc(fmt(feed.inlet_pressure_Pa, 'pressure', system))}, "
        f"through {esc(comparison.plural(len(base.segments), 'segment'))} "
        f"({esc(fmt(length, 'length', system))} in the baseline) and judge "
        f"{esc(comparison.plural(len(outcomes), 'alternative'))} by temperature, wall temperature, pressure drop, "
        f"heat and checks {targets}."
    )


def build_html(project: Project, outcomes: Sequence[Outcome], system: str, date_text: str,
               bands_max_cells: Optional[int] = BANDS_MAX_CELLS) -> Body:
    """The whole report body: title, verdicts, comparison, one section per alternative, methods.

    Names are shortened with "…" in headings and tables and printed in full once (the project's in
    its details, an alternative's at the head of its section), itself capped for absurd lengths."""
    doc = Body(CSS)
    add_bands(outcomes, bands_max_cells)
    solved = [o.result for o in outcomes if o.result is not None]
    baseline_name = project.baseline_alternative().name

    doc.add('<p class="kicker">CALORUN · LINE DESIGN SUMMARY</p>')
    doc.heading(1, esc(shorten(project.name, HEADING_NAME_CHARS)))
    if project.description:
        doc.add(f'<p>{esc(capped(project.description, what="description"))}</p>')
    unit_word = "SI (°C, bar(a), kPa, kW, mm, m)" if system == "SI" else "US customary (°F, psia, psi, Btu/h, in, ft)"
    not_stated = '<span class="muted">not stated</span>'
    details = []
    if len(project.name) > HEADING_NAME_CHARS:
        details.append(["Full name", esc(capped(project.name))])
    doc.table(["Project", ""], details + [
        ["Prepared by", esc(capped(project.prepared_by)) or not_stated],
        ["Revision", esc(capped(project.revision)) or not_stated],
        ["Date", esc(date_text)],
        ["Alternatives", ", ".join(_name(o, baseline_name) for o in outcomes)],
        ["Units", esc(unit_word) + "; pressures are absolute unless marked as a drop"],
    ], widths=[22, 78], font_pt=8.5)

    doc.heading(2, "The job")
    doc.add(f"<p>{_job_sentence(project, outcomes, system)}</p>")
    doc.box(f"<b>Caution.</b> {esc(CAUTIONS_BANNER)} See “Cautions” at the end.", OKABE_ITO["orange"], "#FFF6E8")

    _glance(doc, project, outcomes, system, baseline_name)
    if solved:
        _comparison(doc, project, outcomes, solved, system, baseline_name)
    for o in outcomes:
        _alternative_section(doc, project, o, system, baseline_name)
    _methods_and_cautions(doc, solved, date_text)
    return doc


def _glance(doc: Body, project: Project, outcomes: Sequence[Outcome], system: str, baseline_name: str) -> None:
    doc.heading(2, "Verdict at a glance")
    rows = []
    for o in outcomes:
        if o.result is None:
            rows.append([_name(o, baseline_name), f'<span class="missed">\u2717 not solved</span><br>'
                         f'<span class="diff">{esc(capped(o.error or "", what="message"))}</span>', "—", "—", "—"])
            continue
        r = o.result
        rows.append([
            _name(o, baseline_name), verdict_html(comparison.design_verdict(project.targets, r)),
            esc(fmt(r.outlet_temperature_K, "temperature", system)),
            esc(fmt(r.max_inner_wall_temperature_K, "temperature", system)),
            esc(fmt(r.pressure_drop_Pa, "pressure_difference", system)),
        ])
    keys = ("outlet_temperature_K", "max_inner_wall_temperature_K", "pressure_drop_Pa")
    doc.table(["Alternative", "Verdict: targets and checks"] + [esc(key_figure(k).label) for k in keys],
              rows, num_cols=(2, 3, 4), widths=[22, 39, 13, 13, 13])
    doc.add('<p class="small muted">The verdict counts the design targets met and the danger and warning '
            'checks, and names the worst finding; a design with a danger or warning is never shown as simply met.</p>')


def _comparison(doc: Body, project: Project, outcomes: Sequence[Outcome], solved: Sequence[Result], system: str,
                baseline_name: str) -> None:
    table = comparison.compare(solved, baseline_name)
    doc.heading(2, "Key Figures compared")
    ref_note = f"Differences are against the baseline, <b>{esc(shorten(table.baseline_name))}</b>"
    if table.baseline_name != baseline_name:
        ref_note += f" (the project baseline {esc(shorten(baseline_name))} could not be solved)"
    doc.add(f'<p class="small muted">{ref_note}; a change in percent is shown where it helps.</p>')
    headers = ["Key figure"] + [esc(shorten(n)) + (" <i>(baseline)</i>" if i == table.baseline_index else "")
                                for i, n in enumerate(table.names)]
    rows = []
    for row in table.rows:
        spec = row.spec
        present = [v for v in row.values if v is not None]
        # a figure that is negative for every alternative reads under its other name, sign turned
        turn = -1.0 if spec.negative_label and present and all(v < 0 for v in present) else 1.0
        label = spec.negative_label if turn < 0 else spec.label
        cells = [(_NBSP3 if spec.part_of else "") + esc(label)]
        ref = row.values[table.baseline_index]
        for i, v in enumerate(row.values):
            c = esc(comparison.format_figure(None if v is None else turn * v, spec, system))
            if i != table.baseline_index and v is not None:
                d = row.differences[i]
                text = comparison.format_difference(None if d is None else turn * d, None if ref is None else turn * ref,
                                                    spec, system)
                c += f'<br><span class="diff">{esc(text)}</span>'
            cells.append(c)
        rows.append(cells)
    n = len(table.names)
    doc.table(headers, rows, num_cols=tuple(range(1, n + 1)), font_pt=8.0 if n <= 4 else 7.0)
    failed = [o for o in outcomes if o.result is None]
    if failed:
        doc.add('<p class="small missed">Not in this comparison (could not be solved): '
                + ", ".join(esc(shorten(o.alternative.name)) for o in failed) + ".</p>")

    doc.heading(2, "Design targets")
    if comparison.targets_set(project.targets):
        per_alt = [comparison.target_verdicts(project.targets, r) for r in solved]
        rows = []
        for j, v0 in enumerate(per_alt[0]):
            rows.append([esc(v0.label), esc(comparison.format_target(v0, system))]
                        + [_target_cell(vs[j], system) for vs in per_alt])
        rows.append(["<b>Verdict</b>", "targets and checks"]
                    + [verdict_html(comparison.design_verdict(project.targets, r), detail=False) for r in solved])
        doc.table(["Target", "Limit"] + [esc(shorten(r.name)) for r in solved], rows, font_pt=8.0 if n <= 4 else 7.0)
        doc.add('<p class="small muted">\u2713 met: the value is on the allowed side of the limit or equal to it. '
                '\u2717 missed: it is not, or the value is undefined. The verdict also counts danger and warning checks.</p>')
    else:
        doc.add('<p class="muted">No design targets are set on this project.</p>')

    if len(solved) > 1:
        doc.figure(overlay_chart(solved, system, project.targets))


def _target_cell(v: comparison.TargetVerdict, system: str) -> str:
    value = esc(fmt(v.value, v.quantity, system))
    mark = '<span class="met">\u2713 met</span>' if v.met else '<span class="missed">\u2717 missed</span>'
    return f'{mark}<br><span class="diff">{value}</span>'


def _alternative_section(doc: Body, project: Project, o: Outcome, system: str, baseline_name: str) -> None:
    alt, r = o.alternative, o.result
    doc.page_break()
    tag = " — baseline" if alt.name == baseline_name else ""
    doc.add(f'<p class="kicker">ALTERNATIVE{esc(tag.upper())}</p>')
    doc.heading(2, esc(shorten(alt.name, HEADING_NAME_CHARS)), "margin-top: 0px;")
    if len(alt.name) > HEADING_NAME_CHARS:
        doc.add(f'<p class="small"><b>Full name:</b> {esc(capped(alt.name))}</p>')
    if alt.description:
        doc.add(f"<p>{esc(capped(alt.description, what='description'))}</p>")
    if r is not None:
        doc.add(f"<p><b>Verdict:</b> {verdict_html(comparison.design_verdict(project.targets, r))}</p>")
    search_section(doc, alt, system, project)  # how a Target Finder or Sweep made it (nothing for one made by hand)
    _feed_and_segments(doc, alt, r, system)
    if r is None:
        doc.box(f"<b>This alternative could not be solved.</b><br>{esc(capped(o.error, what='message'))}",
                MISSED_COLOUR, "#FCEDE5")
        return
    _key_figures(doc, r, system, o.bands)
    if len(alt.segments) > FULL_TABLE_SEGMENTS:
        groups = design_groups(alt)
        _per_design(doc, alt, r, groups, system)
        _heat_path(doc, r, system, [g.indices[0] for g in groups if g.design is not None])
    else:
        _per_segment(doc, r, system)
        _heat_path(doc, r, system)
    doc.figure(alternative_chart(r, system, project.targets, alt.limits, o.bands))
    _uncertainty(doc, o, system)
    _checks(doc, alt, r, system)
    verdicts = comparison.target_verdicts(project.targets, r)
    if verdicts:
        doc.heading(3, "Design targets")
        rows = [[esc(v.label), esc(comparison.format_target(v, system)), esc(fmt(v.value, v.quantity, system)),
                 '<span class="met">\u2713 met</span>' if v.met else '<span class="missed">\u2717 missed</span>']
                for v in verdicts]
        doc.table(["Target", "Limit", "Value", "Verdict"], rows, num_cols=(2,), widths=[40, 20, 20, 20])
    long_line = len(alt.segments) > FULL_TABLE_SEGMENTS
    design_section(doc, alt, r, system, o.design_error,
                   [g.indices[0] for g in design_groups(alt) if g.design is not None] if long_line else None)


def _feed_and_segments(doc: Body, alt: Alternative, r: Optional[Result], system: str) -> None:
    feed = alt.feed
    if feed.mass_flow_kg_per_s is not None:
        flow = f"{fmt(feed.mass_flow_kg_per_s, 'mass_flow', system)} (mass flow)"
    else:
        flow = f"{fmt(feed.volume_flow_m3_per_s, 'volume_flow', system)} (volume flow at inlet)"
    rows = [
        ["Fluid", esc(fluid_text(alt.fluid))],
        ["Properties from", esc(fluid_source_text(alt.fluid))],
        ["Inlet temperature", esc(fmt(feed.inlet_temperature_K, "temperature", system))],
        ["Inlet pressure", esc(fmt(feed.inlet_pressure_Pa, "pressure", system))],
        ["Flow", esc(flow)],
    ]
    if alt.limits.max_inner_wall_temperature_K is not None:
        rows.append(["Wall-temperature limit", esc(fmt(alt.limits.max_inner_wall_temperature_K, "temperature", system))])
    if alt.limits.min_bulk_temperature_K is not None:
        rows.append(["Minimum bulk temperature", esc(fmt(alt.limits.min_bulk_temperature_K, "temperature", system))])
    doc.heading(3, "Feed")
    doc.table(["Feed", ""], rows, widths=[28, 72])
    property_table(doc, alt, system)

    doc.heading(3, "Segments (in flow order)")
    if len(alt.segments) > FULL_TABLE_SEGMENTS:
        _segment_designs(doc, alt, r, system)
        return
    L, D = ulabel("length", system), ulabel("diameter", system)
    seg_rows = []
    for i, s in enumerate(alt.segments):
        span = r.segments[i] if r is not None and i < len(r.segments) else None
        bore = esc(pipe_text(s, system))
        if span is not None:
            bore += f'<br><span class="diff">ID {esc(num(span.inner_diameter_m, "diameter", system))} {D}</span>'
        fit = esc(fittings_text(s))
        if span is not None and s.fittings:
            fit += f'<br><span class="diff">ΣK {span.fittings_K:.3g}</span>'
        seg_rows.append([
            str(i + 1), esc(shorten(s.name)), esc(num(s.length_m, "length", system)), bore,
            esc(num(s.elevation_change_m, "elevation", system)) if s.elevation_change_m else "0",
            fit, esc(heater_text(s, system)) if s.heater is not None else "—",
            esc(insulation_text(s, system)), esc(surroundings_text(s.surroundings, system)),
        ])
    doc.table(
        ["#", "Name", f"Length [{L}]", "Pipe", f"Rise [{ulabel('elevation', system)}]", "Fittings", "Heater",
         "Insulation", "Surroundings"],
        seg_rows, num_cols=(0, 2, 4), widths=[3, 11, 7, 14, 6, 13, 11, 16, 19], font_pt=7.0,
    )
    _full_names(doc, alt)


def _full_names(doc: Body, alt: Alternative) -> None:
    """The full names of the segments a table shows shortened, each once (at most
    :data:`MAX_FULL_NAMES`, each capped for absurd lengths)."""
    long = [(i, s.name) for i, s in enumerate(alt.segments) if shorten(s.name) != s.name]
    if not long:
        return
    items = "".join(f"<li>#{i + 1}: {esc(capped(name))}</li>" for i, name in long[:MAX_FULL_NAMES])
    more = (f'<p class="small muted">… and {esc(comparison.plural(len(long) - MAX_FULL_NAMES, "more long name"))}.</p>'
            if len(long) > MAX_FULL_NAMES else "")
    doc.add(f'<p class="small muted">Names shortened in the tables, in full:</p><ul class="small">{items}</ul>{more}')


@dataclass
class DesignGroup:
    """Segments of one design: alike in everything but name and length. ``design`` is the first of
    them; None for the one row that sums the designs beyond :data:`MAX_DESIGN_ROWS`."""

    indices: list[int]
    design: Optional[Segment]


def design_groups(alt: Alternative) -> list[DesignGroup]:
    """The alternative's segments grouped by design, in order of first appearance; beyond
    :data:`MAX_DESIGN_ROWS` designs, those covering the least length share one last group."""
    by_key: dict[str, list[int]] = {}
    for i, s in enumerate(alt.segments):
        key = json.dumps(s.model_dump(mode="json", exclude={"name", "length_m"}), sort_keys=True, default=str)
        by_key.setdefault(key, []).append(i)
    groups = [DesignGroup(ix, alt.segments[ix[0]]) for ix in by_key.values()]
    if len(groups) <= MAX_DESIGN_ROWS:
        return groups
    length = [sum(alt.segments[i].length_m for i in g.indices) for g in groups]
    kept = set(sorted(range(len(groups)), key=lambda j: -length[j])[:MAX_DESIGN_ROWS - 1])
    rest = sorted(i for j, g in enumerate(groups) if j not in kept for i in g.indices)
    return [g for j, g in enumerate(groups) if j in kept] + [DesignGroup(rest, None)]


def numbers_text(indices: Sequence[int], shown: int = 4) -> str:
    """Segment numbers (1-based) as runs, "1–3, 7, 9–12", the middle left out when there are many:
    "1, 6, 11, 16, …, 9996"."""
    runs: list[list[int]] = []
    for i in indices:
        if runs and i == runs[-1][1] + 1:
            runs[-1][1] = i
        else:
            runs.append([i, i])
    words = [f"{a + 1}" if a == b else f"{a + 1}–{b + 1}" for a, b in runs]
    if len(words) > shown + 1:
        words = words[:shown] + ["…", words[-1]]
    return ", ".join(words)


def _group_head(alt: Alternative, g: DesignGroup) -> tuple[str, str]:
    """(segments cell, name cell) of a design row."""
    count = f'{esc(comparison.plural(len(g.indices), "segment"))}<br><span class="diff">#{esc(numbers_text(g.indices))}</span>'
    if g.design is None:
        return count, "<i>other designs</i>"
    name = esc(shorten(g.design.name))
    if any(alt.segments[i].name != g.design.name for i in g.indices[1:]):
        name += ' <span class="diff">(the first)</span>'
    return count, name


def _segment_designs(doc: Body, alt: Alternative, r: Optional[Result], system: str) -> None:
    """The segments of a long line, one row per design."""
    groups = design_groups(alt)
    L, D = ulabel("length", system), ulabel("diameter", system)
    rows = []
    for g in groups:
        count, name = _group_head(alt, g)
        lengths = [alt.segments[i].length_m for i in g.indices]
        length = esc(num(sum(lengths), "length", system))
        if len(lengths) > 1:
            lo, hi = min(lengths), max(lengths)
            each = num(lo, "length", system) if lo == hi else f"{num(lo, 'length', system)} – {num(hi, 'length', system)}"
            length += f'<br><span class="diff">each {esc(each)}</span>'
        s = g.design
        if s is None:
            rows.append([count, name, length] + ['<span class="muted">various</span>'] * 6)
            continue
        span = r.segments[g.indices[0]] if r is not None and g.indices[0] < len(r.segments) else None
        bore = esc(pipe_text(s, system))
        if span is not None:
            bore += f'<br><span class="diff">ID {esc(num(span.inner_diameter_m, "diameter", system))} {D}</span>'
        fit = esc(fittings_text(s))
        if span is not None and s.fittings:
            fit += f'<br><span class="diff">ΣK {span.fittings_K:.3g} each</span>'
        rows.append([
            count, name, length, bore,
            esc(num(s.elevation_change_m, "elevation", system)) if s.elevation_change_m else "0",
            fit, esc(heater_text(s, system)) if s.heater is not None else "—",
            esc(insulation_text(s, system)), esc(surroundings_text(s.surroundings, system)),
        ])
    doc.add(f'<p class="small muted">A long line: {esc(comparison.plural(len(alt.segments), "segment"))} in '
            f'{esc(comparison.plural(sum(g.design is not None for g in groups), "design"))} (segments alike in everything '
            'but name and length), one row per design with its segments’ numbers'
            + (f"; the designs covering the least length share the last row" if groups[-1].design is None else "")
            + '. The profile chart shows the line position by position; <code>calorun solve --json</code> '
            'lists every segment.</p>')
    doc.table(
        ["Segments", "Name", f"Length [{L}]", "Pipe", f"Rise each [{ulabel('elevation', system)}]", "Fittings each",
         "Heater", "Insulation", "Surroundings"],
        rows, num_cols=(2, 4), widths=[10, 11, 8, 13, 6, 12, 10, 14, 16], font_pt=7.0,
    )
    _full_names(doc, alt)


def _key_figures(doc: Body, r: Result, system: str, bands: Optional[Bands] = None) -> None:
    """The one list of Key Figures in two column pairs, split between groups near the middle; under
    each value its ± from the uncertainty bands, where it has one."""
    doc.heading(3, "Key Figures")
    figures = r.key_figures()
    pm = bands.key_figure_pm if bands is not None else {}

    def value(spec) -> tuple[str, str]:  # (label, value cell HTML)
        label, text = key_figure_label_and_value(spec, figures, system, _NBSP3)
        extra = plus_minus_text(pm.get(spec.key), spec, system)
        return label, esc(text) + (f'<br><span class="diff">{esc(extra)}</span>' if extra else "")

    entries = [(spec, *value(spec)) for spec in KEY_FIGURES]
    starts = [i for i in range(1, len(entries)) if entries[i][0].group != entries[i - 1][0].group]
    cut = min(starts, key=lambda i: abs(2 * i - len(entries))) if starts else (len(entries) + 1) // 2
    left, right = entries[:cut], entries[cut:]
    blank = (None, "", "")
    left += [blank] * (len(right) - len(left))
    right += [blank] * (len(left) - len(right))
    rows = [[esc(la), va, esc(lb), vb] for (_, la, va), (_, lb, vb) in zip(left, right)]
    doc.table(["Key figure", "Value", "Key figure", "Value"], rows, num_cols=(1, 3), widths=[25, 21, 30, 24])
    doc.add(f'<p class="small muted">The energy balance residual (heat input − heat loss − heat to fluid, against the '
            f'change of enthalpy) is round-off when the march has closed; {esc(comparison.plural(r.cells, "cell"))}.'
            + (" Under a value, its ± from the methods' published accuracy (see “Uncertainty”)." if pm else "") + '</p>')


def _uncertainty(doc: Body, o: Outcome, system: str) -> None:
    """What the bands say, which methods drive them, and what they do not cover."""
    doc.heading(3, "Uncertainty")
    bands, r = o.bands, o.result
    if bands is None:
        doc.add(f'<p class="muted">No uncertainty bands: {esc(o.bands_error or "not computed")}.</p>')
        return
    keys = ("outlet_temperature_K", "max_inner_wall_temperature_K", "duty_W", "pressure_drop_Pa")
    figures = r.key_figures()
    said = []
    for k in keys:
        extra = plus_minus_text(bands.key_figure_pm.get(k), key_figure(k), system)
        if extra:
            said.append(f"{key_figure(k).label.lower()} {fmt(figures[k], key_figure(k).quantity, system)} {extra}")
    spec = key_figure("outlet_temperature_K")
    ranked = [(c, plus_minus_text(v, spec, system)) for c, v in bands.ranked("outlet_temperature_K")]
    ranked = [(c, t) for c, t in ranked if t]
    text = ("Within the methods' published accuracy: " + "; ".join(said) + "." if said
            else "The results hardly move within the methods' published accuracy.")
    if ranked:
        text += " Largest contributors to the outlet temperature: " + ", ".join(
            f"{c.label.lower()} ({t})" for c, t in ranked[:3]) + "."
    doc.add(f"<p>{esc(text)} The profile chart shades the bands of bulk, inner-wall and outer-surface temperature. "
            f"<b>Caution.</b> {esc(BANDS_CAUTION)}</p>")
    rows = []
    for c in bands.contributions:
        cells = [esc(c.label), esc(c.accuracy_text)]
        for k in ("outlet_temperature_K", "duty_W"):
            cells.append(esc(plus_minus_text(c.key_figure_pm.get(k), key_figure(k), system) or "—"))
        cells.append(esc(c.source) + (f'<br><span class="missed">{esc(c.failed)}</span>' if c.failed else ""))
        rows.append(cells)
    if rows:
        doc.table(["Method", "Accuracy", f"± {esc(key_figure('outlet_temperature_K').label.lower())}",
                   f"± {esc(key_figure('duty_W').label.lower())}", "Basis"],
                  rows, num_cols=(2, 3), widths=[18, 12, 12, 11, 47], font_pt=7.0)
    doc.add('<p class="small muted">' + " ".join(esc(line) for line in bands.basis if line != BANDS_CAUTION) + '</p>')


def _per_segment(doc: Body, r: Result, system: str) -> None:
    doc.heading(3, "Per segment")
    # one unit per column, chosen for its largest value (heat columns share one, to compare across)
    heat = units.display_unit_for([v for s in r.segments for v in (s.heat_input_W, s.heat_loss_W, s.duty_W)],
                                  "power", system)
    dp = units.display_unit_for([s.pressure_drop_Pa for s in r.segments], "pressure_difference", system)

    def cell(value, quantity, unit):
        return esc(units.format_value(value, quantity, system, with_unit=False, display_unit=unit))

    rows = []
    for s in r.segments:
        rows.append([
            str(s.index + 1), esc(shorten(s.name)),
            f"{esc(num(s.x_start_m, 'length', system))} – {esc(num(s.x_end_m, 'length', system))}",
            esc(num(s.inner_diameter_m, "diameter", system)), esc(num(s.outer_diameter_m, "diameter", system)),
            cell(s.heat_input_W, "power", heat), cell(s.heat_loss_W, "power", heat),
            cell(s.duty_W, "power", heat), cell(s.pressure_drop_Pa, "pressure_difference", dp),
        ])
    L, D = ulabel("length", system), ulabel("diameter", system)
    W, PD = esc(heat.label), esc(dp.label)
    doc.table(
        ["#", "Name", f"Position [{L}]", f"Bore [{D}]", f"Outer Ø [{D}]", f"Heat input [{W}]", f"Heat loss [{W}]",
         f"Heat to fluid [{W}]", f"Δp [{PD}]"],
        rows, num_cols=(0, 2, 3, 4, 5, 6, 7, 8), widths=[3, 19, 14, 9, 10, 12, 11, 11, 11], font_pt=7.5,
    )
    doc.add('<p class="small muted">Outer Ø is over the insulation. Heat to fluid is negative where the fluid cools; '
            'heat loss is negative where the surroundings heat the line.</p>')


def _per_design(doc: Body, alt: Alternative, r: Result, groups: Sequence[DesignGroup], system: str) -> None:
    """The per-segment results of a long line, summed over the segments of each design."""
    doc.heading(3, "Per segment design")
    spans = r.segments
    heat = units.display_unit_for([v for s in spans for v in (s.heat_input_W, s.heat_loss_W, s.duty_W)], "power", system)
    dp = units.display_unit_for([s.pressure_drop_Pa for s in spans], "pressure_difference", system)

    def cell(value, quantity, unit):
        return esc(units.format_value(value, quantity, system, with_unit=False, display_unit=unit))

    rows = []
    for g in groups:
        members = [spans[i] for i in g.indices if i < len(spans)]
        if not members:
            continue
        count, name = _group_head(alt, g)
        first = members[0]
        same = g.design is not None
        rows.append([
            count, name, esc(num(sum(s.x_end_m - s.x_start_m for s in members), "length", system)),
            esc(num(first.inner_diameter_m, "diameter", system)) if same else '<span class="muted">various</span>',
            esc(num(first.outer_diameter_m, "diameter", system)) if same else '<span class="muted">various</span>',
            cell(sum(s.heat_input_W for s in members), "power", heat), cell(sum(s.heat_loss_W for s in members), "power", heat),
            cell(sum(s.duty_W for s in members), "power", heat),
            cell(sum(s.pressure_drop_Pa for s in members), "pressure_difference", dp),
        ])
    L, D = ulabel("length", system), ulabel("diameter", system)
    W, PD = esc(heat.label), esc(dp.label)
    doc.table(
        ["Segments", "Name", f"Length [{L}]", f"Bore [{D}]", f"Outer Ø [{D}]", f"Heat input [{W}]", f"Heat loss [{W}]",
         f"Heat to fluid [{W}]", f"Δp [{PD}]"],
        rows, num_cols=(2, 3, 4, 5, 6, 7, 8), widths=[13, 15, 9, 8, 9, 12, 11, 12, 11], font_pt=7.5,
    )
    doc.add('<p class="small muted">Each row sums the segments of one design (numbers as in “Segments”). Outer Ø is '
            'over the insulation. Heat to fluid is negative where the fluid cools; heat loss is negative where the '
            'surroundings heat the line.</p>')


def _heat_path(doc: Body, r: Result, system: str, only: Optional[Sequence[int]] = None) -> None:
    """Per segment, the resistances from the fluid outwards with their shares, and the heat per metre;
    with ``only`` (segment indices: the first of each design of a long line) just those."""
    if not r.resistances:
        return
    chosen = r.resistances
    if only is not None:
        wanted = set(only)
        chosen = [s for s in r.resistances if s.index in wanted]
    doc.heading(3, "Heat path per segment" if only is None else "Heat path per segment design")
    if only is not None:
        doc.add('<p class="small muted">Of the first segment of each design; its like segments differ only as the '
                'temperatures along the line move the films.</p>')
    q = units.display_unit_for([v for s in chosen for v in (s.heat_loss_W_per_m, s.heat_to_fluid_W_per_m)],
                               "power_per_length", system)
    rows = []
    for s in chosen:
        table = heat_path.table_rows(s, system, with_unit=False)
        for j, (key, label, value, share) in enumerate(table):
            mark = f'<span style="color: {heat_path_style.part_colour(key)};">\u25a0</span> ' if key != "tracer" else ""
            text = (_NBSP3 if label.startswith("\u2225") else "") + mark + esc(label)
            first = j == 0
            rows.append([
                str(s.index + 1) if first else "",
                (f"{esc(shorten(s.name))}<br><span class=\"diff\">total {esc(heat_path.resistance_text(s.total_K_m_per_W, system))}"
                 "</span>" if first else ""),
                text, esc(value), esc(share),
                esc(units.format_value(s.heat_loss_W_per_m, "power_per_length", system, 3, with_unit=False,
                                       display_unit=q)) if first else "",
                esc(units.format_value(s.heat_to_fluid_W_per_m, "power_per_length", system, 3, with_unit=False,
                                       display_unit=q)) if first else "",
            ])
    def unit(text: str) -> str:  # the unit on a line of its own, so it is not broken at its slash
        return f"<br>[{esc(text)}]"

    R = ulabel(heat_path.RESISTANCE, system)
    doc.table(["#", "Segment", "Part, from the fluid outwards", f"R\u2032{unit(R)}", "Share",
               f"Heat loss{unit(q.label)}", f"Heat to fluid{unit(q.label)}"],
              rows, num_cols=(0, 3, 4, 5, 6), widths=[3, 17, 29, 14, 11, 12, 14], font_pt=7.5)
    doc.add('<p class="small muted">Resistances per metre of pipe, length-averaged over the segment, in series from the '
            'fluid to the surroundings; each share is of the total, i.e. of the temperature drop from the fluid to the '
            'surroundings. Convection and radiation (\u2225) act in parallel as the outer air film; beside each, the share '
            'of the film\u2019s heat it carries. A steam tracer is a separate path from the steam to the pipe wall. '
            'Heat loss is to the ambient air or soil (negative where the surroundings heat the line); with a jacket or '
            'steam on the pipe the path ends at the heating medium, whose heat is heat input, not loss.</p>')


def _checks(doc: Body, alt: Alternative, r: Result, system: str) -> None:
    doc.heading(3, "Checks")
    if not r.checks:
        doc.add('<p><span class="met">\u2713 No findings.</span> No check raised a warning or note for this alternative.</p>')
        return
    rows = []
    ordered = sorted(r.checks, key=check_sort_key)
    # a message that quotes a segment's name gets the name as the tables show it (a long name is printed
    # in full once, under the Segments table)
    long_names = sorted({seg.name for seg in alt.segments if shorten(seg.name) != seg.name}, key=len, reverse=True)
    for c in ordered[:MAX_CHECK_ROWS]:
        word, colour = SEVERITY_WORDS.get(c.severity, (c.severity.upper(), INK))
        where = []
        if c.segment is not None and 0 <= c.segment < len(alt.segments):
            where.append(esc(shorten(alt.segments[c.segment].name)))
        if c.x_m is not None and math.isfinite(c.x_m):
            where.append(esc(fmt(c.x_m, "length", system)))
        rows.append([f'<span style="color: {colour}; font-weight: bold;">{word}</span>',
                     " at ".join(where) or "whole line", esc(_short_names(units.check_message(c, system), long_names))])
    doc.table(["Severity", "Where", "Finding"], rows, widths=[11, 20, 69], font_pt=7.5)
    if len(ordered) > MAX_CHECK_ROWS:
        rest = ordered[MAX_CHECK_ROWS:]
        counts = {}
        for c in rest:
            counts[c.severity] = counts.get(c.severity, 0) + 1
        said = ", ".join(comparison.plural(n, sev, sev if sev == "info" else "") for sev, n in counts.items())
        doc.add(f'<p class="small muted">… and {esc(comparison.plural(len(rest), "more finding"))} ({esc(said)}), none '
                'worse than the last shown; <code>calorun solve</code> lists them all.</p>')


def _short_names(text: str, long_names: Sequence[str]) -> str:
    for name in long_names:
        if name in text:
            text = text.replace(name, shorten(name))
    return text


def _methods_and_cautions(doc: Body, solved: Sequence[Result], date_text: str) -> None:
    doc.page_break()
    doc.heading(2, "Methods and correlations")
    entries = method_entries(solved)
    if entries:
        doc.add('<p class="small">As used by the solver for the alternatives in this report, with their published sources.</p>')
        doc.table(["Method", "Source"], [[esc(a), esc(b)] for a, b in entries], widths=[24, 76], font_pt=7.5)
    else:
        doc.add('<p class="muted">No alternative was solved, so no methods were used.</p>')
    doc.add(
        '<p class="small">Units: display conversion by exact factors (1 in = 25.4 mm, 1 lb = 0.45359237 kg, '
        "1 psi = 6894.757 Pa, International Table Btu = 1055.056 J); gauge pressure = absolute − 101.325 kPa.</p>"
    )
    doc.heading(2, "Assumptions and limits")
    doc.add("<ul>" + "".join(f"<li>{esc(a)}</li>" for a in ASSUMPTIONS) + "</ul>")
    doc.heading(2, "Cautions")
    doc.add("<ul>" + "".join(f"<li>{esc(c)}</li>" for c in CAUTIONS) + "</ul>")
    doc.add(f'<p class="small muted">Produced with Calorun on {esc(date_text)}. Check values that matter by an independent method.</p>')
