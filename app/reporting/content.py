"""The report's sections: what the summary says, as HTML parts of a :class:`~app.reporting.pdf.Body`.

No physics here: numbers come from solved :class:`solver.results.Result` objects, labelled by the
one list of Key Figures (:data:`solver.results.KEY_FIGURES`) and converted for display with
:mod:`app.units` in the reader's unit system, units stated beside every value. Every piece of text
the user typed (names, descriptions, labels) goes through :func:`app.texts.esc`, so ``<b>`` or
``&`` print as typed.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Optional, Sequence

from app import comparison, heat_path, heat_path_style, units
from app.reporting.chart import alternative_chart, overlay_chart
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
    esc,
    fittings_text,
    fluid_source_text,
    fluid_text,
    fmt,
    insulation_text,
    key_figure_label_and_value,
    method_entries,
    num,
    pipe_text,
    plus_minus_text,
    surroundings_text,
    ulabel,
)
from solver.model import Alternative, Project
from solver.results import ASSUMPTIONS, CAUTIONS, CAUTIONS_BANNER, KEY_FIGURES, Result, check_sort_key, key_figure
from solver.uncertainty import BANDS_CAUTION, Bands, line_bands

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


def add_bands(outcomes: Sequence[Outcome]) -> None:
    """Give each solved outcome without bands its bands (perturb and re-solve; a fraction of a second
    per alternative). A perturbed solve the solver refuses is named in the Bands; a bug leaves the
    outcome without bands and says why."""
    for o in outcomes:
        if o.result is None or o.bands is not None:
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
    return esc(o.alternative.name) + (" <i>(baseline)</i>" if o.alternative.name == baseline_name else "")


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


def build_html(project: Project, outcomes: Sequence[Outcome], system: str, date_text: str) -> Body:
    """The whole report body: title, verdicts, comparison, one section per alternative, methods."""
    doc = Body(CSS)
    add_bands(outcomes)
    solved = [o.result for o in outcomes if o.result is not None]
    baseline_name = project.baseline_alternative().name

    doc.add('<p class="kicker">CALORUN · LINE DESIGN SUMMARY</p>')
    doc.heading(1, esc(project.name))
    if project.description:
        doc.add(f'<p>{esc(project.description)}</p>')
    unit_word = "SI (°C, bar(a), kPa, kW, mm, m)" if system == "SI" else "US customary (°F, psia, psi, Btu/h, in, ft)"
    not_stated = '<span class="muted">not stated</span>'
    doc.table(["Project", ""], [
        ["Prepared by", esc(project.prepared_by) or not_stated],
        ["Revision", esc(project.revision) or not_stated],
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
                         f'<span class="diff">{esc(o.error or "")}</span>', "—", "—", "—"])
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
    ref_note = f"Differences are against the baseline, <b>{esc(table.baseline_name)}</b>"
    if table.baseline_name != baseline_name:
        ref_note += f" (the project baseline {esc(baseline_name)} could not be solved)"
    doc.add(f'<p class="small muted">{ref_note}; a change in percent is shown where it helps.</p>')
    headers = ["Key figure"] + [esc(n) + (" <i>(baseline)</i>" if i == table.baseline_index else "")
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
                + ", ".join(esc(o.alternative.name) for o in failed) + ".</p>")

    doc.heading(2, "Design targets")
    if comparison.targets_set(project.targets):
        per_alt = [comparison.target_verdicts(project.targets, r) for r in solved]
        rows = []
        for j, v0 in enumerate(per_alt[0]):
            rows.append([esc(v0.label), esc(comparison.format_target(v0, system))]
                        + [_target_cell(vs[j], system) for vs in per_alt])
        rows.append(["<b>Verdict</b>", "targets and checks"]
                    + [verdict_html(comparison.design_verdict(project.targets, r), detail=False) for r in solved])
        doc.table(["Target", "Limit"] + [esc(r.name) for r in solved], rows, font_pt=8.0 if n <= 4 else 7.0)
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
    doc.heading(2, esc(alt.name), "margin-top: 0px;")
    if alt.description:
        doc.add(f"<p>{esc(alt.description)}</p>")
    if r is not None:
        doc.add(f"<p><b>Verdict:</b> {verdict_html(comparison.design_verdict(project.targets, r))}</p>")
    _feed_and_segments(doc, alt, r, system)
    if r is None:
        doc.box(f"<b>This alternative could not be solved.</b><br>{esc(o.error)}", MISSED_COLOUR, "#FCEDE5")
        return
    _key_figures(doc, r, system, o.bands)
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

    doc.heading(3, "Segments (in flow order)")
    L, D, P = ulabel("length", system), ulabel("diameter", system), ulabel("power_per_length", system)
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
            str(i + 1), esc(s.name), esc(num(s.length_m, "length", system)), bore,
            esc(num(s.elevation_change_m, "elevation", system)) if s.elevation_change_m else "0",
            fit, esc(num(s.heat_input_W_per_m, "power_per_length", system)) if s.heat_input_W_per_m else "—",
            esc(insulation_text(s, system)), esc(surroundings_text(s.surroundings, system)),
        ])
    doc.table(
        ["#", "Name", f"Length [{L}]", "Pipe", f"Rise [{ulabel('elevation', system)}]", "Fittings", f"Heat input [{P}]",
         "Insulation", "Surroundings"],
        seg_rows, num_cols=(0, 2, 4, 6), widths=[3, 11, 7, 15, 6, 14, 8, 16, 20], font_pt=7.0,
    )


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
            str(s.index + 1), esc(s.name),
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


def _heat_path(doc: Body, r: Result, system: str) -> None:
    """Per segment, the resistances from the fluid outwards with their shares, and the heat per metre."""
    if not r.resistances:
        return
    doc.heading(3, "Heat path per segment")
    q = units.display_unit_for([v for s in r.resistances for v in (s.heat_loss_W_per_m, s.heat_to_fluid_W_per_m)],
                               "power_per_length", system)
    rows = []
    for s in r.resistances:
        table = heat_path.table_rows(s, system, with_unit=False)
        for j, (key, label, value, share) in enumerate(table):
            mark = f'<span style="color: {heat_path_style.part_colour(key)};">\u25a0</span> ' if key != "tracer" else ""
            text = (_NBSP3 if label.startswith("\u2225") else "") + mark + esc(label)
            first = j == 0
            rows.append([
                str(s.index + 1) if first else "",
                (f"{esc(s.name)}<br><span class=\"diff\">total {esc(heat_path.resistance_text(s.total_K_m_per_W, system))}"
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
    for c in sorted(r.checks, key=check_sort_key):
        word, colour = SEVERITY_WORDS.get(c.severity, (c.severity.upper(), INK))
        where = []
        if c.segment is not None and 0 <= c.segment < len(alt.segments):
            where.append(esc(alt.segments[c.segment].name))
        if c.x_m is not None and math.isfinite(c.x_m):
            where.append(esc(fmt(c.x_m, "length", system)))
        rows.append([f'<span style="color: {colour}; font-weight: bold;">{word}</span>',
                     " at ".join(where) or "whole line", esc(units.check_message(c, system))])
    doc.table(["Severity", "Where", "Finding"], rows, widths=[11, 20, 69], font_pt=7.5)


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
