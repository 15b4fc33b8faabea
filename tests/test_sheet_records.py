"""Hand-built settings records for the sheet, table and signing tests.

The numbers are an invented layout fixture, not engineering data: they exercise every kind of row the sheet prints
(settings with and without a relay-side value, booleans, stage lists, a disabled function, checks of each status,
test points with and without an expected time, one drawing of each kind). Engineering values are tested in the
study modules against their standards, not here.
"""

from __future__ import annotations

import math

from machines.record import (Check, Circle, Drawing, FunctionSettings, Series, Setting, SettingsRecord,
                             TestPoint as Injection)

FINGERPRINT = "sha256:" + "0123456789abcdef" * 4


def _inverse_curve(pickup: float, tms: float, lo: float, hi: float, n: int = 40):
    # points along an IEC standard-inverse curve shape, for drawing only
    pts = []
    for k in range(n):
        i = lo * (hi / lo) ** (k / (n - 1))
        m = i / pickup
        if m > 1.02:
            pts.append((i, tms * 0.14 / (m ** 0.02 - 1)))
    return pts


def drawings() -> list[Drawing]:
    tc = Drawing(
        kind="time-current", title="Motor starting and thermal limits", x_label="Current (A, primary)",
        y_label="Time (s)", log_x=True, log_y=True,
        series=[
            Series("Starting current at 0.85 pu voltage", [(1100.0, 0.01), (1000.0, 2.0), (900.0, 6.0),
                                                           (600.0, 7.5), (186.0, 8.0), (150.0, 1000.0)], "line"),
            Series("49 thermal, cold", _inverse_curve(200.0, 40.0, 205.0, 2000.0), "line"),
            Series("49 thermal, hot", _inverse_curve(200.0, 25.0, 205.0, 2000.0), "dashed"),
            Series("Safe stall time (cold, hot)", [(1153.0, 22.0), (1153.0, 16.0)], "points"),
            Series("51LR", [(450.0, 1000.0), (450.0, 12.0), (3000.0, 12.0)], "step"),
            Series("50P", [(2600.0, 1000.0), (2600.0, 0.05), (20000.0, 0.05)], "dotted"),
        ],
        x_range=(100.0, 20000.0), y_range=(0.01, 10000.0))
    i2 = Drawing(
        kind="i2-time", title="Negative-sequence current against the machine's K", x_label="I2 (pu)",
        y_label="Time (s)", log_x=True, log_y=True,
        series=[Series("Machine I2²t = 10 s", [(0.1 * 1.2 ** k, 10.0 / (0.1 * 1.2 ** k) ** 2) for k in range(30)],
                       "line"),
                Series("46 trip curve", [(0.1 * 1.2 ** k, 8.0 / (0.1 * 1.2 ** k) ** 2) for k in range(2, 30)],
                       "dashed")])
    rx = Drawing(
        kind="r-x", title="Loss-of-field zones", x_label="R (Ω, secondary)", y_label="X (Ω, secondary)",
        series=[Series("Capability limit", [(20.0 * math.cos(a / 10), -5 - 20.0 * math.sin(a / 10))
                                            for a in range(0, 16)], "dotted")],
        circles=[Circle("Zone 1", (0.0, -20.0), 14.0, "line"), Circle("Zone 2", (0.0, -32.0), 26.0, "dashed")])
    freq = Drawing(
        kind="frequency", title="Underfrequency stages against the turbine bands", x_label="Time (s)",
        y_label="Frequency (Hz)", log_x=True,
        series=[Series("Turbine limit", [(0.1, 47.0), (10.0, 47.0), (10.0, 48.0), (600.0, 48.0), (600.0, 49.0),
                                         (10000.0, 49.0)], "line"),
                Series("81U stages", [(2.0, 48.5), (10.0, 48.0)], "points")],
        x_range=(0.1, 10000.0), y_range=(46.0, 51.0))
    return [tc, i2, rx, freq]


def motor_record(tag: str = "CH-M-101", description: str = "Chiller 1 compressor motor", revision: int = 2,
                 page_size: str = "A4", status: str = "draft") -> SettingsRecord:
    d = drawings()
    f49 = FunctionSettings(
        "49", "Stator thermal overload",
        {"pickup_current": Setting(213.9, "A", "standard", secondary=4.278, secondary_unit="A"),
         "heating_time_constant": Setting(1320.0, "s", "derived"),
         "cooling_time_constant": Setting(10800.0, "s", "maker-data")},
        "Pickup at service factor times rated current; heating time constant from the hot safe stall time.",
        ["IEC 60255-149"],
        checks=[Check("ok", "Thermal curve from hot lies below the hot safe stall time at locked-rotor current.")],
        test_points=[Injection("current", 10.0, "A", 71.3, 3.6, True, "cold", 500.0, "A", "2× pickup from cold",
                               "±5 % or ±30 ms, whichever is greater"),
                     Injection("current", 4.0, "A", None, 0.0, True, "cold", 200.0, "A", "below pickup")])
    f51 = FunctionSettings(
        "51LR", "Locked rotor",
        {"pickup_current": Setting(450.0, "A", "common-practice", secondary=9.0, secondary_unit="A"),
         "time_delay": Setting(12.0, "s", "standard"),
         "speed_switch_required": Setting(False, "", "derived")},
        "Pickup between the full-load current and the starting current; delay longer than the start, shorter "
        "than the stall time.", ["IEEE C37.96"],
        checks=[Check("warn", "Acceleration time 8 s leaves 4 s margin to the 51LR delay.")],
        test_points=[Injection("current", 12.0, "A", 12.0, 0.5, True, "", 600.0, "A")])
    f50 = FunctionSettings(
        "50P", "Instantaneous overcurrent",
        {"enabled": Setting(True, "", "derived"),
         "pickup_current": Setting(2600.0, "A", "common-practice", secondary=52.0, secondary_unit="A",
                                   note="2 × locked-rotor current")},
        "Above the asymmetrical starting current, below the minimum fault current.", ["IEEE C37.96"],
        checks=[Check("fail", "The minimum fault current is below twice the 50P pickup.")])
    f81 = FunctionSettings(
        "81U", "Underfrequency",
        {"stages": Setting([{"frequency": 48.5, "time_delay": 2.0}, {"frequency": 48.0, "time_delay": 10.0}], "",
                           "entered")},
        "Stages as entered for the plant's load-shedding scheme.", [])
    f27 = FunctionSettings(
        "27", "Undervoltage",
        {"pickup_voltage": Setting(3328.0, "V", "common-practice", secondary=96.0, secondary_unit="V"),
         "time_delay": Setting(3.0, "s", "common-practice")},
        "80 % of nominal, delayed past the motor's own starting dip.", [], enabled=False)
    checks = [Check("warn", "machine.temperature_rise is not used by this study.")]
    return SettingsRecord(
        tag=tag, kind="induction-motor", revision=revision, practice="IEEE", inputs_fingerprint=FINGERPRINT,
        derived={"locked_rotor_current": Setting(1153.2, "A", "derived", secondary=23.06, secondary_unit="A"),
                 "acceleration_time": Setting(7.9, "s", "derived")},
        functions=[f49, f51, f50, f81, f27], checks=checks, drawings=d,
        sheet={"tag": tag, "description": description, "site": "Harbourside District Cooling and Water Plant",
               "prepared_by": "A. Okafor", "checked_by": "L. Brandt", "approved_by": "M. Sato",
               "revision": revision, "date": "2026-11-20", "status": status, "page_size": page_size,
               "history": [{"revision": 1, "date": "2026-10-02", "by": "A. Okafor", "reason": "first issue"}]},
        inputs={"machine": {"kind": "induction-motor", "rated_output": "1500 hp", "rated_voltage": "4.16 kV",
                            "rated_current": "186 A", "frequency": "60 Hz", "power_factor": 0.89,
                            "service_factor": 1.15, "cooling_time_constant": "180 min"},
                "supply": {"nominal_voltage": "4.16 kV", "fault_level": "250 MVA"},
                "instruments": {"phase_ct": "250/5 A", "vt": "4200/120 V"},
                "overrides": {"51LR.pickup_current": "450 A"}},
    )
