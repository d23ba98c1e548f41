"""Re-tuning a built damper to the measured structure.

Once the tower stands, its frequency (and damping) are measured, e.g. by
:mod:`tmd.identify` with the damper locked. The damper's mass is built; its
spring and dashpot are adjusted. :func:`retune_damper` gives, for the
measured structure under the case's design load,

* the frequency and damping ratio of the damper that a tuning of the built
  mass (:func:`tmd.design.tune`, the case's objective and stroke limit)
  asks for, and the spring k = m_d (2 pi f_d)^2 and dashpot
  c = 2 zeta_d m_d (2 pi f_d) that give them;
* whether the new damper frequency and spring lie within the adjustment
  range specified with the design (f_d (1 +/- b) and k_d (1 +/- b)^2, the
  report's re-tuning table);
* the peak acceleration with the damper as installed (tuned to the model)
  and after re-tuning, both on the measured structure.

The measured structure keeps the case's modal mass unless a measured one is
given, and the case's structural damping unless a measured damping ratio is
given. Where the case adds aerodynamic damping, the design wind's value is
added once and scaled with 1 / f_s (EN 1991-1-4 F.5, as in the detuning
sweeps); a measured damping ratio stands for the structural part (see
:data:`tmd.identify.DAMPING_NOTE` on not counting aerodynamic damping twice).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.design import LoadedMode, TmdDesign, evaluate_tmd, tune
from tmd.errors import InputError
from tmd.structure import Mode

TWO_PI = 2.0 * math.pi


@dataclass(frozen=True)
class BuiltDamper:
    """A damper described by its absolute properties, as built.

    Parameters
    ----------
    mass_kg : float
        Moving mass m_d [kg].
    stiffness_n_per_m : float
        Spring k_d [N/m].
    damping_n_s_per_m : float
        Dashpot c_d [N s/m].
    """

    mass_kg: float
    stiffness_n_per_m: float
    damping_n_s_per_m: float

    def __post_init__(self):
        for name in ("mass_kg", "stiffness_n_per_m", "damping_n_s_per_m"):
            value = getattr(self, name)
            if not (isinstance(value, int | float) and math.isfinite(value) and value > 0):
                raise InputError(f"{name} = {value!r}: must be a finite number > 0")
        if not self.damping_ratio < 1:
            raise InputError(f"damping_n_s_per_m = {self.damping_n_s_per_m!r} makes the damper's "
                             f"damping ratio {self.damping_ratio:.3g}; it must be < 1")

    @property
    def frequency_hz(self) -> float:
        """Own frequency f_d = sqrt(k_d / m_d) / (2 pi) [Hz]."""
        return math.sqrt(self.stiffness_n_per_m / self.mass_kg) / TWO_PI

    @property
    def damping_ratio(self) -> float:
        """zeta_d = c_d / (2 m_d omega_d), referred to its own frequency [-]."""
        return self.damping_n_s_per_m / (2.0 * self.mass_kg * TWO_PI * self.frequency_hz)

    def on(self, mode: Mode) -> TunedMassDamper:
        """Return the same device described relative to ``mode``.

        Parameters
        ----------
        mode : Mode
            The structure it is attached to.

        Returns
        -------
        TunedMassDamper
            mu = m_d / M*, f_d / f_s, zeta_d.
        """
        return TunedMassDamper(self.mass_kg / mode.modal_mass_kg,
                               self.frequency_hz / mode.frequency_hz, self.damping_ratio)

    @classmethod
    def of(cls, damper: TunedMassDamper, mode: Mode) -> BuiltDamper:
        """Return the absolute properties of a damper given relative to ``mode``.

        Parameters
        ----------
        damper : TunedMassDamper
            Mass, frequency and damping ratios.
        mode : Mode
            The structure the ratios refer to.

        Returns
        -------
        BuiltDamper
        """
        return cls(damper.mass_kg(mode), damper.stiffness_n_per_m(mode),
                   damper.damping_n_s_per_m(mode))


@dataclass(frozen=True)
class MeasuredStructure:
    """The structure as measured, and the damping used with the design load.

    Parameters
    ----------
    frequency_hz : float
        Measured natural frequency [Hz].
    modal_mass_kg : float
        Modal mass M* [kg] (the case's unless measured).
    structural_damping_ratio : float
        The measured damping ratio, or the case's structural one [-].
    aerodynamic_damping_ratio : float
        The case's aerodynamic damping at the design wind, scaled to the
        measured frequency (0 unless the case adds it) [-].
    damping_source : str
        "measured" or "case".
    """

    frequency_hz: float
    modal_mass_kg: float
    structural_damping_ratio: float
    aerodynamic_damping_ratio: float
    damping_source: str

    @property
    def mode(self) -> Mode:
        """The mode with total damping (structural + aerodynamic) under the design load."""
        return Mode(self.frequency_hz, self.modal_mass_kg,
                    self.structural_damping_ratio + self.aerodynamic_damping_ratio)


def measured_structure(nominal: Mode, structural_damping_ratio: float,
                       aerodynamic_damping_ratio: float, frequency_hz: float, *,
                       damping_ratio: float | None = None,
                       modal_mass_kg: float | None = None) -> MeasuredStructure:
    """Return the measured structure from the case's mode and the measurements.

    Parameters
    ----------
    nominal : Mode
        The case's mode (its frequency is the one the aerodynamic damping
        refers to).
    structural_damping_ratio : float
        The case's structural damping ratio [-].
    aerodynamic_damping_ratio : float
        The case's aerodynamic damping at the design wind and nominal
        frequency [-] (0 when not added).
    frequency_hz : float
        Measured frequency [Hz].
    damping_ratio : float, optional
        Measured damping ratio [-], standing for the structural part.
    modal_mass_kg : float, optional
        Measured (or re-computed) modal mass [kg].

    Returns
    -------
    MeasuredStructure

    Notes
    -----
    Aerodynamic damping is proportional to 1 / n_1 (EN 1991-1-4 F.18), so
    zeta_a(f) = zeta_a(f_nominal) f_nominal / f.
    """
    for name, value, upper in (("--measured-frequency-hz", frequency_hz, math.inf),
                               ("--measured-damping-ratio", damping_ratio, 1.0),
                               ("--measured-modal-mass-kg", modal_mass_kg, math.inf)):
        if value is not None and not (math.isfinite(value) and 0 < value < upper):
            allowed = "in (0, 1)" if upper == 1.0 else "a finite number > 0"
            raise InputError(f"{name} = {value!r}: must be {allowed}")
    aero = aerodynamic_damping_ratio * nominal.frequency_hz / frequency_hz
    return MeasuredStructure(
        frequency_hz=float(frequency_hz),
        modal_mass_kg=float(nominal.modal_mass_kg if modal_mass_kg is None else modal_mass_kg),
        structural_damping_ratio=float(structural_damping_ratio if damping_ratio is None
                                       else damping_ratio),
        aerodynamic_damping_ratio=float(aero),
        damping_source="case" if damping_ratio is None else "measured")


@dataclass(frozen=True)
class Retuning:
    """The re-tuned damper on the measured structure.

    Parameters
    ----------
    structure : MeasuredStructure
        The building as measured: natural frequency, modal mass and the
        damping used with the design load.
    installed : BuiltDamper
        The damper as built and tuned to the model.
    retuned : BuiltDamper
        The same mass with the new spring and dashpot.
    frequency_ratio : float
        f_d / f_s of the re-tuned damper on the measured structure [-].
    adjustment_band : float
        b of the specified range f_d (1 +/- b), k_d (1 +/- b)^2 [-].
    before, after : TmdDesign
        Responses on the measured structure with the installed and the
        re-tuned damper.
    """

    structure: MeasuredStructure
    installed: BuiltDamper
    retuned: BuiltDamper
    frequency_ratio: float
    adjustment_band: float
    before: TmdDesign
    after: TmdDesign

    @property
    def frequency_range_hz(self) -> tuple[float, float]:
        """Specified adjustment range of the damper frequency [Hz]."""
        f = self.installed.frequency_hz
        return f * (1.0 - self.adjustment_band), f * (1.0 + self.adjustment_band)

    @property
    def stiffness_range_n_per_m(self) -> tuple[float, float]:
        """Specified adjustment range of the spring [N/m]."""
        k = self.installed.stiffness_n_per_m
        return k * (1.0 - self.adjustment_band) ** 2, k * (1.0 + self.adjustment_band) ** 2

    @property
    def within_adjustment_range(self) -> bool:
        """True when the new damper frequency and spring both lie in the specified range."""
        f_lo, f_hi = self.frequency_range_hz
        k_lo, k_hi = self.stiffness_range_n_per_m
        return bool(f_lo <= self.retuned.frequency_hz <= f_hi
                    and k_lo <= self.retuned.stiffness_n_per_m <= k_hi)

    def as_dict(self) -> dict:
        """Return the ``retuned`` block of ``tmd retune --json``.

        Returns
        -------
        dict
            Keys with SI units; see the README's re-tuning section.
        """
        s = self.structure
        f_lo, f_hi = self.frequency_range_hz
        k_lo, k_hi = self.stiffness_range_n_per_m
        return {
            "frequency_hz": self.retuned.frequency_hz,
            "damping_ratio": self.retuned.damping_ratio,
            "stiffness_n_per_m": self.retuned.stiffness_n_per_m,
            "damping_n_s_per_m": self.retuned.damping_n_s_per_m,
            "within_adjustment_range": self.within_adjustment_range,
            "peak_acceleration_before_m_s2": self.before.peak_acceleration_m_s2,
            "peak_acceleration_after_m_s2": self.after.peak_acceleration_m_s2,
            "mass_kg": self.retuned.mass_kg,
            "mass_ratio": self.after.mass_ratio,
            "frequency_ratio": self.frequency_ratio,
            "peak_stroke_before_m": self.before.peak_stroke_m,
            "peak_stroke_after_m": self.after.peak_stroke_m,
            "installed": {"frequency_hz": self.installed.frequency_hz,
                          "damping_ratio": self.installed.damping_ratio,
                          "stiffness_n_per_m": self.installed.stiffness_n_per_m,
                          "damping_n_s_per_m": self.installed.damping_n_s_per_m},
            "adjustment_band": self.adjustment_band,
            "adjustment_frequency_min_hz": f_lo, "adjustment_frequency_max_hz": f_hi,
            "adjustment_stiffness_min_n_per_m": k_lo, "adjustment_stiffness_max_n_per_m": k_hi,
            "structure": {"frequency_hz": s.frequency_hz, "modal_mass_kg": s.modal_mass_kg,
                          "structural_damping_ratio": s.structural_damping_ratio,
                          "aerodynamic_damping_ratio": s.aerodynamic_damping_ratio,
                          "damping_ratio": s.mode.damping_ratio,
                          "damping_source": s.damping_source},
        }


def retune_damper(load: LoadedMode, structure: MeasuredStructure, installed: BuiltDamper, *,
                  adjustment_band: float, objective: str = "acceleration",
                  max_stroke_m: float | None = None,
                  target_peak_m_s2: float | None = None) -> Retuning:
    """Re-tune a built damper (its mass fixed) to the measured structure.

    Parameters
    ----------
    load : LoadedMode
        The case's design load (its mode is replaced by the measured one).
    structure : MeasuredStructure
        The building as measured: natural frequency, modal mass and the
        damping used with the design load.
    installed : BuiltDamper
        The damper as built.
    adjustment_band : float
        b of the specified adjustment range [-].
    objective : {"acceleration", "displacement"}
        What the tuning minimises (the case's [damper] objective).
    max_stroke_m : float, optional
        Peak stroke limit, a constraint of the tuning [m].
    target_peak_m_s2 : float, optional
        For the ``meets_target`` verdicts [m/s^2].

    Returns
    -------
    Retuning

    Notes
    -----
    mu = m_d / M*_measured; (f_d / f_s, zeta_d) from
    :func:`tmd.design.tune` on the measured mode; k = m_d (2 pi f_d)^2,
    c = 2 zeta_d m_d (2 pi f_d).
    """
    if not 0 <= adjustment_band < 1:
        raise InputError(f"adjustment_band = {adjustment_band!r}: must lie in [0, 1)")
    measured = replace(load, mode=structure.mode)
    mode = structure.mode
    mu = installed.mass_kg / mode.modal_mass_kg
    tuning = tune(measured, mu, objective=objective, max_stroke_m=max_stroke_m)
    new = TunedMassDamper(mu, tuning.frequency_ratio, tuning.damping_ratio)
    before = evaluate_tmd(measured, installed.on(mode), target_peak_m_s2)
    after = evaluate_tmd(measured, new, target_peak_m_s2)
    return Retuning(structure, installed, BuiltDamper.of(new, mode), tuning.frequency_ratio,
                    float(adjustment_band), before, after)
