"""Settings kept between runs (QSettings, organisation "Calorun"): unit system and recent files.

Set ``CALORUN_SETTINGS_DIR`` to keep them in an INI file in that folder instead (tests do,
so they never touch a user's settings). Only the main window writes here, and not when it is
taking a ``--screenshot``.
"""

from __future__ import annotations

import os
from pathlib import Path

from PySide6.QtCore import QSettings

ORGANISATION = "Calorun"
APPLICATION = "Calorun"
MAX_RECENT = 8


def settings() -> QSettings:
    folder = os.environ.get("CALORUN_SETTINGS_DIR")
    if folder:
        Path(folder).mkdir(parents=True, exist_ok=True)
        return QSettings(str(Path(folder) / "calorun.ini"), QSettings.IniFormat)
    return QSettings(QSettings.IniFormat, QSettings.UserScope, ORGANISATION, APPLICATION)


def unit_system() -> str:
    value = settings().value("units/system", "SI")
    return value if value in ("SI", "US") else "SI"


def set_unit_system(system: str) -> None:
    if system not in ("SI", "US"):
        raise ValueError(f"unit system must be 'SI' or 'US', got {system!r}")
    s = settings()
    s.setValue("units/system", system)
    s.sync()


def recent_files() -> list[str]:
    value = settings().value("files/recent", [])
    if isinstance(value, str):  # one entry comes back as a plain string
        value = [value]
    return [str(v) for v in (value or []) if v]


def add_recent_file(path: str | os.PathLike) -> list[str]:
    p = str(Path(path).resolve())
    files = [p] + [f for f in recent_files() if f != p]
    files = files[:MAX_RECENT]
    s = settings()
    s.setValue("files/recent", files)
    s.sync()
    return files


def clear_recent_files() -> None:
    s = settings()
    s.setValue("files/recent", [])
    s.sync()
