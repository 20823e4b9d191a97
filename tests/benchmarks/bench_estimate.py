"""Benchmark of the PA estimator (run on demand: python tests/benchmarks/bench_estimate.py).

Times, as medians over repeated runs in this process:

1. ``evaluate`` on a 2-band (n257 + n260), 6-candidate study, 101 points per band (target
   median ≤ 5 ms);
2. ``evaluate`` on 12 bands × 10 candidates (target ≤ 100 ms);
3. ``sweep_p1db`` with 1024 P1dB targets on the 2-band study.

Baseline, measured in the same run: a plain-Python scalar loop of the same model (the core
formula chain of core.pa_design, one design and one frequency at a time, math module only,
written here from DESIGN.md §4). The baseline also reports how far its worst-case numbers are
from the vectorised ones, so the ratio compares like with like. Frames, findings and
derivations are not part of the baseline (they only exist in the vectorised path), so the
ratio slightly understates the speed-up of the model itself.
"""

from __future__ import annotations

import dataclasses
import math
import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

import numpy as np

from core.bands import FR2_PRESETS
from core.estimate import evaluate, sweep_p1db
from core.process import DEFAULT_CARDS
from core.study.model import (
    BandSpec,
    Candidate,
    CandidateKind,
    Combining,
    Study,
    Targets,
)

DB = 20.0 / math.log(10.0)


# --- studies -------------------------------------------------------------------------------


def _band(name: str, lo: float, hi: float, p1db: float = 27.0) -> BandSpec:
    return BandSpec(
        name=name,
        f_low_ghz=lo,
        f_high_ghz=hi,
        targets=Targets(gain_db=20.0, p1db_dbm=p1db, pae_pct=20.0),
    )


def two_band_study() -> Study:
    bands = tuple(
        _band(n, FR2_PRESETS[n].f_low_hz / 1e9, FR2_PRESETS[n].f_high_hz / 1e9)
        for n in ("n257", "n260")
    )
    cards = ("GaAs pHEMT 0.15 µm", "SiGe BiCMOS HBT 0.13 µm")
    cands = tuple(
        Candidate(name=f"{k.value} {c.split()[0]}", kind=k, process=c)
        for k in CandidateKind
        for c in cards
    )
    return dataclasses.replace(Study.new(), bands=bands, candidates=cands)


def big_study() -> Study:
    rng = np.random.default_rng(7)
    bands = []
    for i in range(12):
        lo = 24.0 + 2.2 * i
        bands.append(_band(f"b{i}", lo, lo + float(rng.uniform(0.8, 2.0)), 24.0 + i % 5))
    cards = list(DEFAULT_CARDS)
    cands = []
    for i in range(10):
        kind = list(CandidateKind)[i % 3]
        cands.append(
            Candidate(
                name=f"c{i}",
                kind=kind,
                process=cards[i % 4],
                combining=Combining.BAND_SELECT_SWITCH if i == 3 else Combining.SEPARATE_FEEDS,
            )
        )
    return dataclasses.replace(Study.new(), bands=tuple(bands), candidates=tuple(cands))


# --- plain-Python scalar baseline of the same chain ---------------------------------------


def _cheb_v(ratio: float, n: int, bw: float, f: float, f0: float) -> float:
    """v = a·|T_N(cos θ/cos θm)|/T_N(sec θm) of the exact equal-ripple transformer."""
    a = abs(ratio - 1.0) / (2.0 * math.sqrt(ratio))
    y = math.sin(math.pi * bw / 4.0)
    x = math.cos(0.5 * math.pi * f / f0) / y
    t = math.cosh(n * math.acosh(abs(x))) if abs(x) >= 1 else abs(math.cos(n * math.acos(x)))
    return a * t / math.cosh(n * math.acosh(1.0 / y))


def _scalar_candidate(study: Study, cand: Candidate) -> list[tuple[float, float, float]]:
    """Worst (gain, P1dB, PAE %) per band of one candidate, one frequency at a time."""
    card = study.card(cand.process)
    est = study.estimator
    bands = [b.band for b in study.bands]
    swing = card.vdd_v - card.v_knee_v
    ropt_w = 2.0 * swing / card.i_max_a_per_mm
    p1_w = swing * card.i_max_a_per_mm / 4.0 * 10 ** (-card.compression_db / 10.0)
    union = (min(b.f_low_hz for b in bands), max(b.f_high_hz for b in bands))
    f0s = [b.f0_hz for b in bands]
    if cand.kind == CandidateKind.SEPARATE:
        designs = [[i] for i in range(len(bands))]
    else:
        designs = [list(range(len(bands)))]
    out: list[tuple[float, float, float]] = [(0.0, 0.0, 0.0)] * len(bands)
    sel = (
        cand.band_select_loss_db
        if cand.kind == CandidateKind.SEPARATE
        and len(bands) > 1
        and cand.combining != Combining.SEPARATE_FEEDS
        else 0.0
    )
    for rows in designs:
        st = []  # per row: (grid, f0, bw, lo, hi, kappa)
        for i in rows:
            b = bands[i]
            lo, hi = union if cand.kind == CandidateKind.WIDEBAND else (b.f_low_hz, b.f_high_hz)
            kap = 1.0
            if cand.kind == CandidateKind.SWITCHED and f0s[i] < max(f0s) * (1 - 1e-12):
                kap = (max(f0s) / f0s[i]) ** (2.0 / cand.switched_elements)
            grid = [
                b.f_low_hz + (b.f_high_hz - b.f_low_hz) * k / (est.freq_points - 1)
                for k in range(est.freq_points)
            ]
            st.append((grid, 0.5 * (lo + hi), (hi - lo) / (0.5 * (lo + hi)), lo, hi, kap))
        top = max(s[4] for s in st) if cand.kind == CandidateKind.SWITCHED else st[0][4]
        cell = card.cell_width_mm * card.q_ref_hz / top
        p_req = [
            10 ** ((study.bands[i].targets.p1db_dbm + est.p1db_margin_db - 30) / 10) for i in rows
        ]

        def lsec(f: float, kap: float) -> tuple[float, float]:
            qu = card.q_passive * (f / card.q_ref_hz) ** card.q_exponent
            inv = 1.0 / qu + ((kap - 1.0) * f / card.switch_cutoff_hz if kap > 1 else 0.0)
            return DB * math.pi / 4.0 * inv, DB * math.pi / (4.0 * qu)

        bf = [math.exp(-1.0 / (2.0 * (s[4] - s[3]) * ropt_w * card.c_out_f_per_mm)) for s in st]
        vbf = [min(x, 1 - 1e-12) / math.sqrt(1 - min(x, 1 - 1e-12) ** 2) for x in bf]
        # Interstage networks (ratio = drive ratio), N_is chosen over the design's rows.
        best_is = math.inf
        is_loss: list[float] = []
        for n in range(1, est.max_sections + 1):
            per = []
            for j, (grid, f0, bw, _, _, kap) in enumerate(st):
                w = 0.0
                for f in grid:
                    v = max(_cheb_v(est.drive_ratio, n, bw, f, f0), vbf[j])
                    w = max(w, n * lsec(f, kap)[0] + 10 * math.log10(1 + v * v))
                per.append(w)
            if max(per) < best_is:
                best_is, is_loss = max(per), per
        gst = [20 * math.log10(card.fmax_hz / s[4]) - card.stage_derating_db for s in st]
        eta = [
            card.drain_eff_untuned_pct / 100
            + (card.drain_eff_tuned_pct - card.drain_eff_untuned_pct)
            / 100
            * min(1.0, card.harmonic_bw_pct / 100 / s[2])
            for s in st
        ]
        head = [gst[j] - 1 - 10 * math.log10(est.drive_ratio) - is_loss[j] for j in range(len(st))]
        w_out = max(p_req) / p1_w
        for _ in range(200):  # plain fixed point W ← W_req(W) (contracting)
            n_cells = min(max(1, math.ceil(w_out / cell - 1e-9)), card.max_cells)
            w_eff = min(w_out, card.max_cells * cell)
            levels = max(0, math.ceil(math.log2(n_cells) - 1e-9))
            ratio = 50.0 * w_eff / ropt_w
            best, best_n, row_loss = math.inf, 1, []
            for n in range(1, est.max_sections + 1):  # the N needing the least periphery
                per = []
                for j, (grid, f0, bw, _, _, kap) in enumerate(st):
                    worst = 0.0
                    for f in grid:
                        ls, lp = lsec(f, kap)
                        v = max(_cheb_v(ratio, n, bw, f, f0), vbf[j])
                        worst = max(worst, n * ls + 10 * math.log10(1 + v * v) + levels * lp)
                    per.append(worst + sel + max(0.0, -head[j]))
                score = max(10 * math.log10(p_req[j]) + per[j] for j in range(len(st)))
                if score < best:
                    best, best_n, row_loss = score, n, per
            need = max(p_req[j] / (p1_w * 10 ** (-row_loss[j] / 10)) for j in range(len(st)))
            if abs(need - w_out) <= 1e-12 * w_out:
                break
            w_out = need
        n_stages = est.max_stages
        for n_st in range(1, est.max_stages + 1):
            ok = True
            for j, (grid, f0, bw, _, _, kap) in enumerate(st):
                g_req = study.bands[rows[j]].targets.gain_db + est.gain_margin_db
                for f in grid:
                    ls, lp = lsec(f, kap)
                    v = max(_cheb_v(ratio, best_n, bw, f, f0), vbf[j])
                    loss = best_n * ls + 10 * math.log10(1 + v * v) + levels * lp
                    ok &= n_st * (gst[j] - is_loss[j]) - loss >= g_req - 1e-12
            if ok:
                n_stages = n_st
                break
        if cand.stages:
            n_stages = cand.stages
        w_drv = w_eff * sum(est.drive_ratio**-k for k in range(1, n_stages))
        p_dev = p1_w * w_eff
        for j, (grid, f0, bw, _, _, kap) in enumerate(st):
            dc = p_dev / eta[j] + card.vdd_v * card.driver_bias_pct / 100 * (
                card.i_max_a_per_mm * w_drv
            )
            g_min = p_min = pae_min = math.inf
            for f in grid:
                ls, lp = lsec(f, kap)
                v = max(_cheb_v(ratio, best_n, bw, f, f0), vbf[j])
                out_l = best_n * ls + 10 * math.log10(1 + v * v) + levels * lp
                gain = n_stages * (gst[j] - is_loss[j]) - out_l
                d = max(0.0, -head[j]) if n_stages >= 2 else 0.0
                p1 = 10 * math.log10(p_dev * 1e3) - out_l - sel - d
                pout = 10 ** ((p1 - 30) / 10)
                pae = (pout - pout / 10 ** ((gain - 1) / 10)) / dc
                g_min, p_min, pae_min = min(g_min, gain), min(p_min, p1), min(pae_min, pae)
            out[rows[j]] = (g_min, p_min, 100 * pae_min)
    return out


def scalar_study(study: Study) -> list[list[tuple[float, float, float]]]:
    return [_scalar_candidate(study, c) for c in study.candidates if c.enabled]


# --- timing --------------------------------------------------------------------------------


def median_ms(fn, repeat: int) -> float:
    fn()  # warm-up
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return 1e3 * statistics.median(times)


def agreement(study: Study) -> float:
    ev = evaluate(study)
    ref = scalar_study(study)
    worst = 0.0
    names = [c.name for c in study.candidates if c.enabled]
    for name, per_band in zip(names, ref, strict=True):
        for b, vals in zip(study.bands, per_band, strict=True):
            sc = ev.scorecard[(ev.scorecard.candidate == name) & (ev.scorecard.band == b.name)]
            est = dict(zip(sc.metric, sc.estimate, strict=True))
            worst = max(
                worst,
                *(abs(est[m] - v) for m, v in zip(("gain", "p1db", "pae"), vals, strict=True)),
            )
    return worst


def main() -> None:
    small, big = two_band_study(), big_study()
    print("PA estimator benchmark (medians; baseline = plain-Python scalar loop, same run)")
    for label, study, rep, target in (
        ("evaluate, 2 bands × 6 candidates × 101 points", small, 200, 5.0),
        ("evaluate, 12 bands × 10 candidates × 101 points", big, 20, 100.0),
    ):
        t_vec = median_ms(lambda s=study: evaluate(s), rep)
        t_ref = median_ms(lambda s=study: scalar_study(s), 3)
        diff = agreement(study)
        flag = "ok" if t_vec <= target else "ABOVE TARGET"
        print(
            f"  {label}: {t_vec:8.2f} ms (target ≤ {target:g} ms, {flag}); scalar "
            f"{t_ref:9.1f} ms; ratio {t_ref / t_vec:7.1f}×; max |Δ| vs scalar {diff:.2e}"
        )
    x = np.linspace(0.0, 40.0, 1024)
    t_sweep = median_ms(lambda: sweep_p1db(small, x), 7)
    # Scalar baseline of the sweep: the scalar model once per target, timed on 16 targets.
    sub = np.linspace(0.0, 40.0, 16)

    def scalar_sweep() -> None:
        for t in sub:
            bands = tuple(
                dataclasses.replace(b, targets=dataclasses.replace(b.targets, p1db_dbm=float(t)))
                for b in small.bands
            )
            scalar_study(dataclasses.replace(small, bands=bands))

    t_ref = median_ms(scalar_sweep, 1) * 1024 / sub.size
    print(
        f"  sweep_p1db, 1024 targets, 2 bands × 6 candidates: {t_sweep:8.1f} ms; scalar "
        f"(16 targets, scaled to 1024) {t_ref:9.0f} ms; ratio {t_ref / t_sweep:7.1f}×"
    )


if __name__ == "__main__":
    main()
