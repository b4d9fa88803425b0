"""Units at the edge: display SI values in SI or US customary, parse typed quantities.

No Qt here, so the headless CLI and exports can use it too. Inside the solver and in
the file everything is SI; this module is the only place that knows other units.

Display conversion uses a small table (fast: the GUI formats many numbers per
redraw); parsing uses pint, so people can type ``2 in``, ``150 degF``, ``35 gpm``,
``3 bar(g)``. Gauge pressure is handled here explicitly (pint has no gauge units):
a typed value with ``(g)``/``g`` suffix (``barg``, ``psig``, ``bar(g)``, ``kPa(g)``)
adds standard atmosphere, 101 325 Pa.

Every table and view writes numbers through :func:`format_value` (one format: thin-space digit
groups, a true minus sign, no exponents, a unit prefix picked from the quantity's ladder).
Messages about entries it cannot read are worded with the field labels of :mod:`app.fields`.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache
from typing import Literal

from app import fields

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
    "fouling_resistance": (  # per unit area of the surface it coats; the inverse of a film coefficient
        DisplayUnit("m²·K/W", 1.0, 0.0, "m**2*K/W"),
        DisplayUnit("h·ft²·°F/Btu", _BTU / (3600.0 * _FT**2) * _F_PER_K, 0.0, "hour*ft**2*delta_degF/Btu"),
    ),
    "conductivity": (
        DisplayUnit("W/(m·K)", 1.0, 0.0, "W/m/K"),
        DisplayUnit("Btu/(h·ft·°F)", 3600.0 * _FT / _BTU / _F_PER_K, 0.0, "Btu/hour/ft/delta_degF"),
    ),
    "conductance": (  # heat lost per kelvin of difference, W/K (a heat sink's loss)
        DisplayUnit("W/K", 1.0, 0.0, "W/K"),
        DisplayUnit("Btu/(h·°F)", 3600.0 / _BTU / _F_PER_K, 0.0, "Btu/hour/delta_degF"),
    ),
    "resistance_per_length": (  # thermal resistance per metre of pipe (ΔT per W/m): the inverse of W/(m·K)
        DisplayUnit("K·m/W", 1.0, 0.0, "K*m/W"),
        DisplayUnit("h·ft·°F/Btu", _BTU / (3600.0 * _FT) * _F_PER_K, 0.0, "hour*ft*delta_degF/Btu"),
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
    "fraction": (DisplayUnit("%", 100.0, 0.0, "percent"), DisplayUnit("%", 100.0, 0.0, "percent")),
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
    "fouling_resistance": "m**2*K/W",
    "conductivity": "W/m/K",
    "resistance_per_length": "K*m/W",
    "conductance": "W/K",
    "velocity": "m/s",
    "speed": "m/s",
    "density": "kg/m**3",
    "specific_heat": "J/kg/K",
    "viscosity": "Pa*s",
    "time": "s",
    "energy_per_mass": "J/kg",
    "dimensionless": "dimensionless",
    "fraction": "dimensionless",
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


# --------------------------------------------------------------------------- the one number format
#
# Every table and view writes numbers the same way: digits grouped in threes with a thin space
# ("14\u2009400"), a true minus sign, no exponents. A value too small or too large for the display
# unit moves along its quantity's ladder of units (kW -> W -> mW, kPa -> Pa); a value below the
# smallest unit worth showing reads "< 1 mW" rather than "1.2e-09 W". CSV files do not use this:
# they keep plain machine-readable numbers.

THIN_SPACE = "\u2009"
NO_BREAK_SPACE = fields.NO_BREAK_SPACE
MINUS = "\u2212"

# Step to a smaller unit below this magnitude, to a larger one at or above the other.
_STEP_DOWN_BELOW = 0.1
_STEP_UP_FROM = 1e5
_MAX_DECIMALS = 9

# quantity -> (SI ladder, US ladder), smallest unit first; each ladder holds the system's own unit.
_LADDERS: dict[str, tuple[tuple[DisplayUnit, ...], tuple[DisplayUnit, ...]]] = {
    "power": (
        (DisplayUnit("mW", 1e3, 0.0, "mW"), DisplayUnit("W", 1.0, 0.0, "W"), QUANTITIES["power"][0],
         DisplayUnit("MW", 1e-6, 0.0, "MW")),
        (QUANTITIES["power"][1],),
    ),
    "pressure_difference": (
        (DisplayUnit("Pa", 1.0, 0.0, "Pa"), QUANTITIES["pressure_difference"][0], DisplayUnit("MPa", 1e-6, 0.0, "MPa")),
        (QUANTITIES["pressure_difference"][1],),
    ),
    "pressure": (
        (DisplayUnit("mbar(a)", 1e-2, 0.0, "mbar"), QUANTITIES["pressure"][0]),
        (QUANTITIES["pressure"][1],),
    ),
    "mass_flow": (
        (QUANTITIES["mass_flow"][0], DisplayUnit("t/h", 3.6, 0.0, "tonne/hour")),
        (QUANTITIES["mass_flow"][1],),
    ),
    "volume_flow": (
        (DisplayUnit("L/h", 3.6e6, 0.0, "L/hour"), QUANTITIES["volume_flow"][0]),
        (QUANTITIES["volume_flow"][1],),
    ),
    "heat_flux": (
        (QUANTITIES["heat_flux"][0], DisplayUnit("kW/m²", 1e-3, 0.0, "kW/m**2")),
        (QUANTITIES["heat_flux"][1],),
    ),
    "time": (
        (QUANTITIES["time"][0], DisplayUnit("h", 1 / 3600, 0.0, "hour")),
        (QUANTITIES["time"][1], DisplayUnit("h", 1 / 3600, 0.0, "hour")),
    ),
}

# The smallest magnitude worth showing, in the smallest unit of the ladder (default 0.001 of it).
# Below it a value reads "< floor unit": round-off, not a result.
_FLOORS: dict[tuple[str, UnitSystem], float] = {
    ("power", "SI"): 1.0,  # 1 mW
    ("roughness", "SI"): 1e-4,  # 0.1 µm: smoother than any pipe
    ("roughness", "US"): 1e-6,
    ("diameter", "US"): 1e-4,
    ("thickness", "US"): 1e-4,
    ("dimensionless", "SI"): 1e-4,
    ("dimensionless", "US"): 1e-4,
    ("viscosity", "SI"): 1e-4,
    ("viscosity", "US"): 1e-4,
    ("fouling_resistance", "SI"): 1e-6,  # typical values are 0.0001–0.001 m²·K/W
    ("fouling_resistance", "US"): 1e-5,
}
_DEFAULT_FLOOR = 1e-3

# Read to a fixed resolution rather than significant digits (and never moved along a ladder).
_FIXED_DECIMALS = {"temperature": 1, "temperature_difference": 1}
_POSITIONS = ("length", "elevation", "depth")  # centimetres below 10 m, decimetres above


def ladder(quantity: str, system: UnitSystem) -> tuple[DisplayUnit, ...]:
    """The display units ``quantity`` may be shown in, smallest first (the system's unit among them)."""
    pair = _LADDERS.get(quantity)
    if pair is None:
        return (unit(quantity, system),)
    return pair[1] if system == "US" else pair[0]


def pick_unit(value_si: float | None, quantity: str, system: UnitSystem) -> DisplayUnit:
    """The unit of the ladder that shows ``value_si`` without a string of zeros.

    The system's own unit unless the value is below 0.1 of it (then smaller units) or at least
    100 000 of it (then larger units). Temperatures and lengths keep their unit.
    """
    steps = ladder(quantity, system)
    default = unit(quantity, system)
    if len(steps) == 1 or value_si is None or not math.isfinite(value_si) or value_si == 0:
        return default
    i = steps.index(default)
    magnitude = abs(float(value_si))
    while i > 0 and magnitude * steps[i].scale < _STEP_DOWN_BELOW:
        i -= 1
    while i < len(steps) - 1 and magnitude * steps[i].scale >= _STEP_UP_FROM:
        i += 1
    return steps[i]


def display_unit_for(values_si, quantity: str, system: UnitSystem) -> DisplayUnit:
    """One unit for several values shown together (a row, a column, a range): the one that suits the largest."""
    finite = [abs(float(v)) for v in values_si if v is not None and math.isfinite(v)]
    return pick_unit(max(finite) if finite else None, quantity, system)


def format_value(value_si: float | None, quantity: str, system: UnitSystem, digits: int = 4,
                 with_unit: bool = True, display_unit: DisplayUnit | None = None) -> str:
    """An SI value in the one number format, e.g. ``format_value(353.15, 'temperature', 'SI') -> '80.0 °C'``.

    ``digits`` significant digits (whole numbers keep all their digits), grouped with thin
    spaces, never an exponent. With the unit, the value may move along its quantity's
    :func:`ladder` (``'21.86 mPa'`` is not used; ``0.02186 Pa`` is); ``with_unit=False`` keeps
    the system's unit, because the caller states it (a column header). ``display_unit`` forces a
    unit, e.g. one chosen by :func:`display_unit_for` for a whole row.
    """
    if value_si is None:
        return "—"
    try:
        value_si = float(value_si)
    except (TypeError, ValueError):
        return "—"
    if not math.isfinite(value_si):
        return "—"
    if display_unit is not None:
        u = display_unit
    elif with_unit and quantity not in _FIXED_DECIMALS and quantity not in _POSITIONS:
        u = pick_unit(value_si, quantity, system)
    else:
        u = unit(quantity, system)
    v = u.from_si(value_si)
    if not math.isfinite(v):  # a finite value that overflows in the display unit (1e308 m in mm)
        text = _power_of_ten(math.log10(abs(value_si)) + math.log10(u.scale), value_si < 0, digits)
    elif quantity in _FIXED_DECIMALS:
        text = format_number(v, decimals=_FIXED_DECIMALS[quantity])
    elif quantity in _POSITIONS:
        text = format_number(v, decimals=1 if abs(v) >= 10 else 2)
    else:
        steps = ladder(quantity, system)
        floor = _FLOORS.get((quantity, system), _DEFAULT_FLOOR) if u == steps[0] and with_unit else None
        text = format_number(v, digits=digits, floor=floor)
    return f"{text} {u.label}" if with_unit and u.label else text


def format_range(low_si: float | None, high_si: float | None, quantity: str, system: UnitSystem,
                 digits: int = 4) -> str:
    """``'0.52 – 1.31 m/s'``: both ends in one unit, stated once."""
    u = display_unit_for([low_si, high_si], quantity, system)
    low = format_value(low_si, quantity, system, digits, with_unit=False, display_unit=u)
    high = format_value(high_si, quantity, system, digits, display_unit=u)
    return f"{low} – {high}"


def format_number(v: float, digits: int = 4, decimals: int | None = None, floor: float | None = None) -> str:
    """A plain number in the one format: ``digits`` significant digits or fixed ``decimals``.

    Thin-space groups of three in the whole part, a true minus sign, no exponent, no "−0".
    A non-zero magnitude below ``floor`` reads ``'< floor'``.
    """
    if not math.isfinite(v):
        return "—"
    a = abs(v)
    if a >= _PLAIN_UP_TO:
        return _power_of_ten(math.log10(a), v < 0, digits)
    if floor is not None and 0 < a < floor:
        return "< " + _group(_trim(f"{floor:.{_MAX_DECIMALS}f}"))
    if decimals is None:
        if a == 0:
            return "0"
        magnitude = math.floor(math.log10(a))
        decimals = min(max(0, digits - 1 - magnitude), _MAX_DECIMALS)
    text = f"{a:.{decimals}f}"
    if float(text) == 0:
        return text if decimals else "0"  # no "−0.0"
    return (MINUS if v < 0 else "") + _group(text)


_PLAIN_UP_TO = 1e15  # from here on a magnitude reads as a power of ten: 16+ digits say nothing to a reader
_SUPERSCRIPT = str.maketrans("-0123456789", "⁻⁰¹²³⁴⁵⁶⁷⁸⁹")


def _power_of_ten(log10_magnitude: float, negative: bool, digits: int = 4) -> str:
    """``'1.7 × 10³⁰⁸'`` from a magnitude's base-10 logarithm: for magnitudes plain digits cannot
    show (far beyond any line, or overflowing in the display unit). Never an "e" exponent."""
    exponent = math.floor(log10_magnitude)
    text = _trim(f"{10 ** (log10_magnitude - exponent):.{max(0, digits - 1)}f}")
    if float(text) >= 10:  # the mantissa rounded up to 10
        exponent += 1
        text = "1"
    return (MINUS if negative else "") + f"{text} × 10" + str(exponent).translate(_SUPERSCRIPT)


def _group(text: str) -> str:
    whole, dot, frac = text.partition(".")
    if len(whole) > 3:
        whole = f"{int(whole):,}".replace(",", THIN_SPACE)
    return whole + dot + frac


def _trim(text: str) -> str:
    return text.rstrip("0").rstrip(".") if "." in text else text


def search_words(value_si: float, quantity: str, system: UnitSystem) -> str:
    """A value in the Target Finder's and Sweep's words (the formatter they take): a time in hours, a
    thickness as a size is written ("100 mm", not "100.0 mm"), anything else as :func:`format_value`."""
    if quantity == "time":
        return f"{format_number(float(value_si) / 3600.0, digits=3)} h"
    if not quantity:
        return str(value_si)
    text = format_value(value_si, quantity, system)
    if quantity != "thickness":
        return text
    number, sep, rest = text.partition(" ")
    return _trim(number) + sep + rest


def format_exact(value_si: float, quantity: str, system: UnitSystem, digits: int = 5) -> str:
    """A value as a person would type it: up to ``digits`` significant digits, no trailing zeros.

    For limits and entries quoted in messages ("more than 0 m; you entered −5 m"), in the
    system's own unit (the one the field is typed in), joined to it by a no-break space.
    """
    u = unit(quantity, system)
    v = u.from_si(float(value_si))
    if abs(v) < 1e-12 and (u.offset or v == 0):  # round-off of an offset unit (°F) is nought
        v = 0.0
    tiny = not u.offset and value_si != 0 and abs(v) < 10.0 ** -_MAX_DECIMALS  # (an offset unit's never is)
    if not math.isfinite(v) or abs(v) >= _PLAIN_UP_TO or tiny:
        # quoted as entered, however far out: 1e308 m in inches overflows, 1e-300 m is not "0"
        text = _power_of_ten(math.log10(abs(value_si)) + math.log10(u.scale), float(value_si) < 0, digits)
    elif v == 0:
        text = "0"
    else:
        magnitude = math.floor(math.log10(abs(v)))
        text = _trim(f"{abs(v):.{min(max(0, digits - 1 - magnitude), _MAX_DECIMALS)}f}")
        text = (MINUS if v < 0 and text != "0" else "") + _group(text)
    return f"{text}{NO_BREAK_SPACE}{u.label}" if u.label else text  # a wrapped message keeps "−5 m" whole


# --------------------------------------------------------------------------- parsing

_GAUGE = re.compile(r"^(?P<num>.*?)\s*(?P<unit>mbar|bar|psi|kPa|MPa|Pa)\s*(\(g\)|g)\s*$", re.IGNORECASE)
_ABS = re.compile(r"^(?P<num>.*?)\s*(?P<unit>mbar|bar|psi|kPa|MPa|Pa)\s*(\(a\)|a)\s*$", re.IGNORECASE)
_NUMBER = re.compile(r"^\s*[-+]?(\d+(\.\d*)?|\.\d+)([eE][-+]?\d+)?\s*$")
_LEADING_NUMBER = re.compile(r"^\s*([-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*)$")
_DIGIT_GROUP = re.compile(r"(?<=\d)[ \u2009\u202f\u00a0](?=\d{3}(?!\d))")
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
    "%": "percent",
    "mil": "thou",  # a thousandth of an inch (pint's "mil" is an angle)
    "mils": "thou",
}


class UnitParseError(ValueError):
    """A typed quantity that cannot be understood; the message says why in the user's words.

    ``reason`` is ``"empty"``, ``"unreadable"`` (no number first), ``"unknown_unit"``,
    ``"wrong_kind"`` (a unit of another kind of quantity: ``typed_kind`` names it, e.g.
    ``"volume_flow"`` for ``35 gpm`` typed as a mass flow) or ``"not_finite"``. ``field`` and
    ``text`` are what :func:`parse` was given; ``quantity`` is the quantity the field holds.
    """

    def __init__(self, message: str, *, field: str = "", text: str = "", quantity: str = "",
                 reason: str = "", typed_kind: str = "", unit_text: str = ""):
        super().__init__(message)
        self.field = field
        self.text = text
        self.quantity = quantity
        self.reason = reason
        self.typed_kind = typed_kind
        self.unit_text = unit_text


@lru_cache(maxsize=1)
def registry():
    """One application-wide pint registry (creation is slow; do it once)."""
    import pint

    reg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    return reg


def _plain_text(text: str) -> str:
    """Typed text in a form the parser reads: the true minus, grouped digits, display-unit symbols."""
    text = text.strip().replace(MINUS, "-")
    text = _DIGIT_GROUP.sub("", text)
    return text


def _pint_unit_text(unit_text: str, quantity: str) -> str:
    """A typed unit in pint's spelling; display labels such as ``W/(m²·K)`` read as written."""
    unit_text = _ALIASES.get(unit_text.lower(), unit_text)
    if quantity == "temperature_difference" and unit_text in ("degC", "degF"):
        return "delta_" + unit_text
    compound = any(ch in unit_text for ch in "/*·()") or unit_text.startswith("Btu")
    unit_text = unit_text.replace("·", "*").replace("²", "**2").replace("³", "**3").replace("µ", "u")
    if compound:  # a degree inside a compound unit is a temperature difference
        unit_text = re.sub(r"°\s*([CF])", r"delta_deg\1", unit_text)
    return unit_text.replace("°C", "degC").replace("°F", "degF")


def parse(text: str, quantity: str, system: UnitSystem, field: str = "value") -> float:
    """Parse a typed quantity into SI.

    A bare number is read in the display unit of ``system``; a number with a unit is read in
    that unit (``2 in``, ``150 degF``, ``35 gpm``, ``3 bar(g)``, and every display label, e.g.
    ``0.04 W/(m·K)``); thin-space digit groups and the true minus sign are read too. Raises
    :class:`UnitParseError` whose message names the field by its label (``field`` may be a model
    path such as ``feed.mass_flow_kg_per_s``) and says in plain words what is wrong, e.g.
    ``"Mass flow: 35 gpm is a volume flow — choose Volume flow, or give a mass flow such as
    1200 kg/h"``. Never a unit library's own wording.
    """
    raw = _plain_text(text)
    info = dict(field=field, text=text, quantity=quantity)
    if not raw:
        raise UnitParseError(fields.value_required(field, quantity, system), reason="empty", **info)
    if _NUMBER.match(raw):
        return from_display(float(raw), quantity, system)

    if quantity in ("pressure",):
        m = _GAUGE.match(raw)
        if m:
            return _parse_with_pint(f"{m.group('num')} {m.group('unit')}", "pressure_difference", system, info) \
                + STANDARD_ATMOSPHERE_PA
        m = _ABS.match(raw)
        if m:
            raw = f"{m.group('num')} {m.group('unit')}"
    return _parse_with_pint(raw, quantity, system, info)


def _parse_with_pint(raw: str, quantity: str, system: UnitSystem, info: dict) -> float:
    import pint
    import tokenize

    m = _LEADING_NUMBER.match(raw)
    if not m:
        raise UnitParseError(fields.unreadable_entry(info["text"], info["quantity"], system, info["field"]),
                             reason="unreadable", **info)
    number = float(m.group(1))
    typed_unit = m.group(2).strip()
    unit_text = _pint_unit_text(typed_unit, quantity)
    reg = registry()
    try:
        q = reg.Quantity(number, unit_text)
    # pint's expression parser raises these for unit text it cannot read (e.g. "kg/", "m/s)", "1/0")
    except (pint.errors.PintError, AssertionError, tokenize.TokenError, ZeroDivisionError, SyntaxError,
            TypeError, ValueError, AttributeError) as exc:
        unknown = exc.args[0] if isinstance(exc, pint.errors.UndefinedUnitError) and exc.args else typed_unit
        raise UnitParseError(fields.unknown_unit(info["text"], unknown, info["quantity"], system, info["field"]),
                             reason="unknown_unit", unit_text=typed_unit, **info) from None
    try:
        si = q.to(_SI_BASE[quantity]).magnitude
    except pint.errors.DimensionalityError:
        kind = typed_kind(q)
        raise UnitParseError(fields.wrong_kind(info["text"], typed_unit, kind, info["quantity"], system, info["field"]),
                             reason="wrong_kind", typed_kind=kind, unit_text=typed_unit, **info) from None
    if not math.isfinite(si):
        raise UnitParseError(fields.unreadable_entry(info["text"], info["quantity"], system, info["field"]),
                             reason="not_finite", **info)
    return float(si)


# Kinds of quantity a typed unit can be, in the order they are tried (first match names it).
_KINDS: tuple[tuple[str, str], ...] = (
    ("temperature", "kelvin"),
    ("pressure", "Pa"),
    ("length", "m"),
    ("mass_flow", "kg/s"),
    ("volume_flow", "m**3/s"),
    ("power", "W"),
    ("power_per_length", "W/m"),
    ("heat_flux", "W/m**2"),
    ("film_coefficient", "W/m**2/K"),
    ("fouling_resistance", "m**2*K/W"),
    ("conductivity", "W/m/K"),
    ("speed", "m/s"),
    ("density", "kg/m**3"),
    ("specific_heat", "J/kg/K"),
    ("viscosity", "Pa*s"),
    ("time", "s"),
    ("energy_per_mass", "J/kg"),
    ("mass", "kg"),
    ("volume", "m**3"),
    ("area", "m**2"),
    ("energy", "J"),
    ("kinematic_viscosity", "m**2/s"),
    ("frequency", "1/s"),
    ("angle", "radian"),
    ("dimensionless", "dimensionless"),
)


def typed_kind(q) -> str:
    """The kind of quantity a pint quantity is (``"volume_flow"`` for gallon/minute), or ``""``."""
    reg = registry()
    for kind, base in _KINDS:
        if q.dimensionality == reg.Quantity(1, base).dimensionality:
            return kind
    return ""


_TOKEN_QUANTITY = {"T": "temperature", "dT": "temperature_difference", "v": "velocity", "q": "power_per_length",
                   "n": "dimensionless"}


def check_message(check, system: UnitSystem) -> str:
    """A solver check's message in the chosen unit system (the SI text when it has no template)."""
    if not getattr(check, "template", ""):
        return check.message
    from solver.results import render_message

    def one(kind: str, value: float) -> str:
        quantity = _TOKEN_QUANTITY[kind]
        if quantity == "temperature_difference":
            u = unit(quantity, system)
            return f"{_trim(format_number(u.from_si(value), digits=3))} {u.label}"  # "5 K", not "5.00 K"
        return format_value(value, quantity, system, digits=3)

    return render_message(check.template, one)
