"""Generate the demo line list of Fernbrook Works (an invented plant; every line, tag, service and figure is
demo data) and the files that go with it:

    .venv/bin/python sample_projects/line_list/make_line_list.py

writes, beside this script,

- ``line_template.json`` — the line template (an ordinary project file): carbon-steel schedule 40 pipe, mineral
  wool, a self-limiting electric heater (invented rating; its output is sized per line), the residue product of
  the demo project as the default fluid, and the plant's design cases;
- ``fernbrook_line_list.csv`` — 200 lines: freeze protection of water lines outdoors and buried
  (maintain 5 °C), process lines of the residue product (maintain 55–65 °C), a few hot lines (150 °C in
  operation) whose insulation is sized for personnel protection (outer surface at most 60 °C), and six
  rows with mistakes that show the per-row messages (a missing length, text in a number column, a negative
  length, an unknown pipe size, an unknown fluid, a tag used twice);
- ``columns_example.json`` — a mapping for a list whose headers differ from ours (``--columns``);
- ``README.md`` — how to run it, and our columns (from :func:`solver.line_list.columns_markdown`).

The output is the same on every run (a seeded generator), so the committed files only change when this
script does.
"""

from __future__ import annotations

import csv
import io
import json
import math
import random
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
ROOT = HERE.parent.parent
sys.path.insert(0, str(ROOT))

from solver.model import (Alternative, DesignCases, Feed, Layer, Limits, Pipe, Project, Segment,  # noqa: E402
                          SelfLimitingHeater, TableFluid, TableRow, Wind)
from solver.project_io import save_project  # noqa: E402

SEED = 20261203
C = lambda t: t + 273.15  # noqa: E731

#: Our column names (solver.line_list.COLUMNS), in the order the list gives them.
HEADER = ["tag", "service", "fluid", "size [NPS]", "schedule", "length [m]", "maintain temperature [°C]",
          "maximum temperature [°C]", "flow [kg/h]", "inlet temperature [°C]", "location", "insulation",
          "insulation thickness [mm]", "surface limit [°C]", "heat loss limit [W/m]", "elbows", "valves",
          "flange pairs", "supports", "max circuit length [m]"]

RESIDUE = "Residue product R-7 (demo data)"
OIL_ROWS = [  # invented demo data (as the demo project's): a light residual product, shaped like a typical fuel oil
    (20, 880, 1880, 0.120, 0.135), (40, 867, 1950, 0.052, 0.133), (60, 854, 2020, 0.026, 0.131),
    (80, 841, 2090, 0.0145, 0.129), (100, 828, 2160, 0.0088, 0.127), (120, 815, 2230, 0.0057, 0.125),
    (140, 802, 2300, 0.0039, 0.123), (160, 789, 2370, 0.0028, 0.121), (180, 776, 2440, 0.0021, 0.119),
    (200, 763, 2510, 0.0016, 0.117),
]

# Invented services of the invented plant (areas: 10 tank farm, 20 Unit 4, 30 utilities, 40 loading).
WATER_SERVICES = ["fire water ring main", "safety shower supply", "service water to hose station",
                  "cooling water make-up", "potable water to control room", "eyewash supply",
                  "demineralised water to Unit 4", "boiler feed make-up"]
RESIDUE_SERVICES = ["residue from tank T-12", "residue to Unit 4", "residue loading arm feed", "residue recycle",
                    "residue pump P-7 suction", "residue pump P-7 discharge", "slops return to tank T-14",
                    "residue to blending header"]
HOT_SERVICES = ["hot residue from Unit 4 bottoms", "hot residue to rundown cooler", "hot residue bypass",
                "hot residue sample loop"]


# Invented demo rating of a self-limiting heater (as the demo project's; not any maker's product): per metre of
# heater, 40 W/m with the pipe at 10 °C falling to 25 W/m at 65 °C (straight line, zero output near 157 °C). Each
# line's design scales both points together to the output it needs (solver.line_design).
DEMO_SELF_LIMITING = SelfLimitingHeater(output_low_W_per_m=40.0, temperature_low_K=C(10),
                                        output_high_W_per_m=25.0, temperature_high_K=C(65))


def template() -> Project:
    """The line template: what every line takes unless its row says otherwise (see line_list README)."""
    residue = TableFluid(name=RESIDUE, rows=[TableRow(temperature_K=C(t), density_kg_per_m3=r,
                                                      specific_heat_J_per_kgK=c, viscosity_Pa_s=m,
                                                      conductivity_W_per_mK=k) for t, r, c, m, k in OIL_ROWS],
                         freezing_point_K=C(12))
    segment = Segment(name="Line", length_m=50.0, pipe=Pipe(nps="2", schedule="40"),
                      insulation=[Layer(material="mineral wool", thickness_m=0.050)],
                      heater=DEMO_SELF_LIMITING,
                      surroundings=Wind(temperature_K=C(5), wind_speed_m_per_s=5.0))
    alternative = Alternative(
        name="Line template",
        description="Carbon steel, schedule 40; 50 mm mineral wool (catalogue k(T)); one straight run of a "
                    "self-limiting electric heater (invented demo rating) whose output each line's design chooses. "
                    "Invented demo data.",
        fluid=residue,
        feed=Feed(inlet_temperature_K=C(65), inlet_pressure_Pa=6e5, mass_flow_kg_per_s=0.5),
        segments=[segment],
        limits=Limits())
    return Project(
        name="Fernbrook Works — line list template",
        description="Invented demo plant. The template of the Fernbrook Works line list: each row of "
                    "fernbrook_line_list.csv takes its pipe material, insulation material, heater kind, design "
                    "margin, default fluid, pressure and flow, and the plant's design cases from here. The design "
                    "cases are placeholders: the site's meteorological data and the owner's specification decide.",
        prepared_by="Process engineering (demo)", revision="A",
        alternatives=[alternative],
        design_cases=DesignCases(worst_air_temperature_K=C(-20), worst_wind_speed_m_per_s=10.0,
                                 worst_soil_temperature_K=C(2), worst_no_flow=True,
                                 hot_air_temperature_K=C(35), design_margin=0.2))


#: Insulation of the residue lines by size [mm] (invented: thicker on the larger sizes, as a plant's
#: insulation specification would have it).
RESIDUE_INSULATION_MM = {"1": ["40", "50"], "1-1/2": ["50"], "2": ["50", "65"], "3": ["65", "80"], "4": ["80", "100"],
                         "6": ["100"]}
#: Heat loss limits in operation by size [W/m] (invented energy targets): the residue lines whose insulation
#: the design chooses, and the hot lines (150 °C in operation).
RESIDUE_HEAT_LOSS_LIMIT_W_PER_M = {"1": "15", "1-1/2": "15", "2": "20", "3": "20", "4": "25", "6": "30"}
HOT_HEAT_LOSS_LIMIT_W_PER_M = {"2": "55", "3": "60", "4": "70"}
WATER_DENSITY_KG_PER_M3 = 1000.0  # round figure for cold water
RESIDUE_DENSITY_KG_PER_M3 = 850.0  # the demo residue product near 65 °C (its table)


def flow_kg_per_h(nps: str, velocity_m_per_s: float, density_kg_per_m3: float) -> float:
    """Mass flow at ``velocity_m_per_s`` in a schedule 40 pipe [kg/h], rounded to 100 kg/h: ρ v π d²/4."""
    from solver.catalogue import pipe_dimensions

    bore = pipe_dimensions(nps, "40")[0]
    return max(100.0, round(density_kg_per_m3 * velocity_m_per_s * math.pi * bore ** 2 / 4 * 3600, -2))


def _number(value: float) -> str:
    return f"{value:g}"


def lines(rng: random.Random) -> list[dict]:
    """The good lines, in list order (areas one after the other)."""
    out: list[dict] = []
    numbers = iter(range(1001, 9999))

    def tag(area: int, code: str) -> str:
        return f"FW-{area}-{code}-{next(numbers)}"

    def fittings(length: float) -> dict:
        return {"elbows": str(rng.randint(0, 2 + int(length // 12))), "valves": str(rng.randint(0, 3)),
                "flange pairs": str(rng.randint(0, 4)), "supports": str(max(1, round(length / rng.choice((3, 4, 5)))))}

    def length() -> float:
        return float(rng.choice(range(5, 151)))

    # freeze protection: water lines outdoors or buried, maintain 5 °C (common practice for freeze protection)
    for _ in range(82):
        n = length()
        buried = rng.random() < 0.2
        foam = rng.random() < 0.5
        size = rng.choice(["3/4", "3/4", "1", "1", "1-1/2", "2", "2", "3", "4", "6"])
        out.append({
            "tag": tag(30, "WF"), "service": rng.choice(WATER_SERVICES), "fluid": "Water",
            "size [NPS]": size, "length [m]": _number(n), "maintain temperature [°C]": "5",
            "flow [kg/h]": _number(flow_kg_per_h(size, rng.choice([0.5, 1.0, 1.5]), WATER_DENSITY_KG_PER_M3)),
            "location": "buried" if buried else "outdoors",
            "insulation": "flexible elastomeric foam" if foam and not buried else "mineral wool",
            "insulation thickness [mm]": (rng.choice(["25", "30", "40"]) if foam and not buried
                                          else rng.choice(["40", "50"])),
            **fittings(n), "max circuit length [m]": "100",
        })
    # process maintain: the residue product (the template's fluid), maintain 55–65 °C, wall at most 110 °C
    for _ in range(98):
        n = length()
        where = rng.choices(["outdoors", "indoors", "buried"], weights=[60, 25, 15])[0]
        sized = rng.random() < 0.25
        size = rng.choice(["1", "1-1/2", "2", "2", "3", "3", "4", "6"])
        row = {
            "tag": tag(rng.choice([10, 20, 40]), "RS"), "service": rng.choice(RESIDUE_SERVICES), "fluid": "",
            "size [NPS]": size,
            "length [m]": _number(n), "maintain temperature [°C]": rng.choice(["55", "60", "65"]),
            "maximum temperature [°C]": "110",
            "flow [kg/h]": _number(flow_kg_per_h(size, rng.choice([0.3, 0.5, 0.8]), RESIDUE_DENSITY_KG_PER_M3)),
            "location": where, "insulation": "mineral wool",
            **fittings(n), "max circuit length [m]": rng.choice(["100", "150"]),
        }
        if sized:  # insulation chosen by the design against an energy target
            row["heat loss limit [W/m]"] = RESIDUE_HEAT_LOSS_LIMIT_W_PER_M[size]
        else:
            row["insulation thickness [mm]"] = rng.choice(RESIDUE_INSULATION_MM[size])
        out.append(row)
    # hot lines: residue running at 150 °C (rundown from the unit), traced to hold 60–65 °C when the flow stops;
    # the insulation is sized for personnel protection in operation (outer surface at most 60 °C)
    for _ in range(20):
        n = length()
        size = rng.choice(["2", "3", "4"])
        out.append({
            "tag": tag(20, "HR"), "service": rng.choice(HOT_SERVICES), "fluid": RESIDUE,
            "size [NPS]": size, "heat loss limit [W/m]": HOT_HEAT_LOSS_LIMIT_W_PER_M[size],
            "length [m]": _number(n), "maintain temperature [°C]": rng.choice(["60", "65"]),
            "maximum temperature [°C]": "180", "inlet temperature [°C]": "150",
            "flow [kg/h]": _number(flow_kg_per_h(size, rng.choice([0.5, 0.8]), RESIDUE_DENSITY_KG_PER_M3)),
            "location": rng.choice(["outdoors", "indoors"]), "insulation": "calcium silicate",
            "surface limit [°C]": "60", **fittings(n), "max circuit length [m]": "150",
        })
    out.sort(key=lambda r: (r["tag"].split("-")[1], r["tag"].split("-")[3]))  # by area and number, as a list is kept
    return out


def with_mistakes(good: list[dict]) -> list[dict]:
    """Six rows with a mistake each, in place of good rows spread over the list."""
    rows = [dict(r) for r in good]
    mistakes = [
        (17, {"length [m]": ""}),                           # missing length
        (48, {"maintain temperature [°C]": "sixty"}),       # text in a number column
        (83, {"length [m]": "-12"}),                        # negative length
        (121, {"size [NPS]": "2-1/4"}),                     # not a catalogue NPS
        (150, {"fluid": "Molasses"}),                       # a fluid the app does not know
        (176, {"tag": rows[175]["tag"]}),                   # the tag of the row before it
    ]
    for index, change in mistakes:
        rows[index].update(change)
    return rows


def list_text(rows: list[dict]) -> str:
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    writer.writerow(HEADER)
    for row in rows:
        writer.writerow([row.get(column, "") for column in HEADER])
    return buf.getvalue()


#: A list from another tool with its own headers, and how they map onto ours (``--columns``).
COLUMNS_EXAMPLE = {
    "Line No.": "tag", "Description": "service", "Medium": "fluid", "Size (in)": "size [NPS]", "Sch": "schedule",
    "Run length (m)": "length [m]", "Hold temp (degC)": "maintain temperature [°C]",
    "Max exposure (degC)": "maximum temperature [°C]", "Flow (kg/h)": "flow [kg/h]", "Area": "location",
    "Insulation type": "insulation", "Insulation (mm)": "insulation thickness [mm]",
    "Touch limit (degC)": "surface limit [°C]", "Bends": "elbows", "Valves": "valves", "Flanges": "flange pairs",
    "Shoes": "supports", "Max circuit (m)": "max circuit length [m]",
}


README = """# Fernbrook Works line list (demo)

Fernbrook Works is an invented plant; every line, tag, service and figure here is demo data. Written by
`make_line_list.py` (seeded: the same files on every run); edit the script, not these files.

Design every line at once (all cores; a progress bar on stderr; run it again to continue or to redesign only
the rows or template you changed):

    calorun batch sample_projects/line_list/fernbrook_line_list.csv --template sample_projects/line_list/line_template.json -o fernbrook_out

or `./run.sh batch ...` from a fresh checkout. `fernbrook_out/` then holds `results.csv` and `results.xlsx` (one
row per line, in list order, units in the headers), `summary.pdf` (the portfolio: totals, counts by verdict, the
lines that fail and why, then a table; `--pages per-line` for a page per line) and `lines/<tag>.json`, a project
per line that opens in the app (File > Open Line List shows the results as a table). The exit code is 1: six rows
hold mistakes on purpose (a missing length, text in a number column, a negative length, an unknown pipe size, an
unknown fluid, a tag used twice); each is a result row with the verdict "error" and a message naming the row, the
column and the value, and every other line still runs. `calorun batch --help` lists the options (`--workers N`,
`--scheduler ADDRESS` for a Dask cluster, `--units US`) and the exit codes.

- `fernbrook_line_list.csv` — {lines} lines: freeze protection of water lines outdoors and buried (maintain
  5 °C), process lines of a residue product (maintain 55–65 °C), a few hot lines (150 °C in operation) whose
  insulation is sized for personnel protection (outer surface at most 60 °C), and the six rows with mistakes.
- `line_template.json` — what the list does not say: carbon steel schedule 40, mineral wool, a self-limiting
  heater (invented rating; each line's output is chosen from the standard ratings), the residue product as the
  default fluid, and the plant's design cases (−20 °C, 10 m/s wind, no flow; hot case 35 °C; margin 20 %;
  placeholders: the site's data and the owner's specification decide).
- `columns_example.json` — for a list with other headers: `--columns columns_example.json` maps theirs
  (`"Run length (m)"`) onto ours (`"length [m]"`).

## Our columns

Headers are matched ignoring case and spaces; the unit is the one in the header.

{columns}
"""


def main() -> None:
    save_project(template(), HERE / "line_template.json")
    rows = with_mistakes(lines(random.Random(SEED)))
    (HERE / "fernbrook_line_list.csv").write_text(list_text(rows), encoding="utf-8", newline="")
    (HERE / "columns_example.json").write_text(json.dumps(COLUMNS_EXAMPLE, indent=2, ensure_ascii=False) + "\n",
                                               encoding="utf-8")
    from solver.line_list import columns_markdown

    (HERE / "README.md").write_text(README.format(lines=len(rows), columns=columns_markdown()), encoding="utf-8")
    print(f"{len(rows)} lines written to {HERE / 'fernbrook_line_list.csv'}")


if __name__ == "__main__":
    main()
