"""32 reverse-power (anti-motoring) protection of a generator.

The guide (METHODS.md §9.1): the power that motors the unit at synchronous speed depends on the prime mover. With
the maker's figure the pickup is half of it; without it, half the *lowest* motoring power of the prime mover's
range (IEEE C37.102 ranges, values from memory), so that even the most efficient unit of its kind is seen
motoring. Two stages, as practice does: a short delay supervised by the prime mover's shut-down signal (sequential
tripping: the generator breaker opens only once the prime mover has stopped driving), and a longer unsupervised
delay that rides through power swings and synchronising. The relay-side pickup is three-phase secondary watts,
P_sec = P_pri / (CTR · VTR), checked against the relay's measuring range and against the active power an angle
error of the measuring chain makes out of the reactive output.
"""

from __future__ import annotations

import math

from machines.model import Ratio
from machines.protection.base import StudyContext, timed_test_point
from machines.protection.generator_findings import pickup_share
from machines.protection.generator_injection import hold_time, power_phasors
from machines.protection.generator_terms import MOTORING_HARM, prime_mover, shutdown_signal, with_article
from machines.record import Check, FunctionSettings, Setting
from machines.standards.generator_capability import motoring_power_fraction, secondary_power

FID = "32"
PICKUP_FRACTION = 0.5  #: pickup at most half the motoring power (METHODS.md §9.1; common practice)
UNSUPERVISED_DELAY = 10.0  #: [s] METHODS.md §9.1: 5–30 s (common practice)
SUPERVISED_DELAY = 2.0  #: [s] METHODS.md §9.1: ≈ 1–3 s with the shut-down signal (common practice)
RANGE_OK = 0.01  #: pickup ≥ 1 % of the relay's nominal three-phase power: ordinary accuracy (common practice)
RANGE_FAIL = 0.001  #: below 0.1 %: beyond what the measuring chain resolves (common practice)
#: angle error of protection-class CTs (IEC 61869-2 class 5P: ±60 minutes; value from memory) [degrees]
ANGLE_ERROR = 1.0


def settings(ctx: StudyContext) -> FunctionSettings:
    """32: pickup from the motoring power, a supervised and an unsupervised stage, measuring checks."""
    basis, m = ctx.extras["generator"], ctx.case.machine
    lowest, highest = motoring_power_fraction(m.prime_mover)
    mover, signal = prime_mover(m.prime_mover), shutdown_signal(m.prime_mover)
    checks: list[Check] = []
    if m.motoring_power is not None:
        motoring, mot_src, mot_note = m.motoring_power, "maker-data", "the maker's motoring power"
    else:
        motoring, mot_src = lowest * basis.rated_power, "standard"
        mot_note = (f"{lowest:.1%} of rated power, the low end of the {lowest:.1%}–{highest:.0%} range for "
                    f"{with_article(mover)} (IEEE C37.102, value from memory)")
    ctx.derived["motoring_power"] = Setting(motoring, "W", mot_src, label="Motoring power", note=mot_note)
    watts = None if basis.vt is None else Ratio(basis.ct.factor * basis.vt.factor, 1.0)  # P_sec = P / (CTR·VTR)
    # rounded down: the pickup must stay at or below half the motoring power
    pickup, p_src = ctx.choose(FID, "pickup_power", PICKUP_FRACTION * motoring, "active_power", "W",
                               "common-practice", via=watts, rounding="down")
    delay, d_src = ctx.choose(FID, "time_delay", UNSUPERVISED_DELAY, "time", "s", "common-practice")
    sdelay, sd_src = ctx.choose(FID, "supervised_time_delay", SUPERVISED_DELAY, "time", "s", "common-practice")
    if pickup <= 0:
        checks.append(Check("fail", "The reverse-power pickup must be a positive power."))
    else:
        checks.append(pickup_share(f"Pickup {pickup / 1e3:.4g} kW", pickup / motoring,
                                   f"the motoring power {motoring / 1e3:.4g} kW", PICKUP_FRACTION,
                                   "motoring would not be detected",
                                   f" ({mot_note}): motoring is seen with margin for measuring error"))
    if m.motoring_power is None:
        checks.append(Check("warn", f"No maker's motoring power (machine.motoring_power): the pickup rests on the "
                                    f"lowest motoring power of {with_article(mover)}; measure it at commissioning (trip the "
                                    f"prime mover with the breaker closed) and enter it."))
    vt = basis.vt
    sec = None
    if vt is None:
        checks.append(Check("warn", "No VT ratio: the secondary pickup in watts and the measuring range cannot be "
                                    "checked."))
    else:
        sec = secondary_power(pickup, basis.ct.factor, vt.factor)
        nominal = math.sqrt(3.0) * vt.secondary * basis.ct.secondary
        rel = sec / nominal
        text = (f"Relay-side pickup {sec:.4g} W three-phase (CTR {basis.ct.factor:g} × VTR {vt.factor:g}) is "
                f"{rel:.2%} of the relay's nominal {nominal:.4g} W (√3·{vt.secondary:g} V·{basis.ct.secondary:g} A)")
        if rel >= RANGE_OK:
            checks.append(Check("ok", text + "."))
        elif rel >= RANGE_FAIL:
            checks.append(Check("warn", text + ": a sensitive, phase-angle-compensated element and metering-class "
                                               "CTs are advisable."))
        else:
            checks.append(Check("fail", text + ": below what the CT/VT and relay measure reliably; use dedicated "
                                               "CTs or a lower CT ratio"
                                + ("; the maker's motoring power (machine.motoring_power), usually above the low "
                                   "end of the range, may allow a higher pickup." if m.motoring_power is None
                                   else ".")))
    q_rated = m.rated_apparent_power * math.sqrt(max(0.0, 1.0 - m.power_factor ** 2))
    false_p = q_rated * math.sin(math.radians(ANGLE_ERROR))
    if pickup <= false_p:
        checks.append(Check("warn", f"An angle error of {ANGLE_ERROR:g}° in the CTs and VTs (protection class) turns "
                                    f"the rated reactive output {q_rated / 1e6:.4g} Mvar into {false_p / 1e3:.4g} kW "
                                    f"of apparent active power, not less than the pickup: use metering-class CTs or "
                                    f"the relay's angle compensation and prove the pickup at commissioning."))
    if sdelay >= delay:
        checks.append(Check("warn", f"Supervised delay {sdelay:g} s is not shorter than the unsupervised {delay:g} s."))
    values = {
        "pickup_power": Setting(pickup, "W", p_src, secondary=sec, secondary_unit="" if sec is None else "W",
                                label="Pickup (reverse power, three-phase)",
                                note=f"{PICKUP_FRACTION:.0%} of the motoring power" if p_src != "override" else ""),
        "time_delay": Setting(delay, "s", d_src, label="Stage 2 delay, unsupervised"),
        "supervised_time_delay": Setting(sdelay, "s", sd_src, label=f"Stage 1 delay, with '{signal}'"),
    }
    tests = _tests(basis, pickup, delay, sdelay, signal)
    basis_text = (f"Motoring power {motoring / 1e3:.4g} kW ({mot_note}); pickup {PICKUP_FRACTION:.0%} of it. Stage 1 "
                  f"trips after {sdelay:g} s when the '{signal}' input confirms the {mover} is shut down "
                  f"(sequential tripping); stage 2 trips after {delay:g} s without it, riding through power swings "
                  f"and synchronising. Motoring harms the {mover}: {MOTORING_HARM.get(m.prime_mover, '')}.")
    return FunctionSettings(FID, "Reverse power (anti-motoring)", values, basis_text,
                            references=["IEEE C37.102 (motoring power ranges, from memory)"], checks=checks,
                            test_points=tests)


def _tests(basis, pickup: float, delay: float, sdelay: float, signal: str) -> list:
    vt, ct = basis.vt, basis.ct
    v_sec = basis.rated_secondary_voltage
    to_sec = (lambda p: p) if vt is None else (lambda p: secondary_power(p, ct.factor, vt.factor))
    unit = "W" if vt is not None else "W (primary)"
    on, off = f"'{signal}' input on", f"'{signal}' input off"

    def tp(p_primary: float, expected, state: str, description: str, duration=None):
        p_sec = to_sec(p_primary)
        if vt is None:
            phases, volts = None, None
        else:
            phases, volts = power_phasors(-p_sec, 0.0, v_sec)
        return timed_test_point("reverse active power" if p_primary > 0 else "active power", abs(p_sec), unit,
                                expected, applied_primary=abs(p_primary), primary_unit="W", initial_state=state,
                                phases=phases, voltage_phases=volts, description=description, duration=duration)

    forward = 0.5 * basis.rated_power
    return [tp(0.8 * pickup, None, on, "80 % of pickup, reverse: must not trip", hold_time(delay)),
            tp(1.5 * pickup, delay, off, "150 % of pickup, reverse, no shut-down signal: stage 2"),
            tp(1.5 * pickup, sdelay, on, "150 % of pickup, reverse, with the shut-down signal: stage 1"),
            tp(-forward, None, on, "50 % of rated power exported (forward): must not trip", hold_time(delay))]
