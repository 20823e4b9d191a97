"""Tests of core.link_plan: study band → link inputs, ledgers, derivations and array sizing.

The ledger is checked by hand for the n257 band of the harbour demo study, with the ITU-R
terms recomputed here from their formulas (P.525) or by itur 0.4.0 (P.676, P.838), used only
in tests as an independent reference implementation.
"""

import dataclasses
import doctest
import math

import itur.models.itu676 as itu676
import itur.models.itu838 as itu838
import numpy as np
import pandas as pd
import pytest
import scipy.constants

from core import link_plan
from core.link_plan import (
    EXTRA_LOSS_NAME,
    array_optimum,
    array_plan,
    band_ledger,
    ledger_derivation,
    link_inputs,
    study_ledgers,
)
from core.resources import demo_path
from core.study import load_study
from core.study.model import BandSpec, LinkScenario, Polarization


@pytest.fixture(scope="module")
def harbour():
    return load_study(demo_path("harbour-small-cell"))


def test_doctests():
    result = doctest.testmod(link_plan, optionflags=doctest.ELLIPSIS)
    assert result.failed == 0 and result.attempted >= 5


def test_link_inputs_converts_edge_units():
    scenario = LinkScenario(
        bandwidth_mhz=250.0,
        extra_loss_db=4.5,
        polarization=Polarization.CIRCULAR,
        distance_m=321.0,
        n_elements=48,
    )
    x = link_inputs(BandSpec(link=scenario))
    # 1 MHz = 1e6 Hz (SI prefix).
    assert x.bandwidth_hz == 250e6
    assert x.extra_losses_db == ((EXTRA_LOSS_NAME, 4.5),)
    assert x.extra_loss_db == 4.5
    assert x.polarization == "circular" and type(x.polarization) is str
    # Every field of the same name is copied unchanged.
    for f in dataclasses.fields(LinkScenario):
        if hasattr(x, f.name) and f.name != "polarization":
            assert getattr(x, f.name) == getattr(scenario, f.name), f.name


def test_zero_extra_loss_gives_no_line():
    x = link_inputs(BandSpec(link=LinkScenario(extra_loss_db=0.0)))
    assert x.extra_losses_db == ()
    assert not any(r.name.startswith("Extra") for r in band_ledger(BandSpec()).items)


def test_n257_ledger_by_hand(harbour):
    band = harbour.bands[0]
    assert band.name == "n257" and (band.f_low_ghz, band.f_high_ghz) == (26.5, 29.5)
    s = band.link
    budget = band_ledger(band)
    # Worst case: FSPL and rain both rise with f and no absorption line lies in 26.5-29.5 GHz,
    # so the largest loss is at the top edge.
    assert budget.f_hz == pytest.approx(29.5e9)
    f_ghz, d_km = 29.5, s.distance_m / 1000.0  # 0.150 km

    # Free space, ITU-R P.525-4 §2.2: L = 20·log10(4π·d·f/c)
    #   = 20·log10(4π · 150 m · 29.5e9 Hz / 299 792 458 m/s) = 105.3660 dB.
    fspl = 20 * math.log10(4 * math.pi * 150.0 * 29.5e9 / scipy.constants.c)
    assert fspl == pytest.approx(105.3660, abs=1e-4)
    # Gases, sea level (1013.25 hPa, 15 °C, 7.5 g/m³): itur P.676-12 Annex 1 γ = 0.09489 dB/km;
    # core uses P.676-11 Annex 2 (0.07-0.4 % lower, check-values.md §3) → × 0.15 km ≈ 0.0142 dB.
    gamma_gas = itu676.gamma_exact(f_ghz, 1013.25, 7.5, 288.15).value
    # Rain, ITU-R P.838-3: vertical (τ = 90°) at 0° elevation, γR = k_V·R^α_V at R = 25 mm/h.
    k_v, alpha_v = itu838.rain_specific_attenuation_coefficients(f_ghz, 0.0, 90.0)
    gamma_rain = k_v * 25.0**alpha_v  # 0.22065 · 25^0.91663 = 4.2179 dB/km
    assert gamma_rain == pytest.approx(itu838.rain_specific_attenuation(25, f_ghz, 0, 90).value)
    # ITU-R P.530-17 §2.4.1 eq (32): r = 1/(0.477·d^0.633·R^(0.073α)·f^0.123 − 10.579·(1 −
    # e^(−0.024·d))); at d = 0.15 km the denominator is 0.2320 < 0.4, so r takes its cap 2.5.
    denominator = 0.477 * d_km**0.633 * 25.0 ** (0.073 * alpha_v) * f_ghz**0.123 - 10.579 * (
        1 - math.exp(-0.024 * d_km)
    )
    assert denominator < 0.4
    rain = gamma_rain * d_km * 2.5  # eq (33): 4.2179 · 0.15 · 2.5 = 1.5817 dB
    path = fspl + gamma_gas * d_km + rain + 3.0  # + 3 dB user extra → 109.962 dB
    assert budget.path_loss_db == pytest.approx(path, abs=2e-4)
    assert budget.item("Rain attenuation").value == pytest.approx(rain, rel=1e-9)
    assert budget.item(f"Extra: {EXTRA_LOSS_NAME}").value == 3.0

    # Receiver: N = 10·log10(k·290 K/1 mW) + 10·log10(400e6) + NF
    #   = −173.9752 + 86.0206 + 9 = −78.9546 dBm (check-values.md §4, scipy's k).
    kt_dbm = 10 * math.log10(scipy.constants.k * 290.0 / 1e-3)
    noise = kt_dbm + 10 * math.log10(400e6) + 9.0
    assert noise == pytest.approx(-78.9546, abs=1e-4)
    assert budget.noise_floor_dbm == pytest.approx(noise, abs=1e-9)
    sensitivity = noise + 13.0 + 2.0  # + SNR_req + implementation margin = −63.9546 dBm
    assert budget.sensitivity_dbm == pytest.approx(sensitivity, abs=1e-9)
    # DESIGN.md §3 step 3: EIRP = S + L + M_fade − G_rx = −63.9546 + 109.962 + 4 − 8 = 42.007 dBm
    eirp = sensitivity + path + 4.0 - 8.0
    assert budget.required_eirp_dbm == pytest.approx(eirp, abs=2e-4)
    assert budget.required_eirp_dbm == pytest.approx(42.007, abs=1e-3)
    # Uniform array (check-values.md §12): P = EIRP − 20·log10(16) − G_el + feed + scan
    #   = 42.007 − 24.0824 − 5 + 1 + 2 = 15.925 dBm; P1dB = P + 8 dB back-off = 23.925 dBm.
    p_avg = eirp - 20 * math.log10(16) - 5.0 + 1.0 + 2.0
    assert budget.p_avg_elem_dbm == pytest.approx(p_avg, abs=2e-4)
    assert budget.p1db_elem_dbm == pytest.approx(p_avg + 8.0, abs=2e-4)
    assert budget.p1db_elem_dbm == pytest.approx(23.925, abs=1e-3)
    # Exposure: r = sqrt(EIRP_W/(4π·10 W/m²)); 42.007 dBm = 15.88 W → 0.3554 m.
    eirp_w = 10 ** ((eirp - 30) / 10)
    r_c = math.sqrt(eirp_w / (4 * math.pi * 10.0))
    assert budget.compliance_distance_m == pytest.approx(r_c, rel=1e-4)


def test_study_ledgers_one_per_band(harbour):
    ledgers = study_ledgers(harbour)
    assert list(ledgers) == [b.name for b in harbour.bands]
    # n260 (37-40 GHz) at 120 m: free space alone at the top edge, P.525-4 §2.2.
    fspl_40 = 20 * math.log10(4 * math.pi * 120.0 * 40e9 / scipy.constants.c)
    assert ledgers["n260"].item("Free-space loss").value == pytest.approx(fspl_40, abs=1e-9)


def test_longer_path_needs_more_eirp():
    near = band_ledger(BandSpec(link=LinkScenario(distance_m=100.0, rain_rate_mm_h=0.0)))
    far = band_ledger(BandSpec(link=LinkScenario(distance_m=200.0, rain_rate_mm_h=0.0)))
    # Doubling d adds 20·log10 2 = 6.02 dB of free-space loss (P.525-4 §2.2) plus γ_gas·0.1 km.
    extra = far.required_eirp_dbm - near.required_eirp_dbm
    gas = far.item("Gaseous absorption").value - near.item("Gaseous absorption").value
    assert extra == pytest.approx(20 * math.log10(2) + gas, abs=1e-9)
    assert far.p1db_elem_dbm - near.p1db_elem_dbm == pytest.approx(extra, abs=1e-9)


def test_derivation_of_p1db_and_eirp(harbour):
    budget = band_ledger(harbour.bands[0])
    d = ledger_derivation(budget, "P1dB per element")
    assert d.result == budget.p1db_elem_dbm and d.unit == "dBm"
    values = {n: v for n, v, _ in d.inputs}
    assert values["Average power per element"] + values["Back-off"] == pytest.approx(d.result)
    e = ledger_derivation(budget, "Required EIRP")
    v = {n: x for n, x, _ in e.inputs}
    assert v["Sensitivity"] + v["Total path loss"] + v["Fade margin"] - v["Rx antenna gain"] == (
        pytest.approx(e.result)
    )
    t = ledger_derivation(budget, "Total path loss")
    assert sum(x for _, x, _ in t.inputs) == pytest.approx(t.result)
    c = ledger_derivation(budget, "Compliance distance")
    assert "regulation" in c.source


def test_derivation_unknown_line():
    with pytest.raises(ValueError, match=r"^item_name: no ledger line 'Nope'"):
        ledger_derivation(band_ledger(BandSpec()), "Nope")


def test_bad_band_names_field():
    band = BandSpec(link=LinkScenario(distance_m=-5.0))
    with pytest.raises(ValueError, match="distance_m: must be positive"):
        band_ledger(band)
    with pytest.raises(ValueError, match="f_high_ghz"):
        band_ledger(BandSpec(f_low_ghz=30.0, f_high_ghz=28.0))


def test_array_optimum_marks_one_feasible_minimum():
    # Hand-built plan: the minimum DC power among feasible rows is 4.0 W at N = 8 for A; the
    # 1.0 W row of A is infeasible and must not be chosen; B has no feasible row.
    plan = pd.DataFrame(
        {
            "band": ["n257"] * 6,
            "candidate": ["A", "A", "A", "A", "B", "B"],
            "n_elements": [2, 4, 8, 16, 2, 4],
            "feasible": [False, True, True, True, False, False],
            "array_dc_power_w": [1.0, 6.0, 4.0, 4.0, np.nan, np.nan],
        }
    )
    marked = array_optimum(plan)
    assert marked["lowest_dc_power"].tolist() == [False, False, True, False, False, False]
    assert "cheapest" not in marked
    with pytest.raises(ValueError, match="plan: missing columns feasible"):
        array_optimum(plan.drop(columns="feasible"))


@pytest.mark.parametrize("bad", [[], [0, 1], [1.5], [[1, 2]], [np.nan]])
def test_array_plan_rejects_bad_n(harbour, bad):
    with pytest.raises(ValueError, match=r"^n_values: must"):
        array_plan(harbour, np.asarray(bad, dtype=float))


def test_target_below_the_ledger_is_warned_and_adopting_clears_it():
    import dataclasses

    from core.link_plan import band_ledger, target_findings
    from core.study import load_study

    study = load_study(demo_path("harbour-small-cell"))
    assert [p for p in target_findings(study) if p.severity == "warning"] == []
    need = band_ledger(study.bands[0]).p1db_elem_dbm
    low = dataclasses.replace(
        study.bands[0], targets=dataclasses.replace(study.bands[0].targets, p1db_dbm=need - 1)
    )
    found = target_findings(dataclasses.replace(study, bands=(low, *study.bands[1:])))
    assert [p.path for p in found if p.severity == "warning"] == ["bands[0].targets.p1db_dbm"]
