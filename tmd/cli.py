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
from typing import TYPE_CHECKING, Annotated

import typer
from rich.markup import escape

from tmd import terminal
from tmd._version import __version__
from tmd.errors import CaseError, InputError
from tmd.outputs import OutputFolder, to_json
from tmd.terminal import (
    accel,
    err_console,
    out_console,
    print_building,
    print_end_stops,
    print_identified,
    print_notes,
    print_recommendation,
    print_retuned,
    print_robustness,
    print_simulation,
    print_wind,
    return_period_table,
    summary_table,
)
from tmd.text_input import is_building_case, read_case_toml

if TYPE_CHECKING:
    from tmd.dampers.tuned_mass import TunedMassDamper

# The case reader (numpy, pydantic, the wind models) and the jobs (scipy and the
# damper stack) are imported on first use, inside the commands, so that --help
# stays fast. They are attributes of this
# module (PEP 562), so tests may replace them; commands look them up through _job.
_JOBS = ("compare_job", "design_job", "evaluate_job", "retune_job", "sweep_job", "wind_job")


def __getattr__(name):
    if name in _JOBS:
        import tmd.jobs

        return getattr(tmd.jobs, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def _job(name):
    """Return the job function ``name``: this module's attribute, imported lazily."""
    return getattr(sys.modules[__name__], name)


app = typer.Typer(add_completion=False, no_args_is_help=True, rich_markup_mode=None,
                  help="Size passive dampers for a wind-excited building mode.")


def _show_version(value: bool) -> None:
    if value:
        out_console.print(f"tmd {__version__}", highlight=False)
        raise typer.Exit()


@app.callback()
def _main(version: Annotated[bool, typer.Option(
        "--version", callback=_show_version, is_eager=True,
        help="Print the version of tmd and exit.")] = False) -> None:
    """Size passive dampers for a wind-excited building mode."""


CaseArg = Annotated[Path, typer.Argument(help="Case file (TOML).", show_default=False,
                                         metavar="CASE")]


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


@app.command()
@_guarded
def design(case: CaseArg,
           out: Annotated[Path | None, typer.Option(
               help="Folder for results.json (default: out/<case file stem>).")] = None):
    """Size a TMD for the case and write DIR/results.json."""
    if is_building_case(case):
        _design_building(case, out)
        return
    c, target = _case_and_output(case, out)
    result = _job("design_job")(c)
    out_console.print(summary_table(result))
    if (table := return_period_table(result)) is not None:
        out_console.print(table)
    sizing = result["sizing"]
    colour = "green" if sizing["meets_target"] else "red"
    out_console.print(f"[{colour}]{escape(sizing['message'])}[/]", highlight=False)
    print_end_stops(result)
    print_robustness(result)
    print_recommendation(result)
    print_notes(result)
    _write(result, target)


def _design_building(case_path: Path, out: Path | None) -> None:
    """Run a whole-building case ([[modes]]): size the dampers, print, write JSON and CSV."""
    from tmd.building_case import load_building_case
    from tmd.building_job import building_design_job, building_tables

    folder = out if out is not None else Path("out") / case_path.stem
    target = _OPEN.get().enter_context(OutputFolder(folder, protected=(case_path,)))
    c = load_building_case(case_path)
    target.protect(c.input_files)
    result = building_design_job(c)
    print_building(result)
    # Imported here: matplotlib is only needed by the commands that write a report.
    from tmd.report.building import building_report

    files = ({"results.json": to_json(result)} | building_tables(result)
             | building_report(result))
    written = target.write(files)
    out_console.print(escape(f"wrote {len(written)} files to {target.folder} (results.json, "
                             "report.html, tables/)"), highlight=False, soft_wrap=True)


def _read_case(path: Path):
    """Return the validated case of a case file.

    The file is read and parsed first, with the standard library: a missing,
    unreadable or malformed file exits (code 2) before the case schema and the
    wind models are imported.
    """
    tables = read_case_toml(path)
    from tmd.case import case_from_tables

    return case_from_tables(tables, path)


def _case_and_output(case_path: Path, out: Path | None):
    """Return the validated case and its locked, checked output folder, before any computation.

    The folder is released when the command ends (see :func:`_guarded`).
    """
    folder = out if out is not None else Path("out") / case_path.stem
    target = _OPEN.get().enter_context(OutputFolder(folder, protected=(case_path,)))
    c = _read_case(case_path)
    target.protect(c.input_files)
    return c, target


def _write(result, target: OutputFolder):
    """results.json, the HTML report, figures and tables, all at once."""
    # Imported here: matplotlib is only needed by the commands that write a report.
    from tmd.report import progress_bar, render_report

    with progress_bar("Writing the report", console=err_console) as step:
        files = {"results.json": to_json(result)} | render_report(result, on_step=step)
    written = target.write(files)
    out_console.print(escape(f"wrote {len(written)} files to {target.folder} (results.json, "
                             "report.html, figures/, tables/)"), highlight=False, soft_wrap=True)


MassKg = Annotated[float | None, typer.Option(
    "--damper-mass-kg", help="Built damper mass m_d [kg] (instead of the ratios).")]
StiffnessNPerM = Annotated[float | None, typer.Option(
    "--damper-stiffness-n-per-m", help="Built damper spring k_d [N/m].")]
DampingNSPerM = Annotated[float | None, typer.Option(
    "--damper-damping-n-s-per-m", help="Built damper dashpot c_d [N·s/m].")]


@app.command(short_help="Responses of one given TMD design.")
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
    c = _read_case(case)
    damper = _design_from(c, None, (mass_ratio, frequency_ratio, damping_ratio),
                          (damper_mass_kg, damper_stiffness_n_per_m, damper_damping_n_s_per_m))
    result = _job("evaluate_job")(c, damper)
    if json_output:
        typer.echo(to_json({"design": result["design"]}), nl=False)
        return
    out_console.print(summary_table(result))
    line, colour = terminal.verdict_line(result)
    out_console.print(f"[{colour}]{escape(line)}[/]", highlight=False)
    print_notes(result)


def _damper_from_options(mass_ratio, frequency_ratio, damping_ratio,
                         names=("--mass-ratio", "--frequency-ratio", "--damping-ratio")
                         ) -> TunedMassDamper:
    """Return a TMD from options, judged by the case file's rules for the same quantities."""
    from tmd.dampers.tuned_mass import TunedMassDamper
    from tmd.rules import FrequencyRatio, Ratio, require

    rules_of = (Ratio, FrequencyRatio, Ratio)
    values = [require(name, value, rule)
              for name, value, rule in zip(names, (mass_ratio, frequency_ratio, damping_ratio),
                                           rules_of, strict=True)]
    return TunedMassDamper(*values)


@app.command(short_help="Wind and the EN 1991-1-4 Annex B check.")
@_guarded
def wind(case: CaseArg,
         json_output: Annotated[bool, typer.Option("--json", help="Print JSON only.")] = False):
    """Wind at the reference height and the EN 1991-1-4 Annex B check, per return period."""
    c = _read_case(case)  # before the job's import: a bad case exits without loading scipy
    result = _job("wind_job")(c)
    if json_output:
        typer.echo(to_json(result), nl=False)
        return
    print_wind(result)
    print_notes(result)


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
    if (freeboard := terminal.freeboard_table(result)) is not None:
        out_console.print(freeboard)
    print_notes(result)
    _write(result, target)


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
    """Detuning sweeps of a given design, such as an as-built damper."""
    c = _read_case(case)
    damper = _design_from(c, design_from, (mass_ratio, frequency_ratio, damping_ratio),
                          (damper_mass_kg, damper_stiffness_n_per_m, damper_damping_n_s_per_m))
    result = _job("sweep_job")(c, damper)
    if json_output:
        typer.echo(to_json(result), nl=False)
        return
    table = terminal.sweep_table(result)
    out_console.print(table)
    out_console.print(f"worst peak acceleration in the band ±{100 * result['frequency_band']:g}%:"
                      f" {accel(result['peak_acceleration_band_max_m_s2'])}", highlight=False)
    print_notes(result)


RATIO_OPTIONS = ("--mass-ratio", "--frequency-ratio", "--damping-ratio")
PROPERTY_OPTIONS = ("--damper-mass-kg", "--damper-stiffness-n-per-m",
                    "--damper-damping-n-s-per-m")


def _design_from(c, path, ratios, properties) -> TunedMassDamper:
    """Return the damper to evaluate: a results.json design, three ratios or three properties."""
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
    """Return the design block of a results.json (the recommended design where one is given)."""
    try:
        data = json.loads(Path(path).read_text(encoding="utf-8-sig"))
    except (OSError, ValueError) as exc:
        raise CaseError(f"{path}: not a readable results.json ({exc})") from None
    block = data.get("design") if isinstance(data, dict) else None
    if not isinstance(block, dict):
        raise CaseError(f"{path}: not a results.json with a design block")
    return block


@app.command(short_help="Re-tune the built damper to the measured structure.")
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
    c = _read_case(case)
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
    print_retuned(result, c.name)


@app.command(short_help="Frequency and damping from an ambient record.")
@_guarded
def identify(record: Annotated[Path, typer.Argument(
                 help="CSV record, header time_s,acceleration_m_s2.", show_default=False,
                 metavar="RECORD")],
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
    print_identified(result, record.name)


SIMULATION_OPTIONS = {"records": "--records", "duration_s": "--duration-s",
                      "time_step_s": "--time-step-s", "substeps": "--substeps"}


@app.command(short_help="Check a design by simulated records.")
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
    c = _read_case(case)
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
    print_simulation(result)
    print_notes(result)
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
    """Return the device to simulate, read from a results.json."""
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

