"""Unbalance of a three-phase motor supply: symmetrical components, negative-sequence heating weight, I2 limits.

The voltage unbalance factor V2/V1 (IEC 60034-1 style) sits beside the NEMA percent definition in
``machines.standards.nema``. The rotor heating weight K turns the two sequence currents into one equivalent heating
current I_eq² = I1² + K·I2², which is what biases a thermal replica for unbalance.

Methods: machines/METHODS.md §5 (unbalance; 5.1 definitions, 5.3–5.4 heating and limits, 5.5 check values).
"""

from __future__ import annotations

import cmath
import math

A = cmath.exp(2j * math.pi / 3.0)  #: the operator a = 1∠120°


def sequence_components(x_a: complex, x_b: complex, x_c: complex) -> tuple[complex, complex, complex]:
    """Zero, positive and negative sequence phasors (X0, X1, X2) of three phase phasors [same unit].

    Notes
    -----
    X0 = (Xa + Xb + Xc)/3, X1 = (Xa + a·Xb + a²·Xc)/3, X2 = (Xa + a²·Xb + a·Xc)/3 (Fortescue, 1918).

    Examples
    --------
    >>> x0, x1, x2 = sequence_components(0, 1, -1)   # one line open (METHODS.md §5.5: I1 = I2 = 0.5774)
    >>> round(abs(x1), 4), round(abs(x2), 4)
    (0.5774, 0.5774)
    """
    return ((x_a + x_b + x_c) / 3.0, (x_a + A * x_b + A * A * x_c) / 3.0, (x_a + A * A * x_b + A * x_c) / 3.0)


def voltage_unbalance_factor(v_ab: float, v_bc: float, v_ca: float) -> float:
    """Negative- over positive-sequence voltage |V2|/|V1| from three line-voltage magnitudes [-].

    Notes
    -----
    Line voltages close a triangle (Vab + Vbc + Vca = 0), so three magnitudes fix the phasors up to rotation; the
    angles come from the law of cosines and the positive sequence is the larger of the two sequences.

    References
    ----------
    IEC 60034-1 (negative-sequence voltage component); METHODS.md §5.1, 5.5.

    Examples
    --------
    >>> round(100 * voltage_unbalance_factor(462.0, 463.0, 455.0), 3)   # METHODS.md §5.5: 1.091 %
    1.091
    >>> round(100 * voltage_unbalance_factor(4160.0, 4160.0, 4000.0), 3)   # METHODS.md §5.5: 2.581 %
    2.581
    """
    a, b, c = v_ab, v_bc, v_ca
    cos_c = (a * a + b * b - c * c) / (2.0 * a * b)  # angle between the sides Vab and Vbc of the triangle
    if not -1.0 <= cos_c <= 1.0:
        raise ValueError("the three line voltages do not close a triangle")
    ab = complex(a, 0.0)
    bc = cmath.rect(b, math.pi - math.acos(cos_c))  # head-to-tail: Vbc turns by the exterior angle
    ca = -(ab + bc)
    _, x1, x2 = sequence_components(ab, bc, ca)
    big, small = max(abs(x1), abs(x2)), min(abs(x1), abs(x2))
    return small / big


def negative_sequence_current_ratio(voltage_unbalance: float, locked_rotor_current: float) -> float:
    """I2/I1 a motor draws for a voltage unbalance V2/V1 [-]: its negative-sequence impedance ≈ 1/I_LR pu.

    Parameters
    ----------
    voltage_unbalance : V2/V1 [-]
    locked_rotor_current : I_LR [pu of rated current]

    References
    ----------
    METHODS.md §5.3 [D] (Z2 ≈ locked-rotor impedance).

    Examples
    --------
    >>> round(negative_sequence_current_ratio(0.02, 6.0), 3)   # METHODS.md §5.5: ≈ 12 %
    0.12
    """
    return locked_rotor_current * voltage_unbalance


def heating_weight_from_rotor_resistance(locked_rotor_torque: float, rated_slip: float,
                                         locked_rotor_current: float) -> float:
    """Negative-sequence heating weight K = R_r(2 − s) / R_r(s) ≈ T_LR / (s_FL · I_LR²) [-] (all pu).

    Notes
    -----
    Air-gap torque T = I_r²·R_r/s (pu): at rated load R_r1 ≈ s_FL; at standstill R_rLR = T_LR / I_LR². Negative
    sequence rotor current is at ≈ 2f, where the rotor resistance is about its locked-rotor value.

    References
    ----------
    METHODS.md §5.3 [D].

    Examples
    --------
    >>> round(heating_weight_from_rotor_resistance(1.75, 0.01, 6.0), 3)   # METHODS.md §5.5: 4.861
    4.861
    >>> round(heating_weight_from_rotor_resistance(1.5, 0.008, 6.5), 3)   # METHODS.md §5.5: 4.438
    4.438
    """
    return locked_rotor_torque / (rated_slip * locked_rotor_current ** 2)


def heating_weight_175_rule(locked_rotor_current: float) -> float:
    """The rule of thumb K ≈ 175 / I_LR² [-] (T_LR/s_FL ≈ 175); less conservative than the NEMA derating curve.

    References
    ----------
    METHODS.md §5.3 [F-v]: found in maker literature only, no standard prescribes it.

    Examples
    --------
    >>> round(heating_weight_175_rule(6.0), 3)   # METHODS.md §5.5: 4.861
    4.861
    """
    return 175.0 / locked_rotor_current ** 2


def equivalent_heating_current(positive_sequence: float, negative_sequence: float, heating_weight: float) -> float:
    """Equivalent heating current I_eq = √(I1² + K·I2²) [same unit as the inputs].

    References
    ----------
    METHODS.md §2.4, 5.3.

    Examples
    --------
    >>> round(equivalent_heating_current(1.0, 0.1, 6.0), 3)   # METHODS.md §5.5: 1.030
    1.03
    """
    return math.sqrt(positive_sequence ** 2 + heating_weight * negative_sequence ** 2)


def derating_from_heating_weight(heating_weight: float, locked_rotor_current: float,
                                 voltage_unbalance: float) -> float:
    """Load a motor can carry with unbalance so that I_eq = 1, d = 1/√(1 + K·(I_LR·u)²) [pu].

    References
    ----------
    METHODS.md §5.3 [D].

    Examples
    --------
    >>> round(derating_from_heating_weight(175 / 36, 6.0, 0.02), 4)   # METHODS.md §5.5: 0.9667
    0.9667
    """
    return 1.0 / math.sqrt(1.0 + heating_weight * (locked_rotor_current * voltage_unbalance) ** 2)


def adiabatic_negative_sequence_constant(locked_rotor_current: float, stall_time_cold: float) -> float:
    """Rotor-limited I2²t constant K2 ≈ I_LR² · t_sc [pu²·s] when the maker gives none.

    Notes
    -----
    The rotor survives I_LR in about its locked-rotor resistance for t_sc; negative-sequence current flows in about
    the same resistance, so equal heat gives I2²·t = I_LR²·t_sc. Ignores cooling, so it is conservative.

    References
    ----------
    METHODS.md §5.4 [D].

    Examples
    --------
    >>> adiabatic_negative_sequence_constant(6.0, 15.0)   # METHODS.md §5.5: 540.0 s
    540.0
    """
    return locked_rotor_current ** 2 * stall_time_cold


#: IEC 60034-26 derating of a cage motor against the negative-sequence voltage V2/V1 [%], digitised from its figure
#: [value from memory: check against the standard before relying on a figure between the points]
IEC_60034_26_DERATING: tuple[tuple[float, float], ...] = (
    (0.0, 1.00), (0.5, 1.00), (1.0, 0.99), (1.5, 0.975), (2.0, 0.96), (2.5, 0.935), (3.0, 0.91), (3.5, 0.88),
    (4.0, 0.85), (4.5, 0.82), (5.0, 0.79),
)


def iec_unbalance_derating_factor(negative_sequence_percent: float) -> float:
    """Derating factor of a cage motor for a negative-sequence voltage V2/V1 [%], linear between the points of
    :data:`IEC_60034_26_DERATING` [-].

    Raises
    ------
    ValueError
        outside 0–5 %.

    References
    ----------
    IEC 60034-26:2006, effects of unbalanced voltages on the performance of three-phase cage induction motors,
    derating figure [digitised from memory]. METHODS.md §5.2.

    Examples
    --------
    >>> iec_unbalance_derating_factor(2.0)
    0.96
    >>> round(iec_unbalance_derating_factor(2.25), 4)
    0.9475
    """
    pts = IEC_60034_26_DERATING
    if not 0.0 <= negative_sequence_percent <= pts[-1][0]:
        raise ValueError(f"expected a negative-sequence voltage from 0 to 5 %, got {negative_sequence_percent!r} %")
    for (x0, y0), (x1, y1) in zip(pts, pts[1:]):
        if negative_sequence_percent <= x1:
            return y0 + (y1 - y0) * (negative_sequence_percent - x0) / (x1 - x0)
    return pts[-1][1]  # pragma: no cover
