"""Mount options are checked before any connection, and a slew that fails once its motion was
sent stops the mount (abort sent) and says it may still be moving.

The peer is a scripted loopback INDI "server" (INDI protocol 1.7 element names, E. C. Downey
2007) whose mount takes a slew (Busy) and never reports it ended, so the wait runs out. The
target is put at the anti-solar point overhead (astropy's Sun and sidereal time), so the
site's interlocks allow it whatever the time of day.
"""
from __future__ import annotations

import socket
import threading
from pathlib import Path
import time
import xml.etree.ElementTree as ET

import pytest
from astropy import units as u
from astropy.coordinates import get_sun
from astropy.time import Time

from epochpoint.cli.main import build_parser, main
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.mount import IndiTimeout, Telescope, slew_to_target

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

SAMPLES = Path(__file__).resolve().parents[2] / "sample_targets"
DEVICE = "Stuck Mount"
DEFINITIONS = f"""
<defSwitchVector device="{DEVICE}" name="CONNECTION" state="Ok" perm="rw" rule="OneOfMany">
  <defSwitch name="CONNECT">On</defSwitch><defSwitch name="DISCONNECT">Off</defSwitch>
</defSwitchVector>
<defNumberVector device="{DEVICE}" name="EQUATORIAL_EOD_COORD" state="Idle" perm="rw">
  <defNumber name="RA" format="%010.6m" min="0" max="24" step="0">1:30:00</defNumber>
  <defNumber name="DEC" format="%010.6m" min="-90" max="90" step="0">-10:30:00</defNumber>
</defNumberVector>
<defSwitchVector device="{DEVICE}" name="ON_COORD_SET" state="Idle" perm="rw" rule="OneOfMany">
  <defSwitch name="TRACK">On</defSwitch><defSwitch name="SLEW">Off</defSwitch>
  <defSwitch name="SYNC">Off</defSwitch>
</defSwitchVector>
<defSwitchVector device="{DEVICE}" name="TELESCOPE_ABORT_MOTION" state="Idle" perm="rw"
  rule="AtMostOne"><defSwitch name="ABORT">Off</defSwitch></defSwitchVector>
"""


class StuckMount:
    """Accepts connections; a new EQUATORIAL_EOD_COORD turns Busy and stays Busy until an
    abort arrives, which makes it Idle. Records every element received."""

    def __init__(self):
        self.listener = socket.create_server(("127.0.0.1", 0))
        self.port = self.listener.getsockname()[1]
        self.address = f"127.0.0.1:{self.port}"
        self.connections = 0
        self.received: list[ET.Element] = []
        threading.Thread(target=self._serve, daemon=True).start()

    def _serve(self):
        self.listener.settimeout(30.0)
        try:
            connection, _ = self.listener.accept()
        except OSError:
            return
        self.connections += 1
        with connection:
            connection.sendall(DEFINITIONS.encode())
            parser = ET.XMLPullParser(events=("end",))
            parser.feed(b"<stream>")
            connection.settimeout(30.0)
            try:
                while chunk := connection.recv(4096):
                    parser.feed(chunk)
                    for _, element in parser.read_events():
                        if element.tag.startswith(("new", "getProperties")):
                            self.received.append(element)
                            self._answer(connection, element)
            except OSError:
                pass

    def _answer(self, connection, element):
        name = element.get("name")
        if element.tag == "newNumberVector" and name == "EQUATORIAL_EOD_COORD":
            state = "Busy"
        elif element.tag == "newSwitchVector" and name == "TELESCOPE_ABORT_MOTION":
            state = "Idle"
        else:
            return
        connection.sendall(f'<setNumberVector device="{DEVICE}" name="EQUATORIAL_EOD_COORD" '
                           f'state="{state}"><oneNumber name="RA">1.5</oneNumber>'
                           f'<oneNumber name="DEC">-10.5</oneNumber></setNumberVector>'.encode())

    def aborts(self) -> int:
        return sum(1 for e in self.received if e.get("name") == "TELESCOPE_ABORT_MOTION")

    def close(self):
        self.listener.close()


def run_cli(argv) -> int:
    """The exit status of `epochpoint ARGV` (argparse usage errors exit inside main)."""
    try:
        return main(argv)
    except SystemExit as done:
        return done.code


@pytest.fixture
def stuck():
    peer = StuckMount()
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
                                    ["--tolerance", "nan"]])
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
