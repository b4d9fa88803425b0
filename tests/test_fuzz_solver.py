"""Standing solver fuzz (issue 9, deliverables 2 and 7): a few hundred generated valid projects per run.

The seed is the ISO year and week (``%G%V``), so the set changes weekly and a failure stays
replayable for the week; set ``CALORUN_FUZZ_SEED`` to replay another. Every alternative must either
solve with finite outputs and a closed energy balance, or be refused with a CalorunError whose
message names the alternative (and the segment, where one is concerned) and holds no "nan", "inf"
or Python exception text. The long run, on every core, is ``scripts/fuzz_solver.py``.
"""

from __future__ import annotations

import json
import os
import sys
import time
import warnings
from pathlib import Path

from solver.model import Project

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "scripts"))
import fuzz_solver  # noqa: E402  (the checks live there, one copy for CI and the long run)

PROJECTS = int(os.environ.get("CALORUN_FUZZ_PROJECTS", "250"))
SEED = int(os.environ.get("CALORUN_FUZZ_SEED", time.strftime("%G%V")))


def test_generated_projects_solve_or_are_refused_in_plain_located_words(tmp_path):
    print(f"\nsolver fuzz: seed {SEED} (replay: CALORUN_FUZZ_SEED={SEED}), {PROJECTS} projects")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)  # numpy's overflow warnings on extreme inputs
        projects = fuzz_solver.generate(SEED, PROJECTS)
        findings = []
        counts = {"solved": 0, "refused": 0, "crash": 0}
        for i, d in enumerate(projects):
            for o in fuzz_solver.solve_project(Project.model_validate(d)):
                counts[o.status] += 1
                for kind, texts in o.problems.items():
                    findings.append((kind, i, o.alternative, texts, o.message, d))
    print(f"  {counts}; findings {len(findings)}")
    assert len(projects) == PROJECTS
    # the fuzz must reach the physics, not only the refusals (about 40 % solve, seed-dependent)
    assert counts["solved"] >= PROJECTS // 10, counts
    if findings:
        out = tmp_path / "reproducers"
        out.mkdir()
        lines = []
        for n, (kind, i, alt, texts, message, d) in enumerate(findings[:20]):
            path = out / f"{kind}_{SEED}_{i}.json"
            path.write_text(json.dumps(d, indent=1), encoding="utf-8")
            lines.append(f"[{kind}] project {i}, alternative {alt!r}: {'; '.join(map(str, texts))}\n"
                         f"    {message.splitlines()[-1] if message else ''}\n    reproducer: {path}")
        raise AssertionError(f"seed {SEED}: {len(findings)} findings\n" + "\n".join(lines))
