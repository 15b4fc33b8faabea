"""Neutral grounding and stator earth faults: charging current, resistor sizing, fault current, 59N coverage.

Equations for a high-resistance grounded machine (a grounding resistor, often on the secondary of a distribution
transformer in the neutral), METHODS.md §7.1::

    X_C0   = 1 / (ω·C0)                     C0 per phase to ground of everything galvanically connected
    3·I_C0 = 3·ω·C0·V_LN                    capacitive current of a bolted terminal earth fault
    R_N   ≤ X_C0 / 3                        resistive current at least the capacitive current
    R_sec = R_N / N²                        N = grounding-transformer ratio
    I_R   = V_LN / R_N;   I_f = |I_R + j·3·I_C0|;   P_R = V_LN · I_R

A fault at a fraction x of the winding from the neutral drives the neutral to x·V_LN, so a neutral overvoltage
element picked up at (1 − c)·V_LN covers the fraction c of the winding measured from the terminals.

Methods: machines/METHODS.md §7 (stator earth fault; 7.1 the equations, 7.3 check values).
"""

from __future__ import annotations

import math

from machines.errors import InputError

SQRT3 = math.sqrt(3.0)


def _positive(name: str, value: float) -> None:
    if not (isinstance(value, (int, float)) and math.isfinite(value) and value > 0.0):
        raise InputError(name, f"expected a positive finite number, got {value!r}")


def capacitive_reactance(capacitance_per_phase: float, frequency: float) -> float:
    """Zero-sequence capacitive reactance per phase, X_C0 = 1 / (2π·f·C0) [ohm].

    Parameters
    ----------
    capacitance_per_phase : C0, phase-to-ground capacitance per phase [F]
    frequency : system frequency f [Hz]

    References
    ----------
    IEEE C62.92.2 (generator grounding); METHODS.md §7.1, check value 7.3.

    Examples
    --------
    >>> round(capacitive_reactance(0.25e-6, 60.0))   # METHODS.md §7.3
    10610
    """
    _positive("capacitance_per_phase", capacitance_per_phase)
    _positive("frequency", frequency)
    return 1.0 / (2.0 * math.pi * frequency * capacitance_per_phase)


def charging_current(capacitance_per_phase: float, line_voltage: float, frequency: float) -> float:
    """Capacitive earth-fault current of a bolted phase-to-ground fault, 3·I_C0 = 3·ω·C0·V_LN [A].

    Parameters
    ----------
    capacitance_per_phase : C0, phase-to-ground capacitance per phase [F]
    line_voltage : phase-to-phase voltage V_LL [V]; V_LN = V_LL/√3
    frequency : f [Hz]

    Returns
    -------
    3·I_C0 : the charging current that flows into the fault [A]

    References
    ----------
    IEEE C62.92.2; IEEE C37.101; METHODS.md §7.1, check values 7.3.

    Examples
    --------
    >>> round(charging_current(0.25e-6, 18e3, 60.0), 3)   # METHODS.md §7.3
    2.938
    """
    _positive("line_voltage", line_voltage)
    return 3.0 * (line_voltage / SQRT3) / capacitive_reactance(capacitance_per_phase, frequency)


def neutral_resistance_limit(capacitance_per_phase: float, frequency: float) -> float:
    """Largest primary-referred neutral resistance that keeps I_R ≥ 3·I_C0, R_N = X_C0 / 3 [ohm].

    Notes
    -----
    R_N ≤ X_C0 / 3, the usual criterion for limiting transient overvoltages on arcing faults to about 2.5 pu.

    References
    ----------
    IEEE C62.92.2; IEEE/IAS working group on grounding of multiple generator installations (value from memory);
    METHODS.md §7.1, check value 7.3.

    Examples
    --------
    >>> round(neutral_resistance_limit(0.25e-6, 60.0))   # METHODS.md §7.3
    3537
    """
    return capacitive_reactance(capacitance_per_phase, frequency) / 3.0


def reflected_secondary_resistance(primary_resistance: float, turns_ratio: float) -> float:
    """Resistor on the grounding transformer's secondary that appears as R_N in the neutral, R_N / N² [ohm].

    Parameters
    ----------
    primary_resistance : R_N, the resistance wanted in the neutral [ohm]
    turns_ratio : N = V_primary / V_secondary of the distribution transformer [-]

    Examples
    --------
    >>> round(reflected_secondary_resistance(3537.0, 18000 / 240), 4)   # METHODS.md §7.3
    0.6288
    """
    _positive("primary_resistance", primary_resistance)
    _positive("turns_ratio", turns_ratio)
    return primary_resistance / turns_ratio ** 2


def primary_resistance(secondary_resistance: float, turns_ratio: float) -> float:
    """Neutral resistance seen in the primary of a resistor on the transformer's secondary, R·N² [ohm].

    >>> round(primary_resistance(0.6288, 75.0))
    3537
    """
    _positive("secondary_resistance", secondary_resistance)
    _positive("turns_ratio", turns_ratio)
    return secondary_resistance * turns_ratio ** 2


def resistor_current(line_voltage: float, neutral_resistance: float) -> float:
    """Resistive earth-fault current for a terminal fault, I_R = V_LN / R_N [A, primary].

    Examples
    --------
    >>> round(resistor_current(18e3, 3536.8), 3)   # METHODS.md §7.3
    2.938
    """
    _positive("line_voltage", line_voltage)
    _positive("neutral_resistance", neutral_resistance)
    return line_voltage / SQRT3 / neutral_resistance


def earth_fault_current(resistor_current_a: float, charging_current_a: float) -> float:
    """Total terminal earth-fault current, I_f = |I_R + j·3·I_C0| [A].

    Examples
    --------
    >>> round(earth_fault_current(2.938, 2.938), 3)   # METHODS.md §7.3
    4.155
    """
    return math.hypot(resistor_current_a, charging_current_a)


def resistor_power(line_voltage: float, resistor_current_a: float) -> float:
    """Power in the grounding resistor during a terminal fault, P_R = V_LN · I_R [W].

    Examples
    --------
    >>> round(resistor_power(18e3, 2.938) / 1e3, 2)   # METHODS.md §7.3
    30.54
    """
    return line_voltage / SQRT3 * resistor_current_a


def neutral_voltage_for_fault(line_voltage: float, distance_from_neutral: float) -> float:
    """Fundamental neutral voltage for an earth fault at a fraction x of the winding from the neutral, x·V_LN [V].

    Examples
    --------
    >>> round(neutral_voltage_for_fault(18e3, 0.05) / 75.0, 3)   # METHODS.md §7.3, secondary of 18000/240
    6.928
    """
    if not 0.0 <= distance_from_neutral <= 1.0:
        raise InputError("distance_from_neutral", f"expected a fraction of the winding from 0 to 1, got "
                                                  f"{distance_from_neutral!r}")
    return distance_from_neutral * line_voltage / SQRT3


def neutral_pickup_for_coverage(line_voltage: float, coverage: float) -> float:
    """59N pickup that covers the fraction ``coverage`` of the winding from the terminals, (1 − c)·V_LN [V].

    Examples
    --------
    >>> round(neutral_pickup_for_coverage(18e3, 0.95), 1)   # METHODS.md §7.3 (5 % of 10392 V)
    519.6
    """
    if not 0.0 < coverage < 1.0:
        raise InputError("coverage", f"expected a fraction of the winding between 0 and 1, got {coverage!r}")
    return neutral_voltage_for_fault(line_voltage, 1.0 - coverage)


def coverage_for_neutral_pickup(line_voltage: float, pickup_voltage: float) -> float:
    """Fraction of the winding (from the terminals) a 59N pickup covers, 1 − V_pickup / V_LN [-].

    Examples
    --------
    >>> round(coverage_for_neutral_pickup(18e3, 519.6), 4)
    0.95
    """
    _positive("pickup_voltage", pickup_voltage)
    return max(0.0, 1.0 - pickup_voltage / (line_voltage / SQRT3))
