"""The computations the app runs in worker threads: each is a thin call into epochpoint.core.

    night_plan(targets, site, night)                  -> core.plan.Plan
    now_state(targets, site, when="now", selected=None) -> NowState

The pointing interlocks are the ones every motion command uses (core.export.refusals with
the Sun's separation from core.export.sun_separation_deg).
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from epochpoint.core.context import make_context
from epochpoint.core.export import refusals, sun_separation_deg
from epochpoint.core.plan import plan
from epochpoint.core.positions import positions
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.core.timescale import iso_z, parse_time
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


def now_state(targets: Targets, site: Site, when="now", selected: int | None = None) -> NowState:
    """Positions now (one context for all targets), the interlocks' verdicts and the ledger."""
    t = parse_time(when)
    ctx = make_context(t, site)
    pos = positions(targets, site, t, context=ctx)
    sun_sep = sun_separation_deg(site, t, pos["ra_apparent"], pos["dec_apparent"])
    refused = refusals(pos, site, sun_sep)
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
