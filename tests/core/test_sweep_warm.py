"""Tests of the warm-started P1dB sweep (core.sweep.solve_warm) against the cold solve.

The reference is the solver's own cold path (every sample searched from its proven lower
bound, :func:`core.pa_design.solve`), itself checked against evaluate() and a full-grid solve
in test_estimate*.py. Warm starts only move where the periphery search begins, so every
result must agree within the search tolerance (1e-10 relative, ``_W_RTOL``): here 1e-9.
"""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from core import rf, sweep
from core.architectures import build_plan
from core.estimate import sweep_p1db_per_band
from core.link import array_sweep
from core.link_plan import _worst_case_hz, link_inputs
from core.pa_design import prune_points, solve
from core.resources import demo_path
from core.study import load_study
from core.study.model import CandidateKind

FIELDS = ("w_out_mm", "dc_out_w", "dc_drivers_w", "worst_pae")
#: Levels in dB compare absolutely: 1e-9 relative in power is 10·log10(1 + 1e-9) = 4.3e-9 dB.
DB_FIELDS = ("worst_p1db_dbm", "worst_gain_db")
DB_TOL = 10.0 * np.log10(1.0 + 1e-9)
DISCRETE = ("n_cells", "n_sections", "n_stages", "cells_ok", "gain_found")


@pytest.fixture(scope="module")
def harbour():
    return load_study(demo_path("harbour-small-cell"))


@pytest.fixture(scope="module")
def grouped(harbour):
    """The demo's wideband/switched rows on points exact for every request, and its targets."""
    plan = build_plan(harbour)
    kinds = np.array([c.kind for c in plan.candidates], dtype=object)[plan.row_cand]
    rows = np.flatnonzero(kinds != CandidateKind.SEPARATE)
    b, _, _ = sweep._subset(plan, rows)
    safe = prune_points(b)
    # Array-sizing targets: N = 1…1024 elements per band (falling P1dB), as array_plan.
    n = np.arange(1, 1025)
    x = np.stack(
        [
            array_sweep(_worst_case_hz(band, link_inputs(band)), link_inputs(band), n)[
                "p1db_elem_dbm"
            ].to_numpy()
            for band in harbour.bands
        ]
    )
    return safe, plan.row_band[rows], x + harbour.estimator.p1db_margin_db


def _requests(band, x_dbm):
    """(band, target)-major samples, each sizing one band's rows (as core.sweep._part)."""
    n_b, n_t = x_dbm.shape
    p = np.asarray(rf.dbm_to_w(x_dbm))
    req = np.where(band[None, None, :] == np.arange(n_b)[:, None, None], p[:, :, None], 0.0)
    return req.reshape(n_b * n_t, band.size)


def _assert_same(warm, cold):
    for name in FIELDS:
        np.testing.assert_allclose(
            getattr(warm, name), getattr(cold, name), rtol=1e-9, atol=0.0, err_msg=name
        )
    for name in DB_FIELDS:
        np.testing.assert_allclose(
            getattr(warm, name), getattr(cold, name), rtol=0.0, atol=DB_TOL, err_msg=name
        )
    for name in DISCRETE:
        np.testing.assert_array_equal(getattr(warm, name), getattr(cold, name), err_msg=name)


def test_warm_matches_cold_on_array_targets(grouped):
    safe, band, x = grouped
    take = np.arange(0, x.shape[1], 3)  # a sample of the targets, still sorted
    p_req = _requests(band, x[:, take])
    warm = sweep.solve_warm(safe, p_req)
    cold = solve(safe, p_req)
    _assert_same(warm, cold)


@settings(max_examples=15, deadline=None)
@given(st.lists(st.floats(0.0, 45.0), min_size=40, max_size=80), st.booleans())
def test_warm_matches_cold_on_any_targets(grouped, targets, ordered):
    # Unsorted and repeated targets too: an anchor only seeds a sample whose request it bounds.
    safe, band, _ = grouped
    t = np.sort(targets)[::-1] if ordered else np.asarray(targets)
    p_req = _requests(band, np.stack([t, t[::-1]]))
    _assert_same(sweep.solve_warm(safe, p_req), solve(safe, p_req))


def test_sweep_warm_equals_cold_end_to_end(harbour, grouped, monkeypatch):
    _, _, x = grouped
    x = x - harbour.estimator.p1db_margin_db
    warm = sweep_p1db_per_band(harbour, x)
    monkeypatch.setattr(sweep, "_ANCHOR_STEP", 10**9)  # every sample solved cold
    cold = sweep_p1db_per_band(harbour, x)
    np.testing.assert_array_equal(warm["feasible"], cold["feasible"])
    np.testing.assert_array_equal(warm["reason"], cold["reason"])
    for name in ("dc_power_w", "die_area_mm2"):
        np.testing.assert_allclose(warm[name], cold[name], rtol=1e-9, atol=0.0, err_msg=name)
