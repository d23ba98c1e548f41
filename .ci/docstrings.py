"""Check the numpy-style docstrings of tmd's public callables with numpydoc.

ruff's pydocstyle rules (D, numpy convention) check the form of a docstring; they
cannot see whether its Parameters section names the callable's actual arguments.
This script runs numpydoc's validation over every public callable of the package
and fails on the checks listed in ``CHECKS``.

Public means: a function or class defined in a module of ``tmd`` whose dotted path
has no part starting with an underscore, and the methods such a class defines
itself (not inherited) whose names do not start with an underscore. Properties are
attributes, not callables, and are not checked. A class is validated against its
constructor's signature, so a frozen dataclass documents its fields under
Parameters.

A command of the ``tmd`` CLI (a typer command of ``tmd.cli.app``) is the
exception: its docstring is the command's ``--help`` text, and its parameters
are documented by the ``help=`` of their ``typer.Option`` or
``typer.Argument``, which ``--help`` prints. For those, this script checks
that every parameter has a non-empty help text instead of numpydoc's PR01
and RT01.

The case-file tables (pydantic models in ``tmd.case``, ``tmd.case_options`` and
``tmd.building_case``) are the other: their fields are the keys of the case
file, documented once, with units, meaning and default, in README's case-file
reference. Repeating them in a Parameters section would make a second source
of the same facts. For those, the script checks that the model has a
docstring and that every field is named in README.md (as `` `key` `` or as a
``[table]``).

Usage: ``python .ci/docstrings.py [--count]``. Exit 0 when clean, 1 with one line
per violation otherwise. ``--count`` also prints how many public callables have a
Parameters section.
"""

import enum
import importlib
import inspect
import pkgutil
import re
import sys
import typing
from pathlib import Path

from numpydoc.docscrape import NumpyDocString
from numpydoc.validate import validate

# GL08 no docstring; PR01 an argument missing from Parameters; PR02 a documented
# parameter that is not an argument; PR03 parameters out of order; PR07 a parameter
# without a description; RT01 no Returns section although something is returned;
# YD01 no Yields section for a generator.
CHECKS = ("GL08", "PR01", "PR02", "PR03", "PR07", "RT01", "YD01")


def public_modules(package="tmd"):
    """Yield the public modules of ``package``.

    Parameters
    ----------
    package : str
        Dotted name of the package to walk.

    Yields
    ------
    module
        Each imported module whose dotted name has no part starting with ``_``.
    """
    root = importlib.import_module(package)
    yield root
    for info in pkgutil.walk_packages(root.__path__, prefix=package + "."):
        if any(part.startswith("_") for part in info.name.split(".")):
            continue
        yield importlib.import_module(info.name)


def public_callables(module):
    """Return the dotted paths of the public callables defined in ``module``.

    Parameters
    ----------
    module : module
        An imported module of the package.

    Returns
    -------
    list of str
        Functions and classes defined in ``module`` (not imported into it) whose
        names do not start with ``_``, and the public methods each such class
        defines itself.
    """
    paths = []
    for name, obj in vars(module).items():
        if name.startswith("_") or getattr(obj, "__module__", None) != module.__name__:
            continue
        if inspect.isfunction(obj):
            paths.append(f"{module.__name__}.{name}")
        elif inspect.isclass(obj):
            paths.append(f"{module.__name__}.{name}")
            for attr, member in vars(obj).items():
                if attr.startswith("_"):
                    continue
                if isinstance(member, (staticmethod, classmethod)):
                    member = member.__func__
                if inspect.isfunction(member):
                    paths.append(f"{module.__name__}.{name}.{attr}")
    return paths


def cli_commands():
    """Return the callbacks of the ``tmd`` CLI's commands.

    Returns
    -------
    set
        The functions registered on ``tmd.cli.app`` (after their decorators).
    """
    cli = importlib.import_module("tmd.cli")
    return {command.callback for command in cli.app.registered_commands}


def undocumented_options(command):
    """Return the parameters of a CLI command that have no typer help text.

    Parameters
    ----------
    command : callable
        A typer command callback whose parameters are annotated with
        ``Annotated[type, typer.Option(help=...)]`` or ``typer.Argument``.

    Returns
    -------
    list of str
        Names of the parameters without a non-empty ``help``.
    """
    from typer.models import ParameterInfo

    hints = typing.get_type_hints(command, include_extras=True)
    missing = []
    for name in inspect.signature(command).parameters:
        infos = [m for m in getattr(hints.get(name), "__metadata__", ())
                 if isinstance(m, ParameterInfo)]
        if not any((info.help or "").strip() for info in infos):
            missing.append(name)
    return missing


def readme_keys():
    """Return the case-file keys and tables that README.md names.

    Returns
    -------
    set of str
        Every word written as `` `key` ``, and every part of a ``[table]`` or
        ``[[table.sub]]`` heading.
    """
    text = (Path(__file__).parent.parent / "README.md").read_text(encoding="utf-8")
    keys = set(re.findall(r"`([A-Za-z_][A-Za-z0-9_]*)`", text))
    for table in re.findall(r"\[\[?([A-Za-z_][A-Za-z0-9_.]*)\]\]?", text):
        keys.update(table.split("."))
    return keys


def is_case_table(obj):
    """Tell whether ``obj`` is a pydantic model of the case file.

    Parameters
    ----------
    obj : object
        A public callable of the package.

    Returns
    -------
    bool
        True for a subclass of ``pydantic.BaseModel``.
    """
    from pydantic import BaseModel

    return inspect.isclass(obj) and issubclass(obj, BaseModel)


def main(argv):
    """Validate every public callable and report violations of ``CHECKS``.

    Parameters
    ----------
    argv : list of str
        Command-line arguments after the script name; ``--count`` adds a summary
        of Parameters sections.

    Returns
    -------
    int
        Exit code: 0 when no public callable violates a check, 1 otherwise.
    """
    paths = [path for module in public_modules() for path in public_callables(module)]
    commands = cli_commands()
    keys = readme_keys()
    violations = []
    with_parameters = 0
    takes_arguments = 0
    for path in paths:
        result = validate(path)
        # A Protocol has no constructor of its own (its signature is *args,
        # **kwargs) and an Enum's call looks a member up by value: both document
        # their attributes or members, not parameters.
        obj = pkgutil.resolve_name(path)
        if obj in commands:
            violations += [f"{path}: GL08 The object does not have a docstring"
                           for code, _ in result["errors"] if code == "GL08"]
            violations += [f"{path}: CLI parameter {name!r} has no typer help text"
                           for name in undocumented_options(obj)]
            continue
        if is_case_table(obj):
            violations += [f"{path}: GL08 The object does not have a docstring"
                           for code, _ in result["errors"] if code == "GL08"]
            violations += [f"{path}: case-file key {name!r} is not named in README.md"
                           for name in obj.model_fields if name not in keys]
            continue
        no_parameters = getattr(obj, "_is_protocol", False) or (
            inspect.isclass(obj) and issubclass(obj, enum.Enum))
        violations += [f"{path}: {code} {message}" for code, message in result["errors"]
                       if code in CHECKS and not (no_parameters and code in ("PR01", "PR02"))]
        if "--count" in argv:
            doc = NumpyDocString(result["docstring"] or "")
            if doc["Parameters"]:
                with_parameters += 1
            obj = pkgutil.resolve_name(path)
            try:
                signature = inspect.signature(obj)
                names = [p for p in signature.parameters if p not in ("self", "cls")]
            except (TypeError, ValueError):
                names = []
            takes_arguments += bool(names)
    for line in violations:
        print(line)
    if "--count" in argv:
        print(f"{len(paths)} public callables, {takes_arguments} take arguments, "
              f"{with_parameters} have a Parameters section")
    print(f"docstrings: {len(paths)} public callables checked for {', '.join(CHECKS)}: "
          f"{len(violations)} violation(s)")
    return 1 if violations else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
