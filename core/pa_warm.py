"""Warm-started solve of many neighbouring sizing requests (the P1dB sweep of array sizing).

:func:`solve_warm` gives the results of :func:`core.pa_design.solve` for K samples whose
designs each carry one request, ordered along the sample axis (array sizing's targets fall
with N). The *anchors* — every ``step``-th sample, the samples around a change of the
requested rows, and every sample whose request enters a new half-octave — are solved by the
periphery search of :func:`core.pa_design.solve`. A sample between two anchors is then
usually settled by one cheap evaluation of the chain:

1. **Bracket.** With one requested row per design the section and stage choices at a
   periphery W do not depend on the request's size, and the design is feasible for request p
   exactly when its worst deliverable P1dB h(W) (the RF-port P1dB at W) is ≥ p. So the least
   feasible periphery W*(p) = min{W : h(W) ≥ p} rises with p, and the anchors on either side
   bound it: W*(p_lo) ≤ W*(p) ≤ W*(p_hi).
2. **Monotone pieces.** h is continuous and strictly increasing wherever the combiner's split
   levels are constant, the driver deficit cannot switch on or off (fixed stages, at most one
   stage allowed, a one-stage design impossible by the gain target, or no deficit at all), no
   cell limit is reached,
   and every in-band point has h_N ≤ √2. Proof sketch: at fixed decisions each point's loss
   is c_i + 10·log10(1 + v²), v = a(r)·h_N, a = |r − 1|/(2√r), r ∝ W, and
   d ln(1 + v²)/d ln W = h_N²(r² − 1)/(4r(1 + v²)) < 1 when h_N² < 2r/(r − 1) — true for
   h_N ≤ √2 — so W·10^(−loss/10) rises with W at every point; h is a minimum over points and
   a maximum over section counts of such functions (Bode–Fano floors only hold the loss
   constant). On a piece the request meets h at one periphery only. A bracket may hold one
   step of h (one more split level, where h drops, or the cell limit, past which it is
   constant): the root lies on the first piece that reaches p, and a root past the step is
   W*(p) only if the chain is infeasible at the step, which is checked.
3. **Model root.** The loss of the anchors' worst points (the arg-max point of each anchor's
   chosen section count) gives a closed-form h, whose root W_req(W) = W is a quadratic in W
   (:meth:`_Model.root`).
4. **Check.** The chain is evaluated at that root, and the root is the sample's W* when the
   required periphery there equals it within the search tolerance (the fixed point of the
   full chain, hence W*(p) by step 2). Where, across the bracket, every section count keeps
   its worst point (same at both anchors, that point's Bode–Fano floor in the same state at
   both, no ratio crossing 1), that point alone gives each section count's exact loss, so the
   check evaluates one point per section count (:func:`core.pa_chain._reduced_pass`);
   elsewhere it is a full pass over every point.

A sample for which any design fails steps 2–4 is searched as in
:func:`core.pa_design.solve`, from the larger of its proven lower bound and the lower
anchor's periphery (or the checked root for the designs that passed).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
from numpy.typing import NDArray

from core.pa_chain import _pass, _reduced_pass, _req_db_of, _required, prepare
from core.pa_design import (
    _W_RTOL,
    _finish,
    _least_feasible,
    _slice,
    initial_periphery,
    solve,
)
from core.pa_model import LOAD_OHM, DesignBatch, Solution, chebyshev_scale
from core.pa_points import ChosenPoints

__all__ = ["one_request_row", "solve_warm"]

F64 = NDArray[np.float64]
INT = NDArray[np.int64]

#: Relative shrink of a seed periphery: it stays below the neighbour's smallest feasible W.
SEED_SHRINK = 1e-9
#: Largest normalised Chebyshev response for which step 2 of the module notes holds.
_H_MAX = np.sqrt(2.0)


def one_request_row(b: DesignBatch, p_req: F64) -> INT:
    """Row of the single positive request of each design per sample, (K, G); −1 otherwise."""
    pos = p_req > 0.0
    count = np.add.reduceat(pos.astype(np.int64), b.starts, axis=1)
    last = np.maximum.reduceat(np.where(pos, np.arange(b.n_rows), -1), b.starts, axis=1)
    return np.where(count == 1, last, -1)


def solve_warm(b: DesignBatch, p_req: F64, step: int = 32) -> Solution:
    """:func:`core.pa_design.solve` for ordered samples, most settled by one evaluation.

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
    if b.points.uniform is not None:
        return replace(solve(b, p_req), curves=None)
    c = prepare(b)
    k_n = p_req.shape[0]
    a_idx, rest = _anchors(b, p_req, step)
    if k_n <= 2 * step or 2 * a_idx.size > k_n:
        st, passes = _least_feasible(b, c, p_req, initial_periphery(b, p_req, c))
        return replace(_finish(b, c, st, passes), curves=None)
    a_st, passes = _least_feasible(b, c, p_req[a_idx], initial_periphery(b, p_req[a_idx], c))
    a_st = {**a_st, "seg": a_st.pop("ch").seg}

    br = _brackets(b, c, p_req, a_idx, rest, a_st)
    w_try = np.where(br["eligible"], br["w_root"], br["w_hi"])
    req_db = _req_db_of(p_req[rest])
    parts = [(a_idx, a_st)]
    done = np.zeros(w_try.shape, dtype=bool)
    todo = np.ones(rest.size, dtype=bool)

    def at_root(sel: INT, st: dict) -> NDArray[np.bool_]:
        """Designs of samples ``sel`` whose pass ``st`` is at their model root, (S, G)."""
        req, w = _required(b, st, p_req[rest[sel]]), w_try[sel]
        return br["eligible"][sel] & (req <= w * (1.0 + _W_RTOL)) & (req >= w * (1.0 - _W_RTOL))

    def keep(sel: INT, st: dict, ok: NDArray[np.bool_]) -> None:
        done[sel] = ok
        full = ok.all(axis=1)
        if full.any():
            parts.append((rest[sel[full]], _slice(st, full)))
            todo[sel[full]] = False

    # Where every segment keeps its worst point across the bracket, one point per segment
    # gives the exact chain (module notes, step 4).
    red = np.flatnonzero(br["reduced"])
    if red.size:
        st = _reduced_pass(b, c, w_try[red], req_db[red], br["seg_points"][red])
        keep(red, st, at_root(red, st))
    # The others: one full pass. A root past a step of h is the least feasible W only if the
    # chain is infeasible just below the step (h rises up to it): one more pass for those.
    sel = np.flatnonzero(todo)
    if sel.size:
        st = _pass(b, c, w_try[sel], req_db[sel])
        ok = at_root(sel, st)
        check = ok & (br["w_check"][sel] > 0.0)
        chk = np.flatnonzero(check.any(axis=1))
        if chk.size:
            w_chk = np.where(check[chk], br["w_check"][sel[chk]], w_try[sel[chk]])
            st_chk = _pass(b, c, w_chk, req_db[sel[chk]])
            req_chk = _required(b, st_chk, p_req[rest[sel[chk]]])
            ok[chk] &= ~check[chk] | (req_chk > w_chk * (1.0 + _W_RTOL))
            passes = max(passes, 2)
        keep(sel, st, ok)
    bad = np.flatnonzero(todo)
    if bad.size:
        floor = np.where(done[bad], w_try[bad] * (1.0 - SEED_SHRINK), br["seed"][bad])
        p_bad = p_req[rest[bad]]
        w_first = np.maximum(initial_periphery(b, p_bad, c), floor)
        f_st, f_passes = _least_feasible(b, c, p_bad, w_first)
        parts.append((rest[bad], f_st))
        passes = max(passes, f_passes)
    st = _merge(k_n, parts)
    st["ch"] = ChosenPoints(b.points, st.pop("seg"))
    return replace(_finish(b, c, st, passes), curves=None)


def _anchors(b: DesignBatch, p_req: F64, step: int) -> tuple[INT, INT]:
    """Anchor samples and the others, both sorted.

    Anchors: every ``step``-th sample and the last (so every other sample has one on each
    side), both samples around a change of the requested rows (band j to band j + 1 of a
    grouped sweep), and every sample whose largest request enters a new half-octave (h has a
    step about every doubling of W, and a bracket may hold one only).
    """
    k_n = p_req.shape[0]
    anchor = np.arange(k_n) % step == 0
    anchor[-1] = True
    row = one_request_row(b, p_req)
    change = (row[1:] != row[:-1]).any(axis=1)
    anchor[1:] |= change
    anchor[:-1] |= change
    p_key = p_req.max(axis=1)
    octave = np.floor(2.0 * np.log2(np.where(p_key > 0, p_key, 1.0)))
    anchor[1:] |= octave[1:] != octave[:-1]
    return np.flatnonzero(anchor), np.flatnonzero(~anchor)


def _merge(k_n: int, parts: list[tuple[INT, dict]]) -> dict:
    """One per-sample pass state of K samples from parts (sample indices, state), without the
    per-point losses (``out``), which only the anchors' worst points needed."""
    parts = [(idx, {**st, "seg": st["ch"].seg} if "ch" in st else st) for idx, st in parts]
    first = parts[0][1]
    keys = [k for k in first if k not in ("ch", "out")]
    out = {k: np.empty((k_n, *first[k].shape[1:]), dtype=first[k].dtype) for k in keys}
    for idx, st in parts:
        for k in keys:
            out[k][idx] = st[k]
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


def _brackets(b, c, p_req, a_idx, rest, a_st) -> dict[str, F64]:
    """Anchor brackets, eligibility (module notes, steps 2–3) and model roots of the samples.

    Returns, each (K_rest, G): ``eligible``, ``w_root`` (the model's W*), ``w_check`` (a
    periphery that must prove infeasible for the root to be the least feasible one, 0 where
    none is needed), ``w_hi`` (upper anchor) and ``seed`` (lower bound for a full search);
    ``reduced`` (K_rest,), samples whose check may use one point per section count, and
    ``seg_points`` (K_rest, R·S), those points.
    """
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
    cells_ok = a_st["n_need"] <= b.per_design("max_cells")[None, :]
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
    ok_lo, ok_hi = cells_ok[a_lo, gg], cells_ok[a_hi, gg]
    lev_lo, lev_hi = a_st["levels"][a_lo, gg], a_st["levels"][a_hi, gg]
    cell = b.per_design("cell_max_mm")[None, :]
    cap = b.per_design("max_cells")[None, :] * cell
    h_top = np.maximum.reduceat(
        np.maximum.reduceat(c["h"], b.points.seg_starts[:: b.points.n_sections]), b.starts
    )
    bracketed = (
        has
        & (r_p == r_k)
        & (r_n == r_k)
        & (p_lo <= p_k)
        & (p_k <= p_hi)
        & (p_lo > 0)
        & (w_hi >= w_lo)
    )
    smooth = _deficit_fixed(b, c)[rr] & (h_top <= _H_MAX)[None, :]
    # An anchor's periphery is a lower bound for a larger request only where the search that
    # found it is exact (see core.pa_design._least_feasible): elsewhere start from scratch.
    seed = np.where(smooth, seed, 0.0)
    # At most one step of h inside the bracket: none, one more split level (at n_cells =
    # 2^m + 1, i.e. W = cell·(2^m + 1e-9) as _pass rounds), or the cell limit.
    level_step = ok_lo & ok_hi & (lev_hi == lev_lo + 1)
    cap_step = ok_lo & ~ok_hi & (lev_hi == lev_lo)
    w_step = np.where(level_step, cell * (2.0**lev_lo + 1e-9), np.where(cap_step, cap, np.inf))
    no_step = ok_lo & ok_hi & (lev_hi == lev_lo)
    elig = bracketed & smooth & (no_step | ((level_step | cap_step) & (w_step < w_hi)))

    pts = b.points
    seg_arg = _segment_argmax(pts, a_st["out"])
    model = _Model(b, c, a_st, seg_arg, a_lo, a_hi, rr, p_k)
    w_end = np.minimum(w_step, w_hi)
    # Piece A, below the step (the whole bracket without one), at the lower anchor's levels.
    # Its model root past the step's periphery means p is out of reach below the step: it is
    # then served above the step only if the full chain is infeasible at the step (checked
    # by the caller).
    w_a = model.root(lev_lo)
    beyond = elig & (level_step | cap_step) & (w_a > w_end)
    # Past a split step: the model at the upper anchor's levels. Past the cell limit nothing
    # depends on W (the periphery is capped): W* = W_req(cap).
    w_b = w_a
    if beyond.any():
        w_cap = model.required(w_end, lev_lo)
        w_b = np.where(cap_step, w_cap, np.maximum(model.root(lev_hi), w_end))
        w_b = np.minimum(w_b, w_hi)  # W* never lies past the upper anchor
    w_model = np.where(beyond, w_b, np.clip(w_a, w_lo, w_end))
    w_check = np.where(beyond, np.minimum(w_step, w_hi), 0.0)

    # Both anchors past the cell limit: W_req is constant past it, W* = W_req ∝ p, and the
    # lower anchor shows that no W below the limit serves p.
    capped = bracketed & ~ok_lo & ~ok_hi & (w_lo > cap)
    w_root = np.where(capped, w_lo * p_k / np.where(p_lo > 0, p_lo, 1.0), w_model)
    w_check = np.where(capped, 0.0, w_check)

    # Module notes, step 4: per bracket, every segment's worst point i the same at both
    # anchors, i's Bode–Fano floor in the same state at both, and no row's ratio crossing 1
    # (so a(r) moves one way). Every point's loss is then max(f_q(a), k_q) with f_q =
    # c_q + 10·log10(1 + a²h_q²) monotone in a and k_q its floored constant; f_i − f_q =
    # c_i − c_q + 10·log10((1 + a²h_i²)/(1 + a²h_q²)) is monotone in a too, so i's loss (f_i
    # or k_i throughout), at least every other point's at both ends, stays at least f_q and
    # k_q across the bracket: i is the segment's worst point at every periphery between.
    ub, inv = np.unique(pos, return_inverse=True)  # brackets, by their upper anchor
    r_a = a_st["ratio"]
    a_arg = np.repeat(chebyshev_scale(r_a), pts.n_sections, axis=1) * c["h"][seg_arg]
    floored = a_arg <= c["v_bf"][seg_arg]
    keeps = (
        (seg_arg[ub - 1] == seg_arg[ub]).all(axis=1)
        & (floored[ub - 1] == floored[ub]).all(axis=1)
        & ((r_a[ub - 1] - 1.0) * (r_a[ub] - 1.0) > 0.0).all(axis=1)
    )
    reduced = keeps[inv.reshape(-1)] & (elig & no_step).all(axis=1)
    w_root = np.where(reduced[:, None], np.clip(w_root, w_lo, w_hi), w_root)
    return {
        "eligible": elig | capped,
        "w_root": w_root,
        "w_check": w_check,
        "w_hi": w_hi,
        "seed": seed,
        "reduced": reduced,
        "seg_points": seg_arg[prev],
    }


def _segment_argmax(pts, out: F64) -> INT:
    """Index of the largest point of every segment, (K, R·S), of per-point values (K, Q)."""
    n_q = pts.n_points
    counts = np.diff(np.append(pts.seg_starts, n_q))
    seg_max = np.maximum.reduceat(out, pts.seg_starts, axis=1)
    cand = np.where(out == np.repeat(seg_max, counts, axis=1), np.arange(n_q), n_q)
    return np.minimum.reduceat(cand, pts.seg_starts, axis=1)


class _Model:
    """Closed-form worst loss of each (sample, design) from its anchors' worst points.

    The loss of point i at periphery W is c_i + 10·log10(1 + v²), c_i = N·L_sec + levels·L_p
    + band select + deficit, v = max(a(r)·h_i, v_bf,i), r = 50·W/(Ropt·W) (as in
    :func:`core.pa_chain._pass`); the model takes the larger of the two anchors' worst points
    when they share a section count (same segment) and the smaller otherwise (the section
    count is chosen for the least loss). G(u) = u − ln W_req(e^u), u = ln W, rises with u
    (module notes, step 2), so it has one root, found in closed form (:meth:`root`).
    """

    def __init__(self, b, c, a_st, seg_arg, a_lo, a_hi, rr, p_k) -> None:
        # The worst point of each anchor's chosen segment of the requested row.
        seg_lo, seg_hi = a_st["seg"][a_lo, rr], a_st["seg"][a_hi, rr]
        i1, i2 = seg_arg[a_lo, seg_lo], seg_arg[a_hi, seg_hi]
        self.same_seg = seg_lo == seg_hi
        kappa = np.log(10.0) / 10.0
        const = b.band_select_db[rr] + a_st["deficit"][a_lo, rr]
        self.points = [
            (kappa * (c["net"][i] + const), kappa * c["l_p"][i], c["h"][i], c["v_bf"][i])
            for i in (i1, i2)
        ]
        self.base = np.log(np.maximum(p_k, 1e-300)) - np.log(b.p1db_w_per_mm[rr])
        self.k_r = LOAD_OHM / b.ropt_ohm_mm[rr]

    def _terms(self, lev: F64):
        """Per anchor point: E = e^(base + c_i) (W_req of a matched point), h², v_bf²."""
        for c0, kl, h, vbf in self.points:
            yield np.exp(self.base + c0 + lev * kl), h * h, vbf * vbf

    def _combine(self, x1: F64, x2: F64) -> F64:
        return np.where(self.same_seg, np.maximum(x1, x2), np.minimum(x1, x2))

    def required(self, w: F64, lev: F64) -> F64:
        """The model's W_req at periphery ``w``, (K, G)."""
        r = self.k_r * w
        a2 = (r - 1.0) ** 2 / (4.0 * r)
        x1, x2 = (e * (1.0 + np.maximum(a2 * h2, v2)) for e, h2, v2 in self._terms(lev))
        return self._combine(x1, x2)

    def root(self, lev: F64) -> F64:
        """The model's W* (W_req(W) = W) in closed form, (K, G); inf where there is none.

        Matched (v = a·h): W = E·(1 + h²(kW − 1)²/(4kW)), k = 50/(Ropt·W), is the quadratic
        k(4 − E·h²·k)·W² − 2kE(2 − h²)·W − E·h² = 0, whose one positive root (taken without
        cancellation, h² < 2) exists when E·h²·k < 4; on the Bode–Fano floor W = E·(1 + v_bf²).
        A point's loss is the larger of the two, so its G is the smaller and its root the
        larger; of two points the larger loss (same segment) gives the larger root, the
        smaller loss (two section counts, the better one chosen) the smaller.
        """
        k = self.k_r
        roots = []
        for e, h2, v2 in self._terms(lev):
            qa = k * (4.0 - e * h2 * k)
            qb = 2.0 * k * e * (2.0 - h2)
            disc = np.sqrt(qb * qb + 4.0 * qa * e * h2)
            with np.errstate(divide="ignore", invalid="ignore"):
                matched = np.where(qa > 0.0, (qb + disc) / (2.0 * qa), np.inf)
            roots.append(np.maximum(matched, e * (1.0 + v2)))
        return self._combine(*roots)
