"""Epochpoint: epoch-corrected positions, night plans and telescope hand-off.

The public Python API (a contract: scripts depend on these names)::

    import epochpoint as ep
    t = ep.Targets.from_columns(ra=..., dec=..., pm_ra_cosdec=..., pm_dec=..., parallax=...,
                                radial_velocity=..., epoch=2016.0, name=None)
    t = ep.read_targets("file.csv")
    site = ep.Site(latitude=..., longitude=..., height=..., pressure=..., temperature=...,
                   humidity=..., wavelength=...)
    res = ep.positions(t, site, "2027-01-20T23:10:00Z")
    res["alt"]
    night = ep.plan(t, site, "2027-01-19", min_altitude=20.0, moon_separation=30.0)
    night.to_json()   # the same data as `epochpoint plan --format json`
"""
from .core import (Positions, Site, SiteError, StaleEarthOrientation, TargetError, Targets,
                   TimeInputError, earth_orientation_status, make_context, positions)
from .core.drift import drift
from .core.limits import HorizonMask, Interlocks, MountLimits
from .core.night import night_boundaries
from .core.plan import Plan, plan

__version__ = "0.1.0"


def read_targets(path, skip_bad_rows=False, on_skip=None):
    """Read targets from CSV, ECSV or VOTable (see epochpoint.io.read_targets)."""
    from .io import read_targets as _read

    return _read(path, skip_bad_rows=skip_bad_rows, on_skip=on_skip)


def read_site(spec):
    """A Site from a TOML site file or a 'LAT,LON,HEIGHT' string (see epochpoint.io.read_site)."""
    from .io import read_site as _read

    return _read(spec)


def write_targets(targets, path, format=None):
    """Write targets to CSV, ECSV or VOTable, atomically (see epochpoint.io.write_targets)."""
    from .io import write_targets as _write

    return _write(targets, path, format=format)


__all__ = ["HorizonMask", "Interlocks", "MountLimits", "Plan", "night_boundaries", "plan",
           "Positions", "Site", "SiteError", "StaleEarthOrientation", "TargetError", "Targets",
           "TimeInputError", "drift", "earth_orientation_status", "make_context", "positions",
           "read_site", "read_targets", "write_targets", "__version__"]
