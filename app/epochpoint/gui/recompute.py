"""The computations the app runs in worker threads: each is a thin call into epochpoint.core.

    night_plan(targets, site, night)                  -> core.plan.Plan
    now_state(targets, site, when="now", selected=None) -> NowState

The Sun separation for the pointing interlock compares the target's geocentric apparent place
with the Sun's topocentric apparent place (both true equator and equinox of date, from
core.positions and core.sunmoon.moon_track); the difference between geocentric and topocentric
directions of a star is far below the degrees an avoidance radius is given in.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from epochpoint.core.constants import RAD_TO_DEG
from epochpoint.core.context import make_context
from epochpoint.core.plan import plan
from epochpoint.core.positions import positions
from epochpoint.core.site import Site
from epochpoint.core.sunmoon import moon_track
from epochpoint.core.targets import Targets
from epochpoint.core.timescale import iso_z, parse_time
from epochpoint.core.vectors import separation, unit_vectors
from epochpoint.io.planfile import NightSettings


def night_plan(targets: Targets, site: Site, night: NightSettings):
    """The night's plan for the document's targets (core.plan.plan with the night settings)."""
    return plan(targets, site, night.date, **night.plan_options())


@dataclass
class NowState:
    """Every target at one instant, and the correction ledger of the selected one."""

    time: str                   # ISO 8601 UTC with Z
    alt: np.ndarray             # observed altitude, degrees
    drift: np.ndarray           # arcsec from the catalogue position
    refused: np.ndarray         # '' when pointing is allowed, else the interlock's reason
    sun_separation: np.ndarray  # degrees
    ledger_row: dict | None     # LedgerPanel.set_row input for the selected target
    selected: int | None
    earth_orientation_warning: str | None


def sun_separation_deg(pos, site: Site, t) -> np.ndarray:
    """Angle (deg) between each target's apparent place and the Sun's, at instant t."""
    track = moon_track(site, t)
    sun_u = unit_vectors(np.radians(np.atleast_1d(track.sun_ra_deg)),
                         np.radians(np.atleast_1d(track.sun_dec_deg)))
    target_u = unit_vectors(np.radians(pos["ra_apparent"]), np.radians(pos["dec_apparent"]))
    return separation(target_u, sun_u) * RAD_TO_DEG


def now_state(targets: Targets, site: Site, when="now", selected: int | None = None) -> NowState:
    """Positions now (one context for all targets), the interlocks' verdicts and the ledger."""
    t = parse_time(when)
    ctx = make_context(t, site)
    pos = positions(targets, site, t, context=ctx)
    sun_sep = sun_separation_deg(pos, site, t)
    refused = site.interlocks.violations(pos["alt"], pos["az"], pos["ha"], pos["dec_observed"],
                                         sun_sep)
    ledger_row = None
    if selected is not None and 0 <= selected < len(targets):
        one = positions(targets[selected], site, t, ledger=True, context=ctx)
        ledger_row = {key: _scalar(values[0]) for key, values in one.items()}
        ledger_row["time"] = iso_z(t)
        ledger_row["refused"] = str(refused[selected])
        ledger_row["sun_separation"] = float(sun_sep[selected])
    return NowState(time=iso_z(t), alt=pos["alt"], drift=pos["drift"], refused=refused,
                    sun_separation=sun_sep, ledger_row=ledger_row, selected=selected,
                    earth_orientation_warning=ctx.eop_warning)


def _scalar(value):
    if isinstance(value, np.generic):
        return value.item()
    return value
