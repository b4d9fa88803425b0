"""Uncertainty bands (solver.uncertainty): perturb each method by its accuracy, re-solve, combine.

Checks against things outside the code under test: a closed-form outlet temperature of an
insulated line (exponential decay of the bulk towards ambient, e.g. Incropera & DeWitt,
Fundamentals of Heat and Mass Transfer, eq. 8.46a, with the overall resistance per metre of
concentric cylinders in series, eq. 3.28), and the behaviour a user relies on: no width without
uncertainty, a wider range never gives a narrower band, independent sources combine by
root-sum-square, a method the line does not use costs no solve, a failed perturbed solve is
named rather than fatal.
"""

from __future__ import annotations

import dataclasses
import math
from pathlib import Path

import numpy as np
import pytest

from solver.errors import SolverError
from solver.march import solve
from solver.model import Alternative, Feed, Layer, Pipe, Segment, StillAir, TableFluid, TableRow
from solver.project_io import load_project
from solver.uncertainty import BAND_QUANTITIES, METHOD_ACCURACY, band_plan, line_bands

SAMPLES = Path(__file__).resolve().parent.parent / "sample_projects"


def _sample(name: str, index: int = 0) -> Alternative:
    return load_project(SAMPLES / f"{name}.json").alternatives[index]


def _only(*names: str, scale: float = 1.0) -> dict:
    """The accuracy table with every method but ``names`` set to zero (``scale`` × the rest)."""
    return {k: dataclasses.replace(a, plus_minus=(a.plus_minus * scale if k in names else 0.0))
            for k, a in METHOD_ACCURACY.items()}


def _never_solve(*_args, **_kwargs):
    raise AssertionError("no perturbed solve should be made")


# --------------------------------------------------------------------------- zero and wider


def test_every_accuracy_zero_gives_a_band_of_zero_width_without_solving():
    alt = _sample("steam_jacketed_heater")
    base = solve(alt)
    zero = {k: dataclasses.replace(a, plus_minus=0.0) for k, a in METHOD_ACCURACY.items()}
    bands = line_bands(alt, base, zero, solve_fn=_never_solve)
    assert bands.solves == 0
    for k in BAND_QUANTITIES:
        values = np.asarray(getattr(base.profile, k))
        finite = np.isfinite(values)
        assert np.array_equal(bands.lower[k][finite], values[finite]), k
        assert np.array_equal(bands.upper[k][finite], values[finite]), k
    assert bands.width_K == 0.0
    assert bands.key_figure_pm and all(v == 0.0 for v in bands.key_figure_pm.values())


@pytest.mark.parametrize("sample", ["traced_residue_line", "steam_jacketed_heater", "nitrogen_header_outdoors"])
def test_a_wider_range_never_narrows_a_band(sample):
    alt = _sample(sample)
    base = solve(alt)
    narrow = line_bands(alt, base)
    wider = {k: dataclasses.replace(a, plus_minus=min(a.plus_minus * 1.5, 0.95) if not a.absolute else a.plus_minus * 1.5)
             for k, a in METHOD_ACCURACY.items()}
    wide = line_bands(alt, base, wider)
    assert narrow.width_K > 0.0  # the sample has something to widen
    # the march settles to 1e-3 K (solver.march tolerance), so equal bands may differ by that much
    for k in BAND_QUANTITIES:
        a, b = narrow.plus_minus[k], wide.plus_minus[k]
        ok = np.isfinite(a)
        assert np.all(b[ok] >= a[ok] - 1e-3), (k, float(np.max(a[ok] - b[ok])))
    for key, pm in narrow.key_figure_pm.items():
        assert wide.key_figure_pm[key] >= pm * (1 - 1e-6) - 1e-9 * max(1.0, abs(pm)) - (1e-3 if key.endswith("_K") else 0.0), key
    # and the widest contributor really widened (not a band that ignores its table)
    top = narrow.ranked()[0][0].name
    assert wide.ranked()[0][1] > 1.2 * narrow.ranked()[0][1], top


# --------------------------------------------------------------------------- combination


def test_independent_sources_combine_by_root_sum_square():
    # the steam-heated section: both the inside film and the condensate film matter (invented demo)
    alt = _sample("steam_jacketed_heater")
    base = solve(alt)
    a = line_bands(alt, base, _only("inside_film"))
    b = line_bands(alt, base, _only("condensation"))
    both = line_bands(alt, base, _only("inside_film", "condensation"))
    assert a.solves == b.solves == 2 and both.solves == 4
    for k in BAND_QUANTITIES:
        expected = np.hypot(a.plus_minus[k], b.plus_minus[k])
        ok = np.isfinite(expected)
        assert np.allclose(both.plus_minus[k][ok], expected[ok], rtol=1e-12, atol=1e-12), k
    for key in ("outlet_temperature_K", "duty_W", "max_inner_wall_temperature_K"):
        assert a.key_figure_pm[key] > 0 and b.key_figure_pm[key] > 0, key
        assert both.key_figure_pm[key] == pytest.approx(math.hypot(a.key_figure_pm[key], b.key_figure_pm[key]),
                                                        rel=1e-12), key
        # neither the plain sum nor the larger alone
        assert both.key_figure_pm[key] < a.key_figure_pm[key] + b.key_figure_pm[key]
        assert both.key_figure_pm[key] > max(a.key_figure_pm[key], b.key_figure_pm[key])


# --------------------------------------------------------------------------- closed form

_CP = 2000.0  # J/(kg K), constant-property liquid (invented), so the closed form holds exactly
_ROW = dict(density_kg_per_m3=900.0, specific_heat_J_per_kgK=_CP, viscosity_Pa_s=0.0003, conductivity_W_per_mK=0.13)
_OIL = TableFluid(name="Constant oil (invented)", rows=[TableRow(temperature_K=250.0, **_ROW),
                                                        TableRow(temperature_K=450.0, **_ROW)])


def test_band_of_an_insulated_line_matches_the_closed_form_sensitivity():
    """Outlet ± from the insulation conductivity alone, against T_out = T∞ + (T_in − T∞) exp(−L / (m cp R')).

    The outer film is entered (10 W/m²K), so nothing but the insulation conductivity moves; R' is the
    sum per metre of inside film, steel wall, insulation and outer film (concentric cylinders in series).
    """
    k_ins, t_in, t_amb, m, length = 0.04, 363.15, 273.15, 0.15, 600.0
    seg = Segment(name="Run", length_m=length,
                  pipe=Pipe(nps="2", schedule="40", wall_conductivity_W_per_mK=45.0),
                  insulation=[Layer(material="mineral wool", thickness_m=0.05, conductivity_W_per_mK=k_ins)],
                  surroundings=StillAir(temperature_K=t_amb, film_coefficient_W_per_m2K=10.0))
    alt = Alternative(name="Insulated run", fluid=_OIL, segments=[seg],
                      feed=Feed(inlet_temperature_K=t_in, inlet_pressure_Pa=5e5, mass_flow_kg_per_s=m))
    base = solve(alt)
    bands = line_bands(alt, base, _only("insulation_conductivity"))
    assert [c.name for c in bands.contributions] == ["insulation_conductivity"]

    # ASME B36.10M NPS 2 Sch 40: OD 60.33 mm, wall 3.91 mm
    d_o = 0.06033
    d_i = d_o - 2 * 0.00391
    d_ins = d_o + 2 * 0.05
    # turbulent (Re ≈ 12 000): the inside film, taken as solved (mean over the length), is under 1 % of R'
    x = np.asarray(base.profile.x_m)
    r_in = float(np.trapezoid(1 / (np.asarray(base.profile.inside_coefficient_W_per_m2K) * math.pi * d_i), x)) / length
    r_rest = r_in + math.log(d_o / d_i) / (2 * math.pi * 45.0) + 1 / (10.0 * math.pi * d_ins)
    assert r_in < 0.01 * (r_rest + math.log(d_ins / d_o) / (2 * math.pi * k_ins))

    def outlet(k):
        r = r_rest + math.log(d_ins / d_o) / (2 * math.pi * k)
        return t_amb + (t_in - t_amb) * math.exp(-length / (m * _CP * r))

    expected = max(abs(outlet(k_ins * 1.1) - outlet(k_ins)), abs(outlet(k_ins * 0.9) - outlet(k_ins)))
    assert expected > 0.5  # a band worth checking
    # within 2 %: the solved outlet itself agrees with the closed form to 0.6 % of its drop; the larger of
    # the two deviations is the one to take (closed form: ×0.9 gives +2.64 K, ×1.1 gives −2.50 K)
    assert bands.key_figure_pm["outlet_temperature_K"] == pytest.approx(expected, rel=0.02)
    # the band at the outlet node is the outlet's ±, and it grows along the line from nothing at the inlet
    pm = bands.plus_minus["bulk_temperature_K"]
    assert pm[0] == pytest.approx(0.0, abs=1e-6)
    assert pm[-1] == pytest.approx(expected, rel=0.02)
    assert np.all(np.diff(pm) >= -1e-6)
    # heat loss ± = m cp × outlet ± (energy balance)
    assert bands.key_figure_pm["heat_loss_W"] == pytest.approx(m * _CP * expected, rel=0.02)


# --------------------------------------------------------------------------- what is perturbed


def test_only_the_methods_a_line_uses_are_perturbed():
    calls = []

    def counting(alternative, factors):
        calls.append(next(n for n in type(factors).names() if getattr(factors, n) != 1.0))
        return solve(alternative, factors=factors)

    alt = _sample("glycol_return")  # insulated, in still air, with fittings; no jacket, soil, steam or tracer
    line_bands(alt, solve(alt), solve_fn=counting)
    assert set(calls) == {"inside_film", "friction", "fittings", "outside_convection", "emissivity",
                          "insulation_conductivity"}
    assert len(calls) == 12  # two solves per method
    # an entered outer film coefficient is used as given: no convection or emissivity solve
    entered = alt.model_copy(update={"segments": [
        s.model_copy(update={"surroundings": s.surroundings.model_copy(update={"film_coefficient_W_per_m2K": 8.0})})
        for s in alt.segments]})
    names = {name for name, _mult in band_plan(entered)}
    assert "outside_convection" not in names and "emissivity" not in names


def test_a_perturbed_solve_that_fails_is_named_and_the_rest_still_count():
    alt = _sample("traced_residue_line")
    base = solve(alt)

    def fragile(alternative, factors):
        if factors.insulation_conductivity > 1.0:
            raise SolverError("the march did not settle (invented failure for the test)", alternative=alternative.name)
        return solve(alternative, factors=factors)

    bands = line_bands(alt, base, solve_fn=fragile)
    assert len(bands.failed) == 1
    (text, message), = bands.failed.items()
    assert "Insulation conductivity" in text and "did not settle" in message
    assert any("Left out" in line and "Insulation conductivity" in line for line in bands.basis)
    insulation = next(c for c in bands.contributions if c.name == "insulation_conductivity")
    assert insulation.failed and insulation.key_figure_pm["outlet_temperature_K"] > 0  # the ×0.9 solve counts
    assert bands.key_figure_pm["outlet_temperature_K"] > 0


# --------------------------------------------------------------------------- in the app (pytest-qt, offscreen)


def _wait_for_bands(qtbot, doc, timeout=30000):
    """The bands of the result on screen, once the Document has announced them."""
    qtbot.waitUntil(lambda: doc.result is not None and doc.bands_for_result(doc.result) is not None, timeout=timeout)
    return doc.bands_for_result(doc.result)


def test_the_document_computes_bands_off_the_gui_thread_after_the_result(qtbot, monkeypatch):
    import threading

    import solver.uncertainty as uncertainty
    from app.document import Document

    threads = []
    real = uncertainty.run_plan

    def watched(*args, **kwargs):
        threads.append(threading.get_ident())
        return real(*args, **kwargs)

    monkeypatch.setattr(uncertainty, "run_plan", watched)
    doc = Document(load_project(SAMPLES / "glycol_return.json"))
    try:
        announced = []
        doc.bands_ready.connect(lambda name, bands: announced.append((name, bands)))
        result = doc.solve_now()
        assert doc.bands_for_result(result) is None  # the result is not held back for its bands
        bands = _wait_for_bands(qtbot, doc)
        assert threads and threading.get_ident() not in threads  # on the worker, never the GUI thread
        assert bands.base is result and announced[-1] == (doc.current_alternative.name, bands)
        assert bands.key_figure_pm["outlet_temperature_K"] > 0
        assert doc.bands_for(0) is bands  # cached by content
    finally:
        doc.shutdown()


def test_an_edit_stops_the_bands_of_the_old_content(qtbot, monkeypatch):
    import solver.march
    from app.commands import SetFeedField
    from app.document import Document

    perturbed = []  # inlet temperature of each perturbed solve
    real = solver.march.solve

    def watched(alternative, **kw):
        if kw.get("factors") is not None:
            perturbed.append(alternative.feed.inlet_temperature_K)
        return real(alternative, **kw)

    monkeypatch.setattr(solver.march, "solve", watched)
    doc = Document(load_project(SAMPLES / "traced_residue_line.json"))
    try:
        old = doc.solve_now()
        t_old = doc.current_alternative.feed.inlet_temperature_K
        plan = band_plan(doc.current_alternative)
        announced = []
        doc.bands_ready.connect(lambda name, bands: announced.append((name, bands)))
        doc._start_bands()  # at once, rather than after the quiet spell
        doc.push(SetFeedField(doc, doc.current_index, "inlet_temperature_K", 353.15))  # the edit asks for its solve
        qtbot.waitUntil(lambda: doc.result is not None and doc.result is not old, timeout=20000)
        new = doc.result
        bands = _wait_for_bands(qtbot, doc)
        assert bands.base is new
        assert all(b.base is new for _n, b in announced)  # the old content's bands were never announced
        # the edit stopped the old job after the solve it was in: it did not run its whole plan (14 solves)
        assert perturbed.count(t_old) < len(plan) - 2, (perturbed.count(t_old), len(plan))
        # bands are announced to the alternatives that have that content, by name
        announced.clear()
        other = doc.bands_now(1)
        assert other is not None and announced == [(doc.project.alternatives[1].name, other)]
    finally:
        doc.shutdown()


def test_profiles_shade_the_bands_and_key_figures_show_plus_minus(qtbot):
    from app.commands import SetFeedField
    from app.document import Document
    from app.panels.key_figures import KeyFiguresPanel
    from app.panels.profiles import BAND_LEGEND, ProfilesPanel

    doc = Document(load_project(SAMPLES / "steam_jacketed_heater.json"), unit_system="US")
    try:
        profiles, figures = ProfilesPanel(doc), KeyFiguresPanel(doc)
        qtbot.addWidget(profiles)
        qtbot.addWidget(figures)
        result_before = doc.solve_now()
        assert not profiles.band_fills["bulk"].isVisible() and figures.pm_text("outlet_temperature_K") == ""
        bands = _wait_for_bands(qtbot, doc)
        qtbot.waitUntil(lambda: profiles.band_fills["bulk"].isVisible(), timeout=5000)
        assert BAND_LEGEND in [name for name, _pen in profiles.legend.entries]
        for key in ("bulk", "inner_wall", "outer_surface"):
            assert profiles.band_fills[key].isVisible() and not profiles.band_fills[key].path.isEmpty(), key
        # the shaded area spans the band in display units (°F: 9/5 of a kelvin, NIST SP 811)
        rect = profiles.band_fills["bulk"].boundingRect()
        lo_f = float(np.nanmin(bands.lower["bulk_temperature_K"])) * 9 / 5 - 459.67
        hi_f = float(np.nanmax(bands.upper["bulk_temperature_K"])) * 9 / 5 - 459.67
        assert rect.top() == pytest.approx(lo_f, abs=0.01) and rect.bottom() == pytest.approx(hi_f, abs=0.01)
        # Key Figures: the ± is a temperature difference in °F (9/5 of the kelvin figure), beside the value
        text = figures.pm_text("outlet_temperature_K")
        assert text.startswith("± ") and text.endswith("°F"), text
        assert float(text.split()[1]) == pytest.approx(bands.key_figure_pm["outlet_temperature_K"] * 9 / 5, abs=0.051)
        assert figures.value_text("outlet_temperature_K").endswith("°F")  # the value itself is unchanged
        assert figures.pm_text("mass_flow_kg_per_s") == ""  # a figure no method moves has no ±
        # an edit: the old shading and ± go until the new result's bands come
        doc.push(SetFeedField(doc, doc.current_index, "inlet_temperature_K", 300.0))
        doc.solve_now()
        assert not profiles.band_fills["bulk"].isVisible() and figures.pm_text("outlet_temperature_K") == ""
        _wait_for_bands(qtbot, doc)
        qtbot.waitUntil(lambda: figures.pm_text("outlet_temperature_K") != "", timeout=5000)
        assert profiles.band_fills["bulk"].isVisible()
        # an undo brings back a result whose bands are held: shown with it, at once
        doc.undo_stack.undo()
        doc.solve_now()
        assert doc.result is result_before
        assert profiles.band_fills["bulk"].isVisible() and figures.pm_text("outlet_temperature_K") == text
    finally:
        doc.shutdown()


def test_cli_json_carries_the_bands_when_asked(capsys):
    import json

    from app.cli import main

    path = SAMPLES / "glycol_return.json"
    assert main(["solve", str(path), "--json", "--uncertainty", "--alternative", "Foam 19 mm"]) == 0
    entry = json.loads(capsys.readouterr().out)["alternatives"][0]
    u = entry["uncertainty"]
    assert u["key_figure_plus_minus"]["outlet_temperature_K"] > 0
    assert {c["factor"] for c in u["contributions"]} >= {"insulation_conductivity", "outside_convection"}
    base = np.array(entry["profile"]["bulk_temperature_K"], dtype=float)
    lower = np.array(u["profile"]["bulk_temperature_lower_K"], dtype=float)
    upper = np.array(u["profile"]["bulk_temperature_upper_K"], dtype=float)
    assert np.all(lower <= base) and np.all(upper >= base) and np.any(upper > base)
    # without the flag, no band and no extra solves
    assert main(["solve", str(path), "--json", "--alternative", "Foam 19 mm"]) == 0
    assert "uncertainty" not in json.loads(capsys.readouterr().out)["alternatives"][0]


def test_the_report_states_the_bands_and_their_basis():
    from app.reporting.content import Outcome, build_html
    from app.reporting.pdf import Heading, Table
    from app.texts import esc
    from solver.uncertainty import BANDS_CAUTION

    project = load_project(SAMPLES / "steam_jacketed_heater.json")
    alt = project.alternatives[0]
    outcome = Outcome(alt, solve(alt), None)
    body = build_html(project, [outcome], "SI", "2026-01-01")
    bands = outcome.bands
    assert bands is not None and bands.key_figure_pm["outlet_temperature_K"] > 0
    headings = [p.html for p in body.parts if isinstance(p, Heading)]
    assert any("Uncertainty" in h for h in headings)
    text = " ".join(p for p in body.parts if isinstance(p, str))
    cells = " ".join(" ".join(map(str, row)) for p in body.parts if isinstance(p, Table) for row in p.rows)
    # the key figures with their ± (a temperature difference in K), the basis per method, the caution
    pm = bands.key_figure_pm["outlet_temperature_K"]
    assert f"± {pm:.1f} K" in cells
    for c in bands.contributions:
        assert c.label in cells and c.accuracy_text in cells
    assert "Gnielinski (1976)" in cells and "common practice" in cells
    assert esc(BANDS_CAUTION) in text and "Largest contributors" in text
    # the profile chart shades the bands around its curves
    chart = body.figures[-1]
    shaded = chart.panels[0].bands
    assert len(shaded) == 3
    bulk = next(s for s in chart.panels[0].series if s.label == "Bulk")
    band = next(b for b in shaded if b.colour == bulk.colour)
    assert np.all(band.lower <= bulk.y + 1e-9) and np.all(band.upper >= bulk.y - 1e-9) and np.any(band.upper > bulk.y)
