"""Benchmark: one million stars from epoch 2016.0 with full space motion to the observed place
with refraction, Epochpoint against astropy doing the same work, in one process.

Prints the speed ratio (astropy time / Epochpoint time, best of several runs each), the
altitude agreement above 15 deg, and the peak memory each side allocated (tracemalloc).
Run: .venv/bin/python benchmarks/bench_positions.py [N]
"""
from __future__ import annotations

import sys
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


def run_epochpoint(columns):
    targets = ep.Targets.from_columns(**columns)
    return ep.positions(targets, SITE, WHEN)["alt"]


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
    run_epochpoint({k: (v[:10] if np.ndim(v) else v) for k, v in columns.items()})  # warm-up
    ours_s, alt_ours, ours_mib = timed(run_epochpoint, columns, repeats=3)
    theirs_s, alt_astropy, theirs_mib = timed(run_astropy, columns, repeats=2)
    high = alt_astropy > 15.0
    worst = float(np.max(np.abs(alt_ours[high] - alt_astropy[high])) * 3600.0)
    figures = {"stars": n, "epochpoint_s": ours_s, "astropy_s": theirs_s,
               "ratio": theirs_s / ours_s, "max_alt_diff_arcsec_above_15deg": worst,
               "epochpoint_peak_mib": ours_mib, "astropy_peak_mib": theirs_mib}
    print(f"positions benchmark, {n:,} stars, epoch 2016.0 -> {WHEN}, observed with refraction")
    print(f"  Epochpoint {ours_s:7.3f} s   peak {ours_mib:7.0f} MiB")
    print(f"  astropy    {theirs_s:7.3f} s   peak {theirs_mib:7.0f} MiB")
    print(f"  ratio (astropy / Epochpoint): {figures['ratio']:.1f}x")
    print(f"  largest altitude difference above 15 deg: {worst:.4f} arcsec")
    return figures


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 1_000_000)
