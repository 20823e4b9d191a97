"""ITU-R propagation models for terrestrial mm-wave link budgets (pure numpy).

Free-space loss (ITU-R P.525-4), gaseous absorption (ITU-R P.676-11 Annex 2), rain specific
attenuation (ITU-R P.838-3) and the rain path reduction factor (ITU-R P.530-17 §2.4.1).

Every function is vectorised: array arguments broadcast against each other with numpy rules, and
the result has the broadcast shape (a numpy float for all-scalar input). Frequencies are in Hz
(SI); quantities that the Recommendations state in other units carry the unit in their name.
Invalid input raises ``ValueError`` naming the parameter, never a silent NaN.
"""

import math
from types import MappingProxyType
from typing import Literal, NamedTuple

import numpy as np
from numpy.typing import ArrayLike

# Exact by definition of the metre (SI, 1983).
SPEED_OF_LIGHT_M_PER_S = 299_792_458.0

Polarization = Literal["horizontal", "vertical", "circular"]

# ITU-R P.838-3 §1: tau = 0 horizontal, 90 vertical, 45 for circular polarisation.
POLARIZATION_TILT_DEG = MappingProxyType({"horizontal": 0.0, "vertical": 90.0, "circular": 45.0})


def as_checked_array(
    name: str,
    value: ArrayLike,
    *,
    minimum: float | None = None,
    inclusive: bool = False,
) -> np.ndarray:
    """Convert ``value`` to a float64 array (same shape), checking it is finite and bounded.

    ``minimum=None`` checks finiteness only; ``inclusive`` allows the bound itself. Raises
    ``ValueError("<name>: must be ...")`` for non-numbers, NaN/inf or out-of-bound values.

    Examples
    --------
    >>> as_checked_array("d_m", [1.0, 2.0], minimum=0.0).tolist()
    [1.0, 2.0]
    """
    if type(value) is float or type(value) is int:
        # Fast path for plain numbers: the ledger checks dozens per call.
        if not math.isfinite(value):
            raise ValueError(f"{name}: must be finite (got NaN or infinity)")
        arr = np.asarray(float(value))
        if minimum is None or (value >= minimum if inclusive else value > minimum):
            return arr
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        raise ValueError(f"{name}: must be a number or an array of numbers") from None
    if not np.all(np.isfinite(arr)):
        raise ValueError(f"{name}: must be finite (got NaN or infinity)")
    if minimum is not None:
        bad = arr < minimum if inclusive else arr <= minimum
        if np.any(bad):
            if minimum == 0.0:
                need = "non-negative" if inclusive else "positive"
            else:
                need = f"{'at least' if inclusive else 'greater than'} {minimum:g}"
            raise ValueError(f"{name}: must be {need} (got {arr[bad].flat[0]:g})")
    return arr


def _scalar_or_array(x: np.ndarray) -> np.ndarray | np.floating:
    # 0-d arrays become numpy scalars so scalar callers get a number back.
    return x[()] if x.ndim == 0 else x


def _frequency_ghz(f_hz: ArrayLike, low_ghz: float, high_ghz: float, model: str) -> np.ndarray:
    f_ghz = as_checked_array("f_hz", f_hz, minimum=0.0) / 1e9
    if np.any((f_ghz < low_ghz) | (f_ghz > high_ghz)):
        bad = f_ghz[(f_ghz < low_ghz) | (f_ghz > high_ghz)].flat[0]
        raise ValueError(
            f"f_hz: {model} applies from {low_ghz:g} GHz to {high_ghz:g} GHz (got {bad:g} GHz)"
        )
    return f_ghz


# --------------------------------------------------------------------------------------------
# ITU-R P.525-4: free-space basic transmission loss
# --------------------------------------------------------------------------------------------


def free_space_path_loss_db(f_hz: ArrayLike, d_m: ArrayLike) -> np.ndarray | np.floating:
    """Free-space basic transmission loss between isotropic antennas.

    L_bf = 20·log10(4π·d·f/c), with c = 299 792 458 m/s exactly.

    Parameters
    ----------
    f_hz : array_like
        Frequency (Hz), > 0.
    d_m : array_like
        Path length (m), > 0. Broadcasts against ``f_hz``.

    Returns
    -------
    numpy.ndarray or numpy.float64
        Loss (dB), broadcast shape of the inputs.

    Raises
    ------
    ValueError
        If a frequency or distance is not positive and finite.

    Notes
    -----
    P.525 also prints the rounded numerical form 32.4 + 20·log10 f[MHz] + 20·log10 d[km]; its
    constant is 0.0478 dB below the exact 20·log10(4π·10⁹/c) = 32.4478 dB used here.

    References
    ----------
    ITU-R P.525-4 (08/2019), §2.2, point-to-point link.

    Examples
    --------
    >>> f"{free_space_path_loss_db(26e9, 100.0):.4f}"
    '100.7473'
    """
    f = as_checked_array("f_hz", f_hz, minimum=0.0)
    d = as_checked_array("d_m", d_m, minimum=0.0)
    return _scalar_or_array(20.0 * np.log10(4.0 * np.pi * d * f / SPEED_OF_LIGHT_M_PER_S))


# --------------------------------------------------------------------------------------------
# ITU-R P.676-11 Annex 2: approximate specific gaseous attenuation, 1-350 GHz
# --------------------------------------------------------------------------------------------

# P.676-11 Annex 1 Table 1, spectroscopic data for oxygen: f0 (GHz), a1, a2, a3, a4, a5, a6.
# Typed from the Recommendation; the same values are printed unchanged in P.676-12 and -13.
_OXYGEN_TABLE = (
    (50.474214, 0.975, 9.651, 6.690, 0.0, 2.566, 6.850),
    (50.987745, 2.529, 8.653, 7.170, 0.0, 2.246, 6.800),
    (51.503360, 6.193, 7.709, 7.640, 0.0, 1.947, 6.729),
    (52.021429, 14.320, 6.819, 8.110, 0.0, 1.667, 6.640),
    (52.542418, 31.240, 5.983, 8.580, 0.0, 1.388, 6.526),
    (53.066934, 64.290, 5.201, 9.060, 0.0, 1.349, 6.206),
    (53.595775, 124.600, 4.474, 9.550, 0.0, 2.227, 5.085),
    (54.130025, 227.300, 3.800, 9.960, 0.0, 3.170, 3.750),
    (54.671180, 389.700, 3.182, 10.370, 0.0, 3.558, 2.654),
    (55.221384, 627.100, 2.618, 10.890, 0.0, 2.560, 2.952),
    (55.783815, 945.300, 2.109, 11.340, 0.0, -1.172, 6.135),
    (56.264774, 543.400, 0.014, 17.030, 0.0, 3.525, -0.978),
    (56.363399, 1331.800, 1.654, 11.890, 0.0, -2.378, 6.547),
    (56.968211, 1746.600, 1.255, 12.230, 0.0, -3.545, 6.451),
    (57.612486, 2120.100, 0.910, 12.620, 0.0, -5.416, 6.056),
    (58.323877, 2363.700, 0.621, 12.950, 0.0, -1.932, 0.436),
    (58.446588, 1442.100, 0.083, 14.910, 0.0, 6.768, -1.273),
    (59.164204, 2379.900, 0.387, 13.530, 0.0, -6.561, 2.309),
    (59.590983, 2090.700, 0.207, 14.080, 0.0, 6.957, -0.776),
    (60.306056, 2103.400, 0.207, 14.150, 0.0, -6.395, 0.699),
    (60.434778, 2438.000, 0.386, 13.390, 0.0, 6.342, -2.825),
    (61.150562, 2479.500, 0.621, 12.920, 0.0, 1.014, -0.584),
    (61.800158, 2275.900, 0.910, 12.630, 0.0, 5.014, -6.619),
    (62.411220, 1915.400, 1.255, 12.170, 0.0, 3.029, -6.759),
    (62.486253, 1503.000, 0.083, 15.130, 0.0, -4.499, 0.844),
    (62.997984, 1490.200, 1.654, 11.740, 0.0, 1.856, -6.675),
    (63.568526, 1078.000, 2.108, 11.340, 0.0, 0.658, -6.139),
    (64.127775, 728.700, 2.617, 10.880, 0.0, -3.036, -2.895),
    (64.678910, 461.300, 3.181, 10.380, 0.0, -3.968, -2.590),
    (65.224078, 274.000, 3.800, 9.960, 0.0, -3.528, -3.680),
    (65.764779, 153.000, 4.473, 9.550, 0.0, -2.548, -5.002),
    (66.302096, 80.400, 5.200, 9.060, 0.0, -1.660, -6.091),
    (66.836834, 39.800, 5.982, 8.580, 0.0, -1.680, -6.393),
    (67.369601, 18.560, 6.818, 8.110, 0.0, -1.956, -6.475),
    (67.900868, 8.172, 7.708, 7.640, 0.0, -2.216, -6.545),
    (68.431006, 3.397, 8.652, 7.170, 0.0, -2.492, -6.600),
    (68.960312, 1.334, 9.650, 6.690, 0.0, -2.773, -6.650),
    (118.750334, 940.300, 0.010, 16.640, 0.0, -0.439, 0.079),
    (368.498246, 67.400, 0.048, 16.400, 0.0, 0.000, 0.000),
    (424.763020, 637.700, 0.044, 16.400, 0.0, 0.000, 0.000),
    (487.249273, 237.400, 0.049, 16.000, 0.0, 0.000, 0.000),
    (715.392902, 98.100, 0.145, 16.000, 0.0, 0.000, 0.000),
    (773.839490, 572.300, 0.141, 16.200, 0.0, 0.000, 0.000),
    (834.145546, 183.100, 0.145, 14.700, 0.0, 0.000, 0.000),
)

# P.676-11 Annex 1 Table 2 rows (f0 (GHz), b1..b6) for the water-vapour lines that the Annex 2
# approximate method keeps; the 1780 GHz row is the Recommendation's pseudo-line that stands in
# for the far-wing (continuum) absorption.
_WATER_TABLE_ANNEX2 = (
    (22.235080, 0.1079, 2.144, 26.38, 0.76, 5.087, 1.00),
    (183.310087, 2.273, 0.668, 29.06, 0.77, 5.022, 0.85),
    (321.225630, 0.0470, 6.179, 24.04, 0.67, 4.398, 0.54),
    (325.152888, 1.514, 1.541, 28.23, 0.64, 4.893, 0.74),
    (380.197353, 11.67, 1.048, 28.11, 0.54, 5.063, 0.89),
    (448.001085, 10.41, 1.405, 25.64, 0.66, 5.028, 0.67),
    (556.935985, 497.0, 0.159, 30.86, 0.69, 4.552, 1.00),
    (752.033113, 243.4, 0.396, 30.86, 0.68, 4.352, 0.84),
    (1780.000000, 17506.0, 0.952, 196.3, 2.00, 24.15, 5.00),
)


def _read_only(table: tuple[tuple[float, ...], ...]) -> np.ndarray:
    arr = np.array(table, dtype=float).T.copy()
    arr.flags.writeable = False
    return arr


_OXYGEN = _read_only(_OXYGEN_TABLE)  # shape (7, 44): rows f0, a1..a6
_WATER = _read_only(_WATER_TABLE_ANNEX2)  # shape (7, 9): rows f0, b1..b6


def water_vapour_partial_pressure_hpa(
    water_vapour_g_m3: ArrayLike, temperature_c: ArrayLike
) -> np.ndarray | np.floating:
    """Water-vapour partial pressure e = ρ·T/216.7.

    Parameters
    ----------
    water_vapour_g_m3 : array_like
        Water-vapour density ρ (g/m³), ≥ 0.
    temperature_c : array_like
        Air temperature (°C), above −273.15.

    Returns
    -------
    numpy.ndarray or numpy.float64
        e (hPa), broadcast shape. Total pressure is the dry pressure p plus e.

    References
    ----------
    ITU-R P.676-11 Annex 1 eq (4).

    Examples
    --------
    >>> f"{water_vapour_partial_pressure_hpa(7.5, 15.0):.4f}"
    '9.9729'
    """
    rho = as_checked_array("water_vapour_g_m3", water_vapour_g_m3, minimum=0.0, inclusive=True)
    t_k = as_checked_array("temperature_c", temperature_c, minimum=-273.15) + 273.15
    return _scalar_or_array(rho * t_k / 216.7)


def _gas_state(
    f_hz: ArrayLike, pressure_hpa: ArrayLike, temperature_c: ArrayLike, water_vapour_g_m3: ArrayLike
) -> tuple[np.ndarray, ...]:
    f = _frequency_ghz(f_hz, 1.0, 350.0, "ITU-R P.676-11 Annex 2")
    p = as_checked_array("pressure_hpa", pressure_hpa, minimum=0.0)
    t_k = as_checked_array("temperature_c", temperature_c, minimum=-273.15) + 273.15
    rho = as_checked_array("water_vapour_g_m3", water_vapour_g_m3, minimum=0.0, inclusive=True)
    f, p, t_k, rho = np.broadcast_arrays(f, p, t_k, rho)
    theta = 300.0 / t_k
    e = rho * t_k / 216.7  # eq (4)
    # Trailing axis of length 1 so the line tables broadcast along it.
    return f[..., None], p[..., None], theta[..., None], e[..., None]


def _line_shape(
    f: np.ndarray, f0: np.ndarray, width: np.ndarray, delta: np.ndarray | float
) -> np.ndarray:
    # Annex 1 eq (5): van Vleck-Weisskopf shape with the oxygen interference term delta.
    return (f / f0) * (
        (width - delta * (f0 - f)) / ((f0 - f) ** 2 + width**2)
        + (width - delta * (f0 + f)) / ((f0 + f) ** 2 + width**2)
    )


def oxygen_attenuation_db_per_km(
    f_hz: ArrayLike,
    pressure_hpa: ArrayLike = 1013.25,
    temperature_c: ArrayLike = 15.0,
    water_vapour_g_m3: ArrayLike = 7.5,
) -> np.ndarray | np.floating:
    """Dry-air specific attenuation γ_o by the ITU-R P.676-11 Annex 2 approximate method.

    Parameters and conventions are those of :func:`gaseous_attenuation_db_per_km`.

    Returns
    -------
    numpy.ndarray or numpy.float64
        γ_o (dB/km), broadcast shape of the inputs.

    References
    ----------
    ITU-R P.676-11 (09/2016) Annex 2 §1, evaluating Annex 1 eqs (1)-(3), (5), (6a), (7)-(9)
    with Table 1.

    Examples
    --------
    >>> f"{oxygen_attenuation_db_per_km(28e9):.6f}"
    '0.018696'
    """
    return _scalar_or_array(
        _oxygen(*_gas_state(f_hz, pressure_hpa, temperature_c, water_vapour_g_m3))
    )


def _oxygen(f: np.ndarray, p: np.ndarray, theta: np.ndarray, e: np.ndarray) -> np.ndarray:
    f0, a1, a2, a3, a4, a5, a6 = _OXYGEN
    strength = a1 * 1e-7 * p * theta**3 * np.exp(a2 * (1.0 - theta))  # eq (3)
    # eq (6a) line width; Annex 2 leaves out the Zeeman-splitting correction of eq (6b).
    width = a3 * 1e-4 * (p * theta ** (0.8 - a4) + 1.1 * e * theta)
    delta = (a5 + a6 * theta) * 1e-4 * (p + e) * theta**0.8  # eq (7)
    n_lines = np.sum(strength * _line_shape(f, f0, width, delta), axis=-1)
    f, p, theta, e = f[..., 0], p[..., 0], theta[..., 0], e[..., 0]
    d = 5.6e-4 * (p + e) * theta**0.8  # eq (9)
    n_dry = (  # eq (8): Debye spectrum and pressure-induced nitrogen absorption
        f
        * p
        * theta**2
        * (
            6.14e-5 / (d * (1.0 + (f / d) ** 2))
            + 1.4e-12 * p * theta**1.5 / (1.0 + 1.9e-5 * f**1.5)
        )
    )
    return 0.1820 * f * (n_lines + n_dry)  # eq (1)


def water_vapour_attenuation_db_per_km(
    f_hz: ArrayLike,
    pressure_hpa: ArrayLike = 1013.25,
    temperature_c: ArrayLike = 15.0,
    water_vapour_g_m3: ArrayLike = 7.5,
) -> np.ndarray | np.floating:
    """Water-vapour specific attenuation γ_w by the ITU-R P.676-11 Annex 2 approximate method.

    Parameters and conventions are those of :func:`gaseous_attenuation_db_per_km`.

    Returns
    -------
    numpy.ndarray or numpy.float64
        γ_w (dB/km), broadcast shape of the inputs.

    References
    ----------
    ITU-R P.676-11 (09/2016) Annex 2 §1, evaluating Annex 1 eqs (1)-(3), (5), (6a) over the
    Annex 2 subset of the Table 2 lines.

    Examples
    --------
    >>> f"{water_vapour_attenuation_db_per_km(28e9):.6f}"
    '0.082792'
    """
    return _scalar_or_array(
        _water(*_gas_state(f_hz, pressure_hpa, temperature_c, water_vapour_g_m3))
    )


def _water(f: np.ndarray, p: np.ndarray, theta: np.ndarray, e: np.ndarray) -> np.ndarray:
    f0, b1, b2, b3, b4, b5, b6 = _WATER
    strength = b1 * 1e-1 * e * theta**3.5 * np.exp(b2 * (1.0 - theta))  # eq (3)
    # eq (6a) line width; Annex 2 leaves out the Doppler-broadening correction of eq (6b).
    width = b3 * 1e-4 * (p * theta**b4 + b5 * e * theta**b6)
    n_lines = np.sum(strength * _line_shape(f, f0, width, 0.0), axis=-1)
    return 0.1820 * f[..., 0] * n_lines  # eq (1)


def gaseous_attenuation_db_per_km(
    f_hz: ArrayLike,
    pressure_hpa: ArrayLike = 1013.25,
    temperature_c: ArrayLike = 15.0,
    water_vapour_g_m3: ArrayLike = 7.5,
) -> np.ndarray | np.floating:
    """Specific attenuation by atmospheric gases, γ = γ_o + γ_w, ITU-R P.676-11 Annex 2.

    Annex 2 of P.676-11 estimates γ from the Annex 1 line-by-line equations with the oxygen
    lines of Table 1 and a subset of the water-vapour lines of Table 2, without the Zeeman and
    Doppler line-width corrections (the description of Annex 2 here is recalled from the
    Recommendation; itur 0.4.0's version-11 approximate method has the same structure and the
    tests check this code against it). It is stated valid from 1 to 350 GHz. For the sea-level
    standard atmosphere it reads 0.07-0.4 % below the full Annex 1 method at 24-39 GHz.

    Parameters
    ----------
    f_hz : array_like
        Frequency (Hz), 1 GHz ≤ f ≤ 350 GHz.
    pressure_hpa : array_like
        **Dry-air** pressure p (hPa), > 0: the p of Annex 1 eqs (3)-(9); the total barometric
        pressure is p + e with e from :func:`water_vapour_partial_pressure_hpa`. This is how
        itur 0.4.0 uses its ``P`` argument and how the ITU-R validation examples state their
        input. To model a measured total pressure P_tot, pass P_tot − e; at 24-39 GHz that
        changes γ by at most 1.3 % at sea level.
    temperature_c : array_like
        Air temperature (°C), above −273.15.
    water_vapour_g_m3 : array_like
        Water-vapour density ρ (g/m³), ≥ 0.

    Returns
    -------
    numpy.ndarray or numpy.float64
        γ (dB/km), broadcast shape of the inputs. Multiply by the path length in km for a
        horizontal terrestrial path (Annex 2 §2.1).

    Raises
    ------
    ValueError
        If a frequency is outside 1-350 GHz or an atmospheric parameter is out of range.

    Notes
    -----
    The defaults 1013.25 hPa, 15 °C and 7.5 g/m³ are the sea-level conditions of the
    Recommendation's reference curves (the ITU-R P.835 mean annual global reference
    atmosphere; from memory).

    References
    ----------
    ITU-R P.676-11 (09/2016), Annex 2 §1 and §2.1; Annex 1 eqs (1)-(9), Tables 1 and 2.

    Examples
    --------
    >>> f"{gaseous_attenuation_db_per_km(28e9):.6f}"
    '0.101488'
    """
    state = _gas_state(f_hz, pressure_hpa, temperature_c, water_vapour_g_m3)
    return _scalar_or_array(_oxygen(*state) + _water(*state))


# --------------------------------------------------------------------------------------------
# ITU-R P.838-3: rain specific attenuation
# --------------------------------------------------------------------------------------------

# P.838-3 Tables 1-4: rows a_j, b_j, c_j, then (m, c) of the linear term of eqs (2)-(3).
_P838_KH = ((-5.33980, -0.35351, -0.23789, -0.94158),
            (-0.10008, 1.26970, 0.86036, 0.64552),
            (1.13098, 0.45400, 0.15354, 0.16817))  # fmt: skip
_P838_KH_LIN = (-0.18961, 0.71147)
_P838_KV = ((-3.80595, -3.44965, -0.39902, 0.50167),
            (0.56934, -0.22911, 0.73042, 1.07319),
            (0.81061, 0.51059, 0.11899, 0.27195))  # fmt: skip
_P838_KV_LIN = (-0.16398, 0.63297)
_P838_AH = ((-0.14318, 0.29591, 0.32177, -5.37610, 16.1721),
            (1.82442, 0.77564, 0.63773, -0.96230, -3.29980),
            (-0.55187, 0.19822, 0.13164, 1.47828, 3.43990))  # fmt: skip
_P838_AH_LIN = (0.67849, -1.95537)
_P838_AV = ((-0.07771, 0.56727, -0.20238, -48.2991, 48.5833),
            (2.33840, 0.95545, 1.14520, 0.791669, 0.791459),
            (-0.76284, 0.54039, 0.26809, 0.116226, 0.116479))  # fmt: skip
_P838_AV_LIN = (-0.053739, 0.83433)


_P838_ARRAYS = {  # read-only (3, J) arrays of the tables above, built once
    name: _read_only(tuple(zip(*table, strict=True)))
    for name, table in (("kh", _P838_KH), ("kv", _P838_KV), ("ah", _P838_AH), ("av", _P838_AV))
}


def _p838_fit(log_f: np.ndarray, table: str, lin: tuple[float, float]) -> np.ndarray:
    # Sum of Gaussians in log10 f plus a linear term: the right side of eqs (2) and (3).
    a, b, c = _P838_ARRAYS[table]
    x = log_f[..., None]
    return np.sum(a * np.exp(-(((x - b) / c) ** 2)), axis=-1) + lin[0] * log_f + lin[1]


def _tilt(polarization: Polarization | None, tilt_deg: ArrayLike | None) -> np.ndarray:
    if polarization is not None and tilt_deg is not None:
        raise ValueError("tilt_deg: give either polarization or tilt_deg, not both")
    if tilt_deg is not None:
        return as_checked_array("tilt_deg", tilt_deg)
    key = "horizontal" if polarization is None else polarization
    if key not in POLARIZATION_TILT_DEG:
        choices = ", ".join(POLARIZATION_TILT_DEG)
        raise ValueError(f"polarization: must be one of {choices} (got {polarization!r})")
    return np.asarray(POLARIZATION_TILT_DEG[key])


def rain_k_alpha(
    f_hz: ArrayLike, tilt_deg: ArrayLike = 0.0, elevation_deg: ArrayLike = 0.0
) -> tuple[np.ndarray | np.floating, np.ndarray | np.floating]:
    """Coefficients k and α of γ_R = k·R^α for any polarisation tilt and path elevation.

    Parameters
    ----------
    f_hz : array_like
        Frequency (Hz), 1 GHz ≤ f ≤ 1000 GHz.
    tilt_deg : array_like
        Polarisation tilt τ relative to horizontal (degrees): 0 horizontal, 90 vertical,
        45 circular.
    elevation_deg : array_like
        Path elevation θ (degrees), 0-90; 0 for a horizontal terrestrial path.

    Returns
    -------
    k, alpha : numpy.ndarray or numpy.float64
        Dimensionless coefficients, broadcast shape of the inputs.

    Raises
    ------
    ValueError
        If a frequency is outside 1-1000 GHz or an angle is not finite / elevation not in 0-90.

    References
    ----------
    ITU-R P.838-3 (03/2005), eqs (2)-(3) with Tables 1-4 (k_H, k_V, α_H, α_V) and
    eqs (4)-(5) for arbitrary tilt and elevation.

    Examples
    --------
    >>> k, a = rain_k_alpha(28e9)
    >>> f"{k:.6f} {a:.5f}"
    '0.205091 0.96788'
    """
    f_ghz = _frequency_ghz(f_hz, 1.0, 1000.0, "ITU-R P.838-3")
    tau = np.deg2rad(as_checked_array("tilt_deg", tilt_deg))
    el_deg = as_checked_array("elevation_deg", elevation_deg, minimum=0.0, inclusive=True)
    if np.any(el_deg > 90.0):
        raise ValueError("elevation_deg: must be between 0 and 90 degrees")
    log_f = np.log10(f_ghz)
    k_h = 10.0 ** _p838_fit(log_f, "kh", _P838_KH_LIN)  # eq (2)
    k_v = 10.0 ** _p838_fit(log_f, "kv", _P838_KV_LIN)
    a_h = _p838_fit(log_f, "ah", _P838_AH_LIN)  # eq (3)
    a_v = _p838_fit(log_f, "av", _P838_AV_LIN)
    mix = np.cos(np.deg2rad(el_deg)) ** 2 * np.cos(2.0 * tau)
    k = (k_h + k_v + (k_h - k_v) * mix) / 2.0  # eq (4)
    alpha = (k_h * a_h + k_v * a_v + (k_h * a_h - k_v * a_v) * mix) / (2.0 * k)  # eq (5)
    return _scalar_or_array(np.asarray(k)), _scalar_or_array(np.asarray(alpha))


def rain_specific_attenuation_db_per_km(
    f_hz: ArrayLike,
    rain_rate_mm_h: ArrayLike,
    polarization: Polarization | None = None,
    *,
    tilt_deg: ArrayLike | None = None,
    elevation_deg: ArrayLike = 0.0,
) -> np.ndarray | np.floating:
    """Rain specific attenuation γ_R = k·R^α (ITU-R P.838-3).

    Parameters
    ----------
    f_hz : array_like
        Frequency (Hz), 1 GHz ≤ f ≤ 1000 GHz.
    rain_rate_mm_h : array_like
        Rain rate R (mm/h), ≥ 0.
    polarization : {"horizontal", "vertical", "circular"}, optional
        Sets τ = 0, 90 or 45 degrees. If neither this nor ``tilt_deg`` is given, horizontal is
        used: the larger of the two linear-polarisation attenuations at mm-wave (k_H > k_V),
        i.e. the conservative choice (ours, not the Recommendation's).
    tilt_deg : array_like, optional
        Polarisation tilt τ (degrees) instead of ``polarization``; give one or the other.
    elevation_deg : array_like
        Path elevation (degrees), 0-90.

    Returns
    -------
    numpy.ndarray or numpy.float64
        γ_R (dB/km), broadcast shape of the inputs.

    Raises
    ------
    ValueError
        For an unknown polarisation, both ``polarization`` and ``tilt_deg`` given, a
        negative rain rate or a frequency outside 1-1000 GHz.

    References
    ----------
    ITU-R P.838-3 (03/2005), eq (1) with eqs (2)-(5) and Tables 1-4.

    Examples
    --------
    >>> f"{rain_specific_attenuation_db_per_km(28e9, 25.0, 'horizontal'):.4f}"
    '4.6236'
    """
    rain = as_checked_array("rain_rate_mm_h", rain_rate_mm_h, minimum=0.0, inclusive=True)
    k, alpha = rain_k_alpha(f_hz, _tilt(polarization, tilt_deg), elevation_deg)
    return _scalar_or_array(np.asarray(k * rain**alpha))


def rain_path_reduction_factor(
    d_km: ArrayLike,
    f_hz: ArrayLike,
    rain_rate_mm_h: ArrayLike,
    polarization: Polarization | None = None,
    *,
    tilt_deg: ArrayLike | None = None,
    elevation_deg: ArrayLike = 0.0,
) -> np.ndarray | np.floating:
    """Distance factor r of ITU-R P.530-17 §2.4.1 (effective rain path length d_eff = r·d).

    r = 1 / (0.477·d^0.633·R^(0.073·α)·f^0.123 − 10.579·(1 − exp(−0.024·d))), with d in km,
    f in GHz and α from P.838-3 for the same polarisation; when the denominator is below 0.4
    the Recommendation's maximum r = 2.5 is used.

    Parameters
    ----------
    d_km : array_like
        Path length d (km), > 0.
    f_hz : array_like
        Frequency (Hz), 1 GHz ≤ f ≤ 1000 GHz (the range of P.838-3).
    rain_rate_mm_h : array_like
        Rain rate R (mm/h), ≥ 0. P.530 defines R as R0.01, the rate exceeded for 0.01 % of an
        average year (1-min integration); here the user's design rain rate is used as R.
    polarization, tilt_deg, elevation_deg
        As in :func:`rain_specific_attenuation_db_per_km`; they set α.

    Returns
    -------
    numpy.ndarray or numpy.float64
        r (dimensionless), 0 < r ≤ 2.5, broadcast shape of the inputs.

    Notes
    -----
    The fit was made for terrestrial line-of-sight links of kilometres. For paths shorter than
    about 0.3-0.5 km at 24-71 GHz and 10-100 mm/h (and at R = 0) the denominator drops under
    0.4 and r takes the 2.5 cap, so short paths are charged 2.5 × their length in rain: a
    conservative reading for street-level links, where uniform rain would give r ≈ 1.

    References
    ----------
    ITU-R P.530-17 (12/2017), §2.4.1 step 3, eq (32) and the note on the maximum r.

    Examples
    --------
    >>> f"{rain_path_reduction_factor(1.0, 28e9, 25.0, 'horizontal'):.4f}"
    '1.5354'
    """
    d = as_checked_array("d_km", d_km, minimum=0.0)
    rain = as_checked_array("rain_rate_mm_h", rain_rate_mm_h, minimum=0.0, inclusive=True)
    _, alpha = rain_k_alpha(f_hz, _tilt(polarization, tilt_deg), elevation_deg)
    return _scalar_or_array(_p530_factor(d, np.asarray(f_hz, dtype=float) / 1e9, rain, alpha))


def _p530_factor(d: np.ndarray, f_ghz: np.ndarray, rain: np.ndarray, alpha) -> np.ndarray:
    denominator = 0.477 * d**0.633 * rain ** (0.073 * alpha) * f_ghz**0.123 - 10.579 * (
        1.0 - np.exp(-0.024 * d)
    )
    # The 2.5 cap is stated in terms of the denominator so that negative values (very short
    # paths, R = 0) also land on the cap instead of giving a negative r.
    safe = np.where(denominator < 0.4, 1.0, denominator)
    return np.asarray(np.where(denominator < 0.4, 2.5, 1.0 / safe))


class RainPathTerms(NamedTuple):
    """Rain on a terrestrial path: γ_R (dB/km), distance factor r and attenuation A (dB)."""

    specific_attenuation_db_per_km: np.ndarray | np.floating
    reduction_factor: np.ndarray | np.floating
    attenuation_db: np.ndarray | np.floating


def rain_path_terms(
    f_hz: ArrayLike,
    d_m: ArrayLike,
    rain_rate_mm_h: ArrayLike,
    polarization: Polarization | None = None,
    *,
    tilt_deg: ArrayLike | None = None,
    elevation_deg: ArrayLike = 0.0,
) -> RainPathTerms:
    """γ_R, r and A = γ_R·d·r of a terrestrial path in one evaluation (P.838-3 with P.530-17).

    Parameters
    ----------
    f_hz : array_like
        Frequency (Hz), 1 GHz ≤ f ≤ 1000 GHz.
    d_m : array_like
        Path length (m), > 0.
    rain_rate_mm_h : array_like
        Rain rate R (mm/h), ≥ 0; used where P.530 puts R0.01 (see
        :func:`rain_path_reduction_factor`).
    polarization, tilt_deg, elevation_deg
        As in :func:`rain_specific_attenuation_db_per_km`.

    Returns
    -------
    RainPathTerms
        Each field has the broadcast shape of the inputs.

    References
    ----------
    ITU-R P.838-3 eqs (1)-(5); ITU-R P.530-17 §2.4.1 steps 2-4, eqs (32)-(33).

    Examples
    --------
    >>> terms = rain_path_terms(28e9, 1000.0, 25.0, "horizontal")
    >>> f"{terms.reduction_factor:.4f} {terms.attenuation_db:.3f}"
    '1.5354 7.099'
    """
    d_km = as_checked_array("d_m", d_m, minimum=0.0) / 1000.0
    rain = as_checked_array("rain_rate_mm_h", rain_rate_mm_h, minimum=0.0, inclusive=True)
    k, alpha = rain_k_alpha(f_hz, _tilt(polarization, tilt_deg), elevation_deg)
    gamma = k * rain**alpha
    r = _p530_factor(d_km, np.asarray(f_hz, dtype=float) / 1e9, rain, alpha)
    return RainPathTerms(
        _scalar_or_array(np.asarray(gamma)),
        _scalar_or_array(r),
        _scalar_or_array(np.asarray(gamma * d_km * r)),
    )


def rain_attenuation_db(
    f_hz: ArrayLike,
    d_m: ArrayLike,
    rain_rate_mm_h: ArrayLike,
    polarization: Polarization | None = None,
    *,
    tilt_deg: ArrayLike | None = None,
    elevation_deg: ArrayLike = 0.0,
) -> np.ndarray | np.floating:
    """Rain attenuation of a terrestrial path, A = γ_R·d·r (P.838-3 with P.530-17).

    Parameters as in :func:`rain_path_terms`; returns A (dB), broadcast shape of the inputs.

    References
    ----------
    ITU-R P.838-3 eq (1); ITU-R P.530-17 §2.4.1 steps 2-4, eqs (32)-(33).

    Examples
    --------
    >>> f"{rain_attenuation_db(28e9, 1000.0, 25.0, 'horizontal'):.3f}"
    '7.099'
    """
    return rain_path_terms(
        f_hz, d_m, rain_rate_mm_h, polarization, tilt_deg=tilt_deg, elevation_deg=elevation_deg
    ).attenuation_db
