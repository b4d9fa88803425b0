"""The Segment Card's "Heat path" section: where the selected segment's heat is held back.

A horizontal stacked bar of the series resistances from the fluid outwards (inside film, fouling,
wall, each insulation layer, the outer air film as convection ∥ radiation, or soil, jacket film,
condensate film), each block as wide as its share of the total; a legend with every share; the
heat per metre and the total. Pointing at a block gives its resistance and share (and, for the air
film, the parts convection and radiation carry). Numbers come from the current Result
(``Result.resistances``), words from :mod:`app.heat_path`, colours from :mod:`app.heat_path_style`; nothing is computed here.
"""

from __future__ import annotations

import html
import math
from typing import Optional

from PySide6.QtCore import QEvent, QRectF, QSize, Qt
from PySide6.QtGui import QPainter, QPen
from PySide6.QtWidgets import QGroupBox, QLabel, QToolTip, QVBoxLayout, QWidget

from app import heat_path, heat_path_style, style
from app.panels.editing import HINT_STYLE

_BAR_HEIGHT = 22
_MIN_LABEL_PX = 8  # a block narrower than its label plus this margin shows no label (the legend has it)


class ResistanceBar(QWidget):
    """A stacked bar of :class:`app.heat_path_style.BarPart` blocks; tooltips per block."""

    def __init__(self, parent: Optional[QWidget] = None):
        super().__init__(parent)
        self.parts: list[heat_path_style.BarPart] = []
        self.setMinimumHeight(_BAR_HEIGHT + 2)
        self.setMouseTracking(True)
        self.setAccessibleName("Heat path resistance shares")

    def sizeHint(self) -> QSize:
        return QSize(240, _BAR_HEIGHT + 2)

    def set_parts(self, parts: list[heat_path_style.BarPart]) -> None:
        self.parts = list(parts)
        self.setAccessibleDescription("; ".join(f"{p.label} {heat_path.percent_text(p.share_percent)}"
                                                for p in self.parts))
        self.update()

    def block_rects(self) -> list[QRectF]:
        """Each block's rectangle, left to right, widths in proportion to the shares."""
        # a share that is not a finite number (a resistance out of all range) gets no width: a NaN
        # width reaching the painter is undefined in Qt's integer geometry
        shares = [p.share_percent if math.isfinite(p.share_percent) and p.share_percent > 0 else 0.0
                  for p in self.parts]
        total = sum(shares) or 1.0
        width = self.width() - 1.0
        x = 0.5
        out = []
        for share in shares:
            w = width * share / total
            out.append(QRectF(x, 0.5, w, _BAR_HEIGHT))
            x += w
        return out

    def paintEvent(self, _event) -> None:
        painter = QPainter(self)
        painter.setRenderHint(QPainter.Antialiasing, False)
        fm = painter.fontMetrics()
        for part, rect in zip(self.parts, self.block_rects()):
            painter.fillRect(rect, style.qcolor(part.colour))
            text = part.short
            share = heat_path.percent_text(part.share_percent)
            full = f"{text} {share}"
            avail = rect.width() - _MIN_LABEL_PX
            label = full if fm.horizontalAdvance(full) <= avail else (share if fm.horizontalAdvance(share) <= avail else "")
            if label:
                painter.setPen(style.qcolor(heat_path_style.text_colour_on(part.colour)))
                painter.drawText(rect, Qt.AlignCenter, label)
        # white seams between blocks and a thin frame, so neighbours of like tone stay apart
        painter.setPen(QPen(style.qcolor(style.PANEL_BG), 1))
        for rect in self.block_rects()[1:]:
            painter.drawLine(rect.topLeft(), rect.bottomLeft())
        painter.setPen(QPen(style.qcolor(style.GRID), 1))
        painter.drawRect(QRectF(0.5, 0.5, self.width() - 1.0, _BAR_HEIGHT))
        painter.end()

    def part_at(self, x: float) -> Optional[heat_path_style.BarPart]:
        for part, rect in zip(self.parts, self.block_rects()):
            if rect.left() <= x < rect.right():
                return part
        return None

    def event(self, ev) -> bool:
        if ev.type() == QEvent.ToolTip:
            part = self.part_at(ev.pos().x())
            if part is not None:
                QToolTip.showText(ev.globalPos(), part.tooltip, self)
            else:
                QToolTip.hideText()
                ev.ignore()
            return True
        return super().event(ev)


class HeatPathBox(QGroupBox):
    """``HeatPathBox(doc)``: the selected segment's resistance breakdown; observes the Document.

    Public: ``bar`` (:class:`ResistanceBar`), ``legend``, ``heat`` and ``note`` (QLabels), ``shown``
    (the :class:`solver.resistances.SegmentResistances` on show, or None).
    """

    def __init__(self, doc, parent: Optional[QWidget] = None):
        super().__init__("Heat path", parent)
        self.doc = doc
        self.shown = None
        self._shown_for: tuple = ()
        lay = QVBoxLayout(self)
        lay.setContentsMargins(8, 6, 8, 6)
        lay.setSpacing(4)
        self.heat = QLabel("")
        self.heat.setWordWrap(True)
        self.heat.setStyleSheet(f"color: {style.INK}; font-weight: 600;")
        self.bar = ResistanceBar(self)
        self.legend = QLabel("")
        self.legend.setWordWrap(True)
        self.legend.setTextFormat(Qt.RichText)
        self.note = QLabel("")
        self.note.setWordWrap(True)
        self.note.setStyleSheet(HINT_STYLE)
        for w in (self.heat, self.bar, self.legend, self.note):
            lay.addWidget(w)
        self.setToolTip("Resistances per metre of pipe from the fluid outwards, in series: each block's width is "
                        "its share of the total, i.e. of the temperature drop from the fluid to the surroundings. "
                        "Convection and radiation of the outer air film act in parallel and make one block.")
        # bound methods, not lambdas: Qt drops these connections when this widget is deleted (a lambda
        # would outlive it and call into a deleted C++ object when a late result arrives)
        for signal in (doc.result_ready, doc.solve_failed, doc.units_changed, doc.selection_changed,
                       doc.current_alternative_changed):
            signal.connect(self._on_doc_changed)
        doc.project_replaced.connect(self.refresh)
        self.refresh()

    def _resistances(self):
        res = self.doc.result
        i = self.doc.selected_segment
        seg = self.doc.selected
        if res is None or seg is None or not 0 <= i < len(res.resistances):
            return None
        r = res.resistances[i]
        return r if r.name == seg.name else None  # a result from before segments were added or moved

    def _on_doc_changed(self, *_args) -> None:
        self.refresh()

    def refresh(self) -> None:
        r = self._resistances()
        system = self.doc.unit_system
        key = (r, system, self.doc.result_is_stale)
        if self._shown_for and self._shown_for[0] is r and self._shown_for[1:] == key[1:]:
            return
        self._shown_for = key
        self.shown = r
        if r is None:
            self.bar.set_parts([])
            self.bar.hide()
            _set_text(self.legend, "")
            _set_text(self.heat, "")
            _set_text(self.note, "Appears once the line is solved." if self.doc.selected is not None else "")
            return
        self.bar.show()
        parts = heat_path_style.bar_parts(r, system)
        self.bar.set_parts(parts)
        _set_text(self.heat, heat_path.heat_text(r, system))
        items = []
        for p in parts:
            items.append(f'<span style="color:{p.colour}; font-size: 11pt;">■</span>&nbsp;'  # one item never breaks
                         + html.escape(f"{p.short} {heat_path.percent_text(p.share_percent)}").replace(" ", "&nbsp;"))
        _set_text(self.legend, f'<span style="color:{style.INK};">' + " &nbsp; ".join(items) + "</span>")
        self.legend.setToolTip("\n".join(p.tooltip for p in parts))
        dominant = heat_path.dominant_text(r, system)
        note = f"{heat_path.total_text(r, system)}."
        if dominant and not math.isinf(r.total_K_m_per_W):
            note += f" {dominant[:1].upper() + dominant[1:]}."
        tracer = heat_path.tracer_text(r, system)
        if tracer:
            note += f" {tracer}."
        if self.doc.result_is_stale:
            note = "Stale: from the last result that solved. " + note
        _set_text(self.note, note)


def _set_text(label: QLabel, text: str) -> None:
    """Set a label's text only when it changes (a wrapped label re-lays out its parent on every set)."""
    if label.text() != text:
        label.setText(text)
