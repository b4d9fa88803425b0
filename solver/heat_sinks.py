"""Heat sinks on a segment: supports, valves, flanges, pumps and instruments, as lengths of pipe.

Trace-heating practice sizes the heat a sink loses as an *equivalent length* of the segment's own
insulated pipe: the sink loses what that many metres of the pipe lose, at the same temperatures and
with the same insulation (so it scales with the pipe's loss per metre, wind and ambient included).
The catalogue below gives that length per item at the pipe's bore. An item may give its own
equivalent length, a length of *bare* pipe (no insulation), or a direct loss in W per K of
pipe-to-surroundings difference instead.

Sources of the catalogue (per kind, by pipe size):

* valve (flanged), pump (flanged casing), flange_pair: the heat-sink allowance table (metric columns) of
  a heater maker's published design guide for self-regulating tracing; the trade's design guides give
  tables of this kind and similar size (common practice; the maker is not named here, as no product of
  this field is). Those allowances are extra heater length for
  one straight run, i.e. the heat the item loses expressed in metres of the pipe's loss: exactly an
  equivalent length of insulated pipe. The flanged-valve and flanged-pump columns are used (the larger
  of the valve columns; screwed or welded valves lose somewhat less, give their own length for those).
* pipe_support: 0.3 m per support at DN 25 (a worked example in another maker's published design
  guide; common practice); for other bores scaled as the flange allowance above scales with the bore (common
  practice: a clamped support's metal grows with the pipe; no table at hand).
* instrument: a small-bore process connection (gauge, transmitter tapping) 0.3 m each whatever the
  pipe's bore (common practice; nothing published at hand).

Between the tabulated sizes the length is interpolated on the pipe's outside diameter; below NPS 1/2
the NPS 1/2 value holds; above NPS 30 the length grows in proportion to the outside diameter (the loss
of a flange or valve body grows about with its size; common practice).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from solver.model import HeatSink, Segment

# Outside diameters of the tabulated sizes [m], ASME B36.10M (NPS 1/2 … 30).
_TABLE_NPS = ("1/2", "3/4", "1", "1-1/4", "1-1/2", "2", "3", "4", "6", "8", "10", "12", "14", "16", "18", "20",
              "24", "30")
_TABLE_OD_M = np.array([0.0213, 0.0267, 0.0334, 0.0422, 0.0483, 0.0603, 0.0889, 0.1143, 0.1683, 0.2191, 0.2731,
                        0.3239, 0.3556, 0.4064, 0.4572, 0.508, 0.6096, 0.762])
# Equivalent length of insulated pipe per item [m], by the sizes above.
# A maker's published design-guide allowance table (metric): valve (flanged), pump (flanged), flange.
# Common practice; the trade's guides agree in size.
_VALVE_M = np.array([0.38, 0.46, 0.61, 0.61, 0.76, 0.76, 1.07, 1.52, 2.44, 3.35, 4.27, 5.03, 5.94, 7.01, 8.23,
                     9.14, 10.97, 12.80])
_PUMP_M = np.array([0.61, 0.91, 1.22, 1.37, 1.52, 1.68, 2.13, 3.05, 4.88, 6.71, 8.53, 10.06, 11.89, 14.02, 16.46,
                    18.29, 21.95, 25.60])
_FLANGE_M = np.array([0.38, 0.46, 0.46, 0.53, 0.61, 0.61, 0.69, 0.84, 0.99, 1.14, 1.30, 1.52, 1.68, 1.83, 1.98,
                      2.21, 2.51, 3.05])
# pipe support: 0.3 m at DN 25 (a published design-guide example), scaled with the bore as the flange column (common practice)
_SUPPORT_M = 0.3 * _FLANGE_M / _FLANGE_M[2]
# instrument connection: common practice, any bore
_INSTRUMENT_M = 0.3

#: Where each catalogue kind's value comes from (for the report and the docs).
SOURCES = {
    "valve": "trace-heating design-guide allowance table, flanged valve (common practice)",
    "pump": "trace-heating design-guide allowance table, flanged pump casing (common practice)",
    "flange_pair": "trace-heating design-guide allowance table, flange pair (common practice)",
    "pipe_support": "trace-heating design-guide example: 0.3 m at DN 25; other bores scaled as the flange "
                    "allowance (common practice)",
    "instrument": "common practice: 0.3 m of insulated pipe per connection",
}


@dataclass(frozen=True)
class SinkTotals:
    """All heat sinks of one segment together, per segment (not per metre).

    ``insulated_equivalent_length_m``: metres of the segment's insulated pipe the sinks lose as;
    ``bare_equivalent_length_m``: metres of the same pipe without insulation; ``direct_W_per_K``: loss
    per kelvin of pipe-to-surroundings difference. ``items``: per entry (label, kind, count, insulated m,
    bare m, W/K), totals for the entry's count.
    """

    insulated_equivalent_length_m: float = 0.0
    bare_equivalent_length_m: float = 0.0
    direct_W_per_K: float = 0.0
    items: tuple = ()

    @property
    def any(self) -> bool:
        return (self.insulated_equivalent_length_m > 0.0 or self.bare_equivalent_length_m > 0.0
                or self.direct_W_per_K > 0.0)


def catalogue_length_m(kind: str, pipe_outer_diameter_m: float) -> float:
    """Equivalent length of insulated pipe for one catalogue item of ``kind`` on a pipe of this outside
    diameter [m]; see the module's sources."""
    if kind == "instrument":
        return _INSTRUMENT_M
    table = {"valve": _VALVE_M, "pump": _PUMP_M, "flange_pair": _FLANGE_M, "pipe_support": _SUPPORT_M}.get(kind)
    if table is None:
        raise ValueError(f"heat sink kind {kind!r} has no catalogue length; give its own length or loss")
    d = float(pipe_outer_diameter_m)
    if d > _TABLE_OD_M[-1]:
        return float(table[-1] * d / _TABLE_OD_M[-1])
    return float(np.interp(d, _TABLE_OD_M, table))


def _item(sink: HeatSink, d_po: float) -> tuple:
    if sink.loss_W_per_K is not None:
        ins, bare, g = 0.0, 0.0, sink.loss_W_per_K
    elif sink.bare_length_m is not None:
        ins, bare, g = 0.0, sink.bare_length_m, 0.0
    elif sink.equivalent_length_m is not None:
        ins, bare, g = sink.equivalent_length_m, 0.0, 0.0
    else:
        ins, bare, g = catalogue_length_m(sink.kind, d_po), 0.0, 0.0
    c = sink.count
    return (sink.label, sink.kind, c, ins * c, bare * c, g * c)


def sink_conductances(segment: Segment, pipe_outer_diameter_m: float) -> SinkTotals:
    """The segment's heat sinks summed (see :class:`SinkTotals`); ``pipe_outer_diameter_m`` picks the
    catalogue row (the pipe's own outside diameter, not over the insulation)."""
    if not segment.heat_sinks:
        return SinkTotals()
    if not (math.isfinite(pipe_outer_diameter_m) and pipe_outer_diameter_m > 0.0):
        raise ValueError(f"pipe outer diameter must be a positive length, got {pipe_outer_diameter_m!r}")
    items = tuple(_item(s, pipe_outer_diameter_m) for s in segment.heat_sinks)
    return SinkTotals(
        insulated_equivalent_length_m=float(sum(i[3] for i in items)),
        bare_equivalent_length_m=float(sum(i[4] for i in items)),
        direct_W_per_K=float(sum(i[5] for i in items)),
        items=items,
    )
