"""The ``tmd`` command: parse and validate the case, call the library, print, write.

Exit codes: 0 the job ran (also when a target is not met), 1 a numerical or
solver failure, 2 bad input (the message names file, field, value and what
is allowed). Set TMD_DEBUG=1 to see a traceback instead of a one-line error.
"""

from __future__ import annotations

import functools
import os
from pathlib import Path
from typing import Annotated

import typer
from rich.console import Console
from rich.markup import escape
from rich.table import Table

from tmd.case import CaseError, load_case
from tmd.dampers.tmd import TunedMassDamper
from tmd.design import DesignError
from tmd.jobs import design_job, evaluate_job
from tmd.outputs import OutputError, to_json, write_all
from tmd.response import NoFiniteResponse

app = typer.Typer(add_completion=False, no_args_is_help=True,
                  help="Size passive dampers for a wind-excited building mode.")
out_console = Console(width=None if Console().is_terminal else 110)
err_console = Console(stderr=True, width=None if Console(stderr=True).is_terminal else 110)
G = 9.80665  # standard gravity, for milli-g on screen

CaseArg = Annotated[Path, typer.Argument(help="Case file (TOML).", show_default=False)]


def _error(kind: str, exc: Exception) -> None:
    err_console.print(f"[bold red]{kind}:[/] {escape(str(exc))}", highlight=False, soft_wrap=True)


def _guarded(job):
    """Turn library failures into exit codes and one clear line each."""

    @functools.wraps(job)
    def run(*args, **kwargs):
        try:
            return job(*args, **kwargs)
        except (CaseError, OutputError) as exc:
            _error("error", exc)
            raise typer.Exit(2) from None
        except (DesignError, NoFiniteResponse, ArithmeticError, RuntimeError) as exc:
            if os.environ.get("TMD_DEBUG"):
                raise
            _error("numerical failure", exc)
            raise typer.Exit(1) from None
        except ValueError as exc:
            if os.environ.get("TMD_DEBUG"):
                raise
            _error("error", exc)
            raise typer.Exit(2) from None

    return run


def _accel(value: float) -> str:
    return f"{value:.4f} m/s² ({1000 * value / G:.1f} milli-g)"


def _summary(result: dict) -> Table:
    table = Table(title=f"{result['case']['name']}", show_lines=False)
    table.add_column("quantity")
    table.add_column("bare building", justify="right")
    table.add_column("with damper", justify="right")
    bare, design = result["bare"], result["design"]
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
    c = load_case(case)
    result = design_job(c)
    out_console.print(_summary(result))
    sizing = result["sizing"]
    colour = "green" if sizing["meets_target"] else "red"
    out_console.print(f"[{colour}]{escape(sizing['message'])}[/]", highlight=False)
    _print_notes(result)
    folder = out if out is not None else Path("out") / case.stem
    written = write_all(folder, {"results.json": to_json(result)}, protected=c.input_files)
    out_console.print(escape(f"wrote {', '.join(str(p) for p in written)}"), highlight=False,
                      soft_wrap=True)


@app.command()
@_guarded
def evaluate(case: CaseArg,
             mass_ratio: Annotated[float, typer.Option(help="m_d / M* [-].")],
             frequency_ratio: Annotated[float, typer.Option(help="f_d / f_s [-].")],
             damping_ratio: Annotated[float, typer.Option(
                 help="Damper damping ratio, referred to f_d [-].")],
             json_output: Annotated[bool, typer.Option(
                 "--json", help="Print {\"design\": {...}} as JSON only.")] = False):
    """Responses of one given TMD design (a proposed or as-built damper)."""
    c = load_case(case)
    damper = _damper_from_options(mass_ratio, frequency_ratio, damping_ratio)
    result = evaluate_job(c, damper)
    if json_output:
        typer.echo(to_json({"design": result["design"]}), nl=False)
        return
    out_console.print(_summary(result))
    _print_notes(result)


def _damper_from_options(mass_ratio, frequency_ratio, damping_ratio) -> TunedMassDamper:
    if not mass_ratio > 0:
        raise CaseError(f"--mass-ratio = {mass_ratio!r}: must be > 0")
    if not frequency_ratio > 0:
        raise CaseError(f"--frequency-ratio = {frequency_ratio!r}: must be > 0")
    if not 0 < damping_ratio < 1:
        raise CaseError(f"--damping-ratio = {damping_ratio!r}: must lie in (0, 1)")
    return TunedMassDamper(mass_ratio, frequency_ratio, damping_ratio)
