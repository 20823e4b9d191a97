"""Band Plan page: the bands of the study with their edges and PA targets."""

from __future__ import annotations

from PySide6.QtCore import QEvent, Qt
from PySide6.QtWidgets import (
    QFormLayout,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QLineEdit,
    QMenu,
    QPlainTextEdit,
    QPushButton,
    QVBoxLayout,
    QWidget,
)

from app.controller import StudyController
from app.tables import CollectionTableModel, FieldColumn, editable_table_view
from core.bands import FR2_PRESETS
from core.edits import InsertItem, RemoveItem, unique_name
from core.study import BandSpec

__all__ = ["BandPlanPage"]


def _preset_label(b: BandSpec) -> str:
    p = FR2_PRESETS.get(b.preset)
    if p is None:
        return "user band"
    same = abs(p.f_low_hz - b.f_low_hz) < 1e3 and abs(p.f_high_hz - b.f_high_hz) < 1e3
    return b.preset if same else f"{b.preset} (edges edited)"


class BandPlanPage(QWidget):
    """Editable table of bands: edges, centre, fractional bandwidth and targets."""

    title = "Band Plan"

    def __init__(self, controller: StudyController, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._c = controller
        columns = [
            FieldColumn("Band", ("name",)),
            FieldColumn("f low", ("f_low_ghz",), fmt="{:.3f}"),
            FieldColumn("f high", ("f_high_ghz",), fmt="{:.3f}"),
            FieldColumn(
                "Centre f0",
                unit="GHz",
                compute=lambda b: b.band.f0_hz / 1e9,
                fmt="{:.3f}",
                tooltip="Arithmetic centre (f low + f high)/2",
            ),
            FieldColumn(
                "Fract. BW",
                unit="%",
                compute=lambda b: 100 * b.band.fractional_bw,
                fmt="{:.2f}",
                tooltip="(f high − f low)/f0",
            ),
            FieldColumn("Gain target", ("targets", "gain_db"), fmt="{:.1f}"),
            FieldColumn("P1dB target", ("targets", "p1db_dbm"), fmt="{:.1f}"),
            FieldColumn("PAE target", ("targets", "pae_pct"), fmt="{:.1f}"),
            FieldColumn(
                "Preset",
                compute=_preset_label,
                tooltip="3GPP TS 38.101-2 Table 5.2-1 band the row came from",
            ),
        ]
        self.model = CollectionTableModel(controller, "bands", BandSpec, columns)
        self.table = editable_table_view(self.model, "BandTable", parent=self)
        hh = self.table.horizontalHeader()
        hh.setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
        hh.setStretchLastSection(True)

        heading = QLabel(
            "<b>Bands and per-band PA targets</b> — worst case over each band, at "
            "the PA's RF ports. Double-click a cell to edit; Ctrl+Z undoes."
        )
        heading.setWordWrap(True)
        self.message = QLabel("")
        self.message.setObjectName("BandPlanMessage")
        self.message.setWordWrap(True)
        self.message.setStyleSheet("color:#8a3b00")

        add_preset = QPushButton("Add FR2 band")
        menu = QMenu(add_preset)
        for name, b in FR2_PRESETS.items():
            action = menu.addAction(f"{name}   {b.f_low_hz / 1e9:.2f}–{b.f_high_hz / 1e9:.2f} GHz")
            action.triggered.connect(lambda _=False, n=name: self.add_preset(n))
        add_preset.setMenu(menu)
        add_custom = QPushButton("Add custom band")
        add_custom.clicked.connect(self.add_custom)
        self.remove_button = QPushButton("Remove band")
        self.remove_button.clicked.connect(self.remove_selected)

        buttons = QHBoxLayout()
        for w in (add_preset, add_custom, self.remove_button):
            buttons.addWidget(w)
        buttons.addStretch(1)
        source = QLabel("FR2 presets: 3GPP TS 38.101-2, Table 5.2-1 (NR operating bands in FR2).")
        source.setStyleSheet("color:#555")
        buttons.addWidget(source)

        self.name_edit = QLineEdit(controller.study.name)
        self.name_edit.setObjectName("StudyName")
        self.name_edit.editingFinished.connect(self._on_name_edit_finished)
        self.notes_edit = QPlainTextEdit(controller.study.notes)
        self.notes_edit.setObjectName("StudyNotes")
        self.notes_edit.setFixedHeight(58)
        self.notes_edit.setPlaceholderText("Scenario, assumptions, open questions…")
        self.notes_edit.installEventFilter(self)
        form = QFormLayout()
        form.addRow("Study", self.name_edit)
        form.addRow("Notes", self.notes_edit)

        layout = QVBoxLayout(self)
        layout.addLayout(form)
        layout.addWidget(heading)
        layout.addLayout(buttons)
        layout.addWidget(self.table, 1)
        layout.addWidget(self.message)

        controller.edit_refused.connect(self._on_controller_edit_refused)
        controller.study_changed.connect(self._on_controller_study_changed)

    def _on_controller_edit_refused(self, path: str, reason: str) -> None:
        if path.startswith("bands"):
            self.message.setText(f"✗ Not applied — {path}: {reason}")

    def _on_controller_study_changed(self, study: object) -> None:
        self.message.setText("")
        if not self.name_edit.hasFocus() and self.name_edit.text() != study.name:
            self.name_edit.setText(study.name)
        if not self.notes_edit.hasFocus() and self.notes_edit.toPlainText() != study.notes:
            self.notes_edit.setPlainText(study.notes)

    def _on_name_edit_finished(self) -> None:
        text = self.name_edit.text().strip()
        if not text:
            self._c.report_refusal("name", "must not be empty")
            self.name_edit.setText(self._c.study.name)
            return
        if text != self._c.study.name and not self._c.set_field(("name",), text, "Rename study"):
            self.name_edit.setText(self._c.study.name)

    def eventFilter(self, obj: object, event: QEvent) -> bool:
        # Notes are committed as one undoable edit when the editor loses focus.
        if obj is self.notes_edit and event.type() == QEvent.Type.FocusOut:
            text = self.notes_edit.toPlainText()
            if text != self._c.study.notes and not self._c.set_field(
                ("notes",), text, "Edit notes"
            ):
                self.notes_edit.setPlainText(self._c.study.notes)
        return super().eventFilter(obj, event)

    def add_preset(self, name: str) -> None:
        b = FR2_PRESETS[name]
        study = self._c.study
        taken = {x.name for x in study.bands}
        template = study.bands[-1] if study.bands else BandSpec()
        spec = BandSpec(
            name=unique_name(name, taken),
            f_low_ghz=b.f_low_hz / 1e9,
            f_high_ghz=b.f_high_hz / 1e9,
            preset=name,
            targets=template.targets,
            link=template.link,
        )
        self._c.submit(InsertItem("bands", len(study.bands), spec, f"Add band {name}"))

    def add_custom(self) -> None:
        study = self._c.study
        taken = {x.name for x in study.bands}
        template = study.bands[-1] if study.bands else BandSpec()
        spec = BandSpec(
            name=unique_name("custom", taken),
            f_low_ghz=template.f_low_ghz,
            f_high_ghz=template.f_high_ghz,
            preset="",
            targets=template.targets,
            link=template.link,
        )
        self._c.submit(InsertItem("bands", len(study.bands), spec, "Add custom band"))

    def remove_selected(self) -> None:
        rows = sorted({i.row() for i in self.table.selectionModel().selectedRows()})
        if not rows:
            self.message.setText("Select a band row to remove.")
            return
        row = rows[0]
        if len(self._c.study.bands) <= 1:
            self.message.setText("✗ A study needs at least one band.")
            return
        item = self._c.study.bands[row]
        self._c.submit(RemoveItem("bands", row, item, f"Remove band {item.name}"))

    def select_cell(self, row: int, column: int) -> None:
        self.table.setCurrentIndex(self.model.index(row, column))
        self.table.setFocus(Qt.FocusReason.OtherFocusReason)
