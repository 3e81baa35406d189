"""The export's short ephemeris for solar-system bodies: its rows agree with positions() at
their instants and, for the apparent frame, with an independent pipeline (DE421 read through
jplephem's own reader, light time iterated here, astropy ICRS -> TETE) within 10 mas; linear
interpolation between rows stays within the tolerance (checked at every midpoint); the
ephemeris is written in every format; the Sun is refused without the solar option.
"""
import csv
import io
import json
import sys
from pathlib import Path

import erfa
import numpy as np
import pytest
from astropy import units as u
from astropy.coordinates import TETE, CartesianRepresentation, EarthLocation, ICRS
from astropy.io.votable import parse as parse_votable
from astropy.time import Time

from epochpoint.core.export import export_positions, export_text, placed
from epochpoint.core.positions import positions
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from bodies.body_helpers import jplephem_bary_au  # noqa: E402

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

# An invented southern site; at WHEN the Moon is 27 deg up there and Mars is up too.
SITE = Site(latitude=-30.2, longitude=-70.8, height=2200.0, name="Cerro Ventoso (invented)",
            pressure=0.0)
WHEN = "2025-03-10T04:00:00Z"
AU_KM, C_KM_S = 149597870.7, 299792.458


def _targets():
    return Targets.from_columns(
        ra=[0.0, 0.0, 0.0, 101.287], dec=[0.0, 0.0, 0.0, -16.716], epoch=2016.0,
        name=["Moon", "Mars", "Sun", "Sirius"],
        extra={"body": np.array(["moon", "mars", "sun", ""], dtype=object)})


def _sep_arcsec(ra1, dec1, ra2, dec2):
    a = np.radians([ra1, dec1, ra2, dec2])
    c = np.sin(a[1]) * np.sin(a[3]) + np.cos(a[1]) * np.cos(a[3]) * np.cos(a[0] - a[2])
    s = np.hypot(np.cos(a[3]) * np.sin(a[0] - a[2]),
                 np.cos(a[1]) * np.sin(a[3]) - np.sin(a[1]) * np.cos(a[3]) * np.cos(a[0] - a[2]))
    return np.degrees(np.arctan2(s, c)) * 3600.0


def _astropy_topocentric_apparent(body, t: Time):
    """Topocentric apparent place of date with annual aberration (the geocentre's velocity),
    as the export defines it: the DE421 site-to-body vector (light time from the site) set
    at astropy's own Earth, through astropy ICRS -> TETE (geocentric)."""
    loc = EarthLocation.from_geodetic(SITE.longitude * u.deg, SITE.latitude * u.deg,
                                      SITE.height * u.m)
    offset = loc.get_gcrs_posvel(t)[0].xyz.to_value(u.au)
    jd = t.tdb.jd
    observer = jplephem_bary_au("earth", jd) + offset
    lt = 0.0
    for _ in range(6):
        pb = jplephem_bary_au(body, jd - lt)
        lt = np.linalg.norm(pb - observer) * AU_KM / C_KM_S / 86400.0
    earth = erfa.epv00(t.tdb.jd1, t.tdb.jd2)[1][0]
    tete = ICRS(CartesianRepresentation((pb - observer + earth) * u.au)).transform_to(
        TETE(obstime=t))
    return tete.ra.deg, tete.dec.deg


def test_the_sun_is_refused_and_only_allowed_bodies_get_an_ephemeris():
    table = export_positions(_targets(), SITE, WHEN, "apparent", include_all=True)
    refused = dict(zip(table["name"], table["refused"]))
    assert "no solar filter declared fitted" in refused["Sun"]
    assert refused["Moon"] == "" and refused["Mars"] == ""
    assert set(table.ephemeris["name"]) == {"Moon", "Mars"}


@pytest.mark.parametrize("frame, columns", [("observed", ("alt", "az", "ha", "dec_observed")),
                                            ("icrs", ("ra_propagated", "dec_propagated"))])
def test_ephemeris_rows_equal_positions_at_their_instants(frame, columns):
    table = export_positions(_targets(), SITE, WHEN, frame)
    eph = table.ephemeris
    for k in range(0, eph.nrows, 7):
        row = np.flatnonzero(_targets().names() == eph["name"][k])
        at = positions(_targets()[row], SITE, eph["time"][k])
        for c in columns + ("rate_ra", "rate_dec", "rate_alt", "rate_az"):
            assert eph[c][k] == pytest.approx(at[c][0], abs=1e-9), (c, k)


def test_apparent_ephemeris_within_10_mas_of_astropy_with_de421():
    """Every apparent-frame row of the Moon and Mars: the topocentric apparent place of date
    within 10 mas of astropy fed DE421 (reference built in the test)."""
    eph = export_positions(_targets(), SITE, WHEN, "apparent").ephemeris
    worst = 0.0
    for k in range(eph.nrows):
        ra, dec = _astropy_topocentric_apparent(str(eph["name"][k]).lower(),
                                                Time(eph["time"][k].rstrip("Z")))
        worst = max(worst, _sep_arcsec(eph["ra_apparent"][k], eph["dec_apparent"][k], ra, dec))
    print(f"\nworst of {eph.nrows} rows against astropy+DE421: {worst * 1000:.3f} mas")
    assert worst * 1000.0 < 10.0


@pytest.mark.parametrize("frame, pairs", [("apparent", (("ra_apparent", "dec_apparent"),)),
                                          ("observed", (("az", "alt"), ("ha", "dec_observed")))])
def test_linear_interpolation_between_rows_stays_within_the_tolerance(frame, pairs):
    """At every midpoint between consecutive rows, the linear interpolation of the exported
    coordinates against the place computed there: on the sky, under the 1 arcsec tolerance."""
    table = export_positions(_targets(), SITE, WHEN, frame, tolerance_arcsec=1.0)
    eph, step = table.ephemeris, table.meta["ephemeris_step_s"]
    worst = 0.0
    for name in ("Moon", "Mars"):
        rows = np.flatnonzero(eph["name"] == name)
        one = _targets()[np.flatnonzero(_targets().names() == name)]
        for a, b in zip(rows, rows[1:]):
            middle = Time(eph["time"][a].rstrip("Z")) + step / 2.0 * u.s
            at = placed(one, SITE, middle)
            for lon, lat in pairs:
                d_lon = (eph[lon][b] - eph[lon][a] + 180.0) % 360.0 - 180.0
                lon_mid = eph[lon][a] + d_lon / 2.0
                lat_mid = (eph[lat][a] + eph[lat][b]) / 2.0
                worst = max(worst, _sep_arcsec(lon_mid, lat_mid, at[lon][0], at[lat][0]))
    print(f"\n{frame}: step {step:g} s, worst midpoint error {worst:.3f} arcsec")
    assert worst < 1.0
    # The step is not needlessly fine (a minute or more at 1 arcsec).
    assert step >= 30.0


def test_the_ephemeris_is_in_every_format():
    table = export_positions(_targets(), SITE, WHEN, "apparent")
    n = table.ephemeris.nrows
    document = json.loads(export_text(table, "json"))
    assert len(document["ephemeris"]) == n and document["ephemeris_units"]["rate_ra"] == \
        "arcsec/s"
    assert document["meta"]["ephemeris_step_s"] == table.meta["ephemeris_step_s"]
    text = export_text(table, "csv")
    rows = list(csv.DictReader(line for line in io.StringIO(text) if not line.startswith("#")))
    assert sum(r["row"] == "ephemeris" for r in rows) == n
    assert sum(r["row"] == "place" for r in rows) == table.nrows
    votable = parse_votable(io.BytesIO(export_text(table, "votable").encode()))
    tables = votable.resources[0].tables
    assert len(tables) == 2 and tables[1].name == "ephemeris" and len(tables[1].array) == n
