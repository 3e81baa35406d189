"""Apparent geocentric place against PyEphem (the `ephem` package; libastro, an independent
implementation with IAU 1976 precession, IAU 1980 nutation and classical aberration; reference
in tests only).

Star directions: the J2000.0 positions of 21 bright stars from PyEphem's own star catalogue
(ephem.stars, Hipparcos positions carried to 2000.0). PyEphem's docstrings name `_pmra` and
`_pmdec` only as "proper motion" without units or the cos(dec) convention, so both sides use
zero proper motion and zero parallax: the check covers precession, nutation, aberration and
light deflection, not space motion (which test_vs_astropy.py covers).
"""
import ephem
import numpy as np
import pytest

import epochpoint as ep
from star_samples import INSTANTS, separation_mas

pytestmark = pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")

BRIGHT_STARS = ("Sirius", "Canopus", "Arcturus", "Vega", "Capella", "Rigel", "Procyon",
                "Betelgeuse", "Achernar", "Hadar", "Altair", "Acrux", "Aldebaran", "Spica",
                "Antares", "Pollux", "Fomalhaut", "Deneb", "Mimosa", "Regulus", "Polaris")


def _pyephem_apparent(ra_j2000_rad, dec_j2000_rad, when: str):
    """PyEphem's g_ra, g_dec (apparent geocentric, equator and equinox of date), degrees."""
    body = ephem.FixedBody()
    body._ra, body._dec, body._epoch = ra_j2000_rad, dec_j2000_rad, ephem.J2000
    body.compute(ephem.Date(when.rstrip("Z").replace("T", " ").replace("-", "/")))
    return np.degrees(float(body.g_ra)), np.degrees(float(body.g_dec))


@pytest.mark.parametrize("when", INSTANTS)
def test_apparent_place_within_1_arcsec_of_pyephem(when):
    catalogue = [ephem.star(name) for name in BRIGHT_STARS]
    ra_deg = np.array([np.degrees(float(s._ra)) for s in catalogue])
    dec_deg = np.array([np.degrees(float(s._dec)) for s in catalogue])
    targets = ep.Targets.from_columns(ra=ra_deg, dec=dec_deg, epoch=2000.0, name=BRIGHT_STARS)
    ours = ep.positions(targets, None, when)
    theirs = np.array([_pyephem_apparent(s._ra, s._dec, when) for s in catalogue])
    sep_arcsec = separation_mas(ours["ra_apparent"], ours["dec_apparent"], theirs[:, 0],
                                theirs[:, 1]) / 1000.0
    worst = int(np.argmax(sep_arcsec))
    assert sep_arcsec.max() <= 1.0, (
        f"worst {sep_arcsec.max():.3f} arcsec ({BRIGHT_STARS[worst]}) vs PyEphem g_ra/g_dec")
    # The apparent place moved from J2000 by precession (~0.36 deg by 2026): a real check.
    moved = separation_mas(ra_deg, dec_deg, theirs[:, 0], theirs[:, 1]) / 3.6e6
    assert moved.min() > 0.05
