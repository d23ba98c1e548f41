"""Benchmark of the n-mode engine and of the whole-building job.

Run: python bench/bench_building.py [--jobs]

1. A fictional 3-mode (x, y, torsion), 2-TMD tower under a band-limited
   smooth load: designs per second of the batched engine
   (tmd.modal_response) for four outputs (a corner's a_x and a_y, both
   strokes) against a loop of scipy.integrate.quad calls (one per output and
   design) with the closed-loop resonances as breakpoints, epsrel = 1e-8.
   Both errors are printed against a tight quad reference (epsrel 1e-12), so
   the engine is at least as accurate as the quad loop it is compared with.
2. With --jobs: the full demo job (cases/building/corvid_spire.toml, three modes, two
   wind directions, one bidirectional damper) against the one-mode design job
   (cases/kestrel_point.toml), both timed in this run.

The last line is ``ratio: N``, the engine's speed over the quad loop.
"""

from __future__ import annotations

import sys
import time
from dataclasses import dataclass

import numpy as np
from scipy.integrate import quad

from tmd.cross_spectra import UncorrelatedForces
from tmd.dampers.absorber import Absorbers
from tmd.modal_response import (
    OutputRows,
    _resonances,
    closed_loop_poles,
    extended_transfer,
    modal_response,
)

FREQ = np.array([0.18, 0.20, 0.31])
MASS = np.array([3.0e7, 3.2e7, 4.5e10])
ZETA = np.array([0.01, 0.012, 0.015])
PHI = np.array([[1.0, 0.08, -13.5], [0.05, 1.0, -10.8]])
CORNER = np.zeros((4, 7))
CORNER[0, :3] = [1.0, 0.1, -20.0]
CORNER[1, :3] = [0.05, 1.0, 25.0]
CORNER[2, 3] = CORNER[3, 4] = 1.0
ORDER = np.array([2, 2, 0, 0])
F_MAX = 5.0
POOL = 4000


@dataclass(frozen=True)
class _Smooth:
    """G / (1 + (f / f_c)^2)^2 on [0, F_MAX]: smooth, so quad is at its best."""

    level: float
    corner_hz: float
    f_min_hz: float = 0.0
    f_max_hz: float = F_MAX
    breakpoints_hz: tuple = ()

    def __call__(self, f):
        f = np.asarray(f, float)
        return np.where(f <= F_MAX, self.level / (1 + (f / self.corner_hz) ** 2) ** 2, 0.0)


LOAD = UncorrelatedForces((_Smooth(1e9, 0.3), _Smooth(8e8, 0.3), _Smooth(4e11, 0.5)))


def designs(n, seed=2026):
    """The first n of one seeded pool of (mass, frequency, damping) per TMD."""
    rng = np.random.default_rng(seed)
    mass = rng.uniform(2e5, 8e5, (POOL, 2))
    freq = np.stack([rng.uniform(0.16, 0.19, POOL), rng.uniform(0.18, 0.21, POOL)], -1)
    zeta = rng.uniform(0.02, 0.15, (POOL, 2))
    return Absorbers.tuned_masses(mass[:n], freq[:n], zeta[:n])


CHUNK = 200  # designs per engine call: keeps the (designs x nodes x 7 x 3) arrays in cache


def engine(absorbers):
    rows = OutputRows(CORNER, ORDER)
    n = absorbers.batch_shape[0]
    return np.concatenate([
        modal_response(FREQ, MASS, ZETA, absorbers.take(slice(i, i + CHUNK)), PHI, LOAD,
                       rows).variance for i in range(0, n, CHUNK)])


def quad_loop(absorbers, epsrel):
    out = np.zeros((absorbers.batch_shape[0], 4))
    for i in range(absorbers.batch_shape[0]):
        one = absorbers.take(slice(i, i + 1))
        centre, _ = _resonances(closed_loop_poles(FREQ, MASS, ZETA, one, PHI))
        points = sorted(c for c in centre[0] if 0 < c < F_MAX)
        for o in range(4):
            def integrand(f, o=o, one=one):
                ext = extended_transfer(np.array([f]), FREQ, MASS, ZETA, one, PHI)[0, 0]
                h = (CORNER[o] @ ext) * (2j * np.pi * f) ** ORDER[o]
                return float(np.sum(np.abs(h) ** 2 * LOAD.diagonal(np.array(f))))
            out[i, o] = quad(integrand, 0.0, F_MAX, points=points, epsrel=epsrel,
                             epsabs=0.0, limit=400)[0]
    return out


def main():
    small = designs(12)
    exact = quad_loop(small, 1e-12)
    engine_error = np.max(np.abs(engine(small) / exact - 1))
    start = time.perf_counter()
    loop = quad_loop(small, 1e-8)
    quad_time = (time.perf_counter() - start) / 12
    quad_error = np.max(np.abs(loop / exact - 1))
    big = designs(POOL)
    engine(designs(10))  # warm-up
    start = time.perf_counter()
    engine(big)
    engine_time = (time.perf_counter() - start) / POOL
    print(f"engine: {1 / engine_time:,.0f} designs/s, max relative error {engine_error:.1e}")
    print(f"quad loop (epsrel 1e-8, resonances as breakpoints): {1 / quad_time:,.1f} designs/s, "
          f"max relative error {quad_error:.1e}")
    if "--jobs" in sys.argv:
        from tmd.building_case import load_building_case
        from tmd.building_job import building_design_job
        from tmd.case import read_case
        from tmd.jobs import design_job
        start = time.perf_counter()
        design_job(read_case("cases/kestrel_point.toml"))
        single = time.perf_counter() - start
        start = time.perf_counter()
        building_design_job(load_building_case("cases/building/corvid_spire.toml"))
        whole = time.perf_counter() - start
        print(f"one-mode design job (kestrel_point): {single:.1f} s; whole-building demo job "
              f"(corvid_spire): {whole:.1f} s; ratio {whole / single:.1f}")
    print(f"ratio: {quad_time / engine_time:.0f}")


if __name__ == "__main__":
    main()
