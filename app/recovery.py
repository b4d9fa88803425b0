"""Autosave and recovery: the open project's unsaved work kept in one file, offered back after a crash.

The main window writes the file now and then while there are unsaved changes and removes it on a
clean exit or a save, so a file found at start-up means the last run did not close normally. The
file is JSON: ``{"calorun_recovery": 1, "written_at": ..., "original_path": ..., "project": {...}}``,
written with the one atomic write, so a crash while writing leaves the previous copy.

``CALORUN_RECOVERY_DIR`` puts the file in another folder (tests and benchmarks do).
"""

from __future__ import annotations

import datetime as _dt
import json
import os
from dataclasses import dataclass
from pathlib import Path
from typing import Optional

from PySide6.QtCore import QStandardPaths

from solver.model import Project

RECOVERY_FILE = "recovery.json"
FORMAT_VERSION = 1


def recovery_dir() -> Path:
    folder = os.environ.get("CALORUN_RECOVERY_DIR")
    if folder:
        return Path(folder)
    base = QStandardPaths.writableLocation(QStandardPaths.AppDataLocation)
    if not base:
        base = str(Path.home() / ".calorun")
    return Path(base) / "recovery"


def recovery_path() -> Path:
    return recovery_dir() / RECOVERY_FILE


@dataclass(frozen=True)
class Recovered:
    """What a recovery file holds."""

    project: Project
    original_path: Optional[str]  # where the project was saved before, if it had a file
    written_at: str

    def describe(self) -> str:
        """One sentence for the offer to recover."""
        return (f"Unsaved changes to '{self.project.name}'"
                + (f" ({self.original_path})" if self.original_path else "") + f" were kept at {self.written_at}.")


class RecoveryUnreadable(Exception):
    """The recovery file exists but cannot be read back as a project; the message says why."""


def write_recovery(path: Path, project: Project, original_path: Optional[Path]) -> Path:
    """Write ``project`` to the recovery file at ``path`` (atomically); OSError when the disk refuses."""
    from solver.project_io import atomic_write_text

    payload = {
        "calorun_recovery": FORMAT_VERSION,
        "written_at": _dt.datetime.now().isoformat(timespec="seconds"),
        "original_path": str(original_path) if original_path else None,
        "project": project.model_dump(mode="json"),
    }
    path.parent.mkdir(parents=True, exist_ok=True)
    atomic_write_text(path, json.dumps(payload, ensure_ascii=False))
    return path


def read_recovery(path: Path) -> Optional[Recovered]:
    """The recovery file's content, or None when there is none; :class:`RecoveryUnreadable` when it is broken."""
    from solver.errors import ProjectFileError
    from solver.project_io import project_from_dict

    if not path.exists():
        return None
    try:
        payload = json.loads(path.read_text(encoding="utf-8"))
        project = project_from_dict(payload["project"])
    except (OSError, ValueError, KeyError, TypeError, ProjectFileError) as exc:
        raise RecoveryUnreadable(str(exc)) from exc
    return Recovered(project, payload.get("original_path"), payload.get("written_at", "an unknown time"))


def set_aside(path: Path) -> None:
    """Keep an unreadable recovery file under another name, so it is not offered again but not lost."""
    try:
        path.replace(path.with_suffix(".unreadable.json"))
    except OSError:
        pass  # nothing more to do: it will be offered (and refused) again next time


def remove_recovery(path: Path) -> None:
    try:
        path.unlink()
    except OSError:
        pass  # already gone, or not ours to remove: either way nothing to recover from it
