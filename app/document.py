"""The Document: the one project being edited, its undo stack, the selection and the solve runner.

Views take the Document in their constructor and listen to its signals; they never keep
their own copy of the design. The model changes only through commands
(:mod:`app.commands`) pushed with :meth:`Document.push`; the commands call the few model
methods below (``replace_alternative`` and friends), which emit :attr:`project_changed` and
ask for a new solve.

Solving: :meth:`request_solve` is debounced (a burst of edits gives one solve) and runs the
solver on a worker thread of a one-thread pool, so the GUI never waits for it; a solve known
to be quick (a few ms of CPU last time, same fluid) runs on the GUI thread instead, ahead of
the repaint, so the edit and its result are drawn together. Each request
carries the model generation it was made from; a result that arrives after the model has
moved on is dropped, and the newest model is solved next. Results are handed back on the
GUI thread through a queued signal.
"""

from __future__ import annotations

import math
import pathlib
import time
from contextlib import contextmanager
from typing import Optional

from PySide6.QtCore import QCoreApplication, QEvent, QObject, QRunnable, QThreadPool, Qt, QTimer, Signal
from PySide6.QtGui import QUndoCommand, QUndoStack

from solver.model import Alternative, Project, Segment

#: debounce interval of a burst of edits [ms]
SOLVE_DEBOUNCE_MS = 30
#: a solve that took less than this last time runs on the GUI thread, ahead of the repaint [s]
SYNC_SOLVE_LIMIT_S = 0.035
_SOLVE_EVENT = QEvent.Type(QEvent.registerEventType())


def default_project() -> Project:
    """A small built-in project used when the demo file is missing (invented example)."""
    return Project(
        name="Untitled line",
        alternatives=[Alternative(segments=[Segment(name="Segment 1"), Segment(name="Segment 2")])],
    )


class _SolveSink(QObject):
    """Lives on the GUI thread; the worker emits into it and Qt queues the call across threads."""

    # one payload (generation, Result | None, error | None): PySide6 mis-counts references of a
    # bare None passed through an `object` argument of a queued signal, so never send one
    finished = Signal(object)
    cpu_seconds = math.nan  # CPU time of the last solve (not inflated by waiting for the GIL)


class _SolveTask(QRunnable):
    def __init__(self, generation: int, alternative: Alternative, sink: _SolveSink):
        super().__init__()
        self.setAutoDelete(True)
        self._generation = generation
        self._alternative = alternative
        self._sink = sink

    def run(self) -> None:  # worker thread
        try:
            from solver import solve
            from solver.errors import CalorunError

            cpu0 = time.thread_time()
            try:
                result = solve(self._alternative)
            except CalorunError as exc:
                self._sink.cpu_seconds = time.thread_time() - cpu0
                self._sink.finished.emit((self._generation, None, str(exc)))
                return
            self._sink.cpu_seconds = time.thread_time() - cpu0
            self._sink.finished.emit((self._generation, result, None))
        except Exception as exc:  # a bug or a missing module: report it, keep the app running
            self._sink.finished.emit((self._generation, None, f"internal error ({type(exc).__name__}): {exc}"))


class Document(QObject):
    """The one project, its undo stack, the selection, the unit system and the solve runner."""

    project_replaced = Signal()
    project_changed = Signal()
    current_alternative_changed = Signal(int)
    selection_changed = Signal(int)
    result_ready = Signal(object)
    solve_failed = Signal(str)
    units_changed = Signal(str)
    position_marked = Signal(float)
    # extras beyond the shared contract
    modified_changed = Signal(bool)
    path_changed = Signal(str)  # "" when the project has no file yet
    solve_started = Signal()

    def __init__(self, project: Optional[Project] = None, unit_system: str = "SI", parent: Optional[QObject] = None):
        super().__init__(parent)
        self.project: Project = project if project is not None else default_project()
        self.undo_stack = QUndoStack(self)
        self.path: Optional[pathlib.Path] = None
        self.current_index: int = 0
        self.selected_segment: int = 0
        self.result = None
        self.last_error: Optional[str] = None
        self.result_is_stale: bool = False
        self.unit_system: str = unit_system if unit_system in ("SI", "US") else "SI"
        self._unsaved_without_history = False  # e.g. a recovered project: modified but nothing to undo

        self._model_generation = 0
        self._running_generation: Optional[int] = None
        self._solve_wanted = False
        self._last_request = 0.0
        self.last_solve_seconds: float = math.nan
        self.last_solve_cpu_seconds: float = math.nan
        self._last_solved_fluid = None  # a new fluid may build property tables: solve it on the worker
        self._solve_started_at = 0.0

        self._pool = QThreadPool(self)
        self._pool.setMaxThreadCount(1)  # one solve at a time; newer requests coalesce
        self._sink = _SolveSink(self)
        self._sink.finished.connect(self._on_solved)
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.timeout.connect(self._start_solve)

        self.undo_stack.cleanChanged.connect(self._on_clean_changed)

    # ------------------------------------------------------------------ state

    @property
    def current_alternative(self) -> Alternative:
        return self.project.alternatives[self.current_index]

    @property
    def selected(self) -> Optional[Segment]:
        segs = self.current_alternative.segments
        if 0 <= self.selected_segment < len(segs):
            return segs[self.selected_segment]
        return None

    def _on_clean_changed(self, clean: bool) -> None:
        self.modified_changed.emit(self._unsaved_without_history or not clean)

    @property
    def modified(self) -> bool:
        return self._unsaved_without_history or not self.undo_stack.isClean()

    def mark_saved(self, path: Optional[pathlib.Path] = None) -> None:
        if path is not None:
            self.path = pathlib.Path(path)
            self.path_changed.emit(str(self.path) if self.path else "")
        self._unsaved_without_history = False
        self.undo_stack.setClean()
        self.modified_changed.emit(self.modified)

    def set_project(self, project: Project, path: Optional[pathlib.Path] = None, modified: bool = False) -> None:
        """Replace the whole project (New, Open, recover); the undo history starts afresh."""
        self.project = project
        self.path = pathlib.Path(path) if path is not None else None
        self.undo_stack.clear()
        self._unsaved_without_history = modified
        self.current_index = 0
        self.selected_segment = 0
        self.result = None
        self.result_is_stale = False
        self.last_solve_cpu_seconds = math.nan  # a new project may solve slower: first solve on the worker
        self.project_replaced.emit()
        self.path_changed.emit(str(self.path) if self.path else "")
        self.current_alternative_changed.emit(0)
        self.selection_changed.emit(0)
        self.modified_changed.emit(self.modified)
        self._model_generation += 1
        self.request_solve()

    # ------------------------------------------------------------------ editing

    def push(self, command: QUndoCommand) -> None:
        self.undo_stack.push(command)

    @contextmanager
    def macro(self, text: str):
        """Group several commands into one undo step."""
        self.undo_stack.beginMacro(text)
        try:
            yield
        finally:
            self.undo_stack.endMacro()

    # Model methods the commands call. Model objects are treated as values: a change builds
    # a new validated object and swaps it in, so the worker thread can read the old one safely.

    def replace_alternative(self, alt_index: int, alternative: Alternative) -> None:
        alts = list(self.project.alternatives)
        alts[alt_index] = alternative
        self.project.alternatives = alts  # validate_assignment checks project-level rules
        self._clamp_selection()
        self._changed(alt_index)

    def set_alternatives(self, alternatives: list[Alternative]) -> None:
        self.project.alternatives = list(alternatives)
        if self.current_index >= len(self.project.alternatives):
            self.current_index = len(self.project.alternatives) - 1
            self.current_alternative_changed.emit(self.current_index)
        self._clamp_selection()
        self._changed(None)

    def set_project_field(self, name: str, value) -> None:
        setattr(self.project, name, value)
        self._changed(None)

    def _clamp_selection(self) -> None:
        n = len(self.current_alternative.segments)
        if self.selected_segment >= n:
            self.selected_segment = n - 1
            self.selection_changed.emit(self.selected_segment)

    def _changed(self, alt_index: Optional[int]) -> None:
        self.project_changed.emit()
        if alt_index is None or alt_index == self.current_index:
            self._model_generation += 1
            self.request_solve()

    # ------------------------------------------------------------------ selection, units, marks

    def select_segment(self, index: int) -> None:
        n = len(self.current_alternative.segments)
        index = int(index) if -1 <= index < n else -1
        if index != self.selected_segment:
            self.selected_segment = index
            self.selection_changed.emit(index)

    def set_current_alternative(self, index: int) -> None:
        if not 0 <= index < len(self.project.alternatives):
            raise IndexError(f"alternative index {index} out of range 0..{len(self.project.alternatives) - 1}")
        if index == self.current_index:
            return
        self.current_index = index
        self.result = None
        self.current_alternative_changed.emit(index)
        n = len(self.current_alternative.segments)
        self.selected_segment = min(max(self.selected_segment, 0), n - 1)
        self.selection_changed.emit(self.selected_segment)
        self._model_generation += 1
        self.request_solve()

    def set_unit_system(self, system: str) -> None:
        if system not in ("SI", "US"):
            raise ValueError(f"unit system must be 'SI' or 'US', got {system!r}")
        if system != self.unit_system:
            self.unit_system = system
            self.units_changed.emit(system)

    def mark_position(self, x_m: float) -> None:
        self.position_marked.emit(float(x_m))

    # ------------------------------------------------------------------ solving

    def request_solve(self) -> None:
        """Ask for a solve of the current alternative.

        Leading edge plus trailing debounce: the first request after a quiet spell starts the
        solve at once (edit-to-replot stays short); requests within ``SOLVE_DEBOUNCE_MS`` of the
        previous one restart the timer, so a burst gives one solve. A solve whose last run took
        less than ``SYNC_SOLVE_LIMIT_S`` of CPU with the same fluid runs on the GUI thread ahead
        of the repaint; anything else (first solve, new fluid, slow line) runs on the worker.
        """
        now = time.perf_counter()
        quiet = (now - self._last_request) * 1000.0 > SOLVE_DEBOUNCE_MS and not self._timer.isActive()
        self._last_request = now
        if quiet:
            if (self._running_generation is None and self.last_solve_cpu_seconds < SYNC_SOLVE_LIMIT_S
                    and self._last_solved_fluid == self.current_alternative.fluid):
                # quick solve: run it ahead of the repaint (a high-priority posted event), so the
                # edit and its result are drawn in one pass; typing is not affected (edits
                # commit when a field is left, not per keystroke)
                QCoreApplication.postEvent(self, QEvent(_SOLVE_EVENT), Qt.HighEventPriority.value)
            else:
                self._start_solve()  # hand the model to the worker now
        else:
            self._timer.start(SOLVE_DEBOUNCE_MS)

    def event(self, e) -> bool:  # noqa: D401
        if e.type() == _SOLVE_EVENT:
            if self._running_generation is None and not self._timer.isActive():
                self._solve_inline()
            elif not self._timer.isActive():
                self._solve_wanted = True
            return True
        return super().event(e)

    def _solve_inline(self) -> None:
        gen = self._model_generation
        sink = _SolveSink()
        box: dict = {}
        sink.finished.connect(lambda payload: box.update(payload=payload))
        self._solve_started_at = time.perf_counter()
        self._last_solved_fluid = self.current_alternative.fluid
        self.solve_started.emit()
        _SolveTask(gen, self.current_alternative, sink).run()
        self._sink.cpu_seconds = sink.cpu_seconds
        self._on_solved(box["payload"])

    def _start_solve(self) -> None:
        if self._running_generation is not None:
            self._solve_wanted = True  # solve the newest model as soon as the running one returns
            return
        self._solve_wanted = False
        self._running_generation = self._model_generation
        self._solve_started_at = time.perf_counter()
        self.solve_started.emit()
        self._last_solved_fluid = self.current_alternative.fluid
        self._pool.start(_SolveTask(self._model_generation, self.current_alternative, self._sink))

    def _on_solved(self, payload) -> None:  # GUI thread
        generation, result, error = payload
        self._running_generation = None
        self.last_solve_seconds = time.perf_counter() - self._solve_started_at
        self.last_solve_cpu_seconds = self._sink.cpu_seconds
        self._solve_wanted = False
        if generation != self._model_generation:
            self._start_solve()  # the model moved on while this one ran: drop it, solve the newest
            return
        if error is not None:
            self.last_error = str(error)
            self.result_is_stale = self.result is not None
            self.solve_failed.emit(self.last_error)
            return
        self.last_error = None
        self.result_is_stale = False
        self.result = result
        self.result_ready.emit(result)

    def solve_now(self):
        """Solve the current alternative on this thread and publish the result (scripts, start-up)."""
        self._timer.stop()
        self._pool.waitForDone()
        self._running_generation = None
        self._solve_wanted = False
        self._solve_inline()
        return self.result

    @property
    def solving(self) -> bool:
        return self._running_generation is not None or self._timer.isActive()

    def shutdown(self, timeout_ms: int = 5000) -> None:
        """Stop the timer and wait for a running solve (call before the application quits)."""
        self._timer.stop()
        self._pool.waitForDone(timeout_ms)
