"""Closed-form PA design, vectorised over designs, samples and frequency (DESIGN.md §4).

One call of :func:`solve` sizes and evaluates a batch of PA designs. The batch is organised in
*rows* and *designs*:

- a **row** is one (candidate, band) evaluation: the band it is scored on, the frequency points
  it is evaluated at, and the design band of the circuit state that serves it;
- a **design** is one physical amplifier (one output periphery, one section count, one stage
  count). A separate single-band PA is one design per row; a wideband PA is one design serving
  every band of its candidate; a switched PA is one design whose rows are its switch states.

Rows of a design are contiguous. A leading *sample* axis ``K`` carries independent sizing
requests (one for :func:`core.estimate.evaluate`, one per P1dB target for
:func:`core.estimate.sweep_p1db`), so the whole chain is numpy broadcasting with shapes
``(K, G)`` per design, ``(K, R)`` per row and ``(K, Q)`` per frequency point, the points of
every (row, section count) segment flattened (:class:`core.pa_points.Points`).

The chain, per design (every step cites its source in the function that does it):

1. Cripps load line per mm: P1dB' = (Vdd − Vk)·Imax'/4 − compression, Ropt·W = 2(Vdd − Vk)/Imax'.
2. Output network: a Chebyshev transformer from 50 Ω to Ropt over the design band (Pozar §5.7),
   N = 1…max_sections chosen to maximise the worst power delivered to the RF port, relative to
   each band's request, over every in-band point the design serves (section loss
   8.686·π/(4·Q_eff) each, mismatch −10·log10(1 − |Γ|²), combiner, band-select and driver
   compression losses): the N that needs the smallest output periphery. With equal requests
   this is the plain worst delivered power.
3. Binary combining of the unit cells, one lossy quarter-wave section per split level.
4. Input and interstage networks: Chebyshev transformers of their own (ratio = drive ratio)
   with the section count chosen by the same rule; their worst in-band loss L_is is paid per
   stage (the gain equaliser flattens the in-band variation).
5. Stage count: fewest stages whose flat gain n·(G_st − L_is), G_st the stage gain at the top
   of the design band (common practice), minus the output network and combiner losses meets
   every row's gain target plus margin.
6. Drivers scaled by the drive ratio; a driver that would compress first lowers the P1dB.
7. Output periphery W: the smallest W whose worst in-band P1dB at the RF port meets target +
   margin in every row (:func:`_least_feasible`, a few passes).
8. Efficiency and DC: output DC = P1dB_device/η with η falling from the tuned toward the
   untuned drain efficiency past the harmonic-control bandwidth
   (:func:`core.pa_model.drain_efficiency`); driver DC from their periphery and bias; PAE =
   (P_out − P_in)/ΣP_DC at P1dB per frequency (:func:`_finish`).

Assumptions beyond DESIGN.md, each stated where it is used: the interstage ratio (drive
ratio), worst-case interstage loss in the gain budget, lossless off switches, a Bode–Fano
floor on every match, and the section rule weighted by the requests.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from core import rf
from core.pa_chain import (
    _constants,
    _interstage,
    _pass,
    _req_db_of,
    _required,
    prepare,
)
from core.pa_model import DesignBatch, Solution, chebyshev_scale, driver_periphery_sum
from core.pa_points import ChosenPoints, prune

__all__ = ["prune_points", "solve"]

#: Iteration cap of the periphery search (it needs 3–8 passes; the cap is a safety net).
_MAX_PASSES = 80
#: Passes after which the search forces progress: growth at least doubles W and every other
#: bracketed step bisects (from a factor-2 bracket, 33 halvings reach the tolerance).
_SLOW_PASSES = 12
#: Relative tolerance of the periphery fixed point.
_W_RTOL = 1e-10

F64 = NDArray[np.float64]
INT = NDArray[np.int64]


def prune_points(b: DesignBatch) -> DesignBatch:
    """The batch on the worst-case points only (:func:`core.pa_points.prune`), exact for
    every request, with the interstage networks taken from the full grid.

    Parameters
    ----------
    b : DesignBatch
        A batch on the uniform grid.

    Returns
    -------
    DesignBatch
    """
    c = _constants(b)
    pts = prune(b.points, c["l_p"], c["l_sw"], c["h"])
    is_db, is_sec = _interstage(b, c)
    pruned = b.with_points(pts)
    return DesignBatch(
        **{
            **{f: getattr(pruned, f) for f in pruned.__dataclass_fields__},
            "interstage_db": is_db,
            "interstage_sections": is_sec,
        }
    )


def initial_periphery(b: DesignBatch, p_req_w: F64, c: dict[str, F64]) -> F64:
    """Start of the periphery iteration, (K, G): a proven lower bound of the fixed point.

    Whatever the periphery and section count N, the worst in-band loss from device to RF port
    is at least the output network's worst dissipative loss N·L_sec over the band plus the
    band-select loss (mismatch, splits and driver deficit are ≥ 0), so W ≥ P_req/(P1dB'·
    10^(−L_min/10)) with L_min the smallest of those over N; no feasible W lies below it,
    so the search may start there (it saves a pass over the lossless requirement).
    """
    l_min = b.points.seg_max(c["net"]).min(axis=-1) + b.band_select_db
    w0 = p_req_w / (b.p1db_w_per_mm * 10.0 ** (-l_min / 10.0))[None, :]
    return np.maximum(np.maximum.reduceat(w0, b.starts, axis=1), 1e-9)


def _store(full: dict | None, part: dict, rows: INT, k_n: int) -> dict:
    """Write the pass ``part`` of samples ``rows`` into the per-sample store ``full``.

    Arrays lead with the sample axis, or with 1 for constants of a pruned grid (broadcast).
    """
    if full is None:
        full = {
            k: np.empty((k_n, *v.shape[1:]), dtype=v.dtype) for k, v in part.items() if k != "ch"
        }
        full["seg"] = np.empty((k_n, part["ch"].seg.shape[1]), dtype=np.int64)
    for k, v in part.items():
        if k == "ch":
            full["seg"][rows] = v.seg
        else:
            full[k][rows] = v
    return full


def _least_feasible(b: DesignBatch, c: dict, p_req_w: F64, w_first: F64):
    """Smallest periphery W with W_req(W) ≤ W for every design of every sample.

    W is feasible when the design built at W reaches every request (W_req(W) ≤ W). The
    search (:func:`_search`) grows W from the proven lower bound ``w_first`` and closes in on
    a crossing of W_req(W) = W. Between two split-level steps (n_cells = 2^m + 1, where one
    more combiner level drops the deliverable P1dB) the feasible peripheries of a piece form
    one interval ending at the piece's upper end (the loss rises slower than W there, see
    :mod:`core.pa_warm`), but a narrow feasible interval just below a step can be stepped
    over. So every step below the periphery found is checked (:func:`_earlier_pieces`): where
    one is feasible, the least feasible W is searched again inside that piece, bracketed by
    its two ends.

    Known limit: where the last driver compresses (driver deficit) and one stage can meet
    every gain target, the stage count can switch between one and two inside a piece, the
    deficit with it, and a feasible window just below that switch is not looked for; the
    periphery found is then feasible but may be larger than the least one. It takes a gain
    target below one stage's gain together with a large drive ratio (about 5 or more).

    Returns
    -------
    st : dict
        The pass at the final periphery of every sample.
    passes : int
    """
    st, passes = _search(b, c, p_req_w, w_first)
    return _earlier_pieces(b, c, p_req_w, w_first, st, passes)


def _earlier_pieces(b: DesignBatch, c: dict, p_req_w: F64, w_first: F64, st: dict, passes: int):
    """Re-search the designs whose feasible set starts below a split step under their result.

    Piece m holds the peripheries with m split levels, W ≤ E_m = cell·(2^m + 1e-9) (as
    :func:`core.pa_chain._geometry` rounds). Every E_m between the start and the found periphery is
    evaluated in one batch; the first feasible one bounds the least feasible W, which lies in
    (E_(m−1), E_m] and is found by a search bracketed by the two ends.
    """
    w_found = st["w"]
    k_n, g_n = w_found.shape
    cell, max_cells = c["cell_g"][0], c["max_cells_g"][0]
    m_n = int(np.ceil(np.log2(max(float(max_cells.max()), 1.0)) - 1e-9))
    if m_n < 1:
        return st, passes
    # Just below each step, so that the pass rounds to m levels.
    ends = cell[None, :] * (2.0 ** np.arange(m_n)[:, None] + 1e-9) * (1.0 - 1e-12)
    below = (
        (ends[:, None, :] < w_found[None, :, :] * (1.0 - _W_RTOL))
        & (ends[:, None, :] > w_first[None, :, :])
        & (2.0 ** np.arange(m_n)[:, None, None] < max_cells[None, None, :])
    )
    ms = np.flatnonzero(below.any(axis=(1, 2)))
    if not ms.size:
        return st, passes
    req_db = _req_db_of(p_req_w)
    w_b = np.concatenate([np.where(below[m], ends[m][None, :], w_found) for m in ms])
    reps = ms.size
    req = _required(
        b, _pass(b, c, w_b, np.tile(req_db, (reps, 1))), np.tile(p_req_w, (reps, 1))
    ).reshape(reps, k_n, g_n)
    w_b = w_b.reshape(reps, k_n, g_n)
    feas = below[ms] & (req <= w_b * (1.0 + _W_RTOL))
    redo = feas.any(axis=0)
    if not redo.any():
        return st, passes + 1
    first = feas.argmax(axis=0)  # index into ms of the first feasible step
    m_first = ms[first]
    hi = np.take_along_axis(w_b, first[None], axis=0)[0]
    f_hi = np.log(np.take_along_axis(req, first[None], axis=0)[0]) - np.log(hi)
    lo = np.where(m_first > 0, ends[np.maximum(m_first - 1, 0), np.arange(g_n)], 0.0)
    lo = np.maximum(lo / (1.0 - 1e-12) * (1.0 + 1e-12), w_first)  # just past the step below
    rows = np.flatnonzero(redo.any(axis=1))
    r = redo[rows]
    # The other designs of those samples start just below their result and settle at once.
    start = np.where(r, lo[rows], w_found[rows] * (1.0 - 1e-9))
    part, p2 = _search(
        b,
        c,
        p_req_w[rows],
        start,
        lo=np.where(r, lo[rows], 0.0),
        hi=np.where(r, hi[rows], np.inf),
        f_hi=np.where(r, f_hi[rows], 0.0),
    )
    merged = _store(None, _slice(st, np.ones(k_n, dtype=bool)), np.arange(k_n), k_n)
    merged = _store(merged, part, rows, k_n)
    merged["ch"] = ChosenPoints(b.points, merged.pop("seg"))
    return merged, passes + 1 + p2


def _search(
    b: DesignBatch,
    c: dict,
    p_req_w: F64,
    w_first: F64,
    lo: F64 | None = None,
    hi: F64 | None = None,
    f_hi: F64 | None = None,
):
    """The periphery search of :func:`_least_feasible`, optionally inside a known bracket.

    From ``w_first`` the iteration grows W (W ← W_req(W), or a secant step in log W once the
    discrete decisions repeat) until a feasible W is found. From then on it keeps the bracket
    [largest infeasible, smallest feasible] and takes regula-falsi steps on
    F = ln W_req − ln W inside it (Illinois variant: the endpoint kept twice has its F halved),
    which converges fast also across a change of cells, sections or stages. A design is done
    when it is feasible and within the tolerance of the fixed point or of the bracket's lower
    end. ``lo``/``hi``/``f_hi`` (K, G) start the bracket: ``lo`` infeasible, ``hi`` feasible
    with F = ``f_hi`` (0 and inf where unknown). Only samples not yet done are passed on, and
    each sample's last pass is kept.
    """
    k_n, g_n = w_first.shape
    req_db = _req_db_of(p_req_w)
    w = w_first.copy()
    lo = np.zeros_like(w) if lo is None else lo.copy()
    hi = np.full_like(w, np.inf) if hi is None else hi.copy()
    f_lo = np.zeros_like(w)
    f_hi = np.zeros_like(w) if f_hi is None else f_hi.copy()
    side = np.zeros_like(w)
    prev_lw, prev_lr = np.zeros_like(w), np.zeros_like(w)
    prev_dec = np.full((k_n, 3 * g_n), -1.0)
    # A design without any request is unconstrained: it stays at its starting periphery.
    idle = ~np.logical_or.reduceat(p_req_w > 0, b.starts, axis=1)
    active = np.arange(k_n)
    passes = 0
    store: dict | None = None
    while active.size:
        wa = w[active]
        st = _pass(b, c, wa, req_db[active])
        passes += 1
        req = _required(b, st, p_req_w[active])
        lw = np.log(wa)
        lr = np.log(np.where(idle[active], wa, req))
        f = lr - lw
        feas = req <= wa * (1.0 + _W_RTOL)
        sd = side[active]
        lo_a = np.where(feas, lo[active], wa)
        hi_a = np.where(feas, wa, hi[active])
        flo = np.where(feas, np.where(sd > 0, 0.5 * f_lo[active], f_lo[active]), f)
        fhi = np.where(feas, f, np.where(sd < 0, 0.5 * f_hi[active], f_hi[active]))
        done = feas & ((req >= wa * (1.0 - _W_RTOL)) | (wa <= lo_a * (1.0 + _W_RTOL)))
        done |= idle[active]
        # Growth phase: secant step in log W once the decisions the loss depends on (split
        # levels, stages, sections; not the cell count itself) repeat. Slopes up to 1 occur
        # at large ratios, where the plain step W ← W_req(W) crawls; past _SLOW_PASSES the
        # step is at least a doubling, so a feasible W is always reached.
        dec = np.concatenate([st["levels"], st["n_st"], st["s_g"]], axis=1).astype(float)
        dx, dy = lw - prev_lw[active], lr - prev_lr[active]
        same = (dec == prev_dec[active]).all(axis=1)[:, None] & (np.abs(dx) > 1e-13)
        slope = np.divide(dy, dx, out=np.zeros_like(dx), where=same)
        use = same & (slope > -5.0) & (slope < 0.999)
        grow = np.where(use, lw + (lr - lw) / (1.0 - np.where(use, slope, 0.0)), lr)
        if passes >= _SLOW_PASSES:
            grow = np.maximum(grow, lw + np.log(2.0))
        # Bracket phase: regula falsi on F(ln W) between the endpoints; past _SLOW_PASSES
        # every other step bisects, so the bracket halves at least every two passes (F can
        # jump at a stage switch, where regula falsi alone converges slowly).
        bracketed = np.isfinite(hi_a) & (lo_a > 0.0)
        l_lo = np.log(np.where(bracketed, lo_a, 1.0))
        l_hi = np.log(np.where(bracketed, hi_a, 1.0))
        t = np.divide(flo, flo - fhi, out=np.full_like(flo, 0.5), where=flo > fhi)
        if passes >= _SLOW_PASSES and passes % 2:
            t = np.full_like(t, 0.5)
        inner = l_lo + np.clip(t, 0.0, 1.0) * (l_hi - l_lo)
        nxt = np.exp(np.where(bracketed, inner, np.maximum(grow, lw)))
        tight = bracketed & (hi_a <= lo_a * (1.0 + _W_RTOL))
        nxt = np.where(tight, hi_a, nxt)
        nxt = np.where(done, wa, nxt)
        prev_lw[active], prev_lr[active], prev_dec[active] = lw, lr, dec
        lo[active], hi[active], f_lo[active], f_hi[active] = lo_a, hi_a, flo, fhi
        side[active] = np.where(feas, 1.0, -1.0)
        w[active] = nxt
        finished = done.all(axis=1)
        if passes >= _MAX_PASSES:  # a safety net: settle on the smallest feasible W
            finished[:] = True
        if finished.all() and active.size == k_n and passes < _MAX_PASSES:
            return st, passes  # that pass was at every sample's final periphery
        if finished.any():
            rows = active[finished]
            if passes >= _MAX_PASSES:
                w[rows] = np.where(np.isfinite(hi[rows]), hi[rows], w[rows])
                part = _pass(b, c, w[rows], req_db[rows])
            else:
                part = _slice(st, finished)
            store = _store(store, part, rows, k_n)
        active = active[~finished]
    assert store is not None
    store["ch"] = ChosenPoints(b.points, store.pop("seg"))
    return store, passes


def _slice(st: dict, keep: NDArray[np.bool_]) -> dict:
    """The samples ``keep`` of a pass."""
    out = {}
    for k, v in st.items():
        if k == "ch":
            out[k] = ChosenPoints.__new__(ChosenPoints)
            out[k].seg = v.seg[keep]
        else:
            out[k] = v[keep] if v.shape[0] == keep.shape[0] else v
    return out


def solve(b: DesignBatch, p_req_w: F64, w_floor: F64 | None = None) -> Solution:
    """Size and evaluate every design of ``b`` for the RF-port P1dB requests ``p_req_w``.

    Parameters
    ----------
    b : DesignBatch
        Rows, design states, process figures and design rules.
    p_req_w : ndarray, (K, R)
        Required worst in-band P1dB at each row's RF port, target plus design margin (W). A
        zero leaves the row unconstrained (its design is sized by the other rows).
    w_floor : ndarray, (K, G), optional
        A proven lower bound of each design's periphery (mm), e.g. the solution of a request
        no larger (a warm start); the search starts at the larger of it and its own bound.

    Returns
    -------
    Solution
        Sizing, per-design decisions and worst-case performance; per-point curves when the
        points are a uniform grid.

    Raises
    ------
    ValueError
        If ``p_req_w`` has the wrong shape or a negative or non-finite entry.

    Notes
    -----
    The periphery is the smallest W whose design reaches every request: W ≥ W_req(W) = max
    over the design's rows of P_req/(P1dB'·10^(−L(W)/10)), L the worst in-band loss from
    device to RF port. L(W) moves with the ratio (mismatch), the cell count (split levels),
    the section and stage choices; :func:`_least_feasible` finds it in a few passes (see its
    known limit where the stage count can switch between one and two).

    Output DC = P1dB_device/η (DESIGN.md §4 "Efficiency"); driver DC = Vdd·bias·Imax'·W_drivers
    (class-AB quiescent current, common practice); PAE = (P_out − P_in)/ΣP_DC at P1dB, with
    P_in = P_out/G and G 1 dB below the small-signal gain (the definition of P1dB).

    References
    ----------
    S. C. Cripps, RF Power Amplifiers for Wireless Communications, 2nd ed., ch. 2 (load line).
    D. M. Pozar, Microwave Engineering, 4th ed., §5.7 (Chebyshev transformer), §5.9 (Bode–Fano).

    Examples
    --------
    See :func:`core.estimate.evaluate`, which builds the batch from a study.
    """
    p_req_w = np.asarray(p_req_w, dtype=float)
    if p_req_w.ndim != 2 or p_req_w.shape[1] != b.n_rows:
        raise ValueError(f"p_req_w: must have shape (K, {b.n_rows}), got {p_req_w.shape}")
    if not np.isfinite(p_req_w).all() or (p_req_w < 0).any():
        raise ValueError("p_req_w: must be finite and non-negative")
    c = prepare(b)
    w_first = initial_periphery(b, p_req_w, c)
    if w_floor is not None:
        w_first = np.maximum(w_first, w_floor)
    st, passes = _least_feasible(b, c, p_req_w, w_first)
    return _finish(b, c, st, passes)


def _finish(b: DesignBatch, c: dict, st: dict, passes: int) -> Solution:
    """Efficiency, DC power, worst-case figures and (on a uniform grid) per-point curves.

    Every worst-in-band figure follows from the row's largest loss out_max (network +
    mismatch + combiner, the maximum the pass took), because at one periphery each point's
    figures are functions of its loss ``out`` alone: gain = n·(G_st − L_is) − out, P1dB =
    P_dev − out − band select − deficit, and the drive P_in = P_out·10^(−(gain − 1)/10) =
    P_dev·10^(−(band select + deficit + n·(G_st − L_is) − 1)/10) is the same at every point
    (P_out and the gain fall together), so PAE = (P_out − P_in)/P_DC falls as out rises. The
    worst gain, P1dB and PAE are therefore all at the point of largest loss, and no per-point
    work is needed for them.
    """
    g = b.group
    n_sec_g = (st["s_g"] + 1).astype(np.int64)
    nst_r = st["n_st"][:, g]
    w_r = st["w_eff"][:, g]
    ratio = st["ratio"]
    v_max = chebyshev_scale(ratio) * c["inv_tn"][np.arange(b.n_rows)[None, :], st["s_g"][:, g]]
    gamma_max = v_max / np.sqrt(1.0 + v_max * v_max)
    p_dev = b.p1db_w_per_mm[None, :] * w_r
    # Driver k (k = 1 … n − 1 counted back from the output) has W_out/ratio^k.
    w_drv = w_r * driver_periphery_sum(b.drive_ratio, nst_r)
    dc_out = p_dev / b.eta[None, :]
    dc_drv = (b.vdd_v * b.driver_bias * b.i_max_a_per_mm)[None, :] * w_drv
    dc = dc_out + dc_drv
    g_n = nst_r.astype(float) * (b.stage_gain_db - c["is_db"])[None, :]
    p_dev_dbm = np.asarray(rf.w_to_dbm(p_dev))
    extra = b.band_select_db[None, :] + st["deficit"]

    def figures(out: F64, row: INT) -> tuple[F64, F64, F64]:
        """Gain, P1dB and PAE at losses ``out`` of points on rows ``row``."""
        gain = g_n[:, row] - out
        p1db = p_dev_dbm[:, row] - (out + extra[:, row])
        p_out = np.asarray(rf.dbm_to_w(p1db))
        p_in = p_out * 10.0 ** (-(gain - 1.0) / 10.0)
        return gain, p1db, (p_out - p_in) / dc[:, row]

    worst_gain, worst_p1db, worst_pae = figures(st["out_max"], np.arange(b.n_rows))
    curves = None
    ch = st["ch"]
    if ch.uniform is not None:
        gain, p1db, pae = figures(st["out"], ch.row)
        shape = (ch.k_n, ch.r_n, ch.uniform)
        per_point = {
            "f_hz": b.points.f_hz,
            "q_u": c["q_u"],
            "q_sw": c["q_sw"],
            "q_eff": c["q_eff"],
            "l_passive_db": c["l_p"],
            "l_section_db": c["l_sec"],
        }
        curves = {k: ch.take(v).reshape(shape) for k, v in per_point.items()}
        gamma = st["v"] / np.sqrt(1.0 + st["v"] ** 2)
        chosen = {
            "gamma": gamma,
            "mismatch_db": np.asarray(rf.mismatch_loss_db(gamma)),
            "network_db": st["net"],
            "combiner_db": st["comb"],
            "headroom_db": st["head"][:, ch.row],
            "deficit_db": st["deficit"][:, ch.row],
            "p1db_loss_db": st["out"] + extra[:, ch.row],
            "gain_db": gain,
            "p1db_dbm": p1db,
            "pae": pae,
        }
        curves.update(
            {k: np.broadcast_to(v, (ch.k_n, v.shape[-1])).reshape(shape) for k, v in chosen.items()}
        )
    return Solution(
        w_out_mm=st["w_eff"],
        n_cells_needed=st["n_need"],
        n_cells=st["n_cells"],
        cells_ok=st["n_need"] <= b.per_design("max_cells")[None, :],
        levels=st["levels"],
        n_sections=n_sec_g,
        n_stages=st["n_st"],
        gain_found=st["found"],
        ratio=ratio,
        gamma_max=gamma_max,
        bf_gamma=c["bf"],
        p_dev_w=p_dev,
        w_drivers_mm=w_drv,
        dc_out_w=dc_out,
        dc_drivers_w=dc_drv,
        worst_gain_db=worst_gain,
        worst_p1db_dbm=worst_p1db,
        worst_pae=worst_pae,
        worst_headroom_db=st["head"],
        interstage_db=c["is_db"],
        interstage_sections=c["is_sec"],
        curves=curves,
        passes=passes,
    )
