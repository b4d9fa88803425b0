"""Natural convection from a riser: Churchill & Chu's vertical-plate equation, and the outer film of a
steep run (solver.films with ``vertical_length``).

References: the ``ht`` library (Nu_vertical_plate_Churchill, Nu_horizontal_cylinder_Churchill_Chu,
Nu_cylinder_Churchill_Bernstein) fed with CoolProp air properties at 1 atm, as a hand calculation;
Incropera & DeWitt's thin-cylinder criterion D/L >= 35/Gr_L^(1/4) (§9.6.1).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from CoolProp.CoolProp import PropsSI
from ht.conv_external import Nu_cylinder_Churchill_Bernstein
from ht.conv_free_immersed import Nu_horizontal_cylinder_Churchill_Chu, Nu_vertical_plate_Churchill

from solver import correlations
from solver.films import AirAtOneAtmosphere, air_film_parts, free_convection_groups

G = 9.80665


@pytest.mark.parametrize("Ra", [0.1, 1.0, 1e4, 1e8, 1e9, 1e10, 1e12])
@pytest.mark.parametrize("Pr", [0.7, 7.0])
def test_vertical_plate_equation_against_ht(Ra, Pr):
    assert float(correlations.nusselt_churchill_chu_vertical(Ra, Pr)) == pytest.approx(
        Nu_vertical_plate_Churchill(Pr, Ra / Pr), rel=1e-12)


def _air(t_film):
    """Air at 1 atm from CoolProp: ν, k, Pr (the hand calculation's own property source)."""
    mu = PropsSI("V", "T", t_film, "P", 101325.0, "Air")
    rho = PropsSI("D", "T", t_film, "P", 101325.0, "Air")
    k = PropsSI("L", "T", t_film, "P", 101325.0, "Air")
    return mu / rho, k, PropsSI("PRANDTL", "T", t_film, "P", 101325.0, "Air")


def _gr(t_s, t_a, length):
    nu, _, _ = _air(0.5 * (t_s + t_a))
    return G * (1.0 / (0.5 * (t_s + t_a))) * abs(t_s - t_a) * length**3 / nu**2


def _h_vertical(t_s, t_a, height):
    nu, k, pr = _air(0.5 * (t_s + t_a))
    return Nu_vertical_plate_Churchill(pr, _gr(t_s, t_a, height)) * k / height


def _h_horizontal(t_s, t_a, d):
    nu, k, pr = _air(0.5 * (t_s + t_a))
    return Nu_horizontal_cylinder_Churchill_Chu(pr, _gr(t_s, t_a, d)) * k / d


@pytest.mark.parametrize("t_s, t_a, d, height", [
    (320.0, 290.0, 0.2, 8.0),     # an insulated riser, turbulent boundary layer (Ra_L ~ 1e11)
    (305.0, 295.0, 0.1143, 0.5),  # a short steep run, laminar (Ra_L ~ 1e8)
    (260.0, 290.0, 0.0603, 3.0),  # a cold riser (the air falls along it)
])
def test_riser_film_is_the_vertical_surface_of_its_height(t_s, t_a, d, height):
    air = AirAtOneAtmosphere.get()
    ts, ta, dd = np.array([t_s, t_s]), np.array([t_a, t_a]), np.array([d, d])
    h_conv, _ = air_film_parts(air, ts, ta, dd, np.zeros(2), np.full(2, 0.9), vertical_length=np.array([height, 0.0]))
    assert h_conv[0] == pytest.approx(_h_vertical(t_s, t_a, height), rel=5e-3)
    assert h_conv[1] == pytest.approx(_h_horizontal(t_s, t_a, d), rel=5e-3)  # 0: still a horizontal cylinder
    # None keeps every cell a horizontal cylinder, as before the keyword existed
    h_none, _ = air_film_parts(air, ts, ta, dd, np.zeros(2), np.full(2, 0.9))
    assert h_none[0] == pytest.approx(_h_horizontal(t_s, t_a, d), rel=5e-3)


def test_wind_across_a_riser_combines_with_its_vertical_free_convection():
    # Churchill's cube rule on the coefficients: forced (Churchill–Bernstein on D) and free (plate on L)
    t_s, t_a, d, height, wind = 330.0, 280.0, 0.168, 6.0, 0.5
    nu, k, pr = _air(0.5 * (t_s + t_a))
    h_forced = Nu_cylinder_Churchill_Bernstein(wind * d / nu, pr) * k / d
    h_free = _h_vertical(t_s, t_a, height)
    expected = (h_forced**3 + h_free**3) ** (1.0 / 3.0)
    h_conv, _ = air_film_parts(AirAtOneAtmosphere.get(), np.array([t_s]), np.array([t_a]), np.array([d]),
                               np.array([wind]), np.array([0.9]), vertical_length=np.array([height]))
    assert h_conv[0] == pytest.approx(expected, rel=5e-3)


def test_thin_cylinder_criterion_and_rayleigh_groups():
    # Incropera & DeWitt §9.6.1: a vertical cylinder is a plate when D/L >= 35 / Gr_L^(1/4)
    air = AirAtOneAtmosphere.get()
    t_s, t_a = np.array([310.0, 310.0, 310.0]), np.array([290.0] * 3)
    d = np.array([0.3, 0.0213, 0.2])
    height = np.array([5.0, 2.0, 0.0])
    vertical, ra, thin = free_convection_groups(air, t_s, t_a, d, vertical_length=height)
    assert vertical.tolist() == [True, True, False]
    for i in (0, 1):
        gr = _gr(310.0, 290.0, height[i])
        assert thin[i] == pytest.approx(d[i] / height[i] * gr**0.25, rel=5e-3)
        assert ra[i] == pytest.approx(gr * _air(300.0)[2], rel=5e-3)
    assert ra[2] == pytest.approx(_gr(310.0, 290.0, 0.2) * _air(300.0)[2], rel=5e-3)
    flagged = correlations.out_of_range("churchill_chu_vertical", Ra=ra[vertical],
                                        D_Gr_quarter_over_L=thin[vertical])
    # a 0.3 m insulated riser 5 m tall is a plate (about 43); a bare 1/2 in pipe 2 m tall is not (about 4)
    assert flagged.tolist() == [False, True]
    assert thin[0] > 35.0 > thin[1]
