"""CSV export of profiles: units in the header, round trip, safe file names."""

from __future__ import annotations

import csv
import math

import numpy as np
import pytest

from app import export
from solver import solve
from solver.model import Alternative, Layer, Segment, StillAir
from solver.results import PROFILE_COLUMNS


@pytest.fixture(scope="module")
def result():
    alt = Alternative(
        name="Traced run",
        segments=[
            Segment(name="A", length_m=30.0, heat_input_W_per_m=25.0,
                    insulation=[Layer(thickness_m=0.04, conductivity_W_per_mK=0.04)],
                    surroundings=StillAir(temperature_K=268.15)),
            Segment(name="B", length_m=12.0, elevation_change_m=4.0),
        ],
    )
    return solve(alt)


def _rows(path):
    with open(path, encoding="utf-8-sig", newline="") as fh:
        return list(csv.reader(fh))


def test_header_states_units_si_and_us(result, tmp_path):
    si = _rows(export.write_profiles_csv(result, tmp_path / "si.csv", "SI"))[0]
    us = _rows(export.write_profiles_csv(result, tmp_path / "us.csv", "US"))[0]
    assert len(si) == len(PROFILE_COLUMNS) == len(us)
    assert si[0] == "Position [m]" and us[0] == "Position [ft]"
    assert "Bulk temperature [°C]" in si and "Bulk temperature [°F]" in us
    assert "Pressure [bar(a)]" in si and "Pressure [psia]" in us
    assert "Reynolds number [-]" in si
    # every column has a unit in brackets
    assert all(h.endswith("]") and " [" in h for h in si + us)


def test_values_converted_by_unit_definitions(result, tmp_path):
    rows = _rows(export.write_profiles_csv(result, tmp_path / "us.csv", "US"))
    header, first = rows[0], rows[1]
    t_in = result.profile.bulk_temperature_K[0]
    # degF = K * 9/5 - 459.67 (definition of the Fahrenheit scale)
    assert float(first[header.index("Bulk temperature [°F]")]) == pytest.approx(t_in * 1.8 - 459.67, abs=1e-6)
    # 1 psi = 6894.757293168 Pa (NIST SP 811, exact from lbf and inch)
    p_in = result.profile.pressure_Pa[0]
    assert float(first[header.index("Pressure [psia]")]) == pytest.approx(p_in / 6894.757293168, rel=1e-9)
    # 1 ft = 0.3048 m (international foot)
    last = rows[-1]
    assert float(last[0]) == pytest.approx(42.0 / 0.3048, rel=1e-9)
    assert len(rows) - 1 == len(result.profile.x_m)


@pytest.mark.parametrize("system", ["SI", "US"])
def test_round_trip(result, tmp_path, system):
    path = export.write_profiles_csv(result, tmp_path / f"p_{system}.csv", system)
    columns, read_system = export.read_profiles_csv(path)
    assert read_system == system
    assert list(columns) == list(PROFILE_COLUMNS)
    for key, original in result.profile.columns().items():
        original = np.asarray(original, dtype=float)
        back = columns[key]
        assert np.array_equal(np.isnan(original), np.isnan(back)), key
        ok = ~np.isnan(original)
        # ten significant digits written
        np.testing.assert_allclose(back[ok], original[ok], rtol=1e-9, atol=1e-12, err_msg=key)


def test_write_all_gives_safe_distinct_names(result, tmp_path):
    import dataclasses

    names = ["<b>&", "a/b", "A/B", "../../evil", "", "Base case"]
    results = [dataclasses.replace(result, name=n) for n in names]
    paths = export.write_all_csv(results, tmp_path / "out", "SI")
    assert len(paths) == len(names)
    assert len({p.name.lower() for p in paths}) == len(names)
    for p in paths:
        assert p.parent == tmp_path / "out"
        assert p.suffix == ".csv" and not p.name.startswith(".")
        assert all(ch.isalnum() or ch in "._-" for ch in p.name)
    # nothing escaped the directory and no temporary files are left behind
    assert sorted(x.name for x in (tmp_path / "out").iterdir()) == sorted(p.name for p in paths)
    assert not list(tmp_path.glob("*.csv"))


def test_unknown_unit_system_is_named(result, tmp_path):
    with pytest.raises(ValueError, match="unit_system.*'metric'"):
        export.write_profiles_csv(result, tmp_path / "x.csv", "metric")


def test_failed_write_keeps_old_file(result, tmp_path, monkeypatch):
    path = tmp_path / "keep.csv"
    path.write_text("old", encoding="utf-8")

    def boom(*a, **k):
        raise OSError("disk full")

    monkeypatch.setattr(export.os, "replace", boom)
    with pytest.raises(OSError):
        export.write_profiles_csv(result, path, "SI")
    assert path.read_text(encoding="utf-8") == "old"
    assert [p.name for p in tmp_path.iterdir()] == ["keep.csv"]


def test_read_rejects_foreign_csv(tmp_path):
    path = tmp_path / "foreign.csv"
    path.write_text("Time [s],Speed [m/s]\n1,2\n", encoding="utf-8")
    with pytest.raises(export.ExportError, match="Time"):
        export.read_profiles_csv(path)


def test_nan_written_as_empty_cell(result, tmp_path):
    rows = _rows(export.write_profiles_csv(result, tmp_path / "p.csv", "SI"))
    for row in rows[1:]:
        for cell in row:
            assert cell == "" or math.isfinite(float(cell))


@pytest.mark.parametrize("system", ["SI", "US"])
def test_csv_numbers_stay_machine_readable(result, system):
    """The display's digit groups and minus sign are for people; a CSV cell must parse as a number."""
    text = export.profiles_csv_text(result, system)
    rows = list(csv.reader(text.splitlines()))
    assert rows[0] == [export.column_header(k, system) for k in PROFILE_COLUMNS]
    for row in rows[1:]:
        for cell in row:
            assert "\u2009" not in cell and "\u2212" not in cell and "," not in cell
            if cell:
                float(cell)
