"""Variants of one alternative: a parameter, the values it takes, and many variants solved together.

A :class:`Parameter` names what the Target Finder and the Sweep vary (``kind``, one of
:data:`PARAMETER_KINDS`) and, for the kinds that live on segments, which segments (0-based indices;
empty = every segment where it applies). :meth:`Parameter.apply` gives a new alternative with the value
set, checked against the model's own bounds (:mod:`solver.model`), the input untouched.
:func:`solve_variants` applies a list of values and solves them all with one call of
:func:`solver.batch.solve_batch` (array-batched where the cell layouts match).

Values are SI (W/m, m, kg/s, m³/s, K, Pa); a bore is an NPS text ("2", "1-1/2") of the ASME B36.10M /
B36.19M table in :mod:`solver.catalogue`.
"""

from __future__ import annotations

import math
import re
import typing
from dataclasses import dataclass
from typing import Callable, Optional, Sequence

from pydantic import ValidationError

from solver import catalogue
from solver.batch import BatchOutcome, solve_batch
from solver.errors import InputError
from solver import model as m
from solver.model import (Alternative, ConstantHeater, DesignCases, Feed, FixedWall, Jacket, Layer, Pipe, Segment,
                          SelfLimitingHeater)

#: What can be varied: kind -> plain words (the label's first words).
PARAMETER_KINDS: dict[str, str] = {
    "heater_output": "Heater output",
    "insulation_thickness": "Insulation thickness",
    "mass_flow": "Mass flow",
    "volume_flow": "Volume flow",
    "bore": "Bore",
    "inlet_temperature": "Inlet temperature",
    "steam_pressure": "Steam pressure",
    "medium_temperature": "Medium temperature",
    "segment_length": "Segment length",
}

#: Standard insulation thicknesses [m]: 13, 20, 25, 30, 40, 50, 65, 80 and 100 mm. Common practice, not a
#: standard: the wall thicknesses preformed pipe sections (mineral-wool pipe sections and other preformed
#: sections) are commonly made in, as typical makers' ranges offer them (from memory). Check what the
#: chosen material is sold in; thicker insulation is built up from two layers.
STANDARD_INSULATION_THICKNESSES_M: tuple[float, ...] = (0.013, 0.020, 0.025, 0.030, 0.040, 0.050, 0.065, 0.080,
                                                        0.100)
INSULATION_LIST_SOURCE = ("common practice for preformed pipe sections / mineral-wool pipe sections (typical "
                          "makers' ranges, from memory), not a standard")

_FEED_KINDS = ("mass_flow", "volume_flow", "inlet_temperature")
_DISCRETE_KINDS = ("bore", "insulation_thickness")
_QUANTITY = {  # an app.units quantity name for the value
    "heater_output": "power_per_length", "insulation_thickness": "thickness", "mass_flow": "mass_flow",
    "volume_flow": "volume_flow", "bore": "", "inlet_temperature": "temperature", "steam_pressure": "pressure",
    "medium_temperature": "temperature", "segment_length": "length",
}
#: The model's bounds of each kind (the annotated types of solver.model: one place for every bound).
_BOUND_TYPE = {
    "heater_output": m.HeaterOutputPerLength, "insulation_thickness": m.LayerThickness, "mass_flow": m.MassFlow,
    "volume_flow": m.VolumeFlow, "inlet_temperature": m.ProcessTemperature, "steam_pressure": m.SteamPressure,
    "medium_temperature": m.ProcessTemperature, "segment_length": m.SegmentLength,
}
#: A layer at or above this conductivity [W/(m·K)] is cladding, not insulation (metals are 15 and more;
#: the catalogue's insulations are below 0.2).
_CLADDING_CONDUCTIVITY = 1.0


# --------------------------------------------------------------------------- SI text (no app import)

def si_unit(quantity: str) -> tuple[str, float, float]:
    """(label, scale, offset) of the engineer's SI unit of a quantity (the SI column of app.units)."""
    return _SI_UNITS.get(quantity, ("", 1.0, 0.0))


_SI_UNITS: dict[str, tuple[str, float, float]] = {
    "temperature": ("°C", 1.0, -273.15), "temperature_difference": ("K", 1.0, 0.0),
    "pressure": ("bar(a)", 1e-5, 0.0), "pressure_difference": ("kPa", 1e-3, 0.0), "length": ("m", 1.0, 0.0),
    "thickness": ("mm", 1e3, 0.0), "diameter": ("mm", 1e3, 0.0), "mass_flow": ("kg/s", 1.0, 0.0),
    "volume_flow": ("m³/h", 3600.0, 0.0), "power": ("kW", 1e-3, 0.0), "power_per_length": ("W/m", 1.0, 0.0),
    "velocity": ("m/s", 1.0, 0.0), "time": ("s", 1.0, 0.0), "dimensionless": ("", 1.0, 0.0),
}


def si_text(value: float, quantity: str) -> str:
    """A value in the engineer's SI unit of ``quantity`` (4 significant digits, °C for temperatures):
    ``si_text(0.04, "thickness") -> "40 mm"``."""
    if quantity == "time":
        return duration_words(value)
    label, scale, offset = si_unit(quantity)
    shown = value * scale + offset
    if quantity in ("temperature", "temperature_difference"):
        text = f"{shown:.1f}"
    else:
        text = f"{shown:.4g}" if abs(shown) < 1e4 else f"{shown:.0f}"
    text = text.replace("-", "\u2212")
    return f"{text} {label}".strip()


def duration_words(seconds: float) -> str:
    """A time in plain words: seconds below 2 min, minutes below 2 h, else hours (inf: "indefinitely")."""
    if not math.isfinite(seconds):
        return "indefinitely" if seconds > 0 else "—"
    if seconds < 120:
        return f"{seconds:.0f} s"
    if seconds < 7200:
        return f"{seconds / 60:.0f} min"
    return f"{seconds / 3600:.3g} h"


#: formatter(value_si, quantity, system) -> text; the app passes one that writes the user's units.
Formatter = Callable[[float, str, str], str]


# --------------------------------------------------------------------------- bounds of the model

def model_bounds(kind: str) -> tuple[float, float]:
    """(lowest, highest) value the model accepts for ``kind`` (from the annotated types of solver.model;
    a strict lower bound is returned as the bound itself)."""
    low, high = -math.inf, math.inf
    for meta in typing.get_args(_BOUND_TYPE[kind])[1:]:
        for item in getattr(meta, "metadata", ()):
            for name in ("ge", "gt"):
                if getattr(item, name, None) is not None:
                    low = max(low, float(getattr(item, name)))
            for name in ("le", "lt"):
                if getattr(item, name, None) is not None:
                    high = min(high, float(getattr(item, name)))
    return low, high


def _strict_low(kind: str) -> bool:
    for meta in typing.get_args(_BOUND_TYPE[kind])[1:]:
        for item in getattr(meta, "metadata", ()):
            if getattr(item, "gt", None) is not None and float(item.gt) >= model_bounds(kind)[0]:
                return True
    return False


def _number(kind: str, value) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        try:
            value = float(value)
        except (TypeError, ValueError):
            raise InputError(kind, value, "must be a number (SI)") from None
    value = float(value)
    if not math.isfinite(value):
        raise InputError(kind, value, "must be a finite number")
    low, high = model_bounds(kind)
    quantity = _QUANTITY[kind]
    if value < low or value > high or (value == low and _strict_low(kind)):
        raise InputError(kind, value, f"must be from {si_text(low, quantity)} to {si_text(high, quantity)} "
                                      "(the model's bounds)")
    return value


def _validated(kind: str, value, build):
    """Run ``build()`` (which constructs model objects); a model refusal becomes an InputError on ``kind``."""
    try:
        return build()
    except ValidationError as exc:
        first = exc.errors()[0]
        raise InputError(kind, value, str(first.get("msg", exc)).removeprefix("Value error, ")) from None


def _fields(obj) -> dict:
    return {name: getattr(obj, name) for name in type(obj).model_fields}


def _is_insulating(layer: Layer) -> bool:
    if layer.conductivity_W_per_mK is not None:
        return layer.conductivity_W_per_mK < _CLADDING_CONDUCTIVITY
    return catalogue.insulation_key(layer.material) is not None


def _insulation_index(seg: Segment) -> Optional[int]:
    """The layer the thickness acts on: the outermost insulating one (cladding sheets skipped), else the outermost."""
    for i in range(len(seg.insulation) - 1, -1, -1):
        if _is_insulating(seg.insulation[i]):
            return i
    return len(seg.insulation) - 1 if seg.insulation else None


def _nps_text(value) -> str:
    return catalogue.normalise_nps(value, field="bore")


# --------------------------------------------------------------------------- the parameter


@dataclass(frozen=True)
class Parameter:
    """What the Target Finder or a Sweep varies: ``kind`` (a key of :data:`PARAMETER_KINDS`) and, for the
    kinds on segments, ``segments`` (0-based; empty = every segment where it applies, see
    :meth:`segment_indices`). The feed kinds (mass flow, volume flow, inlet temperature) take no segments;
    ``segment_length`` takes exactly one.
    """

    kind: str
    segments: tuple[int, ...] = ()

    def __post_init__(self):
        if self.kind not in PARAMETER_KINDS:
            raise InputError("parameter", self.kind, f"unknown parameter; known: {', '.join(PARAMETER_KINDS)}")
        segs = tuple(self.segments)
        if any(isinstance(i, bool) or not isinstance(i, int) or i < 0 for i in segs):
            raise InputError("segments", segs, "must be segment indices (0-based, whole numbers)")
        object.__setattr__(self, "segments", tuple(sorted(set(segs))))
        if self.kind in _FEED_KINDS and segs:
            raise InputError("segments", segs, f"{self.kind} belongs to the feed, not to segments: give none")
        if self.kind == "segment_length" and len(self.segments) != 1:
            raise InputError("segments", segs, "segment_length varies exactly one segment: give one")

    # ------------------------------------------------------------------ what it is

    @property
    def quantity(self) -> str:
        """The app.units quantity name of the value ("" for a bore, which is an NPS text)."""
        return _QUANTITY[self.kind]

    @property
    def discrete(self) -> bool:
        """True for bore and insulation thickness: the values are a list of sizes on sale."""
        return self.kind in _DISCRETE_KINDS

    @property
    def on_segments(self) -> bool:
        return self.kind not in _FEED_KINDS

    def segment_indices(self, alt: Alternative) -> list[int]:
        """The segments this parameter changes (0-based), checked against ``alt``.

        With no segments given: heater output — the segments with an electric heater, or, when none has
        one, every segment that can take one (not held at a fixed wall temperature); insulation thickness —
        the insulated segments, or, when none is, every segment in air or soil; bore — the segments given by
        NPS and schedule; steam pressure — the steam tracers and steam-heated walls; medium temperature —
        jackets and walls held at a temperature. Raises InputError when none applies or a given index is
        out of range or does not apply.
        """
        if not self.on_segments:
            return []
        n = len(alt.segments)
        for i in self.segments:
            if i >= n:
                raise InputError("segments", i + 1, f"no such segment: the alternative has {n} (numbered 1 to {n})")
        if self.segments:
            for i in self.segments:
                why = self._not_here(alt.segments[i])
                if why:
                    raise InputError("segments", i + 1, f"{self.kind} does not apply to segment "
                                                        f"{alt.segments[i].name!r}: {why}")
            return list(self.segments)
        segs = alt.segments
        k = self.kind
        if k == "heater_output":
            group = [i for i, s in enumerate(segs) if s.heater is not None]
            group = group or [i for i, s in enumerate(segs) if not self._not_here(s)]
        elif k == "insulation_thickness":
            group = [i for i, s in enumerate(segs) if s.insulation and not self._not_here(s)]
            group = group or [i for i, s in enumerate(segs) if not self._not_here(s)]
        else:
            group = [i for i, s in enumerate(segs) if not self._not_here(s)]
        if not group:
            raise InputError(self.kind, alt.name, f"no segment of this alternative has a {self._applies_words()}")
        return group

    def _applies_words(self) -> str:
        return {"heater_output": "place for an electric heater (every one is held at a fixed wall temperature)",
                "insulation_thickness": "place for insulation (in air or soil)",
                "bore": "bore given by NPS and schedule",
                "steam_pressure": "steam tracer or steam-heated wall",
                "medium_temperature": "jacket or wall held at a temperature"}.get(self.kind, "use for it")

    def _not_here(self, seg: Segment) -> str:
        """Why this parameter cannot act on ``seg`` ("" when it can)."""
        sur = seg.surroundings
        k = self.kind
        if k == "heater_output" and isinstance(sur, FixedWall):
            return "its wall is held at a fixed temperature"
        if k == "insulation_thickness" and isinstance(sur, (FixedWall, Jacket, m.Adiabatic)):
            return f"insulation plays no part with surroundings {sur.kind!r}"
        if k == "bore" and seg.pipe.bore != "nps":
            return "its bore is given as a diameter, not as NPS and schedule"
        if k == "steam_pressure" and not (seg.steam_tracer is not None
                                          or (isinstance(sur, FixedWall) and sur.steam_pressure_Pa is not None)):
            return "it has no steam tracer and no steam-heated wall"
        if k == "medium_temperature" and not (isinstance(sur, Jacket)
                                              or (isinstance(sur, FixedWall) and sur.wall_temperature_K is not None)):
            return "it has no jacket and no wall held at a temperature"
        return ""

    # ------------------------------------------------------------------ words

    def label(self, alt: Alternative) -> str:
        """Plain words: "Heater output, segments 2–3 (Pipe rack east, Road crossing)"."""
        words = PARAMETER_KINDS[self.kind]
        if not self.on_segments:
            return words
        try:
            group = self.segment_indices(alt)
        except InputError:
            group = list(self.segments)
        if not group:
            return words
        if len(group) == len(alt.segments) and len(group) > 1:
            return f"{words}, all {len(group)} segments"
        names = [alt.segments[i].name for i in group if i < len(alt.segments)]
        if len(group) == 1:
            return f"{words}, segment {group[0] + 1} ({names[0]})" if names else f"{words}, segment {group[0] + 1}"
        numbers = _number_ranges([i + 1 for i in group])
        shown = ", ".join(names[:4]) + (f" and {len(names) - 4} more" if len(names) > 4 else "")
        return f"{words}, segments {numbers} ({shown})"

    def value_text(self, value, system: str = "SI", formatter: Optional[Formatter] = None) -> str:
        """The value in words: "40 mm", "NPS 2", "25 W/m", "1.2 kg/s". ``formatter(value_si, quantity, system)``
        writes the user's units (the app passes its own); without one, the engineer's SI units."""
        if self.kind == "bore":
            return f"NPS {value}"
        if formatter is not None:
            return formatter(float(value), self.quantity, system)
        return si_text(float(value), self.quantity)

    # ------------------------------------------------------------------ values

    def standard_values(self, alt: Alternative) -> list:
        """The sizes on sale, ascending: insulation thicknesses [m] (:data:`STANDARD_INSULATION_THICKNESSES_M`)
        or NPS sizes (texts) that exist in the schedule of every chosen segment; [] for a continuous kind."""
        if self.kind == "insulation_thickness":
            return list(STANDARD_INSULATION_THICKNESSES_M)
        if self.kind == "bore":
            schedules = {catalogue.normalise_schedule(alt.segments[i].pipe.schedule)
                         for i in self.segment_indices(alt)}
            return [nps for nps in catalogue.nps_sizes()
                    if all(s in catalogue.schedules_for(nps) for s in schedules)]
        return []

    def current_value(self, alt: Alternative):
        """The value as the alternative has it (the first segment of the group); None where it has none
        (a segment without heater or insulation)."""
        k = self.kind
        feed = alt.feed
        if k == "mass_flow":
            return feed.mass_flow_kg_per_s if feed.mass_flow_kg_per_s is not None else _mass_from_volume(alt)
        if k == "volume_flow":
            return feed.volume_flow_m3_per_s if feed.volume_flow_m3_per_s is not None else _volume_from_mass(alt)
        if k == "inlet_temperature":
            return feed.inlet_temperature_K
        seg = alt.segments[self.segment_indices(alt)[0]]
        if k == "heater_output":
            h = seg.heater
            if h is None:
                return None
            return h.output_low_W_per_m if isinstance(h, SelfLimitingHeater) else h.output_W_per_m
        if k == "insulation_thickness":
            i = _insulation_index(seg)
            return None if i is None else seg.insulation[i].thickness_m
        if k == "bore":
            return catalogue.normalise_nps(seg.pipe.nps)
        if k == "steam_pressure":
            if seg.steam_tracer is not None:
                return seg.steam_tracer.steam_pressure_Pa
            return seg.surroundings.steam_pressure_Pa
        if k == "medium_temperature":
            sur = seg.surroundings
            return sur.medium_temperature_K if isinstance(sur, Jacket) else sur.wall_temperature_K
        return seg.length_m  # segment_length

    def default_range(self, alt: Alternative) -> tuple[float, float]:
        """A sensible search or sweep range [SI]. Discrete kinds: insulation, the thinnest and thickest on the
        list; a bore, whose sizes are NPS texts, the first and last index into :meth:`standard_values`.

        heater output 0 to max(80 W/m, 2 × now) (a self-limiting heater from 1 W/m: its straight line needs an
        output); flows ¼ to 4 × now; inlet and medium temperature now ∓ 50 K; steam 1.5 to 20 bar(a) widened
        to hold the value now; a segment length 0.1 to 3 × now. Every range is clipped to the model's bounds.
        """
        k = self.kind
        if k == "insulation_thickness":
            return (STANDARD_INSULATION_THICKNESSES_M[0], STANDARD_INSULATION_THICKNESSES_M[-1])
        if k == "bore":
            return (0.0, float(len(self.standard_values(alt)) - 1))
        now = self.current_value(alt)
        if k == "heater_output":
            group = [alt.segments[i] for i in self.segment_indices(alt)]
            selflim = any(isinstance(s.heater, SelfLimitingHeater) for s in group)
            runs = max((s.heater.runs_per_pipe_metre if s.heater is not None else 1.0) for s in group)
            lo, hi = (1.0 if selflim else 0.0), max(80.0, 2.0 * (now or 0.0))
            hi = min(hi, 1e4 / runs)
        elif k in ("mass_flow", "volume_flow"):
            lo, hi = now / 4.0, now * 4.0
        elif k in ("inlet_temperature", "medium_temperature"):
            lo, hi = now - 50.0, now + 50.0
            if k == "inlet_temperature" and isinstance(alt.fluid, m.TableFluid):
                lo = max(lo, alt.fluid.rows[0].temperature_K)
                hi = min(hi, alt.fluid.rows[-1].temperature_K)
        elif k == "steam_pressure":
            lo, hi = min(1.5e5, now), max(2.0e6, now)
        else:  # segment_length
            seg = alt.segments[self.segments[0]]
            lo, hi = max(0.1 * now, abs(seg.elevation_change_m)), 3.0 * now
        low, high = model_bounds(k)
        return (max(lo, low), min(hi, high))

    # ------------------------------------------------------------------ apply

    def apply(self, alt: Alternative, value) -> Alternative:
        """A new alternative with ``value`` set (``alt`` is not changed). Raises InputError naming the parameter
        and the value when the model refuses it (outside its bounds, or a rule such as the elevation change
        not exceeding the length).

        * heater_output [W/m, per metre of heater]: a constant or thermostat heater's output; a self-limiting
          heater's two rating points are scaled by the same factor so that its rated output (the output at
          its first rating point, ``temperature_low_K``, where it gives the most: what the model calls the
          rated output, ``Segment.heat_input_W_per_m``) equals the value, the slope following; a segment
          without a heater gets a :class:`~solver.model.ConstantHeater` (one straight run).
        * insulation_thickness [m]: the outermost insulating layer (a cladding layer, conductivity 1 W/(m·K)
          or more, is skipped); a segment with no insulation gets one layer, a copy of the first insulated
          segment's, or mineral wool with the catalogue's k(T) when no segment has any.
        * mass_flow / volume_flow [kg/s, m³/s]: the feed's flow; the other one is cleared.
        * bore [NPS text]: each chosen segment's NPS, its schedule kept.
        * inlet_temperature [K]: the feed's inlet temperature.
        * steam_pressure [Pa absolute]: steam tracers and steam-heated walls of the chosen segments.
        * medium_temperature [K]: jackets' medium temperature and walls held at a temperature.
        * segment_length [m]: the one segment's length.
        """
        k = self.kind
        if k == "bore":
            try:
                nps = _nps_text(value)
            except InputError as exc:
                raise InputError("bore", value, exc.reason) from None
            number = nps
        else:
            number = _number(k, value)
        if k in _FEED_KINDS:
            update = {"mass_flow": {"mass_flow_kg_per_s": number, "volume_flow_m3_per_s": None},
                      "volume_flow": {"volume_flow_m3_per_s": number, "mass_flow_kg_per_s": None},
                      "inlet_temperature": {"inlet_temperature_K": number}}[k]
            feed = _validated(k, value, lambda: Feed.model_validate({**_fields(alt.feed), **update}))
            return alt.model_copy(update={"feed": feed})
        group = self.segment_indices(alt)
        segments = list(alt.segments)
        template = _insulation_template(alt) if k == "insulation_thickness" else None
        for i in group:
            segments[i] = _validated(k, value, lambda seg=segments[i]: self._segment_with(seg, number, template))
        return alt.model_copy(update={"segments": segments})

    def _segment_with(self, seg: Segment, value, template: Optional[Layer]) -> Segment:
        k = self.kind
        update: dict = {}
        if k == "heater_output":
            h = seg.heater
            if h is None:
                update["heater"] = ConstantHeater(output_W_per_m=value)
            elif isinstance(h, SelfLimitingHeater):
                if value <= 0.0:
                    raise InputError(k, value, "a self-limiting heater needs an output above 0 W/m (its straight "
                                               "line falls from it)")
                factor = value / h.output_low_W_per_m
                update["heater"] = SelfLimitingHeater.model_validate(
                    {**_fields(h), "output_low_W_per_m": value,
                     "output_high_W_per_m": h.output_high_W_per_m * factor})
            else:
                update["heater"] = type(h).model_validate({**_fields(h), "output_W_per_m": value})
        elif k == "insulation_thickness":
            layers = list(seg.insulation)
            i = _insulation_index(seg)
            if i is None:
                layers = [Layer.model_validate({**_fields(template), "thickness_m": value})]
            else:
                layers[i] = Layer.model_validate({**_fields(layers[i]), "thickness_m": value})
            update["insulation"] = layers
        elif k == "bore":
            pipe = seg.pipe
            update["pipe"] = Pipe.model_validate({**_fields(pipe), "nps": value})
        elif k == "steam_pressure":
            if seg.steam_tracer is not None:
                update["steam_tracer"] = m.SteamTracer.model_validate(
                    {**_fields(seg.steam_tracer), "steam_pressure_Pa": value})
            sur = seg.surroundings
            if isinstance(sur, FixedWall) and sur.steam_pressure_Pa is not None:
                update["surroundings"] = FixedWall.model_validate({**_fields(sur), "steam_pressure_Pa": value})
        elif k == "medium_temperature":
            sur = seg.surroundings
            key = "medium_temperature_K" if isinstance(sur, Jacket) else "wall_temperature_K"
            update["surroundings"] = type(sur).model_validate({**_fields(sur), key: value})
        elif k == "segment_length":
            update["length_m"] = value
        return Segment.model_validate({**_fields(seg), **update})

    # ------------------------------------------------------------------ records

    def to_dict(self) -> dict:
        """{"kind": ..., "segments": [0-based indices]} (for the provenance record and the CLI)."""
        return {"kind": self.kind, "segments": list(self.segments)}

    @classmethod
    def from_dict(cls, d: dict) -> "Parameter":
        if not isinstance(d, dict) or "kind" not in d:
            raise InputError("parameter", d, "must be a dict with a 'kind'")
        return cls(kind=d["kind"], segments=tuple(d.get("segments") or ()))


def _number_ranges(numbers: list[int]) -> str:
    """[2, 3, 4, 7] -> "2–4, 7"."""
    parts, start = [], None
    for j, n in enumerate(numbers):
        if start is None:
            start = n
        if j + 1 == len(numbers) or numbers[j + 1] != n + 1:
            parts.append(f"{start}" if start == n else f"{start}–{n}")
            start = None
    return ", ".join(parts)


def _insulation_template(alt: Alternative) -> Layer:
    for seg in alt.segments:
        i = _insulation_index(seg)
        if i is not None:
            return seg.insulation[i]
    return Layer(material="mineral wool", thickness_m=0.05)  # the catalogue's k(T) (conductivity None)


def _inlet_density(alt: Alternative) -> float:
    from solver.properties import fluid_model

    feed = alt.feed
    return float(fluid_model(alt.fluid).props(feed.inlet_temperature_K, feed.inlet_pressure_Pa).rho)


def _mass_from_volume(alt: Alternative) -> float:
    return alt.feed.volume_flow_m3_per_s * _inlet_density(alt)


def _volume_from_mass(alt: Alternative) -> float:
    return alt.feed.mass_flow_kg_per_s / _inlet_density(alt)


# --------------------------------------------------------------------------- the command-line form


def parse_parameter(text: str, alt: Alternative) -> Parameter:
    """A parameter from its command-line form: ``"heater_output"``, ``"heater_output:2-3"``,
    ``"insulation_thickness:all"``, ``"segment_length:Road crossing"``, ``"bore:1,3"``. Segments by
    1-based number, range or name; ``all`` (or nothing) = every segment where it applies."""
    kind, _, spec = str(text).partition(":")
    kind = kind.strip().replace("-", "_").replace(" ", "_").lower()
    if kind not in PARAMETER_KINDS:
        raise InputError("parameter", text, f"unknown parameter; known: {', '.join(PARAMETER_KINDS)}")
    spec = spec.strip()
    if not spec or spec.lower() == "all":
        if kind == "segment_length":
            raise InputError("parameter", text, "segment_length needs one segment, e.g. segment_length:2 or "
                                                "segment_length:Road crossing")
        return Parameter(kind)
    names = {s.name.strip().lower(): i for i, s in enumerate(alt.segments)}
    n = len(alt.segments)
    indices: list[int] = []
    if spec.strip().lower() in names:  # a name may hold a comma or a dash
        indices = [names[spec.strip().lower()]]
    else:
        for part in spec.split(","):
            part = part.strip()
            rng = re.fullmatch(r"(\d+)\s*[-–]\s*(\d+)", part)
            if rng:
                a, b = int(rng.group(1)), int(rng.group(2))
                if not (1 <= a <= b <= n):
                    raise InputError("parameter", text, f"segments {part} are not within 1 to {n}")
                indices.extend(range(a - 1, b))
            elif part.isdigit():
                if not 1 <= int(part) <= n:
                    raise InputError("parameter", text, f"segment {part} is not within 1 to {n}")
                indices.append(int(part) - 1)
            elif part.lower() in names:
                indices.append(names[part.lower()])
            else:
                listed = ", ".join(f"{i + 1} {s.name}" for i, s in enumerate(alt.segments))
                raise InputError("parameter", text, f"no segment named or numbered {part!r}; segments: {listed}")
    return Parameter(kind, tuple(indices))


# --------------------------------------------------------------------------- many variants


@dataclass
class Variant:
    """One value of a parameter (and of a second one, in a grid), the alternative it gives (None when the
    model refused the value: the outcome then carries that InputError) and its solve's outcome."""

    value: object
    alternative: Optional[Alternative]
    outcome: BatchOutcome
    value2: object = None

    @property
    def ok(self) -> bool:
        return self.outcome.ok

    @property
    def key_figures(self) -> Optional[dict]:
        return self.outcome.key_figures


def make_variants(alt: Alternative, parameter: Parameter, values: Sequence, parameter2: Optional[Parameter] = None,
                  values2: Optional[Sequence] = None) -> list[tuple]:
    """(value, value2, alternative or the InputError refusing it) for each value (each pair in a grid,
    the first parameter outer)."""
    pairs = [(v, None) for v in values] if parameter2 is None else [(v, w) for v in values for w in (values2 or ())]
    out = []
    for v, w in pairs:
        try:
            new = parameter.apply(alt, v)
            if parameter2 is not None:
                new = parameter2.apply(new, w)
            out.append((v, w, new))
        except InputError as exc:
            out.append((v, w, exc))
    return out


def solve_prepared(prepared: list[tuple], *, profiles: bool = False, design: Optional[DesignCases] = None,
                   progress: Optional[Callable[[int, int], None]] = None,
                   cancelled: Optional[Callable[[], bool]] = None) -> list[Variant]:
    """Solve prepared variants (from :func:`make_variants`) with one :func:`solve_batch` call."""
    good = [p[2] for p in prepared if isinstance(p[2], Alternative)]
    outcomes = solve_batch(good, profiles=profiles, design=design, progress=progress, cancelled=cancelled)
    out: list[Variant] = []
    it = iter(outcomes)
    for v, w, new in prepared:
        if isinstance(new, Alternative):
            outcome = next(it, None)
            if outcome is None:  # cancelled: the rest was not reached
                break
            out.append(Variant(v, new, outcome, w))
        else:
            out.append(Variant(v, None, BatchOutcome(error=new), w))
    return out


def solve_variants(alt: Alternative, parameter: Parameter, values: Sequence, *, profiles: bool = False,
                   design: Optional[DesignCases] = None, progress: Optional[Callable[[int, int], None]] = None,
                   cancelled: Optional[Callable[[], bool]] = None) -> list[Variant]:
    """Apply each value to ``alt`` and solve all the variants with one :func:`solver.batch.solve_batch` call.

    A value the model refuses gives a Variant with ``alternative`` None and the InputError as its outcome's
    error; the others are solved. Cancelled: the list stops at the last variant solved.
    """
    return solve_prepared(make_variants(alt, parameter, values), profiles=profiles, design=design,
                          progress=progress, cancelled=cancelled)
