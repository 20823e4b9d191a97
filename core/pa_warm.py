"""Warm-started solve of many neighbouring sizing requests (the P1dB sweep of array sizing).

:func:`solve_warm` gives the results of :func:`core.pa_design.solve` for K samples whose
designs each carry one request, ordered along the sample axis (array sizing's targets fall
with N). Every ``step``-th sample (an *anchor*) is solved by the periphery search of
:func:`core.pa_design.solve`. A sample between two anchors is then usually settled in one
pass of the chain:

1. **Bracket.** With one requested row per design the section and stage choices at a
   periphery W do not depend on the request's size, and the design is feasible for request p
   exactly when its worst deliverable P1dB h(W) (the RF-port P1dB at W) is ≥ p. So the least
   feasible periphery W*(p) = min{W : h(W) ≥ p} rises with p, and the anchors on either side
   bound it: W*(p_lo) ≤ W*(p) ≤ W*(p_hi).
2. **Monotone inside.** On that bracket h is continuous and strictly increasing when the
   combiner's split levels are the same at both ends (they only rise with W), the driver
   deficit cannot switch on or off (fixed stages, a one-stage design impossible by the gain
   target, or no deficit at all), no cell limit is reached, and every in-band point has
   h_N ≤ √2. Proof sketch: at fixed decisions each point's loss is c_i + 10·log10(1 + v²),
   v = a(r)·h_N, a = |r − 1|/(2√r), r ∝ W, and d ln(1 + v²)/d ln W = h_N²(r² − 1)/
   (4r(1 + v²)) < 1 when h_N² < 2r/(r − 1) — true for h_N ≤ √2 — so W·10^(−loss/10) rises
   with W at every point; h is a minimum over points and a maximum over section counts of
   such functions (Bode–Fano floors only hold the loss constant). The request then meets h
   at one periphery only, and that periphery is W*(p).
3. **Model root.** The loss of the anchors' worst points (the arg-max point of each anchor's
   chosen section count) gives a closed-form h; Newton's method in ln W on it, kept inside
   the bracket, finds its root from the log-linear interpolation between the anchors.
4. **Check.** One full pass of the chain at that root (every point, every section count)
   confirms it: when the sample is feasible there and its required periphery equals the root
   within the search tolerance, the root is the fixed point of the full chain, hence W*(p)
   by step 2, and the pass is the sample's result.

A sample for which any design fails steps 2–4 is searched as in
:func:`core.pa_design.solve`, from the larger of its proven lower bound and the lower
anchor's periphery (or the checked root for the designs that passed).
"""

from __future__ import annotations

from dataclasses import fields, replace

import numpy as np
from numpy.typing import NDArray

from core.pa_design import (
    _W_RTOL,
    _finish,
    _least_feasible,
    _pass,
    _required,
    _slice,
    initial_periphery,
    prepare,
    solve,
)
from core.pa_model import LOAD_OHM, DesignBatch, Solution
from core.pa_points import ChosenPoints

__all__ = ["one_request_row", "solve_warm"]

F64 = NDArray[np.float64]
INT = NDArray[np.int64]

#: Relative shrink of a seed periphery: it stays below the neighbour's smallest feasible W.
SEED_SHRINK = 1e-9
#: Cap of the Newton steps on the model (quadratic convergence from the interpolated start:
#: 3–4 reach the rounding level, where the loop stops).
_NEWTON_STEPS = 12
#: Largest normalised Chebyshev response for which step 2 of the module notes holds.
_H_MAX = np.sqrt(2.0)


def one_request_row(b: DesignBatch, p_req: F64) -> INT:
    """Row of the single positive request of each design per sample, (K, G); −1 otherwise."""
    pos = p_req > 0.0
    count = np.add.reduceat(pos.astype(np.int64), b.starts, axis=1)
    last = np.maximum.reduceat(np.where(pos, np.arange(b.n_rows), -1), b.starts, axis=1)
    return np.where(count == 1, last, -1)


def solve_warm(b: DesignBatch, p_req: F64, step: int = 16) -> Solution:
    """:func:`core.pa_design.solve` for ordered samples, most of them in one pass.

    Parameters
    ----------
    b : DesignBatch
        A batch on pruned (ragged) points, e.g. from :func:`core.pa_design.prune_points`;
        on a uniform grid every sample is searched in full.
    p_req : ndarray, (K, R)
        Requests (W), as for :func:`core.pa_design.solve`. Any order is correct; samples
        ordered by request along K (rising or falling) are the fast case.
    step : int
        Anchor spacing along K (≥ 2).

    Returns
    -------
    Solution
        As :func:`core.pa_design.solve` (within its search tolerance), without per-point
        curves (``curves`` None).

    Examples
    --------
    See :func:`core.sweep.sweep_arrays`, which calls it for the P1dB sweep.
    """
    k_n = p_req.shape[0]
    if k_n <= 2 * step or b.points.uniform is not None:
        return replace(solve(b, p_req), curves=None)
    c = prepare(b)
    anchor = np.arange(k_n) % step == 0
    anchor[-1] = True  # every other sample has an anchor on both sides
    a_idx, rest = np.flatnonzero(anchor), np.flatnonzero(~anchor)
    w0 = initial_periphery(b, p_req[a_idx], c)
    a_st, a_passes = _least_feasible(b, c, p_req[a_idx], w0)
    act = _active_points(b, a_st)  # before _finish, which pads the per-point arrays
    a_sol = _finish(b, c, a_st, a_passes)

    br = _brackets(b, c, p_req, a_idx, rest, a_st, a_sol, act)
    w_try = np.where(br["eligible"], br["w_root"], br["w_hi"])
    st = _pass(b, c, w_try, _req_db(p_req[rest]))
    req = _required(b, st, p_req[rest])
    done = br["eligible"] & (req <= w_try * (1.0 + _W_RTOL)) & (req >= w_try * (1.0 - _W_RTOL))
    ok = done.all(axis=1)

    parts: list[tuple[NDArray[np.int64], Solution]] = [(a_idx, a_sol)]
    if ok.any():
        part = _slice(st, ok)
        part["ch"] = ChosenPoints(b.points, st["ch"].seg[ok])
        parts.append((rest[ok], _finish(b, c, part, 1)))
    if not ok.all():
        bad = ~ok
        floor = np.where(done, w_try * (1.0 - SEED_SHRINK), br["seed"])[bad]
        p_bad = p_req[rest[bad]]
        w_first = np.maximum(initial_periphery(b, p_bad, c), floor)
        f_st, f_passes = _least_feasible(b, c, p_bad, w_first)
        parts.append((rest[bad], _finish(b, c, f_st, f_passes)))
    return _combine(k_n, parts)


def _req_db(p_req: F64) -> F64:
    out = np.full(p_req.shape, -np.inf)
    np.log10(p_req, out=out, where=p_req > 0)
    return 10.0 * out


def _active_points(b: DesignBatch, st: dict) -> INT:
    """Index of the worst point of each row's chosen section count, (K, R), ragged points."""
    pts = b.points
    n_q = pts.n_points
    counts = np.diff(np.append(pts.seg_starts, n_q))
    seg_of_point = np.repeat(np.arange(pts.seg_starts.size), counts)
    chosen = seg_of_point[None, :] == st["ch"].seg[:, pts.row]
    val = np.where(chosen, st["out"], -np.inf)
    n_s = pts.n_sections
    first = pts.seg_starts[::n_s]
    last = np.append(first[1:], n_q)
    out = np.empty(st["ch"].seg.shape, dtype=np.int64)
    for r, (i0, i1) in enumerate(zip(first, last, strict=True)):
        out[:, r] = i0 + val[:, i0:i1].argmax(axis=1)
    return out


def _deficit_fixed(b: DesignBatch, c: dict) -> NDArray[np.bool_]:
    """Rows whose driver-compression deficit cannot change with the periphery, (R,).

    The deficit is paid only with two or more stages; it is constant when there is none
    (headroom ≥ 0), when the stage count is fixed or limited to one, or when one stage cannot
    meet some row's gain target even with lossless networks (then every count is ≥ 2).
    """
    g = b.group
    one_short = (b.stage_gain_db - c["is_db"]) < b.gain_req_db - 1e-12
    never_one = np.logical_or.reduceat(one_short, b.starts)
    fixed = (b.per_design("stages_fixed") > 0) | (b.per_design("max_stages") <= 1) | never_one
    return fixed[g] | (c["head"] >= 0.0)


def _brackets(b, c, p_req, a_idx, rest, a_st, a_sol, act) -> dict[str, F64]:
    """Anchor brackets, eligibility (module notes, step 2) and model roots of the samples."""
    g_n = b.starts.size
    row = one_request_row(b, p_req)
    pos = np.searchsorted(a_idx, rest)
    prev, nxt = pos - 1, pos  # positions in the anchor arrays
    r_k, r_p, r_n = row[rest], row[a_idx[prev]], row[a_idx[nxt]]
    rr = np.maximum(r_k, 0)
    p_k = np.take_along_axis(p_req[rest], rr, axis=1)
    p_p = np.take_along_axis(p_req[a_idx[prev]], rr, axis=1)
    p_n = np.take_along_axis(p_req[a_idx[nxt]], rr, axis=1)
    w_a = a_st["w"]  # the search's periphery (the solution's is capped at the cell limit)
    gg = np.arange(g_n)[None, :]
    w_p, w_n = w_a[prev[:, None], gg], w_a[nxt[:, None], gg]
    has = r_k >= 0
    below_p = has & (r_p == r_k) & (p_p <= p_k)
    below_n = has & (r_n == r_k) & (p_n <= p_k)
    seed = np.maximum(
        np.where(below_p, w_p * (1.0 - SEED_SHRINK), 0.0),
        np.where(below_n, w_n * (1.0 - SEED_SHRINK), 0.0),
    )
    # Lower and upper anchors of each (sample, design).
    lo_is_p = p_p <= p_n
    a_lo = np.where(lo_is_p, prev[:, None], nxt[:, None])
    a_hi = np.where(lo_is_p, nxt[:, None], prev[:, None])
    p_lo, p_hi = np.minimum(p_p, p_n), np.maximum(p_p, p_n)
    w_lo, w_hi = w_a[a_lo, gg], w_a[a_hi, gg]
    lev = a_st["levels"]
    h_top = np.maximum.reduceat(
        np.maximum.reduceat(c["h"], b.points.seg_starts[:: b.points.n_sections]), b.starts
    )
    elig = (
        has
        & (r_p == r_k)
        & (r_n == r_k)
        & (p_lo <= p_k)
        & (p_k <= p_hi)
        & a_sol.cells_ok[a_lo, gg]
        & a_sol.cells_ok[a_hi, gg]
        & (lev[a_lo, gg] == lev[a_hi, gg])
        & _deficit_fixed(b, c)[rr]
        & (h_top <= _H_MAX)[None, :]
        & (w_hi >= w_lo)
    )
    i1, i2 = act[a_lo, rr], act[a_hi, rr]
    pts = b.points
    counts = np.diff(np.append(pts.seg_starts, pts.n_points))
    seg_of_point = np.repeat(np.arange(pts.seg_starts.size), counts)
    same_seg = seg_of_point[i1] == seg_of_point[i2]
    const = b.band_select_db[rr] + a_st["deficit"][a_lo, rr]
    lv = lev[a_lo, gg]
    model = [
        (
            np.log(10.0) / 10.0 * (c["net"][i] + lv * c["l_p"][i] + const),
            c["h"][i],
            c["v_bf"][i],
        )
        for i in (i1, i2)
    ]
    base = np.log(np.where(has, p_k, 1.0)) - np.log(b.p1db_w_per_mm[rr])
    # Start: log-linear interpolation of W* in ln p between the anchors.
    span = np.log(p_hi / np.where(p_lo > 0, p_lo, 1.0))
    t = np.divide(
        np.log(p_k / np.where(p_lo > 0, p_lo, 1.0)),
        span,
        out=np.zeros_like(span),
        where=elig & (span > 0),
    )
    l_lo, l_hi = np.log(np.maximum(w_lo, 1e-300)), np.log(np.maximum(w_hi, 1e-300))
    u = l_lo + np.clip(t, 0.0, 1.0) * (l_hi - l_lo)
    u_lo, u_hi = l_lo - 1e-9, l_hi + 1e-9
    k_r = LOAD_OHM / b.ropt_ohm_mm[rr]
    for _ in range(_NEWTON_STEPS):
        r = k_r * np.exp(u)
        a = np.abs(r - 1.0) / (2.0 * np.sqrt(r))
        terms = []
        for kc, h, vbf in model:
            av = a * h
            v = np.maximum(av, vbf)
            v2 = v * v
            loss = kc + np.log1p(v2)
            slope = (av > vbf) * (h * h) * (r * r - 1.0) / (4.0 * r * (1.0 + v2))
            terms.append((loss, slope))
        (l1, s1), (l2, s2) = terms
        first = np.where(same_seg, l1 >= l2, l1 <= l2)
        loss, slope = np.where(first, l1, l2), np.where(first, s1, s2)
        g_val = u - base - loss
        u_lo = np.where(g_val < 0.0, u, u_lo)
        u_hi = np.where(g_val > 0.0, u, u_hi)
        step = g_val / np.maximum(1.0 - slope, 1e-12)
        nxt_u = u - step
        # Bisect only when Newton leaves the bracket (at the root a step may round onto an end).
        inside = (nxt_u >= u_lo) & (nxt_u <= u_hi)
        u = np.where(inside, nxt_u, 0.5 * (u_lo + u_hi))
        if (~elig | (inside & (np.abs(step) <= 1e-14))).all():  # W to 1e-14, far below _W_RTOL
            break
    w_root = np.exp(u)
    # Past the cell limit nothing depends on W (the periphery is capped): W_req is constant,
    # W* = W_req ∝ p, and a lower anchor beyond the limit shows that no W below it serves p.
    capped = (
        has
        & (r_p == r_k)
        & (r_n == r_k)
        & (p_lo <= p_k)
        & (p_lo > 0)
        & ~a_sol.cells_ok[a_lo, gg]
        & (w_lo > (b.max_cells * b.cell_max_mm)[b.starts][None, :])
    )
    w_root = np.where(capped, w_lo * p_k / np.where(p_lo > 0, p_lo, 1.0), w_root)
    return {"eligible": elig | capped, "w_root": w_root, "w_hi": w_hi, "seed": seed}


def _combine(k_n: int, parts: list[tuple[NDArray[np.int64], Solution]]) -> Solution:
    """One solution of K samples from parts (sample indices, solution of those samples)."""
    first = parts[0][1]
    k_0 = parts[0][0].size
    changes = {}
    for f in fields(first):
        x = getattr(first, f.name)
        if isinstance(x, np.ndarray) and x.ndim >= 2 and x.shape[0] == k_0:
            kinds = [getattr(s, f.name) for _, s in parts]
            out = np.empty((k_n, *x.shape[1:]), dtype=np.result_type(*kinds))
            for (idx, _), v in zip(parts, kinds, strict=True):
                out[idx] = v
            changes[f.name] = out
    passes = max(s.passes for _, s in parts)
    return replace(first, **changes, curves=None, passes=passes)
