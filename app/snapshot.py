"""Render every page of the main window offscreen to PNG (``bandwright snapshot``)."""

from __future__ import annotations

import os
import re
from collections.abc import Iterator
from pathlib import Path

from core.study import Study

__all__ = ["snapshot_pages"]


def _slug(title: str) -> str:
    return re.sub(r"[^a-z0-9]+", "-", title.lower()).strip("-")


def snapshot_pages(
    study: Study, path: Path | None, out: Path, size: tuple[int, int] = (1480, 920)
) -> Iterator[Path]:
    """Yield the PNG written for each page, in navigation order (``NN-page-title.png``)."""
    os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    from app.main import make_application
    from app.main_window import MainWindow

    app = make_application()
    window = MainWindow(study, path, ask_recover=False)
    window.resize(*size)
    window.show()
    app.processEvents()
    try:
        for i, page in enumerate(window.pages):
            window.nav.setCurrentRow(i)
            prepare = getattr(page, "prepare_snapshot", None)
            if prepare is not None:
                prepare()
            window.controller.flush()
            for _ in range(3):
                app.processEvents()
            target = out / f"{i + 1:02d}-{_slug(page.title)}.png"
            if not window.grab().save(str(target)):
                raise OSError(f"could not write {target}")
            yield target
    finally:
        window.controller.undo_stack.setClean()
        window.close()
        window.deleteLater()
        app.processEvents()
