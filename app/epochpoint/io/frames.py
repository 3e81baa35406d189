"""Catalogue reference frames to ICRS: FK5 and FK4 rows are converted on load.

A row's `frame` is icrs (default), fk5 (mean equator and equinox of `equinox`, default J2000.0)
or fk4 (Besselian system with the E-terms of aberration, equinox default B1950.0).

FK5 rows go through astropy.coordinates (FK5 -> ICRS: precession to J2000.0 and the frame
bias, IERS Conventions 2010, sec. 5.5.3). Proper motions ride along as a tangential velocity
vector at a nominal distance (`NOMINAL_DISTANCE_PC`, so rows without parallax convert too):
these steps are fixed rotations, which astropy applies to that vector exactly. Parallax and
radial velocity are unchanged.

FK4 rows are first converted to FK5 J2000.0 at their own epoch by the full Standish (1982) /
Aoki et al. (1983) transformation, including the time derivative of the FK4-to-FK5 rotation
(fk4.py: IAU SOFA fk425, or fk45z for rows without proper motion, which are read as at rest
in FK5), then go the FK5 way.
"""
from __future__ import annotations

import warnings

import astropy.units as u
import numpy as np
from astropy.time import Time

from .epochs import split_epoch
from .errors import quote

FRAMES = ("icrs", "fk5", "fk4")
DEFAULT_EQUINOX = {"fk5": "J2000.0", "fk4": "B1950.0"}
# Equinoxes outside these years are refused (precession models are not meant for them).
EQUINOX_MIN_YEAR, EQUINOX_MAX_YEAR = 1000.0, 3000.0
# The distance at which proper motions travel through astropy; any value gives the same
# rotation, since radial velocity is carried separately.
NOMINAL_DISTANCE_PC = 1.0e6


def parse_frame(text: str) -> str:
    """'icrs', 'fk5' or 'fk4' from a frame cell (case-insensitive); ValueError otherwise."""
    frame = text.strip().lower() or "icrs"
    if frame not in FRAMES:
        raise ValueError(f"{quote(text.strip())} is not a supported frame (icrs, fk5 or fk4)")
    return frame


def parse_equinox(text: str, frame: str) -> str:
    """A canonical equinox string ('J2000.0', 'B1950.0') for a frame; a bare year is Julian
    for FK5 and Besselian for FK4 (common practice). ValueError if unreadable."""
    if frame == "icrs":
        return ""
    if not text.strip():
        return DEFAULT_EQUINOX[frame]
    kind, year = split_epoch(text)
    if not EQUINOX_MIN_YEAR <= year <= EQUINOX_MAX_YEAR:
        raise ValueError(f"equinox {quote(text.strip())} is outside the years "
                         f"{EQUINOX_MIN_YEAR:.0f} to {EQUINOX_MAX_YEAR:.0f}")
    kind = kind or DEFAULT_EQUINOX[frame][0]
    return f"{kind}{year!r}"


def convert_to_icrs(frame: np.ndarray, equinox: np.ndarray, astrometry: dict,
                    motion_given: np.ndarray | None = None) -> dict:
    """ICRS astrometry for rows given in FK5/FK4 (see module docstring); ICRS rows are untouched.

    frame, equinox: per-row strings from parse_frame/parse_equinox. astrometry: arrays ra, dec
    (deg), epoch (Julian year TDB), pm_ra_cosdec, pm_dec (mas/yr), parallax (mas),
    radial_velocity (km/s). motion_given: per row, False where the file gave no proper motion
    (an FK4 row is then read as at rest in FK5); default: given on every row. Returns a new
    dict of the same arrays. One conversion per distinct (frame, equinox), vectorized over its
    rows.
    """
    out = {key: np.array(value, dtype=float) for key, value in astrometry.items()}
    given = (np.ones(len(out["ra"]), dtype=bool) if motion_given is None
             else np.asarray(motion_given, dtype=bool))
    for key in sorted(set(zip(frame, equinox)) - {("icrs", "")}):
        rows = np.flatnonzero((frame == key[0]) & (equinox == key[1]))
        group = {k: v[rows] for k, v in out.items()}
        if key[0] == "fk4":
            from .fk4 import fk4_to_fk5_j2000  # astropy.coordinates: only for FK4 rows

            group = fk4_to_fk5_j2000(key[1], group, given[rows])
        converted = _fk5_to_icrs(DEFAULT_EQUINOX["fk5"] if key[0] == "fk4" else key[1], group)
        for k, v in converted.items():
            out[k][rows] = v
    return out


def _fk5_to_icrs(equinox: str, a: dict) -> dict:
    """ICRS ra, dec and proper motion of FK5 rows that share one equinox."""
    # astropy.coordinates (about 0.2 s to import) is loaded by the files that need it.
    from astropy.coordinates import FK5, ICRS

    equinox_time = Time(equinox)  # 'J2000.0' / 'B1950.0' strings, as astropy reads them
    position = dict(ra=a["ra"] * u.deg, dec=a["dec"] * u.deg)
    # The tangential velocity at a nominal distance; radial velocity and distance are
    # unchanged by these rotations and stay as given.
    motion = dict(distance=np.full(len(a["ra"]), NOMINAL_DISTANCE_PC) * u.pc,
                  pm_ra_cosdec=a["pm_ra_cosdec"] * (u.mas / u.yr),
                  pm_dec=a["pm_dec"] * (u.mas / u.yr),
                  radial_velocity=np.zeros(len(a["ra"])) * (u.km / u.s))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # ERFA "dubious year" for epochs far from today
        icrs = FK5(**position, **motion, equinox=equinox_time).transform_to(ICRS())
    return dict(ra=_wrap_degrees(icrs.ra.to_value(u.deg)), dec=icrs.dec.to_value(u.deg),
                epoch=a["epoch"], pm_ra_cosdec=icrs.pm_ra_cosdec.to_value(u.mas / u.yr),
                pm_dec=icrs.pm_dec.to_value(u.mas / u.yr), parallax=a["parallax"],
                radial_velocity=a["radial_velocity"])


def _wrap_degrees(angle_deg: np.ndarray) -> np.ndarray:
    """Angles in [0, 360): np.mod alone returns 360.0 for tiny negative inputs."""
    wrapped = np.mod(angle_deg, 360.0)
    return np.where(wrapped >= 360.0, 0.0, wrapped)
