"""Two-body (Keplerian) motion from osculating elements, for all conic sections.

Universal-variable formulation: Kepler's equation written in the universal anomaly chi with
Stumpff functions C(z), S(z) (Bate, Mueller & White, Fundamentals of Astrodynamics, 1971,
ch. 4; Danby, Fundamentals of Celestial Mechanics, 2nd ed. 1988, sec. 6.9; Curtis, Orbital
Mechanics for Engineering Students, sec. 3.7). Starting from perihelion (radial velocity
zero) it reads  sqrt(mu) dt = e chi^3 S(alpha chi^2) + q chi,  alpha = (1 - e) / q, one
equation for ellipses, parabolas and hyperbolas with no singularity at e = 1. It is solved by
Newton's method safeguarded by bisection (the left side grows monotonically with chi), so
it converges for every eccentricity and time. The Lagrange f and g functions give position
and velocity. mu = k^2 with k the Gaussian gravitational constant (AU, days, solar masses;
the body's own mass neglected, as in the published elements).

Elements are heliocentric, referred to the ecliptic and equinox J2000 (as the IAU Minor
Planet Center publishes them); positions are rotated to equatorial axes with the IAU 2006
obliquity at J2000, 84381.406 arcsec (the ~20 mas frame bias to the ICRS is neglected).
Cost: about 40 array operations per Newton step, 10-30 steps, vectorized over instants.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..constants import ARCSEC_TO_RAD, DEG_TO_RAD

GAUSS_K = 0.01720209895  # Gaussian gravitational constant (IAU 1976), AU^1.5 / day
MU_SUN = GAUSS_K * GAUSS_K  # AU^3 / day^2
OBLIQUITY_J2000_RAD = 84381.406 * ARCSEC_TO_RAD  # IAU 2006 (Hilton et al. 2006)


@dataclass(frozen=True)
class Orbit:
    """Osculating heliocentric elements of one body: perihelion distance (AU), eccentricity,
    angles in degrees (ecliptic and equinox J2000), perihelion time as a TT Julian date."""

    perihelion_distance: float
    eccentricity: float
    inclination: float
    ascending_node: float
    argument_of_perihelion: float
    perihelion_time_jd: float
    epoch_jd: float  # the osculation epoch (TT JD), for the staleness warning

    @classmethod
    def from_mean_anomaly(cls, semimajor_axis, eccentricity, inclination, ascending_node,
                          argument_of_perihelion, mean_anomaly, epoch_jd):
        """Elliptic elements with the mean anomaly (deg) at the epoch (TT JD)."""
        a = float(semimajor_axis)
        n_rad_per_day = GAUSS_K / a ** 1.5
        m_rad = np.remainder(float(mean_anomaly) * DEG_TO_RAD + np.pi, 2 * np.pi) - np.pi
        return cls(a * (1.0 - eccentricity), float(eccentricity), float(inclination),
                   float(ascending_node), float(argument_of_perihelion),
                   float(epoch_jd) - m_rad / n_rad_per_day, float(epoch_jd))

    def rotation_to_equatorial(self) -> np.ndarray:
        """The matrix taking perifocal axes (x to perihelion) to equatorial J2000 axes."""
        return _rx(-OBLIQUITY_J2000_RAD) @ _rz(-self.ascending_node * DEG_TO_RAD) @ \
            _rx(-self.inclination * DEG_TO_RAD) @ _rz(-self.argument_of_perihelion * DEG_TO_RAD)


def _rz(angle):
    c, s = np.cos(angle), np.sin(angle)
    return np.array([[c, s, 0.0], [-s, c, 0.0], [0.0, 0.0, 1.0]])


def _rx(angle):
    c, s = np.cos(angle), np.sin(angle)
    return np.array([[1.0, 0.0, 0.0], [0.0, c, s], [0.0, -s, c]])


def stumpff(z: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Stumpff functions C(z), S(z) (Bate, Mueller & White eqs. 4.2-10/11); series near 0."""
    z = np.asarray(z, dtype=float)
    c, s = np.empty_like(z), np.empty_like(z)
    small = np.abs(z) < 0.1
    zs = z[small]
    # Taylor series: C = sum (-z)^k/(2k+2)!, S = sum (-z)^k/(2k+3)!, to 1e-17.
    term_c, term_s = np.full(zs.shape, 0.5), np.full(zs.shape, 1.0 / 6.0)
    sum_c, sum_s = term_c.copy(), term_s.copy()
    for k in range(1, 9):
        term_c = term_c * (-zs) / ((2 * k + 1) * (2 * k + 2))
        term_s = term_s * (-zs) / ((2 * k + 2) * (2 * k + 3))
        sum_c += term_c
        sum_s += term_s
    c[small], s[small] = sum_c, sum_s
    pos = (~small) & (z > 0)
    sz = np.sqrt(z[pos])
    c[pos] = (1.0 - np.cos(sz)) / z[pos]
    s[pos] = (sz - np.sin(sz)) / sz ** 3
    neg = (~small) & (z < 0)
    sz = np.sqrt(-z[neg])
    c[neg] = (np.cosh(sz) - 1.0) / -z[neg]
    s[neg] = (np.sinh(sz) - sz) / sz ** 3
    return c, s


def _solve_universal(q: float, e: float, dt: np.ndarray) -> np.ndarray:
    """chi >= 0 with e chi^3 S(alpha chi^2) + q chi = sqrt(mu) dt for dt >= 0 (days)."""
    alpha = (1.0 - e) / q
    target = np.sqrt(MU_SUN) * dt

    def f_and_r(chi):
        z = alpha * chi * chi
        c, s = stumpff(z)
        return e * chi ** 3 * s + q * chi - target, e * chi * chi * c + q

    # Bracket: F(0) = -target <= 0; grow the upper end until F >= 0.
    lo = np.zeros_like(dt)
    hi = np.maximum(target / q, 1e-12)
    if alpha > 0:
        hi = np.minimum(hi, 2.0 * np.pi / np.sqrt(alpha))  # one period in chi
    for _ in range(200):
        f_hi, _r = f_and_r(hi)
        short = f_hi < 0
        if not short.any():
            break
        lo = np.where(short, hi, lo)
        hi = np.where(short, hi * 2.0, hi)
    chi = 0.5 * (lo + hi)
    for _ in range(100):
        f, r = f_and_r(chi)
        lo = np.where(f < 0, chi, lo)
        hi = np.where(f > 0, chi, hi)
        step = chi - f / r
        # Newton inside the bracket, else bisect.
        chi_new = np.where((step > lo) & (step < hi), step, 0.5 * (lo + hi))
        done = np.abs(chi_new - chi) <= 1e-15 * np.maximum(1.0, np.abs(chi_new))
        chi = chi_new
        if done.all():
            break
    return chi


def heliocentric_state(orbit: Orbit, tt_jd: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Heliocentric position (AU) and velocity (AU/day), equatorial J2000 axes, (3, n)."""
    q, e = orbit.perihelion_distance, orbit.eccentricity
    dt = np.atleast_1d(np.asarray(tt_jd, dtype=float)) - orbit.perihelion_time_jd
    alpha = (1.0 - e) / q
    if alpha > 0:
        # Ellipse: reduce the time from perihelion to within half a period.
        period = 2.0 * np.pi / (np.sqrt(MU_SUN) * alpha ** 1.5)
        dt = dt - period * np.round(dt / period)
    sign = np.where(dt < 0, -1.0, 1.0)
    chi = sign * _solve_universal(q, e, np.abs(dt))
    z = alpha * chi * chi
    c, s = stumpff(z)
    r = e * chi * chi * c + q
    sqrt_mu = np.sqrt(MU_SUN)
    # Lagrange coefficients from perihelion (r0 = q along x, v0 along y).
    f = 1.0 - chi * chi / q * c
    g = dt - chi ** 3 * s / sqrt_mu
    f_dot = sqrt_mu / (r * q) * (alpha * chi ** 3 * s - chi)
    g_dot = 1.0 - chi * chi / r * c
    v0 = np.sqrt(MU_SUN * (1.0 + e) / q)
    zeros = np.zeros_like(dt)
    p_perifocal = np.stack((f * q, g * v0, zeros))
    v_perifocal = np.stack((f_dot * q, g_dot * v0, zeros))
    rot = orbit.rotation_to_equatorial()
    return rot @ p_perifocal, rot @ v_perifocal
