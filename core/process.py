"""Process cards: the device, passive, switch, layout and wafer figures of one MMIC process.

A card is the smallest set of numbers the closed-form estimator needs. Every default below is
**representative, from memory** (public datasheets and papers of the process class, not any one
foundry's design kit) and exists to be replaced by the user's own calibrated values; the field
notes say what each one means and where it matters. Values are stored in the units named by the
field suffix (the units an engineer types); :class:`ProcessCard` properties give SI.

Efficiency and harmonic-control figures are rules of thumb (common practice), the first thing to
calibrate against measured power sweeps.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from enum import StrEnum
from types import MappingProxyType

from core.schema import choice, integer, num, text

__all__ = ["DEFAULT_CARDS", "ProcessCard", "Technology", "default_card"]


class Technology(StrEnum):
    """Device technology family of a card (informational; the numbers drive the model)."""

    GAAS_PHEMT = "GaAs pHEMT"
    GAN_HEMT = "GaN HEMT"
    SIGE_HBT = "SiGe HBT"
    SOI_CMOS = "SOI CMOS"
    OTHER = "other"


@dataclass(frozen=True, slots=True)
class ProcessCard:
    """Device, passive, switch, layout and cost figures of one process.

    Periphery ("per mm") means gate width for FETs and emitter length for HBTs. For a stacked-FET
    card the per-mm figures describe the whole stack as one composite device.
    """

    name: str = text("process", label="Name", max_len=80)
    technology: Technology = choice(Technology, Technology.OTHER, label="Technology")
    # --- device, load line (Cripps, RF Power Amplifiers for Wireless Communications, ch. 2)
    vdd_v: float = num(5.0, "V", label="Supply Vdd", lo=0.0, hi=100.0, lo_open=True)
    v_knee_v: float = num(1.0, "V", label="Knee voltage", lo=0.0, hi=100.0)
    i_max_a_per_mm: float = num(
        0.55,
        "A/mm",
        label="Max current density",
        lo=0.0,
        hi=10.0,
        lo_open=True,
        note="Peak drain (collector) current per mm of periphery at full drive.",
    )
    c_out_pf_per_mm: float = num(
        0.3,
        "pF/mm",
        label="Output capacitance",
        lo=0.0,
        hi=10.0,
        lo_open=True,
        note="Drain-source (output) capacitance per mm; sets the Bode–Fano limit.",
    )
    fmax_ghz: float = num(
        160.0,
        "GHz",
        label="fmax",
        lo=1.0,
        hi=2000.0,
        note="Maximum frequency of oscillation of the PA unit cell with its layout parasitics.",
    )
    stage_derating_db: float = num(
        6.0,
        "dB",
        label="Stage-gain derating",
        lo=0.0,
        hi=30.0,
        note="Subtracted from 20·log10(fmax/f) for realisable gain per stage (stability, "
        "feedback, layout). Rule of thumb.",
    )
    compression_db: float = num(
        1.0,
        "dB",
        label="P1dB below Psat",
        lo=0.0,
        hi=6.0,
        note="How far the 1 dB compression point sits below the load-line saturated power.",
    )
    drain_eff_tuned_pct: float = num(
        40.0,
        "%",
        label="Drain efficiency, harmonics tuned",
        lo=1.0,
        hi=90.0,
        note="Output-device drain efficiency at P1dB with the 2nd harmonic terminated. "
        "Rule of thumb; calibrate against measurements.",
    )
    drain_eff_untuned_pct: float = num(
        30.0,
        "%",
        label="Drain efficiency, harmonics untuned",
        lo=1.0,
        hi=90.0,
        note="Drain efficiency at P1dB when the harmonic termination cannot be held across "
        "the design band. Rule of thumb.",
    )
    harmonic_bw_pct: float = num(
        15.0,
        "%",
        label="Harmonic-control bandwidth",
        lo=0.1,
        hi=200.0,
        note="Fractional design bandwidth up to which the 2nd-harmonic short can be held.",
    )
    driver_bias_pct: float = num(
        30.0,
        "%",
        label="Driver quiescent current",
        lo=1.0,
        hi=100.0,
        note="Driver-stage bias current as a share of their peak current (class AB).",
    )
    # --- passives
    q_passive: float = num(
        25.0,
        "1",
        label="Passive unloaded Q",
        lo=1.0,
        hi=1000.0,
        note="Unloaded Q of matching-network elements at the reference frequency.",
    )
    q_ref_ghz: float = num(30.0, "GHz", label="Q reference frequency", lo=0.1, hi=2000.0)
    q_exponent: float = num(
        0.5,
        "1",
        label="Q frequency exponent",
        lo=-2.0,
        hi=2.0,
        note="Q ∝ f^exponent; 0.5 for conductor-loss-limited lines (skin effect).",
    )
    eps_eff: float = num(8.5, "1", label="Effective permittivity", lo=1.0, hi=20.0)
    # --- unit cells and layout
    cell_width_mm: float = num(
        0.4,
        "mm",
        label="Max unit-cell periphery at reference",
        lo=0.001,
        hi=20.0,
        note="Largest unit cell at the Q reference frequency; scales as 1/f.",
    )
    max_cells: int = integer(16, label="Max combined cells", lo=1, hi=256)
    active_area_mm2_per_mm: float = num(
        0.2,
        "mm²/mm",
        label="Active area per mm",
        lo=0.0,
        hi=10.0,
        lo_open=True,
        note="Die area of transistors, vias and local bias per mm of periphery.",
    )
    line_pitch_mm: float = num(
        0.15,
        "mm",
        label="Network strip pitch",
        lo=0.01,
        hi=5.0,
        note="Width a meandered quarter-wave section occupies across its length.",
    )
    rf_pad_area_mm2: float = num(0.02, "mm²", label="RF pad area", lo=0.0, hi=5.0)
    dc_pad_area_mm2: float = num(0.012, "mm²", label="DC pad area", lo=0.0, hi=5.0)
    control_area_mm2: float = num(
        0.05,
        "mm²",
        label="Switch control block",
        lo=0.0,
        hi=10.0,
        note="Logic, inverters and level shifters driving the FET switches.",
    )
    layout_overhead: float = num(1.3, "1", label="Layout overhead factor", lo=1.0, hi=5.0)
    min_die_area_mm2: float = num(1.0, "mm²", label="Minimum die area", lo=0.01, hi=500.0)
    die_aspect: float = num(1.5, "1", label="Die aspect ratio", lo=1.0, hi=10.0)
    # --- switches
    ron_w_ohm_mm: float = num(
        1.5,
        "Ω·mm",
        label="Switch Ron·W",
        lo=0.0,
        hi=100.0,
        lo_open=True,
        note="On-resistance times gate width.",
    )
    coff_per_w_ff_per_mm: float = num(
        250.0,
        "fF/mm",
        label="Switch Coff/W",
        lo=0.0,
        hi=10000.0,
        lo_open=True,
        note="Off-state capacitance per mm of gate width.",
    )
    switch_v_max_v: float = num(
        8.0,
        "V",
        label="Switch off-state voltage",
        lo=0.1,
        hi=500.0,
        note="Peak RF voltage one off-state switch FET withstands; stacking multiplies it.",
    )
    # --- wafer and masks
    wafer_diameter_mm: float = num(150.0, "mm", label="Wafer diameter", lo=25.0, hi=450.0)
    wafer_cost_usd: float = num(5000.0, "USD", label="Wafer cost", lo=0.0, hi=1e7, lo_open=True)
    d0_per_cm2: float = num(0.5, "/cm²", label="Defect density D0", lo=0.0, hi=100.0)
    mask_set_cost_usd: float = num(120e3, "USD", label="Mask-set cost", lo=0.0, hi=1e9)
    source_note: str = text(
        "Representative, from memory; calibrate to your foundry's design kit.",
        label="Source",
        max_len=500,
    )

    # SI views used by the estimator -------------------------------------------------------
    @property
    def c_out_f_per_mm(self) -> float:
        """Output capacitance per mm of periphery, F/mm."""
        return self.c_out_pf_per_mm * 1e-12

    @property
    def coff_per_w_f_per_mm(self) -> float:
        """Switch off-capacitance per mm of width, F/mm."""
        return self.coff_per_w_ff_per_mm * 1e-15

    @property
    def fmax_hz(self) -> float:
        return self.fmax_ghz * 1e9

    @property
    def q_ref_hz(self) -> float:
        return self.q_ref_ghz * 1e9

    @property
    def switch_cutoff_hz(self) -> float:
        """Switch figure of merit f_c = 1/(2π·Ron·Coff), independent of width."""
        return 1.0 / (2.0 * math.pi * self.ron_w_ohm_mm * self.coff_per_w_f_per_mm)

    def replace(self, **changes: object) -> ProcessCard:
        return dataclasses.replace(self, **changes)


# Representative, from memory: public figures of each process class, rounded. The wafer,
# defect-density and mask-set numbers are order-of-magnitude planning figures, not quotes.
_GAAS = ProcessCard(
    name="GaAs pHEMT 0.15 µm",
    technology=Technology.GAAS_PHEMT,
    source_note="Representative 0.15 µm GaAs pHEMT figures, from memory; calibrate to your "
    "foundry's design kit and measurements.",
)
_GAN = ProcessCard(
    name="GaN-on-SiC HEMT 0.15 µm",
    technology=Technology.GAN_HEMT,
    vdd_v=20.0,
    v_knee_v=4.0,
    i_max_a_per_mm=1.0,
    c_out_pf_per_mm=0.35,
    fmax_ghz=140.0,
    stage_derating_db=5.0,
    compression_db=1.5,
    drain_eff_tuned_pct=45.0,
    drain_eff_untuned_pct=33.0,
    harmonic_bw_pct=15.0,
    driver_bias_pct=25.0,
    q_passive=25.0,
    eps_eff=6.5,
    cell_width_mm=0.3,
    max_cells=16,
    active_area_mm2_per_mm=0.3,
    line_pitch_mm=0.15,
    rf_pad_area_mm2=0.02,
    dc_pad_area_mm2=0.012,
    control_area_mm2=0.06,
    min_die_area_mm2=1.0,
    ron_w_ohm_mm=2.0,
    coff_per_w_ff_per_mm=300.0,
    switch_v_max_v=40.0,
    wafer_diameter_mm=100.0,
    wafer_cost_usd=10000.0,
    d0_per_cm2=0.3,
    mask_set_cost_usd=150e3,
    source_note="Representative 0.15 µm GaN-on-SiC figures, from memory; calibrate to your "
    "foundry's design kit and measurements.",
)
_SIGE = ProcessCard(
    name="SiGe BiCMOS HBT 0.13 µm",
    technology=Technology.SIGE_HBT,
    vdd_v=3.3,
    v_knee_v=0.8,
    i_max_a_per_mm=1.0,
    c_out_pf_per_mm=0.5,
    fmax_ghz=300.0,
    stage_derating_db=9.0,
    compression_db=1.0,
    drain_eff_tuned_pct=35.0,
    drain_eff_untuned_pct=27.0,
    harmonic_bw_pct=15.0,
    driver_bias_pct=30.0,
    q_passive=15.0,
    eps_eff=4.0,
    cell_width_mm=0.15,
    max_cells=16,
    active_area_mm2_per_mm=0.1,
    line_pitch_mm=0.08,
    rf_pad_area_mm2=0.006,
    dc_pad_area_mm2=0.004,
    control_area_mm2=0.01,
    layout_overhead=1.4,
    min_die_area_mm2=0.5,
    die_aspect=1.3,
    ron_w_ohm_mm=0.6,
    coff_per_w_ff_per_mm=400.0,
    switch_v_max_v=1.5,
    wafer_diameter_mm=200.0,
    wafer_cost_usd=3500.0,
    d0_per_cm2=0.2,
    mask_set_cost_usd=600e3,
    source_note="Representative 0.13 µm SiGe BiCMOS figures (emitter length as periphery), "
    "from memory; Vdd 3.3 V assumes a cascode output stage, since one high-fmax HBT breaks "
    "down near 1.5–2 V. Calibrate to your foundry's design kit.",
)
_SOI = ProcessCard(
    name="Stacked-FET SOI CMOS 45 nm",
    technology=Technology.SOI_CMOS,
    vdd_v=4.0,
    v_knee_v=0.8,
    i_max_a_per_mm=0.5,
    c_out_pf_per_mm=0.6,
    fmax_ghz=250.0,
    stage_derating_db=10.0,
    compression_db=1.0,
    drain_eff_tuned_pct=32.0,
    drain_eff_untuned_pct=25.0,
    harmonic_bw_pct=15.0,
    driver_bias_pct=30.0,
    q_passive=15.0,
    eps_eff=4.0,
    cell_width_mm=0.3,
    max_cells=16,
    active_area_mm2_per_mm=0.15,
    line_pitch_mm=0.08,
    rf_pad_area_mm2=0.006,
    dc_pad_area_mm2=0.004,
    control_area_mm2=0.008,
    layout_overhead=1.4,
    min_die_area_mm2=0.5,
    die_aspect=1.3,
    ron_w_ohm_mm=0.3,
    coff_per_w_ff_per_mm=300.0,
    switch_v_max_v=1.2,
    wafer_diameter_mm=300.0,
    wafer_cost_usd=4000.0,
    d0_per_cm2=0.1,
    mask_set_cost_usd=1.5e6,
    source_note="Representative 45 nm RF-SOI stacked-FET figures (4-high stack as one device), "
    "from memory; calibrate to your foundry's design kit.",
)

#: Read-only library of shipped cards, keyed by name.
DEFAULT_CARDS: MappingProxyType[str, ProcessCard] = MappingProxyType(
    {c.name: c for c in (_GAAS, _GAN, _SIGE, _SOI)}
)


def default_card(technology: Technology) -> ProcessCard:
    """The shipped card of ``technology``."""
    for card in DEFAULT_CARDS.values():
        if card.technology == technology:
            return card
    raise KeyError(f"no shipped card for {technology}")
