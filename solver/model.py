"""The project model: the single source of truth for a Calorun design.

Every quantity is SI; key names carry the unit where it is not obvious
(``length_m``, ``heat_input_W_per_m``). Temperatures are kelvin, pressures are
absolute pascal. The JSON file is exactly ``Project.model_dump(mode="json")``.

The model only describes the design. Catalogue look-ups (pipe schedules,
materials, fittings) and all physics live in other solver modules, so the model
stays small and the file stays stable.

Every number is bounded to what the physics and the methods support. Each bound is written
once, below, as ``Field(ge=..., le=...)`` metadata on a named type, so the loader, the editors'
refusals (``app.messages`` reads the pydantic error) and the fuzz strategies all use the same
numbers. To read them: ``Segment.model_fields["length_m"].metadata`` -> ``[Gt(gt=0.0),
Le(le=100000.0), AfterValidator(...), Ge(ge=0.001)]`` (the tightest bound of each side counts);
for an ``Optional`` field they sit on the ``Annotated`` argument of ``.annotation``. Text fields
carry their longest length as ``json_schema_extra["maxLength"]``; keys a file must give are
``required_in_file`` (and ``missing_in_file``) on each model.
"""

from __future__ import annotations

from typing import Annotated, ClassVar, Literal, Optional, Union

import numpy as np
from pydantic import (
    AfterValidator,
    BaseModel,
    ConfigDict,
    Field,
    ValidationInfo,
    field_validator,
    model_validator,
)

from solver.catalogue import SOLUTIONS, normalise_nps, pipe_dimensions
from solver.errors import InputError

FORMAT_TAG = "calorun-project"
SCHEMA_VERSION = 2

# --------------------------------------------------------------------------- bounds (the one place)


def _minimum_in_schema(schema: dict) -> None:
    # a minimum applied after a validator appears as "ge" in the JSON Schema; the schema word is "minimum"
    if "ge" in schema:
        schema["minimum"] = schema.pop("ge")


_THEN = AfterValidator(lambda value: value)


def _positive(minimum: float, maximum: float, **field):
    """A positive quantity with a plausible smallest value.

    Zero or a negative entry is refused as "must be more than 0" (what is wrong with it), a tiny
    positive one as "must be at least <minimum>": the no-op validator between the two keeps pydantic
    from checking the minimum first. Introspection sees ``Gt(0)``, ``Le(maximum)`` and ``Ge(minimum)``.
    """
    return Annotated[float, Field(gt=0.0, le=maximum, **field), _THEN,
                     Field(ge=minimum, json_schema_extra=_minimum_in_schema)]


# Temperatures [K].
# Process media (the fluid, its table, jacket media, held walls, limits and targets): 50 K is below
# the triple point of every fluid offered (oxygen 54.4 K is the lowest), 1000 K is where the
# pure-fluid property tables stop (solver.properties._T_CAP) and above any hot-oil or salt service.
ProcessTemperature = _positive(50.0, 1000.0, description="kelvin")
# Air around the pipe: −100 °C (below the coldest air recorded on Earth, −89 °C) to +200 °C (hot
# process enclosures); film temperatures then stay inside the shipped air table (150–900 K,
# solver.films.AirAtOneAtmosphere) for every process temperature above.
AirTemperature = _positive(173.15, 473.15, description="kelvin")
# Soil at pipe depth: −50 °C (permafrost is warmer) to +100 °C (moist soil cannot be hotter for long).
SoilTemperature = _positive(223.15, 373.15, description="kelvin")
Emissivity = Annotated[float, Field(ge=0.0, le=1.0)]
Fraction = Annotated[float, Field(ge=0.0, le=1.0)]

# Pressures [Pa, absolute].
# Line pressure: the pure-fluid property tables cover 1 kPa to 100 MPa (solver.properties._LOGP0/1).
LinePressure = _positive(1e3, 1e8, description="absolute")
# Steam: 1 kPa (saturation 7 °C; no use as a heating medium below) to 20 MPa, inside the shipped
# saturated-water table (611.7 Pa to 20.3 MPa, solver.steam).
SteamPressure = _positive(1e3, 2e7, description="absolute")

# Lengths [m].
# Segment: 1 mm (a fitting's worth of pipe) to 100 km (a long transfer line; split longer runs).
SegmentLength = _positive(1e-3, 1e5)
# Elevation change: bounded by the length (a model rule below); the same span here for introspection.
ElevationChange = Annotated[float, Field(ge=-1e5, le=1e5)]
# Bore: 1 mm (capillary tubing) to 3 m (the largest penstocks and ducts; ASME B36.10M stops at NPS 80, 2 m).
InnerDiameter = _positive(1e-3, 3.0)
# Pipe wall: 0 (thin wall) to 0.1 m (the thickest B36.10M wall, NPS 24 XXS/Sch 160, is under 60 mm).
WallThickness = Annotated[float, Field(ge=0.0, le=0.1)]
# Absolute roughness: 0 to 10 mm (riveted steel, the roughest entry of the Moody chart, 0.9–9 mm).
Roughness = Annotated[float, Field(ge=0.0, le=0.01)]
# Insulation or cladding layer: 0.1 mm (a sheet of cladding) to 1 m (no process insulation is
# thicker; common practice tops out near 0.3 m even on cryogenic lines).
LayerThickness = _positive(1e-4, 1.0)
# Burial depth to centreline: 1 cm to 100 m (deeper is a tunnel, not a buried pipe). The depth must
# also exceed the pipe's outer radius: the solver refuses that with the segment named (solver.line).
BurialDepth = _positive(0.01, 100.0)
# Steam tracer tube: 3 mm to 60 mm outside diameter (tracers are 3/8 to 1 in tube, common practice).
TracerTubeDiameter = _positive(3e-3, 0.06)

# Conductivities [W/(m·K)].
# Pipe wall: 0.05 (foamed plastic) to 500 (copper 400, the best pipe conductor).
WallConductivity = _positive(0.05, 500.0)
# Insulation and cladding: 0.001 (below vacuum panels, 0.004) to 500 (metal cladding).
LayerConductivity = _positive(1e-3, 500.0)
# Soil: 0.05 (dry peat) to 10 (no rock conducts better; quartzite is about 6).
SoilConductivity = _positive(0.05, 10.0)

# Flows.
# Mass flow: 1 mg/s (3.6 g/h: below that the line has no flow to speak of) to 100 t/s (a 3 m bore of
# water at 14 m/s).
MassFlow = _positive(1e-6, 1e5)
# Volume flow: 1 µL/s (1e-9 m³/s, the same order as the smallest mass flow) to 100 m³/s (the same
# 3 m bore at 14 m/s).
VolumeFlow = _positive(1e-9, 100.0)

# Heat and films.
# Heat input (tracing): 0 to 10 kW/m, some thirty times the strongest electric tracing cable (about
# 300 W/m, common practice), so heating strips and induction heating still fit.
HeatInputPerLength = Annotated[float, Field(ge=0.0, le=1e4)]
# Heater output per metre of heater: 0 to 10 kW/m (the same ceiling as the heat input above). The total
# per metre of pipe (output x runs x heater per pipe length) is held to HeatInputPerLength by Segment.
HeaterOutputPerLength = Annotated[float, Field(ge=0.0, le=1e4)]
# Heater runs along one segment: 1 to 20 (more than 4 parallel runs is rare, common practice).
HeaterCount = Annotated[int, Field(ge=1, le=20)]
# Metres of heater per metre of pipe: 1 (straight) to 10 (a tight spiral on a large bore; common practice
# rarely exceeds 3).
HeaterRatio = Annotated[float, Field(ge=1.0, le=10.0)]
# Equivalent length of pipe for a heat sink: 0 to 1 km per item (a pump casing is some metres).
EquivalentLength = Annotated[float, Field(ge=0.0, le=1e3)]
# Direct loss of a heat sink per kelvin of pipe-to-surroundings difference: 0 to 1 kW/K per item.
SinkConductance = Annotated[float, Field(ge=0.0, le=1e3)]
# Fouling resistance: 0 to 0.01 m²·K/W, five times the highest TEMA design value (0.002, heavy fuel oil).
FoulingResistance = Annotated[float, Field(ge=0.0, le=0.01)]
# Air film entered directly (convection + radiation): 0.5 to 1000 W/(m²·K); still air gives about
# 5–10, a gale about 100 (common practice).
AirFilmCoefficient = _positive(0.5, 1e3)
# Jacket or bath film: 1 W/(m²·K) (stagnant gas) to 100 kW/(m²·K) (dropwise condensation).
JacketFilmCoefficient = _positive(1.0, 1e5)
# Wind: 0.1 m/s (slower is still air: choose Still air) to 100 m/s (above the strongest recorded gusts
# at ground level bar one, 113 m/s).
WindSpeed = _positive(0.1, 100.0)
# Loss coefficient K per fitting: 0 to 1000 (a globe valve is about 6–10, a throttled valve some
# hundreds, common practice).
LossCoefficient = Annotated[float, Field(ge=0.0, le=1e3)]

# A user's property table (a liquid).
# Density: 1 kg/m³ to 25 000 kg/m³ (mercury 13 534; osmium, the densest element, 22 590).
TableDensity = _positive(1.0, 2.5e4)
# Specific heat: 50 J/(kg·K) (liquid metals ~140) to 50 000 (liquid hydrogen ~10 000).
TableSpecificHeat = _positive(50.0, 5e4)
# Viscosity: 1 µPa·s (below any liquid's) to 100 kPa·s (bitumen at room temperature).
TableViscosity = _positive(1e-6, 1e5)
# Heat of fusion: 0 to 1 MJ/kg (water 334 kJ/kg is about the highest of common liquids; most organics are
# 100–250 kJ/kg, from memory).
LatentHeat = Annotated[float, Field(ge=0.0, le=1e6)]
# Conductivity: 0.01 to 200 W/(m·K) (liquid sodium 85, the best liquid conductor in service).
TableConductivity = _positive(0.01, 200.0)

# Targets.
# Pressure drop: up to 100 MPa, the highest line pressure above.
PressureDropTarget = Annotated[float, Field(gt=0.0, le=1e8)]
# Heat input for the whole line: up to 1 GW (100 km at the largest heat input per metre).
HeatInputTarget = Annotated[float, Field(gt=0.0, le=1e9)]

# Counts of things in a file. Generous for a real line, small enough that a hostile file is
# refused at once instead of filling the memory: a 10 000-segment alternative loads in about 1 s and
# writes a 12 MB file (measured), so 20 000 is twice the largest the report is meant to handle;
# 200 alternatives is far beyond what a Side-by-Side can show.
MAX_ALTERNATIVES = 200
MAX_SEGMENTS = 20_000
MAX_FITTINGS = 100  # entries per segment (each with its own count)
MAX_LAYERS = 10  # insulation and cladding layers
MAX_TABLE_ROWS = 1_000


# --------------------------------------------------------------------------- text

# Names are shown in the Line Strip, headings and the report: 200 characters is a long sentence,
# more than any name needs. Descriptions are free notes: 10 000 characters is some pages of text.
NAME_MAX_CHARS = 200
TEXT_MAX_CHARS = 10_000


def _text_checker(max_chars: int):
    """Refuse text that is too long or cannot be written as UTF-8 (a lone UTF-16 surrogate, e.g.
    from ``"\\ud800"`` in JSON): such a name loads and solves but could never be saved.

    The messages carry no ", got <value>" part: the value may be millions of characters long or
    hold the very character that cannot be printed.
    """

    def check(text: str) -> str:
        if len(text) > max_chars:
            raise ValueError(f"too long: at most {max_chars:,} characters, this has {len(text):,}")
        try:
            text.encode("utf-8")
        except UnicodeEncodeError as exc:
            raise ValueError(
                f"contains a character that cannot be saved (U+{ord(text[exc.start]):04X})"
            ) from None
        return text

    return AfterValidator(check)


Name = Annotated[str, _text_checker(NAME_MAX_CHARS), Field(json_schema_extra={"maxLength": NAME_MAX_CHARS})]
Text = Annotated[str, _text_checker(TEXT_MAX_CHARS), Field(json_schema_extra={"maxLength": TEXT_MAX_CHARS})]


def _required_in_schema(schema: dict, model: type) -> None:
    # the JSON Schema (``calorun schema``) describes the file, so it lists the keys a file must give
    required = [key for key in getattr(model, "required_in_file", ()) if key not in schema.get("required", [])]
    if required:
        schema["required"] = [*schema.get("required", []), *required]


class _Model(BaseModel):
    """Common configuration: validate on assignment, reject unknown keys, no NaN."""

    model_config = ConfigDict(
        validate_assignment=True,
        extra="forbid",
        allow_inf_nan=False,
        populate_by_name=True,
        json_schema_extra=_required_in_schema,
    )

    #: Keys a project file must give: they define the line, so the loader takes no default for them
    #: (the defaults are for code and for the app's "new segment"). See ``missing_in_file``.
    required_in_file: ClassVar[tuple[str, ...]] = ()

    @classmethod
    def missing_in_file(cls, raw: dict) -> list[Union[str, ValueError]]:
        """The required keys ``raw`` (this object as a file holds it) lacks; a ``ValueError`` for a
        rule about several keys (one of two flows)."""
        return [key for key in cls.required_in_file if key not in raw]


# --------------------------------------------------------------------------- fluids


class PureFluid(_Model):
    """A pure substance evaluated with CoolProp's reference equations of state."""

    kind: Literal["pure"] = "pure"
    name: Name = Field("Water", description="generic CoolProp fluid name, e.g. Water, Air, Nitrogen")

    required_in_file: ClassVar[tuple[str, ...]] = ("name",)


class SolutionFluid(_Model):
    """An aqueous solution (glycol, brine) evaluated with CoolProp's incompressible library."""

    kind: Literal["solution"] = "solution"
    solute: Name = Field("MEG", description="CoolProp incompressible solution code, e.g. MEG, MPG, MNA")
    concentration: Fraction = Field(
        0.3, description="fraction of solute (mass or volume, as the solute defines)"
    )

    required_in_file: ClassVar[tuple[str, ...]] = ("solute", "concentration")

    @model_validator(mode="after")
    def _within_solute_range(self) -> "SolutionFluid":
        # each solute's fraction range is CoolProp's fit range (solver.catalogue.SOLUTIONS); refused here, on
        # the field, so a file or an edit beyond it never reaches the solver
        if self.solute not in SOLUTIONS:
            raise ValueError(f"solute: unknown solution code; offered: {', '.join(SOLUTIONS)}, got {self.solute!r}")
        label, basis, low, high = SOLUTIONS[self.solute]
        if not (low <= self.concentration <= high):
            raise ValueError(f"concentration: {label} is defined for {low:g} to {high:g} ({basis} fraction), "
                             f"got {self.concentration:g}")
        return self


class TableRow(_Model):
    temperature_K: ProcessTemperature
    density_kg_per_m3: TableDensity
    specific_heat_J_per_kgK: TableSpecificHeat
    viscosity_Pa_s: TableViscosity
    conductivity_W_per_mK: TableConductivity


class TableFluid(_Model):
    """A user-defined liquid from tabulated data (temperature -> properties).

    Properties are interpolated between rows (viscosity in its logarithm) and
    are not extrapolated: a state outside the table is an error.
    """

    kind: Literal["table"] = "table"
    name: Name = "Product"
    rows: list[TableRow] = Field(min_length=2, max_length=MAX_TABLE_ROWS)
    freezing_point_K: Optional[ProcessTemperature] = None
    latent_heat_J_per_kg: Optional[LatentHeat] = Field(
        None, description="heat of fusion at the freezing point, for the hold time; None = no freezing plateau")
    boiling_point_K: Optional[ProcessTemperature] = Field(
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


def _flow_rule(mass, volume) -> str:
    """The one wording of "give exactly one flow" (the model's rule and the loader's missing flow)."""
    return (
        "give exactly one of mass_flow_kg_per_s or volume_flow_m3_per_s, "
        f"got mass_flow_kg_per_s={mass}, volume_flow_m3_per_s={volume}"
    )


class Feed(_Model):
    """What enters the line. Give exactly one of mass flow or volume flow.

    A volume flow is converted to mass flow with the density at inlet
    temperature and pressure.
    """

    inlet_temperature_K: ProcessTemperature = 293.15
    inlet_pressure_Pa: LinePressure = 300_000.0
    mass_flow_kg_per_s: Optional[MassFlow] = 1.0
    volume_flow_m3_per_s: Optional[VolumeFlow] = None
    inlet_flow: Literal["developing", "developed"] = Field(
        "developing",
        description="developing: the flow enters from a vessel or header and develops from the inlet; "
                    "developed: it arrives fully developed from long upstream piping",
    )
    phase: Optional[Literal["liquid", "gas"]] = Field(
        None,
        description="the phase the feed is meant to enter in (gas includes vapour); the solver refuses an inlet "
                    "temperature and pressure that give the other phase. None: taken from the inlet state",
    )

    required_in_file: ClassVar[tuple[str, ...]] = ("inlet_temperature_K",)

    @classmethod
    def missing_in_file(cls, raw: dict) -> list[Union[str, ValueError]]:
        missing = super().missing_in_file(raw)
        if "mass_flow_kg_per_s" not in raw and "volume_flow_m3_per_s" not in raw:
            # without this, the default mass flow (1 kg/s) would stand in for a flow the file never gave
            missing.append(ValueError(_flow_rule(None, None)))
        return missing

    @model_validator(mode="after")
    def _one_flow(self) -> "Feed":
        given = (self.mass_flow_kg_per_s is not None) + (self.volume_flow_m3_per_s is not None)
        if given != 1:
            raise ValueError(_flow_rule(self.mass_flow_kg_per_s, self.volume_flow_m3_per_s))
        return self


class Limits(_Model):
    """Alternative-level limits that the Checks compare against."""

    max_inner_wall_temperature_K: Optional[ProcessTemperature] = None
    min_bulk_temperature_K: Optional[ProcessTemperature] = None
    maintain_temperature_K: Optional[ProcessTemperature] = Field(
        None, description="the temperature the tracing must hold in the worst case; None = the minimum bulk "
                          "temperature, else 5 K above the freezing point (freeze protection, common practice)")


# --------------------------------------------------------------------------- segment parts


class Pipe(_Model):
    """Bore, wall and roughness of a segment.

    ``bore`` selects how the inner diameter is given: ``"nps"`` resolves NPS and
    schedule per ASME B36.10M; ``"diameter"`` takes ``inner_diameter_m`` and
    ``wall_thickness_m`` as entered. Roughness and wall conductivity default to
    the typical value of ``material`` when not entered.
    """

    bore: Literal["nps", "diameter"] = "nps"
    nps: Optional[Name] = Field("2", description='nominal pipe size, e.g. "2", "1-1/2", "3/4"')
    schedule: Optional[Name] = Field("40", description='e.g. "40", "80", "STD", "XS", "10S"')
    inner_diameter_m: Optional[InnerDiameter] = None
    wall_thickness_m: Optional[WallThickness] = None
    material: Name = Field("carbon steel", description="key of the pipe material catalogue")
    roughness_m: Optional[Roughness] = Field(None, description="absolute roughness; None = material default")
    wall_conductivity_W_per_mK: Optional[WallConductivity] = Field(None, description="None = material default")

    @classmethod
    def missing_in_file(cls, raw: dict) -> list[Union[str, ValueError]]:
        # The bore is what the file gives for it: NPS and schedule, or the diameter and wall (those
        # have no default, so the model's own rule refuses them missing).
        if raw.get("bore", "nps") == "nps":
            return [key for key in ("nps", "schedule") if key not in raw]
        return []

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

    material: Name = "mineral wool"
    thickness_m: LayerThickness
    conductivity_W_per_mK: Optional[LayerConductivity] = Field(
        None, description="constant conductivity; None = the catalogue material's k(T), averaged over the "
                          "layer's face temperatures (ASTM C680 method; solver.insulation)")


class Fitting(_Model):
    """Fittings in a segment: a catalogue item (``kind``) or a direct loss coefficient.

    For a catalogue item the loss coefficient follows from its published method
    (see ``solver.fittings``); with ``kind == "custom"`` give ``K`` directly.
    """

    kind: Name = "elbow_90_standard"
    count: int = Field(1, ge=1, le=10_000)
    K: Optional[LossCoefficient] = Field(None, description="loss coefficient per fitting, for kind 'custom'")
    label: Name = ""

    @model_validator(mode="after")
    def _custom_needs_k(self) -> "Fitting":
        if self.kind == "custom" and self.K is None:
            raise ValueError("a 'custom' fitting needs its loss coefficient K, got None")
        return self


# --------------------------------------------------------------------------- surroundings


class StillAir(_Model):
    """Ambient air without wind: natural convection plus radiation."""

    kind: Literal["still_air"] = "still_air"
    temperature_K: AirTemperature = 293.15
    emissivity: Emissivity = 0.9
    indoors: bool = Field(
        False, description="inside a building: the project's design cases leave this air as entered (the "
                           "building's heating or cooling decides it, not the outdoor design ambient)")
    relative_humidity: Optional[Fraction] = Field(
        None, description="0–1; when given, cold surfaces are checked against the dew point"
    )
    film_coefficient_W_per_m2K: Optional[AirFilmCoefficient] = Field(
        None, description="outer film coefficient entered directly (convection + radiation); None = computed"
    )


class Wind(_Model):
    """Ambient air with wind in cross-flow, plus radiation."""

    kind: Literal["wind"] = "wind"
    temperature_K: AirTemperature = 283.15
    wind_speed_m_per_s: WindSpeed = 5.0
    emissivity: Emissivity = 0.9
    relative_humidity: Optional[Fraction] = Field(
        None, description="0–1; when given, cold surfaces are checked against the dew point"
    )
    film_coefficient_W_per_m2K: Optional[AirFilmCoefficient] = None


class Buried(_Model):
    """Pipe buried in soil: conduction shape factor of a cylinder below an isothermal surface."""

    kind: Literal["buried"] = "buried"
    soil_temperature_K: SoilTemperature = 283.15
    depth_m: BurialDepth = Field(1.0, description="from ground surface to pipe centreline")
    soil_conductivity_W_per_mK: SoilConductivity = 1.2


class Jacket(_Model):
    """A jacket or bath medium at a known temperature with a known film coefficient."""

    kind: Literal["jacket"] = "jacket"
    medium_temperature_K: ProcessTemperature = 353.15
    film_coefficient_W_per_m2K: JacketFilmCoefficient = 1000.0

    # a heating or cooling medium: its default would heat or cool the line unasked
    required_in_file: ClassVar[tuple[str, ...]] = ("medium_temperature_K", "film_coefficient_W_per_m2K")


def _wall_source_rule(wall_temperature, steam_pressure) -> str:
    """The one wording of "give exactly one of wall temperature or steam pressure"."""
    return (
        "give exactly one of wall_temperature_K or steam_pressure_Pa, "
        f"got wall_temperature_K={wall_temperature}, steam_pressure_Pa={steam_pressure}"
    )


class FixedWall(_Model):
    """The pipe's outer wall held at a fixed temperature, or heated by condensing steam.

    Give the wall temperature (an idealisation: the wall is held exactly there), or
    the steam pressure (absolute) of saturated steam condensing on the pipe: then the
    condensate film (Nusselt film condensation on a horizontal tube) and any steam-side
    fouling lie between the steam and the pipe wall. Insulation layers play no part here.
    """

    kind: Literal["fixed_wall"] = "fixed_wall"
    wall_temperature_K: Optional[ProcessTemperature] = 423.15
    steam_pressure_Pa: Optional[SteamPressure] = None
    steam_side_fouling_m2K_per_W: FoulingResistance = Field(
        0.0, description="fouling resistance on the steam side (with steam pressure only), per m² of pipe outside"
    )

    @classmethod
    def missing_in_file(cls, raw: dict) -> list[Union[str, ValueError]]:
        if "wall_temperature_K" not in raw and "steam_pressure_Pa" not in raw:
            # without this, the default wall at 150 °C would heat the line unasked
            return [ValueError(_wall_source_rule(None, None))]
        return []

    @model_validator(mode="after")
    def _one_source(self) -> "FixedWall":
        given = (self.wall_temperature_K is not None) + (self.steam_pressure_Pa is not None)
        if given != 1:
            raise ValueError(_wall_source_rule(self.wall_temperature_K, self.steam_pressure_Pa))
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

    steam_pressure_Pa: SteamPressure = 450_000.0
    count: int = Field(1, ge=1, le=12)
    tube_outer_diameter_m: TracerTubeDiameter = Field(0.0127, description="tube outside diameter (1/2 in by default)")
    contact: Literal["bare", "cement"] = "bare"


# --------------------------------------------------------------------------- heaters and heat sinks


class _HeaterRuns(_Model):
    """What every heater kind shares: parallel runs and spiralling (common practice in tracing design).

    The heat per metre of pipe is the heater's output per metre of heater times ``count`` times
    ``heater_per_pipe_length`` (1 for a straight run, more where the heater is spiralled).
    """

    count: HeaterCount = Field(1, description="parallel heater runs along the segment")
    heater_per_pipe_length: HeaterRatio = Field(1.0, description="metres of heater per metre of pipe (spiral ratio)")

    @property
    def runs_per_pipe_metre(self) -> float:
        return self.count * self.heater_per_pipe_length


class ConstantHeater(_HeaterRuns):
    """Constant output: the same W/m whatever the pipe temperature (series-resistance or mineral-insulated
    heaters, heating strips)."""

    kind: Literal["constant"] = "constant"
    output_W_per_m: HeaterOutputPerLength = Field(description="per metre of heater")

    required_in_file: ClassVar[tuple[str, ...]] = ("output_W_per_m",)

    def output_per_pipe_metre(self, t_pipe_K):
        """Heat per metre of pipe [W/m] at pipe temperature ``t_pipe_K`` [K] (scalar or array)."""
        return self.output_W_per_m * self.runs_per_pipe_metre + 0.0 * t_pipe_K

    @property
    def full_output_per_pipe_metre(self) -> float:
        return self.output_W_per_m * self.runs_per_pipe_metre


class SelfLimitingHeater(_HeaterRuns):
    """Temperature-dependent output, the self-limiting kind: output falls as the pipe warms.

    Given as the output at two pipe temperatures; linear between them and extrapolated on both sides,
    never below zero (common practice: a straight line through two points of the maker's output curve
    is the usual design model). Above ``zero_output_temperature_K`` the heater gives nothing.
    """

    kind: Literal["self_limiting"] = "self_limiting"
    output_low_W_per_m: HeaterOutputPerLength = Field(description="output per metre of heater at temperature_low_K")
    temperature_low_K: ProcessTemperature
    output_high_W_per_m: HeaterOutputPerLength = Field(description="output per metre of heater at temperature_high_K")
    temperature_high_K: ProcessTemperature

    required_in_file: ClassVar[tuple[str, ...]] = (
        "output_low_W_per_m", "temperature_low_K", "output_high_W_per_m", "temperature_high_K")

    @model_validator(mode="after")
    def _falls_with_temperature(self) -> "SelfLimitingHeater":
        if self.temperature_high_K <= self.temperature_low_K:
            raise ValueError(
                "temperature_high_K must be above temperature_low_K, "
                f"got {self.temperature_high_K} K and {self.temperature_low_K} K")
        if self.output_high_W_per_m >= self.output_low_W_per_m:
            raise ValueError(
                "output_high_W_per_m must be below output_low_W_per_m (a self-limiting heater gives less "
                f"when hotter), got {self.output_high_W_per_m} W/m and {self.output_low_W_per_m} W/m")
        return self

    @property
    def slope_W_per_mK(self) -> float:
        """How much the output per metre of pipe falls per kelvin [W/(m·K)] (positive)."""
        return ((self.output_low_W_per_m - self.output_high_W_per_m)
                / (self.temperature_high_K - self.temperature_low_K)) * self.runs_per_pipe_metre

    @property
    def zero_output_temperature_K(self) -> float:
        """The pipe temperature where the straight line reaches zero output [K]."""
        return self.temperature_low_K + self.output_low_W_per_m * self.runs_per_pipe_metre / self.slope_W_per_mK

    def output_per_pipe_metre(self, t_pipe_K):
        """Heat per metre of pipe [W/m] at pipe temperature ``t_pipe_K`` [K] (scalar or array), clamped at 0."""
        return np.maximum(self.slope_W_per_mK * (self.zero_output_temperature_K - np.asarray(t_pipe_K, dtype=float)), 0.0)

    @property
    def full_output_per_pipe_metre(self) -> float:
        """The output at temperature_low_K per metre of pipe (the rating point the user gave first)."""
        return self.output_low_W_per_m * self.runs_per_pipe_metre


class ThermostatHeater(_HeaterRuns):
    """A constant-output heater switched by a thermostat on the pipe: on below ``set_point_K``, off above.

    In the steady solve the segment's heater delivers the share of its full output (the duty cycle)
    that holds the segment's coldest pipe wall at the set point, where its full output can; the hot
    design case takes the controller as failed on (full output).
    """

    kind: Literal["thermostat"] = "thermostat"
    output_W_per_m: HeaterOutputPerLength = Field(description="full output per metre of heater")
    set_point_K: ProcessTemperature

    required_in_file: ClassVar[tuple[str, ...]] = ("output_W_per_m", "set_point_K")

    def output_per_pipe_metre(self, t_pipe_K):
        """Full output per metre of pipe [W/m] (on); the controller's duty is the solver's business."""
        return self.output_W_per_m * self.runs_per_pipe_metre + 0.0 * t_pipe_K

    @property
    def full_output_per_pipe_metre(self) -> float:
        return self.output_W_per_m * self.runs_per_pipe_metre


Heater = Annotated[Union[ConstantHeater, SelfLimitingHeater, ThermostatHeater], Field(discriminator="kind")]

#: Kinds of heat sink on a segment (common practice in trace-heating design lists exactly these).
HEAT_SINK_KINDS = ("pipe_support", "valve", "flange_pair", "pump", "instrument", "other")


class HeatSink(_Model):
    """Things on a segment that lose heat beyond its pipe: supports, valves, flanges, pumps, instruments.

    A catalogue kind loses what ``solver.heat_sinks`` gives for it at the segment's bore (an equivalent
    length of the segment's own insulated pipe, from published trace-heating practice). Any item may give
    its own ``equivalent_length_m`` instead (metres of the segment's insulated pipe), or for ``"other"``
    a ``bare_length_m`` (metres of the same pipe without insulation) or a ``loss_W_per_K`` (heat lost per
    kelvin between pipe and surroundings).
    """

    kind: Literal["pipe_support", "valve", "flange_pair", "pump", "instrument", "other"] = "pipe_support"
    count: int = Field(1, ge=1, le=10_000)
    label: Name = ""
    equivalent_length_m: Optional[EquivalentLength] = Field(
        None, description="per item, metres of the segment's insulated pipe; None = the catalogue value")
    bare_length_m: Optional[EquivalentLength] = Field(None, description="per item, metres of bare pipe ('other')")
    loss_W_per_K: Optional[SinkConductance] = Field(None, description="per item, W per K of pipe-to-surroundings difference ('other')")

    @model_validator(mode="after")
    def _other_says_how_much(self) -> "HeatSink":
        given = sum(v is not None for v in (self.equivalent_length_m, self.bare_length_m, self.loss_W_per_K))
        if given > 1:
            raise ValueError("give at most one of equivalent_length_m, bare_length_m or loss_W_per_K, "
                             f"got {self.equivalent_length_m}, {self.bare_length_m}, {self.loss_W_per_K}")
        if self.kind == "other" and given == 0:
            raise ValueError("an 'other' heat sink needs equivalent_length_m, bare_length_m or loss_W_per_K, got none")
        return self


# --------------------------------------------------------------------------- segment, alternative, project


class Segment(_Model):
    """A straight run of the line with one wall model.

    Heat input (tracing) enters at the outer surface of the pipe wall, under
    the insulation; from there it flows to the fluid or, through the insulation
    and outer film, to the surroundings.
    """

    name: Name = "Segment"
    length_m: SegmentLength = 10.0
    pipe: Pipe = Field(default_factory=Pipe)
    elevation_change_m: ElevationChange = Field(0.0, description="outlet elevation minus inlet elevation")
    fittings: list[Fitting] = Field(default_factory=list, max_length=MAX_FITTINGS)
    heater: Optional[Heater] = Field(None, description="electric tracing on the segment; None = none")
    heat_sinks: list[HeatSink] = Field(default_factory=list, max_length=MAX_FITTINGS)
    design_margin: Optional[Fraction] = Field(
        None, description="margin on heat loss when sizing this segment's tracing; None = the project's")
    steam_tracer: Optional[SteamTracer] = None
    inside_fouling_m2K_per_W: FoulingResistance = Field(
        0.0, description="fouling resistance on the fluid side, per m² of bore surface"
    )
    insulation: list[Layer] = Field(default_factory=list, max_length=MAX_LAYERS)
    surroundings: Surroundings = Field(default_factory=StillAir)

    required_in_file: ClassVar[tuple[str, ...]] = ("length_m", "pipe")

    @model_validator(mode="before")
    @classmethod
    def _heat_input_as_heater(cls, data):
        # Schema 1 gave tracing as one number, heat_input_W_per_m (constant output per metre of pipe). It is
        # read as a constant heater (the file migration and code that builds segments use this one rule).
        if isinstance(data, dict) and "heat_input_W_per_m" in data:
            data = dict(data)
            q = data.pop("heat_input_W_per_m")
            if data.get("heater") is not None:
                raise ValueError("give heater or heat_input_W_per_m, not both")
            if isinstance(q, (int, float)) and not isinstance(q, bool) and q > 0:
                data["heater"] = ConstantHeater(output_W_per_m=q)
            elif not (isinstance(q, (int, float)) and not isinstance(q, bool) and q == 0):
                data["heater"] = {"kind": "constant", "output_W_per_m": q}  # refused by the heater's own bounds
        return data

    @property
    def heat_input_W_per_m(self) -> float:
        """The heater's rated output per metre of pipe [W/m]: full output (constant, thermostat), the first
        rating point (self-limiting); 0 without a heater. What it delivers is in the solve's results."""
        return 0.0 if self.heater is None else self.heater.full_output_per_pipe_metre

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
        if self.heat_sinks and isinstance(self.surroundings, (FixedWall, Adiabatic)):
            raise ValueError(
                "heat_sinks lose heat to the surroundings, and a held wall or an adiabatic outside has none to "
                f"lose it to, got surroundings {self.surroundings.kind!r}")
        if self.heater is not None and self.heater.full_output_per_pipe_metre > 1e4:
            raise ValueError(
                "heater output per metre of pipe (output x count x heater per pipe length) must be at most "
                f"10000 W/m, got {self.heater.full_output_per_pipe_metre:g} W/m")
        if self.steam_tracer is not None and isinstance(self.surroundings, (FixedWall, Jacket)):
            raise ValueError(
                "steam_tracer cannot be combined with a jacket or a fixed wall temperature "
                f"(the jacket or wall already sets the outside), got surroundings {self.surroundings.kind!r}"
            )
        return self


# --------------------------------------------------------------------------- where an alternative came from

# A Sweep kept with the alternative it made: 2 000 points is a fine 1-D sweep or a 45 × 45 grid; each
# point keeps at most 60 figures (Result.key_figures() has about 35). A 2 000-point record with every
# figure is about 2 MB of JSON, inside the default file limit (solver.project_io.DEFAULT_MAX_FILE_MB).
MAX_SWEEP_POINTS = 2_000
MAX_POINT_FIGURES = 60
# Targets of one search: the finder offers nine kinds, each at most once or twice.
MAX_SEARCH_TARGETS = 20
# A parameter as its to_dict() gives it: a kind and the segments it applies to (one key each, a few more spare).
MAX_PARAMETER_KEYS = 8

# A key-figure key as Result.key_figures() names it (``outlet_temperature_K``), or a parameter key.
FigureKey = Annotated[str, Field(pattern=r"^[A-Za-z][A-Za-z0-9_]{0,63}$")]
# A swept value: a number in SI (W/m, m, kg/s, m³/s, K, Pa) or a standard size's name ("2", "1-1/2" for NPS).
SweptValue = Union[float, Name]
# What a parameter's to_dict() holds: its kind, the segments (0-based) it applies to, a segment's name.
ParameterEntry = Union[Name, int, float, bool, None,
                       Annotated[list[Annotated[int, Field(ge=0, lt=MAX_SEGMENTS)]], Field(max_length=MAX_SEGMENTS)]]


class SweepPoint(_Model):
    """One variant of a Sweep: the value(s) it was solved at and its key figures (SI, keys of
    ``Result.key_figures()``); a variant that could not be solved keeps no figures."""

    value: SweptValue
    value2: Optional[SweptValue] = Field(None, description="the second parameter's value of a grid sweep")
    figures: Annotated[dict[FigureKey, float], Field(max_length=MAX_POINT_FIGURES)] = Field(default_factory=dict)


class SearchRecord(_Model):
    """How a Target Finder answer or a point picked from a Sweep was found, kept with the alternative
    it became (``Alternative.origin``) so the report can say what was searched, over what range,
    against which targets, which one binds and the value found. Words are as the tool wrote them (the
    unit system of the search); numbers are SI."""

    tool: Literal["Target Finder", "Sweep"]
    base_alternative: Name = Field(description="the alternative the search started from")
    parameter: Annotated[dict[FigureKey, ParameterEntry], Field(max_length=MAX_PARAMETER_KEYS)] = Field(
        description="what was varied, as solver.variants.Parameter.to_dict() gives it")
    parameter_text: Text = ""
    parameter2: Optional[Annotated[dict[FigureKey, ParameterEntry], Field(max_length=MAX_PARAMETER_KEYS)]] = None
    parameter2_text: Text = ""
    searched: Text = Field("", description="what was searched, over what range, in plain words")
    targets: Annotated[list[Text], Field(max_length=MAX_SEARCH_TARGETS)] = Field(default_factory=list)
    target_limits: Annotated[list[dict[FigureKey, Union[Name, float]]], Field(max_length=MAX_SEARCH_TARGETS)] = Field(
        default_factory=list, description="the targets as solver.target_finder.Target.to_dict() gives them (SI)")
    binding: Text = Field("", description="the target with the least margin at the value found; '' if none")
    value_text: Name = ""
    value: Optional[SweptValue] = None
    value2: Optional[SweptValue] = None
    explanation: Text = ""
    sweep_points: Annotated[list[SweepPoint], Field(max_length=MAX_SWEEP_POINTS)] = Field(default_factory=list)


class Alternative(_Model):
    """One complete design of the line: fluid, feed, segments in flow order, limits."""

    name: Name = "Base case"
    description: Text = ""
    fluid: Fluid = Field(default_factory=PureFluid)
    feed: Feed = Field(default_factory=Feed)
    segments: list[Segment] = Field(min_length=1, max_length=MAX_SEGMENTS)
    limits: Limits = Field(default_factory=Limits)
    # written only when there is one, so a file without search records stays as earlier versions wrote it
    origin: Optional[SearchRecord] = Field(None, description="how a Target Finder or Sweep made it; None = by hand",
                                           exclude_if=lambda value: value is None)

    required_in_file: ClassVar[tuple[str, ...]] = ("fluid", "feed")


class Targets(_Model):
    """Design targets set on the project, judged for each alternative."""

    outlet_temperature_min_K: Optional[ProcessTemperature] = None
    outlet_temperature_max_K: Optional[ProcessTemperature] = None
    max_inner_wall_temperature_K: Optional[ProcessTemperature] = None
    max_pressure_drop_Pa: Optional[PressureDropTarget] = None
    max_heat_input_W: Optional[HeatInputTarget] = None


class DesignCases(_Model):
    """The conditions a traced or insulated line is designed for, set once for the project.

    Besides the operating case (each segment's own surroundings), a worst case (coldest design air,
    strongest wind, optionally no flow) and a hot case (warmest air, no flow, heaters at full output).
    The defaults are placeholders: the site's meteorological data and the owner's specification decide.
    """

    worst_air_temperature_K: AirTemperature = Field(253.15, description="minimum design ambient")
    worst_wind_speed_m_per_s: WindSpeed = Field(10.0, description="maximum design wind")
    worst_soil_temperature_K: Optional[SoilTemperature] = Field(None, description="None = each segment's own")
    worst_no_flow: bool = Field(True, description="the worst case has no flow (the line must hold standing still)")
    hot_air_temperature_K: AirTemperature = Field(313.15, description="maximum design ambient")
    design_margin: Fraction = Field(0.2, description="margin on heat loss when sizing tracing (common practice 10-25 %)")


class Project(_Model):
    """A Calorun project: one or more alternatives of one line, and their targets."""

    format: Literal["calorun-project"] = FORMAT_TAG
    schema_version: Literal[2] = SCHEMA_VERSION
    name: Name = "Untitled line"
    description: Text = ""
    prepared_by: Name = ""
    revision: Name = ""
    alternatives: list[Alternative] = Field(min_length=1, max_length=MAX_ALTERNATIVES)
    baseline: Optional[Name] = Field(None, description="name of the baseline alternative; None = the first")
    targets: Targets = Field(default_factory=Targets)
    design_cases: DesignCases = Field(default_factory=DesignCases)

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
