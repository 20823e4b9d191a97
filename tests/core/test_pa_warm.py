"""The warm-started sweep solve (core.pa_warm): its shortcuts are used, exact, and well founded.

The reference is the solver's cold path (:func:`core.pa_design.solve`, every sample searched
from its proven lower bound), itself checked against evaluate() and the full grid in
test_estimate*.py. The shortcuts only change how the least feasible periphery is found, so
every result must agree within the search tolerance (1e-10 relative): here 1e-9.
"""

import dataclasses
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from core import pa_warm, rf, sweep
from core.architectures import build_plan
from core.estimate import sweep_p1db_per_band
from core.link import array_sweep
from core.link_plan import _worst_case_hz, link_inputs
from core.pa_design import prune_points, solve
from core.pa_model import chebyshev_scale
from core.process import DEFAULT_CARDS
from core.resources import demo_path
from core.study import load_study
from core.study.model import BandSpec, Candidate, CandidateKind, Study, Targets

FIELDS = ("w_out_mm", "dc_out_w", "dc_drivers_w")
DB_FIELDS = ("worst_p1db_dbm", "worst_gain_db")
#: 1e-9 relative in power is 10·log10(1 + 1e-9) = 4.3e-9 dB.
DB_TOL = 10.0 * np.log10(1.0 + 1e-9)
#: Examples of the random-study property (raise it locally to hunt for a counterexample).
RANDOM_STUDIES = 40
DISCRETE = ("n_cells", "n_sections", "n_stages", "cells_ok", "gain_found", "levels")


def _part(plan, separate=False):
    """The separate (or the wideband/switched) rows of a plan on pruned points, as
    core.sweep solves them, and the band of each row."""
    kinds = np.array([c.kind for c in plan.candidates], dtype=object)[plan.row_cand]
    rows = np.flatnonzero((kinds == CandidateKind.SEPARATE) == separate)
    b, _, _ = sweep._subset(plan, rows)
    return prune_points(b), plan.row_band[rows]


def _grouped(name):
    """A demo's wideband/switched rows (pruned), its row bands and array-sizing requests."""
    study = load_study(demo_path(name))
    safe, band = _part(build_plan(study))
    n = np.arange(1, 1025)
    x = np.stack(
        [
            array_sweep(_worst_case_hz(bd, link_inputs(bd)), link_inputs(bd), n)[
                "p1db_elem_dbm"
            ].to_numpy()
            for bd in study.bands
        ]
    )
    return safe, band, x + study.estimator.p1db_margin_db


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
    # |Γ|m ∝ |r − 1| is ill-conditioned near r = 1, and PAE near 0 where the gain nears 1 dB:
    # both compared absolutely.
    np.testing.assert_allclose(warm.gamma_max, cold.gamma_max, rtol=0.0, atol=1e-9)
    np.testing.assert_allclose(warm.worst_pae, cold.worst_pae, rtol=0.0, atol=1e-9)


@pytest.fixture(scope="module", params=["harbour-small-cell", "rural-fwa-terminal"])
def demo(request):
    return _grouped(request.param)


class _Count:
    """Samples handed to each way of settling them (wraps the module's own functions)."""

    def __init__(self, monkeypatch):
        self.reduced = self.full = self.searched = 0
        reduced, full, search = pa_warm._reduced_pass, pa_warm._pass, pa_warm._least_feasible

        def count_reduced(b, c, w, req_db, idx):
            self.reduced += w.shape[0]
            return reduced(b, c, w, req_db, idx)

        def count_full(b, c, w, req_db):
            self.full += w.shape[0]
            return full(b, c, w, req_db)

        def count_search(b, c, p, w):
            self.searched += p.shape[0]
            return search(b, c, p, w)

        monkeypatch.setattr(pa_warm, "_reduced_pass", count_reduced)
        monkeypatch.setattr(pa_warm, "_pass", count_full)
        monkeypatch.setattr(pa_warm, "_least_feasible", count_search)


def test_full_array_sweep_matches_cold_and_takes_the_short_paths(demo, monkeypatch):
    safe, band, x = demo
    p_req = _requests(band, x)
    cold = solve(safe, p_req)
    count = _Count(monkeypatch)
    warm = pa_warm.solve_warm(safe, p_req, 16)
    _assert_same(warm, cold)
    k = p_req.shape[0]
    # The point of the module: most samples settled by the one-point-per-segment pass, few
    # searched (the anchors, about 10 % here, and next to none beyond them).
    assert count.reduced > 0.7 * k
    assert count.searched < 0.15 * k


def test_targets_past_the_cell_limit_match_cold(demo, monkeypatch):
    # Falling targets from 48 to 30 dBm: most designs need more unit cells than the card
    # combines, where the periphery is capped and W* ∝ p (pa_warm._brackets, "capped").
    safe, band, _ = demo
    x = np.linspace(48.0, 30.0, 200)
    p_req = _requests(band, np.stack([x] * (band.max() + 1)))
    cold = solve(safe, p_req)
    assert (~cold.cells_ok).mean() > 0.3
    count = _Count(monkeypatch)
    _assert_same(pa_warm.solve_warm(safe, p_req, 16), cold)
    assert count.searched < 0.5 * p_req.shape[0]


@pytest.fixture(scope="module")
def harbour():
    return _grouped("harbour-small-cell")


@settings(max_examples=10, deadline=None)
@given(st.lists(st.floats(-5.0, 45.0), min_size=40, max_size=120), st.booleans())
def test_any_targets_match_cold(harbour, targets, ordered):
    # Unsorted and repeated targets too: a shortcut only applies where the anchors bracket.
    safe, band, _ = harbour
    t = np.sort(targets)[::-1] if ordered else np.asarray(targets)
    p_req = _requests(band, np.stack([t, t[::-1]]))
    _assert_same(pa_warm.solve_warm(safe, p_req, 8), solve(safe, p_req))


def test_sweep_equals_cold_end_to_end(monkeypatch):
    # Through sweep_p1db_per_band, separate and grouped parts, with and without warm starts.
    study = load_study(demo_path("harbour-small-cell"))
    _, _, x = _grouped("harbour-small-cell")
    x = x - study.estimator.p1db_margin_db
    warm = sweep_p1db_per_band(study, x)
    monkeypatch.setattr(sweep, "_ANCHOR_STEP", 10**9)  # every sample searched cold
    cold = sweep_p1db_per_band(study, x)
    np.testing.assert_array_equal(warm["feasible"], cold["feasible"])
    np.testing.assert_array_equal(warm["reason"], cold["reason"])
    for name in ("dc_power_w", "die_area_mm2"):
        np.testing.assert_allclose(warm[name], cold[name], rtol=1e-9, atol=0.0, err_msg=name)


@settings(max_examples=200, deadline=None)
@given(
    r=st.floats(1e-3, 1e3),
    h=st.floats(0.0, math.sqrt(2.0)),
)
def test_point_loss_rises_slower_than_the_periphery(r, h):
    # Module notes, step 2: with v = a(r)·h, a = |r − 1|/(2√r) and r ∝ W,
    # d ln(1 + v²)/d ln W = h²(r² − 1)/(4r(1 + v²)) < 1 for h ≤ √2, so W·10^(−loss/10)
    # rises with W. Checked against a central difference of the definition (calculus).
    def f(x):
        v = float(chebyshev_scale(x)) * h
        return math.log1p(v * v)

    v = float(chebyshev_scale(r)) * h
    slope = h * h * (r * r - 1.0) / (4.0 * r * (1.0 + v * v))
    assert slope < 1.0
    if abs(r - 1.0) > 1e-3:
        d = 1e-6
        numeric = (f(r * math.exp(d)) - f(r * math.exp(-d))) / (2 * d)
        assert slope == pytest.approx(numeric, rel=1e-5, abs=1e-9)


def test_worst_figures_are_at_the_point_of_largest_loss():
    # core.pa_design._finish takes worst gain, P1dB and PAE from the row's largest loss; on
    # the full grid the per-point curves give them directly (minimum over the band).
    study = load_study(demo_path("harbour-small-cell"))
    plan = build_plan(study)
    sol = solve(plan.batch, np.asarray(rf.dbm_to_w([[26.0] * plan.batch.n_rows])))
    for field, curve in (
        ("worst_gain_db", "gain_db"),
        ("worst_p1db_dbm", "p1db_dbm"),
        ("worst_pae", "pae"),
    ):
        np.testing.assert_allclose(
            getattr(sol, field), sol.curves[curve].min(axis=-1), rtol=1e-12, err_msg=field
        )
    # and the equal-ripple maximum |Γ| of each row's network at its ratio and section count,
    # against core.rf's closed form (Pozar §5.7, exact insertion-loss form).
    n_sec = sol.n_sections[:, plan.batch.group]
    np.testing.assert_allclose(
        sol.gamma_max,
        rf.chebyshev_max_reflection(sol.ratio, n_sec, plan.batch.bw_frac[None, :]),
        rtol=1e-12,
    )


@settings(max_examples=RANDOM_STUDIES, deadline=None)
@given(
    card=st.sampled_from(tuple(DEFAULT_CARDS)),
    f0=st.lists(st.floats(22.0, 44.0), min_size=2, max_size=3, unique=True),
    bw=st.floats(0.02, 0.12),
    gain=st.floats(10.0, 30.0),
    top=st.floats(20.0, 45.0),
)
def test_random_studies_sweep_like_the_cold_search(card, f0, bw, gain, top):
    # Any process, two or three bands, every architecture, falling targets from `top` dBm
    # over 45 dB (array sizing's shape): the shortcuts must not change a single result.
    study = _random_study(card, f0, bw, gain)
    plan = build_plan(study)
    x = np.stack([top - 20.0 * np.log10(np.arange(1, 301, dtype=float))] * len(study.bands))
    for separate in (True, False):
        safe, band = _part(plan, separate)
        if separate:  # one design per row: every sample sizes every row (as core.sweep._part)
            p_req = np.asarray(rf.dbm_to_w(x))[band].T
        else:
            p_req = _requests(band, x)
        _assert_same(pa_warm.solve_warm(safe, p_req, 16), solve(safe, p_req))


def _random_study(card, f0, bw, gain, **changes):
    """Bands of fractional width ``bw`` at centres ``f0`` (GHz), every architecture on
    ``card``; ``changes`` replace further study fields (estimator, process_cards)."""
    bands = tuple(
        BandSpec(
            name=f"b{i}",
            f_low_ghz=f * (1 - bw / 2),
            f_high_ghz=f * (1 + bw / 2),
            targets=Targets(gain_db=gain, p1db_dbm=25.0, pae_pct=20.0),
        )
        for i, f in enumerate(sorted(f0))
    )
    cands = tuple(Candidate(name=k.value, kind=k, process=card) for k in CandidateKind)
    return dataclasses.replace(Study.new(), bands=bands, candidates=cands, **changes)


def _no_feasible_below(b, p_req, sol, n_scan=300):
    """Every design's periphery is the least feasible one: none on a scan below it is."""
    from core.pa_chain import _pass, _req_db_of, _required, prepare
    from core.pa_design import initial_periphery

    c = prepare(b)
    w0 = initial_periphery(b, p_req, c)
    k_n, g_n = sol.w_out_mm.shape
    found = np.asarray(sol.w_out_mm, dtype=float)
    for g in range(g_n):
        frac = np.linspace(0.0, 1.0, n_scan, endpoint=False)
        w = w0[:, g : g + 1] * (found[:, g : g + 1] / w0[:, g : g + 1]) ** frac  # (K, n)
        w_all = np.repeat(found[:, None, :], n_scan, axis=1)
        w_all[:, :, g] = w
        w_all = w_all.reshape(-1, g_n)
        p_all = np.repeat(p_req, n_scan, axis=0)
        req = _required(b, _pass(b, c, w_all, _req_db_of(p_all)), p_all)[:, g]
        req = req.reshape(k_n, n_scan)
        ok = sol.cells_ok[:, g]
        feasible = req <= w * (1.0 - 1e-9)
        assert not (feasible & ok[:, None]).any(), f"design {g}: feasible below the result"


def test_a_narrow_feasible_window_below_a_split_step_is_found():
    # Found by test_random_studies_sweep_like_the_cold_search: this wideband SOI design can
    # serve 22 GHz at W ≈ 0.1977 mm with one unit cell, feasible only up to the step to two
    # cells at ≈ 0.199 mm; a search that steps over that window settles at ≈ 0.224 mm.
    study = _random_study("Stacked-FET SOI CMOS 45 nm", [22.0, 43.375], 0.0859375, 10.0)
    safe, band = _part(build_plan(study))
    x = 43.3125 - 20.0 * np.log10(np.arange(1, 301, dtype=float))
    p_req = _requests(band, np.stack([x, x]))[21:22]
    sol = solve(safe, p_req)
    assert sol.w_out_mm[0, 0] == pytest.approx(0.197677, rel=1e-5)
    _no_feasible_below(safe, p_req, sol)


@settings(max_examples=RANDOM_STUDIES, deadline=None)
@given(
    card=st.sampled_from(tuple(DEFAULT_CARDS)),
    f0=st.lists(st.floats(22.0, 44.0), min_size=2, max_size=3, unique=True),
    bw=st.floats(0.02, 0.12),
    gain=st.floats(10.0, 30.0),
    targets=st.lists(st.floats(0.0, 40.0), min_size=1, max_size=6),
)
def test_evaluated_peripheries_are_the_least_feasible(card, f0, bw, gain, targets):
    # The definition of the periphery (core.pa_design.solve): the smallest W whose design
    # reaches every request. Checked by brute force, a 300-point scan below each result.
    study = _random_study(card, f0, bw, gain)
    b = build_plan(study).batch
    p_req = np.asarray(rf.dbm_to_w(np.asarray(targets)))[:, None] * np.ones(b.n_rows)
    _no_feasible_below(prune_points(b), p_req, solve(prune_points(b), p_req))


def test_a_slowly_growing_search_ends_feasible_or_flagged():
    # Found by an independent review: at a large ratio the plain step W ← W_req(W) crawls
    # (slope ≈ 0.93 in log W) and the cell count changes on every pass, so the secant was
    # never taken; the search hit its pass cap and returned an infeasible W with the cell
    # limit met. Whatever the path, the result must reach the request or say why not.
    from core.pa_chain import _pass, _req_db_of, _required, prepare

    soi = "Stacked-FET SOI CMOS 45 nm"
    cards = tuple(
        dataclasses.replace(c, max_cells=256, cell_width_mm=1.655570921053293)
        if c.name == soi
        else c
        for c in DEFAULT_CARDS.values()
    )
    est = dataclasses.replace(
        Study.new().estimator, max_stages=3, max_sections=1, drive_ratio=4.0530021832195295
    )
    study = _random_study(
        soi,
        [22.296, 69.307, 74.39, 84.309],
        0.026091868449990188,
        28.904313565571954,
        process_cards=cards,
        estimator=est,
    )
    safe, band = _part(build_plan(study))
    p_req = np.where(band == 1, float(rf.dbm_to_w(20.63)), 0.0)[None, :]
    sol = solve(safe, p_req)
    w = np.asarray(sol.w_out_mm)
    req = _required(safe, _pass(safe, prepare(safe), w, _req_db_of(p_req)), p_req)
    reached = req <= w * (1.0 + 1e-9)
    assert (reached | ~sol.cells_ok).all()
    assert sol.passes < 40
