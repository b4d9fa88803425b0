"""Results of a solve: profiles along the line, key figures, checks.

Plain data (numpy arrays and floats, SI units), so the GUI, the CLI and the
report can all read it without any physics of their own.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field
from typing import Literal, Optional

import numpy as np

Severity = Literal["info", "warning", "danger"]
#: The one severity order: higher is worse. Sort worst first with ``-SEVERITY_ORDER[s]``.
SEVERITY_ORDER = {"info": 0, "warning": 1, "danger": 2}


def check_sort_key(check: "Check") -> tuple:
    """Worst first, then in flow order: the one order every list of checks uses."""
    return (-SEVERITY_ORDER.get(check.severity, -1), check.x_m if check.x_m is not None else 0.0)


# --------------------------------------------------------------------------- words every output shares

#: Cautions shown in the app and printed in every report (common practice in engineering software for
#: heated lines; the wording is ours). The banner is the one-line form of the same list.
CAUTIONS: tuple[str, ...] = (
    "Results are engineering estimates from idealised models and published correlations; their "
    "uncertainty is often 10–25 % for film coefficients and more in transitional flow. They are not "
    "a substitute for a design check.",
    "Hot surfaces burn: heated lines and their supports can exceed safe touch temperatures; provide "
    "personnel protection where the outer surface is hot.",
    "A heated liquid that is blocked in (valves closed on both sides) expands and can overpressure "
    "the line; provide thermal relief.",
    "Lines can freeze or boil: loss of tracing, flow or insulation, or a control failure, can take "
    "the fluid outside the range computed here.",
    "Tracing in hazardous (classified) areas has temperature-class limits on the maximum sheath and "
    "surface temperature; this tool does not certify compliance.",
    "Defer to local codes, the applicable piping and electrical standards, the equipment "
    "manufacturers' data and licensed engineering review before anything is bought or built.",
)
CAUTIONS_BANNER = (
    "Engineering estimates only — hot surfaces burn · blocked-in heated liquid overpressures · "
    "lines can freeze or boil · tracing in hazardous areas has temperature-class limits · "
    "defer to local codes, the applicable standards and licensed engineering review."
)

#: What every solve assumes; the report prints this list.
ASSUMPTIONS: tuple[str, ...] = (
    "Steady state: no start-up, shut-down or cycling transients.",
    "One-dimensional flow marched along the line in flow order; the fluid is single-phase. Where a "
    "check reports boiling, flashing or freezing, the results beyond that point are not valid.",
    "No axial heat conduction in the fluid or the wall.",
    "Fluid properties from CoolProp (pure fluids, aqueous solutions) or from the user's table, "
    "evaluated locally along the line at the bulk temperature; table data are not extrapolated. The inside "
    "coefficient carries the property-ratio correction for the wall temperature (viscosity or Prandtl "
    "ratio for liquids, temperature ratio for gases).",
    "The energy balance carries enthalpy, kinetic and potential energy (h + v²/2 + g·z): a fast gas cools as it "
    "accelerates. Friction heats the fluid "
    "(enthalpy includes flow work), so an adiabatic liquid line warms slightly.",
    "Entry lengths start at the line inlet (or the flow arrives developed, as the feed says); a change "
    "of bore restarts the hydrodynamic and thermal entry, a change of the wall's heating or surroundings "
    "the thermal entry only.",
    "Heat input (tracing) is uniform around the pipe and along each segment and enters at the outer "
    "surface of the pipe wall, under the insulation; local hot spots at a tracer's contact line "
    "are not modelled.",
    "Electric heaters: constant output; self-limiting output falls linearly with the pipe-wall temperature "
    "through the two rating points and beyond, never below zero (common practice); a thermostat gives the "
    "steady share of its full output (its duty) that holds the segment's coldest pipe wall at the set point, "
    "the on/off cycling averaged out.",
    "Heat sinks (supports, valves, flanges, pumps, instruments) lose as equivalent lengths of the segment's "
    "insulated or bare pipe, or a direct W/K, spread evenly along the segment (published trace-heating "
    "allowances; sources in solver.heat_sinks).",
    "Pipe wall and insulation layers conduct radially with the constant conductivities entered or "
    "taken from the material catalogue; no contact resistance between layers. With a jacket or a "
    "fixed wall temperature, insulation layers play no part.",
    "Outside: natural convection or wind in cross-flow plus radiation to surroundings at the ambient "
    "temperature, in air at 1 atm; a buried pipe loses heat by conduction to a ground surface at the "
    "soil temperature.",
    "Fittings act through loss coefficients K on the local velocity head, spread evenly over their "
    "segment; elevation changes act through the local density.",
    "Hydraulic power is the local volume flow times the pressure drop summed along "
    "the line; divide by the pump efficiency for shaft power.",
    "Correlations are used within their published ranges where possible; a check is raised when a "
    "state falls outside a correlation's range or in transitional flow.",
)


@dataclass(frozen=True)
class Check:
    """One finding: severity, a stable code, a plain message, and where it applies."""

    severity: Severity
    code: str
    message: str
    segment: Optional[int] = None  # index into the alternative's segments
    x_m: Optional[float] = None  # position along the line from the inlet
    template: str = ""  # the message with its values as unit tokens; see render_message

    @property
    def title(self) -> str:
        """A few plain words for the finding, for one-line verdicts ("freezes with the flow stopped")."""
        return CHECK_TITLES.get(self.code, self.code.replace("_", " ").lower())

    def to_dict(self) -> dict:
        return {
            "severity": self.severity,
            "code": self.code,
            "message": self.message,
            "segment": self.segment,
            "x_m": self.x_m,
        }


#: Short plain titles of the check codes (the messages say the rest).
CHECK_TITLES: dict[str, str] = {
    "DESIGN_NOT_HELD": "tracing cannot hold in the worst case",
    "HOT_CASE_WALL": "wall too hot in the hot case",
    "WORST_CASE_FAILED": "worst case has no solution",
    "BOILING_BULK": "the liquid boils",
    "BOILING_WALL": "boiling at the wall",
    "NEAR_BOILING": "close to boiling",
    "CONDENSING_BULK": "the gas condenses",
    "CONDENSING_WALL": "condensate on the wall",
    "FREEZING_BULK": "the fluid freezes",
    "FREEZING_WALL": "frozen layer on the wall",
    "NEAR_FREEZING": "close to freezing",
    "WALL_LIMIT": "wall above its limit",
    "MIN_BULK_LIMIT": "bulk below its minimum",
    "TRANSITIONAL_FLOW": "transitional flow",
    "VELOCITY_HIGH": "velocity high",
    "VELOCITY_LOW": "velocity low",
    "HOT_SURFACE": "surface hot enough to burn",
    "COLD_SURFACE": "surface cold enough to injure",
    "HOT_JACKET": "jacket hot enough to burn",
    "INSULATION_IGNORED": "insulation plays no part",
    "CORRELATION_RANGE": "correlation outside its range",
    "NO_FLOW_FREEZE": "freezes with the flow stopped",
    "NO_FLOW_HOLD": "too cold with the flow stopped",
    "NO_FLOW_OVERHEAT": "too hot with the flow stopped",
    "SURFACE_CONDENSATION": "surface below the dew point",
    "TRACER_IDLE": "steam tracer gives no heat",
    "MACH_HIGH": "compressible flow",
    "NEAR_CHOKING": "close to choking",
    "GAS_PHASE_FEED": "fed as vapour",
}

_TOKEN = re.compile(r"⟦(T|dT|v|q|n):([-+0-9.eE]+)⟧")


def _si_text(kind: str, value: float) -> str:
    if kind == "T":
        return f"{value - 273.15:.1f} °C"
    if kind == "dT":
        return f"{value:g} K"
    if kind == "v":
        return f"{value:.1f} m/s" if abs(value) >= 10 else f"{value:.2f} m/s"
    if kind == "n":
        return plain_number(value)
    return f"{value:.0f} W/m"


def plain_number(value: float, digits: int = 3) -> str:
    """A dimensionless number to ``digits`` significant digits, thin-space grouped, never an exponent
    (Reynolds 19 700, Prandtl 0.712). The app's units module writes the same format."""
    if not np.isfinite(value):
        return "—"
    if value == 0:
        return "0"
    places = digits - 1 - int(np.floor(np.log10(abs(value))))  # decimal places; negative rounds to tens…
    rounded = round(abs(value), places)
    text = f"{rounded:,.{max(places, 0)}f}".replace(",", "\u2009")
    return ("\u2212" if value < 0 else "") + text


def render_message(template: str, formatter=None) -> str:
    """A check message with its value tokens written out.

    Tokens are ``⟦T:kelvin⟧``, ``⟦dT:kelvin⟧``, ``⟦v:m/s⟧``, ``⟦q:W/m⟧``, ``⟦n:number⟧``. ``formatter(kind, value)``
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
    "heater_output_W_per_m": ("Heater output delivered per length of pipe", "W/m"),
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
    #: local velocity / speed of sound (CoolProp) at the nodes; None where the property source has no speed
    #: of sound (solutions, user tables: liquids, whose Mach number is negligible). Not a CSV column.
    mach_number: Optional[np.ndarray] = None
    #: electric heater output delivered at the node's pipe-wall temperature [W per m of pipe], 0 without a heater
    heater_output_W_per_m: Optional[np.ndarray] = None

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
    heat_loss_W: float  # to the ambient, heat sinks included
    pressure_drop_Pa: float
    heater_kind: str = ""  # "constant", "self_limiting", "thermostat"; "" without an electric heater
    heater_rated_W_per_m: float = 0.0  # rated output per metre of pipe (Segment.heat_input_W_per_m)
    heater_output_W_per_m: float = 0.0  # delivered, length-mean per metre of pipe at the solved wall temperature
    thermostat_duty: float = math.nan  # share of full output a thermostat gives (0–1); NaN without one
    heat_sink_loss_W: float = 0.0  # of heat_loss_W, what the segment's heat sinks lose

    @property
    def length_m(self) -> float:
        return self.x_end_m - self.x_start_m

    @property
    def heat_loss_W_per_m(self) -> float:
        """The segment's heat loss per metre of pipe, heat sinks included [W/m] (what a heater is sized by)."""
        return self.heat_loss_W / self.length_m

    @property
    def pipe_heat_loss_W_per_m(self) -> float:
        """The pipe's own heat loss per metre, without the heat sinks [W/m]."""
        return (self.heat_loss_W - self.heat_sink_loss_W) / self.length_m


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


# --------------------------------------------------------------------------- the one list of key figures


@dataclass(frozen=True)
class KeyFigure:
    """One headline figure: its key, the one label every view prints, its quantity and its method.

    ``key`` is the key of :meth:`Result.key_figures` and of the JSON results. ``quantity`` names a
    quantity of ``app.units`` for the value; ``difference_quantity`` the one for a difference of two
    values (a temperature difference is not a temperature). ``part_of`` names the figure this one is a
    share of (indented under it). ``position_key`` names the key of the position where the value
    occurs; ``inlet_key`` the inlet value it is read against. ``negative_label`` is the label to use,
    with the sign turned, when the value is negative (heat loss that is really a gain).
    """

    key: str
    label: str
    quantity: str
    group: str
    method: str
    difference_quantity: str = ""
    part_of: str = ""
    position_key: str = ""
    inlet_key: str = ""
    negative_label: str = ""
    compared: bool = True  # shown in comparisons of alternatives (a residual is not worth comparing)

    def indented_label(self, indent: str = "   ") -> str:
        """The label, indented under the figure it is a share of."""
        return f"{indent}{self.label}" if self.part_of else self.label


def _kf(key, label, quantity, group, method, **kw) -> KeyFigure:
    kw.setdefault("difference_quantity", {"temperature": "temperature_difference",
                                          "pressure": "pressure_difference"}.get(quantity, quantity))
    return KeyFigure(key, label, quantity, group, method, **kw)


#: The Key Figures, in reading order, read by the Key Figures panel, Side-by-Side, the CLI table,
#: ``--json`` and the report.
KEY_FIGURES: tuple[KeyFigure, ...] = (
    _kf("outlet_temperature_K", "Outlet temperature", "temperature", "Outlet",
        "Bulk (mixing-cup) temperature at the last node, from the outlet enthalpy and pressure.",
        inlet_key="inlet_temperature_K"),
    _kf("outlet_pressure_Pa", "Outlet pressure", "pressure", "Outlet",
        "Absolute pressure at the last node.", inlet_key="inlet_pressure_Pa"),
    _kf("pressure_drop_Pa", "Pressure drop", "pressure_difference", "Pressure",
        "Inlet minus outlet pressure: friction + fittings + elevation + acceleration."),
    _kf("pressure_drop_friction_Pa", "friction", "pressure_difference", "Pressure",
        "Darcy friction factor × (dx/D) × velocity head, summed over cells.", part_of="pressure_drop_Pa"),
    _kf("pressure_drop_fittings_Pa", "fittings", "pressure_difference", "Pressure",
        "Loss coefficients K × velocity head, per segment.", part_of="pressure_drop_Pa"),
    _kf("pressure_drop_elevation_Pa", "elevation", "pressure_difference", "Pressure",
        "Local density × g × rise; negative where the line goes down.", part_of="pressure_drop_Pa"),
    _kf("pressure_drop_acceleration_Pa", "acceleration", "pressure_difference", "Pressure",
        "Mass flux² × change of 1/density (gases speeding up).", part_of="pressure_drop_Pa"),
    _kf("pump_power_W", "Hydraulic power", "power", "Pressure",
        "Local volume flow × pressure drop, summed along the line (before pump efficiency)."),
    _kf("duty_W", "Heat to fluid", "power", "Heat",
        "Heat taken up by the fluid = heat input − heat loss; negative when the fluid is cooled."),
    _kf("heat_input_W", "Heat input", "power", "Heat",
        "Tracing plus heat from heating or cooling media (jackets, fixed-temperature walls)."),
    _kf("heat_input_tracing_W", "tracing", "power", "Heat",
        "Tracing output in W/m × segment length, summed.", part_of="heat_input_W"),
    _kf("heat_input_media_W", "jackets and heated walls", "power", "Heat",
        "Heat from jackets and fixed-temperature walls; negative where they cool.", part_of="heat_input_W"),
    _kf("heat_loss_W", "Heat loss to surroundings", "power", "Heat",
        "Heat to the ambient air and soil; negative when the surroundings heat the line.",
        negative_label="Heat gained from surroundings"),
    _kf("heat_sink_loss_W", "heat sinks", "power", "Heat",
        "Loss of supports, valves, flanges, pumps and instruments: equivalent lengths of the segment's insulated "
        "or bare pipe at its solved temperatures, or a direct W/K (solver.heat_sinks names each value's source).",
        part_of="heat_loss_W"),
    _kf("max_heat_loss_per_length_W_per_m", "Highest heat loss per metre (a segment)", "power_per_length", "Heat",
        "The largest of the segments' heat loss ÷ length, heat sinks included: what a heater is chosen by."),
    _kf("energy_balance_residual_W", "Energy balance residual", "power", "Heat",
        "m·(h_out − h_in + g·Δz) − heat to fluid; round-off when the march has closed.", compared=False),
    _kf("min_bulk_temperature_K", "Min bulk temperature", "temperature", "Wall and flow",
        "Lowest bulk (mixing-cup) temperature at a node along the line: what a maintain temperature is held against.",
        position_key="min_bulk_position_m"),
    _kf("max_inner_wall_temperature_K", "Max inner-wall temperature", "temperature", "Wall and flow",
        "Highest inner-wall temperature along the line (bulk + heat flux × inside film resistance).",
        position_key="max_inner_wall_position_m"),
    _kf("min_inner_wall_temperature_K", "Min inner-wall temperature", "temperature", "Wall and flow",
        "Lowest inner-wall temperature along the line.", position_key="min_inner_wall_position_m"),
    _kf("max_outer_surface_temperature_K", "Max outer-surface temperature (in air)", "temperature",
        "Wall and flow", "Highest temperature of a surface exposed to air (over insulation where there is any).",
        position_key="max_outer_surface_position_m"),
    _kf("min_outer_surface_temperature_K", "Min outer-surface temperature (in air)", "temperature",
        "Wall and flow", "Lowest temperature of a surface exposed to air.",
        position_key="min_outer_surface_position_m"),
    _kf("min_velocity_m_per_s", "Min velocity", "velocity", "Wall and flow", "Lowest mean velocity in a cell."),
    _kf("max_velocity_m_per_s", "Max velocity", "velocity", "Wall and flow", "Highest mean velocity in a cell."),
    _kf("min_reynolds", "Min Reynolds number", "dimensionless", "Wall and flow",
        "Lowest Reynolds number in a cell (bore, local viscosity)."),
    _kf("max_reynolds", "Max Reynolds number", "dimensionless", "Wall and flow",
        "Highest Reynolds number in a cell."),
    _kf("residence_time_s", "Residence time", "time", "Wall and flow", "Σ cell length / velocity, inlet to outlet."),
    _kf("mass_flow_kg_per_s", "Mass flow", "mass_flow", "Wall and flow",
        "As given, or the volume flow × inlet density."),
)
KEY_FIGURE_BY_KEY: dict[str, KeyFigure] = {f.key: f for f in KEY_FIGURES}


def key_figure(key: str) -> KeyFigure:
    """The :class:`KeyFigure` with this key (KeyError names the keys that exist)."""
    try:
        return KEY_FIGURE_BY_KEY[key]
    except KeyError:
        raise KeyError(f"no key figure {key!r}; known: {', '.join(KEY_FIGURE_BY_KEY)}") from None



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
    # per segment: its heat path as resistances per metre (solver.resistances.SegmentResistances)
    resistances: list = field(default_factory=list)
    # the design cases (solver.design_cases.DesignResult) when solve(..., design=...) asked for them
    design: object = None
    heat_sink_loss_W: float = 0.0  # of heat_loss_W, what the heat sinks lose
    min_bulk_temperature_K: float = math.nan  # lowest bulk temperature at a node (what a maintain target holds)
    min_bulk_position_m: float = math.nan

    @property
    def max_heat_loss_per_length_W_per_m(self) -> float:
        """The largest segment heat loss per metre, heat sinks included [W/m]."""
        return max((s.heat_loss_W_per_m for s in self.segments), default=math.nan)

    @property
    def pressure_drop_Pa(self) -> float:
        return self.inlet_pressure_Pa - self.outlet_pressure_Pa

    @property
    def max_mach_number(self) -> Optional[float]:
        """The highest Mach number along the line, or None when the fluid data have no speed of sound."""
        mach = self.profile.mach_number
        return None if mach is None else float(np.max(mach))

    @property
    def worst_severity(self) -> Optional[Severity]:
        if not self.checks:
            return None
        return max(self.checks, key=lambda c: SEVERITY_ORDER[c.severity]).severity

    def check_counts(self) -> dict[str, int]:
        """Number of checks of each severity, worst first: {"danger": n, "warning": n, "info": n}."""
        counts = {s: 0 for s in sorted(SEVERITY_ORDER, key=SEVERITY_ORDER.get, reverse=True)}
        for c in self.checks:
            counts[c.severity] = counts.get(c.severity, 0) + 1
        return counts

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
            "heat_sink_loss_W": self.heat_sink_loss_W,
            "max_heat_loss_per_length_W_per_m": self.max_heat_loss_per_length_W_per_m,
            "energy_balance_residual_W": self.energy_balance_residual_W,
            "min_bulk_temperature_K": self.min_bulk_temperature_K,
            "min_bulk_position_m": self.min_bulk_position_m,
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
            "inlet_temperature_K": self.inlet_temperature_K,
            "inlet_pressure_Pa": self.inlet_pressure_Pa,
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
                "heat_loss_W_per_m": s.heat_loss_W_per_m,
                "pipe_heat_loss_W_per_m": s.pipe_heat_loss_W_per_m,
                "heat_sink_loss_W": s.heat_sink_loss_W,
                "heater_kind": s.heater_kind or None,
                "heater_rated_W_per_m": s.heater_rated_W_per_m,
                "heater_output_W_per_m": s.heater_output_W_per_m,
                "thermostat_duty_fraction": None if not math.isfinite(s.thermostat_duty) else s.thermostat_duty,
            }
            for s in self.segments
        ]
        for seg_out, res in zip(out["segments"], self.resistances):
            seg_out["resistances"] = res.to_dict()
        if include_profile:
            out["profile"] = {k: _clean_list(v) for k, v in self.profile.columns().items()}
        out["checks"] = [c.to_dict() for c in self.checks]
        out["methods"] = list(self.methods)
        return out


def _clean_list(values: np.ndarray) -> list:
    """JSON has no NaN: write null instead."""
    return [None if not np.isfinite(v) else float(v) for v in np.asarray(values, dtype=float)]
