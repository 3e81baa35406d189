"""Geocentric apparent place: from barycentric catalogue directions to the sky of date.

The steps and formulae are SOFA's (IAU SOFA Board, "SOFA Tools for Earth Attitude" and
"SOFA Astrometry Tools", routines pmpx, ldsun/ld, ab and atciq), evaluated in numpy for
arrays of stars with the per-instant quantities taken from an AstrometryContext:
1. annual parallax (rigorous, from the Earth's barycentric position);
2. light deflection by the Sun (post-Newtonian, Klioner 2003, AJ 125, 1580);
3. relativistic annual aberration (Lorentz transformation to the observer's frame);
4. rotation by the IAU 2006/2000A bias-precession-nutation matrix.
Per star about 60 array operations; nothing here depends on the star more than once.
"""
from __future__ import annotations

import numpy as np

from .constants import MAS_TO_RAD, SUN_SCHWARZSCHILD_AU
from .context import AstrometryContext
from .vectors import dot, normalize


def apply_parallax(u_bcrs: np.ndarray, parallax_mas: np.ndarray, observer_bary_au: np.ndarray):
    """Direction from the observer: u - parallax * E, renormalised (SOFA pmpx, parallax term)."""
    plx_rad = parallax_mas * MAS_TO_RAD
    p = u_bcrs - plx_rad * observer_bary_au[:, None]
    return normalize(p)


def deflect_by_sun(p: np.ndarray, sun_to_observer_unit: np.ndarray, sun_distance_au: float,
                   sun_to_source_unit: np.ndarray | None = None):
    """Light deflection by the Sun (SOFA ld): for stars at infinity q = p (as SOFA ldsun);
    for a source at a finite distance, `sun_to_source_unit` is q, the Sun-to-source direction.

    The deflection limiter near the Sun's centre follows ldsun: dlim = 1e-6 / max(em^2, 1).
    One observer (e a 3-vector) or one per direction (e (3, n), em (n,)).
    """
    e = np.reshape(sun_to_observer_unit, (3, -1))
    em = sun_distance_au
    dlim = 1e-6 / np.maximum(em * em, 1.0)
    if sun_to_source_unit is None:
        # q = p for a source at infinity; q . (q + e) = 1 + p . e
        q_dot_qpe = np.maximum(1.0 + dot(p, e), dlim)
        w = SUN_SCHWARZSCHILD_AU / em / q_dot_qpe
        # p x (e x p) = e - (p . e) p
        p_dot_e = dot(p, e)
        return p + w * (e - p_dot_e * p)
    q = sun_to_source_unit
    w = SUN_SCHWARZSCHILD_AU / em / np.maximum(1.0 + dot(q, e), dlim)
    # p x (e x q) = e (p . q) - q (p . e)
    return p + w * (e * dot(p, q) - q * dot(p, e))


def aberrate(p: np.ndarray, velocity_c: np.ndarray, sun_distance_au: float,
             lorentz_inverse: float):
    """Relativistic aberration for an observer moving at velocity_c (SOFA ab).

    Includes the first-order gravitational term of the Sun (SOFA ab's w2 term). One observer
    (velocity a 3-vector) or one per direction (velocity (3, n), the scalars (n,)).
    """
    v = np.reshape(velocity_c, (3, -1))
    p_dot_v = dot(p, v)
    w1 = 1.0 + p_dot_v / (1.0 + lorentz_inverse)
    w2 = SUN_SCHWARZSCHILD_AU / sun_distance_au
    aberrated = p * lorentz_inverse + w1 * v + w2 * (v - p_dot_v * p)
    return normalize(aberrated)


def geocentric_direction(u_bcrs, parallax_mas, ctx: AstrometryContext):
    """Proper direction (GCRS) seen from the geocentre: parallax, deflection, aberration.

    Returns the three stages (after parallax, after deflection, after aberration), which the
    correction ledger compares; each is (3, n).
    """
    # Annual parallax: look from the Earth instead of the barycentre.
    p_astrometric = apply_parallax(u_bcrs, parallax_mas, ctx.earth_bary_au)
    # Gravitational light deflection by the Sun.
    p_deflected = deflect_by_sun(p_astrometric, ctx.sun_to_earth_unit, ctx.sun_distance_au)
    # Annual aberration from the Earth's barycentric velocity.
    p_proper = aberrate(p_deflected, ctx.earth_velocity_c, ctx.sun_distance_au,
                        ctx.lorentz_inverse)
    return p_astrometric, p_deflected, p_proper


def rotate(matrix: np.ndarray, p: np.ndarray) -> np.ndarray:
    """Apply a 3x3 frame rotation to (3, n) vectors."""
    return matrix @ p
