"""The Segment Card's heat sinks table: supports, valves, flanges, pumps, instruments on the segment.

Each row is one kind of item with its count and an optional label; its size is the catalogue's (an
equivalent length of the segment's insulated pipe at its bore, from published trace-heating
practice) or given: an equivalent length, a length of bare pipe, or a loss per kelvin of pipe-to-
surroundings difference. "Other" has no catalogue size and takes one of the three. Like the fittings
table, a row edit, an added or a removed row is one command through the card's edit path.
"""

from __future__ import annotations

from typing import Optional

from PySide6.QtWidgets import QGroupBox, QHeaderView, QLineEdit, QPushButton, QSpinBox, QTableWidget, QVBoxLayout

from app.panels.editing import EditorPanel, error_hint, hint, set_combo_data
from app.panels.layer_fitting_tables import MAX_TABLE_HEIGHT, ROW_HEIGHT, buttons_row, setup_table
from app.widgets.elided import ElidedComboBox
from solver.model import HEAT_SINK_KINDS

#: HeatSink.kind -> the words in the combo (order = the model's)
SINK_KINDS: dict[str, str] = dict(zip(HEAT_SINK_KINDS, (
    "Pipe support", "Valve", "Flanged pair", "Pump casing", "Instrument connection", "Other")))
assert len(SINK_KINDS) == len(HEAT_SINK_KINDS)  # a new kind in the model needs its words here

#: how a row's size is given -> (words, model key or None for the catalogue, quantity, a first value [SI])
SIZE_MODES: dict[str, tuple[str, Optional[str], str, float]] = {
    "catalogue": ("Catalogue", None, "length", 0.0),
    "equivalent": ("Equivalent length", "equivalent_length_m", "length", 1.0),
    "bare": ("Bare pipe length", "bare_length_m", "length", 0.3),  # words shortened in the combo: see below
    "conductance": ("Loss per kelvin", "loss_W_per_K", "conductance", 0.5),
}
_SIZE_KEYS = tuple(key for _w, key, _q, _v in SIZE_MODES.values() if key is not None)

COLUMN_WIDTHS = {1: 58, 3: 112, 4: 104}  # px: count, size given as, size with its unit

SINKS_HINT = ("Items that lose heat beyond the pipe. 'Catalogue' sizes them as metres of this segment's "
              "insulated pipe at its bore (published trace-heating practice); or give an equivalent length, "
              "a length of bare pipe or a loss per kelvin. Their loss is added when sizing the tracing.")


def size_mode(sink) -> str:
    """How ``sink`` gives its size (the first of the three keys it holds; the catalogue when none)."""
    for mode, (_w, key, _q, _v) in SIZE_MODES.items():
        if key is not None and getattr(sink, key) is not None:
            return mode
    return "catalogue"


class HeatSinksBox(QGroupBox):
    """Heat sinks of the selected segment: kind, count, label and size per row."""

    def __init__(self, editor: EditorPanel):
        super().__init__("Heat sinks")
        self.editor = editor
        self._shown_rows = -1
        self._row_modes: list[str] = []  # the size mode each row's size box was built for
        v = QVBoxLayout(self)
        v.setContentsMargins(8, 6, 8, 8)
        self.table = QTableWidget(0, 5)
        setup_table(self.table, ["Kind", "Count", "Label", "Size given as", "Size each"])
        hh = self.table.horizontalHeader()
        # kind and label share what the numbers leave (a column sized to its combo would take it all)
        for column, mode in ((0, QHeaderView.Stretch), (1, QHeaderView.Fixed), (2, QHeaderView.Stretch),
                             (3, QHeaderView.Fixed), (4, QHeaderView.Fixed)):
            hh.setSectionResizeMode(column, mode)
        for column, width in COLUMN_WIDTHS.items():
            self.table.setColumnWidth(column, width)
        self.table.horizontalHeaderItem(4).setToolTip("Per item; 'Catalogue' sizes the item from the bore")
        v.addWidget(self.table)
        self.add_btn = QPushButton("Add heat sink")
        self.remove_btn = QPushButton("Remove heat sink")
        self.add_btn.clicked.connect(lambda _checked=False: self.add_sink())
        self.remove_btn.clicked.connect(self.remove_sink)
        v.addLayout(buttons_row(self.add_btn, self.remove_btn))
        self.note = hint(SINKS_HINT)
        v.addWidget(self.note)
        self.error = error_hint()
        v.addWidget(self.error)

    # ------------------------------------------------------------------ model -> widgets

    def show_segment(self, seg) -> None:
        sinks = seg.heat_sinks
        if len(sinks) != self._shown_rows or self.table.rowCount() != len(sinks):
            self._rebuild_rows(len(sinks))
        for r, sink in enumerate(sinks):
            set_combo_data(self.table.cellWidget(r, 0), sink.kind, add_missing=True)
            spin: QSpinBox = self.table.cellWidget(r, 1)
            spin.blockSignals(True)
            spin.setValue(sink.count)
            spin.blockSignals(False)
            label: QLineEdit = self.table.cellWidget(r, 2)
            if not label.hasFocus() or label.text() == sink.label:
                label.setText(sink.label)
                label.setCursorPosition(0)  # the start of a long label, not its end
            mode = size_mode(sink)
            set_combo_data(self.table.cellWidget(r, 3), mode)
            if self._row_modes[r] != mode:
                self._size_cell(r, mode)
            key = SIZE_MODES[mode][1]
            self.table.cellWidget(r, 4).set_value(getattr(sink, key) if key else None)
        self.remove_btn.setEnabled(bool(sinks))
        self.error.hide()

    def _rebuild_rows(self, n: int) -> None:
        table = self.table
        table.setRowCount(n)
        self._row_modes = [""] * n
        for r in range(n):
            kind = ElidedComboBox()
            for key, text in SINK_KINDS.items():
                kind.addItem(text, key)
            kind.setMinimumContentsLength(6)
            kind.activated.connect(lambda _i, row=r, c=kind: self._on_kind(row, c.currentData()))
            table.setCellWidget(r, 0, kind)
            spin = QSpinBox()
            spin.setRange(1, 10_000)
            spin.setKeyboardTracking(False)
            spin.valueChanged.connect(lambda v, row=r: self._on_count(row, v))
            table.setCellWidget(r, 1, spin)
            label = QLineEdit()
            label.setPlaceholderText("label")
            label.setToolTip("Your name for the item(s), e.g. 'at the pump'")
            label.editingFinished.connect(lambda row=r, e=label: self._on_label(row, e.text().strip()))
            table.setCellWidget(r, 2, label)
            mode = ElidedComboBox()  # shortened with '…' in a narrow column, whole in the tooltip
            for key, (words, _k, _q, _v) in SIZE_MODES.items():
                mode.addItem(words, key)
            mode.activated.connect(lambda _i, row=r, c=mode: self._on_mode(row, c.currentData()))
            table.setCellWidget(r, 3, mode)
            self._size_cell(r, "catalogue")
        self.editor.forget_dead_edits()
        self._shown_rows = n
        table.setFixedHeight(min(MAX_TABLE_HEIGHT, table.horizontalHeader().sizeHint().height() + 4
                                 + ROW_HEIGHT * max(n, 1)))

    def _size_cell(self, row: int, mode: str) -> None:
        """The size box of a row, for the quantity its mode takes (rebuilt when the mode changes)."""
        _words, key, quantity, _first = SIZE_MODES[mode]
        path = f"heat_sinks.{row}.{key}" if key else None
        e = self.editor.quantity_edit(quantity, f"Heat sink {row + 1} {_words.lower()}", path,
                                      error_label=self.error, compact=True,
                                      allow_empty=key is None, empty_text="from the bore")
        e.setEnabled(key is not None)
        old = self.table.cellWidget(row, 4)
        if old is not None:
            old.hide()  # the table deletes it later; until then it must not show over the row
        self.table.setCellWidget(row, 4, e)
        self.editor.forget_dead_edits()
        self._row_modes[row] = mode

    # ------------------------------------------------------------------ widgets -> commands

    def _sinks(self) -> Optional[list]:
        seg = self.editor.doc.selected
        return None if seg is None or self.editor.loading else seg.heat_sinks

    def add_sink(self, kind: str = "pipe_support") -> None:
        seg = self.editor.doc.selected
        if seg is None:
            return
        if kind not in SINK_KINDS:
            kind = next(iter(SINK_KINDS))
        sinks = [s.model_dump() for s in seg.heat_sinks]
        new: dict = {"kind": kind, "count": 1}
        if kind == "other":  # no catalogue size: start from a metre of the segment's insulated pipe
            new["equivalent_length_m"] = SIZE_MODES["equivalent"][3]
        sinks.append(new)
        self.editor.set_fields({"heat_sinks": sinks}, text=f"Add heat sink to '{seg.name}'", error_label=self.error)

    def remove_sink(self) -> None:
        seg = self.editor.doc.selected
        if seg is None or not seg.heat_sinks:
            return
        row = self.table.currentRow()
        row = row if 0 <= row < len(seg.heat_sinks) else len(seg.heat_sinks) - 1
        sinks = [s.model_dump() for i, s in enumerate(seg.heat_sinks) if i != row]
        self.editor.set_fields({"heat_sinks": sinks}, text=f"Remove heat sink from '{seg.name}'",
                               error_label=self.error)

    def _on_kind(self, row: int, kind: str) -> None:
        sinks = self._sinks()
        if sinks is None or row >= len(sinks):
            return
        changes: dict = {f"heat_sinks.{row}.kind": kind}
        if kind == "other" and size_mode(sinks[row]) == "catalogue":  # 'other' has no catalogue size
            changes[f"heat_sinks.{row}.equivalent_length_m"] = SIZE_MODES["equivalent"][3]
        seg = self.editor.doc.selected
        self.editor.set_fields(changes, text=f"Set heat sink kind in '{seg.name}'", error_label=self.error)

    def _on_count(self, row: int, count: int) -> None:
        sinks = self._sinks()
        if sinks is None or row >= len(sinks):
            return
        if not self.editor.set_fields({f"heat_sinks.{row}.count": count}, error_label=self.error):
            self.show_segment(self.editor.doc.selected)

    def _on_label(self, row: int, text: str) -> None:
        sinks = self._sinks()
        if sinks is None or row >= len(sinks):
            return
        self.editor.set_fields({f"heat_sinks.{row}.label": text}, error_label=self.error)

    def _on_mode(self, row: int, mode: str) -> None:
        sinks = self._sinks()
        if sinks is None or row >= len(sinks) or mode == size_mode(sinks[row]):
            return
        changes: dict = {f"heat_sinks.{row}.{key}": None for key in _SIZE_KEYS}
        key, first = SIZE_MODES[mode][1], SIZE_MODES[mode][3]
        if key is not None:
            changes[f"heat_sinks.{row}.{key}"] = first
        seg = self.editor.doc.selected
        if not self.editor.set_fields(changes, text=f"Size heat sink {row + 1} of '{seg.name}' by "
                                                    f"{SIZE_MODES[mode][0].lower()}", error_label=self.error):
            set_combo_data(self.table.cellWidget(row, 3), size_mode(sinks[row]))
