"""Start the GUI."""

from __future__ import annotations

import sys
from pathlib import Path

__all__ = ["make_application", "run_gui"]


def make_application():
    """The QApplication with Bandwright's names (QSettings uses them) and Fusion style."""
    from PySide6.QtWidgets import QApplication

    app = QApplication.instance() or QApplication(sys.argv[:1])
    app.setOrganizationName("Bandwright")
    app.setApplicationName("Bandwright")
    app.setStyle("Fusion")
    return app


def run_gui(path: Path | None) -> int:
    """Open the main window on ``path`` or, with None, on a copy of the built-in demo."""
    from app.main_window import MainWindow
    from core.resources import demo_path
    from core.study import load_study

    app = make_application()
    if path is None:
        study, where = load_study(demo_path()), None  # an untitled copy: Save asks for a name
    else:
        study, where = load_study(path), path
    window = MainWindow(study, where)
    window.show()
    return app.exec()
