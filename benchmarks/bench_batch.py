"""Benchmark: `epochpoint batch positions` on an invented Parquet catalogue (default 5,000,000
stars with Gaia archive column names, five files), to the observed place with refraction.

Measured, each run in a fresh process so its peak memory is its own (ru_maxrss):
  1. one partition alone (1,000,000 rows, one thread): time, and the largest size sampled
     during the run above the process's size before it (psutil);
  2. local threads (the default, one process): rows/s and peak memory;
  3. a 2-worker loopback cluster (`dask scheduler` + two `dask worker --nthreads 1`, started
     here): rows/s, peak memory of the client and of each worker.
Astropy doing the same work (SkyCoord space motion, then AltAz with refraction) is timed on a
sample of 20,000 stars and extrapolated per row to the whole catalogue; the ratio printed is
that extrapolated time over the batch's time (the sample is small, so say so when quoting).
Run: .venv/bin/python benchmarks/bench_batch.py [N]
"""
from __future__ import annotations

import json
import os
import resource
import socket
import subprocess
import sys
import tempfile
import threading
import time
import warnings
from pathlib import Path

import numpy as np
import pyarrow as pa
import pyarrow.parquet as pq

from bench_positions import SITE, WHEN, realistic_stars, run_astropy

SITE_SPEC = f"{SITE.latitude},{SITE.longitude},{SITE.height}"
FILE_ROWS = 1_000_000
ROW_GROUP_ROWS = 250_000
ASTROPY_SAMPLE = 20_000
DASK = Path(sys.executable).with_name("dask")


def write_catalogue(n: int, folder: Path) -> None:
    """N invented stars as Parquet files of FILE_ROWS rows, Gaia archive column names."""
    stars = realistic_stars(n)
    columns = {"source_id": np.arange(n, dtype=np.int64) * 131 + 7, "ra": stars["ra"],
               "dec": stars["dec"], "pmra": stars["pm_ra_cosdec"], "pmdec": stars["pm_dec"],
               "parallax": stars["parallax"], "radial_velocity": stars["radial_velocity"],
               "ref_epoch": np.full(n, stars["epoch"])}
    table = pa.table(columns)
    folder.mkdir(parents=True)
    for i, start in enumerate(range(0, n, FILE_ROWS)):
        pq.write_table(table.slice(start, FILE_ROWS), folder / f"part-{i:03d}.parquet",
                       row_group_size=ROW_GROUP_ROWS)


def _maxrss_mib() -> float:
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0


def child(source: str, output: str, scheduler: str, threads: str) -> None:
    """One batch in this process; prints its figures as JSON on the last line."""
    warnings.simplefilter("ignore")
    from epochpoint.batch import batch_positions
    from epochpoint.io import read_site

    import psutil

    site = read_site(SITE_SPEC)
    # The process's size now (not its high-water mark: imports peak higher than they stay),
    # then the largest size sampled every 10 ms while the batch runs.
    process = psutil.Process()
    base, highest, done = process.memory_info().rss, [0], threading.Event()

    def sample():
        while not done.wait(0.01):
            highest[0] = max(highest[0], process.memory_info().rss)

    sampler = threading.Thread(target=sample, daemon=True)
    sampler.start()
    summary = batch_positions(source, WHEN, output, site=site, scheduler=scheduler or None,
                              threads=int(threads) or None, progress=False)
    done.set()
    sampler.join()
    print(json.dumps({"rows": summary.rows, "seconds": summary.seconds,
                      "partitions": summary.partitions, "peak_mib": _maxrss_mib(),
                      "base_mib": base / 2**20, "run_peak_mib": highest[0] / 2**20}))


def run_child(source, output, scheduler="", threads=0) -> dict:
    done = subprocess.run([sys.executable, __file__, "--child", str(source), str(output),
                           scheduler, str(threads)], capture_output=True, text=True,
                          check=True, env=dict(os.environ, PYTHONWARNINGS="ignore"))
    return json.loads(done.stdout.strip().splitlines()[-1])


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


def on_cluster(source, output, scratch: Path) -> tuple[dict, list]:
    """The batch on a loopback scheduler with two one-thread workers; (client figures,
    each worker's peak memory in MiB)."""
    from distributed import Client

    address = f"tcp://127.0.0.1:{_free_port()}"
    log = open(scratch / "cluster.log", "wb")
    common = dict(cwd=scratch, stdout=log, stderr=log)
    processes = [subprocess.Popen([str(DASK), "scheduler", "--host", "127.0.0.1", "--port",
                                   address.rsplit(":", 1)[1], "--no-dashboard"], **common)]
    try:
        for i in range(2):
            processes.append(subprocess.Popen(
                [str(DASK), "worker", address, "--nthreads", "1", "--no-dashboard",
                 "--host", "127.0.0.1", "--local-directory", str(scratch),
                 "--memory-limit", "8GiB"], **common))
        deadline = time.monotonic() + 60
        while True:
            try:
                client = Client(address, timeout=5, set_as_default=False)
                break
            except OSError:
                if time.monotonic() > deadline:
                    raise
                time.sleep(0.5)
        with client:
            client.wait_for_workers(2, timeout=60)
            figures = run_child(source, output, scheduler=address)
            workers = client.run(_maxrss_mib)
            client.shutdown()
        return figures, sorted(workers.values())
    finally:
        for process in processes:
            if process.poll() is None:
                process.terminate()
            try:
                process.wait(timeout=15)
            except subprocess.TimeoutExpired:
                process.kill()
        log.close()


def astropy_seconds_per_row() -> float:
    sample = realistic_stars(ASTROPY_SAMPLE, seed=7)
    run_astropy({k: (v[:10] if np.ndim(v) else v) for k, v in sample.items()})
    best = float("inf")
    for _ in range(2):
        start = time.perf_counter()
        run_astropy(sample)
        best = min(best, time.perf_counter() - start)
    return best / ASTROPY_SAMPLE


def main(n: int = 5_000_000) -> dict:
    warnings.simplefilter("ignore")
    with tempfile.TemporaryDirectory(prefix="epochpoint-bench-batch-") as tmp:
        tmp = Path(tmp)
        write_catalogue(n, tmp / "catalogue")
        one = run_child(tmp / "catalogue" / "part-000.parquet", tmp / "one_out", threads=1)
        local = run_child(tmp / "catalogue", tmp / "local_out")
        cluster, workers_mib = on_cluster(tmp / "catalogue", tmp / "cluster_out", tmp)
    per_row = astropy_seconds_per_row()
    astropy_s = per_row * n
    figures = {"rows": n, "cores": os.cpu_count(),
               "one_partition_rows": one["rows"], "one_partition_s": one["seconds"],
               "one_partition_mib": one["run_peak_mib"] - one["base_mib"],
               "local_rows_per_s": n / local["seconds"], "local_peak_mib": local["peak_mib"],
               "cluster_rows_per_s": n / cluster["seconds"],
               "cluster_client_peak_mib": cluster["peak_mib"],
               "cluster_worker_peak_mib": workers_mib,
               "astropy_extrapolated_s": astropy_s,
               "ratio_local": astropy_s / local["seconds"],
               "ratio_cluster": astropy_s / cluster["seconds"]}
    print(f"batch benchmark, {n:,} invented stars (Gaia column names, {FILE_ROWS:,}-row files),"
          f" epoch 2016.0 -> {WHEN}, observed with refraction, {os.cpu_count()} cores")
    print(f"  one partition ({one['rows']:,} rows, 1 thread): {one['seconds']:6.2f} s, "
          f"{figures['one_partition_mib']:6.0f} MiB above the process's "
          f"{one['base_mib']:.0f} MiB before it (sampled every 10 ms)")
    print(f"  local threads ({local['partitions']} partitions): {local['seconds']:6.2f} s "
          f"= {figures['local_rows_per_s']:10,.0f} rows/s, peak {local['peak_mib']:6.0f} MiB, "
          f"{figures['ratio_local']:5.1f}x astropy")
    print(f"  2-worker loopback cluster: {cluster['seconds']:6.2f} s "
          f"= {figures['cluster_rows_per_s']:10,.0f} rows/s, client peak "
          f"{cluster['peak_mib']:6.0f} MiB, workers peak "
          f"{', '.join(f'{m:.0f}' for m in workers_mib)} MiB, "
          f"{figures['ratio_cluster']:5.1f}x astropy")
    print(f"  astropy: {per_row * 1e6:.2f} s per million rows, timed on {ASTROPY_SAMPLE:,} "
          f"stars and extrapolated per row to {n:,} ({astropy_s:.0f} s)")
    return figures


if __name__ == "__main__":
    if len(sys.argv) > 1 and sys.argv[1] == "--child":
        child(*sys.argv[2:6])
    else:
        main(int(float(sys.argv[1])) if len(sys.argv) > 1 else 5_000_000)
