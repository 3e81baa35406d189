"""What a mount command may be asked: the longest wait and the widest accepted residual.

Checked before any connection is made or anything is sent, so a wait of `inf` or 1e300 s (which
the operating system cannot sleep for) is refused in one line instead of failing mid-slew.
"""
from __future__ import annotations

from ..core.ranges import checked

# An hour: far longer than any slew or connection takes (common practice: minutes at most).
MAX_WAIT_S = 3600.0
# A degree: a residual beyond this is a failed slew, not a pointing to refine.
MAX_RESIDUAL_ARCSEC = 3600.0
# Twelve hours: the longest track checked before a slew (a night's block at most).
MAX_TRACK_S = 43200.0


def checked_wait(seconds, name: str = "timeout") -> float:
    """seconds as a float in (0, MAX_WAIT_S], else ValueError in one line."""
    return checked(seconds, name, 0.0, MAX_WAIT_S, lo_open=True, unit="s")


def checked_residual(arcsec, name: str = "largest accepted residual") -> float:
    """arcsec as a float in (0, MAX_RESIDUAL_ARCSEC], else ValueError in one line."""
    return checked(arcsec, name, 0.0, MAX_RESIDUAL_ARCSEC, lo_open=True, unit="arcsec")


def checked_track_seconds(seconds, name: str = "track to check") -> float:
    """seconds as a float in [0, MAX_TRACK_S], else ValueError in one line."""
    return checked(seconds, name, 0.0, MAX_TRACK_S, unit="s")
