"""A fitted pointing model and its use: where the mount's axes must go for a place on the sky.

The model holds term values (arcsec) for one mount type; its offsets (terms.py) are "mount
reading minus sky", evaluated at the mount's own axis readings, as a mount's imperfections
depend on where its axes are. Going from the mount's readings to the sky is then direct,
sky = mount - offsets(mount); going from the sky to the axes is its inverse, found by fixed-
point iteration mount <- sky + offsets(mount), which converges in a few steps because the
offsets change by far less than an arcsecond per arcminute (it stops below 1e-9 deg).

A German equatorial mount (mount_type "german") also needs the pier side of each reading
("east"/"west", pier_sides.py): the terms in its declination axis's frame change sign with
the side (terms.py). Without a side given, a reading is taken on the side a slew to its hour
angle takes (pier_sides.pier_side_for), and a sky place on the side whose commanded hour angle
a firmware choosing by it would take (the side of the place's hour angle, unless the
correction carries the axes across the meridian and the other side's would not); pass the
side when the mount is known to be on the other one (tracking past the meridian). The
equatorial (fork) and alt-az models have no sides and ignore any given.

Angles in degrees at this boundary: equatorial and German (ha, dec), alt-az (az, alt); hour
angle and azimuth wrapped to [-180, 180) and [0, 360).
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .pier_sides import EAST, WEST, side_codes, side_names, side_of
from .terms import HOUR_ANGLE_MOUNTS, TERMS, term_set
from .terms import offsets as term_offsets

ARCSEC_PER_DEG = 3600.0
MAX_ITERATIONS = 30
CONVERGED_DEG = 1e-9


class ModelError(ValueError):
    """A pointing-model file that cannot be used, in one line."""


def wrap_ha(ha_deg):
    """Hour angle in [-180, 180) degrees."""
    return (np.asarray(ha_deg, dtype=float) + 180.0) % 360.0 - 180.0


@dataclass(frozen=True)
class PointingModel:
    """Fitted term values and errors (arcsec) with the fit's figures (see module docstring)."""

    mount_type: str
    latitude: float  # degrees, the site's; tube sag of an equatorial mount depends on it
    values: dict  # term name -> value (arcsec)
    errors: dict = field(default_factory=dict)  # term name -> standard error (arcsec)
    rms_before_arcsec: float = float("nan")
    rms_after_arcsec: float = float("nan")
    samples: int = 0
    rejected: tuple = ()  # names (or row numbers) of the samples left out as outliers
    notes: tuple = ()  # terms dropped and why; coverage warnings

    @property
    def equatorial(self) -> bool:
        """True when the axes are hour angle and declination (equatorial or German)."""
        return self.mount_type in HOUR_ANGLE_MOUNTS

    @property
    def german(self) -> bool:
        """True for a German equatorial mount, whose terms depend on the pier side."""
        return self.mount_type == "german"

    def _terms(self):
        return term_set(self.mount_type, list(self.values))

    def _side_codes(self, first_deg, pier_side):
        """EAST/WEST per reading for a German model (the slew's side of first_deg when no
        side is given), None for the others."""
        if not self.german:
            return None
        if pier_side is None:
            return side_of(first_deg)
        return side_codes(pier_side, np.shape(first_deg))

    def offsets_arcsec(self, first_deg, second_deg,
                       pier_side=None) -> tuple[np.ndarray, np.ndarray]:
        """Mount reading minus sky (arcsec) at mount readings (ha, dec) or (az, alt); a German
        model on the readings' pier sides (see module docstring)."""
        first_deg = np.asarray(first_deg, dtype=float)
        codes = self._side_codes(first_deg, pier_side)
        return self._offsets(first_deg, second_deg, codes)

    def _offsets(self, first_deg, second_deg, codes):
        terms = self._terms()
        sign = None if codes is None else np.where(codes == EAST, 1.0, -1.0)
        return term_offsets(terms, [self.values[t.name] for t in terms],
                            np.radians(first_deg), np.radians(second_deg),
                            np.radians(self.latitude), sign)

    def sky_from_mount(self, first_deg, second_deg,
                       pier_side=None) -> tuple[np.ndarray, np.ndarray]:
        """The sky place (ha, dec) or (az, alt) the mount sees at these axis readings (a
        German mount's on its reported pier sides, see module docstring)."""
        first_deg = np.asarray(first_deg, dtype=float)
        second_deg = np.asarray(second_deg, dtype=float)
        d1, d2 = self.offsets_arcsec(first_deg, second_deg, pier_side)
        return self._wrap(first_deg - d1 / ARCSEC_PER_DEG), second_deg - d2 / ARCSEC_PER_DEG

    def mount_from_sky(self, first_deg, second_deg,
                       pier_side=None) -> tuple[np.ndarray, np.ndarray]:
        """Where the axes must read, (ha, dec) or (az, alt), to see this sky place (a German
        mount's on the given pier sides, or the slew's: see module docstring)."""
        m1, m2, _ = self.mount_from_sky_with_side(first_deg, second_deg, pier_side)
        return m1, m2

    def mount_from_sky_with_side(self, first_deg, second_deg, pier_side=None):
        """(first, second, pier side) of mount_from_sky: the side as an object array of
        "east"/"west" for a German model (given or chosen, see module docstring), else None."""
        sky1 = np.asarray(first_deg, dtype=float)
        sky2 = np.asarray(second_deg, dtype=float)
        if not self.german:
            m1, m2 = self._solve(sky1, sky2, None)
            return m1, m2, None
        if pier_side is not None:
            codes = side_codes(pier_side, np.broadcast_shapes(sky1.shape, sky2.shape))
            m1, m2 = self._solve(sky1, sky2, codes)
        else:
            codes, m1, m2 = self._slew_side(sky1, sky2)
        return m1, m2, side_names(codes)

    def _slew_side(self, sky1, sky2):
        """Side codes and axes for sky places when no side is given: the side of the place's
        hour angle, unless its axes land across the meridian and the other side's do not."""
        shape = np.broadcast_shapes(sky1.shape, sky2.shape)
        east = self._solve(sky1, sky2, np.full(shape, EAST))
        west = self._solve(sky1, sky2, np.full(shape, WEST))
        fits_east = side_of(east[0]) == EAST
        fits_west = side_of(west[0]) == WEST
        codes = np.broadcast_to(side_of(sky1), shape).copy()
        codes[(codes == EAST) & ~fits_east & fits_west] = WEST
        codes[(codes == WEST) & ~fits_west & fits_east] = EAST
        on_east = codes == EAST
        return codes, np.where(on_east, east[0], west[0]), np.where(on_east, east[1], west[1])

    def _solve(self, sky1, sky2, codes):
        """Axes (first, second) for sky places on fixed sides (codes, or None)."""
        m1, m2 = np.array(sky1, dtype=float), np.array(sky2, dtype=float)
        # Fixed point of mount = sky + offsets(mount).
        for _ in range(MAX_ITERATIONS):
            d1, d2 = self._offsets(m1, m2, codes)
            n1, n2 = sky1 + d1 / ARCSEC_PER_DEG, sky2 + d2 / ARCSEC_PER_DEG
            step = max(np.max(np.abs(n1 - m1), initial=0.0), np.max(np.abs(n2 - m2), initial=0.0))
            m1, m2 = n1, n2
            if step < CONVERGED_DEG:
                break
        return self._wrap(m1), m2

    def _wrap(self, first_deg):
        return wrap_ha(first_deg) if self.equatorial else first_deg % 360.0

    def to_dict(self) -> dict:
        """The model file's content: mount_type, latitude, terms, rms figures, samples,
        rejected (and notes)."""
        return {
            "mount_type": self.mount_type,
            "latitude": self.latitude,
            "terms": {name: {"value_arcsec": round(float(v), 4),
                             "error_arcsec": round(float(self.errors.get(name, float("nan"))), 4)}
                      for name, v in self.values.items()},
            "rms_before_arcsec": round(float(self.rms_before_arcsec), 4),
            "rms_after_arcsec": round(float(self.rms_after_arcsec), 4),
            "samples": int(self.samples),
            "rejected": list(self.rejected),
            "notes": list(self.notes),
        }

    @classmethod
    def from_dict(cls, data, source: str = "model") -> "PointingModel":
        """A model from a file's content; ModelError naming the field that is wrong."""
        def fail(where, message):
            raise ModelError(f"{source}: {where}: {message}")

        if not isinstance(data, dict):
            fail("top level", "expected a JSON object")
        mount_type = data.get("mount_type")
        if mount_type not in TERMS:
            fail("mount_type", f"{mount_type!r} is not one of {', '.join(TERMS)}")
        latitude = data.get("latitude")
        if not isinstance(latitude, (int, float)) or not -90.0 <= latitude <= 90.0:
            fail("latitude", f"{latitude!r} is not a latitude in [-90, 90] degrees")
        terms = data.get("terms")
        if not isinstance(terms, dict):
            fail("terms", "expected an object of term name -> {value_arcsec, error_arcsec}")
        values, errors = {}, {}
        for name, entry in terms.items():
            if name not in TERMS[mount_type]:
                fail(f"terms.{name}", f"not a term of the {mount_type} model")
            value = entry.get("value_arcsec") if isinstance(entry, dict) else None
            if not isinstance(value, (int, float)) or not np.isfinite(value):
                fail(f"terms.{name}.value_arcsec", f"{value!r} is not a number")
            values[name] = float(value)
            error = entry.get("error_arcsec", float("nan"))
            errors[name] = float(error) if isinstance(error, (int, float)) else float("nan")
        return cls(mount_type=mount_type, latitude=float(latitude), values=values,
                   errors=errors,
                   rms_before_arcsec=float(data.get("rms_before_arcsec", float("nan"))),
                   rms_after_arcsec=float(data.get("rms_after_arcsec", float("nan"))),
                   samples=int(data.get("samples", 0)),
                   rejected=tuple(data.get("rejected", ())), notes=tuple(data.get("notes", ())))
