"""Autosave copies of unsaved work, and their recovery after a crash.

Copies live in the per-user data folder (platformdirs), one file per study path, written
atomically by core. ``BANDWRIGHT_DATA_DIR`` overrides the folder (tests point it at tmp_path).
"""

from __future__ import annotations

import hashlib
import os
from pathlib import Path

import platformdirs

from core.study import Study, StudyError, load_study, save_study

__all__ = [
    "AUTOSAVE_INTERVAL_MS",
    "autosave_dir",
    "autosave_path",
    "discard",
    "recoverable",
    "write_autosave",
]

#: How often unsaved work is copied (ms).
AUTOSAVE_INTERVAL_MS = 60_000


def autosave_dir() -> Path:
    base = os.environ.get("BANDWRIGHT_DATA_DIR") or platformdirs.user_data_dir("Bandwright")
    return Path(base) / "autosave"


def autosave_path(study_path: Path | None) -> Path:
    """The autosave file for ``study_path`` (None = an untitled study)."""
    key = (
        "untitled"
        if study_path is None
        else hashlib.sha256(str(Path(study_path).resolve()).encode()).hexdigest()[:16]
    )
    return autosave_dir() / f"{key}.autosave.json"


def write_autosave(study: Study, study_path: Path | None) -> Path | None:
    """Write the autosave copy; returns its path, or None if the study cannot be saved."""
    target = autosave_path(study_path)
    try:
        target.parent.mkdir(parents=True, exist_ok=True)
        save_study(study, target)
    except (OSError, StudyError):
        return None
    return target


def recoverable(study_path: Path | None) -> tuple[Path, Study] | None:
    """An autosave newer than the file it belongs to, loaded, or None."""
    auto = autosave_path(study_path)
    if not auto.exists():
        return None
    if study_path is not None and Path(study_path).exists():
        if auto.stat().st_mtime <= Path(study_path).stat().st_mtime:
            return None
    try:
        return auto, load_study(auto)
    except StudyError:
        return None


def discard(study_path: Path | None) -> None:
    """Remove the autosave copy of ``study_path`` (after a save, or when declined)."""
    try:
        autosave_path(study_path).unlink()
    except FileNotFoundError:
        pass
