"""The Sun and the Moon over one night, sampled once and interpolated for any instant.

Positions come from sunmoon.py (built-in ephemerides); between samples the directions are
interpolated linearly as unit vectors (the Moon moves ~0.5 deg per hour, so at a 5-minute
step the interpolation error is below 1"), altitudes and illumination linearly.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from astropy.time import Time, TimeDelta

from .constants import RAD_TO_DEG
from .site import Site

TRACK_STEP_S = 300.0


def _unit(ra_deg, dec_deg):
    ra, dec = np.radians(ra_deg), np.radians(dec_deg)
    return np.stack((np.cos(dec) * np.cos(ra), np.cos(dec) * np.sin(ra), np.sin(dec)))


@dataclass(frozen=True, eq=False)
class SkyTrack:
    """Sun and Moon samples at times t (seconds from t_ref, UTC)."""

    t_ref: Time
    t: np.ndarray
    sun_unit: np.ndarray  # (3, m) topocentric apparent direction of date
    sun_alt: np.ndarray  # geometric altitude of the centre (deg)
    moon_unit: np.ndarray
    moon_alt: np.ndarray
    moon_illumination: np.ndarray

    def time_at(self, seconds) -> Time:
        """The UTC instant(s) `seconds` after t_ref."""
        return self.t_ref + TimeDelta(np.asarray(seconds, dtype=float), format="sec")

    def interp(self, name: str, t) -> np.ndarray:
        """A scalar track (sun_alt, moon_alt, moon_illumination) at times t (seconds)."""
        return np.interp(t, self.t, getattr(self, name))

    def direction(self, body: str, t) -> np.ndarray:
        """(3, n) unit vectors of 'sun' or 'moon' at times t."""
        track = getattr(self, f"{body}_unit")
        v = np.stack([np.interp(t, self.t, track[k]) for k in range(3)])
        return v / np.sqrt((v * v).sum(axis=0))

    def separation_from(self, body: str, target_unit: np.ndarray, t) -> np.ndarray:
        """Angle (deg) between targets' unit vectors (3, n) and the body at times t (n,)."""
        cos_sep = np.clip((self.direction(body, t) * target_unit).sum(axis=0), -1.0, 1.0)
        return np.arccos(cos_sep) * RAD_TO_DEG


def build_sky_track(site: Site, t_ref: Time, duration_s: float,
                    step_s: float = TRACK_STEP_S) -> SkyTrack:
    """Sample the Sun and the Moon from t_ref over duration_s seconds."""
    from .sunmoon import moon_track

    t = np.arange(0.0, duration_s + step_s, step_s)
    track = moon_track(site, t_ref + TimeDelta(t, format="sec"))
    return SkyTrack(t_ref=t_ref, t=t, sun_unit=_unit(track.sun_ra_deg, track.sun_dec_deg),
                    sun_alt=np.asarray(track.sun_alt_deg, dtype=float),
                    moon_unit=_unit(track.ra_deg, track.dec_deg),
                    moon_alt=np.asarray(track.alt_deg, dtype=float),
                    moon_illumination=np.asarray(track.illumination, dtype=float))
