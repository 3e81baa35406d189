"""The mount tab's pointing-model row: slew with a fitted model, and record centred stars.

"Slew with the model" loads a model file (the Pointing model tab saves one; JSON, see
core.pointing_model.model); the mount panel then asks mount.pointing_for and slew_to_target
for the corrected place, and its confirmation shows the sky place and the commanded one.
"Record centred star" appears useful after a slew: the user centres the star with the hand
controller, presses it, and the mount panel appends one sample to the chosen samples file
(mount.calibration.read_sample in the mount job thread; io.pointing_samples).
"""
from __future__ import annotations

from PySide6.QtCore import Signal
from PySide6.QtWidgets import (QCheckBox, QFileDialog, QHBoxLayout, QLabel, QLineEdit,
                               QPushButton, QVBoxLayout, QWidget)

from ...core.pointing_model import ModelError

MODEL_FILTER = "Pointing model (*.json);;All files (*)"
SAMPLES_FILTER = "Pointing samples (*.csv);;All files (*)"


class MountPointingRow(QWidget):
    """Model file and samples file for the mount panel (module docstring)."""

    model_changed = Signal()  # the model in use changed: the verdict must be checked again
    record_requested = Signal()
    said = Signal(str)  # a line for the mount panel's log

    def __init__(self, parent=None):
        super().__init__(parent)
        self.model = None  # the loaded core.pointing_model.PointingModel
        self.use_model = QCheckBox("Slew with the pointing &model")
        self.use_model.setToolTip("Command the model-corrected place (load a model file "
                                  "saved by the Pointing model tab)")
        self.use_model.setEnabled(False)
        self.use_model.toggled.connect(lambda _on: self.model_changed.emit())
        self.model_edit = QLineEdit()
        self.model_edit.setPlaceholderText("model file (JSON)")
        self.model_edit.returnPressed.connect(lambda: self.load_model(self.model_edit.text()))
        model_browse = QPushButton("Load…")
        model_browse.clicked.connect(self._browse_model)
        self.samples_edit = QLineEdit()
        self.samples_edit.setPlaceholderText("samples file (CSV) to append to")
        samples_browse = QPushButton("Choose…")
        samples_browse.clicked.connect(self._browse_samples)
        self.record_button = QPushButton("&Record centred star")
        self.record_button.setToolTip("After a slew: centre the star by hand, then press to "
                                      "append where the axes are to the samples file")
        self.record_button.setEnabled(False)
        self.record_button.clicked.connect(self.record_requested)

        model_row = QHBoxLayout()
        model_row.addWidget(self.use_model)
        model_row.addWidget(self.model_edit, 1)
        model_row.addWidget(model_browse)
        record_row = QHBoxLayout()
        record_row.addWidget(self.record_button)
        record_row.addWidget(QLabel("to"))
        record_row.addWidget(self.samples_edit, 1)
        record_row.addWidget(samples_browse)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addLayout(model_row)
        layout.addLayout(record_row)

    def model_in_use(self):
        """The model to slew with, or None."""
        return self.model if self.use_model.isChecked() else None

    def samples_path(self) -> str:
        return self.samples_edit.text().strip()

    def load_model(self, path: str) -> bool:
        """Load a model file; a bad one is one line in the log and the old model stays."""
        from ...cli.pointing_cmd import load_model

        path = str(path).strip()
        try:
            model = load_model(path)
        except (ModelError, OSError, ValueError) as err:
            self.said.emit(f"Model not loaded: {' '.join(str(err).split())}")
            return False
        self.model = model
        self.model_edit.setText(path)
        self.use_model.setEnabled(True)
        self.said.emit(f"Pointing model loaded from {path} ({model.mount_type}, "
                       f"{len(model.values)} terms, {model.rms_after_arcsec:.1f}″ rms).")
        self.model_changed.emit()
        return True

    def _browse_model(self) -> None:
        path, _ = QFileDialog.getOpenFileName(self, "Pointing model", self.model_edit.text(),
                                              MODEL_FILTER)
        if path:
            self.load_model(path)

    def _browse_samples(self) -> None:
        path, _ = QFileDialog.getSaveFileName(
            self, "Samples file to append to", self.samples_edit.text() or "samples.csv",
            SAMPLES_FILTER, options=QFileDialog.Option.DontConfirmOverwrite)
        if path:
            self.samples_edit.setText(path)
