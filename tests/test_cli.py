"""The headless command: `calorun solve` / `calorun schema` (issue 2 item 5).

Run as a subprocess with the repository root as working directory and on PYTHONPATH, so the
tests work from a clean checkout without installing the package. Expected shapes and exit
codes are those written in issue 2 item 5; energy closure is the first law.
"""

from __future__ import annotations

import csv
import json
import os
import re
import subprocess
import sys
from pathlib import Path

import pytest

from solver.model import (
    Alternative,
    Feed,
    Layer,
    Pipe,
    Project,
    PureFluid,
    Segment,
    StillAir,
    TableFluid,
    TableRow,
    Wind,
)
from solver.project_io import dump_project, save_project
from solver.results import CAUTIONS, CAUTIONS_BANNER, KEY_FIGURES

ROOT = Path(__file__).resolve().parent.parent


def run_cli(*args: str, timeout: float = 60.0) -> subprocess.CompletedProcess:
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT) + (os.pathsep + env["PYTHONPATH"] if env.get("PYTHONPATH") else "")
    env.pop("QT_QPA_PLATFORM", None)  # the headless commands must not need a display at all
    return subprocess.run([sys.executable, "-m", "app.cli", *args], cwd=ROOT, env=env, capture_output=True,
                          text=True, timeout=timeout)


def two_alternative_project() -> Project:
    product = TableFluid(name="Syrup", rows=[
        TableRow(temperature_K=290.0, density_kg_per_m3=1300.0, specific_heat_J_per_kgK=2600.0,
                 viscosity_Pa_s=1.2, conductivity_W_per_mK=0.4),
        TableRow(temperature_K=360.0, density_kg_per_m3=1270.0, specific_heat_J_per_kgK=2800.0,
                 viscosity_Pa_s=0.08, conductivity_W_per_mK=0.42),
    ])
    wool = [Layer(thickness_m=0.04, conductivity_W_per_mK=0.04)]
    return Project(name="Syrup transfer", alternatives=[
        Alternative(name="Traced", fluid=product,
                    feed=Feed(inlet_temperature_K=330.0, inlet_pressure_Pa=5e5, mass_flow_kg_per_s=0.4),
                    segments=[Segment(name="Rack", length_m=60.0, pipe=Pipe(nps="2", schedule="40"),
                                      heat_input_W_per_m=20.0, insulation=wool,
                                      surroundings=StillAir(temperature_K=278.15)),
                              Segment(name="Yard", length_m=25.0, pipe=Pipe(nps="2", schedule="40"),
                                      insulation=wool, surroundings=Wind(temperature_K=273.15))]),
        Alternative(name="Hot water bare", fluid=PureFluid(name="Water"),
                    feed=Feed(inlet_temperature_K=353.15, inlet_pressure_Pa=4e5, mass_flow_kg_per_s=1.0),
                    segments=[Segment(name="Bare", length_m=40.0, pipe=Pipe(nps="2", schedule="40"),
                                      surroundings=StillAir(temperature_K=293.15))]),
    ])


@pytest.fixture(scope="module")
def project_file(tmp_path_factory) -> Path:
    return save_project(two_alternative_project(), tmp_path_factory.mktemp("cli") / "syrup line.json")


@pytest.fixture(scope="module")
def solved_json(project_file):
    proc = run_cli("solve", str(project_file), "--json")
    assert proc.returncode == 0, proc.stderr
    return json.loads(proc.stdout)


# --------------------------------------------------------------------------- solve


REQUIRED_KEYS = {  # issue 2 item 5, verbatim
    "name", "outlet_temperature_K", "outlet_pressure_Pa", "pressure_drop_Pa", "duty_W", "heat_input_W",
    "heat_loss_W", "energy_balance_residual_W", "max_inner_wall_temperature_K", "min_inner_wall_temperature_K",
    "max_outer_surface_temperature_K", "profile", "checks",
}
PROFILE_KEYS = {"x_m", "bulk_temperature_K", "inner_wall_temperature_K", "outer_surface_temperature_K", "pressure_Pa"}
CHECK_KEYS = {"severity", "code", "message", "segment", "x_m"}


def test_solve_json_shape(solved_json):
    data = solved_json
    assert [a["name"] for a in data["alternatives"]] == ["Traced", "Hot water bare"]
    for alt in data["alternatives"]:
        assert REQUIRED_KEYS <= set(alt), REQUIRED_KEYS - set(alt)
        for key in REQUIRED_KEYS - {"name", "profile", "checks"}:
            assert isinstance(alt[key], float), key
        assert PROFILE_KEYS <= set(alt["profile"])
        n = len(alt["profile"]["x_m"])
        assert n > 10
        for key in PROFILE_KEYS:
            assert len(alt["profile"][key]) == n and all(isinstance(v, float) for v in alt["profile"][key]), key
        assert isinstance(alt["checks"], list)
        for c in alt["checks"]:
            assert set(c) == CHECK_KEYS
            assert c["severity"] in ("info", "warning", "danger")
            assert isinstance(c["segment"], int) and isinstance(c["x_m"], float)
        # first law: duty = heat input − heat loss; residual closes
        assert alt["duty_W"] == pytest.approx(alt["heat_input_W"] - alt["heat_loss_W"], abs=1e-6)
        assert abs(alt["energy_balance_residual_W"]) < 1e-6 * max(abs(alt["duty_W"]), alt["heat_input_W"], 1.0)
        assert alt["pressure_drop_Pa"] == pytest.approx(alt["profile"]["pressure_Pa"][0] - alt["outlet_pressure_Pa"])
        assert alt["outlet_temperature_K"] == alt["profile"]["bulk_temperature_K"][-1]
    assert data["cautions"] == list(CAUTIONS)
    traced = data["alternatives"][0]
    assert traced["heat_input_W"] == pytest.approx(20.0 * 60.0)  # q' L (closed form)
    # a bare 80 °C water pipe in a 20 °C room is hot enough to burn (above ~60 °C, common practice)
    bare = data["alternatives"][1]
    assert "HOT_SURFACE" in {c["code"] for c in bare["checks"]}


def test_solve_json_matches_library(solved_json, project_file):
    from solver import solve
    from solver.project_io import load_project

    project = load_project(project_file)
    for alt, out in zip(project.alternatives, solved_json["alternatives"]):
        r = solve(alt)
        assert out["outlet_temperature_K"] == pytest.approx(r.outlet_temperature_K, abs=1e-9)
        assert out["duty_W"] == pytest.approx(r.duty_W, rel=1e-12, abs=1e-9)


def test_solve_table(project_file):
    proc = run_cli("solve", str(project_file))
    assert proc.returncode == 0, proc.stderr
    out = proc.stdout
    for name in ("Traced", "Hot water bare"):
        assert name in out
    for label in ("Outlet temperature", "Pressure drop", "Heat input", "Heat loss", "Energy balance residual",
                  "Verdict", "Checks"):
        assert label in out
    assert "°C" in out and ("Pa" in out or "bar" in out) and " kW" in out
    # the cautions close the table output (after every alternative and the CSV lines)
    assert out.rstrip().endswith(CAUTIONS_BANNER)
    assert out.count(CAUTIONS_BANNER) == 1


@pytest.fixture(scope="module")
def solved_traced():
    from solver import solve

    return solve(two_alternative_project().alternatives[0])


@pytest.mark.parametrize("system", ["SI", "US"])
def test_table_rows_are_the_key_figures(solved_traced, system):
    """The CLI prints the one list of key figures, with its labels, in its order."""
    from app.cli import key_figures_table

    figures = solved_traced.key_figures()
    expected = [f.negative_label if f.negative_label and figures[f.key] < 0 else f.label for f in KEY_FIGURES]
    lines = key_figures_table(solved_traced, system).splitlines()
    rows = lines[1:1 + len(KEY_FIGURES)]
    width = len(max(expected, key=len))
    shown = [line[2:2 + width + 2].strip() for line in rows]
    assert shown == expected
    assert lines[1 + len(KEY_FIGURES)].strip().startswith("Verdict")


def test_residual_follows_the_unit_system(solved_traced):
    from app.cli import key_figures_table

    for system, unit_text in (("SI", "W"), ("US", "Btu/h")):
        row = next(line for line in key_figures_table(solved_traced, system).splitlines()
                   if "Energy balance residual" in line)
        assert row.rstrip().endswith(unit_text), row
        assert not re.search(r"\d[eE][-+]?\d", row), row  # never "1.2e-09 W"
    us_row = next(line for line in key_figures_table(solved_traced, "US").splitlines() if "residual" in line)
    assert " W" not in us_row and "mW" not in us_row


def test_checks_are_counted_with_plurals_and_listed_worst_first(solved_traced):
    from app.cli import key_figures_table

    # the slow syrup line raises more than one warning (laminar entry range) and a low-velocity note
    text = key_figures_table(solved_traced, "SI")
    counts = solved_traced.check_counts()
    assert counts["warning"] >= 2
    assert f"{counts['warning']} warnings" in text
    for n in re.findall(r"\b(\d+) (?:danger|warning)\b(?!s)", text):
        assert n == "1", text  # "3 warning" never
    for n in re.findall(r"\b(\d+) (?:danger|warning)s\b", text):
        assert n != "1", text
    listed = text.split("  Checks:", 1)[1].splitlines()[1:]
    severities = [line.split()[0] for line in listed]
    order = {"DANGER": 0, "WARNING": 1, "INFO": 2}
    assert len(severities) == len(solved_traced.checks)
    assert severities == sorted(severities, key=order.__getitem__)


def test_help_lists_every_command_without_qt():
    for flag in ("--help", "-h"):
        proc = run_cli(flag)
        assert proc.returncode == 0, proc.stderr
        for word in ("solve", "report", "schema", "--screenshot", "FILE"):
            assert word in proc.stdout, (flag, word)
    code = ("import sys, io, contextlib\nfrom app.cli import main\n"
            "with contextlib.redirect_stdout(io.StringIO()):\n    assert main(['--help']) == 0\n"
            "assert 'PySide6' not in sys.modules\nprint('NO-QT-OK')\n")
    proc = subprocess.run([sys.executable, "-c", code], cwd=ROOT, env=dict(os.environ, PYTHONPATH=str(ROOT)),
                          capture_output=True, text=True, timeout=60)
    assert proc.returncode == 0, proc.stderr
    assert "NO-QT-OK" in proc.stdout


def test_solve_csv(tmp_path, project_file):
    out_dir = tmp_path / "profiles"
    proc = run_cli("solve", str(project_file), "--csv", str(out_dir))
    assert proc.returncode == 0, proc.stderr
    files = sorted(out_dir.glob("*.csv"))
    assert len(files) == 2
    for f in files:
        text = f.read_text(encoding="utf-8-sig")
        rows = [r for r in csv.reader(text.splitlines()) if r and not r[0].startswith("#")]
        header_idx = next(i for i, r in enumerate(rows) if any("osition" in c for c in r))
        data_rows = rows[header_idx + 1:]
        assert len(data_rows) > 10
        width = len(rows[header_idx])
        assert all(len(r) == width for r in data_rows)
        float(data_rows[-1][0])


def test_alternative_selection(project_file):
    proc = run_cli("solve", str(project_file), "--json", "--alternative", "Hot water bare")
    assert proc.returncode == 0, proc.stderr
    assert [a["name"] for a in json.loads(proc.stdout)["alternatives"]] == ["Hot water bare"]
    proc = run_cli("solve", str(project_file), "--alternative", "Nope")
    assert proc.returncode == 2 and "Nope" in proc.stderr


# --------------------------------------------------------------------------- exit codes


@pytest.mark.parametrize("system, length_text", [("SI", "\u22122 m"), ("US", "\u22126.5617 ft")])
def test_invalid_project_exit_2(tmp_path, system, length_text):
    data = json.loads(dump_project(two_alternative_project()))
    data["alternatives"][1]["segments"][0]["length_m"] = -2
    data["alternatives"][0]["feed"]["mass_flow_kg_per_s"] = "lots"
    path = tmp_path / "bad.json"
    path.write_text(json.dumps(data), encoding="utf-8")
    proc = run_cli("solve", str(path), "--units", system)
    proc.stderr = proc.stderr.replace("\u00a0", " ")  # no-break space between number and unit
    assert proc.returncode == 2
    # the file path stays, then the problem in the user's words and units (2 m = 6.5617 ft, 1 ft = 0.3048 m)
    assert "alternatives[1].segments[0].length_m — Length must be more than 0" in proc.stderr
    assert f"you entered {length_text}" in proc.stderr
    assert "alternatives[0].feed.mass_flow_kg_per_s — Mass flow must be a number; you entered 'lots'" in proc.stderr
    assert "2 problems" in proc.stderr and "problem(s)" not in proc.stderr
    assert "Input should" not in proc.stderr
    assert "Traceback" not in proc.stderr
    assert proc.stdout == ""


@pytest.mark.parametrize("content", ["{not json", "[]", '{"format": "calorun-project", "schema_version": 7}'])
def test_unreadable_projects_exit_2(tmp_path, content):
    path = tmp_path / "broken.json"
    path.write_text(content, encoding="utf-8")
    proc = run_cli("solve", str(path), "--json")
    assert proc.returncode == 2, proc.stderr
    assert "Traceback" not in proc.stderr and proc.stderr.strip()


def test_missing_file_exit_2(tmp_path):
    proc = run_cli("solve", str(tmp_path / "absent.json"))
    assert proc.returncode == 2 and "absent.json" in proc.stderr


def test_solver_failure_exit_1(tmp_path):
    project = Project(name="Impossible", alternatives=[
        Alternative(name="Too much flow", fluid=PureFluid(name="Water"),
                    feed=Feed(inlet_temperature_K=293.15, inlet_pressure_Pa=1.5e5, mass_flow_kg_per_s=5.0),
                    segments=[Segment(name="Narrow", length_m=500.0, pipe=Pipe(nps="1", schedule="80"))]),
    ])
    path = save_project(project, tmp_path / "impossible.json")
    proc = run_cli("solve", str(path))
    assert proc.returncode == 1
    assert "Too much flow" in proc.stderr and "Traceback" not in proc.stderr


# --------------------------------------------------------------------------- schema


def test_schema_is_json_schema():
    proc = run_cli("schema")
    assert proc.returncode == 0, proc.stderr
    schema = json.loads(proc.stdout)
    assert schema["type"] == "object"
    assert {"format", "schema_version", "alternatives"} <= set(schema["properties"])
    assert "alternatives" in schema.get("required", [])
    defs = schema.get("$defs", {})
    assert {"Alternative", "Segment", "Feed"} <= set(defs)
    # the segment's length carries its unit in the key and the > 0 bound (issue 2 item 2)
    assert defs["Segment"]["properties"]["length_m"]["exclusiveMinimum"] == 0


# --------------------------------------------------------------------------- no Qt


def test_solve_does_not_import_qt(project_file, tmp_path):
    """`calorun solve` (table, --json, --csv) leaves Qt unimported (issue 2 item 5)."""
    runs = [["--json"], ["--csv", str(tmp_path / "csv")], []]
    code = (
        "import sys, io, contextlib\n"
        "from app.cli import main\n"
        f"for extra in {runs!r}:\n"
        "    with contextlib.redirect_stdout(io.StringIO()):\n"
        f"        rc = main(['solve', {str(project_file)!r}, *extra])\n"
        "    assert rc == 0, (extra, rc)\n"
        "qt = sorted(m for m in sys.modules if m.split('.')[0] in ('PySide6', 'pyqtgraph', 'shiboken6'))\n"
        "assert not qt, qt\n"
        "print('NO-QT-OK')\n"
    )
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    proc = subprocess.run([sys.executable, "-c", code], cwd=ROOT, env=env, capture_output=True, text=True, timeout=60)
    assert proc.returncode == 0, proc.stderr
    assert proc.stdout.rstrip().endswith("NO-QT-OK")
    assert len(list((tmp_path / "csv").glob("*.csv"))) == 2


def test_schema_does_not_import_qt():
    code = ("import sys, io, contextlib\nfrom app.cli import main\n"
            "with contextlib.redirect_stdout(io.StringIO()):\n    assert main(['schema']) == 0\n"
            "assert 'PySide6' not in sys.modules\nprint('NO-QT-OK')\n")
    proc = subprocess.run([sys.executable, "-c", code], cwd=ROOT, env=dict(os.environ, PYTHONPATH=str(ROOT)),
                          capture_output=True, text=True, timeout=60)
    assert proc.returncode == 0, proc.stderr
    assert "NO-QT-OK" in proc.stdout


# --------------------------------------------------------------------------- design cases (issue 10 item 7)


#: Design figures that are plain numbers (a fraction, a ratio, a Biot number) and carry no unit suffix.
DIMENSIONLESS_DESIGN_KEYS = {"index", "design_margin", "worst_thermostat_duty", "biot_number"}
UNIT_SUFFIXES = ("_K", "_W_per_m", "_s", "_m_per_s", "_J_per_kg", "_J_per_mK", "_J_per_m", "_K_m_per_W")


def _numeric_keys(obj, path=""):
    if isinstance(obj, dict):
        for k, v in obj.items():
            if isinstance(v, (int, float)) and not isinstance(v, bool):
                yield k, f"{path}.{k}"
            elif isinstance(v, (dict, list)):
                yield from _numeric_keys(v, f"{path}.{k}")
    elif isinstance(obj, list):
        for i, v in enumerate(obj):
            yield from _numeric_keys(v, f"{path}[{i}]")


def test_solve_json_has_the_design_cases_with_units_in_the_key_names(solved_json, project_file):
    from solver import solve
    from solver.project_io import load_project

    project = load_project(project_file)
    for alt, out in zip(project.alternatives, solved_json["alternatives"]):
        design = out["design"]
        # every number says its unit in its key name (DESIGN.md: units at the edges), or is a plain number
        for key, where in _numeric_keys(design):
            assert key.endswith(UNIT_SUFFIXES) or key in DIMENSIONLESS_DESIGN_KEYS, where
        assert {"worst_air_temperature_K", "worst_wind_speed_m_per_s", "hot_air_temperature_K", "maintain_temperature_K",
                "hot_wall_temperature_K", "segments", "hold_time"} <= set(design)
        seg_keys = {"heat_loss_W_per_m", "heat_sinks_W_per_m", "required_output_W_per_m", "available_output_W_per_m",
                    "hot_wall_temperature_K", "holds", "heater_kind"}
        assert all(seg_keys <= set(s) for s in design["segments"])
        assert all({"to_limit_off_s", "to_freezing_off_s", "frozen_solid_off_s", "warm_up_s"} <= set(s)
                   for s in design["hold_time"]["segments"])
        # the numbers round-trip: the same as the library's DesignResult for the same project
        r = solve(alt, design=project.design_cases)
        expected = json.loads(json.dumps(r.design.to_dict()))
        assert design == expected
    # the defaults of the design cases (solver.model.DesignCases) reach the output
    assert solved_json["alternatives"][0]["design"]["worst_air_temperature_K"] == pytest.approx(253.15)
    # an untraced segment standing still has no heat to hold it: it settles at the air (closed form,
    # T = T∞ + q' R' with q' = 0), in the hot case at the hot air temperature
    yard = solved_json["alternatives"][0]["design"]["segments"][1]
    assert yard["heater_kind"] == "none"
    assert yard["hot_wall_temperature_K"] == pytest.approx(solved_json["alternatives"][0]["design"]["hot_air_temperature_K"],
                                                           abs=1e-6)
    # the syrup has no freezing point and the project no maintain or minimum temperature: not assessed
    assert yard["holds"] is None and solved_json["alternatives"][0]["design"]["maintain_temperature_K"] is None
    # JSON proper: no NaN or Infinity anywhere (json.loads accepts them unless told not to)
    proc = run_cli("solve", str(project_file), "--json")
    json.loads(proc.stdout, parse_constant=lambda c: pytest.fail(f"non-JSON constant {c} in the output"))


def test_solve_table_has_the_design_per_segment():
    # the invented freeze-protection sample: traced segments hold, the untraced alternative does not
    proc = run_cli("solve", str(ROOT / "sample_projects" / "makeup_water_freeze_protection.json"))
    assert proc.returncode == 0, proc.stderr
    out = proc.stdout
    assert out.count("Design cases: worst case air −25.0 °C, wind 10.0 m/s, no flow") == 3
    assert "meteorological data" in out
    blocks = out.split("== ")[1:]
    traced, bare = blocks[0], blocks[2]
    for block, verdict in ((traced, ": OK"), (bare, ": does not hold")):
        rows = [line for line in block.splitlines() if line.strip()[:2] in ("1 ", "2 ", "3 ")]
        assert len(rows) == 3 and all(verdict in row for row in rows), block
    assert "self-limiting" in traced and "Hot wall [°C]" in traced


def test_a_failed_alternative_still_exits_1_with_design_cases(tmp_path):
    # the exit codes stay as they were: 1 when an alternative cannot be solved, the rest still printed
    bad = two_alternative_project()
    bad.alternatives[1].feed.inlet_temperature_K = 500.0  # water at 227 °C and 4 bar(a) boils at the inlet
    path = save_project(bad, tmp_path / "bad.json")
    proc = run_cli("solve", str(path), "--json")
    assert proc.returncode == 1
    data = json.loads(proc.stdout)
    assert "design" in data["alternatives"][0] and "error" in data["alternatives"][1]
