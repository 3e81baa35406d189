"""The main window: caution strip, night settings, target list, tabs, ledger dock, status bar.

Layout (top to bottom): the caution strip; a note while the site is only a placeholder; the
night settings bar; a splitter with the target list (filter box above it) on the left and the
tabs Tonight / Sky dome / Drift / Site & limits / Mount on the right; the correction ledger
docked below; the status bar with messages, a progress bar and Cancel while a task runs, and
the clocks. Every action has a keyboard shortcut.

Recompute: any change of targets, site or night settings restarts a RECOMPUTE_DELAY_MS timer;
when it fires, the night's plan and the state at the shown instant run in workers (a newer
request cancels the older one). The shown instant is one for the whole window (gui.instant):
the present on the night that holds it, else the middle of the chosen night, or where the user
clicked the night chart or the timeline; a new night date or site starts over from that rule.
The state is also refreshed every NOW_REFRESH_MS and whenever the selected target changes (for
its correction ledger).
"""
from __future__ import annotations

import os
from dataclasses import replace

from PySide6.QtCore import QSettings, Qt, QTimer
from PySide6.QtGui import QCursor, QKeySequence, QShortcut
from PySide6.QtWidgets import (QAbstractItemView, QApplication, QDockWidget, QFrame,
                               QHBoxLayout, QHeaderView, QLabel, QMainWindow,
                               QMessageBox, QProgressBar, QPushButton, QScrollArea, QSplitter,
                               QTableView, QTabWidget, QToolTip, QVBoxLayout, QWidget)

from epochpoint import __version__
from epochpoint.charts.plan_clock import seconds_of
from epochpoint.io.planfile import schedule_entries

from . import themes, workers
from .caution import CautionStrip
from .document import Document
from .file_actions import FileActions
from .filter_box import FilterBox
from .instant import InstantBar, instant_label, utc_datetime
from .menus import build_menus
from .night_bar import NightBar
from .panels import DriftPanel, LedgerPanel, SiteEditor, SkyDomePanel, TonightPanel
from .panels.calendar_panel import CalendarPanel
from .panels.mount_panel import MountPanel
from .panels.pointing_panel import PointingPanel
from .recompute import night_plan_keeping, now_state, tonight_date
from .schedule_changes import schedule_changes
from .recovery import Autosaver
from .status import StatusClocks
from .tab_order import ScreenTabOrder
from .target_model import COLUMNS, Computed, TargetFilterProxy, TargetTableModel

RECOMPUTE_DELAY_MS = 300
NOW_REFRESH_MS = 30_000
LEDGER_HEIGHT = 250
APP_TITLE = "Epochpoint"


class MainWindow(FileActions, QMainWindow):
    def __init__(self, settings: QSettings | None = None, recovery_folder: str | None = None,
                 interactive: bool = True):
        super().__init__()
        self.settings = settings or QSettings()
        self.interactive = interactive
        self.document = Document(self)
        self.plan = None
        self.now = None
        self.selected: int | None = None
        self._plan_task = self._now_task = None
        self._plan_generation = -1
        self.schedule_changes = None  # what the last search changed (schedule_changes.py)
        # Rows are numbered anew when targets are added or removed: a plan is drawn with the
        # selection, and its clicks are taken, only while it covers the rows as they are.
        self._rows_version = self._plan_rows_version = 0
        self.instant_choice = "auto"  # "auto", "now" or a chosen ISO instant (module docstring)
        self._instant_key = None      # the night date and site the choice was made for
        self._sky_instant = None      # the shown instant last given to the sky dome
        self._targets_for_drift = None

        self._build_central()
        self.actions_by_name = build_menus(self)
        self._fill_recent_menu()
        self._build_status_bar()
        self._connect_document()
        self.autosaver = Autosaver(self.document, recovery_folder, parent=self)
        self._autosave_warned = False
        self.autosaver.failed.connect(self._on_autosave_failed)
        self.autosaver.saved.connect(self._on_autosave_saved)

        self.recompute_timer = QTimer(self)
        self.recompute_timer.setSingleShot(True)
        self.recompute_timer.setInterval(RECOMPUTE_DELAY_MS)
        self.recompute_timer.timeout.connect(self.recompute)
        self.now_timer = QTimer(self)
        self.now_timer.setInterval(NOW_REFRESH_MS)
        self.now_timer.timeout.connect(self.refresh_now)
        self.now_timer.start()

        self.set_theme(themes.saved_theme(self.settings), remember=False)
        self._refresh_document_views()
        self._update_title()
        self.resize(1440, 900)

    # ================================================================== construction
    def _build_central(self) -> None:
        self.caution = CautionStrip()
        self.site_note = QFrame()
        self.site_note.setObjectName("siteNote")
        note_layout = QHBoxLayout(self.site_note)
        note_layout.setContentsMargins(10, 4, 10, 4)
        self.site_note_label = QLabel(
            "The site is a placeholder at latitude 0°, longitude 0°: nothing computed here "
            "applies to your telescope until you set your site (Site & limits tab, Ctrl+4).")
        self.site_note_label.setWordWrap(True)
        set_site = QPushButton("Set the site…")
        set_site.clicked.connect(lambda: self.show_tab(3))
        note_layout.addWidget(self.site_note_label, 1)
        note_layout.addWidget(set_site)
        self.night_bar = NightBar()
        self.instant_bar = InstantBar()
        self.instant_bar.back_to_now.connect(self.show_present)

        # Left: the filter box and the target table.
        self.model = TargetTableModel(self.document, self)
        self.proxy = TargetFilterProxy(self)
        self.proxy.setSourceModel(self.model)
        self.filter_box = FilterBox()  # Esc clears it
        self.filter_box.setPlaceholderText("Filter by name or notes  (Ctrl+F)")
        self.filter_box.setClearButtonEnabled(True)
        self.filter_box.textChanged.connect(self._on_filter_text)
        self.table = QTableView()
        self.table.setObjectName("targetTable")
        self.table.setModel(self.proxy)
        self.table.setSortingEnabled(True)
        self.table.horizontalHeader().setSortIndicator(-1, Qt.SortOrder.AscendingOrder)
        self.table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.table.setSelectionMode(QAbstractItemView.SelectionMode.ExtendedSelection)
        self.table.setEditTriggers(QAbstractItemView.EditTrigger.EditKeyPressed
                                   | QAbstractItemView.EditTrigger.DoubleClicked
                                   | QAbstractItemView.EditTrigger.AnyKeyPressed)
        self.table.setAlternatingRowColors(True)
        self.table.setTabKeyNavigation(False)  # Tab leaves the table; arrows move inside
        self.table.setWordWrap(False)
        self.table.setFocusPolicy(Qt.FocusPolicy.StrongFocus)
        vertical = self.table.verticalHeader()
        vertical.setSectionResizeMode(QHeaderView.ResizeMode.Fixed)  # uniform rows: no scan
        vertical.setDefaultSectionSize(self.fontMetrics().height() + 8)
        vertical.setVisible(False)
        header = self.table.horizontalHeader()
        header.setSectionsMovable(True)
        header.setStretchLastSection(True)
        header.setHighlightSections(False)
        for i, spec in enumerate(COLUMNS):
            header.resizeSection(i, spec.width)
        self.table.selectionModel().currentRowChanged.connect(self._on_current_row)
        # Delete in the list removes the selected targets (undoable); an open cell editor
        # keeps the key for itself.
        delete = QShortcut(QKeySequence(QKeySequence.StandardKey.Delete), self.table)
        delete.setContext(Qt.ShortcutContext.WidgetWithChildrenShortcut)
        delete.activated.connect(self.remove_selected)
        self.model.edit_rejected.connect(self._on_edit_rejected)
        # Results that came while a cell was being typed in are sorted in once it closes.
        self.table.itemDelegate().closeEditor.connect(
            self.model.release_editor, Qt.ConnectionType.QueuedConnection)
        self.count_label = QLabel()
        self.count_label.setProperty("role", "fieldLabel")
        left = QWidget()
        left_layout = QVBoxLayout(left)
        left_layout.setContentsMargins(6, 6, 0, 6)
        top_row = QHBoxLayout()
        heading = QLabel("<b>Targets</b>")
        top_row.addWidget(heading)
        top_row.addWidget(self.filter_box, 1)
        top_row.addWidget(self.count_label)
        left_layout.addLayout(top_row)
        left_layout.addWidget(self.table, 1)

        # Right: the tabs.
        self.tabs = QTabWidget()
        self.tabs.setDocumentMode(True)
        self.tonight, self.skydome = TonightPanel(self), SkyDomePanel(self)
        self.drift, self.site_editor = DriftPanel(self), SiteEditor(self)
        self.mount_panel = MountPanel(self)
        self.mount_panel.status_message.connect(self.show_message)
        for widget, title in ((self.tonight, "&Tonight"), (self.skydome, "S&ky dome"),
                              (self.drift, "D&rift"), (self.site_editor, "Site && &limits"),
                              (self.mount_panel, "M&ount")):
            self.tabs.addTab(widget, title)
        self.drift.target_clicked.connect(self.select_target)  # its own copy of the rows
        for panel in (self.tonight, self.skydome):
            panel.target_clicked.connect(self._on_chart_target)
        self.tonight.instant_clicked.connect(self.set_shown_instant)
        self.site_editor.site_edited.connect(self.document.replace_site)
        self.drift.tolerance_changed.connect(self._on_tolerance_edited)
        # The coming nights as a calendar; a night picked there is planned here.
        self.calendar = CalendarPanel(self)
        self.tabs.addTab(self.calendar, "&Nights")
        self.calendar.night_chosen.connect(self.open_night)
        self.document.changed.connect(self._pass_inputs_to_calendar)
        self._pass_inputs_to_calendar()
        # The mount's pointing model, fitted to centred stars.
        self.pointing_panel = PointingPanel(self)
        self.pointing_panel.status_message.connect(self.show_message)
        self.tabs.addTab(self.pointing_panel, "&Pointing model")

        self.splitter = QSplitter(Qt.Orientation.Horizontal)
        self.splitter.addWidget(left)
        self.splitter.addWidget(self.tabs)
        self.splitter.setStretchFactor(0, 5)
        self.splitter.setStretchFactor(1, 7)
        self.splitter.setSizes([600, 840])
        self.splitter.setChildrenCollapsible(False)

        central = QWidget()
        layout = QVBoxLayout(central)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.setSpacing(0)
        layout.addWidget(self.caution)
        layout.addWidget(self.site_note)
        layout.addWidget(self.night_bar)
        layout.addWidget(self.instant_bar)
        layout.addWidget(self.splitter, 1)
        self.setCentralWidget(central)
        self.night_bar.night_edited.connect(self._on_night_edited)

        # Bottom: the correction ledger.
        self.ledger = LedgerPanel(self)
        self.ledger_dock = QDockWidget("Correction ledger", self)
        self.ledger_dock.setObjectName("ledgerDock")
        ledger_scroll = QScrollArea()  # so the dock may be shorter than the ledger's full height
        ledger_scroll.setWidget(self.ledger)
        ledger_scroll.setWidgetResizable(True)
        ledger_scroll.setFrameShape(QFrame.Shape.NoFrame)
        self.ledger_dock.setWidget(ledger_scroll)
        self.ledger_dock.setFeatures(QDockWidget.DockWidgetFeature.DockWidgetMovable
                                     | QDockWidget.DockWidgetFeature.DockWidgetClosable)
        self.addDockWidget(Qt.DockWidgetArea.BottomDockWidgetArea, self.ledger_dock)
        self.resizeDocks([self.ledger_dock], [LEDGER_HEIGHT], Qt.Orientation.Vertical)

        # Tab order: filter, table, night settings, tabs; inside each panel (a tab's page or
        # the ledger), the screen order (tab_order.py), pages added later included.
        bar = self.night_bar
        chain = [self.filter_box, self.table, bar.date, bar.darkness, bar.min_alt,
                 bar.max_airmass, bar.moon_sep, bar.moon_scaled, self.tabs]
        for first, second in zip(chain, chain[1:]):
            QWidget.setTabOrder(first, second)
        self.screen_tab_order = ScreenTabOrder(self)
        for panel in [self.ledger] + [self.tabs.widget(i) for i in range(self.tabs.count())]:
            self.screen_tab_order.watch(panel)
        self.tabs.currentChanged.connect(
            lambda i: self.screen_tab_order.watch(self.tabs.widget(i)))

    def _build_status_bar(self) -> None:
        status = self.statusBar()
        self.progress = QProgressBar()
        self.progress.setMaximumWidth(160)
        self.progress.setRange(0, 0)
        self.progress.setTextVisible(False)
        self.progress_label = QLabel()
        self.cancel_button = QPushButton("Cancel")
        self.cancel_button.setToolTip("Stop the running computation")
        self.cancel_button.clicked.connect(workers.tracker().cancel_all)
        self.clocks = StatusClocks()
        self.autosave_note = QLabel()  # stays while autosaves fail (file_actions)
        self.autosave_note.setObjectName("autosaveNote")
        self.autosave_note.setProperty("role", "status")
        self.autosave_note.setProperty("stale", "true")  # the warning style
        for widget in (self.autosave_note, self.progress_label, self.progress,
                       self.cancel_button):
            status.addPermanentWidget(widget)
            widget.hide()
        status.addPermanentWidget(self.clocks)
        workers.tracker().changed.connect(self._on_tasks_changed)
        workers.tracker().progressed.connect(self._on_task_progress)

    def _connect_document(self) -> None:
        doc = self.document
        doc.changed.connect(self._schedule_recompute)
        doc.rows_reset.connect(self._on_rows_reset)
        doc.site_changed.connect(self._on_site_changed)
        doc.night_changed.connect(self.night_bar.set_night)
        doc.tolerance_changed.connect(self._on_tolerance_changed)
        doc.dirty_changed.connect(lambda _d: self._update_title())
        doc.path_changed.connect(lambda _p: self._update_title())

    def showEvent(self, event):  # noqa: N802 (Qt name)
        super().showEvent(event)
        self.resizeDocks([self.ledger_dock], [LEDGER_HEIGHT], Qt.Orientation.Vertical)

    # ================================================================== document views
    def _refresh_document_views(self) -> None:
        doc = self.document
        self.night_bar.set_night(doc.night)
        self._on_site_changed(doc.site)
        self._on_tolerance_changed(doc.tolerance)
        self._on_rows_reset()

    def _on_site_changed(self, site) -> None:
        self.caution.set_sun_avoidance(site.interlocks.sun_avoidance)
        self._show_solar_caution()
        self.site_note.setVisible(self.document.has_placeholder_site)
        self.clocks.set_site(site)
        self.site_editor.set_site(site)
        self.mount_panel.set_site(site)
        self.pointing_panel.set_site(site)

    def _on_tolerance_changed(self, arcsec: float) -> None:
        self.drift.set_tolerance(arcsec)

    def _on_tolerance_edited(self, arcsec: float) -> None:
        try:
            self.document.change_tolerance(arcsec)
        except ValueError as err:
            self.show_message(str(err))

    def _on_night_edited(self, night, field: str) -> None:
        try:
            self.document.change_night(night, field)
        except ValueError as err:
            self.show_message(f"Night settings: {err}")
            self.night_bar.set_night(self.document.night)

    def _show_solar_caution(self) -> None:
        """The solar caution while a Sun row is present with the solar option on; with it
        off, the reason the Sun is refused (gui.caution)."""
        has_sun = bool((self.document.kinds() == "Sun").any())
        self.caution.set_solar(has_sun, self.document.site.interlocks.solar_filter_fitted)

    def _on_rows_reset(self) -> None:
        self._rows_version += 1
        self._show_solar_caution()
        self._set_selected(None)
        self._update_count()
        self._targets_for_drift = None
        if self.document.row_count():
            # A selected target fills the ledger; the first row is as good a start as any.
            first = self.proxy.index(0, 0)
            self.table.setCurrentIndex(first)
            self.table.selectRow(0)
        self._pass_targets_to_drift()

    def _pass_targets_to_drift(self) -> None:
        targets = self.document.targets()
        if targets is not self._targets_for_drift:
            self._targets_for_drift = targets
            self.drift.set_targets(targets)
            self.mount_panel.set_targets(targets)

    def _on_filter_text(self, text: str) -> None:
        self.proxy.setFilterFixedString(text)
        self._update_count()

    def _update_count(self) -> None:
        total = self.document.row_count()
        shown = self.proxy.rowCount()
        self.count_label.setText(f"{total} targets" if shown == total
                                 else f"{shown} of {total} shown")

    def _update_title(self) -> None:
        name = os.path.basename(self.document.path) if self.document.path else "untitled"
        self.setWindowTitle(f"{name}[*] — {APP_TITLE}")
        self.setWindowModified(self.document.dirty)

    # ================================================================== selection
    def _on_current_row(self, current, _previous) -> None:
        row = self.proxy.doc_row(current) if current.isValid() else None
        self._set_selected(row)

    def _set_selected(self, doc_row: int | None) -> None:
        if doc_row == self.selected:
            return
        self.selected = doc_row
        for panel in (self.drift, self.mount_panel):
            panel.set_selected(doc_row)
        for panel in (self.tonight, self.skydome):
            panel.set_selected(None if self._stale_plan_shown() else doc_row)
        if doc_row is None:
            self.ledger.set_row(None)
        else:
            self.refresh_now()

    def _stale_plan_shown(self) -> bool:
        """Whether the charts show a plan of an earlier list (rows numbered otherwise)."""
        return self.plan is not None and self._plan_rows_version != self._rows_version

    def _on_chart_target(self, plan_index: int) -> None:
        """A click on a chart's target: taken unless the chart's plan is of an earlier list."""
        if not self._stale_plan_shown():
            self.select_target(plan_index)

    def select_target(self, doc_row: int) -> None:
        """Select a target by its document row (from a panel click): shown and current."""
        if not 0 <= doc_row < self.document.row_count():
            return
        index = self.proxy.index_of(doc_row)
        if not index.isValid():  # hidden by the filter: clear it so the target shows
            self.filter_box.clear()
            index = self.proxy.index_of(doc_row)
        self.table.setCurrentIndex(index)
        self.table.selectRow(index.row())
        self.table.scrollTo(index)

    def selected_rows(self) -> list[int]:
        rows = {self.proxy.doc_row(i) for i in self.table.selectionModel().selectedRows()}
        if not rows and self.table.currentIndex().isValid():
            rows = {self.proxy.doc_row(self.table.currentIndex())}
        return sorted(rows)

    # ================================================================== recompute
    def _schedule_recompute(self) -> None:
        self.recompute_timer.start()
        self._update_count()

    def recompute(self) -> None:
        """Start the night plan and the state now in workers (older runs are cancelled)."""
        self.recompute_timer.stop()
        doc = self.document
        self._pass_targets_to_drift()
        if self._plan_task is not None:
            self._plan_task.cancel()
        generation = doc.generation
        # A plan just opened shows its saved schedule; an edit or F5 (replan) searches anew.
        saved = list(doc.schedule) if doc.schedule_from_file else None
        if doc.row_count() == 0:
            self._on_plan(generation, (None, False))
        else:
            self._plan_task = workers.run_in_worker(
                self, night_plan_keeping, doc.targets(), doc.site, doc.night, saved,
                on_done=lambda result: self._on_plan(generation, result),
                on_error=lambda message: self._on_failed("Planning the night", message),
                progress_label="Planning the night…")
        self.refresh_now()

    def replan(self) -> None:
        """Plan the night again on request (F5), even when the saved schedule is shown."""
        self.document.schedule_from_file = False
        self.recompute()

    def refresh_now(self) -> None:
        """Positions at the shown instant for every target, and the selected target's
        correction ledger."""
        doc = self.document
        if self._now_task is not None:
            self._now_task.cancel()
        key = (doc.night.date, doc.site.latitude, doc.site.longitude)
        if key != self._instant_key:  # another night or place: start over from the rule
            self._instant_key, self.instant_choice = key, "auto"
        if doc.row_count() == 0:
            self.model.set_computed(None)
            return
        generation = doc.generation
        self._now_task = workers.run_in_worker(
            self, now_state, doc.targets(), doc.site, self.instant_choice, self.selected,
            doc.night.date,
            on_done=lambda state: self._on_now(generation, state),
            on_error=lambda message: self._on_failed("Positions at the shown instant",
                                                     message),
            progress_label="Positions at the shown instant…")

    def set_shown_instant(self, iso: str) -> None:
        """Show the window at a chosen instant (a click on the night chart or timeline)."""
        self.instant_choice = iso
        self.refresh_now()

    def show_present(self) -> None:
        """Back to the present: tonight's night (if another is shown) at the present instant."""
        tonight = tonight_date(self.document.site)
        if tonight != self.document.night.date:
            self._on_night_edited(replace(self.document.night, date=tonight), "date")
            self.show_message(f"Showing tonight ({tonight}) at the present instant; Undo "
                              "(Ctrl+Z) returns to the night shown before.")
        self._instant_key = (self.document.night.date, self.document.site.latitude,
                             self.document.site.longitude)
        self.instant_choice = "now"
        self.refresh_now()

    def _on_plan(self, generation: int, result) -> None:
        if generation != self.document.generation:
            return  # the document changed meanwhile; a newer run is on its way
        plan, kept = result
        wanted_saved = self.document.schedule_from_file
        self.plan, self._plan_generation = plan, generation
        self._plan_rows_version = self._rows_version
        self.schedule_changes = None
        if plan is not None:
            entries = schedule_entries(plan)
            if not kept:  # what the new search changed against the schedule shown before
                self.schedule_changes = schedule_changes(self.document.schedule, entries)
            self.document.schedule = entries
        for panel in (self.tonight, self.skydome):
            panel.set_plan(plan)
            panel.set_selected(self.selected)
        self._sky_at_shown_instant()
        self._show_computed()
        if plan is not None:
            self.show_message(self._plan_message(plan, kept, wanted_saved), 15000)

    def _plan_message(self, plan, kept: bool, wanted_saved: bool) -> str:
        night = f"Night of {plan.night.date.isoformat()}"
        blocks = f"{len(plan.schedule.index)} blocks"
        if kept:
            return f"{night}: the saved schedule ({blocks}); F5 plans it again."
        text = f"{night} planned: {blocks} scheduled; {self.schedule_changes.text()}."
        if wanted_saved:
            text += " (The saved schedule no longer fits the targets, site or night.)"
        return text

    def _on_now(self, generation: int, state) -> None:
        if generation != self.document.generation:
            return
        self.now = state
        zone = self.document.site.timezone
        label = instant_label(state.time, zone)
        self.model.set_instant_label(label, state.time)
        self.instant_bar.show_instant(state.time, state.kind, zone)
        self.tonight.set_instant(state.time)
        if self.skydome.plan is not None and state.time != self._sky_instant:
            self._sky_at_shown_instant()
        self._show_computed()
        if state.selected == self.selected:
            row = state.ledger_row
            if row is not None:
                row = dict(row, instant_label=label, instant_kind=state.kind)
            self.ledger.set_row(row)
        if state.earth_orientation_warning:
            self.clocks.table_age.setToolTip(state.earth_orientation_warning)

    def _sky_at_shown_instant(self) -> None:
        """The sky dome opens at the shown instant (its slider may then wander the night)."""
        instant = utc_datetime(self.now.time) if self.now is not None else None
        if instant is None or self.skydome.plan is None:
            return
        self._sky_instant = self.now.time
        self.skydome.set_time(seconds_of(self.skydome.plan, instant))

    def _show_computed(self) -> None:
        now, plan = self.now, self.plan
        if now is None or len(now.alt) != self.document.row_count():
            return
        tonight = None  # unknown until the plan of this very state arrives
        if plan is not None and self._plan_generation == self.document.generation:
            tonight = plan.windows.reason
        self.model.set_computed(Computed(alt_now=now.alt, refused_now=now.refused,
                                         tonight=tonight, drift=now.drift,
                                         ra_date=now.ra_date, dec_date=now.dec_date),
                                keep=self._open_editor_cell())

    def _open_editor_cell(self):
        """(model row, column) of the target table's open cell editor, or None."""
        if self.table.state() != QAbstractItemView.State.EditingState:
            return None
        index = self.proxy.mapToSource(self.table.currentIndex())
        return (index.row(), index.column()) if index.isValid() else None

    def _on_failed(self, what: str, message: str) -> None:
        self.show_message(f"{what} failed: {message}", 10000)

    def _on_tasks_changed(self) -> None:
        t = workers.tracker()
        busy = t.busy()
        for widget in (self.progress_label, self.progress, self.cancel_button):
            widget.setVisible(busy)
        if busy:
            self.progress.setRange(0, 0)
            self.progress_label.setText(t.label())

    def _on_task_progress(self, label: str, fraction: float) -> None:
        self.progress.setRange(0, 1000)
        self.progress.setValue(int(fraction * 1000))
        self.progress_label.setText(label)

    def computing(self) -> bool:
        """True while a recompute is pending or running (tests and the screenshot wait)."""
        return self.recompute_timer.isActive() or workers.tracker().busy()

    # ================================================================== edits
    def _on_edit_rejected(self, doc_row: int, key: str, reason: str) -> None:
        self.show_message(f"Not changed — {reason}", 10000)
        index = self.proxy.index_of(doc_row, [c.key for c in COLUMNS].index(key))
        rect = self.table.visualRect(index)
        QToolTip.showText(self.table.viewport().mapToGlobal(rect.bottomLeft())
                          if rect.isValid() else QCursor.pos(), reason, self.table)

    def add_target(self) -> None:
        row = self.document.add_target()
        self.filter_box.clear()
        index = self.proxy.index_of(row)
        self.table.setCurrentIndex(index)
        self.table.scrollTo(index)
        self.table.setFocus()
        self.table.edit(index)

    def remove_selected(self) -> None:
        rows = self.selected_rows()
        if rows:
            self.document.remove_targets(rows)
            self.show_message(f"Removed {len(rows)} target(s); Undo (Ctrl+Z) brings them back.")

    def focus_filter(self) -> None:
        self.filter_box.setFocus()
        self.filter_box.selectAll()

    def show_tab(self, i: int) -> None:
        self.tabs.setCurrentIndex(i)
        self.tabs.currentWidget().setFocus()

    def _pass_inputs_to_calendar(self) -> None:
        doc = self.document
        self.calendar.set_inputs(doc.targets(), doc.site, doc.night.darkness,
                                 doc.night.min_altitude)

    def open_night(self, date: str) -> None:
        """Plan the night of `date` (picked in the Nights tab): the same undoable change as
        the night bar's date, then the Tonight tab."""
        if date != self.document.night.date:
            self._on_night_edited(replace(self.document.night, date=date), "date")
        self.show_tab(self.tabs.indexOf(self.tonight))

    # ================================================================== theme, help, messages
    def toggle_night_theme(self) -> None:
        self.set_theme("light" if themes.current_theme() == "night" else "night")

    def set_theme(self, theme: str, remember: bool = True) -> None:
        theme = themes.apply_theme(QApplication.instance(), theme)
        self.model.set_theme(theme)
        action = self.actions_by_name["night"]
        action.blockSignals(True)
        action.setChecked(theme == "night")
        action.blockSignals(False)
        if remember:
            themes.save_theme(self.settings, theme)

    def show_about(self) -> None:
        QMessageBox.about(self, "About Epochpoint",
                          f"<b>Epochpoint {__version__}</b><br>Carries catalogue targets to "
                          "the moment of observation, plans the night and hands corrected "
                          "coordinates to the telescope.")

    def show_message(self, text: str, timeout_ms: int = 8000) -> None:
        self.statusBar().showMessage(text, timeout_ms)

    def show_error(self, title: str, text: str) -> None:
        """An error for the user: a message box when interactive, the status bar otherwise."""
        self.show_message(f"{title}: {text}", 15000)
        if self.interactive:
            QMessageBox.warning(self, title, text)

    def ask(self, title: str, text: str) -> bool:
        answer = QMessageBox.question(self, title, text)
        return answer == QMessageBox.StandardButton.Yes

    # ================================================================== closing
    def closeEvent(self, event):  # noqa: N802 (Qt name)
        if not self.maybe_save():
            event.ignore()
            return
        self.shutdown()
        event.accept()

    def shutdown(self) -> None:
        """Stop timers and workers and remove the recovery file (an orderly exit)."""
        for timer in (self.recompute_timer, self.now_timer, self.clocks.timer,
                      self.autosaver.timer):
            timer.stop()
        self.autosaver.clear()  # saved or knowingly discarded; a crash never gets here
        self.mount_panel.shutdown()  # aborts a slew it still follows, closes the connection
        workers.wait_for_workers()

