"""The plan file: one JSON document holding everything needed to plan a night again.

Epochpoint's own format (UTF-8 JSON, RFC 8259). Angles are degrees, instants ISO 8601 UTC
with a trailing Z, dates YYYY-MM-DD::

    {
      "format": "epochpoint-plan",          # required, exactly this text
      "version": 1,                         # required; this reader knows version 1
      "description": "free text",           # optional
      "site": {                             # the tables of the TOML site file (sitefile.py,
        "site": {"name": ..., "latitude": ..., "longitude": ..., "height": ...,
                 "timezone": ...},          #  sitelimits.py), as JSON objects
        "weather": {"pressure": ..., "temperature": ..., "humidity": ..., "wavelength": ...},
        "horizon": {"points": [[azimuth, altitude], ...]},      # optional
        "mount": {"type": "german", "min_altitude": ..., ...},
        "safety": {"sun_avoidance": ...}
      },
      "night": {
        "date": "2027-01-19",               # local date of the evening the night starts
        "darkness": "astronomical",         # civil | nautical | astronomical
        "min_altitude": null,               # degrees; null: the mount's minimum altitude
        "max_airmass": null,                # null: no airmass limit
        "moon_separation": 30.0,            # degrees from the Moon while it is up (0: none)
        "moon_scaled": false                # scale it by the Moon's illuminated fraction
      },
      "drift": {"tolerance_arcsec": 1.0},   # the drift view's tolerance
      "targets": [                          # one object per target, in list order
        {"name": "Wick", "ra": 38.71342, "dec": -41.27717, "epoch": 2016.0,
         "pm_ra_cosdec": 187.214, "pm_dec": -92.551, "parallax": 21.734,
         "radial_velocity": 14.2,
         "ra_error": 0.031, ...,            # Gaia-archive error/correlation names, when known
         "priority": 2, "exposure": 120.0, "repeats": 3, "notes": "start early"}
      ],
      "schedule": [                         # the last computed order; the app shows it
        {"name": "Wick", "start": "2027-01-20T00:41:12.000Z",   # as saved when the plan is
         "end": "2027-01-20T00:47:12.000Z"}   # opened (core.schedule_kept) and plans again
                                              # only on request or after an edit
      ]
    }

Target keys: name, ra and dec are required; epoch (Julian year) defaults to 2000.0, the
motions (mas/yr, mas, km/s) to 0; errors (`ra_error`, ..., `ra_dec_corr`, ...) are left out
when unknown; the planning fields follow planningfields.py. Every section except format,
version, site and targets is optional. Any unknown key is an error, so a misspelt key never
passes silently. Errors are one line naming the file and the place: the section and key, or
the target's position, name and key. A solar-system target also carries its body cells
(core/bodies/rows.py: `body`, or orbital elements such as `eccentricity`), text or numbers,
left out when blank; its ra and dec are placeholders.
"""
from __future__ import annotations

import datetime as dt
import json
import math
import os
from dataclasses import dataclass, field, replace

import numpy as np

from epochpoint.core.bodies.rows import BODY_COLUMNS as BODY_KEYS
from epochpoint.core.plan import DARKNESS_LEVELS
from epochpoint.core.site import Site
from epochpoint.core.targets import (CORRELATION_COLUMNS, ERROR_COLUMNS, MOTION_COLUMNS,
                                     TargetError, Targets)

from .atomic import atomic_write_text
from .errors import InputError, quote
from .eventfields import EVENT_FIELDS, EVENT_PARSERS
from .filebytes import decode_utf8, read_file_bytes
from .planningfields import PLANNING_FIELDS, planning_columns
from .sitefile import site_from_tables, site_to_tables
from .timeconstraintfields import TIME_FIELDS, check_time_cells

FORMAT_NAME = "epochpoint-plan"
FORMAT_VERSION = 1
DEFAULT_DRIFT_TOLERANCE_ARCSEC = 1.0
DEFAULT_EPOCH = 2000.0

TOP_KEYS = ("format", "version", "description", "site", "night", "drift", "targets", "schedule")
NIGHT_KEYS = ("date", "darkness", "min_altitude", "max_airmass", "moon_separation",
              "moon_scaled")
ASTROMETRY_KEYS = ("ra", "dec", "epoch") + MOTION_COLUMNS
# Cells kept as the list's own text or numbers: solar-system bodies, periodic events and
# time constraints (checked on reading as in a target file).
CELL_KEYS = BODY_KEYS + EVENT_FIELDS + TIME_FIELDS
TARGET_KEYS = (("name",) + ASTROMETRY_KEYS + ERROR_COLUMNS + CORRELATION_COLUMNS
               + PLANNING_FIELDS + CELL_KEYS)
SCHEDULE_KEYS = ("name", "start", "end")


@dataclass(frozen=True)
class NightSettings:
    """What the observer asks of the night (the options of core.plan.plan)."""

    date: str  # YYYY-MM-DD, local date of the evening
    darkness: str = "astronomical"
    min_altitude: float | None = None
    max_airmass: float | None = None
    moon_separation: float = 0.0
    moon_scaled: bool = False

    def plan_options(self) -> dict:
        """Keyword arguments for core.plan.plan."""
        return {"darkness": self.darkness, "min_altitude": self.min_altitude,
                "max_airmass": self.max_airmass, "moon_separation": self.moon_separation,
                "moon_scale": self.moon_scaled}


@dataclass
class PlanDocument:
    """A plan file's content. `targets` carries the planning fields as typed extra columns."""

    site: Site
    night: NightSettings
    targets: Targets
    drift_tolerance_arcsec: float = DEFAULT_DRIFT_TOLERANCE_ARCSEC
    schedule: list = field(default_factory=list)  # [{"name", "start", "end"}], kept on opening
    description: str = ""


def check_night(night: NightSettings) -> NightSettings:
    """The settings if every value is usable, else ValueError naming the key."""
    _night_from_json(None, {k: getattr(night, k) for k in NIGHT_KEYS})
    return night


def schedule_entries(plan) -> list[dict]:
    """[{"name", "start", "end"}] of a core.plan.Plan's observing order."""
    return [{"name": e["name"], "start": e["start"], "end": e["end"]}
            for e in plan.to_json()["schedule"]]


# ----------------------------------------------------------------------------- reading

def read_plan_file(path) -> PlanDocument:
    """A PlanDocument from a plan file; InputError (one line, naming file and place) if bad."""
    path = os.fspath(path)
    text = decode_utf8(path, read_file_bytes(path))
    try:
        data = json.loads(text)
    except json.JSONDecodeError as err:
        raise InputError(path, f"is not valid JSON: {err.msg} (column {err.colno})",
                         line=err.lineno) from None
    except RecursionError:
        # The decoder recurses once per nested list or object; no plan nests more than five.
        raise InputError(path, "is not a plan file: lists or objects nested too deeply "
                               "to read") from None
    if not isinstance(data, dict):
        raise InputError(path, "is not a plan file (expected a JSON object)")
    if data.get("format") != FORMAT_NAME:
        raise InputError(path, f'is not a plan file ("format" must be "{FORMAT_NAME}")')
    version = data.get("version")
    if version != FORMAT_VERSION:
        raise InputError(path, f'"version" {json.dumps(version)[:20]}: this Epochpoint reads '
                               f"version {FORMAT_VERSION} plan files")
    _unknown_keys(path, "the top level", data, TOP_KEYS)
    for key in ("site", "targets"):
        if key not in data:
            raise InputError(path, f'has no "{key}" section')
    site = _site(path, data["site"])
    try:
        night = _night_from_json(path, _section(path, data, "night"))
    except ValueError as err:
        raise InputError(path, f'section "night", {err}') from None
    tolerance = _tolerance(path, _section(path, data, "drift"))
    description = data.get("description", "")
    if not isinstance(description, str):
        raise InputError(path, 'key "description": must be text')
    return PlanDocument(site=site, night=night, targets=_targets(path, data["targets"]),
                        drift_tolerance_arcsec=tolerance,
                        schedule=_schedule(path, data.get("schedule", [])),
                        description=description)


def _unknown_keys(path, where: str, data: dict, allowed) -> None:
    for key in data:
        if key not in allowed:
            raise InputError(path, f"{where}: unknown key {quote(key)} "
                                   f"(known: {', '.join(allowed)})")


def _section(path, data: dict, key: str) -> dict:
    value = data.get(key, {})
    if not isinstance(value, dict):
        raise InputError(path, f'section "{key}" must be a JSON object')
    return value


def _site(path, tables) -> Site:
    if not isinstance(tables, dict):
        raise InputError(path, 'section "site" must be a JSON object of site-file tables')
    try:
        return site_from_tables(tables, path)
    except InputError as err:
        raise InputError(path, f'section "site", {err.message}') from None


def _is_number(value) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool) and \
        math.isfinite(value)


def _night_from_json(path, data: dict) -> NightSettings:
    """NightSettings from the "night" object; ValueError 'key ...: problem' if bad."""
    _unknown_keys(path, 'section "night"', data, NIGHT_KEYS)
    if "date" not in data:
        raise ValueError("key date: missing (YYYY-MM-DD)")
    date = data["date"]
    try:
        dt.date.fromisoformat(date if isinstance(date, str) else "")
    except ValueError:
        raise ValueError(f"key date: {quote(date)} is not a date YYYY-MM-DD") from None
    darkness = data.get("darkness", "astronomical")
    if darkness not in DARKNESS_LEVELS:
        raise ValueError(f"key darkness: {quote(darkness)} is not one of "
                         f"{', '.join(DARKNESS_LEVELS)}")
    checks = (("min_altitude", -5.0, 90.0, True), ("max_airmass", 1.0, 40.0, True),
              ("moon_separation", 0.0, 180.0, False))
    values = {}
    for key, low, high, nullable in checks:
        value = data.get(key, None if nullable else 0.0)
        if value is None and nullable:
            values[key] = None
            continue
        if not _is_number(value) or not low <= value <= high:
            raise ValueError(f"key {key}: {quote(value)} must be a number from {low:g} to "
                             f"{high:g}" + (" or null" if nullable else ""))
        values[key] = float(value)
    scaled = data.get("moon_scaled", False)
    if not isinstance(scaled, bool):
        raise ValueError(f"key moon_scaled: {quote(scaled)} must be true or false")
    return NightSettings(date=date, darkness=darkness, moon_scaled=scaled, **values)


def _tolerance(path, data: dict) -> float:
    _unknown_keys(path, 'section "drift"', data, ("tolerance_arcsec",))
    value = data.get("tolerance_arcsec", DEFAULT_DRIFT_TOLERANCE_ARCSEC)
    if not _is_number(value) or value <= 0.0:
        raise InputError(path, f'section "drift", key tolerance_arcsec: {quote(value)} must be '
                               "a positive number of arcseconds")
    return float(value)


def _targets(path, items) -> Targets:
    """Targets (planning fields typed) from the "targets" list."""
    if not isinstance(items, list):
        raise InputError(path, 'section "targets" must be a JSON list of objects')
    n = len(items)
    names = np.empty(n, dtype=object)
    astrometry = {key: np.full(n, DEFAULT_EPOCH if key == "epoch" else 0.0)
                  for key in ASTROMETRY_KEYS}
    errors = {}
    raw_planning = {key: np.full(n, None, dtype=object) for key in PLANNING_FIELDS}
    body_cells = {}
    for i, item in enumerate(items):
        def fail(key, message, i=i, item=item):
            name = item.get("name") if isinstance(item, dict) else None
            return InputError(path, message, line=i + 1, column=key, row_word="target",
                              target=name if isinstance(name, str) else None)

        if not isinstance(item, dict):
            raise fail(None, "must be a JSON object")
        for key in item:
            if key not in TARGET_KEYS:
                raise fail(None, f"unknown key {quote(key)}")
        for key in ("name", "ra", "dec"):
            if key not in item:
                raise fail(key, "missing")
        if not isinstance(item["name"], str) or not item["name"].strip():
            raise fail("name", "must be non-empty text")
        names[i] = item["name"]
        for key, value in item.items():
            if key in PLANNING_FIELDS:
                if key == "notes" and not isinstance(value, (str, type(None))):
                    raise fail(key, "must be text")
                raw_planning[key][i] = value
            elif key in CELL_KEYS:
                if not (_is_number(value) or isinstance(value, str)):
                    raise fail(key, f"{quote(value)} must be text or a number")
                body_cells.setdefault(key, np.full(n, "", dtype=object))[i] = value
            elif key in ASTROMETRY_KEYS:
                if not _is_number(value):
                    raise fail(key, f"{quote(value)} is not a number")
                astrometry[key][i] = value
            elif key != "name":  # an error or a correlation; null means unknown
                if not (_is_number(value) or value is None):
                    raise fail(key, f"{quote(value)} is not a number")
                errors.setdefault(key, np.full(n, np.nan))[i] = np.nan if value is None \
                    else value
    try:
        targets = Targets.from_columns(name=names, errors=errors, extra=raw_planning,
                                       **astrometry)
    except TargetError as err:
        i = err.index
        raise InputError(path, str(err).split(": ", 1)[-1],
                         line=None if i is None else i + 1, column=err.column,
                         target=None if i is None else names[i], row_word="target") from None
    if body_cells:
        _check_bodies(path, body_cells, names)
        _check_timing(path, body_cells, names)
    return replace(targets, extra={**planning_columns(targets, path), **body_cells})


def _check_bodies(path, cells: dict, names) -> None:
    """Each body row by the engine's rules (core/bodies/rows.py), one line if bad."""
    from epochpoint.core.bodies.rows import BodyRowError, body_rows, source_of_row

    for i in np.flatnonzero(body_rows(cells, len(names))).tolist():
        try:
            source_of_row(cells, i, str(names[i]))
        except BodyRowError as err:
            raise InputError(path, str(err).split(": ", 1)[-1], line=i + 1, column=err.column,
                             target=names[i], row_word="target") from None


def _check_timing(path, cells: dict, names) -> None:
    """Event and time-constraint cells by the target files' rules (eventfields.py,
    timeconstraintfields.py), one line naming the target if bad."""
    def note(i, key, message):
        raise InputError(path, message, line=i + 1, column=key, target=names[i],
                         row_word="target")

    for key in EVENT_FIELDS:
        if key in cells and key != "event_kind":
            for i, cell in enumerate(cells[key]):
                try:
                    EVENT_PARSERS[key](cell)
                except ValueError as err:
                    note(i, key, str(err))
    check_time_cells(cells, note)


def _schedule(path, items) -> list[dict]:
    if not isinstance(items, list):
        raise InputError(path, 'section "schedule" must be a JSON list')
    for i, item in enumerate(items):
        if not (isinstance(item, dict) and set(item) == set(SCHEDULE_KEYS)
                and all(isinstance(item[k], str) for k in SCHEDULE_KEYS)):
            raise InputError(path, f'section "schedule", entry {i + 1}: must be '
                                   '{"name": text, "start": ISO time, "end": ISO time}')
    return [dict(item) for item in items]


# ----------------------------------------------------------------------------- writing

def plan_to_json(doc: PlanDocument) -> dict:
    """The plan file's JSON object for a document (schema in the module docstring)."""
    t = doc.targets
    planning = planning_columns(t)
    names = t.names()
    targets = []
    for i in range(len(t)):
        item = {"name": str(names[i])}
        for key in ASTROMETRY_KEYS:
            item[key] = float(getattr(t, key)[i])
        for key in ERROR_COLUMNS + CORRELATION_COLUMNS:
            if key in t.errors and np.isfinite(t.errors[key][i]):
                item[key] = float(t.errors[key][i])
        item["priority"] = int(planning["priority"][i])
        item["exposure"] = float(planning["exposure"][i])
        item["repeats"] = int(planning["repeats"][i])
        item["notes"] = str(planning["notes"][i])
        item.update(_body_items(t, i))
        targets.append(item)
    night = {k: getattr(doc.night, k) for k in NIGHT_KEYS}
    data = {"format": FORMAT_NAME, "version": FORMAT_VERSION}
    if doc.description:
        data["description"] = doc.description
    data.update({"site": site_to_tables(doc.site), "night": night,
                 "drift": {"tolerance_arcsec": float(doc.drift_tolerance_arcsec)},
                 "targets": targets,
                 "schedule": [{k: e[k] for k in SCHEDULE_KEYS} for e in doc.schedule]})
    return data


def _body_items(targets: Targets, i: int) -> dict:
    """The non-blank body, event and time-constraint cells of row i (text as text, numbers as
    numbers)."""
    out = {}
    extra = {str(k).strip().lower(): v for k, v in targets.extra.items()}
    for key in CELL_KEYS:
        value = extra[key][i] if key in extra else None
        if isinstance(value, (np.floating, np.integer)):
            value = value.item()
        if isinstance(value, str) and value.strip():
            out[key] = value.strip()
        elif _is_number(value):
            out[key] = value
    return out


def plan_to_text(doc: PlanDocument) -> str:
    """The plan file's text: objects indented, lists of numbers on one line, one line per
    target and per schedule entry (easy to read and to compare line by line)."""
    return _dump(plan_to_json(doc), "") + "\n"


def _dump(value, indent: str) -> str:
    inner = indent + "  "
    if isinstance(value, dict) and value:
        items = [f"{inner}{json.dumps(k)}: {_dump(v, inner)}" for k, v in value.items()]
        return "{\n" + ",\n".join(items) + f"\n{indent}}}"
    if isinstance(value, list) and value and all(isinstance(v, dict) for v in value):
        rows = [f"{inner}{json.dumps(v, ensure_ascii=False)}" for v in value]
        return "[\n" + ",\n".join(rows) + f"\n{indent}]"
    return json.dumps(value, ensure_ascii=False)


def write_plan_file(path, doc: PlanDocument) -> None:
    """Save a document as a plan file, atomically (io.atomic)."""
    atomic_write_text(path, plan_to_text(doc))
