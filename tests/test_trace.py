"""'How was this computed' texts (issue 8 item 10): method, source, and the segment inputs behind a figure.

What is checked is what a reviewer reads: that the text points at the segment where a figure is
actually read (located independently from the profile), names that segment's entries in the
reader's units, names the correlation that acted there for the flow regime there (laminar below
Re 2 300, turbulent above 10 000: Gnielinski 1976 / VDI Heat Atlas G1), and gives a finding's
threshold with its source. The lines are invented examples.
"""

from __future__ import annotations

import re

import numpy as np
import pytest

from app import trace
from solver.march import solve
from solver.model import Alternative, Feed, Layer, Pipe, PureFluid, Segment, StillAir, Wind
from solver.results import KEY_FIGURES, Check

WOOL = [Layer(material="mineral wool", thickness_m=0.05, conductivity_W_per_mK=0.04)]


def plain(text: str) -> str:
    """The text with the thin spaces that group digits ("2\u2009300") as plain spaces."""
    return text.replace("\u2009", " ")


def two_segment_line(mass_flow: float = 2.0, tracing: float = 400.0) -> Alternative:
    """A traced, insulated run in still air, then a bare run in cold wind (water)."""
    return Alternative(
        name="Trace test", fluid=PureFluid(name="Water"),
        feed=Feed(inlet_temperature_K=323.15, inlet_pressure_Pa=5e5, mass_flow_kg_per_s=mass_flow),
        segments=[
            Segment(name="Traced rack", length_m=40.0, pipe=Pipe(nps="2", schedule="40"), heat_input_W_per_m=tracing,
                    insulation=WOOL, surroundings=StillAir(temperature_K=288.15)),
            Segment(name="Bare bridge", length_m=30.0, pipe=Pipe(nps="3", schedule="40"),
                    surroundings=Wind(temperature_K=263.15, wind_speed_m_per_s=8.0)),
        ])


@pytest.fixture(scope="module")
def solved():
    alt = two_segment_line()
    return alt, solve(alt)


def test_max_wall_temperature_points_at_its_segment_with_its_inputs(solved):
    alt, res = solved
    # where the maximum really is: the profile's largest inner-wall temperature and its segment
    k = int(np.argmax(res.profile.inner_wall_temperature_K))
    seg_index = next(s.index for s in res.segments if s.node_start <= k <= s.node_end)
    assert seg_index == 0  # the traced run: the heat input raises the wall above the bulk
    text = plain(trace.key_figure_trace("max_inner_wall_temperature_K", res, alt, "SI"))
    assert "Where: Segment 1 “Traced rack”" in text
    assert "NPS 2 sch. 40" in text
    assert "tracing 400 W/m" in text
    assert "50.00 mm mineral wool" in text
    assert "Still air at 15.0 °C" in text
    # Re = 4 ṁ / (π D μ) at the wall's node: turbulent for 2 kg/s of warm water in NPS 2 (Re ~ 1e5)
    re_node = float(res.profile.reynolds[k])
    assert re_node > 10_000
    assert "Flow there: turbulent" in text
    assert "Gnielinski, V. (1976)" in text  # the turbulent inside film that set the wall temperature
    assert "Churchill, S. W. & Chu, H. H. S. (1975)" in text  # natural convection outside, still air
    assert "Bernstein" not in text  # no wind on that segment


def test_the_text_is_in_the_readers_units(solved):
    alt, res = solved
    text = plain(trace.key_figure_trace("max_inner_wall_temperature_K", res, alt, "US"))
    # 400 W/m × 0.3048 m/ft = 121.92 W/ft; 15 °C = 59 °F (definitions of the foot and the Fahrenheit scale)
    assert "tracing 122 W/ft" in text
    assert "59.0 °F" in text
    assert "°C" not in text and "W/m" not in text


def test_laminar_flow_names_the_laminar_method_not_gnielinski():
    alt = two_segment_line(mass_flow=0.03, tracing=20.0)  # Re ~ 1 000 in NPS 2
    res = solve(alt)
    text = trace.key_figure_trace("max_inner_wall_temperature_K", res, alt, "SI")
    assert "Flow there: laminar" in text
    assert "Laminar inside heat transfer, developing flow" in text
    assert "Gnielinski, V. (1976)" not in text
    pressure = trace.key_figure_trace("pressure_drop_Pa", res, alt, "SI")
    assert "Hagen–Poiseuille" in pressure  # laminar friction, f = 64/Re
    assert "Colebrook" not in pressure


def test_heat_loss_names_the_segment_losing_most_per_metre(solved):
    alt, res = solved
    text = trace.key_figure_trace("heat_loss_W", res, alt, "SI")
    # the bare run in an 8 m/s wind loses far more per metre than the insulated one (by hand from the Result)
    per_m = [s.heat_loss_W / (s.x_end_m - s.x_start_m) for s in res.segments]
    assert int(np.argmax(per_m)) == 1
    assert "Most per metre: Segment 2 “Bare bridge”" in text
    assert "Wind 8.000 m/s at −10.0 °C" in text
    assert "Churchill, S. W. & Bernstein, M. (1977)" in text


def test_min_velocity_is_in_the_larger_bore(solved):
    alt, res = solved
    # continuity: the same mass flow is slowest in the larger bore (NPS 3 after NPS 2)
    text = trace.key_figure_trace("min_velocity_m_per_s", res, alt, "SI")
    assert "Where: Segment 2 “Bare bridge”" in text
    assert "NPS 3 sch. 40" in text


def test_every_key_figure_has_a_text_naming_its_method(solved):
    alt, res = solved
    for spec in KEY_FIGURES:
        text = trace.key_figure_trace(spec.key, res, alt, "SI")
        assert text.splitlines()[1] == f"How: {spec.method}"


def test_a_stale_result_names_no_segment():
    """After the segments change, the old result's segment would be the wrong one: say nothing of it."""
    alt = two_segment_line()
    res = solve(alt)
    edited = alt.model_copy(update={"segments": list(reversed(alt.segments))})
    text = trace.key_figure_trace("max_inner_wall_temperature_K", res, edited, "SI")
    assert "Where:" not in text and "Segment" not in text


def test_hot_surface_basis_names_the_threshold_and_its_source(solved):
    alt, res = solved
    check = Check("warning", "HOT_SURFACE", "Outer surface reaches 70 °C", segment=0, x_m=20.0)
    si = plain(trace.check_trace(check, res, alt, "SI"))
    # about 60 °C for metal-like surfaces: common practice (DESIGN §3); 60 °C = 140 °F
    assert "60.0 °C" in si and "common practice" in si
    assert "140.0 °F" in trace.check_trace(check, res, alt, "US")
    assert "Where: Segment 1 “Traced rack” (0.00 – 40.0 m) at 20.0 m" in si


def test_correlation_range_lists_the_published_range_of_the_named_correlation():
    check = Check("warning", "CORRELATION_RANGE",
                  "The Gnielinski correlation is used outside its published range here (Re 1 200 000–9 000 000).")
    text = plain(trace.check_trace(check, None, None, "SI"))
    # Gnielinski (1976) as quoted in VDI Heat Atlas G1: 2 300 < Re < 5·10⁶, 0.5 < Pr < 2 000 (from memory)
    assert "Re 2 300 to 5 × 10⁶" in text
    assert "Pr 0.5 to 2 000" in text
    assert "Churchill" not in text  # only the correlation the finding names


def test_no_flow_finding_gives_the_outside_path(solved):
    alt, res = solved
    check = Check("warning", "NO_FLOW_HOLD", "If the flow stops ...", segment=0, x_m=20.0)
    text = trace.check_trace(check, res, alt, "SI")
    assert "T = T∞ + q′(T) / G′" in text
    r_o = re.search(r"Outside path R_o: ([0-9.]+) K·m/W", text)
    assert r_o is not None
    # R_o = insulation ln(Do/Di)/(2πk) + outer film; the insulation alone is ln(160.3/60.3)/(2π·0.04) = 3.89
    assert 3.89 < float(r_o.group(1)) < 3.89 + 0.6


def test_every_finding_code_has_its_rule():
    """A reviewer pointing at any finding reads its rule, not a shrug."""
    from solver.results import CHECK_TITLES

    for code in CHECK_TITLES:
        assert not trace.check_basis(code, "SI").startswith("See the finding"), code


def test_rough_pipe_finding_gives_colebrooks_range_only():
    """The issue's example: ε/D twice Colebrook's range must say which range was left."""
    check = Check("warning", "CORRELATION_RANGE",
                  "The Colebrook friction factor is used outside its published range here (relative roughness ε/D "
                  "0.1, Re 5 000–6 000; published for ε/D up to 0.05): the pressure drop is uncertain.")
    text = plain(trace.check_trace(check, None, None, "SI"))
    assert "Colebrook, C. F. (1939)" in text and "ε/D" in text
    assert "Churchill" not in text and "Gnielinski" not in text
