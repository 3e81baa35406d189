"""Entry point of the PyInstaller bundle: the `epochpoint` command; with no arguments it opens
the desktop app (as a desktop launcher would)."""
import sys

from epochpoint.cli.main import main

if __name__ == "__main__":
    sys.exit(main(sys.argv[1:] or ["gui"]))
