"""Typical fouling resistances, for the editors' hints (the solver takes whatever value is entered).

A fouling resistance R''_f [m²·K/W] is a thermal resistance per unit area of the surface it coats;
on a pipe it adds R''_f / (π D) [K·m/W] per metre, with D the diameter of that surface (the bore
for the fluid side, the outside diameter for the steam side).

Source: Standards of the Tubular Exchanger Manufacturers Association (TEMA), table of design fouling
resistances (RGP-T-2.4 in the 8th and 9th editions), values in h·ft²·°F/Btu; converted here with
1 h·ft²·°F/Btu = 0.17611 m²·K/W. The values are FROM MEMORY; where the standard gives several by
temperature and velocity, the typical value is shown with the range. The non-oil-bearing steam, fuel
oil and treated boiler feedwater values agree with the TEMA extract in Incropera & DeWitt,
Fundamentals of Heat and Mass Transfer, Table 11.1 (also from memory).
"""

from __future__ import annotations

from typing import NamedTuple

#: 1 h·ft²·°F/Btu in m²·K/W (from the definitions of the foot, the hour, the °F and the Btu_IT): 0.17611.
HFT2F_PER_BTU = 0.3048**2 * 3600.0 / (1055.05585262 * 1.8)


class FoulingHint(NamedTuple):
    """One typical fouling resistance."""

    service: str  #: what the surface is in contact with
    typical_m2K_per_W: float  #: a typical design value
    low_m2K_per_W: float  #: low end of the published values
    high_m2K_per_W: float  #: high end of the published values


def _h(service: str, typical: float, low: float | None = None, high: float | None = None) -> FoulingHint:
    """A hint from TEMA values in h·ft²·°F/Btu."""
    low = typical if low is None else low
    high = typical if high is None else high
    return FoulingHint(service, typical * HFT2F_PER_BTU, low * HFT2F_PER_BTU, high * HFT2F_PER_BTU)


#: Typical fouling resistances (TEMA, from memory; see the module docstring), by service.
TYPICAL_FOULING: tuple[FoulingHint, ...] = (
    _h("Steam, clean (oil-free)", 0.0005),
    _h("Steam, exhaust (oil-bearing)", 0.001, 0.001, 0.002),
    _h("Steam condensate", 0.0005),
    _h("Boiler feedwater, treated", 0.001, 0.0005, 0.001),
    _h("Cooling-tower water, treated", 0.001, 0.001, 0.002),
    _h("City or well water", 0.001, 0.001, 0.002),
    _h("River water", 0.002, 0.001, 0.003),
    _h("Sea water", 0.0005, 0.0005, 0.001),
    _h("Closed-loop treated water (engine jacket)", 0.001),
    _h("Ethylene or propylene glycol solution", 0.002, 0.001, 0.002),
    _h("Light oil: fuel oil no. 2, gas oil", 0.002, 0.002, 0.003),
    _h("Lubricating, hydraulic or transformer oil", 0.001),
    _h("Heavy fuel oil no. 6", 0.005, 0.005, 0.007),
    _h("Crude oil", 0.003, 0.002, 0.006),
    _h("Vegetable oil", 0.003),
    _h("Asphalt and residuum", 0.010),
    _h("Compressed air", 0.001),
    _h("Natural gas", 0.001, 0.001, 0.002),
    _h("Refrigerant liquid", 0.001),
)

FOULING_SOURCE = (
    "Typical values from the TEMA Standards (Tubular Exchanger Manufacturers Association), design fouling "
    "resistances, from memory; converted from h·ft²·°F/Btu"
)


def fouling_hints() -> tuple[FoulingHint, ...]:
    """The typical fouling resistances, lowest first (for a pick list).

    >>> [round(h.typical_m2K_per_W, 6) for h in fouling_hints()[:2]]  # clean steam, TEMA 0.0005 h·ft²·°F/Btu
    [8.8e-05, 8.8e-05]
    """
    return tuple(sorted(TYPICAL_FOULING, key=lambda h: (h.typical_m2K_per_W, h.service)))
