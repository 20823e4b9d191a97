"""Switch sizing, off-state voltage check and die area of the PA designs (DESIGN.md §4 Area).

Works on a solved :class:`core.pa_design.DesignBatch` / :class:`core.pa_design.Solution` pair and
keeps their shapes: (K, R) per row (one switch state), (K, G) per design.

Assumptions beyond the process card (each one representative, from memory, and a candidate
for a card field — see the module constants):

- switch FETs pack about ten times denser than PA unit cells, which carry thermal spacing and
  source vias per finger: switch area per mm of gate = ``SWITCH_AREA_FRACTION`` × the card's
  active area per mm;
- each switch (or stack) has one gate-bias resistor of ``SWITCH_BIAS_AREA_MM2``;
- each stage has ``DC_PADS_PER_STAGE`` DC pads (gate and drain bias) and each design two RF
  pads (in, out); a switched design adds ⌈log2(states)⌉ control pads.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core import rf
from core.pa_model import LOAD_OHM, DesignBatch, Solution, driver_periphery_sum

__all__ = [
    "DC_PADS_PER_STAGE",
    "RF_PADS",
    "SWITCH_AREA_FRACTION",
    "SWITCH_BIAS_AREA_MM2",
    "LayoutParams",
    "layout",
    "quarter_wave_mm",
]

#: Switch-FET area per mm of gate as a fraction of the PA active area per mm. Representative,
#: from memory (no per-finger vias or thermal pitch in a switch).
SWITCH_AREA_FRACTION = 0.1
#: Gate-bias resistor area per switch (or switch stack), mm². Representative, from memory.
SWITCH_BIAS_AREA_MM2 = 0.002
#: DC pads per stage (gate bias and drain supply). Representative, from memory.
DC_PADS_PER_STAGE = 2
#: RF pads per design (input and output, each a ground-signal-ground group). Common practice.
RF_PADS = 2

_C0 = 299_792_458.0  # speed of light, m/s (SI exact)

F64 = NDArray[np.float64]


def quarter_wave_mm(f0_hz, eps_eff):
    """Guided quarter wavelength λg/4 = c/(4·f0·√εeff), in mm.

    Parameters
    ----------
    f0_hz : array_like
        Centre frequency (Hz), > 0.
    eps_eff : array_like
        Effective permittivity of the line (≥ 1).

    References
    ----------
    Pozar, Microwave Engineering, 4th ed., §3.7–3.8 (microstrip guided wavelength; from memory).

    Examples
    --------
    >>> round(float(quarter_wave_mm(30e9, 9.0)), 4)
    0.8328
    """
    return 1e3 * _C0 / (4.0 * np.asarray(f0_hz, dtype=float) * np.sqrt(eps_eff))


@dataclass(frozen=True, slots=True, eq=False)
class LayoutParams:
    """Per-row layout and switch figures, shape (R,); per-design ones equal on a design's rows.

    Attributes
    ----------
    m_elements
        Switched elements sharing the retuning of each section (1 for unswitched designs).
    n_states
        Switch states of the design (1 = no switch).
    f0_area_hz
        Frequency at which the network lines are a quarter wave long (design centre; the
        union centre for a switched design, whose lines serve every state).
    ron_w_ohm_mm, coff_f_per_mm, switch_v_max_v
        Switch Ron·W (Ω·mm), Coff/W (F/mm), off-state voltage one FET withstands (V).
    active_mm2_per_mm, pitch_mm, eps_eff, rf_pad_mm2, dc_pad_mm2, control_mm2
        Card layout figures.
    """

    m_elements: F64
    n_states: F64
    f0_area_hz: F64
    ron_w_ohm_mm: F64
    coff_f_per_mm: F64
    switch_v_max_v: F64
    active_mm2_per_mm: F64
    pitch_mm: F64
    eps_eff: F64
    rf_pad_mm2: F64
    dc_pad_mm2: F64
    control_mm2: F64


def _switches(b: DesignBatch, lp: LayoutParams, s: Solution) -> dict[str, F64]:
    """Size the switches of each state and check their off-state voltage, shapes (K, R).

    Sizing. A λ/4 section of impedance Z at f0 has a lumped equivalent with shunt capacitors of
    reactance Z (Pozar §5.x lumped line equivalents; from memory), so a switched capacitor of
    section i is C_hi = 1/(2π·f0·Z_i) in its on (low-frequency) state. The sections of a
    transformer from Ropt to 50 Ω step geometrically: Z_i = Ropt·r^((i − ½)/N) (exact for N =
    1, the quarter-wave √(Ropt·50)). At the Q optimum of :func:`core.rf.switched_element_q`
    the whole capacitance sits behind the switch and Coff = C_hi/(κ − 1)
    (:func:`core.rf.optimum_switch_c_off`); the width follows as W = Coff/(Coff/W) and Ron =
    (Ron·W)/W. The reported switch is the one of the output-most section (largest swing).

    Off-state voltage. The output stage swings Vdd − Vk across Ropt at P1dB (Cripps load line);
    at a node of impedance Z the same power gives V = (Vdd − Vk)·√(Z/Ropt) (lossless network,
    V²/2Z constant). In the off state the switch Coff is in series with C_sw = C_hi, a
    capacitive divider that puts V·C_sw/(C_sw + Coff) = V·(κ − 1)/κ across the switch. A
    stack of n FETs, each n times wider, keeps Ron and Coff and withstands n times the
    voltage: n = ⌈V_off/V_max⌉, at n² times the gate area. Interstage and input networks are
    taken as copies of the output network with their own section count N_is, scaled by the
    periphery of the stage they load (their impedance level scales as 1/W); their highest
    node is a driver drain, swing (Vdd − Vk).
    """
    g = b.group
    on = b.kappa > 1.0
    kap = np.where(on, b.kappa, 2.0)[None, :]
    w_r = s.w_out_mm[:, g]
    n = s.n_sections[:, g].astype(float)
    nst = s.n_stages[:, g].astype(float)
    ropt = b.ropt_ohm_mm[None, :] / w_r
    r = LOAD_OHM / ropt
    z_n = ropt * r ** ((n - 0.5) / n)
    c_hi = 1.0 / (2.0 * np.pi * b.f0_hz[None, :] * z_n)
    c_off = np.asarray(rf.optimum_switch_c_off(c_hi, kap))
    w_sw = np.asarray(rf.optimum_switch_width_mm(c_off, lp.coff_f_per_mm[None, :]))
    r_on = np.asarray(rf.switch_on_resistance(lp.ron_w_ohm_mm[None, :], w_sw))
    q_sw = np.asarray(rf.switched_element_q(b.f_c_hz, b.f_high_hz, kap[0]))[None, :]
    sw_loss = n * np.asarray(rf.lossy_section_loss_db(q_sw))
    divider = (kap - 1.0) / kap
    v_off = b.swing_v[None, :] * np.sqrt(z_n / ropt) * divider
    stack = np.maximum(1.0, np.ceil(v_off / lp.switch_v_max_v[None, :] - 1e-9))
    stack_is = np.maximum(1.0, np.ceil(b.swing_v * divider / lp.switch_v_max_v - 1e-9))
    # Σ_i C_i/C_N = Σ_i Z_N/Z_i = Σ_i r^((N − i)/N), i = 1 … N; only switched rows have it.
    i = np.arange(1, b.max_sections + 1, dtype=float)
    n_on, r_on_rows = n[:, on, None], r[:, on, None]
    scale = np.zeros(w_sw.shape)
    scale[:, on] = np.where(i <= n_on, r_on_rows ** ((n_on - i) / n_on), 0.0).sum(axis=-1)
    w_out_net = lp.m_elements[None, :] * w_sw * scale
    drivers = driver_periphery_sum(b.drive_ratio, nst)
    first = b.drive_ratio[None, :] ** (-(nst - 1.0))  # input network loads the first stage
    n_is = s.interstage_sections[g][None, :].astype(float)
    w_is = w_out_net * (n_is / n) * (drivers + first)
    n_sw = lp.m_elements[None, :] * (n + nst * n_is)
    gate_area = lp.active_mm2_per_mm * SWITCH_AREA_FRACTION
    area = gate_area[None, :] * (stack**2 * w_out_net + stack_is**2 * w_is)
    area = area + SWITCH_BIAS_AREA_MM2 * n_sw

    def keep(x: F64, off: float = 0.0) -> F64:
        return np.where(on[None, :], x, off)

    return {
        "switch_width_mm": keep(w_sw),
        "switch_ron_ohm": keep(r_on),
        "switch_coff_ff": keep(c_off * 1e15),
        "switch_c_hi_ff": keep(c_hi * 1e15),
        "switch_q": keep(np.broadcast_to(q_sw, w_sw.shape), np.inf),
        "switch_loss_db": keep(np.broadcast_to(sw_loss, w_sw.shape)),
        "switch_v_off_v": keep(v_off),
        "switch_stack": keep(stack, 1.0),
        "switch_stack_interstage": keep(np.broadcast_to(stack_is, w_sw.shape), 1.0),
        "switch_total_width_mm": keep(w_out_net + w_is),
        "n_switches": keep(n_sw),
        "area_switches_row": keep(area),
    }


def layout(b: DesignBatch, lp: LayoutParams, s: Solution, overhead: F64) -> dict[str, F64]:
    """Switch data per row (K, R) and area parts per design (K, G), in mm².

    Area (DESIGN.md §4): active (output + driver periphery × area per mm) + networks (each
    λg/4 section at f0 × strip pitch: N in the output network, N_is in each of the n input and
    interstage networks, n_cells − 1 in the binary combiner) + switches and their bias
    resistors (every switched state) + control block (switched) + pads; the sum times the
    layout overhead is the design
    area (the die minimum is applied per die by the caller, since a shared die holds several
    designs).

    Parameters
    ----------
    b, s : DesignBatch, Solution
        A solved batch.
    lp : LayoutParams
        Per-row layout figures.
    overhead : ndarray, (R,)
        Layout overhead factor (≥ 1).

    Returns
    -------
    dict of ndarray
        Switch entries of :func:`_switches` (K, R) and ``area_active_mm2``,
        ``area_networks_mm2``, ``area_switches_mm2``, ``area_control_mm2``, ``area_pads_mm2``,
        ``area_design_mm2`` (after overhead, before the die minimum), all (K, G).
    """
    out = _switches(b, lp, s)
    st = b.starts
    w = s.w_out_mm
    w_drv = s.w_drivers_mm[:, st]
    nst = s.n_stages.astype(float)
    n = s.n_sections.astype(float)
    active = lp.active_mm2_per_mm[st][None, :] * (w + w_drv)
    n_lines = n + nst * s.interstage_sections[None, :] + (s.n_cells - 1.0)
    networks = n_lines * quarter_wave_mm(lp.f0_area_hz[st], lp.eps_eff[st])[None, :]
    networks = networks * lp.pitch_mm[st][None, :]
    switches = np.add.reduceat(out["area_switches_row"], st, axis=1)
    states = lp.n_states[st][None, :]
    switched = states > 1
    control = np.where(switched, lp.control_mm2[st][None, :], 0.0) * np.ones_like(w)
    n_ctrl = np.where(switched, np.ceil(np.log2(np.maximum(states, 1.0)) - 1e-9), 0.0)
    pads = (
        RF_PADS * lp.rf_pad_mm2[st][None, :]
        + (DC_PADS_PER_STAGE * nst + n_ctrl) * (lp.dc_pad_mm2[st][None, :])
    )
    total = overhead[st][None, :] * (active + networks + switches + control + pads)
    out.update(
        area_active_mm2=active,
        area_networks_mm2=networks,
        area_switches_mm2=switches,
        area_control_mm2=control,
        area_pads_mm2=pads,
        area_design_mm2=total,
        n_lines=n_lines,
    )
    return out
