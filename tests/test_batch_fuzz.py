"""Generated projects: variants solved together equal the same variants solved one by one.

The projects come from the standing solver fuzz's generator (tests/project_strategies.py through
scripts/fuzz_solver.py), seeded by ISO week like it (``CALORUN_FUZZ_SEED`` replays another). Each
alternative gets a few variants (feed temperature and flow nudged); solve_batch must give every
variant the outcome its own solve gives: the same error text where it fails, the key figures to
1e-9 relative where it solves. The count of variants actually marched together is asserted, so the
comparison cannot pass by every group falling back to one-by-one solves.
"""

from __future__ import annotations

import math
import os
import sys
import time
import warnings
from pathlib import Path

from solver.batch import solve_batch
from solver.errors import CalorunError
from solver.march import solve
from solver.model import Project

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "scripts"))
import fuzz_solver  # noqa: E402

PROJECTS = int(os.environ.get("CALORUN_BATCH_FUZZ_PROJECTS", "80"))
SEED = int(os.environ.get("CALORUN_FUZZ_SEED", time.strftime("%G%V")))


def _variants(alt):
    feed = alt.feed
    out = [alt]
    for dt, k in ((-0.5, 1.0), (0.0, 1.03), (0.7, 0.97)):
        upd = {"inlet_temperature_K": feed.inlet_temperature_K + dt}
        if feed.mass_flow_kg_per_s is not None:
            upd["mass_flow_kg_per_s"] = feed.mass_flow_kg_per_s * k
        try:
            new_feed = type(feed).model_validate({**feed.model_dump(), **upd})
        except ValueError:
            continue
        out.append(alt.model_copy(update={"feed": new_feed}))
    return out


def _same(a: float, b: float) -> bool:
    if math.isnan(a) or math.isnan(b):
        return math.isnan(a) and math.isnan(b)
    return a == b or abs(a - b) <= 1e-9 * max(abs(a), abs(b)) or abs(a - b) < 1e-9


def test_batch_equals_one_by_one_on_generated_projects():
    print(f"\nbatch fuzz: seed {SEED} (replay: CALORUN_FUZZ_SEED={SEED}), {PROJECTS} projects")
    together = compared = 0
    problems = []
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)
        for i, d in enumerate(fuzz_solver.generate(SEED, PROJECTS)):
            project = Project.model_validate(d)
            for alt in project.alternatives:
                alts = _variants(alt)
                outcomes = solve_batch(alts)
                assert len(outcomes) == len(alts)
                for v, (variant, o) in enumerate(zip(alts, outcomes)):
                    together += o.together
                    try:
                        ref = solve(variant).key_figures()
                    except CalorunError as exc:
                        if o.ok or str(o.error) != str(exc):
                            problems.append((i, alt.name, v, "error differs", str(exc), str(o.error)))
                        continue
                    if not o.ok:
                        problems.append((i, alt.name, v, "batch failed", "", str(o.error)))
                        continue
                    compared += 1
                    for key, value in ref.items():
                        if not _same(float(value), float(o.key_figures[key])):
                            problems.append((i, alt.name, v, key, value, o.key_figures[key]))
    print(f"  compared {compared} solved variants, {together} of them marched together; {len(problems)} problems")
    assert not problems, problems[:10]
    assert together >= 20, together  # the batch path itself was exercised
