"""Target Finder: the smallest heater, the thinnest insulation, the bore... that meets the targets.

The dock has three columns, read left to right: **Vary** (the alternative to start from, what to vary and
over which segments, the range or the list of standard sizes), **Meet** (the targets, each a tick and a
value in the user's units) and **Answer** (the value found, big; the binding target; the margin on every
target; every key figure at the answer; the explanation in plain words; "Make alternative").

The search (:func:`solver.target_finder.find`) runs on the dock's :class:`~app.panels.search_tools.SearchRunner`;
Cancel discards the answer of the search under way. What the dock shares with the Sweep (the pickers, the
runner, the words, the frame of the dock, "Make alternative") is in :mod:`app.panels.search_tools`; its
public names are also importable from here.
"""

from __future__ import annotations

import math
from typing import Optional

from PySide6.QtCore import Qt, Signal
from PySide6.QtGui import QBrush, QFont
from PySide6.QtWidgets import (
    QAbstractItemView,
    QGroupBox,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QPushButton,
    QSizePolicy,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from app import style, units
from app.panels.search_tools import (  # noqa: F401 - the shared names, importable from here as before
    DESIGN_TARGETS,
    SURFACE_TIP,
    TARGET_FIGURE,
    TARGET_ROW,
    TARGET_ROWS,
    ParameterPicker,
    SearchRunner,
    TargetEditor,
    Ticket,
    ToolBody,
    ToolDock,
    alternative_combo,
    error_words,
    fill_alternatives,
    fmt,
    html_text,
    interactive,
    make_alternative,
    margin_words,
    needs_design,
    origin_alternative,
    outer_scroll,
    scrolling,
    target_words,
    value_words,
)
from solver.errors import InputError

# --------------------------------------------------------------------------- the finder's work (worker thread)


def _find_work(ticket: Ticket, _report) -> None:
    from solver.target_finder import find

    i = ticket.inputs
    # the explanation and the words of the search in the user's units
    ticket.answer = find(i["alternative"], i["parameter"], i["targets"], lower=i.get("lower"),
                         upper=i.get("upper"), design=i.get("design"), system=i.get("system", "SI"),
                         formatter=units.search_words)

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


class TargetFinderPanel(ToolDock):
    """``TargetFinderPanel(doc)``: the Target Finder dock. Public for tests: ``picker`` (ParameterPicker),
    ``targets`` (TargetEditor), ``alternative_combo``, ``find_button``, ``cancel_button``, ``make_button``,
    ``value_label``, ``binding_label``, ``explanation``, ``infeasible_box``, ``margins_table``,
    ``figures_table``, ``status``; ``result`` (the FinderResult on show); signal ``search_finished``."""

    search_finished = Signal()

    def __init__(self, doc, parent: Optional[QWidget] = None):
        super().__init__(doc, "TargetFinder", "Tick the targets, then Find.", parent)
        self.result = None
        self._base_name: Optional[str] = None
        self._shown_system = doc.unit_system
        self.runner.finished.connect(self._on_found)

        # -- Vary
        self.picker = ParameterPicker(doc.unit_system, "find", default_kind="insulation_thickness")
        self.pickers = (self.picker,)
        vary, v = self.vary_box("1  Vary", self.picker)
        hint = QLabel("The finder gives the smallest value in the range (or on the list) that meets every "
                      "ticked target, and says why when none does.")
        hint.setWordWrap(True)
        hint.setStyleSheet(f"color: {style.INK_MUTED};")
        v.addWidget(hint)
        v.addStretch(1)

        # -- Meet
        meet = QGroupBox("2  Meet")
        m = QVBoxLayout(meet)
        m.addWidget(self.targets)
        buttons = self.start_buttons("Find", "Search on a worker thread; the app stays usable meanwhile", self.find)
        self.find_button = self.go_button
        buttons.addStretch(1)
        m.addLayout(buttons)
        m.addWidget(self.status)
        m.addStretch(1)

        # -- Answer
        answer = QGroupBox("3  Answer")
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
        self.follow_document()

    def _units_changed(self, _system: str) -> None:
        if self.result is not None:
            self._show(self.result)

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
        self._set_running(True)
        self._say(f"Searching {parameter.label(alt).lower()} for '{alt.name}'…", style.INK_MUTED)
        return True

    def _cancelled(self) -> None:
        """Cancel discards the search under way (its answer is dropped when it arrives)."""
        self._say("Cancelled: the search's answer is discarded.", style.INK_MUTED)
        self.search_finished.emit()

    @property
    def searching(self) -> bool:
        return self.runner.running

    def _on_found(self, ticket: Ticket) -> None:
        self._set_running(False)
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
                                        f"parameter.</b><br>{html_text(r.explanation)}")
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
                    f"<b>Binding</b> (least margin): {html_text(target_words(binding, system))} "
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
        return self.add_alternative(self._base_name or self.doc.current_alternative.name, r.alternative, record)


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


def _safe_text(target) -> str:
    try:
        return target.text()
    except (KeyError, TypeError, AttributeError, ValueError):
        return ""
