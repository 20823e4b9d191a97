"""The main window: page navigation, docks, menus, files, undo, autosave."""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QSettings, Qt, QTimer
from PySide6.QtGui import QAction, QCloseEvent, QKeySequence
from PySide6.QtWidgets import (
    QFileDialog,
    QHBoxLayout,
    QLabel,
    QListWidget,
    QMainWindow,
    QMessageBox,
    QStackedWidget,
    QWidget,
)

from app import autosave
from app.controller import StudyController
from app.docks import DerivationDock, NoticesDock
from app.pages.band_plan import BandPlanPage
from core import __version__
from core.edits import ReplaceStudy
from core.study import Study, StudyError, load_study, save_study

__all__ = ["MainWindow"]

_FILE_FILTER = "Bandwright study (*.json);;All files (*)"
_MAX_RECENT = 8


def page_classes() -> list[type]:
    """Page classes in navigation order (each added when it works; no placeholders)."""
    from app.pages.array_sizing import ArraySizingPage
    from app.pages.candidates import CandidatesPage
    from app.pages.curves import CurvesPage
    from app.pages.die_cost import DieCostPage
    from app.pages.link_ledger import LinkLedgerPage
    from app.pages.process_cards import ProcessCardsPage
    from app.pages.scorecard import ScorecardPage

    return [
        BandPlanPage,
        LinkLedgerPage,
        ProcessCardsPage,
        CandidatesPage,
        ScorecardPage,
        CurvesPage,
        ArraySizingPage,
        DieCostPage,
    ]


class MainWindow(QMainWindow):
    """Bandwright's main window over one :class:`StudyController`."""

    def __init__(self, study: Study, path: Path | None = None, *, ask_recover: bool = True):
        super().__init__()
        self.setObjectName("MainWindow")
        self.controller = StudyController(study, path, self)
        c = self.controller
        self.settings = QSettings()

        self.nav = QListWidget()
        self.nav.setObjectName("PageList")
        self.nav.setFixedWidth(170)
        self.stack = QStackedWidget()
        self.pages: list[QWidget] = []
        for cls in page_classes():
            page = cls(c)
            self.pages.append(page)
            self.stack.addWidget(page)
            self.nav.addItem(page.title)
        self.nav.currentRowChanged.connect(self.stack.setCurrentIndex)
        self.nav.setCurrentRow(0)
        central = QWidget()
        lay = QHBoxLayout(central)
        lay.setContentsMargins(4, 4, 4, 4)
        lay.addWidget(self.nav)
        lay.addWidget(self.stack, 1)
        self.setCentralWidget(central)

        self.derivation = DerivationDock(self)
        self.addDockWidget(Qt.DockWidgetArea.RightDockWidgetArea, self.derivation)
        self.notices = NoticesDock(self)
        self.addDockWidget(Qt.DockWidgetArea.BottomDockWidgetArea, self.notices)
        self.resizeDocks([self.derivation], [340], Qt.Orientation.Horizontal)
        self.resizeDocks([self.notices], [130], Qt.Orientation.Vertical)

        self.status_notices = QLabel()
        self.status_time = QLabel()
        self.statusBar().addPermanentWidget(self.status_notices)
        self.statusBar().addPermanentWidget(self.status_time)

        self._build_menus()

        c.undo_stack.cleanChanged.connect(self._on_undo_stack_clean_changed)
        c.path_changed.connect(self._on_controller_path_changed)
        c.study_changed.connect(self._on_controller_study_changed)
        c.notices_changed.connect(self._on_controller_notices_changed)
        c.evaluation_changed.connect(self._on_controller_evaluation_changed)
        c.derivation_requested.connect(self.derivation.show_derivation)
        c.edit_refused.connect(self._on_controller_edit_refused)

        self._autosave_timer = QTimer(self)
        self._autosave_timer.setInterval(autosave.AUTOSAVE_INTERVAL_MS)
        self._autosave_timer.timeout.connect(self.write_autosave)
        self._autosave_timer.start()

        self.resize(1480, 920)
        c.reset(study, path)
        self._update_title()
        if ask_recover:
            QTimer.singleShot(0, self.offer_recovery)

    # -- menus ---------------------------------------------------------------------------
    def _build_menus(self) -> None:
        c = self.controller
        m = self.menuBar().addMenu("&File")
        self.act_new = self._action(m, "&New", self.file_new, QKeySequence.StandardKey.New)
        self.act_open = self._action(m, "&Open…", self.file_open, QKeySequence.StandardKey.Open)
        self.recent_menu = m.addMenu("Open &Recent")
        self._rebuild_recent()
        m.addSeparator()
        self.act_save = self._action(m, "&Save", self.file_save, QKeySequence.StandardKey.Save)
        self.act_save_as = self._action(
            m, "Save &As…", self.file_save_as, QKeySequence.StandardKey.SaveAs
        )
        self.act_revert = self._action(m, "Re&vert to Saved", self.file_revert)
        self.file_menu = m
        m.addSeparator()
        self.act_export_xlsx = self._action(
            m, "&Export Comparison Workbook…", self.export_workbook, QKeySequence("Ctrl+E")
        )
        self._action(m, "Export Scorecard as &CSV…", self.export_scorecard_csv)
        self._action(m, "Export Curves as CS&V…", self.export_curves_csv)
        m.addSeparator()
        self._action(m, "&Quit", self.close, QKeySequence.StandardKey.Quit)

        e = self.menuBar().addMenu("&Edit")
        undo = c.undo_stack.createUndoAction(self, "&Undo")
        undo.setShortcut(QKeySequence.StandardKey.Undo)
        redo = c.undo_stack.createRedoAction(self, "&Redo")
        redo.setShortcut(QKeySequence.StandardKey.Redo)
        e.addAction(undo)
        e.addAction(redo)
        self.act_undo, self.act_redo = undo, redo
        e.addSeparator()
        self.act_copy_scorecard = self._action(
            e, "&Copy Scorecard as Text", self.copy_scorecard, QKeySequence("Ctrl+Shift+C")
        )

        v = self.menuBar().addMenu("&View")
        v.addAction(self.derivation.toggleViewAction())
        v.addAction(self.notices.toggleViewAction())
        h = self.menuBar().addMenu("&Help")
        self._action(h, "&About Bandwright", self.show_about)

    def _action(self, menu, text, slot, shortcut=None) -> QAction:
        act = QAction(text, self)
        if shortcut is not None:
            act.setShortcut(shortcut)
        act.triggered.connect(slot)
        menu.addAction(act)
        return act

    # -- titles and status ---------------------------------------------------------------
    def _update_title(self) -> None:
        path = self.controller.path
        where = path.name if path else "not saved"
        self.setWindowTitle(f"{self.controller.study.name} — {where}[*] — Bandwright")
        self.setWindowModified(not self.controller.undo_stack.isClean())
        self.act_revert.setEnabled(path is not None)

    def _on_undo_stack_clean_changed(self, _clean: bool) -> None:
        self._update_title()

    def _on_controller_path_changed(self, _path: object) -> None:
        self._update_title()

    def _on_controller_study_changed(self, _study: object) -> None:
        self._update_title()

    def _on_controller_notices_changed(self, problems: list) -> None:
        self.notices.set_problems(problems)
        errors, warnings = self.notices.counts()
        self.status_notices.setText(f"Notices: {errors} errors, {warnings} warnings")

    def _on_controller_evaluation_changed(self, _ev: object, seconds: float) -> None:
        self.status_time.setText(f"Recomputed in {1000 * seconds:.1f} ms")

    def _on_controller_edit_refused(self, path: str, reason: str) -> None:
        self.statusBar().showMessage(f"Not applied — {path}: {reason}", 8000)

    # -- files ---------------------------------------------------------------------------
    def maybe_save(self) -> bool:
        """Ask Save / Discard / Cancel if there are unsaved changes; True = go on."""
        if self.controller.undo_stack.isClean():
            return True
        box = QMessageBox(self)
        box.setIcon(QMessageBox.Icon.Warning)
        box.setWindowTitle("Unsaved changes")
        box.setText(f"Save the changes to “{self.controller.study.name}”?")
        box.setInformativeText("Your changes will be lost if you don't save them.")
        box.setStandardButtons(
            QMessageBox.StandardButton.Save
            | QMessageBox.StandardButton.Discard
            | QMessageBox.StandardButton.Cancel
        )
        box.setDefaultButton(QMessageBox.StandardButton.Save)
        answer = box.exec()
        if answer == QMessageBox.StandardButton.Save:
            return self.file_save()
        if answer == QMessageBox.StandardButton.Discard:
            autosave.discard(self.controller.path)
            return True
        return False

    def open_path(self, path: Path) -> bool:
        try:
            study = load_study(path)
        except StudyError as exc:
            QMessageBox.warning(
                self,
                "Cannot open study",
                str(exc) + "\n\n" + "\n".join(str(p) for p in exc.problems[1:12]),
            )
            return False
        self.controller.reset(study, path)
        self._add_recent(path)
        self.offer_recovery()
        return True

    def file_new(self) -> None:
        if self.maybe_save():
            self.controller.reset(Study.new(), None)

    def file_open(self) -> None:
        if not self.maybe_save():
            return
        name, _ = QFileDialog.getOpenFileName(self, "Open study", "", _FILE_FILTER)
        if name:
            self.open_path(Path(name))

    def file_save(self) -> bool:
        if self.controller.path is None:
            return self.file_save_as()
        return self._save_to(self.controller.path)

    def file_save_as(self) -> bool:
        suggested = self.controller.path or Path(self.controller.study.name + ".json")
        name, _ = QFileDialog.getSaveFileName(self, "Save study as", str(suggested), _FILE_FILTER)
        if not name:
            return False
        path = Path(name)
        if path.suffix.lower() != ".json":
            path = path.with_name(path.name + ".json")
        return self._save_to(path)

    def _save_to(self, path: Path) -> bool:
        try:
            save_study(self.controller.study, path)
        except (OSError, StudyError) as exc:
            reason = exc.strerror if isinstance(exc, OSError) and exc.strerror else str(exc)
            QMessageBox.critical(
                self,
                "Save failed",
                f"Could not save to {path}:\n{reason}\n\nThe study is unchanged "
                "in the window; try another folder or name.",
            )
            return False
        old = self.controller.path
        autosave.discard(old)
        if old != path:
            self.controller.set_path(path)
        autosave.discard(path)
        self.controller.undo_stack.setClean()
        self._add_recent(path)
        self.statusBar().showMessage(f"Saved {path}", 5000)
        return True

    def file_revert(self) -> None:
        path = self.controller.path
        if path is None:
            return
        if not self.controller.undo_stack.isClean():
            answer = QMessageBox.question(
                self, "Revert to saved", f"Discard every change since {path.name} was saved?"
            )
            if answer != QMessageBox.StandardButton.Yes:
                return
        try:
            study = load_study(path)
        except StudyError as exc:
            QMessageBox.warning(self, "Cannot revert", str(exc))
            return
        autosave.discard(path)
        self.controller.reset(study, path)

    # -- exports -------------------------------------------------------------------------
    def _export_target(self, title: str, suffix: str, filter_: str, stem: str) -> Path | None:
        base = self.controller.path.with_suffix("") if self.controller.path else Path(stem)
        name, _ = QFileDialog.getSaveFileName(self, title, f"{base}{suffix}", filter_)
        if not name:
            return None
        path = Path(name)
        return path if path.suffix.lower() == suffix else path.with_name(path.name + suffix)

    def _export(self, what: str, path: Path, write) -> bool:
        self.controller.flush()
        try:
            write(path)
        except OSError as exc:
            reason = exc.strerror or str(exc)
            QMessageBox.critical(
                self, "Export failed",
                f"Could not write {path}:\n{reason}\n\nAny existing file there is unchanged.",
            )  # fmt: skip
            self.statusBar().showMessage(f"Export failed — {path.name}: {reason}", 10000)
            return False
        self.statusBar().showMessage(f"Exported {what} to {path}", 8000)
        return True

    def export_workbook(self) -> bool:
        path = self._export_target(
            "Export comparison workbook", ".xlsx", "Excel workbook (*.xlsx)",
            self.controller.study.name + " comparison",
        )  # fmt: skip
        if path is None:
            return False
        from core.report import write_comparison_workbook

        c = self.controller
        return self._export(
            "comparison workbook", path,
            lambda p: write_comparison_workbook(
                c.study, p, study_path=c.path, evaluation=c.evaluation, cost=c.cost,
                scores=c.scores,
            ),
        )  # fmt: skip

    def export_scorecard_csv(self) -> bool:
        path = self._export_target(
            "Export scorecard", ".csv", "CSV (*.csv)", self.controller.study.name + " scorecard"
        )
        if path is None:
            return False
        from core.export import write_scorecard_csv

        return self._export(
            "scorecard", path, lambda p: write_scorecard_csv(self.controller.evaluation, p)
        )

    def export_curves_csv(self) -> bool:
        path = self._export_target(
            "Export curves", ".csv", "CSV (*.csv)", self.controller.study.name + " curves"
        )
        if path is None:
            return False
        from core.export import write_curves_csv

        return self._export(
            "curves", path, lambda p: write_curves_csv(self.controller.evaluation, p)
        )

    def copy_scorecard(self) -> None:
        from PySide6.QtWidgets import QApplication

        from core.export import scorecard_tsv

        self.controller.flush()
        QApplication.clipboard().setText(scorecard_tsv(self.controller.evaluation))
        self.statusBar().showMessage(
            "Scorecard copied as tab-separated text (pastes into spreadsheets and slides)", 6000
        )

    # -- recent files --------------------------------------------------------------------
    def recent_files(self) -> list[str]:
        value = self.settings.value("recent_files", [])
        if isinstance(value, str):
            value = [value]
        return [v for v in (value or []) if isinstance(v, str)]

    def _add_recent(self, path: Path) -> None:
        p = str(Path(path).resolve())
        items = [p] + [r for r in self.recent_files() if r != p]
        self.settings.setValue("recent_files", items[:_MAX_RECENT])
        self._rebuild_recent()

    def _rebuild_recent(self) -> None:
        self.recent_menu.clear()
        files = self.recent_files()
        for f in files:
            act = self.recent_menu.addAction(f)
            act.triggered.connect(lambda _=False, f=f: self._open_recent(Path(f)))
        self.recent_menu.setEnabled(bool(files))

    def _open_recent(self, path: Path) -> None:
        if self.maybe_save():
            self.open_path(path)

    # -- autosave ------------------------------------------------------------------------
    def write_autosave(self) -> None:
        if not self.controller.undo_stack.isClean():
            autosave.write_autosave(self.controller.study, self.controller.path)

    def offer_recovery(self) -> None:
        found = autosave.recoverable(self.controller.path)
        if found is None:
            return
        auto, study = found
        if study == self.controller.study:
            autosave.discard(self.controller.path)
            return
        answer = QMessageBox.question(
            self,
            "Recover unsaved work",
            f"An autosave copy of “{study.name}” with changes that were never saved was found "
            f"({auto}).\n\nRecover it? (You can undo the recovery.)",
        )
        if answer == QMessageBox.StandardButton.Yes:
            self.controller.submit(ReplaceStudy(self.controller.study, study, "Recover autosave"))
        else:
            autosave.discard(self.controller.path)

    # -- misc ----------------------------------------------------------------------------
    def show_about(self) -> None:
        QMessageBox.about(
            self,
            "About Bandwright",
            f"<b>Bandwright {__version__}</b><br>Link-budget and PA specification trade-off "
            "explorer.<br><br>Estimates are closed-form planning figures, not a substitute for "
            "circuit design or measurement. RF exposure, transmit power and emission limits are "
            "set by local regulation: defer to it and to licensed practice.",
        )

    def select_page(self, title: str) -> QWidget:
        for i, page in enumerate(self.pages):
            if page.title == title:
                self.nav.setCurrentRow(i)
                return page
        raise KeyError(title)

    def closeEvent(self, event: QCloseEvent) -> None:
        if self.maybe_save():
            self._autosave_timer.stop()
            event.accept()
        else:
            event.ignore()
