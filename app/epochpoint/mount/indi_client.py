"""A small client of the INDI protocol (Instrument Neutral Distributed Interface) over TCP.

Protocol: INDI version 1.7 as specified by E. C. Downey, "INDI: Instrument-Neutral
Distributed Interface" (Clear Sky Institute white paper, 2007); element and attribute names
are that document's. The server sends a stream of XML elements with no enclosing root:
def*Vector (a property, its members and their values), set*Vector (new values and state),
delProperty and message. A client asks with getProperties and commands with new*Vector.
Every property carries a state: Idle, Ok, Busy (a command is in progress) or Alert (failed).

One reader thread parses the stream and keeps the latest copy of every property. Callers in
any thread read immutable snapshots and wait, always with a deadline, for a condition on
them. A closed or broken connection wakes every waiter with ConnectionLost; the client never
reconnects by itself (a reconnecting client could resume motion nobody is watching).

Why not a package: indipyclient (PyPI, pure Python, maintained) is an asyncio client that
reconnects every few seconds on its own and clears its property tree when it does; a GUI
worker thread needs a blocking API whose lost connection stays lost, so this ~300-line
client of the open protocol is simpler to trust than a wrapper around that loop.
"""
from __future__ import annotations

import codecs
import collections
import itertools
import logging
import math
import re
import select
import socket
import threading
import time
import xml.etree.ElementTree as ET
from dataclasses import dataclass, replace
from datetime import datetime, timezone
from types import MappingProxyType
from typing import Callable, Mapping

from .errors import ConnectionLost, IndiTimeout, MountError

LOG = logging.getLogger(__name__)
PROTOCOL_VERSION = "1.7"
DEFAULT_PORT = 7624
KINDS = ("Number", "Switch", "Text", "Light", "BLOB")
STATES = ("Idle", "Ok", "Busy", "Alert")
# How often the reader thread looks up from the socket to see whether it should stop.
_POLL_S = 0.2
_RECV_BYTES = 65536
_MESSAGES_KEPT = 100
# The longest single condition wait; wait_for loops until its deadline.
WAIT_SLICE_S = 60.0
# States remembered per property, so a waiter never misses a short Busy between two wake-ups.
_STATES_KEPT = 64
_SEXAGESIMAL = re.compile(r"^\s*([+-]?)\s*(\d+(?:\.\d*)?)(?:[:;\s]+(\d+(?:\.\d*)?))?"
                          r"(?:[:;\s]+(\d+(?:\.\d*)?))?\s*$")


@dataclass(frozen=True)
class Vector:
    """The latest state of one INDI property (a "vector" of members).

    values: member name -> float (Number), bool (Switch, True for On), str (Text, Light).
    serial: a client-wide counter stamped on every def/set received for this property, so a
    waiter can tell a fresh update from one it has already seen.
    received: our clock (Unix seconds, UTC) when these values first arrived; an update that
    repeats the same values keeps it (a device clock read once stays dated by its arrival).
    """

    device: str
    name: str
    kind: str
    state: str
    values: Mapping[str, object]
    perm: str = "ro"
    rule: str = ""
    timeout_s: float = 0.0
    timestamp: str = ""
    label: str = ""
    serial: int = 0
    received: float = 0.0


def parse_number(text: str) -> float:
    """An INDI number: decimal, or sexagesimal "D:M:S" / "D M S" / "D;M" (INDI 1.7, sec. 4).

    Returns NaN for text that is neither, so one garbled value never stops the reader.
    """
    text = (text or "").strip()
    try:
        return float(text)
    except ValueError:
        pass
    match = _SEXAGESIMAL.match(text)
    if not match:
        return math.nan
    sign, whole, minutes, seconds = match.groups()
    value = float(whole) + float(minutes or 0.0) / 60.0 + float(seconds or 0.0) / 3600.0
    return -value if sign == "-" else value


def parse_address(text: str) -> tuple[str, int]:
    """(host, port) from "HOST:PORT", "HOST" (port 7624) or "[IPv6]:PORT"."""
    text = str(text).strip()
    match = re.fullmatch(r"\[([^\]]+)\](?::(\d+))?|([^:\[\]]+)(?::(\d+))?", text)
    if not match:
        raise ValueError(f"INDI address {text!r} is not HOST:PORT (e.g. localhost:7624)")
    host = match.group(1) or match.group(3)
    port = int(match.group(2) or match.group(4) or DEFAULT_PORT)
    if not 0 < port < 65536:
        raise ValueError(f"INDI address {text!r}: port {port} is not in 1..65535")
    return host, port


def _member_value(kind: str, text: str | None):
    text = (text or "").strip()
    if kind == "Number":
        return parse_number(text)
    if kind == "Switch":
        return text == "On"
    if kind == "BLOB":
        return ""  # never enabled by this client; kept as a placeholder
    return text


def _format_value(kind: str, value) -> str:
    if kind == "Number":
        return repr(float(value))  # shortest text that reads back to the same double
    if kind == "Switch":
        return "On" if value else "Off"
    return str(value)


class IndiClient:
    """A connection to one INDI server. Thread-safe; use as a context manager.

    >>> with IndiClient("localhost", 7624) as client:          # doctest: +SKIP
    ...     client.wait_for(lambda: client.devices(), 5.0, "a device")
    """

    def __init__(self, host: str, port: int = DEFAULT_PORT, *, connect_timeout_s: float = 5.0,
                 send_timeout_s: float = 5.0):
        self.host, self.port = host, int(port)
        self.connect_timeout_s, self.send_timeout_s = connect_timeout_s, send_timeout_s
        self._cond = threading.Condition(threading.RLock())
        self._send_lock = threading.Lock()
        self._vectors: dict[tuple[str, str], Vector] = {}
        self._states: dict[tuple[str, str], collections.deque] = {}
        self._messages: list[str] = []
        self._sent: list[tuple[str, str, str]] = []
        self._serial = itertools.count(1)
        self._last_serial = 0
        self._last_definition = 0
        self._sock: socket.socket | None = None
        self._reader: threading.Thread | None = None
        self._lost: str | None = None
        self._closing = False

    @property
    def address(self) -> str:
        return f"{self.host}:{self.port}"

    # -- connection -------------------------------------------------------------------------

    def open(self) -> "IndiClient":
        """Connect and ask for every property (getProperties)."""
        try:
            self._sock = socket.create_connection((self.host, self.port),
                                                  timeout=self.connect_timeout_s)
        except OSError as err:
            raise ConnectionLost(f"cannot reach the INDI server at {self.address} "
                                 f"({err.strerror or err})") from None
        self._sock.settimeout(self.send_timeout_s)
        # Ask first: what the server answers waits in the socket for the reader.
        try:
            self.ask_properties()
        except ConnectionLost:
            self._sock.close()
            raise
        self._reader = threading.Thread(target=self._read_loop, name=f"indi-{self.address}",
                                        daemon=True)
        self._reader.start()
        return self

    def close(self) -> None:
        """Close the connection; waiters wake with ConnectionLost. Safe to call twice."""
        with self._cond:
            self._closing = True
            if self._lost is None:
                self._lost = "the connection was closed by this client"
            self._cond.notify_all()
        if self._sock is not None:
            try:
                self._sock.shutdown(socket.SHUT_RDWR)
            except OSError:
                pass
            self._sock.close()
        if self._reader is not None and self._reader is not threading.current_thread():
            self._reader.join(timeout=2.0)

    def __enter__(self) -> "IndiClient":
        return self.open()

    def __exit__(self, *exc) -> None:
        self.close()

    @property
    def lost(self) -> str | None:
        """Why the connection ended (None while it is up)."""
        with self._cond:
            return self._lost

    # -- reading ----------------------------------------------------------------------------

    def devices(self) -> list[str]:
        """Names of the devices that have defined at least one property, in order seen."""
        with self._cond:
            return list(dict.fromkeys(device for device, _ in self._vectors))

    def vector(self, device: str, name: str) -> Vector | None:
        """The latest copy of a property, or None when it is not defined."""
        with self._cond:
            return self._vectors.get((device, name))

    def vectors(self, device: str) -> dict[str, Vector]:
        """Every property of a device, name -> latest copy."""
        with self._cond:
            return {name: v for (dev, name), v in self._vectors.items() if dev == device}

    def states_since(self, device: str, name: str, serial: int) -> list[str]:
        """The states a property was reported in after update `serial`, oldest first."""
        with self._cond:
            log = self._states.get((device, name), ())
            return [state for stamp, state in log if stamp > serial]

    def messages(self) -> list[str]:
        """The latest messages from the server and its devices (oldest first)."""
        with self._cond:
            return list(self._messages)

    def sent(self) -> list[tuple[str, str, str]]:
        """Every command sent so far as (element, device, property), oldest first."""
        with self._cond:
            return list(self._sent)

    @property
    def last_serial(self) -> int:
        """The serial of the latest property update received (0 before the first)."""
        with self._cond:
            return self._last_serial

    @property
    def last_definition(self) -> int:
        """The serial of the latest property definition (def*Vector) or deletion received."""
        with self._cond:
            return self._last_definition

    def wait_for(self, condition: Callable[[], object], timeout_s: float, what: str):
        """Wait until condition() is truthy and return its value.

        condition is called with the client's lock held, after every update received; it may
        call the reading methods above. Raises ConnectionLost when the connection ends and
        IndiTimeout after timeout_s seconds.
        """
        deadline = time.monotonic() + max(0.0, timeout_s)
        with self._cond:
            while True:
                if self._lost is not None:
                    raise ConnectionLost(f"{self._lost} (INDI server {self.address}) while "
                                         f"waiting for {what}")
                result = condition()
                if result:
                    return result
                remaining = deadline - time.monotonic()
                if remaining <= 0.0:
                    raise IndiTimeout(f"no answer from the INDI server {self.address} within "
                                      f"{timeout_s:g} s while waiting for {what}")
                # Waits in slices: the OS refuses a single wait of inf or 1e300 s.
                self._cond.wait(min(remaining, WAIT_SLICE_S))

    # -- commanding -------------------------------------------------------------------------

    def ask_properties(self, device: str | None = None, name: str | None = None) -> None:
        """Send getProperties (all devices, one device, or one property)."""
        attrs = {"version": PROTOCOL_VERSION}
        if device:
            attrs["device"] = device
            if name:
                attrs["name"] = name
        self._send(ET.Element("getProperties", attrs), device or "", name or "")

    def send_new(self, device: str, name: str, values: Mapping[str, object], *,
                 even_if_lost: bool = False) -> int:
        """Send new values of a defined property (newNumberVector, newSwitchVector, ...).

        Returns the serial of the latest update received before sending, for `wait_for`
        conditions that need an answer to this command rather than an earlier update.
        even_if_lost: send while the socket is open even when the stream can no longer be
        read (an abort must get out whenever it can be written).
        """
        with self._cond:
            known = self._vectors.get((device, name))
            serial = self._last_serial
        if known is None:
            raise MountError(f"device {device!r} has no property {name!r}")
        unknown = sorted(set(values) - set(known.values))
        if unknown:
            raise MountError(f"property {device}.{name} has no member {unknown[0]!r}")
        element = ET.Element(f"new{known.kind}Vector",
                             {"device": device, "name": name, "timestamp": _utc_stamp()})
        for member, value in values.items():
            one = ET.SubElement(element, f"one{known.kind}", {"name": member})
            one.text = _format_value(known.kind, value)
        self._send(element, device, name, even_if_lost=even_if_lost)
        return serial

    def _send(self, element: ET.Element, device: str, name: str, *,
              even_if_lost: bool = False) -> None:
        data = ET.tostring(element, encoding="utf-8", xml_declaration=False)
        with self._cond:
            if self._closing or (self._lost is not None and not even_if_lost):
                raise ConnectionLost(f"{self._lost} (INDI server {self.address})")
        try:
            with self._send_lock:
                self._sock.sendall(data + b"\n")
        except OSError as err:
            self._lose(f"sending to the server failed ({err.strerror or err})")
            raise ConnectionLost(f"lost the connection to the INDI server {self.address} "
                                 f"while sending ({err.strerror or err})") from None
        with self._cond:
            self._sent.append((element.tag, device, name))

    # -- the reader thread ------------------------------------------------------------------

    def _note_bad_bytes(self, chunk: bytes) -> None:
        note = (f"the INDI server {self.address} sent bytes that are not UTF-8; they were "
                "replaced by U+FFFD and the connection kept")
        LOG.warning("%s: %r", note, chunk[:80])
        with self._cond:
            self._messages.append(note)
            del self._messages[:-_MESSAGES_KEPT]

    def _lose(self, reason: str) -> None:
        with self._cond:
            if self._lost is None:
                self._lost = reason
            self._cond.notify_all()

    def _read_loop(self) -> None:
        parser = ET.XMLPullParser(events=("start", "end"))
        parser.feed("<indi-stream>")  # the protocol's elements have no root: give them one
        # INDI streams are UTF-8; a stray byte of another encoding (a Latin-1 degree sign in a
        # message) is replaced and reported, never taken for a broken connection.
        decoder = codecs.getincrementaldecoder("utf-8")(errors="replace")
        root, depth = None, 0
        try:
            while not self._closing:
                ready, _, _ = select.select([self._sock], [], [], _POLL_S)
                if not ready:
                    continue
                chunk = self._sock.recv(_RECV_BYTES)
                if not chunk:
                    self._lose("the INDI server closed the connection")
                    return
                text = decoder.decode(chunk)
                if "\ufffd" in text:
                    self._note_bad_bytes(chunk)
                parser.feed(text)
                for event, element in parser.read_events():
                    if event == "start":
                        depth += 1
                        root = element if root is None else root
                        continue
                    depth -= 1
                    if depth == 1:
                        self._handle(element)
                        root.remove(element)
        except ET.ParseError as err:
            self._lose(f"the INDI server sent malformed XML ({err})")
        except (OSError, ValueError) as err:  # ValueError: select on a closed socket
            self._lose(f"the connection to the INDI server broke ({err})")

    def _handle(self, element: ET.Element) -> None:
        tag, attrs = element.tag, element.attrib
        device, name = attrs.get("device", ""), attrs.get("name", "")
        with self._cond:
            serial = next(self._serial)
            if tag.startswith(("def", "set")) and tag.endswith("Vector") and \
                    tag[3:-6] in KINDS:
                self._update(tag[:3], tag[3:-6], element, serial)
                if tag.startswith("def"):
                    self._last_definition = serial
            elif tag == "delProperty":
                doomed = [key for key in self._vectors
                          if key[0] == device and (not name or key[1] == name)]
                for key in doomed:
                    del self._vectors[key]
                    self._states.pop(key, None)
                self._last_definition = serial
            if attrs.get("message"):
                self._messages.append(f"{device}: {attrs['message']}" if device
                                      else attrs["message"])
                del self._messages[:-_MESSAGES_KEPT]
            self._last_serial = serial
            self._cond.notify_all()

    def _update(self, verb: str, kind: str, element: ET.Element, serial: int) -> None:
        attrs = element.attrib
        key = (attrs.get("device", ""), attrs.get("name", ""))
        child_tag = ("def" if verb == "def" else "one") + kind
        members = {c.attrib.get("name", ""): _member_value(kind, c.text)
                   for c in element if c.tag == child_tag}
        old = self._vectors.get(key)
        if verb == "def":
            self._vectors[key] = Vector(
                device=key[0], name=key[1], kind=kind, state=attrs.get("state", "Idle"),
                values=MappingProxyType(members), perm=attrs.get("perm", "ro"),
                rule=attrs.get("rule", ""), timeout_s=parse_number(attrs.get("timeout", "0")),
                timestamp=attrs.get("timestamp", ""), label=attrs.get("label", ""),
                serial=serial, received=old.received if old is not None and
                dict(old.values) == members else time.time())
        elif old is not None and old.kind == kind:  # set* of an undefined property: ignored
            values = dict(old.values)
            values.update(members)
            self._vectors[key] = replace(
                old, state=attrs.get("state", old.state), values=MappingProxyType(values),
                timeout_s=parse_number(attrs["timeout"]) if "timeout" in attrs
                else old.timeout_s,
                timestamp=attrs.get("timestamp", old.timestamp), serial=serial,
                received=old.received if values == dict(old.values) else time.time())
        else:
            return
        log = self._states.setdefault(key, collections.deque(maxlen=_STATES_KEPT))
        log.append((serial, self._vectors[key].state))


def _utc_stamp() -> str:
    """INDI timestamps: ISO 8601 UTC without zone letter (INDI 1.7, sec. 3)."""
    return datetime.now(timezone.utc).strftime("%Y-%m-%dT%H:%M:%S")
