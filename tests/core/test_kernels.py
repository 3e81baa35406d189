"""The compiled per-star chain (core/kernels_chain.py) against the numpy reference path.

The numpy path is the one the accuracy tests check against ERFA, astropy and PyEphem; the
compiled chain must give the same columns within 1 micro-arcsecond (angles compared by angular
separation measured with ERFA seps) on stars drawn over the whole sky, at instants, sites and
weather drawn over the supported range (seeded, so a failure can be replayed). Also: its
atan2 against the C library's, how the engine is chosen, that `import epochpoint` does not
import numba, and the numpy fallback where numba finds no writable cache.
"""
from __future__ import annotations

import math
import os
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

import epochpoint as ep
from epochpoint.core import kernels
from epochpoint.core.positions import position_chunks
from star_samples import realistic_stars, separation_mas

pytestmark = pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")

APP = str(Path(__file__).resolve().parents[2] / "app")
UAS_IN_MAS = 1e-3
SEED = 20261202
ANGLE_PAIRS = (("ra_propagated", "dec_propagated"), ("ra_apparent", "dec_apparent"),
               ("ra_cirs", "dec_cirs"), ("ha", "dec_observed"), ("az", "alt"))


def whole_sky_stars(rng, n: int) -> dict:
    """Realistic stars plus the corners: exact poles, ra 0, no distance, faster than physical
    (a parallax dropped as unknown), no motion, catalogue epochs from -3000 to 5000."""
    stars = realistic_stars(int(rng.integers(1 << 31)), n)
    stars["dec"][:6] = [90.0, -90.0, 0.0, 45.0, -45.0, 89.9999999]
    stars["ra"][:6] = [0.0, 0.0, 0.0, 359.9999999, 180.0, 0.0]
    stars["parallax"][6:9] = [0.0, 0.0, 1e-6]
    stars["pm_ra_cosdec"][9:11], stars["parallax"][9:11] = [3e9, 1e7], [1e-3, 1.0]
    stars["pm_ra_cosdec"][11:13] = stars["pm_dec"][11:13] = stars["radial_velocity"][11:13] = 0.0
    stars["epoch"] = np.where(rng.uniform(size=n) < 0.2, rng.uniform(-3000.0, 5000.0, n),
                              stars["epoch"])
    return stars


def random_site(rng) -> ep.Site:
    """A site anywhere (poles included), any height and weather (no atmosphere included)."""
    latitude = float(rng.choice([90.0, -90.0, *rng.uniform(-90.0, 90.0, 6)]))
    return ep.Site(latitude=latitude, longitude=float(rng.uniform(-180.0, 180.0)),
                   height=float(rng.uniform(0.0, 5000.0)),
                   pressure=float(rng.choice([0.0, *rng.uniform(500.0, 1050.0, 5)])),
                   temperature=float(rng.uniform(-40.0, 40.0)),
                   humidity=float(rng.uniform(0.0, 1.0)),
                   wavelength=float(rng.uniform(0.4, 2.0)))


def random_instant(rng) -> str:
    """An instant between 1850 and 2150 (the supported years are 1800-2200)."""
    seconds = rng.uniform(-150.0, 150.0) * 365.25 * 86400.0
    return np.datetime_as_string(np.datetime64("2000-01-01T12:00:00", "s")
                                 + np.timedelta64(int(seconds), "s")) + "Z"


def both_engines(targets, site, when):
    context = ep.make_context(when, site)
    return (ep.positions(targets, site, when, context=context, engine="numpy"),
            ep.positions(targets, site, when, context=context, engine="kernel"))


def assert_same_positions(reference, compiled, label):
    """Every column of the compiled chain equals the reference within 1 uas (or the value's
    own rounding for non-angles)."""
    assert list(compiled) == list(reference)
    for ra, dec in ANGLE_PAIRS:
        if ra not in reference:
            continue
        gap = separation_mas(reference[ra], reference[dec], compiled[ra], compiled[dec])
        assert np.nanmax(gap, initial=0.0) < UAS_IN_MAS, f"{label} {ra}/{dec}: {gap.max()} mas"
        assert np.array_equal(np.isnan(reference[dec]), np.isnan(compiled[dec]))
    for column, rtol, atol in (("parallax_propagated", 1e-12, 0.0),
                               ("pm_ra_cosdec_propagated", 1e-9, 1e-9),
                               ("pm_dec_propagated", 1e-9, 1e-9),
                               ("radial_velocity_propagated", 1e-9, 1e-9),
                               ("drift", 1e-12, 1e-6),  # arcsec: 1 uas
                               ("airmass", 1e-12, 0.0)):
        if column in reference:
            np.testing.assert_allclose(compiled[column], reference[column], rtol=rtol,
                                       atol=atol, equal_nan=True, err_msg=f"{label} {column}")
    if "parallactic_angle" in reference:
        turn = np.mod(compiled["parallactic_angle"] - reference["parallactic_angle"] + 180.0,
                      360.0) - 180.0
        assert np.max(np.abs(turn)) * 3.6e9 < 1.0, f"{label} parallactic angle"


@pytest.mark.parametrize("case", range(12))
def test_compiled_chain_equals_the_numpy_reference_within_1_uas(case):
    rng = np.random.default_rng([SEED, case])
    targets = ep.Targets.from_columns(**whole_sky_stars(rng, 3000))
    site, when = random_site(rng), random_instant(rng)
    reference, compiled = both_engines(targets, site, when)
    assert_same_positions(reference, compiled, f"case {case} at {when}, {site}")
    # The count of targets without a known distance (from the chain's own parallax column).
    assert compiled.meta["targets_distance_unknown"] == \
        reference.meta["targets_distance_unknown"] > 0


def test_compiled_chain_without_a_site_equals_the_reference():
    rng = np.random.default_rng([SEED, 99])
    targets = ep.Targets.from_columns(**whole_sky_stars(rng, 2000))
    reference, compiled = both_engines(targets, None, random_instant(rng))
    assert "alt" not in compiled
    assert_same_positions(reference, compiled, "no site")


def test_streamed_chunks_and_error_ellipses_on_the_compiled_chain():
    rng = np.random.default_rng([SEED, 7])
    stars = whole_sky_stars(rng, 1500)
    errors = {name: rng.uniform(0.01, 0.5, 1500) for name in
              ("ra_error", "dec_error", "pm_ra_cosdec_error", "pm_dec_error")}
    targets = ep.Targets.from_columns(**stars, errors=errors)
    site = ep.Site(latitude=-24.6, longitude=-70.4, height=2635.0)
    when = "2027-01-20T23:10:00Z"
    reference = ep.positions(targets, site, when, engine="numpy")
    chunks = position_chunks(targets, site, when, engine="kernel", chunk_size=400)
    assert chunks.use_kernel
    parts = list(chunks)
    assert len(parts) == 4
    streamed = {c: np.concatenate([p[c] for p in parts]) for c in chunks.names}
    assert_same_positions(reference, streamed, "streamed")
    for column in ("error_major", "error_minor", "error_pa", "error_lower_bound"):
        np.testing.assert_array_equal(streamed[column], reference[column])


def test_atan2_agrees_with_the_c_library_in_every_quadrant():
    from numba import njit

    from epochpoint.core.kernels_math import atan2, sin_cos

    @njit
    def both(y, x):
        out = np.empty(y.shape[0])
        for i in range(y.shape[0]):
            out[i] = atan2(y[i], x[i])
        return out

    rng = np.random.default_rng(SEED)
    x = rng.normal(size=200_000) * 10.0 ** rng.uniform(-12, 12, 200_000)
    y = rng.normal(size=200_000) * 10.0 ** rng.uniform(-12, 12, 200_000)
    # The octant and reduction edges, and the values the C library defines specially (both
    # arguments infinite is left out: ours gives NaN there, the chain never meets it).
    edges = [(0.66, 1.0), (1.0, 0.66), (1.0, 1.0), (-1.0, 1.0), (1.0, -1.0), (0.0, -1.0),
             (-0.0, -1.0), (0.0, 0.0), (-0.0, 0.0), (0.0, -0.0), (-0.0, -0.0), (1.0, 0.0),
             (1.0, -0.0), (math.inf, 1.0), (1.0, -math.inf), (-math.inf, 2.0),
             (math.nan, 1.0), (1.0, math.nan), (1e-300, 1e300), (1e300, 1e-300)]
    y = np.concatenate([y, [e[0] for e in edges]])
    x = np.concatenate([x, [e[1] for e in edges]])
    ours = both(y, x)
    libm = np.array([math.atan2(a, b) for a, b in zip(y, x)])
    assert np.array_equal(np.isnan(ours), np.isnan(libm))
    ok = ~np.isnan(libm)
    assert np.array_equal(np.signbit(ours[ok]), np.signbit(libm[ok]))
    ulps = np.abs(ours[ok] - libm[ok]) / np.spacing(np.maximum(np.abs(libm[ok]), 1e-300))
    assert ulps.max() <= 2.0
    # Sine and cosine against the C library over the range the chain gives them, |x| < 10,
    # with the quadrant edges.
    @njit
    def sines(angles):
        out = np.empty((2, angles.shape[0]))
        for i in range(angles.shape[0]):
            out[0, i], out[1, i] = sin_cos(angles[i])
        return out

    angles = np.concatenate([rng.uniform(-10.0, 10.0, 200_000), 0.5 * np.pi * np.arange(-6, 7),
                             np.nextafter(0.25 * np.pi * np.arange(-12, 13), np.inf),
                             [0.0, -0.0, 1e-300, 1e-9, -3e-4]])
    s, c = sines(angles)
    assert np.abs(s - np.sin(angles)).max() < 3e-16
    assert np.abs(c - np.cos(angles)).max() < 3e-16


def test_engine_choice_keyword_environment_and_size(monkeypatch):
    monkeypatch.delenv(kernels.ENGINE_ENV, raising=False)
    assert not kernels.use_kernel(10**7, "numpy")
    assert kernels.use_kernel(5, "kernel")
    # The correction ledger always comes from the reference path.
    assert not kernels.use_kernel(10**7, "kernel", ledger=True)
    # Once loaded, calls of KERNEL_LOADED_MIN_STARS or more use the compiled chain.
    assert kernels.use_kernel(kernels.KERNEL_LOADED_MIN_STARS)
    assert not kernels.use_kernel(kernels.KERNEL_LOADED_MIN_STARS - 1)
    monkeypatch.setenv(kernels.ENGINE_ENV, "numpy")
    assert not kernels.use_kernel(10**7)
    assert kernels.use_kernel(10**7, "kernel")  # the keyword wins over the variable
    monkeypatch.setenv(kernels.ENGINE_ENV, "fast")
    with pytest.raises(kernels.EngineError, match="engine 'fast': expected one of"):
        kernels.use_kernel(10)


def _run(code: str, **env) -> subprocess.CompletedProcess:
    environment = {k: v for k, v in os.environ.items() if not k.startswith("NUMBA_")}
    environment.pop(kernels.ENGINE_ENV, None)
    environment.update(PYTHONPATH=APP, **env)
    return subprocess.run([sys.executable, "-c", code], env=environment, capture_output=True,
                          text=True, timeout=240)


def test_importing_and_small_calls_never_import_numba():
    done = _run("import sys, warnings; warnings.simplefilter('ignore')\n"
                "import epochpoint as ep\n"
                "assert 'numba' not in sys.modules\n"
                "t = ep.Targets.from_columns(ra=[10.0, 20.0], dec=[5.0, -5.0])\n"
                "ep.positions(t, ep.Site(latitude=50.0, longitude=5.0), '2027-01-20T23:10:00Z')\n"
                "print('numba' in sys.modules)")
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip() == "False"


def test_no_writable_numba_cache_falls_back_to_numpy_with_a_warning():
    # numba's IPython locator accepts only notebook cells: for our files no cache location
    # is found, as on a read-only install with no writable cache directory.
    done = _run("import warnings; warnings.simplefilter('ignore', ResourceWarning)\n"
                "import epochpoint as ep\n"
                "from epochpoint.core import kernels\n"
                "with warnings.catch_warnings(record=True) as caught:\n"
                "    warnings.simplefilter('always')\n"
                "    print(kernels.use_kernel(10**7))\n"
                "print([str(w.message) for w in caught if 'compiled' in str(w.message)])",
                NUMBA_CACHE_LOCATOR_CLASSES="IPythonCacheLocator")
    assert done.returncode == 0, done.stderr
    chose, warned = done.stdout.strip().splitlines()
    assert chose == "False"
    assert "using numpy" in warned and "NUMBA_CACHE_DIR" in warned


def test_threads_and_forked_processes_after_a_compiled_call():
    # Threads (the app's workers, Dask's local scheduler) call at once; a process forked
    # after a compiled call runs one too (GNU OpenMP would abort it: numba's threading layer
    # must be fork-safe).
    done = _run("import warnings; warnings.simplefilter('ignore')\n"
                "import multiprocessing as mp\n"
                "from concurrent.futures import ThreadPoolExecutor\n"
                "import numpy as np, epochpoint as ep\n"
                "t = ep.Targets.from_columns(ra=np.linspace(0, 359, 5000), dec=10.0)\n"
                "site = ep.Site(latitude=-24.6, longitude=-70.4)\n"
                "def alt(_):\n"
                "    r = ep.positions(t, site, '2027-01-20T23:10:00Z', engine='kernel')\n"
                "    return float(r['alt'].sum())\n"
                "first = alt(0)\n"
                "with ThreadPoolExecutor(4) as pool:\n"
                "    assert set(pool.map(alt, range(8))) == {first}\n"
                "with mp.get_context('fork').Pool(2) as pool:\n"
                "    assert set(pool.map(alt, [1, 2])) == {first}\n"
                "print('ok')")
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip() == "ok"


def _has_avx2() -> bool:
    try:
        with open("/proc/cpuinfo") as info:
            return " avx2" in info.read()
    except OSError:
        return False


@pytest.mark.skipif(not _has_avx2(), reason="the vector registers checked for are AVX2's")
def test_each_stage_of_the_chain_compiles_to_vector_code(tmp_path):
    """The stages' loops must stay free of branches and library calls so that the compiler
    vectorises them (kernels_chain.py): compiled afresh, each stage's machine code works in
    256-bit registers (ymm) throughout, not in a few scalar ones. A branch or a C library
    call in a stage makes LLVM keep it scalar and this fails."""
    done = _run("import re, warnings; warnings.simplefilter('ignore')\n"
                "import numpy as np\n"
                "from epochpoint.core import kernels_chain as kc\n"
                "work = np.full(kc.N_WORK_ROWS * kc.BLOCK, 0.5)\n"
                "m = np.eye(3); instant = np.full(kc.N_INSTANT, 0.5)\n"
                "kc._space_motion(work, 2027.0)\n"
                "kc._apparent(work, instant, np.full((3, 3), 0.1), m)\n"
                "kc._observed(work, instant, m, m)\n"
                "for f in (kc._space_motion, kc._apparent, kc._observed):\n"
                "    asm = f.inspect_asm(f.signatures[0])\n"
                "    print(f.__name__, len(re.findall(r'ymm', asm)), "
                "len(re.findall(r'xmm', asm)))",
                NUMBA_CACHE_DIR=str(tmp_path))
    assert done.returncode == 0, done.stderr
    for line in done.stdout.strip().splitlines():
        name, ymm, xmm = line.split()
        # Measured: 700-1700 ymm against 40-180 xmm mentions; scalar code has no ymm at all.
        assert int(ymm) > 3 * int(xmm), line
