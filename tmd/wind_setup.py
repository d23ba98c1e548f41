"""From a case's wind settings to the library's wind objects.

Three things a wind case needs beyond the along-wind strip model:

* which wind profile: EN 1991-1-4 up to 200 m, a user profile table, or the
  Deaves-Harris boundary-layer model when asked for (a building above 200 m
  with neither is refused, naming both routes);
* the across-wind modal force spectrum of the AIJ-RLB 2004 model
  (:mod:`tmd.wind.acrosswind`) with its range-of-validity warnings;
* the vortex-shedding check (:mod:`tmd.wind.vortex`) per return period.

Nothing here reads TOML; :mod:`tmd.case` passes validated values in and turns
a ``ValueError`` into a case error naming the file.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from pathlib import Path
from typing import Annotated

import numpy as np
from pydantic import Field

from tmd.normalised_spectra import normalise
from tmd.spectra import TabulatedSpectrum
from tmd.wind import acrosswind, vortex
from tmd.wind.boundary_layer import CAUTION as BOUNDARY_LAYER_CAUTION
from tmd.wind.boundary_layer import DeavesHarrisSite
from tmd.wind.profile import MAXIMUM_HEIGHT_M, Site
from tmd.wind.profile_table import PROFILE_CSV_HEADER, read_profile_csv

ACROSS_FREQUENCY_HZ = np.geomspace(1e-4, 10.0, 800)  # dense enough for beta >= 0.19 peaks
RETURN_PERIOD_SEARCH_YEARS = (0.02, 1e4)  # c_prob needs T > exp(-1/K); 1e4 yr is far enough
# Plausible air densities [kg/m^3]: sea level 1.225 (ISA), cold air ~1.4, high sites ~1.0.
AirDensity = Annotated[float, Field(ge=0.9, le=1.5, strict=True, allow_inf_nan=False)]


def load_table_problem(table) -> str:
    """Return what is inconsistent in a [load] table ('' if nothing).

    Parameters
    ----------
    table : tmd.case.LoadTable
        The validated [load] table.

    Returns
    -------
    str
    """
    given = table.model_fields_set
    if (table.force_psd_csv is None) == (table.normalised_force_psd_csv is None):
        return "give one of force_psd_csv or normalised_force_psd_csv"
    extra = [k for k in ("normalised_quantity", "return_periods_years", "top_mean_speed_m_s",
                         "air_density_kg_m3") if k in given]
    if table.force_psd_csv is not None and extra:
        return f"{', '.join(extra)} apply to normalised_force_psd_csv only"
    if (table.return_periods_years is None) != (table.top_mean_speed_m_s is None):
        return "give both return_periods_years and top_mean_speed_m_s (one speed per period)"
    if (table.return_periods_years is not None
            and len(table.return_periods_years) != len(table.top_mean_speed_m_s)):
        return (f"top_mean_speed_m_s has {len(table.top_mean_speed_m_s)} values for "
                f"{len(table.return_periods_years)} return_periods_years; give one per period")
    return ""


def normalised_case_problem(table) -> str:
    """Return what a case with a [load] normalised spectrum lacks or has too much of.

    Parameters
    ----------
    table : tmd.case.CaseTable
        The validated case.

    Returns
    -------
    str
    """
    load = table.load
    if table.building is None:
        return ("[load] normalised_force_psd_csv needs [building] (breadth b, height H and the "
                "mode shape turn it into a modal force)")
    if (table.wind is None) == (load.top_mean_speed_m_s is None):
        return ("[load] normalised_force_psd_csv needs the top speed per return period from one "
                "route: [wind] (site model or profile table) or [load] top_mean_speed_m_s with "
                "return_periods_years")
    if table.target.return_period_years is None:
        return ("[target] return_period_years is required with a normalised spectrum: name the "
                "return period the target applies to")
    if table.wind is not None and table.wind.aerodynamic_damping:
        return ("[wind] aerodynamic_damping = true does not apply to a wind-tunnel spectrum "
                "([load] normalised_force_psd_csv); set it false")
    if (load.return_periods_years is not None
            and table.target.return_period_years not in load.return_periods_years):
        return (f"[target] return_period_years = {table.target.return_period_years:g} is not "
                "among [load] return_periods_years")
    return ""


def wind_table_problem(table) -> str:
    """Return what is inconsistent in a [wind] table's profile and direction keys ('' if nothing).

    Parameters
    ----------
    table : tmd.case.WindTable
        The validated [wind] table (its ``model_fields_set`` tells given keys).

    Returns
    -------
    str
    """
    given = table.model_fields_set
    direct = [k for k in ("basic_speed_m_s", "reference_height_m", "reference_mean_speed_m_s",
                          "reference_turbulence_intensity", "orography_factor", "terrain",
                          "latitude_deg") if k in given]
    if table.aerodynamic_damping and table.direction_of_response == "across":
        return ("aerodynamic_damping = true with direction_of_response = \"across\": the "
                "EN 1991-1-4 (F.18) aerodynamic damping is along-wind and does not apply across "
                "the wind, where it can be negative near lock-in, and the across-wind model "
                "(AIJ-RLB 2004) supplies none; set aerodynamic_damping = false")
    if table.profile_csv is not None:
        if table.profile is not None:
            return "give profile_csv or profile, not both"
        if direct:
            return (f"profile_csv gives the whole wind profile; {', '.join(direct)} would be "
                    "ignored with it: remove them")
        return ""
    if "profile_return_period_years" in given:
        return "profile_return_period_years applies to profile_csv only"
    if table.terrain is None:
        return "terrain is required (unless profile_csv gives the wind profile)"
    if table.profile == "deaves-harris":
        if table.basic_speed_m_s is None or table.latitude_deg is None:
            return ("profile = \"deaves-harris\" needs basic_speed_m_s (EN v_b) and "
                    "latitude_deg (for the Coriolis parameter)")
        if any(k.startswith("reference_") for k in direct):
            return "profile = \"deaves-harris\" takes basic_speed_m_s, not the reference_* keys"
        return ""
    if table.latitude_deg is not None:
        return "latitude_deg applies to profile = \"deaves-harris\" only"
    return ""


def tall_building_message(height_m: float) -> str:
    """Why a building above 200 m needs a profile route, naming both routes.

    Parameters
    ----------
    height_m : float
        H [m].

    Returns
    -------
    str
    """
    return (f"[building] height_m = {height_m:g} m is above the {MAXIMUM_HEIGHT_M:g} m where the "
            f"EN 1991-1-4 wind profile stops; give either [wind] profile_csv = \"file.csv\" (a "
            f"table with header {','.join(PROFILE_CSV_HEADER)} from a wind climate study) or "
            "[wind] profile = \"deaves-harris\" with latitude_deg (a boundary-layer model valid "
            "up to gradient height)")


def make_site(settings: dict, height_m: float, case_dir: Path):
    """Return the site's wind profile from the [wind] settings.

    Parameters
    ----------
    settings : dict
        The validated [wind] table (keys as in the README).
    height_m : float
        H [m] of the building.
    case_dir : Path
        Folder of the case file (paths are relative to it).

    Returns
    -------
    (site, notes) : (Site or ProfileTable or DeavesHarrisSite, list of str)
        ``notes`` are cautions to show with the results.

    Raises
    ------
    ValueError
        A building above 200 m without a profile route, or a bad table.
    """
    common = dict(probability_shape_parameter=settings["probability_shape_parameter"],
                  probability_exponent=settings["probability_exponent"],
                  air_density_kg_m3=settings["air_density_kg_m3"])
    if settings.get("profile_csv"):
        table = read_profile_csv(case_dir / settings["profile_csv"], covering_height_m=height_m,
                                 reference_return_period_years=settings[
                                     "profile_return_period_years"], **common)
        return table, []
    if settings.get("profile") == "deaves-harris":
        site = DeavesHarrisSite(terrain=settings["terrain"],
                                basic_speed_m_s=settings["basic_speed_m_s"],
                                latitude_deg=settings["latitude_deg"],
                                orography_factor=settings["orography_factor"], **common)
        return site, [BOUNDARY_LAYER_CAUTION]
    if height_m > MAXIMUM_HEIGHT_M:
        raise ValueError(tall_building_message(height_m))
    site = Site(terrain=settings["terrain"], basic_speed_m_s=settings["basic_speed_m_s"],
                orography_factor=settings["orography_factor"],
                reference_height_m=settings["reference_height_m"],
                reference_mean_speed_m_s=settings["reference_mean_speed_m_s"],
                reference_turbulence_intensity=settings["reference_turbulence_intensity"],
                **common)
    return site, []


def across_wind_spectrum(building, top_mean_speed_m_s: float, air_density_kg_m3: float,
                         return_period_years: float) -> TabulatedSpectrum:
    """Return the across-wind modal force spectrum of the building's mode, tabulated [N^2/Hz].

    Parameters
    ----------
    building : tmd.loads.Building
        Size and mode shape (normalised to 1 at the damper).
    top_mean_speed_m_s : float
        U_H [m/s].
    air_density_kg_m3 : float
        rho [kg/m^3].
    return_period_years : float
        T [years] (for the table's source text).

    Returns
    -------
    TabulatedSpectrum
        S_Q on 800 log-spaced frequencies from 1e-4 to 10 Hz.

    Notes
    -----
    :func:`tmd.wind.acrosswind.generalised_force_psd`; the AIJ-RLB 2004 model
    falls off as f^-3 above its peak, so the table's upper edge carries a
    small share of the variance but a share of the acceleration's second
    moment that no table length removes; the table says so in its top-decade
    warning (``edge_advice``).
    """
    f = ACROSS_FREQUENCY_HZ
    psd = acrosswind.generalised_force_psd(
        f, breadth_m=building.breadth_m, depth_m=building.depth_m, height_m=building.height_m,
        top_mean_speed_m_s=top_mean_speed_m_s, mode_shape=building.mode_shape,
        air_density_kg_m3=air_density_kg_m3,
        mode_shape_breakpoints_m=building.mode_shape_breakpoints_m)
    return TabulatedSpectrum(f, psd, source=(
        f"across-wind modal force: AIJ-RLB 2004 model (from memory), T = "
        f"{return_period_years:g} yr, U_H = {top_mean_speed_m_s:.3g} m/s"),
        edge_advice=acrosswind.TAIL_NOTE)


def return_period_at_speed(speed_of: Callable[[float], float], speed_m_s: float):
    """Return period T at which the top speed reaches ``speed_m_s`` [years], by root search.

    Parameters
    ----------
    speed_of : callable
        U_H(T) [m/s] of T [years], increasing.
    speed_m_s : float
        The speed wanted [m/s].

    Returns
    -------
    float or None
        T [years]; None when it is not reached between 0.02 and 10^4 years
        (then :func:`reach_note` says which side).

    Notes
    -----
    Bisection on ln T to a bracket of 1e-12 (46 halvings of the 13.1-wide
    bracket ln 0.02 .. ln 10^4). Bisection and not scipy.optimize.brentq:
    reading a case must not import scipy.optimize, which costs more than
    the rest of reading a case (issue "Speed"); U_H(T) is cheap and needs
    only to increase for the bracket to hold the one crossing.
    """
    low, high = (math.log(t) for t in RETURN_PERIOD_SEARCH_YEARS)

    def gap(log_t):
        return float(speed_of(math.exp(log_t))) - speed_m_s

    if gap(low) > 0 or gap(high) < 0:
        return None
    while high - low > 1e-12:
        middle = 0.5 * (low + high)
        if gap(middle) < 0:
            low = middle
        else:
            high = middle
    return math.exp(0.5 * (low + high))


def tabulated_speed_of(periods, speeds) -> Callable[[float], float]:
    """U_H(T) from speeds given per return period, linear in ln T between them.

    Parameters
    ----------
    periods : sequence of float
        T [years], increasing.
    speeds : sequence of float
        U_H [m/s] at those T.

    Returns
    -------
    callable
        T [years] -> U_H [m/s]; outside the given periods the end values
        hold, so a speed beyond them is "not reached" in the root search.
    """
    log_t = np.log(np.asarray(periods, dtype=float))
    u = np.asarray(speeds, dtype=float)

    def speed_of(t):
        return float(np.interp(math.log(t), log_t, u))

    return speed_of


def vortex_block(building, mode_frequency_hz: float, periods, top_speeds,
                 speed_of: Callable[[float], float] | None) -> tuple[dict, list[str]]:
    """Vortex-shedding check of the building's mode, per return period.

    Parameters
    ----------
    building : tmd.loads.Building
        b (breadth normal to the wind) and d.
    mode_frequency_hz : float
        f_s [Hz].
    periods : sequence of float
        T [years].
    top_speeds : sequence of float
        U_H(T) [m/s].
    speed_of : callable, optional
        U_H(T) for any T [years] (site model); None uses the listed speeds,
        linear in ln T between them.

    Returns
    -------
    (block, warnings) : (dict, list of str)
        ``block`` holds ``strouhal_number``, ``strouhal_source``,
        ``critical_speed_m_s``, ``critical_speed_return_period_years``,
        ``lock_in_return_period_years`` and ``by_return_period`` rows
        (:func:`tmd.wind.vortex.vortex_rows`).
    """
    side_ratio = building.depth_m / building.breadth_m
    st, _ = acrosswind.strouhal_numbers(side_ratio)
    rows = vortex.vortex_rows(periods, top_speeds, breadth_m=building.breadth_m,
                              frequency_hz=mode_frequency_hz, strouhal_number=st)
    v_crit = rows[0]["critical_speed_m_s"]
    speed_of = speed_of or tabulated_speed_of(periods, top_speeds)
    at_crit = return_period_at_speed(speed_of, v_crit)
    lock_in = return_period_at_speed(speed_of, v_crit / vortex.LOCK_IN_SPEED_FACTOR)
    block = {"strouhal_number": st, "strouhal_source": acrosswind.STROUHAL_SOURCE,
             "critical_speed_m_s": v_crit,
             "critical_speed_return_period_years": at_crit,
             "lock_in_return_period_years": lock_in,
             "by_return_period": rows}
    warnings = vortex.vortex_warnings(rows, lock_in)
    return block, warnings


def across_wind_block(building, mode_frequency_hz: float, periods, top_speeds,
                      speed_of=None) -> tuple[dict, list[str]]:
    """Return the across-wind model's inputs, its range check and the vortex check.

    Parameters
    ----------
    building : tmd.loads.Building
        Size and mode shape.
    mode_frequency_hz : float
        f_s [Hz].
    periods : sequence of float
        T [years].
    top_speeds : sequence of float
        U_H(T) [m/s].
    speed_of : callable, optional
        U_H(T) for any T (see :func:`vortex_block`).

    Returns
    -------
    (block, warnings) : (dict, list of str)
        ``block``: ``model``, ``verified_against_source`` (false),
        ``side_ratio``, ``aspect_ratio``, ``rms_lift_coefficient``,
        ``strouhal_number``, ``mode_shape_correction_per_m`` and the vortex
        keys; ``warnings``: the unverified-model statement, the range
        problems and the vortex warning.
    """
    b, d, h = building.breadth_m, building.depth_m, building.height_m
    side_ratio = d / b
    aspect = h / math.sqrt(b * d)
    reduced = [u / (mode_frequency_hz * math.sqrt(b * d)) for u in top_speeds]
    notes = [f"{acrosswind.NOT_VERIFIED} ({acrosswind.SOURCE})"]
    notes += acrosswind.validity_problems(side_ratio=side_ratio, aspect_ratio=aspect,
                                          reduced_velocity=reduced)
    shedding, shedding_notes = vortex_block(building, mode_frequency_hz, periods, top_speeds,
                                            speed_of)
    block = {"model": acrosswind.SOURCE, "verified_against_source": False,
             "side_ratio": side_ratio, "aspect_ratio": aspect,
             "rms_lift_coefficient": acrosswind.rms_lift_coefficient(side_ratio),
             "mode_shape_correction_per_m": acrosswind.mode_shape_correction(
                 h, building.mode_shape, building.mode_shape_breakpoints_m)} | shedding
    return block, notes + shedding_notes


# Reduced frequencies n = f b / U_H of the spectra stored for the report: the
# across-wind peaks (St_1 0.04-0.12, St_2 up to 0.5 over the model's range) and
# the modes' n_s = f_s b / U_H (0.1-0.3 for tall buildings) lie well inside.
SPECTRA_REDUCED_FREQUENCY = np.geomspace(0.005, 2.0, 91)


def spectra_block(building, mode_frequency_hz: float, wind_loads, along_spectra,
                  air_density_kg_m3: float) -> dict:
    """Normalised along- and across-wind generalised-force spectra against reduced frequency.

    Parameters
    ----------
    building : tmd.loads.Building
        b (breadth normal to the wind), H and the mode shape (1 at the damper).
    mode_frequency_hz : float
        f_s [Hz].
    wind_loads : sequence of tmd.wind_loads.WindLoad
        The case's loads (their return periods and top speeds U_H).
    along_spectra : sequence of ForceSpectrum or None
        The along-wind modal force spectrum of each load [N^2/Hz] (None where
        there is none, e.g. a wind-tunnel table).
    air_density_kg_m3 : float
        rho [kg/m^3] of q_H.

    Returns
    -------
    dict
        ``reduced_frequency`` (n = f b / U_H), ``across_normalised_psd`` and,
        per return period, ``top_mean_speed_m_s``, ``mode_reduced_frequency``
        (f_s b / U_H) and ``along_normalised_psd`` [-].

    Notes
    -----
    Both spectra in the generalised-force normalisation f S_Q / (q_H b H)^2 of
    ``conventions.md``, q_H = rho U_H^2 / 2. Across: (eta H)^2 Phi_M(n), Phi_M
    the AIJ-RLB 2004 base-moment spectrum (:mod:`tmd.wind.acrosswind`) and
    eta the mode-shape correction; it does not depend on U_H. Along: the strip
    model's tabulated S_Q at f = n U_H / b (its log-log interpolant).
    """
    n = SPECTRA_REDUCED_FREQUENCY
    b, h = building.breadth_m, building.height_m
    eta = acrosswind.mode_shape_correction(h, building.mode_shape,
                                           building.mode_shape_breakpoints_m)
    across = (eta * h) ** 2 * acrosswind.normalised_base_moment_psd(n, building.depth_m / b)
    rows = []
    for load, along in zip(wind_loads, along_spectra, strict=True):
        u = load.top_mean_speed_m_s
        row = {"return_period_years": load.return_period_years, "top_mean_speed_m_s": u,
               "mode_reduced_frequency": mode_frequency_hz * b / u}
        if along is not None:
            f = n * u / b
            row["along_normalised_psd"] = normalise(
                f, along(f), top_mean_speed_m_s=u, breadth_m=b, height_m=h,
                air_density_kg_m3=air_density_kg_m3)[1].tolist()
        rows.append(row)
    return {"normalisation": "f S_Q(f) / (q_H b H)^2 against n = f b / U_H",
            "reduced_frequency": n.tolist(), "across_normalised_psd": across.tolist(),
            "by_return_period": rows}


def along_spectra(case) -> list:
    """Return the along-wind modal force spectrum of each of a wind case's loads.

    Parameters
    ----------
    case : tmd.case.Case
        A wind case (``wind_loads``, ``site``, ``building``, ``wind_settings``).

    Returns
    -------
    list of ForceSpectrum or None
        The loads' own spectra for an along-wind case; otherwise the strip
        model (:func:`tmd.loads.modal_force_spectrum`) with the case's
        [wind] settings, for comparison with the across-wind spectrum.
    """
    from tmd.loads import modal_force_spectrum  # deferred: only the spectra block needs it

    loads = case.wind_loads
    if case.site is None:
        return [None] * len(loads)
    table = case.tables.load if case.tables is not None else None
    if case.direction_of_response == "along" and table is None:
        return [w.spectrum for w in loads]
    s, b = case.wind_settings, case.building.breadth_m
    # tabulated just at the frequencies spectra_block reads (f = n U_H / b)
    return [modal_force_spectrum(case.site, case.building, w.return_period_years,
                                 spectrum=s["spectrum"], coherence=s["coherence"],
                                 n_strips=s["n_strips"], frequency_hz=SPECTRA_REDUCED_FREQUENCY
                                 * w.top_mean_speed_m_s / b) for w in loads]
