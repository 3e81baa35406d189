"""Telescope control over INDI (the open Instrument Neutral Distributed Interface protocol).

Pure Python, no Qt: a GUI calls these from a worker thread and may call abort() from another.

    from epochpoint.mount import Telescope, slew_to_target, pointing_for
    with Telescope.open("localhost:7624") as scope:          # finds and CONNECTs the mount
        scope.status()                                       # MountStatus
        scope.push_site(site)                                # our GEOGRAPHIC_COORD and TIME_UTC
        report = slew_to_target(scope, targets, site, "Wick", wait=True, notify=print)
        scope.abort()                                        # always allowed, latches
        watch_track(scope, targets, site, "Wick", seconds=600)  # stop tracking at a limit

Errors (mount.errors): InterlockRefused (nothing sent), ConnectionLost, MountFailed,
IndiTimeout; all are MountError with a one-line message.
"""
from .errors import ConnectionLost, IndiTimeout, InterlockRefused, MountError, MountFailed
from .indi_client import IndiClient, Vector, parse_address
from .pointing import Pointing, find_target, pointing_for
from .telescope import (CAUTION, MountStatus, SlewReport, Telescope, checked_pointing,
                        find_telescope, slew_to_target)
from .track_watch import watch_track

__all__ = ["CAUTION", "ConnectionLost", "IndiClient", "IndiTimeout", "InterlockRefused",
           "MountError", "MountFailed", "MountStatus", "Pointing", "SlewReport", "Telescope",
           "Vector", "checked_pointing", "find_target", "find_telescope", "parse_address",
           "pointing_for", "slew_to_target", "watch_track"]
