"""Target Finder: the smallest value of one parameter that meets every target.

The user picks what to vary (a :class:`~solver.variants.Parameter`) and what to meet (a list of
:class:`Target`: outlet temperature at least / at most, bulk temperature everywhere at least, inner wall
at most, outer surface at most, heat loss per metre at most, pressure drop at most, and with the project's
design cases the worst-case bulk temperature and the hold time after a power failure). Every target has
a *margin* in its own SI unit, positive when met.

Continuous parameters (heater output, flows, temperatures, steam pressure, a segment's length):

1. the range is scanned at :data:`SCAN_POINTS` evenly spaced values, ends included, solved together in one
   :func:`solver.batch.solve_batch` call (the bracket is checked before any root is sought);
2. at the first scanned value that meets every target, each target that failed at the value before is
   solved for the value where its margin is zero by Brent's method (``scipy.optimize.brentq``, to
   :data:`RELATIVE_TOLERANCE` of the value), each target's margin taken as monotone between two scanned
   values; the answer is the largest of those roots, i.e. the smallest value meeting them all (taken on
   the side of the root where the margin is met). Between two scanned values that each miss a different
   target, the same is done for a window that may meet both.

**The rule is the smallest value that meets every target** — the cheapest end for heater output,
insulation, steam pressure, medium and inlet temperature, segment length and bore; for a flow, the least
flow that does (to find the most flow a target allows, read it off a Sweep). Discrete parameters
(insulation thickness, bore): every standard value is solved in one call and the smallest that meets
every target is the answer.

Brent's method comes from ``scipy.optimize``, whose first import costs about 0.35 s on this machine;
:func:`prepare` imports it, so the app can pay that off the GUI thread before the first search.

When no value meets the targets, :attr:`FinderResult.explanation` says why in plain words: the line fails
to solve everywhere ("the line fails to solve at every value tried: <the solver's message>"); a target
is missed even at the value best for it ("no heater output in the range searched can hold 55.0 °C in Road
crossing: even at 80 W/m the bulk falls to 52.3 °C in Road crossing"; "no insulation thickness on the list
can keep the outer surface at or below 50.0 °C: even at 100 mm the outer surface is 52.3 °C"); a minimum
bulk temperature above the feed's; or two targets pull apart ("heater output cannot hold 55.0 °C in Road
crossing without the inner wall passing 110.0 °C: that needs at least 31.2 W/m, and above 24.8 W/m the inner
wall passes 110.0 °C").

The **binding** target is the one with the least margin at the answer as a share of its own value
(kelvin for temperatures), so targets of different kinds compare; on a list of standard values, it is the
target that rules out the size below the answer (the least margin among those, when several do).
"""

from __future__ import annotations

import math
import re
import threading
from dataclasses import dataclass
from typing import Optional, Sequence

import numpy as np

from solver.batch import BatchOutcome
from solver.errors import InputError
from solver.model import NAME_MAX_CHARS, Alternative, DesignCases
from solver.results import KEY_FIGURE_BY_KEY
from solver.variants import (INSULATION_LIST_SOURCE, Formatter, Parameter, Variant, duration_words, make_variants,
                             si_text, solve_prepared)

#: Values scanned over a continuous range before the roots are sought (ends included).
SCAN_POINTS = 7
#: Brent's method stops within this share of the value (plus a millionth of the range, for roots near 0).
RELATIVE_TOLERANCE = 1e-4

#: Extra figures (beyond Result.key_figures) the design targets are judged against.
WORST_CASE_MIN_BULK_KEY = "worst_case_min_bulk_temperature_K"
HOLD_TIME_KEY = "hold_time_s"
DESIGN_FIGURE_LABELS = {WORST_CASE_MIN_BULK_KEY: ("Worst-case min bulk temperature", "temperature"),
                        HOLD_TIME_KEY: ("Hold time after a power failure", "time")}


@dataclass(frozen=True)
class _Kind:
    words: str  # "outer surface at most"
    figure: str  # the figure it is judged against
    sense: int  # +1: the figure must be at least the value; −1: at most
    quantity: str
    subject: str  # "the outer surface"
    position: str = ""  # key of the figure's position along the line
    goal: str = ""  # "keep the outer surface at or below {v}"
    passing: str = ""  # "the outer surface passing {v}"


#: Target kinds: what each is judged against (see the module).
TARGET_KINDS: dict[str, _Kind] = {
    "outlet_min": _Kind("outlet temperature at least", "outlet_temperature_K", +1, "temperature", "the outlet",
                        goal="reach an outlet temperature of {v}", passing="the outlet falling below {v}"),
    "outlet_max": _Kind("outlet temperature at most", "outlet_temperature_K", -1, "temperature", "the outlet",
                        goal="keep the outlet at or below {v}", passing="the outlet passing {v}"),
    "bulk_min": _Kind("bulk temperature everywhere at least", "min_bulk_temperature_K", +1, "temperature",
                      "the bulk", "min_bulk_position_m", goal="hold {v}{where}",
                      passing="the bulk falling below {v}{where}"),
    "inner_wall_max": _Kind("inner wall at most", "max_inner_wall_temperature_K", -1, "temperature",
                            "the inner wall", "max_inner_wall_position_m",
                            goal="keep the inner wall at or below {v}", passing="the inner wall passing {v}"),
    "surface_max": _Kind("outer surface at most", "max_outer_surface_temperature_K", -1, "temperature",
                         "the outer surface", "max_outer_surface_position_m",
                         goal="keep the outer surface at or below {v}", passing="the outer surface passing {v}"),
    "heat_loss_per_m_max": _Kind("heat loss per metre at most", "max_heat_loss_per_length_W_per_m", -1,
                                 "power_per_length", "the heat loss per metre",
                                 goal="keep the heat loss per metre at or below {v}",
                                 passing="the heat loss per metre passing {v}"),
    "pressure_drop_max": _Kind("pressure drop at most", "pressure_drop_Pa", -1, "pressure_difference",
                               "the pressure drop", goal="keep the pressure drop at or below {v}",
                               passing="the pressure drop passing {v}"),
    "worst_case_bulk_min": _Kind("worst-case bulk temperature at least", WORST_CASE_MIN_BULK_KEY, +1, "temperature",
                                 "the worst-case bulk", goal="hold {v} in the worst case{where}",
                                 passing="the worst-case bulk falling below {v}{where}"),
    "hold_time_min": _Kind("hold time after a power failure at least", HOLD_TIME_KEY, +1, "time", "the hold time",
                           goal="hold for {v} after a power failure",
                           passing="the hold time after a power failure falling below {v}"),
}
_DESIGN_TARGETS = ("worst_case_bulk_min", "hold_time_min")


# --------------------------------------------------------------------------- figures a target reads

def design_figures(design) -> dict:
    """The design figures the design targets read, from a :class:`solver.design_cases.DesignResult`.

    ``worst_case_min_bulk_temperature_K``: the lowest worst-case bulk temperature over the segments
    (``SegmentDesign.worst_temperature_K``: standing still, or along the line when the worst case flows),
    ``worst_case_min_bulk_segment`` its segment; ``hold_time_s``: the shortest time after a power failure
    (flow stopped, heating off, worst-case surroundings) over the segments to the freezing point for a fluid
    that has one, else to the maintain temperature (as the design summary's "Power failure" row reads the
    Hold Time), ``hold_time_segment`` its segment; inf when it holds, NaN when it does not apply.
    """
    out = {WORST_CASE_MIN_BULK_KEY: math.nan, "worst_case_min_bulk_segment": None,
           HOLD_TIME_KEY: math.nan, "hold_time_segment": None}
    if design is None:
        return out
    worst = [(s.worst_temperature_K, s.index) for s in design.segments if math.isfinite(s.worst_temperature_K)]
    if worst:
        out[WORST_CASE_MIN_BULK_KEY], out["worst_case_min_bulk_segment"] = min(worst)
    ht = design.hold_time
    if ht is not None and ht.segments:
        attr = "to_freezing_off_s" if ht.freezing_point_K is not None else "to_limit_off_s"
        times = [(getattr(s, attr), s.index) for s in ht.segments if getattr(s, attr) is not None]
        if times:
            out[HOLD_TIME_KEY], out["hold_time_segment"] = min(times)
    return out


def figures_of(obj) -> Optional[dict]:
    """The figures a target reads: key figures (and the design figures where the solve had design cases) of
    a key-figures dict, a Variant, a BatchOutcome or a Result; None for a failed solve."""
    if obj is None:
        return None
    if isinstance(obj, dict):
        return obj
    if isinstance(obj, Variant):
        obj = obj.outcome
    if isinstance(obj, BatchOutcome):
        if not obj.ok or obj.key_figures is None:
            return None
        out = dict(obj.key_figures)
        design = getattr(obj.result, "design", None) if obj.result is not None else None
        if design is not None:
            out.update(design_figures(design))
        return out
    if hasattr(obj, "key_figures"):  # a Result
        out = dict(obj.key_figures())
        if getattr(obj, "design", None) is not None:
            out.update(design_figures(obj.design))
        return out
    raise TypeError(f"cannot read figures from {type(obj).__name__}")


# --------------------------------------------------------------------------- targets


@dataclass(frozen=True)
class Target:
    """What the answer must meet: ``kind`` (a key of :data:`TARGET_KINDS`) and ``value`` in SI (K, Pa, W/m, s)."""

    kind: str
    value: float

    def __post_init__(self):
        if self.kind not in TARGET_KINDS:
            raise InputError("target", self.kind, f"unknown target; known: {', '.join(TARGET_KINDS)}")
        v = self.value
        if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v):
            raise InputError(self.kind, v, "must be a finite number (SI)")
        if TARGET_KINDS[self.kind].quantity == "temperature" and not 0 < v <= 1000.0:
            raise InputError(self.kind, v, "must be a temperature above 0 K and at most 1000 K (in kelvin)")
        if self.kind in ("heat_loss_per_m_max", "pressure_drop_max", "hold_time_min") and v < 0:
            raise InputError(self.kind, v, "must not be negative")
        object.__setattr__(self, "value", float(v))

    @property
    def spec(self) -> _Kind:
        return TARGET_KINDS[self.kind]

    @property
    def needs_design(self) -> bool:
        """True for the worst-case and hold-time targets (they need the project's design cases)."""
        return self.kind in _DESIGN_TARGETS

    def figure(self, obj) -> float:
        """The figure this target reads (SI; NaN when the solve failed or the figure does not apply)."""
        figs = figures_of(obj)
        if figs is None:
            return math.nan
        value = figs.get(self.spec.figure)
        return math.nan if value is None else float(value)

    def margin(self, key_figures_or_variant) -> float:
        """How far the target is met, in its own SI unit: > 0 met, < 0 missed, NaN when it cannot be judged
        (the solve failed, or the figure does not apply to the line)."""
        fig = self.figure(key_figures_or_variant)
        if math.isnan(fig):
            return math.nan
        return (fig - self.value) if self.spec.sense > 0 else (self.value - fig)

    def met(self, obj) -> bool:
        margin = self.margin(obj)
        return bool(margin >= 0.0)  # NaN compares False: not met

    def relative_margin(self, margin: float) -> float:
        """The margin as a share of the target value (how binding targets of different kinds are compared)."""
        return margin / max(abs(self.value), 1e-12)

    def value_text(self, value: Optional[float] = None, system: str = "SI",
                   formatter: Optional[Formatter] = None) -> str:
        """The target's value (or ``value``, a figure of its quantity) in words: "50.0 °C", "8 h"."""
        v = self.value if value is None else value
        if formatter is not None and self.spec.quantity != "time":
            return formatter(v, self.spec.quantity, system)
        return si_text(v, self.spec.quantity)

    def text(self, system: str = "SI", formatter: Optional[Formatter] = None) -> str:
        """Plain words: "outer surface at most 50.0 °C"."""
        return f"{self.spec.words} {self.value_text(system=system, formatter=formatter)}"

    def to_dict(self) -> dict:
        return {"kind": self.kind, "value": self.value}

    @classmethod
    def from_dict(cls, d: dict) -> "Target":
        if not isinstance(d, dict) or "kind" not in d or "value" not in d:
            raise InputError("target", d, "must be a dict with 'kind' and 'value'")
        return cls(kind=d["kind"], value=d["value"])


_TEMPERATURE_UNITS = {"c": (1.0, 273.15), "°c": (1.0, 273.15), "degc": (1.0, 273.15), "k": (1.0, 0.0),
                      "f": (5 / 9, 273.15 - 32 * 5 / 9), "°f": (5 / 9, 273.15 - 32 * 5 / 9),
                      "degf": (5 / 9, 273.15 - 32 * 5 / 9)}
_OTHER_UNITS = {
    "power_per_length": {"": 1.0, "w/m": 1.0, "kw/m": 1e3, "w/ft": 1 / 0.3048},
    "pressure_difference": {"": 1.0, "pa": 1.0, "kpa": 1e3, "mpa": 1e6, "bar": 1e5, "mbar": 1e2,
                            "psi": 6894.757293168},
    "time": {"": 1.0, "s": 1.0, "min": 60.0, "h": 3600.0, "d": 86400.0},
}


def parse_target(text: str) -> Target:
    """A target from its command-line form: ``"surface_max=50C"``, ``"bulk_min=55C"``, ``"outlet_min=60C"``,
    ``"heat_loss_per_m_max=20W/m"``, ``"pressure_drop_max=0.5bar"``, ``"hold_time_min=8h"``.

    Temperatures need a unit (C, K or F); other values without a unit are SI (W/m, Pa, s).
    """
    match = re.fullmatch(r"\s*([A-Za-z_]+)\s*=\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(\S*)\s*", str(text))
    if not match:
        raise InputError("target", text, "write it as kind=value+unit, e.g. surface_max=50C; kinds: "
                                         + ", ".join(TARGET_KINDS))
    kind, number, unit = match.group(1).lower(), float(match.group(2)), match.group(3).strip().lower()
    if kind not in TARGET_KINDS:
        raise InputError("target", text, f"unknown target; known: {', '.join(TARGET_KINDS)}")
    quantity = TARGET_KINDS[kind].quantity
    if quantity == "temperature":
        if unit not in _TEMPERATURE_UNITS:
            raise InputError("target", text, "give the temperature with its unit: C, K or F (e.g. 55C)")
        scale, offset = _TEMPERATURE_UNITS[unit]
        return Target(kind, number * scale + offset)
    units = _OTHER_UNITS[quantity]
    if unit not in units:
        raise InputError("target", text, f"unknown unit {unit!r}; use one of: "
                                         + ", ".join(u for u in units if u))
    return Target(kind, number * units[unit])


# --------------------------------------------------------------------------- the answer


@dataclass
class FinderResult:
    """The Target Finder's answer (see the module). ``value`` is None and ``alternative`` None when no value
    meets the targets; ``explanation`` then says why."""

    parameter: Parameter
    targets: list[Target]
    feasible: bool
    value: object
    alternative: Optional[Alternative]
    key_figures: Optional[dict]
    result: object
    binding: Optional[Target]
    margins: dict[str, float]
    explanation: str
    searched: str
    evaluations: int
    base_alternative: str = ""
    value_text: str = ""
    lower: object = None
    upper: object = None
    parameter_text: str = ""
    target_texts: tuple = ()  # the targets in the words (and units) of the search
    binding_text: str = ""

    def record(self) -> dict:
        """The provenance record of the answer (a SearchRecord of solver.model, as a dict)."""
        return {
            "tool": "Target Finder",
            "base_alternative": self.base_alternative,
            "parameter": self.parameter.to_dict(),
            "parameter_text": self.parameter_text,
            "searched": self.searched,
            "targets": list(self.target_texts) or [t.text() for t in self.targets],
            "target_limits": [t.to_dict() for t in self.targets],
            "binding": self.binding_text or (self.binding.text() if self.binding is not None else ""),
            "value_text": self.value_text,
            "value": self.value,
            "explanation": self.explanation,
            "sweep_points": [],
        }


_SHORT_WORDS = {"heater_output": "heater", "insulation_thickness": "insulation", "mass_flow": "mass flow",
                "volume_flow": "volume flow", "bore": "", "inlet_temperature": "inlet",
                "steam_pressure": "steam", "medium_temperature": "medium", "segment_length": ""}


# The unit system and formatter of the search running on this thread (find() sets them): the explanation,
# the searched words and the answer's name are written in the user's units.
_WORDS = threading.local()


def _pv(parameter: Parameter, value) -> str:
    return parameter.value_text(value, getattr(_WORDS, "system", "SI"), getattr(_WORDS, "formatter", None))


def _tv(target: "Target", value=None) -> str:
    return target.value_text(value, getattr(_WORDS, "system", "SI"), getattr(_WORDS, "formatter", None))


def _tt(target: "Target") -> str:
    return target.text(getattr(_WORDS, "system", "SI"), getattr(_WORDS, "formatter", None))


def _qv(value: float, quantity: str) -> str:
    formatter = getattr(_WORDS, "formatter", None)
    return formatter(value, quantity, getattr(_WORDS, "system", "SI")) if formatter else si_text(value, quantity)


def answer_name(alt: Alternative, parameter: Parameter, value, system: Optional[str] = None,
                formatter: Optional[Formatter] = None) -> str:
    """The answer's alternative name, after what changed: "Trace 15 W/m — insulation 40 mm" (the base name
    shortened to keep within the model's name length). ``system``/``formatter`` as for :func:`find` (default:
    those of the search running, else SI)."""
    words = _SHORT_WORDS[parameter.kind]
    if parameter.kind == "segment_length":
        words = alt.segments[parameter.segments[0]].name[:40]
    shown = (parameter.value_text(value, system or "SI", formatter) if (system or formatter)
             else _pv(parameter, value))
    change = f"{words} {shown}".strip()
    suffix = f" — {change}"
    base = alt.name
    if len(base) + len(suffix) > NAME_MAX_CHARS:
        base = base[:max(0, NAME_MAX_CHARS - len(suffix) - 1)] + "…"
    return (base + suffix)[:NAME_MAX_CHARS]


def _segment_at(alt: Alternative, x_m: float) -> Optional[int]:
    """The segment holding position ``x_m`` (a node at a joint counts to the segment upstream)."""
    if alt is None or x_m is None or not math.isfinite(x_m):
        return None
    end = 0.0
    for i, seg in enumerate(alt.segments):
        end += seg.length_m
        if x_m <= end + 1e-9 * max(end, 1.0):
            return i
    return len(alt.segments) - 1


def _where(target: Target, variant: Optional[Variant]) -> str:
    """" in Road crossing": the segment where the target's figure occurs ("" when not known)."""
    if variant is None or variant.alternative is None:
        return ""
    figs = figures_of(variant)
    if figs is None:
        return ""
    index = None
    if target.kind == "worst_case_bulk_min":
        index = figs.get("worst_case_min_bulk_segment")
    elif target.kind == "hold_time_min":
        index = figs.get("hold_time_segment")
    elif target.spec.position:
        index = _segment_at(variant.alternative, figs.get(target.spec.position))
    if index is None or len(variant.alternative.segments) < 2:
        return ""
    return f" in {variant.alternative.segments[index].name}"


def _goal(target: Target, variant: Optional[Variant]) -> str:
    return target.spec.goal.format(v=_tv(target), where=_where(target, variant))


def _passing(target: Target, variant: Optional[Variant]) -> str:
    return target.spec.passing.format(v=_tv(target), where=_where(target, variant))


def _passes(target: Target, variant: Optional[Variant]) -> str:
    """"the inner wall passes 110.0 °C": the passing words in the present tense."""
    return _passing(target, variant).replace("passing", "passes", 1).replace("falling", "falls", 1)


def _missed(target: Target, variant: Variant) -> str:
    """How the target is missed at this variant: "the bulk falls to 52.3 °C in Road crossing"."""
    fig = target.figure(variant)
    where = _where(target, variant)
    fig_text = _tv(target, fig)
    k = target.kind
    if k in ("bulk_min", "worst_case_bulk_min", "outlet_min"):
        return f"{target.spec.subject} falls to {fig_text}{where}"
    if k == "hold_time_min":
        return f"it holds for only {duration_words(fig)}{where}"
    return f"{target.spec.subject} is {fig_text}{where}"


# --------------------------------------------------------------------------- the search


class _Evaluator:
    """Solves values of the parameter, remembering each (the finder's evaluations)."""

    def __init__(self, alt, parameter, targets, design):
        self.alt, self.parameter, self.targets, self.design = alt, parameter, targets, design
        self.cache: dict = {}
        self.count = 0

    def solve(self, values: Sequence) -> list[Variant]:
        todo = [v for v in dict.fromkeys(values) if v not in self.cache]
        if todo:
            self.count += len(todo)
            for variant in solve_prepared(make_variants(self.alt, self.parameter, todo), design=self.design):
                self.cache[variant.value] = variant
        return [self.cache[v] for v in values]

    def margins(self, value) -> np.ndarray:
        variant = self.solve([value])[0]
        return np.array([t.margin(variant) for t in self.targets])

    def feasible(self, value) -> bool:
        return bool(np.all(self.margins(value) >= 0.0))

    def smallest_feasible_in(self, lo: float, hi: float) -> Optional[float]:
        """The smallest value solved so far in [lo, hi] that meets every target."""
        found = [v for v in self.cache if lo <= v <= hi and self.feasible(v)]
        return min(found) if found else None


def prepare() -> None:
    """Import what a continuous search needs (scipy.optimize, about 0.35 s the first time in a process)."""
    import scipy.optimize  # noqa: F401


class _SolveFailed(Exception):
    pass


def _root(ev: _Evaluator, j: int, a: float, b: float) -> float:
    """Where target j's margin crosses zero between a and b (brentq; its signs at a and b differ)."""
    from scipy.optimize import brentq

    def f(v):
        margin = ev.margins(float(v))[j]
        if math.isnan(margin):
            raise _SolveFailed(float(v))
        return margin

    span = abs(b - a)
    return float(brentq(f, a, b, xtol=max(1e-6 * span, 1e-12), rtol=RELATIVE_TOLERANCE, maxiter=100))


def find(alt: Alternative, parameter: Parameter, targets: Sequence[Target], *, lower=None, upper=None,
         design: Optional[DesignCases] = None, values: Optional[Sequence] = None, system: str = "SI",
         formatter: Optional[Formatter] = None) -> FinderResult:
    """The smallest value of ``parameter`` meeting every target (see the module for the method and the rule).

    ``lower``/``upper``: the range of a continuous parameter [SI] (default :meth:`Parameter.default_range`);
    for a discrete one they trim the standard list. ``values``: the list for a discrete parameter (default
    :meth:`Parameter.standard_values`). ``design``: the project's design cases, needed by the worst-case and
    hold-time targets (only then are the design cases solved). Raises InputError for no targets, a design
    target without design cases, or a range the model refuses.

    ``system`` and ``formatter(value_si, quantity, system)`` write the explanation, the searched words,
    ``value_text`` and the answer's name in the user's units (default: the engineer's SI). ``key_figures`` of
    the answer hold the design figures too (:func:`design_figures`) when the design cases were solved.
    """
    previous = (getattr(_WORDS, "system", "SI"), getattr(_WORDS, "formatter", None))
    _WORDS.system, _WORDS.formatter = system, formatter
    try:
        return _find(alt, parameter, targets, lower, upper, design, values)
    finally:
        _WORDS.system, _WORDS.formatter = previous


def _find(alt, parameter, targets, lower, upper, design, values) -> FinderResult:
    targets = list(targets)
    if not targets:
        raise InputError("targets", targets, "give at least one target to meet")
    for t in targets:
        if not isinstance(t, Target):
            raise InputError("targets", t, "each target must be a Target")
    needs_design = any(t.needs_design for t in targets)
    if needs_design and design is None:
        raise InputError("design", None, "the worst-case and hold-time targets need the project's design cases")
    ev = _Evaluator(alt, parameter, targets, design if needs_design else None)
    parameter.segment_indices(alt)  # refuse a parameter that does not apply, at once
    if parameter.discrete:
        return _find_discrete(ev, values, lower, upper)
    return _find_continuous(ev, lower, upper)


def _result(ev: _Evaluator, feasible: bool, value, explanation: str, searched: str, lower, upper,
            ruled_out: Sequence[Target] = ()) -> FinderResult:
    alt, parameter, targets = ev.alt, ev.parameter, ev.targets
    base = dict(parameter=parameter, targets=targets, searched=searched, base_alternative=alt.name,
                lower=lower, upper=upper, parameter_text=parameter.label(alt),
                target_texts=tuple(_tt(t) for t in targets))
    if not feasible:
        return FinderResult(feasible=False, value=None, alternative=None, key_figures=None, result=None, binding=None,
                            margins={}, explanation=explanation, evaluations=ev.count, **base)
    answer = parameter.apply(alt, value)
    answer = answer.model_copy(update={"name": answer_name(alt, parameter, value)})
    final = solve_prepared([(value, None, answer)], profiles=True, design=ev.design)[0]
    ev.count += 1
    margins = {_tt(t): t.margin(final) for t in targets}
    finite = [(t.relative_margin(t.margin(final)), i) for i, t in enumerate(targets)
              if not math.isnan(t.margin(final))]
    binding = targets[min(finite)[1]] if finite else None
    if ruled_out:  # a standard value: the binding target is the one that rules out the size below
        binding = min(ruled_out, key=lambda t: t.relative_margin(t.margin(final)))
    ok = final.ok and all(m >= 0 for m in margins.values())
    if not ok:  # the full re-solve disagrees with the search (it should not): say so, never a silent answer
        missed = [t for t in targets if not t.met(final)]
        why = (f"the answer fails to solve on its own: {final.outcome.error}" if not final.ok else
               "re-solved on its own it misses " + "; ".join(f"{_tt(t)} ({_missed(t, final)})" for t in missed))
        return FinderResult(feasible=False, value=None, alternative=None, key_figures=None, result=None,
                            binding=None, margins=margins,
                            explanation=f"{_pv(parameter, value)} was found, but {why}.",
                            evaluations=ev.count, **base)
    return FinderResult(feasible=True, value=value, alternative=answer, key_figures=figures_of(final),
                        result=final.outcome.result, binding=binding, margins=margins, explanation=explanation,
                        evaluations=ev.count, value_text=_pv(parameter, value),
                        binding_text=_tt(binding) if binding is not None else "", **base)


def _binding_words(ev: _Evaluator, value) -> str:
    variant = ev.cache.get(value)
    if variant is None:
        return ""
    pairs = [(t.relative_margin(t.margin(variant)), t) for t in ev.targets if not math.isnan(t.margin(variant))]
    if not pairs:
        return ""
    _, t = min(pairs, key=lambda p: p[0])
    margin = t.margin(variant)
    diff = _qv(margin, "temperature_difference") if t.spec.quantity == "temperature" else (
        duration_words(margin) if t.spec.quantity == "time" else _qv(margin, t.spec.quantity))
    return f"binding: {_tt(t)} (margin {diff})"


def _cannot_judge(ev: _Evaluator, variants: list[Variant]) -> Optional[str]:
    solved = [v for v in variants if v.ok]
    for t in ev.targets:
        if solved and all(math.isnan(t.margin(v)) for v in solved):
            label = DESIGN_FIGURE_LABELS.get(t.spec.figure, (None,))[0] or KEY_FIGURE_BY_KEY[t.spec.figure].label
            extra = " (no surface of the line is in air)" if t.kind == "surface_max" else ""
            return f"'{_tt(t)}' cannot be judged on this line: {label.lower()} does not apply to it{extra}"
    return None


def _fails_everywhere(ev: _Evaluator, variants: list[Variant]) -> Optional[str]:
    if any(v.ok for v in variants):
        return None
    errors = [v.outcome.error for v in variants]
    return f"the line fails to solve at every value tried: {errors[0]}"


def _even_best(ev: _Evaluator, variants: list[Variant], t: Target, discrete: bool, what: str) -> str:
    """The plain words for a target missed at every value: at its best value, by how much."""
    solved = [v for v in variants if v.ok and not math.isnan(t.margin(v))]
    top = max(t.margin(v) for v in solved)
    ties = [v for v in solved if t.margin(v) >= top - 1e-9 * max(1.0, abs(t.value))]
    # of equal bests, the one furthest the way the target improves ("even at 80 W/m", not at 13 W/m)
    best = ties[-1] if t.margin(solved[-1]) >= t.margin(solved[0]) else ties[0]
    best_text = _pv(ev.parameter, best.value)
    wanted = f"{'at least' if t.spec.sense > 0 else 'at most'} {_tv(t)} wanted"
    spread = max(t.margin(v) for v in solved) - min(t.margin(v) for v in solved)
    if len(solved) > 1 and spread <= 1e-9 * max(1.0, abs(t.value)):
        where = _where(t, best)
        return (f"the {what} does not move {t.spec.subject}{where} (what decides it is not what is varied): "
                f"{_missed(t, best)} at every value tried ({wanted})")
    lead = (f"no {what} on the list can {_goal(t, best)}" if discrete
            else f"no {what} in the range searched can {_goal(t, best)}")
    return f"{lead}: even at {best_text} {_missed(t, best)} ({wanted}){_outside_group(ev, t, best)}"


def _outside_group(ev: _Evaluator, t: Target, variant: Variant) -> str:
    """"; Tank outlet is not among the segments varied" where the figure sits in a segment the parameter leaves."""
    parameter = ev.parameter
    if not parameter.on_segments or variant.alternative is None:
        return ""
    figs = figures_of(variant) or {}
    index = {"worst_case_bulk_min": figs.get("worst_case_min_bulk_segment"),
             "hold_time_min": figs.get("hold_time_segment")}.get(t.kind)
    if index is None and t.spec.position:
        index = _segment_at(variant.alternative, figs.get(t.spec.position))
    if index is None or index in parameter.segment_indices(ev.alt):
        return ""
    return f"; {variant.alternative.segments[index].name} is not among the segments varied"


def _find_discrete(ev: _Evaluator, values, lower, upper) -> FinderResult:
    parameter, alt = ev.parameter, ev.alt
    listed = list(values) if values is not None else parameter.standard_values(alt)
    if parameter.kind != "bore":
        listed = sorted(float(v) for v in listed)
        if lower is not None:
            listed = [v for v in listed if v >= float(lower) - 1e-12]
        if upper is not None:
            listed = [v for v in listed if v <= float(upper) + 1e-12]
    else:  # NPS texts in table order; lower/upper are sizes too ("1", "4")
        from solver.catalogue import normalise_nps

        order = {nps: i for i, nps in enumerate(parameter.standard_values(alt))}
        listed = [normalise_nps(v, field="bore") for v in listed]
        for end, keep in ((lower, lambda i, j: i >= j), (upper, lambda i, j: i <= j)):
            if end is not None:
                j = order.get(normalise_nps(end, field="bore"))
                if j is None:
                    raise InputError("bore", end, "is not a size of the segments' schedule")
                listed = [v for v in listed if v in order and keep(order[v], j)]
    if not listed:
        raise InputError(parameter.kind, (lower, upper), "no standard value lies in the range given")
    what = "bore" if parameter.kind == "bore" else "insulation thickness"
    shown = ", ".join(_pv(parameter, v) for v in listed) if len(listed) <= 12 else (
        f"{_pv(parameter, listed[0])} to {_pv(parameter, listed[-1])}")
    source = (f"; the list is {INSULATION_LIST_SOURCE}" if parameter.kind == "insulation_thickness" and values is None
              else "; the list is the NPS sizes of ASME B36.10M/B36.19M in the segments' schedule"
              if parameter.kind == "bore" and values is None else "")
    searched = f"{parameter.label(alt)} over {len(listed)} standard values: {shown}{source}"
    variants = ev.solve(listed)
    for check in (_fails_everywhere(ev, variants), _cannot_judge(ev, variants)):
        if check:
            return _result(ev, False, None, _sentence(check), searched, lower, upper)
    met = [[t.met(v) for t in ev.targets] for v in variants]
    for i, v in enumerate(variants):
        if all(met[i]):
            if i == 0:
                why = (f"{_pv(parameter, v.value)} is the smallest {what} on the list, and it meets every "
                       "target")
            else:
                prev = variants[i - 1]
                if prev.ok:
                    missed = [t for t in ev.targets if not t.met(prev)]
                    fail = "; ".join(f"{_tt(t)}: {_missed(t, prev)}" for t in missed)
                else:
                    fail = f"it fails to solve: {prev.outcome.error}"
                why = (f"{_pv(parameter, v.value)} is the smallest {what} on the list that meets every target; "
                       f"{_pv(parameter, prev.value)} misses: {fail}")
            ruled_out = [t for t in ev.targets if i > 0 and variants[i - 1].ok and not t.met(variants[i - 1])]
            binding = "" if ruled_out else _binding_words(ev, v.value)
            return _result(ev, True, v.value, _sentence(why + (f" ({binding})" if binding else "")), searched,
                           lower, upper, ruled_out=ruled_out)
    # no value meets them all: a target missed everywhere, or two that pull apart
    for j, t in enumerate(ev.targets):
        if not any(row[j] for row in met):
            why = _even_best(ev, variants, t, True, what)
            return _result(ev, False, None, _sentence(why), searched, lower, upper)
    reasons = []
    for a in range(len(ev.targets)):
        for b in range(a + 1, len(ev.targets)):
            if not any(row[a] and row[b] for row in met):
                ta, tb = ev.targets[a], ev.targets[b]
                va = [variants[i].value for i in range(len(variants)) if met[i][a]]
                vb = [variants[i].value for i in range(len(variants)) if met[i][b]]
                reasons.append(f"'{_tt(ta)}' is met only at {_values_words(parameter, va)}, "
                               f"'{_tt(tb)}' only at {_values_words(parameter, vb)}")
    text = (f"no {what} on the list meets every target at once: " + "; ".join(reasons[:2]) if reasons
            else f"no {what} on the list meets every target at once")
    return _result(ev, False, None, _sentence(text), searched, lower, upper)


def _values_words(parameter: Parameter, values: list) -> str:
    if len(values) <= 3:
        return ", ".join(_pv(parameter, v) for v in values)
    return f"{_pv(parameter, values[0])} to {_pv(parameter, values[-1])}"


def _sentence(text: str) -> str:
    text = text.strip()
    return (text[:1].upper() + text[1:]).rstrip(".") + "."


def _find_continuous(ev: _Evaluator, lower, upper) -> FinderResult:
    parameter, alt = ev.parameter, ev.alt
    lo_default, hi_default = parameter.default_range(alt)
    lo = float(lo_default if lower is None else lower)
    hi = float(hi_default if upper is None else upper)
    if not lo < hi:
        raise InputError(parameter.kind, (lo, hi), "the range needs its lower end below its upper end")
    for end in (lo, hi):
        parameter.apply(alt, end)  # the model's bounds: refused here with the parameter and value named
    what = parameter.label(alt).split(",")[0].lower()
    searched = (f"{parameter.label(alt)} from {_pv(parameter, lo)} to {_pv(parameter, hi)}: "
                f"{SCAN_POINTS} values scanned, then Brent's method (scipy brentq) on each target's margin to "
                f"{RELATIVE_TOLERANCE * 100:g} % of the value")
    grid = [float(v) for v in np.linspace(lo, hi, SCAN_POINTS)]
    variants = ev.solve(grid)  # the bracket, checked first: one solve_batch call
    for check in (_fails_everywhere(ev, variants), _cannot_judge(ev, variants)):
        if check:
            return _result(ev, False, None, _sentence(check), searched, lo, hi)
    n = len(ev.targets)
    M = np.array([[t.margin(v) for t in ev.targets] for v in variants])
    ok = np.all(M >= 0.0, axis=1)

    def done(value: float, why: str) -> FinderResult:
        binding = _binding_words(ev, value)
        return _result(ev, True, value, _sentence(why + (f" ({binding})" if binding else "")), searched, lo, hi)

    unsearched: set[int] = set()  # windows where Brent's method met a value that fails to solve

    def window(i: int) -> Optional[float]:
        """The smallest value meeting every target between grid[i] and grid[i+1] (None when there is none)."""
        a, b = grid[i], grid[i + 1]
        left, right = M[i], M[i + 1]
        if np.isnan(left).any() or np.isnan(right).any():
            return None
        if any(left[j] < 0 and right[j] < 0 for j in range(n)):
            return None
        rising = [j for j in range(n) if left[j] < 0 <= right[j]]
        try:
            low_end = max((_root(ev, j, a, b) for j in rising), default=a)
        except _SolveFailed:
            # (fix, mutation review) a value between failed to solve: what lies below the answer is not known,
            # so the words must not call it the least (the caller says the line could not be searched there)
            unsearched.add(i)
            return ev.smallest_feasible_in(a, b)
        # the smallest value solved at or just past the roots that meets every target; a target met at a and
        # missed at b (monotone between) that is missed there is missed beyond too: no window
        tol = 1e-9 * abs(b - a)
        near = sorted(v for v in ev.cache if low_end - tol <= v <= b)
        for v in near:
            margins = ev.margins(v)
            if np.all(margins >= 0.0):
                return v
            if any(margins[j] < 0 for j in range(n) if j not in rising):
                return None
        return None

    for i in range(SCAN_POINTS):
        if ok[i]:
            if i == 0:
                return done(grid[0], f"{_pv(parameter, grid[0])}, the lowest {what} searched, already meets "
                                     "every target")
            found = window(i - 1)
            if found is None or i - 1 in unsearched:  # the search between the two values failed to solve
                found = grid[i] if found is None else found  # the value scanned, or the least solved below it
                return done(found, f"{_pv(parameter, found)} meets every target; below it, down to "
                                     f"{_pv(parameter, grid[i - 1])}, the line could not be searched "
                                     "(it fails to solve there), so a smaller value may exist")
            return done(found, f"{_pv(parameter, found)} is the least {what} from {_pv(parameter, lo)} "
                               f"to {_pv(parameter, hi)} that meets every target")
        if i + 1 < SCAN_POINTS and not ok[i + 1]:
            found = window(i)
            if found is not None and i in unsearched:  # (fix, as above: the least is not known)
                return done(found, f"{_pv(parameter, found)} meets every target (a narrow band between two "
                                   "values scanned, part of which could not be searched: it fails to solve "
                                   "there, so a smaller value may exist)")
            if found is not None:
                return done(found, f"{_pv(parameter, found)} is the least {what} from "
                                   f"{_pv(parameter, lo)} to {_pv(parameter, hi)} that meets every "
                                   "target (a narrow band between two values scanned)")
    return _result(ev, False, None, _sentence(_why_not(ev, grid, variants, M, what)), searched, lo, hi)


def _inlet_temperature(variants) -> Optional[float]:
    for v in variants:
        if v.ok:
            return v.key_figures.get("inlet_temperature_K")
    return None


def _why_not(ev: _Evaluator, grid, variants, M, what: str) -> str:
    """Why no value in the range meets every target, in plain words."""
    parameter, n = ev.parameter, len(ev.targets)
    met = M >= 0.0
    for j, t in enumerate(ev.targets):
        if not met[:, j].any():
            inlet = _inlet_temperature(variants)
            if t.kind == "bulk_min" and inlet is not None and t.value > inlet:
                return (f"no {what} can hold {_tv(t)} everywhere: the feed enters at "
                        f"{_tv(t, inlet)}, below the target")
            return _even_best(ev, variants, t, False, what)
    # every target is met somewhere, never all together: where does each need the parameter to be?
    bounds = []  # (j, "at least"/"at most", value)
    for j, t in enumerate(ev.targets):
        col = met[:, j]
        changes = [i for i in range(len(grid) - 1) if col[i] != col[i + 1] and not np.isnan(M[i:i + 2, j]).any()]
        if len(changes) != 1:
            continue
        i = changes[0]
        try:
            root = _root(ev, j, grid[i], grid[i + 1])
        except (_SolveFailed, ValueError):
            root = 0.5 * (grid[i] + grid[i + 1])
        bounds.append((j, "at least" if col[i + 1] else "at most", root))
    lows = [b for b in bounds if b[1] == "at least"]
    highs = [b for b in bounds if b[1] == "at most"]
    if lows and highs:
        ja, _, a = max(lows, key=lambda b: b[2])
        jb, _, b = min(highs, key=lambda b: b[2])
        if a > b:
            ta, tb = ev.targets[ja], ev.targets[jb]
            at_a = variants[int(np.nanargmin(M[:, ja]))]  # where each is missed the most: the segment it names
            at_b = variants[int(np.nanargmin(M[:, jb]))]
            return (f"{what} cannot {_goal(ta, at_a)} without {_passing(tb, at_b)}: that needs at least "
                    f"{_pv(parameter, a)}, and above {_pv(parameter, b)} {_passes(tb, at_b)}")
    per = "; ".join(f"'{_tt(t)}' is met at "
                    f"{_values_words(parameter, [grid[i] for i in range(len(grid)) if met[i, j]])}"
                    for j, t in enumerate(ev.targets))
    return f"no {what} from {_pv(parameter, grid[0])} to {_pv(parameter, grid[-1])} meets every target at once: {per}"
