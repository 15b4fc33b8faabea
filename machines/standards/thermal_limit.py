"""Time–current curves given as points: a motor's IEEE Std 620 thermal-limit curves and a fuse's melting curve.

IEEE Std 620 (guide for the presentation of thermal-limit curves for squirrel-cage induction machines) draws the
running overload, the accelerating and the locked-rotor limits on log-log time–current axes; a fuse maker draws
the minimum melting curve the same way. Between the points a curve is read as a straight line on log-log axes
(a power law t ∝ I^k on each segment), the way such curves are drawn and read.

Beyond the points of a thermal-limit curve the heat a rotor stands is taken as constant (I²t = const, the
adiabatic limit that locked-rotor and accelerating curves approach at high current) [D]; beyond a fuse's points
nothing is assumed (the caller says the curve does not reach).

Methods: machines/METHODS.md §3.5 (curves given as points, with check values); the fuse checks are in §4.3.
"""

from __future__ import annotations

import math
from typing import Sequence

Points = Sequence[tuple[float, float]]


def loglog_time(points: Points, current: float) -> float | None:
    """Time on a curve at ``current``, straight lines on log-log axes between the points [s]; None outside them.

    Parameters
    ----------
    points : (current [A], time [s]) pairs, currents rising, times falling
    current : I [A]

    Examples
    --------
    >>> round(loglog_time([(1000.0, 100.0), (2000.0, 10.0)], 1414.2), 2)   # halfway on log axes: √(100·10)
    31.62
    >>> loglog_time([(1000.0, 100.0), (2000.0, 10.0)], 3000.0) is None
    True
    """
    if not points or current < points[0][0] or current > points[-1][0]:
        return None
    if len(points) == 1:
        return float(points[0][1])
    for (i0, t0), (i1, t1) in zip(points, points[1:]):
        if i0 <= current <= i1:
            w = math.log(current / i0) / math.log(i1 / i0)
            return math.exp(math.log(t0) + w * math.log(t1 / t0))
    return None  # pragma: no cover - the range test above returns first


def loglog_current(points: Points, time: float) -> float | None:
    """Current on a curve at ``time`` (the inverse of :func:`loglog_time`) [A]; None outside the points.

    Examples
    --------
    >>> round(loglog_current([(1000.0, 100.0), (2000.0, 10.0)], 31.62), 0)
    1414.0
    """
    if not points or time > points[0][1] or time < points[-1][1]:
        return None
    if len(points) == 1:
        return float(points[0][0])
    for (i0, t0), (i1, t1) in zip(points, points[1:]):
        if t1 <= time <= t0:
            w = math.log(time / t0) / math.log(t1 / t0)
            return math.exp(math.log(i0) + w * math.log(i1 / i0))
    return None  # pragma: no cover


def thermal_limit_time(points: Points, current: float) -> float:
    """Allowed time at ``current`` on an IEEE 620 thermal-limit curve [s]: on the curve between its points,
    and at constant I²t from the nearest end point beyond them.

    Notes
    -----
    Beyond the curve t = t_end·(I_end/I)² (adiabatic heating: the rotor stands the same I²t) [D].

    References
    ----------
    IEEE Std 620-1996, thermal-limit curves (log-log presentation). METHODS.md §3.5.

    Examples
    --------
    >>> thermal_limit_time([(1200.0, 16.0)], 1000.0)   # one locked-rotor point, lower current: 16·(1.2)²
    23.04
    """
    inside = loglog_time(points, current)
    if inside is not None:
        return inside
    i_end, t_end = points[0] if current < points[0][0] else points[-1]
    return t_end * (i_end / current) ** 2


def heat_limit(points: Points) -> float:
    """The least I²t on a thermal-limit curve [A²·s]: the rotor heat the curve allows wherever it is read.

    Examples
    --------
    >>> heat_limit([(744.0, 40.0), (985.8, 25.0)])   # 744² × 40 = 2.214e7, 985.8² × 25 = 2.430e7
    22141440.0
    """
    return min(i * i * t for i, t in points)
