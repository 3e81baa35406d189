"""Where to point the mount for one target now, and whether the site allows it.

A controller that takes coordinates of date (INDI EQUATORIAL_EOD_COORD) gets the geocentric
apparent place, true equator and equinox of date (core.positions). A controller that only
takes J2000 coordinates (INDI EQUATORIAL_COORD) gets the geocentric astrometric place: the
propagated ICRS direction with annual parallax applied (SOFA pmpx) and rotated by the IAU 2006
frame bias (ERFA bp06) onto the mean equator and equinox of J2000.0; aberration, deflection,
precession and nutation are then the controller's to apply. The interlocks are the site's
(core.limits), with the Sun seen from the site (core.export.refusals).

Cost: one positions() call for one star plus one Sun place, about 10 ms.
"""
from __future__ import annotations

from dataclasses import dataclass

import erfa
import numpy as np

from ..core.apparent import apply_parallax, rotate
from ..core.constants import DEG_TO_RAD, RAD_TO_DEG
from ..core.export import refusals, sun_separation_deg
from ..core.positions import positions
from ..core.site import Site
from ..core.targets import Targets
from ..core.vectors import to_spherical, unit_vectors


@dataclass(frozen=True)
class Pointing:
    """One target's place for the mount at one instant (degrees; time ISO 8601 UTC)."""

    name: str
    time: str
    ra_apparent_deg: float  # geocentric apparent, true equator and equinox of date
    dec_apparent_deg: float
    ra_j2000_deg: float  # geocentric astrometric, mean equator and equinox of J2000.0
    dec_j2000_deg: float
    alt_deg: float  # observed (refracted) at the site
    az_deg: float
    ha_deg: float
    dec_observed_deg: float
    sun_separation_deg: float
    refusal: str  # why the interlocks forbid it; '' when allowed

    @property
    def allowed(self) -> bool:
        return self.refusal == ""


def find_target(targets: Targets, name: str) -> Targets:
    """The one target called `name` (ValueError naming a few others when absent)."""
    names = targets.names()
    rows = np.flatnonzero(names == name)
    if rows.size == 0:
        sample = ", ".join(str(n) for n in names[:5])
        more = ", ..." if len(names) > 5 else ""
        raise ValueError(f"no target named {name!r} in the list (it has {sample}{more})")
    if rows.size > 1:
        raise ValueError(f"{rows.size} targets are named {name!r}; names must be unique "
                         "to point at one")
    return targets[rows]


def _astrometric_j2000(result, one: Targets) -> tuple[float, float]:
    """Geocentric astrometric place on the mean equator and equinox of J2000.0 (degrees)."""
    ctx = result.context
    u_bcrs = unit_vectors(result["ra_propagated"] * DEG_TO_RAD,
                          result["dec_propagated"] * DEG_TO_RAD)
    # Annual parallax: the direction from the geocentre.
    p_astrometric = apply_parallax(u_bcrs, result["parallax_propagated"], ctx.earth_bary_au)
    # ICRS -> mean J2000.0 (IAU 2006 frame bias, about 23 mas).
    frame_bias, _, _ = erfa.bp06(*ctx.tt)
    ra, dec = to_spherical(rotate(np.asarray(frame_bias), p_astrometric))
    return float(ra[0] * RAD_TO_DEG), float(dec[0] * RAD_TO_DEG)


def pointing_for(targets: Targets, site: Site, name: str, when="now") -> Pointing:
    """The place to send for target `name` at `when`, with the interlocks' verdict."""
    one = find_target(targets, name)
    result = positions(one, site, when)
    ra_j2000, dec_j2000 = _astrometric_j2000(result, one)
    sun_deg = sun_separation_deg(site, result.context.time, result["ra_apparent"],
                                 result["dec_apparent"])
    return Pointing(
        name=str(name), time=result.meta["time"],
        ra_apparent_deg=float(result["ra_apparent"][0]),
        dec_apparent_deg=float(result["dec_apparent"][0]),
        ra_j2000_deg=ra_j2000, dec_j2000_deg=dec_j2000,
        alt_deg=float(result["alt"][0]), az_deg=float(result["az"][0]),
        ha_deg=float(result["ha"][0]), dec_observed_deg=float(result["dec_observed"][0]),
        sun_separation_deg=float(sun_deg[0]), refusal=str(refusals(result, site, sun_deg)[0]))
