"""FK5 and FK4 rows are converted to ICRS on load; astropy.coordinates is the reference."""
import erfa
import numpy as np
import astropy.units as u
import pytest
from astropy.coordinates import FK4, FK5, ICRS, CartesianRepresentation
from astropy.time import Time

from epochpoint.io import InputError, read_targets

MAS_TO_RAD = np.pi / 180.0 / 3.6e6
HEADER = "name,ra,dec,epoch,pm_ra_cosdec,pm_dec,parallax,radial_velocity,frame,equinox\n"


def _icrs_reference(frame):
    return frame.transform_to(ICRS())


def test_fk5_j2000_matches_astropy(write_file):
    path = write_file("fk5.csv", HEADER +
                      "A,10.0,20.0,2000.0,300,-1000,50,20,fk5,\n"
                      "B,200.0,-60.0,2000.0,0,0,0,0,FK5,J2000\n"
                      "C,300.0,89.5,1990.0,1200,500,0,30,fk5,2000.0\n")
    targets = read_targets(path)
    ra, dec = np.array([10.0, 200.0, 300.0]), np.array([20.0, -60.0, 89.5])
    pm_ra, pm_dec = np.array([300.0, 0.0, 1200.0]), np.array([-1000.0, 0.0, 500.0])
    ref = _icrs_reference(FK5(ra=ra * u.deg, dec=dec * u.deg, distance=[20.0, 1e3, 1e3] * u.pc,
                              pm_ra_cosdec=pm_ra * u.mas / u.yr, pm_dec=pm_dec * u.mas / u.yr,
                              radial_velocity=[20.0, 0.0, 30.0] * u.km / u.s,
                              equinox=Time("J2000.0")))
    np.testing.assert_allclose(targets.ra, ref.ra.deg, rtol=0, atol=1e-10)
    np.testing.assert_allclose(targets.dec, ref.dec.deg, rtol=0, atol=1e-10)
    np.testing.assert_allclose(targets.pm_ra_cosdec, ref.pm_ra_cosdec.to_value(u.mas / u.yr),
                               atol=1e-6)
    np.testing.assert_allclose(targets.pm_dec, ref.pm_dec.to_value(u.mas / u.yr), atol=1e-6)
    np.testing.assert_allclose(targets.radial_velocity, ref.radial_velocity.to_value(u.km / u.s),
                               atol=1e-6)
    np.testing.assert_array_equal(targets.parallax, [50.0, 0.0, 0.0])
    np.testing.assert_array_equal(targets.epoch, [2000.0, 2000.0, 1990.0])
    # The frame bias is ~20 mas: the conversion did something (IERS Conventions 2010, 5.5.3).
    assert abs(targets.ra[0] - 10.0) * 3.6e6 > 1.0


def test_fk5_other_equinox_matches_astropy(write_file):
    path = write_file("fk5_1975.csv", HEADER + "A,150.0,-30.0,1975.0,40,-25,0,0,fk5,J1975.0\n")
    targets = read_targets(path)
    ref = _icrs_reference(FK5(ra=150.0 * u.deg, dec=-30.0 * u.deg, distance=1 * u.kpc,
                              pm_ra_cosdec=40 * u.mas / u.yr, pm_dec=-25 * u.mas / u.yr,
                              radial_velocity=0 * u.km / u.s, equinox=Time("J1975.0")))
    assert targets.ra[0] == pytest.approx(ref.ra.deg, abs=1e-10)
    assert targets.dec[0] == pytest.approx(ref.dec.deg, abs=1e-10)
    assert targets.pm_ra_cosdec[0] == pytest.approx(ref.pm_ra_cosdec.value, abs=1e-6)
    assert targets.pm_dec[0] == pytest.approx(ref.pm_dec.value, abs=1e-6)
    # 25 years of precession move the position by ~0.3 deg (Lieske 1977 rates, 50"/yr).
    assert abs(targets.ra[0] - 150.0) > 0.1


FK4_ROWS = ("A,10.0,20.0,B1950.0,300,-1000,50,20,fk4,\n"
            "B,200.0,-60.0,B1950.0,0,0,0,0,fk4,B1950\n"
            "C,300.0,80.0,1980.0,1200,500,0,30,FK4,1950.0\n")
FK4_RA, FK4_DEC = np.array([10.0, 200.0, 300.0]), np.array([20.0, -60.0, 80.0])
FK4_PM_RA, FK4_PM_DEC = np.array([300.0, 0.0, 1200.0]), np.array([-1000.0, 0.0, 500.0])
B1950_JYEAR = Time("B1950.0").jyear
# astropy's FK4 frame and IAU SOFA's fk425/fk45z (which the reader follows) differ in the rate
# of the FK4-to-FK5 rotation by up to 0.15 mas/yr (measured; astropy's correction matrix
# differs from SOFA's in two off-diagonal elements): 1.4 mas at B1950.0, up to 9 mas fifty
# years away. These are the tolerances against astropy; ERFA's inverse routines (below) agree
# far more closely.
ASTROPY_FK4_POSITION_MAS = 10.0
ASTROPY_FK4_PM_MAS_YR = 0.3


def _fk4_obstime():
    return Time(np.array([B1950_JYEAR, B1950_JYEAR, 1980.0]), format="jyear", scale="tdb")


def _sep_mas(ra1, dec1, ra2, dec2):
    return np.degrees(erfa.seps(np.radians(ra1), np.radians(dec1), np.radians(ra2),
                                np.radians(dec2))) * 3.6e6


def test_fk4_b1950_positions_match_astropy(write_file):
    targets = read_targets(write_file("fk4.csv", HEADER + FK4_ROWS))
    ref = _icrs_reference(FK4(ra=FK4_RA * u.deg, dec=FK4_DEC * u.deg, equinox=Time("B1950.0"),
                              obstime=_fk4_obstime()))
    assert _sep_mas(targets.ra, targets.dec, ref.ra.deg, ref.dec.deg).max() < \
        ASTROPY_FK4_POSITION_MAS
    # B1950 -> J2000 precession moves positions by tenths of a degree (FK4 to FK5 is not small).
    assert np.all(np.hypot((targets.ra - FK4_RA) * np.cos(np.radians(FK4_DEC)),
                           targets.dec - FK4_DEC) > 0.1)
    np.testing.assert_allclose(targets.parallax, [50.0, 0.0, 0.0], rtol=1e-6)
    np.testing.assert_allclose(targets.radial_velocity, [20.0, 0.0, 30.0], atol=1e-3)


def _unit_vectors(ra_rad, dec_rad):
    r = np.stack([np.cos(dec_rad) * np.cos(ra_rad), np.cos(dec_rad) * np.sin(ra_rad),
                  np.sin(dec_rad)])
    east = np.stack([-np.sin(ra_rad), np.cos(ra_rad), np.zeros_like(ra_rad)])
    north = np.stack([-np.sin(dec_rad) * np.cos(ra_rad), -np.sin(dec_rad) * np.sin(ra_rad),
                      np.cos(dec_rad)])
    return r, east, north


def _fk4_pm_from_two_epochs(step_yr=1.0):
    """ICRS proper motion from astropy positions of the moving star a year before and after.

    Each FK4 position (with E-terms) is moved along the tangent plane by pm x step and
    converted by astropy alone AT ITS OWN INSTANT (obstime +- step): the FK4-to-FK5 rotation
    changes with time, and the difference over 2 x step includes that change.
    """
    r, east, north = _unit_vectors(np.radians(FK4_RA), np.radians(FK4_DEC))
    offset = step_yr * MAS_TO_RAD * (FK4_PM_RA * east + FK4_PM_DEC * north)
    ends = []
    for sign in (-1.0, 1.0):
        obstime = Time(_fk4_obstime().jyear + sign * step_yr, format="jyear", scale="tdb")
        moved = FK4(CartesianRepresentation(r + sign * offset), representation_type="cartesian",
                    equinox=Time("B1950.0"), obstime=obstime)
        xyz = moved.transform_to(ICRS()).cartesian.xyz.value
        ends.append(xyz / np.linalg.norm(xyz, axis=0))
    centre = FK4(ra=FK4_RA * u.deg, dec=FK4_DEC * u.deg, equinox=Time("B1950.0"),
                 obstime=_fk4_obstime()).transform_to(ICRS())
    _, east_icrs, north_icrs = _unit_vectors(centre.ra.rad, centre.dec.rad)
    velocity = (ends[1] - ends[0]) / (2.0 * step_yr) / MAS_TO_RAD
    return (velocity * east_icrs).sum(axis=0), (velocity * north_icrs).sum(axis=0)


def test_fk4_proper_motions_match_astropy_positions_at_two_epochs(write_file):
    targets = read_targets(write_file("fk4.csv", HEADER + FK4_ROWS))
    pm_ra_ref, pm_dec_ref = _fk4_pm_from_two_epochs()
    np.testing.assert_allclose(targets.pm_ra_cosdec, pm_ra_ref, atol=ASTROPY_FK4_PM_MAS_YR)
    np.testing.assert_allclose(targets.pm_dec, pm_dec_ref, atol=ASTROPY_FK4_PM_MAS_YR)
    # Row B has no FK4 motion, yet moves in FK5 by the rate of the rotation (a few mas/yr).
    assert 2.0 < np.hypot(targets.pm_ra_cosdec[1], targets.pm_dec[1]) < 6.0
    # The rotation from B1950 axes changes components by ~1% (tens of mas/yr here).
    assert abs(targets.pm_dec[2] - 500.0) > 10.0


# ---- FK5 stars taken to FK4 by ERFA's inverse routines and read back -------------------------
# erfa.fk524 and erfa.fk54z are IAU SOFA's published FK5 -> FK4 routines (Standish 1982;
# Aoki et al. 1983), the inverses of the fk425/fk45z the reader calls: a row made by them must
# come back as the FK5 star, then FK5 -> ICRS by astropy's frame bias.
SEED = 20240613
N_STARS = 200


def _random_fk5_stars(rng, n=N_STARS):
    ra = rng.uniform(0.0, 2.0 * np.pi, n)
    dec = np.arcsin(rng.uniform(-1.0, 1.0, n))  # uniform over the whole sky
    return ra, dec


def _csv_rows(names, ra_rad, dec_rad, epochs, pm_ra=None, pm_dec=None, parallax=None, rv=None):
    """CSV lines for FK4 rows; pm cells are left empty where pm_ra is None."""
    lines = []
    for i, name in enumerate(names):
        motion = (",," if pm_ra is None else f"{float(pm_ra[i])!r},{float(pm_dec[i])!r},")
        extra = ("," if parallax is None else f"{float(parallax[i])!r},{float(rv[i])!r}")
        lines.append(f"{name},{float(np.degrees(ra_rad[i]))!r},"
                     f"{float(np.degrees(dec_rad[i]))!r},{epochs[i]},{motion}{extra},fk4,B1950\n")
    return "".join(lines)


def _fk5_to_icrs(ra_rad, dec_rad, **motion):
    return _icrs_reference(FK5(ra=ra_rad * u.rad, dec=dec_rad * u.rad, equinox=Time("J2000.0"),
                               **motion))


def test_fk4_rows_with_motion_parallax_and_rv_invert_erfa_fk524(write_file):
    rng = np.random.default_rng(SEED)
    ra, dec = _random_fk5_stars(rng)
    pm_ra, pm_dec = rng.uniform(-2000.0, 2000.0, (2, N_STARS))
    parallax, rv = rng.uniform(1.0, 300.0, N_STARS), rng.uniform(-100.0, 100.0, N_STARS)
    # The FK5 J2000.0 star as an FK4 B1950.0 row (epoch B1950.0), by ERFA.
    r4, d4, dr4, dd4, px4, rv4 = erfa.fk524(ra, dec, pm_ra * MAS_TO_RAD / np.cos(dec),
                                            pm_dec * MAS_TO_RAD, parallax / 1000.0, rv)
    names = [f"S{i}" for i in range(N_STARS)]
    text = _csv_rows(names, r4, d4, ["B1950.0"] * N_STARS, dr4 * np.cos(d4) / MAS_TO_RAD,
                     dd4 / MAS_TO_RAD, px4 * 1000.0, rv4)
    targets = read_targets(write_file("fk4_motion.csv", HEADER + text))
    assert np.allclose(targets.epoch, B1950_JYEAR)
    # Carry what was read to J2000.0 with ERFA's own space motion (pmsafe), then compare.
    dec_read = np.radians(targets.dec)
    r, d, dr, dd, _, _ = erfa.pmsafe(
        np.radians(targets.ra), dec_read, targets.pm_ra_cosdec * MAS_TO_RAD / np.cos(dec_read),
        targets.pm_dec * MAS_TO_RAD, targets.parallax / 1000.0, targets.radial_velocity,
        *erfa.epj2jd(B1950_JYEAR), *erfa.epj2jd(2000.0))
    ref = _fk5_to_icrs(ra, dec, distance=(1000.0 / parallax) * u.pc,
                       pm_ra_cosdec=pm_ra * u.mas / u.yr, pm_dec=pm_dec * u.mas / u.yr,
                       radial_velocity=rv * u.km / u.s)
    assert _sep_mas(np.degrees(r), np.degrees(d), ref.ra.deg, ref.dec.deg).max() < 0.2
    np.testing.assert_allclose(dr * np.cos(d) / MAS_TO_RAD, ref.pm_ra_cosdec.value, atol=0.01)
    np.testing.assert_allclose(dd / MAS_TO_RAD, ref.pm_dec.value, atol=0.01)
    # Parallax and radial velocity at the row's epoch are the FK4 row's (frames only rotate;
    # fk425's own 50-year carry of the radial velocity differs from the straight line used
    # to come back by up to 4 m/s for these nearby fast stars, measured).
    np.testing.assert_allclose(targets.parallax, px4 * 1000.0, rtol=1e-6)
    np.testing.assert_allclose(targets.radial_velocity, rv4, atol=0.01)


def test_fk5_stars_at_rest_come_back_at_rest_through_fk4(write_file):
    """The defect this guards against: 3-4 mas/yr and 0.24" at J2000.0 (rotation rate lost)."""
    rng = np.random.default_rng(SEED + 1)
    ra, dec = _random_fk5_stars(rng)
    bepoch = rng.uniform(1900.0, 2000.0, N_STARS)
    # FK4 position at bepoch of a star at rest in FK5, with its (nonzero) FK4 proper motion.
    r4, d4, dr4, dd4, _, _ = erfa.fk524(ra, dec, 0.0 * ra, 0.0 * ra, 0.0 * ra, 0.0 * ra)
    r4, d4 = r4 + dr4 * (bepoch - 1950.0), d4 + dd4 * (bepoch - 1950.0)
    epochs = [f"B{float(b)!r}" for b in bepoch]
    text = _csv_rows([f"S{i}" for i in range(N_STARS)], r4, d4, epochs,
                     dr4 * np.cos(d4) / MAS_TO_RAD, dd4 / MAS_TO_RAD)
    targets = read_targets(write_file("fk4_rest.csv", HEADER + text))
    ref = _fk5_to_icrs(ra, dec)
    assert np.abs(targets.pm_ra_cosdec).max() < 0.01
    assert np.abs(targets.pm_dec).max() < 0.01
    assert _sep_mas(targets.ra, targets.dec, ref.ra.deg, ref.dec.deg).max() < 1.0
    # The FK4 motions given were real: a few mas/yr.
    assert np.hypot(dr4 * np.cos(d4), dd4).max() / MAS_TO_RAD > 3.0


def test_fk4_rows_without_proper_motion_are_read_as_at_rest_in_fk5(write_file):
    """No proper-motion cells: the reader assumes the star is at rest in FK5 (as SOFA fk45z
    does; README, frames). Reference: the FK4 position by ERFA fk54z at each epoch."""
    rng = np.random.default_rng(SEED + 2)
    ra, dec = _random_fk5_stars(rng, 50)
    bepoch = rng.uniform(1875.0, 2000.0, 50)
    r4, d4, _, _ = erfa.fk54z(ra, dec, bepoch)
    text = _csv_rows([f"S{i}" for i in range(50)], r4, d4, [f"B{float(b)!r}" for b in bepoch])
    targets = read_targets(write_file("fk4_no_pm.csv", HEADER + text))
    ref = _fk5_to_icrs(ra, dec)
    assert _sep_mas(targets.ra, targets.dec, ref.ra.deg, ref.dec.deg).max() < 0.1
    assert np.all(targets.pm_ra_cosdec == 0.0) and np.all(targets.pm_dec == 0.0)


def test_fk4_other_equinox_matches_astropy(write_file):
    # FK4 at equinox B1900.0: astropy's Newcomb precession within FK4 to B1950.0, then as above.
    rows = ("P,45.0,30.0,B1900.0,150,-80,0,0,fk4,B1900\n"
            "Q,250.0,-45.0,1930.0,,,0,0,fk4,B1900.0\n")
    targets = read_targets(write_file("fk4_1900.csv", HEADER + rows))
    obstime = Time([Time("B1900.0").jyear, 1930.0], format="jyear", scale="tdb")
    ref = _icrs_reference(FK4(ra=[45.0, 250.0] * u.deg, dec=[30.0, -45.0] * u.deg,
                              equinox=Time("B1900.0"), obstime=obstime))
    assert _sep_mas(targets.ra, targets.dec, ref.ra.deg, ref.dec.deg).max() < \
        ASTROPY_FK4_POSITION_MAS
    assert targets.pm_ra_cosdec[1] == 0.0 and targets.pm_dec[1] == 0.0


def test_icrs_rows_are_untouched_and_mixed_frames_keep_order(write_file):
    path = write_file("mixed.csv", HEADER + "I,10.0,20.0,2016.0,5,6,7,8,,\n"
                                            "F,10.0,20.0,2000.0,5,6,7,8,fk5,\n"
                                            "J,11.0,21.0,2016.0,5,6,7,8,icrs,J2000\n")
    targets = read_targets(path)
    assert list(targets.names()) == ["I", "F", "J"]
    assert targets.ra[0] == 10.0 and targets.dec[0] == 20.0 and targets.pm_dec[0] == 6.0
    assert targets.ra[2] == 11.0
    assert targets.ra[1] != 10.0


@pytest.mark.parametrize("frame, equinox, column", [("galactic", "", "frame"),
                                                    ("fk5", "Q2000", "equinox"),
                                                    ("fk4", "B200", "equinox")])
def test_bad_frame_or_equinox_is_input_error(write_file, frame, equinox, column):
    path = write_file("bad.csv", HEADER + f"A,10,20,2000,0,0,0,0,{frame},{equinox}\n")
    with pytest.raises(InputError) as info:
        read_targets(path)
    assert info.value.line == 2 and info.value.column == column and info.value.target == "A"
