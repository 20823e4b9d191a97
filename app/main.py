"""Start the GUI."""

from __future__ import annotations

import sys
from pathlib import Path

__all__ = ["icon_path", "make_application", "run_gui"]


def icon_path() -> Path:
    """The application icon: ``app/assets`` in a wheel, ``<repo>/assets`` in a checkout."""
    here = Path(__file__).resolve().parent
    for folder in (here / "assets", here.parent / "assets"):
        if (folder / "bandwright.svg").is_file():
            return folder / "bandwright.svg"
    raise FileNotFoundError("the application icon is missing from this installation")


def make_application():
    """The QApplication with Bandwright's names (QSettings uses them) and Fusion style."""
    from PySide6.QtWidgets import QApplication

    app = QApplication.instance() or QApplication(sys.argv[:1])
    app.setOrganizationName("Bandwright")
    app.setApplicationName("Bandwright")
    app.setStyle("Fusion")
    from PySide6.QtGui import QIcon

    app.setWindowIcon(QIcon(str(icon_path())))
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
