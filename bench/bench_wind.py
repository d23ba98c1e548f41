"""Benchmark of the wind load: the documented maximum n_strips = 400, and return-period reuse.

Run: python bench/bench_wind.py

On the fictional Kestrel Point demo's site and building (cases/kestrel_point.toml):

1. one modal force spectrum with n_strips = 400 (the documented maximum):
   CPU and wall time and the process's peak resident memory; the goal is
   <= 30 s and <= 1 GB on this machine (issue "Trust" item 9, issue "Speed");
2. the demo's return periods with its own n_strips, as separate strip
   computations (tmd.loads.modal_force_spectrum per period) against one
   computation scaled to every period (tmd.loads.modal_force_spectra):
   medians of REPEATS interleaved repeats, the tables checked equal at the
   scaled nodes (to 1e-12) before the times are compared.

The machine's CPU model, cores and load are printed; the last line is
``ratio: N``, separate over scaled.
"""

from __future__ import annotations

import os
import resource
import statistics
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
from bench_engine import machine  # noqa: E402

from tmd.case import read_case  # noqa: E402
from tmd.loads import modal_force_spectra, modal_force_spectrum  # noqa: E402

CASE = Path(__file__).resolve().parents[1] / "cases" / "kestrel_point.toml"
REPEATS = 5
MAX_STRIPS = 400


def timed(fn):
    cpu, wall = time.process_time(), time.perf_counter()
    value = fn()
    return time.process_time() - cpu, time.perf_counter() - wall, value


def main():
    print(machine())
    case = read_case(CASE)
    site, building, w = case.site, case.building, case.wind_settings
    periods = [load.return_period_years for load in case.wind_loads]
    before = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    cpu, wall, table = timed(lambda: modal_force_spectrum(
        site, building, case.target_return_period_years, spectrum=w["spectrum"],
        coherence=w["coherence"], n_strips=MAX_STRIPS))
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(f"n_strips = {MAX_STRIPS}: {cpu:.1f} s CPU, {wall:.1f} s wall, peak resident memory "
          f"{peak:.0f} MB (before: {before:.0f} MB); {table.frequency_hz.size} frequencies")
    print(f"goal: <= 30 s and <= 1 GB: CPU time {'met' if cpu <= 30 else 'NOT met'}, wall time "
          f"{'met' if wall <= 30 else 'NOT met'} (the machine may be shared), memory "
          f"{'met' if peak <= 1024 else 'NOT met'}")

    def separate():
        return [modal_force_spectrum(site, building, t, spectrum=w["spectrum"],
                                     coherence=w["coherence"], n_strips=w["n_strips"],
                                     frequency_hz=s.frequency_hz)
                for t, s in zip(periods, scaled_tables, strict=True)]

    def scaled():
        return modal_force_spectra(site, building, periods,
                                   reference_period_years=case.target_return_period_years,
                                   spectrum=w["spectrum"], coherence=w["coherence"],
                                   n_strips=w["n_strips"])

    scaled_tables = scaled()
    error = max(float(np.max(np.abs(a.psd_n2_per_hz / b.psd_n2_per_hz - 1)))
                for a, b in zip(scaled_tables, separate(), strict=True))
    assert error < 1e-12, error
    times = {"separate": [], "scaled": []}
    for _ in range(REPEATS):
        times["separate"].append(timed(separate)[0])
        times["scaled"].append(timed(scaled)[0])
    sep, sca = (statistics.median(times[k]) for k in ("separate", "scaled"))
    print(f"{len(periods)} return periods, {w['n_strips']} strips: separate {sep:.2f} s CPU, "
          f"scaled {sca:.2f} s CPU (medians of {REPEATS}); largest difference {error:.1e}")
    print(f"cores: {os.cpu_count()}")
    print(f"ratio: {sep / sca:.1f}")


if __name__ == "__main__":
    main()
