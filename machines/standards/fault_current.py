"""Short-circuit currents at a bus: three-phase from the fault level, phase-to-phase, first-cycle asymmetry.

Methods: machines/METHODS.md §4 (short circuit; 4.1 the equations, 4.2 check values).
"""

from __future__ import annotations

import math

FULL_OFFSET_RMS_FACTOR = math.sqrt(3.0)  #: first-cycle rms of a fully offset wave / symmetrical rms (no decay) [-]
FULL_OFFSET_PEAK_FACTOR = 2.0 * math.sqrt(2.0)  #: peak of a fully offset wave / symmetrical rms (no decay) [-]


def three_phase_fault_current(fault_level: float, line_voltage: float) -> float:
    """Symmetrical three-phase fault current from the fault level, I = S / (√3 · V) [A].

    Parameters
    ----------
    fault_level : three-phase short-circuit power [VA]
    line_voltage : nominal line-to-line voltage [V]

    References
    ----------
    IEC 60909-0 definition of short-circuit power S = √3·U_n·I_k.

    Examples
    --------
    >>> round(three_phase_fault_current(250e6, 4160.0), 0)
    34697.0
    """
    return fault_level / (math.sqrt(3.0) * line_voltage)


def source_impedance_from_fault_level(fault_level: float, line_voltage: float) -> float:
    """Source (Thevenin) impedance per phase behind a bus, Z = V² / S [Ω].

    Examples
    --------
    >>> round(source_impedance_from_fault_level(250e6, 4160.0), 5)
    0.06922
    """
    return line_voltage ** 2 / fault_level


def three_phase_fault_current_from_impedance(source_impedance: float, line_voltage: float) -> float:
    """Three-phase bolted fault current behind a source impedance, I = V / (√3 · Z) [A].

    Examples
    --------
    >>> round(three_phase_fault_current_from_impedance(0.06922, 4160.0), -1)
    34700.0
    """
    return line_voltage / (math.sqrt(3.0) * source_impedance)


def phase_to_phase_fault_current(three_phase_current: float) -> float:
    """Bolted phase-to-phase fault current, √3/2 of the three-phase current (Z2 = Z1) [A].

    References
    ----------
    Symmetrical components, line-to-line fault with equal positive and negative impedances. METHODS.md §4.1.

    Examples
    --------
    >>> round(phase_to_phase_fault_current(8000.0), 0)   # METHODS.md §4.2: 8 kA → 6928 A
    6928.0
    """
    return math.sqrt(3.0) / 2.0 * three_phase_current


def asymmetrical_rms_factor(x_over_r: float, time: float, frequency: float) -> float:
    """Ratio of asymmetrical to symmetrical rms current at ``time`` after a fully offset inception [-].

    Notes
    -----
    k = √(1 + 2·e^(−2ωt/(X/R))) (decaying DC component over the symmetrical rms).

    References
    ----------
    IEEE Std C37.010 / IEC 60909-0 asymmetry of short-circuit current; METHODS.md §4.2 (X/R 10, t = 1/120 s → 1.438).

    Examples
    --------
    >>> round(asymmetrical_rms_factor(10.0, 1 / 120, 60.0), 3)
    1.438
    """
    return math.sqrt(1.0 + 2.0 * math.exp(-2.0 * 2.0 * math.pi * frequency * time / x_over_r))
