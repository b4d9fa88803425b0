"""Pipe dimensions, pipe materials and insulation materials.

Plain data plus the look-ups the solver needs:

- ``resolve_pipe`` turns a :class:`solver.model.Pipe` into the numbers the
  physics uses (bore, outside diameter, wall, roughness, wall conductivity).
- ``nps_sizes`` / ``schedules_for`` list what the pipe table holds, for the GUI.
- ``PIPE_MATERIALS`` / ``INSULATION_MATERIALS`` hold generic materials with the
  source of each value; each insulation material has a constant k (at about 50 °C mean) and a
  table of k against mean temperature from its material specification (used by
  ``solver.insulation`` where a layer gives no conductivity).
- ``JACKETING`` / ``jacketing_choices`` list the usual jacketing finishes with their surface
  emissivity, for the surroundings' emissivity.

Pipe dimensions are those of ASME B36.10M (welded and seamless wrought steel
pipe) and, for the "S" schedules 5S, 10S, 40S and 80S, ASME B36.19M (stainless
steel pipe), in their metric (mm) columns. All values returned are SI (m).
"""

from __future__ import annotations

import functools
import re
from dataclasses import dataclass
from fractions import Fraction
from typing import Optional, Protocol

from solver.errors import InputError

# --------------------------------------------------------------------------- pipe table

#: Nominal pipe sizes held in the table, smallest first.
_NPS_KEYS: tuple[str, ...] = (
    "1/8", "1/4", "3/8", "1/2", "3/4", "1", "1-1/4", "1-1/2", "2", "2-1/2", "3", "3-1/2",
    "4", "5", "6", "8", "10", "12", "14", "16", "18", "20", "22", "24",
)

#: Schedules in the order the GUI lists them (thin to thick).
_SCHEDULE_ORDER: tuple[str, ...] = (
    "5S", "10S", "10", "20", "30", "40S", "STD", "40", "60", "80S", "XS", "80",
    "100", "120", "140", "160", "XXS",
)

#: Outside diameter [mm] per NPS, ASME B36.10M metric column.
_OD_MM: dict[str, float] = {
    "1/8": 10.3, "1/4": 13.7, "3/8": 17.1, "1/2": 21.3, "3/4": 26.7, "1": 33.4,
    "1-1/4": 42.2, "1-1/2": 48.3, "2": 60.3, "2-1/2": 73.0, "3": 88.9, "3-1/2": 101.6,
    "4": 114.3, "5": 141.3, "6": 168.3, "8": 219.1, "10": 273.0, "12": 323.8,
    "14": 355.6, "16": 406.4, "18": 457.0, "20": 508.0, "22": 559.0, "24": 610.0,
}

#: ASME B36.19M rounds 10.750 in and 12.750 in to 273.1 mm and 323.9 mm in its
#: metric column, where B36.10M (as tabulated here) gives 273.0 and 323.8 mm.
#: The walls of the S schedules are quoted against these diameters.
_OD_MM_B36_19M: dict[str, float] = {"10": 273.1, "12": 323.9}

_STAINLESS_SCHEDULES = frozenset({"5S", "10S", "40S", "80S"})

#: Wall thickness [mm] per schedule and NPS. Transcribed from ASME B36.10M
#: (schedules 10 to 160, STD, XS, XXS) and ASME B36.19M (5S, 10S, 40S, 80S);
#: a size missing under a schedule does not exist in that schedule.
_WALL_MM: dict[str, dict[str, float]] = {
    "5S": {
        "1/2": 1.65, "3/4": 1.65, "1": 1.65, "1-1/4": 1.65, "1-1/2": 1.65, "2": 1.65, "2-1/2": 2.11, "3": 2.11,
        "3-1/2": 2.11, "4": 2.11, "5": 2.77, "6": 2.77, "8": 2.77, "10": 3.4, "12": 3.96, "14": 3.96,
        "16": 4.19, "18": 4.19, "20": 4.78, "22": 4.78, "24": 5.54,
    },
    "10S": {
        "1/8": 1.24, "1/4": 1.65, "3/8": 1.65, "1/2": 2.11, "3/4": 2.11, "1": 2.77, "1-1/4": 2.77, "1-1/2": 2.77,
        "2": 2.77, "2-1/2": 3.05, "3": 3.05, "3-1/2": 3.05, "4": 3.05, "5": 3.4, "6": 3.4, "8": 3.76,
        "10": 4.19, "12": 4.57, "14": 4.78, "16": 4.78, "18": 4.78, "20": 5.54, "22": 5.54, "24": 6.35,
    },
    "10": {
        "1/8": 1.24, "1/4": 1.65, "3/8": 1.65, "1/2": 2.11, "3/4": 2.11, "1": 2.77, "1-1/4": 2.77, "1-1/2": 2.77,
        "2": 2.77, "2-1/2": 3.05, "3": 3.05, "3-1/2": 3.05, "4": 3.05, "5": 3.4, "6": 3.4, "8": 3.76,
        "10": 4.19, "12": 4.57, "14": 6.35, "16": 6.35, "18": 6.35, "20": 6.35, "22": 6.35, "24": 6.35,
    },
    "20": {
        "8": 6.35, "10": 6.35, "12": 6.35, "14": 7.92, "16": 7.92, "18": 7.92, "20": 9.53, "22": 9.53,
        "24": 9.53,
    },
    "30": {
        "1/8": 1.45, "1/4": 1.85, "3/8": 1.85, "1/2": 2.41, "3/4": 2.41, "1": 2.9, "1-1/4": 2.97, "1-1/2": 3.18,
        "2": 3.18, "2-1/2": 4.78, "3": 4.78, "3-1/2": 4.78, "4": 4.78, "8": 7.04, "10": 7.8, "12": 8.38,
        "14": 9.53, "16": 9.53, "18": 11.13, "20": 12.7, "22": 12.7, "24": 14.27,
    },
    "40S": {
        "1/8": 1.73, "1/4": 2.24, "3/8": 2.31, "1/2": 2.77, "3/4": 2.87, "1": 3.38, "1-1/4": 3.56, "1-1/2": 3.68,
        "2": 3.91, "2-1/2": 5.16, "3": 5.49, "3-1/2": 5.74, "4": 6.02, "5": 6.55, "6": 7.11, "8": 8.18,
        "10": 9.27, "12": 9.53, "14": 9.53, "16": 9.53, "18": 9.53, "20": 9.53, "24": 9.53,
    },
    "STD": {
        "1/8": 1.73, "1/4": 2.24, "3/8": 2.31, "1/2": 2.77, "3/4": 2.87, "1": 3.38, "1-1/4": 3.56, "1-1/2": 3.68,
        "2": 3.91, "2-1/2": 5.16, "3": 5.49, "3-1/2": 5.74, "4": 6.02, "5": 6.55, "6": 7.11, "8": 8.18,
        "10": 9.27, "12": 9.53, "14": 9.53, "16": 9.53, "18": 9.53, "20": 9.53, "22": 9.53, "24": 9.53,
    },
    "40": {
        "1/8": 1.73, "1/4": 2.24, "3/8": 2.31, "1/2": 2.77, "3/4": 2.87, "1": 3.38, "1-1/4": 3.56, "1-1/2": 3.68,
        "2": 3.91, "2-1/2": 5.16, "3": 5.49, "3-1/2": 5.74, "4": 6.02, "5": 6.55, "6": 7.11, "8": 8.18,
        "10": 9.27, "12": 10.31, "14": 11.13, "16": 12.7, "18": 14.27, "20": 15.09, "24": 17.48,
    },
    "60": {
        "8": 10.31, "10": 12.7, "12": 14.27, "14": 15.09, "16": 16.66, "18": 19.05, "20": 20.62, "22": 22.23,
        "24": 24.61,
    },
    "80S": {
        "1/8": 2.41, "1/4": 3.02, "3/8": 3.2, "1/2": 3.73, "3/4": 3.91, "1": 4.55, "1-1/4": 4.85, "1-1/2": 5.08,
        "2": 5.54, "2-1/2": 7.01, "3": 7.62, "3-1/2": 8.08, "4": 8.56, "5": 9.53, "6": 10.97, "8": 12.7,
        "10": 12.7, "12": 12.7, "14": 12.7, "16": 12.7, "18": 12.7, "20": 12.7, "24": 12.7,
    },
    "XS": {
        "1/8": 2.41, "1/4": 3.02, "3/8": 3.2, "1/2": 3.73, "3/4": 3.91, "1": 4.55, "1-1/4": 4.85, "1-1/2": 5.08,
        "2": 5.54, "2-1/2": 7.01, "3": 7.62, "3-1/2": 8.08, "4": 8.56, "5": 9.53, "6": 10.97, "8": 12.7,
        "10": 12.7, "12": 12.7, "14": 12.7, "16": 12.7, "18": 12.7, "20": 12.7, "22": 12.7, "24": 12.7,
    },
    "80": {
        "1/8": 2.41, "1/4": 3.02, "3/8": 3.2, "1/2": 3.73, "3/4": 3.91, "1": 4.55, "1-1/4": 4.85, "1-1/2": 5.08,
        "2": 5.54, "2-1/2": 7.01, "3": 7.62, "3-1/2": 8.08, "4": 8.56, "5": 9.53, "6": 10.97, "8": 12.7,
        "10": 15.09, "12": 17.48, "14": 19.05, "16": 21.44, "18": 23.83, "20": 26.19, "22": 28.58, "24": 30.96,
    },
    "100": {
        "8": 15.09, "10": 18.26, "12": 21.44, "14": 23.83, "16": 26.19, "18": 29.36, "20": 32.54, "22": 34.93,
        "24": 38.89,
    },
    "120": {
        "4": 11.13, "5": 12.7, "6": 14.27, "8": 18.26, "10": 21.44, "12": 25.4, "14": 27.79, "16": 30.96,
        "18": 34.93, "20": 38.1, "22": 41.28, "24": 46.02,
    },
    "140": {
        "8": 20.62, "10": 25.4, "12": 28.58, "14": 31.75, "16": 36.53, "18": 39.67, "20": 44.45, "22": 47.63,
        "24": 52.37,
    },
    "160": {
        "1/2": 4.78, "3/4": 5.56, "1": 6.35, "1-1/4": 6.35, "1-1/2": 7.14, "2": 8.74, "2-1/2": 9.53, "3": 11.13,
        "4": 13.49, "5": 15.88, "6": 18.26, "8": 23.01, "10": 28.58, "12": 33.32, "14": 35.71, "16": 40.49,
        "18": 45.24, "20": 50.01, "22": 53.98, "24": 59.54,
    },
    "XXS": {
        "1/2": 7.47, "3/4": 7.82, "1": 9.09, "1-1/4": 9.7, "1-1/2": 10.15, "2": 11.07, "2-1/2": 14.02, "3": 15.24,
        "4": 17.12, "5": 19.05, "6": 21.95, "8": 22.23, "10": 25.4, "12": 25.4,
    },
}

_FRACTION_TO_NPS: dict[Fraction, str] = {}
for _key in _NPS_KEYS:
    _whole, _, _frac = _key.partition("-")
    _value = Fraction(_whole) + (Fraction(_frac) if _frac else 0)
    _FRACTION_TO_NPS[_value] = _key

#: Metric designation DN per NPS (ISO 6708 correspondence, as listed in ASME B36.10M).
_DN_TO_NPS: dict[int, str] = {
    6: "1/8", 8: "1/4", 10: "3/8", 15: "1/2", 20: "3/4", 25: "1", 32: "1-1/4", 40: "1-1/2",
    50: "2", 65: "2-1/2", 80: "3", 90: "3-1/2", 100: "4", 125: "5", 150: "6", 200: "8",
    250: "10", 300: "12", 350: "14", 400: "16", 450: "18", 500: "20", 550: "22", 600: "24",
}

_SCHEDULE_ALIASES = {"STANDARD": "STD", "XH": "XS", "EXTRASTRONG": "XS", "XXH": "XXS"}


def nps_sizes() -> list[str]:
    """Nominal pipe sizes in the table, smallest first (e.g. ``["1/8", ..., "24"]``)."""
    return list(_NPS_KEYS)


def schedules_for(nps) -> list[str]:
    """Schedules that exist for a nominal pipe size, thin to thick.

    ``nps`` may be spelt any way :func:`normalise_nps` accepts; an unknown size
    raises :class:`InputError` on field ``nps``.
    """
    key = normalise_nps(nps)
    return list(_schedules_for_key(key))


@functools.lru_cache(maxsize=None)
def _schedules_for_key(key: str) -> tuple[str, ...]:
    return tuple(s for s in _SCHEDULE_ORDER if key in _WALL_MM[s])


def _parse_nps(text: str) -> Optional[str]:
    s = text.strip().lower().replace("\u2033", '"').replace("\u201d", '"').replace("''", '"')
    s = re.sub(r"^nps\s*", "", s)
    dn = re.fullmatch(r"dn\s*(\d+)", s)
    if dn:
        return _DN_TO_NPS.get(int(dn.group(1)))
    s = re.sub(r'\s*(?:"|inches|inch|in\.?)$', "", s).strip()
    m = re.fullmatch(r"(\d+)(?:\s*-\s*|\s+)(\d+)\s*/\s*(\d+)", s)  # 1-1/2, 1 1/2
    try:
        if m:
            value = Fraction(int(m.group(1))) + Fraction(int(m.group(2)), int(m.group(3)))
        elif re.fullmatch(r"\d+\s*/\s*\d+", s):
            num, den = s.split("/")
            value = Fraction(int(num), int(den))
        elif re.fullmatch(r"\d*\.?\d+", s) or re.fullmatch(r"\d+\.", s):
            value = Fraction(s.rstrip(".") if s.endswith(".") else s)
        else:
            return None
    except (ValueError, ZeroDivisionError):
        return None
    return _FRACTION_TO_NPS.get(value)


@functools.lru_cache(maxsize=512)
def _normalise_nps_cached(text: str) -> Optional[str]:
    return _parse_nps(text)


def normalise_nps(nps, field: str = "nps") -> str:
    """Return the table key of a nominal pipe size.

    Accepts ``"1-1/2"``, ``"1 1/2"``, ``"1.5"``, ``1.5``, ``'1-1/2"'``,
    ``"1.5 in"``, ``"NPS 1-1/2"`` and metric ``"DN40"``. Raises
    :class:`InputError` naming ``field`` when the size is not in the table.
    """
    if isinstance(nps, bool):
        key = None
    elif isinstance(nps, (int, float)):
        key = _FRACTION_TO_NPS.get(Fraction(nps)) if nps == nps and abs(nps) != float("inf") else None
    else:
        key = _normalise_nps_cached(str(nps))
    if key is None:
        raise InputError(
            field, nps, f"unknown nominal pipe size; sizes in the table: {', '.join(_NPS_KEYS)}"
        )
    return key


def normalise_schedule(schedule) -> str:
    """Canonical spelling of a schedule: ``"sch 40"`` -> ``"40"``, ``"10s"`` -> ``"10S"``,
    ``"std"`` -> ``"STD"``, ``"XH"`` -> ``"XS"``. Does not check that it exists."""
    s = str(schedule).strip().upper()
    s = re.sub(r"^(SCHEDULE|SCH\.?)\s*", "", s)
    s = re.sub(r"\s+", "", s)
    s = re.sub(r"^(\d+)\.0+$", r"\1", s)
    return _SCHEDULE_ALIASES.get(s, s)


@functools.lru_cache(maxsize=512)
def _dimensions_mm(nps_key: str, schedule_key: str) -> Optional[tuple[float, float]]:
    """(outside diameter, wall) [mm] for table keys, or None if the pair does not exist."""
    walls = _WALL_MM.get(schedule_key)
    if walls is None or nps_key not in walls:
        return None
    od = _OD_MM[nps_key]
    if schedule_key in _STAINLESS_SCHEDULES:
        od = _OD_MM_B36_19M.get(nps_key, od)
    return od, walls[nps_key]


def pipe_dimensions(nps, schedule, field_prefix: str = "pipe") -> tuple[float, float, float]:
    """(inner diameter, outer diameter, wall thickness) [m] of an NPS and schedule.

    The bore is the outside diameter less twice the nominal wall, as the
    standards tabulate it. Raises :class:`InputError` on ``<prefix>.nps`` or
    ``<prefix>.schedule`` (listing the schedules that exist for the size).
    """
    nps_key = normalise_nps(nps, field=f"{field_prefix}.nps")
    dims = _dimensions_mm(nps_key, normalise_schedule(schedule))
    if dims is None:
        raise InputError(
            f"{field_prefix}.schedule",
            schedule,
            f"schedule not available for NPS {nps_key}; available: {', '.join(_schedules_for_key(nps_key))}",
        )
    od_mm, wall_mm = dims
    return (od_mm - 2.0 * wall_mm) * 1e-3, od_mm * 1e-3, wall_mm * 1e-3


# --------------------------------------------------------------------------- materials


@dataclass(frozen=True)
class PipeMaterial:
    """A generic pipe material.

    roughness_m : absolute roughness of the bore [m]
    conductivity_W_per_mK : wall thermal conductivity near room temperature [W/(m·K)]
    source : where the values come from
    """

    label: str
    roughness_m: float
    conductivity_W_per_mK: float
    source: str


@dataclass(frozen=True)
class InsulationMaterial:
    """A generic insulation material.

    conductivity_W_per_mK : the constant conductivity at about 50 °C mean [W/(m·K)]: the value an editor
        offers when the user wants a constant k (and what every layer used before k(T) existed)
    conductivity_table : ((mean temperature [K], maximum conductivity [W/(m·K)]), ...), rising mean
        temperature: the most the named material specification allows at each mean temperature
    use_range_K : (lowest, highest) face temperature the specification (or common practice, where it
        names no limit) rates the material for; k(T) is extrapolated linearly beyond the table up to these
        limits and no further, and a solved layer whose face leaves them is refused (solver.insulation)
    table_source : the specification, type and grade the table is from, and whether from memory
    """

    label: str
    conductivity_W_per_mK: float
    source: str
    conductivity_table: tuple[tuple[float, float], ...] = ()
    use_range_K: tuple[float, float] = (0.0, 0.0)
    table_source: str = ""


def _table(*points_degc_w: tuple[float, float]) -> tuple[tuple[float, float], ...]:
    # written in °C mean temperature as the specifications tabulate them (converted from their °F columns)
    return tuple((t + 273.15, k) for t, k in points_degc_w)


_MOODY = "roughness: Moody, L.F. (1944) 'Friction factors for pipe flow', Trans. ASME 66, 671-684"

PIPE_MATERIALS: dict[str, PipeMaterial] = {
    "carbon steel": PipeMaterial(
        "Carbon steel (commercial)", 45e-6, 50.0,
        f"{_MOODY}, commercial steel 0.00015 ft (45 µm); conductivity: typical of carbon-steel "
        "pipe grades at 20-100 °C, carbon steels span about 41-64 W/(m·K) at 300 K in "
        "Incropera et al., Fundamentals of Heat and Mass Transfer, Table A.1 (from memory)",
    ),
    "stainless steel": PipeMaterial(
        "Stainless steel (austenitic)", 15e-6, 16.0,
        "roughness: 15 µm for new welded stainless process pipe is common practice (smoother than "
        "commercial steel, rougher than drawn tubing); conductivity: AISI 304 about 14.9 W/(m·K) at "
        "300 K and 16.6 at 400 K, Incropera et al., Table A.1 (from memory)",
    ),
    "copper": PipeMaterial(
        "Copper (drawn tubing)", 1.5e-6, 390.0,
        f"{_MOODY}, drawn tubing 0.000005 ft (1.5 µm); conductivity: pure copper 401 W/(m·K) at "
        "300 K, Incropera et al., Table A.1; deoxidised tube copper is lower (from memory)",
    ),
    "galvanised steel": PipeMaterial(
        "Galvanised steel", 150e-6, 50.0,
        f"{_MOODY}, galvanized iron 0.0005 ft (150 µm); conductivity as carbon steel (common practice)",
    ),
    "cast iron": PipeMaterial(
        "Cast iron (uncoated)", 260e-6, 50.0,
        f"{_MOODY}, cast iron 0.00085 ft (260 µm); conductivity: grey cast iron about 45-55 W/(m·K) "
        "(from memory)",
    ),
    "PVC": PipeMaterial(
        "PVC / smooth plastic", 1.5e-6, 0.19,
        "roughness: hydraulically smooth, taken as drawn tubing 1.5 µm (common practice); "
        "conductivity: rigid PVC about 0.19 W/(m·K) (typical value, check the manufacturer's data; "
        "from memory)",
    ),
    "HDPE": PipeMaterial(
        "HDPE (PE 100)", 1.5e-6, 0.45,
        "roughness: hydraulically smooth, 1.5 µm (common practice); conductivity: about 0.4-0.5 "
        "W/(m·K) (typical value, check the manufacturer's data; from memory)",
    ),
    "PP": PipeMaterial(
        "Polypropylene (PP)", 1.5e-6, 0.22,
        "roughness: hydraulically smooth, 1.5 µm (common practice); conductivity: about 0.22 "
        "W/(m·K) (typical value, check the manufacturer's data; from memory)",
    ),
}

_MATERIAL_ALIASES = {
    "galvanized steel": "galvanised steel",
    "pvc/plastic": "PVC",
    "plastic": "PVC",
    "polypropylene": "PP",
    "polyethylene": "HDPE",
    "stainless": "stainless steel",
    "steel": "carbon steel",
}

_TYPICAL = "typical value, check the manufacturer's data"

_FROM_MEMORY = ("from memory: the specification's table is not at hand; values converted from its "
                "Btu·in/(h·ft²·°F) column (x 0.1442) and rounded")

INSULATION_MATERIALS: dict[str, InsulationMaterial] = {
    "mineral wool": InsulationMaterial(
        "Mineral wool (pipe section)", 0.040,
        f"{_TYPICAL}; about 0.037-0.042 W/(m·K) at 50 °C mean for pipe sections to ASTM C547 / "
        "EN 14303 (from memory)",
        _table((38, 0.036), (93, 0.042), (149, 0.050), (204, 0.060), (260, 0.071)),
        (223.15, 727.15),
        f"ASTM C547 mineral fiber pipe insulation, Type I Grade A (molded, for use to 454 °C); {_FROM_MEMORY}. "
        "C547 names no lowest temperature (sub-ambient use with a vapour retarder): -50 °C is common practice",
    ),
    "calcium silicate": InsulationMaterial(
        "Calcium silicate", 0.055,
        f"{_TYPICAL}; about 0.050-0.058 W/(m·K) at 50 °C mean, ASTM C533 class material "
        "(from memory)",
        _table((38, 0.059), (93, 0.065), (149, 0.072), (204, 0.079), (260, 0.086), (316, 0.093), (371, 0.101)),
        (223.15, 922.15),
        f"ASTM C533 calcium silicate block and pipe insulation, Type I (for use to 649 °C); {_FROM_MEMORY}. "
        "C533 names no lowest temperature (a hot-service material): -50 °C is common practice",
    ),
    "cellular glass": InsulationMaterial(
        "Cellular glass", 0.045,
        f"{_TYPICAL}; about 0.042-0.048 W/(m·K) at 50 °C mean, ASTM C552 class material (from memory)",
        _table((-73, 0.032), (-18, 0.037), (24, 0.042), (93, 0.049), (149, 0.056), (204, 0.064), (260, 0.073)),
        (5.15, 700.15),
        f"ASTM C552 cellular glass thermal insulation, Grade 6 (formerly Type II, pipe and tubing; for use "
        f"from -268 °C to 427 °C); {_FROM_MEMORY}",
    ),
    "polyurethane foam": InsulationMaterial(
        "Polyurethane / PIR rigid foam", 0.027,
        f"{_TYPICAL}; aged value about 0.025-0.030 W/(m·K) at 50 °C mean (from memory)",
        _table((-73, 0.023), (-18, 0.026), (24, 0.027), (66, 0.029), (93, 0.031)),
        (90.15, 422.15),
        f"ASTM C591 unfaced preformed rigid cellular polyisocyanurate, Type IV (aged values; for use from "
        f"-183 °C to 149 °C); {_FROM_MEMORY}. Rigid polyurethane pipe sections are taken alike",
    ),
    "flexible elastomeric foam": InsulationMaterial(
        "Flexible elastomeric foam", 0.038,
        f"{_TYPICAL}; about 0.033-0.036 W/(m·K) at 0 °C rising to about 0.038-0.040 at 50 °C "
        "mean, ASTM C534 class material (from memory); common practice up to about 105 °C",
        _table((-29, 0.036), (0, 0.038), (24, 0.040), (66, 0.043), (93, 0.045)),
        (90.15, 378.15),
        f"ASTM C534 preformed flexible elastomeric cellular insulation, Type I (tubular) Grade 1 (for use "
        f"from -183 °C to 105 °C); {_FROM_MEMORY}",
    ),
    "perlite": InsulationMaterial(
        "Expanded perlite", 0.060,
        f"{_TYPICAL}; about 0.055-0.065 W/(m·K) at 50 °C mean, ASTM C610 class material "
        "(from memory)",
        _table((38, 0.062), (93, 0.068), (149, 0.075), (204, 0.082), (260, 0.089), (316, 0.096), (371, 0.104)),
        (223.15, 922.15),
        f"ASTM C610 molded expanded perlite block and pipe insulation (for use to 649 °C); {_FROM_MEMORY}. "
        "C610 names no lowest temperature (a hot-service material): -50 °C is common practice",
    ),
    "aerogel blanket": InsulationMaterial(
        "Aerogel blanket", 0.016,
        f"{_TYPICAL}; about 0.015-0.018 W/(m·K) at 50 °C mean, ASTM C1728 class material "
        "(from memory)",
        _table((38, 0.021), (93, 0.024), (149, 0.027), (204, 0.032), (260, 0.037), (316, 0.043), (371, 0.050)),
        (233.15, 923.15),
        f"ASTM C1728 flexible aerogel insulation, Type III Grade 1A (high temperature, for use to 650 °C); "
        f"{_FROM_MEMORY}. The lowest temperature -40 °C is from memory; cryogenic aerogel blankets are "
        "another type: give such a layer its own conductivity",
    ),
}

_INSULATION_ALIASES = {
    "rock wool": "mineral wool", "stone wool": "mineral wool", "mineral fiber": "mineral wool",
    "mineral fibre": "mineral wool", "glass wool": "mineral wool",
    "calsil": "calcium silicate", "cal-sil": "calcium silicate",
    "foam glass": "cellular glass", "foamglass": "cellular glass",
    "pur foam": "polyurethane foam", "pir foam": "polyurethane foam", "pur": "polyurethane foam",
    "pir": "polyurethane foam", "polyisocyanurate": "polyurethane foam", "polyurethane": "polyurethane foam",
    "elastomeric foam": "flexible elastomeric foam", "elastomeric": "flexible elastomeric foam",
    "expanded perlite": "perlite", "aerogel": "aerogel blanket",
}


def insulation_key(name: str) -> Optional[str]:
    """The catalogue key of an insulation material named ``name`` (case and spacing ignored; common
    other names such as "rock wool" or "foam glass" accepted), or None when the catalogue has none."""
    text = " ".join(str(name).strip().split()).lower()
    for key in INSULATION_MATERIALS:
        if key.lower() == text:
            return key
    return _INSULATION_ALIASES.get(text)


# --------------------------------------------------------------------------- jacketing


@dataclass(frozen=True)
class Jacketing:
    """A jacketing (cladding) finish over the insulation, by the thermal emissivity of its outer surface.

    The emissivity goes to the surroundings' ``emissivity`` (still air, wind): a bright metal jacket
    radiates little, so its surface runs hotter on a hot line than a painted or plastic one.
    """

    label: str
    emissivity: float
    source: str


_EMITTANCE_TABLES = ("the surface emittance tables of the insulation chapters of the ASHRAE Handbook - "
                     "Fundamentals and the appendix of ASTM C680 (from memory)")

JACKETING: dict[str, Jacketing] = {
    "aluminium_new": Jacketing("Aluminium, new (bright)", 0.05, f"typical value; {_EMITTANCE_TABLES}"),
    "aluminium_oxidised": Jacketing("Aluminium, oxidised / in service", 0.10, f"typical value; {_EMITTANCE_TABLES}"),
    "stainless_new": Jacketing("Stainless steel, new (clean)", 0.15, f"typical value; {_EMITTANCE_TABLES}"),
    "stainless_dull": Jacketing("Stainless steel, dull / in service", 0.30, f"typical value; {_EMITTANCE_TABLES}"),
    "galvanised_new": Jacketing("Galvanised steel, new", 0.13, f"typical value; {_EMITTANCE_TABLES}"),
    "galvanised_weathered": Jacketing("Galvanised steel, weathered", 0.28, f"typical value; {_EMITTANCE_TABLES}"),
    "painted": Jacketing("Painted metal (any colour but metallic paint)", 0.90, f"typical value; {_EMITTANCE_TABLES}"),
    "pvc": Jacketing("PVC jacket", 0.90, f"typical value; {_EMITTANCE_TABLES}"),
    "mastic": Jacketing("Mastic / canvas / non-metallic coating", 0.90, f"typical value; {_EMITTANCE_TABLES}"),
}


def jacketing_choices() -> list[tuple[str, str, float, str]]:
    """The jacketing finishes for an editor: (key, label, emissivity, source), brightest metal first."""
    return [(key, j.label, j.emissivity, j.source) for key, j in JACKETING.items()]


def _material_key(name: str) -> Optional[str]:
    text = " ".join(str(name).strip().split())
    for key in PIPE_MATERIALS:
        if key.lower() == text.lower():
            return key
    return _MATERIAL_ALIASES.get(text.lower())


# --------------------------------------------------------------------------- resolved pipe


class PipeSpec(Protocol):
    """What :func:`resolve_pipe` reads from a pipe: the fields of :class:`solver.model.Pipe`.

    Named here rather than imported, because the model validates NPS and schedule against this
    table: the model imports the catalogue, never the other way round.
    """

    bore: str
    nps: Optional[str]
    schedule: Optional[str]
    inner_diameter_m: Optional[float]
    wall_thickness_m: Optional[float]
    material: str
    roughness_m: Optional[float]
    wall_conductivity_W_per_mK: Optional[float]


@dataclass(frozen=True)
class ResolvedPipe:
    """The numbers the physics uses for one pipe, all SI.

    inner_diameter_m, outer_diameter_m, wall_thickness_m : [m]
    roughness_m : absolute roughness of the bore [m]
    wall_conductivity_W_per_mK : [W/(m·K)]
    description : short text, e.g. ``'NPS 2 Sch 40 (ID 52.5 mm)'``
    """

    inner_diameter_m: float
    outer_diameter_m: float
    wall_thickness_m: float
    roughness_m: float
    wall_conductivity_W_per_mK: float
    description: str


def resolve_pipe(pipe: PipeSpec, field_prefix: str = "pipe") -> ResolvedPipe:
    """Resolve a pipe of the model into dimensions and wall properties.

    ``bore == "nps"``: bore, outside diameter and wall from the ASME B36.10M /
    B36.19M table. ``bore == "diameter"``: the entered bore and wall, outside
    diameter = bore + 2 x wall. Roughness and wall conductivity: the entered
    value wins, else the default of ``pipe.material`` (needed, and checked, only
    when one of them is not entered).

    Raises :class:`InputError` naming ``<field_prefix>.nps``,
    ``<field_prefix>.schedule`` or ``<field_prefix>.material``.
    Results are cached, so calling this per segment per solve is cheap.
    """
    return _resolve_cached(
        pipe.bore,
        pipe.nps,
        pipe.schedule,
        pipe.inner_diameter_m,
        pipe.wall_thickness_m,
        pipe.material,
        pipe.roughness_m,
        pipe.wall_conductivity_W_per_mK,
        field_prefix,
    )


@functools.lru_cache(maxsize=1024)
def _resolve_cached(
    bore, nps, schedule, inner_diameter_m, wall_thickness_m, material, roughness_m, conductivity, field_prefix
) -> ResolvedPipe:
    if bore == "nps":
        inner, outer, wall = pipe_dimensions(nps, schedule, field_prefix)
        nps_key = normalise_nps(nps)
        sched = normalise_schedule(schedule)
        sched_text = sched if sched in ("STD", "XS", "XXS") else f"Sch {sched}"
        description = f"NPS {nps_key} {sched_text} (ID {inner * 1e3:.1f} mm)"
    else:
        if inner_diameter_m is None or wall_thickness_m is None:
            raise InputError(
                f"{field_prefix}.inner_diameter_m", inner_diameter_m,
                "bore 'diameter' needs inner_diameter_m and wall_thickness_m",
            )
        inner = float(inner_diameter_m)
        wall = float(wall_thickness_m)
        outer = inner + 2.0 * wall
        description = f"ID {inner * 1e3:.1f} mm, wall {wall * 1e3:.2f} mm"

    if roughness_m is None or conductivity is None:
        key = _material_key(material)
        if key is None:
            raise InputError(
                f"{field_prefix}.material", material,
                f"unknown pipe material; known: {', '.join(PIPE_MATERIALS)}",
            )
        mat = PIPE_MATERIALS[key]
        if roughness_m is None:
            roughness_m = mat.roughness_m
        if conductivity is None:
            conductivity = mat.conductivity_W_per_mK
    return ResolvedPipe(
        inner_diameter_m=inner,
        outer_diameter_m=outer,
        wall_thickness_m=wall,
        roughness_m=float(roughness_m),
        wall_conductivity_W_per_mK=float(conductivity),
        description=description,
    )


# --------------------------------------------------------------------------- aqueous solutions

#: Aqueous solutions offered in the GUI:
#: CoolProp INCOMP code -> (label, fraction basis 'mass'|'volume', min fraction, max fraction).
#: All listed codes are mass-based in CoolProp 6.8 (set_volu_fractions is refused
#: for them, set_mass_fractions accepted); the ranges are CoolProp's
#: ``fraction_min``/``fraction_max``. tests/test_properties.py re-checks both.
#: The model holds a solution's concentration to its range (SolutionFluid).
SOLUTIONS: dict[str, tuple[str, str, float, float]] = {
    "MEG": ("Ethylene glycol", "mass", 0.0, 0.6),
    "MPG": ("Propylene glycol", "mass", 0.0, 0.6),
    "MEA": ("Ethanol", "mass", 0.0, 0.6),
    "MMA": ("Methanol", "mass", 0.0, 0.6),
    "MGL": ("Glycerol", "mass", 0.0, 0.6),
    "MAM": ("Ammonia (aqueous)", "mass", 0.0, 0.3),
    "MCA": ("Calcium chloride", "mass", 0.0, 0.3),
    "MKA": ("Potassium acetate", "mass", 0.0, 0.45),
    "MKC": ("Potassium carbonate", "mass", 0.0, 0.4),
    "MKF": ("Potassium formate", "mass", 0.0, 0.48),
    "MLI": ("Lithium chloride", "mass", 0.0, 0.24),
    "MMG": ("Magnesium chloride", "mass", 0.0, 0.3),
    "MNA": ("Sodium chloride", "mass", 0.0, 0.23),
    "MITSW": ("Seawater", "mass", 0.0, 0.12),
}
