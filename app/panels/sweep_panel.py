"""Sweep: one parameter (or two, as a grid) over a range, the chosen key figures plotted live against it.

Left, the set-up: the alternative, what to vary (:class:`~app.panels.search_tools.ParameterPicker`:
from, to and the number of points, or the standard sizes), optionally a second parameter (one curve per
value of it), the key figures to plot and the targets (:class:`~app.panels.search_tools.TargetEditor`, as
in the Target Finder). Right, the plot: one chart per kind of quantity
(temperatures together, a pressure drop on its own...) sharing the x axis, the targets as dashed limit lines
on the figure they limit, the values where every target is met shaded (one-parameter sweeps; in a grid the
points that meet them all are drawn filled, the others hollow), and under it a table of every point.

The variants are solved off the GUI thread with :func:`solver.sweep.sweep`, in chunks that are drawn as they
arrive; Cancel stops after the chunk under way and keeps what is drawn. Pointing at the plot reads the value
and every figure at the nearest point; clicking picks a point, which "Make alternative" adds as a new
alternative (undoable, with a record of the sweep for the report). "Export CSV…" writes the table with
:func:`solver.sweep.sweep_csv` in the user's unit system through the one safe write.
"""

from __future__ import annotations

import math
from typing import Optional

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt, Signal
from PySide6.QtGui import QBrush, QPen
from PySide6.QtWidgets import (
    QAbstractItemView,
    QCheckBox,
    QFileDialog,
    QGroupBox,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QListWidget,
    QListWidgetItem,
    QProgressBar,
    QPushButton,
    QTabWidget,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from app import style, units
from app.panels.profiles import LegendStrip, plain_plot, plot_stack
from app.panels.search_tools import (
    TARGET_FIGURE,
    ParameterPicker,
    ToolBody,
    ToolDock,
    error_words,
    fmt,
    html_text,
    interactive,
    needs_design,
    outer_scroll,
    scrolling,
    target_words,
    value_words,
)

#: Plotted unless the user chooses otherwise.
DEFAULT_FIGURES = ("outlet_temperature_K", "min_bulk_temperature_K", "max_outer_surface_temperature_K")
_SYMBOLS = ("o", "s", "t", "d", "+", "x")
_QUANTITY_TITLES = {"temperature": "Temperature", "pressure_difference": "Pressure drop", "power": "Heat",
                    "power_per_length": "Heat per metre", "pressure": "Pressure", "velocity": "Velocity",
                    "dimensionless": "Number", "time": "Time", "mass_flow": "Mass flow"}
CSV_FILTER = "CSV (*.csv)"


def figure_choices():
    """The key figures a sweep can plot (those compared between alternatives), in reading order."""
    from solver.results import KEY_FIGURES

    return [f for f in KEY_FIGURES if f.compared]


def feasible_bands(xs, margins) -> list[tuple[float, float]]:
    """The stretches of x where every target is met: ``xs`` ascending (n), ``margins`` (n, targets), > 0 met,
    NaN not judged (a failed solve: not met). A band's edge lies where the margin of the target that changes
    there crosses zero, interpolated linearly between the two points (the midpoint when one of them has no
    margin). One point met on its own still gives a band, from crossing to crossing."""
    xs = np.asarray(xs, dtype=float)
    m = np.asarray(margins, dtype=float)
    n = len(xs)
    if n == 0:
        return []
    if m.ndim == 1:
        m = m.reshape(n, -1)
    ok = np.all(m >= 0.0, axis=1) if m.shape[1] else np.ones(n, dtype=bool)

    def crossing(a: int, b: int, entering: bool) -> float:
        """Where the targets missed at the infeasible end of (a, b) become met."""
        bad = a if entering else b
        good = b if entering else a
        edges = []
        for j in range(m.shape[1]):
            mb, mg = m[bad, j], m[good, j]
            if mb >= 0.0:
                continue  # met at both ends: not what changes here
            if math.isfinite(mb) and math.isfinite(mg) and mg != mb:
                t = mb / (mb - mg)  # 0 at the bad end, 1 at the good end
                edges.append(xs[bad] + (xs[good] - xs[bad]) * min(max(t, 0.0), 1.0))
            else:
                edges.append(0.5 * (xs[bad] + xs[good]))
        if not edges:
            return 0.5 * (xs[a] + xs[b])
        return max(edges) if entering else min(edges)

    bands = []
    i = 0
    while i < n:
        if not ok[i]:
            i += 1
            continue
        start = i
        while i + 1 < n and ok[i + 1]:
            i += 1
        left = xs[start] if start == 0 else crossing(start - 1, start, True)
        right = xs[i] if i == n - 1 else crossing(i, i + 1, False)
        bands.append((float(left), float(right)))
        i += 1
    return bands


def _sweep_work(ticket, report) -> None:  # worker thread: plain data only
    from solver.sweep import sweep

    i = ticket.inputs
    for chunk in sweep(i["alternative"], i["parameter"], i["values"], parameter2=i.get("parameter2"),
                       values2=i.get("values2"), chunk=i["chunk"], design=i.get("design"),
                       cancelled=ticket.is_cancelled):
        ticket.items.extend(chunk)
        report()
        if ticket.cancelled:
            break


class SweepPanel(ToolDock):
    """``SweepPanel(doc)``: the Sweep dock. Public for tests: ``picker``, ``picker2``, ``grid_box``,
    ``figure_list``, ``targets``, ``run_button``, ``cancel_button``, ``progress``, ``status``, ``table``,
    ``plots`` (quantity -> PlotItem), ``curves`` ((figure key, value2 index) -> PlotDataItem),
    ``limit_lines``, ``bands`` (x ranges shaded), ``variants``, ``selected``, ``make_button``,
    ``export_button``, :meth:`readout_at`, :meth:`select_point`, :meth:`export_csv`; signals
    ``run_finished`` and ``points_added``."""

    run_finished = Signal()
    points_added = Signal(int)

    keeps_alternative_while_running = True  # the points drawn belong to the alternative swept

    def __init__(self, doc, parent: Optional[QWidget] = None):
        super().__init__(doc, "Sweep", "Choose what to vary, then Run.", parent)
        self.runner.progressed.connect(self._on_progress)
        self.runner.finished.connect(self._on_finished)
        self.variants: list = []
        self.selected: Optional[int] = None
        self.bands: list[tuple[float, float]] = []
        self.plots: dict[str, pg.PlotItem] = {}
        self.curves: dict[tuple[str, int], pg.PlotDataItem] = {}
        self.limit_lines: list[pg.InfiniteLine] = []
        self._regions: dict[str, list[pg.LinearRegionItem]] = {}
        self._markers: dict[str, pg.ScatterPlotItem] = {}
        self._cursors: dict[str, pg.InfiniteLine] = {}
        self._run: Optional[dict] = None
        self._taken = 0
        self._ticket = None

        # ---- set-up column
        self.picker = ParameterPicker(doc.unit_system, "sweep", default_kind="heater_output", points=8)
        self.grid_box = QCheckBox("Second parameter (a grid: one curve per value)")
        self.grid_box.toggled.connect(self._on_grid)
        self.picker2 = ParameterPicker(doc.unit_system, "sweep", default_kind="insulation_thickness", points=3)
        self.picker2.hide()
        self.pickers = (self.picker, self.picker2)
        self.figure_list = QListWidget()
        self.figure_list.setSelectionMode(QAbstractItemView.NoSelection)
        self.figure_list.setMinimumHeight(110)
        for f in figure_choices():
            item = QListWidgetItem(f.indented_label())
            item.setData(Qt.UserRole, f.key)
            item.setFlags(Qt.ItemIsUserCheckable | Qt.ItemIsEnabled)
            item.setCheckState(Qt.Checked if f.key in DEFAULT_FIGURES else Qt.Unchecked)
            item.setToolTip(f.method)
            self.figure_list.addItem(item)
        buttons = self.start_buttons("Run", "Solve every value on a worker thread; the curves grow as the values "
                                     "are solved", self.run)
        self.run_button = self.go_button
        self.progress = QProgressBar()
        self.progress.setRange(0, 1)
        self.progress.setValue(0)
        self.progress.setFormat("%v of %m")

        # set-up in two columns (what to vary and plot | the targets and Run), each scrolling in a low dock
        vary, v = self.vary_box("1  Vary", self.picker)
        v.addWidget(self.grid_box)
        v.addWidget(self.picker2)
        plot_box = QGroupBox("2  Plot these key figures")
        p = QVBoxLayout(plot_box)
        p.addWidget(self.figure_list)
        first = QWidget()
        f = QVBoxLayout(first)
        f.setContentsMargins(0, 0, 0, 0)
        f.addWidget(vary)
        f.addWidget(plot_box, 1)
        meet = QGroupBox("3  Targets: limit lines, shaded where all are met")
        mlay = QVBoxLayout(meet)
        mlay.addWidget(self.targets)
        buttons.addWidget(self.progress, 1)
        mlay.addLayout(buttons)
        mlay.addWidget(self.status)
        mlay.addStretch(1)
        self.setup_areas = (scrolling(first, 300), scrolling(meet, 300))

        # ---- plot column
        self.legend = LegendStrip(self)
        self.graphics = pg.GraphicsLayoutWidget()
        self.graphics.setBackground(style.PANEL_BG)
        self.graphics.setMinimumHeight(110)
        self.graphics.scene().sigMouseMoved.connect(self._on_mouse_moved)
        self.graphics.scene().sigMouseClicked.connect(self._on_mouse_clicked)
        self.readout = QLabel("Run a sweep; then point at the plot to read the values, click a point to pick it.")
        self.readout.setTextFormat(Qt.RichText)
        self.readout.setWordWrap(True)
        self.readout.setStyleSheet(f"color: {style.INK}; padding: 2px 6px;")
        self.feasible_label = QLabel("")
        self.feasible_label.setWordWrap(True)
        self.feasible_label.setTextFormat(Qt.RichText)
        self.feasible_label.setStyleSheet("padding: 2px 6px;")
        self.make_button = QPushButton("Make alternative")
        self.make_button.setEnabled(False)
        self.make_button.setToolTip("Add the picked point as a new alternative after the one swept (undoable), "
                                    "with a record of the sweep for the report")
        self.make_button.clicked.connect(self.make_alternative)
        self.export_button = QPushButton("Export CSV…")
        self.export_button.setEnabled(False)
        self.export_button.setToolTip("The table of every point, in the units shown, units in the header")
        self.export_button.clicked.connect(lambda: self.export_csv())
        actions = QHBoxLayout()
        actions.addWidget(self.feasible_label, 1)
        actions.addWidget(self.make_button)
        actions.addWidget(self.export_button)
        self.table = QTableWidget(0, 0)
        self.table.verticalHeader().hide()
        self.table.setEditTriggers(QAbstractItemView.NoEditTriggers)
        self.table.setSelectionBehavior(QAbstractItemView.SelectRows)
        self.table.setSelectionMode(QAbstractItemView.SingleSelection)
        self.table.verticalHeader().setDefaultSectionSize(20)
        self.table.setMinimumHeight(70)
        self.table.itemSelectionChanged.connect(self._on_table_pick)

        top = plot_stack(self.legend, self.graphics, self.readout)
        # the plot and the table of every point, one tab each: in a low dock the plot keeps its height
        split = QTabWidget()
        split.setDocumentMode(True)
        split.addTab(top, "Plot")
        split.addTab(self.table, "Table")
        self.view_tabs = split

        body = ToolBody()
        lay = QHBoxLayout(body)
        lay.setContentsMargins(4, 4, 4, 4)
        outer_scroll(self, body)
        for area in self.setup_areas:
            lay.addWidget(area, 0)
        # what the sweep found and what to do with it stay in view above the plot
        right = QVBoxLayout()
        right.setSpacing(2)
        right.addLayout(actions)
        right.addWidget(split, 1)
        lay.addLayout(right, 1)
        self.follow_document()

    def _on_grid(self, on: bool) -> None:
        self.picker2.setVisible(on)

    def _units_changed(self, system: str) -> None:
        if self._run is not None:
            self._run["system"] = system
            self._build_plots()
            self._redraw()
            self._refill_table()

    def chosen_figures(self) -> list[str]:
        return [self.figure_list.item(i).data(Qt.UserRole) for i in range(self.figure_list.count())
                if self.figure_list.item(i).checkState() == Qt.Checked]

    def set_figures(self, keys) -> None:
        for i in range(self.figure_list.count()):
            item = self.figure_list.item(i)
            item.setCheckState(Qt.Checked if item.data(Qt.UserRole) in keys else Qt.Unchecked)

    # ------------------------------------------------------------------ running

    def run(self) -> bool:
        """Start the sweep on the worker; False (the reason in the status line) if it cannot start."""
        try:
            parameter = self.picker.parameter()
            values = self.picker.values()
            parameter2 = values2 = None
            if self.grid_box.isChecked():
                parameter2 = self.picker2.parameter()
                values2 = self.picker2.values()
                if parameter2.kind == parameter.kind:
                    raise ValueError("The second parameter must be another kind than the first.")
            targets = self.targets.targets()
            figures = self.chosen_figures()
            for t in targets:  # the figure a target limits is drawn, so its limit line has a curve
                key = TARGET_FIGURE.get(t.kind)
                if key and key not in figures:
                    figures.append(key)
            if not figures and not targets:
                raise ValueError("Tick at least one key figure to plot.")
        except ValueError as exc:
            self._say(str(exc), style.MISSED_COLOUR)
            return False
        alt = self.base_alternative
        total = len(values) * (len(values2) if values2 else 1)
        self._run = dict(alternative=alt, base=alt.name, parameter=parameter, values=list(values),
                         parameter2=parameter2, values2=list(values2) if values2 else None, targets=targets,
                         figures=figures, system=self.doc.unit_system, total=total)
        self.variants = []
        self.selected = None
        self.bands = []
        self._taken = 0
        self._build_plots()
        self._refill_table()
        self.progress.setRange(0, total)
        self.progress.setValue(0)
        chunk = max(4, min(50, total // 10 or 1))
        design = self.doc.project.design_cases if needs_design(targets) else None
        self._ticket = self.runner.start(_sweep_work, alternative=alt, parameter=parameter, values=list(values),
                                         parameter2=parameter2, values2=values2, chunk=chunk, design=design)
        self._set_running(True)
        self.make_button.setEnabled(False)
        self.export_button.setEnabled(False)
        self.feasible_label.setText("")
        self._say(f"Solving {total} variants of '{alt.name}'…", style.INK_MUTED)
        return True

    def _cancelled(self) -> None:
        """Cancel stops the sweep after the chunk under way; the points drawn stay."""
        self._ticket = None
        self._finish(f"Cancelled after {len(self.variants)} of {self._run['total']} points.")

    def _on_progress(self, ticket) -> None:
        new = ticket.items[self._taken:]
        self._taken += len(new)
        if not new:
            return
        self.variants.extend(new)
        self.progress.setValue(len(self.variants))
        self.view_tabs.setTabText(1, f"Table ({len(self.variants)} points)")
        self._redraw()
        self._append_rows(new)
        self.points_added.emit(len(self.variants))

    def _on_finished(self, ticket) -> None:
        self._on_progress(ticket)
        self._ticket = None
        if ticket.error:
            self._finish(f"The sweep stopped: {ticket.error}", style.MISSED_COLOUR)
            return
        failed = sum(1 for v in self.variants if not v.ok)
        text = f"{len(self.variants)} points solved in {ticket.seconds:.2f} s."
        if failed:
            text += f" {failed} did not solve (shown as gaps; the table says why)."
        self._finish(text)

    def _finish(self, text: str, colour: str = style.INK_MUTED) -> None:
        self._set_running(False)
        self.export_button.setEnabled(bool(self.variants))
        self._say(text, colour)
        self._show_feasible_words()
        self.run_finished.emit()

    # ------------------------------------------------------------------ x values and figures

    def _x(self, variant) -> float:
        r = self._run
        p = r["parameter"]
        if not p.quantity:  # a bore: its place in the list
            try:
                return float(r["values"].index(variant.value))
            except ValueError:
                return math.nan
        return float(units.to_display(float(variant.value), p.quantity, r["system"]))

    def _j(self, variant) -> int:
        values2 = self._run["values2"]
        if not values2:
            return 0
        try:
            return values2.index(variant.value2)
        except ValueError:
            return 0

    def _y(self, variant, key: str) -> float:
        from solver.results import key_figure

        kf = variant.key_figures if variant.ok else None
        if not kf or kf.get(key) is None:
            return math.nan
        return float(units.to_display(float(kf[key]), key_figure(key).quantity, self._run["system"]))

    def _margins(self, variant) -> list[float]:
        return [t.margin(variant) for t in self._run["targets"]]

    def _met(self, variant) -> bool:
        return all(m >= 0.0 for m in self._margins(variant))  # NaN: not met

    # ------------------------------------------------------------------ the plot

    def _build_plots(self) -> None:
        from solver.results import key_figure

        r = self._run
        system = r["system"]
        self.graphics.clear()
        self.plots, self.curves, self._regions, self._markers, self._cursors = {}, {}, {}, {}, {}
        self.limit_lines = []
        groups: dict[str, list[str]] = {}
        for key in r["figures"]:
            groups.setdefault(key_figure(key).quantity, []).append(key)
        p = r["parameter"]
        x_unit = units.label(p.quantity, system) if p.quantity else ""
        x_title = p.label(r["alternative"])
        first = None
        n2 = len(r["values2"]) if r["values2"] else 1
        entries = []
        for row, (quantity, keys) in enumerate(groups.items()):
            plot = self.graphics.addPlot(row=row, col=0)
            plain_plot(plot)
            y_unit = units.label(quantity, system)
            plot.setLabel("left", f"{_QUANTITY_TITLES.get(quantity, quantity)}" + (f" [{y_unit}]" if y_unit else ""),
                          color=style.INK)
            if first is None:
                first = plot
            else:
                plot.setXLink(first)
            self.plots[quantity] = plot
            self._regions[quantity] = []
            for k, key in enumerate(r["figures"]):
                if key not in keys:
                    continue
                for j in range(n2):
                    colour_index = j if n2 > 1 else k
                    colour = style.ALTERNATIVE_COLOURS[colour_index % len(style.ALTERNATIVE_COLOURS)]
                    pen_style = style.ALTERNATIVE_STYLES[k % len(style.ALTERNATIVE_STYLES)] if n2 > 1 else \
                        style.ALTERNATIVE_STYLES[k % len(style.ALTERNATIVE_STYLES)]
                    pen = style.colour_pen(colour, style=pen_style)
                    curve = pg.PlotDataItem([], [], pen=pen, symbol=_SYMBOLS[k % len(_SYMBOLS)], symbolSize=6,
                                            symbolPen=pg.mkPen(colour), symbolBrush=pg.mkBrush(colour),
                                            connect="finite")
                    plot.addItem(curve)
                    self.curves[(key, j)] = curve
                    label = key_figure(key).label
                    if n2 > 1:
                        label += " · " + value_words(r["parameter2"], r["values2"][j], system)
                    entries.append((label, pen))
            cursor = pg.InfiniteLine(angle=90, movable=False, pen=pg.mkPen(style.CURVE_COLOURS["cursor"], width=1,
                                                                           style=Qt.DotLine))
            plot.addItem(cursor, ignoreBounds=True)
            cursor.hide()
            self._cursors[quantity] = cursor
            marker = pg.ScatterPlotItem([], [], size=16, symbol="o", pen=pg.mkPen(style.SELECTION, width=2.5),
                                        brush=pg.mkBrush(None))
            plot.addItem(marker)
            self._markers[quantity] = marker
        # the targets: a dashed limit line on the chart of the figure they limit
        for k, t in enumerate(r["targets"]):
            key = TARGET_FIGURE.get(t.kind)
            if not key:
                continue
            quantity = key_figure(key).quantity
            plot = self.plots.get(quantity)
            if plot is None:
                continue
            y = units.to_display(t.value, quantity, system)
            line = pg.InfiniteLine(pos=y, angle=0, movable=False,
                                   pen=style.colour_pen(style.CURVE_COLOURS["limit"], 1.5, "dash"),
                                   label=target_words(t, system),
                                   # the labels of lines close together side by side, not on top of each other
                                   labelOpts={"position": 0.02 + 0.32 * (k % 3), "color": style.INK,
                                              "anchors": [(0, 1), (0, 1)],
                                              "fill": pg.mkBrush(style.qcolor(style.PANEL_BG, 200))})
            line.target = t
            plot.addItem(line)  # (its bounds count: the line stays in view)
            self.limit_lines.append(line)
        if self.limit_lines:
            entries.append(("target (limit)", style.colour_pen(style.CURVE_COLOURS["limit"], 1.5, "dash")))
            if not r["values2"]:
                shade = QPen(style.qcolor(style.MET_COLOUR))
                shade.setWidthF(8.0)
                entries.append(("every target met", shade))
        last = list(self.plots.values())[-1] if self.plots else None
        for plot in self.plots.values():
            if plot is last:
                plot.setLabel("bottom", x_title + (f" [{x_unit}]" if x_unit else ""), color=style.INK)
            else:
                plot.getAxis("bottom").setStyle(showValues=False)
        if not p.quantity and last is not None:  # a bore: the NPS sizes as ticks
            ticks = [(float(i), value_words(p, v, system)) for i, v in enumerate(r["values"])]
            last.getAxis("bottom").setTicks([ticks])
        self.legend.set_entries(entries)

    def _redraw(self) -> None:
        r = self._run
        if r is None:
            return
        n2 = len(r["values2"]) if r["values2"] else 1
        xs = np.array([self._x(v) for v in self.variants], dtype=float)
        js = np.array([self._j(v) for v in self.variants], dtype=int)
        met = np.array([self._met(v) for v in self.variants], dtype=bool) if r["targets"] else None
        for (key, j), curve in self.curves.items():
            idx = np.nonzero(js == j)[0] if n2 > 1 else np.arange(len(self.variants))
            order = idx[np.argsort(xs[idx], kind="stable")]
            ys = np.array([self._y(self.variants[i], key) for i in order], dtype=float)
            colour = curve.opts["symbolPen"].color()
            brushes = None
            if met is not None:  # filled where every target is met, hollow where one is missed
                brushes = [pg.mkBrush(colour) if met[i] else pg.mkBrush(style.PANEL_BG) for i in order]
            curve.setData(xs[order], ys, symbolBrush=brushes if brushes is not None else pg.mkBrush(colour))
        self._shade(xs, n2)
        self._show_marker()

    def _shade(self, xs, n2: int) -> None:
        r = self._run
        self.bands = []
        if r["targets"] and n2 == 1 and self.variants:
            order = np.argsort(xs, kind="stable")
            margins = np.array([self._margins(self.variants[i]) for i in order], dtype=float)
            self.bands = feasible_bands(xs[order], margins)
        for quantity, plot in self.plots.items():
            regions = self._regions[quantity]
            while len(regions) < len(self.bands):
                region = pg.LinearRegionItem(values=(0, 1), orientation="vertical", movable=False,
                                             brush=pg.mkBrush(style.qcolor(style.MET_COLOUR, 45)),
                                             pen=pg.mkPen(style.qcolor(style.MET_COLOUR, 160), width=1))
                region.setZValue(-10)
                plot.addItem(region, ignoreBounds=True)
                regions.append(region)
            for k, region in enumerate(regions):
                if k < len(self.bands):
                    x0, x1 = self.bands[k]
                    if x1 - x0 < 1e-9:
                        x0, x1 = x0 - 1e-3 * max(1.0, abs(x0)), x1 + 1e-3 * max(1.0, abs(x1))
                    region.setRegion((x0, x1))
                    region.show()
                else:
                    region.hide()

    def _x_text(self, x: float) -> str:
        r = self._run
        p = r["parameter"]
        if not p.quantity:
            i = int(round(x))
            return value_words(p, r["values"][i], r["system"]) if 0 <= i < len(r["values"]) else ""
        return fmt(units.from_display(x, p.quantity, r["system"]), p.quantity, r["system"])

    def _show_feasible_words(self) -> None:
        r = self._run
        if r is None or not r["targets"]:
            self.feasible_label.setText("")
            return
        met = style.VERDICT_SYMBOLS["met"]
        if r["values2"]:
            n = sum(1 for v in self.variants if self._met(v))
            self.feasible_label.setText(f"{met} {n} of {len(self.variants)} points meet every target (filled "
                                        "symbols).")
            return
        if not self.bands:
            self.feasible_label.setText(f"<span style='color:{style.MISSED_COLOUR}'>"
                                        f"{style.VERDICT_SYMBOLS['missed']} No value swept meets every target."
                                        "</span>")
            return
        p = r["parameter"]
        spans = []
        for x0, x1 in self.bands:
            if not p.quantity:
                spans.append(f"{self._x_text(x0)} to {self._x_text(x1)}" if x1 > x0 else self._x_text(x0))
            else:
                spans.append(units.format_range(units.from_display(x0, p.quantity, r["system"]),
                                                units.from_display(x1, p.quantity, r["system"]),
                                                p.quantity, r["system"], digits=3))
        self.feasible_label.setText(f"<span style='color:{style.MET_COLOUR}'>{met}</span> Every target met "
                                    f"(shaded): {'; '.join(spans)}")

    # ------------------------------------------------------------------ the table

    def _columns(self) -> list[str]:
        from solver.results import key_figure

        r = self._run
        system = r["system"]
        p = r["parameter"]
        cols = [p.label(r["alternative"]).split(",")[0] + (f" [{units.label(p.quantity, system)}]" if p.quantity else "")]
        if r["parameter2"] is not None:
            p2 = r["parameter2"]
            cols.append(p2.label(r["alternative"]).split(",")[0]
                        + (f" [{units.label(p2.quantity, system)}]" if p2.quantity else ""))
        for key in r["figures"]:
            f = key_figure(key)
            u = units.label(f.quantity, system)
            cols.append(f.label + (f" [{u}]" if u else ""))
        if r["targets"]:
            cols.append("Targets")
        return cols

    def _refill_table(self) -> None:
        self.table.blockSignals(True)
        self.table.clear()
        self.table.setRowCount(0)
        if self._run is None:
            self.table.setColumnCount(0)
            self.table.blockSignals(False)
            return
        cols = self._columns()
        self.table.setColumnCount(len(cols))
        self.table.setHorizontalHeaderLabels(cols)
        h = self.table.horizontalHeader()
        h.setSectionResizeMode(QHeaderView.ResizeToContents)
        self.table.blockSignals(False)
        self._append_rows(self.variants)

    def _append_rows(self, new) -> None:
        from solver.results import key_figure

        r = self._run
        system = r["system"]
        start = self.table.rowCount()
        self.table.setRowCount(start + len(new))
        for k, v in enumerate(new):
            row = start + k
            texts = [value_words(r["parameter"], v.value, system)]
            if r["parameter2"] is not None:
                texts.append(value_words(r["parameter2"], v.value2, system))
            kf = v.key_figures if v.ok else None
            for key in r["figures"]:
                texts.append(fmt(kf.get(key), key_figure(key).quantity, system) if kf else "—")
            colour = None
            if r["targets"]:
                if not v.ok:
                    texts.append(f"did not solve: {error_words(v.outcome.error)}")
                    colour = style.MISSED_COLOUR
                else:
                    missed = [t for t in r["targets"] if not t.margin(v) >= 0.0]
                    texts.append(style.VERDICT_SYMBOLS["met"] + " all met" if not missed else
                                 style.VERDICT_SYMBOLS["missed"] + " misses " + "; ".join(
                                     target_words(t, system) for t in missed))
                    colour = style.MET_COLOUR if not missed else style.MISSED_COLOUR
            elif not v.ok:
                texts.append(f"did not solve: {error_words(v.outcome.error)}")
            for c, text in enumerate(texts):
                item = QTableWidgetItem(text)
                item.setData(Qt.UserRole, self.variants.index(v) if v in self.variants else row)
                if 0 < c < len(texts) - (1 if r["targets"] else 0) or c == 0:
                    item.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
                if colour and c == len(texts) - 1:
                    item.setForeground(QBrush(style.qcolor(colour)))
                self.table.setItem(row, c, item)

    # ------------------------------------------------------------------ pointing and picking

    def _plot_at(self, scene_pos):
        for quantity, plot in self.plots.items():
            if plot.sceneBoundingRect().contains(scene_pos):
                return quantity, plot
        return None, None

    def _on_mouse_moved(self, scene_pos) -> None:
        if not self.variants:
            return
        _q, plot = self._plot_at(scene_pos)
        if plot is None:
            return
        x = plot.vb.mapSceneToView(scene_pos).x()
        self.readout.setText(self.readout_at(x))
        for cursor in self._cursors.values():
            cursor.setValue(self._nearest_x(x))
            cursor.show()

    def _nearest_x(self, x: float) -> float:
        xs = [self._x(v) for v in self.variants]
        finite = [v for v in xs if math.isfinite(v)]
        return min(finite, key=lambda v: abs(v - x)) if finite else x

    def readout_at(self, x: float) -> str:
        """Rich text: the swept value nearest ``x`` (display units) and every plotted figure there."""
        from solver.results import key_figure

        r = self._run
        if r is None or not self.variants:
            return ""
        system = r["system"]
        x_near = self._nearest_x(x)
        here = [v for v in self.variants if self._x(v) == x_near]
        parts = [f"<b>{value_words(r['parameter'], here[0].value, system)}</b>"]
        for v in here:
            bits = []
            if r["values2"]:
                bits.append(f"<i>{value_words(r['parameter2'], v.value2, system)}</i>:")
            if not v.ok:
                bits.append(f"did not solve ({html_text(error_words(v.outcome.error))})")
            else:
                kf = v.key_figures
                bits.append(" · ".join(f"{key_figure(k).label} {fmt(kf.get(k), key_figure(k).quantity, system)}"
                                       for k in r["figures"]))
                if r["targets"]:
                    missed = [t for t in r["targets"] if not t.margin(v) >= 0.0]
                    bits.append(f"<span style='color:{style.MET_COLOUR}'>{style.VERDICT_SYMBOLS['met']} all "
                                "targets met</span>" if not missed else
                                f"<span style='color:{style.MISSED_COLOUR}'>{style.VERDICT_SYMBOLS['missed']} "
                                + "; ".join(html_text(target_words(t, system)) for t in missed) + " missed</span>")
            parts.append(" ".join(bits))
        return "<br>".join(parts) if r["values2"] else " — ".join(parts)

    def _on_mouse_clicked(self, event) -> None:
        if not self.variants or event.button() != Qt.LeftButton:
            return
        quantity, plot = self._plot_at(event.scenePos())
        if plot is None:
            return
        point = plot.vb.mapSceneToView(event.scenePos())
        self.select_point(self.nearest_point(point.x(), point.y(), quantity))

    def nearest_point(self, x: float, y: Optional[float] = None, quantity: Optional[str] = None) -> int:
        """Index (in ``variants``) of the point nearest ``x`` (and, in a grid, of the curve nearest ``y`` on the
        chart of ``quantity``), in display units."""
        x_near = self._nearest_x(x)
        here = [i for i, v in enumerate(self.variants) if self._x(v) == x_near]
        if len(here) == 1 or y is None or quantity is None:
            return here[0]
        from solver.results import key_figure

        keys = [k for k in self._run["figures"] if key_figure(k).quantity == quantity]

        def distance(i: int) -> float:
            ds = [abs(self._y(self.variants[i], k) - y) for k in keys]
            ds = [d for d in ds if math.isfinite(d)]
            return min(ds) if ds else math.inf

        return min(here, key=distance)

    def select_point(self, index: Optional[int]) -> None:
        """Pick a point (index in ``variants``): marked on the plot and in the table; "Make alternative" on."""
        if index is None or not 0 <= index < len(self.variants):
            self.selected = None
        else:
            self.selected = index
        self._show_marker()
        v = self.variants[self.selected] if self.selected is not None else None
        self.make_button.setEnabled(v is not None and v.ok and v.alternative is not None and not self.running)
        if v is not None:
            self.readout.setText("Picked: " + self.readout_at(self._x(v)))
            self.table.blockSignals(True)
            for row in range(self.table.rowCount()):
                if self.table.item(row, 0).data(Qt.UserRole) == index:
                    self.table.selectRow(row)
                    self.table.scrollToItem(self.table.item(row, 0))
                    break
            self.table.blockSignals(False)

    def _on_table_pick(self) -> None:
        items = self.table.selectedItems()
        if items:
            self.select_point(items[0].data(Qt.UserRole))

    def _show_marker(self) -> None:
        from solver.results import key_figure

        v = self.variants[self.selected] if self.selected is not None and self.selected < len(self.variants) else None
        for quantity, marker in self._markers.items():
            if v is None:
                marker.setData([], [])
                continue
            keys = [k for k in self._run["figures"] if key_figure(k).quantity == quantity]
            x = self._x(v)
            ys = [self._y(v, k) for k in keys]
            pts = [(x, y) for y in ys if math.isfinite(y)]
            marker.setData([p[0] for p in pts], [p[1] for p in pts])

    # ------------------------------------------------------------------ a point as an alternative

    def searched_words(self) -> str:
        r = self._run
        system = r["system"]

        def one(p, values) -> str:
            what = p.label(r["alternative"])
            if p.discrete:
                return f"{what} over {len(values)} standard values: " + ", ".join(value_words(p, v, system)
                                                                                 for v in values)
            return (f"{what} from {value_words(p, values[0], system)} to {value_words(p, values[-1], system)}, "
                    f"{len(values)} points")

        text = one(r["parameter"], r["values"])
        if r["parameter2"] is not None:
            text += "; and " + one(r["parameter2"], r["values2"])[0].lower() + one(r["parameter2"], r["values2"])[1:]
        return text

    def record(self, variant) -> dict:
        """The Sweep's provenance record of a picked point (a SearchRecord of solver.model, as a dict)."""
        from solver.model import MAX_POINT_FIGURES, MAX_SWEEP_POINTS

        r = self._run
        system = r["system"]
        targets = r["targets"]
        binding = ""
        finite = [(t.relative_margin(t.margin(variant)), k) for k, t in enumerate(targets)
                  if math.isfinite(t.margin(variant))]
        if finite:
            binding = targets[min(finite)[1]].text()
        figures = list(r["figures"])[:MAX_POINT_FIGURES]
        points = []
        for v in self.variants[:MAX_SWEEP_POINTS]:
            kf = v.key_figures if v.ok else None
            figs = {k: float(kf[k]) for k in figures if kf and kf.get(k) is not None and math.isfinite(kf[k])}
            point = {"value": _plain(v.value), "figures": figs}
            if r["parameter2"] is not None:
                point["value2"] = _plain(v.value2)
            points.append(point)
        missed = [t for t in targets if not t.margin(variant) >= 0.0]
        value_text = value_words(r["parameter"], variant.value, system)
        if r["parameter2"] is not None:
            value_text += ", " + value_words(r["parameter2"], variant.value2, system)
        explanation = (f"Picked from a sweep of {len(self.variants)} points at {value_text}; "
                       + ("it meets every target." if targets and not missed else
                          "no targets were set." if not targets else
                          "it misses " + "; ".join(t.text() for t in missed) + "."))
        record = {
            "tool": "Sweep",
            "base_alternative": r["base"],
            "parameter": r["parameter"].to_dict(),
            "parameter_text": r["parameter"].label(r["alternative"]),
            "searched": self.searched_words(),
            "targets": [t.text() for t in targets],
            "target_limits": [t.to_dict() for t in targets],
            "binding": binding,
            "value_text": value_text,
            "value": _plain(variant.value),
            "explanation": explanation,
            "sweep_points": points,
        }
        if r["parameter2"] is not None:
            record.update(parameter2=r["parameter2"].to_dict(),
                          parameter2_text=r["parameter2"].label(r["alternative"]), value2=_plain(variant.value2))
        return record

    def make_alternative(self) -> Optional[str]:
        """The picked point as a new alternative after the one swept (one undo step); None if none is picked."""
        if self.selected is None or self._run is None:
            return None
        v = self.variants[self.selected]
        if not v.ok or v.alternative is None:
            return None
        from solver.target_finder import answer_name

        r = self._run
        name = answer_name(r["alternative"], r["parameter"], v.value)
        if r["parameter2"] is not None:
            name = answer_name(r["alternative"].model_copy(update={"name": name}), r["parameter2"], v.value2)
        alt = v.alternative.model_copy(update={"name": name})
        return self.add_alternative(r["base"], alt, self.record(v))

    # ------------------------------------------------------------------ CSV

    def csv_text(self) -> str:
        from solver.sweep import sweep_csv

        r = self._run
        return sweep_csv(self.variants, r["parameter"], list(r["figures"]), system=self.doc.unit_system,
                         parameter2=r["parameter2"], unit_of=units.unit)

    def export_csv(self, path=None) -> bool:
        """Write the table as CSV (the user's units, units in the header) through the one safe write."""
        if self._run is None or not self.variants:
            self._say("Nothing to export: run a sweep first.", style.MISSED_COLOUR)
            return False
        if path is None:
            if not interactive():
                return False
            suggested = f"{self._run['base']} sweep.csv".replace("/", "-")
            path, _ = QFileDialog.getSaveFileName(self, "Export sweep as CSV", suggested, CSV_FILTER)
            if not path:
                return False
        from solver.safe_write import atomic_write_text

        try:
            atomic_write_text(path, self.csv_text(), encoding="utf-8-sig", newline="")
        except OSError as exc:
            self._say(f"CSV not written: {exc.strerror or exc}", style.MISSED_COLOUR)
            return False
        self._say(f"Sweep written to {path}", style.INK_MUTED)
        return True


def _plain(value):
    """A value as the record keeps it: a float (SI) or a size's name."""
    if isinstance(value, str):
        return value
    return float(value)


__all__ = ["SweepPanel", "feasible_bands", "figure_choices"]
