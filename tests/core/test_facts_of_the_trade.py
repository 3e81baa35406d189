"""Sizes every positional astronomer knows (common practice; values from memory unless a
formula is quoted): aberration, the Earth's orbit, the obliquity, refraction, airmass and
light deflection.
"""
import erfa
import numpy as np
import pytest

import epochpoint as ep
from epochpoint.core.observed import kasten_young_airmass
from epochpoint.core.refraction import refraction_rad
from star_samples import realistic_stars

pytestmark = pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")

AU_KM = 149_597_870.7
C_KM_S = 299_792.458
# Constant of aberration (IAU 1976 system), from memory: 20.49552 arcsec, for the mean orbital
# speed; the Earth's orbital eccentricity, 0.0167, makes the speed, and so the aberration,
# range over about +-1.7 %: ~20.84" at perihelion (early January), ~20.15" at aphelion (July).
ABERRATION_CONSTANT_ARCSEC = 20.49552
ECCENTRICITY = 0.0167
PERIHELION = "2027-01-03T00:00:00Z"
APHELION = "2026-07-04T00:00:00Z"


def _earth_pv(when):
    """Heliocentric and barycentric Earth position/velocity from ERFA epv00 (AU, AU/day)."""
    t = ep.make_context(when).time.tdb
    return erfa.epv00(t.jd1, t.jd2)


def _ring_perpendicular_to(axis, n=72):
    """Right ascension and declination (deg) of n directions at 90 deg from `axis`."""
    axis = axis / np.linalg.norm(axis)
    a = np.cross(axis, [0.0, 0.0, 1.0])
    a /= np.linalg.norm(a)
    b = np.cross(axis, a)
    phi = np.linspace(0.0, 2.0 * np.pi, n, endpoint=False)
    ring = np.outer(np.cos(phi), a) + np.outer(np.sin(phi), b)
    ra, dec = erfa.c2s(ring)
    return np.degrees(ra) % 360.0, np.degrees(dec)


def _now_targets(ra, dec, when, parallax=0.0):
    """Motionless targets whose catalogue epoch is the instant itself."""
    return ep.Targets.from_columns(ra=ra, dec=dec, parallax=parallax,
                                   epoch=ep.make_context(when).epoch_jyear)


# ---- annual aberration ------------------------------------------------------------------------

@pytest.mark.parametrize("when, expected", [
    (PERIHELION, ABERRATION_CONSTANT_ARCSEC * (1.0 + ECCENTRICITY)),
    (APHELION, ABERRATION_CONSTANT_ARCSEC * (1.0 - ECCENTRICITY))])
def test_aberration_maximum_is_the_constant_of_aberration(when, expected):
    # Stars at 90 deg from the Earth's velocity (epv00) are displaced the most: by the constant
    # of aberration scaled for the Earth's speed at that time of year.
    _, (_, velocity_bary) = _earth_pv(when)
    ra, dec = _ring_perpendicular_to(velocity_bary)
    ledger = ep.positions(_now_targets(ra, dec, when), None, when, ledger=True)
    aberration = ledger["ledger_annual_aberration"]
    assert np.abs(aberration - expected).max() < 0.05, (aberration.min(), aberration.max())


@pytest.mark.parametrize("when", [PERIHELION, APHELION])
def test_aberration_never_exceeds_its_maximum(when):
    s = realistic_stars(seed=6, n=400)
    ledger = ep.positions(ep.Targets.from_columns(**s), None, when, ledger=True)
    assert ledger["ledger_annual_aberration"].max() <= (
        ABERRATION_CONSTANT_ARCSEC * (1.0 + ECCENTRICITY) + 0.1)


@pytest.mark.parametrize("when", [PERIHELION, "2026-04-05T00:00:00Z", APHELION])
def test_star_at_the_ecliptic_pole_has_full_aberration_all_year(when):
    # The north ecliptic pole (J2000: RA 18h, Dec +66d33.6'; common practice) is always at
    # ~90 deg from the Earth's velocity, so its aberration ellipse is a circle of ~20.5".
    ledger = ep.positions(_now_targets([270.0], [90.0 - 23.4393], when), None, when,
                          ledger=True)
    assert 20.0 < ledger["ledger_annual_aberration"][0] < 20.9


# ---- the Earth's orbit and the obliquity ------------------------------------------------------

@pytest.mark.parametrize("when, expected_km", [(PERIHELION, 147.1e6), (APHELION, 152.1e6)])
def test_earth_sun_distance_at_perihelion_and_aphelion(when, expected_km):
    # Perihelion ~147.1 million km near 3 January, aphelion ~152.1 million km near 4 July.
    distance_km = ep.make_context(when).sun_distance_au * AU_KM
    assert abs(distance_km - expected_km) < 0.1e6, f"{distance_km / 1e6:.3f} million km"


@pytest.mark.parametrize("when", ["2026-06-15T04:30:00Z", "2027-01-20T23:10:00Z"])
def test_obliquity_from_the_true_of_date_matrix(when):
    ctx = ep.make_context(when)
    celestial_pole = ctx.npb_true_of_date[2]  # true pole of date, in GCRS
    # Mean ecliptic pole of date from ERFA ecm06 (IAU 2006 ecliptic).
    ecliptic_pole = erfa.ecm06(*ctx.tt)[2]
    obliquity_deg = np.degrees(np.arccos(celestial_pole @ ecliptic_pole))
    # Common practice: about 23.44 deg (23d26') in the 2020s.
    assert 22.0 < obliquity_deg < 24.5
    assert abs(obliquity_deg - 23.44) < 0.01
    # IAU 2006 mean obliquity (erfa.obl06) plus the nutation in obliquity (erfa.nut06a).
    true_obliquity = erfa.obl06(*ctx.tt) + erfa.nut06a(*ctx.tt)[1]
    assert abs(np.radians(obliquity_deg) - true_obliquity) * 206264806.2 < 1.0  # mas
    # The true equinox (the x axis of date) lies in the ecliptic.
    assert abs(ctx.npb_true_of_date[0] @ ecliptic_pole) < 1e-8


# ---- refraction and airmass -------------------------------------------------------------------

@pytest.fixture(scope="module")
def standard_air():
    """Refraction constants for 1010 hPa and 10 C, the usual 'standard conditions' of
    the refraction tables (Bennett 1982; Meeus ch. 16)."""
    site = ep.Site(latitude=0.0, longitude=0.0, pressure=1010.0, temperature=10.0,
                   humidity=0.0, wavelength=0.55)
    s = ep.make_context("2026-06-15T04:30:00Z", site).site
    return lambda alt_rad: refraction_rad(np.sin(alt_rad), np.cos(alt_rad), s.refa, s.refb,
                                          s.refraction_join, s.refraction_horizon)


def test_refraction_about_one_arcminute_at_45_deg(standard_air):
    # ~58" at 45 deg altitude (A = 60.4" at 0 C and 1013 hPa scaled to 10 C, 1010 hPa).
    refraction_arcsec = np.degrees(standard_air(np.radians([45.0]))[0]) * 3600.0
    assert abs(refraction_arcsec - 58.0) <= 3.0, refraction_arcsec


def test_refraction_about_34_arcminutes_at_the_horizon(standard_air):
    # A star seen on the horizon (observed altitude 0) is really ~34' below it (Bennett 1982:
    # 34.5'). Find the true altitude h with h + R(h) = 0 by bisection.
    lo, hi = np.radians(-2.0), np.radians(0.0)
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        if mid + standard_air(np.array([mid]))[0] > 0.0:
            hi = mid
        else:
            lo = mid
    refraction_arcmin = np.degrees(standard_air(np.array([lo]))[0]) * 60.0
    assert abs(refraction_arcmin - 34.0) <= 2.0, refraction_arcmin


def test_kasten_young_airmass_table_values():
    # Kasten & Young 1989 (Applied Optics 28, 4735): 1.0 at the zenith, ~2.0 at 30 deg
    # (sec z), ~38 at the horizon (their ray-traced table: 38.09, from memory; their fitted
    # formula, which the engine uses, is within 0.5 % of it), undefined below.
    zenith, thirty, horizon, below = kasten_young_airmass(np.radians([90.0, 30.0, 0.0, -1.0]))
    assert abs(zenith - 1.0) < 0.001
    assert abs(thirty - 2.0) < 0.01
    assert abs(horizon - 38.09) < 0.2
    assert np.isnan(below)


# ---- light deflection by the Sun --------------------------------------------------------------

def _star_at_elongation(when, elongation_rad):
    """A direction at the given angle from the Sun as seen from the Earth (ERFA epv00)."""
    (earth_helio, _), _ = _earth_pv(when)
    sun_dir = -earth_helio / np.linalg.norm(earth_helio)
    side = np.cross(sun_dir, [0.0, 0.0, 1.0])
    side /= np.linalg.norm(side)
    star = np.cos(elongation_rad) * sun_dir + np.sin(elongation_rad) * side
    ra, dec = erfa.c2s(star)
    return np.degrees(ra) % 360.0, np.degrees(dec), np.linalg.norm(earth_helio)


@pytest.mark.parametrize("when", [PERIHELION, APHELION])
def test_light_deflection_at_the_solar_limb_is_1_75_arcsec(when):
    # General relativity: 1.75" for light grazing the Sun (4GM/c^2R; common practice), with
    # R = 696,000 km (nominal solar radius, IAU 2015 B3: 695,700 km).
    distance_au = _star_at_elongation(when, 0.0)[2]
    limb = np.arcsin(696_000.0 / (distance_au * AU_KM))
    ra, dec, _ = _star_at_elongation(when, limb)
    ledger = ep.positions(_now_targets([ra], [dec], when), None, when, ledger=True)
    assert abs(ledger["ledger_light_deflection"][0] - 1.75) < 0.01


@pytest.mark.parametrize("when", [PERIHELION, APHELION])
def test_light_deflection_at_90_deg_from_the_sun_is_4_mas(when):
    # 2GM/(c^2 AU) = 4.07 mas at 90 deg elongation (common practice), scaled by 1 AU over the
    # Earth-Sun distance (+-1.7 % over the year).
    ra, dec, distance_au = _star_at_elongation(when, np.pi / 2.0)
    ledger = ep.positions(_now_targets([ra], [dec], when), None, when, ledger=True)
    deflection_mas = ledger["ledger_light_deflection"][0] * 1000.0
    assert abs(deflection_mas - 4.07 / distance_au) < 0.02, deflection_mas
    assert 3.9 < deflection_mas < 4.2
