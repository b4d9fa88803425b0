"""Reading and writing project files (JSON, SI, diffable).

Loading runs the registered migrations on the raw JSON dict first (forward only,
one step per schema version), then validates against today's model and reports
every problem with its path and value. Saving is atomic: write a temporary file
in the same folder, flush it to disk, then replace the target; a failed save
leaves the existing file untouched.
"""

from __future__ import annotations

import contextlib
import json
import os
import tempfile
from pathlib import Path
from typing import Any, Callable, Iterator

from pydantic import ValidationError

from solver.errors import ProjectFileError
from solver.model import FORMAT_TAG, SCHEMA_VERSION, Project

# version -> function taking the raw dict of that version and returning the next version's dict.
MIGRATIONS: dict[int, Callable[[dict], dict]] = {}


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
    tags = {"pure", "solution", "table", "still_air", "wind", "buried", "jacket", "fixed_wall", "adiabatic"}
    cleaned = []
    for i, part in enumerate(loc):
        if isinstance(part, str) and part in tags and i > 0 and loc[i - 1] in ("fluid", "surroundings"):
            continue
        cleaned.append(part)
    return tuple(cleaned)


def validation_problems(exc: ValidationError) -> list[tuple[str, str]]:
    """Every pydantic error as ``(path, 'message, got value')``."""
    problems = []
    for err in exc.errors(include_url=False):
        loc = _strip_union_tags(tuple(err.get("loc", ())))
        msg = err.get("msg", "invalid")
        msg = msg.removeprefix("Value error, ")
        if err.get("type") in ("missing",):
            text = "required, missing"
        elif "got" in msg:
            text = msg
        else:
            text = f"{msg.lower() if msg[:1].isupper() and not msg[1:2].isupper() else msg}, got {err.get('input')!r}"
        problems.append((_path_text(loc), text))
    return problems


def project_from_dict(raw: Any) -> Project:
    data = migrate(raw)
    try:
        return Project.model_validate(data)
    except ValidationError as exc:
        problems = validation_problems(exc)
        raise ProjectFileError(f"Invalid project: {len(problems)} problem(s)", problems) from None


def parse_project(text: str) -> Project:
    try:
        raw = json.loads(text)
    except json.JSONDecodeError as exc:
        raise ProjectFileError("Not valid JSON", [("", f"line {exc.lineno}, column {exc.colno}: {exc.msg}")]) from None
    return project_from_dict(raw)


def load_project(path: str | os.PathLike) -> Project:
    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise ProjectFileError(f"Cannot open {p}", [("", "no such file")]) from None
    except (OSError, UnicodeDecodeError) as exc:
        raise ProjectFileError(f"Cannot read {p}", [("", str(exc))]) from None
    return parse_project(text)


def dump_project(project: Project) -> str:
    """The file text: sorted keys are not used, so the order follows the model (stable, diffable)."""
    return json.dumps(project.model_dump(mode="json"), indent=2, ensure_ascii=False) + "\n"


def save_project(project: Project, path: str | os.PathLike) -> Path:
    """Write atomically; on any failure the existing file is left as it was and OSError is raised."""
    target = Path(path)
    if target.is_dir():
        raise IsADirectoryError(f"cannot save over a folder: {target}")
    return atomic_write_text(target, dump_project(project))


def atomic_write_text(path: str | os.PathLike, text: str, encoding: str = "utf-8", newline: str | None = None) -> Path:
    """Write ``text`` to ``path`` through :func:`atomic_replace`."""
    with atomic_replace(path) as tmp:
        with open(tmp, "w", encoding=encoding, newline=newline) as fh:
            fh.write(text)
    return Path(path)


@contextlib.contextmanager
def atomic_replace(path: str | os.PathLike) -> Iterator[Path]:
    """The one atomic write: yield a temporary file beside ``path`` to write; on success it is
    flushed to disk and replaces ``path`` in one step.

    A failure at any point (an exception in the block, an empty file, a failed replace) leaves an
    existing file as it was and no temporary file behind. The new file keeps the permissions of the
    one it replaces (or the usual ones for a new file). Used for projects, CSV exports, reports and
    the autosave file.
    """
    target = Path(path)
    if target.is_dir():
        raise IsADirectoryError(f"{target} is a folder, not a file name")
    directory = target.parent if str(target.parent) else Path(".")
    if not directory.is_dir():
        raise FileNotFoundError(f"the folder {directory} does not exist")
    fd, tmp_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=directory)
    os.close(fd)
    tmp = Path(tmp_name)
    try:
        yield tmp
        if tmp.stat().st_size == 0:
            raise OSError(f"nothing was written to {target}")
        with open(tmp, "rb+") as fh:
            os.fsync(fh.fileno())
        os.chmod(tmp, _mode_for(target))
        os.replace(tmp, target)
    except BaseException:
        try:
            tmp.unlink()
        except OSError:
            pass
        raise


def _mode_for(target: Path) -> int:
    try:
        return target.stat().st_mode & 0o777
    except OSError:
        umask = os.umask(0)
        os.umask(umask)
        return 0o666 & ~umask
