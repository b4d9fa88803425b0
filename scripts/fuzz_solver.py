"""Long solver fuzz, run by hand: generated valid projects through the solver on every core.

    .venv/bin/python scripts/fuzz_solver.py --projects 100000 [--seed 7] [--workers N] [--repro-dir DIR]

Each worker draws projects from ``tests/project_strategies.py`` (hypothesis, generate phase only,
seeded ``seed + worker``) and solves every alternative. Figures printed at the end:

* projects run, alternatives solved / refused (a CalorunError: allowed, if its message is good);
* crashes: any exception that is not a CalorunError (a bug);
* NaN/inf in any output of a solved alternative (NaN is allowed only where a figure does not apply:
  the saturation temperature of a fluid that has none, the outer surface of a line with none in air);
* unlocated or jargon messages (see :func:`message_problems`);
* energy-balance violations (see :func:`energy_problems`);
* order dependence: each worker's projects are solved again, shuffled, in a fresh process, and a
  sample of them one per fresh process; any bit of any output that differs is counted.

Every finding is written as a reproducer (the project JSON plus a note) under ``--repro-dir``.
The same checks run in CI on a few hundred projects (tests/test_fuzz_solver.py).
"""

from __future__ import annotations

import argparse
import hashlib
import json
import math
import multiprocessing as mp
import os
import random
import re
import sys
import time
import warnings
from dataclasses import dataclass, field
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
for _p in (str(ROOT), str(ROOT / "tests")):
    if _p not in sys.path:
        sys.path.insert(0, _p)

import numpy as np  # noqa: E402

from solver.errors import CalorunError  # noqa: E402
from solver.march import solve  # noqa: E402
from solver.model import Project  # noqa: E402

# --------------------------------------------------------------------------- judging one outcome

#: Text that must never reach a user in a refusal: not-a-number and infinity, Python's own exception
#: wording, internal variable names, raw property-library text.
JARGON = [
    (re.compile(r"\bnan\b", re.I), "nan"),
    (re.compile(r"\binf\b|infinity", re.I), "inf"),
    (re.compile(r"cannot convert|must be [<>]=? |got nan|Traceback|object has no attribute|"
                r"unsupported operand|division by zero|out of range float|math domain error|overflow"),
     "Python exception text"),
    (re.compile(r"\b[A-Z][A-Za-z]*(Error|Exception)\b"), "exception class name"),
    (re.compile(r"numerical failure"), "numerical failure"),
    (re.compile(r"(^|[:,] )(Re|Pr|Nu|T_[a-z_]+|t_[a-z_]+|[a-z]+_[a-z_]+_(K|Pa|W|m))\s*:"), "internal variable name"),
    (re.compile(r"PT_INPUTS|HmassP|_flash|rhomolar|HEOS|INCOMP::|AbstractState"), "property-library internals"),
    (re.compile(r"(?<![.\d])\d{16,}"), "unreadable number"),  # e.g. a position printed with 300 digits
]


def message_problems(message: str, alternative_name: str, names: tuple[str, ...] = ()) -> list[str]:
    """What is wrong with a refusal's message, for a user: empty when it is located and plain.

    Located: it names the alternative; where it concerns a segment (a field path ``segments[i]`` or
    a position along the line) it names the segment. Plain: no JARGON.
    """
    problems = []
    if repr(alternative_name) not in message and alternative_name not in message:
        problems.append("does not name the alternative")
    mentions_segment_field = "segments[" in message
    mentions_position = re.search(r"\bx = |\bat [\d.]+ m\b", message) is not None
    names_segment = re.search(r"segment (\d+ )?['\"]", message) is not None  # a name in repr quotes
    if (mentions_segment_field or mentions_position) and not names_segment:
        problems.append("concerns a segment but does not name it")
    if "property out of range" in message and not names_segment and "inlet" not in message:
        problems.append("a state along the line without its segment")
    # the user's own names (quoted) may hold anything, e.g. a segment called 'Infinity': judge the rest
    words = re.sub(r"'(?:[^'\\]|\\.)*'|\"(?:[^\"\\]|\\.)*\"", "'…'", message)
    for name in sorted(names, key=len, reverse=True):  # names shown unquoted (a table fluid's)
        if name:
            words = words.replace(name, "…")
    for pattern, what in JARGON:
        if pattern.search(words):
            problems.append(what)
    return problems


# NaN is allowed only where a figure does not apply to the line (results.py says which).
_MAY_BE_NAN_FIGURES = {"min_outer_surface_temperature_K", "min_outer_surface_position_m",
                       "max_outer_surface_temperature_K", "max_outer_surface_position_m"}
_MAY_BE_NAN_COLUMNS = {"saturation_temperature_K"}


def nan_problems(result) -> list[str]:
    bad = []
    for key, value in result.key_figures().items():
        if isinstance(value, float) and not math.isfinite(value):
            if key in _MAY_BE_NAN_FIGURES and math.isnan(value):
                continue
            bad.append(f"key figure {key} = {value}")
    for key, values in result.profile.columns().items():
        a = np.asarray(values, dtype=float)
        finite = np.isfinite(a)
        if key in _MAY_BE_NAN_COLUMNS:
            finite |= np.isnan(a)
        if not finite.all():
            bad.append(f"profile {key} has {int((~finite).sum())} non-finite values")
    for s in result.segments:
        for name in ("duty_W", "heat_input_W", "heat_loss_W", "pressure_drop_Pa"):
            if not math.isfinite(getattr(s, name)):
                bad.append(f"segment {s.name!r} {name} = {getattr(s, name)}")
    for c in result.checks:
        if re.search(r"\bnan\b|\binf\b", c.message, re.I):
            bad.append(f"check {c.code} message: {c.message[:120]}")
    return bad


#: Energy balance: the Result's own residual (duty against m·Δ(h + v²/2 + g·z)) must be round-off.
#: Relative to the largest heat flow of the line; 1e-6 leaves room for CoolProp's flash tolerance in
#: the cells next to the saturation line (properties.py), 1e-3 W for lines with no heat flow at all.
ENERGY_REL_TOL = 1e-6
ENERGY_ABS_TOL_W = 1e-3
ENTHALPY_MATCH = 1e-11  # relative: how closely the march matches h(T_out, p_out) to the balance


def energy_problems(result, alt=None) -> list[str]:
    scale = max(abs(result.duty_W), abs(result.heat_input_W), abs(result.heat_loss_W),
                abs(result.heat_input_tracing_W), abs(result.heat_input_media_W))
    residual = result.energy_balance_residual_W
    if not math.isfinite(residual):
        return [f"energy-balance residual is {residual}"]
    roundoff = 0.0
    if alt is not None:
        # the outlet temperature matches the enthalpy balance to ENTHALPY_MATCH of h (solver.march
        # _exact_where_newton_misses): with 13 t/s of a liquid at 3e5 J/kg that is some mW of 4 GW of
        # enthalpy flow, round-off however small the heat flows are (found by the fuzz, seed 20261203)
        from solver.properties import fluid_model
        h_in = float(fluid_model(alt.fluid).enthalpy([alt.feed.inlet_temperature_K], [alt.feed.inlet_pressure_Pa])[0])
        roundoff = ENTHALPY_MATCH * result.mass_flow_kg_per_s * max(abs(h_in), 1e4)
    if abs(residual) > ENERGY_REL_TOL * scale + ENERGY_ABS_TOL_W + roundoff:
        return [f"energy-balance residual {residual:.6g} W against heat flows of {scale:.6g} W"]
    return []


def result_signature(result, design_dict: dict | None = None) -> str:
    """A digest of every number and word a solve returns: equal digests = bit-identical results."""
    h = hashlib.sha256()
    h.update(json.dumps(design_dict, sort_keys=True, default=repr).encode())
    for key, value in sorted(result.key_figures().items()):
        h.update(key.encode())
        h.update(np.float64(value).tobytes())
    for key, values in sorted(result.profile.columns().items()):
        h.update(key.encode())
        h.update(np.ascontiguousarray(values, dtype=np.float64).tobytes())
    for s in result.segments:
        h.update(repr((s.name, s.node_start, s.node_end)).encode())
        h.update(np.array([s.x_start_m, s.x_end_m, s.inner_diameter_m, s.outer_diameter_m, s.fittings_K,
                           s.duty_W, s.heat_input_W, s.heat_loss_W, s.pressure_drop_Pa], dtype=np.float64).tobytes())
    for c in result.checks:
        h.update(json.dumps(c.to_dict(), sort_keys=True, default=repr).encode())
    h.update(repr(result.cells).encode())
    return h.hexdigest()


@dataclass
class Outcome:
    """One alternative of one project, solved once."""

    alternative: str
    status: str  # "solved" | "refused" | "crash"
    signature: str  # result digest, or the refusal's type and message
    message: str = ""
    problems: dict = field(default_factory=dict)  # kind -> list of texts


def solve_alternative(alt, design=None) -> Outcome:
    """Solve one alternative (with the project's design cases: worst and hot case, tracing need, hold time)."""
    try:
        result = solve(alt, design=design)
        design_dict = result.design.to_dict() if result.design is not None else None  # the hold time too
    except CalorunError as exc:
        msg = str(exc)
        out = Outcome(alt.name, "refused", f"{type(exc).__name__}: {msg}", msg)
        bad = message_problems(msg, alt.name, (getattr(alt.fluid, "name", ""),))
        if bad:
            out.problems["message"] = bad
        return out
    except Exception as exc:  # noqa: BLE001 - the fuzz counts every escape as a crash, by design
        import traceback

        return Outcome(alt.name, "crash", f"{type(exc).__name__}: {exc}", traceback.format_exc(),
                       {"crash": [f"{type(exc).__name__}: {exc}"]})
    out = Outcome(alt.name, "solved", result_signature(result, design_dict))
    nan = nan_problems(result)
    if nan:
        out.problems["nan"] = nan
    energy = energy_problems(result, alt)
    if energy:
        out.problems["energy"] = energy
    words = design_word_problems(design_dict)
    if words:
        out.problems["message"] = words
    return out


def design_word_problems(design_dict: dict | None) -> list[str]:
    """Jargon in the sentences the design cases hand to a user (notes, the worst case's refusal, hold-time warnings)."""
    if not design_dict:
        return []
    texts = [design_dict.get("worst_case_error") or "", *design_dict.get("notes", [])]
    texts += (design_dict.get("hold_time") or {}).get("warnings", [])
    bad = []
    for text in texts:
        for pattern, why in JARGON:
            if isinstance(text, str) and pattern.search(text):
                bad.append(f"{why} in: {text[:160]}")
    return bad


def solve_project(project: Project) -> list[Outcome]:
    return [solve_alternative(alt, project.design_cases) for alt in project.alternatives]


def solve_dicts(dicts: list[dict]) -> list[list[tuple[str, str]]]:
    """(status, signature) per alternative of each project dict, solved in the given order in this process."""
    out = []
    for d in dicts:
        out.append([(o.status, o.signature) for o in solve_project(Project.model_validate(d))])
    return out


# --------------------------------------------------------------------------- generating


def generate(seed: int, n: int, wild: int | None = None) -> list[dict]:
    """``n`` valid project dicts drawn from tests/project_strategies.py with a fixed seed
    (``wild``: per cent of numbers drawn as extremes; None = a mix, see the strategies)."""
    from hypothesis import HealthCheck, Phase, given, settings
    from hypothesis import seed as hseed

    from project_strategies import project_dicts

    drawn: list[dict] = []

    @hseed(seed)
    @settings(max_examples=n, phases=[Phase.generate], database=None, deadline=None,
              suppress_health_check=list(HealthCheck), derandomize=False)
    @given(project_dicts(wild))
    def collect(d):
        drawn.append(d)

    while len(drawn) < n:  # hypothesis may stop a little early; draw on with the next seed
        before = len(drawn)
        collect()
        seed += 1_000_003
        if len(drawn) == before:
            break
        collect = hseed(seed)(collect)
    return drawn[:n]


# --------------------------------------------------------------------------- the long run


def solve_in_fresh_process(dicts: list[dict]) -> list[list[tuple[str, str]]]:
    """Solve in a new interpreter (no property table, cache or CoolProp state shared with this one)."""
    import subprocess

    run = subprocess.run([sys.executable, __file__, "--solve-stdin"], input=json.dumps(dicts),
                         capture_output=True, text=True, check=True)
    return [[tuple(o) for o in outcomes] for outcomes in json.loads(run.stdout)]


def _worker(args) -> dict:
    seed, n, repro_dir, fresh_sample, wild = args
    warnings.simplefilter("ignore", RuntimeWarning)
    t0 = time.perf_counter()
    dicts = generate(seed, n, wild)
    t_gen = time.perf_counter() - t0
    counts = {"projects": 0, "alternatives": 0, "solved": 0, "refused": 0, "crash": 0, "nan": 0,
              "message": 0, "energy": 0, "order": 0}
    findings = []
    first: list[list[tuple[str, str]]] = []
    for i, d in enumerate(dicts):
        outcomes = solve_project(Project.model_validate(d))
        first.append([(o.status, o.signature) for o in outcomes])
        counts["projects"] += 1
        for o in outcomes:
            counts["alternatives"] += 1
            counts[o.status] += 1 if o.status != "crash" else 0
            for kind, texts in o.problems.items():
                counts[kind] += 1
                findings.append({"kind": kind, "seed": seed, "index": i, "alternative": o.alternative,
                                 "texts": texts, "message": o.message, "project": d})
    t_solve = time.perf_counter() - t0 - t_gen
    # order dependence: the same projects, shuffled, in a fresh process; a sample one per process
    rng = random.Random(seed)
    order = list(range(len(dicts)))
    rng.shuffle(order)
    again = solve_in_fresh_process([dicts[j] for j in order])
    for j, res in zip(order, again):
        if res != first[j]:
            counts["order"] += 1
            findings.append({"kind": "order", "seed": seed, "index": j, "first": first[j], "again": res,
                             "project": dicts[j]})
    for j in rng.sample(range(len(dicts)), min(fresh_sample, len(dicts))):
        alone = solve_in_fresh_process([dicts[j]])[0]
        if alone != first[j]:
            counts["order"] += 1
            findings.append({"kind": "order (alone)", "seed": seed, "index": j, "first": first[j],
                             "again": alone, "project": dicts[j]})
    if repro_dir:
        _write_reproducers(findings, Path(repro_dir))
    return {"counts": counts, "findings": [{k: v for k, v in f.items() if k != "project"} for f in findings],
            "t_gen": t_gen, "t_solve": t_solve}


def _write_reproducers(findings: list[dict], directory: Path) -> None:
    directory.mkdir(parents=True, exist_ok=True)
    for f in findings:
        stem = f"{f['kind'].split()[0]}_seed{f['seed']}_{f['index']}"
        (directory / f"{stem}.json").write_text(json.dumps(f["project"], indent=1), encoding="utf-8")
        note = {k: v for k, v in f.items() if k != "project"}
        (directory / f"{stem}.txt").write_text(json.dumps(note, indent=1, default=str), encoding="utf-8")


def template(message: str) -> str:
    """A message with its numbers and quoted names blanked, to count distinct kinds of message."""
    t = re.sub(r"'[^']*'", "'…'", message)
    return re.sub(r"-?\d[\d.eE+\-]*", "#", t)[:160]


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--projects", type=int, default=2000)
    ap.add_argument("--seed", type=int, default=int(time.strftime("%G%V")))
    ap.add_argument("--workers", type=int, default=os.cpu_count() or 1)
    ap.add_argument("--batch", type=int, default=250, help="projects per task (one fresh re-solve each)")
    ap.add_argument("--fresh-sample", type=int, default=2, help="projects per task also solved alone")
    ap.add_argument("--repro-dir", default="/tmp/calorun_fuzz_repro")
    ap.add_argument("--wild", type=int, default=None, help="per cent of numbers drawn as extremes (default: a mix)")
    ap.add_argument("--solve-stdin", action="store_true", help=argparse.SUPPRESS)  # the fresh process
    args = ap.parse_args(argv)
    if args.solve_stdin:
        warnings.simplefilter("ignore", RuntimeWarning)
        json.dump(solve_dicts(json.load(sys.stdin)), sys.stdout)
        return 0
    n_tasks = max(1, -(-args.projects // args.batch))
    tasks = [(args.seed * 1000 + k, min(args.batch, args.projects - k * args.batch), args.repro_dir,
              args.fresh_sample, args.wild) for k in range(n_tasks)]
    print(f"solver fuzz: {args.projects} projects, seed {args.seed}, {args.workers} workers, "
          f"reproducers in {args.repro_dir}", flush=True)
    t0 = time.perf_counter()
    total: dict = {}
    findings: list = []
    with mp.get_context("spawn").Pool(args.workers) as pool:
        for k, res in enumerate(pool.imap_unordered(_worker, tasks)):
            for key, v in res["counts"].items():
                total[key] = total.get(key, 0) + v
            findings += res["findings"]
            el = time.perf_counter() - t0
            print(f"  [{res['t_gen']:.0f} s drawing, {res['t_solve']:.0f} s solving] "
                  f"{total['projects']} projects in {el:.0f} s ({total['projects'] / el:.1f}/s); "
                  f"crashes {total['crash']}, bad messages {total['message']}, nan {total['nan']}, "
                  f"energy {total['energy']}, order {total['order']}", flush=True)
    el = time.perf_counter() - t0
    print(f"\nprojects run            {total['projects']}  ({total['projects'] / el:.1f} projects/s, {el:.0f} s)")
    print(f"alternatives            {total['alternatives']}  (solved {total['solved']}, refused {total['refused']})")
    print(f"crashes                 {total['crash']}")
    print(f"NaN/inf in outputs      {total['nan']}")
    print(f"unlocated/jargon msgs   {total['message']}")
    print(f"order dependence        {total['order']}")
    print(f"energy-balance breaks   {total['energy']}")
    by_template: dict = {}
    for f in findings:
        if f["kind"] in ("message", "crash"):
            key = (f["kind"], template(f.get("message") or "") if f["kind"] == "message" else f["texts"][0][:160])
            by_template.setdefault(key, []).append(f)
    for (kind, t), fs in sorted(by_template.items(), key=lambda kv: -len(kv[1])):
        f = fs[0]
        print(f"\n[{kind}] x{len(fs)}  {', '.join(f['texts'])}\n   {t}\n   e.g. "
              f"{args.repro_dir}/{f['kind']}_seed{f['seed']}_{f['index']}.json")
    for f in findings:
        if f["kind"] in ("nan", "energy") or f["kind"].startswith("order"):
            print(f"\n[{f['kind']}] {args.repro_dir}/{f['kind'].split()[0]}_seed{f['seed']}_{f['index']}.json: "
                  f"{f.get('texts') or ''}")
    bad = total["crash"] + total["nan"] + total["message"] + total["order"] + total["energy"]
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main())
