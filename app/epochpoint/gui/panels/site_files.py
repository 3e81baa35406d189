"""Site files and horizon files for the Site & limits tab: load and save, as the command line
reads them (io.sitefile: a TOML site file; io.sitelimits: the two-column horizon text).

Loading fills the form and applies it like any edit (one undoable change; a bad file is shown
in the status line and changes nothing). Saving writes what the form holds, atomically, and
only when every field is valid: the fields at fault are named instead. Mixed into SiteEditor,
whose form, horizon editor and status line it uses.
"""
from __future__ import annotations

import os

from PySide6.QtWidgets import QFileDialog, QHBoxLayout, QPushButton

from ...io.errors import InputError
from ...io.sitefile import read_site_file
from ...io.sitelimits import read_horizon_file
from ...io.sitewrite import write_horizon_file, write_site_file

SITE_FILE_FILTER = "Site files (*.toml);;All files (*)"
HORIZON_FILE_FILTER = "Horizon files (*.txt *.hrz *.csv);;All files (*)"


def _one_line(err: BaseException) -> str:
    if isinstance(err, OSError) and err.filename:
        return f"{err.filename}: {err.strerror or err}"
    return " ".join(str(err).split())


class SiteFiles:
    """Load and save buttons and their work (see module docstring)."""

    def _file_row(self) -> QHBoxLayout:
        """Load/Save buttons for the whole site (the horizon editor has its own)."""
        self.load_site_button = QPushButton("Load site file…")
        self.load_site_button.setToolTip("Read a TOML site file, as the command line's --site")
        self.save_site_button = QPushButton("Save site file…")
        self.save_site_button.setToolTip("Write the form as a TOML site file")
        self.load_site_button.clicked.connect(self._load_site_dialog)
        self.save_site_button.clicked.connect(self._save_site_dialog)
        self.horizon.load_button.clicked.connect(self._load_horizon_dialog)
        self.horizon.save_button.clicked.connect(self._save_horizon_dialog)
        row = QHBoxLayout()
        row.addWidget(self.load_site_button)
        row.addWidget(self.save_site_button)
        row.addStretch(1)
        return row

    # -- the work (tests call these directly) -------------------------------------------------
    def load_site_file(self, path: str) -> bool:
        """Fill the form from a site file and apply it; False (and the reason) if unreadable."""
        try:
            site, _ = read_site_file(path)
        except (InputError, OSError, ValueError) as err:
            self.status.setText(f"Not loaded: {_one_line(err)}")
            return False
        in_force = self.site
        self.set_site(site)  # fills the form (and the mount's park position)
        self.site = in_force  # ... but the site in force changes only through commit
        self.commit()
        if not self.problems:
            # A file may switch the solar option on: said with its caution, as the box does.
            solar = (" Its solar option is on (a solar filter declared fitted). " +
                     " ".join(site.interlocks.cautions())) \
                if site.interlocks.solar_filter_fitted else ""
            self.status.setText(f"Loaded {os.path.basename(path)}.{solar}")
        return not self.problems

    def save_site_file(self, path: str) -> bool:
        """Write the form as a site file; refused (fields named) while a field is invalid."""
        site, problems, _ = self.build_site()
        self._show_problems(problems)
        if problems:
            self.status.setText("Not saved: fix the fields marked ✖ first ("
                                + ", ".join(problems) + ").")
            return False
        try:
            write_site_file(path, site)
        except (InputError, OSError, ValueError) as err:
            self.status.setText(f"Not saved: {_one_line(err)}")
            return False
        self.status.setText(f"Saved {path}.")
        return True

    def load_horizon_file(self, path: str) -> bool:
        """Replace the horizon points with a horizon file's and apply them."""
        try:
            mask = read_horizon_file(path)
        except (InputError, OSError, ValueError) as err:
            self.status.setText(f"Horizon not loaded: {_one_line(err)}")
            return False
        self.horizon.set_mask(mask)
        self.commit()
        if "horizon" not in self.problems:
            self.status.setText(f"Loaded the horizon of {os.path.basename(path)}.")
        return "horizon" not in self.problems

    def save_horizon_file(self, path: str) -> bool:
        """Write the horizon points (azimuth order) as two columns; refused if one is bad."""
        site, problems, mask = self.build_site()
        if "horizon" in problems or mask is False:
            self.status.setText(f"Horizon not saved: {problems.get('horizon', 'bad points')}")
            return False
        if mask is None:
            self.status.setText("Horizon not saved: the table has no points.")
            return False
        try:
            write_horizon_file(path, mask.azimuth, mask.altitude)
        except (InputError, OSError, ValueError) as err:
            self.status.setText(f"Horizon not saved: {_one_line(err)}")
            return False
        self.status.setText(f"Saved the horizon to {path}.")
        return True

    # -- the dialogs ----------------------------------------------------------------------------
    def _load_site_dialog(self) -> None:
        path, _ = QFileDialog.getOpenFileName(self, "Load site file", "", SITE_FILE_FILTER)
        if path:
            self.load_site_file(path)

    def _save_site_dialog(self) -> None:
        path, _ = QFileDialog.getSaveFileName(self, "Save site file", "site.toml",
                                              SITE_FILE_FILTER)
        if path:
            self.save_site_file(path)

    def _load_horizon_dialog(self) -> None:
        path, _ = QFileDialog.getOpenFileName(self, "Load horizon file", "",
                                              HORIZON_FILE_FILTER)
        if path:
            self.load_horizon_file(path)

    def _save_horizon_dialog(self) -> None:
        path, _ = QFileDialog.getSaveFileName(self, "Save horizon file", "horizon.txt",
                                              HORIZON_FILE_FILTER)
        if path:
            self.save_horizon_file(path)
