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
    found = ep.events(t, site, "2027-01-19", 30)   # timed transits and eclipses
"""
import importlib

from .core import (Positions, Site, SiteError, StaleEarthOrientation, TargetError, Targets,
                   TimeInputError, earth_orientation_status, make_context, positions)
from .core.limits import HorizonMask, Interlocks, MountLimits

__version__ = "0.1.0"
# Imported when first used, so that a positions call does not load the night planner.
_LAZY = {"drift": ".core.drift", "night_boundaries": ".core.night", "Plan": ".core.plan",
         "plan": ".core.plan"}


def __getattr__(name):
    if name not in _LAZY:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    value = getattr(importlib.import_module(_LAZY[name], __name__), name)
    globals()[name] = value
    return value


def read_targets(path, skip_bad_rows=False, on_skip=None):
    """Read targets from CSV, ECSV or VOTable (see epochpoint.io.read_targets)."""
    from .io import read_targets as _read

    return _read(path, skip_bad_rows=skip_bad_rows, on_skip=on_skip)


def read_site(spec):
    """A Site from a TOML site file or a 'LAT,LON,HEIGHT' string (see epochpoint.io.read_site)."""
    from .io import read_site as _read

    return _read(spec)


def events(targets, site, start, nights, darkness="astronomical", min_altitude=None,
           include_all=False):
    """The periodic events (event_epoch, event_period, event_duration columns) touching the
    darkness of `nights` nights from date `start` at the site, timed at the site from BJD_TDB
    (see epochpoint.core.event_search); `.to_json()` gives what `epochpoint events --format
    json` writes."""
    from .core.event_search import find_events
    from .io.eventfields import event_ephemerides

    return find_events(targets, event_ephemerides(targets), site, start, nights,
                       darkness=darkness, min_altitude=min_altitude, include_all=include_all)


def write_targets(targets, path, format=None):
    """Write targets to CSV, ECSV or VOTable, atomically (see epochpoint.io.write_targets)."""
    from .io import write_targets as _write

    return _write(targets, path, format=format)


__all__ = ["HorizonMask", "Interlocks", "MountLimits", "Plan", "night_boundaries", "plan",
           "Positions", "Site", "SiteError", "StaleEarthOrientation", "TargetError", "Targets",
           "TimeInputError", "drift", "earth_orientation_status", "events", "make_context", "positions",
           "read_site", "read_targets", "write_targets", "__version__"]
