"""The study document: bands with targets and link scenarios, process cards, candidates, cost.

A study is the user's document, so its fields carry the units they are typed in (named by
suffix: ``f_low_ghz``, ``p1db_dbm``); that keeps a save → load round trip exact and the field
paths in messages equal to the keys in the file. Computations take SI through properties
(``BandSpec.f_low_hz``) or at the entry of each core function.

All dataclasses are frozen; edits build new objects with :func:`dataclasses.replace`.
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import StrEnum

from core.bands import Band
from core.process import DEFAULT_CARDS, ProcessCard
from core.schema import choice, flag, integer, items, nested, num, text

__all__ = [
    "FORMAT_TAG",
    "FORMAT_VERSION",
    "BandSpec",
    "Candidate",
    "CandidateKind",
    "Combining",
    "CostSettings",
    "DieArrangement",
    "EstimatorSettings",
    "LinkScenario",
    "Polarization",
    "Study",
    "Targets",
    "Tolerance",
    "Weights",
    "YieldModelName",
]

#: Top-level format tag of a study file.
FORMAT_TAG = "bandwright.study"
#: Current integer version of the study file format.
FORMAT_VERSION = 1


class Polarization(StrEnum):
    HORIZONTAL = "horizontal"
    VERTICAL = "vertical"
    CIRCULAR = "circular"


class CandidateKind(StrEnum):
    """How a candidate covers the bands."""

    SEPARATE = "separate"  #: one single-band PA design per band
    WIDEBAND = "wideband"  #: one design over the union of the bands
    SWITCHED = "switched"  #: one design whose networks are retuned by FET switches


class DieArrangement(StrEnum):
    """For separate single-band PAs: one die per band, or all on one die."""

    DIE_PER_BAND = "die_per_band"
    SHARED_DIE = "shared_die"


class Combining(StrEnum):
    """For separate single-band PAs: how the outputs reach the antenna."""

    SEPARATE_FEEDS = "separate_feeds"  #: each band has its own antenna feed
    BAND_SELECT_SWITCH = "band_select_switch"  #: an output switch picks the active band
    DIPLEXER = "diplexer"  #: a passive diplexer combines the outputs


class YieldModelName(StrEnum):
    POISSON = "poisson"
    MURPHY = "murphy"
    SEEDS = "seeds"
    NEGATIVE_BINOMIAL = "negative_binomial"


@dataclass(frozen=True, slots=True)
class Targets:
    """Per-band PA targets, worst case over the band, at the PA's RF ports."""

    gain_db: float = num(20.0, "dB", label="Gain", lo=-20.0, hi=60.0)
    p1db_dbm: float = num(27.0, "dBm", label="P1dB", lo=-30.0, hi=60.0)
    pae_pct: float = num(20.0, "%", label="PAE at P1dB", lo=0.0, hi=100.0, hi_open=True)
    input_rl_db: float | None = num(
        None, "dB", label="Input return loss", lo=0.0, hi=60.0, optional=True
    )
    output_rl_db: float | None = num(
        None, "dB", label="Output return loss", lo=0.0, hi=60.0, optional=True
    )


@dataclass(frozen=True, slots=True)
class LinkScenario:
    """The service a band must support, from which the per-element PA requirement follows."""

    distance_m: float = num(200.0, "m", label="Link distance", lo=0.0, hi=1e6, lo_open=True)
    rain_rate_mm_h: float = num(25.0, "mm/h", label="Rain rate", lo=0.0, hi=300.0)
    polarization: Polarization = choice(Polarization, Polarization.VERTICAL, label="Polarisation")
    pressure_hpa: float = num(1013.25, "hPa", label="Pressure", lo=100.0, hi=1100.0)
    temperature_c: float = num(15.0, "°C", label="Temperature", lo=-60.0, hi=60.0)
    water_vapour_g_m3: float = num(7.5, "g/m³", label="Water vapour", lo=0.0, hi=50.0)
    extra_loss_db: float = num(
        0.0,
        "dB",
        label="Extra losses",
        lo=0.0,
        hi=100.0,
        note="Foliage, building entry, body and miscellaneous losses, total.",
    )
    fade_margin_db: float = num(3.0, "dB", label="Fade margin", lo=0.0, hi=60.0)
    bandwidth_mhz: float = num(400.0, "MHz", label="Channel bandwidth", lo=0.001, hi=20000.0)
    noise_figure_db: float = num(7.0, "dB", label="Receiver NF", lo=0.0, hi=30.0)
    required_snr_db: float = num(10.0, "dB", label="Required SNR", lo=-20.0, hi=50.0)
    implementation_margin_db: float = num(2.0, "dB", label="Implementation margin", lo=0.0, hi=30.0)
    rx_antenna_gain_dbi: float = num(15.0, "dBi", label="Rx antenna gain", lo=-20.0, hi=60.0)
    n_elements: int = integer(16, label="Array elements", lo=1, hi=65536)
    element_gain_dbi: float = num(5.0, "dBi", label="Element gain", lo=-20.0, hi=30.0)
    feed_loss_db: float = num(1.0, "dB", label="Feed loss", lo=0.0, hi=30.0)
    scan_loss_db: float = num(1.5, "dB", label="Scan loss", lo=0.0, hi=30.0)
    backoff_db: float = num(
        8.0,
        "dB",
        label="Back-off from P1dB",
        lo=0.0,
        hi=20.0,
        note="Average power below P1dB for the signal's PAPR/EVM.",
    )


@dataclass(frozen=True, slots=True)
class BandSpec:
    """One band of the plan with its PA targets and link scenario."""

    name: str = text("band", label="Band", max_len=40)
    f_low_ghz: float = num(26.5, "GHz", label="f low", lo=0.1, hi=1000.0)
    f_high_ghz: float = num(29.5, "GHz", label="f high", lo=0.1, hi=1000.0)
    preset: str = text("", label="Preset", note="FR2 band this row was created from, if any.")
    targets: Targets = nested(Targets)
    link: LinkScenario = nested(LinkScenario)

    @property
    def f_low_hz(self) -> float:
        return self.f_low_ghz * 1e9

    @property
    def f_high_hz(self) -> float:
        return self.f_high_ghz * 1e9

    @property
    def band(self) -> Band:
        """The frequency band alone, in SI."""
        return Band(self.name, self.f_low_hz, self.f_high_hz)


@dataclass(frozen=True, slots=True)
class Candidate:
    """One architecture to evaluate on every band."""

    name: str = text("candidate", label="Name", max_len=60)
    kind: CandidateKind = choice(CandidateKind, CandidateKind.SWITCHED, label="Architecture")
    process: str = text("", label="Process card", max_len=80)
    stages: int | None = integer(
        None, label="Stages", lo=1, hi=5, optional=True, note="Empty = fewest that meet gain."
    )
    enabled: bool = flag(True, label="Shown")
    die_arrangement: DieArrangement = choice(
        DieArrangement, DieArrangement.DIE_PER_BAND, label="Dies (separate)"
    )
    combining: Combining = choice(Combining, Combining.SEPARATE_FEEDS, label="Output (separate)")
    band_select_loss_db: float = num(
        0.8,
        "dB",
        label="Band-select loss",
        lo=0.0,
        hi=10.0,
        note="Insertion loss of the output switch or diplexer (separate PAs only).",
    )
    band_select_cost_usd: float = num(0.3, "USD", label="Band-select part cost", lo=0.0, hi=1e4)
    switched_elements: int = integer(
        2,
        label="Switched elements per network",
        lo=1,
        hi=4,
        note="Elements sharing the retuning of each network (switched only).",
    )
    design_effort_factor: float = num(
        1.0,
        "1",
        label="Design-effort factor",
        lo=0.1,
        hi=10.0,
        note="Multiplies the design effort of one single-band PA.",
    )


@dataclass(frozen=True, slots=True)
class CostSettings:
    """Cost-model settings shared by every candidate (wafer figures live on process cards)."""

    edge_exclusion_mm: float = num(3.0, "mm", label="Edge exclusion", lo=0.0, hi=50.0)
    scribe_mm: float = num(0.1, "mm", label="Scribe width", lo=0.0, hi=2.0)
    yield_model: YieldModelName = choice(YieldModelName, YieldModelName.MURPHY, label="Yield model")
    yield_alpha: float = num(2.0, "1", label="Clustering α", lo=0.01, hi=1000.0)
    critical_area_pct: float = num(60.0, "%", label="Yield-critical area", lo=0.0, hi=100.0)
    test_time_s: float = num(4.0, "s", label="Test time per die", lo=0.0, hi=3600.0)
    test_rate_usd_per_h: float = num(120.0, "USD/h", label="Test cost rate", lo=0.0, hi=1e5)
    test_yield_pct: float = num(97.0, "%", label="Test yield", lo=1.0, hi=100.0)
    package_cost_usd: float = num(0.8, "USD", label="Package and assembly", lo=0.0, hi=1e4)
    package_yield_pct: float = num(98.0, "%", label="Assembly yield", lo=1.0, hi=100.0)
    spins: int = integer(2, label="Mask spins", lo=1, hi=10)
    design_effort_h: float = num(3000.0, "h", label="Design effort per PA", lo=0.0, hi=1e6)
    design_rate_usd_per_h: float = num(150.0, "USD/h", label="Design rate", lo=0.0, hi=1e4)
    test_development_usd: float = num(40e3, "USD", label="Test development", lo=0.0, hi=1e8)
    design_volume: int = integer(20000, label="Design volume (radios)", lo=1, hi=10**9)
    lifetime_volume: int = integer(100000, label="Lifetime volume (radios)", lo=1, hi=10**10)


@dataclass(frozen=True, slots=True)
class Tolerance:
    """The "marginal" window between meets and misses."""

    marginal_db: float = num(0.5, "dB", label="Marginal window (dB)", lo=0.0, hi=10.0)
    marginal_pae_pts: float = num(2.0, "%", label="Marginal window (PAE points)", lo=0.0, hi=50.0)


@dataclass(frozen=True, slots=True)
class EstimatorSettings:
    """Numerical and design-rule settings of the PA estimator."""

    freq_points: int = integer(101, label="Points per band", lo=3, hi=2001)
    p1db_margin_db: float = num(0.5, "dB", label="P1dB design margin", lo=0.0, hi=10.0)
    gain_margin_db: float = num(1.0, "dB", label="Gain design margin", lo=0.0, hi=10.0)
    max_stages: int = integer(5, label="Max stages", lo=1, hi=5)
    max_sections: int = integer(5, label="Max output-network sections", lo=1, hi=5)
    drive_ratio: float = num(
        2.5,
        "1",
        label="Stage drive ratio",
        lo=1.0,
        hi=10.0,
        note="Periphery ratio between a stage and the one driving it (common practice 2-3).",
    )


@dataclass(frozen=True, slots=True)
class Weights:
    """User weights of the overall score (relative; need not sum to 1)."""

    performance: float = num(0.4, "1", label="Worst margin", lo=0.0, hi=100.0)
    unit_cost: float = num(0.3, "1", label="Unit cost", lo=0.0, hi=100.0)
    dc_power: float = num(0.2, "1", label="DC power", lo=0.0, hi=100.0)
    area: float = num(0.1, "1", label="Die area", lo=0.0, hi=100.0)


@dataclass(frozen=True, slots=True)
class Study:
    """One trade study: everything needed to reproduce an evaluation."""

    name: str = text("Untitled study", label="Study name", max_len=120)
    notes: str = text("", label="Notes", max_len=20000)
    bands: tuple[BandSpec, ...] = items(BandSpec, lo=1)
    process_cards: tuple[ProcessCard, ...] = items(ProcessCard)
    candidates: tuple[Candidate, ...] = items(Candidate)
    cost: CostSettings = nested(CostSettings)
    tolerance: Tolerance = nested(Tolerance)
    estimator: EstimatorSettings = nested(EstimatorSettings)
    weights: Weights = nested(Weights)

    def card(self, name: str) -> ProcessCard:
        """The process card called ``name`` (KeyError if absent)."""
        for c in self.process_cards:
            if c.name == name:
                return c
        raise KeyError(name)

    @classmethod
    def new(cls) -> Study:
        """A small valid starting study: one n257 band, the shipped cards, one candidate."""
        from core.bands import FR2_PRESETS

        b = FR2_PRESETS["n257"]
        band = BandSpec(
            name=b.name, f_low_ghz=b.f_low_hz / 1e9, f_high_ghz=b.f_high_hz / 1e9, preset=b.name
        )
        cards = tuple(DEFAULT_CARDS.values())
        cand = Candidate(name="Single-band PA", kind=CandidateKind.SEPARATE, process=cards[0].name)
        return cls(bands=(band,), process_cards=cards, candidates=(cand,))
