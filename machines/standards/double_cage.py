"""Torque–speed curve of a double-cage (or deep-bar) induction motor: two cages by Kloss's equation, summed.

A double-cage rotor has a starting (outer) cage of high resistance and low leakage reactance and a running
(inner) cage of low resistance and high leakage reactance. With the stator impedance neglected each cage sees
the full air-gap voltage, so each gives the torque of a single cage, Kloss's T = 2·T_m / (s/s_m + s_m/s) with
its own peak torque T_m at its own peak slip s_m, and the rotor's torque is their sum:

    T(s) = 2·T_o / (s/s_o + s_o/s) + 2·T_i / (s/s_i + s_i/s)

(the double-cage equivalent circuit with the stator impedance left out; M. G. Say, *Alternating Current
Machines*, double-cage motor, and A. E. Fitzgerald et al., *Electric Machinery*, deep-bar and double-cage
rotors — chapters quoted from memory). The running cage fixes the torque near synchronous speed (the rated
point and breakdown), the starting cage the torque at standstill; between them lies the pull-up torque, the
least torque from standstill to breakdown speed.

Fitted to a data sheet: the rated point (slip s_r, 1 pu torque), the breakdown torque T_b (the curve's maximum)
and the locked-rotor torque T_LR (at s = 1) leave one free parameter, the starting cage's peak slip s_o, which
sets the depth of the pull-up dip. :func:`fit_two_cage` fits the curve for a given s_o, :func:`pull_up_torque`
finds the dip, and :func:`outer_slip_for_pull_up` picks s_o for a given pull-up torque. Torques are pu of rated
torque, slips pu of synchronous speed.

The study's model curve is the full double-cage equivalent circuit (:mod:`machines.standards.equivalent_circuit`);
this curve stands in where that circuit cannot be fitted to the data sheet (METHODS.md §3.6). Its dip lies at high
speed, where a pump's or fan's load torque is large, so it overstates the acceleration time.
"""

from __future__ import annotations

import math

import numpy as np

from machines.frozen import frozen

#: slips of the curve's grid between rated slip and standstill, log-spaced [-]
GRID_POINTS = 240
#: the starting cage's peak slip is searched in this range [pu]
OUTER_SLIP_RANGE = (0.5, 40.0)


def breakdown_slip(rated_slip: float, breakdown_torque: float) -> float:
    """Breakdown slip from the rated point by Kloss's equation, s_b = s_r·(T_b + √(T_b² − 1)) [pu].

    Notes
    -----
    Kloss: T/T_b = 2 / (s/s_b + s_b/s); at rated slip T = 1 pu, solved for s_b (the root above s_r).

    Examples
    --------
    >>> round(breakdown_slip(0.01, 2.0), 5)
    0.03732
    """
    return rated_slip * (breakdown_torque + math.sqrt(breakdown_torque ** 2 - 1.0))


def kloss_torque(slip, peak_torque: float, peak_slip: float):
    """Kloss's equation, T = 2·T_m / (s/s_m + s_m/s) [pu of rated torque] (0 at s = 0).

    Examples
    --------
    >>> round(float(kloss_torque(0.01, 2.0, breakdown_slip(0.01, 2.0))), 6)   # the rated point
    1.0
    """
    s = np.maximum(np.asarray(slip, dtype=float), 1e-12)
    return 2.0 * peak_torque / (s / peak_slip + peak_slip / s)


def _k(s: float, x: float) -> float:
    """Kloss's shape 2 / (s/x + x/s) for scalars (the equation of :func:`kloss_torque` with a unit peak)."""
    return 2.0 / (s / x + x / s)


@frozen
class TwoCage:
    """A fitted double-cage curve: the starting cage (peak ``outer_peak`` at ``outer_slip``) and the running cage
    (``inner_peak`` at ``inner_slip``) [pu]; ``lr_excess`` > 0 when Kloss's running cage alone gives more torque at
    standstill than the data sheet's T_LR, the excess then taken off linearly towards standstill [pu]."""

    outer_peak: float
    outer_slip: float
    inner_peak: float
    inner_slip: float
    lr_excess: float = 0.0

    def torque(self, slip) -> np.ndarray:
        """T(s) [pu of rated torque]."""
        s = np.asarray(slip, dtype=float)
        t = kloss_torque(s, self.outer_peak, self.outer_slip) + kloss_torque(s, self.inner_peak, self.inner_slip)
        if self.lr_excess > 0.0:
            t = t - self.lr_excess * np.clip((s - self.inner_slip) / (1.0 - self.inner_slip), 0.0, 1.0)
        return t


def _peak(curve: TwoCage, lo: float, hi: float, points: int = 32) -> tuple[float, float]:
    """(slip, torque) of the curve's maximum between ``lo`` and ``hi``: the best of a log-spaced grid, refined by
    a parabola through it and its neighbours (in log slip)."""
    x = np.linspace(math.log(lo), math.log(hi), points)
    t = curve.torque(np.exp(x))
    j = int(np.clip(np.argmax(t), 1, points - 2))
    y0, y1, y2 = float(t[j - 1]), float(t[j]), float(t[j + 1])
    den = y0 - 2.0 * y1 + y2
    d = 0.0 if den >= 0.0 else max(-1.0, min(1.0, 0.5 * (y0 - y2) / den))
    return math.exp(x[j] + d * (x[1] - x[0])), max(y1 - 0.25 * (y0 - y2) * d, float(t.max()))


def fit_two_cage(rated_slip: float, locked_rotor_torque: float, breakdown_torque: float,
                 outer_slip: float) -> TwoCage:
    """The double-cage curve through the rated point (s_r, 1 pu), with maximum T_b and T(1) = T_LR, for the
    starting cage's peak slip ``outer_slip``.

    Notes
    -----
    The running cage is Kloss's curve through the rated point with its peak at the breakdown torque less the
    starting cage's share there; the starting cage's peak torque makes up T_LR at standstill. The two are solved
    in turn until they agree (the starting cage adds little near synchronous speed, so a few rounds suffice).

    Examples
    --------
    >>> c = fit_two_cage(0.01, 0.8, 2.2, 2.0)
    >>> [round(float(c.torque(s)), 4) for s in (0.01, 1.0)]
    [1.0, 0.8]
    >>> round(float(c.torque(np.geomspace(0.01, 1.0, 20001)).max()), 4)
    2.2
    """
    t_lr, t_b = locked_rotor_torque, max(breakdown_torque, 1.0 + 1e-6)
    offset = 0.0
    outer = 0.0
    curve = TwoCage(0.0, outer_slip, t_b, breakdown_slip(rated_slip, t_b))
    k_r, k_1 = _k(rated_slip, outer_slip), _k(1.0, outer_slip)
    for _ in range(8):
        o_r = outer * k_r
        peak = max(t_b - offset, (1.0 - o_r) * (1.0 + 1e-6))
        tau = peak / (1.0 - o_r)
        s_i = rated_slip * (tau + math.sqrt(tau * tau - 1.0))
        t_i1 = peak * _k(1.0, s_i)
        outer = max((t_lr - t_i1) / k_1, 0.0)
        excess = max(t_i1 - t_lr, 0.0)
        curve = TwoCage(outer, outer_slip, peak, s_i, excess)
        _, top = _peak(curve, max(rated_slip, s_i / 3.0), min(1.0, 3.0 * s_i))
        if abs(top - t_b) < 1e-6 * t_b:
            break
        offset += top - t_b
    return curve


def pull_up_torque(curve: TwoCage, rated_slip: float) -> float:
    """The least torque from standstill to breakdown speed [pu] (T_LR when the curve does not dip).

    Examples
    --------
    >>> round(pull_up_torque(fit_two_cage(0.01, 0.8, 2.2, 2.0), 0.01), 4)
    0.7202
    """
    x = np.linspace(math.log(rated_slip), 0.0, GRID_POINTS)
    t = curve.torque(np.exp(x))
    j = int(np.argmax(t))
    tail = t[j:]
    k = int(np.argmin(tail))
    if k == tail.size - 1 or k == 0:
        return float(tail[k])
    y0, y1, y2 = float(tail[k - 1]), float(tail[k]), float(tail[k + 1])
    den = y0 - 2.0 * y1 + y2
    d = 0.0 if den <= 0.0 else max(-1.0, min(1.0, 0.5 * (y0 - y2) / den))
    return min(y1 - 0.25 * (y0 - y2) * d, y1)


def outer_slip_for_pull_up(rated_slip: float, locked_rotor_torque: float, breakdown_torque: float,
                           pull_up: float) -> tuple[float, float]:
    """(starting cage's peak slip, pull-up torque it gives) for the double-cage curve whose pull-up torque is
    nearest ``pull_up`` [pu]: exact where the family reaches it, else the family's nearest (a data sheet whose
    pull-up the model cannot reach is reported by the caller).

    Notes
    -----
    The family's pull-up torque falls as the starting cage's peak slip s_o grows (its peak moves beyond
    standstill and its torque in the speed range falls); below a slip of about 1 the curve no longer dips. The
    root is found by the Illinois variant of the false-position method on ln s_o; a pull-up equal to T_LR gives
    the largest s_o whose curve does not dip.

    Examples
    --------
    >>> so, pu = outer_slip_for_pull_up(0.01, 0.8, 2.2, 0.7)
    >>> round(pu, 4)
    0.7
    """
    def f(x: float) -> float:
        curve = fit_two_cage(rated_slip, locked_rotor_torque, breakdown_torque, math.exp(x))
        return pull_up_torque(curve, rated_slip) - target

    target = min(pull_up, locked_rotor_torque * (1.0 - 1e-4))
    a, b = math.log(OUTER_SLIP_RANGE[0]), math.log(OUTER_SLIP_RANGE[1])
    fa, fb = f(a), f(b)
    if fa <= 0.0:
        return math.exp(a), fa + target
    if fb >= 0.0:
        return math.exp(b), fb + target
    if pull_up >= locked_rotor_torque:  # no dip: the edge of the flat part, found to 1 % of s_o by bisection
        while b - a > 0.01:
            m = 0.5 * (a + b)
            if f(m) >= 0.0:
                a = m
            else:
                b = m
        return math.exp(a), f(a) + target
    side = 0
    for _ in range(60):
        c = (a * fb - b * fa) / (fb - fa)
        fc = f(c)
        if abs(fc) < 2e-5 * target or abs(b - a) < 1e-6:
            break
        if fc * fb > 0.0:
            b, fb = c, fc
            if side == -1:
                fa *= 0.5
            side = -1
        else:
            a, fa = c, fc
            if side == 1:
                fb *= 0.5
            side = 1
    return math.exp(c), fc + target
