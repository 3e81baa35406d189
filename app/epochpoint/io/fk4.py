"""FK4 catalogue rows to FK5 (mean equator and equinox J2000.0), proper motions included.

The full transformation of Standish (1982, A&A 115, 20) as developed by Aoki et al. (1983,
A&A 128, 263), with the constants of the Explanatory Supplement (Seidelmann 1992), as in the
IAU SOFA routines fk425 and fk45z, called here through ERFA. FK4 positions hold the E-terms of
aberration and FK4's equinox drifts against FK5's, so the FK4-to-FK5 rotation changes with time:
its time derivative adds to every proper motion (a star at rest in FK5 moves by a few mas/yr in
FK4). A fixed rotation at the row's epoch would drop that term. Stated accuracy (SOFA fk425,
note 4): below 1 mas in position and 1 mas per century in proper motion at J2000.0.

Per row, one of two readings:
- proper motion given: the star is moved within FK4 from its epoch to B1950.0 (straight line,
  spacemotion.propagate), converted with fk425 (which carries it to epoch J2000.0 in FK5, with
  parallax and radial velocity), then moved back to its own epoch in FK5. FK4 proper motions
  are per tropical year, as FK4 catalogues give them.
- no proper motion given (both cells empty or the columns absent): the star is taken to be at
  rest in FK5, as fk45z assumes; its FK4 position at its epoch gives the FK5 position, with zero
  proper motion. Parallax and radial velocity are kept as given.
Rows at another FK4 equinox are first carried to B1950.0 within FK4 by astropy (Newcomb's
precession between the E-term-free frames, E-terms of each equinox); their proper motion rides
along as the difference of two positions a year either side.
"""
from __future__ import annotations

import warnings

import astropy.units as u
import erfa
import numpy as np
from astropy.coordinates import FK4, CartesianRepresentation
from astropy.time import Time

from epochpoint.core.constants import MAS_TO_RAD
from epochpoint.core.spacemotion import propagate
from epochpoint.core.vectors import dot, tangent_triad, to_spherical, triad_of

FK4_EQUINOX = "B1950.0"
B1950_JYEAR = float(erfa.epj(*erfa.epb2jd(1950.0)))
J2000_JYEAR = 2000.0
# Half the baseline (years) of the two positions that carry a proper motion through astropy.
MOTION_STEP_YEARS = 1.0


def fk4_to_fk5_j2000(equinox: str, a: dict, motion_given: np.ndarray) -> dict:
    """FK5 J2000.0 astrometry at each row's own epoch for FK4 rows sharing one equinox.

    a: arrays ra, dec (deg), epoch (Julian year), pm_ra_cosdec, pm_dec (mas/yr), parallax
    (mas), radial_velocity (km/s). motion_given: per row, False where no proper motion was
    given (read as at rest in FK5). See the module docstring.
    """
    if equinox != FK4_EQUINOX:
        a = _to_fk4_b1950(equinox, a)
    out = {key: np.array(value, dtype=float) for key, value in a.items()}
    moving = np.asarray(motion_given, dtype=bool)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", erfa.ErfaWarning)  # "dubious year" far from today
        if moving.any():
            rows = {key: value[moving] for key, value in a.items()}
            for key, value in _fk425_at_epoch(rows).items():
                out[key][moving] = value
        if (~moving).any():
            ra, dec = _fk45z_at_epoch(a["ra"][~moving], a["dec"][~moving], a["epoch"][~moving])
            out["ra"][~moving], out["dec"][~moving] = ra, dec
            out["pm_ra_cosdec"][~moving] = out["pm_dec"][~moving] = 0.0
    return out


def _fk425_at_epoch(a: dict) -> dict:
    """Rows with proper motion: FK4 at their epoch -> FK4 B1950.0 -> fk425 -> FK5 at their epoch."""
    # Within FK4, from the row's epoch to B1950.0 (the epoch fk425 starts from).
    fk4 = propagate(a["ra"], a["dec"], a["parallax"], a["pm_ra_cosdec"], a["pm_dec"],
                    a["radial_velocity"], B1950_JYEAR - a["epoch"])
    ra4, dec4 = to_spherical(fk4.u)
    # fk425 wants dRA/dt (not times cos dec) in radians per tropical year, parallax in arcsec.
    ra5, dec5, dra5, ddec5, px5, rv5 = erfa.fk425(
        ra4, dec4, fk4.pm_ra_cosdec * MAS_TO_RAD / np.cos(dec4), fk4.pm_dec * MAS_TO_RAD,
        fk4.parallax / 1000.0, fk4.radial_velocity)
    # fk425 answers at epoch J2000.0; back to the row's own epoch, now in FK5.
    fk5 = propagate(np.degrees(ra5), np.degrees(dec5), px5 * 1000.0,
                    dra5 * np.cos(dec5) / MAS_TO_RAD, ddec5 / MAS_TO_RAD, rv5,
                    a["epoch"] - J2000_JYEAR)
    ra, dec = fk5.radec_deg()
    return dict(ra=ra, dec=dec, pm_ra_cosdec=fk5.pm_ra_cosdec, pm_dec=fk5.pm_dec,
                parallax=fk5.parallax, radial_velocity=fk5.radial_velocity)


def _fk45z_at_epoch(ra_deg, dec_deg, epoch_jyear):
    """Rows without proper motion: FK5 J2000.0 place of a star at rest in FK5 (fk45z)."""
    besselian_epoch = erfa.epb(*erfa.epj2jd(epoch_jyear))
    ra5, dec5 = erfa.fk45z(np.radians(ra_deg), np.radians(dec_deg), besselian_epoch)
    return np.degrees(ra5), np.degrees(dec5)


def _to_fk4_b1950(equinox: str, a: dict) -> dict:
    """Rows at another FK4 equinox carried to equinox B1950.0 within FK4 (astropy)."""
    r0, p0, q0 = tangent_triad(np.radians(a["ra"]), np.radians(a["dec"]))
    step = (p0 * a["pm_ra_cosdec"] + q0 * a["pm_dec"]) * (MAS_TO_RAD * MOTION_STEP_YEARS)
    # The position and the positions a year either side along the proper motion.
    points = np.concatenate((r0, r0 + step, r0 - step), axis=1)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # ERFA "dubious year" for equinoxes far from today
        moved = FK4(CartesianRepresentation(points * u.one), representation_type="cartesian",
                    equinox=Time(equinox)).transform_to(FK4(equinox=Time(FK4_EQUINOX)))
    xyz = moved.cartesian.xyz.to_value(u.one)
    xyz = xyz / np.sqrt((xyz * xyz).sum(axis=0))
    n = r0.shape[1]
    centre, ahead, behind = xyz[:, :n], xyz[:, n:2 * n], xyz[:, 2 * n:]
    p_t, q_t = triad_of(centre)
    velocity = (ahead - behind) / (2.0 * MOTION_STEP_YEARS * MAS_TO_RAD)
    ra, dec = to_spherical(centre)
    return dict(a, ra=np.degrees(ra), dec=np.degrees(dec), pm_ra_cosdec=dot(p_t, velocity),
                pm_dec=dot(q_t, velocity))
