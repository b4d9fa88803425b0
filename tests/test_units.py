"""Units at the edge: typed quantities, display conversion, check messages in the reader's units.

Check values come from the definitions of the units (exact by definition unless noted):
1 in = 25.4 mm; 1 ft = 0.3048 m; 1 US gallon = 3.785411784 L; 1 lb = 0.45359237 kg;
T[°F] = T[°C]·9/5 + 32; standard atmosphere = 101 325 Pa; 1 psi = 6894.757293168 Pa.
"""

import math

import pytest

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


@pytest.mark.parametrize("text", ["", "abc", "12 parsecs", "5 kg", "nan"])
def test_bad_entries_name_the_field_and_the_text(text):
    with pytest.raises(units.UnitParseError) as info:
        units.parse(text, "temperature", "SI", field="feed.inlet_temperature")
    assert "feed.inlet_temperature" in str(info.value)


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
