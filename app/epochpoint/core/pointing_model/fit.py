"""Fitting a pointing model to centred stars: linear least squares with robust rejection.

Each sample is one centred star: its sky place and the mount's axis readings there. The
offsets (mount minus sky) are linear in the term values (terms.py), so the model is the
ordinary least-squares solution of A p = y, solved by numpy.linalg.lstsq, with the offsets
along the first axis weighted by cos(second axis) so that both rows of a sample are arcseconds
on the sky. A German mount's samples carry their pier side: the terms in its declination
axis's frame enter the design with the factor +1 on the east side and -1 on the west
(terms.py). Standard errors are the square roots of the covariance diagonal
sigma^2 (A^T A)^-1, sigma^2 = residual sum of squares / (2 n - m) (e.g. Press et al.,
Numerical Recipes, 3rd ed. 2007, sec. 15.4); a term's significance is value / error.

Terms the samples cannot determine are left out before the solution, with a note: taken in
order, a term whose design column keeps less than MIN_INDEPENDENCE of its length after removing
its projection on the terms already kept (Gram-Schmidt) cannot be told apart from them.

Outliers (a star centred on the wrong object, a slip of the hand) are rejected iteratively:
the scatter is estimated robustly as 1.4826 x the median absolute deviation of the residual
components (Rousseeuw & Croux 1993, JASA 88, 1273), and a sample whose on-sky residual exceeds
REJECT_SIGMA of it is left out, then the fit is repeated until nothing changes. REJECT_SIGMA =
3.44 is the 2-D (Rayleigh) radius with the same false-rejection probability, 0.27 %, as 3 sigma
in one dimension.

Cost: per sample a few dozen array operations; one lstsq of (2 n, m), m <= 9.
"""
from __future__ import annotations

import warnings
from dataclasses import dataclass

import numpy as np

from .model import ARCSEC_PER_DEG, PointingModel, wrap_ha
from .pier_sides import EAST, PIER_SIDES, WEST, side_names
from .terms import HOUR_ANGLE_MOUNTS, term_set

MIN_INDEPENDENCE = 0.02
REJECT_SIGMA = 3.44
MAD_TO_SIGMA = 1.4826
MAX_REJECTION_ROUNDS = 10
# Samples closer together than this (deg across) cannot separate the geometric terms.
MIN_PATCH_DEG = 60.0


class PoorCoverage(UserWarning):
    """The samples do not spread over enough of the sky to determine the model."""


@dataclass(frozen=True)
class PointingFit:
    """The fitted model with what the views need: per sample the on-sky residuals (arcsec)
    before and after, and which samples were kept."""

    model: PointingModel
    kept: np.ndarray  # bool per sample
    before_arcsec: tuple  # (along first axis times cos second, along second) per sample
    after_arcsec: tuple
    pier_side: np.ndarray | None = None  # "east"/"west" per sample (a German mount's)


def _design(terms, m1, m2, lat_rad, weight, side_sign=None) -> np.ndarray:
    """Rows [first-axis patterns * weight; second-axis patterns] per term as columns; the
    terms that flip with the pier side times side_sign (+1 east, -1 west) when given."""
    cols = []
    for t in terms:
        scale = side_sign if t.flips_with_pier and side_sign is not None else 1.0
        cols.append(np.concatenate([t.first(m1, m2, lat_rad) * weight * scale * np.ones_like(m1),
                                    t.second(m1, m2, lat_rad) * scale * np.ones_like(m1)]))
    return np.stack(cols, axis=1)


def _sample_sides(pier_side, n: int, names) -> np.ndarray | None:
    """Side codes (EAST/WEST) per sample from names ("east"/"west", any case; "" or None
    unknown, -1); None when no sides are given."""
    if pier_side is None:
        return None
    given = np.asarray(pier_side, dtype=object)
    given = np.full(n, given.item(), dtype=object) if given.ndim == 0 else given.ravel()
    words = np.char.lower(np.char.strip(np.asarray(
        ["" if v is None else str(v) for v in given], dtype=str)))
    if words.size != n:
        raise ValueError(f"{words.size} pier sides for {n} samples")
    codes = np.full(n, -1)
    codes[words == PIER_SIDES[EAST]] = EAST
    codes[words == PIER_SIDES[WEST]] = WEST
    bad = np.flatnonzero((codes < 0) & (words != ""))
    if bad.size:
        raise ValueError(f"sample {names[bad[0]]}: {str(words[bad[0]])!r} is not a pier side "
                         f"(east or west)")
    return codes


def _independent_terms(design: np.ndarray, terms) -> tuple[list[int], list[str]]:
    """Indices of terms the samples determine, and a note for each one left out."""
    kept, basis, notes = [], [], []
    for k, term in enumerate(terms):
        col = design[:, k]
        length = np.linalg.norm(col)
        rest = col.copy()
        for q in basis:
            rest -= (q @ rest) * q
        if length == 0.0 or np.linalg.norm(rest) < MIN_INDEPENDENCE * length:
            alike = [terms[j].name for j in kept
                     if length and abs(design[:, j] @ col) > 0.5 * length *
                     np.linalg.norm(design[:, j])]
            notes.append(f"{term.name} left out: these samples cannot tell it apart from "
                         f"{', '.join(alike) or 'the other terms'}; add stars elsewhere on "
                         f"the sky")
            continue
        kept.append(k)
        basis.append(rest / np.linalg.norm(rest))
    return kept, notes


def _patch_size_deg(m1, m2, equatorial: bool) -> float:
    """The largest angle (deg) between any sample and the samples' mean direction, doubled."""
    lon = m1 if equatorial else -m1
    u = np.stack([np.cos(m2) * np.cos(lon), np.cos(m2) * np.sin(lon), np.sin(m2)])
    mean = u.mean(axis=1)
    norm = np.linalg.norm(mean)
    if norm < 1e-9:
        return 360.0
    cosines = np.clip((mean / norm) @ u, -1.0, 1.0)
    return 2.0 * float(np.degrees(np.arccos(cosines.min())))


def fit_pointing_model(sky_first_deg, sky_second_deg, mount_first_deg, mount_second_deg, *,
                       mount_type: str, latitude_deg: float, terms=None,
                       names=None, pier_side=None) -> PointingFit:
    """Fit a pointing model (see module docstring) to samples: sky places and mount readings,
    (ha, dec) for an equatorial or German mount or (az, alt) for an alt-az mount, in degrees;
    pier_side ("east"/"west" per sample) is needed for a German mount, and an equatorial fit
    given samples on both sides notes that a German fit would model them.

    Warns PoorCoverage (and notes it in the model) when the samples lie in one patch of sky
    or a term had to be left out; raises ValueError when there are too few samples or a German
    mount's sample has no pier side.
    """
    chosen = term_set(mount_type, terms)
    equatorial = mount_type in HOUR_ANGLE_MOUNTS
    s1, s2, m1d, m2d = (np.asarray(x, dtype=float).ravel() for x in
                        (sky_first_deg, sky_second_deg, mount_first_deg, mount_second_deg))
    n = s1.size
    names = [f"row {i + 1}" for i in range(n)] if names is None else [str(x) for x in names]
    codes = _sample_sides(pier_side, n, names)
    german = mount_type == "german"
    if german and (codes is None or np.any(codes < 0)):
        which = 0 if codes is None else int(np.flatnonzero(codes < 0)[0])
        raise ValueError(f"sample {names[which] if n else ''}: a German mount's samples need "
                         f"their pier side (east or west)")
    if 2 * n < len(chosen) + 2:
        raise ValueError(f"{n} samples are too few for {len(chosen)} terms: record at least "
                         f"{(len(chosen) + 3) // 2}, spread over the sky")
    m1, m2, lat = np.radians(m1d), np.radians(m2d), np.radians(latitude_deg)
    # Mount minus sky in arcsec; the first axis also as arcsec on the sky.
    d1 = (wrap_ha(m1d - s1) * ARCSEC_PER_DEG)
    d2 = (m2d - s2) * ARCSEC_PER_DEG
    weight = np.cos(m2)
    y = np.concatenate([d1 * weight, d2])
    side_sign = np.where(codes == EAST, 1.0, -1.0) if german else None
    design = _design(chosen, m1, m2, lat, weight, side_sign)

    notes = []
    if mount_type == "equatorial" and codes is not None and {EAST, WEST} <= set(codes.tolist()):
        notes.append("the samples are on both pier sides: fit them as a German mount (mount "
                     "type german), whose declination-axis terms change sign with the side")
    patch = _patch_size_deg(m1, m2, equatorial)
    if patch < MIN_PATCH_DEG:
        notes.append(f"the samples lie in one patch about {patch:.0f} deg across: the terms "
                     f"are poorly determined there and the model should not be trusted "
                     f"elsewhere; spread the stars over the sky")
    kept = np.ones(n, dtype=bool)
    for _ in range(MAX_REJECTION_ROUNDS):
        rows = np.concatenate([kept, kept])
        use, dropped = _independent_terms(design[rows], chosen)
        a = design[rows][:, use]
        values, *_ = np.linalg.lstsq(a, y[rows], rcond=None)
        resid = y - design[:, use] @ values
        r1, r2 = resid[:n], resid[n:]
        components = np.concatenate([r1[kept], r2[kept]])
        scatter = MAD_TO_SIGMA * np.median(np.abs(components - np.median(components)))
        outlier = np.hypot(r1, r2) > REJECT_SIGMA * max(scatter, 1e-6)
        new_kept = ~outlier
        if np.array_equal(new_kept, kept) or 2 * new_kept.sum() < len(use) + 2:
            break
        kept = new_kept
    dof = 2 * int(kept.sum()) - len(use)
    rss = float(np.sum(r1[kept] ** 2 + r2[kept] ** 2))
    sigma2 = rss / dof if dof > 0 else float("nan")
    covariance = sigma2 * np.linalg.pinv(a.T @ a)
    errors = np.sqrt(np.clip(np.diag(covariance), 0.0, None))
    notes.extend(dropped)
    for message in notes:
        warnings.warn(message, PoorCoverage, stacklevel=2)

    used = [chosen[k].name for k in use]
    model = PointingModel(
        mount_type=mount_type, latitude=float(latitude_deg),
        values=dict(zip(used, (float(v) for v in values))),
        errors=dict(zip(used, (float(e) for e in errors))),
        rms_before_arcsec=float(np.sqrt(np.mean((d1 * weight)[kept] ** 2 + d2[kept] ** 2))),
        rms_after_arcsec=float(np.sqrt(np.mean(r1[kept] ** 2 + r2[kept] ** 2))),
        samples=int(kept.sum()), rejected=tuple(np.asarray(names, dtype=object)[~kept]),
        notes=tuple(notes))
    sides = side_names(codes) if german else None
    return PointingFit(model=model, kept=kept, before_arcsec=(d1 * weight, d2),
                       after_arcsec=(r1, r2), pier_side=sides)
