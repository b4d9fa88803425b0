"""Comparison of alternatives and target verdicts (app.comparison).

Reference values are computed here independently from the solved results
(differences by subtraction, pressure drop as inlet minus outlet pressure),
not read back from the comparison code.
"""

from __future__ import annotations

import pytest

from app import comparison
from solver import solve
from solver.model import Alternative, Layer, Segment, Targets, Wind


def _alt(name: str, thickness_m: float, tracing: float) -> Alternative:
    return Alternative(
        name=name,
        segments=[
            Segment(name="Run", length_m=60.0, heat_input_W_per_m=tracing,
                    insulation=[Layer(thickness_m=thickness_m, conductivity_W_per_mK=0.04)],
                    surroundings=Wind(temperature_K=263.15, wind_speed_m_per_s=8.0)),
            Segment(name="Riser", length_m=8.0, elevation_change_m=6.0,
                    insulation=[Layer(thickness_m=thickness_m, conductivity_W_per_mK=0.04)],
                    surroundings=Wind(temperature_K=263.15)),
        ],
    )


@pytest.fixture(scope="module")
def results():
    return [solve(_alt("Thin", 0.02, 0.0)), solve(_alt("Thick", 0.08, 0.0)), solve(_alt("Traced", 0.02, 30.0))]


def test_differences_against_named_baseline(results):
    table = comparison.compare(results, "Thick")
    assert table.names == ["Thin", "Thick", "Traced"]
    assert table.baseline_index == 1 and table.baseline_name == "Thick"
    base = results[1]
    row = table.row("outlet_temperature_K")
    assert row.values == [r.outlet_temperature_K for r in results]
    assert row.differences[1] is None
    assert row.differences[0] == pytest.approx(results[0].outlet_temperature_K - base.outlet_temperature_K, abs=1e-12)
    assert row.differences[2] == pytest.approx(results[2].outlet_temperature_K - base.outlet_temperature_K, abs=1e-12)
    # pressure drop is inlet minus outlet pressure (definition)
    dp = [r.inlet_pressure_Pa - r.outlet_pressure_Pa for r in results]
    row = table.row("pressure_drop_Pa")
    assert row.values == pytest.approx(dp)
    assert row.differences[2] == pytest.approx(dp[2] - dp[1])
    heat = table.row("heat_input_W")
    assert heat.differences[2] == pytest.approx(results[2].heat_input_W - base.heat_input_W)
    # physical sense: thicker insulation loses less heat in the wind
    assert table.row("heat_loss_W").differences[0] > 0


def test_baseline_defaults_to_first(results):
    assert comparison.compare(results, None).baseline_index == 0
    assert comparison.compare(results, "not there").baseline_index == 0
    with pytest.raises(ValueError, match="results"):
        comparison.compare([], None)


def test_every_row_is_a_key_figure(results):
    keys = set(results[0].key_figures())
    assert {s.key for s in comparison.KEY_FIGURE_SPECS} <= keys


def test_target_verdicts_met_and_missed(results):
    r = results[0]
    dp = r.inlet_pressure_Pa - r.outlet_pressure_Pa
    targets = Targets(
        outlet_temperature_min_K=r.outlet_temperature_K - 1.0,  # met
        outlet_temperature_max_K=r.outlet_temperature_K - 0.5,  # missed
        max_inner_wall_temperature_K=r.max_inner_wall_temperature_K,  # equal: met
        max_pressure_drop_Pa=dp * 0.5,  # missed
        max_heat_input_W=10.0,  # no tracing: 0 W, met
    )
    verdicts = comparison.target_verdicts(targets, r)
    by_key = {v.key: v for v in verdicts}
    assert [v.key for v in verdicts] == [
        "outlet_temperature_min_K", "outlet_temperature_max_K", "max_inner_wall_temperature_K",
        "max_pressure_drop_Pa", "max_heat_input_W",
    ]
    assert by_key["outlet_temperature_min_K"].met
    assert not by_key["outlet_temperature_max_K"].met
    assert by_key["max_inner_wall_temperature_K"].met
    assert not by_key["max_pressure_drop_Pa"].met
    assert by_key["max_heat_input_W"].met
    assert by_key["max_pressure_drop_Pa"].value == pytest.approx(dp)
    label, limit, value, met = verdicts[0][:4]
    assert label == "Outlet temperature, minimum" and limit == targets.outlet_temperature_min_K and met
    assert not comparison.all_met(verdicts)


def test_unset_targets_give_no_verdicts(results):
    assert comparison.target_verdicts(Targets(), results[0]) == []
    assert comparison.target_verdicts(None, results[0]) == []
    assert not comparison.targets_set(Targets())
    assert comparison.targets_set(Targets(max_heat_input_W=5.0))


def test_format_difference_rounds_to_shown_resolution():
    spec_t = comparison.KEY_FIGURE_SPECS[0]  # outlet temperature
    assert comparison.format_difference(0.04, 300.0, spec_t, "SI") == "±0"
    assert comparison.format_difference(-2.0, 300.0, spec_t, "SI") == "\u22122.0 K"
    # a temperature difference of 1 K is 1.8 degF (definition of the Fahrenheit degree)
    assert comparison.format_difference(1.0, 300.0, spec_t, "US") == "+1.8 °F"
    spec_dp = next(s for s in comparison.KEY_FIGURE_SPECS if s.key == "pressure_drop_Pa")
    # 12 kPa more on 100 kPa (shown as "100.0 kPa", so resolution 0.1 kPa): +12 %
    assert comparison.format_difference(12_000.0, 100_000.0, spec_dp, "SI") == "+12.0 kPa (+12 %)"
    # 3 Pa on 100 kPa is below the shown resolution
    assert comparison.format_difference(3.0, 100_000.0, spec_dp, "SI") == "±0"
    assert comparison.format_difference(None, 100_000.0, spec_dp, "SI") == "—"


def test_format_difference_speaks_the_unit_the_value_is_shown_in():
    spec_dp = next(s for s in comparison.KEY_FIGURE_SPECS if s.key == "pressure_drop_Pa")
    # a 50 Pa pressure drop is shown as "50.00 Pa" (below 0.1 kPa), so its difference is in Pa too
    assert comparison.format_difference(20.0, 50.0, spec_dp, "SI") == "+20.00 Pa (+40 %)"
    spec_q = next(s for s in comparison.KEY_FIGURE_SPECS if s.key == "heat_input_W")
    # against a baseline with no heat input: round-off is no difference, 1.5 kW is
    assert comparison.format_difference(1e-9, 0.0, spec_q, "SI") == "±0"
    assert comparison.format_difference(1500.0, 0.0, spec_q, "SI") == "+1.500 kW"
    # 1 kW = 3412.14 Btu/h (IT Btu); grouped with a thin space, no comma, no exponent
    assert comparison.format_difference(-1000.0, 10_000.0, spec_q, "US") == "\u22123\u2009412 Btu/h (\u221210 %)"
