"""Fixtures for GUI tests: a main-window factory that cleans up what it made."""

from __future__ import annotations

from pathlib import Path

import pytest
from PySide6.QtCore import QSettings

from core.resources import demo_path
from core.study import load_study


@pytest.fixture
def controller(qapp):
    """A StudyController on the built-in demo study, without a window."""
    from app.controller import StudyController

    c = StudyController(load_study(demo_path()))
    yield c
    c.deleteLater()


@pytest.fixture
def settings_isolated(tmp_path):
    QSettings.setDefaultFormat(QSettings.Format.IniFormat)
    QSettings.setPath(QSettings.Format.IniFormat, QSettings.Scope.UserScope, str(tmp_path / "ini"))
    yield


@pytest.fixture
def make_window(qtbot, settings_isolated):
    """Factory: ``make_window(path=None, study=None)`` → a shown MainWindow (closed after)."""
    from app.main import make_application
    from app.main_window import MainWindow

    made = []

    def factory(path: Path | None = None, study=None):
        make_application()
        if study is None:
            study = load_study(path or demo_path())
        w = MainWindow(study, path, ask_recover=False)
        # Not qtbot.addWidget: pytest-qt would close the window before this fixture marks the
        # study clean, and the unsaved-changes prompt would then block the run.
        w.show()
        made.append(w)
        return w

    yield factory
    for w in made:
        w.controller.undo_stack.setClean()  # no prompt while tearing down
        w.close()
        w.deleteLater()
