"""Benchmark of whole jobs as an engineer runs them: the ``tmd`` command, end to end.

Run: python bench/bench_jobs.py [--repeats N]

Each command runs REPEATS times, the commands interleaved (one of each per
round), every run in a fresh output folder, as a separate process (start-up
included). Wall time and the child's CPU time (user + system) are medians;
the machine's CPU model, core count and load average are printed beside them,
because absolute times depend on the machine and on what else runs on it.

Goals (issue "Speed"), on the demo cases (fictional scenarios):

* ``tmd design cases/kestrel_point.toml``, report included: <= 4 s;
* ``tmd wind cases/kestrel_point.toml``: <= 1 s;
* ``tmd compare`` on either demo: <= 4 s;
* ``tmd --help`` and a bad-input exit: <= 0.4 s.

A goal line says "met" or "NOT met" from the median wall time, and also from
the median CPU time (on a machine shared with other work, wall time includes
waiting for a core).
"""

from __future__ import annotations

import argparse
import os
import resource
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
from bench_engine import machine  # noqa: E402

ROOT = Path(__file__).resolve().parents[1]
KESTREL = ROOT / "cases" / "kestrel_point.toml"
HARBOURLINE = ROOT / "cases" / "harbourline_residences.toml"
TMD = shutil.which("tmd") or "tmd"

# name -> (arguments, writes an output folder, goal [s])
COMMANDS = {
    "design kestrel_point (report)": (["design", str(KESTREL)], True, 4.0),
    "design harbourline_residences (report)": (["design", str(HARBOURLINE)], True, None),
    "wind kestrel_point": (["wind", str(KESTREL)], False, 1.0),
    "compare kestrel_point": (["compare", str(KESTREL)], True, 4.0),
    "compare harbourline_residences": (["compare", str(HARBOURLINE)], True, 4.0),
    "--help": (["--help"], False, 0.4),
    "bad input (missing case file)": (["design", str(ROOT / "cases" / "no_such_case.toml")],
                                      False, 0.4),
}


def run_once(arguments, with_out, scratch):
    """(wall s, CPU s, exit code) of one ``tmd`` process."""
    command = [TMD, *arguments]
    if with_out:
        command += ["--out", tempfile.mkdtemp(dir=scratch)]
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    done = subprocess.run(command, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                          check=False)
    wall = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    return wall, cpu, done.returncode


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=5)
    repeats = parser.parse_args().repeats
    print(machine())
    wall = {name: [] for name in COMMANDS}
    cpu = {name: [] for name in COMMANDS}
    codes = {name: set() for name in COMMANDS}
    with tempfile.TemporaryDirectory() as scratch:
        for _ in range(repeats):
            for name, (arguments, with_out, _) in COMMANDS.items():
                w, c, code = run_once(arguments, with_out, scratch)
                wall[name].append(w)
                cpu[name].append(c)
                codes[name].add(code)
    print(f"medians of {repeats} interleaved runs, {os.cpu_count()} cores")
    for name, (_, _, goal) in COMMANDS.items():
        w, c = statistics.median(wall[name]), statistics.median(cpu[name])
        line = f"  {name:<42s} wall {w:6.2f} s  CPU {c:6.2f} s  exit {sorted(codes[name])}"
        if goal is not None:
            line += (f"  goal <= {goal:g} s: wall {'met' if w <= goal else 'NOT met'}, "
                     f"CPU {'met' if c <= goal else 'NOT met'}")
        print(line)


if __name__ == "__main__":
    main()
