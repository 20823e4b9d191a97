"""Process Cards page: the study's process cards, one editor per card, and figures they imply.

Left, the cards of the study (duplicate one, add a shipped card, remove an unused one); right,
every parameter of the selected card grouped by what it describes, each with its unit and its
note, and three read-only figures derived from them (switch cutoff, Cripps load line per mm;
see :mod:`app.pages.card_table`). Every change is an undoable edit through the controller;
renaming a card carries every candidate that uses it along, in the same undo step.
"""

from __future__ import annotations

import dataclasses

from PySide6.QtCore import QModelIndex, Qt, QTimer
from PySide6.QtWidgets import (
    QGridLayout,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QLineEdit,
    QListWidget,
    QListWidgetItem,
    QMenu,
    QPushButton,
    QSplitter,
    QVBoxLayout,
    QWidget,
)

from app.controller import StudyController
from app.pages.card_table import CardParameterTableModel, CardTableDelegate
from app.tables import editable_table_view
from core.edits import InsertItem, RemoveItem, format_path, unique_name
from core.process import DEFAULT_CARDS, ProcessCard
from core.schema import field_spec

__all__ = ["ProcessCardsPage"]


class ProcessCardsPage(QWidget):
    """The study's process cards: pick one on the left, edit it on the right."""

    title = "Process Cards"

    def __init__(self, controller: StudyController, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._cards_shown: tuple = ()
        self._c = controller
        self._select_after: int | None = None

        # -- left: the cards ----------------------------------------------------------------
        self.card_list = QListWidget()
        self.card_list.setObjectName("ProcessCardList")
        self.card_list.currentRowChanged.connect(self._on_card_list_current_row_changed)
        self.duplicate_button = QPushButton("Duplicate")
        self.duplicate_button.setToolTip("Copy the selected card under a new name")
        self.duplicate_button.clicked.connect(self.duplicate_selected)
        self.library_button = QPushButton("Add from library")
        menu = QMenu(self.library_button)
        for name, card in DEFAULT_CARDS.items():
            action = menu.addAction(f"{name}   ({card.technology.value})")
            action.triggered.connect(lambda _=False, n=name: self.add_from_library(n))
        self.library_button.setMenu(menu)
        self.remove_button = QPushButton("Remove")
        self.remove_button.setToolTip("Remove the selected card (only if no candidate uses it)")
        self.remove_button.clicked.connect(self.remove_selected)
        buttons = QGridLayout()
        buttons.setContentsMargins(0, 0, 0, 0)
        buttons.addWidget(self.library_button, 0, 0, 1, 2)
        buttons.addWidget(self.duplicate_button, 1, 0)
        buttons.addWidget(self.remove_button, 1, 1)
        left = QWidget()
        left.setMinimumWidth(200)
        left_lay = QVBoxLayout(left)
        left_lay.setContentsMargins(0, 0, 0, 0)
        left_lay.addWidget(QLabel("<b>Process cards of this study</b>"))
        left_lay.addWidget(self.card_list, 1)
        left_lay.addLayout(buttons)
        library_note = QLabel(
            "Library cards hold representative figures from memory: calibrate them to your "
            "foundry's design kit and measurements."
        )
        library_note.setWordWrap(True)
        library_note.setStyleSheet("color:#555")
        left_lay.addWidget(library_note)

        # -- right: the selected card --------------------------------------------------------
        self.card_heading = QLabel()
        self.card_heading.setObjectName("ProcessCardHeading")
        self.card_heading.setWordWrap(True)
        self.model = CardParameterTableModel(controller)
        self.table = editable_table_view(self.model, "ProcessCardTable")
        self.table.setItemDelegate(CardTableDelegate(self.table))
        self.table.setWordWrap(True)
        hh = self.table.horizontalHeader()
        hh.setSectionResizeMode(0, QHeaderView.ResizeMode.ResizeToContents)
        hh.setSectionResizeMode(1, QHeaderView.ResizeMode.Interactive)
        hh.setSectionResizeMode(2, QHeaderView.ResizeMode.ResizeToContents)
        hh.setSectionResizeMode(3, QHeaderView.ResizeMode.Stretch)
        self.table.setColumnWidth(1, 120)
        # The table is always taller than the page: a permanent scroll bar keeps the note
        # column's width (and so the wrapped row heights) from flipping as rows grow.
        self.table.setVerticalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOn)
        self._row_height_timer = QTimer(self)
        self._row_height_timer.setSingleShot(True)
        self._row_height_timer.setInterval(0)
        self._row_height_timer.timeout.connect(self.table.resizeRowsToContents)
        hh.sectionResized.connect(self._on_table_header_section_resized)
        self.table.selectionModel().currentRowChanged.connect(self._on_table_current_row_changed)
        self.model.modelReset.connect(self._on_model_reset)
        self.model.dataChanged.connect(self._on_model_data_changed)

        self.source_edit = QLineEdit()
        self.source_edit.setObjectName("ProcessCardSource")
        self.source_edit.setToolTip(field_spec(ProcessCard, "source_note").note or "")
        self.source_edit.editingFinished.connect(self._on_source_edit_editing_finished)
        source_row = QHBoxLayout()
        source_row.addWidget(QLabel("Source / calibration:"))
        source_row.addWidget(self.source_edit, 1)

        self.message = QLabel("")
        self.message.setObjectName("ProcessCardsMessage")
        self.message.setWordWrap(True)
        self.message.setStyleSheet("color:#8a3b00")

        right = QWidget()
        right_lay = QVBoxLayout(right)
        right_lay.setContentsMargins(0, 0, 0, 0)
        right_lay.addWidget(self.card_heading)
        right_lay.addWidget(self.table, 1)
        right_lay.addLayout(source_row)

        splitter = QSplitter(Qt.Orientation.Horizontal)
        splitter.addWidget(left)
        splitter.addWidget(right)
        splitter.setStretchFactor(1, 1)
        splitter.setSizes([230, 870])
        heading = QLabel(
            "<b>Process cards</b> — the device, passive, layout, switch and wafer figures the "
            "estimator uses. Double-click a value to edit; Ctrl+Z undoes."
        )
        heading.setWordWrap(True)
        layout = QVBoxLayout(self)
        layout.addWidget(heading)
        layout.addWidget(splitter, 1)
        layout.addWidget(self.message)

        controller.study_changed.connect(self._on_controller_study_changed)
        controller.items_changed.connect(self._on_controller_items_changed)
        controller.edit_refused.connect(self._on_controller_edit_refused)
        self._rebuild_list(0)

    # -- helpers -------------------------------------------------------------------------
    def current_index(self) -> int | None:
        row = self.card_list.currentRow()
        return row if 0 <= row < len(self._c.study.process_cards) else None

    def select_card(self, index: int) -> None:
        self.card_list.setCurrentRow(index)

    def users_of(self, name: str) -> list[str]:
        """Names of the candidates whose process is card ``name``."""
        return [c.name for c in self._c.study.candidates if c.process == name]

    def _rebuild_list(self, select: int | None) -> None:
        cards = self._c.study.process_cards
        self.card_list.blockSignals(True)
        self.card_list.clear()
        for card in cards:
            item = QListWidgetItem(card.name)
            users = self.users_of(card.name)
            item.setToolTip(
                f"{card.technology.value}; used by "
                + (", ".join(users) if users else "no candidate")
            )
            self.card_list.addItem(item)
        row = None if not cards else min(max(select or 0, 0), len(cards) - 1)
        if row is not None:
            self.card_list.setCurrentRow(row)
        self.card_list.blockSignals(False)
        if row != self.model.card_index:
            self.model.set_card_index(row)
        self._refresh_editor()

    def _refresh_editor(self) -> None:
        card = self.model.card()
        has = card is not None
        self.duplicate_button.setEnabled(has)
        self.remove_button.setEnabled(has)
        self.source_edit.setEnabled(has)
        self.source_edit.blockSignals(True)
        self.source_edit.setText(card.source_note if card else "")
        self.source_edit.setCursorPosition(0)
        self.source_edit.blockSignals(False)
        if card is None:
            self.card_heading.setText("<i>No process card. Add one from the library.</i>")
            return
        users = self.users_of(card.name)
        used = (
            f"used by {len(users)} candidate{'s' * (len(users) != 1)}: {', '.join(users)}"
            if users
            else "not used by any candidate"
        )
        self.card_heading.setText(
            f"<b>{card.name}</b> &nbsp;·&nbsp; {card.technology.value} &nbsp;·&nbsp; {used}"
        )
        self.table.resizeRowsToContents()

    # -- slots ---------------------------------------------------------------------------
    def _on_card_list_current_row_changed(self, row: int) -> None:
        self.model.set_card_index(row if row >= 0 else None)
        self._refresh_editor()

    def _on_model_reset(self) -> None:
        self.table.clearSpans()
        for r in range(self.model.rowCount()):
            if self.model.row_kind(r) == "group":
                self.table.setSpan(r, 0, 1, 4)
        for name in ("name", "technology"):  # no unit: let the value use the unit cell too
            if self.model.rowCount():
                self.table.setSpan(self.model.row_of(name), 1, 1, 2)
        self.table.resizeRowsToContents()

    def _on_table_header_section_resized(self, column: int, _old: int, _new: int) -> None:
        if column == CardParameterTableModel.NOTE:  # wrapped notes need new row heights
            self._row_height_timer.start()

    def _on_model_data_changed(self, top: QModelIndex, bottom: QModelIndex) -> None:
        # A refusal replaces a row's note with a longer reason: let the row grow to show it.
        if top.row() == bottom.row():
            self.table.resizeRowToContents(top.row())
        else:
            self.table.resizeRowsToContents()

    def _on_table_current_row_changed(self, current: QModelIndex, _previous: QModelIndex) -> None:
        d = self.model.derivation(current.row()) if current.isValid() else None
        if d is not None:
            self._c.derivation_requested.emit(d)

    def _on_controller_items_changed(self, collection: str, index: int, kind: str) -> None:
        if collection == "process_cards":
            # Select the card that arrived, or the one that took the removed card's place.
            self._select_after = index

    def _on_controller_study_changed(self, _study: object) -> None:
        self.message.setText("")
        select = self._select_after if self._select_after is not None else self.current_index()
        self._select_after = None
        names = [c.name for c in self._c.study.process_cards]
        shown = [self.card_list.item(i).text() for i in range(self.card_list.count())]
        if names != shown or select != self.current_index():
            self._rebuild_list(select)
        elif self._c.study.process_cards != self._cards_shown:
            self._refresh_editor()
            self._rebuild_tooltips()
        self._cards_shown = self._c.study.process_cards

    def _rebuild_tooltips(self) -> None:
        for i, card in enumerate(self._c.study.process_cards):
            users = self.users_of(card.name)
            self.card_list.item(i).setToolTip(
                f"{card.technology.value}; used by "
                + (", ".join(users) if users else "no candidate")
            )

    def _on_controller_edit_refused(self, path: str, reason: str) -> None:
        if not path.startswith("process_cards"):
            return
        name = path.rsplit(".", 1)[-1]
        names = {f.name for f in dataclasses.fields(ProcessCard)}
        label = f" ({field_spec(ProcessCard, name).label})" if name in names else ""
        self.message.setText(f"✗ Not applied — {path}{label}: {reason}")

    def _on_source_edit_editing_finished(self) -> None:
        card = self.model.card()
        i = self.model.card_index
        if card is None or i is None or self.source_edit.text() == card.source_note:
            return
        self._c.set_field(
            ("process_cards", i, "source_note"), self.source_edit.text(), "Set card source"
        )

    # -- actions -------------------------------------------------------------------------
    def duplicate_selected(self) -> bool:
        """Insert a copy of the selected card right after it, under a new unique name."""
        i = self.current_index()
        if i is None:
            self.message.setText("Select a card to duplicate.")
            return False
        card = self._c.study.process_cards[i]
        taken = {c.name for c in self._c.study.process_cards}
        copy = dataclasses.replace(card, name=unique_name(f"{card.name} copy", taken))
        return self._c.submit(
            InsertItem("process_cards", i + 1, copy, f"Duplicate card {card.name}")
        )

    def add_from_library(self, name: str) -> bool:
        """Append the shipped card ``name`` (renamed if the study already has that name)."""
        card = DEFAULT_CARDS[name]
        taken = {c.name for c in self._c.study.process_cards}
        new = dataclasses.replace(card, name=unique_name(card.name, taken))
        n = len(self._c.study.process_cards)
        return self._c.submit(InsertItem("process_cards", n, new, f"Add card {new.name}"))

    def remove_selected(self) -> bool:
        """Remove the selected card; refused while a candidate uses it."""
        i = self.current_index()
        if i is None:
            self.message.setText("Select a card to remove.")
            return False
        card = self._c.study.process_cards[i]
        users = self.users_of(card.name)
        if users:
            reason = (
                f"cannot remove “{card.name}”: used by candidate{'s' * (len(users) != 1)} "
                f"{', '.join(users)}. Point them at another card first."
            )
            self._c.report_refusal(format_path(("process_cards", i)), reason)
            self.message.setText(f"✗ Not removed — {reason}")
            return False
        return self._c.submit(RemoveItem("process_cards", i, card, f"Remove card {card.name}"))
