"""The Segment Card's two tables: insulation layers (innermost first) and fittings.

Each is a group box that shows the selected segment's list and turns a row edit, an added or
a removed row into one command through the card's edit path (:mod:`app.panels.editing`);
a refusal is shown under the table.
"""

from __future__ import annotations

from PySide6.QtWidgets import (
    QAbstractItemView,
    QComboBox,
    QGroupBox,
    QHBoxLayout,
    QHeaderView,
    QPushButton,
    QSpinBox,
    QTableWidget,
    QVBoxLayout,
)

from app import units
from app.panels.editing import EditorPanel, error_hint, hint, set_combo_data
from app.widgets.elided import ElidedComboBox
from solver import catalogue
from solver.fittings import fitting_labels

ROW_HEIGHT = 28  # px
MAX_TABLE_HEIGHT = 150  # px: longer lists scroll inside the table
NUMBER_COLUMN = 80  # px: least width of a column of numbers
HEADER_PADDING = 16  # px: a header section's margins around its text


#: what a blank conductivity means (the table shows it in the empty box and in the tooltip)
FROM_MATERIAL = "k(T)"


def setup_table(table: QTableWidget, headers: list[str]) -> None:
    table.setHorizontalHeaderLabels(headers)
    table.verticalHeader().setVisible(False)
    table.setSelectionBehavior(QAbstractItemView.SelectRows)
    table.setSelectionMode(QAbstractItemView.SingleSelection)
    table.setEditTriggers(QAbstractItemView.NoEditTriggers)
    table.horizontalHeader().setSectionResizeMode(QHeaderView.Stretch)
    table.verticalHeader().setDefaultSectionSize(ROW_HEIGHT)
    table.setMinimumHeight(60)
    table.setMaximumHeight(MAX_TABLE_HEIGHT)


def buttons_row(add: QPushButton, remove: QPushButton) -> QHBoxLayout:
    row = QHBoxLayout()
    row.addWidget(add)
    row.addWidget(remove)
    row.addStretch(1)
    return row


class InsulationLayersBox(QGroupBox):
    """Insulation layers of the selected segment: material, thickness, conductivity per row.

    A blank conductivity is the catalogue material's conductivity at the layer's mean temperature
    (its k(T), from the material's published specification); a number is a constant k.
    """

    def __init__(self, editor: EditorPanel):
        super().__init__("Insulation layers (innermost first)")
        self.editor = editor
        self._shown_rows = -1
        v = QVBoxLayout(self)
        v.setContentsMargins(8, 6, 8, 8)
        self.table = QTableWidget(0, 3)
        setup_table(self.table, ["Material", "Thickness", "Conductivity"])
        hh = self.table.horizontalHeader()
        hh.setSectionResizeMode(0, QHeaderView.Stretch)
        for c in (1, 2):
            hh.setSectionResizeMode(c, QHeaderView.Fixed)
        v.addWidget(self.table)
        self.add_btn = QPushButton("Add layer")
        self.remove_btn = QPushButton("Remove layer")
        self.add_btn.clicked.connect(self.add_layer)
        self.remove_btn.clicked.connect(self.remove_layer)
        row = buttons_row(self.add_btn, self.remove_btn)
        self.total = hint("")
        self.total.setWordWrap(False)
        row.addWidget(self.total)
        v.addLayout(row)
        self.error = error_hint()
        v.addWidget(self.error)
        self.set_headers()

    def set_headers(self) -> None:
        """Column headings carry the display units (the boxes in the rows do not)."""
        system = self.editor.doc.unit_system
        heads = ["Material", f"Thickness [{units.label('thickness', system)}]",
                 f"k [{units.label('conductivity', system)}]"]
        self.table.setHorizontalHeaderLabels(heads)
        self.table.horizontalHeaderItem(2).setToolTip(
            "Thermal conductivity of the layer. Leave empty for the material's conductivity at the layer's "
            "mean temperature (k(T) from its published specification); a number is taken as constant.")
        fm = self.table.horizontalHeader().fontMetrics()
        for c in (1, 2):  # wide enough for the heading with its unit (measured, not guessed)
            self.table.setColumnWidth(c, max(NUMBER_COLUMN, fm.horizontalAdvance(heads[c]) + HEADER_PADDING))

    def show_segment(self, seg) -> None:
        layers = seg.insulation
        if len(layers) != self._shown_rows or self.table.rowCount() != len(layers):
            self._rebuild_rows(len(layers))
        for r, layer in enumerate(layers):
            set_combo_data(self.table.cellWidget(r, 0), layer.material, add_missing=True)
            self.table.cellWidget(r, 1).set_value(layer.thickness_m)
            self.table.cellWidget(r, 2).set_value(layer.conductivity_W_per_mK)
        total = sum(layer.thickness_m for layer in layers)
        system = self.editor.doc.unit_system
        self.total.setText(f"Total {units.format_value(total, 'thickness', system, 3)}" if layers else "Bare pipe")
        self.remove_btn.setEnabled(bool(layers))
        self.error.hide()
        fixed = seg.surroundings.kind == "fixed_wall"
        self.setEnabled(not fixed)
        if fixed:
            self.total.setText("Not used with a fixed wall")

    def _rebuild_rows(self, n: int) -> None:
        table = self.table
        table.setRowCount(n)
        for r in range(n):
            combo = ElidedComboBox()
            for key, mat in catalogue.INSULATION_MATERIALS.items():
                combo.addItem(mat.label, key)
            combo.activated.connect(lambda _i, row=r, c=combo: self._on_material(row, c.currentData()))
            table.setCellWidget(r, 0, combo)
            for col, quantity, key, word, kw in (
                    (1, "thickness", "thickness_m", "thickness", {}),
                    (2, "conductivity", "conductivity_W_per_mK", "conductivity",
                     dict(allow_empty=True, empty_text=FROM_MATERIAL))):
                e = self.editor.quantity_edit(quantity, f"Layer {r + 1} {word}", f"insulation.{r}.{key}",
                                              error_label=self.error, compact=True, **kw)
                e.unit_label.hide()  # the unit is in the column header
                table.setCellWidget(r, col, e)
        self.editor.forget_dead_edits()
        self._shown_rows = n
        self.set_headers()
        table.setFixedHeight(min(MAX_TABLE_HEIGHT, 30 + ROW_HEIGHT * max(n, 1)))

    def add_layer(self) -> None:
        seg = self.editor.doc.selected
        if seg is None:
            return
        mats = catalogue.INSULATION_MATERIALS
        key = "mineral wool" if "mineral wool" in mats else next(iter(mats))
        layers = [layer.model_dump() for layer in seg.insulation]
        layers.append({"material": key, "thickness_m": 0.05, "conductivity_W_per_mK": None})  # the material's k(T)
        self.editor.set_fields({"insulation": layers}, text=f"Add insulation layer to '{seg.name}'",
                               error_label=self.error)

    def remove_layer(self) -> None:
        seg = self.editor.doc.selected
        if seg is None or not seg.insulation:
            return
        row = self.table.currentRow()
        row = row if 0 <= row < len(seg.insulation) else len(seg.insulation) - 1
        layers = [layer.model_dump() for i, layer in enumerate(seg.insulation) if i != row]
        self.editor.set_fields({"insulation": layers}, text=f"Remove insulation layer from '{seg.name}'",
                               error_label=self.error)

    def _on_material(self, row: int, key: str) -> None:
        seg = self.editor.doc.selected
        if seg is None or self.editor.loading:
            return
        changes: dict = {f"insulation.{row}.material": key}
        material = catalogue.INSULATION_MATERIALS.get(key)
        entered_k = seg.insulation[row].conductivity_W_per_mK if row < len(seg.insulation) else None
        if material is not None and entered_k is not None:
            # a constant k entered for the old material would not fit the new one: its typical k (one undo
            # step); a blank k stays blank, so the new material's k(T) applies
            changes[f"insulation.{row}.conductivity_W_per_mK"] = material.conductivity_W_per_mK
        self.editor.set_fields(changes, text=f"Set insulation material of '{seg.name}'", error_label=self.error)


class FittingsBox(QGroupBox):
    """Fittings of the selected segment: kind, count and (for 'Custom') the loss coefficient K."""

    def __init__(self, editor: EditorPanel):
        super().__init__("Fittings")
        self.editor = editor
        self._shown_rows = -1
        v = QVBoxLayout(self)
        v.setContentsMargins(8, 6, 8, 8)
        self.table = QTableWidget(0, 3)
        setup_table(self.table, ["Kind", "Count", "K each"])
        self.table.horizontalHeaderItem(2).setToolTip("Loss coefficient per fitting; entered for 'Custom' only")
        hh = self.table.horizontalHeader()
        hh.setSectionResizeMode(0, QHeaderView.Stretch)
        hh.setSectionResizeMode(1, QHeaderView.ResizeToContents)
        hh.setSectionResizeMode(2, QHeaderView.Fixed)
        self.table.setColumnWidth(2, 64)
        v.addWidget(self.table)
        self.add_btn = QPushButton("Add fitting")
        self.remove_btn = QPushButton("Remove fitting")
        self.add_btn.clicked.connect(lambda _checked=False: self.add_fitting())
        self.remove_btn.clicked.connect(self.remove_fitting)
        v.addLayout(buttons_row(self.add_btn, self.remove_btn))
        v.addWidget(hint("K from the published method of each kind, at the local Reynolds number "
                         "and bore; 'Custom' takes K as entered."))
        self.error = error_hint()
        v.addWidget(self.error)

    def show_segment(self, seg) -> None:
        fits = seg.fittings
        if len(fits) != self._shown_rows or self.table.rowCount() != len(fits):
            self._rebuild_rows(len(fits))
        for r, fit in enumerate(fits):
            combo: QComboBox = self.table.cellWidget(r, 0)
            set_combo_data(combo, fit.kind, add_missing=True)
            spin: QSpinBox = self.table.cellWidget(r, 1)
            spin.blockSignals(True)
            spin.setValue(fit.count)
            spin.blockSignals(False)
            kedit = self.table.cellWidget(r, 2)
            kedit.set_value(fit.K)
            kedit.setEnabled(fit.kind == "custom")
        self.remove_btn.setEnabled(bool(fits))
        self.error.hide()

    def _rebuild_rows(self, n: int) -> None:
        table = self.table
        table.setRowCount(n)
        labels = fitting_labels()
        for r in range(n):
            combo = ElidedComboBox()
            for key, text in labels.items():
                combo.addItem(text, key)
            combo.setMinimumContentsLength(12)
            combo.activated.connect(lambda _i, row=r, c=combo: self._on_kind(row, c.currentData()))
            table.setCellWidget(r, 0, combo)
            spin = QSpinBox()
            spin.setRange(1, 10_000)
            spin.valueChanged.connect(lambda v, row=r: self.editor.set_fields(
                {f"fittings.{row}.count": v}, error_label=self.error))
            table.setCellWidget(r, 1, spin)
            e = self.editor.quantity_edit("dimensionless", f"Fitting {r + 1} K", f"fittings.{r}.K",
                                          error_label=self.error, compact=True, allow_empty=True, empty_text="auto")
            e.unit_label.hide()
            table.setCellWidget(r, 2, e)
        self.editor.forget_dead_edits()
        self._shown_rows = n
        table.setFixedHeight(min(MAX_TABLE_HEIGHT, table.horizontalHeader().sizeHint().height() + 4 + ROW_HEIGHT * max(n, 1)))

    def add_fitting(self, kind: str = "elbow_90_standard") -> None:
        seg = self.editor.doc.selected
        if seg is None:
            return
        labels = fitting_labels()
        if kind not in labels:
            kind = next(iter(labels))
        fits = [f.model_dump() for f in seg.fittings]
        fits.append({"kind": kind, "count": 1, "K": 0.5 if kind == "custom" else None})
        self.editor.set_fields({"fittings": fits}, text=f"Add fitting to '{seg.name}'", error_label=self.error)

    def remove_fitting(self) -> None:
        seg = self.editor.doc.selected
        if seg is None or not seg.fittings:
            return
        row = self.table.currentRow()
        row = row if 0 <= row < len(seg.fittings) else len(seg.fittings) - 1
        fits = [f.model_dump() for i, f in enumerate(seg.fittings) if i != row]
        self.editor.set_fields({"fittings": fits}, text=f"Remove fitting from '{seg.name}'", error_label=self.error)

    def _on_kind(self, row: int, kind: str) -> None:
        seg = self.editor.doc.selected
        if seg is None or self.editor.loading:
            return
        changes: dict = {f"fittings.{row}.kind": kind}
        if kind == "custom" and seg.fittings[row].K is None:
            changes[f"fittings.{row}.K"] = 0.5
        elif kind != "custom":
            changes[f"fittings.{row}.K"] = None
        self.editor.set_fields(changes, text=f"Set fitting kind in '{seg.name}'", error_label=self.error)
