"""Position uncertainty at another epoch: the error ellipse of the propagated position.

Linear propagation of the catalogue covariance, C_t = J C_0 J^T (Hipparcos Vol. 1,
sec. 1.5.5), see spacemotion.propagate_covariance.

An unknown error is not a zero error: where a row gives its position errors but not its
proper-motion errors (a Gaia two-parameter solution, a catalogue without motion errors), the
ellipse away from the catalogue epoch holds the position errors only and is marked as a lower
bound (`error_lower_bound`).
"""
from __future__ import annotations

import numpy as np

from .spacemotion import error_ellipse, propagate_covariance
from .targets import Targets

CHUNK_SIZE = 32768
POSITION_ERROR_COLUMNS = ("ra_error", "dec_error")
MOTION_ERROR_COLUMNS = POSITION_ERROR_COLUMNS + ("pm_ra_cosdec_error", "pm_dec_error")
ELLIPSE_COLUMNS = ("error_major", "error_minor", "error_pa", "error_lower_bound")


def errors_known(targets: Targets, columns) -> np.ndarray:
    """Per target: True where every one of the error columns is given (finite)."""
    known = np.ones(len(targets), dtype=bool)
    for col in columns:
        values = targets.errors.get(col)
        known &= np.zeros(len(targets), dtype=bool) if values is None else np.isfinite(values)
    return known


def error_ellipse_at(targets: Targets, epoch_jyear) -> dict:
    """Columns error_major, error_minor (mas, 1 sigma), error_pa (deg E of N) at an epoch, and
    error_lower_bound (True where the proper-motion errors are unknown, so the true ellipse
    away from the catalogue epoch is larger than the one given).

    NaN where the catalogue position errors are unknown. epoch_jyear: scalar or per target.
    """
    n = len(targets)
    major, minor, pa = np.full(n, np.nan), np.full(n, np.nan), np.full(n, np.nan)
    lower_bound = np.zeros(n, dtype=bool)
    if targets.has_errors:
        epochs = np.broadcast_to(np.asarray(epoch_jyear, dtype=float), (n,))
        known = errors_known(targets, POSITION_ERROR_COLUMNS)
        # Unknown motion errors count as zero in the covariance: the ellipse is a floor.
        lower_bound = (known & ~errors_known(targets, MOTION_ERROR_COLUMNS)
                       & (epochs != targets.epoch))
        for start in range(0, n, CHUNK_SIZE):
            rows = np.arange(start, min(start + CHUNK_SIZE, n))
            rows = rows[known[rows]]
            if rows.size == 0:
                continue
            t = targets[rows]
            cov = propagate_covariance(t.covariance(), t.ra, t.dec, t.parallax,
                                       t.pm_ra_cosdec, t.pm_dec, t.radial_velocity,
                                       epochs[rows] - t.epoch)
            major[rows], minor[rows], pa[rows] = error_ellipse(cov)
    return {"error_major": major, "error_minor": minor, "error_pa": pa,
            "error_lower_bound": lower_bound}
