"""The process-card editor table: one card's parameters in groups, with derived figures.

Rows are the parameters of one :class:`~core.process.ProcessCard` grouped by what they describe
(device, passives, layout, switches, wafer and masks), each with its label, value, unit and note
from the core field specs, plus three read-only figures the card implies (switch cutoff and the
Cripps load line per mm). Edits go through the controller as undoable edits; a rename carries
the candidates that use the card along in the same undo step.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Literal

from PySide6.QtCore import (
    QAbstractTableModel,
    QModelIndex,
    QPersistentModelIndex,
    QRect,
    QSize,
    Qt,
)
from PySide6.QtGui import QColor, QFont
from PySide6.QtWidgets import QApplication, QStyle, QStyleOptionViewItem, QTableView

from app.controller import StudyController
from app.tables import OPTIONS_ROLE, FieldDelegate, parse_cell
from core.edits import Compound, SetField, format_path
from core.evaluation import Derivation
from core.process import ProcessCard
from core.rf import load_line
from core.schema import FieldSpec, field_spec
from core.study import Study

__all__ = [
    "CARD_GROUPS",
    "CardParameterTableModel",
    "CardTableDelegate",
    "card_derivations",
    "rename_card_edit",
]

Index = QModelIndex | QPersistentModelIndex

#: Parameter groups of the card editor, in display order. Every ProcessCard field except
#: ``source_note`` (edited under the table) appears exactly once.
CARD_GROUPS: tuple[tuple[str, tuple[str, ...]], ...] = (
    ("Card", ("name", "technology")),
    (
        "Device",
        (
            "vdd_v",
            "v_knee_v",
            "i_max_a_per_mm",
            "c_out_pf_per_mm",
            "fmax_ghz",
            "stage_derating_db",
            "compression_db",
            "drain_eff_tuned_pct",
            "drain_eff_untuned_pct",
            "harmonic_bw_pct",
            "driver_bias_pct",
        ),
    ),
    ("Passives", ("q_passive", "q_ref_ghz", "q_exponent", "eps_eff")),
    (
        "Layout",
        (
            "cell_width_mm",
            "max_cells",
            "active_area_mm2_per_mm",
            "line_pitch_mm",
            "rf_pad_area_mm2",
            "dc_pad_area_mm2",
            "control_area_mm2",
            "layout_overhead",
            "min_die_area_mm2",
            "die_aspect",
        ),
    ),
    ("Switches", ("ron_w_ohm_mm", "coff_per_w_ff_per_mm", "switch_v_max_v")),
    ("Wafer & masks", ("wafer_diameter_mm", "wafer_cost_usd", "d0_per_cm2", "mask_set_cost_usd")),
)
_DERIVED_GROUP = "Derived (read-only)"
#: Notes for the two fields whose spec has none, where the page has something to say.
_PAGE_NOTES = {
    "name": "Candidates refer to the card by this name; renaming carries them along.",
    "technology": "Informational; the figures below drive the estimate.",
}
_CRIPPS = "S. C. Cripps, RF Power Amplifiers for Wireless Communications, 2nd ed., 2006, ch. 2"


def rename_card_edit(study: Study, index: int, new_name: str) -> Compound:
    """One undoable edit renaming card ``index`` and every candidate reference to it."""
    old = study.process_cards[index].name
    edits: list[SetField] = [SetField(("process_cards", index, "name"), old, new_name)]
    for j, cand in enumerate(study.candidates):
        if cand.process == old:
            edits.append(SetField(("candidates", j, "process"), old, new_name))
    return Compound(tuple(edits), f"Rename card {old} → {new_name}")


def card_derivations(card: ProcessCard) -> dict[str, Derivation]:
    """Switch cutoff f_c, saturated power per mm and optimum load times width of ``card``.

    Returns
    -------
    dict of str to Derivation
        ``"f_c"`` in GHz, ``"psat"`` (Psat') in W/mm, ``"ropt"`` (Ropt·W) in Ω·mm; each is the
        record the Derivation dock shows.

    References
    ----------
    Cripps, RF Power Amplifiers for Wireless Communications, 2nd ed., ch. 2 (load line:
    Psat = (Vdd − Vk)·Imax/4, Ropt = 2(Vdd − Vk)/Imax). Switch figure of merit
    f_c = 1/(2π·Ron·Coff), width-independent because Ron ∝ 1/W and Coff ∝ W.
    """
    ropt_w, psat_w = load_line(card.vdd_v, card.v_knee_v, card.i_max_a_per_mm)
    swing = card.vdd_v - card.v_knee_v
    load_inputs = (
        ("Vdd", card.vdd_v, "V"),
        ("Vk", card.v_knee_v, "V"),
        ("Imax'", card.i_max_a_per_mm, "A/mm"),
    )
    return {
        "f_c": Derivation(
            title="Switch cutoff f_c",
            formula="f_c = 1 / (2π · (Ron·W) · (Coff/W))",
            inputs=(
                ("Ron·W", card.ron_w_ohm_mm, "Ω·mm"),
                ("Coff/W", card.coff_per_w_ff_per_mm, "fF/mm"),
            ),
            steps=(("Ron·Coff", card.ron_w_ohm_mm * card.coff_per_w_ff_per_mm * 1e-15, "s"),),
            result=card.switch_cutoff_hz / 1e9,
            unit="GHz",
            source="Switch figure of merit; independent of the switch width.",
        ),
        "psat": Derivation(
            title="Saturated power per mm",
            formula="Psat' = (Vdd − Vk) · Imax' / 4",
            inputs=load_inputs,
            steps=(("Vdd − Vk", swing, "V"),),
            result=float(psat_w),
            unit="W/mm",
            source=_CRIPPS + " (load line).",
        ),
        "ropt": Derivation(
            title="Optimum load × width",
            formula="Ropt·W = 2 · (Vdd − Vk) / Imax'",
            inputs=load_inputs,
            steps=(("Vdd − Vk", swing, "V"),),
            result=float(ropt_w),
            unit="Ω·mm",
            source=_CRIPPS + " (load line).",
        ),
    }


@dataclass(frozen=True, slots=True)
class _Row:
    kind: Literal["group", "field", "derived"]
    key: str  # group title, field name or derivation key


def _rows() -> tuple[_Row, ...]:
    rows: list[_Row] = []
    for i, (title, names) in enumerate(CARD_GROUPS):
        rows.append(_Row("group", title))
        rows.extend(_Row("field", n) for n in names)
        if i == 0:
            # The figures the card implies sit right under its name, where they stay in view.
            rows.append(_Row("group", _DERIVED_GROUP))
            rows.extend(_Row("derived", k) for k in ("f_c", "psat", "ropt"))
    return tuple(rows)


def _unit_text(spec: FieldSpec) -> str:
    return "" if spec.unit == "1" else spec.unit


class CardParameterTableModel(QAbstractTableModel):
    """Rows = the parameters of one process card, in groups; columns = parameter/value/unit/note.

    Values are edited in the Value column only; a refused value is shown in its row's Note
    column (icon and reason) and reported to the controller.
    """

    COLUMNS = ("Parameter", "Value", "Unit", "Note")
    VALUE = 1
    NOTE = 3

    def __init__(self, controller: StudyController) -> None:
        super().__init__(controller)
        self._shown_card: Any = None
        self._c = controller
        self._rows = _rows()
        self._card_index: int | None = None
        self.row_errors: dict[int, str] = {}
        self._last_refusal: tuple[str, str] = ("", "")
        controller.edit_refused.connect(self._on_controller_edit_refused)
        controller.study_changed.connect(self._on_controller_study_changed)

    # -- which card ----------------------------------------------------------------------
    @property
    def card_index(self) -> int | None:
        return self._card_index

    def card(self) -> ProcessCard | None:
        cards = self._c.study.process_cards
        i = self._card_index
        return cards[i] if i is not None and 0 <= i < len(cards) else None

    def set_card_index(self, index: int | None) -> None:
        """Show card ``index`` of the study (None: no card)."""
        self.beginResetModel()
        n = len(self._c.study.process_cards)
        self._card_index = index if index is not None and 0 <= index < n else None
        self.row_errors.clear()
        self.endResetModel()

    def row_of(self, key: str) -> int:
        """Row of field or derivation ``key`` (or group title)."""
        for i, r in enumerate(self._rows):
            if r.key == key:
                return i
        raise KeyError(key)

    def row_kind(self, row: int) -> str:
        return self._rows[row].kind

    def derivation(self, row: int) -> Derivation | None:
        """The derivation shown in ``row`` (None for a row that is not a derived figure)."""
        card = self.card()
        r = self._rows[row]
        if card is None or r.kind != "derived":
            return None
        return card_derivations(card)[r.key]

    # -- controller → model --------------------------------------------------------------
    def _on_controller_edit_refused(self, path: str, reason: str) -> None:
        self._last_refusal = (path, reason)

    def _on_controller_study_changed(self, _study: Any) -> None:
        if self._card_index is not None and self.card() is None:
            self.set_card_index(None)
            return
        card = self.card()
        if card is self._shown_card and not self.row_errors:
            return  # edits elsewhere in the study leave this card (the same object) untouched
        self._shown_card = card
        self.row_errors.clear()
        if self._rows and card is not None:
            self.dataChanged.emit(
                self.index(0, 0), self.index(len(self._rows) - 1, len(self.COLUMNS) - 1)
            )

    # -- Qt model API --------------------------------------------------------------------
    def rowCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008 - Qt signature
        return 0 if parent.isValid() or self.card() is None else len(self._rows)

    def columnCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008
        return 0 if parent.isValid() else len(self.COLUMNS)

    def headerData(self, section: int, orientation: Qt.Orientation, role: int = 0) -> Any:
        if (
            orientation == Qt.Orientation.Horizontal
            and role == Qt.ItemDataRole.DisplayRole
            and 0 <= section < len(self.COLUMNS)
        ):
            return self.COLUMNS[section]
        return None

    def _field_text(self, card: ProcessCard, name: str, *, edit: bool = False) -> str:
        """The value as shown (thousands grouped) or, with ``edit``, as typed back in."""
        value = getattr(card, name)
        if hasattr(value, "value") and isinstance(value.value, str):
            return value.value
        if isinstance(value, float | int) and not isinstance(value, bool):
            return f"{value:.12g}" if edit else f"{value:,.12g}"
        return str(value)

    def data(self, index: Index, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        card = self.card()
        if card is None or not index.isValid() or not 0 <= index.row() < len(self._rows):
            return None
        row, col = self._rows[index.row()], index.column()
        if row.kind == "group":
            return self._group_data(row, col, role)
        if row.kind == "derived":
            return self._derived_data(card, index.row(), col, role)
        return self._field_data(card, index.row(), row.key, col, role)

    def _group_data(self, row: _Row, col: int, role: int) -> Any:
        if role == Qt.ItemDataRole.DisplayRole:
            return row.key if col == 0 else ""
        if role == Qt.ItemDataRole.FontRole:
            font = QFont()
            font.setBold(True)
            return font
        if role == Qt.ItemDataRole.BackgroundRole:
            return QColor("#e4ebf2")
        return None

    def _derived_data(self, card: ProcessCard, r: int, col: int, role: int) -> Any:
        d = self.derivation(r)
        assert d is not None
        if role == Qt.ItemDataRole.DisplayRole:
            short = " (Cripps load line)" if d.source.startswith(_CRIPPS) else ""
            return (d.title, f"{d.result:.4g}", d.unit, d.formula + short)[col]
        if role == Qt.ItemDataRole.ToolTipRole:
            return f"{d.source} Read-only; select the row to see its derivation."
        if role == Qt.ItemDataRole.BackgroundRole:
            return QColor("#f4f4f4")
        if role == Qt.ItemDataRole.TextAlignmentRole and col == self.VALUE:
            return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
        if role == Qt.ItemDataRole.ForegroundRole and col == self.NOTE:
            return QColor("#555555")
        return None

    def _field_data(self, card: ProcessCard, r: int, name: str, col: int, role: int) -> Any:
        spec = field_spec(ProcessCard, name)
        err = self.row_errors.get(r)
        if role in (Qt.ItemDataRole.DisplayRole, Qt.ItemDataRole.EditRole):
            if col == 0:
                return spec.label or name
            if col == self.VALUE:
                return self._field_text(card, name, edit=role == Qt.ItemDataRole.EditRole)
            if col == 2:
                return _unit_text(spec)
            if err:
                where, reason = err.split(": ", 1)
                if not where.endswith(f".{name}"):  # a cross-field rule named another field
                    reason = f"{where.rsplit('.', 1)[-1]} {reason}"
                return f"✗ Not applied: {reason}"
            return spec.note or _PAGE_NOTES.get(name, "")
        if role == OPTIONS_ROLE and col == self.VALUE and spec.kind == "enum":
            return [(m.value, m.value) for m in spec.cls]  # type: ignore[union-attr]
        if role == Qt.ItemDataRole.ToolTipRole:
            path = format_path(("process_cards", self._card_index or 0, name))
            return f"{path}: {err}" if err and col == self.NOTE else path
        if role == Qt.ItemDataRole.DecorationRole and err and col == self.NOTE:
            return QApplication.style().standardIcon(QStyle.StandardPixmap.SP_MessageBoxWarning)
        if role == Qt.ItemDataRole.BackgroundRole and err and col in (self.VALUE, self.NOTE):
            return QColor("#f3cdb8")
        if role == Qt.ItemDataRole.ForegroundRole and col == self.NOTE:
            return QColor("#8a3b00") if err else QColor("#555555")
        if role == Qt.ItemDataRole.TextAlignmentRole and col == self.VALUE:
            if spec.kind in ("float", "int"):
                return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
        return None

    def flags(self, index: Index) -> Qt.ItemFlag:
        if not index.isValid() or not 0 <= index.row() < len(self._rows):
            return Qt.ItemFlag.NoItemFlags
        kind = self._rows[index.row()].kind
        if kind == "group":
            return Qt.ItemFlag.ItemIsEnabled
        base = Qt.ItemFlag.ItemIsEnabled | Qt.ItemFlag.ItemIsSelectable
        if kind == "field" and index.column() == self.VALUE:
            base |= Qt.ItemFlag.ItemIsEditable
        return base

    def setData(self, index: Index, value: Any, role: int = Qt.ItemDataRole.EditRole) -> bool:
        card = self.card()
        if (
            role != Qt.ItemDataRole.EditRole
            or card is None
            or not index.isValid()
            or index.column() != self.VALUE
            or self._rows[index.row()].kind != "field"
        ):
            return False
        return self.set_field(self._rows[index.row()].key, value)

    # -- edits ---------------------------------------------------------------------------
    def set_field(self, name: str, value: Any) -> bool:
        """Set field ``name`` of the shown card from typed text or a value; False if refused."""
        i = self._card_index
        assert i is not None
        r = self.row_of(name)
        spec = field_spec(ProcessCard, name)
        path = ("process_cards", i, name)
        where = format_path(path)
        try:
            parsed = parse_cell(spec, value) if isinstance(value, str) else value
        except ValueError as exc:
            return self._refuse(r, where, str(exc))
        if name == "name":
            parsed = parsed.strip()
            if parsed == self.card().name:  # type: ignore[union-attr]
                return True
            ok = self._c.submit(rename_card_edit(self._c.study, i, parsed))
        else:
            ok = self._c.set_field(path, parsed, f"Set {spec.label or name}")
        if not ok:
            problem_path, reason = self._last_refusal
            self.row_errors[r] = f"{problem_path or where}: {reason}"
            self._emit_row(r)
            return False
        self.row_errors.pop(r, None)
        self._emit_row(r)
        return True

    def _refuse(self, r: int, where: str, reason: str) -> bool:
        self.row_errors[r] = f"{where}: {reason}"
        self._c.report_refusal(where, reason)
        self._emit_row(r)
        return False

    def _emit_row(self, r: int) -> None:
        self.dataChanged.emit(self.index(r, 0), self.index(r, len(self.COLUMNS) - 1))


class CardTableDelegate(FieldDelegate):
    """FieldDelegate whose row-height hint leaves room for every line of a wrapped note.

    Qt's own hint measures wrapped text a few pixels wider than it paints it, so a note that
    barely fits one line is painted elided; measuring against a slightly narrower width fixes it.
    """

    def __init__(self, view: QTableView) -> None:
        super().__init__(view)
        self._view = view

    def sizeHint(self, option: QStyleOptionViewItem, index: Index) -> QSize:
        hint = super().sizeHint(option, index)
        text = index.data(Qt.ItemDataRole.DisplayRole)
        if index.column() != CardParameterTableModel.NOTE or not text:
            return hint
        width = self._view.columnWidth(index.column()) - 10
        if index.data(Qt.ItemDataRole.DecorationRole) is not None:
            width -= 22  # the warning icon of a refused value
        box = option.fontMetrics.boundingRect(
            QRect(0, 0, max(width, 40), 100_000), int(Qt.TextFlag.TextWordWrap), str(text)
        )
        hint.setHeight(max(hint.height(), box.height() + 6))
        return hint
