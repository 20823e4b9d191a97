"""Result types of the PA estimator: statuses, findings, derivations and the evaluation.

These are the objects the GUI and the exports read (:func:`core.estimate.evaluate` returns an
:class:`Evaluation`). Statuses follow DESIGN.md §6: a margin is the estimate minus the target
(PAE in percentage points); it *meets* at a margin ≥ 0, is *marginal* within the study's
tolerance window below 0, *misses* beyond it, and is *infeasible* when the design rules could
not build a design that reaches the request (the GUI shows the finding that says why).
"""

from __future__ import annotations

from collections.abc import Callable, Iterator, Mapping
from dataclasses import dataclass, field
from enum import StrEnum
from typing import Literal

import numpy as np
import pandas as pd
from numpy.typing import NDArray

__all__ = [
    "CURVE_COLUMNS",
    "DESIGN_COLUMNS",
    "SCORECARD_COLUMNS",
    "SUMMARY_COLUMNS",
    "Derivation",
    "DerivationKey",
    "Derivations",
    "Evaluation",
    "Finding",
    "Metric",
    "Status",
    "statuses",
]

Metric = Literal["gain", "p1db", "pae"]
#: (candidate, band or None, metric) — None with "die_area" and "dc_power".
DerivationKey = tuple[str, str | None, str]

SCORECARD_COLUMNS = (
    "candidate",
    "band",
    "metric",
    "unit",
    "estimate",
    "target",
    "margin",
    "status",
)
CURVE_COLUMNS = ("candidate", "band", "f_hz", "gain_db", "p1db_dbm", "pae_pct")
DESIGN_COLUMNS = (
    "candidate",
    "design",
    "kind",
    "stages",
    "stage_gain_db",
    "w_out_mm",
    "w_drivers_mm",
    "n_cells",
    "cell_width_mm",
    "cell_width_max_mm",
    "sections",
    "interstage_sections",
    "interstage_loss_db",
    "output_loss_db",
    "mismatch_db",
    "combiner_levels",
    "combiner_loss_db",
    "band_select_loss_db",
    "q_passive",
    "q_eff",
    "switch_width_mm",
    "switch_ron_ohm",
    "switch_coff_ff",
    "switch_q",
    "switch_loss_db",
    "switch_v_off_v",
    "switch_stack",
    "n_switches",
    "driver_headroom_db",
    "p1db_device_dbm",
    "dc_power_w",
    "dc_drivers_w",
    "drain_eff_pct",
    "bode_fano_gamma_min",
    "ripple_gamma_max",
    "bode_fano_headroom_db",
    "area_active_mm2",
    "area_networks_mm2",
    "area_switches_mm2",
    "area_control_mm2",
    "area_pads_mm2",
    "area_total_mm2",
)
SUMMARY_COLUMNS = (
    "candidate",
    "kind",
    "process",
    "n_dies",
    "die_area_mm2",
    "total_die_area_mm2",
    "die_width_mm",
    "die_height_mm",
    "dc_power_w",
    "pa_count_per_radio",
    "array_dc_power_w",
    "worst_margin_db",
    "worst_pae_margin_pts",
    "n_misses",
    "n_marginal",
    "n_infeasible",
    "feasible",
)


class Status(StrEnum):
    """Scorecard status of one (candidate, band, metric)."""

    MEETS = "meets"
    MARGINAL = "marginal"
    MISSES = "misses"
    INFEASIBLE = "infeasible"

    @property
    def symbol(self) -> str:
        """Text symbol shown beside the colour (colour-blind safe): ✓ ~ ✗ !"""
        return {"meets": "✓", "marginal": "~", "misses": "✗", "infeasible": "!"}[self.value]


def statuses(
    margin: NDArray[np.float64], window: NDArray[np.float64], infeasible: NDArray[np.bool_]
) -> NDArray[np.object_]:
    """Status of each margin: meets ≥ 0, marginal in [−window, 0), misses below, or infeasible.

    Parameters
    ----------
    margin, window : ndarray
        Margin (estimate − target) and tolerance window (≥ 0), same units, broadcast shape.
    infeasible : ndarray of bool
        Where the design rules could not reach the request; overrides the margin.

    Returns
    -------
    ndarray of Status (object)

    Examples
    --------
    >>> [s.symbol for s in statuses(np.array([0.1, -0.2, -1.0]), np.array(0.5),
    ...                             np.array([False, False, False]))]
    ['✓', '~', '✗']
    """
    margin = np.asarray(margin, dtype=float)
    code = np.where(margin >= 0.0, 0, np.where(margin >= -np.asarray(window), 1, 2))
    code = np.where(np.asarray(infeasible), 3, code)
    table = np.array(list(Status), dtype=object)
    return table[code]


@dataclass(frozen=True, slots=True)
class Finding:
    """Something the user must know about a result: why it is infeasible, or a caution."""

    candidate: str
    band: str | None
    severity: Literal["info", "warning", "error"]
    message: str


@dataclass(frozen=True, slots=True)
class Derivation:
    """How one number was computed, enough to redo it by hand.

    Attributes
    ----------
    title : str
        What the number is.
    formula : str
        Plain-text formula (unicode symbols).
    inputs, steps : tuple of (name, value, unit)
        Input values and intermediate results, in display units.
    result : float
        The number itself (equal to the scorecard estimate or summary value).
    unit : str
        Its unit.
    source : str
        Where the method comes from.
    """

    title: str
    formula: str
    inputs: tuple[tuple[str, float, str], ...]
    steps: tuple[tuple[str, float, str], ...]
    result: float
    unit: str
    source: str


class Derivations(Mapping[DerivationKey, Derivation]):
    """Read-only mapping key → :class:`Derivation`, each built on first access.

    The keys are known at once; a derivation is assembled only when a reviewer opens it, which
    keeps :func:`core.estimate.evaluate` fast. Built derivations are kept.
    """

    __slots__ = ("_built", "_makers")

    def __init__(self, makers: Mapping[DerivationKey, Callable[[], Derivation]]) -> None:
        self._makers = dict(makers)
        self._built: dict[DerivationKey, Derivation] = {}

    def __getitem__(self, key: DerivationKey) -> Derivation:
        if key not in self._built:
            self._built[key] = self._makers[key]()
        return self._built[key]

    def __iter__(self) -> Iterator[DerivationKey]:
        return iter(self._makers)

    def __len__(self) -> int:
        return len(self._makers)

    def __contains__(self, key: object) -> bool:
        return key in self._makers


def _empty(columns: tuple[str, ...]) -> pd.DataFrame:
    return pd.DataFrame({c: pd.Series(dtype=object) for c in columns})


@dataclass(frozen=True, slots=True, eq=False)
class Evaluation:
    """Everything the estimator found for one study.

    Attributes
    ----------
    scorecard : DataFrame
        One row per (candidate, band, metric): candidate, band, metric ("gain", "p1db",
        "pae"), unit ("dB", "dBm", "%"), estimate (worst in band), target, margin (estimate −
        target; PAE in points), status (:class:`Status`). estimate is never NaN.
    curves : DataFrame
        candidate, band, f_hz, gain_db, p1db_dbm, pae_pct over each band's grid.
    design : DataFrame
        One row per candidate × design (a separate band, a wideband "union", a switched
        state); see :data:`DESIGN_COLUMNS` and the notes of :func:`core.estimate.evaluate`.
    summary : DataFrame
        One row per candidate; see :data:`SUMMARY_COLUMNS`.
    findings : tuple of Finding
        Infeasible requests and cautions.
    derivations : Derivations
        (candidate, band, metric) for every scorecard row, plus (candidate, None, "die_area")
        and (candidate, None, "dc_power") → :class:`Derivation`.
    """

    scorecard: pd.DataFrame
    curves: pd.DataFrame
    design: pd.DataFrame
    summary: pd.DataFrame
    findings: tuple[Finding, ...] = ()
    derivations: Derivations = field(default_factory=lambda: Derivations({}))

    @classmethod
    def empty(cls) -> Evaluation:
        """The evaluation of a study without enabled candidates: empty frames, no findings."""
        return cls(
            scorecard=_empty(SCORECARD_COLUMNS),
            curves=_empty(CURVE_COLUMNS),
            design=_empty(DESIGN_COLUMNS),
            summary=_empty(SUMMARY_COLUMNS),
        )

    def status_of(self, candidate: str, band: str, metric: Metric) -> Status:
        """Status of one scorecard row (KeyError if absent)."""
        sc = self.scorecard
        hit = sc[(sc["candidate"] == candidate) & (sc["band"] == band) & (sc["metric"] == metric)]
        if hit.empty:
            raise KeyError((candidate, band, metric))
        return Status(hit["status"].iloc[0])
