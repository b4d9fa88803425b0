"""Segment Card: every field of the selected segment, edited through undoable commands.

The card reads the Document's selected segment; when the model changes (an edit, undo,
redo, a new selection) it refreshes its widgets with their signals blocked, so showing a
value never sends it back as an edit. An entry the model refuses is marked in place with
the reason and nothing changes.
"""

from __future__ import annotations

from typing import Any, Optional

from pydantic import ValidationError
from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (
    QAbstractItemView,
    QButtonGroup,
    QComboBox,
    QFormLayout,
    QFrame,
    QGroupBox,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QLineEdit,
    QPushButton,
    QRadioButton,
    QScrollArea,
    QSpinBox,
    QStackedWidget,
    QTableWidget,
    QVBoxLayout,
    QWidget,
)

from app import commands, units
from app.widgets.quantity_edit import ERROR_COLOUR, QuantityEdit

#: surroundings kind -> label shown in the combo (order = combo order)
SURROUNDINGS_KINDS: dict[str, str] = {
    "still_air": "Still air (natural convection + radiation)",
    "wind": "Wind (forced convection + radiation)",
    "buried": "Buried in soil",
    "jacket": "Jacket or bath medium",
    "fixed_wall": "Fixed wall temperature / steam",
    "adiabatic": "Adiabatic (no exchange)",
}

# the temperature key of each surroundings kind (carried over when the kind changes)
_SURR_TEMPERATURE_KEY = {
    "still_air": "temperature_K",
    "wind": "temperature_K",
    "buried": "soil_temperature_K",
    "jacket": "medium_temperature_K",
    "fixed_wall": "wall_temperature_K",
}


def validation_message(exc: ValidationError, prefix: str = "") -> str:
    """One line per problem: ``field path: reason, got value``."""
    try:
        from solver.project_io import validation_problems

        problems = validation_problems(exc)
    except Exception:  # pragma: no cover - the helper is part of the solver package
        problems = [(".".join(str(p) for p in e["loc"]), e["msg"]) for e in exc.errors()]
    lines = []
    for path, msg in problems:
        full = f"{prefix}.{path}" if prefix and path else (path or prefix)
        lines.append(f"{full}: {msg}" if full else msg)
    return "\n".join(lines)


def _catalogue():
    from solver import catalogue

    return catalogue


def _fitting_labels() -> dict[str, str]:
    from solver.fittings import fitting_labels

    return fitting_labels()


def _section(title: str) -> tuple[QGroupBox, QFormLayout]:
    box = QGroupBox(title)
    form = QFormLayout(box)
    form.setLabelAlignment(Qt.AlignRight | Qt.AlignVCenter)
    form.setFieldGrowthPolicy(QFormLayout.AllNonFixedFieldsGrow)
    form.setHorizontalSpacing(8)
    form.setVerticalSpacing(5)
    form.setContentsMargins(8, 6, 8, 8)
    return box, form


def _hint(text: str) -> QLabel:
    lab = QLabel(text)
    lab.setWordWrap(True)
    lab.setStyleSheet("color: #5B6770; font-size: 8.5pt;")
    return lab


class SegmentCard(QWidget):
    """Editor of the selected segment of the current alternative."""

    #: emitted with a message when an edit is refused (tests and the status bar listen)
    edit_refused = Signal(str)

    def __init__(self, doc, parent: Optional[QWidget] = None):
        super().__init__(parent)
        self._surroundings_memory: dict = {}  # (alternative, segment, name) -> settings per kind
        self.doc = doc
        self._loading = False
        self._qedits: list[QuantityEdit] = []
        self._shown_layer_count = -1
        self._shown_fitting_count = -1
        self._shown: Optional[tuple[int, int]] = None  # (alternative, segment) the widgets show
        self._shown_name = ""

        outer = QVBoxLayout(self)
        outer.setContentsMargins(0, 0, 0, 0)
        self.header = QLabel()
        self.header.setStyleSheet("font-weight: 600; font-size: 10.5pt; padding: 4px 8px;")
        outer.addWidget(self.header)
        scroll = QScrollArea()
        scroll.setWidgetResizable(True)
        scroll.setFrameShape(QFrame.NoFrame)
        scroll.setHorizontalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
        outer.addWidget(scroll, 1)
        body = QWidget()
        scroll.setWidget(body)
        self.body = body
        col = QVBoxLayout(body)
        col.setContentsMargins(6, 0, 6, 6)
        col.setSpacing(8)

        col.addWidget(self._build_segment_section())
        col.addWidget(self._build_pipe_section())
        col.addWidget(self._build_heat_section())
        col.addWidget(self._build_insulation_section())
        col.addWidget(self._build_fittings_section())
        col.addWidget(self._build_surroundings_section())
        self.card_error = QLabel()
        self.card_error.setWordWrap(True)
        self.card_error.setStyleSheet(f"color: {ERROR_COLOUR};")
        self.card_error.hide()
        col.addWidget(self.card_error)
        col.addStretch(1)

        doc.project_changed.connect(self.refresh)
        doc.project_replaced.connect(self.refresh)
        doc.selection_changed.connect(self._on_selection)
        doc.current_alternative_changed.connect(self._on_selection)
        doc.units_changed.connect(self._on_units)
        self.refresh()

    # ------------------------------------------------------------------ building

    def _qedit(self, quantity: str, field: str, path: Optional[str] = None, **kw) -> QuantityEdit:
        edit = QuantityEdit(quantity, self.doc.unit_system, field, **kw)
        self._qedits.append(edit)
        if path is not None:
            edit.value_committed.connect(lambda v, p=path, e=edit: self._set({p: v}, source=e))
        return edit

    def _build_segment_section(self) -> QGroupBox:
        box, form = _section("Segment")
        self.name_edit = QLineEdit()
        self.name_edit.editingFinished.connect(self._on_name)
        form.addRow("Name", self.name_edit)
        self.length_edit = self._qedit("length", "length_m", "length_m")
        form.addRow("Length", self.length_edit)
        self.elevation_edit = self._qedit("elevation", "elevation_change_m", "elevation_change_m")
        self.elevation_edit.line_edit.setToolTip(
            "Outlet elevation minus inlet elevation: positive when the line rises.")
        form.addRow("Elevation change", self.elevation_edit)
        return box

    def _build_pipe_section(self) -> QGroupBox:
        box, form = _section("Pipe")
        self.bore_combo = QComboBox()
        self.bore_combo.addItem("NPS and schedule", "nps")
        self.bore_combo.addItem("Inner diameter and wall", "diameter")
        self.bore_combo.currentIndexChanged.connect(self._on_bore_mode)
        form.addRow("Bore given by", self.bore_combo)

        nps_row = QWidget()
        row = QHBoxLayout(nps_row)
        row.setContentsMargins(0, 0, 0, 0)
        self.nps_combo = QComboBox()
        self.nps_combo.setToolTip("Nominal pipe size")
        self.nps_combo.setMinimumContentsLength(6)
        self.schedule_combo = QComboBox()
        self.schedule_combo.setToolTip("Wall schedule available for this size")
        self.schedule_combo.setMinimumContentsLength(5)
        row.addWidget(self.nps_combo, 1)
        row.addSpacing(4)
        row.addWidget(QLabel("Sch"))
        row.addWidget(self.schedule_combo, 1)
        try:
            self.nps_combo.addItems(_catalogue().nps_sizes())
        except Exception:  # catalogue missing: free entry
            self.nps_combo.setEditable(True)
        self.nps_combo.activated.connect(self._on_nps)
        self.schedule_combo.activated.connect(self._on_schedule)
        form.addRow("NPS", nps_row)
        self.nps_row = nps_row
        self.id_edit = self._qedit("diameter", "pipe.inner_diameter_m", "pipe.inner_diameter_m")
        self.wall_edit = self._qedit("thickness", "pipe.wall_thickness_m", "pipe.wall_thickness_m")
        form.addRow("Inner diameter", self.id_edit)
        form.addRow("Wall thickness", self.wall_edit)
        self.pipe_form = form
        self.dims_label = _hint("")
        self.dims_label.setToolTip("Dimensions per ASME B36.10M (carbon steel) and B36.19M (stainless 'S' schedules)")
        form.addRow("", self.dims_label)

        self.material_combo = QComboBox()
        try:
            for key, mat in _catalogue().PIPE_MATERIALS.items():
                self.material_combo.addItem(mat.label, key)
        except Exception:
            self.material_combo.setEditable(True)
        self.material_combo.activated.connect(self._on_material)
        form.addRow("Material", self.material_combo)
        self.roughness_edit = self._qedit("roughness", "pipe.roughness_m", "pipe.roughness_m", allow_empty=True,
                                          empty_text="material default")
        form.addRow("Roughness", self.roughness_edit)
        self.kwall_edit = self._qedit("conductivity", "pipe.wall_conductivity_W_per_mK",
                                      "pipe.wall_conductivity_W_per_mK", allow_empty=True,
                                      empty_text="material default")
        form.addRow("Wall conductivity", self.kwall_edit)
        return box

    def _build_heat_section(self) -> QGroupBox:
        box, form = _section("Heat input")
        self.heat_edit = self._qedit("power_per_length", "heat_input_W_per_m", "heat_input_W_per_m")
        form.addRow("Tracing power", self.heat_edit)
        self.heat_hint = _hint("Enters at the pipe's outer wall, under the insulation. 0 = none.")
        form.addRow("", self.heat_hint)
        return box

    def _build_insulation_section(self) -> QGroupBox:
        box = QGroupBox("Insulation layers (innermost first)")
        self.insulation_box = box
        v = QVBoxLayout(box)
        v.setContentsMargins(8, 6, 8, 8)
        self.layer_table = QTableWidget(0, 3)
        self._setup_table(self.layer_table, ["Material", "Thickness", "Conductivity"])
        hh = self.layer_table.horizontalHeader()
        hh.setSectionResizeMode(0, QHeaderView.Stretch)
        for c in (1, 2):
            hh.setSectionResizeMode(c, QHeaderView.Fixed)
            self.layer_table.setColumnWidth(c, 92)
        v.addWidget(self.layer_table)
        row = QHBoxLayout()
        self.add_layer_btn = QPushButton("Add layer")
        self.remove_layer_btn = QPushButton("Remove layer")
        self.add_layer_btn.clicked.connect(self.add_layer)
        self.remove_layer_btn.clicked.connect(self.remove_layer)
        row.addWidget(self.add_layer_btn)
        row.addWidget(self.remove_layer_btn)
        row.addStretch(1)
        self.layer_total = _hint("")
        row.addWidget(self.layer_total)
        v.addLayout(row)
        self.layer_error = _hint("")
        self.layer_error.setStyleSheet(f"color: {ERROR_COLOUR};")
        self.layer_error.hide()
        v.addWidget(self.layer_error)
        return box

    def _build_fittings_section(self) -> QGroupBox:
        box = QGroupBox("Fittings")
        v = QVBoxLayout(box)
        v.setContentsMargins(8, 6, 8, 8)
        self.fitting_table = QTableWidget(0, 3)
        self._setup_table(self.fitting_table, ["Kind", "Count", "K each"])
        self.fitting_table.horizontalHeaderItem(2).setToolTip("Loss coefficient per fitting; entered for 'Custom' only")
        self.fitting_table.horizontalHeader().setSectionResizeMode(0, QHeaderView.Stretch)
        self.fitting_table.horizontalHeader().setSectionResizeMode(1, QHeaderView.ResizeToContents)
        self.fitting_table.horizontalHeader().setSectionResizeMode(2, QHeaderView.Fixed)
        self.fitting_table.setColumnWidth(2, 64)
        v.addWidget(self.fitting_table)
        row = QHBoxLayout()
        self.add_fitting_btn = QPushButton("Add fitting")
        self.remove_fitting_btn = QPushButton("Remove fitting")
        self.add_fitting_btn.clicked.connect(self.add_fitting)
        self.remove_fitting_btn.clicked.connect(self.remove_fitting)
        row.addWidget(self.add_fitting_btn)
        row.addWidget(self.remove_fitting_btn)
        row.addStretch(1)
        v.addLayout(row)
        v.addWidget(_hint("K from the published method of each kind, at the local Reynolds number "
                          "and bore; 'Custom' takes K as entered."))
        self.fitting_error = _hint("")
        self.fitting_error.setStyleSheet(f"color: {ERROR_COLOUR};")
        self.fitting_error.hide()
        v.addWidget(self.fitting_error)
        return box

    def _setup_table(self, table: QTableWidget, headers: list[str]) -> None:
        table.setHorizontalHeaderLabels(headers)
        table.verticalHeader().setVisible(False)
        table.setSelectionBehavior(QAbstractItemView.SelectRows)
        table.setSelectionMode(QAbstractItemView.SingleSelection)
        table.setEditTriggers(QAbstractItemView.NoEditTriggers)
        table.horizontalHeader().setSectionResizeMode(QHeaderView.Stretch)
        table.verticalHeader().setDefaultSectionSize(28)
        table.setMinimumHeight(60)
        table.setMaximumHeight(150)

    def _build_surroundings_section(self) -> QGroupBox:
        box, form = _section("Surroundings")
        self.surr_combo = QComboBox()
        for key, text in SURROUNDINGS_KINDS.items():
            self.surr_combo.addItem(text, key)
        self.surr_combo.activated.connect(self._on_surroundings_kind)
        form.addRow("Outside", self.surr_combo)
        self.surr_stack = QStackedWidget()
        self.surr_pages: dict[str, QWidget] = {}
        self.surr_edits: dict[str, QuantityEdit] = {}

        def page(kind: str, rows: list[tuple[str, str, str, dict]], note: str = "") -> None:
            w = QWidget()
            f = QFormLayout(w)
            f.setContentsMargins(0, 0, 0, 0)
            f.setLabelAlignment(Qt.AlignRight | Qt.AlignVCenter)
            for label_text, quantity, key, kw in rows:
                e = self._qedit(quantity, f"surroundings.{key}", f"surroundings.{key}", **kw)
                self.surr_edits[f"{kind}.{key}"] = e
                f.addRow(label_text, e)
            if note:
                f.addRow(_hint(note))
            self.surr_pages[kind] = w
            self.surr_stack.addWidget(w)

        film = dict(allow_empty=True, empty_text="computed")
        page("still_air", [("Air temperature", "temperature", "temperature_K", {}),
                           ("Surface emissivity", "dimensionless", "emissivity", {}),
                           ("Outer film coefficient", "film_coefficient", "film_coefficient_W_per_m2K", film)],
             "Outer film from natural convection and radiation unless entered.")
        page("wind", [("Air temperature", "temperature", "temperature_K", {}),
                      ("Wind speed", "speed", "wind_speed_m_per_s", {}),
                      ("Surface emissivity", "dimensionless", "emissivity", {}),
                      ("Outer film coefficient", "film_coefficient", "film_coefficient_W_per_m2K", film)],
             "Wind across the pipe; outer film computed unless entered.")
        page("buried", [("Soil temperature", "temperature", "soil_temperature_K", {}),
                        ("Depth to centreline", "depth", "depth_m", {}),
                        ("Soil conductivity", "conductivity", "soil_conductivity_W_per_mK", {})])
        page("jacket", [("Medium temperature", "temperature", "medium_temperature_K", {}),
                        ("Film coefficient", "film_coefficient", "film_coefficient_W_per_m2K", {})],
             "Jacket or bath medium at a known temperature, outside the insulation (if any).")

        fw = QWidget()
        f = QFormLayout(fw)
        f.setContentsMargins(0, 0, 0, 0)
        f.setLabelAlignment(Qt.AlignRight | Qt.AlignVCenter)
        self.fixed_by_temp = QRadioButton("Wall temperature")
        self.fixed_by_steam = QRadioButton("Saturated steam at")
        self.fixed_group = QButtonGroup(self)
        self.fixed_group.addButton(self.fixed_by_temp, 0)
        self.fixed_group.addButton(self.fixed_by_steam, 1)
        self.fixed_group.idClicked.connect(self._on_fixed_source)
        self.fixed_temp_edit = self._qedit("temperature", "surroundings.wall_temperature_K",
                                           "surroundings.wall_temperature_K")
        self.fixed_steam_edit = self._qedit("pressure", "surroundings.steam_pressure_Pa",
                                            "surroundings.steam_pressure_Pa")
        f.addRow(self.fixed_by_temp, self.fixed_temp_edit)
        f.addRow(self.fixed_by_steam, self.fixed_steam_edit)
        f.addRow(_hint("The pipe's outer wall is held at this temperature (e.g. condensing steam); "
                       "insulation and heat input play no part."))
        self.surr_pages["fixed_wall"] = fw
        self.surr_stack.addWidget(fw)

        ad = QWidget()
        QVBoxLayout(ad).addWidget(_hint("No heat is exchanged with the surroundings "
                                        "(a perfectly insulated outside)."))
        self.surr_pages["adiabatic"] = ad
        self.surr_stack.addWidget(ad)
        form.addRow(self.surr_stack)
        return box

    # ------------------------------------------------------------------ showing the model

    def _on_units(self, system: str) -> None:
        self.flush_pending()  # read typed text in the units it was typed in, before they change
        for e in self._qedits:
            e.set_unit_system(system)
        self._layer_headers()
        self.refresh()

    def _on_selection(self, *_args) -> None:
        self.flush_pending()
        for e in self._qedits:  # marks belong to the segment they were typed for
            e.reset()
        self.refresh()

    def flush_pending(self) -> None:
        """Commit text typed but not yet committed, to the segment it was typed for.

        Clicking another segment in the Line Strip may not take the keyboard focus, so the
        pending entry would otherwise be lost or, worse, land on the newly selected segment.
        """
        if self._shown is None:
            return
        for e in list(self._qedits):
            if e.isVisibleTo(self) and e.pending:
                e.commit()
        if self.name_edit.text().strip() and self.name_edit.text().strip() != self._shown_name:
            self._on_name()

    def refresh(self, *_args) -> None:
        """Show the selected segment (called on every model change; emits nothing)."""
        seg = self.doc.selected
        self._shown = (self.doc.current_index, self.doc.selected_segment) if seg is not None else None
        self._shown_name = seg.name if seg is not None else ""
        self.body.setEnabled(seg is not None)
        if seg is None:
            self.header.setText("Segment Card — no segment selected")
            return
        self._loading = True
        try:
            self._show(seg)
        finally:
            self._loading = False

    def _show(self, seg) -> None:
        n = len(self.doc.current_alternative.segments)
        self.header.setText(f"Segment {self.doc.selected_segment + 1} of {n} — {seg.name}")
        if not self.name_edit.hasFocus() or self.name_edit.text() != seg.name:
            self.name_edit.setText(seg.name)
        self.length_edit.set_value(seg.length_m)
        self.elevation_edit.set_value(seg.elevation_change_m)
        pipe = seg.pipe
        self._set_combo_data(self.bore_combo, pipe.bore)
        by_nps = pipe.bore == "nps"
        self.pipe_form.setRowVisible(self.nps_row, by_nps)
        self.pipe_form.setRowVisible(self.id_edit, not by_nps)
        self.pipe_form.setRowVisible(self.wall_edit, not by_nps)
        if pipe.bore == "nps":
            self._set_combo_text(self.nps_combo, pipe.nps or "")
            self._fill_schedules(pipe.nps)
            self._set_combo_text(self.schedule_combo, pipe.schedule or "")
        self.id_edit.set_value(pipe.inner_diameter_m)
        self.wall_edit.set_value(pipe.wall_thickness_m)
        self._set_combo_data(self.material_combo, pipe.material, add_missing=True)
        self._show_material_defaults(pipe.material)
        self.roughness_edit.set_value(pipe.roughness_m)
        self.kwall_edit.set_value(pipe.wall_conductivity_W_per_mK)
        self._show_dimensions()

        fixed = seg.surroundings.kind == "fixed_wall"
        self.heat_edit.set_value(seg.heat_input_W_per_m)
        self.heat_edit.setEnabled(not fixed)
        self.heat_hint.setText("Not used with a fixed wall temperature." if fixed else
                               "Enters at the pipe's outer wall, under the insulation. 0 = none.")
        self._show_layers(seg)
        self.insulation_box.setEnabled(not fixed)
        if fixed:
            self.layer_total.setText("Not used with a fixed wall")
        self._show_fittings(seg)

        s = seg.surroundings
        self._set_combo_data(self.surr_combo, s.kind)
        self.surr_stack.setCurrentWidget(self.surr_pages[s.kind])
        for key, edit in self.surr_edits.items():
            kind, field = key.split(".", 1)
            if kind == s.kind:
                edit.set_value(getattr(s, field))
        if s.kind == "fixed_wall":
            by_steam = s.steam_pressure_Pa is not None
            self.fixed_by_steam.setChecked(by_steam)
            self.fixed_by_temp.setChecked(not by_steam)
            self.fixed_temp_edit.set_value(s.wall_temperature_K)
            self.fixed_steam_edit.set_value(s.steam_pressure_Pa)
            self.fixed_temp_edit.setEnabled(not by_steam)
            self.fixed_steam_edit.setEnabled(by_steam)
        self.card_error.hide()

    def _layer_headers(self) -> None:
        system = self.doc.unit_system
        self.layer_table.setHorizontalHeaderLabels(
            ["Material", f"Thickness [{units.label('thickness', system)}]",
             f"k [{units.label('conductivity', system)}]"])

    def _show_material_defaults(self, material: str) -> None:
        system = self.doc.unit_system
        try:
            mat = _catalogue().PIPE_MATERIALS[material]
        except Exception:
            self.roughness_edit.setPlaceholderText("material default")
            self.kwall_edit.setPlaceholderText("material default")
            return
        self.roughness_edit.setPlaceholderText(
            f"default {units.format_value(mat.roughness_m, 'roughness', system, 2)}")
        self.kwall_edit.setPlaceholderText(
            f"default {units.format_value(mat.conductivity_W_per_mK, 'conductivity', system, 2, with_unit=False)}")

    def _show_dimensions(self) -> None:
        seg = self.doc.selected
        if seg is None:
            return
        pipe = seg.pipe
        system = self.doc.unit_system
        try:
            if pipe.bore == "nps":
                inner, outer, wall = _catalogue().pipe_dimensions(pipe.nps, pipe.schedule)
            else:
                inner, wall = pipe.inner_diameter_m, pipe.wall_thickness_m or 0.0
                outer = inner + 2 * wall
        except Exception as exc:
            self.dims_label.setText(str(exc))
            return
        fmt = lambda v: units.format_value(v, "diameter", system, 4)  # noqa: E731
        self.dims_label.setText(f"Bore {fmt(inner)} · outside {fmt(outer)} · wall {fmt(wall)}")

    def _fill_schedules(self, nps: Optional[str]) -> None:
        self.schedule_combo.blockSignals(True)
        self.schedule_combo.clear()
        try:
            self.schedule_combo.addItems(_catalogue().schedules_for(nps))
            self.schedule_combo.setEditable(False)
        except Exception:
            self.schedule_combo.setEditable(True)
        self.schedule_combo.blockSignals(False)

    def _show_layers(self, seg) -> None:
        layers = seg.insulation
        if len(layers) != self._shown_layer_count or self.layer_table.rowCount() != len(layers):
            self._rebuild_layer_rows(len(layers))
        system = self.doc.unit_system
        for r, layer in enumerate(layers):
            combo: QComboBox = self.layer_table.cellWidget(r, 0)
            combo.blockSignals(True)
            self._set_combo_data(combo, layer.material, add_missing=True)
            combo.blockSignals(False)
            self.layer_table.cellWidget(r, 1).set_value(layer.thickness_m)
            self.layer_table.cellWidget(r, 2).set_value(layer.conductivity_W_per_mK)
        total = sum(l.thickness_m for l in layers)
        self.layer_total.setText(f"Total {units.format_value(total, 'thickness', system, 3)}" if layers else "Bare pipe")
        self.remove_layer_btn.setEnabled(bool(layers))
        self.layer_error.hide()

    def _rebuild_layer_rows(self, n: int) -> None:
        table = self.layer_table
        table.setRowCount(n)
        for r in range(n):
            combo = QComboBox()
            try:
                for key, mat in _catalogue().INSULATION_MATERIALS.items():
                    combo.addItem(mat.label, key)
            except Exception:
                pass
            combo.activated.connect(lambda _i, row=r, c=combo: self._on_layer_material(row, c.currentData()))
            table.setCellWidget(r, 0, combo)
            for col, (quantity, key) in ((1, ("thickness", "thickness_m")), (2, ("conductivity", "conductivity_W_per_mK"))):
                e = QuantityEdit(quantity, self.doc.unit_system, f"insulation[{r}].{key}", compact=True)
                e.unit_label.hide()  # the unit is in the column header
                e.value_committed.connect(lambda v, row=r, k=key, ed=e: self._set(
                    {f"insulation.{row}.{k}": v}, source=ed, error_label=self.layer_error))
                self._qedits.append(e)
                table.setCellWidget(r, col, e)
        self._forget_dead_edits()
        self._shown_layer_count = n
        self._layer_headers()
        table.setFixedHeight(min(150, 30 + 28 * max(n, 1)))

    def _show_fittings(self, seg) -> None:
        fits = seg.fittings
        if len(fits) != self._shown_fitting_count or self.fitting_table.rowCount() != len(fits):
            self._rebuild_fitting_rows(len(fits))
        for r, fit in enumerate(fits):
            combo: QComboBox = self.fitting_table.cellWidget(r, 0)
            combo.blockSignals(True)
            self._set_combo_data(combo, fit.kind, add_missing=True)
            combo.setToolTip(combo.currentText())
            combo.blockSignals(False)
            spin: QSpinBox = self.fitting_table.cellWidget(r, 1)
            spin.blockSignals(True)
            spin.setValue(fit.count)
            spin.blockSignals(False)
            kedit: QuantityEdit = self.fitting_table.cellWidget(r, 2)
            kedit.set_value(fit.K)
            kedit.setEnabled(fit.kind == "custom")
        self.remove_fitting_btn.setEnabled(bool(fits))
        self.fitting_error.hide()

    def _rebuild_fitting_rows(self, n: int) -> None:
        table = self.fitting_table
        table.setRowCount(n)
        try:
            labels = _fitting_labels()
        except Exception:
            labels = {"custom": "Custom (enter K)"}
        for r in range(n):
            combo = QComboBox()
            for key, text in labels.items():
                combo.addItem(text, key)
            combo.setMinimumContentsLength(12)
            combo.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)
            combo.activated.connect(lambda _i, row=r, c=combo: self._on_fitting_kind(row, c.currentData()))
            table.setCellWidget(r, 0, combo)
            spin = QSpinBox()
            spin.setRange(1, 10_000)
            spin.valueChanged.connect(lambda v, row=r: self._set({f"fittings.{row}.count": v},
                                                                  error_label=self.fitting_error))
            table.setCellWidget(r, 1, spin)
            e = QuantityEdit("dimensionless", self.doc.unit_system, f"fittings[{r}].K", compact=True,
                             allow_empty=True, empty_text="auto")
            e.unit_label.hide()
            e.value_committed.connect(lambda v, row=r, ed=e: self._set({f"fittings.{row}.K": v}, source=ed,
                                                                       error_label=self.fitting_error))
            self._qedits.append(e)
            table.setCellWidget(r, 2, e)
        self._forget_dead_edits()
        self._shown_fitting_count = n
        table.setFixedHeight(min(150, table.horizontalHeader().sizeHint().height() + 4 + 28 * max(n, 1)))

    def _forget_dead_edits(self) -> None:
        import shiboken6

        self._qedits = [e for e in self._qedits if shiboken6.isValid(e)]

    @staticmethod
    def _set_combo_data(combo: QComboBox, data: Any, add_missing: bool = False) -> None:
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

    @staticmethod
    def _set_combo_text(combo: QComboBox, text: str) -> None:
        combo.blockSignals(True)
        i = combo.findText(text)
        if i < 0:
            if combo.isEditable():
                combo.setEditText(text)
            else:
                combo.addItem(text)
                combo.setCurrentIndex(combo.count() - 1)
        else:
            combo.setCurrentIndex(i)
        combo.blockSignals(False)

    # ------------------------------------------------------------------ edits -> commands

    def _set(self, changes: dict, source: Optional[QuantityEdit] = None, text: Optional[str] = None,
             error_label: Optional[QLabel] = None) -> bool:
        """Push one SetSegmentFields command; show the refusal in place if the model says no."""
        if self._loading or self._shown is None:
            return False
        alt_index, seg_index = self._shown
        try:
            seg = self.doc.project.alternatives[alt_index].segments[seg_index]
        except IndexError:
            return False
        try:
            if all(commands.get_path(seg, p) == v for p, v in changes.items()):
                return True  # nothing changes: no undo step
        except (AttributeError, IndexError, KeyError):
            pass
        try:
            cmd = commands.SetSegmentFields(self.doc, alt_index, seg_index, changes, text)
        except ValidationError as exc:
            msg = validation_message(exc)
            self._refuse(msg, source, error_label)
            return False
        self.doc.push(cmd)
        return True

    def _refuse(self, msg: str, source: Optional[QuantityEdit], error_label: Optional[QLabel]) -> None:
        if source is not None:
            source.show_error(msg)
        label = error_label if error_label is not None else (None if source is not None else self.card_error)
        if label is not None:
            label.setText(msg)
            label.show()
        self.edit_refused.emit(msg)
        if source is None and error_label is None:
            self.refresh_later()

    def refresh_later(self) -> None:
        """Put widgets back to the model after a refused combo/radio change (keeps the message)."""
        from PySide6.QtCore import QTimer

        msg = self.card_error.text()

        def again():
            self.refresh()
            if msg:
                self.card_error.setText(msg)
                self.card_error.show()

        QTimer.singleShot(0, again)

    def _on_name(self) -> None:
        text = self.name_edit.text().strip()
        if text:
            self._set({"name": text})
        else:
            self._refuse("name: a segment needs a name", None, None)

    def _on_bore_mode(self, _index: int) -> None:
        if self._loading:
            return
        seg = self.doc.selected
        mode = self.bore_combo.currentData()
        if seg is None or mode == seg.pipe.bore:
            return
        changes: dict = {"pipe.bore": mode}
        if mode == "diameter" and seg.pipe.inner_diameter_m is None:
            try:  # start from the catalogue bore of the current NPS and schedule
                inner, _outer, wall = _catalogue().pipe_dimensions(seg.pipe.nps, seg.pipe.schedule)
            except Exception:
                inner, wall = 0.05, 0.003
            changes["pipe.inner_diameter_m"] = inner
            changes["pipe.wall_thickness_m"] = wall
        self._set(changes, text=f"Bore of '{seg.name}' by " + ("NPS" if mode == "nps" else "diameter"))

    def _on_nps(self, _index: int) -> None:
        seg = self.doc.selected
        if seg is None or self._loading:
            return
        nps = self.nps_combo.currentText()
        changes = {"pipe.nps": nps}
        try:
            scheds = _catalogue().schedules_for(nps)
            if seg.pipe.schedule not in scheds:  # keep the schedule if it exists for the new size
                changes["pipe.schedule"] = "40" if "40" in scheds else ("STD" if "STD" in scheds else scheds[0])
        except Exception:
            pass
        self._set(changes, text=f"Set NPS of '{seg.name}' to {nps}")

    def _on_schedule(self, _index: int) -> None:
        seg = self.doc.selected
        if seg is not None:
            self._set({"pipe.schedule": self.schedule_combo.currentText()})

    def _on_material(self, _index: int) -> None:
        key = self.material_combo.currentData() or self.material_combo.currentText()
        self._set({"pipe.material": key})

    def _on_surroundings_kind(self, _index: int) -> None:
        seg = self.doc.selected
        kind = self.surr_combo.currentData()
        if seg is None or kind == seg.surroundings.kind:
            return
        # remember what this segment had under the kind it leaves, so switching back restores it
        key = (self.doc.current_index, self.doc.selected_segment, seg.name)
        remembered = self._surroundings_memory.setdefault(key, {})
        remembered[seg.surroundings.kind] = seg.surroundings.model_dump()
        if seg.heat_input_W_per_m > 0:
            remembered["heat_input_W_per_m"] = seg.heat_input_W_per_m
        if kind in remembered:
            new: dict = dict(remembered[kind])
        else:
            new = {"kind": kind}
            old_key = _SURR_TEMPERATURE_KEY.get(seg.surroundings.kind)
            new_key = _SURR_TEMPERATURE_KEY.get(kind)
            if old_key and new_key and kind != "fixed_wall" and seg.surroundings.kind != "fixed_wall":
                new[new_key] = getattr(seg.surroundings, old_key)
        changes: dict = {"surroundings": new}
        if kind == "fixed_wall" and seg.heat_input_W_per_m > 0:
            changes["heat_input_W_per_m"] = 0.0  # a held wall takes no tracing; one undo step restores both
        elif seg.surroundings.kind == "fixed_wall" and seg.heat_input_W_per_m == 0 and "heat_input_W_per_m" in remembered:
            changes["heat_input_W_per_m"] = remembered["heat_input_W_per_m"]  # the tracing it had before
        self._set(changes, text=f"Set surroundings of '{seg.name}' to {SURROUNDINGS_KINDS[kind].split(' (')[0]}")

    def _on_fixed_source(self, button_id: int) -> None:
        seg = self.doc.selected
        if seg is None or seg.surroundings.kind != "fixed_wall" or self._loading:
            return
        s = seg.surroundings
        if button_id == 1 and s.steam_pressure_Pa is None:
            self._set({"surroundings.wall_temperature_K": None, "surroundings.steam_pressure_Pa": 5e5},
                      text=f"Hold wall of '{seg.name}' with steam")
        elif button_id == 0 and s.wall_temperature_K is None:
            self._set({"surroundings.wall_temperature_K": 423.15, "surroundings.steam_pressure_Pa": None},
                      text=f"Hold wall of '{seg.name}' at a temperature")

    # layers
    def add_layer(self) -> None:
        seg = self.doc.selected
        if seg is None:
            return
        try:
            mats = _catalogue().INSULATION_MATERIALS
            key = "mineral wool" if "mineral wool" in mats else next(iter(mats))
            k = mats[key].conductivity_W_per_mK
        except Exception:
            key, k = "mineral wool", 0.04
        layers = [l.model_dump() for l in seg.insulation]
        layers.append({"material": key, "thickness_m": 0.05, "conductivity_W_per_mK": k})
        self._set({"insulation": layers}, text=f"Add insulation layer to '{seg.name}'", error_label=self.layer_error)

    def remove_layer(self) -> None:
        seg = self.doc.selected
        if seg is None or not seg.insulation:
            return
        row = self.layer_table.currentRow()
        row = row if 0 <= row < len(seg.insulation) else len(seg.insulation) - 1
        layers = [l.model_dump() for i, l in enumerate(seg.insulation) if i != row]
        self._set({"insulation": layers}, text=f"Remove insulation layer from '{seg.name}'",
                  error_label=self.layer_error)

    def _on_layer_material(self, row: int, key: str) -> None:
        seg = self.doc.selected
        if seg is None or self._loading:
            return
        changes: dict = {f"insulation.{row}.material": key}
        try:  # a new material brings its typical conductivity (one undo step)
            changes[f"insulation.{row}.conductivity_W_per_mK"] = _catalogue().INSULATION_MATERIALS[key].conductivity_W_per_mK
        except Exception:
            pass
        self._set(changes, text=f"Set insulation material of '{seg.name}'", error_label=self.layer_error)

    # fittings
    def add_fitting(self, kind: str = "elbow_90_standard") -> None:
        seg = self.doc.selected
        if seg is None:
            return
        try:
            labels = _fitting_labels()
            if kind not in labels:
                kind = next(iter(labels))
        except Exception:
            kind = "custom"
        fits = [f.model_dump() for f in seg.fittings]
        fits.append({"kind": kind, "count": 1, "K": 0.5 if kind == "custom" else None})
        self._set({"fittings": fits}, text=f"Add fitting to '{seg.name}'", error_label=self.fitting_error)

    def remove_fitting(self) -> None:
        seg = self.doc.selected
        if seg is None or not seg.fittings:
            return
        row = self.fitting_table.currentRow()
        row = row if 0 <= row < len(seg.fittings) else len(seg.fittings) - 1
        fits = [f.model_dump() for i, f in enumerate(seg.fittings) if i != row]
        self._set({"fittings": fits}, text=f"Remove fitting from '{seg.name}'", error_label=self.fitting_error)

    def _on_fitting_kind(self, row: int, kind: str) -> None:
        seg = self.doc.selected
        if seg is None or self._loading:
            return
        changes: dict = {f"fittings.{row}.kind": kind}
        if kind == "custom" and seg.fittings[row].K is None:
            changes[f"fittings.{row}.K"] = 0.5
        elif kind != "custom":
            changes[f"fittings.{row}.K"] = None
        self._set(changes, text=f"Set fitting kind in '{seg.name}'", error_label=self.fitting_error)
