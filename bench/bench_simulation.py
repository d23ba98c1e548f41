"""Time-domain throughput: the exact first-order-hold integrator against scipy.signal.lsim.

Both integrate the same seeded force records of a 2-DOF structure + TMD
(the Harbourline-like demo design: 0.17 Hz, M* = 1.9e7 kg, mu = 0.03) with
the same first-order hold, so they must agree to round-off; the script
prints that agreement, the medians of interleaved repeats and the ratio.
Then it times the whole `tmd.simulation.simulate` of 200 records of 600 s at
20 Hz (bare and damped), the case the issue sets at "a few seconds".

Run: ``python bench/bench_simulation.py``. The last line is ``ratio: N``.
"""

from __future__ import annotations

import os
import platform
import statistics
import time

import numpy as np
from scipy import signal

from tmd.dampers.absorber import Absorbers, single_tmd
from tmd.simulation import SimulationSettings, simulate
from tmd.spectra import FirstOrderSpectrum
from tmd.timehistory import StateSpace, force_records, integrate_linear, periodic_steady_state

FS, MASS, ZETA = 0.17, 1.9e7, 0.012
TMD = single_tmd(FS, MASS, 0.03, 0.985, 0.085)
LOAD = FirstOrderSpectrum(4.0e10, 0.05, f_max_hz=10.0)
DT, PERIOD, RECORDS, REPEATS = 0.05, 600.0, 20, 5


def _cpu() -> str:
    try:
        with open("/proc/cpuinfo") as f:
            for line in f:
                if line.startswith("model name"):
                    return line.split(":", 1)[1].strip()
    except OSError:
        pass
    return platform.processor() or "unknown CPU"


def main() -> None:
    print(f"machine: {_cpu()}, {os.cpu_count()} cores")
    system = StateSpace.of(FS, MASS, ZETA, TMD)
    force = force_records(LOAD, period_s=PERIOD, time_step_s=DT, n_periods=RECORDS,
                          rng=np.random.default_rng(1))
    x0 = periodic_steady_state(system, force, DT)
    t = np.arange(force.shape[1]) * DT
    lti = (system.a, system.b[:, None], np.eye(system.size), np.zeros((system.size, 1)))
    ours, theirs = [], []
    for _ in range(REPEATS):
        start = time.perf_counter()
        states = integrate_linear(system, force, DT, x0)
        ours.append(time.perf_counter() - start)
        start = time.perf_counter()
        ref = np.stack([signal.lsim(lti, force[i], t, X0=x0[i], interp=True)[2]
                        for i in range(RECORDS)])
        theirs.append(time.perf_counter() - start)
    error = float(np.max(np.abs(states - ref) / np.abs(ref).max(axis=(0, 1))))
    samples = force.size
    t_ours, t_lsim = statistics.median(ours), statistics.median(theirs)
    print(f"{RECORDS} records x {force.shape[1]} samples, medians of {REPEATS} interleaved "
          "repeats")
    print(f"  exact first-order hold (tmd.timehistory): {samples / t_ours:12,.0f} samples/s")
    print(f"  loop of scipy.signal.lsim (interp=True):  {samples / t_lsim:12,.0f} samples/s")
    print(f"  largest difference, relative to each state's range: {error:.1e}")
    start = time.perf_counter()
    settings = SimulationSettings(records=200, duration_s=600.0, time_step_s=DT, seed=1)
    simulate(FS, MASS, ZETA, Absorbers.none(), LOAD, settings)
    simulate(FS, MASS, ZETA, TMD, LOAD, settings)
    print(f"simulate(): 200 records of 600 s at 20 Hz, bare + damped: "
          f"{time.perf_counter() - start:.1f} s wall")
    print(f"ratio: {t_lsim / t_ours:.0f}")


if __name__ == "__main__":
    main()
