"""Output folders: checked before any work, written all at once, locked, recoverable after a kill.

The expected behaviour is the project's rule "outputs written completely or
not at all; nothing the user gave is overwritten" (BRIEF, README "Exit
codes"), built on POSIX rename(2), which replaces a name atomically within
one file system and fails on a non-empty target folder (The Open Group Base
Specifications, rename(); from memory), and on flock(2) locks being released
when their process ends (Linux man page flock(2); from memory).
"""

import errno
import json
import os
import signal
import subprocess
import sys
import textwrap
from pathlib import Path

import numpy as np
import pytest

from tmd import outputs
from tmd.outputs import MANIFEST, OutputError, OutputFolder, write_all

ROOT = Path(__file__).resolve().parents[1]


def _files(tag: str, n: int = 12) -> dict[str, str]:
    return {f"{'figures/' if i % 3 else ''}f{i:02d}.txt": f"{tag}:{i}\n" for i in range(n)}


def _content(folder: Path) -> dict[str, str]:
    return {str(p.relative_to(folder)): p.read_text() for p in folder.rglob("*")
            if p.is_file() and p.name != MANIFEST}


def _siblings(folder: Path) -> set[str]:
    return {p.name for p in folder.parent.iterdir() if p.name != folder.name}


def test_a_second_write_replaces_the_whole_folder(tmp_path):
    out = tmp_path / "out"
    write_all(out, _files("one", 12))
    write_all(out, _files("two", 4))
    # Stale files of the earlier run are gone; only the new set remains.
    assert _content(out) == _files("two", 4)
    assert json.loads((out / MANIFEST).read_text())["files"] == sorted(_files("two", 4))
    assert _siblings(out) == set()


def test_an_existing_file_is_refused_before_any_work(tmp_path):
    target = tmp_path / "results.json"
    target.write_text("mine")
    with pytest.raises(OutputError, match="is an existing file, not a folder"):
        OutputFolder(target).__enter__()
    assert target.read_text() == "mine"


def test_a_folder_with_foreign_files_is_refused(tmp_path):
    (tmp_path / "report.html").write_text("the user's own report")
    with pytest.raises(OutputError, match=r"holds files that tmd did not write \(report\.html\)"):
        with OutputFolder(tmp_path):
            pass
    assert (tmp_path / "report.html").read_text() == "the user's own report"


def test_an_input_inside_the_folder_is_refused(tmp_path):
    out = tmp_path / "out"
    write_all(out, _files("one"))
    case = out / "figures" / "f01.txt"  # pretend the user gives a written file as input
    with pytest.raises(OutputError, match="an input of this run"):
        with OutputFolder(out, protected=[case]):
            pass


def test_a_second_writer_is_locked_out(tmp_path):
    out = tmp_path / "out"
    with OutputFolder(out):
        with pytest.raises(OutputError, match="another tmd run is writing"):
            with OutputFolder(out):
                pass
    with OutputFolder(out) as again:  # released: usable again
        again.write(_files("x", 2))


def test_an_unwritable_location_is_refused(tmp_path, monkeypatch):
    # Root ignores permission bits, so the write probe is made to fail as a
    # read-only file system would (EROFS).
    real = Path.write_bytes

    def refuse(self, data):
        if ".tmd-probe-" in self.name:
            raise OSError(errno.EROFS, "Read-only file system")
        return real(self, data)

    monkeypatch.setattr(Path, "write_bytes", refuse)
    with pytest.raises(OutputError, match="no permission to write there"):
        with OutputFolder(tmp_path / "out"):
            pass


@pytest.mark.skipif(os.geteuid() == 0, reason="root ignores folder permission bits")
def test_a_read_only_folder_is_refused(tmp_path):
    ro = tmp_path / "ro"
    ro.mkdir()
    ro.chmod(0o555)
    try:
        with pytest.raises(OutputError, match="cannot"):
            with OutputFolder(ro / "out"):
                pass
    finally:
        ro.chmod(0o755)


def test_a_full_disk_is_refused_up_front(tmp_path, monkeypatch):
    monkeypatch.setattr(outputs.shutil, "disk_usage",
                        lambda path: type("U", (), {"free": 1_000_000})())
    with pytest.raises(OutputError, match="only 1.0 MB free"):
        with OutputFolder(tmp_path / "out"):
            pass


def test_a_failed_write_leaves_the_old_folder(tmp_path, monkeypatch):
    out = tmp_path / "out"
    write_all(out, _files("old"))
    real_fsync = os.fsync
    calls = []

    def full(fd):
        calls.append(fd)
        if len(calls) == 5:
            raise OSError(errno.ENOSPC, "No space left on device")
        return real_fsync(fd)

    monkeypatch.setattr(outputs.os, "fsync", full)
    with pytest.raises(OutputError, match="the disk is full.*left as it was"):
        write_all(out, _files("new"))
    assert _content(out) == _files("old")
    assert _siblings(out) == set()


_WRITER = textwrap.dedent("""
    import builtins, os, shutil, signal, sys
    from pathlib import Path
    import tmd.outputs as o

    folder, kill_at, tag = Path(sys.argv[1]), int(sys.argv[2]), sys.argv[3]
    count = [0]

    def tick():
        count[0] += 1
        if count[0] == kill_at:
            os.kill(os.getpid(), signal.SIGKILL)

    def wrap(fn):
        def inner(*a, **k):
            tick()
            result = fn(*a, **k)
            tick()
            return result
        return inner

    for name in ("rename", "replace", "fsync", "mkdir", "unlink"):
        setattr(os, name, wrap(getattr(os, name)))
    shutil.rmtree = wrap(shutil.rmtree)
    o.open = wrap(builtins.open)
    Path.write_text = wrap(Path.write_text)
    files = {f"{'figures/' if i % 3 else ''}f{i:02d}.txt": f"{tag}:{i}\\n" for i in range(12)}
    o.write_all(folder, files)
    print(count[0])
""")


def _run_writer(folder: Path, kill_at: int, tag: str):
    return subprocess.run([sys.executable, "-c", _WRITER, str(folder), str(kill_at), tag],
                          capture_output=True, text=True, cwd=ROOT, timeout=60)


def test_a_writer_killed_at_random_points_leaves_one_complete_folder(tmp_path):
    folder = tmp_path / "out"
    done = _run_writer(folder, 0, "count")  # never killed: count the interruptible points
    assert done.returncode == 0, done.stderr
    total = int(done.stdout)
    rng = np.random.default_rng(20261202)  # seeded: the same kill points every run
    # Random points over the whole write, plus every point of the swap (the last ones).
    points = sorted(set(rng.integers(1, total + 1, size=6).tolist())
                    | set(range(max(1, total - 10), total + 1)))
    outcomes = set()
    for n, kill_at in enumerate(points):
        run = tmp_path / f"run{n}"
        write_all(run / "out", _files("old"))
        result = _run_writer(run / "out", kill_at, "new")
        assert result.returncode in (-signal.SIGKILL, 0), result.stderr
        with OutputFolder(run / "out"):  # the next run recovers first
            pass
        content = _content(run / "out")
        # Never a mixture: exactly the old set or exactly the new one, nothing left beside it.
        assert content in (_files("old"), _files("new")), (kill_at, sorted(content))
        assert _siblings(run / "out") == set(), (kill_at, _siblings(run / "out"))
        outcomes.add("new" if content == _files("new") else "old")
    assert outcomes == {"old", "new"}  # the kill points straddle the swap
