"""What the two design-tool docks share: Target Finder (:mod:`app.panels.target_finder_panel`) and Sweep
(:mod:`app.panels.sweep_panel`).

- the words: :func:`fmt`, :func:`value_words`, :func:`target_words`, :func:`margin_words`, :func:`error_words`
  (a value, a parameter's value, a target, a margin, a solver error in the user's units and words);
- the worker: :class:`SearchRunner` runs one search at a time on a thread of its own, the Document's pattern
  (:class:`app.document.TicketJob`: a QThreadPool of one thread, a plain-data :class:`Ticket` handed back
  through a queued signal into a sink on the GUI thread and kept referenced until it arrives). Cancel
  discards the answer of the search under way. The worker only ever holds plain data, never a Qt object
  (see :mod:`app.gui_gc`);
- the pickers: :class:`ParameterPicker` (what to vary), :class:`TargetEditor` (what to meet);
- :func:`make_alternative`: an answer or a picked point as a new alternative carrying its search record
  (one undo step);
- the dock's frame: :class:`ToolDock` (the alternative to start from, following the document, the status
  line, the runner), :class:`ToolBody`, :func:`outer_scroll` and :func:`scrolling` (a low dock scrolls
  rather than overlap or force the window taller).
"""

from __future__ import annotations

import math
import time
from typing import Callable, Optional

from PySide6.QtCore import QObject, Qt, QThreadPool, Signal
from PySide6.QtWidgets import (
    QAbstractItemView,
    QButtonGroup,
    QCheckBox,
    QComboBox,
    QDoubleSpinBox,
    QFrame,
    QGridLayout,
    QGroupBox,
    QHBoxLayout,
    QLabel,
    QListWidget,
    QListWidgetItem,
    QPushButton,
    QRadioButton,
    QScrollArea,
    QSpinBox,
    QVBoxLayout,
    QWidget,
)

from app import style, units
from app.commands import AddAlternative
from app.document import TicketJob, run_search, shut_down_at_exit
from app.widgets.quantity_edit import QuantityEdit
from solver.errors import InputError

# --------------------------------------------------------------------------- targets: words and units

#: (kind, words on the editor, quantity of the value, quantity of its margin, needs the design cases)
TARGET_ROWS: tuple[tuple[str, str, str, str, bool], ...] = (
    ("outlet_min", "Outlet at least", "temperature", "temperature_difference", False),
    ("outlet_max", "Outlet at most", "temperature", "temperature_difference", False),
    ("bulk_min", "Bulk everywhere at least (maintain)", "temperature", "temperature_difference", False),
    ("inner_wall_max", "Inner wall at most", "temperature", "temperature_difference", False),
    ("surface_max", "Outer surface at most", "temperature", "temperature_difference", False),
    ("heat_loss_per_m_max", "Heat loss per metre at most", "power_per_length", "power_per_length", False),
    ("pressure_drop_max", "Pressure drop at most", "pressure_difference", "pressure_difference", False),
    ("worst_case_bulk_min", "Worst-case bulk at least", "temperature", "temperature_difference", True),
    ("hold_time_min", "Hold time at least (power failure)", "time", "time", True),
)
TARGET_ROW = {row[0]: row for row in TARGET_ROWS}

#: The key figure each target limits (None: judged on the design cases, no key figure of the operating case).
TARGET_FIGURE: dict[str, Optional[str]] = {
    "outlet_min": "outlet_temperature_K", "outlet_max": "outlet_temperature_K",
    "bulk_min": "min_bulk_temperature_K", "inner_wall_max": "max_inner_wall_temperature_K",
    "surface_max": "max_outer_surface_temperature_K", "heat_loss_per_m_max": "max_heat_loss_per_length_W_per_m",
    "pressure_drop_max": "pressure_drop_Pa", "worst_case_bulk_min": None, "hold_time_min": None,
}
#: Targets judged on the design cases: the search then solves each variant with them.
DESIGN_TARGETS = ("worst_case_bulk_min", "hold_time_min")

SURFACE_TIP = ("Personnel protection: an insulated surface people can touch is commonly kept at or below about "
               "60 °C (common practice). For the contact time and the burn-hazard limit of heated surfaces, see "
               "ASTM C1055 (Standard Guide for Heated System Surface Conditions that Produce Contact Burn "
               "Injuries).")

_TARGET_TIPS = {
    "outlet_min": "The bulk temperature at the outlet must be at least this.",
    "outlet_max": "The bulk temperature at the outlet must be at most this.",
    "bulk_min": "The bulk temperature must stay at or above this all along the line (maintain temperature).",
    "inner_wall_max": "The inner wall must stay at or below this (product degradation, fouling, coking).",
    "surface_max": SURFACE_TIP,
    "heat_loss_per_m_max": "The highest heat loss per metre of any segment (heat sinks included) must be at most this.",
    "pressure_drop_max": "Inlet minus outlet pressure must be at most this.",
    "worst_case_bulk_min": "In the project's worst case (coldest air, strongest wind, optionally no flow) the bulk "
                           "temperature must stay at or above this.",
    "hold_time_min": "After the flow stops with the heating off, the line must take at least this long to cool "
                     "to the maintain temperature.",
}


def fmt(value_si, quantity: str, system: str, digits: int = 4) -> str:
    """A value in the user's units (the one number format of :mod:`app.units`); hours for a time."""
    if quantity == "time":
        if value_si is None or not math.isfinite(float(value_si)):
            return "—" if value_si is None or math.isnan(float(value_si)) else "indefinitely"
        return f"{units.format_number(float(value_si) / 3600.0, digits=3)} h"
    if not quantity:
        return str(value_si)
    return units.format_value(value_si, quantity, system, digits=digits)


def value_words(parameter, value, system: str) -> str:
    """The parameter's value in the user's units ("40 mm", "NPS 2", "25 W/m", "12.5 W/m"): trailing zeros
    left out, as a size or a setting is written."""
    return parameter.value_text(value, system, formatter=lambda v, q, s: _trimmed(fmt(v, q, s)))


def _trimmed(text: str) -> str:
    """"20.00 W/m" -> "20 W/m", "12.50 mm" -> "12.5 mm" (the number before the first space only)."""
    number, sep, rest = text.partition(" ")
    if "." in number and number[-1:].isdigit():
        number = number.rstrip("0").rstrip(".")
    return number + sep + rest


def target_words(target, system: str) -> str:
    """"outer surface at most 50 °C" in the user's units (the finder's own words when it has them)."""
    return target.text(system, formatter=lambda v, q, s: fmt(v, q, s))


def margin_words(kind: str, margin: float, system: str) -> str:
    """A target's margin in the user's units, signed: "+4.2 K" (met) or "−1.0 K" (missed)."""
    quantity = TARGET_ROW[kind][3] if kind in TARGET_ROW else "dimensionless"
    if margin is None or not math.isfinite(margin):
        return "—" if margin is None or math.isnan(margin) else "ample"
    text = fmt(abs(margin), quantity, system, digits=3)
    return ("+" if margin >= 0 else units.MINUS) + text


def error_words(exc) -> str:
    """A solver error in the user's words: an InputError's field by its label, not its key."""
    from solver.errors import InputError
    from solver.variants import PARAMETER_KINDS

    if not isinstance(exc, InputError):
        return str(exc)
    field = str(exc.field)
    label = PARAMETER_KINDS.get(field) or (TARGET_ROW[field][1] if field in TARGET_ROW else
                                           field.replace("_", " ").capitalize())
    value = exc.value
    shown = f" (got {value})" if isinstance(value, (int, float)) and not isinstance(value, bool) else ""
    return f"{label}: {exc.reason}{shown}."


def html_text(text: str) -> str:
    """``text`` escaped for a rich-text label."""
    return (text or "").replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")


def needs_design(targets) -> bool:
    return any(t.kind in DESIGN_TARGETS for t in targets)


def interactive() -> bool:
    """Whether dialogs may be shown (not on the offscreen platform of tests and screenshots)."""
    from PySide6.QtGui import QGuiApplication

    return QGuiApplication.platformName() not in ("offscreen", "minimal")


# --------------------------------------------------------------------------- the worker


class _Sink(QObject):
    """Lives on the GUI thread; the worker emits into it and Qt queues the call across threads. The payload
    is always a ticket (never a bare None: PySide6 mis-counts it through a queued `object` argument)."""

    progressed = Signal(object)
    finished = Signal(object)


class Ticket:
    """One job: what to run (plain data and a plain function), its answer, and a cancel flag read by the
    worker. Referenced by the runner until its last signal has arrived on the GUI thread."""

    def __init__(self, work: Callable[["Ticket"], None], **inputs):
        self.work = work
        self.inputs = inputs
        self.cancelled = False
        self.answer = None
        self.error = ""
        self.items: list = []  # filled by the worker as it goes (a sweep's variants)
        self.total = 0
        self.seconds = math.nan
        self.done = False

    def is_cancelled(self) -> bool:
        return self.cancelled


class _Job(TicketJob):
    def run(self) -> None:  # worker thread
        t = self._ticket
        t0 = time.perf_counter()
        if not t.cancelled:
            t.error = run_search(lambda: t.work(t, lambda: self._sink.progressed.emit(t)), "a search", error_words)
        t.seconds = time.perf_counter() - t0
        t.done = True
        self._sink.finished.emit(t)


class SearchRunner(QObject):
    """One search at a time on a worker thread of its own. ``progressed(ticket)`` while it runs (if the work
    reports), ``finished(ticket)`` at its end: the ticket of the search still wanted only (a cancelled or
    replaced one is dropped here, so a view never shows a discarded answer)."""

    progressed = Signal(object)
    finished = Signal(object)

    def __init__(self, parent: Optional[QObject] = None):
        super().__init__(parent)
        self._pool = QThreadPool(self)  # created before the sink: destroyed (and waited for) first
        self._pool.setMaxThreadCount(1)
        self._sink = _Sink(self)
        self._sink.progressed.connect(self._on_progress)
        self._sink.finished.connect(self._on_finished)
        self._held: set[Ticket] = set()
        self.ticket: Optional[Ticket] = None
        shut_down_at_exit(self)  # stopped and waited for at interpreter exit, as the Document's worker is

    @property
    def running(self) -> bool:
        return self.ticket is not None

    def start(self, work: Callable, **inputs) -> Ticket:
        self.cancel()
        ticket = Ticket(work, **inputs)
        self.ticket = ticket
        self._held.add(ticket)
        self._pool.start(_Job(ticket, self._sink))
        return ticket

    def cancel(self) -> None:
        """Stop the search under way (a sweep stops after its current chunk; a finder search's answer is
        discarded when it arrives)."""
        if self.ticket is not None:
            self.ticket.cancelled = True
            self.ticket = None

    def shutdown(self) -> None:
        """Cancel and wait for the worker (before the window closes)."""
        self.cancel()
        self._pool.waitForDone()

    def _on_progress(self, ticket: Ticket) -> None:
        if ticket is self.ticket and not ticket.cancelled:
            self.progressed.emit(ticket)

    def _on_finished(self, ticket: Ticket) -> None:
        self._held.discard(ticket)
        if ticket is self.ticket:
            self.ticket = None
            self.finished.emit(ticket)


# --------------------------------------------------------------------------- a new alternative from an answer


def origin_alternative(alternative, record: Optional[dict]):
    """``alternative`` with its search record as ``origin`` (when the model has that field), validated."""
    from solver.model import Alternative

    if record is not None and "origin" in Alternative.model_fields:
        return Alternative.model_validate({**alternative.model_dump(), "origin": record})
    return alternative


def make_alternative(doc, base_name: str, alternative, record: Optional[dict]) -> str:
    """Insert ``alternative`` (with its record) after ``base_name`` as one undoable step, and select it.
    Returns the name it got."""
    new = origin_alternative(alternative, record)
    names = [a.name for a in doc.project.alternatives]
    position = names.index(base_name) + 1 if base_name in names else len(names)
    command = AddAlternative(doc, new, position=position)
    doc.push(command)
    return doc.current_alternative.name


# --------------------------------------------------------------------------- the dock's frame


def scrolling(widget: QWidget, min_width: int = 0) -> QScrollArea:
    """``widget`` in a frameless vertical scroll area (a column of a low dock)."""
    area = QScrollArea()
    area.setWidget(widget)
    area.setWidgetResizable(True)
    area.setFrameShape(QFrame.NoFrame)
    area.setHorizontalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
    if min_width:
        area.setMinimumWidth(min_width)
    return area


class ToolBody(QWidget):
    """The body of a tool dock: fills the room it is given (scrolling only below its minimum). Its wrapped
    labels would otherwise make the scroll area size it to their full height-for-width (as the Hold Time
    view does it)."""

    def hasHeightForWidth(self) -> bool:  # noqa: N802 (Qt)
        return False

    def heightForWidth(self, _width: int) -> int:  # noqa: N802 (Qt)
        return -1


def outer_scroll(panel: QWidget, body: QWidget) -> QScrollArea:
    """``body`` fills ``panel`` and scrolls both ways when the dock is smaller than it needs, so a docked tool
    never forces the main window taller than the screen."""
    area = QScrollArea(panel)
    area.setWidget(body)
    area.setWidgetResizable(True)
    area.setFrameShape(QFrame.NoFrame)
    lay = QVBoxLayout(panel)
    lay.setContentsMargins(0, 0, 0, 0)
    lay.addWidget(area)
    return area


# --------------------------------------------------------------------------- what to vary


class ParameterPicker(QWidget):
    """What to vary: the kind (plain words), the segments (all, or a ticked group), and the range in the
    user's units (continuous) or the standard sizes (discrete). ``mode="sweep"`` adds the number of points.

    ``parameter()`` builds a :class:`solver.variants.Parameter` (ValueError in plain words when it cannot);
    ``bounds()`` the range in SI; ``values()`` the sweep's values.
    """

    changed = Signal()

    def __init__(self, system: str = "SI", mode: str = "find", parent: Optional[QWidget] = None,
                 default_kind: str = "heater_output", points: int = 8):
        super().__init__(parent)
        from solver.variants import PARAMETER_KINDS

        self.system = system
        self.mode = mode
        self.alternative = None
        self._quantity = None
        self._range_for: tuple = ()

        self.kind_combo = QComboBox()
        for kind, words in PARAMETER_KINDS.items():
            self.kind_combo.addItem(words, kind)
        i = self.kind_combo.findData(default_kind)
        self.kind_combo.setCurrentIndex(max(0, i))
        self.kind_combo.currentIndexChanged.connect(self._on_kind)

        self.all_button = QRadioButton("All segments where it applies")
        self.group_button = QRadioButton("Only these segments:")
        self.all_button.setChecked(True)
        self._scope = QButtonGroup(self)
        self._scope.addButton(self.all_button)
        self._scope.addButton(self.group_button)
        self.all_button.toggled.connect(self._on_scope)
        self.segment_list = QListWidget()
        self.segment_list.setMaximumHeight(96)
        self.segment_list.setSelectionMode(QAbstractItemView.NoSelection)
        self.segment_list.itemChanged.connect(self._on_segment_ticked)
        self.scope_note = QLabel("")
        self.scope_note.setStyleSheet(f"color: {style.INK_MUTED};")
        self.scope_note.setWordWrap(True)

        self.lower_edit = QuantityEdit("power_per_length", system, "Lower end of the range", compact=True)
        self.upper_edit = QuantityEdit("power_per_length", system, "Upper end of the range", compact=True)
        self.points_spin = QSpinBox()
        self.points_spin.setRange(2, 2000)
        self.points_spin.setValue(points)
        self.points_spin.setToolTip("Number of values from the lower to the upper end, evenly spaced")
        self.standard_label = QLabel("")
        self.standard_label.setTextFormat(Qt.RichText)
        self.standard_label.setWordWrap(True)
        self.standard_label.setStyleSheet(f"color: {style.INK};")
        for w in (self.lower_edit, self.upper_edit):
            w.value_committed.connect(lambda _v: self.changed.emit())

        form = QGridLayout(self)
        form.setContentsMargins(0, 0, 0, 0)
        form.setHorizontalSpacing(6)
        form.setVerticalSpacing(3)
        form.addWidget(QLabel("Vary"), 0, 0)
        form.addWidget(self.kind_combo, 0, 1, 1, 3)
        form.addWidget(self.all_button, 1, 0, 1, 4)
        form.addWidget(self.group_button, 2, 0, 1, 4)
        form.addWidget(self.segment_list, 3, 0, 1, 4)
        form.addWidget(self.scope_note, 4, 0, 1, 4)
        self.lower_caption = QLabel("From" if mode == "sweep" else "Search from")
        self.upper_caption = QLabel("to")
        form.addWidget(self.lower_caption, 5, 0)
        form.addWidget(self.lower_edit, 5, 1)
        form.addWidget(self.upper_caption, 5, 2)
        form.addWidget(self.upper_edit, 5, 3)
        self.points_caption = QLabel("Points")
        form.addWidget(self.points_caption, 6, 0)
        form.addWidget(self.points_spin, 6, 1)
        form.addWidget(self.standard_label, 7, 0, 1, 4)
        form.setColumnStretch(1, 1)
        form.setColumnStretch(3, 1)
        self.points_caption.setVisible(mode == "sweep")
        self.points_spin.setVisible(mode == "sweep")

    # ------------------------------------------------------------------ state

    @property
    def kind(self) -> str:
        return self.kind_combo.currentData()

    def set_kind(self, kind: str) -> None:
        choose(self.kind_combo, kind, "parameter kind")
        self._on_kind()

    def set_alternative(self, alt) -> None:
        """Show ``alt``'s segments and the kinds that apply to it; new default range when the line changed."""
        same_line = (self.alternative is not None and alt is not None
                     and [s.name for s in self.alternative.segments] == [s.name for s in alt.segments])
        ticked = self.chosen_segments() if same_line else []
        self.alternative = alt
        self.segment_list.blockSignals(True)
        self.segment_list.clear()
        for i, seg in enumerate(alt.segments if alt is not None else []):
            item = QListWidgetItem(f"{i + 1}  {seg.name}")
            item.setFlags(Qt.ItemIsUserCheckable | Qt.ItemIsEnabled)
            item.setCheckState(Qt.Checked if i in ticked else Qt.Unchecked)
            self.segment_list.addItem(item)
        self.segment_list.blockSignals(False)
        self._mark_kinds()
        if not same_line:
            self._range_for = ()  # another line: its own default range (an edit of this one keeps the range typed)
        self._on_kind()

    def _mark_kinds(self) -> None:
        """Kinds that cannot act on this alternative are greyed out, the reason in their tooltip."""
        from solver.errors import CalorunError
        from solver.variants import Parameter

        alt = self.alternative
        model = self.kind_combo.model()
        for row in range(self.kind_combo.count()):
            kind = self.kind_combo.itemData(row)
            why = ""
            if alt is not None:
                try:
                    p = Parameter(kind, (0,)) if kind == "segment_length" else Parameter(kind)
                    p.segment_indices(alt)
                except CalorunError as exc:
                    why = getattr(exc, "reason", None) or str(exc)
            item = model.item(row)
            item.setEnabled(not why)
            self.kind_combo.setItemData(row, why or None, Qt.ToolTipRole)

    def chosen_segments(self) -> list[int]:
        return [i for i in range(self.segment_list.count())
                if self.segment_list.item(i).checkState() == Qt.Checked]

    def set_segments(self, indices: Optional[list[int]]) -> None:
        """None: all segments where it applies; else exactly these (0-based)."""
        self.segment_list.blockSignals(True)
        for i in range(self.segment_list.count()):
            self.segment_list.item(i).setCheckState(Qt.Checked if indices and i in indices else Qt.Unchecked)
        self.segment_list.blockSignals(False)
        (self.all_button if indices is None else self.group_button).setChecked(True)
        self._on_scope()

    def set_range(self, lower_si: float, upper_si: float) -> None:
        self.lower_edit.set_value(lower_si)
        self.upper_edit.set_value(upper_si)

    def set_points(self, n: int) -> None:
        self.points_spin.setValue(n)

    def set_unit_system(self, system: str) -> None:
        self.system = system
        self.lower_edit.set_unit_system(system)
        self.upper_edit.set_unit_system(system)
        self._show_standard()

    # ------------------------------------------------------------------ reading it

    def parameter(self):
        """The Parameter as set; ValueError in plain words when the choice cannot make one."""
        from solver.errors import CalorunError
        from solver.variants import PARAMETER_KINDS, Parameter

        kind = self.kind
        words = PARAMETER_KINDS[kind]
        if kind in ("mass_flow", "volume_flow", "inlet_temperature"):
            segments: tuple = ()
        elif kind == "segment_length":
            chosen = self.chosen_segments()
            if len(chosen) != 1:
                raise ValueError(f"{words}: tick exactly one segment whose length is varied "
                                 f"({len(chosen)} ticked).")
            segments = tuple(chosen)
        elif self.group_button.isChecked():
            segments = tuple(self.chosen_segments())
            if not segments:
                raise ValueError(f"{words}: tick the segments to vary, or choose all segments.")
        else:
            segments = ()
        try:
            p = Parameter(kind, segments)
            if self.alternative is not None:
                p.segment_indices(self.alternative)
        except CalorunError as exc:
            raise ValueError(f"{words}: {getattr(exc, 'reason', None) or exc}.") from None
        return p

    def bounds(self) -> tuple[float, float]:
        """(lower, upper) in SI of a continuous parameter; ValueError naming the field when unreadable."""
        for edit in (self.lower_edit, self.upper_edit):
            if edit.pending or edit.has_error:
                edit.commit()
            if edit.has_error:
                raise ValueError(edit.error_text)
        lo, hi = self.lower_edit.value(), self.upper_edit.value()
        if lo is None or hi is None:
            raise ValueError("Give both ends of the range.")
        if not lo < hi:
            raise ValueError(f"The range must run upwards: from {_trimmed(fmt(lo, self._quantity, self.system))} "
                             f"to {_trimmed(fmt(hi, self._quantity, self.system))} is empty.")
        return float(lo), float(hi)

    def values(self) -> list:
        """The values a sweep takes: the standard sizes (discrete), or ``points`` evenly spaced over the range."""
        p = self.parameter()
        if p.discrete:
            return list(p.standard_values(self.alternative))
        lo, hi = self.bounds()
        n = self.points_spin.value()
        return [lo + (hi - lo) * k / (n - 1) for k in range(n)]

    # ------------------------------------------------------------------ reacting

    def _on_kind(self, *_args) -> None:
        kind = self.kind
        on_segments = kind not in ("mass_flow", "volume_flow", "inlet_temperature")
        single = kind == "segment_length"
        for w in (self.all_button, self.group_button):
            w.setVisible(on_segments)
        self.all_button.setEnabled(not single)
        if single:
            self.group_button.setChecked(True)
            if len(self.chosen_segments()) != 1 and self.segment_list.count():
                self.set_segments([self.chosen_segments()[0] if self.chosen_segments() else 0])
        self.scope_note.setText("Varies the feed of the whole line." if not on_segments else
                                ("Tick the one segment whose length is varied." if single else ""))
        self.scope_note.setVisible(bool(self.scope_note.text()))
        self._on_scope()

    def _on_scope(self, *_args) -> None:
        on_segments = self.kind not in ("mass_flow", "volume_flow", "inlet_temperature")
        self.segment_list.setVisible(on_segments and self.group_button.isChecked())
        self._refresh_range()
        self.changed.emit()

    def _on_segment_ticked(self, item: QListWidgetItem) -> None:
        if self.kind == "segment_length" and item.checkState() == Qt.Checked:
            self.segment_list.blockSignals(True)
            for i in range(self.segment_list.count()):
                other = self.segment_list.item(i)
                if other is not item:
                    other.setCheckState(Qt.Unchecked)
            self.segment_list.blockSignals(False)
        if item.checkState() == Qt.Checked and not self.group_button.isChecked():
            self.group_button.setChecked(True)
        self._refresh_range()
        self.changed.emit()

    def _refresh_range(self) -> None:
        """Unit and default range of the kind (kept when only the segments changed and the user typed one)."""
        try:
            p = self.parameter()
        except ValueError:
            p = None
        discrete = p is not None and p.discrete or self.kind in ("bore", "insulation_thickness")
        for w in (self.lower_caption, self.lower_edit, self.upper_caption, self.upper_edit):
            w.setVisible(not discrete)
        self.standard_label.setVisible(discrete)
        if p is None or self.alternative is None:
            self.standard_label.setText("")
            return
        if discrete:
            self._show_standard()
            return
        quantity = p.quantity
        key = (p.kind, p.segments)
        if key == self._range_for:
            return
        self._range_for = key
        if quantity != self._quantity:
            for edit in (self.lower_edit, self.upper_edit):
                edit.quantity = quantity
                edit.set_unit_system(self.system)
            self._quantity = quantity
        try:
            lo, hi = p.default_range(self.alternative)
        except (InputError, ValueError, TypeError, ZeroDivisionError):  # no sensible default: the user types one
            lo = hi = None
        self.set_range(lo, hi)

    def _show_standard(self) -> None:
        try:
            p = self.parameter()
        except ValueError as exc:
            self.standard_label.setText(str(exc))
            return
        if not p.discrete or self.alternative is None:
            return
        values = p.standard_values(self.alternative)
        shown = [value_words(p, v, self.system) for v in values]
        if p.kind == "bore":
            source = ("NPS sizes of the pipe catalogue (ASME B36.10M / B36.19M) that exist in the schedule of "
                      "every chosen segment")
        else:
            from solver import variants

            source = ("Standard insulation thicknesses: "
                      + getattr(variants, "INSULATION_LIST_SOURCE", "common practice (from memory)"))
        self.standard_label.setText("Standard sizes, smallest first: " + ", ".join(shown)
                                    + f" <span style='color:{style.INK_MUTED}'>(where the list comes from: "
                                      "point here)</span>")
        self.standard_label.setToolTip(source)


# --------------------------------------------------------------------------- what to meet


class _HoursEdit(QDoubleSpinBox):
    """A time in hours (the hold time)."""

    def __init__(self):
        super().__init__()
        self.setRange(0.1, 720.0)
        self.setDecimals(1)
        self.setSuffix(" h")
        self.setValue(8.0)


class TargetEditor(QWidget):
    """The targets: per kind a tick and a value in the user's units. ``targets()`` gives the ticked ones as
    :class:`solver.target_finder.Target` (SI); ValueError naming the field when a value cannot be read.
    The design-case targets (worst case, hold time) are offered when the project has design cases."""

    changed = Signal()

    def __init__(self, system: str = "SI", parent: Optional[QWidget] = None):
        super().__init__(parent)
        self.system = system
        self.boxes: dict[str, QCheckBox] = {}
        self.edits: dict[str, QWidget] = {}
        self._touched: set[str] = set()
        grid = QGridLayout(self)
        grid.setContentsMargins(0, 0, 0, 0)
        grid.setHorizontalSpacing(6)
        grid.setVerticalSpacing(2)
        for r, (kind, words, quantity, _mq, _design) in enumerate(TARGET_ROWS):
            box = QCheckBox(words)
            box.setToolTip(_TARGET_TIPS[kind])
            if quantity == "time":
                edit = _HoursEdit()
                edit.valueChanged.connect(lambda _v, k=kind: self._edited(k))
            else:
                edit = QuantityEdit(quantity, system, words, compact=True)
                edit.value_committed.connect(lambda _v, k=kind: self._edited(k))
            edit.setToolTip(_TARGET_TIPS[kind])
            edit.setMaximumWidth(150)
            box.toggled.connect(lambda _c: self.changed.emit())
            grid.addWidget(box, r, 0)
            grid.addWidget(edit, r, 1)
            self.boxes[kind] = box
            self.edits[kind] = edit
        grid.setColumnStretch(0, 1)
        self.set_value("surface_max", 333.15)  # 60 °C: personnel protection, common practice (see SURFACE_TIP)
        self.set_value("heat_loss_per_m_max", 20.0)
        self.set_value("pressure_drop_max", 1.0e5)
        self.set_value("outlet_min", 333.15)
        self.set_value("outlet_max", 363.15)
        self.set_value("bulk_min", 328.15)
        self.set_value("inner_wall_max", 383.15)
        self.set_value("worst_case_bulk_min", 328.15)
        self._touched.clear()

    def _edited(self, kind: str) -> None:
        self._touched.add(kind)
        self.boxes[kind].setChecked(True)  # a value typed is a value meant
        self.changed.emit()

    def set_value(self, kind: str, value_si: Optional[float]) -> None:
        edit = self.edits[kind]
        if value_si is None:
            return
        if isinstance(edit, _HoursEdit):
            edit.blockSignals(True)
            edit.setValue(value_si / 3600.0)
            edit.blockSignals(False)
        else:
            edit.set_value(value_si)

    def set_target(self, kind: str, value_si: Optional[float] = None, on: bool = True) -> None:
        """Tick (or untick) a target, with its value in SI (tests, defaults)."""
        self.set_value(kind, value_si)
        if value_si is not None:
            self._touched.add(kind)
        self.boxes[kind].setChecked(on)

    def clear(self) -> None:
        for box in self.boxes.values():
            box.setChecked(False)

    def set_context(self, project, alt) -> None:
        """Defaults from the project and the alternative for the values the user has not typed; the
        design-case rows shown only when the project has design cases."""
        limits = getattr(alt, "limits", None)
        targets = getattr(project, "targets", None)
        maintain = getattr(limits, "maintain_temperature_K", None) or getattr(limits, "min_bulk_temperature_K", None)
        defaults = {
            "bulk_min": maintain,
            "worst_case_bulk_min": maintain,
            "inner_wall_max": getattr(limits, "max_inner_wall_temperature_K", None)
            or getattr(targets, "max_inner_wall_temperature_K", None),
            "outlet_min": getattr(targets, "outlet_temperature_min_K", None),
            "outlet_max": getattr(targets, "outlet_temperature_max_K", None),
            "pressure_drop_max": getattr(targets, "max_pressure_drop_Pa", None),
        }
        for kind, value in defaults.items():
            if kind not in self._touched and value is not None:
                self.set_value(kind, value)
        has_design = getattr(project, "design_cases", None) is not None
        for kind in DESIGN_TARGETS:
            self.boxes[kind].setVisible(has_design)
            self.edits[kind].setVisible(has_design)
            if not has_design:
                self.boxes[kind].setChecked(False)

    def set_unit_system(self, system: str) -> None:
        self.system = system
        for edit in self.edits.values():
            if isinstance(edit, QuantityEdit):
                edit.set_unit_system(system)

    def ticked(self) -> list[str]:
        return [k for k, box in self.boxes.items() if box.isChecked() and not box.isHidden()]

    def targets(self) -> list:
        """The ticked targets (SI); ValueError naming the field when a value is missing or unreadable."""
        from solver.target_finder import Target

        out = []
        for kind in self.ticked():
            edit = self.edits[kind]
            if isinstance(edit, _HoursEdit):
                value = edit.value() * 3600.0
            else:
                if edit.pending or edit.has_error:
                    edit.commit()
                if edit.has_error:
                    raise ValueError(edit.error_text)
                value = edit.value()
                if value is None:
                    raise ValueError(f"{TARGET_ROW[kind][1]}: give a value or untick it.")
            out.append(Target(kind, float(value)))
        return out



def alternative_combo() -> QComboBox:
    combo = QComboBox()
    combo.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)
    combo.setMinimumContentsLength(18)
    combo.setToolTip("The alternative the search starts from (the current one unless you choose another)")
    return combo


def choose(combo: QComboBox, data, what: str) -> None:
    """Set ``combo`` to the item holding ``data``; ValueError ("no <what> ...") when none does."""
    i = combo.findData(data)
    if i < 0:
        raise ValueError(f"no {what} {data!r}")
    combo.setCurrentIndex(i)


def fill_alternatives(combo: QComboBox, doc, keep: Optional[str]) -> None:
    combo.blockSignals(True)
    combo.clear()
    for a in doc.project.alternatives:
        combo.addItem(a.name, a.name)
    names = [a.name for a in doc.project.alternatives]
    combo.setCurrentIndex(names.index(keep) if keep in names else doc.current_index)
    combo.blockSignals(False)




# --------------------------------------------------------------------------- the dock


class ToolDock(QWidget):
    """What the Target Finder and Sweep docks share; each builds its own view on it.

    Public: ``doc``, ``runner`` (its :class:`SearchRunner`), ``alternative_combo`` (the alternative to start
    from), ``targets`` (the :class:`TargetEditor`), ``status`` (the status line), ``running``,
    :meth:`set_alternative`, :meth:`shutdown`. A subclass sets ``pickers`` (its :class:`ParameterPicker`\\ s),
    lays out its view (:meth:`vary_box` gives the "Vary" column's start) and then calls
    :meth:`follow_document`; :meth:`_units_changed` redraws what it shows in the new units."""

    #: While a search runs the dock keeps the alternative it started from (a sweep's points belong to it).
    keeps_alternative_while_running = False

    def __init__(self, doc, name: str, status: str, parent: Optional[QWidget] = None):
        super().__init__(parent)
        self.doc = doc
        self.setObjectName(name)
        self.runner = SearchRunner(self)
        self.pickers: tuple[ParameterPicker, ...] = ()
        self.alternative_combo = alternative_combo()
        self.alternative_combo.activated.connect(lambda _i: self._on_alternative())
        self.targets = TargetEditor(doc.unit_system)
        self.status = QLabel(status)
        self.status.setWordWrap(True)
        self.status.setStyleSheet(f"color: {style.INK_MUTED};")

    def vary_box(self, title: str, picker: ParameterPicker) -> tuple[QGroupBox, QVBoxLayout]:
        """The "Vary" group: the alternative to start from, then ``picker``; its layout for what follows."""
        box = QGroupBox(title)
        lay = QVBoxLayout(box)
        row = QHBoxLayout()
        row.addWidget(QLabel("Start from"))
        row.addWidget(self.alternative_combo, 1)
        lay.addLayout(row)
        lay.addWidget(picker)
        return box, lay

    def follow_document(self) -> None:
        doc = self.doc
        doc.project_replaced.connect(self._on_project)
        doc.project_changed.connect(self._on_project)
        doc.current_alternative_changed.connect(self._on_current)
        doc.units_changed.connect(self._on_units)
        self._on_project()

    # ------------------------------------------------------------------ following the document

    @property
    def base_alternative(self):
        name = self.alternative_combo.currentData()
        for alt in self.doc.project.alternatives:
            if alt.name == name:
                return alt
        return self.doc.current_alternative

    def _on_project(self) -> None:
        fill_alternatives(self.alternative_combo, self.doc, self.alternative_combo.currentData())
        self._on_alternative()

    def _on_current(self, _index: int) -> None:
        if self.keeps_alternative_while_running and self.runner.running:
            return
        fill_alternatives(self.alternative_combo, self.doc, self.doc.current_alternative.name)
        self._on_alternative()

    def _on_alternative(self) -> None:
        alt = self.base_alternative
        for picker in self.pickers:
            if alt is not picker.alternative:
                picker.set_alternative(alt)
        self.targets.set_context(self.doc.project, alt)

    def _on_units(self, system: str) -> None:
        for w in (*self.pickers, self.targets):
            w.set_unit_system(system)
        self._units_changed(system)

    def _units_changed(self, system: str) -> None:
        """Show what is on show in ``system`` (the subclass's)."""

    def set_alternative(self, name: str) -> None:
        choose(self.alternative_combo, name, "alternative named")
        self._on_alternative()

    # ------------------------------------------------------------------ the runner and the status line

    def start_buttons(self, text: str, tip: str, start: Callable[[], object]) -> QHBoxLayout:
        """``go_button`` (the default button: ``start``) and ``cancel_button`` in a row, for the subclass to add."""
        self.go_button = QPushButton(text)
        self.go_button.setDefault(True)
        self.go_button.setToolTip(tip)
        self.go_button.setMinimumWidth(90)
        self.go_button.clicked.connect(lambda _checked=False: start())
        self.cancel_button = QPushButton("Cancel")
        self.cancel_button.setEnabled(False)
        self.cancel_button.clicked.connect(lambda _checked=False: self.cancel())
        row = QHBoxLayout()
        row.addWidget(self.go_button)
        row.addWidget(self.cancel_button)
        return row

    def _set_running(self, on: bool) -> None:
        self.go_button.setEnabled(not on)
        self.cancel_button.setEnabled(on)

    def cancel(self) -> None:
        """Stop the search under way (what a cancelled search leaves: :meth:`_cancelled`)."""
        if not self.runner.running:
            return
        self.runner.cancel()
        self._set_running(False)
        self._cancelled()

    def _cancelled(self) -> None:
        """Say what the cancelled search leaves (the subclass's)."""

    @property
    def running(self) -> bool:
        return self.runner.running

    def shutdown(self) -> None:
        self.runner.shutdown()

    def _say(self, text: str, colour: str) -> None:
        self.status.setText(text)
        self.status.setStyleSheet(f"color: {colour};")

    def add_alternative(self, base_name: str, alternative, record: Optional[dict]) -> Optional[str]:
        """``alternative`` (with its search record) as a new alternative after ``base_name``, one undo step,
        said in the status line; None (and why) when the project refuses it."""
        try:
            name = make_alternative(self.doc, base_name, alternative, record)
        except ValueError as exc:  # the project refused it (e.g. too many alternatives): say so
            self._say(f"Not added: {exc}", style.MISSED_COLOUR)
            return None
        self._say(f"Added alternative '{name}' (Undo takes it back).", style.INK_MUTED)
        return name
