"""Whole-building case files: several modes, a plan, evaluation points, dampers.

A case with ``[[modes]]`` (one table per mode) is a whole-building case; a
case with ``[mode]`` stays the one-mode case of :mod:`tmd.case`. Every key is
documented in the README ("Whole-building cases"). Problems are reported as
one :class:`tmd.case.CaseError` line each, naming the file, the table (with
the entry number for arrays of tables), the key, the value and the rule.
"""

from __future__ import annotations

import difflib
from dataclasses import dataclass, field
from pathlib import Path
from typing import Annotated, Any, Literal

import numpy as np
from pydantic import BaseModel, ConfigDict, Field, ValidationError

from tmd.building_design import BuildingLoad
from tmd.building_modes import (
    AXES,
    BuildingMode,
    BuildingModel,
    DamperPlacement,
    MassDistribution,
    ModeShape,
    Plan,
    PlanPoint,
    unit_component_problem,
)
from tmd.building_wind import across_wind_problems, strip_cross_spectrum, wind_travel_vector
from tmd.case import CaseError, WindTable
from tmd.cross_spectra import (
    CrossSpectrum,
    TabulatedCrossSpectrum,
    UncorrelatedForces,
    cross_spectrum_problem,
)
from tmd.spectra import SpectrumFileError, read_force_psd_csv, read_number_table
from tmd.text_input import read_case_toml
from tmd.wind import Site
from tmd.wind.acrosswind import NOT_VERIFIED

Positive = Annotated[float, Field(gt=0, allow_inf_nan=False)]
Finite = Annotated[float, Field(allow_inf_nan=False)]
Ratio = Annotated[float, Field(gt=0, lt=1, allow_inf_nan=False)]
Share = Annotated[float, Field(gt=0, le=1, allow_inf_nan=False)]
CROSS_HEADER = ("frequency_hz", "co_n2_per_hz", "quad_n2_per_hz")
# Mass shares must add up to 1 within this (values are typed to a few digits).
SHARE_SUM_TOL = 1e-6
# Sector probabilities may add up to at most 1 plus this (typed to a few digits).
PROBABILITY_SUM_TOL = 1e-3
SECTOR_RULE = (
    "Sector speeds: a sector with a probability p is evaluated at the speed of return period "
    "p T (its share p of the site's extreme winds comes from that sector, so that speed is "
    "exceeded from the sector once in T years on average; EN 1991-1-4 c_prob with Poisson "
    "arrivals); a sector without one at the site's T-year speed times its c_dir. The two are "
    "never multiplied. Exceedance rates of different sectors add: the governing sector's "
    "T-year value is exceeded from some direction somewhat more often than once in T years "
    "when other sectors come close to it.")
UNCORRELATED_NOTE = (
    "Modal force tables were given without cross-spectra: the modal forces are taken as "
    "uncorrelated. Torsional and across-wind loads are in fact often correlated with each "
    "other and with the sway loads; supply cross-spectra (wind-tunnel data) where available.")
STRIP_NOTE = (
    "Along-wind strip loading acts through the plan origin: it gives the sway modes' "
    "correlated forces but no torsional moment and no across-wind force. Torsional and "
    "across-wind response governs many tall buildings: supply those loads from wind-tunnel "
    "data.")
ACROSS_NOTE = (
    "Across-wind forces of {sectors} come from the AIJ-RLB 2004 model (" + NOT_VERIFIED + "), "
    "fully correlated between the sway modes as the model assumes, and are taken as "
    "uncorrelated with the along-wind forces. There is still no torsional load; torsional and "
    "across-wind loads are in fact often correlated: wind-tunnel data govern.")


class _Table(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True)


class ModesEntry(_Table):
    """One ``[[modes]]`` entry of a building case: a mode and its shape (keys in README)."""

    name: str = ""
    frequency_hz: Positive
    damping_ratio: Ratio
    generalised_mass_kg: Positive | None = None
    generalised_mass_kg_m2: Positive | None = None
    shape_exponent: Positive | None = None
    shape_heights_m: list[Finite] | None = None
    shape_x: Finite | list[Finite] = 0.0
    shape_y: Finite | list[Finite] = 0.0
    shape_theta_rad: Finite | list[Finite] = 0.0


class PlanTable(_Table):
    """The ``[plan]`` table of a building case: the floor plan (keys in README)."""

    height_m: Positive
    x_min_m: Finite
    x_max_m: Finite
    y_min_m: Finite
    y_max_m: Finite
    origin_x_m: Finite = 0.0
    origin_y_m: Finite = 0.0
    evaluation_height_m: Positive | None = None
    orientation_deg: Finite = 0.0


class PointEntry(_Table):
    """One ``[[points]]`` entry: a point where accelerations are judged (keys in README)."""

    name: str
    x_m: Finite
    y_m: Finite


class DamperEntry(_Table):
    """One ``[[dampers]]`` entry: position, directions, mass share (keys in README)."""

    name: str = ""
    x_m: Finite
    y_m: Finite
    height_m: Positive | None = None
    axes: Literal[AXES] = "both"  # type: ignore[valid-type]
    mass_share: Share = 1.0
    max_stroke_m: Positive | None = None


class CrossEntry(_Table):
    """One ``[[modal_loads.cross]]`` entry: two modes' cross-spectrum (keys in README)."""

    modes: list[int]
    csv: str


class ModalLoadsTable(_Table):
    """The ``[modal_loads]`` table: tabulated modal force spectra (keys in README)."""

    force_psd_csv: list[str]
    cross: list[CrossEntry] = []


class DirectionEntry(_Table):
    """One ``[[wind_directions]]`` entry: a wind sector (keys in README)."""

    name: str = ""
    direction_deg: Finite
    breadth_m: Positive
    depth_m: Positive
    drag_coefficient: Positive
    c_dir: Annotated[float, Field(gt=0, le=1, allow_inf_nan=False)] = 1.0
    probability: Share | None = None
    across_wind: bool = False


class BuildingTargetTable(_Table):
    """The ``[target]`` table of a whole-building case (keys in README)."""

    peak_acceleration_m_s2: Positive
    duration_s: Positive = 600.0
    return_period_years: Positive | None = None


class SizingTable(_Table):
    """The ``[sizing]`` table of a whole-building case (keys in README)."""

    max_mass_kg: Positive


class MassTable(_Table):
    """The ``[mass]`` table of a building case: mass per height (keys in README)."""

    heights_m: list[Finite]
    mass_per_length_kg_m: list[Positive]
    inertia_per_length_kg_m: list[Positive] | None = None


class BuildingCaseTable(_Table):
    """A whole-building case file, table by table, as validated (keys in README)."""

    name: str
    description: str = ""
    modes: list[ModesEntry]
    plan: PlanTable
    points: list[PointEntry] = []
    dampers: list[DamperEntry] = []
    modal_loads: ModalLoadsTable | None = None
    wind: WindTable | None = None
    wind_directions: list[DirectionEntry] = []
    target: BuildingTargetTable
    sizing: SizingTable | None = None
    mass: MassTable | None = None


@dataclass(frozen=True)
class BuildingCase:
    """A validated whole-building case.

    Parameters
    ----------
    name, description : str
        From the case file.
    path : Path
        The case file.
    model : BuildingModel
        Modes, plan, points and damper placements.
    design_loads : tuple of BuildingLoad
        One per wind direction (or the tables) at the target's return period.
    loads_by_period : dict
        Return period [years] (None for tables) -> tuple of BuildingLoad.
    target_peak_m_s2, duration_s : float
        Peak acceleration target [m/s^2] and its averaging duration [s].
    target_return_period_years : float or None
        For wind cases.
    max_mass_kg : float or None
        Largest total damper mass of the least-mass search [kg].
    notes : tuple of str
        Load assumptions to state in the results.
    inputs : dict
        The raw TOML.
    directions : tuple of dict
        The wind directions as given (name, direction_deg, c_dir).
    input_files : tuple of Path
        The case file and every table it reads (never overwritten).
    """

    name: str
    description: str
    path: Path
    model: BuildingModel
    design_loads: tuple[BuildingLoad, ...]
    loads_by_period: dict
    target_peak_m_s2: float
    duration_s: float
    target_return_period_years: float | None
    max_mass_kg: float | None
    notes: tuple[str, ...] = ()
    inputs: dict[str, Any] = field(default_factory=dict)
    directions: tuple[dict, ...] = ()
    input_files: tuple[Path, ...] = ()


def load_building_case(path: str | Path) -> BuildingCase:
    """Read and validate a whole-building case.

    Parameters
    ----------
    path : str or Path
        The case file.

    Returns
    -------
    BuildingCase

    Raises
    ------
    CaseError
        With the file, field, value and the rule broken.
    """
    path = Path(path)
    # The one-mode reader's rules: UTF-8 with or without a BOM, the file named.
    raw = read_case_toml(path)
    try:
        table = BuildingCaseTable.model_validate(raw)
    except ValidationError as exc:
        raise CaseError("\n".join(dict.fromkeys(_describe(path, e) for e in exc.errors()))
                        ) from None
    if not table.modes:
        raise CaseError(f"{path}: [[modes]]: give at least one mode")
    plan = _plan(path, table)
    modes = tuple(_mode(path, k, entry, plan.height_m) for k, entry in enumerate(table.modes))
    for k, mode in enumerate(modes):
        _check_shape_covers(path, k, mode, plan)
    dampers = tuple(_damper(path, k, d, plan) for k, d in enumerate(table.dampers))
    if dampers:
        total = sum(d.mass_share for d in dampers)
        if abs(total - 1.0) > SHARE_SUM_TOL:
            raise CaseError(f"{path}: [[dampers]] mass_share: the shares add up to {total:g}; "
                            "they must add up to 1")
        for k, d in enumerate(dampers):
            _check_shape_at(path, f"[[dampers]] {k + 1} height_m", d.height_m, modes)
    model = BuildingModel(modes, plan, dampers, _mass(path, table.mass, plan.height_m))
    if dampers and table.sizing is None:
        raise CaseError(f"{path}: [sizing] max_mass_kg is required when [[dampers]] are placed "
                        "(the largest total damper mass the least-mass search may use)")
    if (table.modal_loads is None) == (table.wind is None):
        raise CaseError(f"{path}: give either [modal_loads] (force tables) or [wind] with "
                        "[[wind_directions]], not both and not neither")
    common = dict(name=table.name, description=table.description, path=path, model=model,
                  target_peak_m_s2=table.target.peak_acceleration_m_s2,
                  duration_s=table.target.duration_s,
                  max_mass_kg=table.sizing.max_mass_kg if table.sizing else None, inputs=raw)
    if table.modal_loads is not None:
        spectrum, notes = _table_loads(path, table.modal_loads, len(modes))
        load = BuildingLoad("modal force tables", spectrum, model.damping_ratio)
        files = [path.resolve()] + [(path.parent / f).resolve() for f in
                                    table.modal_loads.force_psd_csv] + [
            (path.parent / c.csv).resolve() for c in table.modal_loads.cross]
        return BuildingCase(design_loads=(load,), loads_by_period={None: (load,)},
                            target_return_period_years=table.target.return_period_years,
                            notes=notes, input_files=tuple(files), **common)
    return _wind_case(path, table, model, common)


def _plan(path: Path, table: BuildingCaseTable) -> Plan:
    p = table.plan
    if not (p.x_min_m < p.x_max_m and p.y_min_m < p.y_max_m):
        raise CaseError(f"{path}: [plan]: x_min_m < x_max_m and y_min_m < y_max_m are "
                        f"required (got x [{p.x_min_m:g}, {p.x_max_m:g}], y [{p.y_min_m:g}, "
                        f"{p.y_max_m:g}])")
    z_eval = p.evaluation_height_m if p.evaluation_height_m is not None else p.height_m
    if z_eval > p.height_m:
        raise CaseError(f"{path}: [plan] evaluation_height_m = {z_eval!r}: must not exceed "
                        f"height_m = {p.height_m:g}")
    points = tuple(PlanPoint(e.name, e.x_m, e.y_m) for e in table.points) or Plan.corners(
        p.x_min_m, p.x_max_m, p.y_min_m, p.y_max_m)
    plan = Plan(p.x_min_m, p.x_max_m, p.y_min_m, p.y_max_m, p.origin_x_m, p.origin_y_m,
                p.height_m, z_eval, points)
    for k, point in enumerate(points):
        if table.points and not plan.contains(point.x_m, point.y_m):
            raise CaseError(f"{path}: [[points]] {k + 1} ({point.name}): ({point.x_m:g}, "
                            f"{point.y_m:g}) m lies outside the plan x [{p.x_min_m:g}, "
                            f"{p.x_max_m:g}], y [{p.y_min_m:g}, {p.y_max_m:g}] m")
    names = [pt.name for pt in points]
    if len(set(names)) != len(names):
        raise CaseError(f"{path}: [[points]] name: names must be unique (got {names!r})")
    return plan


def _mode(path: Path, k: int, e: ModesEntry, height_m: float) -> BuildingMode:
    where = f"{path}: [[modes]] {k + 1}"
    name = e.name or f"mode {k + 1}"
    components = (e.shape_x, e.shape_y, e.shape_theta_rad)
    if (e.shape_exponent is None) == (e.shape_heights_m is None):
        raise CaseError(f"{where}: give either shape_exponent (a power law) or shape_heights_m "
                        "(a table), not both and not neither")
    if e.shape_exponent is not None:
        if any(isinstance(c, list) for c in components):
            raise CaseError(f"{where}: with shape_exponent, shape_x, shape_y and "
                            "shape_theta_rad are single numbers (the components at the top)")
        shape = ModeShape.power_law(height_m, e.shape_exponent, *components)
    else:
        z = list(e.shape_heights_m)
        columns = []
        for key, c in zip(("shape_x", "shape_y", "shape_theta_rad"), components, strict=True):
            values = c if isinstance(c, list) else [c] * len(z)
            if len(values) != len(z):
                raise CaseError(f"{where} {key}: {len(values)} values for {len(z)} heights in "
                                "shape_heights_m; give one value per height")
            columns.append(tuple(float(v) for v in values))
        if len(z) < 2:
            raise CaseError(f"{where} shape_heights_m = {z!r}: give at least two heights")
        steps = np.diff(z)
        if np.any(steps <= 0) or z[0] < 0 or z[-1] > height_m:
            bad = int(np.flatnonzero(steps <= 0)[0]) + 1 if np.any(steps <= 0) else None
            detail = (f"height {z[bad]:g} m does not exceed the one before ({z[bad - 1]:g} m)"
                      if bad is not None else f"heights must lie in [0, {height_m:g}] m")
            raise CaseError(f"{where} shape_heights_m = {z!r}: must be strictly increasing "
                            f"within [0, height_m]; {detail}")
        shape = ModeShape(tuple(float(v) for v in z), *columns)
    problem = unit_component_problem(shape)
    if problem:
        raise CaseError(f"{where} ({name}): {problem}")
    torsional = shape.largest_component()[0] == "theta"
    want, other = (("generalised_mass_kg_m2", "generalised_mass_kg") if torsional
                   else ("generalised_mass_kg", "generalised_mass_kg_m2"))
    mass = getattr(e, want)
    if mass is None or getattr(e, other) is not None:
        kind = "rotation" if torsional else "sway"
        raise CaseError(f"{where} ({name}): its largest shape component is a {kind}, so give "
                        f"{want} (and not {other})")
    return BuildingMode(name, e.frequency_hz, e.damping_ratio, mass, shape)


def _mass(path: Path, mass: MassTable | None, height_m: float) -> MassDistribution | None:
    if mass is None:
        return None
    z = list(mass.heights_m)
    where = f"{path}: [mass]"
    for key in ("mass_per_length_kg_m", "inertia_per_length_kg_m"):
        values = getattr(mass, key)
        if values is not None and len(values) != len(z):
            raise CaseError(f"{where} {key}: {len(values)} values for {len(z)} heights in "
                            "heights_m; give one value per height")
    steps = np.diff(z)
    if len(z) < 2 or np.any(steps <= 0) or z[0] != 0 or z[-1] != height_m:
        raise CaseError(f"{where} heights_m = {z!r}: must be strictly increasing from 0 to the "
                        f"plan's height_m = {height_m:g} (at least two heights)")
    inertia = mass.inertia_per_length_kg_m
    return MassDistribution(tuple(float(v) for v in z),
                            tuple(float(v) for v in mass.mass_per_length_kg_m),
                            None if inertia is None else tuple(float(v) for v in inertia))


def _check_shape_covers(path, k, mode: BuildingMode, plan: Plan):
    _check_shape_at(path, "[plan] evaluation_height_m", plan.evaluation_height_m, (mode,),
                    first=k)


def _check_shape_at(path, what, height, modes, first=0):
    for i, mode in enumerate(modes):
        z = mode.shape.heights_m
        if mode.shape.exponent is None and not z[0] <= height <= z[-1]:
            raise CaseError(f"{path}: {what} = {height:g} m lies outside mode {first + i + 1}'s "
                            f"shape table [{z[0]:g}, {z[-1]:g}] m")


def _damper(path: Path, k: int, e: DamperEntry, plan: Plan) -> DamperPlacement:
    where = f"{path}: [[dampers]] {k + 1}"
    name = e.name or f"damper {k + 1}"
    if not plan.contains(e.x_m, e.y_m):
        raise CaseError(f"{where} ({name}): (x_m, y_m) = ({e.x_m:g}, {e.y_m:g}) m lies outside "
                        f"the plan x [{plan.x_min_m:g}, {plan.x_max_m:g}], y [{plan.y_min_m:g}, "
                        f"{plan.y_max_m:g}] m")
    height = e.height_m if e.height_m is not None else plan.height_m
    if height > plan.height_m:
        raise CaseError(f"{where} ({name}) height_m = {height!r}: must not exceed the plan's "
                        f"height_m = {plan.height_m:g}")
    return DamperPlacement(name, e.x_m, e.y_m, height, e.axes, e.mass_share, e.max_stroke_m)


def _table_loads(path: Path, loads: ModalLoadsTable, n: int) -> tuple[CrossSpectrum, tuple]:
    if len(loads.force_psd_csv) != n:
        raise CaseError(f"{path}: [modal_loads] force_psd_csv lists {len(loads.force_psd_csv)} "
                        f"tables but the case has {n} modes under [[modes]]; give one table "
                        "per mode, in the order of [[modes]]")
    tables = []
    for k, name in enumerate(loads.force_psd_csv):
        csv_path = (path.parent / name).resolve()
        try:
            tables.append(read_force_psd_csv(csv_path))
        except SpectrumFileError as exc:
            raise CaseError(f"{path}: [modal_loads] force_psd_csv[{k + 1}] = {name!r}: "
                            f"{exc}") from None
    if not loads.cross:
        return UncorrelatedForces(tuple(tables)), (UNCORRELATED_NOTE,)
    lo = max(t.f_min_hz for t in tables)
    hi = min(t.f_max_hz for t in tables)
    cross = []
    seen = set()
    for k, entry in enumerate(loads.cross):
        where = f"{path}: [[modal_loads.cross]] {k + 1}"
        pair = tuple(entry.modes)
        if len(pair) != 2 or not all(1 <= m <= n for m in pair) or pair[0] == pair[1]:
            raise CaseError(f"{where} modes = {list(pair)!r}: give two different mode numbers "
                            f"from 1 to {n}")
        key = tuple(sorted(pair))
        if key in seen:
            raise CaseError(f"{where} modes = {list(pair)!r}: this pair is given twice")
        seen.add(key)
        csv_path = (path.parent / entry.csv).resolve()
        f, co, quad = _read_cross_csv(where, csv_path)
        cross.append((pair[0] - 1, pair[1] - 1, f, co, quad))
        lo, hi = max(lo, f[0]), min(hi, f[-1])
    grid = np.unique(np.concatenate([t.frequency_hz for t in tables] + [c[2] for c in cross]))
    grid = grid[(grid >= lo) & (grid <= hi)]
    if grid.size < 2:
        raise CaseError(f"{path}: [modal_loads]: the tables share no common frequency range")
    matrix = np.zeros((grid.size, n, n), dtype=complex)
    for i, t in enumerate(tables):
        matrix[:, i, i] = t(grid)
    for i, j, f, co, quad in cross:
        value = np.interp(grid, f, co) + 1j * np.interp(grid, f, quad)
        matrix[:, i, j] = value
        matrix[:, j, i] = np.conj(value)
    problem = cross_spectrum_problem(grid, matrix)
    if problem:
        raise CaseError(f"{path}: [modal_loads]: the cross-spectral matrix is not usable: "
                        f"{problem}")
    names = ", ".join(f"{i + 1}-{j + 1}" for i, j, *_ in cross)
    note = (f"Modal force cross-spectra were given for mode pairs {names}; other pairs are "
            "taken as uncorrelated, which torsional and across-wind loads often are not.")
    return TabulatedCrossSpectrum(grid, matrix, source=str(path)), (note,)


def _read_cross_csv(where: str, path: Path):
    try:
        table, _ = read_number_table(path, CROSS_HEADER, "cross-spectrum table")
    except SpectrumFileError as exc:
        raise CaseError(f"{where} csv: {exc}") from None
    f = table[:, 0]
    if f.size < 2 or np.any(np.diff(f) <= 0) or f[0] <= 0:
        raise CaseError(f"{where} csv = {str(path)!r}: frequency_hz must be > 0 and strictly "
                        "increasing (at least two rows)")
    return f, table[:, 1], table[:, 2]


def _wind_case(path: Path, table: BuildingCaseTable, model: BuildingModel, common: dict):
    w = table.wind
    if not table.wind_directions:
        raise CaseError(f"{path}: [wind] needs at least one [[wind_directions]] entry")
    if table.target.return_period_years is None:
        raise CaseError(f"{path}: [target] return_period_years is required with [wind]")
    periods = sorted(set(w.return_periods_years) | {table.target.return_period_years})
    loads_by_period = {}
    _check_sector_probabilities(path, table.wind_directions)
    directions = []
    for d in table.wind_directions:
        name = d.name or f"{d.direction_deg:g} deg"
        directions.append({"name": name, "direction_deg": d.direction_deg, "c_dir": d.c_dir,
                           "probability": d.probability, "across_wind": d.across_wind,
                           "speed_rule": "c_dir" if d.probability is None
                           else "sector probability"})
    problems = []
    for period in periods:
        loads = []
        for k, d in enumerate(table.wind_directions):
            site = _site(path, w, d.c_dir)
            sector_period = period if d.probability is None else d.probability * period
            travel = wind_travel_vector(d.direction_deg, table.plan.orientation_deg)
            size = dict(height_m=model.plan.height_m, breadth_m=d.breadth_m, depth_m=d.depth_m,
                        travel=travel, return_period_years=sector_period)
            try:
                spectrum = strip_cross_spectrum(
                    site, model.modes, drag_coefficient=d.drag_coefficient, spectrum=w.spectrum,
                    coherence=w.coherence, n_strips=w.n_strips, across_wind=d.across_wind,
                    **size)
                if d.across_wind:
                    problems += [f"[[wind_directions]] {k + 1} ({directions[k]['name']}), "
                                 f"T = {period:g} yr: {p}"
                                 for p in across_wind_problems(site, model.modes, **size)]
            except ValueError as exc:
                raise CaseError(f"{path}: [[wind_directions]] {k + 1}: {exc}") from None
            loads.append(BuildingLoad(directions[k]["name"], spectrum, model.damping_ratio))
        loads_by_period[period] = tuple(loads)
    return BuildingCase(design_loads=loads_by_period[table.target.return_period_years],
                        loads_by_period=loads_by_period,
                        target_return_period_years=table.target.return_period_years,
                        notes=_wind_notes(table.wind_directions, directions, problems),
                        directions=tuple(directions),
                        input_files=(path.resolve(),), **common)


def _wind_notes(entries: list[DirectionEntry], directions: list[dict], problems: list[str]):
    across = [d["name"] for d, e in zip(directions, entries, strict=True) if e.across_wind]
    notes = [STRIP_NOTE]
    if across:
        notes.append(ACROSS_NOTE.format(sectors="the sectors " + ", ".join(across)
                                        if len(across) > 1 else f"the sector {across[0]}"))
    if any(e.probability is not None for e in entries):
        notes.append(SECTOR_RULE)
    return tuple(notes + problems)


def _check_sector_probabilities(path: Path, directions: list[DirectionEntry]) -> None:
    """Check the sectors' probabilities against the case file's rules.

    A directional result needs a probability for every sector or for none,
    adding up to at most 1, and never together with a c_dir below 1 (that
    would count the direction twice).
    """
    given = [d.probability is not None for d in directions]
    if any(given) and not all(given):
        missing = given.index(False) + 1
        raise CaseError(f"{path}: [[wind_directions]] {missing} probability: give a sector "
                        "probability for every wind direction or for none")
    for k, d in enumerate(directions):
        if d.probability is not None and d.c_dir != 1.0:
            raise CaseError(f"{path}: [[wind_directions]] {k + 1} c_dir = {d.c_dir!r}: with a "
                            "sector probability, c_dir must be left at 1 (use one or the other "
                            "for a sector's speed, never both)")
    total = sum(d.probability for d in directions if d.probability is not None)
    if any(given) and total > 1.0 + PROBABILITY_SUM_TOL:
        raise CaseError(f"{path}: [[wind_directions]] probability: the sector probabilities "
                        f"add up to {total:g}; they must add up to at most 1")


def _site(path: Path, w: WindTable, c_dir: float) -> Site:
    """Return the site with the sector's directional factor on its speed (EN 1991-1-4 4.2)."""
    try:
        return Site(terrain=w.terrain,
                    basic_speed_m_s=None if w.basic_speed_m_s is None
                    else c_dir * w.basic_speed_m_s,
                    orography_factor=w.orography_factor,
                    probability_shape_parameter=w.probability_shape_parameter,
                    probability_exponent=w.probability_exponent,
                    reference_height_m=w.reference_height_m,
                    reference_mean_speed_m_s=None if w.reference_mean_speed_m_s is None
                    else c_dir * w.reference_mean_speed_m_s,
                    reference_turbulence_intensity=w.reference_turbulence_intensity)
    except ValueError as exc:
        raise CaseError(f"{path}: [wind]: {exc}") from None


_TABLES = {(): BuildingCaseTable, ("modes",): ModesEntry, ("plan",): PlanTable,
           ("points",): PointEntry, ("dampers",): DamperEntry, ("modal_loads",): ModalLoadsTable,
           ("modal_loads", "cross"): CrossEntry, ("wind",): WindTable,
           ("wind_directions",): DirectionEntry, ("target",): BuildingTargetTable,
           ("sizing",): SizingTable, ("mass",): MassTable}


def _describe(path: Path, err: dict) -> str:
    loc = list(err["loc"])
    names = [str(p) for p in loc if not isinstance(p, int)]
    where = ""
    for p in loc[:-1]:
        where += f"[{p}]" if not isinstance(p, int) else f" {p + 1}"
    where = (where.replace("][", ".") + " " if where else "") + str(loc[-1]) if loc else ""
    if err["type"] == "extra_forbidden":
        model = _TABLES.get(tuple(names[:-1]))
        known = sorted(model.model_fields) if model else []
        near = difflib.get_close_matches(names[-1], known, n=1, cutoff=0.5)
        hint = f"; did you mean {near[0]!r}?" if near else ""
        return f"{path}: {where}: unknown key{hint} (known keys here: {', '.join(known)})"
    if err["type"] == "missing":
        return f"{path}: {where}: required key is missing"
    value = err.get("input")
    shown = "a table" if isinstance(value, dict) else repr(value)
    return f"{path}: {where} = {shown}: {err['msg'].replace('Value error, ', '')}"
