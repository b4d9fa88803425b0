"""Autosave and recovery: each running Calorun keeps its unsaved work in its own file, offered back
after a crash.

Every window that remembers (not a ``--screenshot``) claims an :class:`InstanceSlot` when it starts:
a lock file ``recovery-<pid>-<start ms>.lock`` it holds locked for its whole life, and beside it
the name of its autosave file ``recovery-<pid>-<start ms>.json``. The window writes that file now
and then while there are unsaved changes and removes it on a save and on a clean exit (releasing
the lock and removing the lock file too). The lock is an ``fcntl.flock`` (``msvcrt.locking`` on
Windows): the system releases it when the process dies, however it dies, so "the lock can be
taken" means exactly "the instance that wrote this file is gone".

At start-up :func:`abandoned` lists the autosave files in the folder, newest first; the window
offers one only after :meth:`Abandoned.claim` took its lock, so a file of an instance that is
still running is never offered, set aside or removed, and two instances starting together never
offer the same file. A file of the single-file autosave of earlier versions (``recovery.json``) is
offered the same way.

Each file is JSON: ``{"calorun_recovery": 1, "written_at": ..., "original_path": ..., "project":
{...}}``, written with the one safe write, so a crash while writing leaves the previous copy and a
failed write leaves nothing new behind.

``CALORUN_RECOVERY_DIR`` puts the files in another folder (tests and benchmarks do).
"""

from __future__ import annotations

import contextlib
import datetime as _dt
import json
import os
import re
import time
from dataclasses import dataclass
from pathlib import Path
from typing import IO, Optional

from PySide6.QtCore import QStandardPaths

from solver.model import Project
from solver.safe_write import atomic_write_text, clean_stale_temps

try:
    import fcntl
except ImportError:  # pragma: no cover - Windows
    fcntl = None  # type: ignore[assignment]
try:
    import msvcrt
except ImportError:
    msvcrt = None  # type: ignore[assignment]

FORMAT_VERSION = 1
LEGACY_FILE = "recovery.json"  # the one shared file of earlier versions
_INSTANCE_FILE = re.compile(r"recovery-(\d+)-(\d+)\.json\Z")


def recovery_dir() -> Path:
    folder = os.environ.get("CALORUN_RECOVERY_DIR")
    if folder:
        return Path(folder)
    base = QStandardPaths.writableLocation(QStandardPaths.AppDataLocation)
    if not base:
        base = str(Path.home() / ".calorun")
    return Path(base) / "recovery"


def _lock_path(recovery_file: Path) -> Path:
    return recovery_file.with_suffix(".lock")


def _try_lock(fh: IO) -> bool:
    """Take the lock on an open lock file without waiting; False when another open file holds it."""
    if fcntl is not None:
        try:
            fcntl.flock(fh.fileno(), fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            return False
        return True
    if msvcrt is not None:  # pragma: no cover - Windows: the system drops the lock with the process too
        try:
            fh.seek(0)
            msvcrt.locking(fh.fileno(), msvcrt.LK_NBLCK, 1)
        except OSError:
            return False
        return True
    return False  # pragma: no cover - no way to tell: treat every other file as a live instance's


class InstanceSlot:
    """This instance's autosave file and the lock that marks it as alive (see the module text)."""

    def __init__(self, folder: Optional[Path] = None):
        folder = Path(folder) if folder is not None else recovery_dir()
        folder.mkdir(parents=True, exist_ok=True)
        pid, started = os.getpid(), time.time_ns() // 1_000_000
        while True:
            name = f"recovery-{pid}-{started}"
            lock_path = folder / f"{name}.lock"
            # locked under a name no scan looks at, then renamed: a scan never sees it unlocked
            pending = folder / f"{name}.lock.new"
            try:
                fd = os.open(pending, os.O_RDWR | os.O_CREAT | os.O_EXCL, 0o600)
            except FileExistsError:
                started += 1  # a second window of this process in the same millisecond
                continue
            if lock_path.exists():
                os.close(fd)
                pending.unlink()
                started += 1
                continue
            break
        self._fh: Optional[IO] = os.fdopen(fd, "r+", encoding="ascii")
        if not _try_lock(self._fh):  # pragma: no cover - a new file nobody else has opened
            raise OSError(f"cannot lock {pending}")
        self._fh.write(f"{pid} {started}\n")
        self._fh.flush()
        os.replace(pending, lock_path)
        self.id = f"{pid}-{started}"
        self.path = folder / f"{name}.json"
        self.lock_path = lock_path

    @property
    def held(self) -> bool:
        return self._fh is not None

    def release(self, remove_files: bool = True) -> None:
        """End the claim: on a clean exit the autosave file and the lock file go too.

        ``remove_files=False`` leaves both behind as a crash would (tests use it to play a crash
        without ending the process).
        """
        if self._fh is None:
            return
        if remove_files:
            remove_recovery(self.path)
            with contextlib.suppress(OSError):
                self.lock_path.unlink()
        self._fh.close()  # closing drops the lock
        self._fh = None


@dataclass
class Abandoned:
    """An autosave file found at start-up that may belong to an instance that is gone."""

    path: Path
    modified_at: float
    _fh: Optional[IO] = None

    def claim(self) -> bool:
        """Take the file's lock: True when its instance is gone (the lock is then held until
        :meth:`release` or :meth:`discard`), False when it is still running or the file went."""
        lock_path = _lock_path(self.path)
        try:
            fh = open(lock_path, "a+", encoding="ascii")
        except OSError:
            return False
        if not _try_lock(fh):
            fh.close()
            return False  # its instance is alive
        try:  # the lock file may have been removed and the work handled while we waited for it
            same = os.path.samestat(os.fstat(fh.fileno()), os.stat(lock_path))
        except OSError:
            same = False
        if not same or not self.path.exists():
            fh.close()
            return False
        self._fh = fh
        return True

    def release(self) -> None:
        """Let go of the lock and leave the file, to be offered again next time."""
        if self._fh is not None:
            self._fh.close()
            self._fh = None

    def discard(self) -> None:
        """Remove the file, its lock file and its leftover temporary files (only after :meth:`claim`)."""
        if self._fh is None:
            raise RuntimeError("discard() needs the file claimed first")
        remove_recovery(self.path)
        clean_stale_temps(self.path, max_age_s=0.0)  # its writer is gone: nothing of it is in use
        with contextlib.suppress(OSError):
            _lock_path(self.path).unlink()
        self.release()

    def set_aside(self) -> None:
        """Keep an unreadable file under another name, so it is not offered again but not lost."""
        if self._fh is None:
            raise RuntimeError("set_aside() needs the file claimed first")
        set_aside(self.path)
        with contextlib.suppress(OSError):
            _lock_path(self.path).unlink()
        self.release()


def abandoned(own: Optional[InstanceSlot] = None, folder: Optional[Path] = None) -> list[Abandoned]:
    """Autosave files in the folder other than ``own``'s, newest first. None of them is claimed
    yet: :meth:`Abandoned.claim` says whether its instance is gone."""
    folder = Path(folder) if folder is not None else recovery_dir()
    found = []
    try:
        entries = list(os.scandir(folder))
    except OSError:
        return []
    for entry in entries:
        if not (_INSTANCE_FILE.match(entry.name) or entry.name == LEGACY_FILE):
            continue
        path = Path(entry.path)
        if own is not None and path == own.path:
            continue
        try:
            found.append(Abandoned(path, entry.stat().st_mtime))
        except OSError:
            continue
    found.sort(key=lambda a: a.modified_at, reverse=True)
    return found


def remove_dead_locks(own: Optional[InstanceSlot] = None, folder: Optional[Path] = None) -> None:
    """Remove lock files of instances that are gone and left no autosave file (they crashed with
    nothing unsaved), with their leftover temporary files."""
    folder = Path(folder) if folder is not None else recovery_dir()
    try:
        entries = list(os.scandir(folder))
    except OSError:
        return
    for entry in entries:
        name = entry.name
        if not name.endswith(".lock") or not _INSTANCE_FILE.match(name[: -len(".lock")] + ".json"):
            continue
        lock = Path(entry.path)
        if own is not None and lock == own.lock_path:
            continue
        dead = Abandoned(lock.with_suffix(".json"), 0.0)
        if dead.path.exists():
            continue  # work to offer: the offer handles it
        try:
            fh = open(lock, "a+", encoding="ascii")
        except OSError:
            continue
        try:
            if _try_lock(fh) and not dead.path.exists():
                clean_stale_temps(dead.path, max_age_s=0.0)
                with contextlib.suppress(OSError):
                    lock.unlink()
        finally:
            fh.close()


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
    """Write ``project`` to the recovery file at ``path`` with the one safe write; OSError (a
    :class:`~solver.safe_write.WriteRefused` for text that cannot be encoded) when it cannot be
    written, and then nothing new is left behind."""
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
