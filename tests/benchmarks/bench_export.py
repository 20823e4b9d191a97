"""Benchmark: comparison workbook export of the demo study and of 50 bands × 20 candidates.

Run on demand: ``python tests/benchmarks/bench_export.py``. Targets: demo median <= 1 s,
50 × 20 median <= 5 s. Baseline, measured in the same run: a bare openpyxl workbook holding the
same curve table (ws.append of every row, then save), i.e. the floor set by the library.

Until core.estimate lands, the evaluation tables are the test suite's evaluation-shaped tables
(101 frequency points per band, as the estimator's default grid), so the cell counts are real.
"""

import dataclasses
import io
import statistics
import sys
import tempfile
import time
from pathlib import Path

import openpyxl

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "core"))
from test_export import _cost, _evaluation

from core.export import write_workbook
from core.link_plan import study_ledgers
from core.resources import demo_path
from core.study import Candidate, CandidateKind, load_study


def median_s(func, repeats):
    times = []
    for _ in range(repeats):
        t = time.perf_counter()
        func()
        times.append(time.perf_counter() - t)
    return statistics.median(times)


def baseline(curves):
    wb = openpyxl.Workbook()
    ws = wb.active
    for row in curves.itertuples(index=False):
        ws.append(list(row))
    wb.save(io.BytesIO())


def main():
    demo = load_study(demo_path())
    base = demo.bands[0]
    big = dataclasses.replace(
        demo,
        bands=tuple(
            dataclasses.replace(base, name=f"b{i}", f_low_ghz=20 + i, f_high_ghz=20.8 + i)
            for i in range(50)
        ),
        candidates=tuple(
            Candidate(f"cand {i}", list(CandidateKind)[i % 3], demo.process_cards[i % 2].name)
            for i in range(20)
        ),
    )
    out = Path(tempfile.mkdtemp()) / "bench.xlsx"
    for label, study, repeats, target in (("demo", demo, 7, 1.0), ("50x20", big, 3, 5.0)):
        ev, cost, ledgers = _evaluation(study, n_freq=101), _cost(study), study_ledgers(study)
        t = median_s(
            lambda s=study, e=ev, c=cost, g=ledgers: write_workbook(s, e, out, cost=c, ledgers=g),
            repeats,
        )
        b = median_s(lambda e=ev: baseline(e.curves), repeats)
        print(
            f"{label}: {len(ev.curves)} curve rows, median {t:.3f} s (target <= {target:g} s), "
            f"bare-openpyxl curve table {b:.3f} s, ratio {t / b:.2f}"
        )


if __name__ == "__main__":
    main()
