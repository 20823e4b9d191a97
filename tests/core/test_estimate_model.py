"""PA estimator internals against their sources, exact pruning, and the P1dB sweep."""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import constants

from core import rf
from core.architectures import build_plan
from core.estimate import evaluate, sweep_p1db
from core.pa_design import prune_points, solve
from core.pa_layout import quarter_wave_mm
from core.pa_model import bode_fano_headroom_db, chebyshev_scale, drain_efficiency
from core.pa_points import Points, prune
from core.study.model import BandSpec, Candidate, CandidateKind, Study, Targets

GAAS = "GaAs pHEMT 0.15 µm"
SIGE = "SiGe BiCMOS HBT 0.13 µm"


def band(name, lo, hi, *, gain=20.0, p1db=27.0, pae=20.0):
    return BandSpec(
        name=name,
        f_low_ghz=lo,
        f_high_ghz=hi,
        targets=Targets(gain_db=gain, p1db_dbm=p1db, pae_pct=pae),
    )


BANDS = (band("n257", 26.5, 29.5), band("n260", 37.0, 40.0))


def study(bands=BANDS, kinds=tuple(CandidateKind), process=GAAS, **cand) -> Study:
    cands = tuple(Candidate(name=k.value, kind=k, process=process, **cand) for k in kinds)
    return dataclasses.replace(Study.new(), bands=tuple(bands), candidates=cands)


# --- closed-form helpers --------------------------------------------------------------------


@settings(max_examples=100, deadline=None)
@given(
    ratio=st.floats(0.02, 50.0),
    n=st.integers(1, 5),
    bw=st.floats(0.01, 1.5),
    t=st.floats(0.0, 1.0),
)
def test_chebyshev_rescaling_equals_rf(ratio, n, bw, t):
    # Exact equal-ripple response: |Γ|² = v²/(1 + v²), v = a(r)·h_N (Pozar §5.7/§8.3 insertion-
    # loss method); the solver rescales h_N (rf's ln form at R = e²) by a(r).
    f0 = 30e9
    f = f0 * (1 - bw / 2 + bw * t)
    h = rf.chebyshev_reflection(f, f0, math.e**2, n, bw, method="pozar_ln")
    v = chebyshev_scale(ratio) * h
    assert v / math.sqrt(1 + v * v) == pytest.approx(
        rf.chebyshev_reflection(f, f0, ratio, n, bw), rel=1e-9, abs=1e-15
    )


def test_chebyshev_scale_check_values():
    # check-values §10: R = 5, N = 2, BW = 42.225 % → Γm = 0.05 (exact equiripple form).
    h_edge = rf.chebyshev_reflection(
        30e9 * (1 - 0.42225 / 2), 30e9, math.e**2, 2, 0.42225, method="pozar_ln"
    )
    v = chebyshev_scale(5.0) * h_edge
    assert v / math.sqrt(1 + v * v) == pytest.approx(0.05, abs=1e-5)
    assert chebyshev_scale(4.0) == 0.75  # |4 − 1|/(2·√4)


def test_drain_efficiency_rule():
    # Rule of thumb (common practice): tuned value while B ≤ B_h, toward untuned as B grows.
    b = np.array([0.05, 0.15, 0.30, 0.60, 100.0])
    eta = drain_efficiency(0.40, 0.30, 0.15, b)
    assert eta[:2] == pytest.approx([0.40, 0.40])
    assert eta[2] == pytest.approx(0.35) and eta[3] == pytest.approx(0.325)
    assert eta[4] == pytest.approx(0.30, abs=1e-3)
    assert np.all(np.diff(eta) <= 0)


def test_quarter_wave_matches_scipy():
    # λg/4 = c/(4·f0·√εeff) (Pozar §3.8, guided wavelength; c from scipy.constants).
    assert quarter_wave_mm(28e9, 8.5) == pytest.approx(
        1e3 * constants.c / (4 * 28e9 * math.sqrt(8.5)), rel=1e-15
    )


def test_bode_fano_headroom_is_finite_for_an_underflowed_bound():
    # exp(−1/(2·Δf·R·C)) underflows to 0 for very narrow bands; the headroom stays finite.
    assert np.isfinite(bode_fano_headroom_db(0.05, 0.0))
    assert bode_fano_headroom_db(0.05, 0.005) == pytest.approx(20.0)


# --- exact pruning ---------------------------------------------------------------------------


@settings(max_examples=60, deadline=None)
@given(
    alpha=st.floats(0.0, 20.0),
    beta=st.floats(0.0, 20.0),
    a=st.floats(0.0, 30.0),
    c=st.floats(0.0, 1.0),
    kind=st.sampled_from(list(CandidateKind)),
)
def test_pruned_points_keep_every_worst_case(alpha, beta, a, c, kind):
    # Any loss of the form α·L_p + β·L_sw + max(0, L_sec − c) + 10·log10(1 + a²h²), for any
    # scale a (|Γ| up to 0.999 here): its maximum over the band is the same on the pruned
    # points as on the full grid.
    plan = build_plan(study(kinds=(kind,)))
    b = plan.batch
    from core.pa_chain import _constants

    full = _constants(b)
    pts = prune(b.points, full["l_p"], full["l_sw"], full["h"])
    pruned = _constants(b.with_points(pts))

    def worst(cst, p: Points):
        scale = a / max(cst["h"].max(), 1e-300)
        val = (
            alpha * cst["l_p"]
            + beta * cst["l_sw"]
            + np.maximum(0.0, cst["l_sec"] - c)
            + 10 * np.log10(1 + (scale * cst["h"]) ** 2)
        )
        return p.seg_max(val[None, :])[0]

    assert worst(pruned, pts) == pytest.approx(worst(full, b.points), rel=1e-12, abs=1e-15)
    assert pts.n_points < b.points.n_points


@pytest.mark.parametrize("process", [GAAS, SIGE, "GaN-on-SiC HEMT 0.15 µm"])
def test_pruned_solve_equals_full_grid(process):
    plan = build_plan(study(process=process))
    b = plan.batch
    p = np.asarray(rf.dbm_to_w(np.linspace(5.0, 38.0, 40)))[:, None] * np.ones(b.n_rows)
    full = solve(b, p)
    pb = prune_points(b)
    part = solve(pb, p)
    assert pb.points.n_points < b.points.n_points
    for name in (
        "w_out_mm",
        "n_sections",
        "n_stages",
        "n_cells",
        "worst_gain_db",
        "worst_p1db_dbm",
        "worst_pae",
        "dc_out_w",
        "dc_drivers_w",
    ):
        x, y = getattr(full, name), getattr(part, name)
        np.testing.assert_allclose(y, x, rtol=1e-9, atol=1e-12, err_msg=name)


def test_solve_rejects_bad_requests():
    b = build_plan(study()).batch
    with pytest.raises(ValueError, match="p_req_w"):
        solve(b, np.ones((1, b.n_rows + 1)))
    with pytest.raises(ValueError, match="p_req_w"):
        solve(b, -np.ones((1, b.n_rows)))


# --- switch sizing and load line against their sources -------------------------------------


def test_switch_sizing_follows_the_derivation():
    # Quarter-wave transformer Z = √(Ropt·50) for N = 1 (Pozar §5.4); its lumped shunt C has
    # reactance Z at f0; optimum Coff = C_hi/(κ − 1) (core.rf.switched_element_q derivation);
    # W = Coff/(Coff/W), Ron = (Ron·W)/W.
    card = Study.new().card(GAAS)
    ev = evaluate(study(kinds=(CandidateKind.SWITCHED,)))
    row = ev.design.set_index("design").loc["n257"]
    assert row.sections == 1
    ropt = 2 * (card.vdd_v - card.v_knee_v) / card.i_max_a_per_mm / row.w_out_mm  # Cripps
    z = math.sqrt(ropt * 50.0)
    c_hi = 1 / (2 * math.pi * 28e9 * z)
    kappa = 38.5 / 28.0
    assert row.switch_coff_ff == pytest.approx(c_hi / (kappa - 1) * 1e15, rel=1e-9)
    assert row.switch_width_mm == pytest.approx(row.switch_coff_ff / card.coff_per_w_ff_per_mm)
    assert row.switch_ron_ohm == pytest.approx(card.ron_w_ohm_mm / row.switch_width_mm)
    # Off-state swing (Vdd − Vk)·√(Z/Ropt)·(κ − 1)/κ.
    assert row.switch_v_off_v == pytest.approx(4.0 * math.sqrt(z / ropt) * (kappa - 1) / kappa)


def test_device_p1db_is_the_cripps_load_line():
    # Cripps ch. 2: P1dB' = (Vdd − Vk)·Imax'/4 − compression, 0.55 W/mm − 1 dB for GaAs.
    ev = evaluate(study(kinds=(CandidateKind.SEPARATE,)))
    p1 = 0.55 * 10 ** (-0.1)
    expect = 10 * np.log10(p1 * ev.design["w_out_mm"] * 1e3)
    np.testing.assert_allclose(ev.design["p1db_device_dbm"], expect, rtol=1e-12)


# --- P1dB sweep --------------------------------------------------------------------------------

X = np.linspace(0.0, 45.0, 1024)


@pytest.fixture(scope="module")
def sweep():
    return sweep_p1db(study(), X)


def test_sweep_shape_and_columns(sweep):
    assert list(sweep.columns) == [
        "candidate",
        "band",
        "p1db_target_dbm",
        "feasible",
        "dc_power_w",
        "die_area_mm2",
        "reason",
    ]
    assert len(sweep) == 3 * 2 * 1024
    assert np.isfinite(sweep[["dc_power_w", "die_area_mm2"]].to_numpy()).all()
    assert (sweep.loc[sweep.feasible, "reason"] == "").all()
    assert (sweep.loc[~sweep.feasible, "reason"] != "").all()


def test_sweep_dc_grows_with_target_and_hits_the_cell_limit(sweep):
    # Above ~10 dBm the GaAs periphery makes Ropt < 50 Ω (r > 1) and every loss grows with W,
    # so the DC power can only grow with the target. (Far below, Ropt ≫ 50 Ω and a bigger
    # device is easier to match, so a smaller design can cost more DC.)
    for (_, _), g in sweep.groupby(["candidate", "band"]):
        dc = g.loc[g.p1db_target_dbm >= 10.0, "dc_power_w"].to_numpy()
        assert np.all(np.diff(dc) >= -1e-9)
        # 45 dBm from 16 GaAs cells is out of reach; 20 dBm is not.
        assert not g["feasible"].iloc[-1] and g["feasible"].iloc[455]
        assert "unit cells" in g["reason"].iloc[-1]


@pytest.mark.parametrize("kind", list(CandidateKind))
def test_sweep_matches_evaluate_for_one_band(kind):
    s = study(bands=(band("n257", 26.5, 29.5, p1db=27.0),), kinds=(kind,))
    ev = evaluate(s)
    sw = sweep_p1db(s, np.array([20.0, 27.0, 33.0]))
    row = sw[sw.p1db_target_dbm == 27.0].iloc[0]
    assert row.dc_power_w == pytest.approx(ev.summary["dc_power_w"].iloc[0], rel=1e-9)
    assert row.die_area_mm2 == pytest.approx(ev.summary["die_area_mm2"].iloc[0], rel=1e-9)


def test_sweep_shared_designs_are_sized_per_band():
    # A wideband or switched design serving two bands at the same target needs the larger
    # of its two per-band sizings (periphery monotone in the target).
    s = study(kinds=(CandidateKind.WIDEBAND, CandidateKind.SWITCHED))
    ev = evaluate(s)
    sw = sweep_p1db(s, np.array([27.0]))
    for name, g in sw.groupby("candidate"):
        dc = ev.summary.set_index("candidate").loc[name, "dc_power_w"]
        assert g["dc_power_w"].max() == pytest.approx(dc, rel=1e-7)


def test_sweep_separate_rows_equal_evaluate_per_band():
    s = study(kinds=(CandidateKind.SEPARATE,))
    ev = evaluate(s)
    sw = sweep_p1db(s, np.array([27.0]))
    dc = ev.design.set_index("design")["dc_power_w"]
    area = ev.design.set_index("design")["area_total_mm2"]
    for _, row in sw.iterrows():
        assert row.dc_power_w == pytest.approx(dc[row.band], rel=1e-9)
        assert row.die_area_mm2 == pytest.approx(area[row.band], rel=1e-9)


def test_sweep_rejects_bad_targets():
    with pytest.raises(ValueError, match="p1db_dbm"):
        sweep_p1db(study(), np.array([[20.0]]))
    with pytest.raises(ValueError, match="p1db_dbm"):
        sweep_p1db(study(), np.array([20.0, np.nan]))


def test_sweep_without_enabled_candidates_is_empty():
    s = study()
    s = dataclasses.replace(
        s, candidates=tuple(dataclasses.replace(c, enabled=False) for c in s.candidates)
    )
    out = sweep_p1db(s, X)
    assert isinstance(out, pd.DataFrame) and out.empty and "reason" in out.columns


@pytest.mark.parametrize("process", [GAAS, SIGE, "GaN-on-SiC HEMT 0.15 µm"])
@pytest.mark.parametrize("p1db", [12.0, 20.0, 26.0])
def test_periphery_is_the_least_that_meets_the_request(process, p1db):
    # DESIGN.md §4 Sizing: W_out is chosen so the worst in-band P1dB meets target + margin —
    # the smallest such W, not an over-design: the design's limiting band sits on it exactly,
    # also for small GaN devices where Ropt > 50 Ω and the match improves as W grows.
    s = study(
        bands=(band("n257", 26.5, 29.5, p1db=p1db), band("n260", 37.0, 40.0, p1db=p1db)),
        process=process,
    )
    ev = evaluate(s)
    sc = ev.scorecard[ev.scorecard.metric == "p1db"]
    for name, g in sc.groupby("candidate"):
        if name == "separate":
            assert g["estimate"].to_numpy() == pytest.approx(np.full(2, p1db + 0.5), abs=1e-8)
        else:
            assert g["estimate"].min() == pytest.approx(p1db + 0.5, abs=1e-8)


def test_sweep_equals_one_solve_per_target_on_the_full_grid():
    # The vectorised sweep (pruned points, ln h hull for large mismatch, one solve per part)
    # must reproduce a straightforward full-grid solve of each target on its own, also far
    # from the match (−12 dBm: Ropt ≫ 50 Ω; 48 dBm: the cell limit), where rule 3 in h is not
    # exact. Reference: the same model chain, unpruned (DESIGN.md §4).
    from core.sweep import _subset

    s = study(process=SIGE)
    plan = build_plan(s)
    x = np.array([-12.0, -3.0, 4.0, 11.0, 19.0, 27.0, 36.0, 48.0])
    got = sweep_p1db(s, x)
    for r in range(plan.n_rows):
        cand = plan.candidates[plan.row_cand[r]]
        rows = np.flatnonzero(plan.row_cand == plan.row_cand[r])
        b, _, _ = _subset(plan, rows)
        for xt in x:
            p = np.zeros((1, rows.size))
            sized = plan.row_band[rows] == plan.row_band[r]
            if cand.kind == CandidateKind.SEPARATE:  # one design per row: every row sized
                sized[:] = True
            p[0, sized] = rf.dbm_to_w(xt + 0.5)
            ref = solve(b, p)  # full grid, one target
            k = int(np.flatnonzero(rows == r)[0])
            dc = ref.dc_out_w[0, k] + ref.dc_drivers_w[0, k]
            row = got[
                (got.candidate == cand.name)
                & (got.band == plan.bands[plan.row_band[r]].name)
                & (got.p1db_target_dbm == xt)
            ].iloc[0]
            assert row.dc_power_w == pytest.approx(dc, rel=1e-9), (cand.name, r, xt)


@settings(max_examples=60, deadline=None)
@given(
    st.lists(
        st.tuples(st.integers(0, 4), st.integers(0, 4)), min_size=1, max_size=30
    )  # small integers: many ties and duplicates
)
def test_two_coordinate_pareto_equals_pairwise_dominance(pts):
    # Rule 1 of core.pa_points.prune on rows without switch loss: a point is dropped when
    # another is ≥ in both coordinates and > in one, or identical and earlier. Reference: the
    # definition applied pair by pair.
    from core.pa_points import _pareto_2d

    a = np.array([p[0] for p in pts], dtype=float)
    h = np.array([p[1] for p in pts], dtype=float)
    expect = np.ones(a.size, dtype=bool)
    for i in range(a.size):
        for j in range(a.size):
            if j == i or a[j] < a[i] or h[j] < h[i]:
                continue
            if a[j] > a[i] or h[j] > h[i] or j < i:
                expect[i] = False
    np.testing.assert_array_equal(_pareto_2d(a[None, :], h[None, :])[0], expect)
