"""The Segment Card's steam tracer section: steam tube tracers laid along the pipe.

On/off, the steam pressure (absolute), the number of tubes, their outside diameter and how they
touch the pipe (bare, or bedded in heat-transfer cement). Every entry goes through the card's one
edit/refuse path. Turning the tracer off and on again gives back the settings it had. A jacket or
a fixed wall already sets what is outside the pipe, so with either the section is switched off
and says why (switching to one of them removes a tracer in the same undo step; see
:mod:`app.panels.surroundings_box`).
"""

from __future__ import annotations

from PySide6.QtWidgets import QCheckBox, QGroupBox, QSpinBox

from app import units
from app.panels.editing import EditorPanel, error_hint, hint, section_form, set_combo_data
from app.widgets.elided import ElidedComboBox
from solver import steam
from solver.model import SteamTracer

#: SteamTracer.contact -> the words in the combo
CONTACT_CHOICES: dict[str, str] = {
    "bare": "Bare, wired to the pipe",
    "cement": "Bedded in heat-transfer cement",
}

#: surroundings that leave no place for a tracer -> why, in the section's note
NO_TRACER_BECAUSE: dict[str, str] = {
    "jacket": "Not with a jacket: the jacket medium already sets what is outside the pipe. "
              "Choose other surroundings to trace this segment with steam.",
    "fixed_wall": "Not with a fixed wall: the wall temperature, or the steam on the wall, already heats "
                  "the pipe. Choose other surroundings to trace this segment with steam.",
}

TRACER_HINT = ("Saturated steam in tubes along the pipe, under the insulation. The heat they give "
               "depends on the pipe temperature; heat-transfer cement passes about ten times what a bare "
               "tube does.")


def contact_text(tracer: SteamTracer, system: str) -> str:
    """What one tube passes to the pipe as laid, and where the figure comes from."""
    c = steam.tracer_conductance_W_per_mK(tracer.contact, tracer.tube_outer_diameter_m)
    return (f"Each tube passes about {units.format_value(c, 'conductivity', system, 2)} to the pipe "
            "(published tracing-design value, from memory).")
MAX_TUBES = next(m.le for m in SteamTracer.model_fields["count"].metadata if hasattr(m, "le"))  # the model's limit


class SteamTracerBox(QGroupBox):
    """The 'Steam tracer' group of the Segment Card."""

    def __init__(self, editor: EditorPanel):
        super().__init__("Steam tracer")
        self.editor = editor
        self._memory: dict = {}  # (alternative, segment, name) -> the tracer it had when turned off
        form = section_form(self)
        self.form = form
        self.on_check = QCheckBox("Traced with steam tubes")
        self.on_check.clicked.connect(self.on_toggle)
        form.addRow(self.on_check)
        self.pressure_edit = editor.quantity_edit("pressure", "Tracer steam pressure",
                                                  "steam_tracer.steam_pressure_Pa")
        form.addRow("Steam pressure", self.pressure_edit)
        self.count_spin = QSpinBox()
        self.count_spin.setRange(1, MAX_TUBES)
        self.count_spin.setKeyboardTracking(False)  # one edit per finished entry, not per digit
        self.count_spin.setToolTip(f"Tracer tubes along the pipe, 1 to {MAX_TUBES}")
        self.count_spin.valueChanged.connect(self.on_count)
        form.addRow("Number of tubes", self.count_spin)
        self.diameter_edit = editor.quantity_edit("diameter", "Tracer tube outside diameter",
                                                  "steam_tracer.tube_outer_diameter_m")
        self.diameter_edit.line_edit.setToolTip("Outside diameter of one tracer tube; 3/8 in, 1/2 in and "
                                                "5/8 in are common (type e.g. 1/2 in as 0.5 in).")
        form.addRow("Tube outside diameter", self.diameter_edit)
        self.contact_combo = ElidedComboBox()  # shortened with '…' in a narrow dock, whole in the tooltip
        for key, text in CONTACT_CHOICES.items():
            self.contact_combo.addItem(text, key)
        self.contact_combo.activated.connect(self.on_contact)
        form.addRow("Contact", self.contact_combo)
        self.note = hint(TRACER_HINT)
        form.addRow(self.note)
        self.error = error_hint()
        form.addRow(self.error)
        self._fields = (self.pressure_edit, self.count_spin, self.diameter_edit, self.contact_combo)

    # ------------------------------------------------------------------ model -> widgets

    def show_segment(self, seg) -> None:
        tracer = seg.steam_tracer
        refused_by = NO_TRACER_BECAUSE.get(seg.surroundings.kind)
        self.on_check.setChecked(tracer is not None)
        self.on_check.setEnabled(refused_by is None)
        for w in self._fields:
            self.form.setRowVisible(w, tracer is not None)
        self.note.setText(refused_by or TRACER_HINT + ("" if tracer is None else
                                                       " " + contact_text(tracer, self.editor.doc.unit_system)))
        self.note.setVisible(refused_by is not None or tracer is not None)
        self.error.hide()
        if tracer is None:
            return
        self.pressure_edit.set_value(tracer.steam_pressure_Pa)
        self.count_spin.blockSignals(True)
        self.count_spin.setValue(tracer.count)
        self.count_spin.blockSignals(False)
        self.diameter_edit.set_value(tracer.tube_outer_diameter_m)
        set_combo_data(self.contact_combo, tracer.contact)

    # ------------------------------------------------------------------ widgets -> commands

    def _key(self, seg) -> tuple:
        doc = self.editor.doc
        return (doc.current_index, doc.selected_segment, seg.name)

    def on_toggle(self, checked: bool) -> None:
        seg = self.editor.doc.selected
        if seg is None or self.editor.loading or checked == (seg.steam_tracer is not None):
            return
        if checked:
            tracer = self._memory.get(self._key(seg)) or SteamTracer().model_dump()
            text = f"Trace '{seg.name}' with steam"
        else:
            self._memory[self._key(seg)] = seg.steam_tracer.model_dump()  # turning it on again restores it
            tracer = None
            text = f"Remove the steam tracer of '{seg.name}'"
        if not self.editor.set_fields({"steam_tracer": tracer}, text=text, error_label=self.error):
            self.on_check.setChecked(seg.steam_tracer is not None)  # the model refused: show what it holds

    def on_count(self, count: int) -> None:
        seg = self.editor.doc.selected
        if seg is None or seg.steam_tracer is None or self.editor.loading:
            return
        if not self.editor.set_fields({"steam_tracer.count": count}, error_label=self.error):
            self.count_spin.blockSignals(True)
            self.count_spin.setValue(seg.steam_tracer.count)
            self.count_spin.blockSignals(False)

    def on_contact(self, _index: int) -> None:
        seg = self.editor.doc.selected
        if seg is None or seg.steam_tracer is None:
            return
        key = self.contact_combo.currentData()
        if not self.editor.set_fields({"steam_tracer.contact": key},
                                      text=f"Steam tracer of '{seg.name}': {CONTACT_CHOICES[key].lower()}",
                                      error_label=self.error):
            set_combo_data(self.contact_combo, seg.steam_tracer.contact)

