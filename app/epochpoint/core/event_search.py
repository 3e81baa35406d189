"""Which periodic events are observable from the site over a run of nights.

For every target with an ephemeris, every cycle n whose event (first to last contact, with the
baseline wanted before and after) touches a night's darkness is timed at the site
(events.py: the observed instant whose barycentric time is T0 + nP) and judged:

- full: the event and both baselines lie in the chosen darkness with the target above the
  altitude limit and inside every interlock (horizon mask, mount hour-angle and declination
  limits, Sun avoidance) at each of the sampled instants;
- partial: some part fails; `lost` names each lost part (baseline before, first half, second
  half, baseline after) and why (the first failing reason in that part);
- none: no instant between first and last contact passes.

Each event is sampled at EVENT_SAMPLES instants (the contacts, the mid-event, and evenly
between; 4 over each baseline), so a lost stretch shorter than about a sixteenth of the event
can be missed. Altitudes are observed (refracted) from each target's apparent place at the
middle of the night and the sidereal rate, the Sun and Moon from the night's sky track, as the
window search does (windows.py).

Cost: one night_boundaries and one sky track per night (about 30 ms), the timing of all
(target, cycle) pairs in one vectorized pass (about 2 us each), then per night the apparent
places of the targets with an event that night.
"""
from __future__ import annotations

import datetime as _dt
import warnings

import numpy as np

from .columns import ColumnTable
from .constants import JD_J2000, RAD_TO_DEG
from .events import (SECONDS_PER_DAY, BarycentricClock, EventEphemerides, mid_error_s,
                     target_direction, tt_days_of, utc_of_tt_days)
from .night import TWILIGHT_ALTITUDE_DEG, darkness_interval, night_boundaries
from .site import Site
from .sky_track import build_sky_track
from .targets import Targets
from .timescale import StaleEarthOrientation, iso_z, quiet_erfa
from .vectors import unit_vectors, wrap_pm180
from .windows import Constraints, _Geometry

EVENT_SAMPLES_BASELINE = 4
EVENT_SAMPLES_EVENT = 17
PARTS = ("baseline before", "first half", "second half", "baseline after")
# Light time across the Earth's orbit bounds how far the observed instant is from BJD (days).
_ROEMER_MARGIN_D = 0.01
OBSERVABLE = ("full", "partial", "none")


def _sample_fractions():
    """Sample instants as (offset in units of the half-event, in units of the baseline) pairs,
    and the part each belongs to: baseline before, the event's two halves, baseline after."""
    base = np.linspace(-1.0, 0.0, EVENT_SAMPLES_BASELINE, endpoint=False)
    event = np.linspace(-1.0, 1.0, EVENT_SAMPLES_EVENT)
    half = EVENT_SAMPLES_EVENT // 2
    event_part = np.where(np.arange(EVENT_SAMPLES_EVENT) <= half, 1, 2)
    half_units = np.concatenate((np.full(base.size, -1.0), event, np.full(base.size, 1.0)))
    baseline_units = np.concatenate((base, np.zeros(event.size), -base[::-1]))
    parts = np.concatenate((np.zeros(base.size, int), event_part, np.full(base.size, 3)))
    return half_units, baseline_units, parts


class EventList(ColumnTable):
    """The events found, one row per (target, cycle), sorted by mid time; see module."""

    def to_json(self) -> dict:
        """{"events": [...], **meta}: times ISO 8601 UTC with Z, angles in degrees."""
        rows = [dict(zip(self.keys(), values)) for values in zip(*(
            self[k].tolist() if hasattr(self[k], "tolist") else list(self[k]) for k in self))]
        for row in rows:
            for key, value in row.items():
                if isinstance(value, float) and not np.isfinite(value):
                    row[key] = None
        return {**self.meta, "events": rows}


def _nights(site: Site, start, nights: int, darkness: str):
    """Dates, and for each the (start, end) TT days of its darkness (None: none)."""
    first = start if isinstance(start, _dt.date) else _dt.date.fromisoformat(str(start).strip())
    dates = [first + _dt.timedelta(days=k) for k in range(int(nights))]
    dark = []
    for date in dates:
        span = darkness_interval(night_boundaries(site, date), darkness)
        dark.append(None if span is None else (float(tt_days_of(span[0])),
                                               float(tt_days_of(span[1]))))
    return dates, dark


def _cycles(eph: EventEphemerides, lo_tt: float, hi_tt: float):
    """(rows, cycles) of every event whose span (with baselines) may touch [lo_tt, hi_tt]."""
    rows = np.flatnonzero(eph.periodic)
    t0 = eph.epoch_bjd_tdb[rows] - JD_J2000
    period = eph.period_d[rows]
    reach = eph.duration_h[rows] / 48.0 + eph.baseline_min[rows] / 1440.0 + _ROEMER_MARGIN_D
    n_lo = np.ceil((lo_tt - reach - t0) / period).astype(np.int64)
    n_hi = np.floor((hi_tt + reach - t0) / period).astype(np.int64)
    counts = np.maximum(n_hi - n_lo + 1, 0)
    total = int(counts.sum())
    first = np.repeat(np.cumsum(counts) - counts, counts)
    cycle = np.repeat(n_lo, counts) + (np.arange(total) - first)
    return np.repeat(rows, counts), cycle


@quiet_erfa
def find_events(targets: Targets, eph: EventEphemerides, site: Site, start, nights: int,
                darkness: str = "astronomical", min_altitude: float | None = None,
                include_all: bool = False) -> EventList:
    """Every event touching the darkness of `nights` nights from date `start` (see module).

    start: 'YYYY-MM-DD' or a date (the night of a date runs from the site's local mean noon,
    night.py). Events judged 'none' are left out unless include_all.
    """
    if int(nights) < 1:
        raise ValueError(f"nights {nights!r} must be at least 1")
    if darkness not in TWILIGHT_ALTITUDE_DEG:
        raise ValueError(f"darkness {darkness!r} is not one of {', '.join(TWILIGHT_ALTITUDE_DEG)}")
    constraints = Constraints(darkness=darkness, min_altitude=min_altitude)
    limit = constraints.altitude_limit(site)
    dates, dark = _nights(site, start, nights, darkness)
    dark_nights = [k for k, d in enumerate(dark) if d is not None]
    meta = _meta(site, darkness, limit, dates, dark, eph, targets)
    if not dark_nights or not eph.periodic.any():
        return _empty(meta)
    ds = np.array([dark[k][0] for k in dark_nights])
    de = np.array([dark[k][1] for k in dark_nights])

    # Time every candidate (target, cycle) at the site in one pass.
    clock = BarycentricClock(site, ds[0] - 3.0, de[-1] + 3.0)
    rows, cycle = _cycles(eph, ds[0], de[-1])
    bjd = eph.epoch_bjd_tdb[rows] - JD_J2000 + cycle * eph.period_d[rows]
    direction = target_direction(targets, rows, 2000.0 + bjd / 365.25)
    mid = clock.observed_tt(bjd, direction)
    half_d = eph.duration_h[rows] / 48.0
    base_d = eph.baseline_min[rows] / 1440.0
    lo, hi = mid - half_d - base_d, mid + half_d + base_d
    # The night whose darkness the event touches (nights are disjoint and in order).
    k = np.searchsorted(de, lo, side="right")
    touches = k < len(de)
    touches[touches] &= ds[k[touches]] < hi[touches]
    keep = np.flatnonzero(touches)
    rows, cycle, mid, half_d, base_d, k = rows[keep], cycle[keep], mid[keep], half_d[keep], \
        base_d[keep], k[keep]

    # Each night's apparent places may warn of a stale Earth-orientation table: say it once.
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", StaleEarthOrientation)
        judged = [_judge_night(targets, site, dates[dark_nights[j]], rows[sel], mid[sel],
                               half_d[sel], base_d[sel], sel, darkness, limit)
                  for j in range(len(de)) if (sel := np.flatnonzero(k == j)).size]
    stale = [w for w in caught if issubclass(w.category, StaleEarthOrientation)]
    if stale:
        warnings.warn(str(stale[-1].message), StaleEarthOrientation, stacklevel=2)
    out = _combine(judged, len(keep))
    show = np.ones(len(keep), bool) if include_all else out["observable"] != "none"
    order = np.flatnonzero(show)[np.argsort(mid[show], kind="stable")]
    return _event_list(targets, eph, rows[order], cycle[order], mid[order], half_d[order],
                       base_d[order], {key: v[order] for key, v in out.items()}, meta)


def _judge_night(targets, site, date, rows, mid, half_d, base_d, sel, darkness, limit):
    """Altitudes, Moon and observability of one night's events (indices `sel` overall)."""
    half_units, baseline_units, parts = _sample_fractions()
    t_samples = (mid[:, None] + half_d[:, None] * half_units
                 + base_d[:, None] * baseline_units)  # TT days, (E, S)
    t_ref_tt = float(t_samples.min()) - 600.0 / SECONDS_PER_DAY
    t_ref = utc_of_tt_days(t_ref_tt)
    seconds = (t_samples - t_ref_tt) * SECONDS_PER_DAY
    sky = build_sky_track(site, t_ref, float(seconds.max()) + 600.0)
    uniq, local = np.unique(rows, return_inverse=True)
    geo = _Geometry(targets[uniq], site, sky, float(np.median(seconds)))
    idx = local[:, None]
    alt, az = geo.observed_altaz(idx, seconds)
    ha = wrap_pm180(geo.ha(idx, seconds))
    dec = np.broadcast_to(geo.dec[idx], seconds.shape)
    unit = unit_vectors(np.radians(geo.ra), np.radians(geo.dec))[:, local]
    flat_t = seconds.ravel()
    flat_unit = np.repeat(unit, seconds.shape[1], axis=1)
    sun_sep = sky.separation_from("sun", flat_unit, flat_t).reshape(seconds.shape)
    sun_alt = sky.interp("sun_alt", flat_t).reshape(seconds.shape)
    level = TWILIGHT_ALTITUDE_DEG[darkness]
    # Why each sample fails, as codes into `words`, in order: daylight or twilight, the
    # altitude limit, then the interlocks (checked only where the first two pass).
    codes = np.where(sun_alt >= level, 1, np.where(alt < limit, 2, 0))
    free = codes == 0
    locks = site.interlocks.violations(alt[free], az[free], ha[free], dec[free], sun_sep[free])
    locked = locks != ""
    lock_words, lock_codes = np.unique(locks[locked].astype(str), return_inverse=True)
    free_codes = np.zeros(locks.shape, dtype=int)
    free_codes[locked] = np.ravel(lock_codes) + 3
    codes[free] = free_codes
    words = ["", f"Sun above {level:g} deg", f"below {limit:g} deg altitude", *lock_words]
    ok = codes == 0
    event = (parts == 1) | (parts == 2)
    observable = np.where(ok.all(axis=1), "full",
                          np.where((ok & event).any(axis=1), "partial", "none"))
    lost = _lost_texts(codes, words, parts)
    centre = EVENT_SAMPLES_BASELINE + EVENT_SAMPLES_EVENT // 2
    first, last = EVENT_SAMPLES_BASELINE, EVENT_SAMPLES_BASELINE + EVENT_SAMPLES_EVENT - 1
    moon = sky.separation_from("moon", unit, seconds[:, centre])
    return sel, {"night": np.full(len(rows), date.isoformat(), dtype=object),
                 "alt_start": alt[:, first], "alt_mid": alt[:, centre], "alt_end": alt[:, last],
                 "moon_distance": moon,
                 "moon_illumination": sky.interp("moon_illumination", seconds[:, centre]),
                 "observable": observable, "lost": lost}


def _lost_texts(codes: np.ndarray, words: list, parts: np.ndarray) -> np.ndarray:
    """Per event (row of `codes`, 0 = allowed), 'first half: below 30 deg altitude; baseline
    after: Sun above -18 deg' (the first failing reason of each failing part), or ''."""
    base = len(words)
    key = np.zeros(len(codes), dtype=np.int64)
    for p in range(len(PARTS)):
        part = codes[:, parts == p]
        key = key * base + part[np.arange(len(part)), np.argmax(part > 0, axis=1)]
    combos, which = np.unique(key, return_inverse=True)
    texts = []
    for combo in combos:
        first = [(int(combo) // base ** (len(PARTS) - 1 - p)) % base for p in range(len(PARTS))]
        texts.append("; ".join(f"{name}: {words[c]}" for name, c in zip(PARTS, first) if c))
    return np.array(texts, dtype=object)[np.ravel(which)]


def _combine(judged: list, n: int) -> dict:
    out = {}
    for sel, cols in judged:
        for key, values in cols.items():
            if key not in out:
                out[key] = np.empty(n, dtype=values.dtype)
            out[key][sel] = values
    return out


COLUMN_UNITS = {"mid_error_s": "s", "baseline_min": "min", "duration_h": "h",
                "alt_start": "deg", "alt_mid": "deg", "alt_end": "deg",
                "moon_distance": "deg", "moon_illumination": ""}


def _event_list(targets, eph, rows, cycle, mid, half_d, base_d, judged, meta) -> EventList:
    def iso(tt_days):
        return lambda: np.asarray(iso_z(utc_of_tt_days(tt_days)) if len(tt_days) else [],
                                  dtype=object)

    columns = {
        "name": targets.names()[rows] if len(rows) else np.array([], dtype=object),
        "kind": eph.kind[rows], "cycle": cycle, "night": judged["night"],
        "start": iso(mid - half_d), "mid": iso(mid), "end": iso(mid + half_d),
        "mid_error_s": mid_error_s(eph.epoch_error_d[rows], eph.period_error_d[rows], cycle),
        "duration_h": eph.duration_h[rows], "baseline_min": eph.baseline_min[rows],
        "alt_start": judged["alt_start"], "alt_mid": judged["alt_mid"],
        "alt_end": judged["alt_end"], "moon_distance": judged["moon_distance"],
        "moon_illumination": judged["moon_illumination"],
        "observable": judged["observable"], "lost": judged["lost"],
    }
    result = EventList(columns, meta, COLUMN_UNITS)
    result.rows, result.mid_tt = rows, mid
    return result


def _empty(meta) -> EventList:
    empty_f, empty_o = np.array([], float), np.array([], dtype=object)
    cols = {k: (empty_f if k in COLUMN_UNITS or k == "cycle" else empty_o) for k in (
        "name", "kind", "cycle", "night", "start", "mid", "end", "mid_error_s", "duration_h",
        "baseline_min", "alt_start", "alt_mid", "alt_end", "moon_distance",
        "moon_illumination", "observable", "lost")}
    cols["cycle"] = np.array([], dtype=np.int64)
    result = EventList(cols, meta, COLUMN_UNITS)
    result.rows, result.mid_tt = np.array([], dtype=int), empty_f
    return result


def _meta(site, darkness, limit, dates, dark, eph, targets) -> dict:
    names = targets.names()
    converted = [{"name": str(names[i]), "assumed": str(eph.assumed[i])}
                 for i in np.flatnonzero(eph.assumed != "")]
    return {
        "site": site.name or f"{site.latitude:.6f},{site.longitude:.6f},{site.height:.1f}",
        "latitude": site.latitude, "longitude": site.longitude, "height": site.height,
        "timezone": site.timezone, "timezone_source": site.timezone_source,
        "darkness": darkness, "min_altitude": limit,
        "nights": [{"date": d.isoformat(),
                    "dark_start": None if s is None else iso_z(utc_of_tt_days(s[0])),
                    "dark_end": None if s is None else iso_z(utc_of_tt_days(s[1]))}
                   for d, s in zip(dates, dark)],
        "timing": ("mid-event UTC at the site whose BJD_TDB is T0 + nP: Roemer delay (ERFA "
                   "epv00 Earth + site), Einstein delay (ERFA dtdb), Shapiro delay of the Sun"),
        "epoch_conversions": converted,
    }
