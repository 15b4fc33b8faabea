"""Findings several generator rules word alike (a pickup's share of what it detects: METHODS.md §9.1)."""

from __future__ import annotations

from machines.record import Check


def pickup_share(pickup: str, share: float, reference: str, target: float, missed: str, ok_tail: str = "") -> Check:
    """A pickup that must stay below a fraction ``target`` of the quantity it detects: ok at or below the target,
    a warning between the target and the quantity itself (thin headroom), a failure at or above it.

    >>> pickup_share("Pickup 12 kW", 0.5, "the motoring power 24 kW", 0.5, "motoring is not seen").status
    'ok'
    >>> pickup_share("Pickup 30 kW", 1.25, "the motoring power 24 kW", 0.5, "motoring is not seen").message
    'Pickup 30 kW is not below the motoring power 24 kW: motoring is not seen.'
    """
    if share <= target * (1 + 1e-9):
        return Check("ok", f"{pickup} is {share:.0%} of {reference}{ok_tail}.")
    if share < 1.0:
        return Check("warn", f"{pickup} is {share:.0%} of {reference}: little margin ({target:.0%} is usual).")
    return Check("fail", f"{pickup} is not below {reference}: {missed}.")
