"""Die count, die yield, unit cost and NRE for comparing PA architectures.

Pure numpy/pandas; no Qt. Lengths are in millimetres and money in US dollars because that is how
wafer maps and cost sheets are written; every such name carries its unit.

References
----------
.. [dV05] D. K. de Vries, "Investigation of gross die per wafer formulas", IEEE Trans.
   Semiconductor Manufacturing 18(1):136-139, 2005.
.. [HP] J. L. Hennessy and D. A. Patterson, *Computer Architecture: A Quantitative Approach*,
   chapter 1, section "Cost of an Integrated Circuit".
.. [Mu64] B. T. Murphy, "Cost-size optima of monolithic integrated circuits", Proc. IEEE
   52(12):1537-1545, 1964.
.. [Se67] R. B. Seeds, "Yield, economic, and logistic models for complex digital arrays", IEEE
   Int. Convention Record, 1967, pt. 6, pp. 61-66 (citation from memory).
.. [St73] C. H. Stapper, "Defect density distribution for LSI yield calculations", IEEE Trans.
   Electron Devices ED-20(7):655-657, 1973 (citation from memory).
"""

from __future__ import annotations

import functools
import itertools
import math
from collections.abc import Sequence
from dataclasses import dataclass, fields
from typing import Literal, get_args

import numpy as np
import pandas as pd

YieldModel = Literal["poisson", "murphy", "seeds", "negative_binomial"]

_MM2_PER_CM2 = 100.0
# Offset search effort: x offsets × grid columns per sweep, the least number of x offsets, and
# the coordinate-ascent restarts from the best points of the sweep. Tuned on 650 random cases
# (dies 0.4-15 mm, wafers 50-300 mm) against 40 000-point sweeps along each axis: none fell
# short, where a fixed 128 offsets left 7 of 250 cases one die short.
_SWEEP_BUDGET = 100_000
_MIN_OFFSETS = 64
_N_ASCENT_STARTS = 8
# Rows of x offsets per block of the sweep, as offsets × columns; blocks of ~16k elements keep
# the temporaries in cache (measured 5x faster than one block for a 1 mm pitch on 200 mm).
_BLOCK_ELEMENTS = 16_384


class CostError(ValueError):
    """Raised when a cost cannot be computed from the given inputs (message names the field)."""


def _check(name: str, value, *, low: float = 0.0, strict: bool = True) -> np.ndarray:
    """Return ``value`` as a float array after checking it is finite and above ``low``."""
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise CostError(f"{name}: must be a number or an array of numbers") from None
    if not np.all(np.isfinite(arr)):
        raise CostError(f"{name}: must be finite")
    if strict and np.any(arr <= low):
        raise CostError(f"{name}: must be greater than {low:g}")
    if not strict and np.any(arr < low):
        raise CostError(f"{name}: must be at least {low:g}")
    return arr


def _usable_radius(wafer_diameter_mm, edge_exclusion_mm) -> np.ndarray:
    d = _check("wafer_diameter_mm", wafer_diameter_mm)
    e = _check("edge_exclusion_mm", edge_exclusion_mm, strict=False)
    if np.any(2.0 * e >= d):
        raise CostError("edge_exclusion_mm: must be less than half of wafer_diameter_mm")
    return d / 2.0 - e


def gross_dies_per_wafer(
    wafer_diameter_mm, die_width_mm, die_height_mm, edge_exclusion_mm=0.0, scribe_mm=0.0
):
    """Estimate gross dies per wafer with the published area-minus-edge formula.

    DPW = π·d²/(4S) − π·d/√(2S), with d = wafer_diameter_mm − 2·edge_exclusion_mm the usable
    diameter and S = (die_width_mm + scribe_mm)·(die_height_mm + scribe_mm) the pitch area. The
    second term approximates the sites lost along the edge; for a die that is large compared with
    the wafer it exceeds the first and the raw formula goes negative, so the result is clamped
    at 0 (no die fits).

    Parameters
    ----------
    wafer_diameter_mm, die_width_mm, die_height_mm : float or array_like
        Positive; broadcast together.
    edge_exclusion_mm, scribe_mm : float or array_like
        Non-negative; the edge exclusion must leave a usable wafer.

    Returns
    -------
    float or numpy.ndarray
        Estimated gross die count (not rounded), >= 0, broadcast shape of the inputs.

    Raises
    ------
    CostError
        If an input is non-finite or out of range (message names the parameter).

    References
    ----------
    de Vries (2005) [dV05], who also shows this formula under-estimates the best grid count for
    small dies; Hennessy & Patterson, "Cost of an Integrated Circuit" [HP].

    Examples
    --------
    >>> round(float(gross_dies_per_wafer(100.0, 3.0, 2.5, 3.0, 0.1)), 2)
    787.46
    """
    r = _usable_radius(wafer_diameter_mm, edge_exclusion_mm)
    w = _check("die_width_mm", die_width_mm)
    h = _check("die_height_mm", die_height_mm)
    s = _check("scribe_mm", scribe_mm, strict=False)
    d = 2.0 * r
    area = (w + s) * (h + s)
    dpw = np.maximum(np.pi * d**2 / (4.0 * area) - np.pi * d / np.sqrt(2.0 * area), 0.0)
    return float(dpw) if dpw.ndim == 0 else dpw


@dataclass(frozen=True, eq=False)
class DieGrid:
    """Whole die sites of a rectangular grid on the usable wafer circle.

    Site centres are at (offset_x_mm + i·pitch_x_mm, offset_y_mm + j·pitch_y_mm) relative to the
    wafer centre for integers i, j; offsets lie in [0, pitch). Offset (0, 0) puts a die on the
    wafer centre; (pitch_x/2, pitch_y/2) puts a grid corner there.
    """

    count: int  # number of whole sites
    offset_x_mm: float
    offset_y_mm: float
    pitch_x_mm: float
    pitch_y_mm: float
    usable_radius_mm: float
    centres_mm: np.ndarray  # (count, 2) x, y in mm, read-only; (0, 2) when nothing fits


def _column_half_extents(r: float, px: float, py: float, ox: np.ndarray):
    """Per column (axis -1) centre x, and allowed |y| of a site centre, for x offsets ``ox``.

    A pitch cell centred at (x, y) lies inside the circle iff its farthest corner does (the disc
    is convex): (|x| + px/2)² + (|y| + py/2)² <= r². So a column at x admits centres with
    |y| <= a = sqrt(r² − (|x| + px/2)²) − py/2; ``valid`` is False where no centre fits.
    """
    k_max = math.ceil(r / px) + 1
    cx = ox[..., None] + np.arange(-k_max, k_max + 1) * px
    rem = r * r - (np.abs(cx) + px / 2.0) ** 2
    a = np.sqrt(np.maximum(rem, 0.0)) - py / 2.0
    return cx, a, (rem >= 0.0) & (a >= 0.0)


def _best_along_y(r: float, px: float, py: float, ox: np.ndarray):
    """Exact maximum count over the y offset, for each x offset in ``ox`` (shape (n,)).

    Write a/py = n + f (n integer, 0 <= f < 1) and t = oy/py in [0, 1). A column holds
    floor(n + f − t) + floor(n + f + t) + 1 = 2n + 1 − [t > f] + [t >= 1 − f] centres, so the
    total is a constant plus a step function of t with one up-step at 1 − f and one down-step
    just after f per column. Sorting the steps (up before down at equal t) and taking the
    running sum gives the exact maximum; the returned t is the middle of the winning interval
    so that no site sits exactly on the boundary when the interval has width.

    Returns counts (n,) and y offsets in mm (n,).
    """
    _, a, valid = _column_half_extents(r, px, py, ox)
    u = np.where(valid, a / py, 0.0)
    n = np.floor(u)
    f = u - n
    base = np.where(valid, 2.0 * n + 1.0, 0.0).sum(axis=-1)
    # The bit pattern of a non-negative double orders like its value, so shifted left one bit,
    # plus 1 for a down-step, it sorts the steps by t with ups first at equal t in one plain
    # integer sort. Columns that hold no site get a down-step at 1.5 then an up-step at 1.75:
    # after every real step (t <= 1) and in that order, so they never lift the running maximum.
    up = np.where(valid, 1.0 - f, 1.75).view(np.int64) << 1
    down = (np.where(valid, f, 1.5).view(np.int64) << 1) | 1
    keys = np.sort(np.concatenate([up, down], axis=-1), axis=-1)
    pos = (keys >> 1).view(np.float64)
    run = np.cumsum(1 - 2 * (keys & 1), axis=-1)
    best = np.argmax(run, axis=-1)
    rows = np.arange(best.size)
    gain = np.maximum(run[rows, best], 0)
    # The winning t interval runs from the last step taken to the next one; with no step
    # worth taking it is [0, first step].
    start = np.where(gain > 0, pos[rows, best], 0.0)
    end = np.where(gain > 0, pos[rows, np.minimum(best + 1, pos.shape[-1] - 1)], pos[rows, 0])
    return base + gain, 0.5 * (start + np.minimum(end, 1.0)) * py


def _grid_at(r: float, px: float, py: float, ox: float, oy: float) -> DieGrid:
    """Count and list the whole sites for one fixed offset."""
    ox, oy = ox % px, oy % py
    cx, a, valid = _column_half_extents(r, px, py, np.asarray(ox))
    j_lo = np.ceil((-a - oy) / py)
    per_col = np.where(valid, np.maximum(np.floor((a - oy) / py) - j_lo + 1.0, 0.0), 0.0)
    per_col = per_col.astype(np.int64)
    total = int(per_col.sum())
    first = np.cumsum(per_col) - per_col
    j = np.arange(total) - np.repeat(first, per_col) + np.repeat(j_lo, per_col)
    centres = np.column_stack([np.repeat(cx, per_col), oy + j * py]).reshape(total, 2)
    centres.setflags(write=False)
    return DieGrid(total, float(ox), float(oy), px, py, r, centres)


def count_whole_dies(
    wafer_diameter_mm: float,
    die_width_mm: float,
    die_height_mm: float,
    edge_exclusion_mm: float = 0.0,
    scribe_mm: float = 0.0,
    *,
    n_offsets: int | None = None,
    offset_mm: tuple[float, float] | None = None,
) -> DieGrid:
    """Count whole dies on a rectangular grid, searching the grid offset for the maximum.

    Convention ("pitch cell inside", check-values §6): a site counts if its whole pitch cell, the
    die plus half the scribe on each side ((die_width_mm + scribe_mm) × (die_height_mm +
    scribe_mm)), lies inside the usable circle of radius wafer_diameter_mm/2 − edge_exclusion_mm.
    This matches the pitch area S of :func:`gross_dies_per_wafer`. Flats and notches are not
    modelled.

    Search: for each of ``n_offsets`` x offsets spread over [0, pitch_x/2] (the grid mirrored
    about x = 0 gives the same count, so that half period suffices) the best y offset is found
    exactly (see ``_best_along_y``); then, from the best few points, alternate exact
    optimisation along y and along x until the count stops rising. The y step is exact; the
    x sweep is a fine grid, so the result is a lower bound of the true optimum that in practice
    equals it (it reproduces every value of check-values §6).

    Parameters
    ----------
    wafer_diameter_mm, die_width_mm, die_height_mm : float
        Positive.
    edge_exclusion_mm, scribe_mm : float
        Non-negative.
    n_offsets : int or None, keyword-only
        Number of x offsets of the sweep, >= 2. None (default) scales it inversely with the
        number of grid columns (552 offsets for a 1.1 mm pitch on a 200 mm wafer, more for
        larger dies) so the search costs about the same for any die size.
    offset_mm : (float, float) or None, keyword-only
        If given, no search: count at this (x, y) site-centre offset (taken modulo the pitch).

    Returns
    -------
    DieGrid
        Count, chosen offset and site centres, shape (count, 2); count 0 and centres of shape
        (0, 2) when no whole die fits.

    Raises
    ------
    CostError
        If an input is non-finite or out of range (message names the parameter).

    References
    ----------
    de Vries (2005) [dV05] compares such exact counts with the formula estimates.

    Examples
    --------
    >>> count_whole_dies(100.0, 3.0, 2.5, 3.0, 0.1).count
    802
    >>> count_whole_dies(100.0, 3.0, 2.5, 3.0, 0.1, offset_mm=(0.0, 0.0)).count
    795
    """
    r = float(_usable_radius(wafer_diameter_mm, edge_exclusion_mm))
    s = float(_check("scribe_mm", scribe_mm, strict=False))
    px = float(_check("die_width_mm", die_width_mm)) + s
    py = float(_check("die_height_mm", die_height_mm)) + s
    if offset_mm is not None:
        off = _check("offset_mm", offset_mm, strict=False, low=-np.inf)
        if off.shape != (2,):
            raise CostError("offset_mm: must be a pair (x, y)")
        return _grid_at(r, px, py, float(off[0]), float(off[1]))
    if px / 2.0 > r or py / 2.0 > r:  # not even one cell fits: skip the search
        return _grid_at(r, px, py, 0.0, 0.0)
    if n_offsets is None:
        n_offsets = max(_MIN_OFFSETS, _SWEEP_BUDGET // (2 * math.ceil(r / px) + 3))
    if isinstance(n_offsets, bool) or not isinstance(n_offsets, int | np.integer) or n_offsets < 2:
        raise CostError("n_offsets: must be an integer of at least 2")
    # The search costs milliseconds per die and a study re-costs the same dies on every edit:
    # memoise it on the geometry rounded to 1e-9 mm (far below any layout tolerance), which
    # also makes the result independent of float noise in the inputs.
    return _searched_grid(round(r, 9), round(px, 9), round(py, 9), int(n_offsets))


@functools.lru_cache(maxsize=256)
def _searched_grid(r: float, px: float, py: float, n_offsets: int) -> DieGrid:
    """The offset search of :func:`count_whole_dies` (validated inputs; results read-only)."""
    ox = np.linspace(0.0, px / 2.0, n_offsets)
    n_blocks = -(-n_offsets * (2 * math.ceil(r / px) + 3) // _BLOCK_ELEMENTS)
    sweep = [_best_along_y(r, px, py, block) for block in np.array_split(ox, n_blocks)]
    counts = np.concatenate([c for c, _ in sweep])
    oy = np.concatenate([y for _, y in sweep])
    starts = np.argsort(-counts, kind="stable")[:_N_ASCENT_STARTS]
    best = (counts[starts[0]], ox[starts[0]], oy[starts[0]])
    for i in starts:
        c, x, y = counts[i], ox[i], oy[i]
        while True:  # a few rounds at most: each must raise the count
            _, x_new = _best_along_y(r, py, px, np.array([y]))  # roles swapped: x exact
            c_new, y_new = _best_along_y(r, px, py, x_new)
            if c_new[0] <= c:
                break
            c, x, y = c_new[0], x_new[0], y_new[0]
        if c > best[0]:
            best = (c, x, y)
    return _grid_at(r, px, py, best[1], best[2])


def die_yield(area_mm2, d0_per_cm2, model: YieldModel, alpha=2.0):
    """Fraction of dies free of killer defects, for one of four published yield models.

    With λ = A·D0 (A converted from mm² to cm², since D0 is per cm²):

    - ``"poisson"``: exp(−λ)
    - ``"murphy"``: ((1 − e^(−λ))/λ)², 1 at λ = 0 (Murphy's triangular density of D0) [Mu64]
    - ``"seeds"``: 1/(1 + λ) (exponential density of D0) [Se67]
    - ``"negative_binomial"``: (1 + λ/α)^(−α), α the clustering parameter [St73]

    Parameters
    ----------
    area_mm2 : float or array_like
        Yield-critical area, mm², >= 0 (0 gives yield 1).
    d0_per_cm2 : float or array_like
        Killer-defect density, per cm², >= 0.
    model : {"poisson", "murphy", "seeds", "negative_binomial"}
    alpha : float or array_like
        Clustering parameter of the negative binomial, > 0; ignored by other models. The default
        2 is representative, from memory (older Hennessy & Patterson editions use about 4).

    Returns
    -------
    float or numpy.ndarray
        Yield in (0, 1], broadcast shape of the inputs.

    Raises
    ------
    CostError
        For a negative or non-finite input, alpha <= 0, or an unknown model.

    Examples
    --------
    >>> round(float(die_yield(100.0, 1.0, "seeds")), 6)
    0.5
    """
    if model not in get_args(YieldModel):
        raise CostError(f"model: must be one of {', '.join(get_args(YieldModel))}, not {model!r}")
    a_cm2 = _check("area_mm2", area_mm2, strict=False) / _MM2_PER_CM2
    lam = a_cm2 * _check("d0_per_cm2", d0_per_cm2, strict=False)
    if model == "poisson":
        y = np.exp(-lam)
    elif model == "murphy":
        # −expm1(−λ)/λ keeps full precision at small λ; λ = 0 is the limit 1.
        safe = np.where(lam > 0.0, lam, 1.0)
        y = np.where(lam > 0.0, (-np.expm1(-safe) / safe) ** 2, 1.0)
    elif model == "seeds":
        y = 1.0 / (1.0 + lam)
    else:
        al = _check("alpha", alpha)
        y = np.exp(-al * np.log1p(lam / al))  # log1p: accurate as α → ∞ (Poisson limit)
    return float(y) if np.ndim(y) == 0 else y


@dataclass(frozen=True, kw_only=True)
class CostInputs:
    """Process, test, package and NRE cost settings of a study.

    Every default is representative, from memory (a 150 mm III-V MMIC line); the user edits them.
    Check with :func:`validate_cost_inputs`, which reports every problem at once.
    """

    wafer_cost_usd: float = 5000.0  # processed wafer, representative, from memory
    wafer_diameter_mm: float = 150.0  # representative, from memory
    edge_exclusion_mm: float = 3.0  # representative, from memory
    scribe_mm: float = 0.1  # representative, from memory
    d0_per_cm2: float = 0.5  # representative, from memory
    yield_model: YieldModel = "negative_binomial"
    yield_alpha: float = 2.0  # representative, from memory
    critical_area_fraction: float = 0.5  # share of die area that is yield-critical, from memory
    test_time_s: float = 2.0  # RF probe test time per die, representative, from memory
    test_rate_usd_per_h: float = 100.0  # prober + tester, representative, from memory
    test_yield: float = 0.95  # representative, from memory
    package_cost_usd: float = 1.0  # package + assembly, representative, from memory
    package_yield: float = 0.98  # representative, from memory
    mask_set_cost_usd: float = 100_000.0  # representative, from memory
    spins: int = 2  # representative, from memory
    design_effort_h: float = 2000.0  # per die design, representative, from memory
    design_rate_usd_per_h: float = 150.0  # representative, from memory
    test_development_usd: float = 50_000.0  # per die design, representative, from memory


_NON_NEGATIVE = frozenset(
    "wafer_cost_usd edge_exclusion_mm scribe_mm d0_per_cm2 test_time_s test_rate_usd_per_h"
    " package_cost_usd mask_set_cost_usd design_effort_h design_rate_usd_per_h"
    " test_development_usd".split()
)


def validate_cost_inputs(ci: CostInputs) -> list[tuple[str, str]]:
    """List every problem in ``ci`` as (field name, message); empty when all is well.

    Examples
    --------
    >>> import dataclasses
    >>> validate_cost_inputs(dataclasses.replace(CostInputs(), test_yield=1.2))
    [('test_yield', 'must be in (0, 1]')]
    """
    problems: list[tuple[str, str]] = []
    for f in fields(ci):
        v = getattr(ci, f.name)
        if f.name == "yield_model":
            if v not in get_args(YieldModel):
                problems.append((f.name, f"must be one of {', '.join(get_args(YieldModel))}"))
            continue
        if isinstance(v, bool) or not isinstance(v, int | float | np.integer | np.floating):
            problems.append((f.name, "must be a number"))
        elif not math.isfinite(v):
            problems.append((f.name, "must be finite"))
        elif f.name in _NON_NEGATIVE and v < 0:
            problems.append((f.name, "must be at least 0"))
        elif f.name in ("wafer_diameter_mm", "yield_alpha") and v <= 0:
            problems.append((f.name, "must be greater than 0"))
        elif f.name == "critical_area_fraction" and not 0 <= v <= 1:
            problems.append((f.name, "must be in [0, 1]"))
        elif f.name in ("test_yield", "package_yield") and not 0 < v <= 1:
            problems.append((f.name, "must be in (0, 1]"))
        elif f.name == "spins" and (int(v) != v or v < 1):
            problems.append((f.name, "must be a whole number of at least 1"))
    d, e = ci.wafer_diameter_mm, ci.edge_exclusion_mm
    if not any(p[0] in ("wafer_diameter_mm", "edge_exclusion_mm") for p in problems) and 2 * e >= d:
        problems.append(("edge_exclusion_mm", "must be less than half of wafer_diameter_mm"))
    return problems


def _raise_if_invalid(ci: CostInputs) -> None:
    problems = validate_cost_inputs(ci)
    if problems:
        raise CostError("; ".join(f"{name}: {msg}" for name, msg in problems))


@dataclass(frozen=True)
class UnitCost:
    """Recurring cost breakdown of one unit, US dollars; the terms are defined in `unit_cost`."""

    gross_dpw_formula: float  # formula estimate, reported alongside; not used for cost
    gross_dpw_exact: int  # best-offset whole-die count; used for cost
    die_yield: float  # defect-limited yield of the critical area ("yield" is a keyword)
    die_cost_usd: float  # wafer cost per defect-free die
    test_cost_usd: float  # probe test per die that passes (every gross die is probed)
    test_yield_loss_usd: float  # wafer cost of defect-free dies failing test, per passing die
    known_good_die_usd: float  # die + test + test_yield_loss
    package_cost_usd: float  # package cost / package yield
    package_yield_loss_usd: float  # known good die lost in failed packages, per good package
    extra_part_cost_usd: float  # bought-in part per unit, e.g. a band-select switch
    n_dies_per_unit: int
    recurring_usd: float  # n_dies_per_unit · (kgd + package + package_yield_loss) + extra


def unit_cost(
    die_width_mm: float,
    die_height_mm: float,
    inputs: CostInputs,
    *,
    n_dies_per_unit: int = 1,
    extra_part_cost_usd: float = 0.0,
) -> UnitCost:
    """Recurring cost of one unit built from ``n_dies_per_unit`` identical packaged dies.

    Flow per die, with N = exact gross count, Y = die yield of the critical area
    (critical_area_fraction · width · height), Ty = test_yield, Py = package_yield:

    - die = W / (N·Y): the exact count is used because it is what the wafer really gives; the
      formula estimate is reported alongside ([HP] uses the formula).
    - Every gross die is probed (defects are only found by testing), a fraction Y·Ty passes, so
      test = t·rate / (Y·Ty) and the die cost of the defect-free rejects adds
      die·(1/Ty − 1); known good die KGD = (W/N + t·rate) / (Y·Ty). This follows [HP], where
      test cost per good die is divided by the die yield; Ty extends it to the parametric
      (RF specification) yield of defect-free dies.
    - Each known good die is packaged separately; a failed package loses the die, its test and
      the package: packaged = (KGD + package_cost) / Py, split into package = package_cost/Py
      and package_yield_loss = KGD·(1/Py − 1).
    - recurring = n_dies_per_unit · packaged + extra_part_cost_usd (the extra part is bought
      tested and is not subject to our package yield).

    Parameters
    ----------
    die_width_mm, die_height_mm : float
        Die size without scribe, > 0.
    inputs : CostInputs
    n_dies_per_unit : int, keyword-only
        >= 1. Identical dies per unit, each probed and packaged on its own.
    extra_part_cost_usd : float, keyword-only
        >= 0. Bought-in tested part per unit (e.g. a band-select switch).

    Returns
    -------
    UnitCost

    Raises
    ------
    CostError
        If an input is out of range (all problems of ``inputs`` listed) or no whole die fits.

    Examples
    --------
    >>> round(unit_cost(3.0, 2.5, CostInputs()).die_cost_usd, 3)
    2.644
    """
    _raise_if_invalid(inputs)
    w = float(_check("die_width_mm", die_width_mm))
    h = float(_check("die_height_mm", die_height_mm))
    if isinstance(n_dies_per_unit, bool) or not isinstance(n_dies_per_unit, int | np.integer):
        raise CostError("n_dies_per_unit: must be an integer")
    if n_dies_per_unit < 1:
        raise CostError("n_dies_per_unit: must be at least 1")
    extra = float(_check("extra_part_cost_usd", extra_part_cost_usd, strict=False))
    ci = inputs
    geometry = (ci.wafer_diameter_mm, w, h, ci.edge_exclusion_mm, ci.scribe_mm)
    grid = count_whole_dies(*geometry)
    if grid.count == 0:
        raise CostError(
            f"die_width_mm, die_height_mm: die {w:g} × {h:g} mm does not fit on a "
            f"{ci.wafer_diameter_mm:g} mm wafer with {ci.edge_exclusion_mm:g} mm edge exclusion"
            f" and {ci.scribe_mm:g} mm scribe"
        )
    y = die_yield(ci.critical_area_fraction * w * h, ci.d0_per_cm2, ci.yield_model, ci.yield_alpha)
    die = ci.wafer_cost_usd / (grid.count * y)
    test = ci.test_time_s / 3600.0 * ci.test_rate_usd_per_h / (y * ci.test_yield)
    test_loss = die * (1.0 / ci.test_yield - 1.0)
    kgd = die + test + test_loss
    package = ci.package_cost_usd / ci.package_yield
    package_loss = kgd * (1.0 / ci.package_yield - 1.0)
    per_die = kgd + package + package_loss
    return UnitCost(
        gross_dpw_formula=gross_dies_per_wafer(*geometry),
        gross_dpw_exact=grid.count,
        die_yield=y,
        die_cost_usd=die,
        test_cost_usd=test,
        test_yield_loss_usd=test_loss,
        known_good_die_usd=kgd,
        package_cost_usd=package,
        package_yield_loss_usd=package_loss,
        extra_part_cost_usd=extra,
        n_dies_per_unit=int(n_dies_per_unit),
        recurring_usd=n_dies_per_unit * per_die + extra,
    )


@dataclass(frozen=True)
class Nre:
    """Non-recurring engineering cost breakdown, US dollars."""

    mask_usd: float
    design_usd: float
    test_dev_usd: float
    total_usd: float


def nre_usd(inputs: CostInputs, design_effort_factor: float = 1.0, n_designs: int = 1) -> Nre:
    """Non-recurring cost of a candidate with ``n_designs`` distinct die designs.

    Each distinct die design needs its own mask set for every spin (shared multi-project
    reticles are not modelled), its own design effort and its own test program:

    - mask = mask_set_cost_usd · spins · n_designs
    - design = design_effort_h · design_rate_usd_per_h · design_effort_factor · n_designs
    - test development = test_development_usd · n_designs

    Parameters
    ----------
    inputs : CostInputs
    design_effort_factor : float
        Scales the design effort of each design (e.g. > 1 for a switched multiband PA), > 0.
    n_designs : int
        Number of distinct die designs, >= 1.

    Returns
    -------
    Nre

    Raises
    ------
    CostError
        If an input is out of range.

    Examples
    --------
    >>> nre_usd(CostInputs(), n_designs=2).total_usd
    1100000.0
    """
    _raise_if_invalid(inputs)
    factor = float(_check("design_effort_factor", design_effort_factor))
    if isinstance(n_designs, bool) or not isinstance(n_designs, int | np.integer) or n_designs < 1:
        raise CostError("n_designs: must be an integer of at least 1")
    ci = inputs
    mask = ci.mask_set_cost_usd * ci.spins * n_designs
    design = ci.design_effort_h * ci.design_rate_usd_per_h * factor * n_designs
    test_dev = ci.test_development_usd * n_designs
    return Nre(float(mask), float(design), float(test_dev), float(mask + design + test_dev))


def unit_cost_at_volume(recurring_usd, nre_usd, volume):
    """Unit cost with the NRE spread over the volume: recurring + NRE / volume.

    Parameters
    ----------
    recurring_usd, nre_usd : float or array_like
        >= 0, US dollars.
    volume : float or array_like
        Units built, > 0. All three broadcast together (e.g. volume of shape (n_volume,)).

    Returns
    -------
    float or numpy.ndarray
        US dollars per unit, broadcast shape.

    Examples
    --------
    >>> unit_cost_at_volume(10.0, 1000.0, [10, 100])
    array([110.,  20.])
    """
    rec = _check("recurring_usd", recurring_usd, strict=False)
    nre = _check("nre_usd", nre_usd, strict=False)
    out = rec + nre / _check("volume", volume)
    return float(out) if out.ndim == 0 else out


def crossover_volumes(recurring_a, nre_a, recurring_b, nre_b) -> float | None:
    """Volume V > 0 at which a and b cost the same per unit, solved exactly.

    rec_a + NRE_a/V = rec_b + NRE_b/V gives V = (NRE_a − NRE_b)/(rec_b − rec_a).

    Returns
    -------
    float or None
        V when positive and finite; None when one candidate is never more expensive than the
        other at any V > 0 (parallel or identical lines, or a crossing at V <= 0).

    Examples
    --------
    >>> crossover_volumes(10.0, 1e6, 12.0, 2e5)
    400000.0
    """
    args = {"recurring_a": recurring_a, "nre_a": nre_a, "recurring_b": recurring_b, "nre_b": nre_b}
    ra, na, rb, nb = (float(_check(k, v, strict=False, low=-np.inf)) for k, v in args.items())
    if rb == ra:
        return None
    v = (na - nb) / (rb - ra)
    return v if v > 0.0 and math.isfinite(v) else None


def crossover_table(
    names: Sequence[str], recurring: Sequence[float], nre: Sequence[float]
) -> pd.DataFrame:
    """Crossover volume of every pair of candidates.

    Parameters
    ----------
    names : sequence of str, length n
    recurring, nre : sequence of float, length n
        US dollars.

    Returns
    -------
    pandas.DataFrame
        One row per pair (i < j), columns candidate_a, candidate_b, volume (NaN when there is no
        crossover), cheaper_below and cheaper_above: the cheaper candidate at volumes below and
        above the crossover (the lower-NRE one below, the lower-recurring one above). Without a
        crossover both name the one that is never dearer, or are None when the two are equal.

    Raises
    ------
    CostError
        If the lengths differ or a value is not finite.
    """
    if not len(names) == len(recurring) == len(nre):
        raise CostError("names, recurring, nre: must have the same length")
    rows = []
    for i, j in itertools.combinations(range(len(names)), 2):
        v = crossover_volumes(recurring[i], nre[i], recurring[j], nre[j])
        # Lexicographic keys: at V -> 0 the NRE dominates, at V -> infinity the recurring cost.
        low = (nre[i], recurring[i]), (nre[j], recurring[j])
        high = (recurring[i], nre[i]), (recurring[j], nre[j])
        below = None if low[0] == low[1] else names[i] if low[0] < low[1] else names[j]
        above = None if high[0] == high[1] else names[i] if high[0] < high[1] else names[j]
        rows.append((names[i], names[j], np.nan if v is None else v, below, above))
    columns = ["candidate_a", "candidate_b", "volume", "cheaper_below", "cheaper_above"]
    return pd.DataFrame(rows, columns=columns).astype({"volume": float})
