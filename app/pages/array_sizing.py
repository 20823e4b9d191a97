"""Array Sizing page: per-element P1dB, array DC power and feasibility against array size N.

For the selected band the link fixes the EIRP; :func:`core.link_plan.array_plan` gives, for
every N, the per-element P1dB needed and, per candidate, whether the estimator can reach it and
the array's PA DC power. Curve items are created once per candidate and updated with
``setData``; the lowest-DC-power N of each candidate is marked with a star and a label, and a
feasibility strip shows the N ranges a candidate cannot reach (dashed grey, reason on hover).
"""

from __future__ import annotations

from typing import Any

import numpy as np
import pandas as pd
import pyqtgraph as pg
from PySide6.QtCore import QPointF, Qt, QTimer
from PySide6.QtGui import QColor
from PySide6.QtWidgets import QComboBox, QHBoxLayout, QLabel, QVBoxLayout, QWidget

from app.controller import StudyController
from app.style import candidate_color, style_plot
from core.link_plan import array_optimum, array_plan

__all__ = ["ArraySizingPage"]

_INFEASIBLE_COLOR = QColor("#9a9a9a")
_NEED_COLOR = QColor("#000000")


def _pen(colour: QColor, width: float = 2.0, dashed: bool = False) -> Any:
    pen = pg.mkPen(colour, width=width)
    pen.setCosmetic(True)
    if dashed:
        pen.setStyle(Qt.PenStyle.DashLine)
    return pen


def _runs(mask: np.ndarray) -> list[tuple[int, int]]:
    """(start, stop) index pairs of the True runs of a 1-D boolean array."""
    padded = np.concatenate(([False], mask, [False])).astype(np.int8)
    edges = np.flatnonzero(np.diff(padded))
    return list(zip(edges[::2], edges[1::2], strict=True))


class ArraySizingPage(QWidget):
    """Plots versus array size N (log axis) for one band, one curve per candidate."""

    title = "Array Sizing"

    def __init__(self, controller: StudyController, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._c = controller
        self.plan: pd.DataFrame | None = None
        #: Plan rows of the selected band only.
        self.band_plan: pd.DataFrame | None = None
        #: (candidate, role) → plot item; role in "dc", "feasible", "infeasible", "opt", "label".
        self.items: dict[tuple[str, str], Any] = {}

        self.band_combo = QComboBox(self)
        self.band_combo.setObjectName("ArrayBandCombo")
        self.band_combo.setMinimumWidth(160)
        self.band_combo.currentIndexChanged.connect(self._on_band_combo_changed)
        self.readout = QLabel("Hover over a plot to read the values at one N.")
        self.readout.setObjectName("ArrayReadout")
        self.readout.setWordWrap(True)
        self.readout.setTextFormat(Qt.TextFormat.RichText)
        self.readout.setMinimumHeight(54)
        self.readout.setAlignment(Qt.AlignmentFlag.AlignTop | Qt.AlignmentFlag.AlignLeft)
        self.message = QLabel("")
        self.message.setObjectName("ArrayMessage")
        self.message.setWordWrap(True)
        self.message.setStyleSheet("color:#8a3b00")
        self.optima = QLabel("")
        self.optima.setObjectName("ArrayOptima")
        self.optima.setWordWrap(True)
        self.optima.setTextFormat(Qt.TextFormat.RichText)
        note = QLabel(
            "PA cost = N × recurring cost of one packaged PA die (dies per wafer from the "
            "published estimate, yield model and test/package figures of the study); NRE is "
            "on the Die & Cost page. DC power counts the PAs only: beamformer, LNA and bias "
            "overheads per element are not modelled, so it falls steadily with N."
        )
        note.setWordWrap(True)
        note.setStyleSheet("color:#555")
        note.setWordWrap(True)

        self.graphics = pg.GraphicsLayoutWidget(self)
        self.graphics.setObjectName("ArrayPlots")
        self.graphics.setBackground("w")
        self.p1db_plot = self.graphics.addPlot(row=0, col=0)
        style_plot(self.p1db_plot, "P1dB (dBm)")
        self.dc_plot = self.graphics.addPlot(row=1, col=0)
        style_plot(self.dc_plot, "DC power (W)")
        self.cost_plot = self.graphics.addPlot(row=2, col=0)
        style_plot(self.cost_plot, "PA cost (USD)")
        self.feas_plot = self.graphics.addPlot(row=3, col=0)
        style_plot(self.feas_plot, "Reachable")
        self.feas_plot.setLabel("bottom", "Array elements N (log scale)")
        self.feas_plot.showGrid(x=True, y=False, alpha=0.2)
        self.graphics.ci.layout.setRowStretchFactor(0, 3)
        self.graphics.ci.layout.setRowStretchFactor(1, 4)
        self.graphics.ci.layout.setRowStretchFactor(2, 4)
        self.graphics.ci.layout.setRowStretchFactor(3, 2)
        # Items are plotted in log10 coordinates and only the axes are in log mode: pyqtgraph's
        # plot-level log mode transforms PlotDataItems but not the PlotCurveItems used here.
        # Powers of two label the N axis (array sizes are usually powers of two).
        ticks = [[(np.log10(2.0**k), f"{2**k}") for k in range(0, 17)]]
        for plot in (self.p1db_plot, self.dc_plot, self.cost_plot, self.feas_plot):
            plot.getAxis("bottom").setTicks(ticks)
        self.dc_plot.getAxis("left").setLogMode(True)
        self.cost_plot.getAxis("left").setLogMode(True)
        self.dc_plot.setXLink(self.p1db_plot)
        self.cost_plot.setXLink(self.p1db_plot)
        self.feas_plot.setXLink(self.p1db_plot)

        self.need_curve = pg.PlotCurveItem(pen=_pen(_NEED_COLOR, 2))
        self.p1db_plot.addItem(self.need_curve)
        self.current_line = pg.InfiniteLine(
            angle=90, pen=_pen(QColor("#555555"), 1, dashed=True), label="N in study",
            labelOpts={"position": 0.9, "color": "#333333"},
        )  # fmt: skip
        self.p1db_plot.addItem(self.current_line, ignoreBounds=True)
        self.cursor_lines = [pg.InfiniteLine(angle=90, pen=_pen(QColor("#b0b0b0"), 1))
                             for _ in range(4)]  # fmt: skip
        for plot, line in zip(
            (self.p1db_plot, self.dc_plot, self.cost_plot, self.feas_plot),
            self.cursor_lines,
            strict=True,
        ):
            plot.addItem(line, ignoreBounds=True)
            line.hide()
        self.graphics.scene().sigMouseMoved.connect(self._on_scene_mouse_moved)

        top = QHBoxLayout()
        top.addWidget(QLabel("<b>Band</b>"))
        top.addWidget(self.band_combo)
        intro = QLabel(
            "From the top: P1dB each element's PA needs for the link's EIRP; the whole array's PA "
            "DC power at P1dB; the array's PA cost; where each candidate can reach it. "
            "★ marks the lowest-power and the cheapest N; colours as on the Reachable strip."
        )
        intro.setWordWrap(True)
        top.addWidget(intro, 1)
        layout = QVBoxLayout(self)
        layout.addLayout(top)
        layout.addWidget(self.readout)
        layout.addWidget(self.graphics, 1)
        layout.addWidget(self.optima)
        layout.addWidget(note)
        layout.addWidget(self.message)

        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(30)  # coalesce bursts of edits
        self._timer.timeout.connect(self.recompute)
        controller.study_changed.connect(self._on_controller_study_changed)
        self._sync_bands(controller.study)
        self._dirty = True

    # -- model → view ---------------------------------------------------------------------
    def _sync_bands(self, study: Any) -> None:
        names = [b.name for b in study.bands]
        if names != [self.band_combo.itemText(i) for i in range(self.band_combo.count())]:
            keep = self.band_combo.currentText()
            self.band_combo.blockSignals(True)
            self.band_combo.clear()
            self.band_combo.addItems(names)
            self.band_combo.setCurrentIndex(names.index(keep) if keep in names else 0)
            self.band_combo.blockSignals(False)

    def _on_controller_study_changed(self, study: Any) -> None:
        self._sync_bands(study)
        # The sweep re-sizes every candidate at every N: run it only while the page is shown
        # (showEvent catches up on edits made elsewhere).
        self._dirty = True
        if self.isVisible():
            self._timer.start()

    def ensure_current(self) -> None:
        """Recompute now if the study changed since the last sweep (snapshots, tests)."""
        if self._dirty:
            self.recompute()

    prepare_snapshot = ensure_current

    def showEvent(self, event: Any) -> None:
        super().showEvent(event)
        if self._dirty:
            self._timer.start()

    def _on_band_combo_changed(self, _index: int) -> None:
        self._show_band()

    def recompute(self) -> None:
        """Recompute the array plan of the whole study and redraw the selected band."""
        self._timer.stop()
        self._dirty = False
        try:
            self.plan = array_optimum(array_plan(self._c.study))
        except ValueError as exc:
            self.plan = None
            self.message.setText(f"✗ Array plan not computed — {exc}")
            self._show_band()
            return
        self.message.setText("")
        self._show_band()

    def _item(self, candidate: str, role: str, index: int) -> Any:
        key = (candidate, role)
        if key in self.items:
            return self.items[key]
        colour = candidate_color(index)
        if role == "dc":
            item = pg.PlotCurveItem(pen=_pen(colour, 2), name=candidate)
            self.dc_plot.addItem(item)
        elif role == "cost":
            item = pg.PlotCurveItem(pen=_pen(colour, 2))
            self.cost_plot.addItem(item)
        elif role == "copt":
            item = pg.ScatterPlotItem(
                symbol="star", size=16, pen=pg.mkPen("#000000"), brush=pg.mkBrush(colour)
            )
            self.cost_plot.addItem(item)
        elif role == "feasible":
            item = pg.PlotCurveItem(pen=_pen(colour, 6))
            self.feas_plot.addItem(item)
        elif role == "infeasible":
            item = pg.PlotCurveItem(pen=_pen(_INFEASIBLE_COLOR, 3, dashed=True))
            self.feas_plot.addItem(item)
        elif role == "opt":
            item = pg.ScatterPlotItem(
                symbol="star", size=16, pen=pg.mkPen("#000000"), brush=pg.mkBrush(colour)
            )
            self.dc_plot.addItem(item)
        else:  # label
            item = pg.TextItem(color="#202020", anchor=(1.0, 1.0))
            self.dc_plot.addItem(item)
        self.items[key] = item
        return item

    def _show_band(self) -> None:
        study = self._c.study
        plan = self.plan
        name = self.band_combo.currentText()
        if plan is None or not name:
            self.band_plan = None
            for item in self.items.values():
                item.hide()
            self.need_curve.setData([], [])
            return
        rows = plan[plan["band"] == name]
        self.band_plan = rows
        band = next(b for b in study.bands if b.name == name)
        self.current_line.setValue(np.log10(band.link.n_elements))
        vb = [
            p.getViewBox() for p in (self.p1db_plot, self.dc_plot, self.cost_plot, self.feas_plot)
        ]
        for v in vb:
            v.disableAutoRange()
        shown: set[str] = set()
        ticks = []
        names = [c.name for c in study.candidates]
        need_set = False
        for index, candidate in enumerate(names):
            r = rows[rows["candidate"] == candidate]
            if r.empty:
                continue
            shown.add(candidate)
            n = np.log10(r["n_elements"].to_numpy(dtype=np.float64))
            if not need_set:
                self.need_curve.setData(n, r["p1db_elem_dbm"].to_numpy(dtype=np.float64))
                need_set = True
            feasible = r["feasible"].to_numpy(dtype=bool)
            dc = r["array_dc_power_w"].to_numpy(dtype=np.float64)
            with np.errstate(divide="ignore", invalid="ignore"):
                log_dc = np.where(dc > 0, np.log10(np.where(dc > 0, dc, 1.0)), np.nan)
            self._item(candidate, "dc", index).setData(n, log_dc, connect="finite")
            cost = r["array_pa_cost_usd"].to_numpy(dtype=np.float64)
            with np.errstate(divide="ignore", invalid="ignore"):
                log_cost = np.where(cost > 0, np.log10(np.where(cost > 0, cost, 1.0)), np.nan)
            self._item(candidate, "cost", index).setData(n, log_cost, connect="finite")
            cheap = r[r["cheapest"]] if "cheapest" in r.columns else r.iloc[0:0]
            copt = self._item(candidate, "copt", index)
            if cheap.empty:
                copt.setData([], [])
            else:
                copt.setData(
                    [np.log10(float(cheap["n_elements"].iloc[0]))],
                    [np.log10(float(cheap["array_pa_cost_usd"].iloc[0]))],
                )
            y = float(len(ticks))
            ticks.append((y, candidate))
            self._item(candidate, "feasible", index).setData(
                n, np.where(feasible, y, np.nan), connect="finite"
            )
            self._item(candidate, "infeasible", index).setData(
                n, np.where(feasible, np.nan, y), connect="finite"
            )
            opt = self._item(candidate, "opt", index)
            label = self._item(candidate, "label", index)
            best = r[r["lowest_dc_power"]]
            if best.empty:
                opt.setData([], [])
                label.setText("")
            else:
                bn = float(best["n_elements"].iloc[0])
                bw = float(best["array_dc_power_w"].iloc[0])
                # Item coordinates are log10 of the data (see the axis set-up above).
                opt.setData([np.log10(bn)], [np.log10(bw)])
                label.setPos(QPointF(np.log10(bn), np.log10(bw)))
                label.setText("")  # optima are listed under the plots, not on them
            for role in ("dc", "cost", "copt", "feasible", "infeasible", "opt", "label"):
                self.items[(candidate, role)].show()
        for (candidate, _role), item in self.items.items():
            if candidate not in shown:
                item.hide()
        self.feas_plot.getAxis("left").setTicks([ticks])
        # One readable row per candidate: pyqtgraph drops tick labels that would overlap.
        self.graphics.ci.layout.setRowMinimumHeight(3, 21.0 * max(len(ticks), 1) + 45.0)
        self.optima.setText(self._optima_text(rows))
        n_max = float(rows["n_elements"].max()) if not rows.empty else 1024.0
        for v in vb:
            v.enableAutoRange(axis=pg.ViewBox.YAxis)
        # The N axis spans the sweep exactly; labels and markers must not widen it.
        # A little room each side so the first and last tick labels (1, 1024) are drawn.
        self.p1db_plot.setXRange(-0.06, np.log10(max(n_max, 2.0)) + 0.12, padding=0.0)
        self.feas_plot.setYRange(-0.7, max(len(ticks), 1) - 0.3, padding=0)
        self.feas_plot.getAxis("left").setWidth(185)
        for plot in (self.p1db_plot, self.dc_plot, self.cost_plot):
            plot.getAxis("left").setWidth(185)

    @staticmethod
    def _optima_text(rows: pd.DataFrame) -> str:
        parts = []
        falling = []  # candidates whose lowest array DC is at the end of the sweep
        for candidate, r in rows.groupby("candidate", sort=False):
            cheap = r[r["cheapest"]] if "cheapest" in r.columns else r.iloc[0:0]
            low = r[r["lowest_dc_power"]]
            if cheap.empty and low.empty:
                parts.append(f"<b>{candidate}</b>: no reachable N")
                continue
            bits = []
            if not cheap.empty:
                c = cheap.iloc[0]
                bits.append(
                    f"cheapest N = {int(c['n_elements'])} ({c['array_pa_cost_usd']:.4g} USD)"
                )
            if not low.empty:
                d = low.iloc[0]
                if int(d["n_elements"]) == int(r["n_elements"].max()):
                    falling.append(candidate)  # DC ∝ N·P_elem ∝ 1/N: no per-element overhead
                else:
                    bits.append(
                        f"lowest DC N = {int(d['n_elements'])} ({d['array_dc_power_w']:.3g} W)"
                    )
            parts.append(f"<b>{candidate}</b>: " + ", ".join(bits))
        text = "★ " + " · ".join(parts)
        if falling:
            n_max = int(rows["n_elements"].max())
            who = "every candidate" if len(falling) == len(parts) else ", ".join(falling)
            text += f". Array DC power keeps falling up to N = {n_max} for {who}."
        return text

    # -- hover ----------------------------------------------------------------------------
    def readout_at(self, n_elements: int) -> str:
        """Readout text (HTML) for the selected band at array size ``n_elements``."""
        rows = self.band_plan
        if rows is None or rows.empty:
            return ""
        at = rows[rows["n_elements"] == n_elements]
        if at.empty:
            return ""
        parts = [
            f"<b>N = {n_elements}</b>: P1dB needed {at['p1db_elem_dbm'].iloc[0]:.2f} dBm "
            f"per element, {n_elements} PAs"
        ]
        for _, row in at.iterrows():
            if row["feasible"]:
                parts.append(
                    f"{row['candidate']}: {row['array_dc_power_w']:.3g} W DC, "
                    f"{row['array_pa_cost_usd']:.4g} USD"
                )
            else:
                parts.append(f"{row['candidate']}: ✗ not reachable — {row['reason'] or '?'}")
        return parts[0] + "<br>" + " · ".join(parts[1:])

    def _on_scene_mouse_moved(self, pos: QPointF) -> None:
        rows = self.band_plan
        if rows is None or rows.empty:
            return
        for plot in (self.p1db_plot, self.dc_plot, self.cost_plot, self.feas_plot):
            if plot.sceneBoundingRect().contains(pos):
                x = plot.getViewBox().mapSceneToView(pos).x()
                break
        else:
            return
        n_all = np.unique(rows["n_elements"].to_numpy())
        n = int(n_all[np.argmin(np.abs(np.log10(n_all) - x))])
        for line in self.cursor_lines:
            line.setValue(np.log10(n))
            line.show()
        self.readout.setText(self.readout_at(n))
