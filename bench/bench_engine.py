"""Benchmark of the response engine against fair references, accuracy beside speed.

Run: python bench/bench_engine.py

The problem: a fictional tall-building mode with one TMD per design under a
white force passed through a first-order low-pass filter,
S_F(f) = G / (1 + (f / f_c)^2), integrated over [0, inf). For this rational
spectrum the acceleration variance is exact as the solution of a Lyapunov
equation of the state (x, r, x', r', F) (the force appended as an
Ornstein-Uhlenbeck state), so every method can be measured against it:

* the 1e-13 reference: ``scipy.linalg.solve_continuous_lyapunov``
  (Bartels-Stewart) design by design; its own accuracy is shown by its
  agreement with the batched Kronecker solve below, an independent algorithm;
* fair ``scipy.integrate.quad``: a scalar complex integrand (plain Python
  complex arithmetic, no numpy per call), ``epsabs=0``, the two resonance
  frequencies as breakpoints on [0, 4 f_c] and the tail [4 f_c, inf) as a
  second call, and the loosest ``epsrel`` (of 1e-8 ... 1e-12) that gives a
  relative error <= 1e-8 on calibration designs;
* ``scipy.integrate.quad_vec`` over the whole batch (``norm='max'``,
  ``epsabs=0``, every design's resonances as breakpoints), its ``epsrel``
  chosen the same way;
* a batched Lyapunov solve in Kronecker form, (I x A + A x I) vec(P) = -vec(Q),
  one ``numpy.linalg.solve`` over the batch of 25 x 25 systems;
* the engine, :func:`tmd.response.spectral_response`, in one call of 10,000
  designs, with all responses and with the acceleration only (what the
  references compute), and one design per call for the fixed cost.

Times are medians of REPEATS interleaved repeats (each method once per
round). The machine's CPU model, core count and load average are printed:
absolute rates depend on them and on what else runs; the ratios are measured
in the same run. The last line is ``ratio: N``, the engine's designs per
second (acceleration only, like the references) over fair quad's.

Goals (issue "Speed"): ratio >= 100 against fair quad with the engine's
error <= 1e-8; faster than the batched Lyapunov solve on this rational
spectrum; >= 50,000 designs/s in one call of 10,000 designs.
"""

from __future__ import annotations

import math
import os
import platform
import statistics
import time

import numpy as np
import scipy.linalg as sl
from scipy.integrate import quad, quad_vec

from tmd.dampers.absorber import single_tmd
from tmd.response import closed_loop_poles, resonances, spectral_response
from tmd.spectra import FirstOrderSpectrum

# A fictional 0.18 Hz mode of 2e4 t with 1% damping; the load's level and corner.
FS, MASS, ZETA_S = 0.18, 2.0e7, 0.01
LEVEL, CORNER = 1.0e9, 0.3
SPECTRUM = FirstOrderSpectrum(LEVEL, CORNER)
SPLIT_HZ = 4 * CORNER       # quad: breakpoints below, the unbounded tail above
REPEATS = 5
N_ENGINE = 10_000
N_LYAPUNOV = 10_000
N_QUAD = 10
N_QUAD_VEC = 100
N_CALIBRATE = 10
SINGLE_CALLS = 200
GOAL_ERROR = 1e-8
EPSRELS = (1e-8, 1e-9, 1e-10, 1e-11, 1e-12)


def designs(n, seed=2026):
    """n seeded designs (mu, f_d/f_s, zeta_d) spanning a practical range."""
    rng = np.random.default_rng(seed)
    return (rng.uniform(0.005, 0.05, n), rng.uniform(0.9, 1.05, n),
            rng.uniform(0.01, 0.2, n))


def augmented_state(mu, ratio, zeta_d):
    """Batched (A, q, acceleration row) of the state (x, r, x', r', F), shapes (N,5,5), (N,5)."""
    n = mu.size
    ws, md = 2 * np.pi * FS, mu * MASS
    wd = ratio * ws
    # (M* + md) x'' + md r'' + c x' + k x = F ;  x'' + r'' + 2 zeta_d wd r' + wd^2 r = 0
    k, c = MASS * ws**2, 2 * ZETA_S * MASS * ws
    kd, cd = wd**2, 2 * zeta_d * wd
    # Solve the 2x2 mass matrix [[M*+md, md], [1, 1]] in closed form: det = M*.
    a = np.zeros((n, 5, 5))
    a[:, 0, 2] = a[:, 1, 3] = 1.0
    # x'' = (F - c x' - k x + md (kd r + cd r')) / M*
    a[:, 2, 0] = -k / MASS
    a[:, 2, 2] = -c / MASS
    a[:, 2, 1] = md * kd / MASS
    a[:, 2, 3] = md * cd / MASS
    a[:, 2, 4] = 1.0 / MASS
    # r'' = -x'' - kd r - cd r'
    a[:, 3] = -a[:, 2]
    a[:, 3, 1] -= kd
    a[:, 3, 3] -= cd
    alpha = 2 * np.pi * CORNER
    a[:, 4, 4] = -alpha
    # White input w on F with two-sided PSD LEVEL alpha^2 / (4 pi) per rad/s:
    # Q = 2 pi S_w e5 e5^T.
    q = np.zeros((5, 5))
    q[4, 4] = 2 * np.pi * LEVEL * alpha**2 / (4 * np.pi)
    return a, q, a[:, 2, :]


def reference_m0(mu, ratio, zeta_d):
    """Acceleration variance by scipy's Bartels-Stewart solver, design by design."""
    a, q, row = augmented_state(mu, ratio, zeta_d)
    out = np.empty(mu.size)
    for i in range(mu.size):
        p = sl.solve_continuous_lyapunov(a[i], -q)
        out[i] = row[i] @ p @ row[i]
    return out


def kronecker_m0(mu, ratio, zeta_d):
    """Acceleration variance by one batched solve of the Kronecker-form Lyapunov equation."""
    a, q, row = augmented_state(mu, ratio, zeta_d)
    eye = np.eye(5)
    big = np.einsum("ij,nkl->nikjl", eye, a).reshape(-1, 25, 25) \
        + np.einsum("nij,kl->nikjl", a, eye).reshape(-1, 25, 25)
    p = np.linalg.solve(big, np.broadcast_to(-q.reshape(25), (mu.size, 25))[..., None])
    p = p.reshape(-1, 5, 5)
    return np.einsum("ni,nij,nj->n", row, p, row)


def engine_m0(mu, ratio, zeta_d):
    """The engine: one call, all responses (displacement, acceleration, stroke, force)."""
    ab = single_tmd(FS, MASS, mu, ratio, zeta_d)
    return spectral_response(FS, MASS, ZETA_S, ab, SPECTRUM).acceleration.m0


def engine_acceleration_m0(mu, ratio, zeta_d):
    """The engine asked for the acceleration only: the quantity every reference computes."""
    ab = single_tmd(FS, MASS, mu, ratio, zeta_d)
    return spectral_response(FS, MASS, ZETA_S, ab, SPECTRUM,
                             responses=("acceleration",)).acceleration.m0


def _scalar_integrand(mu, ratio, zeta_d):
    """|H_a(f)|^2 S_F(f) in plain Python complex arithmetic for one design."""
    ws = 2 * math.pi * FS
    k, c, md = MASS * ws**2, 2 * ZETA_S * MASS * ws, mu * MASS
    wd = ratio * ws
    wd2, cd = wd * wd, 2 * zeta_d * wd

    def integrand(f):
        w = 2 * math.pi * f
        w2 = w * w
        d = complex(wd2 - w2, cd * w)
        z = complex(k - w2 * MASS, w * c) - w2 * md * (1 + w2 / d)
        h2 = w2 * w2 / (z.real * z.real + z.imag * z.imag)
        return h2 * LEVEL / (1 + (f / CORNER) ** 2)

    return integrand


def _resonances_hz(mu, ratio, zeta_d):
    centre, _ = resonances(closed_loop_poles(FS, MASS, ZETA_S,
                                             single_tmd(FS, MASS, mu, ratio, zeta_d)))
    return centre


def quad_m0(mu, ratio, zeta_d, epsrel):
    """Fair quad: scalar integrand, epsabs = 0, resonances as breakpoints."""
    out = np.empty(mu.size)
    for i in range(mu.size):
        g = _scalar_integrand(mu[i], ratio[i], zeta_d[i])
        points = sorted(_resonances_hz(mu[i], ratio[i], zeta_d[i]).tolist())
        body, _ = quad(g, 0.0, SPLIT_HZ, points=points, epsabs=0.0, epsrel=epsrel, limit=500)
        tail, _ = quad(g, SPLIT_HZ, np.inf, epsabs=0.0, epsrel=epsrel, limit=500)
        out[i] = body + tail
    return out


def quad_vec_m0(mu, ratio, zeta_d, epsrel):
    """quad_vec over the batch: one vector-valued integrand, every resonance a breakpoint."""
    ws = 2 * np.pi * FS
    k, c, md = MASS * ws**2, 2 * ZETA_S * MASS * ws, mu * MASS
    wd = ratio * ws
    wd2, cd = wd * wd, 2 * zeta_d * wd

    def integrand(f):
        w = 2 * np.pi * f
        w2 = w * w
        d = (wd2 - w2) + 1j * cd * w
        z = (k - w2 * MASS) + 1j * w * c - w2 * md * (1 + w2 / d)
        return w2 * w2 / np.abs(z) ** 2 * (LEVEL / (1 + (f / CORNER) ** 2))

    points = np.unique(_resonances_hz(mu, ratio, zeta_d).ravel())
    body, _ = quad_vec(integrand, 0.0, SPLIT_HZ, points=points, epsabs=0.0, epsrel=epsrel,
                       norm="max", limit=20000)
    tail, _ = quad_vec(integrand, SPLIT_HZ, np.inf, epsabs=0.0, epsrel=epsrel, norm="max")
    return body + tail


def relative_error(value, reference):
    return float(np.max(np.abs(value / reference - 1.0)))


def calibrate(method, reference, sample):
    """The loosest epsrel whose error against the reference is <= GOAL_ERROR."""
    for eps in EPSRELS:
        error = relative_error(method(*sample, eps), reference)
        if error <= GOAL_ERROR:
            return eps, error
    return EPSRELS[-1], error


def machine():
    model = platform.processor() or "unknown CPU"
    try:
        with open("/proc/cpuinfo", encoding="utf-8") as handle:
            for line in handle:
                if line.startswith("model name"):
                    model = line.split(":", 1)[1].strip()
                    break
    except OSError:
        pass
    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    blas = {k: os.environ[k] for k in ("OPENBLAS_CORETYPE", "OPENBLAS_L2_SIZE")
            if k in os.environ}
    return (f"machine: {model}, {os.cpu_count()} cores, load average {load:.1f} at start"
            + (f", {blas} set" if blas else ""))


def timed(fn, *args):
    """(CPU seconds of this process, wall seconds, value) of one call."""
    cpu, wall = time.process_time(), time.perf_counter()
    value = fn(*args)
    return time.process_time() - cpu, time.perf_counter() - wall, value


def main():
    print(machine())
    pool = designs(N_ENGINE)
    reference = reference_m0(*pool)
    kron_check = relative_error(kronecker_m0(*pool), reference)
    print(f"reference: scipy.linalg.solve_continuous_lyapunov per design; agrees with the "
          f"batched Kronecker solve to {kron_check:.1e}")

    sample = tuple(p[:N_CALIBRATE] for p in pool)
    q_eps, _ = calibrate(quad_m0, reference[:N_CALIBRATE], sample)
    qv_eps, _ = calibrate(quad_vec_m0, reference[:N_CALIBRATE], sample)

    quad_designs = tuple(p[-N_QUAD:] for p in pool)
    vec_designs = tuple(p[-N_QUAD_VEC:] for p in pool)
    single = tuple(p[:1] for p in pool)
    engine_m0(*single)  # warm-up (Legendre nodes are cached)
    def single_calls(n=SINGLE_CALLS):
        for _ in range(n):
            engine_m0(*single)

    runs = {
        "engine": (lambda: engine_m0(*pool), N_ENGINE, reference),
        "engine_acceleration": (lambda: engine_acceleration_m0(*pool), N_ENGINE, reference),
        "engine_single": (single_calls, SINGLE_CALLS, None),
        "lyapunov": (lambda: kronecker_m0(*tuple(p[:N_LYAPUNOV] for p in pool)), N_LYAPUNOV,
                     reference[:N_LYAPUNOV]),
        "quad": (lambda: quad_m0(*quad_designs, q_eps), N_QUAD, reference[-N_QUAD:]),
        "quad_vec": (lambda: quad_vec_m0(*vec_designs, qv_eps), N_QUAD_VEC,
                     reference[-N_QUAD_VEC:]),
    }
    cpu = {name: [] for name in runs}
    wall = {name: [] for name in runs}
    errors = {}
    for _ in range(REPEATS):
        for name, (fn, _, ref) in runs.items():
            t_cpu, t_wall, value = timed(fn)
            cpu[name].append(t_cpu)
            wall[name].append(t_wall)
            if ref is not None:
                errors[name] = relative_error(value, ref)
    errors["engine_single"] = errors["engine"]
    rate = {k: runs[k][1] / statistics.median(v) for k, v in cpu.items()}
    wall_rate = {k: runs[k][1] / statistics.median(v) for k, v in wall.items()}
    print(f"medians of {REPEATS} interleaved repeats; rates from this process's CPU time "
          "(the machine is shared; wall-clock rates in brackets); error = max relative error "
          "of the acceleration variance against the reference")
    rows = [
        ("engine, one call of 10,000 designs, all responses", "engine", ""),
        ("engine, one call of 10,000 designs, acceleration only", "engine_acceleration", ""),
        ("engine, one design per call", "engine_single",
         f"  fixed cost {1e3 / rate['engine_single']:.3f} ms/call CPU"),
        ("batched Kronecker Lyapunov (rational spectrum only)", "lyapunov", ""),
        (f"quad, scalar integrand, epsabs=0, epsrel={q_eps:g}", "quad", ""),
        (f"quad_vec over {N_QUAD_VEC} designs, epsabs=0, epsrel={qv_eps:g}", "quad_vec", ""),
    ]
    for label, key, extra in rows:
        print(f"  {label:<54s} {rate[key]:>11,.1f} designs/s ({wall_rate[key]:>11,.1f})  "
              f"error {errors[key]:.1e}{extra}")
    # Like for like: every reference computes the acceleration variance only.
    ratio = rate["engine_acceleration"] / rate["quad"]
    goals = [
        (f"ratio >= 100 against fair quad at error <= {GOAL_ERROR:g} (acceleration only)",
         ratio >= 100 and errors["engine_acceleration"] <= GOAL_ERROR, f"{ratio:,.0f}"),
        ("faster than the batched Lyapunov solve (all responses)",
         rate["engine"] > rate["lyapunov"], f"{rate['engine'] / rate['lyapunov']:.2f}x"),
        ("engine >= 50,000 designs/s in one call of 10,000 (all responses)",
         rate["engine"] >= 50_000, f"{rate['engine']:,.0f}"),
    ]
    for text, met, value in goals:
        print(f"goal: {text}: {value} -> {'met' if met else 'NOT met'}")
    print(f"ratio vs quad, all responses: {rate['engine'] / rate['quad']:,.0f}")
    print(f"ratio vs quad_vec: {rate['engine_acceleration'] / rate['quad_vec']:,.0f}")
    print(f"ratio: {ratio:,.0f}")


if __name__ == "__main__":
    main()
