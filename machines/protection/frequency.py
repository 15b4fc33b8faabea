"""81U / 81O frequency protection of a generator, between the system's ride-through requirement and the maker's
off-frequency bands.

The guide (IEEE C37.106; METHODS.md §8.1, 8.2, 8.5): turbine limits are bands with a time allowance accumulated
over the turbine's life. One trip stage sits at the edge of each restricted band, with a delay that lets a single
event use only a small fraction of the band's allowance; underfrequency stages sit below the system's lowest
load-shedding stage and time out after the shedding, so that the shedding programme acts first. The system's
ride-through requirement (bands in which the unit must stay connected for a minimum time) then sets a floor under
every delay: a stage that picks up inside a required band waits at least that band's time with a margin, and no
stage picks up inside a band of continuous operation. Where the maker's limits and the requirement cannot both be
met, the study fails and says so. Without maker bands a steam or gas turbine gets conservative stages, labelled as
such, and a warning.
"""

from __future__ import annotations

import math

from machines.errors import InputError
from machines.protection.base import StudyContext, balanced, timed_test_point
from machines.protection.generator_injection import hold_time
from machines.protection.generator_terms import is_turbine, prime_mover, with_article
from machines.record import Check, FunctionSettings, Setting
from machines.standards.frequency import band_consumption, band_containing

EVENT_FRACTION = 0.10  #: one event may use at most 10 % of a band's allowance (common practice)
LS_FREQUENCY_MARGIN = 0.1  #: [Hz] generator stages at least this far below the lowest shedding stage (common practice)
LS_TIME_MARGIN = 0.3  #: [s] generator stages this much slower than the slowest shedding stage (common practice)
MINIMUM_DELAY = 0.5  #: [s] shortest generator frequency-stage delay (common practice, no published source)
MAX_STAGES = 4  #: stages a typical relay offers per direction
#: Conservative stages without maker bands, (frequency in pu of nominal, delay [s]); common practice, no published
#: source: well inside typical turbine restricted regions and slow enough to ride through system swings.
CONSERVATIVE_UNDER = ((0.975, 30.0), (0.96, 1.0))
CONSERVATIVE_OVER = ((1.025, 30.0), (1.04, 1.0))
RIDE_THROUGH_MARGIN = 0.10  #: delays at least 10 % longer than a required ride-through time (common practice)
PROBE = 0.05  #: [Hz] test-point offset beyond a stage
CONTINUOUS = 1e7  #: [s] a band allowance this long is continuous operation
EDGE = 1e-6  #: [Hz] a stage at a band edge times in the band beyond it


def _band_stages(bands, f0: float, under: bool) -> list[dict]:
    """One stage per restricted band beyond nominal: frequency at the band's inner edge, delay a fraction of its
    allowance; and a stage with the minimum delay at the outer edge of the outermost band, beyond which the maker
    allows no operation (IEEE C37.106: the prohibited region)."""
    side = [b for b in bands if (b.high <= f0 + 1e-9 if under else b.low >= f0 - 1e-9)]
    side.sort(key=lambda b: -b.high if under else b.low)
    stages = []
    for b in side:
        f = b.high if under else b.low
        if b.allowed >= CONTINUOUS:
            continue
        stages.append({"frequency": f, "time_delay": max(EVENT_FRACTION * b.allowed, MINIMUM_DELAY)})
    if side and side[-1].allowed > 0:  # beyond the outermost band the maker allows no operation: a fast stage
        outer = side[-1]                 # at its outer edge (a band given with 0 s already has its stage)
        stages.append({"frequency": outer.low if under else outer.high, "time_delay": MINIMUM_DELAY})
    return stages


def _coordinate(stages: list[dict], bands, ls, notes: list[str]) -> list[dict]:
    """Move underfrequency stages below and after the load shedding; delays from the band the stage lands in."""
    if not ls:
        return stages
    f_ls = min(s.frequency for s in ls) - LS_FREQUENCY_MARGIN
    t_ls = max(s.time_delay for s in ls) + LS_TIME_MARGIN
    out = []
    for st in stages:
        f, t = st["frequency"], st["time_delay"]
        if f > f_ls:
            notes.append(f"stage at {f:.4g} Hz moved to {f_ls:.4g} Hz, below the lowest load-shedding stage")
            f = f_ls
            i = band_containing(f - EDGE, bands)
            if i is not None:
                t = max(EVENT_FRACTION * bands[i].allowed, MINIMUM_DELAY)
        out.append({"frequency": f, "time_delay": max(t, t_ls)})
    merged: dict[float, float] = {}
    for st in out:
        key = round(st["frequency"], 6)
        merged[key] = min(merged.get(key, math.inf), st["time_delay"])
    return [{"frequency": f, "time_delay": t} for f, t in sorted(merged.items(), reverse=True)]


def _overlaps(b, f: float, under: bool) -> bool:
    """Whether a stage at ``f`` picks up for some frequency inside band ``b``."""
    return b.low < f if under else b.high > f


def _ride_through(stages: list[dict], rt, under: bool, notes: list[str]) -> list[dict]:
    """Move stages out of bands of continuous operation and lengthen delays to the required ride-through times."""
    out = []
    for st in stages:
        f, t = st["frequency"], st["time_delay"]
        for b in sorted((b for b in rt if b.minimum_time >= CONTINUOUS), key=lambda b: -b.low if under else b.high):
            if _overlaps(b, f, under):
                edge = b.low if under else b.high
                notes.append(f"stage at {f:.4g} Hz moved to {edge:.4g} Hz, outside the band of continuous operation")
                f = edge
        need = [b.minimum_time * (1.0 + RIDE_THROUGH_MARGIN) for b in rt
                if b.minimum_time < CONTINUOUS and _overlaps(b, f, under)]
        if need and max(need) > t:
            notes.append(f"delay at {f:.4g} Hz lengthened from {t:.4g} s to {max(need):.4g} s for the ride-through "
                         f"requirement")
            t = max(need)
        out.append({"frequency": f, "time_delay": t})
    return out


def _prune(stages: list[dict], under: bool) -> list[dict]:
    """Stages in order away from nominal, without any that a nearer stage with no longer delay makes redundant."""
    ordered = sorted(stages, key=lambda s: (-s["frequency"] if under else s["frequency"], s["time_delay"]))
    kept: list[dict] = []
    for st in ordered:
        if any(k["time_delay"] <= st["time_delay"] + 1e-9 for k in kept):
            continue  # a stage nearer nominal picks up first and is no slower
        kept.append(st)
    return kept


def _overrides(ctx: StudyContext, fid: str, stages: list[dict], source: str) -> tuple[list[dict], str]:
    out, src = [], source
    for i, st in enumerate(stages, start=1):
        # rounded away from nominal and delays up: both keep the ride-through and load-shedding margins
        f, fs = ctx.choose(fid, f"stage{i}_frequency", st["frequency"], "frequency", "Hz", source,
                           rounding="down" if fid == "81U" else "up")
        t, ts = ctx.choose(fid, f"stage{i}_time_delay", st["time_delay"], "time", "s", source, rounding="up")
        if "override" in (fs, ts):
            src = "override"
        out.append({"frequency": f, "time_delay": t})
    return out, src


def _side(bands, f0: float, under: bool):
    return [b for b in bands if (b.high <= f0 + 1e-9 if under else b.low >= f0 - 1e-9)]


def _conflicts(bands, rt, f0: float, under: bool, checks: list[Check]) -> None:
    """Where the system requires more time in a band than the maker allows there: fail, naming both."""
    for r in rt:
        for b in _side(bands, f0, under):
            if b.low < r.high and r.low < b.high and b.allowed < r.minimum_time:
                need = "continuous operation" if r.minimum_time >= CONTINUOUS else f"{r.minimum_time:.4g} s"
                checks.append(Check("fail", f"The system requires the unit to stay connected at {r.low:.4g}–"
                                            f"{r.high:.4g} Hz ({need}), but the maker allows only {b.allowed:.4g} s "
                                            f"in {b.low:.4g}–{b.high:.4g} Hz: the two cannot both be met; agree the "
                                            f"band with the system operator and the maker."))


def _ride_through_checks(stages: list[dict], rt, under: bool, checks: list[Check]) -> None:
    bad = 0
    for i, st in enumerate(stages, start=1):
        f, t = st["frequency"], st["time_delay"]
        for b in rt:
            if not _overlaps(b, f, under):
                continue
            band = f"{b.low:.4g}–{b.high:.4g} Hz"
            if b.minimum_time >= CONTINUOUS:
                checks.append(Check("fail", f"Stage {i} ({f:.4g} Hz) picks up inside {band}, where the system "
                                            f"requires continuous operation."))
                bad += 1
            elif t <= b.minimum_time:
                checks.append(Check("fail", f"Stage {i} ({f:.4g} Hz, {t:.4g} s) trips before the {b.minimum_time:.4g} s "
                                            f"the system requires the unit to ride through at {band}."))
                bad += 1
            elif t < b.minimum_time * (1.0 + RIDE_THROUGH_MARGIN) * (1 - 1e-9):
                checks.append(Check("warn", f"Stage {i} ({f:.4g} Hz, {t:.4g} s) rides through the "
                                            f"{b.minimum_time:.4g} s required at {band} with less than "
                                            f"{RIDE_THROUGH_MARGIN:.0%} margin."))
                bad += 1
    if not bad:
        checks.append(Check("ok", "Every stage rides through the system's required bands ("
                                  + "; ".join(f"{b.low:.4g}–{b.high:.4g} Hz "
                                              + ("continuously" if b.minimum_time >= CONTINUOUS
                                                 else f"{b.minimum_time:.4g} s") for b in rt)
                                  + f") with at least {RIDE_THROUGH_MARGIN:.0%} margin."))


def _function(ctx: StudyContext, under: bool) -> FunctionSettings:
    case = ctx.case
    m, s = case.machine, case.supply
    f0 = m.frequency
    fid = "81U" if under else "81O"
    bands = list(m.frequency_limits)
    rt = [b for b in s.ride_through if (b.low < f0 if under else b.high > f0)]
    checks: list[Check] = []
    notes: list[str] = []
    stages = _band_stages(bands, f0, under)
    mover = prime_mover(m.prime_mover)
    if stages:
        source = "maker-data"
        how = (f"one stage at the inner edge of each of the maker's restricted bands, delay {EVENT_FRACTION:.0%} of "
               f"the band's accumulated allowance (at least {MINIMUM_DELAY:g} s), and a {MINIMUM_DELAY:g} s stage at "
               "the outer edge of the outermost band, beyond which the maker allows no operation")
    else:
        source = "common-practice"
        table = CONSERVATIVE_UNDER if under else CONSERVATIVE_OVER
        stages = [{"frequency": round(k * f0, 3), "time_delay": t} for k, t in table]
        how = "starting stages labelled as such (common practice, no published source)"
        if is_turbine(m.prime_mover):
            checks.append(Check("warn", f"No maker's off-frequency bands {'below' if under else 'above'} nominal "
                                        f"for this {mover}: starting stages are proposed; enter "
                                        f"machine.frequency_limits from the turbine maker (blade-resonance limits)."))
        else:
            checks.append(Check("ok", f"No maker's bands: {with_article(mover)} has no blade-resonance limits; the stages "
                                      f"protect the machine and its auxiliaries."))
    if under:
        stages = _coordinate(stages, bands, s.load_shedding_stages, notes)
    if rt:
        stages = _ride_through(stages, rt, under, notes)
        if source == "common-practice":  # beyond the required bands a fast stage protects the machine
            edge = min(b.low for b in rt) if under else max(b.high for b in rt)
            stages.append({"frequency": edge, "time_delay": MINIMUM_DELAY})
            how += (f", delays lengthened to the system's ride-through requirement, and a {MINIMUM_DELAY:g} s stage "
                    f"at {edge:.4g} Hz, beyond the required bands")
    stages = _prune(stages, under)
    if len(stages) > MAX_STAGES:
        checks.append(Check("warn", f"{len(stages)} stages proposed; a relay usually offers {MAX_STAGES}: the "
                                    f"{len(stages) - MAX_STAGES} furthest from nominal are dropped and left to the "
                                    f"band accumulator."))
        stages = stages[:MAX_STAGES]
    stages, source = _overrides(ctx, fid, stages, source)
    for i, st in enumerate(stages, start=1):
        f, t = st["frequency"], st["time_delay"]
        if (under and f >= f0) or (not under and f <= f0) or t < 0:
            side = "below" if under else "above"
            raise InputError(f"overrides.{fid}.stage{i}_frequency", f"expected a frequency {side} {f0:g} Hz and a "
                                                                   f"delay ≥ 0, got {f:g} Hz / {t:g} s")
        j = band_containing(f - EDGE if under else f + EDGE, bands)
        if j is not None:
            use = band_consumption(t, bands[j].allowed)
            b = bands[j]
            if bands[j].allowed <= 0.0:
                checks.append(Check("warn", f"Stage {i} ({f:.4g} Hz, {t:.3g} s) times inside the maker's prohibited "
                                            f"band {b.low:.4g}–{b.high:.4g} Hz: shorten the delay to the minimum."))
            elif use <= 0.25:
                checks.append(Check("ok", f"Stage {i} ({f:.4g} Hz, {t:.3g} s) uses at most {use:.1%} of the "
                                          f"{b.low:.4g}–{b.high:.4g} Hz band's allowance ({b.allowed:.4g} s) per "
                                          f"event."))
            elif use <= 1.0:
                checks.append(Check("warn", f"Stage {i} ({f:.4g} Hz, {t:.3g} s) lets one event use {use:.0%} of the "
                                            f"{b.low:.4g}–{b.high:.4g} Hz band's allowance ({b.allowed:.4g} s)."))
            else:
                checks.append(Check("fail", f"Stage {i} ({f:.4g} Hz, {t:.3g} s) lets one event exceed the "
                                            f"{b.low:.4g}–{b.high:.4g} Hz band's whole allowance ({b.allowed:.4g} s)."))
    _conflicts(bands, rt, f0, under, checks)
    if rt:
        _ride_through_checks(stages, rt, under, checks)
    elif not case.supply_given:
        checks.append(Check("warn", "No [supply]: the system's ride-through requirement is unknown; the stages are "
                                    "not checked against it."))
    else:
        checks.append(Check("warn", "No ride-through requirement given (supply.ride_through): the stages are not "
                                    "checked against the system's; grid codes commonly require minutes at a few per "
                                    "cent off nominal."))
    if under and s.load_shedding_stages:
        f_ls = min(x.frequency for x in s.load_shedding_stages)
        t_ls = max(x.time_delay for x in s.load_shedding_stages)
        for i, st in enumerate(stages, start=1):
            if st["frequency"] >= f_ls or st["time_delay"] <= t_ls:
                checks.append(Check("fail", f"Stage {i} ({st['frequency']:.4g} Hz, {st['time_delay']:.3g} s) is not "
                                            f"below and after the load shedding (lowest stage {f_ls:.4g} Hz, "
                                            f"slowest {t_ls:.3g} s): the unit would trip before the shedding "
                                            f"programme acts."))
        if all(st["frequency"] < f_ls and st["time_delay"] > t_ls for st in stages):
            checks.append(Check("ok", f"All stages are below the lowest load-shedding stage ({f_ls:.4g} Hz) and "
                                      f"slower than the slowest ({t_ls:.3g} s)."))
    elif under:
        checks.append(Check("warn", "No load-shedding stages given (supply.load_shedding_stages): coordination with "
                                    "the system's shedding programme is not checked."))
    rocof = ctx.extras.get("initial_rocof")
    if under and rocof is not None and rocof < 0 and stages:
        f1 = stages[0]["frequency"]
        checks.append(Check("ok", f"Loss of this unit on the islanded system: initial RoCoF {rocof:.3g} Hz/s "
                                  f"(swing equation); at that rate the frequency would reach {f1:.4g} Hz in "
                                  f"{(f0 - f1) / -rocof:.3g} s unless the load shedding arrests it."))
    if bands:
        checks.append(Check("ok", "Enable the relay's band accumulators (one per maker band) with an alarm at "
                                  "50–80 % of each allowance; the accumulated life use, not the stages, protects "
                                  "the turbine from repeated excursions."))
    tests = _tests(ctx, stages, under)
    values = {"stages": Setting(stages, "", source, label="Stages (frequency / delay)",
                                note="; ".join(notes))}
    basis_text = (f"Stages {'below' if under else 'above'} {f0:g} Hz: {how}."
                  + (" Underfrequency stages sit below and after the system's load-shedding stages (margins "
                     f"{LS_FREQUENCY_MARGIN:g} Hz and {LS_TIME_MARGIN:g} s)." if under else "")
                  + (f" Every delay is at least {RIDE_THROUGH_MARGIN:.0%} longer than the time the system requires the "
                     f"unit to ride through in the bands the stage picks up in." if rt else ""))
    title = "Underfrequency" if under else "Overfrequency"
    return FunctionSettings(fid, title, values, basis_text, references=["IEEE C37.106", "IEEE C37.102"],
                            checks=checks, test_points=tests)


def _tests(ctx: StudyContext, stages: list[dict], under: bool) -> list:
    """0.05 Hz beyond each stage (the fastest stage crossed operates, every stage enabled), and just inside the
    first: rated voltage, balanced."""
    basis = ctx.extras["generator"]
    v = basis.rated_secondary_voltage
    volts = None if v is None else balanced(v)

    def operate(f: float) -> float | None:
        times = [st["time_delay"] for st in stages if (f < st["frequency"] if under else f > st["frequency"])]
        return min(times) if times else None

    tests = []
    for i, st in enumerate(stages, start=1):
        f = st["frequency"] - PROBE if under else st["frequency"] + PROBE
        t = operate(f)
        tests.append(timed_test_point("frequency", f, "Hz", t, frequency=f, voltage_phases=volts,
                                      description=f"stage {i}: {PROBE:g} Hz beyond the setting, rated voltage"))
    if stages:
        f = stages[0]["frequency"] + PROBE if under else stages[0]["frequency"] - PROBE
        tests.append(timed_test_point("frequency", f, "Hz", operate(f), frequency=f, voltage_phases=volts,
                                      description=f"stage 1: {PROBE:g} Hz inside the setting: must not trip",
                                      duration=hold_time(stages[0]["time_delay"])))
    return tests


def underfrequency(ctx: StudyContext) -> FunctionSettings:
    """81U stages."""
    return _function(ctx, under=True)


def overfrequency(ctx: StudyContext) -> FunctionSettings:
    """81O stages."""
    return _function(ctx, under=False)
