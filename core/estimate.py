"""PA architecture estimator: evaluate every candidate of a study on every band (DESIGN.md §4, §6).

Public entry points:

- :func:`evaluate` — scorecard, curves, designs, per-candidate summary, findings and the
  derivation of every number;
- :func:`sweep_p1db` — die area and DC power versus the P1dB target, for array sizing.

The model is closed form and vectorised; its chain lives in :mod:`core.pa_design` (sizing,
gain, P1dB, efficiency), :mod:`core.pa_layout` (switches, area), :mod:`core.architectures`
(how separate, wideband and switched candidates become designs) and :mod:`core.derivations`.

Array-level conventions (used by ``summary``):

- a radio channel is one array element; **separate** PAs put one PA per band on each element
  (PA count Σ_b n_elements_b, one PA per element per band), the **wideband** and **switched**
  PAs serve every band from one shared array (PA count max_b n_elements_b);
- bands of a separate candidate do not transmit at once, so the array DC power is the largest
  over bands of n_elements_b × (DC of the band's PA); the same rule applies to the others;
- ``worst_margin_db`` is the smallest gain or P1dB margin over the bands (dB); PAE margins are
  in points and are reported apart as ``worst_pae_margin_pts``.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
from numpy.typing import NDArray

from core import rf
from core.architectures import build_plan
from core.derivations import SolvedStudy, derivation_makers, die_tables
from core.evaluation import (
    CURVE_COLUMNS,
    DESIGN_COLUMNS,
    SCORECARD_COLUMNS,
    SUMMARY_COLUMNS,
    Derivation,
    Derivations,
    Evaluation,
    Finding,
    Status,
)
from core.pa_design import solve
from core.pa_layout import layout
from core.pa_model import BF_GAMMA_LIMIT, bode_fano_headroom_db
from core.study.model import CandidateKind, Study
from core.study.validate import check_study
from core.sweep import REASON_TEXT, sweep_arrays, sweep_table

__all__ = [
    "Derivation",
    "Evaluation",
    "Finding",
    "Status",
    "evaluate",
    "sweep_p1db",
    "sweep_p1db_per_band",
]

_METRICS = ("gain", "p1db", "pae")
_UNITS = ("dB", "dBm", "%")


def _validated(study: Study) -> None:
    errors = [p for p in check_study(study) if p.severity == "error"]
    if errors:
        raise ValueError("; ".join(str(p) for p in errors))


def _solve_study(study: Study) -> SolvedStudy:
    plan = build_plan(study)
    p_req = np.asarray(rf.dbm_to_w(plan.p1db_target_dbm + study.estimator.p1db_margin_db))
    sol = solve(plan.batch, p_req[None, :])
    lay = layout(plan.batch, plan.layout, sol, plan.overhead)
    return SolvedStudy.from_solution(study, plan, sol, lay)


def evaluate(study: Study) -> Evaluation:
    """Evaluate every enabled candidate of ``study`` on every band.

    Parameters
    ----------
    study : Study
        The study; only enabled candidates are evaluated.

    Returns
    -------
    Evaluation
        Empty frames (with their columns) when no candidate is enabled.

    Raises
    ------
    ValueError
        If the study is invalid (:func:`core.study.check_study` errors, joined, each naming
        its field path).

    Notes
    -----
    ``design`` columns: stages and the flat stage gain; output and driver periphery; unit cells
    (count, width, the 1/f-scaled limit); Chebyshev sections of the output network and of each
    input/interstage network with the latter's worst in-band loss; worst in-band output-network
    loss (N·L_sec + mismatch, without the combiner), worst mismatch, split levels and combiner
    loss, band-select loss; worst passive and effective Q; the switch that is on in the state
    (width, Ron, Coff, worst Q, loss of the output network's switches, off-state voltage,
    stack count, switches in the state; zeros and Q = inf where none is on); the smallest
    driver headroom (inf without drivers); device P1dB; DC power at P1dB (total and
    drivers); drain efficiency; the Bode–Fano minimum |Γ|, the design ripple and the headroom
    20·log10(ripple/Γ_min) (negative = Bode–Fano limited: the estimate then uses the bound; a
    bound above |Γ| = 1/3, VSWR 2:1, is infeasible); and the area parts of the die (per die;
    ``area_total_mm2`` after overhead and the minimum die area, except on a shared separate
    die, where it is the design's share before the minimum).

    References
    ----------
    DESIGN.md §4 (the model) and §6 (scorecard); the sources of each step are in
    :mod:`core.pa_design` and :mod:`core.pa_layout`.

    Examples
    --------
    >>> from core.study import Study
    >>> ev = evaluate(Study.new())
    >>> sorted(set(ev.scorecard["metric"]))
    ['gain', 'p1db', 'pae']
    """
    _validated(study)
    if not any(c.enabled for c in study.candidates):
        return Evaluation.empty()
    ss = _solve_study(study)
    findings = tuple(_findings(ss))
    return Evaluation(
        scorecard=_scorecard(ss),
        curves=_curves(ss),
        design=_design(ss),
        summary=_summary(ss, findings),
        findings=findings,
        derivations=Derivations(derivation_makers(ss)),
    )


# --- frames -------------------------------------------------------------------------------------


def _scorecard(ss: SolvedStudy) -> pd.DataFrame:
    n = ss.plan.n_rows
    est = np.stack([ss.gain_db, ss.p1db_dbm, ss.pae_pct], axis=1).reshape(-1)
    tgt = np.stack([ss.plan.gain_target_db, ss.plan.p1db_target_dbm, ss.plan.pae_target_pct], 1)
    tgt = tgt.reshape(-1)
    return pd.DataFrame(
        {
            "candidate": np.repeat(ss.cand_name, 3),
            "band": np.repeat(ss.band_name, 3),
            "metric": np.tile(np.array(_METRICS, dtype=object), n),
            "unit": np.tile(np.array(_UNITS, dtype=object), n),
            "estimate": est,
            "target": tgt,
            "margin": ss.margin.reshape(-1),
            "status": ss.status.reshape(-1),
        },
        columns=list(SCORECARD_COLUMNS),
    )


def _curves(ss: SolvedStudy) -> pd.DataFrame:
    c = ss.curves
    n_f = c["f_hz"].shape[-1]
    return pd.DataFrame(
        {
            "candidate": np.repeat(ss.cand_name, n_f),
            "band": np.repeat(ss.band_name, n_f),
            "f_hz": c["f_hz"].reshape(-1),
            "gain_db": c["gain_db"].reshape(-1),
            "p1db_dbm": c["p1db_dbm"].reshape(-1),
            "pae_pct": 100.0 * c["pae"].reshape(-1),
        },
        columns=list(CURVE_COLUMNS),
    )


def _design(ss: SolvedStudy) -> pd.DataFrame:
    p, d = ss.plan, ss.dstarts
    c = ss.curves

    def hi(x: NDArray) -> NDArray:  # worst (largest) over the design row's members and band
        x = x.max(axis=-1) if x.ndim == 2 else x
        return np.maximum.reduceat(x, d)

    def lo(x: NDArray) -> NDArray:
        x = x.min(axis=-1) if x.ndim == 2 else x
        return np.minimum.reduceat(x, d)

    g = p.batch.group[d]
    sw = {k: v[d] for k, v in ss.switch.items()}
    ripple = hi(ss.gamma_max)
    bf = hi(ss.bf_gamma)
    n_cells = ss.n_cells[g]
    return pd.DataFrame(
        {
            "candidate": ss.cand_name[d],
            "design": np.array(p.dlabels, dtype=object),
            "kind": ss.kind[d],
            "stages": ss.n_stages[g],
            "stage_gain_db": lo(p.batch.stage_gain_db),
            "w_out_mm": ss.w_out_mm[g],
            "w_drivers_mm": ss.w_drivers_mm[d],
            "n_cells": n_cells,
            "cell_width_mm": ss.w_out_mm[g] / n_cells,
            "cell_width_max_mm": p.batch.cell_max_mm[d],
            "sections": ss.n_sections[g],
            "interstage_sections": ss.interstage_sections[g],
            "interstage_loss_db": hi(ss.interstage_db),
            "output_loss_db": hi(c["network_db"] + c["mismatch_db"]),
            "mismatch_db": hi(c["mismatch_db"]),
            "combiner_levels": ss.levels[g],
            "combiner_loss_db": hi(c["combiner_db"]),
            "band_select_loss_db": p.batch.band_select_db[d],
            "q_passive": lo(c["q_u"]),
            "q_eff": lo(c["q_eff"]),
            "switch_width_mm": sw["switch_width_mm"],
            "switch_ron_ohm": sw["switch_ron_ohm"],
            "switch_coff_ff": sw["switch_coff_ff"],
            "switch_q": sw["switch_q"],
            "switch_loss_db": sw["switch_loss_db"],
            "switch_v_off_v": sw["switch_v_off_v"],
            "switch_stack": sw["switch_stack"],
            "n_switches": sw["n_switches"],
            "driver_headroom_db": lo(ss.headroom_db),
            "p1db_device_dbm": ss.p_dev_dbm[d],
            "dc_power_w": ss.dc_w[d],
            "dc_drivers_w": ss.dc_drivers_w[d],
            "drain_eff_pct": 100.0 * p.batch.eta[d],
            "bode_fano_gamma_min": bf,
            "ripple_gamma_max": ripple,
            "bode_fano_headroom_db": bode_fano_headroom_db(ripple, bf),
            **{k: v[g] for k, v in ss.area.items()},
            "area_total_mm2": ss.area_per_design[g],
        },
        columns=list(DESIGN_COLUMNS),
    )


def _summary(ss: SolvedStudy, findings: tuple[Finding, ...]) -> pd.DataFrame:
    dies = die_tables(ss)
    p = ss.plan
    n_c = len(p.candidates)
    rc = p.row_cand
    starts = np.flatnonzero(np.r_[True, rc[1:] != rc[:-1]])
    kind = [c.kind for c in p.candidates]
    separate = np.array([k == CandidateKind.SEPARATE for k in kind])
    dc_worst = np.maximum.reduceat(ss.dc_w, starts)
    pa_sum = np.add.reduceat(p.n_elements, starts)
    pa_max = np.maximum.reduceat(p.n_elements, starts)
    array_dc = np.maximum.reduceat(p.n_elements * ss.dc_w, starts)
    m = ss.margin
    worst_db = np.minimum.reduceat(np.minimum(m[:, 0], m[:, 1]), starts)
    worst_pae = np.minimum.reduceat(m[:, 2], starts)
    st = ss.status

    def count(s: Status) -> NDArray:
        return np.add.reduceat((st == s).sum(axis=1), starts)

    n_inf = count(Status.INFEASIBLE)
    errors = {f.candidate for f in findings if f.severity == "error"}
    return pd.DataFrame(
        {
            "candidate": ss.cand_name[starts],
            "kind": ss.kind[starts],
            "process": np.array([c.name for c in p.cards], dtype=object),
            "n_dies": dies["n_dies"],
            "die_area_mm2": dies["die_area_mm2"],
            "total_die_area_mm2": dies["total_die_area_mm2"],
            "die_width_mm": dies["die_width_mm"],
            "die_height_mm": dies["die_height_mm"],
            "dc_power_w": dc_worst,
            "pa_count_per_radio": np.where(separate, pa_sum, pa_max).astype(np.int64),
            "array_dc_power_w": array_dc,
            "worst_margin_db": worst_db,
            "worst_pae_margin_pts": worst_pae,
            "n_misses": count(Status.MISSES),
            "n_marginal": count(Status.MARGINAL),
            "n_infeasible": n_inf,
            "feasible": np.array(
                [n_inf[i] == 0 and p.candidates[i].name not in errors for i in range(n_c)]
            ),
        },
        columns=list(SUMMARY_COLUMNS),
    )


#: Gain above target (dB) beyond which a shared design's state gets a caution; common practice
#: (a 10 dB surplus is far beyond what equalisation or margin would explain).
_EXCESS_GAIN_DB = 10.0


def _findings(ss: SolvedStudy) -> list[Finding]:
    """Errors for unreachable requests, warnings for cautions, in row order."""
    out: list[Finding] = []
    p = ss.plan
    b = p.batch
    switched = {c.name for c in ss.study.candidates if c.kind == CandidateKind.SWITCHED}
    for r in range(p.n_rows):
        g = b.group[r]

        def add(severity: str, msg: str, r: int = r) -> None:
            out.append(Finding(str(ss.cand_name[r]), str(ss.band_name[r]), severity, msg))

        bw = f"the {ss.design_bw_ghz[r]:.3g} GHz design band"
        if ss.bf_infeasible[r]:
            add(
                "error",
                f"Bode–Fano limit: the Ropt–Cout load cannot be matched below |Γ| = "
                f"{ss.bf_gamma[r]:.3g} over {bw} (worse than VSWR 2:1, |Γ| = "
                f"{BF_GAMMA_LIMIT:.3g}); narrow the design band or use a device with less "
                "output capacitance per mm.",
            )
        elif ss.bf_limited[r]:
            add(
                "warning",
                f"The output match is Bode–Fano limited: |Γ| ≥ {ss.bf_gamma[r]:.3g} "
                f"over {bw}, above the {ss.gamma_max[r]:.3g} ripple of the Chebyshev network; "
                "the estimate uses the bound.",
            )
        members = np.flatnonzero(b.group == g)
        if not ss.cells_ok[g]:
            # The band whose request is furthest out of reach sets the cell count; every band
            # of the design gets a finding, and the others point to it.
            gov = int(members[np.argmax(p.p1db_target_dbm[members] - ss.p1db_dbm[members])])
            short = ss.p1db_dbm[r] < p.p1db_target_dbm[r]
            if r == gov:
                msg = (
                    f"P1dB {p.p1db_target_dbm[r]:g} dBm "
                    f"(+{ss.study.estimator.p1db_margin_db:g} dB margin) needs "
                    f"{ss.n_cells_needed[g]:.0f} unit cells of at most "
                    f"{1e3 * b.cell_max_mm[r]:.0f} µm; the card combines at most "
                    f"{b.max_cells[r]:.0f}. Best reachable: {ss.p1db_dbm[r]:.1f} dBm."
                )
            else:
                msg = (
                    f"The shared design is held at {b.max_cells[r]:.0f} unit cells by the P1dB "
                    f"target of {ss.band_name[gov]}; best reachable here: "
                    f"{ss.p1db_dbm[r]:.1f} dBm against {p.p1db_target_dbm[r]:g} dBm "
                    f"(+{ss.study.estimator.p1db_margin_db:g} dB margin)."
                )
            add("error" if short else "warning", msg)
        if not ss.gain_found[g]:
            if ss.gain_db[r] < p.gain_target_db[r]:
                add(
                    "error",
                    f"Gain {p.gain_target_db[r]:g} dB is not reachable within "
                    f"{b.max_stages[r]} stages of {b.stage_gain_db[r]:.1f} dB: best "
                    f"{ss.gain_db[r]:.1f} dB.",
                )
            else:
                add(
                    "info",
                    f"Gain target {p.gain_target_db[r]:g} dB is met ({ss.gain_db[r]:.1f} dB), "
                    f"but not with the +{ss.study.estimator.gain_margin_db:g} dB design "
                    f"margin within {b.max_stages[r]} stages of {b.stage_gain_db[r]:.1f} dB.",
                )
        excess = ss.gain_db[r] - p.gain_target_db[r]
        if excess > _EXCESS_GAIN_DB and str(ss.cand_name[r]) in switched:
            add(
                "info",
                f"Gain is {excess:.0f} dB above the target in this state: the switched "
                "design's stage count is set by its highest band. In practice surplus stages "
                "are bypassed or biased down here; the PAE shown still pays for driving them, "
                "and stability needs checking.",
            )
        head = float(ss.headroom_db[r].min())
        if head < 0.0:
            ratio = b.drive_ratio[r] * 10.0 ** (head / 10.0)
            add(
                "warning",
                f"The last driver compresses {-head:.2f} dB before the output "
                f"stage; P1dB is lowered by that much. A drive ratio of {ratio:.2f} or less "
                "keeps it clear.",
            )
        if ss.switch["switch_stack"][r] > 1.0:
            add(
                "warning",
                f"Off-state swing {ss.switch['switch_v_off_v'][r]:.2f} V across the "
                f"output switch exceeds {p.layout.switch_v_max_v[r]:g} V per FET: stack "
                f"{ss.switch['switch_stack'][r]:.0f} FETs (counted in the area as n² gate "
                "area).",
            )
    return out


# --- P1dB sweep ----------------------------------------------------------------------------------


def sweep_p1db(study: Study, p1db_dbm: NDArray[np.float64]) -> pd.DataFrame:
    """Die area and DC power of every enabled candidate × band versus the P1dB target.

    For each band b and each target x the candidate's design is built with the rules of
    :func:`evaluate` (sections, cells and stages chosen per target, gain targets and margins of
    the study), sized so that band b's worst in-band P1dB meets x + the P1dB design margin;
    the other bands' P1dB targets are set aside. A separate candidate's band-b row is then its
    band-b PA; a wideband or switched design serves every band with one periphery, so the
    design a set of per-band targets needs is at least the largest of its per-band rows, and
    equal to it when those rows agree on the section count (the usual case: the section
    count is chosen for the requests, see :mod:`core.pa_design`). The targets are a
    vectorised axis (no loop over them).

    Parameters
    ----------
    study : Study
        A valid study.
    p1db_dbm : array_like, (T,)
        P1dB targets at the RF port (dBm), finite.

    Returns
    -------
    DataFrame
        candidate, band, p1db_target_dbm, feasible, dc_power_w (per PA at P1dB),
        die_area_mm2 (the band's die; the design's share of a shared separate die; the whole
        die of a wideband or switched PA), reason ('' when feasible), T rows per candidate ×
        band, candidate-major.

    Raises
    ------
    ValueError
        On an invalid study or a non-finite or non-1-D ``p1db_dbm``.

    Examples
    --------
    >>> from core.study import Study
    >>> df = sweep_p1db(Study.new(), np.array([20.0, 25.0, 30.0]))
    >>> list(df["feasible"])
    [True, True, True]
    """
    x = np.asarray(p1db_dbm, dtype=float)
    if x.ndim != 1 or x.size == 0:
        raise ValueError("p1db_dbm: must be a non-empty 1-D array of targets in dBm")
    if not np.isfinite(x).all():
        raise ValueError("p1db_dbm: must be finite")
    _validated(study)
    cols = [
        "candidate",
        "band",
        "p1db_target_dbm",
        "feasible",
        "dc_power_w",
        "die_area_mm2",
        "reason",
    ]
    if not any(c.enabled for c in study.candidates):
        return pd.DataFrame({c: pd.Series(dtype=object) for c in cols})
    return sweep_table(study, build_plan(study), x)[cols]


def sweep_p1db_per_band(study: Study, p1db_dbm: NDArray[np.float64]) -> dict[str, NDArray]:
    """:func:`sweep_p1db` with its own targets for each band, as arrays (array sizing).

    One solve covers every band: the row of band b is sized for ``p1db_dbm[b]``, with the
    same rules and results as :func:`sweep_p1db` at those targets.

    Parameters
    ----------
    study : Study
        A valid study.
    p1db_dbm : array_like, (B, T)
        P1dB targets at the RF port (dBm) of each of the study's B bands, finite.

    Returns
    -------
    dict of ndarray
        ``candidate`` and ``band`` (R,) names of the enabled candidate × band rows
        (candidate-major); ``p1db_target_dbm``, ``feasible``, ``dc_power_w``,
        ``die_area_mm2`` and ``reason`` (R, T), as the columns of :func:`sweep_p1db`.

    Raises
    ------
    ValueError
        On an invalid study or targets that are not finite or not (B, T).

    Examples
    --------
    >>> from core.study import Study
    >>> out = sweep_p1db_per_band(Study.new(), np.array([[20.0, 25.0]]))
    >>> out["feasible"].tolist()
    [[True, True]]
    """
    x = np.asarray(p1db_dbm, dtype=float)
    if x.ndim != 2 or x.shape[0] != len(study.bands) or x.shape[1] == 0:
        raise ValueError(
            f"p1db_dbm: must be a (bands, targets) array with {len(study.bands)} rows, "
            f"got shape {x.shape}"
        )
    if not np.isfinite(x).all():
        raise ValueError("p1db_dbm: must be finite")
    _validated(study)
    if not any(c.enabled for c in study.candidates):
        empty = np.empty(0, dtype=object)
        e2 = np.empty((0, x.shape[1]))
        return {
            "candidate": empty,
            "band": empty,
            "p1db_target_dbm": e2,
            "feasible": e2.astype(bool),
            "dc_power_w": e2,
            "die_area_mm2": e2,
            "reason": e2.astype(object),
        }
    plan = build_plan(study)
    arr = sweep_arrays(study, plan, x)
    return {
        "candidate": np.array([c.name for c in plan.candidates], dtype=object)[plan.row_cand],
        "band": np.array([b.name for b in plan.bands], dtype=object)[plan.row_band],
        "p1db_target_dbm": arr["target"],
        "feasible": arr["code"] == 0,
        "dc_power_w": arr["dc_power_w"],
        "die_area_mm2": arr["die_area_mm2"],
        "reason": np.array(REASON_TEXT, dtype=object)[arr["code"]],
    }
