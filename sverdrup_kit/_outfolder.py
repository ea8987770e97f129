"""The command's output folder: write only files the toolkit owns, whole or not at all.

A small manifest (:data:`MANIFEST`) in the folder lists the files the last run wrote. With it
the command can tell its own files from a user's: it refuses a folder holding other files
(unless told to write beside them), replaces its own files, removes those of an earlier run
that this run did not write again (stale figures beside new results), and removes the hidden
leftovers of a run that was killed while writing. Every file is written under a hidden name
and renamed into place when complete.
"""

from __future__ import annotations

import datetime as _dt
import json
import os
import shutil
import tempfile
from pathlib import Path

from .errors import InputError

#: Name of the manifest the command keeps in its output folder.
MANIFEST = "sverdrup-kit-manifest.json"
#: Prefix of the hidden staging folder where figures are drawn before they are moved in.
_STAGING = ".sverdrup-kit-staging-"
#: Files the commands write whatever their options (hidden partial copies of them are ours).
_OUTPUT_NAMES = ("results.nc", "spread.nc", MANIFEST)
#: Prefix of the empty file that tests whether the folder can be written.
_PROBE = ".sverdrup-kit-probe-"


def _is_leftover(name: str, owned: set[str]) -> bool:
    """A hidden file or folder left by an interrupted write of this toolkit."""
    if name.startswith((_STAGING, _PROBE)):
        return True
    if name.startswith(".") and name.endswith(".part"):
        # write_netcdf and the manifest write ".{name}.{random}.part" beside the target.
        target = name[1:].rsplit(".", 2)[0]
        return target in owned or target in _OUTPUT_NAMES
    return False


class OutputFolder:
    """The ``--out`` folder of one run, checked before any computation starts.

    Parameters
    ----------
    path : path-like
        The folder; created (with its parents) if missing.
    task : str
        The subcommand writing (``"diagnose"``, ``"spread"``): a run removes as stale only the
        files an earlier run of the same task wrote, so two tasks can share a folder.
    outputs : sequence of str
        Names this run will write whatever its options (``results.nc``); an input of that
        name in the folder is refused rather than replaced.
    overwrite : bool
        Write even when the folder holds files the toolkit did not write (files named like the
        toolkit's are then replaced; others are left alone).
    inputs : sequence of path-like
        The run's input files, which must never be replaced or removed.
    """

    def __init__(self, path, *, task: str = "diagnose", outputs=("results.nc",),
                 overwrite: bool = False, inputs=()):
        self.path = Path(path)
        self.task = task
        self.outputs = set(outputs)
        self.overwrite = overwrite
        self.inputs = [Path(p) for p in inputs]
        self.created: list[Path] = []
        self.tasks: dict[str, set[str]] = {}
        self.earlier: set[str] = set()
        self._staged: list[Path] = []

    @property
    def owned(self) -> set[str]:
        """Every file the manifest lists, whichever task wrote it."""
        return set().union(*self.tasks.values()) if self.tasks else set()

    # --- before computing ---

    def prepare(self) -> None:
        """Check that the folder can be written and holds nothing of the user's; tidy it."""
        p = self.path
        if p.exists() and not p.is_dir():
            raise InputError(f"--out: expected a folder, found a file '{p}'. Fix: pick a folder.")
        if not p.exists():
            self._create()
        self._probe()
        self.tasks = self._read_manifest()
        self.earlier = set(self.tasks.get(self.task, set()))
        here = p.resolve()
        for src in self.inputs:
            if src.resolve().parent == here and src.name in self.earlier | self.outputs:
                raise InputError(
                    f"--out: expected a folder where no input would be replaced, found that "
                    f"the input '{src}' is a file this run would replace or remove. Fix: "
                    "write to another folder, or copy the input elsewhere first."
                )
        owned = self.owned
        entries = sorted(os.listdir(p))
        foreign = [n for n in entries
                   if n != MANIFEST and n not in owned and not _is_leftover(n, owned)]
        if foreign and not self.overwrite:
            shown = ", ".join(foreign[:3]) + (", ..." if len(foreign) > 3 else "")
            raise InputError(
                f"--out: expected an empty folder or one written by sverdrup-kit, found "
                f"{len(foreign)} other file(s) in '{p}' ({shown}). Fix: pick another folder, "
                "or pass --overwrite to write beside them (files of the same names are replaced)."
            )
        for n in entries:
            if _is_leftover(n, owned):
                target = p / n
                shutil.rmtree(target) if target.is_dir() else target.unlink()

    def _create(self) -> None:
        missing = []
        q = self.path
        while not q.exists():
            missing.append(q)
            q = q.parent
        try:
            self.path.mkdir(parents=True)
        except OSError as err:
            raise InputError(
                f"--out: expected a folder that can be created, could not create '{self.path}' "
                f"({err.strerror or err}). Fix: pick a folder you can write to."
            ) from None
        self.created = missing

    def _probe(self) -> None:
        try:
            fd, probe = tempfile.mkstemp(prefix=_PROBE, suffix=".part", dir=self.path)
        except OSError as err:
            raise InputError(
                f"--out: expected a folder you can write to, found that '{self.path}' is not "
                f"writable ({err.strerror or err}). Fix: pick another folder or change its "
                "permissions."
            ) from None
        os.close(fd)
        os.unlink(probe)

    def _read_manifest(self) -> dict[str, set[str]]:
        try:
            text = (self.path / MANIFEST).read_text()
        except FileNotFoundError:
            return {}
        try:
            body = json.loads(text)
            by_task = body.get("by_task") or {"diagnose": body["files"]}
            return {str(t): {str(f) for f in files if "/" not in str(f) and str(f) != MANIFEST}
                    for t, files in by_task.items()}
        except (ValueError, KeyError, TypeError, AttributeError):
            raise InputError(
                f"--out: expected '{MANIFEST}' in '{self.path}' to be the list of files an "
                "earlier run wrote, found something else. Fix: pick another folder, or remove "
                "that file if it is not yours."
            ) from None

    def abandon(self) -> None:
        """After a failure: remove the staging folder, and the folders this run created if
        still empty."""
        for staged in self._staged:
            shutil.rmtree(staged, ignore_errors=True)
        for q in self.created:
            try:
                q.rmdir()
            except OSError:
                return

    # --- writing ---

    def reserve(self, names, *, command: str, version: str) -> None:
        """List ``names`` in the manifest (beside the earlier files) before writing them, so
        that a run killed while writing leaves no file of ours unlisted."""
        self.tasks[self.task] = self.tasks.get(self.task, set()) | set(names)
        self._write_manifest(command, version)

    def staging(self) -> Path:
        """A hidden folder inside the output folder to draw files in before moving them in."""
        staged = Path(tempfile.mkdtemp(prefix=_STAGING, dir=self.path))
        self._staged.append(staged)
        return staged

    def commit(self, written: list[str], *, command: str, version: str,
               staged: Path | None = None) -> list[Path]:
        """Move staged files in, record them, and remove this task's stale files.

        ``written`` names files already in place (e.g. results.nc, written atomically); files
        in ``staged`` are moved in. The manifest first lists old and new files together, so
        that a run killed half-way leaves no file of ours unlisted.
        """
        moved = sorted(os.listdir(staged)) if staged is not None else []
        now = set(written) | set(moved)
        self.reserve(now, command=command, version=version)
        for name in moved:
            os.replace(staged / name, self.path / name)
        if staged is not None:
            shutil.rmtree(staged, ignore_errors=True)
        others = set().union(*(f for t, f in self.tasks.items() if t != self.task))
        for name in sorted(self.earlier - now - others):
            target = self.path / name
            if target.is_file():
                target.unlink()
        self.tasks[self.task] = now
        self._write_manifest(command, version)
        return [self.path / n for n in moved]

    def _write_manifest(self, command, version) -> None:
        stamp = _dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ")
        body = {"written_by": f"sverdrup_kit {version}", "time": stamp, "command": command,
                "files": sorted(self.owned),
                "by_task": {t: sorted(f) for t, f in sorted(self.tasks.items())}}
        fd, tmp = tempfile.mkstemp(prefix=f".{MANIFEST}.", suffix=".part", dir=self.path)
        with os.fdopen(fd, "w") as fh:
            json.dump(body, fh, indent=1)
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        os.replace(tmp, self.path / MANIFEST)
