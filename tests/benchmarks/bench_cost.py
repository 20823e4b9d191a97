"""Benchmark: best-offset whole-die count on a 200 mm wafer with a 1 mm² die.

Run on demand: ``python tests/benchmarks/bench_cost.py``. Target: median <= 20 ms.

Baseline, measured in the same run: a naive Python double loop over die sites at one fixed
offset (farthest-corner test per site). A naive search as exact as ours would count at every
x offset of our sweep times every y breakpoint (two per grid column); timing that in full would
take minutes, so the naive counter is timed at a few offsets and scaled linearly by the number
of offsets. A second, lower-bound ratio scales it by the x offsets alone (one y per x).
"""

import math
import statistics
import time

import numpy as np

from core.cost import _MIN_OFFSETS, _SWEEP_BUDGET, count_whole_dies

WAFER_MM, DIE_MM, SCRIBE_MM, EDGE_MM = 200.0, 1.0, 0.1, 3.0
REPEATS = 31
NAIVE_OFFSETS = 5


def naive_count(r, px, py, ox, oy):
    """Whole pitch cells inside the circle, by looping over every site."""
    n_i, n_j = math.ceil(r / px) + 1, math.ceil(r / py) + 1
    count = 0
    for i in range(-n_i, n_i + 1):
        x = abs(ox + i * px) + px / 2
        for j in range(-n_j, n_j + 1):
            y = abs(oy + j * py) + py / 2
            if x * x + y * y <= r * r:
                count += 1
    return count


def median_s(func, repeats):
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        func()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def main():
    r, p = WAFER_MM / 2 - EDGE_MM, DIE_MM + SCRIBE_MM
    args = (WAFER_MM, DIE_MM, DIE_MM, EDGE_MM, SCRIBE_MM)
    grid = count_whole_dies(*args)  # warm-up, and the result to report
    t_search = median_s(lambda: count_whole_dies(*args), REPEATS)
    t_fixed = median_s(lambda: count_whole_dies(*args, offset_mm=(0.3, 0.7)), REPEATS)

    rng = np.random.default_rng(0)
    offsets = rng.uniform(0.0, p, size=(NAIVE_OFFSETS, 2))
    for ox, oy in offsets[:2]:  # the naive counter must agree with ours at a fixed offset
        assert naive_count(r, p, p, ox, oy) == count_whole_dies(*args, offset_mm=(ox, oy)).count
    t_naive = statistics.median(median_s(lambda o=o: naive_count(r, p, p, *o), 3) for o in offsets)

    n_columns = 2 * math.ceil(r / p) + 3
    n_x = max(_MIN_OFFSETS, _SWEEP_BUDGET // n_columns)
    n_equivalent = n_x * 2 * n_columns
    print(
        f"count_whole_dies: {WAFER_MM:g} mm wafer, {DIE_MM:g} x {DIE_MM:g} mm die, "
        f"{SCRIBE_MM:g} mm scribe, {EDGE_MM:g} mm edge exclusion -> {grid.count} dies"
    )
    print(f"  offset search, median of {REPEATS}:  {t_search * 1e3:8.2f} ms  (target <= 20 ms)")
    print(f"  one fixed offset, median of {REPEATS}: {t_fixed * 1e3:8.3f} ms")
    print(
        f"  naive loop, one offset (median of {NAIVE_OFFSETS} offsets x 3): "
        f"{t_naive * 1e3:8.2f} ms; ratio to one vectorised offset {t_naive / t_fixed:8.0f}x"
    )
    print(
        f"  naive search, same exactness ({n_x} x offsets x {2 * n_columns} y breakpoints = "
        f"{n_equivalent} counts, scaled): {t_naive * n_equivalent:8.1f} s; "
        f"ratio {t_naive * n_equivalent / t_search:10.0f}x"
    )
    print(
        f"  naive search, lower bound ({n_x} x offsets, one y each, scaled): "
        f"{t_naive * n_x:8.2f} s; ratio {t_naive * n_x / t_search:8.0f}x"
    )


if __name__ == "__main__":
    main()
