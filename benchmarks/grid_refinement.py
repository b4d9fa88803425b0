"""Grid refinement table: how far each reported temperature moves when the cells are refined.

For every sample project (and the invented short-first-segment and laminar-oil lines of
tests/test_grid_independence.py) the line is solved at refinement 0.5, 1, 2 and 4; the table gives,
per alternative, the largest spread [K] over the four grids of: the outlet temperature, the min/max
inner-wall and outer-surface temperatures, and the bulk, inner-wall and outer-surface profiles at
fixed positions (0, 1/8 … 1 of each segment). The target is < 0.01 K everywhere.

    .venv/bin/python benchmarks/grid_refinement.py
"""

from __future__ import annotations

import os
import sys

import numpy as np

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "tests"))

from test_grid_independence import FIGURES, PROFILES, REFINEMENTS, _at_fixed_positions, _cases  # noqa: E402

from solver.march import solve  # noqa: E402


def main() -> None:
    short = {"outlet_temperature_K": "outlet", "max_inner_wall_temperature_K": "wall max",
             "min_inner_wall_temperature_K": "wall min", "max_outer_surface_temperature_K": "surf max",
             "min_outer_surface_temperature_K": "surf min", "bulk_temperature_K": "bulk(x)",
             "inner_wall_temperature_K": "wall(x)", "outer_surface_temperature_K": "surf(x)"}
    cols = list(FIGURES) + list(PROFILES)
    print(f"Largest spread [K] over refinements {REFINEMENTS}")
    print(f"{'line':52s}" + "".join(f"{short[c]:>10s}" for c in cols) + f"{'cells@1':>9s}")
    worst = 0.0
    for param in _cases():
        alt = param.values[0]
        results = [solve(alt, refine=r) for r in REFINEMENTS]
        row = []
        for key in FIGURES:
            v = np.array([r.key_figures()[key] for r in results], dtype=float)
            row.append(float(np.nanmax(v) - np.nanmin(v)) if np.isfinite(v).any() else float("nan"))
        for key in PROFILES:
            v = np.array([_at_fixed_positions(r, key) for r in results])
            row.append(float(np.nanmax(np.nanmax(v, axis=0) - np.nanmin(v, axis=0))))
        worst = max(worst, np.nanmax(row))
        print(f"{param.id[:52]:52s}" + "".join(f"{x:10.4f}" for x in row) + f"{results[1].cells:9d}")
    print(f"worst spread: {worst:.4f} K (target < 0.01 K)")


if __name__ == "__main__":
    main()
