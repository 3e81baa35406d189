"""Helpers shared by the file-layer tests."""
import pytest


@pytest.fixture
def write_file(tmp_path):
    """write_file(name, text_or_bytes) -> path of a new file in a fresh temporary folder."""

    def write(name, content):
        path = tmp_path / name
        if isinstance(content, str):
            content = content.encode("utf-8")
        path.write_bytes(content)
        return path

    return write
