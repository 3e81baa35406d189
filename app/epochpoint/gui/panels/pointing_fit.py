"""The pointing tab's background work: read a samples file, fit the model, place the samples.

Thin calls into io (pointing_samples) and core (pointing_model); runs in a worker thread
(gui.workers) and returns everything the tab shows, so the GUI thread computes nothing.
"""
from __future__ import annotations

import warnings
from dataclasses import dataclass

import numpy as np

from ...core.pointing_model import PointingFit, PoorCoverage, fit_pointing_model
from ...core.pointing_model.mount_frame import altaz_from_hadec, hadec_from_altaz
from ...core.pointing_model.terms import HOUR_ANGLE_MOUNTS, MOUNT_TYPES
from ...io.pointing_samples import PIER_SIDE, read_samples

# The sky-place and mount-reading columns of each mount type, first axis first: hour angle
# and declination for the equatorial and German mounts, azimuth and altitude for alt-az.
AXIS_COLUMNS = {t: (("ha_target", "dec_target"), ("ha_mount", "dec_mount"))
                if t in HOUR_ANGLE_MOUNTS else (("az_target", "alt_target"),
                                                ("az_mount", "alt_mount"))
                for t in MOUNT_TYPES}


@dataclass(frozen=True)
class FittedSamples:
    """A fitted file: the fit and the samples' sky places in both systems (degrees)."""

    path: str
    mount_type: str
    names: list
    first: np.ndarray  # the sky place on the mount's own axes: ha or az
    second: np.ndarray  # dec or alt
    ha: np.ndarray
    dec: np.ndarray
    alt: np.ndarray
    az: np.ndarray
    fit: PointingFit
    # "east"/"west" per sample ("" unknown) when the file gives pier sides, else None.
    pier_side: np.ndarray | None = None


def fit_samples_file(path, mount_type: str, latitude_deg: float) -> FittedSamples:
    """Read `path` (io.pointing_samples; InputError in one line) and fit the default terms;
    a German mount's on each sample's pier side (the file's pier_side column)."""
    samples = read_samples(path, mount_type)
    sky, mount = AXIS_COLUMNS[mount_type]
    equatorial = mount_type in HOUR_ANGLE_MOUNTS
    sides = samples[PIER_SIDE] if equatorial and any(samples[PIER_SIDE]) else None
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", PoorCoverage)  # the notes are in the model
        fit = fit_pointing_model(samples[sky[0]], samples[sky[1]], samples[mount[0]],
                                 samples[mount[1]], mount_type=mount_type,
                                 latitude_deg=latitude_deg, names=samples["name"],
                                 pier_side=sides)
    first, second = samples[sky[0]], samples[sky[1]]
    if equatorial:
        ha, dec = first, second
        alt, az = altaz_from_hadec(ha, dec, latitude_deg)
    else:
        az, alt = first, second
        ha, dec = hadec_from_altaz(alt, az, latitude_deg)
    return FittedSamples(path=str(path), mount_type=mount_type, names=list(samples["name"]),
                         first=first, second=second, ha=np.asarray(ha), dec=np.asarray(dec),
                         alt=np.asarray(alt), az=np.asarray(az), fit=fit,
                         pier_side=None if sides is None else np.asarray(sides, dtype=object))
