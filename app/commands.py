"""Undoable edits of the project: one command class per kind of user edit.

Each command builds the new model object when it is created, with full pydantic validation,
so an invalid value raises :class:`pydantic.ValidationError` *before* anything changes (the
editing widget shows the message in place and nothing is pushed). ``redo``/``undo`` then only
swap stored old and new values through the Document's model methods. Model objects are
treated as immutable values, which keeps undo exact and lets the solve thread read a snapshot.

Dotted paths name fields inside a segment or alternative: ``"length_m"``, ``"pipe.nps"``,
``"surroundings.temperature_K"``, ``"insulation.0.thickness_m"``, ``"feed.inlet_pressure_Pa"``.

Segments: set fields, insert, duplicate, remove, move. Alternatives: add, duplicate, rename,
move, remove, set the baseline. Project fields. New names come from :func:`unique_name`.
"""

from __future__ import annotations

from typing import Any, Mapping, Optional

from pydantic import BaseModel
from PySide6.QtGui import QUndoCommand

from app.texts import unique_name  # the one rule for names the program makes up
from solver.model import Alternative, Project, Segment

# Readable names for the Edit menu ("Undo Set length of 'Rack run'").
FIELD_LABELS = {
    "name": "name",
    "length_m": "length",
    "elevation_change_m": "elevation change",
    "heater": "heater",
    "heater.output_W_per_m": "heater output",
    "heater.output_low_W_per_m": "heater output at the lower rating temperature",
    "heater.temperature_low_K": "heater lower rating temperature",
    "heater.output_high_W_per_m": "heater output at the upper rating temperature",
    "heater.temperature_high_K": "heater upper rating temperature",
    "heater.set_point_K": "thermostat set point",
    "heater.count": "heater runs",
    "heater.heater_per_pipe_length": "heater per metre of pipe",
    "heat_sinks": "heat sinks",
    "design_margin": "design margin",
    "inside_fouling_m2K_per_W": "inside fouling",
    "steam_tracer": "steam tracer",
    "steam_tracer.steam_pressure_Pa": "tracer steam pressure",
    "steam_tracer.count": "number of tracer tubes",
    "steam_tracer.tube_outer_diameter_m": "tracer tube diameter",
    "steam_tracer.contact": "tracer contact",
    "pipe": "pipe",
    "pipe.bore": "bore entry",
    "pipe.nps": "NPS",
    "pipe.schedule": "schedule",
    "pipe.inner_diameter_m": "inner diameter",
    "pipe.wall_thickness_m": "wall thickness",
    "pipe.material": "pipe material",
    "pipe.roughness_m": "roughness",
    "pipe.wall_conductivity_W_per_mK": "wall conductivity",
    "insulation": "insulation",
    "fittings": "fittings",
    "surroundings": "surroundings",
    "fluid": "fluid",
    "fluid.concentration": "concentration",
    "feed.inlet_temperature_K": "inlet temperature",
    "feed.inlet_pressure_Pa": "inlet pressure",
    "feed.mass_flow_kg_per_s": "mass flow",
    "feed.volume_flow_m3_per_s": "volume flow",
    "feed.inlet_flow": "flow at inlet",
    "limits.max_inner_wall_temperature_K": "max inner-wall temperature",
    "limits.min_bulk_temperature_K": "min bulk temperature",
    "limits.maintain_temperature_K": "maintain temperature",
    "description": "description",
}


def field_label(path: str) -> str:
    if path in FIELD_LABELS:
        return FIELD_LABELS[path]
    head = path.split(".")[0]
    if head in ("insulation", "fittings", "surroundings", "heat_sinks"):
        return FIELD_LABELS[head]
    return path.split(".")[-1].replace("_", " ")


def _plain(value: Any) -> Any:
    if isinstance(value, BaseModel):
        return value.model_dump()
    if isinstance(value, list):
        return [_plain(v) for v in value]
    return value


def set_path(data: dict, path: str, value: Any) -> None:
    """Set ``value`` at a dotted path in nested dicts/lists (integers index lists)."""
    parts = path.split(".")
    node: Any = data
    for part in parts[:-1]:
        node = node[int(part)] if isinstance(node, list) else node[part]
    last = parts[-1]
    if isinstance(node, list):
        node[int(last)] = _plain(value)
    else:
        if last not in node and not isinstance(node, dict):
            raise KeyError(path)
        node[last] = _plain(value)


def get_path(obj: Any, path: str) -> Any:
    """Read a dotted path from a model (attributes) or nested dicts/lists."""
    node = obj
    for part in path.split("."):
        if isinstance(node, (list, tuple)):
            node = node[int(part)]
        elif isinstance(node, dict):
            node = node[part]
        else:
            node = getattr(node, part)
    return node


def updated_model(model: BaseModel, changes: Mapping[str, Any]) -> BaseModel:
    """A new, fully validated copy of ``model`` with ``changes`` (dotted path -> value) applied."""
    data = model.model_dump()
    for path, value in changes.items():
        set_path(data, path, value)
    return type(model).model_validate(data)


class _AlternativeSwap(QUndoCommand):
    """Base: swap one alternative for a validated new version; optionally move the selection."""

    def __init__(self, doc, alt_index: int, new_alternative: Alternative, text: str,
                 select_after: Optional[int] = None, select_before: Optional[int] = None):
        super().__init__(text)
        self.doc = doc
        self.alt_index = alt_index
        self.old = doc.project.alternatives[alt_index]
        self.new = new_alternative
        if self.old.name != self.new.name:
            # project-level rules (unique alternative names) checked now, not inside redo()
            alts = list(doc.project.alternatives)
            alts[alt_index] = self.new
            Project.model_validate({**dict(doc.project), "alternatives": alts})
        self.select_before = doc.selected_segment if select_before is None else select_before
        self.select_after = select_after

    def _show_alternative(self) -> None:
        # an undo or redo that changes another alternative shows it, so no change happens out of sight
        if self.alt_index != self.doc.current_index and self.alt_index < len(self.doc.project.alternatives):
            self.doc.set_current_alternative(self.alt_index)

    def redo(self) -> None:
        self._show_alternative()
        self.doc.replace_alternative(self.alt_index, self.new)
        if self.select_after is not None and self.alt_index == self.doc.current_index:
            self.doc.select_segment(self.select_after)

    def undo(self) -> None:
        self._show_alternative()
        self.doc.replace_alternative(self.alt_index, self.old)
        if self.select_after is not None and self.alt_index == self.doc.current_index:
            self.doc.select_segment(self.select_before)


def _with_segments(alt: Alternative, segments: list[Segment]) -> Alternative:
    return Alternative.model_validate({**dict(alt), "segments": segments})


def _segment_name(doc, alt_index: int, seg_index: int) -> str:
    return doc.project.alternatives[alt_index].segments[seg_index].name


class SetSegmentFields(_AlternativeSwap):
    """Change several fields of one segment in one undo step."""

    def __init__(self, doc, alt_index: int, seg_index: int, changes: Mapping[str, Any], text: Optional[str] = None):
        alt = doc.project.alternatives[alt_index]
        seg = alt.segments[seg_index]
        new_seg = updated_model(seg, changes)
        segs = list(alt.segments)
        segs[seg_index] = new_seg
        if text is None:
            names = ", ".join(field_label(p) for p in changes)
            text = f"Set {names} of '{seg.name}'"
        super().__init__(doc, alt_index, _with_segments(alt, segs), text)
        self.seg_index = seg_index


class SetSegmentField(SetSegmentFields):
    """Change one field of one segment, e.g. ``SetSegmentField(doc, 0, 2, "pipe.nps", "3")``."""

    def __init__(self, doc, alt_index: int, seg_index: int, dotted_path: str, value: Any, text: Optional[str] = None):
        super().__init__(doc, alt_index, seg_index, {dotted_path: value}, text)
        self.path = dotted_path
        self.value = value


class SetAlternativeFields(_AlternativeSwap):
    """Change fields of an alternative (fluid, feed, limits, name) in one undo step."""

    def __init__(self, doc, alt_index: int, changes: Mapping[str, Any], text: Optional[str] = None):
        alt = doc.project.alternatives[alt_index]
        new_alt = updated_model(alt, changes)
        if text is None:
            text = "Set " + ", ".join(field_label(p) for p in changes)
        super().__init__(doc, alt_index, new_alt, text)


class SetAlternativeField(SetAlternativeFields):
    def __init__(self, doc, alt_index: int, dotted_path: str, value: Any, text: Optional[str] = None):
        super().__init__(doc, alt_index, {dotted_path: value}, text)


class SetFeedField(SetAlternativeFields):
    """``SetFeedField(doc, 0, "inlet_temperature_K", 353.15)``; ``field`` is a Feed key."""

    def __init__(self, doc, alt_index: int, field: str, value: Any, text: Optional[str] = None):
        super().__init__(doc, alt_index, {f"feed.{field}": value}, text)


class InsertSegment(_AlternativeSwap):
    """Insert ``segment`` at ``position`` (0 = first) and select it."""

    def __init__(self, doc, alt_index: int, position: int, segment: Segment, text: Optional[str] = None):
        alt = doc.project.alternatives[alt_index]
        if not 0 <= position <= len(alt.segments):
            raise IndexError(f"segment position must be 0..{len(alt.segments)}, got {position}")
        segs = list(alt.segments)
        segs.insert(position, Segment.model_validate(segment.model_dump()))
        super().__init__(doc, alt_index, _with_segments(alt, segs), text or f"Insert segment '{segment.name}'",
                         select_after=position)


class DuplicateSegment(InsertSegment):
    """Insert a copy of a segment right after it (downstream) and select the copy."""

    def __init__(self, doc, alt_index: int, index: int):
        alt = doc.project.alternatives[alt_index]
        seg = alt.segments[index]
        copy = seg.model_copy(update={"name": unique_name((s.name for s in alt.segments), f"{seg.name} (copy)")})
        super().__init__(doc, alt_index, index + 1, copy, text=f"Duplicate segment '{seg.name}'")


def continuation_of(segment: Segment, name: str) -> Segment:
    """A new segment that continues ``segment``'s pipe and wall model.

    It keeps what sets the heat path (pipe, heater, steam tracer, inside fouling, insulation,
    surroundings) and the segment's design margin on its tracing, so a segment
    inserted into a traced, insulated run is traced and insulated too and opens no cold gap;
    it starts level, without fittings or heat sinks and at the default length, since those belong
    to the place along the line, not to the wall.
    """
    return Segment(name=name, pipe=segment.pipe, heater=segment.heater, design_margin=segment.design_margin,
                   steam_tracer=segment.steam_tracer, inside_fouling_m2K_per_W=segment.inside_fouling_m2K_per_W,
                   insulation=list(segment.insulation), surroundings=segment.surroundings)


def positional_name(alt: Alternative, position: int) -> str:
    """The name a new segment gets at ``position`` (0 = first): "Segment 3" for the third,
    "Segment 3 (2)" if that is taken. Other segments keep their names."""
    return unique_name((s.name for s in alt.segments), f"Segment {position + 1}")


class InsertContinuation(InsertSegment):
    """Insert, at ``position``, a segment continuing the wall model of segment ``template``."""

    def __init__(self, doc, alt_index: int, position: int, template: int):
        alt = doc.project.alternatives[alt_index]
        self.template = alt.segments[template]
        self.segment = continuation_of(self.template, positional_name(alt, position))
        super().__init__(doc, alt_index, position, self.segment)


class RemoveSegment(_AlternativeSwap):
    """Remove a segment (its fittings, layers and wall model go with it: one step)."""

    def __init__(self, doc, alt_index: int, index: int):
        alt = doc.project.alternatives[alt_index]
        if len(alt.segments) <= 1:
            raise ValueError("a line needs at least one segment; the last segment cannot be deleted")
        segs = list(alt.segments)
        removed = segs.pop(index)
        select = min(index, len(segs) - 1)
        super().__init__(doc, alt_index, _with_segments(alt, segs), f"Delete segment '{removed.name}'",
                         select_after=select, select_before=index)


class MoveSegment(_AlternativeSwap):
    """Move a segment from one place in the flow order to another; the selection follows it."""

    def __init__(self, doc, alt_index: int, from_index: int, to_index: int):
        alt = doc.project.alternatives[alt_index]
        n = len(alt.segments)
        if not (0 <= from_index < n and 0 <= to_index < n):
            raise IndexError(f"segment indices must be 0..{n - 1}, got {from_index} -> {to_index}")
        segs = list(alt.segments)
        seg = segs.pop(from_index)
        segs.insert(to_index, seg)
        super().__init__(doc, alt_index, _with_segments(alt, segs), f"Move segment '{seg.name}'",
                         select_after=to_index, select_before=from_index)


class InsertAlternative(QUndoCommand):
    def __init__(self, doc, position: int, alternative: Alternative):
        super().__init__(f"Add alternative '{alternative.name}'")
        self.doc = doc
        self.old = list(doc.project.alternatives)
        new = list(self.old)
        new.insert(position, alternative)
        Project.model_validate({**dict(doc.project), "alternatives": new})
        self.new = new
        self.position = position

    def redo(self) -> None:
        self.doc.set_alternatives(self.new)

    def undo(self) -> None:
        self.doc.set_alternatives(self.old)


class RemoveAlternative(QUndoCommand):
    def __init__(self, doc, index: int):
        if len(doc.project.alternatives) <= 1:
            raise ValueError("a project needs at least one alternative; the last one cannot be removed")
        name = doc.project.alternatives[index].name
        super().__init__(f"Remove alternative '{name}'")
        self.doc = doc
        self.old = list(doc.project.alternatives)
        self.new = [a for i, a in enumerate(self.old) if i != index]
        data = {**dict(doc.project), "alternatives": self.new}
        if doc.project.baseline == name:
            data["baseline"] = None
        Project.model_validate(data)
        self.old_baseline = doc.project.baseline
        self.new_baseline = data.get("baseline", doc.project.baseline)

    def redo(self) -> None:
        self.doc.project.baseline = None
        self.doc.set_alternatives(self.new)
        self.doc.project.baseline = self.new_baseline

    def undo(self) -> None:
        self.doc.set_alternatives(self.old)
        self.doc.project.baseline = self.old_baseline


class SetProjectField(QUndoCommand):
    """Project-level fields: name, description, prepared_by, revision, targets, baseline."""

    def __init__(self, doc, name: str, value: Any, text: Optional[str] = None):
        super().__init__(text or f"Set project {name.replace('_', ' ')}")
        self.doc = doc
        self.name = name
        self.old = getattr(doc.project, name)
        Project.model_validate({**dict(doc.project), name: value})  # validate before any change
        self.new = value

    def redo(self) -> None:
        self.doc.set_project_field(self.name, self.new)

    def undo(self) -> None:
        self.doc.set_project_field(self.name, self.old)


# --------------------------------------------------------------------------- alternatives
# Each validates the new project state when created (a bad name raises before anything
# changes). Removing an alternative is RemoveAlternative above.


def _names(doc) -> list[str]:
    return [a.name for a in doc.project.alternatives]


class _ProjectAlternativesSwap(QUndoCommand):
    """Base: replace the list of alternatives and the baseline together; keep the
    same alternative current (followed by identity, not by position)."""

    def __init__(self, doc, new_alternatives: list[Alternative], new_baseline: Optional[str], text: str,
                 current_after: Optional[int] = None):
        super().__init__(text)
        self.doc = doc
        self.old = list(doc.project.alternatives)
        self.old_baseline = doc.project.baseline
        self.new = list(new_alternatives)
        self.new_baseline = new_baseline
        Project.model_validate({**dict(doc.project), "alternatives": self.new, "baseline": self.new_baseline})
        self.current_before = doc.current_index
        self.current_after = doc.current_index if current_after is None else current_after

    def _apply(self, alternatives, baseline, current) -> None:
        self.doc.project.baseline = None  # lift the name rule while the list changes
        self.doc.set_alternatives(alternatives)
        self.doc.set_project_field("baseline", baseline)
        if 0 <= current < len(alternatives) and current != self.doc.current_index:
            self.doc.set_current_alternative(current)

    def redo(self) -> None:
        self._apply(self.new, self.new_baseline, self.current_after)

    def undo(self) -> None:
        self._apply(self.old, self.old_baseline, self.current_before)


class AddAlternative(_ProjectAlternativesSwap):
    """Add a blank alternative (one default segment) at the end, or a given one, and make it current."""

    def __init__(self, doc, alternative: Optional[Alternative] = None, position: Optional[int] = None):
        alt = alternative or Alternative(name="New alternative", segments=[Segment()])
        alt = alt.model_copy(update={"name": unique_name(_names(doc), alt.name)})
        alts = list(doc.project.alternatives)
        pos = len(alts) if position is None else max(0, min(position, len(alts)))
        alts.insert(pos, Alternative.model_validate(alt.model_dump()))
        super().__init__(doc, alts, doc.project.baseline, f"Add alternative '{alt.name}'", current_after=pos)


class DuplicateAlternative(AddAlternative):
    """Copy an alternative (default: the current one) right after it, named '<name> (copy)'."""

    def __init__(self, doc, index: Optional[int] = None):
        index = doc.current_index if index is None else index
        src = doc.project.alternatives[index]
        copy = Alternative.model_validate(src.model_dump())
        copy = copy.model_copy(update={"name": unique_name(_names(doc), f"{src.name} (copy)")})
        super().__init__(doc, copy, position=index + 1)
        self.setText(f"Duplicate alternative '{src.name}'")


class RenameAlternative(_ProjectAlternativesSwap):
    """Rename an alternative; the baseline follows the name."""

    def __init__(self, doc, index: int, new_name: str):
        new_name = new_name.strip()
        old = doc.project.alternatives[index]
        if not new_name:
            raise ValueError("An alternative needs a name; the entry is empty.")
        if new_name != old.name and new_name in _names(doc):
            raise ValueError(f"Another alternative is already called '{new_name}'; choose another name.")
        alts = list(doc.project.alternatives)
        alts[index] = old.model_copy(update={"name": new_name})
        baseline = new_name if doc.project.baseline == old.name else doc.project.baseline
        super().__init__(doc, alts, baseline, f"Rename alternative '{old.name}' to '{new_name}'")


class MoveAlternative(_ProjectAlternativesSwap):
    """Move an alternative from one position to another (the current one stays current)."""

    def __init__(self, doc, from_index: int, to_index: int):
        alts = list(doc.project.alternatives)
        n = len(alts)
        if not (0 <= from_index < n and 0 <= to_index < n):
            raise IndexError(f"alternative move {from_index} -> {to_index} out of range 0..{n - 1}")
        current_obj = alts[doc.current_index]
        alt = alts.pop(from_index)
        alts.insert(to_index, alt)
        current_after = next(i for i, a in enumerate(alts) if a is current_obj)
        super().__init__(doc, alts, doc.project.baseline, f"Move alternative '{alt.name}'", current_after=current_after)


class SetBaseline(_ProjectAlternativesSwap):
    """Mark one alternative as the baseline the others are compared against."""

    def __init__(self, doc, index: int):
        name = doc.project.alternatives[index].name
        super().__init__(doc, list(doc.project.alternatives), name, f"Set baseline to '{name}'")
