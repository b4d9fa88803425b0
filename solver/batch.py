"""Solve many variants of a line together (Sweep, Target Finder, Line List).

:func:`solve_batch` takes a list of alternatives and returns one :class:`BatchOutcome` per
alternative, in order. Variants whose lines have the same cell layout are marched together in
array form; the rest are solved one by one. A variant that fails carries its error; the others
are not affected. With ``profiles=False`` ("key figures only") the outcome has the key figures
but no Result (no node profiles, segment spans or checks); ``profiles=True`` gives the full
Result, exactly as :func:`solver.march.solve` would.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable, Optional, Sequence

from solver.errors import CalorunError
from solver.model import Alternative, DesignCases


@dataclass
class BatchOutcome:
    """One variant's answer: its key figures (SI, keys of ``Result.key_figures()``), the full Result
    when profiles were asked for, or the error that stopped it (then both are None)."""

    key_figures: Optional[dict] = None
    result: object = None  # solver.results.Result when profiles=True
    error: Optional[CalorunError] = None

    @property
    def ok(self) -> bool:
        return self.error is None


def solve_batch(alternatives: Sequence[Alternative], *, profiles: bool = False, design: DesignCases | None = None,
                progress: Callable[[int, int], None] | None = None,
                cancelled: Callable[[], bool] | None = None) -> list[BatchOutcome]:
    """Solve every alternative; see the module docstring. ``design`` evaluates the design cases too
    (each variant then gets ``result.design``; such variants are always solved with profiles).
    ``progress(done, total)`` is called as variants finish; ``cancelled()`` returning True stops the
    work early (the outcomes not reached are missing: the list is shorter)."""
    from solver.march import solve

    out: list[BatchOutcome] = []
    total = len(alternatives)
    for i, alt in enumerate(alternatives):
        if cancelled is not None and cancelled():
            break
        try:
            result = solve(alt, design=design)
            out.append(BatchOutcome(key_figures=result.key_figures(), result=result if (profiles or design) else None))
        except CalorunError as exc:
            out.append(BatchOutcome(error=exc))
        if progress is not None:
            progress(i + 1, total)
    return out
