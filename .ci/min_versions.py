"""Print the declared minimum versions of the project's dependencies as exact pins.

Reads pyproject.toml's runtime dependencies and the ``test`` extra and turns each
``name>=X`` into ``name==X`` (a constraints file for pip), so that CI can run the
suite against the oldest versions the project claims to support. A dependency
without a ``>=`` floor is printed unchanged.
"""

import re
import sys
import tomllib
from pathlib import Path

project = tomllib.loads((Path(__file__).parent.parent / "pyproject.toml").read_text())["project"]
requirements = project["dependencies"] + project.get("optional-dependencies", {}).get("test", [])
for requirement in requirements:
    match = re.fullmatch(r"\s*([A-Za-z0-9_.\-\[\]]+)\s*>=\s*([^,;\s]+)\s*", requirement)
    if match is None:
        print(f"note: {requirement!r} has no plain '>=' floor; not pinned", file=sys.stderr)
        continue
    name = re.sub(r"\[.*\]", "", match[1])
    print(f"{name}=={match[2]}")
