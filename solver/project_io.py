"""Reading and writing project files (JSON, SI, diffable).

Loading runs the registered migrations on the raw JSON dict first (forward only,
one step per schema version), then validates against today's model and reports
every problem with its path and value. A file is held to more than the model: only
a regular file up to a size limit is read (``CALORUN_MAX_FILE_MB``), nesting and the
number of alternatives and segments are limited before anything is built, numbers
must be JSON numbers (strict), and the keys that define the line must be present.
Saving goes through the one safe write (:mod:`solver.safe_write`): a failed save
leaves the existing file untouched.
"""

from __future__ import annotations

import functools
import json
import math
import os
import reprlib
import stat
import types
import typing
from pathlib import Path
from typing import Any, Callable

from pydantic import BaseModel, ValidationError

from solver.errors import ProjectFileError
from solver.model import FORMAT_TAG, MAX_ALTERNATIVES, MAX_SEGMENTS, SCHEMA_VERSION, Project
from solver.safe_write import WriteRefused, atomic_write_text

# version -> function taking the raw dict of that version and returning the next version's dict.
MIGRATIONS: dict[int, Callable[[dict], dict]] = {}


def _v1_to_v2(data: dict) -> dict:
    """Schema 2 describes tracing as a heater (kind, output, runs): schema 1's ``heat_input_W_per_m`` (a
    constant output per metre of pipe) becomes a constant heater of that output, or no heater at 0."""
    for alt in data.get("alternatives") or []:
        for seg in (alt.get("segments") or []) if isinstance(alt, dict) else []:
            if isinstance(seg, dict) and "heat_input_W_per_m" in seg and "heater" not in seg:
                q = seg.pop("heat_input_W_per_m")
                if q != 0 or isinstance(q, bool):
                    seg["heater"] = {"kind": "constant", "output_W_per_m": q}  # a bad value is refused by the heater
    return data


MIGRATIONS[1] = _v1_to_v2


def migrate(raw: dict) -> dict:
    """Bring a raw project dict up to ``SCHEMA_VERSION``, one registered step at a time."""
    if not isinstance(raw, dict):
        raise ProjectFileError("Not a Calorun project", [("", f"the file holds a JSON {type(raw).__name__}, not an object")])
    tag = raw.get("format")
    if tag != FORMAT_TAG:
        raise ProjectFileError(
            "Not a Calorun project", [("format", f"expected {FORMAT_TAG!r}, got {tag!r}")]
        )
    version = raw.get("schema_version")
    if not isinstance(version, int) or isinstance(version, bool):
        raise ProjectFileError("Unknown project version", [("schema_version", f"must be a whole number, got {version!r}")])
    if version > SCHEMA_VERSION:
        raise ProjectFileError(
            "Project written by a newer Calorun",
            [("schema_version", f"this version reads up to {SCHEMA_VERSION}, got {version}")],
        )
    data = dict(raw)
    while version < SCHEMA_VERSION:
        step = MIGRATIONS.get(version)
        if step is None:
            raise ProjectFileError("Unknown project version", [("schema_version", f"no migration from {version}")])
        data = step(data)
        version += 1
        data["schema_version"] = version
    return data


def _path_text(loc: tuple) -> str:
    out = ""
    for part in loc:
        if isinstance(part, int):
            out += f"[{part}]"
        else:
            # pydantic puts the union tag into the location (e.g. 'surroundings.still_air.x'); keep it readable
            out += ("." if out else "") + str(part)
    return out


def _strip_union_tags(loc: tuple) -> tuple:
    tags = {"pure", "solution", "table", "still_air", "wind", "buried", "jacket", "fixed_wall", "adiabatic",
            "constant", "self_limiting", "thermostat"}
    cleaned = []
    for i, part in enumerate(loc):
        if isinstance(part, str) and part in tags and i > 0 and loc[i - 1] in ("fluid", "surroundings", "heater"):
            continue
        cleaned.append(part)
    return tuple(cleaned)


_BOUND_WORDS = {  # pydantic error type -> (its context key, words)
    "greater_than": ("gt", "more than"),
    "greater_than_equal": ("ge", "at least"),
    "less_than": ("lt", "less than"),
    "less_than_equal": ("le", "at most"),
}

# The unit a file key carries in its name (longest first), for messages such as
# "must be at most 1 m, got 1e+308 m".
_KEY_UNITS = (
    ("_m2K_per_W", "m²·K/W"), ("_W_per_m2K", "W/(m²·K)"), ("_W_per_mK", "W/(m·K)"), ("_J_per_kgK", "J/(kg·K)"),
    ("_kg_per_m3", "kg/m³"), ("_m3_per_s", "m³/s"), ("_kg_per_s", "kg/s"), ("_m_per_s", "m/s"),
    ("_W_per_m", "W/m"), ("_Pa_s", "Pa·s"), ("_Pa", "Pa"), ("_K", "K"), ("_W", "W"), ("_m", "m"),
)
_SHOWN_CHARS = 80  # a value quoted in a message: a file can hold megabytes of it
_SHORT_REPR = reprlib.Repr()  # shortens long text, lists and objects without building their whole repr
_SHORT_REPR.maxstring = _SHOWN_CHARS
_SHORT_REPR.maxother = _SHOWN_CHARS


def _unit_of(loc: tuple) -> str:
    key = next((part for part in reversed(loc) if isinstance(part, str)), "")
    return next((" " + unit for suffix, unit in _KEY_UNITS if key.endswith(suffix)), "")


def _shown(value: Any) -> str:
    """A value as a message quotes it (its repr), shortened: a file can hold megabytes of one."""
    return repr(value) if isinstance(value, (int, float)) or value is None else _SHORT_REPR.repr(value)


def validation_problems(exc: ValidationError) -> list[tuple[str, str]]:
    """Every pydantic error as ``(path, 'message, got value')``; bounds in the key's unit
    (``alternatives[0].segments[2].insulation[0].thickness_m``: ``must be at most 1 m, got 1e+308 m``)."""
    problems = []
    for err in exc.errors(include_url=False):
        loc = _strip_union_tags(tuple(err.get("loc", ())))
        kind = err.get("type")
        msg = err.get("msg", "invalid")
        msg = msg.removeprefix("Value error, ")
        value = err.get("input")
        if kind == "missing":
            text = "required, missing"
        elif kind in _BOUND_WORDS and isinstance(value, (int, float)) and not isinstance(value, bool):
            key, words = _BOUND_WORDS[kind]
            unit = _unit_of(loc)
            text = f"must be {words} {err.get('ctx', {}).get(key):g}{unit}, got {_shown(value)}{unit}"
        elif "got" in msg:
            text = msg
        else:
            text = f"{msg.lower() if msg[:1].isupper() and not msg[1:2].isupper() else msg}, got {_shown(value)}"
        problems.append((_path_text(loc), text))
    return problems


# --------------------------------------------------------------------------- keys a file must give


def _missing_in_file(model: type[BaseModel], raw: Any, loc: tuple) -> list[dict]:
    """Pydantic error details for every key that defines the line but is missing from ``raw``.

    Each model names its keys (``required_in_file``/``missing_in_file`` in :mod:`solver.model`);
    the model keeps its defaults for code and the app's "new segment", but a file must say them: a
    missing length or fluid is never read as 10 m or water.
    """
    if type(raw) is not dict:
        return []  # the wrong type is the model's to report
    out: list[dict] = []
    for item in model.missing_in_file(raw):
        if isinstance(item, str):
            out.append({"type": "missing", "loc": loc + (item,), "input": raw})
        else:
            out.append({"type": "value_error", "loc": loc, "input": raw, "ctx": {"error": item}})
    for name, is_list, models in _model_fields_of(model):
        value = raw.get(name)
        if is_list:
            if type(value) is list:
                for i, item in enumerate(value):
                    out += _missing_in_one_of(models, item, loc + (name, i))
        elif value is not None:
            out += _missing_in_one_of(models, value, loc + (name,))
    return out


def _missing_in_one_of(models: tuple, raw: Any, loc: tuple) -> list[dict]:
    if len(models) == 1:
        return _missing_in_file(models[0], raw, loc)
    if type(raw) is dict:  # a union told apart by its 'kind'
        for model in models:
            if model.model_fields["kind"].default == raw.get("kind"):
                return _missing_in_file(model, raw, loc)
    return []


@functools.lru_cache(maxsize=None)
def _model_fields_of(model: type[BaseModel]) -> tuple[tuple[str, bool, tuple], ...]:
    """The fields of ``model`` that hold models: (name, holds a list, the model or the union's models)."""
    found = []
    for name, field in model.model_fields.items():
        annotation, is_list = field.annotation, False
        if typing.get_origin(annotation) is list:
            annotation, is_list = typing.get_args(annotation)[0], True
        if typing.get_origin(annotation) is typing.Annotated:
            annotation = typing.get_args(annotation)[0]
        members = typing.get_args(annotation) if typing.get_origin(annotation) in (typing.Union, types.UnionType) \
            else (annotation,)
        models = tuple(m for m in members if isinstance(m, type) and issubclass(m, BaseModel))
        if models and (len(models) == 1 or all("kind" in m.model_fields for m in models)):
            found.append((name, is_list, models))
    return tuple(found)


def _error_details(err: dict) -> dict:
    """A reported pydantic error back in the form ``ValidationError.from_exception_data`` takes."""
    details = {"type": err["type"], "loc": err["loc"], "input": err.get("input")}
    if err.get("ctx"):
        details["ctx"] = err["ctx"]
    return details


# --------------------------------------------------------------------------- sizes and nesting

#: The largest project file opened without being told otherwise, in MB (10⁶ bytes): the most segments
#: the model allows (20 000 in one alternative) written in full take about 25 MB (10 000 segments:
#: 12.4 MB and about 1 s to load, measured), so the default opens any file Calorun writes of that size.
DEFAULT_MAX_FILE_MB = 32.0
#: The environment variable that raises (or lowers) that limit, in MB; ``calorun --max-file-mb`` sets it.
MAX_FILE_MB_VARIABLE = "CALORUN_MAX_FILE_MB"
#: The deepest nesting of lists and objects a project file may have: the model itself is 7 deep
#: (project > alternatives > alternative > segments > segment > fittings > fitting).
MAX_NESTING = 64


def max_file_bytes(max_bytes: int | None = None) -> int:
    """The size limit in bytes: ``max_bytes`` when given, else ``CALORUN_MAX_FILE_MB``, else the default."""
    if max_bytes is not None:
        return int(max_bytes)
    setting = os.environ.get(MAX_FILE_MB_VARIABLE, "").strip()
    if not setting:
        return int(DEFAULT_MAX_FILE_MB * 1e6)
    try:
        mb = float(setting)
    except ValueError:
        mb = math.nan
    if not (math.isfinite(mb) and mb > 0):
        raise ProjectFileError(
            "Cannot open project files",
            [("", f"{MAX_FILE_MB_VARIABLE} must be a number of megabytes above 0, got {setting[:40]!r}")],
        )
    return int(mb * 1e6)


def _mb(n_bytes: float) -> str:
    mb = n_bytes / 1e6
    return f"{mb:,.0f}" if mb >= 100 else f"{mb:.3g}"


def _too_big(p: Path, size: int, limit: int, at_least: bool = False) -> ProjectFileError:
    suggest = max(1, math.ceil(2 * max(size, limit) / 1e6))  # whole MB, with room to spare
    return ProjectFileError(
        f"Cannot open {p}",
        [("", f"the file is {'more than ' if at_least else ''}{_mb(size)} MB; Calorun opens project files of "
              f"up to {_mb(limit)} MB. To open a larger one, set the environment variable "
              f"{MAX_FILE_MB_VARIABLE} (e.g. {MAX_FILE_MB_VARIABLE}={suggest:g}) or give "
              f"--max-file-mb {suggest:g} to calorun")],
    )


_NOT_REGULAR = (
    (stat.S_ISDIR, "a folder"),
    (stat.S_ISFIFO, "a named pipe (FIFO)"),
    (stat.S_ISCHR, "a device"),
    (stat.S_ISBLK, "a device"),
    (stat.S_ISSOCK, "a socket"),
)


def _refuse_if_not_regular(p: Path, mode: int) -> None:
    if stat.S_ISREG(mode):
        return
    what = next((words for test, words in _NOT_REGULAR if test(mode)), "not a regular file")
    raise ProjectFileError(f"Cannot open {p}", [("", f"this is {what}, not a project file; Calorun opens regular "
                                                      "files only")])


def _read_limited(p: Path, limit: int) -> bytes:
    """The bytes of ``p``, refusing anything but a regular file of at most ``limit`` bytes.

    The type is checked before opening (a named pipe would block an open or a read forever, a device
    like /dev/zero never ends); the open itself does not block (O_NONBLOCK) and is checked again
    (the path may have been swapped in between); at most ``limit + 1`` bytes are read, since some
    files (under /proc) report a size of 0.
    """
    try:
        info = os.stat(p)
    except FileNotFoundError:
        raise ProjectFileError(f"Cannot open {p}", [("", "no such file")]) from None
    except OSError as exc:
        raise ProjectFileError(f"Cannot open {p}", [("", exc.strerror or str(exc))]) from None
    _refuse_if_not_regular(p, info.st_mode)
    if info.st_size > limit:
        raise _too_big(p, info.st_size, limit)
    flags = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_CLOEXEC", 0) | getattr(os, "O_BINARY", 0)
    try:
        fd = os.open(p, flags)
    except OSError as exc:
        raise ProjectFileError(f"Cannot open {p}", [("", exc.strerror or str(exc))]) from None
    try:
        _refuse_if_not_regular(p, os.fstat(fd).st_mode)
        chunks, total = [], 0
        while True:
            chunk = os.read(fd, min(1 << 20, limit + 1 - total))
            if not chunk:
                break
            chunks.append(chunk)
            total += len(chunk)
            if total > limit:
                raise _too_big(p, total, limit, at_least=True)
    except OSError as exc:
        raise ProjectFileError(f"Cannot read {p}", [("", exc.strerror or str(exc))]) from None
    finally:
        os.close(fd)
    return b"".join(chunks)


def _nesting_deeper_than(value: Any, limit: int) -> bool:
    """Whether lists and objects in ``value`` nest more than ``limit`` deep (level by level, no recursion)."""
    level = [value] if type(value) is dict or type(value) is list else []
    for _ in range(limit):
        if not level:
            return False
        below: list = []
        for item in level:
            below += [c for c in (item.values() if type(item) is dict else item) if type(c) is dict or type(c) is list]
        level = below
    return bool(level)


def _too_deep() -> ProjectFileError:
    return ProjectFileError("Not a Calorun project", [("", f"lists and objects are nested more than {MAX_NESTING} "
                                                           "levels deep; a project file needs far fewer")])


def _refuse_too_many(data: dict) -> None:
    """Refuse more alternatives or segments than the model allows before validating any of them, so a
    file of tens of thousands is refused at once instead of being built in memory first."""
    problems = []
    alternatives = data.get("alternatives")
    if isinstance(alternatives, list):
        if len(alternatives) > MAX_ALTERNATIVES:
            problems.append(("alternatives", f"a project holds at most {MAX_ALTERNATIVES:,} alternatives, "
                                             f"this file has {len(alternatives):,}"))
        else:
            for i, alt in enumerate(alternatives):
                segments = alt.get("segments") if isinstance(alt, dict) else None
                if isinstance(segments, list) and len(segments) > MAX_SEGMENTS:
                    problems.append((f"alternatives[{i}].segments", f"an alternative holds at most {MAX_SEGMENTS:,} "
                                                                    f"segments, this one has {len(segments):,}"))
    if problems:
        raise ProjectFileError("Project too large", problems)


# --------------------------------------------------------------------------- loading


def project_from_dict(raw: Any) -> Project:
    """Validate a raw project dict (as JSON gives it): migrated first, then checked against the model.

    Stricter than building the model in code: numbers must be JSON numbers (``"6"`` or ``true`` is
    refused, not read as 6 or 1), and the keys that define the line must be present. Every problem
    is reported at once; the ``ProjectFileError``'s cause is the ``ValidationError`` holding them all
    (``app.messages`` words them for the user).
    """
    data = migrate(raw)
    _refuse_too_many(data)
    if _nesting_deeper_than(data, MAX_NESTING):
        raise _too_deep()
    missing = _missing_in_file(Project, data, ())
    try:
        project = Project.model_validate(data, strict=True)
        errors: list = []
    except ValidationError as exc:
        if not missing:
            problems = validation_problems(exc)
            raise ProjectFileError(f"Invalid project: {len(problems)} problem(s)", problems) from exc
        errors = exc.errors(include_url=False)
    if not missing:
        return project
    every = ValidationError.from_exception_data(Project.__name__, missing + [_error_details(e) for e in errors])
    problems = validation_problems(every)
    raise ProjectFileError(f"Invalid project: {len(problems)} problem(s)", problems) from every


def parse_project(text: str) -> Project:
    """A project from the text of a file (a leading byte-order mark, as some editors write, is ignored)."""
    text = text.removeprefix("\ufeff")
    try:
        raw = json.loads(text)
    except json.JSONDecodeError as exc:
        raise ProjectFileError("Not valid JSON", [("", f"line {exc.lineno}, column {exc.colno}: {exc.msg}")]) from None
    except RecursionError:
        raise _too_deep() from None
    except ValueError as exc:  # e.g. an integer of more digits than Python converts (4300)
        reason = "a number has too many digits to be read" if "digits" in str(exc) else str(exc)[:200]
        raise ProjectFileError("Not valid JSON", [("", reason)]) from None
    return project_from_dict(raw)


def load_project(path: str | os.PathLike, max_bytes: int | None = None) -> Project:
    """Read and validate a project file.

    Only a regular file of at most ``max_bytes`` (default: :func:`max_file_bytes`, i.e.
    ``CALORUN_MAX_FILE_MB`` or 32 MB) is read; UTF-8 with or without a byte-order mark. Every
    refusal is a :class:`ProjectFileError` listing ``(path, message)`` problems.
    """
    p = Path(path)
    data = _read_limited(p, max_file_bytes(max_bytes))
    try:
        text = data.decode("utf-8")  # a byte-order mark stays in front: parse_project drops it
    except UnicodeDecodeError as exc:
        raise ProjectFileError(f"Cannot read {p}", [("", f"not UTF-8 text: byte 0x{data[exc.start]:02x} at "
                                                         f"position {exc.start:,} is not valid UTF-8")]) from None
    return parse_project(text)


def dump_project(project: Project) -> str:
    """The file text: sorted keys are not used, so the order follows the model (stable, diffable)."""
    return json.dumps(project.model_dump(mode="json"), indent=2, ensure_ascii=False) + "\n"


def save_project(project: Project, path: str | os.PathLike) -> Path:
    """Write ``project`` to ``path`` with the one safe write (:mod:`solver.safe_write`): through a
    symbolic link to the real file, keeping hard links, permissions and owner; on any failure the
    existing file is left as it was and OSError is raised. A refusal (read-only, not a regular file,
    a folder, text that cannot be encoded) is a :class:`~solver.safe_write.WriteRefused` with a
    plain message, raised before anything is written; for text it names the field."""
    text = dump_project(project)
    try:
        return atomic_write_text(path, text)
    except WriteRefused as exc:
        if exc.kind != "unencodable":
            raise
        field, message = _unencodable_field(project.model_dump(mode="json"))
        raise WriteRefused(path, f"{field} {message}; nothing was written" if field else str(exc), exc.kind,
                           field=field) from None


def _unencodable_field(data: Any, where: str = "") -> tuple[str, str]:
    """The first text in the dumped project that UTF-8 cannot hold, as ``(file path, what is wrong)``."""
    if isinstance(data, dict):
        items = ((f"{where}.{key}" if where else str(key), value) for key, value in data.items())
    elif isinstance(data, list):
        items = ((f"{where}[{i}]", value) for i, value in enumerate(data))
    elif isinstance(data, str):
        try:
            data.encode("utf-8")
        except UnicodeEncodeError as exc:
            code = ord(data[exc.start])
            return where, (f"holds a character that cannot be written (U+{code:04X}"
                           f"{', a lone surrogate' if 0xD800 <= code <= 0xDFFF else ''}, character {exc.start + 1})")
        return "", ""
    else:
        return "", ""
    for path, value in items:
        found = _unencodable_field(value, path)
        if found[0]:
            return found
    return "", ""
