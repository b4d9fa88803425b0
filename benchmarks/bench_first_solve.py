"""The first solve in a new process (issue 11): where the time goes. Prints figures, asserts nothing.

    .venv/bin/python benchmarks/bench_first_solve.py [--repeat 7]

Each figure is a fresh interpreter (subprocess), median [min–max] of the repeats, wall time measured
inside the child from its first line, so the interpreter's own start (about 20 ms) is not counted:
  numpy              import numpy
  solver imports     import the solver (numpy, pydantic, the model, the march)
  load demo          + read and validate app/demo_project.json
  first solve        + solve its first alternative (a user-table fluid: CoolProp is not imported)
  CoolProp fluid     the same for sample_projects/makeup_water_freeze_protection.json (CoolProp water)
and whether CoolProp was imported by the table-fluid solve.
"""

from __future__ import annotations

import argparse
import json
import statistics
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent

CHILD = r"""
import json, sys, time
t0 = time.perf_counter()
import numpy
t1 = time.perf_counter()
from solver.march import solve
from solver.project_io import load_project
t2 = time.perf_counter()
project = load_project(sys.argv[1])
t3 = time.perf_counter()
solve(project.alternatives[0])
t4 = time.perf_counter()
print(json.dumps({"numpy": t1 - t0, "imports": t2 - t0, "load": t3 - t0, "solve": t4 - t0,
                  "coolprop": "CoolProp" in sys.modules}))
"""


def run(path: Path, repeat: int) -> dict:
    rows = []
    for _ in range(repeat):
        out = subprocess.run([sys.executable, "-c", CHILD, str(path)], cwd=ROOT, capture_output=True, text=True,
                             check=True).stdout
        rows.append(json.loads(out))
    return {k: [r[k] for r in rows] for k in rows[0]}


def fig(values) -> str:
    ms = [v * 1e3 for v in values]
    return f"{statistics.median(ms):6.0f} ms [{min(ms):.0f}–{max(ms):.0f}]"


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=7)
    args = ap.parse_args()
    for label, path in (("demo (user-table fluid)", ROOT / "app" / "demo_project.json"),
                        ("makeup water (CoolProp water)", ROOT / "sample_projects" / "makeup_water_freeze_protection.json")):
        r = run(path, args.repeat)
        print(f"{label}: cumulative from the child's first line, median [min–max] of {args.repeat}")
        print(f"  import numpy             {fig(r['numpy'])}")
        print(f"  + solver imports         {fig(r['imports'])}")
        print(f"  + load the project       {fig(r['load'])}")
        print(f"  + first solve            {fig(r['solve'])}   (the solve alone: "
              f"{statistics.median([s - l for s, l in zip(r['solve'], r['load'])]) * 1e3:.0f} ms)")
        print(f"  CoolProp imported: {any(r['coolprop'])}")


if __name__ == "__main__":
    main()
