"""Benchmark of array sizing: ``array_plan`` on the demo study (run on demand).

Run from the repository root: ``python tests/benchmarks/bench_array.py``.

Target (product issue): a 1024-point array sweep across every candidate and band of the demo
study ≤ 50 ms median. Times, as medians in this process:

1. ``array_plan(study)``: N = 1…1024 for every band; one estimator solve covers every band's
   1024 P1dB targets (warm-started, :mod:`core.pa_warm`), then DC power and a vectorised PA
   cost; the second demo study (three bands) is timed too, for information;
2. ``sweep_p1db`` with 1024 P1dB targets (0…40 dBm), the estimator part alone.

Baseline, measured in the same run: a plain per-N loop — for each band and each N, the
per-element P1dB the link needs and one ``sweep_p1db`` call at that single target — timed on
16 N values per band and scaled to 1024. Its numbers are checked against ``array_plan``'s
(same rows, relative difference printed), so the ratio compares like with like.
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

import numpy as np

from core.estimate import sweep_p1db
from core.link import array_sweep
from core.link_plan import _worst_case_hz, array_plan, link_inputs
from core.resources import demo_path
from core.study import load_study

TARGET_MS = 50.0
N_BASELINE = 16


def median_ms(fn, repeat: int) -> float:
    fn()  # warm-up
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return 1e3 * statistics.median(times)


def per_n_loop(study, n_values: np.ndarray) -> dict[tuple[str, str, int], float]:
    """DC power of one PA per (band, candidate, N), one single-target sweep per N."""
    out = {}
    for band in study.bands:
        x = link_inputs(band)
        need = array_sweep(_worst_case_hz(band, x), x, n_values)["p1db_elem_dbm"].to_numpy()
        for n, p in zip(n_values, need, strict=True):
            df = sweep_p1db(study, np.array([p]))
            for _, row in df[df["band"] == band.name].iterrows():
                out[(band.name, row["candidate"], int(n))] = float(row["dc_power_w"])
    return out


def main() -> None:
    study = load_study(demo_path())
    plan = array_plan(study)
    sub = np.unique(np.geomspace(1, 1024, N_BASELINE).round().astype(np.int64))
    ref = per_n_loop(study, sub)
    worst = 0.0
    for (band, cand, n), dc in ref.items():
        row = plan[(plan.band == band) & (plan.candidate == cand) & (plan.n_elements == n)]
        got = float(row["array_dc_power_w"].iloc[0]) / n
        if np.isfinite(got):
            worst = max(worst, abs(got - dc) / abs(dc))
    t_plan = median_ms(lambda: array_plan(study), 21)
    rural = load_study(demo_path("rural-fwa-terminal"))
    t_rural = median_ms(lambda: array_plan(rural), 21)
    t_sweep = median_ms(lambda: sweep_p1db(study, np.linspace(0.0, 40.0, 1024)), 21)
    t_loop = median_ms(lambda: per_n_loop(study, sub), 3) * 1024 / sub.size
    n_rows = len(plan)
    flag = "meets" if t_plan <= TARGET_MS else "MISSES"
    print(f"array sizing benchmark, demo study ({n_rows} rows), medians")
    print(f"  agreement with the per-N loop ({sub.size} N per band): max rel Δ DC {worst:.1e}")
    print(f"  array_plan N=1..1024:          {t_plan:8.1f} ms  (target ≤ {TARGET_MS:g} ms: {flag})")
    print(f"  array_plan, rural demo:        {t_rural:8.1f} ms  ({len(array_plan(rural))} rows)")
    print(f"  sweep_p1db, 1024 targets:      {t_sweep:8.1f} ms")
    print(
        f"  per-N loop (scaled to 1024):   {t_loop:8.0f} ms  ratio {t_loop / t_plan:7.1f}× "
        "(loop / array_plan)"
    )


if __name__ == "__main__":
    main()
