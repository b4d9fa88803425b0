"""Units at the edge: display SI values in SI or US customary, parse typed quantities.

No Qt here, so the headless CLI and exports can use it too. Inside the solver and in
the file everything is SI; this module is the only place that knows other units.

Display conversion uses a small table (fast: the GUI formats many numbers per
redraw); parsing uses pint, so people can type ``2 in``, ``150 degF``, ``35 gpm``,
``3 bar(g)``. Gauge pressure is handled here explicitly (pint has no gauge units):
a typed value with ``(g)``/``g`` suffix (``barg``, ``psig``, ``bar(g)``, ``kPa(g)``)
adds standard atmosphere, 101 325 Pa.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache
from typing import Literal

UnitSystem = Literal["SI", "US"]
UNIT_SYSTEMS: tuple[UnitSystem, ...] = ("SI", "US")
STANDARD_ATMOSPHERE_PA = 101_325.0  # by definition (ISO 2533)


@dataclass(frozen=True)
class DisplayUnit:
    """``display = si * scale + offset``; ``label`` is shown; ``pint`` parses it."""

    label: str
    scale: float
    offset: float = 0.0
    pint: str = ""

    def from_si(self, value: float) -> float:
        return value * self.scale + self.offset

    def to_si(self, value: float) -> float:
        return (value - self.offset) / self.scale


_F_PER_K = 1.8
_IN = 0.0254
_FT = 0.3048
_LB = 0.45359237
_BTU = 1055.05585262  # International Table Btu
_PSI = 6894.757293168
_GAL = 3.785411784e-3  # US gallon

# quantity -> (SI unit, US unit). SI here means the engineer's SI (°C, bar, mm).
QUANTITIES: dict[str, tuple[DisplayUnit, DisplayUnit]] = {
    "temperature": (
        DisplayUnit("°C", 1.0, -273.15, "degC"),
        DisplayUnit("°F", _F_PER_K, -459.67, "degF"),
    ),
    "temperature_difference": (
        DisplayUnit("K", 1.0, 0.0, "kelvin"),
        DisplayUnit("°F", _F_PER_K, 0.0, "delta_degF"),
    ),
    "pressure": (  # absolute
        DisplayUnit("bar(a)", 1e-5, 0.0, "bar"),
        DisplayUnit("psia", 1 / _PSI, 0.0, "psi"),
    ),
    "pressure_difference": (
        DisplayUnit("kPa", 1e-3, 0.0, "kPa"),
        DisplayUnit("psi", 1 / _PSI, 0.0, "psi"),
    ),
    "length": (DisplayUnit("m", 1.0, 0.0, "m"), DisplayUnit("ft", 1 / _FT, 0.0, "ft")),
    "elevation": (DisplayUnit("m", 1.0, 0.0, "m"), DisplayUnit("ft", 1 / _FT, 0.0, "ft")),
    "diameter": (DisplayUnit("mm", 1e3, 0.0, "mm"), DisplayUnit("in", 1 / _IN, 0.0, "inch")),
    "thickness": (DisplayUnit("mm", 1e3, 0.0, "mm"), DisplayUnit("in", 1 / _IN, 0.0, "inch")),
    "roughness": (DisplayUnit("mm", 1e3, 0.0, "mm"), DisplayUnit("in", 1 / _IN, 0.0, "inch")),
    "depth": (DisplayUnit("m", 1.0, 0.0, "m"), DisplayUnit("ft", 1 / _FT, 0.0, "ft")),
    "mass_flow": (
        DisplayUnit("kg/h", 3600.0, 0.0, "kg/hour"),
        DisplayUnit("lb/h", 3600.0 / _LB, 0.0, "lb/hour"),
    ),
    "volume_flow": (
        DisplayUnit("m³/h", 3600.0, 0.0, "m**3/hour"),
        DisplayUnit("gpm", 60.0 / _GAL, 0.0, "gallon/minute"),
    ),
    "power": (DisplayUnit("kW", 1e-3, 0.0, "kW"), DisplayUnit("Btu/h", 3600.0 / _BTU, 0.0, "Btu/hour")),
    "power_per_length": (
        DisplayUnit("W/m", 1.0, 0.0, "W/m"),
        DisplayUnit("W/ft", _FT, 0.0, "W/ft"),
    ),
    "heat_flux": (
        DisplayUnit("W/m²", 1.0, 0.0, "W/m**2"),
        DisplayUnit("Btu/(h·ft²)", 3600.0 * _FT**2 / _BTU, 0.0, "Btu/hour/ft**2"),
    ),
    "film_coefficient": (
        DisplayUnit("W/(m²·K)", 1.0, 0.0, "W/m**2/K"),
        DisplayUnit("Btu/(h·ft²·°F)", 3600.0 * _FT**2 / _BTU / _F_PER_K, 0.0, "Btu/hour/ft**2/delta_degF"),
    ),
    "conductivity": (
        DisplayUnit("W/(m·K)", 1.0, 0.0, "W/m/K"),
        DisplayUnit("Btu/(h·ft·°F)", 3600.0 * _FT / _BTU / _F_PER_K, 0.0, "Btu/hour/ft/delta_degF"),
    ),
    "velocity": (DisplayUnit("m/s", 1.0, 0.0, "m/s"), DisplayUnit("ft/s", 1 / _FT, 0.0, "ft/s")),
    "speed": (DisplayUnit("m/s", 1.0, 0.0, "m/s"), DisplayUnit("mph", 3600 / 1609.344, 0.0, "mph")),
    "density": (
        DisplayUnit("kg/m³", 1.0, 0.0, "kg/m**3"),
        DisplayUnit("lb/ft³", _FT**3 / _LB, 0.0, "lb/ft**3"),
    ),
    "specific_heat": (
        DisplayUnit("kJ/(kg·K)", 1e-3, 0.0, "kJ/kg/K"),
        DisplayUnit("Btu/(lb·°F)", _LB / _BTU / _F_PER_K, 0.0, "Btu/lb/delta_degF"),
    ),
    "viscosity": (DisplayUnit("mPa·s", 1e3, 0.0, "mPa*s"), DisplayUnit("cP", 1e3, 0.0, "cP")),
    "time": (DisplayUnit("s", 1.0, 0.0, "s"), DisplayUnit("s", 1.0, 0.0, "s")),
    "energy_per_mass": (
        DisplayUnit("kJ/kg", 1e-3, 0.0, "kJ/kg"),
        DisplayUnit("Btu/lb", _LB / _BTU, 0.0, "Btu/lb"),
    ),
    "dimensionless": (DisplayUnit("", 1.0, 0.0, "dimensionless"), DisplayUnit("", 1.0, 0.0, "dimensionless")),
}

# What each quantity is in SI base units (for pint parsing).
_SI_BASE: dict[str, str] = {
    "temperature": "kelvin",
    "temperature_difference": "kelvin",
    "pressure": "Pa",
    "pressure_difference": "Pa",
    "length": "m",
    "elevation": "m",
    "diameter": "m",
    "thickness": "m",
    "roughness": "m",
    "depth": "m",
    "mass_flow": "kg/s",
    "volume_flow": "m**3/s",
    "power": "W",
    "power_per_length": "W/m",
    "heat_flux": "W/m**2",
    "film_coefficient": "W/m**2/K",
    "conductivity": "W/m/K",
    "velocity": "m/s",
    "speed": "m/s",
    "density": "kg/m**3",
    "specific_heat": "J/kg/K",
    "viscosity": "Pa*s",
    "time": "s",
    "energy_per_mass": "J/kg",
    "dimensionless": "dimensionless",
}


def unit(quantity: str, system: UnitSystem) -> DisplayUnit:
    try:
        si, us = QUANTITIES[quantity]
    except KeyError:
        raise KeyError(f"unknown quantity {quantity!r}") from None
    return us if system == "US" else si


def to_display(value_si: float, quantity: str, system: UnitSystem) -> float:
    return unit(quantity, system).from_si(value_si)


def from_display(value: float, quantity: str, system: UnitSystem) -> float:
    return unit(quantity, system).to_si(value)


def label(quantity: str, system: UnitSystem) -> str:
    return unit(quantity, system).label


def format_value(value_si: float | None, quantity: str, system: UnitSystem, digits: int = 4, with_unit: bool = True) -> str:
    """Format an SI value for display, e.g. ``format_value(353.15, 'temperature', 'SI') -> '80.0 °C'``."""
    if value_si is None or (isinstance(value_si, float) and not math.isfinite(value_si)):
        return "—"
    u = unit(quantity, system)
    v = u.from_si(value_si)
    text = _format_number(v, digits, quantity)
    return f"{text} {u.label}".rstrip() if with_unit and u.label else text


def _format_number(v: float, digits: int, quantity: str) -> str:
    if quantity in ("temperature", "temperature_difference"):
        return f"{v:.1f}"  # engineers read temperatures to 0.1 degree
    if quantity in ("length", "elevation", "depth"):
        # positions and lengths along a line: centimetres are plenty
        return f"{v:,.1f}".replace(",", "\u2009") if abs(v) >= 10 else f"{v:.2f}"
    if v == 0:
        return "0"
    mag = math.floor(math.log10(abs(v)))
    if mag >= 9 or mag < -3:
        return f"{v:.{digits - 1}e}"
    decimals = max(0, digits - 1 - mag)
    return f"{v:,.{decimals}f}".replace(",", "\u2009")


# --------------------------------------------------------------------------- parsing

_GAUGE = re.compile(r"^(?P<num>.*?)\s*(?P<unit>bar|psi|kPa|MPa|Pa)\s*(\(g\)|g)\s*$", re.IGNORECASE)
_ABS = re.compile(r"^(?P<num>.*?)\s*(?P<unit>bar|psi|kPa|MPa|Pa)\s*(\(a\)|a)\s*$", re.IGNORECASE)
_NUMBER = re.compile(r"^\s*[-+]?(\d+(\.\d*)?|\.\d+)([eE][-+]?\d+)?\s*$")
_ALIASES = {
    "°c": "degC",
    "°f": "degF",
    "degc": "degC",
    "degf": "degF",
    "c": "degC",
    "f": "degF",
    "k": "kelvin",
    "gpm": "gallon/minute",
    '"': "inch",
    "in": "inch",
    "m3/h": "m**3/hour",
    "m³/h": "m**3/hour",
    "kg/h": "kg/hour",
    "lb/h": "lb/hour",
    "t/h": "tonne/hour",
    "cp": "cP",
    "mpa·s": "mPa*s",
    "mpa.s": "mPa*s",
}


class UnitParseError(ValueError):
    """A typed quantity that cannot be understood; the message says why."""


@lru_cache(maxsize=1)
def registry():
    """One application-wide pint registry (creation is slow; do it once)."""
    import pint

    reg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    return reg


def parse(text: str, quantity: str, system: UnitSystem, field: str = "value") -> float:
    """Parse a typed quantity into SI.

    A bare number is read in the display unit of ``system``. Raises
    :class:`UnitParseError` naming ``field`` and the text.
    """
    raw = text.strip()
    if not raw:
        raise UnitParseError(f"{field}: a value is required, got an empty entry")
    if _NUMBER.match(raw):
        value = float(raw)
        return from_display(value, quantity, system)

    if quantity in ("pressure",):
        m = _GAUGE.match(raw)
        if m:
            return _parse_with_pint(f"{m.group('num')} {m.group('unit')}", "pressure_difference", field, raw) + STANDARD_ATMOSPHERE_PA
        m = _ABS.match(raw)
        if m:
            raw = f"{m.group('num')} {m.group('unit')}"
    return _parse_with_pint(raw, quantity, field, text)


def _parse_with_pint(raw: str, quantity: str, field: str, original: str) -> float:
    m = re.match(r"^\s*([-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*)$", raw)
    if not m:
        raise UnitParseError(f"{field}: cannot read {original!r} as a number with a unit")
    number = float(m.group(1))
    unit_text = m.group(2).strip()
    unit_text = _ALIASES.get(unit_text.lower(), unit_text)
    if quantity == "temperature_difference" and unit_text in ("degC", "degF"):
        unit_text = "delta_" + unit_text
    reg = registry()
    try:
        q = reg.Quantity(number, unit_text)
        si = q.to(_SI_BASE[quantity]).magnitude
    except Exception as exc:  # pint raises several types; all mean "not this"
        expected = label(quantity, "SI")
        raise UnitParseError(
            f"{field}: cannot read {original!r} as {quantity.replace('_', ' ')} (e.g. '12 {expected}'): {exc}"
        ) from None
    if not math.isfinite(si):
        raise UnitParseError(f"{field}: {original!r} is not a finite number")
    return float(si)


_TOKEN_QUANTITY = {"T": "temperature", "dT": "temperature_difference", "v": "velocity", "q": "power_per_length"}


def check_message(check, system: UnitSystem) -> str:
    """A solver check's message in the chosen unit system (the SI text when it has no template)."""
    if not getattr(check, "template", ""):
        return check.message
    from solver.results import render_message

    def one(kind: str, value: float) -> str:
        quantity = _TOKEN_QUANTITY[kind]
        if quantity == "temperature_difference":
            u = unit(quantity, system)
            return f"{u.from_si(value):g} {u.label}"
        return format_value(value, quantity, system, digits=3)

    return render_message(check.template, one)
