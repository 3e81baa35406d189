"""`epochpoint batch --scheduler`: a real dask.distributed cluster (a scheduler and two
workers started here with the venv's `dask scheduler` / `dask worker` commands, on loopback,
without dashboards) computes the same answers as the core in one process, bit for bit."""
from __future__ import annotations

import os
import socket
import subprocess
import sys
import time
from pathlib import Path

import pyarrow.parquet as pq
import pytest

from epochpoint.cli.main import main
from epochpoint.core.positions import positions
from epochpoint.io import read_site

from .catalogue import (SITE_SPEC, WHEN, assert_same_columns, expected_targets, gaia_columns,
                        write_files)

DASK = Path(sys.executable).with_name("dask")
APP = Path(__file__).resolve().parents[2] / "app"
START_TIMEOUT_S = 60


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


@pytest.fixture(scope="module")
def cluster(tmp_path_factory):
    """tcp://127.0.0.1:PORT of a scheduler with two one-thread workers; torn down after."""
    if not DASK.exists():
        pytest.skip("the dask command is not installed in this environment")
    from distributed import Client

    scratch = tmp_path_factory.mktemp("dask")
    env = dict(os.environ, PYTHONPATH=os.pathsep.join(
        [str(APP)] + [p for p in os.environ.get("PYTHONPATH", "").split(os.pathsep) if p]))
    address = f"tcp://127.0.0.1:{_free_port()}"
    log = open(scratch / "cluster.log", "wb")
    processes = [subprocess.Popen([str(DASK), "scheduler", "--host", "127.0.0.1", "--port",
                                   address.rsplit(":", 1)[1], "--no-dashboard"],
                                  cwd=scratch, env=env, stdout=log, stderr=log)]
    try:
        for i in range(2):
            processes.append(subprocess.Popen(
                [str(DASK), "worker", address, "--nthreads", "1", "--no-dashboard",
                 "--host", "127.0.0.1", "--name", f"w{i}", "--local-directory", str(scratch),
                 "--memory-limit", "2GiB"], cwd=scratch, env=env, stdout=log, stderr=log))
        deadline = time.monotonic() + START_TIMEOUT_S
        while True:  # the scheduler needs a moment before it answers
            try:
                client = Client(address, timeout=5, set_as_default=False)
                break
            except OSError:
                if time.monotonic() > deadline:
                    raise
                time.sleep(0.5)
        with client:
            client.wait_for_workers(2, timeout=START_TIMEOUT_S)
        yield address
    finally:
        try:  # a scheduler told to shut down closes its workers at once
            with Client(address, timeout=5, set_as_default=False) as client:
                client.shutdown()
        except (OSError, TimeoutError):
            pass
        for process in reversed(processes):
            if process.poll() is None:
                process.terminate()
        for process in reversed(processes):
            try:
                process.wait(timeout=15)
            except subprocess.TimeoutExpired:
                process.kill()
                process.wait(timeout=5)
        log.close()


def test_cluster_batch_equals_core_positions(cluster, tmp_path, capsys):
    cols = gaia_columns(200_000, seed=5)
    write_files(cols, tmp_path / "in", [120_000, 80_000], row_group_size=40_000)
    out = tmp_path / "cluster_out"
    code = main(["batch", "positions", str(tmp_path / "in"), "--at", WHEN,
                 f"--site={SITE_SPEC}", "--output", str(out), "--scheduler", cluster,
                 "--partition-rows", "40000"])
    err = capsys.readouterr().err
    assert code == 0, err
    assert "200000 rows in 5 partition(s)" in err and "no row with a problem" in err, err
    got = pq.read_table(out)
    assert got["source_id"].to_pylist() == cols["source_id"].tolist()
    expected = positions(expected_targets(cols), read_site(SITE_SPEC), WHEN)
    names = [c for c in expected if c != "name"]
    assert_same_columns({c: got[c].to_numpy() for c in names}, expected, names)


def test_unreachable_scheduler_is_one_line(tmp_path, capsys, monkeypatch):
    monkeypatch.setattr("epochpoint.batch.run.CONNECT_TIMEOUT_S", 1)
    cols = gaia_columns(100, seed=1)
    write_files(cols, tmp_path / "in", [100], row_group_size=100)
    code = main(["batch", "positions", str(tmp_path / "in"), "--at", WHEN, "--output",
                 str(tmp_path / "o"), "--scheduler", f"tcp://127.0.0.1:{_free_port()}"])
    err = capsys.readouterr().err
    assert code == 2 and "cannot reach the Dask scheduler" in err and "Traceback" not in err
    assert not (tmp_path / "o").exists()
