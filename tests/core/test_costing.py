"""Tests for core.costing: per-candidate unit cost, NRE, crossovers, curves, scores.

Sources are named beside each check; "check-values" is /work/shared/reference/check-values.md.
Most tests feed a hand-made evaluation (die sizes chosen by the test) so that the cost arithmetic
can be checked by hand, independent of the PA estimator; the last ones run the real estimator
on the demo studies.
"""

import dataclasses
import math

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from core.cost import CostInputs, unit_cost
from core.costing import (
    ALL_BANDS_DIE,
    DIE_COLUMNS,
    PER_CANDIDATE_COLUMNS,
    area_breakdown,
    cost_inputs,
    cost_study,
    pareto_mask,
    volume_grid,
    weighted_scores,
    worst_margin_db,
)
from core.estimate import evaluate
from core.evaluation import Derivation, Evaluation
from core.process import DEFAULT_CARDS
from core.study import (
    BandSpec,
    Candidate,
    CandidateKind,
    Combining,
    CostSettings,
    DieArrangement,
    LinkScenario,
    Study,
    load_study,
)
from core.study.model import Weights

GAAS = DEFAULT_CARDS["GaAs pHEMT 0.15 µm"]  # 150 mm, 5000 USD, D0 0.5 /cm², masks 120k USD
B200 = dataclasses.replace(
    GAAS, name="B200", wafer_diameter_mm=200.0, wafer_cost_usd=6000.0, mask_set_cost_usd=600e3
)
# check-values §6: a 3.0 × 2.5 mm die (0.1 mm scribe, 3 mm edge exclusion) gives an exact
# best-offset count of 1927 on 150 mm and 3540 on 200 mm (pitch cell inside).
DIE_W, DIE_H = 3.0, 2.5


def make_study(candidates, *, n_elements=(16, 8), card_b=B200, **cost):
    bands = (
        BandSpec("n257", 26.5, 29.5, link=LinkScenario(n_elements=n_elements[0])),
        BandSpec("n260", 37.0, 40.0, link=LinkScenario(n_elements=n_elements[1])),
    )
    return Study(
        name="cost test",
        bands=bands,
        process_cards=(GAAS, card_b),
        candidates=tuple(candidates),
        cost=dataclasses.replace(CostSettings(), **cost),
    )


WIDE = Candidate("Wide", CandidateKind.WIDEBAND, GAAS.name, design_effort_factor=1.3)
SW = Candidate("Sw", CandidateKind.SWITCHED, "B200", design_effort_factor=1.6)
SEP = Candidate("Sep", CandidateKind.SEPARATE, GAAS.name)
SHARED = Candidate(
    "Shared",
    CandidateKind.SEPARATE,
    GAAS.name,
    die_arrangement=DieArrangement.SHARED_DIE,
    combining=Combining.DIPLEXER,
    band_select_cost_usd=0.5,
)
SEP_AREAS = {"n257": 3.0, "n260": 2.0}  # mm² per band design of "Sep" (after overhead)


def make_evaluation(study, dims=None, margins=None):
    """A hand-made Evaluation: die sizes, area parts, power and margins chosen by the test."""
    dims = dims or {}
    summary, design, score = [], [], []
    for i, c in enumerate(x for x in study.candidates if x.enabled):
        w, h = dims.get(c.name, (DIE_W, DIE_H))
        per_band = c.kind == CandidateKind.SEPARATE and c.die_arrangement == "die_per_band"
        total = sum(SEP_AREAS.values()) if per_band else w * h
        summary.append(
            {
                "candidate": c.name, "kind": c.kind, "process": c.process,
                "die_width_mm": w, "die_height_mm": h, "total_die_area_mm2": total,
                "array_dc_power_w": 10.0 + i, "worst_margin_db": 0.5,
            }
        )  # fmt: skip
        for b in study.bands:
            a = SEP_AREAS[b.name] if per_band else w * h / len(study.bands)
            design.append(
                {
                    "candidate": c.name, "design": b.name, "area_total_mm2": a,
                    "area_active_mm2": 0.1 * a, "area_networks_mm2": 0.4 * a,
                    "area_switches_mm2": 0.05 * a, "area_control_mm2": 0.02 * a,
                    "area_pads_mm2": 0.1 * a,
                }
            )  # fmt: skip
            m = (margins or {}).get(c.name, (1.0, 0.5, 25.0))
            for metric, margin, est, tgt in (
                ("gain", m[0], 20.0 + m[0], 20.0),
                ("p1db", m[1], 27.0 + m[1], 27.0),
                ("pae", m[2] - 20.0, m[2], 20.0),
            ):
                score.append(
                    {"candidate": c.name, "band": b.name, "metric": metric, "margin": margin,
                     "estimate": est, "target": tgt}
                )  # fmt: skip
    return Evaluation(
        scorecard=pd.DataFrame(score),
        curves=pd.DataFrame(),
        design=pd.DataFrame(design),
        summary=pd.DataFrame(summary),
    )


def murphy(lam):
    return ((1.0 - math.exp(-lam)) / lam) ** 2


# --- hand calculations ------------------------------------------------------------------------


def test_unit_cost_hand_calculation_wideband():
    # Wideband on the 150 mm GaAs card, die 3.0 × 2.5 mm; study cost defaults.
    # N = 1927 whole dies (check-values §6, 150 mm row, best offset, pitch cell inside).
    # A_crit = 0.60 · 7.5 = 4.5 mm² = 0.045 cm², λ = 0.045 · 0.5 = 0.0225,
    # Murphy Y = ((1 − e^−0.0225)/0.0225)² = 0.977792 (Murphy 1964; check-values §7 formula).
    # die = 5000/(1927 · 0.977792) = 2.653637 USD
    # test = (4 s · 120 USD/h / 3600)/(Y · 0.97) = 0.133333/0.948459 = 0.140579 USD
    # test scrap = die · (1/0.97 − 1) = 0.082071 USD; KGD = 2.876288 USD
    # packaged = (2.876288 + 0.8)/0.98 = 3.751314 USD (Hennessy & Patterson's flow, ch. 1)
    # per radio = max(16, 8) elements of one shared array · 3.751314 = 60.021024 USD
    # NRE = 120k · 2 spins + 3000 h · 150 USD/h · 1.3 + 40k = 865 000 USD
    # unit cost at 20 000 radios = 60.021024 + 865000/20000 = 103.271024 USD
    study = make_study([WIDE])
    r = cost_study(study, make_evaluation(study))
    row = r.row("Wide")
    y = murphy(0.0225)
    assert y == pytest.approx(0.977792, abs=1e-6)
    assert row["gross_dpw_exact"] == 1927  # check-values §6
    assert row["gross_dpw_formula"] == pytest.approx(1907.92, abs=0.01)  # check-values §6
    assert row["die_yield"] == pytest.approx(y, rel=1e-12)
    assert row["recurring_usd"] == pytest.approx(3.751314, abs=1e-6)
    assert row["pa_dies_per_radio"] == 16
    assert row["pa_cost_per_radio_usd"] == pytest.approx(60.021024, abs=1e-5)
    assert row["nre_usd"] == 865_000.0
    assert row["unit_cost_at_design_volume_usd"] == pytest.approx(103.271024, abs=1e-5)
    parts = ("radio_die_usd", "radio_test_usd", "radio_package_usd", "radio_band_select_usd")
    assert sum(row[p] for p in parts) == pytest.approx(row["pa_cost_per_radio_usd"], rel=1e-12)
    d = r.derivations[("Wide", None, "unit_cost")]
    assert isinstance(d, Derivation) and d.result == row["unit_cost_at_design_volume_usd"]
    assert r.derivations[("Wide", None, "nre")].result == 865_000.0
    assert r.derivations[("Wide", None, "die_cost")].result == pytest.approx(2.653637, abs=1e-6)


def test_crossover_hand_calculation():
    # A = Wide (above): per radio 60.021024 USD, NRE 865 000 USD.
    # B = Sw on a 200 mm card, wafer 6000 USD, masks 600k USD, same 3.0 × 2.5 mm die:
    # N = 3540 (check-values §6, 200 mm row), same Y = 0.977792;
    # die = 6000/(3540 · Y) = 1.733410; KGD = 1.733410 + 0.140579 + 1.733410 · (1/0.97 − 1)
    # = 1.927600; packaged = (1.927600 + 0.8)/0.98 = 2.783265; per radio = 16 · 2.783265
    # = 44.532238 USD; NRE = 600k · 2 + 3000 · 150 · 1.6 + 40k = 1 960 000 USD.
    # Crossover V = (1 960 000 − 865 000)/(60.021024 − 44.532238) = 70 696.3 radios, where
    # both cost 60.021024 + 865000/70696.3 = 72.2565 USD per radio.
    study = make_study([WIDE, SW])
    r = cost_study(study, make_evaluation(study))
    assert r.row("Sw")["gross_dpw_exact"] == 3540  # check-values §6
    assert r.row("Sw")["pa_cost_per_radio_usd"] == pytest.approx(44.532238, abs=1e-5)
    assert r.row("Sw")["nre_usd"] == 1_960_000.0
    (x,) = r.crossovers.itertuples()
    assert (x.candidate_a, x.candidate_b) == ("Wide", "Sw")
    assert x.volume == pytest.approx(70_696.3, abs=0.1)
    assert x.unit_cost_usd == pytest.approx(72.2565, abs=1e-4)
    assert (x.cheaper_below, x.cheaper_above) == ("Wide", "Sw")
    # The solved volume equalises the two unit-cost lines (recurring + NRE/V).
    a, b = r.row("Wide"), r.row("Sw")
    cost_a = a["pa_cost_per_radio_usd"] + a["nre_usd"] / x.volume
    cost_b = b["pa_cost_per_radio_usd"] + b["nre_usd"] / x.volume
    assert cost_a == pytest.approx(cost_b, rel=1e-12)


def test_crossover_moves_with_wafer_cost():
    # Dearer 200 mm wafers raise B's recurring cost, so B needs more volume to win back its NRE.
    base = make_study([WIDE, SW])
    dear = make_study([WIDE, SW], card_b=dataclasses.replace(B200, wafer_cost_usd=7000.0))
    v0 = cost_study(base, make_evaluation(base)).crossovers["volume"].iloc[0]
    v1 = cost_study(dear, make_evaluation(dear)).crossovers["volume"].iloc[0]
    assert v1 > v0


# --- rules per kind ---------------------------------------------------------------------------


def test_nre_counts_per_kind():
    # Rules of core.costing; NRE = masks · spins + effort · rate · factor + test dev (DESIGN §5).
    study = make_study([SEP, SHARED, WIDE, SW])
    per = cost_study(study, make_evaluation(study)).per_candidate.set_index("candidate")
    # Separate, one die per band: 2 designs → 2 mask sets × 2 spins, 2 × effort, 2 test programs.
    assert per.loc["Sep", "n_designs"] == 2
    assert per.loc["Sep", "nre_mask_usd"] == 120e3 * 2 * 2
    assert per.loc["Sep", "nre_design_usd"] == 3000 * 150 * 1.0 * 2
    assert per.loc["Sep", "nre_test_dev_usd"] == 40e3 * 2
    # Separate, shared die: one mask set and test program, every band's design effort.
    assert per.loc["Shared", "n_designs"] == 1
    assert per.loc["Shared", "nre_mask_usd"] == 120e3 * 2
    assert per.loc["Shared", "nre_design_usd"] == 3000 * 150 * 2
    assert per.loc["Shared", "nre_test_dev_usd"] == 40e3
    # Wideband and switched: one design, effort × design-effort factor.
    assert per.loc["Wide", "nre_design_usd"] == pytest.approx(3000 * 150 * 1.3)
    assert per.loc["Sw", "nre_mask_usd"] == 600e3 * 2
    assert per.loc["Sw", "nre_design_usd"] == pytest.approx(3000 * 150 * 1.6)
    for name in per.index:
        parts = per.loc[name, ["nre_mask_usd", "nre_design_usd", "nre_test_dev_usd"]].sum()
        assert per.loc[name, "nre_usd"] == pytest.approx(parts)


def test_separate_die_per_band_counts_and_band_select():
    study = make_study([SEP, SHARED])
    r = cost_study(study, make_evaluation(study))
    dies = r.dies_of("Sep")
    assert list(dies["die"]) == ["n257", "n260"] and list(dies["n_per_radio"]) == [16, 8]
    # Each band's die keeps its design area, shaped W = √(A·1.5), H = √(A/1.5) (card aspect).
    assert dies["area_mm2"].tolist() == pytest.approx([3.0, 2.0])
    assert dies["width_mm"].iloc[0] == pytest.approx(math.sqrt(4.5))
    # Per radio: band b's die on each of its n_b elements: 16 · die(n257) + 8 · die(n260).
    ci = cost_inputs(study, GAAS)
    u1 = unit_cost(math.sqrt(4.5), math.sqrt(2.0), ci).recurring_usd
    u2 = unit_cost(math.sqrt(3.0), math.sqrt(2.0 / 1.5), ci).recurring_usd
    sep = r.row("Sep")
    assert sep["pa_dies_per_radio"] == 24
    assert sep["pa_cost_per_radio_usd"] == pytest.approx(16 * u1 + 8 * u2, rel=1e-12)
    assert sep["recurring_usd"] == pytest.approx(u1 + u2, rel=1e-12)
    assert sep["band_select_usd"] == 0.0 and sep["largest_die"] == "n257"
    # Shared die + diplexer: one die and one 0.5 USD part per element of the shared array.
    sh = r.row("Shared")
    (die,) = r.dies_of("Shared").itertuples()
    assert die.die == ALL_BANDS_DIE and die.n_per_radio == 16
    assert sh["band_select_per_radio"] == 16
    assert sh["recurring_usd"] == pytest.approx(die.packaged_die_usd + 0.5, rel=1e-12)
    assert sh["pa_cost_per_radio_usd"] == pytest.approx(16 * (die.packaged_die_usd + 0.5))
    assert set(r.derivations) >= {("Sep", "n257", "die_cost"), ("Sep", "n260", "die_cost")}


def test_no_band_select_part_with_one_band():
    # With one band there is nothing to select (the estimator applies no band-select loss).
    study = make_study([SHARED])
    study = dataclasses.replace(study, bands=study.bands[:1])
    assert cost_study(study, make_evaluation(study)).row("Shared")["band_select_usd"] == 0.0


def test_frames_have_their_columns():
    study = make_study([SEP, WIDE])
    r = cost_study(study, make_evaluation(study))
    assert tuple(r.per_candidate.columns) == PER_CANDIDATE_COLUMNS
    assert tuple(r.dies.columns) == DIE_COLUMNS
    assert r.grid("Wide", ALL_BANDS_DIE).count == 1927  # check-values §6
    assert len(r.curves) == 2 * r.volumes.size


# --- problems become findings -----------------------------------------------------------------


def test_die_larger_than_wafer_is_a_finding():
    study = make_study([WIDE, SW])
    r = cost_study(study, make_evaluation(study, dims={"Wide": (200.0, 150.0)}))
    (f,) = r.findings
    assert f.candidate == "Wide" and f.severity == "error"
    assert "no whole die fits" in f.message and "process_cards[0].wafer_diameter_mm" in f.message
    row = r.row("Wide")
    assert not row["feasible"] and row["note"] == "no whole die fits"
    assert math.isnan(row["unit_cost_at_design_volume_usd"])
    assert row["nre_usd"] == 865_000.0  # the NRE does not depend on the die (hand sum above)
    assert not r.dies_of("Wide")["fits"].iloc[0]
    assert r.grid("Wide", ALL_BANDS_DIE).count == 0
    assert r.crossovers.empty and set(r.curves["candidate"]) == {"Sw"}


def test_bad_cost_input_is_a_finding_naming_the_field():
    study = make_study([WIDE])
    # Bypass the study validation (as a hand-built study could) to reach the cost checks.
    study = dataclasses.replace(study, cost=dataclasses.replace(study.cost, test_yield_pct=150.0))
    r = cost_study(study, make_evaluation(study))
    assert [f.message.split(":")[0] for f in r.findings] == ["cost.test_yield_pct"]
    assert not r.row("Wide")["feasible"]


def test_unreached_design_is_a_finding():
    study = make_study([WIDE])
    r = cost_study(study, make_evaluation(study, dims={"Wide": (math.nan, math.nan)}))
    assert "design not reached" in r.findings[0].message
    assert not r.row("Wide")["feasible"]


# --- volume -----------------------------------------------------------------------------------


@settings(max_examples=60, deadline=None)
@given(
    v1=st.integers(1, 10**8),
    factor=st.floats(1.0, 1000.0),
    wafer=st.floats(100.0, 1e5),
    spins=st.integers(1, 10),
)
def test_more_volume_never_raises_unit_cost(v1, factor, wafer, spins):
    # unit cost(V) = recurring + NRE/V with NRE >= 0 is non-increasing in V (DESIGN §5).
    v2 = min(int(v1 * factor), 10**9)
    card = dataclasses.replace(B200, wafer_cost_usd=wafer)
    out = []
    for v in (v1, v2):
        study = make_study([WIDE, SW], card_b=card, spins=spins, design_volume=v)
        study = dataclasses.replace(
            study, cost=dataclasses.replace(study.cost, lifetime_volume=max(v, 100000))
        )
        out.append(cost_study(study, make_evaluation(study)).per_candidate)
    for name in ("Wide", "Sw"):
        a = out[0].set_index("candidate").loc[name, "unit_cost_at_design_volume_usd"]
        b = out[1].set_index("candidate").loc[name, "unit_cost_at_design_volume_usd"]
        assert b <= a * (1 + 1e-12)


def test_curves_fall_with_volume_and_span_the_marks():
    study = make_study([WIDE, SW])
    r = cost_study(study, make_evaluation(study))
    for _, g in r.curves.groupby("candidate"):
        assert np.all(np.diff(g["unit_cost_usd"].to_numpy()) <= 0)
    assert r.volumes[0] <= 20000 / 10 and r.volumes[-1] >= 10 * r.crossovers["volume"].max()


def test_volume_grid_decades():
    g = volume_grid(20000, 80000, [150.0])
    assert g[0] == 10.0 and g[-1] == 1e6 and np.all(np.diff(g) > 0)


# --- area, scores, Pareto ---------------------------------------------------------------------


def test_area_breakdown_adds_up():
    study = make_study([SEP, SW])
    ab = area_breakdown(make_evaluation(study)).set_index("candidate")
    parts = ["active_mm2", "networks_mm2", "switches_control_mm2", "pads_mm2", "overhead_mm2"]
    assert ab[parts].sum(axis=1).to_numpy() == pytest.approx(ab["total_mm2"].to_numpy())
    # Separate adds its two band designs (0.1 of 3 + 2 mm²); switched states share one design
    # (the hand-made frame gives each state half the die, counted once).
    assert ab.loc["Sep", "active_mm2"] == pytest.approx(0.5)
    assert ab.loc["Sw", "active_mm2"] == pytest.approx(0.1 * DIE_W * DIE_H / 2)


def test_pareto_hand_made_frame():
    # Cost ↓, margin ↑. By hand: A (1, 0) cheapest; B (2, 1) better margin than A; C (3, 0.5)
    # dominated by B; D (2, 1) ties B (neither strictly dominates); E (0.5, NaN) has no margin;
    # F (4, 2) has the best margin.
    frame = pd.DataFrame(
        {
            "candidate": list("ABCDEF"),
            "cost": [1.0, 2.0, 3.0, 2.0, 0.5, 4.0],
            "margin": [0.0, 1.0, 0.5, 1.0, math.nan, 2.0],
        }
    )
    mask = pareto_mask(frame["cost"], frame["margin"])
    assert frame["candidate"][mask].tolist() == ["A", "B", "D", "F"]
    with pytest.raises(ValueError, match="cost, benefit"):
        pareto_mask([1.0], [1.0, 2.0])


def test_weighted_scores_min_max_by_hand():
    study = make_study([WIDE, SW])
    ev = make_evaluation(study, margins={"Wide": (1.0, 0.5, 25.0), "Sw": (0.2, 0.5, 20.0)})
    r = cost_study(study, ev)
    # Worst margins (dB): Wide min(1, 0.5, 10·log10(25/20) = 0.969) = 0.5; Sw min(0.2, 0.5, 0)
    # = 0. Sw is cheaper at 20 000 radios? Wide 103.27 USD, Sw 44.53 + 1 960 000/20 000 = 142.53
    # USD → Wide 1, Sw 0 on cost. DC power (hand-made): Wide 10 W, Sw 11 W → 1, 0. Area equal
    # (both 7.5 mm²) → 1 each. Default weights 0.4/0.3/0.2/0.1: Wide = 1, Sw = 0.1.
    sc = weighted_scores(study, ev, r).set_index("candidate")
    assert sc.loc["Wide", "worst_margin_db"] == pytest.approx(0.5)
    assert sc.loc["Sw", "worst_margin_db"] == pytest.approx(0.0, abs=1e-12)
    assert sc.loc["Wide", "score"] == pytest.approx(1.0)
    assert sc.loc["Sw", "score"] == pytest.approx(0.1)
    assert sc["pareto"].tolist() == [True, False]
    zero = dataclasses.replace(study, weights=Weights(0.0, 0.0, 0.0, 0.0))
    with pytest.raises(ValueError, match="weights"):
        weighted_scores(zero, ev, r)


def test_worst_margin_counts_pae_in_db():
    # 10·log10(16/20) = −0.969 dB (definition of the decibel) is below the 1 dB and 0.5 dB
    # gain and P1dB margins.
    study = make_study([WIDE])
    ev = make_evaluation(study, margins={"Wide": (1.0, 0.5, 16.0)})
    assert worst_margin_db(ev)["Wide"] == pytest.approx(10 * math.log10(0.8))


# --- with the estimator -----------------------------------------------------------------------


@pytest.mark.parametrize("name", ["harbour-small-cell", "rural-fwa-terminal"])
def test_demo_studies_cost_cleanly(name):
    from core.resources import demo_path

    study = load_study(demo_path(name))
    ev = evaluate(study)
    r = cost_study(study, ev)
    assert r.findings == ()
    assert r.per_candidate["feasible"].all()
    assert list(r.per_candidate["candidate"]) == list(ev.summary["candidate"])
    # The per-radio die count follows the estimator's PA count for one-die-per-PA candidates.
    per = r.per_candidate.set_index("candidate")
    for c in study.candidates:
        if c.kind != CandidateKind.SEPARATE or c.die_arrangement == "die_per_band":
            pa = ev.summary.set_index("candidate").loc[c.name, "pa_count_per_radio"]
            assert per.loc[c.name, "pa_dies_per_radio"] == pa
    for x in r.crossovers.dropna(subset=["volume"]).itertuples():
        a, b = per.loc[x.candidate_a], per.loc[x.candidate_b]
        ua = a["pa_cost_per_radio_usd"] + a["nre_usd"] / x.volume
        ub = b["pa_cost_per_radio_usd"] + b["nre_usd"] / x.volume
        assert ua == pytest.approx(ub, rel=1e-9)
    scores = weighted_scores(study, ev, r)
    assert scores["score"].between(0, 1).all() and scores["pareto"].any()


def test_cost_inputs_from_card_and_settings():
    study = make_study([WIDE], test_yield_pct=90.0, package_yield_pct=95.0)
    ci = cost_inputs(study, B200)
    assert isinstance(ci, CostInputs)
    assert (ci.wafer_diameter_mm, ci.wafer_cost_usd, ci.mask_set_cost_usd) == (200, 6000, 600e3)
    assert (ci.test_yield, ci.package_yield, ci.critical_area_fraction) == (0.9, 0.95, 0.6)
