"""Watch a tracking mount and stop it before it leaves the region the site's interlocks allow.

Checked before a slew, a track can still go wrong afterwards: the slew took longer than
estimated, the watch outlives the checked horizon, or the mount tracks somewhere else. So,
while connected, every WATCH_POLL_S seconds the place the mount reports (of date, or J2000
shifted onto the equator of date by the target's own apparent-minus-J2000 offset) is followed
WATCH_LEAD_S seconds ahead with the interlocks' own observed place (core.track.track_refusal);
when a limit lies within that lead the mount stops tracking (TRACK_OFF, checked; an abort when
refused) or is aborted, as chosen, and the reason is said.

A solar-system body moves: the place judged ahead is the reported one carried along by the
body's own motion (core.track.BodyMotion), and the watch keeps the mount on the body: on a
device with a custom tracking rate it sets the rate again every RATE_REFRESH_S (the Moon's
topocentric rate changes with its hour angle), otherwise it re-slews at the cadence
telescope.reslew_cadence gives (each re-slew aimed half an interval plus a settle time ahead,
and refused like any pointing when the interlocks forbid the place), saying so each time.

Pure Python, no Qt: the command line calls it after `mount slew --wait`, the mount panel in a
thread of its own; `stop` (a threading.Event) ends it from another thread.
"""
from __future__ import annotations

import threading
import time
from typing import Callable

import numpy as np

from ..core.context import make_context
from ..core.pointing_model.pier_sides import pole_sign_for
from ..core.site import Site
from ..core.targets import Targets
from astropy.time import TimeDelta

from ..core.timescale import parse_time
from ..core.track import body_motion, track_refusal
from .pointing import pointing_for
from .telescope import (AT_LIMIT, J2000_COORD, WATCH_LEAD_S, WATCH_POLL_S, Telescope,
                        reslew_cadence, track_rates)

Notify = Callable[[str], None]
# How often a body's custom tracking rate is set again (s): the Moon's topocentric rate
# changes by about 3e-3 arcsec/s a minute, under 0.1 arcsec of drift over the minute.
RATE_REFRESH_S = 60.0


def _mount_apparent(scope: Telescope, targets: Targets, site: Site, name: str):
    """(RA, Dec) of date (deg) where the mount reports it points, the time, and tracking."""
    status = scope.status()
    if status.ra_deg is None or status.dec_deg is None:
        return None
    pointing = pointing_for(targets, site, name)
    ra, dec = status.ra_deg, status.dec_deg
    if status.coordinate_property == J2000_COORD:
        ra += pointing.ra_apparent_deg - pointing.ra_j2000_deg
        dec += pointing.dec_apparent_deg - pointing.dec_j2000_deg
    return ra % 360.0, dec, pointing, status.tracking


class _BodyFollower:
    """Keeps the mount on a moving body while watched (see the module docstring)."""

    def __init__(self, scope: Telescope, targets: Targets, site: Site, name: str,
                 tolerance_arcsec: float, token: int, notify: Notify):
        self.scope, self.targets, self.site, self.name = scope, targets, site, name
        self.token, self.notify = token, notify
        self.by_rate = scope.offers_track_rate()
        drift = None
        if not self.by_rate:
            now = pointing_for(targets, site, name)
            drift = float(np.hypot(now.rate_ra_arcsec_s, now.rate_dec_arcsec_s))
        self.every_s = RATE_REFRESH_S if self.by_rate else reslew_cadence(drift,
                                                                          tolerance_arcsec)
        self.last = time.monotonic()

    def due(self) -> bool:
        return time.monotonic() - self.last >= self.every_s

    def act(self) -> bool:
        """Refresh the rate or re-slew; False when an abort stopped it (nothing sent)."""
        self.last = time.monotonic()
        if self.by_rate:
            now = pointing_for(self.targets, self.site, self.name)
            southern = pole_sign_for(self.site.latitude) < 0.0
            return self.scope.set_track_rate(*track_rates(now, self.scope.pier_west(), southern),
                                             token=self.token)
        ahead = self.site.interlocks.mount.settle + self.every_s / 2.0
        aim = pointing_for(self.targets, self.site, self.name,
                           parse_time("now") + TimeDelta(ahead, format="sec"))
        if not aim.allowed:
            self.notify(f"Not re-slewing {self.name}: {aim.refusal} at {aim.time}.")
            return True
        self.notify(f"Re-slewing to {self.name}'s place at {aim.time} ({ahead:.0f} s ahead; "
                    f"every {self.every_s:.0f} s: the device has no custom tracking rate).")
        return self.scope.command(aim, token=self.token) is not None


def watch_track(scope: Telescope, targets: Targets, site: Site, name: str, *,
                seconds: float | None = None, at_limit: str = "stop-tracking",
                token: int | None = None, stop: threading.Event | None = None,
                lead_s: float = WATCH_LEAD_S, poll_s: float = WATCH_POLL_S,
                notify: Notify = print, tolerance_arcsec: float = 2.0) -> str:
    """Watch until `seconds` pass (None: until stopped), an abort is recorded, the mount stops
    tracking, or a limit comes within lead_s (then act, per at_limit); a body is followed
    (its rate refreshed, or re-slewed within tolerance_arcsec). Returns why it ended."""
    if at_limit not in AT_LIMIT:
        raise ValueError(f"at-limit action {at_limit!r} is not one of {', '.join(AT_LIMIT)}")
    token = scope.begin_command() if token is None else token
    stop = stop or threading.Event()
    end = None if seconds is None else time.monotonic() + seconds
    follower = None
    while not stop.is_set():
        if scope.aborted_since(token):
            return "an abort ended the watch"
        found = _mount_apparent(scope, targets, site, name)
        if found is None:
            return "the mount reports no position"
        ra, dec, pointing, tracking = found
        if tracking is False:
            return "the mount is not tracking"
        ctx = make_context(pointing.time, site)
        motion = (body_motion(pointing.source, site, ctx.time, lead_s)
                  if pointing.is_body else None)
        at_s, why = track_refusal(ra, dec, site, ctx, 0.0, lead_s, motion=motion)
        if at_s is not None:
            told = (f"the mount (tracking {name}) would be {why} in {at_s:.0f} s "
                    f"(checked {lead_s:g} s ahead)")
            if scope.aborted_since(token):  # an abort already stopped it: nothing to add
                return "an abort ended the watch"
            if at_limit == "abort":
                notify(f"Aborting: {told}.")
                scope.abort()
            else:
                notify(f"Stopping tracking: {told}.")
                scope.stop_tracking()
            return f"stopped at the limit: {told}"
        if end is not None and time.monotonic() >= end:
            return "the watch ran its time"
        if pointing.is_body:
            follower = follower or _BodyFollower(scope, targets, site, name, tolerance_arcsec,
                                                 token, notify)
            if follower.due() and not follower.act():
                return "an abort ended the watch"
        stop.wait(poll_s if end is None else max(0.0, min(poll_s, end - time.monotonic())))
    return "the watch was stopped"
