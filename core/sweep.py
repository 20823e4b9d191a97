"""P1dB-target sweep of the PA designs, vectorised over the target axis (array sizing).

Used by :func:`core.estimate.sweep_p1db`. The designs are those of
:func:`core.estimate.evaluate`; only the sizing request changes. Two solves cover a study:

- separate single-band rows, one design per row: sample t sizes every row for target t;
- wideband and switched rows, one design per candidate: sample (j, t) sizes the design so that
  band j meets target t, the other rows unconstrained (request 0), K = n_bands × T.

Both solve on the worst-case points only (:func:`core.pa_design.prune_points`, exact for
every request), warm-started between neighbouring targets (:mod:`core.pa_warm`).
"""

from __future__ import annotations

from dataclasses import fields

import numpy as np
import pandas as pd
from numpy.typing import NDArray

from core import pa_warm, rf
from core.architectures import Plan
from core.pa_design import prune_points
from core.pa_layout import LayoutParams, layout
from core.pa_model import BF_GAMMA_LIMIT, DesignBatch, Solution
from core.pa_points import Points
from core.study.model import CandidateKind, DieArrangement, Study

__all__ = ["REASON_TEXT", "sweep_arrays", "sweep_table"]

_REASONS = (
    "P1dB needs more unit cells than the card combines",
    "gain target not reachable within the stage limit",
    "Bode–Fano bound leaves the load unmatched (VSWR > 2)",
)


def _subset(plan: Plan, rows: NDArray[np.int64]) -> tuple[DesignBatch, LayoutParams, dict]:
    """Batch, layout and per-row extras of whole designs ``rows`` (row indices, in order)."""
    b = plan.batch
    n_r = b.n_rows
    grid = b.points.f_hz.reshape(n_r, b.points.n_sections, -1)[:, 0, :]
    group = b.group[rows]
    new_group = np.cumsum(np.r_[True, group[1:] != group[:-1]]) - 1
    starts = np.flatnonzero(np.r_[True, group[1:] != group[:-1]]).astype(np.int64)
    values = {}
    for f in fields(b):
        v = getattr(b, f.name)
        if f.name == "starts":
            v = starts
        elif f.name == "group":
            v = new_group.astype(np.int64)
        elif f.name == "points":
            v = Points.from_grid(grid[rows], b.points.n_sections)
        elif v is not None:
            v = v[rows]
        values[f.name] = v
    lp = LayoutParams(**{f.name: getattr(plan.layout, f.name)[rows] for f in fields(plan.layout)})
    extra = {
        "overhead": plan.overhead[rows],
        "min_die": plan.min_die_mm2[rows],
        "gain_target": plan.gain_target_db[rows],
    }
    return DesignBatch(**values), lp, extra


#: Every ``_ANCHOR_STEP``-th target (at least) is searched in full and brackets the others.
_ANCHOR_STEP = 32


def _solve_part(full: DesignBatch, p_req: NDArray[np.float64]) -> tuple[DesignBatch, Solution]:
    pruned = prune_points(full)
    return pruned, pa_warm.solve_warm(pruned, p_req, _ANCHOR_STEP)


def _part(study: Study, plan: Plan, rows: NDArray[np.int64], x: NDArray, grouped: bool):
    """Per-row (T, R_part) results of one solve: feasible, DC, die area, reason code.

    ``x`` (B, T) holds the targets of each band: a row of band b is sized for x[b, t].
    """
    b, lp, extra = _subset(plan, rows)
    n_b, n_t = x.shape
    n_r = rows.shape[0]
    band = plan.row_band[rows]
    p = np.asarray(rf.dbm_to_w(x + study.estimator.p1db_margin_db))
    if grouped:
        p_req = np.where(band[None, None, :] == np.arange(n_b)[:, None, None], p[:, :, None], 0.0)
        p_req = p_req.reshape(n_b * n_t, n_r)
        x_req = x.reshape(-1, 1)  # samples are (band, target)-major
    else:
        p_req = np.ascontiguousarray(p[band].T)
        x_req = x[band].T
    pruned, sol = _solve_part(b, p_req)
    lay = layout(pruned, lp, sol, extra["overhead"])
    g = b.group
    cells_bad = ~sol.cells_ok[:, g] & (sol.worst_p1db_dbm < x_req)
    gain_bad = ~sol.gain_found[:, g] & (sol.worst_gain_db < extra["gain_target"][None, :])
    bf_bad = np.broadcast_to(sol.bf_gamma > BF_GAMMA_LIMIT, cells_bad.shape)
    code = cells_bad.astype(int) + 2 * gain_bad + 4 * bf_bad
    dc = sol.dc_out_w + sol.dc_drivers_w
    cand = [plan.candidates[i] for i in plan.row_cand[rows]]
    shared = np.array(
        [
            c.kind == CandidateKind.SEPARATE and c.die_arrangement == DieArrangement.SHARED_DIE
            for c in cand
        ]
    )
    a_design = lay["area_design_mm2"][:, g]
    area = np.where(shared[None, :], a_design, np.maximum(extra["min_die"][None, :], a_design))
    if grouped:  # keep sample (j, t) for the row of band j
        pick = band[None, :] * n_t + np.arange(n_t)[:, None]
        code, dc, area = (np.take_along_axis(v, pick, axis=0) for v in (code, dc, area))
    return code, dc, area


def sweep_arrays(study: Study, plan: Plan, x: NDArray[np.float64]) -> dict[str, NDArray]:
    """Reason code, DC power and die area of every row × target, each (R, T).

    ``x`` is (T,) — the same targets for every band — or (B, T), the targets of each band
    (a row of band b is sized for x[b]). Code bits: 1 cells, 2 gain, 4 Bode–Fano
    (:data:`_REASONS`); 0 is feasible. ``target`` (R, T) is each row's target.
    """
    n_b = len(plan.bands)
    x = np.asarray(x, dtype=float)
    x2 = np.broadcast_to(x, (n_b, x.shape[-1])) if x.ndim == 1 else x
    if x2.shape[0] != n_b:
        raise ValueError(f"x: must have one row of targets per band ({n_b}), got {x2.shape[0]}")
    kinds = np.array([c.kind for c in plan.candidates], dtype=object)[plan.row_cand]
    separate = kinds == CandidateKind.SEPARATE
    n_t, n_r = x2.shape[1], plan.n_rows
    code = np.zeros((n_t, n_r), dtype=int)
    dc = np.zeros((n_t, n_r))
    area = np.zeros((n_t, n_r))
    for mask, grouped in ((separate, False), (~separate, True)):
        rows = np.flatnonzero(mask)
        if rows.size:
            code[:, rows], dc[:, rows], area[:, rows] = _part(study, plan, rows, x2, grouped)
    return {"code": code.T, "dc_power_w": dc.T, "die_area_mm2": area.T, "target": x2[plan.row_band]}


#: Reason text of each code 0 … 7 (bits of :data:`_REASONS`).
REASON_TEXT = tuple(
    "; ".join(r for bit, r in enumerate(_REASONS) if c >> bit & 1) for c in range(8)
)


def sweep_table(study: Study, plan: Plan, x: NDArray[np.float64]) -> pd.DataFrame:
    """Rows candidate × band × target of :func:`core.estimate.sweep_p1db`."""
    arr = sweep_arrays(study, plan, x)
    n_t = arr["code"].shape[1]
    code = arr["code"].reshape(-1)
    names = np.array([c.name for c in plan.candidates], dtype=object)[plan.row_cand]
    bands = np.array([b.name for b in plan.bands], dtype=object)[plan.row_band]
    return pd.DataFrame(
        {
            "candidate": np.repeat(names, n_t),
            "band": np.repeat(bands, n_t),
            "p1db_target_dbm": arr["target"].reshape(-1),
            "feasible": code == 0,
            "dc_power_w": arr["dc_power_w"].reshape(-1),
            "die_area_mm2": arr["die_area_mm2"].reshape(-1),
            "reason": np.array(REASON_TEXT, dtype=object)[code],
        }
    )
