"""The project model: the single source of truth for a Calorun design.

Every quantity is SI; key names carry the unit where it is not obvious
(``length_m``, ``heat_input_W_per_m``). Temperatures are kelvin, pressures are
absolute pascal. The JSON file is exactly ``Project.model_dump(mode="json")``.

The model only describes the design. Catalogue look-ups (pipe schedules,
materials, fittings) and all physics live in other solver modules, so the model
stays small and the file stays stable.
"""

from __future__ import annotations

from typing import Annotated, Literal, Optional, Union

from pydantic import (
    BaseModel,
    ConfigDict,
    Field,
    PositiveFloat,
    ValidationInfo,
    field_validator,
    model_validator,
)

from solver.catalogue import normalise_nps, pipe_dimensions
from solver.errors import InputError

FORMAT_TAG = "calorun-project"
SCHEMA_VERSION = 1

NonNegativeFloat = Annotated[float, Field(ge=0.0)]
Temperature = Annotated[float, Field(gt=0.0, le=2000.0, description="kelvin")]
Emissivity = Annotated[float, Field(ge=0.0, le=1.0)]


class _Model(BaseModel):
    """Common configuration: validate on assignment, reject unknown keys, no NaN."""

    model_config = ConfigDict(
        validate_assignment=True,
        extra="forbid",
        allow_inf_nan=False,
        populate_by_name=True,
    )


# --------------------------------------------------------------------------- fluids


class PureFluid(_Model):
    """A pure substance evaluated with CoolProp's reference equations of state."""

    kind: Literal["pure"] = "pure"
    name: str = Field("Water", description="generic CoolProp fluid name, e.g. Water, Air, Nitrogen")


class SolutionFluid(_Model):
    """An aqueous solution (glycol, brine) evaluated with CoolProp's incompressible library."""

    kind: Literal["solution"] = "solution"
    solute: str = Field("MEG", description="CoolProp incompressible solution code, e.g. MEG, MPG, MNA")
    concentration: float = Field(
        0.3, ge=0.0, le=1.0, description="fraction of solute (mass or volume, as the solute defines)"
    )


class TableRow(_Model):
    temperature_K: Temperature
    density_kg_per_m3: PositiveFloat
    specific_heat_J_per_kgK: PositiveFloat
    viscosity_Pa_s: PositiveFloat
    conductivity_W_per_mK: PositiveFloat


class TableFluid(_Model):
    """A user-defined liquid from tabulated data (temperature -> properties).

    Properties are interpolated between rows (viscosity in its logarithm) and
    are not extrapolated: a state outside the table is an error.
    """

    kind: Literal["table"] = "table"
    name: str = "Product"
    rows: list[TableRow] = Field(min_length=2)
    freezing_point_K: Optional[Temperature] = None
    boiling_point_K: Optional[Temperature] = Field(
        None, description="boiling point at the line pressure, if known (checked as a fixed value)"
    )

    @field_validator("rows")
    @classmethod
    def _rows_increasing(cls, rows: list[TableRow]) -> list[TableRow]:
        temps = [r.temperature_K for r in rows]
        for i in range(1, len(temps)):
            if temps[i] <= temps[i - 1]:
                raise ValueError(
                    f"temperatures must increase row by row; row {i} has {temps[i]} K "
                    f"after {temps[i - 1]} K"
                )
        return rows


Fluid = Annotated[Union[PureFluid, SolutionFluid, TableFluid], Field(discriminator="kind")]


# --------------------------------------------------------------------------- feed and limits


class Feed(_Model):
    """What enters the line. Give exactly one of mass flow or volume flow.

    A volume flow is converted to mass flow with the density at inlet
    temperature and pressure.
    """

    inlet_temperature_K: Temperature = 293.15
    inlet_pressure_Pa: PositiveFloat = Field(300_000.0, description="absolute")
    mass_flow_kg_per_s: Optional[PositiveFloat] = 1.0
    volume_flow_m3_per_s: Optional[PositiveFloat] = None
    inlet_flow: Literal["developing", "developed"] = Field(
        "developing",
        description="developing: the flow enters from a vessel or header and develops from the inlet; "
                    "developed: it arrives fully developed from long upstream piping",
    )

    @model_validator(mode="after")
    def _one_flow(self) -> "Feed":
        given = (self.mass_flow_kg_per_s is not None) + (self.volume_flow_m3_per_s is not None)
        if given != 1:
            raise ValueError(
                "give exactly one of mass_flow_kg_per_s or volume_flow_m3_per_s, "
                f"got mass_flow_kg_per_s={self.mass_flow_kg_per_s}, "
                f"volume_flow_m3_per_s={self.volume_flow_m3_per_s}"
            )
        return self


class Limits(_Model):
    """Alternative-level limits that the Checks compare against."""

    max_inner_wall_temperature_K: Optional[Temperature] = None
    min_bulk_temperature_K: Optional[Temperature] = None


# --------------------------------------------------------------------------- segment parts


class Pipe(_Model):
    """Bore, wall and roughness of a segment.

    ``bore`` selects how the inner diameter is given: ``"nps"`` resolves NPS and
    schedule per ASME B36.10M; ``"diameter"`` takes ``inner_diameter_m`` and
    ``wall_thickness_m`` as entered. Roughness and wall conductivity default to
    the typical value of ``material`` when not entered.
    """

    bore: Literal["nps", "diameter"] = "nps"
    nps: Optional[str] = Field("2", description='nominal pipe size, e.g. "2", "1-1/2", "3/4"')
    schedule: Optional[str] = Field("40", description='e.g. "40", "80", "STD", "XS", "10S"')
    inner_diameter_m: Optional[PositiveFloat] = None
    wall_thickness_m: Optional[NonNegativeFloat] = None
    material: str = Field("carbon steel", description="key of the pipe material catalogue")
    roughness_m: Optional[NonNegativeFloat] = Field(None, description="absolute roughness; None = material default")
    wall_conductivity_W_per_mK: Optional[PositiveFloat] = Field(None, description="None = material default")

    # An NPS or schedule that ASME B36.10M/B36.19M does not list is refused on entry, on the field
    # itself, so a file or an edit with one never reaches the solver.
    @field_validator("nps")
    @classmethod
    def _nps_listed(cls, nps: Optional[str]) -> Optional[str]:
        if nps:
            _catalogue_check(lambda: normalise_nps(nps))
        return nps

    @field_validator("schedule")
    @classmethod
    def _schedule_listed(cls, schedule: Optional[str], info: ValidationInfo) -> Optional[str]:
        nps = info.data.get("nps")
        if schedule and nps and info.data.get("bore") == "nps":
            _catalogue_check(lambda: pipe_dimensions(nps, schedule))
        return schedule

    @model_validator(mode="after")
    def _bore_complete(self) -> "Pipe":
        if self.bore == "nps":
            if not self.nps or not self.schedule:
                raise ValueError(f"bore 'nps' needs nps and schedule, got nps={self.nps!r}, schedule={self.schedule!r}")
        else:
            if self.inner_diameter_m is None:
                raise ValueError("bore 'diameter' needs inner_diameter_m, got None")
            if self.wall_thickness_m is None:
                raise ValueError("bore 'diameter' needs wall_thickness_m (0 for a thin wall), got None")
        return self


def _catalogue_check(look_up) -> None:
    """Run a catalogue look-up; its InputError becomes the ValueError pydantic reports on the field."""
    try:
        look_up()
    except InputError as exc:
        raise ValueError(f"{exc.reason}, got {exc.value!r}") from None


class Layer(_Model):
    """One insulation (or cladding) layer around the pipe, innermost first."""

    material: str = "mineral wool"
    thickness_m: PositiveFloat
    conductivity_W_per_mK: PositiveFloat


class Fitting(_Model):
    """Fittings in a segment: a catalogue item (``kind``) or a direct loss coefficient.

    For a catalogue item the loss coefficient follows from its published method
    (see ``solver.fittings``); with ``kind == "custom"`` give ``K`` directly.
    """

    kind: str = "elbow_90_standard"
    count: int = Field(1, ge=1, le=10_000)
    K: Optional[NonNegativeFloat] = Field(None, description="loss coefficient per fitting, for kind 'custom'")
    label: str = ""

    @model_validator(mode="after")
    def _custom_needs_k(self) -> "Fitting":
        if self.kind == "custom" and self.K is None:
            raise ValueError("a 'custom' fitting needs its loss coefficient K, got None")
        return self


# --------------------------------------------------------------------------- surroundings


class StillAir(_Model):
    """Ambient air without wind: natural convection plus radiation."""

    kind: Literal["still_air"] = "still_air"
    temperature_K: Temperature = 293.15
    emissivity: Emissivity = 0.9
    relative_humidity: Optional[float] = Field(
        None, ge=0.0, le=1.0, description="0–1; when given, cold surfaces are checked against the dew point"
    )
    film_coefficient_W_per_m2K: Optional[PositiveFloat] = Field(
        None, description="outer film coefficient entered directly (convection + radiation); None = computed"
    )


class Wind(_Model):
    """Ambient air with wind in cross-flow, plus radiation."""

    kind: Literal["wind"] = "wind"
    temperature_K: Temperature = 283.15
    wind_speed_m_per_s: PositiveFloat = 5.0
    emissivity: Emissivity = 0.9
    relative_humidity: Optional[float] = Field(
        None, ge=0.0, le=1.0, description="0–1; when given, cold surfaces are checked against the dew point"
    )
    film_coefficient_W_per_m2K: Optional[PositiveFloat] = None


class Buried(_Model):
    """Pipe buried in soil: conduction shape factor of a cylinder below an isothermal surface."""

    kind: Literal["buried"] = "buried"
    soil_temperature_K: Temperature = 283.15
    depth_m: PositiveFloat = Field(1.0, description="from ground surface to pipe centreline")
    soil_conductivity_W_per_mK: PositiveFloat = 1.2


class Jacket(_Model):
    """A jacket or bath medium at a known temperature with a known film coefficient."""

    kind: Literal["jacket"] = "jacket"
    medium_temperature_K: Temperature = 353.15
    film_coefficient_W_per_m2K: PositiveFloat = 1000.0


class FixedWall(_Model):
    """The pipe's outer wall held at a fixed temperature, or heated by condensing steam.

    Give the wall temperature (an idealisation: the wall is held exactly there), or
    the steam pressure (absolute) of saturated steam condensing on the pipe: then the
    condensate film (Nusselt film condensation on a horizontal tube) and any steam-side
    fouling lie between the steam and the pipe wall. Insulation layers play no part here.
    """

    kind: Literal["fixed_wall"] = "fixed_wall"
    wall_temperature_K: Optional[Temperature] = 423.15
    steam_pressure_Pa: Optional[PositiveFloat] = None
    steam_side_fouling_m2K_per_W: NonNegativeFloat = Field(
        0.0, description="fouling resistance on the steam side (with steam pressure only), per m² of pipe outside"
    )

    @model_validator(mode="after")
    def _one_source(self) -> "FixedWall":
        given = (self.wall_temperature_K is not None) + (self.steam_pressure_Pa is not None)
        if given != 1:
            raise ValueError(
                "give exactly one of wall_temperature_K or steam_pressure_Pa, "
                f"got wall_temperature_K={self.wall_temperature_K}, steam_pressure_Pa={self.steam_pressure_Pa}"
            )
        return self


class Adiabatic(_Model):
    """No exchange with any surroundings (a perfectly insulated outside)."""

    kind: Literal["adiabatic"] = "adiabatic"


Surroundings = Annotated[
    Union[StillAir, Wind, Buried, Jacket, FixedWall, Adiabatic], Field(discriminator="kind")
]


class SteamTracer(_Model):
    """Steam tube tracers laid along the pipe under its insulation.

    Saturated steam at ``steam_pressure_Pa`` (absolute) in ``count`` tubes; each passes heat to
    the pipe wall through its contact conductance per metre, which depends on ``contact``:
    ``"bare"`` (wired to the pipe) or ``"cement"`` (bedded in heat-transfer cement). The heat a
    tracer gives then depends on the pipe temperature; see ``solver.steam``.
    """

    steam_pressure_Pa: PositiveFloat = Field(450_000.0, description="absolute")
    count: int = Field(1, ge=1, le=12)
    tube_outer_diameter_m: PositiveFloat = Field(0.0127, description="tube outside diameter (1/2 in by default)")
    contact: Literal["bare", "cement"] = "bare"


# --------------------------------------------------------------------------- segment, alternative, project


class Segment(_Model):
    """A straight run of the line with one wall model.

    Heat input (tracing) enters at the outer surface of the pipe wall, under
    the insulation; from there it flows to the fluid or, through the insulation
    and outer film, to the surroundings.
    """

    name: str = "Segment"
    length_m: PositiveFloat = 10.0
    pipe: Pipe = Field(default_factory=Pipe)
    elevation_change_m: float = Field(0.0, description="outlet elevation minus inlet elevation")
    fittings: list[Fitting] = Field(default_factory=list)
    heat_input_W_per_m: NonNegativeFloat = 0.0
    steam_tracer: Optional[SteamTracer] = None
    inside_fouling_m2K_per_W: NonNegativeFloat = Field(
        0.0, description="fouling resistance on the fluid side, per m² of bore surface"
    )
    insulation: list[Layer] = Field(default_factory=list)
    surroundings: Surroundings = Field(default_factory=StillAir)

    @model_validator(mode="after")
    def _consistent(self) -> "Segment":
        if abs(self.elevation_change_m) > self.length_m:
            raise ValueError(
                f"elevation_change_m must not exceed length_m in magnitude, "
                f"got {self.elevation_change_m} m over {self.length_m} m"
            )
        if isinstance(self.surroundings, FixedWall) and self.heat_input_W_per_m > 0:
            raise ValueError(
                "heat_input_W_per_m cannot be combined with a fixed wall temperature "
                f"(the wall already has its temperature), got {self.heat_input_W_per_m} W/m"
            )
        if self.steam_tracer is not None and isinstance(self.surroundings, (FixedWall, Jacket)):
            raise ValueError(
                "steam_tracer cannot be combined with a jacket or a fixed wall temperature "
                f"(the jacket or wall already sets the outside), got surroundings {self.surroundings.kind!r}"
            )
        return self


class Alternative(_Model):
    """One complete design of the line: fluid, feed, segments in flow order, limits."""

    name: str = "Base case"
    description: str = ""
    fluid: Fluid = Field(default_factory=PureFluid)
    feed: Feed = Field(default_factory=Feed)
    segments: list[Segment] = Field(min_length=1)
    limits: Limits = Field(default_factory=Limits)


class Targets(_Model):
    """Design targets set on the project, judged for each alternative."""

    outlet_temperature_min_K: Optional[Temperature] = None
    outlet_temperature_max_K: Optional[Temperature] = None
    max_inner_wall_temperature_K: Optional[Temperature] = None
    max_pressure_drop_Pa: Optional[PositiveFloat] = None
    max_heat_input_W: Optional[PositiveFloat] = None


class Project(_Model):
    """A Calorun project: one or more alternatives of one line, and their targets."""

    format: Literal["calorun-project"] = FORMAT_TAG
    schema_version: Literal[1] = SCHEMA_VERSION
    name: str = "Untitled line"
    description: str = ""
    prepared_by: str = ""
    revision: str = ""
    alternatives: list[Alternative] = Field(min_length=1)
    baseline: Optional[str] = Field(None, description="name of the baseline alternative; None = the first")
    targets: Targets = Field(default_factory=Targets)

    @model_validator(mode="after")
    def _unique_names(self) -> "Project":
        seen: set[str] = set()
        for i, alt in enumerate(self.alternatives):
            if alt.name in seen:
                raise ValueError(f"alternative names must be unique; alternatives[{i}].name {alt.name!r} is repeated")
            seen.add(alt.name)
        if self.baseline is not None and self.baseline not in seen:
            raise ValueError(f"baseline {self.baseline!r} names no alternative")
        return self

    def baseline_alternative(self) -> Alternative:
        for alt in self.alternatives:
            if alt.name == self.baseline:
                return alt
        return self.alternatives[0]
