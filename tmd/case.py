"""Case files: TOML in, validated engineering objects out.

A case names the mode, the load and the target; every key is documented in
the README. Keys carry their SI unit as a suffix; dimensionless keys have
none. Paths are relative to the case file.

Validation is by pydantic models that forbid unknown keys; every problem is
turned into one :class:`CaseError` line naming the file, the table and key,
the value given and what is allowed, with the nearest known key suggested for
a misspelt one.
"""

from __future__ import annotations

import difflib
import math
from dataclasses import dataclass, field
from functools import cached_property
from pathlib import Path
from typing import Annotated, Any, Literal

from pydantic import BaseModel, ConfigDict, Field, ValidationError, model_validator

from tmd import defaults
from tmd.case_options import (
    LiquidColumnOptionsTable,
    PendulumOptionsTable,
    SloshingTankOptionsTable,
    TmdBankOptionsTable,
    ViscousOptionsTable,
)
from tmd.errors import CaseError
from tmd.loads import (
    COHERENCE_MODELS,
    Building,
    aerodynamic_damping_ratio,
    reference_height,
)
from tmd.normalised_spectra import NormalisedFileError, read_normalised_psd_csv
from tmd.registry import OBJECTIVES, OPTION_NAMES
from tmd.rules import (
    MAX_OPTION_NAMES,
    MAX_RETURN_PERIODS,
    PLAUSIBLE,
    Band,
    Duration,
    ModeFrequency,
    NonNegativeRatio,
    Orography,
    Positive,
    Ratio,
    ReturnPeriod,
    SampleCount,
    Seed,
    Speed,
    StructuralDamping,
    describe_error,
    shown,
    unique_list,
)
from tmd.spectra import ForceSpectrum, SpectrumFileError, read_force_psd_csv
from tmd.structure import Mode
from tmd.text_input import read_case_toml
from tmd.wind import AIR_DENSITY_KG_M3, SPECTRUM_MODELS, TERRAIN_CATEGORIES, Site
from tmd.wind.boundary_layer import PROFILE_MODELS
from tmd.wind_loads import WindLoad, WindLoadRequest
from tmd.wind_setup import (
    AirDensity,
    across_wind_block,
    load_table_problem,
    make_site,
    normalised_case_problem,
    wind_table_problem,
)


def _capped(high: float) -> object:
    """Return a type of finite number > 0 and <= ``high`` (caps keep overflow out)."""
    return Annotated[float, Field(gt=0, le=high, strict=True, allow_inf_nan=False)]


class _Table(BaseModel):
    # strict: "0.17" is not a number, true is not 1, 1 is not true, 4.0 is not a count.
    model_config = ConfigDict(extra="forbid", frozen=True, strict=True)


class ModeTable(_Table):
    """The case file's ``[mode]`` table: the structural mode (keys in README)."""

    frequency_hz: ModeFrequency
    modal_mass_kg: _capped(1e12)
    damping_ratio: StructuralDamping


class LoadTable(_Table):
    """The case file's ``[load]`` table: a force spectrum CSV (keys in README)."""

    force_psd_csv: str | None = None
    normalised_force_psd_csv: str | None = None
    normalised_quantity: Literal["generalised-force", "base-moment"] = "generalised-force"
    return_periods_years: unique_list(ReturnPeriod, MAX_RETURN_PERIODS) | None = None
    top_mean_speed_m_s: list[Speed] | None = None
    air_density_kg_m3: AirDensity = AIR_DENSITY_KG_M3

    @model_validator(mode="after")
    def _one_table(self):
        problem = load_table_problem(self)
        if problem:
            raise ValueError(problem)
        return self


class TargetTable(_Table):
    """The case file's ``[target]`` table: the peak target (keys in README)."""

    peak_acceleration_m_s2: _capped(10.0)
    duration_s: Duration = defaults.DURATION_S
    return_period_years: ReturnPeriod | None = None
    peak_method: Literal["davenport", "vanmarcke", "simulated"] = "davenport"
    peak_fractile: Annotated[float, Field(gt=0, lt=1, strict=True, allow_inf_nan=False)] | None \
        = None

    @model_validator(mode="after")
    def _fractile_needs_simulation(self):
        if self.peak_fractile is not None and self.peak_method != "simulated":
            raise ValueError(f"peak_fractile = {self.peak_fractile} applies only with "
                             'peak_method = "simulated"')
        return self


class DamperTable(_Table):
    """The case file's ``[damper]`` table: mass ratio, stroke limit (keys in README)."""

    objective: Literal[OBJECTIVES] = "acceleration"  # type: ignore[valid-type]
    mass_ratio: Ratio | None = None
    max_mass_ratio: Ratio = defaults.MAX_MASS_RATIO
    max_stroke_m: _capped(100.0) | None = None
    stroke_return_period_years: ReturnPeriod | None = None

    @model_validator(mode="after")
    def _fixed_within_max(self):
        if self.mass_ratio is not None and self.mass_ratio > self.max_mass_ratio:
            raise ValueError(f"mass_ratio = {self.mass_ratio} exceeds max_mass_ratio = "
                             f"{self.max_mass_ratio}")
        return self


class BuildingTable(_Table):
    """The case file's ``[building]`` table: geometry, drag, mode shape (keys in README)."""

    height_m: Positive
    breadth_m: _capped(500.0)
    depth_m: _capped(500.0)
    drag_coefficient: _capped(5.0)
    mode_shape_exponent: _capped(5.0) = 1.0
    damper_height_m: Positive | None = None
    evaluation_height_m: Positive | None = None
    mass_per_length_kg_m: _capped(1e8) | None = None


class WindTable(_Table):
    """The case file's ``[wind]`` table: site, profile, spectrum (keys in README)."""

    terrain: Literal[tuple(TERRAIN_CATEGORIES)] | None = None  # type: ignore[valid-type]
    basic_speed_m_s: Speed | None = None
    reference_height_m: Positive | None = None
    reference_mean_speed_m_s: Speed | None = None
    reference_turbulence_intensity: Ratio | None = None
    orography_factor: Orography = 1.0
    probability_shape_parameter: _capped(1.0) = 0.2
    probability_exponent: _capped(2.0) = 0.5
    spectrum: Literal[tuple(SPECTRUM_MODELS)] = "eurocode"  # type: ignore[valid-type]
    coherence: Literal[COHERENCE_MODELS] = "exponential"  # type: ignore[valid-type]
    n_strips: Annotated[int, Field(ge=4, le=400)] = 40
    return_periods_years: unique_list(ReturnPeriod, MAX_RETURN_PERIODS) = [1.0, 10.0, 50.0]
    aerodynamic_damping: bool = False
    direction_of_response: Literal["along", "across"] = "along"
    profile_csv: str | None = None
    profile_return_period_years: ReturnPeriod = 50.0
    profile: Literal[PROFILE_MODELS] | None = None  # type: ignore[valid-type]
    latitude_deg: Annotated[float, Field(ge=-90, le=90, strict=True,
                                         allow_inf_nan=False)] | None = None
    air_density_kg_m3: AirDensity = AIR_DENSITY_KG_M3

    @model_validator(mode="after")
    def _one_profile(self):
        problem = wind_table_problem(self)
        if problem:
            raise ValueError(problem)
        return self


class ProbabilisticTable(_Table):
    """The case file's ``[robustness.probabilistic]`` table (keys in README).

    Its rules are those tmd.robust.probabilistic.Uncertainty checks the same fields by.
    """

    frequency_cov: Ratio
    damping_cov: NonNegativeRatio = 0.0
    distribution: Literal["normal", "lognormal"] = "lognormal"
    exceedance_probability: Ratio | None = None
    seed: Seed = 1
    sample_count: SampleCount = 20000


class RobustnessTable(_Table):
    """The case file's ``[robustness]`` table: band and sweeps (keys in README)."""

    frequency_band: Band = defaults.FREQUENCY_BAND
    robust_design: bool = True
    sweep_range: Annotated[float, Field(gt=0, lt=0.6, allow_inf_nan=False)] = defaults.SWEEP_RANGE
    probabilistic: ProbabilisticTable | None = None


class OptionsTable(_Table):
    """The case file's ``[options]`` table and its sub-tables (keys in README)."""

    viscous: ViscousOptionsTable = ViscousOptionsTable()
    pendulum: PendulumOptionsTable = PendulumOptionsTable()
    tmd_bank: TmdBankOptionsTable = TmdBankOptionsTable()
    liquid_column: LiquidColumnOptionsTable = LiquidColumnOptionsTable()
    sloshing_tank: SloshingTankOptionsTable = SloshingTankOptionsTable()
    enabled: unique_list(Literal[OPTION_NAMES], MAX_OPTION_NAMES) | None = None  # type: ignore[valid-type]
    frequency_band: Band | None = None


class SimulationTable(_Table):
    """Monte Carlo settings of ``peak_method = "simulated"`` (see tmd.simulation)."""

    records: Annotated[int, Field(ge=10, le=5000)] = 200
    seed: Annotated[int, Field(ge=0)] = 1
    time_step_s: Annotated[float, Field(gt=0, le=1.0, allow_inf_nan=False)] | None = None


class CaseTable(_Table):
    """A whole one-mode case file, table by table, as validated (keys in README)."""

    name: str
    description: str = ""
    mode: ModeTable
    load: LoadTable | None = None
    wind: WindTable | None = None
    building: BuildingTable | None = None
    target: TargetTable
    damper: DamperTable = DamperTable()
    robustness: RobustnessTable | None = None
    options: OptionsTable | None = None
    simulation: SimulationTable | None = None

    @model_validator(mode="after")
    def _one_load(self):
        normalised = self.load is not None and self.load.normalised_force_psd_csv is not None
        if normalised:
            problem = normalised_case_problem(self)
            if problem:
                raise ValueError(problem)
            return self
        if self.load is not None and (self.wind is not None or self.building is not None):
            raise ValueError("give either [load] or [wind] with [building], not both")
        if self.load is None and (self.wind is None or self.building is None):
            raise ValueError("the case needs [load] (a force spectrum CSV) or both [wind] and "
                             "[building]")
        if self.wind is not None and self.target.return_period_years is None:
            raise ValueError("[target] return_period_years is required with [wind]: name the "
                             "return period the target applies to")
        stroke_period = self.damper.stroke_return_period_years
        if stroke_period is not None:
            if self.wind is None:
                raise ValueError("[damper] stroke_return_period_years needs a [wind] case (a "
                                 "force-spectrum CSV has one load only)")
            if self.damper.max_stroke_m is None:
                raise ValueError("[damper] stroke_return_period_years needs max_stroke_m: the "
                                 "limit to hold at that return period")
            reported = set(self.wind.return_periods_years) | {self.target.return_period_years}
            if stroke_period not in reported:
                raise ValueError(f"[damper] stroke_return_period_years = {stroke_period:g} is "
                                 f"not a reported return period; allowed: "
                                 f"{sorted(reported)} ([wind] return_periods_years and the "
                                 "target's)")
        return self


@dataclass(frozen=True)
class DamperSettings:
    """How the damper is to be sized (see the README's [damper] keys).

    Parameters
    ----------
    objective : str
        The response the fixed-mass tuning minimises: "acceleration" or
        "displacement".
    mass_ratio : float or None
        A fixed mass ratio m_d / M* [-]; None sizes the least mass.
    max_mass_ratio : float
        Largest mass ratio the least-mass search may use [-].
    max_stroke_m : float or None
        Peak stroke limit relative to the structure [m]; None for no limit.
    stroke_return_period_years : float or None
        Return period of the wind at which the stroke limit is held [years];
        None: the target's return period.
    """

    objective: str
    mass_ratio: float | None
    max_mass_ratio: float
    max_stroke_m: float | None
    stroke_return_period_years: float | None = None  # None: the target's return period


@dataclass(frozen=True, repr=False)
class Case:
    """A validated case, ready for the library.

    ``spectrum`` is the design load's modal force spectrum (the target's
    return period for a wind case); ``wind_loads`` holds every listed return
    period of a wind case (empty for a CSV load). ``shape_factor`` is the
    mode shape at the evaluation height (1 for a CSV load).

    Parameters
    ----------
    name : str
        The case's name.
    path : Path
        The case file.
    mode : Mode
        The structural mode: frequency [Hz], modal mass M* [kg] (mode shape
        = 1 at the damper) and structural damping ratio [-].
    force_spectrum : ForceSpectrum or None
        One-sided modal force PSD of the design load [N^2/Hz]; None for a
        wind case, whose design spectrum is computed with its loads
        (``spectrum``).
    target_peak_m_s2 : float
        Peak acceleration target at the evaluation height [m/s^2].
    duration_s : float
        Averaging duration T of the peak factors [s].
    damper : DamperSettings
        How the damper is to be sized.
    description : str
        Free text from the case file.
    inputs : dict
        The case file's tables as read, for results.json.
    input_files : tuple of Path
        Every file the case reads (case, spectra, profile tables).
    site : Site or None
        The wind climate and terrain (wind cases).
    building : Building or None
        The building's geometry, drag and mode shape (wind cases).
    given_wind_loads : tuple of WindLoad
        Wind loads given ready (a normalised spectrum made dimensional);
        ``wind_loads`` returns them.
    wind_load_request : tmd.wind_loads.WindLoadRequest or None
        What to compute for a wind case's loads; ``wind_loads`` computes them
        on first use.
    target_return_period_years : float or None
        Return period of the wind the target applies to [years].
    wind_settings : dict
        The [wind] table's model choices (spectrum, coherence, strips).
    tables : CaseTable or None
        The validated tables themselves.
    notes : tuple of str
        Warnings about unusual inputs, shown with the results.
    direction_of_response : str
        "along" or "across": which wind load drives the mode.
    across_wind : dict or None
        The across-wind model and vortex check (wind cases).
    across_notes : tuple of str
        The across-wind model's own warnings and cautions.
    """

    name: str
    path: Path
    mode: Mode
    force_spectrum: ForceSpectrum | None  # None for a wind case: see ``spectrum``
    target_peak_m_s2: float
    duration_s: float
    damper: DamperSettings
    description: str = ""
    inputs: dict[str, Any] = field(default_factory=dict)
    input_files: tuple[Path, ...] = ()
    site: Site | None = None
    building: Building | None = None
    given_wind_loads: tuple[WindLoad, ...] = ()  # loads given ready (a normalised spectrum)
    wind_load_request: WindLoadRequest | None = None  # loads computed when first asked for
    target_return_period_years: float | None = None
    wind_settings: dict[str, Any] = field(default_factory=dict)
    tables: CaseTable | None = None
    notes: tuple[str, ...] = ()  # warnings about unusual inputs, shown with the results
    direction_of_response: str = "along"  # which wind load drives the mode
    across_wind: dict[str, Any] | None = None  # across-wind model and vortex check (wind cases)
    across_notes: tuple[str, ...] = ()  # the across-wind model's own warnings and cautions

    def __repr__(self) -> str:
        m = self.mode
        periods = (self.wind_load_request.periods_years if self.wind_load_request is not None
                   else self.given_wind_loads)
        load = f"wind, {len(periods)} return periods" if periods else "force spectrum"
        return (f"Case({self.name!r}: {m.frequency_hz:g} Hz, M* {m.modal_mass_kg:.4g} kg, "
                f"damping {m.damping_ratio:g}, {load}, target {self.target_peak_m_s2:g} m/s²)")

    @cached_property
    def wind_loads(self) -> tuple[WindLoad, ...]:
        """Every listed return period's wind load (empty for a force-spectrum case).

        A wind case's spectra are computed here, when a job first asks for them
        (:meth:`tmd.wind_loads.WindLoadRequest.compute`), not while the case is
        read and validated.
        """
        if self.wind_load_request is not None:
            return self.wind_load_request.compute()
        return self.given_wind_loads

    @property
    def spectrum(self) -> ForceSpectrum:
        """The design load's modal force spectrum (the target's return period for wind)."""
        if self.force_spectrum is not None:
            return self.force_spectrum
        return self.design_wind_load.spectrum

    @property
    def shape_factor(self) -> float:
        """Mode shape phi(z_eval) at the evaluation height [-] (1 for a CSV load)."""
        return self.building.evaluation_mode_value if self.building else 1.0

    @property
    def design_wind_load(self) -> WindLoad | None:
        """The wind load of the target's return period (None for a CSV load)."""
        for load in self.wind_loads:
            if load.return_period_years == self.target_return_period_years:
                return load
        return None


def read_case(path: str | Path) -> Case:
    """Read and validate a case file.

    Parameters
    ----------
    path : str or Path
        The case file (TOML, UTF-8).

    Returns
    -------
    Case
        The validated case, its wind loads computed for every return period.

    Raises
    ------
    CaseError
        With the file, field, value and what is allowed.
    """
    return case_from_tables(read_case_toml(path), path)


def case_from_tables(tables: dict[str, Any], path: str | Path) -> Case:
    """Validate the tables of a case file already read (:func:`tmd.text_input.read_case_toml`).

    Parameters
    ----------
    tables : dict
        The case file's tables and keys, as parsed from its TOML.
    path : str or Path
        The case file: messages name it, and relative file names in the
        tables (force spectrum CSV, profile table) are looked up beside it.

    Returns
    -------
    Case
        The validated case, its wind loads computed for every return period.

    Raises
    ------
    CaseError
        With the file, field, value and what is allowed.
    """
    return _case_of(tables, Path(path))


def case_from_dict(data: dict[str, Any], *, folder: str | Path = ".") -> Case:
    """Validate a case given as a dict of tables (the case file's TOML, as Python).

    Parameters
    ----------
    data : dict
        The tables and keys of a case file (README "Case files").
    folder : str or Path
        Where relative file names in ``data`` (force spectrum CSV, profile
        table) are looked up; messages name the case ``<dict>`` there.

    Returns
    -------
    Case

    Raises
    ------
    CaseError
        With the field, value and what is allowed, as for a file.
    """
    if not isinstance(data, dict):
        raise CaseError(f"a case is a dict of tables, not {type(data).__name__}")
    return _case_of(data, Path(folder) / "<dict>")


def case_with_spectrum(data: dict[str, Any], spectrum: ForceSpectrum) -> Case:
    """Validate a case whose load is a force spectrum object rather than a CSV table.

    Parameters
    ----------
    data : dict
        The case's other tables (``name``, ``mode``, ``target``, ``damper``,
        ``robustness``, ``options``, ...), as in a case file; no ``load``,
        ``wind`` or ``building``.
    spectrum : tmd.spectra.ForceSpectrum
        The modal force PSD [N^2/Hz], one-sided.

    Returns
    -------
    Case
        Messages name the case ``<keywords>``.
    """
    if not isinstance(data, dict):
        raise CaseError(f"a case is a dict of tables, not {type(data).__name__}")
    given = [key for key in ("load", "wind", "building") if key in data]
    if given:
        raise CaseError(f"<keywords>: the load is the spectrum given; drop [{given[0]}]")
    # The [load] table stands for the spectrum object while the tables are validated.
    return _case_of({**data, "load": {"force_psd_csv": "<object>"}}, Path("<keywords>"),
                    spectrum=spectrum)


def _case_of(raw: dict[str, Any], path: Path, spectrum: ForceSpectrum | None = None) -> Case:
    """Validate ``raw`` (the tables of the case at ``path``) and build its case."""
    if "modes" in raw and "mode" not in raw:
        # Not "mode: required key is missing; modes: unknown key" for a valid file.
        raise CaseError(f"{path}: a whole-building case ([[modes]]) is run by 'tmd design' "
                        "only; this command takes a one-mode case ([mode])")
    try:
        table = CaseTable.model_validate(raw)
    except ValidationError as exc:
        raise CaseError(_describe(path, exc)) from None
    mode = Mode(table.mode.frequency_hz, table.mode.modal_mass_kg, table.mode.damping_ratio)
    d = table.damper
    common = dict(
        name=table.name, path=path, mode=mode,
        target_peak_m_s2=table.target.peak_acceleration_m_s2,
        duration_s=table.target.duration_s,
        damper=DamperSettings(d.objective, d.mass_ratio, d.max_mass_ratio, d.max_stroke_m,
                              d.stroke_return_period_years),
        description=table.description, inputs=raw, tables=table,
        notes=_unusual(path, table),
    )
    if spectrum is not None:
        return Case(force_spectrum=spectrum, **common | {"inputs": {k: v for k, v in raw.items()
                                                                if k != "load"}})
    if table.load is not None and table.load.normalised_force_psd_csv is not None:
        return _normalised_case(path, table, mode, common)
    if table.load is not None:
        csv_path = (path.parent / table.load.force_psd_csv).resolve()
        try:
            spectrum = read_force_psd_csv(csv_path)
        except SpectrumFileError as exc:
            raise CaseError(f"{path}: [load] force_psd_csv = {table.load.force_psd_csv!r}: "
                            f"{exc}") from None
        return Case(force_spectrum=spectrum, input_files=(path.resolve(), csv_path), **common)
    return _wind_case(path, table, mode, common)


def _wind_case(path: Path, table: CaseTable, mode: Mode, common: dict) -> Case:
    w, b = table.wind, table.building
    try:
        site, site_notes = make_site(w.model_dump(), b.height_m, path.parent)
    except ValueError as exc:
        where = f"[wind] profile_csv = {w.profile_csv!r}: " if w.profile_csv else "[wind]: "
        raise CaseError(f"{path}: {where}{exc}") from None
    try:
        building = Building(**b.model_dump())
    except ValueError as exc:
        raise CaseError(f"{path}: [building]: {exc}") from None
    periods = sorted(set(w.return_periods_years) | {table.target.return_period_years})
    # What to compute, not the spectra: the jobs compute them (Case.wind_loads).
    request = WindLoadRequest(site, building, mode, tuple(float(t) for t in periods),
                              spectrum=w.spectrum, coherence=w.coherence, n_strips=w.n_strips,
                              aerodynamic_damping=w.aerodynamic_damping,
                              direction_of_response=w.direction_of_response,
                              air_density_kg_m3=w.air_density_kg_m3,
                              reference_period_years=table.target.return_period_years,
                              source=str(path))
    _check_damping(path, table, mode, site, building, periods)
    top_speed = lambda t: float(site.mean_speed(building.height_m, t))  # noqa: E731
    block, across_notes = across_wind_block(
        building, mode.frequency_hz, periods, [top_speed(t) for t in periods], top_speed)
    return Case(force_spectrum=None, input_files=(path.resolve(),), site=site,
                building=building, wind_load_request=request,
                target_return_period_years=table.target.return_period_years,
                wind_settings=w.model_dump(), direction_of_response=w.direction_of_response,
                across_wind=block, across_notes=(*site_notes, *across_notes), **common)


def _normalised_case(path: Path, table: CaseTable, mode: Mode, common: dict) -> Case:
    """Return a [load] normalised spectrum turned dimensional at each return period's top speed."""
    load, w = table.load, table.wind
    csv_path = (path.parent / load.normalised_force_psd_csv).resolve()
    try:
        normalised = read_normalised_psd_csv(csv_path, load.normalised_quantity)
    except NormalisedFileError as exc:
        raise CaseError(f"{path}: [load] normalised_force_psd_csv = "
                        f"{load.normalised_force_psd_csv!r}: {exc}") from None
    try:
        building = Building(**table.building.model_dump())
    except ValueError as exc:
        raise CaseError(f"{path}: [building]: {exc}") from None
    h, site, site_notes, speed_of = building.height_m, None, [], None
    if w is not None:
        try:
            site, site_notes = make_site(w.model_dump(), h, path.parent)
        except ValueError as exc:
            raise CaseError(f"{path}: [wind]: {exc}") from None
        periods = sorted(set(w.return_periods_years) | {table.target.return_period_years})
        tops = [float(site.mean_speed(h, t)) for t in periods]
        z_s = float(reference_height(site, building))
        at_z_s = [float(site.mean_speed(z_s, t)) for t in periods]
        rho = w.air_density_kg_m3

        def speed_of(t):
            return float(site.mean_speed(h, t))
    else:
        pairs = sorted(zip(load.return_periods_years, load.top_mean_speed_m_s, strict=True))
        periods, tops = [p for p, _ in pairs], [u for _, u in pairs]
        at_z_s, rho = [None] * len(periods), load.air_density_kg_m3
    loads = tuple(
        WindLoad(t, normalised.modal_force_spectrum(top_mean_speed_m_s=u, building=building,
                                                    air_density_kg_m3=rho,
                                                    label=f"(T = {t:g} yr)"),
                 0.0, z, u)
        for t, u, z in zip(periods, tops, at_z_s, strict=True))
    block, across_notes = across_wind_block(building, mode.frequency_hz, periods, tops, speed_of)
    block["normalised_rms_coefficient"] = normalised.rms_coefficient()
    design = next(x for x in loads if x.return_period_years == table.target.return_period_years)
    return Case(force_spectrum=design.spectrum, input_files=(path.resolve(), csv_path),
                site=site, building=building, given_wind_loads=loads,
                target_return_period_years=table.target.return_period_years,
                wind_settings=w.model_dump() if w is not None else {}, across_wind=block,
                across_notes=(*site_notes, *across_notes), **common)


def _unusual(path: Path, table: CaseTable) -> tuple[str, ...]:
    """Warnings for values inside their hard range but outside the usual one."""
    checks = [("[mode] frequency_hz", table.mode.frequency_hz, "frequency"),
              ("[mode] damping_ratio", table.mode.damping_ratio, "damping"),
              ("[target] return_period_years", table.target.return_period_years,
               "return_period")]
    if table.wind is not None:
        w = table.wind
        checks += [("[wind] basic_speed_m_s", w.basic_speed_m_s, "speed"),
                   ("[wind] reference_mean_speed_m_s", w.reference_mean_speed_m_s, "speed"),
                   ("[wind] orography_factor", w.orography_factor, "orography")]
        checks += [(f"[wind] return_periods_years[{i}]", v, "return_period")
                   for i, v in enumerate(w.return_periods_years)]
    notes = (PLAUSIBLE[kind].note(f"{path}: {where}", value) for where, value, kind in checks
             if value is not None)
    return tuple(n for n in notes if n)


def _check_damping(path: Path, table: CaseTable, mode: Mode, site: Site, building: Building,
                   periods) -> None:
    """Refuse a total damping ratio (structural + EN F.18 aerodynamic) outside the plausible range.

    The aerodynamic part is derived from several inputs, so the message names
    them all; it is checked even when the case does not add it, because the
    Annex B check of ``tmd wind`` always does (EN 1991-1-4 F.5).
    """
    limit = PLAUSIBLE["damping"]
    aero = [float(aerodynamic_damping_ratio(site, building, mode.modal_mass_kg,
                                            mode.frequency_hz, period)) for period in periods]
    worst = max(range(len(aero)), key=aero.__getitem__)
    total = mode.damping_ratio + aero[worst]
    if math.isfinite(total) and total <= limit.high:
        return
    b = table.building
    m_e = building.equivalent_mass_per_length(mode.modal_mass_kg)
    source = (f"[building] mass_per_length_kg_m = {b.mass_per_length_kg_m:g}"
              if b.mass_per_length_kg_m is not None else
              f"M* / integral of phi^2 = {m_e:.4g} kg/m, from [mode] modal_mass_kg = "
              f"{mode.modal_mass_kg:g} and the mode shape normalised at [building] "
              f"damper_height_m = {building.damper_height_m:g}")
    speed = float(site.mean_speed(reference_height(site, building), periods[worst]))
    raise CaseError(
        f"{path}: derived total damping ratio = {total:.4g}: {limit.describe()}. It is "
        f"[mode] damping_ratio = {mode.damping_ratio:g} plus the EN 1991-1-4 (F.18) "
        f"aerodynamic damping {aero[worst]:.4g} of the {periods[worst]:g}-year wind, "
        f"c_f rho b v_m(z_s) / (4 pi n_1 m_e), from [building] drag_coefficient = "
        f"{b.drag_coefficient:g}, breadth_m = {b.breadth_m:g}, the mean speed {speed:.3g} m/s "
        f"at z_s, [mode] frequency_hz = {mode.frequency_hz:g} and m_e = {source}. Check "
        "mass_per_length_kg_m, damper_height_m and modal_mass_kg (M* is referred to the damper "
        "level)")


def _describe(path: Path, exc: ValidationError) -> str:
    lines = [_describe_one(path, err) for err in exc.errors()]
    return "\n".join(dict.fromkeys(lines))


def _describe_one(path: Path, err: dict) -> str:
    loc = [str(p) for p in err["loc"] if not str(p).startswith("literal[")]
    if not loc:  # a rule across tables
        return f"{path}: {_allowed(err)}"
    where = _location(loc)
    kind = err["type"]
    if kind == "extra_forbidden":
        known = _known_keys(loc[:-1])
        near = difflib.get_close_matches(loc[-1], known, n=1, cutoff=0.5)
        hint = f"; did you mean {near[0]!r}?" if near else ""
        allowed = ", ".join(known) if known else "none"
        return f"{path}: {where}: unknown key{hint} (known keys here: {allowed})"
    if kind == "missing":
        return f"{path}: {where}: required key is missing"
    return f"{path}: {where} = {shown(err.get('input'))}: {_allowed(err)}"


def _location(loc: list[str]) -> str:
    index = ""
    while loc and loc[-1].isdigit():  # an entry of a list: return_periods_years[3]
        index = f"[{loc[-1]}]" + index
        loc = loc[:-1]
    if len(loc) == 1:
        return loc[0] + index
    return f"[{'.'.join(loc[:-1])}] {loc[-1]}{index}"


def _allowed(err: dict) -> str:
    return describe_error(err)


_TABLES = {
    (): CaseTable, ("mode",): ModeTable, ("load",): LoadTable, ("target",): TargetTable,
    ("damper",): DamperTable, ("wind",): WindTable, ("building",): BuildingTable,
    ("robustness",): RobustnessTable, ("robustness", "probabilistic"): ProbabilisticTable,
    ("options",): OptionsTable, ("options", "viscous"): ViscousOptionsTable,
    ("options", "pendulum"): PendulumOptionsTable, ("options", "tmd_bank"): TmdBankOptionsTable,
    ("options", "liquid_column"): LiquidColumnOptionsTable,
    ("options", "sloshing_tank"): SloshingTankOptionsTable,
}


def _known_keys(loc: list[str]) -> list[str]:
    model = _TABLES.get(tuple(loc))
    return sorted(model.model_fields) if model else []
