"""Drift: how far each target has moved from its catalogue position, and when it crossed (or
will cross) a tolerance such as a field of view or a slit width.

Drift is the angular separation between the catalogue position (at the catalogue epoch) and
the rigorously propagated barycentric position (spacemotion.py) at the instant. Its rate is
the time derivative of that separation (central difference over +-1 day). The crossing epoch
solves drift(t) = tolerance by Newton's method from the linear estimate tolerance / |mu|.
Its 1-sigma uncertainty is the position error along the direction of motion at the crossing
divided by the drift rate (linear error propagation, Hipparcos Vol. 1, sec. 1.5.5).
"""
from __future__ import annotations

import numpy as np
from astropy.time import Time

from .columns import ColumnTable
from .constants import RAD_TO_ARCSEC
from .context import make_context
from .ranges import checked
from .spacemotion import propagate, propagate_covariance
from .uncertainty import MOTION_ERROR_COLUMNS, error_ellipse_at, errors_known
from .targets import Targets
from .timescale import iso_z, quiet_erfa
from .vectors import separation, tangent_triad

_RATE_STEP_YEARS = 1.0 / 365.25
_NEWTON_ITERATIONS = 4
# No drift exceeds half a circle: a larger tolerance can never be crossed.
MAX_TOLERANCE_ARCSEC = 648000.0
# Crossings further than this from the catalogue epoch are reported as none (a slow star and a
# wide tolerance would otherwise ask the propagation for astronomically large times).
CROSSING_HORIZON_YEARS = 1.0e6

DRIFT_UNITS = {"drift": "arcsec", "drift_rate": "arcsec/yr", "crossing_sigma_days": "d",
               "error_major": "mas", "error_minor": "mas", "error_pa": "deg"}


def _drift_arcsec(t: Targets, r_catalogue: np.ndarray, dt_years) -> np.ndarray:
    prop = propagate(t.ra, t.dec, t.parallax, t.pm_ra_cosdec, t.pm_dec, t.radial_velocity,
                     dt_years)
    return separation(r_catalogue, prop.u) * RAD_TO_ARCSEC


def _drift_and_rate(t: Targets, r_catalogue, dt_years):
    drift = _drift_arcsec(t, r_catalogue, dt_years)
    ahead = _drift_arcsec(t, r_catalogue, dt_years + _RATE_STEP_YEARS)
    behind = _drift_arcsec(t, r_catalogue, dt_years - _RATE_STEP_YEARS)
    return drift, (ahead - behind) / (2.0 * _RATE_STEP_YEARS)


def crossing_epochs(t: Targets, tolerance_arcsec: float) -> np.ndarray:
    """Julian epoch at which each target's drift equals the tolerance (NaN if it never moves)."""
    r_catalogue, _, _ = tangent_triad(np.radians(t.ra), np.radians(t.dec))
    total_pm_arcsec = np.hypot(t.pm_ra_cosdec, t.pm_dec) / 1000.0
    moving = total_pm_arcsec > 0.0
    dt = np.where(moving, tolerance_arcsec / np.where(moving, total_pm_arcsec, 1.0), np.nan)
    dt[~(np.abs(dt) <= CROSSING_HORIZON_YEARS)] = np.nan
    # Newton's method on drift(dt) - tolerance; converges in 2-3 steps for real stars.
    for _ in range(_NEWTON_ITERATIONS):
        drift, rate = _drift_and_rate(t, r_catalogue, np.nan_to_num(dt))
        with np.errstate(divide="ignore", invalid="ignore"):
            dt = dt - (drift - tolerance_arcsec) / rate
        dt[~(np.abs(dt) <= CROSSING_HORIZON_YEARS)] = np.nan
    return t.epoch + dt


def _crossing_sigma_days(t: Targets, crossing: np.ndarray) -> np.ndarray:
    """1-sigma uncertainty (days) of the crossing epoch from the astrometric errors.

    Everything is evaluated at the crossing, not at the instant asked: the position error
    along the direction of motion there, divided by the drift rate there. NaN (unknown) where
    there is no crossing or the row's position or proper-motion errors are unknown.
    """
    sigma = np.full(len(t), np.nan)
    if not t.has_errors:
        return sigma
    known = np.isfinite(crossing) & errors_known(t, MOTION_ERROR_COLUMNS)
    if not known.any():
        return sigma
    k = t[np.flatnonzero(known)]
    dt = crossing[known] - k.epoch
    r_catalogue, _, _ = tangent_triad(np.radians(k.ra), np.radians(k.dec))
    # The drift rate at the crossing (negative for a crossing before the catalogue epoch).
    _, rate = _drift_and_rate(k, r_catalogue, dt)
    cov = propagate_covariance(k.covariance(), k.ra, k.dec, k.parallax, k.pm_ra_cosdec,
                               k.pm_dec, k.radial_velocity, dt)
    prop = propagate(k.ra, k.dec, k.parallax, k.pm_ra_cosdec, k.pm_dec, k.radial_velocity, dt)
    # The direction of motion on the sky at the crossing.
    along = np.stack((prop.pm_ra_cosdec, prop.pm_dec), axis=-1)
    along /= np.linalg.norm(along, axis=-1, keepdims=True)
    var_along = np.einsum("ni,nij,nj->n", along, cov[:, :2, :2], along)
    with np.errstate(divide="ignore", invalid="ignore"):
        sigma_k = np.sqrt(var_along) / (np.abs(rate) * 1000.0) * 365.25
    sigma[known] = np.where(np.abs(rate) > 0.0, sigma_k, np.nan)
    return sigma


def _jyear_to_iso(epochs: np.ndarray) -> list:
    return iso_z(Time(epochs, format="jyear", scale="tdb"))


def drift(targets: Targets, when, tolerance_arcsec: float) -> ColumnTable:
    """Drift, drift rate, tolerance crossing and position uncertainty of every target at `when`.

    Columns: name, drift (arcsec), drift_rate (arcsec/yr), over_tolerance (bool), crossing
    (ISO 8601 UTC or None), crossing_sigma_days, and error_major/minor (mas)/pa (deg) at `when`
    where errors are known. Filter on over_tolerance for the targets that need attention.
    """
    tolerance = checked(tolerance_arcsec, "tolerance", 0.0, MAX_TOLERANCE_ARCSEC, lo_open=True,
                        hi_open=True, unit="arcsec")
    ctx = make_context(when)
    r_catalogue, _, _ = tangent_triad(np.radians(targets.ra), np.radians(targets.dec))
    dt_now = ctx.epoch_jyear - targets.epoch
    drift_now, rate = _drift_and_rate(targets, r_catalogue, dt_now)
    crossing = crossing_epochs(targets, tolerance)
    crossing_iso = np.array([None] * len(targets), dtype=object)
    finite = np.isfinite(crossing) & (np.abs(crossing) < 1e4)
    if finite.any():
        # Crossings centuries away make ERFA doubt the leap-second table; dates suffice.
        crossing_iso[finite] = quiet_erfa(_jyear_to_iso)(crossing[finite])
    columns = {"name": targets.names(), "drift": drift_now,
               "drift_rate": rate, "over_tolerance": drift_now > tolerance,
               "crossing": crossing_iso,
               "crossing_sigma_days": _crossing_sigma_days(targets, crossing)}
    if targets.has_errors:
        columns.update(error_ellipse_at(targets, ctx.epoch_jyear))
    meta = {"time": iso_z(ctx.time), "tolerance_arcsec": tolerance,
            "targets_distance_unknown": int(np.count_nonzero(targets.distance_unknown))}
    return ColumnTable(columns, meta, DRIFT_UNITS)
