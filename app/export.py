"""CSV export of the profiles along the line, in SI or US customary units.

No Qt here: the headless CLI (``calorun solve --csv``) and the app share it.
One row per node (inlet first); one column per profile quantity, with the unit
in the header, e.g. ``Bulk temperature [°C]``. Empty cells mean "not defined
here" (e.g. no saturation temperature for a glycol solution). Files are written
atomically (temporary file, then rename), so a failed export never leaves half
a file behind. UTF-8 with a byte-order mark so spreadsheet programs read the
degree sign correctly.
"""

from __future__ import annotations

import csv
import io
import math
import os
import re
from pathlib import Path
from typing import Iterable, Mapping, Sequence

import numpy as np

from app import units
from solver.safe_write import atomic_write_text
from solver.results import PROFILE_COLUMNS, Result

# Profile column -> quantity in app.units. Every PROFILE_COLUMNS key must be here.
COLUMN_QUANTITY: dict[str, str] = {
    "x_m": "length",
    "bulk_temperature_K": "temperature",
    "inner_wall_temperature_K": "temperature",
    "outer_surface_temperature_K": "temperature",
    "pressure_Pa": "pressure",
    "heat_flux_W_per_m2": "heat_flux",
    "heat_to_fluid_W_per_m": "power_per_length",
    "heat_loss_W_per_m": "power_per_length",
    "heater_output_W_per_m": "power_per_length",
    "inside_coefficient_W_per_m2K": "film_coefficient",
    "reynolds": "dimensionless",
    "velocity_m_per_s": "velocity",
    "density_kg_per_m3": "density",
    "saturation_temperature_K": "temperature",
}

_ENCODING = "utf-8-sig"
_HEADER = re.compile(r"^(?P<label>.*?)\s*\[(?P<unit>[^\]]*)\]\s*$")


class ExportError(ValueError):
    """A CSV that cannot be read back; the message names the file and the problem."""


def column_header(key: str, unit_system: str = "SI") -> str:
    """Header text of one profile column, e.g. ``'Pressure [bar(a)]'``."""
    label_text = PROFILE_COLUMNS[key][0]
    unit_text = units.label(COLUMN_QUANTITY[key], unit_system) or "-"
    return f"{label_text} [{unit_text}]"


def _check_system(unit_system: str) -> str:
    if unit_system not in units.UNIT_SYSTEMS:
        raise ValueError(f"unit_system: expected one of {', '.join(units.UNIT_SYSTEMS)}, got {unit_system!r}")
    return unit_system


def profiles_csv_text(result: Result, unit_system: str = "SI") -> str:
    """The CSV text of one result's profiles (what :func:`write_profiles_csv` writes)."""
    _check_system(unit_system)
    columns = result.profile.columns()
    keys = list(PROFILE_COLUMNS)
    converted = []
    for key in keys:
        values = np.asarray(columns[key], dtype=float)
        u = units.unit(COLUMN_QUANTITY[key], unit_system)
        converted.append(values * u.scale + u.offset)
    n = len(converted[0])
    for key, col in zip(keys, converted):
        if len(col) != n:
            raise ValueError(f"profile column {key!r} has {len(col)} values, x_m has {n}")
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    writer.writerow([column_header(k, unit_system) for k in keys])
    for i in range(n):
        writer.writerow(["" if not math.isfinite(col[i]) else f"{col[i]:.10g}" for col in converted])
    return buf.getvalue()


def _atomic_write_text(path: Path, text: str) -> Path:
    return atomic_write_text(path, text, encoding=_ENCODING, newline="")


def write_profiles_csv(result: Result, path: str | os.PathLike, unit_system: str = "SI") -> Path:
    """Write the profiles of one result to ``path`` (atomic). Returns the path."""
    return _atomic_write_text(Path(path), profiles_csv_text(result, unit_system))


def read_profiles_csv(path: str | os.PathLike) -> tuple[dict[str, np.ndarray], str]:
    """Read a profiles CSV written by :func:`write_profiles_csv`.

    Returns ``(columns, unit_system)``: the columns keyed like
    ``solver.results.PROFILE_COLUMNS`` and converted back to SI, and the unit
    system the file was written in. Empty cells come back as NaN.
    """
    path = Path(path)
    with open(path, encoding=_ENCODING, newline="") as fh:
        rows = list(csv.reader(fh))
    if not rows:
        raise ExportError(f"{path}: the file is empty")
    header, body = rows[0], rows[1:]
    by_label = {label_text: key for key, (label_text, _) in PROFILE_COLUMNS.items()}
    keys: list[str] = []
    quantity_units: list[units.DisplayUnit] = []
    system: str | None = None
    for col, text in enumerate(header):
        m = _HEADER.match(text)
        if not m or m.group("label") not in by_label:
            raise ExportError(f"{path}: column {col + 1} header {text!r} is not a profile column")
        key = by_label[m.group("label")]
        unit_text = m.group("unit")
        quantity = COLUMN_QUANTITY[key]
        matches = [s for s in units.UNIT_SYSTEMS if (units.label(quantity, s) or "-") == unit_text]
        if not matches:
            raise ExportError(f"{path}: column {text!r} has unknown unit {unit_text!r}")
        if len(matches) == 1:
            if system is not None and system != matches[0]:
                raise ExportError(f"{path}: column {text!r} mixes unit systems ({system} and {matches[0]})")
            system = matches[0]
        keys.append(key)
        quantity_units.append(units.unit(quantity, matches[0]))
    data = np.full((len(body), len(keys)), np.nan)
    for r, row in enumerate(body):
        if len(row) != len(keys):
            raise ExportError(f"{path}: row {r + 2} has {len(row)} cells, the header has {len(keys)}")
        for c, cell in enumerate(row):
            if cell.strip():
                try:
                    data[r, c] = float(cell)
                except ValueError:
                    raise ExportError(f"{path}: row {r + 2}, column {header[c]!r}: {cell!r} is not a number") from None
    columns = {key: quantity_units[c].to_si(data[:, c]) for c, key in enumerate(keys)}
    return columns, system or "SI"


_UNSAFE = re.compile(r"[^A-Za-z0-9._-]+")
_RESERVED = {"con", "prn", "aux", "nul", *(f"com{i}" for i in range(1, 10)), *(f"lpt{i}" for i in range(1, 10))}


def safe_file_stem(name: str, fallback: str = "alternative") -> str:
    """A file-name stem from a user-typed name: letters, digits, ``._-`` only, no leading dot."""
    stem = _UNSAFE.sub("_", name.strip()).strip("._-")[:80]
    if not stem or stem.lower() in _RESERVED:
        stem = fallback if not stem else f"{stem}_"
    return stem


def csv_file_names(names: Iterable[str], prefix: str = "") -> list[str]:
    """Distinct safe file names (``.csv``) for alternative names, in order."""
    out: list[str] = []
    used: set[str] = set()
    for i, name in enumerate(names):
        stem = prefix + safe_file_stem(name, fallback=f"alternative_{i + 1}")
        candidate, n = stem, 2
        while candidate.lower() in used:
            candidate = f"{stem}-{n}"
            n += 1
        used.add(candidate.lower())
        out.append(candidate + ".csv")
    return out


def write_all_csv(
    results: Sequence[Result] | Mapping[str, Result],
    directory: str | os.PathLike,
    unit_system: str = "SI",
    prefix: str = "",
) -> list[Path]:
    """Write one profiles CSV per alternative into ``directory`` (created if missing).

    ``results`` is a list of results or a mapping name -> result. File names
    come from the alternative names, made safe and distinct. Returns the paths
    in the order of ``results``.
    """
    _check_system(unit_system)
    items = list(results.values()) if isinstance(results, Mapping) else list(results)
    directory = Path(directory)
    directory.mkdir(parents=True, exist_ok=True)
    names = csv_file_names([r.name for r in items], prefix=prefix)
    return [write_profiles_csv(r, directory / n, unit_system) for r, n in zip(items, names)]
