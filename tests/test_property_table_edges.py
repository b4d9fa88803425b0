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
