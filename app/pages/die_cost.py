"""Die & Cost page: die area and unit cost by part, cost versus volume, wafer map, cost settings.

Candidates are labelled by letter (A = the study's first candidate; the key above the plots
names them) and coloured as on every page. Four plots, each item created once and updated with
``setOpts``/``setData``:

- die area of an element channel, stacked by part (:func:`core.costing.area_breakdown`);
- PA cost per radio at the design volume, stacked by part, with the NRE share on top;
- PA cost per radio versus volume (log–log), one line per candidate, the crossovers marked
  (labelled where the cheapest candidate changes and for the selected candidate; hover any
  mark for its text) and the design and lifetime volumes as vertical lines;
- the wafer map of the selected candidate's die: the whole-die sites of the best grid inside
  the usable circle, with the dies-per-wafer formula, the exact count and the yield.

Below: the cost figures per candidate (selecting a number, or clicking a bar, shows its
derivation) and the cost settings of the study with the wafer figures of the selected
candidate's process card, each change an undoable edit through the controller.
"""

from __future__ import annotations

import math
import string
from typing import Any

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QAbstractTableModel, QModelIndex, QPersistentModelIndex, Qt
from PySide6.QtGui import QBrush, QColor, QIcon, QPainterPath, QPen, QPixmap
from PySide6.QtWidgets import (
    QAbstractItemView,
    QComboBox,
    QGraphicsPathItem,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QSplitter,
    QTableView,
    QTabWidget,
    QVBoxLayout,
    QWidget,
)

from app.controller import StudyController
from app.style import candidate_color, style_plot
from app.tables import OPTIONS_ROLE, FieldDelegate, parse_cell
from core.costing import AREA_PARTS, CostResult, area_breakdown, cost_study, weighted_scores
from core.edits import format_path, get_in
from core.process import ProcessCard
from core.schema import FieldSpec, field_spec
from core.study import CostSettings

__all__ = [
    "COST_PARTS",
    "CostSettingsTableModel",
    "CostSummaryTableModel",
    "DieCostPage",
    "candidate_letter",
]

Index = QModelIndex | QPersistentModelIndex

#: (per_candidate column, legend text), bottom to top of the unit-cost bars (USD per radio).
COST_PARTS = (
    ("radio_die_usd", "Die (with test scrap)"),
    ("radio_test_usd", "Probe test"),
    ("radio_package_usd", "Package, assembly"),
    ("radio_band_select_usd", "Band-select parts"),
    ("nre_per_radio_usd", "NRE share"),
)
# Part colours: Okabe–Ito blue, sky blue, bluish green / orange, reddish purple, and grey for
# the overhead-like last part (our choice of order).
_AREA_COLOURS = ("#0072B2", "#56B4E9", "#009E73", "#E69F00", "#BBBBBB")
_COST_COLOURS = ("#0072B2", "#56B4E9", "#E69F00", "#CC79A7", "#BBBBBB")
_CARD_FIELDS = ("wafer_diameter_mm", "wafer_cost_usd", "d0_per_cm2", "mask_set_cost_usd")
_BAR_WIDTH = 0.62
_NO_FIT = "no whole die fits"
_WARN = "#a33a00"
_LINE_LABEL = {"color": "#202020", "fill": (255, 255, 255, 210), "anchors": [(0, 0.5), (0, 0.5)]}


def candidate_letter(index: int) -> str:
    """A, B, … Z, A2, B2, … for the ``index``-th candidate of the study."""
    letter = string.ascii_uppercase[index % 26]
    return letter if index < 26 else f"{letter}{index // 26 + 1}"


def _grouped(v: float) -> str:
    """12345.6 → "12 300": three significant figures, thousands grouped by spaces."""
    if not math.isfinite(v) or v <= 0:
        return "—"
    r = round(v, 2 - math.floor(math.log10(v)))
    return f"{r:,.0f}".replace(",", " ") if r >= 100 else f"{r:.3g}"


def _key_html(entries: list[tuple[str, str]]) -> str:
    return " &nbsp; ".join(f"<span style='color:{c}'>■</span>&nbsp;{t}" for c, t in entries)


class CostSummaryTableModel(QAbstractTableModel):
    """Read-only cost figures per candidate; each number knows its derivation key."""

    #: (header, per_candidate column or "score"/"pareto", format, derivation metric)
    COLUMNS = (
        ("Candidate", "candidate", "{}", ""),
        ("Die\ndesigns", "n_designs", "{:.0f}", "nre"),
        ("Die area per\nelement (mm²)", "channel_area_mm2", "{:.2f}", "die_area"),
        ("Dies/wafer\nformula", "gross_dpw_formula", "{:,.0f}", "die_cost"),
        ("Dies/wafer\nexact", "gross_dpw_exact", "{:,.0f}", "die_cost"),
        ("Die yield\n(%)", "die_yield_pct", "{:.1f}", "die_cost"),
        ("Per element\n(USD)", "recurring_usd", "{:,.2f}", "unit_cost"),
        ("PA cost per\nradio (USD)", "pa_cost_per_radio_usd", "{:,.2f}", "unit_cost"),
        ("NRE\n(USD)", "nre_usd", "{:,.0f}", "nre"),
        ("At design\nvolume (USD)", "unit_cost_at_design_volume_usd", "{:,.2f}", "unit_cost"),
        ("Score", "score", "{:.2f}", ""),
        ("Pareto", "pareto", "{}", ""),
    )  # fmt: skip

    def __init__(self, parent: Any = None) -> None:
        super().__init__(parent)
        self.rows: list[dict[str, Any]] = []
        self.labels: list[tuple[str, QColor]] = []

    def set_rows(self, rows: list[dict[str, Any]], labels: list[tuple[str, QColor]]) -> None:
        if [r["candidate"] for r in rows] != [r["candidate"] for r in self.rows]:
            self.beginResetModel()
            self.rows, self.labels = rows, labels
            self.endResetModel()
            return
        self.rows, self.labels = rows, labels
        if rows:
            self.dataChanged.emit(
                self.index(0, 0), self.index(len(rows) - 1, len(self.COLUMNS) - 1)
            )

    def rowCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008 - Qt signature
        return 0 if parent.isValid() else len(self.rows)

    def columnCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008
        return 0 if parent.isValid() else len(self.COLUMNS)

    def headerData(self, section: int, orientation: Qt.Orientation, role: int = 0) -> Any:
        if orientation == Qt.Orientation.Horizontal and 0 <= section < len(self.COLUMNS):
            if role == Qt.ItemDataRole.DisplayRole:
                return self.COLUMNS[section][0]
        return None

    def text(self, row: int, column: int) -> str:
        _h, key, fmt, _d = self.COLUMNS[column]
        r = self.rows[row]
        if column == 0:
            return f"{self.labels[row][0]} · {r['candidate']}"
        value = r.get(key)
        if key == "pareto":
            return "★ yes" if value else "—"
        if value is None or (isinstance(value, float) and not math.isfinite(value)):
            return r.get("note") or "—" if column == 9 else "—"
        return fmt.format(value)

    def derivation_key(self, row: int, column: int) -> tuple | None:
        metric = self.COLUMNS[column][3]
        if not metric or not (0 <= row < len(self.rows)):
            return None
        r = self.rows[row]
        band = r.get("largest_band") if metric == "die_cost" else None
        return (r["candidate"], band, metric)

    def data(self, index: Index, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if not index.isValid() or not (0 <= index.row() < len(self.rows)):
            return None
        r, c = index.row(), index.column()
        if role == Qt.ItemDataRole.DisplayRole:
            return self.text(r, c)
        if role == Qt.ItemDataRole.DecorationRole and c == 0:
            pix = QPixmap(12, 12)
            pix.fill(self.labels[r][1])
            return QIcon(pix)
        if role == Qt.ItemDataRole.TextAlignmentRole and c > 0:
            return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
        if role == Qt.ItemDataRole.ToolTipRole and self.derivation_key(r, c):
            return "Select to see how this number was computed"
        return None


class CostSettingsTableModel(QAbstractTableModel):
    """The wafer figures of one process card, then the study's cost settings; editable."""

    HEADERS = ("Setting", "Value", "Unit")

    def __init__(self, controller: StudyController) -> None:
        super().__init__(controller)
        self._c = controller
        self.card_index: int | None = None
        self.errors: dict[int, str] = {}
        self._rows = self._build()
        controller.study_changed.connect(self._on_controller_study_changed)

    def _build(self) -> list[tuple[tuple, FieldSpec, str]]:
        rows: list[tuple[tuple, FieldSpec, str]] = []
        if self.card_index is not None:
            for name in _CARD_FIELDS:
                spec = field_spec(ProcessCard, name)
                rows.append((("process_cards", self.card_index, name), spec, f"◆ {spec.label}"))
        for name in CostSettings.__dataclass_fields__:
            spec = field_spec(CostSettings, name)
            rows.append((("cost", name), spec, spec.label))
        return rows

    def set_card(self, index: int | None) -> None:
        if index == self.card_index:
            return
        self.beginResetModel()
        self.card_index, self.errors = index, {}
        self._rows = self._build()
        self.endResetModel()

    def path(self, row: int) -> tuple:
        return self._rows[row][0]

    def row_of(self, path: tuple) -> int:
        return [r[0] for r in self._rows].index(path)

    def _on_controller_study_changed(self, study: Any) -> None:
        if self.card_index is not None and self.card_index >= len(study.process_cards):
            self.set_card(None)
        elif self._rows:
            self.dataChanged.emit(self.index(0, 1), self.index(len(self._rows) - 1, 1))

    def rowCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008 - Qt signature
        return 0 if parent.isValid() else len(self._rows)

    def columnCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008
        return 0 if parent.isValid() else 3

    def headerData(self, section: int, orientation: Qt.Orientation, role: int = 0) -> Any:
        if orientation == Qt.Orientation.Horizontal and role == Qt.ItemDataRole.DisplayRole:
            return self.HEADERS[section] if 0 <= section < 3 else None
        return None

    def _value_text(self, row: int) -> str:
        value = get_in(self._c.study, self.path(row))
        if hasattr(value, "value") and isinstance(value.value, str):
            return value.value
        return f"{value:g}" if isinstance(value, float) else str(value)

    def data(self, index: Index, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if not index.isValid() or not (0 <= index.row() < len(self._rows)):
            return None
        r, c = index.row(), index.column()
        path, spec, label = self._rows[r]
        if role in (Qt.ItemDataRole.DisplayRole, Qt.ItemDataRole.EditRole):
            unit = "" if spec.unit == "1" else spec.unit
            return (label, self._value_text(r), unit)[c]
        if role == OPTIONS_ROLE and c == 1 and spec.kind == "enum":
            return [(m.value, m.value) for m in spec.cls]  # type: ignore[union-attr]
        if role == Qt.ItemDataRole.ToolTipRole:
            return self.errors.get(r) or f"{format_path(path)}: {spec.note or spec.label}"
        if role == Qt.ItemDataRole.BackgroundRole and r in self.errors:
            return QColor("#f3cdb8")
        if role == Qt.ItemDataRole.TextAlignmentRole and c == 1:
            return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
        return None

    def flags(self, index: Index) -> Qt.ItemFlag:
        if not index.isValid():
            return Qt.ItemFlag.NoItemFlags
        base = Qt.ItemFlag.ItemIsEnabled | Qt.ItemFlag.ItemIsSelectable
        return base | Qt.ItemFlag.ItemIsEditable if index.column() == 1 else base

    def setData(self, index: Index, value: Any, role: int = Qt.ItemDataRole.EditRole) -> bool:
        if not index.isValid() or index.column() != 1 or role != Qt.ItemDataRole.EditRole:
            return False
        r = index.row()
        path, spec, label = self._rows[r]
        where = format_path(path)
        try:
            parsed = parse_cell(spec, str(value))
            ok = self._c.set_field(path, parsed, f"Set {label.lstrip('◆ ')}")
            reason = "" if ok else self._c.last_refusal
        except ValueError as exc:
            ok, reason = False, str(exc)
            self._c.report_refusal(where, reason)
        if ok:
            self.errors.pop(r, None)
        else:
            self.errors[r] = f"{where}: {reason}"
        self.dataChanged.emit(index, index)
        return ok


class DieCostPage(QWidget):
    """Die area, unit cost by part, cost versus volume, wafer map and the cost settings."""

    title = "Die & Cost"

    def __init__(self, controller: StudyController, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._pending: Any = None
        self._c = controller
        self.cost: CostResult | None = None
        self.scores: Any = None
        self.names: list[str] = []  # costed candidates, bar order
        self.selected: str | None = None
        self.selected_die: str | None = None
        self._evaluation: Any = None

        self.key = QLabel()
        self.key.setObjectName("DieCostKey")
        self.key.setWordWrap(True)
        self.candidate_combo = QComboBox()
        self.candidate_combo.setObjectName("DieCostCandidate")
        self.candidate_combo.activated.connect(self._on_candidate_combo_activated)
        self.candidate_combo.setSizeAdjustPolicy(QComboBox.SizeAdjustPolicy.AdjustToContents)
        self.die_combo = QComboBox()
        self.die_combo.setSizeAdjustPolicy(QComboBox.SizeAdjustPolicy.AdjustToContents)
        self.die_combo.setObjectName("DieCostDie")
        self.die_combo.activated.connect(self._on_die_combo_activated)
        top = QHBoxLayout()
        top.addWidget(QLabel("<b>Wafer map of</b>"))
        top.addWidget(self.candidate_combo)
        top.addWidget(QLabel("die"))
        top.addWidget(self.die_combo)
        top.addStretch(1)
        top.addWidget(QLabel("Click a bar or a number for its derivation."))

        self.graphics = pg.GraphicsLayoutWidget()
        self.graphics.setObjectName("DieCostPlots")
        self.graphics.setBackground("w")
        g = self.graphics
        self.area_plot = self._plot(0, 0, "Die area per element (mm²)", "Candidate")
        self.cost_plot = self._plot(0, 1, "PA cost per radio (USD)", "Candidate")
        area_key = [(c, t) for c, (_k, t) in zip(_AREA_COLOURS, AREA_PARTS, strict=True)]
        cost_key = [(c, t) for c, (_k, t) in zip(_COST_COLOURS, COST_PARTS, strict=True)]
        g.addLabel(
            _key_html(area_key[:3]) + "<br>" + _key_html(area_key[3:]),
            1,
            0,
            size="8pt",
            color="#303030",
        )
        self.cost_caption = g.addLabel("", 1, 1, size="8pt", color="#303030")
        self._cost_key = cost_key
        self.volume_plot = self._plot(2, 0, "PA cost per radio (USD)", "Volume (radios)")
        self.wafer_plot = self._plot(2, 1, "y (mm)", "x (mm)")
        self.volume_caption = g.addLabel("", 3, 0, size="8pt", color="#303030")
        self.wafer_caption = g.addLabel("", 3, 1, size="8pt", color="#303030")
        self.volume_plot.setLogMode(x=True, y=True)
        self.volume_plot.showGrid(x=True, y=True, alpha=0.2)
        self.wafer_plot.setAspectLocked(True)

        self.area_bars = self._bars(self.area_plot, _AREA_COLOURS)
        self.cost_bars = self._bars(self.cost_plot, _COST_COLOURS)
        self.selection_marks = []
        for plot in (self.area_plot, self.cost_plot):
            mark = pg.BarGraphItem(x=[], height=[], width=_BAR_WIDTH + 0.12, brush=None)
            mark.setOpts(pen=pg.mkPen("#000000", width=2))
            mark.setZValue(5)
            plot.addItem(mark)
            self.selection_marks.append(mark)
        self.volume_curves: dict[str, pg.PlotCurveItem] = {}
        self.volume_tags: dict[str, pg.TextItem] = {}
        dash = pg.mkPen("#000000", width=1, style=Qt.PenStyle.DashLine)
        dots = pg.mkPen("#606060", width=1, style=Qt.PenStyle.DotLine)
        self.design_line = pg.InfiniteLine(
            angle=90, pen=dash, label="", labelOpts={**_LINE_LABEL, "position": 0.95}
        )
        self.lifetime_line = pg.InfiniteLine(
            angle=90, pen=dots, label="", labelOpts={**_LINE_LABEL, "position": 0.84}
        )
        self.crossover_points = pg.ScatterPlotItem(
            size=8, pen=pg.mkPen("#000000"), brush=pg.mkBrush("#ffffff"), hoverable=True,
            tip=lambda x, y, data: data,
        )  # fmt: skip
        self.crossover_points.setZValue(20)
        for item in (self.design_line, self.lifetime_line, self.crossover_points):
            self.volume_plot.addItem(item)
        self.crossover_labels: list[pg.TextItem] = []
        self._mark_xy: list[tuple[float, float]] = []  # crossover marks, (log V, log cost)
        self.crossover_leaders = pg.PlotCurveItem(pen=pg.mkPen("#808080", width=1))
        self.volume_plot.addItem(self.crossover_leaders, ignoreBounds=True)
        self.wafer_edge = pg.PlotCurveItem(pen=pg.mkPen("#404040", width=1))
        self.wafer_usable = pg.PlotCurveItem(pen=dash)
        self.wafer_dies = QGraphicsPathItem()
        self.wafer_dies.setPen(QPen(Qt.PenStyle.NoPen))
        self.no_fit_text = pg.TextItem(_NO_FIT, color=_WARN, anchor=(0.5, 0.5))
        self.no_fit_text.setZValue(30)
        for item in (self.wafer_dies, self.wafer_edge, self.wafer_usable, self.no_fit_text):
            self.wafer_plot.addItem(item)
        g.scene().sigMouseClicked.connect(self._on_scene_mouse_clicked)
        self.volume_plot.getViewBox().sigResized.connect(self._place_crossover_labels)
        self.wafer_plot.getViewBox().sigRangeChanged.connect(self._on_wafer_range_changed)
        self.volume_plot.getViewBox().sigRangeChanged.connect(self._place_crossover_labels)
        for col in (0, 1):
            g.ci.layout.setColumnStretchFactor(col, 1)
            g.ci.layout.setColumnPreferredWidth(col, 400)

        self.summary_model = CostSummaryTableModel(self)
        self.summary_table = self._table(self.summary_model, "DieCostSummary")
        self.summary_table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.summary_table.selectionModel().currentChanged.connect(self._on_summary_current_changed)
        self.settings_model = CostSettingsTableModel(controller)
        self.settings_table = self._table(self.settings_model, "DieCostSettings")
        self.settings_table.setItemDelegate(FieldDelegate(self.settings_table))
        self.settings_table.horizontalHeader().setStretchLastSection(False)
        self.settings_table.horizontalHeader().setSectionResizeMode(
            0, QHeaderView.ResizeMode.Stretch
        )
        self.settings_note = QLabel()
        self.settings_note.setWordWrap(True)
        self.settings_note.setStyleSheet("color:#555")
        settings = QWidget()
        sl = QHBoxLayout(settings)
        sl.setContentsMargins(0, 0, 0, 0)
        sl.addWidget(self.settings_table, 3)
        side = QLabel(
            "<b>Cost settings</b><br>Double-click a value to edit it; Ctrl+Z undoes. Wafer "
            "figures (◆) belong to the selected candidate's process card; the others apply to "
            "every candidate."
        )
        side.setWordWrap(True)
        side.setAlignment(Qt.AlignmentFlag.AlignTop)
        notes = QVBoxLayout()
        notes.addWidget(side)
        notes.addWidget(self.settings_note)
        notes.addStretch(1)
        sl.addLayout(notes, 2)
        self.tabs = QTabWidget()
        self.tabs.setObjectName("DieCostTabs")
        self.tabs.addTab(self.summary_table, "Cost per candidate")
        self.tabs.addTab(settings, "Cost settings")
        split = QSplitter(Qt.Orientation.Vertical)
        split.addWidget(self.graphics)
        split.addWidget(self.tabs)
        split.setStretchFactor(0, 3)
        split.setStretchFactor(1, 1)
        split.setSizes([470, 210])
        layout = QVBoxLayout(self)
        layout.addLayout(top)
        layout.addWidget(self.key)
        layout.addWidget(split, 1)

        controller.evaluation_changed.connect(self._on_controller_evaluation_changed)
        if controller.evaluation is not None:
            self.refresh(controller.evaluation)

    # -- construction helpers --------------------------------------------------------------
    def _plot(self, row: int, col: int, left: str, bottom: str) -> pg.PlotItem:
        plot = self.graphics.addPlot(row=row, col=col)
        return style_plot(plot, left, bottom=bottom, grid=False, left_width=62)

    @staticmethod
    def _bars(plot: pg.PlotItem, colours: tuple[str, ...]) -> list[pg.BarGraphItem]:
        bars = []
        for colour in colours:
            bar = pg.BarGraphItem(x=[], height=[], width=_BAR_WIDTH, brush=colour)
            bar.setOpts(pen=pg.mkPen("#ffffff", width=1))
            plot.addItem(bar)
            bars.append(bar)
        return bars

    def _table(self, model: QAbstractTableModel, name: str) -> QTableView:
        table = QTableView(self)
        table.setObjectName(name)
        table.setModel(model)
        table.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
        table.verticalHeader().setVisible(False)
        table.verticalHeader().setDefaultSectionSize(22)
        table.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
        table.horizontalHeader().setStretchLastSection(True)
        return table

    # -- controller → view ---------------------------------------------------------------
    def _on_controller_evaluation_changed(self, evaluation: Any, _seconds: float) -> None:
        # Redrawing bars, curves and the wafer map is the slowest refresh in the window: do it
        # now only when the page is on screen, otherwise when it is next shown.
        self._pending = evaluation
        if self.isVisible():
            self.refresh(evaluation)
            self._pending = None

    def showEvent(self, event: Any) -> None:
        super().showEvent(event)
        if self._pending is not None:
            evaluation, self._pending = self._pending, None
            self.refresh(evaluation)

    def prepare_snapshot(self) -> None:
        if self._pending is not None:
            evaluation, self._pending = self._pending, None
            self.refresh(evaluation)

    def refresh(self, evaluation: Any) -> None:
        """Recompute (or take the controller's) cost result and update every view."""
        study = self._c.study
        self._evaluation = evaluation
        cost = getattr(self._c, "cost", None)
        if cost is None:
            cost = cost_study(study, evaluation)
        scores = getattr(self._c, "scores", None)
        if scores is None:
            try:
                scores = weighted_scores(study, evaluation, cost)
            except ValueError:  # every weight 0: no score to show
                scores = None
        self.cost, self.scores = cost, scores
        self.names = list(cost.per_candidate["candidate"])
        self._index = {c.name: i for i, c in enumerate(study.candidates)}
        if self.selected not in self.names:
            self.selected = self.names[0] if self.names else None
            self.selected_die = None
        self.key.setText(
            "Candidates: "
            + _key_html(
                [(self._colour(n).name(), f"<b>{self._letter(n)}</b> {n}") for n in self.names]
            )
        )
        self._update_bars(evaluation)
        self._update_volume()
        self._update_summary()
        self._select(self.selected, self.selected_die)

    def _letter(self, name: str) -> str:
        return candidate_letter(self._index[name])

    def _colour(self, name: str) -> QColor:
        return candidate_color(self._index[name])

    def _update_bars(self, evaluation: Any) -> None:
        assert self.cost is not None
        x = np.arange(len(self.names), dtype=float)
        per = self.cost.per_candidate
        area = area_breakdown(evaluation).set_index("candidate").reindex(self.names)
        bottom = np.zeros(len(x))
        for bar, (col, _t) in zip(self.area_bars, AREA_PARTS, strict=True):
            h = area[col].to_numpy(dtype=float)
            bar.setOpts(x=x, height=h, y0=bottom.copy(), width=_BAR_WIDTH)
            bottom += h
        self._area_totals = bottom
        bottom = np.zeros(len(x))
        for bar, (col, _t) in zip(self.cost_bars, COST_PARTS, strict=True):
            h = np.nan_to_num(per[col].to_numpy(dtype=float))
            bar.setOpts(x=x, height=h, y0=bottom.copy(), width=_BAR_WIDTH)
            bottom += h
        self._cost_totals = bottom
        ticks = [
            [(i, self._letter(n) + ("" if ok else " ✗")) for i, (n, ok) in
             enumerate(zip(self.names, per["feasible"], strict=True))]
        ]  # fmt: skip
        for plot, totals in ((self.area_plot, self._area_totals), (self.cost_plot, bottom)):
            plot.getAxis("bottom").setTicks(ticks)
            top = float(totals.max()) if len(totals) else 1.0
            plot.setXRange(-0.6, len(x) - 0.4, padding=0)
            plot.setYRange(0.0, 1.08 * top if top > 0 else 1.0, padding=0)
        v = self.cost.design_volume
        self.cost_caption.setText(
            _key_html(self._cost_key[:3]) + "<br>" + _key_html(self._cost_key[3:])
            + f" at {_grouped(v) if v >= 1000 else v} radios"
        )  # fmt: skip

    def _update_volume(self) -> None:
        assert self.cost is not None
        cost, vb = self.cost, self.volume_plot.getViewBox()
        vb.disableAutoRange()
        lx = np.log10(cost.volumes)
        seen = set()
        ends: dict[str, float] = {}
        for name, grp in cost.curves.groupby("candidate", sort=False):
            seen.add(name)
            curve = self.volume_curves.get(name)
            if curve is None:
                curve = pg.PlotCurveItem(antialias=True)
                tag = pg.TextItem(anchor=(0.0, 0.5))
                tag.setZValue(16)
                self.volume_plot.addItem(curve)
                self.volume_plot.addItem(tag, ignoreBounds=True)
                self.volume_curves[name], self.volume_tags[name] = curve, tag
            ly = np.log10(grp["unit_cost_usd"].to_numpy(dtype=np.float64))
            curve.setPen(pg.mkPen(self._colour(name), width=2))
            curve.setData(lx, ly, skipFiniteCheck=True)
            self.volume_tags[name].setText(self._letter(name), color=self._colour(name))
            ends[name] = float(ly[-1])
        self._tag_ends, self._tag_x = ends, float(lx[-1]) if len(lx) else 0.0
        for name in [n for n in self.volume_curves if n not in seen]:
            self.volume_plot.removeItem(self.volume_curves.pop(name))
            self.volume_plot.removeItem(self.volume_tags.pop(name))
        study = self._c.study
        for line, v, word in (
            (self.design_line, study.cost.design_volume, "design"),
            (self.lifetime_line, study.cost.lifetime_volume, "lifetime"),
        ):
            line.setValue(math.log10(v))
            line.label.setFormat(f"{word} {_grouped(v)}")
        self.volume_caption.setText(
            "● crossover (equal cost); labelled where the cheapest candidate changes and for "
            "the selected one"
        )
        vb.autoRange(padding=0.04)
        if len(lx):
            vb.setXRange(lx[0], lx[-1] + 0.35, padding=0)
        self._update_crossovers()

    def _place_tags(self, py: float) -> None:
        """Letters at the right end of the lines, nudged apart (``py``: data units per pixel)."""
        ends = getattr(self, "_tag_ends", {})
        if not ends:
            return
        order = sorted(ends, key=ends.get)  # type: ignore[arg-type]
        y = np.array([ends[n] for n in order])
        gap = 13.0 * py  # one line of text apart
        for _ in range(60):  # relax: push each crowded pair apart symmetrically
            d = np.diff(y)
            short = np.flatnonzero(d < gap * 0.999)
            if not short.size:
                break
            for i in short:
                push = 0.5 * (gap - (y[i + 1] - y[i]))
                y[i] -= push
                y[i + 1] += push
        (_x0, _x1), (lo, hi) = self.volume_plot.getViewBox().viewRange()
        y += max(0.0, lo + 0.6 * gap - y.min())  # keep the column inside the plot
        y -= max(0.0, y.max() - (hi - 0.6 * gap))
        for n, yi in zip(order, y, strict=True):
            self.volume_tags[n].setPos(self._tag_x, float(yi))

    def _envelope_pairs(self) -> set[frozenset[str]]:
        """Pairs whose crossover is where the cheapest candidate changes."""
        assert self.cost is not None
        c = self.cost.curves
        if c.empty:
            return set()
        table = c.pivot(index="volume", columns="candidate", values="unit_cost_usd")
        cheapest = table.idxmin(axis=1).to_numpy()
        change = np.flatnonzero(cheapest[1:] != cheapest[:-1])
        return {frozenset((cheapest[i], cheapest[i + 1])) for i in change}

    def _update_crossovers(self) -> None:
        assert self.cost is not None
        x = self.cost.crossovers.dropna(subset=["volume"])
        env = self._envelope_pairs()
        pts, texts = [], []
        for r in x.itertuples():
            a, b = self._letter(r.candidate_a), self._letter(r.candidate_b)
            text = f"{a} = {b} at {_grouped(r.volume)} radios"
            lxy = (math.log10(r.volume), math.log10(r.unit_cost_usd))
            pts.append({"pos": lxy, "data": f"{text}, {r.unit_cost_usd:,.2f} USD per radio"})
            pair = frozenset((r.candidate_a, r.candidate_b))
            if pair in env or self.selected in pair:
                texts.append((lxy, text))
        self.crossover_points.setData(pts)
        self._mark_xy = [p["pos"] for p in pts]  # labels keep clear of every mark
        while len(self.crossover_labels) < len(texts):
            label = pg.TextItem(color="#202020", anchor=(0, 1), fill=(255, 255, 255, 210))
            label.setZValue(15)  # under the marks, over the lines
            self.volume_plot.addItem(label, ignoreBounds=True)
            self.crossover_labels.append(label)
        for label, (lxy, text) in zip(self.crossover_labels, texts, strict=False):
            label.setText(" " + text + " ")
            label.setPos(*lxy)
            label.base = lxy  # type: ignore[attr-defined]
            label.setVisible(True)
        for label in self.crossover_labels[len(texts) :]:
            label.setVisible(False)
        self._n_labels = len(texts)
        self._place_crossover_labels()

    def _place_crossover_labels(self, *_args: Any) -> None:
        """Put each label beside its mark where it overlaps no earlier label and stays in view.

        Tries the four corners of the mark, then the same places up to four label heights
        further out (with a leader line), and keeps the first free one (else the least
        crowded).
        """
        vb = self.volume_plot.getViewBox()
        px, py = vb.viewPixelSize()
        if not (math.isfinite(px) and math.isfinite(py)) or px <= 0 or py <= 0:
            return
        self._place_tags(py)
        (x0, x1), (y0, y1) = vb.viewRange()
        boxes: list[tuple[float, float, float, float]] = []
        leaders: list[float] = []
        r_x, r_y = 6 * px, 6 * py  # half a crossover mark (8 px) plus 2 px, in view units
        marks = [(mx - r_x, my - r_y, mx + r_x, my + r_y) for mx, my in self._mark_xy]
        for line in (self.design_line, self.lifetime_line):  # and of the volume lines' labels
            if line.label.isVisible() and line.label.toPlainText():
                r = vb.mapSceneToView(line.label.sceneBoundingRect()).boundingRect()
                boxes.append(
                    (r.left(), min(r.top(), r.bottom()), r.right(), max(r.top(), r.bottom()))
                )

        def overlap(a: tuple, b: tuple) -> float:
            return max(0.0, min(a[2], b[2]) - max(a[0], b[0])) * max(
                0.0, min(a[3], b[3]) - max(a[1], b[1])
            )

        for label in self.crossover_labels[: getattr(self, "_n_labels", 0)]:
            x, y = label.base  # type: ignore[attr-defined]
            rect = label.textItem.boundingRect()
            w, h = rect.width() * px, rect.height() * py
            # Every mark but the label's own (which its corner touches whatever the placement).
            others = boxes + [m for m in marks if not (m[0] < x < m[2] and m[1] < y < m[3])]
            best = None
            for k in range(5):
                for ax, ay in ((0, 1), (0, 0), (1, 1), (1, 0)):
                    dy = k * h * (1 if ay else -1)
                    box = (x - ax * w, y + dy - (1 - ay) * h, x + (1 - ax) * w, y + dy + ay * h)
                    area = w * h
                    cost = (
                        sum(overlap(box, b) for b in others) + area - overlap(box, (x0, y0, x1, y1))
                    )
                    if best is None or cost < best[0] - 1e-12:
                        best = (cost, (ax, ay), dy, box)
                if best is not None and best[0] <= 1e-12:
                    break
            assert best is not None
            _cost, anchor, dy, box = best
            label.setAnchor(anchor)
            label.setPos(x, y + dy)
            boxes.append(box)
            if dy:
                leaders += [x, y, x, y + dy]
        pts = np.array(leaders, dtype=np.float64).reshape(-1, 2)
        self.crossover_leaders.setData(pts[:, 0], pts[:, 1], connect="pairs")

    def _update_summary(self) -> None:
        assert self.cost is not None
        rows = []
        scores = {} if self.scores is None else self.scores.set_index("candidate").to_dict("index")
        dies = self.cost.dies
        for r in self.cost.per_candidate.to_dict("records"):
            s = scores.get(r["candidate"], {})
            mine = dies[(dies["candidate"] == r["candidate"]) & (dies["die"] == r["largest_die"])]
            band = mine["band"].iloc[0] if len(mine) else None
            rows.append({**r, "score": s.get("score"), "pareto": s.get("pareto"),
                         "largest_band": band if isinstance(band, str) else None,
                "die_yield_pct": 100.0 * r["die_yield"]})  # fmt: skip
        labels = [(self._letter(r["candidate"]), self._colour(r["candidate"])) for r in rows]
        self.summary_model.set_rows(rows, labels)

    # -- selection -------------------------------------------------------------------------
    def _select(self, name: str | None, die: str | None = None) -> None:
        self.selected = name
        cost = self.cost
        self.candidate_combo.blockSignals(True)
        self.candidate_combo.clear()
        for n in self.names:
            self.candidate_combo.addItem(f"{self._letter(n)} · {n}", n)
        self.candidate_combo.setCurrentIndex(self.names.index(name) if name else -1)
        self.candidate_combo.blockSignals(False)
        dies = cost.dies_of(name) if cost is not None and name else None
        die_names = [] if dies is None else list(dies["die"])
        if die not in die_names:
            largest = cost.row(name)["largest_die"] if cost is not None and name else None
            die = largest if largest in die_names else (die_names[0] if die_names else None)
        self.selected_die = die
        self.die_combo.blockSignals(True)
        self.die_combo.clear()
        self.die_combo.addItems(die_names)
        self.die_combo.setCurrentIndex(die_names.index(die) if die else -1)
        self.die_combo.setEnabled(len(die_names) > 1)
        self.die_combo.blockSignals(False)
        i = self.names.index(name) if name else -1
        for mark, totals in zip(self.selection_marks, (self._area_totals, self._cost_totals),
                                strict=True):  # fmt: skip
            mark.setOpts(x=[i] if i >= 0 else [], height=[totals[i]] if i >= 0 else [])
        study = self._c.study
        card = next((k for k, c in enumerate(study.process_cards) if name and c.name == (
            cost.row(name)["process"] if cost is not None else None)), None)  # fmt: skip
        self.settings_model.set_card(card)
        self.settings_note.setText(
            f"◆ = process card “{study.process_cards[card].name}”, used by "
            f"{self._letter(name)} · {name}."
            if card is not None
            else ""
        )
        self._update_crossovers()
        self._update_wafer()

    def _update_wafer(self) -> None:
        cost, name, die = self.cost, self.selected, self.selected_die
        if cost is None or name is None or die is None:
            self.wafer_dies.setPath(QPainterPath())
            for circle in (self.wafer_edge, self.wafer_usable):
                circle.setData(np.zeros(0), np.zeros(0))
            self.no_fit_text.setVisible(False)
            self.wafer_caption.setText("")
            return
        d = cost.dies_of(name).set_index("die").loc[die]
        radius = float(d["wafer_diameter_mm"]) / 2.0
        usable = radius - float(d["edge_exclusion_mm"])
        t = np.linspace(0.0, 2.0 * np.pi, 361)
        self.wafer_edge.setData(radius * np.cos(t), radius * np.sin(t))
        self.wafer_usable.setData(usable * np.cos(t), usable * np.sin(t))
        w, h = float(d["width_mm"]), float(d["height_mm"])
        sized = math.isfinite(w * h) and w > 0
        grid = cost.grid(name, die) if sized else None
        centres = grid.centres_mm if grid is not None else np.zeros((0, 2))
        # Each counted site is a pitch cell (die + scribe), drawn edge to edge.
        cell = (grid.pitch_x_mm, grid.pitch_y_mm) if grid is not None else (0.0, 0.0)
        dx = np.array([-0.5, 0.5, 0.5, -0.5, -0.5]) * cell[0]
        dy = np.array([-0.5, -0.5, 0.5, 0.5, -0.5]) * cell[1]
        xs = (centres[:, :1] + dx[None, :]).ravel()
        ys = (centres[:, 1:] + dy[None, :]).ravel()
        connect = np.ones(xs.size, dtype=np.int32)
        connect[4::5] = 0
        self.wafer_dies.setPath(pg.arrayToQPath(xs, ys, connect=connect, finiteCheck=False))
        self._die_size = cell
        fill = QColor(self._colour(name))
        fill.setAlpha(170)
        self.wafer_dies.setBrush(QBrush(fill))
        self.no_fit_text.setVisible(len(centres) == 0)
        self.no_fit_text.setText(_NO_FIT if sized else "design not reached: no die size")
        self.no_fit_text.setPos(0.0, 0.0)
        self.wafer_plot.setRange(xRange=(-radius, radius), yRange=(-radius, radius), padding=0.04)
        self._on_wafer_range_changed()
        label = f"{self._letter(name)} · {name}" + ("" if die == "all bands" else f" · {die} die")
        if sized and bool(d["fits"]):
            self.wafer_caption.setText(
                f"{label}: {w:.2f} × {h:.2f} mm on {2 * radius:g} mm<br>DPW formula "
                f"{d['gross_dpw_formula']:,.0f} · exact {d['gross_dpw_exact']:,.0f} · yield "
                f"{d['die_yield']:.1%}"
            )
        else:
            self.wafer_caption.setText(
                f"{label}: <span style='color:{_WARN}'>{self.no_fit_text.textItem.toPlainText()}"
                f"</span> ({2 * usable:g} mm usable)"
            )

    def _on_wafer_range_changed(self, *_args: Any) -> None:
        """Outline the dies (white, like scribe lanes) only when they are a few pixels wide."""
        px, _py = self.wafer_plot.getViewBox().viewPixelSize()
        w = float(self._die_size[0]) if getattr(self, "_die_size", None) else 0.0
        if math.isfinite(px) and px > 0 and w / px >= 4.0:
            pen = QPen(QColor("#ffffff"))
            pen.setCosmetic(True)
            self.wafer_dies.setPen(pen)
        else:
            self.wafer_dies.setPen(QPen(Qt.PenStyle.NoPen))

    def _on_candidate_combo_activated(self, i: int) -> None:
        self._select(self.candidate_combo.itemData(i))

    def _on_die_combo_activated(self, i: int) -> None:
        self._select(self.selected, self.die_combo.itemText(i))

    def _on_scene_mouse_clicked(self, event: Any) -> None:
        pos = event.scenePos()
        for kind, plot in (("area", self.area_plot), ("cost", self.cost_plot)):
            vb = plot.getViewBox()
            if vb.sceneBoundingRect().contains(pos):
                p = vb.mapSceneToView(pos)
                i = round(p.x())
                if 0 <= i < len(self.names) and abs(p.x() - i) <= _BAR_WIDTH / 2:
                    self.click_bar(kind, i)
                return

    def click_bar(self, kind: str, index: int) -> None:
        """Select candidate ``index`` (bar order) and show its die-area or unit-cost derivation."""
        name = self.names[index]
        self._select(name)
        if kind == "area":
            derivations = getattr(self._evaluation, "derivations", {})
            found = derivations.get((name, None, "die_area"))
        else:
            found = self.cost.derivations.get((name, None, "unit_cost")) if self.cost else None
        self._c.derivation_requested.emit(found)

    def _on_summary_current_changed(self, current: QModelIndex, _previous: QModelIndex) -> None:
        if not current.isValid():
            return
        row = self.summary_model.rows[current.row()]
        if row["candidate"] != self.selected:
            self._select(row["candidate"])
        key = self.summary_model.derivation_key(current.row(), current.column())
        if key is None:
            return
        if key[2] == "die_area":
            found = getattr(self._evaluation, "derivations", {}).get(key)
        else:
            found = self.cost.derivations.get(key) if self.cost else None
        self._c.derivation_requested.emit(found)
