"""Candidates page: the architectures to compare, each on a process card, with their options.

One row per candidate. Options that mean nothing for a row's architecture (output combining for
a wideband PA, switched elements for separate PAs) are shown as a greyed "—" but keep their
stored value, so switching the architecture back restores them.
"""

from __future__ import annotations

import dataclasses

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QMenu,
    QPushButton,
    QVBoxLayout,
    QWidget,
)

from app.controller import StudyController
from app.tables import CollectionTableModel, FieldColumn, FieldDelegate, editable_table_view
from core.edits import InsertItem, RemoveItem, unique_name
from core.study import Candidate, CandidateKind, Combining, DieArrangement

__all__ = ["KIND_LABELS", "CandidatesPage", "candidate_columns", "new_candidate"]

#: How each architecture is named on screen.
KIND_LABELS: dict[str, str] = {
    CandidateKind.SEPARATE.value: "separate PAs",
    CandidateKind.WIDEBAND.value: "wideband",
    CandidateKind.SWITCHED.value: "switched",
}
_DIE_LABELS = {
    DieArrangement.DIE_PER_BAND.value: "die per band",
    DieArrangement.SHARED_DIE.value: "one die",
}
_COMBINING_LABELS = {
    Combining.SEPARATE_FEEDS.value: "own feeds",
    Combining.BAND_SELECT_SWITCH.value: "switch",
    Combining.DIPLEXER.value: "diplexer",
}
_MENU_LABELS = {
    CandidateKind.SEPARATE: "Separate single-band PAs",
    CandidateKind.WIDEBAND: "One wideband PA",
    CandidateKind.SWITCHED: "Switched multiband PA",
}
_DEFAULT_NAMES = {
    CandidateKind.SEPARATE: "Separate PAs",
    CandidateKind.WIDEBAND: "Wideband PA",
    CandidateKind.SWITCHED: "Switched PA",
}
_EXPLANATION = (
    "<b>Separate</b>: a narrowband PA for each band, on its own die or sharing one, each band "
    "fed to the antenna on its own or merged by a band-select switch or diplexer (which costs "
    "loss). <b>Wideband</b>: a single PA whose matching networks stretch over every band at "
    "once, trading gain and efficiency for simplicity. <b>Switched</b>: a single PA whose "
    "matching networks are retuned for the active band by on-chip FET switches, paying the "
    "switches' loss and control area."
)


def _is_separate(c: Candidate) -> bool:
    return c.kind == CandidateKind.SEPARATE


def _has_band_select(c: Candidate) -> bool:
    return c.kind == CandidateKind.SEPARATE and c.combining != Combining.SEPARATE_FEEDS


def _is_switched(c: Candidate) -> bool:
    return c.kind == CandidateKind.SWITCHED


def candidate_columns() -> list[FieldColumn]:
    """The columns of the candidates table, in display order."""
    return [
        FieldColumn("Name", ("name",)),
        FieldColumn("Architecture", ("kind",), labels=KIND_LABELS),
        FieldColumn(
            "Process card",
            ("process",),
            options=lambda study: [c.name for c in study.process_cards],
            tooltip="The study's process card the candidate is built on",
        ),
        FieldColumn("Stages", ("stages",), tooltip="Blank = auto: fewest stages that meet gain"),
        FieldColumn(
            "Shown",
            ("enabled",),
            labels={"yes": "", "no": ""},  # the check box says it
            tooltip="Hidden candidates are kept in the study but left out of the comparison",
        ),
        FieldColumn(
            "Dies",
            ("die_arrangement",),
            labels=_DIE_LABELS,
            applies=_is_separate,
            na_tooltip="Only separate single-band PAs have a die arrangement.",
        ),
        FieldColumn(
            "Output\ncombining",
            ("combining",),
            labels=_COMBINING_LABELS,
            applies=_is_separate,
            na_tooltip="Only separate single-band PAs combine outputs.",
        ),
        FieldColumn(
            "Band-select\nloss",
            ("band_select_loss_db",),
            applies=_has_band_select,
            na_tooltip="Used only by separate PAs combined by a band-select switch or diplexer.",
        ),
        FieldColumn(
            "Band-select\ncost",
            ("band_select_cost_usd",),
            applies=_has_band_select,
            na_tooltip="Used only by separate PAs combined by a band-select switch or diplexer.",
        ),
        FieldColumn(
            "Switched\nelements",
            ("switched_elements",),
            applies=_is_switched,
            na_tooltip="Used only by the switched multiband PA.",
        ),
        FieldColumn(
            "Design\neffort ×",
            ("design_effort_factor",),
            tooltip="Multiplies the design effort of one single-band PA (NRE)",
        ),
    ]


def new_candidate(
    kind: CandidateKind, taken: set[str], process: str, template: Candidate | None = None
) -> Candidate:
    """A new candidate of ``kind`` on card ``process``, named uniquely against ``taken``.

    Options are copied from ``template`` (an existing candidate of the same kind) when given,
    otherwise they take the model's defaults.
    """
    name = unique_name(_DEFAULT_NAMES[kind], taken)
    if template is not None:
        return dataclasses.replace(template, name=name, kind=kind, process=process, enabled=True)
    return Candidate(name=name, kind=kind, process=process)


class CandidatesPage(QWidget):
    """Editable table of candidates with add (by kind), duplicate and remove."""

    title = "Candidates"

    def __init__(self, controller: StudyController, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._c = controller
        self.model = CollectionTableModel(controller, "candidates", Candidate, candidate_columns())
        self.table = editable_table_view(self.model, "CandidateTable", parent=self)
        self.table.setItemDelegate(FieldDelegate(self.table))
        hh = self.table.horizontalHeader()
        hh.setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
        hh.setSectionResizeMode(0, QHeaderView.ResizeMode.Stretch)

        heading = QLabel(
            "<b>Candidates</b> — the architectures compared on every band. Double-click a "
            "cell to edit, tick <i>Shown</i> to include a row; greyed “—” cells do not apply "
            "to that architecture (their values are kept). Ctrl+Z undoes."
        )
        heading.setWordWrap(True)
        explanation = QLabel(_EXPLANATION)
        explanation.setObjectName("ArchitectureExplanation")
        explanation.setWordWrap(True)
        explanation.setStyleSheet("color:#333")

        self.add_button = QPushButton("Add candidate")
        menu = QMenu(self.add_button)
        for kind in CandidateKind:
            action = menu.addAction(_MENU_LABELS[kind])
            action.triggered.connect(lambda _=False, k=kind: self.add_candidate(k))
        self.add_button.setMenu(menu)
        self.duplicate_button = QPushButton("Duplicate")
        self.duplicate_button.clicked.connect(self.duplicate_selected)
        self.remove_button = QPushButton("Remove")
        self.remove_button.clicked.connect(self.remove_selected)
        buttons = QHBoxLayout()
        for w in (self.add_button, self.duplicate_button, self.remove_button):
            buttons.addWidget(w)
        buttons.addStretch(1)

        self.message = QLabel("")
        self.message.setObjectName("CandidatesMessage")
        self.message.setWordWrap(True)
        self.message.setStyleSheet("color:#8a3b00")

        layout = QVBoxLayout(self)
        layout.addWidget(heading)
        layout.addWidget(explanation)
        layout.addLayout(buttons)
        layout.addWidget(self.table, 1)
        layout.addWidget(self.message)

        controller.edit_refused.connect(self._on_controller_edit_refused)
        controller.study_changed.connect(self._on_controller_study_changed)
        controller.items_changed.connect(self._on_controller_items_changed)

    # -- slots ---------------------------------------------------------------------------
    def _on_controller_edit_refused(self, path: str, reason: str) -> None:
        if path.startswith("candidates"):
            self.message.setText(f"✗ Not applied — {path}: {reason}")

    def _on_controller_study_changed(self, _study: object) -> None:
        self.message.setText("")

    def _on_controller_items_changed(self, collection: str, index: int, kind: str) -> None:
        if collection == "candidates" and kind == "insert":
            self.select_row(index)

    # -- actions -------------------------------------------------------------------------
    def selected_row(self) -> int | None:
        rows = sorted({i.row() for i in self.table.selectionModel().selectedRows()})
        if not rows:
            current = self.table.currentIndex()
            return current.row() if current.isValid() else None
        return rows[0]

    def select_row(self, row: int) -> None:
        if 0 <= row < self.model.rowCount():
            self.table.selectRow(row)

    def add_candidate(self, kind: CandidateKind) -> bool:
        """Append a candidate of ``kind`` on the selected row's card (else the first card)."""
        study = self._c.study
        if not study.process_cards:
            self.message.setText("✗ Add a process card first (Process Cards page).")
            return False
        row = self.selected_row()
        process = study.candidates[row].process if row is not None else study.process_cards[0].name
        same_kind = [c for c in study.candidates if c.kind == kind]
        cand = new_candidate(
            kind, {c.name for c in study.candidates}, process, same_kind[-1] if same_kind else None
        )
        n = len(study.candidates)
        return self._c.submit(InsertItem("candidates", n, cand, f"Add candidate {cand.name}"))

    def duplicate_selected(self) -> bool:
        """Insert a copy of the selected candidate right after it, under a new name."""
        row = self.selected_row()
        if row is None:
            self.message.setText("Select a candidate row to duplicate.")
            return False
        study = self._c.study
        item = study.candidates[row]
        taken = {c.name for c in study.candidates}
        copy = dataclasses.replace(item, name=unique_name(f"{item.name} copy", taken))
        return self._c.submit(InsertItem("candidates", row + 1, copy, f"Duplicate {item.name}"))

    def remove_selected(self) -> bool:
        row = self.selected_row()
        if row is None:
            self.message.setText("Select a candidate row to remove.")
            return False
        item = self._c.study.candidates[row]
        return self._c.submit(RemoveItem("candidates", row, item, f"Remove {item.name}"))

    def select_cell(self, row: int, column: int) -> None:
        self.table.setCurrentIndex(self.model.index(row, column))
        self.table.setFocus(Qt.FocusReason.OtherFocusReason)
