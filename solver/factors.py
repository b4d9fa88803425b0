"""Multipliers on the methods' results, one per source of uncertainty.

A solve normally uses every method as published (all factors 1.0). The uncertainty bands
(:mod:`solver.uncertainty`) re-solve a line with one factor moved to the edge of its method's
published accuracy at a time; the factors say where each one acts.
"""

from __future__ import annotations

from dataclasses import dataclass, fields


@dataclass(frozen=True)
class MethodFactors:
    """Each field multiplies one quantity of the solve (1.0 = as published)."""

    inside_film: float = 1.0  # inside film coefficient (laminar, transition, Gnielinski)
    friction: float = 1.0  # Darcy friction factor
    fittings: float = 1.0  # fittings loss coefficients
    outside_convection: float = 1.0  # natural and forced convection in air
    emissivity: float = 1.0  # surface emissivity (capped at 1)
    insulation_conductivity: float = 1.0  # conductivity of every insulation layer
    soil_conductivity: float = 1.0  # soil around buried pipes
    jacket_film: float = 1.0  # film coefficient of a jacket medium as entered
    condensation: float = 1.0  # condensing-steam film coefficient
    tracer_conductance: float = 1.0  # steam tracer contact conductance

    @classmethod
    def names(cls) -> tuple[str, ...]:
        return tuple(f.name for f in fields(cls))

    def is_neutral(self) -> bool:
        return all(getattr(self, name) == 1.0 for name in self.names())


NEUTRAL = MethodFactors()
