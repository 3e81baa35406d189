"""The mount-frame stage: from the observed place to the mount's axes, and from the axes to the
coordinates of date a controller takes (and back, for what a mount reports).

    observed place (ha, dec) or (az, alt) --model, pier side--> mount axes --LAST--> RA, Dec

A German equatorial mount reaches a place on one of two pier sides; the side changes the
pointing model's declination-axis terms (terms.py) and the mechanical angles of its axes
(pier_sides.py, the one home of that geometry, whose names are re-exported here for the
slew, the interlocks and the scheduler's slew costs).

A controller that takes coordinates of date (INDI EQUATORIAL_EOD_COORD) turns them into the
hour angle of its axes with its own local apparent sidereal time, HA = LAST - RA (common
practice). So axes at hour angle HA are commanded as RA = LAST - HA, and a reading RA is taken
back as HA = LAST - RA, with LAST = Greenwich apparent sidereal time (IAU 2006/2000A, ERFA
gst06a) plus the east longitude (core.context). Such a controller applies no refraction, so
the offsets between its readings and the observed place also hold the refraction it leaves
out; a model fitted to such readings absorbs it, and the round trip (record, fit, command)
stays consistent because both directions use this same stage.

Alt-az axes and hour angle/declination are joined by the spherical triangle of pole, zenith
and star (ERFA hd2ae and ae2hd, after SOFA; exact, azimuth from north through east).

Cost: per star a handful of array operations and the model's fixed-point inversion.
"""
from __future__ import annotations

from dataclasses import dataclass

import erfa
import numpy as np

from ..constants import DEG_TO_RAD, RAD_TO_DEG
from .model import PointingModel, wrap_ha
from .pier_sides import (EAST, PIER_SIDES, WEST, axis_angles, pier_side_for,  # noqa: F401
                         pole_sign_for, side_codes, side_names, side_of)


@dataclass(frozen=True)
class MountAxes:
    """Where the axes must be (degrees), as hour angle/declination and as azimuth/altitude,
    whatever the mount type (the interlocks judge both). A German mount's also carry the
    pier side ("east"/"west" per place) and the mechanical angles on it (pier_sides.py:
    polar_angle 0 counterweight down, dec_angle 90 at the pole); None for other mounts."""

    ha: np.ndarray
    dec: np.ndarray
    alt: np.ndarray
    az: np.ndarray
    pier_side: np.ndarray | None = None
    polar_angle: np.ndarray | None = None
    dec_angle: np.ndarray | None = None


def altaz_from_hadec(ha_deg, dec_deg, latitude_deg) -> tuple[np.ndarray, np.ndarray]:
    """(alt, az) in degrees of a direction at (ha, dec) (ERFA hd2ae)."""
    az, el = erfa.hd2ae(np.asarray(ha_deg, dtype=float) * DEG_TO_RAD,
                        np.asarray(dec_deg, dtype=float) * DEG_TO_RAD, latitude_deg * DEG_TO_RAD)
    return el * RAD_TO_DEG, (az * RAD_TO_DEG) % 360.0


def hadec_from_altaz(alt_deg, az_deg, latitude_deg) -> tuple[np.ndarray, np.ndarray]:
    """(ha, dec) in degrees of a direction at (alt, az) (ERFA ae2hd)."""
    ha, dec = erfa.ae2hd(np.asarray(az_deg, dtype=float) * DEG_TO_RAD,
                         np.asarray(alt_deg, dtype=float) * DEG_TO_RAD, latitude_deg * DEG_TO_RAD)
    return wrap_ha(ha * RAD_TO_DEG), dec * RAD_TO_DEG


def mount_axes(model: PointingModel | None, ha_deg, dec_deg, alt_deg, az_deg,
               latitude_deg: float, pier_side=None) -> MountAxes:
    """Where the axes must go to see the observed place (ha, dec; alt, az), by the model
    (None: a perfect mount, the axes on the observed place).

    pier_side: "east"/"west" (any case; a scalar or one per place) for a German mount, None
    otherwise. A German model (mount_type "german") corrects on the given side, or without one
    on the side a slew takes (model.py); an equatorial model ignores the side, which is still
    carried with the mechanical angles (a German mount with a fork-style model or none); an
    alt-az model has no side. Degrees in and out; per place a few array operations and the
    model's inversion (two for a German model choosing the side).
    """
    sides = None
    if model is None or model.equatorial:
        if model is None:
            ha_m, dec_m = wrap_ha(ha_deg), np.asarray(dec_deg, dtype=float)
        else:
            ha_m, dec_m, sides = model.mount_from_sky_with_side(ha_deg, dec_deg, pier_side)
        if sides is None and pier_side is not None:
            sides = side_names(pier_side, np.shape(ha_m))
        alt_m, az_m = altaz_from_hadec(ha_m, dec_m, latitude_deg)
    else:  # an alt-az mount has no pier side
        az_m, alt_m = model.mount_from_sky(az_deg, alt_deg)
        ha_m, dec_m = hadec_from_altaz(alt_m, az_m, latitude_deg)
    polar = dec_axis = None
    if sides is not None:
        # The mechanical angles of the axes on that side.
        polar, dec_axis = axis_angles(ha_m, dec_m, side_codes(sides),
                                      pole_sign_for(latitude_deg))
    return MountAxes(ha=np.asarray(ha_m), dec=np.asarray(dec_m), alt=np.asarray(alt_m),
                     az=np.asarray(az_m), pier_side=sides, polar_angle=polar,
                     dec_angle=dec_axis)


def place_of_date(ha_axes_deg, dec_axes_deg, last_deg) -> tuple[np.ndarray, np.ndarray]:
    """(RA, Dec) of date, degrees, that brings a controller's axes to (ha, dec)."""
    return (last_deg - np.asarray(ha_axes_deg, dtype=float)) % 360.0, \
        np.asarray(dec_axes_deg, dtype=float)


def axes_from_place_of_date(ra_deg, dec_deg, last_deg) -> tuple[np.ndarray, np.ndarray]:
    """The axes' (ha, dec), degrees, of a controller reporting (RA, Dec) of date."""
    return wrap_ha(last_deg - np.asarray(ra_deg, dtype=float)), np.asarray(dec_deg, dtype=float)
