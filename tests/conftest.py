"""Test session setup shared by every test module.

Qt must run without a screen in tests and CI, so the offscreen platform is chosen before any
test imports Qt (a value already set in the environment wins).
"""
import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
