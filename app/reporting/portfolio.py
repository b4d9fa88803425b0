"""The Line List's summary PDF: a portfolio page for the whole list, then a table of every line (or
one compact page per line), with the standard cautions.

Reads the batch's result rows (:class:`solver.line_design.LineResult`, one per line, SI) and prints
them in the reader's units through :mod:`app.units`, in the look of the single-line report
(:mod:`app.reporting.pdf` pages and renders, :mod:`app.style` colours). No physics here: totals are
plain sums of the rows.

A pipe size and a service are shown when a row has them (``size``/``nps``, ``service``; LineResult has
neither today: the size column and row are then left out). A figure a row lacks (NaN, None) reads "—".
The top of this module (the words, :func:`portfolio`) imports no Qt; the PDF (:func:`write_portfolio`)
does, when called.

Paging stays linear in the number of lines: every cell of the long table is one line of text (tags
shortened with "…"), so no row can straddle a page and the whole document is laid out once, not once
per page (:func:`app.reporting.pdf.find_break` finds nothing to move); the failing-lines table, whose
reasons wrap, is paged first on a document of the portfolio pages alone.
"""

from __future__ import annotations

import datetime as _dt
import math
import os
from dataclasses import dataclass, field
from pathlib import Path
from typing import Optional, Sequence

from app import units
from app.design_figures import duration_text
from app.messages import plural
from app.reporting.content import CSS as REPORT_CSS
from app.style import OKABE_ITO, VERDICT_COLOURS, VERDICT_SYMBOLS
from app.texts import HEADING_NAME_CHARS, capped, esc, shorten
from solver.results import CAUTIONS, CAUTIONS_BANNER, CHECK_TITLES

__all__ = ["LINE_VERDICTS", "verdict_level", "verdict_label", "verdict_colour", "Portfolio", "portfolio",
           "why_text", "write_portfolio", "PAGES"]

#: A line's verdict (LineResult.verdict), best first.
LINE_VERDICTS: tuple[str, ...] = ("ok", "warning", "fails", "error")
#: Line verdict -> the design-verdict level whose colour and mark it takes (app.style).
_LEVEL = {"ok": "met", "warning": "warning", "fails": "missed", "error": "danger"}
#: Line verdict -> the word a reader sees.
_WORDS = {"ok": "OK", "warning": "Warning", "fails": "Fails", "error": "Not designed"}
#: What each verdict means, for the portfolio page's legend.
VERDICT_MEANINGS = {
    "ok": "designed: the chosen heater holds the maintain temperature, and no check warns",
    "warning": "designed, with a warning to read before the line is built",
    "fails": "a check fails, or no standard rating is enough: the line needs a change",
    "error": "not designed: a mistake in its row, or the solver refused the line (see why)",
}
PAGES = ("table", "per-line")
#: Characters of a tag in the long table (one line per row keeps paging linear); the full tag is on
#: its own page and in the results list.
TABLE_TAG_CHARS = 18


def verdict_level(verdict: str) -> str:
    """The app.style verdict level (met / warning / missed / danger) of a line's verdict."""
    return _LEVEL.get(str(verdict), "danger")


def verdict_label(verdict: str) -> str:
    """The mark and word of a line's verdict ("✓ OK", "✗ Fails"): colour is never the only cue."""
    v = str(verdict)
    return f"{VERDICT_SYMBOLS[verdict_level(v)]} {_WORDS.get(v, v or 'unknown')}"


def verdict_colour(verdict: str) -> str:
    """The text colour (hex) of a line's verdict."""
    return VERDICT_COLOURS[verdict_level(str(verdict))]


def _finite(v) -> Optional[float]:
    if v is None or isinstance(v, bool):
        return None
    try:
        f = float(v)
    except (TypeError, ValueError):
        return None
    return f if math.isfinite(f) else None


def _get(r, *names):
    for n in names:
        v = getattr(r, n, None)
        if v is not None and v != "":
            return v
    return None


def line_length_m(r) -> Optional[float]:
    return _finite(_get(r, "length_m"))


def line_heat_loss_W(r) -> Optional[float]:
    """A line's heat loss [W]: its own total when it carries one, else heat loss per metre × length."""
    total = _finite(_get(r, "heat_loss_W"))
    if total is not None:
        return total
    q, length = _finite(getattr(r, "heat_loss_W_per_m", None)), line_length_m(r)
    return q * length if q is not None and length is not None else None


def worst_check_title(r) -> str:
    """The worst check's short title in plain words ("wall too hot in the hot case"), "" when none."""
    code = str(_get(r, "worst_check") or "").strip()
    if not code:
        return ""
    return CHECK_TITLES.get(code, code.replace("_", " ").lower())


def why_text(r) -> str:
    """Why a line has its verdict, in plain words: the result's own message (the reasons it fails, or why
    it could not be designed), else its worst check's words."""
    message = str(_get(r, "message") or "").strip()
    words = str(_get(r, "worst_check_message") or "").strip()
    text = message or words or worst_check_title(r)
    return text or "no reason recorded"


@dataclass
class Portfolio:
    """The whole list in a few numbers: sums over the lines that have the figure."""

    lines: int
    counts: dict[str, int]
    installed_power_W: float
    installed_power_lines: int
    heat_loss_W: float
    heat_loss_lines: int
    length_m: float
    length_lines: int
    circuits: int
    circuit_lines: int
    problems: list = field(default_factory=list)  # verdict "fails" or "error", in list order
    warnings: list = field(default_factory=list)


def portfolio(results: Sequence) -> Portfolio:
    """Totals of installed power, heat loss, length and circuits (each over the lines that have it),
    counts by verdict, and the lines that fail or could not be designed."""
    counts = {v: 0 for v in LINE_VERDICTS}
    power = loss = length = 0.0
    n_power = n_loss = n_length = 0
    circuits = n_circuits = 0
    problems, warnings = [], []
    for r in results:
        v = str(getattr(r, "verdict", "error"))
        counts[v] = counts.get(v, 0) + 1
        p = _finite(getattr(r, "installed_power_W", None))
        if p is not None:
            power += p
            n_power += 1
        q = line_heat_loss_W(r)
        if q is not None:
            loss += q
            n_loss += 1
        L = line_length_m(r)
        if L is not None:
            length += L
            n_length += 1
        c = getattr(r, "circuits", None)
        if isinstance(c, int) and not isinstance(c, bool):
            circuits += c
            n_circuits += 1
        if v in ("fails", "error"):
            problems.append(r)
        elif v == "warning":
            warnings.append(r)
    return Portfolio(len(results), counts, power, n_power, loss, n_loss, length, n_length, circuits, n_circuits,
                     problems, warnings)


# --------------------------------------------------------------------------- the document

# the report's style, with tighter cells: a line list's table has many columns
CSS = REPORT_CSS + """
table.grid th { padding: 2px 4px 2px 4px; }
table.grid td { padding: 1px 4px 1px 4px; }
"""


def _sentence(text: str) -> str:
    return text[:1].upper() + text[1:]


def _why_html(r, cap: int = 600) -> str:
    title = worst_check_title(r)
    tail = f' <span class="diff">(worst check: {esc(title)})</span>' if title else ""
    return esc(capped(why_text(r), cap, what="message")) + tail


def _verdict_html(verdict: str) -> str:
    return (f'<span style="color: {verdict_colour(verdict)}; font-weight: bold;">'
            f'{esc(verdict_label(verdict))}</span>')


def _v(value, quantity: str, system: str, digits: int = 3, unit=None) -> str:
    """A value without its unit (the column or row head states it); "—" when there is none."""
    return units.format_value(_finite(value), quantity, system, digits=digits, with_unit=False, display_unit=unit)


def _with_unit(value, quantity: str, system: str, digits: int = 4) -> str:
    return units.format_value(_finite(value), quantity, system, digits=digits)


def _hold(r) -> str:
    h = getattr(r, "hold_time_s", None)
    if h is None:
        return "—"
    try:
        return duration_text(float(h))
    except (TypeError, ValueError):
        return "—"


def _circuits(r) -> str:
    c = getattr(r, "circuits", None)
    return str(c) if isinstance(c, int) and not isinstance(c, bool) else "—"


def _size(r) -> str:
    s = _get(r, "size", "nps")
    return esc(shorten(str(s), 8)) if s is not None else "—"


def _u(quantity: str, system: str) -> str:
    return esc(units.label(quantity, system))


def _front(doc, results: Sequence, p: Portfolio, system: str, title: str, list_name: str, date_text: str) -> None:
    doc.add('<p class="kicker">CALORUN · LINE LIST SUMMARY</p>')
    doc.heading(1, esc(shorten(title or "Line list", HEADING_NAME_CHARS)))
    unit_word = "SI (°C, kW, W/m, mm, m)" if system == "SI" else "US customary (°F, Btu/h, W/ft, in, ft)"
    rows = []
    if list_name:
        rows.append(["Line list", esc(capped(list_name))])
    rows += [
        ["Lines", esc(plural(p.lines, "line"))],
        ["Date", esc(date_text)],
        ["Units", esc(unit_word)],
    ]
    doc.table(["Portfolio", ""], rows, widths=[22, 78], font_pt=8.5)
    doc.box(f"<b>Caution.</b> {esc(CAUTIONS_BANNER)} See “Cautions” at the end.", OKABE_ITO["orange"], "#FFF6E8")

    doc.heading(2, "Totals")
    power_unit = units.display_unit_for([p.installed_power_W, p.heat_loss_W], "power", system)

    def total(value: float, counted: int, what: str) -> str:
        text = esc(units.format_value(value, "power", system, digits=4, display_unit=power_unit))
        if counted < p.lines:
            text += f' <span class="diff">over {esc(plural(counted, "line"))} of {p.lines} ({esc(what)})</span>'
        return text

    rows = [
        ["Installed heater power", total(p.installed_power_W, p.installed_power_lines,
                                          "the others have no heater or were not designed")],
        ["Heat loss, in operation", total(p.heat_loss_W, p.heat_loss_lines, "the others have no figure")],
    ]
    if p.length_lines:
        rows.append(["Line length", esc(units.format_value(p.length_m, "length", system))
                     + (f' <span class="diff">over {esc(plural(p.length_lines, "line"))} of {p.lines}</span>'
                        if p.length_lines < p.lines else "")])
    if p.circuit_lines:
        rows.append(["Heater circuits", f"{p.circuits:,}".replace(",", "\u2009")
                     + f' <span class="diff">on {esc(plural(p.circuit_lines, "line"))} with a maximum circuit length</span>'])
    doc.table(["Figure", "Sum over the list"], rows, num_cols=(), widths=[30, 70], font_pt=8.5)
    doc.add('<p class="small muted">Installed power: the chosen standard heater output × the heater length of each line. '
            'Heat loss: each whole line\'s heat loss to its surroundings as solved in operation, summed. A line that could '
            'not be designed adds nothing, so the totals are low by whatever those lines need.</p>')

    doc.heading(2, "Lines by verdict")
    rows = []
    for v in LINE_VERDICTS + tuple(k for k in p.counts if k not in LINE_VERDICTS):
        n = p.counts.get(v, 0)
        share = f"{100.0 * n / p.lines:.0f} %" if p.lines else "—"
        rows.append([_verdict_html(v), str(n), share, esc(VERDICT_MEANINGS.get(v, ""))])
    doc.table(["Verdict", "Lines", "Share", "Meaning"], rows, num_cols=(1, 2), widths=[18, 7, 7, 68], font_pt=8.0)

    doc.heading(2, "Lines that fail or could not be designed")
    if not p.problems:
        doc.add('<p><span class="met">\u2713 None.</span> Every line was designed and no check failed.'
                + (f" {esc(plural(len(p.warnings), 'line'))} with a warning: see the table." if p.warnings else "")
                + "</p>")
    else:
        # the failing lines first, then the ones not designed; each in list order
        ordered = [r for r in p.problems if str(r.verdict) == "fails"] + [r for r in p.problems if str(r.verdict) != "fails"]
        rows = []
        for r in ordered:
            row = getattr(r, "row", None)
            rows.append([esc(shorten(str(getattr(r, "tag", "") or "(no tag)"), 28)),
                         str(row) if isinstance(row, int) else "—",
                         _verdict_html(str(r.verdict)), esc(_sentence(worst_check_title(r))) or "—",
                         esc(capped(why_text(r), 600, what="message"))])
        doc.add('<p class="small muted">Failing lines first, then those not designed, each in list order. Row: the line '
                'list\'s row as a spreadsheet shows it (the header is row 1). Fix the row and run the list again (lines '
                'already designed are skipped), or open the line in Calorun (File ▸ Open Line List…) and change its '
                'design there.' + (f" {esc(plural(len(p.warnings), 'more line'))} designed with a warning: see the table."
                                   if p.warnings else "") + '</p>')
        doc.table(["Tag", "Row", "Verdict", "Worst check", "Why, in plain words"], rows, num_cols=(1,),
                  widths=[15, 5, 15, 17, 48], font_pt=7.0)


def _table(doc, results: Sequence, system: str) -> None:
    from app.reporting.pdf import Heading

    # the heading starts the page itself (a page-break paragraph before it can leave the heading looking
    # stranded to the paging check, and the whole list would be laid out a second time)
    doc.parts.append(Heading(2, "Every line", "margin-top: 0px;", break_before=True))
    q = units.display_unit_for([_finite(getattr(r, n, None)) for r in results
                                for n in ("heat_loss_W_per_m", "required_output_W_per_m", "chosen_output_W_per_m")],
                               "power_per_length", system)
    L = _u("length", system)
    T = _u("temperature", system)
    Q = esc(q.label)
    # a pipe-size column only when the rows carry one
    sized = any(_get(r, "size", "nps") is not None for r in results)
    tag_chars = TABLE_TAG_CHARS - 4 if sized else TABLE_TAG_CHARS
    rows = []
    for r in results:
        cells = [esc(shorten(str(getattr(r, "tag", "") or "(no tag)"), tag_chars))]
        if sized:
            cells.append(_size(r))
        cells += [
            esc(_v(line_length_m(r), "length", system, 4)) if line_length_m(r) is not None else "—",
            esc(_v(_get(r, "maintain_temperature_K"), "temperature", system)),
            esc(_v(getattr(r, "heat_loss_W_per_m", None), "power_per_length", system, unit=q)),
            esc(_v(getattr(r, "required_output_W_per_m", None), "power_per_length", system, unit=q)),
            esc(_v(getattr(r, "chosen_output_W_per_m", None), "power_per_length", system, unit=q)),
            _circuits(r),
            esc(_v(getattr(r, "hot_case_max_wall_K", None), "temperature", system)),
            esc(_hold(r)),
            _verdict_html(str(getattr(r, "verdict", "error"))),
        ]
        rows.append(cells)
    # the unit on a line of its own, so it is not broken at its slash
    heads = ["Tag"] + (["Size [NPS]"] if sized else []) + [
        f"Length<br>[{L}]", f"Maintain<br>[{T}]", f"Heat loss<br>[{Q}]", f"Required<br>[{Q}]", f"Chosen<br>[{Q}]",
        "Circuits", f"Hot-case wall<br>[{T}]", "Hold time", "Verdict"]
    widths = [14, 6, 7, 9, 7, 9, 7, 8, 9, 9, 15] if sized else [17, 8, 9, 8, 9, 8, 8, 9, 9, 15]
    first_num = 2 if sized else 1
    doc.table(heads, rows, num_cols=tuple(range(first_num, len(heads) - 1)), widths=widths, font_pt=7.0)
    doc.add('<p class="small muted">Heat loss: per metre of pipe, the highest of the line\'s segments in operation, heat '
            'sinks included. Required: the heater output per metre of heater that holds the maintain temperature in the '
            'worst case, with the design margin; chosen: the smallest standard rating at or above it. Hot-case wall: '
            'the highest wall temperature with still warm air, no flow and the heater full on. Hold time: after a power '
            'failure (flow stopped, heater off, worst-case surroundings), to freezing for a fluid that freezes, else to '
            'the maintain temperature (“holds”: never reached). “—”: no figure (not designed, or not asked for). '
            f'Tags longer than {tag_chars} characters are shortened with “…”; the results list gives them in full.</p>')


def _line_page(doc, r, system: str) -> None:
    doc.page_break()
    verdict = str(getattr(r, "verdict", "error"))
    tag = str(getattr(r, "tag", "") or "(no tag)")
    row = getattr(r, "row", None)
    doc.add(f'<p class="kicker">LINE{esc(f" · ROW {row}" if isinstance(row, int) else "")}</p>')
    doc.heading(2, esc(shorten(tag, HEADING_NAME_CHARS)), "margin-top: 0px;")
    service = _get(r, "service")
    if service:
        doc.add(f"<p>{esc(capped(str(service), 400, what='service'))}</p>")
    doc.add(f"<p><b>Verdict:</b> {_verdict_html(verdict)}</p>")
    def f(name: str, quantity: str, digits: int = 3) -> str:
        return esc(_with_unit(getattr(r, name, None), quantity, system, digits))

    size = _get(r, "size", "nps")
    left = ([["Pipe size", esc(f"NPS {size}")]] if size is not None else []) + [
        ["Length", f("length_m", "length", 4)],
        ["Maintain temperature", f("maintain_temperature_K", "temperature")],
        ["Insulation thickness", f("insulation_thickness_m", "thickness")],
        ["Heat loss per metre", f("heat_loss_W_per_m", "power_per_length")],
        ["Required heater output", f("required_output_W_per_m", "power_per_length")],
        ["Chosen heater output", f("chosen_output_W_per_m", "power_per_length")],
        ["Heater circuits", _circuits(r)],
        ["Installed heater power", f("installed_power_W", "power", 4)],
    ]
    right = [
        ["Hot case: highest wall", f("hot_case_max_wall_K", "temperature")],
        ["Highest outer surface", f("max_outer_surface_K", "temperature")],
        ["Hold time after a power failure", esc(_hold(r))],
        ["Outlet (operating)", f("outlet_temperature_K", "temperature")],
        ["Lowest bulk (operating)", f("min_bulk_temperature_K", "temperature")],
    ]
    right += [["", ""]] * (len(left) - len(right))
    doc.table(["Line and heater", "", "Temperatures and time", ""], [a + b for a, b in zip(left, right)],
              num_cols=(1, 3), widths=[27, 21, 30, 22], font_pt=8.5)
    if verdict == "ok":
        note = str(_get(r, "message") or "")
        if note:
            doc.add(f'<p class="small"><b>Note:</b> {esc(capped(note, 1000, what="message"))}</p>')
    else:
        doc.box(f"<b>{esc(verdict_label(verdict))}.</b> {_why_html(r, 1000)}", verdict_colour(verdict),
                "#FCEDE5" if verdict_level(verdict) in ("missed", "danger") else "#FFF6E8")
    doc.add('<p class="small muted">Heat loss per metre of pipe: the highest of the line\'s segments in operation, heat '
            'sinks included. Required output, per metre of heater: what holds the maintain temperature in the worst case, '
            'with the design margin; chosen: the smallest standard rating at or above it. Hold time: flow stopped, heater '
            'off, worst-case surroundings, to freezing for a fluid that freezes, else to the maintain temperature. '
            'The line\'s project file (in <i>lines/</i> beside the results list) opens in Calorun with every case, '
            'check and profile: File ▸ Open Line List…, then double-click the line.</p>')


def _cautions(doc, date_text: str) -> None:
    doc.page_break()
    doc.heading(2, "Cautions", "margin-top: 0px;")
    doc.add("<ul>" + "".join(f"<li>{esc(c)}</li>" for c in CAUTIONS) + "</ul>")
    doc.add('<p>Every line here was designed by the same engine, with the same checks, as a single line in the app; '
            'the list\'s template supplies what a row does not say, and the design cases (worst and hot) are the '
            'template\'s — <b>the site\'s meteorological data and the owner\'s specification decide them</b>. '
            'Standard heater ratings are common practice, not any maker\'s range. Defer to local codes and licensed '
            'engineering review before anything is bought or built.</p>')
    doc.add(f'<p class="small muted">Produced with Calorun on {esc(date_text)}. Check values that matter by an '
            'independent method.</p>')


def build_body(results: Sequence, *, pages: str = "table", system: str = "SI", title: str = "Line list",
               list_name: str = "", date: Optional[str] = None, settle_front=None):
    """The document body (:class:`app.reporting.pdf.Body`): the portfolio page, the lines, the cautions.

    ``settle_front(body)``: called with a body of the portfolio pages alone, before the lines are added
    (:func:`write_portfolio` lays it out there, so the failing-lines table's page breaks are found on those
    few pages, not by laying out the whole list again for each)."""
    from app.reporting.pdf import Body

    if pages not in PAGES:
        raise ValueError(f"pages: expected one of {', '.join(PAGES)}, got {pages!r}")
    if system not in units.UNIT_SYSTEMS:
        raise ValueError(f"system: expected one of {', '.join(units.UNIT_SYSTEMS)}, got {system!r}")
    date_text = date or _dt.date.today().isoformat()
    p = portfolio(results)
    doc = Body(CSS)
    _front(doc, results, p, system, title, list_name, date_text)
    if settle_front is not None:
        settle_front(doc)  # the parts keep the page breaks found (Table.splits, Heading.break_before)
    if pages == "table":
        _table(doc, results, system)
    else:
        for r in results:
            _line_page(doc, r, system)
    _cautions(doc, date_text)
    return doc


def write_portfolio(results: Sequence, path: str | os.PathLike, *, pages: str = "table", system: str = "SI",
                    title: str = "Line list", list_name: str = "", date: Optional[str] = None) -> Path:
    """Write the Line List's summary PDF at ``path`` (atomically) and return the path.

    ``results``: the LineResult rows, in list order (bad rows included, verdict "error").
    ``pages``: "table" (one table of every line, as many pages as it takes) or "per-line" (one
    compact page per line). ``system``: "SI" (A4) or "US" (Letter, US customary units).
    ``title``/``list_name``: printed on the portfolio page; ``date``: the date printed (default today).
    Works with no display (an offscreen Qt application is made when there is none).
    """
    import tempfile

    from app.reporting.pdf import ensure_gui_application, render_pdf
    from solver.safe_write import atomic_replace

    ensure_gui_application()
    results = list(results)
    short_title = shorten(title or "Line list", HEADING_NAME_CHARS)
    head = "Line list summary" + (f" — {shorten(list_name, HEADING_NAME_CHARS)}" if list_name else "")

    def settle(front) -> None:
        with tempfile.TemporaryDirectory(prefix="calorun-portfolio-") as scratch:
            render_pdf(front, Path(scratch) / "front.pdf", short_title, head, system)

    body = build_body(results, pages=pages, system=system, title=title, list_name=list_name, date=date,
                      settle_front=settle)
    path = Path(path)
    with atomic_replace(path) as tmp:
        render_pdf(body, tmp, short_title, head, system)
    return path
