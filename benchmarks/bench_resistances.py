"""Cost of the resistance breakdown per solve (issue 8 item 8). Run by hand; prints figures, asserts nothing.

    .venv/bin/python benchmarks/bench_resistances.py [--repeat 300]

``solver.resistances.segment_resistances`` runs at the end of every solve: it reduces the converged
cells to per-segment means (``np.add.reduceat``); the labelled per-segment records are built only
when read. Measured on the demo's segments repeated to 5, 60 and 1,000 (as ``bench_solver.py``
case 5): CPU time (``time.process_time``) of the call alone, median [min–max], and of the call with
every segment's record built (what ``calorun solve --json`` and the report read).
"""

from __future__ import annotations

import argparse
import statistics
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "benchmarks"))

from bench_solver import repeated_demo  # noqa: E402

from solver import march  # noqa: E402
from solver.resistances import segment_resistances  # noqa: E402


def _converged(alt):
    """The line and the converged state of one solve (caught on their way to the Result)."""
    caught = {}
    original = march.line_result

    def catch(alt_, fluid, line, state):
        caught["line"], caught["state"] = line, state
        return original(alt_, fluid, line, state)

    march.line_result = catch
    try:
        march.solve(alt)
    finally:
        march.line_result = original
    return caught["line"], caught["state"]


def _cpu_us(fn, repeat: int) -> list[float]:
    out = []
    for _ in range(repeat):
        t0 = time.process_time()
        fn()
        out.append((time.process_time() - t0) * 1e6)
    return out


def main() -> None:
    parser = argparse.ArgumentParser()
    parser.add_argument("--repeat", type=int, default=300)
    args = parser.parse_args()
    for n in (5, 60, 1000):
        line, state = _converged(repeated_demo(n, flat=n == 1000))
        repeat = args.repeat if n < 1000 else max(args.repeat // 10, 5)
        segment_resistances(line, state)  # warm
        call = _cpu_us(lambda: segment_resistances(line, state), repeat)
        built = _cpu_us(lambda: list(segment_resistances(line, state)), repeat)
        print(f"{n:5d} segments, {line.n:6d} cells: call {statistics.median(call):8.0f} µs "
              f"[{min(call):.0f}–{max(call):.0f}]; with every record built {statistics.median(built):8.0f} µs "
              f"[{min(built):.0f}–{max(built):.0f}]")


if __name__ == "__main__":
    main()
