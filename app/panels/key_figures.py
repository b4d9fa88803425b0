"""Key Figures: the headline numbers of the current result in the chosen unit system.

A three-column table (figure, value with unit, where/remark), grouped into outlet, pressure,
heat and wall/flow. Values come straight from the Result (SI) through ``app.units``; nothing
is computed here beyond picking and formatting.
"""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtGui import QBrush, QFont
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHeaderView,
    QLabel,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from app import style
from app.units import format_value


def _range(lo: float, hi: float, quantity: str, system: str, digits: int = 3) -> str:
    a = format_value(lo, quantity, system, digits=digits, with_unit=False)
    b = format_value(hi, quantity, system, digits=digits)
    return f"{a} – {b}"


def key_figure_rows(result, system: str) -> list[tuple[str, str, str, str]]:
    """Rows of (key, label, value text, remark) for ``result`` in ``system``.

    Group headings have key ``""`` and empty value. Keys match ``Result.key_figures()`` where
    one exists, so tests and exports can find a row.
    """
    r = result
    pd = r.pressure_drop
    at = lambda x: "at " + format_value(x, "length", system)  # noqa: E731
    rows: list[tuple[str, str, str, str]] = [
        ("", "Outlet", "", ""),
        ("outlet_temperature_K", "Outlet temperature", format_value(r.outlet_temperature_K, "temperature", system),
         "inlet " + format_value(r.inlet_temperature_K, "temperature", system)),
        ("outlet_pressure_Pa", "Outlet pressure", format_value(r.outlet_pressure_Pa, "pressure", system),
         "inlet " + format_value(r.inlet_pressure_Pa, "pressure", system)),
        ("", "Pressure drop", "", ""),
        ("pressure_drop_Pa", "Pressure drop", format_value(r.pressure_drop_Pa, "pressure_difference", system), "inlet − outlet"),
        ("pressure_drop_friction_Pa", "   friction", format_value(pd.friction_Pa, "pressure_difference", system), ""),
        ("pressure_drop_fittings_Pa", "   fittings", format_value(pd.fittings_Pa, "pressure_difference", system), ""),
        ("pressure_drop_elevation_Pa", "   elevation", format_value(pd.elevation_Pa, "pressure_difference", system),
         "negative = gained going down"),
        ("pressure_drop_acceleration_Pa", "   acceleration", format_value(pd.acceleration_Pa, "pressure_difference", system), ""),
        ("pump_power_W", "Hydraulic power", format_value(r.pump_power_W, "power", system), "flow × pressure drop"),
        ("", "Heat", "", ""),
        ("duty_W", "Duty (heat to fluid)", format_value(r.duty_W, "power", system), "negative = fluid cooled"),
        ("heat_input_W", "Heat input", format_value(r.heat_input_W, "power", system), "tracing + jackets"),
        ("heat_input_tracing_W", "   tracing", format_value(r.heat_input_tracing_W, "power", system), ""),
        ("heat_input_media_W", "   jackets, heated walls", format_value(r.heat_input_media_W, "power", system),
         "negative = they cool"),
        (("heat_loss_W", "Heat loss to ambient", format_value(r.heat_loss_W, "power", system), "air and soil")
         if r.heat_loss_W >= 0 else
         ("heat_loss_W", "Heat gained from ambient", format_value(-r.heat_loss_W, "power", system), "air and soil")),
        ("energy_balance_residual_W", "Energy balance residual", format_value(r.energy_balance_residual_W, "power", system),
         "should be ~0"),
        ("", "Wall and flow", "", ""),
        ("max_inner_wall_temperature_K", "Max inner-wall temperature",
         format_value(r.max_inner_wall_temperature_K, "temperature", system), at(r.max_inner_wall_position_m)),
        ("min_inner_wall_temperature_K", "Min inner-wall temperature",
         format_value(r.min_inner_wall_temperature_K, "temperature", system), at(r.min_inner_wall_position_m)),
        ("max_outer_surface_temperature_K", "Max surface temperature (in air)",
         format_value(r.max_outer_surface_temperature_K, "temperature", system), _at_or_none(r.max_outer_surface_position_m, system)),
        ("min_outer_surface_temperature_K", "Min surface temperature (in air)",
         format_value(r.min_outer_surface_temperature_K, "temperature", system), _at_or_none(r.min_outer_surface_position_m, system)),
        ("velocity_range", "Velocity", _range(*r.velocity_range_m_per_s, "velocity", system), "min – max"),
        ("reynolds_range", "Reynolds number", _range(*r.reynolds_range, "dimensionless", system), "min – max"),
        ("residence_time_s", "Residence time", format_value(r.residence_time_s, "time", system), "inlet to outlet"),
        ("mass_flow_kg_per_s", "Mass flow", format_value(r.mass_flow_kg_per_s, "mass_flow", system), ""),
    ]
    return rows


def _at_or_none(x_m: float, system: str) -> str:
    if x_m is None or x_m != x_m:
        return "no segment in air"
    return "at " + format_value(x_m, "length", system)


class KeyFiguresPanel(QWidget):
    """``KeyFiguresPanel(doc)``: a table of headline results; observes the Document.

    Public: ``table`` (QTableWidget), :meth:`value_text` (key -> displayed value text).
    """

    def __init__(self, doc, parent=None):
        super().__init__(parent)
        self.doc = doc
        self.setObjectName("KeyFigures")
        self.setWindowTitle("Key Figures")
        self._row_of: dict[str, int] = {}
        self._layout: list[tuple[str, str]] = []  # (key, label) of each row the table holds

        self.note = QLabel("")
        self.note.setWordWrap(True)
        self.note.setStyleSheet(f"color: {style.INK_MUTED}; padding: 3px 6px;")

        self.table = QTableWidget(0, 3, self)
        self.table.setHorizontalHeaderLabels(["Figure", "Value", "Where / note"])
        self.table.verticalHeader().hide()
        self.table.setEditTriggers(QAbstractItemView.NoEditTriggers)
        self.table.setSelectionBehavior(QAbstractItemView.SelectRows)
        self.table.setShowGrid(False)
        self.table.setAlternatingRowColors(False)
        self.table.setWordWrap(False)
        h = self.table.horizontalHeader()
        h.setSectionResizeMode(0, QHeaderView.ResizeToContents)
        h.setSectionResizeMode(1, QHeaderView.ResizeToContents)
        h.setSectionResizeMode(2, QHeaderView.Stretch)
        self.table.verticalHeader().setDefaultSectionSize(22)

        lay = QVBoxLayout(self)
        lay.setContentsMargins(0, 0, 0, 0)
        lay.setSpacing(0)
        lay.addWidget(self.note)
        lay.addWidget(self.table, 1)

        # the document holds the result and whether it is stale; this view only redraws
        doc.result_ready.connect(lambda _r: self.refresh())
        doc.solve_failed.connect(lambda _m: self.refresh())
        doc.units_changed.connect(lambda _s: self.refresh())
        doc.project_replaced.connect(self.refresh)
        doc.current_alternative_changed.connect(lambda _i: self.refresh())
        self.refresh()

    def refresh(self) -> None:
        res = self.doc.result
        if res is None:
            self.table.setRowCount(0)
            self._row_of = {}
            self._layout = []
            self.note.setText("Key figures appear once the line is solved.")
            return
        system = self.doc.unit_system
        note = f"{res.name} · {res.fluid_label} · {res.cells} cells"
        if self.doc.result_is_stale:
            note = "Stale: the last edit could not be solved; these figures are from the previous result. " + note
        self.note.setText(note)
        sheet = (f"color: {style.INK if self.doc.result_is_stale else style.INK_MUTED}; padding: 3px 6px;"
                 + ("background: #FCF0D8;" if self.doc.result_is_stale else ""))
        if self.note.styleSheet() != sheet:  # re-polishing costs a few ms: only when it changes
            self.note.setStyleSheet(sheet)
        rows = key_figure_rows(res, system)
        layout = [(key, text) for key, text, _v, _r in rows]
        if layout != self._layout:
            self._build_rows(layout)
        # the rows keep their items: only texts that changed are set (re-creating ~70 items per
        # result cost ~30 ms). Each item change would make the view re-measure its
        # resize-to-contents columns, so the model stays quiet and announces one change at the end.
        model = self.table.model()
        was_blocked = model.blockSignals(True)
        try:
            self._fill(rows)
        finally:
            model.blockSignals(was_blocked)
        if not was_blocked and rows:
            model.dataChanged.emit(model.index(0, 0), model.index(len(rows) - 1, 2), [])

    def _fill(self, rows) -> None:
        for i, (key, text, value, remark) in enumerate(rows):
            if not key:
                continue
            b, c = self.table.item(i, 1), self.table.item(i, 2)
            if b.text() != value:
                b.setText(value)
            if c.text() != remark:
                c.setText(remark)
            # a narrow dock elides: the whole row stays readable in the tooltip
            tip = f"{text.strip()}: {value}" + (f" ({remark})" if remark else "")
            if b.toolTip() != tip:
                for col in range(3):
                    self.table.item(i, col).setToolTip(tip)

    def _build_rows(self, layout: list[tuple[str, str]]) -> None:
        """Create the items of every row once (headings styled); values are filled in later."""
        self.table.setRowCount(len(layout))
        self._row_of = {}
        heading_font = QFont(self.table.font())
        heading_font.setBold(True)
        for i, (key, text) in enumerate(layout):
            a, b, c = QTableWidgetItem(text), QTableWidgetItem(""), QTableWidgetItem("")
            if not key:
                a.setFont(heading_font)
                a.setForeground(QBrush(style.qcolor(style.SELECTION)))
                for it in (a, b, c):
                    it.setBackground(QBrush(style.qcolor(style.CANVAS_BG)))
            else:
                self._row_of[key] = i
                b.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
                c.setForeground(QBrush(style.qcolor(style.INK_MUTED)))
            self.table.setItem(i, 0, a)
            self.table.setItem(i, 1, b)
            self.table.setItem(i, 2, c)
        self._layout = layout

    def value_text(self, key: str) -> str:
        """The displayed value of a figure, e.g. ``value_text('outlet_temperature_K') -> '71.3 °C'``."""
        return self.table.item(self._row_of[key], 1).text()
