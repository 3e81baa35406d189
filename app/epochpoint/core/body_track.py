"""Moving sources over one night: the Moon, planets and minor bodies sampled and interpolated
for the window search.

A star holds still through a night: its hour angle grows at the sidereal rate and its
declination stays, which the closed-form windows use. A body moves (the Moon about 0.5 deg an
hour, with up to 1 deg of topocentric parallax that changes with its hour angle), so its
topocentric apparent place (true equator and equinox of date; the chain of
core/bodies/sources.py, as in positions()) is sampled every TRACK_STEP_S seconds over the
night, and hour angle and declination are interpolated linearly between samples. The Moon's
path bends by under 1 arcsec across 10 minutes (its diurnal parallax, about 1 deg over a day,
accelerates it by under 2e-5 arcsec/s^2, and a*h^2/8 < 1"), a fraction of a second of time at
its altitude rates; planets and minor bodies bend far less. Outside the samples the end
segments are extended.

Cost: one astrometry context per sample (about 2 ms) and one light-time solution per body
for all samples at once (vectorized over instants): about 0.3 s for a day at 10 minutes.
"""
from __future__ import annotations

import warnings
from dataclasses import dataclass

import numpy as np

from .constants import RAD_TO_DEG
from .context import make_context
from .timescale import StaleEarthOrientation
from .vectors import to_spherical

TRACK_STEP_S = 600.0


@dataclass(frozen=True, eq=False)
class BodyTrack:
    """Per body row (targets.rows[k]): hour angle (deg, unwrapped) and declination (deg) of
    the topocentric apparent place at the sample times t (seconds on the night's clock)."""

    rows: np.ndarray  # target indices of the bodies
    slot: np.ndarray  # per target: its index in rows, -1 for a fixed star
    names: tuple  # per body: 'moon', 'sun', a planet, or '' for a minor body
    t: np.ndarray
    ha: np.ndarray  # (m, k)
    dec: np.ndarray  # (m, k)

    def moving(self, idx) -> np.ndarray:
        return self.slot[np.asarray(idx)] >= 0

    def at(self, idx, t, star_ha, star_dec) -> tuple[np.ndarray, np.ndarray]:
        """(hour angle, declination) of targets idx at times t (broadcasting), the bodies'
        from the samples and the stars' from star_ha, star_dec (broadcast the same way)."""
        idx, t = np.broadcast_arrays(np.asarray(idx), np.asarray(t, dtype=float))
        ha = np.array(np.broadcast_to(star_ha, idx.shape), dtype=float)
        dec = np.array(np.broadcast_to(star_dec, idx.shape), dtype=float)
        slot = self.slot[idx]
        body = slot >= 0
        if body.any():
            s, tt = slot[body], t[body]
            step = self.t[1] - self.t[0]
            j = np.clip(np.floor((tt - self.t[0]) / step).astype(int), 0, self.t.size - 2)
            w = (tt - self.t[j]) / step
            ha[body] = self.ha[s, j] + w * (self.ha[s, j + 1] - self.ha[s, j])
            dec[body] = self.dec[s, j] + w * (self.dec[s, j + 1] - self.dec[s, j])
        return ha, dec


def _stacked_observer(contexts):
    """One Observer (core/bodies/observer.py) holding every context's site, side by side."""
    from .bodies.observer import Observer, observer_from_context

    parts = [observer_from_context(ctx, topocentric=True) for ctx in contexts]
    join = lambda name: np.concatenate([getattr(p, name) for p in parts], axis=-1)  # noqa
    return Observer(tdb1=join("tdb1"), tdb2=join("tdb2"), p_bary_au=join("p_bary_au"),
                    v_earth_au_d=join("v_earth_au_d"), v_bary_au_d=join("v_bary_au_d"),
                    sun_bary_au=join("sun_bary_au"))


def apparent_of_date(sources, contexts) -> tuple[np.ndarray, np.ndarray, list]:
    """Topocentric apparent right ascension and declination of date (deg, shape (k, n)) of k
    sources at the n contexts' instants and sites (the chain of core/bodies/sources.py, as in
    positions()), and each source's BodyPlace (GCRS axes). One light-time solution per
    source for all instants at once."""
    from .bodies.sources import apparent_place

    observer = _stacked_observer(contexts)
    npb = np.stack([ctx.npb_true_of_date for ctx in contexts])  # (n, 3, 3)
    ra, dec, places = (np.empty((len(sources), len(contexts))),
                       np.empty((len(sources), len(contexts))), [])
    for k, source in enumerate(sources):
        seen = apparent_place(source, observer)
        # Rotated to the true equator of date at each instant.
        p_tod = np.einsum("kij,jk->ik", npb, seen.p_gcrs)
        ra_rad, dec_rad = to_spherical(p_tod)
        ra[k], dec[k] = np.mod(ra_rad * RAD_TO_DEG, 360.0), dec_rad * RAD_TO_DEG
        places.append(seen)
    return ra, dec, places


def build_body_track(targets, site, sky, step_s: float = TRACK_STEP_S) -> BodyTrack | None:
    """The track of every body row of `targets` over the sky track's span (None without
    bodies); sky is a SkyTrack (its clock and time_at)."""
    from .bodies.rows import sources_of
    from .bodies.sources import MajorBody

    rows, sources = sources_of(targets)
    if not len(rows):
        return None
    t = np.arange(float(sky.t[0]) - step_s, float(sky.t[-1]) + 2.0 * step_s, step_s)
    with warnings.catch_warnings():  # the night's one Earth-orientation warning is enough
        warnings.simplefilter("ignore", StaleEarthOrientation)
        contexts = [make_context(sky.time_at(float(ti)), site) for ti in t]
    last_deg = np.array([ctx.site.last_rad for ctx in contexts]) * RAD_TO_DEG
    # Topocentric apparent place of date at each sample, as an unwrapped hour angle.
    ra, dec, _ = apparent_of_date(sources, contexts)
    hour_angle = np.mod(last_deg - ra + 180.0, 360.0) - 180.0
    ha = np.degrees(np.unwrap(np.radians(hour_angle), axis=1))
    slot = np.full(len(targets), -1, dtype=int)
    slot[rows] = np.arange(len(rows))
    names = tuple(s.name if isinstance(s, MajorBody) else "" for s in sources)
    return BodyTrack(rows=np.asarray(rows), slot=slot, names=names, t=t, ha=ha, dec=dec)
