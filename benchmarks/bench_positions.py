"""Benchmark: one million stars from epoch 2016.0 with full space motion to the observed place
with refraction, Epochpoint against astropy doing the same work, in one process.

Both Epochpoint engines are timed: the compiled chain (numba, core/kernels_chain.py) and the
numpy reference path. Prints the speed ratios (astropy time / Epochpoint time, best of several
runs each), the largest difference between the two engines, the altitude agreement with
astropy above 15 deg, the peak memory each allocated (tracemalloc), and the compiled chain's
first call in a fresh process: with an empty cache (compiling) and with the cache filled.
Run: .venv/bin/python benchmarks/bench_positions.py [N]
"""
from __future__ import annotations

import os
import subprocess
import sys
import tempfile
import time
import tracemalloc
import warnings

import numpy as np

import astropy.units as u
from astropy.coordinates import AltAz, EarthLocation, SkyCoord
from astropy.time import Time

import epochpoint as ep

WHEN = "2027-01-20T23:10:00Z"
SITE = ep.Site(latitude=-24.6, longitude=-70.4, height=2635.0, pressure=745.0,
               temperature=8.0, humidity=0.2, wavelength=0.55)


def realistic_stars(n: int, seed: int = 2016):
    """Random stars with realistic space motion (tangential speed <= 300 km/s)."""
    rng = np.random.default_rng(seed)
    ra = rng.uniform(0.0, 360.0, n)
    dec = np.degrees(np.arcsin(rng.uniform(-1.0, 1.0, n)))
    parallax = 10.0 ** rng.uniform(-1.0, 2.5, n)
    v_tan = rng.uniform(0.0, 300.0, n)
    angle = rng.uniform(0.0, 2.0 * np.pi, n)
    pm_total = np.minimum(v_tan * parallax / 4.740470446, 10_000.0)
    return dict(ra=ra, dec=dec, pm_ra_cosdec=pm_total * np.cos(angle),
                pm_dec=pm_total * np.sin(angle), parallax=parallax,
                radial_velocity=rng.normal(0.0, 40.0, n), epoch=2016.0)


def run_epochpoint(columns, engine="kernel"):
    targets = ep.Targets.from_columns(**columns)
    return ep.positions(targets, SITE, WHEN, engine=engine)["alt"]


def run_numpy(columns):
    return run_epochpoint(columns, engine="numpy")


FIRST_CALL = """
import time, warnings
warnings.simplefilter("ignore")
start = time.perf_counter()
import numpy as np, epochpoint as ep
t = ep.Targets.from_columns(ra=np.linspace(0, 359, 1000), dec=0.0)
ready = time.perf_counter()
ep.positions(t, ep.Site(latitude=-24.6, longitude=-70.4), "2027-01-20T23:10:00Z",
             engine="kernel")
print(time.perf_counter() - ready)
"""


def first_call_seconds(cache_dir=None) -> float:
    """Seconds of the compiled chain's first call in a new process (numba import, then
    compiling or loading from the cache); cache_dir: NUMBA_CACHE_DIR, else numba's default."""
    env = dict(os.environ)
    if cache_dir is not None:
        env["NUMBA_CACHE_DIR"] = cache_dir
    done = subprocess.run([sys.executable, "-c", FIRST_CALL], env=env, check=True,
                          capture_output=True, text=True)
    return float(done.stdout.split()[-1])


def run_astropy(columns):
    t_obs = Time(WHEN.rstrip("Z"), scale="utc")
    coords = SkyCoord(ra=columns["ra"] * u.deg, dec=columns["dec"] * u.deg,
                      pm_ra_cosdec=columns["pm_ra_cosdec"] * u.mas / u.yr,
                      pm_dec=columns["pm_dec"] * u.mas / u.yr,
                      distance=(columns["parallax"] * u.mas).to(u.pc, u.parallax()),
                      radial_velocity=columns["radial_velocity"] * u.km / u.s,
                      obstime=Time(2016.0, format="jyear", scale="tdb"))
    moved = coords.apply_space_motion(new_obstime=t_obs)
    location = EarthLocation.from_geodetic(SITE.longitude * u.deg, SITE.latitude * u.deg,
                                           SITE.height * u.m)
    frame = AltAz(obstime=t_obs, location=location, pressure=SITE.pressure * u.hPa,
                  temperature=SITE.temperature * u.deg_C, relative_humidity=SITE.humidity,
                  obswl=SITE.wavelength * u.micron)
    return moved.transform_to(frame).alt.deg


def timed(func, columns, repeats):
    """Best wall time over repeats (untraced), the result, and the peak memory in MiB of one
    further traced run (tracemalloc slows allocation-heavy code, so it is kept apart)."""
    best, result = float("inf"), None
    for _ in range(repeats):
        start = time.perf_counter()
        result = func(columns)
        best = min(best, time.perf_counter() - start)
    tracemalloc.start()
    func(columns)
    peak = tracemalloc.get_traced_memory()[1] / 2**20
    tracemalloc.stop()
    return best, result, peak


def main(n: int = 1_000_000) -> dict:
    warnings.simplefilter("ignore")
    columns = realistic_stars(n)
    with tempfile.TemporaryDirectory() as empty:
        compile_s = first_call_seconds(empty)
    first_call_seconds()  # fills numba's default cache if it is empty
    cached_s = first_call_seconds()
    warm = {k: (v[:10] if np.ndim(v) else v) for k, v in columns.items()}
    run_epochpoint(warm)
    run_numpy(warm)
    ours_s, alt_ours, ours_mib = timed(run_epochpoint, columns, repeats=5)
    numpy_s, alt_numpy, numpy_mib = timed(run_numpy, columns, repeats=3)
    theirs_s, alt_astropy, theirs_mib = timed(run_astropy, columns, repeats=2)
    high = alt_astropy > 15.0
    worst = float(np.max(np.abs(alt_ours[high] - alt_astropy[high])) * 3600.0)
    engines_uas = float(np.nanmax(np.abs(alt_ours - alt_numpy)) * 3.6e9)
    figures = {"stars": n, "kernel_s": ours_s, "numpy_s": numpy_s, "astropy_s": theirs_s,
               "ratio": theirs_s / ours_s, "ratio_numpy": theirs_s / numpy_s,
               "max_alt_diff_arcsec_above_15deg": worst, "kernel_vs_numpy_alt_uas": engines_uas,
               "kernel_peak_mib": ours_mib, "numpy_peak_mib": numpy_mib,
               "astropy_peak_mib": theirs_mib, "first_call_compile_s": compile_s,
               "first_call_cached_s": cached_s, "cores": os.cpu_count()}
    print(f"positions benchmark, {n:,} stars, epoch 2016.0 -> {WHEN}, observed with refraction,"
          f" {os.cpu_count()} cores")
    print(f"  Epochpoint compiled {ours_s:7.3f} s   peak {ours_mib:7.0f} MiB"
          f"   {figures['ratio']:5.1f}x astropy")
    print(f"  Epochpoint numpy    {numpy_s:7.3f} s   peak {numpy_mib:7.0f} MiB"
          f"   {figures['ratio_numpy']:5.1f}x astropy")
    print(f"  astropy             {theirs_s:7.3f} s   peak {theirs_mib:7.0f} MiB")
    print(f"  compiled / numpy: {numpy_s / ours_s:.1f}x faster; largest altitude difference"
          f" between them {engines_uas:.2e} micro-arcsec")
    print(f"  compiled chain, first call in a new process: {compile_s:.1f} s compiling,"
          f" {cached_s:.2f} s from the cache (numba import included)")
    print(f"  largest altitude difference from astropy above 15 deg: {worst:.4f} arcsec")
    return figures


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 1_000_000)
