"""The Line List in batch (issue 12): the 200-line demo list on 1 and 2 local worker processes and on a
local Dask cluster (2 worker processes, 1 thread each), side by side in one run. Prints figures, asserts
nothing.

    .venv/bin/python benchmarks/bench_line_list.py [--lines N]

"Workers busy on N cores" is the workers' CPU time over the wall time: 2 when two workers ran side by side
all the time, less when other work on the machine held a core. Each configuration runs in a fresh interpreter
(a subprocess), so its main process's peak resident memory
(``resource.getrusage(RUSAGE_SELF).ru_maxrss``) is its own: the process that reads the list, writes the
files and holds the result rows; the workers' memory is not in it. Wall time is ``run_batch`` from call to
return, worker start-up included (the Dask cluster's own start is shown apart), the summary PDF left out
(its time is shown once, apart: it is the same whichever way the lines ran). Lines per second counts the
lines designed (the demo list's six rows with mistakes are not designed). Then: a rerun over the finished
folder (every line skipped, the resume path), and the main process's peak memory for a quarter of the list,
the whole of it and the list five times over (1,000 lines, tags made unique; memory flat with the number of
lines; ``--no-long`` leaves the long list out).
"""

from __future__ import annotations

import argparse
import json
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
LIST = ROOT / "sample_projects" / "line_list" / "fernbrook_line_list.csv"
TEMPLATE = ROOT / "sample_projects" / "line_list" / "line_template.json"


def child(kind: str, list_path: str, out: str, pdf: bool) -> None:
    """One configuration in this (fresh) process; prints its figures as JSON."""
    import resource

    from app.line_batch import run_batch

    cluster_s = 0.0
    if kind == "dask":
        import distributed

        t0 = time.perf_counter()
        cluster = distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None,
                                           silence_logs=50)
        cluster_s = time.perf_counter() - t0
        options = {"scheduler": cluster.scheduler_address}
    else:
        cluster = None
        options = {"workers": int(kind)}
    t0 = time.perf_counter()
    summary = run_batch(list_path, TEMPLATE, out, progress=False, pdf=pdf, **options)
    wall = time.perf_counter() - t0
    if cluster is not None:
        cluster.close()
    rss_mb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0  # kB on Linux
    workers = resource.getrusage(resource.RUSAGE_CHILDREN)  # the workers, ended and waited for by now
    print(json.dumps({"wall_s": wall, "workers_cpu_s": workers.ru_utime + workers.ru_stime, "designed": summary.designed, "reused": summary.reused, "total": summary.total,
                      "rss_mb": rss_mb, "cluster_s": cluster_s, "counts": summary.counts,
                      "pdf_s": summary.elapsed_s - wall if pdf else None}))


def run(kind: str, list_path: Path, out: Path, pdf: bool = False) -> dict:
    proc = subprocess.run([sys.executable, __file__, "--child", kind, str(list_path), str(out), str(int(pdf))],
                          cwd=ROOT, capture_output=True, text=True)
    if proc.returncode != 0:
        raise SystemExit(f"{kind}: failed\n{proc.stderr[-3000:]}")
    return json.loads(proc.stdout.strip().splitlines()[-1])


def first_lines(n: int, folder: Path) -> Path:
    lines = LIST.read_text(encoding="utf-8").splitlines(keepends=True)
    path = folder / f"first_{n}.csv"
    path.write_text("".join(lines[:n + 1]), encoding="utf-8")
    return path


def repeated(times: int, folder: Path) -> Path:
    """The demo list ``times`` over, each copy's tags suffixed so every tag is unique."""
    import csv
    import io

    with open(LIST, encoding="utf-8", newline="") as fh:
        rows = list(csv.reader(fh))
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    writer.writerow(rows[0])
    for copy in range(times):
        for row in rows[1:]:
            writer.writerow([f"{row[0]}-{copy}", *row[1:]])
    path = folder / f"times_{times}.csv"
    path.write_text(buf.getvalue(), encoding="utf-8")
    return path


def pdf_seconds(out: Path) -> float:
    """The summary PDF of a finished folder, timed in a fresh process (results read back from the line files)."""
    code = (
        "import json, sys, time\n"
        "from pathlib import Path\n"
        "from solver.line_design import LineResult\n"
        "from app.reporting.portfolio import write_portfolio\n"
        "rows = [LineResult.from_dict(json.loads(p.read_text())['result'])\n"
        "        for p in sorted(Path(sys.argv[1], 'lines').glob('*.result.json'))]\n"
        "t0 = time.perf_counter()\n"
        "write_portfolio(rows, Path(sys.argv[1]) / 'summary.pdf')\n"
        "print(time.perf_counter() - t0)\n"
    )
    proc = subprocess.run([sys.executable, "-c", code, str(out)], cwd=ROOT, capture_output=True, text=True,
                          env={**os.environ, "QT_QPA_PLATFORM": "offscreen"})
    return float(proc.stdout.strip().splitlines()[-1]) if proc.returncode == 0 else float("nan")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--lines", type=int, default=None, help="only the first N lines of the demo list")
    ap.add_argument("--no-long", action="store_true", help="leave out the 1,000-line memory run")
    args = ap.parse_args()
    with tempfile.TemporaryDirectory(prefix="bench_line_list_") as tmp:
        folder = Path(tmp)
        list_path = first_lines(args.lines, folder) if args.lines else LIST
        print(f"line list: {list_path.name} ({os.cpu_count()} cores on this machine; load average before the run "
              f"{os.getloadavg()[0]:.2f}: other work on the machine slows the workers)")
        rows = []
        configurations = (("local, 1 worker", "1"), ("local, 2 workers", "2"), ("Dask LocalCluster, 2 workers", "dask"))
        for label, kind in configurations:
            r = run(kind, list_path, folder / f"out_{kind}")
            rows.append((label, r))
            extra = f"   (+ {r['cluster_s']:.1f} s to start the cluster)" if r["cluster_s"] else ""
            print(f"  {label:30s} {r['wall_s']:6.1f} s  {r['designed'] / r['wall_s']:5.2f} lines/s  "
                  f"workers busy on {r['workers_cpu_s'] / r['wall_s']:.2f} cores on average  "
                  f"main process peak RSS {r['rss_mb']:5.0f} MB{extra}", flush=True)
        base = rows[0][1]["wall_s"]
        for label, r in rows[1:]:
            print(f"  speed-up against 1 worker, {label}: × {base / r['wall_s']:.2f}")
        print(f"  verdicts: {rows[0][1]['counts']}")
        same = all((folder / f"out_{k}" / "results.csv").read_bytes() == (folder / "out_1" / "results.csv").read_bytes()
                   for k in ("2", "dask"))
        print(f"  results.csv byte-identical across the three: {same}")
        r = run("2", list_path, folder / "out_2")
        print(f"  rerun over the finished folder (2 workers): {r['wall_s']:.2f} s, {r['reused']} lines kept, "
              f"{r['designed']} designed")
        print(f"  summary PDF of {base and rows[0][1]['total']} lines: {pdf_seconds(folder / 'out_1'):.1f} s")
        quarter = max(1, (rows[0][1]["total"]) // 4)
        small = run("2", first_lines(quarter, folder), folder / "out_quarter")
        text = (f"  main process peak RSS, 2 workers: {small['rss_mb']:.0f} MB for {quarter} lines, "
                f"{rows[1][1]['rss_mb']:.0f} MB for {rows[1][1]['total']} lines")
        if not args.no_long:
            long = run("2", repeated(5, folder), folder / "out_long")
            text += (f", {long['rss_mb']:.0f} MB for {long['total']} lines "
                     f"({long['wall_s']:.0f} s, {long['designed'] / long['wall_s']:.1f} lines/s)")
        print(text)
        print(f"load average after the run: {os.getloadavg()[0]:.2f}")


if __name__ == "__main__":
    if len(sys.argv) > 1 and sys.argv[1] == "--child":
        child(sys.argv[2], sys.argv[3], sys.argv[4], sys.argv[5] == "1")
    else:
        main()
