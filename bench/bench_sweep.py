"""Benchmark of the detuning sweeps: one batched engine call vs a loop of single calls.

Run: python bench/bench_sweep.py

Both evaluate the same 41-point structure-frequency sweep of the demo's
nominal design (fictional demo case); the results are checked equal to
1e-12 before the times are compared. The last line is ``ratio: N``, the
loop's time over the batched sweep's.
"""

from __future__ import annotations

import time
import warnings
from pathlib import Path

import numpy as np

from tmd.design import LoadedMode, least_mass
from tmd.robust import assess_structure_factors, factor_grid, robustness_study
from tmd.spectra import read_force_psd_csv
from tmd.structure import Mode

CSV = Path(__file__).resolve().parents[1] / "cases" / "harbourline_force.csv"
REPEATS = 5


def best_time(fn):
    times = []
    for _ in range(REPEATS):
        start = time.perf_counter()
        fn()
        times.append(time.perf_counter() - start)
    return min(times)


def main():
    warnings.simplefilter("ignore")
    case = LoadedMode(Mode(0.17, 1.9e7, 0.012), read_force_psd_csv(CSV), 600.0)
    damper = least_mass(case, 0.10, max_mass_ratio=0.05).design.damper
    s = factor_grid(0.20, 41)

    def batched():
        return assess_structure_factors(case, damper, s)[0].peak_acceleration_m_s2

    def loop():
        return np.array([assess_structure_factors(case, damper, np.array([x]))[0]
                         .peak_acceleration_m_s2[0] for x in s])

    np.testing.assert_allclose(batched(), loop(), rtol=1e-12)
    t_batch, t_loop = best_time(batched), best_time(loop)
    start = time.perf_counter()
    robustness_study(case, damper, 0.10, frequency_band=0.15, max_mass_ratio=0.12)
    t_study = time.perf_counter() - start
    print(f"41-point sweep, batched: {1e3 * t_batch:.2f} ms; loop of single calls: "
          f"{1e3 * t_loop:.2f} ms")
    print(f"robustness_study on the demo (sweeps, band maximum, robust design): {t_study:.2f} s")
    print(f"ratio: {t_loop / t_batch:.1f}")


if __name__ == "__main__":
    main()
