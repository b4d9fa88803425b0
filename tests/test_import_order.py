"""Every app module imports on its own in a fresh interpreter, whatever is imported first.

PySide6's import hook and pydantic's lazy imports once clashed: with Qt loaded before pydantic had
finished importing, ``import app.commands`` as the first import failed with a circular-import error
(pydantic 2.14, PySide6 6.x). A fresh interpreter per module, as a script or a plug-in would start.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
MODULES = ["app.commands", "app.document", "app.main_window", "app.panels.search_tools",
           "app.panels.target_finder_panel", "app.panels.sweep_panel", "app.reporting.search"]


@pytest.mark.parametrize("module", MODULES)
def test_module_imports_first_in_a_fresh_interpreter(module):
    env = {**os.environ, "QT_QPA_PLATFORM": "offscreen"}
    run = subprocess.run([sys.executable, "-c", f"import {module}"], cwd=ROOT, env=env,
                         capture_output=True, text=True, timeout=120)
    assert run.returncode == 0, run.stderr[-2000:]
