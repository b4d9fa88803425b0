"""The one edit/refuse path of the editor panels (Segment Card and its sections, Feed).

Every entry a user makes goes the same way: if it changes nothing, nothing happens (no undo
step); otherwise a command is built, which validates the whole new model object; if the model
accepts it, the command is pushed (one undo step), and if not, the refusal is shown where the
entry was made, in the user's words and units, and nothing changes. Only the errors a refusal
raises are caught (:data:`REFUSALS`); anything else is a bug and surfaces.

:class:`EditorPanel` is the base of the panels that edit through this path: it keeps their
:class:`QuantityEdit` boxes in the unit system, commits typed text before the selection or the
units change, and shows refusals. The small layout helpers :func:`section` and :func:`hint`
give the panels one look.
"""

from __future__ import annotations

from typing import Any, Callable, Mapping, Optional

from pydantic import ValidationError
from PySide6.QtCore import Qt, QTimer, Signal
from PySide6.QtGui import QUndoCommand
from PySide6.QtWidgets import QComboBox, QFormLayout, QGroupBox, QLabel, QWidget

from app import commands, messages, units
from app.widgets.quantity_edit import ERROR_COLOUR, QuantityEdit
from solver.errors import CalorunError, InputError

#: what a refused entry raises: the model's validation, a value the solver's catalogue does not
#: know, a text that is not a quantity. Anything else is a bug and is not caught.
REFUSALS = (ValidationError, CalorunError, units.UnitParseError)

HINT_STYLE = "color: #5B6770; font-size: 8.5pt;"


def section_form(box: QGroupBox) -> QFormLayout:
    """The form layout of a section: labels right-aligned, fields growing."""
    form = QFormLayout(box)
    form.setLabelAlignment(Qt.AlignRight | Qt.AlignVCenter)
    form.setFieldGrowthPolicy(QFormLayout.AllNonFixedFieldsGrow)
    form.setHorizontalSpacing(8)
    form.setVerticalSpacing(5)
    form.setContentsMargins(8, 6, 8, 8)
    return form


def section(title: str) -> tuple[QGroupBox, QFormLayout]:
    """A titled group with a section form."""
    box = QGroupBox(title)
    return box, section_form(box)


def hint(text: str) -> QLabel:
    """A small grey explanatory line (wraps)."""
    lab = QLabel(text)
    lab.setWordWrap(True)
    lab.setStyleSheet(HINT_STYLE)
    return lab


def error_hint() -> QLabel:
    """A hidden line for refusals that belong to a group rather than one box."""
    lab = hint("")
    lab.setStyleSheet(f"color: {ERROR_COLOUR};")
    lab.hide()
    return lab


def set_combo_data(combo: QComboBox, data: Any, add_missing: bool = False) -> None:
    """Select the entry holding ``data`` without emitting; add it when asked and missing."""
    combo.blockSignals(True)
    i = combo.findData(data)
    if i < 0 and add_missing:
        combo.addItem(str(data), data)
        i = combo.count() - 1
    if i < 0 and combo.isEditable():
        combo.setEditText(str(data))
    elif i >= 0:
        combo.setCurrentIndex(i)
    combo.blockSignals(False)


def refusal_text(exc: Exception, system: str, prefix: str = "") -> str:
    """A refusal in the user's words: the field's label, the display unit, the value entered."""
    if isinstance(exc, ValidationError):
        return messages.validation_message(exc, system, prefix=prefix)
    if isinstance(exc, InputError):  # e.g. a schedule the tables do not hold for this size
        return f"{messages.field_label(exc.field)}: {exc.reason}; you entered {exc.value}"
    return str(exc)  # units.UnitParseError and the other solver errors are written for the user


def unchanged(model: Any, changes: Mapping[str, Any]) -> bool:
    """True when every dotted path of ``changes`` already holds its value in ``model``."""
    try:
        return all(commands.get_path(model, path) == value for path, value in changes.items())
    except (AttributeError, IndexError, KeyError):
        return False  # a new list entry: it is a change


def push_edit(doc, make_command: Callable[[], QUndoCommand], on_refused: Callable[[str], None],
              *, model: Any = None, changes: Optional[Mapping[str, Any]] = None, prefix: str = "") -> bool:
    """Build the command and push it, or say why the model refuses; returns whether the model now
    holds the entry. With ``model`` and ``changes``, an entry that changes nothing pushes nothing."""
    if model is not None and changes is not None and unchanged(model, changes):
        return True
    try:
        command = make_command()
    except REFUSALS as exc:
        on_refused(refusal_text(exc, doc.unit_system, prefix))
        return False
    doc.push(command)
    return True


class EditorPanel(QWidget):
    """Base of a panel whose entries go through :func:`push_edit`.

    Subclasses implement :meth:`set_fields` (which command an entry makes) and
    :meth:`refresh`; they create their boxes with :meth:`quantity_edit` and set
    ``self.panel_error`` to the label for refusals of combo boxes and buttons.
    """

    #: emitted with the message when an edit is refused (the status bar and tests listen)
    edit_refused = Signal(str)

    def __init__(self, doc, parent: Optional[QWidget] = None):
        super().__init__(parent)
        self.doc = doc
        self.loading = False  # True while widgets are filled from the model: they emit no edits
        self._qedits: list[QuantityEdit] = []
        self.panel_error: Optional[QLabel] = None

    # ------------------------------------------------------------------ boxes

    def quantity_edit(self, quantity: str, label: str, path: Optional[str] = None,
                      error_label: Optional[QLabel] = None, **kw) -> QuantityEdit:
        """A box for one quantity, named by its ``label`` in messages; commits ``{path: value}``."""
        edit = QuantityEdit(quantity, self.doc.unit_system, label, **kw)
        self._qedits.append(edit)
        if path is not None:
            edit.value_committed.connect(
                lambda v, p=path, e=edit: self.set_fields({p: v}, source=e, error_label=error_label))
        return edit

    def forget_dead_edits(self) -> None:
        """Drop boxes Qt has deleted (table rows rebuilt)."""
        import shiboken6

        self._qedits = [e for e in self._qedits if shiboken6.isValid(e)]

    def commit_pending(self) -> None:
        """Commit text typed but not yet committed (a selection or unit change may not take focus)."""
        for e in list(self._qedits):
            if e.isVisibleTo(self) and e.pending:
                e.commit()

    def reset_edits(self) -> None:
        """Drop refusal marks: they belong to what they were typed for."""
        for e in self._qedits:
            e.reset()

    def set_unit_system(self, system: str) -> None:
        self.commit_pending()  # read typed text in the units it was typed in, before they change
        for e in self._qedits:
            e.set_unit_system(system)

    # ------------------------------------------------------------------ edits

    def set_fields(self, changes: dict, source: Optional[QuantityEdit] = None, text: Optional[str] = None,
                   error_label: Optional[QLabel] = None) -> bool:  # pragma: no cover - abstract
        raise NotImplementedError

    def refuse(self, message: str, source: Optional[QuantityEdit] = None,
               error_label: Optional[QLabel] = None) -> None:
        """Show a refusal where the entry was made: in the box, the group's line or the panel's line."""
        if source is not None:
            source.show_error(message)
        label = error_label if error_label is not None else (None if source is not None else self.panel_error)
        if label is not None:
            label.setText(message)
            label.show()
        self.edit_refused.emit(message)
        if source is None and error_label is None:
            self._restore_later(message)

    def _restore_later(self, message: str) -> None:
        """Put combos and radio buttons back to the model after a refusal, keeping the message."""

        def again():
            self.refresh()
            if self.panel_error is not None and message:
                self.panel_error.setText(message)
                self.panel_error.show()

        QTimer.singleShot(0, again)

    def refresh(self, *_args) -> None:  # pragma: no cover - abstract
        raise NotImplementedError
