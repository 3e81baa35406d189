"""Numbers as the app writes them: fixed decimals, and never "-0.0".

A value that rounds to zero at the shown decimals is written as zero without a minus sign
(common practice in published tables: a rounded zero carries no sign); "+0.0" when signed.
Every panel formats its decimal numbers through `fixed`, so the rule holds everywhere.
"""
from __future__ import annotations


def fixed(value: float, decimals: int, signed: bool = False) -> str:
    """`value` with `decimals` decimals ("+" before positive values and zero when `signed`)."""
    # Round first, then add 0.0: IEEE 754 gives -0.0 + 0.0 = +0.0, dropping the sign of zero.
    rounded = round(float(value), decimals) + 0.0
    return f"{rounded:{'+' if signed else ''}.{decimals}f}"
