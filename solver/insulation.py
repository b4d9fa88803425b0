"""Insulation layers whose conductivity changes with temperature: k(T) and the layers' resistances.

Mineral wool and calcium silicate conduct noticeably more when hot, so a hot line loses more than a
constant k at 50 °C says. Each catalogue insulation material carries a table of the most its material
specification allows at several mean temperatures (``solver.catalogue.INSULATION_MATERIALS``);
between the points k is linear in temperature.

Method (ASTM C680, the standard practice for heat loss of insulated pipe): in a cylindrical layer
with k(T), the heat per metre is exactly

    q' = 2π · ∫_{T_cold}^{T_hot} k dT / ln(D_out / D_in)

(the Kirchhoff transformation of the conduction equation), so the layer's resistance is that of a
constant k equal to the temperature-integrated mean k̄ = ∫k dT / (T_hot − T_cold). Where k is linear
over the layer's span, k̄ is k at the layer's mean temperature; over a table's bend it is the exact
integral of the piecewise-linear k, not the value at the mean. In a stack of layers, the interface
temperatures follow from the series resistances, so they are iterated (a few rounds; k changes
slowly with temperature). A layer with its own constant conductivity keeps it, exactly as before.

Beyond the table, k is extrapolated linearly from its end points, but only within the temperatures
the specification rates the material for (``use_range_K``); beyond those k stays at the limit's value
while a solve iterates, and a solved line whose layer face leaves the range is refused with the
layer named (:func:`check_use_range`): the catalogue has no data there, and the material is not
rated for it.
"""

from __future__ import annotations

import functools
import math

import numpy as np

from solver import catalogue
from solver.errors import InputError

#: Rounds of the interface-temperature iteration in a stack of k(T) layers: each round cuts the error by
#: the relative change of k across a layer (a few percent), so 1e-6 K is reached in well under this.
_MAX_ROUNDS = 8
_ROUND_TOL_K = 1e-6


# --------------------------------------------------------------------------- k(T) of a catalogue material


class _KCurve:
    """k(T) of one material: piecewise linear through the table, extrapolated linearly within the use
    range, constant beyond it; and its integral K(T) = ∫k dT (exact for the piecewise-linear k)."""

    def __init__(self, key: str):
        mat = catalogue.INSULATION_MATERIALS[key]
        self.key = key
        self.material = mat
        t = np.array([p[0] for p in mat.conductivity_table], dtype=float)
        k = np.array([p[1] for p in mat.conductivity_table], dtype=float)
        lo, hi = mat.use_range_K
        # knots: the use range's ends (k extrapolated from the end segments) around the table's points;
        # k is held above a quarter of the table's lowest value (a steep end segment must not reach 0)
        floor = 0.25 * float(k.min())
        k_lo = max(k[0] + (k[1] - k[0]) / (t[1] - t[0]) * (lo - t[0]), floor) if lo < t[0] else None
        k_hi = max(k[-1] + (k[-1] - k[-2]) / (t[-1] - t[-2]) * (hi - t[-1]), floor) if hi > t[-1] else None
        if k_lo is not None:
            t, k = np.concatenate([[lo], t]), np.concatenate([[k_lo], k])
        if k_hi is not None:
            t, k = np.concatenate([t, [hi]]), np.concatenate([k, [k_hi]])
        self.t, self.k = t, k
        self.slope = np.diff(k) / np.diff(t)
        self.K = np.concatenate([[0.0], np.cumsum(0.5 * (k[:-1] + k[1:]) * np.diff(t))])

    def k_at(self, temperature_K):
        return np.interp(temperature_K, self.t, self.k)  # constant beyond the first and last knot

    def integral(self, temperature_K):
        """K(T) = ∫_{t0}^{T} k dT [W/m], for any T (linear beyond the knots, where k is constant)."""
        T = np.asarray(temperature_K, dtype=float)
        i = np.clip(np.searchsorted(self.t, T, side="right") - 1, 0, self.t.size - 2)
        below, above = T < self.t[0], T > self.t[-1]
        dt = T - self.t[i]
        inside = self.K[i] + self.k[i] * dt + 0.5 * self.slope[i] * dt * dt
        return np.where(below, (T - self.t[0]) * self.k[0],
                        np.where(above, self.K[-1] + (T - self.t[-1]) * self.k[-1], inside))

    def mean(self, t_hot, t_cold):
        """The temperature-integrated mean conductivity over [t_cold, t_hot] [W/(m·K)] (either order)."""
        t_hot = np.asarray(t_hot, dtype=float)
        t_cold = np.asarray(t_cold, dtype=float)
        span = t_hot - t_cold
        small = np.abs(span) < 1e-6
        k_mid = self.k_at(0.5 * (t_hot + t_cold))
        with np.errstate(divide="ignore", invalid="ignore"):
            k_bar = (self.integral(t_hot) - self.integral(t_cold)) / np.where(small, 1.0, span)
        return np.where(small, k_mid, k_bar)


@functools.lru_cache(maxsize=None)
def _curve(key: str) -> _KCurve:
    return _KCurve(key)


def _curve_for(material: str, field: str, value) -> _KCurve:
    key = catalogue.insulation_key(material)
    if key is None or not catalogue.INSULATION_MATERIALS[key].conductivity_table:
        raise InputError(
            field, value,
            f"the layer gives no conductivity and {material!r} is not a catalogue insulation material with a "
            f"conductivity table; enter the layer's conductivity, or choose one of: "
            f"{', '.join(catalogue.INSULATION_MATERIALS)}")
    return _curve(key)


def conductivity(material: str, t_mean_K):
    """The catalogue conductivity of ``material`` at mean temperature ``t_mean_K`` [W/(m·K)].

    Linear between the specification's table points, extrapolated linearly within the material's use
    range and held at the limit's value beyond it (:func:`check_use_range` refuses a solved layer
    there). Scalar in, float out; array in, array out. Raises :class:`InputError` on ``material`` when
    the catalogue has no table for it.
    """
    k = _curve_for(material, "material", material).k_at(t_mean_K)
    return float(k) if np.ndim(k) == 0 else k


def mean_conductivity(material: str, t_hot_K, t_cold_K):
    """The temperature-integrated mean conductivity ∫k dT / (T_hot − T_cold) of ``material`` [W/(m·K)]:
    the constant k that gives a layer between these face temperatures its exact heat flow (ASTM C680)."""
    k = _curve_for(material, "material", material).mean(t_hot_K, t_cold_K)
    return float(k) if np.ndim(k) == 0 else k


# --------------------------------------------------------------------------- layers in series


def uses_table(layers) -> bool:
    """True when any layer takes its conductivity from the catalogue (no constant given)."""
    return any(layer.conductivity_W_per_mK is None for layer in layers)


def layer_resistances(layers, d_pipe_outer_m, t_hot_K, t_cold_K, conductivity_factor: float = 1.0,
                      field_prefix: str = "insulation"):
    """Resistances of insulation layers per metre of pipe [K·m/W], innermost first.

    ``layers``: :class:`solver.model.Layer` objects (material, thickness_m, conductivity_W_per_mK; a
    None conductivity = the catalogue material's k(T)). ``d_pipe_outer_m``: the pipe's outside
    diameter [m]; ``t_hot_K`` / ``t_cold_K``: the pipe's outer wall and the insulation's outer surface
    [K]; all three scalars or arrays (one value per cell), broadcast together. Each k(T) layer gets the
    temperature-integrated mean k between its own face temperatures, which follow from the series
    resistances (iterated to 1e-6 K). ``conductivity_factor`` scales every layer's k (the uncertainty
    bands' ``factors.insulation_conductivity``).

    Returns ``(r_total, r_layers)``: arrays of the broadcast shape, and ``r_layers`` with one more
    leading axis (one row per layer). Raises :class:`InputError` on
    ``<field_prefix>[j].conductivity_W_per_mK`` when a layer has no conductivity and the catalogue
    no table for its material.
    """
    d0, t_hot, t_cold = np.broadcast_arrays(np.asarray(d_pipe_outer_m, dtype=float),
                                            np.asarray(t_hot_K, dtype=float), np.asarray(t_cold_K, dtype=float))
    shape = d0.shape
    n = len(layers)
    r = np.zeros((n,) + shape)
    curves = []
    d = d0
    ln_ratio = []
    for j, layer in enumerate(layers):
        d_next = d + 2.0 * layer.thickness_m
        lr = np.log(d_next / d)
        ln_ratio.append(lr)
        if layer.conductivity_W_per_mK is None:
            curves.append(_curve_for(layer.material, f"{field_prefix}[{j}].conductivity_W_per_mK", None))
        else:
            curves.append(None)
            r[j] = lr / (2.0 * math.pi * layer.conductivity_W_per_mK * conductivity_factor)
        d = d_next
    table_rows = [j for j, c in enumerate(curves) if c is not None]
    if not table_rows:
        return r.sum(axis=0), r
    # first round: every k(T) layer at the mean of the whole stack's faces
    for j in table_rows:
        k = curves[j].mean(t_hot, t_cold) * conductivity_factor
        r[j] = ln_ratio[j] / (2.0 * math.pi * k)
    if n == 1:
        return r.sum(axis=0), r  # one layer: its faces are the stack's, so the first round is exact
    faces_prev = None
    for _ in range(_MAX_ROUNDS):
        total = r.sum(axis=0)
        share = np.cumsum(r, axis=0) / np.where(total > 0.0, total, 1.0)
        faces = t_hot - (t_hot - t_cold) * share  # the outer face of each layer
        if faces_prev is not None and float(np.max(np.abs(faces - faces_prev), initial=0.0)) < _ROUND_TOL_K:
            break
        faces_prev = faces
        inner = np.concatenate([t_hot[None], faces[:-1]], axis=0)
        for j in table_rows:
            k = curves[j].mean(inner[j], faces[j]) * conductivity_factor
            r[j] = ln_ratio[j] / (2.0 * math.pi * k)
    return r.sum(axis=0), r


def face_temperatures(r_layers, t_hot_K, t_cold_K):
    """(inner face, outer face) temperature of each layer [K], from the layers' series resistances."""
    t_hot = np.asarray(t_hot_K, dtype=float)
    t_cold = np.asarray(t_cold_K, dtype=float)
    total = r_layers.sum(axis=0)
    share = np.cumsum(r_layers, axis=0) / np.where(total > 0.0, total, 1.0)
    outer = t_hot - (t_hot - t_cold) * share
    inner = np.concatenate([np.broadcast_to(t_hot, outer.shape[1:])[None], outer[:-1]], axis=0)
    return inner, outer


def check_use_range(layers, r_layers, t_hot_K, t_cold_K, field_prefix: str = "insulation") -> None:
    """Refuse a solved stack whose k(T) layer has a face outside its material's use range.

    The catalogue has no conductivity there and the specification does not rate the material for it,
    so the heat loss would be a guess: raises :class:`InputError` on ``<field_prefix>[j].material``
    with the limit, its source and the temperature reached. Layers with their own constant k are not
    judged (the user's product data decide).
    """
    inner, outer = face_temperatures(np.asarray(r_layers, dtype=float), t_hot_K, t_cold_K)
    for j, layer in enumerate(layers):
        if layer.conductivity_W_per_mK is not None:
            continue
        key = catalogue.insulation_key(layer.material)
        mat = catalogue.INSULATION_MATERIALS[key]
        lo, hi = mat.use_range_K
        hottest = float(np.max(np.maximum(inner[j], outer[j])))
        coldest = float(np.min(np.minimum(inner[j], outer[j])))
        spec = mat.table_source.split(";")[0]
        fix = ("choose a material rated for it, or enter the layer's conductivity if its product is rated "
               "beyond the catalogue's")
        if hottest > hi:
            raise InputError(
                f"{field_prefix}[{j}].material", layer.material,
                f"the layer's hot face reaches {hottest - 273.15:.0f} °C, above the {hi - 273.15:.0f} °C the "
                f"catalogue's {mat.label.lower()} is rated for ({spec}); {fix}")
        if coldest < lo:
            raise InputError(
                f"{field_prefix}[{j}].material", layer.material,
                f"the layer's cold face reaches {coldest - 273.15:.0f} °C, below the {lo - 273.15:.0f} °C the "
                f"catalogue's {mat.label.lower()} is rated for ({spec}); {fix}")


# --------------------------------------------------------------------------- the line's cells (solver.march)


class _Group:
    """Cells of the line's k(T) segments that share one layer stack, handled in one vectorised call."""

    def __init__(self, layers, segments):
        self.layers = layers
        self.segments = segments
        self.cells = np.concatenate([np.arange(seg.cells.start, seg.cells.stop) for seg in segments])
        bounds = np.cumsum([0] + [seg.cells.stop - seg.cells.start for seg in segments])
        self.local = [slice(int(a), int(b)) for a, b in zip(bounds[:-1], bounds[1:])]  # each segment's share
        self.prefix = f"segments[{segments[0].index}].insulation"


def _groups(line) -> list[_Group]:
    # segments whose insulation takes the catalogue k(T) and carries heat (solver.line sets
    # ``insulation_layers`` only for still air, wind and buried), grouped by their stack: a line is
    # mostly one insulation specification, so a pass costs one call, not one per segment. Worked out once
    # per line and kept on it (the grouping never changes while the line is marched).
    cached = vars(line).get("_insulation_groups")
    if cached is None:
        stacks: dict = {}
        for seg in line.segments:
            layers = getattr(seg, "insulation_layers", ())
            if layers:
                key = tuple((la.material, la.thickness_m, la.conductivity_W_per_mK) for la in layers)
                stacks.setdefault(key, (layers, []))[1].append(seg)
        cached = [_Group(layers, segs) for layers, segs in stacks.values()]
        vars(line)["_insulation_groups"] = cached
    return cached


def any_on_line(line) -> bool:
    """True when some segment of the line has a k(T) layer that carries heat: the march then updates it."""
    return bool(_groups(line))


def _faces(line, c, t_heated, r_out_total):
    # the pipe's outer wall, and the insulation's outer surface from the heat through the outside path
    t_hot = t_heated[c]
    q_out = (t_hot - line.t_inf[c]) / r_out_total[c]
    return t_hot, t_hot - q_out * line.r_ins[c]


def update_line(line, t_heated, r_out_total, conductivity_factor: float = 1.0) -> float:
    """Set the insulation resistance of every k(T) cell from a march pass's temperatures.

    ``t_heated``: the pipe's outer wall per cell [K]; ``r_out_total``: the pass's whole outside path
    (insulation + film or soil) per cell [K·m/W], which with the surroundings' temperature gives the
    heat through the insulation and so its outer surface temperature. Updates ``line.r_ins`` and, where
    it holds the insulation (a film entered directly, buried), ``line.r_fixed_out``, so the march's next
    pass, the profiles and the heat-path breakdown all see the resistance at these temperatures.

    Returns how far the update moves the insulation's temperature drop at the pass's heat flow [K]: the
    march counts it among its changes, so it does not stop while the conductivities still move (on a
    fast line the bulk and the inner wall hardly notice them).
    """
    step = 0.0
    for g in _groups(line):
        c = g.cells
        t_hot, t_cold = _faces(line, c, t_heated, r_out_total)
        r_new, _ = layer_resistances(g.layers, line.d_pipe_outer[c], t_hot, t_cold, conductivity_factor, g.prefix)
        r_old = line.r_ins[c]
        q_out = (t_hot - t_cold) / r_old
        step = max(step, float(np.max(np.abs(q_out * (r_new - r_old)))))
        fixed = line.r_fixed_out[c]
        held = np.isfinite(fixed) & ~line.film_mask[c]
        line.r_fixed_out[c] = np.where(held, fixed - r_old + r_new, fixed)
        line.r_ins[c] = r_new
    return step


def finish_line(line, t_heated, r_out_total, conductivity_factor: float = 1.0) -> None:
    """After the march converged: each k(T) segment's layers at the solved temperatures.

    Sets each such segment's ``layer_resistances`` (material, K·m/W) to the length-weighted means of its
    layers' resistances at the solved faces (the heat-path breakdown shows these), and refuses a layer
    whose face left its material's use range (:func:`check_use_range`).
    """
    for g in _groups(line):
        c = g.cells
        t_hot, t_cold = _faces(line, c, t_heated, r_out_total)
        _, r_layers = layer_resistances(g.layers, line.d_pipe_outer[c], t_hot, t_cold, conductivity_factor,
                                        g.prefix)
        dx = line.dx[c]
        for seg, part in zip(g.segments, g.local):
            check_use_range(g.layers, r_layers[:, part], t_hot[part], t_cold[part],
                            f"segments[{seg.index}].insulation")
            means = (r_layers[:, part] * dx[part]).sum(axis=1) / dx[part].sum()
            seg.layer_resistances = [(layer.material, float(r)) for layer, r in zip(g.layers, means)]
