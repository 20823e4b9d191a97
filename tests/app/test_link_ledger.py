"""GUI tests of the Link Ledger page (pytest-qt, offscreen)."""

from __future__ import annotations

import math

import pytest

from app.controller import StudyController
from app.pages.link_ledger import CAUTION_TEXT, LedgerTableModel, LinkLedgerPage
from core.link_plan import band_ledger
from core.resources import demo_path
from core.study import load_study


@pytest.fixture
def page(qtbot):
    controller = StudyController(load_study(demo_path("harbour-small-cell")))
    p = LinkLedgerPage(controller)
    qtbot.addWidget(p)
    p.resize(1200, 800)
    p.show()
    return p


def test_ledger_model_passes_modeltester(qtmodeltester):
    model = LedgerTableModel()
    model.set_budget(band_ledger(load_study(demo_path("harbour-small-cell")).bands[0]))
    qtmodeltester.check(model)


def test_distance_change_moves_eirp_and_p1db(page):
    c = page._c
    before = page.budget
    box = page.editors["distance_m"]
    assert box.suffix() == " m" and box.value() == 150.0
    box.setValue(300.0)
    assert c.study.bands[0].link.distance_m == 300.0
    after = page.budget
    # Doubling d: +20·log10 2 = 6.02 dB free-space loss (ITU-R P.525-4 §2.2), plus more gas
    # and rain; the per-element P1dB must rise by the same amount as the required EIRP.
    rise = after.required_eirp_dbm - before.required_eirp_dbm
    assert rise > 20 * math.log10(2)
    assert after.p1db_elem_dbm - before.p1db_elem_dbm == pytest.approx(rise, abs=1e-9)
    assert f"{after.p1db_elem_dbm:.2f} dBm" in page.p1db_label.text()
    # A drag (several steps) is one undo step.
    box.setValue(310.0)
    box.setValue(320.0)
    assert c.undo_stack.count() == 1
    c.undo_stack.undo()
    assert c.study.bands[0].link.distance_m == 150.0
    assert page.editors["distance_m"].value() == 150.0
    assert page.budget.required_eirp_dbm == pytest.approx(before.required_eirp_dbm)


def test_adopt_sets_target_and_undo_restores(page):
    c = page._c
    old = c.study.bands[0].targets.p1db_dbm
    derived = page.budget.p1db_elem_dbm
    assert abs(derived - old) > 0.01
    page.adopt_button.click()
    assert c.study.bands[0].targets.p1db_dbm == pytest.approx(derived, abs=0.005)
    c.undo_stack.undo()
    assert c.study.bands[0].targets.p1db_dbm == old


def test_band_selector_and_polarisation(page):
    c = page._c
    page.band_combo.setCurrentIndex(1)
    assert page.budget.f_hz == pytest.approx(40e9)  # n260 top edge
    combo = page.editors["polarization"]
    combo.setCurrentIndex(combo.findData("horizontal"))
    assert c.study.bands[1].link.polarization == "horizontal"
    assert c.study.bands[0].link.polarization == "vertical"
    # P.838-3: horizontal rain attenuation exceeds vertical at these frequencies.
    assert page.budget.item("Rain specific attenuation").value > 0


def test_selecting_line_requests_derivation(page, qtbot):
    with qtbot.waitSignal(page._c.derivation_requested) as blocker:
        page.select_line("Required EIRP")
    d = blocker.args[0]
    assert d.result == pytest.approx(page.budget.required_eirp_dbm) and d.unit == "dBm"


def test_caution_and_units_shown(page):
    assert page.caution.text() == CAUTION_TEXT and "regulation" in CAUTION_TEXT
    assert page.caution.isVisible()
    assert "dBm" in page.eirp_label.text() and " m</b>" in page.eirp_label.text()
    for name, editor in page.editors.items():
        if name not in ("polarization", "n_elements"):
            assert editor.suffix().strip(), name


def test_page_in_main_window(make_window):
    from app.main_window import page_classes

    if LinkLedgerPage not in page_classes():
        pytest.skip("Link Ledger page not wired into page_classes() yet")
    w = make_window()
    page = w.select_page("Link Ledger")
    page.select_line("P1dB per element")
    assert w.derivation.current.title.startswith("P1dB per element")
