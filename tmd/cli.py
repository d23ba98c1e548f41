"""The ``tmd`` command: parse and validate the case, call the library, print, write.

Exit codes: 0 the job ran (also when a target is not met), 1 a numerical or
solver failure, 2 bad input (the message names file, field, value and what
is allowed). Set TMD_DEBUG=1 to see a traceback instead of a one-line error.
"""

from __future__ import annotations

import contextlib
import contextvars
import functools
import json
import os
import sys
import warnings
from pathlib import Path
from typing import Annotated

import typer
from rich.markup import escape
from rich.table import Table

from tmd import terminal
from tmd._version import __version__
from tmd.case import CaseError, read_case
from tmd.constants import STANDARD_GRAVITY
from tmd.dampers.tuned_mass import TunedMassDamper
from tmd.outputs import OutputFolder, to_json
from tmd.rules import FrequencyRatio, InputError, Ratio, require
from tmd.schema import CAUTIONS

# The jobs (and with them scipy and the damper stack) are imported on first use,
# so that --help and a bad-input exit stay fast. They are attributes of this
# module (PEP 562), so tests may replace them; commands look them up through _job.
_JOBS = ("compare_job", "design_job", "evaluate_job", "retune_job", "sweep_job", "wind_job")


def __getattr__(name):
    if name in _JOBS:
        import tmd.jobs

        return getattr(tmd.jobs, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def _job(name):
    """The job function ``name``: this module's attribute, imported lazily."""
    return getattr(sys.modules[__name__], name)


app = typer.Typer(add_completion=False, no_args_is_help=True,
                  help="Size passive dampers for a wind-excited building mode.")
out_console = terminal.console()
err_console = terminal.console(stderr=True)


def _show_version(value: bool) -> None:
    if value:
        out_console.print(f"tmd {__version__}", highlight=False)
        raise typer.Exit()


@app.callback()
def _main(version: Annotated[bool, typer.Option(
        "--version", callback=_show_version, is_eager=True,
        help="Print the version of tmd and exit.")] = False) -> None:
    """Size passive dampers for a wind-excited building mode."""


CaseArg = Annotated[Path, typer.Argument(help="Case file (TOML).", show_default=False)]


def _error(kind: str, exc: Exception) -> None:
    err_console.print(f"[bold red]{kind}:[/] {escape(str(exc))}", highlight=False, soft_wrap=True)


_OPEN: contextvars.ContextVar[contextlib.ExitStack] = contextvars.ContextVar("tmd_cli_open")


def _guarded(job):
    """Turn failures into exit codes and one clear line each.

    Exit 2 only for input validation (the case, its CSV, the options, the
    output folder); every other failure is numerical (exit 1) and says which
    command on which case failed, with the library's message and values.
    Output folders opened by the command are released on the way out.
    """

    @functools.wraps(job)
    def run(*args, **kwargs):
        stack = contextlib.ExitStack()
        token = _OPEN.set(stack)
        try:
            with stack, warnings.catch_warnings():
                # The jobs gather their own warnings (tmd.notes) into the results; what is
                # raised outside them (reading the case, drawing the report) is printed once
                # per message as one plain line, and numpy's floating-point text not at all.
                warnings.simplefilter("ignore", RuntimeWarning)
                warnings.showwarning = _show_once(set())
                return job(*args, **kwargs)
        except InputError as exc:
            _error("error", exc)
            raise typer.Exit(2) from None
        except typer.Exit:
            raise
        except Exception as exc:  # noqa: BLE001 - every other failure is exit 1, never a traceback
            if os.environ.get("TMD_DEBUG"):
                raise
            where = f"tmd {job.__name__.rstrip('_')} {kwargs.get('case', '')}".rstrip()
            _error("numerical failure", _numerical(where, exc))
            raise typer.Exit(1) from None
        finally:
            _OPEN.reset(token)

    return run


def _show_once(seen: set):
    def show(message, category, filename, lineno, file=None, line=None):
        text = str(message)
        if text not in seen:
            seen.add(text)
            err_console.print(f"[yellow]warning:[/] {escape(text)}", highlight=False)

    return show


def _numerical(where: str, exc: Exception) -> str:
    kind = type(exc).__name__
    text = str(exc) or "(no message)"
    return (f"{where}: the computation failed ({kind}: {text}); the inputs passed validation. "
            "Set TMD_DEBUG=1 for a traceback")


def _accel(value: float) -> str:
    return f"{value:.4f} m/s² ({1000 * value / STANDARD_GRAVITY:.1f} milli-g)"


def _summary(result: dict) -> Table:
    table = Table(title=f"{result['case']['name']}", show_lines=False)
    table.add_column("quantity")
    table.add_column("bare building", justify="right")
    rec = result.get("recommended") or {}
    key = rec.get("design_key") or "design"
    label = {"band_design": "recommended: band-robust",
             "design": "recommended: nominal"}.get(key) if rec else "with damper"
    table.add_column(label, justify="right")
    bare, design = result["bare"], result.get(key)
    target = result["target"]["peak_acceleration_m_s2"]
    table.add_row("target peak acceleration", _accel(target), "")
    table.add_row("peak acceleration", _accel(bare["peak_acceleration_m_s2"]),
                  _accel(design["peak_acceleration_m_s2"]) if design else "-")
    table.add_row("rms acceleration", f"{bare['sigma_acceleration_m_s2']:.4f} m/s²",
                  f"{design['sigma_acceleration_m_s2']:.4f} m/s²" if design else "-")
    table.add_row("peak factor", f"{bare['peak_factor']:.3f}",
                  f"{design['peak_factor']:.3f}" if design else "-")
    if design:
        rows = [
            ("mass ratio", f"{design['mass_ratio']:.5f}"),
            ("damper mass", f"{design['mass_kg'] / 1000:,.1f} t"),
            ("frequency ratio", f"{design['frequency_ratio']:.4f}"),
            ("damper frequency", f"{design['frequency_hz']:.4f} Hz"),
            ("damper damping ratio", f"{design['damping_ratio']:.4f}"),
            ("spring stiffness", f"{design['stiffness_n_per_m'] / 1000:,.1f} kN/m"),
            ("dashpot coefficient", f"{design['damping_n_s_per_m'] / 1000:,.2f} kN·s/m"),
            ("rms / peak stroke", f"{design['sigma_stroke_m']:.3f} / "
                                  f"{design['peak_stroke_m']:.3f} m (travel ±)"),
            ("peak damper force", f"{design['peak_damper_force_n'] / 1000:,.1f} kN"),
            ("effective damping (added)", f"{design['effective_damping_ratio']:.4f} "
                                          f"({design['added_damping_ratio']:.4f})"),
        ]
        for name, value in rows:
            table.add_row(name, "", value)
    return table


def _return_period_table(result: dict) -> Table | None:
    rows = result.get("by_return_period")
    if not rows:
        return None
    table = Table(title="per return period (design at the target's)")
    limited = any("stroke_within_limit" in (row.get("design") or {}) for row in rows)
    for name in ("return period", "bare peak acc.", "damped peak acc.", "peak stroke",
                 "peak damper force") + (("stroke limit",) if limited else ()):
        table.add_column(name, justify="right")
    for row in rows:
        d = row.get("design") or {}
        cells = [
            f"{row['return_period_years']:g} y", _accel(row["bare"]["peak_acceleration_m_s2"]),
            _accel(d["peak_acceleration_m_s2"]) if d else "-",
            f"{d['peak_stroke_m']:.3f} m" if d else "-",
            f"{d['peak_damper_force_n'] / 1000:,.1f} kN" if d else "-"]
        if limited:
            ok = d.get("stroke_within_limit")
            cells.append("-" if ok is None else "within" if ok else "[red]EXCEEDED[/]")
        table.add_row(*cells)
    return table


def _end_stop_table(result: dict) -> Table | None:
    """Travel, stop contacts, impact velocity and connection-force estimate."""
    e = result.get("end_stops")
    if not e:
        return None
    table = Table(title=f"end-stops: travel ±{e['travel_m']:.3f} m ({e['travel_basis']})")
    for name in ("return period", "peak stroke", "contacts / hour / side",
                 "connection force (estimate)"):
        table.add_column(name, justify="right")
    for row in e["by_return_period"]:
        period = row["return_period_years"]
        table.add_row("design load" if period is None else f"{period:g} y",
                      f"{row['peak_stroke_m']:.3f} m",
                      f"{3600 * row['contact_rate_per_side_hz']:.3g}",
                      f"{row['connection_force_estimate_n'] / 1000:,.1f} kN")
    return table


def _print_recommendation(result: dict) -> None:
    rec = result.get("recommended")
    if not rec:
        return
    which = {"band_design": "the band-robust design", "design": "the nominal design",
             None: "no damper"}[rec["design_key"]]
    out_console.print(f"[bold]Recommended: {which}.[/] " + escape(rec["why"]), highlight=False)
    out_console.print("[dim]Rule: " + escape(rec["rule"]) + ".[/]", highlight=False)
    if rec.get("end_stops") and (table := _end_stop_table({"end_stops": rec["end_stops"]})):
        table.title = f"recommended design, {table.title}"
        out_console.print(table)


def _print_end_stops(result: dict) -> None:
    if (table := _end_stop_table(result)) is None:
        return
    e = result["end_stops"]
    out_console.print(table)
    where = ("" if e["extreme_return_period_years"] is None
             else f" at {e['extreme_return_period_years']:g} years")
    out_console.print(
        f"impact velocity at the stops{where}: mean {e['impact_velocity_mean_m_s']:.2f} m/s, "
        f"{e['impact_velocity_rare_m_s']:.2f} m/s at 1 contact in "
        f"{1 / e['impact_velocity_rare_probability']:.0f} (Rayleigh); kinetic energy at the "
        f"mean {e['impact_energy_mean_j'] / 1000:,.1f} kJ", highlight=False)
    out_console.print("[dim]" + escape(e["note"]) + "[/]", highlight=False)


def _print_notes(result: dict) -> None:
    for message in result.get("warnings", []):
        err_console.print(f"[yellow]warning:[/] {escape(message)}", highlight=False)
    out_console.print("[dim]Cautions: " + escape(" ".join(result["cautions"])) + "[/]",
                      highlight=False)


@app.command()
@_guarded
def design(case: CaseArg,
           out: Annotated[Path | None, typer.Option(
               help="Folder for results.json (default: out/<case file stem>).")] = None):
    """Size a TMD for the case and write DIR/results.json."""
    from tmd.building_case import is_building_case  # deferred: it loads the building stack

    if is_building_case(case):
        _design_building(case, out)
        return
    c, target = _case_and_output(case, out)
    result = _job("design_job")(c)
    out_console.print(_summary(result))
    if (table := _return_period_table(result)) is not None:
        out_console.print(table)
    sizing = result["sizing"]
    colour = "green" if sizing["meets_target"] else "red"
    out_console.print(f"[{colour}]{escape(sizing['message'])}[/]", highlight=False)
    _print_end_stops(result)
    _print_robustness(result)
    _print_recommendation(result)
    _print_notes(result)
    _write(c, result, target)


def _design_building(case_path: Path, out: Path | None) -> None:
    """A whole-building case ([[modes]]): size the dampers, print, write JSON and CSV tables."""
    from tmd.building_case import load_building_case
    from tmd.building_job import building_design_job, building_tables

    folder = out if out is not None else Path("out") / case_path.stem
    target = _OPEN.get().enter_context(OutputFolder(folder, protected=(case_path,)))
    c = load_building_case(case_path)
    target.protect(c.input_files)
    result = building_design_job(c)
    table = Table(title=escape(f"{result['case']['name']}: peak accelerations [m/s²], design "
                               "return period"))
    for column in ("wind", "point", "bare resultant", "damped x", "damped y",
                   "damped resultant", "torsional share"):
        table.add_column(column, justify="left" if column in ("wind", "point") else "right")
    period = result["target"]["return_period_years"]
    for row in result["points"]:
        if row["return_period_years"] not in (period, None):
            continue
        d = row.get("damped", row["bare"])
        table.add_row(row["wind_direction"], row["point"],
                      f"{row['bare']['peak_resultant_m_s2']:.4f}",
                      *(f"{v:.4f}" for v in d["peak_acceleration_m_s2"]),
                      f"{d['peak_resultant_m_s2']:.4f}", f"{100 * d['torsional_share']:.0f}%")
    out_console.print(table)
    for axis in result["damper_axes"]:
        out_console.print(escape(
            f"{axis['damper']} {axis['direction']}: {axis['mass_kg'] / 1000:,.1f} t, "
            f"{axis['frequency_hz']:.4f} Hz, damping ratio {axis['damping_ratio']:.3f}, "
            f"peak stroke {axis['peak_stroke_m']:.3f} m, peak force "
            f"{axis['peak_force_n'] / 1000:,.0f} kN"), highlight=False)
    sizing = result["sizing"]
    for g in result["governing"]:
        period = g["return_period_years"]
        when = f"{period:g}-year" if period is not None else "design load"
        out_console.print(escape(f"governing, {when}: {g['point']}, wind {g['wind_direction']}, "
                                 f"{g['component']}, {_accel(g['peak_acceleration_m_s2'])}"),
                          highlight=False)
    colour = "green" if sizing["meets_target"] else "red"
    out_console.print(f"[{colour}]{escape(sizing['message'])}[/]", highlight=False)
    _print_notes(result)
    # Imported here: matplotlib is only needed by the commands that write a report.
    from tmd.report.building import building_report

    files = ({"results.json": to_json(result)} | building_tables(result)
             | building_report(result))
    written = target.write(files)
    out_console.print(escape(f"wrote {len(written)} files to {target.folder} (results.json, "
                             "report.html, tables/)"), highlight=False, soft_wrap=True)


def _case_and_output(case_path: Path, out: Path | None):
    """The validated case and its locked, checked output folder, before any computation.

    The folder is released when the command ends (see :func:`_guarded`).
    """
    folder = out if out is not None else Path("out") / case_path.stem
    target = _OPEN.get().enter_context(OutputFolder(folder, protected=(case_path,)))
    c = read_case(case_path)
    target.protect(c.input_files)
    return c, target


def _write(c, result, target: OutputFolder):
    """results.json, the HTML report, figures and tables, all at once."""
    # Imported here: matplotlib is only needed by the commands that write a report.
    from tmd.report import progress_bar, render_report

    with progress_bar("Writing the report", console=err_console) as step:
        files = {"results.json": to_json(result)} | render_report(c, result, on_step=step)
    written = target.write(files)
    out_console.print(escape(f"wrote {len(written)} files to {target.folder} (results.json, "
                             "report.html, figures/, tables/)"), highlight=False, soft_wrap=True)


def _print_robustness(result: dict) -> None:
    """The nominal and robust designs across the band, and what robustness costs."""
    summary = result.get("robustness_summary")
    if summary is None:
        return
    band = result["frequency_band"]
    table = Table(title=f"robustness: structure frequency within ±{100 * band:g}%")
    table.add_column("design")
    table.add_column("mass", justify="right")
    table.add_column("peak acc. at nominal", justify="right")
    table.add_column("worst peak acc. in band", justify="right")
    d = result["design"]
    table.add_row("nominal optimum", f"{d['mass_kg'] / 1000:,.1f} t",
                  _accel(d["peak_acceleration_m_s2"]),
                  _accel(result["peak_acceleration_band_max_m_s2"]))
    r = result.get("band_design")
    if r:
        label = ("robust (meets target across band)" if r["meets_target_across_band"]
                 else "robust (best across band; target NOT met)")
        table.add_row(label, f"{r['mass_kg'] / 1000:,.1f} t",
                      _accel(r["peak_acceleration_m_s2"]),
                      _accel(r["peak_acceleration_band_max_m_s2"]))
    out_console.print(table)
    notes = [f"the nominal design's worst peak in the band is "
             f"{100 * summary['nominal_band_loss']:.1f}% above its nominal peak"]
    if summary.get("robust_extra_mass_kg") is not None:
        notes.append(f"the robust design costs {summary['robust_extra_mass_kg'] / 1000:,.1f} t "
                     f"({100 * summary['robust_extra_mass_fraction']:.0f}%) more mass")
    p = result.get("probabilistic")
    if p:
        notes.append(f"probability of exceeding the target: nominal "
                     f"{p['nominal']['exceedance_probability']:.3f}"
                     + (f", robust {p['robust']['exceedance_probability']:.3f}"
                        if p.get("robust") else ""))
    out_console.print("; ".join(notes), highlight=False)


MassKg = Annotated[float | None, typer.Option(
    "--damper-mass-kg", help="Built damper mass m_d [kg] (instead of the ratios).")]
StiffnessNPerM = Annotated[float | None, typer.Option(
    "--damper-stiffness-n-per-m", help="Built damper spring k_d [N/m].")]
DampingNSPerM = Annotated[float | None, typer.Option(
    "--damper-damping-n-s-per-m", help="Built damper dashpot c_d [N·s/m].")]


@app.command()
@_guarded
def evaluate(case: CaseArg,
             mass_ratio: Annotated[float | None, typer.Option(help="m_d / M* [-].")] = None,
             frequency_ratio: Annotated[float | None, typer.Option(help="f_d / f_s [-].")] = None,
             damping_ratio: Annotated[float | None, typer.Option(
                 help="Damper damping ratio, referred to f_d [-].")] = None,
             damper_mass_kg: MassKg = None, damper_stiffness_n_per_m: StiffnessNPerM = None,
             damper_damping_n_s_per_m: DampingNSPerM = None,
             json_output: Annotated[bool, typer.Option(
                 "--json", help="Print {\"design\": {...}} as JSON only.")] = False):
    """Responses of one given TMD design (a proposed or as-built damper)."""
    c = read_case(case)
    damper = _design_from(c, None, (mass_ratio, frequency_ratio, damping_ratio),
                          (damper_mass_kg, damper_stiffness_n_per_m, damper_damping_n_s_per_m))
    result = _job("evaluate_job")(c, damper)
    if json_output:
        typer.echo(to_json({"design": result["design"]}), nl=False)
        return
    out_console.print(_summary(result))
    line, colour = terminal.verdict_line(result)
    out_console.print(f"[{colour}]{escape(line)}[/]", highlight=False)
    _print_notes(result)


def _damper_from_options(mass_ratio, frequency_ratio, damping_ratio,
                         names=("--mass-ratio", "--frequency-ratio", "--damping-ratio")
                         ) -> TunedMassDamper:
    """A TMD from options, judged by the case file's rules for the same quantities."""
    rules_of = (Ratio, FrequencyRatio, Ratio)
    values = [require(name, value, rule)
              for name, value, rule in zip(names, (mass_ratio, frequency_ratio, damping_ratio),
                                           rules_of, strict=True)]
    return TunedMassDamper(*values)


WIND_ROWS = (
    ("reference height z_s", "reference_height_m", "{:.1f} m"),
    ("mean speed v_m(z_s)", "mean_speed_m_s", "{:.2f} m/s"),
    ("turbulence intensity", "turbulence_intensity", "{:.3f}"),
    ("length scale L(z_s)", "length_scale_m", "{:.1f} m"),
    ("S_u at the mode's frequency", "wind_spectrum_at_mode_m2_s2_per_hz", "{:.4g} m²/s²/Hz"),
    ("aerodynamic damping ratio", "aerodynamic_damping_ratio", "{:.4f}"),
    ("background factor B²", "background_factor_sq", "{:.4f}"),
    ("resonance factor R²", "resonance_factor_sq", "{:.4f}"),
    ("size reduction R_h", "size_reduction_height", "{:.4f}"),
    ("size reduction R_b", "size_reduction_breadth", "{:.4f}"),
    ("total log decrement", "log_decrement_total", "{:.4f}"),
    ("up-crossing frequency", "upcrossing_hz", "{:.4f} Hz"),
    ("peak factor k_p", "peak_factor", "{:.3f}"),
    ("structural factor c_s c_d", "structural_factor", "{:.3f}"),
    ("acceleration peak factor", "peak_factor_acceleration", "{:.3f}"),
    ("EN Annex B rms acceleration", "sigma_acceleration_m_s2", "{:.4f} m/s²"),
    ("EN Annex B peak acceleration", "peak_acceleration_m_s2", "{:.4f} m/s²"),
    ("spectral rms acceleration", "spectral_sigma_acceleration_m_s2", "{:.4f} m/s²"),
    ("spectral peak acceleration", "spectral_peak_acceleration_m_s2", "{:.4f} m/s²"),
    ("across-wind spectral peak acceleration", "across_spectral_peak_acceleration_m_s2",
     "{:.4f} m/s²"),
    ("top speed U_H", "top_mean_speed_m_s", "{:.2f} m/s"),
    ("reduced velocity U_H/(f_s b)", "reduced_velocity", "{:.2f}"),
    ("critical speed v_crit = b f_s/St", "critical_speed_m_s", "{:.2f} m/s"),
    ("lock-in possible (v_crit <= 1.25 v_m)", "lock_in_possible", "{}"),
    ("rms lift coefficient C'_L", "rms_lift_coefficient", "{:.4f}"),
)


@app.command()
@_guarded
def wind(case: CaseArg,
         json_output: Annotated[bool, typer.Option("--json", help="Print JSON only.")] = False):
    """Wind at the reference height and the EN 1991-1-4 Annex B check, per return period."""
    result = _job("wind_job")(read_case(case))
    if json_output:
        typer.echo(to_json(result), nl=False)
        return
    table = Table(title=f"{result['case']['name']}: bare building, code route and spectral route")
    table.add_column("quantity")
    for row in result["return_periods"]:
        table.add_column(f"{row['return_period_years']:g}-year", justify="right")
    rows = result["return_periods"]
    for label, key, fmt in WIND_ROWS:
        if all(key in row for row in rows):  # Annex B rows only where EN applies
            table.add_row(label, *(fmt.format(row[key]) for row in rows))
    out_console.print(table)
    if result.get("direction_of_response") == "across":
        out_console.print("The spectral route is across-wind (no aerodynamic damping).")
    else:
        out_console.print("[dim]Both along-wind routes include the aerodynamic damping of "
                          "EN 1991-1-4 (F.18); the across-wind row has none.[/]")
    _print_notes(result)


@app.command()
@_guarded
def compare(case: CaseArg,
            out: Annotated[Path | None, typer.Option(
                help="Folder for results.json and the report (default: out/<case stem>).")
            ] = None):
    """Size every enabled passive option on the case and compare them."""
    c, target = _case_and_output(case, out)
    result = _job("compare_job")(c)
    out_console.print(terminal.options_table(result))
    _print_notes(result)
    _write(c, result, target)


@app.command()
@_guarded
def sweep(case: CaseArg,
          design_from: Annotated[Path | None, typer.Option(
              help="results.json whose design block is swept.")] = None,
          mass_ratio: Annotated[float | None, typer.Option(help="m_d / M* [-].")] = None,
          frequency_ratio: Annotated[float | None, typer.Option(help="f_d / f_s [-].")] = None,
          damping_ratio: Annotated[float | None, typer.Option(
              help="Damper damping ratio, referred to f_d [-].")] = None,
          damper_mass_kg: MassKg = None, damper_stiffness_n_per_m: StiffnessNPerM = None,
          damper_damping_n_s_per_m: DampingNSPerM = None,
          json_output: Annotated[bool, typer.Option("--json", help="Print JSON only.")] = False):
    """Detuning sweeps of a given design (e.g. an as-built damper)."""
    c = read_case(case)
    damper = _design_from(c, design_from, (mass_ratio, frequency_ratio, damping_ratio),
                          (damper_mass_kg, damper_stiffness_n_per_m, damper_damping_n_s_per_m))
    result = _job("sweep_job")(c, damper)
    if json_output:
        typer.echo(to_json(result), nl=False)
        return
    table = terminal.sweep_table(result)
    out_console.print(table)
    out_console.print(f"worst peak acceleration in the band ±{100 * result['frequency_band']:g}%:"
                      f" {_accel(result['peak_acceleration_band_max_m_s2'])}", highlight=False)
    _print_notes(result)


RATIO_OPTIONS = ("--mass-ratio", "--frequency-ratio", "--damping-ratio")
PROPERTY_OPTIONS = ("--damper-mass-kg", "--damper-stiffness-n-per-m",
                    "--damper-damping-n-s-per-m")


def _design_from(c, path, ratios, properties) -> TunedMassDamper:
    """The damper to evaluate: a results.json design, three ratios or three built properties."""
    chosen = [name for name, given in (
        ("--design-from", path is not None),
        ("the ratio options", any(v is not None for v in ratios)),
        ("the --damper-... options", any(v is not None for v in properties))) if given]
    if len(chosen) > 1:
        raise CaseError(f"give one way of describing the damper, not {' and '.join(chosen)}")
    if path is not None:
        d = _design_block(path)
        try:
            values = [d[key] for key in ("mass_ratio", "frequency_ratio", "damping_ratio")]
        except (KeyError, TypeError) as exc:
            raise CaseError(f"{path}: the design block lacks {exc}") from None
        return _damper_from_options(*values, names=[
            f"{path}: design.{k}" for k in ("mass_ratio", "frequency_ratio", "damping_ratio")])
    if any(v is not None for v in properties):
        missing = [n for n, v in zip(PROPERTY_OPTIONS, properties, strict=True) if v is None]
        if missing:
            raise CaseError(f"give all of {', '.join(PROPERTY_OPTIONS)} (missing "
                            f"{', '.join(missing)})")
        built = _built_damper(*properties).on(c.mode)
        return _damper_from_options(
            built.mass_ratio, built.frequency_ratio, built.damping_ratio,
            names=("--damper-mass-kg / M*", "the built frequency ratio",
                   "the built damping ratio"))
    missing = [n for n, v in zip(RATIO_OPTIONS, ratios, strict=True) if v is None]
    if missing:
        raise CaseError("give --design-from results.json, all of --mass-ratio, "
                        "--frequency-ratio and --damping-ratio, or all of "
                        f"{', '.join(PROPERTY_OPTIONS)} (missing {', '.join(missing)})")
    return _damper_from_options(*ratios)


def _built_damper(mass_kg, stiffness_n_per_m, damping_n_s_per_m):
    from tmd.retune import BuiltDamper

    try:
        return BuiltDamper(mass_kg, stiffness_n_per_m, damping_n_s_per_m)
    except ValueError as exc:
        raise CaseError(f"--damper-...: {exc}") from None


def _design_block(path: Path) -> dict:
    """The design block of a results.json (the recommended design where one is given)."""
    try:
        data = json.loads(Path(path).read_text(encoding="utf-8-sig"))
    except (OSError, ValueError) as exc:
        raise CaseError(f"{path}: not a readable results.json ({exc})") from None
    block = data.get("design") if isinstance(data, dict) else None
    if not isinstance(block, dict):
        raise CaseError(f"{path}: not a results.json with a design block")
    return block


@app.command()
@_guarded
def retune(case: CaseArg,
           design_from: Annotated[Path, typer.Option(
               help="results.json whose design block is the damper as built.")],
           measured_frequency_hz: Annotated[float, typer.Option(
               help="Measured natural frequency of the structure [Hz].")],
           measured_damping_ratio: Annotated[float | None, typer.Option(
               help="Measured total damping ratio, damper locked [-] (default: the case's).")
           ] = None,
           measured_modal_mass_kg: Annotated[float | None, typer.Option(
               help="Measured modal mass M* [kg] (default: the case's).")] = None,
           json_output: Annotated[bool, typer.Option(
               "--json", help="Print {\"retuned\": {...}} as JSON only.")] = False):
    """Re-tune the built damper to the measured structure (its mass kept)."""
    c = read_case(case)
    d = _design_block(design_from)
    try:
        installed = _built_damper(d["mass_kg"], d["stiffness_n_per_m"], d["damping_n_s_per_m"])
    except KeyError as exc:
        raise CaseError(f"{design_from}: the design block lacks {exc}") from None
    result = _job("retune_job")(c, installed, measured_frequency_hz,
                                damping_ratio=measured_damping_ratio,
                                modal_mass_kg=measured_modal_mass_kg)
    if json_output:
        typer.echo(to_json(result), nl=False)
        return
    r = result["retuned"]
    s = r["structure"]
    table = Table(title=f"{c.name}: re-tuning to the measured structure")
    for name in ("quantity", "as installed", "re-tuned", "specified range"):
        table.add_column(name, justify="right")
    inst = r["installed"]
    table.add_row("damper frequency", f"{inst['frequency_hz']:.4f} Hz",
                  f"{r['frequency_hz']:.4f} Hz",
                  f"{r['adjustment_frequency_min_hz']:.4f} .. "
                  f"{r['adjustment_frequency_max_hz']:.4f} Hz")
    table.add_row("spring stiffness", f"{inst['stiffness_n_per_m'] / 1000:,.1f} kN/m",
                  f"{r['stiffness_n_per_m'] / 1000:,.1f} kN/m",
                  f"{r['adjustment_stiffness_min_n_per_m'] / 1000:,.1f} .. "
                  f"{r['adjustment_stiffness_max_n_per_m'] / 1000:,.1f} kN/m")
    table.add_row("damper damping ratio", f"{inst['damping_ratio']:.4f}",
                  f"{r['damping_ratio']:.4f}", "")
    table.add_row("dashpot coefficient", f"{inst['damping_n_s_per_m'] / 1000:,.2f} kN·s/m",
                  f"{r['damping_n_s_per_m'] / 1000:,.2f} kN·s/m", "")
    table.add_row("peak acceleration", _accel(r["peak_acceleration_before_m_s2"]),
                  _accel(r["peak_acceleration_after_m_s2"]), "")
    table.add_row("peak stroke", f"{r['peak_stroke_before_m']:.3f} m",
                  f"{r['peak_stroke_after_m']:.3f} m", "")
    out_console.print(table)
    verdict = ("within" if r["within_adjustment_range"] else "OUTSIDE")
    out_console.print(
        f"measured structure: f = {s['frequency_hz']:.4f} Hz, M* = {s['modal_mass_kg']:,.0f} kg, "
        f"damping {s['structural_damping_ratio']:.4f} ({s['damping_source']}) + aerodynamic "
        f"{s['aerodynamic_damping_ratio']:.4f} at the design wind; the re-tuned damper is "
        f"{verdict} the specified adjustment range (±{100 * r['adjustment_band']:g}%)",
        highlight=False)
    out_console.print("[dim]" + escape(r["damping_note"]) + "[/]", highlight=False)
    for message in r["warnings"]:
        err_console.print(f"[yellow]warning:[/] {escape(message)}", highlight=False)
    out_console.print("[dim]Cautions: " + escape(" ".join(r["cautions"])) + "[/]",
                      highlight=False)


@app.command()
@_guarded
def identify(record: Annotated[Path, typer.Argument(
                 help="CSV record, header time_s,acceleration_m_s2.", show_default=False)],
             min_frequency_hz: Annotated[float | None, typer.Option(
                 help="Look for the mode above this frequency [Hz].")] = None,
             max_frequency_hz: Annotated[float | None, typer.Option(
                 help="Look for the mode below this frequency [Hz].")] = None,
             json_output: Annotated[bool, typer.Option("--json", help="Print JSON only.")] = False):
    """Frequency and damping of the mode from an ambient acceleration record (damper locked)."""
    from tmd.identify import identify_mode, read_acceleration_record

    result = identify_mode(read_acceleration_record(record), min_frequency_hz=min_frequency_hz,
                           max_frequency_hz=max_frequency_hz).as_dict()
    if json_output:
        typer.echo(to_json(result), nl=False)
        return
    table = Table(title=f"{record.name}: identified mode ({result['duration_s']:.0f} s record)")
    for name in ("method", "frequency", "damping ratio"):
        table.add_column(name, justify="right")
    for m in result["methods"]:
        table.add_row(m["method"], f"{m['frequency_hz']:.5f} Hz", f"{m['damping_ratio']:.5f}")
    table.add_row("reported", f"{result['frequency_hz']:.5f} Hz", f"{result['damping_ratio']:.5f}")
    out_console.print(table)
    out_console.print(
        f"spread between the methods: frequency {100 * result['frequency_spread']:.2f}%, damping "
        f"{100 * result['damping_spread']:.1f}%; expected random error for this record (Au's "
        f"law): frequency {100 * result['predicted_frequency_cov']:.2f}%, damping "
        f"{100 * result['predicted_damping_cov']:.0f}%", highlight=False)
    out_console.print(escape(f"use: tmd retune CASE --design-from results.json "
                             f"--measured-frequency-hz {result['frequency_hz']:.6g} "
                             f"--measured-damping-ratio {result['damping_ratio']:.6g}"),
                      highlight=False, soft_wrap=True)
    out_console.print("[dim]" + escape(result["damping_note"]) + "[/]", highlight=False)
    for message in result["warnings"]:
        err_console.print(f"[yellow]warning:[/] {escape(message)}", highlight=False)
    out_console.print("[dim]Cautions: " + escape(" ".join(CAUTIONS)) + "[/]", highlight=False)


SIMULATION_OPTIONS = {"records": "--records", "duration_s": "--duration-s",
                      "time_step_s": "--time-step-s", "substeps": "--substeps"}


@app.command()
@_guarded
def simulate(case: CaseArg,
             design_from: Annotated[Path, typer.Option(
                 help="results.json of `tmd design` (its TMD) or of `tmd compare` (with "
                      "--option liquid-column).")],
             option: Annotated[str, typer.Option(
                 help="Which device of the results.json: tmd or liquid-column.")] = "tmd",
             records: Annotated[int, typer.Option(help="Number of records (>= 10).")] = 200,
             duration_s: Annotated[float | None, typer.Option(
                 help="Record length T [s] (default: the target's duration).")] = None,
             time_step_s: Annotated[float | None, typer.Option(
                 help="Sample step [s] (default: 0.05 s or finer where the structure or the "
                      "load needs it).")] = None,
             seed: Annotated[int, typer.Option(help="Seed of the random phases.")] = 1,
             end_stop_travel_m: Annotated[float | None, typer.Option(
                 help="End-stops at +- this stroke [m] (default: none).")] = None,
             out: Annotated[Path | None, typer.Option(
                 help="Folder for results.json, time_history.csv and figures "
                      "(default: out/<case file stem>-simulation).")] = None,
             json_output: Annotated[bool, typer.Option("--json", help="Print JSON only.")] = False):
    """Check a design by simulated records: maxima against Davenport and Vanmarcke peaks."""
    from tmd.jobs import simulation_job
    from tmd.simulation import SimulationInputError, SimulationSettings

    target = None
    if not json_output:  # the folder is checked and locked before the simulation runs
        folder = out if out is not None else Path("out") / f"{case.stem}-simulation"
        target = _OPEN.get().enter_context(OutputFolder(folder, protected=(case, design_from)))
    c = read_case(case)
    if target is not None:
        target.protect(c.input_files)
    device = _simulated_device_from(c, design_from, option)
    if end_stop_travel_m is not None and not (0 < end_stop_travel_m < float("inf")):
        raise CaseError(f"--end-stop-travel-m = {end_stop_travel_m!r}: must be finite and > 0")
    settings = SimulationSettings(records=records, duration_s=duration_s or c.duration_s,
                                  time_step_s=time_step_s, seed=seed)
    try:
        result, holder = simulation_job(c, device, settings, end_stop_travel_m=end_stop_travel_m)
    except SimulationInputError as exc:
        raise CaseError(_name_simulation_option(str(exc))) from None
    if json_output:
        typer.echo(to_json(result), nl=False)
        return
    _print_simulation(result)
    _print_notes(result)
    from tmd.report.simulation_plots import simulation_files

    files = {"results.json": to_json(result)} | simulation_files(result, holder["history"],
                                                                 holder["maxima"])
    written = target.write(files)
    out_console.print(escape(f"wrote {len(written)} files to {target.folder} (results.json, "
                             "time_history.csv, figures/)"), highlight=False, soft_wrap=True)


def _name_simulation_option(message: str) -> str:
    for key, flag in SIMULATION_OPTIONS.items():
        if message.startswith(key):
            return f"{flag}{message[len(key):]}"
    return message


def _simulated_device_from(c, path: Path, option: str) -> dict:
    """The device to simulate, read from a results.json."""
    if option == "tmd":
        return {"kind": "tmd", "damper": _design_from(c, path, (None, None, None),
                                                      (None, None, None))}
    if option != "liquid-column":
        raise CaseError(f"--option = {option!r}: allowed are tmd and liquid-column")
    try:
        data = json.loads(Path(path).read_text(encoding="utf-8"))
        rows = [r for r in data["options"] if r["option"] == "liquid-column"]
    except (OSError, ValueError, KeyError, TypeError) as exc:
        raise CaseError(f"{path}: not a results.json of tmd compare ({exc})") from None
    if not rows or not rows[0].get("mass_kg"):
        raise CaseError(f"{path}: holds no sized liquid-column option")
    return {"kind": "liquid-column", "row": rows[0]}


def _print_simulation(result: dict) -> None:
    """One table per load: simulated maxima against the spectral peaks."""
    block = result["simulation"]
    for row in block["by_load"]:
        years = row.get("return_period_years")
        title = (f"{result['case']['name']}: {block['records']} simulated records of "
                 f"{block['duration_s']:g} s" + (f", {years:g}-year wind" if years else ""))
        table = Table(title=title)
        for name in ("response", "rms sim. / spectral", "mean max |x|", "Davenport",
                     "Vanmarcke", "sim. / Davenport"):
            table.add_column(name, justify="right")
        entries = [("bare acc. (m/s²)", row["bare"]["acceleration"], "m_s2"),
                   ("design acc. (m/s²)", row["design"]["acceleration"], "m_s2"),
                   ("stroke (m)", row["design"]["stroke"], "m")]
        for label, s, u in entries:
            table.add_row(label, f"{s[f'sigma_{u}'] / s[f'sigma_spectral_{u}']:.4f}",
                          f"{s[f'max_abs_mean_{u}']:.4g}", f"{s[f'davenport_peak_{u}']:.4g}",
                          f"{s[f'vanmarcke_peak_two_sided_{u}']:.4g}",
                          f"{s['max_abs_mean_to_davenport_ratio']:.3f}")
        out_console.print(table)
        acc = row["design"]["acceleration"]
        if "records_over_limit_fraction" in acc:
            out_console.print(f"records whose largest |a| exceeds the target: "
                              f"{100 * acc['records_over_limit_fraction']:.1f}%",
                              highlight=False)
        if "hourly_end_stop_contact_count" in row["design"]:
            contacts = row["design"]["hourly_end_stop_contact_count"]
            out_console.print(f"end-stop contacts: {contacts:.2f} per hour", highlight=False)

