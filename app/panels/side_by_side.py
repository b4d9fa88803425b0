"""Side-by-Side: the project's alternatives compared.

Profiles of the chosen alternatives overlaid (one colour and line style each,
the chooser as colour key, segment boundaries per alternative), Key Figures with one column per
alternative and the difference against the baseline, the design targets met or
missed, and the Checks of each. Every alternative is solved here (off the GUI
thread); unchanged alternatives are not solved again. Numbers come from
:mod:`app.comparison`, the same code the summary report uses.
"""

from __future__ import annotations

import math
from typing import Optional

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QObject, QRunnable, Qt, QThreadPool, QTimer, Signal
from PySide6.QtGui import QColor, QPen
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QListWidget,
    QListWidgetItem,
    QSplitter,
    QTableWidget,
    QTableWidgetItem,
    QTabWidget,
    QVBoxLayout,
    QWidget,
)

from app import comparison, units
from app.report import ALTERNATIVE_COLOURS, ALTERNATIVE_STYLES, MET_COLOUR, MISSED_COLOUR
from solver.results import Result

_PEN_STYLES = {"solid": Qt.SolidLine, "dash": Qt.DashLine, "dot": Qt.DotLine, "dashdot": Qt.DashDotLine}
_SEVERITY_ORDER = {"danger": 0, "warning": 1, "info": 2}


def _solve_one(alternative):
    """(result, error message) for one alternative; never raises."""
    from solver import solve
    from solver.errors import CalorunError

    try:
        return solve(alternative), None
    except CalorunError as exc:
        return None, str(exc)
    except Exception as exc:  # a bug in the solver must not take the view down
        return None, f"unexpected {type(exc).__name__}: {exc}"


class _Sink(QObject):
    finished = Signal(object)  # (generation, {key: (result, error)})


class _SolveAll(QRunnable):
    def __init__(self, generation: int, jobs: list, sink: _Sink):
        super().__init__()
        self.generation = generation
        self.jobs = jobs
        self.sink = sink

    def run(self) -> None:  # worker thread
        out = {key: _solve_one(alt) for key, alt in self.jobs}
        self.sink.finished.emit((self.generation, out))


def alternative_colour(index: int) -> str:
    return ALTERNATIVE_COLOURS[index % len(ALTERNATIVE_COLOURS)]


def alternative_style(index: int) -> str:
    return ALTERNATIVE_STYLES[(index // len(ALTERNATIVE_COLOURS)) % len(ALTERNATIVE_STYLES)]


class SideBySidePanel(QWidget):
    """Compare alternatives: overlaid profiles, Key Figures vs baseline, targets, checks."""

    results_updated = Signal()

    def __init__(self, doc, parent=None):
        super().__init__(parent)
        self.doc = doc
        self.setObjectName("SideBySidePanel")
        self._cache: dict[str, tuple[Optional[Result], Optional[str]]] = {}  # model JSON -> outcome
        self._generation = 0
        self._running = False
        self._pending = False
        self._hidden: set[str] = set()  # alternative names not overlaid
        self._curves: dict[str, tuple] = {}
        self._boundaries: dict[str, list] = {}
        self._pool = QThreadPool(self)
        self._pool.setMaxThreadCount(1)
        self._sink = _Sink()
        self._sink.finished.connect(self._on_solved)
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(60)
        self._timer.timeout.connect(self._start_solve)

        # --- left: which alternatives to overlay
        self.chooser = QListWidget(self)
        self.chooser.setObjectName("sideBySideChooser")
        self.chooser.setSelectionMode(QAbstractItemView.NoSelection)
        self.chooser.setMaximumWidth(240)
        self.chooser.itemChanged.connect(self._on_choice_changed)
        self.status = QLabel("", self)
        self.status.setWordWrap(True)
        self.status.setObjectName("sideBySideStatus")
        left = QWidget(self)
        lv = QVBoxLayout(left)
        lv.setContentsMargins(0, 0, 0, 0)
        lv.addWidget(QLabel("Shown (colour key)", left))
        lv.addWidget(self.chooser, 1)
        lv.addWidget(self.status)

        # --- plots
        self.temperature_plot = pg.PlotWidget(background="w")
        self.pressure_plot = pg.PlotWidget(background="w")
        for p in (self.temperature_plot, self.pressure_plot):
            p.showGrid(x=True, y=True, alpha=0.25)
        # the chooser on the left, in each alternative's colour, is the legend: a legend inside the
        # plots would cover the curves, which often run close together
        self.pressure_plot.setXLink(self.temperature_plot)
        plots = QWidget(self)
        pv = QVBoxLayout(plots)
        pv.setContentsMargins(0, 0, 0, 0)
        pv.addWidget(self.temperature_plot, 3)
        pv.addWidget(self.pressure_plot, 2)

        # --- tables
        self.figures_table = QTableWidget(self)
        self.figures_table.setObjectName("keyFiguresTable")
        self.targets_table = QTableWidget(self)
        self.targets_table.setObjectName("targetsTable")
        self.checks_table = QTableWidget(self)
        self.checks_table.setObjectName("checksTable")
        for t in (self.figures_table, self.targets_table, self.checks_table):
            t.setEditTriggers(QAbstractItemView.NoEditTriggers)
            t.verticalHeader().setSectionResizeMode(QHeaderView.ResizeToContents)
            t.setWordWrap(True)
        self.tabs = QTabWidget(self)
        self.tabs.addTab(self.figures_table, "Key Figures")
        self.tabs.addTab(self.targets_table, "Targets")
        self.tabs.addTab(self.checks_table, "Checks")

        right = QSplitter(Qt.Vertical, self)
        right.addWidget(plots)
        right.addWidget(self.tabs)
        right.setSizes([400, 300])
        layout = QHBoxLayout(self)
        layout.setContentsMargins(4, 4, 4, 4)
        layout.addWidget(left)
        layout.addWidget(right, 1)

        doc.project_replaced.connect(self._on_project_replaced)
        doc.project_changed.connect(self.schedule)
        doc.units_changed.connect(lambda _s: self.redraw())
        self._rebuild_chooser()
        self.schedule()

    # ------------------------------------------------------------------ solving

    def _key(self, alternative) -> str:
        return alternative.model_dump_json()

    def schedule(self) -> None:
        """Solve what changed, soon (debounced); the view updates when results arrive."""
        self._rebuild_chooser()
        self._timer.start()

    def _on_project_replaced(self) -> None:
        self._cache.clear()
        self._hidden.clear()
        self.schedule()

    def _missing_jobs(self) -> list:
        jobs, seen = [], set()
        for alt in self.doc.project.alternatives:
            key = self._key(alt)
            if key not in self._cache and key not in seen:
                seen.add(key)
                jobs.append((key, alt))
        return jobs

    def _start_solve(self) -> None:
        if not self.isVisible():
            return  # hidden: solve when shown (showEvent), so edits elsewhere stay quick
        if self._running:
            self._pending = True
            return
        jobs = self._missing_jobs()
        if not jobs:
            self.redraw()
            return
        self._running = True
        self._generation += 1
        self.status.setText(f"Solving {len(jobs)} alternative{'s' if len(jobs) != 1 else ''}…")
        self._pool.start(_SolveAll(self._generation, jobs, self._sink))

    def _on_solved(self, payload) -> None:  # GUI thread
        _generation, out = payload
        self._running = False
        self._cache.update(out)
        live = {self._key(a) for a in self.doc.project.alternatives}
        for key in list(self._cache):
            if key not in live:
                del self._cache[key]
        if self._pending or self._missing_jobs():
            self._pending = False
            self._start_solve()
            return
        self.redraw()

    def solve_all_now(self) -> None:
        """Solve on this thread and redraw (scripts, tests)."""
        self._timer.stop()
        for key, alt in self._missing_jobs():
            self._cache[key] = _solve_one(alt)
        self._rebuild_chooser()
        self.redraw()

    def wait_for_results(self, timeout_ms: int = 30000) -> None:
        """Let the worker finish (tests)."""
        self._pool.waitForDone(timeout_ms)

    def outcomes(self) -> list[tuple[str, Optional[Result], Optional[str]]]:
        """(name, result, error) for every alternative whose solve has finished, in project order."""
        out = []
        for alt in self.doc.project.alternatives:
            got = self._cache.get(self._key(alt))
            if got is not None:
                out.append((alt.name, got[0], got[1]))
        return out

    # ------------------------------------------------------------------ chooser

    def _rebuild_chooser(self) -> None:
        self.chooser.blockSignals(True)
        try:
            self.chooser.clear()
            names = [a.name for a in self.doc.project.alternatives]
            self._hidden &= set(names)
            for i, name in enumerate(names):
                item = QListWidgetItem(name)
                item.setFlags(item.flags() | Qt.ItemIsUserCheckable)
                item.setCheckState(Qt.Unchecked if name in self._hidden else Qt.Checked)
                item.setForeground(QColor(alternative_colour(i)))
                item.setData(Qt.UserRole, name)
                self.chooser.addItem(item)
        finally:
            self.chooser.blockSignals(False)

    def _on_choice_changed(self, item: QListWidgetItem) -> None:
        name = item.data(Qt.UserRole)
        if item.checkState() == Qt.Checked:
            self._hidden.discard(name)
        else:
            self._hidden.add(name)
        self.redraw()

    def set_overlaid(self, names) -> None:
        """Overlay exactly these alternatives."""
        wanted = set(names)
        self._hidden = {a.name for a in self.doc.project.alternatives if a.name not in wanted}
        self._rebuild_chooser()
        self.redraw()

    # ------------------------------------------------------------------ drawing

    def redraw(self) -> None:
        system = self.doc.unit_system
        outcomes = self.outcomes()
        solved = [(n, r) for n, r, e in outcomes if r is not None]
        failed = [(n, e) for n, r, e in outcomes if r is None]
        n_alts = len(self.doc.project.alternatives)
        if len(outcomes) < n_alts:
            self.status.setText("Solving…")
        elif failed:
            self.status.setText("Not solved: " + "; ".join(f"{n}: {e}" for n, e in failed))
        else:
            self.status.setText(f"{len(solved)} alternative{'s' if len(solved) != 1 else ''} solved.")
        self._draw_plots(solved, system)
        self._fill_figures([r for _, r in solved], system)
        self._fill_targets([r for _, r in solved], system)
        self._fill_checks(solved)
        self.results_updated.emit()

    def _pen(self, index: int, width: float = 2.0, style: Optional[str] = None) -> QPen:
        pen = QPen(QColor(alternative_colour(index)))
        pen.setWidthF(width)
        pen.setCosmetic(True)
        pen.setStyle(_PEN_STYLES[style or alternative_style(index)])
        return pen

    def _draw_plots(self, solved, system: str) -> None:
        names = [a.name for a in self.doc.project.alternatives]
        tp, pp = self.temperature_plot.getPlotItem(), self.pressure_plot.getPlotItem()
        shown = {n for n, _ in solved if n not in self._hidden}
        # drop curves of alternatives no longer shown
        for name in list(self._curves):
            if name not in shown:
                c_bulk, c_wall, c_pres = self._curves.pop(name)
                tp.removeItem(c_bulk)  # PlotItem.removeItem also drops the legend entry
                tp.removeItem(c_wall)
                pp.removeItem(c_pres)
        for name in list(self._boundaries):
            for line, plot in self._boundaries.pop(name):
                plot.removeItem(line)
        for name, r in solved:
            if name not in shown:
                continue
            i = names.index(name)
            x = units.to_display(np.asarray(r.profile.x_m, dtype=float), "length", system)
            bulk = units.to_display(np.asarray(r.profile.bulk_temperature_K, dtype=float), "temperature", system)
            wall = units.to_display(np.asarray(r.profile.inner_wall_temperature_K, dtype=float), "temperature", system)
            pres = units.to_display(np.asarray(r.profile.pressure_Pa, dtype=float), "pressure", system)
            if name not in self._curves:
                c_bulk = tp.plot(pen=self._pen(i, 2.2))
                c_wall = tp.plot(pen=self._pen(i, 1.2, "dot"))  # same colour, dotted; no legend entry
                c_pres = pp.plot(pen=self._pen(i, 2.0))
                self._curves[name] = (c_bulk, c_wall, c_pres)
            c_bulk, c_wall, c_pres = self._curves[name]
            c_bulk.setData(x, bulk)
            c_wall.setData(x, wall)
            c_pres.setData(x, pres)
            lines = []
            for span in r.segments[:-1]:
                xb = units.to_display(span.x_end_m, "length", system)
                for plot in (tp, pp):
                    line = pg.InfiniteLine(pos=xb, angle=90, pen=self._pen(i, 1.0, "dash"))
                    line.setToolTip(f"{name}: end of segment '{span.name}'")
                    plot.addItem(line)
                    lines.append((line, plot))
            self._boundaries[name] = lines
        tp.setTitle("Bulk temperature (solid) and inner-wall temperature (dotted)", size="9pt")
        tp.setLabel("left", f"Temperature [{units.label('temperature', system)}]")
        pp.setLabel("left", f"Pressure [{units.label('pressure', system)}]")
        pp.setLabel("bottom", f"Position from inlet [{units.label('length', system)}]")

    def _fill_figures(self, results: list[Result], system: str) -> None:
        t = self.figures_table
        t.clear()
        if not results:
            t.setRowCount(0)
            t.setColumnCount(0)
            return
        table = comparison.compare(results, self.doc.project.baseline)
        t.setColumnCount(len(table.names))
        t.setRowCount(len(table.rows))
        t.setHorizontalHeaderLabels([n + ("  (baseline)" if i == table.baseline_index else "") for i, n in enumerate(table.names)])
        t.setVerticalHeaderLabels([r.label for r in table.rows])
        for ri, row in enumerate(table.rows):
            ref = row.values[table.baseline_index]
            for ci, v in enumerate(row.values):
                text = comparison.format_figure(v, row.spec, system)
                if ci != table.baseline_index and v is not None:
                    text += "\n" + comparison.format_difference(row.differences[ci], ref, row.spec, system)
                item = QTableWidgetItem(text)
                item.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
                t.setItem(ri, ci, item)
        t.horizontalHeader().setSectionResizeMode(QHeaderView.Stretch)

    def _fill_targets(self, results: list[Result], system: str) -> None:
        t = self.targets_table
        t.clear()
        targets = self.doc.project.targets
        if not results or not comparison.targets_set(targets):
            t.setRowCount(1)
            t.setColumnCount(1)
            t.setHorizontalHeaderLabels([""])
            t.setVerticalHeaderLabels([""])
            t.setItem(0, 0, QTableWidgetItem("No design targets are set on this project." if results else "Nothing solved yet."))
            t.horizontalHeader().setSectionResizeMode(QHeaderView.Stretch)
            return
        per_alt = [comparison.target_verdicts(targets, r) for r in results]
        t.setColumnCount(len(results) + 1)
        t.setRowCount(len(per_alt[0]))
        t.setHorizontalHeaderLabels(["Limit"] + [r.name for r in results])
        t.setVerticalHeaderLabels([v.label for v in per_alt[0]])
        for ri, v0 in enumerate(per_alt[0]):
            t.setItem(ri, 0, QTableWidgetItem(comparison.format_target(v0, system)))
            for ci, verdicts in enumerate(per_alt, start=1):
                v = verdicts[ri]
                word = "\u2713 met" if v.met else "\u2717 missed"
                item = QTableWidgetItem(f"{word}   {units.format_value(v.value, v.quantity, system)}")
                item.setForeground(QColor(MET_COLOUR if v.met else MISSED_COLOUR))
                item.setData(Qt.UserRole, bool(v.met))
                t.setItem(ri, ci, item)
        t.horizontalHeader().setSectionResizeMode(QHeaderView.Stretch)

    def _fill_checks(self, solved) -> None:
        t = self.checks_table
        t.clear()
        rows = []
        for name, r in solved:
            alt = next((a for a in self.doc.project.alternatives if a.name == name), None)
            if not r.checks:
                rows.append((name, "ok", "", "No findings."))
            for c in sorted(r.checks, key=lambda c: _SEVERITY_ORDER.get(c.severity, 3)):
                where = []
                if alt is not None and c.segment is not None and 0 <= c.segment < len(alt.segments):
                    where.append(alt.segments[c.segment].name)
                if c.x_m is not None and math.isfinite(c.x_m):
                    where.append(units.format_value(c.x_m, "length", self.doc.unit_system))
                rows.append((name, c.severity, " at ".join(where), units.check_message(c, self.doc.unit_system)))
        t.setColumnCount(4)
        t.setRowCount(len(rows))
        t.setHorizontalHeaderLabels(["Alternative", "Severity", "Where", "Finding"])
        for ri, row in enumerate(rows):
            for ci, text in enumerate(row):
                t.setItem(ri, ci, QTableWidgetItem(text.upper() if ci == 1 else text))
        t.horizontalHeader().setSectionResizeMode(3, QHeaderView.Stretch)

    def showEvent(self, event) -> None:  # noqa: N802 (Qt name)
        super().showEvent(event)
        self.schedule()
