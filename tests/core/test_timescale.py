"""Instants and the offline Earth-orientation table: never download, warn when stale."""
import warnings

import erfa
import numpy as np
import pytest
from astropy.time import Time
from astropy.utils import iers

import epochpoint as ep
from epochpoint.core.timescale import (StaleEarthOrientation, TimeInputError,
                                       check_earth_orientation, iso_z, parse_time)

SITE = ep.Site(latitude=-24.6, longitude=-70.4, height=2635.0)


def test_astropy_is_configured_never_to_download():
    assert iers.conf.auto_download is False


@pytest.mark.parametrize("text", ["2027-01-20T23:10:00Z", "2027-01-20T23:10:00",
                                  "2027-01-20T20:10:00-03:00", "2027-01-20 23:10:00+00:00"])
def test_parse_time_forms_are_utc(text):
    assert iso_z(parse_time(text)) == "2027-01-20T23:10:00.000Z"


@pytest.mark.parametrize("text", ["", "tomorrow", "2027-13-01T00:00:00Z", "20:10"])
def test_parse_time_rejects_garbage(text):
    with pytest.raises(TimeInputError):
        parse_time(text)


def test_now_works_with_the_shipped_table():
    # Time.now() with whatever table is installed: works, at most a warning.
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", StaleEarthOrientation)
        res = ep.positions(ep.Targets.from_columns(ra=[10.0], dec=[-20.0]), SITE, "now")
    assert np.isfinite(res["alt"]).all()


def test_far_future_warns_but_computes():
    # Ten years past any shipped prediction: a StaleEarthOrientation warning, finite results.
    with pytest.warns(StaleEarthOrientation, match="predictions end"):
        res = ep.positions(ep.Targets.from_columns(ra=[10.0], dec=[-20.0]), SITE,
                           "2040-06-01T00:00:00Z")
    assert np.isfinite(res["alt"]).all()
    assert "earth_orientation_warning" in res.meta


def test_inside_measured_table_no_warning():
    with warnings.catch_warnings():
        warnings.simplefilter("error", StaleEarthOrientation)
        assert check_earth_orientation(Time("2024-03-01T00:00:00", scale="utc")) is None


def test_status_reports_the_table_age():
    warnings.simplefilter("ignore", erfa.ErfaWarning)  # 2030 is past the leap-second table
    status = ep.earth_orientation_status(Time("2030-01-01T00:00:00", scale="utc"))
    assert status.last_measured < status.predictions_end
    assert status.age_days > 365


def test_nothing_reaches_for_the_network(monkeypatch):
    # With every socket connection refused, positions, drift and a night plan still work:
    # no Earth-orientation download, no ephemeris download (the project's offline rule).
    import socket

    def refuse(*args, **kwargs):
        raise AssertionError("a network connection was attempted")

    monkeypatch.setattr(socket.socket, "connect", refuse)
    monkeypatch.setattr(socket, "create_connection", refuse)
    targets = ep.Targets.from_columns(ra=[10.0, 250.0], dec=[-20.0, -60.0],
                                      pm_ra_cosdec=[100.0, 0.0], epoch=2016.0)
    with warnings.catch_warnings():
        # 2031 lies past the leap-second table: ERFA notes "dubious year", we warn as stale.
        warnings.simplefilter("ignore", StaleEarthOrientation)
        warnings.simplefilter("ignore", erfa.ErfaWarning)
        assert np.isfinite(ep.positions(targets, SITE, "now")["alt"]).all()
        ep.drift(targets, "now", 1.0)
        ep.plan(targets, ep.Site(latitude=-24.6, longitude=-70.4, height=2635.0),
                "2031-03-01", max_seconds=0.05)
