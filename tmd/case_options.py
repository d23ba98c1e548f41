"""The ``[options.*]`` tables of a case file: each option's settings, validated.

One pydantic table per option, strict like every other table of the case
(:mod:`tmd.case` turns a problem into one line naming the file, the table
and key, the value and what is allowed). Each table's :meth:`settings`
gives the option's settings dataclass, the one the sizing reads; a key left
out keeps that dataclass's default, so the defaults live in one place.

The limits below are hard limits of what a case may give: wider than any
real installation, so that a value outside is a typo or a unit mistake.

The sizing modules' settings (bank, viscous) are imported where they are
built: reading a case, good or bad, must not load scipy (the CLI's start-up).
"""

from __future__ import annotations

from typing import Annotated

from pydantic import BaseModel, ConfigDict, Field, model_validator

from tmd.dampers.liquid_column import ColumnSettings
from tmd.dampers.pendulum import PendulumSettings
from tmd.dampers.sloshing import TankSettings
from tmd.rules import Ratio, unique_list

# Storey-drift damper near the top of a tall tower: its deformation per unit
# modal displacement is about 0.03 (the figure for a realistic storey
# drift or outrigger amplification); the idealised top-to-ground damper (1.0)
# would understate the damper constant and force some 1000x and 30x.
DEFAULT_VISCOUS_DEFORMATION = 0.03

def _number(**bounds) -> object:
    """Return the type of a strict finite float within ``bounds`` (pydantic's gt/ge/lt/le)."""
    return Annotated[float, Field(strict=True, allow_inf_nan=False, **bounds)]


def _count(low: int, high: int) -> object:
    """Return a strict integer type within [low, high] (pydantic)."""
    return Annotated[int, Field(ge=low, le=high, strict=True)]


class _OptionTable(BaseModel):
    # As every table of the case: unknown keys refused, no coercion of types.
    model_config = ConfigDict(extra="forbid", frozen=True, strict=True)

    def _given(self) -> dict:
        """Return the keys the case gave, lists as tuples (the dataclasses are frozen)."""
        return {k: tuple(v) if isinstance(v, list) else v
                for k, v in self.model_dump(exclude_unset=True).items()}


class ViscousOptionsTable(_OptionTable):
    """The case file's ``[options.viscous]`` table (keys in README)."""

    damper_count: _count(1, 10_000) = 1
    deformation_per_modal_displacement: _number(gt=0, le=10.0) | None = None
    storey_drift_per_modal_displacement: _number(gt=0, le=1.0) | None = None
    drift_amplification: _number(gt=0, le=10.0) | None = None
    force_capacity_n: _number(gt=0, le=1e9) | None = None
    stroke_capacity_m: _number(gt=0, le=10.0) | None = None

    @model_validator(mode="after")
    def _one_installation(self):
        drift = (self.storey_drift_per_modal_displacement, self.drift_amplification)
        if self.deformation_per_modal_displacement is not None and any(
                v is not None for v in drift):
            raise ValueError("give deformation_per_modal_displacement, or "
                             "storey_drift_per_modal_displacement with drift_amplification, "
                             "not both")
        if (drift[0] is None) != (drift[1] is None):
            raise ValueError("storey_drift_per_modal_displacement and drift_amplification go "
                             "together (deformation = their product)")
        return self

    @property
    def deformation(self) -> float:
        """phi_d [-]: given, or storey drift times amplification, or the stated default."""
        if self.deformation_per_modal_displacement is not None:
            return self.deformation_per_modal_displacement
        if self.storey_drift_per_modal_displacement is not None:
            return self.storey_drift_per_modal_displacement * self.drift_amplification
        return DEFAULT_VISCOUS_DEFORMATION

    def settings(self):
        """Return the installation as :class:`tmd.sizing.viscous.ViscousSettings`.

        Returns
        -------
        tmd.sizing.viscous.ViscousSettings
            Deformation per modal displacement [-], damper count and capacities.
        """
        from tmd.sizing.viscous import ViscousSettings

        return ViscousSettings(self.deformation, self.damper_count, self.force_capacity_n,
                               self.stroke_capacity_m)


class PendulumOptionsTable(_OptionTable):
    """The case file's ``[options.pendulum]`` table (keys in README)."""

    stages: _count(1, 10) = 1

    def settings(self) -> PendulumSettings:
        """Return the table as :class:`tmd.dampers.pendulum.PendulumSettings`.

        Returns
        -------
        tmd.dampers.pendulum.PendulumSettings
            The number of stages; the dataclass default where not given.
        """
        return PendulumSettings(**self._given())


class TmdBankOptionsTable(_OptionTable):
    """The case file's ``[options.tmd_bank]`` table (keys in README)."""

    # Candidate tunings f_j / f_s (the single-TMD tuning searches 0.5 to 1.5); at most
    # 20 x 10 = 200 candidates: the convex step grows with their number. A key left
    # out (None) keeps BankSettings' default.
    frequency_ratios: unique_list(_number(ge=0.5, le=1.5), 20) | None = None
    damping_ratios: unique_list(_number(gt=0, le=0.5), 10) | None = None
    # Design scenarios s (structure frequency factors), within the sweeps' range.
    frequency_factors: unique_list(_number(ge=0.5, le=1.5), 21) | None = None
    max_iterations: _count(1, 200) | None = None
    tolerance: _number(gt=0, le=0.1) | None = None
    prune_share: _number(ge=0, lt=0.5) | None = None

    @model_validator(mode="after")
    def _lists_not_empty(self):
        for key in ("frequency_ratios", "damping_ratios", "frequency_factors"):
            if getattr(self, key) == []:
                raise ValueError(f"{key} must have at least one entry")
        return self

    def settings(self):
        """Return the table as :class:`tmd.sizing.bank.BankSettings`.

        Returns
        -------
        tmd.sizing.bank.BankSettings
            Candidate grid, scenarios and iteration; defaults where not given.
        """
        from tmd.sizing.bank import BankSettings

        return BankSettings(**self._given())


class LiquidColumnOptionsTable(_OptionTable):
    """The case file's ``[options.liquid_column]`` table (keys in README)."""

    length_ratio: Ratio = ColumnSettings.length_ratio
    columns: _count(1, 100) = ColumnSettings.columns
    max_excursion_ratio: _number(gt=0, le=1.0) = ColumnSettings.max_excursion_ratio
    # Water 1000; heavy brines and slurries up to a few thousand.
    density_kg_m3: _number(ge=500, le=15_000) = ColumnSettings.density_kg_m3
    # Height of the legs above the still liquid; left out, the legs are sized for the
    # longest reported return period's peak excursion.
    freeboard_m: _number(gt=0, le=20.0) | None = None

    def settings(self) -> ColumnSettings:
        """Return the table as :class:`tmd.dampers.liquid_column.ColumnSettings`.

        Returns
        -------
        tmd.dampers.liquid_column.ColumnSettings
            Length ratio, columns, excursion limit and density.
        """
        return ColumnSettings(**self._given())


class SloshingTankOptionsTable(_OptionTable):
    """The case file's ``[options.sloshing_tank]`` table (keys in README)."""

    depth_ratio: _number(gt=0, le=1.0) = TankSettings.depth_ratio
    max_tank_width_m: _number(gt=0, le=100.0) = TankSettings.max_tank_width_m
    freeboard_m: _number(gt=0, le=20.0) = TankSettings.freeboard_m
    # Screen positions x_s / L from one wall; [] for tanks without screens.
    screen_positions: unique_list(_number(gt=0, lt=1), 10) = list(TankSettings.screen_positions)
    density_kg_m3: _number(ge=500, le=15_000) = TankSettings.density_kg_m3
    kinematic_viscosity_m2_s: _number(gt=0, le=1e-2) = TankSettings.kinematic_viscosity_m2_s

    def settings(self) -> TankSettings:
        """Return the table as :class:`tmd.dampers.sloshing.TankSettings`.

        Returns
        -------
        tmd.dampers.sloshing.TankSettings
            Depth ratio, tank width, freeboard, screens and water properties.
        """
        return TankSettings(**self._given())
