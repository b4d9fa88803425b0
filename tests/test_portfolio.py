"""The Line List's summary PDF (app.reporting.portfolio): the portfolio page's totals and counts, the
lines that fail and why, the table or one page per line, the cautions, and paging that stays linear.

The PDF's text is read back with pypdf (an independent PDF reader), as the report's tests do. Totals are
checked against sums worked out by hand in the comments (closed form: plain addition). Unit conversion:
1 ft = 0.3048 m exactly (international yard and pound agreement, 1959; NIST SP 811). Rows are invented
(the fictional plant Fernbrook Works).
"""

from __future__ import annotations

import math
import re
from pathlib import Path

import pytest

pypdf = pytest.importorskip("pypdf")

import app.reporting.pdf as pdf  # noqa: E402
from app.reporting.portfolio import build_body, portfolio, why_text, write_portfolio  # noqa: E402
from solver.line_design import LineResult  # noqa: E402
from solver.results import CAUTIONS, CAUTIONS_BANNER  # noqa: E402


def _pages(path: Path) -> list[str]:
    """Each page's text with all white space removed (PDF extraction breaks lines; numbers use thin spaces)."""
    out = []
    for page in pypdf.PdfReader(str(path)).pages:
        text = page.extract_text() or ""
        for ligature, letters in (("\ufb00", "ff"), ("\ufb01", "fi"), ("\ufb02", "fl"), ("\ufb03", "ffi"),
                                  ("\ufb04", "ffl")):
            text = text.replace(ligature, letters)
        out.append(re.sub(r"\s+", "", text))
    return out


def _squash(text: str) -> str:
    return re.sub(r"\s+", "", text)


def _line(tag: str, row: int, verdict: str = "ok", **kw) -> LineResult:
    figures = dict(length_m=40.0, maintain_temperature_K=278.15, heat_loss_W_per_m=12.0, heat_loss_W=480.0,
                   required_output_W_per_m=14.4, chosen_output_W_per_m=15.0, installed_power_W=600.0,
                   hot_case_max_wall_K=330.0, hold_time_s=7200.0)
    if verdict == "error":
        figures = {}
    figures.update(kw)
    return LineResult(tag=tag, row=row, verdict=verdict, **figures)


FAIL_WORDS = "In the worst case the bulk falls to 1.2 °C, below the maintain temperature 5.0 °C."
ERROR_WORDS = "row 6, column 'length [m]': '-3' — must be more than 0 m"


def _mixed() -> list[LineResult]:
    return [
        _line("FW-2-RS-1001", 2, installed_power_W=600.0, heat_loss_W=480.0),
        _line("FW-2-RS-1002", 3, "warning", installed_power_W=1250.0, heat_loss_W=1000.0,
              worst_check="HOT_CASE_WALL", message="The hot case's wall reaches 71 °C."),
        _line("FW-3-CW-1003", 4, "fails", installed_power_W=2600.0, heat_loss_W=2210.0,
              worst_check="DESIGN_NOT_HELD", message=FAIL_WORDS),
        _line("FW-3-CW-1004", 5, installed_power_W=math.nan, heat_loss_W=150.0),  # needs no heater
        _line("FW-BAD-1005", 6, "error", message=ERROR_WORDS),
    ]


def test_totals_are_the_sums_of_the_rows():
    p = portfolio(_mixed())
    # installed power: 600 + 1250 + 2600 = 4450 W (the unheated line and the error line have none)
    assert p.installed_power_W == pytest.approx(4450.0, rel=1e-12)
    assert p.installed_power_lines == 3
    # heat loss: 480 + 1000 + 2210 + 150 = 3840 W
    assert p.heat_loss_W == pytest.approx(3840.0, rel=1e-12)
    assert p.heat_loss_lines == 4
    # length: 4 lines × 40 m = 160 m
    assert p.length_m == pytest.approx(160.0) and p.length_lines == 4
    assert p.counts == {"ok": 2, "warning": 1, "fails": 1, "error": 1}
    assert [r.tag for r in p.problems] == ["FW-3-CW-1003", "FW-BAD-1005"]


def test_heat_loss_from_per_metre_times_length_when_the_row_has_no_total():
    # 12 W/m × 40 m = 480 W; 20 W/m × 10 m = 200 W: 680 W
    rows = [_line("A", 2, heat_loss_W=math.nan), _line("B", 3, heat_loss_W=math.nan, heat_loss_W_per_m=20.0,
                                                         length_m=10.0)]
    assert portfolio(rows).heat_loss_W == pytest.approx(680.0, rel=1e-12)


def test_portfolio_page_prints_totals_counts_and_failing_lines_with_reasons(tmp_path):
    path = write_portfolio(_mixed(), tmp_path / "summary.pdf", list_name="fernbrook_line_list.csv",
                           title="Fernbrook Works tracing", date="2026-01-02")
    pages = _pages(path)
    front = pages[0]
    assert "FernbrookWorkstracing" in front and "fernbrook_line_list.csv" in front
    assert "4.450kW" in front  # 4450 W in kW, four significant digits (app.units)
    assert "3.840kW" in front
    assert "overs3linesof5" in front.replace("over3lines", "overs3lines")  # power is over 3 of 5 lines
    # counts by verdict: 2 OK, 1 warning, 1 fails, 1 not designed (40 %, 20 %, 20 %, 20 %)
    assert re.search(r"✓OK240%", front) and re.search(r"!Warning120%", front)
    assert re.search(r"✗Fails120%", front) and re.search(r"✗Notdesigned120%", front)
    # the failing lines, each with its reason in plain words; the OK and warning lines are not listed there
    section = front.split("Linesthatfailorcouldnotbedesigned", 1)[1]
    assert "FW-3-CW-1003" in section and _squash(FAIL_WORDS) in section
    assert "Tracingcannotholdintheworstcase" in section  # DESIGN_NOT_HELD's title (solver.results.CHECK_TITLES)
    assert "FW-BAD-1005" in section and _squash(ERROR_WORDS) in section
    assert "FW-2-RS-1001" not in section and "FW-2-RS-1002" not in section
    # then the table of every line, with its verdict
    table = "".join(pages[1:])
    for r in _mixed():
        assert r.tag in table


def test_the_pdf_carries_the_cautions_and_defers_to_codes_and_review(tmp_path):
    for pages in ("table", "per-line"):
        text = "".join(_pages(write_portfolio(_mixed(), tmp_path / f"{pages}.pdf", pages=pages)))
        assert _squash(CAUTIONS_BANNER) in text
        for caution in CAUTIONS:
            assert _squash(caution) in text
        assert "Defertolocalcodesandlicensedengineeringreview" in text
        # the running footer on every page
        assert all("defertocodes,standardsandlicensedreview" in p for p in _pages(tmp_path / f"{pages}.pdf"))


def test_per_line_pages_one_line_each(tmp_path, monkeypatch):
    rows = _mixed()
    calls = _layouts(monkeypatch)
    pages = _pages(write_portfolio(rows, tmp_path / "per-line.pdf", pages="per-line"))
    assert len(pages) == 1 + len(rows) + 1  # portfolio page, one per line, cautions
    assert [moved for n, moved in calls if n == len(pages)] == [False]  # the whole document laid out once
    for i, r in enumerate(rows):
        assert r.tag in pages[1 + i]
        assert all(r.tag not in p for j, p in enumerate(pages[1:-1]) if j != i)
    assert _squash(FAIL_WORDS) in pages[3] and _squash(ERROR_WORDS) in pages[5]
    assert "15.0W/m" in pages[1]  # the chosen rating with its unit


def test_us_units_convert_per_metre_figures(tmp_path):
    # 32.8084 W/m × 0.3048 m/ft = 10.0000 W/ft (1 ft = 0.3048 m exactly)
    rows = [_line("FW-US-1", 2, heat_loss_W_per_m=32.8084, required_output_W_per_m=32.8084)]
    text = "".join(_pages(write_portfolio(rows, tmp_path / "us.pdf", system="US", pages="per-line")))
    assert "10.0W/ft" in text


def test_bad_arguments_name_the_field():
    with pytest.raises(ValueError, match="pages: expected one of table, per-line, got 'tabel'"):
        build_body([], pages="tabel")
    with pytest.raises(ValueError, match="system: expected one of SI, US, got 'metric'"):
        build_body([], system="metric")


def test_why_text_words():
    assert why_text(_line("E", 2, "error", message=ERROR_WORDS)) == ERROR_WORDS
    w = _line("W", 2, "warning", worst_check="HOT_CASE_WALL", worst_check_message="The wall reaches 71 °C.")
    assert why_text(w) == "The wall reaches 71 °C."


def _layouts(monkeypatch) -> list[tuple[int, bool]]:
    """Each layout of a document as (pages, whether a break was moved and it is laid out again)."""
    calls = []
    original = pdf.find_break

    def counting(doc, page_h, body):
        moved = original(doc, page_h, body)
        calls.append((doc.pageCount(), moved))
        return moved

    monkeypatch.setattr(pdf, "find_break", counting)
    return calls


@pytest.mark.parametrize("n", [250])
def test_table_of_many_lines_pages_linearly_and_lays_out_once(tmp_path, monkeypatch, n):
    """250 lines (every fifth fails, with reasons of different lengths): the long table is laid out once (no relayout per
    page, which would grow as the square of the list), and its pages grow in proportion to the lines."""

    def rows(count):
        # every fifth line fails, with reasons of one to four sentences: rows of different heights, some of
        # which fall across a page boundary of the failing-lines table
        return [_line(f"FW-{i % 7 + 1}-RS-{1000 + i}", i + 2, "fails" if i % 5 == 3 else "ok",
                      message=" ".join([FAIL_WORDS] * (1 + i % 4)) if i % 5 == 3 else "") for i in range(count)]

    calls = _layouts(monkeypatch)
    pages = {}
    for count in (n // 2, n, 2 * n):
        calls.clear()
        path = write_portfolio(rows(count), tmp_path / f"p{count}.pdf", date="2026-01-02")
        reader = pypdf.PdfReader(str(path))
        pages[count] = len(reader.pages)
        final = calls[-1][0]
        assert calls[-1][1] is False
        whole = [c for c in calls if c[0] >= final - 2]  # layouts of the whole document (not the front alone)
        assert len(whole) == 1, calls
        last_table_page = reader.pages[-2].extract_text()  # the last page holds the cautions
        assert f"FW-{(count - 1) % 7 + 1}-RS-{1000 + count - 1}" in last_table_page  # the last line is printed
    # the table's pages: twice the lines, twice the pages (±1 for a part-filled last page)
    step1, step2 = pages[n] - pages[n // 2], pages[2 * n] - pages[n]
    assert pages[2 * n] > pages[n] > pages[n // 2]
    assert abs(step2 - 2 * step1) <= 2, pages
