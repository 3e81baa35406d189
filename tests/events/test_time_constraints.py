"""Time constraints (not_before/not_after, phase windows): the windows and the schedule keep
inside them, and bad cells are refused with one line naming file, line, target and column.

Phase reference (independent of the code under test): astropy's barycentric light travel time,
t_bjd = t_utc.tdb + Time.light_travel_time(target, kind="barycentric", location=site) (ERFA's
Earth ephemeris plus the site; no Shapiro delay, under 10 us), phase = ((t_bjd - T0) / P) mod 1.
"""
import datetime as dt
import warnings

import astropy.units as u
import numpy as np
import pytest
from astropy.coordinates import EarthLocation, SkyCoord
from astropy.time import Time

from epochpoint.cli.main import main
from epochpoint.core.events import tt_days_of
from epochpoint.core.plan import plan
from epochpoint.core.site import Site
from epochpoint.core.targets import Targets
from epochpoint.core.time_constraints import phase_intervals
from epochpoint.io import read_targets
from epochpoint.io.errors import InputError
from epochpoint.io.eventfields import event_ephemerides
from epochpoint.io.timeconstraintfields import time_constraints

SEED = 20270302
EDGE_TOLERANCE_S = 1.0


@pytest.fixture(autouse=True)
def _quiet():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        yield


def _astropy_phase(times: Time, ra, dec, site: Site, t0_jd, period_d):
    """Barycentric phase of UTC instants for a target at rest (see module)."""
    loc = EarthLocation.from_geodetic(site.longitude * u.deg, site.latitude * u.deg,
                                      site.height * u.m)
    t = Time(times, location=loc)
    ltt = t.light_travel_time(SkyCoord(ra * u.deg, dec * u.deg), kind="barycentric",
                              location=loc)
    bjd = t.tdb + ltt
    whole = np.floor(t0_jd)
    return np.mod(((bjd.jd1 - whole) + bjd.jd2 - (t0_jd - whole)) / period_d, 1.0)


def _phase_gap_s(phase, target, period_d):
    """Seconds of time between a phase and a target phase (circular)."""
    d = np.abs(np.mod(phase - target + 0.5, 1.0) - 0.5)
    return d * period_d * 86400.0


def _in_window(phase, low, high):
    return (low <= phase) & (phase <= high) if low < high else (phase >= low) | (phase <= high)


def _phased_targets(rng, n, around_jd):
    ra = rng.uniform(0.0, 360.0, n)
    dec = np.degrees(np.arcsin(rng.uniform(-0.95, 0.95, n)))
    period = rng.uniform(0.15, 6.0, n)
    t0 = around_jd - rng.uniform(0.0, 800.0, n)
    low, high = rng.uniform(0.0, 1.0, n), rng.uniform(0.0, 1.0, n)
    extra = {"event_epoch": np.char.mod("%.7f", t0), "event_period": np.char.mod("%.8f", period),
             "event_duration": np.char.mod("%.3f", np.minimum(2.0, 12.0 * period)),
             "phase_min": np.char.mod("%.4f", low), "phase_max": np.char.mod("%.4f", high)}
    return Targets.from_columns(ra=ra, dec=dec, name=[f"P{i}" for i in range(n)], extra=extra)


def test_phase_window_edges_match_astropy_over_sites_and_seasons():
    """Every phase-window edge inside the span is the instant astropy's barycentric phase
    reaches phase_min (opening) or phase_max (closing), within 1 s; the middle of each
    interval is inside the window and the middle of each gap outside (astropy), at random
    sites, dates 1990-2040, targets, periods and windows (wrapping ones included)."""
    rng = np.random.default_rng(SEED)
    checked = 0
    for case in range(8):
        site = Site(latitude=float(rng.uniform(-65.0, 65.0)),
                    longitude=float(rng.uniform(-180.0, 180.0)), height=float(rng.uniform(0, 3000)))
        t_ref = Time(2447892.5 + rng.uniform(0.0, 18262.0), format="jd", scale="utc")
        length_s = 86400.0
        targets = _phased_targets(rng, 6, float(t_ref.tdb.jd))
        eph = event_ephemerides(targets)
        limits = time_constraints(targets, eph)
        pieces = phase_intervals(limits, targets, site, float(tt_days_of(t_ref)), length_s)
        for i in range(len(targets)):
            ra, dec = targets.ra[i], targets.dec[i]
            t0, period = eph.epoch_bjd_tdb[i], eph.period_d[i]
            low, high = limits.phase_min[i], limits.phase_max[i]
            # On a 10-minute grid, astropy's phase is in the window exactly where the
            # intervals are (away from their edges).
            grid = np.linspace(0.0, length_s, 145)
            phase = _astropy_phase(t_ref + grid * u.s, ra, dec, site, t0, period)
            near_edge = np.array([any(abs(g - x) < EDGE_TOLERANCE_S for p in pieces[i]
                                      for x in p) for g in grid])
            covered = np.array([any(s <= g <= e for s, e in pieces[i]) for g in grid])
            agree = covered == _in_window(phase, low, high)
            assert np.all(agree | near_edge), (case, i)
            opens = [s for s, _ in pieces[i] if s > 0.0]
            closes = [e for _, e in pieces[i] if e < length_s]
            for edges, phase_at in ((opens, low), (closes, high)):
                if edges:
                    phase = _astropy_phase(t_ref + np.array(edges) * u.s, ra, dec, site, t0,
                                           period)
                    gap = _phase_gap_s(phase, phase_at, period)
                    assert np.all(gap < EDGE_TOLERANCE_S), (case, i, gap)
                    checked += len(edges)
            inner = [0.5 * (s + e) for s, e in pieces[i]]
            gaps = [0.5 * (pieces[i][k][1] + pieces[i][k + 1][0])
                    for k in range(len(pieces[i]) - 1)]
            if inner:
                phase_in = _astropy_phase(t_ref + np.array(inner) * u.s, ra, dec, site, t0,
                                          period)
                assert np.all(_in_window(phase_in, low, high)), (case, i)
            if gaps:
                phase_out = _astropy_phase(t_ref + np.array(gaps) * u.s, ra, dec, site, t0,
                                           period)
                assert not np.any(_in_window(phase_out, low, high)), (case, i)
    assert checked > 40


SITE = Site(latitude=-30.2, longitude=-70.7, height=2200.0)
NIGHT = "2027-03-01"


def _utc(text):
    return dt.datetime.fromisoformat(text.replace("Z", "+00:00"))


def _iso(moment: dt.datetime) -> str:
    return moment.strftime("%Y-%m-%dT%H:%M:%S.") + f"{moment.microsecond // 1000:03d}Z"


def _night_targets(rng, n):
    """Targets up in the March night at the site, each with a not_before/not_after span
    cutting into the night; every third also with a phase window; two targets with events."""
    ra = rng.uniform(90.0, 250.0, n)
    dec = rng.uniform(-60.0, 10.0, n)
    start = dt.datetime(2027, 3, 2, 0, 0, tzinfo=dt.timezone.utc)
    before = [start + dt.timedelta(seconds=float(s)) for s in rng.uniform(0.0, 5 * 3600.0, n)]
    after = [b + dt.timedelta(seconds=float(s)) for b, s in
             zip(before, rng.uniform(1800.0, 5 * 3600.0, n))]
    mid = Time("2027-03-02T05:00:00", scale="utc").tdb.jd
    phased = np.arange(n) % 3 == 0
    period = rng.uniform(0.2, 0.6, n)
    extra = {
        "not_before": [_iso(b).replace(".000Z", "Z") if k % 2 else _iso(b) for k, b in
                       enumerate(before)],
        "not_after": [_iso(a) for a in after],
        "event_epoch": [f"{mid - rng.uniform(0, 50):.6f}" if p else "" for p in phased],
        "event_period": [f"{p_d:.6f}" if p else "" for p, p_d in zip(phased, period)],
        "event_duration": ["1.0" if p else "" for p in phased],
        "phase_min": [f"{rng.uniform(0, 1):.3f}" if p else "" for p in phased],
        "phase_max": [""] * n, "exposure": ["300"] * n,
    }
    extra["phase_max"] = [f"{(float(lo) + 0.45) % 1.0:.3f}" if lo else ""
                          for lo in extra["phase_min"]]
    # Two timed-event targets: one event block inside its span, one starting before it.
    for k, (shift_h, span) in enumerate(((0.0, ("2027-03-02T03:00:00Z", "2027-03-02T08:00:00Z")),
                                         (0.0, ("2027-03-02T05:00:00Z", "2027-03-02T09:00:00Z")))):
        ra = np.append(ra, 163.0 + 5 * k)
        dec = np.append(dec, -30.0)
        extra["event_epoch"].append(f"{mid + shift_h / 24 - 3.7 * 40:.6f}")
        extra["event_period"].append("3.7")
        extra["event_duration"].append("2")
        extra["not_before"].append(span[0])
        extra["not_after"].append(span[1])
        for key in ("phase_min", "phase_max"):
            extra[key].append("")
        extra["exposure"].append("300")
    names = [f"T{i}" for i in range(n)] + ["EventIn", "EventCut"]
    return Targets.from_columns(ra=ra, dec=dec, name=names, extra=extra)


def test_windows_and_every_scheduled_block_keep_inside_the_constraints():
    """not_before/not_after: window edges cut by them equal them exactly (to the ms of the
    JSON); every scheduled block (fixed ones included) starts at or after not_before and ends
    at or before not_after; blocks of phase-window targets are in their window at start,
    middle and end (astropy phase, 1 s tolerance); an event block reaching before not_before
    is not reserved."""
    rng = np.random.default_rng(SEED + 1)
    targets = _night_targets(rng, 30)
    eph = event_ephemerides(targets)
    limits = time_constraints(targets, eph)
    free = plan(targets, SITE, NIGHT, events=eph).to_json()
    data = plan(targets, SITE, NIGHT, events=eph, time_constraints=limits).to_json()
    extra = targets.extra
    cut_edges = 0
    for i, (unlimited, limited) in enumerate(zip(free["targets"], data["targets"])):
        nb, na = extra["not_before"][i], extra["not_after"][i]
        nb_iso, na_iso = _iso(_utc(nb)), _iso(_utc(na))
        if extra["phase_min"][i] or extra["event_epoch"][i]:
            continue
        # The expected windows: the unconstrained ones clipped to [not_before, not_after].
        expected = []
        for start, end in unlimited["windows"]:
            lo, hi = max(_utc(start), _utc(nb)), min(_utc(end), _utc(na))
            if lo < hi:
                expected.append([start if _utc(start) >= _utc(nb) else nb_iso,
                                 end if _utc(end) <= _utc(na) else na_iso])
        assert limited["windows"] == expected, (i, limited["windows"], expected)
        cut_edges += sum(w.count(nb_iso) + w.count(na_iso) for w in limited["windows"])
        if not expected and unlimited["windows"]:
            assert limited["reason"] in ("before its not_before time", "after its not_after time",
                                         "outside its not_before to not_after span")
    assert cut_edges > 5
    names = list(targets.names())
    scheduled = data["schedule"]
    assert len(scheduled) > 5
    phased_blocks = 0
    for entry in scheduled:
        i = names.index(entry["name"])
        start, end = _utc(entry["start"]), _utc(entry["end"])
        assert start >= _utc(extra["not_before"][i]), entry
        assert end <= _utc(extra["not_after"][i]), entry
        if extra["phase_min"][i]:
            phased_blocks += 1
            times = Time([entry["start"][:-1], entry["end"][:-1]], scale="utc")
            times = Time(np.linspace(times[0].jd, times[1].jd, 5), format="jd", scale="utc")
            phase = _astropy_phase(times, targets.ra[i], targets.dec[i], SITE,
                                   eph.epoch_bjd_tdb[i], eph.period_d[i])
            low, high = float(extra["phase_min"][i]), float(extra["phase_max"][i])
            period = eph.period_d[i]
            inside = (_in_window(phase, low, high) | (_phase_gap_s(phase, low, period) < 1.0)
                      | (_phase_gap_s(phase, high, period) < 1.0))
            assert np.all(inside), (entry, phase, low, high)
    assert phased_blocks >= 1
    fixed = {e["name"] for e in scheduled if e.get("fixed")}
    assert "EventIn" in fixed and "EventCut" not in fixed


def test_event_block_reaching_outside_its_span_is_not_reserved():
    """An event whose block (04:00-07:00 with baselines) starts before the target's
    not_before (05:00) is not reserved; without the constraint it is."""
    mid = Time("2027-03-02T05:30:00", scale="utc").tdb.jd
    targets = _one({"event_epoch": f"{mid - 3.7 * 40:.6f}", "event_period": "3.7",
                    "event_duration": "2", "not_before": "2027-03-02T05:00:00Z"},
                   ra=163.0, dec=-30.0)
    eph = event_ephemerides(targets)
    free = plan(targets, SITE, NIGHT, events=eph).to_json()
    data = plan(targets, SITE, NIGHT, events=eph,
                time_constraints=time_constraints(targets, eph)).to_json()
    assert [e["name"] for e in free["schedule"] if e.get("fixed")] == ["Solo"]
    assert data["schedule"] == []


def _one(extra, ra=160.0, dec=-40.0):
    return Targets.from_columns(ra=[ra], dec=[dec], name=["Solo"],
                                extra={k: [v] for k, v in extra.items()})


@pytest.mark.parametrize("extra, reason", [
    ({"not_before": "2027-03-03T00:00:00Z"}, "before its not_before time"),
    ({"not_after": "2027-03-01T12:00:00Z"}, "after its not_after time"),
])
def test_reason_names_the_time_constraint(extra, reason):
    """A target whose windows all fall outside its span says which limit took them."""
    targets = _one(extra)
    data = plan(targets, SITE, NIGHT, time_constraints=time_constraints(targets)).to_json()
    assert data["targets"][0]["windows"] == []
    assert data["targets"][0]["reason"] == reason
    assert data["unscheduled"][0]["reason"] == reason


def test_reason_names_the_phase_window():
    """A phase window that does not open during the night (a 0.05 window of a 20-day period
    whose next opening is days away) leaves the target 'outside its phase window'."""
    mid = Time("2027-03-02T05:00:00", scale="utc").tdb.jd
    targets = _one({"event_epoch": f"{mid + 5.0:.5f}", "event_period": "20",
                    "event_duration": "3", "phase_min": "0.97", "phase_max": "0.02"})
    eph = event_ephemerides(targets)
    data = plan(targets, SITE, NIGHT, events=eph,
                time_constraints=time_constraints(targets, eph)).to_json()
    assert data["targets"][0]["reason"] == "outside its phase window"


BAD_ROWS = [
    ("not_before,not_after\n2027-03-02T05:00:00Z,2027-03-02T04:00:00Z", "not_after",
     "earlier than not_before"),
    ("not_before\n2027-13-02T05:00:00Z", "not_before", "ISO 8601"),
    ("phase_min,phase_max\n0.1,0.2", "phase_min", "event ephemeris"),
    ("event_epoch,event_period,event_duration,phase_min,phase_max\n2461000.5,2.5,2,0.1,",
     "phase_max", "needs both"),
    ("event_epoch,event_period,event_duration,phase_min,phase_max\n2461000.5,2.5,2,1.5,0.2",
     "phase_min", "from 0 to 1"),
    ("event_epoch,event_period,event_duration,phase_min,phase_max\n2461000.5,2.5,2,0.3,0.3",
     "phase_max", "empty phase window"),
]


@pytest.mark.parametrize("cells, column, words", BAD_ROWS)
def test_bad_cells_give_one_line_naming_file_line_target_column(tmp_path, cells, column, words):
    """Reading the file refuses the row: one line with the file, line 3 (the header is line 1,
    a good row line 2), the target's name and the column."""
    header, row = cells.split("\n")
    good = ",".join("" for _ in header.split(","))
    path = tmp_path / "limits.csv"
    path.write_text(f"name,ra,dec,{header}\nFine,10.0,-20.0,{good}\nBad,12.0,-22.0,{row}\n")
    with pytest.raises(InputError) as caught:
        read_targets(path)
    text = str(caught.value)
    assert "\n" not in text
    assert str(path) in text and "line 3 (Bad)" in text and f"column {column}" in text, text
    assert words in text, text


def test_python_targets_checked_too_and_cli_exits_2(tmp_path, capsys):
    """Targets built in Python are checked when their constraints are read (target position
    and name); the plan command exits 2 with a one-line message on a bad file."""
    targets = _one({"not_before": "2027-03-02T06:00:00Z", "not_after": "2027-03-02T05:00:00Z"})
    with pytest.raises(InputError, match=r"target 1 \(Solo\), column not_after"):
        time_constraints(targets)
    path = tmp_path / "bad.csv"
    path.write_text("name,ra,dec,phase_min,phase_max\nLone,10,-20,0.2,0.4\n")
    code = main(["plan", str(path), "--site=-30.2,-70.7,2200", "--night", NIGHT])
    err = capsys.readouterr().err
    assert code == 2
    assert len(err.strip().splitlines()) == 1 and "column phase_min" in err, err
