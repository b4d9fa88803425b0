"""The outer-film air table shipped with the solver (solver/data/air_1atm.csv).

It saves the CoolProp import and about 750 property calls at the first solve of a line that
carries a table fluid; it must hold exactly what CoolProp's air model gives.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from solver.films import AIR_TABLE, AirAtOneAtmosphere

ROOT = Path(__file__).resolve().parent.parent


def test_shipped_air_table_is_what_coolprop_gives():
    shipped = AirAtOneAtmosphere.from_file(AIR_TABLE)
    fresh = AirAtOneAtmosphere.from_coolprop()  # reference: CoolProp's air model (Lemmon et al. 2000)
    assert np.array_equal(shipped.t_knots, fresh.t_knots)
    for name in ("nu", "alpha", "k"):
        assert np.array_equal(getattr(shipped, name), getattr(fresh, name)), name


@pytest.mark.parametrize("t_K, nu, alpha, k", [
    # Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, Table A.4, air at 1 atm (from memory):
    # ν [m²/s], α [m²/s], k [W/(m·K)]
    (300.0, 15.89e-6, 22.5e-6, 26.3e-3),
    (400.0, 26.41e-6, 38.3e-6, 33.8e-3),
])
def test_air_table_against_handbook(t_K, nu, alpha, k):
    air = AirAtOneAtmosphere.get()
    got_nu, got_alpha, got_k = (float(np.ravel(v)[0]) for v in air.at(np.array([t_K])))
    assert got_nu == pytest.approx(nu, rel=0.02)
    assert got_alpha == pytest.approx(alpha, rel=0.03)
    assert got_k == pytest.approx(k, rel=0.02)


def test_table_fluid_line_solves_without_importing_coolprop():
    code = (
        "import sys\n"
        "from solver.project_io import load_project\n"
        "import solver\n"
        "p = load_project('app/demo_project.json')\n"
        "r = solver.solve(p.alternatives[0])\n"
        "assert r.outlet_temperature_K > 0\n"
        "print('CoolProp' in sys.modules)\n"
    )
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    proc = subprocess.run([sys.executable, "-c", code], cwd=ROOT, env=env, capture_output=True, text=True, timeout=120)
    assert proc.returncode == 0, proc.stderr
    assert proc.stdout.strip() == "False"
