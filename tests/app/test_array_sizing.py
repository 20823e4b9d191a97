"""GUI tests of the Array Sizing page (pytest-qt, offscreen)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from app.controller import StudyController
from app.pages.array_sizing import ArraySizingPage
from core.resources import demo_path
from core.study import load_study


@pytest.fixture
def page(qtbot):
    controller = StudyController(load_study(demo_path("harbour-small-cell")))
    p = ArraySizingPage(controller)
    qtbot.addWidget(p)
    p.resize(1200, 800)
    p.show()
    p.ensure_current()  # the sweep runs lazily when the page is shown
    return p


def test_curves_per_candidate_and_optimum_on_feasible_n(page):
    study = page._c.study
    names = [c.name for c in study.candidates]
    rows = page.band_plan
    assert set(rows["candidate"]) == set(names)
    for name in names:
        curve = page.items[(name, "dc")]
        x, _y = curve.getData()
        assert len(x) == 1024
        r = rows[rows["candidate"] == name]
        best = r[r["lowest_dc_power"]]
        assert len(best) <= 1
        if best.empty:
            assert not r["feasible"].any()
            continue
        assert bool(best["feasible"].iloc[0])
        n_opt = float(best["n_elements"].iloc[0])
        sx, _sy = page.items[(name, "opt")].getData()  # plotted in log10(N) coordinates
        assert list(10**sx) == pytest.approx([n_opt])
        # It is the minimum of the feasible DC powers.
        feasible_dc = r.loc[r["feasible"], "array_dc_power_w"]
        assert float(best["array_dc_power_w"].iloc[0]) == pytest.approx(feasible_dc.min())


def test_needed_p1db_falls_6db_per_doubling(page):
    rows = page.band_plan
    first = rows[rows["candidate"] == rows["candidate"].iloc[0]]
    p = first.set_index("n_elements")["p1db_elem_dbm"]
    # Uniform array, fixed EIRP: P_elem ∝ 1/N² → −20·log10 2 = −6.02 dB per doubling
    # (array theory, check-values.md §12).
    assert p[32] - p[64] == pytest.approx(20 * math.log10(2), abs=1e-9)


def test_items_are_reused_on_edit(page):
    c = page._c
    name = c.study.candidates[0].name
    curve = page.items[(name, "dc")]
    c.set_field(("bands", 0, "link", "distance_m"), 300.0, "distance")
    page.recompute()
    assert page.items[(name, "dc")] is curve
    x, _ = curve.getData()
    assert np.all(np.diff(x) > 0)


def test_cheapest_n_is_the_minimum_feasible_cost(page):
    rows = page.band_plan
    for name, r in rows.groupby("candidate"):
        cheap = r[r["cheapest"]]
        if r["feasible"].any():
            assert len(cheap) == 1
            ok = r.loc[r["feasible"], "array_pa_cost_usd"]
            assert float(cheap["array_pa_cost_usd"].iloc[0]) == pytest.approx(ok.min()), name


def test_band_selector_and_readout(page):
    page.band_combo.setCurrentIndex(1)
    assert set(page.band_plan["band"]) == {"n260"}
    text = page.readout_at(64)
    assert "N = 64" in text and "dBm" in text
