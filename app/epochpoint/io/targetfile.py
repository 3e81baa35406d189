"""Reading and writing target lists: the format follows the file name (or the content).

`.csv` -> CSV, `.ecsv` -> ECSV, `.vot`/`.votable`/`.xml` -> VOTable. Any other name is sniffed:
`# %ECSV` starts an ECSV file, `<?xml`/`<VOTABLE` a VOTable, lines in the Minor Planet
Center's one-line elements layouts are orbital elements (read only, catalogues/mpc_elements.py),
anything else is read as CSV.
"""
from __future__ import annotations

import os

from epochpoint.core.targets import Targets

from .atomic import atomic_write_bytes
from .csvtargets import format_csv_targets, read_csv_targets
from .errors import InputError
from .filebytes import read_file_bytes
from .targetrows import build_targets

FORMAT_BY_SUFFIX = {".csv": "csv", ".ecsv": "ecsv", ".vot": "votable", ".votable": "votable",
                    ".xml": "votable"}
TARGET_FORMATS = ("csv", "ecsv", "votable")


def target_format(path, data: bytes | None = None) -> str | None:
    """'csv', 'ecsv' or 'votable' from the file name, else from the content ('mpc' for
    orbital elements); None if unknown."""
    fmt = FORMAT_BY_SUFFIX.get(os.path.splitext(os.fspath(path))[1].lower())
    if fmt is not None or data is None:
        return fmt
    head = data[:1024].lstrip(b"\xef\xbb\xbf \t\r\n")
    if head.startswith(b"# %ECSV"):
        return "ecsv"
    if head.startswith(b"<?xml") or b"<VOTABLE" in head.upper():
        return "votable"
    from .catalogues.mpc_elements import looks_like_mpc
    return "mpc" if looks_like_mpc(data) else "csv"


def read_targets(path, skip_bad_rows: bool = False, on_skip=None) -> Targets:
    """The targets of a CSV, ECSV or VOTable file, converted to ICRS and validated, or the
    bodies of an MPC orbital-elements file.

    Bad content raises InputError (one line: file, line or row, target, column). With
    skip_bad_rows=True each bad row is passed to on_skip(InputError) instead (default: a
    SkippedRowWarning with the same text) and left out.
    """
    path = os.fspath(path)
    data = read_file_bytes(path)
    if not data.strip():
        raise InputError(path, "is empty")
    fmt = target_format(path, data)
    if fmt == "mpc":  # orbital elements, one body a line
        from .catalogues.mpc_elements import parse_mpc_elements
        from .filebytes import decode_utf8

        return parse_mpc_elements(path, decode_utf8(path, data), skip_bad_rows=skip_bad_rows,
                                  on_skip=on_skip)
    if fmt == "csv":
        raw = read_csv_targets(path, data)
    else:  # astropy.table (about 0.1 s to import) only for the table formats
        from .tabletargets import read_table_targets

        raw = read_table_targets(path, data, fmt)
    return build_targets(raw, skip_bad_rows=skip_bad_rows, on_skip=on_skip)


def write_targets(targets: Targets, path, format: str | None = None) -> None:
    """Save targets atomically as csv, ecsv or votable (format None: from the file name).

    Everything read_targets reads is written: astrometry in ICRS, errors, correlations and the
    extra planning columns. An unknown format or an unwritable path is an InputError.
    """
    path = os.fspath(path)
    fmt = format or target_format(path)
    if fmt not in TARGET_FORMATS:
        raise InputError(path, f"unknown target file format {fmt or 'for this file name'}; "
                               "use .csv, .ecsv or .vot")
    if fmt == "csv":
        data = format_csv_targets(targets).encode("utf-8")
    else:
        from .tabletargets import format_table_targets

        data = format_table_targets(targets, fmt)
    try:
        atomic_write_bytes(path, data)
    except OSError as err:
        raise InputError(path, f"cannot be written ({err.strerror or err})") from None
