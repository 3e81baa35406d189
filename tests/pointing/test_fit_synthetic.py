"""The pointing-model fit on synthetic mounts with known imperfections.

The synthetic mounts are written out here independently of the code under test, from the
first-order geometric terms of the published pointing analysis of equatorial and alt-az mounts
(P. T. Wallace, Proc. SPIE 4848, 125 (2002); Trueblood & Genet, Telescope Control, 1997;
from memory), in our own sign convention: offsets are "mount reading minus sky". The polar-axis
tilt's signs are checked against an exact rotation of the axis, and the inverse (sky -> mount)
against the forward relation. Seeds are fixed so failures replay.
"""
import warnings

import numpy as np
import pytest

from epochpoint.core.pointing_model import PoorCoverage, PointingModel, fit_pointing_model

LAT = 37.5
NOISE = 2.0  # arcsec per axis on the sky
TRUE_EQ = {"hour_axis_index": -95.0, "dec_axis_index": 40.0, "optical_axis_skew": 60.0,
           "axes_non_square": -25.0, "polar_axis_tilt_meridian": 120.0,
           "polar_axis_tilt_east": -80.0, "tube_sag": 30.0}
TRUE_AZ = {"azimuth_axis_index": 70.0, "elevation_axis_index": -45.0, "optical_axis_skew": 35.0,
           "axes_non_square": -20.0, "azimuth_axis_tilt_north": 50.0,
           "azimuth_axis_tilt_east": -30.0, "tube_sag": 25.0}


def equatorial_offsets(p, h, d, lat):
    """dH, dD (arcsec) at hour angle h, dec d, latitude lat (radians)."""
    dh = (p["hour_axis_index"] + p["optical_axis_skew"] / np.cos(d)
          + p["axes_non_square"] * np.tan(d)
          + p["polar_axis_tilt_meridian"] * np.sin(h) * np.tan(d)
          + p["polar_axis_tilt_east"] * np.cos(h) * np.tan(d)
          - p["tube_sag"] * np.cos(lat) * np.sin(h) / np.cos(d))
    dd = (p["dec_axis_index"] + p["polar_axis_tilt_meridian"] * np.cos(h)
          - p["polar_axis_tilt_east"] * np.sin(h)
          + p["tube_sag"] * (np.sin(lat) * np.cos(d) - np.cos(lat) * np.cos(h) * np.sin(d)))
    return dh, dd


def altaz_offsets(p, a, e):
    da = (p["azimuth_axis_index"] + p["optical_axis_skew"] / np.cos(e)
          + p["axes_non_square"] * np.tan(e)
          - p["azimuth_axis_tilt_north"] * np.sin(a) * np.tan(e)
          + p["azimuth_axis_tilt_east"] * np.cos(a) * np.tan(e))
    de = (p["elevation_axis_index"] + p["azimuth_axis_tilt_north"] * np.cos(a)
          + p["azimuth_axis_tilt_east"] * np.sin(a) + p["tube_sag"] * np.cos(e))
    return da, de


def _above_horizon(h, d, lat_deg, min_alt=15.0):
    lat = np.radians(lat_deg)
    sin_alt = np.sin(lat) * np.sin(d) + np.cos(lat) * np.cos(d) * np.cos(h)
    return np.degrees(np.arcsin(sin_alt)) > min_alt


def equatorial_samples(rng, n, h_range=(-90, 90), d_range=(-35, 80)):
    """Mount readings spread over the sky above 15 deg, and the sky places they see."""
    h, d = np.empty(0), np.empty(0)
    while h.size < n:
        hh = np.radians(rng.uniform(*h_range, 4 * n))
        dd = np.arcsin(rng.uniform(*np.sin(np.radians(d_range)), 4 * n))
        ok = _above_horizon(hh, dd, LAT)
        h, d = np.concatenate([h, hh[ok]]), np.concatenate([d, dd[ok]])
    h, d = h[:n], d[:n]
    dh, dd = equatorial_offsets(TRUE_EQ, h, d, np.radians(LAT))
    # Sky = mount - offsets, plus centring noise on the sky (hour angle scaled by sec dec).
    sky_h = np.degrees(h) - (dh + rng.normal(0, NOISE, n) / np.cos(d)) / 3600
    sky_d = np.degrees(d) - (dd + rng.normal(0, NOISE, n)) / 3600
    return sky_h, sky_d, np.degrees(h), np.degrees(d)


def test_equatorial_terms_recovered_within_three_errors():
    rng = np.random.default_rng(20240611)
    sky_h, sky_d, mh, md = equatorial_samples(rng, 80)
    fit = fit_pointing_model(sky_h, sky_d, mh, md, mount_type="equatorial", latitude_deg=LAT)
    model = fit.model
    assert set(model.values) == set(TRUE_EQ)
    for name, truth in TRUE_EQ.items():
        value, error = model.values[name], model.errors[name]
        assert 0 < error < 10, (name, error)
        assert abs(value - truth) < 3 * error, (name, value, truth, error)
    # Residual scatter: NOISE per axis, so the 2-D rms is NOISE * sqrt(2).
    assert model.rms_after_arcsec == pytest.approx(NOISE * np.sqrt(2), rel=0.2)
    assert model.rms_before_arcsec > 50


def test_held_out_stars_predicted_within_noise():
    rng = np.random.default_rng(7)
    sky_h, sky_d, mh, md = equatorial_samples(rng, 60)
    model = fit_pointing_model(sky_h, sky_d, mh, md, mount_type="equatorial",
                               latitude_deg=LAT).model
    # Held-out stars, noise-free: where must the axes go for each sky place?
    h = np.radians(rng.uniform(-80, 80, 200))
    d = np.arcsin(rng.uniform(np.sin(np.radians(-30)), np.sin(np.radians(75)), 200))
    ok = _above_horizon(h, d, LAT)
    h, d = h[ok], d[ok]
    dh, dd = equatorial_offsets(TRUE_EQ, h, d, np.radians(LAT))
    sky_h, sky_d = np.degrees(h) - dh / 3600, np.degrees(d) - dd / 3600
    got_h, got_d = model.mount_from_sky(sky_h, sky_d)
    miss = np.hypot((got_h - np.degrees(h)) * np.cos(d), got_d - np.degrees(d)) * 3600
    assert np.sqrt(np.mean(miss ** 2)) < 1.5 * NOISE


def test_outliers_are_rejected_and_named():
    rng = np.random.default_rng(99)
    sky_h, sky_d, mh, md = equatorial_samples(rng, 50)
    sky_d[[3, 17]] += 0.05  # two stars centred 3 arcmin off
    names = [f"star {i}" for i in range(50)]
    fit = fit_pointing_model(sky_h, sky_d, mh, md, mount_type="equatorial", latitude_deg=LAT,
                             names=names)
    assert {"star 3", "star 17"} <= set(fit.model.rejected)
    assert len(fit.model.rejected) <= 4
    for name, truth in TRUE_EQ.items():
        assert abs(fit.model.values[name] - truth) < 3 * fit.model.errors[name]


def test_one_patch_of_sky_warns_and_leaves_terms_out():
    rng = np.random.default_rng(3)
    sky_h, sky_d, mh, md = equatorial_samples(rng, 30, h_range=(20, 30), d_range=(10, 20))
    with pytest.warns(PoorCoverage) as caught:
        fit = fit_pointing_model(sky_h, sky_d, mh, md, mount_type="equatorial",
                                 latitude_deg=LAT)
    text = " ".join(str(w.message) for w in caught)
    assert "patch" in text and "left out" in text
    # What is kept is honest: finite, and its errors are not tiny beside its values.
    assert 0 < len(fit.model.values) < len(TRUE_EQ)
    assert all(np.isfinite(v) for v in fit.model.values.values())
    # It still reproduces the patch it was fitted on.
    assert fit.model.rms_after_arcsec < 2 * NOISE * np.sqrt(2)


def test_altaz_terms_recovered():
    rng = np.random.default_rng(11)
    n = 80
    a = np.radians(rng.uniform(0, 360, n))
    e = np.arcsin(rng.uniform(np.sin(np.radians(15)), np.sin(np.radians(85)), n))
    da, de = altaz_offsets(TRUE_AZ, a, e)
    sky_a = np.degrees(a) - (da + rng.normal(0, NOISE, n) / np.cos(e)) / 3600
    sky_e = np.degrees(e) - (de + rng.normal(0, NOISE, n)) / 3600
    fit = fit_pointing_model(sky_a, sky_e, np.degrees(a), np.degrees(e), mount_type="altaz",
                             latitude_deg=LAT)
    for name, truth in TRUE_AZ.items():
        assert abs(fit.model.values[name] - truth) < 3 * fit.model.errors[name], name


def _rotation(axis, angle):
    """Rotation matrix by `angle` (rad) about unit vector `axis` (Rodrigues)."""
    k = np.asarray(axis, float) / np.linalg.norm(axis)
    kx = np.array([[0, -k[2], k[1]], [k[2], 0, -k[0]], [-k[1], k[0], 0]])
    return np.eye(3) + np.sin(angle) * kx + (1 - np.cos(angle)) * kx @ kx


@pytest.mark.parametrize("term, toward_ha_deg", [("polar_axis_tilt_meridian", 0.0),
                                                  ("polar_axis_tilt_east", -90.0)])
def test_polar_tilt_sign_matches_exact_rotation(term, toward_ha_deg):
    """Tip the mount's pole by 100" toward hour angle H0 (exact rotation of the frame in
    (H, D) coordinates, x toward H=0 on the equator, y toward H=-90 deg (east), z the pole);
    the mount's readings of a star are its coordinates in the tipped frame."""
    tilt = np.radians(100 / 3600)
    h0 = np.radians(toward_ha_deg)
    # Tipping z toward the direction (cos h0, -sin h0, 0): rotate about z x that direction.
    toward = np.array([np.cos(h0), -np.sin(h0), 0.0])
    r = _rotation(np.cross([0, 0, 1.0], toward), tilt)
    rng = np.random.default_rng(5)
    h = np.radians(rng.uniform(-80, 80, 40))
    d = np.radians(rng.uniform(-30, 70, 40))
    u = np.stack([np.cos(d) * np.cos(h), -np.cos(d) * np.sin(h), np.sin(d)])
    u_mount = r.T @ u  # coordinates in the tipped frame
    mh = -np.arctan2(u_mount[1], u_mount[0])
    md = np.arcsin(u_mount[2])
    model = PointingModel("equatorial", LAT, {term: 100.0})
    dh, dd = model.offsets_arcsec(np.degrees(mh), np.degrees(md))
    # First order in the tilt: second-order terms reach p^2 tan^2 D, ~0.4" at D = 70 deg.
    np.testing.assert_allclose(dh, np.degrees(mh - h) * 3600, rtol=2e-3, atol=0.05)
    np.testing.assert_allclose(dd, np.degrees(md - d) * 3600, rtol=2e-3, atol=0.05)
    assert np.max(np.abs(dd)) > 50  # not trivially zero


def test_mount_from_sky_inverts_sky_from_mount():
    model = PointingModel("equatorial", LAT, dict(TRUE_EQ))
    rng = np.random.default_rng(1)
    h, d = rng.uniform(-170, 170, 100), rng.uniform(-60, 88, 100)
    mh, md = model.mount_from_sky(h, d)
    back_h, back_d = model.sky_from_mount(mh, md)
    np.testing.assert_allclose(back_h, h, atol=1e-8)
    np.testing.assert_allclose(back_d, d, atol=1e-8)
    assert np.max(np.abs(md - d)) * 3600 > 50  # the model really moved the axes
