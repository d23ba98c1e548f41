"""Writing output files: completely or not at all, never over an input.

Files are first written into a staging folder beside the destination and
moved into place only when every one of them has been written.
"""

from __future__ import annotations

import json
import os
import shutil
import tempfile
from pathlib import Path


class OutputError(ValueError):
    """An output location that must not be used (exit code 2)."""


def to_json(data) -> str:
    """JSON text with non-finite floats written as null (strict JSON)."""
    return json.dumps(_finite(data), indent=2, allow_nan=False) + "\n"


def _finite(value):
    if isinstance(value, float):
        return value if value == value and abs(value) != float("inf") else None
    if isinstance(value, dict):
        return {k: _finite(v) for k, v in value.items()}
    if isinstance(value, list | tuple):
        return [_finite(v) for v in value]
    return value


def write_all(out_dir: str | Path, files: dict[str, bytes | str], protected=()) -> list[Path]:
    """Write ``files`` (name -> content) into ``out_dir`` all at once.

    Raises
    ------
    OutputError
        If a destination is one of the ``protected`` input files.
    """
    out = Path(out_dir)
    targets = {name: (out / name) for name in files}
    guarded = {Path(p).resolve() for p in protected}
    for target in targets.values():
        if target.resolve() in guarded:
            raise OutputError(f"{target}: is an input of this run and will not be overwritten; "
                              "choose another --out folder")
    out.mkdir(parents=True, exist_ok=True)
    stage = Path(tempfile.mkdtemp(prefix=".tmd-staging-", dir=out))
    try:
        for name, content in files.items():
            path = stage / name
            path.parent.mkdir(parents=True, exist_ok=True)
            data = content.encode("utf-8") if isinstance(content, str) else content
            path.write_bytes(data)
        for name, target in targets.items():
            target.parent.mkdir(parents=True, exist_ok=True)
            os.replace(stage / name, target)
    finally:
        shutil.rmtree(stage, ignore_errors=True)
    return list(targets.values())
