"""QuantityEdit: a line edit for one physical quantity, shown in the chosen unit system.

The value is held in SI; the text shows it in the display unit of the unit system (the unit
is written beside the box). People may type a bare number (read in the displayed unit) or a
number with any unit pint knows: ``2 in``, ``150 degF``, ``35 gpm``, ``3 bar(g)``. An entry
that cannot be read, or that the model refuses, is marked in place (red border and the
reason under the box) and nothing is emitted, so the model stays as it was.
"""

from __future__ import annotations

import math
from typing import Optional

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import QHBoxLayout, QLabel, QLineEdit, QSizePolicy, QVBoxLayout, QWidget

from app import messages, units

ERROR_COLOUR = "#D55E00"  # Okabe–Ito vermillion, as app.style uses for danger

# An example entry per quantity, for the tooltip.
EXAMPLES = {
    "temperature": "150 degF, 65 C, 338 K",
    "temperature_difference": "5 K, 9 delta_degF",
    "pressure": "3 bar(g), 4.5 bar, 60 psig, 400 kPa",
    "pressure_difference": "50 kPa, 7 psi",
    "length": "120 m, 300 ft",
    "elevation": "-3 m, 12 ft",
    "diameter": "52.5 mm, 2 in",
    "thickness": "50 mm, 2 in",
    "roughness": "0.045 mm, 0.0018 in",
    "depth": "1.2 m, 4 ft",
    "mass_flow": "3600 kg/h, 1 kg/s, 8000 lb/h",
    "volume_flow": "35 gpm, 8 m3/h, 2 L/s",
    "power_per_length": "30 W/m, 10 W/ft",
    "film_coefficient": "1000 W/m**2/K",
    "conductivity": "0.04 W/m/K",
    "speed": "5 m/s, 10 mph",
}

PRESSURE_HINT = "Absolute pressure. Gauge pressure: add (g), e.g. 3 bar(g); plain bar means absolute."


def format_for_edit(value_si: Optional[float], quantity: str, system: str) -> str:
    """Text put into the box: the display-unit number with up to 5 significant digits.

    Only shown: the model keeps its value until the user types a different one."""
    if value_si is None or not math.isfinite(value_si):
        return ""
    v = units.to_display(value_si, quantity, system)
    if not math.isfinite(v):  # overflows in the display unit (1e308 m in mm): the exponent, worked out
        exponent = math.log10(abs(value_si)) + math.log10(units.unit(quantity, system).scale)
        whole = math.floor(exponent)
        return ("-" if value_si < 0 else "") + f"{10 ** (exponent - whole):.5g}e{whole}"
    if abs(v) < 1e-12:
        v = 0.0
    return f"{v:.5g}"


class QuantityEdit(QWidget):
    """Line edit + unit label + in-place error message for one SI quantity.

    Signals
    -------
    value_committed(object): the new SI value (float), or None when ``allow_empty`` and the box
        was cleared. Emitted when editing finishes (Enter or focus leaves) and the text changed.

    ``field`` is the box's label as the user sees it ("Length"): messages about the entry name it.
    """

    value_committed = Signal(object)

    def __init__(self, quantity: str, system: str = "SI", field: str = "value", *,
                 allow_empty: bool = False, empty_text: str = "", compact: bool = False,
                 parent: Optional[QWidget] = None):
        super().__init__(parent)
        self.quantity = quantity
        self.system = system
        self.field = field
        self.allow_empty = allow_empty
        self.compact = compact
        self._value: Optional[float] = None
        self._shown_text = ""
        self._error: Optional[str] = None

        self.line_edit = QLineEdit(self)
        self.line_edit.setPlaceholderText(empty_text)
        self.line_edit.setSizePolicy(QSizePolicy.Expanding, QSizePolicy.Fixed)
        self.line_edit.setMinimumWidth(60)
        self.line_edit.editingFinished.connect(self.commit)
        self.unit_label = QLabel(self)
        self.unit_label.setMinimumWidth(44 if not compact else 0)
        self.unit_label.setStyleSheet("color: #5B6770;")
        self.error_label = QLabel(self)
        self.error_label.setWordWrap(True)
        self.error_label.setStyleSheet(f"color: {ERROR_COLOUR}; font-size: 8.5pt;")
        self.error_label.setTextInteractionFlags(Qt.TextSelectableByMouse)
        self.error_label.hide()

        row = QHBoxLayout()
        row.setContentsMargins(0, 0, 0, 0)
        row.setSpacing(4)
        row.addWidget(self.line_edit, 1)
        row.addWidget(self.unit_label)
        box = QVBoxLayout(self)
        box.setContentsMargins(0, 0, 0, 0)
        box.setSpacing(1)
        box.addLayout(row)
        if not compact:
            box.addWidget(self.error_label)
        self._refresh_unit()

    # ------------------------------------------------------------------ value

    def value(self) -> Optional[float]:
        return self._value

    def set_value(self, value_si: Optional[float]) -> None:
        """Show a value from the model. Emits nothing.

        A refused entry stays marked (with its text) while the model value it would have
        replaced is unchanged, so another edit elsewhere does not wipe the message.
        """
        value = None if value_si is None else float(value_si)
        if self._error is not None and value == self._value:
            return
        self._value = value
        self._show_value()
        self.clear_error()

    def reset(self) -> None:
        """Drop any refused entry and show the model value again."""
        self.clear_error()
        self._show_value()

    def set_unit_system(self, system: str) -> None:
        self.system = system
        self._refresh_unit()
        if self._error is None:
            self._show_value()

    def text(self) -> str:
        return self.line_edit.text()

    def setText(self, text: str) -> None:  # noqa: N802 (Qt spelling, handy in tests)
        self.line_edit.setText(text)

    def setPlaceholderText(self, text: str) -> None:  # noqa: N802
        self.line_edit.setPlaceholderText(text)

    def setEnabled(self, enabled: bool) -> None:  # noqa: N802
        super().setEnabled(enabled)

    def _show_value(self) -> None:
        self._shown_text = format_for_edit(self._value, self.quantity, self.system)
        if self.line_edit.text() != self._shown_text:  # no repaint when nothing changed
            self.line_edit.setText(self._shown_text)
            self.line_edit.setCursorPosition(0)

    def _refresh_unit(self) -> None:
        u = units.label(self.quantity, self.system)
        self.unit_label.setText(u)
        tip = [f"In {u}" if u else "Dimensionless"]
        if self.quantity == "pressure":
            tip.append(PRESSURE_HINT)
        if self.quantity in EXAMPLES:
            tip.append(f"You may type another unit, e.g. {EXAMPLES[self.quantity]}.")
        if self.allow_empty:
            tip.append("Leave empty for " + (self.line_edit.placeholderText() or "none") + ".")
        self._base_tip = "\n".join(tip)
        self.line_edit.setToolTip(self._error or self._base_tip)

    # ------------------------------------------------------------------ commit and errors

    def commit(self) -> bool:
        """Read the text; emit the SI value if it changed and is readable. Returns True if emitted."""
        text = self.line_edit.text().strip()
        if text == self._shown_text and self._error is None:
            return False
        if not text:
            if not self.allow_empty:
                self.show_error(messages.value_required(self.field, self.quantity, self.system))
                return False
            new_value = None
        else:
            try:
                new_value = units.parse(text, self.quantity, self.system, self.field)
            except units.UnitParseError as exc:
                self.show_error(str(exc))
                return False
        self.clear_error()
        self.value_committed.emit(new_value)
        if self._error is None:  # accepted by whoever listens: show it in the display unit
            if self._value != new_value:
                self._value = new_value
            self._show_value()
        return self._error is None

    def show_error(self, message: str) -> None:
        """Mark the box invalid and say why; the typed text stays so it can be corrected."""
        self._error = message
        self.line_edit.setStyleSheet(
            f"QLineEdit {{ border: 2px solid {ERROR_COLOUR}; border-radius: 3px; padding: 1px; background: #FFF4EE; }}"
        )
        self.line_edit.setToolTip(message)
        self.error_label.setText(message)
        if not self.compact:
            self.error_label.show()

    def clear_error(self) -> None:
        if self._error is None:
            return
        self._error = None
        self.line_edit.setStyleSheet("")
        self.line_edit.setToolTip(self._base_tip)
        self.error_label.clear()
        self.error_label.hide()

    @property
    def pending(self) -> bool:
        """True when the box holds typed text that has not been committed yet."""
        return self.line_edit.text().strip() != self._shown_text and self._error is None

    @property
    def has_error(self) -> bool:
        return self._error is not None

    @property
    def error_text(self) -> str:
        return self._error or ""
