"""Answers independent of history (issue 9, deliverable 4; DESIGN §2: caches never change an answer).

The property tables of pure fluids are filled lazily, around the states earlier solves asked for.
The search that turns (h, p) into a temperature starts from that filled region; where it met an
invalid knot (air between its bubble and dew points, where a pressure-temperature state is not
defined for the mixture) the bisection went the wrong way, so the temperature, and with it whether
a line solved, depended on what had been solved before. These tests solve the same things after
different histories and in fresh processes and require bit-identical answers.
"""

from __future__ import annotations

import json
import random
import subprocess
import sys
import warnings
from pathlib import Path

import numpy as np

from solver.errors import PropertyRangeError
from solver.model import Project, PureFluid
from solver.properties import PureFluidModel

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "scripts"))
import fuzz_solver  # noqa: E402  (scripts/fuzz_solver.py: the one solve-and-digest of the fuzz)


def _temperature(model, h, p):
    try:
        return ("T", float(model.temperature(np.array([h]), np.array([p]))[0]))
    except PropertyRangeError as exc:
        return ("refused", str(exc))


def test_air_temperature_from_enthalpy_is_the_same_after_any_earlier_states():
    """Cold air near its bubble-to-dew band (61-131 K between 5.6 kPa and 3.5 MPa on the table's
    knots, from CoolProp's air model): temperature(h, p) in a fresh property model, and in one that
    earlier states have filled elsewhere, is the same to the bit and is the temperature h was
    evaluated at (the round trip of the interpolant; CoolProp's own flash in the cells next to the band)."""
    spec = PureFluid(name="Air")
    rng = np.random.default_rng(20261202)
    checked = 0
    for _ in range(120):
        T = float(rng.uniform(62.0, 135.0))
        p = float(10 ** rng.uniform(3.8, 6.5))
        try:
            h = float(PureFluidModel(spec).enthalpy(np.array([T]), np.array([p]))[0])
        except PropertyRangeError:
            continue  # no single-phase state here
        fresh = _temperature(PureFluidModel(spec), h, p)
        primed = PureFluidModel(spec)
        for t_prior, p_prior in ((300.0, 1e5), (rng.uniform(150.0, 900.0), 10 ** rng.uniform(3.5, 7.5))):
            primed.props(np.array([t_prior]), np.array([p_prior]))
        after = _temperature(primed, h, p)
        assert fresh == after, (T, p, fresh, after)
        assert fresh[0] == "T" and abs(fresh[1] - T) < 1e-6, (T, p, fresh)
        checked += 1
    assert checked > 60


def _projects(n: int, seed: int) -> list[dict]:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return fuzz_solver.generate(seed, n)


def _cold_air_project(T: float, p: float) -> dict:
    """A short insulated air line fed near the bubble-to-dew band (invented)."""
    return Project.model_validate({"alternatives": [{
        "name": "Cold air", "fluid": {"kind": "pure", "name": "Air"},
        "feed": {"inlet_temperature_K": T, "inlet_pressure_Pa": p, "mass_flow_kg_per_s": 0.05},
        "segments": [{"name": "Run", "length_m": 5.0, "pipe": {"bore": "nps", "nps": "1", "schedule": "40"},
                      "surroundings": {"kind": "still_air", "temperature_K": 293.15},
                      "insulation": [{"thickness_m": 0.05, "conductivity_W_per_mK": 0.04}]}],
    }]}).model_dump(mode="json")


def test_random_projects_give_identical_results_in_any_order_and_in_fresh_processes():
    """A fixed random set of generated projects (tests/project_strategies.py), plus cold air lines and
    a hot one that fills the air table far from them: solved here in a shuffled order, in a fresh
    process in the reverse order, and a few each alone in a fresh process. Every output of every
    alternative (digest of all key figures, profiles, segments and checks) or its refusal message
    must be identical."""
    projects = _projects(24, seed=9_2026)
    projects += [_cold_air_project(T, p) for T, p in ((93.67, 2.707e5), (85.4, 9.77e4), (112.5, 8.75e5))]
    hot = _cold_air_project(300.0, 1e5)
    hot["alternatives"][0]["feed"]["inlet_temperature_K"] = 850.0
    projects.append(hot)

    rng = random.Random(7)
    order = list(range(len(projects)))
    rng.shuffle(order)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        here = dict(zip(order, fuzz_solver.solve_dicts([projects[i] for i in order])))
    reverse = fuzz_solver.solve_in_fresh_process(projects[::-1])[::-1]
    for i, res in enumerate(reverse):
        assert res == here[i], f"project {i} differs between orders:\n{json.dumps(projects[i])}\n{here[i]}\n{res}"
    for i in rng.sample(range(len(projects)), 1) + [len(projects) - 4]:  # incl. a cold air line, alone
        alone = fuzz_solver.solve_in_fresh_process([projects[i]])[0]
        assert alone == here[i], f"project {i} differs alone:\n{json.dumps(projects[i])}\n{here[i]}\n{alone}"
    solved = sum(status == "solved" for res in here.values() for status, _ in res)
    assert solved >= 5  # the comparison covers solved lines, not only refusals


def test_a_cold_air_line_after_hotter_and_colder_ones_is_unchanged():
    """The same cold air line after a hot and after a colder air line in one process, against a fresh
    process: identical to the bit."""
    target = _cold_air_project(95.0, 3.0e5)
    alone = fuzz_solver.solve_in_fresh_process([target])[0]
    after = fuzz_solver.solve_in_fresh_process([_cold_air_project(850.0, 1e5), target,
                                                _cold_air_project(80.0, 2e5), target])
    assert after[1] == alone and after[3] == alone
