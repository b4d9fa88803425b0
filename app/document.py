"""The Document: the one project being edited, its undo stack, the selection and the solve runner.

Views take the Document in their constructor and listen to its signals; they never keep
their own copy of the design. The model changes only through commands
(:mod:`app.commands`) pushed with :meth:`Document.push`; the commands call the few model
methods below (``replace_alternative`` and friends), which emit :attr:`project_changed` and
ask for a new solve.

The solve runner is the one place in the app that calls the solver (:func:`run_solver`), so
every view, the report export and any later tool get the same results and the same error
messages:

- Every alternative is solved with the project's design cases (``solve(alt, design=...)``): the
  worst and hot cases and the tracing need come with each result (``result.design``). Its Hold Time
  (``result.design.hold_time``, worked out when first read: 10-30 ms) is read on the worker, never by
  a view: a worker solve reads it in the same job; after a solve run inline on the GUI thread it
  follows as a job of its own, announced by :attr:`hold_time_ready`. Views ask
  :meth:`Document.hold_time_of`, which gives it only once it has been worked out.
- Results are cached by content: the key is a hash of the alternative's JSON dump and the project's
  design cases (everything ``solve`` reads), so an unchanged alternative is never solved twice, an
  undo brings its result back at once, an edit of one alternative leaves the others' results in
  place, and an edit of a design case solves them again. The cache holds the last
  :data:`RESULT_CACHE_SIZE` outcomes; a hit returns the same ``Result`` object.
- The current alternative (Profiles, Key Figures, Checks): :meth:`request_solve` is debounced (a
  burst of edits gives one solve) and its outcome arrives as :attr:`result_ready` or
  :attr:`solve_failed`. A solve known to be quick (a few ms of CPU last time, same fluid) runs on
  the GUI thread ahead of the repaint, so the edit and its result are drawn together; so does a
  longer one (up to :data:`SYNC_SOLVE_LIMIT_S`) for an edit that does not follow another
  closely, as on the worker it would fight the repaint for the interpreter; edits arriving while
  such a solve runs count as a burst. Anything else runs on the worker thread. Each request
  carries the model generation it was made from; a result that arrives after the model has moved
  on is dropped and the newest model is solved next.
- Any alternatives (Side-by-Side, the report): :meth:`request_results` solves those not held yet
  on the worker thread, one job each, behind the current alternative's solves; each outcome is
  announced by :attr:`alternative_solved` to the alternatives that still have that content. A
  queued job whose alternative has been edited in the meantime is cancelled; a result that comes
  back for an outdated model is not announced (it stays in the cache under its own content key,
  where an undo finds it).
- Errors are wrapped one way: a :class:`solver.errors.CalorunError` becomes its plain message;
  anything else is a bug, logged with its traceback and shown as "internal error (…)".

Results are handed back on the GUI thread through a queued signal.

Uncertainty bands (:mod:`solver.uncertainty`: each method re-solved at the edges of its published
accuracy) of the current alternative are computed on the same worker after its result is on
screen and the edits have paused for :data:`BANDS_DELAY_MS`, at the lowest priority, one job
that checks between its solves whether it is still wanted: an edit cancels it, so a new result
waits at most for one perturbed solve. Bands are solved without the design cases and cached by the
alternative's content alone (an edit of a design case keeps them), and announced by
:attr:`bands_ready`; :meth:`bands_for_result` gives the bands of a result on screen.
"""

from __future__ import annotations

import atexit
import dataclasses
import hashlib
import logging
import math
import pathlib
import time
import weakref
from collections import OrderedDict
from contextlib import contextmanager
from typing import Optional, Union

from PySide6.QtCore import QCoreApplication, QEvent, QObject, QRunnable, QThreadPool, Qt, QTimer, Signal
from PySide6.QtGui import QUndoCommand, QUndoStack

from solver.model import Alternative, DesignCases, Project, Segment

log = logging.getLogger(__name__)

# documents alive in this process (and other owners of a worker: shut_down_at_exit): at interpreter exit
# each one's worker is stopped and waited for, so no solve thread is still running Python while the
# interpreter and Qt tear down
_LIVE_DOCUMENTS: "weakref.WeakSet[Document]" = weakref.WeakSet()


@atexit.register
def _shut_down_live_documents() -> None:
    for doc in list(_LIVE_DOCUMENTS):
        try:
            doc.shutdown()
        except RuntimeError:
            pass  # its Qt side is already gone, and with it its pool


def shut_down_at_exit(owner) -> None:
    """Have ``owner.shutdown()`` (stop its worker and wait for it) called at interpreter exit, as every
    Document's is; held weakly, so this keeps nothing alive."""
    _LIVE_DOCUMENTS.add(owner)


#: debounce interval of a burst of edits [ms]
SOLVE_DEBOUNCE_MS = 30
#: a solve that took less than this (CPU) last time runs on the GUI thread, ahead of the repaint,
#: for an edit that does not follow another closely [s]. Not only quick ones: on the worker a solve
#: shares the interpreter with the repaint of the edit and took 2-3x its CPU time in wall time, and
#: the edit was drawn twice (60-segment line, ~45 ms CPU: edit -> drawn 194 ms inline vs 221 ms on
#: the worker, medians of 7 runs on a loaded 2-core machine). The price: an edit made while it
#: solves waits for it, so the limit keeps that wait short
SYNC_SOLVE_LIMIT_S = 0.1
#: outcomes kept in the content-keyed cache (a 1,000-cell result is a few hundred kB)
RESULT_CACHE_SIZE = 48
_SOLVE_EVENT = QEvent.Type(QEvent.registerEventType())
# worker-pool priorities: the alternative on screen goes ahead of background solves
_PRIORITY_CURRENT = 1
_PRIORITY_BACKGROUND = 0
_PRIORITY_BANDS = -1
#: quiet time after the current alternative's result is shown before its uncertainty bands are
#: computed [ms]: while edits follow each other (each with its result; pauses between fields are
#: mostly well under half a second) no band solve competes with them. An edit that comes while a band
#: is computed waits for at most one perturbed solve (60-segment line: ~85 ms CPU, bench_gui case c)
BANDS_DELAY_MS = 600


def default_project() -> Project:
    """A small built-in project used when the demo file is missing (invented example)."""
    return Project(
        name="Untitled line",
        alternatives=[Alternative(segments=[Segment(name="Segment 1"), Segment(name="Segment 2")])],
    )


def alternative_key(alternative: Alternative, design: Optional[DesignCases] = None) -> str:
    """The content key of ``alternative`` solved with ``design``: a hash of their JSON dumps, i.e. of
    everything ``solve`` reads.

    Floats are dumped exactly (shortest round-trip form), so two alternatives share a key only when
    the solver would see the same inputs.
    """
    text = alternative.model_dump_json()
    if design is not None:
        text += "\x00" + design.model_dump_json()
    return hashlib.blake2b(text.encode("utf-8"), digest_size=16).hexdigest()


def run_solver(alternative: Alternative, design: Optional[DesignCases] = None, hold_time: bool = True):
    """``(result, error, cpu_seconds)`` of one solve; never raises. The one call of the solver in the app.

    With ``design`` (the project's design cases) the result carries ``result.design``; with
    ``hold_time`` its Hold Time is worked out here too (it is computed when first read: on the solving
    thread, never by a view; see :func:`run_hold_time` for a solve that leaves it for later).
    ``error`` is "" when solved. A :class:`solver.errors.CalorunError` (bad input, a state the
    solver cannot handle) gives its own plain message; any other exception is a bug: it is logged with
    its traceback and reported as "internal error (…)", so one broken alternative cannot take the app down.
    """
    from solver import solve
    from solver.errors import CalorunError

    cpu0 = time.thread_time()
    try:
        result = solve(alternative, design=design)
        if hold_time and result.design is not None:
            result.design.hold_time  # noqa: B018 - worked out now, on this thread (see DesignResult.hold_time)
    except CalorunError as exc:
        return None, str(exc), time.thread_time() - cpu0
    except Exception as exc:  # noqa: BLE001 - the boundary between the app and a solver bug: log it, keep running
        log.exception("internal error while solving alternative %r", getattr(alternative, "name", "?"))
        return None, f"internal error ({type(exc).__name__}: {exc})", time.thread_time() - cpu0
    return result, "", time.thread_time() - cpu0


def run_hold_time(result) -> str:
    """Work out ``result.design.hold_time`` (of a result solved with ``hold_time=False``); "" or the
    error. Never raises: the Hold Time's own error leaves the result as it is and is logged."""
    from solver.errors import CalorunError

    try:
        result.design.hold_time  # noqa: B018 - worked out when first read
    except CalorunError as exc:
        return str(exc)
    except Exception as exc:  # noqa: BLE001 - the boundary between the app and a solver bug: log it, keep running
        log.exception("internal error while working out the Hold Time of %r", getattr(result, "name", "?"))
        return f"internal error ({type(exc).__name__}: {exc})"
    return ""


def run_search(work, what: str, words=str) -> str:
    """Run ``work()`` (a Target Finder or Sweep search, on a worker thread); "" or the error. Never
    raises: a CalorunError gives ``words(exc)``, any other exception is a bug, logged with its traceback
    and reported as "internal error (…)" — the same boundary as :func:`run_solver`."""
    from solver.errors import CalorunError

    try:
        work()
    except CalorunError as exc:
        return words(exc)
    except Exception as exc:  # noqa: BLE001 - the boundary between the app and a solver bug: log it, keep running
        log.exception("internal error in %s", what)
        return f"internal error ({type(exc).__name__}: {exc})"
    return ""


class TicketJob(QRunnable):
    """One job of a worker pool: its ticket (plain data: what to do, and the outcome once done) and the sink on
    the GUI thread it emits the ticket into when done (a queued signal). ``run`` is the subclass's."""

    def __init__(self, ticket, sink: QObject):
        super().__init__()
        self.setAutoDelete(True)
        self._ticket = ticket
        self._sink = sink


class _HoldJob(TicketJob):
    """The Hold Time of a result solved inline on the GUI thread, worked out on the worker."""

    def run(self) -> None:  # worker thread
        self._ticket.error = run_hold_time(self._ticket.result)
        self._sink.finished.emit(self._ticket)


class _HoldTicket:
    __slots__ = ("result", "error", "handled")

    def __init__(self, result):
        self.result = result
        self.error = ""
        self.handled = False  # taken in on the GUI thread (by the queued signal or by _hold_now)


def run_bands(alternative: Alternative, result, cancelled=None):
    """``(Bands or None, error)`` of one solved alternative; never raises. None without an error: cancelled.

    A perturbed solve the solver refuses is named in the Bands (see :mod:`solver.uncertainty`);
    anything else is a bug, logged with its traceback and reported as "internal error (…)".
    """
    from solver.uncertainty import band_plan, combine, run_plan

    t0 = time.perf_counter()
    try:
        outcomes = run_plan(alternative, band_plan(alternative), cancelled=cancelled)
        if outcomes is None:
            return None, ""
        return combine(alternative, result, outcomes, seconds=time.perf_counter() - t0), ""
    except Exception as exc:  # noqa: BLE001 - the boundary between the app and a solver bug: log it, keep running
        log.exception("internal error while computing the bands of alternative %r", getattr(alternative, "name", "?"))
        return None, f"internal error ({type(exc).__name__}: {exc})"


class _BandsTicket:
    """One band computation; ``cancelled`` is set on the GUI thread, read by the worker between solves."""

    __slots__ = ("key", "alternative", "result", "cancelled", "bands", "error", "handled")

    def __init__(self, key: str, alternative: Alternative, result):
        self.key = key
        self.alternative = alternative
        self.result = result
        self.cancelled = False
        self.bands = None
        self.error = ""
        self.handled = False


class _BandsJob(TicketJob):
    def run(self) -> None:  # worker thread
        t = self._ticket
        if not t.cancelled:
            t.bands, t.error = run_bands(t.alternative, t.result, cancelled=lambda: t.cancelled)
        self._sink.finished.emit(t)


class SolveFailure(Exception):
    """An alternative that did not solve; ``str()`` is the runner's message (the report prints it)."""


class _Ticket:
    """One solve: what to solve, why, and (once done) its outcome. Passed whole through the queued signal."""

    __slots__ = ("key", "alternative", "design", "generation", "cancelled", "started", "skipped", "done",
                 "handled", "result", "error", "cpu", "inline")

    def __init__(self, key: str, alternative: Alternative, generation: Optional[int],
                 design: Optional[DesignCases] = None):
        self.key = key
        self.alternative = alternative
        self.design = design  # the project's design cases when the job was made (a value: safe to read off-thread)
        self.inline = False  # run on the GUI thread: its Hold Time follows on the worker (Document._hold_later)
        # the model generation of the current alternative this solve is for; None for a background solve
        self.generation = generation
        self.cancelled = False  # set on the GUI thread when the alternative changed before the job ran
        self.started = False
        self.skipped = False
        self.done = False  # set by the worker when the outcome is in
        self.handled = False  # taken in on the GUI thread (by the queued signal or by _drain)
        self.result = None
        self.error = ""
        self.cpu = math.nan


class _SolveSink(QObject):
    """Lives on the GUI thread; the worker emits into it and Qt queues the call across threads."""

    # the payload is always a _Ticket: PySide6 mis-counts references of a bare None passed through an
    # `object` argument of a queued signal, so never send one
    finished = Signal(object)


class _SolveJob(TicketJob):
    def run(self) -> None:  # worker thread (or the GUI thread for an inline solve)
        t = self._ticket
        t.started = True
        if t.cancelled:
            t.skipped = True  # edited before its turn came: nothing to solve
        else:
            t.result, t.error, t.cpu = run_solver(t.alternative, t.design, hold_time=not t.inline)
        t.done = True
        self._sink.finished.emit(t)


class Document(QObject):
    """The one project, its undo stack, the selection, the unit system and the solve runner."""

    project_replaced = Signal()
    project_changed = Signal()
    current_alternative_changed = Signal(int)
    selection_changed = Signal(int)
    result_ready = Signal(object)  # the current alternative solved
    solve_failed = Signal(str)  # the current alternative did not solve: the message
    units_changed = Signal(str)
    position_marked = Signal(float)
    # extras beyond the shared contract
    modified_changed = Signal(bool)
    path_changed = Signal(str)  # "" when the project has no file yet
    solve_started = Signal()
    # any alternative's outcome from the runner: (name, Result or None, error message or "")
    alternative_solved = Signal(str, object, str)
    # uncertainty bands ready: (alternative name, solver.uncertainty.Bands)
    bands_ready = Signal(str, object)
    # the Hold Time of a result worked out (after an inline solve): the Result
    hold_time_ready = Signal(object)

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
        self._running_generation: Optional[int] = None  # generation of the current-alternative solve under way
        self._published_generation: Optional[int] = None  # generation whose outcome the views have
        self._solve_wanted = False
        self._last_request = 0.0
        self.last_solve_seconds: float = math.nan
        self.last_solve_cpu_seconds: float = math.nan
        self._last_solved_fluid = None  # a new fluid may build property tables: solve it on the worker
        self._solve_started_at = 0.0

        # the runner: content-keyed outcomes, the jobs handed to the worker and not yet back
        self._cache: OrderedDict[str, tuple] = OrderedDict()  # key -> (Result | None, error)
        self._in_flight: dict[str, _Ticket] = {}
        self._jobs_out = 0  # jobs started on the pool and not yet returned

        self._pool = QThreadPool(self)
        self._pool.setMaxThreadCount(1)  # one solve at a time; newer requests coalesce
        # every ticket handed to the worker stays referenced here until its queued signal has arrived:
        # the signal carries a bare pointer whose owner (the job) is deleted when it ends
        self._emitted: set = set()
        self._sink = _SolveSink(self)
        self._sink.finished.connect(self._arrived_solved)
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.timeout.connect(self._start_solve)

        # uncertainty bands: content-keyed like results; one job at a time, after a quiet spell
        self.bands_enabled = True
        self._bands_cache: OrderedDict[str, tuple] = OrderedDict()  # key -> (Bands | None, error)
        self._bands_job: Optional[_BandsTicket] = None
        self._bands_sink = _SolveSink(self)
        self._bands_sink.finished.connect(self._arrived_bands)
        self._bands_timer = QTimer(self)
        self._bands_timer.setSingleShot(True)
        self._bands_timer.setInterval(BANDS_DELAY_MS)
        self._bands_timer.timeout.connect(self._start_bands)

        # results whose Hold Time has been worked out (on the worker, or by a synchronous call): by id,
        # with the result held so the id stays its own
        self._hold_done: dict[int, object] = {}
        self._hold_sink = _SolveSink(self)
        self._hold_sink.finished.connect(self._arrived_hold)

        self.undo_stack.cleanChanged.connect(self._on_clean_changed)
        _LIVE_DOCUMENTS.add(self)

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
        self._model_generation += 1
        self._cancel_stale_jobs()
        self.project_replaced.emit()
        self.path_changed.emit(str(self.path) if self.path else "")
        self.current_alternative_changed.emit(0)
        self.selection_changed.emit(0)
        self.modified_changed.emit(self.modified)
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
        if alt_index is None or alt_index == self.current_index:
            self._model_generation += 1
        if self._in_flight:
            self._cancel_stale_jobs()
        self.project_changed.emit()
        if alt_index is None or alt_index == self.current_index:
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

    # ------------------------------------------------------------------ solving: the current alternative

    def request_solve(self) -> None:
        """Ask for a solve of the current alternative.

        Leading edge plus trailing debounce: the first request after a quiet spell starts the
        solve at once (edit-to-replot stays short); requests within ``SOLVE_DEBOUNCE_MS`` of the
        previous one restart the timer, so a burst gives one solve. A solve whose last run took
        less than ``SYNC_SOLVE_LIMIT_S`` of CPU with the same fluid runs on the GUI thread ahead
        of the repaint (only while the worker is idle: one solve at a time); anything else (first
        solve, new fluid, very long line, the trailing solve of a burst) runs on the worker. An
        inline solve counts as a request until it ends, so edits queued behind it are a burst
        (typing gets one more solve, on the worker, not one inline solve per edit). A result
        already held is published without solving.
        """
        now = time.perf_counter()
        self._hold_bands()
        quiet = (now - self._last_request) * 1000.0 > SOLVE_DEBOUNCE_MS and not self._timer.isActive()
        self._last_request = now
        self._published_generation = None  # asked for: publish even if nothing changed
        if quiet:
            if (self._running_generation is None and self.last_solve_cpu_seconds < SYNC_SOLVE_LIMIT_S
                    and self._last_solved_fluid == self.current_alternative.fluid):
                # known solve time: run it ahead of the repaint (a high-priority posted event), so
                # the edit and its result are drawn in one pass; typing is not affected (edits
                # commit when a field is left, not per keystroke; see _solve_inline for bursts)
                QCoreApplication.postEvent(self, QEvent(_SOLVE_EVENT), Qt.HighEventPriority.value)
            else:
                self._start_solve()  # hand the model to the worker now
        else:
            self._timer.start(SOLVE_DEBOUNCE_MS)

    def event(self, e) -> bool:  # noqa: D401
        if e.type() == _SOLVE_EVENT:
            if self._published_generation == self._model_generation or self._timer.isActive():
                return True  # already shown (e.g. solve_now ran first), or a burst is still coming
            if self._running_generation is None and self._jobs_out == 0:
                self._solve_inline()
            else:
                self._start_solve()  # the worker is busy: queue it there, ahead of background solves
            return True
        return super().event(e)

    def _serve_current_from_cache(self, key: str) -> bool:
        """Publish the current alternative's held outcome, if any; True when it was."""
        held = self._cache_get(key)
        if held is None:
            return False
        self._timer.stop()
        self._solve_wanted = False
        self._publish(self._model_generation, *held)
        return True

    def _solve_inline(self) -> None:
        alt = self.current_alternative
        key = self._key(alt)
        if self._serve_current_from_cache(key):
            return
        ticket = _Ticket(key, alt, self._model_generation, self.project.design_cases)
        ticket.inline = True
        self._solve_started_at = time.perf_counter()
        self._last_solved_fluid = alt.fluid
        self.solve_started.emit()
        sink = _SolveSink()
        box: list = []
        sink.finished.connect(box.append)
        self._jobs_out += 1
        self._in_flight[ticket.key] = ticket
        self._running_generation = ticket.generation
        _SolveJob(ticket, sink).run()
        # edits that queued up while the GUI thread solved arrive in a burst: debounce them
        self._last_request = time.perf_counter()
        self._on_solved(box[0])

    def _start_solve(self) -> None:
        if self._published_generation == self._model_generation:
            return  # what was asked for is on screen already (e.g. the debounce timer fired after the result)
        alt = self.current_alternative
        key = self._key(alt)
        if self._serve_current_from_cache(key):
            return
        if self._running_generation is not None:
            self._solve_wanted = True  # solve the newest model as soon as the running one returns
            return
        self._solve_wanted = False
        self._running_generation = self._model_generation
        self._solve_started_at = time.perf_counter()
        self._last_solved_fluid = alt.fluid
        self.solve_started.emit()
        running = self._in_flight.get(key)
        if running is not None and not running.cancelled:
            running.generation = self._model_generation  # already on its way as a background solve: adopt it
            return
        self._submit(_Ticket(key, alt, self._model_generation, self.project.design_cases), _PRIORITY_CURRENT)

    def _submit(self, ticket: _Ticket, priority: int) -> None:
        self._in_flight[ticket.key] = ticket
        self._jobs_out += 1
        self._emitted.add(ticket)
        self._pool.start(_SolveJob(ticket, self._sink), priority)

    def _arrived_solved(self, ticket: _Ticket) -> None:  # GUI thread: the worker's signal came in
        self._emitted.discard(ticket)
        self._on_solved(ticket)

    def _arrived_bands(self, ticket: _BandsTicket) -> None:  # GUI thread
        self._emitted.discard(ticket)
        self._on_bands(ticket)

    def _on_solved(self, ticket: _Ticket) -> None:  # GUI thread
        if ticket.handled:
            return  # already taken in by _drain
        ticket.handled = True
        self._jobs_out -= 1
        if self._in_flight.get(ticket.key) is ticket:
            del self._in_flight[ticket.key]
        if not ticket.skipped:
            if ticket.result is not None and ticket.result.design is not None:
                if ticket.inline:
                    self._hold_later(ticket.result)
                else:
                    self._hold_done[id(ticket.result)] = ticket.result
            # content-keyed, so right for its content even if the model has moved on (an undo may want
            # it back); announced only to alternatives that still have this content
            self._cache_put(ticket.key, (ticket.result, ticket.error))
            self._announce(ticket.key, ticket.result, ticket.error)
        if ticket.generation is None or ticket.generation != self._running_generation:
            if ticket.generation is None and self.bands_enabled and not self.background_solving:
                self._bands_timer.start()  # the background solves are done: the bands held for them may go on
            return  # a background solve
        self._running_generation = None
        if ticket.skipped:
            return  # cancelled by shutdown
        self.last_solve_seconds = time.perf_counter() - self._solve_started_at
        self.last_solve_cpu_seconds = ticket.cpu
        if self._solve_wanted or ticket.generation != self._model_generation:
            self._solve_wanted = False
            if self._published_generation != self._model_generation:
                self._start_solve()  # the model moved on while this one ran: drop it, solve the newest
            return
        self._publish(ticket.generation, ticket.result, ticket.error)

    def _publish(self, generation: int, result, error: str) -> None:
        self._published_generation = generation
        if generation == self._model_generation:
            self._timer.stop()  # a request still waiting for this model is answered
        if error:
            self.last_error = error
            self.result_is_stale = self.result is not None
            self.solve_failed.emit(error)
            return
        self.last_error = None
        self.result_is_stale = False
        self.result = result
        self.result_ready.emit(result)
        if self.bands_enabled:
            self._bands_timer.start()  # its bands once the edits pause

    def _drain(self) -> None:
        """Wait for the worker and take in what it finished, without waiting for the event loop."""
        held = self._bands_job is not None or self._bands_timer.isActive()
        self._hold_bands()  # a band job stops after its current solve, and is asked for again below
        self._pool.waitForDone()
        if self._bands_job is not None:
            self._on_bands(self._bands_job)
        if held and self.bands_enabled:
            self._bands_timer.start()
        for ticket in list(self._in_flight.values()):
            if ticket.done:
                self._on_solved(ticket)

    def solve_now(self):
        """Solve the current alternative on this thread and publish the result (scripts, start-up)."""
        self._timer.stop()
        self._drain()
        if self._published_generation == self._model_generation and self.last_error is None and self.result is not None:
            return self.result
        self._running_generation = None
        self._solve_wanted = False
        self._solve_inline()
        self._hold_now(self.result)  # a script wants the whole result: its Hold Time on this thread too
        return self.result

    @property
    def solving(self) -> bool:
        """Whether a solve of the current alternative is due or under way."""
        return self._running_generation is not None or self._timer.isActive()

    # ------------------------------------------------------------------ solving: any alternative

    def _alternative(self, which: Union[int, str]) -> Alternative:
        alts = self.project.alternatives
        if isinstance(which, int):
            if not 0 <= which < len(alts):
                raise IndexError(f"alternative index {which} out of range 0..{len(alts) - 1}")
            return alts[which]
        for a in alts:
            if a.name == which:
                return a
        raise KeyError(f"no alternative named {which!r}; the project has {', '.join(repr(a.name) for a in alts)}")

    def outcome_for(self, which: Union[int, str]) -> Optional[tuple]:
        """``(Result or None, error or "")`` held for this alternative (index or name), or None if not solved yet.

        Its Hold Time may still be on its way (after an inline solve): read it with :meth:`hold_time_of`,
        or take the results from :meth:`results_now`, which waits for it.
        """
        return self._cache_get(self._key(self._alternative(which)))

    def result_for(self, which: Union[int, str]):
        """The held Result of this alternative (index or name), or None (not solved yet, or failed)."""
        held = self.outcome_for(which)
        return held[0] if held is not None else None

    def request_results(self, names=None) -> list[str]:
        """Solve these alternatives (all when None) on the worker unless their results are held.

        Returns the names still to come; each arrives as :attr:`alternative_solved`. Those held
        already are read with :meth:`outcome_for` / :meth:`result_for` (no signal, no solve).
        """
        alts = [self._alternative(n) for n in names] if names is not None else list(self.project.alternatives)
        pending = []
        for alt in alts:
            key = self._key(alt)
            if self._cache_get(key) is not None:
                continue
            pending.append(alt.name)
            running = self._in_flight.get(key)
            if running is None or running.cancelled:
                self._hold_bands()  # results someone waits for go first; the bands follow them
                self._submit(_Ticket(key, alt, None, self.project.design_cases), _PRIORITY_BACKGROUND)
        return pending

    def cancel_results(self) -> None:
        """Cancel background solves not started yet (e.g. the user cancelled an export)."""
        for t in self._in_flight.values():
            if t.generation is None and not t.started:
                t.cancelled = True

    def results_now(self, names=None) -> dict[str, tuple]:
        """Solve on this thread what is not held and return ``{name: (Result or None, error)}`` (scripts, tests)."""
        alts = [self._alternative(n) for n in names] if names is not None else list(self.project.alternatives)
        self._drain()
        out = {}
        for alt in alts:
            key = self._key(alt)
            held = self._cache_get(key)
            if held is None:
                result, error, _cpu = run_solver(alt, self.project.design_cases)
                if result is not None and result.design is not None:
                    self._hold_done[id(result)] = result
                held = (result, error)
                self._cache_put(key, held)
                self._announce(key, result, error)
            else:
                self._hold_now(held[0])  # held from an inline solve: its Hold Time may still be on its way
            out[alt.name] = held
        return out

    @property
    def background_solving(self) -> bool:
        """Whether background solves (:meth:`request_results`) are queued or under way."""
        return any(t.generation is None for t in self._in_flight.values())

    def _announce(self, key: str, result, error: str) -> None:
        for alt in self.project.alternatives:
            if self._key(alt) == key:
                self.alternative_solved.emit(alt.name, result, error)

    def _cancel_stale_jobs(self) -> None:
        """Cancel queued background solves whose alternative no longer exists as it was."""
        live = {self._key(a) for a in self.project.alternatives}
        for t in self._in_flight.values():
            if t.generation is None and t.key not in live:
                t.cancelled = True

    def _key(self, alt: Alternative) -> str:
        """The result cache's key of ``alt``: its content and the project's design cases."""
        return alternative_key(alt, self.project.design_cases)

    def _cache_get(self, key: str) -> Optional[tuple]:
        held = self._cache.get(key)
        if held is not None:
            self._cache.move_to_end(key)
        return held

    def _cache_put(self, key: str, outcome: tuple) -> None:
        self._cache[key] = outcome
        self._cache.move_to_end(key)
        while len(self._cache) > RESULT_CACHE_SIZE:
            _key, (old, _error) = self._cache.popitem(last=False)
            self._hold_done.pop(id(old), None)

    # ------------------------------------------------------------------ the Hold Time

    def hold_time_of(self, result):
        """``result.design.hold_time`` once it has been worked out off the views' path, else None
        (none asked for, none applies, or still on its way: :attr:`hold_time_ready` follows)."""
        if result is None or getattr(result, "design", None) is None or id(result) not in self._hold_done:
            return None
        return result.design.hold_time

    def hold_time_pending(self, result) -> bool:
        """Whether the Hold Time of ``result`` is still being worked out."""
        return result is not None and getattr(result, "design", None) is not None and id(result) not in self._hold_done

    def _hold_later(self, result) -> None:
        """After an inline solve: the Hold Time on the worker, ahead of background solves (GUI thread)."""
        ticket = _HoldTicket(result)
        self._emitted.add(ticket)
        # not counted in _jobs_out: the next edit may still be solved inline while this runs (as bands do)
        self._pool.start(_HoldJob(ticket, self._hold_sink), _PRIORITY_CURRENT)

    def _arrived_hold(self, ticket: _HoldTicket) -> None:  # GUI thread: the worker's signal came in
        self._emitted.discard(ticket)
        self._on_hold(ticket)

    def _on_hold(self, ticket: _HoldTicket) -> None:  # GUI thread
        if ticket.handled:
            return  # already taken in by _hold_now
        ticket.handled = True
        if ticket.result is self.result or any(r is ticket.result for r, _e in self._cache.values()):
            self._hold_done[id(ticket.result)] = ticket.result  # (not for a result the cache has let go)
        if ticket.error:
            log.warning("Hold Time of %r not worked out: %s", ticket.result.name, ticket.error)
        self.hold_time_ready.emit(ticket.result)

    def _hold_now(self, result) -> None:
        """Wait for the Hold Time of ``result`` (scripts, start-up, tests): worked out here if need be."""
        if not self.hold_time_pending(result):
            return
        self._pool.waitForDone()
        for ticket in [t for t in self._emitted if isinstance(t, _HoldTicket) and t.result is result]:
            self._on_hold(ticket)  # stays referenced until its queued signal has arrived
        if self.hold_time_pending(result):
            run_hold_time(result)
            self._hold_done[id(result)] = result
            self.hold_time_ready.emit(result)

    # ------------------------------------------------------------------ uncertainty bands

    def _hold_bands(self) -> None:
        """An edit or a new request: no band job now (a running one stops after its current solve)."""
        self._bands_timer.stop()
        if self._bands_job is not None:
            self._bands_job.cancelled = True

    def _start_bands(self) -> None:
        """Compute the bands of the result on screen on the worker, unless held or on their way (GUI thread)."""
        result = self.result
        if not self.bands_enabled or result is None or self.result_is_stale or self.last_error or self.solving:
            return
        alt = self.current_alternative
        key = alternative_key(alt)  # bands are solved without the design cases: keyed by the alternative alone
        held = self._cache.get(self._key(alt))
        if held is None or held[0] is not result:
            return  # the result on screen is not this content's (an edit is on its way)
        if self._bands_held(key, result) is not None:
            self.bands_ready.emit(alt.name, self._bands_cache[key][0])
            return
        job = self._bands_job
        if job is not None and job.key == key and not job.cancelled:
            return  # already on its way
        ticket = _BandsTicket(key, alt, result)
        self._bands_job = ticket
        self._emitted.add(ticket)
        self._pool.start(_BandsJob(ticket, self._bands_sink), _PRIORITY_BANDS)

    def _on_bands(self, ticket: _BandsTicket) -> None:  # GUI thread
        if ticket.handled:
            return
        ticket.handled = True
        if self._bands_job is ticket:
            self._bands_job = None
        if ticket.bands is None and not ticket.error:
            return  # cancelled: asked for again when its result is shown next
        self._bands_cache[ticket.key] = (ticket.bands, ticket.error)
        self._bands_cache.move_to_end(ticket.key)
        while len(self._bands_cache) > RESULT_CACHE_SIZE:
            self._bands_cache.popitem(last=False)
        if ticket.bands is None:
            return  # a bug, logged by run_bands: the views go on without bands
        for alt in self.project.alternatives:
            if alternative_key(alt) == ticket.key:
                self.bands_ready.emit(alt.name, ticket.bands)

    def _bands_held(self, key: str, result):
        """The cached bands of this content, around ``result`` (same content, same numbers), or None."""
        held = self._bands_cache.get(key)
        if held is None or held[0] is None:
            return None
        bands = held[0]
        if bands.base is not result:
            bands = dataclasses.replace(bands, base=result)  # the result was solved again: same content
            self._bands_cache[key] = (bands, "")
        self._bands_cache.move_to_end(key)
        return bands

    def bands_for_result(self, result):
        """The bands held around this Result object (the one a view shows), or None (not yet, or none)."""
        if result is None:
            return None
        for bands, _error in self._bands_cache.values():
            if bands is not None and bands.base is result:
                return bands
        return None

    def bands_for(self, which: Union[int, str]):
        """The held bands of this alternative (index or name), or None (not computed yet, or it failed)."""
        alt = self._alternative(which)
        held = self._cache_get(self._key(alt))
        if held is None or held[0] is None:
            return None
        return self._bands_held(alternative_key(alt), held[0])

    def bands_now(self, which: Union[int, str, None] = None):
        """Solve (if need be) and compute the bands of this alternative (default the current) on this
        thread, cache and announce them (scripts, tests, screenshots). None if it does not solve."""
        alt = self._alternative(self.current_index if which is None else which)
        result, _error = self.results_now([alt.name])[alt.name]
        if result is None:
            return None
        key = alternative_key(alt)
        bands = self._bands_held(key, result)
        if bands is None:
            ticket = _BandsTicket(key, alt, result)
            ticket.bands, ticket.error = run_bands(alt, result)
            self._on_bands(ticket)
            bands = ticket.bands
        return bands

    def shutdown(self) -> None:
        """Stop the timers, cancel background solves and wait for the running one (call before the application quits).

        The wait has no time limit: a job still running when the document is gone would signal into a
        deleted object and take the process down. Cancelled work stops after its current solve.
        """
        self._timer.stop()
        self._hold_bands()
        for t in self._in_flight.values():
            t.cancelled = True
        self._pool.waitForDone()
