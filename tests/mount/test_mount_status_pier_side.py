"""`epochpoint mount status` shows the device's TELESCOPE_PIER_SIDE with our name for the side.

Reference: INDI's TELESCOPE_PIER_SIDE names the side of the pier the tube is on, PIER_WEST
labelled "West (pointing east)" and PIER_EAST "East (pointing west)" (the labels the INDI
telescope simulator itself defines, Debian indi-bin 1.9.9); our sides name the side of the
meridian the target is on (common practice for German mounts: a target east of the meridian
puts the tube west of the pier). So PIER_WEST is our east and PIER_EAST our west. The scripted
loopback peer (scripted_peer.py) reports each switch; the real simulator, behind indiserver,
checks that the property reaches `mount status`.
"""
from __future__ import annotations

import pytest

from epochpoint.cli.main import main
from epochpoint.mount import Telescope
from scripted_peer import DEVICE, ScriptedPeer, definitions


def pier_side_property(on: str) -> str:
    """A TELESCOPE_PIER_SIDE switch vector (INDI 1.7 defSwitchVector) with `on` switched on,
    labelled as the INDI telescope simulator labels it."""
    labels = {"PIER_WEST": "West (pointing east)", "PIER_EAST": "East (pointing west)"}
    switches = "".join(f'<defSwitch name="{name}" label="{label}">'
                       f'{"On" if name == on else "Off"}</defSwitch>'
                       for name, label in labels.items())
    return (f'<defSwitchVector device="{DEVICE}" name="TELESCOPE_PIER_SIDE" state="Ok" '
            f'perm="ro" rule="AtMostOne">{switches}</defSwitchVector>')


def status_lines(capsys, xml: str) -> list[str]:
    peer = ScriptedPeer(definitions() + xml)
    try:
        code = main(["mount", "status", "--indi", peer.address, "--connect-timeout", "5"])
    finally:
        peer.close()
    out, err = capsys.readouterr()
    assert code == 0, err
    return out.splitlines()


@pytest.mark.parametrize("indi, ours, tube", [("PIER_WEST", "east", "west"),
                                              ("PIER_EAST", "west", "east")])
def test_status_names_the_reported_side_ours_and_indis(capsys, indi, ours, tube):
    lines = status_lines(capsys, pier_side_property(indi))
    pier = [line for line in lines if line.startswith("Pier side")]
    assert pier == [f"Pier side    {ours} (INDI {indi}: the tube {tube} of the pier, pointing "
                    f"{ours}), as the device reports it (TELESCOPE_PIER_SIDE)"]


def test_no_pier_side_line_without_the_property_or_with_neither_switch_on(capsys):
    assert not any(line.startswith("Pier side") for line in status_lines(capsys, ""))
    assert not any(line.startswith("Pier side")
                   for line in status_lines(capsys, pier_side_property("")))


@pytest.mark.indi
def test_the_simulators_pier_side_reaches_mount_status(indi_server, capsys):
    with Telescope.open(indi_server.address) as scope:  # connects the simulated mount
        reported = scope.reported_pier_side()
    assert reported in ("PIER_EAST", "PIER_WEST")  # the simulator is a German mount
    code = main(["mount", "status", "--indi", indi_server.address])
    out, err = capsys.readouterr()
    assert code == 0, err
    ours = {"PIER_WEST": "east", "PIER_EAST": "west"}[reported]
    assert f"Pier side    {ours} (INDI {reported}:" in out
