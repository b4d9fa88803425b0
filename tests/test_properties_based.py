"""Property-based tests (hypothesis): random valid projects never break the solver's contract.

Contract (solver/errors.py, issue 2 item 7): a solve either returns finite profiles (NaN only in
the saturation temperature, where a fluid has none) with a closed energy balance (first law),
or raises one of the documented CalorunError subclasses. An InputError must name an input
field of the project (``segments[...]``, ``fluid...``, ``feed...``), not an internal variable:
an internal name means the march itself produced an impossible state.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import HealthCheck, assume, event, given, settings
from hypothesis import strategies as st

from solver import catalogue
from solver.errors import CalorunError, InputError, SolverError
from solver.march import solve
from solver.model import (
    Adiabatic,
    Alternative,
    Buried,
    Feed,
    FixedWall,
    Jacket,
    Layer,
    Pipe,
    PureFluid,
    Segment,
    SolutionFluid,
    StillAir,
    TableFluid,
    TableRow,
    Wind,
)
from solver.properties import fluid_model

TABLE = TableFluid(name="Test oil", rows=[
    TableRow(temperature_K=250.0, density_kg_per_m3=900.0, specific_heat_J_per_kgK=1800.0,
             viscosity_Pa_s=0.5, conductivity_W_per_mK=0.14),
    TableRow(temperature_K=330.0, density_kg_per_m3=860.0, specific_heat_J_per_kgK=2000.0,
             viscosity_Pa_s=0.03, conductivity_W_per_mK=0.13),
    TableRow(temperature_K=450.0, density_kg_per_m3=800.0, specific_heat_J_per_kgK=2300.0,
             viscosity_Pa_s=0.004, conductivity_W_per_mK=0.12),
])

# fluid -> (spec, inlet temperature range [K], inlet pressure range [Pa])
FLUIDS = {
    "water": (PureFluid(name="Water"), (280.0, 360.0), (3e5, 10e5)),
    "air": (PureFluid(name="Air"), (250.0, 400.0), (2e5, 10e5)),
    "nitrogen": (PureFluid(name="Nitrogen"), (250.0, 400.0), (2e5, 10e5)),
    "meg30": (SolutionFluid(solute="MEG", concentration=0.3), (265.0, 350.0), (2e5, 8e5)),
    "table": (TABLE, (270.0, 420.0), (2e5, 8e5)),
}

NPS = catalogue.nps_sizes()

temperatures = st.floats(240.0, 320.0)
surroundings = st.one_of(
    st.builds(StillAir, temperature_K=temperatures, emissivity=st.floats(0.05, 0.95)),
    st.builds(Wind, temperature_K=temperatures, wind_speed_m_per_s=st.floats(0.5, 25.0),
              emissivity=st.floats(0.05, 0.95)),
    st.builds(StillAir, temperature_K=temperatures, film_coefficient_W_per_m2K=st.floats(2.0, 50.0)),
    st.builds(Buried, soil_temperature_K=st.floats(270.0, 300.0), depth_m=st.floats(0.8, 3.0),
              soil_conductivity_W_per_mK=st.floats(0.3, 2.5)),
    st.builds(Jacket, medium_temperature_K=st.floats(280.0, 420.0),
              film_coefficient_W_per_m2K=st.floats(100.0, 5000.0)),
    st.builds(FixedWall, wall_temperature_K=st.floats(280.0, 420.0)),
    st.builds(FixedWall, wall_temperature_K=st.none(), steam_pressure_Pa=st.floats(1.5e5, 10e5)),
    st.just(Adiabatic()),
)


@st.composite
def pipes(draw):
    nps = draw(st.sampled_from(NPS))
    schedule = draw(st.sampled_from(catalogue.schedules_for(nps)))
    return Pipe(nps=nps, schedule=schedule)


@st.composite
def segments(draw, index):
    sur = draw(surroundings)
    heat = 0.0 if isinstance(sur, FixedWall) else draw(st.one_of(st.just(0.0), st.floats(0.0, 200.0)))
    insulation = []
    if draw(st.booleans()):
        insulation = [Layer(thickness_m=draw(st.floats(0.01, 0.1)), conductivity_W_per_mK=draw(st.floats(0.02, 0.1)))]
    length = draw(st.floats(1.0, 300.0))
    elevation = draw(st.floats(-1.0, 1.0)) * min(length, 20.0)
    return Segment(name=f"S{index + 1}", length_m=length, pipe=draw(pipes()), heat_input_W_per_m=heat,
                   insulation=insulation, surroundings=sur, elevation_change_m=elevation)


@st.composite
def alternatives(draw):
    key = draw(st.sampled_from(sorted(FLUIDS)))
    spec, (t_lo, t_hi), (p_lo, p_hi) = FLUIDS[key]
    t_in = draw(st.floats(t_lo, t_hi))
    p_in = draw(st.floats(p_lo, p_hi))
    n = draw(st.integers(1, 4))
    segs = [draw(segments(i)) for i in range(n)]
    # mass flow from a target Reynolds number in the first segment: m = Re π D μ / 4
    d = catalogue.resolve_pipe(segs[0].pipe).inner_diameter_m
    mu = float(fluid_model(spec).props(np.array([t_in]), np.array([p_in])).mu[0])
    re = 10 ** draw(st.floats(2.0, 6.0))
    m_dot = re * math.pi * d * mu / 4.0
    assume(1e-5 < m_dot < 500.0)
    return Alternative(name=f"Random {key}", fluid=spec,
                       feed=Feed(inlet_temperature_K=t_in, inlet_pressure_Pa=p_in, mass_flow_kg_per_s=m_dot),
                       segments=segs)


def _is_input_field(field: str) -> bool:
    return field.startswith(("segments[", "fluid", "feed"))


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much])
@given(alternatives())
def test_random_projects_solve_or_fail_cleanly(alt):
    try:
        r = solve(alt)
    except SolverError as exc:
        event("SolverError")
        assert str(exc).strip()
        return
    except InputError as exc:
        event("InputError")
        assert _is_input_field(exc.field), f"internal state leaked as an input error: {exc}"
        return
    except CalorunError as exc:  # pragma: no cover - other documented errors
        assert str(exc).strip()
        return
    event("solved")
    for key, arr in r.profile.columns().items():
        if key == "saturation_temperature_K":
            continue
        assert np.all(np.isfinite(arr)), f"{key} has non-finite values"
    for key, value in r.key_figures().items():
        if key.startswith(("max_outer_surface", "min_outer_surface")):
            continue  # NaN when no segment is in air (documented)
        assert math.isfinite(value), key
    scale = max(abs(r.duty_W), r.heat_input_W, 1.0)
    assert abs(r.energy_balance_residual_W) < 1e-6 * scale
    assert r.duty_W == pytest.approx(r.heat_input_W - r.heat_loss_W, abs=1e-9 * scale)
    assert r.profile.pressure_Pa.min() > 0.0
    assert r.heat_input_tracing_W == pytest.approx(
        sum(s.heat_input_W_per_m * s.length_m for s in alt.segments), rel=1e-9)
    assert r.heat_input_W == pytest.approx(r.heat_input_tracing_W + r.heat_input_media_W, rel=1e-9, abs=1e-9)
    for c in r.checks:
        assert c.severity in ("info", "warning", "danger") and c.segment is not None and c.x_m is not None
