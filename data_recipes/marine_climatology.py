"""Recipe: classic gridded marine climatologies from Debian's ``ferret-datasets`` package.

Run ``python -m data_recipes.marine_climatology`` to fetch, verify and cache

- ``coads_monthly``: COADS monthly marine surface climatology, 2 degree grid, 12 months
  (Woodruff et al. 1987, Bull. Amer. Meteor. Soc. 68, 1239-1250);
- ``levitus_ts``: annual temperature and salinity, 1 degree, 20 levels
  (Levitus 1982, NOAA Prof. Paper 13);
- ``etopo60``: global relief at 60 minutes;
- ``etopo5``: global relief at 5 minutes (ETOPO5; source of the built-in Earth ocean mask, see
  ``data_recipes/earth_mask.py``);
- ``navy_monthly_winds``: monthly surface winds on a 2.5 degree grid, 132 months.

Each is cached under our own plain name with the ``.nc`` suffix (``coads_monthly.nc``, ...);
:data:`FILES` records which file of the package it comes from.

into ``$SVERDRUP_KIT_DATA`` (default ``~/.cache/sverdrup_kit``). Only the data files are taken
from the package archive; nothing is installed. A second run checks the cached files and skips
the download. From Python, :func:`path` returns a cached file or says how to fetch it.
"""

from __future__ import annotations

import sys
import tempfile
from dataclasses import dataclass
from pathlib import Path

from . import _debian

PACKAGE = "ferret-datasets"
PACKAGE_DATA = "usr/share/ferret-vis/data"
MANIFEST = "marine_climatology.json"
COMMAND = "python -m data_recipes.marine_climatology"


@dataclass(frozen=True)
class FileSpec:
    """What a good copy of a file looks like: dimension sizes, variables, and the tested hash."""

    package_file: str
    dims: dict
    variables: tuple
    sha256: str


# Hashes of the files in ferret-datasets 7.6.0-5 (Debian bookworm), the version the tests were
# written against; a different hash is reported but accepted when the structure checks pass.
FILES = {
    "coads_monthly": FileSpec(
        "coads_climatology.cdf",
        {"COADSX": 180, "COADSY": 90, "TIME": 12},
        ("UWND", "VWND", "WSPD", "SST", "AIRT", "SPEH", "SLP"),
        "b94f55034d13d63f33e2153afddc0c5e00347076c35ab3e34937aec38ce9c4c1",
    ),
    "levitus_ts": FileSpec(
        "levitus_climatology.cdf",
        {"XAXLEVITR": 360, "YAXLEVITR": 180, "ZAXLEVITR": 20},
        ("TEMP", "SALT"),
        "6cf0c43e2b5b790a25547eb90194c0468ab508a40636c1e67b42e892c3b7596b",
    ),
    "etopo60": FileSpec(
        "etopo60.cdf",
        {"ETOPO60X": 360, "ETOPO60Y": 180},
        ("ROSE",),
        "36b4cb72a01cf4c6dc155e52dca6c4ff148aea5958d056d3136fe2789646c4ad",
    ),
    "etopo5": FileSpec(
        "etopo5.cdf",
        {"ETOPO05_X": 4320, "ETOPO05_Y": 2161},
        ("ROSE",),
        "1455d5e5feebd183d0bef5538a750ca8a44801e1503f964df900831c224459ce",
    ),
    "navy_monthly_winds": FileSpec(
        "monthly_navy_winds.cdf",
        {"FNOCX": 144, "FNOCY": 73, "TIME": 132},
        ("UWND", "VWND"),
        "225a9e4fed7bb1a7b558afb662abbe2dc5e3d3db4100fa019cb994f10b115faa",
    ),
}


def _canonical_name(name: str) -> str:
    key = str(name).strip()
    key = key[:-3] if key.endswith(".nc") else key
    if key in FILES:
        return key
    raise ValueError(
        f"name: expected one of {sorted(FILES)} (with or without '.nc'), found {name!r}. "
        f"Fix: pick one of those names."
    )


def cached_file(folder: Path, name: str) -> Path:
    """Where the data set ``name`` (a key of :data:`FILES`) is cached in ``folder``."""
    return folder / f"{name}.nc"


def verify(file: Path, spec: FileSpec) -> None:
    """Open ``file`` and check its dimensions and variables against ``spec``.

    Raises
    ------
    RecipeError
        When the file does not open or its structure differs.
    """
    import netCDF4

    try:
        with netCDF4.Dataset(file) as nc:
            dims = {k: len(v) for k, v in nc.dimensions.items()}
            names = set(nc.variables)
    except OSError as err:
        raise _debian.RecipeError(f"{file.name}: does not open as netCDF ({err}).") from err
    wrong = {k: (n, dims.get(k)) for k, n in spec.dims.items() if dims.get(k) != n}
    missing = [v for v in spec.variables if v not in names]
    if wrong or missing:
        raise _debian.RecipeError(
            f"{file.name}: expected dimensions {spec.dims} and variables {list(spec.variables)}; "
            f"found dimension sizes {dims} (wrong: {wrong}) and missing variables {missing}."
        )


def _valid_cached(name: str, folder: Path, manifest: dict) -> bool:
    file = cached_file(folder, name)
    entry = manifest.get(name)
    if not file.is_file() or not entry:
        return False
    if entry.get("sha256") != _debian.sha256(file):
        return False
    try:
        verify(file, FILES[name])
    except _debian.RecipeError:
        return False
    return True


def fetch(*, force: bool = False, out=sys.stdout) -> dict[str, Path]:
    """Fetch, verify and cache every file; return their paths. Prints one line per file.

    Parameters
    ----------
    force : bool, optional
        Download again even when the cached copies are valid.
    out : file-like, optional
        Where the progress lines go.
    """
    folder = _debian.cache_dir()
    manifest_path = folder / MANIFEST
    manifest = _debian.read_manifest(manifest_path)
    todo = [n for n in FILES if force or not _valid_cached(n, folder, manifest)]
    for name in FILES:
        if name not in todo:
            print(f"{name}: already cached and verified at {cached_file(folder, name)}",
                  file=out)
    if todo:
        with tempfile.TemporaryDirectory(prefix="sverdrup_kit_recipe_") as tmp:
            tree, version = _debian.fetch_unpacked(PACKAGE, Path(tmp))
            for name in todo:
                spec = FILES[name]
                src = tree / PACKAGE_DATA / spec.package_file
                if not src.is_file():
                    raise _debian.RecipeError(
                        f"{name}: expected at {PACKAGE_DATA}/{spec.package_file} in {PACKAGE} "
                        f"{version}, "
                        "not found. Fix: check the package contents with dpkg -c."
                    )
                verify(src, spec)
                digest = _debian.sha256(src)
                target = cached_file(folder, name)
                _debian.install_file(src, target)
                manifest[name] = {
                    "sha256": digest,
                    "size": target.stat().st_size,
                    "package_file": spec.package_file,
                    "package": PACKAGE,
                    "version": version,
                    "dims": spec.dims,
                }
                _debian.write_manifest(manifest_path, manifest)
                note = "" if digest == spec.sha256 else " (differs from the tested 7.6.0-5 copy)"
                print(
                    f"{name}: fetched from Debian {PACKAGE} {version}, verified dims "
                    f"{spec.dims}, sha256 {digest[:12]}...{note} -> {target}",
                    file=out,
                )
    return {n: cached_file(folder, n) for n in FILES}


def path(name: str) -> Path:
    """Path of a cached data set, e.g. ``path('coads_monthly')``.

    Checks that the file is present and has the size recorded when it was fetched (the full hash
    is checked by the recipe itself).

    Raises
    ------
    FileNotFoundError
        When the file has not been fetched, with the command that fetches it.
    """
    name = _canonical_name(name)
    folder = _debian.cache_dir()
    file = cached_file(folder, name)
    entry = _debian.read_manifest(folder / MANIFEST).get(name)
    if not file.is_file() or not entry or entry.get("size") != file.stat().st_size:
        raise FileNotFoundError(
            f"{name}: expected a verified copy in {folder} (set by ${_debian.ENV_VAR}), found "
            f"{'none' if not file.exists() else 'a file that does not match the manifest'}. "
            f"Fix: run `{COMMAND}` (needs apt-get and a Debian mirror)."
        )
    return file


def main(argv=None) -> int:
    return _debian.run_recipe("marine_climatology", fetch, __doc__, argv)


if __name__ == "__main__":
    sys.exit(main())
