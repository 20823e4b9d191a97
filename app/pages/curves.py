"""Curves page: gain, P1dB and PAE against frequency for every shown candidate, with targets.

Three stacked plots share one frequency axis. Each (candidate, band, metric) has one curve item,
created the first time it appears and updated with ``setData`` afterwards (pyqtgraph's own
performance advice). Each band's target is a dashed line over the band with the "miss" zone below
it shaded, so a curve dipping into the shade misses the target there.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QPointF, QRectF, Qt
from PySide6.QtGui import QBrush, QColor, QIcon, QPen, QPixmap
from PySide6.QtWidgets import (
    QFileDialog,
    QGraphicsRectItem,
    QHBoxLayout,
    QLabel,
    QListWidget,
    QListWidgetItem,
    QPushButton,
    QStackedWidget,
    QVBoxLayout,
    QWidget,
)

from app.controller import StudyController
from app.plot_export import export_plot
from app.style import candidate_color, style_plot

__all__ = ["METRIC_AXES", "CurvesPage"]

#: (metric, curves column, target field, axis label with unit, readout unit)
METRIC_AXES: tuple[tuple[str, str, str, str, str], ...] = (
    ("gain", "gain_db", "gain_db", "Gain (dB)", "dB"),
    ("p1db", "p1db_dbm", "p1db_dbm", "P1dB (dBm)", "dBm"),
    ("pae", "pae_pct", "pae_pct", "PAE at P1dB (%)", "%"),
)

#: How far below the target the miss shading reaches; it is drawn with ignoreBounds so it
#: never widens the auto-range, only fills whatever part of the view lies under the target.
_MASK_DEPTH = 1.0e4
_MASK_BRUSH = QColor(0, 0, 0, 28)
_TARGET_PEN_COLOR = QColor("#000000")
_HOVER_PIXELS = 40  # nearest point farther than this from the pointer is not read out

_EMPTY_NONE = "No candidates are shown — enable one on the Candidates page."
_EMPTY_HIDDEN = "Every shown candidate is unticked — tick one in the list on the left."


def _swatch(colour: QColor) -> QIcon:
    pix = QPixmap(14, 14)
    pix.fill(colour)
    return QIcon(pix)


def _pen(colour: QColor, index: int) -> QPen:
    pen = pg.mkPen(colour, width=1)
    pen.setCosmetic(True)
    if index >= 7:  # the palette has repeated: a dash keeps the two candidates apart
        pen.setStyle(Qt.PenStyle.DashLine)
    return pen


class CurvesPage(QWidget):
    """Stacked gain / P1dB / PAE versus frequency plots with per-band target masks."""

    title = "Curves"

    def __init__(self, controller: StudyController, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._c = controller
        #: Candidates the user unticked here (a display choice, not part of the study).
        self.hidden: set[str] = set()
        #: (candidate, band, metric) → curve item; kept across evaluations.
        self.curves: dict[tuple[str, str, str], pg.PlotCurveItem] = {}
        #: (candidate, band, metric) → (f in GHz, values), for the hover readout.
        self._data: dict[tuple[str, str, str], tuple[np.ndarray, np.ndarray]] = {}
        #: (band, metric) → (target line, miss-zone rectangle).
        self.targets: dict[tuple[str, str], tuple[pg.PlotCurveItem, QGraphicsRectItem]] = {}
        self._user_range = False
        self._updating = False

        # -- candidate list
        self.candidate_list = QListWidget(self)
        self.candidate_list.setObjectName("CurvesCandidateList")
        self.candidate_list.setFixedWidth(210)
        self.candidate_list.itemChanged.connect(self._on_candidate_list_item_changed)
        list_title = QLabel("<b>Candidates</b> (tick to plot)")

        # -- plots
        self.graphics = pg.GraphicsLayoutWidget(self)
        self.graphics.setObjectName("CurvesPlots")
        self.graphics.setBackground("w")
        self.plots: dict[str, pg.PlotItem] = {}
        self._markers: dict[str, pg.ScatterPlotItem] = {}
        first: pg.PlotItem | None = None
        for row, (metric, _col, _t, label, _u) in enumerate(METRIC_AXES):
            plot = style_plot(self.graphics.addPlot(row=row, col=0), label, left_width=64)
            if first is None:
                first = plot
            else:
                plot.setXLink(first)
            if row == 0:
                plot.showAxis("top")
                top = plot.getAxis("top")
                top.setPen(pg.mkPen("#404040"))
                top.setTextPen(pg.mkPen("#202020"))
                top.setStyle(tickLength=-4)
                top.setGrid(False)
            if row < len(METRIC_AXES) - 1:
                plot.getAxis("bottom").setStyle(showValues=False)
            else:
                plot.setLabel("bottom", "Frequency (GHz)")
            plot.getViewBox().sigRangeChangedManually.connect(self._on_viewbox_range_changed)
            marker = pg.ScatterPlotItem(
                size=9, pen=pg.mkPen("#000000", width=1), brush=pg.mkBrush(255, 255, 255, 0)
            )
            marker.setZValue(20)
            marker.setVisible(False)
            plot.addItem(marker, ignoreBounds=True)
            self._markers[metric] = marker
            self.plots[metric] = plot
        self._mouse_proxy = pg.SignalProxy(
            self.graphics.scene().sigMouseMoved, rateLimit=30, slot=self._on_scene_mouse_moved
        )

        self.readout = QLabel("Point at a curve to read its frequency, candidate and value.")
        self.readout.setObjectName("CurvesReadout")
        self.readout.setStyleSheet("font-family: 'DejaVu Sans Mono', monospace;")
        key = QLabel("Dashed line: the band's target.  Shaded: below the target (misses there).")
        key.setStyleSheet("color:#555")

        self.empty = QLabel(_EMPTY_NONE)
        self.empty.setObjectName("CurvesEmpty")
        self.empty.setAlignment(Qt.AlignmentFlag.AlignCenter)
        self.empty.setWordWrap(True)
        self.empty.setStyleSheet("color:#555; font-size:14px; padding:24px")
        self.view_stack = QStackedWidget(self)
        self.view_stack.addWidget(self.graphics)
        self.view_stack.addWidget(self.empty)

        self.fit_button = QPushButton("Fit all")
        self.fit_button.setToolTip("Zoom to show every plotted curve and target")
        self.fit_button.clicked.connect(self.fit_all)
        self.png_button = QPushButton("Export PNG…")
        self.png_button.clicked.connect(lambda: self.export_dialog("png"))
        self.svg_button = QPushButton("Export SVG…")
        self.svg_button.clicked.connect(lambda: self.export_dialog("svg"))
        self.message = QLabel("")
        self.message.setObjectName("CurvesMessage")

        top = QHBoxLayout()
        top.addWidget(self.readout, 1)
        top.addWidget(self.fit_button)
        top.addWidget(self.png_button)
        top.addWidget(self.svg_button)
        right = QVBoxLayout()
        right.addLayout(top)
        right.addWidget(self.view_stack, 1)
        bottom = QHBoxLayout()
        bottom.addWidget(key)
        bottom.addStretch(1)
        bottom.addWidget(self.message)
        right.addLayout(bottom)
        left = QVBoxLayout()
        left.addWidget(list_title)
        left.addWidget(self.candidate_list, 1)
        layout = QHBoxLayout(self)
        layout.addLayout(left)
        layout.addLayout(right, 1)

        self._pending: Any = None
        controller.evaluation_changed.connect(self._on_controller_evaluation_changed)
        if controller.evaluation is not None:
            self._rebuild(controller.evaluation)

    # -- controller → view ---------------------------------------------------------------
    def _on_controller_evaluation_changed(self, evaluation: Any, _seconds: float) -> None:
        # Redrawing every curve costs more than the rest of an edit's refresh: do it now only
        # when the page is on screen, otherwise when it is next shown.
        self._pending = evaluation
        if self.isVisible():
            self.ensure_current()

    def ensure_current(self) -> None:
        """Redraw now if an evaluation arrived while the page was hidden."""
        if self._pending is not None:
            evaluation, self._pending = self._pending, None
            self._rebuild(evaluation)

    def showEvent(self, event: Any) -> None:
        super().showEvent(event)
        self.ensure_current()

    def shown_candidates(self) -> list[tuple[int, str]]:
        """(colour index, name) of the study's enabled candidates, in study order."""
        return [(i, c.name) for i, c in enumerate(self._c.study.candidates) if c.enabled]

    def _rebuild(self, ev: Any) -> None:
        shown = self.shown_candidates()
        self._rebuild_list(shown)
        self._update_curves(ev, shown)
        self._update_targets()
        self._update_visibility()

    def _rebuild_list(self, shown: list[tuple[int, str]]) -> None:
        names = [name for _i, name in shown]
        self.hidden &= set(names)
        current = [
            self.candidate_list.item(r).data(Qt.ItemDataRole.UserRole)
            for r in range(self.candidate_list.count())
        ]
        self.candidate_list.blockSignals(True)
        if current != names:
            self.candidate_list.clear()
            for index, name in shown:
                item = QListWidgetItem(_swatch(candidate_color(index)), name)
                item.setData(Qt.ItemDataRole.UserRole, name)
                item.setFlags(item.flags() | Qt.ItemFlag.ItemIsUserCheckable)
                self.candidate_list.addItem(item)
        for r, (index, name) in enumerate(shown):
            item = self.candidate_list.item(r)
            item.setIcon(_swatch(candidate_color(index)))
            item.setCheckState(
                Qt.CheckState.Unchecked if name in self.hidden else Qt.CheckState.Checked
            )
        self.candidate_list.blockSignals(False)

    def _update_curves(self, ev: Any, shown: list[tuple[int, str]]) -> None:
        colour_of = dict((name, i) for i, name in shown)
        seen: set[tuple[str, str, str]] = set()
        self._updating = True
        for plot in self.plots.values():
            plot.getViewBox().disableAutoRange()
        if ev is not None and len(ev.curves):
            for (cand, band), grp in ev.curves.groupby(["candidate", "band"], sort=False):
                if cand not in colour_of:
                    continue
                order = np.argsort(grp["f_hz"].to_numpy(dtype=np.float64), kind="stable")
                f_ghz = grp["f_hz"].to_numpy(dtype=np.float64)[order] / 1e9
                for metric, column, _t, _label, _u in METRIC_AXES:
                    y = grp[column].to_numpy(dtype=np.float64)[order]
                    key = (str(cand), str(band), metric)
                    seen.add(key)
                    curve = self.curves.get(key)
                    if curve is None:
                        curve = pg.PlotCurveItem(antialias=False)
                        curve.setZValue(10)
                        self.plots[metric].addItem(curve)
                        self.curves[key] = curve
                    curve.setPen(_pen(candidate_color(colour_of[cand]), colour_of[cand]))
                    # Finite data skips pyqtgraph's per-point check; any NaN leaves a gap.
                    if np.isfinite(y).all():
                        curve.setData(f_ghz, y, connect="all", skipFiniteCheck=True)
                    else:
                        curve.setData(f_ghz, y, connect="finite")
                    self._data[key] = (f_ghz, y)
        for key in [k for k in self.curves if k not in seen]:
            self.plots[key[2]].removeItem(self.curves.pop(key))
            self._data.pop(key, None)
        self._updating = False

    def _update_targets(self) -> None:
        seen: set[tuple[str, str]] = set()
        for band in self._c.study.bands:
            x = np.array([band.f_low_ghz, band.f_high_ghz], dtype=np.float64)
            for metric, _col, target_field, _label, _u in METRIC_AXES:
                target = float(getattr(band.targets, target_field))
                key = (band.name, metric)
                seen.add(key)
                pair = self.targets.get(key)
                if pair is None:
                    pen = pg.mkPen(_TARGET_PEN_COLOR, width=1, style=Qt.PenStyle.DashLine)
                    line = pg.PlotCurveItem(pen=pen, antialias=False)
                    line.setZValue(5)
                    mask = QGraphicsRectItem()
                    mask.setPen(QPen(Qt.PenStyle.NoPen))
                    mask.setBrush(QBrush(_MASK_BRUSH))
                    mask.setZValue(-5)
                    self.plots[metric].addItem(line)
                    self.plots[metric].addItem(mask, ignoreBounds=True)
                    pair = (line, mask)
                    self.targets[key] = pair
                line, mask = pair
                line.setData(x, np.array([target, target], dtype=np.float64))
                mask.setRect(QRectF(x[0], target - _MASK_DEPTH, x[1] - x[0], _MASK_DEPTH))
                line.setToolTip(f"{band.name} {metric} target: {target:g}")
        for key in [k for k in self.targets if k not in seen]:
            line, mask = self.targets.pop(key)
            self.plots[key[1]].removeItem(line)
            self.plots[key[1]].removeItem(mask)
        self._update_band_labels()

    def _update_band_labels(self) -> None:
        # Band names are ticks of a top axis over each band's centre: outside the data area,
        # they never hide a curve, and they follow zoom and pan with the frequency axis.
        ticks = [(0.5 * (b.f_low_ghz + b.f_high_ghz), b.name) for b in self._c.study.bands]
        self.plots["gain"].getAxis("top").setTicks([ticks, []])

    def _update_visibility(self) -> None:
        for (cand, _band, _metric), curve in self.curves.items():
            curve.setVisible(cand not in self.hidden)
        shown = self.shown_candidates()
        visible = [name for _i, name in shown if name not in self.hidden]
        if not shown:
            self.empty.setText(_EMPTY_NONE)
        elif not visible:
            self.empty.setText(_EMPTY_HIDDEN)
        self.view_stack.setCurrentIndex(0 if visible else 1)
        for b in (self.fit_button, self.png_button, self.svg_button):
            b.setEnabled(bool(visible))
        if not self._user_range:
            self.fit_all(keep_user_flag=True)

    def visible_curves(self) -> list[tuple[str, str, str]]:
        """Keys (candidate, band, metric) of the curves currently drawn."""
        return [k for k, c in self.curves.items() if c.isVisible()]

    # -- user actions ----------------------------------------------------------------------
    def _on_candidate_list_item_changed(self, item: QListWidgetItem) -> None:
        name = item.data(Qt.ItemDataRole.UserRole)
        if item.checkState() == Qt.CheckState.Checked:
            self.hidden.discard(name)
        else:
            self.hidden.add(name)
        self._update_visibility()

    def set_candidate_visible(self, name: str, visible: bool) -> None:
        """Tick or untick ``name`` in the list (as a click would)."""
        for r in range(self.candidate_list.count()):
            item = self.candidate_list.item(r)
            if item.data(Qt.ItemDataRole.UserRole) == name:
                item.setCheckState(Qt.CheckState.Checked if visible else Qt.CheckState.Unchecked)
                return
        raise KeyError(name)

    def _on_viewbox_range_changed(self, *_args: Any) -> None:
        if not self._updating:
            self._user_range = True

    def fit_all(self, *, keep_user_flag: bool = False) -> None:
        """Range every plot to its curves and targets (after a bulk update, or on Fit all).

        Auto-range is switched back on here and off at the start of each bulk update, so one
        update ranges the views once however many curves it touched. Switching it on (rather
        than calling ``autoRange()`` now) lets pyqtgraph range the view when it has its real
        size: a hidden page has none, and the linked x axes would be misaligned.
        """
        if not keep_user_flag:
            self._user_range = False
        for plot in self.plots.values():
            plot.getViewBox().enableAutoRange(x=True, y=True)

    def export_dialog(self, kind: str) -> Path | None:
        """Ask for a file name and write the three plots there as PNG or SVG."""
        suffix = f".{kind.lower()}"
        filt = "PNG image (*.png)" if suffix == ".png" else "SVG drawing (*.svg)"
        suggested = f"{self._c.study.name} curves{suffix}"
        if self._c.path is not None:
            suggested = str(Path(self._c.path).with_name(Path(self._c.path).stem + " curves"))
            suggested += suffix
        name, _ = QFileDialog.getSaveFileName(self, "Export curves", suggested, filt)
        if not name:
            return None
        path = Path(name)
        if path.suffix.lower() != suffix:
            path = path.with_name(path.name + suffix)
        try:
            written = export_plot(self.graphics, path)
        except (OSError, ValueError) as exc:
            self.message.setText(f"✗ Export failed — {exc}")
            return None
        self.message.setText(f"Exported {written.name}")
        return written

    # -- hover readout -----------------------------------------------------------------------
    def _on_scene_mouse_moved(self, event: tuple) -> None:
        self.read_out_at(event[0])

    def read_out_at(self, scene_pos: QPointF) -> str:
        """Show the curve point nearest ``scene_pos`` (scene coordinates) in the readout."""
        for metric, plot in self.plots.items():
            vb = plot.getViewBox()
            found = None
            if vb.sceneBoundingRect().contains(scene_pos):
                found = self._nearest(metric, vb, vb.mapSceneToView(scene_pos))
            if found is None:
                self._markers[metric].setVisible(False)
                continue
            return self.show_point(metric, *found)
        return ""

    def show_point(self, metric: str, key: tuple[str, str, str], fx: float, fy: float) -> str:
        """Mark one curve point and write it in the readout; returns the readout text."""
        _m, _col, _t, label, unit = next(a for a in METRIC_AXES if a[0] == metric)
        text = f"{fx:.3f} GHz · {key[0]} · {key[1]} · {label.split(' (')[0]} {fy:.2f} {unit}"
        marker = self._markers[metric]
        marker.setData([fx], [fy])
        marker.setVisible(True)
        self.readout.setText(text)
        return text

    def prepare_snapshot(self) -> None:
        """Read out the worst in-band gain of the first plotted curve, as a hover would."""
        self.ensure_current()
        for key in self.visible_curves():
            if key[2] == "gain":
                x, y = self._data[key]
                i = int(np.nanargmin(y))
                self.show_point("gain", key, float(x[i]), float(y[i]))
                return

    def _nearest(
        self, metric: str, vb: pg.ViewBox, pos: QPointF
    ) -> tuple[tuple[str, str, str], float, float] | None:
        px, py = vb.viewPixelSize()
        best: tuple[float, tuple[str, str, str], float, float] | None = None
        for key, (x, y) in self._data.items():
            if key[2] != metric or key[0] in self.hidden or not len(x):
                continue
            d2 = ((x - pos.x()) / px) ** 2 + ((y - pos.y()) / py) ** 2
            d2 = np.where(np.isfinite(d2), d2, np.inf)
            i = int(np.argmin(d2))
            if best is None or d2[i] < best[0]:
                best = (float(d2[i]), key, float(x[i]), float(y[i]))
        if best is None or best[0] > _HOVER_PIXELS**2:
            return None
        return best[1], best[2], best[3]
