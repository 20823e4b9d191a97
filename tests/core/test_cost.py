"""Tests for core.cost: dies per wafer, die yield, unit cost, NRE and crossover volumes.

Sources are named beside each check; "check-values" is /work/shared/reference/check-values.md.
"""

import dataclasses
import itertools
import math

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import integrate, stats

from core.cost import (
    CostError,
    CostInputs,
    count_whole_dies,
    crossover_table,
    crossover_volumes,
    die_yield,
    gross_dies_per_wafer,
    nre_usd,
    unit_cost,
    unit_cost_at_volume,
    validate_cost_inputs,
)

MODELS = ("poisson", "murphy", "seeds", "negative_binomial")
# check-values §6 example: die 3.0 × 2.5 mm, scribe 0.1 mm, edge exclusion 3 mm.
DIE = {"die_width_mm": 3.0, "die_height_mm": 2.5, "edge_exclusion_mm": 3.0, "scribe_mm": 0.1}


# --- independent brute-force counter (plain loops, all four corners tested) -----------------


def brute_force_count(r, px, py, ox, oy):
    """Whole pitch cells inside the circle of radius r, site centres at (ox + i·px, oy + j·py)."""
    n_i, n_j = int(r / px) + 2, int(r / py) + 2
    sites = []
    for i in range(-n_i, n_i + 1):
        for j in range(-n_j, n_j + 1):
            x, y = ox + i * px, oy + j * py
            corners = [(x + sx * px / 2, y + sy * py / 2) for sx in (-1, 1) for sy in (-1, 1)]
            if all(cx * cx + cy * cy <= r * r for cx, cy in corners):
                sites.append((x, y))
    return sites


# --- gross dies per wafer, formula ------------------------------------------------------------


@pytest.mark.parametrize(
    ("diameter_mm", "expected"),
    # check-values §6 table, "Formula DPW" column (Hennessy & Patterson / de Vries 2005 formula).
    [(100.0, 787.46), (150.0, 1907.92), (200.0, 3515.60)],
)
def test_dpw_formula_check_values(diameter_mm, expected):
    assert gross_dies_per_wafer(diameter_mm, **DIE) == pytest.approx(expected, abs=0.005)


def test_dpw_formula_hand_computed():
    # Hand computed (formula of Hennessy & Patterson, "Cost of an Integrated Circuit"):
    # 300 mm wafer, 10 × 10 mm die, no scribe, no edge exclusion: S = 100 mm², d = 300 mm.
    # π·300²/(4·100) = 225π = 706.8583; π·300/√200 = 300π/14.14214 = 66.6432;
    # DPW = 706.8583 − 66.6432 = 640.2151.
    assert gross_dies_per_wafer(300.0, 10.0, 10.0) == pytest.approx(640.2151, abs=1e-4)
    # Hand computed: 200 mm wafer, 5 mm edge exclusion, 9.9 × 9.9 mm die + 0.1 mm scribe:
    # d = 190 mm, S = 100 mm²; π·190²/400 = 283.5287; π·190/√200 = 42.2074; DPW = 241.3213.
    assert gross_dies_per_wafer(200.0, 9.9, 9.9, 5.0, 0.1) == pytest.approx(241.3213, abs=1e-4)


def test_dpw_formula_clamped_at_zero():
    # Hand computed: 100 × 100 mm die on a 100 mm wafer: 0.785 − 2.221 < 0, clamped to 0.
    assert gross_dies_per_wafer(100.0, 100.0, 100.0) == 0.0


def test_dpw_formula_vectorised():
    # Broadcasting must equal the scalar evaluation (same formula, check-values §6).
    diam = np.array([100.0, 150.0, 200.0])[:, None]
    widths = np.array([1.0, 3.0])
    out = gross_dies_per_wafer(diam, widths, 2.5, 3.0, 0.1)
    assert out.shape == (3, 2)
    for i, j in itertools.product(range(3), range(2)):
        assert out[i, j] == gross_dies_per_wafer(float(diam[i, 0]), widths[j], 2.5, 3.0, 0.1)


# --- exact count ------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("diameter_mm", "best", "corner_at_centre", "die_centred"),
    # check-values §6 table: "Exact max (best offset), pitch cell inside", "Exact: corner at
    # centre" and "Exact: die centred" columns (independent exact count).
    [(100.0, 802, 800, 795), (150.0, 1927, 1916, 1923), (200.0, 3540, 3536, 3525)],
)
def test_exact_count_check_values(diameter_mm, best, corner_at_centre, die_centred):
    assert count_whole_dies(diameter_mm, **DIE).count == best
    half = (3.1 / 2, 2.6 / 2)
    assert count_whole_dies(diameter_mm, **DIE, offset_mm=half).count == corner_at_centre
    assert count_whole_dies(diameter_mm, **DIE, offset_mm=(0.0, 0.0)).count == die_centred
    # check-values §6: rotating the die by 90° gives the same best counts.
    rotated = {**DIE, "die_width_mm": 2.5, "die_height_mm": 3.0}
    assert count_whole_dies(diameter_mm, **rotated).count == best


@pytest.mark.parametrize(
    ("diameter_mm", "relative"),
    # check-values §6 "Formula vs exact (pitch)" column; de Vries (2005): formula under-estimates.
    [(100.0, -0.0181), (150.0, -0.0099), (200.0, -0.0069)],
)
def test_formula_versus_exact_check_values(diameter_mm, relative):
    exact = count_whole_dies(diameter_mm, **DIE).count
    formula = gross_dies_per_wafer(diameter_mm, **DIE)
    assert (formula - exact) / exact == pytest.approx(relative, abs=5e-5)


@pytest.mark.parametrize(
    ("r", "px", "py", "ox", "oy"),
    [
        (47.0, 3.1, 2.6, 0.37, 1.91),  # check-values §6 geometry, arbitrary offsets
        (47.0, 3.1, 2.6, 2.9, 0.05),
        (72.0, 3.1, 2.6, 1.234, 2.001),
        (22.0, 4.1, 3.1, 1.0, 1.0),
        (22.0, 7.3, 1.2, 6.0, 0.3),
        (10.0, 12.0, 3.0, 0.5, 0.5),
    ],
)
def test_exact_count_matches_brute_force_at_fixed_offset(r, px, py, ox, oy):
    # Independent brute force above (loops over sites, every corner tested).
    wafer = 2 * r + 2.0  # 1 mm edge exclusion; no scribe, so the pitch is the die size
    grid = count_whole_dies(wafer, px, py, 1.0, 0.0, offset_mm=(ox, oy))
    sites = brute_force_count(r, px, py, ox, oy)
    assert grid.count == len(sites)
    got = sorted(map(tuple, np.round(grid.centres_mm, 9)))
    assert got == sorted((round(x, 9), round(y, 9)) for x, y in sites)


@pytest.mark.parametrize(("wafer", "w", "h"), [(50.0, 4.0, 3.0), (40.0, 6.5, 2.2)])
def test_optimised_count_never_beaten_by_offset_grid(wafer, w, h):
    # Independent brute force over a 24 × 24 grid of offsets; none may exceed the optimiser,
    # and the optimiser's own offset must give its count under the brute-force test.
    r, px, py = wafer / 2 - 3.0, w + 0.1, h + 0.1
    grid = count_whole_dies(wafer, w, h, 3.0, 0.1)
    brute = [
        len(brute_force_count(r, px, py, ox, oy))
        for ox in np.linspace(0, px, 24, endpoint=False)
        for oy in np.linspace(0, py, 24, endpoint=False)
    ]
    assert max(brute) <= grid.count
    assert len(brute_force_count(r, px, py, grid.offset_x_mm, grid.offset_y_mm)) == grid.count


@pytest.mark.parametrize(
    ("wafer", "w", "h"), [(100.0, 3.0, 2.5), (150.0, 5.3, 1.7), (200.0, 1.0, 1.0), (50.0, 9.0, 7.0)]
)
def test_default_search_matches_fine_sweep(wafer, w, h):
    # Regression guard on the search effort: the default sweep must find what a much finer
    # sweep finds (the 3.0 × 2.5 mm case is check-values §6: 802).
    fine = count_whole_dies(wafer, w, h, 3.0, 0.1, n_offsets=8192)
    grid = count_whole_dies(wafer, w, h, 3.0, 0.1)
    assert grid.count == fine.count
    assert 0.0 <= grid.offset_x_mm < grid.pitch_x_mm
    assert 0.0 <= grid.offset_y_mm < grid.pitch_y_mm


def test_exact_count_centres_are_whole_cells():
    # check-values §6 convention: the whole pitch cell lies in the usable circle.
    grid = count_whole_dies(150.0, **DIE)
    assert grid.centres_mm.shape == (grid.count, 2)
    far = np.abs(grid.centres_mm) + np.array([grid.pitch_x_mm, grid.pitch_y_mm]) / 2
    assert np.all(np.hypot(far[:, 0], far[:, 1]) <= grid.usable_radius_mm)
    assert len(np.unique(np.round(grid.centres_mm, 6), axis=0)) == grid.count
    assert grid.usable_radius_mm == 72.0
    assert (grid.pitch_x_mm, grid.pitch_y_mm) == pytest.approx((3.1, 2.6))


@pytest.mark.parametrize(("w", "h"), [(200.0, 200.0), (94.0, 1.0), (70.0, 70.0)])
def test_exact_count_zero_when_nothing_fits(w, h):
    # Hand check: usable radius 47 mm; a 94.1 mm cell (or 70.1² with half-diagonal 49.6 mm) does
    # not fit.
    grid = count_whole_dies(100.0, w, h, 3.0, 0.1)
    assert grid.count == 0
    assert grid.centres_mm.shape == (0, 2)


def test_single_large_die():
    # Hand check: a 60.1 mm cell has half-diagonal 42.5 mm < 47 mm, so exactly one fits.
    assert count_whole_dies(100.0, 60.0, 60.0, 3.0, 0.1).count == 1


@pytest.mark.parametrize(
    ("wafer", "w", "h"),
    [(d, w, h) for d in (100.0, 150.0, 200.0) for w, h in ((1.0, 1.2), (2.0, 1.5), (2.5, 2.5))],
)
def test_formula_slightly_underestimates_for_small_dies(wafer, w, h):
    # de Vries (2005) and check-values §6: for small, near-square dies the formula
    # under-estimates the best grid count by a few per cent.
    exact = count_whole_dies(wafer, w, h, 3.0, 0.1).count
    rel = (gross_dies_per_wafer(wafer, w, h, 3.0, 0.1) - exact) / exact
    assert -0.03 <= rel <= 0.0


# --- die yield --------------------------------------------------------------------------------

# check-values §7 table: A = 7.5 mm², alpha = 2, D0 = 0.5 and 1.0 /cm², plus A·D0 = 1
# (A = 100 mm² at D0 = 1 /cm²).
YIELD_TABLE = {
    "poisson": (0.963194, 0.927743, 0.367879),
    "murphy": (0.963307, 0.928178, 0.399576),
    "seeds": (0.963855, 0.930233, 0.500000),
    "negative_binomial": (0.963529, 0.929017, 0.444444),
}


@pytest.mark.parametrize("model", MODELS)
def test_yield_check_values(model):
    expected = YIELD_TABLE[model]
    assert die_yield(7.5, 0.5, model) == pytest.approx(expected[0], abs=5e-7)
    assert die_yield(7.5, 1.0, model) == pytest.approx(expected[1], abs=5e-7)
    assert die_yield(100.0, 1.0, model) == pytest.approx(expected[2], abs=5e-7)


@pytest.mark.parametrize("lam", [1e-4, 0.0375, 0.5, 1.0, 3.0, 20.0])
def test_yield_against_scipy(lam):
    area_mm2 = lam * 100.0  # D0 = 1 /cm², A in cm² = area_mm2 / 100
    # scipy.stats: Poisson probability of zero defects.
    assert die_yield(area_mm2, 1.0, "poisson") == pytest.approx(stats.poisson.pmf(0, lam))
    for alpha in (0.5, 2.0, 4.0):
        # scipy.stats negative binomial with mean lam: nbinom.pmf(0, alpha, alpha/(alpha+lam)).
        ref = stats.nbinom.pmf(0, alpha, alpha / (alpha + lam))
        assert die_yield(area_mm2, 1.0, "negative_binomial", alpha) == pytest.approx(ref)
    # Seeds equals the negative binomial with alpha = 1 (check-values §7, via scipy nbinom).
    assert die_yield(area_mm2, 1.0, "seeds") == pytest.approx(stats.nbinom.pmf(0, 1, 1 / (1 + lam)))


@pytest.mark.parametrize("lam", [0.0375, 1.0, 5.0])
def test_murphy_is_poisson_over_triangular_density(lam):
    # Murphy (1964): Poisson yield averaged over a triangular density of D on [0, 2·D0]
    # (check-values §7, scipy.integrate.quad).
    d0 = 1.0

    def integrand(d):
        weight = d / d0**2 if d <= d0 else (2 * d0 - d) / d0**2
        return math.exp(-lam * d / d0) * weight

    ref, _ = integrate.quad(integrand, 0.0, 2 * d0, points=[d0], epsabs=1e-14)
    assert die_yield(lam * 100.0, d0, "murphy") == pytest.approx(ref, rel=1e-10)


@pytest.mark.parametrize("model", MODELS)
def test_yield_limit_zero_area(model):
    # Limit A·D0 → 0: every model gives 1 (Murphy's 0/0 handled as its limit).
    assert die_yield(0.0, 1.0, model) == 1.0
    assert die_yield(7.5, 0.0, model) == 1.0
    assert die_yield(1e-12, 1.0, model) == pytest.approx(1.0, abs=1e-13)


def test_negative_binomial_tends_to_poisson():
    # check-values §7: (1 + λ/α)^(−α) → exp(−λ) as α → ∞.
    for lam in (0.075, 1.0, 4.0):
        poisson = die_yield(lam * 100, 1.0, "poisson")
        assert die_yield(lam * 100, 1.0, "negative_binomial", 1e9) == pytest.approx(poisson, 1e-8)
    errors = [
        abs(die_yield(100.0, 1.0, "negative_binomial", a) - math.exp(-1)) for a in (1, 10, 100)
    ]
    assert errors[0] > errors[1] > errors[2]


@settings(max_examples=100)
@given(lam=st.floats(1e-6, 1e3), alpha=st.floats(1.0, 1e3))
def test_yield_model_ordering(lam, alpha):
    # Poisson <= Murphy: Jensen's inequality, Murphy being Poisson averaged over a density of D
    # (Murphy 1964). Murphy <= Seeds: series 1 − λ + 7λ²/12 vs 1 − λ + λ², and 1/λ² vs 1/λ at
    # large λ (our own derivation, checked here). Poisson <= NB(α) <= Seeds for α >= 1
    # (NB decreases with α; Stapper 1973).
    y = {m: die_yield(lam * 100.0, 1.0, m, alpha) for m in MODELS}
    assert y["poisson"] <= y["murphy"] * (1 + 1e-12)
    assert y["murphy"] <= y["seeds"] * (1 + 1e-12)
    assert y["poisson"] <= y["negative_binomial"] * (1 + 1e-12)
    assert y["negative_binomial"] <= y["seeds"] * (1 + 1e-12)


def test_yield_vectorised():
    # Broadcast (3, 1) × (4,) → (3, 4), each element equal to the scalar call.
    area = np.array([[1.0], [7.5], [100.0]])
    d0 = np.array([0.0, 0.1, 0.5, 1.0])
    for model in MODELS:
        out = die_yield(area, d0, model)
        assert out.shape == (3, 4)
        assert out[1, 3] == die_yield(7.5, 1.0, model)


@pytest.mark.parametrize(
    ("args", "field"),
    [
        ((-1.0, 1.0, "poisson"), "area_mm2"),
        ((1.0, -0.1, "murphy"), "d0_per_cm2"),
        ((float("nan"), 1.0, "seeds"), "area_mm2"),
        ((1.0, 1.0, "negative_binomial", 0.0), "alpha"),
        ((1.0, 1.0, "gamma"), "model"),
    ],
)
def test_yield_bad_input(args, field):
    with pytest.raises(ValueError, match=f"^{field}: "):
        die_yield(*args)


# --- unit cost and NRE ------------------------------------------------------------------------


def hand_inputs():
    # Geometry of check-values §6 (150 mm: N = 1927) and yield of check-values §7 (A = 7.5 mm²,
    # D0 = 1 /cm², Poisson: Y = 0.927743).
    return CostInputs(
        wafer_cost_usd=5000.0,
        wafer_diameter_mm=150.0,
        edge_exclusion_mm=3.0,
        scribe_mm=0.1,
        d0_per_cm2=1.0,
        yield_model="poisson",
        critical_area_fraction=1.0,
        test_time_s=3.6,
        test_rate_usd_per_h=100.0,
        test_yield=0.9,
        package_cost_usd=1.0,
        package_yield=0.98,
    )


def test_unit_cost_hand_calculation():
    # Hand calculation with N = 1927 (check-values §6), Y = 0.927743 (check-values §7):
    # die = 5000 / (1927 · 0.927743) = 2.796795; probe 3.6 s at 100 $/h = 0.1 $ per die,
    # test = 0.1 / (0.927743 · 0.9) = 0.119765; test loss = 2.796795 · (1/0.9 − 1) = 0.310755;
    # KGD = 3.227315; package = 1/0.98 = 1.020408; package loss = 3.227315 · (1/0.98 − 1)
    # = 0.065864; per die 4.313586; two dies + 3 $ switch = 11.627173.
    uc = unit_cost(3.0, 2.5, hand_inputs(), n_dies_per_unit=2, extra_part_cost_usd=3.0)
    assert uc.gross_dpw_exact == 1927
    assert uc.gross_dpw_formula == pytest.approx(1907.92, abs=0.005)
    assert uc.die_yield == pytest.approx(0.927743, abs=5e-7)
    assert uc.die_cost_usd == pytest.approx(2.796795, abs=2e-6)
    assert uc.test_cost_usd == pytest.approx(0.119765, abs=2e-6)
    assert uc.test_yield_loss_usd == pytest.approx(0.310755, abs=2e-6)
    assert uc.known_good_die_usd == pytest.approx(3.227315, abs=2e-6)
    assert uc.package_cost_usd == pytest.approx(1.020408, abs=2e-6)
    assert uc.package_yield_loss_usd == pytest.approx(0.065864, abs=2e-6)
    assert uc.recurring_usd == pytest.approx(11.627173, abs=1e-5)


def test_unit_cost_ideal_test_and_package():
    # Hand check: perfect test and package yields and free test leave die + package cost only.
    ci = dataclasses.replace(hand_inputs(), test_time_s=0.0, test_yield=1.0, package_yield=1.0)
    uc = unit_cost(3.0, 2.5, ci)
    assert uc.recurring_usd == pytest.approx(5000.0 / (1927 * 0.927743) + 1.0, abs=2e-6)
    assert uc.test_yield_loss_usd == uc.package_yield_loss_usd == 0.0


def test_unit_cost_die_does_not_fit():
    # Hand check: usable radius 47 mm; a 70.1 mm cell has half-diagonal 49.6 mm.
    ci = dataclasses.replace(hand_inputs(), wafer_diameter_mm=100.0)
    msg = r"die 70 × 70 mm does not fit on a 100 mm wafer with 3 mm edge exclusion"
    with pytest.raises(CostError, match=msg):
        unit_cost(70.0, 70.0, ci)


@pytest.mark.parametrize(
    ("kwargs", "field"),
    [
        ({"die_width_mm": 0.0}, "die_width_mm"),
        ({"die_height_mm": -2.0}, "die_height_mm"),
        ({"n_dies_per_unit": 0}, "n_dies_per_unit"),
        ({"extra_part_cost_usd": -1.0}, "extra_part_cost_usd"),
    ],
)
def test_unit_cost_bad_arguments(kwargs, field):
    args = {"die_width_mm": 3.0, "die_height_mm": 2.5, "inputs": hand_inputs(), **kwargs}
    with pytest.raises(CostError, match=f"^{field}: "):
        unit_cost(**args)


@pytest.mark.parametrize(
    ("field", "value", "message"),
    [
        ("wafer_diameter_mm", 0.0, "must be greater than 0"),
        ("wafer_diameter_mm", -150.0, "must be greater than 0"),
        ("edge_exclusion_mm", 80.0, "must be less than half of wafer_diameter_mm"),
        ("test_yield", 0.0, "must be in (0, 1]"),
        ("test_yield", 1.5, "must be in (0, 1]"),
        ("package_yield", -0.2, "must be in (0, 1]"),
        ("critical_area_fraction", 1.2, "must be in [0, 1]"),
        ("spins", 0, "must be a whole number of at least 1"),
        ("wafer_cost_usd", float("nan"), "must be finite"),
        ("d0_per_cm2", "many", "must be a number"),
        ("yield_model", "gamma", "must be one of poisson, murphy, seeds, negative_binomial"),
    ],
)
def test_validate_cost_inputs_names_field(field, value, message):
    ci = dataclasses.replace(hand_inputs(), **{field: value})
    assert validate_cost_inputs(ci) == [(field, message)]
    with pytest.raises(CostError, match=f"^{field}: "):
        unit_cost(3.0, 2.5, ci)


def test_validate_reports_every_problem():
    ci = dataclasses.replace(CostInputs(), test_yield=2.0, package_yield=0.0, scribe_mm=-0.1)
    assert {f for f, _ in validate_cost_inputs(ci)} == {"test_yield", "package_yield", "scribe_mm"}
    assert validate_cost_inputs(CostInputs()) == []


@settings(max_examples=50, deadline=None)
@given(w=st.floats(1.0, 6.0), h=st.floats(1.0, 6.0), grow=st.floats(1.1, 2.0))
def test_cost_per_good_die_grows_with_area(w, h, grow):
    # Property: a larger die has no more sites (shrinking a grid about the centre keeps cells
    # inside the convex disc) and a lower yield (every model decreases in A), so it costs more.
    small = unit_cost(w, h, CostInputs())
    large = unit_cost(w * grow, h, CostInputs())
    assert large.gross_dpw_exact <= small.gross_dpw_exact
    assert large.die_yield < small.die_yield
    assert large.die_cost_usd > small.die_cost_usd
    assert large.recurring_usd > small.recurring_usd


def test_nre_hand_calculation():
    # Hand calculation: masks 100 000 $ × 2 spins × 2 designs = 400 000 $; design
    # 2000 h × 150 $/h × 1.5 × 2 = 900 000 $; test development 50 000 $ × 2 = 100 000 $.
    nre = nre_usd(CostInputs(), design_effort_factor=1.5, n_designs=2)
    assert (nre.mask_usd, nre.design_usd, nre.test_dev_usd) == (400_000.0, 900_000.0, 100_000.0)
    assert nre.total_usd == 1_400_000.0


@pytest.mark.parametrize(
    ("kwargs", "field"),
    [({"design_effort_factor": 0.0}, "design_effort_factor"), ({"n_designs": 0}, "n_designs")],
)
def test_nre_bad_input(kwargs, field):
    with pytest.raises(CostError, match=f"^{field}: "):
        nre_usd(CostInputs(), **kwargs)


# --- volume and crossover ---------------------------------------------------------------------


def test_unit_cost_at_volume_vectorised():
    # Hand calculation: 10 $ + 1000 $ / V at V = 10, 100, 1000 → 110, 20, 11 $.
    out = unit_cost_at_volume(10.0, 1000.0, np.array([10.0, 100.0, 1000.0]))
    np.testing.assert_allclose(out, [110.0, 20.0, 11.0])
    assert unit_cost_at_volume([1.0, 2.0], [10.0, 0.0], 5.0).tolist() == [3.0, 2.0]


@pytest.mark.parametrize("volume", [0.0, -5.0, float("inf")])
def test_unit_cost_at_volume_bad_volume(volume):
    with pytest.raises(CostError, match=r"^volume: "):
        unit_cost_at_volume(1.0, 1.0, volume)


@settings(max_examples=100)
@given(
    rec=st.floats(0.0, 1e4),
    nre=st.floats(0.0, 1e8),
    v1=st.floats(1.0, 1e9),
    v2=st.floats(1.0, 1e9),
)
def test_more_volume_never_raises_unit_cost(rec, nre, v1, v2):
    # Property of recurring + NRE/V: non-increasing in V.
    lo, hi = sorted((v1, v2))
    assert unit_cost_at_volume(rec, nre, hi) <= unit_cost_at_volume(rec, nre, lo)


def test_crossover_hand_calculation():
    # Hand calculation: a = 10 $ + 1e6 $/V, b = 12 $ + 2e5 $/V: V = (1e6 − 2e5)/(12 − 10) = 4e5;
    # both cost 12.5 $ there.
    v = crossover_volumes(10.0, 1e6, 12.0, 2e5)
    assert v == 400_000.0
    assert unit_cost_at_volume(10.0, 1e6, v) == unit_cost_at_volume(12.0, 2e5, v) == 12.5


@settings(max_examples=200)
@given(
    ra=st.floats(0.1, 1e3),
    na=st.floats(0.0, 1e7),
    rb=st.floats(0.1, 1e3),
    nb=st.floats(0.0, 1e7),
)
def test_crossover_equalises_unit_costs(ra, na, rb, nb):
    # Property: at the solved volume both lines rec + NRE/V meet; with no solution one line is
    # never above the other for V > 0 (checked at widely spread volumes).
    v = crossover_volumes(ra, na, rb, nb)
    if v is None:
        vols = np.logspace(-3, 12, 61)
        diff = unit_cost_at_volume(ra, na, vols) - unit_cost_at_volume(rb, nb, vols)
        tol = 1e-9 * np.abs(diff).max()
        assert np.all(diff <= tol) or np.all(diff >= -tol)
    else:
        assert v > 0
        a, b = unit_cost_at_volume(ra, na, v), unit_cost_at_volume(rb, nb, v)
        assert a == pytest.approx(b, rel=1e-9)


def test_crossover_none_for_parallel_and_dominated_lines():
    # Hand check: equal recurring cost → parallel lines; lower in both → never crosses.
    assert crossover_volumes(10.0, 1e6, 10.0, 2e5) is None
    assert crossover_volumes(10.0, 1e5, 12.0, 2e5) is None
    assert crossover_volumes(10.0, 1e5, 10.0, 1e5) is None


def test_crossover_table():
    # Hand calculation: A (10 $, 1e6 $), B (12 $, 2e5 $), C (20 $, 3e5 $).
    # A–B: 4e5 (B below, A above); A–C: (1e6 − 3e5)/(20 − 10) = 7e4 (C below, A above);
    # B–C: B lower in both, no crossover.
    table = crossover_table(["A", "B", "C"], [10.0, 12.0, 20.0], [1e6, 2e5, 3e5])
    assert list(table.columns) == [
        "candidate_a",
        "candidate_b",
        "volume",
        "cheaper_below",
        "cheaper_above",
    ]
    expected = pd.DataFrame(
        [("A", "B", 4e5, "B", "A"), ("A", "C", 7e4, "C", "A"), ("B", "C", np.nan, "B", "B")],
        columns=table.columns,
    )
    pd.testing.assert_frame_equal(table, expected)


def test_crossover_table_bad_lengths():
    with pytest.raises(CostError, match="must have the same length"):
        crossover_table(["A", "B"], [1.0], [1.0, 2.0])


# --- bad geometry -----------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("args", "field"),
    [
        ((0.0, 3.0, 2.5), "wafer_diameter_mm"),
        ((-100.0, 3.0, 2.5), "wafer_diameter_mm"),
        ((100.0, 0.0, 2.5), "die_width_mm"),
        ((100.0, 3.0, -2.5), "die_height_mm"),
        ((100.0, 3.0, 2.5, -1.0), "edge_exclusion_mm"),
        ((100.0, 3.0, 2.5, 50.0), "edge_exclusion_mm"),
        ((100.0, 3.0, 2.5, 3.0, -0.1), "scribe_mm"),
        ((100.0, float("inf"), 2.5), "die_width_mm"),
    ],
)
def test_geometry_bad_input(args, field):
    for func in (gross_dies_per_wafer, count_whole_dies):
        with pytest.raises(CostError, match=f"^{field}: "):
            func(*args)


def test_count_bad_search_arguments():
    with pytest.raises(CostError, match=r"^n_offsets: "):
        count_whole_dies(100.0, 3.0, 2.5, n_offsets=1)
    with pytest.raises(CostError, match=r"^offset_mm: "):
        count_whole_dies(100.0, 3.0, 2.5, offset_mm=(1.0, 2.0, 3.0))
