"""Alternatives panel: the designs kept in one project.

A list of the project's alternatives with the baseline marked. Selecting one
makes it current (the Line Strip, Segment Card, Feed and Profiles follow).
Add blank, duplicate, rename (double-click or F2), delete, move up/down and
set baseline are undoable commands pushed through the Document. The panel
keeps no copy of the design: it rebuilds its list from the Document's signals.

The list is as tall as its rows (up to :data:`MAX_VISIBLE_ROWS`), so the baseline never
scrolls out of sight; where a result is at hand each row carries its design verdict as a
small mark (shape and colour, the words in the tooltip).
"""

from __future__ import annotations

from functools import lru_cache

from PySide6.QtCore import Qt, Signal
from PySide6.QtGui import QFont, QIcon, QPixmap
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHBoxLayout,
    QLabel,
    QListWidget,
    QListWidgetItem,
    QToolButton,
    QVBoxLayout,
    QWidget,
)

from app import commands as cmds
from app import style
from app.comparison import design_verdict

#: The list shows this many rows before it scrolls (a project rarely keeps more alternatives).
MAX_VISIBLE_ROWS = 10
#: DesignVerdict.level -> the severity mark drawn for it (shape, letter and colour).
VERDICT_MARKS: dict[str, str] = {"danger": "danger", "missed": "danger", "warning": "warning", "met": "ok"}


@lru_cache(maxsize=None)
def _blank_icon() -> QIcon:
    """A transparent mark, so names with and without a verdict line up."""
    pm = QPixmap(16, 16)
    pm.fill(Qt.transparent)
    return QIcon(pm)


class AlternativesPanel(QWidget):
    """List of alternatives with add / duplicate / rename / delete / reorder / baseline actions."""

    error_shown = Signal(str)  # a rejected edit, shown in place (also emitted for tests)

    def __init__(self, doc, parent=None):
        super().__init__(parent)
        self.doc = doc
        self.setObjectName("AlternativesPanel")
        self._updating = False

        self.list = QListWidget(self)
        self.list.setObjectName("alternativesList")
        self.list.setSelectionMode(QAbstractItemView.SingleSelection)
        self.list.setEditTriggers(QAbstractItemView.DoubleClicked | QAbstractItemView.EditKeyPressed)
        self.list.setToolTip("Select to edit this alternative; double-click or F2 to rename.")
        self.list.setVerticalScrollMode(QAbstractItemView.ScrollPerPixel)

        def button(text, tip, slot, name):
            b = QToolButton(self)
            b.setText(text)
            b.setToolTip(tip)
            b.setObjectName(name)
            b.setAutoRaise(True)
            b.clicked.connect(slot)
            return b

        self.add_button = button("Add", "Add a blank alternative", self.add_blank, "addAlternative")
        self.duplicate_button = button("Duplicate", "Duplicate the current alternative", self.duplicate_current, "duplicateAlternative")
        self.rename_button = button("Rename", "Rename the current alternative (F2)", self.start_rename, "renameAlternative")
        self.delete_button = button("Delete", "Delete the current alternative", self.delete_current, "deleteAlternative")
        self.up_button = button("\u2191", "Move up", lambda: self.move_current(-1), "moveAlternativeUp")
        self.down_button = button("\u2193", "Move down", lambda: self.move_current(+1), "moveAlternativeDown")
        self.baseline_button = button("Set baseline", "Compare the others against this alternative", self.set_baseline_current, "setBaseline")

        row1 = QHBoxLayout()
        for b in (self.add_button, self.duplicate_button, self.rename_button, self.delete_button):
            row1.addWidget(b)
        row1.addStretch(1)
        row2 = QHBoxLayout()
        for b in (self.up_button, self.down_button, self.baseline_button):
            row2.addWidget(b)
        row2.addStretch(1)

        self.message = QLabel("", self)
        self.message.setWordWrap(True)
        self.message.setObjectName("alternativesMessage")
        self.message.setStyleSheet("color: #B04A00;")
        self.message.hide()

        layout = QVBoxLayout(self)
        layout.setContentsMargins(4, 4, 4, 4)
        layout.addLayout(row1)
        layout.addWidget(self.list)
        layout.addLayout(row2)
        layout.addWidget(self.message)
        layout.addStretch(1)

        self.list.currentRowChanged.connect(self._on_row_changed)
        self.list.itemChanged.connect(self._on_item_edited)
        doc.project_replaced.connect(self.refresh)
        doc.project_changed.connect(self._on_project_changed)
        doc.current_alternative_changed.connect(self._on_current_changed)
        # a new result changes one row's mark: only that row is looked at
        doc.result_ready.connect(lambda _r: self._update_marks({self.doc.current_alternative.name}))
        # other alternatives' results, where the Document holds and announces them
        self._verdicts: dict[str, tuple] = {}  # name -> (alternative, targets, verdict or None) last judged
        self._rows: list = []  # the alternative object each row was built from
        self._shape: tuple = ()  # (names, baseline) the list was built for
        self._targets = None  # the targets the marks were judged against
        self._current_verdict = None  # (result, targets, verdict) of the current alternative
        solved = getattr(doc, "alternative_solved", None)
        self._told_of_results = solved is not None
        if solved is not None:
            solved.connect(self._on_alternative_solved)
        self.refresh()

    # ------------------------------------------------------------------ view

    def refresh(self) -> None:
        """Rebuild the list from the Document."""
        self._updating = True
        try:
            project = self.doc.project
            base = project.baseline_alternative().name
            self.list.clear()
            for alt in project.alternatives:
                item = QListWidgetItem(alt.name)
                item.setData(Qt.UserRole, alt.name)
                item.setFlags(item.flags() | Qt.ItemIsEditable)
                item.setToolTip(self._base_tip(alt, base))
                if alt.name == base:
                    font = QFont(item.font())
                    font.setBold(True)
                    item.setFont(font)
                    item.setText(f"{alt.name}")
                    item.setData(Qt.AccessibleDescriptionRole, "baseline")
                self.list.addItem(item)
            self._rows = list(project.alternatives)
            self._shape = (tuple(a.name for a in project.alternatives), base)
            self._targets = project.targets
            self._mark_baseline(base)
            self._update_marks()
            self.list.setCurrentRow(self.doc.current_index)
            self._update_buttons()
            self._fit_height()
        finally:
            self._updating = False

    @staticmethod
    def _base_tip(alt, base: str) -> str:
        """A row's tooltip before its verdict: name, size, description, and whether it is the baseline."""
        n = len(alt.segments)
        length = sum(s.length_m for s in alt.segments)
        tip = f"{alt.name}\n{n} segment{'s' if n != 1 else ''}, {length:g} m" + (f"\n{alt.description}" if alt.description else "")
        return tip + ("\nBaseline: the others are compared against it" if alt.name == base else "")

    def _on_project_changed(self) -> None:
        """An edit: rebuild the list only when its names, order or baseline changed; otherwise
        refresh the tooltip and mark of the rows whose alternative changed (an edit of a segment
        changes one row, and its mark again when the result arrives)."""
        project = self.doc.project
        base = project.baseline_alternative().name
        alts = project.alternatives
        if (tuple(a.name for a in alts), base) != self._shape or len(self._rows) != self.list.count():
            self.refresh()
            return
        targets_changed = project.targets is not self._targets
        self._targets = project.targets
        changed = set()
        was_updating, self._updating = self._updating, True  # these item changes are no renames
        try:
            for i, alt in enumerate(alts):
                if alt is not self._rows[i]:  # the model swaps in a new object on every change
                    self._rows[i] = alt
                    self.list.item(i).setData(Qt.UserRole + 1, self._base_tip(alt, base))
                    changed.add(alt.name)
        finally:
            self._updating = was_updating
        if targets_changed:
            self._update_marks()  # every verdict is judged against the targets
        elif changed:
            self._update_marks(changed)
        self._update_buttons()

    def _fit_height(self) -> None:
        """Make the list as tall as its rows (up to MAX_VISIBLE_ROWS), and the panel no taller than
        it needs: the space left over goes to the panels below."""
        rows = min(max(1, self.list.count()), MAX_VISIBLE_ROWS)
        row_height = self.list.sizeHintForRow(0) if self.list.count() else self.list.fontMetrics().height() + 4
        height = rows * max(row_height, 1) + 2 * self.list.frameWidth() + 2 * self.list.spacing()
        if self.list.height() != height or self.list.minimumHeight() != height:
            self.list.setFixedHeight(height)
        self.layout().activate()
        self.setMaximumHeight(self.layout().sizeHint().height())

    def verdict_for(self, name: str):
        """The DesignVerdict of the alternative called ``name`` where its result is at hand, else None.

        The current alternative's result is the Document's; others come from ``doc.result_for``
        where the Document offers it.
        """
        targets = self.doc.project.targets
        if name == self.doc.current_alternative.name:
            # the last result stays on screen until the next one arrives, here as in every view
            result = self.doc.result if not self.doc.result_is_stale else None
            if result is None or result.name != name:
                return None
            held = self._current_verdict  # every edit asks again before its result arrives
            if held is not None and held[0] is result and held[1] is targets:
                return held[2]
            verdict = design_verdict(targets, result)
            self._current_verdict = (result, targets, verdict)
            return verdict
        result_for = getattr(self.doc, "result_for", None)
        alt = next((a for a in self.doc.project.alternatives if a.name == name), None)
        if alt is None or not callable(result_for):
            return None
        # finding a held result hashes the alternative's content (~1.5 ms for 60 segments): judge an
        # alternative again only when it, the targets, or its result changed
        held = self._verdicts.get(name)
        if held is not None and held[0] is alt and held[1] is targets:
            return held[2]
        result = result_for(name)
        verdict = design_verdict(targets, result) if result is not None else None
        if verdict is not None or self._told_of_results:  # a result to come is announced: no need to ask again
            self._verdicts[name] = (alt, targets, verdict)
        return verdict

    def _on_alternative_solved(self, name: str, *_outcome) -> None:
        self._verdicts.pop(name, None)
        self._update_marks({name})

    def _update_marks(self, names=None) -> None:
        """The verdict mark of each row (of the rows named in ``names``), its words in the tooltip;
        a blank mark where no result is at hand."""
        was_updating, self._updating = self._updating, True  # these item changes are no renames
        try:
            self._set_marks(names)
        finally:
            self._updating = was_updating

    def _set_marks(self, names) -> None:
        for i in range(self.list.count()):
            item = self.list.item(i)
            name = item.data(Qt.UserRole)
            if names is not None and name not in names:
                continue
            verdict = self.verdict_for(name)
            base_tip = item.data(Qt.UserRole + 1) or item.toolTip()
            item.setData(Qt.UserRole + 1, base_tip)
            level = verdict.level if verdict is not None else ""
            tip = base_tip if verdict is None else f"{base_tip}\n{style.VERDICT_SYMBOLS[level]} {verdict.text()}"
            if item.data(Qt.UserRole + 2) == level and item.toolTip() == tip:
                continue  # as shown: each item change makes the list look at its rows again
            item.setIcon(_blank_icon() if verdict is None else style.severity_icon(VERDICT_MARKS[level]))
            item.setData(Qt.UserRole + 2, level)
            item.setToolTip(tip)

    def _mark_baseline(self, base: str) -> None:
        for i in range(self.list.count()):
            item = self.list.item(i)
            name = item.data(Qt.UserRole)
            item.setText(f"{name}   \u2605 baseline" if name == base else name)

    def _update_buttons(self) -> None:
        n = len(self.doc.project.alternatives)
        i = self.doc.current_index
        self.delete_button.setEnabled(n > 1)
        self.up_button.setEnabled(i > 0)
        self.down_button.setEnabled(i < n - 1)
        self.baseline_button.setEnabled(self.doc.project.baseline_alternative().name != self.doc.current_alternative.name)

    def _on_current_changed(self, index: int) -> None:
        if self.list.currentRow() != index:
            self._updating = True
            try:
                self.list.setCurrentRow(index)
            finally:
                self._updating = False
        self._update_buttons()

    def _on_row_changed(self, row: int) -> None:
        if self._updating or row < 0:
            return
        if row != self.doc.current_index:
            self.doc.set_current_alternative(row)

    # ------------------------------------------------------------------ actions

    def _show_error(self, text: str) -> None:
        self.message.setText(text)
        self.message.show()
        self._fit_height()
        self.error_shown.emit(text)

    def _push(self, make) -> bool:
        try:
            command = make()
        except (ValueError, IndexError) as exc:  # pydantic ValidationError is a ValueError
            self._show_error(str(exc).splitlines()[0] if str(exc) else type(exc).__name__)
            return False
        if self.message.isVisibleTo(self):
            self.message.hide()
            self._fit_height()
        self.doc.push(command)
        return True

    def add_blank(self) -> bool:
        return self._push(lambda: cmds.AddAlternative(self.doc))

    def duplicate_current(self) -> bool:
        return self._push(lambda: cmds.DuplicateAlternative(self.doc, self.doc.current_index))

    def rename(self, index: int, new_name: str) -> bool:
        if self.doc.project.alternatives[index].name == new_name.strip():
            return True
        return self._push(lambda: cmds.RenameAlternative(self.doc, index, new_name))

    def start_rename(self) -> None:
        item = self.list.item(self.doc.current_index)
        if item is not None:
            self._updating = True
            item.setText(item.data(Qt.UserRole))  # edit the bare name, not the baseline mark
            self._updating = False
            self.list.editItem(item)

    def _on_item_edited(self, item: QListWidgetItem) -> None:
        if self._updating:
            return
        index = self.list.row(item)
        old = item.data(Qt.UserRole)
        text = item.text().replace("\u2605 baseline", "").strip()
        if text == old:
            self.refresh()
            return
        if not self.rename(index, text):
            self.refresh()

    def delete_current(self) -> bool:
        return self._push(lambda: cmds.RemoveAlternative(self.doc, self.doc.current_index))

    def move_current(self, step: int) -> bool:
        i = self.doc.current_index
        return self._push(lambda: cmds.MoveAlternative(self.doc, i, i + step))

    def set_baseline_current(self) -> bool:
        return self._push(lambda: cmds.SetBaseline(self.doc, self.doc.current_index))
