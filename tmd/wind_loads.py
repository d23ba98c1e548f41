"""The wind loads of a case: one modal force spectrum per return period.

This is computation, kept apart from the validation of the case file
(:mod:`tmd.case`): given a validated site, building and mode it computes, for
each return period, the modal force spectrum (the along-wind strip model of
:func:`tmd.loads.modal_force_spectrum`, or the across-wind spectrum), the
EN 1991-1-4 (F.18) aerodynamic damping when it is to be added, and the mean
speeds at the reference height and at the top.
"""

from __future__ import annotations

from dataclasses import dataclass

from tmd.errors import InputError
from tmd.loads import (
    Building,
    aerodynamic_damping_ratio,
    modal_force_spectra,
    modal_force_spectrum,
    reference_height,
)
from tmd.spectra import ForceSpectrum
from tmd.structure import Mode
from tmd.wind import Site
from tmd.wind_setup import across_wind_spectrum


@dataclass(frozen=True)
class WindLoad:
    """The computed wind load of one return period.

    Parameters
    ----------
    return_period_years : float
        Return period of the wind [years].
    spectrum : ForceSpectrum
        One-sided modal force PSD [N^2/Hz].
    aerodynamic_damping_ratio : float
        Aerodynamic damping ratio added to the mode's [-] (0 unless the case adds it).
    mean_speed_m_s : float
        Mean wind speed at the EN 1991-1-4 reference height z_s [m/s].
    top_mean_speed_m_s : float or None
        Mean wind speed U_H at the building top [m/s].
    """

    return_period_years: float
    spectrum: ForceSpectrum
    aerodynamic_damping_ratio: float
    mean_speed_m_s: float
    top_mean_speed_m_s: float | None = None


def compute_wind_loads(site: Site, building: Building, mode: Mode, periods_years, *,
                       spectrum: str, coherence: str, n_strips: int,
                       aerodynamic_damping: bool, direction_of_response: str = "along",
                       air_density_kg_m3: float | None = None,
                       reference_period_years: float | None = None) -> tuple[WindLoad, ...]:
    """Return the wind load of every return period, in the order given.

    Parameters
    ----------
    site : Site
        Terrain and wind climate.
    building : Building
        Geometry, drag coefficient and mode shape.
    mode : Mode
        The mode (its modal mass and frequency enter the aerodynamic damping).
    periods_years : iterable of float
        Return periods [years].
    spectrum : str
        Turbulence spectrum model (see :data:`tmd.wind.SPECTRUM_MODELS`).
    coherence : str
        Coherence model (see :data:`tmd.loads.COHERENCE_MODELS`).
    n_strips : int
        Number of height strips of the double sum [-].
    aerodynamic_damping : bool
        Add the EN 1991-1-4 (F.18) aerodynamic damping to the mode's.
    direction_of_response : {"along", "across"}
        "across" takes the across-wind spectrum of
        :func:`tmd.wind_setup.across_wind_spectrum` (AIJ-RLB 2004) instead of
        the along-wind strip model.
    air_density_kg_m3 : float, optional
        Air density rho [kg/m^3] of the across-wind spectrum.
    reference_period_years : float, optional
        The period whose along-wind table is computed directly (the design
        period; default the first), the others being scaled from it where
        that is exact (see Notes).

    Returns
    -------
    tuple of WindLoad

    Raises
    ------
    ValueError
        When the strip model cannot be evaluated for these inputs.

    Notes
    -----
    On an EN 1991-1-4 site (:class:`tmd.wind.Site`, either route) every mean
    speed and sigma_u scale with the return period by one factor c while the
    length scales do not, so the along-wind spectrum is self-similar,
    S_F(f; T) = c^3 S_F(f / c; T_ref), and one strip computation serves every
    period (:func:`tmd.loads.modal_force_spectra`): exact at every table node,
    but the other periods' nodes are the reference grid shifted by c (the
    frequency range shifts with them, by less than one table step at each
    end). A Deaves-Harris site (its gradient height grows with the friction
    velocity) or a profile table is not shown to be self-similar, and the
    across-wind spectrum has its own model: those are computed period by period.
    """
    z_s = float(reference_height(site, building))
    periods_years = [float(t) for t in periods_years]
    across = direction_of_response == "across"
    scaled = {}
    if not across and type(site) is Site and len(periods_years) > 1:
        reference = (reference_period_years if reference_period_years in periods_years
                     else periods_years[0])
        scaled = dict(zip(periods_years, modal_force_spectra(
            site, building, periods_years, reference_period_years=reference,
            spectrum=spectrum, coherence=coherence, n_strips=n_strips), strict=True))
    loads = []
    for period in periods_years:
        top = float(site.mean_speed(building.height_m, period))
        force = (across_wind_spectrum(building, top, air_density_kg_m3, period) if across else
                 scaled[period] if period in scaled else modal_force_spectrum(
                     site, building, period, spectrum=spectrum, coherence=coherence,
                     n_strips=n_strips))
        aero = (float(aerodynamic_damping_ratio(site, building, mode.modal_mass_kg,
                                                mode.frequency_hz, period))
                if aerodynamic_damping else 0.0)
        loads.append(WindLoad(period, force, aero, float(site.mean_speed(z_s, period)), top))
    return tuple(loads)


@dataclass(frozen=True)
class WindLoadRequest:
    """The validated inputs of a case's wind loads: what to compute, not yet computed.

    :mod:`tmd.case` validates and builds the request; the loads are computed
    when a job first asks for them (``Case.wind_loads``), so that reading a
    case computes no spectrum.

    Parameters
    ----------
    site, building, mode
        As for :func:`compute_wind_loads`.
    periods_years : tuple of float
        Return periods [years], increasing.
    spectrum, coherence, n_strips, aerodynamic_damping, direction_of_response, air_density_kg_m3, \
reference_period_years
        As for :func:`compute_wind_loads`.
    source : str
        The case file, named in the message of a load that cannot be computed.
    """

    site: Site
    building: Building
    mode: Mode
    periods_years: tuple[float, ...]
    spectrum: str
    coherence: str
    n_strips: int
    aerodynamic_damping: bool
    direction_of_response: str = "along"
    air_density_kg_m3: float | None = None
    reference_period_years: float | None = None
    source: str = ""

    def compute(self) -> tuple[WindLoad, ...]:
        """Compute the wind load of every return period (:func:`compute_wind_loads`).

        Returns
        -------
        tuple of WindLoad

        Raises
        ------
        tmd.errors.InputError
            When the strip model cannot be evaluated for these inputs (bad
            input: the message names the case file and its tables).
        """
        try:
            return compute_wind_loads(
                self.site, self.building, self.mode, self.periods_years, spectrum=self.spectrum,
                coherence=self.coherence, n_strips=self.n_strips,
                aerodynamic_damping=self.aerodynamic_damping,
                direction_of_response=self.direction_of_response,
                air_density_kg_m3=self.air_density_kg_m3,
                reference_period_years=self.reference_period_years)
        except ValueError as exc:
            raise InputError(f"{self.source}: [wind]/[building]: {exc}") from None
