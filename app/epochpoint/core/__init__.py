"""The Epochpoint engine: pure numpy/astropy astrometry, no Qt, vectorized over targets."""
from .context import AstrometryContext, make_context
from .positions import Positions, positions
from .site import Site, SiteError
from .targets import TargetError, Targets
from .timescale import (StaleEarthOrientation, TimeInputError, earth_orientation_status,
                        iso_z, parse_time)

__all__ = ["AstrometryContext", "make_context", "Positions", "positions", "Site", "SiteError",
           "TargetError", "Targets", "StaleEarthOrientation", "TimeInputError",
           "earth_orientation_status", "iso_z", "parse_time"]
