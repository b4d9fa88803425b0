"""Hypothesis strategies for VALID Calorun projects, extremes included.

Shared by the solver fuzz (tests/test_fuzz_solver.py, scripts/fuzz_solver.py), the history test
(tests/test_history_independence.py) and the offscreen-app fuzz. "Valid" means the project passes
``Project.model_validate``; the solver may still refuse it with a located CalorunError.

Numeric ranges are read from the model itself: the ``Ge/Gt/Le/Lt`` metadata pydantic keeps for each
field (``Model.model_fields[name]``, also inside ``Optional[Annotated[...]]``). A bound added to
``solver/model.py`` therefore moves the generated extremes with it; a field with no upper bound is
drawn up to the largest finite float, because the model allows it.

Each project draws a *wildness* (0, 5 or 30 % per number): a draw is either a typical value for a
process line (ranges below: common practice for heated and cooled process lines, ours) or an
extreme of what the model allows (its bounds, the next float inside an open bound, a log-uniform
draw over the whole range, or hypothesis' own boundary-biased float). Numbers of one project are
therefore mostly plausible, so the solver gets far enough to meet the odd extreme.

Public strategies: :func:`projects` (validated ``Project``), :func:`project_dicts` (its JSON form),
:func:`alternatives`, :func:`segments`, :func:`fluids`, :func:`surroundings`; helper
:func:`field_bounds`.
"""

from __future__ import annotations

import math
import sys
import typing
from dataclasses import dataclass
from functools import lru_cache
from typing import Optional

import annotated_types as at
from hypothesis import assume
from hypothesis import strategies as st
from pydantic import ValidationError

from solver import catalogue
from solver.fittings import FITTINGS
from solver.model import (
    Alternative,
    Buried,
    ConstantHeater,
    DesignCases,
    HeatSink,
    SelfLimitingHeater,
    ThermostatHeater,
    Feed,
    Fitting,
    FixedWall,
    Jacket,
    Layer,
    Limits,
    Pipe,
    Project,
    Segment,
    SolutionFluid,
    SteamTracer,
    StillAir,
    TableFluid,
    TableRow,
    Targets,
    Wind,
)
from solver.catalogue import SOLUTIONS
from solver.properties import PURE_FLUIDS

BIGGEST = sys.float_info.max  # what an unbounded float field allows


# --------------------------------------------------------------------------- bounds from the model


@dataclass(frozen=True)
class Bounds:
    """A field's numeric range as the model states it (inclusive flags per end)."""

    lo: float
    lo_open: bool
    hi: float
    hi_open: bool

    def smallest(self) -> float:
        return math.nextafter(self.lo, math.inf) if self.lo_open else self.lo

    def largest(self) -> float:
        return math.nextafter(self.hi, -math.inf) if self.hi_open else self.hi

    def clip(self, a: float, b: float) -> tuple[float, float]:
        """A typical range [a, b] cut to the allowed range (the model wins where they differ)."""
        lo, hi = self.smallest(), self.largest()
        a, b = min(max(a, lo), hi), max(min(b, hi), lo)
        return (a, b) if a <= b else (lo, lo)


def _collect(obj, found: list) -> None:
    """Gather annotated_types constraints from field metadata and (nested) Annotated/Optional types."""
    if isinstance(obj, (at.Ge, at.Gt, at.Le, at.Lt, at.Interval)):
        found.append(obj)
        return
    meta = getattr(obj, "metadata", None)  # a FieldInfo inside Annotated (Field(ge=...))
    if isinstance(meta, list):
        for m in meta:
            _collect(m, found)
    if typing.get_origin(obj) is typing.Annotated:
        for m in obj.__metadata__:
            _collect(m, found)
        _collect(typing.get_args(obj)[0], found)
    elif typing.get_origin(obj) in (typing.Union, getattr(__import__("types"), "UnionType", None)):
        for arg in typing.get_args(obj):
            _collect(arg, found)


@lru_cache(maxsize=None)
def field_bounds(model: type, name: str) -> Bounds:
    """The numeric bounds of ``model.<name>`` from its pydantic metadata; unbounded ends become
    ∓ the largest float."""
    info = model.model_fields[name]
    found: list = []
    for m in info.metadata:
        _collect(m, found)
    _collect(info.annotation, found)
    lo, lo_open, hi, hi_open = -BIGGEST, False, BIGGEST, False
    for c in found:
        parts = [c] if not isinstance(c, at.Interval) else [
            at.Gt(c.gt) if c.gt is not None else None, at.Ge(c.ge) if c.ge is not None else None,
            at.Lt(c.lt) if c.lt is not None else None, at.Le(c.le) if c.le is not None else None]
        for p in parts:
            if isinstance(p, at.Gt) and (p.gt > lo or (p.gt == lo and not lo_open)):
                lo, lo_open = float(p.gt), True
            elif isinstance(p, at.Ge) and p.ge > lo:
                lo, lo_open = float(p.ge), False
            elif isinstance(p, at.Lt) and (p.lt < hi or (p.lt == hi and not hi_open)):
                hi, hi_open = float(p.lt), True
            elif isinstance(p, at.Le) and p.le < hi:
                hi, hi_open = float(p.le), False
    return Bounds(lo, lo_open, hi, hi_open)


# --------------------------------------------------------------------------- numbers


@st.composite
def _log_uniform(draw, lo: float, hi: float):
    """Log-uniform in [lo, hi] for positive lo (hits every order of magnitude, not only the top one)."""
    e = draw(st.floats(math.log10(lo), math.log10(hi)))
    try:
        return min(max(10.0 ** e, lo), hi)
    except OverflowError:  # 10**log10(max float) rounds past it
        return hi


# Strategies are built once per distinct range and reused: building one per draw costs hypothesis
# a validation pass each time, which made drawing slower than solving.
@lru_cache(maxsize=None)
def _extreme(b: Bounds) -> st.SearchStrategy[float]:
    lo, hi = b.smallest(), b.largest()
    edges = {lo, hi}
    if b.lo > -BIGGEST:
        edges.add(math.nextafter(lo, math.inf))
    if b.hi < BIGGEST:
        edges.add(math.nextafter(hi, -math.inf))
    edges = sorted(e for e in edges if lo <= e <= hi)
    parts = [st.sampled_from(edges),
             st.floats(min_value=b.lo, max_value=b.hi, exclude_min=b.lo_open and b.lo > -BIGGEST,
                       exclude_max=b.hi_open and b.hi < BIGGEST, allow_nan=False, allow_infinity=False)]
    pos_lo = max(lo, 5e-324)
    if pos_lo < hi and hi > 0:
        parts.append(_log_uniform(max(pos_lo, 1e-300), hi))
    return st.one_of(parts)


@lru_cache(maxsize=4096)
def _typical(b: Bounds, a: float, z: float) -> st.SearchStrategy[float]:
    a, z = b.clip(a, z)
    if a == z:
        return st.just(a)
    if a > 0 and z / a > 20.0:
        return _log_uniform(a, z)
    return st.floats(a, z)


def number(draw, model: type, name: str, typical: tuple[float, float], wild: int) -> float:
    """One value of ``model.<name>``: typical for a process line, or (``wild`` % of the time) an
    extreme the model allows."""
    b = field_bounds(model, name)
    if wild and draw(_PERCENT) < wild:
        return draw(_extreme(b))
    return draw(_typical(b, *typical))


_PERCENT = st.integers(0, 99)


def _optional(draw, chance_pct: int) -> bool:
    return draw(_PERCENT) < chance_pct


# --------------------------------------------------------------------------- names

_SAFE_TEXT = st.text(
    alphabet=st.characters(blacklist_categories=("Cs",)),  # lone surrogates: the model's call (issue 9)
    max_size=40,
)


def _name(draw, default: str, wild: int) -> str:
    if wild and _optional(draw, wild):
        return draw(_SAFE_TEXT)
    return default


# --------------------------------------------------------------------------- fluids

#: Typical feeds per pure fluid: (inlet temperature [K], inlet pressure [Pa]) ranges of single-phase
#: process duties (liquid below its boiling point at that pressure, or gas/vapour well above it;
#: saturation points from CoolProp, checked when these were chosen).
PURE_FEEDS: dict[str, list[tuple[tuple[float, float], tuple[float, float]]]] = {
    "Water": [((280.0, 370.0), (1.2e5, 1.0e6)), ((420.0, 600.0), (1.0e5, 3.0e5))],
    "Air": [((220.0, 500.0), (1.0e5, 3.0e6))],
    "Nitrogen": [((200.0, 500.0), (1.0e5, 3.0e6))],
    "Oxygen": [((200.0, 450.0), (1.0e5, 2.0e6))],
    "CarbonDioxide": [((290.0, 450.0), (1.0e5, 2.0e6))],
    "Methane": [((220.0, 450.0), (1.0e5, 3.0e6))],
    "Ammonia": [((230.0, 290.0), (1.0e6, 2.0e6)), ((300.0, 400.0), (1.0e5, 4.0e5))],
}


@lru_cache(maxsize=None)
def _solution_range(code: str, x: float) -> tuple[float, float]:
    """The temperature range of a solution's data (CoolProp INCOMP, through the solver's model)."""
    from solver.errors import CalorunError
    from solver.properties import fluid_model

    try:
        m = fluid_model(SolutionFluid(solute=code, concentration=x))
    except CalorunError:
        return (273.15, 353.15)
    return (m.T_min_K, m.T_max_K)


@st.composite
def _table_fluid(draw, wild: int):
    n = draw(st.integers(2, 6))
    t0 = number(draw, TableRow, "temperature_K", (220.0, 330.0), wild)
    temps = [t0]
    hi_t = field_bounds(TableRow, "temperature_K").largest()
    for _ in range(n - 1):
        step = number(draw, TableRow, "temperature_K", (5.0, 80.0), wild // 3)
        nxt = temps[-1] + step
        if nxt <= temps[-1] or nxt > hi_t:
            break
        temps.append(nxt)
    assume(len(temps) >= 2)
    rows = []
    for i, t in enumerate(temps):
        rows.append({
            "temperature_K": t,
            "density_kg_per_m3": number(draw, TableRow, "density_kg_per_m3", (700.0, 1200.0), wild),
            "specific_heat_J_per_kgK": number(draw, TableRow, "specific_heat_J_per_kgK", (1500.0, 4200.0), wild),
            # viscosity falls with temperature in a real oil; a table is not required to
            "viscosity_Pa_s": number(draw, TableRow, "viscosity_Pa_s",
                                     (1e-3 * 10 ** (2 - i), 5e-3 * 10 ** (2 - i)), wild),
            "conductivity_W_per_mK": number(draw, TableRow, "conductivity_W_per_mK", (0.1, 0.6), wild),
        })
    fluid = {"kind": "table", "name": _name(draw, "Test product", wild), "rows": rows}
    if _optional(draw, 30):
        fluid["freezing_point_K"] = number(draw, TableFluid, "freezing_point_K", (temps[0] - 20, temps[0]), wild)
    if _optional(draw, 30):
        fluid["boiling_point_K"] = number(draw, TableFluid, "boiling_point_K", (temps[-1], temps[-1] + 50), wild)
    return fluid, (temps[0], temps[-1]), (1.2e5, 1.0e6)


@st.composite
def fluids(draw, wild: int = 0):
    """(fluid dict, typical inlet temperature range [K], typical inlet pressure range [Pa])."""
    kind = draw(st.sampled_from(["pure", "solution", "table"]))
    if kind == "pure":
        name = draw(st.sampled_from(sorted(PURE_FLUIDS)))
        t_rng, p_rng = draw(st.sampled_from(PURE_FEEDS[name]))
        return {"kind": "pure", "name": name}, t_rng, p_rng
    if kind == "solution":
        code = draw(st.sampled_from(sorted(SOLUTIONS)))
        _, _, fmin, fmax = SOLUTIONS[code]
        # the model holds each solute to its own fraction range (SolutionFluid), so the extremes are its ends
        x = draw(st.sampled_from([fmin, fmax]) | st.floats(fmin, fmax))
        x = round(x, 4)  # also keeps the number of distinct property tables (one CoolProp set-up each) small
        lo, hi = _solution_range(code, min(max(x, fmin), fmax))
        return {"kind": "solution", "solute": code, "concentration": x}, (lo + 2.0, hi - 2.0), (1.2e5, 8e5)
    return draw(_table_fluid(wild))


# --------------------------------------------------------------------------- feed


@st.composite
def feeds(draw, t_rng, p_rng, gas_like: bool, wild: int = 0):
    feed = {
        "inlet_temperature_K": number(draw, Feed, "inlet_temperature_K", t_rng, wild),
        "inlet_pressure_Pa": number(draw, Feed, "inlet_pressure_Pa", p_rng, wild),
        "inlet_flow": draw(st.sampled_from(["developing", "developed"])),
    }
    if "phase" in Feed.model_fields and _optional(draw, 30):
        # the phase the feed is meant to enter in; mostly the one its typical state has
        feed["phase"] = draw(st.sampled_from(["gas", "gas", "liquid"] if gas_like else ["liquid", "liquid", "gas"]))
    if _optional(draw, 80):
        typ = (1e-3, 2.0) if gas_like else (0.02, 30.0)
        feed["mass_flow_kg_per_s"] = number(draw, Feed, "mass_flow_kg_per_s", typ, wild)
        feed["volume_flow_m3_per_s"] = None
    else:
        typ = (1e-3, 0.5) if gas_like else (2e-5, 0.05)
        feed["mass_flow_kg_per_s"] = None
        feed["volume_flow_m3_per_s"] = number(draw, Feed, "volume_flow_m3_per_s", typ, wild)
    return feed


# --------------------------------------------------------------------------- segments


@st.composite
def pipes(draw, wild: int = 0):
    material = draw(st.sampled_from(sorted(catalogue.PIPE_MATERIALS)))
    if _optional(draw, 75):
        nps = draw(st.sampled_from(catalogue.nps_sizes()))
        pipe = {"bore": "nps", "nps": nps, "schedule": draw(st.sampled_from(catalogue.schedules_for(nps))),
                "material": material}
    else:
        pipe = {"bore": "diameter", "nps": None, "schedule": None, "material": material,
                "inner_diameter_m": number(draw, Pipe, "inner_diameter_m", (0.005, 0.6), wild),
                "wall_thickness_m": number(draw, Pipe, "wall_thickness_m", (0.0, 0.02), wild)}
    if _optional(draw, 20):
        pipe["roughness_m"] = number(draw, Pipe, "roughness_m", (0.0, 1e-3), wild)
    if _optional(draw, 20):
        pipe["wall_conductivity_W_per_mK"] = number(draw, Pipe, "wall_conductivity_W_per_mK", (0.2, 400.0), wild)
    return pipe


@st.composite
def surroundings(draw, wild: int = 0):
    kind = draw(st.sampled_from(["still_air", "wind", "buried", "jacket", "fixed_wall", "adiabatic"]))
    if kind in ("still_air", "wind"):
        model = StillAir if kind == "still_air" else Wind
        s = {"kind": kind,
             "temperature_K": number(draw, model, "temperature_K", (233.15, 318.15), wild),
             "emissivity": number(draw, model, "emissivity", (0.05, 0.95), wild)}
        if kind == "wind":
            s["wind_speed_m_per_s"] = number(draw, Wind, "wind_speed_m_per_s", (0.3, 25.0), wild)
        if _optional(draw, 25):
            s["relative_humidity"] = number(draw, model, "relative_humidity", (0.1, 1.0), wild)
        if _optional(draw, 15):
            s["film_coefficient_W_per_m2K"] = number(draw, model, "film_coefficient_W_per_m2K", (2.0, 60.0), wild)
        return s
    if kind == "buried":
        return {"kind": kind,
                "soil_temperature_K": number(draw, Buried, "soil_temperature_K", (268.15, 303.15), wild),
                "depth_m": number(draw, Buried, "depth_m", (0.3, 3.0), wild),
                "soil_conductivity_W_per_mK": number(draw, Buried, "soil_conductivity_W_per_mK", (0.3, 2.5), wild)}
    if kind == "jacket":
        return {"kind": kind,
                "medium_temperature_K": number(draw, Jacket, "medium_temperature_K", (275.15, 470.0), wild),
                "film_coefficient_W_per_m2K": number(draw, Jacket, "film_coefficient_W_per_m2K",
                                                     (50.0, 8000.0), wild)}
    if kind == "fixed_wall":
        if _optional(draw, 50):
            return {"kind": kind, "wall_temperature_K": number(draw, FixedWall, "wall_temperature_K",
                                                               (275.15, 500.0), wild),
                    "steam_pressure_Pa": None}
        return {"kind": kind, "wall_temperature_K": None,
                "steam_pressure_Pa": number(draw, FixedWall, "steam_pressure_Pa", (1.2e5, 2.0e6), wild),
                "steam_side_fouling_m2K_per_W": number(draw, FixedWall, "steam_side_fouling_m2K_per_W",
                                                       (0.0, 5e-4), wild)}
    return {"kind": "adiabatic"}


@st.composite
def fittings(draw, wild: int = 0):
    kind = draw(st.sampled_from(sorted(FITTINGS) + ["custom"]))
    f = {"kind": kind, "count": int(number(draw, Fitting, "count", (1, 6), wild)),
         "label": _name(draw, "", wild)}
    if kind == "custom" or _optional(draw, 10):
        f["K"] = number(draw, Fitting, "K", (0.0, 20.0), wild)
    return f


@st.composite
def segments(draw, wild: int = 0, index: int = 0):
    length = number(draw, Segment, "length_m", (0.3, 300.0), wild)
    sur = draw(surroundings(wild))
    seg = {"name": _name(draw, f"S{index + 1}", wild), "length_m": length, "pipe": draw(pipes(wild)),
           "surroundings": sur}
    if _optional(draw, 30):
        frac = draw(st.sampled_from([-1.0, 1.0]) | st.floats(-1.0, 1.0))
        seg["elevation_change_m"] = max(-length, min(length, frac * length))
    seg["fittings"] = draw(st.lists(fittings(wild), max_size=4 if not wild else 6))
    if sur["kind"] != "fixed_wall" and _optional(draw, 35):
        seg["heater"] = draw(heaters(wild))
    if sur["kind"] not in ("fixed_wall", "adiabatic") and _optional(draw, 20):
        seg["heat_sinks"] = draw(st.lists(heat_sinks(wild), min_size=1, max_size=3))
    if _optional(draw, 10):
        seg["design_margin"] = number(draw, Segment, "design_margin", (0.0, 0.3), wild)
    if sur["kind"] not in ("fixed_wall", "jacket") and _optional(draw, 15):
        seg["steam_tracer"] = {
            "steam_pressure_Pa": number(draw, SteamTracer, "steam_pressure_Pa", (1.5e5, 1.2e6), wild),
            "count": int(number(draw, SteamTracer, "count", (1, 3), wild)),
            "tube_outer_diameter_m": number(draw, SteamTracer, "tube_outer_diameter_m", (0.0095, 0.025), wild),
            "contact": draw(st.sampled_from(["bare", "cement"])),
        }
    if _optional(draw, 15):
        seg["inside_fouling_m2K_per_W"] = number(draw, Segment, "inside_fouling_m2K_per_W", (0.0, 5e-4), wild)
    n_layers = draw(st.integers(0, 2 if not wild else 4))
    seg["insulation"] = [
        {"material": draw(st.sampled_from(sorted(catalogue.INSULATION_MATERIALS))),
         "thickness_m": number(draw, Layer, "thickness_m", (0.01, 0.15), wild),
         # about half the layers take the material's k(T) (no conductivity given)
         **({} if _optional(draw, 50) else
            {"conductivity_W_per_mK": number(draw, Layer, "conductivity_W_per_mK", (0.015, 0.12), wild)})}
        for _ in range(n_layers)
    ]
    return seg


@st.composite
def heaters(draw, wild: int = 0):
    """Electric tracing of each kind the model offers, with runs and spiralling now and then."""
    kind = draw(st.sampled_from(["constant", "self_limiting", "thermostat"]))
    heater: dict = {"kind": kind}
    if _optional(draw, 15):
        heater["count"] = int(number(draw, ConstantHeater, "count", (1, 3), wild))
    if _optional(draw, 15):
        heater["heater_per_pipe_length"] = number(draw, ConstantHeater, "heater_per_pipe_length", (1.0, 2.5), wild)
    if kind == "constant":
        heater["output_W_per_m"] = number(draw, ConstantHeater, "output_W_per_m", (1.0, 150.0), wild)
    elif kind == "thermostat":
        heater["output_W_per_m"] = number(draw, ThermostatHeater, "output_W_per_m", (5.0, 150.0), wild)
        heater["set_point_K"] = number(draw, ThermostatHeater, "set_point_K", (275.0, 420.0), wild)
    else:
        t_low = number(draw, SelfLimitingHeater, "temperature_low_K", (270.0, 300.0), wild)
        t_high = number(draw, SelfLimitingHeater, "temperature_high_K", (t_low + 20.0, t_low + 120.0), wild)
        q_low = number(draw, SelfLimitingHeater, "output_low_W_per_m", (10.0, 100.0), wild)
        q_high = number(draw, SelfLimitingHeater, "output_high_W_per_m", (0.0, q_low), wild)
        assume(t_high > t_low and q_high < q_low)
        heater.update(output_low_W_per_m=q_low, temperature_low_K=t_low, output_high_W_per_m=q_high,
                      temperature_high_K=t_high)
    return heater


@st.composite
def heat_sinks(draw, wild: int = 0):
    kind = draw(st.sampled_from(["pipe_support", "valve", "flange_pair", "pump", "instrument", "other"]))
    sink: dict = {"kind": kind, "count": int(number(draw, HeatSink, "count", (1, 12), wild)),
                  "label": _name(draw, "", wild)}
    how = draw(st.sampled_from(["catalogue", "equivalent_length_m", "bare_length_m", "loss_W_per_K"]))
    if kind == "other" and how == "catalogue":
        how = "equivalent_length_m"
    if how == "equivalent_length_m":
        sink[how] = number(draw, HeatSink, how, (0.1, 5.0), wild)
    elif how == "bare_length_m":
        sink[how] = number(draw, HeatSink, how, (0.05, 1.0), wild)
    elif how == "loss_W_per_K":
        sink[how] = number(draw, HeatSink, how, (0.05, 3.0), wild)
    return sink


# --------------------------------------------------------------------------- alternative, project


@st.composite
def alternatives(draw, wild: int = 0, name: str = "Base case", max_segments: Optional[int] = None):
    fluid, t_rng, p_rng = draw(fluids(wild))
    gas_like = fluid["kind"] == "pure" and (fluid["name"] != "Water" or t_rng[0] > 400.0) and \
        not (fluid["name"] == "Ammonia" and t_rng[0] < 300.0)
    top = max_segments or (4 if not wild else 12)
    n = draw(st.integers(1, top) | st.just(1))
    alt = {"name": name, "fluid": fluid, "feed": draw(feeds(t_rng, p_rng, gas_like, wild)),
           "segments": [draw(segments(wild, i)) for i in range(n)]}
    limits = {}
    if _optional(draw, 20):
        limits["max_inner_wall_temperature_K"] = number(draw, Limits, "max_inner_wall_temperature_K",
                                                        (t_rng[1], t_rng[1] + 100.0), wild)
    if _optional(draw, 20):
        limits["min_bulk_temperature_K"] = number(draw, Limits, "min_bulk_temperature_K",
                                                  (t_rng[0] - 20.0, t_rng[0] + 10.0), wild)
    if _optional(draw, 20):
        limits["maintain_temperature_K"] = number(draw, Limits, "maintain_temperature_K",
                                                  (t_rng[0] - 10.0, t_rng[0] + 20.0), wild)
    alt["limits"] = limits
    return alt


WILDNESS = (0, 5, 30)  # per cent of numbers drawn as extremes, per project


@st.composite
def project_dicts(draw, wild: Optional[int] = None, max_alternatives: int = 3, max_segments: Optional[int] = None):
    """A valid project in its JSON form (``Project.model_dump(mode="json")`` of a validated project)."""
    if wild is None:
        wild = draw(st.sampled_from(WILDNESS))
    n_alt = draw(st.integers(1, max_alternatives))
    alts = [draw(alternatives(wild, name=f"Alternative {i + 1}" if i else "Base case", max_segments=max_segments))
            for i in range(n_alt)]
    # schema 1 now and then, so the migration (tracing as heat_input_W_per_m) is fuzzed too
    old_file = all("heater" not in seg or seg["heater"]["kind"] == "constant" and len(seg["heater"]) == 2
                   for alt in alts for seg in alt["segments"]) and _optional(draw, 20)
    if old_file:
        for alt in alts:
            for seg in alt["segments"]:
                seg.pop("heat_sinks", None), seg.pop("design_margin", None)
                for layer in seg["insulation"]:
                    layer.setdefault("conductivity_W_per_mK", 0.04)
                if "heater" in seg:
                    seg["heat_input_W_per_m"] = seg.pop("heater")["output_W_per_m"]
            alt["limits"].pop("maintain_temperature_K", None)
    project = {"format": "calorun-project", "schema_version": 1 if old_file else 2,
               "name": _name(draw, "Fuzz line", wild), "alternatives": alts}
    if not old_file and _optional(draw, 40):
        cases = {}
        for key, typical in (("worst_air_temperature_K", (235.0, 275.0)), ("worst_wind_speed_m_per_s", (2.0, 20.0)),
                             ("hot_air_temperature_K", (295.0, 320.0)), ("design_margin", (0.0, 0.3))):
            if _optional(draw, 50):
                cases[key] = number(draw, DesignCases, key, typical, wild)
        if _optional(draw, 30):
            cases["worst_no_flow"] = draw(st.booleans())
        project["design_cases"] = cases
    targets = {}
    if _optional(draw, 20):
        targets["outlet_temperature_min_K"] = number(draw, Targets, "outlet_temperature_min_K", (250.0, 350.0), wild)
    if _optional(draw, 10):
        targets["outlet_temperature_max_K"] = number(draw, Targets, "outlet_temperature_max_K", (300.0, 450.0), wild)
    if _optional(draw, 10):
        targets["max_inner_wall_temperature_K"] = number(draw, Targets, "max_inner_wall_temperature_K",
                                                         (320.0, 520.0), wild)
    if _optional(draw, 20):
        targets["max_pressure_drop_Pa"] = number(draw, Targets, "max_pressure_drop_Pa", (1e3, 1e6), wild)
    if _optional(draw, 10):
        targets["max_heat_input_W"] = number(draw, Targets, "max_heat_input_W", (10.0, 1e5), wild)
    project["targets"] = targets
    if n_alt > 1 and _optional(draw, 30):
        project["baseline"] = alts[draw(st.integers(0, n_alt - 1))]["name"]
    if old_file:
        from solver.project_io import migrate
        project = migrate(project)
    try:
        validated = Project.model_validate(project)
    except ValidationError:
        # a constraint the strategies do not know (a cross-field rule of the model): not a valid project
        assume(False)
    return validated.model_dump(mode="json")


def projects(wild: Optional[int] = None, max_alternatives: int = 3,
             max_segments: Optional[int] = None) -> st.SearchStrategy[Project]:
    """A validated :class:`Project` (see module docstring for what is drawn)."""
    return project_dicts(wild, max_alternatives, max_segments).map(Project.model_validate)
