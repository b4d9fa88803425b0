"""Garbage collection stays on the GUI thread (app.gui_gc): a solve worker must never free Qt objects."""

import gc
import threading

from app import gui_gc


class _Cycle:
    def __init__(self):
        self.me = self


def test_worker_allocations_never_collect_and_the_gui_timer_does(qapp):
    enabled = gc.isenabled()
    gc.enable()  # as in a fresh process: the collector must switch automatic collection off itself
    collector = gui_gc.GuiThreadCollector(interval_ms=10_000)
    try:
        assert not gc.isenabled()  # no automatic collection, in any thread
        gc.collect()
        collected = []
        gc.callbacks.append(lambda phase, info: collected.append(threading.current_thread().name)
                            if phase == "start" else None)
        try:
            def allocate():  # far more cyclic garbage than the youngest threshold
                for _ in range(5 * gc.get_threshold()[0]):
                    _Cycle()

            worker = threading.Thread(target=allocate, name="worker")
            worker.start()
            worker.join()
            assert collected == []  # a worker that allocates did not trigger a collection
            collector.check()  # the GUI thread's timer tick
            assert collected and set(collected) == {threading.current_thread().name}
        finally:
            gc.callbacks.pop()
    finally:
        collector.deleteLater()
        (gc.enable if enabled else gc.disable)()
