"""Columnar target lists: the catalogue astrometry every computation starts from.

A `Targets` holds one numpy array per quantity, so ten targets and ten million are handled
alike. Units are fixed: ra, dec in degrees (ICRS), epoch as a Julian year (TDB), proper motions
in mas/yr (`pm_ra_cosdec` already includes cos dec), parallax in mas, radial velocity in km/s.
Missing motion means zero.

Optional 1-sigma errors (mas, mas/yr, km/s) and correlation coefficients follow the Gaia
archive's convention: `ra_error` is the error in ra*cos(dec).
"""
from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .spacemotion import known_parallax

# The five astrometric parameters plus radial velocity, in the order used for covariances.
ASTROMETRIC_PARAMETERS = ("ra", "dec", "parallax", "pm_ra_cosdec", "pm_dec", "radial_velocity")
ERROR_COLUMNS = tuple(f"{p}_error" for p in ASTROMETRIC_PARAMETERS)
CORRELATION_COLUMNS = tuple(
    f"{a}_{b}_corr"
    for i, a in enumerate(ASTROMETRIC_PARAMETERS[:5])
    for b in ASTROMETRIC_PARAMETERS[i + 1 : 5]
)
MOTION_COLUMNS = ("pm_ra_cosdec", "pm_dec", "parallax", "radial_velocity")


class TargetError(ValueError):
    """A target value that cannot be used, naming the column and the target's index."""

    def __init__(self, column: str, index: int | None, message: str):
        self.column, self.index = column, index
        where = f"target {index + 1}, " if index is not None else ""
        super().__init__(f"{where}column {column}: {message}")


def _column(value, n: int, column: str) -> np.ndarray:
    """Broadcast a scalar or array to a float64 column of length n."""
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise TargetError(column, None, "values must be numbers") from None
    if arr.ndim == 0:
        arr = np.full(n, float(arr))
    if arr.shape != (n,):
        raise TargetError(column, None, f"expected {n} values, got shape {arr.shape}")
    return arr


def _first_bad(mask: np.ndarray) -> int:
    return int(np.flatnonzero(mask)[0])


@dataclass(frozen=True, eq=False)
class Targets:
    """A columnar list of targets with their catalogue astrometry (see module docstring)."""

    name: np.ndarray | None  # None: the targets are called T1, T2, ... (made on demand)
    ra: np.ndarray
    dec: np.ndarray
    epoch: np.ndarray
    pm_ra_cosdec: np.ndarray
    pm_dec: np.ndarray
    parallax: np.ndarray
    radial_velocity: np.ndarray
    # Optional errors and correlations: column name -> array (absent means unknown).
    errors: dict = field(default_factory=dict)
    # Per-target planning fields carried along untouched (priority, exposure, notes, ...).
    extra: dict = field(default_factory=dict)

    @classmethod
    def from_columns(cls, ra, dec, pm_ra_cosdec=0.0, pm_dec=0.0, parallax=0.0,
                     radial_velocity=0.0, epoch=2000.0, name=None, errors=None, extra=None):
        """Build and validate targets from arrays or scalars (scalars apply to every target)."""
        ra_arr = np.atleast_1d(np.asarray(ra, dtype=float))
        n = ra_arr.shape[0]
        cols = {"ra": ra_arr}
        for col, value in (("dec", dec), ("epoch", epoch), ("pm_ra_cosdec", pm_ra_cosdec),
                           ("pm_dec", pm_dec), ("parallax", parallax),
                           ("radial_velocity", radial_velocity)):
            cols[col] = _column(value, n, col)
        if name is None:
            names = None
        else:
            names = np.asarray([str(x) for x in np.atleast_1d(np.asarray(name, dtype=object))],
                               dtype=object)
            if names.shape != (n,):
                raise TargetError("name", None, f"expected {n} names, got {names.shape[0]}")
        err_cols = {k: _column(v, n, k) for k, v in (errors or {}).items()}
        extra_cols = {k: np.asarray(v) for k, v in (extra or {}).items()}
        targets = cls(name=names, errors=err_cols, extra=extra_cols, **cols)
        targets.validate()
        return targets

    def validate(self) -> None:
        """Raise TargetError for the first value outside its physical range."""
        for col in ("ra", "dec", "epoch") + MOTION_COLUMNS:
            bad = ~np.isfinite(getattr(self, col))
            if bad.any():
                raise TargetError(col, _first_bad(bad), "value is not a finite number")
        checks = (
            ("ra", (self.ra < 0.0) | (self.ra >= 360.0), "must be in [0, 360) degrees"),
            ("dec", np.abs(self.dec) > 90.0, "must be in [-90, +90] degrees"),
            ("parallax", self.parallax < 0.0, "must not be negative"),
            ("epoch", (self.epoch < -3000.0) | (self.epoch > 5000.0),
             "Julian epoch outside -3000..5000"),
        )
        for col, bad, message in checks:
            if bad.any():
                raise TargetError(col, _first_bad(bad), message)
        for col, values in self.errors.items():
            if col.endswith("_corr"):
                bad = np.isfinite(values) & (np.abs(values) > 1.0)
                message = "correlation must be in [-1, 1]"
            else:
                bad = np.isfinite(values) & (values < 0.0)
                message = "error must not be negative"
            if bad.any():
                raise TargetError(col, _first_bad(bad), message)

    def names(self) -> np.ndarray:
        """Target names as an object array (T1, T2, ... where none were given)."""
        if self.name is None:
            return _default_names(np.arange(len(self)))
        return np.asarray(self.name, dtype=object)

    def astrometry(self, rows=slice(None)) -> tuple:
        """(ra, dec, parallax, pm_ra_cosdec, pm_dec, radial_velocity, epoch) arrays for rows."""
        return (self.ra[rows], self.dec[rows], self.parallax[rows], self.pm_ra_cosdec[rows],
                self.pm_dec[rows], self.radial_velocity[rows], self.epoch[rows])

    def __len__(self) -> int:
        return self.ra.shape[0]

    def __getitem__(self, index) -> "Targets":
        """A subset of targets (integer array, slice or boolean mask)."""
        if isinstance(index, (int, np.integer)):
            index = [index]
        pick = lambda arr: np.asarray(arr)[index]  # noqa: E731
        return Targets(
            name=pick(self.names()) if self.name is not None else _default_names(
                np.arange(len(self))[index]),
            ra=pick(self.ra), dec=pick(self.dec), epoch=pick(self.epoch),
            pm_ra_cosdec=pick(self.pm_ra_cosdec), pm_dec=pick(self.pm_dec),
            parallax=pick(self.parallax), radial_velocity=pick(self.radial_velocity),
            errors={k: pick(v) for k, v in self.errors.items()},
            extra={k: pick(v) for k, v in self.extra.items()},
        )

    @property
    def distance_unknown(self) -> np.ndarray:
        """True where no physical distance is known: parallax 0, or a space velocity of half
        the speed of light or more (spacemotion.known_parallax); no annual parallax applies."""
        known = known_parallax(self.parallax, self.pm_ra_cosdec, self.pm_dec,
                               self.radial_velocity)
        return known == 0.0

    @property
    def has_errors(self) -> bool:
        """True when at least the position and proper-motion errors are known."""
        needed = ("ra_error", "dec_error", "pm_ra_cosdec_error", "pm_dec_error")
        return all(k in self.errors for k in needed)

    def covariance(self) -> np.ndarray:
        """The (n, 6, 6) covariance of (ra*, dec, parallax, pmra*, pmdec, rv), unknowns as zero.

        Units mas, mas/yr, km/s. Missing correlations count as zero, missing errors as zero.
        """
        n = len(self)
        sigma = np.zeros((n, 6))
        for i, col in enumerate(ERROR_COLUMNS):
            if col in self.errors:
                sigma[:, i] = np.nan_to_num(self.errors[col])
        corr = np.broadcast_to(np.eye(6), (n, 6, 6)).copy()
        for col in CORRELATION_COLUMNS:
            if col in self.errors:
                a, b = _corr_pair(col)
                i, j = ASTROMETRIC_PARAMETERS.index(a), ASTROMETRIC_PARAMETERS.index(b)
                rho = np.nan_to_num(self.errors[col])
                corr[:, i, j] = corr[:, j, i] = rho
        return corr * sigma[:, :, None] * sigma[:, None, :]


def _default_names(indices: np.ndarray) -> np.ndarray:
    """Names T1, T2, ... for 0-based target indices."""
    return np.array([f"T{i + 1}" for i in indices], dtype=object)


def _corr_pair(col: str) -> tuple[str, str]:
    """Split 'ra_pm_ra_cosdec_corr' into ('ra', 'pm_ra_cosdec')."""
    stem = col[: -len("_corr")]
    for a in ASTROMETRIC_PARAMETERS:
        if stem.startswith(a + "_") and stem[len(a) + 1 :] in ASTROMETRIC_PARAMETERS:
            return a, stem[len(a) + 1 :]
    raise KeyError(col)


def concatenate(parts) -> Targets:
    """One Targets from several, in order. A column some parts lack is filled: errors and
    numeric extras with NaN (unknown), text extras with '' (not given)."""
    parts = [p for p in parts if len(p)]
    if len(parts) == 1:
        return parts[0]
    join = lambda get: np.concatenate([np.asarray(get(p)) for p in parts])  # noqa: E731
    errors = {k: join(lambda p: p.errors.get(k, np.full(len(p), np.nan)))
              for k in dict.fromkeys(k for p in parts for k in p.errors)}
    extra = {}
    for k in dict.fromkeys(k for p in parts for k in p.extra):
        numeric = all(np.asarray(p.extra[k]).dtype.kind in "biuf" for p in parts if k in p.extra)
        blank = np.nan if numeric else ""
        extra[k] = join(lambda p: p.extra[k] if k in p.extra else
                        np.full(len(p), blank, dtype=float if numeric else object))
        if not numeric:
            extra[k] = extra[k].astype(object)
    names = None if all(p.name is None for p in parts) else join(lambda p: p.names())
    return Targets.from_columns(
        ra=join(lambda p: p.ra), dec=join(lambda p: p.dec), epoch=join(lambda p: p.epoch),
        pm_ra_cosdec=join(lambda p: p.pm_ra_cosdec), pm_dec=join(lambda p: p.pm_dec),
        parallax=join(lambda p: p.parallax), radial_velocity=join(lambda p: p.radial_velocity),
        name=names, errors=errors, extra=extra)
