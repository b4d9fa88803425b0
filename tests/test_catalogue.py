"""Pipe table and materials, checked against ASME B36.10M / B36.19M via the fluids library."""

import pytest

fluids_piping = pytest.importorskip("fluids.piping")

from solver import catalogue
from solver.catalogue import (
    INSULATION_MATERIALS,
    PIPE_MATERIALS,
    normalise_nps,
    nps_sizes,
    resolve_pipe,
    schedules_for,
)
from solver.errors import InputError
from solver.model import Pipe


def _nps_float(key: str) -> float:
    whole, _, frac = key.partition("-")
    a = whole.split("/")
    value = int(a[0]) / int(a[1]) if len(a) == 2 else float(a[0])
    if frac:
        n, d = frac.split("/")
        value += int(n) / int(d)
    return value


ALL_PAIRS = [(nps, sch) for nps in nps_sizes() for sch in schedules_for(nps)]


def test_table_covers_the_brief():
    for key in ["1/8", "1/2", "1-1/2", "2", "3-1/2", "24"]:
        assert key in nps_sizes()
    assert set(schedules_for("8")) >= {"10", "20", "30", "STD", "40", "60", "XS", "80", "100", "120", "140", "160", "XXS"}
    assert len(ALL_PAIRS) > 300


@pytest.mark.parametrize("nps,schedule", ALL_PAIRS)
def test_dimensions_match_fluids_reference(nps, schedule):
    # Reference: fluids.piping.nearest_pipe, tabulating ASME B36.10M-2004 and B36.19M-2004.
    _, di, do, t = fluids_piping.nearest_pipe(NPS=_nps_float(nps), schedule=schedule)
    r = resolve_pipe(Pipe(nps=nps, schedule=schedule))
    assert r.inner_diameter_m == pytest.approx(di, abs=1e-6)
    assert r.outer_diameter_m == pytest.approx(do, abs=1e-6)
    assert r.wall_thickness_m == pytest.approx(t, abs=1e-6)


@pytest.mark.parametrize(
    "nps,schedule,od_mm,wall_mm",
    [
        ("2", "40", 60.3, 3.91),     # ASME B36.10M, NPS 2 Sch 40: OD 60.3 mm, wall 3.91 mm (ID 52.48 mm)
        ("1", "80", 33.4, 4.55),     # ASME B36.10M, NPS 1 Sch 80 / XS (from memory: 0.179 in)
        ("6", "STD", 168.3, 7.11),   # ASME B36.10M, NPS 6 STD (from memory: 0.280 in)
        ("12", "STD", 323.8, 9.53),  # ASME B36.10M, NPS 12 STD 0.375 in (from memory), thinner than Sch 40
        ("12", "40", 323.8, 10.31),  # ASME B36.10M, NPS 12 Sch 40 0.406 in (from memory)
    ],
)
def test_direct_values(nps, schedule, od_mm, wall_mm):
    r = resolve_pipe(Pipe(nps=nps, schedule=schedule))
    assert r.outer_diameter_m == pytest.approx(od_mm * 1e-3, abs=1e-9)
    assert r.wall_thickness_m == pytest.approx(wall_mm * 1e-3, abs=1e-9)
    assert r.inner_diameter_m == pytest.approx((od_mm - 2 * wall_mm) * 1e-3, abs=1e-9)


def test_nps2_sch40_bore_and_description():
    r = resolve_pipe(Pipe(nps="2", schedule="40"))
    assert r.inner_diameter_m == pytest.approx(0.05248, abs=1e-8)  # ASME B36.10M: 52.48 mm
    assert r.description == "NPS 2 Sch 40 (ID 52.5 mm)"


def test_sch10_and_10s_differ_from_nps14():
    # ASME B36.10M Sch 10 NPS 14 is 6.35 mm; B36.19M 10S is 4.78 mm (fluids tables).
    assert resolve_pipe(Pipe(nps="14", schedule="10")).wall_thickness_m == pytest.approx(6.35e-3)
    assert resolve_pipe(Pipe(nps="14", schedule="10S")).wall_thickness_m == pytest.approx(4.78e-3)


@pytest.mark.parametrize(
    "spelling,key",
    [("1.5", "1-1/2"), ("1 1/2", "1-1/2"), ("1-1/2", "1-1/2"), ('1-1/2"', "1-1/2"), ('2"', "2"),
     ("2 in", "2"), ("NPS 3/4", "3/4"), (".75", "3/4"), (0.375, "3/8"), (4, "4"), ("DN50", "2"),
     (" 24 ", "24"), ("1/8", "1/8"), ("2.5", "2-1/2")],
)
def test_nps_normaliser(spelling, key):
    assert normalise_nps(spelling) == key


@pytest.mark.parametrize("spelling,key", [("sch 40", "40"), ("Sch. 80", "80"), ("10s", "10S"), ("std", "STD"), ("XH", "XS"), ("40.0", "40")])
def test_schedule_normaliser(spelling, key):
    assert catalogue.normalise_schedule(spelling) == key


def test_schedule_spellings_resolve_same_pipe():
    a = resolve_pipe(Pipe(nps="1.5", schedule="sch 40"))
    b = resolve_pipe(Pipe(nps="1-1/2", schedule="40"))
    assert a == b


@pytest.mark.parametrize("bad", ["2.3", "7", "abc", "1/3", "", "-2"])
def test_unknown_nps_error_names_field_and_value(bad):
    with pytest.raises(InputError) as exc:
        normalise_nps(bad, field="segments[0].pipe.nps")
    assert exc.value.field == "segments[0].pipe.nps"
    assert exc.value.value == bad
    assert repr(bad) in str(exc.value)


def test_unknown_nps_via_resolve():
    with pytest.raises(InputError) as exc:
        resolve_pipe(_unchecked_pipe(nps="2.3", schedule="40"), field_prefix="segments[1].pipe")
    assert exc.value.field == "segments[1].pipe.nps"
    assert "'2.3'" in str(exc.value)


def test_schedule_not_available_lists_available():
    with pytest.raises(InputError) as exc:
        resolve_pipe(_unchecked_pipe(nps="2", schedule="60"))
    msg = str(exc.value)
    assert exc.value.field == "pipe.schedule"
    assert "'60'" in msg
    for s in schedules_for("2"):
        assert s in msg
    # B36.10M has no Sch 60 below NPS 8 and no Sch 40 at NPS 22 (fluids tables agree)
    with pytest.raises(ValueError):
        fluids_piping.nearest_pipe(NPS=2, schedule="60")
    with pytest.raises(InputError):
        resolve_pipe(_unchecked_pipe(nps="22", schedule="40"))


def test_unknown_schedule():
    with pytest.raises(InputError) as exc:
        resolve_pipe(_unchecked_pipe(nps="4", schedule="55"))
    assert exc.value.field == "pipe.schedule" and exc.value.value == "55"


def test_diameter_mode():
    r = resolve_pipe(Pipe(bore="diameter", inner_diameter_m=0.1, wall_thickness_m=0.004, material="copper"))
    assert r.outer_diameter_m == pytest.approx(0.108)  # closed form: OD = ID + 2 t
    assert r.wall_thickness_m == 0.004
    assert r.roughness_m == PIPE_MATERIALS["copper"].roughness_m
    thin = resolve_pipe(Pipe(bore="diameter", inner_diameter_m=0.05, wall_thickness_m=0.0))
    assert thin.outer_diameter_m == thin.inner_diameter_m


def test_entered_values_win_over_material():
    r = resolve_pipe(Pipe(roughness_m=1e-4, wall_conductivity_W_per_mK=20.0))
    assert r.roughness_m == 1e-4 and r.wall_conductivity_W_per_mK == 20.0
    # with both entered an unlisted material is accepted: nothing is taken from it
    r2 = resolve_pipe(Pipe(material="duplex 2205", roughness_m=2e-5, wall_conductivity_W_per_mK=15.0))
    assert r2.wall_conductivity_W_per_mK == 15.0


def test_material_defaults():
    r = resolve_pipe(Pipe(material="stainless steel"))
    assert r.roughness_m == PIPE_MATERIALS["stainless steel"].roughness_m
    assert r.wall_conductivity_W_per_mK == PIPE_MATERIALS["stainless steel"].conductivity_W_per_mK
    assert resolve_pipe(Pipe(material="Galvanized Steel")).roughness_m == pytest.approx(150e-6)


def test_unknown_material_error():
    with pytest.raises(InputError) as exc:
        resolve_pipe(Pipe(material="unobtainium"), field_prefix="segments[2].pipe")
    assert exc.value.field == "segments[2].pipe.material"
    assert "'unobtainium'" in str(exc.value)
    assert "carbon steel" in str(exc.value)


def test_roughness_values_moody():
    # Moody (1944) chart: commercial steel 0.00015 ft, drawn tubing 0.000005 ft,
    # galvanized iron 0.0005 ft, cast iron 0.00085 ft.
    ft = 0.3048
    assert PIPE_MATERIALS["carbon steel"].roughness_m == pytest.approx(0.00015 * ft, rel=0.02)
    assert PIPE_MATERIALS["copper"].roughness_m == pytest.approx(0.000005 * ft, rel=0.02)
    assert PIPE_MATERIALS["galvanised steel"].roughness_m == pytest.approx(0.0005 * ft, rel=0.02)
    assert PIPE_MATERIALS["cast iron"].roughness_m == pytest.approx(0.00085 * ft, rel=0.02)


def test_materials_have_sources_and_plausible_values():
    for key, m in PIPE_MATERIALS.items():
        assert m.source and 0 <= m.roughness_m < 1e-3 and 0.1 < m.conductivity_W_per_mK < 500, key
    for key, m in INSULATION_MATERIALS.items():
        # insulations of the kinds listed range about 0.012-0.07 W/(m K) near 50 °C (common practice)
        assert 0.012 < m.conductivity_W_per_mK < 0.07, key
        assert "manufacturer" in m.source, key


def test_resolve_is_cached():
    catalogue._resolve_cached.cache_clear()
    p = Pipe(nps="3", schedule="80")
    resolve_pipe(p)
    resolve_pipe(p)
    assert catalogue._resolve_cached.cache_info().hits >= 1


def _unchecked_pipe(**fields):
    """A Pipe built without validation: the model itself refuses unknown sizes on entry
    (tests/test_project_io.py); these tests check the catalogue's own message."""
    return Pipe.model_construct(**{**Pipe().model_dump(), **fields})
