"""Generate the sample projects. Fernbrook Works is an invented plant; all data are demo data.

    .venv/bin/python sample_projects/make_samples.py
"""
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))
from solver.model import (Alternative, Buried, ConstantHeater, DesignCases, Feed, Fitting, FixedWall, HeatSink, Layer,
                          Limits, Pipe, Project, PureFluid, Segment, SelfLimitingHeater, SolutionFluid, StillAir,
                          TableFluid, TableRow, Targets, Wind)
from solver.project_io import save_project
from solver import solve

C = lambda t: t + 273.15
bar = lambda b: b * 1e5

OIL_ROWS = [  # invented demo data: a light residual product, shaped like a typical fuel oil
    (20, 880, 1880, 0.120, 0.135), (40, 867, 1950, 0.052, 0.133), (60, 854, 2020, 0.026, 0.131),
    (80, 841, 2090, 0.0145, 0.129), (100, 828, 2160, 0.0088, 0.127), (120, 815, 2230, 0.0057, 0.125),
    (140, 802, 2300, 0.0039, 0.123), (160, 789, 2370, 0.0028, 0.121), (180, 776, 2440, 0.0021, 0.119),
    (200, 763, 2510, 0.0016, 0.117),
]
def oil(name="Residue product R-7 (demo data)"):
    return TableFluid(name=name, rows=[TableRow(temperature_K=C(t), density_kg_per_m3=r, specific_heat_J_per_kgK=c,
        viscosity_Pa_s=m, conductivity_W_per_mK=k) for t, r, c, m, k in OIL_ROWS], freezing_point_K=C(12))

wool = lambda mm: Layer(material="mineral wool", thickness_m=mm / 1000, conductivity_W_per_mK=0.045)
foam = lambda mm: Layer(material="flexible elastomeric foam", thickness_m=mm / 1000, conductivity_W_per_mK=0.036)
elbows = lambda n: Fitting(kind="elbow_90_standard", count=n)

def sinks(supports=0, valves=0, flanges=0, instruments=0):
    """Heat sinks of a segment (catalogue equivalent lengths, solver.heat_sinks); invented counts."""
    out = []
    for kind, n in (("pipe_support", supports), ("valve", valves), ("flange_pair", flanges), ("instrument", instruments)):
        if n:
            out.append(HeatSink(kind=kind, count=n))
    return out

def traced(heater, ins_mm):
    """The residue line's five segments with ``heater`` (None: untraced) on every one."""
    return [
        Segment(name="Tank outlet", length_m=12, pipe=Pipe(nps="2", schedule="40"), insulation=[wool(ins_mm)],
                fittings=[Fitting(kind="pipe_entrance_sharp"), Fitting(kind="gate_valve_full", count=1), elbows(2)],
                heater=heater, surroundings=StillAir(temperature_K=C(15))),
        Segment(name="Pipe rack east", length_m=85, pipe=Pipe(nps="2", schedule="40"), insulation=[wool(ins_mm)],
                heater=heater, fittings=[elbows(4)], elevation_change_m=6.0,
                surroundings=Wind(temperature_K=C(-5), wind_speed_m_per_s=6.0)),
        Segment(name="Road crossing", length_m=18, pipe=Pipe(nps="2", schedule="40"), insulation=[wool(ins_mm)],
                heater=heater, elevation_change_m=-7.0, fittings=[elbows(2)],
                surroundings=Buried(soil_temperature_K=C(4), depth_m=1.2, soil_conductivity_W_per_mK=1.4)),
        Segment(name="Pipe rack west", length_m=60, pipe=Pipe(nps="2", schedule="40"), insulation=[wool(ins_mm)],
                heater=heater, elevation_change_m=3.0, fittings=[elbows(3)],
                surroundings=Wind(temperature_K=C(-5), wind_speed_m_per_s=6.0)),
        Segment(name="Unit feed", length_m=10, pipe=Pipe(nps="2", schedule="40"), insulation=[wool(ins_mm)],
                heater=heater, fittings=[Fitting(kind="globe_valve"), elbows(2)],
                surroundings=StillAir(indoors=True, temperature_K=C(18))),
    ]

# Invented demo rating of a self-limiting heater (not any maker's product): per metre of heater,
# 40 W/m with the pipe at 10 °C falling to 25 W/m at 65 °C (straight line, zero output near 157 °C).
DEMO_SELF_LIMITING = SelfLimitingHeater(output_low_W_per_m=40.0, temperature_low_K=C(10),
                                        output_high_W_per_m=25.0, temperature_high_K=C(65))

def resin_alt(name, heater, ins, desc):
    return Alternative(name=name, description=desc, fluid=oil(),
        feed=Feed(inlet_temperature_K=C(75), inlet_pressure_Pa=bar(6), mass_flow_kg_per_s=0.40),
        segments=traced(heater, ins),
        limits=Limits(max_inner_wall_temperature_K=C(110), min_bulk_temperature_K=C(55)))

projects = {}
projects["traced_residue_line"] = Project(
    name="Fernbrook Works — residue transfer to Unit 4",
    description="Invented demo scenario: a viscous residue product (user-defined property table, demo data) pumped "
                "in laminar flow from tank T-12 to Unit 4, electrically traced and insulated, across a pipe rack "
                "in winter wind and under a road. The product must stay above 55 °C (pour point margin) and the "
                "wall below 110 °C (product degradation).",
    prepared_by="Process engineering (demo)", revision="A",
    alternatives=[
        resin_alt("Trace 25 W/m, 50 mm wool", DEMO_SELF_LIMITING, 50,
                  "Self-limiting tracing, invented demo rating: 40 W/m at 10 °C falling to 25 W/m at 65 °C (per metre "
                  "of heater, straight between), one run; 50 mm mineral wool."),
        resin_alt("Trace 15 W/m, 80 mm wool", ConstantHeater(output_W_per_m=15.0), 80,
                  "Constant-output tracing, 15 W/m; thicker insulation."),
        resin_alt("No tracing, 80 mm wool", None, 80, "Insulation only: shows how far the product cools without tracing."),
    ],
    targets=Targets(outlet_temperature_min_K=C(60), max_inner_wall_temperature_K=C(110),
                    max_pressure_drop_Pa=bar(3.0), max_heat_input_W=6000.0),
    # placeholders for the demo: the site's meteorological data and the owner's specification decide
    design_cases=DesignCases(worst_air_temperature_K=C(-20), worst_wind_speed_m_per_s=10.0, worst_no_flow=True,
                             hot_air_temperature_K=C(35), design_margin=0.2),
)

def glycol_alt(name, mm, desc):
    return Alternative(name=name, description=desc, fluid=SolutionFluid(solute="MEG", concentration=0.30),
        feed=Feed(inlet_temperature_K=C(7.0), inlet_pressure_Pa=bar(3.5), mass_flow_kg_per_s=4.0),
        segments=[
            Segment(name="Plant room riser", length_m=14, pipe=Pipe(nps="3", schedule="40"), elevation_change_m=8.0,
                    insulation=[foam(mm)], fittings=[elbows(3), Fitting(kind="ball_valve")],
                    surroundings=StillAir(indoors=True, temperature_K=C(30), emissivity=0.9, relative_humidity=0.80)),
            Segment(name="Packing hall high level", length_m=120, pipe=Pipe(nps="3", schedule="40"),
                    insulation=[foam(mm)], fittings=[elbows(6), Fitting(kind="tee_through_run", count=4)],
                    surroundings=StillAir(indoors=True, temperature_K=C(32), emissivity=0.9, relative_humidity=0.80)),
            Segment(name="Drop to chiller", length_m=16, pipe=Pipe(nps="3", schedule="40"), elevation_change_m=-8.0,
                    insulation=[foam(mm)], fittings=[elbows(3), Fitting(kind="check_valve_swing")],
                    surroundings=StillAir(indoors=True, temperature_K=C(26), emissivity=0.9, relative_humidity=0.80)),
        ],
        limits=Limits())
projects["glycol_return"] = Project(
    name="Fernbrook Works — chilled glycol return, packing hall",
    description="Invented demo scenario: 30 % ethylene glycol returning from the packing hall coolers to the "
                "chiller through a warm hall at high level. How much heat does the return pick up, and is the "
                "insulation thick enough that its surface stays above the dew point of the humid hall air?",
    prepared_by="Utilities engineering (demo)", revision="B",
    alternatives=[glycol_alt("Foam 19 mm", 19, "Flexible elastomeric foam, 19 mm."),
                  glycol_alt("Foam 32 mm", 32, "Flexible elastomeric foam, 32 mm.")],
    baseline="Foam 19 mm",
    targets=Targets(outlet_temperature_max_K=C(8.0), max_pressure_drop_Pa=bar(1.5)),
)

def jacket_alt(name, desc, inside_fouling=0.0, steam_fouling=0.0):
    return Alternative(name=name, description=desc, fluid=PureFluid(name="Water"),
        feed=Feed(inlet_temperature_K=C(15), inlet_pressure_Pa=bar(6.0), mass_flow_kg_per_s=2.2),
        segments=[
            Segment(name="Feed from header", length_m=6, pipe=Pipe(nps="2", schedule="40"), insulation=[wool(40)],
                    fittings=[Fitting(kind="gate_valve_full"), elbows(1)], surroundings=StillAir(indoors=True, temperature_K=C(20))),
            Segment(name="Steam jacket", length_m=14, pipe=Pipe(nps="2", schedule="40", material="stainless steel"),
                    inside_fouling_m2K_per_W=inside_fouling,
                    surroundings=FixedWall(wall_temperature_K=None, steam_pressure_Pa=bar(3.5),
                                           steam_side_fouling_m2K_per_W=steam_fouling),
                    fittings=[Fitting(kind="elbow_180_return", count=3)]),
            Segment(name="Run to washers", length_m=40, pipe=Pipe(nps="2", schedule="40"), insulation=[wool(50)],
                    fittings=[elbows(5), Fitting(kind="globe_valve")], elevation_change_m=4.0,
                    surroundings=StillAir(indoors=True, temperature_K=C(20))),
        ],
        limits=Limits(max_inner_wall_temperature_K=C(140)))


projects["steam_jacketed_heater"] = Project(
    name="Fernbrook Works — jacketed heating run for wash water",
    description="Invented demo scenario: process wash water heated in a steam-jacketed run (jacket steam at "
                "3.5 bar(a) condensing on the pipe wall through its condensate film), then carried through an "
                "insulated run to the washers. The second alternative carries a fouling allowance on both sides "
                "of the jacketed pipe (typical design values).",
    prepared_by="Process engineering (demo)", revision="A",
    alternatives=[
        jacket_alt("Jacket 14 m, NPS 2", "Clean pipe: the condensate film and the pipe wall only."),
        jacket_alt("Jacket 14 m, fouled", "Design fouling allowance: treated water inside (0.00018 m²K/W) and "
                   "steam outside (0.00009 m²K/W), typical TEMA-style values (from memory).",
                   inside_fouling=1.8e-4, steam_fouling=9e-5),
    ],
    targets=Targets(outlet_temperature_min_K=C(65), outlet_temperature_max_K=C(90)),
)

def n2_alt(name, nps, mm):
    ins = [Layer(material="mineral wool", thickness_m=mm / 1000, conductivity_W_per_mK=0.045)] if mm else []
    return Alternative(name=name, fluid=PureFluid(name="Nitrogen"),
        feed=Feed(inlet_temperature_K=C(45), inlet_pressure_Pa=bar(8.0), mass_flow_kg_per_s=0.25),
        segments=[
            Segment(name="Compressor house", length_m=15, pipe=Pipe(nps=nps, schedule="40"), insulation=ins,
                    fittings=[elbows(3), Fitting(kind="check_valve_swing")], surroundings=StillAir(indoors=True, temperature_K=C(25))),
            Segment(name="Outdoor rack", length_m=180, pipe=Pipe(nps=nps, schedule="40"), insulation=ins,
                    fittings=[elbows(6), Fitting(kind="tee_through_run", count=3)], elevation_change_m=5.0,
                    surroundings=Wind(temperature_K=C(-10), wind_speed_m_per_s=8.0)),
            Segment(name="Analyser house", length_m=20, pipe=Pipe(nps=nps, schedule="40"), insulation=ins,
                    fittings=[elbows(2), Fitting(kind="ball_valve")], surroundings=StillAir(indoors=True, temperature_K=C(18))),
        ])
projects["nitrogen_header_outdoors"] = Project(
    name="Fernbrook Works — instrument nitrogen header",
    description="Invented demo scenario: dry nitrogen from the compressor aftercooler runs along an outdoor rack "
                "in winter wind to the analyser house. What arrives, and at what pressure?",
    prepared_by="Utilities engineering (demo)", revision="A",
    alternatives=[n2_alt("NPS 2 bare", "2", 0), n2_alt("NPS 1-1/2 bare", "1-1/2", 0), n2_alt("NPS 2 insulated 40 mm", "2", 40)],
    targets=Targets(max_pressure_drop_Pa=bar(0.8), outlet_temperature_min_K=C(0)),
)

# Invented demo rating of a small freeze-protection self-limiting heater (not any maker's product): per metre
# of heater, 12 W/m with the pipe at 10 °C falling to 5 W/m at 65 °C.
FREEZE_HEATER = SelfLimitingHeater(output_low_W_per_m=12.0, temperature_low_K=C(10),
                                   output_high_W_per_m=5.0, temperature_high_K=C(65))

def makeup_alt(name, heater, mm, desc):
    """Cooling-tower make-up water, NPS 1, outdoors; mineral wool with its catalogue k(T) (no constant k)."""
    ins = [Layer(material="mineral wool", thickness_m=mm / 1000)]
    pipe = Pipe(nps="1", schedule="40")
    return Alternative(name=name, description=desc, fluid=PureFluid(name="Water"),
        feed=Feed(inlet_temperature_K=C(12), inlet_pressure_Pa=bar(4.0), mass_flow_kg_per_s=0.35),
        segments=[
            Segment(name="Pump house wall", length_m=6, pipe=pipe, insulation=ins, heater=heater,
                    fittings=[Fitting(kind="gate_valve_full"), elbows(2)],
                    heat_sinks=sinks(supports=2, valves=1, flanges=2),
                    surroundings=StillAir(temperature_K=C(8))),
            Segment(name="Yard rack to tower", length_m=64, pipe=pipe, insulation=ins, heater=heater,
                    fittings=[elbows(4)], heat_sinks=sinks(supports=22, flanges=2),
                    surroundings=Wind(temperature_K=C(2), wind_speed_m_per_s=5.0)),
            Segment(name="Tower make-up riser", length_m=9, pipe=pipe, insulation=ins, heater=heater,
                    elevation_change_m=8.0, fittings=[elbows(2), Fitting(kind="globe_valve")],
                    heat_sinks=sinks(supports=3, valves=2, flanges=2, instruments=1),
                    surroundings=Wind(temperature_K=C(2), wind_speed_m_per_s=5.0)),
        ],
        limits=Limits())  # freeze protection: the tracing holds the freezing point + 5 K (common practice)
projects["makeup_water_freeze_protection"] = Project(
    name="Fernbrook Works — cooling-tower make-up water, freeze protection",
    description="Invented demo scenario: a small-bore make-up water line runs outdoors from the pump house along the "
                "yard rack to cooling tower CT-2. It stands still for hours when the tower basin is full. Does the "
                "tracing hold it above freezing on the coldest, windiest night, and how long does it stay above "
                "freezing after a power failure? Valves, flanges and pipe supports lose heat as heat sinks.",
    prepared_by="Utilities engineering (demo)", revision="A",
    alternatives=[
        makeup_alt("Self-limiting, 40 mm wool", FREEZE_HEATER, 40,
                   "Self-limiting freeze-protection heater, invented demo rating: 12 W/m at 10 °C falling to 5 W/m at "
                   "65 °C, one straight run; 40 mm mineral wool, k(T) from the catalogue."),
        makeup_alt("Self-limiting, 25 mm wool", FREEZE_HEATER, 25,
                   "The same heater under thinner insulation: does it still hold with the design margin?"),
        makeup_alt("No tracing, 40 mm wool", None, 40,
                   "Insulation only: how long until it freezes once the flow stops?"),
    ],
    # a cold, windy site (placeholders: the site's meteorological data and the owner's specification decide)
    design_cases=DesignCases(worst_air_temperature_K=C(-25), worst_wind_speed_m_per_s=10.0, worst_no_flow=True,
                             hot_air_temperature_K=C(35), design_margin=0.2),
)

for key, proj in projects.items():
    for alt in proj.alternatives:
        r = solve(alt, design=proj.design_cases)
        print(f"{key} / {alt.name}: Tout {r.outlet_temperature_K-273.15:.2f} C dp {r.pressure_drop_Pa/1e5:.3f} bar "
              f"Q {r.duty_W:.0f} W in {r.heat_input_W:.0f} loss {r.heat_loss_W:.0f} Twmax {r.max_inner_wall_temperature_K-273.15:.1f} "
              f"Ts {r.max_outer_surface_temperature_K-273.15:.1f} Re {r.reynolds_range[0]:.0f}-{r.reynolds_range[1]:.0f} v {r.velocity_range_m_per_s[1]:.2f}")
        for c in r.checks:
            print("    ", c.severity, c.code, c.message[:150], c.segment, round(c.x_m or 0, 1))
        hold = r.design.hold_time
        for i, seg in enumerate(r.design.segments):
            h = next((x for x in hold.segments if x.index == i), None) if hold is not None else None
            off = "—" if h is None or h.to_freezing_off_s is None else f"{h.to_freezing_off_s / 3600:.1f} h"
            print(f"     design {seg.name}: {r.design.tracing_words(i)}; hot wall "
                  f"{seg.hot_wall_temperature_K - 273.15:.1f} C; to freezing (power off) {off}")
    save_project(proj, ROOT / "sample_projects" / f"{key}.json")
save_project(projects["traced_residue_line"], ROOT / "app" / "demo_project.json")
