"""States on the edge of the fixed-knot property tables give the same bits whatever was looked up before.

The design rule: caches never change an answer. Found by the solver fuzz (seed 20261202): nitrogen fed at
exactly 100 MPa, the top pressure knot, gave different last bits on a project's first and second solve,
because the first look-up left the knots just below the edge unfilled although they carry a round-off weight.
"""

import numpy as np
import pytest

from solver.model import PureFluid
from solver.properties import PureFluidModel

EDGE_STATES = [
    (301.48499754162367, 1e8),  # the fuzz's state: top pressure knot
    (999.7, 1e8),  # near the top temperature and on the top pressure knot
    (1000.0, 2.5e7),  # on the top temperature (the cap of the pure-fluid tables)
]


@pytest.mark.parametrize("T, p", EDGE_STATES)
def test_edge_state_does_not_depend_on_earlier_look_ups(T, p):
    fresh = PureFluidModel(PureFluid(name="Nitrogen"))
    first = fresh.props(np.array([T]), np.array([p]))
    primed = PureFluidModel(PureFluid(name="Nitrogen"))
    primed.props(np.array([T - 20.0, T - 3.0]), np.array([p * 0.7, p * 0.9]))  # fills the knots below the edge
    again = primed.props(np.array([T]), np.array([p]))
    for name, a, b in zip(first._fields, first, again):
        assert a.tobytes() == b.tobytes(), name


# --------------------------------------------------------------------------- where the data stop (app fuzz, seed 20261202)

from solver.errors import SolverError  # noqa: E402
from solver.march import solve  # noqa: E402
from solver.model import Alternative, Feed, Pipe, Segment, SolutionFluid  # noqa: E402
from solver.properties import fluid_model  # noqa: E402


def _line(fluid, t_in_K, p_in_Pa=3e5):
    return Alternative(name="Brine run", fluid=fluid,
                       feed=Feed(inlet_temperature_K=t_in_K, inlet_pressure_Pa=p_in_Pa, mass_flow_kg_per_s=1.0),
                       segments=[Segment(name="Yard", length_m=20.0, pipe=Pipe(nps="2", schedule="40"))])


def test_solution_whose_fit_fails_inside_its_range_keeps_its_valid_span():
    # CoolProp's magnesium chloride fit at 30 % (mass) gives a negative conductivity below about -86 °C
    # (checked against CoolProp itself here), although 30 % is inside the solute's stated range; the valid
    # span must still serve a brine at 20 °C, and a state below it is refused in words
    import CoolProp.CoolProp as CP
    st = CP.AbstractState("INCOMP", "MMG")
    st.set_mass_fractions([0.3])
    st.update(CP.PT_INPUTS, 1e7, 180.0)
    assert st.conductivity() < 0.0  # the fit's own fault, as found
    model = fluid_model(SolutionFluid(solute="MMG", concentration=0.3))
    assert model.T_min_K > 180.0
    result = solve(_line(SolutionFluid(solute="MMG", concentration=0.3), 293.15, 2e6))  # the fit's 8 Pa·s needs bar
    assert result.outlet_temperature_K == pytest.approx(293.15, abs=1.0)
    with pytest.raises(SolverError) as info:
        solve(_line(SolutionFluid(solute="MMG", concentration=0.3), 346.0))  # above the fit's 40 °C
    assert "inlet" in str(info.value) and "CoolProp" not in str(info.value)


def test_feed_beyond_the_fluid_data_is_refused_at_the_inlet_in_bar():
    # CoolProp's oxygen equation of state stops at 80 MPa (its pmax); the model allows line pressures to 100 MPa
    from solver.model import PureFluid
    with pytest.raises(SolverError) as info:
        solve(_line(PureFluid(name="Oxygen"), 200.0, 1e8))
    text = str(info.value)
    assert "at the inlet" in text and "800 bar(a)" in text and " Pa" not in text
