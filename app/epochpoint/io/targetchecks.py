"""Checks across a target row's columns, after each cell was read on its own (targetrows.py).

1. The epoch a moving row needs. A position with proper motion means nothing without the
   epoch it was measured at, so an empty `epoch` cell (or no epoch column) on a row with proper
   motion is an error, never a silent J2000.0, unless the file states one epoch for all its
   rows: `# catalogue_epoch: 2016.0` among the comment lines before a CSV header, the meta key
   `catalogue_epoch` in an ECSV header, or an INFO or PARAM named `catalogue_epoch` in a
   VOTable. A row without proper motion keeps J2000.0: its place is the same at every epoch.
2. Parallax of zero or less. Gaia publishes negative parallaxes for distant or faint sources
   (a measurement with its noise; from memory). The row is kept with its distance unknown:
   parallax 0, so no annual parallax and no perspective acceleration, and a radial velocity
   has no effect (as ERFA pmsafe treats a zero or negative parallax: a very distant star). One
   warning per file counts the rows where that changes what the file says: a negative
   parallax, or a zero one beside a radial velocity. (A plain 0, or no parallax, is the usual
   way to say "distance unknown" and needs no word.)
3. Motions beyond any known star's: a radial velocity above 3,000 km/s (the fastest known
   stars, hypervelocity stars, move at about 1,700-1,800 km/s; from memory) or a proper motion
   above 20"/yr (the largest known, Barnard's star, is 10.4"/yr; from memory). Usually a unit
   mistake; one warning per file names the rows.
"""
from __future__ import annotations

import warnings

import numpy as np

from .epochs import parse_epoch
from .errors import InputError, TargetValueWarning

DEFAULT_EPOCH_JYEAR = 2000.0
CATALOGUE_EPOCH_KEY = "catalogue_epoch"
RADIAL_VELOCITY_LIMIT_KM_S = 3000.0
PROPER_MOTION_LIMIT_MAS_YR = 20000.0
# Rows named in a warning; the rest are counted.
ROWS_NAMED = 3


def stated_epoch(raw) -> float | None:
    """The file's one epoch for all rows (Julian year), None when it states none."""
    if raw.catalogue_epoch is None:
        return None
    text, line = raw.catalogue_epoch
    try:
        return parse_epoch(text)
    except ValueError as err:
        raise InputError(raw.path, f"{CATALOGUE_EPOCH_KEY}: {err}", line=line) from None


def fill_epochs(raw, values: dict, note) -> None:
    """values["epoch"] for every row: the cell, else the file's stated epoch, else J2000.0
    for a row without proper motion; a moving row without any goes to note(row, label, msg)."""
    n = len(raw)
    column = raw.columns.get("epoch")
    missing = np.ones(n, dtype=bool) if column is None else column.missing
    epochs = values.get("epoch", np.full(n, DEFAULT_EPOCH_JYEAR)).copy()
    file_epoch = stated_epoch(raw)
    if file_epoch is not None:
        epochs[missing] = file_epoch
    else:
        moving = np.zeros(n, dtype=bool)
        for name in ("pm_ra_cosdec", "pm_dec"):
            if name in values:
                moving |= np.nan_to_num(values[name]) != 0.0
        label = "epoch" if column is None else column.label
        why = ("no epoch column" if column is None else "no epoch given")
        for i in np.flatnonzero(missing & moving):
            note(int(i), label, f"{why} for a target with proper motion (an empty epoch is not "
                                f"taken as J2000.0); give its epoch, or state one for the "
                                f"whole file as {CATALOGUE_EPOCH_KEY}")
        epochs[missing] = DEFAULT_EPOCH_JYEAR
    values["epoch"] = epochs


def _where(raw, names, i: int) -> str:
    name = names[i] if names is not None and names[i] else None
    return f"{raw.row_word} {int(raw.row_numbers[i])}" + (f" ({name})" if name else "")


def warn_about_rows(raw, values: dict, names, keep: np.ndarray) -> None:
    """One warning for parallaxes of zero or less (set to 0 in values: distance unknown) and
    one naming rows whose motion is beyond any known star's, among the kept rows."""
    n = len(raw)
    rv = np.nan_to_num(values.get("radial_velocity", np.zeros(n)))
    parallax = values.get("parallax")
    column = raw.columns.get("parallax")
    if parallax is not None and column is not None:
        given = keep & ~column.missing
        changed = given & ((parallax < 0.0) | ((parallax == 0.0) & (rv != 0.0)))
        count = int(np.count_nonzero(changed))
        if count:
            first = _where(raw, names, int(np.flatnonzero(changed)[0]))
            warnings.warn(f"{raw.path}: {count} target(s) with a parallax of zero or less "
                          f"(first: {first}) taken as at unknown distance: no annual parallax, "
                          "no perspective acceleration, radial velocity without effect",
                          TargetValueWarning, stacklevel=5)
        parallax[given & (parallax < 0.0)] = 0.0
    pm = np.hypot(np.nan_to_num(values.get("pm_ra_cosdec", np.zeros(n))),
                  np.nan_to_num(values.get("pm_dec", np.zeros(n))))
    fast = keep & ((np.abs(rv) > RADIAL_VELOCITY_LIMIT_KM_S) | (pm > PROPER_MOTION_LIMIT_MAS_YR))
    rows = np.flatnonzero(fast)
    if rows.size:
        named = [f"{_where(raw, names, i)}: "
                 + (f"radial velocity {rv[i]:g} km/s" if abs(rv[i]) > RADIAL_VELOCITY_LIMIT_KM_S
                    else f"proper motion {pm[i] / 1000.0:g}\"/yr") for i in rows[:ROWS_NAMED]]
        more = f" and {rows.size - ROWS_NAMED} more" if rows.size > ROWS_NAMED else ""
        warnings.warn(f"{raw.path}: motion beyond any known star's ({'; '.join(named)}{more}); "
                      "check the units (mas/yr, km/s)", TargetValueWarning, stacklevel=5)
