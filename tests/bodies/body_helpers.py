"""Shared helpers for the solar-system tests: targets with body rows, and DE421 read through
jplephem's own package reader (independent of our evaluation path)."""
import importlib

import numpy as np

from epochpoint.core.targets import Targets

positions_module = importlib.import_module("epochpoint.core.positions")
AU_KM = 149597870.7


def body_targets(rows: dict, names) -> Targets:
    """Targets whose extra columns are `rows` (column -> list of text cells)."""
    n = len(names)
    extra = {k: np.array([str(v) for v in vals], dtype=object) for k, vals in rows.items()}
    return Targets.from_columns(ra=np.zeros(n), dec=np.zeros(n), name=list(names), extra=extra)


def planet_targets(bodies):
    return body_targets({"body": list(bodies)}, list(bodies))


def jplephem_bary_au(name: str, tdb_jd: float) -> np.ndarray:
    """Barycentric position (AU) from jplephem's Ephemeris over the de421 package."""
    import de421
    from jplephem.ephem import Ephemeris
    eph = Ephemeris(de421)
    if name in ("earth", "moon"):
        emb, moon = eph.position("earthmoon", tdb_jd), eph.position("moon", tdb_jd)
        p = emb - moon * eph.earth_share if name == "earth" else emb + moon * eph.moon_share
    else:
        p = eph.position(name, tdb_jd)
    return np.asarray(p, dtype=float).reshape(3) / AU_KM
