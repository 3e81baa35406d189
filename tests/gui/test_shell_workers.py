"""run_in_worker: results on the GUI thread, progress relayed, cancel respected, errors as
one line, and the tracker the status bar watches."""
import threading
import time

import pytest
from PySide6.QtCore import QEvent, QObject, QThread
from PySide6.QtWidgets import QApplication

from epochpoint.gui import workers


@pytest.fixture(autouse=True)
def _join_workers(qapp):
    yield
    assert workers.wait_for_workers(10000)


def test_result_arrives_on_the_gui_thread(qtbot):
    seen = {}

    def work(x, y):
        seen["worker_thread"] = threading.get_ident()
        return x + y

    def done(result):
        seen["result"] = result
        seen["on_gui_thread"] = QThread.currentThread() is QApplication.instance().thread()

    task = workers.run_in_worker(None, work, 2, 3, on_done=done)
    qtbot.waitUntil(lambda: "result" in seen, timeout=5000)
    assert seen["result"] == 5 and seen["on_gui_thread"]
    assert seen["worker_thread"] != threading.get_ident()
    assert not task.running


def test_progress_and_cancel(qtbot):
    fractions, results = [], []
    started = threading.Event()

    def slow(progress, cancelled):
        started.set()
        for k in range(200):
            if cancelled():
                return "stopped early"
            progress(k / 200)
            time.sleep(0.005)
        return "ran to the end"

    task = workers.run_in_worker(None, slow, on_done=results.append, progress_label="slow")
    task.progressed.connect(fractions.append)
    assert workers.tracker().busy() and workers.tracker().label() == "slow"
    qtbot.waitUntil(lambda: len(fractions) > 2, timeout=5000)
    task.cancel()
    with qtbot.waitSignal(task.finished, timeout=5000):
        pass
    assert results == []  # a cancelled task never delivers
    assert all(0.0 <= f <= 1.0 for f in fractions)
    qtbot.waitUntil(lambda: not workers.tracker().busy(), timeout=5000)


def test_error_is_one_line(qtbot):
    errors = []

    def bad():
        raise ValueError("targets.csv, line 3\n column dec: too far north")

    workers.run_in_worker(None, bad, on_error=errors.append)
    qtbot.waitUntil(lambda: bool(errors), timeout=5000)
    assert errors == ["targets.csv, line 3 column dec: too far north"]


def test_owner_destroyed_cancels_its_tasks(qtbot):
    owner = QObject()
    gate, results = threading.Event(), []
    task = workers.run_in_worker(owner, lambda: gate.wait(5) and "late", on_done=results.append)
    owner.deleteLater()
    QApplication.sendPostedEvents(None, QEvent.Type.DeferredDelete)  # delete it now
    assert task.cancelled and task.running
    gate.set()
    with qtbot.waitSignal(task.finished, timeout=5000):
        pass
    assert results == []
