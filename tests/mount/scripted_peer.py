"""A scripted loopback INDI "server" for the mount tests (one helper for every test file).

Element and attribute names are those of INDI protocol 1.7 (E. C. Downey, "INDI:
Instrument-Neutral Distributed Interface", 2007): def*/set*/new* vectors, states Idle, Ok,
Busy and Alert, switches On/Off. The peer accepts one connection, sends its definitions,
records every element it receives with the moment it arrived, and answers as a simple mount:

- ON_COORD_SET: takes the requested mode (Ok), or with refuse_mode answers Alert and keeps
  the mode it had (as a device that cannot track would);
- the coordinates: in SYNC mode, Ok at the place (a sync); otherwise Busy, then (motion
  "arrive") Ok at the place, offset by arrive_off_deg in declination and arrive_off_ra_h in
  right ascension, or (motion "stuck") Busy until an abort;
- TELESCOPE_ABORT_MOTION: the coordinates Idle, the abort Ok;
- any other property: the new values echoed with Ok.
Tests may also push raw bytes to the client (`send_raw`).
"""
from __future__ import annotations

import socket
import threading
import time
import xml.etree.ElementTree as ET

DEVICE = "Scripted Mount"


def definitions(device: str = DEVICE, coords: str = "EQUATORIAL_EOD_COORD",
                modes=("TRACK", "SLEW", "SYNC"), ra_h: float = 1.5, dec_deg: float = -10.5,
                time_utc: str | None = None, track_state: bool = False) -> str:
    """The XML a peer sends on connection: CONNECTION, coordinates, ON_COORD_SET, abort, and
    optionally TIME_UTC and TELESCOPE_TRACK_STATE (tracking on)."""
    switches = "".join(f'<defSwitch name="{m}">{"On" if i == 0 else "Off"}</defSwitch>'
                       for i, m in enumerate(modes))
    text = f"""
<defSwitchVector device="{device}" name="CONNECTION" state="Ok" perm="rw" rule="OneOfMany">
  <defSwitch name="CONNECT">On</defSwitch><defSwitch name="DISCONNECT">Off</defSwitch>
</defSwitchVector>
<defNumberVector device="{device}" name="{coords}" state="Idle" perm="rw" timeout="60">
  <defNumber name="RA" format="%010.6m" min="0" max="24" step="0">{float(ra_h)!r}</defNumber>
  <defNumber name="DEC" format="%010.6m" min="-90" max="90" step="0">{float(dec_deg)!r}</defNumber>
</defNumberVector>
<defSwitchVector device="{device}" name="ON_COORD_SET" state="Idle" perm="rw" rule="OneOfMany">
  {switches}
</defSwitchVector>
<defSwitchVector device="{device}" name="TELESCOPE_ABORT_MOTION" state="Idle" perm="rw"
  rule="AtMostOne"><defSwitch name="ABORT">Off</defSwitch></defSwitchVector>
"""
    if time_utc is not None:
        text += f"""
<defTextVector device="{device}" name="TIME_UTC" state="Ok" perm="rw">
  <defText name="UTC">{time_utc}</defText><defText name="OFFSET">0.00</defText>
</defTextVector>
<defNumberVector device="{device}" name="GEOGRAPHIC_COORD" state="Ok" perm="rw">
  <defNumber name="LAT">0</defNumber><defNumber name="LONG">0</defNumber>
  <defNumber name="ELEV">0</defNumber>
</defNumberVector>
"""
    if track_state:
        text += f"""
<defSwitchVector device="{device}" name="TELESCOPE_TRACK_STATE" state="Ok" perm="rw"
  rule="OneOfMany"><defSwitch name="TRACK_ON">On</defSwitch>
  <defSwitch name="TRACK_OFF">Off</defSwitch></defSwitchVector>
"""
    return text


class ScriptedPeer:
    """One-connection INDI peer on loopback (see the module docstring)."""

    def __init__(self, definitions_xml: str | None = None, *, device: str = DEVICE,
                 motion: str = "arrive", refuse_mode: bool = False,
                 arrive_off_deg: float = 0.0, step_s: float = 0.05, accept_s: float = 30.0,
                 arrive_off_ra_h: float = 0.0):
        self.definitions = definitions() if definitions_xml is None else definitions_xml
        self.device, self.motion, self.refuse_mode = device, motion, refuse_mode
        self.arrive_off_deg, self.step_s, self.accept_s = arrive_off_deg, step_s, accept_s
        self.arrive_off_ra_h = arrive_off_ra_h
        self.listener = socket.create_server(("127.0.0.1", 0))
        self.port = self.listener.getsockname()[1]
        self.address = f"127.0.0.1:{self.port}"
        self.connections = 0
        self.received: list[ET.Element] = []
        self.times: list[float] = []  # time.monotonic() when each element arrived
        self.mode = "TRACK"
        self.on_receive = None  # optional callable(element), called before answering
        self._connection: socket.socket | None = None
        self._lock = threading.Lock()
        self.thread = threading.Thread(target=self._serve, daemon=True)
        self.thread.start()

    # -- what the tests look at ------------------------------------------------------------

    def named(self, name: str) -> list[ET.Element]:
        return [e for e in self.received if e.get("name") == name]

    def aborts(self) -> int:
        return len(self.named("TELESCOPE_ABORT_MOTION"))

    def coordinates_sent(self) -> list[ET.Element]:
        return [e for e in self.received
                if e.tag == "newNumberVector" and e.get("name", "").endswith("COORD")
                and e.get("name") != "GEOGRAPHIC_COORD"]

    def wait_until(self, condition, timeout_s: float = 5.0) -> bool:
        deadline = time.monotonic() + timeout_s
        while time.monotonic() < deadline:
            if condition():
                return True
            time.sleep(0.01)
        return condition()

    def send_raw(self, data: bytes) -> None:
        with self._lock:
            self._connection.sendall(data)

    def close(self):
        self.listener.close()

    # -- serving ---------------------------------------------------------------------------

    def _serve(self):
        self.listener.settimeout(self.accept_s)
        try:
            connection, _ = self.listener.accept()
        except OSError:
            return
        self.connections += 1
        self._connection = connection
        with connection:
            self.send_raw(self.definitions.encode())
            parser = ET.XMLPullParser(events=("end",))
            parser.feed(b"<stream>")
            connection.settimeout(30.0)
            try:
                while chunk := connection.recv(4096):
                    parser.feed(chunk)
                    for _, element in parser.read_events():
                        if element.tag.startswith(("new", "getProperties")):
                            self.received.append(element)
                            self.times.append(time.monotonic())
                            if self.on_receive is not None:
                                self.on_receive(element)
                            self._answer(element)
            except OSError:
                pass

    def _set(self, kind: str, name: str, state: str, values: dict) -> None:
        ones = "".join(f'<one{kind} name="{k}">{v}</one{kind}>' for k, v in values.items())
        self.send_raw(f'<set{kind}Vector device="{self.device}" name="{name}" '
                      f'state="{state}">{ones}</set{kind}Vector>'.encode())

    def _answer(self, element: ET.Element) -> None:
        name, tag = element.get("name"), element.tag
        values = {one.get("name"): (one.text or "").strip() for one in element}
        if tag == "newSwitchVector" and name == "ON_COORD_SET":
            wanted = next((k for k, v in values.items() if v == "On"), self.mode)
            if self.refuse_mode and wanted != self.mode:
                self._set("Switch", name, "Alert", {self.mode: "On", wanted: "Off"})
                return
            self.mode = wanted
            self._set("Switch", name, "Ok", values)
        elif tag == "newNumberVector" and name in ("EQUATORIAL_EOD_COORD", "EQUATORIAL_COORD"):
            self._move(name, float(values["RA"]), float(values["DEC"]))
        elif tag == "newSwitchVector" and name == "TELESCOPE_ABORT_MOTION":
            coords = self._coords_name()
            self._set("Number", coords, "Idle", {})
            self._set("Switch", name, "Ok", {"ABORT": "Off"})
        elif tag.startswith("new"):
            kind = tag[3:-6]
            self._set(kind, name, "Ok", values)

    def _coords_name(self) -> str:
        return "EQUATORIAL_COORD" if "EQUATORIAL_COORD\"" in self.definitions \
            else "EQUATORIAL_EOD_COORD"

    def _move(self, name: str, ra_h: float, dec: float) -> None:
        if self.mode == "SYNC":
            self._set("Number", name, "Ok", {"RA": ra_h, "DEC": dec})
            return
        self._set("Number", name, "Busy", {})
        if self.motion == "stuck":
            return
        time.sleep(self.step_s)
        self._set("Number", name, "Ok", {"RA": ra_h + self.arrive_off_ra_h,
                                         "DEC": dec + self.arrive_off_deg})
