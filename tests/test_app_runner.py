"""The Document's solve runner: one place that calls the solver, results cached by content.

What a user would notice: an unchanged alternative is not solved again (switching back and forth,
the Side-by-Side, the report export all reuse it); an edit re-solves only the alternative edited;
a result computed for a model that has since changed never shows up; a failure reads the same
everywhere. The reference for "solved" is the solver itself: calls are counted by wrapping
``solver.solve``, and the published numbers are compared with an independent ``solve``.
"""

from __future__ import annotations

import logging
import threading

import pytest

pytest.importorskip("pytestqt")

import solver  # noqa: E402
from app import commands as C  # noqa: E402
from app.document import RESULT_CACHE_SIZE, Document  # noqa: E402
from solver.errors import InputError  # noqa: E402
from solver.model import Alternative, Layer, Project, Segment  # noqa: E402

REAL_SOLVE = solver.solve


def make_project() -> Project:
    # invented example: one water line, three insulation thicknesses
    def alt(name, mm):
        return Alternative(name=name, segments=[
            Segment(name="Run", length_m=40.0, heat_input_W_per_m=15.0,
                    insulation=[Layer(thickness_m=mm / 1000, conductivity_W_per_mK=0.04)]),
            Segment(name="Tail", length_m=8.0),
        ])

    return Project(name="Runner test line", alternatives=[alt("Thin", 20), alt("Medium", 50), alt("Thick", 80)])


class Counter:
    """Wraps ``solver.solve``: counts the calls per alternative name; can hold one name until released."""

    def __init__(self):
        self.calls: list[str] = []
        self.hold_name = None
        self.entered = threading.Event()
        self.release = threading.Event()

    def __call__(self, alternative, **options):
        self.calls.append(alternative.name)
        if alternative.name == self.hold_name:
            self.entered.set()
            assert self.release.wait(30), "test never released the held solve"
        return REAL_SOLVE(alternative, **options)


@pytest.fixture
def counter(monkeypatch):
    c = Counter()
    monkeypatch.setattr(solver, "solve", c)
    yield c
    c.release.set()


@pytest.fixture
def doc(qtbot, counter):
    d = Document(make_project())
    yield d
    counter.release.set()
    d.shutdown()


def wait_all(qtbot, doc, names=None):
    """Request results and wait until every one is held."""
    got = {}
    doc.alternative_solved.connect(lambda n, r, e: got.__setitem__(n, (r, e)))
    pending = doc.request_results(names)
    qtbot.waitUntil(lambda: all(n in got for n in pending), timeout=30000)
    return pending


def test_a_held_result_is_returned_without_solving(doc, qtbot, counter):
    pending = wait_all(qtbot, doc)
    assert pending == ["Thin", "Medium", "Thick"]
    assert sorted(counter.calls) == ["Medium", "Thick", "Thin"]  # each solved once
    held = [doc.result_for(i) for i in range(3)]
    assert all(r is not None for r in held)
    # the numbers are the solver's: compared with an independent solve of the same model
    assert held[1].outlet_temperature_K == pytest.approx(REAL_SOLVE(doc.project.alternatives[1]).outlet_temperature_K,
                                                         abs=1e-9)

    calls = len(counter.calls)
    assert doc.request_results() == []  # everything held: nothing to solve
    assert doc.result_for("Medium") is held[1]  # the same object, by name or by index
    # showing another alternative publishes its held result at once, without solving it again
    with qtbot.waitSignal(doc.result_ready, timeout=5000) as blocker:
        doc.set_current_alternative(2)
    assert blocker.args[0] is held[2]
    assert len(counter.calls) == calls


def test_undo_brings_the_earlier_result_back_without_solving(doc, qtbot, counter):
    with qtbot.waitSignal(doc.result_ready, timeout=30000):
        doc.request_solve()
    first = doc.result
    with qtbot.waitSignal(doc.result_ready, timeout=30000):
        doc.push(C.SetSegmentField(doc, 0, 0, "length_m", 55.0))
    assert doc.result is not first
    calls = len(counter.calls)
    with qtbot.waitSignal(doc.result_ready, timeout=30000) as blocker:
        doc.undo_stack.undo()
    assert blocker.args[0] is first
    assert len(counter.calls) == calls


def test_an_edit_invalidates_only_the_edited_alternative(doc, qtbot, counter):
    wait_all(qtbot, doc)
    thin, thick = doc.result_for("Thin"), doc.result_for("Thick")
    old_medium = doc.result_for("Medium")
    doc.push(C.SetSegmentField(doc, 1, 0, "length_m", 90.0))  # "Medium" only; "Thin" is on screen
    assert doc.result_for("Thin") is thin and doc.result_for("Thick") is thick
    assert doc.result_for("Medium") is None  # its held result is for the old model
    calls = len(counter.calls)
    assert wait_all(qtbot, doc) == ["Medium"]
    assert counter.calls[calls:] == ["Medium"]
    medium = doc.result_for("Medium")
    assert medium is not old_medium
    assert medium.profile.x_m[-1] == pytest.approx(98.0)  # 90 + 8 m: the edited line


def test_a_background_result_for_an_outdated_model_is_dropped(doc, qtbot, counter):
    announced, shown = [], []
    doc.alternative_solved.connect(lambda n, r, e: announced.append((n, r, e)))
    doc.result_ready.connect(shown.append)
    counter.hold_name = "Thick"
    assert doc.request_results(["Thick"]) == ["Thick"]
    assert counter.entered.wait(30)  # the worker is inside the solve of the old model (48 m)
    doc.push(C.SetSegmentField(doc, 2, 0, "length_m", 70.0))  # edited while it runs
    assert doc.result_for("Thick") is None
    counter.hold_name = None
    counter.release.set()
    # the edit brought "Thick" on screen: its new model is solved as the current alternative
    qtbot.waitUntil(lambda: not doc.background_solving and not doc.solving and bool(shown), timeout=30000)
    assert counter.calls == ["Thick", "Thick"]  # the old model, then the new one
    # neither the views of the current alternative nor the Side-by-Side ever saw the old model's result
    assert [r.profile.x_m[-1] for r in shown] == [pytest.approx(78.0)]  # 70 + 8 m
    assert [(n, r.profile.x_m[-1]) for n, r, _e in announced] == [("Thick", pytest.approx(78.0))]
    assert doc.result_for("Thick") is shown[0]


def test_a_current_result_for_an_outdated_model_is_dropped(doc, qtbot, counter):
    results = []
    doc.result_ready.connect(results.append)
    counter.hold_name = "Thin"
    doc.request_solve()  # first solve of a project: on the worker
    assert counter.entered.wait(30)
    doc.push(C.SetSegmentField(doc, 0, 0, "length_m", 33.0))
    counter.hold_name = None
    counter.release.set()
    qtbot.waitUntil(lambda: bool(results) and not doc.solving, timeout=30000)
    assert len(results) == 1
    assert results[0].profile.x_m[-1] == pytest.approx(41.0)  # 33 + 8 m: only the edited model is shown


def test_errors_are_wrapped_one_way(doc, qtbot, monkeypatch, caplog):
    def refuse(alternative, **options):
        raise InputError("segments[0].length_m", -5.0, "made-up refusal for the test")

    monkeypatch.setattr(solver, "solve", refuse)
    with qtbot.waitSignal(doc.solve_failed, timeout=30000) as blocker:
        doc.request_solve()
    assert blocker.args[0] == "segments[0].length_m: made-up refusal for the test, got -5.0"  # its own message

    def crash(alternative, **options):
        raise ZeroDivisionError("float division by zero")

    monkeypatch.setattr(solver, "solve", crash)
    got = []
    doc.alternative_solved.connect(lambda n, r, e: got.append((n, r, e)))
    with caplog.at_level(logging.ERROR, logger="app.document"):
        doc.request_results(["Medium"])
        qtbot.waitUntil(lambda: bool(got), timeout=30000)
    name, result, error = got[0]
    assert (name, result) == ("Medium", None)
    assert error == "internal error (ZeroDivisionError: float division by zero)"
    assert any("ZeroDivisionError" in (r.exc_text or "") for r in caplog.records)  # the traceback is logged


def test_the_cache_is_bounded(doc, qtbot, counter, monkeypatch):
    import app.document

    assert RESULT_CACHE_SIZE >= 12  # six alternatives and their undo steps stay held
    monkeypatch.setattr(app.document, "RESULT_CACHE_SIZE", 2)
    wait_all(qtbot, doc)  # solved in project order on the one worker thread
    assert len(doc._cache) == 2
    assert doc.result_for("Thin") is None  # the oldest went first
    assert doc.request_results() == ["Thin"]
