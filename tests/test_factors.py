"""Each method factor acts where it says and in the direction physics says.

The uncertainty bands (solver.uncertainty) move one MethodFactors field at a time; a factor wired
to the wrong quantity, or inverted, would give a band of the right width about the wrong cause.
Directions from the heat path in series (Fourier and Newton's laws, common sense of a reviewer):
a better outer film, a higher emissivity, a more conductive insulation or soil lose more heat; a
better jacket film, condensate film or tracer contact gives more heat; more friction or larger
fittings losses give more pressure drop; a better inside film brings the wall closer to the bulk.
"""

from __future__ import annotations

import pytest

from solver.factors import MethodFactors
from solver.march import solve
from solver.model import (
    Alternative, Buried, Feed, Fitting, FixedWall, Jacket, Layer, Pipe, PureFluid, Segment, SteamTracer, StillAir,
)

NPS2 = Pipe(nps="2", schedule="40")
WOOL = [Layer(material="mineral wool", thickness_m=0.03, conductivity_W_per_mK=0.045)]


def _line(*segments) -> Alternative:
    # invented: hot water through a short run of each kind
    return Alternative(name="Factors", fluid=PureFluid(name="Water"),
                       feed=Feed(inlet_temperature_K=343.15, inlet_pressure_Pa=6e5, mass_flow_kg_per_s=0.5),
                       segments=list(segments))


AIR = _line(Segment(name="Air", length_m=30.0, pipe=NPS2, insulation=WOOL,
                    fittings=[Fitting(kind="elbow_90_standard", count=4)], surroundings=StillAir(temperature_K=283.15)))
SOIL = _line(Segment(name="Soil", length_m=30.0, pipe=NPS2, insulation=WOOL, surroundings=Buried(soil_temperature_K=280.0)))
JACKET = _line(Segment(name="Jacket", length_m=5.0, pipe=NPS2, surroundings=Jacket(medium_temperature_K=393.15,
                                                                                   film_coefficient_W_per_m2K=800.0)))
STEAM = _line(Segment(name="Steam", length_m=5.0, pipe=NPS2,
                      surroundings=FixedWall(wall_temperature_K=None, steam_pressure_Pa=4e5)))
TRACED = _line(Segment(name="Traced", length_m=30.0, pipe=NPS2, insulation=WOOL,
                       steam_tracer=SteamTracer(steam_pressure_Pa=8e5), surroundings=StillAir(temperature_K=283.15)))


@pytest.mark.parametrize("alt, factor, figure, sign", [
    (AIR, "outside_convection", "heat_loss_W", +1),
    (AIR, "emissivity", "heat_loss_W", +1),
    (AIR, "insulation_conductivity", "heat_loss_W", +1),
    (SOIL, "soil_conductivity", "heat_loss_W", +1),
    (JACKET, "jacket_film", "duty_W", +1),
    (STEAM, "condensation", "duty_W", +1),
    (TRACED, "tracer_conductance", "heat_input_tracing_W", +1),
    (AIR, "friction", "pressure_drop_friction_Pa", +1),
    (AIR, "fittings", "pressure_drop_fittings_Pa", +1),
    (JACKET, "inside_film", "duty_W", +1),
])
def test_raising_a_factor_moves_its_figure_the_way_physics_says(alt, factor, figure, sign):
    base = solve(alt).key_figures()[figure]
    up = solve(alt, factors=MethodFactors(**{factor: 1.2})).key_figures()[figure]
    down = solve(alt, factors=MethodFactors(**{factor: 0.8})).key_figures()[figure]
    assert sign * (up - base) > 0 and sign * (base - down) > 0, (down, base, up)
