"""The report at scale and under hostile input (issue 9, deliverable 6): absurdly long names,
long lines, alternatives that cannot be solved, files that cannot be read.

The PDF's text is read back with pypdf (an independent PDF reader). Speed is measured by
``benchmarks/bench_report.py``, not here: a timed test fails on a busy machine, not on slow code.
What is checked here is what a reader or a script notices: a name that stalls nothing and is
printed once in full, a long line's table grouped by design, an exit code that says a line could
not be solved while the PDF still says which and why, a message instead of a traceback.
"""

from __future__ import annotations

import os
import re
import subprocess
import sys
import textwrap
from pathlib import Path

import pytest

pypdf = pytest.importorskip("pypdf")

from solver.model import Alternative, Feed, Layer, Pipe, Project, PureFluid, Segment, StillAir, Wind  # noqa: E402
from solver.project_io import save_project  # noqa: E402

ROOT = Path(__file__).resolve().parent.parent


def _text(path: Path) -> str:
    """All the PDF's text with every white space removed (long words are broken across lines)."""
    reader = pypdf.PdfReader(str(path))
    text = "".join(page.extract_text() or "" for page in reader.pages)
    for ligature, letters in (("\ufb00", "ff"), ("\ufb01", "fi"), ("\ufb02", "fl"), ("\ufb03", "ffi"), ("\ufb04", "ffl")):
        text = text.replace(ligature, letters)
    return re.sub(r"\s+", "", text)


def _run(*args: str, timeout: float = 240.0) -> subprocess.CompletedProcess:
    env = {k: v for k, v in os.environ.items() if k not in ("DISPLAY", "WAYLAND_DISPLAY")}
    env["PYTHONPATH"] = str(ROOT)
    env["QT_QPA_PLATFORM"] = "offscreen"
    return subprocess.run([sys.executable, *args], cwd=ROOT, env=env, capture_output=True, text=True, timeout=timeout)


def _line(name: str = "Good", segments=None, mass_flow: float = 0.5) -> Alternative:
    return Alternative(
        name=name, fluid=PureFluid(name="Water"),
        feed=Feed(inlet_temperature_K=333.15, inlet_pressure_Pa=4e5, mass_flow_kg_per_s=mass_flow),
        segments=segments or [Segment(name="Rack", length_m=20.0, pipe=Pipe(nps="2", schedule="40"),
                                      insulation=[Layer(thickness_m=0.03, conductivity_W_per_mK=0.04)],
                                      surroundings=StillAir(temperature_K=278.15))],
    )


def test_ten_million_character_names_are_shortened_and_printed_once_in_full(tmp_path):
    """A 10-million-character project name and segment name (as a recovery file or an older limit
    may hold; the model's own name limit is not relied on): the report is written (in a child
    process with a time limit, so a stall fails instead of hanging the suite), the names show
    shortened with "…" in headings and tables, and each is printed in full exactly once, cut at a
    sane length with a note of its true length."""
    out = tmp_path / "long.pdf"
    script = textwrap.dedent(f"""
        from app.report import write_report
        from solver.model import Alternative, Feed, Layer, Pipe, Project, PureFluid, Segment, StillAir
        seg = Segment(name="Rack", length_m=20.0, pipe=Pipe(nps="2", schedule="40"),
                      insulation=[Layer(thickness_m=0.03, conductivity_W_per_mK=0.04)],
                      surroundings=StillAir(temperature_K=278.15))
        seg = seg.model_copy(update={{"name": "S" + "abcdefghij" * 1_000_000}})  # past any validation
        alt = Alternative(name="Good", fluid=PureFluid(name="Water"), segments=[seg],
                          feed=Feed(inlet_temperature_K=333.15, inlet_pressure_Pa=4e5, mass_flow_kg_per_s=0.5))
        project = Project(name="Short", alternatives=[alt]).model_copy(update={{"name": "P" + "0123456789" * 1_000_000}})
        write_report(project, {str(out)!r})
    """)
    proc = _run("-c", script, timeout=240)
    assert proc.returncode == 0, proc.stderr[-2000:]
    text = _text(out)
    project_name = "P" + "0123456789" * 1_000_000
    segment_name = "S" + "abcdefghij" * 1_000_000
    # shown shortened: the start of each name followed by "…" (the heading, the tables)
    assert re.search(re.escape(project_name[:100]) + r"[0-9]*…", text)
    assert re.search(re.escape(segment_name[:50]) + r"[a-j]*…", text)
    # in full once: the first 1,000 characters occur exactly once, with the note of the true length
    assert text.count(project_name[:1000]) == 1
    assert text.count(segment_name[:1000]) == 1
    assert text.count("(nameshortened:10,000,001characters)") == 2
    assert segment_name[:5000] not in text  # cut at a sane length


def test_long_line_tables_grouped_by_design(tmp_path):
    """A line of 70 segments in two alternating designs: one table row per design, with its count
    and its segments' numbers, and the names shortened only where they are long."""
    from app.report import write_report
    from app.reporting.content import FULL_TABLE_SEGMENTS

    def seg(i):
        air = StillAir(temperature_K=278.15) if i % 2 == 0 else Wind(temperature_K=268.15, wind_speed_m_per_s=5.0)
        return Segment(name=f"Span {i + 1}", length_m=10.0 + (i % 4), pipe=Pipe(nps="2", schedule="40"),
                       insulation=[Layer(thickness_m=0.03, conductivity_W_per_mK=0.04)], surroundings=air)

    n = 70
    assert n > FULL_TABLE_SEGMENTS  # precondition: a long line
    project = Project(name="Long line", alternatives=[_line(segments=[seg(i) for i in range(n)])])
    text = _text(write_report(project, tmp_path / "grouped.pdf"))
    assert text.count("35segments") >= 4  # both designs, in the Segments and the Per segment design tables
    assert "#1,3,5,7,…,69" in text and "#2,4,6,8,…,70" in text
    assert "Span3" not in text and "Span70" not in text  # no row per segment
    total = sum(10.0 + (i % 4) for i in range(0, n, 2))  # the stiff-air design's length, summed by hand
    assert f"{total:.1f}" in text


def test_failed_alternative_exit_code_and_pdf(tmp_path):
    """`calorun report` writes the PDF, names the alternative that could not be solved and why, and
    exits 1 (a script must not take the report for a solved design); `calorun solve` agrees."""
    impossible = Alternative(
        name="Too much flow", fluid=PureFluid(name="Water"),
        feed=Feed(inlet_temperature_K=293.15, inlet_pressure_Pa=1.5e5, mass_flow_kg_per_s=5.0),
        segments=[Segment(name="Narrow", length_m=500.0, pipe=Pipe(nps="1", schedule="80"))])
    path = save_project(Project(name="Partly failing", alternatives=[_line(), impossible]), tmp_path / "p.json")
    out = tmp_path / "p.pdf"
    proc = _run("-m", "app.cli", "report", str(path), "-o", str(out))
    assert proc.returncode == 1, proc.stderr
    assert "Traceback" not in proc.stderr
    assert "'Too much flow' could not be solved" in proc.stderr
    text = _text(out)
    assert "Thisalternativecouldnotbesolved" in text and "notsolved" in text
    reason = proc.stderr.split("could not be solved: ", 1)[1].splitlines()[0]
    assert re.sub(r"\s+", "", reason)[:40] in text  # the same reason, in the PDF

    solved = _run("-m", "app.cli", "solve", str(path))
    assert solved.returncode == 1 and "Traceback" not in solved.stderr
    assert "'Too much flow' could not be solved" in solved.stderr

    good_only = _run("-m", "app.cli", "report", str(path), "-o", str(tmp_path / "g.pdf"), "--alternative", "Good")
    assert good_only.returncode == 0, good_only.stderr


def test_exit_codes_in_help():
    proc = _run("-m", "app.cli", "report", "--help", timeout=60)
    assert proc.returncode == 0
    words = " ".join(proc.stdout.split())
    assert "exit codes: 0" in words and "1 an alternative could not be solved" in words and "2 an invalid" in words


def test_huge_insulation_thickness_gives_a_message_not_a_traceback(tmp_path):
    """Issue 9: `calorun report` on a file with an insulation thickness of 1e308 m ended in a
    traceback. Refused at load (exit 2) or reported as not solved (exit 1): either way a message."""
    project = Project(name="Huge", alternatives=[_line()])
    path = save_project(project, tmp_path / "huge.json")
    raw = path.read_text(encoding="utf-8")
    raw = re.sub(r'"thickness_m":\s*0\.03', '"thickness_m": 1e308', raw)
    assert "1e308" in raw
    path.write_text(raw, encoding="utf-8")
    for cmd in (["report", str(path), "-o", str(tmp_path / "huge.pdf")], ["solve", str(path)]):
        proc = _run("-m", "app.cli", *cmd)
        assert proc.returncode in (1, 2), proc.stderr
        assert "Traceback" not in proc.stderr and proc.stderr.strip()


def test_numerical_failure_in_the_report_path_is_worded(tmp_path, monkeypatch, capsys):
    """A solve that fails with a bare numerical error (the solver's own bug) is not a traceback: the
    PDF says the alternative could not be solved and why in plain words, and the exit code is 1."""
    import solver
    from app import cli

    path = save_project(Project(name="Numbers", alternatives=[_line()]), tmp_path / "n.json")

    def broken(alt, *a, **k):
        raise OverflowError("cannot convert float infinity to integer")

    monkeypatch.setattr(solver, "solve", broken)
    out = tmp_path / "n.pdf"
    assert cli.main(["report", str(path), "-o", str(out)]) == 1
    err = capsys.readouterr().err
    assert "'Good' could not be solved" in err and "numerical problem" in err
    assert "numericalproblem" in _text(out) and "faultinCalorun" in _text(out)
    assert cli.main(["solve", str(path)]) == 1
    assert "numerical problem" in capsys.readouterr().err
