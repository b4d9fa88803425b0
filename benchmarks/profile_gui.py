"""Where an edit's time goes: cProfile of spaced edits (the bench_gui case a/c), per edit.

Profiles the GUI thread from the commit of each edit to the end of its repaint, and the
solver on whichever thread runs it (a profiler per thread: the Document's worker thread is
profiled by wrapping ``solver.solve``). Prints, in ms per edit:

- the views and steps (inclusive time of each handler: the command, each panel's reaction to
  the edit and to the result, the solve and its phases, painting of the Line Strip and plots),
- the top functions by own time (what the CPU actually did, Qt's C++ work included under the
  Python call that started it: e.g. ``processEvents`` own time is Qt layout and painting of
  native widgets).

Times are CPU time of the thread (``time.thread_time``) by default, so waiting (for the worker,
for the GIL, for the next event) is not charged to whatever function happened to wait; ``--clock
wall`` charges wall time instead. cProfile slows Python-heavy code (pydantic-core, numpy and Qt's
C++ much less): the profiled total is printed beside an unprofiled one; read the shares, not the
absolute figures.

Run: ``.venv/bin/python benchmarks/profile_gui.py [--line demo|60] [--edits 12] [--dump /tmp/x.prof]``
"""

from __future__ import annotations

import argparse
import cProfile
import pstats
import sys
import threading
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
import bench_gui as B  # noqa: E402  (sets the offscreen platform and the temporary settings folder)

# (label, path fragment, function name): inclusive time of these, per edit. The path fragments
# are loose on purpose: other work moves code between modules.
STEPS = [
    ("edit: QuantityEdit.commit (command + every view's reaction to the edit)", "quantity_edit.py", "commit"),
    ("  command built (pydantic validation of the new alternative)", "app/commands.py", "__init__"),
    ("  Document.push (undo stack; project_changed handlers)", "app/document.py", "push"),
    ("    Segment Card refresh", "segment_card.py", "refresh"),
    ("    Feed refresh", "feed_panel.py", "refresh"),
    ("    Line Strip refresh", "line_strip.py", "refresh"),
    ("    Checks refresh", "checks_panel.py", "refresh"),
    ("    Alternatives refresh", "alternatives_panel.py", "refresh"),
    ("    Side-by-Side schedule", "side_by_side.py", "schedule"),
    ("    main window _on_project_changed", "main_window.py", "_on_project_changed"),
    ("    Profiles _update_limits", "profiles.py", "_update_limits"),
    ("solve (solver.solve, any thread)", "solver/march.py", "solve"),
    ("  fluid properties (props)", "solver/properties.py", "props"),
    ("  checks", "solver/", "_checks"),
    ("  node profiles", "solver/", "_node_profiles"),
    ("result: Profiles _on_result (setData, boundaries, ranges)", "profiles.py", "_on_result"),
    ("  PlotDataItem.setData", "pyqtgraph/graphicsItems/PlotDataItem.py", "setData"),
    ("  Profiles _set_boundaries", "profiles.py", "_set_boundaries"),
    ("  Profiles _settle_ranges (auto-range now)", "profiles.py", "_settle_ranges"),
    ("result: Key Figures refresh", "key_figures.py", "refresh"),
    ("  key_figure_rows", "", "key_figure_rows"),
    ("result: main window _on_result", "main_window.py", "_on_result"),
    ("paint: Line Strip canvas paintEvent", "line_strip.py", "paintEvent"),
    ("paint: pyqtgraph GraphicsView paintEvent (plots)", "pyqtgraph/widgets/GraphicsView.py", "paintEvent"),
    ("  PlotCurveItem.paint (curves)", "PlotCurveItem.py", "paint"),
    ("  AxisItem.paint (axes)", "AxisItem.py", "paint"),
    ("  _GridLines.paint", "profiles.py", "paint"),
    ("  InfiniteLine.paint", "InfiniteLine.py", "paint"),
    ("  ViewBox.prepareForPaint / updateAutoRange", "ViewBox.py", "updateAutoRange"),
    ("Qt C++ (processEvents own time: layout, native widget painting, style sheets)", "~", "<method 'processEvents'"),
]


class ThreadProfiles:
    """One cProfile per thread that runs ``solver.solve``, merged at the end."""

    def __init__(self, clock):
        import solver

        self.profiles: list[cProfile.Profile] = []
        self.enabled = False
        self._orig = solver.solve
        me = self

        def solve(alternative, **kw):
            if not me.enabled or threading.current_thread() is threading.main_thread():
                return me._orig(alternative, **kw)  # the main thread has its own profiler
            prof = cProfile.Profile(clock)
            me.profiles.append(prof)
            return prof.runcall(me._orig, alternative, **kw)

        solver.solve = solve  # the Document's task imports it by name at call time


def _match(stats: dict, frag: str, name: str) -> float:
    """Inclusive seconds of the functions matching ``frag``/``name`` (outermost calls only)."""
    total = 0.0
    for (path, _line, func), (_cc, _nc, _tt, ct, callers) in stats.items():
        ok = (func.startswith(name) if path == "~" else func == name) and (frag == "~" or frag in path.replace("\\", "/"))
        if not ok:
            continue
        # count only calls not made by another matching function (recursion, overloads)
        inner = sum(c[3] for caller, c in callers.items()
                    if caller[2] == func and frag in caller[0].replace("\\", "/"))
        total += ct - inner
    return total


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--line", choices=["demo", "60"], default="demo")
    ap.add_argument("--edits", type=int, default=12)
    ap.add_argument("--spacing-ms", type=float, default=250.0)
    ap.add_argument("--top", type=int, default=30)
    ap.add_argument("--clock", choices=["cpu", "wall"], default="cpu")
    ap.add_argument("--dump", default="", help="also write the merged stats here (for snakeviz etc.)")
    args = ap.parse_args()

    clock = time.thread_time if args.clock == "cpu" else time.perf_counter
    threads = ThreadProfiles(clock)
    s = B.Session(B.long_project(60) if args.line == "60" else None)
    plain = s.spaced_edits(4, args.spacing_ms / 1000.0)[1:]
    plain_ms = B.med([d.ms(d.t0, d.drawn) for d in plain])

    prof = cProfile.Profile(clock)
    edit = s.editor()
    base = s.selected_length()
    threads.enabled = True
    totals = []
    for i in range(args.edits):
        s.idle(args.spacing_ms / 1000.0)
        t0 = time.perf_counter()
        prof.enable()
        edit(s.new_length(base, 0.02 * ((i % 9) + 1)))
        s.wait_result(t0)
        end = s.wait_painted()
        prof.disable()
        totals.append((max(end, s.results[-1]) - t0) * 1000.0)
    threads.enabled = False
    s.close()

    st = pstats.Stats(prof)
    for p in threads.profiles:
        st.add(p)
    if args.dump:
        st.dump_stats(args.dump)
    stats = st.stats
    n = args.edits
    print(f"{args.line} line: {n} profiled edits, {args.clock} clock; edit → drawn {B.med(totals):.0f} ms profiled, "
          f"{plain_ms:.0f} ms without the profiler (medians); worker-thread solves profiled: {len(threads.profiles)}")
    print(f"GUI thread: {sum(st.total_tt for st in [pstats.Stats(prof)]) * 1000 / n:.1f} ms {args.clock} per edit"
          f"{f'; solver on the worker {sum(pstats.Stats(p).total_tt for p in threads.profiles) * 1000 / n:.1f} ms' if threads.profiles else ''}")
    print("\nsteps, inclusive ms per edit (nested rows are part of the row above):")
    for label, frag, name in STEPS:
        ms = _match(stats, frag, name) * 1000.0 / n
        if ms >= 0.05:
            print(f"  {ms:8.1f}  {label}")

    def short(key):
        path, line, func = key
        path = path.replace("\\", "/")
        for cut in ("/site-packages/", "/work/main/"):
            if cut in path:
                path = path.split(cut, 1)[1]
        return f"{path}:{line} {func}" if path != "~" else func

    print(f"\ntop {args.top} by own time, ms per edit (calls per edit):")
    rows = sorted(stats.items(), key=lambda kv: kv[1][2], reverse=True)[: args.top]
    for key, (_cc, nc, tt, _ct, _callers) in rows:
        print(f"  {tt * 1000 / n:8.2f}  ({nc / n:7.0f})  {short(key)}")
    print(f"\ntop {args.top} app/, solver/ and pyqtgraph functions by inclusive time, ms per edit:")
    ours = [(k, v) for k, v in stats.items() if any(f in k[0] for f in ("/app/", "/solver/", "pyqtgraph"))]
    for key, (_cc, nc, _tt, ct, _callers) in sorted(ours, key=lambda kv: kv[1][3], reverse=True)[: args.top]:
        print(f"  {ct * 1000 / n:8.2f}  ({nc / n:7.0f})  {short(key)}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
