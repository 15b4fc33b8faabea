"""66 starts supervision: number of cold and hot starts, minimum time between starts, starts per hour.

Rule: the maker's cold/hot starts, else the standard duty of two starts from cold and one from hot (NEMA MG 1
12.54 / Part 20, IEC 60034-12 [M]). The minimum time between starts is the standstill cooling the rotor needs
after a start from hot before one more start fits (METHODS.md §2.3): heat at rated load θ_hot = 1 − t_sh/t_sc, one
start uses Δθ = ∫I²dt / (I_LR²·t_sc), a start is allowed when θ + 1.1·Δθ ≤ 1, and the wait is τc·ln(θ/θ_allow).
NEMA MG 10 Table 2-3 gives the starts per hour and the minimum rest where it applies (2–6 poles, ≤ 250 hp).
"""

from __future__ import annotations

import math

from machines.protection.base import StudyContext
from machines.protection.motor_basis import basis_of, chosen
from machines.record import Check, FunctionSettings, Setting, TestPoint
from machines.standards.nema import mg10_starts_per_hour
from machines.standards.thermal_replica import cooling_time, heat_stored_at_rated_load

FID = "66"
START_MARGIN = 1.1  #: m in θ + m·Δθ ≤ 1 (METHODS.md §2.3: 1.1–1.25) [P]
MIN_BETWEEN = 60.0  #: shortest time between starts proposed [s] [P]
COOL_TO_AMBIENT = 3.0  #: cooling time constants to reach ambient (95 % of the heat gone) [-]


def settings(ctx: StudyContext) -> FunctionSettings:
    case = ctx.case
    m = case.machine
    b = basis_of(ctx)
    checks: list[Check] = []
    entered = case.entered.get("machine", {}) if isinstance(case.entered, dict) else {}
    src_c = "maker-data" if "starts_cold" in entered else "standard"
    src_h = "maker-data" if "starts_hot" in entered else "standard"
    n_cold, src_c = ctx.choose(FID, "starts_cold", m.starts_cold, "integer", "", src_c)
    n_hot, src_h = ctx.choose(FID, "starts_hot", m.starts_hot, "integer", "", src_h)
    tau_c = chosen(ctx, "49").get("tau_c") or m.cooling_time_constant or 3600.0
    if b.start_min.accelerates:
        d_theta = b.start_min.i2t() / (b.lr_current ** 2 * m.safe_stall_time_cold)
    else:
        d_theta = math.inf
    theta_hot = heat_stored_at_rated_load(m.safe_stall_time_hot, m.safe_stall_time_cold)
    allow = 1.0 - START_MARGIN * d_theta
    after = theta_hot + n_hot * d_theta
    wait = cooling_time(after, allow, tau_c) if math.isfinite(d_theta) else math.inf
    mg10 = None
    try:
        mg10 = mg10_starts_per_hour(b.horsepower, b.poles, b.load_wk2)
    except ValueError:
        pass
    if math.isfinite(d_theta) and not math.isfinite(wait):
        wait = COOL_TO_AMBIENT * tau_c
        checks.append(Check("warn", f"One start uses {d_theta:.0%} of the rotor's stall heat: even a cold rotor "
                                    "leaves no margin for another start, so the next start waits for the motor to "
                                    f"cool to ambient ({COOL_TO_AMBIENT:g} × the cooling time constant). Confirm the "
                                    "start duty with the maker."))
    candidates = [(wait if math.isfinite(wait) else 0.0, "derived"), (MIN_BETWEEN, "common-practice"),
                  (mg10[1] if mg10 else 0.0, "standard")]
    t0, t0_src = max(candidates, key=lambda c: c[0])
    t_between, t_src = ctx.choose(FID, "minimum_time_between_starts", t0, "time", "s", t0_src)
    if not math.isfinite(d_theta):
        checks.append(Check("warn", "The motor does not accelerate at minimum voltage: the start count cannot be "
                                    "checked against the rotor's heat."))
    else:
        if n_cold * d_theta > 1.0:
            checks.append(Check("warn", f"{n_cold} starts from cold use {n_cold * d_theta:.0%} of the rotor's stall "
                                        "capacity as computed: confirm the start duty with the maker."))
        if theta_hot + n_hot * d_theta > 1.0:
            checks.append(Check("warn", f"{n_hot} start(s) from hot would use {theta_hot + n_hot * d_theta:.0%} of "
                                        "the rotor's capacity as computed: confirm with the maker."))
        if t_between + 1e-6 < wait:
            checks.append(Check("warn", f"The minimum time between starts {t_between / 60:.1f} min is shorter than the "
                                        f"{wait / 60:.1f} min the rotor needs to cool for one more start."))
        elif not checks:
            checks.append(Check("ok", f"One start uses {d_theta:.0%} of the cold stall heat; after a start from hot "
                                      f"the rotor needs {wait / 60:.1f} min at standstill before the next."))
    s = {
        "starts_cold": Setting(n_cold, "", src_c, label="Starts in succession from cold"),
        "starts_hot": Setting(n_hot, "", src_h, label="Starts from hot"),
        "minimum_time_between_starts": Setting(t_between, "s", t_src, label="Minimum time between starts",
                                               note=f"{t_between / 60:.1f} min"),
        "start_heat_fraction": Setting(d_theta if math.isfinite(d_theta) else None, "pu", "derived",
                                       label="Rotor heat of one start / cold stall heat"),
    }
    if mg10:
        # a relay counts whole starts: the table's figure rounded down (at least one)
        s["starts_per_hour"] = Setting(float(max(1, math.floor(mg10[0] + 1e-9))), "1/h", "standard",
                                       label="Starts per hour (NEMA MG 10 Table 2-3)", step=1.0,
                                       note=f"table {mg10[0]:.2f}/h, rest ≥ {mg10[1]:.0f} s")
        basis_mg10 = f" NEMA MG 10 allows {mg10[0]:.2f} starts per hour with ≥ {mg10[1]:.0f} s rest."
    else:
        basis_mg10 = " NEMA MG 10 Table 2-3 does not apply (2–6 poles, up to 250 hp only)."
    tps = [TestPoint("starts", float(n_cold + 1), "starts", None, secondary=False, initial_state="cold",
                     description=f"simulate {n_cold} starts from cold: start {n_cold + 1} must be inhibited",
                     tolerance_rule="functional test"),
           TestPoint("standstill time", t_between, "s", None, secondary=False, initial_state="hot",
                     description="after a start from hot the restart inhibit must hold for at least this time",
                     tolerance_rule="functional test")]
    basis = (f"{n_cold} cold / {n_hot} hot starts ({'maker' if src_c == 'maker-data' else 'standard duty'}); "
             f"minimum {t_between / 60:.1f} min between starts from the standstill cooling constant "
             f"{tau_c / 60:.0f} min.{basis_mg10}")
    return FunctionSettings(FID, "Starts supervision / restart inhibit", s, basis,
                            ["NEMA MG 1 12.54 and Part 20 start duty [value from memory]",
                             "IEC 60034-12 [value from memory]", "NEMA MG 10 Table 2-3"],
                            checks, tps)
