"""Curves page: one curve item per (candidate, band, metric), targets, toggles, hover, export."""

from __future__ import annotations

import xml.etree.ElementTree as ET

import numpy as np
import pytest
from PySide6.QtCore import QPointF
from PySide6.QtGui import QImage
from PySide6.QtWidgets import QFileDialog

from app.pages.curves import METRIC_AXES, CurvesPage

PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"  # PNG specification (ISO/IEC 15948), §5.2


@pytest.fixture
def curves(make_window, qtbot, monkeypatch):
    """(window, page) with the Curves page in view."""
    w = make_window()
    # pytest-qt closes the window before make_window's own clean-up marks the study clean, so
    # an edited study would open the "save changes?" box and block the teardown.
    monkeypatch.setattr(w, "maybe_save", lambda: True)
    page = w.select_page(CurvesPage.title)
    qtbot.waitExposed(page)
    return w, page


def _expected(ev, candidate, band, column):
    grp = ev.curves[(ev.curves.candidate == candidate) & (ev.curves.band == band)]
    grp = grp.sort_values("f_hz")
    return grp["f_hz"].to_numpy() / 1e9, grp[column].to_numpy()


def test_one_curve_per_candidate_band_metric_with_the_evaluated_data(curves):
    w, page = curves
    study, ev = w.controller.study, w.controller.evaluation
    shown = [c.name for c in study.candidates if c.enabled]
    keys = {(c, b.name, m[0]) for c in shown for b in study.bands for m in METRIC_AXES}
    assert set(page.curves) == keys
    for (cand, band, metric), curve in page.curves.items():
        column = next(a[1] for a in METRIC_AXES if a[0] == metric)
        x, y = curve.getData()
        fx, fy = _expected(ev, cand, band, column)
        np.testing.assert_allclose(x, fx)
        np.testing.assert_allclose(y, fy)
        assert curve in page.plots[metric].items


def test_curve_items_are_reused_and_updated_after_an_edit(curves, qtbot):
    w, page = curves
    c = w.controller
    before = dict(page.curves)
    with qtbot.waitSignal(c.evaluation_changed, timeout=5000):
        assert c.set_field(("bands", 0, "targets", "p1db_dbm"), 26.0)
    assert page.curves.keys() == before.keys()
    for key, curve in page.curves.items():
        assert curve is before[key]  # setData on the same item, never a rebuild
    cand, band = c.study.candidates[0].name, c.study.bands[0].name
    _x, y = page.curves[(cand, band, "p1db")].getData()
    np.testing.assert_allclose(y, _expected(c.evaluation, cand, band, "p1db_dbm")[1])


def test_edits_made_elsewhere_are_drawn_when_the_page_is_shown_again(curves, qtbot):
    # The page redraws only while on screen; it must catch up when shown.
    w, page = curves
    c = w.controller
    w.select_page("Scorecard")
    cand, band = c.study.candidates[0].name, c.study.bands[0].name
    stale = page.curves[(cand, band, "p1db")].getData()[1].copy()
    with qtbot.waitSignal(c.evaluation_changed, timeout=5000):
        assert c.set_field(("bands", 0, "targets", "p1db_dbm"), 27.0)  # sizes every PA anew
    expected = _expected(c.evaluation, cand, band, "p1db_dbm")[1]
    assert not np.allclose(expected, stale)
    np.testing.assert_allclose(page.curves[(cand, band, "p1db")].getData()[1], stale)
    w.select_page(CurvesPage.title)
    qtbot.waitExposed(page)
    np.testing.assert_allclose(page.curves[(cand, band, "p1db")].getData()[1], expected)


def test_targets_are_dashed_lines_over_each_band_with_the_miss_zone_below(curves, qtbot):
    w, page = curves
    for band in w.controller.study.bands:
        for metric, _col, field, _label, _unit in METRIC_AXES:
            line, mask = page.targets[(band.name, metric)]
            target = getattr(band.targets, field)
            x, y = line.getData()
            np.testing.assert_allclose(x, [band.f_low_ghz, band.f_high_ghz])
            np.testing.assert_allclose(y, [target, target])
            rect = mask.rect()
            assert rect.left() == pytest.approx(band.f_low_ghz)
            assert rect.right() == pytest.approx(band.f_high_ghz)
            assert rect.bottom() == pytest.approx(target)  # shaded region ends at the target
            assert rect.top() < target
    with qtbot.waitSignal(w.controller.evaluation_changed, timeout=5000):
        assert w.controller.set_field(("bands", 1, "targets", "gain_db"), 25.0)
    _x, y = page.targets[(w.controller.study.bands[1].name, "gain")][0].getData()
    np.testing.assert_allclose(y, [25.0, 25.0])


def test_axes_are_labelled_with_units(curves):
    _w, page = curves
    left = [page.plots[m].getAxis("left").labelText for m, *_ in METRIC_AXES]
    assert left == ["Gain (dB)", "P1dB (dBm)", "PAE at P1dB (%)"]
    assert page.plots["pae"].getAxis("bottom").labelText == "Frequency (GHz)"


def test_unticking_a_candidate_hides_its_curves(curves):
    w, page = curves
    name = w.controller.study.candidates[1].name
    page.set_candidate_visible(name, False)
    for (cand, _band, _metric), curve in page.curves.items():
        assert curve.isVisible() == (cand != name)
    assert name in page.hidden
    page.set_candidate_visible(name, True)
    assert all(curve.isVisible() for curve in page.curves.values())


def test_unticking_every_candidate_shows_the_empty_state(curves):
    w, page = curves
    for c in w.controller.study.candidates:
        page.set_candidate_visible(c.name, False)
    assert page.view_stack.currentWidget() is page.empty
    assert "tick one" in page.empty.text()
    assert not page.png_button.isEnabled()


def test_no_enabled_candidate_shows_the_empty_state(curves):
    w, page = curves
    c = w.controller
    for i in range(len(c.study.candidates)):
        assert c.set_field(("candidates", i, "enabled"), False)
    c.flush()
    assert page.curves == {}
    assert page.view_stack.currentWidget() is page.empty
    assert page.empty.text() == "No candidates are shown — enable one on the Candidates page."


def test_hover_reads_out_the_nearest_curve_point(curves):
    w, page = curves
    c = w.controller
    cand, band = c.study.candidates[2].name, c.study.bands[1].name
    x, y = page.curves[(cand, band, "pae")].getData()
    i = len(x) // 2
    vb = page.plots["pae"].getViewBox()
    scene_pos = vb.mapViewToScene(QPointF(float(x[i]), float(y[i])))
    text = page.read_out_at(scene_pos)
    assert text == page.readout.text()
    assert f"{x[i]:.3f} GHz" in text and f"PAE at P1dB {y[i]:.2f} %" in text
    # Another candidate may lie under the pointer too; the value read is the one drawn there.
    assert band in text


@pytest.mark.parametrize("suffix", ["png", "svg"])
def test_export_writes_a_valid_file(curves, tmp_path, monkeypatch, suffix):
    _w, page = curves
    target = tmp_path / f"curves.{suffix}"
    asked = []

    def fake_dialog(parent, caption, directory, filt):
        asked.append(filt)
        return str(target), filt

    monkeypatch.setattr(QFileDialog, "getSaveFileName", staticmethod(fake_dialog))
    written = page.export_dialog(suffix)
    assert written == target and target.is_file()
    assert f"*.{suffix}" in asked[0]
    data = target.read_bytes()
    if suffix == "png":
        assert data.startswith(PNG_SIGNATURE)
        image = QImage(str(target))
        assert not image.isNull() and image.width() > 100 and image.height() > 100
    else:
        root = ET.fromstring(data)
        assert root.tag.endswith("svg")
        # Every plotted curve and target line is a path of the drawing.
        paths = [e for e in root.iter() if e.tag.endswith("path") or e.tag.endswith("polyline")]
        assert len(paths) >= len(page.curves)


def test_export_cancelled_writes_nothing(curves, tmp_path, monkeypatch):
    _w, page = curves
    monkeypatch.setattr(QFileDialog, "getSaveFileName", staticmethod(lambda *a: ("", "")))
    assert page.export_dialog("png") is None
    assert list(tmp_path.iterdir()) == [] or not any(tmp_path.glob("*.png"))
