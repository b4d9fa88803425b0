"""GUI speed as a user feels it: edit-to-replot and start-up to first plot (prints figures; not a test).

Every figure is printed as ``median [min–max]`` over the repeats, in wall-clock time on this
machine, with the window 1600×1000 on Qt's offscreen platform (it paints into memory as a
visible window would; the copy to a screen is not included).

Cases (issue 7, item 8; targets in DESIGN §6):

a. **Spaced edits** (a person types a value, presses Enter, looks): the length of the selected
   segment is typed into the Segment Card and committed, one edit every ``--spacing-ms``.
   *Edit → drawn* runs from the commit to the end of the repaint that shows the new result;
   split into: *before solve* (the command, its validation, every view's reaction to the
   changed model, until the solve starts), *solve* (wall time of the solve as the Document
   timed it; its CPU time beside it), *views* (every view taking the result: curves' setData,
   Key Figures, Checks, Line Strip, status), and *paint* (from the views done until Qt has
   no repaint left: layout and painting of every dirty widget). *Solve alone* is the same
   alternative solved by ``solver.solve`` in this process with the GUI idle (no contention).
   The first edit after loading is stated separately (the first solve of a new project always
   runs on the worker thread); the median is over the rest.
b. **Typing** (edits arriving faster than solves): ``--typing-edits`` edits ``--typing-ms``
   apart, driven through the same Segment Card path; an edit is applied when the GUI thread
   is free, as a queued key press would be. *Last edit → drawn* is from the last edit to the
   end of the repaint of the result that includes it; also how many solves started and how
   many results were drawn for the burst.
c. The same on a **60-segment line** (invented: the demo's five segments repeated twelve
   times, 2.2 km).
d. **Start-up to first plot** in a fresh interpreter (``python -c``) for each run: from the
   launch of the process to the end of the first repaint showing the demo's result. Plain runs
   give the figure and its phases (imports up to ``app.main_window``, building the window with
   its panel imports, loading the demo, the first solve on the worker thread with its
   property tables, the first paint). Interleaved runs that import the libraries the app loads
   by its first plot (numpy, PySide6, pyqtgraph, pydantic, CoolProp, …; never one it does not
   load) one at a time first give each library's import time. Wall time and CPU time of the
   process (all threads) for every phase. Measured twice: as this environment runs Python
   (``PYTHONDONTWRITEBYTECODE=1``: app/ and solver/ compiled from source at every start) and
   with a bytecode cache (as an installed or normally run copy has; kept under /tmp so the
   tree is not touched). One warm-up run before each set is not counted.
e. **Paint per panel**: a forced full repaint (``QWidget.repaint()``) of each panel, median
   of repeats. An edit repaints only what changed, so this is an upper bound per panel.

CPU figures beside the wall figures: this 2-core machine is often shared; CPU time of a thread
hardly moves with the load of other processes, wall time does (the header prints the load
average). The GUI thread's CPU per edit includes the solve when it ran inline.

Run: ``.venv/bin/python benchmarks/bench_gui.py`` (about three minutes; ``--quick`` for fewer
repeats; ``--only a,b,c,d,e`` for a subset). Where the time goes: ``timers_gui.py`` (a clock
around the main handlers, per edit) and ``profile_gui.py`` (cProfile per edit).
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from dataclasses import dataclass, field
from pathlib import Path
from typing import Callable, Optional

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))
os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("PYQTGRAPH_QT_LIB", "PySide6")
_SETTINGS = tempfile.mkdtemp(prefix="calorun-bench-")
os.environ.setdefault("CALORUN_SETTINGS_DIR", _SETTINGS)  # never the user's settings or recent files
os.environ.setdefault("CALORUN_RECOVERY_DIR", _SETTINGS)

TARGETS_MS = {"demo": 30.0, "60 segments": 60.0}
STARTUP_TARGET_S = 0.8


# --------------------------------------------------------------------------- figures


def fmt(values, unit: str = "ms", digits: int = 1) -> str:
    """``median [min–max] unit`` of a list (or ``—`` when empty)."""
    vals = [v for v in values if v == v]
    if not vals:
        return "—"
    return (f"{statistics.median(vals):.{digits}f} [{min(vals):.{digits}f}–{max(vals):.{digits}f}] {unit}")


def med(values) -> float:
    vals = [v for v in values if v == v]
    return statistics.median(vals) if vals else float("nan")


# --------------------------------------------------------------------------- the window under test


def invented_long_line(alternative, n_segments: int = 60):
    """The demo alternative's segments repeated to ``n_segments`` (invented data, unique names)."""
    from solver.model import Alternative

    base = list(alternative.segments)
    segs = []
    for k in range(n_segments):
        s = base[k % len(base)]
        segs.append(s.model_copy(update={"name": f"{s.name} {k // len(base) + 1}"}))
    data = alternative.model_dump()
    data["segments"] = [s.model_dump() for s in segs]
    return Alternative.model_validate(data)


def long_project(n_segments: int = 60):
    """The demo project with its first alternative made ``n_segments`` long (see :func:`invented_long_line`)."""
    from app.main_window import load_demo_project

    project = load_demo_project()
    alts = list(project.alternatives)
    alts[0] = invented_long_line(alts[0], n_segments)
    return project.model_copy(update={"alternatives": alts})


@dataclass
class Drawn:
    """Timestamps (perf_counter seconds) and counts of one edit or burst, filled by :class:`Session`."""

    t0: float
    solve_start: float = float("nan")
    views_done: float = float("nan")
    drawn: float = float("nan")
    solve_wall: float = float("nan")
    solve_cpu: float = float("nan")
    solves: int = 0
    results: int = 0
    extra: dict = field(default_factory=dict)

    def ms(self, a: float, b: float) -> float:
        return (b - a) * 1000.0


class Session:
    """One MainWindow with a project loaded, plus probes on the Document's signals and on the
    window's repaints (an event filter on the top-level window only: it sees each UpdateRequest,
    which is when Qt lays out and paints the dirty widgets)."""

    def __init__(self, project=None, width: int = 1600, height: int = 1000):
        from PySide6.QtCore import QEvent, QObject, QTimer
        from PySide6.QtWidgets import QApplication

        self.app = QApplication.instance() or QApplication([])
        from app.main_window import MainWindow

        self.win = MainWindow(interactive=False)
        self.win.resize(width, height)
        if project is None:
            self.win.load_demo()
        else:
            self.win.doc.set_project(project)
        self.win.show()
        self.doc = self.win.doc
        self.updates = 0  # UpdateRequests delivered to the window (each one is a repaint pass)
        self._edits = 0  # every edit gets a value never used before: the Document caches results by content
        self.solve_starts: list[float] = []
        self.results: list[float] = []
        self.plot_paints: list[float] = []  # end of each repaint of the Profiles plots
        self._watch_plot_paints()
        update_type = QEvent.Type.UpdateRequest
        session = self

        class _Filter(QObject):
            def eventFilter(self, obj, event):  # noqa: N802 (Qt name)
                if event.type() == update_type:
                    session.updates += 1
                return False

        self._filter = _Filter()
        self.win.installEventFilter(self._filter)
        handle = self.win.windowHandle()
        if handle is not None:
            handle.installEventFilter(self._filter)
        # connected after every view: the result slot runs when all views have taken the result
        self.doc.solve_started.connect(lambda: self.solve_starts.append(time.perf_counter()))
        self.doc.result_ready.connect(lambda _r: self.results.append(time.perf_counter()))
        # a heartbeat so waiting for events never blocks for long
        self._beat = QTimer()
        self._beat.start(20)
        self.wait_result(time.perf_counter(), timeout=120)
        self.idle(0.3)

    def _watch_plot_paints(self) -> None:
        """Note when a repaint of the Profiles plots ends (a wrapper on pyqtgraph's
        GraphicsView.paintEvent for this window's plots only; two clock reads per repaint)."""
        import pyqtgraph as pg

        graphics = getattr(getattr(self.win, "profiles", None), "graphics", None)
        if graphics is None:
            return
        cls = pg.GraphicsView
        original = cls.paintEvent
        if getattr(original, "_bench_plot_paints", False):  # a wrapper of an earlier Session: replace it
            original = original.__wrapped__
        session = self

        def paint_event(view, event):
            try:
                return original(view, event)
            finally:
                if view is graphics:
                    session.plot_paints.append(time.perf_counter())

        paint_event.__wrapped__ = original
        paint_event._bench_plot_paints = True
        cls.paintEvent = paint_event

    # ---- event-loop helpers

    def idle(self, seconds: float) -> None:
        """Let the window run with no input for ``seconds`` (timers, late repaints)."""
        end = time.perf_counter() + seconds
        while time.perf_counter() < end:
            self.app.processEvents()
            time.sleep(0.002)

    def wait_result(self, after: float, timeout: float = 30.0) -> float:
        """Run the event loop until a result newer than ``after`` has been taken by the views."""
        from PySide6.QtCore import QEventLoop

        end = time.perf_counter() + timeout
        while not (self.results and self.results[-1] > after):
            if time.perf_counter() > end:
                raise RuntimeError(f"no result within {timeout} s: {self.doc.last_error}")
            self.app.processEvents(QEventLoop.AllEvents | QEventLoop.WaitForMoreEvents)
        return self.results[-1]

    def wait_painted(self) -> float:
        """Process events until a pass paints nothing; the end of the last pass that painted."""
        last = time.perf_counter()
        for _ in range(50):
            before = self.updates
            self.app.processEvents()
            if self.updates == before:
                break
            last = time.perf_counter()
        return last

    # ---- the edit a user makes

    def editor(self) -> Callable[[float], None]:
        """Type a length into the Segment Card and commit it (Enter), or, if the card's API has
        moved, push the same command the card pushes."""
        card = getattr(self.win, "segment_card", None)
        edit = getattr(card, "length_edit", None)
        if edit is not None and hasattr(edit, "commit"):
            line = getattr(edit, "line_edit", edit)

            def by_card(value_m: float) -> None:
                line.setText(f"{value_m:.4f}")  # SI display: metres, as typed to 0.1 mm
                edit.commit()

            self.edit_path = "Segment Card length field (setText + commit)"
            return by_card
        from app import commands

        def by_command(value_m: float) -> None:
            self.doc.push(commands.SetSegmentFields(self.doc, self.doc.current_index, self.doc.selected_segment,
                                                    {"length_m": value_m}))

        self.edit_path = "SetSegmentFields command pushed on the Document"
        return by_command

    def selected_length(self) -> float:
        return self.doc.current_alternative.segments[max(self.doc.selected_segment, 0)].length_m

    def new_length(self, base: float, step: float) -> float:
        """``base`` changed by ``step`` (a fraction, as a person edits), made unique in the 4th decimal."""
        self._edits += 1
        return round(round(base * (1.0 + step), 1) + 0.0001 * (self._edits % 1000), 4)

    # ---- the cases

    def spaced_edits(self, n: int, spacing_s: float) -> list[Drawn]:
        edit = self.editor()
        base = self.selected_length()
        out = []
        for i in range(n):
            self.idle(spacing_s)
            d = Drawn(t0=time.perf_counter())
            cpu0 = time.thread_time()
            n_starts, n_results = len(self.solve_starts), len(self.results)
            edit(self.new_length(base, 0.02 * ((i % 9) + 1)))
            d.extra["commit"] = time.perf_counter()
            d.views_done = self.wait_result(d.t0)
            d.drawn = max(self.wait_painted(), d.views_done)
            d.extra["gui_cpu"] = time.thread_time() - cpu0  # the GUI thread's own CPU, solve included if inline
            after = [t for t in self.plot_paints if t > d.views_done]
            d.extra["plots_drawn"] = after[-1] if after else float("nan")
            d.solves = len(self.solve_starts) - n_starts
            d.results = len(self.results) - n_results
            d.solve_start = self.solve_starts[-1] if d.solves else float("nan")
            d.solve_wall = self.doc.last_solve_seconds
            d.solve_cpu = self.doc.last_solve_cpu_seconds
            d.extra["inline"] = d.solve_start > d.extra["commit"]  # started from the event loop, not from the commit
            out.append(d)
        self.idle(spacing_s)
        return out

    def typing_burst(self, n: int, interval_s: float) -> Drawn:
        """``n`` edits ``interval_s`` apart (or as soon as the GUI thread is free); until the last is drawn."""
        edit = self.editor()
        base = self.selected_length()
        n_starts, n_results = len(self.solve_starts), len(self.results)
        t_first = time.perf_counter()
        late = []
        last_value = base
        for i in range(n):
            due = t_first + i * interval_s
            while time.perf_counter() < due:
                self.app.processEvents()
                time.sleep(min(0.001, max(0.0, due - time.perf_counter())))
            late.append((time.perf_counter() - due) * 1000.0)
            last_value = self.new_length(base, 0.01 * (i + 1))
            t_last = time.perf_counter()
            edit(last_value)
        d = Drawn(t0=t_last)
        d.views_done = self.wait_result(t_last)
        d.drawn = max(self.wait_painted(), d.views_done)
        d.solves = len(self.solve_starts) - n_starts
        d.results = len(self.results) - n_results
        d.solve_wall = self.doc.last_solve_seconds
        d.solve_cpu = self.doc.last_solve_cpu_seconds
        d.extra["first_edit_to_drawn_ms"] = (d.drawn - t_first) * 1000.0
        d.extra["max_edit_delay_ms"] = max(late)
        res = self.doc.result
        k = max(self.doc.selected_segment, 0)
        shown = res.segments[k].x_end_m - res.segments[k].x_start_m
        if abs(shown - last_value) > 1e-6 * last_value:
            raise RuntimeError(f"drawn result is not the last edit's: {shown} m vs {last_value} m")
        self.idle(0.3)
        return d

    def panel_paint_ms(self, repeats: int) -> dict[str, list[float]]:
        w = self.win
        panels = {
            "whole window": w,
            "Profiles (plots)": getattr(w, "profiles", None),
            "Line Strip": getattr(w, "line_strip", None),
            "Key Figures": getattr(w, "key_figures", None),
            "Checks": getattr(w, "checks", None),
            "Segment Card": getattr(w, "segment_card", None),
            "Feed": getattr(w, "feed_panel", None),
            "Alternatives": getattr(w, "alternatives_panel", None),
        }
        out = {}
        for name, widget in panels.items():
            if widget is None or not widget.isVisible():
                continue
            times = []
            for _ in range(repeats):
                self.app.processEvents()
                t = time.perf_counter()
                widget.repaint()
                times.append((time.perf_counter() - t) * 1000.0)
            out[name] = times
        return out

    def close(self) -> None:
        self._beat.stop()
        self.doc.shutdown()
        self.win.close()
        self.app.processEvents()


def solve_alone_ms(alternative, repeats: int) -> list[float]:
    from solver import solve

    solve(alternative)
    out = []
    for _ in range(repeats):
        t = time.perf_counter()
        solve(alternative)
        out.append((time.perf_counter() - t) * 1000.0)
    return out


# --------------------------------------------------------------------------- printing the cases


def report_spaced(label: str, drawn: list[Drawn], alone: list[float], target_ms: Optional[float]) -> dict:
    first, rest = drawn[0], drawn[1:]
    total = [d.ms(d.t0, d.drawn) for d in rest]
    before = [d.ms(d.t0, d.solve_start) for d in rest]
    solve_w = [d.solve_wall * 1000 for d in rest]
    solve_c = [d.solve_cpu * 1000 for d in rest]
    views = [d.ms(d.solve_start, d.views_done) - d.solve_wall * 1000 for d in rest]
    paint = [d.ms(d.views_done, d.drawn) for d in rest]
    inline = sum(1 for d in rest if d.extra.get("inline"))
    if any(d.solves != 1 for d in drawn):
        print(f"  NOTE: solves per edit {[d.solves for d in drawn]} (0 = served from the result cache)")
    m = med(total)
    ratio = f"   = {m / target_ms:.1f}× the target {target_ms:.0f} ms" if target_ms else ""
    print(f"  edit → drawn                  {fmt(total)}{ratio}")
    print(f"    before solve (command, views of the edit)  {fmt(before)}")
    print(f"    solve (wall; CPU)           {fmt(solve_w)};  CPU {fmt(solve_c)}"
          f"   [{inline} of {len(rest)} on the GUI thread]")
    print(f"    views take the result       {fmt(views)}")
    print(f"    paint (layout + repaint)    {fmt(paint)}")
    plots = [d.ms(d.t0, d.extra["plots_drawn"]) for d in rest]
    print(f"    (edit → the Profiles plots drawn with the result: {fmt(plots)}; the rest of the window may paint after)")
    print(f"    solve alone, GUI idle       {fmt(alone)}")
    gui_cpu = [d.extra["gui_cpu"] * 1000 for d in rest]
    worker = [0.0 if d.extra.get("inline") else d.solve_cpu * 1000 for d in rest]
    print(f"    CPU: GUI thread {fmt(gui_cpu)} + worker solve {fmt(worker)}  (load-independent; wall > CPU = waiting)")
    print(f"  first edit after loading      {first.ms(first.t0, first.drawn):.1f} ms "
          f"(solve {first.solve_wall * 1000:.1f} ms wall on the worker)")
    return {"total": total, "before": before, "solve": solve_w, "views": views, "paint": paint}


def report_typing(label: str, bursts: list[Drawn], n: int, interval_ms: float, target_ms: Optional[float]) -> None:
    last = [b.ms(b.t0, b.drawn) for b in bursts]
    whole = [b.extra["first_edit_to_drawn_ms"] for b in bursts]
    m = med(last)
    ratio = f"   = {m / target_ms:.1f}× the target {target_ms:.0f} ms" if target_ms else ""
    print(f"  typing: {n} edits {interval_ms:.0f} ms apart, {len(bursts)} bursts")
    print(f"    last edit → drawn           {fmt(last)}{ratio}")
    print(f"    first edit → last drawn     {fmt(whole)}  (the edits alone span {(n - 1) * interval_ms:.0f} ms)")
    print(f"    solves started per burst    {fmt([b.solves for b in bursts], '', 0)};  results drawn "
          f"{fmt([b.results for b in bursts], '', 0)}")
    print(f"    longest wait of an edit for the GUI thread  {fmt([b.extra['max_edit_delay_ms'] for b in bursts])}")


STARTUP_CHILD = r"""
import json, os, sys, time
T = {"interpreter": time.monotonic()}
C = {"launch": 0.0, "interpreter": time.process_time()}  # CPU of the process, all threads
sys.path.insert(0, ROOT)
def mark(name):
    T[name] = time.monotonic()
    C[name] = time.process_time()
import importlib
for name in PREIMPORT:  # only libraries the app imports anyway by its first plot: their cost moves here
    importlib.import_module(name); mark(name)
from PySide6.QtCore import QEvent, QObject, QEventLoop
from PySide6.QtWidgets import QApplication
app = QApplication([]); mark("QApplication")
from app.main_window import MainWindow; mark("app modules")
win = MainWindow(interactive=False); mark("window built")
updates = [0]
class F(QObject):
    def eventFilter(self, o, e):
        if e.type() == QEvent.Type.UpdateRequest:
            updates[0] += 1
        return False
f = F(); win.installEventFilter(f)
got = []
win.doc.result_ready.connect(lambda r: got.append(time.monotonic()))
win.doc.solve_failed.connect(lambda m: (print("FAILED", m, flush=True), sys.exit(1)))
win.resize(1600, 1000)
win.load_demo(); mark("demo loaded")
win.show()
if win.windowHandle() is not None:
    win.windowHandle().installEventFilter(f)
while not got:
    app.processEvents(QEventLoop.AllEvents | QEventLoop.WaitForMoreEvents, 50)
T["result"] = got[0]
C["result"] = time.process_time()
last = time.monotonic()
for _ in range(50):
    before = updates[0]
    app.processEvents()
    if updates[0] == before:
        break
    last = time.monotonic()
T["first plot"] = max(last, got[0])
C["first plot"] = time.process_time()
T["cpu"] = C
T["solve_wall"] = win.doc.last_solve_seconds
T["solve_cpu"] = win.doc.last_solve_cpu_seconds
T["modules"] = sorted({m.split(".")[0] for m in sys.modules})
print("TIMES " + json.dumps(T), flush=True)
win.doc.shutdown()
"""

# libraries whose import is timed on its own when the app imports them by its first plot (in this order)
LIBRARIES = ["numpy", "PySide6.QtWidgets", "pyqtgraph", "pydantic", "pint", "scipy", "CoolProp.CoolProp"]


def _startup_child(env: dict, preimport: list[str]) -> dict:
    code = f"ROOT = {str(ROOT)!r}\nPREIMPORT = {preimport!r}\n" + STARTUP_CHILD
    t_launch = time.monotonic()  # CLOCK_MONOTONIC: the same clock in the child
    proc = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=env, timeout=180)
    line = next((ln for ln in proc.stdout.splitlines() if ln.startswith(("TIMES", "FAILED"))), "")
    if not line.startswith("TIMES"):
        raise RuntimeError(f"start-up child did not plot: {line or proc.stderr[-800:]}")
    t = json.loads(line[6:])
    t["launch"] = t_launch
    t["preimport"] = preimport
    return t


def startup_runs(runs: int, bytecode_cache: bool) -> tuple[list[dict], list[dict]]:
    """(plain runs, runs with the libraries imported first, one by one, to time each)."""
    env = dict(os.environ)
    env["CALORUN_SETTINGS_DIR"] = env["CALORUN_RECOVERY_DIR"] = tempfile.mkdtemp(prefix="calorun-bench-")
    if bytecode_cache:
        env.pop("PYTHONDONTWRITEBYTECODE", None)
        env["PYTHONPYCACHEPREFIX"] = str(Path(tempfile.gettempdir()) / "calorun-bench-pycache")
    warm = _startup_child(env, [])  # fills the disk and bytecode caches; not counted
    pre = [m for m in LIBRARIES if m.split(".")[0] in warm["modules"]]
    plain, split = [], []
    for _ in range(runs):  # interleaved, so both kinds see the same machine
        plain.append(_startup_child(env, []))
        split.append(_startup_child(env, pre))
    return plain, split


def report_startup(label: str, plain: list[dict], split: list[dict]) -> None:
    total = [r["first plot"] - r["launch"] for r in plain]
    m = med(total)
    print(f"  {label}: start-up to first plot  {fmt(total, 's', 2)}   = {m / STARTUP_TARGET_S:.1f}× the target "
          f"{STARTUP_TARGET_S} s;  CPU of the process (all threads, after the interpreter started) "
          f"{fmt([r['cpu']['first plot'] for r in plain], 's', 2)}")

    def phase(runs, a, b):
        return [(r[b] - r[a]) * 1000.0 for r in runs]

    def cpu(runs, a, b):
        return [(r["cpu"][b] - r["cpu"][a]) * 1000.0 for r in runs]

    print(f"    phases of the same runs (wall; CPU of the process):")
    for text, a, b in [("interpreter start → import app.main_window done", "launch", "app modules"),
                       ("build MainWindow (panel imports included)", "app modules", "window built"),
                       ("load demo (read, validate, start the solve)", "window built", "demo loaded"),
                       ("show → first result taken by the views", "demo loaded", "result"),
                       ("first paint with the result", "result", "first plot")]:
        print(f"      {text:48s} {fmt(phase(plain, a, b)):>26s};  CPU {fmt(cpu(plain, a, b))}")
    print(f"      {'(first solve, worker thread: wall; CPU)':48s} {fmt([r['solve_wall'] * 1000 for r in plain])};"
          f"  CPU {fmt([r['solve_cpu'] * 1000 for r in plain])}")
    pre = split[0]["preimport"]
    print(f"    with the libraries the app loads by its first plot imported first, one at a time "
          f"(total {fmt([r['first plot'] - r['launch'] for r in split], 's', 2)}):")
    rows = [("interpreter start (python, site)", "launch", "interpreter")]
    prev = "interpreter"
    for name in pre:
        rows.append((f"import {name}", prev, name))
        prev = name
    rows += [("QApplication", prev, "QApplication"),
             ("import app.main_window (+ app, solver modules)", "QApplication", "app modules"),
             ("build MainWindow (panel imports included)", "app modules", "window built"),
             ("load demo", "window built", "demo loaded"),
             ("show → first result taken by the views", "demo loaded", "result"),
             ("first paint with the result", "result", "first plot")]
    for text, a, b in rows:
        print(f"      {text:48s} {fmt(phase(split, a, b)):>26s};  CPU {fmt(cpu(split, a, b))}")
    print(f"      {'(first solve, worker thread: wall; CPU)':48s} {fmt([r['solve_wall'] * 1000 for r in split])};"
          f"  CPU {fmt([r['solve_cpu'] * 1000 for r in split])}")
    absent = [m for m in ("pint", "scipy", "CoolProp", "fluids", "ht") if m not in plain[0]["modules"]]
    if absent:
        print(f"    not imported by the first plot: {', '.join(absent)}")


# --------------------------------------------------------------------------- main


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--edits", type=int, default=25, help="spaced edits per line (the first is reported apart)")
    ap.add_argument("--spacing-ms", type=float, default=250.0)
    ap.add_argument("--typing-edits", type=int, default=20)
    ap.add_argument("--typing-ms", type=float, default=10.0)
    ap.add_argument("--bursts", type=int, default=5)
    ap.add_argument("--segments", type=int, default=60)
    ap.add_argument("--startup-runs", type=int, default=5)
    ap.add_argument("--paint-repeats", type=int, default=15)
    ap.add_argument("--only", default="a,b,c,d,e", help="comma list of cases: a,b,c,d,e")
    ap.add_argument("--quick", action="store_true", help="fewer repeats (a smoke run)")
    args = ap.parse_args()
    if args.quick:
        args.edits, args.bursts, args.startup_runs, args.paint_repeats = 6, 2, 2, 5
    cases = set(args.only.split(","))
    print(f"Calorun GUI benchmark · {os.cpu_count()} cores · Qt platform {os.environ['QT_QPA_PLATFORM']} · "
          f"window 1600×1000 · load average {os.getloadavg()[0]:.2f} · figures: median [min–max]")

    if cases & {"a", "b", "e"}:
        s = Session()
        alt = s.doc.current_alternative
        print(f"\nDemo project, alternative {alt.name!r}: {len(alt.segments)} segments, {s.doc.result.cells} cells")
        if "a" in cases:
            drawn = s.spaced_edits(args.edits, args.spacing_ms / 1000.0)
            print(f"  edit path: {s.edit_path}; {args.edits} edits {args.spacing_ms:.0f} ms apart")
            report_spaced("demo", drawn, solve_alone_ms(s.doc.current_alternative, 20), TARGETS_MS["demo"])
        if "b" in cases:
            bursts = [s.typing_burst(args.typing_edits, args.typing_ms / 1000.0) for _ in range(args.bursts)]
            report_typing("demo", bursts, args.typing_edits, args.typing_ms, TARGETS_MS["demo"])
        if "e" in cases:
            print("  forced full repaint per panel (QWidget.repaint(), upper bound of what an edit repaints):")
            for name, times in s.panel_paint_ms(args.paint_repeats).items():
                note = "  (unchanged scene: cached; per-edit plot painting: timers_gui.py)" if "plots" in name else ""
                print(f"    {name:28s} {fmt(times)}{note}")
        s.close()

    if "c" in cases:
        s = Session(long_project(args.segments))
        print(f"\n{args.segments}-segment line (invented: the demo's segments repeated), "
              f"{s.doc.result.cells} cells")
        drawn = s.spaced_edits(max(4, args.edits // 2), args.spacing_ms / 1000.0)
        report_spaced("60", drawn, solve_alone_ms(s.doc.current_alternative, 10), TARGETS_MS["60 segments"])
        bursts = [s.typing_burst(args.typing_edits, args.typing_ms / 1000.0) for _ in range(args.bursts)]
        report_typing("60", bursts, args.typing_edits, args.typing_ms, TARGETS_MS["60 segments"])
        s.close()

    if cases & {"a", "b", "c", "e"}:
        peak_mb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0  # kB on Linux
        print(f"\npeak memory of this process (ru_maxrss): {peak_mb:.0f} MB")

    if "d" in cases:
        print(f"\nStart-up to first plot, a fresh interpreter each run: {args.startup_runs} runs after one warm-up run, "
              f"and as many with the libraries imported first to time them one by one")
        if os.environ.get("PYTHONDONTWRITEBYTECODE"):
            report_startup("PYTHONDONTWRITEBYTECODE=1 (as here)", *startup_runs(args.startup_runs, bytecode_cache=False))
        report_startup("with a bytecode cache", *startup_runs(args.startup_runs, bytecode_cache=True))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
