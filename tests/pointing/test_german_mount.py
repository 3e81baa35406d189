"""The pointing model of a German equatorial mount on both sides of the pier.

Reference: a rigorous synthetic mount written here from rotation matrices, independent of the
code under test (its first-order term patterns are not used). In the frame x toward hour
angle 0 on the equator, y toward the east point, z the north celestial pole, a direction at
(H, D) is u = (cos D cos H, -cos D sin H, sin D) = Rz(-H) (cos D, 0, sin D). The mount is a
chain of rigid rotations (the way P. T. Wallace, "A rigorous algorithm for telescope
pointing", SPIE 4848 (2002), describes a mount, from memory):

    u = sag(droop(B Rz(-alpha) Rx(n) Ry(-beta) (cos c, sin c, 0)))

B tips the polar axis by known small angles toward the upper meridian and toward the east;
alpha and beta are the true axis angles, the encoders reading alpha + hour_zero and
beta + dec_zero; Rx(n) raises the counterweight's end (+y) of the declination axis toward the
pole, out of square; c leans the tube toward the counterweight's end; droop swings the tube
along the declination axis by q sin(altitude) (the axis bends down under the tube's weight:
a rotation p (a_tube x down) of everything beyond it); sag tips the tube toward the horizon by
s sin(zenith distance). With the counterweight below the polar axis, the tube's end of the
declination axis is -y of the turning frame on both sides (common practice: counterweight
down, tube up). A star at (H, D) is reached at (alpha, beta) near (H, D) on the east side and
near (H + 180, 180 - D) on the west; the firmware reports the encoders the naive way, HA = alpha
and Dec = beta on the east side and HA = alpha - 180, Dec = 180 - beta on the west (mirrored
through the pole).

Expected term values, worked out by hand from the chain above (first order), in the model's
convention (values as seen on the east side): hour_axis_index = hour_zero, dec_axis_index =
dec_zero, optical_axis_skew = c, axes_non_square = -n (the tube's end raised toward the pole
by -n), the polar tilts as built into B, tube_sag = s, dec_axis_sag = q. Seeds and latitudes
are fixed so a failure replays.
"""
import numpy as np
import pytest

from epochpoint.core.pointing_model import PointingModel, PoorCoverage, fit_pointing_model
from epochpoint.core.pointing_model.mount_frame import mount_axes

ARCSEC = np.radians(1.0 / 3600.0)
NOISE = 2.0  # arcsec per axis on the sky: centring by hand
# The built mount (arcsec): encoder zero points, lean, out-of-square, polar tilts, sags.
BUILT = dict(hour_zero=-95.0, dec_zero=40.0, lean_c=60.0, raise_n=30.0, tilt_meridian=120.0,
             tilt_east=-80.0, tube_sag=30.0, droop=25.0)
EXPECTED = {"hour_axis_index": BUILT["hour_zero"], "dec_axis_index": BUILT["dec_zero"],
            "optical_axis_skew": BUILT["lean_c"], "axes_non_square": -BUILT["raise_n"],
            "polar_axis_tilt_meridian": BUILT["tilt_meridian"],
            "polar_axis_tilt_east": BUILT["tilt_east"], "tube_sag": BUILT["tube_sag"],
            "dec_axis_sag": BUILT["droop"]}
ALL_TERMS = list(EXPECTED)


def _rot(axis: int, angle) -> np.ndarray:
    """Right-handed rotation matrices (n, 3, 3) by `angle` (rad, array) about x, y or z."""
    angle = np.atleast_1d(angle)
    c, s = np.cos(angle), np.sin(angle)
    m = np.zeros(angle.shape + (3, 3))
    i, j = [(1, 2), (2, 0), (0, 1)][axis]
    m[:, axis, axis] = 1.0
    m[:, i, i], m[:, j, j] = c, c
    m[:, i, j], m[:, j, i] = -s, s
    return m


def _turn(v, omega):
    """v (n, 3) turned by rotation vectors omega (n, 3) (Rodrigues' formula)."""
    theta = np.linalg.norm(omega, axis=1, keepdims=True)
    k = np.divide(omega, theta, out=np.zeros_like(omega), where=theta > 0)
    return (v * np.cos(theta) + np.cross(k, v) * np.sin(theta)
            + k * np.sum(k * v, axis=1, keepdims=True) * (1 - np.cos(theta)))


def _apply(m, v):
    return np.einsum("nij,nj->ni", m, v)


def tube_direction(alpha_enc, beta_enc, lat_rad):
    """Where the tube points (n, 3) at encoder readings (rad), by the chain above."""
    n_pts = np.size(alpha_enc)
    p = {k: v * ARCSEC for k, v in BUILT.items()}
    alpha = alpha_enc - p["hour_zero"]
    beta = beta_enc - p["dec_zero"]
    # Polar axis tipped toward +x (upper meridian) and toward +y (east).
    base = _rot(1, np.full(n_pts, p["tilt_meridian"])) @ _rot(0, np.full(n_pts, -p["tilt_east"]))
    frame = base @ _rot(2, -alpha) @ _rot(0, np.full(n_pts, p["raise_n"]))
    e = np.tile([np.cos(p["lean_c"]), np.sin(p["lean_c"]), 0.0], (n_pts, 1))
    u = _apply(frame @ _rot(1, -beta), e)
    zenith = np.tile([np.cos(lat_rad), 0.0, np.sin(lat_rad)], (n_pts, 1))
    # The declination axis bends down: everything beyond it turns by q (a_tube x down).
    a_tube = -_apply(frame, np.tile([0.0, 1.0, 0.0], (n_pts, 1)))
    u = _turn(u, p["droop"] * np.cross(a_tube, -zenith))
    # The tube bends toward the horizon by s sin(z): rotation vector s (zenith x u).
    return _turn(u, p["tube_sag"] * np.cross(zenith, u))


def _hadec(u):
    return np.arctan2(-u[:, 1], u[:, 0]), np.arcsin(np.clip(u[:, 2], -1, 1))


def firmware_readings(h, d, east, lat_rad):
    """HA, Dec (rad) a firmware reports with the star at (h, d) centred on the given sides."""
    sign = np.where(east, 1.0, -1.0)
    alpha = np.where(east, h, h + np.pi)
    beta = np.where(east, d, np.pi - d)
    for _ in range(60):
        hu, du = _hadec(tube_direction(alpha, beta, lat_rad))
        dh = (h - hu + np.pi) % (2 * np.pi) - np.pi
        alpha, beta = alpha + dh, beta + sign * (d - du)
        if max(np.max(np.abs(dh)), np.max(np.abs(d - du))) < 1e-13:
            break
    else:
        raise AssertionError("the synthetic mount's encoder angles did not converge")
    ha_fw = np.where(east, alpha, alpha - np.pi)
    dec_fw = np.where(east, beta, np.pi - beta)
    return (ha_fw + np.pi) % (2 * np.pi) - np.pi, dec_fw


def random_stars(rng, n, lat_deg, min_alt=20.0, max_abs_dec=70.0):
    """Stars spread over the sky above min_alt (uniform on the sphere), with their pier sides:
    the side of the hour angle, but either side within 20 deg of the meridian (a mount
    tracking past it)."""
    lat = np.radians(lat_deg)
    h, d = np.empty(0), np.empty(0)
    while h.size < n:
        hh = rng.uniform(-np.pi, np.pi, 4 * n)
        dd = np.arcsin(rng.uniform(-1, 1, 4 * n))
        alt = np.arcsin(np.sin(lat) * np.sin(dd) + np.cos(lat) * np.cos(dd) * np.cos(hh))
        ok = (alt > np.radians(min_alt)) & (np.abs(dd) < np.radians(max_abs_dec))
        h, d = np.concatenate([h, hh[ok]]), np.concatenate([d, dd[ok]])
    h, d = h[:n], d[:n]
    east = h < 0
    near = np.abs(h) < np.radians(20.0)
    east[near] = rng.random(near.sum()) < 0.5
    return h, d, east


def two_sided_samples(rng, n, lat_deg):
    h, d, east = random_stars(rng, n, lat_deg)
    ha_fw, dec_fw = firmware_readings(h, d, east, np.radians(lat_deg))
    # Centring by hand: noise on the sky (hour angle scaled by sec dec).
    ha_fw = ha_fw + rng.normal(0, NOISE, n) * ARCSEC / np.cos(d)
    dec_fw = dec_fw + rng.normal(0, NOISE, n) * ARCSEC
    sides = np.where(east, "east", "West")  # any case in, as in a samples file
    return np.degrees(h), np.degrees(d), np.degrees(ha_fw), np.degrees(dec_fw), sides


def _miss_arcsec(ha_a, dec_a, ha_b, dec_b):
    dha = (ha_a - ha_b + 180.0) % 360.0 - 180.0
    return np.hypot(dha * np.cos(np.radians(dec_b)), dec_a - dec_b) * 3600.0


# Seeded latitudes over both hemispheres (drawn once from default_rng(611), uniform in
# [-65, 65] deg, kept with the seed that made each case).
CASES = [(20240611, 41.7), (17, -33.2), (5, 8.9), (23, -61.4)]


@pytest.mark.parametrize("seed, lat_deg", CASES)
def test_both_sides_terms_recovered_and_held_out_stars_predicted(seed, lat_deg):
    rng = np.random.default_rng(seed)
    h, d, ha_fw, dec_fw, sides = two_sided_samples(rng, 140, lat_deg)
    assert {"east", "west"} <= {s.lower() for s in sides}
    fit = fit_pointing_model(h, d, ha_fw, dec_fw, mount_type="german", latitude_deg=lat_deg,
                             terms=ALL_TERMS, pier_side=sides)
    model = fit.model
    assert model.mount_type == "german" and set(model.values) == set(EXPECTED)
    for name, truth in EXPECTED.items():
        value, error = model.values[name], model.errors[name]
        assert 0 < error < 10, (name, error)
        assert abs(value - truth) < 3 * error, (name, value, truth, error)
    # Residuals: NOISE per axis, so the 2-D rms is NOISE * sqrt(2).
    assert model.rms_after_arcsec == pytest.approx(NOISE * np.sqrt(2), rel=0.25)
    assert len(model.rejected) <= 3

    # Held-out stars on both sides, noise-free: where must the axes go?
    hh, dd, east = random_stars(rng, 300, lat_deg)
    true_ha, true_dec = (np.degrees(x) for x in
                         firmware_readings(hh, dd, east, np.radians(lat_deg)))
    side_names = np.where(east, "east", "west")
    got_ha, got_dec = model.mount_from_sky(np.degrees(hh), np.degrees(dd), side_names)
    german_rms = np.sqrt(np.mean(_miss_arcsec(got_ha, got_dec, true_ha, true_dec) ** 2))
    assert german_rms < 1.5 * NOISE

    # The same two-sided data fitted without sides, as a fork-style equatorial mount: the
    # declination-axis terms cannot follow the side, so it is clearly worse.
    with pytest.warns(PoorCoverage, match="both pier sides"):
        plain = fit_pointing_model(h, d, ha_fw, dec_fw, mount_type="equatorial",
                                   latitude_deg=lat_deg, terms=ALL_TERMS,
                                   pier_side=sides).model
    assert any("both pier sides" in note for note in plain.notes)
    plain_ha, plain_dec = plain.mount_from_sky(np.degrees(hh), np.degrees(dd))
    plain_rms = np.sqrt(np.mean(_miss_arcsec(plain_ha, plain_dec, true_ha, true_dec) ** 2))
    assert plain_rms > 5 * german_rms and plain_rms > 10 * NOISE, (plain_rms, german_rms)


def test_the_synthetic_mount_is_perfect_without_imperfections(monkeypatch):
    """The reference chain itself: with every imperfection zero, the firmware reads the star's
    own hour angle and declination on both sides (the pier flip names the same direction)."""
    for key in BUILT:
        monkeypatch.setitem(BUILT, key, 0.0)
    rng = np.random.default_rng(3)
    h, d, east = random_stars(rng, 200, -20.0)
    ha_fw, dec_fw = firmware_readings(h, d, east, np.radians(-20.0))
    assert np.max(_miss_arcsec(np.degrees(ha_fw), np.degrees(dec_fw), np.degrees(h),
                               np.degrees(d))) < 1e-6


# One imperfection of the chain (its BUILT key) and the term it is, with the sign worked out
# by hand above.
ONE_AT_A_TIME = [("dec_zero", "dec_axis_index", 1), ("lean_c", "optical_axis_skew", 1),
                 ("raise_n", "axes_non_square", -1), ("droop", "dec_axis_sag", 1),
                 ("hour_zero", "hour_axis_index", 1), ("tube_sag", "tube_sag", 1),
                 ("tilt_meridian", "polar_axis_tilt_meridian", 1),
                 ("tilt_east", "polar_axis_tilt_east", 1)]


@pytest.mark.parametrize("key, term, sign", ONE_AT_A_TIME)
def test_each_term_on_each_side_matches_the_chain(monkeypatch, key, term, sign):
    """One imperfection at a time in the rigorous chain: the model's pattern on each side
    (the declination axis's terms reversed on the west, the others not) agrees with the
    chain's readings minus the star to first order."""
    lat = 35.0
    for name in BUILT:
        monkeypatch.setitem(BUILT, name, 100.0 if name == key else 0.0)
    rng = np.random.default_rng(8)
    h, d, _ = random_stars(rng, 60, lat, max_abs_dec=60.0)
    model = PointingModel("german", lat, {term: sign * 100.0})
    for east in (True, False):
        ha_fw, dec_fw = firmware_readings(h, d, np.full(h.size, east), np.radians(lat))
        side = "east" if east else "west"
        dh, dd = model.offsets_arcsec(np.degrees(ha_fw), np.degrees(dec_fw), side)
        want_dh = np.degrees((ha_fw - h + np.pi) % (2 * np.pi) - np.pi) * 3600
        want_dd = np.degrees(dec_fw - d) * 3600
        # First order in 100": the second-order terms stay below 0.5" for |D| < 60 deg.
        np.testing.assert_allclose(dh * np.cos(d), want_dh * np.cos(d), atol=0.5,
                                   err_msg=f"{term} on the {side} side")
        np.testing.assert_allclose(dd, want_dd, atol=0.5, err_msg=f"{term} on the {side} side")
        assert np.max(np.hypot(want_dh * np.cos(d), want_dd)) > 20


def test_without_a_side_the_slew_takes_the_side_its_commanded_hour_angle_names():
    """A firmware picks the side from the hour angle it is sent (common practice): a star
    10 arcsec west of the meridian, with the hour axis reading 100 arcsec high, is commanded
    at hour angle -90 arcsec, so it is reached on the east side."""
    model = PointingModel("german", 40.0, {"hour_axis_index": -100.0, "dec_axis_index": 30.0})
    axes = mount_axes(model, 10.0 / 3600, 20.0, 50.0, 180.0, 40.0)
    assert axes.pier_side[()] == "east"
    assert float(axes.ha) * 3600 == pytest.approx(-90.0, abs=1e-6)
    assert float(axes.dec) * 3600 == pytest.approx(20.0 * 3600 + 30.0, abs=1e-6)
    # Far from the meridian the side of the hour angle.
    axes = mount_axes(model, [-30.0, 30.0], [20.0, 20.0], [50.0, 50.0], [90.0, 270.0], 40.0)
    assert list(axes.pier_side) == ["east", "west"]
    assert axes.dec[1] * 3600 == pytest.approx(20.0 * 3600 - 30.0, abs=1e-6)
    # A side given is used even past the meridian.
    axes = mount_axes(model, 5.0, 20.0, 50.0, 200.0, 40.0, pier_side="EAST")
    assert axes.pier_side[()] == "east" and float(axes.dec) * 3600 == pytest.approx(
        20.0 * 3600 + 30.0, abs=1e-6)


@pytest.mark.parametrize("lat_deg", [52.0, -31.0])
def test_mechanical_angles_point_the_tube_at_the_place(lat_deg):
    """The mechanical angles carried by the stage, on either side (also past the meridian),
    point the tube at the place: with the polar axis turned by theta the tube points along
    Rz(-theta) (0, cos psi, sin psi), a southern mount the mirror image (dec -> -dec)
    (the construction of tests/plan/test_pier_flip.py, common practice for German mounts)."""
    rng = np.random.default_rng(99)
    ha, dec = rng.uniform(-180, 180, 200), rng.uniform(-85, 85, 200)
    side = rng.choice(["east", "west"], 200)
    axes = mount_axes(None, ha, dec, np.zeros(200), np.zeros(200), lat_deg, pier_side=side)
    pole = 1.0 if lat_deg >= 0 else -1.0
    t, p = np.radians(axes.polar_angle), np.radians(axes.dec_angle)
    tube = np.stack([np.sin(t) * np.cos(p), np.cos(t) * np.cos(p), np.sin(p)])
    h, d = np.radians(ha), np.radians(pole * dec)
    star = np.stack([np.cos(d) * np.cos(h), -np.cos(d) * np.sin(h), np.sin(d)])
    np.testing.assert_allclose(tube, star, atol=1e-12)
    # Counterweight below the polar axis's horizontal exactly on the side of the hour angle.
    own_side = np.where(((ha + 180) % 360 - 180) < 0, "east", "west")
    assert np.array_equal(np.abs(axes.polar_angle) <= 90 + 1e-9, side == own_side)


def test_a_german_model_file_round_trips_and_old_models_stay_as_they_were():
    model = PointingModel("german", -29.25, dict(EXPECTED), errors={k: 1.0 for k in EXPECTED})
    again = PointingModel.from_dict(model.to_dict())
    assert again.mount_type == "german" and again.values == model.values
    ha, dec = np.array([-40.0, 3.0, 60.0]), np.array([-10.0, 35.0, 5.0])
    for side in ("east", "west"):
        np.testing.assert_array_equal(again.mount_from_sky(ha, dec, side),
                                      model.mount_from_sky(ha, dec, side))
    from epochpoint.core.pointing_model import ModelError
    bad = dict(model.to_dict(), terms={"fork_arm_flex": {"value_arcsec": 3.0}})
    with pytest.raises(ModelError, match="fork_arm_flex"):
        PointingModel.from_dict(bad, source="m.json")
    # An equatorial model ignores sides: the same correction on both.
    plain = PointingModel("equatorial", 40.0, {"dec_axis_index": 30.0, "optical_axis_skew": 20.0})
    np.testing.assert_array_equal(plain.mount_from_sky(ha, dec, "east"),
                                  plain.mount_from_sky(ha, dec, "west"))
    np.testing.assert_array_equal(plain.mount_from_sky(ha, dec), plain.mount_from_sky(ha, dec,
                                                                                       "west"))


def test_a_german_fit_needs_every_side():
    rng = np.random.default_rng(4)
    h, d, ha_fw, dec_fw, sides = two_sided_samples(rng, 30, 45.0)
    with pytest.raises(ValueError, match="pier side"):
        fit_pointing_model(h, d, ha_fw, dec_fw, mount_type="german", latitude_deg=45.0)
    sides = sides.astype(object)
    sides[7] = ""
    with pytest.raises(ValueError, match="row 8.*pier side"):
        fit_pointing_model(h, d, ha_fw, dec_fw, mount_type="german", latitude_deg=45.0,
                           pier_side=sides)
    sides[7] = "north"
    with pytest.raises(ValueError, match="'north' is not a pier side"):
        fit_pointing_model(h, d, ha_fw, dec_fw, mount_type="german", latitude_deg=45.0,
                           pier_side=sides)
