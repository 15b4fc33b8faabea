"""Operate-time accuracy bands for commissioning tests (IEC 60255-151 / IEC 60255-127 template).

IEC 60255-151 and IEC 60255-127 let the relay maker declare an assigned error for operate time as "± x % of the
theoretical time or ± y ms, whichever is greater". relaywright uses that template with x = 5 % and y = 30 ms unless
the engineer gives the maker's figures (METHODS.md §12.2); the rule is printed beside every test point.

Methods: machines/METHODS.md §12 (test tolerances; 12.2 the rule, 12.3 check values).
"""

from __future__ import annotations

DEFAULT_TIME_ERROR = 0.05  #: assigned time error, fraction [-] (typical maker declaration; common practice)
DEFAULT_TIME_FLOOR = 0.030  #: fixed minimum time error [s] (typical maker declaration; common practice)


def operate_time_tolerance(expected_time: float, assigned_error: float = DEFAULT_TIME_ERROR,
                           minimum_error: float = DEFAULT_TIME_FLOOR) -> float:
    """Half-width of the accepted operate-time band, max(ε·t, t_min) [s].

    Parameters
    ----------
    expected_time : theoretical operate time t [s]
    assigned_error : ε, the declared relative error [-]
    minimum_error : t_min, the declared fixed error [s]

    References
    ----------
    IEC 60255-151:2009, accuracy of dependent-time operation (template "± x % or ± y ms, whichever is greater");
    IEC 60255-127:2010, same template for definite time. METHODS.md §12.2, 12.3.

    Examples
    --------
    >>> round(operate_time_tolerance(2.006), 4)   # METHODS.md §12.3: 1.906 – 2.106 s
    0.1003
    >>> operate_time_tolerance(0.2)
    0.03
    """
    return max(assigned_error * expected_time, minimum_error)


def tolerance_rule_text(assigned_error: float = DEFAULT_TIME_ERROR,
                        minimum_error: float = DEFAULT_TIME_FLOOR) -> str:
    """The tolerance rule as printed on the sheet."""
    return f"±{assigned_error:.0%} or ±{minimum_error * 1e3:.0f} ms, whichever is greater (IEC 60255-151 template)"
