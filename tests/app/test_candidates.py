"""Candidates page: table, per-kind applicability, combos, check boxes, add/remove and undo."""

from __future__ import annotations

import dataclasses

import pytest
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QComboBox

from app.controller import StudyController
from app.pages.candidates import KIND_LABELS, CandidatesPage, new_candidate
from app.pages.process_cards import ProcessCardsPage
from app.tables import OPTIONS_ROLE
from core.resources import demo_path
from core.study import CandidateKind, Combining, load_study

GAAS = "GaAs pHEMT 0.15 µm"
SIGE = "SiGe BiCMOS HBT 0.13 µm"


@pytest.fixture
def page(qtbot, controller):
    p = CandidatesPage(controller)
    qtbot.addWidget(p)
    p.resize(1100, 750)
    return p


def col(page: CandidatesPage, path: str) -> int:
    for i, c in enumerate(page.model.columns):
        if c.path == (path,):
            return i
    raise KeyError(path)


def idx(page: CandidatesPage, row: int, path: str):
    return page.model.index(row, col(page, path))


def row_of(page: CandidatesPage, name: str) -> int:
    return [c.name for c in page._c.study.candidates].index(name)


def test_candidate_model_passes_model_tester(page, qtmodeltester):
    qtmodeltester.check(page.model)


def test_headers_carry_units_from_the_field_specs(page):
    headers = [
        page.model.headerData(i, Qt.Orientation.Horizontal, Qt.ItemDataRole.DisplayRole)
        for i in range(page.model.columnCount())
    ]
    assert "Band-select\nloss (dB)" in headers
    assert "Band-select\ncost (USD)" in headers
    assert headers[:4] == ["Name", "Architecture", "Process card", "Stages"]


def test_columns_that_do_not_apply_are_greyed_but_keep_their_value(page, controller):
    wide = row_of(page, "Wideband GaAs")
    sep = row_of(page, "Two PAs GaAs")
    sw = row_of(page, "Switched GaAs")
    combining = idx(page, wide, "combining")
    assert combining.data() == "—"
    assert combining.data(Qt.ItemDataRole.EditRole) == "separate_feeds"  # still stored
    assert combining.data(Qt.ItemDataRole.ForegroundRole).name() == "#8c8c8c"
    assert "Stored value: own feeds" in combining.data(Qt.ItemDataRole.ToolTipRole)
    assert idx(page, sep, "combining").data() == "own feeds"
    assert idx(page, sep, "combining").data(Qt.ItemDataRole.ForegroundRole) is None
    assert idx(page, sep, "switched_elements").data() == "—"
    assert idx(page, sw, "switched_elements").data() == "2"
    assert idx(page, sw, "die_arrangement").data() == "—"
    # Band-select figures apply only once a separate candidate combines through a part.
    assert idx(page, sep, "band_select_loss_db").data() == "—"
    assert page.model.setData(idx(page, sep, "combining"), "diplexer")
    assert controller.study.candidates[sep].combining is Combining.DIPLEXER
    assert idx(page, sep, "band_select_loss_db").data() == "0.8"
    assert idx(page, sep, "band_select_cost_usd").data() == "0.3"
    # A greyed cell still edits the stored value.
    assert page.model.setData(idx(page, wide, "switched_elements"), "3")
    assert controller.study.candidates[wide].switched_elements == 3


def test_change_kind_and_undo(page, controller):
    row = row_of(page, "Wideband GaAs")
    depth = controller.undo_stack.count()
    assert page.model.setData(idx(page, row, "kind"), "switched")
    assert controller.study.candidates[row].kind is CandidateKind.SWITCHED
    assert idx(page, row, "kind").data() == KIND_LABELS["switched"]
    assert idx(page, row, "switched_elements").data() == "2"  # now applies
    assert controller.undo_stack.count() == depth + 1
    controller.undo_stack.undo()
    assert controller.study.candidates[row].kind is CandidateKind.WIDEBAND


def test_kind_and_process_are_picked_from_combos(page, controller, qtbot):
    page.show()
    qtbot.waitExposed(page)
    row = row_of(page, "Two PAs GaAs")
    index = idx(page, row, "kind")
    assert [v for _s, v in index.data(OPTIONS_ROLE)] == [k.value for k in CandidateKind]
    page.table.setCurrentIndex(index)
    page.table.edit(index)
    combo = page.table.findChild(QComboBox)
    assert [combo.itemText(i) for i in range(combo.count())] == list(KIND_LABELS.values())
    assert combo.currentData() == "separate"
    combo.setCurrentIndex(combo.findData("wideband"))
    combo.activated.emit(combo.currentIndex())
    assert controller.study.candidates[row].kind is CandidateKind.WIDEBAND

    index = idx(page, row, "process")
    assert [v for _s, v in index.data(OPTIONS_ROLE)] == [GAAS, SIGE]  # the study's cards
    qtbot.waitUntil(lambda: page.table.findChild(QComboBox) is None, timeout=2000)
    page.table.setCurrentIndex(index)
    page.table.edit(index)
    combo = page.table.findChild(QComboBox)
    assert combo.currentData() == GAAS
    combo.setCurrentIndex(combo.findData(SIGE))
    combo.activated.emit(combo.currentIndex())
    assert controller.study.candidates[row].process == SIGE


def test_shown_is_a_check_box(page, controller):
    index = idx(page, 0, "enabled")
    assert index.flags() & Qt.ItemFlag.ItemIsUserCheckable
    assert not index.flags() & Qt.ItemFlag.ItemIsEditable
    assert index.data(Qt.ItemDataRole.CheckStateRole) == Qt.CheckState.Checked
    assert page.model.setData(index, Qt.CheckState.Unchecked, Qt.ItemDataRole.CheckStateRole)
    assert controller.study.candidates[0].enabled is False
    assert index.data(Qt.ItemDataRole.CheckStateRole) == Qt.CheckState.Unchecked
    assert page.model.setData(index, Qt.CheckState.Checked.value, Qt.ItemDataRole.CheckStateRole)
    assert controller.study.candidates[0].enabled is True
    controller.undo_stack.undo()
    controller.undo_stack.undo()
    assert controller.study.candidates[0].enabled is True


def test_stages_blank_means_auto_and_out_of_range_is_refused(page, controller):
    index = idx(page, 0, "stages")
    assert index.data() == "auto"
    assert page.model.setData(index, "3")
    assert controller.study.candidates[0].stages == 3
    assert page.model.setData(index, "")
    assert controller.study.candidates[0].stages is None
    assert not page.model.setData(index, "7")
    assert controller.study.candidates[0].stages is None
    assert "candidates[0].stages" in page.message.text()
    assert "must be at most 5" in page.message.text()


def test_add_each_kind_and_undo(page, controller):
    n = len(controller.study.candidates)
    page.select_row(row_of(page, "Two PAs SiGe"))
    for k, kind in enumerate(CandidateKind):
        assert page.add_candidate(kind)
        new = controller.study.candidates[-1]
        assert new.kind is kind and new.process == SIGE  # the selected row's card
        assert page.selected_row() == n + k
    names = [c.name for c in controller.study.candidates]
    assert len(names) == len(set(names)) == n + 3
    # Options come from the last candidate of the same kind: the demo's switched SiGe.
    switched = controller.study.candidates[-1]
    assert switched.design_effort_factor == 1.6
    for _ in CandidateKind:
        controller.undo_stack.undo()
    assert len(controller.study.candidates) == n
    assert page.model.rowCount() == n


def test_duplicate_and_remove_with_undo(page, controller):
    before = controller.study
    row = row_of(page, "Switched GaAs")
    page.select_row(row)
    assert page.duplicate_selected()
    copy = controller.study.candidates[row + 1]
    assert copy == dataclasses.replace(before.candidates[row], name="Switched GaAs copy")
    page.select_row(row)
    assert page.remove_selected()
    assert [c.name for c in controller.study.candidates][row] == "Switched GaAs copy"
    controller.undo_stack.undo()
    assert controller.study.candidates[row].name == "Switched GaAs"
    controller.undo_stack.undo()
    assert controller.study == before


def test_add_without_cards_is_refused(qtbot, qapp):
    study = dataclasses.replace(load_study(demo_path()), process_cards=(), candidates=())
    c = StudyController(study)
    p = CandidatesPage(c)
    qtbot.addWidget(p)
    assert not p.add_candidate(CandidateKind.WIDEBAND)
    assert "process card" in p.message.text()


def test_new_candidate_names_are_unique():
    taken = {"Wideband PA", "Wideband PA (2)"}
    cand = new_candidate(CandidateKind.WIDEBAND, taken, GAAS)
    assert cand.name == "Wideband PA (3)" and cand.process == GAAS


def test_card_rename_on_the_cards_page_shows_in_the_candidates_table(page, controller, qtbot):
    cards = ProcessCardsPage(controller)
    qtbot.addWidget(cards)
    m = cards.model
    assert m.setData(m.index(m.row_of("name"), 1), "GaAs renamed")
    assert idx(page, 0, "process").data() == "GaAs renamed"
    controller.undo_stack.undo()
    assert idx(page, 0, "process").data() == GAAS


def test_architecture_explanation_names_all_three(page):
    from PySide6.QtWidgets import QLabel

    text = page.findChild(QLabel, "ArchitectureExplanation").text()
    for word in ("Separate", "Wideband", "Switched"):
        assert word in text


def test_candidate_edits_reach_the_evaluation_in_the_main_window(make_window, qtbot):
    w = make_window()
    c = w.controller
    page = CandidatesPage(c)
    qtbot.addWidget(page)
    page.select_row(row_of(page, "Wideband SiGe"))
    with qtbot.waitSignal(c.evaluation_changed, timeout=5000):
        assert page.add_candidate(CandidateKind.SWITCHED)
    summary = c.evaluation.summary.set_index("candidate")
    new = c.study.candidates[-1].name
    assert summary.loc[new, "kind"] == "switched" and summary.loc[new, "process"] == SIGE
    # Only shown (enabled) candidates are evaluated: unticking removes the row.
    with qtbot.waitSignal(c.evaluation_changed, timeout=5000):
        assert page.model.setData(
            idx(page, len(c.study.candidates) - 1, "enabled"),
            Qt.CheckState.Unchecked,
            Qt.ItemDataRole.CheckStateRole,
        )
    assert new not in set(c.evaluation.summary["candidate"])
    assert w.isWindowModified()
    c.undo_stack.undo()
    c.undo_stack.undo()
    assert not w.isWindowModified()
