"""Die, unit cost, NRE, crossover volumes and weighted scores of every candidate of a study.

Applies the cost model of :mod:`core.cost` (dies per wafer, yield, known-good-die cost, NRE) to
the dies the PA estimator sized, and turns them into per-radio figures. Pure numpy/pandas.

Costing rules (DESIGN.md §5; the choices that are ours are stated here and in the derivations):

- **Element channel.** The PA silicon one antenna element needs to cover every band. Its
  recurring cost is the sum of its packaged dies plus, when a band-select part is used, that
  part.
- **Separate, one die per band** (``die_per_band``): one die design, one mask set and one test
  program per band; an element channel holds one die of each band.
- **Separate, one shared die** (``shared_die``): one die holding every band's PA, so one mask
  set and one test program, but the design effort of every band's PA (effort × n_bands).
- **Wideband** and **switched**: one die design; its effort is the candidate's
  ``design_effort_factor`` × the effort of one single-band PA. Every kind multiplies its effort
  by that factor (it is 1 for a plain single-band design).
- **Band-select part.** A separate candidate whose outputs share a feed (``combining`` is a
  band-select switch or a diplexer) buys one ``band_select_cost_usd`` part per element (with a
  single band there is nothing to select and no part). Wideband and switched candidates have one
  output and no such part.
- **Per radio.** Separate, one die per band: band b's die appears on each of that band's
  ``n_elements_b`` elements, so the radio holds Σ_b n_elements_b PA dies. Every other
  arrangement puts all bands on one die per element of one shared array of max_b n_elements_b
  elements (a band with fewer elements leaves some of them unused in that band). Band-select
  parts sit on the shared array: max_b n_elements_b of them.
- **Volume** is counted in radios (``study.cost.design_volume``); the unit cost at volume V is
  the per-radio PA cost + NRE / V, and crossover volumes are solved on those lines.
- A candidate whose die cannot be costed (no whole die fits, a bad cost input, a design the
  estimator could not reach) gets a finding and NaN figures, and is left out of the
  crossovers and curves; nothing is raised.

References
----------
Hennessy & Patterson, *Computer Architecture: A Quantitative Approach*, ch. 1, "Cost of an
Integrated Circuit" (die cost, test cost per good die); de Vries (2005) (dies per wafer);
see :mod:`core.cost` for the full list.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from types import MappingProxyType
from typing import Any

import numpy as np
import pandas as pd

from core.cost import (
    CostError,
    CostInputs,
    DieGrid,
    Nre,
    UnitCost,
    count_whole_dies,
    crossover_table,
    nre_usd,
    unit_cost,
    unit_cost_at_volume,
    validate_cost_inputs,
)
from core.evaluation import Derivation, Finding
from core.process import ProcessCard
from core.study.model import Candidate, CandidateKind, Combining, DieArrangement, Study

__all__ = [
    "ALL_BANDS_DIE",
    "AREA_PARTS",
    "DIE_COLUMNS",
    "PER_CANDIDATE_COLUMNS",
    "VOLUME_POINTS",
    "CostResult",
    "area_breakdown",
    "cost_inputs",
    "cost_study",
    "pareto_mask",
    "volume_grid",
    "weighted_scores",
    "worst_margin_db",
]

#: Columns of :attr:`CostResult.per_candidate`, in order.
PER_CANDIDATE_COLUMNS = (
    "candidate", "kind", "process", "feasible", "note", "n_designs", "dies_per_channel",
    "largest_die", "die_area_mm2", "die_width_mm", "die_height_mm", "channel_area_mm2",
    "gross_dpw_formula", "gross_dpw_exact", "die_yield",
    "die_cost_usd", "test_cost_usd", "package_cost_usd", "band_select_usd", "recurring_usd",
    "nre_mask_usd", "nre_design_usd", "nre_test_dev_usd", "nre_usd",
    "pa_dies_per_radio", "band_select_per_radio",
    "radio_die_usd", "radio_test_usd", "radio_package_usd", "radio_band_select_usd",
    "pa_cost_per_radio_usd", "nre_per_radio_usd", "unit_cost_at_design_volume_usd",
)  # fmt: skip
#: Columns of :attr:`CostResult.dies`, in order.
DIE_COLUMNS = (
    "candidate", "die", "band", "process", "n_per_channel", "n_per_radio",
    "width_mm", "height_mm", "area_mm2", "wafer_diameter_mm", "edge_exclusion_mm", "scribe_mm",
    "fits", "gross_dpw_formula", "gross_dpw_exact", "die_yield", "die_cost_usd",
    "test_cost_usd", "test_yield_loss_usd", "known_good_die_usd", "package_cost_usd",
    "package_yield_loss_usd", "packaged_die_usd",
)  # fmt: skip
#: (column of :func:`area_breakdown`, legend text), bottom to top of a stacked bar.
AREA_PARTS = (
    ("active_mm2", "Active devices"),
    ("networks_mm2", "Matching networks"),
    ("switches_control_mm2", "Switches and control"),
    ("pads_mm2", "Pads"),
    ("overhead_mm2", "Layout overhead, min-die fill"),
)
#: Name of the one die of a candidate that holds every band.
ALL_BANDS_DIE = "all bands"
#: Points of the log volume grid of :attr:`CostResult.curves`.
VOLUME_POINTS = 161
_NO_FIT = "no whole die fits"
_HP = "Hennessy & Patterson, Computer Architecture: A Quantitative Approach, ch. 1 'Cost of an "
_HP += "Integrated Circuit'"
#: Field of CostInputs → where it lives in the study ("card" = the candidate's process card).
_INPUT_PATHS = {
    "wafer_cost_usd": "card", "wafer_diameter_mm": "card", "d0_per_cm2": "card",
    "mask_set_cost_usd": "card", "critical_area_fraction": "cost.critical_area_pct",
    "test_yield": "cost.test_yield_pct", "package_yield": "cost.package_yield_pct",
}  # fmt: skip

Row = tuple[str, float, str]


@dataclass(frozen=True, eq=False)
class CostResult:
    """Every cost figure of a study's evaluated candidates (money in USD, volume in radios).

    Attributes
    ----------
    per_candidate : pandas.DataFrame
        One row per evaluated candidate, columns :data:`PER_CANDIDATE_COLUMNS`, study order.
        ``largest_die``, ``die_*``, ``gross_dpw_*`` and ``die_yield`` describe its largest die
        (every die is in :attr:`dies`); ``channel_area_mm2`` is the silicon of one element
        channel. ``die_cost_usd`` … ``recurring_usd`` are per element channel:
        ``die_cost_usd`` includes defect-free dies scrapped at test and ``package_cost_usd``
        the known good dies lost in assembly, so the four parts add up to ``recurring_usd``.
        ``radio_*`` split ``pa_cost_per_radio_usd`` (the whole array) the same way;
        ``unit_cost_at_design_volume_usd`` = ``pa_cost_per_radio_usd`` + NRE / design volume.
        ``feasible`` is False (recurring figures NaN, ``note`` says why) when a die could not
        be costed; its NRE columns are still filled when the cost inputs are valid.
    dies : pandas.DataFrame
        One row per distinct die design, columns :data:`DIE_COLUMNS`: the
        :class:`core.cost.UnitCost` terms per die and the wafer geometry (see :meth:`grid`).
    crossovers : pandas.DataFrame
        :func:`core.cost.crossover_table` of the feasible candidates' per-radio lines, plus
        ``unit_cost_usd`` at the crossover volume (NaN where there is none).
    curves : pandas.DataFrame
        Long format: candidate, volume, unit_cost_usd on :attr:`volumes`.
    volumes : numpy.ndarray
        Log-spaced volume grid of the curves, (VOLUME_POINTS,).
    derivations : Mapping
        (candidate, None, "unit_cost"), (candidate, None, "nre") and, per die,
        (candidate, band, "die_cost") (band None for a die that holds every band).
    findings : tuple of core.evaluation.Finding
        Severity "error"; the message names the study field to change where one is to blame.
    design_volume : int
    """

    per_candidate: pd.DataFrame
    dies: pd.DataFrame
    crossovers: pd.DataFrame
    curves: pd.DataFrame
    volumes: np.ndarray
    derivations: Mapping[tuple[str, str | None, str], Derivation]
    findings: tuple[Finding, ...]
    design_volume: int

    def row(self, candidate: str) -> dict[str, Any]:
        """The per-candidate row of ``candidate`` as a dict (KeyError if absent)."""
        hit = self.per_candidate[self.per_candidate["candidate"] == candidate]
        if hit.empty:
            raise KeyError(candidate)
        return hit.iloc[0].to_dict()

    def dies_of(self, candidate: str) -> pd.DataFrame:
        """The die rows of ``candidate`` (empty if it has none)."""
        return self.dies[self.dies["candidate"] == candidate].reset_index(drop=True)

    def grid(self, candidate: str, die: str) -> DieGrid:
        """The best-offset whole-die grid of one die on its wafer, for a wafer map.

        Recomputed on demand (a few ms) rather than kept for every die.

        Raises
        ------
        KeyError
            If there is no such die.
        CostError
            If the die has no size (its design was not reached).
        """
        d = self.dies[(self.dies["candidate"] == candidate) & (self.dies["die"] == die)]
        if d.empty:
            raise KeyError((candidate, die))
        r = d.iloc[0]
        keys = ("wafer_diameter_mm", "width_mm", "height_mm", "edge_exclusion_mm", "scribe_mm")
        return count_whole_dies(*(float(r[k]) for k in keys))


@dataclass(frozen=True, slots=True)
class _Die:
    name: str
    band: str | None
    width_mm: float
    height_mm: float
    n_per_radio: int


def cost_inputs(study: Study, card: ProcessCard) -> CostInputs:
    """The :class:`core.cost.CostInputs` of ``card`` under the study's cost settings.

    Wafer diameter and cost, D0 and mask-set cost come from the card, the rest from
    ``study.cost`` (percentages become fractions).

    Examples
    --------
    >>> from core.study import Study
    >>> s = Study.new()
    >>> cost_inputs(s, s.process_cards[0]).test_yield
    0.97
    """
    c = study.cost
    return CostInputs(
        wafer_cost_usd=card.wafer_cost_usd,
        wafer_diameter_mm=card.wafer_diameter_mm,
        edge_exclusion_mm=c.edge_exclusion_mm,
        scribe_mm=c.scribe_mm,
        d0_per_cm2=card.d0_per_cm2,
        yield_model=str(c.yield_model),  # type: ignore[arg-type]
        yield_alpha=c.yield_alpha,
        critical_area_fraction=c.critical_area_pct / 100.0,
        test_time_s=c.test_time_s,
        test_rate_usd_per_h=c.test_rate_usd_per_h,
        test_yield=c.test_yield_pct / 100.0,
        package_cost_usd=c.package_cost_usd,
        package_yield=c.package_yield_pct / 100.0,
        mask_set_cost_usd=card.mask_set_cost_usd,
        spins=c.spins,
        design_effort_h=c.design_effort_h,
        design_rate_usd_per_h=c.design_rate_usd_per_h,
        test_development_usd=c.test_development_usd,
    )


def _study_path(study: Study, card: ProcessCard, field: str) -> str:
    where = _INPUT_PATHS.get(field, f"cost.{field}")
    if where == "card":
        i = next(i for i, c in enumerate(study.process_cards) if c.name == card.name)
        return f"process_cards[{i}].{field}"
    return where


def _fits(inputs: CostInputs, w: float, h: float) -> bool:
    """Whether one whole pitch cell fits on the usable circle at all.

    The disc is convex and symmetric, so a single cell is best placed centred: it fits iff its
    half diagonal is within the usable radius (count > 0 of :func:`core.cost.count_whole_dies`
    in closed form).
    """
    r = inputs.wafer_diameter_mm / 2.0 - inputs.edge_exclusion_mm
    px, py = w + inputs.scribe_mm, h + inputs.scribe_mm
    return (px / 2.0) ** 2 + (py / 2.0) ** 2 <= r * r


def _per_band(cand: Candidate) -> bool:
    return cand.kind == CandidateKind.SEPARATE and (
        cand.die_arrangement == DieArrangement.DIE_PER_BAND
    )


def _nre(inputs: CostInputs, cand: Candidate, n_bands: int) -> tuple[Nre, int, float, str]:
    """NRE, number of die designs, effort multiplier per design and the rule applied."""
    f = cand.design_effort_factor
    if _per_band(cand):
        return nre_usd(inputs, f, n_bands), n_bands, f, "one design and mask set per band"
    if cand.kind == CandidateKind.SEPARATE:
        rule = "one shared die: one mask set, every band's PA designed (effort × n_bands)"
        return nre_usd(inputs, f * n_bands, 1), 1, f * n_bands, rule
    return nre_usd(inputs, f, 1), 1, f, "one design, effort × design-effort factor"


def _uses_band_select(cand: Candidate, n_bands: int) -> bool:
    return (
        cand.kind == CandidateKind.SEPARATE
        and cand.combining != Combining.SEPARATE_FEEDS
        and n_bands > 1
    )


@dataclass(frozen=True)
class _Sizes:
    """The evaluation's die sizes, read once per costing (frame lookups are slow per item)."""

    die_wh: dict[str, tuple[float, float]]
    design_area: dict[tuple[str, str], float]

    @classmethod
    def from_evaluation(cls, evaluation: Any) -> _Sizes:
        s = evaluation.summary
        die_wh: dict[str, tuple[float, float]] = {}
        for name, w, h in zip(s["candidate"], s["die_width_mm"], s["die_height_mm"], strict=True):
            die_wh.setdefault(str(name), (float(w), float(h)))
        d = evaluation.design
        design_area: dict[tuple[str, str], float] = {}
        for key in zip(d["candidate"], d["design"], d["area_total_mm2"], strict=True):
            design_area.setdefault((str(key[0]), str(key[1])), float(key[2]))
        return cls(die_wh, design_area)


def _dies_of(study: Study, sizes: _Sizes, cand: Candidate, card: ProcessCard) -> list[_Die]:
    """The distinct dies of ``cand`` with their count per radio (rules of the module).

    Sizes are the estimator's: its summary for a one-die candidate; for separate PAs on one die
    per band, each band design's ``area_total_mm2`` (minimum die area already applied) shaped
    as the estimator shapes a die, W = √(A·aspect), H = √(A/aspect).
    """
    n_el = [b.link.n_elements for b in study.bands]
    if not _per_band(cand):
        w, h = sizes.die_wh[cand.name]
        return [_Die(ALL_BANDS_DIE, None, w, h, max(n_el))]
    dies = []
    for b, n in zip(study.bands, n_el, strict=True):
        a = sizes.design_area.get((cand.name, b.name), math.nan)
        w, h = math.sqrt(a * card.die_aspect), math.sqrt(a / card.die_aspect)
        dies.append(_Die(b.name, b.name, w, h, n))
    return dies


def _finding(cand: Candidate, band: str | None, message: str) -> Finding:
    return Finding(cand.name, band, "error", message)


def _die_row(cand: Candidate, die: _Die, ci: CostInputs, uc: UnitCost | None) -> dict[str, Any]:
    row: dict[str, Any] = dict.fromkeys(DIE_COLUMNS, math.nan)
    row.update(
        candidate=cand.name, die=die.name, band=die.band, process=cand.process, n_per_channel=1,
        n_per_radio=die.n_per_radio, width_mm=die.width_mm, height_mm=die.height_mm,
        area_mm2=die.width_mm * die.height_mm, wafer_diameter_mm=ci.wafer_diameter_mm,
        edge_exclusion_mm=ci.edge_exclusion_mm, scribe_mm=ci.scribe_mm, fits=uc is not None,
    )  # fmt: skip
    if uc is not None:
        row.update({k: getattr(uc, k) for k in DIE_COLUMNS[13:22]})
        row["packaged_die_usd"] = uc.recurring_usd
    return row


def _nan_row(cand: Candidate, note: str) -> dict[str, Any]:
    row: dict[str, Any] = dict.fromkeys(PER_CANDIDATE_COLUMNS, math.nan)
    row.update(candidate=cand.name, kind=str(cand.kind), process=cand.process, feasible=False)
    row["note"] = note
    return row


def cost_study(study: Study, evaluation: Any) -> CostResult:
    """Cost every candidate the evaluation covers: dies, unit cost, NRE, crossovers, curves.

    Parameters
    ----------
    study : Study
        A valid study (the one that was evaluated).
    evaluation : core.evaluation.Evaluation
        ``core.estimate.evaluate(study)``; its ``summary`` (die size) and ``design`` (area
        per band design) frames are read.

    Returns
    -------
    CostResult
        Problems (a bad cost input, a die larger than the wafer, a design not reached) become
        findings and NaN figures for that candidate; nothing is raised for them.

    References
    ----------
    Hennessy & Patterson, ch. 1 "Cost of an Integrated Circuit"; DESIGN.md §5.

    Examples
    --------
    >>> from core.estimate import evaluate
    >>> from core.study import Study
    >>> s = Study.new()
    >>> r = cost_study(s, evaluate(s))
    >>> bool(r.per_candidate["feasible"].all()), len(r.dies)
    (True, 1)
    """
    volume = int(study.cost.design_volume)
    n_bands = len(study.bands)
    covered = set(evaluation.summary["candidate"])
    sizes = _Sizes.from_evaluation(evaluation)
    rows: list[dict[str, Any]] = []
    die_rows: list[dict[str, Any]] = []
    findings: list[Finding] = []
    derivations: dict[tuple[str, str | None, str], Derivation] = {}
    for cand in study.candidates:
        if not cand.enabled or cand.name not in covered:
            continue
        card = study.card(cand.process)
        inputs = cost_inputs(study, card)
        problems = validate_cost_inputs(inputs)
        for field, msg in problems:
            path = _study_path(study, card, field)
            findings.append(_finding(cand, None, f"{path}: {msg}; candidate not costed"))
        if problems:
            rows.append(_nan_row(cand, "cost inputs invalid"))
            continue
        nre, n_designs, factor, rule = _nre(inputs, cand, n_bands)
        derivations[(cand.name, None, "nre")] = _nre_derivation(
            cand, inputs, nre, n_designs, factor, rule, volume
        )
        dies = _dies_of(study, sizes, cand, card)
        costs: list[UnitCost] = []
        notes: list[str] = []
        for die in dies:
            uc = None
            if not (die.width_mm > 0 and math.isfinite(die.width_mm * die.height_mm)):
                notes.append("design not reached")
                findings.append(_finding(cand, die.band, "no die size: design not reached"))
            elif not _fits(inputs, die.width_mm, die.height_mm):
                notes.append(_NO_FIT)
                usable = inputs.wafer_diameter_mm - 2.0 * inputs.edge_exclusion_mm
                path = _study_path(study, card, "wafer_diameter_mm")
                findings.append(_finding(cand, die.band, (
                    f"{_NO_FIT}: the {die.width_mm:.2f} × {die.height_mm:.2f} mm die does not "
                    f"fit the {usable:g} mm usable circle of a {inputs.wafer_diameter_mm:g} mm "
                    f"wafer ({path}, cost.edge_exclusion_mm)"
                )))  # fmt: skip
            else:
                uc = unit_cost(die.width_mm, die.height_mm, inputs)
                costs.append(uc)
                derivations[(cand.name, die.band, "die_cost")] = _die_derivation(
                    cand, die, inputs, uc
                )
            die_rows.append(_die_row(cand, die, inputs, uc))
        if notes:
            # The NRE does not depend on the die: it is still shown.
            rows.append({**_nan_row(cand, notes[0]), **_nre_columns(nre, n_designs, volume)})
            continue
        row = _candidate_row(cand, dies, costs, nre, n_designs, n_bands, volume)
        rows.append(row)
        derivations[(cand.name, None, "unit_cost")] = _unit_derivation(
            cand, inputs, dies, costs, row, volume
        )
    per = pd.DataFrame(rows, columns=list(PER_CANDIDATE_COLUMNS))
    per["feasible"] = per["feasible"].astype(bool)  # one column: astype({...}) copies all
    ok = per[per["feasible"]]
    names = list(ok["candidate"])
    rec = [float(x) for x in ok["pa_cost_per_radio_usd"]]
    nre_all = [float(x) for x in ok["nre_usd"]]
    cross = crossover_table(names, rec, nre_all)
    line = {n: (r, e) for n, r, e in zip(names, rec, nre_all, strict=True)}
    cross["unit_cost_usd"] = [
        float(unit_cost_at_volume(*line[a], v)) if np.isfinite(v) else math.nan
        for a, v in zip(cross["candidate_a"], cross["volume"], strict=True)
    ]
    vols = volume_grid(volume, study.cost.lifetime_volume, cross["volume"].to_numpy())
    y = [unit_cost_at_volume(r, e, vols) for r, e in zip(rec, nre_all, strict=True)]
    curves = pd.DataFrame(
        {
            "candidate": np.repeat(np.asarray(names, dtype=object), vols.size),
            "volume": np.tile(vols, len(names)),
            "unit_cost_usd": np.concatenate(y) if y else np.empty(0),
        }
    )
    return CostResult(
        per_candidate=per,
        dies=pd.DataFrame(die_rows, columns=list(DIE_COLUMNS)),
        crossovers=cross,
        curves=curves,
        volumes=vols,
        derivations=MappingProxyType(derivations),
        findings=tuple(findings),
        design_volume=volume,
    )


def _nre_columns(nre: Nre, n_designs: int, volume: int) -> dict[str, Any]:
    return {
        "n_designs": n_designs, "nre_mask_usd": nre.mask_usd, "nre_design_usd": nre.design_usd,
        "nre_test_dev_usd": nre.test_dev_usd, "nre_usd": nre.total_usd,
        "nre_per_radio_usd": nre.total_usd / volume,
    }  # fmt: skip


def _candidate_row(
    cand: Candidate,
    dies: list[_Die],
    costs: list[UnitCost],
    nre: Nre,
    n_designs: int,
    n_bands: int,
    volume: int,
) -> dict[str, Any]:
    """The per-candidate figures from its costed dies (see :class:`CostResult`)."""
    # Each scrap loss is booked to the step that scraps it, so the parts add up to the total.
    die_part = np.array([u.die_cost_usd + u.test_yield_loss_usd for u in costs])
    test_part = np.array([u.test_cost_usd for u in costs])
    pkg_part = np.array([u.package_cost_usd + u.package_yield_loss_usd for u in costs])
    n_radio = np.array([d.n_per_radio for d in dies])
    sel = cand.band_select_cost_usd if _uses_band_select(cand, n_bands) else 0.0
    n_sel = int(n_radio.max()) if sel else 0
    areas = [d.width_mm * d.height_mm for d in dies]
    big = int(np.argmax(areas))
    radio = [float(n_radio @ die_part), float(n_radio @ test_part), float(n_radio @ pkg_part)]
    per_radio = sum(radio) + n_sel * sel
    return {
        "candidate": cand.name, "kind": str(cand.kind), "process": cand.process,
        "feasible": True, "note": "", "dies_per_channel": len(dies),
        "largest_die": dies[big].name, "die_area_mm2": areas[big],
        "die_width_mm": dies[big].width_mm, "die_height_mm": dies[big].height_mm,
        "channel_area_mm2": sum(areas), "gross_dpw_formula": costs[big].gross_dpw_formula,
        "gross_dpw_exact": costs[big].gross_dpw_exact, "die_yield": costs[big].die_yield,
        "die_cost_usd": die_part.sum(), "test_cost_usd": test_part.sum(),
        "package_cost_usd": pkg_part.sum(), "band_select_usd": sel,
        "recurring_usd": die_part.sum() + test_part.sum() + pkg_part.sum() + sel,
        **_nre_columns(nre, n_designs, volume), "pa_dies_per_radio": int(n_radio.sum()),
        "band_select_per_radio": n_sel,
        "radio_die_usd": radio[0], "radio_test_usd": radio[1], "radio_package_usd": radio[2],
        "radio_band_select_usd": n_sel * sel, "pa_cost_per_radio_usd": per_radio,
        "unit_cost_at_design_volume_usd": per_radio + nre.total_usd / volume,
    }  # fmt: skip


# --- derivations ----------------------------------------------------------------------------


def _die_derivation(cand: Candidate, die: _Die, ci: CostInputs, uc: UnitCost) -> Derivation:
    w, h, s = die.width_mm, die.height_mm, ci.scribe_mm
    return Derivation(
        title=f"{cand.name}: cost per good die ({die.name})",
        formula=(
            "DPW formula = π·d²/(4S) − π·d/√(2S),  d = D − 2·edge,  S = (w + s)·(h + s)\n"
            "N = whole pitch cells inside the usable circle, best grid offset (used for cost)\n"
            f"Y = {ci.yield_model} yield of λ = A_crit·D0\n"
            "die = W / (N·Y)"
        ),
        inputs=(
            ("die width w", w, "mm"), ("die height h", h, "mm"), ("scribe s", s, "mm"),
            ("wafer diameter D", ci.wafer_diameter_mm, "mm"),
            ("edge exclusion", ci.edge_exclusion_mm, "mm"),
            ("wafer cost W", ci.wafer_cost_usd, "USD"), ("D0", ci.d0_per_cm2, "/cm²"),
            ("yield-critical share", 100.0 * ci.critical_area_fraction, "%"),
        ),
        steps=(
            ("usable diameter d", ci.wafer_diameter_mm - 2.0 * ci.edge_exclusion_mm, "mm"),
            ("pitch area S", (w + s) * (h + s), "mm²"),
            ("DPW formula", uc.gross_dpw_formula, "dies"),
            ("N exact", uc.gross_dpw_exact, "dies"),
            ("A_crit", ci.critical_area_fraction * w * h, "mm²"),
            ("Y", 100.0 * uc.die_yield, "%"),
        ),
        result=uc.die_cost_usd,
        unit="USD",
        source=f"{_HP}; de Vries (2005) dies per wafer; Murphy (1964), Seeds (1967), "
        "Stapper (1973) yield models",
    )  # fmt: skip


def _unit_derivation(
    cand: Candidate,
    ci: CostInputs,
    dies: list[_Die],
    costs: list[UnitCost],
    row: dict[str, Any],
    volume: int,
) -> Derivation:
    rule = (
        "one die of each band on each of that band's elements"
        if _per_band(cand)
        else "one die per element of one shared array of max_b n_elements_b elements"
    )
    steps: list[Row] = []
    for die, uc in zip(dies, costs, strict=True):
        t = f"[{die.name}] "
        steps += [
            (f"{t}N exact", uc.gross_dpw_exact, "dies"), (f"{t}Y", 100.0 * uc.die_yield, "%"),
            (f"{t}die W/(N·Y)", uc.die_cost_usd, "USD"),
            (f"{t}known good die", uc.known_good_die_usd, "USD"),
            (f"{t}packaged die", uc.recurring_usd, "USD"),
            (f"{t}dies per radio", die.n_per_radio, ""),
        ]  # fmt: skip
    steps += [
        ("recurring per element channel", row["recurring_usd"], "USD"),
        ("band-select parts per radio", row["band_select_per_radio"], ""),
        ("PA cost per radio", row["pa_cost_per_radio_usd"], "USD"),
        ("NRE / V", row["nre_per_radio_usd"], "USD"),
    ]
    return Derivation(
        title=f"{cand.name}: PA cost per radio at {volume:,} radios",
        formula=(
            "die = W/(N·Y);  KGD = (W/N + t·rate)/(Y·Ty);  packaged die = (KGD + package)/Py\n"
            "per radio = Σ_dies n_per_radio · packaged die + n_select · band-select part\n"
            f"unit cost(V) = per radio + NRE/V   ({rule})"
        ),
        inputs=(
            ("wafer cost W", ci.wafer_cost_usd, "USD"),
            ("test time × rate t·rate", ci.test_time_s * ci.test_rate_usd_per_h / 3600, "USD"),
            ("test yield Ty", 100.0 * ci.test_yield, "%"),
            ("package and assembly", ci.package_cost_usd, "USD"),
            ("assembly yield Py", 100.0 * ci.package_yield, "%"),
            ("band-select part", row["band_select_usd"], "USD"),
            ("NRE", row["nre_usd"], "USD"),
            ("design volume V", volume, "radios"),
        ),
        steps=tuple(steps),
        result=float(row["unit_cost_at_design_volume_usd"]),
        unit="USD",
        source=f"{_HP} (test cost per good die); rules of core.costing",
    )


def _nre_derivation(
    cand: Candidate, ci: CostInputs, nre: Nre, n_designs: int, factor: float, rule: str, v: int
) -> Derivation:
    return Derivation(
        title=f"{cand.name}: non-recurring engineering cost",
        formula=(
            "mask = mask set · spins · n_designs\n"
            "design = hours · rate · effort multiplier · n_designs\n"
            "test development = per-design cost · n_designs\n"
            f"NRE = mask + design + test development   ({rule})"
        ),
        inputs=(
            ("mask-set cost", ci.mask_set_cost_usd, "USD"), ("spins", ci.spins, ""),
            ("design effort per PA", ci.design_effort_h, "h"),
            ("design rate", ci.design_rate_usd_per_h, "USD/h"),
            ("design-effort factor", cand.design_effort_factor, ""),
            ("test development per design", ci.test_development_usd, "USD"),
        ),
        steps=(
            ("die designs n_designs", n_designs, ""),
            ("effort multiplier per design", factor, ""), ("mask", nre.mask_usd, "USD"),
            ("design", nre.design_usd, "USD"), ("test development", nre.test_dev_usd, "USD"),
            ("NRE per radio at design volume", nre.total_usd / v, "USD"),
        ),
        result=nre.total_usd,
        unit="USD",
        source="DESIGN.md §5 (NRE = mask sets × spins + design effort + test development); "
        "rules of core.costing",
    )  # fmt: skip


# --- grids, area parts, scores --------------------------------------------------------------


def volume_grid(design_volume: float, lifetime_volume: float, crossovers: Sequence[float] = ()):
    """Log-spaced volumes (radios) spanning the design, lifetime and crossover volumes.

    From the decade at least 10× below the smallest of them (never below 1 radio) to the
    decade at least 10× above the largest, :data:`VOLUME_POINTS` points.

    Returns
    -------
    numpy.ndarray
        (VOLUME_POINTS,), increasing.

    Raises
    ------
    CostError
        If no volume is positive.

    Examples
    --------
    >>> g = volume_grid(20000, 80000)
    >>> float(g[0]), float(g[-1])
    (1000.0, 1000000.0)
    """
    marks = np.asarray([design_volume, lifetime_volume, *crossovers], dtype=float)
    marks = marks[np.isfinite(marks) & (marks > 0)]
    if marks.size == 0:
        raise CostError("design_volume: must be positive")
    lo = max(0.0, math.floor(math.log10(marks.min()) - 1.0))
    hi = max(lo + 1.0, math.ceil(math.log10(marks.max()) + 1.0))
    return np.logspace(lo, hi, VOLUME_POINTS)


def area_breakdown(evaluation: Any) -> pd.DataFrame:
    """Die area of each candidate's element channel, split by part (mm²).

    Parts are the estimator's, before the layout overhead: active devices, matching networks,
    switches + switch control, pads. A separate candidate adds up its band designs; a wideband
    or switched candidate has one design (switched states share it: their rows repeat the same
    parts, counted once). The overhead part is the rest up to the channel's die area
    (``total_die_area_mm2`` of the summary): the layout overhead factor and any fill up to the
    minimum die area, so the parts add up to that area.

    Returns
    -------
    pandas.DataFrame
        candidate, the columns of :data:`AREA_PARTS`, total_mm2; in summary order.
    """
    design = evaluation.design
    out = []
    for _, s in evaluation.summary.iterrows():
        rows = design[design["candidate"] == s["candidate"]]
        if str(s["kind"]) != str(CandidateKind.SEPARATE):
            rows = rows.iloc[:1]
        total = float(s["total_die_area_mm2"])
        parts = {
            "active_mm2": float(rows["area_active_mm2"].sum()),
            "networks_mm2": float(rows["area_networks_mm2"].sum()),
            "switches_control_mm2": float(
                rows["area_switches_mm2"].sum() + rows["area_control_mm2"].sum()
            ),
            "pads_mm2": float(rows["area_pads_mm2"].sum()),
        }  # fmt: skip
        parts["overhead_mm2"] = max(0.0, total - sum(parts.values()))
        out.append({"candidate": s["candidate"], **parts, "total_mm2": total})
    return pd.DataFrame(out, columns=["candidate", *(k for k, _ in AREA_PARTS), "total_mm2"])


def worst_margin_db(evaluation: Any) -> pd.Series:
    """Each candidate's worst margin over bands and metrics, in dB (higher is better).

    Gain and P1dB margins are in dB already. A PAE margin in percentage points is not, so PAE
    enters as 10·log10(PAE_estimate/PAE_target): the dB by which DC power exceeds (negative)
    or stays below (positive) what the target efficiency allows at the same output. (The
    summary's ``worst_margin_db`` leaves PAE out, and the estimator sizes every design to its
    P1dB target plus the design margin, so without PAE the margin rarely differs between
    candidates.)

    Returns
    -------
    pandas.Series
        Indexed by candidate, in summary order; −inf where a PAE estimate is 0.
    """
    sc = evaluation.scorecard
    margin = sc["margin"].to_numpy(dtype=float)
    pae = (sc["metric"] == "pae").to_numpy()
    est, tgt = sc["estimate"].to_numpy(dtype=float), sc["target"].to_numpy(dtype=float)
    with np.errstate(divide="ignore"):
        ratio_db = 10.0 * np.log10(np.where(pae, est, 1.0)) - 10.0 * np.log10(
            np.where(pae, tgt, 1.0)
        )
    m = pd.Series(np.where(pae, ratio_db, margin)).groupby(sc["candidate"].to_numpy()).min()
    return m.reindex(list(evaluation.summary["candidate"]))


def pareto_mask(cost, benefit) -> np.ndarray:
    """Which points are Pareto-optimal for (cost ↓, benefit ↑).

    A point is dominated when another has cost <= and benefit >= with at least one strict;
    the mask is True for the points no other point dominates. Points with a non-finite cost
    or benefit are never in the set and dominate nothing.

    Parameters
    ----------
    cost, benefit : array_like, shape (n,)

    Returns
    -------
    numpy.ndarray of bool, shape (n,)

    Raises
    ------
    ValueError
        If the shapes differ or are not 1-D.

    Examples
    --------
    >>> pareto_mask([1.0, 2.0, 3.0], [0.0, 1.0, 0.5]).tolist()
    [True, True, False]
    """
    c, b = np.asarray(cost, dtype=float), np.asarray(benefit, dtype=float)
    if c.shape != b.shape or c.ndim != 1:
        raise ValueError("cost, benefit: must be 1-D arrays of the same length")
    ok = np.isfinite(c) & np.isfinite(b)
    ci, bi, cj, bj = c[:, None], b[:, None], c[None, :], b[None, :]  # i tested, j a rival
    dominated = (cj <= ci) & (bj >= bi) & ((cj < ci) | (bj > bi)) & ok[None, :]
    return ok & ~dominated.any(axis=1)


def _minmax(x: np.ndarray, higher_better: bool) -> np.ndarray:
    """Min–max normalise onto [0, 1], 1 = best; all equal → 1; non-finite → 0 (the worst)."""
    ok = np.isfinite(x)
    out = np.zeros(x.shape)
    if ok.any():
        lo, hi = float(x[ok].min()), float(x[ok].max())
        t = (x[ok] - lo) / (hi - lo) if hi > lo else np.ones(int(ok.sum()))
        out[ok] = t if higher_better or hi == lo else 1.0 - t
    return out


def weighted_scores(study: Study, evaluation: Any, cost_result: CostResult) -> pd.DataFrame:
    """Overall weighted score of each candidate and the Pareto set (unit cost, worst margin).

    Metrics (``study.weights`` field → value, better direction): performance → the worst
    margin of :func:`worst_margin_db` (higher); unit_cost → unit cost at the design volume
    (lower); dc_power → DC power of the whole array (lower); area → die area of an element
    channel (lower). Each is min–max normalised across the candidates onto [0, 1], 1 the
    best; a metric equal for all gives each 1 (it does not discriminate); a missing value (a
    candidate not costed) gives 0, the worst. score = Σ w·s / Σ w, in [0, 1], higher better.
    The Pareto set (:func:`pareto_mask`) is on (unit cost at the design volume ↓, worst
    margin ↑) over the candidates that have both.

    Returns
    -------
    pandas.DataFrame
        candidate, score, pareto, worst_margin_db, and the normalised s_performance,
        s_unit_cost, s_dc_power, s_area; one row per summary candidate, in its order.

    Raises
    ------
    ValueError
        If every weight is 0 ("weights: ...").
    """
    weights = {k: float(getattr(study.weights, k)) for k in _SCORE_METRICS}
    total = sum(weights.values())
    if not total > 0:
        raise ValueError("weights: at least one weight must be greater than 0")
    names = list(evaluation.summary["candidate"])
    cost = cost_result.per_candidate.set_index("candidate")["unit_cost_at_design_volume_usd"]
    summary = evaluation.summary.set_index("candidate")
    raw = {
        "performance": worst_margin_db(evaluation).to_numpy(dtype=float),
        "unit_cost": cost.reindex(names).to_numpy(dtype=float),
        "dc_power": summary["array_dc_power_w"].reindex(names).to_numpy(dtype=float),
        "area": summary["total_die_area_mm2"].reindex(names).to_numpy(dtype=float),
    }
    out = pd.DataFrame({"candidate": names})
    score = np.zeros(len(names))
    for key, higher_better in _SCORE_METRICS.items():
        out[f"s_{key}"] = _minmax(raw[key], higher_better)
        score += weights[key] * out[f"s_{key}"].to_numpy()
    out.insert(1, "score", score / total)
    out.insert(2, "pareto", pareto_mask(raw["unit_cost"], raw["performance"]))
    out.insert(3, "worst_margin_db", raw["performance"])
    return out


#: Weight field → True when a higher value is better.
_SCORE_METRICS = {"performance": True, "unit_cost": False, "dc_power": False, "area": False}
