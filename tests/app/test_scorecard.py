"""Scorecard page: the matrix model, status updates after an edit, derivations, sorting."""

from __future__ import annotations

import math

import pytest
from PySide6.QtCore import Qt
from PySide6.QtGui import QStandardItem, QStandardItemModel

from app.pages.scorecard import (
    GROUP_ROLE,
    SORT_ROLE,
    ScorecardPage,
    ScorecardProxyModel,
)
from app.style import STATUS_STYLE
from core.evaluation import Status


@pytest.fixture
def scorecard(make_window, qtbot, monkeypatch):
    """(window, page) with the Scorecard page in view."""
    w = make_window()
    # pytest-qt closes the window before make_window's own clean-up marks the study clean, so
    # an edited study would open the "save changes?" box and block the teardown.
    monkeypatch.setattr(w, "maybe_save", lambda: True)
    page = w.select_page(ScorecardPage.title)
    qtbot.waitExposed(page)
    return w, page


def _row(ev, candidate, band, metric):
    sc = ev.scorecard
    hit = sc[(sc.candidate == candidate) & (sc.band == band) & (sc.metric == metric)]
    assert len(hit) == 1
    return hit.iloc[0]


def _expected_status(margin: float, window: float) -> str:
    # DESIGN.md §6 with the tolerance of §2: meets at margin ≥ 0, marginal within the window
    # below the target, misses beyond it.
    if margin >= 0:
        return "meets"
    return "marginal" if margin >= -window else "misses"


def test_model_passes_the_model_tester(scorecard, qtmodeltester):
    _w, page = scorecard
    assert page.model.rowCount() > 0
    qtmodeltester.check(page.model)
    qtmodeltester.check(page.proxy)


def test_header_groups_bands_and_shows_units(scorecard):
    w, page = scorecard
    m = page.model
    study = w.controller.study
    groups = [m.headerData(i, Qt.Orientation.Horizontal, GROUP_ROLE) for i in range(1, 7)]
    assert groups == [study.bands[0].name] * 3 + [study.bands[1].name] * 3
    labels = [m.headerData(i, Qt.Orientation.Horizontal) for i in range(m.columnCount())]
    assert labels[1:4] == ["Gain\n(dB)", "P1dB\n(dBm)", "PAE\n(%)"]
    assert "Largest die\n(mm²)" in labels and "DC at P1dB\n(W/PA)" in labels
    assert "Array DC at P1dB\n(W)" in labels
    assert page.header.height() >= 2 * page.header.group_height()  # two header rows


def test_cells_show_estimate_margin_and_symbol_of_the_evaluation(scorecard):
    w, page = scorecard
    ev = w.controller.evaluation
    m = page.model
    assert m.candidates == [c.name for c in w.controller.study.candidates if c.enabled]
    for r, name in enumerate(m.candidates):
        for band in w.controller.study.bands:
            for metric in ("gain", "p1db", "pae"):
                c = m.column_of("metric", band.name, metric)
                row = _row(ev, name, band.name, metric)
                first, second = m.data(m.index(r, c)).split("\n")
                assert first == f"{row.estimate:.1f}"
                # The symbol shown beside the colour is the one core defines for the status.
                assert second == f"{Status(row.status).symbol} {row.margin:+.1f}"
                assert STATUS_STYLE[m.status_at(r, c)][0] == Status(row.status).symbol
                assert m.data(m.index(r, c), Qt.ItemDataRole.BackgroundRole) is not None


def test_raising_a_target_turns_meets_into_misses_after_the_debounce(scorecard, qtbot):
    w, page = scorecard
    c = w.controller
    m = page.model
    band = c.study.bands[0].name
    col = m.column_of("metric", band, "pae")
    before = [m.status_at(r, col) for r in range(m.rowCount())]
    assert "meets" in before
    with qtbot.waitSignal(c.evaluation_changed, timeout=5000):
        assert c.set_field(("bands", 0, "targets", "pae_pct"), 40.0)
    window = c.study.tolerance.marginal_pae_pts
    for r, name in enumerate(m.candidates):
        row = _row(c.evaluation, name, band, "pae")
        assert row.target == 40.0
        assert math.isclose(row.margin, row.estimate - 40.0, abs_tol=1e-9)
        assert m.status_at(r, col) == _expected_status(row.margin, window) == "misses"
        assert f"✗ {row.estimate - 40.0:+.1f}" in m.data(m.index(r, col))


def test_unreachable_gain_shows_bang_and_the_finding_in_the_tooltip(scorecard, qtbot):
    w, page = scorecard
    c = w.controller
    m = page.model
    band = c.study.bands[0].name
    with qtbot.waitSignal(c.evaluation_changed, timeout=5000):
        assert c.set_field(("bands", 0, "targets", "gain_db"), 60.0)
    col = m.column_of("metric", band, "gain")
    errors = {(f.candidate, f.band): f.message for f in c.evaluation.findings}
    seen = 0
    for r, name in enumerate(m.candidates):
        if m.status_at(r, col) != "infeasible":
            continue
        seen += 1
        assert m.data(m.index(r, col)).split("\n")[1].startswith("!")
        assert errors[(name, band)] in m.data(m.index(r, col), Qt.ItemDataRole.ToolTipRole)
    assert seen > 0


def test_selecting_a_cell_requests_its_derivation(scorecard, qtbot):
    w, page = scorecard
    c = w.controller
    m = page.model
    name, band = m.candidates[1], c.study.bands[1].name
    col = m.column_of("metric", band, "p1db")
    with qtbot.waitSignal(c.derivation_requested, timeout=1000) as blocker:
        page.select_cell(1, col)
    d = blocker.args[0]
    assert d is c.evaluation.derivations[(name, band, "p1db")]
    assert "P1dB" in d.title and "P" in d.formula
    assert math.isclose(d.result, _row(c.evaluation, name, band, "p1db").estimate)
    assert w.derivation.current is d  # the dock shows it

    area = m.column_of("summary", None, "die_area_mm2")
    with qtbot.waitSignal(c.derivation_requested, timeout=1000) as blocker:
        page.select_cell(0, area)
    d = blocker.args[0]
    assert "A_die" in d.formula
    summary = c.evaluation.summary.set_index("candidate")
    assert math.isclose(d.result, summary.at[m.candidates[0], "die_area_mm2"])

    # Cost figures come from the cost model, with its own derivations.
    cost = m.column_of("summary", None, "unit_cost_at_design_volume_usd")
    assert cost >= 0
    with qtbot.waitSignal(c.derivation_requested, timeout=1000) as blocker:
        page.select_cell(3, cost)
    assert blocker.args[0] is c.cost.derivations[(m.candidates[3], None, "unit_cost")]
    per = c.cost.per_candidate.set_index("candidate")
    shown = float(m.data(m.index(3, cost)).replace(",", ""))
    assert shown == pytest.approx(
        per.at[m.candidates[3], "unit_cost_at_design_volume_usd"], abs=5e-3
    )


def test_array_dc_and_score_cells_have_derivations_that_reproduce_them(scorecard, qtbot):
    w, page = scorecard
    c = w.controller
    m = page.model
    summary = c.evaluation.summary.set_index("candidate")
    col = m.column_of("summary", None, "array_dc_power_w")
    for r, name in enumerate(m.candidates):
        d = m.derivation_at(r, col)
        assert d is not None and math.isclose(d.result, summary.at[name, "array_dc_power_w"])
        # The record is redone by hand from its own inputs: max over bands of N_b × P_DC,b.
        values = dict((k, v) for k, v, _u in d.inputs)
        bands = [b.name for b in c.study.bands]
        redo = max(values[f"N ({b})"] * values[f"P_DC ({b})"] for b in bands)
        assert math.isclose(redo, d.result, rel_tol=1e-12)
    col = m.column_of("summary", None, "score")
    if col >= 0:
        scores = c.scores.set_index("candidate")
        for r, name in enumerate(m.candidates):
            d = m.derivation_at(r, col)
            v = [val for _k, val, _u in d.inputs]
            weights, parts = v[0::2], v[1::2]
            redo = sum(a * b for a, b in zip(weights, parts, strict=True)) / sum(weights)
            assert math.isclose(redo, scores.at[name, "score"], rel_tol=1e-9)


def test_selection_survives_a_recompute(scorecard, qtbot):
    w, page = scorecard
    c = w.controller
    m = page.model
    col = m.column_of("metric", c.study.bands[0].name, "pae")
    page.select_cell(2, col)
    name = m.candidates[2]
    with qtbot.waitSignal(c.derivation_requested, timeout=5000) as blocker:
        assert c.set_field(("bands", 0, "targets", "pae_pct"), 30.0)
        c.flush()
    current = page.proxy.mapToSource(page.table.currentIndex())
    assert (current.row(), current.column()) == (2, col)
    assert blocker.args[0] is c.evaluation.derivations[(name, c.study.bands[0].name, "pae")]


def test_sorting_orders_numerically_both_ways(scorecard):
    w, page = scorecard
    m = page.model
    summary = w.controller.evaluation.summary.set_index("candidate")
    col = m.column_of("summary", None, "array_dc_power_w")
    page.table.sortByColumn(col, Qt.SortOrder.AscendingOrder)
    names = [
        page.proxy.index(r, 0).data(SORT_ROLE) for r in range(page.proxy.rowCount())
    ]  # casefolded names
    by_value = sorted(m.candidates, key=lambda n: summary.at[n, "array_dc_power_w"])
    assert names == [n.casefold() for n in by_value]
    page.table.sortByColumn(col, Qt.SortOrder.DescendingOrder)
    values = [page.proxy.index(r, col).data(SORT_ROLE) for r in range(page.proxy.rowCount())]
    assert values == sorted(values, reverse=True)


def test_proxy_sorts_by_value_not_text(qapp):
    # "10.2" < "9.5" as text; the proxy must put 9.5 first.
    src = QStandardItemModel()
    for value in (10.2, 9.5, 100.0, -1.0):
        item = QStandardItem(f"{value:.1f}")
        item.setData(value, SORT_ROLE)
        src.appendRow(item)
    proxy = ScorecardProxyModel()
    proxy.setSourceModel(src)
    proxy.sort(0, Qt.SortOrder.AscendingOrder)
    shown = [proxy.index(r, 0).data() for r in range(proxy.rowCount())]
    assert shown == ["-1.0", "9.5", "10.2", "100.0"]


def test_tolerance_and_legend_are_shown(scorecard, qtbot):
    w, page = scorecard
    text = page.tolerance_label.text()
    assert "0.5 dB" in text and "2 PAE points" in text
    for symbol, word, _colour in STATUS_STYLE.values():
        assert symbol in page.legend.text() and word in page.legend.text()
    with qtbot.waitSignal(w.controller.evaluation_changed, timeout=5000):
        assert w.controller.set_field(("tolerance", "marginal_db"), 1.0)
    assert "1 dB" in page.tolerance_label.text()


def test_no_enabled_candidate_shows_the_empty_state(scorecard, qtbot):
    w, page = scorecard
    c = w.controller
    for i in range(len(c.study.candidates)):
        assert c.set_field(("candidates", i, "enabled"), False)
    c.flush()
    assert page.model.rowCount() == 0
    assert page.empty.isVisible() and not page.table.isVisible()
    assert "Candidates page" in page.empty.text()


def test_candidate_column_stays_in_view_when_the_table_scrolls(scorecard):
    _w, page = scorecard
    frozen = page.table.frozen
    assert frozen.model() is page.proxy
    assert frozen.selectionModel() is page.table.selectionModel()
    shown = [c for c in range(page.proxy.columnCount()) if not frozen.isColumnHidden(c)]
    assert shown == [0]
    assert frozen.columnWidth(0) == page.table.columnWidth(0)
    assert frozen.horizontalHeader().height() == page.table.horizontalHeader().height()
