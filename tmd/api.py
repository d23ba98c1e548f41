"""The Python (notebook) interface: cases from files, dicts or objects; results as objects.

A job call returns a :class:`Result`: ``result.to_dict()`` is results.json,
``repr(result)`` is one line, ``result.report()`` and ``result.figures()``
give the report's files. The same jobs run behind the ``tmd`` command.

Examples
--------
>>> import tmd
>>> case = tmd.read_case("cases/harbourline_residences.toml")   # doctest: +SKIP
>>> tmd.run_design(case)                                             # doctest: +SKIP
<design 'Harbourline Residences': TMD 1.13% of M* (...), peak 0.1 m/s² <= target 0.1, meets>
"""

from __future__ import annotations

import json
from dataclasses import dataclass, replace
from pathlib import Path

from tmd.case import Case, case_from_dict, case_with_spectrum, read_case
from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.jobs import compare_job, design_job, evaluate_job, sweep_job
from tmd.outputs import OutputFolder, to_json
from tmd.spectra import ForceSpectrum
from tmd.structure import Mode

__all__ = ["Case", "Mode", "Result", "TunedMassDamper", "case_from_dict", "case_of", "read_case",
           "run_compare", "run_design", "run_evaluate", "run_sweep", "with_mode"]


def case_of(mode: Mode, spectrum: ForceSpectrum, target_peak_m_s2: float, *,
            name: str = "case", duration_s: float | None = None, **tables: dict) -> Case:
    """Build a force-spectrum case from objects, validated by the case file's rules.

    Parameters
    ----------
    mode : Mode
        Frequency [Hz], modal mass M* [kg] (mode shape 1 at the damper) and
        damping ratio [-].
    spectrum : tmd.spectra.ForceSpectrum
        One-sided modal force PSD [N^2/Hz] (``WhiteSpectrum``,
        ``FirstOrderSpectrum``, ``TabulatedSpectrum``, ...).
    target_peak_m_s2 : float
        Peak acceleration target [m/s^2].
    name : str
        The case's name in results and reports.
    duration_s : float, optional
        Averaging duration of the peaks [s]; default the case file's.
    **tables : dict
        Other case tables by name (``damper``, ``robustness``, ``options``,
        ``simulation``), each a dict of the case file's keys.

    Returns
    -------
    Case
    """
    target = {"peak_acceleration_m_s2": float(target_peak_m_s2)}
    if duration_s is not None:
        target["duration_s"] = float(duration_s)
    data = {"name": name, "target": target | tables.pop("target", {}),
            "mode": {"frequency_hz": float(mode.frequency_hz),
                     "modal_mass_kg": float(mode.modal_mass_kg),
                     "damping_ratio": float(mode.damping_ratio)}} | tables
    return case_with_spectrum(data, spectrum)


def with_mode(case: Case, **changes: float) -> Case:
    """Return the case with its mode's properties changed (a parametric study).

    Parameters
    ----------
    case : Case
        The case to vary.
    **changes : float
        ``frequency_hz``, ``modal_mass_kg`` or ``damping_ratio`` of the mode.

    Returns
    -------
    Case
        The same loads and settings. For a wind case the loads and the
        aerodynamic damping stay those of the case as read, so change the
        frequency or modal mass of a wind case in its file or dict instead;
        the structural damping ratio can be changed either way.
    """
    if case.wind_loads and set(changes) - {"damping_ratio"}:
        raise ValueError("a wind case's loads depend on the mode's frequency and mass: change "
                         "them in the case's dict (tmd.case_from_dict) instead")
    return replace(case, mode=replace(case.mode, **changes))


@dataclass(frozen=True, repr=False)
class Result:
    """The results of one job, as results.json holds them.

    Parameters
    ----------
    job : str
        "design", "evaluate", "sweep" or "compare".
    data : dict
        results.json (plain data; non-finite numbers as None).
    """

    job: str
    data: dict

    def to_dict(self) -> dict:
        """Return results.json as a new plain dict (what ``tmd <job>`` writes).

        Returns
        -------
        dict
            Plain, strict JSON data.
        """
        return json.loads(to_json(self.data))

    def __getitem__(self, key: str):
        return self.data[key]

    def __repr__(self) -> str:
        d, target = self.data, self.data["target"]["peak_acceleration_m_s2"]
        name = d["case"]["name"]
        if self.job == "compare":
            met = [row["option"] for row in d["options"] if row.get("meets_target")]
            return (f"<compare {name!r}: {len(d['options'])} options, "
                    f"{len(met)} meet the target {target:g} m/s²>")
        if self.job == "sweep":
            return (f"<sweep {name!r}: worst peak {d['peak_acceleration_band_max_m_s2']:.4g} m/s² "
                    f"within ±{100 * d['frequency_band']:g}% of the frequency>")
        design = d.get("design")
        if not design or design.get("mass_ratio") is None:
            return f"<{self.job} {name!r}: no damper, {d['sizing']['message']}>"
        verdict = "meets" if design["meets_target"] else "does not meet"
        return (f"<{self.job} {name!r}: TMD {100 * design['mass_ratio']:.3g}% of M* "
                f"({design['mass_kg'] / 1000:,.1f} t, {design['frequency_hz']:.4g} Hz, damping "
                f"{design['damping_ratio']:.3g}), peak {design['peak_acceleration_m_s2']:.4g} m/s²"
                f", target {target:g}: {verdict}>")

    def report(self, *, dpi: int = 150) -> dict[str, bytes]:
        """Render the report's files: ``report.html``, ``figures/*.png``, ``tables/*.csv``.

        Parameters
        ----------
        dpi : int
            Resolution of the figures [dots per inch].

        Returns
        -------
        dict of str to bytes
        """
        if self.job not in ("design", "compare"):
            raise ValueError(f"a report is written for design and compare results, not {self.job}")
        from tmd.report import render_report  # matplotlib: only when a report is asked for

        return render_report(self.data, dpi=dpi)

    def figures(self, *, dpi: int = 150) -> dict[str, bytes]:
        """Render the report's figures as PNG bytes, by name.

        Parameters
        ----------
        dpi : int
            Resolution of the figures [dots per inch].

        Returns
        -------
        dict of str to bytes
            ``"mass_ratio"``, ``"comfort"``, ... to the PNG file's bytes.
        """
        return {name.removeprefix("figures/").removesuffix(".png"): png
                for name, png in self.report(dpi=dpi).items() if name.startswith("figures/")}

    def write(self, folder: str | Path) -> list[Path]:
        """Write results.json (and the report, for design and compare) into ``folder``.

        Parameters
        ----------
        folder : str or Path
            A new or empty folder, or one written by tmd before (see
            :class:`tmd.outputs.OutputFolder`).

        Returns
        -------
        list of Path
            The files written.
        """
        files = {"results.json": to_json(self.data)}
        if self.job in ("design", "compare"):
            files |= self.report()
        with OutputFolder(Path(folder)) as target:
            return target.write(files)


def run_design(case: Case) -> Result:
    """Size a TMD for the case (``tmd design``): bare response, design, robustness.

    Parameters
    ----------
    case : Case
        The validated case.

    Returns
    -------
    Result
        The design job's results.
    """
    return Result("design", design_job(case))


def run_evaluate(case: Case, damper: TunedMassDamper) -> Result:
    """Evaluate one given TMD on the case (``tmd evaluate``).

    Parameters
    ----------
    case : Case
        The validated case.
    damper : TunedMassDamper
        The damper (mass, frequency and damping ratios).

    Returns
    -------
    Result
        The responses of the design.
    """
    return Result("evaluate", evaluate_job(case, damper))


def run_sweep(case: Case, damper: TunedMassDamper) -> Result:
    """Sweep the detuning of a given TMD on the case (``tmd sweep``).

    Parameters
    ----------
    case : Case
        The validated case.
    damper : TunedMassDamper
        The damper (mass, frequency and damping ratios).

    Returns
    -------
    Result
        The sweeps and the band maximum.
    """
    return Result("sweep", sweep_job(case, damper))


def run_compare(case: Case) -> Result:
    """Size every enabled passive option on the case, side by side (``tmd compare``).

    Parameters
    ----------
    case : Case
        The validated case.

    Returns
    -------
    Result
        The comparison's results.
    """
    return Result("compare", compare_job(case))
