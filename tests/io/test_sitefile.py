"""Sites from TOML files and LAT,LON,HEIGHT strings, with one-line errors naming the file."""
import pytest

from epochpoint.core.site import standard_pressure_hpa
from epochpoint.io import InputError, parse_site_spec, read_site, read_site_file

GOOD_TOML = """\
# An invented observatory for tests.
[site]
name = "Cerro Ficticio"
latitude = -31.2
longitude = -69.9
height = 2410.0
timezone = "America/Argentina/San_Juan"

[weather]
pressure = 760.0
temperature = 8.0
humidity = 0.25
wavelength = 0.55

[horizon]
points = [[0, 10], [180, 15]]

[mount]
type = "equatorial"
"""


def test_site_spec_southern_western():
    site = parse_site_spec("-24.6,-70.4,2635")
    assert (site.latitude, site.longitude, site.height) == (-24.6, -70.4, 2635.0)
    # No pressure given: the ICAO standard atmosphere at 2635 m (ISO 2533:1975), ~734 hPa.
    assert site.pressure == pytest.approx(734.2, abs=0.5)


def test_read_site_accepts_spec_with_spaces_and_no_height():
    site = read_site(" 52.1 , 4.3 ")
    assert (site.latitude, site.longitude, site.height) == (52.1, 4.3, 0.0)


@pytest.mark.parametrize("spec, fragment", [
    ("-24.6,abc,2635", "longitude 'abc' is not a number"),
    ("95,0,0", "latitude"),
    ("1,2,3,4", "not LAT,LON,HEIGHT"),
    ("1,2,99999", "site '1,2,99999'"),  # above the troposphere
])
def test_bad_site_specs(spec, fragment):
    with pytest.raises(InputError) as info:
        read_site(spec)
    assert fragment in str(info.value) and "\n" not in str(info.value)


def test_toml_site_and_reserved_tables(write_file):
    path = write_file("site.toml", GOOD_TOML)
    site, reserved = read_site_file(path)
    assert site.name == "Cerro Ficticio"
    assert (site.latitude, site.longitude, site.height) == (-31.2, -69.9, 2410.0)
    assert site.timezone == "America/Argentina/San_Juan"
    assert (site.pressure, site.temperature, site.humidity, site.wavelength) == \
        (760.0, 8.0, 0.25, 0.55)
    assert reserved == {"horizon": {"points": [[0, 10], [180, 15]]},
                        "mount": {"type": "equatorial"}}
    assert read_site(path) == site


def test_toml_minimal_site_uses_defaults(write_file):
    path = write_file("min.toml", "[site]\nlatitude = 10\nlongitude = 20\n")
    site = read_site(path)
    # No zone given: the one holding 10 N, 20 E, in Chad (Africa/Ndjamena; from memory).
    assert site.height == 0.0 and site.timezone == "Africa/Ndjamena"
    assert site.timezone_from_coordinates
    assert site.pressure == pytest.approx(standard_pressure_hpa(0.0))
    assert site.pressure == pytest.approx(1013.25)  # ICAO sea-level pressure (ISO 2533:1975)


def test_pressure_zero_turns_refraction_off(write_file):
    path = write_file("s.toml", "[site]\nlatitude = 10\nlongitude = 20\n[weather]\npressure = 0\n")
    assert read_site(path).pressure == 0.0


@pytest.mark.parametrize("body, fragments", [
    ("[site]\nlatitude = 1\nlongitude = 2\naltitude = 5\n",
     ["[site]", "'altitude'", "unknown key"]),
    ("[site]\nlatitude = 1\nlongitude = 2\n[weather]\nwind = 3\n", ["[weather]", "'wind'"]),
    ("[site]\nlatitude = 1\nlongitude = 2\n[dome]\nx = 1\n", ["'dome'", "unknown table"]),
    ("[site]\nlatitude = 95\nlongitude = 2\n", ["[site]", "latitude", "[-90, +90]"]),
    ("[site]\nlatitude = 1\nlongitude = 2\n[weather]\nhumidity = 25\n",
     ["[weather]", "humidity", "[0, 1]"]),
    ("[site]\nlatitude = '1'\nlongitude = 2\n", ["latitude", "not a number"]),
    ("[site]\nlatitude = true\nlongitude = 2\n", ["latitude", "not a number"]),
    ("[site]\nlongitude = 2\n", ["no latitude"]),
    ("[weather]\npressure = 700\n", ["no [site] table"]),
    ("site = 3\n", ["[site]"]),
    ("[site]\nlatitude = 1\nlongitude = 2\ntimezone = 'Mars/Olympus_Mons'\n",
     ["timezone", "'Mars/Olympus_Mons'", "IANA"]),
    ("[site]\nlatitude = 1\nlongitude = 2\nname = 5\n", ["name", "text"]),
])
def test_site_file_errors_are_one_line_naming_the_file(write_file, body, fragments):
    path = write_file("obs.toml", body)
    with pytest.raises(InputError) as info:
        read_site(path)
    text = str(info.value)
    assert text.startswith(str(path)) and "\n" not in text
    for fragment in fragments:
        assert fragment in text


def test_invalid_toml_names_the_line(write_file):
    path = write_file("broken.toml", "[site]\nlatitude = 1\nlongitude = = 2\n")
    with pytest.raises(InputError) as info:
        read_site(path)
    assert info.value.line == 3 and "line 3" in str(info.value) and "\n" not in str(info.value)


def test_missing_site_file(tmp_path):
    with pytest.raises(InputError, match="no such site file"):
        read_site(tmp_path / "nowhere.toml")


def test_undecodable_site_file(write_file):
    with pytest.raises(InputError, match="not UTF-8"):
        read_site(write_file("bin.toml", b"[site]\nname = \"\xff\"\n"))
