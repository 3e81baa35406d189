"""The geometric terms of a mount's pointing model, each a small physical imperfection.

Each term is a pattern of offsets (arcsec) between where the mount's axes read and where the
star is, as a function of position, scaled by the term's value p (arcsec). Offsets are
"mount reading minus sky": for an equatorial mount dH (hour angle, along the axis, not times
cos dec) and dD (declination); for an alt-az mount dA (azimuth, along the axis) and dE
(elevation). The patterns are the first-order geometric terms of the standard pointing
analysis of equatorial and altitude-azimuth mounts in the literature of telescope pointing:
P. T. Wallace, "A rigorous algorithm for telescope pointing", Proc. SPIE 4848, 125 (2002), and
the pointing-correction chapter of Trueblood & Genet, "Telescope Control" (Willmann-Bell,
2nd ed. 1997) (both from memory). Second-order effects are below p^2 (0.4 mas for p = 300").

Signs here are our own, stated physically for each term. A small rigid tilt of an axis by p
toward a direction at hour angle H0 (azimuth A0) gives dD = p cos(H - H0), dH = p sin(H - H0)
tan D (alt-az: dE = p cos(A - A0), dA = -p sin(A - A0) tan E; azimuth grows eastward, hour
angle westward), so the tilt terms below are that rotation for H0 = 0 and H0 = -90 deg.
Positions are in radians; `lat` is the site's geodetic latitude.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import numpy as np


@dataclass(frozen=True)
class Term:
    """One term: its name, what it is physically, and its two offset patterns per unit value
    (first along the first axis: dH or dA; then along the second: dD or dE)."""

    name: str
    meaning: str
    first: Callable  # (a, b, lat) -> offsets along the first axis per arcsec of value
    second: Callable  # (a, b, lat) -> offsets along the second axis per arcsec of value


def _zero(a, b, lat):
    return np.zeros_like(np.asarray(a, dtype=float))


def _one(a, b, lat):
    return np.ones_like(np.asarray(a, dtype=float))


# Equatorial mounts: (a, b) = (hour angle H, declination D).
EQUATORIAL_TERMS = (
    Term("hour_axis_index",
         "zero point of the hour-angle axis reading: every hour angle reads high by p",
         _one, _zero),
    Term("dec_axis_index",
         "zero point of the declination axis reading: every declination reads high by p",
         _zero, _one),
    Term("optical_axis_skew",
         "the optical axis is not square to the declination axis: it leans by p toward "
         "larger hour-angle readings, costing p sec D in hour angle",
         lambda h, d, lat: 1.0 / np.cos(d), _zero),
    Term("axes_non_square",
         "the declination axis is not square to the polar axis, off by p: p tan D in hour "
         "angle",
         lambda h, d, lat: np.tan(d), _zero),
    Term("polar_axis_tilt_meridian",
         "the north end of the polar axis is tipped by p toward the upper meridian (the "
         "equator's point at hour angle 0): above the pole at northern sites",
         lambda h, d, lat: np.sin(h) * np.tan(d), lambda h, d, lat: np.cos(h)),
    Term("polar_axis_tilt_east",
         "the north end of the polar axis is tipped by p toward the east (toward hour angle "
         "-6 h)",
         lambda h, d, lat: np.cos(h) * np.tan(d), lambda h, d, lat: -np.sin(h)),
    Term("tube_sag",
         "the tube droops toward the horizon by p sin(zenith distance), so the axes read "
         "that much toward the zenith of the star",
         lambda h, d, lat: -np.cos(lat) * np.sin(h) / np.cos(d),
         lambda h, d, lat: np.sin(lat) * np.cos(d) - np.cos(lat) * np.cos(h) * np.sin(d)),
    Term("dec_axis_sag",
         "the declination axis bends under the tube's weight, rotating the tube about the "
         "polar axis by p (cos lat cos H + sin lat tan D)",
         lambda h, d, lat: np.cos(lat) * np.cos(h) + np.sin(lat) * np.tan(d), _zero),
    Term("fork_arm_flex",
         "the arms of a fork bend along the declination circle by p cos H",
         _zero, lambda h, d, lat: np.cos(h)),
)

# Alt-az mounts: (a, b) = (azimuth A from north through east, elevation E).
ALTAZ_TERMS = (
    Term("azimuth_axis_index",
         "zero point of the azimuth axis reading: every azimuth reads high by p",
         _one, _zero),
    Term("elevation_axis_index",
         "zero point of the elevation axis reading: every elevation reads high by p",
         _zero, _one),
    Term("optical_axis_skew",
         "the optical axis is not square to the elevation axis: p sec E in azimuth",
         lambda a, e, lat: 1.0 / np.cos(e), _zero),
    Term("axes_non_square",
         "the elevation axis is not square to the azimuth axis: p tan E in azimuth",
         lambda a, e, lat: np.tan(e), _zero),
    Term("azimuth_axis_tilt_north",
         "the top of the azimuth axis is tipped by p toward the north",
         lambda a, e, lat: -np.sin(a) * np.tan(e), lambda a, e, lat: np.cos(a)),
    Term("azimuth_axis_tilt_east",
         "the top of the azimuth axis is tipped by p toward the east",
         lambda a, e, lat: np.cos(a) * np.tan(e), lambda a, e, lat: np.sin(a)),
    Term("tube_sag",
         "the tube droops toward the horizon by p cos E, so the elevation reads that much "
         "high",
         _zero, lambda a, e, lat: np.cos(e)),
)

TERMS = {"equatorial": {t.name: t for t in EQUATORIAL_TERMS},
         "altaz": {t.name: t for t in ALTAZ_TERMS}}
# Fitted unless asked otherwise; the flexure terms of the mount's own build are optional.
DEFAULT_TERMS = {
    "equatorial": ("hour_axis_index", "dec_axis_index", "optical_axis_skew", "axes_non_square",
                   "polar_axis_tilt_meridian", "polar_axis_tilt_east", "tube_sag"),
    "altaz": tuple(t.name for t in ALTAZ_TERMS),
}
MOUNT_TYPES = tuple(TERMS)


def term_set(mount_type: str, names=None) -> tuple[Term, ...]:
    """The terms for a mount type, the default set or the names given (ValueError if unknown)."""
    if mount_type not in TERMS:
        raise ValueError(f"mount type {mount_type!r} is not one of {', '.join(MOUNT_TYPES)}")
    names = DEFAULT_TERMS[mount_type] if names is None else tuple(names)
    unknown = [n for n in names if n not in TERMS[mount_type]]
    if unknown:
        raise ValueError(f"{unknown[0]!r} is not a term of the {mount_type} model (terms: "
                         f"{', '.join(TERMS[mount_type])})")
    return tuple(TERMS[mount_type][n] for n in names)


def offsets(terms, values_arcsec, a_rad, b_rad, lat_rad) -> tuple[np.ndarray, np.ndarray]:
    """Mount reading minus sky (arcsec) along both axes, summed over the terms."""
    first = np.zeros(np.shape(a_rad))
    second = np.zeros(np.shape(a_rad))
    for term, value in zip(terms, values_arcsec):
        first = first + value * term.first(a_rad, b_rad, lat_rad)
        second = second + value * term.second(a_rad, b_rad, lat_rad)
    return first, second
