"""Published occupant-comfort limits, as shipped in ``tmd/data/comfort/curves.json``.

Each limit is a peak horizontal acceleration [m/s^2] against the building's
frequency [Hz] for one return period. The report draws a limit only against
a computed response of the same return period. Provenance (which values are
from memory) is in ``tmd/data/comfort/README.md`` and in each curve's
``provenance`` field.

References
----------
Melbourne, W. H. and Palmer, T. R. (1992). Accelerations and comfort criteria
for buildings undergoing complex motions. J. Wind Eng. Ind. Aerodyn. (from memory).
National Building Code of Canada, Structural Commentaries: building motion
(15 / 25 milli-g at 10 years; from memory).
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

import numpy as np

MELBOURNE_PALMER_DURATION_S = 600.0


@dataclass(frozen=True)
class ComfortLimit:
    """One published comfort limit.

    Parameters
    ----------
    name : str
        Identifier in the data file.
    label : str
        Legend text: source, return period (and occupancy).
    source : str
        Full citation.
    provenance : str
        "from memory" (and why) or the document the numbers were taken from.
    return_period_years : float
        Return period the limit applies to [years].
    frequency_hz : ndarray
        Building frequency [Hz].
    peak_acceleration_m_s2 : ndarray
        Limit on the peak acceleration [m/s^2].
    """

    name: str
    label: str
    source: str
    provenance: str
    return_period_years: float
    frequency_hz: np.ndarray
    peak_acceleration_m_s2: np.ndarray


@lru_cache(maxsize=1)
def comfort_limits() -> tuple[ComfortLimit, ...]:
    """All shipped comfort limits (peak statistic only), in file order.

    Returns
    -------
    tuple of ComfortLimit
    """
    text = resources.files("tmd").joinpath("data/comfort/curves.json").read_text("utf-8")
    return tuple(
        ComfortLimit(c["name"], c["label"], c["source"], c["provenance"],
                     float(c["return_period_years"]), np.asarray(c["frequency_hz"], float),
                     np.asarray(c["peak_acceleration_m_s2"], float))
        for c in json.loads(text)["curves"] if c["statistic"] == "peak"
    )


def melbourne_palmer_peak_acceleration(frequency_hz, return_period_years):
    """Melbourne & Palmer's peak-acceleration comfort limit [m/s^2].

    Parameters
    ----------
    frequency_hz : float or array
        Building frequency f [Hz], valid 0.06 < f < 1.
    return_period_years : float or array
        R [years], valid 0.5 < R < 10.

    Returns
    -------
    ndarray
        a_peak [m/s^2].

    Notes
    -----
    a_peak = sqrt(2 ln(f T)) (0.68 + ln(R) / 5) exp(-3.65 - 0.41 ln f) with
    T = 600 s: the ISO 6897:1984 curve-1 rms shape times a Davenport-type peak
    factor and a return-period factor.

    References
    ----------
    Melbourne, W. H. and Palmer, T. R. (1992), J. Wind Eng. Ind. Aerodyn.
    (formula from memory).
    """
    f = np.asarray(frequency_hz, dtype=float)
    r = np.asarray(return_period_years, dtype=float)
    peak_factor = np.sqrt(2.0 * np.log(f * MELBOURNE_PALMER_DURATION_S))
    return peak_factor * (0.68 + np.log(r) / 5.0) * np.exp(-3.65 - 0.41 * np.log(f))
