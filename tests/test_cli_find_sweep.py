"""`calorun find` and `calorun sweep` (issue 11, deliverables 2–4, headless).

Called in-process through ``app.cli.main`` (fast); one subprocess checks that neither command loads Qt.
The answers are checked against independent solves (``solver.solve`` of each standard thickness, of the
answer and of the sweep's variants) and against closed forms: a constant-output heater delivers its output
per metre times the heated length (definition of a heater's rating, W per metre of heater); 1 ft = 0.3048 m
exactly (NIST SP 811). Expected exit codes and wording are those of issue 11 and the CLI's help text.
"""

from __future__ import annotations

import csv
import io
import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from app.cli import main
from solver import solve
from solver.project_io import load_project
from solver.variants import STANDARD_INSULATION_THICKNESSES_M, Parameter

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "app" / "demo_project.json"
BASE = "Trace 15 W/m, 80 mm wool"
SURFACE_MAX_K = 50.0 + 273.15
BULK_MIN_K = 55.0 + 273.15


def run(capsys, *args: str) -> tuple[int, str, str]:
    code = main([*args])
    out = capsys.readouterr()
    return code, out.out, out.err


def _base():
    project = load_project(DEMO)
    return project, next(a for a in project.alternatives if a.name == BASE)


def _meets(figures, bulk_min=BULK_MIN_K, surface_max=SURFACE_MAX_K) -> bool:
    return (figures["min_bulk_temperature_K"] >= bulk_min
            and figures["max_outer_surface_temperature_K"] <= surface_max)


FIND = ["find", str(DEMO), "--alternative", BASE, "--vary", "insulation_thickness",
        "--target", "surface_max=50C", "--target", "bulk_min=55C"]


# --------------------------------------------------------------------------- find


def test_find_prints_the_smallest_thickness_and_the_binding_target(capsys):
    code, out, err = run(capsys, *FIND)
    assert code == 0, err
    # the answer by brute force: solve every standard thickness on its own, take the smallest that meets both
    project, alt = _base()
    parameter = Parameter("insulation_thickness")
    solved = {t: solve(parameter.apply(alt, t)).key_figures() for t in STANDARD_INSULATION_THICKNESSES_M}
    expected = min(t for t, f in solved.items() if _meets(f))
    assert f"Found       {expected * 1000:.0f} mm" in out
    figures = solved[expected]
    margins = {"outer surface at most 50.0 °C": (SURFACE_MAX_K - figures["max_outer_surface_temperature_K"]) / SURFACE_MAX_K,
               "bulk temperature everywhere at least 55.0 °C": (figures["min_bulk_temperature_K"] - BULK_MIN_K) / BULK_MIN_K}
    binding = min(margins, key=margins.get)
    assert f"Binding     {binding}" in out
    # the margins of both targets, and the Key Figures at the answer
    bulk_margin = figures["min_bulk_temperature_K"] - BULK_MIN_K
    assert f"+{bulk_margin:.1f} K" in out
    assert "Key" not in err
    assert "Outlet temperature" in out and f"{figures['outlet_temperature_K'] - 273.15:.1f} °C" in out
    assert "Cautions:" in out


def test_find_json_gives_the_answer_in_si(capsys):
    code, out, err = run(capsys, *FIND, "--json")
    assert code == 0, err
    data = json.loads(out)
    assert data["feasible"] is True and data["value"] in STANDARD_INSULATION_THICKNESSES_M
    assert data["binding"] in [t["text"] for t in data["targets"]]
    assert all(m >= 0 for m in data["margins"].values())
    # the key figures are those of the answer solved on its own
    project, alt = _base()
    again = solve(Parameter("insulation_thickness").apply(alt, data["value"])).key_figures()
    assert data["key_figures"]["outlet_temperature_K"] == pytest.approx(again["outlet_temperature_K"], rel=1e-9)


def test_find_says_in_plain_words_when_no_value_meets_the_targets(capsys):
    code, out, err = run(capsys, "find", str(DEMO), "--alternative", BASE, "--vary", "insulation_thickness",
                         "--target", "surface_max=50C", "--target", "bulk_min=95C")
    assert code == 1
    assert "No value meets every target." in out
    assert "95.0 °C" in out and "even at 100 mm" in out
    assert "no value of Insulation thickness" in err and "Traceback" not in err


def test_find_saves_the_answer_as_a_new_alternative_with_its_record(capsys, tmp_path):
    out_path = tmp_path / "with answer.json"
    code, out, err = run(capsys, *FIND, "--save-as", str(out_path))
    assert code == 0, err
    before = load_project(DEMO)
    after = load_project(out_path)
    assert [a.name for a in after.alternatives[:-1]] == [a.name for a in before.alternatives]
    assert after.alternatives[:-1] == before.alternatives
    new = after.alternatives[-1]
    assert new.name.startswith(f"{BASE} — insulation ") and f"New alternative {new.name!r}" in out
    origin = new.origin
    assert origin.tool == "Target Finder" and origin.base_alternative == BASE
    assert origin.parameter == {"kind": "insulation_thickness", "segments": []}
    assert origin.targets == ["outer surface at most 50.0 °C", "bulk temperature everywhere at least 55.0 °C"]
    assert origin.binding in origin.targets and origin.value_text.endswith(" mm") and origin.explanation
    # the new alternative is the base with that thickness: it meets both targets solved on its own
    assert _meets(solve(new).key_figures())
    assert all(s.insulation[0].thickness_m == origin.value for s in new.segments)


def test_the_report_of_the_saved_project_says_how_it_was_found(capsys, tmp_path):
    pypdf = pytest.importorskip("pypdf")
    out_path = tmp_path / "with answer.json"
    assert run(capsys, *FIND, "--save-as", str(out_path))[0] == 0
    new = load_project(out_path).alternatives[-1]
    pdf = tmp_path / "summary.pdf"
    code, out, err = run(capsys, "report", str(out_path), "-o", str(pdf), "--alternative", new.name)
    assert code == 0, err
    text = " ".join((page.extract_text() or "") for page in pypdf.PdfReader(str(pdf)).pages)
    text = " ".join(text.replace("\u00a0", " ").split())
    for words in ("Found by the Target Finder", "Binding target", "Value found", new.origin.value_text,
                  "outer surface at most 50.0 °C", "Insulation thickness, all 5 segments"):
        assert words in text, words


@pytest.mark.parametrize("option, value", [
    ("--target", "surface_max=fifty"),
    ("--target", "surface_hot=50C"),
    ("--from", "abc"),
    ("--vary", "heater_outpt"),
    ("--alternative", "No such line"),
])
def test_a_bad_option_value_exits_2_naming_the_option_and_the_value(capsys, option, value):
    args = ["find", str(DEMO), "--vary", "heater_output", "--target", "bulk_min=55C"]
    if option == "--vary":
        args[args.index("--vary") + 1] = value
    else:
        args += [option, value]
    code, out, err = run(capsys, *args)
    assert code == 2
    assert option in err and value in err, err
    assert "Traceback" not in err


def test_the_help_names_every_parameter_and_target_kind():
    # one list each (solver.variants.PARAMETER_KINDS, solver.target_finder.TARGET_KINDS): the help keeps up
    from app.cli import PARAMETER_HELP, TARGET_HELP
    from solver.target_finder import TARGET_KINDS
    from solver.variants import PARAMETER_KINDS

    assert all(kind in PARAMETER_HELP for kind in PARAMETER_KINDS)
    assert all(kind in TARGET_HELP for kind in TARGET_KINDS)


def test_exit_codes_are_documented(capsys):
    with pytest.raises(SystemExit):
        main(["find", "--help"])
    out = capsys.readouterr().out
    assert "exit codes: 0 a value meets every target" in " ".join(out.split())
    with pytest.raises(SystemExit):
        main(["sweep", "--help"])
    out = " ".join(capsys.readouterr().out.split())
    assert "exit codes: 0 the sweep ran" in out and "W/m" in out and "mm" in out


# --------------------------------------------------------------------------- sweep


SWEEP = ["sweep", str(DEMO), "--alternative", BASE, "--vary", "heater_output", "--from", "5", "--to", "40",
         "--points", "36"]


def test_sweep_writes_a_csv_with_units_and_one_row_per_value(capsys, tmp_path):
    table = tmp_path / "sweep.csv"
    code, out, err = run(capsys, *SWEEP, "--figure", "outlet_temperature_K", "--figure", "heat_input_tracing_W",
                         "-o", str(table))
    assert code == 0, err
    rows = list(csv.reader(io.StringIO(table.read_text(encoding="utf-8"))))
    assert rows[0][:3] == ["Heater output [W/m]", "Outlet temperature [°C]", "Heat input: tracing [kW]"]
    body = rows[1:]
    assert len(body) == 36
    assert [float(r[0]) for r in body] == pytest.approx([5.0 + i for i in range(36)])
    # a constant-output heater gives output × heated length: 185 m of line, every segment traced
    project, alt = _base()
    length = sum(s.length_m for s in alt.segments)
    assert length == pytest.approx(185.0)
    for r in body:
        assert float(r[2]) == pytest.approx(float(r[0]) * length / 1000.0, rel=1e-9)
    # a row against an independent solve of that variant
    again = solve(Parameter("heater_output").apply(alt, 20.0)).key_figures()
    assert float(body[15][1]) == pytest.approx(again["outlet_temperature_K"] - 273.15, rel=1e-9)
    assert f"Table written: {table} (36 rows)" in out


def test_sweep_in_us_units(capsys, tmp_path):
    table = tmp_path / "sweep us.csv"
    code, out, err = run(capsys, "sweep", str(DEMO), "--alternative", BASE, "--vary", "heater_output",
                         "--values", "3,6,9", "--units", "US", "-o", str(table))
    assert code == 0, err
    rows = list(csv.reader(io.StringIO(table.read_text(encoding="utf-8"))))
    assert rows[0][0] == "Heater output [W/ft]" and "[°F]" in rows[0][1]
    # bare numbers are read in W/ft: 3 W/ft = 3 / 0.3048 W/m (1 ft = 0.3048 m exactly)
    project, alt = _base()
    again = solve(Parameter("heater_output").apply(alt, 3.0 / 0.3048)).key_figures()
    assert float(rows[1][1]) == pytest.approx((again["outlet_temperature_K"] - 273.15) * 1.8 + 32.0, rel=1e-9)


def test_sweep_table_marks_the_rows_that_meet_every_target_and_states_the_band(capsys):
    code, out, err = run(capsys, *SWEEP, "--target", "bulk_min=74C", "--target", "inner_wall_max=80C")
    assert code == 0, err
    lines = [line for line in out.splitlines() if line.strip()[:1].isdigit()]
    assert len(lines) == 36
    # which values meet both targets, by independent solves
    project, alt = _base()
    parameter = Parameter("heater_output")
    ok = []
    for i, line in enumerate(lines):
        value = 5.0 + i
        f = solve(parameter.apply(alt, value)).key_figures()
        meets = f["min_bulk_temperature_K"] >= 74 + 273.15 and f["max_inner_wall_temperature_K"] <= 80 + 273.15
        ok.append(meets)
        assert ("\u2713 all met" in line) == meets, line
    first = ok.index(True)
    last = len(ok) - 1 - ok[::-1].index(True)
    assert all(ok[first:last + 1])
    assert f"Targets met from {5 + first} W/m to {5 + last} W/m." in out


def test_sweep_pick_saved_keeps_the_points_and_the_report_draws_them(capsys, tmp_path):
    out_path = tmp_path / "picked.json"
    code, out, err = run(capsys, *SWEEP, "--target", "surface_max=50C", "--target", "bulk_min=74C",
                         "--pick", "20W/m", "--save-as", str(out_path))
    assert code == 0, err
    new = load_project(out_path).alternatives[-1]
    origin = new.origin
    assert origin.tool == "Sweep" and origin.value == pytest.approx(20.0) and origin.value_text == "20 W/m"
    assert len(origin.sweep_points) == 36
    assert new.segments[0].heater.output_W_per_m == pytest.approx(20.0)
    from app.report import solve_alternatives
    from app.reporting.content import build_html

    project = load_project(out_path)
    body = build_html(project, solve_alternatives([new], design=project.design_cases), "SI", "2026-12-03",
                      bands_max_cells=0)
    assert "Picked from a Sweep" in body.html() and "36 values from 5 W/m to 40 W/m" in body.html()
    assert [c for c in body.figures if c.title.startswith("Sweep")]


@pytest.mark.parametrize("extra, option", [
    (["--pick", "20"], "--pick"),
    (["--pick", "21.5", "--save-as", "x.json"], "--pick"),
    (["--figure", "outlet_temp"], "--figure"),
    (["--points", "1"], "--points"),
    (["--from", "40", "--to", "5"], "--from"),
])
def test_sweep_refuses_bad_options(capsys, tmp_path, extra, option):
    extra = [str(tmp_path / e) if e.endswith(".json") else e for e in extra]
    args = ["sweep", str(DEMO), "--alternative", BASE, "--vary", "heater_output", "--points", "8", *extra]
    if option == "--points":
        with pytest.raises(SystemExit) as info:
            main(args)
        assert info.value.code == 2
        assert "--points" in capsys.readouterr().err
        return
    code, out, err = run(capsys, *args)
    assert code == 2 and option in err, err


def test_find_and_sweep_need_no_qt(tmp_path):
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT) + (os.pathsep + env["PYTHONPATH"] if env.get("PYTHONPATH") else "")
    env.pop("QT_QPA_PLATFORM", None)
    code = ("import sys\nfrom app.cli import main\n"
            f"assert main(['find', {str(DEMO)!r}, '--vary', 'heater_output', '--target', 'bulk_min=55C', '--json']) == 0\n"
            f"assert main(['sweep', {str(DEMO)!r}, '--vary', 'heater_output', '--points', '3', '--json']) == 0\n"
            "assert 'PySide6' not in sys.modules\nprint('NO-QT-OK')\n")
    proc = subprocess.run([sys.executable, "-c", code], cwd=ROOT, env=env, capture_output=True, text=True, timeout=60)
    assert proc.returncode == 0, proc.stderr
    assert "NO-QT-OK" in proc.stdout
