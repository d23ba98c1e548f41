"""What an engineer reads off the whole building: point, stroke and force responses.

One call of the n-mode engine (:mod:`tmd.modal_response`) gives every
output's moments for a batch of designs; this module turns them into rms
and peak values:

* per evaluation point: a_x and a_y (rms; peak g sigma with Davenport's
  factor from each component's own up-crossing rate), the resultant
  sqrt(a_x^2 + a_y^2) (rms sqrt(sigma_x^2 + sigma_y^2); peak from the joint
  process, :mod:`tmd.resultant_peak`) and the torsional share of the
  resultant (rms of the rotation's part over the rms resultant);
* per damper axis: stroke and internal force (rms and Davenport peak);
* per bidirectional damper: the peak of the resultant plan stroke.

References
----------
Davenport, A. G. (1964). Note on the distribution of the largest value of a
random function with application to gust loading. Proc. ICE 28(2), 187-196.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from tmd.building_modes import BuildingModel
from tmd.cross_spectra import CrossSpectrum
from tmd.dampers.absorber import Absorbers
from tmd.modal_response import OutputMoments, OutputRows, modal_response
from tmd.peak import davenport_peak_factor
from tmd.resultant_peak import mean_maximum_resultant


@dataclass(frozen=True)
class BuildingAssessment:
    """Responses of a batch of designs (leading axes = the batch).

    Parameters
    ----------
    sigma_acceleration_m_s2, peak_acceleration_m_s2 : arrays (..., P, 2)
        Rms and peak of a_x, a_y at each of the P points [m/s^2].
    sigma_resultant_m_s2, peak_resultant_m_s2 : arrays (..., P)
        The resultant plan acceleration [m/s^2].
    torsional_share : array (..., P)
        rms of the rotation's part of the resultant over the rms resultant [-].
    sigma_stroke_m, peak_stroke_m : arrays (..., N)
        Rms and peak stroke relative to the structure per absorber axis [m].
    sigma_force_n, peak_force_n : arrays (..., N)
        Damper internal (spring + dashpot) force per axis [N].
    peak_plan_stroke_m : array (..., D)
        Per damper: peak of the resultant plan stroke [m] (the axis peak for a
        one-axis damper).
    top_decade_share : array (..., P, 2)
        Share of each acceleration's m2 from the top decade of the load range [-].
    """

    sigma_acceleration_m_s2: np.ndarray
    peak_acceleration_m_s2: np.ndarray
    sigma_resultant_m_s2: np.ndarray
    peak_resultant_m_s2: np.ndarray
    torsional_share: np.ndarray
    sigma_stroke_m: np.ndarray
    peak_stroke_m: np.ndarray
    sigma_force_n: np.ndarray
    peak_force_n: np.ndarray
    peak_plan_stroke_m: np.ndarray
    top_decade_share: np.ndarray

    @property
    def governing_peak_m_s2(self) -> np.ndarray:
        """Largest peak of any component or resultant at any point, shape (...)."""
        return np.maximum(self.peak_acceleration_m_s2.max(axis=(-1, -2)),
                          self.peak_resultant_m_s2.max(axis=-1))


def axis_absorbers(model: BuildingModel, total_mass_kg, frequency_hz, damping_ratio) -> Absorbers:
    """Absorber axes of the model's dampers for a batch of designs.

    Parameters
    ----------
    model : BuildingModel
        Modes, plan and damper placements.
    total_mass_kg : float or array (...)
        Total damper mass, split by the mass shares [kg].
    frequency_hz, damping_ratio : arrays (..., N)
        Per axis: own frequency [Hz] and damping ratio [-].

    Returns
    -------
    Absorbers
        Mass per axis = its damper's share of the total (both axes of a
        bidirectional damper carry the same mass).
    """
    shares = np.array([model.dampers[j].mass_share for j, _ in model.axes()])
    mass = np.asarray(total_mass_kg, float)[..., None] * shares
    return Absorbers.tuned_masses(mass, np.asarray(frequency_hz, float),
                                  np.asarray(damping_ratio, float))


def assess_building(model: BuildingModel, load: CrossSpectrum, duration_s: float,
                    absorbers: Absorbers, *, damping_ratio=None,
                    resultant_peaks: bool = True, plan_strokes: bool = True,
                    lean: bool = False) -> BuildingAssessment:
    """Rms and peak responses of a batch of designs.

    Parameters
    ----------
    model : BuildingModel
        Modes, plan and damper placements.
    load : CrossSpectrum
        Modal force cross-spectral matrix [N^2/Hz].
    duration_s : float
        Averaging duration T of the peaks [s].
    absorbers : Absorbers
        Axes in the model's axis order (:func:`axis_absorbers`), or none.
    damping_ratio : array (n,), optional
        Modal damping ratios to use instead of the model's (e.g. with
        aerodynamic damping added) [-].
    resultant_peaks : bool
        Compute the points' resultant peaks (False leaves them NaN: cheaper,
        for tuning on rms values).
    plan_strokes : bool
        Compute the bidirectional dampers' resultant stroke peaks (False
        leaves them NaN).
    lean : bool
        Only what a tuning search needs: the accelerations and strokes
        (torsional shares, forces and top-decade shares are left NaN; about
        half the outputs, so about half the work).

    Returns
    -------
    BuildingAssessment
    """
    zeta = model.damping_ratio if damping_ratio is None else np.asarray(damping_ratio, float)
    count = len(model.axes())
    if absorbers.count != count:
        raise ValueError(f"the model has {count} absorber axes; {absorbers.count} given")
    rows = model.output_rows()
    phi = model.participation()
    points = len(model.plan.points)
    pairs = _pairs(model)
    if lean:
        # Drop the torsional parts and the forces; keep the full layout (NaN there) so
        # that the indexing below serves both.
        keep = np.concatenate([(4 * np.arange(points)[:, None] + np.arange(2)).ravel(),
                               4 * points + np.arange(count)])
        sub = OutputRows(rows.rows[keep], rows.order[keep],
                         tuple(rows.names[k] for k in keep))
        where = np.full(rows.count, -1)
        where[keep] = np.arange(keep.size)
        part = modal_response(model.frequency_hz, model.generalised_mass, zeta, absorbers, phi,
                              load, sub, pairs=where[pairs], top_decade=False)
        r = _expand(part, keep, rows.count)
    else:
        r = modal_response(model.frequency_hz, model.generalised_mass, zeta, absorbers, phi,
                           load, rows, pairs=pairs)
    var = r.variance
    nu = np.nan_to_num(r.upcrossing_hz)
    acc = slice(0, 4 * points)
    var_acc = var[..., acc].reshape(var.shape[:-1] + (points, 2, 2))  # point, total|torsion, xy
    nu_acc = nu[..., acc].reshape(var_acc.shape)[..., 0, :]
    sigma_a = np.sqrt(var_acc[..., 0, :])
    peak_a = davenport_peak_factor(nu_acc, duration_s) * sigma_a
    sigma_res = np.sqrt(var_acc[..., 0, :].sum(axis=-1))
    with np.errstate(invalid="ignore", divide="ignore"):
        share = np.nan_to_num(np.sqrt(var_acc[..., 1, :].sum(axis=-1)) / sigma_res)
    if lean:
        share = np.full(share.shape, np.nan)
    top = r.top_decade_m2[..., acc].reshape(var_acc.shape)[..., 0, :]
    stroke = slice(4 * points, 4 * points + count)
    force = slice(4 * points + count, 4 * points + 2 * count)
    sigma_r, sigma_f = np.sqrt(var[..., stroke]), np.sqrt(var[..., force])
    peak_r = davenport_peak_factor(nu[..., stroke], duration_s) * sigma_r
    peak_f = davenport_peak_factor(nu[..., force], duration_s) * sigma_f
    peak_res = np.full(sigma_res.shape, np.nan)
    if resultant_peaks:
        pair = 4 * np.arange(points)[:, None] + np.arange(2)  # (P, 2): a_x, a_y
        blocks = [m[..., pair[:, :, None], pair[:, None, :]] for m in (r.m0, r.m1, r.m2)]
        peak_res = mean_maximum_resultant(*blocks, duration_s)
    plan = []
    axes = model.axes()
    for j in range(len(model.dampers)):
        mine = [a for a, (k, _) in enumerate(axes) if k == j]
        if len(mine) == 1 or not plan_strokes:
            plan.append(np.max(peak_r[..., mine], axis=-1) if len(mine) == 1 else
                        np.full(sigma_res.shape[:-1], np.nan))
            continue
        sel = np.array([4 * points + a for a in mine])
        blocks = [m[..., sel[:, None], sel[None, :]] for m in (r.m0, r.m1, r.m2)]
        plan.append(mean_maximum_resultant(*blocks, duration_s))
    plan_stroke = (np.stack(plan, axis=-1) if plan else np.zeros(sigma_res.shape[:-1] + (0,)))
    return BuildingAssessment(sigma_a, peak_a, sigma_res, peak_res, share, sigma_r, peak_r,
                              sigma_f, peak_f, plan_stroke, top)


@dataclass(frozen=True)
class BaseResponse:
    """Base overturning moments (and torque) of a batch of designs.

    Parameters
    ----------
    names : tuple of str
        Which moment each column is, from
        :meth:`tmd.building_modes.MassDistribution.base_coefficients`.
    sigma_n_m, peak_n_m : arrays (..., k)
        Rms and Davenport peak of each base moment [N m].
    """

    names: tuple[str, ...]
    sigma_n_m: np.ndarray
    peak_n_m: np.ndarray


def assess_base(model: BuildingModel, load: CrossSpectrum, duration_s: float,
                absorbers: Absorbers, *, damping_ratio=None) -> BaseResponse:
    """Return the rms and peak base moments, for a model with a mass distribution.

    Parameters
    ----------
    model : BuildingModel
        With ``mass`` given.
    load : CrossSpectrum
        Modal force cross-spectral matrix [N^2/Hz].
    duration_s : float
        Averaging duration T of the peaks [s].
    absorbers : Absorbers
        Axes in the model's axis order, or none.
    damping_ratio : array (n,), optional
        Modal damping ratios to use instead of the model's [-].

    Returns
    -------
    BaseResponse
        Peaks by Davenport's factor from each moment's own up-crossing rate.
    """
    if model.mass is None:
        raise ValueError("base moments need the case's mass distribution")
    zeta = model.damping_ratio if damping_ratio is None else np.asarray(damping_ratio, float)
    coefficients, names = model.mass.base_coefficients(model.modes)
    n, count = len(model.modes), len(model.axes())
    rows = np.zeros((coefficients.shape[0], n + 2 * count))
    rows[:, :n] = coefficients
    r = modal_response(model.frequency_hz, model.generalised_mass, zeta, absorbers,
                       model.participation(), load,
                       OutputRows(rows, np.zeros(len(names), int), names),
                       pairs=np.zeros((0, 2), int), top_decade=False)
    sigma = r.sigma
    peak = davenport_peak_factor(np.nan_to_num(r.upcrossing_hz), duration_s) * sigma
    return BaseResponse(names, sigma, peak)


def _expand(part: OutputMoments, keep: np.ndarray, count: int) -> OutputMoments:
    """Moments of a subset of outputs placed in the full output layout (NaN elsewhere)."""
    batch = part.m0.shape[:-2]
    moments = []
    for m in (part.m0, part.m1, part.m2):
        full = np.full(batch + (count, count), np.nan, dtype=complex)
        full[..., keep[:, None], keep[None, :]] = m
        moments.append(full)
    shares = []
    for share in (part.top_decade_m0, part.top_decade_m2):
        full = np.full(batch + (count,), np.nan)
        full[..., keep] = share
        shares.append(full)
    return OutputMoments(*moments, *shares, part.names)


def _pairs(model: BuildingModel) -> np.ndarray:
    """Return the cross moments needed, in the order of :meth:`BuildingModel.output_rows`.

    They are (a_x, a_y) of each point and the axis pair of each bidirectional
    damper.
    """
    points = len(model.plan.points)
    pairs = [(4 * p, 4 * p + 1) for p in range(points)]
    axes = model.axes()
    for j in range(len(model.dampers)):
        mine = [a for a, (k, _) in enumerate(axes) if k == j]
        if len(mine) == 2:
            pairs.append((4 * points + mine[0], 4 * points + mine[1]))
    return np.array(pairs, dtype=int).reshape(-1, 2)
