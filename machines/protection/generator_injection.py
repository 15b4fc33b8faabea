"""The three-phase injections of generator test points: power, impedance and restraint-voltage tests as phasors.

Every generator test point that is not a plain balanced current carries its phasors explicitly, relay-side
(CT and VT secondary), so that a test set can play it and a reviewer can check it against every stage of the
function (see :class:`machines.record.TestPoint`).

Methods: machines/METHODS.md §12.1 (test points).
"""

from __future__ import annotations

import cmath
import math

from machines.protection.base import balanced, phasor

#: the largest voltage an impedance test applies, pu of rated (a fault or loss-of-field condition, not overvoltage)
IMPEDANCE_TEST_VOLTAGE = 0.9


def hold_time(*delays: float) -> float:
    """How long a must-not-operate injection is held: twice the longest delay it could run out, at least 1 s [s].

    >>> hold_time(0.5, 3.0)
    6.0
    """
    return max(1.0, 2.0 * max(delays, default=0.0))


def power_phasors(p_secondary: float, q_secondary: float, v_secondary: float) -> tuple[list[dict], list[dict]]:
    """Balanced phase currents and voltages for a three-phase output P + jQ (generator convention: positive P is
    exported) at the phase-to-neutral voltage ``v_secondary``: (currents, voltages), relay-side.

    Notes
    -----
    Per phase S = (P + jQ)/3 = V·I*, so I = conj(S / V).

    >>> i, v = power_phasors(-30.0, 0.0, 100.0)   # 30 W reverse at 100 V: 0.1 A at 180°
    >>> round(i[0]["magnitude"], 6), i[0]["angle"], v[0]["magnitude"]
    (0.1, 180.0, 100.0)
    """
    s = complex(p_secondary, q_secondary) / 3.0
    i = (s / v_secondary).conjugate()
    angle = math.degrees(cmath.phase(i)) if abs(i) > 0 else 0.0
    return balanced(abs(i), _wrap(angle)), balanced(v_secondary)


def impedance_phasors(z_secondary: complex, v_rated_secondary: float,
                      i_rated_secondary: float) -> tuple[list[dict], list[dict]]:
    """Balanced currents and voltages whose ratio V/I (positive sequence) is ``z_secondary`` [ohm, relay-side]:
    rated current where the voltage stays at or below 0.9 pu, else 0.9 pu voltage and the current it gives.

    >>> i, v = impedance_phasors(complex(0.0, -20.0), 69.28, 5.0)   # −j20 Ω: 62.35 V would need 3.12 A
    >>> round(v[0]["magnitude"], 2), round(i[0]["magnitude"], 4), i[0]["angle"]
    (62.35, 3.1176, 90.0)
    """
    zmag = abs(z_secondary)
    current = i_rated_secondary
    voltage = zmag * current
    if voltage > IMPEDANCE_TEST_VOLTAGE * v_rated_secondary:
        voltage = IMPEDANCE_TEST_VOLTAGE * v_rated_secondary
        current = voltage / zmag
    angle = -math.degrees(cmath.phase(z_secondary))
    return balanced(current, _wrap(angle)), balanced(voltage)


def one_phase_lost(v_secondary: float, phase: int = 0) -> list[dict]:
    """Balanced phase-to-neutral voltages with one phase (A by default) at zero: a blown VT fuse.

    >>> [p["magnitude"] for p in one_phase_lost(63.5)]
    [0.0, 63.5, 63.5]
    """
    out = balanced(v_secondary)
    out[phase] = phasor(0.0)
    return out


def zeros() -> list[dict]:
    """Three zero phasors (a de-energised machine)."""
    return [phasor(0.0), phasor(0.0), phasor(0.0)]


def _wrap(angle: float) -> float:
    a = (angle + 180.0) % 360.0 - 180.0
    return 180.0 if a == -180.0 else round(a, 9)
