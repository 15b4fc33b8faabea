"""Dependent-time (inverse-time) overcurrent characteristics: IEC 60255-151 and IEEE C37.112, with reset.

The curves are data (:data:`CURVES`); three functions use them: the operate time, the dependent reset time and the
time multiplier (time dial) that gives a wanted operate time at a given multiple of pickup.

IEC form (IEC 60255-151:2009, dependent-time characteristics)::

    t(M) = TMS · [ k / (M^α − 1) + c ]                    M = I / I_s > 1

IEEE form (IEEE Std C37.112-2018), operate and electromechanical-disc reset::

    t(M)  = TD · [ A / (M^p − 1) + B ]                     M > 1
    tr(M) = TD · tr / (1 − M²)                             M < 1

Both forms are the same expression with (k, c, α) ↔ (A, B, p); relaywright uses a single equation and states which
constants it used on the sheet. The time multiplier is applied directly (no division by a relay-family constant).

Methods: machines/METHODS.md §1 (inverse-time curves; 1.2 constants, 1.4 check values).
"""

from __future__ import annotations

import math

from machines.errors import InputError
from machines.frozen import frozen


@frozen
class InverseCurve:
    """Constants of one dependent-time characteristic.

    ``k`` [s], ``c`` [s], ``alpha`` [-]; ``reset`` the reset constant tr [s] (None: no dependent reset defined);
    ``family`` "IEC" or "IEEE"; ``name`` as printed on the sheet; ``reference`` the standard's table.
    """

    name: str
    family: str
    k: float
    c: float
    alpha: float
    reset: float | None
    reference: str


_IEC = "IEC 60255-151:2009, table of dependent-time constants (value from memory)"
_IEEE = "IEEE Std C37.112-2018, table of curve constants (value from memory)"

#: The curve library, keyed by the name used in machine files and on the sheet.
CURVES: dict[str, InverseCurve] = {
    "IEC-SI": InverseCurve("IEC standard inverse (A)", "IEC", 0.14, 0.0, 0.02, None, _IEC),
    "IEC-VI": InverseCurve("IEC very inverse (B)", "IEC", 13.5, 0.0, 1.0, None, _IEC),
    "IEC-EI": InverseCurve("IEC extremely inverse (C)", "IEC", 80.0, 0.0, 2.0, None, _IEC),
    "IEC-LTI": InverseCurve("Long-time inverse", "IEC", 120.0, 0.0, 1.0, None,
                            "BS 142 / IEC 60255-3 (not in the IEC 60255-151 table; value from memory)"),
    "IEEE-MI": InverseCurve("IEEE moderately inverse", "IEEE", 0.0515, 0.1140, 0.02, 4.85, _IEEE),
    "IEEE-VI": InverseCurve("IEEE very inverse", "IEEE", 19.61, 0.491, 2.0, 21.6, _IEEE),
    "IEEE-EI": InverseCurve("IEEE extremely inverse", "IEEE", 28.2, 0.1217, 2.0, 29.1, _IEEE),
}


def curve_constants(curve: str) -> InverseCurve:
    """The constants of ``curve`` (a key of :data:`CURVES`), or an InputError naming the known curves.

    >>> curve_constants("IEEE-VI").k
    19.61
    """
    try:
        return CURVES[curve]
    except KeyError:
        raise InputError("curve", f"expected one of {', '.join(CURVES)}, got {curve!r}") from None


def _check_multiple(multiple: float, above: bool) -> None:
    if not math.isfinite(multiple) or multiple < 0.0:
        raise InputError("multiple", f"expected a finite multiple of pickup ≥ 0, got {multiple!r}")
    if above and multiple <= 1.0:
        raise InputError("multiple", f"expected a multiple of pickup above 1 for operation, got {multiple:g}")
    if not above and multiple >= 1.0:
        raise InputError("multiple", f"expected a multiple of pickup below 1 for reset, got {multiple:g}")


def _base_time(multiple: float, c: InverseCurve) -> float:
    """The curve at time multiplier 1: k / (M^α − 1) + c [s]."""
    return c.k / (multiple ** c.alpha - 1.0) + c.c


def inverse_operate_time(multiple: float, curve: str, multiplier: float,
                         definite_above: float | None = None) -> float:
    """Operate time of a dependent-time element at a constant current [s].

    Parameters
    ----------
    multiple : M = I / I_s, current in multiples of the pickup setting [-], above 1
    curve : a key of :data:`CURVES`, e.g. "IEC-SI" or "IEEE-VI"
    multiplier : time multiplier TMS (IEC) or time dial TD (IEEE) [-]
    definite_above : GD, the end of the dependent range [multiples of pickup]; above it the time stays at t(GD).
        None: the curve applies at every multiple.

    Returns
    -------
    t : operate time [s]

    Notes
    -----
    t = TMS · [k / (M^α − 1) + c].

    References
    ----------
    IEC 60255-151:2009, dependent-time characteristics and constants; IEEE Std C37.112-2018, equation (1) and
    table 1. Check values METHODS.md §1.4.

    Examples
    --------
    >>> round(inverse_operate_time(10.0, "IEC-SI", 1.0), 3)   # METHODS.md §1.4
    2.971
    >>> round(inverse_operate_time(3.0, "IEEE-VI", 5.0), 2)   # METHODS.md §1.4
    14.71
    """
    c = curve_constants(curve)
    _check_multiple(multiple, above=True)
    if not math.isfinite(multiplier) or multiplier <= 0.0:
        raise InputError("multiplier", f"expected a positive time multiplier, got {multiplier!r}")
    if definite_above is not None and multiple > definite_above:
        multiple = definite_above
    return multiplier * _base_time(multiple, c)


def inverse_reset_time(multiple: float, curve: str, multiplier: float) -> float:
    """Dependent (disc-emulating) reset time from full travel at a current below pickup [s].

    Parameters
    ----------
    multiple : M = I / I_s, current in multiples of pickup [-], 0 ≤ M < 1
    curve : a key of :data:`CURVES` whose curve has a reset constant (the IEEE curves)
    multiplier : time dial TD [-]

    Returns
    -------
    tr : reset time [s]

    Notes
    -----
    tr(M) = TD · tr / (1 − M²). C37.112 uses the exponent 2 for every curve (not p); METHODS.md §1.2 shows how far
    apart the two choices are for the moderately inverse curve.

    References
    ----------
    IEEE Std C37.112-2018, equation (2) and table 1. Check values METHODS.md §1.4.

    Examples
    --------
    >>> round(inverse_reset_time(0.5, "IEEE-MI", 1.0), 3)     # METHODS.md §1.4
    6.467
    >>> round(inverse_reset_time(0.9, "IEEE-EI", 1.0), 1)     # METHODS.md §1.4
    153.2
    """
    c = curve_constants(curve)
    if c.reset is None:
        raise InputError("curve", f"expected a curve with a dependent reset (IEEE-MI, IEEE-VI, IEEE-EI), "
                                  f"got {curve!r}")
    _check_multiple(multiple, above=False)
    if not math.isfinite(multiplier) or multiplier <= 0.0:
        raise InputError("multiplier", f"expected a positive time dial, got {multiplier!r}")
    return multiplier * c.reset / (1.0 - multiple ** 2)


def time_multiplier_for(target_time: float, multiple: float, curve: str) -> float:
    """The time multiplier (TMS or TD) that makes the element operate in ``target_time`` at ``multiple`` [-].

    Parameters
    ----------
    target_time : wanted operate time [s], positive
    multiple : M = I / I_s [-], above 1
    curve : a key of :data:`CURVES`

    Returns
    -------
    TMS : time multiplier [-]

    Notes
    -----
    TMS = t_target / [k / (M^α − 1) + c].

    References
    ----------
    IEC 60255-151:2009; IEEE Std C37.112-2018. Check value METHODS.md §1.4 (TMS for IEC SI, 0.5 s at M = 8).

    Examples
    --------
    >>> round(time_multiplier_for(0.5, 8.0, "IEC-SI"), 4)     # METHODS.md §1.4
    0.1517
    """
    c = curve_constants(curve)
    _check_multiple(multiple, above=True)
    if not math.isfinite(target_time) or target_time <= 0.0:
        raise InputError("target_time", f"expected a positive operate time, got {target_time!r}")
    return target_time / _base_time(multiple, c)
