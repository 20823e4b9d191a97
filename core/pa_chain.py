"""One evaluation of the PA design chain at given output peripheries (DESIGN.md §4).

The lower layer of :mod:`core.pa_design`, whose module notes describe the chain: per-point
constants of a batch (:func:`prepare`), and one pass at a periphery per design and sample —
cells and split levels, the output network's loss at every point, the section and stage
choices, and the worst loss from device to RF port (:func:`_pass`; :func:`_reduced_pass`
with one given point per section count). :mod:`core.pa_design` searches the periphery with
it and :mod:`core.pa_warm` settles neighbouring requests.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from core import rf
from core.pa_model import LOAD_OHM, DesignBatch, chebyshev_scale
from core.pa_points import ChosenPoints, point_coordinates

__all__ = ["prepare"]

F64 = NDArray[np.float64]
INT = NDArray[np.int64]


def _q_terms(b: DesignBatch, r: INT, f: F64) -> dict[str, F64]:
    """Q and section losses at frequencies ``f`` of rows ``r`` (same shape).

    Passive Q scales as (f/f_ref)^exponent (:func:`core.rf.passive_q`). In a state whose
    switches are on (κ > 1) every section of a retuned network holds switched elements of
    Q_sw = (f_c/f)/(κ − 1) (:func:`core.rf.switched_element_q`, the optimum with all of the
    switched capacitance behind the switch), combined as 1/Q_eff = 1/Q_u + 1/Q_sw. An off
    switch is a lossless Coff in this model, so the all-off (highest-frequency) state has
    Q_eff = Q_u. Each section then costs 8.686·π/(4·Q_eff) dB
    (:func:`core.rf.lossy_section_loss_db`).
    """
    q_u = np.asarray(rf.passive_q(b.q_ref[r], b.q_ref_hz[r], f, b.q_exponent[r]))
    on = (b.kappa > 1.0)[r]
    kap = np.where(on, b.kappa[r], 2.0)  # placeholder > 1 where no switch; masked below
    q_sw = np.where(on, rf.switched_element_q(b.f_c_hz[r], f, kap), np.inf)
    q_eff = np.asarray(rf.combine_q(q_u, q_sw))
    return {
        "q_u": q_u,
        "q_sw": q_sw,
        "q_eff": q_eff,
        "l_p": np.asarray(rf.lossy_section_loss_db(q_u)),
        "l_sw": np.asarray(rf.lossy_section_loss_db(q_sw)),
        "l_sec": np.asarray(rf.lossy_section_loss_db(q_eff)),
    }


def _constants(b: DesignBatch) -> dict[str, F64]:
    """Per-point quantities that do not depend on the periphery, each (Q,); ``bf`` per row.

    On a uniform grid the Q terms are computed once per (row, f) and h_N once per distinct
    (grid, design band) — rows of different candidates often share them — then expanded to
    every section count.
    """
    pts = b.points
    n_r, n_s = b.n_rows, pts.n_sections
    if pts.uniform is not None:
        n_f = pts.uniform
        grid = pts.f_hz.reshape(n_r, n_s, n_f)[:, 0, :]
        t = _q_terms(b, np.arange(n_r)[:, None], grid)

        def expand(x: F64) -> F64:
            return np.broadcast_to(x[:, None, :], (n_r, n_s, n_f)).reshape(-1)

        c = {k: expand(v) for k, v in t.items()}
        key = np.column_stack([grid[:, 0], grid[:, -1], b.f0_hz, b.bw_frac])
        _, first, inverse = np.unique(key, axis=0, return_index=True, return_inverse=True)
        n_sec = np.arange(1, n_s + 1, dtype=float)[None, :, None]
        # Pozar's ln form with R = e² has a ½|ln R| scale of 1: it returns h_N(f) itself.
        h = rf.chebyshev_reflection(
            grid[first][:, None, :],
            b.f0_hz[first][:, None, None],
            np.e**2,
            n_sec,
            b.bw_frac[first][:, None, None],
            method="pozar_ln",
        )
        c["h"] = np.asarray(h)[inverse.reshape(-1)].reshape(-1)
    else:
        c = _q_terms(b, pts.row, pts.f_hz)
        c["h"] = point_coordinates(c["q_u"], c["q_sw"], pts, b.f0_hz, b.bw_frac)[2]
    c["bf"] = np.asarray(
        rf.bode_fano_min_reflection(b.ropt_ohm_mm, b.c_out_f_per_mm, b.f_low_hz, b.f_high_hz)
    )
    c["net"] = pts.n_sec * c["l_sec"]
    return c


def _interstage(b: DesignBatch, c: dict[str, F64]) -> tuple[F64, INT]:
    """Worst in-band loss of one input/interstage network (R,) and its section count (G,).

    Each of the n networks ahead of the output stage (input match and n − 1 interstage
    matches) is a Chebyshev transformer over the design band, like the output network, with
    its own section count chosen by the same rule: the N = 1 … S that minimises the worst
    in-band N·L_sec + mismatch over every row of the design. Its transformation ratio is taken
    as the drive ratio, the step between the load-line levels of successive stages (Ropt of a
    stage scales as 1/periphery); the card has no input-impedance figure, so this is a proxy.
    Its worst in-band loss is what the gain budget pays per network: the designer's gain
    equalisation flattens the in-band variation (DESIGN.md §4 Gain). The Bode–Fano floor of
    the driver's own Ropt–Cout (the same R·C product as the output device) applies.

    Needs the full (uniform) grid.
    """
    pts = b.points
    if pts.uniform is None:
        raise ValueError("b: interstage networks need the full grid of Points.from_grid")
    r_is = chebyshev_scale(b.drive_ratio)[pts.row]
    v = r_is * c["h"]
    gam = np.maximum(v / np.sqrt(1.0 + v * v), c["bf"][pts.row])
    loss = c["net"] + np.asarray(rf.mismatch_loss_db(gam))
    worst = pts.seg_max(loss[None, :])[0]  # (R, S)
    n_is = np.maximum.reduceat(worst, b.starts, axis=0).argmin(axis=1)
    return worst[np.arange(b.n_rows), n_is[b.group]], (n_is + 1).astype(np.int64)


def _stage_rule(b: DesignBatch, c: dict[str, F64], rest: F64) -> tuple[INT, NDArray[np.bool_]]:
    """Fewest stages n whose worst gain n·(G_st − L_is) − rest meets every row's target + margin.

    ``rest`` (K, R) is the worst in-band loss of the output network and combiner; each of the n
    networks ahead of the output stages costs the interstage loss L_is. Returns the stage count
    (K, G) and whether a count was found (True when it is fixed).
    """
    m = int(max(b.max_stages.max(), b.stages_fixed.max()))
    n_all = np.arange(1, m + 1, dtype=float)
    worst = n_all * (b.stage_gain_db - c["is_db"])[None, :, None] - rest[..., None]
    meets = worst >= b.gain_req_db[None, :, None] - 1e-12
    meets_g = np.logical_and.reduceat(meets, b.starts, axis=1)
    max_st = b.per_design("max_stages")
    meets_g &= n_all[None, None, :] <= max_st[None, :, None]
    found = meets_g.any(axis=-1)
    n_auto = np.where(found, meets_g.argmax(axis=-1) + 1, max_st[None, :])
    fixed = b.per_design("stages_fixed")[None, :]
    return np.where(fixed > 0, fixed, n_auto).astype(np.int64), found | (fixed > 0)


def _geometry(b: DesignBatch, c: dict[str, F64], w_g: F64) -> dict:
    """Cells, split levels and transformation ratio at output periphery ``w_g`` (K, G)."""
    cell, max_cells = c["cell_g"], c["max_cells_g"]
    # Unit cells: the largest cell shrinks as 1/f (cell_max_mm is already at the design top).
    n_need = np.maximum(1.0, np.ceil(w_g / cell - 1e-9))
    n_cells = np.minimum(n_need, max_cells)
    w_eff = np.minimum(w_g, max_cells * cell)
    # Binary combining tree: ceil(log2 n) split levels, one lossy λ/4 section per level.
    levels = np.maximum(0.0, np.ceil(np.log2(n_cells) - 1e-9)) + 0.0  # + 0.0: no −0.0
    ratio = LOAD_OHM * w_eff[:, b.group] / b.ropt_ohm_mm[None, :]  # r = 50·W/(Ropt·W), §4
    return {
        "w": w_g,
        "w_eff": w_eff,
        "n_need": n_need,
        "n_cells": n_cells,
        "levels": levels,
        "ratio": ratio,
    }


def _decide(b: DesignBatch, c: dict, geo: dict, seg_worst: F64, req_db: F64) -> dict:
    """Section and stage choices and the worst loss, from the segment maxima (K, R, S)."""
    g = b.group
    # Section count: the N that maximises the worst in-band power delivered to the RF port
    # relative to each row's request — the N needing the smallest output periphery. Losses:
    # network, mismatch, combiner, band-select and driver compression (counted wherever the
    # design can have drivers). Rows without a request (sweep) do not vote.
    need = seg_worst + (c["port"] + req_db)[..., None]
    s_g = np.maximum.reduceat(need, b.starts, axis=1).argmin(axis=-1)  # fewest on ties
    out_max = np.take_along_axis(seg_worst, s_g[:, g][..., None], axis=2)[..., 0]
    n_st, found = _stage_rule(b, c, out_max)
    # Last driver at the output stage's P1dB: it must deliver P1dB/(G − 1 dB) through one
    # interstage network, with 1/drive_ratio of the output periphery.
    head = np.where(n_st[:, g] >= 2, c["head"][None, :], np.inf)
    deficit = np.maximum(0.0, -head)
    # Row constants added after the maximum: rounding is monotone, so this is the maximum of
    # the per-point loss out + band select + deficit.
    worst_loss = out_max + b.band_select_db[None, :] + deficit
    return {
        **geo,
        "s_g": s_g,
        "seg": c["seg0"] + s_g[:, g],
        "out_max": out_max,
        "n_st": n_st,
        "found": found,
        "head": head,
        "deficit": deficit,
        "worst_loss": worst_loss,
    }


def _pass(b: DesignBatch, c: dict[str, F64], w_g: F64, req_db: F64) -> dict:
    """One evaluation of the chain at output periphery ``w_g`` (K, G); see the module notes.

    ``req_db`` (K, R) is 10·log10 of each row's request (−inf where there is none).
    """
    pts = b.points
    g, pr = b.group, pts.row
    geo = _geometry(b, c, w_g)
    # Exact Chebyshev response v = a(r)·h_N (see chebyshev_scale), floored at the Bode–Fano
    # bound (Pozar §5.9); its mismatch loss is the insertion-loss function 10·log10(1 + v²),
    # equal to −10·log10(1 − |Γ|²) with |Γ|² = v²/(1 + v²) (Pozar §8.3).
    # The (K, Q) work is done in place: it is most of a pass.
    uniform = pts.uniform is not None
    tot = chebyshev_scale(geo["ratio"])[:, pr]
    tot *= c["h"]
    np.maximum(tot, c["v_bf"], out=tot)
    v = tot.copy() if uniform else None
    np.square(tot, out=tot)
    tot += 1.0
    np.log10(tot, out=tot)
    tot *= 10.0
    ml = tot.copy() if uniform else None
    comb_all = geo["levels"][:, g][:, pr]
    comb_all *= c["l_p"]  # the combiner is not retuned: passive Q
    tot += c["net"]
    tot += comb_all
    st = _decide(b, c, geo, pts.seg_max(tot), req_db)
    ch = ChosenPoints(pts, st.pop("seg"))
    if uniform:
        net = ch.take(c["net"])
        comb = ch.take(comb_all)
        st.update(v=ch.take(v), net=net, comb=comb, out=net + ch.take(ml) + comb)
    else:
        # Ragged points keep every segment: the chosen losses are ``tot`` itself.
        st["out"] = tot
    st["ch"] = ch
    return st


def _reduced_pass(b: DesignBatch, c: dict, w_g: F64, req_db: F64, idx: INT) -> dict:
    """:func:`_pass` with one given point per (row, section count), ``idx`` (K, R·S).

    Exact when ``idx`` holds each segment's worst point at ``w_g`` (the caller shows that it
    does); per-point losses are not kept (no ``out``), the chosen segments are ``seg``.
    """
    g = b.group
    geo = _geometry(b, c, w_g)
    n_s = b.points.n_sections
    a = np.repeat(chebyshev_scale(geo["ratio"]), n_s, axis=1)
    v = np.maximum(a * c["h"][idx], c["v_bf"][idx])
    tot = c["net"][idx] + 10.0 * np.log10(1.0 + v * v)
    tot += np.repeat(geo["levels"][:, g], n_s, axis=1) * c["l_p"][idx]
    return _decide(b, c, geo, tot.reshape(tot.shape[0], -1, n_s), req_db)


def _required(b: DesignBatch, st: dict, p_req_w: F64) -> F64:
    """Output periphery each design needs for its requests at this pass's losses, (K, G)."""
    w = p_req_w / (b.p1db_w_per_mm[None, :] * 10.0 ** (-st["worst_loss"] / 10.0))
    return np.maximum.reduceat(w, b.starts, axis=1)


def _req_db_of(p_req_w: F64) -> F64:
    req_db = np.full(p_req_w.shape, -np.inf)
    np.log10(p_req_w, out=req_db, where=p_req_w > 0)
    return 10.0 * req_db


def prepare(b: DesignBatch) -> dict[str, F64]:
    """Everything of a solve that does not depend on the requests (per point, row or design).

    Shared by :func:`core.pa_design.solve` and the warm-started sweep (:mod:`core.pa_warm`),
    which solves several groups of requests on one batch.
    """
    c = _constants(b)
    if b.interstage_db is None or b.interstage_sections is None:
        c["is_db"], c["is_sec"] = _interstage(b, c)
    else:
        c["is_db"], c["is_sec"] = b.interstage_db, b.interstage_sections
    # Driver headroom: G − 1 dB − 10·log10(drive ratio) − L_is (see _pass).
    c["head"] = b.stage_gain_db - 1.0 - 10.0 * np.log10(b.drive_ratio) - c["is_db"]
    c["cell_g"] = b.per_design("cell_max_mm")[None, :]
    c["max_cells_g"] = b.per_design("max_cells")[None, :]
    c["seg0"] = np.arange(b.n_rows)[None, :] * b.points.n_sections
    bf = np.minimum(c["bf"], 1.0 - 1e-12)  # a bound of 1 would mean no match at all
    c["v_bf"] = (bf / np.sqrt(1.0 - bf**2))[b.points.row]  # |Γ| = v/√(1 + v²)
    may_drive = np.where(b.stages_fixed > 0, b.stages_fixed, b.max_stages) >= 2
    c["port"] = b.band_select_db + np.where(may_drive, np.maximum(0.0, -c["head"]), 0.0)
    # 1/T_N(sec θm) per row and section count, (R, S): the ripple |Γ|m of a network is then
    # v/√(1 + v²) with v = a(r)/T_N(sec θm) (see chebyshev_scale). Pozar's ln form with R = e²
    # has a ½|ln R| scale of 1, so it returns 1/T_N(sec θm) itself.
    n_sec = np.arange(1, b.max_sections + 1, dtype=float)[None, :]
    c["inv_tn"] = np.asarray(
        rf.chebyshev_max_reflection(np.e**2, n_sec, b.bw_frac[:, None], method="pozar_ln")
    )
    return c
