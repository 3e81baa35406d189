"""Direction-cosine helpers shared by the engine.

Unit vectors are stored as (3, n) float64 arrays (one row per axis), so each axis is a
contiguous numpy array and a rotation is one matrix product.
"""
from __future__ import annotations

import numpy as np

TWO_PI = 2.0 * np.pi


def unit_vectors(lon_rad: np.ndarray, lat_rad: np.ndarray) -> np.ndarray:
    """(3, n) direction cosines of spherical coordinates (radians)."""
    cos_lat = np.cos(lat_rad)
    return np.stack((cos_lat * np.cos(lon_rad), cos_lat * np.sin(lon_rad), np.sin(lat_rad)))


def to_spherical(p: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Longitude in [0, 2 pi) and latitude of (3, n) vectors (need not be unit length)."""
    lon = np.arctan2(p[1], p[0])
    lon += (lon < 0.0) * TWO_PI
    # sqrt(x^2 + y^2) rather than hypot: 7x faster, and unit vectors cannot overflow.
    lat = np.arctan2(p[2], np.sqrt(p[0] * p[0] + p[1] * p[1]))
    return lon, lat


def normalize(p: np.ndarray) -> np.ndarray:
    """Scale (3, n) vectors to unit length, in place; returns p."""
    p /= np.sqrt(p[0] * p[0] + p[1] * p[1] + p[2] * p[2])
    return p


def dot(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Row-wise scalar product of (3, n) arrays (b may be a plain 3-vector)."""
    return a[0] * b[0] + a[1] * b[1] + a[2] * b[2]


def separation(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Angle between (3, n) vectors in radians, accurate at all angles (atan2 of |a x b|, a.b)."""
    cross = np.cross(a, b, axis=0)
    return np.arctan2(np.sqrt(dot(cross, cross)), dot(a, b))


def chord_separation(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Angle between (3, n) unit vectors in radians from the chord, 2 asin(|a - b| / 2).

    Cheaper than `separation`; full precision except within a few degrees of 180 deg.
    """
    d0, d1, d2 = a[0] - b[0], a[1] - b[1], a[2] - b[2]
    return 2.0 * np.arcsin(np.minimum(0.5 * np.sqrt(d0 * d0 + d1 * d1 + d2 * d2), 1.0))


def tangent_triad(ra_rad: np.ndarray, dec_rad: np.ndarray):
    """Unit vectors (r, p, q) towards the star, increasing ra and increasing dec.

    The normal triad of Hipparcos Vol. 1 sec. 1.2.3 (ESA SP-1200, 1997).
    """
    sin_ra, cos_ra = np.sin(ra_rad), np.cos(ra_rad)
    sin_dec, cos_dec = np.sin(dec_rad), np.cos(dec_rad)
    zeros = np.zeros_like(ra_rad)
    r = np.stack((cos_dec * cos_ra, cos_dec * sin_ra, sin_dec))
    p = np.stack((-sin_ra, cos_ra, zeros))
    q = np.stack((-sin_dec * cos_ra, -sin_dec * sin_ra, cos_dec))
    return r, p, q


def triad_of(u: np.ndarray):
    """The (p, q) tangent directions at unit vectors u (east and north on the sky)."""
    rho = np.hypot(u[0], u[1])
    # At the pole, east is ill-defined: take the ra = 0 meridian's east (+y).
    safe = np.where(rho > 0.0, rho, 1.0)
    p = np.stack((np.where(rho > 0.0, -u[1] / safe, 0.0), np.where(rho > 0.0, u[0] / safe, 1.0),
                  np.zeros_like(rho)))
    q = np.stack((-u[2] * p[1], u[2] * p[0], rho))
    return p, q


def wrap_pm180(angle_deg: np.ndarray) -> np.ndarray:
    """Wrap degrees into (-180, 180]."""
    wrapped = np.mod(angle_deg + 180.0, 360.0) - 180.0
    return np.where(wrapped == -180.0, 180.0, wrapped)
