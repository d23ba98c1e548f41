"""Normalised (wind-tunnel) force spectra and their dimensional form at any wind speed.

Wind-tunnel reports give generalised-force or base-moment spectra in
normalised form against the reduced frequency n = f b / U_H:

* generalised force: Phi(n) = f S_Q(f) / (q_H b H)^2;
* base moment: Phi(n) = f S_M(f) / (q_H b H^2)^2, turned into the
  generalised force of the mode by the mode-shape correction
  eta = Q / M of :func:`tmd.wind.acrosswind.mode_shape_correction`
  (S_Q = eta^2 S_M);

with q_H = rho U_H^2 / 2 at the top. One table then serves every return
period: only U_H changes. The integral of Phi over ln n is the rms
coefficient squared.

References
----------
``conventions.md`` of the project ("Normalised wind-tunnel spectra").
Zhou, Y., Kijewski, T., Kareem, A. (2003). Aerodynamic loads on tall
buildings: interactive database. J. Struct. Eng. 129(3), 394-404 (the
normalised base-moment form f S_M / (q_H B H^2)^2 against f B / U_H; from
memory).
"""

from __future__ import annotations

import csv
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from tmd.spectra import SpectrumFileError, TabulatedSpectrum, read_number_table

NORMALISED_CSV_HEADER = ("reduced_frequency", "normalised_psd")
QUANTITIES = ("generalised-force", "base-moment")


class NormalisedFileError(ValueError):
    """A normalised spectrum CSV that cannot be used; the message names file and line."""


def reference_force(top_mean_speed_m_s, *, breadth_m, height_m, air_density_kg_m3=1.25,
                    quantity="generalised-force"):
    """Return the normaliser q_H b H (force) or q_H b H^2 (base moment) [N] or [N m].

    Parameters
    ----------
    top_mean_speed_m_s : float
        U_H [m/s].
    breadth_m : float
        b [m], the face normal to the wind.
    height_m : float
        H [m].
    air_density_kg_m3 : float
        rho [kg/m^3].
    quantity : str
        "generalised-force" or "base-moment".

    Returns
    -------
    float
        q_H b H [N] or q_H b H^2 [N m], q_H = rho U_H^2 / 2.
    """
    if quantity not in QUANTITIES:
        raise ValueError(f"quantity = {quantity!r}; allowed: {', '.join(QUANTITIES)}")
    q_h = 0.5 * air_density_kg_m3 * top_mean_speed_m_s**2
    return q_h * breadth_m * height_m * (height_m if quantity == "base-moment" else 1.0)


def normalise(frequency_hz, psd, *, top_mean_speed_m_s, breadth_m, height_m,
              air_density_kg_m3=1.25, quantity="generalised-force"):
    """Dimensional spectrum to normalised form (n, Phi).

    Parameters
    ----------
    frequency_hz : array
        f [Hz].
    psd : array
        One-sided S(f) [N^2/Hz] or [N^2 m^2/Hz].
    top_mean_speed_m_s : float
        U_H [m/s].
    breadth_m, height_m : float
        b, H [m].
    air_density_kg_m3 : float
        rho [kg/m^3].
    quantity : str
        "generalised-force" or "base-moment".

    Returns
    -------
    (reduced_frequency, normalised_psd) : arrays [-]

    Notes
    -----
    n = f b / U_H, Phi = f S(f) / F_ref^2, F_ref from :func:`reference_force`.
    """
    f = np.asarray(frequency_hz, dtype=float)
    ref = reference_force(top_mean_speed_m_s, breadth_m=breadth_m, height_m=height_m,
                          air_density_kg_m3=air_density_kg_m3, quantity=quantity)
    return f * breadth_m / top_mean_speed_m_s, f * np.asarray(psd, dtype=float) / ref**2


def dimensional(reduced_frequency, normalised_psd, *, top_mean_speed_m_s, breadth_m, height_m,
                air_density_kg_m3=1.25, quantity="generalised-force"):
    """Normalised form back to the dimensional spectrum (f, S).

    Parameters
    ----------
    reduced_frequency, normalised_psd : array
        n [-] and Phi(n) [-].
    top_mean_speed_m_s : float
        U_H [m/s].
    breadth_m, height_m : float
        b, H [m].
    air_density_kg_m3 : float
        rho [kg/m^3].
    quantity : str
        "generalised-force" or "base-moment".

    Returns
    -------
    (frequency_hz, psd) : arrays [Hz], [N^2/Hz] or [N^2 m^2/Hz]

    Notes
    -----
    f = n U_H / b, S(f) = F_ref^2 Phi(n) / f (``conventions.md``).
    """
    n = np.asarray(reduced_frequency, dtype=float)
    ref = reference_force(top_mean_speed_m_s, breadth_m=breadth_m, height_m=height_m,
                          air_density_kg_m3=air_density_kg_m3, quantity=quantity)
    f = n * top_mean_speed_m_s / breadth_m
    return f, ref**2 * np.asarray(normalised_psd, dtype=float) / f


@dataclass(frozen=True)
class NormalisedSpectrum:
    """A normalised spectrum table, turned into a modal force spectrum at any U_H.

    Parameters
    ----------
    reduced_frequency : array
        n = f b / U_H [-], strictly increasing, > 0.
    normalised_psd : array
        Phi(n) [-], > 0.
    quantity : str
        "generalised-force" (of the mode normalised to 1 at the damper) or
        "base-moment".
    source : str
        Where the table came from.
    """

    reduced_frequency: np.ndarray
    normalised_psd: np.ndarray
    quantity: str = "generalised-force"
    source: str = ""

    def __post_init__(self):
        n = np.asarray(self.reduced_frequency, dtype=float)
        phi = np.asarray(self.normalised_psd, dtype=float)
        problem = normalised_table_problem(n, phi)
        if problem:
            raise ValueError(problem)
        if self.quantity not in QUANTITIES:
            raise ValueError(f"quantity = {self.quantity!r}; allowed: {', '.join(QUANTITIES)}")
        object.__setattr__(self, "reduced_frequency", n)
        object.__setattr__(self, "normalised_psd", phi)

    def rms_coefficient(self) -> float:
        """Return the rms force or moment coefficient: sqrt of the integral of Phi over ln n [-].

        Returns
        -------
        float
            Exact for the log-log interpolant (each interval a power law).
        """
        ln_n = np.log(self.reduced_frequency)
        ln_p = np.log(self.normalised_psd)
        slope = np.diff(ln_p) / np.diff(ln_n)
        p0, width = self.normalised_psd[:-1], np.diff(ln_n)
        with np.errstate(divide="ignore", invalid="ignore"):
            pieces = np.where(np.abs(slope) < 1e-12, p0 * width,
                              p0 * np.expm1(slope * width) / slope)
        return float(np.sqrt(np.sum(pieces)))

    def modal_force_spectrum(self, *, top_mean_speed_m_s, building, air_density_kg_m3=1.25,
                             label="") -> TabulatedSpectrum:
        """Return the dimensional modal force spectrum at a top speed [N^2/Hz].

        Parameters
        ----------
        top_mean_speed_m_s : float
            U_H [m/s].
        building : tmd.loads.Building
            b, H and (for a base moment) the mode shape.
        air_density_kg_m3 : float
            rho [kg/m^3].
        label : str
            Added to the table's source text (e.g. the return period).

        Returns
        -------
        TabulatedSpectrum
            S_Q at f = n U_H / b; for a base moment times eta^2
            (:func:`tmd.wind.acrosswind.mode_shape_correction`).
        """
        f, psd = dimensional(self.reduced_frequency, self.normalised_psd,
                             top_mean_speed_m_s=top_mean_speed_m_s,
                             breadth_m=building.breadth_m, height_m=building.height_m,
                             air_density_kg_m3=air_density_kg_m3, quantity=self.quantity)
        if self.quantity == "base-moment":
            from tmd.wind.acrosswind import mode_shape_correction

            psd = psd * mode_shape_correction(building.height_m, building.mode_shape,
                                              building.mode_shape_breakpoints_m) ** 2
        text = f"normalised {self.quantity} spectrum {self.source} at U_H = " \
               f"{top_mean_speed_m_s:.4g} m/s {label}".strip()
        return TabulatedSpectrum(f, psd, source=text)


def normalised_table_problem(n, phi, *, first_row=1, row_word="row") -> str:
    """Return what is wrong with a normalised table, or '' if nothing.

    Parameters
    ----------
    n, phi : array
        Reduced frequencies and normalised PSD [-].
    first_row : int
        Number of the first data row in messages.
    row_word : str
        "row" or "line".

    Returns
    -------
    str
    """
    if n.ndim != 1 or n.shape != phi.shape:
        return "the two columns must be 1-D and of equal length"
    if n.size < 2:
        return "the table needs at least two rows"
    for name, c in zip(NORMALISED_CSV_HEADER, (n, phi), strict=True):
        bad = ~(np.isfinite(c) & (c > 0))
        if np.any(bad):
            i = int(np.flatnonzero(bad)[0])
            return f"{row_word} {i + first_row}: {name} = {float(c[i])!r}; must be finite and > 0"
    steps = np.diff(n)
    if np.any(steps <= 0):
        i = int(np.flatnonzero(steps <= 0)[0]) + 1
        return (f"{row_word} {i + first_row}: reduced_frequency = {float(n[i])!r} does not exceed "
                f"the {row_word} before ({float(n[i - 1])!r}); it must be strictly increasing")
    return ""


def read_normalised_psd_csv(path, quantity="generalised-force") -> NormalisedSpectrum:
    """Read a table with header ``reduced_frequency,normalised_psd``.

    Parameters
    ----------
    path : str or Path
        The CSV file.
    quantity : str
        "generalised-force" or "base-moment".

    Returns
    -------
    NormalisedSpectrum

    Raises
    ------
    NormalisedFileError
        Naming the file, the line, the value and the rule.
    """
    path = Path(path)
    try:
        table, _ = read_number_table(path, NORMALISED_CSV_HEADER, "normalised spectrum")
    except SpectrumFileError as exc:
        raise NormalisedFileError(str(exc)) from None
    problem = normalised_table_problem(table[:, 0], table[:, 1], first_row=2, row_word="line")
    if problem:
        raise NormalisedFileError(f"{path}: {problem}")
    return NormalisedSpectrum(table[:, 0], table[:, 1], quantity=quantity, source=path.name)


def write_normalised_psd_csv(path, reduced_frequency, normalised_psd) -> None:
    """Write a table in the format :func:`read_normalised_psd_csv` reads (17 digits).

    Parameters
    ----------
    path : str or Path
        The CSV file.
    reduced_frequency, normalised_psd : array
        n and Phi(n) [-].
    """
    with open(path, "w", newline="", encoding="utf-8") as handle:
        writer = csv.writer(handle)
        writer.writerow(NORMALISED_CSV_HEADER)
        for n, p in zip(reduced_frequency, normalised_psd, strict=True):
            writer.writerow([repr(float(n)), repr(float(p))])
