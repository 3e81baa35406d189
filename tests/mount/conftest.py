"""A real INDI peer for the mount tests: Debian's indiserver running indi_simulator_telescope
on a free loopback port, with a bounded lifetime, killed in teardown.

Outside CI the tests skip (with the reason) only when indiserver or the simulator is not
installed; under CI (CI=true) a missing indiserver fails them, so they cannot pass unseen.
"""
from __future__ import annotations

import contextlib
import os
import shutil
import signal
import socket
import subprocess
import time
from dataclasses import dataclass

import pytest

SERVER = "indiserver"
DRIVER = "indi_simulator_telescope"
# Longest life of one server: `timeout` kills it even if pytest itself dies.
LIFETIME_S = 240
START_TIMEOUT_S = 15.0


@dataclass
class IndiServer:
    port: int
    process: subprocess.Popen
    log_path: str

    @property
    def address(self) -> str:
        return f"127.0.0.1:{self.port}"

    def kill(self) -> None:
        """Kill the server and its driver (one process group) and reap them."""
        with contextlib.suppress(ProcessLookupError, PermissionError):
            os.killpg(self.process.pid, signal.SIGKILL)
        with contextlib.suppress(subprocess.TimeoutExpired):
            self.process.wait(timeout=5)


def require_indiserver() -> None:
    missing = [p for p in (SERVER, DRIVER) if shutil.which(p) is None]
    if not missing:
        return
    message = (f"{' and '.join(missing)} not installed (Debian package indi-bin); the INDI "
               "mount tests need a real indiserver with the telescope simulator")
    if os.environ.get("CI") == "true":
        pytest.fail("CI=true but " + message)
    pytest.skip(message)


def _free_loopback_port() -> int:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as probe:
        probe.bind(("127.0.0.1", 0))
        return probe.getsockname()[1]


def _answers(port: int) -> bool:
    try:
        with socket.create_connection(("127.0.0.1", port), timeout=0.5):
            return True
    except OSError:
        return False


@contextlib.contextmanager
def running_indiserver(folder):
    """Start indiserver with the simulator; yield an IndiServer once its port answers."""
    require_indiserver()
    port = _free_loopback_port()
    # -u: a local (abstract) socket of its own, so servers never collide; -r 0: a driver that
    # dies stays dead instead of being restarted under the test.
    command = [SERVER, "-p", str(port), "-u", os.path.join(str(folder), f"indi-{port}"),
               "-r", "0", DRIVER]
    if shutil.which("timeout"):
        command = ["timeout", "-s", "KILL", str(LIFETIME_S), *command]
    log_path = os.path.join(folder, f"indiserver-{port}.log")
    # HOME in the test folder: the simulator's saved configuration never leaks between runs.
    env = dict(os.environ, HOME=str(folder))
    with open(log_path, "wb") as log:
        process = subprocess.Popen(command, stdout=log, stderr=subprocess.STDOUT,
                                   stdin=subprocess.DEVNULL, cwd=folder, env=env,
                                   start_new_session=True)
    server = IndiServer(port, process, log_path)
    try:
        deadline = time.monotonic() + START_TIMEOUT_S
        while not _answers(port):
            if process.poll() is not None or time.monotonic() > deadline:
                with open(log_path, errors="replace") as log:
                    tail = log.read()[-500:]
                pytest.fail(f"indiserver did not answer on port {port}: {tail}")
            time.sleep(0.1)
        yield server
    finally:
        server.kill()


@pytest.fixture(scope="module")
def indi_server(tmp_path_factory):
    """One server for a module's tests (the mount keeps its position between them)."""
    with running_indiserver(tmp_path_factory.mktemp("indi")) as server:
        yield server


@pytest.fixture
def fresh_indi_server(tmp_path):
    """A server of the test's own, for tests that kill it."""
    with running_indiserver(tmp_path) as server:
        yield server
