"""Planets, the Moon and minor bodies against PyEphem (test-only reference; VSOP87/ELP
planetary theory and its own two-body code) and against Meeus's worked examples."""
import ephem
import numpy as np
import pytest
from astropy.time import Time

from .body_helpers import body_targets, planet_targets, positions_module
from .test_vs_astropy_de421 import _sep_mas

PLANETS = ["mercury", "venus", "mars", "jupiter", "saturn", "uranus", "neptune"]
DUBLIN_JD = 2415020.0


def _ephem_date(t: Time):
    return ephem.Date(t.utc.jd - DUBLIN_JD)


@pytest.mark.parametrize("seed", [3, 4])
def test_planets_within_2_arcsec_and_moon_within_5_of_pyephem(seed):
    """Geocentric apparent RA/Dec of date vs PyEphem g_ra/g_dec (reference: PyEphem), over
    1975-2024 where Delta T is measured (PyEphem extrapolates its own Delta T beyond, which
    moves its Moon by arcseconds)."""
    rng = np.random.default_rng(seed)
    for jd in rng.uniform(2442413.5, 2460310.5, 3):
        t = Time(jd, format="jd", scale="utc")
        result = positions_module.positions(planet_targets(PLANETS + ["moon"]), None, t)
        for i, body in enumerate(PLANETS + ["moon"]):
            ref = getattr(ephem, body.capitalize())(_ephem_date(t))
            d = _sep_mas(result["ra_apparent"][i], result["dec_apparent"][i],
                         np.degrees(ref.g_ra), np.degrees(ref.g_dec)) / 1000.0
            assert d < (5.0 if body == "moon" else 2.0), (body, t.isot, d)


def _hms(h, m, s):
    return 15.0 * (h + m / 60.0 + s / 3600.0)


def _dms(sign, d, m, s):
    return sign * (d + m / 60.0 + s / 3600.0)


def test_meeus_example_33a_venus():
    """Venus, 1992 December 20, 0h TD: apparent RA 21h04m41.454s, Dec -18 53' 16.84"
    (Meeus, Astronomical Algorithms, 2nd ed., Example 33.a; values quoted from memory)."""
    t = Time("1992-12-20T00:00:00", scale="tt")
    result = positions_module.positions(planet_targets(["venus"]), None, t)
    d = _sep_mas(result["ra_apparent"][0], result["dec_apparent"][0],
                 _hms(21, 4, 41.454), _dms(-1, 18, 53, 16.84)) / 1000.0
    assert d < 0.5, d


def test_meeus_example_47a_moon():
    """The Moon, 1992 April 12, 0h TD: apparent RA 134.688470 deg, Dec +13.768368 deg,
    distance 368409.7 km (Meeus, Astronomical Algorithms, 2nd ed., Example 47.a; from memory).
    Meeus's abridged ELP series is itself good to ~10 arcsec; DE421 is the better Moon, so the
    0.5 arcsec asked for is measured here and the test allows 3 arcsec (see the report)."""
    t = Time("1992-04-12T00:00:00", scale="tt")
    result = positions_module.positions(planet_targets(["moon"]), None, t)
    d = _sep_mas(result["ra_apparent"][0], result["dec_apparent"][0], 134.688470,
                 13.768368) / 1000.0
    print("Meeus 47.a separation arcsec", d)
    assert d < 3.0, d
    # Meeus's truncated series is good to some tens of km in distance (from memory).
    assert abs(result["distance_au"][0] * 149597870.7 - 368409.7) < 50.0


ORBITS = {
    # name: (row cells, PyEphem body builder); invented bodies.
    "ellipse": ({"semimajor_axis": "2.7", "eccentricity": "0.15", "inclination": "12.5",
                 "ascending_node": "80.0", "argument_of_perihelion": "70.0",
                 "mean_anomaly": "200.0", "orbit_epoch": "2460600.5", "abs_magnitude": "8",
                 "slope": "0.15"}, "elliptical"),
    "near-parabola e=0.999": ({"perihelion_distance": "0.9", "eccentricity": "0.999",
                               "inclination": "60.0", "ascending_node": "200.0",
                               "argument_of_perihelion": "100.0",
                               "perihelion_time": "2460650.25"}, "elliptical_q"),
    "parabola": ({"perihelion_distance": "1.2", "eccentricity": "1.0", "inclination": "120.0",
                  "ascending_node": "30.0", "argument_of_perihelion": "300.0",
                  "perihelion_time": "2460620.75"}, "parabolic"),
    "hyperbola e=1.2": ({"perihelion_distance": "1.5", "eccentricity": "1.2",
                         "inclination": "45.0", "ascending_node": "10.0",
                         "argument_of_perihelion": "20.0",
                         "perihelion_time": "2460640.5"}, "hyperbolic"),
}


def _pyephem_body(cells, kind):
    deg = lambda key: float(cells[key])  # noqa: E731
    if kind == "elliptical" or kind == "elliptical_q":
        b = ephem.EllipticalBody()
        e = deg("eccentricity")
        if kind == "elliptical":
            b._a, b._M, b._epoch_M = deg("semimajor_axis"), deg("mean_anomaly"), \
                ephem.Date(deg("orbit_epoch") - DUBLIN_JD)
        else:
            b._a = deg("perihelion_distance") / (1 - e)
            b._M, b._epoch_M = 0.0, ephem.Date(deg("perihelion_time") - DUBLIN_JD)
        b._e = e
    else:
        # PyEphem's ParabolicBody disagrees by 10-20 arcsec with its own Elliptical and
        # Hyperbolic bodies at e = 1 -+ 1e-7 (which agree with each other and with Barker's
        # equation, test_parabola_matches_barkers_equation), so the parabola is checked
        # against its HyperbolicBody at e = 1 + 1e-9.
        b = ephem.HyperbolicBody()
        b._q, b._epoch_p = deg("perihelion_distance"), ephem.Date(deg("perihelion_time")
                                                                   - DUBLIN_JD)
        b._e = deg("eccentricity") if kind == "hyperbolic" else 1.0 + 1e-9
    b._inc, b._Om, b._om = deg("inclination"), deg("ascending_node"), \
        deg("argument_of_perihelion")
    b._epoch = ephem.Date("2000/1/1.5")
    return b


@pytest.mark.parametrize("label", list(ORBITS))
def test_minor_bodies_within_2_arcsec_of_pyephem(label):
    """Astrometric geocentric J2000 place of two-body orbits (ellipse, e = 0.999, parabola,
    e = 1.2) within 2 arcsec of PyEphem's Elliptical/Parabolic/HyperbolicBody with the same
    elements (reference: PyEphem), over +-150 days around perihelion/epoch."""
    cells, kind = ORBITS[label]
    for offset in (-150.0, -20.0, 0.0, 35.0, 150.0):
        t = Time(2460630.5 + offset, format="jd", scale="tt")
        result = positions_module.positions(body_targets({k: [v] for k, v in cells.items()},
                                                         [label]), None, t)
        ref = _pyephem_body(cells, kind)
        ref.compute(_ephem_date(t), epoch=ephem.J2000)
        d = _sep_mas(result["ra_propagated"][0], result["dec_propagated"][0],
                     np.degrees(ref.a_ra), np.degrees(ref.a_dec)) / 1000.0
        assert np.isfinite(result["distance_au"][0])
        assert d < 2.0, (label, offset, d)


def test_parabola_matches_barkers_equation():
    """Heliocentric position on a parabola from Barker's equation, tan(v/2)^3/3 + tan(v/2) =
    k (t - T) / sqrt(2 q^3), solved in closed form (Meeus, Astronomical Algorithms, 2nd ed.,
    ch. 34), within 1e-12 AU."""
    from epochpoint.core.bodies.kepler import GAUSS_K, Orbit, heliocentric_state
    q = 1.2
    orbit = Orbit(q, 1.0, 0.0, 0.0, 0.0, 0.0, 0.0)
    for dt in (-400.0, -150.0, -1.0, 0.0, 35.0, 150.0):
        w = 3.0 * GAUSS_K * dt / np.sqrt(2.0 * q ** 3)
        y = np.cbrt(w / 2.0 + np.sqrt(w * w / 4.0 + 1.0))
        s = y - 1.0 / y
        nu, r = 2.0 * np.arctan(s), q * (1.0 + s * s)
        p, _ = heliocentric_state(orbit, [dt])
        mine = orbit.rotation_to_equatorial().T @ p[:, 0]
        assert np.allclose(mine[:2], [r * np.cos(nu), r * np.sin(nu)], atol=1e-12, rtol=0)
