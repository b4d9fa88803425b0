"""Project details, design targets and design cases: the title block of the report, the targets every
alternative is judged against in Side-by-Side, and the worst and hot cases every alternative is
designed for (:mod:`app.panels.design_cases_box`). Edits go through commands in one undo step."""

from __future__ import annotations

from typing import Optional

from pydantic import ValidationError
from PySide6.QtWidgets import (
    QDialog,
    QDialogButtonBox,
    QFormLayout,
    QGroupBox,
    QLabel,
    QLineEdit,
    QPlainTextEdit,
    QVBoxLayout,
)

from app import commands, messages
from app.panels.design_cases_box import DesignCasesBox
from app.widgets.quantity_edit import QuantityEdit
from solver.model import DesignCases, Targets

# target field -> (label, quantity)
TARGET_FIELDS: dict[str, tuple[str, str]] = {
    "outlet_temperature_min_K": ("Outlet temperature, at least", "temperature"),
    "outlet_temperature_max_K": ("Outlet temperature, at most", "temperature"),
    "max_inner_wall_temperature_K": ("Inner-wall temperature, at most", "temperature"),
    "max_pressure_drop_Pa": ("Pressure drop, at most", "pressure_difference"),
    "max_heat_input_W": ("Heat input, at most", "power"),
}


class ProjectDetailsDialog(QDialog):
    """``ProjectDetailsDialog(doc)``: edit name, description, prepared by, revision, targets and design cases.

    :meth:`apply` pushes the changes (one undo step) and returns an error text or None.
    """

    def __init__(self, doc, parent=None):
        super().__init__(parent)
        self.doc = doc
        self.setWindowTitle("Project details, design targets and design cases")
        self.setObjectName("ProjectDetailsDialog")
        self.setMinimumWidth(560)
        project = doc.project
        system = doc.unit_system

        self.name_edit = QLineEdit(project.name)
        self.prepared_edit = QLineEdit(project.prepared_by)
        self.revision_edit = QLineEdit(project.revision)
        self.description_edit = QPlainTextEdit(project.description)
        self.description_edit.setFixedHeight(90)
        details = QGroupBox("Project (printed in the report's title block)")
        form = QFormLayout(details)
        form.addRow("Name", self.name_edit)
        form.addRow("Prepared by", self.prepared_edit)
        form.addRow("Revision", self.revision_edit)
        form.addRow("Description", self.description_edit)

        targets = QGroupBox("Design targets (empty = none)")
        targets.setToolTip("Every alternative is judged against these in Side-by-Side and in the report.")
        tform = QFormLayout(targets)
        self.target_edits: dict[str, QuantityEdit] = {}
        for key, (label, quantity) in TARGET_FIELDS.items():
            edit = QuantityEdit(quantity, system, f"targets.{key}", allow_empty=True, empty_text="none")
            edit.set_value(getattr(project.targets, key))
            self.target_edits[key] = edit
            tform.addRow(label, edit)

        self.cases_box = DesignCasesBox(project.design_cases, system)

        self.error_label = QLabel("")
        self.error_label.setWordWrap(True)
        self.error_label.setStyleSheet("color: #B04A00;")
        self.error_label.hide()
        buttons = QDialogButtonBox(QDialogButtonBox.Ok | QDialogButtonBox.Cancel)
        buttons.accepted.connect(self._accept)
        buttons.rejected.connect(self.reject)

        layout = QVBoxLayout(self)
        layout.addWidget(details)
        layout.addWidget(targets)
        layout.addWidget(self.cases_box)
        layout.addWidget(self.error_label)
        layout.addWidget(buttons)
        self._fit_height()

    def _accept(self) -> None:
        error = self.apply()
        if error is None:
            self.accept()

    def apply(self) -> Optional[str]:
        """Push the changed fields as one undoable step; return an error message or None."""
        for edit in self.target_edits.values():
            edit.commit()
            if edit.has_error:  # the box says what is wrong, under itself
                self.error_label.hide()
                return edit.error_text
        refused = self.cases_box.commit()
        if refused is not None:  # the box says what is wrong, under itself
            self.error_label.hide()
            return refused
        values = {key: edit.value() for key, edit in self.target_edits.items()}
        self.error_label.hide()  # shown again below if this try is refused too
        try:
            new_targets = Targets(**values)
        except ValidationError as exc:  # in the user's words: the field's label, the display unit
            return self._show(messages.validation_message(exc, self.doc.unit_system, prefix="targets"))
        try:
            new_cases = DesignCases(**self.cases_box.values())
        except ValidationError as exc:
            return self._show(messages.validation_message(exc, self.doc.unit_system, prefix="design_cases"))
        project = self.doc.project
        changes = {
            "name": self.name_edit.text().strip() or project.name,
            "prepared_by": self.prepared_edit.text().strip(),
            "revision": self.revision_edit.text().strip(),
            "description": self.description_edit.toPlainText().strip(),
            "targets": new_targets,
            "design_cases": new_cases,
        }
        changed = {k: v for k, v in changes.items() if getattr(project, k) != v}
        if not changed:
            return None
        try:
            cmds = [commands.SetProjectField(self.doc, k, v) for k, v in changed.items()]
        except ValidationError as exc:
            return self._show(messages.validation_message(exc, self.doc.unit_system))
        with self.doc.macro("Edit project details"):
            for cmd in cmds:
                self.doc.push(cmd)
        self.error_label.hide()
        return None

    def _fit_height(self) -> None:
        """Tall enough for the wrapped notes: a size hint leaves out what word-wrapped labels need."""
        layout = self.layout()
        layout.activate()
        needed = layout.totalHeightForWidth(self.width()) if layout.hasHeightForWidth() else layout.sizeHint().height()
        if needed > self.height():
            self.resize(self.width(), needed)

    def _show(self, text: str) -> str:
        self.error_label.setText(text)
        self.error_label.show()
        self._fit_height()  # a wrapped message needs more height than the dialog had: grow to show all of it
        return text
