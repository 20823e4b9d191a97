"""Link Ledger page: one band's link scenario, its ledger, and the per-element P1dB it implies.

The inputs are spin boxes built from the study schema (unit as suffix, range from the field's
``FieldSpec``); every change is one :meth:`StudyController.set_field` call marked mergeable, so
a spin-box drag is one undo step. The ledger itself is computed by :mod:`core.link_plan`;
selecting a line asks the Derivation dock to show how it was computed.
"""

from __future__ import annotations

import dataclasses
from typing import Any

from PySide6.QtCore import QAbstractTableModel, QModelIndex, QPersistentModelIndex, Qt
from PySide6.QtGui import QBrush, QColor, QFont
from PySide6.QtWidgets import (
    QAbstractItemView,
    QAbstractSpinBox,
    QComboBox,
    QDoubleSpinBox,
    QFormLayout,
    QGroupBox,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QPushButton,
    QScrollArea,
    QSpinBox,
    QTableView,
    QVBoxLayout,
    QWidget,
)

from app.controller import StudyController
from core.link import LineItem, LinkBudget
from core.link_plan import band_ledger, ledger_derivation
from core.schema import FieldSpec
from core.study.model import LinkScenario, Polarization

__all__ = ["INPUT_GROUPS", "LedgerTableModel", "LinkLedgerPage"]

Index = QModelIndex | QPersistentModelIndex

#: Input groups of the form, in the ledger's own terms (LinkScenario field names).
INPUT_GROUPS: tuple[tuple[str, tuple[str, ...]], ...] = (
    ("Transmit", ("n_elements", "element_gain_dbi", "feed_loss_db", "scan_loss_db", "backoff_db")),
    (
        "Path",
        (
            "distance_m",
            "extra_loss_db",
            "rain_rate_mm_h",
            "polarization",
            "pressure_hpa",
            "temperature_c",
            "water_vapour_g_m3",
        ),
    ),
    (
        "Receive",
        (
            "bandwidth_mhz",
            "noise_figure_db",
            "required_snr_db",
            "implementation_margin_db",
            "rx_antenna_gain_dbi",
        ),
    ),
    ("Margin", ("fade_margin_db",)),
)

CAUTION_TEXT = (
    "⚠ <b>Caution.</b> RF exposure, transmit power and emission limits are set by local "
    "regulation. The EIRP and compliance distance here are far-field estimates for planning; "
    "defer to the applicable regulation and to licensed practice."
)

_DECIMALS = {"m": 1, "mm/h": 1, "hPa": 2, "°C": 1, "g/m³": 2, "MHz": 3}
_HEADER_BRUSH = QBrush(QColor("#e6e6e6"))
_SUBTOTAL_BRUSH = QBrush(QColor("#f4f4f4"))
_RESULT_BRUSH = QBrush(QColor("#dcebf5"))


def _spec(name: str) -> FieldSpec:
    return {f.name: f for f in dataclasses.fields(LinkScenario)}[name].metadata["spec"]


def _fmt_value(row: LineItem) -> str:
    if row.name == "Elements":
        return f"{row.value:.0f}"
    if row.unit == "GHz":
        return f"{row.value:.3f}"
    if row.unit in ("dB/km", "W", "m") or row.unit == "":
        return f"{row.value:.4g}"
    return f"{row.value:.2f}"


class LedgerTableModel(QAbstractTableModel):
    """Read-only ledger: group header rows, then the lines (name, value, unit, source)."""

    HEADERS = ("Line", "Value", "Unit", "Source")

    def __init__(self, parent: Any = None) -> None:
        super().__init__(parent)
        self.budget: LinkBudget | None = None
        #: One entry per row: a group name (header row) or a ledger line.
        self._rows: list[str | LineItem] = []

    def set_budget(self, budget: LinkBudget | None) -> None:
        self.beginResetModel()
        self.budget = budget
        self._rows = []
        if budget is not None:
            group = None
            for item in budget.items:
                if item.group != group:
                    group = item.group
                    self._rows.append(group)
                self._rows.append(item)
        self.endResetModel()

    def line(self, row: int) -> LineItem | None:
        """The ledger line shown in ``row`` (None for a group header)."""
        if 0 <= row < len(self._rows):
            entry = self._rows[row]
            return entry if isinstance(entry, LineItem) else None
        return None

    def row_of(self, name: str) -> int:
        for i, entry in enumerate(self._rows):
            if isinstance(entry, LineItem) and entry.name == name:
                return i
        raise KeyError(name)

    def rowCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008 - Qt signature
        return 0 if parent.isValid() else len(self._rows)

    def columnCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008
        return 0 if parent.isValid() else len(self.HEADERS)

    def headerData(self, section: int, orientation: Qt.Orientation, role: int = 0) -> Any:
        if (
            orientation == Qt.Orientation.Horizontal
            and role == Qt.ItemDataRole.DisplayRole
            and 0 <= section < len(self.HEADERS)
        ):
            return self.HEADERS[section]
        return None

    def data(self, index: Index, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if not index.isValid() or not (0 <= index.row() < len(self._rows)):
            return None
        entry, col = self._rows[index.row()], index.column()
        if isinstance(entry, str):
            if role == Qt.ItemDataRole.DisplayRole:
                return entry if col == 0 else ""
            if role == Qt.ItemDataRole.BackgroundRole:
                return _HEADER_BRUSH
            if role == Qt.ItemDataRole.FontRole:
                font = QFont()
                font.setBold(True)
                return font
            return None
        subtotal = entry.source == "Subtotal" or entry.group == "Result"
        if role == Qt.ItemDataRole.DisplayRole:
            return (
                "    " + entry.name,
                _fmt_value(entry),
                entry.unit,
                entry.source,
            )[col]
        if role == Qt.ItemDataRole.ToolTipRole:
            return f"{entry.name} = {entry.formula}\nSource: {entry.source}"
        if role == Qt.ItemDataRole.TextAlignmentRole and col == 1:
            return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
        if role == Qt.ItemDataRole.FontRole and subtotal:
            font = QFont()
            font.setBold(True)
            return font
        if role == Qt.ItemDataRole.BackgroundRole and subtotal:
            return _RESULT_BRUSH if entry.group == "Result" else _SUBTOTAL_BRUSH
        return None

    def flags(self, index: Index) -> Qt.ItemFlag:
        if not index.isValid():
            return Qt.ItemFlag.NoItemFlags
        if self.line(index.row()) is None:
            return Qt.ItemFlag.ItemIsEnabled
        return Qt.ItemFlag.ItemIsEnabled | Qt.ItemFlag.ItemIsSelectable


class LinkLedgerPage(QWidget):
    """Inputs of one band's link, its ledger, and the derived per-element P1dB."""

    title = "Link Ledger"

    def __init__(self, controller: StudyController, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._c = controller
        self.budget: LinkBudget | None = None
        #: LinkScenario field → editor widget.
        self.editors: dict[str, QWidget] = {}

        # -- band selector
        self.band_combo = QComboBox(self)
        self.band_combo.setObjectName("LedgerBandCombo")
        self.band_combo.setMinimumWidth(160)
        self.band_combo.currentIndexChanged.connect(self._on_band_combo_changed)
        self.band_info = QLabel("")
        self.band_info.setStyleSheet("color:#555")
        top = QHBoxLayout()
        top.addWidget(QLabel("<b>Band</b>"))
        top.addWidget(self.band_combo)
        top.addWidget(self.band_info, 1)

        # -- inputs
        form_host = QWidget()
        form_layout = QVBoxLayout(form_host)
        form_layout.setContentsMargins(0, 0, 0, 0)
        for group, names in INPUT_GROUPS:
            box = QGroupBox(group)
            form = QFormLayout(box)
            form.setFieldGrowthPolicy(QFormLayout.FieldGrowthPolicy.AllNonFixedFieldsGrow)
            for name in names:
                editor = self._make_editor(name)
                self.editors[name] = editor
                spec = _spec(name)
                label = QLabel(spec.label)
                if spec.note:
                    label.setToolTip(spec.note)
                    editor.setToolTip(spec.note)
                form.addRow(label, editor)
            form_layout.addWidget(box)
        form_layout.addStretch(1)
        scroll = QScrollArea(self)
        scroll.setWidget(form_host)
        scroll.setWidgetResizable(True)
        scroll.setFixedWidth(330)
        scroll.setHorizontalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)

        # -- ledger table
        self.model = LedgerTableModel(self)
        self.table = QTableView(self)
        self.table.setObjectName("LedgerTable")
        self.table.setModel(self.model)
        self.table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.table.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
        self.table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.table.verticalHeader().setVisible(False)
        self.table.verticalHeader().setDefaultSectionSize(22)
        hh = self.table.horizontalHeader()
        hh.setSectionResizeMode(0, QHeaderView.ResizeMode.ResizeToContents)
        hh.setSectionResizeMode(1, QHeaderView.ResizeMode.ResizeToContents)
        hh.setSectionResizeMode(2, QHeaderView.ResizeMode.ResizeToContents)
        hh.setSectionResizeMode(3, QHeaderView.ResizeMode.Stretch)
        self.table.selectionModel().currentRowChanged.connect(self._on_table_current_changed)

        # -- results
        self.p1db_label = QLabel("")
        self.p1db_label.setObjectName("LedgerP1dB")
        self.p1db_label.setWordWrap(True)
        self.adopt_button = QPushButton("Adopt as P1dB target")
        self.adopt_button.setObjectName("AdoptP1dB")
        self.adopt_button.setToolTip(
            "Set this band's P1dB target to the per-element P1dB the link needs (undoable)"
        )
        self.adopt_button.clicked.connect(self.adopt_p1db)
        self.eirp_label = QLabel("")
        self.eirp_label.setObjectName("LedgerEirp")
        self.eirp_label.setWordWrap(True)
        self.caution = QLabel(CAUTION_TEXT)
        self.caution.setObjectName("ExposureCaution")
        self.caution.setWordWrap(True)
        self.caution.setStyleSheet(
            "background:#fbefd9; border:1px solid #d08a1e; padding:6px; color:#3a2600"
        )
        self.message = QLabel("")
        self.message.setObjectName("LedgerMessage")
        self.message.setWordWrap(True)
        self.message.setStyleSheet("color:#8a3b00")

        p1db_row = QHBoxLayout()
        p1db_row.addWidget(self.p1db_label, 1)
        p1db_row.addWidget(self.adopt_button)
        right = QVBoxLayout()
        right.addWidget(
            QLabel(
                "<b>Link ledger</b> at the band's worst-case frequency (largest path loss). "
                "Select a line to see its derivation."
            )
        )
        right.addWidget(self.table, 1)
        right.addLayout(p1db_row)
        right.addWidget(self.eirp_label)
        right.addWidget(self.caution)
        right.addWidget(self.message)

        body = QHBoxLayout()
        body.addWidget(scroll)
        body.addLayout(right, 1)
        layout = QVBoxLayout(self)
        layout.addLayout(top)
        layout.addLayout(body, 1)

        controller.study_changed.connect(self._on_controller_study_changed)
        controller.edit_refused.connect(self._on_controller_edit_refused)
        self._on_controller_study_changed(controller.study)

    # -- construction ---------------------------------------------------------------------
    def _make_editor(self, name: str) -> QWidget:
        spec = _spec(name)
        if spec.kind == "enum":
            combo = QComboBox()
            for member in Polarization:
                combo.addItem(member.value.capitalize(), member.value)
            combo.currentIndexChanged.connect(lambda _i, n=name: self._on_editor_changed(n))
            return combo
        if spec.kind == "int":
            box: QAbstractSpinBox = QSpinBox()
            box.setRange(int(spec.lo if spec.lo is not None else 1), int(min(spec.hi, 2**31 - 1)))
        else:
            box = QDoubleSpinBox()
            decimals = _DECIMALS.get(spec.unit, 2)
            box.setDecimals(decimals)
            step = 10.0**-decimals
            lo = spec.lo + step if spec.lo_open else spec.lo
            hi = spec.hi - step if spec.hi_open else spec.hi
            box.setRange(lo, hi)
            box.setSingleStep(10.0 if spec.unit == "m" else 0.5 if spec.unit != "MHz" else 50.0)
        if spec.unit and spec.unit != "1":
            box.setSuffix(f" {spec.unit}")
        box.setKeyboardTracking(False)
        box.setAccelerated(True)
        box.setAlignment(Qt.AlignmentFlag.AlignRight)
        box.valueChanged.connect(lambda _v, n=name: self._on_editor_changed(n))
        return box

    # -- model → view ---------------------------------------------------------------------
    @property
    def band_index(self) -> int:
        return max(0, self.band_combo.currentIndex())

    def _on_controller_study_changed(self, study: Any) -> None:
        names = [b.name for b in study.bands]
        current = [self.band_combo.itemText(i) for i in range(self.band_combo.count())]
        if names != current:
            keep = self.band_combo.currentIndex()
            self.band_combo.blockSignals(True)
            self.band_combo.clear()
            self.band_combo.addItems(names)
            self.band_combo.setCurrentIndex(min(max(keep, 0), len(names) - 1))
            self.band_combo.blockSignals(False)
        self.message.setText("")
        self._refresh()

    def _on_band_combo_changed(self, _index: int) -> None:
        self._refresh()
        self._c.derivation_requested.emit(None)

    def _refresh(self) -> None:
        study = self._c.study
        if not study.bands:
            return
        band = study.bands[self.band_index]
        for name, editor in self.editors.items():
            value = getattr(band.link, name)
            editor.blockSignals(True)
            if isinstance(editor, QComboBox):
                editor.setCurrentIndex(editor.findData(str(getattr(value, "value", value))))
            else:
                editor.setValue(value)
            editor.blockSignals(False)
        self.band_info.setText(f"{band.f_low_ghz:g}–{band.f_high_ghz:g} GHz")
        selected = self._selected_line()
        try:
            budget = band_ledger(band)
        except ValueError as exc:
            self.budget = None
            self.model.set_budget(None)
            self.p1db_label.setText("")
            self.eirp_label.setText("")
            self.adopt_button.setEnabled(False)
            self.message.setText(f"✗ Ledger not computed — {exc}")
            return
        self.budget = budget
        self.model.set_budget(budget)
        self.adopt_button.setEnabled(True)
        target = band.targets.p1db_dbm
        delta = budget.p1db_elem_dbm - target
        self.p1db_label.setText(
            f"<b>P1dB needed per element: {budget.p1db_elem_dbm:.2f} dBm</b> "
            f"(average {budget.p_avg_elem_dbm:.2f} dBm + {band.link.backoff_db:g} dB back-off, "
            f"N = {band.link.n_elements}) — band target {target:.2f} dBm "
            f"({'+' if delta >= 0 else '−'}{abs(delta):.2f} dB)"
        )
        self.band_info.setText(
            f"{band.f_low_ghz:g}–{band.f_high_ghz:g} GHz · ledger at "
            f"{budget.f_hz / 1e9:.3f} GHz (worst case in band)"
        )
        self.eirp_label.setText(
            f"<b>Required EIRP {budget.required_eirp_dbm:.2f} dBm</b> "
            f"({10 ** ((budget.required_eirp_dbm - 30) / 10):.3g} W) · total average RF power "
            f"{budget.total_rf_power_w:.3g} W · compliance distance "
            f"<b>{budget.compliance_distance_m:.3g} m</b> on the beam axis for "
            f"S<sub>lim</sub> = {budget.exposure_limit_w_per_m2:g} W/m² (from memory)"
        )
        if selected is not None:
            self.select_line(selected)

    def _selected_line(self) -> str | None:
        index = self.table.currentIndex()
        line = self.model.line(index.row()) if index.isValid() else None
        return line.name if line is not None else None

    # -- view → model ---------------------------------------------------------------------
    def _on_editor_changed(self, name: str) -> None:
        editor = self.editors[name]
        spec = _spec(name)
        if isinstance(editor, QComboBox):
            value: Any = Polarization(editor.currentData())
        elif spec.kind == "int":
            value = int(editor.value())
        else:
            value = float(editor.value())
        band = self._c.study.bands[self.band_index]
        self._c.set_field(
            ("bands", self.band_index, "link", name),
            value,
            f"{band.name}: {spec.label}",
            mergeable=True,
        )

    def _on_controller_edit_refused(self, path: str, reason: str) -> None:
        if path.startswith("bands"):
            self.message.setText(f"✗ Not applied — {path}: {reason}")
            self._refresh()

    def _on_table_current_changed(self, current: QModelIndex, _previous: QModelIndex) -> None:
        line = self.model.line(current.row()) if current.isValid() else None
        if line is None or self.budget is None:
            return
        self._c.derivation_requested.emit(ledger_derivation(self.budget, line.name))

    def select_line(self, name: str) -> None:
        """Select the ledger line ``name`` (which shows its derivation)."""
        self.table.setCurrentIndex(self.model.index(self.model.row_of(name), 0))

    def adopt_p1db(self) -> None:
        """Set the band's P1dB target to the derived per-element P1dB (one undo step)."""
        if self.budget is None:
            return
        band = self._c.study.bands[self.band_index]
        self._c.set_field(
            ("bands", self.band_index, "targets", "p1db_dbm"),
            round(float(self.budget.p1db_elem_dbm), 2),
            f"{band.name}: adopt P1dB target from link",
        )
