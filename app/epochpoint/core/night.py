"""The night's boundaries: sunset, the three twilights and sunrise for a site's local evening,
the stretches when the Sun is below a given altitude, and the Moon's rise, set and phase.

Definitions (Astronomical Almanac, "Sunrise, sunset and twilight" explanations; US Naval
Observatory, "Rise, Set, and Twilight Definitions"; common practice):
- sunset and sunrise: the Sun's centre at geometric (unrefracted) altitude -50', i.e. the
  upper limb on a sea-level horizon with 34' of standard horizontal refraction and a 16'
  semidiameter;
- civil, nautical and astronomical twilight: the Sun's centre at -6, -12 and -18 deg;
- moonrise and moonset: the Moon's upper limb on the horizon, i.e. the unrefracted topocentric
  altitude of the centre at -(34' + s), s the Moon's topocentric semidiameter at that instant
  (about 15.5'). This is USNO's stated convention (from memory); it matches Meeus,
  Astronomical Algorithms (2nd ed.), ch. 15, whose h0 = 0.7275 pi - 34' on the geocentric
  altitude folds the parallax pi and the semidiameter into one term.

The night of a date runs from the site's local mean solar noon on that date to the next one
(12:00 UTC minus longitude/15 hours): the Sun is near its highest at both ends, so the whole
night lies inside, at every longitude and whatever civil zone the site keeps (the zone only
labels times). Every event lies inside that window or is None.

Method: the altitude is sampled every 10 minutes over the window; each local extremum of the
samples is refined by a parabola through its three samples (so a brief dip below a level, or
a brief rise above it, near an extremum is not missed); each sign change of altitude - level
is then refined by vectorized Illinois regula falsi (all levels at once) to better than 0.1 s.
Cost: one batch of 145 Sun positions plus two or three small refinement batches, about
10-15 ms per night (the Moon's rise and set: the same again).

Which crossing is "the" event: the evening event is where the Sun goes below the level for
the stretch that contains the Sun's lowest point in the window, the morning event is where it
comes back above at the end of that same stretch. On ordinary nights there is one crossing
each way. On odd nights (near the poles) the
Sun may dip below a level, come back up and dip again; then the events bound the continuous
stretch around the lowest point, and `sun_below_intervals` gives every stretch.
"""
from __future__ import annotations

import datetime as _dt
from dataclasses import dataclass

import numpy as np
from astropy.time import Time

from .site import Site
from .sunmoon import moon_phase, moon_track, sun_altaz
from .timescale import TimeInputError, check_year, iso_z, parse_time, quiet_erfa
from .zones import wrap_longitude

# The Sun's centre at sunrise and sunset: 34' refraction + 16' semidiameter below the horizon.
SUNRISE_ALTITUDE_DEG = -50.0 / 60.0
TWILIGHT_ALTITUDE_DEG = {"civil": -6.0, "nautical": -12.0, "astronomical": -18.0}
# Levels in the order the Sun reaches them in the evening; "sun" is sunset/sunrise.
LEVELS_DEG = {"sun": SUNRISE_ALTITUDE_DEG, **TWILIGHT_ALTITUDE_DEG}
# Standard horizontal refraction used for rising and setting (Astronomical Almanac).
HORIZON_REFRACTION_DEG = 34.0 / 60.0

SAMPLE_STEP_S = 600.0
ROOT_TOLERANCE_S = 0.1
MAX_ITERATIONS = 60

EVENT_KEYS = ("sunset", "civil_twilight_end", "nautical_twilight_end",
              "astronomical_twilight_end", "astronomical_twilight_start",
              "nautical_twilight_start", "civil_twilight_start", "sunrise")
_EVENING_KEY = {"sun": "sunset", "civil": "civil_twilight_end",
                "nautical": "nautical_twilight_end", "astronomical": "astronomical_twilight_end"}
_MORNING_KEY = {"sun": "sunrise", "civil": "civil_twilight_start",
                "nautical": "nautical_twilight_start",
                "astronomical": "astronomical_twilight_start"}


@dataclass(frozen=True, eq=False)
class NightBoundaries:
    """Sunset, twilights and sunrise of one local night (astropy Time, UTC, or None).

    spans maps "sun" (below -50'), "civil", "nautical" and "astronomical" to the continuous
    stretch, around the Sun's lowest point, when the Sun's centre is below that level, as a
    (start, end) pair of Times clipped to the window, or None when it never gets that low.
    """

    date: _dt.date
    window_start: Time  # local mean solar noon of date (UTC)
    window_end: Time  # local mean solar noon of the next day
    sunset: Time | None
    civil_twilight_end: Time | None
    nautical_twilight_end: Time | None
    astronomical_twilight_end: Time | None
    astronomical_twilight_start: Time | None
    nautical_twilight_start: Time | None
    civil_twilight_start: Time | None
    sunrise: Time | None
    spans: dict
    sun_lowest_time: Time
    sun_lowest_alt_deg: float

    def to_json(self) -> dict:
        """The eight events as ISO 8601 UTC strings with a trailing Z, or None."""
        return {key: None if getattr(self, key) is None else iso_z(getattr(self, key))
                for key in EVENT_KEYS}


def _as_date(value) -> _dt.date:
    """A calendar date from a datetime.date (or datetime) or a 'YYYY-MM-DD' string, within
    the years timescale.FIRST_YEAR..LAST_YEAR."""
    if isinstance(value, _dt.datetime):
        date = value.date()
    elif isinstance(value, _dt.date):
        date = value
    else:
        text = str(value).strip()
        try:
            date = _dt.date.fromisoformat(text)
        except ValueError:
            raise TimeInputError(f"date {text!r} is not a calendar date (YYYY-MM-DD)") from None
    check_year(date.year, f"date {date.isoformat()!r}")
    return date


def night_window(site: Site, date) -> tuple[Time, Time]:
    """The night of `date` at the site: from its local mean solar noon on that date to the next,
    as UTC Times.

    Local mean noon is 12:00 UTC minus the longitude in hours (longitude/15, east positive),
    so the window holds the whole night wherever the site is and whatever civil zone it keeps
    (mean solar time is within about 16 minutes of true solar time, the equation of time:
    Astronomical Almanac, "Equation of time"; common practice). The zone only labels times.
    """
    day = _as_date(date)
    noon_offset_d = 0.5 - wrap_longitude(site.longitude) / 360.0
    start = _day_time(day, noon_offset_d)
    end = _day_time(day, noon_offset_d + 1.0)
    return start, end


def night_date_at(site: Site, instant) -> _dt.date:
    """The date whose night (local mean noon to local mean noon, see `night_window`) holds
    `instant` (a Time, datetime or ISO 8601 UTC text): 'tonight' at the site."""
    t = parse_time(instant)
    shifted = t.utc.datetime + _dt.timedelta(hours=wrap_longitude(site.longitude) / 15.0 - 12.0)
    return shifted.date()


def _day_time(day: _dt.date, offset_d: float) -> Time:
    """The UTC instant `offset_d` days after 00:00 UTC of `day`, counted in TAI (so a leap
    second in between cannot move it), as an isot Time."""
    midnight = parse_time(f"{day.isoformat()}T00:00:00Z")
    tai = midnight.tai
    t = Time(tai.jd1, tai.jd2 + offset_d, format="jd", scale="tai").utc
    t.format = "isot"
    return t


class _Scan:
    """A smooth function of time over a window, sampled, with its level crossings refined.

    func maps a UTC Time array to values (degrees); positions along the window are seconds
    after its start (float arrays), turned into Times by `time`.
    """

    @quiet_erfa
    def __init__(self, func, start: Time, end: Time, step_s: float = SAMPLE_STEP_S):
        self._start_tai = start.tai
        self._func = func
        span_s = float((end - start).sec)
        n = max(3, int(np.ceil(span_s / step_s)) + 1)
        x = np.linspace(0.0, span_s, n)
        v = self.evaluate(x)
        # Refine every interior local extremum by the vertex of the parabola through its
        # three samples, so a brief excursion across a level near an extremum is caught.
        h = x[1] - x[0]
        slope = np.diff(v)
        k = np.flatnonzero(slope[:-1] * slope[1:] < 0.0) + 1
        if k.size:
            curvature = v[k - 1] - 2.0 * v[k] + v[k + 1]
            shift = np.clip(0.5 * h * (v[k - 1] - v[k + 1]) / curvature, -h, h)
            x_extrema = x[k] + shift
            x, v = np.concatenate((x, x_extrema)), np.concatenate((v, self.evaluate(x_extrema)))
            order = np.argsort(x, kind="stable")
            x, v = x[order], v[order]
        self.x_s, self.values = x, v

    def evaluate(self, offsets_s: np.ndarray) -> np.ndarray:
        return np.asarray(self._func(self.time(offsets_s)), dtype=float)

    def time(self, offsets_s) -> Time:
        """UTC Time(s) at seconds after the window start (arithmetic in TAI: no leap-second
        ambiguity)."""
        offsets_d = np.asarray(offsets_s, dtype=float) / 86400.0
        t = Time(self._start_tai.jd1, self._start_tai.jd2 + offsets_d, format="jd",
                 scale="tai").utc
        t.format = "isot"
        return t

    def runs_below(self, levels) -> list[list[tuple]]:
        """For each level, the stretches where the function is below it.

        Each stretch is (start_s, end_s, holds_lowest): start_s/end_s are None when the stretch
        reaches the window's edge, holds_lowest is True for the stretch holding the minimum.
        """
        v = self.values
        lowest, last_index = int(np.argmin(v)), len(v) - 1
        runs_per_level, bracket_k, bracket_level = [], [], []

        def bracket(k, level):
            bracket_k.append(k)
            bracket_level.append(level)
            return len(bracket_k) - 1

        for level in levels:
            below = np.concatenate(([False], v < level, [False])).astype(int)
            step = np.diff(below)
            firsts, lasts = np.flatnonzero(step == 1), np.flatnonzero(step == -1) - 1
            runs = []
            for first, last in zip(firsts, lasts):
                # A crossing lies between samples first-1 and first, and last and last+1.
                start = bracket(first - 1, level) if first > 0 else None
                end = bracket(last, level) if last < last_index else None
                runs.append((start, end, bool(first <= lowest <= last)))
            runs_per_level.append(runs)
        roots = self._refine(np.array(bracket_k, dtype=int), np.array(bracket_level, dtype=float))
        return [[(None if s is None else float(roots[s]), None if e is None else float(roots[e]),
                  holds) for s, e, holds in runs] for runs in runs_per_level]

    def _refine(self, k: np.ndarray, level: np.ndarray) -> np.ndarray:
        """Where func = level inside each bracket [x[k], x[k+1]], to ROOT_TOLERANCE_S.

        Illinois regula falsi (Dowell & Jarratt 1971, BIT 11, 168): false position, halving
        the value kept at an end that survives twice running; all brackets at once.
        """
        a, b = self.x_s[k], self.x_s[k + 1]
        fa, fb = self.values[k] - level, self.values[k + 1] - level
        side = np.zeros(k.size, dtype=int)  # -1: b was replaced last, +1: a was replaced last
        for _ in range(MAX_ITERATIONS):
            active = np.flatnonzero(b - a > ROOT_TOLERANCE_S)
            if active.size == 0:
                break
            aa, bb, fa_, fb_, side_ = a[active], b[active], fa[active], fb[active], side[active]
            # The false-position point, kept strictly inside the bracket.
            margin = 0.25 * ROOT_TOLERANCE_S
            cc = np.clip((aa * fb_ - bb * fa_) / (fb_ - fa_), aa + margin, bb - margin)
            fc = self.evaluate(cc) - level[active]
            replace_b = fc * fb_ > 0.0
            replace_a = fc * fa_ > 0.0
            exact = ~replace_a & ~replace_b
            fa_ = np.where(replace_b & (side_ == -1), 0.5 * fa_, fa_)
            fb_ = np.where(replace_a & (side_ == 1), 0.5 * fb_, fb_)
            a[active] = np.where(replace_a | exact, cc, aa)
            fa[active] = np.where(replace_a, fc, fa_)
            b[active] = np.where(replace_b | exact, cc, bb)
            fb[active] = np.where(replace_b, fc, fb_)
            side[active] = np.where(replace_b, -1, np.where(replace_a, 1, side_))
        return 0.5 * (a + b)


def _sun_scan(site: Site, start: Time, end: Time) -> _Scan:
    return _Scan(lambda t: sun_altaz(site, t)[0], start, end)


@quiet_erfa
def sun_below_intervals(site: Site, start, end, altitude_deg: float) -> list[tuple[Time, Time]]:
    """Every stretch of [start, end] when the Sun's centre is below altitude_deg (unrefracted).

    start, end: Times or ISO 8601 UTC strings (e.g. a night's window_start and window_end).
    Stretches that reach the ends are clipped to them; edges are refined to 0.1 s. Dips
    shorter than the 10-minute sampling are caught near the altitude's extrema (see module).
    """
    start, end = Time(parse_time(start), format="isot"), Time(parse_time(end), format="isot")
    scan = _sun_scan(site, start, end)
    (runs,) = scan.runs_below([float(altitude_deg)])
    return [(start if s is None else scan.time(s), end if e is None else scan.time(e))
            for s, e, _ in runs]


@quiet_erfa
def night_boundaries(site: Site, date) -> NightBoundaries:
    """Sunset, twilights and sunrise of the local night starting on date (see module notes).

    date: a datetime.date or 'YYYY-MM-DD'. An event that does not happen inside the window
    (midnight Sun, polar night, no astronomical darkness in high-latitude summer) is None.
    """
    day = _as_date(date)
    start, end = night_window(site, day)
    scan = _sun_scan(site, start, end)
    events, spans = {}, {}
    for name, runs in zip(LEVELS_DEG, scan.runs_below(list(LEVELS_DEG.values()))):
        # The night's stretch below this level is the one around the Sun's lowest point.
        stretch = next(((s, e) for s, e, holds in runs if holds), None)
        if stretch is None:
            events[_EVENING_KEY[name]] = events[_MORNING_KEY[name]] = None
            spans[name] = None
            continue
        s, e = stretch
        events[_EVENING_KEY[name]] = None if s is None else scan.time(s)
        events[_MORNING_KEY[name]] = None if e is None else scan.time(e)
        spans[name] = (start if s is None else events[_EVENING_KEY[name]],
                       end if e is None else events[_MORNING_KEY[name]])
    lowest = int(np.argmin(scan.values))
    return NightBoundaries(date=day, window_start=start, window_end=end, spans=spans,
                           sun_lowest_time=scan.time(scan.x_s[lowest]),
                           sun_lowest_alt_deg=float(scan.values[lowest]), **events)


def darkness_interval(boundaries: NightBoundaries, darkness: str) -> tuple[Time, Time] | None:
    """(start, end) of the night's continuous darkness of the given kind, or None.

    darkness: 'civil', 'nautical' or 'astronomical' (Sun's centre below -6, -12, -18 deg).
    On polar nights the stretch may begin at window_start or end at window_end.
    """
    if darkness not in TWILIGHT_ALTITUDE_DEG:
        raise ValueError(f"darkness {darkness!r} is not one of "
                         f"{', '.join(TWILIGHT_ALTITUDE_DEG)}")
    return boundaries.spans[darkness]


def _phase_instant(boundaries: NightBoundaries) -> tuple[Time, str]:
    """The middle of the darkest stretch the night has (or of the window), and its name."""
    for name in ("astronomical", "nautical", "civil", "sun"):
        span = boundaries.spans[name]
        if span is not None:
            return span[0] + 0.5 * (span[1] - span[0]), name
    start, end = boundaries.window_start, boundaries.window_end
    return start + 0.5 * (end - start), "window"


@quiet_erfa
def moon_events(site: Site, boundaries: NightBoundaries) -> dict:
    """Moonrise, moonset and the Moon's phase for a night, ready for JSON.

    moonrise/moonset: the first rise and the first set inside the window (upper limb on the
    horizon, see module notes), ISO 8601 UTC with Z, or None (a window holds at most one of
    each except at high latitudes, where the first is given). up_at_window_start says whether
    the upper limb is above the horizon at the window start (local mean noon). illumination (0..1), phase_angle_deg and
    waxing are geocentric, at phase_time: the middle of astronomical darkness, else of the
    deepest darkness reached, else of the window (phase_time_basis names which).
    """
    def upper_limb_alt_deg(t: Time) -> np.ndarray:
        track = moon_track(site, t)
        return track.alt_deg + HORIZON_REFRACTION_DEG + track.semidiameter_deg

    scan = _Scan(upper_limb_alt_deg, boundaries.window_start, boundaries.window_end)
    (runs,) = scan.runs_below([0.0])
    # Below the horizon from a set (start of a stretch) to a rise (its end).
    sets = sorted(s for s, _, _ in runs if s is not None)
    rises = sorted(e for _, e, _ in runs if e is not None)
    instant, basis = _phase_instant(boundaries)
    phase = moon_phase(instant)
    return {
        "moonrise": iso_z(scan.time(rises[0])) if rises else None,
        "moonset": iso_z(scan.time(sets[0])) if sets else None,
        "up_at_window_start": bool(scan.values[0] >= 0.0),
        "phase_time": iso_z(instant),
        "phase_time_basis": basis,
        "illumination": float(phase.illumination),
        "phase_angle_deg": float(phase.phase_angle_deg),
        "waxing": bool(phase.waxing),
    }
