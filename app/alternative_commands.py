"""Undoable edits of the project's Alternatives: add, duplicate, rename, move, set baseline.

Same style as :mod:`app.commands`: each command validates the new project state
when it is created (so a bad name raises before anything changes), stores old and
new values, and calls only Document methods in ``redo``/``undo``. Removing an
alternative is :class:`app.commands.RemoveAlternative`.
"""

from __future__ import annotations

from typing import Optional

from PySide6.QtGui import QUndoCommand

from app.commands import InsertAlternative, RemoveAlternative  # noqa: F401  (re-exported for the panel)
from solver.model import Alternative, Project, Segment


def unique_name(existing, wanted: str) -> str:
    """``wanted``, or ``wanted (2)``, ``wanted (3)``... whichever is not taken."""
    taken = set(existing)
    if wanted not in taken:
        return wanted
    n = 2
    while f"{wanted} ({n})" in taken:
        n += 1
    return f"{wanted} ({n})"


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
            raise ValueError("name: an alternative needs a name, got an empty entry")
        if new_name != old.name and new_name in _names(doc):
            raise ValueError(f"name: another alternative is already called {new_name!r}")
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
