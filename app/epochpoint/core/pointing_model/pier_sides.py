"""A German equatorial mount's mechanical geometry: its pier sides and its axis angles.

The geometry (common practice for German equatorial mounts, worked out from the axes; no
published source is needed beyond spherical geometry): the polar axis turns the declination
axis round; the tube is square to the declination axis at one end and the counterweight at
the other. Call the polar-axis angle theta, 0 with the counterweight straight down; there
the tube swings along the six-hour circle (hour angle -90 or +90 deg) and through the pole.
Call the declination-axis angle psi, 90 deg at the pole. For a target at hour angle H (west
positive) and declination dec, with p = +1 when the polar axis points at the north celestial
pole and -1 at the south:

    east side (target east of the meridian, H < 0):   theta = H + 90,  psi = p dec
    west side (target west of the meridian, H >= 0):  theta = H - 90,  psi = 180 - p dec

Both describe the same pointing (turn the polar axis by 180 deg and mirror the declination
axis through the pole). The polar axis never passes counterweight-up (theta = +-180) and the
declination axis passes through the pole, so a slew turns the axes by |delta theta| and
|delta psi|. A flip between two targets at the same place costs 180 deg on the polar axis and
|180 - 2 p dec| on the declination axis: both axes swing through the pier change.

Our sides name where the telescope looks: "east" is the side a German mount takes for a
target east of the meridian (counterweight below, on the east; tube on the west of the pier),
"west" the other. A mount slewed to hour angle H takes the side of H (common practice of mount
firmware, which then tracks past the meridian up to its meridian limit), so the side of a
reading is not always the side of its hour angle: a mount tracking past the meridian reports
its side. A firmware reports hour angle and declination on both sides as on the sky, turning
its declination scale through the pole on one of them; the pointing model (terms.py) uses
these names for which way its terms in the declination axis's frame point.

Cost: a few array operations per pointing.
"""
from __future__ import annotations

import numpy as np

from ..vectors import wrap_pm180

EAST, WEST = 0, 1
PIER_SIDES = ("east", "west")  # names by side code: PIER_SIDES[EAST] == "east"
# Offset of the polar-axis angle from the hour angle on each side (deg).
POLAR_ANGLE_OFFSET_DEG = np.array([90.0, -90.0])


def side_of(ha_deg):
    """The pier side code a slew to hour angle `ha_deg` takes: EAST for H < 0, else WEST
    (H wrapped to (-180, 180])."""
    return np.where(wrap_pm180(ha_deg) < 0.0, EAST, WEST)


def pier_side_for(ha_deg):
    """The pier side a slew to hour angle `ha_deg` (deg, west positive) takes: "east" for a
    target east of the meridian (H in (-180, 0)), else "west"; a str for a scalar hour angle,
    an object array of str otherwise."""
    names = _names(side_of(np.asarray(ha_deg, dtype=float)))
    return str(names[()]) if names.ndim == 0 else names


def _names(codes) -> np.ndarray:
    """An object array of "east"/"west" for EAST/WEST codes (0-d for a scalar)."""
    return np.where(np.asarray(codes) == EAST, PIER_SIDES[EAST], PIER_SIDES[WEST]).astype(object)


def side_codes(pier_side, shape=None) -> np.ndarray:
    """EAST/WEST codes of pier sides given as names ("east"/"west", any case) or codes,
    broadcast to `shape`; ValueError naming the first side that is neither."""
    given = np.asarray(pier_side)
    if shape is not None:
        given = np.broadcast_to(given, shape)
    if given.dtype.kind in "iu":
        codes = given.astype(int)
        bad = (codes != EAST) & (codes != WEST)
    else:
        words = np.char.lower(np.char.strip(given.astype(str)))
        codes = np.where(words == PIER_SIDES[EAST], EAST, WEST)
        bad = (words != PIER_SIDES[EAST]) & (words != PIER_SIDES[WEST])
    if np.any(bad):
        raise ValueError(f"{str(given[bad].flat[0])!r} is not a pier side (east or west)")
    return codes


def side_names(pier_side, shape=None) -> np.ndarray:
    """The pier sides as an object array of "east"/"west" (see side_codes)."""
    return _names(side_codes(pier_side, shape))


def side_signs(pier_side, shape=None) -> np.ndarray:
    """+1.0 on the east side and -1.0 on the west (see side_codes): the factor of the
    pointing-model terms that change sign with the side (terms.py)."""
    return np.where(side_codes(pier_side, shape) == EAST, 1.0, -1.0)


def pole_sign_for(latitude_deg: float) -> float:
    """+1 when the polar axis points at the north celestial pole (latitude >= 0), -1 south."""
    return 1.0 if latitude_deg >= 0.0 else -1.0


def axis_angles(ha_deg, dec_deg, side, pole_sign: float = 1.0):
    """Mechanical (theta, psi) in degrees of a German mount pointing at (ha, dec) on `side`
    (EAST = 0 or WEST = 1, or "east"/"west"). theta in (-180, 180]: the polar axis, 0
    counterweight down; psi: the declination axis, 90 at the pole."""
    side = side_codes(side)
    theta = wrap_pm180(np.asarray(ha_deg, dtype=float) + POLAR_ANGLE_OFFSET_DEG[side])
    psi = np.where(side == EAST, pole_sign * np.asarray(dec_deg, dtype=float),
                   180.0 - pole_sign * np.asarray(dec_deg, dtype=float))
    return theta, psi
