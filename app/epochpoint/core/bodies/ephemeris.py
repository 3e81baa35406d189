"""Barycentric positions and velocities of the Sun, Moon and planets from JPL DE421.

Source: the JPL planetary and lunar ephemeris DE421 (Folkner, Williams & Boggs 2009, IPN
Progress Report 42-178), the Chebyshev series shipped as arrays by the `de421` package and
evaluated by `jplephem` (its package reader, `jplephem.ephem.Ephemeris`). Quoted accuracy
of DE421 over recent decades: the inner planets to a few hundred metres, the Moon to a few
metres in range (Folkner et al. 2009). Positions are in the ICRF (ICRS axes), AU, at TDB.

Valid span: 1900-01-01 to 2050-12-31 (TDB); instants outside it are refused with
EphemerisRangeError. The series are loaded on first use (about 27 MB, tens of ms), so
importing this module costs nothing; one call is vectorized over any number of instants
(about 2 us per instant and body).
"""
from __future__ import annotations

import threading

import numpy as np

from ..constants import AU_M

# Names a target row may use for a major body ("earth" is the observer's planet).
MAJOR_BODIES = ("sun", "moon", "mercury", "venus", "mars", "jupiter", "saturn", "uranus",
                "neptune", "pluto")
# DE421's stated span as we use it, TDB Julian dates (1900-01-01.0 and 2051-01-01.0).
VALID_FIRST_JD = 2415020.5
VALID_END_JD = 2469807.5
VALID_SPAN_TEXT = "1900-01-01 to 2050-12-31"
AU_KM = AU_M / 1000.0

_lock = threading.Lock()
_ephemeris = None


class EphemerisRangeError(ValueError):
    """An instant outside the ephemeris's valid span."""


def _de421():
    """The DE421 reader, made on first use (imports jplephem and de421 only then)."""
    global _ephemeris
    with _lock:
        if _ephemeris is None:
            import warnings

            import de421
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                from jplephem.ephem import Ephemeris
                _ephemeris = Ephemeris(de421)
        return _ephemeris


def check_span(tdb_jd1, tdb_jd2=0.0) -> None:
    """Raise EphemerisRangeError (one line) when any instant is outside 1900-2050."""
    jd = np.asarray(tdb_jd1, dtype=float) + np.asarray(tdb_jd2, dtype=float)
    outside = ~((jd >= VALID_FIRST_JD) & (jd < VALID_END_JD))
    if np.any(outside):
        first = float(np.ravel(jd)[np.flatnonzero(np.ravel(outside))[0]])
        raise EphemerisRangeError(
            f"instant JD {first:.1f} (TDB) is outside the DE421 ephemeris span "
            f"{VALID_SPAN_TEXT}")


def _series_state(name: str, jd1: np.ndarray, jd2: np.ndarray):
    """Position (km) and velocity (km/day) of one DE421 series, each (3, n)."""
    eph = _de421()
    bundle = eph.compute_bundle(name, jd1, jd2)
    return eph.position_from_bundle(bundle), eph.velocity_from_bundle(bundle)


def barycentric_state(body: str, tdb_jd1, tdb_jd2=0.0) -> tuple[np.ndarray, np.ndarray]:
    """Barycentric position (AU) and velocity (AU/day) of `body`, each (3, n), at TDB instants.

    `body`: 'sun', 'moon', 'earth', 'mercury' .. 'neptune', 'pluto' (case-insensitive).
    DE421 stores the Earth-Moon barycentre and the geocentric Moon; the Earth and the Moon
    are split from them by the Earth/Moon mass ratio EMRAT of the ephemeris.
    """
    jd1 = np.atleast_1d(np.asarray(tdb_jd1, dtype=float))
    jd2 = np.broadcast_to(np.asarray(tdb_jd2, dtype=float), jd1.shape)
    jd1, jd2 = np.ravel(jd1), np.ravel(jd2)
    check_span(jd1, jd2)
    name = str(body).strip().lower()
    if name in ("earth", "moon"):
        emb_p, emb_v = _series_state("earthmoon", jd1, jd2)
        moon_p, moon_v = _series_state("moon", jd1, jd2)
        eph = _de421()
        share = eph.earth_share if name == "earth" else -eph.moon_share
        p, v = emb_p - share * moon_p, emb_v - share * moon_v
    elif name in MAJOR_BODIES:
        p, v = _series_state(name, jd1, jd2)
    else:
        raise ValueError(f"unknown body {body!r}; expected one of {', '.join(MAJOR_BODIES)}")
    return p / AU_KM, v / AU_KM


def barycentric_position(body: str, tdb_jd1, tdb_jd2=0.0) -> np.ndarray:
    """Barycentric position (AU, ICRS axes, (3, n)) of `body` at TDB instants (see
    barycentric_state)."""
    return barycentric_state(body, tdb_jd1, tdb_jd2)[0]


def earth_barycentric_state(tdb_jd1, tdb_jd2=0.0) -> tuple[np.ndarray, np.ndarray]:
    """The Earth's barycentric position (AU) and velocity (AU/day), each (3, n)."""
    return barycentric_state("earth", tdb_jd1, tdb_jd2)
