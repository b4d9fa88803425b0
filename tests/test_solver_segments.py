"""Lines of many segments: what a user sees does not depend on where the line is cut.

The solver lays all segments out in one pass and finds per-segment figures and Checks in
one pass over the line; these tests pin what a user would notice if that went wrong.
External references: a segment boundary is not physical, so cutting a uniform line into
pieces leaves the outlet state unchanged (to grid error); Darcy–Weisbach with the Colebrook
friction factor from the `fluids` library (Bell, fluids) for the friction drop; the 3-K
fitting loss of Darby (2001) as implemented in `fluids.fittings`.
"""

from __future__ import annotations

import pytest

from solver.march import solve
from solver.model import Adiabatic, Alternative, Feed, Fitting, FixedWall, Layer, Limits, Pipe, PureFluid, Segment, Wind

pytest.importorskip("CoolProp.CoolProp")
fluids = pytest.importorskip("fluids")

NPS2 = Pipe(nps="2", schedule="40")
WATER = PureFluid(name="Water")
FEED = Feed(inlet_temperature_K=330.0, inlet_pressure_Pa=8e5, mass_flow_kg_per_s=1.5)


def _traced(name: str, length: float, fittings=()) -> Segment:
    return Segment(name=name, length_m=length, pipe=NPS2, heat_input_W_per_m=40.0,
                   insulation=[Layer(thickness_m=0.04, conductivity_W_per_mK=0.04)],
                   surroundings=Wind(temperature_K=263.15, wind_speed_m_per_s=4.0), fittings=list(fittings))


def test_cutting_a_line_into_segments_changes_nothing():
    # one 240 m traced line, and the same line as 24 segments of 10 m (a boundary is not physical)
    whole = Alternative(name="whole", fluid=WATER, feed=FEED, segments=[_traced("All", 240.0)])
    cut = Alternative(name="cut", fluid=WATER, feed=FEED, segments=[_traced(f"P{i}", 10.0) for i in range(24)])
    rw, rc = solve(whole, cells_per_segment=480), solve(cut, cells_per_segment=20)
    assert rc.outlet_temperature_K == pytest.approx(rw.outlet_temperature_K, abs=0.01)
    assert rc.pressure_drop.total_Pa == pytest.approx(rw.pressure_drop.total_Pa, rel=1e-4)
    assert rc.duty_W == pytest.approx(rw.duty_W, rel=1e-3)
    # the spans tile the line: each starts where the previous ends, at the running length
    assert [s.x_start_m for s in rc.segments] == pytest.approx([10.0 * i for i in range(24)], abs=1e-9)
    assert [s.x_end_m for s in rc.segments] == pytest.approx([10.0 * (i + 1) for i in range(24)], abs=1e-9)
    # each piece's share of the friction drop: Darcy-Weisbach, Colebrook friction factor (fluids)
    rho = float(rc.profile.density_kg_per_m3[0])
    d = rc.segments[0].inner_diameter_m
    v = FEED.mass_flow_kg_per_s / (rho * 3.141592653589793 * d * d / 4)
    re = float(rc.profile.reynolds[0])
    f = fluids.friction.Colebrook(re, 4.57e-5 / d)  # commercial steel, ε = 0.0457 mm (common practice)
    dp_piece = f * 10.0 / d * 0.5 * rho * v * v
    assert rc.segments[0].pressure_drop_Pa == pytest.approx(dp_piece, rel=0.03)


def test_fittings_on_many_segments_each_count_once():
    # 30 segments, every third with one or two 90° elbows in turn: K of each is Darby's 3-K value (fluids)
    counts = {i: 1 + (i // 3) % 2 for i in range(0, 30, 3)}
    segs = [_traced(f"P{i}", 5.0, [Fitting(kind="elbow_90_standard", count=counts[i])] if i in counts else [])
            for i in range(30)]
    r = solve(Alternative(name="elbows", fluid=WATER, feed=FEED, segments=segs), cells_per_segment=8)
    for s in r.segments:
        if s.index % 3:
            assert s.fittings_K == 0.0
            continue
        lo, hi = s.node_start, s.node_end + 1
        re_mean = float(r.profile.reynolds[lo:hi].mean())
        k_ref = counts[s.index] * fluids.fittings.Darby3K(
            NPS=2.0, Re=re_mean, name="Elbow, 90°, flanged, welded, bends, (r/D = 1)")
        assert s.fittings_K == pytest.approx(k_ref, rel=1e-3), s.index


def test_a_check_is_reported_only_where_it_happens():
    # a hot fixed wall first, then plain unheated pipe: only the first segment's wall is above the limit
    alt = Alternative(
        name="Wall limit", fluid=WATER,
        feed=Feed(inlet_temperature_K=300.0, inlet_pressure_Pa=10e5, mass_flow_kg_per_s=1.0),
        segments=[Segment(name="Heater", length_m=1.0, pipe=NPS2, surroundings=FixedWall(wall_temperature_K=450.0))]
        + [Segment(name=f"Plain {i}", length_m=10.0, pipe=NPS2, surroundings=Adiabatic()) for i in range(3)],
        limits=Limits(max_inner_wall_temperature_K=360.0),
    )
    r = solve(alt)
    walls = [c for c in r.checks if c.code == "WALL_LIMIT"]
    assert [c.segment for c in walls] == [0]
    assert r.outlet_temperature_K < 360.0  # the unheated pipe's wall is the bulk temperature, below the limit


def test_each_segment_reports_its_own_heat():
    """Six segments of different lengths, bare and insulated in turn: each one's duty is what the
    water lost between its own ends, m (h_end − h_start), with both enthalpies from CoolProp
    (IAPWS-95) at the profile's bulk temperature and pressure there; its span starts and ends at the
    running length. A segment that summed another's cells, or a profile that mixed up the segments'
    nodes, would show here (the segments' duties differ by a factor of ten)."""
    import CoolProp.CoolProp as CP

    lengths = [5.0, 20.0, 8.0, 30.0, 3.0, 12.0]
    segs = [Segment(name=f"S{i}", length_m=length, pipe=NPS2,
                    insulation=[Layer(thickness_m=0.05, conductivity_W_per_mK=0.04)] if i % 2 else [],
                    surroundings=Wind(temperature_K=268.15, wind_speed_m_per_s=6.0))
            for i, length in enumerate(lengths)]
    alt = Alternative(name="cut unevenly", fluid=WATER, segments=segs,
                      feed=Feed(inlet_temperature_K=353.15, inlet_pressure_Pa=5e5, mass_flow_kg_per_s=0.4))
    r = solve(alt)
    prof = r.profile
    x_start = 0.0
    for s, length in zip(r.segments, lengths):
        assert (s.x_start_m, s.x_end_m) == pytest.approx((x_start, x_start + length), abs=1e-9)
        assert (prof.x_m[s.node_start], prof.x_m[s.node_end]) == pytest.approx((x_start, x_start + length), abs=1e-9)
        h0 = CP.PropsSI("H", "T", prof.bulk_temperature_K[s.node_start], "P", prof.pressure_Pa[s.node_start], "Water")
        h1 = CP.PropsSI("H", "T", prof.bulk_temperature_K[s.node_end], "P", prof.pressure_Pa[s.node_end], "Water")
        assert s.duty_W == pytest.approx(0.4 * (h1 - h0), rel=2e-3), s.name
        x_start += length
    bare, insulated = -r.segments[0].duty_W / 5.0, -r.segments[1].duty_W / 20.0
    assert bare > 8 * insulated  # W/m: the bare pipe in wind loses an order of magnitude more
