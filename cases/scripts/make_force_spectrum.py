"""Write a modal force spectrum CSV for a demo case (a stand-in for measured data).

The spectrum is a simple quasi-steady along-wind model at one reference
point, not a substitute for the wind model (``[wind]`` cases) or for a
wind-tunnel measurement:

    S_F(f) = (rho C_d A U)^2 S_u(f) chi^2(f) * J

with the EN 1991-1-4 (B.2) turbulence spectrum S_u, the admittance
chi^2 = 1 / (1 + (2 f sqrt(A) / U)^(4/3))^2 (Vickery 1965), and a factor J
for the modal weighting of a linear-ish mode shape. All values are those of
the fictional demo tower; edit the constants to make another demo.

Usage: python cases/scripts/make_force_spectrum.py OUT.csv
"""

import sys

import numpy as np

from tmd.spectra import write_force_psd_csv

RHO = 1.25            # air density [kg/m^3]
DRAG = 1.3            # drag coefficient [-]
HEIGHT = 172.0        # [m]
BREADTH = 29.0        # [m]
SPEED = 31.0          # mean speed at 0.6 h [m/s]
INTENSITY = 0.16      # turbulence intensity at 0.6 h [-]
LENGTH_SCALE = 160.0  # turbulence length scale at 0.6 h [m]
MODAL_WEIGHT = 0.35   # J, modal weighting of the strip forces [-]


def force_psd(frequency_hz):
    """Return the demo tower's one-sided modal force PSD [N^2/Hz].

    Parameters
    ----------
    frequency_hz : numpy.ndarray
        f [Hz], > 0.

    Returns
    -------
    numpy.ndarray
        S_F(f) = (rho C_d A U)^2 S_u(f) chi^2(f) J [N^2/Hz] (module notes).

    References
    ----------
    EN 1991-1-4:2005, Annex B, eq. B.2 (S_u); Vickery (1965), NPL Aero Report
    1143 (admittance, form from memory).
    """
    area = HEIGHT * BREADTH
    fl = frequency_hz * LENGTH_SCALE / SPEED
    su = (INTENSITY * SPEED) ** 2 * 6.8 * fl / (1 + 10.2 * fl) ** (5 / 3) / frequency_hz
    chi2 = 1.0 / (1.0 + (2.0 * frequency_hz * np.sqrt(area) / SPEED) ** (4 / 3)) ** 2
    return (RHO * DRAG * area * SPEED) ** 2 * su * chi2 * MODAL_WEIGHT


if __name__ == "__main__":
    f = np.geomspace(1e-3, 10.0, 321)
    write_force_psd_csv(sys.argv[1], f, force_psd(f))
