"""The report's "Design for the worst case" section and the user's property table.

No physics here: the numbers come from ``Result.design`` (:class:`solver.design_cases.DesignResult`,
with its :class:`solver.hold_time.HoldTime`) and the operating :class:`~solver.results.Result`; the
words and the three cases side by side are :mod:`app.design_figures`' (the same as Key Figures and the
Hold Time view show), converted with :mod:`app.units`.
"""

from __future__ import annotations

import math
from typing import Optional, Sequence

from app import design_figures, units
from app.reporting.pdf import Body
from app.style import MISSED_COLOUR, OKABE_ITO
from app.texts import esc, fmt, heat_sinks_text, heater_text, shorten, ulabel
from solver.hold_time import BIOT_LIMIT
from solver.model import Alternative, TableFluid
from solver.results import Result

_KINDS = {"none": "none", "constant": "constant", "self_limiting": "self-limiting", "thermostat": "thermostat"}


def property_table(doc: Body, alt: Alternative, system: str) -> None:
    """A user-defined fluid's table as entered, with its freezing point and latent heat (the Hold Time's
    plateau); nothing for a library fluid."""
    fluid = alt.fluid
    if not isinstance(fluid, TableFluid):
        return
    doc.heading(3, "Fluid property table (as entered)")
    rows = [[esc(units.format_value(r.temperature_K, "temperature", system, with_unit=False)),
             esc(units.format_value(r.density_kg_per_m3, "density", system, with_unit=False)),
             esc(units.format_value(r.specific_heat_J_per_kgK, "specific_heat", system, with_unit=False)),
             esc(units.format_value(r.viscosity_Pa_s, "viscosity", system, with_unit=False)),
             esc(units.format_value(r.conductivity_W_per_mK, "conductivity", system, with_unit=False, digits=3))]
            for r in fluid.rows]
    doc.table([f"Temperature [{esc(ulabel('temperature', system))}]", f"Density [{esc(ulabel('density', system))}]",
               f"Specific heat [{esc(ulabel('specific_heat', system))}]",
               f"Viscosity [{esc(ulabel('viscosity', system))}]",
               f"Conductivity [{esc(ulabel('conductivity', system))}]"],
              rows, num_cols=(0, 1, 2, 3, 4), widths=[20, 18, 22, 18, 22], font_pt=7.5)
    freezing = fmt(fluid.freezing_point_K, "temperature", system) if fluid.freezing_point_K is not None else "not given"
    latent = (fmt(fluid.latent_heat_J_per_kg, "energy_per_mass", system) if fluid.latent_heat_J_per_kg is not None
              else "not given (the Hold Time has no freezing plateau)")
    doc.add(f'<p class="small">Freezing point: {esc(freezing)}. Latent heat of fusion: {esc(latent)}. '
            'Properties are interpolated between rows (viscosity in its logarithm) and never extrapolated.</p>')


def design_section(doc: Body, alt: Alternative, r: Result, system: str, error: str = "",
                   only: Optional[Sequence[int]] = None) -> None:
    """The design cases of one solved alternative: the three cases side by side, the tracing per
    segment, the time after the flow stops and the hot case's highest wall temperature. ``error``: why
    they could not be evaluated (said in place of the section). ``only``: the segments to list (the
    first of each design of a long line); None lists every one."""
    d = r.design
    if d is None and not error:
        return
    doc.heading(3, "Design for the worst case")
    if d is None:
        doc.box(f"<b>The design cases could not be evaluated.</b><br>{esc(error)}", MISSED_COLOUR, "#FCEDE5")
        return
    cases = d.cases
    wind = units.format_value(cases.worst_wind_speed_m_per_s, "velocity", system, digits=3)
    soil = ("" if cases.worst_soil_temperature_K is None
            else f", buried segments in soil at {fmt(cases.worst_soil_temperature_K, 'temperature', system)}")
    basis = (f"The tracing must hold {esc(fmt(d.maintain_temperature_K, 'temperature', system))} "
             f"({esc(d.maintain_basis)}), with a design margin on the heat loss (the project's "
             f"{esc(f'{cases.design_margin * 100:.0f}')} % unless a segment sets its own; common practice 10–25 %)."
             if d.maintain_temperature_K is not None else
             "No maintain temperature applies (no maintain or minimum bulk temperature, no freezing point): the "
             "tracing need is not assessed.")
    doc.add(
        f"<p>Worst case: air at {esc(fmt(cases.worst_air_temperature_K, 'temperature', system))} in a {esc(wind)} wind"
        f"{esc(soil)}, {'the flow stopped' if d.worst_no_flow else 'flowing'}. Hot case: still air at "
        f"{esc(fmt(cases.hot_air_temperature_K, 'temperature', system))}, no flow, heaters at full output "
        f"(a thermostat taken as failed on). {basis} "
        "<b>The site's meteorological data and the owner's specification decide them</b> (the project's "
        "defaults are placeholders).</p>")
    if d.worst_case_error:
        doc.box(f"<b>The flowing worst case has no solution.</b><br>{esc(d.worst_case_error)}", MISSED_COLOUR, "#FCEDE5")

    rows = [[esc(row.label), *(esc(t) for t in row.texts)] for row in design_figures.case_rows(r, system)]
    doc.table(["", "Operating", "Worst case", "Hot case"], rows, widths=[31, 23, 23, 23], font_pt=8.0)
    # the caution next to the hot case's highest wall temperature (above, and in the last column below)
    doc.box(f"<b>Caution — hot case.</b> {esc(' '.join(d.notes))}", OKABE_ITO["orange"], "#FFF6E8")

    shown = list(range(len(d.segments))) if only is None else [i for i in only if i < len(d.segments)]
    if only is not None:
        doc.add('<p class="small muted">A long line: one row per segment design, its first segment (segments alike '
                'but for name and length stand alike in the design cases; their heat sinks per metre may differ). '
                '<code>calorun solve --json</code> gives every segment.</p>')
    _tracing_table(doc, alt, r, shown, system)
    _hold_table(doc, r, shown, system)


def _tracing_table(doc: Body, alt: Alternative, r: Result, shown, system: str) -> None:
    d = r.design
    segs = d.segments
    q_values = [v for i in shown for v in (segs[i].heat_loss_W_per_m, segs[i].required_output_W_per_m,
                                           r.segments[i].heat_loss_W_per_m if i < len(r.segments) else math.nan)]
    q = units.display_unit_for(q_values, "power_per_length", system)
    words = design_figures.formatter(system)

    def cell(v):
        return esc(units.format_value(v, "power_per_length", system, digits=3, with_unit=False, display_unit=q))

    rows = []
    for i in shown:
        s = segs[i]
        span = r.segments[i] if i < len(r.segments) else None
        seg = alt.segments[i] if i < len(alt.segments) else None
        heater = esc(heater_text(seg, system)) if seg is not None else esc(_KINDS.get(s.heater_kind, s.heater_kind))
        verdict = esc(d.tracing_words(i, words))
        if s.holds is True:
            verdict = f'<span class="met">\u2713</span> {verdict}'
        elif s.holds is False:
            verdict = f'<span class="missed">\u2717</span> {verdict}'
        name = esc(shorten(s.name, 30))
        if seg is not None and seg.heat_sinks:
            name += f'<br><span class="diff">{esc(heat_sinks_text(seg))}</span>'
        rows.append([
            str(i + 1), name,
            cell(span.heat_loss_W_per_m) if span is not None else "—",
            cell(s.heat_loss_W_per_m), cell(s.heat_sinks_W_per_m), heater,
            cell(span.heater_output_W_per_m) if span is not None and s.heater_kind != "none" else "—",
            verdict,
        ])
    Q = f"<br>[{esc(q.label)}]"  # the unit on a line of its own, so it is not broken at its slash
    doc.table(["#", "Segment (heat sinks)", f"Loss, operating{Q}", f"Loss, worst case{Q}", f"Sinks, worst case{Q}",
               "Heater (per metre of heater)", f"Delivers, operating{Q}", "Tracing need, worst case"],
              rows, num_cols=(0, 2, 3, 4, 6), widths=[3, 16, 10, 10, 10, 17, 10, 24], font_pt=7.0)
    doc.add('<p class="small muted">Heat loss (loss) per metre of pipe. Operating: as solved, heat sinks included. Worst case: '
            'with the pipe held at the maintain temperature, the pipe alone; heat sinks beside it (equivalent lengths of '
            'published trace-heating practice, see the methods). The need is (loss + sinks) × (1 + margin); '
            '“has” is what the heater delivers at the maintain temperature (a self-limiting heater on its rating line, '
            'plus any steam tracer). Delivers: along the line as solved.</p>')


def _hold_table(doc: Body, r: Result, shown, system: str) -> None:
    d = r.design
    hold = d.hold_time
    segs = d.segments
    by_index = {h.index: h for h in hold.segments} if hold is not None else {}
    dur = design_figures.duration_text
    rows = []
    for i in shown:
        s = segs[i]
        h = by_index.get(i)
        hot = esc(fmt(s.hot_wall_temperature_K, "temperature", system)) if math.isfinite(s.hot_wall_temperature_K) else "—"
        if h is None:
            rows.append([str(i + 1), esc(shorten(s.name, 30)), "—", "—", "—", "—", "—", "—", hot])
            continue
        biot = f"{h.biot_number:.2g}" if math.isfinite(h.biot_number) else "—"
        if math.isfinite(h.biot_number) and h.biot_number > BIOT_LIMIT:
            biot = f'<span class="missed">{biot}</span>'
        rows.append([
            str(i + 1), esc(shorten(s.name, 30)),
            esc(dur(h.to_limit_off_s)), esc(dur(h.to_freezing_off_s)), esc(dur(h.frozen_solid_off_s)),
            esc(dur(h.to_limit_on_s)), esc(dur(h.warm_up_s)), biot, hot,
        ])
    doc.table(["#", "Segment", "Power off: to the maintain temp.", "to freezing", "frozen solid", "Heater on: to the maintain temp.",
               "Warm-up", "Biot", "Hot case: highest wall temp."],
              rows, num_cols=(0, 2, 3, 4, 5, 6, 7, 8), widths=[3, 17, 12, 10, 10, 12, 10, 6, 20], font_pt=7.0)
    notes = []
    if hold is not None:
        notes.append("Times from the moment the flow stops, from the operating temperatures, in the worst-case "
                     "surroundings; “—” where a time does not apply; “not within …” where it is never reached (it holds). "
                     "Warm-up: from the worst-case ambient to the maintain temperature with the heater on.")
        if hold.latent_heat_J_per_kg is not None:
            notes.append(f"Freezing plateau from the latent heat: {hold.latent_heat_source}.")
        elif hold.freezing_point_K is not None:
            notes.append(f"No freezing plateau: {hold.latent_heat_source}.")
        high = [h for h in hold.segments if math.isfinite(h.biot_number) and h.biot_number > BIOT_LIMIT]
        if high:
            notes.append(f"Biot number above {BIOT_LIMIT:g} at {len(high)} of {len(hold.segments)} segments: the standing "
                         "fluid's core stays warmer than the wall, so the lumped times are optimistic for the wall "
                         "(lumped capacitance holds below 0.1; Incropera & DeWitt §5.2).")
        notes.extend(w for w in hold.warnings if "Biot number" not in w)
    doc.add('<p class="small muted">' + " ".join(esc(n) for n in notes) + "</p>")
