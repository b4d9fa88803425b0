"""Solver speed and accuracy (DESIGN §6). Run by hand; prints figures, asserts nothing.

    .venv/bin/python benchmarks/bench_solver.py [--repeat 50]

Cases
1. One alternative, 10 segments, about 2,000 cells, water heated by tracing and
   losing heat to wind (properties vary along the line): median solve time.
2. The same line marched by a straightforward per-cell loop written carefully: one CoolProp
   low-level state update per cell (AbstractState; explicit Euler, same correlations): its time,
   and both outlet temperatures against a fine-grid reference of our solver.
3. Grid independence: doubling the cells, change of outlet temperature.
4. Start-up: `calorun solve` of a sample project in a fresh interpreter.
5. Fixed cost per segment (issue 7, edit-to-replot): CPU time of one solve of the demo
   (5 segments), the 10-segment line, the demo's segments repeated to 60 and to 1,000
   segments: the first call (fresh alternative, the solver's memos emptied) and warm
   calls, median [min–max]; and a fit of the time into a per-segment and a per-cell part.
   CPU time (``time.process_time``), because other work may share the machine.
   ``--speed-only`` runs just this part.
"""

from __future__ import annotations

import argparse
import math
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))


import numpy as np  # noqa: E402

from solver import correlations, fittings as fittings_mod, line as line_mod  # noqa: E402
from solver.catalogue import resolve_pipe  # noqa: E402
from solver.march import solve  # noqa: E402
from solver.model import Alternative, Feed, Layer, Pipe, PureFluid, Segment, Wind  # noqa: E402
from solver.project_io import load_project  # noqa: E402


def line(n_segments: int = 10) -> Alternative:
    segs = []
    for i in range(n_segments):
        segs.append(Segment(
            name=f"S{i + 1}", length_m=40.0, pipe=Pipe(nps="2", schedule="40"),
            heat_input_W_per_m=900.0 if i % 2 == 0 else 0.0,
            insulation=[Layer(thickness_m=0.03, conductivity_W_per_mK=0.04)],
            surroundings=Wind(temperature_K=268.15, wind_speed_m_per_s=5.0),
        ))
    return Alternative(name="bench", fluid=PureFluid(name="Water"),
                       feed=Feed(inlet_temperature_K=293.15, inlet_pressure_Pa=6e5, mass_flow_kg_per_s=0.5),
                       segments=segs)


def per_cell_loop(alt: Alternative, cells_per_segment: int) -> float:
    """The straightforward way, written carefully: explicit Euler, one CoolProp low-level state update per
    cell for the water and one for the air film (``AbstractState``, not a ``PropsSI`` call per property),
    scalar correlations, outer film from a fixed-point on the surface temperature per cell."""
    import CoolProp
    import CoolProp.CoolProp as CP

    water = CP.AbstractState("HEOS", "Water")
    air = CP.AbstractState("HEOS", "Air")

    m = alt.feed.mass_flow_kg_per_s
    T = alt.feed.inlet_temperature_K
    p = alt.feed.inlet_pressure_Pa
    x = 0.0
    for seg in alt.segments:
        rp = resolve_pipe(seg.pipe)
        D = rp.inner_diameter_m
        A = math.pi * D * D / 4
        r_wall = float(correlations.cylinder_wall_resistance(D, rp.outer_diameter_m, rp.wall_conductivity_W_per_mK))
        d_out = rp.outer_diameter_m + 2 * sum(layer.thickness_m for layer in seg.insulation)
        r_ins = 0.0
        d = rp.outer_diameter_m
        for layer in seg.insulation:
            r_ins += float(correlations.cylinder_wall_resistance(d, d + 2 * layer.thickness_m, layer.conductivity_W_per_mK))
            d += 2 * layer.thickness_m
        sur = seg.surroundings
        dx = seg.length_m / cells_per_segment
        t_surf = 0.5 * (T + sur.temperature_K)
        for _ in range(cells_per_segment):
            water.update(CoolProp.PT_INPUTS, p, T)
            rho, cp, mu, k = water.rhomass(), water.cpmass(), water.viscosity(), water.conductivity()
            Re = 4 * m / (math.pi * D * mu)
            Pr = cp * mu / k
            f = float(correlations.friction_factor(Re, rp.roughness_m / D))
            Nu = float(correlations.nusselt_inside(Re, Pr, f, (x + dx / 2) / D, "q", relative_roughness=rp.roughness_m / D))
            h_in = Nu * k / D
            r_a = 1 / (h_in * math.pi * D) + r_wall
            t_film = 0.5 * (t_surf + sur.temperature_K)
            air.update(CoolProp.PT_INPUTS, 101325.0, t_film)
            rho_a, mu_a, k_a, cp_a = air.rhomass(), air.viscosity(), air.conductivity(), air.cpmass()
            nu_a = mu_a / rho_a
            al_a = k_a / (rho_a * cp_a)
            ra = 9.80665 / t_film * max(abs(t_surf - sur.temperature_K), 1e-3) * d_out**3 / (nu_a * al_a)
            nu_n = float(correlations.nusselt_churchill_chu_cylinder(ra, nu_a / al_a))
            nu_f = float(correlations.nusselt_churchill_bernstein(sur.wind_speed_m_per_s * d_out / nu_a, nu_a / al_a))
            h_o = float(correlations.nusselt_mixed(nu_f, nu_n)) * k_a / d_out + float(
                correlations.radiation_coefficient(t_surf, sur.temperature_K, sur.emissivity))
            r_o = r_ins + 1 / (h_o * math.pi * d_out)
            u = 1 / (r_a + r_o)
            q = seg.heat_input_W_per_m * (1 - r_a * u) + u * (sur.temperature_K - T)
            t_surf = sur.temperature_K + (seg.heat_input_W_per_m - q) * (r_o - r_ins)
            T += q * dx / (m * cp)
            p -= f * dx / D * 0.5 * rho * (m / (rho * A)) ** 2
            x += dx
    return T


def repeated_demo(n_segments: int, flat: bool = False) -> Alternative:
    """The demo's first alternative with its segments repeated in order up to ``n_segments``.

    ``flat``: no elevation change and a 60 bar feed, so 1,000 segments (40 km) still pass the
    flow; the cost of a solve does not depend on either.
    """
    demo = load_project(ROOT / "app" / "demo_project.json").alternatives[0]
    segs = [demo.segments[i % len(demo.segments)].model_copy(deep=True) for i in range(n_segments)]
    if flat:
        for s in segs:
            s.elevation_change_m = 0.0
        feed = demo.feed.model_copy(update={"inlet_pressure_Pa": 60e5})
        return demo.model_copy(update={"segments": segs, "feed": feed})
    return demo.model_copy(update={"segments": segs})


def _cpu_ms(fn, repeat: int) -> list[float]:
    out = []
    for _ in range(repeat):
        t0 = time.process_time()
        fn()
        out.append((time.process_time() - t0) * 1e3)
    return out


def per_segment_cost(repeat: int) -> None:
    """First-call and warm CPU time of whole solves of lines of growing segment count."""
    demo = load_project(ROOT / "app" / "demo_project.json").alternatives[0]
    cases = [("demo, 5 segments", lambda: demo.model_copy(deep=True)),
             ("10 segments (case 1 line)", line),
             ("60 segments (demo x 12)", lambda: repeated_demo(60)),
             ("1,000 segments (demo x 200, flat)", lambda: repeated_demo(1000, flat=True))]
    solve(line(2))  # load the property tables and imports once, outside the figures
    print("Solve CPU time per line (process_time; first call: fresh alternative and empty memos; then warm)")
    rows = []
    for label, make in cases:
        first = []
        for _ in range(3):
            alt = make()
            # as after opening a file: the solver's value-keyed memos (fittings, buried pipe) empty
            fittings_mod._LOSS_CACHE.clear()
            line_mod._buried_resistance.cache_clear()
            t0 = time.process_time()
            r = solve(alt)
            first.append((time.process_time() - t0) * 1e3)
        reps = max(3, repeat // 5) if len(alt.segments) >= 1000 else repeat
        warm = _cpu_ms(lambda: solve(alt), reps)
        med = statistics.median(warm)
        rows.append((len(alt.segments), r.cells, med))
        print(f"  {label:34s} {r.cells:7,d} cells  first {statistics.median(first):8.2f} ms   "
              f"warm {med:8.2f} ms [{min(warm):.2f}–{max(warm):.2f}] (n={reps})")
    # the same two lines at 8 cells per segment: with the automatic ones, a fit of
    # time = fixed + a · segments + b · cells separates the per-segment from the per-cell cost
    for n_seg in (60, 1000):
        alt = repeated_demo(n_seg, flat=True)
        r = solve(alt, cells_per_segment=8)
        warm = _cpu_ms(lambda: solve(alt, cells_per_segment=8), max(3, repeat // 3))
        rows.append((n_seg, r.cells, statistics.median(warm)))
        print(f"  {n_seg:,} segments at 8 cells each {r.cells:12,d} cells  warm {statistics.median(warm):8.2f} ms "
              f"[{min(warm):.2f}–{max(warm):.2f}] (n={len(warm)})")
    fit_rows = rows[2:]
    a = [[1.0, n_seg, cells] for n_seg, cells, _ in fit_rows]
    (_, per_seg, per_cell), *_ = np.linalg.lstsq(np.array(a), np.array([t for *_, t in fit_rows]), rcond=None)
    print(f"  fit over the 60/1,000-segment solves: {per_seg:.3f} ms per segment + {per_cell * 1e3:.2f} µs per cell")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=50)
    ap.add_argument("--speed-only", action="store_true", help="only the per-segment cost (case 5)")
    args = ap.parse_args()
    per_segment_cost(args.repeat)
    if args.speed_only:
        return

    alt = line()
    cps = 200  # 10 segments x 200 = 2,000 cells
    solve(alt, cells_per_segment=cps)  # warm the property tables once
    times = []
    for _ in range(args.repeat):
        t0 = time.perf_counter()
        r = solve(alt, cells_per_segment=cps)
        times.append(time.perf_counter() - t0)
    ours_ms = statistics.median(times) * 1e3
    auto = solve(alt)
    t0 = time.perf_counter()
    for _ in range(args.repeat):
        solve(alt)
    auto_ms = (time.perf_counter() - t0) / args.repeat * 1e3

    ref = solve(alt, cells_per_segment=3200).outlet_temperature_K
    t0 = time.perf_counter()
    loop_T = per_cell_loop(alt, cps)
    loop_ms = (time.perf_counter() - t0) * 1e3
    fine_loop_cells = 2000
    t0 = time.perf_counter()
    loop_T_fine = per_cell_loop(alt, fine_loop_cells)
    loop_fine_ms = (time.perf_counter() - t0) * 1e3

    doubled = solve(alt, cells_per_segment=2 * cps).outlet_temperature_K
    auto2 = solve(alt, refine=2.0).outlet_temperature_K

    print("Calorun solver benchmark (10 segments, water, tracing + wind)")
    print(f"  cells                                   {r.cells}")
    print(f"  median solve, 2,000 cells               {ours_ms:8.2f} ms   (target <= 5 ms)")
    print(f"  mean solve, automatic cells ({auto.cells:5d})     {auto_ms:8.2f} ms")
    print(f"  per-cell CoolProp loop, 2,000 cells     {loop_ms:8.1f} ms   -> ratio {loop_ms / ours_ms:6.0f}x (target >= 50x)")
    print(f"  per-cell loop, {10 * fine_loop_cells:,} cells            {loop_fine_ms:8.1f} ms   -> ratio {loop_fine_ms / ours_ms:6.0f}x")
    print(f"  outlet T, fine-grid reference (32,000)  {ref - 273.15:10.5f} °C")
    print(f"  outlet T, ours at 2,000 cells           {r.outlet_temperature_K - 273.15:10.5f} °C  (diff {r.outlet_temperature_K - ref:+.2e} K, target |diff| <= 0.05 K)")
    print(f"  outlet T, per-cell loop at 2,000 cells  {loop_T - 273.15:10.5f} °C  (diff {loop_T - ref:+.2e} K)")
    print(f"  outlet T, per-cell loop at 20,000 cells {loop_T_fine - 273.15:10.5f} °C  (diff {loop_T_fine - ref:+.2e} K)")
    print(f"  grid: 2,000 -> 4,000 cells              {doubled - r.outlet_temperature_K:+.2e} K  (target |change| < 0.01 K)")
    print(f"  grid: automatic -> refine 2             {auto2 - auto.outlet_temperature_K:+.2e} K")
    print(f"  energy-balance residual                 {r.energy_balance_residual_W:+.2e} W of duty {r.duty_W:.1f} W")

    sample = ROOT / "sample_projects" / "glycol_return.json"
    starts = []
    for _ in range(3):
        t0 = time.perf_counter()
        subprocess.run([sys.executable, "-m", "app.cli", "solve", str(sample)], cwd=ROOT, check=True,
                       stdout=subprocess.DEVNULL)
        starts.append(time.perf_counter() - t0)
    print(f"  `calorun solve` of a sample, start to exit (median of 3)  {statistics.median(starts):.2f} s  (target about 1 s)")


if __name__ == "__main__":
    main()
