"""Watch a tracking mount and stop it before it leaves the region the site's interlocks allow.

Checked before a slew, a track can still go wrong afterwards: the slew took longer than
estimated, the watch outlives the checked horizon, or the mount tracks somewhere else. So,
while connected, every WATCH_POLL_S seconds the place the mount reports (of date, or J2000
shifted onto the equator of date by the target's own apparent-minus-J2000 offset) is followed
WATCH_LEAD_S seconds ahead with the interlocks' own observed place (core.track.track_refusal);
when a limit lies within that lead the mount stops tracking (TRACK_OFF, checked; an abort when
refused) or is aborted, as chosen, and the reason is said.

Pure Python, no Qt: the command line calls it after `mount slew --wait`, the mount panel in a
thread of its own; `stop` (a threading.Event) ends it from another thread.
"""
from __future__ import annotations

import threading
import time
from typing import Callable

from ..core.context import make_context
from ..core.site import Site
from ..core.targets import Targets
from ..core.track import track_refusal
from .pointing import pointing_for
from .telescope import AT_LIMIT, J2000_COORD, WATCH_LEAD_S, WATCH_POLL_S, Telescope

Notify = Callable[[str], None]


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
    return ra % 360.0, dec, pointing.time, status.tracking


def watch_track(scope: Telescope, targets: Targets, site: Site, name: str, *,
                seconds: float | None = None, at_limit: str = "stop-tracking",
                token: int | None = None, stop: threading.Event | None = None,
                lead_s: float = WATCH_LEAD_S, poll_s: float = WATCH_POLL_S,
                notify: Notify = print) -> str:
    """Watch until `seconds` pass (None: until stopped), an abort is recorded, the mount stops
    tracking, or a limit comes within lead_s (then act, per at_limit). Returns why it ended."""
    if at_limit not in AT_LIMIT:
        raise ValueError(f"at-limit action {at_limit!r} is not one of {', '.join(AT_LIMIT)}")
    token = scope.begin_command() if token is None else token
    stop = stop or threading.Event()
    end = None if seconds is None else time.monotonic() + seconds
    while not stop.is_set():
        if scope.aborted_since(token):
            return "an abort ended the watch"
        found = _mount_apparent(scope, targets, site, name)
        if found is None:
            return "the mount reports no position"
        ra, dec, when, tracking = found
        if tracking is False:
            return "the mount is not tracking"
        at_s, why = track_refusal(ra, dec, site, make_context(when, site), 0.0, lead_s)
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
        stop.wait(poll_s if end is None else max(0.0, min(poll_s, end - time.monotonic())))
    return "the watch was stopped"
