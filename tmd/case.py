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
import tomllib
from dataclasses import dataclass, field
from pathlib import Path
from typing import Annotated, Any, Literal

from pydantic import BaseModel, ConfigDict, Field, ValidationError, model_validator

from tmd.design import OBJECTIVES
from tmd.spectra import ForceSpectrum, SpectrumFileError, read_force_psd_csv
from tmd.structure import Mode


class CaseError(ValueError):
    """A case that cannot be used; the message says where and why (exit code 2)."""


Positive = Annotated[float, Field(gt=0, allow_inf_nan=False)]
Ratio = Annotated[float, Field(gt=0, lt=1, allow_inf_nan=False)]


class _Table(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True)


class ModeTable(_Table):
    frequency_hz: Positive
    modal_mass_kg: Positive
    damping_ratio: Ratio


class LoadTable(_Table):
    force_psd_csv: str


class TargetTable(_Table):
    peak_acceleration_m_s2: Positive
    duration_s: Positive = 600.0
    return_period_years: Positive | None = None


class DamperTable(_Table):
    objective: Literal[OBJECTIVES] = "acceleration"  # type: ignore[valid-type]
    mass_ratio: Ratio | None = None
    max_mass_ratio: Ratio = 0.05
    max_stroke_m: Positive | None = None

    @model_validator(mode="after")
    def _fixed_within_max(self):
        if self.mass_ratio is not None and self.mass_ratio > self.max_mass_ratio:
            raise ValueError(f"mass_ratio = {self.mass_ratio} exceeds max_mass_ratio = "
                             f"{self.max_mass_ratio}")
        return self


class CaseTable(_Table):
    name: str
    description: str = ""
    mode: ModeTable
    load: LoadTable
    target: TargetTable
    damper: DamperTable = DamperTable()


@dataclass(frozen=True)
class DamperSettings:
    """How the damper is to be sized (see the README's [damper] keys)."""

    objective: str
    mass_ratio: float | None
    max_mass_ratio: float
    max_stroke_m: float | None


@dataclass(frozen=True)
class Case:
    """A validated case, ready for the library."""

    name: str
    path: Path
    mode: Mode
    spectrum: ForceSpectrum
    target_peak_m_s2: float
    duration_s: float
    damper: DamperSettings
    description: str = ""
    inputs: dict[str, Any] = field(default_factory=dict)
    input_files: tuple[Path, ...] = ()


def load_case(path: str | Path) -> Case:
    """Read and validate a case file.

    Raises
    ------
    CaseError
        With the file, field, value and what is allowed.
    """
    path = Path(path)
    raw = _read_toml(path)
    try:
        table = CaseTable.model_validate(raw)
    except ValidationError as exc:
        raise CaseError(_describe(path, exc, raw)) from None
    csv_path = (path.parent / table.load.force_psd_csv).resolve()
    try:
        spectrum = read_force_psd_csv(csv_path)
    except SpectrumFileError as exc:
        raise CaseError(f"{path}: [load] force_psd_csv = {table.load.force_psd_csv!r}: {exc}") \
            from None
    d = table.damper
    return Case(
        name=table.name,
        path=path,
        mode=Mode(table.mode.frequency_hz, table.mode.modal_mass_kg, table.mode.damping_ratio),
        spectrum=spectrum,
        target_peak_m_s2=table.target.peak_acceleration_m_s2,
        duration_s=table.target.duration_s,
        damper=DamperSettings(d.objective, d.mass_ratio, d.max_mass_ratio, d.max_stroke_m),
        description=table.description,
        inputs=raw,
        input_files=(path.resolve(), csv_path),
    )


def _read_toml(path: Path) -> dict:
    try:
        with open(path, "rb") as handle:
            return tomllib.load(handle)
    except FileNotFoundError:
        raise CaseError(f"{path}: no such case file") from None
    except OSError as exc:
        raise CaseError(f"{path}: cannot read the case file ({exc.strerror})") from None
    except tomllib.TOMLDecodeError as exc:
        raise CaseError(f"{path}: not valid TOML: {exc}") from None


def _describe(path: Path, exc: ValidationError, raw: dict) -> str:
    lines = [_describe_one(path, err) for err in exc.errors()]
    return "\n".join(dict.fromkeys(lines))


def _describe_one(path: Path, err: dict) -> str:
    loc = [str(p) for p in err["loc"]]
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
    value = err.get("input")
    shown = repr(value) if not isinstance(value, dict) else "a table"
    if isinstance(value, float) and not math.isfinite(value):
        shown = str(value)
    return f"{path}: {where} = {shown}: {_allowed(err)}"


def _location(loc: list[str]) -> str:
    if len(loc) == 1:
        return loc[0]
    return f"[{'.'.join(loc[:-1])}] {loc[-1]}"


def _allowed(err: dict) -> str:
    ctx = err.get("ctx") or {}
    kind = err["type"]
    if kind == "greater_than":
        return f"must be > {ctx['gt']}"
    if kind == "less_than":
        return f"must be < {ctx['lt']}"
    if kind == "literal_error":
        return f"must be one of {ctx.get('expected')}"
    if kind == "finite_number":
        return "must be a finite number"
    return err["msg"].replace("Value error, ", "")


_TABLES = {
    (): CaseTable, ("mode",): ModeTable, ("load",): LoadTable, ("target",): TargetTable,
    ("damper",): DamperTable,
}


def register_table(loc: tuple[str, ...], model: type[BaseModel]) -> None:
    """Let a table added by another module take part in key suggestions."""
    _TABLES[loc] = model


def _known_keys(loc: list[str]) -> list[str]:
    model = _TABLES.get(tuple(loc))
    return sorted(model.model_fields) if model else []
