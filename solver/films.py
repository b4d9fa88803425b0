"""Film coefficients along the line: inside the pipe per cell, and the outer film in air.

The inside Nusselt number switches its laminar wall condition per cell (a fixed wall temperature
in one segment, a heat flux in the next). The outer film in air combines natural convection
(Churchill–Chu) and wind (Churchill–Bernstein) by Churchill's cube rule and adds radiation to
surroundings at the air temperature, with air properties at 1 atm from a fixed table.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from solver import correlations
from solver._numeric import clip as _clip
from solver.line import AMBIENT_PRESSURE_PA, GRAVITY
from solver.model import PureFluid
from solver.properties import fluid_model


def inside_nusselt(Re, Pr, f, x_over_d, boundary, rel_rough):
    """Inside Nusselt number where the laminar wall condition ('T' or 'q') differs between cells."""
    if isinstance(boundary, str):
        return correlations.nusselt_inside(Re, Pr, f, x_over_d, boundary, relative_roughness=rel_rough)
    kinds = np.unique(boundary)
    if kinds.size == 1:
        return correlations.nusselt_inside(Re, Pr, f, x_over_d, str(kinds[0]), relative_roughness=rel_rough)
    out = np.empty(Re.shape)
    for kind in kinds:
        sel = boundary == kind
        out[sel] = correlations.nusselt_inside(Re[sel], Pr[sel], f[sel], x_over_d[sel], str(kind),
                                               relative_roughness=rel_rough[sel])
    return out


AIR_TABLE = Path(__file__).with_name("data") / "air_1atm.csv"


class AirAtOneAtmosphere:
    """Air properties at 1 atm on 1 K knots from 150 K to 900 K, from the CoolProp air model.

    The knots are fixed, so the table cannot change an answer. It ships with the package
    (``solver/data/air_1atm.csv``, written by ``scripts/make_air_table.py`` from :func:`from_coolprop`
    with every digit kept), so a line carrying a table fluid never needs to import CoolProp; a test
    checks the file against CoolProp. Linear interpolation in temperature is well within 0.1 % for
    these smooth functions.
    """

    _instance = None
    T_min_K, T_max_K = 150.0, 900.0

    def __init__(self, t_knots: np.ndarray, nu: np.ndarray, alpha: np.ndarray, k: np.ndarray):
        self.t_knots = t_knots
        self.nu = nu  # kinematic viscosity [m²/s]
        self.alpha = alpha  # thermal diffusivity [m²/s]
        self.k = k  # thermal conductivity [W/(m·K)]

    @classmethod
    def from_coolprop(cls) -> "AirAtOneAtmosphere":
        """The table computed afresh from CoolProp's air model (what the shipped file holds)."""
        air = fluid_model(PureFluid(name="Air"))
        t_knots = np.arange(cls.T_min_K, cls.T_max_K + 1.0, 1.0)
        ap = air.props(t_knots, np.full(t_knots.shape, AMBIENT_PRESSURE_PA))
        return cls(t_knots, ap.mu / ap.rho, ap.k / (ap.rho * ap.cp), ap.k)

    @classmethod
    def from_file(cls, path: Path = AIR_TABLE) -> "AirAtOneAtmosphere":
        data = np.loadtxt(path, delimiter=",", comments="#")
        return cls(data[:, 0], data[:, 1], data[:, 2], data[:, 3])

    def write(self, path: Path = AIR_TABLE) -> None:
        """Write the table with every digit (repr round-trips a float64 exactly)."""
        lines = ["# Air at 1 atm (101 325 Pa) from CoolProp's air model; written by scripts/make_air_table.py",
                 "# T [K], kinematic viscosity [m2/s], thermal diffusivity [m2/s], conductivity [W/(m K)]"]
        lines += [f"{t!r},{a!r},{b!r},{c!r}" for t, a, b, c in
                  zip(self.t_knots.tolist(), self.nu.tolist(), self.alpha.tolist(), self.k.tolist())]
        path.write_text("\n".join(lines) + "\n", encoding="utf-8")

    @classmethod
    def get(cls) -> "AirAtOneAtmosphere":
        if cls._instance is None:
            cls._instance = cls.from_file() if AIR_TABLE.exists() else cls.from_coolprop()
        return cls._instance

    def at(self, t):
        t = _clip(t, self.T_min_K, self.T_max_K)
        tk = self.t_knots
        return np.interp(t, tk, self.nu), np.interp(t, tk, self.alpha), np.interp(t, tk, self.k)


def air_film(air, t_surface, t_air, d_outer, wind_speed, emissivity):
    """Outer film coefficient in air [W/m²K]: natural (Churchill–Chu) and forced (Churchill–Bernstein)
    convection combined by Churchill's cube rule, plus radiation to surroundings at air temperature."""
    t_film = 0.5 * (t_surface + t_air)
    nu_kin, alpha, k_air = air.at(t_film)
    pr = nu_kin / alpha
    beta = 1.0 / t_film  # ideal gas
    dT = np.maximum(np.abs(t_surface - t_air), 1e-3)
    ra = GRAVITY * beta * dT * d_outer**3 / (nu_kin * alpha)
    nu_nat = correlations.nusselt_churchill_chu_cylinder(ra, pr)
    re = wind_speed * d_outer / nu_kin
    nu_forced = np.where(wind_speed > 0, correlations.nusselt_churchill_bernstein(np.maximum(re, 1e-9), pr), 0.0)
    nu = np.where(wind_speed > 0, correlations.nusselt_mixed(nu_forced, nu_nat), nu_nat)
    h_conv = nu * k_air / d_outer
    h_rad = correlations.radiation_coefficient(t_surface, t_air, emissivity)
    return h_conv + h_rad
