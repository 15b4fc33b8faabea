"""Current-transformer saturation: the IEEE C37.110 criterion, C-class ratings and time to saturate.

IEEE C57.13 C-class (and K-class) relaying CTs are rated by the secondary terminal voltage V_C they deliver at 20
times rated secondary current (100 A for a 5 A CT) into the standard burden without exceeding 10 % ratio error, so
the standard burden of a class is Z_std = V_C / 100 Ω (C100 ↔ B-1 = 1 Ω … C800 ↔ B-8 = 8 Ω). IEEE C37.110 asks that
a CT carrying a fully offset fault current not saturate:

    (1 + X/R) · I_f · Z_b ≤ 20

with I_f in per unit of the CT rated primary and Z_b the connected burden in per unit of the standard burden.

Methods: machines/METHODS.md §11 (CT saturation; 11.1 the criterion, 11.2 check values).
"""

from __future__ import annotations

import math
import re

from machines.errors import InputError, one_line

SATURATION_LIMIT = 20.0  #: the right-hand side of the C37.110 criterion [-]
RATED_SECONDARY_FOR_CLASS = 5.0  #: C57.13 classes are defined for 5 A secondaries [A]


_IEC_CLASS = re.compile(r"\s*(5|10)\s?P\s?(\d{1,2})(\s+\d{1,3}(\.\d{1,2})?\s*VA)?\s*", re.IGNORECASE)


def is_iec_protective_class(text: str) -> bool:
    """Whether ``text`` is an IEC 61869-2 protective class such as ``"5P20"`` or ``"10P10 15 VA"``.

    Such a class gives an accuracy limit factor, not a C57.13 terminal voltage, so the C37.110 criterion in the
    form of :func:`c37110_saturation_index` does not apply to it directly.

    >>> is_iec_protective_class("5P20 15 VA"), is_iec_protective_class("C200")
    (True, False)
    """
    return isinstance(text, str) and _IEC_CLASS.fullmatch(text) is not None


def check_relaying_class(text: str, key: str) -> str:
    """The class as written, normalised (``"c 200"`` → ``"C200"``), or InputError naming ``key``."""
    if is_iec_protective_class(text):
        return " ".join(text.upper().replace("VA", " VA").split()).replace(" P", "P").replace("P ", "P")
    return f"{text.strip()[0].upper()}{int(c_class_voltage(text, key))}"


def c_class_voltage(text: str, key: str = "instruments.phase_ct_class") -> float:
    """The secondary terminal voltage rating of an IEEE C57.13 relaying class such as ``"C200"`` [V].

    Accepts C and K classes (K has the same voltage rating with a higher knee) and T classes (rated by test), with
    an optional space: ``"C200"``, ``"c 400"``, ``"K800"``.

    Raises
    ------
    InputError
        naming ``key`` when the text is not such a class.

    References
    ----------
    IEEE Std C57.13-2016, relaying accuracy classes and standard burdens B-1 … B-8.

    Examples
    --------
    >>> c_class_voltage("C200")
    200.0
    >>> c_class_voltage("k 800")
    800.0
    """
    m = re.fullmatch(r"\s*([CKTckt])\s?(\d{2,4})\s*", text) if isinstance(text, str) else None
    if not m or float(m.group(2)) not in (10.0, 20.0, 50.0, 100.0, 200.0, 400.0, 800.0):
        raise InputError(key, f"expected an IEEE C57.13 relaying class such as 'C200' (C, K or T and 10, 20, 50, "
                              f"100, 200, 400 or 800 V) or an IEC 61869-2 class such as '5P20', got "
                              f"{one_line(text)}")
    return float(m.group(2))


def standard_burden(c_class_voltage: float, rated_secondary: float = RATED_SECONDARY_FOR_CLASS) -> float:
    """Standard burden of a C class, Z_std = V_C / (20 · I_sn) [Ω].

    Examples
    --------
    >>> standard_burden(400.0)
    4.0
    """
    return c_class_voltage / (20.0 * rated_secondary)


def tap_class_voltage(c_class_voltage: float, turns_in_use: float, full_turns: float) -> float:
    """Usable class voltage of a multi-ratio CT on a tap, V_C,eff = V_C · N_tap / N_full [V].

    References
    ----------
    IEEE C57.13 multi-ratio CTs; METHODS.md §11.1 [M].

    Examples
    --------
    >>> tap_class_voltage(400.0, 120, 240)   # 600/5 tap of a 1200/5 C400: METHODS.md §11.2 → C200
    200.0
    """
    return c_class_voltage * turns_in_use / full_turns


def c37110_saturation_index(fault_current: float, ct_primary: float, burden: float, c_class_voltage: float,
                            x_over_r: float) -> float:
    """The IEEE C37.110 saturation index (1 + X/R)·I_f·Z_b [-]; the CT avoids saturation when it is ≤ 20.

    Parameters
    ----------
    fault_current : maximum symmetrical fault current through the CT [A primary]
    ct_primary : rated primary current of the ratio in use [A]
    burden : total secondary burden, leads and relays, CT winding excluded [Ω]
    c_class_voltage : V_C of the class (on the tap in use) [V]
    x_over_r : X/R of the fault circuit [-]

    Notes
    -----
    I_f [pu of CT primary] = fault_current / ct_primary; Z_b [pu] = burden / (V_C / 100 Ω).
    With X/R = 0 the index is the symmetrical check I_f·Z_b ≤ 20.

    References
    ----------
    IEEE Std C37.110-2007, guide for the application of CTs used for protective relaying, saturation criterion;
    METHODS.md §11.1, 11.2.

    Examples
    --------
    >>> round(c37110_saturation_index(25e3, 1200.0, 0.5, 400.0, 15.0), 2)   # METHODS.md §11.2: 41.67
    41.67
    >>> round(c37110_saturation_index(20e3, 2000.0, 0.2, 400.0, 10.0), 3)   # METHODS.md §11.2: 5.500
    5.5
    """
    i_pu = fault_current / ct_primary
    z_pu = burden / standard_burden(c_class_voltage)
    return (1.0 + x_over_r) * i_pu * z_pu


def required_secondary_voltage(fault_current: float, ct_ratio: float, burden: float, x_over_r: float) -> float:
    """Secondary voltage a CT must develop without saturating, V = (1 + X/R)·I_f,sec·Z_b [V].

    References
    ----------
    IEEE Std C37.110-2007; METHODS.md §11.1, 11.2 (833.3 V for 25 kA, 1200/5, 0.5 Ω, X/R 15).

    Examples
    --------
    >>> round(required_secondary_voltage(25e3, 240.0, 0.5, 15.0), 1)
    833.3
    """
    return (1.0 + x_over_r) * fault_current / ct_ratio * burden


def time_to_saturate(fault_current: float, ct_primary: float, burden: float, c_class_voltage: float,
                     x_over_r: float, frequency: float) -> float:
    """Time from fault inception to CT saturation with a fully offset current [s].

    Parameters
    ----------
    fault_current, ct_primary, burden, c_class_voltage, x_over_r : as for :func:`c37110_saturation_index`
    frequency : system frequency [Hz]

    Returns
    -------
    float
        t_s [s]: 0 when even the symmetrical current saturates the CT, ``inf`` when it never saturates.

    Notes
    -----
    t_s = −(X/(ω·R)) · ln[1 − (K_s − 1)/(X/R)], K_s = 20 / (I_f·Z_b) (per-unit form of saturation voltage over the
    symmetrical burden voltage); resistive burden, full offset, no remanence.

    References
    ----------
    IEEE Std C37.110-2007, annex on time to saturate [M]; METHODS.md §11.1, 11.2.

    Examples
    --------
    >>> round(time_to_saturate(25e3, 1200.0, 0.5, 400.0, 15.0, 60.0), 5)   # METHODS.md §11.2: 0.02345 s
    0.02345
    """
    sym = c37110_saturation_index(fault_current, ct_primary, burden, c_class_voltage, 0.0)
    ks = SATURATION_LIMIT / sym
    if ks <= 1.0:
        return 0.0
    arg = 1.0 - (ks - 1.0) / x_over_r
    if arg <= 0.0:
        return math.inf
    return -(x_over_r / (2.0 * math.pi * frequency)) * math.log(arg)
