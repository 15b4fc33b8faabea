"""The impedance plane of a generator and its system: reactances on the machine base, mho elements, the swing's
electrical centre and the out-of-step blinders, and the current of an inadvertent energisation.

Equations only, no policy. Reactances are per unit on the generator's rating; impedances seen at the generator
terminals (R, X), with the generator behind the origin on −X and the system on +X (METHODS.md §9.7).

Methods: machines/METHODS.md §9 (the system seen from the terminals), §9.7 (electrical centre and blinders), §9.8
(energising current), §9.12 (mho reach).
"""

from __future__ import annotations

import math

from machines.errors import InputError


def _positive(name: str, value: float) -> None:
    if not (isinstance(value, (int, float)) and math.isfinite(value) and value > 0.0):
        raise InputError(name, f"expected a positive finite number, got {value!r}")


def rebase_impedance(impedance_pu: float, from_rating: float, to_rating: float) -> float:
    """A per-unit impedance moved from one power base to another at the same voltage, z·S_to / S_from [pu].

    References
    ----------
    Change of base of per-unit impedances (any power-systems text, e.g. Grainger & Stevenson, ch. 1).

    Examples
    --------
    >>> round(rebase_impedance(0.08, 6.5e6, 5.625e6), 5)   # an 8 % 6.5 MVA transformer on a 5.625 MVA base
    0.06923
    """
    _positive("from_rating", from_rating)
    _positive("to_rating", to_rating)
    return impedance_pu * to_rating / from_rating


def external_reactance(rated_apparent_power: float, fault_level: float) -> float:
    """Reactance of the system seen from the machine's terminals, X_e = S_machine / S_fault [pu, machine base].

    Parameters
    ----------
    rated_apparent_power : the generator's rating [VA]
    fault_level : three-phase fault level the system alone contributes at the terminals [VA]

    References
    ----------
    Thevenin equivalent of the system from its short-circuit power, X = V²/S_sc (IEC 60909-0 definition).

    Examples
    --------
    >>> external_reactance(100e6, 1500e6)
    0.06666666666666667
    """
    _positive("fault_level", fault_level)
    return rated_apparent_power / fault_level


def electrical_centre(xd_transient: float, x_external: float) -> float:
    """Where a swing between two equal EMFs crosses the impedance axis, seen from the terminals [pu, +X toward the
    system]: (X_e − X'd) / 2.

    Notes
    -----
    With equal EMFs behind −jX'd (generator) and +jX_e (system), the locus of the impedance seen at the terminals
    during a swing is the perpendicular bisector of the segment between them; it crosses the axis at its midpoint.
    Negative: inside the generator; between 0 and X_T: inside the step-up transformer.

    References
    ----------
    Two-source equivalent of a power swing (e.g. P. Kundur, Power System Stability and Control, 1994, chapter on
    out-of-step relaying, section from memory; IEEE C37.102, out-of-step protection; derived). METHODS.md §9.7.

    Examples
    --------
    >>> round(electrical_centre(0.3, 0.1), 6)   # strong system: the centre is in the generator
    -0.1
    """
    return (x_external - xd_transient) / 2.0


def blinder_distance(xd_transient: float, x_external: float, separation: float = 120.0) -> float:
    """Distance of the out-of-step blinders from the impedance axis so that they are crossed at the angle
    ``separation`` between the EMFs, d = (X'd + X_e)/2 · tan(90° − δ/2) [pu].

    References
    ----------
    IEEE C37.102, single-blinder out-of-step scheme (construction from memory; the geometry is derived from the
    two-source swing locus); METHODS.md §9.7.

    Examples
    --------
    >>> round(blinder_distance(0.3, 0.2), 4)   # (0.5/2)·tan 30°
    0.1443
    """
    if not 0.0 < separation < 180.0:
        raise InputError("separation", f"expected an angle between 0 and 180 degrees, got {separation!r}")
    return (xd_transient + x_external) / 2.0 * math.tan(math.radians(90.0 - separation / 2.0))


def mho_reach_at_angle(diameter: float, characteristic_angle: float, angle: float) -> float:
    """Reach of a mho circle through the origin along ``angle``, D·cos(φ_c − φ) [same unit as D; 0 behind it].

    Examples
    --------
    >>> round(mho_reach_at_angle(10.0, 85.0, 25.8), 3)   # the reach along a 0.9 power-factor load
    5.12
    """
    return max(0.0, diameter * math.cos(math.radians(characteristic_angle - angle)))


def mho_circle(diameter: float, characteristic_angle: float) -> tuple[tuple[float, float], float]:
    """Centre (R, X) and radius of a mho circle through the origin with its diameter along the angle [same unit].

    >>> c, r = mho_circle(2.0, 90.0)
    >>> (round(c[0], 9), c[1], r)
    (0.0, 1.0, 1.0)
    """
    a = math.radians(characteristic_angle)
    return (diameter / 2.0 * math.cos(a), diameter / 2.0 * math.sin(a)), diameter / 2.0


def energising_current(x2: float, x_external: float, emf: float = 1.0) -> float:
    """Current of a generator energised from the system at standstill or turning gear, I = E / (X2 + X_e) [pu].

    Notes
    -----
    At standstill the machine's impedance during the first seconds of an inadvertent energisation is about its
    negative-sequence reactance X2 (the rotor behaves like that of an induction motor at slip 1); the system,
    including any step-up transformer, is behind X_e.

    References
    ----------
    IEEE C37.102, inadvertent energising (method from memory); METHODS.md §9.8.

    Examples
    --------
    >>> round(energising_current(0.2, 0.25), 4)
    2.2222
    """
    _positive("x2 + x_external", x2 + x_external)
    return emf / (x2 + x_external)
