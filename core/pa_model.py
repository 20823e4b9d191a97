"""Inputs, outputs and closed-form helpers of the PA solver (:mod:`core.pa_design`).

:class:`DesignBatch` is what the solver needs per (candidate, band) row — the design state, the
process figures and the design rules; :class:`Solution` is what it returns. The helpers are the
model's scalar formulas that other modules also report: drain efficiency versus design
bandwidth, the Chebyshev scale and the Bode–Fano headroom.
"""

from __future__ import annotations

from dataclasses import dataclass, fields

import numpy as np
from numpy.typing import NDArray

from core.pa_points import Points

__all__ = [
    "BF_GAMMA_LIMIT",
    "LOAD_OHM",
    "DesignBatch",
    "Solution",
    "bode_fano_headroom_db",
    "chebyshev_scale",
    "drain_efficiency",
]

#: System (antenna) impedance the output network transforms to Ropt, Ω (common practice).
LOAD_OHM = 50.0
#: Largest output |Γ| a PA load can be left with and still count as matched: 1/3, i.e. VSWR
#: 2:1 (common practice for a PA's load acceptance). A Bode–Fano floor above it is infeasible.
BF_GAMMA_LIMIT = 1.0 / 3.0
F64 = NDArray[np.float64]
INT = NDArray[np.int64]


def drain_efficiency(eta_tuned, eta_untuned, harmonic_bw, design_bw):
    """Output-device drain efficiency at P1dB versus design fractional bandwidth.

    η = η_u + (η_t − η_u)·min(1, B_h/B): the tuned value while the second-harmonic short can be
    held over the whole design band (B ≤ B_h), falling toward the untuned value as 1/B beyond
    it — the fraction of the band over which the harmonic can still be controlled. This is a
    rule of thumb (common practice), to be calibrated on measurements. Continuous-mode theory
    (Cripps, *RF Power Amplifiers for Wireless Communications*, 2nd ed., ch. 7; the class-B/J
    continuum) shows that the same efficiency is available over wide bands with a reactive
    second-harmonic termination, so the loss is practical (network complexity, loss, Cout
    variation) rather than fundamental.

    Parameters
    ----------
    eta_tuned, eta_untuned : array_like
        Drain efficiency with and without harmonic control (fraction 0…1).
    harmonic_bw : array_like
        Harmonic-control fractional bandwidth B_h (> 0).
    design_bw : array_like
        Design fractional bandwidth B (> 0). All arguments broadcast.

    Returns
    -------
    ndarray
        Drain efficiency (fraction), broadcast shape.

    Examples
    --------
    >>> float(drain_efficiency(0.4, 0.3, 0.15, 0.30))
    0.35
    """
    b = np.asarray(design_bw, dtype=float)
    return eta_untuned + (eta_tuned - eta_untuned) * np.minimum(1.0, harmonic_bw / b)


@dataclass(frozen=True, slots=True, eq=False)
class DesignBatch:
    """Inputs of :func:`solve`: rows with their design state, process figures and design rules.

    Every array is per row, shape ``(R,)``, except ``starts`` ``(G,)`` and ``points``. Fields
    marked *per design* must be equal on every row of a design (they are read at ``starts``).

    Attributes
    ----------
    starts : ndarray of int, (G,)
        Index of the first row of each design; rows of a design are contiguous.
    group : ndarray of int, (R,)
        Design index of each row.
    points : Points
        Frequency points of every (row, section count) segment.
    f0_hz, bw_frac, f_low_hz, f_high_hz
        Design band of the row's state: centre, fractional bandwidth, edges (Hz).
    kappa
        Reactance ratio κ of the switched elements in this state; 1 where no switch is on.
    p1db_w_per_mm, ropt_ohm_mm, c_out_f_per_mm
        Load-line P1dB per mm (W/mm), Ropt·W (Ω·mm), output capacitance (F/mm).
    swing_v, vdd_v, i_max_a_per_mm, driver_bias
        Vdd − Vk (V), Vdd (V), Imax' (A/mm), driver quiescent current as a fraction of Imax.
    q_ref, q_ref_hz, q_exponent
        Passive unloaded Q at q_ref_hz and its frequency exponent.
    f_c_hz
        Switch cutoff 1/(2π·Ron·Coff) (Hz).
    stage_gain_db, eta
        Flat per-stage gain (dB) and output drain efficiency (fraction) of the row's state.
    band_select_db
        Loss after the PA (band-select switch or diplexer), paid in P1dB and PAE (dB).
    gain_req_db
        Gain target plus design margin (dB).
    cell_max_mm, max_cells, stages_fixed, max_stages, drive_ratio
        Per design: largest unit cell (mm), cell limit, fixed stage count (0 = auto), stage
        limit, driver periphery ratio.
    interstage_db, interstage_sections
        Worst in-band loss of one input/interstage network (dB, per row) and its section count
        (per design); None until computed from the full grid (:func:`core.pa_design.solve`
        does it; :func:`core.pa_design.prune_points` carries them over to the pruned batch).
    """

    starts: INT
    group: INT
    points: Points
    f0_hz: F64
    bw_frac: F64
    f_low_hz: F64
    f_high_hz: F64
    kappa: F64
    p1db_w_per_mm: F64
    ropt_ohm_mm: F64
    c_out_f_per_mm: F64
    swing_v: F64
    vdd_v: F64
    i_max_a_per_mm: F64
    driver_bias: F64
    q_ref: F64
    q_ref_hz: F64
    q_exponent: F64
    f_c_hz: F64
    stage_gain_db: F64
    eta: F64
    band_select_db: F64
    gain_req_db: F64
    cell_max_mm: F64
    max_cells: F64
    stages_fixed: INT
    max_stages: INT
    drive_ratio: F64
    interstage_db: F64 | None = None
    interstage_sections: INT | None = None

    @property
    def n_rows(self) -> int:
        return int(self.group.shape[0])

    @property
    def max_sections(self) -> int:
        return self.points.n_sections

    def per_design(self, name: str) -> np.ndarray:
        """A per-design field read at the first row of each design, shape (G,)."""
        return getattr(self, name)[self.starts]

    def with_points(self, points: Points) -> DesignBatch:
        """The same batch on other frequency points."""
        values = {f.name: getattr(self, f.name) for f in fields(self)}
        values["points"] = points
        return DesignBatch(**values)


@dataclass(frozen=True, slots=True, eq=False)
class Solution:
    """Result of :func:`solve`. Shapes: (K, G) per design, (K, R) per row, (K, R, F) per point.

    Attributes
    ----------
    w_out_mm, n_cells_needed, n_cells, cells_ok, levels, n_sections, n_stages, gain_found
        Per design: output periphery (capped at max_cells cells), unit cells needed / used,
        whether the cell limit holds, binary split levels, Chebyshev sections, stages, and
        whether the stage rule found a count meeting every gain target (True when fixed).
    ratio, gamma_max, bf_gamma, p_dev_w, w_drivers_mm, dc_out_w, dc_drivers_w
        Per row: transformation ratio 50·W/(Ropt·W), equal-ripple |Γ|m of the output network,
        Bode–Fano minimum |Γ| (R,), output-device P1dB (W), total driver periphery (mm),
        output and driver DC power (W).
    worst_gain_db, worst_p1db_dbm, worst_pae, worst_headroom_db
        Per row: worst in-band small-signal gain, P1dB at the RF port, PAE at P1dB (fraction)
        and driver headroom (inf without drivers).
    curves : dict of ndarray or None
        Per point at the chosen section count, (K, R, F), when the points are a uniform grid:
        ``f_hz``, ``q_u``, ``q_sw``, ``q_eff``, ``l_passive_db``, ``l_section_db``, ``gamma``,
        ``mismatch_db``, ``network_db`` (N·L_sec of one network), ``combiner_db``,
        ``headroom_db``, ``deficit_db``, ``p1db_loss_db``, ``gain_db``, ``p1db_dbm``, ``pae``.
    interstage_db, interstage_sections
        Worst in-band loss of one input/interstage network (R,) and its sections (G,).
    passes
        Iterations of the periphery fixed point (largest over samples).
    """

    w_out_mm: F64
    n_cells_needed: F64
    n_cells: F64
    cells_ok: NDArray[np.bool_]
    levels: F64
    n_sections: INT
    n_stages: INT
    gain_found: NDArray[np.bool_]
    ratio: F64
    gamma_max: F64
    bf_gamma: F64
    p_dev_w: F64
    w_drivers_mm: F64
    dc_out_w: F64
    dc_drivers_w: F64
    worst_gain_db: F64
    worst_p1db_dbm: F64
    worst_pae: F64
    worst_headroom_db: F64
    curves: dict[str, F64] | None
    interstage_db: F64
    interstage_sections: INT
    passes: int


def bode_fano_headroom_db(gamma_design, gamma_bf):
    """Headroom 20·log10(Γ_design/Γ_min) of the design ripple over the Bode–Fano bound (dB).

    Negative means the ripple the Chebyshev network assumes is below what any lossless network
    can reach for the Ropt–Cout load (Pozar §5.9); the estimator then uses the bound itself
    (floored at 1e-300 so that an underflowed bound of a narrow band stays finite).

    Examples
    --------
    >>> round(float(bode_fano_headroom_db(0.05, 0.005)), 6)
    20.0
    """
    num = np.maximum(np.asarray(gamma_design, dtype=float), 1e-300)
    return 20.0 * np.log10(num / np.maximum(np.asarray(gamma_bf, dtype=float), 1e-300))


def chebyshev_scale(ratio):
    """Scale a = |r − 1|/(2√r) of the exact equal-ripple Chebyshev response.

    The insertion-loss function of the exact stepped transformer is P_LR = 1 + v² with
    v = a·h_N(f), h_N = |T_N(cos θ/cos θm)|/T_N(sec θm), and a fixed by matching the bare step
    at θ = 0 (Pozar, Microwave Engineering, 4th ed., §5.7 and §8.3; check-values §10, "k·T_N(sec
    θm) = |R − 1|/(2√R)"). Then |Γ|² = 1 − 1/P_LR = v²/(1 + v²), which is what
    :func:`core.rf.chebyshev_reflection` returns; the solver computes h_N once per point with
    that function and rescales it by a(r) on every pass (the tests check the two agree).

    Examples
    --------
    >>> float(chebyshev_scale(4.0))
    0.75
    """
    r = np.asarray(ratio, dtype=float)
    return np.abs(r - 1.0) / (2.0 * np.sqrt(r))


def driver_periphery_sum(drive_ratio, n_stages):
    """Σ_{k=1}^{n−1} ρ^(−k): total driver periphery per mm of output stage, n stages.

    Driver k (counted back from the output) has 1/ρ^k of the output periphery (ρ the drive
    ratio). Summed in order from a per-row table of partial sums.

    Parameters
    ----------
    drive_ratio : ndarray, (R,)
        ρ of each row (> 0).
    n_stages : ndarray of int, (K, R)
        Stage count n ≥ 1 of each sample and row.

    Returns
    -------
    ndarray, (K, R)

    Examples
    --------
    >>> float(driver_periphery_sum(np.array([2.0]), np.array([[3]]))[0, 0])
    0.75
    """
    n = np.asarray(n_stages, dtype=np.int64)
    m = max(int(n.max()) - 1, 0) if n.size else 0
    terms = np.asarray(drive_ratio, dtype=float)[:, None] ** -np.arange(1.0, m + 1.0)
    table = np.concatenate([np.zeros((terms.shape[0], 1)), np.cumsum(terms, axis=1)], axis=1)
    return table[np.arange(table.shape[0])[None, :], np.maximum(n - 1, 0)]
