"""The rules every input obeys, in one place: case files, CLI options and library calls.

Each rule is a pydantic type (``Annotated[float, ...]``) used by the case
file's tables, by the CLI's options and by the library's public constructors
and functions through :func:`require`, so that a value is judged by the same
rule and described by the same words wherever it comes from. Types are strict:
a string is never read as a number ("0.17"), a boolean never as a number or a
number as a boolean, a float never as a whole number.

Plausibility ranges (:data:`PLAUSIBLE`) are hard limits for what a case or an
option may give; they are wider than any real tall building and site, so a
value outside is a typo or a unit mistake and is refused (exit code 2), with
the range stated. Inside the hard range, a value outside the usual range gives
a warning (:func:`unusual`). The README's "Plausibility ranges" table lists
them. The library's own objects also accept derived values (a detuned
frequency, structural plus aerodynamic damping), so they check physical
validity (finite, positive, ratio below 1) rather than plausibility.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Annotated, Any

import numpy as np
from pydantic import AfterValidator, Field, TypeAdapter, ValidationError

from tmd.errors import InputError

__all__ = ["InputError", "PLAUSIBLE", "Range", "require"]


@dataclass(frozen=True)
class Range:
    """A plausibility range of one kind of input.

    Parameters
    ----------
    what : str
        What the value is, in words.
    low, high : float
        Hard limits, inclusive [unit].
    unit : str
        Unit shown in messages ("" for dimensionless).
    usual_low, usual_high : float
        Limits inside which a value is usual; outside them a warning is given [unit].
    """

    what: str
    low: float
    high: float
    unit: str
    usual_low: float
    usual_high: float

    def _u(self) -> str:
        return f" {self.unit}" if self.unit else ""

    def describe(self) -> str:
        """Return the hard range in words.

        Returns
        -------
        str
            For example "must lie in [10, 80] m/s (plausible basic wind speeds)".
        """
        return f"must lie in [{self.low:g}, {self.high:g}]{self._u()} (plausible {self.what})"

    def validate(self, value: float) -> float:
        """Check a finite value against the hard range.

        Parameters
        ----------
        value : float
            The value [unit].

        Returns
        -------
        float
            The value.

        Raises
        ------
        ValueError
            Outside the range.
        """
        if not self.low <= value <= self.high:
            raise ValueError(self.describe())
        return value

    def note(self, name: str, value: float) -> str | None:
        """Return a warning text when ``value`` lies outside the usual range, else None.

        Parameters
        ----------
        name : str
            Where the value was given (file, table and key).
        value : float
            The value [unit].

        Returns
        -------
        str or None
            The warning.
        """
        if value is None or self.usual_low <= value <= self.usual_high:
            return None
        return (f"{name} = {value:g}{self._u()} is unusual for {self.what} (usually "
                f"{self.usual_low:g} to {self.usual_high:g}{self._u()}); check the value and "
                "its unit")

    def field(self) -> Any:
        """Return the pydantic type of a finite number in this range.

        Returns
        -------
        typing.Annotated
            A strict float type.
        """
        return Annotated[float, Field(strict=True, allow_inf_nan=False),
                         AfterValidator(self.validate)]


# Hard and usual ranges (README, "Plausibility ranges"). The usual ranges are
# a fact of the trade (common practice): EN 1991-1-4 national basic speeds lie
# between about 20 and 36 m/s; c_o is 1 on flat terrain and rarely above 1.5
# (EN 1991-1-4 A.3); comfort checks use return periods of 1 to 10 years, ULS 50;
# tall buildings sway at about 46/H Hz (0.1 to 1 Hz); their structural damping
# ratios are 0.5% to 5% (ISO 4354 Annex E ranges, from memory).
PLAUSIBLE = {
    "speed": Range("wind speeds", 10.0, 80.0, "m/s", 15.0, 50.0),
    "orography": Range("orography factors c_o", 0.5, 2.0, "", 1.0, 1.5),
    "return_period": Range("return periods", 0.5, 10_000.0, "years", 1.0, 1000.0),
    "frequency": Range("building mode frequencies", 0.01, 10.0, "Hz", 0.05, 2.0),
    "damping": Range("structural damping ratios", 1e-4, 0.3, "", 0.002, 0.08),
}

MAX_RETURN_PERIODS = 50
MAX_OPTION_NAMES = 20

# Physical validity, shared by the case file and the library.
Positive = Annotated[float, Field(gt=0, strict=True, allow_inf_nan=False)]
NonNegative = Annotated[float, Field(ge=0, strict=True, allow_inf_nan=False)]
Ratio = Annotated[float, Field(gt=0, lt=1, strict=True, allow_inf_nan=False)]
# Averaging duration T of peak factors: 1 s to a day.
Duration = Annotated[float, Field(ge=1, le=86_400, strict=True, allow_inf_nan=False)]
# A damper's mass ratio in the library (0: no damper); case files ask for > 0.
MassRatio = Annotated[float, Field(ge=0, lt=1, strict=True, allow_inf_nan=False)]
SweepRange = Annotated[float, Field(gt=0, lt=0.6, strict=True, allow_inf_nan=False)]
# f_d / f_s of a given (proposed or as-built) damper; tuning searches 0.5 to 1.5.
FrequencyRatio = Annotated[float, Field(gt=0, le=5, strict=True, allow_inf_nan=False)]
Band = Annotated[float, Field(ge=0, lt=0.5, strict=True, allow_inf_nan=False)]
# A ratio that may be zero: a coefficient of variation that may vanish (the damping's:
# 0 keeps it fixed), the shape parameter of EN 1991-1-4's c_prob.
NonNegativeRatio = Annotated[float, Field(ge=0, lt=1, strict=True, allow_inf_nan=False)]
Seed = Annotated[int, Field(ge=0, strict=True)]
# Samples of a sampling estimate of a probability (its standard error falls as 1/sqrt(n)).
SampleCount = Annotated[int, Field(ge=100, le=1_000_000, strict=True)]

# Plausible inputs of a case or an option.
Speed = PLAUSIBLE["speed"].field()
Orography = PLAUSIBLE["orography"].field()
ReturnPeriod = PLAUSIBLE["return_period"].field()
ModeFrequency = PLAUSIBLE["frequency"].field()
StructuralDamping = PLAUSIBLE["damping"].field()


def _unique(values):
    if values is None:
        return values
    seen = set()
    for v in values:
        if v in seen:
            text = f"{v:g}" if isinstance(v, float) else repr(v)
            raise ValueError(f"{text} is given twice; each entry may appear once")
        seen.add(v)
    return values


def unique_list(item: Any, max_length: int) -> Any:
    """Return the pydantic type of a list of at most ``max_length`` distinct items.

    Parameters
    ----------
    item : type
        The type of each entry.
    max_length : int
        Most entries allowed [-].

    Returns
    -------
    typing.Annotated
        A strict list type.
    """
    return Annotated[list[item], Field(max_length=max_length, strict=True),
                     AfterValidator(_unique)]


def describe_error(err: dict) -> str:
    """Return what a pydantic error says is allowed, in the project's words.

    Parameters
    ----------
    err : dict
        One entry of ``ValidationError.errors()``.

    Returns
    -------
    str
        For example "must be > 0" or "must be a number (not text or true/false)".
    """
    ctx = err.get("ctx") or {}
    kind = err["type"]
    if kind == "greater_than":
        return f"must be > {_num(ctx['gt'])}"
    if kind == "greater_than_equal":
        return f"must be >= {_num(ctx['ge'])}"
    if kind == "less_than":
        return f"must be < {_num(ctx['lt'])}"
    if kind == "less_than_equal":
        return f"must be <= {_num(ctx['le'])}"
    if kind == "literal_error":
        return f"must be one of {ctx.get('expected')}"
    if kind == "finite_number":
        return "must be a finite number"
    if kind in ("float_type", "float_parsing"):
        return "must be a number (not text in quotes, not true/false)"
    if kind in ("int_type", "int_parsing", "int_from_float"):
        return "must be a whole number (no decimal point, not text, not true/false)"
    if kind in ("bool_type", "bool_parsing"):
        return "must be true or false (a TOML boolean, not text or a number)"
    if kind == "string_type":
        return "must be text in quotes"
    if kind == "list_type":
        return "must be a list in brackets, such as [1, 10, 50]"
    if kind == "too_long":
        return f"must have at most {ctx.get('max_length')} entries, got {ctx.get('actual_length')}"
    if kind == "too_short":
        return f"must have at least {ctx.get('min_length')} entries"
    if kind in ("model_type", "dataclass_type", "dict_type"):
        return "must be a table"
    return err["msg"].replace("Value error, ", "")


def _num(value: Any) -> str:
    return f"{value:g}" if isinstance(value, int | float) else str(value)


def shown(value: Any) -> str:
    """Return a value as messages show it.

    Parameters
    ----------
    value : object
        The value given.

    Returns
    -------
    str
        Its repr, ``nan``/``inf`` for non-finite floats, "a table" for a dict.
    """
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, float) and not math.isfinite(value):
        return str(value)
    text = repr(value)
    return text if len(text) <= 80 else text[:77] + "..."


_ADAPTERS: dict[int, TypeAdapter] = {}


def require(name: str, value: Any, rule: Any) -> Any:
    """Check one library argument against a rule, with the case file's message.

    Parameters
    ----------
    name : str
        The argument's name, as in the case file where it has a key.
    value : object
        The value given.
    rule : type
        One of this module's types (:data:`Positive`, :data:`Ratio`, ...).

    Returns
    -------
    object
        The validated value (a float for number rules).

    Raises
    ------
    InputError
        "name = value: what is allowed".
    """
    adapter = _ADAPTERS.get(id(rule))
    if adapter is None:
        adapter = _ADAPTERS[id(rule)] = TypeAdapter(rule)
    if isinstance(value, np.generic):
        value = value.item()  # numpy scalars are the library's own numbers
    try:
        return adapter.validate_python(value)
    except ValidationError as exc:
        err = exc.errors()[0]
        where = name + "".join(f"[{p}]" for p in err["loc"])
        raise InputError(f"{where} = {shown(err.get('input', value))}: "
                         f"{describe_error(err)}") from None

