import os
import sys
from pathlib import Path

# Qt with no display aborts the whole run unless a platform is chosen before import.
os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("PYQTGRAPH_QT_LIB", "PySide6")

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

# CI runs the property-based tests on a fixed set of examples, so a run is repeatable;
# locally hypothesis keeps exploring new ones.
if os.environ.get("CI"):
    from hypothesis import settings

    settings.register_profile("ci", derandomize=True, deadline=None)
    settings.load_profile("ci")

import pytest  # noqa: E402


@pytest.fixture(autouse=True)
def isolated_settings(tmp_path, monkeypatch):
    """No test reads or writes the user's settings, Recent files or autosave file."""
    monkeypatch.setenv("CALORUN_SETTINGS_DIR", str(tmp_path / "settings"))
    monkeypatch.setenv("CALORUN_RECOVERY_DIR", str(tmp_path / "recovery"))


@pytest.fixture(autouse=True)
def collect_on_main_thread():
    """As in the app (app.gui_gc): garbage collection runs on the GUI thread, never on a solve worker
    thread, where freeing a test's leftover windows would destroy Qt objects off their thread."""
    import gc

    from app.gui_gc import collect_due

    thresholds = gc.get_threshold()
    gc.disable()
    yield
    collect_due(thresholds)
