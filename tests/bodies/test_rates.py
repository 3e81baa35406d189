"""Rates against central finite differences of our own positions (+-20 s): the rate columns
are computed analytically from velocities, the differences from positions alone."""
import numpy as np
from astropy import units as u
from astropy.time import Time

from epochpoint.core.site import Site

from .body_helpers import body_targets, positions_module

ROWS = {"body": ["moon", "mars", "", "sun"],
        "perihelion_distance": ["", "", "0.6", ""], "eccentricity": ["", "", "0.999", ""],
        "inclination": ["", "", "30", ""], "ascending_node": ["", "", "40", ""],
        "argument_of_perihelion": ["", "", "50", ""],
        "perihelion_time": ["", "", "2460640.5", ""]}
NAMES = ["Moon", "Mars", "comet", "Sun"]
H = 20.0


def _at(t, site):
    return positions_module.positions(body_targets(ROWS, NAMES), site, t)


def _diff(a, b):
    return (a - b + 180.0) % 360.0 - 180.0


def test_geocentric_ra_dec_rates_match_finite_differences():
    t = Time("2024-05-01T03:00:00", scale="utc")
    now, before, after = _at(t, None), _at(t - H * u.s, None), _at(t + H * u.s, None)
    cosd = np.cos(np.radians(now["dec_apparent"]))
    fd_ra = _diff(after["ra_apparent"], before["ra_apparent"]) * 3600 / (2 * H) * cosd
    fd_dec = (after["dec_apparent"] - before["dec_apparent"]) * 3600 / (2 * H)
    assert np.allclose(now["rate_ra"], fd_ra, rtol=2e-3, atol=2e-6)
    assert np.allclose(now["rate_dec"], fd_dec, rtol=2e-3, atol=2e-6)


def test_alt_az_rates_match_finite_differences():
    t = Time("2024-05-01T03:00:00", scale="utc")
    site = Site(latitude=-30.0, longitude=-70.7, height=2200.0, pressure=0.0)
    now, before, after = _at(t, site), _at(t - H * u.s, site), _at(t + H * u.s, site)
    fd_alt = (after["alt"] - before["alt"]) * 3600 / (2 * H)
    fd_az = _diff(after["az"], before["az"]) * 3600 / (2 * H)
    assert np.allclose(now["rate_alt"], fd_alt, rtol=2e-3, atol=1e-4)
    assert np.allclose(now["rate_az"], fd_az, rtol=2e-3, atol=1e-4)
    # Star rows carry NaN in the body columns.
    assert np.isfinite(now["rate_alt"]).all()
