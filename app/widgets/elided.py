"""Text that is never clipped: a one-line label and a combo box that elide, with the whole text
in the tooltip.

The text is measured with the widget's font; when it does not fit the width the widget has, it
is shortened with an ellipsis and the tooltip shows it in full. Text that fits has no extra
tooltip (or the one given with ``setToolTip``).
"""

from __future__ import annotations

from typing import Optional

from PySide6.QtCore import QSize, Qt
from PySide6.QtGui import QFontMetrics, QPainter
from PySide6.QtWidgets import (
    QComboBox,
    QLabel,
    QSizePolicy,
    QStyle,
    QStyleOption,
    QStyleOptionComboBox,
    QStylePainter,
    QWidget,
)


class ElidedLabel(QLabel):
    """A QLabel for plain one-line text that elides on the right instead of clipping."""

    def __init__(self, text: str = "", parent: Optional[QWidget] = None):
        super().__init__(parent)
        self._full = ""
        self._own_tip = ""
        self.setSizePolicy(QSizePolicy.Expanding, QSizePolicy.Preferred)  # takes the room there is
        self.setText(text)

    def setText(self, text: str) -> None:  # noqa: N802 (Qt spelling)
        self._full = text or ""
        super().setText(self._full)
        self._update_tip()
        self.update()

    def full_text(self) -> str:
        return self._full

    def setToolTip(self, tip: str) -> None:  # noqa: N802
        self._own_tip = tip or ""
        self._update_tip()

    def shown_text(self) -> str:
        """The text as painted at the current width (with '…' when shortened)."""
        m = self.contentsMargins()
        room = max(0, self.width() - m.left() - m.right() - 2 * self.margin() - 2 * max(0, self.indent()))
        return QFontMetrics(self.font()).elidedText(self._full, Qt.ElideRight, room)

    def is_elided(self) -> bool:
        return self.shown_text() != self._full

    def _update_tip(self) -> None:
        tip = self._own_tip
        if self.is_elided():
            tip = self._full if not tip else f"{self._full}\n\n{tip}"
        QLabel.setToolTip(self, tip)

    def minimumSizeHint(self) -> QSize:  # noqa: N802
        hint = super().minimumSizeHint()
        return QSize(QFontMetrics(self.font()).horizontalAdvance("…") + 4, hint.height())

    def sizeHint(self) -> QSize:  # noqa: N802
        # asks for no width of its own, so a long text never pushes its neighbours out of a
        # toolbar or widens a dock; the layout gives it the room there is and the text elides
        return self.minimumSizeHint()

    def resizeEvent(self, event) -> None:  # noqa: N802
        super().resizeEvent(event)
        self._update_tip()

    def paintEvent(self, event) -> None:  # noqa: N802
        p = QPainter(self)
        opt = QStyleOption()
        opt.initFrom(self)
        self.style().drawItemText(p, self.contentsRect().adjusted(self.margin(), self.margin(), -self.margin(),
                                                                  -self.margin()),
                                  int(self.alignment()) | Qt.TextSingleLine, opt.palette, self.isEnabled(),
                                  self.shown_text(), self.foregroundRole())
        p.end()


class ElidedComboBox(QComboBox):
    """A non-editable QComboBox whose shown entry is elided to the box's width, not cut off.

    The list that opens shows every entry in full; the tooltip gives the chosen one in full
    whenever the box shortens it.
    """

    def __init__(self, parent: Optional[QWidget] = None):
        super().__init__(parent)
        self.setSizeAdjustPolicy(QComboBox.AdjustToMinimumContentsLengthWithIcon)
        self.setMinimumContentsLength(8)

    def _text_rect_width(self) -> int:
        opt = QStyleOptionComboBox()
        self.initStyleOption(opt)
        return self.style().subControlRect(QStyle.CC_ComboBox, opt, QStyle.SC_ComboBoxEditField, self).width()

    def shown_text(self) -> str:
        return self.fontMetrics().elidedText(self.currentText(), Qt.ElideRight, max(0, self._text_rect_width() - 2))

    def is_elided(self) -> bool:
        return self.shown_text() != self.currentText()

    def paintEvent(self, event) -> None:  # noqa: N802
        if self.isEditable():
            super().paintEvent(event)
            return
        shown = self.shown_text()
        # the tooltip follows what is painted (entries are often set with signals blocked)
        self.setToolTip(self.currentText() if shown != self.currentText() else "")
        p = QStylePainter(self)
        opt = QStyleOptionComboBox()
        self.initStyleOption(opt)
        p.drawComplexControl(QStyle.CC_ComboBox, opt)
        opt.currentText = shown
        p.drawControl(QStyle.CE_ComboBoxLabel, opt)
