"""A fitted pointing model and its use: where the mount's axes must go for a place on the sky.

The model holds term values (arcsec) for one mount type; its offsets (terms.py) are "mount
reading minus sky", evaluated at the mount's own axis readings, as a mount's imperfections
depend on where its axes are. Going from the mount's readings to the sky is then direct,
sky = mount - offsets(mount); going from the sky to the axes is its inverse, found by fixed-
point iteration mount <- sky + offsets(mount), which converges in a few steps because the
offsets change by far less than an arcsecond per arcminute (it stops below 1e-9 deg).

Angles in degrees at this boundary: equatorial (ha, dec), alt-az (az, alt); hour angle and
azimuth wrapped to [-180, 180) and [0, 360).
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .terms import TERMS, term_set
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

    def _terms(self):
        return term_set(self.mount_type, list(self.values))

    def offsets_arcsec(self, first_deg, second_deg) -> tuple[np.ndarray, np.ndarray]:
        """Mount reading minus sky (arcsec) at mount readings (ha, dec) or (az, alt)."""
        terms = self._terms()
        return term_offsets(terms, [self.values[t.name] for t in terms],
                            np.radians(first_deg), np.radians(second_deg),
                            np.radians(self.latitude))

    def sky_from_mount(self, first_deg, second_deg) -> tuple[np.ndarray, np.ndarray]:
        """The sky place (ha, dec) or (az, alt) the mount sees at these axis readings."""
        first_deg = np.asarray(first_deg, dtype=float)
        second_deg = np.asarray(second_deg, dtype=float)
        d1, d2 = self.offsets_arcsec(first_deg, second_deg)
        return self._wrap(first_deg - d1 / ARCSEC_PER_DEG), second_deg - d2 / ARCSEC_PER_DEG

    def mount_from_sky(self, first_deg, second_deg) -> tuple[np.ndarray, np.ndarray]:
        """Where the axes must read, (ha, dec) or (az, alt), to see this sky place."""
        sky1 = np.asarray(first_deg, dtype=float)
        sky2 = np.asarray(second_deg, dtype=float)
        m1, m2 = sky1.copy(), sky2.copy()
        # Fixed point of mount = sky + offsets(mount).
        for _ in range(MAX_ITERATIONS):
            d1, d2 = self.offsets_arcsec(m1, m2)
            n1, n2 = sky1 + d1 / ARCSEC_PER_DEG, sky2 + d2 / ARCSEC_PER_DEG
            step = max(np.max(np.abs(n1 - m1), initial=0.0), np.max(np.abs(n2 - m2), initial=0.0))
            m1, m2 = n1, n2
            if step < CONVERGED_DEG:
                break
        return self._wrap(m1), m2

    def _wrap(self, first_deg):
        return wrap_ha(first_deg) if self.mount_type == "equatorial" else first_deg % 360.0

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
