"""Limits on a motor's separate overload device: NFPA 70 (NEC) 430.32(A)(1).

These are NEC percentages of nameplate full-load current, not IEC rules (IEC 60034-1 has no service-factor rule).

Methods: machines/METHODS.md §10 (overload limits, with check values).
"""

from __future__ import annotations


def nec_overload_limit(service_factor: float, temperature_rise: float | None = None) -> float:
    """Highest overload-device pickup NEC 430.32(A)(1) allows, as a fraction of nameplate FLC [pu].

    Parameters
    ----------
    service_factor : marked service factor [-]
    temperature_rise : marked temperature rise [K], or None when not marked

    Notes
    -----
    1.25 for a marked service factor ≥ 1.15 or a marked temperature rise ≤ 40 °C (either alone qualifies), else 1.15.
    430.32(C) allows the next step (1.40 / 1.30) only when the motor cannot start or carry its load.

    References
    ----------
    NFPA 70 (NEC) 430.32(A)(1). METHODS.md §10.

    Examples
    --------
    >>> round(24.0 * nec_overload_limit(1.15), 2), round(26.0 * nec_overload_limit(1.0), 2)   # METHODS.md §10
    (30.0, 29.9)
    """
    if service_factor >= 1.15 - 1e-9 or (temperature_rise is not None and temperature_rise <= 40.0):
        return 1.25
    return 1.15
