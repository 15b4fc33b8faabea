"""NEMA motor tables: MG 1 locked-rotor code letters, voltage unbalance and its derating, MG 10 starts per hour.

Tables are data with one lookup each that raises a clear error. Sources: NEMA MG 1 10.37.2 (code letters), MG 1
14.36 / Part 20 (voltage unbalance definition, derating figure 14-1), NEMA MG 10 Table 2-3 (starts per hour), as
reproduced in the EASA Electrical Engineering Handbook and digitised for METHODS.md §2.3, 3.1 and 5.2.

Methods: machines/METHODS.md §3.1 (code letters), §5.1–5.2 (voltage unbalance and derating), §2.3 (MG 10 starts).
"""

from __future__ import annotations

import bisect
import math

HP = 745.699872  #: one mechanical horsepower [W] (550 ft·lbf/s); METHODS.md §3.4 rounds it to 746 W

#: NEMA MG 1 10.37.2: locked-rotor kVA per horsepower by code letter, (lower, upper) [kVA/hp]. Each range holds
#: its lower figure up to but not including the upper; V has no upper bound. Letters I, O and Q are not used.
CODE_LETTERS: dict[str, tuple[float, float]] = {
    "A": (0.0, 3.15), "B": (3.15, 3.55), "C": (3.55, 4.0), "D": (4.0, 4.5), "E": (4.5, 5.0), "F": (5.0, 5.6),
    "G": (5.6, 6.3), "H": (6.3, 7.1), "J": (7.1, 8.0), "K": (8.0, 9.0), "L": (9.0, 10.0), "M": (10.0, 11.2),
    "N": (11.2, 12.5), "P": (12.5, 14.0), "R": (14.0, 16.0), "S": (16.0, 18.0), "T": (18.0, 20.0),
    "U": (20.0, 22.4), "V": (22.4, math.inf),
}


def code_letter_range(letter: str) -> tuple[float, float]:
    """Locked-rotor kVA per horsepower of a NEMA code letter, (lower, upper) [kVA/hp].

    References
    ----------
    NEMA MG 1, 10.37.2 (locked-rotor indicating code letters). METHODS.md §3.1.

    Examples
    --------
    >>> code_letter_range("G")
    (5.6, 6.3)
    """
    try:
        return CODE_LETTERS[letter.strip().upper()]
    except (KeyError, AttributeError):
        raise ValueError(f"expected a NEMA MG 1 code letter A–V (not I, O, Q), got {letter!r}") from None


def code_letter_for(kva_per_hp: float) -> str:
    """The code letter whose range holds a locked-rotor kVA/hp (lower figure included, upper excluded).

    Examples
    --------
    >>> code_letter_for(3.14), code_letter_for(3.15)   # METHODS.md §3.1: 3.14 → A, 3.15 → B
    ('A', 'B')
    """
    for letter, (lo, hi) in CODE_LETTERS.items():
        if lo <= kva_per_hp < hi:
            return letter
    raise ValueError(f"expected a positive kVA/hp, got {kva_per_hp!r}")


def locked_rotor_current_from_kva(kva_per_hp: float, rated_output: float, rated_voltage: float) -> float:
    """Three-phase locked-rotor current from locked-rotor kVA per horsepower [A].

    Parameters
    ----------
    kva_per_hp : locked-rotor apparent power per horsepower [kVA/hp]
    rated_output : shaft output [W]
    rated_voltage : line-to-line voltage [V]

    Notes
    -----
    I_LR = 1000 · (kVA/hp) · hp / (√3 · V_LL), the definition of three-phase apparent power.

    References
    ----------
    NEMA MG 1 10.37.2 definition of locked-rotor kVA. METHODS.md §3.1, 3.4.

    Examples
    --------
    >>> round(locked_rotor_current_from_kva(5.6, 500 * HP, 4160.0), 1)   # METHODS.md §3.4: 388.6 A
    388.6
    """
    return 1000.0 * kva_per_hp * (rated_output / HP) / (math.sqrt(3.0) * rated_voltage)


def locked_rotor_current_range(letter: str, rated_output: float, rated_voltage: float) -> tuple[float, float]:
    """Range of locked-rotor current a code letter allows, (lower, upper) [A]; upper is ``inf`` for V.

    References
    ----------
    NEMA MG 1 10.37.2. METHODS.md §3.4.

    Examples
    --------
    >>> lo, hi = locked_rotor_current_range("G", 50 * HP, 460.0)   # METHODS.md §3.4: 351.4–395.4 A
    >>> round(lo, 1), round(hi, 1)
    (351.4, 395.4)
    """
    lo, hi = code_letter_range(letter)
    return (locked_rotor_current_from_kva(lo, rated_output, rated_voltage),
            locked_rotor_current_from_kva(hi, rated_output, rated_voltage) if math.isfinite(hi) else math.inf)


def voltage_unbalance_percent(v_ab: float, v_bc: float, v_ca: float) -> float:
    """NEMA percent voltage unbalance: 100 × largest deviation from the average / average [%].

    References
    ----------
    NEMA MG 1 14.36 (medium motors) and Part 20 (large motors). METHODS.md §5.1, 5.5.

    Examples
    --------
    >>> round(voltage_unbalance_percent(462.0, 463.0, 455.0), 3)   # METHODS.md §5.5: 1.087 %
    1.087
    """
    avg = (v_ab + v_bc + v_ca) / 3.0
    return 100.0 * max(abs(v_ab - avg), abs(v_bc - avg), abs(v_ca - avg)) / avg


#: NEMA MG 1 Fig. 14-1 derating factor against percent voltage unbalance, digitised (METHODS.md §5.2). The 1 % point
#: is where the curve starts to derate [value from memory]; MG 1 does not recommend operation above 5 %.
DERATING: tuple[tuple[float, float], ...] = (
    (0.0, 1.00), (0.5, 1.00), (1.0, 1.00), (1.5, 0.97), (2.0, 0.95), (2.5, 0.93), (3.0, 0.89), (3.5, 0.85),
    (4.0, 0.82), (4.5, 0.78), (5.0, 0.76),
)


def unbalance_derating_factor(unbalance_percent: float) -> float:
    """Motor derating factor for a NEMA percent voltage unbalance, linear between digitised points [-].

    Raises
    ------
    ValueError
        above 5 % (MG 1 does not recommend operation) or below 0.

    References
    ----------
    NEMA MG 1 Fig. 14-1, digitised; METHODS.md §5.2.

    Examples
    --------
    >>> unbalance_derating_factor(3.0)
    0.89
    >>> round(unbalance_derating_factor(2.25), 3)
    0.94
    """
    xs = [p for p, _ in DERATING]
    if not 0.0 <= unbalance_percent <= xs[-1]:
        raise ValueError(f"expected a voltage unbalance from 0 to 5 %, got {unbalance_percent!r} % (NEMA MG 1 does "
                         "not recommend operation above 5 %)")
    j = min(bisect.bisect_right(xs, unbalance_percent), len(xs) - 1)
    (x0, y0), (x1, y1) = DERATING[j - 1], DERATING[j]
    return y0 + (y1 - y0) * (unbalance_percent - x0) / (x1 - x0)


#: NEMA MG 10 Table 2-3 rows (METHODS.md §2.3, from the EASA handbook): hp → {poles: (A starts/h, B = starts/h ×
#: load WK² [lb·ft²], C minimum rest between starts [s])}. Only the rows METHODS.md §2.3 reproduces; between rows the
#: lookup interpolates linearly in hp (a reading aid, not the table).
MG10_STARTS: dict[float, dict[int, tuple[float, float, float]]] = {
    10.0: {2: (6.2, 11.0, 92.0), 4: (12.5, 51.0, 46.0), 6: (14.2, 137.0, 41.0)},
    50.0: {2: (3.4, 49.0, 145.0), 4: (6.8, 232.0, 72.0), 6: (7.7, 620.0, 64.0)},
    100.0: {2: (2.6, 92.0, 220.0), 4: (5.2, 441.0, 110.0), 6: (5.9, 1181.0, 97.0)},
    250.0: {2: (1.8, 210.0, 1000.0), 4: (3.7, 1017.0, 500.0), 6: (4.2, 2744.0, 440.0)},
}


def mg10_row(horsepower: float, poles: int) -> tuple[float, float, float]:
    """NEMA MG 10 Table 2-3 (A, B, C) for a motor size and pole count, interpolated between stored rows.

    Raises
    ------
    ValueError
        outside 10–250 hp or for pole counts other than 2, 4, 6 (the table does not apply).

    Examples
    --------
    >>> mg10_row(100.0, 4)
    (5.2, 441.0, 110.0)
    """
    hps = sorted(MG10_STARTS)
    if poles not in (2, 4, 6) or not hps[0] <= horsepower <= hps[-1]:
        raise ValueError(f"NEMA MG 10 Table 2-3 covers 2-, 4- and 6-pole motors of {hps[0]:g}–{hps[-1]:g} hp "
                         f"(rows held here), got {horsepower:.4g} hp with {poles} poles")
    j = min(bisect.bisect_left(hps, horsepower), len(hps) - 1)
    if hps[j] == horsepower or j == 0:
        return MG10_STARTS[hps[j]][poles]
    h0, h1 = hps[j - 1], hps[j]
    w = (horsepower - h0) / (h1 - h0)
    r0, r1 = MG10_STARTS[h0][poles], MG10_STARTS[h1][poles]
    return tuple(a + w * (b - a) for a, b in zip(r0, r1))  # type: ignore[return-value]


def mg10_starts_per_hour(horsepower: float, poles: int, load_wk2: float) -> tuple[float, float]:
    """Allowed starts per hour and minimum rest between starts by NEMA MG 10 (starts/h, rest [s]).

    Parameters
    ----------
    horsepower : rated output [hp]
    poles : 2, 4 or 6
    load_wk2 : load inertia referred to the motor shaft [lb·ft²]

    Notes
    -----
    starts/h = min(A, B / WK²_load); rest ≥ C. Conditions: supply per MG 1 12.44, load torque at most a square law
    reaching rated torque at rated speed, load WK² not above column B.

    References
    ----------
    NEMA MG 10, Table 2-3 (EASA Electrical Engineering Handbook). METHODS.md §2.3, 2.5.

    Examples
    --------
    >>> s, rest = mg10_starts_per_hour(100.0, 4, 200.0)   # METHODS.md §2.5: 2.205 starts/h, rest ≥ 110 s
    >>> round(s, 3), rest
    (2.205, 110.0)
    """
    a, b, c = mg10_row(horsepower, poles)
    return (a if load_wk2 <= 0.0 else min(a, b / load_wk2)), c
