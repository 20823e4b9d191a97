"""Tests of core.link: noise floor, array EIRP, exposure distance, SNR table and the ledger."""

import doctest
import math
import typing
from dataclasses import FrozenInstanceError, replace

import numpy as np
import pandas as pd
import pytest
import scipy.constants
from hypothesis import given, settings
from hypothesis import strategies as st

from core import link
from core.link import (
    REQUIRED_SNR_DB,
    REQUIRED_SNR_TABLE,
    LinkInputs,
    Modulation,
    array_eirp_dbm,
    array_sweep,
    compliance_distance_m,
    link_budget,
    noise_floor_dbm,
    per_element_power_dbm,
    power_density_w_per_m2,
    required_snr_db,
    total_path_loss_db,
    validate_link_inputs,
    worst_case_frequency_hz,
)

GHZ = 1e9


def test_module_examples():
    # The docstring examples are executable statements of the values quoted in them.
    assert doctest.testmod(link).failed == 0


# ------------------------------------------------------------------------------------------
# Thermal noise
# ------------------------------------------------------------------------------------------


def test_noise_density_at_290_k():
    # check-values.md §4: k·T0 = −173.9752 dBm/Hz with the exact SI k (scipy.constants.k).
    expected = 10 * math.log10(scipy.constants.k * 290.0 / 1e-3)
    assert noise_floor_dbm(1.0, 0.0) == pytest.approx(expected, abs=1e-12)
    assert noise_floor_dbm(1.0, 0.0) == pytest.approx(-173.9752, abs=5e-5)
    # Common practice rounds it to −174 dBm/Hz; the exact value is 0.0248 dB above that.
    assert noise_floor_dbm(1.0, 0.0) - (-174.0) == pytest.approx(0.0248, abs=1e-4)


@pytest.mark.parametrize(
    ("bandwidth_hz", "nf_db", "expected_dbm"),
    # check-values.md §4 table.
    [(100e6, 0.0, -93.9752), (400e6, 0.0, -87.9546), (400e6, 7.0, -80.9546)],
)
def test_noise_floor_check_values(bandwidth_hz, nf_db, expected_dbm):
    assert noise_floor_dbm(bandwidth_hz, nf_db) == pytest.approx(expected_dbm, abs=5e-5)


def test_noise_floor_broadcasts_and_scales_with_temperature():
    floor = noise_floor_dbm(np.array([50e6, 100e6, 200e6, 400e6])[:, None], np.array([5.0, 7.0]))
    assert floor.shape == (4, 2)
    # kTB: +10 log10 2 per doubling of B or of T (Johnson-Nyquist).
    np.testing.assert_allclose(np.diff(floor, axis=0), 10 * math.log10(2), rtol=1e-12)
    assert noise_floor_dbm(1e6, 0.0, 580.0) - noise_floor_dbm(1e6, 0.0) == pytest.approx(
        10 * math.log10(2), rel=1e-12
    )


@pytest.mark.parametrize(
    ("args", "field"),
    [((0.0, 7.0), "bandwidth_hz"), ((1e6, -1.0), "noise_figure_db"),
     ((1e6, 7.0, 0.0), "temperature_k"), ((float("inf"), 7.0), "bandwidth_hz")],
)  # fmt: skip
def test_noise_floor_rejects_bad_input(args, field):
    with pytest.raises(ValueError, match=f"^{field}: must"):
        noise_floor_dbm(*args)


# ------------------------------------------------------------------------------------------
# Phased-array EIRP
# ------------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("n", "expected_dbm"),
    # check-values.md §12: P_el = 20 dBm, G_el = 5 dBi (standard array theory, from memory,
    # verified there by a coherent field sum).
    [(16, 49.0824), (64, 61.1236), (256, 73.1648)],
)
def test_array_eirp_check_values(n, expected_dbm):
    assert array_eirp_dbm(20.0, n, 5.0) == pytest.approx(expected_dbm, abs=5e-5)


def test_per_element_power_check_value():
    # check-values.md §12 inverse: 55 dBm EIRP, N = 64, G_el 5 dBi → 13.8764 dBm per element
    # (24.414 mW), 31.938 dBm conducted in total.
    p = per_element_power_dbm(55.0, 64, 5.0)
    assert p == pytest.approx(13.8764, abs=5e-5)
    assert 10 ** (p / 10) == pytest.approx(24.414, abs=5e-4)
    assert p + 10 * math.log10(64) == pytest.approx(31.938, abs=5e-4)


def test_array_eirp_equals_coherent_field_sum():
    # Independent physics: N elements, each radiating P·G, phased so their fields add in
    # phase at the beam peak: |Σ a_i e^{jφ_i} e^{-jφ_i}|² = N²·P·G.
    rng = np.random.default_rng(7)
    p_w, g_lin = 0.1, 10 ** (5.0 / 10)
    for n in (1, 3, 16, 100):
        phases = rng.uniform(0, 2 * np.pi, n)
        field = np.sum(np.sqrt(p_w * g_lin) * np.exp(1j * phases) * np.exp(-1j * phases))
        eirp_dbm = 10 * math.log10(abs(field) ** 2) + 30
        assert array_eirp_dbm(20.0, n, 5.0) == pytest.approx(eirp_dbm, abs=1e-9)


@settings(max_examples=150, deadline=None)
@given(
    eirp=st.floats(-50, 100),
    n=st.integers(1, 65536),
    gain=st.floats(-10, 30),
    feed=st.floats(0, 10),
    scan=st.floats(0, 10),
)
def test_array_round_trip(eirp, n, gain, feed, scan):
    p = per_element_power_dbm(eirp, n, gain, feed, scan)
    assert array_eirp_dbm(p, n, gain, feed, scan) == pytest.approx(eirp, abs=1e-9)


def test_per_element_power_per_doubling_of_n():
    # For fixed EIRP, P_el falls 20 log10 2 = 6.0206 dB per doubling of N (half from the
    # shared power, half from the doubled array gain); the total conducted power N·P_el
    # falls 10 log10 2 = 3.0103 dB. Standard array theory (check-values.md §12).
    n = 2 ** np.arange(11)
    p = per_element_power_dbm(60.0, n, 5.0, 1.0, 2.0)
    np.testing.assert_allclose(-np.diff(p), 20 * math.log10(2), rtol=1e-12)
    np.testing.assert_allclose(-np.diff(p + 10 * np.log10(n)), 10 * math.log10(2), rtol=1e-12)


@pytest.mark.parametrize("n", [0, -4, 1.5, [8, 16.5], float("nan")])
def test_array_rejects_bad_element_count(n):
    with pytest.raises(ValueError, match=r"^n_elements: must"):
        array_eirp_dbm(20.0, n, 5.0)


def test_array_rejects_negative_losses():
    with pytest.raises(ValueError, match=r"^feed_loss_db: must be non-negative"):
        per_element_power_dbm(50.0, 16, 5.0, feed_loss_db=-1.0)


# ------------------------------------------------------------------------------------------
# RF exposure
# ------------------------------------------------------------------------------------------


@settings(max_examples=100, deadline=None)
@given(eirp=st.floats(0, 90), limit=st.floats(0.01, 1000))
def test_compliance_distance_matches_direct_power_density(eirp, limit):
    # Far-field spherical spreading S = EIRP/(4π r²), written out directly with scipy's π.
    r = compliance_distance_m(eirp, limit)
    direct = 10 ** ((eirp - 30) / 10) / (4 * scipy.constants.pi * r**2)
    assert direct == pytest.approx(limit, rel=1e-12)
    assert power_density_w_per_m2(eirp, r) == pytest.approx(limit, rel=1e-12)


def test_compliance_distance_values():
    # 60 dBm = 1 kW: r = sqrt(1000 / (4π·10)) = 2.8209 m at the default 10 W/m².
    assert compliance_distance_m(60.0) == pytest.approx(math.sqrt(1000 / (40 * math.pi)))
    # Halving the limit moves the boundary out by sqrt 2; +20 dB EIRP by a factor 10.
    assert compliance_distance_m(60.0, 5.0) / compliance_distance_m(60.0) == pytest.approx(
        math.sqrt(2)
    )
    assert compliance_distance_m(80.0) / compliance_distance_m(60.0) == pytest.approx(10.0)
    assert compliance_distance_m(np.array([40.0, 60.0]), np.array([[1.0], [10.0]])).shape == (
        2,
        2,
    )


@pytest.mark.parametrize(
    ("func", "args", "field"),
    [(compliance_distance_m, (60.0, 0.0), "limit_w_per_m2"),
     (compliance_distance_m, (float("nan"),), "eirp_dbm"),
     (power_density_w_per_m2, (60.0, 0.0), "r_m")],
)  # fmt: skip
def test_exposure_rejects_bad_input(func, args, field):
    with pytest.raises(ValueError, match=f"^{field}: must"):
        func(*args)


# ------------------------------------------------------------------------------------------
# Required SNR table
# ------------------------------------------------------------------------------------------


def test_snr_table_respects_shannon_bound():
    # Shannon (1948): an AWGN channel carries η bit/symbol only if SNR ≥ 2^η − 1. The table's
    # representative coded values (from memory) must sit above that limit, and by less than a
    # few dB for modern codes at ~10 % BLER (common practice: 1-3 dB).
    for row in REQUIRED_SNR_TABLE:
        shannon_db = 10 * math.log10(2**row.spectral_efficiency - 1)
        assert 1.0 <= row.snr_db - shannon_db <= 3.5, row.modulation
    efficiencies = [row.spectral_efficiency for row in REQUIRED_SNR_TABLE]
    snrs = [row.snr_db for row in REQUIRED_SNR_TABLE]
    assert efficiencies == sorted(efficiencies) and snrs == sorted(snrs)


def test_snr_lookup():
    assert set(REQUIRED_SNR_DB) == set(typing.get_args(Modulation))
    assert required_snr_db("64QAM 2/3") == REQUIRED_SNR_DB["64QAM 2/3"] == 14.0
    with pytest.raises(TypeError):
        REQUIRED_SNR_DB["QPSK 1/2"] = 0.0  # immutable mapping
    with pytest.raises(ValueError, match=r"^modulation: must be one of"):
        required_snr_db("8PSK 2/3")


# ------------------------------------------------------------------------------------------
# Ledger
# ------------------------------------------------------------------------------------------

HAND_CASE = LinkInputs(
    distance_m=1000.0,
    rain_rate_mm_h=25.0,
    polarization="horizontal",
    extra_losses_db=(("foliage", 3.0), ("body", 2.0)),
    fade_margin_db=3.0,
    bandwidth_hz=400e6,
    noise_figure_db=7.0,
    required_snr_db=10.0,
    implementation_margin_db=2.0,
    rx_antenna_gain_dbi=10.0,
    n_elements=64,
    element_gain_dbi=5.0,
    feed_loss_db=1.0,
    scan_loss_db=2.0,
    backoff_db=8.0,
)


def test_link_budget_hand_computed():
    # 28 GHz, 1 km, sea-level standard atmosphere, 25 mm/h horizontal.
    # Path:  FSPL = 107.4115 (28 GHz, 200 m; check-values §1) + 20 log10(1000/200) = 13.9794
    #          → 121.3909 dB
    #        gas  = 0.101488 dB/km (P.676-11 Annex 2; check-values §3) × 1 km = 0.1015 dB
    #        rain = γ_H 4.6236 dB/km (P.838-3; check-values §2) × 1 km × r 1.5354 (P.530-17
    #          eq (32), see test_reduction_factor_by_hand) = 7.0992 dB
    #        extra = 3 + 2 = 5 dB;  total = 121.3909 + 0.1015 + 7.0992 + 5 = 133.5916 dB
    # Rx:    N = −173.9752 + 10 log10(4e8) 86.0206 + NF 7 = −80.9546 dBm (check-values §4)
    #        sensitivity = −80.9546 + 10 + 2 = −68.9546 dBm
    # EIRP:  −68.9546 + 133.5916 + 3 − 10 = 57.6370 dBm
    # Array: P_avg = 57.6370 − 20 log10 64 (36.1236) − 5 + 1 + 2 = 19.5134 dBm; P1dB = 27.5134
    #        total = 19.5134 + 10 log10 64 (18.0618) = 37.5752 dBm = 5.7224 W
    # RF:    r = sqrt(10^(2.7637) W / (4π·10 W/m²)) = sqrt(580.38 / 125.66) = 2.1491 m
    b = link_budget(28 * GHZ, HAND_CASE)
    # Rounded inputs (4-6 digits) give ≲ 2e-4 dB of slack; 1e-3 dB is the checked precision.
    assert b.item("Free-space loss").value == pytest.approx(121.3909, abs=1e-3)
    assert b.item("Gaseous absorption").value == pytest.approx(0.1015, abs=1e-3)
    assert b.item("Rain attenuation").value == pytest.approx(7.0992, abs=1e-3)
    assert b.path_loss_db == pytest.approx(133.5916, abs=1e-3)
    assert b.noise_floor_dbm == pytest.approx(-80.9546, abs=1e-3)
    assert b.sensitivity_dbm == pytest.approx(-68.9546, abs=1e-3)
    assert b.required_eirp_dbm == pytest.approx(57.6370, abs=1e-3)
    assert b.p_avg_elem_dbm == pytest.approx(19.5134, abs=1e-3)
    assert b.p1db_elem_dbm == pytest.approx(27.5134, abs=1e-3)
    assert b.total_rf_power_w == pytest.approx(5.7224, abs=1e-3)
    assert b.compliance_distance_m == pytest.approx(2.1491, abs=1e-3)


def test_ledger_rows_are_consistent():
    b = link_budget(28 * GHZ, HAND_CASE)
    value = {row.name: row.value for row in b.items}
    path = ["Free-space loss", "Gaseous absorption", "Rain attenuation", "Extra: foliage"]
    path.append("Extra: body")
    assert value["Total path loss"] == pytest.approx(sum(value[k] for k in path), abs=1e-12)
    assert value["Required EIRP"] == pytest.approx(
        value["Sensitivity"] + value["Total path loss"] + value["Fade margin"]
        - value["Rx antenna gain"],
        abs=1e-12,
    )  # fmt: skip
    assert value["Required EIRP"] == pytest.approx(
        array_eirp_dbm(value["Average power per element"], 64, 5.0, 1.0, 2.0), abs=1e-9
    )
    assert power_density_w_per_m2(b.required_eirp_dbm, b.compliance_distance_m) == pytest.approx(
        10.0
    )
    frame = b.to_frame()
    assert isinstance(frame, pd.DataFrame) and len(frame) == len(b.items)
    assert list(frame.columns) == ["group", "name", "value", "unit", "source", "formula"]
    assert set(frame["group"]) <= {"Transmit", "Path", "Receive", "Margin", "Result"}
    assert frame["source"].str.len().min() > 0 and frame["formula"].str.len().min() > 0
    with pytest.raises(FrozenInstanceError):
        b.items[0].value = 0.0
    with pytest.raises(KeyError):
        b.item("Not a row")
    assert "local regulation" in b.exposure_caution


def test_link_budget_rises_with_frequency_in_band():
    # n257 (26.5-29.5 GHz, TS 38.101-2; check-values §5): the top edge needs the most EIRP,
    # since FSPL (P.525) and rain (P.838) both rise with f there.
    low, high = (link_budget(f * GHZ, LinkInputs()) for f in (26.5, 29.5))
    assert high.required_eirp_dbm > low.required_eirp_dbm
    assert worst_case_frequency_hz(26.5 * GHZ, 29.5 * GHZ, LinkInputs()) == 29.5 * GHZ


def test_worst_case_frequency_inside_oxygen_band():
    # n263 (57-71 GHz, check-values §5) straddles the 60 GHz oxygen complex (P.676 Table 1),
    # ~15 dB/km at sea level: over 500 m the gas term outweighs the +1.5 dB of FSPL from
    # 60 to 71 GHz, so the worst case lies inside the band, not at its top edge.
    scenario = LinkInputs(distance_m=500.0, rain_rate_mm_h=0.0)
    f = worst_case_frequency_hz(57 * GHZ, 71 * GHZ, scenario, n_points=281)
    assert 58 * GHZ < f < 63 * GHZ
    assert total_path_loss_db(f, scenario) > total_path_loss_db(71 * GHZ, scenario) + 3.0


def test_validate_lists_every_bad_field():
    bad = replace(
        LinkInputs(),
        distance_m=0.0,
        rain_rate_mm_h=-1.0,
        polarization="diagonal",
        temperature_c=-300.0,
        water_vapour_g_m3=-0.5,
        extra_losses_db=(("foliage", 3.0), ("", 1.0), ("wall", -2.0), ("oops",)),
        bandwidth_hz=-1.0,
        noise_figure_db=float("nan"),
        fade_margin_db="3",
        n_elements=1.5,
        backoff_db=-1.0,
    )
    problems = dict(validate_link_inputs(bad))
    assert problems == {
        "distance_m": "must be positive",
        "rain_rate_mm_h": "must be non-negative",
        "temperature_c": "must be greater than -273.15",
        "water_vapour_g_m3": "must be non-negative",
        "fade_margin_db": "must be a number (got '3')",
        "bandwidth_hz": "must be positive",
        "noise_figure_db": "must be finite",
        "backoff_db": "must be non-negative",
        "n_elements": "must be a whole number ≥ 1",
        "polarization": "must be one of horizontal, vertical, circular",
        "extra_losses_db[1]": "name must be a non-empty string",
        "extra_losses_db[2]": "loss must be non-negative",
        "extra_losses_db[3]": "must be a (name, dB) pair",
    }
    with pytest.raises(ValueError, match="distance_m: must be positive; ") as info:
        link_budget(28 * GHZ, bad)
    assert all(field in str(info.value) for field in problems)


def test_validate_accepts_good_inputs_and_rejects_bool_count():
    assert validate_link_inputs(LinkInputs()) == []
    assert validate_link_inputs(HAND_CASE) == []
    assert validate_link_inputs(replace(LinkInputs(), n_elements=np.int64(8))) == []
    assert dict(validate_link_inputs(replace(LinkInputs(), n_elements=True))) == {
        "n_elements": "must be a whole number ≥ 1"
    }


@pytest.mark.parametrize(
    ("f_hz", "kwargs", "field"),
    [([28e9, 29e9], {}, "f_hz"), (400e9, {}, "f_hz"),
     (28e9, {"exposure_limit_w_per_m2": 0.0}, "exposure_limit_w_per_m2")],
)  # fmt: skip
def test_link_budget_rejects_bad_arguments(f_hz, kwargs, field):
    with pytest.raises(ValueError, match=f"^{field}: "):
        link_budget(f_hz, LinkInputs(), **kwargs)


# ------------------------------------------------------------------------------------------
# Array sweep
# ------------------------------------------------------------------------------------------


def test_array_sweep_matches_ledger():
    n = np.arange(1, 1025)
    sweep = array_sweep(29.5 * GHZ, HAND_CASE, n)
    assert list(sweep.columns) == [
        "n_elements", "p_avg_elem_dbm", "p1db_elem_dbm", "eirp_dbm", "total_rf_power_w"
    ]  # fmt: skip
    assert len(sweep) == 1024 and sweep["n_elements"].dtype == np.int64
    for count in (1, 16, 64, 1000, 1024):
        b = link_budget(29.5 * GHZ, replace(HAND_CASE, n_elements=count))
        row = sweep.iloc[count - 1]
        assert row["p_avg_elem_dbm"] == pytest.approx(b.p_avg_elem_dbm, abs=1e-9)
        assert row["p1db_elem_dbm"] == pytest.approx(b.p1db_elem_dbm, abs=1e-9)
        assert row["eirp_dbm"] == pytest.approx(b.required_eirp_dbm, abs=1e-9)
        assert row["total_rf_power_w"] == pytest.approx(b.total_rf_power_w, rel=1e-9)
    # Total conducted power ∝ 1/N for fixed EIRP (array gain grows as N): N·P_total constant.
    np.testing.assert_allclose(sweep["total_rf_power_w"] * n, sweep["total_rf_power_w"][0])


@pytest.mark.parametrize("n_values", [[], [0, 1], [2.5], [[1, 2], [3, 4]]])
def test_array_sweep_rejects_bad_counts(n_values):
    with pytest.raises(ValueError, match=r"^n_values: must"):
        array_sweep(28 * GHZ, LinkInputs(), n_values)
