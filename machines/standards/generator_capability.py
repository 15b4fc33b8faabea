"""Generator capability and the geometry of generator protection elements.

Equations only, no policy: short-time armature capability (IEEE C50.13 / IEC 60034-1), volts per hertz on a
common base, base impedance and loss-of-field offset-mho circles, the sustained fault current without field forcing,
the voltage-restrained pickup of 51V, motoring power by prime mover, and the percentage-differential threshold.

Methods: machines/METHODS.md §9 (generator elements, check values 9.6) and §10 (armature capability).
"""

from __future__ import annotations

import math

from machines.errors import InputError

# ---------------------------------------------------------------------------------------------------- armature

#: IEEE C50.13 cylindrical-rotor armature short-time capability: (current [pu of rated], time [s]) (value from
#: memory); METHODS.md §10.
C50_13_ARMATURE_POINTS: tuple[tuple[float, float], ...] = ((2.26, 10.0), (1.54, 30.0), (1.30, 60.0), (1.16, 120.0))
#: IEC 60034-1 occasional excess current of AC generators ≤ 1200 MVA: 1.5 × rated current for 30 s (value from
#: memory); METHODS.md §10.
IEC_60034_ARMATURE_POINTS: tuple[tuple[float, float], ...] = ((1.5, 30.0),)
ARMATURE_POINTS = {"IEEE": C50_13_ARMATURE_POINTS, "IEC": IEC_60034_ARMATURE_POINTS}


def armature_capability_product(current: float, time: float) -> float:
    """The short-time heating product (I² − 1)·t of an armature overload [s].

    Parameters
    ----------
    current : I [pu of rated current], above 1
    time : how long the machine carries it [s]

    References
    ----------
    IEEE C50.13, armature short-time thermal capability (value from memory); METHODS.md §10 check values.

    Examples
    --------
    >>> [round(armature_capability_product(i, t), 2) for i, t in C50_13_ARMATURE_POINTS]   # METHODS.md §10
    [41.08, 41.15, 41.4, 41.47]
    >>> armature_capability_product(1.5, 30.0)   # METHODS.md §10: IEC 60034-1, 1.5 × for 30 s
    37.5
    """
    return (current * current - 1.0) * time


def armature_capability_constant(practice: str, points=None) -> float:
    """The (I² − 1)·t the short-time points allow: the smallest product of the points [s].

    ``points`` are (I [pu], t [s]) pairs; without them, the points of ``practice`` (C50.13 for IEEE, IEC 60034-1).

    >>> round(armature_capability_constant("IEEE"), 2)
    41.08
    >>> armature_capability_constant("IEC")
    37.5
    """
    if points is None:
        try:
            points = ARMATURE_POINTS[practice]
        except KeyError:
            raise InputError("study.practice", f"expected IEC or IEEE, got {practice!r}") from None
    return min(armature_capability_product(i, t) for i, t in points)


#: Scope of IEEE C50.13 (cylindrical-rotor generators from 10 MVA) [VA] (value from memory).
C50_13_SMALLEST = 10e6


def armature_points(practice: str, rotor: str, rated_apparent_power: float) -> tuple[tuple, str]:
    """The armature short-time capability points that apply to a machine, and where they come from.

    IEEE C50.13 gives the curve for cylindrical-rotor generators from 10 MVA; its curve is not applied to
    salient-pole machines. IEC 60034-1's occasional excess current (1.5 × rated for 30 s) applies to every AC
    generator up to 1200 MVA, whatever the rotor, so it is the reference wherever C50.13 does not apply
    (values and scopes from memory; METHODS.md §10).

    >>> armature_points("IEEE", "cylindrical-indirect", 100e6)[1]
    'IEEE C50.13 armature short-time capability (value from memory)'
    >>> armature_points("IEEE", "salient-with-damper", 2.5e6)[0]
    ((1.5, 30.0),)
    """
    if practice not in ARMATURE_POINTS:
        raise InputError("study.practice", f"expected IEC or IEEE, got {practice!r}")
    if practice == "IEEE" and rotor.startswith("cylindrical") and rated_apparent_power >= C50_13_SMALLEST:
        return C50_13_ARMATURE_POINTS, "IEEE C50.13 armature short-time capability (value from memory)"
    why = ("" if practice == "IEC" else
           " (the IEEE C50.13 curve is for cylindrical rotors, not salient poles)" if rotor.startswith("salient") else " (IEEE C50.13 covers cylindrical rotors from 10 MVA)")
    return IEC_60034_ARMATURE_POINTS, ("IEC 60034-1 occasional excess current, 1.5 × rated for 30 s (value from "
                                       "memory)" + why)


def armature_capability_time(current: float, constant: float) -> float:
    """Time the armature carries ``current``, t = C / (I² − 1) [s]; inf at or below rated current.

    Examples
    --------
    >>> round(armature_capability_time(2.26, 41.08), 2)
    10.0
    """
    if current <= 1.0:
        return math.inf
    return constant / (current * current - 1.0)


# ---------------------------------------------------------------------------------------------------- V/Hz


def volts_per_hertz(voltage: float, frequency: float) -> float:
    """Overexcitation V/Hz in per unit, (V/V_rated) / (f/f_rated) [pu].

    Examples
    --------
    >>> [round(volts_per_hertz(v, f), 3) for v, f in ((1.10, 0.95), (1.05, 1.0), (1.0, 0.9))]   # METHODS.md §9.6
    [1.158, 1.05, 1.111]
    """
    if frequency <= 0.0:
        raise InputError("frequency", f"expected a positive frequency, got {frequency!r}")
    return voltage / frequency


def rebase_voltage_pu(value_pu: float, from_base: float, to_base: float) -> float:
    """A per-unit voltage (or V/Hz) moved from one voltage base to another, v·V_from / V_to [pu].

    Parameters
    ----------
    value_pu : the value on ``from_base`` [pu]
    from_base, to_base : the two rated voltages [V]

    References
    ----------
    IEEE C37.102 (compare generator and step-up transformer V/Hz on a common base); METHODS.md §9.3, 9.6.

    Examples
    --------
    >>> round(rebase_voltage_pu(1.05, 13.8e3, 13.2e3), 3)   # METHODS.md §9.6
    1.098
    """
    return value_pu * from_base / to_base


# ---------------------------------------------------------------------------------------------------- impedance


def base_impedance(rated_voltage: float, rated_apparent_power: float) -> float:
    """Machine base impedance Z_b = V² / S [ohm].

    Examples
    --------
    >>> round(base_impedance(13.8e3, 100e6), 3)   # METHODS.md §9.6
    1.904
    """
    return rated_voltage ** 2 / rated_apparent_power


def secondary_ohms(primary_ohms: float, ct_factor: float, vt_factor: float) -> float:
    """Impedance seen by the relay, Z_sec = Z_pri · CTR / VTR [ohm].

    Examples
    --------
    >>> round(secondary_ohms(1.904, 1000.0, 120.0), 2)   # METHODS.md §9.6: 5000/5, 14400/120
    15.87
    """
    return primary_ohms * ct_factor / vt_factor


def offset_mho_circle(offset: float, diameter: float) -> tuple[tuple[float, float], float]:
    """Centre (R, X) and radius of an offset mho circle below the origin on the −X axis [ohm].

    Parameters
    ----------
    offset : distance from the origin to the top of the circle, positive [ohm]
    diameter : circle diameter [ohm]

    Notes
    -----
    centre = (0, −(offset + diameter/2)), radius = diameter/2; the far reach (bottom) is −(offset + diameter).

    References
    ----------
    IEEE C37.102 two-zone offset-mho loss-of-field approach (value from memory); METHODS.md §9.2.

    Examples
    --------
    >>> c, r = offset_mho_circle(1.984, 15.87)
    >>> round(c[1] - r, 2)   # METHODS.md §9.6: zone 1 far reach
    -17.85
    """
    return (0.0, -(offset + diameter / 2.0)), diameter / 2.0


def inside_circle(point: tuple[float, float], center: tuple[float, float], radius: float) -> bool:
    """Whether an impedance point (R, X) lies inside a circle.

    >>> inside_circle((0.0, -5.0), (0.0, -4.0), 2.0)
    True
    """
    return math.hypot(point[0] - center[0], point[1] - center[1]) < radius


def steady_state_stability_circle(xd: float, xs: float) -> tuple[tuple[float, float], float]:
    """Classical steady-state stability limit in the R-X plane seen at the terminals (round rotor) [pu].

    Parameters
    ----------
    xd : synchronous reactance [pu]
    xs : reactance from the terminals to the infinite bus [pu on the machine base]

    Notes
    -----
    The limit is the circle whose diameter joins +jXs and −jXd: centre (0, (Xs − Xd)/2), radius (Xs + Xd)/2.
    An approximation: it neglects saliency, resistance and the voltage regulator.

    References
    ----------
    Steady-state stability limit in the impedance plane, e.g. J. L. Blackburn, T. J. Domin, Protective Relaying:
    Principles and Applications, generator protection chapter (value from memory).

    Examples
    --------
    >>> steady_state_stability_circle(1.8, 0.2)
    ((0.0, -0.8), 1.0)
    """
    return (0.0, (xs - xd) / 2.0), (xs + xd) / 2.0


def load_impedance(active_power: float, reactive_power: float, voltage: float = 1.0) -> tuple[float, float]:
    """Impedance (R, X) seen at the terminals for an output P + jQ at voltage V: Z = V²·(P + jQ) / |S|² [pu].

    >>> load_impedance(0.8, 0.6)
    (0.8, 0.6)
    """
    s2 = active_power ** 2 + reactive_power ** 2
    return voltage ** 2 * active_power / s2, voltage ** 2 * reactive_power / s2


# ---------------------------------------------------------------------------------------------------- fault current


def sustained_fault_current(rated_current: float, xd: float, emf: float = 1.0) -> float:
    """Sustained three-phase terminal fault current without field forcing, I = E / X_d · I_rated [A].

    Examples
    --------
    >>> round(sustained_fault_current(4184.0, 1.8))   # METHODS.md §9.6
    2324
    """
    return emf / xd * rated_current


def restrained_pickup(pickup_at_rated_voltage: float, voltage: float, floor: float = 0.25) -> float:
    """Pickup of a voltage-restrained overcurrent element at a terminal voltage, I_s·max(min(V, 1), floor) [A].

    Parameters
    ----------
    pickup_at_rated_voltage : I_s at rated voltage [A]
    voltage : terminal voltage [pu]
    floor : the restraint's lower limit, fraction of I_s [-]

    References
    ----------
    Gers & Holmes, Protection of Electricity Distribution Networks (linear restraint to 25 %; section number from
    memory); METHODS.md §9.4.

    Examples
    --------
    >>> [round(restrained_pickup(6276.0, v)) for v in (1.0, 0.8, 0.4, 0.2)]   # METHODS.md §9.6
    [6276, 5021, 2510, 1569]
    """
    return pickup_at_rated_voltage * max(min(voltage, 1.0), floor)


# ---------------------------------------------------------------------------------------------------- reverse power

#: Power that motors a unit at synchronous speed with its prime mover shut down, fraction of rated kW: (lowest,
#: highest) of the range for the prime mover. IEEE C37.102, table of motoring power by prime mover (values from
#: memory): steam turbines about 1–3 %, hydraulic turbines 0.2–2 % and more, reciprocating engines 5–25 % (the
#: handbooks' diesel range), gas turbines from about 10 % (two-shaft) to 100 % (single-shaft); METHODS.md §9.1.
MOTORING_POWER: dict[str, tuple[float, float]] = {
    "steam-turbine": (0.01, 0.03),
    "hydro": (0.002, 0.02),
    "reciprocating-engine": (0.05, 0.25),
    "gas-turbine": (0.10, 1.00),
}


def motoring_power_fraction(prime_mover: str) -> tuple[float, float]:
    """(lowest, highest) motoring power of a prime mover, fraction of rated active power [-].

    References
    ----------
    IEEE C37.102, motoring power by prime mover (values from memory); METHODS.md §9.1.

    >>> motoring_power_fraction("reciprocating-engine")
    (0.05, 0.25)
    """
    try:
        return MOTORING_POWER[prime_mover]
    except KeyError:
        raise InputError("machine.prime_mover", f"expected one of {', '.join(MOTORING_POWER)}, got "
                                                f"{prime_mover!r}") from None


def secondary_power(primary_power: float, ct_factor: float, vt_factor: float) -> float:
    """Three-phase power seen by the relay, P_sec = P_pri / (CTR · VTR) [W].

    Examples
    --------
    >>> round(secondary_power(0.85e6, 1000.0, 120.0), 3)   # METHODS.md §9.6
    7.083
    """
    return primary_power / (ct_factor * vt_factor)


# ---------------------------------------------------------------------------------------------------- differential


def differential_operate_threshold(restraint_current: float, minimum_pickup: float, slope: float) -> float:
    """Operate threshold of a single-slope percentage differential, max(I_min, slope · I_restraint) [A].

    Examples
    --------
    >>> [round(differential_operate_threshold(i, 0.3, 0.10), 3) for i in (1, 5, 10, 20)]   # METHODS.md §9.6
    [0.3, 0.5, 1.0, 2.0]
    """
    return max(minimum_pickup, slope * restraint_current)
