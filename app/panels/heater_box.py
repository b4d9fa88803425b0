"""The Segment Card's heater section: electric tracing as the trade specifies it.

A kind (none, constant output, self-limiting, thermostat-controlled), its numbers in display units
(outputs per metre of *heater*), the parallel runs and the metres of heater per metre of pipe, and
the segment's design margin on heat loss (blank = the project's). Every entry goes through the
card's one edit/refuse path (:mod:`app.panels.editing`), one undo step each.

Switching the kind keeps what it can, in the same undo step: the runs and the spiral ratio always;
the output between constant and thermostat; the first rating point of a self-limiting heater as the
output of the others and back. What a segment had under a kind is remembered, so switching back
gives it back. A fixed wall takes no tracing: the section is switched off and says why (switching to
a fixed wall removes the heater in the same undo step; see :mod:`app.panels.surroundings_box`).
"""

from __future__ import annotations

from typing import Any, Optional

from PySide6.QtWidgets import QGroupBox, QSpinBox

from app import messages, units
from app.panels.editing import EditorPanel, error_hint, hint, section_form, set_combo_data
from app.widgets.elided import ElidedComboBox

#: the kind combo: None = no heater, then the model's kinds (messages.HEATER_KINDS holds their words)
KIND_CHOICES: dict[Optional[str], str] = {None: "None", **messages.HEATER_KINDS}

#: a new heater of each kind, when the segment had none to carry over (starting points to overwrite:
#: 20 W/m is a common small-bore freeze-protection rating; self-limiting heaters are rated at a 10 °C
#: pipe, and their output roughly halves by 65 °C — common practice, enter the maker's figures)
NEW_HEATER: dict[str, dict[str, Any]] = {
    "constant": {"kind": "constant", "output_W_per_m": 20.0},
    "self_limiting": {"kind": "self_limiting", "output_low_W_per_m": 20.0, "temperature_low_K": 283.15,
                      "output_high_W_per_m": 10.0, "temperature_high_K": 338.15},
    "thermostat": {"kind": "thermostat", "output_W_per_m": 20.0, "set_point_K": 278.15},
}

KIND_HINTS: dict[Optional[str], str] = {
    None: "No electric tracing on this segment.",
    "constant": "The same output whatever the pipe temperature (series-resistance or mineral-insulated "
                "heaters). Enters at the pipe's outer wall, under the insulation.",
    "self_limiting": "Output falls as the pipe warms: a straight line through the two rating points, "
                     "never below zero (the usual design model, common practice). Take both points from "
                     "the maker's output curve for the pipe material.",
    "thermostat": "Full output below the set point, off above: the steady solve holds the set point where "
                  "the full output can and reports the share of time it is on.",
}
FIXED_WALL_NOTE = ("Not with a fixed wall: the wall temperature, or the steam on the wall, already heats the "
                   "pipe. Choose other surroundings to trace this segment.")
RUNS_HINT = ("Outputs are per metre of heater; the pipe gets output × runs × metres of heater per metre "
             "of pipe (more than 1 where the heater is spiralled).")

def _max_runs() -> int:
    """The model's bound on heater runs (written once, in solver.model)."""
    from solver.model import ConstantHeater

    return next(m.le for m in ConstantHeater.model_fields["count"].metadata if hasattr(m, "le"))


def converted(heater: Optional[dict], kind: Optional[str], remembered: Optional[dict] = None) -> Optional[dict]:
    """The heater of ``kind`` that keeps what it can of ``heater`` (a dump) and of what was ``remembered``.

    Runs and spiral ratio carry over; the output carries between constant and thermostat, and from
    a self-limiting heater's first rating point (its rated output) to the others and back.
    """
    if kind is None:
        return None
    new = dict(remembered) if remembered else dict(NEW_HEATER[kind])
    if heater is None:
        return new
    for key in ("count", "heater_per_pipe_length"):
        if key in heater:
            new[key] = heater[key]
    if remembered:
        return new
    rated = heater.get("output_low_W_per_m") if heater.get("kind") == "self_limiting" else heater.get("output_W_per_m")
    if rated is not None:
        if kind == "self_limiting":
            ratio = NEW_HEATER["self_limiting"]["output_high_W_per_m"] / NEW_HEATER["self_limiting"]["output_low_W_per_m"]
            new["output_low_W_per_m"] = rated
            new["output_high_W_per_m"] = rated * ratio
        else:
            new["output_W_per_m"] = rated
    return new


class HeaterBox(QGroupBox):
    """The 'Electric tracing' group of the Segment Card."""

    def __init__(self, editor: EditorPanel):
        super().__init__("Electric tracing")
        self.editor = editor
        self._memory: dict = {}  # (alternative, segment, name) -> {kind: heater dump it had}
        form = section_form(self)
        self.form = form
        self.kind_combo = ElidedComboBox()
        for key, text in KIND_CHOICES.items():
            self.kind_combo.addItem(text, key)
        self.kind_combo.activated.connect(self.on_kind)
        form.addRow("Heater", self.kind_combo)

        q = editor.quantity_edit
        self.edits = {
            "constant.output_W_per_m": q("power_per_length", "Heater output", "heater.output_W_per_m"),
            "self_limiting.output_low_W_per_m": q("power_per_length", "Output at the lower rating temperature",
                                                  "heater.output_low_W_per_m"),
            "self_limiting.temperature_low_K": q("temperature", "Lower rating temperature",
                                                 "heater.temperature_low_K"),
            "self_limiting.output_high_W_per_m": q("power_per_length", "Output at the upper rating temperature",
                                                   "heater.output_high_W_per_m"),
            "self_limiting.temperature_high_K": q("temperature", "Upper rating temperature",
                                                  "heater.temperature_high_K"),
            "thermostat.output_W_per_m": q("power_per_length", "Full output", "heater.output_W_per_m"),
            "thermostat.set_point_K": q("temperature", "Thermostat set point", "heater.set_point_K"),
        }
        rows = {
            "constant.output_W_per_m": "Output per m of heater",
            "self_limiting.output_low_W_per_m": "Output per m of heater",
            "self_limiting.temperature_low_K": "… at pipe temperature",
            "self_limiting.output_high_W_per_m": "and output",
            "self_limiting.temperature_high_K": "… at pipe temperature",
            "thermostat.output_W_per_m": "Full output per m of heater",
            "thermostat.set_point_K": "Set point (on below)",
        }
        for key, label in rows.items():
            form.addRow(label, self.edits[key])
        self.runs_spin = QSpinBox()
        self.runs_spin.setRange(1, _max_runs())
        self.runs_spin.setKeyboardTracking(False)  # one edit per finished entry, not per digit
        self.runs_spin.setToolTip(f"Parallel heater runs along the segment, 1 to {_max_runs()}")
        self.runs_spin.valueChanged.connect(self.on_runs)
        form.addRow("Runs", self.runs_spin)
        self.ratio_edit = q("dimensionless", "Heater per metre of pipe", "heater.heater_per_pipe_length")
        self.ratio_edit.line_edit.setToolTip("Metres of heater per metre of pipe: 1 for a straight run, more "
                                             "where the heater is spiralled round the pipe.")
        form.addRow("Heater per m of pipe", self.ratio_edit)
        self.rated = hint("")
        form.addRow(self.rated)
        self.margin_edit = q("fraction", "Design margin", "design_margin", allow_empty=True,
                             empty_text="project's")
        self.margin_edit.line_edit.setToolTip(
            "Margin on the worst-case heat loss when sizing this segment's tracing (common practice 10–25 %). "
            "Leave empty for the project's margin (Project details).")
        form.addRow("Design margin", self.margin_edit)
        self.note = hint(KIND_HINTS[None])
        form.addRow(self.note)
        self.error = error_hint()
        form.addRow(self.error)
        self._kind_rows = {kind: [e for k, e in self.edits.items() if k.startswith(kind + ".")]
                           for kind in messages.HEATER_KINDS}

    # ------------------------------------------------------------------ model -> widgets

    def show_segment(self, seg) -> None:
        heater = seg.heater
        kind = heater.kind if heater is not None else None
        fixed = seg.surroundings.kind == "fixed_wall"
        system = self.editor.doc.unit_system
        set_combo_data(self.kind_combo, kind)
        self.kind_combo.setEnabled(not fixed)
        for k, edits in self._kind_rows.items():
            for e in edits:
                self.form.setRowVisible(e, k == kind)
        for w in (self.runs_spin, self.ratio_edit, self.rated):
            self.form.setRowVisible(w, heater is not None)
        if heater is not None:
            for key, e in self.edits.items():
                k, field = key.split(".", 1)
                if k == kind:
                    e.set_value(getattr(heater, field))
            self.runs_spin.blockSignals(True)
            self.runs_spin.setValue(heater.count)
            self.runs_spin.blockSignals(False)
            self.ratio_edit.set_value(heater.heater_per_pipe_length)
            word = "at its lower rating point" if kind == "self_limiting" else "full output"
            self.rated.setText(f"Rated {units.format_value(seg.heat_input_W_per_m, 'power_per_length', system, 3)} "
                               f"per length of pipe ({word})")
        self.show_project_margin()
        self.margin_edit.set_value(seg.design_margin)
        self.note.setText(FIXED_WALL_NOTE if fixed else KIND_HINTS[kind] + (" " + RUNS_HINT if heater else ""))
        self.error.hide()

    def show_project_margin(self) -> None:
        """The project's margin in the empty margin box (it changes with the project, not the segment)."""
        margin = self.editor.doc.project.design_cases.design_margin
        text = f"project's, {units.format_value(margin, 'fraction', self.editor.doc.unit_system, 3)}"
        if self.margin_edit.line_edit.placeholderText() != text:
            self.margin_edit.setPlaceholderText(text)

    # ------------------------------------------------------------------ widgets -> commands

    def _key(self, seg) -> tuple:
        doc = self.editor.doc
        return (doc.current_index, doc.selected_segment, seg.name)

    def on_kind(self, _index: int) -> None:
        seg = self.editor.doc.selected
        kind = self.kind_combo.currentData()
        current = seg.heater.kind if seg is not None and seg.heater is not None else None
        if seg is None or self.editor.loading or kind == current:
            return
        memory = self._memory.setdefault(self._key(seg), {})
        old = seg.heater.model_dump() if seg.heater is not None else None
        if old is not None:
            memory[current] = old  # switching back to this kind gives it back
        new = converted(old, kind, memory.get(kind))
        text = (f"Remove the heater of '{seg.name}'" if kind is None
                else f"Trace '{seg.name}': {KIND_CHOICES[kind].split(' (')[0].lower()}")
        if not self.editor.set_fields({"heater": new}, text=text, error_label=self.error):
            set_combo_data(self.kind_combo, current)  # the model refused: show what it holds

    def on_runs(self, count: int) -> None:
        seg = self.editor.doc.selected
        if seg is None or seg.heater is None or self.editor.loading:
            return
        if not self.editor.set_fields({"heater.count": count}, error_label=self.error):
            self.runs_spin.blockSignals(True)
            self.runs_spin.setValue(seg.heater.count)
            self.runs_spin.blockSignals(False)

