"""The column vocabulary of target files: our names, Gaia archive aliases and default units.

Headers match case-insensitively after stripping spaces. Our canonical names are those of
`Targets` (core/targets.py); the Gaia archive's names (gaia_source: pmra, pmdec, ref_epoch,
source_id, designation, pmra_error, ra_pmra_corr, ...) map onto them. Two optional columns give
the reference frame of a row: `frame` (icrs, fk5, fk4) and `equinox`. Every other column is a
planning field carried along untouched in `Targets.extra`.
"""
from __future__ import annotations

from epochpoint.core.targets import CORRELATION_COLUMNS, ERROR_COLUMNS

ASTROMETRY_COLUMNS = ("ra", "dec", "epoch", "pm_ra_cosdec", "pm_dec", "parallax",
                      "radial_velocity")
FRAME_COLUMNS = ("frame", "equinox")
UNCERTAINTY_COLUMNS = ERROR_COLUMNS + CORRELATION_COLUMNS
# Every column read_targets understands, in the order files are written.
KNOWN_COLUMNS = ("name",) + ASTROMETRY_COLUMNS + UNCERTAINTY_COLUMNS + FRAME_COLUMNS

# Units of the values inside Targets; unitless file columns are taken to be in these.
DEFAULT_UNITS = {
    "ra": "deg", "dec": "deg", "epoch": "yr",
    "pm_ra_cosdec": "mas / yr", "pm_dec": "mas / yr", "parallax": "mas",
    "radial_velocity": "km / s",
    "ra_error": "mas", "dec_error": "mas", "parallax_error": "mas",
    "pm_ra_cosdec_error": "mas / yr", "pm_dec_error": "mas / yr",
    "radial_velocity_error": "km / s",
    **{col: "" for col in CORRELATION_COLUMNS},
}


def _gaia_name(canonical: str) -> str:
    return canonical.replace("pm_ra_cosdec", "pmra").replace("pm_dec", "pmdec")


# Gaia archive name -> canonical name (only the names that differ from ours).
GAIA_ALIASES = {
    "ref_epoch": "epoch",
    **{_gaia_name(c): c for c in ASTROMETRY_COLUMNS + UNCERTAINTY_COLUMNS if _gaia_name(c) != c},
}
# Columns that can supply the target name, most preferred first; the others stay extra.
NAME_SOURCES = ("name", "designation", "source_id")


def canonical_name(label: str) -> str | None:
    """Our name for a file column (case-insensitive, Gaia aliases applied), or None if unknown."""
    key = label.strip().lower()
    if key in KNOWN_COLUMNS:
        return key
    return GAIA_ALIASES.get(key)


def match_columns(labels) -> tuple[dict[str, int], list[int]]:
    """({canonical name: column index}, [indices of extra columns]) for a file's column labels.

    Raises ValueError naming both labels when two columns mean the same quantity.
    """
    known: dict[str, int] = {}
    extra: list[int] = []
    seen: dict[str, int] = {}
    for index, label in enumerate(labels):
        key = label.strip().lower()
        if key in seen:
            raise ValueError(f"column {label.strip()!r} appears twice")
        seen[key] = index
        canonical = canonical_name(label)
        if canonical is None:
            extra.append(index)
        elif canonical in known:
            raise ValueError(f"columns {labels[known[canonical]].strip()!r} and "
                             f"{label.strip()!r} both give {canonical}")
        else:
            known[canonical] = index
    # The name comes from the most preferred source present; the other sources stay extra.
    for key in NAME_SOURCES:
        if key in seen:
            known["name"] = seen[key]
            extra = [i for i in extra if i != seen[key]]
            break
    return known, extra
