"""GUI tests of the Die & Cost page (pytest-qt, offscreen)."""

from __future__ import annotations

import math

import numpy as np
import pyqtgraph as pg
import pytest
from PySide6.QtCore import Qt

from app.controller import StudyController
from app.pages.die_cost import DieCostPage, candidate_letter
from core.resources import demo_path
from core.study import load_study

GAAS_CARD = ("process_cards", 0)  # harbour-small-cell: card 0 is the GaAs card


@pytest.fixture
def controller(qapp):
    c = StudyController(load_study(demo_path("harbour-small-cell")))
    yield c
    c.deleteLater()


@pytest.fixture
def page(qtbot, controller):
    p = DieCostPage(controller)
    qtbot.addWidget(p)
    p.resize(1200, 800)
    p.show()
    controller.recompute()
    return p


def figures(page):
    per = page.cost.per_candidate.set_index("candidate")
    return per["unit_cost_at_design_volume_usd"].to_dict(), page.cost.crossovers.copy()


def test_models_pass_modeltester(page, qtmodeltester):
    qtmodeltester.check(page.summary_model)
    qtmodeltester.check(page.settings_model)


def test_one_bar_per_candidate_and_parts_stack_to_totals(page):
    names = [c.name for c in page._c.study.candidates]
    assert page.names == names
    per = page.cost.per_candidate.set_index("candidate")
    tops = np.zeros(len(names))
    for bar in page.cost_bars:
        tops = np.asarray(bar.opts["y0"]) + np.asarray(bar.opts["height"])
    assert tops == pytest.approx(per["unit_cost_at_design_volume_usd"].to_numpy())
    ticks = page.cost_plot.getAxis("bottom")._tickLevels[0]
    assert [t for _x, t in ticks] == [candidate_letter(i) for i in range(len(names))]
    for name in ("left", "bottom"):  # units on every axis
        for plot in (page.area_plot, page.cost_plot, page.volume_plot, page.wafer_plot):
            assert plot.getAxis(name).labelText


def test_wafer_cost_moves_unit_costs_and_crossover_and_undo_restores(page, controller):
    before, cross_before = figures(page)
    curve = page.volume_curves["Two PAs GaAs"]
    y_before = curve.getData()[1].copy()
    points_before = page.crossover_points.getData()[0].copy()
    items = (dict(page.volume_curves), list(page.area_bars), list(page.cost_bars))

    controller.set_field((*GAAS_CARD, "wafer_cost_usd"), 8000.0, "Set wafer cost")
    controller.flush()
    after, cross_after = figures(page)
    for name, value in before.items():
        gaas = "GaAs" in name
        assert (after[name] > value) if gaas else (after[name] == pytest.approx(value))
    # Dearer GaAs wafers move every GaAs/SiGe crossover (e.g. Two PAs GaAs = Wideband SiGe).
    moved = cross_after["volume"].to_numpy() - cross_before["volume"].to_numpy()
    assert np.nanmax(np.abs(moved)) > 0
    assert not np.array_equal(curve.getData()[1], y_before)
    assert not np.array_equal(page.crossover_points.getData()[0], points_before)
    # Items are kept and updated, never rebuilt (STYLE.md, plots).
    assert page.volume_curves == items[0] and page.area_bars == items[1]
    assert page.cost_bars == items[2]

    controller.undo_stack.undo()
    controller.flush()
    restored, cross_restored = figures(page)
    assert restored == pytest.approx(before)
    np.testing.assert_allclose(cross_restored["volume"], cross_before["volume"])
    np.testing.assert_allclose(curve.getData()[1], y_before)


def test_settings_table_edits_are_undoable(page, controller):
    model = page.settings_model
    row = model.row_of(("cost", "package_cost_usd"))
    idx = model.index(row, 1)
    assert model.setData(idx, "1.5", Qt.ItemDataRole.EditRole)
    assert controller.study.cost.package_cost_usd == 1.5
    assert model.data(idx) == "1.5" and model.data(model.index(row, 2)) == "USD"
    controller.undo_stack.undo()
    assert controller.study.cost.package_cost_usd == 0.8
    # The wafer rows follow the selected candidate's card.
    page.click_bar("cost", 3)  # Two PAs SiGe, on card 1
    assert model.path(0) == ("process_cards", 1, "wafer_diameter_mm")
    assert model.data(model.index(0, 1)) == "200"


def test_refused_setting_is_marked_and_not_applied(page, controller):
    model = page.settings_model
    row = model.row_of(("cost", "test_yield_pct"))
    idx = model.index(row, 1)
    assert not model.setData(idx, "150", Qt.ItemDataRole.EditRole)
    assert controller.study.cost.test_yield_pct == 97.0
    assert "cost.test_yield_pct" in model.data(idx, Qt.ItemDataRole.ToolTipRole)
    assert not model.setData(idx, "abc", Qt.ItemDataRole.EditRole)
    assert controller.undo_stack.count() == 0


def test_wafer_map_draws_the_grid_and_says_when_no_die_fits(page, controller):
    assert not page.no_fit_text.isVisible()
    grid = page.cost.grid(page.selected, page.selected_die)
    assert page.wafer_dies.path().elementCount() == 5 * grid.count
    assert "exact" in page.wafer_caption.text and "yield" in page.wafer_caption.text
    # An absurd die: a tiny wafer and a huge minimum die for the GaAs card.
    controller.set_field((*GAAS_CARD, "wafer_diameter_mm"), 25.0, "w")
    controller.set_field((*GAAS_CARD, "min_die_area_mm2"), 400.0, "m")
    controller.flush()
    assert page.selected == "Two PAs GaAs"
    assert page.no_fit_text.isVisible()
    assert page.no_fit_text.textItem.toPlainText() == "no whole die fits"
    assert "no whole die fits" in page.wafer_caption.text
    assert page.wafer_dies.path().elementCount() == 0
    assert math.isnan(page.cost.row("Two PAs GaAs")["unit_cost_at_design_volume_usd"])
    assert "✗" in page.cost_plot.getAxis("bottom")._tickLevels[0][0][1]


def test_bar_click_and_summary_selection_show_derivations(page, controller, qtbot):
    with qtbot.waitSignal(controller.derivation_requested) as blocker:
        page.click_bar("cost", 1)
    d = blocker.args[0]
    assert page.selected == "Wideband GaAs" and "Wideband GaAs" in d.title
    assert d.result == pytest.approx(
        page.cost.row("Wideband GaAs")["unit_cost_at_design_volume_usd"]
    )
    with qtbot.waitSignal(controller.derivation_requested) as blocker:
        page.click_bar("area", 2)
    assert blocker.args[0] is controller.evaluation.derivations[("Switched GaAs", None, "die_area")]
    nre_col = [c[1] for c in page.summary_model.COLUMNS].index("nre_usd")
    with qtbot.waitSignal(controller.derivation_requested) as blocker:
        page.summary_table.setCurrentIndex(page.summary_model.index(0, nre_col))
    assert blocker.args[0].result == page.cost.row("Two PAs GaAs")["nre_usd"]
    assert page.selected == "Two PAs GaAs"


def test_crossovers_are_marked_and_labelled(page):
    x = page.cost.crossovers.dropna(subset=["volume"])
    assert len(page.crossover_points.getData()[0]) == len(x)
    shown = [lab.textItem.toPlainText().strip() for lab in page.crossover_labels if lab.isVisible()]
    assert shown and all(t.endswith("radios") and " = " in t for t in shown)
    assert page.design_line.value() == pytest.approx(math.log10(20000))


def test_crossover_labels_leave_the_other_marks_uncovered(page, qtbot):
    # Each label sits beside its own mark; a label over another crossover's mark hides it.
    page.resize(1400, 900)
    page.show()
    qtbot.waitExposed(page)
    page._place_crossover_labels()
    vb = page.volume_plot.getViewBox()
    marks = [vb.mapViewToScene(pg.Point(*xy)) for xy in page._mark_xy]
    for label in page.crossover_labels:
        if not label.isVisible():
            continue
        rect = label.sceneBoundingRect().adjusted(2, 2, -2, -2)
        own = vb.mapViewToScene(pg.Point(*label.base))
        covered = [m for m in marks if rect.contains(m) and (m - own).manhattanLength() > 1]
        assert not covered, label.textItem.toPlainText()


def test_no_candidate_shown_leaves_the_page_empty(page, controller):
    for i in range(len(controller.study.candidates)):
        controller.set_field(("candidates", i, "enabled"), False, "hide")
    controller.flush()
    assert page.names == [] and page.summary_model.rowCount() == 0
    assert page.volume_curves == {} and page.wafer_dies.path().elementCount() == 0
    assert page.wafer_caption.text == "" and len(page.wafer_edge.getData()[0]) == 0
    controller.undo_stack.undo()
    controller.flush()
    assert page.names == [controller.study.candidates[-1].name]
