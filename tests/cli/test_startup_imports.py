"""A command imports only what it needs: the command line and a `positions` run on a short
list load no Qt, no plotting, no astropy.table, no Arrow, no compiler and no time-zone finder.

Reference: the interpreter's own record of loaded modules (sys.modules), in a fresh process.
"""
import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

HEAVY = ["PySide6", "matplotlib", "astropy.table", "pyarrow", "pandas", "timezonefinder",
         "astropy.coordinates", "astropy.utils.iers", "numba"]
SITE_TOML = Path(__file__).parents[2] / "sample_targets" / "loma_candil.toml"


def _loaded_after(code: str, cache_dir) -> list:
    env = dict(os.environ, EPOCHPOINT_CACHE_DIR=str(cache_dir))
    subprocess.run([sys.executable, "-c", "import epochpoint"], env=env, check=True,
                   timeout=240)  # builds the Earth-orientation cache first
    probe = (code + "\nimport json, sys\n"
             f"print(json.dumps([m for m in {HEAVY!r} if m in sys.modules]))")
    done = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True,
                          env=env, timeout=240)
    assert done.returncode == 0, done.stderr
    return json.loads(done.stdout.strip().splitlines()[-1])


def test_importing_the_command_line_loads_nothing_heavy(tmp_path):
    assert _loaded_after("import epochpoint.cli.main", tmp_path) == []


@pytest.mark.parametrize("site, fmt", [("-24.6,-70.4,2635", "json"),
                                       ("-24.6,-70.4,2635", "csv"),
                                       (str(SITE_TOML), "table")])
def test_a_positions_run_loads_nothing_heavy(tmp_path, site, fmt):
    targets = tmp_path / "stars.csv"
    targets.write_text("name,ra,dec,epoch,pm_ra_cosdec,pm_dec,parallax\n"
                       + "".join(f"S{i},{i * 11.5},{-60 + i * 3.5},2016.0,12.5,-3.25,8.0\n"
                                 for i in range(30)))
    code = ("import contextlib, io\nfrom epochpoint.cli.main import main\n"
            "with contextlib.redirect_stdout(io.StringIO()) as out:\n"
            f"    status = main(['positions', {str(targets)!r}, '--site={site}', "
            f"'--at', '2026-03-20T03:00:00Z', '--format', {fmt!r}])\n"
            "assert status == 0 and 'S29' in out.getvalue()")
    loaded = _loaded_after(code, tmp_path / "cache")
    # A site file names its zone; a LAT,LON,HEIGHT site needs its zone only for a table or
    # CSV header, and looks it up then (timezonefinder).
    expected = ["timezonefinder"] if fmt == "csv" and "," in site else []
    assert loaded == expected
