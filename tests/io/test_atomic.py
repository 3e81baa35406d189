"""Atomic saves: the old file survives a failed write and no temporary file is left behind."""
import os
import stat

import numpy as np
import pytest

from epochpoint.core.targets import Targets
from epochpoint.io import InputError, atomic_write_bytes, atomic_write_text, write_targets


def test_replaces_content_and_keeps_permissions(tmp_path):
    path = tmp_path / "plan.csv"
    path.write_text("old")
    os.chmod(path, 0o640)
    atomic_write_text(path, "new ✓")
    assert path.read_text(encoding="utf-8") == "new ✓"
    assert stat.S_IMODE(os.stat(path).st_mode) == 0o640
    assert os.listdir(tmp_path) == ["plan.csv"]


def test_new_file_gets_ordinary_permissions(tmp_path):
    path = tmp_path / "new.bin"
    atomic_write_bytes(path, b"\x00\x01")
    assert path.read_bytes() == b"\x00\x01"
    umask = os.umask(0)
    os.umask(umask)
    assert stat.S_IMODE(os.stat(path).st_mode) == 0o666 & ~umask


def test_failure_leaves_old_file_and_no_temporary(tmp_path, monkeypatch):
    path = tmp_path / "keep.txt"
    path.write_text("precious")

    def broken_replace(src, dst):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "replace", broken_replace)
    with pytest.raises(OSError):
        atomic_write_text(path, "half")
    assert path.read_text() == "precious"
    assert os.listdir(tmp_path) == ["keep.txt"]


def test_write_targets_unwritable_or_unknown_format(tmp_path):
    targets = Targets.from_columns(ra=np.array([1.0]), dec=np.array([2.0]))
    with pytest.raises(InputError, match="cannot be written"):
        write_targets(targets, tmp_path / "missing" / "t.csv")
    with pytest.raises(InputError, match="unknown target file format"):
        write_targets(targets, tmp_path / "t.txt")
    write_targets(targets, tmp_path / "t.txt", format="ecsv")
    assert (tmp_path / "t.txt").read_text().startswith("# %ECSV")
