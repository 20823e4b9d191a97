"""Closed-form RF building blocks for the PA architecture estimator (DESIGN.md §4).

Load line, Chebyshev stepped transformer, Bode–Fano limit, FET switch and switched-element Q,
lossy-section and mismatch loss, Q scaling, stage gain and dB helpers. Pure numpy: every
function broadcasts its array arguments and returns a ``float`` for scalar inputs, otherwise an
``ndarray`` of the broadcast shape (e.g. ``(n_freq,)`` or ``(n_samples, n_freq)``). Units are
SI unless the name carries one. Every function raises ``ValueError`` naming the argument and
the problem ("f_hz: must be positive") for NaN, infinite or out-of-range input.
"""

from __future__ import annotations

from typing import Literal, get_args

import numpy as np
from numpy.typing import ArrayLike, NDArray

ChebyshevMethod = Literal["exact", "pozar_ln"]
SwitchState = Literal["on", "off"]
Out = float | NDArray[np.float64]

#: dB per neper, 20/ln(10) ≈ 8.686.
DB_PER_NEPER = 20.0 / np.log(10.0)


# --- validation helpers ------------------------------------------------------------------------


def _real(name: str, x: ArrayLike, *, allow_inf: bool = False) -> NDArray[np.float64]:
    if np.iscomplexobj(x):  # a float cast would silently drop the imaginary part
        raise ValueError(f"{name}: must be real, not complex")
    try:
        a = np.asarray(x, dtype=np.float64)
    except (TypeError, ValueError) as exc:
        raise ValueError(f"{name}: must be a real number or array of real numbers") from exc
    if np.isnan(a).any():
        raise ValueError(f"{name}: must not be NaN")
    if not allow_inf and np.isinf(a).any():
        raise ValueError(f"{name}: must be finite")
    return a


def _require(name: str, ok: NDArray[np.bool_], problem: str) -> None:
    if not np.all(ok):
        raise ValueError(f"{name}: {problem}")


def _positive(name: str, x: ArrayLike, *, allow_inf: bool = False) -> NDArray[np.float64]:
    a = _real(name, x, allow_inf=allow_inf)
    _require(name, a > 0, "must be positive")
    return a


def _above_one(name: str, x: ArrayLike) -> NDArray[np.float64]:
    a = _real(name, x)
    _require(name, a > 1, "must be greater than 1")
    return a


def _open_unit(name: str, x: ArrayLike) -> NDArray[np.float64]:
    a = _real(name, x)
    _require(name, (a > 0) & (a < 1), "must be between 0 and 1 (exclusive)")
    return a


def _order(name: str, x: ArrayLike) -> NDArray[np.float64]:
    a = _real(name, x)
    _require(name, (a >= 1) & (a == np.round(a)), "must be an integer >= 1")
    return a


def _fractional_bw(x: ArrayLike) -> NDArray[np.float64]:
    a = _real("fractional_bw", x)
    _require("fractional_bw", (a >= 0) & (a < 2), "must be in [0, 2) (B = 2 reaches DC)")
    return a


def _choice(name: str, value: str, literal: object) -> None:
    if value not in get_args(literal):
        raise ValueError(f"{name}: must be one of {get_args(literal)}, got {value!r}")


def _out(a: NDArray[np.float64]) -> Out:
    return float(a) if np.ndim(a) == 0 else a


# --- dB helpers --------------------------------------------------------------------------------


def db_to_lin(x_db: ArrayLike) -> Out:
    """Power ratio from dB to linear, 10**(x/10); any shape.

    Examples
    --------
    >>> db_to_lin(3.0)
    1.9952623149688795
    """
    return _out(10.0 ** (_real("x_db", x_db) / 10.0))


def lin_to_db(x: ArrayLike) -> Out:
    """Power ratio from linear (> 0) to dB, 10·log10(x); any shape.

    Examples
    --------
    >>> lin_to_db(100.0)
    20.0
    """
    return _out(10.0 * np.log10(_positive("x", x)))


def dbm_to_w(p_dbm: ArrayLike) -> Out:
    """Power from dBm to W; any shape.

    Examples
    --------
    >>> dbm_to_w(30.0)
    1.0
    """
    return _out(10.0 ** ((_real("p_dbm", p_dbm) - 30.0) / 10.0))


def w_to_dbm(p_w: ArrayLike) -> Out:
    """Power from W (> 0) to dBm; any shape.

    Examples
    --------
    >>> w_to_dbm(0.5)
    26.989700043360187
    """
    return _out(10.0 * np.log10(_positive("p_w", p_w)) + 30.0)


# --- load line ---------------------------------------------------------------------------------


def load_line(vdd_v: ArrayLike, v_knee_v: ArrayLike, i_max_a: ArrayLike) -> tuple[Out, Out]:
    """Cripps load line: optimum load resistance and maximum linear output power.

    R_opt = (Vdd − Vk)/(Imax/2) and P_max = (Vdd − Vk)·Imax/4 (class A or ideal class B:
    fundamental swing Vdd − Vk, fundamental current Imax/2).

    Parameters
    ----------
    vdd_v, v_knee_v, i_max_a : array_like
        Supply (V), knee voltage (V, >= 0), peak current (A); broadcast. Per-mm current (A/mm)
        gives R_opt·W (Ω·mm) and P_max per mm (W/mm).

    Returns
    -------
    r_opt_ohm, p_max_w : float or ndarray
        Optimum load (Ω) and maximum output power (W), broadcast shape.

    Raises
    ------
    ValueError
        If ``vdd_v <= v_knee_v``, ``v_knee_v < 0`` or ``i_max_a <= 0``.

    References
    ----------
    S. C. Cripps, RF Power Amplifiers for Wireless Communications, 2nd ed., 2006, ch. 2.

    Examples
    --------
    >>> load_line(5.0, 1.0, 0.5)
    (16.0, 0.5)
    """
    vdd, vk = _real("vdd_v", vdd_v), _real("v_knee_v", v_knee_v)
    imax = _positive("i_max_a", i_max_a)
    _require("v_knee_v", vk >= 0, "must be >= 0")
    _require("vdd_v", vdd > vk, "must be greater than v_knee_v")
    return _out(2.0 * (vdd - vk) / imax), _out((vdd - vk) * imax / 4.0)


# --- Chebyshev stepped transformer -------------------------------------------------------------


def _cheb_homog(c: ArrayLike, y: ArrayLike, n: ArrayLike) -> NDArray[np.float64]:
    """y**n · T_n(c/y) for y >= 0: a homogeneous polynomial, so no overflow as y → 0."""
    c, y, n = np.broadcast_arrays(np.asarray(c, float), y, n)
    root = np.sqrt(np.maximum(c * c - y * y, 0.0))
    outer = 0.5 * ((c + root) ** n + (c - root) ** n)
    ratio = np.divide(c, y, out=np.zeros(c.shape), where=np.abs(c) < y)
    inner = y**n * np.cos(n * np.arccos(np.clip(ratio, -1.0, 1.0)))
    return np.where(np.abs(c) >= y, outer, inner)


def _cheb_scale(r: NDArray[np.float64], method: str) -> NDArray[np.float64]:
    # exact: k·T_N(sec θm) = |R−1|/(2√R) from P_LR at θ = 0; pozar_ln: Γ(0) ≈ ½|ln R|.
    if method == "exact":
        return np.abs(r - 1.0) / (2.0 * np.sqrt(r))
    return 0.5 * np.abs(np.log(r))


def _cheb_response(r, n, fractional_bw, cos_theta, method: str) -> Out:
    """|Γ| at cos θ (``None``: at the band edge cos θ = cos θm)."""
    _choice("method", method, ChebyshevMethod)
    r, n = _positive("ratio", r), _order("n_sections", n)
    y = np.sin(np.pi * _fractional_bw(fractional_bw) / 4.0)  # cos θm, accurate as B → 0
    c = y if cos_theta is None else cos_theta
    v = _cheb_scale(r, method) * np.abs(_cheb_homog(c, y, n)) / _cheb_homog(1.0, y, n)
    return _out(v / np.sqrt(1.0 + v * v) if method == "exact" else v)


def _cheb_target(ratio, n_sections, gamma_max, method: str):
    """(N, K) with T_N(sec θm) = K for a required ripple Γm."""
    _choice("method", method, ChebyshevMethod)
    r, g = _positive("ratio", ratio), _open_unit("gamma_max", gamma_max)
    n = None if n_sections is None else _order("n_sections", n_sections)
    k = _cheb_scale(r, method) / g
    return n, (k * np.sqrt(1.0 - g * g) if method == "exact" else k)


def chebyshev_max_reflection(
    ratio: ArrayLike,
    n_sections: ArrayLike,
    fractional_bw: ArrayLike,
    *,
    method: ChebyshevMethod = "exact",
) -> Out:
    """Equal-ripple maximum |Γ| of an N-section Chebyshev quarter-wave transformer.

    θm = (π/2)(1 − B/2) is the section electrical length at the lower band edge.

    - ``"exact"`` (default): the insertion-loss function P_LR = 1 + k²T_N²(cos θ/cos θm) of the
      exactly realisable equiripple stepped transformer, k·T_N(sec θm) = |R − 1|/(2√R) so that
      P_LR equals the bare step's at θ = 0; hence Γm = k/√(1 + k²), i.e.
      T_N(sec θm) = (|R − 1|/(2√R))·√(1 − Γm²)/Γm. Default because it is what a synthesised
      design achieves: it never exceeds the DC reflection |R − 1|/(R + 1), whereas the
      small-reflection form overstates the bandwidth by 0.8–2.5 points at R = 5.
    - ``"pozar_ln"``: small-reflection form Γm = |ln R|/(2·T_N(sec θm)). For large R with B near
      2 it exceeds the physical bound (even 1); for comparison with the textbook only.

    Parameters
    ----------
    ratio : array_like
        Impedance ratio R = Z_L/Z_0 (> 0, either side of 1; R and 1/R give the same result).
    n_sections : array_like
        Number of quarter-wave sections N (integer >= 1).
    fractional_bw : array_like
        B = Δf/f0 in [0, 2). B → 0 gives Γm → 0: a single frequency is matched by any N.
    method : {"exact", "pozar_ln"}

    Returns
    -------
    float or ndarray
        Maximum in-band |Γ|, broadcast shape.

    References
    ----------
    D. M. Pozar, Microwave Engineering, 4th ed., §5.7 (section from memory). Exact form:
    S. B. Cohn, IRE Trans. MTT-3, 1955; H. J. Riblet, IRE Trans. MTT-5, 1957; Matthaei, Young
    & Jones, Microwave Filters, ch. 6 (from memory).

    Examples
    --------
    >>> round(chebyshev_max_reflection(5.0, 2, 0.42225), 5)
    0.05
    """
    return _cheb_response(ratio, n_sections, fractional_bw, None, method)


def chebyshev_reflection(
    f_hz: ArrayLike,
    f0_hz: ArrayLike,
    ratio: ArrayLike,
    n_sections: ArrayLike,
    fractional_bw: ArrayLike,
    *,
    method: ChebyshevMethod = "exact",
) -> Out:
    """|Γ(f)| of the equal-ripple Chebyshev transformer designed for bandwidth B around f0.

    θ = (π/2)·f/f0. ``"exact"``: |Γ|² = 1 − 1/P_LR. In band it ripples between 0 and Γm;
    outside it rises with the Chebyshev polynomial up to the bare step's |R − 1|/(R + 1) at
    θ = 0 and θ = π (period 2·f0 in f) and never beyond. ``"pozar_ln"``:
    |Γ| = Γm·|T_N(cos θ/cos θm)|, giving ½|ln R| at DC. At B = 0 both become the maximally flat
    (binomial) response, e.g. exact |Γ| = a|cos θ|^N/√(1 + a²cos^{2N}θ), a = |R − 1|/(2√R).

    Parameters
    ----------
    f_hz : array_like
        Frequency (Hz, >= 0), e.g. shape (n_freq,).
    f0_hz : array_like
        Design centre frequency (Hz, > 0).
    ratio, n_sections, fractional_bw, method
        As in :func:`chebyshev_max_reflection`.

    Returns
    -------
    float or ndarray
        |Γ|, broadcast shape of all inputs (that of ``f_hz`` for scalar design values).

    References
    ----------
    Pozar, Microwave Engineering, 4th ed., §5.7 and §8.3 (insertion-loss method; from memory).

    Examples
    --------
    >>> g = chebyshev_reflection([0.0, 30e9], 30e9, 5.0, 2, 0.42225)
    >>> [round(float(v), 4) for v in g]
    [0.6667, 0.05]
    """
    f = _real("f_hz", f_hz)
    _require("f_hz", f >= 0, "must be >= 0")
    cos_theta = np.cos(0.5 * np.pi * f / _positive("f0_hz", f0_hz))
    return _cheb_response(ratio, n_sections, fractional_bw, cos_theta, method)


def chebyshev_sec_theta_m(
    ratio: ArrayLike,
    n_sections: ArrayLike,
    gamma_max: ArrayLike,
    *,
    method: ChebyshevMethod = "exact",
) -> Out:
    """sec θm of the band edge for a required ripple Γm: sec θm = cosh(acosh(K)/N).

    K = (|R − 1|/(2√R))·√(1 − Γm²)/Γm (``"exact"``) or |ln R|/(2Γm) (``"pozar_ln"``). When
    K <= 1 (Γm at or above the unmatched reflection, or R = 1) every frequency meets Γm and 1.0
    is returned (θm = 0, the band reaches DC). ``gamma_max`` is the allowed in-band |Γ|,
    0 < Γm < 1; other inputs as :func:`chebyshev_max_reflection`. Returns sec θm >= 1 in the
    broadcast shape.

    References
    ----------
    Pozar, Microwave Engineering, 4th ed., §5.7, Example 5.7 (numbers from memory).

    Examples
    --------
    >>> import numpy as np
    >>> s = chebyshev_sec_theta_m(2.0, 3, 0.05, method="pozar_ln")
    >>> round(float(np.degrees(np.arccos(1 / s))), 2)
    44.73
    """
    n, k = _cheb_target(ratio, n_sections, gamma_max, method)
    return _out(np.cosh(np.arccosh(np.maximum(k, 1.0)) / n))


def chebyshev_bandwidth(
    ratio: ArrayLike,
    n_sections: ArrayLike,
    gamma_max: ArrayLike,
    *,
    method: ChebyshevMethod = "exact",
) -> Out:
    """Fractional bandwidth B = 2 − 4θm/π over which |Γ| <= Γm (2.0 if no match is needed).

    Inputs as :func:`chebyshev_sec_theta_m`; θm = atan(sinh(acosh(K)/N)), equal to
    acos(1/sec θm) but accurate near θm = 0. Reference: Pozar §5.7 (from memory).

    Examples
    --------
    >>> round(chebyshev_bandwidth(5.0, 2, 0.05), 5)
    0.42225
    """
    n, k = _cheb_target(ratio, n_sections, gamma_max, method)
    return _out(2.0 - 4.0 / np.pi * np.arctan(np.sinh(np.arccosh(np.maximum(k, 1.0)) / n)))


def chebyshev_sections_needed(
    ratio: ArrayLike,
    fractional_bw: ArrayLike,
    gamma_max: ArrayLike,
    method: ChebyshevMethod = "exact",
) -> int | NDArray[np.int64]:
    """Smallest N >= 1 whose equal-ripple |Γ| over bandwidth B stays within Γm.

    N >= acosh(K)/acosh(sec θt), θt = (π/2)(1 − B/2), K as in :func:`chebyshev_sec_theta_m`;
    acosh(sec θt) = asinh(cot(πB/4)) stays accurate near B = 2. B = 0 needs one section.
    Returns an int (or int array of the broadcast shape). Reference: Pozar §5.7 (from memory).

    Examples
    --------
    >>> chebyshev_sections_needed(5.0, 0.30, 0.05)
    2
    """
    t = np.tan(np.pi * _fractional_bw(fractional_bw) / 4.0)
    t, k = np.broadcast_arrays(t, _cheb_target(ratio, None, gamma_max, method)[1])
    width = np.arcsinh(np.divide(1.0, t, out=np.full(t.shape, np.inf), where=t > 0))
    # 1e-9 absorbs rounding when Γm was itself computed for an integer N.
    n = np.maximum(1, np.ceil(np.arccosh(np.maximum(k, 1.0)) / width - 1e-9)).astype(np.int64)
    return int(n) if n.ndim == 0 else n


# --- Bode–Fano ---------------------------------------------------------------------------------


def bode_fano_min_reflection(
    r_ohm: ArrayLike, c_farad: ArrayLike, f_low_hz: ArrayLike, f_high_hz: ArrayLike
) -> Out:
    """Bode–Fano lower bound on the in-band |Γ| when matching a parallel RC load.

    From ∫₀^∞ ln(1/|Γ(ω)|) dω <= π/(RC) with the brick-wall response (|Γ| = Γm in Δω, 1
    elsewhere): Γm,min = exp(−π/(Δω·R·C)), Δω = 2π(f_high − f_low).

    Parameters
    ----------
    r_ohm, c_farad : array_like
        Load resistance (Ω) and parallel capacitance (F), > 0.
    f_low_hz, f_high_hz : array_like
        Band edges (Hz), 0 <= f_low < f_high. All inputs broadcast.

    Returns
    -------
    float or ndarray
        Minimum achievable in-band |Γ|, broadcast shape.

    References
    ----------
    Pozar, Microwave Engineering, 4th ed., §5.9; R. M. Fano, J. Franklin Inst. 249, 1950.

    Examples
    --------
    >>> float(f"{bode_fano_min_reflection(16.0, 1e-12, 24.25e9, 33.4e9):.4e}")
    0.032867
    """
    rc = _positive("r_ohm", r_ohm) * _positive("c_farad", c_farad)
    fl, fh = _real("f_low_hz", f_low_hz), _real("f_high_hz", f_high_hz)
    _require("f_low_hz", fl >= 0, "must be >= 0")
    _require("f_high_hz", fh > fl, "must be greater than f_low_hz")
    return _out(np.exp(-np.pi / (2.0 * np.pi * (fh - fl) * rc)))


def bode_fano_max_bandwidth_hz(r_ohm: ArrayLike, c_farad: ArrayLike, gamma_max: ArrayLike) -> Out:
    """Widest band Δf (Hz) over which a parallel RC load can reach |Γ| <= Γm (0 < Γm < 1).

    Δf = 1/(2·R·C·ln(1/Γm)), the inverse of :func:`bode_fano_min_reflection` (Pozar §5.9).

    Examples
    --------
    >>> round(bode_fano_max_bandwidth_hz(16.0, 1e-12, 0.1) / 1e9, 3)
    13.572
    """
    rc = _positive("r_ohm", r_ohm) * _positive("c_farad", c_farad)
    return _out(1.0 / (2.0 * rc * np.log(1.0 / _open_unit("gamma_max", gamma_max))))


# --- FET switch and switched elements ----------------------------------------------------------


def switch_on_resistance(ron_w_ohm_mm: ArrayLike, width_mm: ArrayLike) -> Out:
    """FET switch on resistance (Ω), Ron = (Ron·W)/W; Ron·W in Ω·mm, width in mm, both > 0.

    Examples
    --------
    >>> switch_on_resistance(1.5, 0.5)
    3.0
    """
    return _out(_positive("ron_w_ohm_mm", ron_w_ohm_mm) / _positive("width_mm", width_mm))


def switch_off_capacitance(coff_per_w_f_per_mm: ArrayLike, width_mm: ArrayLike) -> Out:
    """FET switch off capacitance (F), Coff = (Coff/W)·W; Coff/W in F/mm (250 fF/mm = 250e-15).

    Examples
    --------
    >>> round(switch_off_capacitance(250e-15, 0.5) * 1e15, 9)
    125.0
    """
    c_w = _positive("coff_per_w_f_per_mm", coff_per_w_f_per_mm)
    return _out(c_w * _positive("width_mm", width_mm))


def switch_cutoff_hz(r_on_ohm: ArrayLike, c_off_f: ArrayLike) -> Out:
    """Switch figure of merit f_c = 1/(2π·Ron·Coff) (Hz), independent of width.

    Examples
    --------
    >>> round(switch_cutoff_hz(3.0, 125e-15) / 1e9, 3)
    424.413
    """
    rc = _positive("r_on_ohm", r_on_ohm) * _positive("c_off_f", c_off_f)
    return _out(1.0 / (2.0 * np.pi * rc))


def switched_kappa(f0_high_hz: ArrayLike, f0_low_hz: ArrayLike, m_elements: ArrayLike) -> Out:
    """Reactance ratio κ = (f0_high/f0_low)^(2/m) each of m switched elements must provide.

    f0 = 1/(2π√(LC)) moves by f0_high/f0_low when LC changes by its square; m elements
    sharing the retuning equally each change by the m-th root. Needs f0_high > f0_low > 0 and
    integer m >= 1.

    Examples
    --------
    >>> round(switched_kappa(33e9, 26e9, 2), 6)
    1.269231
    """
    fh, fl = _positive("f0_high_hz", f0_high_hz), _positive("f0_low_hz", f0_low_hz)
    _require("f0_high_hz", fh > fl, "must be greater than f0_low_hz")
    return _out((fh / fl) ** (2.0 / _order("m_elements", m_elements)))


def switched_element_q(f_c_hz: ArrayLike, f_hz: ArrayLike, kappa: ArrayLike) -> Out:
    """Best-case Q of a capacitance switched by a ratio κ with a switch of cutoff f_c.

    Q_sw = (f_c/f)/(κ − 1), reached with all of the capacitance in the switched branch.

    Derivation: C_fixed ∥ (C_sw in series with the switch). On, the switch is Ron: the
    capacitance is C_hi = C_fixed + C_sw and the branch conductance ω²RonC_sw² gives
    Q = C_hi/(ωRonC_sw²). Off, the switch is a lossless Coff: C_lo = C_fixed +
    C_swCoff/(C_sw + Coff). With c = C_sw/C_hi, d = Coff/C_hi and κ = C_hi/C_lo, the swing
    C_hi − C_lo = C_sw²/(C_sw + Coff) gives c²/(c + d) = (κ − 1)/κ, and with Ron = 1/(2πf_cCoff)
    Q = (f_c/f)·d/c² = (f_c/f)·(κ/(κ − 1) − 1/c). This rises with c, so the optimum is c = 1
    (C_fixed = 0): Q = (f_c/f)/(κ − 1), with Coff = C_hi/(κ − 1). The on (high-C, low-f0) state
    is the lossy one and f is its operating frequency.

    ``f_c_hz`` and ``f_hz`` (Hz) > 0, ``kappa`` = C_hi/C_lo > 1; all broadcast.

    Examples
    --------
    >>> round(switched_element_q(420e9, 26e9, 1.25), 3)
    64.615
    """
    fc, f = _positive("f_c_hz", f_c_hz), _positive("f_hz", f_hz)
    return _out((fc / f) / (_above_one("kappa", kappa) - 1.0))


def optimum_switch_c_off(c_high_f: ArrayLike, kappa: ArrayLike) -> Out:
    """Switch off capacitance (F) at the optimum of :func:`switched_element_q`.

    Coff = C_hi/(κ − 1) = C_hi·C_lo/(C_hi − C_lo), with C_fixed = 0 and C_hi (F) > 0, κ > 1.

    Examples
    --------
    >>> round(optimum_switch_c_off(500e-15, 1.25) * 1e15, 9)
    2000.0
    """
    return _out(_positive("c_high_f", c_high_f) / (_above_one("kappa", kappa) - 1.0))


def optimum_switch_width_mm(c_off_f: ArrayLike, coff_per_w_f_per_mm: ArrayLike) -> Out:
    """Switch width (mm) presenting the required off capacitance: W = Coff/(Coff/W).

    ``c_off_f`` (F) is the off capacitance the switch must present, at the optimum
    :func:`optimum_switch_c_off`; Coff/W in F/mm. As f_c does not depend on W, Ron then follows
    as (Ron·W)/W.

    Examples
    --------
    >>> round(optimum_switch_width_mm(125e-15, 250e-15), 12)
    0.5
    """
    c_w = _positive("coff_per_w_f_per_mm", coff_per_w_f_per_mm)
    return _out(_positive("c_off_f", c_off_f) / c_w)


def _series_switch_s(f_hz, r_on_ohm, c_off_f, state: str, z0_ohm, port: int) -> Out:
    _choice("state", state, SwitchState)
    f, z0 = _positive("f_hz", f_hz), _positive("z0_ohm", z0_ohm)
    if state == "on":
        z = _positive("r_on_ohm", r_on_ohm) + 0j * f
    else:
        z = 1.0 / (2j * np.pi * f * _positive("c_off_f", c_off_f))
    s = (2.0 * z0 if port == 21 else z) / (2.0 * z0 + z)
    return _out(20.0 * np.log10(np.abs(s)))


def series_switch_s21_db(
    f_hz: ArrayLike,
    r_on_ohm: ArrayLike,
    c_off_f: ArrayLike,
    state: SwitchState,
    z0_ohm: ArrayLike = 50.0,
) -> Out:
    """|S21| (dB) of a series FET switch between two Z0 ports: S21 = 2Z0/(2Z0 + Z).

    Z = Ron when ``state="on"``, 1/(jωCoff) when ``"off"``.

    Parameters
    ----------
    f_hz : array_like
        Frequency (Hz, > 0), e.g. shape (n_freq,).
    r_on_ohm, c_off_f : array_like
        On resistance (Ω) and off capacitance (F); only the one for ``state`` is used.
    state : {"on", "off"}
    z0_ohm : array_like
        Port reference impedance (Ω); 50 is the usual system impedance.

    Returns
    -------
    float or ndarray
        20·log10|S21| (<= 0), broadcast shape.

    References
    ----------
    Pozar, Microwave Engineering, 4th ed., §4.4, Table 4.2 (series impedance; from memory).

    Examples
    --------
    >>> round(series_switch_s21_db(33.4e9, 3.0, 125e-15, "off"), 4)
    -0.5893
    """
    return _series_switch_s(f_hz, r_on_ohm, c_off_f, state, z0_ohm, 21)


def series_switch_s11_db(
    f_hz: ArrayLike,
    r_on_ohm: ArrayLike,
    c_off_f: ArrayLike,
    state: SwitchState,
    z0_ohm: ArrayLike = 50.0,
) -> Out:
    """|S11| (dB) of a series FET switch between two Z0 ports: S11 = Z/(2Z0 + Z).

    Parameters and shapes as :func:`series_switch_s21_db`.

    Examples
    --------
    >>> round(series_switch_s11_db(24.25e9, 3.0, 125e-15, "on"), 2)
    -30.71
    """
    return _series_switch_s(f_hz, r_on_ohm, c_off_f, state, z0_ohm, 11)


# --- losses and Q ------------------------------------------------------------------------------


def lossy_section_loss_db(q_eff: ArrayLike) -> Out:
    """Dissipative loss (dB) of a quarter-wave section of quality Q_eff: 8.686·π/(4·Q_eff).

    A line's Q is β/(2α), so α = β/(2Q); at l = λ/4, βl = π/2 and αl = π/(4Q) Np, × 20/ln 10
    for dB. Q_eff > 0; inf (lossless) gives 0. Reference: Pozar, Microwave Engineering, 4th
    ed., §6.3, Q = β/2α of a line resonator (from memory).

    Examples
    --------
    >>> round(lossy_section_loss_db(25.0), 4)
    0.2729
    """
    return _out(DB_PER_NEPER * np.pi / (4.0 * _positive("q_eff", q_eff, allow_inf=True)))


def combine_q(*qs: ArrayLike) -> Out:
    """Combined Q of independent loss mechanisms, 1/Q = Σ 1/Q_i (each > 0, inf = lossless).

    Examples
    --------
    >>> combine_q(25.0, 100.0)
    20.0
    """
    if not qs:
        raise ValueError("qs: need at least one Q value")
    inv = sum(1.0 / _positive(f"qs[{i}]", q, allow_inf=True) for i, q in enumerate(qs))
    with np.errstate(divide="ignore"):  # all lossless → Q = inf, intended
        return _out(np.asarray(1.0 / np.asarray(inv)))


def mismatch_loss_db(gamma_mag: ArrayLike) -> Out:
    """Mismatch loss (dB), −10·log10(1 − |Γ|²): power not delivered because of reflection.

    ``gamma_mag`` is |Γ| in [0, 1), any shape (a complex Γ is accepted; its magnitude is used);
    |Γ| >= 1 raises ValueError. Reference: Pozar, Microwave Engineering, 4th ed., §2.3 (from
    memory).

    Examples
    --------
    >>> round(mismatch_loss_db(0.05), 6)
    0.010871
    """
    g = np.asarray(gamma_mag)
    g = _real("gamma_mag", np.abs(g) if np.iscomplexobj(g) else g)
    _require("gamma_mag", g >= 0, "must be >= 0 (a magnitude)")
    _require("gamma_mag", g < 1, "|gamma| must be less than 1")
    return _out(-10.0 * np.log10(1.0 - g * g))


def passive_q(
    q_ref: ArrayLike, f_ref_hz: ArrayLike, f_hz: ArrayLike, exponent: ArrayLike = 0.5
) -> Out:
    """Unloaded Q scaled from a reference frequency: Q = q_ref·(f/f_ref)^exponent.

    With conductor loss dominant and fixed geometry the skin-effect resistance grows as √f while
    the reactance grows as f, so Q ∝ √f: default exponent 0.5 (representative, from memory).
    Dielectric-loss-dominated elements have Q nearly constant (exponent 0). q_ref > 0 at
    f_ref_hz; frequencies (Hz) > 0; all broadcast.

    Examples
    --------
    >>> passive_q(25.0, 30e9, 120e9)
    50.0
    """
    ratio = _positive("f_hz", f_hz) / _positive("f_ref_hz", f_ref_hz)
    return _out(_positive("q_ref", q_ref) * ratio ** _real("exponent", exponent))


def available_stage_gain_db(fmax_hz: ArrayLike, f_hz: ArrayLike, derating_db: ArrayLike) -> Out:
    """Per-stage available gain (dB): 20·log10(fmax/f) − derating.

    Rule of thumb (common practice, from memory): a transistor's unilateral gain falls about
    6 dB per octave and reaches 0 dB at fmax; the derating covers stability margin, matching
    loss and layout parasitics. fmax_hz, f_hz > 0 (Hz); derating_db (dB); all broadcast.

    Examples
    --------
    >>> round(available_stage_gain_db(130e9, 26e9, 5.0), 3)
    8.979
    """
    ratio = _positive("fmax_hz", fmax_hz) / _positive("f_hz", f_hz)
    return _out(20.0 * np.log10(ratio) - _real("derating_db", derating_db))
