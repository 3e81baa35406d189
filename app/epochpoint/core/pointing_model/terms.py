"""The geometric terms of a mount's pointing model, each a small physical imperfection.

Each term is a pattern of offsets (arcsec) between where the mount's axes read and where the
star is, as a function of position, scaled by the term's value p (arcsec). Offsets are
"mount reading minus sky": for an equatorial mount dH (hour angle, along the axis, not times
cos dec) and dD (declination); for an alt-az mount dA (azimuth, along the axis) and dE
(elevation). The patterns are the first-order geometric terms of the standard pointing
analysis of equatorial and altitude-azimuth mounts in the literature of telescope pointing:
P. T. Wallace, "A rigorous algorithm for telescope pointing", Proc. SPIE 4848, 125 (2002), and
the pointing-correction chapter of Trueblood & Genet, "Telescope Control" (Willmann-Bell,
2nd ed. 1997) (both from memory). Second-order effects are below p^2 (0.4" for p = 300").

Signs here are our own, stated physically for each term. A small rigid tilt of an axis by p
toward a direction at hour angle H0 (azimuth A0) gives dD = p cos(H - H0), dH = p sin(H - H0)
tan D (alt-az: dE = p cos(A - A0), dA = -p sin(A - A0) tan E; azimuth grows eastward, hour
angle westward), so the tilt terms below are that rotation for H0 = 0 and H0 = -90 deg.
Positions are in radians; `lat` is the site's geodetic latitude.

German equatorial mounts and their pier sides. Following Wallace's description of a mount as
a chain of rotations (the paper above, from memory), the tube points along
u = B Rz(-alpha) T(beta) e: B the polar axis's small tilt from the pole, alpha the polar axis's
turn, T(beta) the declination axis's turn carrying the tube (e, the tube's direction in the
declination axis's frame, leans off square by the optical-axis skew, and the declination axis
itself leans off square to the polar axis). A German mount reaches a place at (H, D) two
ways: (alpha, beta) = (H, D) on one pier side and (H + 180 deg, 180 deg - D) on the other,
the same direction for a perfect mount (T(beta) e = (cos beta, 0, sin beta) then, and
Rz(-180 deg) (cos(180 deg - D), 0, sin(180 deg - D)) = (cos D, 0, sin D)). Its firmware reports the
axes as hour angle and declination, H = alpha and D = beta on the side where its declination
scale runs direct ("east" here, pier_sides.py) and H = alpha - 180 deg, D = 180 deg - beta on
the other ("west"), mirrored through the pole. The terms then split into two kinds, to first
order in p:
- terms fixed to the sky, to the base of the mount or to the hour axis before the declination
  axis keep their pattern in the reported coordinates on both sides: the hour axis's zero
  point (it shifts alpha, and so H, alike), the polar axis's tilts (B rotates the whole
  mechanical frame, whose two parametrisations name the same direction) and the tube's sag
  (gravity bends the tube toward the horizon, wherever the declination axis points);
- terms fixed in the declination axis's frame change sign: the declination scale's zero point
  (D = beta on one side, 180 deg - beta on the other), and the three that move the tube along
  the declination axis, the optical axis's skew, the declination axis's lean off square and its
  droop under the tube's weight. With x toward H = 0 on the equator, y the east point and z
  the pole, the counterweight hangs below the polar axis, so the tube's end of the
  declination axis leans toward +x: it points along -(sin H, cos H, 0) on the east side
  (H < 0) and +(sin H, cos H, 0) on the west, while du/dH = -cos D (sin H, cos H, 0); a move
  along that axis changes the reported hour angle with opposite signs on the two sides.
So a German model has the equatorial terms except the fork's and, per sample, the factor s = +1
on the east side and -1 on the west multiplying the terms marked `flips_with_pier`; the values
are those seen on the east side. The fork-mounted equatorial model has no sides.
"""
from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Callable

import numpy as np


@dataclass(frozen=True)
class Term:
    """One term: its name, what it is physically, and its two offset patterns per unit value
    (first along the first axis: dH or dA; then along the second: dD or dE); on a German
    mount, whether the patterns change sign with the pier side (see the module docstring)."""

    name: str
    meaning: str
    first: Callable  # (a, b, lat) -> offsets along the first axis per arcsec of value
    second: Callable  # (a, b, lat) -> offsets along the second axis per arcsec of value
    flips_with_pier: bool = False


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


def _german(name: str, meaning: str, **changed) -> Term:
    """The equatorial term `name` as a German mount's, described for that mount."""
    return replace(_EQUATORIAL[name], meaning=meaning, **changed)


_EQUATORIAL = {t.name: t for t in EQUATORIAL_TERMS}
# German equatorial mounts: the equatorial terms but the fork's; values as seen on the east
# pier side, the declination axis's terms reversed on the west (module docstring).
GERMAN_TERMS = (
    _EQUATORIAL["hour_axis_index"],
    _german("dec_axis_index",
            "zero point of the declination scale: on the east side every declination reads "
            "high by p, on the west side (the scale mirrored through the pole) low by p",
            flips_with_pier=True),
    _german("optical_axis_skew",
            "the optical axis is not square to the declination axis: it leans along that axis "
            "by p toward the counterweight's end; p sec D in hour angle on the east side, "
            "-p sec D on the west",
            flips_with_pier=True),
    _german("axes_non_square",
            "the declination axis is not square to the polar axis: its tube end is raised "
            "toward the north celestial pole by p; p tan D in hour angle on the east side, "
            "-p tan D on the west",
            flips_with_pier=True),
    _EQUATORIAL["polar_axis_tilt_meridian"],
    _EQUATORIAL["polar_axis_tilt_east"],
    _EQUATORIAL["tube_sag"],
    _german("dec_axis_sag",
            "the declination axis droops under the tube's weight, swinging the tube along the "
            "axis, away from the pier, by p sin(altitude): -p (cos lat cos H + sin lat tan D) "
            "in hour angle on the east side, +p (...) on the west",
            first=lambda h, d, lat: -(np.cos(lat) * np.cos(h) + np.sin(lat) * np.tan(d)),
            flips_with_pier=True),
)

TERMS = {"equatorial": _EQUATORIAL,
         "german": {t.name: t for t in GERMAN_TERMS},
         "altaz": {t.name: t for t in ALTAZ_TERMS}}
# Fitted unless asked otherwise; the flexure terms of the mount's own build are optional.
DEFAULT_TERMS = {
    "equatorial": ("hour_axis_index", "dec_axis_index", "optical_axis_skew", "axes_non_square",
                   "polar_axis_tilt_meridian", "polar_axis_tilt_east", "tube_sag"),
    "altaz": tuple(t.name for t in ALTAZ_TERMS),
}
DEFAULT_TERMS["german"] = DEFAULT_TERMS["equatorial"]
MOUNT_TYPES = tuple(TERMS)
# Mount types whose axes are hour angle and declination (the others: azimuth and altitude).
HOUR_ANGLE_MOUNTS = ("equatorial", "german")


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


def offsets(terms, values_arcsec, a_rad, b_rad, lat_rad,
            side_sign=None) -> tuple[np.ndarray, np.ndarray]:
    """Mount reading minus sky (arcsec) along both axes, summed over the terms; side_sign
    (+1 east, -1 west, per reading; None without sides) multiplies the terms that flip with
    the pier side."""
    first = np.zeros(np.shape(a_rad))
    second = np.zeros(np.shape(a_rad))
    for term, value in zip(terms, values_arcsec):
        scale = value * side_sign if term.flips_with_pier and side_sign is not None else value
        first = first + scale * term.first(a_rad, b_rad, lat_rad)
        second = second + scale * term.second(a_rad, b_rad, lat_rad)
    return first, second
