"""`epochpoint gui --screenshot`: renders the computed main window to a PNG without a screen;
bad input is one line on stderr and exit status 2."""
import os
import subprocess
import sys

from PySide6.QtGui import QImage

from shell_support import DEMO_PLAN, DEMO_TARGETS, ROOT

MIN_WIDTH, MIN_HEIGHT = 1280, 800


def _run(*args, timeout=120):
    env = dict(os.environ, QT_QPA_PLATFORM="offscreen",
               PYTHONPATH=os.path.join(ROOT, "app") + os.pathsep + os.environ.get("PYTHONPATH",
                                                                                  ""))
    return subprocess.run([sys.executable, "-m", "epochpoint.cli.main", "gui", *args],
                          capture_output=True, text=True, timeout=timeout, env=env, cwd=ROOT)


def test_screenshot_of_the_demo_plan(tmp_path, qapp):
    png = tmp_path / "window.png"
    result = _run(DEMO_PLAN, "--screenshot", str(png))
    assert result.returncode == 0, result.stderr
    assert png.stat().st_size > 10_000
    image = QImage(str(png))
    assert image.width() >= MIN_WIDTH and image.height() >= MIN_HEIGHT
    assert result.stderr.strip() == ""  # no tracebacks, no Qt chatter


def test_screenshot_of_a_target_list_with_the_night_option(tmp_path, qapp):
    png = tmp_path / "list.png"
    result = _run(DEMO_TARGETS, "--night", "2027-01-19", "--screenshot", str(png))
    assert result.returncode == 0, result.stderr
    assert QImage(str(png)).width() >= MIN_WIDTH


def test_bad_input_is_one_line_and_exit_2(tmp_path):
    bad = tmp_path / "bad.json"
    bad.write_text('{"format": "epochpoint-plan", "version": 1, "site": {}, "targets": []}',
                   encoding="utf-8")
    png = tmp_path / "never.png"
    result = _run(str(bad), "--screenshot", str(png))
    assert result.returncode == 2
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and "bad.json" in lines[0] and "[site]" in lines[0], result.stderr
    assert not png.exists()
    missing = _run(str(tmp_path / "nowhere.csv"), "--screenshot", str(png))
    assert missing.returncode == 2 and len(missing.stderr.strip().splitlines()) == 1
