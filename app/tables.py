"""A table model over one collection of the study (bands, candidates, process cards).

Columns are declared as :class:`FieldColumn` (a field path inside each item); types, units and
ranges come from the core field specs, so the table shows units in its headers and refuses a bad
value with the core's own message. A refused value is shown beside the cell (icon, tint and
tooltip) and reported to the controller, which lists it in Notices; the study is unchanged.

Cells that offer a fixed set of values (enum fields, or names picked from the study such as a
candidate's process card) publish them under :data:`OPTIONS_ROLE`, and :class:`FieldDelegate`
edits them with a combo box; bool fields are check boxes. A column may declare that it does not
apply to some rows (``applies``): those cells show "—", greyed, but keep and still edit the
stored value.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from typing import Any

from PySide6.QtCore import (
    QAbstractItemModel,
    QAbstractTableModel,
    QModelIndex,
    QPersistentModelIndex,
    Qt,
)
from PySide6.QtGui import QColor
from PySide6.QtWidgets import (
    QAbstractItemView,
    QApplication,
    QComboBox,
    QStyle,
    QStyledItemDelegate,
    QStyleOptionViewItem,
    QTableView,
    QWidget,
)

from app.controller import StudyController
from core.edits import get_in
from core.schema import FieldSpec

__all__ = [
    "OPTIONS_ROLE",
    "CollectionTableModel",
    "FieldColumn",
    "FieldDelegate",
    "editable_table_view",
    "parse_cell",
]

Index = QModelIndex | QPersistentModelIndex

#: Item-data role: the values a cell may take, as a list of ``(shown text, value text)``.
OPTIONS_ROLE = int(Qt.ItemDataRole.UserRole) + 1
#: Text colour of a cell whose column does not apply to its row.
_NOT_APPLICABLE_FG = "#8c8c8c"


@dataclass(frozen=True)
class FieldColumn:
    """One column: a field path inside each item, or a read-only computed value."""

    header: str
    path: tuple[str, ...] = ()
    unit: str = ""
    compute: Callable[[Any], Any] | None = None
    fmt: str = "{:g}"
    tooltip: str = ""
    #: item → whether the column means anything for it; False shows "—", greyed (still stored).
    applies: Callable[[Any], bool] | None = None
    #: study → the allowed values of a text field (offered in a combo box).
    options: Callable[[Any], Sequence[str]] | None = None
    #: shown text for a value text ("die_per_band" → "one die per band"); display only.
    labels: Mapping[str, str] | None = None
    #: tooltip of a cell whose column does not apply to its row.
    na_tooltip: str = ""

    @property
    def editable(self) -> bool:
        return self.compute is None

    def shown(self, text: str) -> str:
        """``text`` (a cell's value text) as the column displays it."""
        return self.labels.get(text, text) if self.labels else text


def _spec_of(item_cls: type, path: tuple[str, ...]) -> FieldSpec:
    cls = item_cls
    spec: FieldSpec | None = None
    for name in path:
        f = {f.name: f for f in dataclasses.fields(cls)}[name]
        spec = f.metadata["spec"]
        if spec.kind == "nested":
            cls = spec.cls  # type: ignore[assignment]
    assert spec is not None
    return spec


def parse_cell(spec: FieldSpec, text: str) -> Any:
    """Turn typed text into a field value, or raise ValueError with a plain reason."""
    s = text.strip()
    if spec.unit and s.lower().endswith(spec.unit.lower()):
        s = s[: -len(spec.unit)].strip()
    if spec.kind in ("float", "int"):
        if s == "" and spec.optional:
            return None
        if s == "":
            raise ValueError("a value is required")
        try:
            value = float(s)
        except ValueError:
            raise ValueError(f"{text.strip()!r} is not a number") from None
        if not math.isfinite(value):
            raise ValueError("must be a finite number")
        if spec.kind == "int":
            if not value.is_integer():
                raise ValueError("must be a whole number")
            return int(value)
        return value
    if spec.kind == "enum":
        assert spec.cls is not None
        for m in spec.cls:  # type: ignore[attr-defined]
            if s in (m.value, str(m)):
                return m
        raise ValueError(f"must be one of {', '.join(m.value for m in spec.cls)}")  # type: ignore[attr-defined]
    if spec.kind == "bool":
        return s.lower() in ("1", "true", "yes", "on", "✓")
    return text


class CollectionTableModel(QAbstractTableModel):
    """Rows = items of ``study.<collection>``; edits go through the controller as undoable."""

    def __init__(
        self,
        controller: StudyController,
        collection: str,
        item_cls: type,
        columns: list[FieldColumn],
    ) -> None:
        super().__init__(controller)
        self._c = controller
        self.collection = collection
        self.item_cls = item_cls
        self.columns = columns
        self._specs = [_spec_of(item_cls, col.path) if col.editable else None for col in columns]
        self.cell_errors: dict[tuple[int, int], str] = {}
        self._items: tuple[Any, ...] = getattr(controller.study, collection)
        controller.items_about_to_change.connect(self._on_controller_items_about_to_change)
        controller.items_changed.connect(self._on_controller_items_changed)
        controller.study_changed.connect(self._on_controller_study_changed)
        self._pending: tuple[str, int, str] | None = None

    # -- controller → model --------------------------------------------------------------
    def _on_controller_items_about_to_change(self, collection: str, index: int, kind: str) -> None:
        if collection != self.collection:
            return
        self.cell_errors.clear()
        if kind == "insert":
            self.beginInsertRows(QModelIndex(), index, index)
        else:
            self.beginRemoveRows(QModelIndex(), index, index)
        self._pending = (collection, index, kind)

    def _on_controller_items_changed(self, collection: str, index: int, kind: str) -> None:
        if collection != self.collection or self._pending is None:
            return
        self._items = getattr(self._c.study, self.collection)
        self._pending = None
        if kind == "insert":
            self.endInsertRows()
        else:
            self.endRemoveRows()

    def _on_controller_study_changed(self, study: Any) -> None:
        new = getattr(study, self.collection)
        if len(new) != len(self._items):
            # Whole-document replacement (open, revert, recover): a reset is the honest signal.
            self.beginResetModel()
            self._items = new
            self.cell_errors.clear()
            self.endResetModel()
            return
        old, self._items = self._items, new
        for row, (a, b) in enumerate(zip(old, new, strict=True)):
            if a != b:
                self.dataChanged.emit(self.index(row, 0), self.index(row, len(self.columns) - 1))

    # -- Qt model API --------------------------------------------------------------------
    def rowCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008 - Qt signature
        return 0 if parent.isValid() else len(self._items)

    def columnCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008
        return 0 if parent.isValid() else len(self.columns)

    def headerData(self, section: int, orientation: Qt.Orientation, role: int = 0) -> Any:
        if orientation != Qt.Orientation.Horizontal or not 0 <= section < len(self.columns):
            return None
        col = self.columns[section]
        if role == Qt.ItemDataRole.DisplayRole:
            unit = col.unit or (self._specs[section].unit if self._specs[section] else "")
            return f"{col.header} ({unit})" if unit and unit != "1" else col.header
        if role == Qt.ItemDataRole.ToolTipRole:
            spec = self._specs[section]
            return col.tooltip or (spec.note if spec else "") or None
        return None

    def _value(self, row: int, column: int) -> Any:
        item = self._items[row]
        col = self.columns[column]
        return col.compute(item) if col.compute else get_in(item, col.path)

    def applies(self, row: int, column: int) -> bool:
        """Whether column ``column`` means anything for item ``row`` (see FieldColumn.applies)."""
        test = self.columns[column].applies
        return test is None or bool(test(self._items[row]))

    def _is_bool(self, column: int) -> bool:
        spec = self._specs[column]
        return spec is not None and spec.kind == "bool"

    def options(self, row: int, column: int) -> list[tuple[str, str]] | None:
        """``(shown text, value text)`` pairs a cell may take, or None for free entry."""
        col, spec = self.columns[column], self._specs[column]
        if spec is None:
            return None
        if col.options is not None:
            return [(col.shown(v), v) for v in col.options(self._c.study)]
        if spec.kind == "enum":
            return [(col.shown(m.value), m.value) for m in spec.cls]  # type: ignore[union-attr]
        return None

    def display_text(self, row: int, column: int) -> str:
        if not self.applies(row, column):
            return "—"
        return self.columns[column].shown(self.value_text(row, column))

    def value_text(self, row: int, column: int) -> str:
        """The stored value as text (what an editor starts from), whether it applies or not."""
        value = self._value(row, column)
        if value is None:
            return "auto" if self._specs[column] and self._specs[column].kind == "int" else "—"
        if isinstance(value, bool):
            return "yes" if value else "no"
        if hasattr(value, "value") and isinstance(value.value, str):
            return value.value
        if isinstance(value, float | int):
            return self.columns[column].fmt.format(value)
        return str(value)

    def data(self, index: Index, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if not index.isValid() or not (0 <= index.row() < len(self._items)):
            return None
        r, c = index.row(), index.column()
        err = self.cell_errors.get((r, c))
        if role == Qt.ItemDataRole.DisplayRole:
            return self.display_text(r, c)
        if role == Qt.ItemDataRole.EditRole:
            return self.value_text(r, c)
        if role == OPTIONS_ROLE:
            return self.options(r, c)
        if role == Qt.ItemDataRole.CheckStateRole and self._is_bool(c):
            on = bool(self._value(r, c))
            return Qt.CheckState.Checked if on else Qt.CheckState.Unchecked
        if role == Qt.ItemDataRole.ToolTipRole:
            if err is None and not self.applies(r, c):
                col = self.columns[c]
                kept = col.shown(self.value_text(r, c))
                return f"{col.na_tooltip or 'Does not apply to this row.'} Stored value: {kept}."
            return err
        if role == Qt.ItemDataRole.ForegroundRole and not self.applies(r, c):
            return QColor(_NOT_APPLICABLE_FG)
        if role == Qt.ItemDataRole.DecorationRole and err:
            style = QApplication.style()
            return style.standardIcon(QStyle.StandardPixmap.SP_MessageBoxWarning)
        if role == Qt.ItemDataRole.BackgroundRole:
            if err:
                return QColor("#f3cdb8")
            if not self.columns[c].editable:
                return QColor("#f4f4f4")
        if role == Qt.ItemDataRole.TextAlignmentRole:
            if not self.applies(r, c):
                return int(Qt.AlignmentFlag.AlignCenter)
            value = self._value(r, c)
            if isinstance(value, float | int) and not isinstance(value, bool):
                return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
        return None

    def flags(self, index: Index) -> Qt.ItemFlag:
        if not index.isValid():
            return Qt.ItemFlag.NoItemFlags
        base = Qt.ItemFlag.ItemIsEnabled | Qt.ItemFlag.ItemIsSelectable
        if self._is_bool(index.column()):
            base |= Qt.ItemFlag.ItemIsUserCheckable
        elif self.columns[index.column()].editable:
            base |= Qt.ItemFlag.ItemIsEditable
        return base

    def setData(self, index: Index, value: Any, role: int = Qt.ItemDataRole.EditRole) -> bool:
        if not index.isValid():
            return False
        r, c = index.row(), index.column()
        col, spec = self.columns[c], self._specs[c]
        if spec is None:
            return False
        if role == Qt.ItemDataRole.CheckStateRole and spec.kind == "bool":
            state = value.value if isinstance(value, Qt.CheckState) else value
            value = state == Qt.CheckState.Checked.value
        elif role != Qt.ItemDataRole.EditRole:
            return False
        path = (self.collection, r, *col.path)
        from core.edits import format_path

        try:
            parsed = parse_cell(spec, str(value)) if isinstance(value, str) else value
        except ValueError as exc:
            return self._refuse(r, c, format_path(path), str(exc))
        ok = self._c.set_field(path, parsed, f"Set {col.header}")
        if not ok:
            return self._refuse(r, c, format_path(path), self._c.last_refusal)
        self.cell_errors.pop((r, c), None)
        self.dataChanged.emit(index, index)
        return True

    def _refuse(self, r: int, c: int, path: str, reason: str) -> bool:
        self.cell_errors[(r, c)] = f"{path}: {reason}"
        self._c.report_refusal(path, reason)
        idx = self.index(r, c)
        self.dataChanged.emit(idx, idx)
        return False


class FieldDelegate(QStyledItemDelegate):
    """Edits cells that publish :data:`OPTIONS_ROLE` with a combo box; others as usual.

    The combo commits as soon as a value is picked, so one pick is one undo step.
    """

    def createEditor(self, parent: QWidget, option: QStyleOptionViewItem, index: Index) -> QWidget:
        choices = index.data(OPTIONS_ROLE)
        if choices is None:
            return super().createEditor(parent, option, index)
        combo = QComboBox(parent)
        for shown, value in choices:
            combo.addItem(shown, value)
        combo.activated.connect(lambda _i, e=combo: self._on_combo_activated(e))
        return combo

    def _on_combo_activated(self, editor: QComboBox) -> None:
        self.commitData.emit(editor)
        self.closeEditor.emit(editor, QStyledItemDelegate.EndEditHint.NoHint)

    def setEditorData(self, editor: QWidget, index: Index) -> None:
        if isinstance(editor, QComboBox):
            editor.setCurrentIndex(editor.findData(index.data(Qt.ItemDataRole.EditRole)))
            return
        super().setEditorData(editor, index)

    def setModelData(self, editor: QWidget, model: QAbstractItemModel, index: Index) -> None:
        if isinstance(editor, QComboBox):
            if editor.currentIndex() >= 0:
                model.setData(index, editor.currentData(), Qt.ItemDataRole.EditRole)
            return
        super().setModelData(editor, model, index)


def editable_table_view(
    model: QAbstractItemModel,
    object_name: str,
    delegate: QStyledItemDelegate | None = None,
    parent: QWidget | None = None,
) -> QTableView:
    """A row-selecting table over ``model`` that edits on double-click, F2 or typing."""
    table = QTableView(parent)
    table.setObjectName(object_name)
    table.setModel(model)
    if delegate is not None:
        table.setItemDelegate(delegate)
    table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
    table.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
    table.setEditTriggers(
        QAbstractItemView.EditTrigger.DoubleClicked
        | QAbstractItemView.EditTrigger.EditKeyPressed
        | QAbstractItemView.EditTrigger.AnyKeyPressed
    )
    table.verticalHeader().setVisible(False)
    return table
