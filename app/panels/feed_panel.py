"""Feed: what enters the line (fluid, inlet temperature and pressure, flow) and the limits.

Edits go through undoable commands on the Document; the panel refreshes from the model with
signals blocked. The user-defined fluid editor takes a table typed in or pasted from a
spreadsheet (tab, comma or semicolon separated) with a header row stating the units.
"""

from __future__ import annotations

import re
from typing import Optional

from pydantic import ValidationError
from PySide6.QtCore import Qt
from PySide6.QtGui import QGuiApplication
from PySide6.QtWidgets import (
    QAbstractItemView,
    QButtonGroup,
    QComboBox,
    QDialog,
    QDialogButtonBox,
    QDoubleSpinBox,
    QFormLayout,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QLineEdit,
    QPushButton,
    QRadioButton,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from app import commands, units
from app.panels.editing import EditorPanel, error_hint, hint, push_edit, refusal_text, section, set_combo_data
from app.widgets.quantity_edit import ERROR_COLOUR, QuantityEdit
from solver.catalogue import SOLUTIONS
from solver.properties import PURE_FLUIDS

#: Feed.inlet_flow -> (combo text, what it means); the combo's tooltip and the hint say why it matters
INLET_FLOW_CHOICES: dict[str, tuple[str, str]] = {
    "developing": ("Develops from the inlet",
                   "The line starts at a vessel, header or tee: the flow develops along the first "
                   "diameters, where the inside film coefficient is higher."),
    "developed": ("Arrives fully developed",
                  "A long straight pipe runs upstream: the flow is fully developed at the inlet, with no "
                  "entrance gain in the inside film coefficient."),
}
INLET_FLOW_HINT = ("Develops: fed from a vessel or header; the inside film coefficient is higher over the "
                   "first few diameters. Fully developed: long straight pipe upstream, no such gain. "
                   "A short first segment feels the difference most.")

# columns of a user-defined fluid table: model key, heading, quantity
TABLE_COLUMNS = [
    ("temperature_K", "T", "temperature"),
    ("density_kg_per_m3", "ρ", "density"),
    ("specific_heat_J_per_kgK", "cp", "specific_heat"),
    ("viscosity_Pa_s", "μ", "viscosity"),
    ("conductivity_W_per_mK", "k", "conductivity"),
]

PASTE_HELP = (
    "Paste rows copied from a spreadsheet: five columns T, density, specific heat, viscosity, "
    "thermal conductivity, separated by tabs, commas or semicolons, temperatures increasing. "
    "A first header row may state units in brackets, e.g.\n"
    "T [°C]   rho [kg/m3]   cp [kJ/(kg K)]   mu [mPa s]   k [W/(m K)]\n"
    "Columns without a stated unit are read in the units shown in the table heading."
)


def _unit_text(text: str) -> str:
    """Spreadsheet spellings -> pint: 'kg/m3' -> 'kg/m**3'."""
    return re.sub(r"([A-Za-z])([23])\b", r"\1**\2", text.strip())


def parse_table_text(text: str, system: str) -> list[dict]:
    """Rows of a pasted table as model dicts (SI). Raises ValueError naming row and column."""
    lines = [ln for ln in text.replace("\r", "").split("\n") if ln.strip()]
    if not lines:
        raise ValueError("the clipboard holds no text")
    if "\t" in text:
        split = lambda ln: [c.strip() for c in ln.split("\t")]  # noqa: E731
    elif ";" in text:  # semicolon lists often use a decimal comma
        split = lambda ln: [c.strip().replace(",", ".") for c in ln.split(";")]  # noqa: E731
    else:
        split = lambda ln: [c.strip() for c in ln.split(",")]  # noqa: E731
    header_units: list[Optional[str]] = [None] * len(TABLE_COLUMNS)
    first = split(lines[0])
    try:
        float(first[0])
    except ValueError:  # a header row: units in [..] or (..)
        for i, cell in enumerate(first[: len(TABLE_COLUMNS)]):
            m = re.search(r"\[(.+)\]", cell) or re.search(r"\((.+)\)\s*$", cell)
            header_units[i] = _unit_text(m.group(1)) if m else None
        lines = lines[1:]
    rows = []
    for r, ln in enumerate(lines, start=1):
        cells = split(ln)
        if len(cells) < len(TABLE_COLUMNS):
            raise ValueError(f"row {r}: expected {len(TABLE_COLUMNS)} columns, got {len(cells)}: {ln!r}")
        row = {}
        for c, (key, head, quantity) in enumerate(TABLE_COLUMNS):
            cell = cells[c]
            text_value = f"{cell} {header_units[c]}" if header_units[c] else cell
            try:
                row[key] = units.parse(text_value, quantity, system, f"row {r}, column {head}")
            except units.UnitParseError as exc:
                raise ValueError(str(exc)) from None
        rows.append(row)
    return rows


class FluidTableDialog(QDialog):
    """Editor of a user-defined fluid: name, optional freezing/boiling points and a property table."""

    def __init__(self, fluid, system: str, parent: Optional[QWidget] = None):
        super().__init__(parent)
        self.setWindowTitle("User-defined fluid")
        self.system = system
        self.result_fluid = None
        v = QVBoxLayout(self)
        form = QFormLayout()
        self.name_edit = QLineEdit(getattr(fluid, "name", "Product"))
        form.addRow("Name", self.name_edit)
        self.freeze_edit = QuantityEdit("temperature", system, "freezing point", allow_empty=True, empty_text="unknown")
        self.boil_edit = QuantityEdit("temperature", system, "boiling point", allow_empty=True, empty_text="unknown")
        self.freeze_edit.set_value(getattr(fluid, "freezing_point_K", None))
        self.boil_edit.set_value(getattr(fluid, "boiling_point_K", None))
        form.addRow("Freezing point", self.freeze_edit)
        form.addRow("Boiling point at line pressure", self.boil_edit)
        v.addLayout(form)

        self.table = QTableWidget(0, len(TABLE_COLUMNS))
        self.table.setHorizontalHeaderLabels(
            [f"{head} [{units.label(q, system)}]" for _k, head, q in TABLE_COLUMNS])
        self.table.horizontalHeader().setSectionResizeMode(QHeaderView.Stretch)
        self.table.setSelectionBehavior(QAbstractItemView.SelectRows)
        self.table.setMinimumSize(560, 220)
        v.addWidget(self.table, 1)
        for row in getattr(fluid, "rows", []) or []:
            self._append([getattr(row, key) for key, _h, _q in TABLE_COLUMNS])

        buttons = QHBoxLayout()
        add = QPushButton("Add row")
        add.clicked.connect(lambda: self._append([None] * len(TABLE_COLUMNS)))
        rem = QPushButton("Remove row")
        rem.clicked.connect(self._remove)
        paste = QPushButton("Paste from clipboard")
        paste.setToolTip(PASTE_HELP)
        paste.clicked.connect(self.paste_from_clipboard)
        for b in (add, rem, paste):
            buttons.addWidget(b)
        buttons.addStretch(1)
        v.addLayout(buttons)
        v.addWidget(hint(PASTE_HELP + " Values are interpolated between rows, never extrapolated."))
        self.error_label = QLabel()
        self.error_label.setWordWrap(True)
        self.error_label.setStyleSheet(f"color: {ERROR_COLOUR};")
        v.addWidget(self.error_label)
        box = QDialogButtonBox(QDialogButtonBox.Ok | QDialogButtonBox.Cancel)
        box.accepted.connect(self.try_accept)
        box.rejected.connect(self.reject)
        v.addWidget(box)

    def _append(self, si_values: list[Optional[float]]) -> None:
        r = self.table.rowCount()
        self.table.insertRow(r)
        for c, (_key, _head, quantity) in enumerate(TABLE_COLUMNS):
            value = si_values[c]
            text = "" if value is None else f"{units.to_display(value, quantity, self.system):.6g}"
            self.table.setItem(r, c, QTableWidgetItem(text))

    def _remove(self) -> None:
        r = self.table.currentRow()
        if r >= 0:
            self.table.removeRow(r)

    def paste_from_clipboard(self, text: Optional[str] = None) -> bool:
        if not isinstance(text, str):
            text = QGuiApplication.clipboard().text()
        try:
            rows = parse_table_text(text, self.system)
        except ValueError as exc:
            self.error_label.setStyleSheet(f"color: {ERROR_COLOUR};")
            self.error_label.setText(f"Nothing pasted: {exc}")
            return False
        self.error_label.setStyleSheet("color: #5B6770;")
        self.table.setRowCount(0)
        for row in rows:
            self._append([row[key] for key, _h, _q in TABLE_COLUMNS])
        self.error_label.setText(f"{len(rows)} rows pasted.")
        return True

    def build_fluid(self):
        """The TableFluid the dialog describes; raises ValueError with every problem."""
        from solver.model import TableFluid

        rows = []
        for r in range(self.table.rowCount()):
            row = {}
            for c, (key, head, quantity) in enumerate(TABLE_COLUMNS):
                item = self.table.item(r, c)
                text = item.text().strip() if item else ""
                try:
                    row[key] = units.parse(text, quantity, self.system, f"row {r + 1}, column {head}")
                except units.UnitParseError as exc:
                    raise ValueError(str(exc)) from None
            rows.append(row)
        data = {"kind": "table", "name": self.name_edit.text().strip() or "Product", "rows": rows,
                "freezing_point_K": self.freeze_edit.value(), "boiling_point_K": self.boil_edit.value()}
        try:
            return TableFluid.model_validate(data)
        except ValidationError as exc:
            raise ValueError(refusal_text(exc, self.system, prefix="fluid")) from None

    def try_accept(self) -> None:
        for e in (self.freeze_edit, self.boil_edit):
            e.commit()
        if self.freeze_edit.has_error or self.boil_edit.has_error:
            return
        try:
            self.result_fluid = self.build_fluid()
        except ValueError as exc:
            self.error_label.setStyleSheet(f"color: {ERROR_COLOUR};")
            self.error_label.setText(str(exc))
            return
        self.accept()


class FeedPanel(EditorPanel):
    """Fluid, inlet state, flow and limits of the current alternative."""

    def __init__(self, doc, parent: Optional[QWidget] = None):
        super().__init__(doc, parent)
        self._shown_alt = doc.current_index
        self._shown_model = None  # the alternative (a value: every change swaps in a new one) and unit
        self._shown_system = ""  # system the widgets were last filled from
        self._last_tables: dict = {}  # alternative name -> its last user-defined table fluid
        self.table_dialog: Optional[FluidTableDialog] = None
        col = QVBoxLayout(self)
        col.setContentsMargins(6, 4, 6, 6)
        col.setSpacing(8)

        box, form = section("Fluid")
        self.fluid_combo = QComboBox()
        self.fluid_combo.setToolTip("Generic fluids; properties along the line from CoolProp or your table")
        for code, label in PURE_FLUIDS.items():
            self.fluid_combo.addItem(label, f"pure:{code}")
        self.fluid_combo.insertSeparator(self.fluid_combo.count())
        for code, (label, basis, _lo, _hi) in SOLUTIONS.items():
            self.fluid_combo.addItem(f"{label} in water", f"solution:{code}")
        self.fluid_combo.insertSeparator(self.fluid_combo.count())
        self.fluid_combo.addItem("User-defined (table)…", "table:")
        self.fluid_combo.activated.connect(self._on_fluid)
        form.addRow("Fluid", self.fluid_combo)
        self.conc_label = QLabel("Concentration")
        self.conc_spin = QDoubleSpinBox()
        self.conc_spin.setDecimals(1)
        self.conc_spin.setSuffix(" %")
        self.conc_spin.setKeyboardTracking(False)
        self.conc_spin.valueChanged.connect(self._on_concentration)
        form.addRow(self.conc_label, self.conc_spin)
        self.table_btn = QPushButton("Edit table…")
        self.table_btn.clicked.connect(self.open_table_editor)
        self.table_label = hint("")
        trow = QWidget()
        th = QHBoxLayout(trow)
        th.setContentsMargins(0, 0, 0, 0)
        th.addWidget(self.table_btn)
        th.addWidget(self.table_label, 1)
        self.table_row = trow
        form.addRow("", trow)
        self.fluid_error = error_hint()
        self.panel_error = self.fluid_error  # refusals of the fluid choices show here
        form.addRow(self.fluid_error)
        col.addWidget(box)

        box, form = section("Inlet")
        self.temp_edit = self.quantity_edit("temperature", "Inlet temperature", "feed.inlet_temperature_K")
        form.addRow("Temperature", self.temp_edit)
        self.pressure_edit = self.quantity_edit("pressure", "Inlet pressure", "feed.inlet_pressure_Pa")
        form.addRow("Pressure (absolute)", self.pressure_edit)
        flow_row = QWidget()
        fh = QHBoxLayout(flow_row)
        fh.setContentsMargins(0, 0, 0, 0)
        self.mass_radio = QRadioButton("Mass flow")
        self.volume_radio = QRadioButton("Volume flow")
        self.volume_radio.setToolTip("Converted to mass flow with the density at inlet temperature and pressure")
        self.flow_group = QButtonGroup(self)
        self.flow_group.addButton(self.mass_radio, 0)
        self.flow_group.addButton(self.volume_radio, 1)
        self.flow_group.idClicked.connect(self._on_flow_kind)
        fh.addWidget(self.mass_radio)
        fh.addWidget(self.volume_radio)
        fh.addStretch(1)
        form.addRow("Flow given as", flow_row)
        self.mass_edit = self.quantity_edit("mass_flow", "Mass flow", "feed.mass_flow_kg_per_s")
        self.volume_edit = self.quantity_edit("volume_flow", "Volume flow", "feed.volume_flow_m3_per_s")
        self.flow_label = QLabel("Mass flow")
        flow_stack = QWidget()
        fs = QVBoxLayout(flow_stack)
        fs.setContentsMargins(0, 0, 0, 0)
        fs.addWidget(self.mass_edit)
        fs.addWidget(self.volume_edit)
        form.addRow(self.flow_label, flow_stack)
        self.inlet_flow_combo = QComboBox()
        for key, (text, meaning) in INLET_FLOW_CHOICES.items():
            self.inlet_flow_combo.addItem(text, key)
            self.inlet_flow_combo.setItemData(self.inlet_flow_combo.count() - 1, meaning, Qt.ToolTipRole)
        self.inlet_flow_combo.setToolTip("\n\n".join(f"{text}: {meaning}" for text, meaning in INLET_FLOW_CHOICES.values()))
        self.inlet_flow_combo.activated.connect(self._on_inlet_flow)
        form.addRow("Flow at inlet", self.inlet_flow_combo)
        self.inlet_flow_hint = hint(INLET_FLOW_HINT)
        form.addRow("", self.inlet_flow_hint)
        self.inlet_error = error_hint()
        form.addRow(self.inlet_error)
        col.addWidget(box)

        box, form = section("Limits (empty = none)")
        self.max_wall_edit = self.quantity_edit("temperature", "Max inner-wall temperature",
                                                "limits.max_inner_wall_temperature_K", allow_empty=True,
                                                empty_text="none")
        self.max_wall_edit.line_edit.setToolTip(
            "Highest allowed inner-wall temperature (film or degradation limit of the fluid). Empty = none.")
        form.addRow("Max inner-wall temperature", self.max_wall_edit)
        self.min_bulk_edit = self.quantity_edit("temperature", "Min bulk temperature",
                                                "limits.min_bulk_temperature_K", allow_empty=True,
                                                empty_text="none")
        self.min_bulk_edit.line_edit.setToolTip(
            "Lowest allowed bulk temperature (e.g. pour or cloud point). Empty = none.")
        form.addRow("Min bulk temperature", self.min_bulk_edit)
        self.maintain_edit = self.quantity_edit("temperature", "Maintain temperature",
                                                "limits.maintain_temperature_K", allow_empty=True,
                                                empty_text="min bulk, else 5 K above freezing")
        self.maintain_edit.line_edit.setToolTip(
            "The temperature the tracing must hold in the worst design case (Project details). Empty = the min "
            "bulk temperature, else 5 K above the freezing point (freeze protection, common practice). The "
            "owner's specification decides it.")
        form.addRow("Maintain temperature", self.maintain_edit)
        col.addWidget(box)
        col.addStretch(1)

        doc.project_changed.connect(self._on_project_changed)
        doc.project_replaced.connect(self.refresh)
        doc.current_alternative_changed.connect(self._on_alternative)
        doc.units_changed.connect(self._on_units)
        self.refresh()

    # ------------------------------------------------------------------ model -> widgets

    def _on_units(self, system: str) -> None:
        self.set_unit_system(system)
        self.refresh()

    def _on_alternative(self, *_args) -> None:
        self.commit_pending()  # typed text belongs to the alternative it was typed for
        self.reset_edits()
        self.refresh()

    def refresh(self, *_args) -> None:
        self._shown_alt = self.doc.current_index
        self._shown_model = self.doc.current_alternative
        self._shown_system = self.doc.unit_system
        self.remember_table()
        self.loading = True
        try:
            self._show(self.doc.current_alternative)
        finally:
            self.loading = False

    def _on_project_changed(self) -> None:
        """An edit: fill only the sections whose values differ from what the widgets show.

        Most edits change a segment (nothing here changes) or one field typed into this panel
        (shown already). Values are compared, so the source of the edit does not matter.
        """
        alt, prev = self.doc.current_alternative, self._shown_model
        if prev is None or self._shown_alt != self.doc.current_index or self._shown_system != self.doc.unit_system:
            self.refresh()
            return
        self._shown_model = alt
        self.remember_table()
        self.loading = True
        try:
            if alt.fluid != prev.fluid:
                self._show_fluid(alt)
            else:
                self.fluid_error.hide()  # a successful edit clears a refusal, as a refill did
            if alt.feed != prev.feed:
                self._show_feed(alt)
            if alt.limits != prev.limits:
                self._show_limits(alt)
        finally:
            self.loading = False

    def _show(self, alt) -> None:
        self._show_fluid(alt)
        self._show_feed(alt)
        self._show_limits(alt)

    def _show_fluid(self, alt) -> None:
        fluid = alt.fluid
        key = {"pure": f"pure:{getattr(fluid, 'name', '')}", "solution": f"solution:{getattr(fluid, 'solute', '')}",
               "table": "table:"}[fluid.kind]
        self.fluid_combo.blockSignals(True)
        table_item = self.fluid_combo.findData("table:")
        self.fluid_combo.setItemText(
            table_item, f"{fluid.name} (table)" if fluid.kind == "table" else "User-defined (table)…")
        i = self.fluid_combo.findData(key)
        if i < 0:
            self.fluid_combo.addItem(key.split(":", 1)[1], key)
            i = self.fluid_combo.count() - 1
        self.fluid_combo.setCurrentIndex(i)
        self.fluid_combo.blockSignals(False)
        is_solution = fluid.kind == "solution"
        self.conc_label.setVisible(is_solution)
        self.conc_spin.setVisible(is_solution)
        if is_solution:
            label, basis, lo, hi = SOLUTIONS.get(fluid.solute, (fluid.solute, "mass", 0.0, 1.0))
            self.conc_label.setText(f"Concentration (by {basis})")
            self.conc_spin.blockSignals(True)
            self.conc_spin.setRange(lo * 100.0, hi * 100.0)
            self.conc_spin.setValue(fluid.concentration * 100.0)
            self.conc_spin.blockSignals(False)
            self.conc_spin.setToolTip(f"{label}: {lo * 100:.0f}–{hi * 100:.0f} % by {basis}")
        self.table_row.setVisible(fluid.kind == "table")
        if fluid.kind == "table":
            self.table_label.setText(f"{fluid.name}: {len(fluid.rows)} rows, "
                                     f"{units.format_value(fluid.rows[0].temperature_K, 'temperature', self.doc.unit_system)}"
                                     f" to {units.format_value(fluid.rows[-1].temperature_K, 'temperature', self.doc.unit_system)}")
        self.fluid_error.hide()

    def _show_feed(self, alt) -> None:
        feed = alt.feed
        self.temp_edit.set_value(feed.inlet_temperature_K)
        self.pressure_edit.set_value(feed.inlet_pressure_Pa)
        by_mass = feed.mass_flow_kg_per_s is not None
        self.mass_radio.setChecked(by_mass)
        self.volume_radio.setChecked(not by_mass)
        self.mass_edit.setVisible(by_mass)
        self.volume_edit.setVisible(not by_mass)
        self.flow_label.setText("Mass flow" if by_mass else "Volume flow")
        self.mass_edit.set_value(feed.mass_flow_kg_per_s)
        self.volume_edit.set_value(feed.volume_flow_m3_per_s)
        set_combo_data(self.inlet_flow_combo, feed.inlet_flow)
        self.inlet_error.hide()

    def _show_limits(self, alt) -> None:
        self.max_wall_edit.set_value(alt.limits.max_inner_wall_temperature_K)
        self.min_bulk_edit.set_value(alt.limits.min_bulk_temperature_K)
        self.maintain_edit.set_value(alt.limits.maintain_temperature_K)

    # ------------------------------------------------------------------ widgets -> commands

    def set_fields(self, changes: dict, source: Optional[QuantityEdit] = None, text: Optional[str] = None,
                   error_label: Optional[QLabel] = None) -> bool:
        """One SetAlternativeFields command (one undo step) on the alternative the panel shows."""
        if self.loading:
            return False
        alt_index = self._shown_alt
        if alt_index >= len(self.doc.project.alternatives):
            return False
        return push_edit(self.doc,
                         lambda: commands.SetAlternativeFields(self.doc, alt_index, changes, text),
                         lambda msg: self.refuse(msg, source, error_label),
                         model=self.doc.project.alternatives[alt_index], changes=changes)

    def _on_fluid(self, _index: int) -> None:
        kind, code = (self.fluid_combo.currentData() or "pure:Water").split(":", 1)
        alt = self.doc.current_alternative
        if kind == "pure":
            self.set_fields({"fluid": {"kind": "pure", "name": code}}, text=f"Set fluid to {self.fluid_combo.currentText()}")
        elif kind == "solution":
            _label, _basis, lo, hi = SOLUTIONS.get(code, ("", "mass", 0.0, 1.0))
            old = getattr(alt.fluid, "concentration", 0.3)
            conc = min(max(old, lo), hi)
            self.set_fields({"fluid": {"kind": "solution", "solute": code, "concentration": conc}},
                      text=f"Set fluid to {self.fluid_combo.currentText()}")
        else:
            self.open_table_editor()

    def _on_concentration(self, percent: float) -> None:
        if self.loading:
            return
        self.set_fields({"fluid.concentration": round(percent / 100.0, 6)})

    def open_table_editor(self) -> FluidTableDialog:
        """Open the user-defined fluid editor (non-blocking); OK applies it as one undo step."""
        fluid = self.doc.current_alternative.fluid
        if fluid.kind != "table":
            # start from the last table this alternative (or the project) used, not an empty one
            fluid = self._last_tables.get(self.doc.current_alternative.name) or next(
                (a.fluid for a in self.doc.project.alternatives if a.fluid.kind == "table"), None)
        dlg = FluidTableDialog(fluid, self.doc.unit_system, self)
        dlg.accepted.connect(lambda: self._apply_table(dlg))
        dlg.rejected.connect(self.refresh)  # put the combo back if the user cancels
        self.table_dialog = dlg
        dlg.open()
        return dlg

    def remember_table(self) -> None:
        """Keep the current alternative's user table, so choosing it again after another fluid restores it."""
        alt = self.doc.current_alternative
        if alt.fluid.kind == "table":
            self._last_tables[alt.name] = alt.fluid

    def _apply_table(self, dlg: FluidTableDialog) -> None:
        if dlg.result_fluid is not None:
            self.set_fields({"fluid": dlg.result_fluid}, text=f"Set user-defined fluid '{dlg.result_fluid.name}'")

    def _on_inlet_flow(self, _index: int) -> None:
        key = self.inlet_flow_combo.currentData()
        text = INLET_FLOW_CHOICES[key][0].lower()
        if not self.set_fields({"feed.inlet_flow": key}, text=f"Flow at inlet: {text}", error_label=self.inlet_error):
            set_combo_data(self.inlet_flow_combo, self.doc.current_alternative.feed.inlet_flow)  # the model's choice

    def _on_flow_kind(self, button_id: int) -> None:
        if self.loading:
            return
        feed = self.doc.current_alternative.feed
        by_mass = feed.mass_flow_kg_per_s is not None
        if (button_id == 0) == by_mass:
            return
        # keep the same flow: density at the inlet from the latest result (no physics here)
        res = self.doc.result
        rho = float(res.profile.density_kg_per_m3[0]) if res is not None and len(res.profile.density_kg_per_m3) else 0.0
        if not rho > 0:
            rho = 1000.0  # no result yet: water's density, so the number stays about right
        if button_id == 1:
            changes = {"feed.mass_flow_kg_per_s": None, "feed.volume_flow_m3_per_s": feed.mass_flow_kg_per_s / rho}
            text = "Give flow as volume flow"
        else:
            changes = {"feed.volume_flow_m3_per_s": None, "feed.mass_flow_kg_per_s": feed.volume_flow_m3_per_s * rho}
            text = "Give flow as mass flow"
        self.set_fields(changes, text=text)
