"""Apparent visual magnitudes of planets, asteroids and comets.

- Planets: the expressions of Mallama & Hilton (2018), "Computing apparent planetary
  magnitudes for The Astronomical Almanac", Astronomy and Computing 25, 10-24, as functions of
  the phase angle alpha (deg) plus 5 log10(r Delta); the small terms in Mars's orbital
  longitude and in Uranus's sub-observer latitude are left out (under ~0.1 mag). Saturn
  includes its rings through the ring-plane latitude of the observer (their eq. for
  alpha <= 6.5 deg; beyond, the globe alone). Coefficients quoted from memory of the paper.
- The Sun: V = -26.74 + 5 log10(Delta) (common practice; V(1 AU) from Allen's Astrophysical
  Quantities). The Moon and Pluto: no standard formula here (NaN).
- Asteroids: the H, G system (Bowell et al. 1989, in Asteroids II, 524-556):
  V = H + 5 log10(r Delta) - 2.5 log10((1 - G) Phi1 + G Phi2),
  Phi_i = exp(-A_i tan(alpha/2)^B_i), A = (3.33, 1.87), B = (0.63, 1.22).
- Comets: total magnitude m = M1 + 5 log10(Delta) + K1 log10(r) (the IAU Minor Planet
  Center's convention for M1, K1).
r and Delta in AU; vectorized over instants.
"""
from __future__ import annotations

import numpy as np

# Saturn's north pole (IAU WGCCRE, Archinal et al. 2018), ICRS right ascension and declination.
SATURN_POLE_RA_DEG, SATURN_POLE_DEC_DEG = 40.589, 83.537


def _poly(alpha, coefficients):
    return sum(c * alpha ** k for k, c in enumerate(coefficients))


def planet_magnitude(body: str, alpha_deg, r_au, delta_au, ring_sin_latitude=None):
    """V magnitude of a planet (Mallama & Hilton 2018; see module docstring)."""
    a = np.asarray(alpha_deg, dtype=float)
    if body == "sun":  # the Sun's apparent V: -26.74 at 1 au (common practice)
        return -26.74 + 5.0 * np.log10(np.asarray(delta_au)) + 0.0 * a
    distance_term = 5.0 * np.log10(np.asarray(r_au) * np.asarray(delta_au))
    if body == "mercury":
        v = _poly(a, (-0.613, 6.3280e-02, -1.6336e-03, 3.3644e-05, -3.4265e-07, 1.6893e-09,
                      -3.0334e-12))
    elif body == "venus":
        v = np.where(a <= 163.7, _poly(a, (-4.384, -1.044e-03, 3.687e-04, -2.814e-06,
                                           8.938e-09)),
                     _poly(a, (236.05828, -2.81914, 8.39034e-03)))
    elif body == "mars":
        v = np.where(a <= 50.0, _poly(a, (-1.601, 2.267e-02, -1.302e-04)),
                     _poly(a, (-0.367, -0.02573, 3.445e-04)))
    elif body == "jupiter":
        x = a / 180.0
        far = -9.428 - 2.5 * np.log10(np.maximum(
            1.0 - 1.507 * x - 0.363 * x ** 2 - 0.062 * x ** 3 + 2.809 * x ** 4
            - 1.876 * x ** 5, 1e-6))
        v = np.where(a <= 12.0, _poly(a, (-9.395, -3.7e-04, 6.16e-04)), far)
    elif body == "saturn":
        globe = _poly(a, (-8.95, -3.7e-04, 6.16e-04))
        if ring_sin_latitude is None:
            v = globe
        else:
            sb = np.abs(ring_sin_latitude)
            rings = -8.914 - 1.825 * sb + 0.026 * a - 0.378 * sb * np.exp(-2.25 * a)
            v = np.where(a <= 6.5, rings, globe)
    elif body == "uranus":
        v = _poly(a, (-7.110, 6.587e-03, 1.045e-04))
    elif body == "neptune":
        v = _poly(a, (-7.00, 7.944e-03, 9.617e-05))
    else:
        return np.full(np.shape(a), np.nan)
    return v + distance_term


def asteroid_magnitude(h, g, alpha_deg, r_au, delta_au):
    """V from absolute magnitude H and slope G (Bowell et al. 1989)."""
    tan_half = np.tan(np.radians(np.asarray(alpha_deg)) / 2.0)
    phi1 = np.exp(-3.33 * tan_half ** 0.63)
    phi2 = np.exp(-1.87 * tan_half ** 1.22)
    g = 0.15 if not np.isfinite(g) else g  # the conventional default slope
    return (h + 5.0 * np.log10(np.asarray(r_au) * np.asarray(delta_au))
            - 2.5 * np.log10((1.0 - g) * phi1 + g * phi2))


def comet_magnitude(m1, k1, r_au, delta_au):
    """Total magnitude m = M1 + 5 log10(Delta) + K1 log10(r) (MPC convention)."""
    return m1 + 5.0 * np.log10(np.asarray(delta_au)) + k1 * np.log10(np.asarray(r_au))
