"""Table presentation helpers of the scorecard: grouped header, selection frame, frozen column.

:class:`GroupedHeaderView` draws a second header row above the sections, one cell per run of
adjacent columns that share a group label (``GROUP_ROLE`` header data), e.g. a band name over
its gain, P1dB and PAE columns. :class:`FramedSelectionDelegate` marks the selected cell with a
frame instead of the selection fill, so a status colour stays readable while it is selected.
:class:`FrozenColumnTableView` keeps the first column in view while a wide table scrolls.
"""

from __future__ import annotations

from typing import Any

from PySide6.QtCore import QModelIndex, QPersistentModelIndex, QRect, QSize, Qt
from PySide6.QtGui import QColor, QPainter, QPen, QResizeEvent
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHeaderView,
    QStyle,
    QStyledItemDelegate,
    QStyleOptionHeader,
    QStyleOptionViewItem,
    QTableView,
    QWidget,
)

__all__ = ["GROUP_ROLE", "FramedSelectionDelegate", "FrozenColumnTableView", "GroupedHeaderView"]

Index = QModelIndex | QPersistentModelIndex

#: Header role: the group label drawn above a column ("n257", "Per candidate", or "").
GROUP_ROLE = int(Qt.ItemDataRole.UserRole) + 1

_MIN_COLUMN_PX = 54  # room for "✗ -10.5" in a scorecard metric cell


class FramedSelectionDelegate(QStyledItemDelegate):
    """Paints a selected cell in its own status colour with a black frame.

    The usual selection fill would hide the status colour of the very cell being read.
    """

    def paint(self, painter: QPainter, option: QStyleOptionViewItem, index: Index) -> None:
        selected = bool(option.state & QStyle.StateFlag.State_Selected)
        if not selected and not option.state & QStyle.StateFlag.State_HasFocus:
            super().paint(painter, option, index)  # most cells: nothing to change
            return
        opt = QStyleOptionViewItem(option)
        opt.state &= ~QStyle.StateFlag.State_Selected
        opt.state &= ~QStyle.StateFlag.State_HasFocus
        if selected:  # the view has already filled the row panel with the highlight colour
            painter.fillRect(option.rect, option.palette.base())
        super().paint(painter, opt, index)
        if selected:
            painter.save()
            pen = QPen(QColor("#000000"), 2)
            pen.setJoinStyle(Qt.PenJoinStyle.MiterJoin)
            painter.setPen(pen)
            painter.drawRect(option.rect.adjusted(1, 1, -1, -1))
            painter.restore()


class GroupedHeaderView(QHeaderView):
    """Horizontal header with a group row (``GROUP_ROLE``) spanning columns of one group.

    Each section paints its share of the group's cell, clipped to itself, so the group label
    stays centred over its columns while they are resized or scrolled. A column without a
    group (the candidate name) uses both rows.
    """

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(Qt.Orientation.Horizontal, parent)
        self.setSectionsClickable(True)
        self.setHighlightSections(False)
        self.setDefaultAlignment(Qt.AlignmentFlag.AlignCenter)

    def group_height(self) -> int:
        return self.fontMetrics().height() + 8

    def _group(self, logical: int) -> str:
        model = self.model()
        if model is None:
            return ""
        return model.headerData(logical, Qt.Orientation.Horizontal, GROUP_ROLE) or ""

    def group_span(self, logical: int) -> tuple[int, int]:
        """First and last logical section of the group that ``logical`` belongs to."""
        group = self._group(logical)
        first = last = self.visualIndex(logical)
        while first > 0 and self._group(self.logicalIndex(first - 1)) == group:
            first -= 1
        while last < self.count() - 1 and self._group(self.logicalIndex(last + 1)) == group:
            last += 1
        return self.logicalIndex(first), self.logicalIndex(last)

    def sectionSizeFromContents(self, logicalIndex: int) -> QSize:
        # Qt sizes a section for its text on one line plus a sort-indicator slot beside it;
        # the labels here are two short lines and Fusion draws the indicator above the text,
        # so the width is the longest line plus the margins.
        size = super().sectionSizeFromContents(logicalIndex)
        model = self.model()
        text = model.headerData(logicalIndex, Qt.Orientation.Horizontal) if model else None
        if text:
            fm = self.fontMetrics()
            margin = self.style().pixelMetric(QStyle.PixelMetric.PM_HeaderMargin, None, self)
            width = max(fm.horizontalAdvance(line) for line in str(text).split("\n"))
            size.setWidth(max(width + 2 * margin + 8, _MIN_COLUMN_PX))
        return QSize(size.width(), size.height() + self.group_height())

    def paintSection(self, painter: QPainter, rect: QRect, logicalIndex: int) -> None:
        group = self._group(logicalIndex)
        if not rect.isValid() or not group:
            super().paintSection(painter, rect, logicalIndex)
            return
        gh = self.group_height()
        first, last = self.group_span(logicalIndex)
        x0 = self.sectionViewportPosition(first)
        x1 = self.sectionViewportPosition(last) + self.sectionSize(last)
        opt = QStyleOptionHeader()
        self.initStyleOption(opt)
        opt.rect = QRect(x0, rect.top(), x1 - x0, gh)
        opt.text = group
        opt.textAlignment = Qt.AlignmentFlag.AlignCenter
        opt.section = first
        opt.position = QStyleOptionHeader.SectionPosition.Middle
        opt.sortIndicator = QStyleOptionHeader.SortIndicator.None_
        painter.save()
        painter.setClipRect(QRect(rect.left(), rect.top(), rect.width(), gh))
        font = painter.font()
        font.setBold(True)
        painter.setFont(font)
        self.style().drawControl(QStyle.ControlElement.CE_Header, opt, painter, self)
        painter.restore()
        super().paintSection(painter, rect.adjusted(0, gh, 0, 0), logicalIndex)


class FrozenColumnTableView(QTableView):
    """A table whose first column stays put while the other columns scroll sideways.

    A second view over the same model and selection model shows only column 0 on top of the
    main view's first column (Qt's "Frozen Column" example pattern), so a wide scorecard can
    be scrolled without losing sight of which candidate a row is.
    """

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setHorizontalHeader(GroupedHeaderView(self))
        self.setHorizontalScrollMode(QAbstractItemView.ScrollMode.ScrollPerPixel)
        self.frozen = QTableView(self)
        self.frozen.setObjectName("FrozenColumn")
        self.frozen.setHorizontalHeader(GroupedHeaderView(self.frozen))
        self.frozen.setFocusPolicy(Qt.FocusPolicy.NoFocus)
        self.frozen.verticalHeader().hide()
        self.frozen.setHorizontalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        self.frozen.setVerticalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        self.frozen.setStyleSheet(
            "QTableView#FrozenColumn { border: none; border-right: 1px solid #8c8c8c; }"
        )
        self.viewport().stackUnder(self.frozen)
        self.frozen.verticalScrollBar().valueChanged.connect(self.verticalScrollBar().setValue)
        self.verticalScrollBar().valueChanged.connect(self.frozen.verticalScrollBar().setValue)
        self.horizontalHeader().sectionResized.connect(self._on_header_section_resized)
        self.verticalHeader().sectionResized.connect(self._on_rows_section_resized)
        # Clicking the frozen header sorts the main view (which owns the sorting).
        self.frozen.horizontalHeader().setSortIndicatorShown(True)
        self.frozen.horizontalHeader().sortIndicatorChanged.connect(
            self.horizontalHeader().setSortIndicator
        )
        self.horizontalHeader().sortIndicatorChanged.connect(
            self.frozen.horizontalHeader().setSortIndicator
        )

    def setModel(self, model: Any) -> None:
        super().setModel(model)
        self.frozen.setModel(model)
        self.frozen.setSelectionModel(self.selectionModel())
        for signal in (model.modelReset, model.layoutChanged, model.columnsInserted):
            signal.connect(self._sync_frozen)
        self._sync_frozen()

    def setItemDelegate(self, delegate: QStyledItemDelegate) -> None:
        super().setItemDelegate(delegate)
        self.frozen.setItemDelegate(delegate)

    def _sync_frozen(self, *_args: Any) -> None:
        model = self.model()
        if model is None:
            return
        for col in range(model.columnCount()):
            self.frozen.setColumnHidden(col, col != 0)
        for row in range(model.rowCount()):
            self.frozen.setRowHeight(row, self.rowHeight(row))
        self._update_frozen_geometry()

    def _on_header_section_resized(self, logical: int, _old: int, new: int) -> None:
        if logical == 0:
            self.frozen.setColumnWidth(0, new)
        self._update_frozen_geometry()

    def _on_rows_section_resized(self, logical: int, _old: int, new: int) -> None:
        self.frozen.setRowHeight(logical, new)

    def _update_frozen_geometry(self) -> None:
        self.frozen.setColumnWidth(0, self.columnWidth(0))
        self.frozen.horizontalHeader().setFixedHeight(self.horizontalHeader().height())
        fw = self.frameWidth()
        self.frozen.setGeometry(
            self.verticalHeader().width() + fw,
            fw,
            self.columnWidth(0),
            self.viewport().height() + self.horizontalHeader().height(),
        )

    def resizeEvent(self, event: QResizeEvent) -> None:
        super().resizeEvent(event)
        self._update_frozen_geometry()

    def updateGeometries(self) -> None:
        super().updateGeometries()
        if hasattr(self, "frozen"):
            self._update_frozen_geometry()

    def scrollTo(
        self, index: Index, hint: Any = QAbstractItemView.ScrollHint.EnsureVisible
    ) -> None:
        # Column 0 never scrolls; for the others, keep the cell clear of the frozen column.
        if index.column() == 0:
            return
        super().scrollTo(index, hint)
        left = self.visualRect(index).left()
        if left < self.columnWidth(0):
            bar = self.horizontalScrollBar()
            bar.setValue(bar.value() + left - self.columnWidth(0))
