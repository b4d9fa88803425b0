"""The one safe write: how Calorun puts a file on disk (projects, CSV exports, reports, the autosave file).

A save does what a user of a text editor expects of it:

- the new content goes to a temporary file beside the target, is flushed to disk, and only then
  takes the target's place, so a failure at any point (disk full, a failed replace, Ctrl-C) leaves
  the existing file as it was and no temporary file behind;
- through a symbolic link the real file is written (the link stays a link);
- a file with more than one hard link, or whose owner a replaced file could not keep, is
  rewritten in place (from the finished, flushed temporary copy, with a copy of the old content
  kept until the rewrite is on disk), so every name keeps seeing the same file;
- the file keeps its permissions, and its owner and group where the system allows it;
- a read-only file, a folder, and anything that is not a regular file (a device, a named pipe, a
  socket) are refused with a message (:class:`WriteRefused`) before anything is written;
- text that cannot be encoded (a lone surrogate) is refused before anything is written;
- temporary files that earlier crashes left beside the target (``.{name}.xxxxxxxx.tmp``, older
  than :data:`STALE_TEMP_AGE_S` and not held by a live process) are removed after the next
  successful write of that file.

No Qt here: the CLI and the report use it headless.
"""

from __future__ import annotations

import contextlib
import errno
import os
import re
import shutil
import stat
import tempfile
import time
from pathlib import Path
from typing import Iterator, Optional

try:  # the lock that tells a live writer's temporary file from a dead one's; POSIX only
    import fcntl
except ImportError:  # pragma: no cover - Windows: temporary files are judged by age alone
    fcntl = None  # type: ignore[assignment]

#: A temporary file this much older than now, not locked by a live writer, is left over from a crash.
#: Long enough for the slowest write here (a 10,000-segment report takes well under two minutes).
STALE_TEMP_AGE_S = 600.0

# what tempfile.mkstemp puts between our prefix and suffix: 8 characters of this alphabet
_TEMP_MIDDLE = r"[a-z0-9_]{8}"


class WriteRefused(OSError):
    """A write refused before anything was written; the message says why in plain words.

    ``kind`` says what was wrong: ``"read_only"``, ``"folder"``, ``"not_regular"``, ``"link_loop"``
    or ``"unencodable"``; ``field`` names the offending field (a file path such as
    ``alternatives[0].segments[2].name``) when the text of a project could not be encoded.
    ``offer_save_as`` is True when saving somewhere else is the way out.
    It is an OSError, so every caller that reports a failed write reports this one too.
    """

    _ERRNO = {"read_only": errno.EACCES, "folder": errno.EISDIR, "not_regular": errno.EINVAL,
              "link_loop": errno.ELOOP, "unencodable": errno.EILSEQ}

    def __init__(self, path: str | os.PathLike, message: str, kind: str, field: Optional[str] = None):
        super().__init__(self._ERRNO.get(kind, errno.EINVAL), message, str(path))
        self.kind = kind
        self.field = field

    @property
    def offer_save_as(self) -> bool:
        return self.kind != "unencodable"

    def __str__(self) -> str:
        return self.strerror


_NOT_REGULAR = ((stat.S_ISCHR, "a device"), (stat.S_ISBLK, "a device"), (stat.S_ISFIFO, "a named pipe (FIFO)"),
                (stat.S_ISSOCK, "a socket"))


def resolve_target(path: str | os.PathLike) -> Path:
    """The file a write to ``path`` lands in: symbolic links followed to the real file."""
    shown = Path(path)
    real = Path(os.path.realpath(shown))
    if real.is_symlink():  # realpath stops where links go round in a loop
        raise WriteRefused(shown, f"{shown} is a symbolic link that leads round in a loop; nothing was written",
                           "link_loop")
    return real


def check_target(real: Path, shown: Optional[Path] = None) -> Optional[os.stat_result]:
    """Refuse what must not be written over; the existing file's status, or None for a new file.

    Only ``os.stat`` looks at the target: nothing is opened, so a named pipe cannot block and a
    device is never touched.
    """
    shown = shown or real
    try:
        st = os.stat(real)
    except FileNotFoundError:
        if not real.parent.is_dir():
            raise FileNotFoundError(errno.ENOENT, f"the folder {real.parent} does not exist",
                                    str(real.parent)) from None
        return None
    if stat.S_ISDIR(st.st_mode):
        raise WriteRefused(shown, f"{shown} is a folder, not a file; nothing was written", "folder")
    if not stat.S_ISREG(st.st_mode):
        what = next((words for test, words in _NOT_REGULAR if test(st.st_mode)), "not an ordinary file")
        raise WriteRefused(shown, f"{shown} is {what}, not an ordinary file; Calorun writes only ordinary files, "
                                  "so nothing was written", "not_regular")
    # no write permission bit at all means read-only even for an administrator (who passes os.access)
    if st.st_mode & 0o222 == 0 or not os.access(real, os.W_OK):
        raise WriteRefused(shown, f"{shown} is read-only; it was left as it was", "read_only")
    return st


def encode_text(text: str, encoding: str = "utf-8", newline: Optional[str] = None,
                path: str | os.PathLike = "") -> bytes:
    """``text`` as the bytes a text-mode write would produce; :class:`WriteRefused` if it cannot be encoded."""
    nl = os.linesep if newline is None else newline
    if nl not in ("", "\n"):
        text = text.replace("\n", nl)
    try:
        return text.encode(encoding)
    except UnicodeEncodeError as exc:
        char = exc.object[exc.start]
        raise WriteRefused(path, f"the text holds a character that cannot be written ({_char_name(char)} at "
                                 f"character {exc.start + 1}); nothing was written", "unencodable") from None


def _char_name(char: str) -> str:
    code = ord(char)
    kind = ", a lone surrogate" if 0xD800 <= code <= 0xDFFF else ""
    return f"U+{code:04X}{kind}"


def atomic_write_text(path: str | os.PathLike, text: str, encoding: str = "utf-8", newline: str | None = None) -> Path:
    """Write ``text`` to ``path`` through :func:`atomic_replace`; the text is encoded before anything is made."""
    data = encode_text(text, encoding, newline, path)
    with atomic_replace(path) as tmp:
        with open(tmp, "wb") as fh:
            fh.write(data)
    return Path(path)


@contextlib.contextmanager
def atomic_replace(path: str | os.PathLike) -> Iterator[Path]:
    """The one safe write: yield a temporary file beside the real target to write; on success it
    is flushed to disk and takes the target's place (see the module's description).

    Refusals (:class:`WriteRefused`) come before the temporary file is made. A failure at any
    later point leaves an existing file as it was and no temporary file behind. The temporary file
    is locked while this write is alive, so :func:`clean_stale_temps` in another process leaves it.
    """
    shown = Path(path)
    target = resolve_target(shown)
    check_target(target, shown)
    directory = target.parent
    try:
        fd, tmp_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=directory)
    except PermissionError as exc:
        raise PermissionError(exc.errno, f"cannot write in the folder {directory} ({exc.strerror})",
                              str(directory)) from None
    tmp = Path(tmp_name)
    fd = _hold(fd)
    try:
        yield tmp
        if tmp.stat().st_size == 0:
            raise OSError(errno.EIO, f"nothing was written to {shown}")
        with open(tmp, "rb+") as fh:
            os.fsync(fh.fileno())
        st = check_target(target, shown)  # again: a long write (a report) leaves time for the target to change
        if st is not None and not _can_replace(tmp, st):
            _rewrite_in_place(tmp, target)
            with contextlib.suppress(OSError):  # the file is written; a left temporary file is cleaned up later
                tmp.unlink()
        else:
            os.chmod(tmp, (st.st_mode & 0o777) if st is not None else _new_file_mode())
            os.replace(tmp, target)
        _sync_folder(directory)
    except BaseException:
        with contextlib.suppress(OSError):
            tmp.unlink()
        raise
    finally:
        if fd is not None:
            os.close(fd)
    clean_stale_temps(target)


def _hold(fd: int) -> Optional[int]:
    """Keep the temporary file's descriptor open and locked (POSIX); elsewhere close it at once."""
    if fcntl is None:  # pragma: no cover - Windows cannot replace a file that is open
        os.close(fd)
        return None
    fcntl.flock(fd, fcntl.LOCK_EX)
    return fd


def _can_replace(tmp: Path, st: os.stat_result) -> bool:
    """Whether the new file can take the old one's place without the user noticing: not when the
    old one has other hard links (they would keep the old content), nor when the new one cannot
    get the old one's owner and group."""
    if st.st_nlink > 1:
        return False
    mine = os.stat(tmp)
    if (mine.st_uid, mine.st_gid) == (st.st_uid, st.st_gid) or not hasattr(os, "chown"):
        return True
    try:
        os.chown(tmp, st.st_uid, st.st_gid)
    except PermissionError:
        return False
    return True


def _rewrite_in_place(tmp: Path, target: Path) -> None:
    """Copy the finished temporary file into ``target`` itself (same inode: hard links, owner and
    permissions stay). The old content is copied aside first and put back if the rewrite fails; if
    even that fails, the copy is kept and the error names it."""
    fd, backup_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=target.parent)
    backup = Path(backup_name)
    fd = _hold(fd)
    try:
        with open(target, "rb") as src, open(backup, "wb") as dst:
            shutil.copyfileobj(src, dst)
            dst.flush()
            os.fsync(dst.fileno())
        try:
            _copy_over(tmp, target)
        except BaseException as exc:
            try:
                _copy_over(backup, target)
            except OSError:
                keep = backup.with_name(f"{target.name}.before-save")
                with contextlib.suppress(OSError):
                    os.replace(backup, keep)
                    backup = keep
                raise OSError(errno.EIO, f"{target} could not be rewritten and may be damaged; "
                                         f"its earlier content is kept in {backup}") from exc
            raise
        backup.unlink()
    except BaseException:
        if backup.name != f"{target.name}.before-save":
            with contextlib.suppress(OSError):
                backup.unlink()
        raise
    finally:
        if fd is not None:
            os.close(fd)


def _copy_over(source: Path, target: Path) -> None:
    with open(source, "rb") as src, open(target, "r+b") as dst:
        shutil.copyfileobj(src, dst)
        dst.truncate()
        dst.flush()
        os.fsync(dst.fileno())


def _sync_folder(directory: Path) -> None:
    """Flush the folder entry too, so the replace itself survives a power cut (POSIX)."""
    try:
        dfd = os.open(directory, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(dfd)
    except OSError:
        pass  # some file systems cannot sync a folder; the file itself is on disk
    finally:
        os.close(dfd)


def _new_file_mode() -> int:
    """The permissions a new file usually gets here (0o666 less the umask), not mkstemp's 0o600."""
    try:  # Linux: read the umask without changing it (os.umask would, for a moment, for every thread)
        with open("/proc/self/status", encoding="ascii") as fh:
            for line in fh:
                if line.startswith("Umask:"):
                    return 0o666 & ~int(line.split()[1], 8)
    except (OSError, ValueError, IndexError):
        pass
    umask = os.umask(0)
    os.umask(umask)
    return 0o666 & ~umask


def clean_stale_temps(target: str | os.PathLike, max_age_s: float = STALE_TEMP_AGE_S) -> list[Path]:
    """Remove the temporary files earlier crashed writes of ``target`` left beside it.

    Only regular files named as :func:`atomic_replace` names them, owned by this user, older than
    ``max_age_s`` and not locked by a live writer are removed. Problems are ignored: cleaning up
    never fails a save. Returns what was removed.
    """
    target = Path(target)
    pattern = re.compile(r"\." + re.escape(target.name) + r"\." + _TEMP_MIDDLE + r"\.tmp\Z")
    removed: list[Path] = []
    now = time.time()
    try:
        entries = list(os.scandir(target.parent))
    except OSError:
        return removed
    for entry in entries:
        if not pattern.match(entry.name):
            continue
        try:
            st = entry.stat(follow_symlinks=False)
            if not stat.S_ISREG(st.st_mode) or now - st.st_mtime < max_age_s:
                continue
            if hasattr(os, "geteuid") and st.st_uid != os.geteuid():
                continue  # not ours to remove
            if _remove_unless_held(Path(entry.path)):
                removed.append(Path(entry.path))
        except OSError:
            continue
    return removed


def _remove_unless_held(path: Path) -> bool:
    if fcntl is None:  # pragma: no cover - age alone decides
        path.unlink()
        return True
    fd = os.open(path, os.O_RDONLY | getattr(os, "O_NOFOLLOW", 0) | getattr(os, "O_NONBLOCK", 0))
    try:
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            return False  # a live write holds it
        path.unlink()
        return True
    finally:
        os.close(fd)
