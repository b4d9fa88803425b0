"""What the design cases cost (issue 10): a live solve with and without them, and the hold time.

    .venv/bin/python benchmarks/bench_design.py [--repeat 21]

For every alternative of every sample project (sample_projects/*.json), CPU time (``time.process_time``,
because other work may share the machine), median [min–max] of ``--repeat`` warm calls:

a. ``solve(alt)``: the operating case only (what the app solved before the design cases);
b. ``solve(alt, design=project.design_cases)``: plus the worst and hot cases and the tracing need
   (a flowing worst case re-solves the line; a standing one is a per-segment balance);
c. the first read of ``result.design.hold_time`` (the lumped transient, worked out when first read).

And the first call of each in a fresh interpreter (property tables and memos empty), once per project.
Prints figures; asserts nothing.
"""

from __future__ import annotations

import argparse
import json
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from solver.march import solve  # noqa: E402
from solver.project_io import load_project  # noqa: E402


def cpu_ms(fn, repeat: int) -> tuple[float, float, float]:
    times = []
    for _ in range(repeat):
        t0 = time.process_time()
        fn()
        times.append((time.process_time() - t0) * 1e3)
    return statistics.median(times), min(times), max(times)


def first_call(path: Path) -> dict:
    """Times of the first solve with design cases and the first hold-time read, in a fresh interpreter."""
    code = (
        "import sys, time, json; sys.path.insert(0, %r)\n"
        "from solver.march import solve\nfrom solver.project_io import load_project\n"
        "p = load_project(%r); a = p.alternatives[0]\n"
        "t0 = time.process_time(); r = solve(a, design=p.design_cases); t1 = time.process_time()\n"
        "h = r.design.hold_time; t2 = time.process_time()\n"
        "print(json.dumps({'solve_design_ms': (t1 - t0) * 1e3, 'hold_time_ms': (t2 - t1) * 1e3}))\n"
    ) % (str(ROOT), str(path))
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    return json.loads(out.stdout.strip().splitlines()[-1])


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeat", type=int, default=21)
    args = ap.parse_args()
    print(f"CPU ms, median [min-max] of {args.repeat} warm calls\n")
    print(f"{'project / alternative':58s} {'solve':>22s} {'solve + design':>22s} {'ratio':>6s} {'hold time':>22s}")
    ratios = []
    for path in sorted((ROOT / "sample_projects").glob("*.json")):
        project = load_project(path)
        for alt in project.alternatives:
            solve(alt)  # warm the property tables and memos
            plain = cpu_ms(lambda: solve(alt), args.repeat)
            design = cpu_ms(lambda: solve(alt, design=project.design_cases), args.repeat)
            hold = cpu_ms(lambda: solve(alt, design=project.design_cases).design.hold_time, args.repeat)
            hold_only = tuple(h - d for h, d in zip(hold, design))  # median difference: the hold time's own share
            ratios.append(design[0] / plain[0])
            label = f"{path.stem} / {alt.name}"[:58]
            print(f"{label:58s} {plain[0]:7.1f} [{plain[1]:.1f}-{plain[2]:.1f}] {design[0]:8.1f} "
                  f"[{design[1]:.1f}-{design[2]:.1f}] {design[0] / plain[0]:6.2f} {hold_only[0]:8.1f} (median diff)")
    print(f"\nsolve with design cases / without: median {statistics.median(ratios):.2f} "
          f"[{min(ratios):.2f}-{max(ratios):.2f}] over {len(ratios)} alternatives")
    print("\nfirst call in a fresh interpreter (first alternative of each project):")
    for path in sorted((ROOT / "sample_projects").glob("*.json")):
        f = first_call(path)
        print(f"  {path.stem:40s} solve + design {f['solve_design_ms']:7.1f} ms, hold time {f['hold_time_ms']:6.1f} ms")


if __name__ == "__main__":
    main()
