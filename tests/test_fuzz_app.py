"""The desktop app never crashes on a file that validates (issue 9, deliverable 2).

Generated valid projects (the shared strategies of ``tests/project_strategies.py``, the model's
extremes included) are opened offscreen in the main window, solved by the Document's runner, drawn
(Line Strip, Segment Card, Profiles, Checks, Key Figures, Side-by-Side; SI and US units), saved,
reloaded and, every few, written as the PDF report. A crash, an unhandled exception, a Qt warning,
a numpy/pyqtgraph warning raised in the app's own drawing, a project that does not reload as saved,
or a message to the user that names no place or carries internal wording fails the test.

The window lives in a worker process (``scripts/fuzz_app.py``, the same one the long run by hand
uses): a segmentation fault then fails the example instead of ending pytest, and the worker is
started again. The generator's seed changes with the date and is printed in every failure;
``CALORUN_FUZZ_APP_SEED`` and ``CALORUN_FUZZ_APP_EXAMPLES`` override seed and count.

The extremes beyond the model's bounds (1e308 m of insulation, the crash reported in the issue)
are set on a loaded project without validation: the drawing code must survive them whatever the
bounds are. Expected texts below follow from exact unit definitions: 1 in = 0.0254 m and
1 ft = 0.3048 m (international yard and pound agreement, 1959; NIST SP 811).
"""

from __future__ import annotations

import datetime as _dt
import importlib.util
import itertools
import math
import os
import sys
from pathlib import Path

import pytest
from hypothesis import HealthCheck, Phase, given, note, seed, settings

pytest.importorskip("pytestqt")

from app import units  # noqa: E402
from app.panels.line_strip import MIN_BLOCK_WIDTH, block_widths  # noqa: E402
from app.panels.pipe_symbols import insulation_band_px  # noqa: E402
from app.widgets.quantity_edit import format_for_edit  # noqa: E402
from project_strategies import project_dicts  # noqa: E402 - the one generator of valid projects (tests/)
from solver.model import Alternative, Fitting, Layer, Project, Segment, SteamTracer, Wind  # noqa: E402
from solver.project_io import dump_project  # noqa: E402

ROOT = Path(__file__).resolve().parent.parent


def _load_fuzz_app():
    spec = importlib.util.spec_from_file_location("fuzz_app", ROOT / "scripts" / "fuzz_app.py")
    module = importlib.util.module_from_spec(spec)
    sys.modules["fuzz_app"] = module  # (its dataclasses look themselves up there)
    spec.loader.exec_module(module)
    return module


fuzz_app = _load_fuzz_app()

SEED = int(os.environ.get("CALORUN_FUZZ_APP_SEED") or _dt.date.today().strftime("%Y%m%d"))
EXAMPLES = int(os.environ.get("CALORUN_FUZZ_APP_EXAMPLES", "16"))
REPORT_EVERY = 5  # a report takes longer than the rest of an example
BANDS_EVERY = 4


# --------------------------------------------------------------------------- the worker process


class AppWorker:
    """One worker process for the module, started again after a crash."""

    def __init__(self, folder: Path):
        self.folder = folder
        self.worker = None

    def run(self, path: Path, **options) -> dict:
        if self.worker is None:
            self.worker = fuzz_app.Worker(self.folder / "logs")
        try:
            return self.worker.run(path, self.folder, **options)
        except fuzz_app.WorkerDied as exc:
            self.worker = None
            pytest.fail(f"the app {exc.how} on {path}\n{exc.stderr_tail[-3000:]}", pytrace=False)

    def close(self) -> None:
        if self.worker is not None:
            self.worker.close()


@pytest.fixture(scope="module")
def app_worker(tmp_path_factory):
    holder = AppWorker(tmp_path_factory.mktemp("app-fuzz"))
    yield holder
    holder.close()


def _faults(out: dict) -> list[str]:
    """What the app did wrong: crashes are raised by the worker; the rest is listed here."""
    bad = list(out["problems"])
    bad += [f"jargon ({', '.join(why)}): {m}" for m in out.get("messages", []) if (why := fuzz_app.jargon(m))]
    bad += [f"names no place on the line: {m}" for m in out.get("failures", []) if not fuzz_app.located(m)]
    return bad


# --------------------------------------------------------------------------- generated valid projects

_counter = itertools.count()


@seed(SEED)
# no shrinking: each step re-runs the window (seconds, more after a crash); the failure names the
# seed and keeps the project file, which is the reproducer
@settings(max_examples=EXAMPLES, deadline=None, database=None, suppress_health_check=list(HealthCheck),
          phases=[Phase.explicit, Phase.generate])
@given(data=project_dicts(max_alternatives=2, max_segments=6))
def test_generated_valid_projects_open_draw_solve_save_and_report(app_worker, tmp_path_factory, data):
    k = next(_counter)
    path = tmp_path_factory.getbasetemp() / f"app-fuzz-{SEED}-{k}.json"
    path.write_text(dump_project(Project.model_validate(data)), encoding="utf-8")
    note(f"seed {SEED} (CALORUN_FUZZ_APP_SEED={SEED} repeats it); project file {path}")
    out = app_worker.run(path, report=k % REPORT_EVERY == 0, bands=k % BANDS_EVERY == 0, thorough=False)
    faults = _faults(out)
    assert not faults, f"seed {SEED}, {path}:\n" + "\n".join(f[:2000] for f in faults)


# --------------------------------------------------------------------------- extremes by hand


def _extreme_valid_project() -> Project:
    """At the model's bounds (solver.model): the shortest and longest segment side by side, the
    thickest insulation in the most layers, the steepest rise, the most fittings, the longest name
    in wide and right-to-left letters, the strongest tracing, wind at its highest."""
    wide = "Ｗ" * 100 + "שלום" * 25  # 200 characters, the longest name allowed
    return Project(name=wide, alternatives=[
        Alternative(name="At the bounds", segments=[
            Segment(name=wide, length_m=1e5, elevation_change_m=-1e5, heat_input_W_per_m=1e4,
                    insulation=[Layer(thickness_m=1.0, conductivity_W_per_mK=1e-3)] * 10,
                    fittings=[Fitting(count=10_000)] * 100, surroundings=Wind(wind_speed_m_per_s=100.0)),
            Segment(name="x", length_m=1e-3, insulation=[Layer(thickness_m=1e-4, conductivity_W_per_mK=500.0)],
                    steam_tracer=SteamTracer(count=12)),
        ]),
        Alternative(name="Plain", segments=[Segment(name="Run", length_m=30.0)]),
    ])


def test_window_survives_a_project_at_the_model_bounds(app_worker, tmp_path):
    path = tmp_path / "bounds.json"
    path.write_text(dump_project(_extreme_valid_project()), encoding="utf-8")
    out = app_worker.run(path, report=True, bands=False, thorough=False)
    assert not out["problems"], "\n".join(p[:2000] for p in out["problems"])


BEYOND_THE_BOUNDS = [
    # the crash: a file with 1e308 m of insulation used to validate
    ("alternatives[0].segments[0].insulation[0].thickness_m", 1e308),
    ("alternatives[0].segments[0].length_m", 1e308),
    ("alternatives[0].segments[0].length_m", 5e-324),
    ("alternatives[0].segments[0].elevation_change_m", -1e308),
    ("alternatives[0].segments[1].surroundings.wind_speed_m_per_s", 1e308),
]


@pytest.fixture(scope="module")
def base_file(tmp_path_factory) -> Path:
    # invented example: a traced, insulated run and a wind-swept steam-traced run
    project = Project(name="Beyond the bounds", alternatives=[Alternative(name="Base", segments=[
        Segment(name="Run 1", length_m=30.0, heat_input_W_per_m=20.0, fittings=[Fitting()],
                insulation=[Layer(thickness_m=0.04, conductivity_W_per_mK=0.04)]),
        Segment(name="Run 2", length_m=20.0, elevation_change_m=3.0, surroundings=Wind(), steam_tracer=SteamTracer()),
    ])])
    path = tmp_path_factory.mktemp("beyond") / "base.json"
    path.write_text(dump_project(project), encoding="utf-8")
    return path


@pytest.mark.parametrize("where, value", BEYOND_THE_BOUNDS,
                         ids=[f"{w.split('.')[-1]}={v:g}" for w, v in BEYOND_THE_BOUNDS])
def test_window_survives_values_beyond_the_bounds(app_worker, base_file, tmp_path, where, value):
    """Whatever the solver makes of it, the window opens, draws both unit systems, reports, and
    nothing raises or warns in the app's own code."""
    shot = tmp_path / "window.png"
    first = where == BEYOND_THE_BOUNDS[0][0]  # the case in full; the others draw and move on
    out = app_worker.run(base_file, report=first, patches=[[where, value]], bands=False, thorough=first,
                         screenshot=str(shot))
    assert not out["problems"], "\n".join(p[:2000] for p in out["problems"])
    assert shot.stat().st_size > 10_000  # a picture of the window, not an empty image


# --------------------------------------------------------------------------- the drawing rules themselves


def test_block_widths_keep_proportion_and_minimum_whatever_the_lengths():
    # what a user sees: the blocks fill the strip, none narrower than a clickable block, the two
    # equal longest runs equally wide, even where the sum of the lengths overflows (1e308 + 1e308)
    for lengths in ([1e308, 1e308, 1e-3], [math.inf, 5.0], [math.nan, 5.0, 5.0], [5e-324, 5e-324]):
        widths = block_widths(lengths, 1000.0)
        assert all(math.isfinite(w) and w >= MIN_BLOCK_WIDTH for w in widths), (lengths, widths)
        assert sum(widths) == pytest.approx(1000.0), (lengths, widths)
    widths = block_widths([1e308, 1e308, 1e-3], 1000.0)
    assert widths[0] == widths[1] > widths[2] == MIN_BLOCK_WIDTH


def test_insulation_band_stays_on_the_canvas():
    # drawn 4..18 px (pipe_symbols: saturates at 150 mm), never more, whatever the thickness
    for thickness in (1e-4, 0.15, 1.0, 10.0, 1e308, math.inf):
        assert 4.0 <= insulation_band_px(thickness) <= 18.0
    for nothing in (0.0, -1.0, math.nan):
        assert insulation_band_px(nothing) == 0.0


def test_huge_and_tiny_values_read_as_powers_of_ten():
    # 1e308 m is 1e311 mm (1 m = 1000 mm) and 3.937e309 in (1 in = 0.0254 m): beyond a float in the
    # display unit, still a number to read; never "—", "inf", "0" for a value that is not nought,
    # nor a string of 300 digits
    assert units.format_value(1e308, "thickness", "SI") == "1 × 10³¹¹ mm"
    assert units.format_value(1e308, "thickness", "US") == "3.937 × 10³⁰⁹ in"
    assert units.format_value(-1.7e308, "length", "SI") == "−1.7 × 10³⁰⁸ m"
    assert units.format_value(1e20, "length", "SI") == "1 × 10²⁰ m"
    assert units.format_exact(1e308, "thickness", "US") == "3.937 × 10³⁰⁹\u00a0in"
    assert units.format_exact(1e-300, "length", "SI") == "1 × 10⁻³⁰⁰\u00a0m"
    assert units.format_value(5.0, "length", "SI") == "5.00 m"  # ordinary values as before
    assert format_for_edit(1e308, "thickness", "SI") == "1e311"  # what the box shows: typed back, it reads
    assert format_for_edit(1e308, "thickness", "US") == "3.937e309"


def test_refusal_of_a_huge_entry_quotes_it_in_the_users_units():
    # the message an Open or an edit shows for 1e308 m of insulation (H1's bound: at most 1 m)
    from pydantic import ValidationError

    from app import messages

    data = {"alternatives": [{"name": "A", "segments": [{"name": "s", "length_m": 10.0, "insulation": [
        {"thickness_m": 1e308, "conductivity_W_per_mK": 0.04}]}]}]}
    with pytest.raises(ValidationError) as err:
        Project.model_validate(data)
    text = messages.validation_message(err.value, "US")
    assert "3.937 × 10³⁰⁹" in text and "in" in text
    assert not fuzz_app.jargon(text), text
