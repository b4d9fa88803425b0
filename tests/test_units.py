"""Units at the edge: typed quantities, display conversion, check messages in the reader's units.

Check values come from the definitions of the units (exact by definition unless noted):
1 in = 25.4 mm; 1 ft = 0.3048 m; 1 US gallon = 3.785411784 L; 1 lb = 0.45359237 kg;
T[°F] = T[°C]·9/5 + 32; standard atmosphere = 101 325 Pa; 1 psi = 6894.757293168 Pa.
"""

import math
import re

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from app import units
from solver.results import Check, render_message


@pytest.mark.parametrize("text, quantity, expected", [
    ("2 in", "diameter", 0.0508),
    ('2"', "diameter", 0.0508),
    ("52.5 mm", "diameter", 0.0525),
    ("150 degF", "temperature", (150 - 32) * 5 / 9 + 273.15),
    ("80 °C", "temperature", 353.15),
    ("300 K", "temperature", 300.0),
    ("35 gpm", "volume_flow", 35 * 3.785411784e-3 / 60),
    ("12 m3/h", "volume_flow", 12 / 3600),
    ("1440 kg/h", "mass_flow", 0.4),
    ("3 bar(g)", "pressure", 3e5 + 101325.0),
    ("3 barg", "pressure", 3e5 + 101325.0),
    ("45 psig", "pressure", 45 * 6894.757293168 + 101325.0),
    ("3 bar(a)", "pressure", 3e5),
    ("3 bar", "pressure", 3e5),
    ("10 K", "temperature_difference", 10.0),
    ("18 delta_degF", "temperature_difference", 10.0),
    ("25 W/m", "power_per_length", 25.0),
    ("100 ft", "length", 30.48),
])
def test_parse_typed_quantities(text, quantity, expected):
    assert units.parse(text, quantity, "SI") == pytest.approx(expected, rel=1e-12)


def test_bare_numbers_are_read_in_the_display_unit_of_the_system():
    assert units.parse("80", "temperature", "SI") == pytest.approx(353.15)
    assert units.parse("176", "temperature", "US") == pytest.approx(353.15)  # 176 °F = 80 °C
    assert units.parse("2", "diameter", "US") == pytest.approx(0.0508)  # inches in US
    assert units.parse("6", "pressure", "SI") == pytest.approx(6e5)  # bar(a) in SI


# What a unit library says when it cannot convert; none of it may reach the user.
LIBRARY_WORDS = ("Cannot convert", "dimensionality", "[length]", "[mass]", "[time]", "registry", "**",
                 "DimensionalityError", "UndefinedUnitError", "Traceback")


@pytest.mark.parametrize("text", ["", "abc", "12 parsecs", "5 kg", "nan", "80 psi", "12 foo", "5 kg/", "3 (m"])
def test_bad_entries_name_the_field_by_its_label_and_the_text(text):
    with pytest.raises(units.UnitParseError) as info:
        units.parse(text, "temperature", "SI", field="feed.inlet_temperature_K")
    message = str(info.value)
    assert "Inlet temperature" in message  # the label the Feed shows, not the file key
    assert "inlet_temperature_K" not in message
    if text.strip() and text != "nan":
        assert text.split()[-1] in message  # the unit (or text) typed is named
    for words in LIBRARY_WORDS:
        assert words not in message, (words, message)


@pytest.mark.parametrize("system, example", [("SI", "kg/h"), ("US", "lb/h")])
def test_volume_flow_typed_as_mass_flow_points_to_volume_flow(system, example):
    with pytest.raises(units.UnitParseError) as info:
        units.parse("35 gpm", "mass_flow", system, field="feed.mass_flow_kg_per_s")
    message = str(info.value).replace("\u00a0", " ")  # no-break space between number and unit
    assert info.value.reason == "wrong_kind" and info.value.typed_kind == "volume_flow"
    assert "35 gpm is a volume flow" in message and "choose Volume flow" in message
    assert f" {example}" in message  # an example mass flow in the system's own unit
    assert not any(words in message for words in LIBRARY_WORDS), message


def test_pressure_typed_as_temperature_says_what_psi_is():
    with pytest.raises(units.UnitParseError) as info:
        units.parse("80 psi", "temperature", "SI")
    assert str(info.value) == "psi is a pressure unit; give a temperature such as 80\u00a0°C"
    with pytest.raises(units.UnitParseError) as info:
        units.parse("80 psi", "temperature", "US")
    assert "°F" in str(info.value) and "°C" not in str(info.value)


def test_empty_entry_asks_for_a_value_by_label():
    with pytest.raises(units.UnitParseError) as info:
        units.parse("  ", "length", "US", field="length_m")
    assert info.value.reason == "empty"
    assert str(info.value).startswith("Length needs a value") and "ft" in str(info.value)


@pytest.mark.parametrize("text, quantity, expected", [
    ("14\u2009400 kg/h", "mass_flow", 4.0),  # digit groups as the display writes them
    ("\u22125 m", "length", -5.0),  # the true minus sign of the display
    ("0.04 W/(m·K)", "conductivity", 0.04),
    ("1 Btu/(h·ft²·°F)", "film_coefficient", 5.678263),  # 1 Btu/(h·ft²·°F) = 5.678263 W/(m²·K) (IT Btu)
    ("250 mbar(a)", "pressure", 25_000.0),
    ("30 %", "fraction", 0.3),
    ("4 mil", "thickness", 0.0001016),  # a mil is a thousandth of an inch
])
def test_display_spellings_are_read_back(text, quantity, expected):
    assert units.parse(text, quantity, "SI") == pytest.approx(expected, rel=1e-6)


def test_display_round_trip_in_both_systems():
    for quantity in units.QUANTITIES:
        for system in units.UNIT_SYSTEMS:
            for value in (0.0123, 1.0, 353.15, 2.5e5):
                shown = units.to_display(value, quantity, system)
                assert units.from_display(shown, quantity, system) == pytest.approx(value, rel=1e-12)


def test_format_value_states_the_unit():
    assert units.format_value(353.15, "temperature", "SI") == "80.0 °C"
    assert units.format_value(353.15, "temperature", "US") == "176.0 °F"
    assert units.format_value(math.nan, "temperature", "SI") == "—"
    assert units.format_value(12.345, "length", "SI") == "12.3 m"


def test_one_number_format_thin_space_groups_and_true_minus():
    # 4 kg/s = 14 400 kg/h (definition of the hour); groups of three with a thin space, no comma
    assert units.format_value(4.0, "mass_flow", "SI") == "14\u2009400 kg/h"
    assert units.format_value(-5.0, "length", "SI") == "\u22125.00 m"
    assert units.format_value(273.14, "temperature", "SI") == "0.0 °C"  # never "−0.0"
    assert "," not in units.format_value(2.0e6, "power", "US")


def test_round_off_residual_reads_as_below_a_milliwatt():
    assert units.format_value(1.2e-9, "power", "SI") == "< 1 mW"
    assert units.format_value(-3e-7, "power", "SI") == "< 1 mW"
    us = units.format_value(1.2e-9, "power", "US")
    assert us.endswith("Btu/h") and " W" not in us and "e-" not in us


def test_small_values_move_to_a_smaller_unit_not_an_exponent():
    # 2.186e-05 kPa = 0.02186 Pa: a hydrostatic head of a few microns of water
    assert units.format_value(2.186e-2, "pressure_difference", "SI") == "0.02186 Pa"
    assert units.format_value(50.0, "power", "SI") == "50.00 W"  # 0.05 kW
    assert units.format_value(5e-2, "power", "SI") == "50.00 mW"
    assert units.format_value(2.5e8, "power", "SI") == "250.0 MW"


_EXPONENT = re.compile(r"\d[eE][-+]?\d|inf|nan")


@settings(max_examples=300, deadline=None)
@given(quantity=st.sampled_from(sorted(units.QUANTITIES)), system=st.sampled_from(units.UNIT_SYSTEMS),
       mantissa=st.floats(min_value=1.0, max_value=9.999), exponent=st.integers(min_value=-15, max_value=12),
       negative=st.booleans(), digits=st.integers(min_value=2, max_value=5))
def test_format_value_never_writes_an_exponent(quantity, system, mantissa, exponent, negative, digits):
    value = (-1 if negative else 1) * mantissa * 10.0**exponent
    if quantity == "temperature":
        value = abs(value) % 2000.0  # kelvin
    for with_unit in (True, False):
        text = units.format_value(value, quantity, system, digits=digits, with_unit=with_unit)
        assert not _EXPONENT.search(text), (quantity, system, value, text)
        assert "," not in text


@settings(max_examples=300, deadline=None)
@given(quantity=st.sampled_from(sorted(units.QUANTITIES)), system=st.sampled_from(units.UNIT_SYSTEMS),
       mantissa=st.floats(min_value=1.0, max_value=9.999), exponent=st.integers(min_value=-6, max_value=8))
def test_what_is_shown_reads_back_as_the_value(quantity, system, mantissa, exponent):
    """Whatever a table shows can be typed back into a box and means the same value."""
    value = mantissa * 10.0**exponent
    if quantity == "temperature":
        value = 1.0 + value % 1900.0
    text = units.format_value(value, quantity, system)
    if text.startswith("< "):  # below the smallest figure worth showing: the bound holds
        assert abs(value) < units.parse(text[2:], quantity, system)
        return
    back = units.parse(text, quantity, system)
    u = units.unit(quantity, system)
    if quantity in ("temperature", "temperature_difference"):
        assert back == pytest.approx(value, abs=0.05 / u.scale + 1e-9)  # shown to 0.1 degree
    elif quantity in ("length", "elevation", "depth"):
        step = 0.1 if abs(u.from_si(value)) >= 10 else 0.01  # positions: to 0.01 m/ft, from 10 on to 0.1
        assert back == pytest.approx(value, abs=0.5 * step / u.scale * 1.0001)
    else:
        assert back == pytest.approx(value, rel=6e-4)  # four significant digits


def test_check_messages_follow_the_unit_system():
    template = "Outer surface reaches ⟦T:343.15⟧ at ⟦v:3.0⟧, within ⟦dT:5.0⟧; tracing ⟦q:30.48⟧."
    check = Check("warning", "X", render_message(template), template=template)
    assert check.message == "Outer surface reaches 70.0 °C at 3.00 m/s, within 5 K; tracing 30 W/m."
    us = units.check_message(check, "US")
    assert "158.0 °F" in us  # 70 °C = 158 °F
    assert "9 °F" in us  # a 5 K difference is 9 °F
    assert "9.84 ft/s" in us  # 3 m/s / 0.3048
    assert "9.29 W/ft" in us  # 30.48 W/m × 0.3048
    assert units.check_message(Check("info", "Y", "plain text"), "US") == "plain text"
