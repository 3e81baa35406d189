"""A star's space motion: carrying the six astrometric parameters from one epoch to another.

Rigorous propagation along a straight line at constant space velocity, including the radial
term and perspective acceleration, as given in The Hipparcos and Tycho Catalogues, ESA SP-1200
(1997), Vol. 1, sec. 1.5.5, eqs. 1.5.5-1.5.10, and used for Gaia (Gaia EDR3 documentation,
sec. 4.1.7; Butkevich & Lindegren 2014, A&A 570, A62). Light-time effects along the path
cancel to first order in v/c and are neglected (below 1 uas a century for real stars).

A parallax of zero or less means the distance is unknown: the star is propagated as if very
far (parallax 0), so neither annual parallax nor perspective acceleration applies and the radial
velocity only rides along; ERFA pmsafe treats such parallaxes alike. So is a star whose
parallax, proper motion and radial velocity add up to a space velocity of half the speed of
light or more (ERFA starpv's VMAX): no propagated star moves faster than light.

Epochs are Julian years (TDB). Units: mas, mas/yr, km/s. One call handles any number of stars.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .constants import AU_KM_PER_S_YEAR, C_M_PER_S, DEG_TO_RAD, MAS_TO_RAD
from .vectors import dot, tangent_triad, to_spherical, triad_of


# The largest space velocity taken as physical: half the speed of light, as ERFA starpv's VMAX.
VMAX_KM_S = 0.5 * C_M_PER_S / 1000.0


def known_parallax(parallax, pm_ra_cosdec, pm_dec, radial_velocity) -> np.ndarray:
    """The parallax (mas) where it gives a physical distance, else 0 (distance unknown): zero
    or negative parallax, or a space velocity of VMAX_KM_S or more at that distance."""
    parallax = np.asarray(parallax, dtype=float)
    # speed^2 = (AU_KM_PER_S_YEAR pm / parallax)^2 + rv^2 < VMAX^2, without dividing.
    with np.errstate(invalid="ignore", over="ignore"):
        pm2 = np.square(pm_ra_cosdec) + np.square(pm_dec)
        room = (VMAX_KM_S * VMAX_KM_S - np.square(radial_velocity)) * np.square(parallax)
        physical = (parallax > 0.0) & (AU_KM_PER_S_YEAR * AU_KM_PER_S_YEAR * pm2 < room)
    return parallax if physical.all() else np.where(physical, parallax, 0.0)


@dataclass(frozen=True)
class Propagated:
    """The astrometric parameters at the new epoch, columnar.

    u: (3, n) barycentric unit vectors (ICRS); u0: the same at the catalogue epoch; parallax
    in mas; proper motions in mas/yr along the local east and north directions at the new
    position; radial velocity in km/s.
    """

    u: np.ndarray
    u0: np.ndarray
    parallax: np.ndarray
    pm_ra_cosdec: np.ndarray
    pm_dec: np.ndarray
    radial_velocity: np.ndarray

    def radec_deg(self) -> tuple[np.ndarray, np.ndarray]:
        """Right ascension and declination (degrees) of the propagated directions."""
        ra, dec = to_spherical(self.u)
        return np.degrees(ra), np.degrees(dec)


def propagate(ra_deg, dec_deg, parallax, pm_ra_cosdec, pm_dec, radial_velocity, dt_years):
    """Propagate astrometric parameters over dt_years (Hipparcos Vol. 1, sec. 1.5.5).

    Per star about 40 array operations; no per-instant cost. A parallax without a physical
    distance behind it is taken as 0 (see `known_parallax`).
    """
    parallax = known_parallax(parallax, pm_ra_cosdec, pm_dec, radial_velocity)
    r0, p0, q0 = tangent_triad(np.asarray(ra_deg) * DEG_TO_RAD, np.asarray(dec_deg) * DEG_TO_RAD)
    t = np.asarray(dt_years, dtype=float)

    # Proper-motion vector in the tangent plane and the radial proper motion (mas/yr).
    pm_vec = p0 * pm_ra_cosdec + q0 * pm_dec
    zeta0 = radial_velocity * parallax / AU_KM_PER_S_YEAR
    # Work in radians per year from here on.
    pm_vec_rad = pm_vec * MAS_TO_RAD
    zeta0_rad = zeta0 * MAS_TO_RAD
    pm2_rad = (pm_vec_rad[0] * pm_vec_rad[0] + pm_vec_rad[1] * pm_vec_rad[1]
               + pm_vec_rad[2] * pm_vec_rad[2])

    # Distance factor f: the star's distance at the new epoch is the old one divided by f.
    one_plus_zt = 1.0 + zeta0_rad * t
    speed2 = pm2_rad + zeta0_rad * zeta0_rad
    f = 1.0 / np.sqrt(2.0 * one_plus_zt - 1.0 + speed2 * t * t)
    f2 = f * f

    # New direction: the straight-line path seen from the barycentre (eq. 1.5.7).
    u = (r0 * one_plus_zt + pm_vec_rad * t) * f
    # Parallax scales with inverse distance (eq. 1.5.8).
    parallax_t = parallax * f
    # Proper-motion vector changes through perspective acceleration (eq. 1.5.9).
    pm_vec_t = (pm_vec * one_plus_zt - r0 * (pm2_rad * t / MAS_TO_RAD)) * (f2 * f)
    # Radial proper motion (eq. 1.5.10), back to radial velocity where the parallax allows.
    zeta_t = (zeta0 + speed2 * t / MAS_TO_RAD) * f2
    with np.errstate(divide="ignore", invalid="ignore"):
        rv_t = np.where(parallax_t > 0.0, zeta_t * AU_KM_PER_S_YEAR / parallax_t,
                        radial_velocity)

    p_t, q_t = triad_of(u)
    return Propagated(u=u, u0=r0, parallax=parallax_t,
                      pm_ra_cosdec=dot(p_t, pm_vec_t), pm_dec=dot(q_t, pm_vec_t),
                      radial_velocity=rv_t)


def _as_parameters(ra_deg, dec_deg, parallax, pm_ra_cosdec, pm_dec, radial_velocity):
    return [np.asarray(x, dtype=float) for x in
            (ra_deg, dec_deg, parallax, pm_ra_cosdec, pm_dec, radial_velocity)]


# Finite-difference steps for the Jacobian, in the parameters' own units (mas, mas/yr, km/s).
_JACOBIAN_STEPS = np.array([1.0, 1.0, 1e-3, 1e-3, 1e-3, 1e-2])


def propagation_jacobian(ra_deg, dec_deg, parallax, pm_ra_cosdec, pm_dec, radial_velocity,
                         dt_years) -> np.ndarray:
    """(n, 6, 6) Jacobian of the propagated (ra*, dec, parallax, pmra*, pmdec, rv).

    Positions are offsets in mas along the local east and north at each epoch, so the result
    feeds linear error propagation C_t = J C_0 J^T exactly as in Hipparcos Vol. 1, sec. 1.5.5
    (eq. 1.5.16ff). The partial derivatives are taken by central differences of `propagate`
    (steps well inside the linear regime; relative precision better than 1e-6).
    """
    params = _as_parameters(ra_deg, dec_deg, parallax, pm_ra_cosdec, pm_dec, radial_velocity)
    n = params[0].shape[0]
    base = propagate(*params, dt_years)
    p_t, q_t = triad_of(base.u)
    ra_rad, dec_rad = np.radians(params[0]), np.radians(params[1])
    _, p0, q0 = tangent_triad(ra_rad, dec_rad)
    jac = np.empty((n, 6, 6))
    for k, step in enumerate(_JACOBIAN_STEPS):
        columns = []
        for sign in (1.0, -1.0):
            shifted = [x.copy() for x in params]
            if k < 2:
                # Shift the position by `step` mas along east (k=0) or north (k=1).
                r0 = np.stack((np.cos(dec_rad) * np.cos(ra_rad), np.cos(dec_rad) * np.sin(ra_rad),
                               np.sin(dec_rad)))
                r_shift = r0 + (p0 if k == 0 else q0) * (sign * step * MAS_TO_RAD)
                ra_s, dec_s = to_spherical(r_shift)
                shifted[0], shifted[1] = np.degrees(ra_s), np.degrees(dec_s)
            else:
                shifted[k] = shifted[k] + sign * step
            res = propagate(*shifted, dt_years)
            delta_u = res.u - base.u
            columns.append(np.stack((
                (p_t * delta_u).sum(axis=0) / MAS_TO_RAD,
                (q_t * delta_u).sum(axis=0) / MAS_TO_RAD,
                res.parallax, res.pm_ra_cosdec, res.pm_dec, res.radial_velocity), axis=-1))
        jac[:, :, k] = (columns[0] - columns[1]) / (2.0 * step)
    return jac


def propagate_covariance(covariance, ra_deg, dec_deg, parallax, pm_ra_cosdec, pm_dec,
                         radial_velocity, dt_years) -> np.ndarray:
    """Covariance (n, 6, 6) at the new epoch by linear propagation, C_t = J C_0 J^T."""
    jac = propagation_jacobian(ra_deg, dec_deg, parallax, pm_ra_cosdec, pm_dec,
                               radial_velocity, dt_years)
    return jac @ covariance @ np.transpose(jac, (0, 2, 1))


def error_ellipse(covariance) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Semi-major and semi-minor axes (same unit as the input, 1 sigma) and position angle.

    From the 2x2 (ra*, dec) block of each covariance; the position angle of the major axis is
    in degrees east of north in [0, 180) (common practice for error ellipses).
    """
    c_aa = covariance[:, 0, 0]
    c_dd = covariance[:, 1, 1]
    c_ad = covariance[:, 0, 1]
    half_trace = 0.5 * (c_aa + c_dd)
    radius = np.hypot(0.5 * (c_dd - c_aa), c_ad)
    major = np.sqrt(np.maximum(half_trace + radius, 0.0))
    minor = np.sqrt(np.maximum(half_trace - radius, 0.0))
    pa = np.degrees(0.5 * np.arctan2(2.0 * c_ad, c_dd - c_aa)) % 180.0
    return major, minor, pa
