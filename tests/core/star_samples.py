"""Shared pieces of the engine's accuracy tests: realistic random stars and an outside
angular-separation measure.

The stars are drawn, not taken from a catalogue, but stay inside what real stars do (common
practice): tangential velocity up to 300 km/s (fast halo stars), total proper motion up to
11 arcsec/yr (the fastest known star, Barnard's, moves 10.4"/yr), parallax 0.05..800 mas (the
nearest star, Proxima Centauri, has 768 mas), |radial velocity| up to 250 km/s. Values from
memory.
"""
from __future__ import annotations

import erfa
import numpy as np

# Proper motion (mas/yr) of a star 1 pc away moving at 1 km/s: 1 AU/yr in km/s (IAU 2012 AU).
KM_S_PER_AU_YR = 149_597_870.7 / (365.25 * 86400.0)
MAX_TANGENTIAL_KM_S = 300.0
MAX_PROPER_MOTION_MAS_YR = 11_000.0
CATALOGUE_EPOCHS = (1991.25, 2000.0, 2016.0)  # Hipparcos, J2000 lists, Gaia DR3

# Sites used across the accuracy tests (invented, one south and one north of the equator).
SOUTH_SITE = dict(latitude=-30.2446, longitude=-70.7494, height=2200.0)
NORTH_SITE = dict(latitude=52.3801, longitude=4.6406, height=10.0)
# A January instant and a mid-2026 one, both inside the shipped IERS table's predictions.
INSTANTS = ("2027-01-20T23:10:00Z", "2026-06-15T04:30:00Z")


def separation_mas(ra1_deg, dec1_deg, ra2_deg, dec2_deg):
    """Angle between two directions in mas, measured by ERFA seps (not by the engine)."""
    rad = erfa.seps(np.radians(ra1_deg), np.radians(dec1_deg), np.radians(ra2_deg),
                    np.radians(dec2_deg))
    return np.degrees(rad) * 3.6e6


def realistic_stars(seed: int, n: int) -> dict:
    """n random stars (n >= 20) as Targets.from_columns keyword arguments.

    Includes stars within 0.5 deg of both celestial poles, stars at the proper-motion limit and
    stars with large parallax; epochs cycle through CATALOGUE_EPOCHS.
    """
    rng = np.random.default_rng(seed)
    ra = rng.uniform(0.0, 360.0, n)
    dec = np.degrees(np.arcsin(rng.uniform(-1.0, 1.0, n)))
    # Within 0.5 deg of the north and south celestial poles, down to 3.6 arcsec away.
    dec[:8] = [89.6, 89.93, 89.999, 89.75, -89.55, -89.9, -89.999, -89.8]
    parallax = 10.0 ** rng.uniform(np.log10(0.05), np.log10(800.0), n)
    tangential = rng.uniform(0.0, MAX_TANGENTIAL_KM_S, n)
    # Large parallax, fast stars: nearby stars at or near the proper-motion limit.
    parallax[8:14] = [800.0, 768.0, 546.0, 300.0, 120.0, 40.0]
    tangential[8:14] = [52.0, 32.0, 98.0, 170.0, 300.0, 280.0]
    # Stars near the poles that move fast.
    parallax[:4] = [500.0, 150.0, 60.0, 250.0]
    tangential[:4] = [60.0, 200.0, 120.0, 150.0]
    total_pm = np.minimum(tangential * parallax / KM_S_PER_AU_YR, MAX_PROPER_MOTION_MAS_YR)
    position_angle = rng.uniform(0.0, 2.0 * np.pi, n)
    radial_velocity = rng.uniform(-250.0, 250.0, n)
    radial_velocity[8:14] = [-250.0, -22.0, -110.0, 250.0, 180.0, -240.0]
    epoch = np.array(CATALOGUE_EPOCHS)[np.arange(n) % len(CATALOGUE_EPOCHS)]
    return dict(ra=ra, dec=dec, pm_ra_cosdec=total_pm * np.sin(position_angle),
                pm_dec=total_pm * np.cos(position_angle), parallax=parallax,
                radial_velocity=radial_velocity, epoch=epoch)
