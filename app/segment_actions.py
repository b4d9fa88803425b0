"""One QAction per segment edit: insert before/after, duplicate, delete, move up-/down-stream.

:class:`SegmentActions` owns the actions; the Edit menu, the Line Strip's toolbar and its
context menu all show these same objects, so an edit does the same thing wherever it is
started and its enabled state follows the selection in one place. Each action pushes one
command (one undo step) from :mod:`app.commands` and says what it did through
:attr:`SegmentActions.message` (the status bar and the strip's hint show it).
"""

from __future__ import annotations

from typing import Optional

from PySide6.QtCore import QObject, Qt, Signal
from PySide6.QtGui import QAction, QKeySequence
from PySide6.QtWidgets import QMenu, QWidget

from app import commands
from app.messages import HEATER_KINDS
from app.units import format_value

_NEED_ONE = "A line needs at least one segment: the only segment cannot be deleted."


def wall_model_words(segment, system: str) -> str:
    """What an inserted segment took over, in words: 'heat input 25 W/m (constant output), insulation 50 mm,
    still air 20 °C' ('steam tracer 2 × 12.7 mm at 4.50 bar(a), ...' for a steam-traced one)."""
    q = segment.heat_input_W_per_m  # the heater's rated output per metre of pipe
    tracer = segment.steam_tracer
    heat = ""
    if segment.heater is not None:
        kind = HEATER_KINDS[segment.heater.kind].split(" (")[0].lower()
        heat = f"heat input {format_value(q, 'power_per_length', system, digits=3)} ({kind})"
    if tracer is not None:
        heat = ", ".join(filter(None, (heat, f"steam tracer {tracer.count} × "
                                             f"{format_value(tracer.tube_outer_diameter_m, 'diameter', system, digits=3)}"
                                             f" at {format_value(tracer.steam_pressure_Pa, 'pressure', system, digits=3)}")))
    heat = heat or "no heat input"
    total = sum(layer.thickness_m for layer in segment.insulation)
    ins = "insulation " + format_value(total, "thickness", system, digits=3) if total > 0 else "no insulation"
    s = segment.surroundings
    if s.kind == "still_air":
        outside = "still air " + format_value(s.temperature_K, "temperature", system)
    elif s.kind == "wind":
        outside = (f"wind {format_value(s.wind_speed_m_per_s, 'speed', system, digits=2)} at "
                   + format_value(s.temperature_K, "temperature", system))
    elif s.kind == "buried":
        outside = "buried, soil " + format_value(s.soil_temperature_K, "temperature", system)
    elif s.kind == "jacket":
        outside = "jacket " + format_value(s.medium_temperature_K, "temperature", system)
    elif s.kind == "fixed_wall":
        outside = ("wall held at " + format_value(s.wall_temperature_K, "temperature", system)
                   if s.wall_temperature_K is not None
                   else "steam at " + format_value(s.steam_pressure_Pa, "pressure", system, digits=3))
    else:
        outside = "adiabatic"
    return ", ".join((heat, ins, outside))


class SegmentActions(QObject):
    """The segment edits of the current alternative, as shared QActions.

    ``SegmentActions(doc, parent)``; attach the actions to a widget with :meth:`attach_to`
    (their shortcuts work while the keyboard focus is inside that widget, so Delete in a text
    box never deletes a segment) and list them in a menu with :meth:`fill_menu`.
    """

    #: what an edit did or why it was not done, in the user's words
    message = Signal(str)

    def __init__(self, doc, parent: Optional[QObject] = None):
        super().__init__(parent)
        self.doc = doc
        self.insert_before = self._action(
            "Insert segment &before selected", "Insert before", self.insert_before_selected, QKeySequence("Shift+Insert"),
            "Insert a segment before the selected one, with its pipe and wall model (Shift+Insert)")
        self.insert_after = self._action(
            "&Insert segment after selected", "Insert after", self.insert_after_selected, QKeySequence(Qt.Key_Insert),
            "Insert a segment after the selected one, with its pipe and wall model (Insert)")
        self.duplicate = self._action(
            "D&uplicate segment", "Duplicate", self.duplicate_selected, QKeySequence("Ctrl+D"),
            "Duplicate the selected segment, fittings and all (Ctrl+D)")
        self.delete = self._action(
            "&Delete segment", "Delete", self.delete_selected, QKeySequence(Qt.Key_Delete),
            "Delete the selected segment (Delete)")
        self.move_up = self._action(
            "Move segment u&p-stream", "◀ Move up-stream", lambda: self.move_selected(-1), QKeySequence("Ctrl+Left"),
            "Move the selected segment one place towards the inlet (Ctrl+Left)")
        self.move_down = self._action(
            "Move segment d&own-stream", "Move down-stream ▶", lambda: self.move_selected(1), QKeySequence("Ctrl+Right"),
            "Move the selected segment one place towards the outlet (Ctrl+Right)")

        for sig in (doc.project_replaced, doc.project_changed):
            sig.connect(self.update_enabled)
        doc.selection_changed.connect(self.update_enabled)
        doc.current_alternative_changed.connect(self.update_enabled)
        self.update_enabled()

    # ------------------------------------------------------------------ building

    def _action(self, text: str, short: str, slot, shortcut: QKeySequence, tip: str) -> QAction:
        a = QAction(text, self)
        a.setIconText(short)  # what a text-only toolbar button shows
        a.setShortcut(shortcut)
        a.setShortcutContext(Qt.WidgetWithChildrenShortcut)
        a.setToolTip(tip)
        a.setStatusTip(tip)
        a.triggered.connect(lambda _checked=False: slot())
        return a

    def actions(self) -> list[QAction]:
        return [self.insert_before, self.insert_after, self.duplicate, self.delete, self.move_up, self.move_down]

    def attach_to(self, widget: QWidget) -> None:
        """Make the shortcuts work while the focus is in ``widget`` (or a child of it)."""
        widget.addActions(self.actions())

    def fill_menu(self, menu: QMenu) -> QMenu:
        menu.addActions([self.insert_before, self.insert_after, self.duplicate, self.delete])
        menu.addSeparator()
        menu.addActions([self.move_up, self.move_down])
        return menu

    # ------------------------------------------------------------------ state

    def _segments(self):
        return self.doc.current_alternative.segments

    def _selected(self) -> int:
        sel = self.doc.selected_segment
        return sel if 0 <= sel < len(self._segments()) else -1

    def update_enabled(self, *_args) -> None:
        n = len(self._segments())
        sel = self._selected()
        has = sel >= 0
        self.duplicate.setEnabled(has)
        self.delete.setEnabled(has and n > 1)
        tip = _NEED_ONE if n <= 1 else ("Select a segment to delete it." if not has
                                        else "Delete the selected segment (Delete)")
        self.delete.setToolTip(tip)
        self.delete.setStatusTip(tip)
        self.move_up.setEnabled(has and sel > 0)
        self.move_down.setEnabled(has and sel < n - 1)

    def say(self, text: str) -> None:
        self.message.emit(text)

    # ------------------------------------------------------------------ the edits

    def insert_before_selected(self) -> bool:
        sel = self._selected()
        return self._insert(0 if sel < 0 else sel, 0 if sel < 0 else sel)

    def insert_after_selected(self) -> bool:
        n = len(self._segments())
        sel = self._selected()
        template = n - 1 if sel < 0 else sel
        return self._insert(template + 1, template)

    def _insert(self, position: int, template: int) -> bool:
        cmd = commands.InsertContinuation(self.doc, self.doc.current_index, position, template)
        self.doc.push(cmd)
        self.say(f"Inserted {cmd.segment.name} with the wall model of {cmd.template.name} "
                 f"({wall_model_words(cmd.template, self.doc.unit_system)})")
        return True

    def duplicate_selected(self) -> bool:
        sel = self._selected()
        if sel < 0:
            self.say("Select a segment to duplicate it.")
            return False
        self.doc.push(commands.DuplicateSegment(self.doc, self.doc.current_index, sel))
        self.say(f"Duplicated {self._segments()[sel].name} as {self._segments()[sel + 1].name}")
        return True

    def delete_selected(self) -> bool:
        segs = self._segments()
        sel = self._selected()
        if len(segs) <= 1:
            self.say(_NEED_ONE)
            return False
        if sel < 0:
            self.say("Select a segment to delete it.")
            return False
        name = segs[sel].name
        self.doc.push(commands.RemoveSegment(self.doc, self.doc.current_index, sel))
        self.say(f"Deleted {name} (Undo brings it back)")
        return True

    def move_selected(self, step: int) -> bool:
        sel = self._selected()
        return sel >= 0 and self.move(sel, sel + step)

    def move(self, src: int, dst: int) -> bool:
        """Move segment ``src`` so that it ends at index ``dst`` (one undo step; the selection follows)."""
        n = len(self._segments())
        if src == dst or not (0 <= src < n and 0 <= dst < n):
            return False
        name = self._segments()[src].name
        self.doc.push(commands.MoveSegment(self.doc, self.doc.current_index, src, dst))
        self.say(f"Moved {name} to place {dst + 1} of {n}")
        return True
