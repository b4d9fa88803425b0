"""Comparison of alternatives: Key Figures side by side and verdicts on the targets.

No Qt and no physics: this only reads solved :class:`solver.results.Result`
objects and the project's :class:`solver.model.Targets`. The Side-by-Side view
and the summary report both use it, so they always agree.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import NamedTuple, Optional, Sequence

from app import units
from app.messages import plural
from solver.model import Targets
from solver.results import KEY_FIGURES, KeyFigure, Result


#: One Key Figures row (the one list lives in :mod:`solver.results`).
FigureSpec = KeyFigure

#: The rows of the comparison, in reading order: the Key Figures worth comparing.
KEY_FIGURE_SPECS: tuple[KeyFigure, ...] = tuple(f for f in KEY_FIGURES if f.compared)


@dataclass
class ComparisonRow:
    """Values of one Key Figure per alternative (SI) and differences against the baseline."""

    spec: FigureSpec
    values: list[Optional[float]]
    differences: list[Optional[float]]  # value - baseline value; None for the baseline itself

    @property
    def key(self) -> str:
        return self.spec.key

    @property
    def label(self) -> str:
        return self.spec.label


@dataclass
class ComparisonTable:
    """Key Figures of several alternatives; column ``baseline_index`` is the reference."""

    names: list[str]
    baseline_index: int
    rows: list[ComparisonRow] = field(default_factory=list)

    @property
    def baseline_name(self) -> str:
        return self.names[self.baseline_index]

    def row(self, key: str) -> ComparisonRow:
        for r in self.rows:
            if r.key == key:
                return r
        raise KeyError(f"no comparison row {key!r}")


def _finite(v) -> Optional[float]:
    try:
        f = float(v)
    except (TypeError, ValueError):
        return None
    return f if math.isfinite(f) else None


def baseline_index(names: Sequence[str], baseline_name: Optional[str]) -> int:
    """Index of the baseline among ``names``; the first when it is None or absent."""
    if baseline_name is not None:
        for i, n in enumerate(names):
            if n == baseline_name:
                return i
    return 0


def compare(results: Sequence[Result], baseline_name: Optional[str] = None) -> ComparisonTable:
    """Key Figures of ``results`` side by side, with differences against the baseline.

    ``baseline_name`` names one of the results; when it is None or not among
    them (e.g. the baseline failed to solve) the first result is the reference.
    """
    results = list(results)
    if not results:
        raise ValueError("results: at least one solved alternative is needed for a comparison, got none")
    names = [r.name for r in results]
    base = baseline_index(names, baseline_name)
    figures = [r.key_figures() for r in results]
    rows = []
    for spec in KEY_FIGURE_SPECS:
        values = [_finite(f.get(spec.key)) for f in figures]
        ref = values[base]
        diffs: list[Optional[float]] = []
        for i, v in enumerate(values):
            if i == base or v is None or ref is None:
                diffs.append(None)
            else:
                diffs.append(v - ref)
        rows.append(ComparisonRow(spec, values, diffs))
    return ComparisonTable(names, base, rows)


def format_difference(diff: Optional[float], reference: Optional[float], spec: FigureSpec, system: str) -> str:
    """A signed difference in display units, with the relative change for non-temperatures.

    E.g. ``'+2.4 K'`` or ``'−12.0 kPa (−8 %)'``; ``'—'`` when undefined, ``'±0'`` when equal. The
    difference is shown in the unit the reference value is shown in and rounded to the resolution
    it is shown with (4 significant digits; 0.1 degree for temperatures), so noise reads as ±0.
    """
    if diff is None:
        return "—"
    sign = "+" if diff > 0 else units.MINUS
    if spec.quantity != "temperature" and reference in (None, 0):
        # nothing to read the difference against: the one format, where round-off reads as "< 1 mW"
        text = units.format_value(abs(diff), spec.difference_quantity, system)
        return "±0" if diff == 0 or text.startswith("<") else f"{sign}{text}"
    if spec.quantity == "temperature":
        u = units.unit(spec.difference_quantity, system)
        decimals = 1
    else:
        u = units.pick_unit(reference, spec.difference_quantity, system)
        mag = math.floor(math.log10(abs(u.scale * reference)))
        decimals = max(0, 3 - mag)
    shown = abs(diff) * u.scale  # a difference: no offset
    if round(shown, decimals) == 0:
        return "±0"
    out = f"{sign}{units.format_number(shown, decimals=decimals)}" + (f" {u.label}" if u.label else "")
    if spec.quantity != "temperature" and reference not in (None, 0):
        pct = 100.0 * diff / abs(reference)
        if 0.5 <= abs(pct) < 1000:
            out += f" ({'+' if pct >= 0 else units.MINUS}{abs(pct):.0f} %)"
    return out


def format_figure(value: Optional[float], spec: FigureSpec, system: str) -> str:
    """A Key Figure in display units, e.g. ``'80.0 °C'``."""
    return units.format_value(value, spec.quantity, system)


# --------------------------------------------------------------------------- targets


class TargetVerdict(NamedTuple):
    """One design target judged for one alternative.

    ``limit`` and ``value`` are SI; ``relation`` is ``"≥"`` (value must be at
    least the limit) or ``"≤"`` (at most); ``quantity`` is the app.units quantity.
    """

    label: str
    limit: float
    value: Optional[float]
    met: bool
    quantity: str
    relation: str
    key: str


# Target field -> (label, Key Figure compared, relation, quantity)
TARGET_SPECS: tuple[tuple[str, str, str, str, str], ...] = (
    ("outlet_temperature_min_K", "Outlet temperature, minimum", "outlet_temperature_K", "≥", "temperature"),
    ("outlet_temperature_max_K", "Outlet temperature, maximum", "outlet_temperature_K", "≤", "temperature"),
    ("max_inner_wall_temperature_K", "Inner-wall temperature, maximum", "max_inner_wall_temperature_K", "≤", "temperature"),
    ("max_pressure_drop_Pa", "Pressure drop, maximum", "pressure_drop_Pa", "≤", "pressure_difference"),
    ("max_heat_input_W", "Heat input, maximum", "heat_input_W", "≤", "power"),
)


def target_verdicts(targets: Optional[Targets], result: Result) -> list[TargetVerdict]:
    """Each target set on the project, judged for ``result`` (unset targets are left out).

    A target is met when the value is on the allowed side of the limit or equal
    to it; an undefined value (NaN) never meets a target.
    """
    if targets is None:
        return []
    figures = result.key_figures()
    out = []
    for field_name, label_text, figure_key, relation, quantity in TARGET_SPECS:
        limit = getattr(targets, field_name)
        if limit is None:
            continue
        value = _finite(figures.get(figure_key))
        if value is None:
            met = False
        elif relation == "≥":
            met = value >= limit
        else:
            met = value <= limit
        out.append(TargetVerdict(label_text, float(limit), value, met, quantity, relation, field_name))
    return out


def targets_set(targets: Optional[Targets]) -> bool:
    """Whether any target is set on the project."""
    return targets is not None and any(getattr(targets, f[0]) is not None for f in TARGET_SPECS)


def format_target(verdict: TargetVerdict, system: str) -> str:
    """The target as a condition, e.g. ``'≤ 150.0 °C'``."""
    return f"{verdict.relation} {units.format_value(verdict.limit, verdict.quantity, system)}"


def all_met(verdicts: Sequence[TargetVerdict]) -> bool:
    return all(v.met for v in verdicts)


# --------------------------------------------------------------------------- the verdict at a glance


@dataclass(frozen=True)
class DesignVerdict:
    """Targets and checks of one solved alternative, judged together.

    A design with a danger or warning check is never shown as simply "met": ``level`` is the worst
    of the target outcome and the checks: ``"danger"`` (a danger check), ``"missed"`` (a target
    missed), ``"warning"`` (a warning check), or ``"met"``.
    """

    targets_met: int
    targets_total: int
    danger: int
    warning: int
    first_danger: str = ""  # message of the first danger check (worst first, in flow order)
    first_warning: str = ""

    @property
    def level(self) -> str:
        if self.danger:
            return "danger"
        if self.targets_met < self.targets_total:
            return "missed"
        if self.warning:
            return "warning"
        return "met"

    def text(self, detail: bool = True) -> str:
        """E.g. ``'4/4 targets met · 1 danger: freezes with flow stopped'``."""
        parts = []
        if self.targets_total:
            parts.append(f"{self.targets_met}/{self.targets_total} targets met")
        if self.danger:
            parts.append(plural(self.danger, "danger") + (f": {self.first_danger}" if detail and self.first_danger else ""))
        if self.warning:
            parts.append(plural(self.warning, "warning")
                         + (f": {self.first_warning}" if detail and self.first_warning and not self.danger else ""))
        if not parts:
            return "no targets set · no warnings"
        if not self.danger and not self.warning:
            parts.append("no warnings")
        return " · ".join(parts)


def design_verdict(targets: Optional[Targets], result: Result) -> DesignVerdict:
    """Targets met and checks raised for ``result``, for the at-a-glance verdict."""
    verdicts = target_verdicts(targets, result)
    first = {}
    for c in result.checks:  # the solver lists the worst first, in flow order
        first.setdefault(c.severity, c.title)
    counts = result.check_counts()
    return DesignVerdict(
        targets_met=sum(v.met for v in verdicts), targets_total=len(verdicts),
        danger=counts.get("danger", 0), warning=counts.get("warning", 0),
        first_danger=first.get("danger", ""), first_warning=first.get("warning", ""),
    )
