"""Words and units the command line shows people: one meaning per word, one unit style.

Unit style of column headings (our convention, README): a sexagesimal column carries no unit
(its form says it); a numeric column ends with its unit after a space, in ASCII: deg, " (arcsec),
mas, h, s, d. Catalogue coordinates are "(catalogue)", apparent ones "(of date)".

Outside reference for the sidereal time: astropy `Time.sidereal_time('apparent', longitude)`
(IAU 2006/2000A apparent sidereal time from astropy's own ERFA call and IERS table), formatted
here by astropy `Angle.to_string`, never by the code under test.
"""
import re

import numpy as np
import pytest
from astropy import units as u
from astropy.coordinates import Angle
from astropy.time import Time

from epochpoint.cli.main import main
from epochpoint.cli.mount_cmd import _status_lines
from epochpoint.core.limits import Interlocks, MountLimits
from epochpoint.core.site import Site
from epochpoint.mount.telescope import MountStatus

# An invented catalogue with a fast mover and one with errors (drift and error columns shown).
TARGETS_CSV = ("name,ra,dec,epoch,pm_ra_cosdec,pm_dec,parallax,radial_velocity,ra_error,"
               "dec_error,pm_ra_cosdec_error,pm_dec_error\n"
               "Alpha,12:30:00.0,-45:00:00,2016.0,-3000,2500,40,12,0.05,0.05,0.1,0.1\n"
               "Beta,210.5,+62.25,2016.0,0,0,0,0,0.05,0.05,0.1,0.1\n")
WHEN = "2025-03-10T04:00:00Z"  # inside the shipped Earth-orientation table


@pytest.fixture
def targets(tmp_path):
    path = tmp_path / "targets.csv"
    path.write_text(TARGETS_CSV)
    return str(path)


def _run(capsys, *args):
    code = main(list(args))
    out, err = capsys.readouterr()
    assert code == 0, err
    return out


def _headings(out: str) -> list[str]:
    """Column headings of a people table: the line above the first dashed rule, split on 2+
    spaces (headings are right- or left-aligned with at least two spaces between)."""
    lines = out.splitlines()
    rule = next(i for i, line in enumerate(lines) if line.startswith("---"))
    return [h for h in re.split(r"\s{2,}", lines[rule - 1].strip()) if h]


def test_positions_headings_label_apparent_coordinates_and_units(capsys, targets):
    out = _run(capsys, "positions", targets, "--site=-30.2,-70.8,2200", "--at", WHEN,
               "--ledger")
    heads = _headings(out)
    assert heads[:9] == ["Name", "RA (of date)", "Dec (of date)", "HA", "Alt deg", "Az deg",
                         "Airmass", "Par.ang deg", 'Drift "']
    assert "Err mas" in heads
    ledger = [h for h in heads[heads.index("Err mas") + 1:]]
    assert ledger and all(h.endswith(' "') for h in ledger), ledger
    assert "(date)" not in out  # the old label


def test_drift_headings_use_the_same_unit_style(capsys, targets):
    out = _run(capsys, "drift", targets, "--at", WHEN, "--tolerance", "1", "--all")
    assert _headings(out) == ["Name", 'Drift "', 'Rate "/yr', "Over", "Crossing (UTC)", "+- d",
                              "Err maj mas", "Err min mas", "Err PA deg"]


@pytest.mark.parametrize("longitude", [-110.88, 112.7, 150.0, 60.0])
def test_positions_sidereal_time_matches_astropy(capsys, targets, longitude):
    # At 2025-03-10T04:00Z these longitudes give LST of about 7.8 h, 22.7 h, 1.2 h and 19.2 h
    # (astropy); an LST above 12 h used to print as a negative hour angle.
    out = _run(capsys, "positions", targets, f"--site=31.68,{longitude},1000", "--at", WHEN)
    found = re.findall(r"LST (\d\d):(\d\d):(\d\d\.\d)\b", out)
    assert len(found) == 1 and "LST +" not in out and "LST -" not in out, out.splitlines()[0]
    h, m, s = found[0]
    shown_h = int(h) + int(m) / 60 + float(s) / 3600
    # Reference: astropy Time.sidereal_time('apparent', longitude), in hours.
    reference = Time(WHEN).sidereal_time("apparent", longitude=longitude * u.deg)
    reference_h = reference.hour
    assert 0.0 <= shown_h < 24.0
    # Within the 0.05 s of rounding to 0.1 s (the values agree to about 1 microsecond).
    difference_h = (shown_h - reference_h + 12.0) % 24.0 - 12.0
    assert abs(difference_h * 3600.0) < 0.051
    text = Angle(reference_h, u.hourangle).wrap_at(24 * u.hourangle).to_string(
        unit=u.hourangle, sep=":", precision=1, pad=True)
    # The same text as astropy's formatting, except at a rounding boundary of 0.1 s.
    if abs((reference_h * 36000.0) % 1.0 - 0.5) > 0.02:
        assert f"{h}:{m}:{s}" == text


@pytest.mark.parametrize("mount_type, shown", [("german", "German equatorial"),
                                                ("equatorial", "fork equatorial"),
                                                ("altaz", "alt-az")])
def test_mount_status_names_our_mount_type(mount_type, shown):
    # The trade's names for the three mounts (common practice).
    site = Site(latitude=-30.2, longitude=-70.8, height=2200.0,
                interlocks=Interlocks(mount=MountLimits(mount_type=mount_type)))
    status = MountStatus(device="Sim", address="localhost:7624", connected=True,
                         coordinate_property=None, ra_deg=None, dec_deg=None, motion_state=None,
                         tracking=None, parked=None, target_ra_deg=None, target_dec_deg=None,
                         latitude=None, longitude=None, height=None, time_utc=None,
                         utc_offset_h=None)
    lines = _status_lines(status, site)
    assert f"Our mount    {shown}" in lines
    assert "Our site     lat -30.20000 deg, lon -70.80000 deg, 2200 m" in lines


@pytest.mark.parametrize("command", [("plan",), ("export",), ("positions",), ("drift",),
                                     ("mount", "slew"), ("mount", "status")])
def test_help_says_illuminated_fraction_and_drift_only_for_drift(capsys, command):
    with pytest.raises(SystemExit):
        main([*command, "--help"])
    text = " ".join(capsys.readouterr().out.split())
    assert "phase" not in text.lower()
    if command == ("plan",):
        assert "illuminated fraction" in text
    if command in (("export",), ("mount", "slew")):
        # Drift means only the offset of the true position from the catalogue position.
        assert "drift" not in text.lower()
