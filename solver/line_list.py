"""Line List: read a plant's line list (CSV or XLSX) row by row and build one project per line.

A line list is a table with one row per line (its tag) and the columns of :data:`COLUMNS`, named in
plain trade words with the unit in the header (``length [m]``, ``maintain temperature [°C]``).
Headers are matched ignoring case and spaces (``Length[M]`` is ``length [m]``; round brackets count
as square ones; ``degC`` as ``°C``); a mapping ``{"their header": "our column"}`` renames a list's
own headers first (:func:`read_column_map` reads it from a JSON file). Columns the list has beyond
ours are ignored.

:func:`read_line_list` streams the rows: one :class:`LineRow` (values parsed to SI) or, for a row
with mistakes, one :class:`RowProblem` per mistake naming the row (the header is row 1, as a
spreadsheet numbers it), the column and the value as written. A bad row never stops the others.

:func:`line_project` turns a row into an ordinary project from a **line template** (a project file):
the template's first alternative's first segment gives the pipe material, insulation layers, heater
and heat sinks; its feed gives the fluid, pressure and flow where the row gives none; the template
project's design cases and targets are kept. :func:`line_list_fingerprint` is the key a batch run
uses to skip lines already designed.

Values in :attr:`LineRow.values` are SI whatever the header's unit: temperatures in K, lengths and
thicknesses in m, flow in kg/s, heat loss in W/m; counts are whole numbers; blank cells are None.
"""

from __future__ import annotations

import codecs
import csv
import datetime
import hashlib
import itertools
import json
import math
import os
import re
import zipfile
from dataclasses import dataclass, field
from pathlib import Path
from typing import Annotated, Any, Callable, Iterator, Optional, Union

from pydantic import Field, TypeAdapter, ValidationError

from solver.catalogue import (
    INSULATION_MATERIALS,
    SOLUTIONS,
    insulation_key,
    normalise_nps,
    normalise_schedule,
    nps_sizes,
    pipe_dimensions,
    schedules_for,
)
from solver.errors import InputError
from solver.model import (
    NAME_MAX_CHARS,
    TEXT_MAX_CHARS,
    Buried,
    LayerThickness,
    MassFlow,
    Name,
    ProcessTemperature,
    Project,
    SegmentLength,
    SolutionFluid,
    StillAir,
    TableFluid,
    Text,
    Wind,
)
from solver.project_io import validation_problems
from solver.properties import PURE_FLUIDS
from solver.variants import STANDARD_INSULATION_THICKNESSES_M

# --------------------------------------------------------------------------- the columns

TAG = "tag"
SERVICE = "service"
FLUID = "fluid"
SIZE = "size [NPS]"
SCHEDULE = "schedule"
LENGTH = "length [m]"
MAINTAIN = "maintain temperature [°C]"
MAXIMUM = "maximum temperature [°C]"
FLOW = "flow [kg/h]"
INLET = "inlet temperature [°C]"
LOCATION = "location"
INSULATION = "insulation"
THICKNESS = "insulation thickness [mm]"
SURFACE_LIMIT = "surface limit [°C]"
HEAT_LOSS_LIMIT = "heat loss limit [W/m]"
ELBOWS = "elbows"
VALVES = "valves"
FLANGE_PAIRS = "flange pairs"
SUPPORTS = "supports"
CIRCUIT_LENGTH = "max circuit length [m]"


@dataclass(frozen=True)
class ColumnSpec:
    """One column of a line list.

    name : the header as we spell it (unit in square brackets where it has one)
    required : a list without it cannot be read; a row with it blank is refused
    unit : the unit the column is written in ("" for words and counts)
    meaning : what it holds, in plain words (for the README and the app)
    """

    name: str
    required: bool
    unit: str
    meaning: str


COLUMNS: tuple[ColumnSpec, ...] = (
    ColumnSpec(TAG, True, "", "line tag, unique in the list (case ignored), e.g. FW-2-RS-1041"),
    ColumnSpec(SERVICE, False, "", "what the line carries, in words (e.g. residue to Unit 4)"),
    ColumnSpec(FLUID, False, "", f"{', '.join(PURE_FLUIDS.values())}; a solution with its strength, e.g. "
               "'MEG 30 %' or 'Propylene glycol 40 %' (mass fraction); or the template's fluid by its name; "
               "blank = the template's fluid"),
    ColumnSpec(SIZE, True, "NPS", 'nominal pipe size: 2, 1-1/2, 3/4, "1 1/2", 1.5 or DN40 '
               "(ASME B36.10M sizes 1/8 to 24)"),
    ColumnSpec(SCHEDULE, False, "", "pipe schedule: 40, 80, STD, XS, 10S...; blank = the template's"),
    ColumnSpec(LENGTH, True, "m", "length of the line, more than 0"),
    ColumnSpec(MAINTAIN, True, "°C", "the lowest bulk temperature the tracing must hold in the worst case"),
    ColumnSpec(MAXIMUM, False, "°C", "the highest temperature the pipe wall may reach (the hot case's limit); "
               "blank = the template's limit"),
    ColumnSpec(FLOW, False, "kg/h", "operating mass flow; blank = the template's flow"),
    ColumnSpec(INLET, False, "°C", "temperature at the inlet when flowing; blank = maintain temperature + 5 K"),
    ColumnSpec(LOCATION, True, "", "indoors, outdoors or buried"),
    ColumnSpec(INSULATION, False, "", f"insulation material from the catalogue ({', '.join(INSULATION_MATERIALS)}; "
               "'rock wool', 'foam glass' and the like accepted); blank = the template's"),
    ColumnSpec(THICKNESS, False, "mm", "insulation thickness; 0 = bare pipe; blank = size it from the standard "
               "thicknesses"),
    ColumnSpec(SURFACE_LIMIT, False, "°C", "personnel protection: the outer surface at most this hot"),
    ColumnSpec(HEAT_LOSS_LIMIT, False, "W/m", "heat loss per metre of line at most this"),
    ColumnSpec(ELBOWS, False, "", "number of 90° elbows (0 or more); blank = the template's fittings"),
    ColumnSpec(VALVES, False, "", "number of valves (heat sinks, 0 or more); blank = the template's"),
    ColumnSpec(FLANGE_PAIRS, False, "", "number of flange pairs (heat sinks, 0 or more); blank = the template's"),
    ColumnSpec(SUPPORTS, False, "", "number of pipe supports (heat sinks, 0 or more); blank = the template's"),
    ColumnSpec(CIRCUIT_LENGTH, False, "m", "longest heater circuit allowed; gives the number of circuits"),
)

_COLUMN_NAMES = tuple(spec.name for spec in COLUMNS)

#: Bumped whenever line_project builds a different project from the same row and template, so a batch
#: run does not skip lines designed under the old recipe (part of the fingerprint).
LINE_PROJECT_RECIPE = 1


def columns_markdown() -> str:
    """The column table as Markdown (README, DEVELOPERS): column, required, meaning."""
    lines = ["| column | required | meaning |", "|---|---|---|"]
    lines += [f"| `{c.name}` | {'yes' if c.required else 'no'} | {c.meaning} |" for c in COLUMNS]
    return "\n".join(lines)


# --------------------------------------------------------------------------- rows and problems


@dataclass
class RowProblem:
    """A mistake in one cell (or a missing column): the row as a spreadsheet numbers it (header = 1, first
    data row = 2), our column name, the value as written ("" when blank or missing) and what is wrong in
    plain words with units. ``tag`` is the row's tag as written, where it has one."""

    row: int
    column: str
    value: str
    message: str
    tag: str = ""

    def __str__(self) -> str:
        shown = f"'{_shorten(self.value)}'" if self.value != "" else "(blank)"
        return f"row {self.row}, column '{self.column}': {shown} — {self.message}"


@dataclass
class LineRow:
    """One good row: its row number, its tag and every column's value in SI by column name (None =
    blank). ``written`` keeps each cell as written, for messages; it does not take part in equality."""

    row: int
    tag: str
    values: dict[str, Any]
    written: dict[str, str] = field(default_factory=dict, compare=False, repr=False)


class _Bad(Exception):
    """A cell's value cannot be used; the message says why in plain words."""


def _shorten(text: str, limit: int = 60) -> str:
    return text if len(text) <= limit else text[: limit - 1] + "…"


# --------------------------------------------------------------------------- cells


def _blank(cell) -> bool:
    return cell is None or (isinstance(cell, str) and cell.strip() == "")


def _as_written(cell) -> str:
    """A cell's value as the user wrote it: text as is, a spreadsheet number without a spurious '.0'."""
    if cell is None:
        return ""
    if isinstance(cell, float) and cell.is_integer() and abs(cell) < 1e15:
        return str(int(cell))
    if isinstance(cell, (datetime.date, datetime.time)):
        return cell.isoformat()
    return str(cell).strip()


def _number(cell, column: str) -> float:
    if isinstance(cell, (datetime.date, datetime.time, datetime.timedelta)):
        raise _Bad("the spreadsheet holds a date or time here, not a number: format the column as a number")
    if isinstance(cell, bool):
        raise _Bad("not a number")
    if isinstance(cell, (int, float)):
        value = float(cell)
    else:
        text = str(cell).strip().replace("\u2212", "-")  # a typographic minus
        try:
            value = float(text)
        except ValueError:
            hint = ("; use a point as the decimal mark" if re.fullmatch(r"[-+]?\d+,\d+", text)
                    else f"; give a number in {_unit_words(column)}")
            raise _Bad(f"not a number{hint}") from None
    if not math.isfinite(value):
        raise _Bad("not a finite number")
    return value


def _unit_words(column: str) -> str:
    spec = next(c for c in COLUMNS if c.name == column)
    return spec.unit or "plain numbers"


def _base(column: str) -> str:
    return column.split("[")[0].strip()


_BOUND_WORDS = {"greater_than": ("gt", "more than"), "greater_than_equal": ("ge", "at least"),
                "less_than": ("lt", "less than"), "less_than_equal": ("le", "at most")}


def _within(value_si: float, adapter: TypeAdapter, column: str, from_si: Callable[[float], float]) -> float:
    """Hold a value to the model's own bounds for its key (solver.model, the one place they are written);
    a refusal is worded in the column's unit."""
    try:
        adapter.validate_python(value_si)
    except ValidationError as exc:
        err = exc.errors(include_url=False)[0]
        kind = err.get("type")
        if kind in _BOUND_WORDS:
            key, words = _BOUND_WORDS[kind]
            limit = from_si(float(err["ctx"][key]))
            unit = _unit_words(column)
            raise _Bad(f"{_base(column)} must be {words} {round(limit, 9):g} {unit}") from None
        raise _Bad(err.get("msg", "not accepted")) from None
    return value_si


def _kelvin(k: float) -> float:
    return k - 273.15


_TEMPERATURE = TypeAdapter(ProcessTemperature)
_LENGTH = TypeAdapter(SegmentLength)
_FLOW = TypeAdapter(MassFlow)
_THICKNESS = TypeAdapter(LayerThickness)
# the heat loss per metre a line may be held to: above 0, at most the largest heat input per metre (solver.model)
_HEAT_LOSS = TypeAdapter(Annotated[float, Field(gt=0.0, le=1e4)])
# counts of fittings and heat sinks: the model's own limit per entry (Fitting.count, HeatSink.count)
_COUNT_MAX = 10_000
_NAME = TypeAdapter(Name)
_TEXT = TypeAdapter(Text)


def _temperature(cell, column: str, context) -> float:
    return _within(_number(cell, column) + 273.15, _TEMPERATURE, column, _kelvin)


def _length(cell, column: str, context) -> float:
    return _within(_number(cell, column), _LENGTH, column, float)


def _flow(cell, column: str, context) -> float:
    return _within(_number(cell, column) / 3600.0, _FLOW, column, lambda kg_s: kg_s * 3600.0)


def _thickness(cell, column: str, context) -> float:
    mm = _number(cell, column)
    if mm == 0.0:
        return 0.0  # bare pipe
    if mm < 0.0:
        raise _Bad(f"{_base(column)} must be 0 (bare pipe) or more mm")
    return _within(mm / 1000.0, _THICKNESS, column, lambda m: m * 1000.0)


def _heat_loss(cell, column: str, context) -> float:
    return _within(_number(cell, column), _HEAT_LOSS, column, float)


def _count(cell, column: str, context) -> int:
    value = _number(cell, column)
    if not value.is_integer():
        raise _Bad(f"the number of {column} must be a whole number")
    if value < 0:
        raise _Bad(f"the number of {column} must be 0 or more")
    if value > _COUNT_MAX:
        raise _Bad(f"the number of {column} must be at most {_COUNT_MAX:,}")
    return int(value)


def _tag(cell, column: str, context) -> str:
    text = _as_written(cell)
    try:
        _NAME.validate_python(text)
    except ValidationError:
        raise _Bad(f"a tag must be at most {NAME_MAX_CHARS} characters of text that can be saved") from None
    return text


def _service(cell, column: str, context) -> str:
    text = _as_written(cell)
    try:
        _TEXT.validate_python(text)
    except ValidationError:
        raise _Bad(f"the service must be at most {TEXT_MAX_CHARS:,} characters of text that can be saved") from None
    return text


def _size(cell, column: str, context) -> str:
    if isinstance(cell, (datetime.date, datetime.time, datetime.datetime)):
        raise _Bad("the spreadsheet holds a date here (a size such as 1/2 typed into a cell becomes a date): "
                   "format the column as text and type the size again")
    try:
        return normalise_nps(cell if isinstance(cell, (int, float)) else _as_written(cell))
    except InputError:
        raise _Bad(f"unknown nominal pipe size; the sizes held (ASME B36.10M): {', '.join(nps_sizes())}") from None


def _known_schedules() -> tuple[str, ...]:
    seen: list[str] = []
    for nps in nps_sizes():
        seen += [s for s in schedules_for(nps) if s not in seen]
    return tuple(seen)


_SCHEDULES = _known_schedules()


def _schedule(cell, column: str, context) -> str:
    schedule = normalise_schedule(_as_written(cell))
    if schedule not in _SCHEDULES:
        raise _Bad(f"unknown schedule; schedules of ASME B36.10M/B36.19M: {', '.join(_SCHEDULES)}")
    return schedule


_LOCATIONS = {"indoors": "indoors", "indoor": "indoors", "inside": "indoors", "in building": "indoors",
              "outdoors": "outdoors", "outdoor": "outdoors", "outside": "outdoors",
              "buried": "buried", "underground": "buried", "below ground": "buried"}


def _location(cell, column: str, context) -> str:
    text = " ".join(_as_written(cell).lower().split())
    if text not in _LOCATIONS:
        raise _Bad("unknown location; give indoors, outdoors or buried")
    return _LOCATIONS[text]


def _insulation(cell, column: str, context) -> str:
    key = insulation_key(_as_written(cell))
    if key is None:
        raise _Bad(f"unknown insulation material; the catalogue has: {', '.join(INSULATION_MATERIALS)}")
    return key


def _fluid_names(fluid) -> tuple[str, ...]:
    """Names a row may use for the template's fluid (lower case)."""
    if isinstance(fluid, SolutionFluid):
        label = SOLUTIONS[fluid.solute][0]
        return (fluid.solute.lower(), label.lower())
    names = [fluid.name.lower()]
    if fluid.kind == "pure" and fluid.name in PURE_FLUIDS:
        names.append(PURE_FLUIDS[fluid.name].lower())
    return tuple(names)


def _fluid_label(fluid) -> str:
    if isinstance(fluid, SolutionFluid):
        return f"{fluid.solute} {fluid.concentration * 100:g} %"
    return PURE_FLUIDS.get(fluid.name, fluid.name) if fluid.kind == "pure" else fluid.name


def _template_fluid_value(fluid) -> dict:
    if isinstance(fluid, TableFluid):
        return {"kind": "table", "name": fluid.name}  # line_project takes the template's table itself
    return fluid.model_dump(mode="json")


_STRENGTH_AFTER = re.compile(
    r"(?P<name>.*?)[\s,(]*(?P<number>\d+(?:\.\d+)?)\s*(?P<percent>%)?\s*(?:\(?\s*(?:by\s+)?"
    r"(?:mass|wt|w/w|weight)\s*\)?)?\s*\)?")
_STRENGTH_BEFORE = re.compile(r"(?P<number>\d+(?:\.\d+)?)\s*(?P<percent>%)\s*(?:(?:mass|wt|w/w)\s+)?(?P<name>.+)")


def _solution_code(name: str) -> Optional[str]:
    text = " ".join(name.lower().split())
    for code, (label, *_rest) in SOLUTIONS.items():
        if text in (code.lower(), label.lower()):
            return code
    return None


def _fluid(cell, column: str, context) -> dict:
    text = " ".join(_as_written(cell).split())
    low = text.lower()
    template_fluid = context.get("template_fluid")
    if template_fluid is not None and low in _fluid_names(template_fluid):
        return _template_fluid_value(template_fluid)
    for key, label in PURE_FLUIDS.items():
        if low in (key.lower(), label.lower()):
            return {"kind": "pure", "name": key}
    match = _STRENGTH_BEFORE.fullmatch(low) or _STRENGTH_AFTER.fullmatch(low)
    if match and _solution_code(match["name"]):
        code = _solution_code(match["name"])
        label, basis, low_fraction, high_fraction = SOLUTIONS[code]
        number = float(match["number"])
        if not match["percent"] and number <= 1.0:
            raise _Bad(f"give the strength of the {label.lower()} in percent, e.g. '{code} 30 %'")
        fraction = number / 100.0
        if not (low_fraction <= fraction <= high_fraction):
            raise _Bad(f"{label} is defined for {low_fraction * 100:g} to {high_fraction * 100:g} % "
                       f"({basis} fraction)")
        return {"kind": "solution", "solute": code, "concentration": fraction}
    if _solution_code(low):
        label = SOLUTIONS[_solution_code(low)][0]
        raise _Bad(f"give the strength of the {label.lower()}, e.g. '{_solution_code(low)} 30 %'")
    known = ", ".join(PURE_FLUIDS.values())
    codes = ", ".join(f"{code} ({label.lower()})" for code, (label, *_r) in SOLUTIONS.items())
    own = f"; or the template's fluid, '{_fluid_label(template_fluid)}'" if template_fluid is not None else ""
    raise _Bad(f"unknown fluid; the app knows {known}; solutions with their strength, e.g. 'MEG 30 %': {codes}{own}")


_PARSERS: dict[str, Callable[[Any, str, dict], Any]] = {
    TAG: _tag, SERVICE: _service, FLUID: _fluid, SIZE: _size, SCHEDULE: _schedule, LENGTH: _length,
    MAINTAIN: _temperature, MAXIMUM: _temperature, FLOW: _flow, INLET: _temperature, LOCATION: _location,
    INSULATION: _insulation, THICKNESS: _thickness, SURFACE_LIMIT: _temperature, HEAT_LOSS_LIMIT: _heat_loss,
    ELBOWS: _count, VALVES: _count, FLANGE_PAIRS: _count, SUPPORTS: _count, CIRCUIT_LENGTH: _length,
}
assert set(_PARSERS) == set(_COLUMN_NAMES)


# --------------------------------------------------------------------------- headers and the mapping file


def _header_key(text) -> str:
    """A header as compared: lower case, no spaces, round brackets as square, degC and º as °."""
    s = _as_written(text).lower().replace("(", "[").replace(")", "]").replace("º", "°")
    s = re.sub(r"deg(?:ree)?s?\s*c\b", "°c", s)
    return re.sub(r"\s+", "", s)


_OUR_KEYS = {_header_key(name): name for name in _COLUMN_NAMES}


def read_column_map(path: Union[str, os.PathLike]) -> dict[str, str]:
    """Read a mapping file: a JSON object ``{"their header": "our column", ...}``. Raises
    :class:`InputError` naming the file when it is not one; the columns are checked by :func:`read_line_list`."""
    try:
        data = json.loads(Path(path).read_text(encoding="utf-8-sig"))
    except (OSError, UnicodeDecodeError, ValueError) as exc:
        raise InputError("column mapping", str(path), f"cannot be read as JSON ({exc})") from None
    if not isinstance(data, dict) or not all(isinstance(k, str) and isinstance(v, str) for k, v in data.items()):
        raise InputError("column mapping", str(path),
                         'must be a JSON object of header texts, {"their header": "our column", ...}')
    return data


def _mapping_keys(columns: Optional[dict[str, str]]) -> dict[str, str]:
    mapping: dict[str, str] = {}
    for theirs, ours in (columns or {}).items():
        name = _OUR_KEYS.get(_header_key(ours))
        if name is None:
            raise InputError("column mapping", ours,
                             f"maps {theirs!r} to no column of the line list; the columns: {', '.join(_COLUMN_NAMES)}")
        mapping[_header_key(theirs)] = name
    return mapping


# --------------------------------------------------------------------------- reading


def read_line_list(path: Union[str, os.PathLike], columns: Optional[dict[str, str]] = None, *,
                   template: Optional[Project] = None) -> Iterator[Union[LineRow, RowProblem]]:
    """Stream a line list: a :class:`LineRow` per good row, a :class:`RowProblem` per mistake.

    path : a ``.csv`` file (UTF-8, or Windows-1252 where it is not UTF-8; comma, semicolon or tab between
        cells, told from the header line) or an ``.xlsx``/``.xlsm`` workbook (its first sheet, read with
        openpyxl in read-only mode, values of formulas as last saved)
    columns : ``{"their header": "our column"}``, applied before our own names (:func:`read_column_map`)
    template : the line template; its fluid's name is then accepted in the ``fluid`` column (a user's
        table fluid has no other name a row could give)

    The header is the first non-blank row naming a column of ours (titles above it, up to nine rows, are
    passed over); rows are numbered as a spreadsheet shows them (header = 1 when the list starts at the
    top). Blank rows are skipped. A missing required column is reported once on the
    header row, and then fails every row with the same message. Every mistake of a row is reported (one
    RowProblem each) and the row is skipped. Tags must be unique (case and surrounding spaces ignored).

    Nothing but the tags seen so far is kept between rows. Raises :class:`InputError` at once for a file
    that cannot be read as a line list (missing, another format) or a mapping that names no column.
    """
    path = Path(path)
    mapping = _mapping_keys(columns)
    if not path.is_file():
        raise InputError("line list", str(path), "no such file")
    suffix = path.suffix.lower()
    if suffix in (".xlsx", ".xlsm"):
        if not zipfile.is_zipfile(path):
            raise InputError("line list", str(path), "not an XLSX workbook (save it from the spreadsheet as .xlsx)")
        records = _xlsx_records(path)
    elif suffix in (".csv", ".txt"):
        records = _csv_records(path, _csv_encoding(path))
    else:
        raise InputError("line list", str(path), "give a .csv or .xlsx file")
    context = {"template_fluid": template.alternatives[0].fluid if template is not None else None}
    return _rows(records, mapping, context)


def _csv_encoding(path: Path) -> str:
    """UTF-8 (a byte-order mark skipped) where the whole file decodes as such, else Windows-1252 (what a
    spreadsheet's plain "CSV" gives on many machines). One streaming pass over the bytes."""
    decoder = codecs.getincrementaldecoder("utf-8")()
    with open(path, "rb") as fh:
        try:
            while chunk := fh.read(1 << 16):
                decoder.decode(chunk)
            decoder.decode(b"", final=True)
        except UnicodeDecodeError:
            return "cp1252"
    return "utf-8-sig"


def _csv_records(path: Path, encoding: str) -> Iterator[tuple[int, list]]:
    with open(path, newline="", encoding=encoding, errors="replace") as fh:
        first = fh.readline()
        delimiter = max((",", ";", "\t"), key=first.count) if first.strip() else ","
        fh.seek(0)
        for number, record in enumerate(csv.reader(fh, delimiter=delimiter), start=1):
            yield number, record


def _xlsx_records(path: Path) -> Iterator[tuple[int, list]]:
    from openpyxl import load_workbook  # only for a workbook: reading a CSV needs none of it

    try:
        book = load_workbook(path, read_only=True, data_only=True)
    except Exception as exc:  # openpyxl raises many kinds for a damaged workbook
        raise InputError("line list", str(path), f"cannot be read as an XLSX workbook ({exc})") from None
    try:
        sheet = book.worksheets[0]
        for number, record in enumerate(sheet.iter_rows(min_row=1, values_only=True), start=1):
            yield number, list(record)
    finally:
        book.close()


#: Rows above the header a list may have (a title, a revision note): the first of the first this many
#: non-blank rows that names a column of ours is the header.
_HEADER_SEARCH_ROWS = 10


def _rows(records: Iterator[tuple[int, list]], mapping: dict[str, str],
          context: dict) -> Iterator[Union[LineRow, RowProblem]]:
    records = ((number, record) for number, record in records if not all(_blank(cell) for cell in record))
    leading: list[tuple[int, list]] = []
    for number, record in records:
        leading.append((number, record))
        if any((_header_key(c) in mapping or _header_key(c) in _OUR_KEYS) for c in record):
            break
        if len(leading) == _HEADER_SEARCH_ROWS:
            break  # no row names a column: the first is the header after all (and reports what it lacks)
    if not leading:  # an empty list: say what it lacks
        for spec in COLUMNS:
            if spec.required:
                yield RowProblem(1, spec.name, "", f"the list is empty: no header row with a column '{spec.name}'")
        return
    found = any((_header_key(c) in mapping or _header_key(c) in _OUR_KEYS) for c in leading[-1][1])
    header_at = len(leading) - 1 if found else 0
    header_row, header = leading[header_at]
    index, failed = _read_header(header, mapping)
    for column, message in failed.items():
        yield RowProblem(header_row, column, "", message)
    seen_tags: dict[str, int] = {}
    for number, record in itertools.chain(leading[header_at + 1:], records):
        yield from _one_row(number, record, index, failed, seen_tags, context)


def _read_header(record: list, mapping: dict[str, str]) -> tuple[dict[str, int], dict[str, str]]:
    index: dict[str, int] = {}
    failed: dict[str, str] = {}
    for position, cell in enumerate(record):
        key = _header_key(cell)
        column = mapping.get(key) or _OUR_KEYS.get(key)
        if column is None:
            continue  # a column of theirs we do not use
        if column in index:
            failed[column] = (f"the header has column '{column}' twice (columns {index[column] + 1} and "
                              f"{position + 1}); keep one")
            continue
        index[column] = position
    for spec in COLUMNS:
        if spec.required and spec.name not in index:
            failed[spec.name] = (f"the list has no column '{spec.name}' (a required column; rename a header or "
                                 "map it with a column mapping file)")
    return index, failed


def _one_row(number: int, record: list, index: dict[str, int], failed: dict[str, str],
             seen_tags: dict[str, int], context: dict) -> Iterator[Union[LineRow, RowProblem]]:
    cells = {column: (record[position] if position < len(record) else None) for column, position in index.items()}
    written = {column: _as_written(cell) for column, cell in cells.items()}
    tag_text = written.get(TAG, "")
    problems = [RowProblem(number, column, "", message, tag_text) for column, message in failed.items()]
    values: dict[str, Any] = {}
    for spec in COLUMNS:
        cell = cells.get(spec.name)
        if _blank(cell):
            values[spec.name] = None
            if spec.required and spec.name not in failed:
                problems.append(RowProblem(number, spec.name, "", f"{_base(spec.name)} is required", tag_text))
            continue
        try:
            values[spec.name] = _PARSERS[spec.name](cell, spec.name, context)
        except _Bad as bad:
            values[spec.name] = None
            problems.append(RowProblem(number, spec.name, written[spec.name], str(bad), tag_text))
    problems += _row_rules(number, values, written, seen_tags, tag_text)
    if problems:
        yield from problems
        return
    yield LineRow(number, values[TAG], values, written)


def _row_rules(number: int, values: dict, written: dict, seen_tags: dict[str, int], tag_text: str) -> list[RowProblem]:
    """Rules across columns: schedule for the size, maximum above maintain, tags unique."""
    problems = []
    nps, schedule = values.get(SIZE), values.get(SCHEDULE)
    if nps is not None and schedule is not None and schedule not in schedules_for(nps):
        problems.append(RowProblem(number, SCHEDULE, written[SCHEDULE],
                                   f"NPS {nps} has no schedule {schedule}; it has {', '.join(schedules_for(nps))}",
                                   tag_text))
    maintain, maximum = values.get(MAINTAIN), values.get(MAXIMUM)
    if maintain is not None and maximum is not None and maximum < maintain:
        problems.append(RowProblem(number, MAXIMUM, written[MAXIMUM],
                                   f"the maximum temperature is below the maintain temperature "
                                   f"({written[MAINTAIN]} °C)", tag_text))
    tag = values.get(TAG)
    if tag:
        key = tag.casefold()
        if key in seen_tags:
            problems.append(RowProblem(number, TAG, written[TAG],
                                       f"the tag is already on row {seen_tags[key]}; tags must be unique", tag_text))
        else:
            seen_tags[key] = number
    return problems


# --------------------------------------------------------------------------- one project per line

#: Outdoor air where the template has no outdoor segment: the model's own defaults for wind (10 °C, 5 m/s),
#: an invented operating condition; the worst and hot cases replace it with the design cases anyway.
OUTDOOR_DEFAULT = Wind()
#: Indoor air where the template has no indoor segment: 10 °C, an invented figure for an unheated process
#: building (design cases leave indoor air as entered, so this is the design ambient indoors; give the
#: template an indoor segment to set your own).
INDOOR_DEFAULT = StillAir(temperature_K=283.15, indoors=True)
#: Soil where the template has no buried segment: the model's defaults (10 °C soil, 1 m to the pipe's
#: centreline, 1.2 W/(m·K) moist soil), invented; give the template a buried segment to set your own.
BURIED_DEFAULT = Buried()

_ELBOW_KINDS = ("elbow_90", "bend_90")
_SINK_COLUMNS = {VALVES: "valve", FLANGE_PAIRS: "flange_pair", SUPPORTS: "pipe_support"}


def line_project(row: LineRow, template: Project) -> Project:
    """The project of one line: the template with one alternative and one segment, both named by the tag.

    From the row: length, NPS (and schedule, else the template pipe's), location, maintain temperature
    (``Limits.maintain_temperature_K``; a thermostat heater's set point too), maximum temperature
    (``Limits.max_inner_wall_temperature_K``, else the template's), fluid, flow and inlet temperature
    (else the template feed's fluid and flow, and maintain + 5 K), the first insulation layer's material
    and thickness (thickness 0 = no insulation; blank = the template's, or the thinnest standard
    thickness where the template has none, for the design step to size), elbows (one entry of the
    template's 90° elbow kind, else ``elbow_90_standard``), valves, flange pairs and supports (heat sinks
    of the catalogue kinds, keeping a template item's own equivalent length). A blank count keeps the
    template's entries of that kind.

    From the template: the first alternative's first segment's pipe material and roughness, layers,
    heater, heat sinks of other kinds, other fittings and design margin; the feed's pressure (and phase,
    where the fluid is the template's); the project's targets and design cases. Surroundings by location:
    the first segment of the template's first alternative in that place (outdoors: wind or outdoor still
    air; indoors: still air marked indoors; buried), else :data:`OUTDOOR_DEFAULT`, :data:`INDOOR_DEFAULT`
    or :data:`BURIED_DEFAULT`. Elevation change is 0 (a line list gives none).

    The service goes to the alternative's and the project's description. Surface limit, heat loss limit
    and max circuit length are not part of a project: the design step reads them from ``row.values``.

    Raises :class:`InputError` naming the column and the value as written when the project refuses a
    value (``field`` is the column, or ``"template"`` when no column of the row is to blame).
    """
    v = row.values
    alt0 = template.alternatives[0]
    tpl_seg = alt0.segments[0]
    seg = tpl_seg.model_dump(mode="python")
    columns_of_sinks: list[str] = []

    seg.update(name=row.tag, length_m=v.get(LENGTH), elevation_change_m=0.0)
    seg["pipe"] = _pipe(row, seg["pipe"])
    seg["insulation"] = _layers(row, seg["insulation"])
    seg["surroundings"] = _surroundings(v.get(LOCATION), alt0).model_dump(mode="python")
    if seg["heater"] is not None and seg["heater"]["kind"] == "thermostat":
        seg["heater"]["set_point_K"] = v.get(MAINTAIN)
    seg["fittings"] = _fittings(v.get(ELBOWS), seg["fittings"])
    seg["heat_sinks"], columns_of_sinks = _heat_sinks(v, seg["heat_sinks"])

    fluid = _row_fluid(row, alt0.fluid)
    feed = alt0.feed.model_dump(mode="python")
    maintain = v.get(MAINTAIN)
    inlet = v.get(INLET)
    feed["inlet_temperature_K"] = inlet if inlet is not None else (maintain + 5.0 if maintain is not None else None)
    if v.get(FLOW) is not None:
        feed.update(mass_flow_kg_per_s=v[FLOW], volume_flow_m3_per_s=None)
    if fluid != alt0.fluid.model_dump(mode="python"):
        feed["phase"] = None  # the template's phase belongs to its fluid

    limits = alt0.limits.model_dump(mode="python")
    limits["maintain_temperature_K"] = maintain
    if v.get(MAXIMUM) is not None:
        limits["max_inner_wall_temperature_K"] = v[MAXIMUM]

    service = v.get(SERVICE) or ""
    alternative = {"name": row.tag, "description": service, "fluid": fluid, "feed": feed, "segments": [seg],
                   "limits": limits}
    project = template.model_dump(mode="python", exclude={"alternatives"})
    project.update(name=row.tag, description=service, alternatives=[alternative], baseline=None)
    try:
        return Project.model_validate(project)
    except ValidationError as exc:
        path, text = validation_problems(exc)[0]
        column = _column_of(path, columns_of_sinks, inlet_given=inlet is not None)
        raise InputError(column, row.written.get(column, ""), text) from None


def _pipe(row: LineRow, pipe: dict) -> dict:
    nps = row.values.get(SIZE)
    schedule = row.values.get(SCHEDULE) or (pipe.get("schedule") if pipe.get("bore") == "nps" else None)
    if schedule is None:
        raise InputError(SCHEDULE, "", "blank, and the template's pipe is given by its bore, not by a schedule: "
                                       "give a schedule")
    try:
        pipe_dimensions(nps, schedule)
    except InputError:
        column = SCHEDULE if row.values.get(SCHEDULE) else SIZE
        raise InputError(column, row.written.get(column, nps or ""),
                         f"NPS {nps} has no schedule {schedule}"
                         f"{'' if row.values.get(SCHEDULE) else ' (the template pipe schedule)'}; it has "
                         f"{', '.join(schedules_for(nps)) if nps else 'none'}: give a schedule") from None
    return {**pipe, "bore": "nps", "nps": nps, "schedule": schedule, "inner_diameter_m": None,
            "wall_thickness_m": None}


def _layers(row: LineRow, layers: list[dict]) -> list[dict]:
    material, thickness = row.values.get(INSULATION), row.values.get(THICKNESS)
    if thickness == 0.0:
        return []
    layers = [dict(layer) for layer in layers]
    if not layers:
        if material is None and thickness is None:
            return []
        if material is None:
            raise InputError(INSULATION, "", "blank, and the template has no insulation layer to take the "
                                             "material from: give the insulation material")
        layers = [{"material": material, "thickness_m": thickness or STANDARD_INSULATION_THICKNESSES_M[0],
                   "conductivity_W_per_mK": None}]
        return layers
    first = layers[0]
    if material is not None and insulation_key(first["material"]) != material:
        first.update(material=material, conductivity_W_per_mK=None)  # the template's k was for its material
    if thickness is not None:
        first["thickness_m"] = thickness
    return layers


def _is_indoor_air(sur) -> bool:
    return isinstance(sur, StillAir) and sur.indoors


def _surroundings(location: Optional[str], alternative):
    wanted = {
        "outdoors": lambda s: isinstance(s, Wind) or (isinstance(s, StillAir) and not s.indoors),
        "indoors": _is_indoor_air,
        "buried": lambda s: isinstance(s, Buried),
    }
    defaults = {"outdoors": OUTDOOR_DEFAULT, "indoors": INDOOR_DEFAULT, "buried": BURIED_DEFAULT}
    if location not in wanted:
        raise InputError(LOCATION, location or "", "give indoors, outdoors or buried")
    for segment in alternative.segments:
        if wanted[location](segment.surroundings):
            return segment.surroundings
    return defaults[location]


def _fittings(elbows: Optional[int], fittings: list[dict]) -> list[dict]:
    if elbows is None:
        return fittings
    template_elbows = [f for f in fittings if f["kind"].startswith(_ELBOW_KINDS)]
    others = [f for f in fittings if not f["kind"].startswith(_ELBOW_KINDS)]
    kind = template_elbows[0]["kind"] if template_elbows else "elbow_90_standard"
    return others + ([{"kind": kind, "count": elbows, "K": None, "label": ""}] if elbows else [])


def _heat_sinks(values: dict, sinks: list[dict]) -> tuple[list[dict], list[str]]:
    out: list[dict] = []
    columns: list[str] = []
    for sink in sinks:
        column = next((c for c, kind in _SINK_COLUMNS.items() if kind == sink["kind"]), "template")
        if column == "template" or values.get(column) is None:
            out.append(sink)
            columns.append(column)
    for column, kind in _SINK_COLUMNS.items():
        count = values.get(column)
        if not count:
            continue
        like = next((s for s in sinks if s["kind"] == kind), None)
        item = {**like, "count": count} if like is not None else {"kind": kind, "count": count}
        out.append(item)
        columns.append(column)
    return out, columns


def _row_fluid(row: LineRow, template_fluid) -> dict:
    given = row.values.get(FLUID)
    if given is None:
        return template_fluid.model_dump(mode="python")
    if given.get("kind") == "table":
        if isinstance(template_fluid, TableFluid) and template_fluid.name.lower() == str(given.get("name")).lower():
            return template_fluid.model_dump(mode="python")
        raise InputError(FLUID, row.written.get(FLUID, ""), "names a table fluid the template does not hold")
    return dict(given)


_PATH_COLUMNS: tuple[tuple[str, str], ...] = (
    (r"segments\[0\]\.length_m$", LENGTH),
    (r"\.pipe\.schedule", SCHEDULE),
    (r"\.pipe", SIZE),
    (r"\.insulation\[\d+\]\.thickness_m", THICKNESS),
    (r"\.insulation", INSULATION),
    (r"\.surroundings", LOCATION),
    (r"\.fittings", ELBOWS),
    (r"\.heater\.set_point_K", MAINTAIN),
    (r"\.feed\.(mass|volume)_flow", FLOW),
    (r"\.limits\.maintain_temperature_K", MAINTAIN),
    (r"\.limits\.max_inner_wall_temperature_K", MAXIMUM),
    (r"\.fluid", FLUID),
    (r"(^|\.)name$", TAG),
    (r"(^|\.)description$", SERVICE),
)


def _column_of(path: str, columns_of_sinks: list[str], inlet_given: bool) -> str:
    """The column to blame for a refusal at ``path`` of the built project ("template" when none)."""
    sink = re.search(r"\.heat_sinks\[(\d+)\]", path)
    if sink:
        i = int(sink.group(1))
        return columns_of_sinks[i] if i < len(columns_of_sinks) else "template"
    if re.search(r"\.feed\.inlet_temperature_K", path):
        return INLET if inlet_given else MAINTAIN
    for pattern, column in _PATH_COLUMNS:
        if re.search(pattern, path):
            return column
    return "template"


# --------------------------------------------------------------------------- the resume key


def line_list_fingerprint(row: LineRow, template: Project) -> str:
    """SHA-256 (hex) of the row's tag and SI values, the template's JSON and :data:`LINE_PROJECT_RECIPE`:
    the same whenever line_project would build the same project, so a rerun may skip the line. The row
    number and the cells as written take no part (moving a row or writing 12.50 for 12.5 changes nothing)."""
    payload = {"recipe": LINE_PROJECT_RECIPE, "tag": row.tag, "values": row.values,
               "template": template.model_dump(mode="json")}
    text = json.dumps(payload, sort_keys=True, separators=(",", ":"), ensure_ascii=False, allow_nan=False)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()
