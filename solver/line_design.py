"""Line List design: one line's heater and insulation chosen, checked and summed up in one result row.

:func:`design_line` takes one line as a :class:`~solver.model.Project` (its baseline alternative, as
:func:`solver.line_list.line_project` builds it from a row of the line list and the line template) and

1. solves it as given with the project's design cases (:func:`solver.march.solve` with ``design=``):
   what the tracing must hold (:func:`solver.design_cases.maintain_temperature`: the maintain
   temperature, else the minimum bulk temperature, else the freezing point + 5 K) and whether the line
   solves at all;
2. finds the **required heater output**: the least output per metre of heater that holds the maintain
   temperature in the worst case, with the design margin of trace-heating practice
   (:mod:`solver.design_cases`). Two ways, the same answer (``search``):

   * the Target Finder (:func:`solver.target_finder.find`, :class:`~solver.variants.Parameter`
     ``heater_output``, target ``worst_case_bulk_min`` = the maintain temperature, plus ``inner_wall_max``
     = the alternative's wall limit when it has one), its answer times (1 + design margin) (the largest
     margin of the heated segments); about 12 solves with the design cases;
   * where the worst case stands still, in closed form from step 1: the design cases' tracing need of each
     segment, (loss + sinks)·(1 + margin) at the maintain temperature, is what its heater must deliver
     there, and a heater's output at a given temperature is proportional to the rating the parameter sets,
     so the rating is rating_now × need / output_now (the largest over the segments). The standing balance
     the finder searches, heater output = loss + sinks at the worst-case bulk temperature, is the same
     equation: the two agree to the finder's tolerance (1e-4; tests/test_line_design.py), this one at a
     tenth of the cost. The default ("auto") uses it, and where the worst case flows takes the larger of
     it and the finder's answer (the flowing line must hold its bulk; the tracing must meet the need the
     app's "cannot hold" check, ``DESIGN_NOT_HELD``, judges by).

   A self-limiting heater's output is its rating at its first rating point (its two points scaled
   together, :meth:`Parameter.apply`), so the margin scales its output at every temperature. A line that
   holds without any heat (its worst-case surroundings at or above the maintain temperature) needs 0 and
   gets no heater. A line traced by steam alone gets no electric heater sized (required and chosen None).
   The **chosen output** is the smallest of :data:`STANDARD_HEATER_OUTPUTS_W_PER_M` at or above the
   required one; when even the largest is too small the line gets the largest and the verdict "fails",
   saying so;
3. with ``size_insulation`` sizes the insulation: the smallest of
   :data:`solver.variants.STANDARD_INSULATION_THICKNESSES_M` (Target Finder, discrete) that keeps the
   outer surface at or below ``surface_limit_K`` and the heat loss per metre at or below
   ``heat_loss_limit_W_per_m`` in operation, with the chosen heater; then the heater is sized once more
   for that thickness (and when that heater, larger for a thinner layer, runs the line past a limit, the
   search goes on from the next thickness up, at most :data:`INSULATION_ROUNDS` times). With neither
   limit there is nothing to size against: the thickness stays and the row says so;
4. solves the designed line again with the design cases and fills one :class:`LineResult`.

Never raises for the line's own problem: whatever :class:`~solver.errors.CalorunError` stops it (a
liquid that boils, a fluid the property source does not know, a value a keyword refuses) gives the
verdict "error" with the message.

Words and units: ``system`` and ``formatter(value_si, quantity, system) -> text`` write the messages in
the user's units, as for :func:`solver.target_finder.find` (default: SI). :meth:`LineResult.to_row`
takes ``unit(quantity, system)`` giving the display unit (an object with ``label``, ``scale``,
``offset`` such as ``app.units.unit``'s, or such a tuple; default: :func:`solver.variants.si_unit`), so
the solver does not import the app.
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, fields
from typing import Callable, Optional

from solver.errors import CalorunError, InputError
from solver.model import Alternative, Project, SelfLimitingHeater, StillAir, Wind
from solver.results import SEVERITY_ORDER, render_message

#: Standard heater outputs [W per metre of heater]: 10, 15, 20, 25, 30, 40, 50 and 65 W/m. Common practice,
#: not a standard: the nominal ratings electric trace heaters are commonly sold in (for self-limiting
#: heaters the output at 10 °C pipe temperature, the usual rating point), from memory. Check the chosen
#: heater's own data; a heater kind may not come in every rating.
STANDARD_HEATER_OUTPUTS_W_PER_M: tuple[float, ...] = (10.0, 15.0, 20.0, 25.0, 30.0, 40.0, 50.0, 65.0)
HEATER_LIST_SOURCE = ("common practice for electric trace-heater ratings (nominal W per metre of heater, "
                      "from memory), not a standard")
#: The heater search runs up to this many times the largest standard rating, so a line that needs more says
#: how much more.
SEARCH_SPAN_OF_LARGEST = 3.0
#: Insulation sized at most this many times: the heater re-sized for the thickness found can run the line
#: hotter (a thinner layer needs more heat), past a limit the thickness met; then the next thickness up.
INSULATION_ROUNDS = 3

VERDICTS = ("ok", "warning", "fails", "error")

Formatter = Callable[[float, str, str], str]
UnitOf = Callable[[str, str], object]

#: The render_message token kinds as quantities of solver.variants / app.units.
_TOKEN_QUANTITY = {"T": "temperature", "dT": "temperature_difference", "v": "velocity", "q": "power_per_length",
                   "n": "dimensionless"}


# --------------------------------------------------------------------------- the result row


@dataclass
class LineResult:
    """One line's design in one row (SI: K, W/m, W, m, s; NaN where a figure does not apply, None where
    nothing was chosen).

    ``verdict``: "ok", "warning" (the worst check is a warning), "fails" (the worst case does not hold,
    no standard heater is enough, a design check is a danger, the hot case's wall passes its limit, or a
    surface or heat-loss limit is missed) or "error" (the line could not be designed: ``message`` says
    why). ``worst_check``: the code of the worst check of the designed line (highest severity, first in
    flow order; "" when there is none), ``worst_check_severity`` its severity, ``worst_check_message`` its
    words. ``message``: why the verdict, in plain words.

    ``heat_loss_W_per_m``: the operating case's highest heat loss per metre of a segment, heat sinks
    included (the Key Figure "Highest heat loss per metre", what a heater is chosen by); ``heat_loss_W``
    the whole line's. ``required_output_W_per_m``: per metre of heater, with the design margin;
    ``chosen_output_W_per_m``: the standard rating fitted (0 when the line needs no heat; for a
    self-limiting heater the output at its first rating point). ``circuits``: heater circuits when a
    maximum circuit length is given. ``installed_power_W``: chosen output × heater length.
    ``hot_case_max_wall_K``: the hot case's highest pipe-wall temperature. ``hold_time_s``: the shortest
    time after a power failure (flow stopped, heating off, worst-case surroundings) to the freezing point
    for a fluid that has one, else to the maintain temperature (inf: holds; as the Target Finder's
    ``hold_time_min`` reads it). ``max_outer_surface_K``, ``outlet_temperature_K``,
    ``min_bulk_temperature_K``: the operating case's.
    """

    tag: str
    row: Optional[int] = None
    verdict: str = "error"
    worst_check: str = ""
    worst_check_severity: str = ""
    worst_check_message: str = ""
    message: str = ""
    length_m: float = math.nan
    maintain_temperature_K: float = math.nan
    heat_loss_W_per_m: float = math.nan
    heat_loss_W: float = math.nan
    required_output_W_per_m: Optional[float] = None
    chosen_output_W_per_m: Optional[float] = None
    circuits: Optional[int] = None
    installed_power_W: float = math.nan
    insulation_thickness_m: Optional[float] = None
    hot_case_max_wall_K: float = math.nan
    hold_time_s: float = math.nan
    max_outer_surface_K: float = math.nan
    outlet_temperature_K: float = math.nan
    min_bulk_temperature_K: float = math.nan

    #: (field, header words, quantity) of the row's columns, in order.
    COLUMNS = (
        ("tag", "tag", ""), ("row", "row", ""), ("verdict", "verdict", ""),
        ("worst_check", "worst check", ""), ("message", "message", ""),
        ("length_m", "length", "length"),
        ("maintain_temperature_K", "maintain temperature", "temperature"),
        ("heat_loss_W_per_m", "heat loss", "power_per_length"),
        ("heat_loss_W", "heat loss of the line", "power"),
        ("required_output_W_per_m", "required output", "power_per_length"),
        ("chosen_output_W_per_m", "chosen output", "power_per_length"),
        ("circuits", "circuits", ""),
        ("installed_power_W", "installed power", "power"),
        ("insulation_thickness_m", "insulation thickness", "thickness"),
        ("hot_case_max_wall_K", "hot-case max wall temperature", "temperature"),
        ("hold_time_s", "hold time", "hours"),
        ("max_outer_surface_K", "max outer surface temperature", "temperature"),
        ("outlet_temperature_K", "outlet temperature", "temperature"),
        ("min_bulk_temperature_K", "min bulk temperature", "temperature"),
    )

    def to_dict(self) -> dict:
        """JSON-ready (NaN as None, inf hold time as the string "inf")."""
        out = {}
        for key, value in asdict(self).items():
            if isinstance(value, float) and math.isnan(value):
                value = None
            elif isinstance(value, float) and math.isinf(value):
                value = "inf" if value > 0 else "-inf"
            out[key] = value
        return out

    @classmethod
    def from_dict(cls, d: dict) -> "LineResult":
        """The row back from :meth:`to_dict` (None → NaN for the float figures)."""
        if not isinstance(d, dict) or "tag" not in d:
            raise InputError("line result", d, "must be a dict with a 'tag'")
        names = {f.name: f for f in fields(cls)}
        kw = {}
        for key, value in d.items():
            if key not in names:
                continue
            if value in ("inf", "-inf"):
                value = math.inf if value == "inf" else -math.inf
            if value is None and names[key].default is not None and isinstance(names[key].default, float):
                value = math.nan
            kw[key] = value
        return cls(**kw)

    def to_row(self, system: str = "SI", unit: Optional[UnitOf] = None) -> dict:
        """The row with unit-headed keys ("heat loss [W/m]", "hold time [h]"), values in ``system``'s units.

        ``unit(quantity, system)`` gives the display unit of a quantity (an object with ``label``,
        ``scale``, ``offset``, as ``app.units.unit`` gives, or a (label, scale, offset) tuple); default
        the engineer's SI units (:func:`solver.variants.si_unit`). Hold time is in hours in every
        system ("indefinitely" when it holds). NaN and None become None (an empty cell).
        """
        from solver.variants import si_unit

        out: dict = {}
        for name, words, quantity in self.COLUMNS:
            value = getattr(self, name)
            if quantity == "hours":
                key = f"{words} [h]"
                if value is None or (isinstance(value, float) and math.isnan(value)):
                    out[key] = None
                elif math.isinf(value):
                    out[key] = "indefinitely"
                else:
                    out[key] = value / 3600.0
                continue
            if not quantity:
                out[words] = value
                continue
            label, scale, offset = _unit_parts(unit(quantity, system) if unit is not None else si_unit(quantity))
            key = f"{words} [{label}]"
            if value is None or (isinstance(value, float) and not math.isfinite(value)):
                out[key] = None
            else:
                out[key] = float(value) * scale + offset
        return out


def _unit_parts(u) -> tuple[str, float, float]:
    if isinstance(u, tuple):
        return u[0], float(u[1]), float(u[2])
    return u.label, float(u.scale), float(getattr(u, "offset", 0.0))


def row_headers(system: str = "SI", unit: Optional[UnitOf] = None) -> list[str]:
    """The keys of :meth:`LineResult.to_row`, in order (the header of a results list)."""
    return list(LineResult(tag="").to_row(system, unit))


# --------------------------------------------------------------------------- options from a line-list row

def options_from_row(values: dict) -> dict:
    """The keywords of :func:`design_line` from a line-list row's parsed values (``LineRow.values``: SI, by the
    column names of :mod:`solver.line_list`): ``size_insulation`` when the insulation thickness is blank, the
    surface and heat-loss limits and the maximum circuit length where given."""
    from solver import line_list as ll

    out = {"size_insulation": values.get(ll.THICKNESS) is None}
    for column, keyword in ((ll.SURFACE_LIMIT, "surface_limit_K"), (ll.HEAT_LOSS_LIMIT, "heat_loss_limit_W_per_m"),
                            (ll.CIRCUIT_LENGTH, "max_circuit_length_m")):
        if values.get(column) is not None:
            out[keyword] = values[column]
    return out


# --------------------------------------------------------------------------- design


def _words(value: float, quantity: str, system: str, formatter: Optional[Formatter]) -> str:
    if formatter is not None:
        return formatter(value, quantity, system)
    from solver.variants import si_text

    return si_text(value, quantity)


def _check_words(check, system: str, formatter: Optional[Formatter]) -> str:
    """A check's message in the user's units (its template re-rendered when it has one)."""
    if formatter is None or not check.template:
        return check.message
    return render_message(check.template, lambda kind, v: formatter(v, _TOKEN_QUANTITY[kind], system))


def _positive(field: str, value, allow_none: bool = True) -> Optional[float]:
    if value is None and allow_none:
        return None
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value) or value <= 0:
        raise InputError(field, value, "must be a number above 0 (SI)")
    return float(value)


def _heated_group(alt: Alternative):
    """The segments the heater output acts on (those of Parameter("heater_output")), or None when the line is
    steam traced without electric heaters (then no electric heater is sized)."""
    from solver.variants import Parameter

    if not any(s.heater is not None for s in alt.segments) and any(s.steam_tracer is not None for s in alt.segments):
        return None
    return Parameter("heater_output").segment_indices(alt)


def _worst_min_bulk(design) -> float:
    values = [s.worst_temperature_K for s in design.segments if math.isfinite(s.worst_temperature_K)]
    return min(values) if values else math.nan


def _without_heaters(alt: Alternative, group) -> Alternative:
    segments = [seg.model_copy(update={"heater": None}) if i in group else seg for i, seg in enumerate(alt.segments)]
    return alt.model_copy(update={"segments": segments})


@dataclass
class _Sizing:
    required: Optional[float]  # W per metre of heater, margin included; None: not found
    chosen: Optional[float]
    alternative: Alternative  # with the chosen heater (or none)
    problems: list  # plain sentences: why the sizing falls short


def _rating(heater) -> float:
    """A heater's output as Parameter("heater_output") reads it [W per metre of heater]."""
    return heater.output_low_W_per_m if isinstance(heater, SelfLimitingHeater) else heater.output_W_per_m


def _closed_form(alt: Alternative, design, group) -> Optional[float]:
    """The required output [W per metre of heater, margins included] from the design cases' tracing need
    (standing worst case), or None where it does not give one (a steam tracer shares the heating).
    ``design`` may come from the line with any heater or none: the need does not depend on the heater.

    The need of segment i at the maintain temperature, (loss + sinks)·(1 + margin), per metre of pipe, is what
    its heater must deliver there (:mod:`solver.design_cases`). Its output at a fixed temperature is
    proportional to the rating the parameter sets (constant and thermostat: rating × runs; self-limiting: both
    rating points scaled, the zero-output temperature unchanged), so the rating that meets segment i's need is
    rating_now × need / output_now; the line needs the largest over the heated segments. A segment without a
    heater gets a straight constant run (Parameter.apply): rating = need.
    """
    if any(alt.segments[i].steam_tracer is not None for i in group):
        return None
    needed = 0.0
    for i in group:
        sd = design.segments[i]
        if not sd.exposed or not math.isfinite(sd.required_output_W_per_m) or sd.required_output_W_per_m <= 0:
            continue
        heater = alt.segments[i].heater
        if heater is None:
            needed = max(needed, sd.required_output_W_per_m)
            continue
        output_now = float(heater.output_per_pipe_metre(sd.maintain_temperature_K))
        if not output_now > 0:  # a self-limiting heater past its zero-output temperature: no scaling helps
            return None
        needed = max(needed, _rating(heater) * sd.required_output_W_per_m / output_now)
    return needed


def _find_required(alt: Alternative, cases, t_maintain: float, group, parameter, system, formatter,
                   problems: list) -> Optional[float]:
    """The Target Finder's required output [W per metre of heater, times (1 + the largest margin of the heated
    segments)]: the least output holding the maintain temperature in the worst case (and the inner wall within
    its limit where the alternative has one); 0 when the line holds with no heat at all; None, with the
    finder's words in ``problems``, when no output up to :data:`SEARCH_SPAN_OF_LARGEST` × the largest
    standard rating does."""
    from solver.march import solve
    from solver.target_finder import Target, find

    bare_design = solve(_without_heaters(alt, group), design=cases).design
    if not (_worst_min_bulk(bare_design) < t_maintain) and (
            not cases.worst_no_flow or not any(s.holds is False for s in bare_design.segments)):
        return 0.0
    margin = max((alt.segments[i].design_margin if alt.segments[i].design_margin is not None
                  else cases.design_margin) for i in group)
    runs = max((alt.segments[i].heater.runs_per_pipe_metre if alt.segments[i].heater is not None else 1.0)
               for i in group)
    lower, _ = parameter.default_range(alt)
    upper = min(SEARCH_SPAN_OF_LARGEST * STANDARD_HEATER_OUTPUTS_W_PER_M[-1], 1e4 / runs)
    targets = [Target("worst_case_bulk_min", t_maintain)]
    wall = alt.limits.max_inner_wall_temperature_K
    if wall is not None:
        targets.append(Target("inner_wall_max", wall))
    found = find(alt, parameter, targets, lower=lower, upper=upper, design=cases, system=system, formatter=formatter)
    if not found.feasible and len(targets) > 1:
        problems.append(found.explanation)
        found = find(alt, parameter, targets[:1], lower=lower, upper=upper, design=cases, system=system,
                     formatter=formatter)
    if not found.feasible:
        problems.append(found.explanation)
        return None
    return float(found.value) * (1.0 + margin)


def _size_heater(alt: Alternative, design, project: Project, t_maintain: Optional[float], group, search: str,
                 system, formatter) -> _Sizing:
    """Step 2 of the module: the required output and the standard rating chosen, on ``alt`` (``design``: its
    DesignResult, from a solve with the project's design cases).

    ``search`` "auto": the design cases' tracing need in closed form (:func:`_closed_form`), and where the
    worst case flows the Target Finder too (the larger: the flowing line must hold its bulk, and the tracing
    must meet the need the app's "cannot hold" check judges by). "finder": the Target Finder alone for a
    standing worst case; as "auto" for a flowing one."""
    from solver.variants import Parameter

    cases = project.design_cases
    if group is None or t_maintain is None:
        return _Sizing(None, None, alt, [])
    parameter = Parameter("heater_output")
    largest = STANDARD_HEATER_OUTPUTS_W_PER_M[-1]
    w = lambda v: _words(v, "power_per_length", system, formatter)  # noqa: E731
    problems = []
    # the design cases' tracing need (the app's own "cannot hold" check, DESIGN_NOT_HELD, judges by it)
    closed = _closed_form(alt, design, group) if search == "auto" or not cases.worst_no_flow else None
    found_required = None
    if search == "finder" or not cases.worst_no_flow or closed is None:
        found_required = _find_required(alt, cases, t_maintain, group, parameter, system, formatter, problems)
        if found_required is None and closed is None:  # not found, and no closed form to fall back on
            return _Sizing(None, largest, parameter.apply(alt, largest), problems)
    # a flowing worst case: the finder's answer, and at least the tracing need
    required = max(v for v in (closed, found_required) if v is not None)
    if required <= 0.0:
        return _Sizing(0.0, 0.0, _without_heaters(alt, group), problems)
    fits = [q for q in STANDARD_HEATER_OUTPUTS_W_PER_M if q >= required * (1.0 - 1e-12)]
    if not fits:
        problems.append(f"It needs {w(required)} of heater with the design margin, more than the largest standard "
                        f"rating, {w(largest)}: the largest is fitted and does not hold the line; use parallel "
                        "runs, a spiral, more insulation or another heater kind.")
        return _Sizing(required, largest, parameter.apply(alt, largest), problems)
    return _Sizing(required, fits[0], parameter.apply(alt, fits[0]), problems)


def _size_insulation(alt: Alternative, surface_limit_K, heat_loss_limit, lower, system, formatter):
    """Step 3: (alternative with the thickness found or the thickest, or None when there is nothing to size
    against; problems; a note in words or ""). ``lower`` [m]: the thinnest to consider (None: the whole list)."""
    from solver.target_finder import Target, find
    from solver.variants import Parameter, STANDARD_INSULATION_THICKNESSES_M

    targets, notes = [], []
    if surface_limit_K is not None:
        if any(isinstance(seg.surroundings, (StillAir, Wind)) for seg in alt.segments):
            targets.append(Target("surface_max", surface_limit_K))
        else:
            notes.append("The surface limit does not apply: no surface of the line is in air.")
    if heat_loss_limit is not None:
        targets.append(Target("heat_loss_per_m_max", heat_loss_limit))
    if not targets:
        notes.append("Insulation thickness kept as given: no surface or heat-loss limit to size it against.")
        return None, [], " ".join(notes)
    parameter = Parameter("insulation_thickness")
    found = find(alt, parameter, targets, lower=lower, system=system, formatter=formatter)
    if found.feasible:
        return parameter.apply(alt, found.value), [], " ".join(notes)
    return parameter.apply(alt, STANDARD_INSULATION_THICKNESSES_M[-1]), [found.explanation], " ".join(notes)


def _limits_met(result, surface_limit_K, heat_loss_limit) -> bool:
    """Whether the operating case keeps the outer surface and the heat loss per metre within the limits given."""
    if surface_limit_K is not None and result.max_outer_surface_temperature_K > surface_limit_K:
        return False
    return not (heat_loss_limit is not None and result.max_heat_loss_per_length_W_per_m > heat_loss_limit)


def _installed(alt: Alternative, chosen: Optional[float], max_circuit_length_m: Optional[float]):
    """(installed power [W], circuits or None) of the heaters on ``alt``."""
    power, circuits, any_heater = 0.0, 0, False
    for seg in alt.segments:
        h = seg.heater
        if h is None:
            continue
        any_heater = True
        rating = h.output_low_W_per_m if isinstance(h, SelfLimitingHeater) else h.output_W_per_m
        power += rating * seg.length_m * h.runs_per_pipe_metre
        if max_circuit_length_m is not None:
            # each parallel run is its own circuit: runs × ceil(heater length of one run / max circuit length)
            circuits += h.count * math.ceil(seg.length_m * h.heater_per_pipe_length / max_circuit_length_m
                                            * (1.0 - 1e-12))
    if not any_heater:
        return 0.0, (0 if max_circuit_length_m is not None else None)
    return power, (circuits if max_circuit_length_m is not None else None)


def design_line(project: Project, *, size_insulation: bool = False, surface_limit_K: Optional[float] = None,
                heat_loss_limit_W_per_m: Optional[float] = None, max_circuit_length_m: Optional[float] = None,
                row: Optional[int] = None, search: str = "auto", system: str = "SI",
                formatter: Optional[Formatter] = None) -> tuple[Project, LineResult]:
    """Design one line (the project's baseline alternative): see the module. Returns (the designed project:
    the same project with that alternative's heater and insulation set, and its :class:`LineResult`).

    Keywords (SI; from the line-list row, :func:`options_from_row`):

    * ``size_insulation``: choose the insulation thickness from the standard list (step 3); False keeps the
      project's thickness.
    * ``surface_limit_K`` [K]: personnel protection, the outer surface at most this in operation (a target
      of the insulation sizing; also judged on the designed line: missed → "fails").
    * ``heat_loss_limit_W_per_m`` [W/m]: heat loss per metre at most this in operation (as above).
    * ``max_circuit_length_m`` [m]: the longest circuit one heater may run: the number of circuits is
      runs × ceil(length × heater per pipe length / this), summed over the heated segments.
    * ``row``: the line's row in the list (1-based as the user sees it), carried into the result.
    * ``search``: how the required heater output is found (step 2 of the module): "auto" (default), the
      design cases' tracing need in closed form where the worst case stands still, the larger of it and
      the Target Finder's answer where it flows; "finder", the Target Finder alone for a standing worst case.
    * ``system``, ``formatter(value_si, quantity, system)``: the units of the messages (default SI).

    A line's own problem never raises: the result's verdict is then "error" and its message says why, and the
    project is returned as given.
    """
    alt0 = project.baseline_alternative()
    out = LineResult(tag=alt0.name, row=row)
    try:
        if search not in ("auto", "finder"):
            raise InputError("search", search, "must be 'auto' or 'finder'")
        return _design(project, alt0, out, size_insulation, surface_limit_K, heat_loss_limit_W_per_m,
                       max_circuit_length_m, search, system, formatter)
    except CalorunError as exc:
        out.verdict, out.message = "error", str(exc)
        return project, out


def _design(project, alt0, out: LineResult, size_insulation, surface_limit_K, heat_loss_limit, max_circuit,
            search, system, formatter):
    from solver.design_cases import HOT_CASE_CAUTION, freezing_point, maintain_temperature
    from solver.march import solve
    from solver.target_finder import design_figures
    from solver.variants import STANDARD_INSULATION_THICKNESSES_M, Parameter

    surface_limit_K = _positive("surface limit", surface_limit_K)
    heat_loss_limit = _positive("heat loss limit", heat_loss_limit)
    max_circuit = _positive("max circuit length", max_circuit)
    cases = project.design_cases
    w = lambda v, q: _words(v, q, system, formatter)  # noqa: E731

    # 1. as given
    t_maintain, _ = maintain_temperature(alt0, freezing_point(alt0))
    group = _heated_group(alt0)
    out.length_m = sum(seg.length_m for seg in alt0.segments)
    out.maintain_temperature_K = t_maintain if t_maintain is not None else math.nan
    try:
        given = solve(alt0, design=cases)
    except CalorunError as first:
        # the template's heater may be what breaks the line (it boils at that rating): the tracing need does
        # not depend on the heater, so the line without heaters serves; when that fails too, the first error
        if not group or not any(alt0.segments[i].heater is not None for i in group):
            raise
        try:
            given = solve(_without_heaters(alt0, group), design=cases)
        except CalorunError:
            raise first from None

    # 2. heater; 3. insulation, then the heater once more
    sizing = _size_heater(alt0, given.design, project, t_maintain, group, search, system, formatter)
    alt = sizing.alternative
    problems = list(sizing.problems)
    notes = []
    lower = None
    for _ in range(INSULATION_ROUNDS if size_insulation else 0):
        alt_ins, ins_problems, note = _size_insulation(alt, surface_limit_K, heat_loss_limit, lower, system,
                                                       formatter)
        if note and note not in notes:
            notes.append(note)
        if alt_ins is None:
            break
        # the tracing need does not depend on the heater: the thickness found, with any heater, gives it
        resized = _size_heater(alt_ins, solve(alt_ins, design=cases).design, project, t_maintain,
                               _heated_group(alt_ins), search, system, formatter)
        sizing, alt = resized, resized.alternative
        problems = ins_problems + resized.problems
        if ins_problems or _limits_met(solve(alt), surface_limit_K, heat_loss_limit):
            break
        # the heater re-sized for a thinner layer runs the line hotter past a limit: the next thickness up
        thickness = Parameter("insulation_thickness").current_value(alt)
        thicker = [t for t in STANDARD_INSULATION_THICKNESSES_M if t > thickness + 1e-12]
        if not thicker:
            break
        lower = thicker[0]

    # 4. the designed line, solved as the app solves it
    result = solve(alt, design=cases)
    design = result.design
    figures = design_figures(design)
    out.heat_loss_W_per_m = result.max_heat_loss_per_length_W_per_m
    out.heat_loss_W = result.heat_loss_W
    out.required_output_W_per_m = sizing.required
    out.chosen_output_W_per_m = sizing.chosen
    out.installed_power_W, out.circuits = _installed(alt, sizing.chosen, max_circuit)
    insulated = [i for i, s in enumerate(alt.segments) if s.insulation]
    out.insulation_thickness_m = (Parameter("insulation_thickness").current_value(alt) if insulated else None)
    out.hot_case_max_wall_K = design.hot_wall_temperature_K
    out.hold_time_s = float(figures["hold_time_s"])
    out.max_outer_surface_K = result.max_outer_surface_temperature_K
    out.outlet_temperature_K = result.outlet_temperature_K
    out.min_bulk_temperature_K = result.min_bulk_temperature_K

    checks = result.checks  # sorted worst first (solver.results.check_sort_key)
    worst = checks[0] if checks else None
    if worst is not None:
        out.worst_check, out.worst_check_severity = worst.code, worst.severity
        out.worst_check_message = _check_words(worst, system, formatter)

    # the verdict: fails / warning / ok
    reasons = list(problems)
    worst_min = _worst_min_bulk(design)
    if t_maintain is not None and math.isfinite(worst_min) and worst_min < t_maintain - 1e-6 and not reasons:
        reasons.append(f"In the worst case the bulk falls to {w(worst_min, 'temperature')}, below the "
                       f"{w(t_maintain, 'temperature')} to hold.")
    for check in checks:
        if check.code in ("DESIGN_NOT_HELD", "HOT_CASE_WALL") or check.severity == "danger":
            text = _check_words(check, system, formatter).replace(HOT_CASE_CAUTION, "").strip()
            if text not in reasons:
                reasons.append(text)
    if surface_limit_K is not None and math.isfinite(out.max_outer_surface_K) \
            and out.max_outer_surface_K > surface_limit_K + 1e-9 and not any("outer surface" in r for r in reasons):
        reasons.append(f"The outer surface reaches {w(out.max_outer_surface_K, 'temperature')}, above the "
                       f"surface limit {w(surface_limit_K, 'temperature')}.")
    if heat_loss_limit is not None and math.isfinite(out.heat_loss_W_per_m) \
            and out.heat_loss_W_per_m > heat_loss_limit * (1 + 1e-9) and not any("heat loss" in r for r in reasons):
        reasons.append(f"The heat loss reaches {w(out.heat_loss_W_per_m, 'power_per_length')}, above the limit "
                       f"{w(heat_loss_limit, 'power_per_length')}.")
    if reasons:
        out.verdict = "fails"
        out.message = " ".join(reasons + notes)
    elif worst is not None and SEVERITY_ORDER[worst.severity] >= SEVERITY_ORDER["warning"]:
        out.verdict = "warning"
        out.message = " ".join([out.worst_check_message] + notes)
    else:
        out.verdict = "ok"
        out.message = " ".join(notes)

    designed_alt = alt.model_copy(update={"name": alt0.name, "description": _description(alt0, out, system, formatter)})
    alternatives = [designed_alt if a is alt0 else a for a in project.alternatives]
    return project.model_copy(update={"alternatives": alternatives}), out


def _description(alt0: Alternative, out: LineResult, system, formatter) -> str:
    w = lambda v, q: _words(v, q, system, formatter)  # noqa: E731
    parts = []
    if out.chosen_output_W_per_m is not None:
        if out.chosen_output_W_per_m == 0:
            parts.append("no heater needed")
        else:
            need = (f" (needs {w(out.required_output_W_per_m, 'power_per_length')} with the design margin)"
                    if out.required_output_W_per_m is not None else "")
            parts.append(f"heater {w(out.chosen_output_W_per_m, 'power_per_length')}{need}")
    if out.insulation_thickness_m is not None:
        parts.append(f"insulation {w(out.insulation_thickness_m, 'thickness')}")
    text = "Designed by the Line List: " + ", ".join(parts) + "." if parts else ""
    base = alt0.description.split("Designed by the Line List:")[0].strip()  # a line designed again: the new words
    return (f"{base} {text}".strip() if base else text)[:2000]
