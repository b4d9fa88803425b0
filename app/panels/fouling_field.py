"""A fouling-resistance entry for the Segment Card: the box, a menu of typical values, their source.

Fouling is an allowance a designer picks from published typical values, so the box comes with a
menu of them (the ▾ beside it): choosing one puts its value in the box and commits it like a typed
entry (one undo step, the same refusal path). The values, their ranges and their source are data
in :mod:`solver.fouling`; this module only shows them, in the reader's units.
"""

from __future__ import annotations

from typing import Optional

from PySide6.QtWidgets import QHBoxLayout, QMenu, QToolButton, QWidget

from app import units
from app.panels.editing import EditorPanel
from app.widgets.quantity_edit import QuantityEdit
from solver.fouling import FOULING_SOURCE, TYPICAL_FOULING, FoulingHint


def typical_values(side: str) -> tuple[FoulingHint, ...]:
    """The typical values offered for ``side``: ``"steam"`` (steam condensing on a pipe) lists the
    steam entries; ``"inside"`` (the process fluid) lists every service, grouped as published."""
    if side == "steam":
        return tuple(h for h in TYPICAL_FOULING if h.service.startswith("Steam,"))
    return TYPICAL_FOULING


def _value(v: float, system: str, with_unit: bool = True) -> str:
    text = units.format_exact(v, "fouling_resistance", system, 3)
    return text if with_unit else text.rsplit("\u00a0", 1)[0]


def hint_text(h: FoulingHint, system: str) -> str:
    """``'River water: 0.002 h·ft²·°F/Btu (0.001–0.003)'``: the typical value and the published range."""
    text = f"{h.service}: {_value(h.typical_m2K_per_W, system)}"
    if h.low_m2K_per_W != h.high_m2K_per_W:
        text += f" ({_value(h.low_m2K_per_W, system, False)}–{_value(h.high_m2K_per_W, system, False)})"
    return text


def typical_text(side: str, system: str) -> str:
    """Every typical value of ``side`` in one tooltip, with the source."""
    lines = [hint_text(h, system) for h in typical_values(side)]
    return "Typical values, from the ▾ menu:\n" + "\n".join(lines) + f"\n\nSource: {FOULING_SOURCE}."


class FoulingField(QWidget):
    """The fouling box and its ▾ menu of typical values, for the model field at ``path``.

    ``edit`` is the :class:`QuantityEdit` (made by the editor panel, so units and pending text
    follow the panel); ``choose(value)`` is what a menu pick does (also handy in tests).
    """

    def __init__(self, editor: EditorPanel, label: str, path: str, side: str,
                 parent: Optional[QWidget] = None):
        super().__init__(parent)
        self.editor = editor
        self.side = side
        self._tip_system = ""  # unit system the tooltip was written in
        self.edit: QuantityEdit = editor.quantity_edit("fouling_resistance", label, path)
        self.button = QToolButton()
        self.button.setText("▾")  # narrow: the card must fit its dock; the tooltip lists the values
        self.button.setAccessibleName("Typical values")
        self.button.setPopupMode(QToolButton.InstantPopup)
        self.button.setStyleSheet("QToolButton::menu-indicator { image: none; width: 0px; }")  # the ▾ says it
        self.menu = QMenu(self.button)
        self.menu.setToolTipsVisible(True)  # each value's source
        self.button.setMenu(self.menu)
        self.menu.aboutToShow.connect(self._fill_menu)
        row = QHBoxLayout(self)
        row.setContentsMargins(0, 0, 0, 0)
        row.setSpacing(4)
        row.addWidget(self.edit, 1)
        row.addWidget(self.button, 0)
        self.set_unit_system(editor.doc.unit_system)

    def set_unit_system(self, system: str) -> None:
        """The typical values in the button's tooltip, in the reader's units (the box follows the panel;
        the owner calls this when it shows a segment)."""
        if system != self._tip_system:
            self._tip_system = system
            self.button.setToolTip(typical_text(self.side, system))

    def _fill_menu(self) -> None:
        system = self.editor.doc.unit_system
        self.menu.clear()
        self.menu.addAction("Clean (no fouling): 0").triggered.connect(lambda _c=False: self.choose(0.0))
        self.menu.addSeparator()
        for h in typical_values(self.side):
            action = self.menu.addAction(hint_text(h, system))
            action.setToolTip(f"Typical value; the range in brackets is the published spread. {FOULING_SOURCE}.")
            action.triggered.connect(lambda _c=False, v=h.typical_m2K_per_W: self.choose(v))

    def choose(self, value_m2K_per_W: float) -> None:
        """Put a value into the box and commit it as if typed."""
        self.edit.setText(units.format_exact(value_m2K_per_W, "fouling_resistance", self.editor.doc.unit_system, 5))
        self.edit.commit()
