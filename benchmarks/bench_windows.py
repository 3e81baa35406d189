"""Benchmark: observable windows for 10,000 random targets over one night, Epochpoint against
astropy computing a 1-minute altitude grid, in one process.

Epochpoint: what plan() does before scheduling (night boundaries, the Sun and Moon track,
observable_windows), twice: at the demo site with its interlocks (horizon mask above the
altitude limit, German mount, Sun avoidance), and at the same place with the default
interlocks (no horizon mask: every edge in closed form). astropy: AltAz (with the same
weather) of a SkyCoord of the targets at every minute of the night's astronomical darkness,
about 550 instants: only the altitude grid, none of the window logic. Both sides are warmed
up first (IERS table loaded, ERFA and numpy paths exercised); each side's time is the best of
2 runs. The issue asks for a ratio of 10 or more.
Run: .venv/bin/python benchmarks/bench_windows.py [N]
"""
from __future__ import annotations

import sys
import time
import warnings
from dataclasses import replace
from pathlib import Path

import numpy as np

import astropy.units as u
from astropy.coordinates import AltAz, EarthLocation, SkyCoord
from astropy.time import TimeDelta

from epochpoint.core.limits import Interlocks
from epochpoint.core.night import night_boundaries
from epochpoint.core.sky_track import build_sky_track
from epochpoint.core.targets import Targets
from epochpoint.core.windows import Constraints, observable_windows
from epochpoint.io import read_site

DEMO_SITE = Path(__file__).resolve().parents[1] / "sample_targets" / "loma_candil.toml"
NIGHT = "2026-03-18"
GRID_STEP_S = 60.0


def random_targets(n: int, seed: int = 2026) -> dict:
    """Random J2000 positions over the whole sky (no motion: astropy's grid needs none)."""
    rng = np.random.default_rng(seed)
    return dict(ra=rng.uniform(0.0, 360.0, n),
                dec=np.degrees(np.arcsin(rng.uniform(-1.0, 1.0, n))))


def epochpoint_windows(site, columns: dict):
    """plan() up to the windows: boundaries, Sun/Moon track, observable_windows."""
    targets = Targets.from_columns(ra=columns["ra"], dec=columns["dec"], epoch=2000.0)
    night = night_boundaries(site, NIGHT)
    t_ref = night.window_start
    sky = build_sky_track(site, t_ref, float((night.window_end - t_ref).to_value("s")))
    span = night.spans["astronomical"]
    dark = [(float((span[0] - t_ref).to_value("s")), float((span[1] - t_ref).to_value("s")))]
    return observable_windows(targets, site, sky, dark, Constraints())


def darkness_minutes(site):
    """The night's astronomical darkness at a 1-minute step, as astropy Times."""
    night = night_boundaries(site, NIGHT)
    start, end = night.spans["astronomical"]
    length_s = float((end - start).to_value("s"))
    return start + TimeDelta(np.arange(0.0, length_s, GRID_STEP_S), format="sec")


def astropy_grid(site, columns: dict, times) -> np.ndarray:
    """Observed altitude (deg) of every target at every instant: shape (targets, times)."""
    location = EarthLocation.from_geodetic(site.longitude * u.deg, site.latitude * u.deg,
                                           site.height * u.m)
    frame = AltAz(obstime=times[None, :], location=location, pressure=site.pressure * u.hPa,
                  temperature=site.temperature * u.deg_C, relative_humidity=site.humidity,
                  obswl=site.wavelength * u.micron)
    coords = SkyCoord(ra=columns["ra"] * u.deg, dec=columns["dec"] * u.deg, frame="icrs")
    return coords[:, None].transform_to(frame).alt.deg


def best_of(runs: int, func, *args) -> float:
    best = float("inf")
    for _ in range(runs):
        started = time.perf_counter()
        func(*args)
        best = min(best, time.perf_counter() - started)
    return best


def main(n: int = 10_000) -> dict:
    warnings.simplefilter("ignore")
    site = read_site(DEMO_SITE)
    plain = replace(site, interlocks=Interlocks())
    columns = random_targets(n)
    times = darkness_minutes(site)
    small = {k: v[:20] for k, v in columns.items()}
    epochpoint_windows(site, small)  # warm-up: IERS table, ERFA, numpy
    astropy_grid(site, small, times)
    ours_s = best_of(2, epochpoint_windows, site, columns)
    plain_s = best_of(2, epochpoint_windows, plain, columns)
    theirs_s = best_of(2, astropy_grid, site, columns, times)
    figures = {"targets": n, "grid_instants": len(times), "epochpoint_s": ours_s,
               "epochpoint_no_mask_s": plain_s, "astropy_s": theirs_s,
               "ratio": theirs_s / ours_s, "ratio_no_mask": theirs_s / plain_s}
    print(f"windows benchmark, {n:,} targets, night of {NIGHT} at the demo site")
    grid = f"astropy altitude grid only ({len(times)} x 1 min)"
    print(f"  {'Epochpoint windows, demo interlocks (mask)':<46} {ours_s:7.3f} s")
    print(f"  {'Epochpoint windows, default interlocks':<46} {plain_s:7.3f} s")
    print(f"  {grid:<46} {theirs_s:7.3f} s")
    print(f"  ratio (astropy / Epochpoint): {figures['ratio']:.1f}x with the demo interlocks, "
          f"{figures['ratio_no_mask']:.1f}x without the mask (the issue asks >= 10x)")
    return figures


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 10_000)
