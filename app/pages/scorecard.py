"""Scorecard page: every candidate against every band's targets, with die area, power and cost.

Rows are candidates; columns are grouped by band (gain, P1dB, PAE: the worst in-band estimate,
its margin to the target and a status symbol), then per-candidate figures. A two-row header
names the band above its three metric columns and the metric with its unit below. Selecting a
number shows its derivation in the Derivation dock.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import pandas as pd
from PySide6.QtCore import (
    QAbstractTableModel,
    QItemSelectionModel,
    QModelIndex,
    QPersistentModelIndex,
    QSortFilterProxyModel,
    Qt,
)
from PySide6.QtGui import QColor
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QVBoxLayout,
    QWidget,
)

from app.controller import StudyController
from app.pages.scorecard_header import (
    GROUP_ROLE,
    FramedSelectionDelegate,
    FrozenColumnTableView,
)
from app.style import STATUS_STYLE, candidate_color, status_color
from core.evaluation import Derivation

__all__ = [
    "GROUP_ROLE",
    "KEY_ROLE",
    "SORT_ROLE",
    "ScoreColumn",
    "ScorecardPage",
    "ScorecardProxyModel",
    "ScorecardTableModel",
    "array_dc_derivation",
    "score_derivation",
]

Index = QModelIndex | QPersistentModelIndex

#: Cell role: the value the proxy sorts by (float, or the candidate name for the first column).
SORT_ROLE = int(Qt.ItemDataRole.UserRole) + 2
#: Cell role: the derivation key of the cell's number, e.g. ("Switched GaAs", "n257", "gain").
KEY_ROLE = int(Qt.ItemDataRole.UserRole) + 3

_METRICS: tuple[tuple[str, str, str, str], ...] = (
    # (metric, header, unit, number format)
    ("gain", "Gain", "dB", "{:.1f}"),
    ("p1db", "P1dB", "dBm", "{:.1f}"),
    ("pae", "PAE", "%", "{:.1f}"),
)

#: Per-candidate columns: (source, column, header, unit, scale to the unit, format,
#: derivation key, tooltip). Sources: "eval" = the evaluation summary, "cost" = the cost model's
#: per-candidate table, "score" = the weighted scores. A column its source lacks is left out.
_SUMMARY: tuple[tuple[str, str, str, str, float, str, str, str], ...] = (
    (
        "eval",
        "die_area_mm2",
        "Largest die",
        "mm²",
        1.0,
        "{:.2f}",
        "die_area",
        "Area of the largest die; the total per element is on the Die & Cost page",
    ),
    ("eval", "dc_power_w", "DC at P1dB", "W/PA", 1.0, "{:.2f}", "dc_power", "One PA at P1dB"),
    (
        "eval",
        "array_dc_power_w",
        "Array DC at P1dB",
        "W",
        1.0,
        "{:.1f}",
        "array_dc_power",
        "Every PA of the array at P1dB (worst band)",
    ),
    (
        "cost",
        "unit_cost_at_design_volume_usd",
        "PA cost",
        "USD/radio",
        1.0,
        "{:,.2f}",
        "unit_cost",
        "PA cost per radio at the design volume, NRE share included",
    ),
    ("cost", "nre_usd", "NRE", "k USD", 1e-3, "{:,.0f}", "nre", "Non-recurring engineering"),
    ("score", "score", "Score", "0–1", 1.0, "{:.2f}", "score", "Weighted score, 1 = best"),
)

_PER_CANDIDATE = "Per candidate"
_EMPTY = pd.DataFrame({"candidate": []})
_DARK_TEXT = QColor("#1a1a1a")  # on the light status fills


def _records(table: pd.DataFrame) -> list[dict[str, Any]]:
    """Rows of a small frame as dicts of Python values (several times faster than to_dict)."""
    keys = list(table.columns)
    columns = [table[k].tolist() for k in keys]
    return [dict(zip(keys, values, strict=True)) for values in zip(*columns, strict=True)]


Findings = dict[tuple[str, str | None], list[str]]


@dataclass(frozen=True)
class ScoreColumn:
    """One scorecard column: the candidate name, a band × metric cell, or a summary figure."""

    kind: str  # "candidate" | "metric" | "summary"
    header: str
    unit: str = ""
    group: str = ""
    band: str | None = None
    field: str = ""  # metric name (gain/p1db/pae) or summary column name
    fmt: str = "{:g}"
    scale: float = 1.0  # summary value × scale = value in ``unit``
    derivation: str = ""  # derivation metric key of a summary column
    tooltip: str = ""
    source: str = ""  # summary columns: "eval", "cost" or "score"

    @property
    def key(self) -> tuple[str, str | None, str]:
        return (self.kind, self.band, self.field)


@dataclass(frozen=True)
class _Cell:
    text: str
    sort: Any
    tooltip: str
    status: str = ""
    derivation_key: tuple | None = None


def _finite(x: Any) -> bool:
    try:
        return x is not None and math.isfinite(float(x))
    except (TypeError, ValueError):
        return False


def array_dc_derivation(study: Any, ev: Any, name: str) -> Derivation | None:
    """How a candidate's array DC power follows from the per-band PA DC power of ``ev.design``.

    The estimator's rule (core.estimate, "Array-level conventions"): bands do not transmit at
    once, so the array draws max over bands b of N_b × P_DC,b, with N_b the band's element
    count and P_DC,b the DC power of the design that serves b (a wideband candidate's single
    "union" design serves every band). None if the record would not reproduce the summary.
    """
    design = ev.design[ev.design["candidate"] == name]
    summary = ev.summary[ev.summary["candidate"] == name]
    if design.empty or summary.empty:
        return None
    per_design = dict(zip(design["design"], design["dc_power_w"], strict=True))
    inputs, steps, products = [], [], []
    for band in study.bands:
        p_dc = per_design.get(band.name, per_design.get("union"))
        if p_dc is None:
            return None
        n = band.link.n_elements
        inputs += [(f"N ({band.name})", float(n), ""), (f"P_DC ({band.name})", float(p_dc), "W")]
        products.append(n * float(p_dc))
        steps.append((f"N·P_DC ({band.name})", products[-1], "W"))
    result = float(summary["array_dc_power_w"].iloc[0])
    if not math.isclose(max(products), result, rel_tol=1e-9, abs_tol=1e-12):
        return None
    return Derivation(
        title=f"Array DC power, {name}",
        formula="P_DC,array = max over bands b of N_b · P_DC,b  (one band transmits at a time)",
        inputs=tuple(inputs),
        steps=tuple(steps),
        result=result,
        unit="W",
        source="core.estimate array-level conventions; P_DC,b from the design table",
    )


def score_derivation(study: Any, scores: pd.DataFrame, name: str) -> Derivation | None:
    """How a candidate's weighted score follows from its normalised metric scores s_m."""
    row = scores[scores["candidate"] == name]
    if row.empty:
        return None
    w = study.weights
    parts = (
        ("performance", "worst margin"),
        ("unit_cost", "unit cost"),
        ("dc_power", "array DC power"),
        ("area", "die area"),
    )
    inputs = tuple(
        item
        for key, label in parts
        for item in (
            (f"w ({label})", float(getattr(w, key)), ""),
            (f"s ({label})", float(row[f"s_{key}"].iloc[0]), ""),
        )
    )
    return Derivation(
        title=f"Weighted score, {name}",
        formula="score = Σ w_m·s_m / Σ w_m;  s_m = min–max normalised across the candidates, "
        "1 = best (0 where a candidate has no value)",
        inputs=inputs,
        steps=(("Σ w_m", float(sum(getattr(w, k) for k, _ in parts)), ""),),
        result=float(row["score"].iloc[0]),
        unit="",
        source="core.costing.weighted_scores; weights from the study",
    )


class ScorecardTableModel(QAbstractTableModel):
    """Read-only matrix of scorecard cells built from an evaluation (and its cost and scores).

    A new evaluation with the same candidates and columns updates the cells in place
    (``dataChanged``), so views keep their selection; a change of shape resets the model.
    """

    def __init__(self, controller: StudyController) -> None:
        super().__init__(controller)
        self._c = controller
        self.columns: list[ScoreColumn] = []
        self.candidates: list[str] = []
        self._cells: dict[tuple[int, int], _Cell] = {}
        self._colour_index: dict[str, int] = {}
        self._colours: dict[Any, QColor] = {}  # data() is called per cell and role on paint
        self._maps: list[Mapping[tuple, Any]] = []
        self._ev: Any = None
        self.set_evaluation(controller.evaluation)

    # -- building ------------------------------------------------------------------------
    def _tables(self, ev: Any) -> dict[str, pd.DataFrame]:
        cost, scores = self._c.cost, self._c.scores
        return {
            "eval": ev.summary if ev is not None else _EMPTY,
            "cost": cost.per_candidate if cost is not None and ev is not None else _EMPTY,
            "score": scores if scores is not None and ev is not None else _EMPTY,
        }

    def _build_columns(self, ev: Any) -> list[ScoreColumn]:
        cols = [ScoreColumn("candidate", "Candidate", tooltip="Architecture · process card")]
        if ev is None:
            return cols
        for band in self._c.study.bands:
            span = f"{band.f_low_ghz:g}–{band.f_high_ghz:g} GHz"
            for metric, header, unit, fmt in _METRICS:
                tip = f"{band.name}: worst {header} over {span}; status and margin to target"
                cols.append(
                    ScoreColumn(
                        "metric", header, unit, band.name, band.name, metric, fmt, tooltip=tip
                    )
                )
        tables = self._tables(ev)
        for source, field, header, unit, scale, fmt, deriv, tip in _SUMMARY:
            if field in tables[source].columns:
                cols.append(
                    ScoreColumn(
                        "summary",
                        header,
                        unit,
                        _PER_CANDIDATE,
                        None,
                        field,
                        fmt,
                        scale,
                        deriv,
                        tip,
                        source,
                    )
                )
        return cols

    def set_evaluation(self, ev: Any) -> None:
        """Rebuild from ``ev`` (a :class:`core.evaluation.Evaluation` or None).

        The cost result and weighted scores are read from the controller, which computes them
        together with the evaluation.
        """
        study = self._c.study
        columns = self._build_columns(ev)
        covered = set(ev.summary["candidate"]) if ev is not None else set()
        candidates = [c.name for c in study.candidates if c.enabled and c.name in covered]
        cells = self._build_cells(ev, candidates, columns)
        keys = [c.key for c in columns]
        same_shape = candidates == self.candidates and keys == [c.key for c in self.columns]
        if not same_shape:
            self.beginResetModel()
        self.columns, self.candidates, self._cells, self._ev = columns, candidates, cells, ev
        self._colour_index = {c.name: i for i, c in enumerate(study.candidates)}
        # Lazy mappings: a derivation is assembled only when its cell is selected.
        self._maps = []
        if ev is not None:
            self._maps.append(ev.derivations)
            if self._c.cost is not None:
                self._maps.append(self._c.cost.derivations)
        if not same_shape:
            self.endResetModel()
        elif candidates:
            last = self.index(len(candidates) - 1, len(columns) - 1)
            self.dataChanged.emit(self.index(0, 0), last)
            self.headerDataChanged.emit(Qt.Orientation.Horizontal, 0, len(columns) - 1)

    def _build_cells(
        self, ev: Any, candidates: list[str], columns: list[ScoreColumn]
    ) -> dict[tuple[int, int], _Cell]:
        if ev is None or not candidates:
            return {}
        score = {(r["candidate"], r["band"], r["metric"]): r for r in _records(ev.scorecard)}
        rows = {
            source: {r["candidate"]: r for r in _records(table)}
            for source, table in self._tables(ev).items()
        }
        findings: Findings = {}
        cost_findings = self._c.cost.findings if self._c.cost is not None else ()
        for f in (*ev.findings, *cost_findings):
            findings.setdefault((f.candidate, f.band), []).append(f.message)
        cells: dict[tuple[int, int], _Cell] = {}
        for r, name in enumerate(candidates):
            srow = rows["eval"][name]
            kind, process = str(srow["kind"]), str(srow["process"])
            for c, col in enumerate(columns):
                if col.kind == "candidate":
                    tip = f"{name}\n{kind} on {process}"
                    if not srow.get("feasible", True):
                        tip += "\nSome targets cannot be reached (see the ! cells)."
                    cells[(r, c)] = _Cell(f"{name}\n{kind}", name.casefold(), tip)
                elif col.kind == "metric":
                    row = score.get((name, col.band, col.field))
                    cells[(r, c)] = self._metric_cell(name, col, row, findings)
                else:
                    record = rows[col.source].get(name, {})
                    cells[(r, c)] = self._summary_cell(name, col, record, findings)
        return cells

    @staticmethod
    def _metric_cell(name: str, col: ScoreColumn, row: Any, findings: Findings) -> _Cell:
        if row is None:
            return _Cell("—", -math.inf, f"{col.band} {col.header}: not evaluated")
        status = str(row["status"])
        symbol, word, _ = STATUS_STYLE.get(status, ("?", status, ""))
        if _finite(row["estimate"]):
            value, sort = col.fmt.format(float(row["estimate"])), float(row["estimate"])
        else:
            value, sort = "—", -math.inf  # no estimate sorts as the worst value
        margin = f"{float(row['margin']):+.1f}" if _finite(row["margin"]) else ""
        tip = [
            f"{name} · {col.band} · {col.header} (worst in band)",
            f"Estimate: {value} {col.unit}   Target: {float(row['target']):g} {col.unit}",
        ]
        if margin:
            tip.append(f"Margin: {margin} {'PAE points' if col.field == 'pae' else col.unit}")
        tip.append(f"Status: {symbol} {word}")
        msgs = findings.get((name, col.band), []) + findings.get((name, None), [])
        if status == "infeasible":
            tip += ["The best reachable value is shown."]
            tip += msgs or ["The target cannot be reached by this candidate."]
        elif msgs:
            tip += ["", "Notes for this band:", *msgs]
        text = f"{value}\n{symbol} {margin}".rstrip()
        return _Cell(text, sort, "\n".join(tip), status, (name, col.band, col.field))

    @staticmethod
    def _summary_cell(name: str, col: ScoreColumn, record: dict, findings: Findings) -> _Cell:
        value = record.get(col.field)
        if not _finite(value):
            lines = [f"{name} · {col.header}: not available"]
            if record.get("note"):
                lines.append(str(record["note"]))
            lines += findings.get((name, None), [])
            return _Cell("—", math.inf, "\n".join(lines))  # missing sorts last (ascending)
        shown = float(value) * col.scale
        text = col.fmt.format(shown)
        tip = f"{name} · {col.header}: {text} {col.unit}\n{col.tooltip}"
        if col.field == "die_area_mm2" and int(record.get("n_dies", 1) or 1) > 1:
            n_dies, total = int(record["n_dies"]), record.get("total_die_area_mm2")
            tip = f"{name} · largest die: {text} mm²\n{n_dies} dies per element"
            if _finite(total):
                tip += f", {float(total):.2f} mm² in total"
            text += f"\n{n_dies} dies"
        if col.field == "score" and record.get("pareto"):
            text += "\n◆ Pareto"
            tip += "\n◆ Pareto set on unit cost against worst margin"
        return _Cell(text, shown, tip, "", (name, None, col.derivation))

    # -- queries used by the page and tests ------------------------------------------------
    def column_of(self, kind: str, band: str | None, field: str) -> int:
        """Index of the column with key (kind, band, field), or -1."""
        keys = [col.key for col in self.columns]
        return keys.index((kind, band, field)) if (kind, band, field) in keys else -1

    def status_at(self, row: int, column: int) -> str:
        cell = self._cells.get((row, column))
        return cell.status if cell else ""

    def derivation_at(self, row: int, column: int) -> Any:
        """The derivation record behind cell (row, column), or None."""
        cell = self._cells.get((row, column))
        if cell is None or cell.derivation_key is None:
            return None
        key = cell.derivation_key
        for mapping in self._maps:
            if key in mapping:
                return mapping[key]
        if key[2] == "array_dc_power":
            return array_dc_derivation(self._c.study, self._ev, key[0])
        if key[2] == "score" and self._c.scores is not None:
            return score_derivation(self._c.study, self._c.scores, key[0])
        return None

    # -- Qt model API --------------------------------------------------------------------
    def rowCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008 - Qt signature
        return 0 if parent.isValid() else len(self.candidates)

    def columnCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008
        return 0 if parent.isValid() else len(self.columns)

    def headerData(self, section: int, orientation: Qt.Orientation, role: int = 0) -> Any:
        if orientation != Qt.Orientation.Horizontal or not 0 <= section < len(self.columns):
            return None
        col = self.columns[section]
        if role == Qt.ItemDataRole.DisplayRole:
            return f"{col.header}\n({col.unit})" if col.unit else col.header
        if role == GROUP_ROLE:
            return col.group
        if role == Qt.ItemDataRole.ToolTipRole:
            return col.tooltip or None
        return None

    def data(self, index: Index, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if not index.isValid():
            return None
        cell = self._cells.get((index.row(), index.column()))
        if cell is None:
            return None
        col = self.columns[index.column()]
        if role == Qt.ItemDataRole.DisplayRole:
            return cell.text
        if role == Qt.ItemDataRole.ToolTipRole:
            return cell.tooltip
        if role == SORT_ROLE:
            return cell.sort
        if role == KEY_ROLE:
            return cell.derivation_key
        if role == Qt.ItemDataRole.BackgroundRole and cell.status:
            return self._colours.setdefault(cell.status, status_color(cell.status))
        if role == Qt.ItemDataRole.ForegroundRole and cell.status:
            return _DARK_TEXT
        if role == Qt.ItemDataRole.DecorationRole and col.kind == "candidate":
            i = self._colour_index.get(self.candidates[index.row()], 0)
            return self._colours.setdefault(i, candidate_color(i))
        if role == Qt.ItemDataRole.TextAlignmentRole:
            if col.kind == "candidate":
                return int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter)
            if col.kind == "metric":
                return int(Qt.AlignmentFlag.AlignCenter)
            return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
        return None

    def flags(self, index: Index) -> Qt.ItemFlag:
        if not index.isValid():
            return Qt.ItemFlag.NoItemFlags
        return Qt.ItemFlag.ItemIsEnabled | Qt.ItemFlag.ItemIsSelectable


class ScorecardProxyModel(QSortFilterProxyModel):
    """Sorts the scorecard by each cell's numeric value (``SORT_ROLE``), not by its text."""

    def __init__(self, parent: Any = None) -> None:
        super().__init__(parent)
        self.setSortRole(SORT_ROLE)
        self.setDynamicSortFilter(True)

    def lessThan(self, left: Index, right: Index) -> bool:
        a, b = left.data(SORT_ROLE), right.data(SORT_ROLE)
        if isinstance(a, str) or isinstance(b, str):
            return str(a) < str(b)
        if a is None or b is None:
            return a is None and b is not None
        return float(a) < float(b)


def _legend_html() -> str:
    chips = []
    for status in ("meets", "marginal", "misses", "infeasible"):
        symbol, word, colour = STATUS_STYLE[status]
        chips.append(
            f"<span style='background:{colour};'>&nbsp;<b>{symbol}</b>&nbsp;</span>&nbsp;{word}"
        )
    return "&nbsp;&nbsp;&nbsp;".join(chips)


class ScorecardPage(QWidget):
    """Candidates × bands × (gain, P1dB, PAE) against the targets, plus area, power and cost."""

    title = "Scorecard"

    def __init__(self, controller: StudyController, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._c = controller
        self.model = ScorecardTableModel(controller)
        self.proxy = ScorecardProxyModel(self)
        self.proxy.setSourceModel(self.model)

        self.table = FrozenColumnTableView(self)
        self.table.setObjectName("ScorecardTable")
        self.header = self.table.horizontalHeader()
        self.table.setModel(self.proxy)
        self.table.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
        self.table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectItems)
        self.table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.table.setWordWrap(False)
        self.table.setCornerButtonEnabled(False)
        self.table.verticalHeader().setVisible(False)
        # Sizes are fitted once per new table shape (see _fit), not on every data change:
        # ResizeToContents would re-measure every cell on each edit.
        self.table.verticalHeader().setSectionResizeMode(QHeaderView.ResizeMode.Interactive)
        self.header.setSectionResizeMode(QHeaderView.ResizeMode.Interactive)
        self.table.frozen.verticalHeader().setSectionResizeMode(QHeaderView.ResizeMode.Fixed)
        self.model.modelReset.connect(self._fit)
        self.header.setSortIndicator(-1, Qt.SortOrder.AscendingOrder)  # study order at first
        self.table.setSortingEnabled(True)
        self.table.setItemDelegate(FramedSelectionDelegate(self.table))

        heading = QLabel(
            "<b>Scorecard</b> — each cell is the worst estimate over the band, then its status "
            "and margin to the band's target (positive = better than the target). "
            "Select a number to see how it was computed; click a column header to sort."
        )
        heading.setWordWrap(True)
        self.tolerance_label = QLabel()
        self.tolerance_label.setObjectName("ScorecardTolerance")
        self.legend = QLabel(_legend_html())
        self.legend.setObjectName("ScorecardLegend")
        row = QHBoxLayout()
        row.addWidget(self.tolerance_label)
        row.addStretch(1)
        row.addWidget(self.legend)
        self.empty = QLabel(
            "No candidates are shown — enable one on the Candidates page to score it."
        )
        self.empty.setObjectName("ScorecardEmpty")
        self.empty.setAlignment(Qt.AlignmentFlag.AlignCenter)
        self.empty.setStyleSheet("color:#555; font-size:14px; padding:24px")

        layout = QVBoxLayout(self)
        layout.addWidget(heading)
        layout.addLayout(row)
        layout.addWidget(self.table, 1)
        layout.addWidget(self.empty, 1)

        self.table.selectionModel().currentChanged.connect(self._on_table_current_changed)
        controller.evaluation_changed.connect(self._on_controller_evaluation_changed)
        self._refresh_labels()

    # -- controller → view ---------------------------------------------------------------
    def _on_controller_evaluation_changed(self, evaluation: Any, _seconds: float) -> None:
        keep = self._current_key()
        self.model.set_evaluation(evaluation)
        self._refresh_labels()
        if keep is not None and not self.table.currentIndex().isValid():
            self._select_key(*keep)
        # The dock shows the new value of the same number — but only while this page is in
        # view, so an edit elsewhere does not take the dock from another page's selection.
        if self.isVisible() and self.table.currentIndex().isValid():
            self._request(self.table.currentIndex())

    def _refresh_labels(self) -> None:
        tol = self._c.study.tolerance
        self.tolerance_label.setText(
            f"Marginal = within <b>{tol.marginal_db:g} dB</b> (gain, P1dB) or "
            f"<b>{tol.marginal_pae_pts:g} PAE points</b> of the target."
        )
        has_rows = self.model.rowCount() > 0
        self.table.setVisible(has_rows)
        self.empty.setVisible(not has_rows)

    # -- selection -------------------------------------------------------------------------
    def _current_key(self) -> tuple[str, tuple] | None:
        idx = self.table.currentIndex()
        if not idx.isValid():
            return None
        src = self.proxy.mapToSource(idx)
        return self.model.candidates[src.row()], self.model.columns[src.column()].key

    def _select_key(self, candidate: str, col_key: tuple) -> bool:
        if candidate not in self.model.candidates:
            return False
        column = self.model.column_of(*col_key)
        if column < 0:
            return False
        self.select_cell(self.model.candidates.index(candidate), column)
        return True

    def select_cell(self, row: int, column: int) -> None:
        """Make source cell (row, column) current and selected (its derivation is shown)."""
        idx = self.proxy.mapFromSource(self.model.index(row, column))
        self.table.selectionModel().setCurrentIndex(
            idx, QItemSelectionModel.SelectionFlag.ClearAndSelect
        )
        self.table.scrollTo(idx)

    def _on_table_current_changed(self, current: QModelIndex, _previous: QModelIndex) -> None:
        if current.isValid():
            self._request(current)

    def _request(self, proxy_index: QModelIndex) -> None:
        src = self.proxy.mapToSource(proxy_index)
        self._c.derivation_requested.emit(self.model.derivation_at(src.row(), src.column()))

    def _fit(self) -> None:
        """Fit rows and columns to their contents (after the table's shape changed)."""
        self.table.resizeColumnsToContents()  # the frozen column follows via sectionResized
        self.table.resizeRowsToContents()

    def prepare_snapshot(self) -> None:
        """Select the first candidate's gain on the first band so the dock shows a derivation."""
        if self.model.rowCount() and self.model.columnCount() > 1:
            self.select_cell(0, 1)
            self._request(self.table.currentIndex())
