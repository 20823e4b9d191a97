"""The layering rule: nothing under core/ imports Qt, pyqtgraph or app (STYLE.md)."""

from __future__ import annotations

import pkgutil
import subprocess
import sys
from pathlib import Path

import core

ROOT = Path(__file__).resolve().parents[2]


def _core_modules() -> list[str]:
    found = pkgutil.walk_packages(core.__path__, prefix="core.")
    return [*sorted(m.name for m in found if not m.ispkg), "core"]


def test_every_core_module_imports_with_qt_unimportable():
    # A child interpreter where importing PySide6/shiboken6/pyqtgraph/app raises ImportError.
    code = f"""
import importlib, sys
class Block:
    def find_spec(self, name, path=None, target=None):
        if name.split('.')[0] in ('PySide6', 'shiboken6', 'pyqtgraph', 'app'):
            raise ImportError('blocked: ' + name)
        return None
sys.meta_path.insert(0, Block())
for m in {_core_modules()!r}:
    importlib.import_module(m)
print('ok')
"""
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT)
    assert out.returncode == 0, out.stderr
    assert out.stdout.strip() == "ok"


def test_import_linter_contracts_hold():
    # The console script sits beside the interpreter in the test environment.
    tool = Path(sys.executable).with_name("lint-imports")
    out = subprocess.run([str(tool)], capture_output=True, text=True, cwd=ROOT)
    assert out.returncode == 0, out.stdout + out.stderr
    assert "2 kept, 0 broken" in out.stdout
