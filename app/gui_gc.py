"""Python's cyclic garbage collection, on the GUI thread only.

An automatic collection runs in whichever thread happens to allocate when a threshold is reached.
The solve and band workers allocate a lot, so a collection often runs on a worker; when it frees Qt
objects that sat in reference cycles (a closed dialog, a replaced panel), Qt destroys GUI objects off
their own thread and the process can crash later in the event loop. So automatic collection is
switched off and a timer on the GUI thread collects instead, by the same generation thresholds.
"""

from __future__ import annotations

import gc

from PySide6.QtCore import QObject, QTimer

#: how often the GUI thread looks at the allocation counts [ms]
INTERVAL_MS = 500


class GuiThreadCollector(QObject):
    """Switch automatic collection off and collect from a timer on the thread this object lives on."""

    def __init__(self, parent: QObject | None = None, interval_ms: int = INTERVAL_MS):
        super().__init__(parent)
        self._thresholds = gc.get_threshold()
        gc.disable()
        self._timer = QTimer(self)
        self._timer.setInterval(interval_ms)
        self._timer.timeout.connect(self.check)
        self._timer.start()

    def check(self) -> None:
        collect_due(self._thresholds)


def collect_due(thresholds: tuple[int, int, int]) -> None:
    """Collect the oldest generation whose count passed its threshold (what the automatic GC does)."""
    counts = gc.get_count()
    for generation in (2, 1, 0):
        if counts[generation] > thresholds[generation]:
            gc.collect(generation)
            return


def install(app: QObject) -> GuiThreadCollector:
    """Collect on ``app``'s (the GUI) thread for the rest of the process; idempotent."""
    existing = app.findChild(GuiThreadCollector)
    return existing if existing is not None else GuiThreadCollector(app)
