"""Tests for core.rf against handbook values, check-values.md and reference libraries."""

import doctest
import re

import numpy as np
import pytest
import skrf
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import constants, integrate
from skrf.media import DefinedGammaZ0

from core import rf

C0 = constants.c


# --- load line -------------------------------------------------------------------------------


def test_load_line_cripps_example():
    # Cripps, RF Power Amplifiers for Wireless Communications, 2nd ed., ch. 2; check-values §8a.
    r_opt, p_max = rf.load_line(5.0, 1.0, 0.5)
    assert r_opt == pytest.approx(16.0, rel=1e-12)
    assert p_max == pytest.approx(0.5, rel=1e-12)
    assert rf.w_to_dbm(p_max) == pytest.approx(26.9897, abs=1e-4)  # check-values §8a


def test_load_line_broadcasts_per_mm():
    # Same Cripps relation per mm of periphery: Imax' in A/mm gives Ropt·W in Ω·mm.
    r_opt, p_max = rf.load_line(np.array([5.0, 28.0]), np.array([[1.0], [0.5]]), 0.55)
    assert r_opt.shape == (2, 2) and p_max.shape == (2, 2)
    assert r_opt[1, 1] == pytest.approx(2 * 27.5 / 0.55)
    assert p_max[0, 0] == pytest.approx(4.0 * 0.55 / 4)


# --- Chebyshev transformer -------------------------------------------------------------------

# check-values §10: R = 5 (50 → 10 Ω), Γm = 0.05; θm exact (deg), BW exact, BW Pozar-ln,
# exact equiripple impedances (Ω).
TABLE_10 = [
    (1, 86.791, 0.07130, 0.07916, [22.361]),
    (2, 70.999, 0.42225, 0.44448, [32.611, 15.332]),
    (3, 56.214, 0.75079, 0.77585, [38.249, 22.361, 13.072]),
    (4, 45.502, 0.98885, 1.01240, [41.196, 28.247, 17.701, 12.137]),
]


@pytest.mark.parametrize(("n", "theta_deg", "bw_exact", "bw_ln", "_z"), TABLE_10)
def test_chebyshev_table_r5(n, theta_deg, bw_exact, bw_ln, _z):
    # check-values §10 table (Cohn 1955 / Riblet 1957 exact form; Pozar §5.7 ln form).
    # BW is tabulated to 0.001 %, i.e. ±5e-6 of B; that moves Γm by < 1e-5.
    for ratio in (5.0, 0.2):
        assert rf.chebyshev_max_reflection(ratio, n, bw_exact) == pytest.approx(0.05, abs=1e-5)
        got_ln = rf.chebyshev_max_reflection(ratio, n, bw_ln, method="pozar_ln")
        assert got_ln == pytest.approx(0.05, abs=1e-5)
    assert rf.chebyshev_bandwidth(5.0, n, 0.05) == pytest.approx(bw_exact, abs=6e-6)
    assert rf.chebyshev_bandwidth(5.0, n, 0.05, method="pozar_ln") == pytest.approx(bw_ln, abs=6e-6)
    theta = np.degrees(np.arccos(1.0 / rf.chebyshev_sec_theta_m(5.0, n, 0.05)))
    assert theta == pytest.approx(theta_deg, abs=6e-4)


def test_chebyshev_single_section_matches_pozar_quarter_wave_formula():
    # Pozar §5.4 (from memory) single-section bandwidth, quoted in check-values §10:
    # Δf/f0 = 2 − (4/π)·acos[Γm/√(1−Γm²) · 2√(Z0·ZL)/|ZL−Z0|].
    z0, zl, gm = 50.0, 10.0, 0.05
    bw = 2 - 4 / np.pi * np.arccos(gm / np.sqrt(1 - gm**2) * 2 * np.sqrt(z0 * zl) / abs(zl - z0))
    assert rf.chebyshev_bandwidth(zl / z0, 1, gm) == pytest.approx(bw, rel=1e-12)


def test_chebyshev_pozar_example_5_7():
    # Pozar, Microwave Engineering, Example 5.7 (50 → 100 Ω, N = 3, Γm = 0.05); check-values §10:
    # θm = 44.73°, BW = 100.6 % with the small-reflection (ln) form.
    s = rf.chebyshev_sec_theta_m(2.0, 3, 0.05, method="pozar_ln")
    assert np.degrees(np.arccos(1 / s)) == pytest.approx(44.73, abs=0.005)
    assert rf.chebyshev_bandwidth(2.0, 3, 0.05, method="pozar_ln") == pytest.approx(1.006, abs=5e-4)


def test_chebyshev_sections_needed():
    # check-values §10 "Sections needed": 30 % and 13 % need N = 2 with either formula; N = 1
    # gives only 7.13 % (exact) / 7.92 % (ln).
    for method in ("exact", "pozar_ln"):
        assert rf.chebyshev_sections_needed(5.0, [0.30, 0.13], 0.05, method).tolist() == [2, 2]
        assert rf.chebyshev_sections_needed(5.0, 0.07, 0.05, method) == 1
    assert rf.chebyshev_sections_needed(5.0, 0.075, 0.05) == 2  # above 7.130 %
    assert rf.chebyshev_sections_needed(5.0, 0.075, 0.05, "pozar_ln") == 1  # below 7.916 %
    # Table BW values are the N-section limits (check-values §10).
    assert rf.chebyshev_sections_needed(5.0, 0.9888, 0.05) == 4
    assert rf.chebyshev_sections_needed(5.0, 0.9889, 0.05) == 5
    assert rf.chebyshev_sections_needed(1.0, 1.5, 0.05) == 1  # nothing to match
    assert rf.chebyshev_sections_needed(5.0, 0.0, 0.05) == 1  # one frequency: λ/4 matches


def _cascade_gamma(z_sections, z_load, f0, f):
    """|Γ_in| of ideal TEM quarter-wave lines (at f0) from 50 Ω into z_load, via scikit-rf."""
    freq = skrf.Frequency.from_f(f, unit="hz")
    ntwk = None
    for z in z_sections:
        media = DefinedGammaZ0(freq, z0_port=50.0, z0=z, gamma=1j * freq.w / C0)
        line = media.line(C0 / (4 * f0), unit="m")
        ntwk = line if ntwk is None else ntwk**line
    load = DefinedGammaZ0(freq, z0_port=50.0).load((z_load - 50.0) / (z_load + 50.0))
    return np.abs((ntwk**load).s[:, 0, 0])


@pytest.mark.parametrize(("n", "_theta", "bw", "_ln", "z"), TABLE_10)
def test_chebyshev_against_scikit_rf_cascade(n, _theta, bw, _ln, z):
    # check-values §10 exact equiripple impedances, cascaded with scikit-rf (reference library):
    # max in-band |Γ| and the whole |Γ(f)| curve must match the closed form. Impedances are
    # rounded to 1 mΩ, which moves Γ by ~2e-5.
    f0 = 30e9
    f_band = np.linspace(f0 * (1 - bw / 2), f0 * (1 + bw / 2), 801)
    g_band = _cascade_gamma(z, 10.0, f0, f_band)
    assert g_band.max() == pytest.approx(rf.chebyshev_max_reflection(0.2, n, bw), abs=1e-4)
    f_all = np.linspace(0.01 * f0, 1.99 * f0, 397)
    expected = rf.chebyshev_reflection(f_all, f0, 0.2, n, bw)
    np.testing.assert_allclose(_cascade_gamma(z, 10.0, f0, f_all), expected, atol=1e-4)


def test_chebyshev_reflection_shape_and_limits():
    # Exact insertion-loss form (check-values §10): |Γ| = Γm at band edges, the bare step
    # |R−1|/(R+1) at θ = 0 and θ = π, never more.
    f0, bw, r = 28e9, 0.4, 5.0
    edges = f0 * np.array([1 - bw / 2, 1 + bw / 2])
    gm = rf.chebyshev_max_reflection(r, 3, bw)
    np.testing.assert_allclose(rf.chebyshev_reflection(edges, f0, r, 3, bw), gm, rtol=1e-9)
    g_dc = (r - 1) / (r + 1)
    f = np.linspace(0, 2 * f0, 2001)
    g = rf.chebyshev_reflection(f, f0, r, 3, bw)
    assert g.shape == f.shape
    assert g[0] == pytest.approx(g_dc, rel=1e-12) and g[-1] == pytest.approx(g_dc, rel=1e-9)
    assert g.max() <= g_dc * (1 + 1e-12)
    in_band = (f >= edges[0]) & (f <= edges[1])
    assert g[in_band].max() <= gm * (1 + 1e-9)
    grid = rf.chebyshev_reflection(f[:, None], f0, r, np.array([1, 2, 3]), bw)
    assert grid.shape == (f.size, 3)


def test_chebyshev_zero_bandwidth_limit_is_binomial():
    # B → 0: all reflection zeros collapse onto f0, giving the maximally flat response
    # P_LR = 1 + a²cos^(2N)θ, a = |R−1|/(2√R) (Pozar §5.6 binomial transformer, exact form).
    f0, r, n = 30e9, 4.0, 3
    f = np.linspace(0, 2 * f0, 41)
    a = abs(r - 1) / (2 * np.sqrt(r))
    cn = np.abs(np.cos(np.pi / 2 * f / f0)) ** n
    binomial = a * cn / np.sqrt(1 + (a * cn) ** 2)
    np.testing.assert_allclose(rf.chebyshev_reflection(f, f0, r, n, 0.0), binomial, atol=1e-15)
    np.testing.assert_allclose(rf.chebyshev_reflection(f, f0, r, n, 1e-7), binomial, atol=1e-12)
    assert rf.chebyshev_max_reflection(r, n, 0.0) == 0.0
    assert rf.chebyshev_max_reflection(1.0, n, 1.5) == 0.0  # R = 1: nothing to match


def test_chebyshev_large_order_does_not_overflow():
    # cosh(N·acosh(sec θm)) overflows for N = 400 at B = 1e-3; the homogeneous form must not.
    assert rf.chebyshev_max_reflection(5.0, 400, 1e-3) == 0.0
    assert 0 < rf.chebyshev_max_reflection(5.0, 400, 1.9) < 1e-10


# --- Bode–Fano -------------------------------------------------------------------------------


def test_bode_fano_check_values():
    # Pozar §5.9, Fano (1950); check-values §9: R = 16 Ω, C = 1 pF.
    assert rf.bode_fano_min_reflection(16.0, 1e-12, 24.25e9, 27.5e9) == pytest.approx(
        6.6695e-5, rel=1e-4
    )
    assert rf.bode_fano_min_reflection(16.0, 1e-12, 24.25e9, 33.4e9) == pytest.approx(
        3.2867e-2, rel=1e-4
    )
    assert rf.bode_fano_max_bandwidth_hz(16.0, 1e-12, 0.1) == pytest.approx(13.572e9, rel=1e-4)
    assert rf.bode_fano_max_bandwidth_hz(16.0, 1e-12, 0.05) == pytest.approx(10.432e9, rel=1e-4)


def test_bode_fano_integral_numerically():
    # Pozar §5.9 / Fano (1950): an RC load fed from R (Γ = −sRC/(2 + sRC), no RHP zeros) meets
    # ∫ ln(1/|Γ|) dω = π/(RC) with equality; scipy quad, integrated in x = ωRC for conditioning.
    r, c = 16.0, 1e-12
    rc = r * c

    def ln_inv_gamma(x):
        s_rc = 1j * x
        return -np.log(abs(-s_rc / (2 + s_rc)))

    head, _ = integrate.quad(ln_inv_gamma, 0, 1)
    tail, _ = integrate.quad(ln_inv_gamma, 1, np.inf)
    integral = (head + tail) / rc
    assert integral == pytest.approx(np.pi / rc, rel=1e-8)
    # The brick-wall bound spends the whole integral inside Δω.
    f_lo, f_hi = 24.25e9, 33.4e9
    g_min = rf.bode_fano_min_reflection(r, c, f_lo, f_hi)
    assert np.log(1 / g_min) * 2 * np.pi * (f_hi - f_lo) == pytest.approx(integral, rel=1e-8)


# --- switch ----------------------------------------------------------------------------------

F_SW = np.array([24.25e9, 27.5e9, 31.8e9, 33.4e9])


def test_series_switch_against_scikit_rf_and_table():
    # check-values §11 (Ron 3 Ω, Coff 125 fF, Z0 50 Ω) and scikit-rf series elements.
    freq = skrf.Frequency.from_f(F_SW, unit="hz")
    media = DefinedGammaZ0(freq, z0=50.0)
    on, off = media.resistor(3.0), media.capacitor(125e-15)
    got_on = rf.series_switch_s21_db(F_SW, 3.0, 125e-15, "on")
    got_off = rf.series_switch_s21_db(F_SW, 3.0, 125e-15, "off")
    np.testing.assert_allclose(got_on, on.s_db[:, 1, 0], atol=1e-10)
    np.testing.assert_allclose(got_off, off.s_db[:, 1, 0], atol=1e-10)
    np.testing.assert_allclose(
        rf.series_switch_s11_db(F_SW, 3.0, 125e-15, "on"), on.s_db[:, 0, 0], atol=1e-10
    )
    np.testing.assert_allclose(
        rf.series_switch_s11_db(F_SW, 3.0, 125e-15, "off"), off.s_db[:, 0, 0], atol=1e-10
    )
    np.testing.assert_allclose(got_on, -0.2567, atol=5e-5)
    np.testing.assert_allclose(got_off, [-1.0574, -0.8435, -0.6457, -0.5893], atol=5e-5)
    np.testing.assert_allclose(
        rf.series_switch_s11_db(F_SW, 3.0, 125e-15, "off"),
        [-6.6534, -7.5319, -8.5961, -8.9660],
        atol=5e-5,
    )
    assert rf.switch_cutoff_hz(3.0, 125e-15) == pytest.approx(424.413e9, rel=1e-6)


def test_half_mm_phemt_series_switch_common_practice():
    # Common practice: a 0.5 mm pHEMT switch is ≈ 3 Ω on and ≈ 125 fF off (Ron·W 1.5 Ω·mm,
    # Coff/W 250 fF/mm); in series in 50 Ω it loses ≈ 0.25 dB on, and off isolates barely more.
    r_on = rf.switch_on_resistance(1.5, 0.5)
    c_off = rf.switch_off_capacitance(250e-15, 0.5)
    assert r_on == pytest.approx(3.0) and c_off == pytest.approx(125e-15)
    on = rf.series_switch_s21_db(33.4e9, r_on, c_off, "on")
    off = rf.series_switch_s21_db(33.4e9, r_on, c_off, "off")
    assert on == pytest.approx(-0.25, abs=0.02)
    assert on > off > -1.0
    assert rf.optimum_switch_width_mm(c_off, 250e-15) == pytest.approx(0.5)
    # f_c is independent of width (DESIGN.md §4).
    widths = np.array([0.1, 0.5, 2.0])
    fc = rf.switch_cutoff_hz(
        rf.switch_on_resistance(1.5, widths), rf.switch_off_capacitance(250e-15, widths)
    )
    np.testing.assert_allclose(fc, fc[0], rtol=1e-12)


def _one_port_y(ntwk):
    return 1.0 / ntwk.z[:, 0, 0]


def test_switched_element_q_against_scikit_rf_circuit():
    # Circuit check of the switched_element_q derivation with scikit-rf (reference library):
    # shunt C_fixed ∥ (series C_sw + switch, shorted). On: switch = Ron; off: switch = Coff.
    f, f_c, kappa, c_hi = 26e9, 424.413e9, 1.3, 400e-15
    freq = skrf.Frequency.from_f([f], unit="hz")
    media = DefinedGammaZ0(freq, z0=50.0)
    w = 2 * np.pi * f

    def q_of_split(c_frac):
        c_sw, c_fixed = c_frac * c_hi, (1 - c_frac) * c_hi
        c_off = c_sw * (c_frac * kappa / (kappa - 1) - 1)  # keeps nominal κ
        r_on = 1 / (2 * np.pi * f_c * c_off)
        branch_on = media.capacitor(c_sw) ** media.resistor(r_on) ** media.short()
        branch_off = media.capacitor(c_sw) ** media.capacitor(c_off) ** media.short()
        y_on = _one_port_y(branch_on)[0] + 1j * w * c_fixed
        y_off = _one_port_y(branch_off)[0] + 1j * w * c_fixed
        return y_on.imag / y_on.real, (y_on.imag / w) / (y_off.imag / w)

    q_best, kappa_eff = q_of_split(1.0)
    expected = rf.switched_element_q(f_c, f, kappa)
    assert q_best == pytest.approx(expected, rel=1e-9)
    assert kappa_eff == pytest.approx(kappa, rel=2 / expected**2)  # high-Q approximation
    for c_frac in (0.5, 0.8, 0.95):
        assert q_of_split(c_frac)[0] < q_best
    # At the optimum the off state is C_sw in series with Coff: C_lo = C_hi·Coff/(C_hi + Coff).
    c_off = rf.optimum_switch_c_off(c_hi, kappa)
    assert c_hi * c_off / (c_hi + c_off) == pytest.approx(c_hi / kappa, rel=1e-12)


def test_switched_kappa_moves_lc_resonance():
    # f0 = 1/(2π√(LC)) (Pozar §6.1): m elements each changed by κ move f0 by κ^(m/2).
    f_hi, f_lo, m = 33.0e9, 26.0e9, 2
    kappa = rf.switched_kappa(f_hi, f_lo, m)
    l_h, c_f = 0.2e-9, 1 / ((2 * np.pi * f_lo) ** 2 * 0.2e-9)
    f_new = 1 / (2 * np.pi * np.sqrt((l_h / kappa) * (c_f / kappa)))
    assert f_new == pytest.approx(f_hi, rel=1e-12)


# --- losses, Q, gain, dB ----------------------------------------------------------------------


def test_lossy_section_against_scikit_rf_line():
    # A matched λ/4 line with α = β/(2Q) (Pozar §6.3, from memory), via scikit-rf.
    f0, q = 30e9, 25.0
    freq = skrf.Frequency.from_f([f0], unit="hz")
    beta = 2 * np.pi * f0 / C0
    media = DefinedGammaZ0(freq, z0_port=50.0, z0=50.0, gamma=beta / (2 * q) + 1j * beta)
    # s_db would take log10 of the matched S11 = 0, so convert S21 alone.
    s21_db = 20 * np.log10(abs(media.line(C0 / (4 * f0), unit="m").s[0, 1, 0]))
    assert rf.lossy_section_loss_db(q) == pytest.approx(-s21_db, rel=1e-12)
    assert rf.lossy_section_loss_db(np.inf) == 0.0


def test_combine_q():
    # 1/Q = Σ 1/Q_i (Pozar §6.1, loaded/unloaded Q, from memory).
    assert rf.combine_q(25.0, 100.0) == pytest.approx(20.0)
    assert rf.combine_q(30.0, np.inf) == pytest.approx(30.0)
    assert rf.combine_q(np.inf, np.inf) == np.inf
    np.testing.assert_allclose(rf.combine_q(np.array([10.0, 40.0]), 40.0), [8.0, 20.0])


def test_mismatch_loss():
    # Common practice: VSWR 2:1 (|Γ| = 1/3) costs 0.51 dB; |Γ| = 0.05 costs 0.0109 dB.
    assert rf.mismatch_loss_db(1 / 3) == pytest.approx(0.5115, abs=1e-4)
    assert rf.mismatch_loss_db(0.05) == pytest.approx(0.010871, abs=1e-6)
    assert rf.mismatch_loss_db(0.0) == 0.0
    assert rf.mismatch_loss_db(0.3j) == pytest.approx(rf.mismatch_loss_db(0.3))


def test_passive_q_matches_skin_effect_scaling():
    # Q = ωL/R with R ∝ surface resistance Rs = √(πfμ0/σ) (Pozar §1.7, from memory): Q ∝ √f.
    sigma, f1, f2 = 5.8e7, 28e9, 39e9
    rs = np.sqrt(np.pi * np.array([f1, f2]) * constants.mu_0 / sigma)
    ratio = (f2 / f1) * rs[0] / rs[1]
    assert rf.passive_q(25.0, f1, f2) == pytest.approx(25.0 * ratio, rel=1e-12)
    assert rf.passive_q(25.0, f1, f2, exponent=0.0) == 25.0


def test_available_stage_gain():
    # Common practice: unilateral gain falls 6 dB/octave and reaches 0 dB at fmax.
    assert rf.available_stage_gain_db(150e9, 150e9, 0.0) == pytest.approx(0.0, abs=1e-12)
    g = rf.available_stage_gain_db(150e9, np.array([37.5e9, 75e9]), 2.0)
    np.testing.assert_allclose(g, [20 * np.log10(4) - 2, 20 * np.log10(2) - 2], rtol=1e-12)
    assert g[0] - g[1] == pytest.approx(6.0206, abs=1e-4)


def test_db_helpers():
    # Definitions of dB and dBm; 0.5 W = 26.9897 dBm (check-values §8a).
    assert rf.dbm_to_w(30.0) == pytest.approx(1.0)
    assert rf.w_to_dbm(0.5) == pytest.approx(26.9897, abs=1e-4)
    x = np.array([-30.0, 0.0, 3.0, 47.0])
    np.testing.assert_allclose(rf.lin_to_db(rf.db_to_lin(x)), x, atol=1e-12)
    np.testing.assert_allclose(rf.w_to_dbm(rf.dbm_to_w(x)), x, atol=1e-12)


def test_docstring_examples():
    # The numbers in the docstrings are themselves check values; keep them honest.
    result = doctest.testmod(rf, optionflags=doctest.NORMALIZE_WHITESPACE)
    assert result.attempted > 20 and result.failed == 0


# --- properties ------------------------------------------------------------------------------

ratios = st.floats(0.05, 20.0).filter(lambda r: abs(r - 1) > 1e-3)
bws = st.floats(0.0, 1.95)
methods = st.sampled_from(["exact", "pozar_ln"])


@settings(max_examples=100, deadline=None)
@given(ratios, st.integers(1, 6), bws, bws, methods)
def test_prop_chebyshev_monotone_in_bandwidth(r, n, b1, b2, method):
    lo, hi = sorted((b1, b2))
    g_lo = rf.chebyshev_max_reflection(r, n, lo, method=method)
    g_hi = rf.chebyshev_max_reflection(r, n, hi, method=method)
    assert g_lo <= g_hi * (1 + 1e-12) + 1e-300


@settings(max_examples=100, deadline=None)
@given(ratios, st.integers(1, 6), bws, methods)
def test_prop_chebyshev_more_sections_never_worse(r, n, b, method):
    g_n = rf.chebyshev_max_reflection(r, n, b, method=method)
    assert rf.chebyshev_max_reflection(r, n + 1, b, method=method) <= g_n * (1 + 1e-12) + 1e-300


@settings(max_examples=100, deadline=None)
@given(ratios, st.floats(0.01, 1.9), st.floats(0.01, 0.3), methods)
def test_prop_sections_needed_is_smallest(r, b, gm, method):
    n = rf.chebyshev_sections_needed(r, b, gm, method)
    assert rf.chebyshev_max_reflection(r, n, b, method=method) <= gm * (1 + 1e-8)
    if n > 1:
        assert rf.chebyshev_max_reflection(r, n - 1, b, method=method) > gm


@settings(max_examples=100, deadline=None)
@given(ratios, st.integers(1, 5), st.floats(0.01, 0.5))
def test_prop_bandwidth_inverts_max_reflection(r, n, gm):
    b = rf.chebyshev_bandwidth(r, n, gm)
    if b < 2.0:
        assert rf.chebyshev_max_reflection(r, n, b) == pytest.approx(gm, rel=1e-7)


@settings(max_examples=100, deadline=None)
@given(st.floats(0.0, 0.999), st.floats(0.0, 0.999))
def test_prop_mismatch_loss(g1, g2):
    lo, hi = sorted((g1, g2))
    assert 0.0 <= rf.mismatch_loss_db(lo) <= rf.mismatch_loss_db(hi)


@settings(max_examples=100, deadline=None)
@given(st.floats(1e11, 2e12), st.floats(1e9, 1e11), st.floats(1.01, 5.0), st.floats(1.01, 5.0))
def test_prop_switched_q_monotone(f_c, f, k1, k2):
    lo, hi = sorted((k1, k2))
    assert rf.switched_element_q(f_c, f, hi) <= rf.switched_element_q(f_c, f, lo)
    assert rf.switched_element_q(f_c, f, lo) < rf.switched_element_q(2 * f_c, f, lo)


@settings(max_examples=100, deadline=None)
@given(st.lists(st.floats(0.1, 1e4), min_size=1, max_size=5))
def test_prop_combine_q_below_min(qs):
    assert rf.combine_q(*qs) <= min(qs) * (1 + 1e-12)


# --- bad input -------------------------------------------------------------------------------

BAD_CALLS = [
    (lambda: rf.load_line(1.0, 1.0, 0.5), "vdd_v"),
    (lambda: rf.load_line(5.0, -0.1, 0.5), "v_knee_v"),
    (lambda: rf.load_line(5.0, 1.0, 0.0), "i_max_a"),
    (lambda: rf.load_line(5.0, np.nan, 0.5), "v_knee_v"),
    (lambda: rf.chebyshev_max_reflection(0.0, 2, 0.3), "ratio"),
    (lambda: rf.chebyshev_max_reflection(5.0, 2.5, 0.3), "n_sections"),
    (lambda: rf.chebyshev_max_reflection(5.0, 0, 0.3), "n_sections"),
    (lambda: rf.chebyshev_max_reflection(5.0, 2, 2.0), "fractional_bw"),
    (lambda: rf.chebyshev_max_reflection(5.0, 2, -0.1), "fractional_bw"),
    (lambda: rf.chebyshev_max_reflection(5.0, 2, 0.3, method="pozar"), "method"),
    (lambda: rf.chebyshev_reflection(-1.0, 30e9, 5.0, 2, 0.3), "f_hz"),
    (lambda: rf.chebyshev_reflection(30e9, 0.0, 5.0, 2, 0.3), "f0_hz"),
    (lambda: rf.chebyshev_sec_theta_m(5.0, 2, 1.0), "gamma_max"),
    (lambda: rf.chebyshev_sections_needed(5.0, 0.3, 0.0), "gamma_max"),
    (lambda: rf.chebyshev_sections_needed(5.0, "wide", 0.05), "fractional_bw"),
    (lambda: rf.bode_fano_min_reflection(16.0, 1e-12, 30e9, 30e9), "f_high_hz"),
    (lambda: rf.bode_fano_min_reflection(-16.0, 1e-12, 24e9, 30e9), "r_ohm"),
    (lambda: rf.bode_fano_max_bandwidth_hz(16.0, 0.0, 0.1), "c_farad"),
    (lambda: rf.switch_on_resistance(1.5, 0.0), "width_mm"),
    (lambda: rf.switch_off_capacitance(-1e-13, 0.5), "coff_per_w_f_per_mm"),
    (lambda: rf.switch_cutoff_hz(np.inf, 1e-13), "r_on_ohm"),
    (lambda: rf.switched_element_q(4e11, 26e9, 1.0), "kappa"),
    (lambda: rf.switched_kappa(26e9, 33e9, 2), "f0_high_hz"),
    (lambda: rf.switched_kappa(33e9, 26e9, 1.5), "m_elements"),
    (lambda: rf.optimum_switch_c_off(1e-13, 0.9), "kappa"),
    (lambda: rf.optimum_switch_width_mm(0.0, 2.5e-13), "c_off_f"),
    (lambda: rf.series_switch_s21_db(0.0, 3.0, 1e-13, "off"), "f_hz"),
    (lambda: rf.series_switch_s21_db(30e9, 3.0, 1e-13, "open"), "state"),
    (lambda: rf.series_switch_s11_db(30e9, 0.0, 1e-13, "on"), "r_on_ohm"),
    (lambda: rf.lossy_section_loss_db(0.0), "q_eff"),
    (lambda: rf.combine_q(), "qs"),
    (lambda: rf.combine_q(20.0, -5.0), "qs[1]"),
    (lambda: rf.mismatch_loss_db(1.0), "gamma_mag"),
    (lambda: rf.mismatch_loss_db(-0.1), "gamma_mag"),
    (lambda: rf.mismatch_loss_db(0.6 + 0.8j), "gamma_mag"),
    (lambda: rf.mismatch_loss_db("x"), "gamma_mag"),
    (lambda: rf.db_to_lin(np.array([1 + 1j])), "x_db"),
    (lambda: rf.passive_q(25.0, 0.0, 30e9), "f_ref_hz"),
    (lambda: rf.available_stage_gain_db(150e9, -1.0, 3.0), "f_hz"),
    (lambda: rf.lin_to_db(0.0), "x"),
    (lambda: rf.w_to_dbm(-1.0), "p_w"),
]


@pytest.mark.parametrize(("call", "name"), BAD_CALLS)
def test_bad_input_names_the_argument(call, name):
    with pytest.raises(ValueError, match="^" + re.escape(name) + ": "):
        call()
