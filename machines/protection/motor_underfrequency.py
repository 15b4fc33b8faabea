"""81U underfrequency of a motor that takes part in load shedding (only when supply.underfrequency_stages is given).

The stages are the system's load-shedding plan, entered by the engineer; the rule copies them and checks that each
is below the rated frequency, that lower stages act no slower than higher ones, and that delays ride through
measurement transients (≥ 0.1 s [P]; METHODS.md §8.2).
"""

from __future__ import annotations

from machines.protection.base import StudyContext, timed_test_point
from machines.record import Check, FunctionSettings, Setting

FID = "81U"
MIN_DELAY = 0.1  #: [s] [P]
TEST_STEP = 0.05  #: test this far below / above the stage [Hz]


def settings(ctx: StudyContext) -> FunctionSettings | None:
    stages_in = ctx.case.supply.underfrequency_stages
    if not stages_in:
        return None
    f_n = ctx.case.machine.frequency
    checks: list[Check] = []
    stages = [{"frequency": st.frequency, "time_delay": st.time_delay} for st in stages_in]
    for i, st in enumerate(stages):
        if st["frequency"] >= f_n:
            checks.append(Check("fail", f"81U stage {i + 1} at {st['frequency']:g} Hz is not below the rated "
                                        f"frequency {f_n:g} Hz."))
        if st["time_delay"] < MIN_DELAY:
            checks.append(Check("warn", f"81U stage {i + 1} delay {st['time_delay']:g} s is below {MIN_DELAY:g} s: "
                                        "measurement transients may trip it."))
    ordered = sorted(stages, key=lambda s: -s["frequency"])
    for hi, lo in zip(ordered, ordered[1:]):
        if lo["time_delay"] > hi["time_delay"]:
            checks.append(Check("warn", f"81U stage at {lo['frequency']:g} Hz is slower than the one at "
                                        f"{hi['frequency']:g} Hz: a deeper fall should shed no later."))
    if not any(c.status != "ok" for c in checks):
        checks.append(Check("ok", f"{len(stages)} load-shedding stage(s) below {f_n:g} Hz with sensible delays."))
    tps = []
    for st in ordered:
        tps.append(timed_test_point("frequency", st["frequency"] + TEST_STEP, "Hz", None,
                                    description=f"ramp to {st['frequency'] + TEST_STEP:g} Hz: must not operate"))
        tps.append(timed_test_point("frequency", st["frequency"] - TEST_STEP, "Hz", st["time_delay"],
                                    description=f"step to {st['frequency'] - TEST_STEP:g} Hz: sheds after the delay"))
    s = {"stages": Setting(stages, "", "entered", label="Stages (frequency, delay)")}
    basis = "Load-shedding stages as given by the system's shedding plan; checked for order and delays."
    return FunctionSettings(FID, "Underfrequency (load shedding)", s, basis, ["NERC PRC-006 (under-frequency load shedding) [value from memory]"], checks, tps)
