"""The Segment Card's surroundings section: what lies outside the pipe and its insulation.

One page of fields per kind (still air, wind, buried, jacket, fixed wall, adiabatic). Switching
the kind carries the temperature over, remembers what the segment had under the kind it left
(switching back restores it), and is one undo step; a fixed wall takes no tracing, so switching
to it removes the heater (electric tracing) in the same step and switching away gives it back. A
jacket or a fixed wall takes no steam tracer either: switching to one removes the tracer in the same
step, and switching on to surroundings that take one gives it back.

In air (still or wind) the outer surface's finish can be chosen from the usual jacketing
(:data:`solver.catalogue.JACKETING`): the choice sets the surface emissivity, which the box still
shows and takes as typed; an emissivity no finish has shows as "as entered".

The fixed wall is given either as a temperature (an idealisation: the wall is held exactly there)
or as the pressure of saturated steam condensing on the pipe, which heats the wall through the
condensate film and any steam-side fouling.
"""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QButtonGroup,
    QCheckBox,
    QFormLayout,
    QGroupBox,
    QRadioButton,
    QStackedWidget,
    QVBoxLayout,
    QWidget,
)

from app.panels.editing import EditorPanel, hint, section_form, set_combo_data
from app.panels.fouling_field import FoulingField
from app.widgets.elided import ElidedComboBox
from app.widgets.quantity_edit import QuantityEdit
from solver import catalogue

#: the jacketing combo's entry for an emissivity no finish in the catalogue has
AS_ENTERED = "As entered (emissivity below)"
#: the surroundings with an outer surface in air, where the finish sets the emissivity
_AIR_KINDS = ("still_air", "wind")

#: surroundings kind -> label shown in the combo (order = combo order)
SURROUNDINGS_KINDS: dict[str, str] = {
    "still_air": "Still air (natural convection + radiation)",
    "wind": "Wind (forced convection + radiation)",
    "buried": "Buried in soil",
    "jacket": "Jacket or bath medium",
    "fixed_wall": "Fixed wall temperature / steam",
    "adiabatic": "Adiabatic (no exchange)",
}

#: what each way of giving the fixed wall means (the page's note follows the choice)
FIXED_TEMPERATURE_HINT = ("The pipe's outer wall is held exactly at this temperature: an idealisation "
                          "(no film, no fouling between the heat source and the wall). "
                          "Insulation and heat input play no part.")
FIXED_STEAM_HINT = ("Steam condenses on the pipe and heats the wall through the condensate film and any "
                    "fouling: the wall runs below the steam's saturation temperature. "
                    "Insulation and heat input play no part.")

#: surroundings that take no steam tracer (the model refuses one with them)
_NO_TRACER = ("jacket", "fixed_wall")
_NO_SINKS = ("fixed_wall", "adiabatic")  # surroundings a heat sink has nothing to lose heat to

# the temperature key of each surroundings kind (carried over when the kind changes)
_TEMPERATURE_KEY = {
    "still_air": "temperature_K",
    "wind": "temperature_K",
    "buried": "soil_temperature_K",
    "jacket": "medium_temperature_K",
    "fixed_wall": "wall_temperature_K",
}

#: the fields of each kind's page: (label, quantity, model key, QuantityEdit options)
_FILM = dict(allow_empty=True, empty_text="computed")
_PAGES: dict[str, tuple[list[tuple[str, str, str, dict]], str]] = {
    "still_air": ([("Air temperature", "temperature", "temperature_K", {}),
                   ("Surface emissivity", "dimensionless", "emissivity", {}),
                   ("Outer film coefficient", "film_coefficient", "film_coefficient_W_per_m2K", _FILM)],
                  "Outer film from natural convection and radiation unless entered."),
    "wind": ([("Air temperature", "temperature", "temperature_K", {}),
              ("Wind speed", "speed", "wind_speed_m_per_s", {}),
              ("Surface emissivity", "dimensionless", "emissivity", {}),
              ("Outer film coefficient", "film_coefficient", "film_coefficient_W_per_m2K", _FILM)],
             "Wind across the pipe; outer film computed unless entered."),
    "buried": ([("Soil temperature", "temperature", "soil_temperature_K", {}),
                ("Depth to centreline", "depth", "depth_m", {}),
                ("Soil conductivity", "conductivity", "soil_conductivity_W_per_mK", {})], ""),
    "jacket": ([("Medium temperature", "temperature", "medium_temperature_K", {}),
                ("Film coefficient", "film_coefficient", "film_coefficient_W_per_m2K", {})],
               "Jacket or bath medium at a known temperature, outside the insulation (if any)."),
}


class SurroundingsBox(QGroupBox):
    """The 'Surroundings' group of the Segment Card."""

    def __init__(self, editor: EditorPanel):
        super().__init__("Surroundings")
        self.editor = editor
        self._memory: dict = {}  # (alternative, segment, name) -> settings per kind
        self._finish: dict = {}  # (alternative, segment, name) -> the jacketing key last chosen
        self.jacketing: dict[str, ElidedComboBox] = {}  # air kind -> its finish combo
        form = section_form(self)
        self.combo = ElidedComboBox()
        for key, text in SURROUNDINGS_KINDS.items():
            self.combo.addItem(text, key)
        self.combo.activated.connect(self.on_kind)
        form.addRow("Outside", self.combo)
        self.stack = QStackedWidget()
        self.pages: dict[str, QWidget] = {}
        self.edits: dict[str, QuantityEdit] = {}  # "kind.key" -> box
        for kind, (rows, note) in _PAGES.items():
            self._page(kind, rows, note)
        # still air may be a building's: then the project's design cases leave it as entered
        self.indoors = QCheckBox("Indoors: the design cases keep this air")
        self.indoors.setToolTip("Inside a building, the line sees the building's air, not the outdoor design "
                                "ambient: the worst and hot cases leave this air as entered.")
        self.indoors.clicked.connect(self.on_indoors)
        self.pages["still_air"].layout().addRow(self.indoors)
        self._fixed_wall_page()
        ad = QWidget()
        QVBoxLayout(ad).addWidget(hint("No heat is exchanged with the surroundings "
                                       "(a perfectly insulated outside)."))
        self._add_page("adiabatic", ad)
        form.addRow(self.stack)

    def _add_page(self, kind: str, page: QWidget) -> None:
        self.pages[kind] = page
        self.stack.addWidget(page)

    @staticmethod
    def _form(page: QWidget) -> QFormLayout:
        f = QFormLayout(page)
        f.setContentsMargins(0, 0, 0, 0)
        f.setLabelAlignment(Qt.AlignRight | Qt.AlignVCenter)
        return f

    def _page(self, kind: str, rows: list[tuple[str, str, str, dict]], note: str) -> None:
        w = QWidget()
        f = self._form(w)
        for label_text, quantity, key, kw in rows:
            if key == "emissivity" and kind in _AIR_KINDS:
                f.addRow("Outer surface", self._jacketing_combo(kind))
            e = self.editor.quantity_edit(quantity, label_text, f"surroundings.{key}", **kw)
            self.edits[f"{kind}.{key}"] = e
            f.addRow(label_text, e)
        if note:
            f.addRow(hint(note))
        self._add_page(kind, w)

    def _jacketing_combo(self, kind: str) -> ElidedComboBox:
        combo = ElidedComboBox()
        combo.addItem(AS_ENTERED, None)
        for key, label, emissivity, source in catalogue.jacketing_choices():
            combo.addItem(f"{label} (ε {emissivity:g})", key)
            combo.setItemData(combo.count() - 1, f"Emissivity {emissivity:g}: {source}", Qt.ToolTipRole)
        combo.setToolTip("The finish of the outer surface (jacketing over the insulation, or the bare pipe): "
                         "it sets the surface emissivity, which drives the surface temperature.")
        combo.activated.connect(lambda _i, c=combo: self.on_jacketing(c.currentData()))
        self.jacketing[kind] = combo
        return combo

    def _fixed_wall_page(self) -> None:
        fw = QWidget()
        f = self._form(fw)
        self.fixed_by_temp = QRadioButton("Wall temperature")
        self.fixed_by_steam = QRadioButton("Saturated steam at")
        self.fixed_group = QButtonGroup(self)
        self.fixed_group.addButton(self.fixed_by_temp, 0)
        self.fixed_group.addButton(self.fixed_by_steam, 1)
        self.fixed_group.idClicked.connect(self.on_fixed_source)
        self.fixed_temp_edit = self.editor.quantity_edit("temperature", "Wall temperature",
                                                         "surroundings.wall_temperature_K")
        self.fixed_steam_edit = self.editor.quantity_edit("pressure", "Steam pressure",
                                                          "surroundings.steam_pressure_Pa")
        f.addRow(self.fixed_by_temp, self.fixed_temp_edit)
        f.addRow(self.fixed_by_steam, self.fixed_steam_edit)
        self.steam_fouling = FoulingField(self.editor, "Steam-side fouling",
                                          "surroundings.steam_side_fouling_m2K_per_W", "steam")
        f.addRow("Steam-side fouling", self.steam_fouling)
        self.fixed_form = f
        self.fixed_hint = hint(FIXED_TEMPERATURE_HINT)
        f.addRow(self.fixed_hint)
        self._add_page("fixed_wall", fw)

    # ------------------------------------------------------------------ model -> widgets

    def show_segment(self, seg) -> None:
        s = seg.surroundings
        set_combo_data(self.combo, s.kind)
        self.stack.setCurrentWidget(self.pages[s.kind])
        for key, edit in self.edits.items():
            kind, field = key.split(".", 1)
            if kind == s.kind:
                edit.set_value(getattr(s, field))
        if s.kind in _AIR_KINDS:
            set_combo_data(self.jacketing[s.kind], self._finish_of(seg))
        if s.kind == "still_air":
            self.indoors.setChecked(s.indoors)
        if s.kind == "fixed_wall":
            by_steam = s.steam_pressure_Pa is not None
            self.fixed_by_steam.setChecked(by_steam)
            self.fixed_by_temp.setChecked(not by_steam)
            self.fixed_temp_edit.set_value(s.wall_temperature_K)
            self.fixed_steam_edit.set_value(s.steam_pressure_Pa)
            self.fixed_temp_edit.setEnabled(not by_steam)
            self.fixed_steam_edit.setEnabled(by_steam)
            self.fixed_form.setRowVisible(self.steam_fouling, by_steam)  # a held temperature has no steam side
            self.steam_fouling.edit.set_value(s.steam_side_fouling_m2K_per_W)
            self.steam_fouling.set_unit_system(self.editor.doc.unit_system)
            self.fixed_hint.setText(FIXED_STEAM_HINT if by_steam else FIXED_TEMPERATURE_HINT)

    # ------------------------------------------------------------------ widgets -> commands

    def on_kind(self, _index: int) -> None:
        doc = self.editor.doc
        seg = doc.selected
        kind = self.combo.currentData()
        if seg is None or kind == seg.surroundings.kind:
            return
        # remember what this segment had under the kind it leaves, so switching back restores it
        remembered = self._memory.setdefault((doc.current_index, doc.selected_segment, seg.name), {})
        remembered[seg.surroundings.kind] = seg.surroundings.model_dump()
        if seg.heater is not None:
            remembered["heater"] = seg.heater.model_dump()
        if kind in remembered:
            new: dict = dict(remembered[kind])
        else:
            new = {"kind": kind}
            old_key = _TEMPERATURE_KEY.get(seg.surroundings.kind)
            new_key = _TEMPERATURE_KEY.get(kind)
            if old_key and new_key and kind != "fixed_wall" and seg.surroundings.kind != "fixed_wall":
                new[new_key] = getattr(seg.surroundings, old_key)
        changes: dict = {"surroundings": new}
        if kind == "fixed_wall" and seg.heater is not None:
            changes["heater"] = None  # a held wall takes no tracing; one undo step restores both
        elif seg.surroundings.kind == "fixed_wall" and seg.heater is None and remembered.get("heater"):
            changes["heater"] = remembered["heater"]  # the tracing it had before
        text = f"Set surroundings of '{seg.name}' to {SURROUNDINGS_KINDS[kind].split(' (')[0]}"
        if kind in _NO_TRACER and seg.surroundings.kind not in _NO_TRACER:
            # the steam tracer goes in the same undo step; remembered (or None), so leaving gives it back
            remembered["steam_tracer"] = seg.steam_tracer.model_dump() if seg.steam_tracer is not None else None
            if seg.steam_tracer is not None:
                changes["steam_tracer"] = None
                text += " (steam tracer removed)"
        elif seg.surroundings.kind in _NO_TRACER and kind not in _NO_TRACER and seg.steam_tracer is None \
                and remembered.get("steam_tracer"):
            changes["steam_tracer"] = remembered["steam_tracer"]  # the tracer it had before
        # heat sinks lose heat to surroundings a held wall or an adiabatic outside does not have: they go in
        # the same undo step, remembered, and come back when the segment returns to air, soil or a jacket
        if kind in _NO_SINKS and seg.surroundings.kind not in _NO_SINKS:
            remembered["heat_sinks"] = [sink.model_dump() for sink in seg.heat_sinks]
            if seg.heat_sinks:
                changes["heat_sinks"] = []
                text += " (heat sinks removed)"
        elif seg.surroundings.kind in _NO_SINKS and kind not in _NO_SINKS and not seg.heat_sinks \
                and remembered.get("heat_sinks"):
            changes["heat_sinks"] = remembered["heat_sinks"]
        self.editor.set_fields(changes, text=text)

    def _key(self, seg) -> tuple:
        doc = self.editor.doc
        return (doc.current_index, doc.selected_segment, seg.name)

    def _finish_of(self, seg):
        """The jacketing the segment's emissivity stands for: the one last chosen if it still fits, else the
        first with that emissivity, else None (as entered)."""
        emissivity = seg.surroundings.emissivity
        chosen = self._finish.get(self._key(seg))
        if chosen in catalogue.JACKETING and catalogue.JACKETING[chosen].emissivity == emissivity:
            return chosen
        return next((k for k, j in catalogue.JACKETING.items() if j.emissivity == emissivity), None)

    def on_jacketing(self, key) -> None:
        """A finish chosen: its emissivity goes to the surroundings (one undo step)."""
        seg = self.editor.doc.selected
        if seg is None or self.editor.loading or seg.surroundings.kind not in _AIR_KINDS:
            return
        if key is None:  # the emissivity is typed in its box
            self._finish.pop(self._key(seg), None)
            self.edits[f"{seg.surroundings.kind}.emissivity"].line_edit.setFocus()
            return
        self._finish[self._key(seg)] = key
        finish = catalogue.JACKETING[key]
        if not self.editor.set_fields({"surroundings.emissivity": finish.emissivity},
                                      text=f"Outer surface of '{seg.name}': {finish.label.lower()}"):
            return
        # the same emissivity as before changes no model value: show the choice all the same
        set_combo_data(self.jacketing[seg.surroundings.kind], self._finish_of(seg))

    def on_indoors(self, checked: bool) -> None:
        seg = self.editor.doc.selected
        if seg is None or seg.surroundings.kind != "still_air" or self.editor.loading:
            return
        where = "indoors" if checked else "outdoors"
        self.editor.set_fields({"surroundings.indoors": bool(checked)}, text=f"'{seg.name}' runs {where}")

    def on_fixed_source(self, button_id: int) -> None:
        seg = self.editor.doc.selected
        if seg is None or seg.surroundings.kind != "fixed_wall" or self.editor.loading:
            return
        s = seg.surroundings
        if button_id == 1 and s.steam_pressure_Pa is None:
            self.editor.set_fields({"surroundings.wall_temperature_K": None, "surroundings.steam_pressure_Pa": 5e5},
                                   text=f"Hold wall of '{seg.name}' with steam")
        elif button_id == 0 and s.wall_temperature_K is None:
            self.editor.set_fields({"surroundings.wall_temperature_K": 423.15, "surroundings.steam_pressure_Pa": None},
                                   text=f"Hold wall of '{seg.name}' at a temperature")
