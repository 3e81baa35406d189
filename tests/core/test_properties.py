"""Invariants of space motion, drift and uncertainty (hypothesis property tests), plus a
Monte-Carlo check of the linear covariance propagation against sampling ERFA pmsafe.

The expected values are physics, not the engine: a star that does not move has not moved;
going forward and back in time returns the star; at the catalogue epoch the error ellipse is
the catalogue error; without correlations or parallax the position variance grows as
sigma0^2 + t^2 sigma_pm^2 (textbook linear error propagation, common practice).
"""
import warnings

import erfa
import numpy as np
import pytest
from astropy.time import Time
from hypothesis import given, settings
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays

import epochpoint as ep
from epochpoint.core.spacemotion import error_ellipse, propagate, propagate_covariance
from star_samples import separation_mas

pytestmark = pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")

MAS_PER_RAD = np.degrees(1.0) * 3.6e6
N = 8  # stars per hypothesis example
SETTINGS = settings(max_examples=60, deadline=None, derandomize=True)


def _column(lo, hi):
    return arrays(np.float64, N, elements=st.floats(lo, hi, allow_nan=False,
                                                    allow_infinity=False, allow_subnormal=False))


ra_cols = arrays(np.float64, N, elements=st.floats(0.0, 360.0, exclude_max=True,
                                                   allow_subnormal=False))
dec_cols = _column(-90.0, 90.0)
# From 0.5 mas: a smaller parallax with 8"/yr would mean a space velocity of half the speed of
# light or more, which propagation treats as distance unknown (ERFA starpv's VMAX).
parallax_cols = _column(0.5, 800.0)
pm_cols = _column(-8000.0, 8000.0)
rv_cols = _column(-250.0, 250.0)


@SETTINGS
@given(ra=ra_cols, dec=dec_cols, parallax=parallax_cols, rv=rv_cols,
       epoch=st.sampled_from([1991.25, 2000.0, 2016.0]))
def test_zero_proper_motion_means_zero_drift(ra, dec, parallax, rv, epoch):
    # Radial motion alone changes the distance, never the direction.
    targets = ep.Targets.from_columns(ra=ra, dec=dec, parallax=parallax, radial_velocity=rv,
                                      epoch=epoch)
    when = "2027-01-20T23:10:00Z"
    result = ep.positions(targets, None, when, ledger=True)
    assert np.all(result["drift"] < 1e-9)
    assert np.all(result["ledger_space_motion"] < 1e-9)
    assert np.all(ep.drift(targets, when, 1.0)["drift"] < 1e-9)
    # The propagated place is the catalogue place (1e-6 mas: rounding only).
    assert separation_mas(ra, dec, result["ra_propagated"], result["dec_propagated"]).max() < 1e-6


@SETTINGS
@given(ra=ra_cols, dec=dec_cols, parallax=parallax_cols, pm_ra=pm_cols, pm_dec=pm_cols,
       rv=rv_cols, dt=st.floats(-200.0, 200.0))
def test_forward_then_back_returns_the_star(ra, dec, parallax, pm_ra, pm_dec, rv, dt):
    there = propagate(ra, dec, parallax, pm_ra, pm_dec, rv, dt)
    ra_t, dec_t = there.radec_deg()
    back = propagate(ra_t, dec_t, there.parallax, there.pm_ra_cosdec, there.pm_dec,
                     there.radial_velocity, -dt)
    ra_b, dec_b = back.radec_deg()
    assert separation_mas(ra, dec, ra_b, dec_b).max() < 1e-3  # 1 micro-arcsecond
    np.testing.assert_allclose(back.parallax, parallax, rtol=1e-9)
    np.testing.assert_allclose(np.hypot(back.pm_ra_cosdec, back.pm_dec), np.hypot(pm_ra, pm_dec),
                               rtol=1e-9, atol=1e-9)
    np.testing.assert_allclose(back.radial_velocity, rv, rtol=1e-9, atol=1e-9)


def _diagonal_covariance(sigmas):
    """(n, 6, 6) diagonal covariances from (n, 6) sigmas."""
    return np.einsum("ni,ij->nij", np.asarray(sigmas) ** 2, np.eye(6))


sigma_cols = _column(0.01, 50.0)


@SETTINGS
@given(ra=ra_cols, dec=_column(-89.0, 89.0), sig_ra=sigma_cols, sig_dec=sigma_cols,
       pm_ra=pm_cols, pm_dec=pm_cols)
def test_error_ellipse_at_the_catalogue_epoch_is_the_catalogue_error(ra, dec, sig_ra, sig_dec,
                                                                      pm_ra, pm_dec):
    sigmas = np.stack((sig_ra, sig_dec, np.full(N, 0.1), np.full(N, 0.2), np.full(N, 0.3),
                       np.full(N, 1.0)), axis=1)
    cov = propagate_covariance(_diagonal_covariance(sigmas), ra, dec, np.full(N, 10.0),
                               pm_ra, pm_dec, np.zeros(N), 0.0)
    major, minor, _ = error_ellipse(cov)
    np.testing.assert_allclose(major, np.maximum(sig_ra, sig_dec), rtol=1e-6)
    np.testing.assert_allclose(minor, np.minimum(sig_ra, sig_dec), rtol=1e-6)


@SETTINGS
@given(ra=ra_cols, dec=_column(-80.0, 80.0), sig_ra=sigma_cols, sig_dec=sigma_cols,
       sig_pm_ra=_column(0.01, 5.0), sig_pm_dec=_column(0.01, 5.0), pm_ra=_column(-100, 100),
       pm_dec=_column(-100, 100), dt=st.floats(-100.0, 100.0))
def test_covariance_grows_as_the_textbook_formula(ra, dec, sig_ra, sig_dec, sig_pm_ra,
                                                  sig_pm_dec, pm_ra, pm_dec, dt):
    # No correlations, zero parallax: sigma^2(t) = sigma0^2 + t^2 sigma_pm^2 along each axis
    # (linear error propagation; common practice). The ellipse axes are those two sigmas.
    # The flat-sky formula ignores the convergence of meridians, a relative effect of order
    # mu t tan(dec) (< 3e-4 here), hence rtol 1e-3.
    sigmas = np.stack((sig_ra, sig_dec, np.zeros(N), sig_pm_ra, sig_pm_dec, np.zeros(N)), axis=1)
    cov = propagate_covariance(_diagonal_covariance(sigmas), ra, dec, np.zeros(N), pm_ra,
                               pm_dec, np.zeros(N), dt)
    major, minor, _ = error_ellipse(cov)
    along_ra = np.sqrt(sig_ra ** 2 + dt ** 2 * sig_pm_ra ** 2)
    along_dec = np.sqrt(sig_dec ** 2 + dt ** 2 * sig_pm_dec ** 2)
    np.testing.assert_allclose(major, np.maximum(along_ra, along_dec), rtol=1e-3)
    np.testing.assert_allclose(minor, np.minimum(along_ra, along_dec), rtol=1e-3)


def test_positions_error_columns_at_the_catalogue_epoch():
    # The same through the public API: targets observed at their own catalogue epoch.
    when = "2026-06-15T04:30:00Z"
    epoch = ep.make_context(when).epoch_jyear
    targets = ep.Targets.from_columns(
        ra=[10.0, 200.0], dec=[-40.0, 70.0], pm_ra_cosdec=[300.0, -50.0], pm_dec=[20.0, 900.0],
        parallax=[5.0, 50.0], epoch=epoch,
        errors={"ra_error": [0.2, 1.5], "dec_error": [0.4, 0.5],
                "pm_ra_cosdec_error": [0.1, 0.1], "pm_dec_error": [0.1, 0.1]})
    result = ep.positions(targets, None, when)
    np.testing.assert_allclose(result["error_major"], [0.4, 1.5], rtol=1e-6)
    np.testing.assert_allclose(result["error_minor"], [0.2, 0.5], rtol=1e-6)
    # Position angle of the major axis east of north: north (0) for the first, east (90).
    np.testing.assert_allclose(result["error_pa"], [0.0, 90.0], atol=1e-3)


def test_drift_crosses_10_arcsec_ten_years_after_the_epoch():
    # 1000 mas/yr and a 10" tolerance: crossing 10 years after the catalogue epoch (zero
    # parallax: straight motion on a great circle, tan(drift) = mu t).
    targets = ep.Targets.from_columns(ra=[123.4], dec=[-45.6], pm_ra_cosdec=[600.0],
                                      pm_dec=[800.0], epoch=2016.0, name=["mover"])
    result = ep.drift(targets, "2026-06-15T04:30:00Z", 10.0)
    crossing = Time(result["crossing"][0].rstrip("Z"), format="isot", scale="utc")
    assert abs(crossing.tdb.jyear - 2026.0) < 1e-3  # 9 hours
    assert bool(result["over_tolerance"][0]) == (result["drift"][0] > 10.0)


def test_drift_far_crossings_raise_no_erfa_warning():
    # 100 mas/yr and a 10" tolerance: the crossing is in 2116.
    targets = ep.Targets.from_columns(ra=[10.0], dec=[20.0], pm_ra_cosdec=[100.0], epoch=2016.0)
    with warnings.catch_warnings():
        warnings.simplefilter("error", erfa.ErfaWarning)
        result = ep.drift(targets, "2026-06-15T04:30:00Z", 10.0)
    assert result["crossing"][0].startswith("2116-")


# ---- Monte Carlo: linear covariance propagation against sampled ERFA pmsafe ------------------

# One nearby, fast star with Hipparcos-like (deliberately large) errors and correlations,
# carried 60 years: perspective acceleration and the parallax-radial velocity coupling matter.
MC_STAR = dict(ra=150.0, dec=35.0, parallax=120.0, pm_ra_cosdec=-1500.0, pm_dec=2200.0,
               radial_velocity=-80.0)
MC_SIGMAS = np.array([2.0, 1.5, 3.0, 2.5, 2.0, 5.0])  # mas, mas, mas, mas/yr, mas/yr, km/s
MC_CORRELATIONS = {(0, 3): 0.4, (1, 4): -0.3, (2, 3): 0.2, (0, 1): 0.1, (2, 5): 0.0}
MC_YEARS = 60.0
MC_SAMPLES = 4000


def _mc_covariance():
    corr = np.eye(6)
    for (i, j), rho in MC_CORRELATIONS.items():
        corr[i, j] = corr[j, i] = rho
    return corr * np.outer(MC_SIGMAS, MC_SIGMAS)


def _tangent_offsets_mas(ra_rad, dec_rad, ra0_rad, dec0_rad):
    """East and north offsets (mas) of directions from a reference direction (gnomonic)."""
    xi, eta = erfa.tpxes(ra_rad, dec_rad, ra0_rad, dec0_rad)
    return xi * MAS_PER_RAD, eta * MAS_PER_RAD


def test_covariance_propagation_matches_monte_carlo_of_pmsafe():
    rng = np.random.default_rng(7)
    cov0 = _mc_covariance()
    draws = rng.multivariate_normal(np.zeros(6), cov0, size=MC_SAMPLES)
    ra0, dec0 = np.radians(MC_STAR["ra"]), np.radians(MC_STAR["dec"])
    # Catalogue errors are offsets on the sky (east = ra*cos dec, north), as in Gaia.
    ra = ra0 + draws[:, 0] / MAS_PER_RAD / np.cos(dec0)
    dec = dec0 + draws[:, 1] / MAS_PER_RAD
    parallax = MC_STAR["parallax"] + draws[:, 2]
    pm_ra = MC_STAR["pm_ra_cosdec"] + draws[:, 3]
    pm_dec = MC_STAR["pm_dec"] + draws[:, 4]
    rv = MC_STAR["radial_velocity"] + draws[:, 5]

    def pmsafe(ra, dec, parallax, pm_ra, pm_dec, rv):
        return erfa.pmsafe(ra, dec, pm_ra / MAS_PER_RAD / np.cos(dec), pm_dec / MAS_PER_RAD,
                           parallax / 1000.0, rv, *erfa.epj2jd(2000.0),
                           *erfa.epj2jd(2000.0 + MC_YEARS))

    ra_n, dec_n, *_ = pmsafe(ra0, dec0, MC_STAR["parallax"], MC_STAR["pm_ra_cosdec"],
                             MC_STAR["pm_dec"], MC_STAR["radial_velocity"])
    ra_s, dec_s, pmr_s, pmd_s, px_s, rv_s = pmsafe(ra, dec, parallax, pm_ra, pm_dec, rv)
    east, north = _tangent_offsets_mas(ra_s, dec_s, ra_n, dec_n)
    sampled = np.stack((east, north, px_s * 1000.0, pmr_s * np.cos(dec_s) * MAS_PER_RAD,
                        pmd_s * MAS_PER_RAD, rv_s))
    cov_sampled = np.cov(sampled)

    cov_linear = propagate_covariance(cov0[None], *[np.array([MC_STAR[k]]) for k in (
        "ra", "dec", "parallax", "pm_ra_cosdec", "pm_dec", "radial_velocity")], MC_YEARS)[0]
    sigma_sampled = np.sqrt(np.diag(cov_sampled))
    sigma_linear = np.sqrt(np.diag(cov_linear))
    np.testing.assert_allclose(sigma_linear, sigma_sampled, rtol=0.05)
    corr_sampled = cov_sampled / np.outer(sigma_sampled, sigma_sampled)
    corr_linear = cov_linear / np.outer(sigma_linear, sigma_linear)
    np.testing.assert_allclose(corr_linear, corr_sampled, atol=0.05)
    # The propagation did something: the position errors grew well past the catalogue's.
    assert sigma_linear[0] > 5.0 * MC_SIGMAS[0]
