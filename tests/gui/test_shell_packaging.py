"""Packaging files: the desktop entry, the PyInstaller spec, the icon, and (slow, on request)
the bundle's smoke test."""
import ast
import configparser
import os
import shutil
import subprocess

import pytest
from PySide6.QtGui import QImage

from shell_support import ROOT

PACKAGING = os.path.join(ROOT, "packaging")


def _desktop_entry():
    parser = configparser.ConfigParser(interpolation=None, strict=True)
    parser.optionxform = str  # keys are case-sensitive in desktop entries
    with open(os.path.join(PACKAGING, "epochpoint.desktop"), encoding="utf-8") as f:
        parser.read_file(f)
    return parser["Desktop Entry"]


def test_desktop_entry_keys():
    # Required and recommended keys of the freedesktop.org Desktop Entry Specification
    # (section "Recognized desktop entry keys"): Type, Name; Exec for an Application.
    entry = _desktop_entry()
    assert entry["Type"] == "Application" and entry["Name"] == "Epochpoint"
    assert entry["Exec"].split()[:2] == ["epochpoint", "gui"]
    # Field codes allowed in Exec (spec, "The Exec key"): one file argument at most.
    assert entry["Exec"].split()[2:] in ([], ["%f"], ["%F"])
    assert entry["Terminal"] in ("true", "false")
    assert entry["Icon"] == "epochpoint"  # a theme icon name, installed from epochpoint.png
    # Lists end with a semicolon (spec, "Possible value types").
    for key in ("Categories", "Keywords"):
        assert entry[key].endswith(";"), key
    assert "Science" in entry["Categories"].split(";")  # a registered main category
    known = {"Type", "Version", "Name", "GenericName", "Comment", "Exec", "TryExec", "Icon",
             "Terminal", "Categories", "Keywords", "StartupNotify", "StartupWMClass"}
    assert set(entry) <= known


@pytest.mark.skipif(shutil.which("desktop-file-validate") is None,
                    reason="desktop-file-validate (desktop-file-utils) not installed")
def test_desktop_entry_passes_the_reference_validator():
    result = subprocess.run(["desktop-file-validate",
                             os.path.join(PACKAGING, "epochpoint.desktop")],
                            capture_output=True, text=True)
    assert result.returncode == 0, result.stdout + result.stderr


def test_spec_and_entry_script_parse_as_python():
    for name in ("epochpoint.spec", "entry.py", "render_icon.py"):
        with open(os.path.join(PACKAGING, name), encoding="utf-8") as f:
            ast.parse(f.read(), filename=name)


def test_icon_png_is_256_pixels_with_a_transparent_corner(qapp):
    image = QImage(os.path.join(PACKAGING, "epochpoint.png"))
    assert (image.width(), image.height()) == (256, 256)
    assert image.pixelColor(0, 0).alpha() == 0  # rounded corners: transparent outside
    assert image.pixelColor(128, 128).alpha() == 255
    assert os.path.exists(os.path.join(ROOT, "app", "epochpoint", "data", "epochpoint.svg"))


@pytest.mark.slow
@pytest.mark.skipif(os.environ.get("EPOCHPOINT_PACKAGE_TEST") != "1",
                    reason="set EPOCHPOINT_PACKAGE_TEST=1 after `make package` to run")
def test_bundle_smoke_test():
    result = subprocess.run([os.path.join(PACKAGING, "smoke_test.sh")], capture_output=True,
                            text=True, timeout=300, cwd=ROOT)
    assert result.returncode == 0, result.stdout + result.stderr
    assert "smoke_test: ok" in result.stdout
