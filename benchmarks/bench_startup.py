"""Benchmark: everyday commands as whole processes, start to finish.

1. `epochpoint positions` on 30 stars (JSON to standard output) against a plain astropy script
   doing the same work (SkyCoord with proper motions, parallax and radial velocity,
   apply_space_motion, AltAz with refraction, JSON out): the ratio of the medians, the issue
   asks for 2 or more.
2. `epochpoint plan` on the demo (sample_targets/) and `epochpoint gui --screenshot` on the
   demo plan (QT_QPA_PLATFORM=offscreen): wall times.
3. The first run after the Earth-orientation tables changed (empty cache folder): the one-off
   cost of building the cache.

Every command is run N times (default 7), the two sides of the ratio alternately so both see
the same machine load; the median wall time of each is reported. Both sides run offline
(astropy's IERS download switched off, as Epochpoint does). Compiled bytecode is allowed
(PYTHONDONTWRITEBYTECODE is dropped for the children), as after an install.
Run: .venv/bin/python benchmarks/bench_startup.py [N]
"""
from __future__ import annotations

import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "sample_targets"
SITE = "-24.6,-70.4,2635"
WHEN = "2027-01-20T23:10:00Z"
ASTROPY_SCRIPT = '''
import csv, json, sys
import numpy as np
import astropy.units as u
from astropy.coordinates import AltAz, EarthLocation, SkyCoord
from astropy.time import Time
from astropy.utils import iers
iers.conf.auto_download = False
iers.conf.auto_max_age = None
rows = list(csv.DictReader(open(sys.argv[1])))
col = lambda k: np.array([float(r[k]) for r in rows])
t_obs = Time("%(when)s", scale="utc")
stars = SkyCoord(ra=col("ra") * u.deg, dec=col("dec") * u.deg,
                 pm_ra_cosdec=col("pm_ra_cosdec") * u.mas / u.yr,
                 pm_dec=col("pm_dec") * u.mas / u.yr,
                 distance=(col("parallax") * u.mas).to(u.pc, u.parallax()),
                 radial_velocity=col("radial_velocity") * u.km / u.s,
                 obstime=Time(2016.0, format="jyear", scale="tdb"))
moved = stars.apply_space_motion(new_obstime=t_obs)
site = EarthLocation.from_geodetic(%(lon)s * u.deg, %(lat)s * u.deg, %(height)s * u.m)
frame = AltAz(obstime=t_obs, location=site, pressure=745 * u.hPa, temperature=8 * u.deg_C,
              relative_humidity=0.2, obswl=0.55 * u.micron)
observed = moved.transform_to(frame)
print(json.dumps([{"name": r["name"], "alt": float(a), "az": float(z)}
                  for r, a, z in zip(rows, observed.alt.deg, observed.az.deg)]))
'''


def write_stars(path: Path, n: int = 30, seed: int = 30) -> None:
    """n random stars with full space motion (invented), as an Epochpoint CSV."""
    rng = np.random.default_rng(seed)
    lines = ["name,ra,dec,epoch,pm_ra_cosdec,pm_dec,parallax,radial_velocity"]
    for i in range(n):
        lines.append(f"S{i:02d},{rng.uniform(0, 360)!r},"
                     f"{float(np.degrees(np.arcsin(rng.uniform(-1, 0.3))))!r},2016.0,"
                     f"{rng.normal(0, 50)!r},{rng.normal(0, 50)!r},{10 ** rng.uniform(-1, 2)!r},"
                     f"{rng.normal(0, 30)!r}")
    path.write_text("\n".join(lines) + "\n")


def child_env(**extra) -> dict:
    env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
    env.update(QT_QPA_PLATFORM="offscreen", **extra)
    return env


def wall_time(command: list, env: dict) -> float:
    """Seconds from start to end of one process; its failure stops the benchmark."""
    start = time.perf_counter()
    done = subprocess.run(command, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, env=env,
                          cwd=ROOT)
    seconds = time.perf_counter() - start
    if done.returncode != 0:
        raise SystemExit(f"{' '.join(command)} failed: {done.stderr.decode()[-400:]}")
    return seconds


def medians(commands: dict, env: dict, runs: int) -> dict:
    """Median wall time of each command, the commands run in turn `runs` times (one warm-up)."""
    for command in commands.values():
        wall_time(command, env)
    times = {name: [] for name in commands}
    for _ in range(runs):
        for name, command in commands.items():
            times[name].append(wall_time(command, env))
    return {name: statistics.median(values) for name, values in times.items()}


def main(runs: int = 7) -> None:
    python = sys.executable
    script = Path(python).with_name("epochpoint")  # the installed command, as people run it
    epochpoint = [str(script)] if script.exists() else [python, "-m", "epochpoint.cli.main"]
    with tempfile.TemporaryDirectory() as folder:
        folder = Path(folder)
        stars = folder / "stars30.csv"
        write_stars(stars)
        script = folder / "astropy_positions.py"
        lat, lon, height = SITE.split(",")
        script.write_text(ASTROPY_SCRIPT % dict(when=WHEN.rstrip("Z"), lat=lat, lon=lon,
                                                height=height))
        env = child_env(EPOCHPOINT_CACHE_DIR=str(folder / "cache"))
        positions = epochpoint + ["positions", str(stars), f"--site={SITE}", "--at", WHEN,
                                  "--format", "json"]
        # The one-off cost: the first call after the tables changed builds the cache.
        first = wall_time(positions, env)
        ratio = medians({"epochpoint": positions, "astropy": [python, str(script), str(stars)]},
                        env, runs)
        plan = epochpoint + ["plan", str(DEMO / "loma_candil_targets.csv"), "--site",
                             str(DEMO / "loma_candil.toml"), "--night", "2027-01-19",
                             "--format", "json"]
        gui = epochpoint + ["gui", str(DEMO / "loma_candil_plan.json"), "--screenshot",
                            str(folder / "shot.png")]
        others = medians({"plan": plan, "gui": gui}, env, max(3, runs // 2))
    print(f"whole processes, median of {runs} runs, {os.cpu_count()} cores")
    print(f"positions, 30 stars, JSON: Epochpoint {ratio['epochpoint']:.3f} s, "
          f"astropy script {ratio['astropy']:.3f} s: "
          f"ratio {ratio['astropy'] / ratio['epochpoint']:.2f}x (issue asks >= 2x)")
    print(f"first positions call with an empty cache (tables parsed, cache built): "
          f"{first:.3f} s")
    print(f"plan on the demo (30 targets, JSON): {others['plan']:.3f} s")
    print(f"gui --screenshot on the demo plan (offscreen): {others['gui']:.3f} s")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 7)
