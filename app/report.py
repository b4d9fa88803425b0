"""The summary report: a paginated PDF a reviewer can read without the app.

Works headless (``calorun report PROJECT.json -o summary.pdf``). This module is the front door:
it picks the alternatives, takes the results the caller already holds (solving only the rest),
and writes the PDF atomically. The rooms behind it:

- :mod:`app.reporting.content` — the document's sections (what the summary says);
- :mod:`app.reporting.chart` — the profile charts, drawn with QPainter;
- :mod:`app.reporting.pdf` — paging and rendering;
- :mod:`app.texts` and :mod:`app.style` — words about a design, and colours, shared with the app.
"""

from __future__ import annotations

import datetime as _dt
import os
from pathlib import Path
from typing import Mapping, Optional, Sequence

from app import units
from app.reporting.content import BANDS_MAX_CELLS, Outcome, build_html
from app.reporting.pdf import ensure_gui_application, render_pdf
from app.texts import HEADING_NAME_CHARS, shorten, unexpected_failure
from solver.errors import CalorunError
from solver.model import Alternative, Project
from solver.safe_write import atomic_replace
from solver.results import Result

__all__ = ["write_report", "solve_alternatives", "select_alternatives", "unsolved", "BANDS_MAX_CELLS"]


def solve_alternatives(alternatives: Sequence[Alternative], results: Optional[Mapping[str, object]] = None,
                       bands: Optional[Mapping[str, object]] = None, design=None) -> list[Outcome]:
    """Each alternative with its result: taken from ``results`` (name -> Result, or the exception
    its solve raised) when given there, solved here otherwise. A failed solve becomes a message
    printed in the report, not a crash. ``bands`` (name -> Bands of that same result) are used as
    given; the report computes the rest. ``design``: the project's design cases, solved with each
    alternative here (a given result without them gets them added, see :func:`_add_design`)."""
    from solver import solve

    outcomes = []
    for alt in alternatives:
        given = (results or {}).get(alt.name)
        if isinstance(given, Result):
            outcome = Outcome(alt, given, None, bands=(bands or {}).get(alt.name))
            if design is not None and given.design is None:
                _add_design(outcome, design)
            outcomes.append(outcome)
            continue
        if isinstance(given, BaseException):
            outcomes.append(Outcome(alt, None, str(given)))
            continue
        try:
            outcomes.append(Outcome(alt, solve(alt, design=design), None))
        except CalorunError as exc:
            outcome = Outcome(alt, None, str(exc))
            if design is not None:  # the line may solve without its design cases: report it and say why
                try:
                    outcome = Outcome(alt, solve(alt), None, design_error=str(exc))
                except CalorunError:
                    pass
            outcomes.append(outcome)
        except (ArithmeticError, ValueError, RuntimeError) as exc:  # a solver bug: say so in the PDF
            outcomes.append(Outcome(alt, None, unexpected_failure(exc)))
    return outcomes


def _add_design(outcome: Outcome, design) -> None:
    """Give a result handed in without design cases its design cases (a copy: the caller's result is
    left as it was); a failure is said in the report's design section."""
    import dataclasses

    from solver import design_cases, solve

    try:
        outcome.result = dataclasses.replace(
            outcome.result, design=design_cases.evaluate(outcome.alternative, outcome.result, design, solve=solve))
    except CalorunError as exc:
        outcome.design_error = str(exc)


def select_alternatives(project: Project, names: Optional[Sequence[str]]) -> list[Alternative]:
    """The alternatives named (in project order), or all; an unknown name is an error naming it."""
    if not names:
        return list(project.alternatives)
    known = {a.name for a in project.alternatives}
    unknown = [n for n in names if n not in known]
    if unknown:
        raise ValueError(
            f"alternative: {', '.join(repr(n) for n in unknown)} not in the project "
            f"(it has {', '.join(repr(n) for n in sorted(known))})"
        )
    wanted = set(names)
    return [a for a in project.alternatives if a.name in wanted]


def write_report(
    project: Project | str | os.PathLike,
    path: str | os.PathLike,
    unit_system: str = "SI",
    alternatives: Optional[Sequence[str]] = None,
    results: Optional[Mapping[str, object]] = None,
    date: Optional[str] = None,
    bands: Optional[Mapping[str, object]] = None,
    bands_max_cells: Optional[int] = BANDS_MAX_CELLS,
    outcomes_out: Optional[list] = None,
) -> Path:
    """Write the summary report of ``project`` as a PDF at ``path`` and return the path.

    ``alternatives``: names to include (default all, in project order).
    ``results``: name -> Result (or an exception) already solved, e.g. by the
    app; those are not solved again, the rest are solved here. A solve failure
    is reported in the PDF. ``bands``: name -> uncertainty bands of those results, already
    computed (the rest are computed here). ``date``: the date printed (default today, ISO
    format). ``bands_max_cells``: lines of more cells get no bands unless given (None: always
    computed). ``outcomes_out``: a list that receives the report's outcomes (the CLI reads which
    alternatives could not be solved). Works with no display; writes atomically (temporary file,
    then rename).
    """
    if unit_system not in units.UNIT_SYSTEMS:
        raise ValueError(f"unit_system: expected one of {', '.join(units.UNIT_SYSTEMS)}, got {unit_system!r}")
    if not isinstance(project, Project):
        from solver.project_io import load_project

        project = load_project(project)
    chosen = select_alternatives(project, alternatives)
    outcomes = solve_alternatives(chosen, results, bands, design=project.design_cases)
    if outcomes_out is not None:
        outcomes_out.extend(outcomes)
    body = build_html(project, outcomes, unit_system, date or _dt.date.today().isoformat(), bands_max_cells)

    ensure_gui_application()
    path = Path(path)
    title = shorten(project.name, HEADING_NAME_CHARS)
    with atomic_replace(path) as tmp:
        render_pdf(body, tmp, title, title, unit_system)
    return path


def unsolved(outcomes: Sequence[Outcome]) -> list[Outcome]:
    """The outcomes whose alternative could not be solved (each carries its reason)."""
    return [o for o in outcomes if o.result is None]
