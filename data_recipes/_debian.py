"""Shared plumbing for recipes that take data files out of Debian archive packages.

A recipe downloads one ``.deb`` with ``apt-get download`` (no installation, no maintainer
scripts run), unpacks it with ``dpkg -x`` into a temporary folder, and copies only the data it
needs into the cache folder. Every copy goes to a temporary name first and is renamed into place,
so an interrupted run never leaves a half-written file. A small JSON manifest beside the data
records where each file came from and its sha256, so a second run can skip the work.
"""

from __future__ import annotations

import argparse
import hashlib
import json
import os
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

ENV_VAR = "SVERDRUP_KIT_DATA"


class RecipeError(RuntimeError):
    """A fetch or verification step failed; the message says which and what to try."""


def cache_dir() -> Path:
    """The cache folder: ``$SVERDRUP_KIT_DATA`` or ``~/.cache/sverdrup_kit``."""
    env = os.environ.get(ENV_VAR, "").strip()
    return Path(env).expanduser() if env else Path.home() / ".cache" / "sverdrup_kit"


def _run(cmd: list[str], cwd: Path) -> subprocess.CompletedProcess:
    return subprocess.run(cmd, cwd=cwd, capture_output=True, text=True, check=False)


def download(package: str, workdir: Path) -> Path:
    """Download the archive of ``package`` into ``workdir`` and return its path.

    ``apt-get update`` runs only when the first download fails, because refreshing the package
    lists is slow and usually unnecessary.
    """
    if shutil.which("apt-get") is None or shutil.which("dpkg") is None:
        raise RecipeError(
            f"fetching Debian package '{package}': expected apt-get and dpkg on PATH, found "
            "neither. Fix: run the recipe on a Debian or Ubuntu machine."
        )
    # apt drops privileges to the _apt user for downloads; a world-writable folder lets it.
    os.chmod(workdir, 0o777)
    res = _run(["apt-get", "download", package], workdir)
    if res.returncode != 0:
        upd = _run(["apt-get", "update"], workdir)
        res = _run(["apt-get", "download", package], workdir)
        if res.returncode != 0:
            raise RecipeError(
                f"apt-get download {package} failed (exit {res.returncode}) even after "
                f"apt-get update (exit {upd.returncode}):\n{res.stderr.strip()}\nFix: check that "
                "a Debian mirror is reachable and that the package name exists "
                f"(apt-cache policy {package})."
            )
    debs = sorted(workdir.glob(f"{package}_*.deb"))
    if len(debs) != 1:
        raise RecipeError(
            f"apt-get download {package}: expected one archive in {workdir}, found "
            f"{[d.name for d in debs]}."
        )
    return debs[0]


def package_version(deb: Path) -> str:
    """The Debian version string of an archive file."""
    res = subprocess.run(
        ["dpkg-deb", "--field", str(deb), "Version"], capture_output=True, text=True, check=False
    )
    return res.stdout.strip() or "unknown"


def unpack(deb: Path, dest: Path) -> Path:
    """Unpack the file tree of ``deb`` (no maintainer scripts) into ``dest``; return ``dest``."""
    res = subprocess.run(["dpkg", "-x", str(deb), str(dest)], capture_output=True, text=True)
    if res.returncode != 0:
        raise RecipeError(f"dpkg -x {deb.name} failed: {res.stderr.strip()}")
    return dest


def sha256(path: Path) -> str:
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for block in iter(lambda: fh.read(1 << 20), b""):
            h.update(block)
    return h.hexdigest()


def sha256_tree(root: Path) -> str:
    """One hash over every file below ``root`` (relative paths and contents, sorted)."""
    h = hashlib.sha256()
    for p in sorted(q for q in root.rglob("*") if q.is_file()):
        h.update(str(p.relative_to(root)).encode())
        h.update(sha256(p).encode())
    return h.hexdigest()


def install_file(src: Path, dst: Path) -> None:
    """Copy ``src`` to ``dst`` through a temporary file in the same folder, then rename."""
    dst.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{dst.name}.", suffix=".part", dir=dst.parent)
    try:
        with os.fdopen(fd, "wb") as out, open(src, "rb") as inp:
            shutil.copyfileobj(inp, out, 1 << 20)
            out.flush()
            os.fsync(out.fileno())
        os.chmod(tmp, 0o644)
        os.replace(tmp, dst)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


def install_tree(src: Path, dst: Path) -> None:
    """Copy folder ``src`` to ``dst`` via a temporary sibling folder, then swap it in."""
    dst.parent.mkdir(parents=True, exist_ok=True)
    tmp = Path(tempfile.mkdtemp(prefix=f".{dst.name}.", suffix=".part", dir=dst.parent))
    try:
        shutil.copytree(src, tmp, dirs_exist_ok=True)
        os.chmod(tmp, 0o755)
        if dst.exists():
            old = dst.with_name(f".{dst.name}.old")
            shutil.rmtree(old, ignore_errors=True)
            os.replace(dst, old)
            os.replace(tmp, dst)
            shutil.rmtree(old, ignore_errors=True)
        else:
            os.replace(tmp, dst)
    except BaseException:
        shutil.rmtree(tmp, ignore_errors=True)
        raise


def read_manifest(path: Path) -> dict:
    try:
        return json.loads(path.read_text())
    except (OSError, ValueError):
        return {}


def write_manifest(path: Path, manifest: dict) -> None:
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=path.parent)
    with os.fdopen(fd, "w") as fh:
        json.dump(manifest, fh, indent=1, sort_keys=True)
        fh.write("\n")
    os.chmod(tmp, 0o644)
    os.replace(tmp, path)


def fetch_unpacked(package: str, workdir: Path) -> tuple[Path, str]:
    """Download and unpack ``package`` below ``workdir``; return (root of the tree, version)."""
    deb = download(package, workdir)
    return unpack(deb, workdir / "tree"), package_version(deb)


def run_recipe(label: str, fetch, doc: str, argv=None) -> int:
    """Command-line entry shared by the recipes: ``--force`` re-downloads; errors are one line."""
    parser = argparse.ArgumentParser(prog=f"python -m data_recipes.{label}",
                                     description=doc.split("\n\n")[0])
    parser.add_argument("--force", action="store_true", help="download again even if cached")
    args = parser.parse_args(argv)
    try:
        fetch(force=args.force)
    except RecipeError as err:
        print(f"{label}: {err}", file=sys.stderr)
        return 1
    return 0
