"""Render the app icon (app/epochpoint/data/epochpoint.svg) to packaging/epochpoint.png.

    .venv/bin/python packaging/render_icon.py [SIZE]      (default 256 px; offscreen is fine)

Uses Qt's own SVG renderer (QSvgRenderer), so no other tool is needed.
"""
import os
import sys

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from PySide6.QtCore import Qt  # noqa: E402
from PySide6.QtGui import QGuiApplication, QImage, QPainter  # noqa: E402
from PySide6.QtSvg import QSvgRenderer  # noqa: E402

HERE = os.path.dirname(os.path.abspath(__file__))
SVG = os.path.join(HERE, "..", "app", "epochpoint", "data", "epochpoint.svg")
PNG = os.path.join(HERE, "epochpoint.png")


def render(svg_path: str, png_path: str, size: int = 256) -> None:
    renderer = QSvgRenderer(svg_path)
    if not renderer.isValid():
        raise SystemExit(f"render_icon: {svg_path}: not a valid SVG")
    image = QImage(size, size, QImage.Format.Format_ARGB32)
    image.fill(Qt.GlobalColor.transparent)
    painter = QPainter(image)
    painter.setRenderHint(QPainter.RenderHint.Antialiasing)
    renderer.render(painter)
    painter.end()
    if not image.save(png_path, "PNG"):
        raise SystemExit(f"render_icon: {png_path}: could not write")


if __name__ == "__main__":
    app = QGuiApplication(sys.argv[:1])
    render(SVG, PNG, int(sys.argv[1]) if len(sys.argv) > 1 else 256)
