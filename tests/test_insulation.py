"""Insulation conductivity as a function of temperature, and jacketing emissivities (issue 10, item 4).

References:
* The method of ASTM C680 (standard practice for heat gain/loss of insulated pipe; from memory): a
  cylindrical layer whose conductivity changes with temperature passes the heat of a constant k equal
  to its temperature-integrated mean ∫k dT / (T1 − T2); for k linear in T that is k at the arithmetic
  mean temperature. Checked by hand, and independently by integrating the conduction equation in
  the radius, dT/dr = −q'/(2π r k(T)), with scipy (solve_ivp, and quad for the integral of k).
* The conductivity tables are the catalogue's (ASTM C547 and others, from memory, as the catalogue
  says); the issue's mineral wool figures (0.036 → 0.050 W/(m·K) from 38 to 150 °C mean, from memory)
  are checked against them.
* Pipe dimensions: ASME B36.10M, NPS 2 outside diameter 60.3 mm.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import quad, solve_ivp
from scipy.optimize import brentq

from solver import catalogue, insulation
from solver.errors import InputError
from solver.factors import MethodFactors
from solver.march import solve
from solver.model import Alternative, Buried, Feed, Layer, Pipe, PureFluid, Segment, StillAir, Wind

D_NPS2 = 0.0603  # m, ASME B36.10M NPS 2 outside diameter
C = 273.15


def _table_k(material: str):
    """The catalogue's table as a plain function of T (np.interp on its points): the reference k(T).
    Each test keeps its solution inside the table's span (``_inside``), so none of solver.insulation's
    extrapolation is involved; the shooting may probe beyond it on the way (np.interp holds the ends)."""
    pts = catalogue.INSULATION_MATERIALS[material].conductivity_table
    t = np.array([p[0] for p in pts])
    k = np.array([p[1] for p in pts])

    def k_of(temperature):
        return float(np.interp(temperature, t, k))
    return k_of


def _inside(material: str, *temperatures):
    pts = catalogue.INSULATION_MATERIALS[material].conductivity_table
    assert all(pts[0][0] <= t <= pts[-1][0] for t in temperatures), "reference used outside the table"


def _drop_through(stack, q, t_hot, d0):
    """Temperature at the outside of ``stack`` [(k(T), thickness)] when q' [W/m] leaves a pipe of
    diameter d0 at t_hot: the radial conduction equation integrated layer by layer (scipy solve_ivp)."""
    t, r = t_hot, d0 / 2.0
    for k_of, thickness in stack:
        sol = solve_ivp(lambda rr, tt: [-q / (2.0 * math.pi * rr * k_of(tt[0]))], (r, r + thickness), [t],
                        rtol=1e-11, atol=1e-9)
        t, r = float(sol.y[0, -1]), r + thickness
    return t


def _reference_q(stack, t_hot, t_cold, d0):
    """q' [W/m] through ``stack`` with its faces at t_hot and t_cold, by shooting on the conduction
    equation (scipy brentq on q')."""
    return brentq(lambda q: _drop_through(stack, q, t_hot, d0) - t_cold, 1e-3, 1e4, xtol=1e-12, rtol=1e-13)


# --------------------------------------------------------------------------- the layer resistance (ASTM C680)


def test_linear_k_layer_uses_k_at_the_arithmetic_mean():
    # Hand case: 50 mm of mineral wool on NPS 2, faces 85 °C and 45 °C, all inside the table's
    # 38–93 °C step (k linear there). k at the mean 65 °C = 0.036 + 0.006 × 27/55 = 0.0389455 W/(m·K);
    # R = ln(160.3/60.3) / (2π × 0.0389455) = 0.977715 / 0.244699 = 3.99554 K·m/W (hand, from the catalogue's table).
    r_total, r_layers = insulation.layer_resistances(
        [Layer(material="mineral wool", thickness_m=0.05)], D_NPS2, C + 85.0, C + 45.0)
    assert float(r_total) == pytest.approx(3.99554, rel=2e-5)
    assert float(r_layers[0]) == pytest.approx(float(r_total), rel=1e-12)


def test_curved_k_single_layer_matches_the_conduction_equation():
    # 80 mm of mineral wool on NPS 2 from 255 °C to 40 °C: k bends at three table points on the way,
    # so k at the arithmetic mean is not the answer; the integral of k over the span is (quad), and the
    # conduction equation integrated in the radius agrees with it (both independent of solver.insulation).
    k_of = _table_k("mineral wool")
    t_hot, t_cold, thick = C + 255.0, C + 40.0, 0.08
    _inside("mineral wool", t_hot, t_cold)
    q_ref = _reference_q([(k_of, thick)], t_hot, t_cold, D_NPS2)
    k_bar = quad(k_of, t_cold, t_hot, points=[C + t for t in (93, 149, 204)], epsabs=1e-13)[0] \
        / (t_hot - t_cold)
    q_quad = 2.0 * math.pi * k_bar * (t_hot - t_cold) / math.log((D_NPS2 + 2 * thick) / D_NPS2)
    assert q_quad == pytest.approx(q_ref, rel=1e-7)

    r_total, _ = insulation.layer_resistances([Layer(material="mineral wool", thickness_m=thick)],
                                              D_NPS2, t_hot, t_cold)
    assert (t_hot - t_cold) / float(r_total) == pytest.approx(q_ref, rel=1e-7)
    # and the bend matters: k at the arithmetic mean would understate the heat by 2.6 %
    r_at_mean = math.log((D_NPS2 + 2 * thick) / D_NPS2) / (2 * math.pi * k_of(0.5 * (t_hot + t_cold)))
    assert (t_hot - t_cold) / r_at_mean / q_ref - 1.0 < -0.02


def test_two_curved_layers_match_the_conduction_equation():
    # Calcium silicate 40 mm under mineral wool 50 mm, pipe at 300 °C, jacket at 40 °C: the interface
    # temperature follows from both layers' k(T) (iterated by the solver, shot here).
    stack = [(_table_k("calcium silicate"), 0.04), (_table_k("mineral wool"), 0.05)]
    t_hot, t_cold = C + 300.0, C + 40.0
    q_ref = _reference_q(stack, t_hot, t_cold, D_NPS2)
    layers = [Layer(material="calcium silicate", thickness_m=0.04), Layer(material="mineral wool", thickness_m=0.05)]
    r_total, r_layers = insulation.layer_resistances(layers, np.array([D_NPS2]), np.array([t_hot]),
                                                     np.array([t_cold]))
    assert (t_hot - t_cold) / float(r_total[0]) == pytest.approx(q_ref, rel=1e-7)
    # the interface: the reference's temperature after the first layer
    t_interface = _drop_through(stack[:1], q_ref, t_hot, D_NPS2)
    _inside("calcium silicate", t_hot, t_interface)
    _inside("mineral wool", t_interface, t_cold)
    assert t_hot - q_ref * float(r_layers[0, 0]) == pytest.approx(t_interface, abs=1e-4)


def test_a_layer_with_its_own_constant_k_ignores_temperature():
    # the old behaviour: a constant k gives ln(Do/Di)/(2πk) whatever the faces (closed form)
    layer = [Layer(material="mineral wool", thickness_m=0.05, conductivity_W_per_mK=0.040)]
    expected = math.log((D_NPS2 + 0.1) / D_NPS2) / (2 * math.pi * 0.040)
    for faces in ((C + 300.0, C + 30.0), (C + 20.0, C - 10.0)):
        assert float(insulation.layer_resistances(layer, D_NPS2, *faces)[0]) == pytest.approx(expected, rel=1e-14)


def test_catalogue_mineral_wool_follows_the_issue_figures():
    # issue 10: mineral wool about 0.036 → 0.050 W/(m·K) from 38 to 150 °C mean (from memory)
    assert insulation.conductivity("mineral wool", C + 38.0) == pytest.approx(0.036, abs=5e-4)
    assert insulation.conductivity("mineral wool", C + 150.0) == pytest.approx(0.050, abs=1e-3)


def test_every_catalogue_material_has_a_sourced_rising_table_inside_its_use_range():
    for key, mat in catalogue.INSULATION_MATERIALS.items():
        t = [p[0] for p in mat.conductivity_table]
        k = [p[1] for p in mat.conductivity_table]
        assert len(t) >= 4, key
        assert all(b > a for a, b in zip(t, t[1:])), key
        assert all(b > a for a, b in zip(k, k[1:])), key  # porous insulations conduct more when hot
        assert mat.use_range_K[0] <= t[0] and t[-1] <= mat.use_range_K[1], key
        assert "ASTM C" in mat.table_source and "from memory" in mat.table_source, key


def test_unknown_material_without_conductivity_is_refused_naming_the_field():
    alt = _line([Layer(material="cork board", thickness_m=0.04)], t_in=C + 80.0)
    with pytest.raises(InputError) as err:
        solve(alt)
    assert err.value.field == "segments[0].insulation[0].conductivity_W_per_mK"
    assert "cork board" in str(err.value) and "segment 1" in str(err.value)


def test_common_other_names_find_the_catalogue_material():
    assert insulation.conductivity("Rock wool", C + 38.0) == insulation.conductivity("mineral wool", C + 38.0)
    assert insulation.conductivity("foam glass", C + 24.0) == insulation.conductivity("cellular glass", C + 24.0)


# --------------------------------------------------------------------------- in the solver


def _line(layers, t_in, surroundings=None, length=1.0, flow=3.0):
    """Invented: water at 30 bar through NPS 2, fast so its temperature hardly changes along the run."""
    return Alternative(
        name="k(T) line", fluid=PureFluid(name="Water"),
        feed=Feed(inlet_temperature_K=t_in, inlet_pressure_Pa=30e5, mass_flow_kg_per_s=flow, inlet_flow="developed"),
        segments=[Segment(name="Run", length_m=length, pipe=Pipe(nps="2", schedule="40"), insulation=layers,
                          surroundings=surroundings or StillAir(temperature_K=C + 20.0))])


def test_solved_heat_loss_matches_the_c680_method_with_the_solved_film():
    # An almost isothermal run (3 kg/s of water at 170 °C through 1 m) under 30 mm calcium silicate and
    # 40 mm mineral wool, an outer film of 5 W/(m²·K) entered (so the outside is known exactly), air 30 °C
    # (a warm plant room: the jacket stays above the table's lowest mean temperature, 38 °C).
    # Reference: q' from the bulk through the inside film and pipe wall (their resistances from the
    # breakdown, which does not involve the insulation), the two k(T) layers by the conduction equation,
    # and the film: T_b − q'(R_in + R_wall) − ΔT_insulation(q') − q'/(h π D) = T_air, solved for q'.
    layers = [Layer(material="calcium silicate", thickness_m=0.03), Layer(material="mineral wool", thickness_m=0.04)]
    h, t_air = 5.0, C + 30.0
    res = solve(_line(layers, C + 170.0, StillAir(temperature_K=t_air, film_coefficient_W_per_m2K=h)))
    seg = res.resistances[0]
    r_inner = seg.part("inside_film").resistance_K_m_per_W + seg.part("pipe_wall").resistance_K_m_per_W
    t_bulk = 0.5 * (res.inlet_temperature_K + res.outlet_temperature_K)
    d_out = D_NPS2 + 2 * 0.07
    stack = [(_table_k("calcium silicate"), 0.03), (_table_k("mineral wool"), 0.04)]

    def miss(q):
        t_hot = t_bulk - q * r_inner
        return _drop_through(stack, q, t_hot, D_NPS2) - (t_air + q / (h * math.pi * d_out))
    q_ref = brentq(miss, 1.0, 500.0, xtol=1e-10)
    t_hot = t_bulk - q_ref * r_inner
    t_mid = _drop_through(stack[:1], q_ref, t_hot, D_NPS2)
    _inside("calcium silicate", t_hot, t_mid)
    _inside("mineral wool", t_mid, t_air + q_ref / (h * math.pi * d_out))
    assert res.heat_loss_W / 1.0 == pytest.approx(q_ref, rel=1e-6)
    # the breakdown shows each layer at the solved temperatures: their sum is the insulation's whole drop
    r_ins = seg.part("insulation_1").resistance_K_m_per_W + seg.part("insulation_2").resistance_K_m_per_W
    assert q_ref * r_ins == pytest.approx(t_hot - _drop_through(stack, q_ref, t_hot, D_NPS2), rel=1e-6)
    assert q_ref * seg.part("insulation_1").resistance_K_m_per_W == pytest.approx(t_hot - t_mid, rel=1e-6)


def test_a_hot_line_loses_more_with_k_of_t_than_with_the_old_constant():
    # 50 mm mineral wool, 200 °C water, still air 20 °C: the old constant (0.040 at 50 °C) understates
    # the loss; with k(T) at a mean near 110 °C (k about 0.044–0.045) it is some 10 % more.
    hot_kt = solve(_line([Layer(material="mineral wool", thickness_m=0.05)], C + 200.0, flow=0.5, length=50.0))
    hot_const = solve(_line([Layer(material="mineral wool", thickness_m=0.05, conductivity_W_per_mK=0.040)],
                            C + 200.0, flow=0.5, length=50.0))
    assert hot_kt.heat_loss_W > 1.08 * hot_const.heat_loss_W
    assert hot_kt.outlet_temperature_K < hot_const.outlet_temperature_K


def test_uncertainty_factor_still_scales_the_conductivity():
    line = _line([Layer(material="mineral wool", thickness_m=0.05)], C + 150.0, flow=0.5, length=50.0)
    base = solve(line).heat_loss_W
    more = solve(line, factors=MethodFactors(insulation_conductivity=1.2)).heat_loss_W
    # insulation is most of the path, so 20 % more k gives nearly 20 % more loss (less, for the film)
    assert 1.12 * base < more < 1.2 * base


def test_buried_and_wind_lines_converge_with_k_of_t():
    # the march updates the insulation inside the soil's and the wind film's path too: the loss agrees
    # with a constant k equal to the layer's integrated mean at the solved faces (C680)
    for sur in (Buried(soil_temperature_K=C + 5.0, depth_m=1.0), Wind(temperature_K=C - 10.0, wind_speed_m_per_s=6.0)):
        res = solve(_line([Layer(material="mineral wool", thickness_m=0.05)], C + 180.0, sur))
        seg = res.resistances[0]
        r_kt = seg.part("insulation_1").resistance_K_m_per_W
        k_equiv = math.log((D_NPS2 + 0.1) / D_NPS2) / (2 * math.pi * r_kt)
        same = solve(_line([Layer(material="mineral wool", thickness_m=0.05, conductivity_W_per_mK=k_equiv)],
                           C + 180.0, sur))
        assert res.heat_loss_W == pytest.approx(same.heat_loss_W, rel=1e-4)
        # mineral wool at a mean near 90 °C: the table gives 0.042 at 93 °C, and the integrated mean over
        # a k that rises ever faster is a little more
        assert 0.042 < k_equiv < 0.046


def test_a_layer_beyond_its_rating_is_refused_with_the_layer_named():
    # flexible elastomeric foam is rated to 105 °C (ASTM C534 Grade 1, from memory): on a 150 °C line the
    # catalogue has no k for it and the material is unsuitable; with the user's own k it still solves
    foam = Layer(material="flexible elastomeric foam", thickness_m=0.025)
    with pytest.raises(InputError) as err:
        solve(_line([foam], C + 150.0))
    assert err.value.field == "segments[0].insulation[0].material"
    assert "105 °C" in str(err.value)
    solve(_line([foam.model_copy(update={"conductivity_W_per_mK": 0.045})], C + 150.0))


def test_grid_independent_with_k_of_t():
    # every reported temperature within 0.01 K from refinement 0.5 to 4 (as tests/test_grid_independence.py)
    layers = [Layer(material="calcium silicate", thickness_m=0.03), Layer(material="mineral wool", thickness_m=0.04)]
    alt = _line(layers, C + 180.0, Wind(temperature_K=C - 5.0, wind_speed_m_per_s=3.0), length=200.0, flow=0.3)
    figures = ("outlet_temperature_K", "max_inner_wall_temperature_K", "min_inner_wall_temperature_K",
               "max_outer_surface_temperature_K", "min_outer_surface_temperature_K")
    results = [solve(alt, refine=r) for r in (0.5, 1.0, 2.0, 4.0)]
    for key in figures:
        values = [getattr(r, key) for r in results]
        assert max(values) - min(values) < 0.01, key
    assert results[0].outlet_temperature_K < C + 178.0  # the line does cool: the check is not vacuous


# --------------------------------------------------------------------------- jacketing


def test_jacketing_list_and_a_bright_jacket_runs_hotter():
    choices = catalogue.jacketing_choices()
    keys = [c[0] for c in choices]
    assert {"aluminium_new", "stainless_new", "galvanised_weathered", "painted", "pvc"} <= set(keys)
    assert all(0.0 < c[2] <= 1.0 and c[3] for c in choices)
    # on a hot line a low-emissivity surface (bright aluminium) radiates less, so it runs hotter than a
    # painted one: what the jacketing choice is for (the surface energy balance)
    layers = [Layer(material="mineral wool", thickness_m=0.05)]
    surface = {}
    for key in ("aluminium_new", "painted"):
        eps = catalogue.JACKETING[key].emissivity
        res = solve(_line(layers, C + 200.0, StillAir(temperature_K=C + 20.0, emissivity=eps)))
        surface[key] = res.max_outer_surface_temperature_K
    assert surface["aluminium_new"] > surface["painted"] + 5.0


def test_k_extrapolates_smoothly_within_the_use_range_and_not_beyond():
    # beyond the table k carries on along its end steps (no jump at the table's ends) up to the rating,
    # and stays put past it, where a solved layer is refused (test above)
    for key, mat in catalogue.INSULATION_MATERIALS.items():
        lo, hi = mat.use_range_K
        t = np.linspace(lo, hi, 2001)
        k = insulation.conductivity(key, t)
        assert np.all(np.diff(k) >= 0.0) and np.all(k > 0.0), key
        assert np.max(np.abs(np.diff(k))) < 2e-4, key  # no jump: steps of 0.05–0.5 K change k by little
        assert insulation.conductivity(key, hi + 200.0) == pytest.approx(float(k[-1]), rel=1e-12), key
        assert insulation.conductivity(key, max(lo - 50.0, 1.0)) == pytest.approx(float(k[0]), rel=1e-12), key
