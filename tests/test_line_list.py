"""Line List reading (CSV and XLSX), per-row messages, the project of one line and its fingerprint.

Check values and their sources: unit factors by definition (t/°C = T/K − 273.15, ITS-90 and the SI
brochure; 1 h = 3600 s; 1 mm = 0.001 m); pipe bores from ASME B36.10M, cross-checked with the
``fluids`` library (``fluids.piping.nearest_pipe``); the bad-row kinds from issue 12. The lists and
the template are invented (the fictional plant "Fernbrook Works").
"""

from __future__ import annotations

import csv
import inspect
import json
import tracemalloc

import pytest
from fluids.piping import nearest_pipe

from solver.catalogue import resolve_pipe
from solver.errors import InputError
from solver.line_list import (
    COLUMNS,
    LineRow,
    RowProblem,
    line_list_fingerprint,
    line_project,
    read_column_map,
    read_line_list,
)
from solver.march import solve
from solver.model import (
    Alternative,
    Buried,
    DesignCases,
    Feed,
    HeatSink,
    Layer,
    Limits,
    Pipe,
    Project,
    PureFluid,
    Segment,
    SelfLimitingHeater,
    StillAir,
    TableFluid,
    TableRow,
    ThermostatHeater,
    Wind,
)
from solver.project_io import dump_project, parse_project

HEADER = ["tag", "service", "fluid", "size [NPS]", "schedule", "length [m]", "maintain temperature [°C]",
          "maximum temperature [°C]", "flow [kg/h]", "inlet temperature [°C]", "location", "insulation",
          "insulation thickness [mm]", "surface limit [°C]", "heat loss limit [W/m]", "elbows", "valves",
          "flange pairs", "supports", "max circuit length [m]"]

# cells as a spreadsheet holds them: numbers as numbers, sizes with a fraction as text
GOOD_ROWS = [
    ["FW-2-CW-1001", "make-up water to CT-2", "Water", 2, 40, 35, 5, 65, 1800, None, "outdoors", "mineral wool",
     50, None, None, 4, 2, 1, 6, 100],
    ["FW-1-GL-1002", "glycol return", "MEG 30 %", "1-1/2", 80, 12.5, -40, None, 3600, 10, "indoors", None, None,
     None, 20, None, None, None, None, None],
    ["FW-3-RS-1003", "residue to Unit 4", None, "3/4", None, 120, 0, 150, None, None, "buried", "calcium silicate",
     0, 60, None, 0, 0, 0, 0, None],
]


def template(**changes) -> Project:
    """An invented line template: water, NPS 1 Sch 40 carbon steel, 40 mm mineral wool, a self-limiting heater
    (invented rating), supports as heat sinks, in wind outdoors."""
    segment = Segment(
        name="Template run", length_m=10.0, pipe=Pipe(nps="1", schedule="40"),
        heater=changes.pop("heater", SelfLimitingHeater(output_low_W_per_m=30.0, temperature_low_K=283.15,
                                                        output_high_W_per_m=10.0, temperature_high_K=338.15)),
        heat_sinks=[HeatSink(kind="pipe_support", count=3, equivalent_length_m=0.4),
                    HeatSink(kind="instrument", count=1)],
        insulation=[Layer(material="mineral wool", thickness_m=0.04, conductivity_W_per_mK=0.04)],
        surroundings=Wind(temperature_K=273.15, wind_speed_m_per_s=3.0, emissivity=0.3))
    extra = changes.pop("extra_segments", [])
    alternative = Alternative(name="Template", fluid=changes.pop("fluid", PureFluid(name="Water")),
                              feed=Feed(inlet_temperature_K=300.0, inlet_pressure_Pa=4e5, mass_flow_kg_per_s=0.5),
                              segments=[segment, *extra], limits=Limits(max_inner_wall_temperature_K=400.0))
    return Project(name="Fernbrook line template", alternatives=[alternative],
                   design_cases=changes.pop("design_cases", DesignCases()), **changes)


def write_csv(path, rows, header=HEADER, delimiter=","):
    with open(path, "w", newline="", encoding="utf-8") as fh:
        writer = csv.writer(fh, delimiter=delimiter)
        writer.writerow(header)
        for row in rows:
            writer.writerow(["" if cell is None else cell for cell in row])
    return path


def write_xlsx(path, rows, header=HEADER, above=()):
    from openpyxl import Workbook

    book = Workbook()
    sheet = book.active
    for line in above:
        sheet.append(list(line))
    sheet.append(header)
    for row in rows:
        sheet.append(row)
    book.save(path)
    return path


def rows_and_problems(items):
    items = list(items)
    return [i for i in items if isinstance(i, LineRow)], [i for i in items if isinstance(i, RowProblem)]


# --------------------------------------------------------------------------- reading


def test_csv_and_xlsx_give_identical_rows(tmp_path):
    bad = ["FW-9-XX-1009", None, "Water", 7, None, "-3", 5, None, None, None, "outdoors", None, None, None, None,
           None, None, None, None, None]
    from_csv = list(read_line_list(write_csv(tmp_path / "list.csv", GOOD_ROWS + [bad])))
    from_xlsx = list(read_line_list(write_xlsx(tmp_path / "list.xlsx", GOOD_ROWS + [bad])))
    assert from_csv == from_xlsx
    good, problems = rows_and_problems(from_csv)
    assert [r.tag for r in good] == ["FW-2-CW-1001", "FW-1-GL-1002", "FW-3-RS-1003"]
    assert [r.row for r in good] == [2, 3, 4]  # header = row 1, as a spreadsheet numbers it
    assert {(p.row, p.column) for p in problems} == {(5, "size [NPS]"), (5, "length [m]")}


def test_every_column_is_in_every_row_and_blank_is_none(tmp_path):
    good, _ = rows_and_problems(read_line_list(write_csv(tmp_path / "list.csv", GOOD_ROWS)))
    assert all(set(r.values) == {c.name for c in COLUMNS} for r in good)
    residue = good[2]
    assert residue.values["fluid"] is None and residue.values["schedule"] is None
    assert residue.values["flow [kg/h]"] is None and residue.values["inlet temperature [°C]"] is None


def test_unit_conversions(tmp_path):
    good, problems = rows_and_problems(read_line_list(write_csv(tmp_path / "list.csv", GOOD_ROWS)))
    assert not problems
    water, glycol, residue = (r.values for r in good)
    # °C -> K: T/K = t/°C + 273.15 exactly (ITS-90, SI brochure)
    assert residue["maintain temperature [°C]"] == 273.15  # 0 °C
    assert glycol["maintain temperature [°C]"] == pytest.approx(233.15, rel=1e-15)  # −40 °C = −40 °F = 233.15 K
    assert water["maximum temperature [°C]"] == pytest.approx(338.15, rel=1e-15)
    assert residue["surface limit [°C]"] == pytest.approx(333.15, rel=1e-15)  # 60 °C, common practice burn limit
    # kg/h -> kg/s: 1 h = 3600 s
    assert glycol["flow [kg/h]"] == 1.0  # 3600 kg/h
    assert water["flow [kg/h]"] == 0.5  # 1800 kg/h
    # mm -> m: 1 mm = 0.001 m
    assert water["insulation thickness [mm]"] == pytest.approx(0.05, rel=1e-15)
    assert residue["insulation thickness [mm]"] == 0.0  # bare pipe
    # metres, W/m and counts as written
    assert glycol["length [m]"] == 12.5 and glycol["heat loss limit [W/m]"] == 20.0
    assert water["max circuit length [m]"] == 100.0
    assert (water["elbows"], water["valves"], water["flange pairs"], water["supports"]) == (4, 2, 1, 6)
    # words to their catalogue keys
    assert water["size [NPS]"] == "2" and glycol["size [NPS]"] == "1-1/2" and residue["size [NPS]"] == "3/4"
    assert glycol["fluid"] == {"kind": "solution", "solute": "MEG", "concentration": 0.3}
    assert water["fluid"] == {"kind": "pure", "name": "Water"}
    assert residue["insulation"] == "calcium silicate" and residue["location"] == "buried"


def test_headers_match_ignoring_case_and_spaces_and_extra_columns_are_ignored(tmp_path):
    header = ["  TAG ", "Size[nps]", "Length (m)", "Maintain Temperature [degC]", "LOCATION", "our own remarks"]
    path = write_csv(tmp_path / "list.csv", [["FW-1", "2", "10", "5", "Outdoors", "call Ann"]], header=header)
    (row,) = list(read_line_list(path))
    assert isinstance(row, LineRow)
    assert row.values["length [m]"] == 10.0 and row.values["location"] == "outdoors"


def test_semicolon_csv_in_windows_1252(tmp_path):
    # a spreadsheet's plain "CSV" on many European machines: semicolons, Windows-1252 (° is byte 0xB0)
    path = tmp_path / "list.csv"
    path.write_bytes("tag;size [NPS];length [m];maintain temperature [°C];location\nFW-1;1-1/2;8;-5;indoors\n"
                     .encode("cp1252"))
    (row,) = list(read_line_list(path))
    assert row.values["maintain temperature [°C]"] == pytest.approx(268.15, rel=1e-15)  # −5 °C


def test_rows_numbered_as_the_sheet_shows_them(tmp_path):
    # a title and a blank row above the header: the header is row 3, the first line row 4
    path = write_xlsx(tmp_path / "list.xlsx", GOOD_ROWS[:1] + [[None] * len(HEADER)] + GOOD_ROWS[1:2],
                      above=[["Fernbrook Works line list (invented)"], [None]])
    good, problems = rows_and_problems(read_line_list(path))
    assert not problems
    assert [r.row for r in good] == [4, 6]  # the blank row 5 is skipped


# --------------------------------------------------------------------------- bad rows (issue 12's list)


def one_bad(tmp_path, column, value, **kwargs):
    """A list with a good row, a row with ``column`` set to ``value``, and another good row."""
    rows = [list(r) for r in GOOD_ROWS]
    rows[1][HEADER.index(column)] = value
    return rows_and_problems(read_line_list(write_csv(tmp_path / "list.csv", rows), **kwargs))


@pytest.mark.parametrize("column, value, words", [
    ("fluid", "Brine", "unknown fluid"),
    ("fluid", "MEG 75 %", "Ethylene glycol is defined for 0 to 60 %"),  # CoolProp's fit range (solver.catalogue)
    ("length [m]", "twelve", "not a number; give a number in m"),
    ("maintain temperature [°C]", "hot", "not a number; give a number in °C"),
    ("flow [kg/h]", "12,5", "use a point as the decimal mark"),
    ("length [m]", "-3", "length must be more than 0 m"),
    ("length [m]", "0", "length must be more than 0 m"),
    ("size [NPS]", "7", "unknown nominal pipe size"),  # ASME B36.10M has no NPS 7
    ("schedule", "55", "unknown schedule"),
    ("location", "attic", "give indoors, outdoors or buried"),
    ("insulation", "straw", "unknown insulation material"),
    ("insulation thickness [mm]", "-10", "must be 0 (bare pipe) or more mm"),
    ("insulation thickness [mm]", "2000", "insulation thickness must be at most 1000 mm"),  # solver.model 1 m
    ("maintain temperature [°C]", "-250", "maintain temperature must be at least -223.15 °C"),  # model: 50 K
    ("elbows", "2.5", "must be a whole number"),
    ("valves", "-1", "must be 0 or more"),
    ("tag", "FW-2-cw-1001", "the tag is already on row 2"),
    ("tag", "", "tag is required"),
    ("location", " ", "location is required"),
])
def test_each_bad_cell_names_row_column_and_value_and_the_others_still_run(tmp_path, column, value, words):
    good, problems = one_bad(tmp_path, column, value)
    (problem,) = problems
    assert (problem.row, problem.column, problem.value) == (3, column, value.strip())
    assert words in problem.message
    assert [r.tag for r in good] == ["FW-2-CW-1001", "FW-3-RS-1003"]
    assert str(problem).startswith(f"row 3, column '{column}': ")


def test_a_schedule_the_size_does_not_come_in(tmp_path):
    rows = [list(r) for r in GOOD_ROWS]
    rows[1][HEADER.index("size [NPS]")] = "1/4"
    rows[1][HEADER.index("schedule")] = "160"  # ASME B36.10M lists Sch 160 from NPS 1/2 up
    good, (problem,) = rows_and_problems(read_line_list(write_csv(tmp_path / "list.csv", rows)))
    assert (problem.row, problem.column, problem.value) == (3, "schedule", "160")
    assert problem.message.startswith("NPS 1/4 has no schedule 160; it has 10S, 10, 30, 40S, STD, 40, 80S, XS, 80")
    assert [r.tag for r in good] == ["FW-2-CW-1001", "FW-3-RS-1003"]


def test_the_message_reads_as_the_issue_asks(tmp_path):
    _, (problem,) = one_bad(tmp_path, "length [m]", "-3")
    assert str(problem) == "row 3, column 'length [m]': '-3' — length must be more than 0 m"
    assert problem.tag == "FW-1-GL-1002"


def test_several_mistakes_on_one_row_are_all_reported(tmp_path):
    rows = [list(r) for r in GOOD_ROWS]
    rows[1][HEADER.index("fluid")] = "Brine"
    rows[1][HEADER.index("size [NPS]")] = "7"
    rows[1][HEADER.index("length [m]")] = "-3"
    good, problems = rows_and_problems(read_line_list(write_csv(tmp_path / "list.csv", rows)))
    assert [(p.row, p.column) for p in problems] == [(3, "fluid"), (3, "size [NPS]"), (3, "length [m]")]
    assert [r.tag for r in good] == ["FW-2-CW-1001", "FW-3-RS-1003"]


def test_a_missing_required_column_is_reported_once_and_fails_every_row(tmp_path):
    header = [h for h in HEADER if h != "length [m]"]
    rows = [[c for h, c in zip(HEADER, r) if h != "length [m]"] for r in GOOD_ROWS]
    good, problems = rows_and_problems(read_line_list(write_csv(tmp_path / "list.csv", rows, header=header)))
    assert good == []
    assert [(p.row, p.column) for p in problems] == [(1, "length [m]"), (2, "length [m]"), (3, "length [m]"),
                                                      (4, "length [m]")]
    assert "the list has no column 'length [m]'" in problems[0].message
    assert len({p.message for p in problems}) == 1


def test_a_missing_optional_column_is_no_problem(tmp_path):
    keep = [h for h in HEADER if h not in ("fluid", "supports")]
    rows = [[c for h, c in zip(HEADER, r) if h in keep] for r in GOOD_ROWS]
    good, problems = rows_and_problems(read_line_list(write_csv(tmp_path / "list.csv", rows, header=keep)))
    assert not problems and len(good) == 3
    assert good[0].values["fluid"] is None and good[0].values["supports"] is None


def test_a_size_turned_into_a_date_by_the_spreadsheet_is_explained(tmp_path):
    import datetime

    rows = [list(r) for r in GOOD_ROWS]
    rows[0][HEADER.index("size [NPS]")] = datetime.datetime(2026, 1, 2)  # "1/2" typed into a cell
    _, (problem,) = rows_and_problems(read_line_list(write_xlsx(tmp_path / "list.xlsx", rows)))
    assert problem.column == "size [NPS]" and "format the column as text" in problem.message


def test_the_templates_table_fluid_is_known_by_its_name_only_with_the_template(tmp_path):
    residue = TableFluid(name="Residue", rows=[
        TableRow(temperature_K=300.0, density_kg_per_m3=950.0, specific_heat_J_per_kgK=2100.0, viscosity_Pa_s=0.5,
                 conductivity_W_per_mK=0.13),
        TableRow(temperature_K=450.0, density_kg_per_m3=860.0, specific_heat_J_per_kgK=2500.0, viscosity_Pa_s=0.01,
                 conductivity_W_per_mK=0.12)])
    tpl = template(fluid=residue)
    _, problems = one_bad(tmp_path, "fluid", "residue")
    assert problems[0].column == "fluid" and "unknown fluid" in problems[0].message
    good, problems = one_bad(tmp_path, "fluid", "residue", template=tpl)
    assert not problems and good[1].values["fluid"] == {"kind": "table", "name": "Residue"}
    assert line_project(good[1], tpl).alternatives[0].fluid == residue


# --------------------------------------------------------------------------- the mapping file


def test_a_mapping_file_renames_their_headers(tmp_path):
    theirs = {"Line No.": "tag", "Pipe Size (in)": "size [NPS]", "Sch": "schedule", "Run length m": "length [m]",
              "Tmaint C": "maintain temperature [°C]", "Area": "location", "Medium": "fluid"}
    map_path = tmp_path / "columns.json"
    map_path.write_text(json.dumps(theirs), encoding="utf-8")
    ours = ["tag", "size [NPS]", "schedule", "length [m]", "maintain temperature [°C]", "location", "fluid"]
    rows = [[r[HEADER.index(h)] for h in ours] for r in GOOD_ROWS]
    header = list(theirs)  # same order as ours
    renamed = list(read_line_list(write_csv(tmp_path / "theirs.csv", rows, header=header),
                                  read_column_map(map_path)))
    plain = list(read_line_list(write_csv(tmp_path / "ours.csv", rows, header=ours)))
    assert renamed == plain and len(plain) == 3 and all(isinstance(r, LineRow) for r in plain)


def test_a_mapping_to_no_column_is_refused_at_once(tmp_path):
    path = write_csv(tmp_path / "list.csv", GOOD_ROWS)
    with pytest.raises(InputError) as err:
        read_line_list(path, {"Len": "length in metres"})
    assert err.value.field == "column mapping" and err.value.value == "length in metres"
    bad_map = tmp_path / "columns.json"
    bad_map.write_text('["tag"]', encoding="utf-8")
    with pytest.raises(InputError, match="column mapping"):
        read_column_map(bad_map)


def test_a_file_that_is_no_line_list_is_refused_at_once(tmp_path):
    with pytest.raises(InputError, match="no such file"):
        read_line_list(tmp_path / "missing.csv")
    (tmp_path / "list.xlsx").write_text("tag,length [m]\n", encoding="utf-8")
    with pytest.raises(InputError, match="not an XLSX workbook"):
        read_line_list(tmp_path / "list.xlsx")
    (tmp_path / "list.ods").write_bytes(b"")
    with pytest.raises(InputError, match=r"\.csv or \.xlsx"):
        read_line_list(tmp_path / "list.ods")


# --------------------------------------------------------------------------- one project per line


def read_good(tmp_path, tpl=None):
    good, problems = rows_and_problems(read_line_list(write_csv(tmp_path / "list.csv", GOOD_ROWS), template=tpl))
    assert not problems
    return good


def test_line_project_carries_the_row_and_solves(tmp_path):
    tpl = template()
    water = read_good(tmp_path)[0]
    project = line_project(water, tpl)
    (alt,) = project.alternatives
    (seg,) = alt.segments
    assert alt.name == seg.name == project.name == "FW-2-CW-1001"
    assert alt.description == "make-up water to CT-2"
    # NPS 2 Sch 40: OD 60.3 mm, wall 3.91 mm, bore 52.5 mm (ASME B36.10M); fluids.piping agrees
    bore = resolve_pipe(seg.pipe).inner_diameter_m
    assert bore == pytest.approx(0.0525, abs=0.05e-3)
    assert bore == pytest.approx(nearest_pipe(NPS=2, schedule="40")[1], rel=1e-9)
    assert seg.length_m == 35.0
    assert alt.limits.maintain_temperature_K == pytest.approx(278.15, rel=1e-15)  # 5 °C
    assert alt.limits.max_inner_wall_temperature_K == pytest.approx(338.15, rel=1e-15)  # 65 °C
    assert alt.feed.mass_flow_kg_per_s == 0.5  # 1800 kg/h
    assert alt.feed.inlet_temperature_K == pytest.approx(283.15, rel=1e-15)  # blank: maintain + 5 K (the contract)
    assert alt.feed.inlet_pressure_Pa == 4e5  # the template's
    assert seg.insulation[0].thickness_m == pytest.approx(0.05) and seg.insulation[0].conductivity_W_per_mK == 0.04
    assert seg.surroundings == tpl.alternatives[0].segments[0].surroundings  # outdoors: the template's wind
    assert [(f.kind, f.count) for f in seg.fittings] == [("elbow_90_standard", 4)]
    sinks = {(s.kind, s.count, s.equivalent_length_m) for s in seg.heat_sinks}
    assert sinks == {("instrument", 1, None), ("valve", 2, None), ("flange_pair", 1, None),
                     ("pipe_support", 6, 0.4)}  # the template's support keeps its own equivalent length
    assert seg.heater == tpl.alternatives[0].segments[0].heater
    assert project.design_cases == tpl.design_cases and project.targets == tpl.targets
    result = solve(alt, design=project.design_cases)
    assert result.design is not None
    assert parse_project(dump_project(project)) == project  # a project file that opens in the app


def test_line_project_fills_blanks_from_the_template_and_places_by_location(tmp_path):
    tpl = template()
    _, glycol, residue = read_good(tmp_path)
    g = line_project(glycol, tpl).alternatives[0]
    assert g.fluid.kind == "solution" and g.fluid.concentration == 0.3
    assert g.feed.inlet_temperature_K == pytest.approx(283.15, rel=1e-15)  # 10 °C as given
    assert g.limits.max_inner_wall_temperature_K == 400.0  # blank: the template's limit
    assert g.segments[0].pipe.schedule == "80"
    assert g.segments[0].surroundings == StillAir(temperature_K=283.15, indoors=True)  # the documented default
    assert g.segments[0].insulation == tpl.alternatives[0].segments[0].insulation  # material and thickness kept
    assert [(f.kind, f.count) for f in g.segments[0].fittings] == []  # the template has none
    r = line_project(residue, tpl).alternatives[0]
    assert r.fluid == PureFluid(name="Water")
    assert r.feed.mass_flow_kg_per_s == 0.5  # the template's flow
    assert r.segments[0].pipe.schedule == "40"  # the template's schedule
    assert r.segments[0].insulation == []  # 0 mm: bare
    assert isinstance(r.segments[0].surroundings, Buried)
    assert [s.kind for s in r.segments[0].heat_sinks] == ["instrument"]  # 0 supports, valves, flanges
    # a template with an indoor and a buried segment supplies those places
    indoor = StillAir(temperature_K=291.15, indoors=True, emissivity=0.5)
    soil = Buried(soil_temperature_K=278.15, depth_m=0.8)
    tpl2 = template(extra_segments=[Segment(name="in", surroundings=indoor), Segment(name="soil", surroundings=soil)])
    assert line_project(glycol, tpl2).alternatives[0].segments[0].surroundings == indoor
    assert line_project(residue, tpl2).alternatives[0].segments[0].surroundings == soil
    for row in (glycol, residue):
        project = line_project(row, tpl)
        solve(project.alternatives[0], design=project.design_cases)


def test_a_new_insulation_material_drops_the_templates_conductivity(tmp_path):
    rows = [list(r) for r in GOOD_ROWS]
    rows[0][HEADER.index("insulation")] = "foam glass"
    good, _ = rows_and_problems(read_line_list(write_csv(tmp_path / "list.csv", rows)))
    (layer,) = line_project(good[0], template()).alternatives[0].segments[0].insulation
    assert (layer.material, layer.conductivity_W_per_mK) == ("cellular glass", None)  # the catalogue's k(T)


def test_a_thermostat_is_set_to_the_maintain_temperature(tmp_path):
    tpl = template(heater=ThermostatHeater(output_W_per_m=20.0, set_point_K=278.15))
    glycol = read_good(tmp_path)[1]
    heater = line_project(glycol, tpl).alternatives[0].segments[0].heater
    assert heater.set_point_K == pytest.approx(233.15, rel=1e-15)  # −40 °C


def test_line_project_refusals_name_the_column_and_the_value(tmp_path):
    # the template's Sch 40S does not exist at NPS 22 (ASME B36.19M lists none): blamed on the size
    tpl = template()
    tpl.alternatives[0].segments[0].pipe = Pipe(nps="1", schedule="40S")
    row = read_good(tmp_path)[2]
    row.values["size [NPS]"], row.written["size [NPS]"] = "22", "22"
    with pytest.raises(InputError) as err:
        line_project(row, tpl)
    assert (err.value.field, err.value.value) == ("size [NPS]", "22")
    assert "no schedule 40S" in err.value.reason
    # a value the reader would refuse, put into a row by hand: the model refuses it, named by our column
    water = read_good(tmp_path)[0]
    water.values["length [m]"], water.written["length [m]"] = -3.0, "-3"
    with pytest.raises(InputError) as err:
        line_project(water, template())
    assert (err.value.field, err.value.value) == ("length [m]", "-3")
    assert "length_m" not in err.value.field


# --------------------------------------------------------------------------- the fingerprint


def test_fingerprint_changes_with_a_value_or_the_template_and_not_otherwise(tmp_path):
    tpl = template()
    csv_rows = read_good(tmp_path)
    xlsx_rows, _ = rows_and_problems(read_line_list(write_xlsx(tmp_path / "list.xlsx", GOOD_ROWS)))
    prints = [line_list_fingerprint(r, tpl) for r in csv_rows]
    assert len(set(prints)) == 3 and all(len(p) == 64 for p in prints)
    assert prints == [line_list_fingerprint(r, tpl) for r in xlsx_rows]  # same values, other file kind
    assert line_list_fingerprint(csv_rows[0], template()) == prints[0]  # an equal template
    moved = LineRow(row=40, tag=csv_rows[0].tag, values=dict(csv_rows[0].values), written={"length [m]": "35.00"})
    assert line_list_fingerprint(moved, tpl) == prints[0]  # another row number, another spelling
    changed = LineRow(row=2, tag=csv_rows[0].tag, values={**csv_rows[0].values, "length [m]": 35.5})
    assert line_list_fingerprint(changed, tpl) != prints[0]
    assert line_list_fingerprint(csv_rows[0], template(design_cases=DesignCases(design_margin=0.25))) != prints[0]


# --------------------------------------------------------------------------- streaming


def big_list(path, n):
    with open(path, "w", newline="", encoding="utf-8") as fh:
        writer = csv.writer(fh)
        writer.writerow(HEADER)
        for i in range(n):
            row = list(GOOD_ROWS[i % 3])
            row[0] = f"FW-{i:05d}"
            writer.writerow(["" if c is None else c for c in row])
    return path


def peak_while_reading(path) -> tuple[int, int]:
    tracemalloc.start()
    try:
        count = sum(isinstance(item, LineRow) for item in read_line_list(path))
        return count, tracemalloc.get_traced_memory()[1]
    finally:
        tracemalloc.stop()


def test_reading_streams_the_rows(tmp_path):
    path = big_list(tmp_path / "big.csv", 5000)
    assert inspect.isgenerator(read_line_list(path))
    small_count, small_peak = peak_while_reading(big_list(tmp_path / "small.csv", 500))
    count, peak = peak_while_reading(path)
    assert (small_count, count) == (500, 5000)
    # ten times the rows: only the tags seen are kept (about 100 bytes each), not the rows (a few kB each)
    assert peak - small_peak < 4500 * 300, (small_peak, peak)


@pytest.mark.parametrize("written, fluid", [
    ("water", {"kind": "pure", "name": "Water"}),
    ("Carbon dioxide", {"kind": "pure", "name": "CarbonDioxide"}),
    ("Ethylene glycol, 30 %", {"kind": "solution", "solute": "MEG", "concentration": 0.3}),
    ("30 % MPG", {"kind": "solution", "solute": "MPG", "concentration": 0.3}),
    ("propylene glycol 40 % (mass)", {"kind": "solution", "solute": "MPG", "concentration": 0.4}),
    ("MEG 25", {"kind": "solution", "solute": "MEG", "concentration": 0.25}),
])
def test_fluid_names(tmp_path, written, fluid):
    # pure-fluid names and solution codes are CoolProp's (solver.properties.PURE_FLUIDS, solver.catalogue.SOLUTIONS)
    good, problems = one_bad(tmp_path, "fluid", written)
    assert not problems and good[1].values["fluid"] == fluid


@pytest.mark.parametrize("written, words", [("MEG 0.3", "in percent"), ("MEG", "give the strength")])
def test_a_solution_needs_its_strength_in_percent(tmp_path, written, words):
    _, (problem,) = one_bad(tmp_path, "fluid", written)
    assert problem.column == "fluid" and words in problem.message


def test_titles_above_the_header_and_a_list_without_any_header(tmp_path):
    path = tmp_path / "list.csv"
    path.write_text("Fernbrook Works line list\nrev B\ntag,size [NPS],length [m],maintain temperature [°C],location\n"
                    "FW-1,2,10,5,outdoors\n", encoding="utf-8")
    (row,) = list(read_line_list(path))
    assert (row.row, row.tag) == (4, "FW-1")
    path.write_text("a,b\n1,2\n", encoding="utf-8")  # no column of ours anywhere: the first row is the header
    problems = list(read_line_list(path))
    required = [c.name for c in COLUMNS if c.required]
    assert [(p.row, p.column) for p in problems] == [(1, c) for c in required] + [(2, c) for c in required]
    path.write_text("", encoding="utf-8")
    assert [(p.row, p.column) for p in read_line_list(path)] == [(1, c) for c in required]
