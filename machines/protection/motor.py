"""Induction-motor family: preparation (the start study), the rules in sheet order, and the time-current drawing."""

from __future__ import annotations

import math

import numpy as np

from machines.model import motor_rated_current
from machines.protection import (
    ct_check, current_unbalance, locked_rotor, loss_of_load, motor_differential, motor_earth_fault,
    motor_underfrequency, motor_undervoltage, short_circuit, starts, thermal_overload,
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
    ctx.extras["start_profiles"] = [start_profile("minimum", b.start_min), start_profile("computed", b.start_normal)]
    return ctx


def start_profile(label: str, start, points: int = 200) -> dict:
    """A simulated start as plain data for the record: time [s] and RMS current [A primary], at most ``points``
    samples (every sample where the current changes fastest is kept by sampling evenly in time)."""
    t, i = np.asarray(start.times, float), np.asarray(start.currents, float)
    if t.size > points:
        grid = np.linspace(t[0], t[-1], points)
        i, t = np.interp(grid, t, i), grid
    return {"label": label, "voltage": float(start.voltage), "accelerates": bool(start.accelerates),
            "acceleration_time": float(start.acceleration_time) if math.isfinite(start.acceleration_time) else None,
            "time": [float(x) for x in t], "current": [float(x) for x in i]}


RULES: list = [
    thermal_overload.settings,
    locked_rotor.settings,
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


def drawings(ctx: StudyContext, functions: list[FunctionSettings]) -> list[Drawing]:
    """One log-log time-current drawing: start at minimum voltage, 49 cold/hot, stall limits, 51LR, 50P."""
    m = ctx.case.machine
    b = basis_of(ctx)
    flc = b.flc
    x_lo = 0.5 * flc
    p50 = chosen(ctx, "50P")
    x_hi = max(20.0 * flc, 1.5 * p50.get("pickup", 0.0), 1.2 * p50.get("block", 0.0))
    series: list[Series] = []
    st = b.start_min
    if st.times.size > 1:
        keep = st.times > 0
        label = (f"Start at {st.voltage:.2f} pu" if st.accelerates else f"Start at {st.voltage:.2f} pu (stalls)")
        pts = _clip(zip(st.currents[keep], st.times[keep]), x_lo, x_hi)
        step = max(1, len(pts) // 120)
        series.append(Series(label, pts[::step] + pts[-1:] if pts else [], "line"))
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
        series.append(Series("51LR stall", _clip(_definite(c51["pickup"], c51["delay"], x_hi), x_lo, x_hi), "step"))
    if p50:
        label = "50P" if p50.get("enabled") else "50P (out of service)"
        series.append(Series(label, _clip(_definite(p50["pickup"], p50["delay"], x_hi), x_lo, x_hi),
                             "step" if p50.get("enabled") else "dotted"))
        if p50.get("block"):
            series.append(Series("Trips blocked above (fused contactor)",
                                 _clip([(p50["block"], T_MAX), (p50["block"], T_MIN)], x_lo, x_hi), "dotted"))
    series = [s for s in series if s.points]
    return [Drawing(kind="time-current", title="Motor starting and protection", x_label="Current [A primary]",
                    y_label="Time [s]", log_x=True, log_y=True, series=series, x_range=(x_lo, x_hi),
                    y_range=(T_MIN, T_MAX))]
