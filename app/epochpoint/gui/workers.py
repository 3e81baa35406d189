"""Background tasks: run a function in a thread pool, get its result back on the GUI thread.

    task = run_in_worker(owner, func, *args, on_done=..., on_error=..., progress_label="...")
    task.cancel()

`func` runs in a QThreadPool thread. If it takes a keyword `progress` it receives a callable
(fraction 0..1); if it takes `cancelled` it receives a callable returning True once the task
was cancelled, so it can stop early. Results, errors and progress reach the GUI thread through
queued signals. A cancelled task never calls on_done or on_error. When `owner` is destroyed its
tasks are cancelled. Every running task is listed by `tracker()`, which the main window
watches to show a progress bar and a Cancel button.
"""
from __future__ import annotations

import inspect
import threading
import traceback

from PySide6.QtCore import QObject, QRunnable, QThreadPool, Qt, Signal

# Two cores on the machines we aim at: one task computes while another waits its turn.
MAX_THREADS = 2


def _one_line(exc: BaseException) -> str:
    text = " ".join(str(exc).split())
    return text or type(exc).__name__


class Task(QObject):
    """One background call. Signals fire on the GUI thread."""

    done = Signal(object)          # the function's result
    failed = Signal(str)           # a one-line error message
    progressed = Signal(float)     # fraction 0..1
    finished = Signal()            # after done/failed, or once a cancelled call returns
    # Internal: emitted from the worker thread, received (queued) on the GUI thread.
    _result = Signal(object, object)
    _progress = Signal(float)

    def __init__(self, label: str = ""):
        super().__init__()
        self.label = label
        self._cancel_event = threading.Event()
        self._running = True
        self._result.connect(self._deliver, Qt.ConnectionType.QueuedConnection)
        self._progress.connect(self._relay_progress, Qt.ConnectionType.QueuedConnection)

    def cancel(self) -> None:
        """Ask the task to stop; its result (if any) is thrown away."""
        self._cancel_event.set()

    @property
    def cancelled(self) -> bool:
        return self._cancel_event.is_set()

    @property
    def running(self) -> bool:
        return self._running

    def _relay_progress(self, fraction: float) -> None:
        if not self.cancelled:
            self.progressed.emit(fraction)

    def _deliver(self, result, error) -> None:
        self._running = False
        if not self.cancelled:
            if error is None:
                self.done.emit(result)
            else:
                self.failed.emit(error)
        self.finished.emit()


class _Runnable(QRunnable):
    def __init__(self, task: Task, func, args, kwargs):
        super().__init__()
        self.setAutoDelete(True)
        self.task, self.func, self.args, self.kwargs = task, func, args, kwargs

    def run(self):
        task = self.task
        if task.cancelled:
            task._result.emit(None, "cancelled")
            return
        try:
            result = self.func(*self.args, **self.kwargs)
            task._result.emit(result, None)
        except Exception as exc:  # noqa: BLE001 - reported to the user as one line
            if not isinstance(exc, (ValueError, OSError)):
                traceback.print_exc()
            task._result.emit(None, _one_line(exc))


class TaskTracker(QObject):
    """The running tasks, for the status bar's progress bar and Cancel button."""

    changed = Signal()                # a task started or finished
    progressed = Signal(str, float)   # label, fraction of the latest task reporting

    def __init__(self):
        super().__init__()
        self.tasks: list[Task] = []

    def add(self, task: Task) -> None:
        self.tasks.append(task)
        task.finished.connect(lambda t=task: self._remove(t))
        task.progressed.connect(lambda f, t=task: self.progressed.emit(t.label, f))
        self.changed.emit()

    def _remove(self, task: Task) -> None:
        if task in self.tasks:
            self.tasks.remove(task)
            self.changed.emit()

    def busy(self) -> bool:
        return bool(self.tasks)

    def label(self) -> str:
        labels = [t.label for t in self.tasks if t.label and not t.cancelled]
        return labels[-1] if labels else ""

    def cancel_all(self) -> None:
        for task in list(self.tasks):
            task.cancel()


_tracker: TaskTracker | None = None
_pool: QThreadPool | None = None


def tracker() -> TaskTracker:
    """The process-wide task list (created on first use, on the GUI thread)."""
    global _tracker
    if _tracker is None:
        _tracker = TaskTracker()
    return _tracker


def pool() -> QThreadPool:
    global _pool
    if _pool is None:
        _pool = QThreadPool()
        _pool.setMaxThreadCount(MAX_THREADS)
    return _pool


def _accepts(func, name: str) -> bool:
    try:
        params = inspect.signature(func).parameters
    except (TypeError, ValueError):
        return False
    return name in params or any(p.kind is p.VAR_KEYWORD for p in params.values())


def run_in_worker(owner: QObject | None, func, *args, on_done=None, on_error=None,
                  progress_label: str = "", **kwargs) -> Task:
    """Run func(*args, **kwargs) in the thread pool; see the module docstring."""
    task = Task(progress_label)
    if _accepts(func, "progress"):
        kwargs["progress"] = lambda fraction: task._progress.emit(float(fraction))
    if _accepts(func, "cancelled"):
        kwargs["cancelled"] = task._cancel_event.is_set
    if on_done is not None:
        task.done.connect(on_done)
    if on_error is not None:
        task.failed.connect(on_error)
    if owner is not None:
        owner.destroyed.connect(lambda *_args, task=task: task.cancel())
    tracker().add(task)
    pool().start(_Runnable(task, func, args, kwargs))
    return task


def wait_for_workers(timeout_ms: int = 30000) -> bool:
    """Cancel every task and wait for the pool's threads to finish (on exit and in tests)."""
    tracker().cancel_all()
    return pool().waitForDone(timeout_ms)
