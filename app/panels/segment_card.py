"""Segment Card: every field of the selected segment, edited through undoable commands.

The card reads the Document's selected segment; when the model changes (an edit, undo,
redo, a new selection) it refreshes its widgets with their signals blocked, so showing a
value never sends it back as an edit. Entries go through the one edit/refuse path of
:mod:`app.panels.editing`: an entry the model refuses is marked in place with the reason, in
the user's words and units, and nothing changes.

The card holds the segment and pipe fields itself; the electric tracing is
:mod:`app.panels.heater_box`, the insulation and fittings tables are
:mod:`app.panels.layer_fitting_tables`, the heat sinks :mod:`app.panels.heat_sinks_table` and the
surroundings section is :mod:`app.panels.surroundings_box`.
"""

from __future__ import annotations

from typing import Optional

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QComboBox,
    QFrame,
    QGroupBox,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QScrollArea,
    QVBoxLayout,
    QWidget,
)

from app import commands, units
from app.panels.editing import (
    HINT_STYLE,
    EditorPanel,
    error_hint,
    hint,
    push_edit,
    refusal_text,
    section,
    set_combo_data,
)
from app.panels.fouling_field import FoulingField
from app.panels.heat_sinks_table import HeatSinksBox
from app.panels.heater_box import HeaterBox
from app.panels.layer_fitting_tables import FittingsBox, InsulationLayersBox
from app.panels.resistance_bar import HeatPathBox
from app.panels.steam_tracer_box import SteamTracerBox
from app.panels.surroundings_box import SurroundingsBox
from app.panels.tracing_need import TracingNeedBox
from app.widgets.elided import ElidedComboBox, ElidedLabel
from app.widgets.quantity_edit import QuantityEdit
from solver import catalogue
from solver.errors import CalorunError

INSIDE_FOULING_HINT = "Deposit on the bore, per m² of inside surface; 0 = clean. ▾ lists published typical values."


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


class SegmentCard(EditorPanel):
    """Editor of the selected segment of the current alternative."""

    def __init__(self, doc, parent: Optional[QWidget] = None):
        super().__init__(doc, parent)
        self._shown: Optional[tuple[int, int]] = None  # (alternative, segment) the widgets show
        self._shown_name = ""
        self._shown_seg = None  # the segment (a value: every change swaps in a new one) and unit
        self._shown_system = ""  # system the widgets were last filled from

        outer = QVBoxLayout(self)
        outer.setContentsMargins(0, 0, 0, 0)
        self.header = ElidedLabel()
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

        self.layers = InsulationLayersBox(self)
        self.fittings = FittingsBox(self)
        self.surroundings = SurroundingsBox(self)
        self.tracer = SteamTracerBox(self)
        self.heater = HeaterBox(self)
        self.heat_sinks = HeatSinksBox(self)
        # the solved segment's resistances (reads the result), first: why it loses what it loses, at a glance
        self.heat_path = HeatPathBox(doc, self)
        self.tracing_need = TracingNeedBox(doc, self)  # the design cases: need, delivered, hold time
        for box in (self.heat_path, self.tracing_need, self._build_segment_section(), self._build_pipe_section(),
                    self.heater, self.tracer, self.layers, self.fittings, self.heat_sinks, self.surroundings):
            col.addWidget(box)
        self.card_error = error_hint()
        self.panel_error = self.card_error
        col.addWidget(self.card_error)
        col.addStretch(1)
        # never narrower than its fields: a squeezed dock would cut them off (no sideways scrolling)
        self.setMinimumWidth(body.minimumSizeHint().width() + scroll.verticalScrollBar().sizeHint().width())

        doc.project_changed.connect(self._on_project_changed)
        doc.project_replaced.connect(self.refresh)
        doc.selection_changed.connect(self._on_selection)
        doc.current_alternative_changed.connect(self._on_selection)
        doc.units_changed.connect(self._on_units)
        self.refresh()

    # ------------------------------------------------------------------ building

    def _build_segment_section(self) -> QGroupBox:
        box, form = section("Segment")
        self.name_edit = QLineEdit()
        self.name_edit.editingFinished.connect(self._on_name)
        form.addRow("Name", self.name_edit)
        self.length_edit = self.quantity_edit("length", "Length", "length_m")
        form.addRow("Length", self.length_edit)
        self.elevation_edit = self.quantity_edit("elevation", "Elevation change", "elevation_change_m")
        self.elevation_edit.line_edit.setToolTip(
            "Outlet elevation minus inlet elevation: positive when the line rises.")
        form.addRow("Elevation change", self.elevation_edit)
        return box

    def _build_pipe_section(self) -> QGroupBox:
        box, form = section("Pipe")
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
        self.nps_combo.addItems(catalogue.nps_sizes())
        self.schedule_combo = QComboBox()
        self.schedule_combo.setToolTip("Wall schedule available for this size")
        self.schedule_combo.setMinimumContentsLength(5)
        row.addWidget(self.nps_combo, 1)
        row.addSpacing(4)
        row.addWidget(QLabel("Sch"))
        row.addWidget(self.schedule_combo, 1)
        self.nps_combo.activated.connect(self._on_nps)
        self.schedule_combo.activated.connect(self._on_schedule)
        form.addRow("NPS", nps_row)
        self.nps_row = nps_row
        self.id_edit = self.quantity_edit("diameter", "Inner diameter", "pipe.inner_diameter_m")
        self.wall_edit = self.quantity_edit("thickness", "Wall thickness", "pipe.wall_thickness_m")
        form.addRow("Inner diameter", self.id_edit)
        form.addRow("Wall thickness", self.wall_edit)
        self.pipe_form = form
        # one line that fits the dock: shortened with '…' (full text in the tooltip) when narrow
        self.dims_label = ElidedLabel("")
        self.dims_label.setStyleSheet(HINT_STYLE)
        self.dims_label.setToolTip("Dimensions per ASME B36.10M (carbon steel) and B36.19M (stainless 'S' schedules)")
        form.addRow("", self.dims_label)

        self.material_combo = ElidedComboBox()
        for key, mat in catalogue.PIPE_MATERIALS.items():
            self.material_combo.addItem(mat.label, key)
        self.material_combo.activated.connect(self._on_material)
        form.addRow("Material", self.material_combo)
        self.roughness_edit = self.quantity_edit("roughness", "Roughness", "pipe.roughness_m", allow_empty=True,
                                                 empty_text="material default")
        form.addRow("Roughness", self.roughness_edit)
        self.kwall_edit = self.quantity_edit("conductivity", "Wall conductivity", "pipe.wall_conductivity_W_per_mK",
                                             allow_empty=True, empty_text="material default")
        form.addRow("Wall conductivity", self.kwall_edit)
        self.fouling = FoulingField(self, "Inside fouling", "inside_fouling_m2K_per_W", "inside")
        form.addRow("Inside fouling", self.fouling)
        form.addRow("", hint(INSIDE_FOULING_HINT))
        return box

    # ---- the sections' widgets under the names the card has always had

    @property
    def surr_combo(self) -> QComboBox:
        return self.surroundings.combo

    @property
    def surr_stack(self):
        return self.surroundings.stack

    @property
    def surr_pages(self) -> dict:
        return self.surroundings.pages

    def _on_surroundings_kind(self, index: int) -> None:
        self.surroundings.on_kind(index)

    @property
    def layer_table(self):
        return self.layers.table

    def add_layer(self) -> None:
        self.layers.add_layer()

    # ------------------------------------------------------------------ showing the model

    def _on_units(self, system: str) -> None:
        self.set_unit_system(system)
        self.layers.set_headers()
        self.refresh()

    def _on_selection(self, *_args) -> None:
        self.flush_pending()
        self.reset_edits()  # marks belong to the segment they were typed for
        self.refresh()

    def flush_pending(self) -> None:
        """Commit text typed but not yet committed, to the segment it was typed for.

        Clicking another segment in the Line Strip may not take the keyboard focus, so the
        pending entry would otherwise be lost or, worse, land on the newly selected segment.
        """
        if self._shown is None:
            return
        self.commit_pending()
        if self.name_edit.text().strip() and self.name_edit.text().strip() != self._shown_name:
            self._on_name()

    def refresh(self, *_args) -> None:
        """Show the selected segment, every widget (a new selection, units, project; emits nothing)."""
        seg = self.doc.selected
        self._shown = (self.doc.current_index, self.doc.selected_segment) if seg is not None else None
        self._shown_name = seg.name if seg is not None else ""
        self._shown_seg = seg
        self._shown_system = self.doc.unit_system
        self.body.setEnabled(seg is not None)
        if seg is None:
            self.header.setText("Segment Card — no segment selected")
            return
        self.loading = True
        try:
            self._show(seg)
        finally:
            self.loading = False

    def _on_project_changed(self) -> None:
        """An edit: fill only the sections whose values differ from what the widgets show.

        Most edits change one field (often typed into this card, which shows it already) or
        another segment; refilling every widget cost ~2 ms per edit. Values are compared, so the
        source of the edit does not matter (an undo, the Line Strip, another segment moved into
        this place). A refused entry is left marked as before: its box keeps its text while the
        model value it would replace is unchanged.
        """
        seg, prev = self.doc.selected, self._shown_seg
        if (seg is None or prev is None or self._shown_system != self.doc.unit_system
                or self._shown != (self.doc.current_index, self.doc.selected_segment)):
            self.refresh()
            return
        self._shown_seg = seg
        self._shown_name = seg.name
        self.loading = True
        try:
            self._show_segment_fields(seg)
            self.heater.show_project_margin()  # a project edit (Project details) leaves the segment as it was
            if seg is not prev:
                fixed_changed = seg.surroundings.kind != prev.surroundings.kind
                if seg.pipe != prev.pipe or seg.inside_fouling_m2K_per_W != prev.inside_fouling_m2K_per_W:
                    self._show_pipe(seg)
                for box, same in ((self.heater, seg.heater == prev.heater and seg.design_margin == prev.design_margin
                                   and not fixed_changed),
                                  (self.heat_sinks, seg.heat_sinks == prev.heat_sinks),
                                  (self.layers, seg.insulation == prev.insulation and not fixed_changed),
                                  (self.fittings, seg.fittings == prev.fittings),
                                  (self.surroundings, seg.surroundings == prev.surroundings),
                                  (self.tracer, seg.steam_tracer == prev.steam_tracer and not fixed_changed)):
                    if not same:
                        box.show_segment(seg)
                    elif getattr(box, "error", None) is not None:
                        box.error.hide()  # a successful edit clears a group's refusal, as a refill did
            self.card_error.hide()
        finally:
            self.loading = False

    def _show(self, seg) -> None:
        self._show_segment_fields(seg)
        self._show_pipe(seg)
        self.heater.show_segment(seg)
        self.heat_sinks.show_segment(seg)
        self.layers.show_segment(seg)
        self.fittings.show_segment(seg)
        self.surroundings.show_segment(seg)
        self.tracer.show_segment(seg)
        self.card_error.hide()

    def _show_segment_fields(self, seg) -> None:
        n = len(self.doc.current_alternative.segments)
        header = f"Segment {self.doc.selected_segment + 1} of {n} — {seg.name}"
        if self.header.text() != header:
            self.header.setText(header)
        if not self.name_edit.hasFocus() or self.name_edit.text() != seg.name:
            self.name_edit.setText(seg.name)
        self.length_edit.set_value(seg.length_m)
        self.elevation_edit.set_value(seg.elevation_change_m)

    def _show_pipe(self, seg) -> None:
        pipe = seg.pipe
        set_combo_data(self.bore_combo, pipe.bore)
        by_nps = pipe.bore == "nps"
        self.pipe_form.setRowVisible(self.nps_row, by_nps)
        self.pipe_form.setRowVisible(self.id_edit, not by_nps)
        self.pipe_form.setRowVisible(self.wall_edit, not by_nps)
        if by_nps:
            _set_combo_text(self.nps_combo, pipe.nps or "")
            self._fill_schedules(pipe.nps)
            _set_combo_text(self.schedule_combo, pipe.schedule or "")
        self.id_edit.set_value(pipe.inner_diameter_m)
        self.wall_edit.set_value(pipe.wall_thickness_m)
        set_combo_data(self.material_combo, pipe.material, add_missing=True)
        self._show_material_defaults(pipe.material)
        self.roughness_edit.set_value(pipe.roughness_m)
        self.kwall_edit.set_value(pipe.wall_conductivity_W_per_mK)
        self.fouling.edit.set_value(seg.inside_fouling_m2K_per_W)
        self.fouling.set_unit_system(self.doc.unit_system)
        self._show_dimensions(seg)

    def _show_material_defaults(self, material: str) -> None:
        system = self.doc.unit_system
        mat = catalogue.PIPE_MATERIALS.get(material)
        if mat is None:  # a material the catalogue does not list: no default to show
            self.roughness_edit.setPlaceholderText("material default")
            self.kwall_edit.setPlaceholderText("material default")
            return
        self.roughness_edit.setPlaceholderText(
            f"default {units.format_value(mat.roughness_m, 'roughness', system, 2)}")
        self.kwall_edit.setPlaceholderText(
            f"default {units.format_value(mat.conductivity_W_per_mK, 'conductivity', system, 2, with_unit=False)}")

    def _show_dimensions(self, seg) -> None:
        pipe = seg.pipe
        system = self.doc.unit_system
        if pipe.bore == "nps":
            try:
                inner, outer, wall = catalogue.pipe_dimensions(pipe.nps, pipe.schedule)
            except CalorunError as exc:  # a size or schedule the tables do not hold
                self.dims_label.setText(refusal_text(exc, system))
                return
        else:
            inner, wall = pipe.inner_diameter_m, pipe.wall_thickness_m or 0.0
            outer = inner + 2 * wall
        num = lambda v: units.format_value(v, "diameter", system, 4, with_unit=False)  # noqa: E731
        self.dims_label.setText(f"Bore {num(inner)} · outside {num(outer)} · wall {num(wall)} "
                                f"{units.label('diameter', system)}")

    def _fill_schedules(self, nps: Optional[str]) -> None:
        self.schedule_combo.blockSignals(True)
        self.schedule_combo.clear()
        try:
            self.schedule_combo.addItems(catalogue.schedules_for(nps))
            self.schedule_combo.setEditable(False)
        except CalorunError:  # a size the tables do not hold: the schedule is typed
            self.schedule_combo.setEditable(True)
        self.schedule_combo.blockSignals(False)

    # ------------------------------------------------------------------ edits -> commands

    def set_fields(self, changes: dict, source: Optional[QuantityEdit] = None, text: Optional[str] = None,
                   error_label: Optional[QLabel] = None) -> bool:
        """One SetSegmentFields command (one undo step) on the segment the card shows."""
        if self.loading or self._shown is None:
            return False
        alt_index, seg_index = self._shown
        segments = self.doc.project.alternatives[alt_index].segments
        if seg_index >= len(segments):
            return False
        return push_edit(self.doc,
                         lambda: commands.SetSegmentFields(self.doc, alt_index, seg_index, changes, text),
                         lambda msg: self.refuse(msg, source, error_label),
                         model=segments[seg_index], changes=changes)

    def _on_name(self) -> None:
        text = self.name_edit.text().strip()
        if text:
            self.set_fields({"name": text})
        else:
            self.refuse("Name: a segment needs a name; the entry is empty.")

    def _on_bore_mode(self, _index: int) -> None:
        if self.loading:
            return
        seg = self.doc.selected
        mode = self.bore_combo.currentData()
        if seg is None or mode == seg.pipe.bore:
            return
        changes: dict = {"pipe.bore": mode}
        if mode == "diameter" and seg.pipe.inner_diameter_m is None:
            try:  # start from the catalogue bore of the current NPS and schedule
                inner, _outer, wall = catalogue.pipe_dimensions(seg.pipe.nps, seg.pipe.schedule)
            except CalorunError:  # not in the tables: a plain 50 mm bore to edit
                inner, wall = 0.05, 0.003
            changes["pipe.inner_diameter_m"] = inner
            changes["pipe.wall_thickness_m"] = wall
        self.set_fields(changes, text=f"Bore of '{seg.name}' by " + ("NPS" if mode == "nps" else "diameter"))

    def _on_nps(self, _index: int) -> None:
        seg = self.doc.selected
        if seg is None or self.loading:
            return
        nps = self.nps_combo.currentText()
        changes = {"pipe.nps": nps}
        try:
            scheds = catalogue.schedules_for(nps)
        except CalorunError:
            scheds = []  # an unknown size: the model says so when the command is built
        if scheds and seg.pipe.schedule not in scheds:  # keep the schedule if it exists for the new size
            changes["pipe.schedule"] = "40" if "40" in scheds else ("STD" if "STD" in scheds else scheds[0])
        self.set_fields(changes, text=f"Set NPS of '{seg.name}' to {nps}")

    def _on_schedule(self, _index: int) -> None:
        if self.doc.selected is not None:
            self.set_fields({"pipe.schedule": self.schedule_combo.currentText()})

    def _on_material(self, _index: int) -> None:
        key = self.material_combo.currentData() or self.material_combo.currentText()
        self.set_fields({"pipe.material": key})
