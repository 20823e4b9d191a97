"""Benchmark of core.link: array sweeps and full ledgers against a plain-Python baseline.

Run from the repository root (plain script, not collected by pytest):

    python -m tests.benchmarks.bench_link

Targets (from the link-planner brief): a 1024-point array sweep (N = 1..1024) for every band
≤ 50 ms in total, and a full ledger for 12 bands ≤ 5 ms in total. The baseline is the same
arithmetic written as scalar ``math`` loops (line-by-line gas sums, one N at a time), timed in
the same run; the ratio printed is baseline time / core.link time.
"""

import math
import statistics
import timeit

import numpy as np

from core import link, propagation

# 3GPP TS 38.101-2 FR2 operating bands (check-values.md §5), then user bands (representative).
BANDS_GHZ = (
    ("n257", 26.5, 29.5), ("n258", 24.25, 27.5), ("n259", 39.5, 43.5), ("n260", 37.0, 40.0),
    ("n261", 27.5, 28.35), ("n262", 47.2, 48.2), ("n263", 57.0, 71.0),
    ("K 24-26", 24.0, 26.0), ("Ka 31.8-33.4", 31.8, 33.4), ("Q 40.5-43.5", 40.5, 43.5),
    ("V 45.5-47", 45.5, 47.0), ("E 81-86", 81.0, 86.0),
)  # fmt: skip
SWEEP_BANDS = BANDS_GHZ[:7]
N_VALUES = np.arange(1, 1025)
INPUTS = link.LinkInputs(extra_losses_db=(("foliage", 3.0), ("body", 3.0)))
REPEATS = 41


def _gas_scalar(f_ghz: float, p: float, t_c: float, rho: float) -> float:
    # P.676-11 Annex 2, the same equations as core.propagation, one line at a time.
    t_k = t_c + 273.15
    theta = 300.0 / t_k
    e = rho * t_k / 216.7
    n_ox = 0.0
    for f0, a1, a2, a3, a4, a5, a6 in propagation._OXYGEN_TABLE:
        s = a1 * 1e-7 * p * theta**3 * math.exp(a2 * (1 - theta))
        w = a3 * 1e-4 * (p * theta ** (0.8 - a4) + 1.1 * e * theta)
        dl = (a5 + a6 * theta) * 1e-4 * (p + e) * theta**0.8
        n_ox += (
            s
            * (f_ghz / f0)
            * (
                (w - dl * (f0 - f_ghz)) / ((f0 - f_ghz) ** 2 + w**2)
                + (w - dl * (f0 + f_ghz)) / ((f0 + f_ghz) ** 2 + w**2)
            )
        )
    d = 5.6e-4 * (p + e) * theta**0.8
    n_ox += (
        f_ghz
        * p
        * theta**2
        * (
            6.14e-5 / (d * (1 + (f_ghz / d) ** 2))
            + 1.4e-12 * p * theta**1.5 / (1 + 1.9e-5 * f_ghz**1.5)
        )
    )
    n_w = 0.0
    for f0, b1, b2, b3, b4, b5, b6 in propagation._WATER_TABLE_ANNEX2:
        s = b1 * 0.1 * e * theta**3.5 * math.exp(b2 * (1 - theta))
        w = b3 * 1e-4 * (p * theta**b4 + b5 * e * theta**b6)
        n_w += s * (f_ghz / f0) * (w / ((f0 - f_ghz) ** 2 + w**2) + w / ((f0 + f_ghz) ** 2 + w**2))
    return 0.1820 * f_ghz * (n_ox + n_w)


def _rain_scalar(f_ghz: float, x: link.LinkInputs) -> tuple[float, float]:
    # P.838-3 γ_R and the P.530-17 distance factor, scalar.
    lf = math.log10(f_ghz)

    def fit(abc, lin):
        return sum(
            a * math.exp(-(((lf - b) / c) ** 2)) for a, b, c in zip(*abc, strict=True)
        ) + lin[0] * lf + lin[1]  # fmt: skip

    kh, kv = (
        10 ** fit(propagation._P838_KH, propagation._P838_KH_LIN),
        10 ** fit(propagation._P838_KV, propagation._P838_KV_LIN),
    )
    ah, av = (
        fit(propagation._P838_AH, propagation._P838_AH_LIN),
        fit(propagation._P838_AV, propagation._P838_AV_LIN),
    )
    mix = math.cos(math.radians(2 * propagation.POLARIZATION_TILT_DEG[x.polarization]))
    k = (kh + kv + (kh - kv) * mix) / 2
    alpha = (kh * ah + kv * av + (kh * ah - kv * av) * mix) / (2 * k)
    d = x.distance_m / 1e3
    den = 0.477 * d**0.633 * x.rain_rate_mm_h ** (0.073 * alpha) * f_ghz**0.123 - 10.579 * (
        1 - math.exp(-0.024 * d)
    )
    return k * x.rain_rate_mm_h**alpha, (2.5 if den < 0.4 else 1 / den)


def _eirp_scalar(f_ghz: float, x: link.LinkInputs) -> float:
    d_km = x.distance_m / 1e3
    fspl = 20 * math.log10(4 * math.pi * x.distance_m * f_ghz * 1e9 / 299_792_458.0)
    gamma_r, r = _rain_scalar(f_ghz, x)
    loss = fspl + _gas_scalar(f_ghz, x.pressure_hpa, x.temperature_c, x.water_vapour_g_m3) * d_km
    loss += gamma_r * d_km * r + sum(v for _, v in x.extra_losses_db)
    noise = 10 * math.log10(1.380649e-23 * 290.0 * x.bandwidth_hz / 1e-3) + x.noise_figure_db
    sens = noise + x.required_snr_db + x.implementation_margin_db
    return sens + loss + x.fade_margin_db - x.rx_antenna_gain_dbi


def baseline_sweeps() -> list[list[tuple[float, float, float, float]]]:
    out = []
    for _, _, f_high in SWEEP_BANDS:
        eirp = _eirp_scalar(f_high, INPUTS)
        rows = []
        for n in range(1, 1025):
            p = eirp - 20 * math.log10(n) - INPUTS.element_gain_dbi
            p += INPUTS.feed_loss_db + INPUTS.scan_loss_db
            rows.append((p, p + INPUTS.backoff_db, eirp, n * 10 ** ((p - 30) / 10)))
        out.append(rows)
    return out


def baseline_ledgers() -> list[tuple[float, ...]]:
    out = []
    x = INPUTS
    for _, _, f_high in BANDS_GHZ:
        eirp = _eirp_scalar(f_high, x)
        p = eirp - 20 * math.log10(x.n_elements) - x.element_gain_dbi
        p += x.feed_loss_db + x.scan_loss_db
        r_c = math.sqrt(10 ** ((eirp - 30) / 10) / (4 * math.pi * 10.0))
        out.append((eirp, p, p + x.backoff_db, r_c))
    return out


def core_sweeps():
    return [link.array_sweep(f * 1e9, INPUTS, N_VALUES) for _, _, f in SWEEP_BANDS]


def core_ledgers():
    return [link.link_budget(f * 1e9, INPUTS) for _, _, f in BANDS_GHZ]


def _median_ms(func) -> float:
    func()  # warm-up
    return 1e3 * statistics.median(timeit.repeat(func, number=1, repeat=REPEATS))


def main() -> None:
    # Same numbers both ways, or the timing comparison would mean nothing.
    ours = core_sweeps()
    base = baseline_sweeps()
    worst = max(
        float(np.max(np.abs(frame["p1db_elem_dbm"].to_numpy() - [r[1] for r in rows])))
        for frame, rows in zip(ours, base, strict=True)
    )
    worst_ledger = max(
        abs(b.p1db_elem_dbm - r[2]) for b, r in zip(core_ledgers(), baseline_ledgers(), strict=True)
    )
    print(f"agreement with baseline: sweep {worst:.1e} dB, ledger {worst_ledger:.1e} dB")
    cases = [
        (f"array sweep N=1..1024 × {len(SWEEP_BANDS)} bands", core_sweeps, baseline_sweeps, 50.0),
        (f"full ledger × {len(BANDS_GHZ)} bands", core_ledgers, baseline_ledgers, 5.0),
    ]
    print(f"median of {REPEATS} runs; ratio = plain-Python baseline / core.link")
    for name, ours_fn, base_fn, target_ms in cases:
        t_ours, t_base = _median_ms(ours_fn), _median_ms(base_fn)
        verdict = "meets" if t_ours <= target_ms else "MISSES"
        print(
            f"{name:<36} core.link {t_ours:8.3f} ms  baseline {t_base:8.3f} ms  "
            f"ratio {t_base / t_ours:6.2f}  target ≤ {target_ms:g} ms: {verdict}"
        )


if __name__ == "__main__":
    main()
