"""The three architectures as design batches: separate, wideband and switched (DESIGN.md §4).

:func:`build_plan` turns the enabled candidates of a study into one
:class:`core.pa_design.DesignBatch` whose rows are (candidate, band) pairs, in candidate order
and band order:

- **separate** single-band PAs: one design per band, tuned to its own band. When the outputs
  share an antenna feed through a band-select switch or a diplexer, its loss is paid in P1dB
  and PAE (it sits after the PA's output port, so the gain target, taken at the PA's ports, is
  unaffected). With a single band there is nothing to select, and no loss is applied.
- **wideband**: one design tuned over the union of the bands (:meth:`core.bands.Band.union`);
  its flat gain is set by the top of the union, its harmonic control by the union's width.
- **switched**: one design whose networks are retuned by FET switches; each state is tuned to
  its own band. The highest-centre state has every switch off (lossless Coff); state b turns
  on switches of ratio κ_b = (f0_top/f0_b)^(2/m) (:func:`core.rf.switched_kappa`). Its unit
  cells must work in every state, so the cell limit uses the highest band edge.

The design frame lists one design per separate band, one "union" design per wideband
candidate and one design row per switched state.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core import rf
from core.bands import Band
from core.pa_layout import LayoutParams
from core.pa_model import DesignBatch, drain_efficiency
from core.pa_points import Points
from core.process import ProcessCard
from core.study.model import Candidate, CandidateKind, Combining, Study

__all__ = ["UNION_DESIGN", "Plan", "band_grid", "build_plan"]

#: Design name of a wideband candidate's single design.
UNION_DESIGN = "union"


@dataclass(frozen=True, slots=True, eq=False)
class Plan:
    """A study's enabled candidates laid out as rows, designs and design-frame rows.

    Attributes
    ----------
    candidates, cards
        Enabled candidates and their process cards, in study order.
    bands
        The study's bands (SI).
    batch, layout
        Solver and layout inputs, rows (R,) = candidates × bands.
    row_cand, row_band
        Candidate and band index of each row, (R,).
    dstarts, dlabels
        First row and name of each design-frame row (a separate band, a wideband "union",
        a switched state).
    overhead, min_die_mm2, aspect
        Layout overhead factor, minimum die area, die aspect ratio per row.
    gain_target_db, p1db_target_dbm, pae_target_pct, n_elements
        Band targets and array size per row.
    f_top_hz, design_low_hz, design_high_hz
        Top of the design band (flat-gain reference) and design band edges per row.
    """

    candidates: tuple[Candidate, ...]
    cards: tuple[ProcessCard, ...]
    bands: tuple[Band, ...]
    batch: DesignBatch
    layout: LayoutParams
    row_cand: NDArray[np.int64]
    row_band: NDArray[np.int64]
    dstarts: NDArray[np.int64]
    dlabels: tuple[str, ...]
    overhead: NDArray[np.float64]
    min_die_mm2: NDArray[np.float64]
    aspect: NDArray[np.float64]
    gain_target_db: NDArray[np.float64]
    p1db_target_dbm: NDArray[np.float64]
    pae_target_pct: NDArray[np.float64]
    n_elements: NDArray[np.float64]

    @property
    def n_rows(self) -> int:
        return int(self.row_cand.shape[0])


def band_grid(bands: tuple[Band, ...], n_points: int) -> NDArray[np.float64]:
    """Evaluation grid of each band: ``n_points`` from f_low to f_high, shape (n_bands, n)."""
    lo = np.array([b.f_low_hz for b in bands])
    hi = np.array([b.f_high_hz for b in bands])
    t = np.linspace(0.0, 1.0, n_points)
    return lo[:, None] + (hi - lo)[:, None] * t[None, :]


def _load_line(card: ProcessCard, index: int) -> tuple[float, float]:
    try:
        ropt, pmax = rf.load_line(card.vdd_v, card.v_knee_v, card.i_max_a_per_mm)
    except ValueError as exc:
        raise ValueError(f"process_cards[{index}] ({card.name}).{exc}") from None
    return float(ropt), float(pmax)


def build_plan(study: Study) -> Plan:
    """Rows, designs and inputs of every enabled candidate of ``study``.

    Parameters
    ----------
    study : Study
        A valid study (see :func:`core.study.check_study`) with at least one enabled
        candidate.

    Returns
    -------
    Plan

    Raises
    ------
    ValueError
        If a candidate names no process card (``candidates[i].process``) or a card's load line
        is impossible (``vdd_v`` not above ``v_knee_v``).
    """
    est = study.estimator
    bands = tuple(b.band for b in study.bands)
    n_b = len(bands)
    card_index = {c.name: i for i, c in enumerate(study.process_cards)}
    cands: list[Candidate] = []
    for i, cand in enumerate(study.candidates):
        if not cand.enabled:
            continue
        if cand.process not in card_index:
            raise ValueError(f"candidates[{i}].process: names no process card ({cand.process!r})")
        cands.append(cand)
    cards = [study.process_cards[card_index[c.process]] for c in cands]
    line = {c.name: _load_line(c, card_index[c.name]) for c in cards}
    n_c = len(cands)

    def per_cand(values: list) -> NDArray:  # (C,) → (R,), candidate-major rows
        return np.repeat(np.asarray(values), n_b)

    def card_field(name: str) -> NDArray[np.float64]:
        return per_cand([float(getattr(c, name)) for c in cards])

    kind = per_cand([c.kind.value for c in cands])
    sep, wide, swi = (kind == k.value for k in CandidateKind)
    lo = np.tile([b.f_low_hz for b in bands], n_c)
    hi = np.tile([b.f_high_hz for b in bands], n_c)
    f0 = 0.5 * (lo + hi)
    union = Band.union(bands)
    d_lo = np.where(wide, union.f_low_hz, lo)
    d_hi = np.where(wide, union.f_high_hz, hi)
    d_f0 = 0.5 * (d_lo + d_hi)
    bw = (d_hi - d_lo) / d_f0
    # Switched states: the highest-centre state has every switch off; κ_b = (f0_top/f0_b)^(2/m).
    m = np.where(swi, per_cand([float(c.switched_elements) for c in cands]), 1.0)
    lower = swi & (f0 < f0.max() * (1.0 - 1e-12))
    kappa = np.ones(n_c * n_b)
    if lower.any():
        kappa[lower] = rf.switched_kappa(f0.max(), f0[lower], m[lower])
    n_states = np.where(swi, float(len(np.unique(f0))), 1.0)
    cell_top = np.where(swi, hi.max(), d_hi)
    f0_area = np.where(swi, union.f0_hz, d_f0)
    combining = per_cand([c.combining.value for c in cands])
    select = sep & (combining != Combining.SEPARATE_FEEDS.value) & (n_b > 1)
    first = np.tile(np.arange(n_b) == 0, n_c)
    starts = np.flatnonzero(sep | first)
    group = np.cumsum(sep | first) - 1
    dstarts = np.flatnonzero(~wide | first)
    names = [b.name for b in study.bands]
    dlabels = tuple(UNION_DESIGN if wide[r] else names[r % n_b] for r in dstarts)
    ropt = per_cand([line[c.name][0] for c in cards])
    pmax = per_cand([line[c.name][1] for c in cards])
    comp = card_field("compression_db")
    q_ref_hz = per_cand([c.q_ref_hz for c in cards])
    targets = [b.targets for b in study.bands]
    tgt = {
        k: np.tile([getattr(t, k) for t in targets], n_c)
        for k in ("gain_db", "p1db_dbm", "pae_pct")
    }
    batch = DesignBatch(
        starts=starts.astype(np.int64),
        group=group.astype(np.int64),
        points=Points.from_grid(
            np.tile(band_grid(bands, est.freq_points), (n_c, 1)), int(est.max_sections)
        ),
        f0_hz=d_f0,
        bw_frac=bw,
        f_low_hz=d_lo,
        f_high_hz=d_hi,
        kappa=kappa,
        p1db_w_per_mm=pmax * 10.0 ** (-comp / 10.0),
        ropt_ohm_mm=ropt,
        c_out_f_per_mm=per_cand([c.c_out_f_per_mm for c in cards]),
        swing_v=card_field("vdd_v") - card_field("v_knee_v"),
        vdd_v=card_field("vdd_v"),
        i_max_a_per_mm=card_field("i_max_a_per_mm"),
        driver_bias=card_field("driver_bias_pct") / 100.0,
        q_ref=card_field("q_passive"),
        q_ref_hz=q_ref_hz,
        q_exponent=card_field("q_exponent"),
        f_c_hz=per_cand([c.switch_cutoff_hz for c in cards]),
        stage_gain_db=np.asarray(
            rf.available_stage_gain_db(
                per_cand([c.fmax_hz for c in cards]), d_hi, card_field("stage_derating_db")
            )
        ),
        eta=np.asarray(
            drain_efficiency(
                card_field("drain_eff_tuned_pct") / 100.0,
                card_field("drain_eff_untuned_pct") / 100.0,
                card_field("harmonic_bw_pct") / 100.0,
                bw,
            )
        ),
        band_select_db=np.where(select, per_cand([c.band_select_loss_db for c in cands]), 0.0),
        gain_req_db=tgt["gain_db"] + est.gain_margin_db,
        cell_max_mm=card_field("cell_width_mm") * q_ref_hz / cell_top,
        max_cells=card_field("max_cells"),
        stages_fixed=per_cand([c.stages or 0 for c in cands]).astype(np.int64),
        max_stages=np.full(n_c * n_b, est.max_stages, dtype=np.int64),
        drive_ratio=np.full(n_c * n_b, float(est.drive_ratio)),
    )
    layout = LayoutParams(
        m_elements=m,
        n_states=n_states,
        f0_area_hz=f0_area,
        ron_w_ohm_mm=card_field("ron_w_ohm_mm"),
        coff_f_per_mm=per_cand([c.coff_per_w_f_per_mm for c in cards]),
        switch_v_max_v=card_field("switch_v_max_v"),
        active_mm2_per_mm=card_field("active_area_mm2_per_mm"),
        pitch_mm=card_field("line_pitch_mm"),
        eps_eff=card_field("eps_eff"),
        rf_pad_mm2=card_field("rf_pad_area_mm2"),
        dc_pad_mm2=card_field("dc_pad_area_mm2"),
        control_mm2=card_field("control_area_mm2"),
    )
    return Plan(
        candidates=tuple(cands),
        cards=tuple(cards),
        bands=bands,
        batch=batch,
        layout=layout,
        row_cand=np.repeat(np.arange(n_c), n_b),
        row_band=np.tile(np.arange(n_b), n_c),
        dstarts=dstarts.astype(np.int64),
        dlabels=dlabels,
        overhead=card_field("layout_overhead"),
        min_die_mm2=card_field("min_die_area_mm2"),
        aspect=card_field("die_aspect"),
        gain_target_db=tgt["gain_db"],
        p1db_target_dbm=tgt["p1db_dbm"],
        pae_target_pct=tgt["pae_pct"],
        n_elements=np.tile([float(b.link.n_elements) for b in study.bands], n_c),
    )
