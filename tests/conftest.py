"""Test configuration shared by core and app tests.

Qt must run offscreen before anything imports it, and no test may touch the user's real
settings or autosave folder.
"""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import pytest


@pytest.fixture(autouse=True)
def _isolated_user_folders(tmp_path_factory, monkeypatch):
    """Point autosave and QSettings at a per-test temporary folder."""
    base = tmp_path_factory.mktemp("userdata")
    monkeypatch.setenv("BANDWRIGHT_DATA_DIR", str(base / "data"))
    monkeypatch.setenv("XDG_CONFIG_HOME", str(base / "config"))
    yield base
