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


# -- destinations that are not plain files ---------------------------------------------------

def test_symlink_is_written_through_to_its_target(tmp_path):
    # A link kept elsewhere (common practice: a stable name pointing at a dated file).
    real_dir, link_dir = tmp_path / "real", tmp_path / "links"
    real_dir.mkdir(), link_dir.mkdir()
    target = real_dir / "tonight.csv"
    target.write_text("old")
    os.chmod(target, 0o640)
    link = link_dir / "latest.csv"
    link.symlink_to(target)
    atomic_write_text(link, "new")
    assert link.is_symlink() and os.readlink(link) == str(target)
    assert target.read_text() == "new" and link.read_text() == "new"
    assert stat.S_IMODE(os.stat(target).st_mode) == 0o640
    assert sorted(os.listdir(real_dir)) == ["tonight.csv"]  # the temporary file was there
    assert sorted(os.listdir(link_dir)) == ["latest.csv"]


def test_dangling_symlink_creates_its_target(tmp_path):
    link = tmp_path / "out.csv"
    link.symlink_to(tmp_path / "made.csv")
    atomic_write_text(link, "x")
    assert link.is_symlink() and (tmp_path / "made.csv").read_text() == "x"


def test_fifo_is_refused_in_one_line(tmp_path):
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    with pytest.raises(InputError) as info:
        atomic_write_text(fifo, "x")
    text = str(info.value)
    assert str(fifo) in text and "FIFO" in text and "\n" not in text
    assert stat.S_ISFIFO(os.lstat(fifo).st_mode) and os.listdir(tmp_path) == ["pipe"]


def test_device_is_refused_and_left_alone(monkeypatch):
    import tempfile

    make_temporary = tempfile.mkstemp

    def guarded_mkstemp(*args, dir=None, **kwargs):
        # An implementation that would replace the device must fail here, harmlessly.
        assert os.path.realpath(dir or "") != "/dev", "a temporary file was made in /dev"
        return make_temporary(*args, dir=dir, **kwargs)

    monkeypatch.setattr(tempfile, "mkstemp", guarded_mkstemp)
    before = os.stat("/dev/null")
    with pytest.raises(InputError, match="/dev/null.*character device"):
        atomic_write_text("/dev/null", "x")
    assert stat.S_ISCHR(os.stat("/dev/null").st_mode)
    assert os.stat("/dev/null").st_ino == before.st_ino


def test_errors_name_the_users_path_not_the_temporary(tmp_path, monkeypatch):
    path = tmp_path / "keep.txt"

    def broken_replace(src, dst):
        raise OSError(28, "No space left on device", src, None, dst)

    monkeypatch.setattr(os, "replace", broken_replace)
    with pytest.raises(OSError) as info:
        atomic_write_text(path, "x")
    assert info.value.filename == str(path) and ".tmp" not in str(info.value)
    assert os.listdir(tmp_path) == []


def test_cli_error_for_unwritable_output_names_the_path(tmp_path, capsys):
    from epochpoint.cli.main import main

    targets = tmp_path / "t.csv"
    targets.write_text("name,ra,dec,epoch\nA,10,20,2016.0\n")
    out = tmp_path / "no" / "such" / "out.csv"
    code = main(["positions", str(targets), "--site=10,20,0", "--at", "2027-01-20T23:10:00Z",
                 "--format", "csv", "--output", str(out)])
    err = [line for line in capsys.readouterr().err.splitlines() if "error" in line]
    assert code == 2 and len(err) == 1 and str(out) in err[0] and ".tmp" not in err[0]


# -- termination ------------------------------------------------------------------------------

def test_sigterm_removes_the_temporary_file(tmp_path):
    """A CLI write of a large output, stopped by SIGTERM while it runs, leaves no file."""
    import signal
    import subprocess
    import sys
    import time

    rng = np.random.default_rng(143)
    n = 200_000
    rows = np.column_stack([rng.uniform(0, 359, n), rng.uniform(-89, 89, n)])
    targets = tmp_path / "many.csv"
    with open(targets, "w") as f:
        f.write("name,ra,dec,epoch\n")
        f.writelines(f"S{i},{ra:.6f},{dec:.6f},2016.0\n" for i, (ra, dec) in enumerate(rows))
    out_dir = tmp_path / "out"
    out_dir.mkdir()
    proc = subprocess.Popen(
        [sys.executable, "-m", "epochpoint.cli.main", "positions", str(targets),
         "--site=10,20,0", "--at", "2027-01-20T23:10:00Z", "--format", "json",
         "--output", str(out_dir / "big.json")],
        stderr=subprocess.PIPE, text=True)
    deadline = time.monotonic() + 120
    while not os.listdir(out_dir) and proc.poll() is None and time.monotonic() < deadline:
        time.sleep(0.02)  # wait for the temporary file: the write is under way
    assert proc.poll() is None, "the write ended before it could be stopped"
    proc.send_signal(signal.SIGTERM)
    _, err = proc.communicate(timeout=60)
    assert proc.returncode == 143, err
    assert os.listdir(out_dir) == []
