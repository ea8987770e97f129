"""The command's output folder: ownership by manifest, stale files, leftovers (no computation)."""

import json

import pytest

from sverdrup_kit._outfolder import MANIFEST, OutputFolder
from sverdrup_kit.errors import InputError


def _run(folder, task, outputs, written, staged_names=()):
    f = OutputFolder(folder, task=task, outputs=outputs)
    f.prepare()
    for name in written:
        f.reserve([name], command=f"sverdrup-kit {task}", version="test")
        (folder / name).write_text(f"{task} {name}")
    staged = None
    if staged_names:
        staged = f.staging()
        for name in staged_names:
            (staged / name).write_text(f"{task} {name}")
    f.commit(list(written), command=f"sverdrup-kit {task}", version="test", staged=staged)
    return json.loads((folder / MANIFEST).read_text())


def test_two_commands_share_a_folder_and_remove_only_their_own_stale_files(tmp_path):
    _run(tmp_path, "diagnose", ["results.nc"], ["results.nc"], ["map.png", "old.png"])
    _run(tmp_path, "spread", ["spread.nc"], ["spread.nc"], ["spread.png"])
    manifest = _run(tmp_path, "diagnose", ["results.nc"], ["results.nc"], ["map.png"])
    assert sorted(p.name for p in tmp_path.iterdir()) == sorted(
        [MANIFEST, "results.nc", "map.png", "spread.nc", "spread.png"])  # old.png is gone
    assert manifest["by_task"] == {"diagnose": ["map.png", "results.nc"],
                                   "spread": ["spread.nc", "spread.png"]}
    assert manifest["files"] == sorted(["map.png", "results.nc", "spread.nc", "spread.png"])


def test_a_folder_of_the_users_is_refused_and_a_damaged_manifest_too(tmp_path):
    (tmp_path / "notes.txt").write_text("mine")
    with pytest.raises(InputError, match="^--out: .*1 other file"):
        OutputFolder(tmp_path).prepare()
    OutputFolder(tmp_path, overwrite=True).prepare()
    (tmp_path / MANIFEST).write_text("not json")
    with pytest.raises(InputError, match=f"^--out: expected '{MANIFEST}'"):
        OutputFolder(tmp_path, overwrite=True).prepare()
    assert (tmp_path / "notes.txt").read_text() == "mine"


def test_an_input_named_like_an_output_is_refused(tmp_path):
    (tmp_path / "spread.nc").write_text("input")
    with pytest.raises(InputError, match="no input would be replaced"):
        OutputFolder(tmp_path, task="spread", outputs=("spread.nc",), overwrite=True,
                     inputs=[tmp_path / "spread.nc"]).prepare()
