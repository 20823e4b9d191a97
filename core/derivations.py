"""Solved-study context and the derivation of every reported number (DESIGN.md §6).

:class:`SolvedStudy` holds one evaluation's arrays (the single sample of :func:`core.pa_design.
solve`) with the statuses and die tables derived from them; :func:`derivation_makers` returns,
for every scorecard key and the per-candidate die-area and DC-power keys, a function that
assembles the :class:`core.evaluation.Derivation` at the worst in-band frequency.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from functools import partial

import numpy as np
from numpy.typing import NDArray

from core import rf
from core.architectures import Plan
from core.evaluation import Derivation, DerivationKey, statuses
from core.pa_layout import quarter_wave_mm
from core.pa_model import BF_GAMMA_LIMIT, Solution
from core.study.model import CandidateKind, DieArrangement, Study

__all__ = ["SolvedStudy", "derivation_makers", "die_tables"]

F64 = NDArray[np.float64]
_AREA_PARTS = (
    "area_active_mm2",
    "area_networks_mm2",
    "area_switches_mm2",
    "area_control_mm2",
    "area_pads_mm2",
)
_LOAD_LINE = "Cripps, RF Power Amplifiers for Wireless Communications, 2nd ed., ch. 2"
_CHEB = "Pozar, Microwave Engineering, 4th ed., §5.7 (Chebyshev transformer), §2.3 (mismatch)"


@dataclass(frozen=True, slots=True, eq=False)
class SolvedStudy:
    """One evaluation's arrays: per row (R,), per design (G,), per point (R, F)."""

    study: Study
    plan: Plan
    cand_name: NDArray[np.object_]
    band_name: NDArray[np.object_]
    kind: NDArray[np.object_]
    dstarts: NDArray[np.int64]
    curves: dict[str, F64]
    gain_db: F64
    p1db_dbm: F64
    pae_pct: F64
    margin: F64
    status: NDArray[np.object_]
    worst_index: NDArray[np.int64]
    w_out_mm: F64
    n_cells: F64
    n_cells_needed: F64
    levels: F64
    n_sections: NDArray[np.int64]
    n_stages: NDArray[np.int64]
    cells_ok: NDArray[np.bool_]
    gain_found: NDArray[np.bool_]
    w_drivers_mm: F64
    p_dev_w: F64
    p_dev_dbm: F64
    dc_w: F64
    dc_out_w: F64
    dc_drivers_w: F64
    gamma_max: F64
    bf_gamma: F64
    bf_limited: NDArray[np.bool_]
    bf_infeasible: NDArray[np.bool_]
    headroom_db: F64
    interstage_db: F64
    interstage_sections: NDArray[np.int64]
    design_bw_ghz: F64
    switch: dict[str, F64]
    area: dict[str, F64]
    area_design: F64
    area_per_design: F64
    n_lines: F64

    @classmethod
    def from_solution(cls, study: Study, plan: Plan, sol: Solution, lay: dict) -> SolvedStudy:
        """Slice sample 0 of a solve and derive statuses (see :func:`core.estimate.evaluate`)."""
        b = plan.batch
        g = b.group
        names = np.array([c.name for c in plan.candidates], dtype=object)
        kinds = np.array([c.kind for c in plan.candidates], dtype=object)
        bands = np.array([bd.name for bd in plan.bands], dtype=object)
        assert sol.curves is not None  # evaluate solves on the uniform grid
        curves = {k: v[0] for k, v in sol.curves.items()}
        gain, p1db, pae = sol.worst_gain_db[0], sol.worst_p1db_dbm[0], 100.0 * sol.worst_pae[0]
        tgt = np.stack([plan.gain_target_db, plan.p1db_target_dbm, plan.pae_target_pct], 1)
        est = np.stack([gain, p1db, pae], axis=1)
        margin = est - tgt
        # Bode–Fano: the estimate already uses the bound where it is above the design ripple;
        # the request is infeasible only when the bound leaves the load unmatched (VSWR > 2).
        bf_limited = sol.bf_gamma > sol.gamma_max[0]
        bf_violated = sol.bf_gamma > BF_GAMMA_LIMIT
        infeasible = np.stack(
            [
                (~sol.gain_found[0][g] & (gain < plan.gain_target_db)) | bf_violated,
                (~sol.cells_ok[0][g] & (p1db < plan.p1db_target_dbm)) | bf_violated,
                bf_violated,
            ],
            axis=1,
        )
        tol = study.tolerance
        window = np.array([tol.marginal_db, tol.marginal_db, tol.marginal_pae_pts])
        worst = np.stack(
            [
                curves["gain_db"].argmin(axis=1),
                curves["p1db_dbm"].argmin(axis=1),
                curves["pae"].argmin(axis=1),
            ],
            axis=1,
        )
        area_design = lay["area_design_mm2"][0]
        shared = np.array(
            [
                c.kind == CandidateKind.SEPARATE and c.die_arrangement == DieArrangement.SHARED_DIE
                for c in plan.candidates
            ]
        )[plan.row_cand[b.starts]]
        per_design = np.where(
            shared, area_design, np.maximum(plan.min_die_mm2[b.starts], area_design)
        )
        switch_keys = (
            "switch_width_mm",
            "switch_ron_ohm",
            "switch_coff_ff",
            "switch_c_hi_ff",
            "switch_q",
            "switch_loss_db",
            "switch_v_off_v",
            "switch_stack",
            "switch_stack_interstage",
            "switch_total_width_mm",
            "n_switches",
        )
        return cls(
            study=study,
            plan=plan,
            cand_name=names[plan.row_cand],
            band_name=bands[plan.row_band],
            kind=kinds[plan.row_cand],
            dstarts=plan.dstarts,
            curves=curves,
            gain_db=gain,
            p1db_dbm=p1db,
            pae_pct=pae,
            margin=margin,
            status=statuses(margin, window[None, :], infeasible),
            worst_index=worst,
            w_out_mm=sol.w_out_mm[0],
            n_cells=sol.n_cells[0],
            n_cells_needed=sol.n_cells_needed[0],
            levels=sol.levels[0],
            n_sections=sol.n_sections[0],
            n_stages=sol.n_stages[0],
            cells_ok=sol.cells_ok[0],
            gain_found=sol.gain_found[0],
            w_drivers_mm=sol.w_drivers_mm[0],
            p_dev_w=sol.p_dev_w[0],
            p_dev_dbm=np.asarray(rf.w_to_dbm(sol.p_dev_w[0])),
            dc_w=sol.dc_out_w[0] + sol.dc_drivers_w[0],
            dc_out_w=sol.dc_out_w[0],
            dc_drivers_w=sol.dc_drivers_w[0],
            gamma_max=sol.gamma_max[0],
            bf_gamma=sol.bf_gamma,
            bf_limited=bf_limited,
            bf_infeasible=bf_violated,
            headroom_db=curves["headroom_db"],
            interstage_db=sol.interstage_db,
            interstage_sections=sol.interstage_sections,
            design_bw_ghz=(b.f_high_hz - b.f_low_hz) / 1e9,
            switch={k: lay[k][0] for k in switch_keys},
            area={k: lay[k][0] for k in _AREA_PARTS},
            area_design=area_design,
            area_per_design=per_design,
            n_lines=lay["n_lines"][0],
        )


def die_tables(ss: SolvedStudy) -> dict[str, NDArray]:
    """Per candidate: dies per radio channel, largest die, total die area, die width/height.

    Separate with one die per band: one die per band design, each max(A_min, A_design);
    separate on a shared die: one die max(A_min, Σ A_design); wideband and switched: one die.
    Width and height follow from the die aspect ratio: W = √(A·aspect), H = √(A/aspect).
    """
    p = ss.plan
    dg = p.row_cand[p.batch.starts]  # candidate of each design
    out: dict[str, list] = {
        k: []
        for k in (
            "n_dies",
            "die_area_mm2",
            "total_die_area_mm2",
            "die_width_mm",
            "die_height_mm",
            "dies",
        )
    }
    for ci, cand in enumerate(p.candidates):
        mine = np.flatnonzero(dg == ci)
        a_min = float(p.min_die_mm2[p.batch.starts[mine[0]]])
        aspect = float(p.aspect[p.batch.starts[mine[0]]])
        if cand.kind == CandidateKind.SEPARATE and cand.die_arrangement == (
            DieArrangement.DIE_PER_BAND
        ):
            dies = [max(a_min, float(ss.area_design[i])) for i in mine]
        else:
            dies = [max(a_min, float(ss.area_design[mine].sum()))]
        big = max(dies)
        out["n_dies"].append(len(dies))
        out["die_area_mm2"].append(big)
        out["total_die_area_mm2"].append(sum(dies))
        out["die_width_mm"].append(float(np.sqrt(big * aspect)))
        out["die_height_mm"].append(float(np.sqrt(big / aspect)))
        out["dies"].append(tuple(dies))
    return {k: (np.array(v) if k != "dies" else v) for k, v in out.items()}


def _ghz(f_hz: float) -> float:
    return float(f_hz) / 1e9


def _gain(ss: SolvedStudy, r: int) -> Derivation:
    p, b, c = ss.plan, ss.plan.batch, ss.curves
    i = int(ss.worst_index[r, 0])
    g = b.group[r]
    card = p.cards[p.row_cand[r]]
    n, n_sec, lev = int(ss.n_stages[g]), int(ss.n_sections[g]), float(ss.levels[g])
    l_sec, l_p = float(c["l_section_db"][r, i]), float(c["l_passive_db"][r, i])
    inputs = [
        ("fmax", card.fmax_ghz, "GHz"),
        ("f_top (design band)", _ghz(b.f_high_hz[r]), "GHz"),
        ("derating", card.stage_derating_db, "dB"),
        ("stages n", n, ""),
        ("sections N", n_sec, ""),
        ("interstage sections N_is", int(ss.interstage_sections[g]), ""),
        ("drive ratio", float(b.drive_ratio[r]), ""),
        ("split levels s", lev, ""),
        ("worst f", _ghz(c["f_hz"][r, i]), "GHz"),
        ("Q_ref", card.q_passive, ""),
        ("f_ref", card.q_ref_ghz, "GHz"),
        ("Q exponent", card.q_exponent, ""),
        ("|Γ| at f", float(c["gamma"][r, i]), ""),
    ]
    if b.kappa[r] > 1.0:
        inputs += [("κ", float(b.kappa[r]), ""), ("switch f_c", _ghz(b.f_c_hz[r]), "GHz")]
    steps = [
        ("G_st", float(b.stage_gain_db[r]), "dB"),
        ("L_is (worst in band)", float(ss.interstage_db[r]), "dB"),
        ("Q_u", float(c["q_u"][r, i]), ""),
        ("Q_sw", float(c["q_sw"][r, i]), ""),
        ("Q_eff", float(c["q_eff"][r, i]), ""),
        ("L_sec", l_sec, "dB"),
        ("N·L_sec", n_sec * l_sec, "dB"),
        ("ΔP_mm", float(c["mismatch_db"][r, i]), "dB"),
        ("L_p", l_p, "dB"),
        ("s·L_p", lev * l_p, "dB"),
    ]
    return Derivation(
        title=f"Worst in-band gain, {ss.cand_name[r]} in {ss.band_name[r]}",
        formula=(
            "G = n·(G_st − L_is) − N·L_sec − ΔP_mm − s·L_p;  G_st = 20·log10(fmax/f_top) − "
            "derating (flat across the design band);  L_is = worst in-band loss of one "
            "input/interstage Chebyshev network of N_is sections, ratio = drive ratio;  "
            "L_sec = 8.686·π/(4·Q_eff), 1/Q_eff = 1/Q_u + 1/Q_sw, Q_u = Q_ref·(f/f_ref)^e, "
            "Q_sw = (f_c/f)/(κ − 1);  ΔP_mm = −10·log10(1 − |Γ|²)"
        ),
        inputs=tuple(inputs),
        steps=tuple(steps),
        result=float(ss.gain_db[r]),
        unit="dB",
        source="DESIGN.md §4 Gain; stage gain rule of thumb (common practice); " + _CHEB,
    )


def _p1db(ss: SolvedStudy, r: int) -> Derivation:
    p, b, c = ss.plan, ss.plan.batch, ss.curves
    i = int(ss.worst_index[r, 1])
    g = b.group[r]
    card = p.cards[p.row_cand[r]]
    psat = (card.vdd_v - card.v_knee_v) * card.i_max_a_per_mm / 4.0
    n_sec = int(ss.n_sections[g])
    return Derivation(
        title=f"Worst in-band P1dB at the RF port, {ss.cand_name[r]} in {ss.band_name[r]}",
        formula=(
            "P1dB = 10·log10(P1dB'·W·1000) − s·L_p − N·L_sec − ΔP_mm − L_bs − ΔP_drv;  "
            "P1dB' = (Vdd − Vk)·Imax'/4 · 10^(−c/10);  ΔP_drv = max(0, −headroom)"
        ),
        inputs=(
            ("Vdd", card.vdd_v, "V"),
            ("Vk", card.v_knee_v, "V"),
            ("Imax'", card.i_max_a_per_mm, "A/mm"),
            ("compression c", card.compression_db, "dB"),
            ("W_out", float(ss.w_out_mm[g]), "mm"),
            ("unit cells", float(ss.n_cells[g]), ""),
            ("split levels s", float(ss.levels[g]), ""),
            ("sections N", n_sec, ""),
            ("worst f", _ghz(c["f_hz"][r, i]), "GHz"),
            ("|Γ| at f", float(c["gamma"][r, i]), ""),
        ),
        steps=(
            ("Psat'", psat, "W/mm"),
            ("P1dB'", float(b.p1db_w_per_mm[r]), "W/mm"),
            ("P_dev", float(ss.p_dev_dbm[r]), "dBm"),
            ("s·L_p", float(c["combiner_db"][r, i]), "dB"),
            ("N·L_sec", float(c["network_db"][r, i]), "dB"),
            ("ΔP_mm", float(c["mismatch_db"][r, i]), "dB"),
            ("L_bs", float(b.band_select_db[r]), "dB"),
            ("ΔP_drv", float(c["deficit_db"][r, i]), "dB"),
        ),
        result=float(ss.p1db_dbm[r]),
        unit="dBm",
        source=f"{_LOAD_LINE}; {_CHEB}; DESIGN.md §4 Sizing and power",
    )


def _pae(ss: SolvedStudy, r: int) -> Derivation:
    p, b, c = ss.plan, ss.plan.batch, ss.curves
    i = int(ss.worst_index[r, 2])
    card = p.cards[p.row_cand[r]]
    p_out = float(rf.dbm_to_w(c["p1db_dbm"][r, i]))
    gain = float(c["gain_db"][r, i])
    p_in = p_out / 10.0 ** ((gain - 1.0) / 10.0)
    return Derivation(
        title=f"Worst in-band PAE at P1dB, {ss.cand_name[r]} in {ss.band_name[r]}",
        formula=(
            "PAE = (P_out − P_in)/(P_DC,out + P_DC,drv);  P_in = P_out/10^((G − 1)/10);  "
            "P_DC,out = P_dev/η, η = η_u + (η_t − η_u)·min(1, B_h/B);  "
            "P_DC,drv = Vdd·bias·Imax'·ΣW_drv"
        ),
        inputs=(
            ("worst f", _ghz(c["f_hz"][r, i]), "GHz"),
            ("P_out (P1dB at f)", float(c["p1db_dbm"][r, i]), "dBm"),
            ("G at f", gain, "dB"),
            ("P_dev", float(ss.p_dev_w[r]), "W"),
            ("η_t", card.drain_eff_tuned_pct, "%"),
            ("η_u", card.drain_eff_untuned_pct, "%"),
            ("B_h", card.harmonic_bw_pct, "%"),
            ("B (design band)", 100.0 * float(b.bw_frac[r]), "%"),
            ("Vdd", card.vdd_v, "V"),
            ("bias", card.driver_bias_pct, "%"),
            ("Imax'", card.i_max_a_per_mm, "A/mm"),
            ("ΣW_drv", float(ss.w_drivers_mm[r]), "mm"),
        ),
        steps=(
            ("η", 100.0 * float(b.eta[r]), "%"),
            ("P_out", p_out, "W"),
            ("P_in", p_in, "W"),
            ("P_DC,out", float(ss.dc_out_w[r]), "W"),
            ("P_DC,drv", float(ss.dc_drivers_w[r]), "W"),
        ),
        result=float(ss.pae_pct[r]),
        unit="%",
        source=(
            "DESIGN.md §4 Efficiency; harmonic-control rule of thumb (common practice); "
            "continuous modes: Cripps, 2nd ed., ch. 7"
        ),
    )


def _cand_rows(ss: SolvedStudy, ci: int) -> NDArray[np.int64]:
    return np.flatnonzero(ss.plan.row_cand == ci)


def _die_area(ss: SolvedStudy, ci: int) -> Derivation:
    p = ss.plan
    b = p.batch
    tables = die_tables(ss)
    mine = np.flatnonzero(p.row_cand[b.starts] == ci)
    card = p.cards[ci]
    r0 = int(b.starts[mine[0]])
    steps: list[tuple[str, float, str]] = []
    for j in mine:
        label = p.dlabels[int(np.searchsorted(p.dstarts, b.starts[j]))]
        for k in _AREA_PARTS:
            steps.append(
                (
                    f"{label}: {k.removeprefix('area_').removesuffix('_mm2')}",
                    float(ss.area[k][j]),
                    "mm²",
                )
            )
        steps.append((f"{label}: λg/4 sections", float(ss.n_lines[j]), ""))
        steps.append((f"{label}: k·Σ parts", float(ss.area_design[j]), "mm²"))
    for n, a in enumerate(tables["dies"][ci]):
        steps.append((f"die {n + 1}", a, "mm²"))
    return Derivation(
        title=f"Die area, {p.candidates[ci].name} (largest die)",
        formula=(
            "A_die = max(A_min, k·(A_active + A_networks + A_switches + A_control + A_pads));  "
            "A_active = a'·(W_out + ΣW_drv);  A_networks = n_λ/4 · c/(4·f0·√εeff) · pitch, "
            "n_λ/4 = N·(n + 1) + (cells − 1);  A_pads = 2·A_rf + (2·n + n_ctrl)·A_dc"
        ),
        inputs=(
            ("overhead k", card.layout_overhead, ""),
            ("A_min", card.min_die_area_mm2, "mm²"),
            ("a' (active per mm)", card.active_area_mm2_per_mm, "mm²/mm"),
            ("εeff", card.eps_eff, ""),
            ("pitch", card.line_pitch_mm, "mm"),
            ("f0 (lines)", _ghz(p.layout.f0_area_hz[r0]), "GHz"),
            ("λg/4", float(quarter_wave_mm(p.layout.f0_area_hz[r0], card.eps_eff)), "mm"),
            ("A_rf", card.rf_pad_area_mm2, "mm²"),
            ("A_dc", card.dc_pad_area_mm2, "mm²"),
        ),
        steps=tuple(steps),
        result=float(tables["die_area_mm2"][ci]),
        unit="mm²",
        source="DESIGN.md §4 Area; Pozar §3.8 (guided wavelength, from memory)",
    )


def _dc_power(ss: SolvedStudy, ci: int) -> Derivation:
    rows = _cand_rows(ss, ci)
    r = int(rows[np.argmax(ss.dc_w[rows])])
    b = ss.plan.batch
    card = ss.plan.cards[ci]
    return Derivation(
        title=f"DC power at P1dB per PA, {ss.cand_name[r]} (worst band: {ss.band_name[r]})",
        formula="P_DC = P_dev/η + Vdd·bias·Imax'·ΣW_drv;  P_dev = P1dB'·W_out",
        inputs=(
            ("P1dB'", float(b.p1db_w_per_mm[r]), "W/mm"),
            ("W_out", float(ss.w_out_mm[b.group[r]]), "mm"),
            ("η", 100.0 * float(b.eta[r]), "%"),
            ("Vdd", card.vdd_v, "V"),
            ("bias", card.driver_bias_pct, "%"),
            ("Imax'", card.i_max_a_per_mm, "A/mm"),
            ("ΣW_drv", float(ss.w_drivers_mm[r]), "mm"),
        ),
        steps=(
            ("P_dev", float(ss.p_dev_w[r]), "W"),
            ("P_DC,out", float(ss.dc_out_w[r]), "W"),
            ("P_DC,drv", float(ss.dc_drivers_w[r]), "W"),
        ),
        result=float(ss.dc_w[r]),
        unit="W",
        source="DESIGN.md §4 Efficiency; class-AB driver bias (common practice)",
    )


def derivation_makers(ss: SolvedStudy) -> dict[DerivationKey, Callable[[], Derivation]]:
    """A builder for every derivation key of the evaluation (built lazily by the caller)."""
    makers: dict[DerivationKey, Callable[[], Derivation]] = {}
    builders = (_gain, _p1db, _pae)
    for r in range(ss.plan.n_rows):
        for metric, fn in zip(("gain", "p1db", "pae"), builders, strict=True):
            makers[(str(ss.cand_name[r]), str(ss.band_name[r]), metric)] = partial(fn, ss, r)
    for ci, cand in enumerate(ss.plan.candidates):
        makers[(cand.name, None, "die_area")] = partial(_die_area, ss, ci)
        makers[(cand.name, None, "dc_power")] = partial(_dc_power, ss, ci)
    return makers
