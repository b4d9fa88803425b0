"""Film coefficients along the line: inside the pipe per cell, and the outer film in air.

The inside Nusselt number switches its laminar wall condition per cell (a fixed wall temperature
in one segment, a heat flux in the next). The outer film in air combines natural convection
(Churchill–Chu) and wind (Churchill–Bernstein) by Churchill's cube rule and adds radiation to
surroundings at the air temperature, with air properties at 1 atm from a fixed table.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from solver import correlations, steam
from solver._numeric import clip as _clip
from solver.line import AMBIENT_PRESSURE_PA, GRAVITY
from solver.model import PureFluid
from solver.properties import fluid_model


def inside_nusselt(Re, Pr, f, x_over_d, boundary, rel_rough, developing=True):
    """Local inside Nusselt number per cell or node ('T'/'q' wall condition per cell allowed)."""
    return correlations.nusselt_inside(Re, Pr, f, x_over_d, boundary, relative_roughness=rel_rough,
                                       developing=developing)


def inside_nusselt_mean(Re, Pr, f, x0_over_d, x1_over_d, boundary, rel_rough, developing=True):
    """Cell-mean inside Nusselt number over [x0, x1] of each cell's entry length."""
    return correlations.nusselt_inside_mean(Re, Pr, f, x0_over_d, x1_over_d, boundary, relative_roughness=rel_rough,
                                            developing=developing)


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


def _free_convection(air, t_surface, t_air, length):
    """Rayleigh number on ``length`` and air properties at the film temperature: (Ra, Pr, ν, α, k)."""
    t_film = 0.5 * (t_surface + t_air)
    nu_kin, alpha, k_air = air.at(t_film)
    beta = 1.0 / t_film  # ideal gas
    dT = np.maximum(np.abs(t_surface - t_air), 1e-3)
    ra = GRAVITY * beta * dT * length**3 / (nu_kin * alpha)
    return ra, nu_kin / alpha, nu_kin, alpha, k_air


def air_film_parts(air, t_surface, t_air, d_outer, wind_speed, emissivity, factors=None, vertical_length=None):
    """Outer film in air, convection and radiation apart [W/m²K] (they act in parallel).

    Convection: natural (Churchill–Chu) and forced (Churchill–Bernstein) combined by Churchill's
    cube rule; radiation to surroundings at the air temperature. ``factors`` (a
    :class:`solver.factors.MethodFactors`) scales convection and emissivity for the uncertainty bands.

    ``vertical_length`` [m], per cell (None, or 0 in a cell: a horizontal cylinder): where it is > 0
    the run is steep (a riser: rise/length > sin 45°, ``solver.line.STEEP_RISE_RATIO``; 45° is the
    midpoint between the two published limits, and measured coefficients of inclined cylinders lie
    between them, falling steadily from the horizontal to the vertical value (e.g. Al-Arabi & Salman
    1980, Int. J. Heat Mass Transfer 23, 45–51, from memory), so switching at 45° errs by at most about
    half their difference: for insulated lines the vertical value is 10–25 % below the horizontal
    one) and its natural convection is that of a vertical surface of this height: Churchill & Chu's
    (1975) vertical-plate equation with the height as the length (Nu_L = h L / k). Pass the segment's whole rise |Δz|, not the cell's: the
    plate equation gives the mean over the height, so every cell of the riser gets that mean and
    the answer does not move with the mesh. A vertical cylinder behaves as a plate when
    D/L >= 35/Gr_L^(1/4) (Incropera & DeWitt §9.6.1; checked by ``VALIDITY['churchill_chu_vertical']``
    through :func:`free_convection_groups`). Wind still crosses the pipe: Churchill–Bernstein on
    the diameter, combined with the vertical natural convection by the cube rule on the coefficients.
    """
    ra, pr, nu_kin, alpha, k_air = _free_convection(air, t_surface, t_air, d_outer)
    nu_nat = correlations.nusselt_churchill_chu_cylinder(ra, pr)
    if vertical_length is not None:
        height = np.asarray(vertical_length, dtype=float)
        vertical = height > 0.0
        if vertical.any():
            shape = np.shape(nu_nat)
            nu_nat = np.array(nu_nat, dtype=float)  # a copy: only the steep cells change
            sel = np.broadcast_to(vertical, shape)
            h_v, d_v = np.broadcast_to(height, shape)[sel], np.broadcast_to(d_outer, shape)[sel]
            ra_l = np.broadcast_to(ra, shape)[sel] * (h_v / d_v) ** 3
            # the plate's Nusselt number moved to the diameter basis (h is what the cube rule combines)
            pr_v = np.broadcast_to(pr, shape)[sel]
            nu_nat[sel] = correlations.nusselt_churchill_chu_vertical(ra_l, pr_v) * (d_v / h_v)
    re = wind_speed * d_outer / nu_kin
    nu_forced = np.where(wind_speed > 0, correlations.nusselt_churchill_bernstein(np.maximum(re, 1e-9), pr), 0.0)
    nu = np.where(wind_speed > 0, correlations.nusselt_mixed(nu_forced, nu_nat), nu_nat)
    h_conv = nu * k_air / d_outer
    if factors is not None:
        h_conv = h_conv * factors.outside_convection
        emissivity = np.minimum(emissivity * factors.emissivity, 1.0)
    h_rad = correlations.radiation_coefficient(t_surface, t_air, emissivity)
    return h_conv, h_rad


def free_convection_groups(air, t_surface, t_air, d_outer, vertical_length=None):
    """The groups the natural-convection validity checks need, per cell.

    Returns ``(vertical, Ra, D_Gr_quarter_over_L)``: ``vertical`` True where ``vertical_length`` > 0;
    ``Ra`` on the diameter for a horizontal cylinder and on the height for a vertical surface;
    (D/L)·Gr_L^(1/4) where vertical (inf elsewhere). Use
    ``out_of_range("churchill_chu", Ra=Ra[~vertical])`` and
    ``out_of_range("churchill_chu_vertical", Ra=Ra[vertical], D_Gr_quarter_over_L=g[vertical])``.
    """
    ra, pr, _, _, _ = _free_convection(air, t_surface, t_air, d_outer)
    ra = np.asarray(ra, dtype=float) * np.ones(np.shape(t_surface))
    d = np.broadcast_to(np.asarray(d_outer, dtype=float), ra.shape)
    if vertical_length is None:
        return np.zeros(ra.shape, dtype=bool), ra, np.full(ra.shape, np.inf)
    height = np.broadcast_to(np.asarray(vertical_length, dtype=float), ra.shape)
    vertical = height > 0.0
    scale = np.where(vertical, height, d) / d
    ra = ra * scale**3
    gr_l = ra / pr
    thin = np.where(vertical, d / np.where(vertical, height, 1.0) * np.sqrt(np.sqrt(gr_l)), np.inf)
    return vertical, ra, thin


def condensate_resistance(p_steam, d_pipe_outer, r_steam_foul, t_pipe_outer, factors=None):
    """Condensing steam on the pipe: condensate film + steam-side fouling [K·m/W] per metre.

    The film is Nusselt's film condensation on a horizontal tube at the pipe's outer wall
    temperature (:func:`solver.steam.condensate_film_resistance`; infinite where the wall is at or
    above the steam temperature, so nothing condenses); ``factors`` scales its coefficient for the
    uncertainty bands.
    """
    factor = 1.0 if factors is None else factors.condensation
    return steam.condensate_film_resistance(p_steam, t_pipe_outer, d_pipe_outer, factor) + r_steam_foul
