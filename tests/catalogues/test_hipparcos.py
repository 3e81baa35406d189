"""The Hipparcos reader against the published catalogue and Gaia DR3.

Expected values are typed in from outside sources, never computed with the reader:
- hip2.dat values: the "Byte-by-byte Description of file: hip2.dat" of CDS catalogue I/311
  (van Leeuwen 2007, Hipparcos, the New Reduction of the Raw Data) defines the fields; the
  numbers below are that catalogue's entries as quoted in the literature (from memory).
- Gaia DR3 (Gaia Collaboration, Vallenari et al. 2023, A&A 674, A1) positions at epoch 2016.0,
  as printed in the Gaia archive and its citing literature (from memory).
"""
import numpy as np
import pytest

from epochpoint.core.spacemotion import propagate
from epochpoint.io import InputError, read_targets
from epochpoint.io.catalogues import hipparcos

MAS_PER_DEG = 3.6e6


@pytest.fixture(autouse=True)
def _cache_in_tmp(tmp_path_factory, monkeypatch):
    monkeypatch.setenv("EPOCHPOINT_CACHE_DIR", str(tmp_path_factory.getbasetemp() / "cache"))


def test_whole_catalogue_is_read():
    """117,955 entries (van Leeuwen 2007, I/311 ReadMe: 'hip2.dat 276 117955')."""
    stars = hipparcos.read_hipparcos()
    assert len(stars) == 117955
    assert np.all(stars.epoch == 1991.25)  # the catalogue epoch, J1991.25 (I/311 ReadMe)


@pytest.mark.parametrize("hip, plx, e_plx, pmra, pmde, e_pmra, e_pmde", [
    # Barnard's star: van Leeuwen 2007 values as quoted for it (from memory; the proper-motion
    # errors typed in from its line of the published hip2.dat).
    (87937, 548.31, 1.51, -798.58, 10328.12, 1.72, 1.22),
    # Sirius: 379.21 +- 1.58 mas, pm -546.01, -1223.07 mas/yr (van Leeuwen 2007; from memory);
    # the proper-motion errors typed in from its line of the published hip2.dat.
    (32349, 379.21, 1.58, -546.01, -1223.07, 1.33, 1.24),
])
def test_known_stars(hip, plx, e_plx, pmra, pmde, e_pmra, e_pmde):
    star = hipparcos.hipparcos_stars([hip])
    assert star.names()[0] == f"HIP {hip}"
    assert star.parallax[0] == pytest.approx(plx, abs=0.005)
    assert star.errors["parallax_error"][0] == pytest.approx(e_plx, abs=0.005)
    assert star.pm_ra_cosdec[0] == pytest.approx(pmra, abs=0.005)
    assert star.pm_dec[0] == pytest.approx(pmde, abs=0.005)
    assert star.errors["pm_ra_cosdec_error"][0] == pytest.approx(e_pmra, abs=0.005)
    assert star.errors["pm_dec_error"][0] == pytest.approx(e_pmde, abs=0.005)


def test_sirius_is_brightest_and_magnitude_column():
    """Sirius is the brightest star in the Hipparcos passband, Hp about -1.09 (from memory)."""
    stars = hipparcos.read_hipparcos(max_magnitude=0.5)
    brightest = int(np.argmin(stars.extra["hp_mag"]))
    assert stars.names()[brightest] == "HIP 32349"
    assert stars.extra["hp_mag"][brightest] == pytest.approx(-1.09, abs=0.02)
    # Stars brighter than Hp 0.5 (naked-eye brightest dozen or so; common practice).
    assert 5 <= len(stars) <= 15


@pytest.mark.parametrize("hip, rv_km_s, ra_2016, dec_2016", [
    # Barnard's star, Gaia DR3 4472832130942575872; rv -110.6 km/s (from memory).
    (87937, -110.6, 269.44850252543836, 4.739420051112412),
    # Proxima Centauri, Gaia DR3 5853498713190525696; rv -22.4 km/s (from memory).
    (70890, -22.4, 217.39232147200883, -62.67607511676666),
])
def test_propagated_to_gaia_epoch(hip, rv_km_s, ra_2016, dec_2016):
    """Hipparcos 1991.25 propagated to 2016.0 (rigorously, with the radial velocity) agrees with
    Gaia DR3 within 3 combined standard errors of the Hipparcos position and proper motion."""
    star = hipparcos.hipparcos_stars([hip])
    dt = 2016.0 - 1991.25
    moved = propagate(star.ra, star.dec, star.parallax, star.pm_ra_cosdec, star.pm_dec,
                      np.array([rv_km_s]), dt)
    ra, dec = moved.radec_deg()
    e = star.errors
    sigma_ra = np.hypot(e["ra_error"][0], dt * e["pm_ra_cosdec_error"][0])
    sigma_dec = np.hypot(e["dec_error"][0], dt * e["pm_dec_error"][0])
    d_ra = (ra[0] - ra_2016) * np.cos(np.radians(dec_2016)) * MAS_PER_DEG
    d_dec = (dec[0] - dec_2016) * MAS_PER_DEG
    assert abs(d_ra) < 3 * sigma_ra and abs(d_dec) < 3 * sigma_dec, (d_ra, d_dec)
    # The stars moved far more than that: the check is not trivially true.
    assert np.hypot(star.ra[0] - ra_2016, star.dec[0] - dec_2016) * MAS_PER_DEG > 50_000


def test_cache_matches_text_and_is_reused(tmp_path, monkeypatch):
    monkeypatch.setenv("EPOCHPOINT_CACHE_DIR", str(tmp_path))
    hipparcos._columns_for.cache_clear()
    cached = hipparcos.catalogue_columns()
    files = list(tmp_path.glob("hipparcos-*.npz"))
    assert len(files) == 1
    parsed = hipparcos.parse_catalogue(hipparcos.catalogue_file())
    for name in parsed:
        np.testing.assert_array_equal(cached[name], parsed[name])
    hipparcos._columns_for.cache_clear()
    files[0].write_bytes(b"not a cache")  # a broken cache is rebuilt, never fatal
    again = hipparcos.catalogue_columns()
    np.testing.assert_array_equal(again["hip"], parsed["hip"])
    hipparcos._columns_for.cache_clear()


def test_target_list_names_resolve(tmp_path):
    path = tmp_path / "list.csv"
    path.write_text("name,ra,dec\nHIP 87937,,\nOwn star,10.5,-20.25\nhip32349,,\n")
    targets = read_targets(path)
    assert list(targets.names()) == ["HIP 87937", "Own star", "hip32349"]
    # Barnard's star at J1991.25: RArad 4.7028598776, DErad 0.0814769927, typed in from its
    # line of the published hip2.dat (bytes 16-28 and 30-42).
    assert targets.ra[0] == pytest.approx(np.degrees(4.7028598776), abs=1e-9)
    assert targets.dec[0] == pytest.approx(np.degrees(0.0814769927), abs=1e-9)
    assert list(targets.epoch) == [1991.25, 2000.0, 1991.25]
    assert targets.ra[1] == 10.5


def test_unknown_number_is_a_one_line_row_error(tmp_path):
    path = tmp_path / "names.csv"
    path.write_text("name,ra,dec\nHIP 87937,,\nHIP 999999,,\n")
    with pytest.raises(InputError) as err:
        read_targets(path)
    text = str(err.value)
    assert "line 3" in text and "HIP 999999" in text and "\n" not in text
    kept = read_targets(path, skip_bad_rows=True, on_skip=lambda e: None)
    assert list(kept.names()) == ["HIP 87937"]
