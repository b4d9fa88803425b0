"""Uncertainty bands: how far the results can move within the methods' published accuracy.

Every method the solver uses was fitted to measurements, or rests on a property the user can
only estimate, and its source says how closely it holds (:data:`METHOD_ACCURACY`). A band here
answers: *if each method were off by its stated accuracy, how far would the bulk, inner-wall and
outer-surface temperatures and the key figures move?*

How (perturb and re-solve):

- Only the methods the line uses are perturbed (:func:`factors_used`): a line without a jacket
  makes no jacket-film solve, one without insulation no insulation solve.
- For each, the line is solved twice, with that method's result multiplied by (1 + a) and by
  (1 − a), every other method as published (:class:`solver.factors.MethodFactors`). Its
  contribution at each node is the larger |deviation| of the two solves from the base result;
  the same cells give the same nodes, so the profiles compare node by node.
- The methods' errors are taken as independent, so contributions combine by root-sum-square,
  node by node and figure by figure. The band is symmetric: base ± combined deviation.
- Surface emissivity is uncertain by an absolute amount (±0.05, common practice), not a
  fraction: the line's factor is 0.05 / (lowest emissivity it uses), so a low-emissivity
  cladding gets the wide relative range it has; where a line mixes emissivities the others are
  then moved by more than ±0.05 (a wider, safe-side band).
- A perturbed solve that fails is named in the Bands (``failed``) and left out; the band then
  covers the methods that did solve, and says so.

What a band is not: it covers the methods' accuracy only — not errors in the inputs (flow,
temperatures, dimensions, heat input), nor the model's assumptions (``solver.results.ASSUMPTIONS``).
Accuracies marked "from memory" were recalled without the source at hand; "common practice"
marks a range of the trade with no single source.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass, field
from typing import Callable, Mapping, Optional

import numpy as np

from solver.errors import CalorunError
from solver.factors import MethodFactors
from solver.model import Adiabatic, Alternative, Buried, FixedWall, Jacket, StillAir, Wind
from solver.results import KEY_FIGURES, Result

#: What a band does not cover; the last line of every ``Bands.basis``.
BANDS_CAUTION = ("The bands cover the methods' accuracy only, not errors in the inputs (flows, temperatures, "
                 "dimensions, heat input) nor the model's assumptions.")

#: The profile quantities a band is given for (attributes of :class:`solver.results.Profile`).
BAND_QUANTITIES: tuple[str, ...] = (
    "bulk_temperature_K",
    "inner_wall_temperature_K",
    "outer_surface_temperature_K",
)


@dataclass(frozen=True)
class Accuracy:
    """The published accuracy of one method: ± ``plus_minus`` as a fraction of its result
    (``absolute=True``: ± that amount of the quantity itself, e.g. emissivity ±0.05)."""

    label: str  # the quantity the method gives, in plain words
    plus_minus: float
    source: str  # where the figure comes from; "from memory" / "common practice" where so
    absolute: bool = False

    def __post_init__(self):
        if not (math.isfinite(self.plus_minus) and self.plus_minus >= 0.0):
            raise ValueError(f"accuracy of {self.label}: ± must be 0 or more, got {self.plus_minus!r}")
        if not self.absolute and self.plus_minus >= 1.0:
            raise ValueError(f"accuracy of {self.label}: a relative ± must be below 1 (100 %), got {self.plus_minus!r}")

    def text(self) -> str:
        """``'±20 %'`` or ``'±0.05'``."""
        return f"±{self.plus_minus:g}" if self.absolute else f"±{self.plus_minus * 100:g} %"


#: The accuracy of each method, one entry per :class:`~solver.factors.MethodFactors` field.
METHOD_ACCURACY: dict[str, Accuracy] = {
    "inside_film": Accuracy(
        "Inside film coefficient", 0.20,
        "Gnielinski (1976), Int. Chem. Eng. 16, 359-368: most of the data within ±20 % (from memory); "
        "the laminar, entry and transition methods are taken at the same ±"),
    "friction": Accuracy(
        "Friction factor", 0.15,
        "Colebrook-White / Moody chart: ±15 % for design use, as quoted in F.M. White, Fluid Mechanics (from memory)"),
    "fittings": Accuracy(
        "Fittings loss coefficients", 0.10,
        "Darby 3-K method: within about ±10 % over the range of Reynolds numbers and sizes, "
        "R. Darby, Chem. Eng. 106(7), 1999 (from memory); 2-K and entered K taken at the same ±"),
    "outside_convection": Accuracy(
        "Convection in air", 0.20,
        "Churchill & Chu (1975) natural convection on a horizontal cylinder and Churchill & Bernstein (1977) "
        "cross-flow: data scatter about ±20 % around both (from memory); Churchill & Bernstein call theirs "
        "a lower bound (free-stream turbulence raises the rate)"),
    "emissivity": Accuracy(
        "Surface emissivity", 0.05,
        "common practice: a surface's emissivity is known to about ±0.05 (weathering, dirt, paint)",
        absolute=True),
    "insulation_conductivity": Accuracy(
        "Insulation conductivity", 0.10,
        "common practice: declared values ±10 %; workmanship, ageing and moisture can add more"),
    "soil_conductivity": Accuracy(
        "Soil conductivity", 0.25,
        "common practice: moisture moves soil conductivity by a factor of two; a chosen value ±25 %"),
    "jacket_film": Accuracy(
        "Jacket film coefficient (as entered)", 0.20,
        "common practice: a film coefficient taken from a correlation or vendor data, ±20 %"),
    "condensation": Accuracy(
        "Condensing-steam film", 0.15,
        "Nusselt (1916) film condensation on a horizontal tube: measurements within about ±15 % (from memory)"),
    "tracer_conductance": Accuracy(
        "Steam tracer contact conductance", 0.30,
        "common practice: the contact of a tracer on the pipe depends on how it is fixed; ±30 % (from memory)"),
}

#: the largest fraction an absolute ± (emissivity) may move a method's result by (down to zero)
_MAX_RELATIVE = 1.0


def factors_used(alternative: Alternative) -> tuple[str, ...]:
    """The :class:`MethodFactors` fields whose method this line uses, in the fields' order.

    Inside film: any segment that exchanges heat. Friction: always. Fittings: any segment with
    fittings. Convection in air and emissivity: a segment in air whose outer film is computed (an
    entered film coefficient is used as given). Insulation: insulation layers on a segment where
    they play a part (not under a jacket or a fixed wall). Soil: buried segments. Jacket film,
    condensation (steam on the pipe) and tracer conductance: where there is one.
    """
    used = {"friction"}
    for s in alternative.segments:
        sur = s.surroundings
        if s.heat_input_W_per_m > 0 or s.steam_tracer is not None or not isinstance(sur, Adiabatic):
            used.add("inside_film")
        if any(f.kind != "custom" or (f.K or 0.0) > 0 for f in s.fittings):
            used.add("fittings")
        if isinstance(sur, (StillAir, Wind)) and sur.film_coefficient_W_per_m2K is None:
            used.add("outside_convection")
            if sur.emissivity > 0:
                used.add("emissivity")
        if s.insulation and not isinstance(sur, (Jacket, FixedWall, Adiabatic)):
            used.add("insulation_conductivity")
        if isinstance(sur, Buried):
            used.add("soil_conductivity")
        if isinstance(sur, Jacket):
            used.add("jacket_film")
        if isinstance(sur, FixedWall) and sur.steam_pressure_Pa is not None:
            used.add("condensation")
        if s.steam_tracer is not None:
            used.add("tracer_conductance")
    return tuple(name for name in MethodFactors.names() if name in used)


def relative_range(name: str, accuracy: Accuracy, alternative: Alternative) -> float:
    """The fraction a method's result is moved by for this line (see the module notes on emissivity)."""
    if not accuracy.absolute:
        return accuracy.plus_minus
    if name != "emissivity":
        raise ValueError(f"accuracy of {accuracy.label}: an absolute ± is defined for emissivity only")
    emissivities = [s.surroundings.emissivity for s in alternative.segments
                    if isinstance(s.surroundings, (StillAir, Wind)) and s.surroundings.film_coefficient_W_per_m2K is None
                    and s.surroundings.emissivity > 0]
    if not emissivities or accuracy.plus_minus == 0.0:
        return 0.0
    return min(accuracy.plus_minus / min(emissivities), _MAX_RELATIVE)


def band_plan(alternative: Alternative, accuracy: Mapping[str, Accuracy] = METHOD_ACCURACY) -> list[tuple[str, float]]:
    """The perturbed solves a band needs: ``[(factor name, multiplier), ...]``, two per method used
    with a non-zero range (none at all when every accuracy is zero)."""
    plan = []
    for name in factors_used(alternative):
        acc = accuracy.get(name)
        if acc is None:
            continue
        a = relative_range(name, acc, alternative)
        if a > 0.0:
            plan += [(name, 1.0 + a), (name, max(1.0 - a, 0.0))]
    return plan


@dataclass(frozen=True)
class Contribution:
    """What one method's accuracy does to the results: ± per node and per key figure (SI)."""

    name: str  # the MethodFactors field
    label: str
    accuracy_text: str  # "±20 %", or for emissivity "±0.05 (×0.94–1.06 on this line)"
    relative_range: float  # the fraction the method's result was moved by
    source: str
    profile_pm: dict[str, np.ndarray]  # BAND_QUANTITIES key -> ± per node [K]
    key_figure_pm: dict[str, float]
    failed: str = ""  # why a perturbed solve failed ("" when both solved)

    def largest_pm(self, key: str = "bulk_temperature_K") -> float:
        """The largest ± along the line of a profile quantity [K] (0 when none)."""
        values = self.profile_pm.get(key)
        if values is None or not np.isfinite(values).any():
            return 0.0
        return float(np.nanmax(values))


@dataclass(frozen=True)
class Bands:
    """Uncertainty bands of one solved alternative (SI).

    ``lower``/``upper``/``plus_minus``: per :data:`BAND_QUANTITIES` key, an array over the
    profile's nodes (NaN where the quantity has no value, e.g. no surface in air).
    ``key_figure_pm``: ± of every key figure with a value (the energy-balance residual, a
    round-off check, has none). ``contributions``: per method, largest first by the outlet
    temperature. ``failed``: factor text -> message, for perturbed solves that did not solve.
    ``basis``: plain lines saying what the band covers, for the report and tooltips.
    """

    name: str
    x_m: np.ndarray
    lower: dict[str, np.ndarray]
    upper: dict[str, np.ndarray]
    plus_minus: dict[str, np.ndarray]
    key_figure_pm: dict[str, float]
    contributions: tuple[Contribution, ...]
    failed: dict[str, str]
    basis: tuple[str, ...]
    solves: int = 0
    seconds: float = 0.0
    base: Optional[Result] = field(default=None, repr=False, compare=False)  # the result the band is around

    @property
    def width_K(self) -> float:
        """The largest full width (upper − lower) of any band along the line [K]."""
        widths = [np.nanmax(self.upper[k] - self.lower[k]) for k in BAND_QUANTITIES
                  if np.isfinite(self.upper[k] - self.lower[k]).any()]
        return float(max(widths)) if widths else 0.0

    def ranked(self, key: str = "outlet_temperature_K") -> list[tuple[Contribution, float]]:
        """The contributions with their ± of key figure ``key``, largest first."""
        out = [(c, c.key_figure_pm.get(key, 0.0)) for c in self.contributions]
        return sorted(out, key=lambda e: -e[1])

    def to_dict(self, include_profile: bool = True) -> dict:
        """JSON form (SI; NaN written as null)."""
        out: dict = {
            "method": "perturb and re-solve; per method the larger deviation of its ± solves; "
                      "methods combined by root-sum-square (independent)",
            "key_figure_plus_minus": {k: _clean(v) for k, v in self.key_figure_pm.items()},
            "contributions": [
                {"factor": c.name, "label": c.label, "accuracy": c.accuracy_text, "relative_range": c.relative_range,
                 "source": c.source, "key_figure_plus_minus": {k: _clean(v) for k, v in c.key_figure_pm.items()},
                 **({"failed": c.failed} if c.failed else {})}
                for c in self.contributions
            ],
            "failed": dict(self.failed),
            "basis": list(self.basis),
            "solves": self.solves,
        }
        if include_profile:
            out["profile"] = {"x_m": [float(v) for v in self.x_m]}
            for k in BAND_QUANTITIES:
                out["profile"][k.replace("_K", "_lower_K")] = [_clean(v) for v in self.lower[k]]
                out["profile"][k.replace("_K", "_upper_K")] = [_clean(v) for v in self.upper[k]]
        return out


def _clean(v) -> Optional[float]:
    v = float(v)
    return v if math.isfinite(v) else None


#: The key figures a band gives ± for: every one but the energy-balance residual (round-off).
PM_KEYS: tuple[str, ...] = tuple(f.key for f in KEY_FIGURES if f.key != "energy_balance_residual_W")


def run_plan(alternative: Alternative, plan, solve_fn: Optional[Callable] = None,
             cancelled: Optional[Callable[[], bool]] = None) -> Optional[dict]:
    """Solve each planned perturbation: ``{(name, multiplier): Result or error message}``.

    ``cancelled()`` is asked before each solve; when it says yes, None is returned (the band is no
    longer wanted). A :class:`~solver.errors.CalorunError` becomes its message.
    """
    if solve_fn is None:
        from solver.march import solve as solve_fn
    outcomes: dict = {}
    for name, mult in plan:
        if cancelled is not None and cancelled():
            return None
        try:
            outcomes[(name, mult)] = solve_fn(alternative, factors=MethodFactors(**{name: mult}))
        except CalorunError as exc:
            outcomes[(name, mult)] = str(exc)
    return outcomes


def combine(alternative: Alternative, base: Result, outcomes: Mapping, accuracy: Mapping[str, Accuracy] = METHOD_ACCURACY,
            seconds: float = 0.0) -> Bands:
    """The bands from the base result and the perturbed solves of :func:`run_plan`."""
    base_profile = base.profile
    x = np.asarray(base_profile.x_m, dtype=float)
    base_values = {k: np.asarray(getattr(base_profile, k), dtype=float) for k in BAND_QUANTITIES}
    base_figures = base.key_figures()
    pm_keys = [k for k in PM_KEYS if _finite(base_figures.get(k))]
    by_name: dict[str, list] = {}
    for (name, mult), outcome in outcomes.items():
        by_name.setdefault(name, []).append((mult, outcome))

    contributions = []
    failed: dict[str, str] = {}
    for name in MethodFactors.names():
        runs = by_name.get(name)
        if not runs:
            continue
        acc = accuracy[name]
        a = relative_range(name, acc, alternative)
        profile_pm = {k: np.zeros_like(x) for k in BAND_QUANTITIES}
        figure_pm = {k: 0.0 for k in pm_keys}
        problems = []
        solved = 0
        for mult, outcome in sorted(runs, key=lambda r: -r[0]):
            if not isinstance(outcome, Result):
                text = f"{acc.label} ×{mult:.3g}"
                failed[text] = str(outcome)
                problems.append(f"×{mult:.3g} did not solve ({outcome})")
                continue
            other_x = np.asarray(outcome.profile.x_m, dtype=float)
            if other_x.shape != x.shape or not np.array_equal(other_x, x):
                # the cells come from the geometry alone, so a perturbed solve lies on the same nodes
                raise AssertionError(f"perturbed solve ({name} ×{mult:g}) of {alternative.name!r} has other nodes "
                                     f"({other_x.size} vs {x.size}); bands compare node by node")
            solved += 1
            for k in BAND_QUANTITIES:
                dev = np.abs(np.asarray(getattr(outcome.profile, k), dtype=float) - base_values[k])
                profile_pm[k] = np.fmax(profile_pm[k], dev)
            figures = outcome.key_figures()
            for k in pm_keys:
                v = figures.get(k)
                if _finite(v):
                    figure_pm[k] = max(figure_pm[k], abs(v - base_figures[k]))
        if solved == 0:
            continue
        for k in BAND_QUANTITIES:
            profile_pm[k] = np.where(np.isfinite(base_values[k]), profile_pm[k], np.nan)
        text = acc.text() if not acc.absolute else f"{acc.text()} (×{1 - min(a, 1):.3g}–{1 + a:.3g} on this line)"
        contributions.append(Contribution(name, acc.label, text, a, acc.source, profile_pm, figure_pm,
                                          "; ".join(problems)))

    # independent sources: root-sum-square, node by node and figure by figure
    plus_minus = {}
    for k in BAND_QUANTITIES:
        total = np.zeros_like(x)
        for c in contributions:
            total = total + np.nan_to_num(c.profile_pm[k], nan=0.0) ** 2
        plus_minus[k] = np.where(np.isfinite(base_values[k]), np.sqrt(total), np.nan)
    key_figure_pm = {k: math.sqrt(sum(c.key_figure_pm.get(k, 0.0) ** 2 for c in contributions)) for k in pm_keys}
    contributions.sort(key=lambda c: -c.key_figure_pm.get("outlet_temperature_K", 0.0))
    return Bands(
        name=alternative.name, x_m=x,
        lower={k: base_values[k] - plus_minus[k] for k in BAND_QUANTITIES},
        upper={k: base_values[k] + plus_minus[k] for k in BAND_QUANTITIES},
        plus_minus=plus_minus, key_figure_pm=key_figure_pm, contributions=tuple(contributions), failed=failed,
        basis=basis_lines(contributions, failed), solves=len(outcomes), seconds=seconds, base=base,
    )


def basis_lines(contributions, failed: Mapping[str, str]) -> tuple[str, ...]:
    """What the band covers, in plain lines (the report and the CLI print them)."""
    lines = [
        "Bands show how far the results move if each method is off by its published accuracy: each method "
        "the line uses is re-solved at the edges of its range, the larger deviation taken, and the methods "
        "combined by root-sum-square (their errors taken as independent).",
    ]
    if contributions:
        lines.append("Methods varied: " + "; ".join(f"{c.label} {c.accuracy_text}" for c in contributions) + ".")
    else:
        lines.append("No method was varied (every accuracy is zero, or none applies): the band has no width.")
    for text, message in failed.items():
        lines.append(f"Left out: {text} did not solve ({message}).")
    lines.append(BANDS_CAUTION)
    return tuple(lines)


def line_bands(alternative: Alternative, base_result: Result, accuracy: Mapping[str, Accuracy] = METHOD_ACCURACY,
               solve_fn: Optional[Callable] = None) -> Bands:
    """Bands of ``alternative`` around its solved ``base_result``; see the module notes.

    ``solve_fn(alternative, factors=MethodFactors)`` defaults to :func:`solver.march.solve`.
    Never raises for a perturbed solve that fails (it is named in ``Bands.failed``).
    """
    t0 = time.perf_counter()
    plan = band_plan(alternative, accuracy)
    outcomes = run_plan(alternative, plan, solve_fn) or {}
    return combine(alternative, base_result, outcomes, accuracy, seconds=time.perf_counter() - t0)


def _finite(v) -> bool:
    return v is not None and isinstance(v, (int, float)) and math.isfinite(v)
