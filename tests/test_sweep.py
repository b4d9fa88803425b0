"""Sweep (solver.sweep): chunks cover every value in order, grids run the first parameter outer, the CSV
has its units in the header and the values in them.

Check values: the unit conversions are definitions (0 °C = 273.15 K, 1 kPa = 1000 Pa, 1 mm = 0.001 m);
the figures themselves are compared with one-by-one solves (solver.march.solve).
"""

from __future__ import annotations

import csv
import io
from pathlib import Path

import pytest

from solver.errors import InputError
from solver.march import solve
from solver.project_io import load_project
from solver.sweep import pick, sweep, sweep_csv
from solver.variants import Parameter

DEMO = Path(__file__).resolve().parent.parent / "app" / "demo_project.json"


@pytest.fixture(scope="module")
def demo():
    return load_project(DEMO)


@pytest.fixture(scope="module")
def trace15(demo):
    return next(a for a in demo.alternatives if a.name == "Trace 15 W/m, 80 mm wool")


def test_chunks_cover_every_value_in_order(trace15):
    values = [5.0, 10.0, 15.0, 20.0, 25.0, 30.0, 40.0]
    seen = []
    chunks = list(sweep(trace15, Parameter("heater_output"), values, chunk=3,
                        progress=lambda done, total: seen.append((done, total))))
    assert [len(c) for c in chunks] == [3, 3, 1]
    variants = [v for c in chunks for v in c]
    assert [v.value for v in variants] == values
    assert seen == [(3, 7), (6, 7), (7, 7)]
    assert all(v.ok for v in variants)
    # the same figures as a solve on its own (here through the same march; the batch module checks 1e-9)
    one = solve(Parameter("heater_output").apply(trace15, 25.0))
    assert variants[4].key_figures["outlet_temperature_K"] == pytest.approx(one.outlet_temperature_K, rel=1e-9)


def test_grid_is_the_outer_product_first_parameter_outer(trace15):
    chunks = list(sweep(trace15, Parameter("heater_output"), [10.0, 20.0],
                        parameter2=Parameter("insulation_thickness"), values2=[0.04, 0.08, 0.1], chunk=4))
    variants = [v for c in chunks for v in c]
    assert [(v.value, v.value2) for v in variants] == [(10.0, 0.04), (10.0, 0.08), (10.0, 0.1),
                                                       (20.0, 0.04), (20.0, 0.08), (20.0, 0.1)]
    assert variants[4].alternative.segments[0].insulation[0].thickness_m == 0.08
    assert variants[4].alternative.segments[0].heater.output_W_per_m == 20.0


def test_cancel_stops_between_chunks(trace15):
    calls = []

    def cancelled():
        calls.append(1)
        return len(calls) > 1  # let the first chunk's first check pass, then stop

    chunks = list(sweep(trace15, Parameter("heater_output"), [5.0, 10.0, 15.0, 20.0], chunk=2, cancelled=cancelled))
    assert sum(len(c) for c in chunks) < 4


def test_csv_has_units_in_the_header_and_values_in_them(trace15):
    variants = [v for c in sweep(trace15, Parameter("insulation_thickness"), [0.04, 0.08, 2.0]) for v in c]
    text = sweep_csv(variants, Parameter("insulation_thickness"),
                     ["outlet_temperature_K", "pressure_drop_Pa", "max_heat_loss_per_length_W_per_m"])
    rows = list(csv.reader(io.StringIO(text)))
    assert rows[0] == ["Insulation thickness [mm]", "Outlet temperature [°C]", "Pressure drop [kPa]",
                       "Highest heat loss per metre (a segment) [W/m]", "error"]
    assert len(rows) == 4
    first = variants[0].key_figures
    assert float(rows[1][0]) == pytest.approx(40.0)  # 0.04 m = 40 mm
    assert float(rows[1][1]) == pytest.approx(first["outlet_temperature_K"] - 273.15)
    assert float(rows[1][2]) == pytest.approx(first["pressure_drop_Pa"] / 1000.0)
    assert rows[1][4] == ""
    # 2 m of insulation is beyond the model's bounds: the row says why and has no figures
    assert rows[3][1] == "" and "insulation_thickness" in rows[3][4]


def test_csv_of_a_grid_and_design_figures_and_other_units(demo, trace15):
    variants = [v for c in sweep(trace15, Parameter("bore"), ["2", "3"], parameter2=Parameter("heater_output"),
                                 values2=[15.0], design=demo.design_cases) for v in c]
    text = sweep_csv(variants, Parameter("bore"), ["worst_case_min_bulk_temperature_K", "hold_time_s"],
                     parameter2=Parameter("heater_output"),
                     unit_of=lambda quantity, system: {"temperature": ("K", 1.0, 0.0), "time": ("h", 1 / 3600, 0.0),
                                                       "power_per_length": ("W/ft", 0.3048, 0.0)}[quantity])
    rows = list(csv.reader(io.StringIO(text)))
    assert rows[0] == ["Bore [NPS]", "Heater output [W/ft]", "Worst-case min bulk temperature [K]",
                       "Hold time after a power failure [h]", "error"]
    assert rows[1][:2] == ["2", repr(15.0 * 0.3048)]
    assert 250.0 < float(rows[1][2]) < 400.0 and float(rows[2][3]) > 0


def test_unknown_figure_is_refused(trace15):
    variants = [v for c in sweep(trace15, Parameter("heater_output"), [5.0]) for v in c]
    with pytest.raises(InputError, match="figures"):
        sweep_csv(variants, Parameter("heater_output"), ["colour_K"])


def test_a_picked_point_becomes_a_named_alternative_with_its_record(trace15):
    from solver.model import SearchRecord
    from solver.target_finder import parse_target

    variants = [v for c in sweep(trace15, Parameter("heater_output"), [5.0, 25.0, 40.0]) for v in c]
    targets = [parse_target("outlet_min=70C"), parse_target("surface_max=50C")]
    new, record = pick(trace15, Parameter("heater_output"), variants, variants[1], targets=targets,
                       figures=["outlet_temperature_K", "min_outer_surface_temperature_K"])
    assert new.name == f"{trace15.name} — heater 25 W/m"
    assert new.segments[0].heater.output_W_per_m == 25.0
    assert record["binding"] == "outlet temperature at least 70.0 °C"  # 77 °C out: 7 K of 343 K, the least share
    assert len(record["sweep_points"]) == 3
    SearchRecord.model_validate(record)  # the model keeps it as it is
