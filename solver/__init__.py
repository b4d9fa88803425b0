"""Calorun's engine: the project model and the line solver. Never imports Qt."""

from solver.errors import CalorunError, InputError, ProjectFileError, PropertyRangeError, SolverError
from solver.model import Alternative, Project, Segment

__all__ = [
    "Alternative",
    "CalorunError",
    "InputError",
    "Project",
    "ProjectFileError",
    "PropertyRangeError",
    "Segment",
    "SolverError",
    "solve",
]


def solve(alternative, **options):
    """Solve one alternative; see :func:`solver.march.solve`."""
    from solver.march import solve as _solve

    return _solve(alternative, **options)
