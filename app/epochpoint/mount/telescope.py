"""A telescope mount on an INDI server: find it, connect it, read its status, send it our
site and clock, slew or sync it to a target's place behind the site's interlocks, follow the
motion, refine once, and abort.

INDI standard telescope properties used (INDI Library "Standard Properties"):
CONNECTION (CONNECT, DISCONNECT); DRIVER_INFO.DRIVER_INTERFACE (bit 0: telescope);
EQUATORIAL_EOD_COORD (RA in hours, DEC in degrees, true equator and equinox of date);
EQUATORIAL_COORD (the same at J2000); ON_COORD_SET (TRACK, SLEW, SYNC);
TELESCOPE_ABORT_MOTION (ABORT); TELESCOPE_PARK (PARK); TELESCOPE_TRACK_STATE (TRACK_ON);
TARGET_EOD_COORD; GEOGRAPHIC_COORD (LAT, LONG east 0..360, ELEV metres); TIME_UTC (UTC,
OFFSET hours); TELESCOPE_PIER_SIDE (PIER_WEST, PIER_EAST; read only). A controller converts
of-date coordinates with its own site and clock, so `status()` reports them for comparison
with ours and `push_site()` sends ours.

A German equatorial mount takes the pier side of the target's hour angle at the slew's end
and must flip once it tracks past its meridian limit: before a slew the side at the slew's
estimated end and the track over the hold time are checked (core.limits.pier_flip_check), a
flip needed mid-track refuses the slew, and the side is said beside the device's
TELESCOPE_PIER_SIDE, before the slew and after it. INDI names the side the tube is on
(PIER_WEST: "West (pointing east)"), we name the side of the meridian the target is on: our
east is INDI's PIER_WEST.

Threads: a GUI worker calls `slew_to_target()` (it blocks, always with a deadline); `abort()`
may be called meanwhile from any other thread, and the waiting slew then sees the motion end.
An abort latches: checking for an abort and sending a motion are one step under one lock, so
once an abort is recorded nothing of the command begun before it moves the mount (the first
slew, the refining slew or a watch), until the user begins a new command (`begin_command`).
Every answer the device gives to a switch or a number (Ok, Busy, Alert) is checked before it
is relied on: a refused ON_COORD_SET never lets the coordinates through as a sync.
Nothing here retries after a lost connection.

Solar-system bodies move against the stars, so a slew to one goes to its place at the slew's
estimated END (the site's slew-time model, core.track.slew_end_seconds, from where the mount
reports it points; the place at that instant, then the duration to that place and the place
again: one iteration), the interlocks follow the body's moving place (core.track.BodyMotion),
and once the coordinates are sent the mount is given the body's own tracking rate where the
device offers one: INDI's TELESCOPE_TRACK_RATE (TRACK_RATE_RA, TRACK_RATE_DE, arcsec per SI
second, the axes' rates: sidereal is 15.041067 in RA and 0 in Dec) and TELESCOPE_TRACK_MODE
TRACK_CUSTOM. From the body's apparent rates (rate_ra including cos Dec, rate_dec; arcsec/s):
TRACK_RATE_RA = 15.041067 - rate_ra / cos Dec (the hour-angle axis turns with the sky less
the body's own eastward motion in right ascension) and TRACK_RATE_DE = rate_dec, negated
when the device reports TELESCOPE_PIER_SIDE PIER_WEST and negated (again) at a southern site
(latitude < 0): the rate is the declination AXIS's, whose angle runs with the declination on
one side of the pier and against it on the other, and the other way round when the polar axis
points at the south pole (the mechanical angles of core.pointing_model.pier_sides: psi = p dec
or 180 - p dec). So the INDI telescope simulator (indi-bin 1.9.9) moves, measured: RA
14.041067 gave +1.0 arcsec/s of RA at latitude +30 and -30; DE +1 gave, in arcsec/s of Dec,
+1.0 on PIER_EAST and -1.0 on PIER_WEST at latitude +30, and -0.94 on PIER_EAST and +0.94 on
PIER_WEST at latitude -30. INDI does not define the sign for other drivers: check a new
mount's declination rate once (the watch says the rates it sets). The simulator refuses to
reverse a rate while tracking, and ignores a rate set while tracking is off, so
set_track_rate takes a reversing axis through 0 first, tracking kept on.
Without those properties (or when the device refuses them) the mount tracks sidereally and
the body drifts off at its apparent rate: the watch re-slews it every 2 * tolerance / rate
seconds (aimed half an interval ahead, so the error stays within +-tolerance), bounded to
[RESLEW_MIN_S, RESLEW_MAX_S], and says so. The Sun is refused unless a solar filter is
declared fitted, and then SOLAR_CAUTION is said on every slew and sync.

Clocks: a controller converts coordinates of date with its own clock; 1 s of clock error is
15 arcsec of hour angle at the equator (the sky turns 360 deg in a sidereal day, common
practice). Before a slew or sync the device's TIME_UTC (dated by its arrival) is compared with
our clock: above CLOCK_REFUSE_S (2 s, 30 arcsec: beyond a typical slew's accepted residual and
a small camera field's margin) the command is refused; above CLOCK_WARN_S (0.2 s, 3 arcsec:
the seeing-limited scale) it is sent with a warning. `push_site` sends TIME_UTC to the
millisecond.
"""
from __future__ import annotations

import threading
import time
from dataclasses import dataclass, replace
from datetime import datetime, timezone
from typing import Callable
from zoneinfo import ZoneInfo, ZoneInfoNotFoundError

import numpy as np

from astropy.time import TimeDelta

from ..core.constants import DEG_TO_RAD, RAD_TO_ARCSEC
from ..core.context import make_context
from ..core.horizon_geometry import SIDEREAL_DEG_PER_S
from ..core.limits import SOLAR_CAUTION, pier_flip_check
from ..core.pointing_model.pier_sides import pier_side_for, pole_sign_for
from ..core.site import Site
from ..core.targets import Targets
from ..core.timescale import parse_time
from ..core.track import body_motion, slew_end_seconds, track_refusal
from ..core.vectors import separation, unit_vectors
from .errors import ConnectionLost, IndiTimeout, InterlockRefused, MountError, MountFailed
from .indi_client import IndiClient, Vector, parse_address
from .options import checked_residual, checked_track_seconds, checked_wait
from .pointing import Pointing, pointing_for

EOD_COORD = "EQUATORIAL_EOD_COORD"
J2000_COORD = "EQUATORIAL_COORD"
TELESCOPE_INTERFACE_BIT = 1  # INDI DRIVER_INTERFACE: TELESCOPE_INTERFACE = 1 << 0
FRAME_TEXT = {EOD_COORD: "true equator and equinox of date",
              J2000_COORD: "mean equator and equinox of J2000.0 (geocentric astrometric)"}
CAUTION = ("Caution: the mount is about to move. Keep people, hands and cables clear of it. "
           "Never let the telescope point at or near the Sun without a proper solar filter: "
           "keep the optics capped unless you are sure no part of the path passes near it. "
           "Follow your observatory's procedures.")
# A device must show a command in progress (Busy) or its failure (Alert) this soon.
TAKE_UP_S = 5.0
# Defs arriving this close together belong to one burst (after getProperties or CONNECT).
QUIET_S = 0.3
SETTLE_LIMIT_S = 2.0
# Within this of the command, an Ok without a Busy means the mount was already there.
ARRIVED_ARCSEC = 60.0
# Device clock minus ours: refuse beyond 2 s (30 arcsec of hour angle at the equator), warn
# beyond 0.2 s (3 arcsec); see the module docstring.
CLOCK_REFUSE_S = 2.0
CLOCK_WARN_S = 0.2
SIDEREAL_ARCSEC_PER_S = 15.041  # the sky's turning (common practice)
# The track checked before a slew when no block length is given.
DEFAULT_TRACK_S = 600.0
# While watching a track: how often, and how far ahead a limit must be seen to stop in time.
WATCH_POLL_S = 2.0
WATCH_LEAD_S = 30.0
AT_LIMIT = ("stop-tracking", "abort")
# INDI's sidereal axis rate, arcsec per SI second: 360 deg per sidereal day of 86164.0905 s
# (the INDI Library's TRACKRATE_SIDEREAL).
INDI_SIDEREAL_ARCSEC_S = 1296000.0 / 86164.0905
TRACK_RATE = "TELESCOPE_TRACK_RATE"
TRACK_MODE = "TELESCOPE_TRACK_MODE"
# INDI's TELESCOPE_PIER_SIDE names where the tube is: PIER_WEST "West (pointing east)" and
# PIER_EAST "East (pointing west)" (the labels the INDI telescope simulator defines, indi-bin
# 1.9.9). Our sides name where the target is (core.pointing_model.pier_sides): a target east of
# the meridian puts the tube west of the pier.
PIER_SIDE = "TELESCOPE_PIER_SIDE"
INDI_PIER_SIDE = {"east": "PIER_WEST", "west": "PIER_EAST"}
SIDE_OF_INDI = {indi: ours for ours, indi in INDI_PIER_SIDE.items()}
# Re-slew cadence bounds for a body on a mount without a track rate: a re-slew takes about
# a settle time, so not more often than every 10 s; and at least every 10 minutes.
RESLEW_MIN_S = 10.0
RESLEW_MAX_S = 600.0

Notify = Callable[[str], None]


def _silent(_text: str) -> None:
    pass


@dataclass(frozen=True)
class MountStatus:
    """What the device reports (angles in degrees, longitude east-positive in -180..180)."""

    device: str
    address: str
    connected: bool
    coordinate_property: str | None
    ra_deg: float | None
    dec_deg: float | None
    motion_state: str | None  # the coordinate property's state: Idle, Ok, Busy or Alert
    tracking: bool | None
    parked: bool | None
    target_ra_deg: float | None  # TARGET_EOD_COORD, the last target it took
    target_dec_deg: float | None
    latitude: float | None
    longitude: float | None
    height: float | None
    time_utc: str | None  # TIME_UTC as the device last reported it, with a Z
    utc_offset_h: float | None


@dataclass(frozen=True)
class SlewReport:
    """The outcome of one slew or sync (angles in degrees, residuals in arcsec)."""

    target: str
    action: str  # "slew" or "sync"
    coordinate_property: str
    commanded_ra_deg: float  # the last coordinates sent, in the property's frame
    commanded_dec_deg: float
    pointing: Pointing  # the target's place when last commanded
    final_state: str | None  # Ok, Idle or Alert; None when not waited for
    reported_ra_deg: float | None
    reported_dec_deg: float | None
    first_residual_arcsec: float | None  # after the first move
    residual_arcsec: float | None  # after the last move
    refined: bool
    tolerance_arcsec: float
    aborted: bool = False  # an abort() ended the motion while it was followed
    # A body: how the mount follows it ("track rate", "re-slew", or "" for a star) and the
    # re-slew cadence (s). pointing.time is then the slew's estimated end.
    follow: str = ""
    reslew_s: float | None = None
    # What the device reported in TELESCOPE_PIER_SIDE once the motion ended (PIER_EAST or
    # PIER_WEST; "" when it reports none or was not followed); ours is pointing.pier_side.
    device_pier_side: str = ""

    @property
    def within_tolerance(self) -> bool | None:
        if self.residual_arcsec is None:
            return None
        return self.residual_arcsec <= self.tolerance_arcsec


@dataclass(frozen=True)
class _Command:
    coordinate_property: str
    ra_deg: float
    dec_deg: float
    serial: int  # the client's last update serial before the command
    sync: bool


def angular_distance_arcsec(ra1_deg, dec1_deg, ra2_deg, dec2_deg) -> float:
    """Angle between two directions given as right ascension and declination (arcsec)."""
    a = unit_vectors(np.atleast_1d(ra1_deg) * DEG_TO_RAD, np.atleast_1d(dec1_deg) * DEG_TO_RAD)
    b = unit_vectors(np.atleast_1d(ra2_deg) * DEG_TO_RAD, np.atleast_1d(dec2_deg) * DEG_TO_RAD)
    return float(separation(a, b)[0] * RAD_TO_ARCSEC)


def is_telescope(client: IndiClient, device: str) -> bool:
    props = client.vectors(device)
    if EOD_COORD in props or J2000_COORD in props:
        return True
    info = props.get("DRIVER_INFO")
    try:
        interface = int(float(info.values.get("DRIVER_INTERFACE", "0"))) if info else 0
    except ValueError:
        interface = 0
    return bool(interface & TELESCOPE_INTERFACE_BIT)


def _settle(client: IndiClient, limit_s: float = SETTLE_LIMIT_S) -> None:
    """Wait until definitions pause for QUIET_S (a burst has arrived), at most limit_s."""
    end = time.monotonic() + limit_s
    while time.monotonic() < end:
        before = client.last_definition
        try:
            client.wait_for(lambda: client.last_definition != before,
                            min(QUIET_S, max(0.0, end - time.monotonic())), "more definitions")
        except IndiTimeout:
            return


def find_telescope(client: IndiClient, device: str | None, timeout_s: float) -> str:
    """The telescope device's name: `device` if given, else the only telescope defined."""
    if device:
        client.wait_for(lambda: device in client.devices(), timeout_s,
                        f"device {device!r} to appear")
        _settle(client)
        if not is_telescope(client, device):
            raise MountFailed(f"device {device!r} at {client.address} is not a telescope")
        return device

    def telescopes():
        return [d for d in client.devices() if is_telescope(client, d)]

    try:
        client.wait_for(telescopes, timeout_s, "a telescope device")
    except IndiTimeout:
        seen = ", ".join(client.devices()) or "none"
        raise MountFailed(f"no telescope device at {client.address} within {timeout_s:g} s "
                          f"(devices seen: {seen})") from None
    _settle(client)
    found = telescopes()
    if len(found) > 1:
        raise MountFailed(f"several telescope devices at {client.address} ({', '.join(found)}); "
                          "choose one with --device")
    return found[0]


class Telescope:
    """One telescope device on an INDI server. Thread-safe; use as a context manager."""

    def __init__(self, client: IndiClient, device: str):
        self.client, self.device = client, device
        self.aborts = 0  # how many aborts were recorded: a command begun before one is stopped
        self.motions = 0  # how many motion commands were sent (coordinates after SLEW/TRACK)
        # Held while checking the abort latch and sending a motion (or sending the abort), so
        # an abort is either seen before the motion is sent or sent after it.
        self._motion_lock = threading.Lock()
        self._latch_lock = threading.Lock()

    def begin_command(self) -> int:
        """A new command from the user: its token. An abort recorded after this stops it."""
        with self._latch_lock:
            return self.aborts

    def latch_abort(self) -> None:
        """Record an abort at once, without the network: from now on no command begun earlier
        sends a motion. abort() does this first; a GUI calls it on its own thread too."""
        with self._latch_lock:
            self.aborts += 1

    def aborted_since(self, token: int) -> bool:
        """True when an abort was recorded after begin_command() returned token."""
        with self._latch_lock:
            return self.aborts != token

    @classmethod
    def open(cls, address: str, device: str | None = None, *, timeout_s: float = 10.0,
             connect_device: bool = True, notify: Notify = _silent) -> "Telescope":
        """Connect to the server at "HOST:PORT", find the telescope and (by default) CONNECT it."""
        timeout_s = checked_wait(timeout_s, "connection timeout")
        host, port = parse_address(address)
        client = IndiClient(host, port, connect_timeout_s=min(timeout_s, 5.0)).open()
        try:
            scope = cls(client, find_telescope(client, device, timeout_s))
            if connect_device:
                scope.connect(timeout_s, notify)
        except BaseException:
            client.close()
            raise
        return scope

    def close(self) -> None:
        self.client.close()

    def __enter__(self) -> "Telescope":
        return self

    def __exit__(self, *exc) -> None:
        self.close()

    def _vector(self, name: str) -> Vector | None:
        return self.client.vector(self.device, name)

    def _state(self, name: str) -> str | None:
        v = self._vector(name)
        return None if v is None else v.state

    @property
    def connected(self) -> bool:
        connection = self._vector("CONNECTION")
        if connection is None:  # a driver without a CONNECTION switch is always on
            return self.coordinate_property() is not None
        return bool(connection.values.get("CONNECT")) and connection.state != "Alert"

    def coordinate_property(self) -> str | None:
        """EQUATORIAL_EOD_COORD when the device has it, else EQUATORIAL_COORD, else None."""
        for name in (EOD_COORD, J2000_COORD):
            if self._vector(name) is not None:
                return name
        return None

    def connect(self, timeout_s: float = 10.0, notify: Notify = _silent) -> None:
        """CONNECT the device unless it already is; wait for its coordinates to be defined."""
        if self.connected and self.coordinate_property() is not None:
            return
        if self._vector("CONNECTION") is None:
            raise MountFailed(f"device {self.device!r} has neither coordinates nor a "
                              "CONNECTION switch")
        notify(f"Connecting device {self.device} ...")
        serial = self.client.send_new(self.device, "CONNECTION",
                                      {"CONNECT": True, "DISCONNECT": False})

        def failed():
            return "Alert" in self.client.states_since(self.device, "CONNECTION", serial)

        self.client.wait_for(lambda: failed() or (self.connected and self.coordinate_property()),
                             timeout_s, f"device {self.device} to connect")
        if failed():
            raise MountFailed(f"device {self.device} could not connect: {self.last_message()}")
        _settle(self.client)

    def last_message(self) -> str:
        """The device's latest message, for error text."""
        mine = [m for m in self.client.messages() if m.startswith(self.device + ":")]
        return mine[-1].split(":", 1)[1].strip() if mine else "no reason given"

    # -- status and site --------------------------------------------------------------------

    def status(self) -> MountStatus:
        """What the device reports now (reads only)."""
        def number(prop, member):
            v = self._vector(prop)
            value = v.values.get(member) if v is not None else None
            return float(value) if value is not None and np.isfinite(value) else None

        def switch(prop, member):
            v = self._vector(prop)
            return None if v is None or member not in v.values else bool(v.values[member])

        coords = self.coordinate_property()
        ra_h = number(coords, "RA") if coords else None
        target_ra_h = number("TARGET_EOD_COORD", "RA")
        longitude = number("GEOGRAPHIC_COORD", "LONG")
        clock = self._vector("TIME_UTC")
        time_utc = clock.values.get("UTC") if clock is not None else None
        try:
            offset = float(clock.values.get("OFFSET")) if clock is not None else None
        except (TypeError, ValueError):
            offset = None
        return MountStatus(
            device=self.device, address=self.client.address, connected=self.connected,
            coordinate_property=coords, ra_deg=None if ra_h is None else ra_h * 15.0,
            dec_deg=number(coords, "DEC") if coords else None,
            motion_state=self._vector(coords).state if coords else None,
            tracking=switch("TELESCOPE_TRACK_STATE", "TRACK_ON"),
            parked=switch("TELESCOPE_PARK", "PARK"),
            target_ra_deg=None if target_ra_h is None else target_ra_h * 15.0,
            target_dec_deg=number("TARGET_EOD_COORD", "DEC"),
            latitude=number("GEOGRAPHIC_COORD", "LAT"),
            longitude=None if longitude is None else (longitude + 180.0) % 360.0 - 180.0,
            height=number("GEOGRAPHIC_COORD", "ELEV"),
            time_utc=(time_utc.rstrip("Z") + "Z") if time_utc else None, utc_offset_h=offset)

    def push_site(self, site: Site, timeout_s: float = 10.0, notify: Notify = _silent) -> None:
        """Send our site (GEOGRAPHIC_COORD) and clock (TIME_UTC to the millisecond, with the
        site's UTC offset)."""
        for name in ("GEOGRAPHIC_COORD", "TIME_UTC"):
            if self._vector(name) is None:
                raise MountFailed(f"device {self.device} has no {name}; cannot send our site")
        self._set_and_wait("GEOGRAPHIC_COORD",
                           {"LAT": site.latitude, "LONG": site.longitude % 360.0,
                            "ELEV": site.height}, timeout_s)
        now = datetime.now(timezone.utc)
        stamp = now.strftime("%Y-%m-%dT%H:%M:%S.%f")[:-3]  # INDI: ISO 8601 UTC, no zone letter
        self._set_and_wait("TIME_UTC", {"UTC": stamp,
                                        "OFFSET": f"{_utc_offset_hours(site, now):.2f}"},
                           timeout_s)
        notify(f"Sent our site (lat {site.latitude:+.5f}, lon {site.longitude:+.5f}, "
               f"{site.height:.0f} m) and clock ({stamp}Z) to {self.device}.")

    def clock_offset(self) -> tuple[float, float] | None:
        """(device clock minus ours, its uncertainty), seconds, from TIME_UTC; None when the
        device has no readable TIME_UTC.

        The value is the device's clock when it arrived (Vector.received, our clock then); a
        value in whole seconds is taken at the middle of its second, +-0.5 s.
        """
        clock = self._vector("TIME_UTC")
        text = str(clock.values.get("UTC", "")).strip().rstrip("Z") if clock else ""
        try:
            device = datetime.fromisoformat(text).replace(tzinfo=timezone.utc)
        except ValueError:
            return None
        half = 0.0005 if "." in text else 0.5
        return device.timestamp() + half - clock.received, half

    def check_clock(self, name: str, notify: Notify = _silent) -> None:
        """Refuse (InterlockRefused, nothing sent) when the device clock is off by more than
        CLOCK_REFUSE_S; warn beyond CLOCK_WARN_S; say so when it cannot be compared."""
        found = self.clock_offset()
        if found is None:
            notify(f"Caution: cannot compare clocks: {self.device} reports no readable "
                   "TIME_UTC; its coordinates of date depend on its own clock.")
            return
        offset, doubt = found
        off = abs(offset) - doubt  # at least this far apart
        arcsec = off * SIDEREAL_ARCSEC_PER_S
        text = (f"the mount's clock (TIME_UTC) differs from ours by {offset:+.2f} s "
                f"(+-{doubt:g} s), about {max(arcsec, 0.0):.0f} arcsec of hour angle")
        if off > CLOCK_REFUSE_S:
            raise InterlockRefused(name, f"{text}, more than {CLOCK_REFUSE_S:g} s; send our "
                                         "clock first (--push-site, or Send site and clock)")
        if off > CLOCK_WARN_S:
            notify(f"Caution: {text} (over {CLOCK_WARN_S:g} s).")

    def _set_and_wait(self, name: str, values: dict, timeout_s: float) -> None:
        serial = self.client.send_new(self.device, name, values)
        states = self.client.wait_for(
            lambda: [s for s in self.client.states_since(self.device, name, serial)
                     if s in ("Ok", "Alert", "Idle")], timeout_s, f"{self.device} to take {name}")
        if states[-1] == "Alert":
            raise MountFailed(f"device {self.device} refused {name}: {self.last_message()}")

    # -- motion -----------------------------------------------------------------------------

    def abort(self, timeout_s: float = 5.0) -> str | None:
        """Latch the abort, send TELESCOPE_ABORT_MOTION and wait until the coordinates are no
        longer Busy.

        Always allowed, whatever the interlocks say, and sent whenever the socket can be
        written, even when the stream from the server can no longer be read. Returns the
        coordinates' state then; MountFailed when the device answers the abort with Alert;
        ConnectionLost (after sending) when no answer can be read.
        """
        self.latch_abort()
        if self._vector("TELESCOPE_ABORT_MOTION") is None:
            raise MountFailed(f"device {self.device} has no TELESCOPE_ABORT_MOTION")
        with self._motion_lock:
            serial = self.client.send_new(self.device, "TELESCOPE_ABORT_MOTION",
                                          {"ABORT": True}, even_if_lost=True)
        lost = self.client.lost
        if lost is not None:
            raise ConnectionLost(f"ABORT was sent to {self.device}, but {lost}: its answer "
                                 "cannot be read; check that the mount stopped")
        coords = self.coordinate_property()

        def refused():
            return "Alert" in self.client.states_since(self.device, "TELESCOPE_ABORT_MOTION",
                                                       serial)

        def ended():
            state = self._state(coords) if coords else "Ok"
            return refused() or (state != "Busy" and state)

        state = self.client.wait_for(ended, timeout_s, "the motion to stop")
        if refused():
            raise MountFailed(f"device {self.device} refused the abort (Alert): "
                              f"{self.last_message()}; stop the mount at the mount")
        return self._state(coords) if coords else None

    def _switch_to(self, name: str, member: str, timeout_s: float = TAKE_UP_S) -> None:
        """Set switch `member` of property `name` (the others off) and check the answer: the
        device must answer without Alert and show the member On, else MountFailed."""
        vector = self._vector(name)
        serial = self.client.send_new(self.device, name, {m: m == member for m in vector.values})

        def answered():
            states = self.client.states_since(self.device, name, serial)
            return states if states and states[-1] != "Busy" else None

        try:
            states = self.client.wait_for(answered, timeout_s, f"{self.device} to answer {name}")
        except IndiTimeout:
            raise MountFailed(f"device {self.device} did not answer {name} {member} within "
                              f"{timeout_s:g} s") from None
        now = self._vector(name)
        if "Alert" in states or not now.values.get(member):
            shown = ", ".join(m for m, on in now.values.items() if on) or "none"
            raise MountFailed(f"device {self.device} refused {name} {member} (state "
                              f"{states[-1]}, on: {shown}): {self.last_message()}")

    def command(self, pointing: Pointing, sync: bool = False,
                token: int | None = None) -> _Command | None:
        """Send ON_COORD_SET (TRACK, or SLEW without it; SYNC), check the device took it, then
        send the target's coordinates.

        The caller has checked the interlocks; this refuses a parked mount and a refused mode.
        token (from begin_command): when an abort was recorded since, nothing is sent and None
        is returned; the check and the sending of the coordinates are one step.
        """
        coords = self.coordinate_property()
        if coords is None:
            raise MountFailed(f"device {self.device} has no {EOD_COORD} or {J2000_COORD}")
        park = self._vector("TELESCOPE_PARK")
        if park is not None and park.values.get("PARK"):
            raise MountFailed(f"the mount {self.device} is parked; unpark it first")
        on_set = self._vector("ON_COORD_SET")
        if on_set is None:
            raise MountFailed(f"device {self.device} has no ON_COORD_SET")
        mode = "SYNC" if sync else ("TRACK" if "TRACK" in on_set.values else "SLEW")
        if mode not in on_set.values:
            raise MountFailed(f"device {self.device} cannot {mode.lower()}")
        if token is not None and self.aborted_since(token):
            return None
        # The mode decides what the coordinates do: never send them unless it was taken.
        self._switch_to("ON_COORD_SET", mode)
        ra_deg, dec_deg = command_place(pointing, coords)
        with self._motion_lock:
            if token is not None and self.aborted_since(token):
                return None
            if not sync:
                self.motions += 1  # counted first: a lost connection may still have sent it
            serial = self.client.send_new(self.device, coords,
                                          {"RA": ra_deg / 15.0, "DEC": dec_deg})
        return _Command(coords, ra_deg, dec_deg, serial, sync)

    def pier_west(self) -> bool:
        """True when the device reports TELESCOPE_PIER_SIDE PIER_WEST."""
        return self.reported_pier_side() == "PIER_WEST"

    def reported_pier_side(self) -> str:
        """The device's TELESCOPE_PIER_SIDE switch that is on (PIER_EAST or PIER_WEST); ""
        when it has none or reports neither."""
        side = self._vector(PIER_SIDE)
        if side is None:
            return ""
        return next((name for name in ("PIER_EAST", "PIER_WEST") if side.values.get(name)), "")

    def offers_track_rate(self) -> bool:
        """Whether the device has INDI's custom tracking rate (TELESCOPE_TRACK_RATE with
        TRACK_RATE_RA and TRACK_RATE_DE, and TELESCOPE_TRACK_MODE with TRACK_CUSTOM)."""
        rate, mode = self._vector(TRACK_RATE), self._vector(TRACK_MODE)
        return (rate is not None and {"TRACK_RATE_RA", "TRACK_RATE_DE"} <= set(rate.values)
                and mode is not None and "TRACK_CUSTOM" in mode.values)

    def set_track_rate(self, ra_axis_arcsec_s: float, de_axis_arcsec_s: float,
                       token: int | None = None, timeout_s: float = TAKE_UP_S) -> bool:
        """Set TELESCOPE_TRACK_RATE (axis rates, arcsec/s) and TELESCOPE_TRACK_MODE
        TRACK_CUSTOM, each answer checked (MountFailed on Alert or no answer). False, and
        nothing sent, when an abort was recorded since token."""
        with self._motion_lock:
            if token is not None and self.aborted_since(token):
                return False
        # Devices refuse to reverse an axis's rate while tracking (INDI's telescope base
        # class: "Cannot reverse tracking while tracking is engaged"), and take a rate set
        # while tracking is off only once tracking mode is switched again; so a reversing
        # axis goes through 0 first, tracking kept on (measured on the INDI simulator).
        rates = {"TRACK_RATE_RA": ra_axis_arcsec_s, "TRACK_RATE_DE": de_axis_arcsec_s}
        before = self._vector(TRACK_RATE).values
        through_zero = {k: 0.0 if np.sign(float(before.get(k, 0.0) or 0.0)) * np.sign(v) < 0
                        else v for k, v in rates.items()}
        steps = ([through_zero] if through_zero != rates else []) + [rates]
        for values in steps:
            try:
                self._set_and_wait(TRACK_RATE, values, timeout_s)
            except IndiTimeout:
                raise MountFailed(f"device {self.device} did not answer {TRACK_RATE} within "
                                  f"{timeout_s:g} s: {self.last_message()}") from None
        if not self._vector(TRACK_MODE).values.get("TRACK_CUSTOM"):
            self._switch_to(TRACK_MODE, "TRACK_CUSTOM", timeout_s)
        return True

    def stop_tracking(self) -> None:
        """TELESCOPE_TRACK_STATE to TRACK_OFF, checked; without it (or refused), an abort."""
        if self._vector("TELESCOPE_TRACK_STATE") is not None:
            try:
                self._switch_to("TELESCOPE_TRACK_STATE", "TRACK_OFF")
                return
            except MountFailed:
                pass
        self.abort()

    def _offset_arcsec(self, command: _Command) -> float:
        v = self._vector(command.coordinate_property)
        return angular_distance_arcsec(v.values["RA"] * 15.0, v.values["DEC"],
                                       command.ra_deg, command.dec_deg)

    def wait_for_answer(self, command: _Command, timeout_s: float = TAKE_UP_S) -> str:
        """The device's first answer to the coordinates (Busy, Ok, Idle or Alert)."""
        log = lambda: self.client.states_since(self.device, command.coordinate_property,  # noqa: E731
                                               command.serial)
        try:
            return self.client.wait_for(log, timeout_s, f"{self.device} to answer")[-1]
        except IndiTimeout:
            raise MountFailed(f"device {self.device} did not answer the coordinates within "
                              f"{timeout_s:g} s") from None

    def wait_until_ended(self, command: _Command, timeout_s: float) -> str:
        """Follow the coordinates' state until the command ended: Ok, Idle (stopped) or Alert.

        A slew must show Busy (or Alert) within TAKE_UP_S, unless the mount reports Ok at the
        target already; a sync ends with the first answer at the target.
        """
        device, prop = self.device, command.coordinate_property
        deadline = time.monotonic() + timeout_s
        log = lambda: self.client.states_since(device, prop, command.serial)  # noqa: E731
        if command.sync:
            def answered():
                if "Alert" in log():
                    return "Alert"
                state = self._state(prop)
                at_target = self._offset_arcsec(command) < ARRIVED_ARCSEC
                return log() and state != "Busy" and at_target and state
            return self.client.wait_for(answered, timeout_s, f"{device} to sync")
        try:
            self.client.wait_for(lambda: {"Busy", "Alert"} & set(log()),
                                 min(TAKE_UP_S, timeout_s), f"{device} to start the slew")
        except IndiTimeout:
            if self._state(prop) == "Ok" and self._offset_arcsec(command) < ARRIVED_ARCSEC:
                return "Ok"
            raise MountFailed(f"device {device} did not start the slew within "
                              f"{min(TAKE_UP_S, timeout_s):g} s") from None
        if "Alert" in log():
            return "Alert"
        remaining = max(0.0, deadline - time.monotonic())
        try:
            return self.client.wait_for(lambda: self._state(prop) != "Busy" and self._state(prop),
                                        remaining, f"{device} to end the slew")
        except IndiTimeout:
            raise IndiTimeout(f"the slew of {device} did not end within {timeout_s:g} s") from None


def _utc_offset_hours(site: Site, instant: datetime) -> float:
    try:
        zone = ZoneInfo(site.timezone)
    except (ZoneInfoNotFoundError, ValueError):
        return 0.0
    return instant.astimezone(zone).utcoffset().total_seconds() / 3600.0


def command_place(pointing: Pointing, prop: str) -> tuple[float, float]:
    """(RA, Dec) in degrees that a command through coordinate property `prop` sends: the
    model-corrected place when the pointing has one (mount.pointing), else the sky place."""
    if pointing.command_eod_deg is not None:
        return pointing.command_eod_deg if prop == EOD_COORD else pointing.command_j2000_deg
    return sky_place(pointing, prop)


def sky_place(pointing: Pointing, prop: str) -> tuple[float, float]:
    """(RA, Dec) in degrees of the target's own place in the frame of property `prop`."""
    if prop == EOD_COORD:
        return pointing.ra_apparent_deg, pointing.dec_apparent_deg
    return pointing.ra_j2000_deg, pointing.dec_j2000_deg


def _place_text(prop: str, ra_deg: float, dec_deg: float) -> str:
    from ..io import format_dec_dms, format_ra_hms

    return (f"RA {format_ra_hms(ra_deg, 2)} Dec {format_dec_dms(dec_deg, 1)} "
            f"({FRAME_TEXT[prop]}) via {prop}")


def checked_pointing(targets: Targets, site: Site, name: str, when="now",
                     model=None, notify: Notify = _silent, pier_side: str = "") -> Pointing:
    """The target's place now (with a pointing model, also its commanded axes; a German
    model's on pier_side when given), or InterlockRefused with the reason (nothing is sent).
    The Sun, allowed only with the solar option on, comes with SOLAR_CAUTION every time."""
    pointing = pointing_for(targets, site, name, when, model=model, pier_side=pier_side)
    if not pointing.allowed:
        raise InterlockRefused(name, pointing.refusal)
    if pointing.is_sun:
        notify(SOLAR_CAUTION)
    return pointing


def slew_seconds_from_mount(scope: Telescope, pointing: Pointing, site: Site) -> float:
    """The slew's estimated duration (s) from where the mount reports it points to the
    pointing, with the site's slew rate and settle time (core.track.slew_end_seconds). The
    mount's hour angle is the pointing's shifted by their right-ascension difference (good to
    refraction, under a degree: ample for a time). Unknown position: a half-turn slew."""
    status = scope.status()
    mount = site.interlocks.mount
    if status.ra_deg is None or status.dec_deg is None:
        return mount.settle + 180.0 / mount.slew_rate
    ra_now = status.ra_deg
    if status.coordinate_property == J2000_COORD:  # onto the equator of date, near enough
        ra_now += pointing.ra_apparent_deg - pointing.ra_j2000_deg
    ha_mount = pointing.ha_deg + (pointing.ra_apparent_deg - ra_now)
    ha_mount = (ha_mount + 180.0) % 360.0 - 180.0
    return slew_end_seconds(ha_mount, status.dec_deg, pointing.ha_deg,
                            pointing.dec_observed_deg, mount, site.latitude)


def checked_track(scope: Telescope, targets: Targets, site: Site, name: str,
                  track_s: float, notify: Notify = _silent, model=None) -> Pointing:
    """The target's place now, refused (InterlockRefused, nothing sent) when the interlocks
    forbid it now, at the estimated end of the slew, or at any instant of the track for
    track_s seconds after it (core.track.track_refusal: the same observed place and limits
    as the instant check, sampled every second). With a pointing model, the track of the
    commanded axes' place of date is judged as well."""
    pointing = checked_pointing(targets, site, name, model=model, notify=notify)
    slew_s = slew_seconds_from_mount(scope, pointing, site)
    side = side_at_slew_end(pointing, site, slew_s)
    if model is not None and model.german and side != pointing.pier_side:
        # A German model corrects on the side the mount will be on when the slew ends.
        pointing = checked_pointing(targets, site, name, pointing.time, model=model,
                                    pier_side=side)
    ctx = make_context(pointing.time, site)
    motion = None
    if pointing.is_body:
        # The body moves: its place along the track, and the place to send at the slew's end.
        motion = body_motion(pointing.source, site, ctx.time, slew_s + track_s)
    at_s, why = track_refusal(pointing.ra_apparent_deg, pointing.dec_apparent_deg, site, ctx,
                              0.0, slew_s + track_s, motion=motion)
    if at_s is None and pointing.command_eod_deg is not None:
        at_s, why = track_refusal(*pointing.command_eod_deg, site, ctx, 0.0, slew_s + track_s,
                                  motion=motion)
        why = None if why is None else f"commanded axes {why}"
    elif pointing.command_eod_deg is not None:
        why = f"sky place {why}"
    if at_s is not None and at_s <= slew_s:
        raise InterlockRefused(name, f"{why} by the end of the slew (estimated {slew_s:.0f} s "
                                     "from the mount's slew rate)")
    if at_s is not None:
        raise InterlockRefused(name, f"{why} {(at_s - slew_s) / 60.0:.1f} min into the "
                                     f"{track_s / 60.0:g} min track after the slew")
    pier_line = checked_pier_side(scope, pointing, site, name, slew_s, track_s)
    notify(f"Interlocks: {name} allowed now, at the end of the slew (about {slew_s:.0f} s) "
           f"and for {track_s / 60.0:g} min of tracking after it"
           + (", along its own motion." if motion is not None else "."))
    if pier_line:
        notify(pier_line)
    if pointing.is_body:
        pointing = place_at_slew_end(scope, targets, site, name, ctx.time, model, notify,
                                     pier_side=side)
    return replace(pointing, pier_side=side) if side else pointing


def _ha_at_slew_end(pointing: Pointing, slew_s: float) -> float:
    """The hour angle (deg) the mount turns to: the target's observed one (with a model, the
    commanded axes': what the controller turns) when the slew ends, the sky having turned at
    the sidereal rate meanwhile."""
    ha_now = pointing.ha_deg if pointing.axes_deg is None else pointing.axes_deg[0]
    return ha_now + SIDEREAL_DEG_PER_S * slew_s


def side_at_slew_end(pointing: Pointing, site: Site, slew_s: float) -> str:
    """The pier side a German mount takes for this slew ("" for other mounts)."""
    if site.interlocks.mount.mount_type != "german":
        return ""
    return str(pier_side_for(_ha_at_slew_end(pointing, slew_s)))


def checked_pier_side(scope: Telescope, pointing: Pointing, site: Site, name: str,
                      slew_s: float, track_s: float) -> str:
    """A German mount: a line on the pier side it takes at the slew's estimated end
    (side_at_slew_end) beside what the device reports now; InterlockRefused, nothing sent,
    when tracking track_s seconds after the slew would pass that side's meridian limit
    (core.limits.pier_flip_check). "" for other mounts."""
    mount = site.interlocks.mount
    if mount.mount_type != "german":
        return ""
    ha_end = _ha_at_slew_end(pointing, slew_s)
    check = pier_flip_check(ha_end, track_s, mount.meridian_limit)
    side, limit_s = str(check.side[()]), float(check.limit_s)
    where = f"hour angle {(ha_end + 180.0) % 360.0 - 180.0:+.2f} deg at the slew's end"
    if check.flip:
        raise InterlockRefused(name, f"would cross the meridian limit ({mount.meridian_limit:g} "
                                     f"deg past the meridian) on the {side} pier side "
                                     f"{limit_s / 60.0:.1f} min into the {track_s / 60.0:g} min "
                                     f"track: flip needed ({where}, the slew estimated at "
                                     f"{slew_s:.0f} s)")
    ahead = (f"the meridian limit comes {limit_s / 60.0:.1f} min after the slew, beyond the "
             f"{track_s / 60.0:g} min track" if side == "east" else
             "no meridian flip ahead on this side while it tracks")
    device = scope.reported_pier_side()
    return (f"Pier side: {side_words(side)}, {where}; {ahead}"
            + (f"; the device reports {device} now, before the slew" if device else "") + ".")


def side_words(side: str) -> str:
    """Our pier side with INDI's name for it, e.g. "east (INDI PIER_WEST: the tube west of
    the pier, pointing east)"."""
    tube = "west" if side == "east" else "east"
    return f"{side} (INDI {INDI_PIER_SIDE[side]}: the tube {tube} of the pier, pointing {side})"


def pier_side_comparison(ours: str, device: str) -> str:
    """Our pier side beside the device's TELESCOPE_PIER_SIDE, in one sentence; "" when
    neither is known."""
    if not ours:
        return (f"The device reports {device} (the site's mount is not German equatorial: no "
                "pier-side check).") if device else ""
    if not device:
        return f"Pier side: ours {side_words(ours)}; the device reports none."
    if SIDE_OF_INDI.get(device) == ours:
        return f"Pier side: ours {side_words(ours)}; the device reports {device}, the same side."
    return (f"Caution: the device reports {device}, not our {ours} side ({INDI_PIER_SIDE[ours]}) "
            "that the meridian-limit check assumed: watch the mount for a flip.")


def place_at_slew_end(scope: Telescope, targets: Targets, site: Site, name: str, start,
                      model=None, notify: Notify = _silent, pier_side: str = "") -> Pointing:
    """A body's place at the estimated end of a slew begun at `start`: the slew time to its
    place at start, the place at start + that time, the slew time to that place, and the
    place then (one iteration; the body moves under 1 arcsec/s, the mount degrees/s); a
    German model's on pier_side when given."""
    t0 = parse_time(start)
    later = pointing_for(targets, site, name, t0, model=model, pier_side=pier_side)
    for _ in range(2):
        slew_s = slew_seconds_from_mount(scope, later, site)
        later = pointing_for(targets, site, name, t0 + TimeDelta(slew_s, format="sec"),
                             model=model, pier_side=pier_side)
    if not later.allowed:
        raise InterlockRefused(name, f"{later.refusal} at the end of the slew ({later.time})")
    notify(f"{name} moves ({later.rate_ra_arcsec_s:+.4f}, {later.rate_dec_arcsec_s:+.4f} "
           f"arcsec/s in RA cos Dec and Dec): sending its place at the slew's estimated end, "
           f"{later.time} ({slew_s:.0f} s from now).")
    return later


def slew_to_target(scope: Telescope, targets: Targets, site: Site, name: str, *,
                   sync: bool = False, wait: bool = False, timeout_s: float = 120.0,
                   tolerance_arcsec: float = 2.0, track_s: float = DEFAULT_TRACK_S,
                   token: int | None = None, notify: Notify = _silent,
                   model=None) -> SlewReport:
    """Point the mount at target `name`: interlocks and clocks first, then slew (TRACK) or sync.

    The interlocks are checked now, at the estimated end of the slew and over track_s seconds
    of tracking after it (a sync: now only); the device's clock must agree with ours
    (Telescope.check_clock). With wait, follow the motion until it ends; when the reported
    coordinates differ from the target's place by more than tolerance_arcsec, issue one
    refining slew (all checks again) and report the residual. token: from
    scope.begin_command() when the user pressed the button (taken here otherwise); an abort
    recorded after it stops everything, quietly: nothing more is sent, `aborted` set. Raises
    ValueError for a timeout or tolerance out of range and InterlockRefused, both before
    anything is sent; ConnectionLost, IndiTimeout or MountFailed (Alert, a refused mode,
    parked, no such property). Any failure after the motion was sent first sends an abort
    and says in its message that the mount may still be moving. model: a pointing model
    (core.pointing_model.PointingModel); the commanded coordinates are then those of the
    axes it says see the target, and the interlocks judge both places (mount.pointing).
    """
    # Every option is checked before anything is sent.
    timeout_s = checked_wait(timeout_s)
    tolerance_arcsec = checked_residual(tolerance_arcsec)
    track_s = checked_track_seconds(track_s)
    token = scope.begin_command() if token is None else token
    motions_before = scope.motions
    pointing = _checked(scope, targets, site, name, sync, track_s, notify, model)
    if not sync:  # a sync only tells the mount where it points: nothing moves
        notify(CAUTION)
    try:
        return _point(scope, targets, site, name, pointing, sync=sync, wait=wait,
                      timeout_s=timeout_s, tolerance_arcsec=tolerance_arcsec, track_s=track_s,
                      notify=notify, token=token, model=model)
    except Exception as err:
        if scope.motions == motions_before:
            raise  # nothing that moves the mount was sent
        raise _failed_in_motion(scope, err, notify) from None


def _checked(scope: Telescope, targets: Targets, site: Site, name: str, sync: bool,
             track_s: float, notify: Notify, model=None) -> Pointing:
    """The interlocks (a slew: now, at its end and along the track; a sync: now) and the
    clocks, before anything is sent."""
    if sync:
        pointing = checked_pointing(targets, site, name, model=model, notify=notify)
    else:
        pointing = checked_track(scope, targets, site, name, track_s, notify, model=model)
    scope.check_clock(name, notify)
    return pointing


def _failed_in_motion(scope: Telescope, err: Exception, notify: Notify) -> MountError:
    """The error of a slew that failed after its motion was sent: an abort is sent first
    (while the socket can be written) and the message says the mount may still be moving."""
    text = " ".join(str(err).split()) or type(err).__name__
    try:
        notify("The slew failed: sending an abort.")
        scope.abort()
        said = "abort sent, but the mount may still be moving: check it"
    except ConnectionLost as abort_err:
        said = (f"{' '.join(str(abort_err).split())}; the mount may still be moving, stop it "
                "at the mount")
    except Exception as abort_err:  # noqa: BLE001 - reported in the message
        said = (f"the abort failed too ({' '.join(str(abort_err).split())}): the mount may "
                "still be moving, stop it at the mount")
    if isinstance(err, ConnectionLost):
        return ConnectionLost(f"{text}; {said}")
    kind = type(err) if isinstance(err, MountFailed) else MountFailed
    return kind(f"{text}; {said}")


def _point(scope: Telescope, targets: Targets, site: Site, name: str, pointing: Pointing, *,
           sync: bool, wait: bool, timeout_s: float, tolerance_arcsec: float, track_s: float,
           notify: Notify, token: int, model=None) -> SlewReport:
    """Send the command, then (with wait) follow it and refine once: see slew_to_target."""
    action = "sync" if sync else "slew"
    stopped = lambda: scope.aborted_since(token)  # noqa: E731
    prop = scope.coordinate_property() or EOD_COORD
    ra_deg, dec_deg = command_place(pointing, prop)
    report = dict(target=name, action=action, coordinate_property=prop,
                  final_state=None, reported_ra_deg=None, reported_dec_deg=None,
                  first_residual_arcsec=None, residual_arcsec=None, refined=False,
                  tolerance_arcsec=tolerance_arcsec)
    command = scope.command(pointing, sync=sync, token=token)
    if command is None:
        notify(f"The {action} of {name} was stopped by an abort before anything moved.")
        return SlewReport(commanded_ra_deg=ra_deg, commanded_dec_deg=dec_deg,
                          pointing=pointing, aborted=True, **report)
    started = time.monotonic()
    if pointing.is_body and not sync and not wait:
        # Not following the slew: the rate is set now, for the device to track at after it
        # (some devices, the INDI simulator among them, take it only once tracking).
        follow, reslew_s = follow_body(scope, pointing, tolerance_arcsec, token, notify,
                                       pole_sign_for(site.latitude) < 0.0)
        report.update(follow=follow, reslew_s=reslew_s)
    if pointing.command_eod_deg is not None:
        notify(f"Sky place of {name}: "
               f"{_place_text(command.coordinate_property, *sky_place(pointing, prop))}; "
               f"with the pointing model its axes go to HA {pointing.axes_deg[0]:.4f} Dec "
               f"{pointing.axes_deg[1]:.4f} deg, commanded as below.")
    notify(f"{action.capitalize()} {name}: "
           f"{_place_text(command.coordinate_property, command.ra_deg, command.dec_deg)}"
           + (" (commanded, pointing model)" if pointing.command_eod_deg is not None else "")
           + f"; alt {pointing.alt_deg:.2f} az {pointing.az_deg:.2f} deg at {pointing.time}")
    if not wait:
        state = scope.wait_for_answer(command)
        if state == "Alert":
            raise MountFailed(f"the {action} was refused (Alert): {scope.last_message()}")
        report["final_state"] = None if state == "Busy" else state
        return SlewReport(commanded_ra_deg=command.ra_deg, commanded_dec_deg=command.dec_deg,
                          pointing=pointing, **report)

    state = _follow(scope, command, timeout_s, action, started, notify, stopped)
    residual = _residual(scope, command, targets, site, name, model, pointing.pier_side)
    report.update(first_residual_arcsec=residual, residual_arcsec=residual, final_state=state,
                  aborted=stopped())
    # Refine only a slew that ended normally: never move again after an abort.
    if not sync and state == "Ok" and not stopped() and residual > tolerance_arcsec:
        notify(f"Ended {residual:.2f} arcsec from the target (tolerance "
               f"{tolerance_arcsec:g}): one refining slew.")
        pointing = _checked(scope, targets, site, name, False, track_s, notify, model)
        refine = scope.command(pointing, sync=False, token=token)
        if refine is None:
            notify("The refining slew was stopped by an abort before anything moved.")
            report.update(aborted=True)
        else:
            command = refine
            state = _follow(scope, command, timeout_s, "refining slew", time.monotonic(),
                            notify, stopped)
            residual = _residual(scope, command, targets, site, name, model,
                                 pointing.pier_side)
            report.update(residual_arcsec=residual, final_state=state, refined=True,
                          aborted=stopped())
    if pointing.is_body and not sync and state == "Ok" and not stopped():
        # The slew ended with the mount tracking: now its rate is the body's.
        follow, reslew_s = follow_body(scope, pointing, tolerance_arcsec, token, notify,
                                       pole_sign_for(site.latitude) < 0.0)
        report.update(follow=follow, reslew_s=reslew_s)
    v = scope.client.vector(scope.device, command.coordinate_property)
    report.update(reported_ra_deg=v.values["RA"] * 15.0, reported_dec_deg=v.values["DEC"])
    if not sync:
        report.update(device_pier_side=scope.reported_pier_side())
        said = pier_side_comparison(pointing.pier_side, report["device_pier_side"])
        if said:
            notify(said)
    return SlewReport(commanded_ra_deg=command.ra_deg, commanded_dec_deg=command.dec_deg,
                      pointing=pointing, **report)


def reslew_cadence(rate_arcsec_s: float, tolerance_arcsec: float) -> float:
    """Seconds between re-slews keeping a body drifting at rate_arcsec_s within
    +-tolerance_arcsec of the mount when each aims half an interval ahead: 2 * tolerance /
    rate, bounded to [RESLEW_MIN_S, RESLEW_MAX_S]."""
    if rate_arcsec_s <= 0.0:
        return RESLEW_MAX_S
    return float(np.clip(2.0 * tolerance_arcsec / rate_arcsec_s, RESLEW_MIN_S, RESLEW_MAX_S))


def track_rates(pointing: Pointing, pier_west: bool = False,
                southern: bool = False) -> tuple[float, float]:
    """INDI TELESCOPE_TRACK_RATE values (TRACK_RATE_RA, TRACK_RATE_DE; axis rates, arcsec
    per SI second) that follow a body: the sidereal rate less its right-ascension rate,
    and its declination rate, negated with the device reporting PIER_WEST and negated with
    the site south of the equator (the declination axis turns the other way in each case;
    see the module docstring)."""
    cos_dec = np.cos(pointing.dec_apparent_deg * DEG_TO_RAD)
    de_axis = -pointing.rate_dec_arcsec_s if pier_west != southern \
        else pointing.rate_dec_arcsec_s
    return INDI_SIDEREAL_ARCSEC_S - pointing.rate_ra_arcsec_s / max(cos_dec, 1e-6), de_axis


def follow_body(scope: Telescope, pointing: Pointing, tolerance_arcsec: float,
                token: int | None, notify: Notify = _silent,
                southern: bool = False) -> tuple[str, float | None]:
    """Make the mount follow a body after its slew: its own tracking rate when the device
    offers one ("track rate"), else re-slews at a cadence ("re-slew", the cadence in s).
    `southern`: the site is south of the equator (the declination rate's sign)."""
    drift = float(np.hypot(pointing.rate_ra_arcsec_s, pointing.rate_dec_arcsec_s))
    if scope.offers_track_rate():
        ra_axis, de_axis = track_rates(pointing, scope.pier_west(), southern)
        try:
            if not scope.set_track_rate(ra_axis, de_axis, token):
                return "", None
            notify(f"Tracking {pointing.name} at its own rate: {TRACK_RATE} RA {ra_axis:.6f}, "
                   f"DE {de_axis:+.6f} arcsec/s (axis rates; sidereal "
                   f"{INDI_SIDEREAL_ARCSEC_S:.6f}), {TRACK_MODE} TRACK_CUSTOM.")
            return "track rate", None
        except MountFailed as err:
            notify(f"The device refused the custom tracking rate ({err}); re-slewing instead.")
    cadence = reslew_cadence(drift, tolerance_arcsec)
    worst = drift * cadence / 2.0
    notify(f"{scope.device} offers no custom tracking rate ({TRACK_RATE} with TRACK_CUSTOM): "
           f"it tracks sidereally and {pointing.name} drifts {drift:.4f} arcsec/s; while "
           f"watched, it is re-slewed every {cadence:.0f} s, each aimed half an interval "
           f"ahead, keeping within about {worst:.1f} arcsec"
           + (f" (more than the {tolerance_arcsec:g} arcsec tolerance: re-slews are not made "
              f"more often than every {RESLEW_MIN_S:g} s)" if worst > tolerance_arcsec * 1.001
              else "") + ".")
    return "re-slew", cadence


def _follow(scope: Telescope, command: _Command, timeout_s: float, what: str, started: float,
            notify: Notify, stopped: Callable[[], bool]) -> str:
    state = scope.wait_until_ended(command, timeout_s)
    elapsed = time.monotonic() - started
    if stopped():
        notify(f"The {what} was stopped by an abort after {elapsed:.1f} s ({state}).")
    elif state == "Alert":
        raise MountFailed(f"the {what} failed (Alert): {scope.last_message()}")
    else:
        notify(f"The {what} ended ({state}) after {elapsed:.1f} s.")
    return state


def _residual(scope: Telescope, command: _Command, targets: Targets, site: Site,
              name: str, model=None, pier_side: str = "") -> float:
    """Reported coordinates against the place commanded now (the target's, or with a model
    its axes', a German model's on the slew's pier side), in the command's frame (arcsec)."""
    now = pointing_for(targets, site, name, model=model, pier_side=pier_side)
    v = scope.client.vector(scope.device, command.coordinate_property)
    ra_deg, dec_deg = command_place(now, command.coordinate_property)
    return angular_distance_arcsec(v.values["RA"] * 15.0, v.values["DEC"], ra_deg, dec_deg)
