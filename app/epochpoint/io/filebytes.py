"""Reading a user's file: its bytes and its UTF-8 text, every failure as a one-line InputError."""
from __future__ import annotations

import os

from .errors import InputError


def read_file_bytes(path) -> bytes:
    """The whole file; a missing, unreadable or folder path is an InputError."""
    path = os.fspath(path)
    try:
        with open(path, "rb") as f:
            return f.read()
    except FileNotFoundError:
        raise InputError(path, "file not found") from None
    except IsADirectoryError:
        raise InputError(path, "is a folder, not a file") from None
    except OSError as err:
        raise InputError(path, f"cannot be read ({err.strerror or err})") from None


def decode_utf8(path, data: bytes) -> str:
    """UTF-8 text (a byte-order mark is dropped); InputError naming the line of a bad byte."""
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as err:
        line = data[: err.start].count(b"\n") + 1
        raise InputError(path, f"is not UTF-8 text (byte {data[err.start]:#04x})",
                         line=line) from None
