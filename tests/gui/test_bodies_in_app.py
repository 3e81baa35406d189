"""Solar-system targets in the app: the Moon and a planet in the target table with their kind,
their RA/Dec cells showing the place of date (read-only), their night-chart lines following
altitudes that an independent pipeline gives, their paths on the sky dome, elements pasted
in the Minor Planet Center's one-line format, and the Sun's caution or refusal.

Reference for the altitudes: DE421 read through jplephem's own package reader
(tests/bodies/body_helpers.py), light time iterated in the test, the topocentric vector put
on astropy's Earth and transformed by astropy ICRS -> AltAz (no refraction: the site's
pressure is 0). The site, night and elements lines are invented for these tests; the lines
are written field by field at the columns of the MPC's published "Export Format for
Minor-Planet Orbits".
"""
from dataclasses import replace

import erfa
import numpy as np
import pytest
from astropy import units as u
from astropy.coordinates import (AltAz, CartesianRepresentation, EarthLocation, ICRS,
                                 TETE)
from astropy.time import Time
from PySide6.QtCore import Qt

from epochpoint.charts.night_chart import seconds_at
from epochpoint.core.limits import SOLAR_CAUTION, SUN_REFUSED
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.io.planfile import NightSettings, PlanDocument, read_plan_file
from epochpoint.gui.body_dialogs import ElementsDialog, add_body, add_elements
from epochpoint.gui.target_model import COLUMN_INDEX

from shell_support import make_window, settings, wait_for_plan  # noqa: F401

pytestmark = [pytest.mark.filterwarnings("ignore::erfa.ErfaWarning"),
              pytest.mark.filterwarnings("ignore::epochpoint.StaleEarthOrientation")]

C_KM_S = 299792.458
AU_KM = 149597870.7
SITE = Site(latitude=34.2, longitude=-108.6, height=2100.0, pressure=0.0, name="Test mesa")
NIGHT = NightSettings(date="2027-03-18")


def _line(fields: dict, width: int = 194) -> str:
    """A line with each text right-aligned in its 1-based, inclusive column range."""
    cells = [" "] * width
    for (first, last), text in fields.items():
        text = text.ljust(last - first + 1) if first == 167 else text.rjust(last - first + 1)
        cells[first - 1:last] = list(text)
    return "".join(cells).rstrip()


ROCK = _line({(1, 7): "K27Y02B", (9, 13): "14.10", (15, 19): "0.15", (21, 25): "K273H",
              (27, 35): "201.33333", (38, 46): "87.65432", (49, 57): "33.21098",
              (60, 68): "7.65432", (71, 79): "0.1876543", (81, 91): "0.23456789",
              (93, 103): "2.4567890", (167, 194): "Invented Pebble"})


def _doc(names, bodies) -> PlanDocument:
    n = len(names)
    ra = np.array([101.287 if b is None else 0.0 for b in bodies])
    dec = np.array([-16.716 if b is None else 0.0 for b in bodies])
    targets = Targets.from_columns(ra=ra, dec=dec, name=list(names),
                                   extra={"body": np.array(bodies, dtype=object),
                                          "priority": np.array(["2"] * n, dtype=object)})
    return PlanDocument(site=SITE, night=NIGHT, targets=targets)


@pytest.fixture
def body_window(make_window, qtbot):
    window = make_window()
    window.document.load(_doc(["Star", "Moon", "Jupiter"], [None, "moon", "jupiter"]), None)
    wait_for_plan(qtbot, window, lambda plan: len(plan.windows.names) == 3)
    qtbot.waitUntil(lambda: window.now is not None and window.model.computed is not None
                    and window.model.computed.ra_date is not None, timeout=30000)
    return window


def _cell(window, row, key, role=Qt.ItemDataRole.DisplayRole):
    return window.model.index(window.model.model_row(row), COLUMN_INDEX[key]).data(role)


def test_moon_and_planet_shown_with_their_kind_and_place_of_date(body_window):
    window = body_window
    assert [_cell(window, r, "kind") for r in range(3)] == ["star", "Moon", "planet"]
    model = window.model
    for row in (1, 2):
        for key in ("ra", "dec", "epoch", "parallax"):
            index = model.index(model.model_row(row), COLUMN_INDEX[key])
            assert not model.flags(index) & Qt.ItemFlag.ItemIsEditable, (row, key)
        assert _cell(window, row, "epoch") == "" and _cell(window, row, "parallax") == ""
        assert model.flags(model.index(model.model_row(row), COLUMN_INDEX["priority"])) \
            & Qt.ItemFlag.ItemIsEditable
    # The star keeps its catalogue place, editable.
    assert model.flags(model.index(model.model_row(0), COLUMN_INDEX["ra"])) \
        & Qt.ItemFlag.ItemIsEditable
    assert _cell(window, 0, "ra").startswith("06:45")
    # The Moon's RA cell is its computed place of date (not the 0 placeholder), as the core
    # computed it for the shown instant.
    tip = _cell(window, 1, "ra", Qt.ItemDataRole.ToolTipRole)
    assert tip.startswith("Place of date") and not _cell(window, 1, "ra").startswith("00:00")
    ra_shown = float(tip.rsplit(": ", 1)[1].rstrip("°"))
    ra_ref, dec_ref = _reference_of_date("moon", Time(window.now.time, scale="utc"))
    assert abs((ra_shown - ra_ref + 180.0) % 360.0 - 180.0) * np.cos(np.radians(dec_ref)) \
        * 3600.0 < 1.0, (ra_shown, ra_ref)


def _body_helpers():
    """tests/bodies/body_helpers.py, loaded by its path (tests/ is not a package)."""
    import importlib.util
    import os

    path = os.path.join(os.path.dirname(os.path.dirname(__file__)), "bodies", "body_helpers.py")
    spec = importlib.util.spec_from_file_location("body_helpers_for_gui", path)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def _reference_icrs(body: str, t: Time):
    """The body's ICRS place from DE421 via jplephem, light time iterated for the site,
    shifted so astropy's Earth sees the DE421 geocentric vector (astropy then applies the
    site's parallax itself), as tests/bodies/test_vs_astropy_de421.py does."""
    jplephem_bary_au = _body_helpers().jplephem_bary_au
    loc = EarthLocation.from_geodetic(SITE.longitude * u.deg, SITE.latitude * u.deg,
                                      SITE.height * u.m)
    offset = loc.get_gcrs_posvel(t)[0].xyz.to_value(u.au)
    jd = t.tdb.jd
    observer = jplephem_bary_au("earth", jd) + offset
    lt_days = 0.0
    for _ in range(6):  # light time, iterated
        p_body = jplephem_bary_au(body, jd - lt_days)
        lt_days = np.linalg.norm(p_body - observer) * AU_KM / C_KM_S / 86400.0
    astropy_earth = erfa.epv00(t.tdb.jd1, t.tdb.jd2)[1][0]
    return ICRS(CartesianRepresentation((p_body - observer + offset + astropy_earth) * u.au)), loc


def _reference_alt_deg(body: str, t: Time) -> float:
    """Topocentric altitude (deg, no refraction): astropy ICRS -> AltAz, pressure 0."""
    icrs, loc = _reference_icrs(body, t)
    return float(icrs.transform_to(AltAz(obstime=t, location=loc,
                                         pressure=0.0 * u.hPa)).alt.deg)


def _reference_of_date(body: str, t: Time) -> tuple[float, float]:
    """Topocentric apparent RA, Dec of date (deg): astropy ICRS -> TETE at the site."""
    icrs, loc = _reference_icrs(body, t)
    tete = icrs.transform_to(TETE(obstime=t, location=loc))
    return float(tete.ra.deg), float(tete.dec.deg)


def test_chart_lines_follow_the_bodies_altitudes_within_a_tenth_of_a_degree(body_window,
                                                                            qtbot):
    window = body_window
    window.show_tab(0)
    qtbot.waitUntil(lambda: window.tonight.ax is not None, timeout=30000)
    plan = window.tonight.plan
    lines = {line.get_gid(): line for line in window.tonight.ax.get_lines()}
    for row, body, word in ((1, "moon", "Moon"), (2, "jupiter", "planet")):
        line = lines[f"target_{row}"]
        assert f"({word})" in line.get_label()
        x, alt = np.asarray(line.get_xdata(), float), np.asarray(line.get_ydata(), float)
        for k in np.linspace(5, len(x) - 5, 5).astype(int):
            t = plan.t_ref + seconds_at(plan, x[k]) * u.s
            ref = _reference_alt_deg(body, t)
            assert abs(alt[k] - ref) < 0.1, (body, t.isot, alt[k], ref)


def test_sky_dome_draws_each_body_path(body_window, qtbot):
    window = body_window
    window.show_tab(1)
    qtbot.waitUntil(lambda: window.skydome.ax is not None, timeout=30000)
    gids = {line.get_gid() for line in window.skydome.ax.get_lines()}
    assert {"body_path_1", "body_path_2"} <= gids and "body_path_0" not in gids


def test_pasted_elements_add_a_minor_body(body_window, qtbot):
    window = body_window
    dialog = ElementsDialog(window)
    dialog.text.setPlainText(ROCK + "\n")
    assert dialog.try_accept() and dialog.error.text() == ""
    add_elements(window, dialog.targets)
    assert window.document.row_count() == 4
    assert _cell(window, 3, "name") == "Invented Pebble" and _cell(window, 3, "kind") == \
        "asteroid"
    wait_for_plan(qtbot, window, lambda plan: len(plan.windows.names) == 4)
    assert window.plan.windows.geometry.track.slot[3] >= 0  # planned as a moving body


def test_a_bad_elements_line_is_one_line_and_nothing_is_lost(body_window):
    window = body_window
    bad = ROCK[:70] + "0.1x76543" + ROCK[79:]  # eccentricity columns 71-79 garbled
    text = ROCK + "\n" + bad + "\n"
    dialog = ElementsDialog(window)
    dialog.text.setPlainText(text)
    assert not dialog.try_accept()
    message = dialog.error.text()
    assert "\n" not in message and "line 2" in message and "71-79" in message, message
    assert dialog.text.toPlainText() == text  # the user's text kept as typed
    assert window.document.row_count() == 3  # nothing added, nothing removed


def test_add_a_planet_and_save_it_with_its_body(body_window, tmp_path):
    window = body_window
    add_body(window, "mars")
    assert window.document.row_count() == 4 and _cell(window, 3, "kind") == "planet"
    path = str(tmp_path / "bodies.json")
    assert window.save_to(path)
    again = read_plan_file(path)
    assert [str(b) for b in again.targets.extra["body"]][1:] == ["moon", "jupiter", "mars"]


def test_sun_row_refused_without_the_solar_option_and_cautioned_with_it(make_window, qtbot):
    window = make_window()
    window.document.load(_doc(["Sun", "Star"], ["sun", None]), None)
    wait_for_plan(qtbot, window)
    qtbot.waitUntil(lambda: window.model.computed is not None, timeout=30000)
    assert window.caution.solar.isVisibleTo(window)
    assert SUN_REFUSED in window.caution.solar.text()
    assert window.now.refused[0] == SUN_REFUSED and _cell(window, 0, "pointing") == "SUN"
    assert window.plan.windows.reason[0] == SUN_REFUSED
    # With a solar filter declared fitted the Sun may be planned, and the caution shows.
    fitted = replace(SITE, interlocks=replace(SITE.interlocks, solar_filter_fitted=True))
    window.document.replace_site(fitted)
    assert window.caution.solar.text() == SOLAR_CAUTION
    qtbot.waitUntil(lambda: not window.computing(), timeout=30000)
    assert window.now.refused[0] != SUN_REFUSED
    # Removing the Sun row takes the caution away.
    window.document.remove_targets([0])
    assert not window.caution.solar.isVisibleTo(window)
