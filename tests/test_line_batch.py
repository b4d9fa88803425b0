"""`calorun batch`: a line list designed in worker processes or on a Dask cluster (issue 12, deliverable 4).

What is checked, and against what:

- the results do not depend on the workers: one worker, two workers (through the CLI) and a local Dask
  cluster give byte-identical results.csv and identical per-line files;
- a rerun designs nothing when nothing changed (no line file is rewritten), and only the edited line when one
  row changed; the results stay identical;
- bad rows become result rows with the verdict "error" and a message naming the row, the column and the
  value, and the other lines still run;
- each line's result equals the same line designed directly (``design_line`` on ``line_project``) to 1e-9, and
  its project file, opened and solved as the app solves it (``solve(alt, design=...)``), gives the same
  operating-case figures;
- the units of the results list follow their definitions: °C = K − 273.15 (BIPM, The International System
  of Units, 9th ed., 2019, §2.3.1), 1 kW = 1000 W, 1 mm = 0.001 m (SI prefixes), 1 ft = 0.3048 m exactly
  (NIST SP 811, 2008, appendix B);
- the exit codes are those documented in ``app.cli.BATCH_EXIT_CODES_HELP``.

The list is written here (ten rows, two with mistakes) on the demo template of
sample_projects/line_list (invented demo data).
"""

from __future__ import annotations

import csv
import io
import json
import math
import shutil
from pathlib import Path

import pytest

from app.cli import main
from app.line_batch import (LINES_FOLDER, RESULTS_CSV, RESULTS_XLSX, SUMMARY_PDF, BatchRefused, _Progress,
                            results_csv_text, run_batch, safe_tag)
from solver.line_design import LineResult, design_line, options_from_row
from solver.line_list import LineRow, line_project, read_line_list
from solver.project_io import dump_project, load_project

ROOT = Path(__file__).resolve().parents[1]
TEMPLATE = ROOT / "sample_projects" / "line_list" / "line_template.json"
RESIDUE = "Residue product R-7 (demo data)"

HEADER = ["tag", "service", "fluid", "size [NPS]", "length [m]", "maintain temperature [°C]",
          "maximum temperature [°C]", "flow [kg/h]", "inlet temperature [°C]", "location", "insulation",
          "insulation thickness [mm]", "surface limit [°C]", "heat loss limit [W/m]", "elbows", "valves",
          "flange pairs", "supports", "max circuit length [m]"]
ROWS = [  # invented demo lines of the invented Fernbrook Works
    ["FW-T-WF-1", "fire water", "Water", "1", "40", "5", "", "1000", "", "outdoors", "flexible elastomeric foam",
     "25", "", "", "3", "1", "2", "10", "100"],
    ["FW-T-RS-2", "residue to Unit 4", "", "2", "60", "60", "110", "3000", "", "outdoors", "mineral wool", "50",
     "", "", "4", "1", "2", "15", "100"],
    ["FW-T-RS-3", "residue recycle", "", "3", "90", "55", "110", "6000", "", "buried", "mineral wool", "", "",
     "20", "2", "0", "2", "20", "150"],
    ["FW-T-RS-4", "negative length", "", "2", "-5", "60", "110", "3000", "", "outdoors", "", "50", "", "", "",
     "", "", "", ""],
    ["FW-T-HR-5", "hot residue", RESIDUE, "2", "30", "60", "180", "4000", "150", "indoors", "calcium silicate",
     "", "60", "55", "2", "1", "1", "8", "150"],
    ["FW-T-WF-6", "eyewash supply", "Water", "3/4", "15", "5", "", "500", "", "buried", "mineral wool", "40", "",
     "", "1", "0", "0", "4", ""],
    ["FW-T-XX-7", "unknown fluid", "Molasses", "2", "20", "40", "", "1000", "", "indoors", "", "50", "", "", "",
     "", "", "", ""],
    ["FW-T/RS 8", "a tag that is no file name", "", "1-1/2", "25", "65", "110", "1500", "", "outdoors",
     "mineral wool", "50", "", "", "2", "1", "0", "6", "100"],
    ["FW-T-RS-9", "residue sample loop", "", "1", "20", "65", "110", "800", "", "indoors", "mineral wool", "40",
     "", "", "3", "2", "2", "5", ""],
    ["FW-T-WF-10", "cooling water make-up", "Water", "6", "120", "5", "", "60000", "", "outdoors", "mineral wool",
     "50", "", "", "6", "2", "4", "30", "100"],
]
BAD_ROWS = {5: "length [m]", 8: "fluid"}  # spreadsheet row (header = 1) -> the column at fault
GOOD = [r[0] for i, r in enumerate(ROWS, start=2) if i not in BAD_ROWS]


def _write_list(path: Path, rows=ROWS) -> Path:
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    writer.writerow(HEADER)
    writer.writerows(rows)
    path.write_text(buf.getvalue(), encoding="utf-8")
    return path


def _csv_rows(out: Path) -> list[dict]:
    with open(out / RESULTS_CSV, encoding="utf-8-sig", newline="") as fh:
        return list(csv.DictReader(fh))


def _line_files(out: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in sorted((out / LINES_FOLDER).iterdir())}


def _result_json(out: Path, tag: str) -> LineResult:
    data = json.loads((out / LINES_FOLDER / f"{safe_tag(tag)}.result.json").read_text(encoding="utf-8"))
    return LineResult.from_dict(data["result"])


@pytest.fixture(scope="module")
def line_list(tmp_path_factory) -> Path:
    return _write_list(tmp_path_factory.mktemp("list") / "fernbrook_test_list.csv")


@pytest.fixture(scope="module")
def one_worker(line_list, tmp_path_factory):
    out = tmp_path_factory.mktemp("one_worker")
    summary = run_batch(line_list, TEMPLATE, out, workers=1, progress=False)
    return out, summary


# --------------------------------------------------------------------------- results


def test_every_row_gets_a_result_row_in_list_order_with_units_in_the_header(one_worker):
    out, summary = one_worker
    rows = _csv_rows(out)
    assert [int(r["row"]) for r in rows] == list(range(2, 2 + len(ROWS)))
    assert [r["tag"] for r in rows] == [r[0] for r in ROWS]
    assert summary.total == len(ROWS) and summary.designed == len(GOOD) and summary.reused == 0
    assert sum(summary.counts.values()) == len(ROWS)
    header = list(rows[0])
    for words in ("heat loss [W/m]", "required output [W/m]", "chosen output [W/m]", "installed power [kW]",
                  "hot-case max wall temperature [°C]", "hold time [h]", "insulation thickness [mm]"):
        assert words in header
    # the spreadsheet holds the same table
    from openpyxl import load_workbook

    book = load_workbook(out / RESULTS_XLSX, read_only=True)
    sheet = book.worksheets[0]
    table = [list(r) for r in sheet.iter_rows(values_only=True)]
    book.close()
    assert table[0] == header
    assert [r[0] for r in table[1:]] == [r[0] for r in ROWS]
    assert (out / SUMMARY_PDF).read_bytes()[:5] == b"%PDF-"
    for tag in GOOD:  # a project per designed line, which opens as a project
        project = load_project(out / LINES_FOLDER / f"{safe_tag(tag)}.json")
        assert project.alternatives[0].name == tag


def test_bad_rows_carry_their_row_column_and_value_and_do_not_stop_the_others(one_worker):
    out, summary = one_worker
    rows = {int(r["row"]): r for r in _csv_rows(out)}
    for row, column in BAD_ROWS.items():
        assert rows[row]["verdict"] == "error"
        written = next(cell for h, cell in zip(HEADER, ROWS[row - 2]) if h == column)
        assert f"row {row}, column '{column}'" in rows[row]["message"]
        assert f"'{written}'" in rows[row]["message"]
    for row, r in rows.items():
        if row not in BAD_ROWS:
            assert r["verdict"] in ("ok", "warning", "fails"), r["message"]
    assert summary.counts["error"] == len(BAD_ROWS)
    assert {(row, verdict) for row, _tag, verdict, _m in summary.failing if verdict == "error"} == \
        {(row, "error") for row in BAD_ROWS}


def test_a_tag_that_is_no_file_name_gets_a_safe_one_and_no_two_tags_share_one():
    assert safe_tag("FW-2-RS-1041") == "FW-2-RS-1041"
    names = {safe_tag(t) for t in ("P/101 A", "P_101_A", "P 101 A", "p/101 a", "CON", "..", "")}
    assert len(names) == 7
    for name in names:
        assert name and "/" not in name and " " not in name and not name.startswith(".")


def test_the_results_list_converts_by_the_definitions_of_the_units(one_worker):
    out, _ = one_worker
    rows = {r["tag"]: r for r in _csv_rows(out)}
    for tag in GOOD:
        r, si = rows[tag], _result_json(out, tag)
        # °C = K − 273.15 (BIPM SI brochure, 9th ed., §2.3.1); 1 kW = 1000 W; 1 mm = 0.001 m (SI prefixes)
        assert float(r["maintain temperature [°C]"]) == pytest.approx(si.maintain_temperature_K - 273.15, rel=1e-9)
        assert float(r["installed power [kW]"]) == pytest.approx(si.installed_power_W / 1000.0, rel=1e-9)
        assert float(r["insulation thickness [mm]"]) == pytest.approx(si.insulation_thickness_m * 1000.0, rel=1e-9)
        assert float(r["length [m]"]) == pytest.approx(si.length_m, rel=1e-9)
    us = list(csv.DictReader(io.StringIO(results_csv_text([_result_json(out, t) for t in GOOD], "US"))))
    for tag, r in zip(GOOD, us):
        si = _result_json(out, tag)
        assert float(r["length [ft]"]) == pytest.approx(si.length_m / 0.3048, rel=1e-9)  # NIST SP 811, exact
        assert float(r["heat loss [W/ft]"]) == pytest.approx(si.heat_loss_W_per_m * 0.3048, rel=1e-9)


# --------------------------------------------------------------------------- the same as designing one line


def _row(line_list: Path, tag: str) -> LineRow:
    template = load_project(TEMPLATE)
    return next(r for r in read_line_list(line_list, template=template) if getattr(r, "values", None) is not None
                and r.tag == tag)


@pytest.mark.parametrize("tag", ["FW-T-RS-3", "FW-T-HR-5"])  # insulation sized (heat-loss / surface limits)
def test_a_line_in_batch_equals_the_line_designed_directly(one_worker, line_list, tag):
    from app.units import search_words

    out, _ = one_worker
    row = _row(line_list, tag)
    template = load_project(TEMPLATE)
    project, direct = design_line(line_project(row, template), **options_from_row(row.values), row=row.row,
                                  formatter=search_words)
    batch = _result_json(out, tag)
    assert batch.verdict == direct.verdict and batch.message == direct.message
    for name, value in vars(direct).items():
        got = getattr(batch, name)
        if isinstance(value, float) and math.isfinite(value):
            assert got == pytest.approx(value, rel=1e-9, abs=0.0), name
        elif isinstance(value, float):
            assert (math.isnan(value) and math.isnan(got)) or got == value, name
        else:
            assert got == value, name
    assert (out / LINES_FOLDER / f"{safe_tag(tag)}.json").read_text(encoding="utf-8") == dump_project(project)


def test_a_line_project_opened_and_solved_as_the_app_does_gives_the_batch_figures(one_worker):
    """The app solves an opened project with its design cases (app.document's runner: solve(alt, design=...))."""
    from solver import solve

    out, _ = one_worker
    tag = "FW-T-RS-2"
    project = load_project(out / LINES_FOLDER / f"{safe_tag(tag)}.json")
    result = solve(project.baseline_alternative(), design=project.design_cases)
    batch = _result_json(out, tag)
    assert result.key_figures()["outlet_temperature_K"] == pytest.approx(batch.outlet_temperature_K, rel=1e-9)
    assert result.key_figures()["min_bulk_temperature_K"] == pytest.approx(batch.min_bulk_temperature_K, rel=1e-9)


# --------------------------------------------------------------------------- workers, resume, Dask


def test_two_workers_through_the_cli_give_the_same_files_and_exit_1_for_the_bad_rows(one_worker, line_list,
                                                                                      tmp_path, capsys):
    out1, _ = one_worker
    out2 = tmp_path / "two"
    code = main(["batch", str(line_list), "--template", str(TEMPLATE), "-o", str(out2), "--workers", "2"])
    captured = capsys.readouterr()
    assert code == 1, captured.err  # BATCH_EXIT_CODES_HELP: 1 a line fails or could not be designed
    assert (out2 / RESULTS_CSV).read_bytes() == (out1 / RESULTS_CSV).read_bytes()
    assert _line_files(out2) == _line_files(out1)
    assert "2 local worker processes" in captured.out and "Results written" in captured.out
    assert "row 5, column 'length [m]'" in captured.err  # the bad rows are named on stderr
    assert "lines/s" in captured.err  # the progress (one line per tenth when stderr is not a terminal)


def test_a_rerun_designs_nothing_that_is_done_and_only_what_changed(one_worker, line_list, tmp_path, monkeypatch):
    out1, _ = one_worker
    out = tmp_path / "again"
    shutil.copytree(out1, out)
    before = {p.name: p.stat().st_mtime_ns for p in (out / LINES_FOLDER).iterdir()}
    summary = run_batch(line_list, TEMPLATE, out, workers=1, progress=False)
    assert summary.designed == 0 and summary.reused == len(GOOD)
    assert {p.name: p.stat().st_mtime_ns for p in (out / LINES_FOLDER).iterdir()} == before
    assert (out / RESULTS_CSV).read_bytes() == (out1 / RESULTS_CSV).read_bytes()

    # one row edited (a longer line) and one moved to the end: only the edited one is designed again
    rows = [list(r) for r in ROWS]
    rows[0][4] = "55"
    rows.append(rows.pop(1))
    edited = _write_list(tmp_path / "edited.csv", rows)
    summary = run_batch(edited, TEMPLATE, out, workers=1, progress=False)
    assert summary.designed == 1 and summary.reused == len(GOOD) - 1
    results = {r["tag"]: r for r in _csv_rows(out)}
    assert float(results["FW-T-WF-1"]["length [m]"]) == 55.0
    assert int(results["FW-T-RS-2"]["row"]) == len(ROWS) + 1  # the moved line's row is its new one
    kept = {r["tag"]: r for r in _csv_rows(out1)}["FW-T-RS-2"]
    assert {k: v for k, v in results["FW-T-RS-2"].items() if k != "row"} == \
        {k: v for k, v in kept.items() if k != "row"}


def test_on_a_local_dask_cluster_the_results_are_those_of_the_local_run(one_worker, line_list, tmp_path):
    distributed = pytest.importorskip("distributed", reason="Dask distributed is not installed (the optional "
                                      "'cluster' extra; the 'test' extra installs it)")
    out1, _ = one_worker
    out = tmp_path / "dask"
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None) as cluster:
        summary = run_batch(line_list, TEMPLATE, out, scheduler=cluster.scheduler_address, progress=False, pdf=False)
    assert summary.designed == len(GOOD) and "Dask cluster" in summary.workers
    assert (out / RESULTS_CSV).read_bytes() == (out1 / RESULTS_CSV).read_bytes()
    assert _line_files(out) == _line_files(out1)


def test_a_spreadsheet_and_a_list_with_their_own_headers_give_the_same_results(one_worker, tmp_path):
    """The same lines as XLSX, and as CSV under other headers with the demo mapping file: every line is found
    done (same values, same fingerprint) and the results list is the same, byte for byte."""
    from openpyxl import Workbook

    out1, _ = one_worker
    mapping_file = ROOT / "sample_projects" / "line_list" / "columns_example.json"
    theirs = {ours: their for their, ours in json.loads(mapping_file.read_text(encoding="utf-8")).items()}
    renamed = tmp_path / "their_headers.csv"
    _write_list(renamed)
    text = renamed.read_text(encoding="utf-8").split("\n", 1)
    renamed.write_text(",".join(f'"{theirs.get(h, h)}"' for h in HEADER) + "\n" + text[1], encoding="utf-8")
    book = Workbook()
    sheet = book.active
    sheet.append(HEADER)
    for row in ROWS:
        sheet.append([float(c) if c.lstrip("-").replace(".", "", 1).isdigit() else (c or None) for c in row])
    book.save(tmp_path / "list.xlsx")
    for list_path, columns in ((renamed, str(mapping_file)), (tmp_path / "list.xlsx", None)):
        out = tmp_path / f"out_{list_path.suffix[1:]}"
        shutil.copytree(out1, out)
        summary = run_batch(list_path, TEMPLATE, out, columns=columns, workers=1, progress=False, pdf=False)
        assert summary.designed == 0 and summary.reused == len(GOOD), list_path.name
        assert (out / RESULTS_CSV).read_bytes() == (out1 / RESULTS_CSV).read_bytes(), list_path.name


# --------------------------------------------------------------------------- the command line


def test_the_cli_exits_0_when_every_line_holds(one_worker, tmp_path, capsys):
    out1, _ = one_worker
    held = {r["tag"] for r in _csv_rows(out1) if r["verdict"] in ("ok", "warning")}
    assert len(held) >= 3
    out = tmp_path / "held"
    shutil.copytree(out1, out)  # the lines are done: the run reuses them
    good = _write_list(tmp_path / "held.csv", [r for r in ROWS if r[0] in held])
    code = main(["batch", str(good), "--template", str(TEMPLATE), "-o", str(out), "--no-progress"])
    captured = capsys.readouterr()
    assert code == 0, captured.err
    assert f"{len(held)} kept from an earlier run" in captured.out


def _exit_code(argv: list[str]) -> int:
    try:
        return main(argv)
    except SystemExit as exc:  # argparse refuses an option's value itself (exit 2)
        return exc.code


@pytest.mark.parametrize("args, words", [
    (["--workers", "0"], "--workers"),
    (["--workers", "2", "--scheduler", "tcp://127.0.0.1:1"], "--workers"),
    (["--columns", "missing.json"], "column mapping"),
    (["--scheduler", "nonsense://nowhere"], "--scheduler"),
])
def test_the_cli_refuses_bad_options_with_exit_2(line_list, tmp_path, capsys, args, words):
    code = _exit_code(["batch", str(line_list), "--template", str(TEMPLATE), "-o", str(tmp_path / "o"), *args])
    assert code == 2
    assert words in capsys.readouterr().err


def test_the_cli_refuses_a_missing_list_or_template_with_exit_2(line_list, tmp_path, capsys):
    code = main(["batch", str(tmp_path / "none.csv"), "--template", str(TEMPLATE), "-o", str(tmp_path / "o")])
    assert code == 2 and "none.csv" in capsys.readouterr().err
    code = main(["batch", str(line_list), "--template", str(tmp_path / "none.json"), "-o", str(tmp_path / "o")])
    assert code == 2 and "--template" in capsys.readouterr().err
    with pytest.raises(BatchRefused, match="--units"):
        run_batch(line_list, TEMPLATE, tmp_path / "o", system="metric")
    header_only = _write_list(tmp_path / "empty.csv", [])
    code = main(["batch", str(header_only), "--template", str(TEMPLATE), "-o", str(tmp_path / "o")])
    assert code == 2 and "no lines" in capsys.readouterr().err


# --------------------------------------------------------------------------- progress


class _Terminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_the_progress_bar_redraws_in_place_on_a_terminal_and_writes_tenths_elsewhere():
    log = io.StringIO()
    bar = _Progress(40, log)
    for i in range(40):
        bar.update(designed=i % 4 != 0)
    bar.close()
    lines = log.getvalue().splitlines()
    assert lines[0] == "calorun batch: 40 lines"
    assert len(lines) == 11 and "(100 %)" in lines[-1] and "lines/s" in lines[1] and "left" in lines[1]

    terminal = _Terminal()
    bar = _Progress(3, terminal)
    bar._drawn = -1.0
    bar.update(designed=True)
    bar._drawn = -1.0
    bar.update(designed=True)
    bar.update(designed=False)
    bar.close()
    text = terminal.getvalue()
    assert text.count("\r") >= 3 and text.endswith("\n") and "3/3 lines" in text and "[" in text
