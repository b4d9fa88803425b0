"""Architecture rules (DESIGN §2, issue 2 item 1): the solver package never imports Qt or the app.

Two independent checks: importing the solver with Qt made unimportable, and the import-linter
contract in pyproject.toml (static analysis of every import in the package).
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent

BLOCK_QT = (
    "import sys\n"
    "for name in ('PySide6', 'pyqtgraph', 'shiboken6', 'app'):\n"
    "    sys.modules[name] = None  # any import of these now raises ImportError\n"
)


def _run(code: str) -> subprocess.CompletedProcess:
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    return subprocess.run([sys.executable, "-c", code], cwd=ROOT, env=env, capture_output=True, text=True,
                          timeout=120)


def test_solver_imports_and_solves_without_qt():
    code = BLOCK_QT + (
        "import pkgutil, importlib\n"
        "import solver\n"
        "names = [m.name for m in pkgutil.iter_modules(solver.__path__, 'solver.')]\n"
        "for name in names:\n"
        "    importlib.import_module(name)\n"
        "import solver.march, solver.project_io, solver.properties\n"
        "from solver.model import Alternative, Segment\n"
        "r = solver.solve(Alternative(segments=[Segment()]))\n"
        "assert r.outlet_temperature_K > 0\n"
        "print('OK', len(names))\n"
    )
    proc = _run(code)
    assert proc.returncode == 0, proc.stderr
    assert proc.stdout.startswith("OK")
    assert int(proc.stdout.split()[1]) >= 8  # every solver module was imported


def test_blocking_works():
    """The blocking trick itself must bite, or the test above could not fail."""
    proc = _run(BLOCK_QT + "import PySide6\n")
    assert proc.returncode != 0 and "import of PySide6 halted" in proc.stderr


def test_solver_sources_do_not_mention_qt_imports():
    """A plain text scan as a second line of defence (also catches imports inside functions)."""
    offenders = []
    for path in sorted((ROOT / "solver").glob("*.py")):
        for lineno, line in enumerate(path.read_text(encoding="utf-8").splitlines(), 1):
            stripped = line.strip()
            if stripped.startswith(("import ", "from ")):
                target = stripped.split()[1]
                if target.split(".")[0] in ("PySide6", "pyqtgraph", "shiboken6", "app"):
                    offenders.append(f"{path.name}:{lineno}: {stripped}")
    assert not offenders, offenders


def _lint_imports() -> str | None:
    here = Path(sys.executable).parent / ("lint-imports.exe" if os.name == "nt" else "lint-imports")
    if here.exists():
        return str(here)
    return shutil.which("lint-imports")


def test_import_linter_contract():
    exe = _lint_imports()
    if exe is None:
        pytest.skip("import-linter is not installed (pip install 'calorun[test]' provides lint-imports)")
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    proc = subprocess.run([exe], cwd=ROOT, env=env, capture_output=True, text=True, timeout=120)
    assert proc.returncode == 0, proc.stdout + proc.stderr
    for contract in ("The solver never imports Qt or the app", "Headless app modules never import Qt",
                     "App layers: window -> panels"):
        assert contract in proc.stdout, proc.stdout
    assert re.search(r"3 kept, 0 broken", proc.stdout), proc.stdout
