"""The package imports and the invented demo files that `make run` uses are present and sound.

The demo-data checks compare the files against their own stated schema (sample_targets/README.md
and the column line in the target file); sexagesimal fields are read with astropy's Angle as an
independent parser.
"""
import csv
import tomllib
import zoneinfo
from pathlib import Path

import pytest
from astropy import units as u
from astropy.coordinates import Angle

SAMPLES_DIR = Path(__file__).resolve().parent.parent / "sample_targets"
SITE_FILE = SAMPLES_DIR / "loma_candil.toml"
TARGETS_FILE = SAMPLES_DIR / "loma_candil_targets.csv"

TARGET_COLUMNS = [
    "name", "ra", "dec", "epoch", "pm_ra_cosdec", "pm_dec", "parallax", "radial_velocity",
    "ra_error", "dec_error", "parallax_error", "pm_ra_cosdec_error", "pm_dec_error",
    "priority", "exposure", "repeats", "notes",
]


def _target_rows() -> list[dict[str, str]]:
    lines = TARGETS_FILE.read_text(encoding="utf-8").splitlines()
    data_lines = [line for line in lines if not line.startswith("#")]
    return list(csv.DictReader(data_lines))


def _degrees(text: str, sexagesimal_unit) -> float:
    """Degrees from a plain number of degrees or from a sexagesimal string in the given unit."""
    if ":" in text:
        return Angle(text, unit=sexagesimal_unit).to_value(u.deg)
    return float(text)


def test_package_imports():
    import epochpoint

    assert epochpoint.__name__ == "epochpoint"


@pytest.mark.parametrize("path, first_line", [
    (SITE_FILE, "# Demo data: an invented observatory for Epochpoint's examples. Not a real site."),
    (TARGETS_FILE, "# Demo data: invented targets for Epochpoint's examples; not real stars."),
    (SAMPLES_DIR / "README.md", "# Sample targets: invented demo data"),
])
def test_demo_file_starts_with_its_demo_data_notice(path, first_line):
    assert path.is_file(), f"missing {path}"
    assert path.read_text(encoding="utf-8").splitlines()[0] == first_line


def test_demo_site_file_follows_the_site_schema():
    site = tomllib.loads(SITE_FILE.read_text(encoding="utf-8"))
    assert set(site) == {"site", "weather", "horizon", "mount", "safety"}
    assert set(site["site"]) == {"name", "latitude", "longitude", "height", "timezone"}
    assert set(site["weather"]) == {"pressure", "temperature", "humidity", "wavelength"}
    assert -90.0 <= site["site"]["latitude"] <= 90.0
    assert -180.0 <= site["site"]["longitude"] <= 180.0
    zoneinfo.ZoneInfo(site["site"]["timezone"])  # raises if not an IANA zone in tzdata
    assert 0.0 <= site["weather"]["humidity"] <= 1.0
    # The demo keeps the interlocks on: a minimum altitude and Sun avoidance.
    assert site["mount"]["min_altitude"] > 0.0 and site["safety"]["sun_avoidance"] >= 30.0


def test_demo_target_file_has_thirty_complete_rows():
    rows = _target_rows()
    assert len(rows) == 30
    assert list(rows[0].keys()) == TARGET_COLUMNS
    assert all(None not in row and None not in row.values() for row in rows), "ragged row"
    assert len({row["name"] for row in rows}) == 30
    assert {row["epoch"] for row in rows} == {"2016.0", "1991.25", "J2000.0"}
    for row in rows:
        ra_deg = _degrees(row["ra"], u.hourangle)
        dec_deg = _degrees(row["dec"], u.deg)
        assert 0.0 <= ra_deg < 360.0, row["name"]
        assert -90.0 <= dec_deg <= 90.0, row["name"]
        assert 1 <= int(row["priority"]) <= 5, row["name"]


def test_demo_targets_cover_the_promised_cases():
    """Cases promised by sample_targets/README.md.

    A star never rises where dec > 90 deg + latitude at a southern site, and never sets where
    dec < -90 deg - latitude (common practice, ignoring refraction).
    """
    latitude_deg = tomllib.loads(SITE_FILE.read_text(encoding="utf-8"))["site"]["latitude"]
    rows = _target_rows()
    dec_deg = {row["name"]: _degrees(row["dec"], u.deg) for row in rows}
    never_rise = {name for name, dec in dec_deg.items() if dec > 90.0 + latitude_deg}
    assert never_rise == {"Farlight", "Northlamp"}
    assert sum(dec < -80.0 for dec in dec_deg.values()) >= 3
    assert any(abs(dec) < 1.0 for dec in dec_deg.values())
    fast_movers = [row for row in rows
                   if max(abs(float(row["pm_ra_cosdec"])), abs(float(row["pm_dec"]))) >= 1000.0]
    assert len(fast_movers) >= 5
    assert any(float(row["parallax"]) >= 500.0 for row in rows)
    assert any(abs(float(row["radial_velocity"])) >= 200.0 for row in rows)
    assert any(":" in row["ra"] for row in rows) and any(":" not in row["ra"] for row in rows)
