"""Unbalanced-load (negative-sequence) capability of synchronous machines: IEEE C50.12/C50.13 and IEC 60034-1.

Two numbers describe a machine: the continuous negative-sequence current I2 it carries indefinitely [pu of rated
current] and the short-time constant K = I2²·t [s] it withstands during unbalanced faults. The tables below are data
keyed by (family, rotor type); directly cooled cylindrical rotors depend on the rating by the formulas of the
standards. Every value is from memory of the standards (METHODS.md §6.1, 6.2) and is shown on the sheet as an
editable default; the maker's values in the machine file always win.

The trip characteristic of a negative-sequence element is t = K / I2² (METHODS.md §6.3); a terminal
phase-to-phase fault drives I2 = E / (X1 + X2).

Methods: machines/METHODS.md §6 (generator negative sequence; 6.4 check values).
"""

from __future__ import annotations

import math

from machines.errors import InputError
from machines.frozen import frozen


@frozen
class UnbalanceCapability:
    """A machine's negative-sequence capability: continuous I2 [pu], K [s], where they came from."""

    continuous: float
    k: float
    reference: str
    note: str = ""


_C50_12 = "IEEE C50.12, permissible unbalanced currents (value from memory)"
_C50_13 = "IEEE C50.13, permissible unbalanced currents (value from memory)"
_IEC = "IEC 60034-1, table of unbalanced operating conditions (value from memory)"

#: Fixed rows: (family, rotor) → (continuous I2 [pu], K [s], reference, note). Directly cooled cylindrical rotors
#: are rating-dependent and computed by the functions below.
FIXED_ROWS: dict[tuple[str, str], tuple[float, float, str, str]] = {
    ("IEEE", "salient-with-damper"): (0.10, 40.0, _C50_12, "salient pole, connected amortisseur winding"),
    ("IEEE", "salient-without-damper"): (0.05, 40.0, _C50_12, "salient pole, non-connected amortisseur winding"),
    ("IEEE", "cylindrical-indirect"): (0.10, 30.0, _C50_13, "cylindrical rotor, indirectly cooled"),
    ("IEC", "salient-with-damper"): (0.08, 20.0, _IEC, "salient pole generator, indirectly cooled"),
    # The IEC row assumes damper windings; without them the continuous limit is cut to the IEEE C50.12 value for a
    # non-connected amortisseur (common practice, no published source) and K kept from the IEC salient row.
    ("IEC", "salient-without-damper"): (0.05, 20.0, _IEC + "; continuous I2 from IEEE C50.12 (value from memory)",
                                        "salient pole without damper winding: continuous I2 limited to 5 %"),
    # IEC gives 15 s for air-cooled and 10 s for hydrogen-cooled rotors; the machine file does not say which, so
    # the lower (hydrogen) value is taken.
    ("IEC", "cylindrical-indirect"): (0.10, 10.0, _IEC, "cylindrical rotor, indirectly cooled (K of the hydrogen-"
                                                         "cooled row, the lower of air 15 s / hydrogen 10 s)"),
}

IEEE_DIRECT_K_LIMIT = 1600e6  #: largest rating the C50.13 K formula covers [VA]
IEC_DIRECT_LIMIT = 1600e6  #: largest rating the IEC 60034-1 table covers [VA]


def c50_13_direct_k(rated_apparent_power: float) -> float:
    """K = I2²t of a directly cooled cylindrical rotor by IEEE C50.13 [s].

    Parameters
    ----------
    rated_apparent_power : S_N [VA], up to 1600 MVA

    Notes
    -----
    K = 10 up to 800 MVA; K = 10 − 0.00625·(S_N[MVA] − 800) from 801 to 1600 MVA.

    References
    ----------
    IEEE C50.13, permissible unbalanced currents (value from memory); METHODS.md §6.1, check values 6.4.

    Examples
    --------
    >>> [round(c50_13_direct_k(s * 1e6), 3) for s in (500, 800, 1000, 1200, 1600)]   # METHODS.md §6.4
    [10.0, 10.0, 8.75, 7.5, 5.0]
    """
    mva = rated_apparent_power / 1e6
    if mva > IEEE_DIRECT_K_LIMIT / 1e6:
        raise InputError("machine.negative_sequence_k", f"the IEEE C50.13 table ends at 1600 MVA, got "
                                                        f"{mva:.0f} MVA: enter the maker's I2²t value")
    return 10.0 if mva <= 800.0 else 10.0 - 0.00625 * (mva - 800.0)


def c50_13_direct_continuous(rated_apparent_power: float) -> float:
    """Continuous I2 of a directly cooled cylindrical rotor by IEEE C50.13-2005 [pu].

    Notes
    -----
    8 % up to 350 MVA; 8 − (S_N[MVA] − 350)/300 % from 351 to 1250 MVA; 5 % above.

    References
    ----------
    IEEE C50.13-2005 (a superseded edition; value from memory, lower confidence), permissible unbalanced currents;
    METHODS.md §6.1, 6.4.

    Examples
    --------
    >>> round(c50_13_direct_continuous(600e6) * 100, 3)    # METHODS.md §6.4: 7.167 %
    7.167
    >>> round(c50_13_direct_continuous(1000e6) * 100, 3)   # METHODS.md §6.4: 5.833 %
    5.833
    """
    mva = rated_apparent_power / 1e6
    if mva <= 350.0:
        return 0.08
    if mva <= 1250.0:
        return (8.0 - (mva - 350.0) / 300.0) / 100.0
    return 0.05


def iec_direct_continuous(rated_apparent_power: float) -> float:
    """Continuous I2/IN of a directly cooled cylindrical rotor by IEC 60034-1 [pu].

    Notes
    -----
    0.08 up to 350 MVA; 0.08 − (S_N − 350)/(3·10⁴) from 350 to 1250 MVA; 0.05 from 1250 to 1600 MVA.

    References
    ----------
    IEC 60034-1, table of unbalanced operating conditions (value from memory); METHODS.md §6.2, 6.4.

    Examples
    --------
    >>> [round(iec_direct_continuous(s * 1e6), 5) for s in (300, 600, 900, 1250)]   # METHODS.md §6.4
    [0.08, 0.07167, 0.06167, 0.05]
    """
    mva = rated_apparent_power / 1e6
    if mva > IEC_DIRECT_LIMIT / 1e6:
        raise InputError("machine.negative_sequence_continuous", f"the IEC 60034-1 table ends at 1600 MVA, got "
                                                                 f"{mva:.0f} MVA: enter the maker's value")
    if mva <= 350.0:
        return 0.08
    if mva <= 1250.0:
        return 0.08 - (mva - 350.0) / 3e4
    return 0.05


def iec_direct_k(rated_apparent_power: float) -> float:
    """(I2/IN)²·t of a directly cooled cylindrical rotor by IEC 60034-1 [s].

    Notes
    -----
    8 up to 350 MVA; 8 − 0.00545·(S_N − 350) from 350 to 900 MVA; 5 from 900 to 1600 MVA.

    Examples
    --------
    >>> [round(iec_direct_k(s * 1e6), 3) for s in (300, 600, 900, 1250)]   # METHODS.md §6.4
    [8.0, 6.638, 5.002, 5.0]
    """
    mva = rated_apparent_power / 1e6
    if mva > IEC_DIRECT_LIMIT / 1e6:
        raise InputError("machine.negative_sequence_k", f"the IEC 60034-1 table ends at 1600 MVA, got "
                                                        f"{mva:.0f} MVA: enter the maker's value")
    if mva <= 350.0:
        return 8.0
    if mva <= 900.0:
        return 8.0 - 0.00545 * (mva - 350.0)
    return 5.0


def table_capability(practice: str, rotor: str, rated_apparent_power: float) -> UnbalanceCapability:
    """The standard's negative-sequence capability of a machine by family, rotor type and rating.

    Parameters
    ----------
    practice : "IEEE" (C50.12 salient pole, C50.13 cylindrical rotor) or "IEC" (IEC 60034-1)
    rotor : "cylindrical-indirect", "cylindrical-direct", "salient-with-damper" or "salient-without-damper"
    rated_apparent_power : S_N [VA]

    Examples
    --------
    >>> table_capability("IEEE", "salient-with-damper", 20e6).k
    40.0
    >>> round(table_capability("IEEE", "cylindrical-direct", 1000e6).k, 3)
    8.75
    >>> table_capability("IEEE", "salient-with-damper", 0.6e6).k   # below C50.12's scope: IEC 60034-1's row
    20.0
    """
    if practice == "IEEE" and rated_apparent_power < _scope_floor(rotor):
        iec = table_capability("IEC", rotor, rated_apparent_power)
        family = "C50.12" if rotor.startswith("salient") else "C50.13"
        return UnbalanceCapability(iec.continuous, iec.k, iec.reference + f"; IEEE {family} covers machines from "
                                   f"{_scope_floor(rotor) / 1e6:g} MVA (value from memory)", iec.note)
    if rotor == "cylindrical-direct":
        if practice == "IEEE":
            return UnbalanceCapability(c50_13_direct_continuous(rated_apparent_power),
                                       c50_13_direct_k(rated_apparent_power), _C50_13 + "; continuous I2 by "
                                       "C50.13-2005, a superseded edition", "cylindrical rotor, directly cooled")
        if practice == "IEC":
            return UnbalanceCapability(iec_direct_continuous(rated_apparent_power),
                                       iec_direct_k(rated_apparent_power), _IEC, "cylindrical rotor, directly "
                                       "cooled")
    row = FIXED_ROWS.get((practice, rotor))
    if row is None:
        raise InputError("machine.rotor", f"expected a rotor type of the {practice} unbalance table "
                                          f"({', '.join(sorted({r for p, r in FIXED_ROWS if p == practice}))}, "
                                          f"cylindrical-direct), got {rotor!r}")
    return UnbalanceCapability(*row)


#: Smallest ratings IEEE C50.12 (salient pole, for hydraulic turbines) and C50.13 (cylindrical rotor) cover [VA]
#: (values from memory); below them the IEC 60034-1 table, which has no lower limit, is used.
C50_12_SMALLEST = 5e6
C50_13_SMALLEST = 10e6


def _scope_floor(rotor: str) -> float:
    return C50_12_SMALLEST if rotor.startswith("salient") else C50_13_SMALLEST


def negative_sequence_trip_time(negative_sequence_current: float, k: float) -> float:
    """Time for which a machine tolerates a negative-sequence current, t = K / I2² [s].

    Parameters
    ----------
    negative_sequence_current : I2 [pu of rated current], positive
    k : K = I2²·t [s]

    References
    ----------
    IEEE C50.13 and IEC 60034-1 (the I2²t criterion); METHODS.md §6.3, check values 6.4.

    Examples
    --------
    >>> [round(negative_sequence_trip_time(i2, k), 1) for i2, k in ((0.3, 10), (0.5, 30), (0.2, 8.75))]
    [111.1, 120.0, 218.7]
    """
    if not (math.isfinite(negative_sequence_current) and negative_sequence_current > 0.0):
        raise InputError("negative_sequence_current", f"expected a positive I2, got {negative_sequence_current!r}")
    return k / negative_sequence_current ** 2


def phase_phase_fault_negative_sequence(emf: float, x1: float, x2: float) -> float:
    """Negative-sequence current of a bolted terminal phase-to-phase fault, I2 = E / (X1 + X2) [pu].

    Parameters
    ----------
    emf : internal voltage E behind X1 [pu]
    x1 : positive-sequence reactance [pu], X''d for the first cycles
    x2 : negative-sequence reactance [pu]

    References
    ----------
    Symmetrical components, phase-to-phase fault (any power-systems text); METHODS.md §6.4.

    Examples
    --------
    >>> phase_phase_fault_negative_sequence(1.0, 0.2, 0.2)   # METHODS.md §6.4
    2.5
    """
    return emf / (x1 + x2)
