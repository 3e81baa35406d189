"""The plan file (io/planfile.py): round trips, and one-line errors that name file and place.

Round trips are property checks: what is written must read back identical (floats are
written with Python's shortest repr, which round-trips exactly: Python docs, float.__repr__).
"""
import json
import os

import numpy as np
import pytest

from epochpoint.core.limits import HorizonMask, Interlocks, MountLimits
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.io import InputError
from epochpoint.io.planfile import (NightSettings, PlanDocument, plan_to_json, read_plan_file,
                                    write_plan_file)
from epochpoint.io.planningfields import with_planning_columns
from epochpoint.io.sitefile import site_from_tables, site_to_tables

ROOT = os.path.dirname(os.path.dirname(os.path.dirname(__file__)))
DEMO_PLAN = os.path.join(ROOT, "sample_targets", "loma_candil_plan.json")


def _site():
    mask = HorizonMask(np.array([0.0, 90.0, 200.0]), np.array([5.0, 21.5, 8.0]))
    mount = MountLimits(mount_type="altaz", min_altitude=15.0, ha_east=5.0, ha_west=4.5,
                        dec_min=-80.0, dec_max=70.0, slew_rate=4.0, settle=3.0)
    return Site(latitude=-31.25, longitude=-69.125, height=2410.0, pressure=760.5,
                temperature=-3.0, humidity=0.12, wavelength=0.7, name="Cerro Ficticio",
                timezone="America/Argentina/San_Juan",
                interlocks=Interlocks(mount=mount, horizon=mask, sun_avoidance=40.0))


def _targets():
    # Invented values; the second target has no errors (NaN: unknown).
    errors = {"ra_error": [0.031, np.nan], "dec_error": [0.027, np.nan],
              "ra_dec_corr": [-0.25, np.nan]}
    extra = {"priority": ["1", ""], "exposure": ["45.5", "600"], "repeats": ["3", ""],
             "notes": ["first; with a comma, and \"quotes\"", ""]}
    return with_planning_columns(Targets.from_columns(
        ra=[10.5, 359.999999999], dec=[-89.9, 45.123456789012], epoch=[2016.0, 1991.25],
        pm_ra_cosdec=[1234.5, 0.0], pm_dec=[-0.001, 0.0], parallax=[700.1, 0.0],
        radial_velocity=[-250.0, 0.0], name=["Alpha one", "Beta"], errors=errors,
        extra=extra))


def _doc():
    night = NightSettings(date="2027-01-19", darkness="nautical", min_altitude=25.0,
                          max_airmass=2.5, moon_separation=40.0, moon_scaled=True)
    return PlanDocument(site=_site(), night=night, targets=_targets(),
                        drift_tolerance_arcsec=2.5,
                        schedule=[{"name": "Alpha one", "start": "2027-01-20T01:00:00.000Z",
                                   "end": "2027-01-20T01:10:00.000Z"}],
                        description="invented test plan")


def _assert_same(a: PlanDocument, b: PlanDocument):
    assert a.site == b.site
    assert a.night == b.night
    assert a.drift_tolerance_arcsec == b.drift_tolerance_arcsec
    assert a.schedule == b.schedule and a.description == b.description
    assert list(a.targets.names()) == list(b.targets.names())
    for key in ("ra", "dec", "epoch", "pm_ra_cosdec", "pm_dec", "parallax", "radial_velocity"):
        assert np.array_equal(getattr(a.targets, key), getattr(b.targets, key)), key
    assert set(a.targets.errors) == set(b.targets.errors)
    for key, values in a.targets.errors.items():
        assert np.array_equal(values, b.targets.errors[key], equal_nan=True), key
    for key in ("priority", "exposure", "repeats", "notes"):
        assert list(a.targets.extra[key]) == list(b.targets.extra[key]), key


def test_round_trip_is_exact(tmp_path):
    doc = _doc()
    path = tmp_path / "plan.json"
    write_plan_file(path, doc)
    again = read_plan_file(path)
    _assert_same(doc, again)
    # Written a second time, the file is byte for byte the same.
    write_plan_file(tmp_path / "again.json", again)
    assert (tmp_path / "again.json").read_bytes() == path.read_bytes()


def test_planning_defaults_and_unknown_errors_written_as_documented(tmp_path):
    data = plan_to_json(_doc())
    beta = data["targets"][1]
    # Defaults of core.plan: priority 3, exposure 300 s, repeats 1; unknown errors left out.
    assert (beta["priority"], beta["exposure"], beta["repeats"], beta["notes"]) == (3, 600.0,
                                                                                    1, "")
    assert "ra_error" not in beta and data["targets"][0]["ra_dec_corr"] == -0.25
    assert data["site"]["horizon"]["points"] == [[0.0, 5.0], [90.0, 21.5], [200.0, 8.0]]
    assert data["night"]["min_altitude"] == 25.0 and data["format"] == "epochpoint-plan"


def test_site_tables_round_trip_and_placeholder_pressure():
    site = _site()
    assert site_from_tables(site_to_tables(site), "x.json") == site
    # A site without a pressure gets the standard atmosphere; writing keeps that number.
    plain = Site(latitude=10.0, longitude=20.0, height=1000.0)
    back = site_from_tables(json.loads(json.dumps(site_to_tables(plain))), "x.json")
    assert back == plain and back.interlocks.horizon is None


def test_demo_plan_reads_and_names_its_data_invented():
    doc = read_plan_file(DEMO_PLAN)
    assert doc.night.date == "2027-01-19" and len(doc.targets) == 30
    assert "invented" in doc.description.lower()
    assert doc.site.name == "Loma Candil Observatory"


def _write(tmp_path, data, text=None):
    path = tmp_path / "bad.json"
    path.write_text(text if text is not None else json.dumps(data), encoding="utf-8")
    return path


def _base():
    return plan_to_json(_doc())


@pytest.mark.parametrize("change, fragments", [
    (lambda d: d.update(format="something-else"), ["is not a plan file"]),
    (lambda d: d.update(version=2), ['"version" 2', "version 1"]),
    (lambda d: d.update(colour="red"), ["the top level", "'colour'"]),
    (lambda d: d.pop("targets"), ['no "targets" section']),
    (lambda d: d["targets"][1].update(dec=95.0), ["target 2 (Beta)", "column dec",
                                                  "[-90, +90]"]),
    (lambda d: d["targets"][0].update(parallax=-1.0), ["target 1 (Alpha one)",
                                                       "column parallax", "negative"]),
    (lambda d: d["targets"][1].update(priority=7), ["target 2 (Beta)", "column priority"]),
    (lambda d: d["targets"][1].update(ra="12:00:00"), ["target 2", "column ra",
                                                       "not a number"]),
    (lambda d: d["targets"][0].update(magnitude=3), ["target 1", "'magnitude'"]),
    (lambda d: d["targets"][0].pop("name"), ["target 1", "column name", "missing"]),
    (lambda d: d["site"]["site"].update(latitude=123.0), ['section "site"', "table [site]",
                                                         "latitude"]),
    (lambda d: d["site"]["mount"].update(type="fork"), ['section "site"', "[mount]", "type"]),
    (lambda d: d["night"].update(date="2027-02-30"), ['section "night"', "date"]),
    (lambda d: d["night"].update(darkness="dusk"), ['section "night"', "darkness"]),
    (lambda d: d["drift"].update(tolerance_arcsec=0), ['section "drift"', "tolerance_arcsec"]),
    (lambda d: d["schedule"].append({"name": "x"}), ['section "schedule"', "entry 2"]),
])
def test_bad_content_is_one_line_naming_file_and_place(tmp_path, change, fragments):
    data = _base()
    change(data)
    path = _write(tmp_path, data)
    with pytest.raises(InputError) as info:
        read_plan_file(path)
    message = str(info.value)
    assert "\n" not in message and message.startswith(str(path))
    for fragment in fragments:
        assert fragment in message, message


def test_broken_json_names_the_line(tmp_path):
    path = _write(tmp_path, None, text='{\n  "format": "epochpoint-plan",\n  "version": 1,,\n}')
    with pytest.raises(InputError) as info:
        read_plan_file(path)
    assert "line 3" in str(info.value) and "not valid JSON" in str(info.value)


def test_write_is_atomic_and_keeps_the_old_file_on_failure(tmp_path, monkeypatch):
    path = tmp_path / "plan.json"
    write_plan_file(path, _doc())
    before = path.read_bytes()

    def broken(*_args, **_kwargs):
        raise OSError("disk full")

    monkeypatch.setattr(os, "replace", broken)
    with pytest.raises(OSError):
        write_plan_file(path, _doc())
    assert path.read_bytes() == before
    assert [p.name for p in tmp_path.iterdir()] == ["plan.json"]  # no temporary file left


def test_event_and_time_constraint_cells_survive_a_save_and_reopen(tmp_path):
    """A plan keeps its targets' periodic-event ephemerides and time constraints (the values
    are invented; the columns are those of a target file, README "Timed events")."""
    data = _base()
    data["targets"][0].update(event_epoch=2461200.31234, event_period=3.524749,
                              event_duration=3.1, event_kind="transit",
                              not_before="2027-01-20T01:00:00Z", phase_min=0.9, phase_max=0.1)
    path = _write(tmp_path, data)
    doc = read_plan_file(path)
    again = tmp_path / "again.json"
    write_plan_file(again, doc)
    kept = json.loads(again.read_text())["targets"][0]
    for key in ("event_epoch", "event_period", "event_duration", "event_kind", "not_before",
                "phase_min", "phase_max"):
        assert kept[key] == data["targets"][0][key], key


def test_a_bad_event_cell_in_a_plan_is_one_line_naming_the_target(tmp_path):
    data = _base()
    data["targets"][1].update(event_epoch=2461200.3, event_period=-2.0, event_duration=1.0)
    path = _write(tmp_path, data)
    with pytest.raises(InputError) as info:
        read_plan_file(path)
    message = str(info.value)
    assert "\n" not in message and "target 2 (Beta)" in message and "event_period" in message
