"""FK5 and FK4 rows are converted to ICRS on load; astropy.coordinates is the reference."""
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


def _fk4_obstime():
    return Time(np.array([Time("B1950.0").jyear, Time("B1950.0").jyear, 1980.0]),
                format="jyear", scale="tdb")


def test_fk4_b1950_positions_match_astropy(write_file):
    targets = read_targets(write_file("fk4.csv", HEADER + FK4_ROWS))
    ref = _icrs_reference(FK4(ra=FK4_RA * u.deg, dec=FK4_DEC * u.deg, equinox=Time("B1950.0"),
                              obstime=_fk4_obstime()))
    np.testing.assert_allclose(targets.ra, ref.ra.deg, rtol=0, atol=1e-10)
    np.testing.assert_allclose(targets.dec, ref.dec.deg, rtol=0, atol=1e-10)
    # B1950 -> J2000 precession moves positions by tenths of a degree (FK4 to FK5 is not small).
    assert np.all(np.hypot((targets.ra - FK4_RA) * np.cos(np.radians(FK4_DEC)),
                           targets.dec - FK4_DEC) > 0.1)
    np.testing.assert_array_equal(targets.parallax, [50.0, 0.0, 0.0])
    np.testing.assert_array_equal(targets.radial_velocity, [20.0, 0.0, 30.0])


def _unit_vectors(ra_rad, dec_rad):
    r = np.stack([np.cos(dec_rad) * np.cos(ra_rad), np.cos(dec_rad) * np.sin(ra_rad),
                  np.sin(dec_rad)])
    east = np.stack([-np.sin(ra_rad), np.cos(ra_rad), np.zeros_like(ra_rad)])
    north = np.stack([-np.sin(dec_rad) * np.cos(ra_rad), -np.sin(dec_rad) * np.sin(ra_rad),
                      np.cos(dec_rad)])
    return r, east, north


def _fk4_pm_from_two_epochs(step_yr=1.0):
    """ICRS proper motion from astropy positions of the moving star one year before and after.

    Each FK4 position (with E-terms) is moved along the tangent plane by pm x step and
    converted by astropy alone; the ICRS positions' difference over 2 x step is the proper motion.
    """
    r, east, north = _unit_vectors(np.radians(FK4_RA), np.radians(FK4_DEC))
    offset = step_yr * MAS_TO_RAD * (FK4_PM_RA * east + FK4_PM_DEC * north)
    ends = []
    for sign in (-1.0, 1.0):
        moved = FK4(CartesianRepresentation(r + sign * offset), representation_type="cartesian",
                    equinox=Time("B1950.0"), obstime=_fk4_obstime())
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
    # Within 1.7e-6 of |pm| (the E-term size; see io/frames.py), here < 0.003 mas/yr.
    np.testing.assert_allclose(targets.pm_ra_cosdec, pm_ra_ref, atol=3e-3)
    np.testing.assert_allclose(targets.pm_dec, pm_dec_ref, atol=3e-3)
    # The rotation from B1950 axes changes components by ~1% (tens of mas/yr here).
    assert abs(targets.pm_dec[2] - 500.0) > 10.0


def test_fk4_proper_motions_agree_with_astropy_velocity_transform(write_file):
    """astropy's own velocity transform, whose FK4 E-term step is a 1-second finite
    difference, agrees to its rounding noise (about 1 mas/yr)."""
    targets = read_targets(write_file("fk4.csv", HEADER + FK4_ROWS))
    ref = _icrs_reference(FK4(ra=FK4_RA * u.deg, dec=FK4_DEC * u.deg,
                              distance=[20, 1e3, 1e3] * u.pc,
                              pm_ra_cosdec=FK4_PM_RA * u.mas / u.yr,
                              pm_dec=FK4_PM_DEC * u.mas / u.yr,
                              radial_velocity=[20, 0, 30] * u.km / u.s,
                              equinox=Time("B1950.0"), obstime=_fk4_obstime()))
    np.testing.assert_allclose(targets.pm_ra_cosdec, ref.pm_ra_cosdec.value, atol=2.0)
    np.testing.assert_allclose(targets.pm_dec, ref.pm_dec.value, atol=2.0)


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
