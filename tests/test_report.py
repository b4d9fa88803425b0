"""The summary report (PDF), produced headless.

The text of the PDF is extracted with pypdf (an independent PDF reader) and
compared with what the solver computes for the same alternatives, formatted
with app.units exactly as the report states them.
"""

from __future__ import annotations

import os
import re
import subprocess
import sys
from pathlib import Path

import pytest

pypdf = pytest.importorskip("pypdf")

from app import comparison, units  # noqa: E402
from app.report import write_report  # noqa: E402
from solver import solve  # noqa: E402
from solver.model import (  # noqa: E402
    Alternative,
    Feed,
    Fitting,
    Layer,
    Project,
    PureFluid,
    Segment,
    SolutionFluid,
    StillAir,
    Targets,
    Wind,
)

ROOT = Path(__file__).resolve().parent.parent
SAMPLE = ROOT / "sample_projects" / "traced_residue_line.json"


def _norm(text: str) -> str:
    """Whitespace-insensitive text (PDF extraction breaks lines; numbers use thin spaces)."""
    text = text.replace("\u2009", " ").replace("\u00a0", " ")
    for ligature, letters in (("\ufb00", "ff"), ("\ufb01", "fi"), ("\ufb02", "fl"), ("\ufb03", "ffi"), ("\ufb04", "ffl")):
        text = text.replace(ligature, letters)
    return re.sub(r"\s+", " ", text).strip()


def _pages(path: Path) -> list[str]:
    reader = pypdf.PdfReader(str(path))
    return [_norm(page.extract_text() or "") for page in reader.pages]


def _demo_project() -> Project:
    """Invented demo: a glycol line in a fictional plant, three alternatives."""

    def alt(name, tracing, thickness):
        layers = [Layer(thickness_m=thickness, conductivity_W_per_mK=0.04)]
        return Alternative(
            name=name,
            fluid=SolutionFluid(solute="MEG", concentration=0.3),
            feed=Feed(inlet_temperature_K=333.15, inlet_pressure_Pa=4.0e5, mass_flow_kg_per_s=0.5),
            segments=[
                Segment(name="Tank outlet", length_m=10.0, fittings=[Fitting(count=2)], insulation=layers),
                Segment(name="Rack", length_m=70.0, heat_input_W_per_m=tracing, insulation=layers,
                        surroundings=Wind(temperature_K=263.15)),
                Segment(name="Riser", length_m=9.0, elevation_change_m=7.0, insulation=layers),
            ],
        )

    return Project(
        name="Demo glycol line",
        prepared_by="Process group (demo)",
        revision="C",
        alternatives=[alt("Trace 20 W/m", 20.0, 0.03), alt("Thick wool", 0.0, 0.08), alt("Trace 10 W/m", 10.0, 0.05)],
        baseline="Thick wool",
        targets=Targets(outlet_temperature_min_K=328.15, max_pressure_drop_Pa=2.0e5, max_heat_input_W=1200.0),
    )


def _sample_project() -> Project:
    if SAMPLE.exists():
        from solver.project_io import load_project

        project = load_project(SAMPLE)
        if len(project.alternatives) >= 2:
            return project
    return _demo_project()


@pytest.fixture(scope="module")
def sample(tmp_path_factory):
    project = _sample_project()
    path = write_report(project, tmp_path_factory.mktemp("rep") / "summary.pdf", "SI", date="2026-12-01")
    # as the report solves them: with the project's design cases (their checks count in the verdict)
    results = {a.name: solve(a, design=project.design_cases) for a in project.alternatives}
    return project, path, _pages(path), results


def test_page_count_and_numbering(sample):
    project, path, pages, _ = sample
    n = len(pages)
    # title + comparison, one section per alternative, methods and cautions
    assert n >= len(project.alternatives) + 2
    for i, text in enumerate(pages, start=1):
        assert f"Page {i} of {n}" in text
        assert "Calorun" in text
        assert _norm(project.name)[:30] in text  # running header


def test_title_block(sample):
    project, _, pages, _ = sample
    first = pages[0]
    assert _norm(project.name) in first
    assert "2026-12-01" in first
    if project.prepared_by:
        assert _norm(project.prepared_by) in first
    if project.revision:
        assert f"Revision {project.revision}" in first


def test_key_figures_as_solved(sample):
    project, _, pages, results = sample
    text = " ".join(pages)
    for name, r in results.items():
        assert _norm(name) in text
        for value, quantity in [
            (r.outlet_temperature_K, "temperature"),
            (r.max_inner_wall_temperature_K, "temperature"),
            (r.inlet_pressure_Pa - r.outlet_pressure_Pa, "pressure_difference"),
            (r.heat_loss_W, "power"),
            (r.outlet_pressure_Pa, "pressure"),
        ]:
            expected = _norm(units.format_value(value, quantity, "SI"))
            assert expected in text, (name, quantity, expected)


def test_alternative_section_has_its_figures_together(sample):
    project, _, pages, results = sample
    for name, r in results.items():
        # the page that opens the alternative's section holds its feed and segment names
        section = next(p for p in pages if f"ALTERNATIVE" in p and _norm(name) in p and "Segments (in flow order)" in p)
        for seg in project.alternatives[[a.name for a in project.alternatives].index(name)].segments:
            assert _norm(seg.name) in section


def test_comparison_differences_printed(sample):
    project, _, pages, results = sample
    text = " ".join(pages)
    base_name = project.baseline_alternative().name
    base = results[base_name]
    spec = next(s for s in comparison.KEY_FIGURE_SPECS if s.key == "outlet_temperature_K")
    for name, r in results.items():
        if name == base_name:
            continue
        diff = r.outlet_temperature_K - base.outlet_temperature_K  # independent subtraction
        expected = comparison.format_difference(diff, base.outlet_temperature_K, spec, "SI")
        assert _norm(expected) in text


def test_verdicts_count_targets_and_checks(sample):
    """Each alternative's verdict counts its targets met and its danger and warning checks."""
    project, _, pages, results = sample
    text = " ".join(pages)
    if not comparison.targets_set(project.targets):
        pytest.skip("sample has no targets")
    assert "Design targets" in text
    for name, r in results.items():
        verdicts = comparison.target_verdicts(project.targets, r)
        section = _section(pages, name)
        verdict = section.split("Verdict:", 1)[1][:160]
        assert f"{sum(v.met for v in verdicts)}/{len(verdicts)} targets met" in verdict, (name, verdict)
        for severity in ("danger", "warning"):
            n = sum(c.severity == severity for c in r.checks)  # counted here from the solver's checks
            if n:
                assert f"{n} {severity}" in verdict, (name, verdict)
        if not any(c.severity in ("danger", "warning") for c in r.checks):
            assert "no warnings" in verdict


def _section(pages: list[str], name: str) -> str:
    """The text of the page that opens an alternative's section."""
    return next(p for p in pages if "ALTERNATIVE" in p and "Segments (in flow order)" in p and _norm(name) in p)


def _coloured_text(path: Path, page_index: int) -> list[tuple[str, tuple]]:
    """(text, fill colour as RGB 0..1) of each text run on a page, read from the PDF's operators."""
    page = pypdf.PdfReader(str(path)).pages[page_index]
    state = {"colour": (0.0, 0.0, 0.0)}
    stack, runs = [], []

    def before(op, args, cm, tm):
        if op == b"q":
            stack.append(state["colour"])
        elif op == b"Q" and stack:
            state["colour"] = stack.pop()
        elif op in (b"rg", b"scn", b"sc") and len(args) == 3:
            state["colour"] = tuple(round(float(a), 3) for a in args)

    def visit(t, cm, tm, font, size):
        if t.strip():
            runs.append((_norm(t.replace("\t", " ")), state["colour"]))

    page.extract_text(visitor_operand_before=before, visitor_text=visit)
    return runs


def _rgb(hex_colour: str) -> tuple:
    return tuple(round(int(hex_colour[i:i + 2], 16) / 255, 3) for i in (1, 3, 5))


def test_verdict_shows_the_no_flow_danger(tmp_path):
    """A design that meets all its targets but fails a check is never shown as simply "met"
    (issue 7: "No tracing: 4 of 4 targets met" beside a line that freezes with the flow stopped)."""
    from app.style import MET_COLOUR, VERDICT_COLOURS

    project = _sample_project()
    name = "No tracing, 80 mm wool"
    if name not in [a.name for a in project.alternatives]:
        pytest.skip("sample changed")
    r = solve(next(a for a in project.alternatives if a.name == name))
    worst = [c for c in r.checks if c.severity in ("danger", "warning") and c.code.startswith("NO_FLOW")]
    assert worst, "precondition: the sample's untraced line has a no-flow check"
    assert all(v.met for v in comparison.target_verdicts(project.targets, r))  # and meets its targets
    path = write_report(project, tmp_path / "verdict.pdf", alternatives=[name])
    pages = _pages(path)
    section_index = next(i for i, p in enumerate(pages) if "ALTERNATIVE" in p and "Segments (in flow order)" in p)
    glance = pages[0].split("Verdict at a glance", 1)[1]
    severity = "danger" if any(c.severity == "danger" for c in r.checks) else "warning"
    first = next(c for c in r.checks if c.severity == severity)  # the solver lists the worst first
    for text in (glance, pages[section_index].split("Verdict:", 1)[1]):
        assert f"{severity}: {_norm(first.title)}" in text[:400]
        assert "no warnings" not in text[:400]
    # the verdict is printed in the colour of its level, not in the "met" green
    runs = _coloured_text(path, section_index)
    verdict_runs = [c for t, c in runs if "targets met" in t]
    assert verdict_runs, runs[:10]
    level = "danger" if severity == "danger" else "warning"
    assert verdict_runs[0] == _rgb(VERDICT_COLOURS[level]) != _rgb(MET_COLOUR)


def test_given_results_are_not_solved_again(tmp_path, monkeypatch):
    """Export PDF hands over the results the app holds; the report must not solve them again."""
    import solver

    project = _demo_project()
    held = {a.name: solve(a) for a in project.alternatives[:2]}
    calls = []
    real_solve = solver.solve
    monkeypatch.setattr(solver, "solve", lambda alt, *a, **k: calls.append(alt.name) or real_solve(alt, *a, **k))
    path = write_report(project, tmp_path / "held.pdf", results=held)
    assert calls == [project.alternatives[2].name]  # only the one not handed over
    text = " ".join(_pages(path))
    for r in held.values():
        assert _norm(units.format_value(r.outlet_temperature_K, "temperature", "SI")) in text


def test_one_description_of_the_fluid(tmp_path):
    """The fluid reads the same in every section: the solver's own label, e.g. "Ethylene glycol 30 % (mass)"."""
    project = _demo_project()  # MEG at 30 % by mass (CoolProp INCOMP "MEG": ethylene glycol, mass based)
    path = write_report(project, tmp_path / "fluid.pdf", alternatives=["Thick wool", "Trace 10 W/m"])
    text = " ".join(_pages(path))
    label = solve(project.alternatives[1]).fluid_label
    assert label == "Ethylene glycol 30 % (mass)"
    assert text.count(label) == 3  # the job sentence and each alternative's Feed table
    assert "MEG" not in text


def test_key_figures_use_the_one_list(tmp_path):
    """Labels as the one list writes them; a heat loss that is a gain reads as a gain, sign turned."""
    from solver.results import KEY_FIGURES

    project = _demo_project()
    warm = project.alternatives[1].model_copy(update={
        "name": "Warm hall",
        "segments": [s.model_copy(update={"surroundings": StillAir(temperature_K=363.15)})
                     for s in project.alternatives[1].segments],
    })
    project = project.model_copy(update={"alternatives": [warm], "baseline": "Warm hall"})
    r = solve(warm)
    assert r.heat_loss_W < 0  # precondition: air at 90 °C heats a line carrying 60 °C glycol
    section = _section(_pages(write_report(project, tmp_path / "kf.pdf")), "Warm hall")
    figures = section.split("Key Figures", 1)[1]
    for spec in KEY_FIGURES:
        label = spec.negative_label if spec.key == "heat_loss_W" else spec.label
        assert _norm(label) in figures, label
    assert "Heat loss to surroundings" not in figures
    gained = _norm(units.format_value(-r.heat_loss_W, "power", "SI"))
    assert f"Heat gained from surroundings {gained}" in figures


def test_cautions_methods_assumptions(sample):
    _, _, pages, results = sample
    text = " ".join(pages)
    for phrase in [
        "engineering estimates",
        "Hot surfaces burn",
        "overpressure",
        "freeze",
        "boil",
        "hazardous",
        "temperature-class",
        "local codes",
        "piping and electrical standards",
        "licensed engineering review",
        "Assumptions and limits",
    ]:
        assert phrase in text, phrase
    # each method the solver reports is printed with its published source
    # (compared without whitespace: text extraction breaks lines inside formulas)
    squashed = re.sub(r"\s+", "", text)
    for r in results.values():
        for method in r.methods:
            source = method.partition(": ")[2] or method
            assert re.sub(r"\s+", "", _norm(source)) in squashed, method


def test_user_text_printed_as_typed(tmp_path):
    project = Project(
        name='<b>Bold</b> & "quoted" line',
        description="Tags like <script>x</script> & entities like &amp; stay text.",
        prepared_by="R&D <team>",
        alternatives=[Alternative(name="<i>Alt</i> & 1", segments=[Segment(name="<seg> & co")]),
                      Alternative(name="Plain", segments=[Segment()])],
    )
    path = write_report(project, tmp_path / "esc.pdf")
    text = " ".join(_pages(path))
    for typed in ['<b>Bold</b> & "quoted" line', "<script>x</script> & entities like &amp; stay text.",
                  "R&D <team>", "<i>Alt</i> & 1", "<seg> & co"]:
        assert typed in text, typed


def test_failed_alternative_is_reported_not_raised(tmp_path):
    project = Project(
        name="Partly failing",
        alternatives=[
            Alternative(name="Good", segments=[Segment()]),
            Alternative(name="Bad fluid", fluid=PureFluid(name="Unobtainium"), segments=[Segment()]),
        ],
    )
    path = write_report(project, tmp_path / "fail.pdf")
    text = " ".join(_pages(path))
    assert "could not be solved" in text
    assert "Unobtainium" in text
    good = solve(project.alternatives[0])
    assert _norm(units.format_value(good.outlet_temperature_K, "temperature", "SI")) in text


def test_us_units(tmp_path):
    project = _demo_project()
    path = write_report(project, tmp_path / "us.pdf", "US", alternatives=["Thick wool"])
    pages = _pages(path)
    text = " ".join(pages)
    r = solve(project.alternatives[1])
    assert _norm(units.format_value(r.outlet_temperature_K, "temperature", "US")) in text
    assert _norm(units.format_value(r.inlet_pressure_Pa - r.outlet_pressure_Pa, "pressure_difference", "US")) in text
    assert "°F" in text and "psia" in text
    assert "Trace 20 W/m" not in text  # only the chosen alternative
    # US customary reports go on Letter paper: 612 x 792 pt (ANSI/ASME Y14.1)
    box = pypdf.PdfReader(str(path)).pages[0].mediabox
    assert (round(float(box.width)), round(float(box.height))) == (612, 792)


def test_unknown_alternative_is_named(tmp_path):
    with pytest.raises(ValueError, match="'Nope'"):
        write_report(_demo_project(), tmp_path / "x.pdf", alternatives=["Nope"])
    assert not (tmp_path / "x.pdf").exists()


def test_rows_never_cut(tmp_path):
    """A long segments table: each row's lines stay on one page."""
    segments = [
        Segment(name=f"Piece {i:02d}", length_m=5.0 + i,
                fittings=[Fitting(kind="custom", K=1.11 + i / 100.0, label=f"item {i:02d}")],
                insulation=[Layer(thickness_m=0.03, conductivity_W_per_mK=0.04)],
                surroundings=StillAir(temperature_K=278.15))
        for i in range(45)
    ]
    project = Project(name="Long line", alternatives=[Alternative(name="Long", segments=segments)])
    pages = _pages(write_report(project, tmp_path / "long.pdf"))
    squashed = [re.sub(r"\s+", "", p) for p in pages]
    for i in range(45):
        k = 1.11 + i / 100.0
        # the fittings cell: first line "1 × item NN (K k)", second line "ΣK k" (extraction order)
        cell = f"1×item{i:02d}(K{k:g})ΣK{k:.3g}"
        assert any(cell in p for p in squashed), cell


def _straddling_rows(doc, page_h):
    """Rows of any table whose text starts on one page and ends on the next (Qt layout API)."""
    from PySide6.QtGui import QTextCursor

    layout = doc.documentLayout()

    def line_top_bottom(block):
        r = layout.blockBoundingRect(block)
        bl = block.layout()
        first, last = bl.lineAt(0), bl.lineAt(bl.lineCount() - 1)
        return r.top() + first.y(), r.top() + last.y() + last.height()

    bad, seen = [], set()
    block = doc.begin()
    while block.isValid():
        table = QTextCursor(block).currentTable()
        if table is not None and table.firstPosition() not in seen:
            seen.add(table.firstPosition())
            for row in range(table.rows()):
                tops, bottoms = [], []
                for col in range(table.columns()):
                    cell = table.cellAt(row, col)
                    tops.append(line_top_bottom(cell.firstCursorPosition().block())[0])
                    bottoms.append(line_top_bottom(cell.lastCursorPosition().block())[1])
                if int(min(tops) // page_h) != int((max(bottoms) - 1e-6) // page_h):
                    bad.append((table.cellAt(row, 0).firstCursorPosition().block().text(), min(tops) / page_h))
        block = block.next()
    return bad


@pytest.mark.parametrize("extra_lines", [0, 3, 7])
def test_no_row_straddles_a_page_break(tmp_path, monkeypatch, extra_lines):
    """Comparison rows hold a value and its difference on two lines; Qt alone may
    split such a row across pages. The final layout must have none."""
    import app.reporting.pdf as pdf

    found = []
    monkeypatch.setattr(pdf, "LAYOUT_HOOK", lambda doc, page_h: found.extend(_straddling_rows(doc, page_h)))
    # a long description shifts every table down by whole lines
    project = _demo_project().model_copy(update={"description": " ".join(["Shift the layout by a few lines."] * (8 * extra_lines))})
    write_report(project, tmp_path / "rows.pdf")
    assert found == []


def test_cli_report_without_display(tmp_path):
    out = tmp_path / "cli.pdf"
    env = {k: v for k, v in os.environ.items() if k not in ("DISPLAY", "WAYLAND_DISPLAY", "QT_QPA_PLATFORM")}
    env["PYTHONPATH"] = str(ROOT)
    project_file = SAMPLE
    if not project_file.exists():
        from solver.project_io import save_project

        project_file = tmp_path / "demo.json"
        save_project(_demo_project(), project_file)
    proc = subprocess.run(
        [sys.executable, "-m", "app.cli", "report", str(project_file), "-o", str(out)],
        cwd=ROOT, env=env, capture_output=True, text=True, timeout=180,
    )
    assert proc.returncode == 0, proc.stderr
    assert out.exists() and len(_pages(out)) >= 3
