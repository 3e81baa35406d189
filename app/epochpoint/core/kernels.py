"""Which engine computes a chunk of positions, and running the compiled one.

Two engines give the same columns: the numpy reference path (apparent.py, observed.py,
spacemotion.py; every accuracy test checks it against ERFA, astropy and PyEphem) and the
compiled per-star chain of kernels_chain.py (numba), held to the reference within
1 micro-arcsecond by the tests. The compiled chain runs when numba can be imported and
- the call has at least KERNEL_MIN_STARS targets (importing numba and loading the compiled
  chain from its cache costs about 0.3 s once per process, so small calls stay on numpy), or
- the chain is already loaded in this process and the call has at least KERNEL_LOADED_MIN_STARS.
The correction ledger and the error ellipses are always computed by the numpy path.

`engine="numpy"` (or the environment variable EPOCHPOINT_ENGINE=numpy) forces the reference
path; `engine="kernel"` (EPOCHPOINT_ENGINE=kernel) forces the compiled chain whatever the
size. The compiled code is cached on disk (numba cache=True: __pycache__ beside this file,
else the user's cache directory, or NUMBA_CACHE_DIR when set); when no cache location is
writable the numpy path is used and a warning says so.
"""
from __future__ import annotations

import os
import sys
import threading
import warnings
from contextlib import contextmanager

import numpy as np

ENGINE_ENV = "EPOCHPOINT_ENGINE"
ENGINES = ("auto", "numpy", "kernel")
KERNEL_MIN_STARS = 200_000
KERNEL_LOADED_MIN_STARS = 1_000
# Output rows of the compiled chain, in the order kernels_chain.star_chain writes them.
CHAIN_COLUMNS = ("ra_propagated", "dec_propagated", "pm_ra_cosdec_propagated",
                 "pm_dec_propagated", "parallax_propagated", "radial_velocity_propagated",
                 "ra_apparent", "dec_apparent", "ra_cirs", "dec_cirs", "drift")
CHAIN_SITE_COLUMNS = ("ha", "dec_observed", "alt", "az", "airmass", "parallactic_angle")

_load_lock = threading.Lock()
# One compiled call at a time: it already runs on every core, and numba's fork-safe
# "workqueue" threading layer must not be entered from two threads at once.
_run_lock = threading.Lock()
_chain = None  # the compiled function once loaded; False when it cannot be


class EngineError(ValueError):
    """An engine name that is not one of ENGINES, or the compiled one asked for without numba."""


def engine_choice(engine: str | None) -> str:
    """The engine asked for: the keyword, else EPOCHPOINT_ENGINE, else 'auto'."""
    choice = engine if engine is not None else os.environ.get(ENGINE_ENV, "") or "auto"
    if choice not in ENGINES:
        raise EngineError(f"engine {choice!r}: expected one of {', '.join(ENGINES)}")
    return choice


def _choose_threading_layer():
    """A fork-safe threading layer for numba unless NUMBA_THREADING_LAYER says otherwise: with
    GNU OpenMP (numba's first choice where TBB is missing) a process forked after a parallel
    call aborts when it runs one (multiprocessing, process pools). Workqueue is fork-safe;
    it is not safe for two threads at once, which _run_lock prevents."""
    if "NUMBA_THREADING_LAYER" not in os.environ:
        import numba

        numba.config.THREADING_LAYER = "forksafe"


def load_chain():
    """The compiled chain (imports numba on the first call), or None where it cannot run."""
    global _chain
    with _load_lock:
        if _chain is None:
            try:
                _choose_threading_layer()
                from .kernels_chain import star_chain
            except (ImportError, OSError):  # no numba, or its LLVM library cannot load
                _chain = False
            except RuntimeError as exc:  # numba found no writable cache location
                warnings.warn(f"compiled positions unavailable, using numpy: {exc}; set "
                              f"NUMBA_CACHE_DIR to a writable folder", RuntimeWarning,
                              stacklevel=2)
                _chain = False
            else:
                _chain = star_chain
    return _chain or None


@contextmanager
def numba_hidden():
    """Within the block, `import numba` fails unless numba is already imported: for packages
    that switch to numba whenever it is importable (timezonefinder compiles its helpers, about
    0.3 s a process, for lookups that take microseconds without it)."""
    with _load_lock:
        hide = "numba" not in sys.modules
        if hide:
            sys.modules["numba"] = None
        try:
            yield
        finally:
            if hide and sys.modules.get("numba", 0) is None:
                del sys.modules["numba"]


def use_kernel(n_targets: int, engine: str | None = None, *, ledger: bool = False) -> bool:
    """Whether `n_targets` positions are computed by the compiled chain (see module doc)."""
    choice = engine_choice(engine)
    if choice == "numpy" or ledger:
        return False
    if choice == "kernel":
        if load_chain() is None:
            raise EngineError("engine 'kernel' needs numba, which cannot be imported here")
        return True
    if _chain:
        return n_targets >= KERNEL_LOADED_MIN_STARS
    return n_targets >= KERNEL_MIN_STARS and load_chain() is not None


def _instant_arrays(ctx) -> tuple:
    """The context's per-instant numbers in the layout of kernels_chain.star_chain."""
    from . import kernels_chain as kc
    from .observed import site_matrices

    instant = np.zeros(kc.N_INSTANT)
    instant[kc.EPOCH_JYEAR] = ctx.epoch_jyear
    instant[kc.SUN_DISTANCE_AU] = ctx.sun_distance_au
    instant[kc.LORENTZ_INVERSE] = ctx.lorentz_inverse
    instant[kc.CIRS_MINUS_TOD] = ctx.cirs_minus_tod_rad
    vectors = np.ascontiguousarray(np.stack((ctx.earth_bary_au, ctx.sun_to_earth_unit,
                                             ctx.earth_velocity_c)), dtype=float)
    to_hadec = to_horizon = np.eye(3)
    if ctx.site is not None:
        s = ctx.site
        to_hadec, to_horizon = site_matrices(s)
        to_hadec = to_hadec @ ctx.c2i
        instant[kc.DIURNAL_ABERRATION] = s.diurnal_aberration
        instant[kc.REFA], instant[kc.REFB] = s.refa, s.refb
        instant[kc.REFRACTION_JOIN] = s.refraction_join
        instant[kc.REFRACTION_HORIZON] = s.refraction_horizon
        instant[kc.SIN_LAT], instant[kc.COS_LAT] = s.sin_lat, s.cos_lat
    return (instant, vectors, *(np.ascontiguousarray(m, dtype=float)
                                for m in (ctx.npb_true_of_date, to_hadec, to_horizon)))


def chain_columns(targets, ctx) -> dict:
    """Every CHAIN_COLUMNS (and, with a site, CHAIN_SITE_COLUMNS) column for all `targets`
    in one parallel compiled pass: name -> array (rows of one block, no other scratch)."""
    chain = load_chain()
    if chain is None:
        raise EngineError("engine 'kernel' needs numba, which cannot be imported here")
    names = CHAIN_COLUMNS + (CHAIN_SITE_COLUMNS if ctx.site is not None else ())
    block = np.empty((len(names), len(targets)))
    astrometry = [np.ascontiguousarray(a, dtype=float) for a in targets.astrometry()]
    with _run_lock:
        chain(*astrometry, *_instant_arrays(ctx), block)
    return dict(zip(names, block))
