"""The documented errors of the solver. Anything else escaping is a bug."""

from __future__ import annotations


class CalorunError(Exception):
    """Base of every error the solver raises on purpose."""


class ProjectFileError(CalorunError):
    """A project file could not be read or is not a valid project.

    ``problems`` lists every problem as ``(path, message)``, the path written
    like ``alternatives[1].segments[3].length_m``.
    """

    def __init__(self, summary: str, problems: list[tuple[str, str]] | None = None):
        self.summary = summary
        self.problems = list(problems or [])
        lines = [summary] + [f"  {path}: {msg}" if path else f"  {msg}" for path, msg in self.problems]
        super().__init__("\n".join(lines))


class InputError(CalorunError):
    """A value the model accepts but the physics cannot use (e.g. an unknown NPS)."""

    def __init__(self, field: str, value, reason: str):
        self.field = field
        self.value = value
        self.reason = reason
        super().__init__(f"{field}: {reason}, got {value!r}")


class PropertyRangeError(CalorunError):
    """A fluid state outside what the property source covers."""

    def __init__(self, fluid: str, reason: str, temperature_K: float | None = None, pressure_Pa: float | None = None):
        self.fluid = fluid
        self.reason = reason
        self.temperature_K = temperature_K
        self.pressure_Pa = pressure_Pa
        state = []
        if temperature_K is not None:
            state.append(f"T = {temperature_K:.2f} K ({temperature_K - 273.15:.1f} °C)")
        if pressure_Pa is not None:
            state.append(f"p = {pressure_Pa / 1e5:.4g} bar(a)")
        where = f" at {', '.join(state)}" if state else ""
        super().__init__(f"{fluid}: {reason}{where}")


class SolverError(CalorunError):
    """The line could not be solved; the message says where and why in plain words."""

    def __init__(self, message: str, alternative: str | None = None, segment: str | None = None, x_m: float | None = None):
        self.alternative = alternative
        self.segment = segment
        self.x_m = x_m
        where = []
        if alternative is not None:
            where.append(f"alternative {alternative!r}")
        if segment is not None:
            where.append(f"segment {segment!r}")
        if x_m is not None:
            where.append(f"x = {x_m:.2f} m")
        prefix = ", ".join(where)
        super().__init__(f"{prefix}: {message}" if prefix else message)
