"""The Calorun main window: Line Strip across the top, Profiles in the centre, Feed and Segment
Card on the left, Key Figures and Checks on the right, a slim cautions banner.

The window assembles: it builds the panels and docks, wires the menus and dialogs, and hands
every job to the module that owns it: the Document (the project, undo, the solve runner),
:mod:`app.recovery` (autosave file), :mod:`app.settings` (remembered units and recent files),
:mod:`app.report` (the PDF). :func:`run` is the entry point of ``calorun`` (including the offscreen
``--screenshot`` mode, which leaves the remembered settings alone).

Dialogs go through small hooks (``error_dialog``, ``ask_recover``, ``ask_save_changes``,
``ask_save_elsewhere``, ``choose_open_path``, ``choose_save_path``) so tests can answer them; when the window is not
interactive (offscreen platform) the hooks never block: they record the message in
``self.messages`` and take the safe default.
"""

from __future__ import annotations

import os
import sys
import time
from pathlib import Path
from typing import Optional

os.environ.setdefault("PYQTGRAPH_QT_LIB", "PySide6")

from PySide6.QtCore import QEventLoop, Qt, QTimer  # noqa: E402
from PySide6.QtGui import QAction, QActionGroup, QColor, QGuiApplication, QKeySequence, QPalette  # noqa: E402
from PySide6.QtWidgets import (  # noqa: E402
    QApplication,
    QComboBox,
    QDialog,
    QDialogButtonBox,
    QDockWidget,
    QFileDialog,
    QFrame,
    QLabel,
    QMainWindow,
    QMessageBox,
    QProgressDialog,
    QScrollArea,
    QSizePolicy,
    QTabWidget,
    QTextBrowser,
    QToolBar,
    QVBoxLayout,
    QWidget,
)

from app import gui_gc, recovery, settings  # noqa: E402
from app.document import Document, SolveFailure, default_project  # noqa: E402
from solver.results import CAUTIONS, CAUTIONS_BANNER  # noqa: E402

DEMO_PROJECT = Path(__file__).with_name("demo_project.json")


class _WrappingLabel(QLabel):
    """A word-wrapped label that takes the height its text needs at its width.

    A tool bar does not ask its widgets for height-for-width, so a plain wrapped label there is
    sized for its narrowest width (several lines): this one sets its height after each resize.
    """

    def resizeEvent(self, event) -> None:  # noqa: N802 (Qt)
        super().resizeEvent(event)
        needed = self.heightForWidth(self.width())
        if needed > 0 and needed != self.height():
            self.setFixedHeight(needed)

PROJECT_FILTER = "Calorun project (*.json);;All files (*)"
AUTOSAVE_INTERVAL_MS = 60_000
AUTOSAVE_AFTER_EDIT_MS = 3_000
#: height the Target Finder and Sweep docks are given when shown [px]
TOOL_HEIGHT = 400


def load_demo_project():
    """The bundled demo project, or a small built-in project if the file is missing or invalid."""
    from solver.errors import ProjectFileError
    from solver.project_io import load_project

    try:
        return load_project(DEMO_PROJECT)
    except ProjectFileError:
        return default_project()


class MainWindow(QMainWindow):
    def __init__(self, doc: Optional[Document] = None, interactive: Optional[bool] = None,
                 remember: bool = True, unit_system: Optional[str] = None):
        """``remember=False`` (``--screenshot``): a window that leaves nothing for the next run (no
        settings, no Recent files entry, no autosave file). ``unit_system`` overrides the remembered
        unit system for this window."""
        super().__init__()
        if interactive is None:
            interactive = QGuiApplication.platformName() not in ("offscreen", "minimal")
        self.interactive = interactive
        self.remember = remember
        self.messages: list[tuple[str, str]] = []  # (title, text) of every dialog shown or suppressed
        if doc is None:
            doc = Document(unit_system=unit_system or settings.unit_system(), parent=self)
        self.doc = doc
        self.first_result_time: Optional[float] = None
        # this window's own autosave file, locked for its life so no other instance offers or removes
        # it; none for a window that remembers nothing (or when the recovery folder cannot be written)
        self.recovery_slot: Optional[recovery.InstanceSlot] = None
        self._autosave_off: Optional[str] = None
        if remember:
            try:
                self.recovery_slot = recovery.InstanceSlot()
            except OSError as exc:
                self._autosave_off = exc.strerror or str(exc)
        self.recovery_file: Optional[Path] = self.recovery_slot.path if self.recovery_slot else None
        self._docks_before_comparison: Optional[list] = None
        self._showing_demo = False
        self.setObjectName("CalorunMainWindow")
        self.setDockOptions(QMainWindow.AnimatedDocks | QMainWindow.AllowNestedDocks | QMainWindow.AllowTabbedDocks)
        self.setStyleSheet(_WINDOW_STYLE)

        self._build_panels()
        self._build_actions()
        self._build_banner()
        self._build_menus()
        self._build_status()

        d = self.doc
        d.modified_changed.connect(self._update_title)
        d.path_changed.connect(self._update_title)
        d.project_replaced.connect(self._update_title)
        d.project_changed.connect(self._on_project_changed)
        d.project_replaced.connect(self._refresh_alternatives)
        d.current_alternative_changed.connect(self._refresh_alternatives)
        d.result_ready.connect(self._on_result)
        d.solve_failed.connect(self._on_solve_failed)
        d.solve_started.connect(self._on_solve_started)
        d.units_changed.connect(self._on_units_changed)

        self._autosave_timer = QTimer(self)
        self._autosave_timer.setInterval(AUTOSAVE_INTERVAL_MS)
        self._autosave_timer.timeout.connect(self.write_recovery)
        if self.remember:
            self._autosave_timer.start()
        self._edit_autosave = QTimer(self)
        self._edit_autosave.setSingleShot(True)
        self._edit_autosave.setInterval(AUTOSAVE_AFTER_EDIT_MS)
        self._edit_autosave.timeout.connect(self.write_recovery)

        self.resize(1600, 1000)
        self._update_title()
        self._refresh_alternatives()

    # ------------------------------------------------------------------ dialog hooks (replaceable in tests)

    def error_dialog(self, title: str, text: str, details: Optional[list[str]] = None) -> None:
        body = text + ("\n\n" + "\n".join(details) if details else "")
        self.messages.append((title, body))
        if not self.interactive:
            print(f"{title}: {body}", file=sys.stderr)
            return
        box = QMessageBox(QMessageBox.Warning, title, text, QMessageBox.Ok, self)
        if details:
            box.setInformativeText("\n".join(details[:12]) + ("\n…" if len(details) > 12 else ""))
            box.setDetailedText("\n".join(details))
        box.exec()

    def ask_recover(self, info: str) -> bool:
        self.messages.append(("Recover", info))
        if not self.interactive:
            return False
        answer = QMessageBox.question(
            self, "Recover unsaved work?",
            f"Calorun did not close normally last time. {info}\n\nRecover it now?",
            QMessageBox.Yes | QMessageBox.No, QMessageBox.Yes)
        return answer == QMessageBox.Yes

    def ask_save_elsewhere(self, text: str) -> bool:
        """A save was refused (read-only, not an ordinary file...): offer Save As. True to choose another file."""
        self.messages.append(("Project not saved", text))
        if not self.interactive:
            print(f"Project not saved: {text}", file=sys.stderr)
            return False
        box = QMessageBox(QMessageBox.Warning, "Project not saved", text, QMessageBox.Cancel, self)
        save_as = box.addButton("Save As…", QMessageBox.AcceptRole)
        box.setDefaultButton(save_as)
        box.exec()
        return box.clickedButton() is save_as

    def ask_save_changes(self) -> str:
        """'save', 'discard' or 'cancel'."""
        if not self.interactive:
            return "discard"
        answer = QMessageBox.question(
            self, "Unsaved changes",
            f"'{self.doc.project.name}' has changes that are not saved. Save them?",
            QMessageBox.Save | QMessageBox.Discard | QMessageBox.Cancel, QMessageBox.Save)
        return {QMessageBox.Save: "save", QMessageBox.Discard: "discard"}.get(answer, "cancel")

    def choose_open_path(self) -> Optional[str]:
        if not self.interactive:
            return None
        path, _ = QFileDialog.getOpenFileName(self, "Open project", self._start_dir(), PROJECT_FILTER)
        return path or None

    def choose_save_path(self, title: str = "Save project as", filter_text: str = PROJECT_FILTER,
                         suggested: str = "") -> Optional[str]:
        if not self.interactive:
            return None
        path, _ = QFileDialog.getSaveFileName(self, title, str(Path(self._start_dir()) / suggested), filter_text)
        return path or None

    def _start_dir(self) -> str:
        if self.doc.path:
            return str(self.doc.path.parent)
        return str(Path.home())

    # ------------------------------------------------------------------ layout

    def _build_panels(self) -> None:
        from app.panels.checks_panel import ChecksPanel
        from app.panels.feed_panel import FeedPanel
        from app.panels.hold_time_view import HoldTimeView
        from app.panels.key_figures import KeyFiguresPanel
        from app.panels.line_strip import LineStrip
        from app.panels.profiles import ProfilesPanel
        from app.panels.segment_card import SegmentCard

        from app.panels.alternatives_panel import AlternativesPanel
        from app.panels.side_by_side import SideBySidePanel

        d = self.doc
        self.profiles = ProfilesPanel(d)
        self.side_by_side = SideBySidePanel(d)
        self.centre_tabs = QTabWidget(self)
        self.centre_tabs.setObjectName("CentreTabs")
        self.centre_tabs.setDocumentMode(True)
        self.centre_tabs.addTab(self.profiles, "Profiles")
        self.centre_tabs.addTab(self.side_by_side, "Side-by-Side")
        self.setCentralWidget(self.centre_tabs)
        self.alternatives_panel = AlternativesPanel(d)
        self.line_strip = LineStrip(d)
        self.segment_card = SegmentCard(d)
        self.feed_panel = FeedPanel(d)
        self.key_figures = KeyFiguresPanel(d)
        self.checks = ChecksPanel(d)
        self.hold_time = HoldTimeView(d)

        self.line_strip_dock = self._dock("Line Strip", self.line_strip, Qt.TopDockWidgetArea)
        self.line_strip_dock.setTitleBarWidget(QWidget())  # the strip's own toolbar carries its title
        self.feed_dock = self._dock("Feed", self._scrolling(self.feed_panel), Qt.LeftDockWidgetArea)
        self.card_dock = self._dock("Segment Card", self.segment_card, Qt.LeftDockWidgetArea)
        self.key_dock = self._dock("Key Figures", self.key_figures, Qt.RightDockWidgetArea)
        self.alternatives_dock = self._dock("Alternatives", self.alternatives_panel, Qt.RightDockWidgetArea)
        self.splitDockWidget(self.alternatives_dock, self.key_dock, Qt.Vertical)
        self.checks_dock = self._dock("Checks", self.checks, Qt.BottomDockWidgetArea)
        self.hold_time_dock = self._dock("Hold Time", self._scrolling(self.hold_time), Qt.BottomDockWidgetArea)
        self.tabifyDockWidget(self.checks_dock, self.hold_time_dock)
        self.checks_dock.raise_()  # the Checks first; the Hold Time one tab away (View menu)
        self.hold_time_dock.visibilityChanged.connect(self._on_hold_time_shown)
        self._build_design_tools()
        self.splitDockWidget(self.feed_dock, self.card_dock, Qt.Vertical)
        # the strip spans the full width; the side columns sit below it
        self.setCorner(Qt.TopLeftCorner, Qt.TopDockWidgetArea)
        self.setCorner(Qt.TopRightCorner, Qt.TopDockWidgetArea)
        self.setCorner(Qt.BottomLeftCorner, Qt.LeftDockWidgetArea)
        self.setCorner(Qt.BottomRightCorner, Qt.RightDockWidgetArea)
        self.resizeDocks([self.feed_dock, self.key_dock], [425, 410], Qt.Horizontal)
        self.resizeDocks([self.feed_dock, self.card_dock], [330, 520], Qt.Vertical)
        self.resizeDocks([self.checks_dock], [165], Qt.Vertical)
        self.resizeDocks([self.alternatives_dock, self.key_dock], [190, 660], Qt.Vertical)
        self.centre_tabs.currentChanged.connect(self._on_centre_tab)

    def _on_centre_tab(self, index: int) -> None:
        """The Side-by-Side takes the whole window; the editing panels come back with the Profiles.

        Six alternatives need the width: with the side panels open the centre is about 750 px wide
        at 1600 px (450 px at 1280), too narrow for six columns of figures. The Side-by-Side has
        its own Key Figures and Checks, and any panel can still be opened from the View menu.
        """
        comparing = self.centre_tabs.widget(index) is self.side_by_side
        docks = [self.line_strip_dock, self.feed_dock, self.card_dock, self.key_dock, self.alternatives_dock,
                 self.checks_dock, self.hold_time_dock, self.finder_dock, self.sweep_dock, self.line_list_dock]
        if comparing and self._docks_before_comparison is None:
            self._docks_before_comparison = [d for d in docks if not d.isHidden()]
            for d in self._docks_before_comparison:
                d.hide()
            self.statusBar().showMessage("Side-by-Side uses the whole window; the editing panels come back "
                                         "with the Profiles tab.", 6000)
        elif not comparing and self._docks_before_comparison is not None:
            for d in self._docks_before_comparison:
                d.show()
            self._docks_before_comparison = None

    def _build_design_tools(self) -> None:
        """Target Finder and Sweep: tabs beside the Line Strip, across the full width (a plot and three columns
        of set-up need it), hidden until asked for (Tools menu, View menu) so the main screen stays as it is;
        in front, a tool takes the height it needs and the strip is one tab away."""
        from app.panels.sweep_panel import SweepPanel
        from app.panels.target_finder_panel import TargetFinderPanel

        self.target_finder = TargetFinderPanel(self.doc)
        self.sweep_panel = SweepPanel(self.doc)
        self.finder_dock = self._dock("Target Finder", self.target_finder, Qt.TopDockWidgetArea)
        self.sweep_dock = self._dock("Sweep", self.sweep_panel, Qt.TopDockWidgetArea)
        self.tabifyDockWidget(self.line_strip_dock, self.finder_dock)
        self.tabifyDockWidget(self.finder_dock, self.sweep_dock)
        # the Line List (File ▸ Open Line List…): a batch run's lines, one tab further
        from app.panels.line_list_view import LineListView

        self.line_list = LineListView()
        self.line_list_dock = self._dock("Line List", self.line_list, Qt.TopDockWidgetArea)
        self.tabifyDockWidget(self.sweep_dock, self.line_list_dock)
        self.line_list.open_requested.connect(self.open_line)
        self.line_list.status.connect(lambda text: self.statusBar().showMessage(text, 10000))
        for dock in (self.finder_dock, self.sweep_dock, self.line_list_dock):
            dock.hide()
            dock.visibilityChanged.connect(  # (the dock as the timer's context: no call after it is gone)
                lambda visible, d=dock: QTimer.singleShot(0, d, lambda: self._tool_shown(d)))
        # (once a tool is closed the dock layout settles after its own signal: the strip's says when)
        self.line_strip_dock.visibilityChanged.connect(
            lambda visible: visible and QTimer.singleShot(0, lambda: self._tool_shown(self.finder_dock)))
        self.line_strip_dock.raise_()

    def show_tool(self, dock: QDockWidget) -> None:
        """Tools ▸ Target Finder… / Sweep…: show the dock (a tab beside the Line Strip) and bring it to the front."""
        if self.centre_tabs.currentWidget() is self.side_by_side:
            self.centre_tabs.setCurrentWidget(self.profiles)  # the editing panels and the tools come back
        strip = self.line_strip_dock
        if strip.isVisible() and not strip.visibleRegion().isEmpty():
            self._strip_height = strip.height()  # given back when the tools are closed
        dock.show()
        dock.raise_()
        QTimer.singleShot(0, lambda: self._grow_bottom(dock, TOOL_HEIGHT))

    def _grow_bottom(self, dock: QDockWidget, height: int) -> None:
        if dock.isVisible() and not dock.visibleRegion().isEmpty() and not dock.isFloating() and dock.height() < height:
            self.resizeDocks([dock], [height], Qt.Vertical)

    def _tool_shown(self, dock: QDockWidget) -> None:
        """A tool in front gets its height; back on the Line Strip (or both tools closed), the strip its own."""
        if dock.isVisible() and not dock.visibleRegion().isEmpty():
            self._grow_bottom(dock, TOOL_HEIGHT)
            self._tool_was_shown = True
        elif getattr(self, "_tool_was_shown", False) and not any(d.isVisible() and not d.visibleRegion().isEmpty() for d in (self.finder_dock, self.sweep_dock, self.line_list_dock)):
            strip = self.line_strip_dock
            height = getattr(self, "_strip_height", None) or strip.sizeHint().height()
            if strip.isVisible() and not strip.isFloating() and strip.height() > height:
                self.resizeDocks([strip], [height], Qt.Vertical)  # back to the height it had before
                self._tool_was_shown = False

    def _on_hold_time_shown(self, visible: bool) -> None:
        """Drawn when shown (it waits while out of sight); the plot and its table need more height than
        the Checks list: grow the bottom area."""
        if not visible:
            return
        self.hold_time.refresh(shown=True)
        QTimer.singleShot(0, self._grow_hold_time)  # once the tab switch has laid the dock out

    def _grow_hold_time(self) -> None:
        dock = self.hold_time_dock
        if dock.isVisible() and not dock.visibleRegion().isEmpty() and not dock.isFloating() and dock.height() < 420:
            self.resizeDocks([dock], [420], Qt.Vertical)

    @staticmethod
    def _scrolling(widget: QWidget) -> QScrollArea:
        """A panel that scrolls instead of forcing the window taller than a 1280×800 screen."""
        area = QScrollArea()
        area.setWidget(widget)
        area.setWidgetResizable(True)
        area.setFrameShape(QFrame.NoFrame)
        area.setHorizontalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
        return area

    def _dock(self, title: str, widget: QWidget, area) -> QDockWidget:
        dock = QDockWidget(title, self)
        dock.setObjectName(title.replace(" ", "") + "Dock")
        dock.setWidget(widget)
        dock.setFeatures(QDockWidget.DockWidgetMovable | QDockWidget.DockWidgetFloatable | QDockWidget.DockWidgetClosable)
        self.addDockWidget(area, dock)
        return dock

    def edit_project_details(self):
        """File ▸ Project details and targets: a dialog; its changes are one undo step."""
        from app.panels.project_details import ProjectDetailsDialog

        dialog = ProjectDetailsDialog(self.doc, self)
        if self.interactive:
            dialog.exec()
        return dialog

    def _build_banner(self) -> None:
        bar = QToolBar("Main", self)
        bar.setObjectName("MainBar")
        bar.setMovable(False)
        bar.setFloatable(False)
        bar.setToolButtonStyle(Qt.ToolButtonTextOnly)
        bar.addActions([self.new_action, self.open_action, self.save_action])
        bar.addSeparator()
        # toolbar copies with short, fixed text (the menu entries say what they undo)
        stack = self.doc.undo_stack
        self.undo_button_action = QAction("Undo", self)
        self.redo_button_action = QAction("Redo", self)
        self.undo_button_action.triggered.connect(stack.undo)
        self.redo_button_action.triggered.connect(stack.redo)
        stack.canUndoChanged.connect(self.undo_button_action.setEnabled)
        stack.canRedoChanged.connect(self.redo_button_action.setEnabled)
        # bound methods, not lambdas: Qt drops the connection when the window goes, before the stack does
        stack.undoTextChanged.connect(self._undo_tip)
        stack.redoTextChanged.connect(self._redo_tip)
        self.undo_button_action.setEnabled(stack.canUndo())
        self.redo_button_action.setEnabled(stack.canRedo())
        bar.addActions([self.undo_button_action, self.redo_button_action])
        bar.addSeparator()
        self.alt_label = QLabel("  Alternative ")
        self.alt_label.setStyleSheet("font-weight: 600;")
        bar.addWidget(self.alt_label)
        self.alt_combo = QComboBox()
        self.alt_combo.setMinimumContentsLength(22)
        self.alt_combo.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)
        self.alt_combo.setToolTip("Design alternatives kept in this project")
        self.alt_combo.activated.connect(self.doc.set_current_alternative)
        bar.addWidget(self.alt_combo)
        spacer = QWidget()
        spacer.setSizePolicy(QSizePolicy.Expanding, QSizePolicy.Preferred)
        bar.addWidget(spacer)
        bar.addWidget(QLabel("Units "))
        self.units_combo = QComboBox()
        self.units_combo.addItem("SI", "SI")
        self.units_combo.addItem("US customary", "US")
        self.units_combo.setCurrentIndex(1 if self.doc.unit_system == "US" else 0)
        self.units_combo.setToolTip("Display units; the project file always stays SI")
        self.units_combo.activated.connect(lambda i: self.set_unit_system(self.units_combo.itemData(i)))
        bar.addWidget(self.units_combo)
        self.addToolBar(Qt.TopToolBarArea, bar)
        self.alternative_bar = bar

        # the cautions: one slim line across the bottom of the window, always in view, never modal
        cbar = QToolBar("Cautions", self)
        cbar.setObjectName("BannerBar")
        cbar.setMovable(False)
        cbar.setFloatable(False)
        self.banner = _WrappingLabel(f"⚠&nbsp; {CAUTIONS_BANNER} &nbsp;<a href='#cautions'>More…</a>")
        self.banner.setTextFormat(Qt.RichText)
        self.banner.setObjectName("CautionsBanner")
        self.banner.setWordWrap(True)  # two lines on a narrow screen rather than a cut-off caution
        self.banner.setFixedHeight(self.banner.fontMetrics().lineSpacing() + 4)  # one line until laid out
        self.banner.setSizePolicy(QSizePolicy.Expanding, QSizePolicy.Preferred)
        self.banner.setMinimumWidth(200)
        self.banner.setToolTip("\n".join(CAUTIONS))
        self.banner.linkActivated.connect(lambda _l: self.show_cautions())
        cbar.addWidget(self.banner)
        self.addToolBar(Qt.BottomToolBarArea, cbar)
        bar = cbar
        self.banner_bar = bar

    def _build_actions(self) -> None:
        def act(text, slot, shortcut=None, tip=""):
            a = QAction(text, self)
            if shortcut is not None:
                a.setShortcut(shortcut)
            if tip:
                a.setStatusTip(tip)
            a.triggered.connect(lambda _checked=False: slot())
            return a

        self.new_action = act("&New", self.new_project, QKeySequence.New, "Start a new project")
        self.open_action = act("&Open…", self.open_dialog, QKeySequence.Open, "Open a project file")
        self.open_line_list_action = act("Open &Line List…", self.open_line_list_dialog, None,
                                         "A batch run's results: every line with its verdict; double-click one to open it")
        self.save_action = act("&Save", self.save, QKeySequence.Save, "Save the project")
        self.save_as_action = act("Save &As…", self.save_as, QKeySequence.SaveAs, "Save the project under a new name")
        self.pdf_action = act("Export &PDF report…", self.export_pdf, None, "Summary report with inputs, results, plots, checks and cautions")
        self.csv_action = act("Export &CSV…", self.export_csv, None, "Profiles of the current alternative as CSV")
        self.details_action = act("Project &details and targets…", self.edit_project_details, None,
                                  "Name, prepared by, revision and the design targets every alternative is judged by")
        self.quit_action = act("&Quit", self.close, QKeySequence.Quit)

        self.undo_action = self.doc.undo_stack.createUndoAction(self, "&Undo")
        self.undo_action.setShortcut(QKeySequence.Undo)
        self.redo_action = self.doc.undo_stack.createRedoAction(self, "&Redo")
        self.redo_action.setShortcut(QKeySequence.Redo)
        # segment edits: the Line Strip's shared actions, one QAction per edit (app.segment_actions)
        self.segment_actions = self.line_strip.segment_actions
        self.segment_actions.message.connect(lambda text: self.statusBar().showMessage(text, 8000))

        self.units_group = QActionGroup(self)
        self.units_group.setExclusive(True)
        self.si_action = QAction("SI (°C, bar, mm, kg/h)", self, checkable=True)
        self.us_action = QAction("US customary (°F, psi, in, lb/h)", self, checkable=True)
        for a, system in ((self.si_action, "SI"), (self.us_action, "US")):
            self.units_group.addAction(a)
            a.triggered.connect(lambda _c=False, s=system: self.set_unit_system(s))
        (self.us_action if self.doc.unit_system == "US" else self.si_action).setChecked(True)

        self.about_action = act("&About Calorun", self.show_about)
        self.cautions_action = act("&Cautions", self.show_cautions)

    def _build_menus(self) -> None:
        mb = self.menuBar()
        file_menu = mb.addMenu("&File")
        file_menu.addActions([self.new_action, self.open_action, self.open_line_list_action])
        self.recent_menu = file_menu.addMenu("Open &Recent")
        self.recent_menu.aboutToShow.connect(self._fill_recent_menu)
        self._fill_recent_menu()
        file_menu.addSeparator()
        file_menu.addActions([self.save_action, self.save_as_action])
        file_menu.addSeparator()
        file_menu.addAction(self.details_action)
        file_menu.addSeparator()
        file_menu.addActions([self.pdf_action, self.csv_action])
        file_menu.addSeparator()
        file_menu.addAction(self.quit_action)

        edit_menu = mb.addMenu("&Edit")
        edit_menu.addActions([self.undo_action, self.redo_action])
        edit_menu.addSeparator()
        self.segment_actions.fill_menu(edit_menu)

        view_menu = mb.addMenu("&View")
        units_menu = view_menu.addMenu("&Units")
        units_menu.addActions([self.si_action, self.us_action])
        view_menu.addSeparator()
        for dock in (self.line_strip_dock, self.feed_dock, self.card_dock, self.alternatives_dock, self.key_dock,
                     self.checks_dock, self.hold_time_dock):
            view_menu.addAction(dock.toggleViewAction())
        view_menu.addAction(self.banner_bar.toggleViewAction())
        view_menu.addSeparator()
        view_menu.addActions([self.finder_dock.toggleViewAction(), self.sweep_dock.toggleViewAction(),
                              self.line_list_dock.toggleViewAction()])

        tools_menu = mb.addMenu("&Tools")
        self.finder_action = tools_menu.addAction("&Target Finder…", lambda: self.show_tool(self.finder_dock))
        self.finder_action.setStatusTip("The smallest heater, insulation, bore... that meets the targets")
        self.sweep_action = tools_menu.addAction("&Sweep…", lambda: self.show_tool(self.sweep_dock))
        self.sweep_action.setStatusTip("Key figures against one parameter (or two), with the targets and where they are met")

        help_menu = mb.addMenu("&Help")
        help_menu.addActions([self.cautions_action, self.about_action])

    def _build_status(self) -> None:
        self.solve_status = QLabel("")
        self.units_status = QLabel("")
        self.statusBar().addWidget(self.solve_status, 1)
        self.statusBar().addPermanentWidget(self.units_status)
        self._on_units_changed(self.doc.unit_system)
        self.segment_card.edit_refused.connect(lambda m: self.statusBar().showMessage("Not changed: " + m.splitlines()[0], 6000))
        self.feed_panel.edit_refused.connect(lambda m: self.statusBar().showMessage("Not changed: " + m.splitlines()[0], 6000))

    # ------------------------------------------------------------------ reacting to the document

    def _update_title(self, *_args) -> None:
        name = self.doc.project.name or "Untitled line"
        where = self.doc.path.name if self.doc.path else ("demo, not saved" if self._showing_demo else "not saved")
        self.setWindowTitle(f"{name} — {where}[*] — Calorun")
        self.setWindowModified(self.doc.modified)

    def _on_project_changed(self) -> None:
        self._refresh_alternatives()
        self._update_title()
        self._edit_autosave.start()  # write_recovery checks whether anything is unsaved

    def _refresh_alternatives(self, *_args) -> None:
        self.alt_combo.blockSignals(True)
        self.alt_combo.clear()
        for alt in self.doc.project.alternatives:
            self.alt_combo.addItem(alt.name)
        self.alt_combo.setCurrentIndex(self.doc.current_index)
        self.alt_combo.blockSignals(False)

    def _undo_tip(self, text: str) -> None:
        self.undo_button_action.setToolTip(f"Undo {text}" if text else "Undo")

    def _redo_tip(self, text: str) -> None:
        self.redo_button_action.setToolTip(f"Redo {text}" if text else "Redo")

    def _status_colour(self, colour: Optional[str]) -> None:
        """The status line's text colour, through its palette: a style sheet set on every result made
        Qt repaint the whole window (about 1.6 million pixels per edit)."""
        palette = self.solve_status.palette()
        palette.setColor(QPalette.WindowText, QColor(colour) if colour else self.palette().color(QPalette.WindowText))
        self.solve_status.setPalette(palette)

    def _on_solve_started(self) -> None:
        self.solve_status.setText("Solving…")

    def _on_result(self, result) -> None:
        if self.first_result_time is None:
            self.first_result_time = time.perf_counter()
        n_checks = len(result.checks)
        self._status_colour(None)
        self.solve_status.setText(
            f"Solved '{result.name}' ({result.cells} cells) · "
            f"{n_checks} finding{'s' if n_checks != 1 else ''} in Checks")
        self.solve_status.setToolTip(f"Last solve took {self.doc.last_solve_seconds * 1000.0:.0f} ms")

    def _on_solve_failed(self, message: str) -> None:
        self._status_colour("#B24A00")
        stale = " Showing the previous result (out of date)." if self.doc.result is not None else ""
        self.solve_status.setText(f"Not solved: {message}.{stale}")

    def _on_units_changed(self, system: str) -> None:
        self.units_status.setText("Units: SI" if system == "SI" else "Units: US customary")
        (self.us_action if system == "US" else self.si_action).setChecked(True)
        if hasattr(self, "units_combo"):
            self.units_combo.blockSignals(True)
            self.units_combo.setCurrentIndex(1 if system == "US" else 0)
            self.units_combo.blockSignals(False)

    # ------------------------------------------------------------------ segment actions (Edit menu)

    def insert_segment(self) -> None:
        self.segment_actions.insert_after_selected()

    def duplicate_segment(self) -> None:
        self.segment_actions.duplicate_selected()

    def delete_segment(self) -> None:
        self.segment_actions.delete_selected()

    def move_segment(self, step: int) -> None:
        self.segment_actions.move_selected(step)

    # ------------------------------------------------------------------ units

    def set_unit_system(self, system: str) -> None:
        self.doc.set_unit_system(system)
        if self.remember:
            settings.set_unit_system(system)

    # ------------------------------------------------------------------ files

    def maybe_save(self) -> bool:
        """True when it is fine to drop the current project (saved, discarded, or unchanged)."""
        if not self.doc.modified:
            return True
        answer = self.ask_save_changes()
        if answer == "save":
            return self.save()
        return answer == "discard"

    def new_project(self) -> None:
        if self.maybe_save():
            self._showing_demo = False
            self.doc.set_project(default_project())

    def load_demo(self) -> None:
        self._showing_demo = True
        self.doc.set_project(load_demo_project())

    def open_dialog(self) -> None:
        if not self.maybe_save():
            return
        path = self.choose_open_path()
        if path:
            self.open_file(path, ask=False)

    def open_file(self, path, ask: bool = True) -> bool:
        """Open a project file; on any problem show every error with its path and keep the current project."""
        from solver.errors import ProjectFileError
        from solver.project_io import load_project

        if ask and not self.maybe_save():
            return False
        p = Path(path)
        try:
            project = load_project(p)
        except ProjectFileError as exc:
            details = [f"{where}: {msg}" if where else msg for where, msg in exc.problems]
            self.error_dialog("Cannot open project", f"{p.name} could not be opened: {exc.summary}.", details)
            return False
        except Exception as exc:  # anything unexpected still must not take the app down
            self.error_dialog("Cannot open project", f"{p.name} could not be opened: {exc}")
            return False
        self._showing_demo = False
        self.doc.set_project(project, path=p)
        self._add_recent(p)
        return True

    def choose_line_list_path(self) -> Optional[str]:
        """A batch run's folder (or its results.csv); None when cancelled or not interactive."""
        if not self.interactive:
            return None
        dialog = QFileDialog(self, "Open Line List: pick a batch run's folder", self._start_dir())
        dialog.setFileMode(QFileDialog.Directory)  # a folder; its results.csv can be picked too
        dialog.setOption(QFileDialog.ShowDirsOnly, False)
        dialog.setNameFilter("Results list (results.csv);;All files (*)")
        if not dialog.exec() or not dialog.selectedFiles():
            return None
        return dialog.selectedFiles()[0]

    def open_line_list_dialog(self) -> None:
        """File ▸ Open Line List…"""
        path = self.choose_line_list_path()
        if path:
            self.open_line_list(path)

    def open_line_list(self, path) -> bool:
        """Show a batch run's results (its folder or results.csv) in the Line List tab; a list that cannot
        be read says why and leaves the tab as it was."""
        from app.panels.line_list_view import LineListError

        try:
            self.line_list.load(path)
        except LineListError as exc:
            self.error_dialog("Cannot open line list", str(exc))
            return False
        self.show_tool(self.line_list_dock)
        return True

    def open_line(self, path) -> bool:
        """A line of the Line List as the project, through the normal open path (unsaved changes are
        asked about; Save then writes back to the line's own file)."""
        if not self.open_file(path):
            return False
        self.statusBar().showMessage(f"Opened line {Path(path).stem}: Save writes back to {path}", 10000)
        return True

    def save(self) -> bool:
        if self.doc.path is None:
            return self.save_as()
        return self.save_to(self.doc.path)

    def save_as(self) -> bool:
        suggested = (self.doc.project.name or "line").replace("/", "-") + ".json"
        path = self.choose_save_path(suggested=suggested)
        if not path:
            return False
        return self.save_to(path)

    def save_to(self, path) -> bool:
        """Save with the one safe write; a failure says why and leaves any existing file as it was; a
        refused file (read-only, not an ordinary file, a folder) offers Save As."""
        from solver.project_io import save_project
        from solver.safe_write import WriteRefused

        p = Path(path)
        try:
            save_project(self.doc.project, p)
        except WriteRefused as exc:
            return self._save_refused(exc)
        except OSError as exc:
            reason = exc.strerror or str(exc)
            self.error_dialog("Project not saved",
                              f"Could not save to {p}: {reason}. Any existing file there is unchanged; "
                              "your work is still open — save it somewhere else.")
            return False
        self.doc.mark_saved(p)
        self._add_recent(p)
        self.remove_recovery()
        self.statusBar().showMessage(f"Saved {p}", 4000)
        return True

    def _save_refused(self, exc) -> bool:
        """Say why a save was refused before anything was written; offer Save As where that helps."""
        if exc.offer_save_as:
            if self.ask_save_elsewhere(f"Could not save: {exc.strerror}. Your work is still open — "
                                       "save it under another name?"):
                return self.save_as()
            return False
        text = exc.strerror
        if exc.field and text.startswith(exc.field):  # the file path -> the field's label and place
            from app.fields import field_label, item_words

            where = item_words(exc.field, ("alternatives", "segments", "insulation", "fittings", "rows"))
            text = field_label(exc.field) + (f" ({where})" if where else "") + text[len(exc.field):]
        self.error_dialog("Project not saved", f"{text}. Change it and save again; your work is still open.")
        return False

    def _add_recent(self, p: Path) -> None:
        if not self.remember:
            return
        try:
            settings.add_recent_file(p)
        except OSError:  # the path cannot be resolved (e.g. a vanished network drive): not worth a dialog
            pass

    def _fill_recent_menu(self) -> None:
        self.recent_menu.clear()
        files = settings.recent_files()
        for f in files:
            a = self.recent_menu.addAction(f)
            a.triggered.connect(lambda _c=False, path=f: self.open_file(path))
        if files:
            self.recent_menu.addSeparator()
            self.recent_menu.addAction("Clear list", lambda: (settings.clear_recent_files(), self._fill_recent_menu()))
        else:
            self.recent_menu.addAction("(none)").setEnabled(False)

    def export_pdf(self, path=None) -> bool:
        """Write the summary report from the results the Document's runner holds.

        Only alternatives not solved yet are solved, on the worker thread, while a progress dialog
        counts them (Cancel stops before anything is written); the dialog stays up while the PDF is
        written.
        """
        path = path or self.choose_save_path("Export PDF report", "PDF (*.pdf)",
                                             (self.doc.project.name or "report") + ".pdf")
        if not path:
            return False
        progress = QProgressDialog("Collecting the results for the report…", "Cancel", 0, 1, self)
        progress.setWindowTitle("Export PDF report")
        progress.setWindowModality(Qt.WindowModal)
        progress.setAutoReset(False)
        progress.setAutoClose(False)
        progress.setMinimumDuration(0)
        self.report_progress = progress  # tests reach the Cancel button through it
        try:
            held = self._results_for_report(progress)
            if held is None:
                self.statusBar().showMessage("Report not written: cancelled.", 5000)
                return False
            progress.setLabelText("Writing the PDF…")
            progress.setCancelButton(None)  # the PDF is written in one go
            progress.setRange(0, 0)
            QApplication.processEvents()
            from app.report import write_report

            # the bands the Document already holds for these results; the report computes the others
            bands = {name: b for name in held if (b := self.doc.bands_for(name)) is not None}
            write_report(self.doc.project, path, unit_system=self.doc.unit_system, results=held, bands=bands)
        except OSError as exc:
            self.error_dialog("Report not written", f"Could not write {path}: {exc.strerror or exc}")
            return False
        finally:
            progress.close()
            self.report_progress = None
        self.statusBar().showMessage(f"Report written to {path}", 5000)
        return True

    def _results_for_report(self, progress: QProgressDialog) -> Optional[dict]:
        """``{name: Result or SolveFailure}`` of every alternative, solving the missing ones; None if cancelled."""
        doc = self.doc
        names = [a.name for a in doc.project.alternatives]
        total = len(names)
        pending = set(doc.request_results())
        progress.setRange(0, total)
        progress.setValue(total - len(pending))
        if pending:
            loop = QEventLoop()

            def arrived(name: str, _result, _error: str) -> None:
                pending.discard(name)
                progress.setValue(total - len(pending))
                progress.setLabelText(f"Solving alternatives for the report: {total - len(pending)} of {total} done…")
                if not pending:
                    loop.quit()

            progress.setLabelText(f"Solving alternatives for the report: {total - len(pending)} of {total} done…")
            doc.alternative_solved.connect(arrived)
            progress.canceled.connect(loop.quit)
            try:
                loop.exec()
            finally:
                doc.alternative_solved.disconnect(arrived)
                progress.canceled.disconnect(loop.quit)
            if pending:
                doc.cancel_results()
                return None
        held = {}
        for name in names:
            outcome = doc.outcome_for(name)
            if outcome is not None:  # (one edited meanwhile is left to the report to solve)
                result, error = outcome
                held[name] = result if result is not None else SolveFailure(error)
        return held

    def export_csv(self, path=None) -> bool:
        if self.doc.result is None:
            self.error_dialog("Nothing to export", "The current alternative has no result yet.")
            return False
        path = path or self.choose_save_path("Export profiles as CSV", "CSV (*.csv)",
                                             (self.doc.current_alternative.name or "profiles") + ".csv")
        if not path:
            return False
        try:
            from app.export import write_profiles_csv

            write_profiles_csv(self.doc.result, path, unit_system=self.doc.unit_system)
        except OSError as exc:
            self.error_dialog("CSV not written", f"Could not write {path}: {exc}")
            return False
        self.statusBar().showMessage(f"Profiles written to {path}", 5000)
        return True

    # ------------------------------------------------------------------ autosave and recovery

    def write_recovery(self) -> Optional[Path]:
        """Write the open project to this window's own recovery file if it has unsaved changes."""
        if not self.doc.modified or self.recovery_slot is None or not self.recovery_slot.held:
            if self._autosave_off and self.doc.modified:
                self.statusBar().showMessage(f"Autosave is off: {self._autosave_off}", 6000)
            return None
        try:
            return recovery.write_recovery(self.recovery_file, self.doc.project, self.doc.path)
        except OSError as exc:  # nothing new is left behind; the last good copy, if any, stays
            self.statusBar().showMessage(f"Autosave failed: {exc.strerror or exc}", 6000)
            return None

    def remove_recovery(self) -> None:
        if self.recovery_slot is not None and self.recovery_slot.held:  # only ever this window's own file
            recovery.remove_recovery(self.recovery_file)

    def check_recovery(self) -> bool:
        """Offer the unsaved work of Calorun instances that are gone (they did not close normally).

        Files of instances still running are never offered nor removed. Several: the newest first,
        one after another until one is taken (one window holds one project); declined ones are
        removed, the rest stay for the next start. A window that remembers nothing takes no one's work.
        """
        if not self.remember:
            return False
        try:
            for found in recovery.abandoned(own=self.recovery_slot):
                if not found.claim():
                    continue  # its instance is alive (or another one is handling it right now)
                try:
                    if self._offer_recovery(found):
                        return True
                finally:
                    found.release()
            return False
        finally:
            recovery.remove_dead_locks(own=self.recovery_slot)

    def _offer_recovery(self, found: "recovery.Abandoned") -> bool:
        try:
            content = recovery.read_recovery(found.path)
        except recovery.RecoveryUnreadable as exc:
            self.error_dialog("Recovery file unreadable",
                              f"A recovery file was found but cannot be read ({exc}); it has been set aside.")
            found.set_aside()
            return False
        if content is None:
            found.discard()
            return False
        if not self.ask_recover(content.describe()):
            found.discard()
            return False
        self._showing_demo = False
        self.doc.set_project(content.project, path=Path(content.original_path) if content.original_path else None,
                             modified=True)
        self.statusBar().showMessage("Recovered unsaved work — save it to keep it.", 8000)
        if self.write_recovery() is not None:  # now kept in this window's own file: the old one can go
            found.discard()
        return True

    def closeEvent(self, event) -> None:  # noqa: N802
        if not self.maybe_save():
            event.ignore()
            return
        self._autosave_timer.stop()
        self._edit_autosave.stop()
        self.target_finder.shutdown()
        self.sweep_panel.shutdown()
        self.doc.shutdown()
        if self.recovery_slot is not None:  # a clean exit leaves no recovery file and no lock
            self.recovery_slot.release(remove_files=True)
        event.accept()

    # ------------------------------------------------------------------ help

    def show_cautions(self) -> QDialog:
        dlg = QDialog(self)
        dlg.setWindowTitle("Cautions")
        v = QVBoxLayout(dlg)
        text = QTextBrowser()
        text.setHtml("<h3>Use these results with care</h3><ul>"
                     + "".join(f"<li style='margin-bottom:6px'>{c}</li>" for c in CAUTIONS) + "</ul>")
        text.setMinimumSize(520, 260)
        v.addWidget(text)
        box = QDialogButtonBox(QDialogButtonBox.Close)
        box.rejected.connect(dlg.close)
        v.addWidget(box)
        dlg.setAttribute(Qt.WA_DeleteOnClose)
        dlg.show()  # not modal: it never blocks the work
        self.cautions_dialog = dlg
        return dlg

    def show_about(self) -> None:
        text = ("<b>Calorun</b><br>Temperatures, pressure and duty along process heating and cooling lines."
                "<br><br>" + "<br>".join(CAUTIONS[-2:]))
        self.messages.append(("About Calorun", text))
        if self.interactive:
            QMessageBox.about(self, "About Calorun", text)


_WINDOW_STYLE = """
QMainWindow::separator { width: 5px; height: 5px; background: #E4E8EB; }
QDockWidget { font-weight: 600; }
QDockWidget::title { background: #E9EEF1; padding: 4px 8px; border-bottom: 1px solid #D3DADF; }
QDockWidget > QWidget { font-weight: normal; }
QGroupBox { font-weight: 600; border: 1px solid #D9DEE2; border-radius: 4px; margin-top: 10px; padding-top: 4px; }
QGroupBox::title { subcontrol-origin: margin; left: 8px; padding: 0 4px; color: #1F2A33; }
QGroupBox > QWidget { font-weight: normal; }
QLabel#CautionsBanner { color: #6B4500; background: #FFF3D6; border: 1px solid #E8C77A;
                        border-radius: 3px; padding: 2px 8px; }
QToolBar#BannerBar { padding: 1px 4px; border: none; }
"""


def _wait_for_first_result(win: MainWindow, timeout_s: float = 60.0) -> None:
    app = QApplication.instance()
    deadline = time.perf_counter() + timeout_s
    while time.perf_counter() < deadline:
        app.processEvents()
        if win.doc.result is not None or (win.doc.last_error and not win.doc.solving):
            break
        time.sleep(0.005)
    for _ in range(5):  # let the plots and tables repaint with the result
        app.processEvents()
        time.sleep(0.01)


def run(path: Optional[str] = None, screenshot: Optional[str] = None, unit_system: Optional[str] = None) -> int:
    """Start the desktop app on ``path`` (the demo project when None).

    With ``screenshot``, render the window offscreen at 1600×1000 once the first result and its
    uncertainty bands are plotted, save it as PNG and return 0 without entering the event loop. A screenshot is a
    picture, not a session: it shows ``unit_system`` (default SI, not the remembered one) and
    writes no settings, no Recent files entry and no autosave file, and leaves a recovery file
    from a real session where it is.
    """
    if screenshot:
        os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    app = QApplication.instance() or QApplication(sys.argv[:1])
    app.setOrganizationName(settings.ORGANISATION)
    app.setApplicationName(settings.APPLICATION)
    app.setStyle("Fusion")
    gui_gc.install(app)  # garbage collection on the GUI thread only, never on a solve worker
    if screenshot:
        win = MainWindow(interactive=False, remember=False, unit_system=unit_system or "SI")
    else:
        win = MainWindow(unit_system=unit_system)
    opened = bool(path) and win.open_file(path, ask=False)
    if path and not opened and screenshot:
        return 2  # the dialog text went to stderr
    if not opened:
        win.load_demo()
    if screenshot:
        out = Path(screenshot)
        win.resize(1600, 1000)
        win.show()
        _wait_for_first_result(win)
        win.doc.bands_now()  # the picture shows the uncertainty bands, as a user sees them a moment later
        win.resize(1600, 1000)
        app.processEvents()
        image = win.grab()
        out.parent.mkdir(parents=True, exist_ok=True)
        ok = image.save(str(out), "PNG")
        win.doc.shutdown()
        win.close()
        if not ok:
            print(f"calorun: could not write screenshot {out}", file=sys.stderr)
            return 1
        return 0
    win.show()
    QTimer.singleShot(0, win.check_recovery)
    return app.exec()


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(run(*(sys.argv[1:2] or [None])))
