"""Target Finder: the smallest heater, the thinnest insulation, the bore... that meets the targets.

The dock has three columns, read left to right: **Vary** (the alternative to start from, what to vary and
over which segments, the range or the list of standard sizes), **Meet** (the targets, each a tick and a
value in the user's units) and **Answer** (the value found, big; the binding target; the margin on every
target; every key figure at the answer; the explanation in plain words; "Make alternative").

The search (:func:`solver.target_finder.find`) runs on a worker thread of this panel's own
(:class:`SearchRunner`, the Document's pattern: a QThreadPool of one thread, a plain-data ticket handed back
through a queued signal into a sink on the GUI thread and kept referenced until it arrives). Cancel discards
the answer of the search under way. The worker only ever holds plain data, never a Qt object (see
:mod:`app.gui_gc`).

Shared with the Sweep dock (:mod:`app.panels.sweep_panel`): :class:`ParameterPicker` (what to vary),
:class:`TargetEditor` (what to meet), :class:`SearchRunner` and :func:`origin_alternative` (an answer or a
picked point as a new alternative carrying its search record).
"""

from __future__ import annotations

import atexit
import math
import time
import weakref
from typing import Callable, Optional

from PySide6.QtCore import QObject, QRunnable, Qt, QThreadPool, Signal
from PySide6.QtGui import QBrush, QFont
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
    QHeaderView,
    QLabel,
    QListWidget,
    QListWidgetItem,
    QPushButton,
    QRadioButton,
    QScrollArea,
    QSizePolicy,
    QSpinBox,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from app import style, units
from app.commands import AddAlternative
from app.document import run_search
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


class _Job(QRunnable):
    def __init__(self, ticket: Ticket, sink: _Sink):
        super().__init__()
        self.setAutoDelete(True)
        self._ticket = ticket
        self._sink = sink

    def run(self) -> None:  # worker thread
        t = self._ticket
        t0 = time.perf_counter()
        if not t.cancelled:
            t.error = run_search(lambda: t.work(t, lambda: self._sink.progressed.emit(t)), "a search", error_words)
        t.seconds = time.perf_counter() - t0
        t.done = True
        self._sink.finished.emit(t)


_LIVE_RUNNERS: "weakref.WeakSet[SearchRunner]" = weakref.WeakSet()


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
        _LIVE_RUNNERS.add(self)

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


@atexit.register
def shutdown_all() -> None:
    """At interpreter exit every runner's worker is stopped and waited for (as the Document's are), so no
    search is still running Python while the interpreter and Qt tear down."""
    for runner in list(_LIVE_RUNNERS):
        try:
            runner.shutdown()
        except RuntimeError:
            pass  # its Qt side is already gone, and with it its pool


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


# --------------------------------------------------------------------------- what to vary


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


def _group_box(title: str) -> QGroupBox:
    box = QGroupBox(title)
    return box


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
        i = self.kind_combo.findData(kind)
        if i < 0:
            raise ValueError(f"no parameter kind {kind!r}")
        self.kind_combo.setCurrentIndex(i)
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


# --------------------------------------------------------------------------- the finder's work (worker thread)


def _find_work(ticket: Ticket, _report) -> None:
    from solver.target_finder import find

    i = ticket.inputs
    # the explanation and the words of the search in the user's units
    ticket.answer = find(i["alternative"], i["parameter"], i["targets"], lower=i.get("lower"),
                         upper=i.get("upper"), design=i.get("design"), system=i.get("system", "SI"),
                         formatter=units.search_words)


def alternative_combo() -> QComboBox:
    combo = QComboBox()
    combo.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)
    combo.setMinimumContentsLength(18)
    combo.setToolTip("The alternative the search starts from (the current one unless you choose another)")
    return combo


def fill_alternatives(combo: QComboBox, doc, keep: Optional[str]) -> None:
    combo.blockSignals(True)
    combo.clear()
    for a in doc.project.alternatives:
        combo.addItem(a.name, a.name)
    names = [a.name for a in doc.project.alternatives]
    combo.setCurrentIndex(names.index(keep) if keep in names else doc.current_index)
    combo.blockSignals(False)


def _small_table(columns: list[str]) -> QTableWidget:
    table = QTableWidget(0, len(columns))
    table.setHorizontalHeaderLabels(columns)
    table.verticalHeader().hide()
    table.setEditTriggers(QAbstractItemView.NoEditTriggers)
    table.setSelectionMode(QAbstractItemView.NoSelection)
    table.setShowGrid(False)
    table.verticalHeader().setDefaultSectionSize(20)
    table.setWordWrap(True)
    table.verticalHeader().setSectionResizeMode(QHeaderView.ResizeToContents)
    h = table.horizontalHeader()
    h.setSectionResizeMode(0, QHeaderView.Stretch)
    for c in range(1, len(columns)):
        h.setSectionResizeMode(c, QHeaderView.ResizeToContents)
    return table


def _set_row(table: QTableWidget, r: int, texts, colour: Optional[str] = None, bold: bool = False) -> None:
    for c, text in enumerate(texts):
        item = QTableWidgetItem(text)
        if c:
            item.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
        if colour:
            item.setForeground(QBrush(style.qcolor(colour)))
        if bold:
            f = item.font()
            f.setBold(True)
            item.setFont(f)
        table.setItem(r, c, item)


def key_figure_rows(key_figures: dict, system: str) -> list[tuple[str, str]]:
    """(label, value) of every compared key figure (shares of another indented), in the user's units."""
    from solver.results import KEY_FIGURES

    rows = []
    for f in KEY_FIGURES:
        if not f.compared or f.key not in key_figures:
            continue
        value = key_figures[f.key]
        label = f.label
        if f.negative_label and value is not None and value < 0:
            label, value = f.negative_label, -value
        rows.append(("   " + label if f.part_of else label, fmt(value, f.quantity, system)))
    return rows


class TargetFinderPanel(QWidget):
    """``TargetFinderPanel(doc)``: the Target Finder dock. Public for tests: ``picker`` (ParameterPicker),
    ``targets`` (TargetEditor), ``alternative_combo``, ``find_button``, ``cancel_button``, ``make_button``,
    ``value_label``, ``binding_label``, ``explanation``, ``infeasible_box``, ``margins_table``,
    ``figures_table``, ``status``; ``result`` (the FinderResult on show); signal ``search_finished``."""

    search_finished = Signal()

    def __init__(self, doc, parent: Optional[QWidget] = None):
        super().__init__(parent)
        self.doc = doc
        self.setObjectName("TargetFinder")
        self.result = None
        self._base_name: Optional[str] = None
        self._shown_system = doc.unit_system
        self.runner = SearchRunner(self)
        self.runner.finished.connect(self._on_found)

        # -- Vary
        self.alternative_combo = alternative_combo()
        self.alternative_combo.activated.connect(lambda _i: self._on_alternative())
        self.picker = ParameterPicker(doc.unit_system, "find", default_kind="insulation_thickness")
        vary = _group_box("1  Vary")
        v = QVBoxLayout(vary)
        row = QHBoxLayout()
        row.addWidget(QLabel("Start from"))
        row.addWidget(self.alternative_combo, 1)
        v.addLayout(row)
        v.addWidget(self.picker)
        hint = QLabel("The finder gives the smallest value in the range (or on the list) that meets every "
                      "ticked target, and says why when none does.")
        hint.setWordWrap(True)
        hint.setStyleSheet(f"color: {style.INK_MUTED};")
        v.addWidget(hint)
        v.addStretch(1)

        # -- Meet
        self.targets = TargetEditor(doc.unit_system)
        meet = _group_box("2  Meet")
        m = QVBoxLayout(meet)
        m.addWidget(self.targets)
        buttons = QHBoxLayout()
        self.find_button = QPushButton("Find")
        self.find_button.setDefault(True)
        self.find_button.setToolTip("Search on a worker thread; the app stays usable meanwhile")
        self.find_button.setMinimumWidth(90)
        self.find_button.clicked.connect(self.find)
        self.cancel_button = QPushButton("Cancel")
        self.cancel_button.setEnabled(False)
        self.cancel_button.clicked.connect(self.cancel)
        buttons.addWidget(self.find_button)
        buttons.addWidget(self.cancel_button)
        buttons.addStretch(1)
        m.addLayout(buttons)
        self.status = QLabel("Tick the targets, then Find.")
        self.status.setWordWrap(True)
        self.status.setStyleSheet(f"color: {style.INK_MUTED};")
        m.addWidget(self.status)
        m.addStretch(1)

        # -- Answer
        answer = _group_box("3  Answer")
        a = QVBoxLayout(answer)
        self.parameter_label = QLabel("")
        self.parameter_label.setWordWrap(True)
        self.parameter_label.setStyleSheet(f"color: {style.INK_MUTED};")
        self.value_label = QLabel("—")
        big = QFont(self.value_label.font())
        big.setPointSizeF(big.pointSizeF() * 2.0)
        big.setBold(True)
        self.value_label.setFont(big)
        self.value_label.setStyleSheet(f"color: {style.INK};")
        self.value_label.setTextInteractionFlags(Qt.TextSelectableByMouse)
        self.binding_label = QLabel("")
        self.binding_label.setWordWrap(True)
        self.binding_label.setTextFormat(Qt.RichText)
        self.infeasible_box = QLabel("")
        self.infeasible_box.setWordWrap(True)
        self.infeasible_box.setTextFormat(Qt.RichText)
        self.infeasible_box.setStyleSheet(
            f"color: {style.INK}; background: #FBEDE5; border: 2px solid {style.MISSED_COLOUR}; "
            "border-radius: 4px; padding: 8px;")
        self.infeasible_box.hide()
        self.margins_table = _small_table(["Target", "At the answer", "Margin"])
        self.margins_table.setMaximumHeight(130)
        self.figures_table = _small_table(["Key figure at the answer", "Value"])
        self.explanation = QLabel("")
        self.explanation.setWordWrap(True)
        self.explanation.setStyleSheet(f"color: {style.INK};")
        self.explanation.setTextInteractionFlags(Qt.TextSelectableByMouse)
        self.make_button = QPushButton("Make alternative")
        self.make_button.setToolTip("Add the answer as a new alternative after the one searched (undoable), "
                                    "with a record of the search for the report")
        self.make_button.clicked.connect(self.make_alternative)
        self.make_button.hide()
        top = QHBoxLayout()
        words = QVBoxLayout()
        words.addWidget(self.parameter_label)
        words.addWidget(self.value_label)
        top.addLayout(words, 1)
        top.addWidget(self.make_button, 0, Qt.AlignBottom)
        a.addLayout(top)
        a.addWidget(self.binding_label)
        a.addWidget(self.infeasible_box)
        a.addWidget(self.explanation)
        a.addWidget(self.margins_table)
        a.addWidget(self.figures_table, 1)

        # read left to right: what to vary, what to meet (both scroll in a low dock), the answer
        body = ToolBody()
        lay = QHBoxLayout(body)
        lay.setContentsMargins(4, 4, 4, 4)
        outer_scroll(self, body)
        for box, stretch in ((vary, 3), (meet, 3)):
            lay.addWidget(scrolling(box, 300), stretch)
        lay.addWidget(answer, 4)
        answer.setSizePolicy(QSizePolicy.Expanding, QSizePolicy.Preferred)
        self._clear_answer("")

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
        keep = self.alternative_combo.currentData()
        fill_alternatives(self.alternative_combo, self.doc, keep)
        self._on_alternative()

    def _on_current(self, _index: int) -> None:
        fill_alternatives(self.alternative_combo, self.doc, self.doc.current_alternative.name)
        self._on_alternative()

    def _on_alternative(self) -> None:
        alt = self.base_alternative
        if alt is not self.picker.alternative:
            self.picker.set_alternative(alt)
        self.targets.set_context(self.doc.project, alt)

    def _on_units(self, system: str) -> None:
        self.picker.set_unit_system(system)
        self.targets.set_unit_system(system)
        if self.result is not None:
            self._show(self.result)

    def set_alternative(self, name: str) -> None:
        i = self.alternative_combo.findData(name)
        if i < 0:
            raise ValueError(f"no alternative named {name!r}")
        self.alternative_combo.setCurrentIndex(i)
        self._on_alternative()

    # ------------------------------------------------------------------ searching

    def find(self) -> bool:
        """Start the search on the worker; False (and the reason in the status line) if it cannot start."""
        try:
            parameter = self.picker.parameter()
            targets = self.targets.targets()
            if not targets:
                raise ValueError("Tick at least one target to meet.")
            lower = upper = None
            if not parameter.discrete:
                lower, upper = self.picker.bounds()
        except ValueError as exc:
            self.result = None
            self._clear_answer("")  # an answer left from another search would read as this one's
            self._say(str(exc), style.MISSED_COLOUR)
            return False
        alt = self.base_alternative
        self._base_name = alt.name
        self.result = None
        self._clear_answer("Searching…")
        design = self.doc.project.design_cases if needs_design(targets) else None
        self.runner.start(_find_work, alternative=alt, parameter=parameter, targets=targets, lower=lower,
                          upper=upper, design=design, system=self.doc.unit_system)
        self.find_button.setEnabled(False)
        self.cancel_button.setEnabled(True)
        self._say(f"Searching {parameter.label(alt).lower()} for '{alt.name}'…", style.INK_MUTED)
        return True

    def cancel(self) -> None:
        """Discard the search under way (its answer is dropped when it arrives)."""
        if not self.runner.running:
            return
        self.runner.cancel()
        self.find_button.setEnabled(True)
        self.cancel_button.setEnabled(False)
        self._say("Cancelled: the search's answer is discarded.", style.INK_MUTED)
        self.search_finished.emit()

    @property
    def searching(self) -> bool:
        return self.runner.running

    def shutdown(self) -> None:
        self.runner.shutdown()

    def _on_found(self, ticket: Ticket) -> None:
        self.find_button.setEnabled(True)
        self.cancel_button.setEnabled(False)
        if ticket.error:
            self.result = None
            self._clear_answer("")
            self._say(f"The search stopped: {ticket.error}", style.MISSED_COLOUR)
        else:
            self.result = ticket.answer
            self._show(self.result)
            evaluations = getattr(self.result, "evaluations", None)
            done = f"Searched in {ticket.seconds:.2f} s" + (f", {evaluations} solves." if evaluations else ".")
            self._say(done, style.INK_MUTED)
        self.search_finished.emit()

    # ------------------------------------------------------------------ showing the answer

    def _say(self, text: str, colour: str) -> None:
        self.status.setText(text)
        self.status.setStyleSheet(f"color: {colour};")

    def _clear_answer(self, text: str) -> None:
        self.parameter_label.setText("")
        self.value_label.setText("—")
        self.binding_label.setText(text)
        self.explanation.setText("")
        self.infeasible_box.hide()
        self.make_button.hide()
        self.margins_table.setRowCount(0)
        self.figures_table.setRowCount(0)
        self.margins_table.show()
        self.figures_table.show()

    def _show(self, r) -> None:
        system = self.doc.unit_system
        alt = self.base_alternative if self._base_name is None else next(
            (a for a in self.doc.project.alternatives if a.name == self._base_name), self.base_alternative)
        try:
            what = r.parameter.label(alt)
        except (InputError, ValueError, IndexError, KeyError):  # the base alternative has changed since
            from solver.variants import PARAMETER_KINDS

            what = PARAMETER_KINDS.get(r.parameter.kind, r.parameter.kind)
        self.parameter_label.setText(f"{what} · from '{self._base_name}'")
        self.explanation.setText(r.explanation or "")
        if not r.feasible:
            self.value_label.setText("No value meets the targets")
            self.value_label.setStyleSheet(f"color: {style.MISSED_COLOUR};")
            self.binding_label.setText("")
            self.infeasible_box.setText(f"<b>{style.VERDICT_SYMBOLS['missed']} Not possible with this "
                                        f"parameter.</b><br>{_html(r.explanation)}")
            self.infeasible_box.show()
            self.explanation.setText(f"Searched: {r.searched}" if getattr(r, "searched", "") else "")
            self.make_button.hide()
        else:
            self.value_label.setText(value_words(r.parameter, r.value, system))
            self.value_label.setStyleSheet(f"color: {style.INK};")
            self.infeasible_box.hide()
            binding = r.binding
            floor = self._at_low_end(r, alt)
            if binding is not None:
                m = self._margin(r, binding)
                self.binding_label.setText(
                    f"<span style='color:{style.MET_COLOUR}'>{style.VERDICT_SYMBOLS['met']}</span> Meets every "
                    f"target{' already at ' + floor + ': no target holds it back' if floor else ''}. "
                    f"<b>Binding</b> (least margin): {_html(target_words(binding, system))} "
                    f"(margin {margin_words(binding.kind, m, system)})")
            else:
                self.binding_label.setText(f"{style.VERDICT_SYMBOLS['met']} Meets every target.")
            self.make_button.setVisible(r.alternative is not None)
        self._fill_margins(r, system)
        self._fill_figures(r, system)
        for table in (self.margins_table, self.figures_table):  # no answer, nothing to judge at it
            table.setVisible(bool(r.feasible))

    @staticmethod
    def _at_low_end(r, alt) -> str:
        """Words when the answer is the low end searched ("the smallest size on the list"), else ""."""
        try:
            if r.parameter.discrete:
                values = r.parameter.standard_values(alt)
                return "the smallest size on the list" if values and r.value == values[0] else ""
            low = getattr(r, "lower", None)
            if low is not None and abs(float(r.value) - float(low)) <= 1e-6 * max(1.0, abs(float(low))):
                return "the low end of the range"
        except (InputError, ValueError, TypeError):  # words only
            return ""
        return ""

    def _margin(self, r, target) -> float:
        margins = getattr(r, "margins", None) or {}
        for key in (target_words(target, "SI"), _safe_text(target)):
            if key in margins:
                return margins[key]
        source = r.key_figures
        try:
            return target.margin(r.result if r.result is not None and target.kind in DESIGN_TARGETS else source)
        except (KeyError, TypeError, AttributeError, ValueError):  # nothing to judge it on
            return math.nan

    def _fill_margins(self, r, system: str) -> None:
        kf = r.key_figures or {}
        rows = []
        for t in r.targets:
            m = self._margin(r, t)
            quantity = TARGET_ROW[t.kind][2] if t.kind in TARGET_ROW else ""
            try:
                at = fmt(t.figure(r.result if r.result is not None else kf), quantity, system)
            except (KeyError, TypeError, AttributeError, ValueError):  # nothing to read it from
                at = "—"
            met = m is not None and math.isfinite(m) and m >= 0 or (m is not None and m == math.inf)
            mark = style.VERDICT_SYMBOLS["met" if met else "missed"]
            binding = r.binding is not None and t.kind == r.binding.kind and t.value == r.binding.value
            rows.append(((f"{mark} {target_words(t, system)}" + ("  (binding)" if binding else ""), at,
                          margin_words(t.kind, m, system)), style.MET_COLOUR if met else style.MISSED_COLOUR, binding))
        table = self.margins_table
        table.setRowCount(len(rows))
        for i, (texts, colour, bold) in enumerate(rows):
            _set_row(table, i, texts, colour, bold)
        table.resizeRowsToContents()
        needed = table.horizontalHeader().height() + sum(table.rowHeight(i) for i in range(len(rows))) + 4
        table.setMaximumHeight(min(needed, 160))  # no empty rows under a few targets

    def _fill_figures(self, r, system: str) -> None:
        rows = key_figure_rows(r.key_figures or {}, system) if r.key_figures else []
        self.figures_table.setRowCount(len(rows))
        for i, texts in enumerate(rows):
            _set_row(self.figures_table, i, texts)

    # ------------------------------------------------------------------ the answer as an alternative

    def make_alternative(self) -> Optional[str]:
        """The answer as a new alternative after the one searched (one undo step); None if there is none."""
        r = self.result
        if r is None or not r.feasible or r.alternative is None:
            return None
        record = finder_record(r, self.base_alternative, self.doc.unit_system)
        try:
            name = make_alternative(self.doc, self._base_name or self.doc.current_alternative.name, r.alternative,
                                    record)
        except ValueError as exc:  # the project refused it (e.g. too many alternatives): say so
            self._say(f"Not added: {exc}", style.MISSED_COLOUR)
            return None
        self._say(f"Added alternative '{name}' (Undo takes it back).", style.INK_MUTED)
        return name


def finder_record(r, base, system: str) -> dict:
    """The finder's provenance record, with the words the report needs (the parameter's label, the targets'
    limits, the value) added where the finder's own record leaves them out."""
    record = dict(r.record())
    record.setdefault("parameter_text", r.parameter.label(base) if base is not None else "")
    record.setdefault("target_limits", [t.to_dict() for t in r.targets])
    if isinstance(r.value, (int, float, str)):
        record.setdefault("value", r.value)
    record.setdefault("explanation", r.explanation or "")
    return record


def _html(text: str) -> str:
    return (text or "").replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")


def _safe_text(target) -> str:
    try:
        return target.text()
    except (KeyError, TypeError, AttributeError, ValueError):
        return ""
