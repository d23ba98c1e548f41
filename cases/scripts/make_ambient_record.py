"""Write a fictional ambient acceleration record for the Kestrel Point demo.

A stand-in for a commissioning measurement (damper locked): the built tower
is taken 4.4% softer than the model (0.172 Hz instead of 0.18 Hz) with a
total damping ratio of 1.1%. The record is the acceleration of that modal
oscillator under a zero-order-hold white force (exact discretisation by
``scipy.signal.cont2discrete``), plus white sensor noise, seeded. All values
are invented for the demo.

Usage: python cases/scripts/make_ambient_record.py OUT.csv
then:  tmd identify OUT.csv
"""

import sys

import numpy as np
from scipy import signal

FREQUENCY_HZ = 0.172      # "measured" natural frequency of the demo tower [Hz]
DAMPING_RATIO = 0.011     # total damping ratio, damper locked [-]
TIME_STEP_S = 0.05        # 20 Hz sampling [s]
DURATION_S = 3600.0       # one hour [s]
LEVEL_M_S2 = 2e-3         # scale of the acceleration response [m/s^2]
NOISE_M_S2 = 2e-4         # rms sensor noise [m/s^2]
SEED = 20261202


def main(path: str) -> None:
    """Write the record as CSV.

    Parameters
    ----------
    path : str
        The CSV file to write (time [s] and acceleration [m/s^2]).
    """
    w = 2 * np.pi * FREQUENCY_HZ
    a = np.array([[0.0, 1.0], [-w * w, -2 * DAMPING_RATIO * w]])
    sys_d = signal.cont2discrete((a, np.array([[0.0], [1.0]]),
                                  np.array([[-w * w, -2 * DAMPING_RATIO * w]]),
                                  np.array([[1.0]])), TIME_STEP_S, method="zoh")
    num, den = signal.ss2tf(*sys_d[:4])
    rng = np.random.default_rng(SEED)
    warm = int(600.0 / TIME_STEP_S)
    n = int(DURATION_S / TIME_STEP_S)
    y = signal.lfilter(num[0], den, rng.standard_normal(n + warm))[warm:]
    y = LEVEL_M_S2 * y / np.std(y) + NOISE_M_S2 * rng.standard_normal(n)
    t = np.arange(n) * TIME_STEP_S
    with open(path, "w", encoding="utf-8") as out:
        out.write("time_s,acceleration_m_s2\n")
        for ti, yi in zip(t, y, strict=True):
            out.write(f"{ti:.2f},{yi:.6e}\n")


if __name__ == "__main__":
    if len(sys.argv) != 2:
        sys.exit(__doc__)
    main(sys.argv[1])
