"""Guards on the Qt runtime itself (measured failures of particular PySide6 releases)."""

from __future__ import annotations

import sys

from PySide6.QtCore import QAbstractTableModel, QModelIndex, QObject, QSortFilterProxyModel, Signal


class _NoneModel(QAbstractTableModel):
    def rowCount(self, parent=QModelIndex()):  # noqa: B008 - Qt signature
        return 1

    def columnCount(self, parent=QModelIndex()):  # noqa: B008
        return 1

    def data(self, index, role=0):
        return None


class _Emitter(QObject):
    fired = Signal()


def test_no_reference_leak_of_none_or_true(qapp):
    # PySide6 6.12.0 on Python 3.11 drops a reference to None on each C++→Python override call
    # returning None, and one to True per Signal.emit(); the interpreter then aborts. Measured
    # here; the dependency is pinned below 6.12 in pyproject.toml.
    model = _NoneModel()
    proxy = QSortFilterProxyModel()
    proxy.setSourceModel(model)
    index = proxy.index(0, 0)
    before = sys.getrefcount(None)
    for _ in range(2000):
        proxy.data(index, 5)
    assert abs(sys.getrefcount(None) - before) < 50
    emitter = _Emitter()
    before = sys.getrefcount(True)
    for _ in range(2000):
        emitter.fired.emit()
    assert abs(sys.getrefcount(True) - before) < 50
