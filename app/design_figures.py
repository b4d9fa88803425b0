"""The design cases in plain words and the user's units: what Key Figures, the Segment Card and the
Hold Time view print about ``Result.design`` (:class:`solver.design_cases.DesignResult`).

No Qt and no physics: this only picks figures out of a solved result and writes them through
:mod:`app.units`. Times after the flow stops follow :class:`solver.hold_time.SegmentHold`: ``inf`` =
not reached within the time followed (it holds), None = does not apply.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable, Optional

from app import units
from solver.hold_time import HORIZON_MAX_S

#: Shown next to the hot case's wall temperature; the full caution (DesignResult.notes) is its tooltip.
HOT_CASE_SHORT = ("⚠ Hot case: the pipe wall. The heater's own sheath runs hotter; the heater maker's data and the "
                  "hazardous-area trace-heating standard decide the temperature class.")

#: What the tracing-need tokens of :meth:`DesignResult.tracing_words` are, as app quantities.
_TOKEN_QUANTITY = {"T": "temperature", "q": "power_per_length"}

CASES = ("operating", "worst", "hot")
CASE_TITLES = {"operating": "Operating", "worst": "Worst", "hot": "Hot"}


def formatter(system: str) -> Callable[[str, float], str]:
    """``formatter(kind, value)`` for :meth:`DesignResult.tracing_words` in the user's units."""

    def one(kind: str, value: float) -> str:
        return units.format_value(value, _TOKEN_QUANTITY[kind], system, digits=3)

    return one


def duration_text(seconds: Optional[float], never: str = "holds") -> str:
    """A time after the flow stops as an operator reads it: '45 min', '5.6 h', '3.2 days';
    '—' when it does not apply, ``never`` when it is not reached within the time followed (30 days:
    a cooldown that "holds", a warm-up that "never" gets there)."""
    if seconds is None or (isinstance(seconds, float) and math.isnan(seconds)):
        return "—"
    if math.isinf(seconds):
        return never
    if seconds < 3600.0:
        return f"{max(seconds / 60.0, 0.0):.0f} min"
    hours = seconds / 3600.0
    if hours < 100.0:
        return f"{hours:.1f} h" if hours < 10 else f"{hours:.0f} h"
    return f"{hours / 24.0:.1f} days"


def _t(value: float, system: str) -> str:
    return units.format_value(value, "temperature", system)


def _finite(values) -> list[float]:
    return [v for v in values if v is not None and math.isfinite(v)]


@dataclass(frozen=True)
class CaseRow:
    """One row of the design-case table: a short label, one text per case (operating, worst, hot), a
    tooltip that starts with the label in full."""

    key: str
    label: str
    texts: tuple[str, str, str]
    tip: str = ""


def _where(design, index: int) -> str:
    return design.segments[index].name


def case_rows(result, system: str, hold=None, hold_pending: bool = False) -> list[CaseRow]:
    """The three cases side by side for ``result`` (which must carry ``result.design``); ``hold``: its
    Hold Time when worked out (``hold_pending``: still on its way)."""
    d = result.design
    cases = d.cases
    segs = d.segments
    rows: list[CaseRow] = []
    wind = units.format_value(cases.worst_wind_speed_m_per_s, "velocity", system, digits=3)
    rows.append(CaseRow(
        "air", "Conditions",
        ("as set, flowing",
         f"{_t(cases.worst_air_temperature_K, system)}, {wind}, " + ("no flow" if d.worst_no_flow else "flowing"),
         f"{_t(cases.hot_air_temperature_K, system)}, still, no flow"),
        "Air and flow in each case: the project's design air temperatures and wind (Project details; the site's "
        "meteorological data and the owner's specification decide them). The hot case has the heaters at full "
        "output (a thermostat taken as failed on)."))

    # the maintain check of the worst case
    held = [s for s in segs if s.holds is not None]
    short = [s for s in held if not s.holds]
    if d.maintain_temperature_K is None or not held:
        check = "not assessed"
        tip = "No maintain temperature: set one (Limits), a minimum bulk temperature, or use a freezing fluid."
    elif short:
        check = f"✗ no, {len(short)} of {len(held)}"
        tip = "Does not hold at " + ", ".join(s.name for s in short) + "."
    else:
        margins = sorted({round(s.design_margin * 100) for s in held})
        margin = "/".join(f"{m}" for m in margins)
        check = f"✓ yes, +{margin} %"
        tip = "Every assessed segment's heater delivers its need, margin included, at the maintain temperature."
    label = "Holds" if d.maintain_temperature_K is None else f"Holds {_t(d.maintain_temperature_K, system)}"
    tip = (f"Holds the {d.maintain_basis}, design margin included" if d.maintain_basis else "Holds") + ": " + tip
    rows.append(CaseRow("maintain", label, ("—", check, "—"), tip))

    # lowest bulk temperature
    op_low = float(min(result.profile.bulk_temperature_K))
    worst = [(s.worst_temperature_K, s.index) for s in segs if math.isfinite(s.worst_temperature_K)]
    if worst:
        t, i = min(worst)
        worst_text = f"{_t(t, system)}"
        worst_tip = f"worst case: lowest at {_where(d, i)}"
    else:
        worst_text = "no solution" if d.worst_case_error else "—"
        worst_tip = d.worst_case_error
    rows.append(CaseRow("lowest", "Lowest bulk", (_t(op_low, system), worst_text, "—"),
                        "Lowest bulk temperature. Operating: along the line. "
                        + (worst_tip[:1].upper() + worst_tip[1:] if worst_tip else "")))

    # highest pipe-wall temperature: the hot case, next to its caution
    hot = [(s.hot_wall_temperature_K, s.index) for s in segs if math.isfinite(s.hot_wall_temperature_K)]
    if hot:
        t, i = max(hot)
        hot_text = f"{_t(t, system)} ⚠"
        hot_tip = f"Hot case: highest at {_where(d, i)}, pipe wall under the heater. " + " ".join(d.notes)
    else:
        hot_text, hot_tip = "—", "No segment stands in air or soil."
    rows.append(CaseRow("hot_wall", "Highest wall",
                        (_t(result.max_inner_wall_temperature_K, system), "—", hot_text),
                        "Highest pipe-wall temperature. Operating: the inner wall along the line. " + hot_tip))

    # heat-sink loss, whole line
    worst_sinks = _finite(s.heat_sinks_W_per_m * (result.segments[s.index].length_m) for s in segs)
    rows.append(CaseRow(
        "sinks", "Heat sinks",
        (units.format_value(result.heat_sink_loss_W, "power", system, digits=3),
         units.format_value(sum(worst_sinks), "power", system, digits=3) if worst_sinks else "—", "—"),
        "Heat-sink loss: supports, valves, flanges, pumps and instruments, whole line. Worst case: with the pipe held at the "
        "maintain temperature, before the design margin."))

    # heater output delivered, whole line
    op_q = sum(sp.heater_output_W_per_m * sp.length_m for sp in result.segments)
    worst_q = _finite(s.worst_heater_output_W_per_m * result.segments[s.index].length_m for s in segs)
    hot_q = _finite(s.hot_heater_output_W_per_m * result.segments[s.index].length_m for s in segs)
    if op_q > 0 or any(worst_q) or any(hot_q):
        rows.append(CaseRow(
            "heater", "Heater output",
            (units.format_value(op_q, "power", system, digits=3),
             units.format_value(sum(worst_q), "power", system, digits=3) if worst_q else "—",
             units.format_value(sum(hot_q), "power", system, digits=3) if hot_q else "—"),
            "Heater output delivered by the electric heaters, whole line, at the pipe temperatures of each case (a self-limiting heater gives "
            "less when warmer; a thermostat its duty). A flowing worst case gives no single figure."))

    # hold time after a power failure: the shortest over the segments
    shortest = shortest_hold(hold)
    if shortest is not None:
        rows.append(CaseRow("hold", "Power failure", ("—", shortest[0], "—"), shortest[1]))
    elif hold_pending:
        rows.append(CaseRow("hold", "Power failure", ("—", "…", "—"), "The Hold Time is being worked out."))
    return rows


def shortest_hold(ht) -> Optional[tuple[str, str]]:
    """(short text, tooltip) of the shortest time after a power failure to the maintain temperature or,
    for a freezing fluid, to its freezing point (``ht``: :class:`solver.hold_time.HoldTime`); None
    without a Hold Time."""
    if ht is None or not ht.segments:
        return None
    if ht.freezing_point_K is not None:
        times = [(s.to_freezing_off_s, s.name) for s in ht.segments if s.to_freezing_off_s is not None]
        target = "to freezing"
    else:
        times = [(s.to_limit_off_s, s.name) for s in ht.segments if s.to_limit_off_s is not None]
        target = "to the maintain temperature"
    if not times:
        return None
    t, name = min(times)
    if math.isinf(t):
        return "holds", (f"No segment gets {target.removeprefix('to ')} within {HORIZON_MAX_S / 86400:.0f} days "
                         "after a power failure, in the worst-case surroundings.")
    tip = (f"Shortest time after the flow stops with the heating off (power failure) {target}, at {name}, "
           "in the worst-case surroundings. The Hold Time view shows every segment.")
    return f"{duration_text(t)} {'to freezing' if ht.freezing_point_K is not None else 'to maintain'}", tip


def hold_line(ht, index: int, system: str) -> str:
    """What segment ``index`` does after a power failure, in one line ('' without a Hold Time for it;
    ``ht``: :class:`solver.hold_time.HoldTime`)."""
    if ht is None:
        return ""
    seg = next((s for s in ht.segments if s.index == index), None)
    if seg is None:
        return ""
    parts = []
    if seg.to_limit_off_s is not None and ht.limit_temperature_K is not None:
        parts.append(f"{duration_text(seg.to_limit_off_s)} to {_t(ht.limit_temperature_K, system)}")
    if seg.to_freezing_off_s is not None:
        parts.append(f"{duration_text(seg.to_freezing_off_s)} to freezing")
    if seg.frozen_solid_off_s is not None and math.isfinite(seg.frozen_solid_off_s):
        parts.append(f"frozen solid after {duration_text(seg.frozen_solid_off_s)}")
    return ", ".join(parts)

