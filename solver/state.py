"""The converged march: what the line solver hands on to the node profiles and the checks.

Plain arrays along the line, so the checks can read a solved line without importing the
solver that produced it.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from solver.factors import NEUTRAL, MethodFactors
from solver.films import AirAtOneAtmosphere


@dataclass
class MarchState:
    """The converged march, per cell (length n) or per cell edge (length n + 1), SI.

    Cell values are those of the last full pass; ``T`` carries one more Newton step on
    h(T, p) = ``h_nodes`` so the temperatures agree with the enthalpy balance to round-off.
    Resistances are per metre of pipe [K·m/W]; pressure-drop parts are per cell [Pa].
    """

    m_dot: float  # [kg/s]
    h_in: float  # enthalpy at the inlet [J/kg]
    T: np.ndarray  # bulk temperature at the cell edges [K]
    p: np.ndarray  # pressure at the cell edges [Pa]
    h_nodes: np.ndarray  # enthalpy at the cell edges from the heat balance [J/kg]
    kinetic_nodes: np.ndarray  # v²/2 at the cell edges in the heat balance [J/kg] (bore of the cell upstream)
    Q_cell: np.ndarray  # heat to the fluid [W]
    T_surface: np.ndarray  # outer surface in air (where the air film is computed) [K]
    r_out_total: np.ndarray  # outside path: insulation + outer film or soil (inf adiabatic)
    Re: np.ndarray
    Pr: np.ndarray
    velocity: np.ndarray  # [m/s]
    rho: np.ndarray  # [kg/m³]
    dp_friction: np.ndarray
    dp_fittings: np.ndarray
    dp_elevation: np.ndarray
    dp_accel: np.ndarray
    air: AirAtOneAtmosphere | None  # air properties where an outer air film is computed
    r_in: np.ndarray = None  # inside film per cell [K·m/W] (property-ratio factor included)
    wall_factor: np.ndarray = None  # property-ratio factor on the inside coefficient per cell [-]
    h_conv_out: np.ndarray = None  # outer air film, convection [W/(m²·K)]; NaN where no air film
    h_rad_out: np.ndarray = None  # outer air film, radiation [W/(m²·K)]; NaN where no air film
    r_cond: np.ndarray = None  # condensate film + steam-side fouling [K·m/W]; NaN where no condensing steam
    q_tracer: np.ndarray = None  # heat from steam tracers [W/m], cell means
    g_tracer: np.ndarray = None  # steam tracer conductance in use [W/(m·K)]: 0 where a tracer gives no heat
    T_heated: np.ndarray = None  # pipe outer wall (where tracing heat enters), cell means [K]
    T_wall: np.ndarray = None  # inner wall the fluid touches, cell means [K]
    factors: MethodFactors = NEUTRAL  # multipliers the solve used (uncertainty bands)
    gas: bool = False  # the fluid is compressible (property correction by temperature ratio)
    wall_groups: dict = None  # the property-ratio groups per cell (for the validity check), or None
    q_heater: np.ndarray = None  # electric heater output delivered [W/m of pipe], cell means
    g_heater: np.ndarray = None  # self-limiting heater slope in use [W/(m·K)]: 0 where it gives nothing
    duty: np.ndarray = None  # per segment: thermostat duty (0–1), NaN without a thermostat
    g_sink: np.ndarray = None  # heat-sink conductance to the surroundings [W/(m·K)] per cell, 0 without
    g_sink_fixed: np.ndarray = None  # its bare-pipe and direct part (the rest scales with the outside path)
    q_sink: np.ndarray = None  # heat-sink loss [W/m of pipe], cell means

    @property
    def dp_cell(self) -> np.ndarray:
        return self.dp_friction + self.dp_fittings + self.dp_elevation + self.dp_accel
