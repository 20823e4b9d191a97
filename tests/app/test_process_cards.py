"""Process Cards page: list, library, editor, derived figures, refusals and undo."""

from __future__ import annotations

import dataclasses
import math

import pytest
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QComboBox, QLineEdit

from app.controller import StudyController
from app.docks import derivation_html
from app.pages.card_table import (
    CARD_GROUPS,
    CardParameterTableModel,
    card_derivations,
    rename_card_edit,
)
from app.pages.process_cards import ProcessCardsPage
from core.edits import unique_name
from core.evaluation import Derivation
from core.process import DEFAULT_CARDS, ProcessCard, Technology
from core.resources import demo_path
from core.schema import field_spec
from core.study import load_study

GAAS = "GaAs pHEMT 0.15 µm"
SIGE = "SiGe BiCMOS HBT 0.13 µm"
GAN = "GaN-on-SiC HEMT 0.15 µm"


@pytest.fixture
def page(qtbot, controller):
    p = ProcessCardsPage(controller)
    qtbot.addWidget(p)
    p.resize(1100, 750)
    return p


def value_index(model: CardParameterTableModel, name: str):
    return model.index(model.row_of(name), CardParameterTableModel.VALUE)


def cell(model: CardParameterTableModel, name: str, column: int) -> str:
    return model.index(model.row_of(name), column).data()


def test_card_model_passes_model_tester(page, qtmodeltester):
    qtmodeltester.check(page.model)
    page.select_card(1)
    qtmodeltester.check(page.model)


def test_every_card_field_is_shown_exactly_once():
    grouped = [name for _title, names in CARD_GROUPS for name in names]
    assert len(grouped) == len(set(grouped))
    fields = {f.name for f in dataclasses.fields(ProcessCard)}
    assert set(grouped) | {"source_note"} == fields
    assert [t for t, _ in CARD_GROUPS][1:] == [
        "Device",
        "Passives",
        "Layout",
        "Switches",
        "Wafer & masks",
    ]


def test_rows_show_label_value_unit_and_note_from_the_field_spec(page):
    m = page.model
    spec = field_spec(ProcessCard, "c_out_pf_per_mm")
    assert cell(m, "c_out_pf_per_mm", 0) == spec.label == "Output capacitance"
    assert cell(m, "c_out_pf_per_mm", 1) == "0.3"
    assert cell(m, "c_out_pf_per_mm", 2) == "pF/mm"
    assert cell(m, "c_out_pf_per_mm", 3) == spec.note
    assert cell(m, "vdd_v", 2) == "V"
    assert cell(m, "q_passive", 2) == ""  # dimensionless ("1") shows no unit
    assert cell(m, "mask_set_cost_usd", 1) == "120,000"  # grouped for reading ...
    assert value_index(m, "mask_set_cost_usd").data(Qt.ItemDataRole.EditRole) == "120000"
    assert page.source_edit.text() == page._c.study.process_cards[0].source_note
    assert GAAS in page.card_heading.text()


def test_derived_figures_follow_the_load_line_and_switch_figure_of_merit(page):
    # Cripps, RF Power Amplifiers for Wireless Communications, 2nd ed., ch. 2 (load line):
    # Psat' = (Vdd - Vk)·Imax'/4 and Ropt·W = 2(Vdd - Vk)/Imax'. GaAs card: 5 V, 1 V, 0.55 A/mm.
    by_key = card_derivations(DEFAULT_CARDS[GAAS])
    assert by_key["psat"].result == pytest.approx((5.0 - 1.0) * 0.55 / 4)  # 0.55 W/mm
    assert by_key["ropt"].result == pytest.approx(2 * (5.0 - 1.0) / 0.55)  # 14.545 Ω·mm
    # Switch figure of merit f_c = 1/(2π·Ron·Coff): 1.5 Ω·mm and 250 fF/mm → 424.4 GHz, the
    # "f_c ≈ 420 GHz" of the GaAs prototype in DESIGN.md §4.
    fc = 1 / (2 * math.pi * 1.5 * 250e-15) / 1e9
    assert by_key["f_c"].result == pytest.approx(fc)
    assert by_key["f_c"].unit == "GHz" and by_key["psat"].unit == "W/mm"
    assert by_key["ropt"].unit == "Ω·mm"
    m = page.model
    assert cell(m, "f_c", 1) == "424.4"
    assert cell(m, "psat", 1) == "0.55"
    assert cell(m, "ropt", 1) == "14.55"
    assert not (value_index(m, "psat").flags() & Qt.ItemFlag.ItemIsEditable)
    # SiGe card: 3.3 V, 0.8 V, 1.0 A/mm → Psat' = 2.5·1.0/4 = 0.625 W/mm, Ropt·W = 5 Ω·mm.
    page.select_card(1)
    assert cell(m, "psat", 1) == "0.625"
    assert cell(m, "ropt", 1) == "5"


def test_selecting_a_derived_row_shows_its_derivation(page, qtbot):
    m = page.model
    with qtbot.waitSignal(page._c.derivation_requested) as blocker:
        page.table.setCurrentIndex(m.index(m.row_of("ropt"), 0))
    d = blocker.args[0]
    assert isinstance(d, Derivation)
    assert d.result == pytest.approx(2 * 4.0 / 0.55)
    assert ("Imax'", 0.55, "A/mm") in d.inputs
    assert "Cripps" in derivation_html(d)


def test_duplicate_gives_a_new_uniquely_named_card_and_undo_removes_it(page, controller):
    before = controller.study
    assert page.duplicate_selected()
    cards = controller.study.process_cards
    assert len(cards) == 3
    assert cards[1].name == f"{GAAS} copy"
    assert dataclasses.replace(cards[1], name=GAAS) == cards[0]
    assert page.current_index() == 1 and page.card_list.currentItem().text() == f"{GAAS} copy"
    page.select_card(0)
    assert page.duplicate_selected()
    assert controller.study.process_cards[1].name == f"{GAAS} copy (2)"
    controller.undo_stack.undo()
    controller.undo_stack.undo()
    assert controller.study == before
    assert page.card_list.count() == 2


def test_add_from_library_copies_the_shipped_card_and_renames_a_clash(page, controller):
    assert page.add_from_library(GAN)
    assert controller.study.process_cards[-1] == DEFAULT_CARDS[GAN]
    assert page.current_index() == 2
    assert page.add_from_library(GAAS)  # already in the study
    added = controller.study.process_cards[-1]
    assert added.name == f"{GAAS} (2)"
    assert added == dataclasses.replace(DEFAULT_CARDS[GAAS], name=f"{GAAS} (2)")
    assert unique_name("a", {"a", "a (2)"}) == "a (3)"


def test_edit_a_value_changes_the_study_and_undo_restores_it(page, controller):
    m = page.model
    depth = controller.undo_stack.count()
    assert m.setData(value_index(m, "vdd_v"), "6")
    assert controller.study.process_cards[0].vdd_v == 6.0
    assert controller.undo_stack.count() == depth + 1
    assert cell(m, "vdd_v", 1) == "6"
    assert cell(m, "psat", 1) == f"{(6 - 1) * 0.55 / 4:.4g}"  # derived figure follows
    controller.undo_stack.undo()
    assert controller.study.process_cards[0].vdd_v == 5.0
    assert cell(m, "vdd_v", 1) == "5"


def test_edit_through_the_table_editor(page, controller, qtbot):
    page.show()
    qtbot.waitExposed(page)
    index = value_index(page.model, "fmax_ghz")
    page.table.setCurrentIndex(index)
    page.table.edit(index)
    editor = page.table.findChild(QLineEdit)
    assert editor is not None and editor.text() == "160"
    editor.selectAll()
    qtbot.keyClicks(editor, "180 GHz")  # a typed unit is accepted
    qtbot.keyClick(editor, Qt.Key.Key_Return)  # the delegate commits through a queued call
    qtbot.waitUntil(lambda: controller.study.process_cards[0].fmax_ghz == 180.0, timeout=2000)


def test_technology_is_picked_from_a_combo(page, controller, qtbot):
    page.show()
    qtbot.waitExposed(page)
    index = value_index(page.model, "technology")
    page.table.setCurrentIndex(index)
    page.table.edit(index)
    combo = page.table.findChild(QComboBox)
    assert combo is not None
    assert [combo.itemData(i) for i in range(combo.count())] == [t.value for t in Technology]
    combo.setCurrentIndex(combo.findData(Technology.GAN_HEMT.value))
    combo.activated.emit(combo.currentIndex())
    assert controller.study.process_cards[0].technology is Technology.GAN_HEMT


def test_rename_carries_candidates_along_in_one_undo_step(page, controller):
    users = [c.name for c in controller.study.candidates if c.process == GAAS]
    assert len(users) == 3
    depth = controller.undo_stack.count()
    assert page.model.setData(value_index(page.model, "name"), "GaAs 0.15 (foundry A)")
    study = controller.study
    assert study.process_cards[0].name == "GaAs 0.15 (foundry A)"
    assert [c.name for c in study.candidates if c.process == "GaAs 0.15 (foundry A)"] == users
    assert not any(c.process == GAAS for c in study.candidates)
    assert controller.undo_stack.count() == depth + 1
    assert page.card_list.item(0).text() == "GaAs 0.15 (foundry A)"
    controller.undo_stack.undo()
    study = controller.study
    assert study.process_cards[0].name == GAAS
    assert [c.name for c in study.candidates if c.process == GAAS] == users


def test_rename_edit_is_one_compound_that_reverts_exactly():
    study = load_study(demo_path())
    edit = rename_card_edit(study, 1, "SiGe B")
    assert len(edit.edits) == 1 + sum(c.process == SIGE for c in study.candidates)
    renamed = edit.apply(study)
    assert renamed.process_cards[1].name == "SiGe B"
    assert {c.process for c in renamed.candidates} == {GAAS, "SiGe B"}
    assert edit.revert(renamed) == study


@pytest.mark.parametrize(
    ("field", "typed", "reason"),
    [
        ("vdd_v", "-1", "must be greater than 0 V (got -1)"),
        ("vdd_v", "abc", "'abc' is not a number"),
        ("max_cells", "2.5", "must be a whole number"),
        ("name", SIGE, "duplicates the card name"),
    ],
)
def test_invalid_values_are_refused_naming_the_field(page, controller, field, typed, reason):
    refused: list[tuple[str, str]] = []
    controller.edit_refused.connect(lambda p, r: refused.append((p, r)))
    before = controller.study
    m = page.model
    assert not m.setData(value_index(m, field), typed)
    assert controller.study == before
    path = f"process_cards[{1 if field == 'name' else 0}].{field}"
    assert refused and refused[-1][0] == path and reason in refused[-1][1]
    assert path in page.message.text() and reason in page.message.text()
    assert field_spec(ProcessCard, field).label in page.message.text()
    note = cell(m, field, CardParameterTableModel.NOTE)
    assert note.startswith("✗ Not applied") and reason in note
    assert value_index(m, field).siblingAtColumn(3).data(Qt.ItemDataRole.DecorationRole)
    assert reason in controller.notices()[0].reason  # listed in the Notices dock too


def test_cross_field_refusal_names_the_other_field(page, controller):
    m = page.model
    assert not m.setData(value_index(m, "v_knee_v"), "5")  # knee = Vdd
    note = cell(m, "v_knee_v", CardParameterTableModel.NOTE)
    assert "must be below vdd_v (5 V)" in note
    assert not m.setData(value_index(m, "vdd_v"), "0.5")  # Vdd below the knee
    note = cell(m, "vdd_v", CardParameterTableModel.NOTE)
    assert "v_knee_v must be below vdd_v (0.5 V)" in note
    assert controller.study.process_cards[0].vdd_v == 5.0


def test_a_successful_edit_clears_the_refusal(page, controller):
    m = page.model
    assert not m.setData(value_index(m, "vdd_v"), "-1")
    assert m.setData(value_index(m, "vdd_v"), "5.5")
    assert cell(m, "vdd_v", CardParameterTableModel.NOTE) == ""
    assert page.message.text() == ""


def test_removing_a_used_card_is_refused_naming_the_candidates(page, controller):
    before = controller.study
    page.select_card(0)
    assert not page.remove_selected()
    assert controller.study == before
    text = page.message.text()
    for name in ("Two PAs GaAs", "Wideband GaAs", "Switched GaAs"):
        assert name in text
    assert "Two PAs SiGe" not in text
    assert controller.last_refusal.startswith(f"cannot remove “{GAAS}”")


def test_remove_an_unused_card_and_undo(page, controller):
    assert page.add_from_library(GAN)
    assert page.current_index() == 2
    assert page.remove_selected()
    assert [c.name for c in controller.study.process_cards] == [GAAS, SIGE]
    assert page.current_index() == 1
    controller.undo_stack.undo()
    assert controller.study.process_cards[2].name == GAN
    assert page.current_index() == 2 and page.card_list.count() == 3


def test_source_note_is_edited_under_the_table(page, controller):
    page.source_edit.setText("Calibrated to our run 42 power sweeps.")
    page.source_edit.editingFinished.emit()
    assert controller.study.process_cards[0].source_note == "Calibrated to our run 42 power sweeps."
    controller.undo_stack.undo()
    assert page.source_edit.text() == DEFAULT_CARDS[GAAS].source_note


def test_no_cards_leaves_an_empty_editor(qtbot, qapp):
    study = load_study(demo_path())
    study = dataclasses.replace(study, process_cards=(), candidates=())
    c = StudyController(study)
    p = ProcessCardsPage(c)
    qtbot.addWidget(p)
    assert p.model.rowCount() == 0 and not p.remove_button.isEnabled()
    assert "No process card" in p.card_heading.text()
    assert p.add_from_library(GAAS)
    assert p.model.rowCount() > 0 and p.current_index() == 0


def test_card_edits_reach_the_evaluation_in_the_main_window(make_window, qtbot):
    w = make_window()
    c = w.controller
    page = ProcessCardsPage(c)
    qtbot.addWidget(page)
    before = c.evaluation.summary.set_index("candidate")
    gaas_users = ["Two PAs GaAs", "Wideband GaAs", "Switched GaAs"]
    sige_users = ["Two PAs SiGe", "Wideband SiGe", "Switched SiGe"]
    with qtbot.waitSignal(c.evaluation_changed, timeout=5000):
        assert page.model.setData(value_index(page.model, "vdd_v"), "8")
    assert w.isWindowModified()
    after = c.evaluation.summary.set_index("candidate")
    # Cripps load line: Psat' = (Vdd - Vk)·Imax'/4 grows 7/4-fold from 5 V to 8 V, so the
    # output periphery a P1dB target needs shrinks and so does the die; other cards are untouched.
    assert (after.loc[gaas_users, "die_area_mm2"] < before.loc[gaas_users, "die_area_mm2"]).all()
    assert after.loc[sige_users].equals(before.loc[sige_users])
    with qtbot.waitSignal(c.evaluation_changed, timeout=5000):
        assert page.model.setData(value_index(page.model, "name"), "GaAs renamed")
    summary = c.evaluation.summary.set_index("candidate")
    assert (summary.loc[gaas_users, "process"] == "GaAs renamed").all()
    c.undo_stack.undo()
    c.undo_stack.undo()
    c.flush()
    assert c.evaluation.summary.set_index("candidate").equals(before)
    assert not w.isWindowModified()
