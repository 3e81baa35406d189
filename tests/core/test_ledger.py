"""The correction ledger tells a consistent story: each column is the size of one physical
effect, bounded by that effect's known size, and the columns agree with the places they
explain.

Outside sources: ERFA epv00 for the Earth's barycentric position (the parallax baseline),
ERFA pnm06a for the precession-nutation rotation angle, astropy's apply_space_motion for the
space motion, and common-practice bounds for diurnal aberration (0.32" at the equator).
"""
import erfa
import numpy as np
import pytest
from astropy import units as u
from astropy.coordinates import Distance, SkyCoord
from astropy.time import Time

import epochpoint as ep
from star_samples import INSTANTS, NORTH_SITE, SOUTH_SITE, realistic_stars, separation_mas

pytestmark = pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")

WEATHER = dict(pressure=1000.0, temperature=12.0, humidity=0.4, wavelength=0.55)


@pytest.fixture(scope="module")
def sample():
    return realistic_stars(seed=8, n=300)


@pytest.fixture(scope="module", params=[(when, site) for when in INSTANTS
                                        for site in (SOUTH_SITE, NORTH_SITE)],
                ids=lambda p: f"{p[0][:10]}-lat{p[1]['latitude']:+.0f}")
def ledgers(request, sample):
    """Ledger with weather, and the same instant without refraction (pressure 0)."""
    when, site_kw = request.param
    targets = ep.Targets.from_columns(**sample)
    with_air = ep.positions(targets, ep.Site(**site_kw, **WEATHER), when, ledger=True)
    no_air = ep.positions(targets, ep.Site(**site_kw, pressure=0.0), when, ledger=True)
    return when, site_kw, targets, with_air, no_air


def test_parallax_column_within_the_parallax_baseline(ledgers):
    # Annual parallax displaces a star by parallax x R x sin(theta), R the Earth's distance from
    # the barycentre (ERFA epv00), theta the angle between star and Earth (first order).
    when, _, targets, result, _ = ledgers
    t = Time(when.rstrip("Z"), scale="utc").tdb
    _, (earth_bary_au, _) = erfa.epv00(t.jd1, t.jd2)
    distance_au = np.linalg.norm(earth_bary_au)
    star = erfa.s2c(np.radians(result["ra_propagated"]), np.radians(result["dec_propagated"]))
    sin_theta = np.linalg.norm(np.cross(star, earth_bary_au / distance_au), axis=1)
    expected_arcsec = result["parallax_propagated"] / 1000.0 * distance_au * sin_theta
    np.testing.assert_allclose(result["ledger_parallax"], expected_arcsec, rtol=1e-4, atol=1e-9)
    # Never more than the parallax itself times the largest barycentric distance of the Earth
    # (1.017 AU at aphelion plus 0.01 AU for the Sun's wobble about the barycentre).
    assert np.all(result["ledger_parallax"] <= targets.parallax / 1000.0 * 1.027 * 1.001)


# ep.drift converts far crossing epochs to UTC and ERFA warns "dubious year" (reported in
# test_properties.py::test_drift_far_crossings_raise_no_erfa_warning).
@pytest.mark.filterwarnings("ignore::erfa.ErfaWarning")
def test_space_motion_column_is_the_drift(ledgers):
    when, _, targets, result, _ = ledgers
    np.testing.assert_allclose(result["ledger_space_motion"], result["drift"], atol=1e-6)
    np.testing.assert_allclose(ep.drift(targets, when, 1.0)["drift"], result["drift"],
                               atol=1e-6)


def test_space_motion_column_matches_astropy(ledgers, sample):
    # astropy SkyCoord.apply_space_motion (ERFA pmsafe): separation of the catalogue place and
    # the place at the instant, within 1 mas.
    when, _, _, result, _ = ledgers
    catalogue = SkyCoord(
        ra=sample["ra"] * u.deg, dec=sample["dec"] * u.deg,
        distance=Distance(parallax=sample["parallax"] * u.mas),
        pm_ra_cosdec=sample["pm_ra_cosdec"] * u.mas / u.yr, pm_dec=sample["pm_dec"] * u.mas / u.yr,
        radial_velocity=sample["radial_velocity"] * u.km / u.s,
        obstime=Time(sample["epoch"], format="jyear", scale="tdb"))
    moved = catalogue.apply_space_motion(new_obstime=Time(when.rstrip("Z"), scale="utc"))
    expected_mas = separation_mas(sample["ra"], sample["dec"], moved.ra.deg, moved.dec.deg)
    assert np.abs(result["ledger_space_motion"] * 1000.0 - expected_mas).max() <= 1.0


def _lift_and_ledger(ledgers, lowest_alt_deg):
    """Altitude with air minus without (arcsec) and the refraction column, for stars whose
    airless altitude is above lowest_alt_deg."""
    _, _, _, with_air, no_air = ledgers
    up = no_air["alt"] > lowest_alt_deg
    lifted_arcsec = (with_air["alt"] - no_air["alt"])[up] * 3600.0
    return lifted_arcsec, with_air["ledger_refraction"][up]


def test_refraction_column_is_observed_minus_airless_altitude(ledgers):
    # Refraction moves a star straight up: the ledger value equals the altitude with air minus
    # the altitude without (same instant, same site, pressure 0), within 1 mas above 5 deg.
    _, _, _, with_air, no_air = ledgers
    lifted_arcsec, column = _lift_and_ledger(ledgers, 5.0)
    np.testing.assert_allclose(column, lifted_arcsec, atol=0.001)
    up = no_air["alt"] > -1.0
    np.testing.assert_allclose(with_air["az"][up], no_air["az"][up], atol=1e-6)
    assert np.all(no_air["ledger_refraction"] == 0.0)


def test_refraction_column_equals_the_lift_to_1_mas_at_every_altitude(ledgers):
    lifted_arcsec, column = _lift_and_ledger(ledgers, -1.0)
    np.testing.assert_allclose(column, lifted_arcsec, atol=0.001)


def test_precession_nutation_column_bounded_by_the_rotation_angle(ledgers):
    # A rotation by angle phi moves no direction by more than phi; phi from ERFA pnm06a.
    when, _, _, result, _ = ledgers
    t = Time(when.rstrip("Z"), scale="utc").tt
    rotation = erfa.pnm06a(t.jd1, t.jd2)
    phi_arcsec = np.degrees(np.arccos((np.trace(rotation) - 1.0) / 2.0)) * 3600.0
    column = result["ledger_precession_nutation"]
    assert column.max() <= phi_arcsec * (1 + 1e-9)
    assert column.max() > 0.9 * phi_arcsec  # random stars come near the bound


def test_diurnal_aberration_column_bounded_by_site_speed(ledgers):
    # 0.32" x cos(latitude) at most (the Earth's equatorial rotation speed 0.465 km/s over c;
    # common practice), on the WGS84 ellipsoid: the distance from the axis is N cos(latitude)
    # with N = a / sqrt(1 - e^2 sin^2 latitude), e^2 = 0.00669438 (from memory).
    _, site_kw, _, result, _ = ledgers
    lat = np.radians(site_kw["latitude"])
    bound = 0.3200 * np.cos(lat) / np.sqrt(1.0 - 0.00669438 * np.sin(lat) ** 2)
    column = result["ledger_diurnal_aberration"]
    assert column.max() <= bound * 1.002
    assert column.max() > 0.8 * bound


def test_effects_add_up_to_at_least_the_total_displacement(ledgers):
    # Triangle inequality along the chain catalogue -> propagated -> astrometric -> deflected
    # -> aberrated -> true equator of date: the total displacement of the star (catalogue
    # place to apparent place, measured by ERFA seps) is at most the sum of the steps.
    _, _, targets, result, _ = ledgers
    total_arcsec = separation_mas(targets.ra, targets.dec, result["ra_apparent"],
                                  result["dec_apparent"]) / 1000.0
    steps = sum(result[c] for c in ("ledger_space_motion", "ledger_parallax",
                                    "ledger_light_deflection", "ledger_annual_aberration",
                                    "ledger_precession_nutation"))
    assert np.all(total_arcsec <= steps + 1e-6)
