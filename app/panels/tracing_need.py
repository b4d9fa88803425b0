"""The Segment Card's design-case lines for the selected segment: the tracing it needs, what its heater
delivers, and how long it holds after a power failure.

Reads ``Result.design`` (:class:`solver.design_cases.DesignResult`) and the operating result's
per-segment heater output (:class:`solver.results.SegmentSpan`); words from :mod:`app.design_figures`.
"""

from __future__ import annotations

import math
from typing import Optional

from PySide6.QtWidgets import QGroupBox, QLabel, QVBoxLayout, QWidget

from app import design_figures, style, units
from app.panels.editing import HINT_STYLE

_HEATER_WORDS = {"constant": "constant output", "self_limiting": "self-limiting", "thermostat": "thermostat"}


class TracingNeedBox(QGroupBox):
    """``TracingNeedBox(doc)``: ``need`` (the tracing-need line), ``delivered``, ``hold`` and ``note`` QLabels."""

    def __init__(self, doc, parent: Optional[QWidget] = None):
        super().__init__("Design cases", parent)
        self.doc = doc
        self._shown_for: tuple = ()
        self._hold_for: tuple = ()  # (alternative, segment) the hold line was written for
        lay = QVBoxLayout(self)
        lay.setContentsMargins(8, 6, 8, 6)
        lay.setSpacing(3)
        self.need = QLabel("")
        self.need.setObjectName("TracingNeed")
        self.need.setWordWrap(True)
        self.delivered = QLabel("")
        self.delivered.setWordWrap(True)
        self.hold = QLabel("")
        self.hold.setWordWrap(True)
        self.note = QLabel("")
        self.note.setWordWrap(True)
        self.note.setStyleSheet(HINT_STYLE)
        for w in (self.need, self.delivered, self.hold, self.note):
            lay.addWidget(w)
        self.setToolTip("The tracing need: the heat this segment loses per metre in the worst case with the pipe at "
                        "the maintain temperature, plus its heat sinks, times (1 + design margin); what the "
                        "heater must deliver there (common practice in trace-heating design).")
        # bound methods, not lambdas: Qt drops these connections when this widget is deleted (a lambda
        # would outlive it and call into a deleted C++ object when a late result arrives)
        for signal in (doc.result_ready, doc.solve_failed, doc.units_changed, doc.selection_changed,
                       doc.current_alternative_changed):
            signal.connect(self._on_doc_changed)
        doc.project_replaced.connect(self.refresh)
        doc.hold_time_ready.connect(lambda r: self.refresh(force=True) if r is self.doc.result else None)
        self.refresh()

    def _segment(self):
        """(result, index) of the selected segment in the result on show, or (None, -1)."""
        res = self.doc.result
        i = self.doc.selected_segment
        seg = self.doc.selected
        if res is None or seg is None or res.design is None or not 0 <= i < len(res.design.segments):
            return None, -1
        if res.design.segments[i].name != seg.name:
            return None, -1  # a result from before segments were added or moved
        return res, i

    def _on_doc_changed(self, *_args) -> None:
        self.refresh()

    def refresh(self, force: bool = False) -> None:
        res, i = self._segment()
        system = self.doc.unit_system
        key = (res, i, system, self.doc.result_is_stale)
        if not force and self._shown_for and self._shown_for[0] is res and self._shown_for[1:] == key[1:]:
            return
        self._shown_for = key
        if res is None:
            for w in (self.need, self.delivered, self.hold):
                w.setText("")
                w.hide()
            self.note.setText("Appears once the line is solved." if self.doc.selected is not None else "")
            return
        design = res.design
        seg = design.segments[i]
        words = design.tracing_words(i, design_figures.formatter(system))
        if seg.holds is None:
            colour, symbol = style.INK_MUTED, ""
        elif seg.holds:
            colour, symbol = style.MET_COLOUR, "✓ "
        else:
            colour, symbol = style.MISSED_COLOUR, "✗ "
        self.need.setText(f"{symbol}Tracing {words}")
        self.need.setStyleSheet(f"color: {colour}; font-weight: 600;")
        self.need.show()
        span = res.segments[i]
        if span.heater_kind:
            text = (f"Heater ({_HEATER_WORDS.get(span.heater_kind, span.heater_kind)}) delivers "
                    f"{units.format_value(span.heater_output_W_per_m, 'power_per_length', system, digits=3)} "
                    "at the solved pipe temperature (operating)")
            if math.isfinite(span.thermostat_duty):
                text += f", on {span.thermostat_duty * 100:.0f} % of the time"
            self.delivered.setText(text + ".")
            self.delivered.show()
        else:
            self.delivered.setText("")
            self.delivered.hide()
        hold = design_figures.hold_line(self.doc.hold_time_of(res), i, system)
        if not hold and self.doc.hold_time_pending(res):
            # on its way (a few ms; hold_time_ready refreshes this): the same segment keeps its last line
            if self._hold_for != (self.doc.current_index, i):
                self.hold.setText("After a power failure: …")
        else:
            self.hold.setText(f"After a power failure: {hold}." if hold else "")
            self._hold_for = (self.doc.current_index, i)
        self.hold.setVisible(bool(self.hold.text()))
        notes = []
        if math.isfinite(seg.hot_wall_temperature_K):
            notes.append(f"Hot case: pipe wall up to {units.format_value(seg.hot_wall_temperature_K, 'temperature', system)}"
                         " (the heater's sheath runs hotter).")
        if self.doc.result_is_stale:
            notes.insert(0, "Stale: from the last result that solved.")
        self.note.setText(" ".join(notes))
