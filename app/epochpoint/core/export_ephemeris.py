"""A short ephemeris for the solar-system bodies of an export: their exported coordinates and
rates at a regular step over the next EPHEMERIS_SPAN_S seconds.

One place is not enough for a body: the Moon's apparent place moves about 0.5 arcsec a
second, so the single exported place of a body is stale within seconds. A controller (or a
person) interpolates linearly between the rows of the ephemeris instead.

The step: linear interpolation between two samples h apart of a path whose coordinates
accelerate by at most a (on the sky: the longitude's second derivative times cos latitude,
and the latitude's) errs by at most a h^2 / 8, at the midpoint (the error bound of linear
interpolation, e.g. Burden and Faires, Numerical Analysis, Theorem 3.3, with n = 1). The
acceleration is measured from second differences of the exported coordinates themselves on a
probe grid PROBE_STEP_S apart across the span, and the step is the largest of NICE_STEPS_S
with a h^2 / 8 under half the export's tolerance (the other half a margin for the
acceleration's change between probes). Measured (tests/export/test_body_ephemeris.py, the
Moon and Mars, 1 arcsec): apparent place, steps of 300 s, worst midpoint error 0.13 arcsec;
altitude/azimuth and hour angle/declination, 60 s, worst 0.40 arcsec.

Rates in each row are the positions() columns: rate_ra, rate_dec (apparent place of date, as
seen from the site, arcsec/s, rate_ra including cos Dec) and rate_alt, rate_az.
Cost: one positions() call per probe and per row (about 3 ms plus 1 ms a body).
"""
from __future__ import annotations

import numpy as np
from astropy.time import TimeDelta

from .columns import ColumnTable
from .constants import DEG_TO_RAD
from .site import Site
from .targets import Targets
from .timescale import iso_z, parse_time

# How far ahead the ephemeris goes: an hour (a typical observing block).
EPHEMERIS_SPAN_S = 3600.0
PROBE_STEP_S = 300.0
# Steps offered (s): divisors of an hour, so the rows fall on round times.
NICE_STEPS_S = (1.0, 2.0, 5.0, 10.0, 15.0, 20.0, 30.0, 60.0, 120.0, 300.0, 600.0, 900.0,
                1200.0, 1800.0, 3600.0)
RATE_COLUMNS = ("rate_ra", "rate_dec", "rate_alt", "rate_az")


def frame_columns_at(targets: Targets, site: Site, when, frame: str, model=None) -> dict:
    """The exported columns of `frame` and the rate columns of the targets at `when`."""
    from .export import FRAME_COLUMNS, mount_columns, placed

    result = placed(targets, site, when)
    table = mount_columns(result, site, model)[0] if frame == "mount" else result
    out = {c: np.asarray(table[c], dtype=float) for c in FRAME_COLUMNS[frame]}
    out.update({c: np.asarray(result[c], dtype=float) for c in RATE_COLUMNS})
    return out


def _pairs(frame: str):
    from .export import _MOVING_PAIRS

    return _MOVING_PAIRS[frame]


def path_acceleration(samples: list, step_s: float, frame: str) -> np.ndarray:
    """Largest on-sky second derivative (arcsec/s^2) of each target's exported coordinate
    pairs, from second differences of samples `step_s` apart (a list of frame_columns_at)."""
    largest = np.zeros(samples[0][_pairs(frame)[0][0]].shape)
    for a, b, c in zip(samples, samples[1:], samples[2:]):
        for lon, lat in _pairs(frame):
            d2_lon = (a[lon] - 2.0 * b[lon] + c[lon] + 180.0) % 360.0 - 180.0
            d2_lat = a[lat] - 2.0 * b[lat] + c[lat]
            on_sky = np.hypot(d2_lon * np.cos(b[lat] * DEG_TO_RAD), d2_lat) * 3600.0
            largest = np.maximum(largest, on_sky / step_s ** 2)
    return largest


def ephemeris_step(acceleration_arcsec_s2: float, tolerance_arcsec: float,
                   span_s: float) -> float:
    """The largest of NICE_STEPS_S (at most the span) whose interpolation error
    a h^2 / 8 stays under half the tolerance."""
    if acceleration_arcsec_s2 <= 0.0:
        return min(NICE_STEPS_S[-1], span_s)
    limit = np.sqrt(8.0 * 0.5 * tolerance_arcsec / acceleration_arcsec_s2)
    fits = [h for h in NICE_STEPS_S if h <= limit and h <= span_s]
    return fits[-1] if fits else NICE_STEPS_S[0]


def body_ephemeris(bodies: Targets, site: Site, when, frame: str, tolerance_arcsec: float,
                   span_s: float = EPHEMERIS_SPAN_S, model=None) -> ColumnTable:
    """The bodies' ephemeris: name, time (ISO 8601 UTC, Z), the frame's columns and the rate
    columns, every `step` seconds from `when` to `when + span_s`, body after body; meta:
    ephemeris_step_s, ephemeris_span_s, ephemeris_rows, ephemeris_basis."""
    from .export import COLUMN_UNITS, FRAME_COLUMNS

    t0 = parse_time(when)
    at = lambda s: t0 + TimeDelta(float(s), format="sec")  # noqa: E731
    # Probe the paths' curvature across the span, then sample at the step it allows.
    probe = PROBE_STEP_S if span_s >= 2.0 * PROBE_STEP_S else span_s / 2.0
    probes = [frame_columns_at(bodies, site, at(s), frame, model)
              for s in np.arange(0.0, span_s + 0.5 * probe, probe)]
    acceleration = path_acceleration(probes, probe, frame)
    worst = float(acceleration.max())
    step = ephemeris_step(worst, tolerance_arcsec, span_s)
    offsets = np.arange(0.0, span_s + 0.5 * step, step)
    rows = [frame_columns_at(bodies, site, at(s), frame, model) for s in offsets]

    n, k = len(bodies), offsets.size
    names = np.asarray(bodies.names(), dtype=object)
    times = np.array(iso_z(at(0.0) + TimeDelta(offsets, format="sec")), dtype=object)
    columns = {"name": np.repeat(names, k), "time": np.tile(times, n)}
    for c in (*FRAME_COLUMNS[frame], *RATE_COLUMNS):
        columns[c] = np.stack([r[c] for r in rows], axis=1).reshape(n * k)
    units = {c: COLUMN_UNITS.get(c, "deg") for c in FRAME_COLUMNS[frame]}
    units.update({c: "arcsec/s" for c in RATE_COLUMNS})
    fastest = str(names[int(np.argmax(acceleration))])
    basis = (f"linear interpolation between rows errs by at most a h^2/8; the largest path "
             f"acceleration found is {worst:.3g} arcsec/s^2 ({fastest}), so a step of "
             f"{step:g} s keeps it under {0.5 * tolerance_arcsec:g} arcsec (half the "
             f"tolerance)")
    meta = {"ephemeris_step_s": float(step), "ephemeris_span_s": float(offsets[-1]),
            "ephemeris_rows": int(n * k), "ephemeris_basis": basis}
    return ColumnTable(columns, meta, units)
