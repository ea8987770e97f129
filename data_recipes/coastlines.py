"""Recipe: crude GSHHS coastline shapefiles for offline maps, from Debian's ``python-cartopy-data``.

Run ``python -m data_recipes.coastlines`` to copy the package's ``shapefiles/gshhs`` folder into
``$SVERDRUP_KIT_DATA/cartopy/shapefiles/gshhs``; then
``CARTOPY_DATA_DIR=$SVERDRUP_KIT_DATA/cartopy`` lets cartopy draw GSHHS coastlines at scale 'c'
without a network. Only the shapefiles are taken from the archive; nothing is installed.
:func:`data_dir` returns the folder for ``CARTOPY_DATA_DIR`` or says how to fetch it.
"""

from __future__ import annotations

import sys
import tempfile
from pathlib import Path

from . import _debian

PACKAGE = "python-cartopy-data"
PACKAGE_DATA = "usr/share/cartopy/data/shapefiles/gshhs"
MANIFEST = "coastlines.json"
COMMAND = "python -m data_recipes.coastlines"
# Files cartopy opens for GSHHS coastlines at scale 'c', level 1 (the land/ocean boundary).
REQUIRED = ("c/GSHHS_c_L1.shp", "c/GSHHS_c_L1.shx", "c/GSHHS_c_L1.dbf")
# Tree hash of the folder in python-cartopy-data 0.21.1+dfsg-1 (Debian bookworm).
TESTED_SHA256 = "f03c074af95e05dced9ef1f7182da9016b7484af1ea5e0a16f4cfdb072a60604"


def _target() -> Path:
    return _debian.cache_dir() / "cartopy" / "shapefiles" / "gshhs"


def _count_records(shp: Path) -> int:
    """Number of records in an ESRI shapefile, read from its index (.shx) header length."""
    size = shp.with_suffix(".shx").stat().st_size
    # .shx: a 100-byte header, then 8 bytes per record (ESRI Shapefile Technical Description 1998).
    return (size - 100) // 8


def _check(folder: Path) -> int:
    """Check that ``folder`` holds the crude level-1 shapefile with polygons; return their count."""
    missing = [f for f in REQUIRED if not (folder / f).is_file()]
    if missing:
        raise _debian.RecipeError(
            f"gshhs: expected {list(REQUIRED)} in {folder}, missing {missing}."
        )
    n = _count_records(folder / REQUIRED[0])
    if n < 1:
        raise _debian.RecipeError(f"gshhs: {REQUIRED[0]} in {folder} has no polygons.")
    return n


def fetch(*, force: bool = False, out=sys.stdout) -> Path:
    """Fetch, verify and cache the GSHHS folder; return the folder for ``CARTOPY_DATA_DIR``."""
    target = _target()
    manifest_path = _debian.cache_dir() / MANIFEST
    manifest = _debian.read_manifest(manifest_path).get("gshhs", {})
    if not force and target.is_dir() and manifest.get("sha256") == _debian.sha256_tree(target):
        n = _check(target)
        print(f"gshhs: already cached and verified ({n} crude coastline polygons) at {target}",
              file=out)
        return data_dir()
    with tempfile.TemporaryDirectory(prefix="sverdrup_kit_recipe_") as tmp:
        tree, version = _debian.fetch_unpacked(PACKAGE, Path(tmp))
        src = tree / PACKAGE_DATA
        n = _check(src)
        digest = _debian.sha256_tree(src)
        _debian.install_tree(src, target)
    _debian.write_manifest(
        manifest_path,
        {"gshhs": {"sha256": digest, "package": PACKAGE, "version": version, "polygons_c_L1": n}},
    )
    note = "" if digest == TESTED_SHA256 else " (hash differs from the tested 0.21.1 copy)"
    print(
        f"gshhs: fetched from Debian {PACKAGE} {version}, verified ({n} crude coastline "
        f"polygons), sha256 {digest[:12]}...{note} -> {target}",
        file=out,
    )
    return data_dir()


def data_dir() -> Path:
    """The folder to use as ``CARTOPY_DATA_DIR`` (``$SVERDRUP_KIT_DATA/cartopy``).

    Raises
    ------
    FileNotFoundError
        When the coastlines have not been fetched, with the command that fetches them.
    """
    target = _target()
    if not all((target / f).is_file() for f in REQUIRED):
        raise FileNotFoundError(
            f"GSHHS coastlines: expected {REQUIRED[0]} under {target}, found none. Fix: run "
            f"`{COMMAND}` (needs apt-get and a Debian mirror), or draw the data's own land mask."
        )
    return target.parent.parent


def main(argv=None) -> int:
    return _debian.run_recipe("coastlines", fetch, __doc__, argv)


if __name__ == "__main__":
    sys.exit(main())
