"""Mount options are checked before any connection, and a slew that fails once its motion was
sent stops the mount (abort sent) and says it may still be moving.

The peer is the scripted loopback INDI "server" of scripted_peer.py, whose mount takes a slew
(Busy) and never reports it ended, so the wait runs out. The
target is put at the anti-solar point overhead (astropy's Sun and sidereal time), so the
site's interlocks allow it whatever the time of day.
"""
from __future__ import annotations

from pathlib import Path
import time

import pytest
from astropy import units as u
from astropy.coordinates import get_sun
from astropy.time import Time

from epochpoint.cli.main import build_parser, main
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.mount import IndiTimeout, Telescope, slew_to_target
from scripted_peer import ScriptedPeer

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

SAMPLES = Path(__file__).resolve().parents[2] / "sample_targets"


def run_cli(argv) -> int:
    """The exit status of `epochpoint ARGV` (argparse usage errors exit inside main)."""
    try:
        return main(argv)
    except SystemExit as done:
        return done.code


@pytest.fixture
def stuck():
    """A mount that takes a slew (Busy) and never ends it; an abort makes it Idle."""
    peer = ScriptedPeer(motion="stuck")
    yield peer
    peer.close()


def overhead_at_night():
    """(Site, Targets): a target at the anti-solar point, with the site placed under it now."""
    now = Time.now()
    sun = get_sun(now)
    ra, dec = (sun.ra.deg + 180.0) % 360.0, -sun.dec.deg
    gmst = now.sidereal_time("mean", longitude=0.0 * u.deg).deg
    longitude = (ra - gmst + 180.0) % 360.0 - 180.0
    site = Site(latitude=dec, longitude=longitude, height=0.0, name="invented",
                timezone="UTC")
    return site, Targets.from_columns(ra=[ra], dec=[dec], name=["Antisun"], epoch=2016.0)


def test_a_slew_that_times_out_is_aborted_and_says_the_mount_may_be_moving(stuck):
    site, targets = overhead_at_night()
    with Telescope.open(stuck.address, timeout_s=5.0) as scope:
        with pytest.raises(IndiTimeout) as caught:
            slew_to_target(scope, targets, site, "Antisun", wait=True, timeout_s=1.0)
    message = str(caught.value)
    assert "\n" not in message
    assert "did not end within 1 s" in message and "may still be moving" in message
    assert "abort sent" in message
    assert stuck.aborts() == 1


def test_cli_slew_failure_after_motion_sends_abort_and_exits_5(stuck, tmp_path, capsys):
    site, targets = overhead_at_night()
    listing = tmp_path / "one.csv"
    ra, dec = float(targets.ra[0]), float(targets.dec[0])
    listing.write_text(f"name,ra,dec,epoch\nAntisun,{ra!r},{dec!r},2016.0\n")
    # TARGETS NAME, positional like every other command.
    code = run_cli(["mount", "slew", str(listing), "Antisun",
                    f"--site={float(site.latitude)!r},{float(site.longitude)!r},0",
                    "--indi", stuck.address, "--wait", "--timeout", "1"])
    err = capsys.readouterr().err.strip().splitlines()
    assert code == 5, err
    assert len(err) == 1 and "may still be moving" in err[0] and "abort sent" in err[0]
    assert stuck.aborts() == 1


@pytest.mark.parametrize("option", [["--timeout", "inf"], ["--timeout", "1e300"],
                                    ["--timeout", "nan"], ["--timeout", "0"],
                                    ["--connect-timeout", "inf"], ["--max-residual", "-1"],
                                    ["--tolerance", "nan"], ["--track-minutes", "-1"],
                                    ["--track-minutes", "inf"], ["--at-limit", "ignore"]])
def test_mount_options_are_refused_before_any_connection(stuck, capsys, option):
    # The older `NAME --targets FILE` form, which the code before this check also took.
    code = run_cli(["mount", "slew", "Wick", "--targets", str(SAMPLES / "loma_candil_targets.csv"),
                 "--site", str(SAMPLES / "loma_candil.toml"), "--indi", stuck.address,
                 "--wait", *option])
    err = capsys.readouterr().err.strip().splitlines()
    assert code == 2
    assert len(err) == 1 and f"argument {option[0]}" in err[0]
    time.sleep(0.2)
    assert stuck.connections == 0


def test_slew_to_target_refuses_an_endless_wait_before_sending_anything(stuck):
    site, targets = overhead_at_night()
    with Telescope.open(stuck.address, timeout_s=5.0) as scope:
        for timeout in (float("inf"), 1e300, float("nan"), -1.0):
            with pytest.raises(ValueError, match="timeout"):
                slew_to_target(scope, targets, site, "Antisun", wait=True, timeout_s=timeout)
    assert not [e for e in stuck.received if e.tag == "newNumberVector"]


def test_old_spellings_still_work_but_are_not_shown(capsys):
    parser = build_parser()
    old = parser.parse_args(["mount", "slew", "Wick", "--targets", "list.csv", "--site", "s.toml",
                             "--indi", "h:1", "--tolerance", "5"])
    new = parser.parse_args(["mount", "slew", "list.csv", "Wick", "--site", "s.toml",
                             "--indi", "h:1", "--max-residual", "5"])
    from epochpoint.cli.mount_cmd import _targets_and_name
    assert _targets_and_name(old) == _targets_and_name(new) == ("list.csv", "Wick")
    assert old.max_residual == new.max_residual == 5.0
    with pytest.raises(SystemExit):
        parser.parse_args(["mount", "slew", "--help"])
    shown = capsys.readouterr().out
    assert "--max-residual" in shown and "TARGETS NAME" in shown
    assert "--tolerance" not in shown and "--targets" not in shown
