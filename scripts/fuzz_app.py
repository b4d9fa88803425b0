"""Fuzz the desktop app offscreen: open, draw, solve, save, reload and report generated projects.

    .venv/bin/python scripts/fuzz_app.py --projects 1000            # the issue's 1,000-project run
    .venv/bin/python scripts/fuzz_app.py --minutes 10 --seed 7      # as many as fit in 10 minutes
    .venv/bin/python scripts/fuzz_app.py --replay /tmp/fuzz_app/failures/*.json

Projects come from the shared generator of valid projects (``tests/project_strategies.py``,
drawn from the model's own bounds, extremes included). Each batch of projects goes to a worker
process that holds one offscreen main window and, per project: opens the file as a user would
(File ▸ Open), lets the Document's runner solve it, draws every panel (Line Strip, Segment Card
of the first and last segment, Profiles with the uncertainty bands, Checks, Key Figures,
Side-by-Side) in SI and US units, saves it, reloads the saved file (it must equal the project),
and every ``--report-every``-th project writes the PDF report through Export PDF.

A worker that dies (a segmentation fault) or hangs is counted as a crash and replaced; the
project it was on is kept under ``OUT/failures/``. The figures printed at the end: projects,
crashes, hangs, unhandled exceptions, Qt/pyqtgraph warnings about NaN or infinity, messages
shown to the user that name no place on the line or carry internal wording (jargon), save and
reload mismatches, time. The same worker serves ``tests/test_fuzz_app.py``.
"""

from __future__ import annotations

import argparse
import datetime as _dt
import json
import math
import os
import re
import select
import subprocess
import sys
import tempfile
import time
import traceback
from dataclasses import dataclass, field
from pathlib import Path
from typing import Iterable, Optional

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

PROJECT_TIMEOUT_S = 120.0  # one project in the worker (solves, bands, drawing, save, report)
STARTUP_TIMEOUT_S = 60.0

# --------------------------------------------------------------------------- what counts as a problem

# Qt warnings that say nothing about our drawing (the offscreen platform cannot resize windows to
# their size hints; fonts the offscreen platform lacks)
BENIGN_QT = (
    "propagateSizeHints",
    "QFont::setPointSize",
    "Populating font family aliases",
)

# Wording a user must never see: numbers that are not numbers, Python or library internals,
# file keys instead of field labels.
JARGON = [
    (re.compile(r"\bnan\b", re.I), "nan"),
    (re.compile(r"\b-?inf\b|infinity", re.I), "infinity"),
    (re.compile(r"internal error", re.I), "internal error"),
    (re.compile(r"Traceback|\b[A-Z][A-Za-z]*(Error|Exception)\b"), "exception name"),
    (re.compile(r"numerical failure|cannot convert|overflow|division by zero|invalid value", re.I), "numerics"),
    # a key of the file or the code (length_m, T_surface_K), not a symbol with a subscript (Gr_L, Re_D)
    (re.compile(r"\b(?:[A-Za-z0-9]+_){2,}[A-Za-z0-9]+\b|\b[a-z]{3,}_[A-Za-z0-9]+\b"), "file key"),
    (re.compile(r"\w\[\d+\]|\b[a-z]{3,}\.[a-z_]{3,}\b"), "file path"),  # segments[0], fluid.concentration
    (re.compile(r"\b(numpy|float64|ndarray|PropsSI|CoolProp|HEOS|pydantic)\b"), "library"),
    (re.compile(r"\bgot\b.*\b(None|True|False)\b|[<>]=?\s*0\b, got", re.I), "raw value"),
]


def jargon(text: str) -> list[str]:
    """Why ``text`` is not in a user's words (empty when it is)."""
    return [why for pattern, why in JARGON if pattern.search(text)]


_SEGMENT = re.compile(r"\bsegment\b", re.I)
_POSITION = re.compile(r"\d\s*(m|ft|km|mi)\b|\bx\s*=", re.I)
_WHOLE_LINE = re.compile(r"\b(inlet|feed|outlet)\b", re.I)


def located(text: str) -> bool:
    """Whether a solve failure says where: a segment and a position on the line, or the inlet/feed."""
    return bool((_SEGMENT.search(text) and _POSITION.search(text)) or _WHOLE_LINE.search(text))


# --------------------------------------------------------------------------- the worker (GUI side)


class _Capture:
    """Everything that goes wrong while one project is exercised (installed once per worker)."""

    def __init__(self):
        self.exceptions: list[str] = []
        self.qt_warnings: list[str] = []
        self.py_warnings: list[str] = []
        self.solver_warnings: list[str] = []

    def reset(self) -> None:
        self.exceptions.clear()
        self.qt_warnings.clear()
        self.py_warnings.clear()
        self.solver_warnings.clear()

    def install(self) -> None:
        import logging
        import traceback
        import warnings

        from PySide6.QtCore import QtMsgType, qInstallMessageHandler

        def excepthook(kind, value, tb):  # exceptions in Qt event handlers and slots land here
            text = "".join(traceback.format_exception(kind, value, tb)).strip()
            self.exceptions.append(text)
            print(text, file=sys.__stderr__, flush=True)

        sys.excepthook = excepthook

        def qt_handler(mode, _context, message):
            if mode == QtMsgType.QtDebugMsg or mode == QtMsgType.QtInfoMsg:
                return
            if any(b in message for b in BENIGN_QT):
                return
            self.qt_warnings.append(message)

        self._qt_handler = qt_handler  # keep a reference: Qt holds only a pointer
        qInstallMessageHandler(qt_handler)

        def showwarning(message, category, filename, lineno, file=None, line=None):
            # where in our code it came from (numpy and pyqtgraph warn from inside themselves)
            ours = [f for f in traceback.extract_stack()[:-1]
                    if f.filename.startswith((str(ROOT / "app"), str(ROOT / "solver")))]
            caller = f" from {Path(ours[-1].filename).relative_to(ROOT)}:{ours[-1].lineno}" if ours else ""
            text = f"{category.__name__}: {message} ({Path(filename).name}:{lineno}{caller})"
            if f"{os.sep}solver{os.sep}" in filename or caller.startswith(" from solver"):
                self.solver_warnings.append(text)  # the solver's own business: reported, not a GUI fault
            else:
                self.py_warnings.append(text)

        warnings.simplefilter("always")
        warnings.showwarning = showwarning

        capture = self

        class _Errors(logging.Handler):  # the runner logs a solver bug ("internal error") and carries on
            def emit(self, record):
                capture.exceptions.append(self.format(record))

        handler = _Errors(level=logging.ERROR)
        handler.setFormatter(logging.Formatter("%(name)s: %(message)s"))
        logging.getLogger().addHandler(handler)


def _wait(app, until, timeout_s: float) -> bool:
    deadline = time.monotonic() + timeout_s
    while time.monotonic() < deadline:
        app.processEvents()
        if until():
            return True
        time.sleep(0.002)
    return False


class Exerciser:
    """One offscreen main window that opens, draws, solves, saves and reports project files."""

    def __init__(self):
        os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
        os.environ.setdefault("PYQTGRAPH_QT_LIB", "PySide6")
        from PySide6.QtWidgets import QApplication

        self.capture = _Capture()
        self.capture.install()
        self.app = QApplication.instance() or QApplication(["calorun-fuzz"])
        self.app.setStyle("Fusion")
        from app.main_window import MainWindow

        self.win = MainWindow(interactive=False, remember=False, unit_system="SI")
        self.win.resize(1600, 1000)
        self.win.show()
        self.failures: list[str] = []
        self.win.doc.solve_failed.connect(self.failures.append)

    def _settle(self) -> bool:
        """Let the runner finish the current alternative and the window repaint."""
        doc = self.win.doc
        n = len(doc.current_alternative.segments)
        done = _wait(self.app, lambda: not doc.solving and (doc.result is not None or doc.last_error is not None),
                     PROJECT_TIMEOUT_S / 4 + 0.02 * n)
        for _ in range(3):
            self.app.processEvents()
        return done

    def _draw(self) -> None:
        self.win.grab()  # paints every visible panel, as the screen would

    def exercise(self, path: str, workdir: str, report: bool = False, patches: Optional[list] = None, *,
                 bands: bool = True, thorough: bool = True, screenshot: str = "") -> dict:
        """Open ``path``, draw and solve every alternative, save, reload, maybe report; what went wrong.

        ``patches``: ``[(dotted path, value), ...]`` set on the loaded project without validation (values
        beyond the model's bounds, to see the drawing code survive them); such a project is not saved.
        ``bands``: compute and shade the uncertainty bands (a dozen more solves each). ``thorough``: draw
        each alternative in both unit systems with its first and its last segment selected; otherwise
        the first alternative with its first segment in SI and its last in US units, the others once.
        ``screenshot``: save the window there (PNG).
        """
        from solver.project_io import load_project
        from app.units import check_message

        self.capture.reset()
        self.failures.clear()
        win, doc = self.win, self.win.doc
        win.messages.clear()
        out: dict = {"path": path, "problems": [], "messages": [], "solved": 0, "failed": 0}
        problems = out["problems"]
        t0 = time.perf_counter()
        doc.set_unit_system("SI")
        win.centre_tabs.setCurrentIndex(0)
        if patches:
            project = load_project(path)
            for where, value in patches:
                set_unchecked(project, where, value)
            doc.set_project(project)
            opened = True
        else:
            opened = win.open_file(path, ask=False)
        if not opened:
            problems.append("refused: " + " | ".join(m for _t, m in win.messages))
        else:
            seen_checks: set[str] = set()
            timing = out["timing"] = {"open": time.perf_counter() - t0, "solve": 0.0, "bands": 0.0, "draw": 0.0}
            for i, alt in enumerate(doc.project.alternatives):
                t = time.perf_counter()
                doc.set_current_alternative(i)
                settled = self._settle()
                timing["solve"] += time.perf_counter() - t
                if not settled:
                    problems.append(f"alternative {alt.name!r}: no result or failure within the time limit")
                    continue
                if doc.result is not None and doc.last_error is None:
                    out["solved"] += 1
                    if bands:
                        t = time.perf_counter()
                        doc.bands_now()  # the shaded uncertainty bands a user sees a moment later
                        timing["bands"] += time.perf_counter() - t
                else:
                    out["failed"] += 1
                t = time.perf_counter()
                last = len(doc.current_alternative.segments) - 1
                if thorough:
                    views = [("SI", 0), ("SI", last), ("US", 0), ("US", last)]
                else:  # every alternative once; US units with the first
                    views = [("SI", 0), ("US", last)] if i == 0 else [("SI", last)]
                for system, seg in dict.fromkeys(views):
                    doc.set_unit_system(system)
                    doc.select_segment(seg)
                    self.app.processEvents()
                    self._draw()
                    win.segment_card.body.grab()  # the whole card, also what is scrolled out of view
                    if doc.result is not None:
                        seen_checks.update(check_message(check, system) for check in doc.result.checks)
                if screenshot and i == 0:
                    doc.set_unit_system("SI")
                    self.app.processEvents()
                    win.grab().save(screenshot)
                doc.set_unit_system("SI")
                timing["draw"] += time.perf_counter() - t
            t = time.perf_counter()
            if len(doc.project.alternatives) > 1:
                win.centre_tabs.setCurrentIndex(1)  # Side-by-Side: solves and draws every alternative
                allowed = PROJECT_TIMEOUT_S / 4 + 5.0 * len(doc.project.alternatives)
                _wait(self.app, lambda: not doc.background_solving, allowed)
                self._draw()
                win.centre_tabs.setCurrentIndex(0)
            timing["side_by_side"] = time.perf_counter() - t
            t = time.perf_counter()
            saved = Path(workdir) / "saved.json"
            if patches:
                pass  # beyond the bounds on purpose: the file would (rightly) be refused on reload
            elif not win.save_to(saved):
                problems.append("not saved: " + " | ".join(m for _t, m in win.messages))
            else:
                again = load_project(saved)
                if again.model_dump(mode="json") != doc.project.model_dump(mode="json"):
                    problems.append("the saved file reloads as a different project")
            timing["save"] = time.perf_counter() - t
            t = time.perf_counter()
            if report:
                pdf = Path(workdir) / "report.pdf"
                if not win.export_pdf(str(pdf)) or not pdf.is_file() or pdf.stat().st_size == 0:
                    problems.append("report not written: " + " | ".join(m for _t, m in win.messages))
                out["reported"] = True
            timing["report"] = time.perf_counter() - t
            out["messages"] = sorted(set(self.failures)) + sorted(seen_checks)
            out["failures"] = sorted(set(self.failures))
        cap = self.capture
        problems += [f"unhandled exception: {e}" for e in cap.exceptions]
        problems += [f"Qt warning: {w}" for w in cap.qt_warnings]
        problems += [f"warning in the app: {w}" for w in cap.py_warnings]
        out["solver_warnings"] = sorted(set(cap.solver_warnings))
        out["seconds"] = time.perf_counter() - t0
        return out


def set_unchecked(obj, where: str, value) -> None:
    """Set ``alternatives[0].segments[1].length_m``-style ``where`` on a model without validating it."""
    parts = re.findall(r"[A-Za-z_][A-Za-z0-9_]*|\[\d+\]", where)
    for part in parts[:-1]:
        obj = obj[int(part[1:-1])] if part.startswith("[") else getattr(obj, part)
    obj.__dict__[parts[-1]] = value


def worker_main() -> int:
    """Serve requests, one JSON line each on stdin, with one JSON line each on the original stdout."""
    reply = os.fdopen(os.dup(sys.stdout.fileno()), "w", buffering=1)
    os.dup2(sys.stderr.fileno(), sys.stdout.fileno())  # anything else printed goes to stderr
    sys.stdout = sys.stderr
    ex = Exerciser()
    reply.write(json.dumps({"ready": True}) + "\n")
    for line in sys.stdin:
        req = json.loads(line)
        try:
            out = ex.exercise(req["path"], req["workdir"], req.get("report", False), req.get("patches"),
                              bands=req.get("bands", True), thorough=req.get("thorough", True),
                              screenshot=req.get("screenshot", ""))
        except Exception:  # noqa: BLE001 - the harness's boundary: whatever the app raises is the finding
            text = traceback.format_exc()
            print(text, file=sys.stderr, flush=True)
            out = {"path": req["path"], "problems": [f"unhandled exception: {text}"], "messages": [],
                   "solved": 0, "failed": 0}
        reply.write(json.dumps(out) + "\n")
    ex.win.doc.shutdown()
    return 0


# --------------------------------------------------------------------------- the driver (no Qt)


def time_allowed(path) -> float:
    """How long the worker may take on a project before it counts as hung: the base allowance, and
    more for each alternative (solved, drawn, its uncertainty bands) and each segment."""
    data = json.loads(Path(path).read_text(encoding="utf-8"))
    alternatives = data.get("alternatives", [])
    segments = sum(len(a.get("segments", [])) for a in alternatives)
    return PROJECT_TIMEOUT_S + 10.0 * len(alternatives) + 0.02 * segments


class WorkerDied(RuntimeError):
    """The worker process crashed (a signal or an exit) or hung on a project."""

    def __init__(self, how: str, stderr_tail: str):
        self.how = how
        self.stderr_tail = stderr_tail
        super().__init__(f"the app {how}; last output:\n{stderr_tail}")


class Worker:
    """A worker process with one offscreen main window; restarted by the caller after a crash."""

    def __init__(self, log_dir: Optional[Path] = None):
        self.log_dir = Path(log_dir or tempfile.mkdtemp(prefix="calorun-fuzz-app-"))
        self.log_dir.mkdir(parents=True, exist_ok=True)
        self.stderr_path = self.log_dir / f"worker-{time.time_ns()}.log"
        env = dict(os.environ, QT_QPA_PLATFORM="offscreen", PYQTGRAPH_QT_LIB="PySide6", PYTHONFAULTHANDLER="1")
        # an autosave or settings file of a real session is never touched
        env.setdefault("CALORUN_RECOVERY_DIR", str(self.log_dir / "recovery"))
        env.setdefault("CALORUN_SETTINGS_DIR", str(self.log_dir / "settings"))
        self._stderr = open(self.stderr_path, "wb")
        self.proc = subprocess.Popen([sys.executable, str(Path(__file__).resolve()), "--worker"],
                                     stdin=subprocess.PIPE, stdout=subprocess.PIPE, stderr=self._stderr,
                                     env=env, cwd=str(ROOT), text=True, bufsize=1)
        self._read(STARTUP_TIMEOUT_S)

    def _tail(self) -> str:
        try:
            return self.stderr_path.read_text(errors="replace")[-4000:]
        except OSError:
            return ""

    def _read(self, timeout_s: float) -> dict:
        ready, _, _ = select.select([self.proc.stdout], [], [], timeout_s)
        if not ready:
            self.kill()
            raise WorkerDied(f"hung (no answer in {timeout_s:.0f} s)", self._tail())
        line = self.proc.stdout.readline()
        if not line:
            code = self.proc.wait(10)
            how = f"crashed (signal {-code})" if code < 0 else f"exited with code {code}"
            self._stderr.close()
            raise WorkerDied(how, self._tail())
        return json.loads(line)

    def run(self, path: Path, workdir: Path, report: bool = False, patches: Optional[list] = None,
            **options) -> dict:
        """Exercise one project file (options: those of :meth:`Exerciser.exercise`); raises WorkerDied
        when the app crashed or hung on it."""
        request = {"path": str(path), "workdir": str(workdir), "report": report, "patches": patches, **options}
        self.proc.stdin.write(json.dumps(request) + "\n")
        self.proc.stdin.flush()
        return self._read(time_allowed(path))

    def kill(self) -> None:
        if self.proc.poll() is None:
            self.proc.kill()  # our own child, by its handle
            self.proc.wait(10)
        if not self._stderr.closed:
            self._stderr.close()

    def close(self) -> None:
        if self.proc.poll() is None:
            self.proc.stdin.close()
            try:
                self.proc.wait(30)
            except subprocess.TimeoutExpired:
                pass
        self.kill()


# --------------------------------------------------------------------------- the long run


@dataclass
class Figures:
    projects: int = 0
    solved: int = 0
    failed: int = 0
    reported: int = 0
    crashes: int = 0
    hangs: int = 0
    exceptions: int = 0
    qt_warnings: int = 0
    app_warnings: int = 0
    other_problems: int = 0
    jargon: dict = field(default_factory=dict)  # message -> reasons
    unlocated: set = field(default_factory=set)
    solver_warnings: set = field(default_factory=set)
    kept: list = field(default_factory=list)

    def add(self, out: dict) -> list[str]:
        self.projects += 1
        self.solved += out["solved"]
        self.failed += out["failed"]
        self.reported += bool(out.get("reported"))
        bad = []
        for p in out["problems"]:
            if p.startswith("unhandled exception"):
                self.exceptions += 1
            elif p.startswith("Qt warning"):
                self.qt_warnings += 1
            elif p.startswith("warning in the app"):
                self.app_warnings += 1
            else:
                self.other_problems += 1
            bad.append(p)
        for m in out.get("messages", []):
            why = jargon(m)
            if why:
                self.jargon[m] = why
                bad.append(f"jargon ({', '.join(why)}): {m}")
        for m in out.get("failures", []):
            if not located(m):
                self.unlocated.add(m)
                bad.append(f"unlocated: {m}")
        self.solver_warnings.update(out.get("solver_warnings", []))
        return bad


def generate(n: int, seed: int) -> list[dict]:
    """``n`` valid projects (JSON dicts) from the shared strategies, reproducibly from ``seed``."""
    from hypothesis import HealthCheck, Phase, given, settings
    from hypothesis import seed as hyp_seed

    sys.path.insert(0, str(ROOT / "tests"))
    from project_strategies import project_dicts  # noqa: E402 - the one generator of valid projects

    found: list[dict] = []

    @hyp_seed(seed)
    @settings(max_examples=n, phases=[Phase.generate], database=None, deadline=None,
              suppress_health_check=list(HealthCheck))
    @given(project_dicts())
    def collect(data):
        found.append(data)

    collect()
    return found


def write_project(data: dict, path: Path) -> None:
    from solver.model import Project
    from solver.project_io import dump_project

    path.write_text(dump_project(Project.model_validate(data)), encoding="utf-8")


def _generated_files(n: int, batch: int, seed: int, folder: Path) -> Iterable[Path]:
    """``n`` project files, generated one batch at a time (a batch's hypothesis seed is ``seed``
    and the batch number, so any project can be made again), so the run starts at once."""
    k = 0
    for b in range(math.ceil(n / batch)):
        for data in generate(min(batch, n - k), seed * 10_000 + b):
            f = folder / f"p{k:05d}.json"
            write_project(data, f)
            k += 1
            yield f


def main(argv: Optional[list[str]] = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--worker", action="store_true", help=argparse.SUPPRESS)
    ap.add_argument("--projects", type=int, default=1000, help="how many projects (default 1000)")
    ap.add_argument("--minutes", type=float, default=None, help="stop after this long (whatever --projects says)")
    ap.add_argument("--seed", type=int, default=None, help="generator seed (default: today's date, printed)")
    ap.add_argument("--batch", type=int, default=50, help="projects per worker process before a fresh one")
    ap.add_argument("--report-every", type=int, default=5, help="write the PDF report for every n-th project")
    ap.add_argument("--out", default=None, help="folder for logs and failing projects (default a temp folder)")
    ap.add_argument("--replay", nargs="*", default=None, metavar="FILE", help="exercise these project files instead")
    args = ap.parse_args(argv)
    if args.worker:
        return worker_main()

    seed = args.seed if args.seed is not None else int(_dt.date.today().strftime("%Y%m%d"))
    out_dir = Path(args.out or tempfile.mkdtemp(prefix="calorun-fuzz-app-"))
    failures_dir = out_dir / "failures"
    failures_dir.mkdir(parents=True, exist_ok=True)
    work = out_dir / "work"
    work.mkdir(exist_ok=True)
    t0 = time.perf_counter()
    if args.replay is not None:
        files: Iterable[Path] = [Path(f) for f in args.replay]
        print(f"replaying {len(args.replay)} project files; output in {out_dir}", flush=True)
    else:
        print(f"seed {seed}: {args.projects} projects, generated a batch at a time; output in {out_dir}", flush=True)
        files = _generated_files(args.projects, args.batch, seed, work)
    fig = Figures()
    worker: Optional[Worker] = None
    done_in_batch = 0
    deadline = None if args.minutes is None else time.monotonic() + 60 * args.minutes
    try:
        for k, f in enumerate(files):
            if deadline is not None and time.monotonic() > deadline:
                break
            if worker is None or done_in_batch >= args.batch:
                if worker is not None:
                    worker.close()
                worker, done_in_batch = Worker(out_dir / "logs"), 0
            done_in_batch += 1
            report = args.report_every > 0 and k % args.report_every == 0
            try:
                out = worker.run(f, work, report=report)
            except WorkerDied as exc:
                fig.projects += 1
                if exc.how.startswith("hung"):
                    fig.hangs += 1
                else:
                    fig.crashes += 1
                kept = failures_dir / f.name
                kept.write_bytes(f.read_bytes())
                fig.kept.append(str(kept))
                print(f"[{k}] {f.name}: the app {exc.how}; kept {kept}\n{exc.stderr_tail[-1500:]}", flush=True)
                worker = None
                continue
            bad = fig.add(out)
            if bad:
                kept = failures_dir / f.name
                kept.write_bytes(f.read_bytes())
                fig.kept.append(str(kept))
                print(f"[{k}] {f.name}: " + "\n    ".join(b[:600] for b in bad), flush=True)
            if (k + 1) % 25 == 0:
                print(f"… {k + 1} projects, {time.perf_counter() - t0:.0f} s", flush=True)
    finally:
        if worker is not None:
            worker.close()
    seconds = time.perf_counter() - t0
    print()
    print(f"projects exercised            {fig.projects}  (seed {seed}; {fig.solved} alternatives solved, "
          f"{fig.failed} not solvable; {fig.reported} reports)")
    print(f"crashes                       {fig.crashes}")
    print(f"hangs                         {fig.hangs}")
    print(f"unhandled exceptions          {fig.exceptions}")
    print(f"Qt warnings                   {fig.qt_warnings}")
    print(f"warnings in the app (NaN…)    {fig.app_warnings}")
    print(f"other problems (save/reload…) {fig.other_problems}")
    print(f"jargon messages (distinct)    {len(fig.jargon)}")
    print(f"unlocated failures (distinct) {len(fig.unlocated)}")
    print(f"solver warnings (distinct)    {len(fig.solver_warnings)}")
    print(f"time                          {seconds:.0f} s ({seconds / max(1, fig.projects):.2f} s per project)")
    for m, why in sorted(fig.jargon.items())[:40]:
        print(f"  jargon [{', '.join(why)}]: {m}")
    for m in sorted(fig.unlocated)[:40]:
        print(f"  unlocated: {m}")
    for w in sorted(fig.solver_warnings)[:20]:
        print(f"  solver warning: {w}")
    if fig.kept:
        print(f"failing projects kept in {failures_dir}")
    clean = not (fig.crashes or fig.hangs or fig.exceptions or fig.qt_warnings or fig.app_warnings
                 or fig.other_problems or fig.jargon or fig.unlocated)
    return 0 if clean else 1


if __name__ == "__main__":
    raise SystemExit(main())
