"""Induction-motor family: preparation (the start study), the rules in sheet order, and the time-current drawing.

Methods: machines/METHODS.md §3 (the start and its profiles: §3.3).
"""

from __future__ import annotations

import math

import numpy as np

from machines.model import motor_rated_current
from machines.protection import (
    ct_check, current_unbalance, locked_rotor, loss_of_load, motor_differential, motor_earth_fault,
    motor_underfrequency, motor_undervoltage, short_circuit, start_supervision, starts, thermal_overload,
)
from machines.protection.base import StudyContext
from machines.protection.motor_basis import basis_of, chosen, motor_basis
from machines.record import Drawing, FunctionSettings, Series
from machines.standards.thermal_replica import thermal_operate_time

T_MIN, T_MAX = 0.01, 10000.0  #: time axis of the drawing [s]


def prepare(case) -> StudyContext:
    """The study context with the motor basis (locked-rotor current, source, the starts) in ``extras["motor"]``."""
    ctx = StudyContext(case=case, rated_current=motor_rated_current(case.machine))
    ctx.extras["checks"] = []
    ctx.extras["motor"] = motor_basis(ctx)
    b = ctx.extras["motor"]
    ctx.extras["start_profiles"] = [start_profile("minimum", b.start_min, extra=_range(b)),
                                    start_profile("rated", b.start_rated, extra=_range(b, rated=True))]
    return ctx


def _range(b, rated: bool = False) -> dict:
    """What a profile says about the acceleration range: the profile is its long end (the torque curve with the
    lowest pull-up torque studied); at minimum voltage also the short end's time."""
    if b.pull_up_range is None:
        return {"torque_curve": b.curve.source}
    out = {"torque_curve": b.curve.source, "end": "long", "pull_up_torque": b.curve.pull_up}
    short = b.start_min_short
    if not rated and short is not b.start_min:
        out["acceleration_range"] = [float(short.acceleration_time) if short.accelerates else None,
                                     float(b.start_min.acceleration_time) if b.bounded else None]
    return out


def start_profile(label: str, start, points: int = 200, extra: dict | None = None) -> dict:
    """A simulated start as plain data for the record: time [s] and RMS current [A primary], at most ``points``
    samples (every sample where the current changes fastest is kept by sampling evenly in time)."""
    t, i = np.asarray(start.times, float), np.asarray(start.currents, float)
    if t.size > points:
        grid = np.linspace(t[0], t[-1], points)
        i, t = np.interp(grid, t, i), grid
    return {"label": label, "voltage": float(start.voltage), "accelerates": bool(start.accelerates),
            "acceleration_time": float(start.acceleration_time) if math.isfinite(start.acceleration_time) else None,
            "time": [float(x) for x in t], "current": [float(x) for x in i], **(extra or {})}


RULES: list = [
    thermal_overload.settings,
    locked_rotor.settings,
    start_supervision.settings,
    short_circuit.settings,
    current_unbalance.settings,
    motor_earth_fault.settings,
    motor_undervoltage.settings,
    starts.settings,
    motor_underfrequency.settings,
    loss_of_load.settings,
    motor_differential.settings,
    ct_check.settings,
]


def _clip(points, x_lo: float, x_hi: float) -> list[tuple[float, float]]:
    out = []
    for x, y in points:
        x, y = float(x), float(y)
        if math.isfinite(x) and math.isfinite(y) and x_lo <= x <= x_hi and T_MIN <= y <= T_MAX:
            out.append((x, y))
    return out


def _definite(pickup: float, delay: float, x_hi: float) -> list[tuple[float, float]]:
    d = max(delay, 0.02)
    return [(pickup, T_MAX), (pickup, d), (x_hi, d)]


def _start_series(label: str, st, x_lo: float, x_hi: float, style: str) -> Series:
    keep = st.times > 0
    pts = _clip(zip(st.currents[keep], st.times[keep]), x_lo, x_hi)
    step = max(1, len(pts) // 120)
    return Series(label + ("" if st.accelerates else " (stalls)"), pts[::step] + pts[-1:] if pts else [], style)


def _vertical(current: float, x_lo: float, x_hi: float) -> list[tuple[float, float]]:
    return _clip([(current, T_MAX), (current, T_MIN)], x_lo, x_hi)


def drawings(ctx: StudyContext, functions: list[FunctionSettings]) -> list[Drawing]:
    """One log-log time-current drawing: the starts at minimum and rated voltage, the maker's thermal limits, 49 cold
    and hot, 51LR, 48, 50P, the fuse and the fault currents."""
    m = ctx.case.machine
    b = basis_of(ctx)
    flc = b.flc
    x_lo = 0.5 * flc
    p50 = chosen(ctx, "50P")
    fuse = ctx.case.supply.fuse
    x_hi = max(20.0 * flc, 1.5 * p50.get("pickup", 0.0), 1.2 * p50.get("block", 0.0), 1.2 * (b.fault_max or 0.0),
               1.2 * (fuse.points[-1][0] if fuse else 0.0))
    series: list[Series] = []
    rng = "" if b.pull_up_range is None or b.curve is b.curve_short else ", long end"
    if b.start_min.times.size > 1:
        series.append(_start_series(f"Start at {b.start_min.voltage:.2f} pu (minimum{rng})", b.start_min, x_lo, x_hi,
                                    "line"))
    if b.start_rated.times.size > 1:
        series.append(_start_series(f"Start at rated voltage{rng}", b.start_rated, x_lo, x_hi, "dashed"))
    for (kind, state), curves in sorted(b.limits.items()):
        for voltage, points in sorted(curves):
            at = f" at {voltage:.2f} pu" if kind == "accelerating" else ""
            series.append(Series(f"Thermal limit, {kind} ({state}){at}", _clip(points, x_lo, x_hi),
                                 "points" if len(points) == 1 else "dotted"))
    c49 = chosen(ctx, "49")
    if c49:
        pk, tau = c49["pickup"], c49["tau"]
        currents = np.geomspace(1.05 * pk, 20.0 * flc, 60) if 20.0 * flc > 1.05 * pk else np.array([])
        cold = [(i, thermal_operate_time(i, pk, tau)) for i in currents]
        hot = [(i, thermal_operate_time(i, pk, tau, flc)) for i in currents]
        series.append(Series("49 from cold", _clip(cold, x_lo, x_hi), "line"))
        series.append(Series("49 from hot", _clip(hot, x_lo, x_hi), "dashed"))
    series.append(Series("Safe stall, cold", _clip([(b.lr_high, m.safe_stall_time_cold)], x_lo, x_hi), "points"))
    series.append(Series("Safe stall, hot", _clip([(b.lr_high, m.safe_stall_time_hot)], x_lo, x_hi), "points"))
    c51 = chosen(ctx, "51LR")
    if c51:
        label = "51LR stall (speed-switch supervised)" if c51.get("switch") else "51LR stall"
        series.append(Series(label, _clip(_definite(c51["pickup"], c51["delay"], x_hi), x_lo, x_hi), "step"))
    c48 = chosen(ctx, "48")
    if c48:
        k = c48["start_current"] ** 2 * c48["start_time"]
        currents = np.geomspace(max(x_lo, 1.5 * flc), x_hi, 40)
        series.append(Series("48 start supervision (I²t)", _clip([(i, k / i / i) for i in currents], x_lo, x_hi),
                             "dashed"))
    if p50:
        label = "50P" if p50.get("enabled") else "50P (out of service)"
        series.append(Series(label, _clip(_definite(p50["pickup"], p50["delay"], x_hi), x_lo, x_hi),
                             "step" if p50.get("enabled") else "dotted"))
        if p50.get("block"):
            series.append(Series("Trips blocked above (fused contactor)", _vertical(p50["block"], x_lo, x_hi),
                                 "dotted"))
    if fuse:
        series.append(Series(f"Fuse {fuse.rating:.0f} A, minimum melting", _clip(fuse.points, x_lo, x_hi), "line"))
    if b.fault_max:
        series.append(Series(f"Maximum fault current {b.fault_max / 1e3:.1f} kA", _vertical(b.fault_max, x_lo, x_hi),
                             "dotted"))
    if b.fault_min and b.fault_max and b.fault_min < 0.98 * b.fault_max:
        series.append(Series(f"Minimum fault current {b.fault_min / 1e3:.1f} kA", _vertical(b.fault_min, x_lo, x_hi),
                             "dotted"))
    series = [s for s in series if s.points]
    return [Drawing(kind="time-current", title="Motor starting and protection", x_label="Current [A primary]",
                    y_label="Time [s]", log_x=True, log_y=True, series=series, x_range=(x_lo, x_hi),
                    y_range=(T_MIN, T_MAX))]
