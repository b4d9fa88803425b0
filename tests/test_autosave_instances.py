"""Autosave per running instance (issue 9): each Calorun keeps its unsaved work in its own file with
a lock held for its life; at start-up only the work of instances that are gone is offered; a
running instance's file is never offered nor removed; a failed autosave leaves nothing behind.

"Gone" is played two ways: a real second process that is killed (SIGKILL, as a crash), and a window
in this process that lets go of its lock without removing its files. CALORUN_RECOVERY_DIR (set for
every test by conftest.py) keeps all of it in the test's own folder.
"""

from __future__ import annotations

import os
import subprocess
import sys
import textwrap
import time
from pathlib import Path

import pytest

pytest.importorskip("pytestqt")

from app import commands as C  # noqa: E402
from app import recovery  # noqa: E402
from app.main_window import MainWindow  # noqa: E402
from solver.model import Alternative, Project, Segment  # noqa: E402

ROOT = Path(__file__).resolve().parent.parent


def line(name: str = "Autosave test line", length: float = 15.0) -> Project:
    # invented example
    segment = Segment(name="Run 1", length_m=length)
    return Project(name=name, alternatives=[Alternative(name="Base", segments=[segment])])


def window(qtbot, offers: list | None = None, answer: bool = False) -> MainWindow:
    w = MainWindow(interactive=False)
    qtbot.addWidget(w)
    if offers is not None:
        w.ask_recover = lambda info: offers.append(info) or answer
    return w


def edited(w: MainWindow, length: float) -> MainWindow:
    w.doc.set_project(line())
    w.doc.push(C.SetSegmentField(w.doc, 0, 0, "length_m", length))
    assert w.doc.modified
    return w


def crash(w: MainWindow) -> Path:
    """As if the process died: no closeEvent, no more autosaves; its files stay, its lock is gone."""
    w._autosave_timer.stop()
    w._edit_autosave.stop()
    w.doc.shutdown()
    w.recovery_slot.release(remove_files=False)
    return w.recovery_file


def names() -> list[str]:
    return sorted(p.name for p in recovery.recovery_dir().iterdir())


# --------------------------------------------------------------------------- two instances


def test_each_window_has_its_own_file_and_a_second_one_leaves_the_first_alone(qtbot):
    first = edited(window(qtbot), 41.0)
    assert first.write_recovery() == first.recovery_file
    kept = first.recovery_file.read_bytes()

    offers: list = []
    second = window(qtbot, offers)
    assert second.recovery_file != first.recovery_file
    assert not second.check_recovery()
    assert offers == []  # the first is running: nothing of it is offered
    edited(second, 42.0).write_recovery()
    second.close()  # the second's clean exit removes its own file only
    assert not second.recovery_file.exists()
    assert first.recovery_file.read_bytes() == kept
    first.doc.shutdown()


def test_a_live_instance_in_another_process_is_not_offered_and_a_killed_one_is(qtbot):
    script = textwrap.dedent(f"""
        import os, sys, time
        sys.path.insert(0, {str(ROOT)!r})
        from app.recovery import InstanceSlot, write_recovery
        from solver.model import Alternative, Project, Segment
        slot = InstanceSlot()
        p = Project(name="Other process line",
                    alternatives=[Alternative(name="Base", segments=[Segment(name="S", length_m=77.0)])])
        write_recovery(slot.path, p, None)
        print(slot.path, flush=True)
        time.sleep(120)
    """)
    other = subprocess.Popen([sys.executable, "-c", script], stdout=subprocess.PIPE, text=True, env=dict(os.environ))
    try:
        their_file = Path(other.stdout.readline().strip())
        assert their_file.exists() and their_file.parent == recovery.recovery_dir()

        offers: list = []
        w = window(qtbot, offers, answer=False)
        assert not w.check_recovery()
        assert offers == [] and their_file.exists()  # alive: neither offered nor removed

        other.kill()  # a crash: the system drops its lock
        other.wait(timeout=30)
        w.ask_recover = lambda info: offers.append(info) or True
        assert w.check_recovery()
        assert len(offers) == 1 and "Other process line" in offers[0]
        assert w.doc.current_alternative.segments[0].length_m == 77.0 and w.doc.modified
        assert not their_file.exists() and not their_file.with_suffix(".lock").exists()
        assert w.recovery_file.exists()  # the work is now kept under this window's own name
        w.doc.shutdown()
    finally:
        if other.poll() is None:
            other.kill()
        other.stdout.close()


def test_declining_a_dead_instances_work_removes_only_that_file(qtbot):
    live = edited(window(qtbot), 43.0)
    live.write_recovery()
    dead = edited(window(qtbot), 44.0)
    dead.write_recovery()
    dead_file = crash(dead)

    offers: list = []
    w = window(qtbot, offers, answer=False)
    assert not w.check_recovery()
    assert len(offers) == 1  # the dead one only
    assert not dead_file.exists() and not dead_file.with_suffix(".lock").exists()
    assert live.recovery_file.exists()
    w.close()
    assert live.recovery_file.exists()
    live.doc.shutdown()


def test_several_dead_instances_are_offered_newest_first_one_after_another(qtbot):
    files = []
    for i, length in enumerate((51.0, 52.0, 53.0)):
        w = edited(window(qtbot), length)
        w.write_recovery()
        stamp = time.time() - 300 + 60 * i  # written a minute apart: 53 m is the newest
        os.utime(w.recovery_file, (stamp, stamp))
        files.append(crash(w))

    offers: list = []
    answers = iter([False, True])
    w = window(qtbot)
    w.ask_recover = lambda info: offers.append(info) or next(answers)
    assert w.check_recovery()
    # 53 m declined (removed), 52 m taken (moved into w's file), 51 m not offered yet and kept
    assert len(offers) == 2 and w.doc.current_alternative.segments[0].length_m == 52.0
    assert [f.exists() for f in files] == [True, False, False]

    later: list = []
    again = window(qtbot, later, answer=False)
    assert not again.check_recovery()
    assert len(later) == 1 and not files[0].exists()  # offered next time, then declined
    assert w.recovery_file.exists()  # the first window is still running: its file stays
    w.doc.shutdown()


def test_an_unreadable_dead_file_is_set_aside_and_a_live_one_left_alone(qtbot):
    live = window(qtbot)
    live.recovery_file.write_text("{ not json", encoding="utf-8")  # a live instance's, whatever it holds
    dead = recovery.recovery_dir() / "recovery-1-2.json"
    dead.write_text("{ not json", encoding="utf-8")

    w = window(qtbot, [])
    assert not w.check_recovery()
    assert w.messages[-1][0] == "Recovery file unreadable"
    assert not dead.exists() and (dead.parent / "recovery-1-2.unreadable.json").exists()
    assert live.recovery_file.read_text(encoding="utf-8") == "{ not json"


def test_the_single_file_of_earlier_versions_is_offered(qtbot):
    legacy = recovery.recovery_dir() / recovery.LEGACY_FILE
    legacy.parent.mkdir(parents=True, exist_ok=True)
    recovery.write_recovery(legacy, line(length=61.0), None)
    offers: list = []
    w = window(qtbot, offers, answer=True)
    assert w.check_recovery() and w.doc.current_alternative.segments[0].length_m == 61.0
    assert not legacy.exists()
    w.doc.shutdown()


def test_a_dead_instance_with_nothing_unsaved_leaves_no_lock_behind(qtbot):
    quiet = window(qtbot)
    lock = quiet.recovery_slot.lock_path
    crash(quiet)
    leftover = recovery.recovery_dir() / f".{quiet.recovery_file.name}.a1b2c3d4.tmp"  # a write it was killed in
    leftover.write_text("half", encoding="utf-8")
    w = window(qtbot, [])
    assert not w.check_recovery()
    assert not lock.exists() and not leftover.exists()
    assert names() == sorted([w.recovery_slot.lock_path.name])


# --------------------------------------------------------------------------- failed autosaves


def test_a_failed_autosave_leaves_nothing_behind(qtbot, monkeypatch):
    w = edited(window(qtbot), 45.0)

    def full(src, dst):
        raise OSError(28, "No space left on device (simulated)")

    with monkeypatch.context() as m:
        m.setattr(os, "replace", full)
        assert w.write_recovery() is None  # no exception: a status message
        assert "Autosave failed" in w.statusBar().currentMessage()
        assert names() == [w.recovery_slot.lock_path.name]  # no temporary file, no partial file
    assert w.write_recovery() == w.recovery_file
    good = w.recovery_file.read_bytes()
    with monkeypatch.context() as m:
        m.setattr(os, "replace", full)
        w.doc.push(C.SetSegmentField(w.doc, 0, 0, "length_m", 46.0))
        assert w.write_recovery() is None
        assert w.recovery_file.read_bytes() == good  # the last good copy stays
        assert names() == sorted([w.recovery_file.name, w.recovery_slot.lock_path.name])
    w.doc.shutdown()


def test_an_autosave_of_text_that_cannot_be_written_is_refused_cleanly(qtbot):
    w = window(qtbot)
    # built past validation: a name the model would refuse at entry
    w.doc.set_project(line().model_copy(update={"description": "pump \udc80"}), modified=True)
    assert w.write_recovery() is None
    assert "cannot be written" in w.statusBar().currentMessage()
    assert names() == [w.recovery_slot.lock_path.name]
    w.doc.shutdown()


def test_a_save_and_a_clean_exit_leave_no_recovery_file(qtbot, tmp_path):
    w = edited(window(qtbot), 47.0)
    assert w.write_recovery() == w.recovery_file
    assert w.save_to(tmp_path / "line.json")
    assert not w.recovery_file.exists()  # saved: nothing to recover
    w.close()
    assert names() == []


def test_recovered_work_stays_in_the_old_file_until_it_is_kept_in_the_new_one(qtbot, monkeypatch):
    dead = edited(window(qtbot), 49.0)
    dead.write_recovery()
    dead_file = crash(dead)
    w = window(qtbot, [], answer=True)

    def disk_full(*args, **kwargs):
        raise OSError(28, "No space left on device (simulated)")

    with monkeypatch.context() as m:
        m.setattr(recovery, "write_recovery", disk_full)
        assert w.check_recovery()
    assert w.doc.current_alternative.segments[0].length_m == 49.0
    assert dead_file.exists()  # this window could not keep a copy: the only one on disk stays
    w.doc.shutdown()
