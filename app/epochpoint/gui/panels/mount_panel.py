"""The mount panel: connect to a telescope on an INDI server, watch it, send it our site and
clock, slew or sync it to the selected target behind the site's interlocks, and stop it.

Threads. Every network call runs off the GUI thread in a MountJob, a thread of its own rather
than the shared worker pool (gui.workers): an abort must never queue behind a night's
planning, and a slew that is followed to its end holds its thread for up to a few minutes.
ABORT starts its own job at once, even while a slew job waits for the motion to end:
Telescope.abort and a waiting slew_to_target are meant to run in two threads
(mount/telescope.py; the client's waits release its lock). The status box reads the client's
cached copy of the device's properties (Telescope.status: snapshots under the client's lock,
no network), polled on the GUI thread. The interlock check is core arithmetic
(mount.pointing_for, about 10 ms) and runs in a MountJob too.

A lost connection is shown and stays lost: nothing reconnects by itself, and a manual Connect
never resumes a motion (mount.errors.ConnectionLost).
"""
from __future__ import annotations

import threading
import time
from datetime import datetime, timezone

from PySide6.QtCore import Qt, QTimer, Signal
from PySide6.QtGui import QAction, QFontDatabase, QKeySequence, QShortcut
from PySide6.QtWidgets import (QComboBox, QDialog, QDoubleSpinBox, QGridLayout,
                               QGroupBox, QHBoxLayout, QLabel, QLineEdit, QPlainTextEdit,
                               QPushButton, QVBoxLayout, QWidget)

from ...io.angles import format_dec_dms, format_ra_hms
from ...mount import (CAUTION, ConnectionLost, Telescope, pointing_for, slew_to_target,
                      watch_track)
from ...mount.calibration import sample_offsets_text
from ...mount.telescope import FRAME_TEXT
from .mount_jobs import (JOIN_TIMEOUT_S, MountJob, one_line, open_mount, record_to_file,
                         switch_device)
from .mount_pointing import MountPointingRow
from .mount_text import ConfirmMotionDialog, confirmation_text, report_text
from ..document import PLACEHOLDER_SITE_NAME
from ..number_text import fixed
from .theme_link import theme_colour, theme_name, watch_theme

DEFAULT_ADDRESS = "localhost:7624"
STATUS_POLL_MS = 500
# The selected target's verdict is refreshed this often while the panel is in use: a target
# sets below the altitude limit or the Sun comes near within minutes.
RECHECK_MS = 30_000
CHECK_DELAY_MS = 150
# A confirmation older than this is not acted on: the place and verdict it showed are stale.
CONFIRM_FRESH_S = 60.0
# The device's site "matches" ours within these (about 10 m on the ground).
SITE_MATCH_DEG, SITE_MATCH_M = 1e-4, 10.0
LOG_LINES = 300


class MountPanel(QWidget):
    """Telescope control for the selected target (see module docstring)."""

    status_message = Signal(str)  # a one-line note for the window's status bar
    moving_changed = Signal(bool)  # a followed slew or sync started (True) or ended

    def __init__(self, parent=None):
        super().__init__(parent)
        self.site = None
        self.targets = None
        self.selected: int | None = None
        self.scope: Telescope | None = None
        self.lost_reason: str | None = None
        self.pointing = None          # the selected target's latest verdict (mount.Pointing)
        self.check_error = ""         # why no verdict could be computed
        self.last_report = None
        self.motion_job: MountJob | None = None
        self.busy_job: MountJob | None = None  # connect, device switch or site push
        self._jobs: list[MountJob] = []
        self._check_serial = 0
        self._tones: dict[QLabel, str | None] = {}  # labels in a named colour, for a new theme
        # Jobs may outlive the panel by a moment: never deliver to a deleted panel.
        self.destroyed.connect(lambda *_args, jobs=self._jobs: [j.drop() for j in jobs])
        self._confirm_serial: int | None = None  # a check a Slew/Sync press waits for
        # After a slew, a watch stops tracking before the mount leaves the allowed region
        # (mount.watch_track); set to end it (abort, new motion, disconnect, closing).
        self._watch_stop = threading.Event()
        self._watched = None  # (scope, targets, site, name, token) of the last slew
        self._closing = False
        self._moving_shown = False
        self._window_escape: QShortcut | None = None  # Esc anywhere in the window, in motion
        self._build()
        self.status_timer = QTimer(self)
        self.status_timer.setInterval(STATUS_POLL_MS)
        self.status_timer.timeout.connect(self.refresh_status)
        self.check_timer = QTimer(self)
        self.check_timer.setSingleShot(True)
        self.check_timer.setInterval(CHECK_DELAY_MS)
        self.check_timer.timeout.connect(self.check_interlocks)
        self.recheck_timer = QTimer(self)
        self.recheck_timer.setInterval(RECHECK_MS)
        self.recheck_timer.timeout.connect(self._recheck)
        self.recheck_timer.start()
        watch_theme(self, self._apply_theme)
        self._update_controls()
        self._show_target()

    # ================================================================== construction
    def _build(self) -> None:
        self.address_edit = QLineEdit(DEFAULT_ADDRESS)
        self.address_edit.setToolTip("The INDI server as HOST:PORT (7624 is INDI's usual port)")
        self.address_edit.returnPressed.connect(self.connect_to_server)
        self.device_combo = QComboBox()
        self.device_combo.setMinimumContentsLength(18)
        self.device_combo.setPlaceholderText("(after connecting)")
        self.device_combo.setToolTip("The telescope devices on the server")
        self.device_combo.activated.connect(self._on_device_chosen)
        self.connect_button = QPushButton("&Connect")
        self.connect_button.clicked.connect(self.connect_to_server)
        self.disconnect_button = QPushButton("&Disconnect")
        self.disconnect_button.clicked.connect(self.disconnect_from_server)
        server = QHBoxLayout()
        for label, widget, stretch in (("Server", self.address_edit, 2),
                                       ("Device", self.device_combo, 2)):
            server.addWidget(self._field_label(label))
            server.addWidget(widget, stretch)
        server.addWidget(self.connect_button)
        server.addWidget(self.disconnect_button)

        # The status box: the device's view beside ours.
        self.connection_label = QLabel("Not connected.")
        self.connection_label.setWordWrap(True)
        self.connection_label.setObjectName("mountConnection")
        self.motion_label = QLabel("—")
        self.device_place_label = QLabel("—")
        self.target_place_label = QLabel("—")
        self.device_site_label = QLabel("—")
        self.our_site_label = QLabel("—")
        self.device_clock_label = QLabel("—")
        self.our_clock_label = QLabel("—")
        self.site_match_label = QLabel("")
        self.push_site_button = QPushButton("Send our site and c&lock")
        self.push_site_button.setToolTip("Send our latitude, longitude, height (GEOGRAPHIC_COORD) "
                                         "and UTC clock (TIME_UTC) to the device")
        self.push_site_button.clicked.connect(self.push_site)
        for label in (self.device_place_label, self.target_place_label, self.device_site_label,
                      self.our_site_label, self.device_clock_label, self.our_clock_label):
            label.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        status = QGroupBox("Mount status")
        grid = QGridLayout(status)
        grid.addWidget(self.connection_label, 0, 0, 1, 3)
        grid.addWidget(self._field_label("Motion"), 1, 0)
        grid.addWidget(self.motion_label, 1, 1, 1, 2)
        grid.addWidget(self._field_label("Device"), 2, 1)
        grid.addWidget(self._field_label("Ours"), 2, 2)
        rows = (("Pointing", self.device_place_label, self.target_place_label),
                ("Site", self.device_site_label, self.our_site_label),
                ("UTC", self.device_clock_label, self.our_clock_label))
        for r, (name, device, ours) in enumerate(rows, start=3):
            grid.addWidget(self._field_label(name), r, 0)
            grid.addWidget(device, r, 1)
            grid.addWidget(ours, r, 2)
        grid.addWidget(self.site_match_label, 6, 1, 1, 1)
        grid.addWidget(self.push_site_button, 6, 2, 1, 1)
        grid.setColumnStretch(1, 1)
        grid.setColumnStretch(2, 1)

        # The selected target and the motion commands.
        self.target_label = QLabel()
        font = self.target_label.font()
        font.setBold(True)
        self.target_label.setFont(font)
        self.verdict_label = QLabel()
        self.verdict_label.setWordWrap(True)
        self.verdict_label.setObjectName("mountVerdict")
        self.slew_button = QPushButton("&Slew and track")
        self.slew_button.clicked.connect(self.request_slew)
        self.sync_button = QPushButton("S&ync")
        self.sync_button.clicked.connect(self.request_sync)
        self.why_label = QLabel()
        self.why_label.setWordWrap(True)
        self.why_label.setObjectName("mountWhy")
        self.tolerance_spin = QDoubleSpinBox()
        self.tolerance_spin.setRange(0.1, 600.0)
        self.tolerance_spin.setDecimals(1)
        self.tolerance_spin.setValue(2.0)
        self.tolerance_spin.setSuffix(" ″")
        self.tolerance_spin.setToolTip("Settle tolerance: after the slew, one refining slew "
                                       "when the mount ends further than this from the target")
        self.timeout_spin = QDoubleSpinBox()
        self.timeout_spin.setRange(5.0, 1800.0)
        self.timeout_spin.setDecimals(0)
        self.timeout_spin.setValue(120.0)
        self.timeout_spin.setSuffix(" s")
        self.timeout_spin.setToolTip("How long to follow a slew before giving up on it")
        target_box = QGroupBox("Selected target")
        target_layout = QVBoxLayout(target_box)
        target_layout.addWidget(self.target_label)
        target_layout.addWidget(self.verdict_label)
        commands = QHBoxLayout()
        commands.addWidget(self.slew_button)
        commands.addWidget(self.sync_button)
        commands.addSpacing(12)
        commands.addWidget(self._field_label("Settle tolerance"))
        commands.addWidget(self.tolerance_spin)
        commands.addWidget(self._field_label("Wait at most"))
        commands.addWidget(self.timeout_spin)
        commands.addStretch(1)
        target_layout.addLayout(commands)
        target_layout.addWidget(self.why_label)
        # Slewing with a pointing model, and recording centred stars for one.
        self.pointing_row = MountPointingRow(self)
        self.pointing_row.model_changed.connect(self._verdict_changed)
        self.pointing_row.record_requested.connect(self.record_sample)
        self.pointing_row.said.connect(self._log)
        target_layout.addWidget(self.pointing_row)

        # ABORT: big, and enabled whenever a mount is connected.
        self.abort_button = QPushButton("ABORT\nEsc anywhere while it moves · Ctrl+Shift+A")
        self.abort_button.setObjectName("abortButton")
        self.abort_button.setMinimumHeight(72)
        font = self.abort_button.font()
        font.setBold(True)
        font.setPointSizeF(font.pointSizeF() * 1.4)
        self.abort_button.setFont(font)
        self.abort_button.setToolTip("Stop any motion of the mount now (TELESCOPE_ABORT_MOTION)")
        self.abort_button.clicked.connect(self.abort_motion)
        self.abort_action = QAction("&Abort mount motion", self)
        self.abort_action.setShortcut(QKeySequence("Ctrl+Shift+A"))
        self.abort_action.setShortcutContext(Qt.ShortcutContext.WindowShortcut)
        self.abort_action.setStatusTip("Stop any motion of the connected mount now")
        self.abort_action.triggered.connect(self.abort_motion)
        self.addAction(self.abort_action)
        self.escape = QShortcut(QKeySequence(Qt.Key.Key_Escape), self)
        self.escape.setContext(Qt.ShortcutContext.WidgetWithChildrenShortcut)
        self.escape.activated.connect(self.abort_motion)

        self.report_label = QLabel("")
        self.report_label.setWordWrap(True)
        self.report_label.setObjectName("mountReport")
        self.report_label.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        self.log_view = QPlainTextEdit()
        self.log_view.setReadOnly(True)
        self.log_view.setMaximumBlockCount(LOG_LINES)
        self.log_view.setFont(QFontDatabase.systemFont(QFontDatabase.SystemFont.FixedFont))
        self.log_view.setPlaceholderText("What was sent and what the mount answered.")

        layout = QVBoxLayout(self)
        layout.addLayout(server)
        layout.addWidget(status)
        layout.addWidget(target_box)
        layout.addWidget(self.abort_button)
        layout.addWidget(self.report_label)
        layout.addWidget(self.log_view, 1)

    @staticmethod
    def _field_label(text: str) -> QLabel:
        label = QLabel(text)
        label.setProperty("role", "fieldLabel")
        return label

    def _apply_theme(self) -> None:
        danger, muted = theme_colour("danger"), theme_colour("muted")
        if theme_name() == "night":  # a large bright area would spoil dark adaptation
            background, text = theme_colour("caution_bg"), danger
        else:
            background, text = danger, theme_colour("accent_text")
        self.abort_button.setStyleSheet(
            f"QPushButton#abortButton {{ background: {background}; color: {text}; "
            f"border: 3px solid {danger}; border-radius: 6px; }}"
            f"QPushButton#abortButton:disabled {{ background: {theme_colour('window')}; "
            f"color: {muted}; border: 1px solid {theme_colour('border')}; }}")
        for label, tone in list(self._tones.items()):
            self._colour(label, tone, force=True)

    # ================================================================== document inputs
    def set_site(self, site) -> None:
        self.site = site
        self.our_site_label.setText(self._site_text(site.latitude, site.longitude, site.height))
        self._verdict_changed()

    def set_targets(self, targets) -> None:
        self.targets = targets
        self._verdict_changed()

    def set_selected(self, index: int | None) -> None:
        self.selected = index
        self._verdict_changed()

    def selected_name(self) -> str | None:
        if self.targets is None or self.selected is None or \
                not 0 <= self.selected < len(self.targets):
            return None
        return str(self.targets.names()[self.selected])

    def _verdict_changed(self) -> None:
        self.pointing, self.check_error = None, ""
        self._confirm_serial = None  # a pressed Slew/Sync no longer applies
        self._check_serial += 1  # results of earlier checks no longer apply
        self._show_target()
        self._update_controls()
        self.check_timer.start()

    # ================================================================== interlock check
    def check_interlocks(self, then=None) -> None:
        """Compute the selected target's place and verdict now (in a job), then call
        then(pointing, the one-target list, the site) with what was checked."""
        name = self.selected_name()
        if name is None or self.site is None or self._closing:
            return
        if then is None and not (self.isVisible() or self.is_connected):
            return  # computed when the panel is shown
        self._check_serial += 1
        serial = self._check_serial
        if then is not None:
            self._confirm_serial = serial
        one, site = self.targets[[self.selected]], self.site
        job = self._start("interlock check", pointing_for, one, site, name, "now",
                          model=self.pointing_row.model_in_use())
        job.done.connect(lambda pointing: self._on_checked(
            serial, pointing, then and (lambda p: then(p, one, site))))
        job.failed.connect(lambda err: self._on_check_failed(serial, err))

    def showEvent(self, event):  # noqa: N802 (Qt name)
        super().showEvent(event)
        if self.pointing is None and not self.check_error:
            self.check_timer.start()

    def _recheck(self) -> None:
        if self._confirm_serial is not None:
            return  # a Slew/Sync press waits for its own check
        if self.selected_name() is not None and (self.isVisible() or self.is_connected):
            self.check_interlocks()

    def _on_checked(self, serial: int, pointing, then) -> None:
        if serial != self._check_serial:
            return  # the selection, the targets or the site changed meanwhile
        self._confirm_serial = None
        self.pointing, self.check_error = pointing, ""
        self._show_target()
        self._update_controls()
        if then is not None:
            then(pointing)

    def _on_check_failed(self, serial: int, err) -> None:
        if serial == self._check_serial:
            self._confirm_serial = None
            self.pointing, self.check_error = None, one_line(err)
            self._show_target()
            self._update_controls()

    def block_reason(self) -> str:
        """Why the selected target may not be sent now ('' when it may), for the buttons."""
        if self.site is not None and self.site.name == PLACEHOLDER_SITE_NAME:
            return ("the site is only a placeholder (latitude 0, longitude 0): set your site "
                    "before pointing")
        if self.selected_name() is None:
            return "select a target in the list"
        if self.check_error:
            return f"cannot compute its place: {self.check_error}"
        if self.pointing is None:
            return "checking the interlocks…"
        if not self.pointing.allowed:
            return f"refused: {self.pointing.refusal}"
        return ""

    def _show_target(self) -> None:
        name, p = self.selected_name(), self.pointing
        self.target_label.setText(name or "No target selected")
        if p is None:
            self.verdict_label.setText(self.check_error or ("Checking the interlocks…" if name
                                                            else ""))
            self.target_place_label.setText("—")
            self._colour(self.verdict_label, "danger" if self.check_error else None)
            return
        place = (f"RA {format_ra_hms(p.ra_apparent_deg, 2)}  Dec "
                 f"{format_dec_dms(p.dec_apparent_deg, 1)} (of date)")
        self.target_place_label.setText(f"{name}: {place}")
        geometry = (f"Now ({p.time}; a slew or sync always uses the present, whatever "
                    f"instant the list shows): altitude {fixed(p.alt_deg, 2)}°, azimuth "
                    f"{fixed(p.az_deg, 2)}°, "
                    f"{p.sun_separation_deg:.1f}° from the Sun. {place}.")
        if p.allowed:
            self.verdict_label.setText(f"Allowed by the site's interlocks. {geometry}")
            self._colour(self.verdict_label, "ok")
        else:
            self.verdict_label.setText(f"REFUSED: {p.refusal}. Nothing can be sent for it. "
                                       f"{geometry}")
            self._colour(self.verdict_label, "danger")

    # ================================================================== connection
    @property
    def is_connected(self) -> bool:
        return self.scope is not None and self.lost_reason is None

    @property
    def is_moving(self) -> bool:
        return self.motion_job is not None

    def _may_connect(self) -> bool:
        """No live connection (none, or a lost one) and nothing under way."""
        return ((self.scope is None or self.lost_reason is not None) and not self.is_moving
                and self.busy_job is None and not self._closing)

    def connect_to_server(self) -> None:
        """Connect at the user's request (also after a loss: a new connection, no motion)."""
        if not self._may_connect():
            return
        address = self.address_edit.text().strip() or DEFAULT_ADDRESS
        device = self.device_combo.currentText().strip() or None
        self.scope, self.lost_reason = None, None
        self._clear_device_status()
        self._set_connection_text(f"Connecting to {address}…", None)
        self._log(f"Connecting to {address}" + (f", device {device}" if device else ""))
        self.busy_job = self._start("connect", open_mount, address, device)
        self.busy_job.done.connect(self._on_connected)
        self.busy_job.failed.connect(self._on_connect_failed)
        self._update_controls()

    def _on_connected(self, result) -> None:
        self.busy_job = None
        scope, devices = result
        if self._closing:
            scope.close()
            return
        self.scope = scope
        self.device_combo.clear()
        self.device_combo.addItems(devices)
        self.device_combo.setCurrentText(scope.device)
        self._log(f"Connected to {scope.device} at {scope.client.address}.")
        self.status_timer.start()
        self.refresh_status()
        self._update_controls()
        self.check_timer.start()

    def _on_connect_failed(self, err) -> None:
        self.busy_job = None
        self._set_connection_text(f"Not connected: {one_line(err)}", "danger")
        self._log(f"Could not connect: {one_line(err)}")
        self._update_controls()

    def _on_device_chosen(self, _index: int) -> None:
        name = self.device_combo.currentText()
        if not self.is_connected or name == self.scope.device:
            return
        if self.is_moving or self.busy_job is not None:
            self.device_combo.setCurrentText(self.scope.device)
            return
        self._log(f"Switching to device {name}")
        self.busy_job = self._start("switch device", switch_device, self.scope, name)
        self.busy_job.done.connect(self._on_switched)
        self.busy_job.failed.connect(self._on_switch_failed)
        self._update_controls()

    def _on_switched(self, scope) -> None:
        self.busy_job = None
        if self.is_connected:
            self.scope = scope
            self._log(f"Now using {scope.device}.")
            self.refresh_status()
        self._update_controls()

    def _on_switch_failed(self, err) -> None:
        self.busy_job = None
        if self.scope is not None:
            self.device_combo.setCurrentText(self.scope.device)
        self._log(f"Could not switch device: {one_line(err)}")
        self._update_controls()

    def disconnect_from_server(self) -> None:
        """Close our connection (the device stays connected on the server for others)."""
        if self.scope is None or self.is_moving:
            return
        scope, self.scope, self.lost_reason = self.scope, None, None
        self._watch_stop.set()
        self.status_timer.stop()
        self._start("disconnect", scope.close)
        self._log(f"Disconnected from {scope.client.address}.")
        self._set_connection_text("Not connected.", None)
        self._clear_device_status()
        self._update_controls()

    def _connection_lost(self, reason: str) -> None:
        """Show the loss plainly; never reconnect or resend anything by ourselves."""
        if self.scope is None or self.lost_reason is not None:
            return
        self.lost_reason = reason
        self._watch_stop.set()
        self.status_timer.stop()
        self._start("close lost connection", self.scope.client.close)
        text = (f"CONNECTION LOST to {self.scope.device} at {self.scope.client.address}: "
                f"{reason}. Nothing reconnects by itself. The mount may still be moving: "
                "check it, and stop it at the mount if needed.")
        self._set_connection_text(text, "danger")
        self.motion_label.setText(f"UNKNOWN (last reported: {self.motion_label.text()})")
        self._colour(self.motion_label, "danger")
        self._log(f"Connection lost: {reason}")
        self.status_message.emit(f"Mount: connection lost ({reason})")
        self._update_controls()

    # ================================================================== status box
    def refresh_status(self) -> None:
        """Read the device's cached properties (no network) into the status box."""
        if self.scope is None or self.lost_reason is not None:
            return
        lost = self.scope.client.lost
        if lost is not None:
            self._connection_lost(lost)
            return
        s = self.scope.status()
        self._set_connection_text(
            f"Connected to {s.device} at {s.address}" +
            ("" if s.connected else " — the device reports it is NOT connected"),
            "ok" if s.connected else "danger")
        state = s.motion_state or "unknown"
        flags = [f"tracking {'on' if s.tracking else 'off'}" if s.tracking is not None else "",
                 "PARKED" if s.parked else ""]
        self.motion_label.setText(" · ".join([state] + [f for f in flags if f]))
        self._colour(self.motion_label, {"Busy": "warning", "Alert": "danger",
                                         "Ok": "ok"}.get(state))
        if s.ra_deg is not None:
            self.device_place_label.setText(
                f"RA {format_ra_hms(s.ra_deg, 2)}  Dec {format_dec_dms(s.dec_deg, 1)} "
                f"({FRAME_TEXT[s.coordinate_property]})")
        if s.latitude is not None:
            self.device_site_label.setText(self._site_text(s.latitude, s.longitude,
                                                           s.height or 0.0))
        self.device_clock_label.setText(f"{s.time_utc} (as last reported)" if s.time_utc
                                        else "—")
        self.our_clock_label.setText(f"{datetime.now(timezone.utc):%Y-%m-%dT%H:%M:%S}Z")
        self._show_site_match(s)

    def _show_site_match(self, s) -> None:
        if s.latitude is None or self.site is None:
            self.site_match_label.setText("")
            return
        same = (abs(s.latitude - self.site.latitude) <= SITE_MATCH_DEG
                and abs((s.longitude - self.site.longitude + 180.0) % 360.0 - 180.0)
                <= SITE_MATCH_DEG and abs((s.height or 0.0) - self.site.height) <= SITE_MATCH_M)
        self.site_match_label.setText("Same site as ours" if same
                                      else "DIFFERS from ours: send our site")
        self._colour(self.site_match_label, "ok" if same else "warning")

    def _clear_device_status(self) -> None:
        for label in (self.motion_label, self.device_place_label, self.device_site_label,
                      self.device_clock_label):
            label.setText("—")
        self._colour(self.motion_label, None)
        self.site_match_label.setText("")

    @staticmethod
    def _site_text(lat: float, lon: float, height: float) -> str:
        return f"lat {lat:+.5f}°, lon {lon:+.5f}°, {height:.0f} m"

    def _set_connection_text(self, text: str, colour: str | None) -> None:
        self.connection_label.setText(text)
        self._colour(self.connection_label, colour)

    def _colour(self, label: QLabel, name: str | None, force: bool = False) -> None:
        """Show a label in a named theme colour ('ok', 'warning', 'danger'; None: plain)."""
        if not force and label in self._tones and self._tones[label] == name:
            return  # restyling is costly, and the status is polled twice a second
        self._tones[label] = name
        label.setStyleSheet(f"color: {theme_colour(name)}; font-weight: bold;" if name else "")

    # ================================================================== commands
    def push_site(self) -> None:
        if not self.is_connected or self.is_moving or self.busy_job is not None:
            return
        if self.site is None or self.site.name == PLACEHOLDER_SITE_NAME:
            self._log("Not sent: the site is only a placeholder; set your site first.")
            return
        self.busy_job = self._start("send site", self.scope.push_site, self.site, track=True)
        self.busy_job.done.connect(self._on_pushed)
        self.busy_job.failed.connect(self._on_pushed)
        self._update_controls()

    def _on_pushed(self, _result) -> None:
        self.busy_job = None
        self.refresh_status()
        self._update_controls()

    def request_slew(self) -> None:
        self._request_motion(sync=False)

    def request_sync(self) -> None:
        self._request_motion(sync=True)

    def _request_motion(self, sync: bool) -> None:
        """Check the interlocks afresh, then ask; only a confirmation sends anything."""
        if self._motion_blocked() or self.block_reason().startswith(("refused", "the site")):
            return
        self.check_interlocks(then=lambda pointing, one, site: self._confirm(pointing, one,
                                                                            site, sync))

    def _motion_blocked(self) -> bool:
        return not self.is_connected or self.is_moving or self.busy_job is not None

    def _confirm(self, pointing, one, site, sync: bool) -> None:
        """Ask; on yes, slew or sync to exactly the target and site that were checked."""
        if self._motion_blocked() or self.block_reason():
            return  # refused now (the buttons say why), or the connection changed
        scope = self.scope
        dialog = ConfirmMotionDialog(
            confirmation_text(pointing, sync, scope.device, scope.coordinate_property(),
                              site.interlocks.sun_avoidance, scope.reported_pier_side()),
            sync, self)
        asked = time.monotonic()
        accepted = dialog.exec() == QDialog.DialogCode.Accepted
        dialog.deleteLater()
        what = "sync" if sync else "slew"
        if not accepted:
            self._log(f"The {what} of {pointing.name} was cancelled; nothing was sent.")
            return
        if time.monotonic() - asked > CONFIRM_FRESH_S:
            self._log(f"The confirmation took over {CONFIRM_FRESH_S:g} s; nothing was sent. "
                      "Press again to see the place now.")
            return
        model = self.pointing_row.model_in_use()
        if self._motion_blocked() or scope is not self.scope or site is not self.site or \
                pointing.name != self.selected_name() or \
                (model is None) != (pointing.command_eod_deg is None):
            self._log("Nothing was sent: the connection, the site, the selection or the "
                      "pointing model changed.")
            return
        name = pointing.name
        # The command begins at the confirmation: an ABORT pressed from now on stops it.
        token = scope.begin_command()
        self._watch_stop.set()
        self._watched = (scope, one, site, name, token)
        self.last_report = None
        self.report_label.setText(f"{what.capitalize()} of {name} in progress…")
        self._colour(self.report_label, "warning")
        job = self._start(what, slew_to_target, scope, one, site, name, sync=sync,
                          wait=True, timeout_s=self.timeout_spin.value(),
                          tolerance_arcsec=self.tolerance_spin.value(), token=token,
                          track=True, model=model)
        self.motion_job = job
        job.done.connect(self._on_motion_done)
        job.failed.connect(self._on_motion_failed)
        self._update_controls()

    def _on_motion_done(self, report) -> None:
        self.motion_job = None
        self.last_report = report
        self.report_label.setText(report_text(report))
        self._colour(self.report_label, "warning" if report.aborted or
                     report.within_tolerance is False else "ok")
        self.refresh_status()
        self._update_controls()
        self._watch_track(report)

    def _watch_track(self, report) -> None:
        """Watch a finished slew's tracking while connected (mount.watch_track)."""
        if report.action != "slew" or report.aborted or report.final_state != "Ok" or \
                self._watched is None or self._watched[0] is not self.scope:
            return
        scope, one, site, name, token = self._watched
        self._watch_stop = threading.Event()
        self._log(f"Watching the track of {name}: tracking stops before it leaves the "
                  "allowed region.")
        job = self._start("watch", watch_track, scope, one, site, name, token=token,
                          stop=self._watch_stop, track=True)
        job.done.connect(lambda why: self._log(f"Watch of {name} ended: {why}."))

    def _record_target(self):
        """(scope, one, site, name) of the star the last slew reached, while it is still
        the selected target; else None."""
        report, watched = self.last_report, self._watched
        if report is None or watched is None or report.action != "slew" or report.aborted \
                or report.final_state != "Ok" or watched[0] is not self.scope \
                or watched[3] != self.selected_name():
            return None
        return watched[:4]

    def record_sample(self) -> None:
        """Append where the axes are now, on the centred star, to the samples file."""
        target, path = self._record_target(), self.pointing_row.samples_path()
        if self._motion_blocked() or target is None:
            return
        if not path:
            self._log("Choose a samples file to record into first.")
            return
        scope, one, site, name = target
        self.busy_job = self._start("record", record_to_file, scope, one, site, name, path,
                                    self.last_report.pointing.pier_side)
        self.busy_job.done.connect(lambda sample: self._on_recorded(sample, path))
        self.busy_job.failed.connect(self._on_pushed)
        self._update_controls()

    def _on_recorded(self, sample, path: str) -> None:
        self.busy_job = None
        self._log(f"Recorded {sample['name']} into {path}: "
                  f"{sample_offsets_text(sample, arcsec='″')}.")
        self._update_controls()

    def _on_motion_failed(self, err) -> None:
        self.motion_job = None
        text = one_line(err)
        if isinstance(err, ConnectionLost) and "may still be moving" not in text:
            text += " — the mount may still be moving: check it"
        self.report_label.setText(f"Not completed: {text}")
        self._colour(self.report_label, "danger")
        self._update_controls()

    def abort_motion(self) -> None:
        """Send TELESCOPE_ABORT_MOTION now, whatever else is going on."""
        if not self.is_connected:
            if self.lost_reason is not None:
                self._log("Cannot send ABORT: the connection is lost. Stop the mount at the "
                          "mount.")
            return
        # Latched here, on the GUI thread: a motion not yet sent will not be sent.
        self.scope.latch_abort()
        self._watch_stop.set()
        self._log("ABORT sent.")
        self.status_message.emit("Mount: ABORT sent")
        job = self._start("abort", self.scope.abort)
        job.done.connect(lambda state: self._log(f"After ABORT the mount is {state or '?'}."))

    # ================================================================== jobs and controls
    def _start(self, label: str, func, *args, track: bool = False, **kwargs) -> MountJob:
        """Run func(*args) in a MountJob; ConnectionLost anywhere marks the connection lost.

        track: pass the job's `say` as the call's `notify`, so its lines reach the log.
        """
        job = MountJob(label, func, *args, **kwargs)
        if track:
            job.kwargs["notify"] = job.say
        self._jobs.append(job)
        job.said.connect(self._log)
        job.failed.connect(lambda err: self._on_job_failed(label, err))
        job.finished.connect(lambda: self._forget(job))
        return job.start()

    def _forget(self, job: MountJob) -> None:
        job.wait(1.0)  # the thread has only its return left
        if job in self._jobs:
            self._jobs.remove(job)

    def _on_job_failed(self, label: str, err) -> None:
        if isinstance(err, ConnectionLost) and self.scope is not None:
            self._connection_lost(one_line(err))
        elif label not in ("connect", "interlock check"):
            self._log(f"{label.capitalize()} failed: {one_line(err)}")

    def _update_controls(self) -> None:
        connected, moving, busy = self.is_connected, self.is_moving, self.busy_job is not None
        self.address_edit.setEnabled(self._may_connect())
        self.connect_button.setEnabled(self._may_connect())
        self.disconnect_button.setEnabled(connected and not moving and not busy)
        self.device_combo.setEnabled(connected and not moving and not busy)
        self.push_site_button.setEnabled(connected and not moving and not busy)
        self.abort_button.setEnabled(connected)
        self.abort_action.setEnabled(connected)
        self._follow_motion(moving)
        if moving:
            why = "A motion is in progress: ABORT stops it."
        elif busy:
            why = "Waiting for the mount…"
        elif not connected:
            why = ("The connection is lost." if self.lost_reason else
                   "Connect to a mount to slew or sync.")
            reason = self.block_reason()
            if reason.startswith(("refused", "the site")):
                why += f" This target cannot be sent: {reason}."
        else:
            reason = self.block_reason()
            why = f"Cannot slew or sync: {reason}." if reason else ""
        allowed = connected and not moving and not busy and not self.block_reason()
        for button in (self.slew_button, self.sync_button):
            button.setEnabled(allowed)
            button.setToolTip(why or ("Check the interlocks again, then confirm the "
                                      "coordinates before anything is sent"))
        self.why_label.setText(why)
        self.pointing_row.record_button.setEnabled(
            connected and not moving and not busy and self._record_target() is not None)
        self._colour(self.why_label, "danger" if "refused" in why or "placeholder" in why
                     else None)

    def _follow_motion(self, moving: bool) -> None:
        """While a motion runs, Esc aborts it from anywhere in the window (a shortcut on the
        top-level window); otherwise Esc belongs to the focused widget, and in this panel it
        still sends ABORT."""
        window = self.window()
        if self._window_escape is None or self._window_escape.parent() is not window:
            if self._window_escape is not None:
                self._window_escape.setEnabled(False)
                self._window_escape.deleteLater()
            self._window_escape = QShortcut(QKeySequence(Qt.Key.Key_Escape), window)
            self._window_escape.setContext(Qt.ShortcutContext.WindowShortcut)
            self._window_escape.activated.connect(lambda: self.abort_motion())
        self._window_escape.setEnabled(moving)
        self.escape.setEnabled(not moving)  # one Esc shortcut at a time: never ambiguous
        if moving != self._moving_shown:
            self._moving_shown = moving
            self.moving_changed.emit(moving)

    def _log(self, text: str) -> None:
        if text == CAUTION:
            return  # the confirmation showed it just before: said once, not twice
        stamp = datetime.now(timezone.utc).strftime("%H:%M:%SZ")
        self.log_view.appendPlainText(f"{stamp}  {text}")

    # ================================================================== closing
    def shutdown(self, timeout_s: float = JOIN_TIMEOUT_S) -> bool:
        """Stop the timers; abort a followed motion; close the connection; join every job.

        Returns True when every job ended within the timeout.
        """
        self._closing = True
        self._watch_stop.set()
        for timer in (self.status_timer, self.check_timer, self.recheck_timer):
            timer.stop()
        for job in self._jobs:
            job.drop()
        scope = self.scope
        if scope is not None and self.is_moving and self.lost_reason is None:
            try:  # leaving the app must not leave a slew nobody follows
                scope.abort(timeout_s=min(timeout_s, 5.0))
            except Exception:  # noqa: BLE001 - closing anyway; the motion may have ended
                pass
        if scope is not None:
            scope.close()
        self.scope = None
        deadline = time.monotonic() + timeout_s
        for job in list(self._jobs):
            job.wait(max(0.0, deadline - time.monotonic()))
        return not any(job.running() for job in self._jobs)
