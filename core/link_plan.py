"""Link planning for a study: each band's link scenario → ledger, and array sizing (DESIGN.md §3).

A study stores its link scenario in the units the user types (``bandwidth_mhz``, one total
``extra_loss_db``); :func:`link_inputs` converts it to the SI :class:`core.link.LinkInputs` of
the link planner. :func:`band_ledger` evaluates the ledger at the band's worst-case frequency
and :func:`ledger_derivation` explains any one of its lines. :func:`array_plan` sweeps the array
size N (DESIGN.md §3 step 6): per-element P1dB needed and, with the PA estimator, the array's PA
count and DC power; :func:`array_optimum` marks the best N per candidate and band.
"""

from __future__ import annotations

import functools
import math

import numpy as np
import pandas as pd
from numpy.typing import ArrayLike

from core.cost import die_yield, gross_dies_per_wafer
from core.costing import cost_inputs
from core.evaluation import Derivation
from core.link import LinkBudget, LinkInputs, array_sweep, link_budget, worst_case_frequency_hz
from core.schema import Problem
from core.study.model import BandSpec, CandidateKind, Combining, Study

__all__ = [
    "EXTRA_LOSS_NAME",
    "array_optimum",
    "array_plan",
    "band_ledger",
    "ledger_derivation",
    "link_inputs",
    "study_ledgers",
    "target_findings",
]

#: Name of the single extra-loss line a study's total ``extra_loss_db`` becomes.
EXTRA_LOSS_NAME = "Foliage, building, body, misc."

#: Columns of :func:`array_plan`, in order.
PLAN_COLUMNS = (
    "band",
    "candidate",
    "n_elements",
    "p1db_elem_dbm",
    "feasible",
    "reason",
    "pa_count",
    "array_dc_power_w",
    "array_pa_cost_usd",
)


def link_inputs(band: BandSpec) -> LinkInputs:
    """The SI link-planner inputs of one band's link scenario.

    Parameters
    ----------
    band : BandSpec
        A study band; its ``link`` carries edge units (``bandwidth_mhz``, total
        ``extra_loss_db``).

    Returns
    -------
    LinkInputs
        ``bandwidth_hz = bandwidth_mhz · 1e6``; the total extra loss becomes one named line
        ``((EXTRA_LOSS_NAME, extra_loss_db),)``, or none when it is 0 dB; the polarisation
        enum becomes its string value; every other field is copied unchanged.

    Examples
    --------
    >>> from core.study.model import BandSpec, LinkScenario
    >>> x = link_inputs(BandSpec(link=LinkScenario(bandwidth_mhz=100.0, extra_loss_db=3.0)))
    >>> x.bandwidth_hz, x.extra_losses_db
    (100000000.0, (('Foliage, building, body, misc.', 3.0),))
    """
    s = band.link
    extras = ((EXTRA_LOSS_NAME, float(s.extra_loss_db)),) if s.extra_loss_db else ()
    return LinkInputs(
        distance_m=s.distance_m,
        rain_rate_mm_h=s.rain_rate_mm_h,
        polarization=str(getattr(s.polarization, "value", s.polarization)),
        pressure_hpa=s.pressure_hpa,
        temperature_c=s.temperature_c,
        water_vapour_g_m3=s.water_vapour_g_m3,
        extra_losses_db=extras,
        fade_margin_db=s.fade_margin_db,
        bandwidth_hz=s.bandwidth_mhz * 1e6,
        noise_figure_db=s.noise_figure_db,
        required_snr_db=s.required_snr_db,
        implementation_margin_db=s.implementation_margin_db,
        rx_antenna_gain_dbi=s.rx_antenna_gain_dbi,
        n_elements=s.n_elements,
        element_gain_dbi=s.element_gain_dbi,
        feed_loss_db=s.feed_loss_db,
        scan_loss_db=s.scan_loss_db,
        backoff_db=s.backoff_db,
    )


def _edges_hz(band: BandSpec) -> tuple[float, float]:
    if not band.f_high_hz > band.f_low_hz:
        raise ValueError(f"bands[{band.name}].f_high_ghz: must be greater than f_low_ghz")
    return band.f_low_hz, band.f_high_hz


def _worst_case_hz(band: BandSpec, inputs: LinkInputs) -> float:
    return _worst_case_cached(*_edges_hz(band), inputs)


# Ledgers are recomputed for every notice refresh and array sweep of the GUI, mostly for
# unchanged bands; inputs and results are immutable, so they are memoised by value.
@functools.lru_cache(maxsize=256)
def _worst_case_cached(f_low_hz: float, f_high_hz: float, inputs: LinkInputs) -> float:
    return worst_case_frequency_hz(f_low_hz, f_high_hz, inputs)


@functools.lru_cache(maxsize=256)
def _ledger_cached(f_low_hz: float, f_high_hz: float, inputs: LinkInputs) -> LinkBudget:
    return link_budget(_worst_case_cached(f_low_hz, f_high_hz, inputs), inputs)


def band_ledger(band: BandSpec) -> LinkBudget:
    """Link ledger of one band at its worst-case (largest path loss) frequency.

    Parameters
    ----------
    band : BandSpec
        A study band.

    Returns
    -------
    LinkBudget
        :func:`core.link.link_budget` at :func:`core.link.worst_case_frequency_hz` over
        [f_low, f_high] (101-point grid), for :func:`link_inputs` of the band.

    Raises
    ------
    ValueError
        Naming the invalid field, as :func:`core.link.link_budget`.

    References
    ----------
    ITU-R P.525-4 §2.2, P.676-11 Annex 2, P.838-3, P.530-17 §2.4.1 (through core.link).

    Examples
    --------
    >>> from core.study.model import BandSpec
    >>> budget = band_ledger(BandSpec(f_low_ghz=26.5, f_high_ghz=29.5))
    >>> f"{budget.f_hz / 1e9:.2f} GHz"
    '29.50 GHz'
    """
    return _ledger_cached(*_edges_hz(band), link_inputs(band))


def study_ledgers(study: Study) -> dict[str, LinkBudget]:
    """Ledger of every band of a study, keyed by band name, in band order.

    Parameters
    ----------
    study : Study
        The study.

    Returns
    -------
    dict of str to LinkBudget
        ``{band.name: band_ledger(band)}``.

    Examples
    --------
    >>> from core.study.model import Study
    >>> list(study_ledgers(Study.new()))
    ['n257']
    """
    return {b.name: band_ledger(b) for b in study.bands}


def target_findings(study: Study, tolerance_db: float = 0.05) -> list[Problem]:
    """Warnings for bands whose P1dB target is below what their own link ledger needs.

    A target under the ledger's per-element P1dB makes every "meets" on the scorecard
    optimistic for that link; a target far above it over-specifies the PA. The first is a
    warning, the second (more than 3 dB above) a note.

    Returns
    -------
    list of Problem
        With paths ``bands[i].targets.p1db_dbm``.
    """
    out: list[Problem] = []
    for i, band in enumerate(study.bands):
        need = band_ledger(band).p1db_elem_dbm
        have = band.targets.p1db_dbm
        where = f"bands[{i}].targets.p1db_dbm"
        n = band.link.n_elements
        if have < need - tolerance_db:
            out.append(Problem(
                where,
                f"{band.name}: target {have:g} dBm is below the {need:.2f} dBm per element its "
                f"link ledger needs with {n} elements; the scorecard is optimistic for this "
                "link (adopt the ledger value on the Link Ledger page).",
                "warning",
            ))  # fmt: skip
        elif have > need + 3.0:
            out.append(Problem(
                where,
                f"{band.name}: target {have:g} dBm is {have - need:.1f} dB above the "
                f"{need:.2f} dBm its link ledger needs with {n} elements.",
                "note",
            ))  # fmt: skip
    return out


# Ledger line → the lines it is computed from (names of core.link.link_budget rows).
_LINE_INPUTS: dict[str, tuple[str, ...]] = {
    "Free-space loss": ("Frequency", "Path length"),
    "Gaseous specific attenuation": ("Frequency",),
    "Gaseous absorption": ("Gaseous specific attenuation", "Path length"),
    "Rain specific attenuation": ("Frequency",),
    "Rain distance factor r": ("Frequency", "Path length", "Rain specific attenuation"),
    "Rain attenuation": ("Rain specific attenuation", "Path length", "Rain distance factor r"),
    "Total path loss": ("Free-space loss", "Gaseous absorption", "Rain attenuation"),
    "Noise floor": ("Thermal noise density", "Bandwidth", "Noise figure"),
    "Sensitivity": ("Noise floor", "Required SNR", "Implementation margin"),
    "Required EIRP": ("Sensitivity", "Total path loss", "Fade margin", "Rx antenna gain"),
    "Array factor": ("Elements",),
    "Average power per element": (
        "Required EIRP",
        "Array factor",
        "Element gain",
        "Feed loss",
        "Scan loss",
    ),
    "P1dB per element": ("Average power per element", "Back-off"),
    "Total average RF power": ("Elements", "Average power per element"),
    "Compliance distance": ("Required EIRP", "Exposure limit"),
}


def _line_inputs(budget: LinkBudget, name: str) -> list[str]:
    names = list(_LINE_INPUTS.get(name, ()))
    if name == "Total path loss":
        names += [r.name for r in budget.items if r.name.startswith("Extra: ")]
    return names


def ledger_derivation(budget: LinkBudget, item_name: str) -> Derivation:
    """The derivation of one ledger line: its formula, inputs and intermediate values.

    Parameters
    ----------
    budget : LinkBudget
        A ledger, e.g. from :func:`band_ledger`.
    item_name : str
        Name of one of its lines (``LineItem.name``).

    Returns
    -------
    Derivation
        ``title`` (line name and frequency), ``formula``, ``inputs`` as (name, value, unit)
        of the lines it is computed from (empty for a user input), ``steps`` with unit
        conversions worth checking by hand, ``result``, ``unit`` and ``source``.

    Raises
    ------
    ValueError
        For a name that is not a line of ``budget``.

    Examples
    --------
    >>> from core.study.model import BandSpec
    >>> d = ledger_derivation(band_ledger(BandSpec()), "P1dB per element")
    >>> [name for name, _, _ in d.inputs]
    ['Average power per element', 'Back-off']
    """
    try:
        row = budget.item(item_name)
    except KeyError:
        names = ", ".join(r.name for r in budget.items)
        raise ValueError(f"item_name: no ledger line {item_name!r} (have: {names})") from None
    inputs = tuple(
        (n, budget.item(n).value, budget.item(n).unit) for n in _line_inputs(budget, item_name)
    )
    steps: list[tuple[str, float, str]] = []
    if item_name == "Free-space loss":
        steps.append(("Path length", budget.item("Path length").value / 1000.0, "km"))
    elif item_name in ("Gaseous absorption", "Rain attenuation"):
        steps.append(("Path length", budget.item("Path length").value / 1000.0, "km"))
    elif item_name == "Bandwidth":
        steps.append(("Bandwidth B", 10.0 ** (row.value / 10.0) / 1e6, "MHz"))
    elif item_name == "Compliance distance":
        eirp_w = 10.0 ** ((budget.required_eirp_dbm - 30.0) / 10.0)
        steps.append(("Required EIRP", eirp_w, "W"))
        steps.append(("4π·S_lim", 4.0 * math.pi * budget.exposure_limit_w_per_m2, "W/m²"))
    elif item_name in ("Average power per element", "P1dB per element"):
        steps.append(("Power", 10.0 ** (row.value / 10.0), "mW"))
    source = row.source
    if item_name in ("Compliance distance", "Exposure limit"):
        source = f"{source}. {budget.exposure_caution}"
    return Derivation(
        title=f"{row.name} ({row.group}, at {budget.f_hz / 1e9:.3f} GHz)",
        formula=f"{row.name} = {row.formula}",
        inputs=inputs,
        steps=tuple(steps),
        result=row.value,
        unit=row.unit,
        source=source,
    )


def _n_values(n_values: ArrayLike) -> np.ndarray:
    n = np.asarray(n_values)
    if n.ndim != 1 or n.size == 0:
        raise ValueError("n_values: must be a non-empty 1-D array of element counts")
    if not np.issubdtype(n.dtype, np.number) or np.any(~np.isfinite(n)):
        raise ValueError("n_values: must be finite numbers")
    if np.any(n < 1) or np.any(n != np.round(n)):
        raise ValueError("n_values: must be whole numbers of elements ≥ 1")
    return n.astype(np.int64)


def _sweep_p1db_per_band(study: Study, p1db_dbm: np.ndarray) -> dict[str, np.ndarray]:
    # Imported here because the estimator imports the study model, not this module; keeping
    # the import local avoids loading the estimator for ledger-only use.
    from core.estimate import sweep_p1db_per_band

    return sweep_p1db_per_band(study, p1db_dbm)


def array_plan(study: Study, n_values: ArrayLike | None = None) -> pd.DataFrame:
    """Sweep the array size N per band: per-element P1dB needed, PA count and array DC power.

    For each band the required EIRP is fixed by its link at the worst-case frequency; the
    per-element P1dB it needs falls 20·log10 2 = 6.02 dB per doubling of N. The P1dB targets
    of every band go to the estimator in one ``sweep_p1db_per_band`` call.

    Parameters
    ----------
    study : Study
        The study (bands with links, candidates).
    n_values : array_like of int, optional
        Element counts, shape ``(n,)``, whole numbers ≥ 1; default 1…1024.

    Returns
    -------
    pandas.DataFrame
        One row per (band, candidate, N), ``n_bands · n_candidates · n`` rows, columns
        ``PLAN_COLUMNS``: ``band``, ``candidate``, ``n_elements``, ``p1db_elem_dbm`` (needed),
        ``feasible``, ``reason`` (why not, else ""), ``pa_count`` (PAs serving the band,
        one per element channel), ``array_dc_power_w`` (pa_count × the estimator's DC
        power of one PA; NaN where not feasible) and ``array_pa_cost_usd`` (pa_count × the
        recurring cost of one packaged PA die, see :func:`_pa_recurring_usd`; NaN where not
        feasible).

    Raises
    ------
    ValueError
        For bad ``n_values`` or an invalid link field (named).

    References
    ----------
    DESIGN.md §3 step 6; array theory as in :func:`core.link.array_eirp_dbm`.
    """
    n = _n_values(np.arange(1, 1025) if n_values is None else n_values)
    if not study.bands:
        return pd.DataFrame({c: [] for c in PLAN_COLUMNS})
    needs = []
    for band in study.bands:
        x = link_inputs(band)
        sweep = array_sweep(_worst_case_hz(band, x), x, n)
        needs.append(sweep["p1db_elem_dbm"].to_numpy(dtype=np.float64))
    need_all = np.stack(needs)
    est = _sweep_p1db_per_band(study, need_all)
    # Recurring cost of one PA over every row of a candidate at once (one cost chain each).
    per_pa_all = np.empty(est["die_area_mm2"].shape)
    for candidate in dict.fromkeys(est["candidate"]):
        rows = est["candidate"] == candidate
        per_pa_all[rows] = _pa_recurring_usd(study, str(candidate), est["die_area_mm2"][rows])
    cols: dict[str, list[np.ndarray]] = {c: [] for c in PLAN_COLUMNS}
    for b_i, band in enumerate(study.bands):
        need = need_all[b_i]
        for r in np.flatnonzero(est["band"] == band.name):
            candidate = str(est["candidate"][r])
            if not np.array_equal(est["p1db_target_dbm"][r], need):
                raise ValueError(f"sweep_p1db: rows for {candidate!r} do not match the targets")
            feasible = est["feasible"][r]
            per_pa = per_pa_all[r]
            part = {
                "band": np.full(n.shape, band.name, dtype=object),
                "candidate": np.full(n.shape, candidate, dtype=object),
                "n_elements": n,
                "p1db_elem_dbm": need,
                "feasible": feasible,
                "reason": est["reason"][r],
                "pa_count": n,
                "array_dc_power_w": np.where(feasible, n * est["dc_power_w"][r], np.nan),
                "array_pa_cost_usd": np.where(feasible, n * per_pa, np.nan),
            }
            for c in PLAN_COLUMNS:
                cols[c].append(part[c])
    if not cols["band"]:
        return pd.DataFrame({c: [] for c in PLAN_COLUMNS})
    # One frame from whole columns: building a frame per (band, candidate) and concatenating
    # them costs more than the estimator's separate-row solve.
    return pd.DataFrame({c: np.concatenate(v) for c, v in cols.items()})


def _pa_recurring_usd(study: Study, candidate: str, die_area_mm2: np.ndarray) -> np.ndarray:
    """Recurring cost of one packaged PA die per element, vectorised over die area.

    The same chain as :func:`core.cost.unit_cost` — known good die = (wafer cost / DPW +
    test time × rate) / (Y·test yield), then (KGD + package) / package yield, plus the
    band-select part where the candidate has one — except that the dies per wafer come from
    the published estimate (:func:`core.cost.gross_dies_per_wafer`, de Vries 2005) instead of
    the exact grid count, which is too slow for a 1024-point sweep and differs by 1–2 % for
    dies small against the wafer. The die outline follows the card's aspect ratio.

    Returns NaN where the area is not finite or no die fits.
    """
    cand = next(c for c in study.candidates if c.name == candidate)
    card = study.card(cand.process)
    ci = cost_inputs(study, card)
    area = np.where(np.isfinite(die_area_mm2) & (die_area_mm2 > 0), die_area_mm2, np.nan)
    width = np.sqrt(area * card.die_aspect)
    dpw = gross_dies_per_wafer(
        ci.wafer_diameter_mm, width, area / width, ci.edge_exclusion_mm, ci.scribe_mm
    )
    y = die_yield(area * ci.critical_area_fraction, ci.d0_per_cm2, ci.yield_model, ci.yield_alpha)
    with np.errstate(divide="ignore", invalid="ignore"):
        die = np.where(dpw >= 1.0, ci.wafer_cost_usd / dpw, np.nan)
        kgd = (die + ci.test_time_s * ci.test_rate_usd_per_h / 3600.0) / (y * ci.test_yield)
    packaged = (kgd + ci.package_cost_usd) / ci.package_yield
    band_select = (
        cand.kind == CandidateKind.SEPARATE
        and cand.combining != Combining.SEPARATE_FEEDS
        and len(study.bands) > 1
    )
    extra = cand.band_select_cost_usd if band_select else 0.0
    return packaged + extra


def array_optimum(plan: pd.DataFrame) -> pd.DataFrame:
    """Mark the lowest-DC-power (and, with costs, the cheapest) feasible N per candidate & band.

    Parameters
    ----------
    plan : pandas.DataFrame
        Output of :func:`array_plan`.

    Returns
    -------
    pandas.DataFrame
        A copy of ``plan`` with boolean columns ``lowest_dc_power`` and, when the plan has
        ``array_pa_cost_usd``, ``cheapest``: True on exactly one feasible row per
        (band, candidate) that has any feasible row (ties go to the smaller N).

    Raises
    ------
    ValueError
        When a required column is missing.
    """
    missing = [c for c in ("band", "candidate", "n_elements", "feasible", "array_dc_power_w")
               if c not in plan.columns]  # fmt: skip
    if missing:
        raise ValueError(f"plan: missing columns {', '.join(missing)}")
    out = plan.copy()
    marks = [("lowest_dc_power", "array_dc_power_w")]
    if "array_pa_cost_usd" in out.columns:
        marks.append(("cheapest", "array_pa_cost_usd"))
    for flag_col, value_col in marks:
        out[flag_col] = False
        ok = out[out["feasible"] & np.isfinite(out[value_col].astype(np.float64))]
        if ok.empty:
            continue
        ok = ok.sort_values([value_col, "n_elements"], kind="stable")
        best = ok.groupby(["band", "candidate"], sort=False).head(1).index
        out.loc[best, flag_col] = True
    return out
