"""Frequency points of the PA solver: flattened segments and exact worst-case pruning.

The solver (:mod:`core.pa_design`) evaluates each row at a set of frequency points for every
candidate section count N = 1 … S. The points of all (row, N) *segments* are stored flat, in
row-major segment order, so a segment may hold the full evaluation grid (``evaluate``) or only
the few points that can be the worst case (``sweep_p1db`` after :func:`prune`); per-segment
maxima are then one ``np.maximum.reduceat``.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core import rf

__all__ = ["ChosenPoints", "Points", "point_coordinates", "prune"]

F64 = NDArray[np.float64]


@dataclass(frozen=True, slots=True, eq=False)
class Points:
    """Frequency points of every (row, section count) segment, flattened.

    Attributes
    ----------
    f_hz : ndarray, (Q,)
        Frequency of each point (Hz).
    row : ndarray of int, (Q,)
        Row of each point.
    n_sec : ndarray, (Q,)
        Section count N of each point's segment (1 … S, as float).
    seg_starts : ndarray of int, (R·S,)
        First point of segment (row r, N = s + 1) at index r·S + s; segments are contiguous and
        none is empty.
    n_sections : int
        S, the number of section counts.
    uniform : int or None
        Points per segment when every segment holds the same grid of its row (then per-point
        curves can be returned), else None.
    """

    f_hz: F64
    row: NDArray[np.int64]
    n_sec: F64
    seg_starts: NDArray[np.int64]
    n_sections: int
    uniform: int | None

    @classmethod
    def from_grid(cls, f_grid: F64, n_sections: int) -> Points:
        """Every row's grid repeated for each section count.

        Parameters
        ----------
        f_grid : ndarray, (R, F)
            Evaluation frequencies of each row (Hz).
        n_sections : int
            Section counts S (≥ 1).
        """
        n_r, n_f = f_grid.shape
        f = np.broadcast_to(f_grid[:, None, :], (n_r, n_sections, n_f)).reshape(-1)
        row = np.repeat(np.arange(n_r), n_sections * n_f)
        sec = np.tile(np.repeat(np.arange(1, n_sections + 1, dtype=float), n_f), n_r)
        starts = np.arange(n_r * n_sections, dtype=np.int64) * n_f
        return cls(f, row, sec, starts, n_sections, n_f)

    @property
    def n_points(self) -> int:
        return int(self.f_hz.shape[0])

    def seg_max(self, x: F64) -> F64:
        """Maximum of (K, Q) point values over each segment → (K, R, S)."""
        m = np.maximum.reduceat(x, self.seg_starts, axis=-1)
        return m.reshape(*x.shape[:-1], -1, self.n_sections)

    def seg_min(self, x: F64) -> F64:
        """Minimum of (K, Q) point values over each segment → (K, R, S)."""
        m = np.minimum.reduceat(x, self.seg_starts, axis=-1)
        return m.reshape(*x.shape[:-1], -1, self.n_sections)


class ChosenPoints:
    """The points of each row's chosen section count, and per-row maxima over them.

    On a uniform grid the chosen segment of every row is gathered into (K, R·F) arrays and
    maxima are plain reductions; on pruned (ragged) points the arrays keep all (K, Q) points
    and maxima are per-segment reductions picked at the chosen segment.
    """

    def __init__(self, pts: Points, seg: NDArray[np.int64]) -> None:
        self.k_n, self.r_n = seg.shape
        self.uniform = pts.uniform
        self.seg = seg
        self.starts = pts.seg_starts
        self.k_idx = np.arange(self.k_n)[:, None]
        if pts.uniform is not None:
            self.idx = (pts.seg_starts[seg][..., None] + np.arange(pts.uniform)).reshape(
                self.k_n, -1
            )
            self.row = np.repeat(np.arange(self.r_n), pts.uniform)
        else:
            self.row = pts.row

    def take(self, x: F64) -> F64:
        """(Q,) or (K, Q) point values → the chosen points, (K, P′)."""
        if self.uniform is None:
            return x if x.ndim == 2 else x[None, :]
        return x[self.idx] if x.ndim == 1 else x[self.k_idx, self.idx]

    def row_max(self, x: F64) -> F64:
        """Max over each row's chosen points of (K, P′) values → (K, R)."""
        if self.uniform is not None:
            return x.reshape(self.k_n, self.r_n, self.uniform).max(axis=2)
        return np.maximum.reduceat(x, self.starts, axis=1)[self.k_idx, self.seg]


def point_coordinates(q_u: F64, q_sw: F64, pts: Points, f0_hz: F64, bw_frac: F64):
    """The three monotone coordinates of each point: L_p, L_sw and h_N, each (Q,).

    L_p and L_sw are the section losses 8.686·π/(4Q) of the passive and switch Q
    (:func:`core.rf.lossy_section_loss_db`); h_N(f) = |T_N(cos θ/cos θm)|/T_N(sec θm) is the
    Chebyshev response normalised by its scale, obtained from Pozar's small-reflection form with
    R = e² (whose scale ½|ln R| is 1, :func:`core.rf.chebyshev_reflection`).
    """
    h = rf.chebyshev_reflection(
        pts.f_hz, f0_hz[pts.row], np.e**2, pts.n_sec, bw_frac[pts.row], method="pozar_ln"
    )
    return rf.lossy_section_loss_db(q_u), rf.lossy_section_loss_db(q_sw), np.asarray(h)


def _upper_hull(x: F64, y: F64) -> NDArray[np.bool_]:
    """Vertices of conv(points) − R²₊ (the upper-right hull) of one 2-D point set, (F,) mask."""
    order = np.lexsort((-y, -x))  # x descending, then y descending (stable: earlier first)
    pareto: list[int] = []
    best = -np.inf
    for i in order:
        if y[i] > best:
            pareto.append(int(i))
            best = y[i]
    hull: list[int] = []
    for i in pareto:  # x decreasing, y increasing: keep the concave chain
        while len(hull) >= 2:
            o, m = hull[-2], hull[-1]
            cross = (x[m] - x[o]) * (y[i] - y[o]) - (y[m] - y[o]) * (x[i] - x[o])
            if cross <= 0.0:  # m on or below the chord o–i
                hull.pop()
            else:
                break
        hull.append(i)
    keep = np.zeros(x.shape, dtype=bool)
    keep[hull] = True
    return keep


def _pareto_2d(a: F64, h: F64) -> NDArray[np.bool_]:
    """Rule 1 of :func:`prune` where L_sw ≡ 0: points no other is at least as large in both.

    In the order (a descending, h descending, index ascending) every point that could
    dominate i comes before it, and i is dominated exactly when one of those has h ≥ h_i:
    i is kept when h_i exceeds the running maximum before it. Shapes (..., F).
    """
    idx = np.broadcast_to(np.arange(a.shape[-1]), a.shape)
    order = np.lexsort((idx, -h, -a), axis=-1)
    h_sorted = np.take_along_axis(h, order, axis=-1)
    before = np.maximum.accumulate(h_sorted, axis=-1)
    before = np.concatenate([np.full((*a.shape[:-1], 1), -np.inf), before[..., :-1]], axis=-1)
    keep = np.empty(a.shape, dtype=bool)
    np.put_along_axis(keep, order, h_sorted > before, axis=-1)
    return keep


def prune(pts: Points, lp: F64, lsw: F64, h: F64) -> Points:
    """Keep only the points that can be the worst case of any sizing request.

    Every worst-in-band quantity of the solver (P1dB loss, gain loss, driver headroom) is a
    function F = g(L_p, L_sw) + ψ(h) of the coordinates of :func:`point_coordinates`. ψ is
    non-decreasing (the exact |Γ| = a·h/√(1 + a²h²), a = |r − 1|/(2√r), rises with h for every
    ratio r, and the Bode–Fano floor keeps that), and the mismatch loss ψ = 10·log10(1 + a²h²)
    is convex in ln h for every a (a softplus of 2·ln h). g is non-decreasing and convex:
    non-negative weights on L_p and L_sw (section, split and network counts) plus the convex
    driver-compression term max(0, N·L_sec − c). Weights and ratio depend on the request, these
    properties do not. A point i is dropped when

    1. another point is at least as large in all three coordinates (Pareto dominance; of two
       identical points the earlier is kept);
    2. (L_p, L_sw) of i lies below the chord between the max-h points j, k of largest L_p and
       of largest L_sw, and h_i ≤ min(h_j, h_k): g(x_i) ≤ max(g(x_j), g(x_k)) by monotonicity
       and convexity (for a state tuned to its own band, j and k are the two band edges, where
       |T_N| = 1);
    3. on a row without switch loss (L_sw ≡ 0), (L_p, ln h) of i lies inside the upper-right
       hull of the other points: F is convex and non-decreasing in (L_p, ln h), so its maximum
       over the hull is at a vertex. The Bode–Fano floor max(ψ, const) keeps convexity.

    Each rule is exact for every request.

    Parameters
    ----------
    pts : Points
        Uniform points (:meth:`Points.from_grid`).
    lp, lsw, h : ndarray, (Q,)
        Coordinates of every point.

    Returns
    -------
    Points
        The kept points, never an empty segment.
    """
    if pts.uniform is None:
        raise ValueError("pts: pruning needs the uniform grid of Points.from_grid")
    n_f, n_s = pts.uniform, pts.n_sections
    a, c, h = (np.asarray(x, dtype=float).reshape(-1, n_s, n_f) for x in (lp, lsw, h))
    shape = a.shape
    hull_rows = ~(c > 0).any(axis=(1, 2))
    keep = np.empty(shape, dtype=bool)
    keep[hull_rows] = _pareto_2d(a[hull_rows], h[hull_rows])
    sw = ~hull_rows
    if sw.any():
        a3, c3, h3 = a[sw], c[sw], h[sw]
        ge = np.ones((*a3.shape, n_f), dtype=bool)
        gt = np.zeros((*a3.shape, n_f), dtype=bool)
        for x in (a3, c3, h3):
            xi, xj = x[..., :, None], x[..., None, :]
            ge &= xj >= xi
            gt |= xj > xi
        # [i, j] is True when j < i: of two identical points the earlier one is kept.
        earlier = np.arange(n_f)[None, :] < np.arange(n_f)[:, None]
        keep[sw] = ~(ge & (gt | earlier)).any(axis=-1)
    # Rule 2: chord between the anchors j (largest L_p) and k (largest L_sw) of the max-h points.
    top = h >= h.max(axis=-1, keepdims=True) * (1.0 - 1e-9)
    j = np.where(top, a, -np.inf).argmax(axis=-1)[..., None]
    k = np.where(top, c, -np.inf).argmax(axis=-1)[..., None]
    lo, hi = np.zeros(shape), np.ones(shape)
    for x in (a, c):
        xj, xk = np.take_along_axis(x, j, -1), np.take_along_axis(x, k, -1)
        slope, need = xj - xk, x - xk  # need λ·slope ≥ need for some λ in [0, 1]
        safe = np.where(slope == 0, 1.0, slope)
        bound = need / safe
        lo = np.where(slope > 0, np.maximum(lo, bound), lo)
        hi = np.where(slope < 0, np.minimum(hi, bound), hi)
        hi = np.where((slope == 0) & (need > 0), -1.0, hi)
    h_anchor = np.minimum(np.take_along_axis(h, j, -1), np.take_along_axis(h, k, -1))
    idx = np.arange(n_f)
    anchor = (idx == j) | (idx == k)
    keep &= ~((lo <= hi) & (h <= h_anchor) & ~anchor)
    y = np.log(np.maximum(h, 1e-300))  # h = 0: a far-left stand-in, ψ there ≥ ψ(0)
    for r in np.flatnonzero(hull_rows):
        for s in range(n_s):
            kept = np.flatnonzero(keep[r, s])
            if kept.size > 2:  # two points left by rule 1 are both hull vertices
                keep[r, s, kept] = _upper_hull(a[r, s, kept], y[r, s, kept])
    # Never leave a segment empty (cannot happen with the rules above; kept as a guard that
    # errs on the safe side: the whole grid of that segment).
    empty = ~keep.any(axis=-1)
    keep[empty] = True
    flat = keep.reshape(-1)
    counts = keep.sum(axis=-1).reshape(-1)
    starts = np.concatenate(([0], np.cumsum(counts)[:-1])).astype(np.int64)
    return Points(pts.f_hz[flat], pts.row[flat], pts.n_sec[flat], starts, n_s, None)
