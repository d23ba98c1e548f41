"""Writing output folders: checked first, written completely or not at all, never over an input.

An output folder (``--out``) is handled in four steps:

1. **Before any computation** (:meth:`OutputFolder.__enter__`): finish or roll back
   an interrupted earlier write, take a lock, and check that the location can
   be used: not a file, not holding files that tmd did not write, not holding
   an input of the run, on a writable file system with some free space.
2. The job computes.
3. :meth:`OutputFolder.write` writes every file into a fresh hidden sibling
   folder ``.<name>.tmd-new-<random>``, with a manifest of what it wrote.
4. The new folder is swapped in. A rename cannot replace a non-empty folder,
   so a marker file ``.<name>.tmd-swap`` is written first (it names both
   folders), the old folder is renamed aside to ``.<name>.tmd-old-<random>``,
   the new one renamed into place, the old one removed, and the marker removed.

A run killed at any point leaves either the old complete folder or the new
complete one, plus hidden siblings that the next run on the same folder
cleans up: with the marker present (the staged folder is then complete) the
swap is completed; without it, staged folders are removed. The lock is an
``flock`` on the hidden sibling file ``.<name>.tmd-lock``, released by the
operating system when the process ends, so a killed run never blocks the
next one.
"""

from __future__ import annotations

import errno
import fcntl
import json
import os
import shutil
import uuid
from pathlib import Path

from tmd.errors import InputError

MANIFEST = ".tmd-manifest.json"
MIN_FREE_BYTES = 64 * 1024 * 1024  # a report with figures takes a few MB; leave a margin


class OutputError(InputError):
    """An output location that cannot be used (exit code 2)."""


def to_json(data) -> str:
    """JSON text with non-finite floats written as null (strict JSON).

    Parameters
    ----------
    data : object
        Plain data (dicts, lists, numbers, strings, booleans, None).

    Returns
    -------
    str
        Indented JSON ending with a newline.
    """
    return json.dumps(_finite(data), indent=2, allow_nan=False) + "\n"


def _finite(value):
    if isinstance(value, float):
        return value if value == value and abs(value) != float("inf") else None
    if isinstance(value, dict):
        return {k: _finite(v) for k, v in value.items()}
    if isinstance(value, list | tuple):
        return [_finite(v) for v in value]
    return value


def _sibling(folder: Path, suffix: str) -> Path:
    return folder.parent / f".{folder.name}.tmd-{suffix}"


def _fsync_dir(path: Path) -> None:
    try:
        fd = os.open(path, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def _why(exc: OSError) -> str:
    if exc.errno == errno.ENOSPC:
        return "the disk is full"
    if exc.errno in (errno.EACCES, errno.EPERM, errno.EROFS):
        return "no permission to write there (read-only folder or file system)"
    return exc.strerror or str(exc)


class OutputFolder:
    """An output folder that is written all at once, under a lock.

    Parameters
    ----------
    folder : str or Path
        The output folder [path]; created if missing.
    protected : iterable of str or Path
        Input files of the run, never overwritten.

    Notes
    -----
    Use as a context manager around the computation: entering checks the
    location and takes the lock (raising :class:`OutputError` before any
    work is done); :meth:`write` swaps the complete new content in.
    """

    def __init__(self, folder, protected=()):
        self.folder = Path(folder)
        self.protected = tuple(Path(p) for p in protected)
        self._lock_fd: int | None = None
        self._lock_path: Path | None = None

    # -- entering: lock, recover, check -------------------------------------------------
    def __enter__(self) -> OutputFolder:
        """Lock the folder, complete an interrupted swap and check the location.

        Returns
        -------
        OutputFolder
            This object.
        """
        folder = self.folder
        if folder.name in ("", ".", ".."):
            folder = self.folder = Path(os.path.abspath(folder))
        parent = _existing_ancestor(folder.parent)
        if not parent.is_dir():
            raise OutputError(f"--out {folder}: {parent} is a file, not a folder")
        try:
            folder.parent.mkdir(parents=True, exist_ok=True)
        except OSError as exc:
            raise OutputError(f"--out {folder}: cannot create the folder {folder.parent} "
                              f"({_why(exc)})") from None
        self._check(probe=False)  # refuse before leaving anything beside the folder
        self._lock()
        try:
            recover(folder)
            self._check()
        except BaseException:
            self._unlock()
            raise
        return self

    def __exit__(self, *exc_info) -> None:
        """Release the lock.

        Parameters
        ----------
        *exc_info : object
            The exception, if any (not suppressed).
        """
        self._unlock()

    def _lock(self) -> None:
        path = _sibling(self.folder, "lock")
        while True:
            try:
                fd = os.open(path, os.O_RDWR | os.O_CREAT, 0o644)
            except OSError as exc:
                raise OutputError(f"--out {self.folder}: cannot write in {self.folder.parent} "
                                  f"({_why(exc)})") from None
            try:
                fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
            except OSError:
                os.close(fd)
                raise OutputError(f"--out {self.folder}: another tmd run is writing to this "
                                  "folder; wait for it to finish or choose another --out") from None
            # The holder before us removes the file when it is done: the lock counts only
            # if the name still refers to the file we locked.
            try:
                same = os.fstat(fd).st_ino == os.stat(path).st_ino
            except FileNotFoundError:
                same = False
            if same:
                self._lock_fd, self._lock_path = fd, path
                return
            os.close(fd)

    def _unlock(self) -> None:
        if self._lock_fd is not None:
            Path(self._lock_path).unlink(missing_ok=True)  # still held: nobody else has it
            fcntl.flock(self._lock_fd, fcntl.LOCK_UN)
            os.close(self._lock_fd)
            self._lock_fd = None

    def _check(self, probe: bool = True) -> None:
        folder = self.folder
        if folder.exists() and not folder.is_dir():
            raise OutputError(f"--out {folder}: is an existing file, not a folder; give a folder "
                              "path (tmd writes results.json, report.html, figures/ and tables/ "
                              "into it)")
        resolved = folder.resolve()
        for path in self.protected:
            p = path.resolve()
            if p == resolved or resolved in p.parents:
                raise OutputError(f"--out {folder}: holds {path}, an input of this run, which "
                                  "will not be overwritten; choose another --out folder")
        if folder.is_dir():
            foreign = _foreign_files(folder)
            if foreign:
                shown = ", ".join(foreign[:5]) + (f" and {len(foreign) - 5} more"
                                                  if len(foreign) > 5 else "")
                raise OutputError(
                    f"--out {folder}: holds files that tmd did not write ({shown}); tmd replaces "
                    "the whole folder, so choose a new or empty folder, or move those files")
        if not probe:
            return
        trial = _sibling(folder, f"probe-{uuid.uuid4().hex[:8]}")
        try:
            trial.write_bytes(b"")
            trial.unlink()
        except OSError as exc:
            raise OutputError(f"--out {folder}: cannot write in {folder.parent} "
                              f"({_why(exc)})") from None
        free = shutil.disk_usage(folder.parent).free
        if free < MIN_FREE_BYTES:
            raise OutputError(f"--out {folder}: only {free / 1e6:.1f} MB free on its disk; tmd "
                              f"needs at least {MIN_FREE_BYTES / 1e6:.0f} MB for a report")

    def protect(self, paths) -> None:
        """Add input files that the output must not hold, and check again.

        Parameters
        ----------
        paths : iterable of str or Path
            Input files of the run (the case file and its CSV).
        """
        self.protected += tuple(Path(p) for p in paths)
        self._check()

    # -- writing ------------------------------------------------------------------------
    def write(self, files: dict[str, bytes | str]) -> list[Path]:
        """Write ``files`` (relative name -> content) as the folder's whole new content.

        Parameters
        ----------
        files : dict of str to bytes or str
            Relative file names (``figures/x.png``) and their contents; text
            is written as UTF-8.

        Returns
        -------
        list of Path
            The files now in the folder.

        Raises
        ------
        OutputError
            If a name leaves the folder or a write fails (disk full,
            permissions); the previous content is then left as it was.
        """
        if self._lock_fd is None:
            raise RuntimeError("OutputFolder.write needs the folder entered (use 'with')")
        folder = self.folder
        for name in files:
            parts = Path(name).parts
            if Path(name).is_absolute() or ".." in parts or not parts or name == MANIFEST:
                raise OutputError(f"output file name {name!r} is not a plain relative name")
        stage = _sibling(folder, f"new-{uuid.uuid4().hex[:12]}")
        try:
            stage.mkdir()
            for name, content in files.items():
                path = stage / name
                path.parent.mkdir(parents=True, exist_ok=True)
                data = content.encode("utf-8") if isinstance(content, str) else content
                with open(path, "wb") as handle:
                    handle.write(data)
                    handle.flush()
                    os.fsync(handle.fileno())
            (stage / MANIFEST).write_text(
                json.dumps({"written_by": "tmd", "files": sorted(files)}, indent=1) + "\n",
                encoding="utf-8")
            _fsync_dir(stage)
        except OSError as exc:
            shutil.rmtree(stage, ignore_errors=True)
            raise OutputError(f"--out {folder}: writing the outputs failed ({_why(exc)}); "
                              "the folder was left as it was") from None
        _swap(folder, stage)
        return [folder / name for name in files]


def _existing_ancestor(path: Path) -> Path:
    path = Path(os.path.abspath(path))
    while not path.exists() and path != path.parent:
        path = path.parent
    return path


def _foreign_files(folder: Path) -> list[str]:
    """Files in ``folder`` that its tmd manifest does not list (all of them if none)."""
    present = sorted(str(p.relative_to(folder)) for p in folder.rglob("*")
                     if not p.is_dir() or p.is_symlink())
    try:
        listed = set(json.loads((folder / MANIFEST).read_text(encoding="utf-8"))["files"])
    except (OSError, ValueError, KeyError, TypeError):
        listed = set()
    listed.add(MANIFEST)
    return [p for p in present if p not in listed]


def _swap(folder: Path, stage: Path) -> None:
    """Put the complete ``stage`` in place of ``folder``, recoverably (see the module notes)."""
    old = _sibling(folder, f"old-{uuid.uuid4().hex[:12]}")
    marker = _sibling(folder, "swap")
    tmp = _sibling(folder, "swap-tmp")
    try:
        tmp.write_text(json.dumps({"new": stage.name, "old": old.name}) + "\n", encoding="utf-8")
        os.replace(tmp, marker)
        _fsync_dir(folder.parent)
    except OSError as exc:
        shutil.rmtree(stage, ignore_errors=True)
        tmp.unlink(missing_ok=True)
        raise OutputError(f"--out {folder}: writing the outputs failed ({_why(exc)}); "
                          "the folder was left as it was") from None
    recover(folder)


def recover(folder: str | Path) -> None:
    """Complete an interrupted swap of ``folder``, or remove what an interrupted write left.

    Parameters
    ----------
    folder : str or Path
        The output folder [path].

    Notes
    -----
    With the marker file present, the staged folder it names is complete:
    the old folder (if still in place) is renamed aside, the staged one
    renamed in, the old one removed and then the marker. Without a marker,
    staged and set-aside siblings are leftovers of a write that never
    reached the swap (or finished it) and are removed. Call it only under
    the folder's lock.
    """
    folder = Path(folder)
    marker = _sibling(folder, "swap")
    if marker.exists():
        try:
            names = json.loads(marker.read_text(encoding="utf-8"))
            new, old = folder.parent / names["new"], folder.parent / names["old"]
        except (OSError, ValueError, KeyError, TypeError):
            new = old = None
        if new is not None and new.is_dir():
            if folder.exists():
                os.rename(folder, old)
            os.rename(new, folder)
            _fsync_dir(folder.parent)
        if old is not None:
            shutil.rmtree(old, ignore_errors=True)
        marker.unlink(missing_ok=True)
    for pattern in ("new-*", "old-*", "probe-*", "swap-tmp"):
        for leftover in folder.parent.glob(f".{_glob_escape(folder.name)}.tmd-{pattern}"):
            if leftover.is_dir():
                shutil.rmtree(leftover, ignore_errors=True)
            else:
                leftover.unlink(missing_ok=True)


def _glob_escape(name: str) -> str:
    return "".join(f"[{c}]" if c in "*?[" else c for c in name)


def write_all(out_dir: str | Path, files: dict[str, bytes | str], protected=()) -> list[Path]:
    """Check, lock and write ``files`` into ``out_dir`` in one step.

    Parameters
    ----------
    out_dir : str or Path
        The output folder [path].
    files : dict of str to bytes or str
        Relative file names and contents.
    protected : iterable of str or Path
        Input files of the run, never overwritten.

    Returns
    -------
    list of Path
        The files written.

    Raises
    ------
    OutputError
        If the location cannot be used or the write fails.
    """
    with OutputFolder(out_dir, protected) as out:
        return out.write(files)
