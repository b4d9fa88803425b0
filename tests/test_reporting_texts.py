"""Words about a design (app.texts) stay headless, and the colours (app.style) stand on their own.

``app.texts`` is read by the report and may be read by the CLI, so it must import without Qt;
``app.style`` must not lean on the report it serves (issue 7: one house for the app).
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent

BLOCK = (
    "import sys\n"
    "for name in ('PySide6', 'pyqtgraph', 'shiboken6', 'app.report', 'app.reporting'):\n"
    "    sys.modules[name] = None  # any import of these now raises ImportError\n"
)


def _run(code: str) -> subprocess.CompletedProcess:
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    return subprocess.run([sys.executable, "-c", BLOCK + code], cwd=ROOT, env=env, capture_output=True,
                          text=True, timeout=120)


def test_texts_and_style_import_without_qt_or_the_report():
    proc = _run(
        "import app.texts, app.style\n"
        "from solver.model import SolutionFluid, Segment\n"
        "print(app.texts.fluid_text(SolutionFluid(solute='MPG', concentration=0.4)))\n"
        "print(app.texts.pipe_text(Segment(), 'US'))\n"
        "print(app.style.VERDICT_COLOURS['met'])\n"
    )
    assert proc.returncode == 0, proc.stderr
    fluid, pipe, colour = proc.stdout.splitlines()
    # CoolProp INCOMP "MPG" is propylene glycol, mass based (CoolProp incompressible-fluids table)
    assert fluid == "Propylene glycol 40 % (mass)"
    assert pipe.startswith("NPS ")
    assert colour.startswith("#")


def test_blocking_bites():
    """The blocking above must stop an import, or the test could not fail."""
    proc = _run("import app.report\n")
    assert proc.returncode != 0 and "halted" in proc.stderr
