"""The project's design cases, as the Project details dialog edits them.

Besides the operating case (each segment's own surroundings), a traced or insulated line is designed
for a worst case (coldest design air, strongest wind, optionally no flow) and checked in a hot case
(warmest air, no flow, heaters at full output). They are set once for the project
(:class:`solver.model.DesignCases`); the defaults are placeholders, and the note says who decides.
The box only reads and gives values: the dialog pushes them with its other changes in one undo step.
"""

from __future__ import annotations

from typing import Optional

from PySide6.QtWidgets import QCheckBox, QFormLayout, QGroupBox

from app.panels.editing import hint
from app.widgets.quantity_edit import QuantityEdit
from solver.model import DesignCases

#: DesignCases field -> (label, quantity, QuantityEdit options)
CASE_FIELDS: dict[str, tuple[str, str, dict]] = {
    "worst_air_temperature_K": ("Worst case: air temperature", "temperature", {}),
    "worst_wind_speed_m_per_s": ("Worst case: wind speed", "speed", {}),
    "worst_soil_temperature_K": ("Worst case: soil temperature", "temperature",
                                 dict(allow_empty=True, empty_text="each segment's own")),
    "hot_air_temperature_K": ("Hot case: air temperature", "temperature", {}),
    "design_margin": ("Design margin on heat loss", "fraction", {}),
}

NOTE = ("Defaults are placeholders: the site's meteorological data and the owner's specification decide "
        "these. The worst case sizes the tracing (the maintain check), the hot case gives the highest wall "
        "temperature under the heaters (no flow, full output). The margin (common practice 10–25 %) is added "
        "to the worst-case loss when sizing, never to the physics; a segment may override it.")


class DesignCasesBox(QGroupBox):
    """``DesignCasesBox(cases, system)``: one box per number and the no-flow switch; :meth:`cases` reads them."""

    def __init__(self, cases: DesignCases, system: str):
        super().__init__("Design cases (every alternative)")
        form = QFormLayout(self)
        self.edits: dict[str, QuantityEdit] = {}
        for key, (label, quantity, kw) in CASE_FIELDS.items():
            edit = QuantityEdit(quantity, system, f"design_cases.{key}", **kw)
            edit.set_value(getattr(cases, key))
            self.edits[key] = edit
            if key == "hot_air_temperature_K":
                self.no_flow_check = QCheckBox("No flow in the worst case")
                self.no_flow_check.setToolTip("The worst case has the line standing still (no flow): it must hold "
                                              "its maintain temperature on the heater alone.")
                self.no_flow_check.setChecked(cases.worst_no_flow)
                form.addRow("", self.no_flow_check)
            form.addRow(label, edit)
        form.addRow(hint(NOTE))

    def commit(self) -> Optional[str]:
        """Commit typed text; the first box's refusal (in the user's words), or None."""
        for edit in self.edits.values():
            edit.commit()
            if edit.has_error:
                return edit.error_text
        return None

    def values(self) -> dict:
        """The entries as DesignCases keys and SI values (validated by whoever builds the model)."""
        out: dict = {key: edit.value() for key, edit in self.edits.items()}
        out["worst_no_flow"] = self.no_flow_check.isChecked()
        return out
