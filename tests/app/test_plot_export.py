"""Plot export: PNG and SVG by suffix, atomic writes, and the close-path fix for newer Qt."""

from __future__ import annotations

import importlib
import os
import re
import xml.etree.ElementTree as ET

import numpy as np
import pyqtgraph as pg
import pytest
from PySide6.QtGui import QImage

import app.plot_export as plot_export
from app.plot_export import close_path_patch_applied, export_plot

SVG_NS = "{http://www.w3.org/2000/svg}"
# SVG 1.1, §8.3 "Path data": a coordinate pair is "x,y"; M/L start and extend a sub-path and
# "Z" (or "z") closes it without coordinates.
_PAIR = re.compile(r"[MLCQ]?(-?[\d.]+(?:e[-+]?\d+)?),(-?[\d.]+(?:e[-+]?\d+)?)")


@pytest.fixture
def plot(qtbot):
    w = pg.PlotWidget()
    qtbot.addWidget(w)
    w.resize(640, 420)
    x = np.linspace(24.0, 44.0, 81)
    lower = w.plot(x, 18 + 0.1 * (x - 34) ** 2, pen=pg.mkPen("#0072B2", width=1))
    upper = w.plot(x, 24 + 0.05 * (x - 34) ** 2, pen=pg.mkPen("#E69F00", width=1))
    w.plot(x, np.full_like(x, 21.0), pen=pg.mkPen("#009E73", width=1))
    w.addItem(pg.FillBetweenItem(lower, upper, brush=pg.mkBrush(0, 114, 178, 60)))
    w.show()
    qtbot.waitExposed(w)
    return w


def _pairs(d: str) -> np.ndarray:
    return np.array([(float(a), float(b)) for a, b in _PAIR.findall(d)])


def test_svg_export_parses_with_closed_paths_and_sane_coordinates(plot, tmp_path):
    out = export_plot(plot, tmp_path / "curves.svg")
    root = ET.parse(out).getroot()
    assert root.tag == f"{SVG_NS}svg"
    _x0, _y0, width, height = (float(v) for v in root.get("viewBox").split())
    assert (width, height) == pytest.approx((640, 420), abs=2)
    paths = [p.get("d") for p in root.iter(f"{SVG_NS}path")]
    assert len(paths) >= 4  # three curves and the fill (plus axes and frame)
    closed = [d for d in paths if d.rstrip().endswith("Z")]
    assert closed, "the view-box frame is a closed path (the one Qt >= 6.11 ends with Z)"
    for d in paths:
        pts = _pairs(d)
        assert pts.size and np.isfinite(pts).all()
        # Every point lies on the page: the group transforms were applied, not dropped.
        assert (pts[:, 0] >= -2).all() and (pts[:, 0] <= width + 2).all()
        assert (pts[:, 1] >= -2).all() and (pts[:, 1] <= height + 2).all()
    # The fill (one edge of 81 points out, the other back) spans the x range of its curves.
    fills = [d for d in paths if len(_pairs(d)) >= 2 * 81]
    curves = [d for d in paths if len(_pairs(d)) == 81]
    assert len(fills) == 1 and len(curves) == 3
    fill_x = _pairs(fills[0])[:, 0]
    curve_x = np.concatenate([_pairs(d)[:, 0] for d in curves])
    assert fill_x.min() == pytest.approx(curve_x.min(), abs=0.5)
    assert fill_x.max() == pytest.approx(curve_x.max(), abs=0.5)


def test_png_export_has_the_plot_size_and_content(plot, tmp_path):
    out = export_plot(plot, tmp_path / "curves.PNG")  # suffix case does not matter
    with open(out, "rb") as fh:
        assert fh.read(8) == b"\x89PNG\r\n\x1a\n"  # PNG signature, ISO/IEC 15948 §5.2
    image = QImage(str(out))
    rect = plot.getPlotItem().sceneBoundingRect()
    assert (image.width(), image.height()) == (int(rect.width()), int(rect.height()))
    pixels = {image.pixel(x, y) for x in range(0, image.width(), 7) for y in range(0, 400, 7)}
    assert len(pixels) > 3  # curves, fill, axes and background, not a blank image


def test_png_width_scales_keeping_aspect(plot, tmp_path):
    rect = plot.getPlotItem().sceneBoundingRect()
    image = QImage(str(export_plot(plot, tmp_path / "wide.png", width_px=1280)))
    assert image.width() == 1280
    assert image.height() == pytest.approx(1280 * rect.height() / rect.width(), abs=1)


def test_export_accepts_a_plot_item(plot, tmp_path):
    out = export_plot(plot.getPlotItem(), tmp_path / "item.svg")
    assert ET.parse(out).getroot().tag == f"{SVG_NS}svg"


def test_bad_suffix_width_and_target_are_refused(plot, tmp_path):
    with pytest.raises(ValueError, match=r"path: suffix must be .png or .svg \(got '.jpg'\)"):
        export_plot(plot, tmp_path / "x.jpg")
    with pytest.raises(ValueError, match="width_px: must be a positive"):
        export_plot(plot, tmp_path / "x.png", width_px=0)
    with pytest.raises(TypeError, match="plot: expected a pyqtgraph"):
        export_plot(object(), tmp_path / "x.png")
    assert list(tmp_path.iterdir()) == []


def test_a_failed_write_leaves_the_old_file_intact(plot, tmp_path, monkeypatch):
    target = tmp_path / "curves.svg"
    target.write_bytes(b"old")

    def broken_replace(src, dst):
        raise OSError("disk full")

    monkeypatch.setattr(os, "replace", broken_replace)
    with pytest.raises(OSError, match="disk full"):
        export_plot(plot, target)
    assert target.read_bytes() == b"old"
    assert [p.name for p in tmp_path.iterdir()] == ["curves.svg"]  # no temporary left


def test_close_path_patch_is_applied_only_when_needed_and_once():
    module = importlib.import_module("pyqtgraph.exporters.SVGExporter")
    current = module.correctCoordinates
    original = getattr(current, "__wrapped__", current)
    # Applied exactly when the installed pyqtgraph cannot read a close-path token...
    assert close_path_patch_applied() == plot_export._fails_on_close_path(original)
    # ...and whatever is installed now reads one.
    assert not plot_export._fails_on_close_path(current)
    importlib.reload(plot_export)
    again = module.correctCoordinates
    assert again is current  # a second import does not wrap the wrapper
    assert not hasattr(getattr(again, "__wrapped__", again), "_bandwright_close_path_patch")


@pytest.mark.parametrize(
    "d",
    [
        "M0,0 L1,0 L1,1 Z ",
        "M0,0 L1,0 L1,1 Z M2,2 L3,2 L3,3 Z",
        "M0,0 L1,0 L1,1Z",
        "M0,0 L1,0",
    ],
)
def test_close_tokens_are_put_back_where_they_were(d):
    stripped, after = plot_export._split_close_tokens(d)
    assert "Z" not in stripped
    restored = plot_export._restore_close_tokens(stripped, after)
    assert restored.split() == d.replace("1Z", "1 Z").split()
