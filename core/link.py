"""Link planner: turn a service requirement into a per-element PA requirement (DESIGN.md §3).

Path loss (free space, gases, rain, user extras) → receiver sensitivity → required EIRP →
per-element average power of a uniform phased array → P1dB after back-off → RF-exposure
compliance distance. The ITU-R propagation models live in :mod:`core.propagation`.

Array functions broadcast their arguments with numpy rules and return a numpy float for
all-scalar input. Invalid input raises ``ValueError`` naming the parameter or field.
"""

import math
from dataclasses import dataclass
from types import MappingProxyType
from typing import Literal, NamedTuple

import numpy as np
import pandas as pd
from numpy.typing import ArrayLike

from core import propagation
from core.propagation import as_checked_array

# Exact since the 2019 redefinition of the SI.
BOLTZMANN_J_PER_K = 1.380649e-23
# T0 of the noise-figure definition (IEEE standard reference temperature).
REFERENCE_TEMPERATURE_K = 290.0
# General-public power-density reference level above a few GHz in common exposure guidelines;
# from memory. Exposure limits are set by local regulation, which governs.
DEFAULT_EXPOSURE_LIMIT_W_PER_M2 = 10.0
EXPOSURE_CAUTION = (
    "Exposure, spectrum and emission limits are set by local regulation; defer to it and to "
    "licensed practice."
)


def _element_count(n_elements: ArrayLike, name: str = "n_elements") -> np.ndarray:
    n = as_checked_array(name, n_elements, minimum=1.0, inclusive=True)
    if np.any(n != np.round(n)):
        raise ValueError(f"{name}: must be whole numbers of elements (1, 2, 3, ...)")
    return n


def noise_floor_dbm(
    bandwidth_hz: ArrayLike,
    noise_figure_db: ArrayLike,
    temperature_k: ArrayLike = REFERENCE_TEMPERATURE_K,
) -> np.ndarray | np.floating:
    """Receiver noise floor N = 10·log10(k·T·B / 1 mW) + NF.

    With k = 1.380649e-23 J/K exactly, k·T0 is −173.9752 dBm/Hz; the usual round figure
    −174 dBm/Hz (common practice) is 0.025 dB low.

    Parameters
    ----------
    bandwidth_hz : array_like
        Noise bandwidth B (Hz), > 0.
    noise_figure_db : array_like
        Receiver noise figure (dB), ≥ 0.
    temperature_k : array_like
        Reference temperature T (K), > 0; 290 K is the T0 of the noise-figure definition.

    Returns
    -------
    numpy.ndarray or numpy.float64
        Noise floor (dBm), broadcast shape of the inputs.

    References
    ----------
    Johnson-Nyquist available noise power k·T·B; k from the 2019 SI definition.

    Examples
    --------
    >>> f"{noise_floor_dbm(400e6, 7.0):.4f}"
    '-80.9546'
    """
    b = as_checked_array("bandwidth_hz", bandwidth_hz, minimum=0.0)
    nf = as_checked_array("noise_figure_db", noise_figure_db, minimum=0.0, inclusive=True)
    t = as_checked_array("temperature_k", temperature_k, minimum=0.0)
    return 10.0 * np.log10(BOLTZMANN_J_PER_K * t * b / 1e-3) + nf


def _array_terms(n_elements, element_gain_dbi, feed_loss_db, scan_loss_db) -> np.ndarray:
    # 20·log10 N + G − feed − scan (dB): what the array adds between one PA and the EIRP.
    n = _element_count(n_elements)
    g = as_checked_array("element_gain_dbi", element_gain_dbi)
    feed = as_checked_array("feed_loss_db", feed_loss_db, minimum=0.0, inclusive=True)
    scan = as_checked_array("scan_loss_db", scan_loss_db, minimum=0.0, inclusive=True)
    return 20.0 * np.log10(n) + g - feed - scan


def array_eirp_dbm(
    p_elem_dbm: ArrayLike,
    n_elements: ArrayLike,
    element_gain_dbi: ArrayLike,
    feed_loss_db: ArrayLike = 0.0,
    scan_loss_db: ArrayLike = 0.0,
) -> np.ndarray | np.floating:
    """EIRP of a uniform, coherently phased array: P + 20·log10 N + G − feed − scan.

    N equal elements add 10·log10 N of conducted power and 10·log10 N of array gain at the
    beam peak.

    Parameters
    ----------
    p_elem_dbm : array_like
        Average power delivered by each PA (dBm).
    n_elements : array_like
        Number of elements N, whole numbers ≥ 1.
    element_gain_dbi : array_like
        Element gain (dBi).
    feed_loss_db, scan_loss_db : array_like
        Loss between PA and radiator, and scan loss at the steering angle (dB), ≥ 0.

    Returns
    -------
    numpy.ndarray or numpy.float64
        EIRP (dBm), broadcast shape of the inputs.

    References
    ----------
    Standard array theory, uniform excitation at the beam peak (e.g. Mailloux, Phased Array
    Antenna Handbook; from memory).

    Examples
    --------
    >>> f"{array_eirp_dbm(20.0, 16, 5.0):.4f}"
    '49.0824'
    """
    p = as_checked_array("p_elem_dbm", p_elem_dbm)
    return p + _array_terms(n_elements, element_gain_dbi, feed_loss_db, scan_loss_db)


def per_element_power_dbm(
    eirp_dbm: ArrayLike,
    n_elements: ArrayLike,
    element_gain_dbi: ArrayLike,
    feed_loss_db: ArrayLike = 0.0,
    scan_loss_db: ArrayLike = 0.0,
) -> np.ndarray | np.floating:
    """Average power per element for a target EIRP; the inverse of :func:`array_eirp_dbm`.

    For a fixed EIRP it falls 20·log10 2 = 6.02 dB per doubling of N, while the total
    conducted power N·P falls 3.01 dB. Parameters, units and shapes as in
    :func:`array_eirp_dbm`, with the target ``eirp_dbm`` (dBm) in place of ``p_elem_dbm``.

    Returns
    -------
    numpy.ndarray or numpy.float64
        Per-element average power (dBm), broadcast shape of the inputs.

    Examples
    --------
    >>> f"{per_element_power_dbm(55.0, 64, 5.0):.4f}"
    '13.8764'
    """
    eirp = as_checked_array("eirp_dbm", eirp_dbm)
    return eirp - _array_terms(n_elements, element_gain_dbi, feed_loss_db, scan_loss_db)


def _dbm_to_w(name: str, value_dbm: ArrayLike) -> np.ndarray:
    return 10.0 ** ((as_checked_array(name, value_dbm) - 30.0) / 10.0)


def power_density_w_per_m2(eirp_dbm: ArrayLike, r_m: ArrayLike) -> np.ndarray | np.floating:
    """Far-field power density on the beam axis, S = EIRP / (4π·r²).

    Parameters
    ----------
    eirp_dbm : array_like
        Time-averaged EIRP (dBm); exposure limits are time-averaged.
    r_m : array_like
        Distance from the antenna (m), > 0.

    Returns
    -------
    numpy.ndarray or numpy.float64
        S (W/m²), broadcast shape of the inputs. Spherical spreading holds in the far field;
        nearer the aperture it is an estimate. Exposure limits are set by local regulation.

    Examples
    --------
    >>> f"{power_density_w_per_m2(60.0, 1.0):.3f}"
    '79.577'
    """
    r = as_checked_array("r_m", r_m, minimum=0.0)
    return _dbm_to_w("eirp_dbm", eirp_dbm) / (4.0 * np.pi * r**2)


def compliance_distance_m(
    eirp_dbm: ArrayLike, limit_w_per_m2: ArrayLike = DEFAULT_EXPOSURE_LIMIT_W_PER_M2
) -> np.ndarray | np.floating:
    """Distance beyond which the far-field power density is below a limit, sqrt(EIRP/(4π·S)).

    Parameters
    ----------
    eirp_dbm : array_like
        Time-averaged EIRP (dBm).
    limit_w_per_m2 : array_like
        Power-density limit S_lim (W/m²), > 0. The default 10 W/m² is the general-public
        reference level above a few GHz in common exposure guidelines (from memory).
        Exposure limits are set by local regulation, which governs: defer to it and to
        licensed practice.

    Returns
    -------
    numpy.ndarray or numpy.float64
        Compliance distance (m), broadcast shape of the inputs.

    Examples
    --------
    >>> f"{compliance_distance_m(60.0):.4f}"
    '2.8209'
    """
    s = as_checked_array("limit_w_per_m2", limit_w_per_m2, minimum=0.0)
    return np.sqrt(_dbm_to_w("eirp_dbm", eirp_dbm) / (4.0 * np.pi * s))


class SnrRequirement(NamedTuple):
    """Required SNR of one modulation and code rate (see ``REQUIRED_SNR_SOURCE``)."""

    modulation: str
    bits_per_symbol: int
    code_rate: float
    snr_db: float

    @property
    def spectral_efficiency(self) -> float:
        """Information bits per modulation symbol, bits_per_symbol × code_rate."""
        return self.bits_per_symbol * self.code_rate


Modulation = Literal[
    "QPSK 1/3", "QPSK 1/2", "QPSK 3/4", "16QAM 1/2", "16QAM 3/4",
    "64QAM 2/3", "64QAM 5/6", "256QAM 3/4", "256QAM 5/6",
]  # fmt: skip

REQUIRED_SNR_SOURCE = (
    "Representative SNR for about 10 % block error rate with modern LDPC-class coding in AWGN, "
    "from memory (common practice for link planning). Each sits 1.5-3 dB above the Shannon "
    "limit for its spectral efficiency. Replace with the receiver's simulated or measured value."
)
REQUIRED_SNR_TABLE: tuple[SnrRequirement, ...] = (
    SnrRequirement("QPSK 1/3", 2, 1 / 3, -1.0),
    SnrRequirement("QPSK 1/2", 2, 1 / 2, 1.0),
    SnrRequirement("QPSK 3/4", 2, 3 / 4, 4.0),
    SnrRequirement("16QAM 1/2", 4, 1 / 2, 6.5),
    SnrRequirement("16QAM 3/4", 4, 3 / 4, 10.0),
    SnrRequirement("64QAM 2/3", 6, 2 / 3, 14.0),
    SnrRequirement("64QAM 5/6", 6, 5 / 6, 17.5),
    SnrRequirement("256QAM 3/4", 8, 3 / 4, 20.5),
    SnrRequirement("256QAM 5/6", 8, 5 / 6, 23.0),
)
REQUIRED_SNR_DB = MappingProxyType({row.modulation: row.snr_db for row in REQUIRED_SNR_TABLE})


def required_snr_db(modulation: Modulation) -> float:
    """Representative required SNR (dB) for a modulation and code rate.

    Parameters
    ----------
    modulation : str
        A key of ``REQUIRED_SNR_DB``, e.g. ``"64QAM 2/3"``.

    Returns
    -------
    float
        Required SNR (dB), from ``REQUIRED_SNR_TABLE`` (source: ``REQUIRED_SNR_SOURCE``).

    Raises
    ------
    ValueError
        For a name not in the table.

    Examples
    --------
    >>> required_snr_db("16QAM 3/4")
    10.0
    """
    try:
        return REQUIRED_SNR_DB[modulation]
    except (KeyError, TypeError):
        choices = ", ".join(REQUIRED_SNR_DB)
        raise ValueError(f"modulation: must be one of {choices} (got {modulation!r})") from None


@dataclass(frozen=True)
class LinkInputs:
    """One link scenario; units are in the field names (SI otherwise).

    Defaults are representative, from memory, unless a source is named beside them.
    """

    distance_m: float = 200.0
    rain_rate_mm_h: float = 25.0  # used as P.530's R0.01; temperate-climate order of magnitude
    polarization: propagation.Polarization = "horizontal"  # larger P.838 loss: conservative
    # Sea-level conditions of the P.676 reference curves (P.835 mean annual global reference
    # atmosphere; from memory). Pressure is the dry-air pressure, as in P.676 Annex 1.
    pressure_hpa: float = 1013.25
    temperature_c: float = 15.0
    water_vapour_g_m3: float = 7.5
    extra_losses_db: tuple[tuple[str, float], ...] = ()  # (name, dB): foliage, building, body
    fade_margin_db: float = 3.0
    bandwidth_hz: float = 400e6  # widest NR FR2-1 channel (TS 38.101-2; from memory)
    noise_figure_db: float = 10.0
    required_snr_db: float = 10.0
    implementation_margin_db: float = 2.0
    rx_antenna_gain_dbi: float = 10.0
    n_elements: int = 64
    element_gain_dbi: float = 5.0
    feed_loss_db: float = 1.0
    scan_loss_db: float = 2.0
    backoff_db: float = 8.0  # P1dB above average power for OFDM (PAPR-driven)

    @property
    def extra_loss_db(self) -> float:
        """Sum of ``extra_losses_db`` (dB)."""
        return float(sum(value for _, value in self.extra_losses_db))


# (field, minimum, inclusive); a None minimum means any finite number.
_NUMERIC_RULES = (
    ("distance_m", 0.0, False), ("rain_rate_mm_h", 0.0, True), ("pressure_hpa", 0.0, False),
    ("temperature_c", -273.15, False), ("water_vapour_g_m3", 0.0, True),
    ("fade_margin_db", 0.0, True), ("bandwidth_hz", 0.0, False), ("noise_figure_db", 0.0, True),
    ("required_snr_db", None, False), ("implementation_margin_db", 0.0, True),
    ("rx_antenna_gain_dbi", None, False), ("element_gain_dbi", None, False),
    ("feed_loss_db", 0.0, True), ("scan_loss_db", 0.0, True), ("backoff_db", 0.0, True),
)  # fmt: skip


def _is_real(value: object) -> bool:
    return isinstance(value, int | float | np.integer | np.floating) and not isinstance(
        value, bool | np.bool_
    )


def _number_problem(value: object, minimum: float | None, inclusive: bool) -> str | None:
    if not _is_real(value):
        return f"must be a number (got {value!r})"
    if not math.isfinite(value):
        return "must be finite"
    if minimum is not None and (value < minimum or (value == minimum and not inclusive)):
        if minimum == 0.0:
            return "must be non-negative" if inclusive else "must be positive"
        return f"must be {'at least' if inclusive else 'greater than'} {minimum:g}"
    return None


def validate_link_inputs(inputs: LinkInputs) -> list[tuple[str, str]]:
    """List every problem in a link scenario, so a loader can report them all at once.

    Parameters
    ----------
    inputs : LinkInputs
        Scenario to check.

    Returns
    -------
    list of (str, str)
        ``(field, message)`` pairs, empty when the scenario is valid. Items of
        ``extra_losses_db`` are named ``extra_losses_db[i]``.

    Examples
    --------
    >>> from dataclasses import replace
    >>> validate_link_inputs(replace(LinkInputs(), distance_m=-1.0, n_elements=0))
    [('distance_m', 'must be positive'), ('n_elements', 'must be a whole number ≥ 1')]
    """
    problems = []
    for name, minimum, inclusive in _NUMERIC_RULES:
        message = _number_problem(getattr(inputs, name), minimum, inclusive)
        if message is not None:
            problems.append((name, message))
    n = inputs.n_elements
    if not isinstance(n, int | np.integer) or isinstance(n, bool) or n < 1:
        problems.append(("n_elements", "must be a whole number ≥ 1"))
    if inputs.polarization not in propagation.POLARIZATION_TILT_DEG:
        choices = ", ".join(propagation.POLARIZATION_TILT_DEG)
        problems.append(("polarization", f"must be one of {choices}"))
    extras = inputs.extra_losses_db
    if not isinstance(extras, tuple | list):
        problems.append(("extra_losses_db", "must be a sequence of (name, dB) pairs"))
        extras = ()
    for i, item in enumerate(extras):
        where = f"extra_losses_db[{i}]"
        if not isinstance(item, tuple | list) or len(item) != 2:
            problems.append((where, "must be a (name, dB) pair"))
            continue
        if not isinstance(item[0], str) or not item[0].strip():
            problems.append((where, "name must be a non-empty string"))
        message = _number_problem(item[1], 0.0, True)
        if message is not None:
            problems.append((where, f"loss {message}"))
    return problems


def _raise_if_invalid(inputs: LinkInputs) -> None:
    problems = validate_link_inputs(inputs)
    if problems:
        raise ValueError("; ".join(f"{name}: {message}" for name, message in problems))


@dataclass(frozen=True)
class LineItem:
    """One row of the link ledger: a value with its unit, source and formula."""

    group: Literal["Transmit", "Path", "Receive", "Margin", "Result"]
    name: str
    value: float
    unit: str
    source: str
    formula: str


@dataclass(frozen=True)
class LinkBudget:
    """Link ledger at one frequency and its key results (units as the attribute names say)."""

    f_hz: float
    items: tuple[LineItem, ...]
    path_loss_db: float  # FSPL + gases + rain + extra losses
    noise_floor_dbm: float
    sensitivity_dbm: float
    required_eirp_dbm: float
    p_avg_elem_dbm: float
    p1db_elem_dbm: float
    total_rf_power_w: float  # average conducted power of the whole array
    compliance_distance_m: float
    exposure_limit_w_per_m2: float
    exposure_caution: str = EXPOSURE_CAUTION

    def item(self, name: str) -> LineItem:
        """Return the ledger row called ``name`` (KeyError if absent)."""
        for row in self.items:
            if row.name == name:
                return row
        raise KeyError(name)

    def to_frame(self) -> pd.DataFrame:
        """Ledger as a DataFrame with columns group, name, value, unit, source, formula."""
        columns = ["group", "name", "value", "unit", "source", "formula"]
        return pd.DataFrame([[getattr(r, c) for c in columns] for r in self.items], columns=columns)


class _PathTerms(NamedTuple):
    fspl_db: np.ndarray
    gas_db_per_km: np.ndarray
    gas_db: np.ndarray
    rain_db_per_km: np.ndarray
    rain_factor: np.ndarray
    rain_db: np.ndarray
    total_db: np.ndarray


def _path_terms(f_hz: ArrayLike, x: LinkInputs) -> _PathTerms:
    d_km = x.distance_m / 1000.0
    fspl = propagation.free_space_path_loss_db(f_hz, x.distance_m)
    gas = propagation.gaseous_attenuation_db_per_km(
        f_hz, x.pressure_hpa, x.temperature_c, x.water_vapour_g_m3
    )
    rain = propagation.rain_path_terms(f_hz, x.distance_m, x.rain_rate_mm_h, x.polarization)
    total = fspl + gas * d_km + rain.attenuation_db + x.extra_loss_db
    return _PathTerms(
        fspl,
        gas,
        gas * d_km,
        rain.specific_attenuation_db_per_km,
        rain.reduction_factor,
        rain.attenuation_db,
        total,
    )


def _required_eirp_dbm(x: LinkInputs, path_loss_db: float) -> tuple[float, float, float]:
    # DESIGN.md §3 steps 2-3: noise floor, sensitivity and required EIRP (all dBm).
    noise = float(noise_floor_dbm(x.bandwidth_hz, x.noise_figure_db))
    sensitivity = noise + x.required_snr_db + x.implementation_margin_db
    return noise, sensitivity, sensitivity + path_loss_db + x.fade_margin_db - x.rx_antenna_gain_dbi


def total_path_loss_db(f_hz: ArrayLike, inputs: LinkInputs) -> np.ndarray | np.floating:
    """Total path loss (free space + gases + rain + extra losses) over frequency.

    Parameters
    ----------
    f_hz : array_like
        Frequencies (Hz), 1-350 GHz (the range of P.676-11 Annex 2); any shape.
    inputs : LinkInputs
        Scenario (distance, weather, extra losses).

    Returns
    -------
    numpy.ndarray or numpy.float64
        Loss (dB), shape of ``f_hz``. ValueError names every invalid field of ``inputs``.

    References
    ----------
    ITU-R P.525-4 §2.2, P.676-11 Annex 2, P.838-3, P.530-17 §2.4.1.

    Examples
    --------
    >>> f"{total_path_loss_db(28e9, LinkInputs(distance_m=1000.0, rain_rate_mm_h=0.0)):.4f}"
    '121.4924'
    """
    _raise_if_invalid(inputs)
    return _path_terms(f_hz, inputs).total_db


def worst_case_frequency_hz(
    f_low_hz: float, f_high_hz: float, inputs: LinkInputs, n_points: int = 101
) -> float:
    """Frequency of the largest total path loss on a uniform grid across a band.

    Usually the top edge, since free-space loss and rain attenuation rise with f across the
    mm-wave bands; near the 60 GHz oxygen complex (e.g. 57-71 GHz) or the 22.2 GHz water line
    the gaseous term can peak inside the band instead, which this search finds.

    Parameters
    ----------
    f_low_hz, f_high_hz : float
        Band edges (Hz), 0 < f_low < f_high, within 1-350 GHz.
    inputs : LinkInputs
        Scenario.
    n_points : int
        Grid points including both edges, ≥ 2.

    Returns
    -------
    float
        Frequency (Hz) of the grid maximum of :func:`total_path_loss_db`.

    Examples
    --------
    >>> f"{worst_case_frequency_hz(26.5e9, 29.5e9, LinkInputs()) / 1e9:.2f}"
    '29.50'
    """
    if not (_is_real(f_low_hz) and _is_real(f_high_hz) and 0.0 < f_low_hz < f_high_hz):
        raise ValueError("f_high_hz: must be greater than f_low_hz, both positive")
    if not isinstance(n_points, int) or n_points < 2:
        raise ValueError("n_points: must be an integer ≥ 2")
    f = np.linspace(f_low_hz, f_high_hz, n_points)
    return float(f[np.argmax(total_path_loss_db(f, inputs))])


def link_budget(
    f_hz: float,
    inputs: LinkInputs,
    exposure_limit_w_per_m2: float = DEFAULT_EXPOSURE_LIMIT_W_PER_M2,
) -> LinkBudget:
    """Link ledger at one frequency: DESIGN.md §3 steps 1-5 and 7.

    (1) total path loss L = FSPL + γ_gas·d + γ_R·d·r + extras; (2) noise floor N = kT0B + NF
    and sensitivity S = N + SNR_req + implementation margin; (3) required EIRP
    = S + L + fade margin − G_rx; (4) per-element average power of a uniform array;
    (5) P1dB = P_avg + back-off; (7) compliance distance for the average EIRP.

    Parameters
    ----------
    f_hz : float
        Frequency (Hz), 1-350 GHz. Pass the band's worst case, normally its top edge f_high:
        free-space loss and rain attenuation both rise with f across the mm-wave bands, so
        f_high needs the most EIRP. Near 60 GHz or 22 GHz use :func:`worst_case_frequency_hz`.
    inputs : LinkInputs
        Scenario.
    exposure_limit_w_per_m2 : float
        Power-density limit for the compliance distance (W/m²), > 0; the default 10 W/m² is
        the general-public level above a few GHz in common guidelines (from memory). Local
        regulation governs.

    Returns
    -------
    LinkBudget
        Ledger rows with sources and formulas, and the key results.

    Raises
    ------
    ValueError
        Listing every invalid field of ``inputs`` (``"field: message; ..."``), or for an
        ``f_hz`` that is not one frequency in 1-350 GHz.

    References
    ----------
    ITU-R P.525-4 §2.2; P.676-11 Annex 2; P.838-3; P.530-17 §2.4.1; array theory as in
    :func:`array_eirp_dbm`.

    Examples
    --------
    >>> budget = link_budget(29.5e9, LinkInputs())
    >>> f"{budget.required_eirp_dbm:.2f} dBm EIRP, P1dB {budget.p1db_elem_dbm:.2f} dBm"
    '37.42 dBm EIRP, P1dB 7.29 dBm'
    """
    if np.ndim(f_hz) != 0:
        raise ValueError("f_hz: must be a single frequency (the band's worst case)")
    _raise_if_invalid(inputs)
    x, f = inputs, float(f_hz)
    limit = float(as_checked_array("exposure_limit_w_per_m2", exposure_limit_w_per_m2, minimum=0))
    path = _path_terms(f, x)
    loss = float(path.total_db)
    noise, sensitivity, eirp = _required_eirp_dbm(x, loss)
    p_avg = float(
        per_element_power_dbm(
            eirp, x.n_elements, x.element_gain_dbi, x.feed_loss_db, x.scan_loss_db
        )
    )
    total_w = x.n_elements * 10.0 ** ((p_avg - 30.0) / 10.0)
    r_c = float(compliance_distance_m(eirp, limit))
    user = "User input"
    tau = propagation.POLARIZATION_TILT_DEG[x.polarization]
    weather = (
        f"p = {x.pressure_hpa:g} hPa (dry), T = {x.temperature_c:g} °C, "
        f"ρ = {x.water_vapour_g_m3:g} g/m³"
    )
    rows = [
        ("Path", "Frequency", f / 1e9, "GHz", "Caller (band worst case)", "f"),
        ("Path", "Path length", x.distance_m, "m", user, "d"),
        ("Path", "Free-space loss", path.fspl_db, "dB", "ITU-R P.525-4 §2.2",
         "20·log10(4π·d·f/c)"),
        ("Path", "Gaseous specific attenuation", path.gas_db_per_km, "dB/km",
         "ITU-R P.676-11 Annex 2 §1", f"γo + γw at {weather}"),
        ("Path", "Gaseous absorption", path.gas_db, "dB", "ITU-R P.676-11 Annex 2 §2.1", "γ·d"),
        ("Path", "Rain specific attenuation", path.rain_db_per_km, "dB/km",
         "ITU-R P.838-3 eqs (1)-(5)", f"k·R^α, R = {x.rain_rate_mm_h:g} mm/h, τ = {tau:g}°"),
        ("Path", "Rain distance factor r", path.rain_factor, "",
         "ITU-R P.530-17 §2.4.1 eq (32)" + (
             "; capped at 2.5 on this short path (a fixed-link method: conservative below ~1 km)"
             if path.rain_factor >= 2.5 - 1e-12 else ""),
         "1/(0.477·d^0.633·R^(0.073α)·f^0.123 − 10.579·(1 − e^(−0.024·d))), r ≤ 2.5"),
        ("Path", "Rain attenuation", path.rain_db, "dB", "ITU-R P.530-17 eq (33)", "γR·d·r"),
        *(("Path", f"Extra: {name}", v, "dB", user, "extra loss") for name, v in x.extra_losses_db),
        ("Path", "Total path loss", loss, "dB", "Subtotal", "FSPL + gases + rain + extra"),
        ("Receive", "Thermal noise density", noise_floor_dbm(1.0, 0.0), "dBm/Hz",
         "k = 1.380649e-23 J/K (SI), T0 = 290 K", "10·log10(k·T0 / 1 mW)"),
        ("Receive", "Bandwidth", 10.0 * math.log10(x.bandwidth_hz), "dB-Hz", user, "10·log10(B)"),
        ("Receive", "Noise figure", x.noise_figure_db, "dB", user, "NF"),
        ("Receive", "Noise floor", noise, "dBm", "Subtotal", "kT0 + 10·log10(B) + NF"),
        ("Receive", "Required SNR", x.required_snr_db, "dB", user, "SNR_req"),
        ("Receive", "Implementation margin", x.implementation_margin_db, "dB", user, "M_impl"),
        ("Receive", "Sensitivity", sensitivity, "dBm", "Subtotal", "N + SNR_req + M_impl"),
        ("Receive", "Rx antenna gain", x.rx_antenna_gain_dbi, "dBi", user, "G_rx"),
        ("Margin", "Fade margin", x.fade_margin_db, "dB", user, "M_fade"),
        ("Result", "Required EIRP", eirp, "dBm", "DESIGN.md §3 step 3",
         "sensitivity + total path loss + M_fade − G_rx"),
        ("Transmit", "Elements", x.n_elements, "", user, "N"),
        ("Transmit", "Array factor", 20.0 * math.log10(x.n_elements), "dB",
         "Coherent combining, uniform array", "20·log10(N): 10·log10(N) power + 10·log10(N) gain"),
        ("Transmit", "Element gain", x.element_gain_dbi, "dBi", user, "G_el"),
        ("Transmit", "Feed loss", x.feed_loss_db, "dB", user, "L_feed"),
        ("Transmit", "Scan loss", x.scan_loss_db, "dB", user, "L_scan"),
        ("Transmit", "Average power per element", p_avg, "dBm", "Subtotal",
         "EIRP − 20·log10(N) − G_el + L_feed + L_scan"),
        ("Transmit", "Back-off", x.backoff_db, "dB", user, "P1dB − P_avg (from PAPR)"),
        ("Result", "P1dB per element", p_avg + x.backoff_db, "dBm", "Subtotal", "P_avg + back-off"),
        ("Result", "Total average RF power", total_w, "W", "Subtotal", "N·P_avg"),
        ("Result", "Exposure limit", limit, "W/m²", "General-public level above a few GHz in "
         "common guidelines (from memory); local regulation governs", "S_lim"),
        ("Result", "Compliance distance", r_c, "m", "Far-field S = EIRP/(4π·r²)",
         "sqrt(EIRP/(4π·S_lim))"),
    ]  # fmt: skip
    return LinkBudget(
        f_hz=f,
        items=tuple(LineItem(g, n, float(v), u, s, fm) for g, n, v, u, s, fm in rows),
        path_loss_db=loss,
        noise_floor_dbm=noise,
        sensitivity_dbm=sensitivity,
        required_eirp_dbm=eirp,
        p_avg_elem_dbm=p_avg,
        p1db_elem_dbm=p_avg + x.backoff_db,
        total_rf_power_w=total_w,
        compliance_distance_m=r_c,
        exposure_limit_w_per_m2=limit,
    )


def array_sweep(f_hz: float, inputs: LinkInputs, n_values: ArrayLike) -> pd.DataFrame:
    """Per-element requirement versus array size N for the EIRP the link needs at ``f_hz``.

    Parameters
    ----------
    f_hz : float
        Frequency (Hz) at which the required EIRP is computed (as in :func:`link_budget`).
    inputs : LinkInputs
        Scenario; its ``n_elements`` is replaced by ``n_values``.
    n_values : array_like
        Element counts, whole numbers ≥ 1, shape ``(n,)``.

    Returns
    -------
    pandas.DataFrame
        ``n`` rows; columns ``n_elements`` (int), ``p_avg_elem_dbm``, ``p1db_elem_dbm``,
        ``eirp_dbm`` (the required EIRP, the same on every row) and ``total_rf_power_w``
        (average conducted power of the whole array).

    Raises
    ------
    ValueError
        As :func:`link_budget`, or for ``n_values`` that are not a non-empty 1-D array of
        whole numbers ≥ 1.

    Examples
    --------
    >>> sweep = array_sweep(29.5e9, LinkInputs(), [16, 32, 64])
    >>> [round(v, 2) for v in sweep["p_avg_elem_dbm"]]
    [11.33, 5.31, -0.71]
    """
    n = _element_count(n_values, "n_values")
    if n.ndim != 1 or n.size == 0:
        raise ValueError("n_values: must be a non-empty 1-D array of element counts")
    if np.ndim(f_hz) != 0:
        raise ValueError("f_hz: must be a single frequency (the band's worst case)")
    _raise_if_invalid(inputs)
    x = inputs
    _, _, eirp = _required_eirp_dbm(x, float(_path_terms(float(f_hz), x).total_db))
    p_avg = per_element_power_dbm(eirp, n, x.element_gain_dbi, x.feed_loss_db, x.scan_loss_db)
    return pd.DataFrame(
        {
            "n_elements": n.astype(np.int64),
            "p_avg_elem_dbm": p_avg,
            "p1db_elem_dbm": p_avg + x.backoff_db,
            "eirp_dbm": np.full(n.shape, eirp),
            "total_rf_power_w": n * 10.0 ** ((p_avg - 30.0) / 10.0),
        }
    )
