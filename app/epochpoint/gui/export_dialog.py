"""File > Export positions: every target's coordinates at one instant, written for a
telescope controller (core.export), with what the numbers mean and how long they stay good.

The dialog works on a snapshot of the targets and the site; it never changes the document.
The computation and the atomic write (core.export.write_export) run in a worker
(gui.workers.run_in_worker); the summary shows the validity window and the counts, and an
error is one line in the dialog.
"""
from __future__ import annotations

import os
from dataclasses import dataclass

from PySide6.QtCore import QDateTime, Qt, QTimeZone, Signal
from PySide6.QtWidgets import (QButtonGroup, QCheckBox, QComboBox, QDateTimeEdit, QDialog,
                               QDialogButtonBox, QDoubleSpinBox, QFileDialog, QFormLayout,
                               QHBoxLayout, QLabel, QLineEdit, QMessageBox, QPushButton,
                               QRadioButton, QVBoxLayout, QWidget)

from epochpoint.core.export import export_positions, write_export
from epochpoint.core.night import darkness_interval
from epochpoint.core.timescale import iso_z

from . import workers
from .document import PLACEHOLDER_SITE_NAME
from .panels.theme_link import theme_colour

FRAME_CHOICES = (
    ("apparent", "Apparent place of date (true equator and equinox)",
     "Geocentric apparent place: what an INDI controller's EQUATORIAL_EOD_COORD takes"),
    ("icrs", "ICRS, propagated to the instant",
     "Catalogue-style coordinates with the space motion applied, nothing else"),
    ("observed", "Observed at the site (alt/az and HA/Dec, refracted)",
     "Valid for seconds only: the sky turns about 15″ per second"),
)
FORMAT_CHOICES = (("csv", "CSV", ".csv"), ("json", "JSON", ".json"),
                  ("votable", "VOTable", ".vot"))
_EXTENSIONS = {ext for _, _, ext in FORMAT_CHOICES} | {".xml", ".votable"}


@dataclass(frozen=True)
class ExportSummary:
    """What one export wrote (times ISO 8601 UTC with Z)."""

    path: str
    format: str
    frame: str
    time: str
    exported: int
    refused: int
    refused_included: bool
    valid_for_s: float | None
    valid_until: str
    validity_basis: str
    warning: str = ""


def write_positions(targets, site, when, frame: str, fmt: str, include_all: bool,
                    tolerance_arcsec: float, path: str) -> ExportSummary:
    """core.export.export_positions, then write_export (atomic); returns the summary."""
    table = export_positions(targets, site, when, frame, include_all=include_all,
                             tolerance_arcsec=tolerance_arcsec)
    write_export(table, path, fmt)
    meta = table.meta
    return ExportSummary(
        path=os.fspath(path), format=fmt, frame=frame, time=meta["time"],
        exported=table.nrows, refused=int(meta["targets_refused"]),
        refused_included=include_all, valid_for_s=meta["valid_for_s"],
        valid_until=str(meta["valid_until"]), validity_basis=str(meta["validity_basis"]),
        warning=str(meta.get("earth_orientation_warning") or ""))


def duration_text(seconds: float | None) -> str:
    if seconds is None:
        return "no limit"
    if seconds < 120.0:
        return f"{seconds:.0f} s"
    if seconds < 7200.0:
        return f"{seconds / 60.0:.0f} min"
    if seconds < 3.0 * 86400.0:
        return f"{seconds / 3600.0:.1f} h"
    return f"{seconds / 86400.0:.0f} days"


def summary_text(s: ExportSummary) -> str:
    frame = {key: label for key, label, _ in FRAME_CHOICES}[s.frame]
    fmt = {key: label for key, label, _ in FORMAT_CHOICES}[s.format]
    lines = [f"Wrote {s.exported} target(s) to {s.path} ({fmt}; {frame} at {s.time})."]
    if s.valid_for_s is None:
        lines.append(f"Valid without limit: {s.validity_basis}.")
    else:
        lines.append(f"Valid until {s.valid_until} (for {duration_text(s.valid_for_s)}): "
                     f"{s.validity_basis}.")
    if s.refused and s.refused_included:
        lines.append(f"{s.refused} target(s) refused by the site's interlocks are included, "
                     "with the reason in the 'refused' column.")
    elif s.refused:
        lines.append(f"{s.refused} target(s) refused by the site's interlocks were left out.")
    else:
        lines.append("No target was refused by the site's interlocks.")
    if s.warning:
        lines.append(s.warning)
    return "\n".join(lines)


def mid_darkness(plan) -> tuple[str | None, str]:
    """(ISO instant, description) of the middle of the plan's darkness, or (None, why not)."""
    if plan is None:
        return None, "no plan computed yet"
    darkness, date = plan.constraints.darkness, plan.night.date.isoformat()
    span = darkness_interval(plan.night, darkness)
    if span is None:
        return None, f"no {darkness} darkness on the night of {date}"
    start, end = span
    return iso_z(start + 0.5 * (end - start)), f"middle of {darkness} darkness, night of {date}"


class ExportDialog(QDialog):
    """Choose frame, instant, tolerance, refused targets, format and file; export."""

    exported = Signal(object)  # ExportSummary

    def __init__(self, targets, site, plan=None, tolerance_arcsec: float = 1.0,
                 path: str = "", parent: QWidget | None = None):
        super().__init__(parent)
        self.setWindowTitle("Export positions")
        self.targets, self.site = targets, site
        self.task = None
        self.summary: ExportSummary | None = None
        self._browsed_path = ""
        self.darkness_iso, darkness_note = mid_darkness(plan)

        self.frame_combo = QComboBox()
        for key, label, tip in FRAME_CHOICES:
            self.frame_combo.addItem(label, key)
            self.frame_combo.setItemData(self.frame_combo.count() - 1, tip,
                                         Qt.ItemDataRole.ToolTipRole)
        self.format_combo = QComboBox()
        for key, label, _ in FORMAT_CHOICES:
            self.format_combo.addItem(label, key)
        self.format_combo.currentIndexChanged.connect(self._on_format)
        self.tolerance_spin = QDoubleSpinBox()
        self.tolerance_spin.setRange(0.01, 3600.0)
        self.tolerance_spin.setDecimals(2)
        self.tolerance_spin.setSuffix(" ″")
        self.tolerance_spin.setValue(tolerance_arcsec)
        self.tolerance_spin.setToolTip("Valid within: the file's coordinates count as valid "
                                       "until its fastest-moving target has moved this far "
                                       "(coordinate accuracy only; the interlocks are checked "
                                       "at the export instant)")
        self.include_refused = QCheckBox("Include refused targets (marked with the reason)")
        self.include_refused.setChecked(False)

        # The instant.
        self.now_radio = QRadioButton("Now (when the file is written)")
        self.darkness_radio = QRadioButton(
            f"{darkness_note[0].upper()}{darkness_note[1:]}: {self.darkness_iso}"
            if self.darkness_iso else f"Middle of the plan's darkness ({darkness_note})")
        self.darkness_radio.setEnabled(self.darkness_iso is not None)
        self.chosen_radio = QRadioButton("Chosen time (UTC)")
        self.chosen_edit = QDateTimeEdit()
        if hasattr(self.chosen_edit, "setTimeZone"):  # Qt 6.7 and later
            self.chosen_edit.setTimeZone(QTimeZone.utc())
        else:
            self.chosen_edit.setTimeSpec(Qt.TimeSpec.UTC)
        self.chosen_edit.setDisplayFormat("yyyy-MM-dd HH:mm:ss 'UTC'")
        self.chosen_edit.setCalendarPopup(True)
        self.chosen_edit.setDateTime(QDateTime.currentDateTimeUtc())
        self.chosen_edit.dateTimeChanged.connect(lambda _t: self.chosen_radio.setChecked(True))
        self.instant_group = QButtonGroup(self)
        for radio in (self.now_radio, self.darkness_radio, self.chosen_radio):
            self.instant_group.addButton(radio)
        (self.darkness_radio if self.darkness_iso else self.now_radio).setChecked(True)
        instant = QVBoxLayout()
        instant.addWidget(self.now_radio)
        instant.addWidget(self.darkness_radio)
        chosen = QHBoxLayout()
        chosen.addWidget(self.chosen_radio)
        chosen.addWidget(self.chosen_edit, 1)
        instant.addLayout(chosen)

        self.path_edit = QLineEdit(path)
        browse = QPushButton("Browse…")
        browse.clicked.connect(self.browse)
        file_row = QHBoxLayout()
        file_row.addWidget(self.path_edit, 1)
        file_row.addWidget(browse)

        form = QFormLayout()
        form.addRow("Frame", self.frame_combo)
        form.addRow("Instant", instant)
        form.addRow("Valid within", self.tolerance_spin)
        form.addRow("", self.include_refused)
        form.addRow("Format", self.format_combo)
        form.addRow("File", file_row)

        self.site_note = QLabel(
            "The site is only a placeholder (latitude 0, longitude 0): refusals and observed "
            "places do not apply to your telescope." if site.name == PLACEHOLDER_SITE_NAME
            else f"{len(targets)} target(s); site {site.name or 'unnamed'}; interlocks "
                 "decide which targets are refused at the instant.")
        self.site_note.setWordWrap(True)
        self.summary_label = QLabel("")
        self.summary_label.setWordWrap(True)
        self.summary_label.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        self.error_label = QLabel("")
        self.error_label.setWordWrap(True)
        self.error_label.setStyleSheet(f"color: {theme_colour('danger')}; font-weight: bold;")
        buttons = QDialogButtonBox()
        self.export_button = buttons.addButton("Export", QDialogButtonBox.ButtonRole.ApplyRole)
        self.export_button.clicked.connect(self.export)
        close = buttons.addButton(QDialogButtonBox.StandardButton.Close)
        close.clicked.connect(self.reject)

        layout = QVBoxLayout(self)
        layout.addLayout(form)
        layout.addWidget(self.site_note)
        layout.addWidget(self.summary_label)
        layout.addWidget(self.error_label)
        layout.addWidget(buttons)
        self.path_edit.setMinimumWidth(380)
        self._on_format()

    # ------------------------------------------------------------------ choices
    def frame(self) -> str:
        return self.frame_combo.currentData()

    def file_format(self) -> str:
        return self.format_combo.currentData()

    def instant(self) -> str:
        """'now' or an ISO 8601 UTC instant with Z."""
        if self.darkness_radio.isChecked() and self.darkness_iso:
            return self.darkness_iso
        if self.chosen_radio.isChecked():
            return self.chosen_edit.dateTime().toUTC().toString("yyyy-MM-ddTHH:mm:ss") + "Z"
        return "now"

    def set_instant(self, iso_utc: str) -> None:
        """Choose a time (ISO 8601 UTC, e.g. 2027-01-20T03:00:00Z)."""
        moment = QDateTime.fromString(iso_utc.rstrip("Z")[:19], "yyyy-MM-ddTHH:mm:ss")
        moment.setTimeZone(QTimeZone.utc())
        self.chosen_edit.setDateTime(moment)
        self.chosen_radio.setChecked(True)

    def _on_format(self, _index=None) -> None:
        """Give the file name the format's extension (a name of the user's own stays)."""
        path = self.path_edit.text().strip()
        if not path:
            return
        stem, ext = os.path.splitext(path)
        wanted = FORMAT_CHOICES[self.format_combo.currentIndex()][2]
        if ext.lower() in _EXTENSIONS or not ext:
            self.path_edit.setText(stem + wanted)

    def browse(self) -> None:
        _, label, ext = FORMAT_CHOICES[self.format_combo.currentIndex()]
        path, _ = QFileDialog.getSaveFileName(self, "Export positions to", self.path_edit.text(),
                                              f"{label} (*{ext});;All files (*)")
        if path:
            self.path_edit.setText(path)
            self._browsed_path = path  # the file dialog has asked about replacing it

    # ------------------------------------------------------------------ export
    def export(self) -> None:
        """Compute and write in a worker; the summary or the error appears when done."""
        if self.task is not None:
            return
        path = self.path_edit.text().strip()
        self.summary_label.clear()
        self.error_label.clear()
        if not path:
            self.error_label.setText("Choose a file name first.")
            return
        if os.path.exists(path) and path != self._browsed_path and not self._may_replace(path):
            return
        self.export_button.setEnabled(False)
        self.summary_label.setText("Computing and writing…")
        self.task = workers.run_in_worker(
            self, write_positions, self.targets, self.site, self.instant(), self.frame(),
            self.file_format(), self.include_refused.isChecked(), self.tolerance_spin.value(),
            path, on_done=self._on_done, on_error=self._on_error,
            progress_label="Exporting positions…")
        self.task.finished.connect(self._on_finished)

    def _may_replace(self, path: str) -> bool:
        answer = QMessageBox.question(self, "Replace file?",
                                      f"{path} exists. Replace it with the export?")
        return answer == QMessageBox.StandardButton.Yes

    def _on_done(self, summary: ExportSummary) -> None:
        self.summary = summary
        self.summary_label.setText(summary_text(summary))
        self.adjustSize()  # room for the summary's lines
        self.exported.emit(summary)

    def _on_error(self, message: str) -> None:
        self.summary_label.clear()
        self.error_label.setText(f"Not exported: {message}")
        self.adjustSize()

    def _on_finished(self) -> None:
        self.task = None
        self.export_button.setEnabled(True)

    def done(self, result: int) -> None:  # noqa: D401 (Qt name)
        if self.task is not None:
            self.task.cancel()  # a write under way still ends whole (atomic); not shown
        super().done(result)
