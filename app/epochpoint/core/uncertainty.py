"""Position uncertainty at another epoch: the error ellipse of the propagated position.

Linear propagation of the catalogue covariance, C_t = J C_0 J^T (Hipparcos Vol. 1,
sec. 1.5.5), see spacemotion.propagate_covariance.
"""
from __future__ import annotations

import numpy as np

from .spacemotion import error_ellipse, propagate_covariance
from .targets import Targets

CHUNK_SIZE = 32768


def error_ellipse_at(targets: Targets, epoch_jyear) -> dict:
    """Columns error_major, error_minor (mas, 1 sigma) and error_pa (deg E of N) at an epoch.

    NaN where the catalogue position errors are unknown. epoch_jyear: scalar or per target.
    """
    n = len(targets)
    major, minor, pa = np.full(n, np.nan), np.full(n, np.nan), np.full(n, np.nan)
    if targets.has_errors:
        epochs = np.broadcast_to(np.asarray(epoch_jyear, dtype=float), (n,))
        known = (np.isfinite(targets.errors["ra_error"])
                 & np.isfinite(targets.errors["dec_error"]))
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
    return {"error_major": major, "error_minor": minor, "error_pa": pa}
