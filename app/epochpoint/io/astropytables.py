"""astropy Tables in and out of ECSV and VOTable bytes, the one place that calls astropy.io.

Reading turns anything astropy cannot parse into a one-line InputError. Writing VOTable uses
TABLEDATA (readable XML) through astropy's pure-Python writer: astropy 8.0.2's C TABLEDATA writer
overruns a heap buffer on text that needs XML escaping (&, <, >), found by this project's
round-trip property test under PYTHONMALLOC=debug. Meta items become VOTable INFO elements
(IVOA VOTable 1.4, section 4.7) and ECSV header meta.
"""
from __future__ import annotations

import io
import warnings

from astropy.io.votable import from_table, parse
from astropy.io.votable.tree import Info
from astropy.table import Table

from .errors import InputError
from .filebytes import decode_utf8

FORMAT_NAMES = {"ecsv": "ECSV", "votable": "VOTable"}


def load_table(path: str, data: bytes, fmt: str) -> Table:
    """An astropy Table from ECSV ('ecsv') or VOTable ('votable') bytes (first table).

    ECSV header meta lands in table.meta; so do a VOTable's INFO elements (of the document, the
    first resource and the table) and its table's PARAMs, by name, where meta has no such key.
    """
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")  # astropy's VOTable conformance notes
            if fmt == "ecsv":
                return Table.read(decode_utf8(path, data).splitlines(), format="ascii.ecsv")
            return _votable_table(io.BytesIO(data))
    except Exception as err:  # astropy raises many types for malformed files
        first_line = (str(err).strip().splitlines() or [type(err).__name__])[0][:100]
        raise InputError(path, f"is not a readable {FORMAT_NAMES[fmt]} file ({first_line})") \
            from None


def _votable_table(source) -> Table:
    """The first table of a VOTable (as Table.read gives it), with INFO and PARAM in meta."""
    document = parse(source)
    first = document.get_first_table()
    table = first.to_table()
    resource = document.resources[0] if document.resources else None
    named = list(document.infos) + (list(resource.infos) if resource is not None else [])
    named += list(first.infos) + list(first.params)
    for element in named:
        if element.name and element.name not in table.meta:
            table.meta[element.name] = element.value
    return table


def table_bytes(table: Table, fmt: str) -> bytes:
    """A Table serialized as ECSV or VOTable (UTF-8); table.meta goes into the header / INFO."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # e.g. VOTable notes on names that are not XML IDs
        if fmt == "ecsv":
            text = io.StringIO()
            table.write(text, format="ascii.ecsv")
            return text.getvalue().encode("utf-8")
        votable = from_table(table)
        # Text columns are declared variable-length (arraysize "*", VOTable 1.4 sec. 2.2), so
        # a table written chunk by chunk needs no widest value up front.
        for field in votable.get_first_table().fields:
            if field.datatype in ("char", "unicodeChar"):
                field.arraysize = "*"
        for key, value in table.meta.items():
            votable.resources[0].infos.append(
                Info(name=str(key), value="" if value is None else str(value)))
        out = io.BytesIO()
        try:
            votable.to_xml(out, _debug_python_based_parser=True)  # see module docstring
        except TypeError:  # an astropy without that option: its default writer
            out = io.BytesIO()
            votable.to_xml(out)
        return out.getvalue()
