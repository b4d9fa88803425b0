"""Many variants solved together (issue 11): Sweep and Target Finder speed. Prints figures, asserts nothing.

    .venv/bin/python benchmarks/bench_sweep.py [--variants 1000] [--repeat 5]

1. Sweep of N variants of the demo line ("Trace 15 W/m, 80 mm wool", heater output 5–40 W/m), key figures
   only: ``solver.batch.solve_batch`` (the variants marched together) against the same variants solved one
   by one the way a careful user of the solver would: ``solver.march.solve`` per variant, reading its key
   figures. Both in this process, side by side, on the same variants; the answers are compared (largest
   relative difference of any key figure). Median of repeats [min–max], CPU time (process_time) and wall.
   The batch marches its chunks on one thread per core by default (numpy releases the interpreter lock in
   its array operations); it is also timed on one thread, the fair comparison with the one-by-one loop.
   The first call (new variants, empty caches) is reported apart.
2. Profiles at 10 chosen points on top (``profiles=True`` for 10 variants).
3. Target Finder on the demo (continuous: heater output; discrete: insulation thickness on the standard
   list), when ``solver.target_finder`` is present.
"""

from __future__ import annotations

import argparse
import math
import os
import statistics
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from solver.batch import solve_batch  # noqa: E402
from solver.march import solve  # noqa: E402
from solver.model import ConstantHeater  # noqa: E402
from solver.project_io import load_project  # noqa: E402

DEMO = load_project(ROOT / "app" / "demo_project.json")
BASE = next(a for a in DEMO.alternatives if a.name.startswith("Trace 15"))


def variants(n: int, lo: float = 5.0, hi: float = 40.0):
    out = []
    for i in range(n):
        w = lo + (hi - lo) * i / max(n - 1, 1)
        segs = [s.model_copy(update={"heater": ConstantHeater(output_W_per_m=w)}) for s in BASE.segments]
        out.append(BASE.model_copy(update={"segments": segs, "name": f"{w:.3f} W/m"}))
    return out


def timed(fn, repeat: int):
    cpu, wall = [], []
    value = None
    for _ in range(repeat):
        w0, c0 = time.perf_counter(), time.process_time()
        value = fn()
        cpu.append(time.process_time() - c0)
        wall.append(time.perf_counter() - w0)
    return value, cpu, wall


def fig(ts) -> str:
    return f"{statistics.median(ts):7.3f} s [{min(ts):.3f}–{max(ts):.3f}]"


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--variants", type=int, default=1000)
    ap.add_argument("--repeat", type=int, default=5)
    args = ap.parse_args()
    n, rep = args.variants, args.repeat

    # first call in this process: fresh variants, nothing built yet for them
    alts = variants(n)
    c0, w0 = time.process_time(), time.perf_counter()
    solve_batch(alts)
    first_cpu, first_wall = time.process_time() - c0, time.perf_counter() - w0

    batch_out, b_cpu, b_wall = timed(lambda: solve_batch(variants(n)), rep)
    _, s_cpu, s_wall = timed(lambda: solve_batch(variants(n), threads=1), rep)
    one_out, o_cpu, o_wall = timed(lambda: [solve(a).key_figures() for a in variants(n)], max(1, rep // 2))
    worst = 0.0
    for o, ref in zip(batch_out, one_out):
        for k, v in ref.items():
            w = o.key_figures[k]
            if isinstance(v, float) and math.isfinite(v) and v != 0.0:
                worst = max(worst, abs(w - v) / abs(v))
    together = sum(o.together for o in batch_out)
    print(f"Sweep of {n} variants of the demo line ({BASE.name!r}, heater output 5–40 W/m), key figures only")
    print(f"  marched together ({together} of {n}), chunks on {os.cpu_count()} threads  CPU {fig(b_cpu)}   "
          f"wall {fig(b_wall)}   (n={rep})")
    print(f"  marched together, one thread        CPU {fig(s_cpu)}   wall {fig(s_wall)}   (n={rep})")
    print(f"  one by one (solve per variant)   CPU {fig(o_cpu)}   wall {fig(o_wall)}   (n={max(1, rep // 2)})")
    print(f"  ratios, one by one / together (medians): wall {statistics.median(o_wall) / statistics.median(b_wall):.2f}x"
          f" (threads), {statistics.median(o_wall) / statistics.median(s_wall):.2f}x (one thread); "
          f"CPU {statistics.median(o_cpu) / statistics.median(b_cpu):.2f}x")
    print(f"  first call in this process (after the imports; see bench_first_solve.py for a new process): "
          f"CPU {first_cpu:.3f} s, wall {first_wall:.3f} s")
    print(f"  largest relative difference of any key figure: {worst:.2e}")

    ten = variants(10)
    _, p_cpu, p_wall = timed(lambda: solve_batch(ten, profiles=True), rep)
    print(f"Profiles at 10 chosen points on top: CPU {fig(p_cpu)}   wall {fig(p_wall)}")

    try:
        from solver import target_finder, variants as variants_mod
    except ImportError:
        print("Target Finder: not present")
        return
    heater = variants_mod.Parameter("heater_output")
    thickness = variants_mod.Parameter("insulation_thickness")
    t = target_finder.parse_target
    cases = (("continuous (heater output; bulk >= 74 °C, inner wall <= 75 °C)", heater,
              [t("bulk_min=74C"), t("inner_wall_max=75C")]),
             ("standard list (insulation; surface <= 50 °C, bulk >= 72 °C)", thickness,
              [t("surface_max=50C"), t("bulk_min=72C")]))
    c0 = time.process_time()
    target_finder.prepare()  # scipy.optimize's first import: paid once per process, before the first search
    print(f"Target Finder: first use in a process imports scipy.optimize: {time.process_time() - c0:.3f} s CPU")
    for label, param, tg in cases:
        res, f_cpu, f_wall = timed(lambda: target_finder.find(BASE, param, tg), rep)
        print(f"Target Finder, {label}: CPU {fig(f_cpu)}   wall {fig(f_wall)}   -> {res.value_text or res.value!r} "
              f"({res.evaluations} variants solved; binding: {res.binding.text() if res.binding else '-'})")


if __name__ == "__main__":
    main()
