"""Test stars for the mount tests and their reference places from astropy (test-only).

Not a test module (no test_ prefix): tests/mount and tests/gui import it. The motion is
invented; astropy's apply_space_motion followed by TETE (apparent place of date) and AltAz
is the outside reference the commanded coordinates are checked against."""
from __future__ import annotations

import numpy as np
from astropy import units as u
from astropy.coordinates import TETE, AltAz, Distance, EarthLocation, SkyCoord
from astropy.time import Time

from epochpoint.core.targets import Targets

MOTION = dict(pm_ra_cosdec=420.0, pm_dec=-310.0, parallax=55.0, radial_velocity=-18.0)


def moving_targets(ra_deg, dec_deg, names) -> Targets:
    """Targets at epoch 2016.0 that all share MOTION."""
    n = len(names)
    return Targets.from_columns(ra=ra_deg, dec=dec_deg, epoch=2016.0, name=names,
                                **{k: np.full(n, v) for k, v in MOTION.items()})


def _moved(ra_deg, dec_deg, when_iso):
    star = SkyCoord(ra=ra_deg * u.deg, dec=dec_deg * u.deg,
                    pm_ra_cosdec=MOTION["pm_ra_cosdec"] * u.mas / u.yr,
                    pm_dec=MOTION["pm_dec"] * u.mas / u.yr,
                    distance=Distance(parallax=MOTION["parallax"] * u.mas),
                    radial_velocity=MOTION["radial_velocity"] * u.km / u.s,
                    obstime=Time(2016.0, format="jyear", scale="tdb"))
    when = Time(when_iso.rstrip("Z"), scale="utc")
    return star.apply_space_motion(new_obstime=when), when


def astropy_apparent(ra_deg, dec_deg, when_iso):
    """Apparent place of date (TETE, geocentre) in degrees."""
    moved, when = _moved(ra_deg, dec_deg, when_iso)
    apparent = moved.transform_to(TETE(obstime=when))
    return apparent.ra.deg, apparent.dec.deg


def astropy_altaz(ra_deg, dec_deg, when_iso, site):
    """Refracted altitude and azimuth in degrees at an epochpoint Site with its weather."""
    moved, when = _moved(ra_deg, dec_deg, when_iso)
    location = EarthLocation.from_geodetic(site.longitude * u.deg, site.latitude * u.deg,
                                           site.height * u.m)
    altaz = moved.transform_to(AltAz(obstime=when, location=location,
                                     pressure=site.pressure * u.hPa,
                                     temperature=site.temperature * u.deg_C,
                                     relative_humidity=site.humidity,
                                     obswl=site.wavelength * u.micron))
    return altaz.alt.deg, altaz.az.deg
