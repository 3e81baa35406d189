"""The mount panel's network side: connecting to an INDI server, choosing the telescope, and
running each network call in a thread of its own (see mount_panel.py for why not the pool)."""
from __future__ import annotations

import threading

from PySide6.QtCore import QObject, Qt, Signal

from ...mount import (IndiClient, IndiTimeout, MountFailed, Telescope,
                      find_telescope, parse_address)
from ...mount.telescope import is_telescope

CONNECT_TIMEOUT_S = 10.0
JOIN_TIMEOUT_S = 6.0


def one_line(err: BaseException) -> str:
    return " ".join(str(err).split()) or type(err).__name__


def telescope_devices(client: IndiClient) -> list[str]:
    """The devices on the server that are telescopes, in the order they appeared."""
    return [d for d in client.devices() if is_telescope(client, d)]


def open_mount(address: str, device: str | None, timeout_s: float = CONNECT_TIMEOUT_S):
    """Connect to the INDI server at "HOST:PORT", CONNECT a telescope device (`device`, or the
    first telescope seen) and return (Telescope, the names of every telescope there)."""
    host, port = parse_address(address)
    client = IndiClient(host, port, connect_timeout_s=min(timeout_s, 5.0)).open()
    try:
        try:
            client.wait_for(lambda: telescope_devices(client), timeout_s, "a telescope device")
        except IndiTimeout:
            seen = ", ".join(client.devices()) or "none"
            raise MountFailed(f"no telescope device at {client.address} within {timeout_s:g} s "
                              f"(devices seen: {seen})") from None
        scope = Telescope(client, find_telescope(client, device or telescope_devices(client)[0],
                                                 timeout_s))
        scope.connect(timeout_s)
        return scope, telescope_devices(client)
    except BaseException:
        client.close()
        raise


def switch_device(scope: Telescope, device: str, timeout_s: float = CONNECT_TIMEOUT_S):
    """The same server's telescope `device`, CONNECTed."""
    other = Telescope(scope.client, find_telescope(scope.client, device, timeout_s))
    other.connect(timeout_s)
    return other


class MountJob(QObject):
    """One blocking mount call in a thread of its own; its outcome arrives on the GUI thread.

    `say` may be passed to the call as its notify callback (thread-safe).
    """

    done = Signal(object)
    failed = Signal(object)  # the exception
    said = Signal(str)
    finished = Signal()
    _event = Signal(str, object)  # emitted in the job's thread, delivered queued

    def __init__(self, label: str, func, *args, **kwargs):
        super().__init__()
        self.label, self.func, self.args, self.kwargs = label, func, args, kwargs
        self._event.connect(self._deliver, Qt.ConnectionType.QueuedConnection)
        self._thread = threading.Thread(target=self._run, name=f"mount: {label}", daemon=True)
        self._dropped = False

    def start(self) -> "MountJob":
        self._thread.start()
        return self

    def say(self, text: str) -> None:
        self._event.emit("said", str(text))

    def running(self) -> bool:
        return self._thread.is_alive()

    def drop(self) -> None:
        """Deliver nothing more (its owner is closing); the call itself runs to its end."""
        self._dropped = True

    def wait(self, timeout_s: float) -> bool:
        if self._thread.ident is not None:
            self._thread.join(timeout_s)
        return not self._thread.is_alive()

    def _run(self) -> None:
        try:
            result = self.func(*self.args, **self.kwargs)
        except Exception as err:  # noqa: BLE001 - every failure is shown as one line
            self._event.emit("failed", err)
        else:
            self._event.emit("done", result)
        finally:
            self._event.emit("finished", None)

    def _deliver(self, kind: str, payload) -> None:
        if self._dropped:
            return
        if kind == "done":
            self.done.emit(payload)
        elif kind == "failed":
            self.failed.emit(payload)
        elif kind == "said":
            self.said.emit(payload)
        else:
            self.finished.emit()


def record_to_file(scope: Telescope, targets, site, name: str, path: str,
                   slew_side: str = "") -> dict:
    """Read where the mount's axes are on the centred star `name` (mount.calibration; a
    German mount's pier side from the device, else slew_side, the side the slew's check
    found) and append that sample to the samples file `path`, keeping its other columns
    (io.pointing_samples); the sample."""
    from ...io.pointing_samples import append_sample
    from ...mount.calibration import read_sample

    sample = read_sample(scope, targets, site, name, slew_side=slew_side)
    append_sample(path, sample)
    return sample
