"""`calorun report` at scale (issue 9): time to solve a long line and write its PDF. Run by hand;
prints figures, asserts nothing.

    .venv/bin/python benchmarks/bench_report.py [--repeat 3] [--sizes 100 1000 10000]
        [--before /tmp/h4head] [--timeout 600]

The line: the demo project's first alternative (app/demo_project.json: a traced residue line of five
segments in still air, wind and soil) with its segments repeated in order to N segments, each
named with its repeat ("Pipe rack east 17"), a quarter of its length, no elevation change and a
60 bar(a) feed, so 10,000 segments (about 92 km) still pass the flow. The time is write_report()
of that project (solve included, as `calorun report` does), measured in a fresh child process per
run: wall time, and CPU time of the process (other work on this two-core machine stretches the
wall time, not the CPU time). Sizes up to 1,000: the median of ``--repeat`` runs with min and max;
10,000: one run.

``--before DIR``: the same runs with the code in DIR (an older checkout, e.g. made with
``git worktree add /tmp/h4head HEAD``), put first on PYTHONPATH of the child; a run that takes
longer than ``--timeout`` seconds is stopped and shown as "> timeout, no PDF".
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def build_project(n_segments: int):
    """The demo's first alternative, its segments repeated to ``n_segments`` (see the module notes)."""
    from solver.project_io import load_project

    demo = load_project(Path(sys.path[0]) / "app" / "demo_project.json")
    alt = demo.alternatives[0]
    segs = []
    for i in range(n_segments):
        s = alt.segments[i % len(alt.segments)].model_copy(deep=True)
        s.name = f"{s.name} {i // len(alt.segments) + 1}"
        s.elevation_change_m = 0.0
        s.length_m = s.length_m * 0.25
        segs.append(s)
    feed = alt.feed.model_copy(update={"inlet_pressure_Pa": 60e5})
    return demo.model_copy(update={"alternatives": [alt.model_copy(update={"segments": segs, "feed": feed})]})


def child(n_segments: int, out: str) -> None:
    """One run in this process: build, then time write_report (solve included); print JSON."""
    os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    from app.report import write_report

    project = build_project(n_segments)
    wall, cpu = time.perf_counter(), time.process_time()
    write_report(project, out, date="2026-12-02")
    print(json.dumps({"wall": time.perf_counter() - wall, "cpu": time.process_time() - cpu,
                      "bytes": os.path.getsize(out)}))


def run_once(code: Path, n_segments: int, timeout: float) -> dict | None:
    """One child run with ``code`` first on its path; None when it ran out of time."""
    env = dict(os.environ, PYTHONPATH=str(code), QT_QPA_PLATFORM="offscreen")
    with tempfile.TemporaryDirectory() as tmp:
        out = os.path.join(tmp, "bench.pdf")
        script = (f"import sys; sys.path.insert(0, {str(code)!r}); sys.path.insert(1, {str(ROOT / 'benchmarks')!r}); "
                  f"import bench_report; bench_report.child({n_segments}, {out!r})")
        try:
            proc = subprocess.run([sys.executable, "-c", script], cwd=str(code), env=env, capture_output=True,
                                  text=True, timeout=timeout)
        except subprocess.TimeoutExpired:
            return None
    if proc.returncode != 0:
        raise RuntimeError(f"report of {n_segments} segments with {code} failed:\n{proc.stderr[-3000:]}")
    return json.loads(proc.stdout.strip().splitlines()[-1])


def figures(code: Path, n_segments: int, repeat: int, timeout: float) -> str:
    runs = []
    for _ in range(repeat if n_segments <= 1000 else 1):
        r = run_once(code, n_segments, timeout)
        if r is None:
            return f"> {timeout:.0f} s, no PDF (stopped)"
        runs.append(r)
    walls = [r["wall"] for r in runs]
    cpus = [r["cpu"] for r in runs]
    if len(runs) == 1:
        return f"wall {walls[0]:6.1f} s   CPU {cpus[0]:6.1f} s   (1 run, PDF {runs[0]['bytes'] / 1e6:.1f} MB)"
    return (f"wall {statistics.median(walls):6.1f} s [{min(walls):.1f}–{max(walls):.1f}]   "
            f"CPU {statistics.median(cpus):6.1f} s [{min(cpus):.1f}–{max(cpus):.1f}]   "
            f"(median [min–max] of {len(runs)}, PDF {runs[0]['bytes'] / 1e6:.1f} MB)")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--sizes", type=int, nargs="+", default=[100, 1000, 10000])
    ap.add_argument("--before", type=Path, help="an older checkout to compare with")
    ap.add_argument("--timeout", type=float, default=600.0)
    args = ap.parse_args()
    print(f"calorun report of the demo line repeated to N segments (solve included); load {os.getloadavg()[0]:.1f}")
    codes = [("after", ROOT)] + ([("before", args.before)] if args.before else [])
    for n in args.sizes:
        for label, code in codes:
            print(f"  {n:>6,} segments  {label:6s}  {figures(code, n, args.repeat, args.timeout)}", flush=True)


if __name__ == "__main__":
    main()
