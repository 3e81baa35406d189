"""Uncertainties that say what they know: the tolerance crossing's 1-sigma, and error ellipses
of rows whose proper-motion errors are unknown.

Outside reference for the crossing's 1-sigma: linear error propagation for a straight-line
motion, written out here (common practice; Hipparcos Vol. 1, sec. 1.5.5 gives the same first
order terms). A star without parallax or radial velocity moves at a constant rate |mu| along
the unit vector m = mu/|mu|; its offset from the catalogue position after dt years is
x0 + mu dt, so the drift d = m . (x0 + mu dt) to first order, and the crossing epoch's error is

    sigma_t^2 = (m^T C_pos m + 2 dt m^T C_pos,pm m + dt^2 m^T C_pm m) / |mu|^2

with dt the crossing's distance from the catalogue epoch. It depends on the crossing only,
never on the instant the drift table is asked for.
"""
import numpy as np
import pytest
from astropy.time import Time
from hypothesis import example, given, settings
from hypothesis import strategies as st

import epochpoint as ep

pytestmark = pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")

# An invented star: 100 mas/yr, no parallax, Gaia-like errors with a position-motion correlation.
EPOCH = 2016.0
PM_RA, PM_DEC = 80.0, -60.0  # mas/yr
SIGMA = {"ra_error": 0.5, "dec_error": 0.4, "pm_ra_cosdec_error": 0.3, "pm_dec_error": 0.2}
RHO = {"ra_pm_ra_cosdec_corr": 0.6, "dec_pm_dec_corr": 0.5}
TOLERANCE_ARCSEC = 1.0


def _mover():
    errors = {k: [v] for k, v in {**SIGMA, **RHO}.items()}
    return ep.Targets.from_columns(ra=[150.0], dec=[20.0], pm_ra_cosdec=[PM_RA],
                                   pm_dec=[PM_DEC], epoch=EPOCH, errors=errors, name=["mover"])


def _linear_sigma_days() -> float:
    """The formula of the module docstring for the star above (crossing at dt = 1"/|mu|)."""
    mu = np.hypot(PM_RA, PM_DEC)
    m = np.array([PM_RA, PM_DEC]) / mu
    dt = TOLERANCE_ARCSEC * 1000.0 / mu
    s_pos = np.array([SIGMA["ra_error"], SIGMA["dec_error"]])
    s_pm = np.array([SIGMA["pm_ra_cosdec_error"], SIGMA["pm_dec_error"]])
    rho = np.array([RHO["ra_pm_ra_cosdec_corr"], RHO["dec_pm_dec_corr"]])
    c_pos, c_pm, c_cross = np.diag(s_pos ** 2), np.diag(s_pm ** 2), np.diag(rho * s_pos * s_pm)
    var = m @ c_pos @ m + 2.0 * dt * (m @ c_cross @ m) + dt * dt * (m @ c_pm @ m)
    return float(np.sqrt(var) / mu * 365.25)


@settings(max_examples=25, deadline=None, derandomize=True)
@given(asked_jyear=st.floats(1901.0, 2099.0, allow_nan=False))
@example(asked_jyear=EPOCH)  # the catalogue epoch itself, where the drift rate is zero
@example(asked_jyear=1990.0)  # before the catalogue epoch
def test_crossing_sigma_is_the_same_whenever_asked(asked_jyear):
    result = ep.drift(_mover(), Time(asked_jyear, format="jyear", scale="tdb"),
                      TOLERANCE_ARCSEC)
    # The crossing itself: 10 years after the catalogue epoch (1" at 100 mas/yr).
    crossing = Time(result["crossing"][0].rstrip("Z"), format="isot", scale="utc")
    assert crossing.tdb.jyear == pytest.approx(EPOCH + 10.0, abs=1e-3)
    assert result["crossing_sigma_days"][0] == pytest.approx(_linear_sigma_days(), rel=1e-4)


def test_crossing_sigma_reference_depends_on_the_correlations():
    # The correlation term matters here: without it the answer differs by more than 5 %.
    assert _linear_sigma_days() > 5.0
    mu = np.hypot(PM_RA, PM_DEC)
    m = np.array([PM_RA, PM_DEC]) / mu
    no_corr = np.sqrt(m @ np.diag([0.25, 0.16]) @ m + 100.0 * (m @ np.diag([0.09, 0.04]) @ m))
    assert abs(no_corr / mu * 365.25 / _linear_sigma_days() - 1.0) > 0.05


# A catalogue mixing a full Gaia five-parameter row, a two-parameter row (position errors only,
# no motion) and a row whose proper motion is given without errors (invented values).
MIXED_ERRORS = {"ra_error": [0.02, 1.0, 1.0], "dec_error": [0.02, 1.0, 1.0],
                "pm_ra_cosdec_error": [1.5, np.nan, np.nan],
                "pm_dec_error": [1.5, np.nan, np.nan]}


def _mixed():
    return ep.Targets.from_columns(ra=[10.0, 11.0, 12.0], dec=[5.0, 6.0, 7.0],
                                   pm_ra_cosdec=[40.0, 0.0, 300.0], pm_dec=[0.0, 0.0, -400.0],
                                   epoch=2016.0, errors=MIXED_ERRORS,
                                   name=["measured", "two-parameter", "motion-no-errors"])


WHEN = "2027-01-01T00:00:00Z"


def test_unknown_motion_errors_make_the_ellipse_a_lower_bound():
    drift = ep.drift(_mixed(), WHEN, 1.0)
    place = ep.positions(_mixed(), None, WHEN)
    for result in (drift, place):
        # 11 years of 1.5 mas/yr (textbook growth sqrt(s0^2 + t^2 s_pm^2), common practice).
        assert result["error_major"][0] == pytest.approx(np.hypot(0.02, 11.0 * 1.5), rel=1e-2)
        # The two-parameter row shows its 1 mas position error, marked as a lower bound.
        assert result["error_major"][1] == pytest.approx(1.0, rel=1e-6)
        assert result["error_lower_bound"].tolist() == [False, True, True]
        assert result["error_lower_bound"].dtype == bool


def test_ellipse_at_the_catalogue_epoch_is_not_a_lower_bound():
    # At the catalogue epoch the motion errors do not enter: the ellipse is exact.
    targets = _mixed()
    at_epoch = Time(2016.0, format="jyear", scale="tdb")
    assert not ep.drift(targets, at_epoch, 1.0)["error_lower_bound"].any()


def test_crossing_sigma_is_unknown_without_motion_errors():
    result = ep.drift(_mixed(), WHEN, 1.0)
    # Row 3 moves 500 mas/yr: it crossed 1" two years after the epoch, error unknown.
    crossing = Time(result["crossing"][2].rstrip("Z"), format="isot", scale="utc")
    assert crossing.tdb.jyear == pytest.approx(2018.0, abs=1e-3)
    assert np.isnan(result["crossing_sigma_days"][2])
    assert np.isfinite(result["crossing_sigma_days"][0])


def test_crossing_sigma_is_unknown_when_the_row_has_no_errors_at_all():
    # A row with every error cell empty used to get 0 d (unknown errors counted as zero).
    errors = {k: [0.1, np.nan] for k in SIGMA}
    targets = ep.Targets.from_columns(ra=[10.0, 20.0], dec=[0.0, 0.0], pm_ra_cosdec=[500.0, 500.0],
                                      epoch=2016.0, errors=errors)
    sigma = ep.drift(targets, WHEN, 1.0)["crossing_sigma_days"]
    assert np.isfinite(sigma[0]) and sigma[0] > 0.0
    assert np.isnan(sigma[1])
