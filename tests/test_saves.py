"""Saves that do what a user of any text editor expects (issue 9, "Saves").

What is checked is what a user notices on disk: which file holds the new content, whether a link
is still a link, whether both names of a hard-linked file see the save, the permissions and owner
afterwards, what is refused and that a refused target is left exactly as it was, and which
temporary files remain. The expectations are common practice of text editors on POSIX systems
(write through a symbolic link, keep hard links, keep mode and owner, never replace a device).
"""

from __future__ import annotations

import os
import socket
import stat
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest

from solver import safe_write
from solver.model import Alternative, Project, Segment
from solver.project_io import dump_project, load_project, save_project
from solver.safe_write import STALE_TEMP_AGE_S, WriteRefused, atomic_write_text, clean_stale_temps

ROOT = Path(__file__).resolve().parent.parent
POSIX = os.name == "posix"
posix_only = pytest.mark.skipif(not POSIX, reason="POSIX file semantics")


def project(name: str = "Saves test line", length: float = 12.0) -> Project:
    # invented example
    seg = Segment(name="Run 1", length_m=length)
    return Project(name=name, alternatives=[Alternative(name="Base", segments=[seg])])


def temps(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name.endswith(".tmp"))


# --------------------------------------------------------------------------- links


@posix_only
def test_save_through_a_symbolic_link_updates_the_real_file_and_keeps_the_link(tmp_path):
    real_dir, link_dir = tmp_path / "real", tmp_path / "links"
    real_dir.mkdir()
    link_dir.mkdir()
    real = real_dir / "line.json"
    save_project(project(length=10.0), real)
    link = link_dir / "line.json"
    link.symlink_to(os.path.relpath(real, link_dir))  # a relative link, as `ln -s ../real/line.json` makes

    save_project(project(length=20.0), link)

    assert link.is_symlink() and os.readlink(link) == os.path.relpath(real, link_dir)
    assert load_project(real).alternatives[0].segments[0].length_m == 20.0
    assert os.listdir(link_dir) == ["line.json"] and os.listdir(real_dir) == ["line.json"]  # no temporary files


@posix_only
def test_save_through_a_dangling_link_creates_the_file_it_names(tmp_path):
    link = tmp_path / "line.json"
    link.symlink_to("kept/line-v2.json")
    (tmp_path / "kept").mkdir()
    save_project(project(), link)
    assert link.is_symlink() and (tmp_path / "kept" / "line-v2.json").is_file()


@posix_only
def test_a_symbolic_link_loop_is_refused(tmp_path):
    a, b = tmp_path / "a.json", tmp_path / "b.json"
    a.symlink_to(b)
    b.symlink_to(a)
    with pytest.raises(WriteRefused, match="loop") as info:
        save_project(project(), a)
    assert info.value.kind == "link_loop"
    assert a.is_symlink() and b.is_symlink()


@posix_only
def test_hard_links_are_kept_and_both_names_see_the_save(tmp_path):
    first = tmp_path / "line.json"
    save_project(project(length=10.0), first)
    second = tmp_path / "line-for-review.json"
    os.link(first, second)
    inode = first.stat().st_ino

    save_project(project(length=30.0), second)

    assert first.stat().st_ino == second.stat().st_ino == inode and first.stat().st_nlink == 2
    assert load_project(first).alternatives[0].segments[0].length_m == 30.0
    assert temps(tmp_path) == []
    # a shorter content truncates: no tail of the longer old content is left
    save_project(project(name="x", length=30.0), first)
    assert load_project(second).name == "x"


@posix_only
def test_a_failed_rewrite_of_a_hard_linked_file_puts_the_old_content_back(tmp_path, monkeypatch):
    first = tmp_path / "line.json"
    save_project(project(length=10.0), first)
    os.link(first, tmp_path / "other-name.json")
    before = first.read_bytes()
    real_copy = safe_write._copy_over
    calls = []

    def fail_half_way(source, target):
        calls.append(source)
        if len(calls) == 1:  # the new content: written half, then the disk is full
            with open(target, "r+b") as fh:
                fh.write(b"{ half")
            raise OSError(28, "No space left on device (simulated)")
        real_copy(source, target)  # putting the old content back works

    monkeypatch.setattr(safe_write, "_copy_over", fail_half_way)
    with pytest.raises(OSError, match="simulated"):
        save_project(project(length=30.0), first)
    assert first.read_bytes() == before and first.stat().st_nlink == 2
    assert temps(tmp_path) == []


# --------------------------------------------------------------------------- what is refused


def test_a_read_only_file_is_refused_and_left_unchanged(tmp_path):
    target = tmp_path / "line.json"
    save_project(project(length=10.0), target)
    target.chmod(0o444)
    before = target.read_bytes()
    with pytest.raises(WriteRefused, match="read-only") as info:
        save_project(project(length=30.0), target)  # refused even for an administrator (root passes os.access)
    assert info.value.kind == "read_only" and info.value.offer_save_as
    assert target.read_bytes() == before and stat.S_IMODE(target.stat().st_mode) == 0o444
    assert os.listdir(tmp_path) == ["line.json"]


@posix_only
def test_mode_and_owner_are_kept(tmp_path):
    target = tmp_path / "line.json"
    save_project(project(), target)
    target.chmod(0o640)
    owner = None
    if os.geteuid() == 0:  # only an administrator can hand a file to someone else to test this
        os.chown(target, 4321, 4322)
        owner = (4321, 4322)
    save_project(project(length=30.0), target)
    st = target.stat()
    assert stat.S_IMODE(st.st_mode) == 0o640
    if owner:
        assert (st.st_uid, st.st_gid) == owner
    assert load_project(target).alternatives[0].segments[0].length_m == 30.0


@posix_only
def test_a_named_pipe_is_refused_without_opening_it(tmp_path):
    fifo = tmp_path / "line.json"
    os.mkfifo(fifo)
    with pytest.raises(WriteRefused, match="named pipe") as info:
        save_project(project(), fifo)  # opening a FIFO for writing would block: only os.stat looks at it
    assert info.value.kind == "not_regular"
    assert stat.S_ISFIFO(os.lstat(fifo).st_mode) and os.listdir(tmp_path) == ["line.json"]


@posix_only
def test_a_socket_is_refused(tmp_path):
    path = tmp_path / "s.json"
    if len(str(path)) > 100:  # AF_UNIX paths are limited to about 108 bytes
        pytest.skip("temporary folder path too long for a socket")
    with socket.socket(socket.AF_UNIX) as sock:
        sock.bind(str(path))
        with pytest.raises(WriteRefused, match="socket"):
            atomic_write_text(path, "x")
        assert stat.S_ISSOCK(os.lstat(path).st_mode)


def test_a_folder_is_refused(tmp_path):
    folder = tmp_path / "line.json"
    folder.mkdir()
    with pytest.raises(WriteRefused, match="folder") as info:
        save_project(project(), folder)
    assert info.value.kind == "folder" and folder.is_dir() and not any(folder.iterdir())


@pytest.mark.skipif(not Path("/dev/null").is_char_device(), reason="needs /dev/null")
def test_a_device_is_refused_before_anything_is_written(tmp_path, monkeypatch):
    # guards so that even broken code cannot touch the device: no temporary file, no replace
    monkeypatch.setattr(safe_write.tempfile, "mkstemp", lambda *a, **k: pytest.fail("a write was started"))
    monkeypatch.setattr(safe_write.os, "replace", lambda *a, **k: pytest.fail("a replace was tried"))
    with pytest.raises(WriteRefused, match="device"):
        save_project(project(), "/dev/null")
    if POSIX:
        link = tmp_path / "line.json"
        link.symlink_to("/dev/null")
        with pytest.raises(WriteRefused, match="device"):
            save_project(project(), link)
    assert Path("/dev/null").is_char_device()


# --------------------------------------------------------------------------- text that cannot be written


def test_a_name_with_a_lone_surrogate_is_refused_naming_the_field_and_nothing_is_written(tmp_path):
    target = tmp_path / "line.json"
    save_project(project(length=10.0), target)
    before = target.read_bytes()
    good = project()
    # built past validation, as a model that let it in would hold it
    bad_seg = good.alternatives[0].segments[0].model_copy(update={"name": "Run \udc80 1"})
    bad = good.model_copy(update={"alternatives": [good.alternatives[0].model_copy(update={"segments": [bad_seg]})]})
    with pytest.raises(WriteRefused) as info:
        save_project(bad, target)
    exc = info.value
    assert exc.kind == "unencodable" and exc.field == "alternatives[0].segments[0].name"
    assert "U+DC80" in str(exc) and not exc.offer_save_as
    assert target.read_bytes() == before and os.listdir(tmp_path) == ["line.json"]
    with pytest.raises(WriteRefused) as info:
        save_project(good.model_copy(update={"name": "\ud800"}), tmp_path / "new.json")
    assert info.value.field == "name" and not (tmp_path / "new.json").exists()


# --------------------------------------------------------------------------- leftovers of crashed saves


@posix_only
def test_stale_temporary_files_are_cleaned_up_on_the_next_save(tmp_path):
    import fcntl

    target = tmp_path / "line.json"
    save_project(project(), target)
    old = time.time() - STALE_TEMP_AGE_S - 60

    def leftover(name: str, age: float = old) -> Path:
        p = tmp_path / name
        p.write_bytes(b"partial")
        os.utime(p, (age, age))
        return p

    stale = [leftover(".line.json.a1b2c3d4.tmp"), leftover(".line.json.zz_9yy8x.tmp")]
    young = leftover(".line.json.q1w2e3r4.tmp", age=time.time())  # maybe another save right now
    held = leftover(".line.json.h0h0h0h0.tmp")
    other_file = leftover(".line.json.bak.a1b2c3d4.tmp")  # belongs to line.json.bak
    unrelated = leftover("line.json.a1b2c3d4.tmp")  # not hidden: not ours
    with open(held, "rb") as fh:
        fcntl.flock(fh.fileno(), fcntl.LOCK_EX)  # as a live save holds its temporary file
        save_project(project(length=20.0), target)
        assert held.exists()
    assert not any(p.exists() for p in stale)
    assert young.exists() and other_file.exists() and unrelated.exists()


@posix_only
def test_a_killed_save_leaves_a_temporary_file_that_is_removed_once_its_writer_is_gone(tmp_path):
    target = tmp_path / "line.json"
    target.write_text("OLD\n", encoding="utf-8")
    script = textwrap.dedent(f"""
        import sys, time
        sys.path.insert(0, {str(ROOT)!r})
        from solver.safe_write import atomic_replace
        with atomic_replace({str(target)!r}) as tmp:
            tmp.write_text("half of a project", encoding="utf-8")
            print("writing", flush=True)
            time.sleep(120)
    """)
    writer = subprocess.Popen([sys.executable, "-c", script], stdout=subprocess.PIPE, text=True)
    try:
        assert writer.stdout.readline().strip() == "writing"
        (left,) = [tmp_path / n for n in temps(tmp_path)]
        assert clean_stale_temps(target, max_age_s=0) == [] and left.exists()  # its writer is alive
        writer.kill()  # SIGKILL: no clean-up of its own
        writer.wait(timeout=30)
    finally:
        if writer.poll() is None:
            writer.kill()
        writer.stdout.close()
    assert target.read_text(encoding="utf-8") == "OLD\n" and left.exists()
    old = time.time() - STALE_TEMP_AGE_S - 1
    os.utime(left, (old, old))
    save_project(project(), target)
    assert temps(tmp_path) == [] and load_project(target) == project()


# --------------------------------------------------------------------------- the app


def test_the_app_offers_save_as_for_a_read_only_file(qtbot, tmp_path):
    pytest.importorskip("pytestqt")
    from app.main_window import MainWindow

    target = tmp_path / "line.json"
    target.write_text(dump_project(project(length=10.0)), encoding="utf-8")
    target.chmod(0o444)
    before = target.read_bytes()
    w = MainWindow(interactive=False)
    qtbot.addWidget(w)
    assert w.open_file(target, ask=False)
    w.doc.set_project(project(length=25.0), path=target, modified=True)
    offers = []
    w.ask_save_elsewhere = lambda text: offers.append(text) or True
    elsewhere = tmp_path / "line-copy.json"
    w.choose_save_path = lambda *a, **k: str(elsewhere)
    assert w.save()
    assert len(offers) == 1 and "read-only" in offers[0]
    assert target.read_bytes() == before
    assert load_project(elsewhere).alternatives[0].segments[0].length_m == 25.0
    assert w.doc.path == elsewhere and not w.doc.modified
    w.doc.shutdown()


def test_the_app_names_the_field_a_name_that_cannot_be_written(qtbot, tmp_path):
    pytest.importorskip("pytestqt")
    from app.main_window import MainWindow

    w = MainWindow(interactive=False)
    qtbot.addWidget(w)
    # built past validation (the project's own name: the Document hashes alternatives, not the project)
    w.doc.set_project(project().model_copy(update={"prepared_by": "A. N. \udc80ther"}), modified=True)
    target = tmp_path / "line.json"
    assert not w.save_to(target)  # no exception
    title, body = w.messages[-1]
    assert title == "Project not saved" and "Prepared by holds a character that cannot be written" in body
    assert "U+DC80" in body and "prepared_by" not in body and not target.exists() and w.doc.modified
    assert not list(tmp_path.glob("*.tmp")) and not list(tmp_path.glob(".*.tmp"))
    w.doc.shutdown()
