"""Results of a solve: profiles along the line, key figures, checks.

Plain data (numpy arrays and floats, SI units), so the GUI, the CLI and the
report can all read it without any physics of their own.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Literal, Optional

import numpy as np

Severity = Literal["info", "warning", "danger"]
SEVERITY_ORDER = {"info": 0, "warning": 1, "danger": 2}


@dataclass(frozen=True)
class Check:
    """One finding: severity, a stable code, a plain message, and where it applies."""

    severity: Severity
    code: str
    message: str
    segment: Optional[int] = None  # index into the alternative's segments
    x_m: Optional[float] = None  # position along the line from the inlet
    template: str = ""  # the message with its values as unit tokens; see render_message

    def to_dict(self) -> dict:
        return {
            "severity": self.severity,
            "code": self.code,
            "message": self.message,
            "segment": self.segment,
            "x_m": self.x_m,
        }


_TOKEN = re.compile(r"⟦(T|dT|v|q):([-+0-9.eE]+)⟧")


def _si_text(kind: str, value: float) -> str:
    if kind == "T":
        return f"{value - 273.15:.1f} °C"
    if kind == "dT":
        return f"{value:g} K"
    if kind == "v":
        return f"{value:.1f} m/s" if abs(value) >= 10 else f"{value:.2f} m/s"
    return f"{value:.0f} W/m"


def render_message(template: str, formatter=None) -> str:
    """A check message with its value tokens written out.

    Tokens are ``⟦T:kelvin⟧``, ``⟦dT:kelvin⟧``, ``⟦v:m/s⟧``, ``⟦q:W/m⟧``. ``formatter(kind, value)``
    writes one value (the GUI passes one for the user's unit system); the default writes SI.
    """
    fmt = formatter or _si_text
    return _TOKEN.sub(lambda m: fmt(m.group(1), float(m.group(2))), template)


# Profile columns: key -> (label, SI unit). Order is the CSV column order.
PROFILE_COLUMNS: dict[str, tuple[str, str]] = {
    "x_m": ("Position", "m"),
    "bulk_temperature_K": ("Bulk temperature", "K"),
    "inner_wall_temperature_K": ("Inner-wall temperature", "K"),
    "outer_surface_temperature_K": ("Outer-surface temperature", "K"),
    "pressure_Pa": ("Pressure", "Pa"),
    "heat_flux_W_per_m2": ("Heat flux into fluid at inner wall", "W/m²"),
    "heat_to_fluid_W_per_m": ("Heat to fluid per length", "W/m"),
    "heat_loss_W_per_m": ("Heat loss per length (− = gained)", "W/m"),
    "inside_coefficient_W_per_m2K": ("Inside film coefficient", "W/(m²·K)"),
    "reynolds": ("Reynolds number", "-"),
    "velocity_m_per_s": ("Velocity", "m/s"),
    "density_kg_per_m3": ("Density", "kg/m³"),
    "saturation_temperature_K": ("Saturation temperature", "K"),
}


@dataclass
class Profile:
    """Values along the line at cell boundaries (node 0 = inlet, last = outlet).

    Cell-wise quantities (heat flux, h, Re, velocity) are given at nodes as the
    value of the adjacent cell (the cell upstream for the outlet node).
    """

    x_m: np.ndarray
    bulk_temperature_K: np.ndarray
    inner_wall_temperature_K: np.ndarray
    outer_surface_temperature_K: np.ndarray
    pressure_Pa: np.ndarray
    heat_flux_W_per_m2: np.ndarray
    heat_to_fluid_W_per_m: np.ndarray
    heat_loss_W_per_m: np.ndarray
    inside_coefficient_W_per_m2K: np.ndarray
    reynolds: np.ndarray
    velocity_m_per_s: np.ndarray
    density_kg_per_m3: np.ndarray
    saturation_temperature_K: np.ndarray  # NaN where the fluid has none

    def columns(self) -> dict[str, np.ndarray]:
        return {key: getattr(self, key) for key in PROFILE_COLUMNS}


@dataclass(frozen=True)
class SegmentSpan:
    """Where a segment lies on the profile and what it resolved to."""

    index: int
    name: str
    x_start_m: float
    x_end_m: float
    inner_diameter_m: float
    outer_diameter_m: float  # over insulation
    node_start: int
    node_end: int  # inclusive node index of the segment outlet
    fittings_K: float  # sum of loss coefficients (count included)
    duty_W: float
    heat_input_W: float  # tracing + heat from heating/cooling media
    heat_loss_W: float  # to the ambient
    pressure_drop_Pa: float


@dataclass(frozen=True)
class PressureDropBreakdown:
    """Inlet minus outlet pressure split by cause (positive = pressure lost)."""

    friction_Pa: float
    fittings_Pa: float
    elevation_Pa: float
    acceleration_Pa: float

    @property
    def total_Pa(self) -> float:
        return self.friction_Pa + self.fittings_Pa + self.elevation_Pa + self.acceleration_Pa


@dataclass
class Result:
    """Everything solved for one alternative."""

    name: str
    fluid_label: str
    mass_flow_kg_per_s: float
    profile: Profile
    segments: list[SegmentSpan]
    checks: list[Check]
    inlet_temperature_K: float
    inlet_pressure_Pa: float
    outlet_temperature_K: float
    outlet_pressure_Pa: float
    pressure_drop: PressureDropBreakdown
    duty_W: float
    heat_input_W: float  # tracing + heat from heating/cooling media (signed)
    heat_input_tracing_W: float
    heat_input_media_W: float  # from jackets and fixed-temperature walls; negative when they cool
    heat_loss_W: float  # to the ambient (air, soil); negative when the ambient heats the line
    energy_balance_residual_W: float
    max_inner_wall_temperature_K: float
    max_inner_wall_position_m: float
    min_inner_wall_temperature_K: float
    min_inner_wall_position_m: float
    max_outer_surface_temperature_K: float
    max_outer_surface_position_m: float
    min_outer_surface_temperature_K: float  # over segments in air only (NaN when none)
    min_outer_surface_position_m: float
    pump_power_W: float
    residence_time_s: float
    velocity_range_m_per_s: tuple[float, float]
    reynolds_range: tuple[float, float]
    cells: int
    methods: list[str] = field(default_factory=list)  # correlations used, with sources

    @property
    def pressure_drop_Pa(self) -> float:
        return self.inlet_pressure_Pa - self.outlet_pressure_Pa

    @property
    def worst_severity(self) -> Optional[Severity]:
        if not self.checks:
            return None
        return max(self.checks, key=lambda c: SEVERITY_ORDER[c.severity]).severity

    def key_figures(self) -> dict[str, float]:
        """Headline numbers, SI, with the key names of the JSON results."""
        return {
            "outlet_temperature_K": self.outlet_temperature_K,
            "outlet_pressure_Pa": self.outlet_pressure_Pa,
            "pressure_drop_Pa": self.pressure_drop_Pa,
            "pressure_drop_friction_Pa": self.pressure_drop.friction_Pa,
            "pressure_drop_fittings_Pa": self.pressure_drop.fittings_Pa,
            "pressure_drop_elevation_Pa": self.pressure_drop.elevation_Pa,
            "pressure_drop_acceleration_Pa": self.pressure_drop.acceleration_Pa,
            "duty_W": self.duty_W,
            "heat_input_W": self.heat_input_W,
            "heat_input_tracing_W": self.heat_input_tracing_W,
            "heat_input_media_W": self.heat_input_media_W,
            "heat_loss_W": self.heat_loss_W,
            "energy_balance_residual_W": self.energy_balance_residual_W,
            "max_inner_wall_temperature_K": self.max_inner_wall_temperature_K,
            "max_inner_wall_position_m": self.max_inner_wall_position_m,
            "min_inner_wall_temperature_K": self.min_inner_wall_temperature_K,
            "min_inner_wall_position_m": self.min_inner_wall_position_m,
            "max_outer_surface_temperature_K": self.max_outer_surface_temperature_K,
            "max_outer_surface_position_m": self.max_outer_surface_position_m,
            "min_outer_surface_temperature_K": self.min_outer_surface_temperature_K,
            "min_outer_surface_position_m": self.min_outer_surface_position_m,
            "pump_power_W": self.pump_power_W,
            "residence_time_s": self.residence_time_s,
            "min_velocity_m_per_s": self.velocity_range_m_per_s[0],
            "max_velocity_m_per_s": self.velocity_range_m_per_s[1],
            "min_reynolds": self.reynolds_range[0],
            "max_reynolds": self.reynolds_range[1],
            "mass_flow_kg_per_s": self.mass_flow_kg_per_s,
        }

    def to_dict(self, include_profile: bool = True) -> dict:
        out: dict = {"name": self.name, "fluid": self.fluid_label, "cells": self.cells}
        # JSON has no NaN: a figure that does not apply (e.g. no surface in air) is null
        out.update({k: (None if isinstance(v, float) and not np.isfinite(v) else v)
                    for k, v in self.key_figures().items()})
        out["segments"] = [
            {
                "name": s.name,
                "x_start_m": s.x_start_m,
                "x_end_m": s.x_end_m,
                "inner_diameter_m": s.inner_diameter_m,
                "outer_diameter_m": s.outer_diameter_m,
                "fittings_K": s.fittings_K,
                "duty_W": s.duty_W,
                "heat_input_W": s.heat_input_W,
                "heat_loss_W": s.heat_loss_W,
                "pressure_drop_Pa": s.pressure_drop_Pa,
            }
            for s in self.segments
        ]
        if include_profile:
            out["profile"] = {k: _clean_list(v) for k, v in self.profile.columns().items()}
        out["checks"] = [c.to_dict() for c in self.checks]
        out["methods"] = list(self.methods)
        return out


def _clean_list(values: np.ndarray) -> list:
    """JSON has no NaN: write null instead."""
    return [None if not np.isfinite(v) else float(v) for v in np.asarray(values, dtype=float)]
