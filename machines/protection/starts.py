"""66 starts supervision: number of cold and hot starts, minimum time between starts, starts per hour.

Rule: the maker's cold/hot starts, else the standard duty of two starts from cold and one from hot (NEMA MG 1
12.54 / Part 20, IEC 60034-12 [M]). Rotor heat is counted in units of the cold stall heat (METHODS.md §2.3): heat
at rated load θ_hot = 1 − t_sh/t_sc, one start adds Δθ = ∫I²dt / (I_LR²·t_sc) (the longest start, minimum or rated
voltage, long end). The maker's count of hot starts says how many starts the rotor takes from θ_hot; after they are
used the rotor must cool at standstill back to θ_hot before the next start, which takes
t = τc·ln((θ_hot + n_hot·Δθ) / θ_hot) with τc the standstill cooling time constant. The time set is the larger of
that, 60 s (common practice) and the NEMA MG 10 Table 2-3 rest where it applies (2–6 poles, ≤ 250 hp). A computed
restart time of more than a day is not proposed: the maker's data must settle it.
"""

from __future__ import annotations

import math

from machines.protection.base import StudyContext
from machines.protection.motor_basis import basis_of, chosen, computed
from machines.record import Check, FunctionSettings, Setting, TestPoint
from machines.standards.nema import mg10_starts_per_hour
from machines.standards.thermal_replica import cooling_time, heat_stored_at_rated_load

FID = "66"
MIN_BETWEEN = 60.0  #: shortest time between starts proposed [s] [P]
DAY = 86400.0  #: no computed restart time above this [s] [P]
COOL_TO_AMBIENT = 3.0  #: cooling time constants to reach ambient (95 % of the heat gone) [-]


def restart_time(theta_hot: float, start_heat: float, hot_starts: int, cooling_time_constant: float) -> float:
    """Standstill cooling after ``hot_starts`` starts from hot until the rotor is back at its hot heat [s].

    Notes
    -----
    t = τc · ln((θ_hot + n·Δθ) / θ_hot), the IEC 60255-149 cooling from the heat after the starts to the heat at
    rated load; inf when θ_hot is 0 (hot and cold stall times equal).

    Examples
    --------
    >>> round(restart_time(1 / 3, 0.25, 1, 3600.0) / 60, 2)   # 60 min · ln((1/3 + 1/4) / (1/3)) = 33.58 min
    33.58
    """
    if theta_hot <= 0.0:
        return math.inf
    return cooling_time(theta_hot + hot_starts * start_heat, theta_hot, cooling_time_constant)


def settings(ctx: StudyContext) -> FunctionSettings:
    case = ctx.case
    m = case.machine
    b = basis_of(ctx)
    checks: list[Check] = []
    entered = case.entered.get("machine", {}) if isinstance(case.entered, dict) else {}
    src_c = "maker-data" if "starts_cold" in entered else "standard"
    src_h = "maker-data" if "starts_hot" in entered else "standard"
    tc_maker = bool(m.cooling_time_constant)
    tau_c0 = computed(ctx, "49").get("tau_c") or m.cooling_time_constant or 3600.0
    tau_c = chosen(ctx, "49").get("tau_c") or tau_c0
    heat = b.start_heat()
    d_theta = heat / (b.lr_high ** 2 * b.stall_time(b.lr_high, "cold")) if heat > 0.0 else math.inf
    theta_hot = heat_stored_at_rated_load(m.safe_stall_time_hot, m.safe_stall_time_cold)

    # ---- the rule's values
    n_cold0, n_hot0 = m.starts_cold, m.starts_hot
    mg10 = None
    try:
        mg10 = mg10_starts_per_hour(b.horsepower, b.poles, b.load_wk2)
    except ValueError:
        pass
    if not math.isfinite(d_theta):
        wait0, wait_why = math.inf, "the start is not bounded"
    elif theta_hot + n_hot0 * d_theta > 1.0 or theta_hot <= 0.0:
        wait0 = COOL_TO_AMBIENT * tau_c0
        wait_why = f"the rotor cooling to ambient ({COOL_TO_AMBIENT:g} × τc = {wait0 / 60:.0f} min)"
    else:
        wait0 = restart_time(theta_hot, d_theta, n_hot0, tau_c0)
        wait_why = (f"the standstill cooling (τc {tau_c0 / 60:.0f} min) back to the hot state after "
                    f"{n_hot0} start(s) from hot")
    candidates = [(MIN_BETWEEN, "common-practice", "60 s, the shortest proposed (common practice)")]
    if math.isfinite(wait0):
        candidates.append((min(wait0, DAY), "maker-data" if tc_maker else "derived", wait_why))
    if mg10:
        candidates.append((mg10[1], "standard", f"the NEMA MG 10 rest of {mg10[1]:.0f} s"))
    t0, t0_src, t0_why = max(candidates, key=lambda c: c[0])
    computed(ctx, FID).update(minimum_time_between_starts=t0)

    # ---- what the relay holds
    n_cold, src_c = ctx.choose(FID, "starts_cold", n_cold0, "integer", "", src_c)
    n_hot, src_h = ctx.choose(FID, "starts_hot", n_hot0, "integer", "", src_h)
    # a restart inhibit is set in minutes, on the time-constant step (relays hold it beside the replica's constants)
    t_between, t_src = ctx.choose(FID, "minimum_time_between_starts", t0, "time", "s", t0_src, rounding="up",
                                  step_kind="time_constant")

    if not math.isfinite(d_theta):
        checks.append(Check("warn", "The start at the minimum voltage is not bounded: the start count cannot be "
                                    "checked against the rotor's heat."))
    else:
        if wait0 > DAY and not tc_maker:
            checks.append(Check("fail", f"The cooling the rotor needs between starts comes out at {wait0 / 3600:.0f} h "
                                        f"({wait_why}): a restart time of more than a day is not credible from "
                                        "computed time constants. The maker's start duty and cooling time constant "
                                        "are needed."))
        if n_cold * d_theta > 1.0:
            checks.append(Check("warn", f"{n_cold} starts from cold need {n_cold * d_theta:.0%} of the rotor's cold "
                                        "stall heat: more than the stall times allow; confirm the start duty with the "
                                        "maker."))
        if theta_hot + n_hot * d_theta > 1.0:
            checks.append(Check("warn", f"{n_hot} start(s) from hot would take the rotor to "
                                        f"{theta_hot + n_hot * d_theta:.0%} of its cold stall heat: confirm with the "
                                        "maker."))
        need = restart_time(theta_hot, d_theta, n_hot, tau_c) if theta_hot + n_hot * d_theta <= 1.0 else \
            COOL_TO_AMBIENT * tau_c
        if t_between + 1e-6 < min(need, DAY):
            checks.append(Check("warn", f"The minimum time between starts {t_between / 60:.1f} min is shorter than the "
                                        f"{need / 60:.1f} min the rotor needs at standstill (τc "
                                        f"{tau_c / 60:.0f} min) after {n_hot} start(s) from hot."))
        elif not any(c.status != "ok" for c in checks):
            checks.append(Check("ok", f"One start needs {d_theta:.0%} of the cold stall heat; after {n_hot} start(s) "
                                      f"from hot the rotor needs {need / 60:.1f} min at standstill (τc "
                                      f"{tau_c / 60:.0f} min) before the next; the inhibit holds "
                                      f"{t_between / 60:.1f} min."))
    ctx.derived["start_heat_fraction"] = Setting(d_theta if math.isfinite(d_theta) else None, "pu", "derived",
                                                 label="Rotor heat of one start / cold stall heat",
                                                 note="∫I²dt / (I_LR²·t_sc), the longest start")
    s = {
        "starts_cold": Setting(n_cold, "", src_c, label="Starts in succession from cold"),
        "starts_hot": Setting(n_hot, "", src_h, label="Starts from hot"),
        "minimum_time_between_starts": Setting(t_between, "s", t_src, label="Minimum time between starts",
                                               note=f"{t_between / 60:.1f} min"),
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
    basis = (f"{n_cold0} cold / {n_hot0} hot starts ({'maker' if src_c == 'maker-data' else 'standard duty'}); "
             f"minimum {t0 / 60:.1f} min between starts: {t0_why}.{basis_mg10}")
    return FunctionSettings(FID, "Starts supervision / restart inhibit", s, basis,
                            ["NEMA MG 1 12.54 and Part 20 start duty [value from memory]",
                             "IEC 60034-12 [value from memory]", "NEMA MG 10 Table 2-3",
                             "IEC 60255-149:2013 (standstill cooling)"], checks, tps)
