"""Where an edit's time goes, without a profiler: a clock around a few handlers (ms per edit).

A profiler slows every Python call and so inflates Python-heavy views; here only the handlers
below are wrapped (two clock reads per call), so the figures are close to an unprofiled run.
Each row is the wall time spent inside that handler per edit, with its CPU time (the thread's
own; wall minus CPU is time the thread waited, e.g. for the GIL while the other thread ran)
and how often it ran. Nested rows (indented) are part of the row above them. Rows whose
module or name has moved are skipped (other work restructures app/): the list says so.

Run: ``.venv/bin/python benchmarks/timers_gui.py [--line demo|60] [--edits 15]``; also used by
``bench_gui.py --breakdown``.
"""

from __future__ import annotations

import argparse
import importlib
import inspect
import sys
import threading
import time
from collections import defaultdict
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
import bench_gui as B  # noqa: E402  (sets the offscreen platform and the temporary settings folder)

# (label, module, attribute path). Indentation of the label = nesting.
TIMERS = [
    ("edit: command + every view's reaction to the edited model", "app.document", "Document.push"),
    ("  command built (validation of the new alternative)", "app.commands", "SetSegmentFields.__init__"),
    ("  Segment Card refresh", "app.panels.segment_card", "SegmentCard.refresh"),
    ("  Feed refresh", "app.panels.feed_panel", "FeedPanel.refresh"),
    ("  Line Strip refresh", "app.panels.line_strip", "LineStrip.refresh"),
    ("  Checks refresh", "app.panels.checks_panel", "ChecksPanel.refresh"),
    ("  Alternatives refresh", "app.panels.alternatives_panel", "AlternativesPanel.refresh"),
    ("  Side-by-Side schedule", "app.panels.side_by_side", "SideBySidePanel.schedule"),
    ("  Profiles _update_limits", "app.panels.profiles", "ProfilesPanel._update_limits"),
    ("  main window _on_project_changed", "app.main_window", "MainWindow._on_project_changed"),
    ("solve (solver.solve; GUI thread or worker)", "solver", "solve"),
    ("  line set-up (build_line)", "solver.line", "build_line"),
    ("  fittings K (fittings_K_total, all calls)", "solver.fittings", "fittings_K_total"),
    ("  checks (line_checks)", "solver.checks", "line_checks"),
    ("  result arrays (line_result)", "solver.profiles", "line_result"),
    ("result: Document._publish (every result_ready handler)", "app.document", "Document._publish"),
    ("  Profiles _on_result", "app.panels.profiles", "ProfilesPanel._on_result"),
    ("    PlotDataItem.setData", "pyqtgraph", "PlotDataItem.setData"),
    ("    Profiles _set_boundaries", "app.panels.profiles", "ProfilesPanel._set_boundaries"),
    ("    Profiles _settle_ranges (auto-range now)", "app.panels.profiles", "ProfilesPanel._settle_ranges"),
    ("  Key Figures refresh", "app.panels.key_figures", "KeyFiguresPanel.refresh"),
    ("  Checks refresh (see above: also per edit)", "", ""),
    ("  main window _on_result", "app.main_window", "MainWindow._on_result"),
    ("paint: Line Strip canvas (paintEvent)", "app.panels.line_strip", "StripCanvas.paintEvent"),
    ("  Line Strip _render (cache miss)", "app.panels.line_strip", "StripCanvas._render"),
    ("paint: plots (pyqtgraph GraphicsView.paintEvent)", "pyqtgraph", "GraphicsView.paintEvent"),
    ("  curves (PlotCurveItem.paint)", "pyqtgraph", "PlotCurveItem.paint"),
    ("  axes (AxisItem.paint)", "pyqtgraph", "AxisItem.paint"),
    ("  grid (_GridLines.paint)", "app.panels.profiles", "_GridLines.paint"),
    ("  boundary/limit lines (InfiniteLine.paint)", "pyqtgraph", "InfiniteLine.paint"),
    ("paint: Profiles legend strip", "app.panels.profiles", "LegendStrip.paintEvent"),
]


class Timers:
    def __init__(self):
        self.wall = defaultdict(float)
        self.cpu = defaultdict(float)
        self.calls = defaultdict(int)
        self.on = False
        self.missing: list[str] = []
        self._depth = threading.local()

    def install(self) -> None:
        for label, module, path in TIMERS:
            if not module:
                continue
            try:
                owner = importlib.import_module(module)
                *parents, name = path.split(".")
                for part in parents:
                    owner = getattr(owner, part)
                original = getattr(owner, name)
            except (ImportError, AttributeError):
                self.missing.append(f"{module}.{path}")
                continue
            setattr(owner, name, self._wrap(label, original))

    def _wrap(self, label: str, original):
        timers = self
        # Qt drops signal arguments a slot does not take; a wrapper taking *args would get them, so
        # pass on no more positional arguments than the original accepts
        try:
            params = inspect.signature(original).parameters.values()
            takes_any = any(p.kind is p.VAR_POSITIONAL for p in params)
            max_pos = None if takes_any else sum(p.kind in (p.POSITIONAL_ONLY, p.POSITIONAL_OR_KEYWORD) for p in params)
        except (TypeError, ValueError):  # a builtin without a signature
            max_pos = None

        def timed(*args, **kwargs):
            if max_pos is not None and len(args) > max_pos:
                args = args[:max_pos]
            if not timers.on:
                return original(*args, **kwargs)
            depth = getattr(timers._depth, label, 0)
            setattr(timers._depth, label, depth + 1)
            w, c = time.perf_counter(), time.thread_time()
            try:
                return original(*args, **kwargs)
            finally:
                setattr(timers._depth, label, depth)
                if depth == 0:  # re-entrant calls counted once
                    timers.wall[label] += time.perf_counter() - w
                    timers.cpu[label] += time.thread_time() - c
                    timers.calls[label] += 1

        timed.__wrapped__ = original
        timed.__name__ = getattr(original, "__name__", "timed")
        return timed

    def report(self, n: int, total_ms: float) -> list[tuple[str, float]]:
        print(f"  {'wall':>7} {'CPU':>7} {'calls':>6}   per edit; edit → drawn {total_ms:.1f} ms (median, timers on)")
        rows = []
        for label, module, _path in TIMERS:
            if not module:
                continue
            if self.calls.get(label):
                w, c = self.wall[label] * 1000 / n, self.cpu[label] * 1000 / n
                print(f"  {w:7.1f} {c:7.1f} {self.calls[label] / n:6.1f}   {label}")
                rows.append((label, w))
        if self.missing:
            print(f"  (not found, skipped: {', '.join(self.missing)})")
        return rows


def run_typing(line: str, bursts: int, n: int = 20, interval_ms: float = 10.0):
    """Typing bursts with the timers on; returns (Timers, list of Drawn)."""
    timers = Timers()
    timers.install()
    s = B.Session(B.long_project(60) if line == "60" else None)
    s.spaced_edits(2, 0.25)
    timers.on = True
    out = [s.typing_burst(n, interval_ms / 1000.0) for _ in range(bursts)]
    timers.on = False
    s.close()
    return timers, out


def run(line: str, edits: int, spacing_ms: float, setup=None, quiet: bool = False):
    """Spaced edits with the timers on; returns (Timers, per-edit Drawn list). ``setup(session)``
    may change the window before the edits (used to try a change without editing app files)."""
    timers = Timers()
    timers.install()
    s = B.Session(B.long_project(60) if line == "60" else None)
    if setup is not None:
        setup(s)
        s.idle(0.3)
    s.spaced_edits(2, spacing_ms / 1000.0)  # warm (the first edit after loading solves on the worker)
    timers.on = True
    drawn = s.spaced_edits(edits, spacing_ms / 1000.0)
    timers.on = False
    s.close()
    return timers, drawn


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--line", choices=["demo", "60"], default="demo")
    ap.add_argument("--edits", type=int, default=15)
    ap.add_argument("--spacing-ms", type=float, default=250.0)
    ap.add_argument("--typing", action="store_true", help="bursts of 20 edits 10 ms apart instead (per burst)")
    args = ap.parse_args()
    if args.typing:
        timers, bursts = run_typing(args.line, max(2, args.edits // 5))
        print(f"{args.line} line, {len(bursts)} typing bursts of 20 edits 10 ms apart; figures PER BURST · "
              f"solves per burst {[b.solves for b in bursts]}")
        timers.report(len(bursts), B.med([b.ms(b.t0, b.drawn) for b in bursts]))
        return 0
    timers, drawn = run(args.line, args.edits, args.spacing_ms)
    print(f"{args.line} line, {args.edits} spaced edits · load average {__import__('os').getloadavg()[0]:.2f}")
    timers.report(args.edits, B.med([d.ms(d.t0, d.drawn) for d in drawn]))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
