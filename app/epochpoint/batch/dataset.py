"""The output of a batch: a Parquet dataset (a folder of part-NNNNNN.parquet files, one per
partition), saved atomically as a whole.

The parts are written into a hidden folder beside OUTPUT; only when every partition is done
does a rename put the folder in place (replacing an earlier batch's output, never a folder
holding anything else). A batch that fails or is stopped leaves OUTPUT as it was. On a
cluster the workers write the parts themselves, so OUTPUT must be on a file system every
worker shares with the client.
"""
from __future__ import annotations

import json
import os
import shutil
import tempfile

import pyarrow as pa
import pyarrow.parquet as pq

from ..io.errors import InputError

# What a folder may hold to be replaced: the files of an earlier batch's output.
_OURS = (".parquet",)


def part_name(number: int) -> str:
    return f"part-{number:06d}.parquet"


def check_output(path) -> None:
    """InputError unless OUTPUT is new, or an earlier batch output that may be replaced."""
    path = os.path.abspath(os.fspath(path))
    if not os.path.exists(path):
        return
    if not os.path.isdir(path):
        raise InputError(path, "exists and is not a folder; the output is a Parquet dataset "
                               "(a folder of files)")
    others = [f for f in os.listdir(path) if not f.endswith(_OURS)]
    if others:
        raise InputError(path, f"is a folder holding other files ({others[0]}, ...); name a "
                               "new folder or an earlier batch output")


class OutputFolder:
    """`with OutputFolder(path) as folder:` write parts into folder.partial, then commit()."""

    def __init__(self, path):
        self.path = os.path.abspath(os.fspath(path))
        check_output(self.path)
        parent, base = os.path.split(self.path)
        try:
            self.partial = tempfile.mkdtemp(prefix=f".{base}.", suffix=".partial", dir=parent)
        except OSError as err:
            raise OSError(err.errno, err.strerror, os.fspath(path)) from None
        self.done = False

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        if not self.done:
            shutil.rmtree(self.partial, ignore_errors=True)
        return False

    def commit(self) -> None:
        """Put the finished dataset in place of OUTPUT (an earlier output is removed after)."""
        old = None
        if os.path.exists(self.path):
            check_output(self.path)
            old = self.partial + ".old"
            os.rename(self.path, old)
        os.rename(self.partial, self.path)
        self.done = True
        if old is not None:
            shutil.rmtree(old, ignore_errors=True)


def output_schema(fields: list, meta: dict, units: dict) -> pa.Schema:
    """The dataset's schema: each column's unit in its field metadata, what the numbers mean
    (instant, site, frames) as JSON under the key `epochpoint`."""
    with_units = [pa.field(name, kind, metadata={"unit": units[name]} if units.get(name) else None)
                  for name, kind in fields]
    return pa.schema(with_units, metadata={"epochpoint": json.dumps(meta, default=str)})


def write_part(frame, folder: str, schema: pa.Schema, id_column: str, partition_info=None):
    """Write one partition's answer as a part file; a one-row frame of counts comes back:
    rows, rows with a problem, and the first problem (with the row's id)."""
    import pandas as pd

    table = pa.Table.from_pandas(frame, preserve_index=False).cast(schema)
    table = table.replace_schema_metadata(schema.metadata)
    # Dictionary encoding only where it pays (the mostly empty problem column): trying it on
    # a million distinct floats per column costs more than the whole write.
    pq.write_table(table, os.path.join(folder, part_name(partition_info["number"])),
                   use_dictionary=["problem"])
    problem = frame["problem"]
    flagged = problem.to_numpy(dtype=object, na_value="") != ""
    first = ""
    if flagged.any():
        i = int(flagged.argmax())
        first = f"{id_column} {frame[id_column].iloc[i]}: {problem.iloc[i]}"
    return pd.DataFrame({"rows": [len(frame)], "problems": [int(flagged.sum())],
                         "first_problem": [first]})
