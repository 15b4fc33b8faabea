"""Commissioning waveforms from a settings record: what a three-phase test set plays for each test point, and for a
motor its start and a stall.

Everything is read from the record's plain data (``SettingsRecord.to_json()``), never from the study: each test
point's ``input``, ``phases``, ``voltage_phases``, ``current_phases``, ``frequency``, ``duration`` and ``prefault``;
the motor's ``start_profiles``; the instrument transformers in ``inputs.instruments``. A waveform is a state
sequence: a pre-test state of at least :data:`PRE_TEST` seconds, then the injection, each state a set of phasors
(relay-side RMS values and angles, A-B-C) at one frequency,

    x(t) = √2·|X|·cos(θ(t) + ∠X),   θ(t) = θ_k + 2π·f_k·(t − t_k) in state k,

with the reference angle θ continuous from one state to the next, so a change of frequency keeps the phase. A
motor start follows the record's RMS current against time (linear between the record's points), so its RMS
envelope is the curve the sheet draws; the record models no DC offset, and none is added.

Choices of this module (METHODS.md §12.4; common practice for test-set files, no published source): the pre-test
state holds the record's ``prefault``; without one, phase voltages are healthy (the nominal voltage, balanced, at
the system frequency) and everything else is zero (a cold replica, a de-energised input). A frequency other than
the system's applies to every channel, except a harmonic (2f, 3f, …), which is injected on the quantity under test
only. A timed test injects for the
expected time plus max(1 s, 20 %) (longer when the record's ``duration`` says so); a "must not operate" test for the
record's ``duration``, or, when it gives none, for the longest operate time of the same function plus that margin.
Sampling is :data:`MAIN_PER_CYCLE` samples a cycle; a file that would exceed :data:`MAX_FILE_BYTES` keeps that rate
for the first second of the injection and the operate window and uses a lower rate, never below
:data:`MIN_PER_CYCLE` samples a cycle of the highest frequency, in between; a test too long even for that gets no
file and is played as a state sequence from the test plan.
"""

from __future__ import annotations

import cmath
import datetime as dt
import math
from dataclasses import dataclass, field

import numpy as np

from machines.errors import InputError
from machines.files import parse_ratio, parse_value, safe_file_stem, section_specs
from machines.frozen import frozen
from machines.model import Ratio
from machines.standards.accuracy import operate_time_tolerance
from machines.standards.unbalance import sequence_components
from reports.comtrade import Channel, Recording, needs_32_bit, record_size, sample_times
from reports.notices import CAUTION_LINE

PRE_TEST = 1.0  #: pre-test interval in the initial state [s]
MAIN_PER_CYCLE = 64  #: samples per cycle of the system frequency, main rate
MIN_PER_CYCLE = 20  #: fewest samples per cycle of the highest frequency in a file, anywhere in it
MAX_FILE_BYTES = 20_000_000  #: largest .dat written [bytes]
MARGIN_MIN, MARGIN_FRACTION = 1.0, 0.2  #: injection margin past the expected time: max(1 s, 20 %)
FULL_RATE_HEAD = 1.0  #: seconds of the injection kept at the main rate after its start (and before the window)
MATCH = 0.01  #: relative agreement asked of the record's phasors with the test point's stated quantity

SQRT2 = math.sqrt(2.0)


class NoWaveform(Exception):
    """A test point that gets no file: ``kind`` ``"none"`` (no injection, e.g. a starts counter), ``"record"``
    (the record's phasors contradict the test point) or ``"size"`` (too long for one file)."""

    def __init__(self, kind: str, reason: str):
        super().__init__(reason)
        self.kind, self.reason = kind, reason


@frozen
class System:
    """What the record's inputs say about the system the relay sits on."""

    frequency: float  #: system (rated) frequency [Hz]
    nominal_voltage: float | None  #: nominal line-to-line voltage of the relay's VT [V primary]
    rated_voltage: float | None  #: the machine's rated line-to-line voltage [V primary]
    ratios: dict[str, Ratio] = field(default_factory=dict)  #: instrument transformers by their file key


@frozen
class Group:
    """Channels fed from one instrument transformer: three phases (A, B, C) or one (N)."""

    key: str
    names: tuple[str, ...]
    phases: tuple[str, ...]
    unit: str
    circuit: str
    ratio: Ratio | None


@dataclass
class State:
    """One state of a sequence: from ``start`` [s], at ``frequency`` [Hz] (``frequencies``: a group at another
    one, e.g. a harmonic), the phasors of each group (relay-side RMS, complex), and optionally an RMS envelope per
    group: (times from ``start`` [s], factors)."""

    start: float
    frequency: float
    phasors: dict[str, list[complex]]
    envelopes: dict[str, tuple[np.ndarray, np.ndarray]] = field(default_factory=dict)
    frequencies: dict[str, float] = field(default_factory=dict)

    def frequency_of(self, key: str) -> float:
        return self.frequencies.get(key, self.frequency)


def harmonic(frequency: float, system_frequency: float) -> int:
    """The harmonic order of an injection frequency (2, 3, …), or 0 when it is a (possibly off-nominal) system
    frequency: a harmonic is injected on the quantity under test only, a frequency change on every channel.

    >>> harmonic(180.0, 60.0), harmonic(58.45, 60.0), harmonic(60.0, 60.0)
    (3, 0, 0)
    """
    n = round(frequency / system_frequency)
    return n if n >= 2 and abs(frequency - n * system_frequency) <= 1e-6 * frequency else 0


@dataclass
class Design:
    """A waveform before sampling: channels, states, length, sampling and what the technician expects."""

    stem: str
    title: str
    groups: list[Group]
    states: list[State]
    total: float  #: length of the file [s]
    trigger: float  #: start of the injection [s]
    segments: list[tuple[float, float]]  #: (rate [Hz], end [s])
    wide: bool
    expected: float | None  #: operate time after the trigger [s], None: must not operate
    band: tuple[float, float] | None
    pre_text: str
    lines: list[str]

    @property
    def injection(self) -> float:
        return self.total - self.trigger


# ---------------------------------------------------------------------------------------------------- the system


def system_of(record: dict) -> System:
    """Frequency, voltages and instrument-transformer ratios from the record's inputs (as entered in the file)."""
    inputs = record.get("inputs") or {}
    specs = section_specs(record["kind"])
    machine, supply = inputs.get("machine") or {}, inputs.get("supply") or {}

    def quantity(section: str, key: str, table: dict) -> float | None:
        raw = table.get(key)
        return None if raw is None else float(parse_value(specs[section][key], raw, f"{section}.{key}"))

    frequency = quantity("machine", "frequency", machine)
    if frequency is None:
        raise InputError("machine.frequency", "the record gives no system frequency; expected e.g. '60 Hz'")
    rated = quantity("machine", "rated_voltage", machine)
    nominal = quantity("supply", "nominal_voltage", supply) if "nominal_voltage" in supply else rated
    ratios: dict[str, Ratio] = {}
    for key, raw in (inputs.get("instruments") or {}).items():
        if isinstance(raw, str) and ("/" in raw or ":" in raw) and not key.endswith(("_class", "_burden")):
            ratios[key] = parse_ratio(raw, f"instruments.{key}", "A" if key.endswith("ct") else "V")
    grounding = inputs.get("grounding") or {}
    if isinstance(grounding.get("transformer_ratio"), str):
        ratios["grounding_transformer"] = parse_ratio(grounding["transformer_ratio"], "grounding.transformer_ratio",
                                                      "V")
    return System(frequency, nominal, rated, ratios)


# ---------------------------------------------------------------------------------------------------- channels


def _ratio(system: System, *keys: str) -> tuple[str, Ratio | None]:
    for key in keys:
        if key in system.ratios:
            return key, system.ratios[key]
    return "", None


_CIRCUIT = {"phase_ct": "phase CT", "vt": "phase VT", "ground_ct": "core-balance CT", "neutral_ct": "neutral CT",
            "differential_ct": "differential CT", "neutral_vt": "neutral VT",
            "grounding_transformer": "grounding transformer"}


def _group(key: str, unit: str, names: tuple[str, ...], system: System, ratio_keys: tuple[str, ...],
           circuit: str = "") -> Group:
    rkey, ratio = _ratio(system, *ratio_keys)
    text = circuit or _CIRCUIT.get(rkey, rkey.replace("_", " "))
    if ratio is None:
        text = f"{text or 'input'} (ratio not given)"
    phases = ("N",) if len(names) == 1 else ("A", "B", "C")
    return Group(key, names, phases, unit, text, ratio)


def _main_group(tp: dict, system: System) -> Group:
    """The channels of the test point's ``phases``, by its ``input`` and ``applied_unit``."""
    unit, inp = tp.get("applied_unit"), tp.get("input") or "phase"
    if unit not in ("A", "V"):
        # a test of a power, an impedance or a ratio: ``phases`` are the phase currents that, with the test's
        # ``voltage_phases``, make the quantity under test (the settings record's convention)
        if inp != "phase" or tp.get("voltage_phases") is None:
            raise NoWaveform("record", f"phases are given for a test in {unit or 'no unit'} without the voltages "
                                       "that go with them")
        unit = "A"
    if inp == "phase":
        return (_group("I", "A", ("IA", "IB", "IC"), system, ("phase_ct",)) if unit == "A" else
                _group("V", "V", ("VA", "VB", "VC"), system, ("vt",)))
    if inp == "differential" and unit == "A":
        circuit = "" if "differential_ct" in system.ratios else "phase CT (differential input)"
        return _group("I", "A", ("IA", "IB", "IC"), system, ("differential_ct", "phase_ct"), circuit)
    if inp in ("ground", "neutral") and unit == "A":
        keys = ("ground_ct", "neutral_ct") if inp == "ground" else ("neutral_ct", "ground_ct")
        if inp == "ground" and not any(k in system.ratios for k in keys):  # residual connection of the phase CTs
            return _group("N", "A", ("IN",), system, ("phase_ct",), "residual of the phase CTs")
        return _group("N", "A", ("IN",), system, keys)
    if inp in ("ground", "neutral") and unit == "V":
        return _group("N", "V", ("VN",), system, ("neutral_vt", "grounding_transformer"))
    raise NoWaveform("record", f"input {inp!r} with {unit} is not a relay input this writer knows; expected "
                               "phase, ground, neutral or differential")


def _groups(tp: dict, system: System) -> dict[str, Group]:
    """Field of the test point → its channels (``phases``, ``current_phases``, ``voltage_phases``)."""
    out: dict[str, Group] = {}
    if tp.get("phases") is not None:
        out["phases"] = _main_group(tp, system)
    used = {n for g in out.values() for n in g.names}
    if tp.get("current_phases") is not None:
        names = ("IA", "IB", "IC") if "IA" not in used else ("IA2", "IB2", "IC2")
        out["current_phases"] = _group("I2" if "IA" in used else "I", "A", names, system, ("phase_ct",))
    if tp.get("voltage_phases") is not None:
        names = ("VA", "VB", "VC") if "VA" not in used else ("VA2", "VB2", "VC2")
        out["voltage_phases"] = _group("V2" if "VA" in used else "V", "V", names, system, ("vt",))
    return out


def _complex(phasors: list[dict] | None, n: int) -> list[complex]:
    if not phasors:
        return [0j] * n
    return [cmath.rect(float(p.get("magnitude") or 0.0), math.radians(float(p.get("angle") or 0.0)))
            for p in phasors[:n]] + [0j] * max(0, n - len(phasors))


def _balanced(magnitude: float, angle: float = 0.0) -> list[complex]:
    return [cmath.rect(magnitude, math.radians(angle + shift)) for shift in (0.0, -120.0, 120.0)]


def healthy_voltage(system: System) -> float | None:
    """Nominal phase-to-neutral voltage on the phase VT's secondary [V], or None without a VT or a voltage.

    >>> round(healthy_voltage(System(60.0, 4160.0, 4000.0, {"vt": Ratio(4200.0, 120.0)})), 3)
    68.622
    """
    vt = system.ratios.get("vt")
    if vt is None or not system.nominal_voltage:
        return None
    return vt.to_secondary(system.nominal_voltage / math.sqrt(3.0))


# ---------------------------------------------------------------------------------------------------- checks


def _close(a: float, b: float) -> bool:
    return abs(a - b) <= MATCH * max(abs(a), abs(b)) + 1e-9


def mismatch(tp: dict, injection_frequency: float, system: System) -> str | None:
    """What the record's phasors contradict in the test point's own statement, or None.

    Checked only where the quantity's name defines it: negative sequence (|X2|), phase-to-phase (largest |Xa − Xb|),
    earth-fault / neutral / residual / zero sequence (the single channel, or |Xa + Xb + Xc| on phase inputs), the
    third harmonic (injection at 3·f), plain phase current or voltage (largest |X|), and a frequency in Hz.

    >>> s = System(60.0, None, None)
    >>> tp = {"quantity": "negative-sequence current", "applied": 1.0, "applied_unit": "A", "input": "phase",
    ...       "phases": [{"magnitude": 1.0, "angle": 0.0}, {"magnitude": 1.0, "angle": -120.0},
    ...                  {"magnitude": 1.0, "angle": 120.0}]}
    >>> mismatch(tp, 60.0, s)
    'the phasors carry a negative-sequence current of 0 A, not the 1 A the test states'
    """
    q, unit, applied = str(tp.get("quantity") or "").lower(), tp.get("applied_unit"), tp.get("applied")
    if unit == "Hz" and applied is not None and not _close(injection_frequency, float(applied)):
        return f"the injection is at {injection_frequency:g} Hz, not the {applied:g} Hz the test states"
    if "third-harmonic" in q and not _close(injection_frequency, 3.0 * system.frequency):
        return (f"a third-harmonic test injected at {injection_frequency:g} Hz, not at "
                f"{3.0 * system.frequency:g} Hz")
    if unit not in ("A", "V") or applied is None or tp.get("phases") is None:
        return None
    x = _complex(tp["phases"], 3)
    single = (tp.get("input") or "phase") in ("ground", "neutral")
    if single and any(abs(v) > 1e-12 for v in x[1:]):
        return "a single-channel input with phasors on the second or third channel"
    name = "current" if unit == "A" else "voltage"
    if "negative-sequence" in q:
        got, what = abs(sequence_components(*x)[2]), f"a negative-sequence {name}"
    elif "phase-to-phase" in q:
        got, what = max(abs(x[0] - x[1]), abs(x[1] - x[2]), abs(x[2] - x[0])), f"a phase-to-phase {name}"
    elif any(w in q for w in ("earth-fault", "neutral", "ground", "residual", "zero-sequence")):
        got = abs(x[0]) if single else abs(sum(x))
        what = f"a {'single-channel' if single else 'residual'} {name}"
    elif q in ("current", "phase current", "voltage", "phase voltage", "phase-to-neutral voltage"):
        got, what = max(abs(v) for v in x), f"a largest phase {name}"
    else:
        return None
    if not _close(got, float(applied)):
        got = got if got > 1e-9 * max(1.0, abs(float(applied))) else 0.0
        return f"the phasors carry {what} of {got:.4g} {unit}, not the {applied:.4g} {unit} the test states"
    return None


# ---------------------------------------------------------------------------------------------------- timing


def injection_time(tp: dict, longest_in_function: float | None) -> tuple[float, str]:
    """How long to inject [s] and why.

    >>> injection_time({"expected_time": 2.0}, None)
    (3.0, 'expected time + 1 s')
    >>> injection_time({"expected_time": 100.0}, None)
    (120.0, 'expected time + 20 %')
    >>> injection_time({"expected_time": None, "duration": 30.0}, 10.0)
    (30.0, 'duration stated by the test')
    """
    te, duration = tp.get("expected_time"), tp.get("duration")
    if te is not None:
        te = float(te)
        margin = max(MARGIN_MIN, MARGIN_FRACTION * te)
        tol = float(tp.get("tolerance_time") or 0.0)
        if tol >= margin:
            margin = tol + MARGIN_MIN
        why = "expected time + 1 s" if margin == MARGIN_MIN else (
            "expected time + 20 %" if margin == MARGIN_FRACTION * te else "expected time + band + 1 s")
        if duration is not None and float(duration) > te + margin:
            return float(duration), "duration stated by the test"
        return te + margin, why
    if duration is not None:
        return float(duration), "duration stated by the test"
    if longest_in_function:
        t = float(longest_in_function)
        return t + max(MARGIN_MIN, MARGIN_FRACTION * t), "no duration in the record: the function's longest " \
                                                          "operate time + margin"
    return 10.0 * MARGIN_MIN, "no duration in the record and no operate time in the function: 10 s"


def plan_segments(total: float, trigger: float, window_start: float, f_sys: float, f_max: float,
                  channels: int, wide: bool) -> list[tuple[float, float]]:
    """Sampling segments (rate [Hz], end [s]) that keep the .dat within :data:`MAX_FILE_BYTES`.

    >>> plan_segments(3.0, 1.0, 2.0, 60.0, 60.0, 3, False)
    [(3840.0, 3.0)]
    >>> plan_segments(900.0, 1.0, 850.0, 60.0, 60.0, 3, False)   # 64 a cycle: too big; 23 in the middle
    [(3840.0, 2.0), (1380.0, 850.0), (3840.0, 900.0)]
    """
    low = math.ceil(MIN_PER_CYCLE * f_max / f_sys - 1e-9)  # whole samples per system cycle
    main_n = max(MAIN_PER_CYCLE, low)
    main = main_n * f_sys
    budget = MAX_FILE_BYTES // record_size(channels, wide)
    if total * main + 2 <= budget:
        return [(main, total)]
    head = min(trigger + FULL_RATE_HEAD, total)
    tail = min(max(head, window_start), total)
    full_samples = (head + total - tail) * main + 3
    middle = tail - head
    n_mid = min(main_n - 1, math.floor((budget - full_samples) / (middle * f_sys)) - 1) if middle > 0 else low
    if n_mid < low:
        seconds = total - trigger
        raise NoWaveform("size", f"{seconds:.0f} s of injection at {MIN_PER_CYCLE} samples a cycle exceeds "
                                 f"{MAX_FILE_BYTES / 1e6:.0f} MB; inject it as a state sequence from the test plan")
    return [(main, head), (n_mid * f_sys, tail), (main, total)]


# ---------------------------------------------------------------------------------------------------- designs


def _levels(groups: list[Group], states: list[State]) -> bool:
    """True when some channel needs 32-bit samples (its smallest level is small against its peak)."""
    for g in groups:
        for j in range(len(g.names)):
            levels = []
            for s in states:
                if g.key not in s.phasors:
                    continue
                m = abs(s.phasors[g.key][j])
                env = s.envelopes.get(g.key)
                levels += [m * float(np.min(env[1])), m * float(np.max(env[1]))] if env is not None else [m]
            nonzero = [v for v in levels if v > 1e-12]
            if nonzero and needs_32_bit(min(nonzero), SQRT2 * max(nonzero)):
                return True
    return False


def _describe(groups: list[Group], phasors: dict[str, list[complex]], state: State) -> str:
    parts = []
    for g in groups:
        x = phasors.get(g.key, [0j] * len(g.names))
        at = f" at {state.frequency_of(g.key):g} Hz"
        if all(abs(v) < 1e-12 for v in x):
            parts.append(f"{'/'.join(g.names)} 0 {g.unit}")
            continue
        parts.append(", ".join(f"{n} {abs(v):.4g} {g.unit} ∠{math.degrees(cmath.phase(v)):.1f}°"
                               for n, v in zip(g.names, x)) + at)
    return "; ".join(parts)


def _phasors_of(state: dict | None, groups: dict[str, Group], defaults: dict[str, list[complex]]) -> dict:
    out = {}
    for fld, g in groups.items():
        given = (state or {}).get(fld)
        out[g.key] = _complex(given, len(g.names)) if given is not None else defaults.get(g.key,
                                                                                          [0j] * len(g.names))
    return out


def design_test(record: dict, fid: str, tp: dict, system: System, stem: str,
                longest_in_function: float | None = None) -> Design:
    """The waveform of one test point, or :class:`NoWaveform` saying why there is none."""
    if tp.get("phases") is None and tp.get("current_phases") is None and tp.get("voltage_phases") is None:
        what = f"{tp.get('quantity') or 'test'} in {tp.get('applied_unit') or 'no unit'}"
        if tp.get("secondary") is False:
            raise NoWaveform("none", f"not an injection ({what}): done at the relay")
        raise NoWaveform("record", f"the record gives no phasors to inject for this test ({what})")
    f_sys = system.frequency
    f_inj = tp.get("frequency") or (tp.get("applied") if tp.get("applied_unit") == "Hz" else None) or f_sys
    f_inj = float(f_inj)
    by_field = _groups(tp, system)
    wrong = mismatch(tp, f_inj, system)
    if wrong:
        raise NoWaveform("record", wrong)
    groups = list(by_field.values())
    pre = tp.get("prefault")
    f_pre = float((pre or {}).get("frequency") or f_sys)
    healthy = healthy_voltage(system)
    defaults = {g.key: _balanced(healthy) for g in groups if g.unit == "V" and len(g.names) == 3
                and g.ratio is not None and healthy is not None and g.circuit == "phase VT"}
    pre_phasors = _phasors_of(pre, by_field, defaults)
    inj_phasors = _phasors_of(tp, by_field, {})
    t_inj, why = injection_time(tp, longest_in_function)
    total = PRE_TEST + t_inj
    te = tp.get("expected_time")
    tol = float(tp.get("tolerance_time") or 0.0)
    band = None if te is None else (max(0.0, float(te) - tol), float(te) + tol)
    window = PRE_TEST + (band[0] - FULL_RATE_HEAD if band else t_inj - FULL_RATE_HEAD)
    f_max = max(f_sys, f_pre, f_inj)
    if harmonic(f_inj, f_sys) and "phases" in by_field:  # the harmonic on the quantity under test only
        main = by_field["phases"].key
        states = [State(0.0, f_pre, pre_phasors, frequencies={main: f_inj}),
                  State(PRE_TEST, f_sys, inj_phasors, frequencies={main: f_inj})]
    else:
        states = [State(0.0, f_pre, pre_phasors), State(PRE_TEST, f_inj, inj_phasors)]
    wide = _levels(groups, states)
    channels = sum(len(g.names) for g in groups)
    segments = plan_segments(total, PRE_TEST, window, f_sys, f_max, channels, wide)
    pre_text = (f"{PRE_TEST:g} s: " + _describe(groups, pre_phasors, states[0])
                + ("" if pre else " (the record gives no prefault)"))
    outcome = ("must not operate" if te is None else
               f"operates {float(te):.4g} s after the injection starts; accepted {band[0]:.4g} to {band[1]:.4g} s")
    lines = [f"Test {tp.get('id', '')} ({fid}): {tp.get('description', '')}",
             f"Quantity: {tp.get('quantity', '')} {tp.get('applied', '')} {tp.get('applied_unit', '')} relay-side",
             f"Initial state: {tp.get('initial_state') or 'not stated'}; pre-test {pre_text}",
             f"Injection from {PRE_TEST:g} s for {t_inj:.4g} s ({why}): " + _describe(groups, inj_phasors, states[1]),
             f"Expected: {outcome}"]
    return Design(stem, f"{record.get('tag', '')} revision {record.get('revision', '')}, test {tp.get('id', '')}",
                  groups, states, total, PRE_TEST, segments, wide, None if te is None else float(te), band,
                  pre_text, lines)


def _start_groups(system: System, with_voltage: bool) -> list[Group]:
    groups = [_group("I", "A", ("IA", "IB", "IC"), system, ("phase_ct",))]
    if with_voltage:
        groups.append(_group("V", "V", ("VA", "VB", "VC"), system, ("vt",)))
    return groups


def _motor_states(system: System, profile: dict, current_times: np.ndarray, current_primary: np.ndarray,
                  ) -> tuple[list[Group], list[State]]:
    """Pre-test (motor at rest) and the start or stall: balanced currents with an RMS envelope [A relay-side],
    voltages (when there is a VT) held at the profile's terminal voltage."""
    ct = system.ratios.get("phase_ct")
    vt = system.ratios.get("vt")
    volts = None
    if vt is not None and system.rated_voltage:
        volts = vt.to_secondary(float(profile.get("voltage") or 1.0) * system.rated_voltage / math.sqrt(3.0))
    groups = _start_groups(system, volts is not None)
    secondary = current_primary / (ct.factor if ct is not None else 1.0)
    pre = {"I": [0j] * 3}
    run = {"I": _balanced(1.0)}
    if volts is not None:
        pre["V"] = run["V"] = _balanced(volts)
    f = system.frequency
    return groups, [State(0.0, f, pre), State(PRE_TEST, f, run, {"I": (current_times, secondary)})]


def design_start(record: dict, profile: dict, system: System, stem: str) -> Design:
    """A motor start played from rest: the record's RMS current against time, then its last value held."""
    t = np.asarray(profile.get("time") or [], float)
    i = np.asarray(profile.get("current") or [], float)
    if t.size < 2 or i.size != t.size:
        raise NoWaveform("record", f"start profile {profile.get('label')!r} has no current against time")
    t = t - t[0]
    span = float(t[-1])
    hold = max(MARGIN_MIN, MARGIN_FRACTION * span)
    groups, states = _motor_states(system, profile, t, i)
    total = PRE_TEST + span + hold
    wide = _levels(groups, states)
    segments = plan_segments(total, PRE_TEST, total - FULL_RATE_HEAD, system.frequency, system.frequency,
                             sum(len(g.names) for g in groups), wide)
    v = float(profile.get("voltage") or 1.0)
    accelerates = profile.get("accelerates", True)
    outcome = ("nothing trips (the start is normal)" if accelerates else
               "the study finds the motor does not accelerate at this voltage: a stall, 51LR trips")
    volts = ("; voltages held at the start's terminal voltage" if len(groups) > 1 else
             "; no VT in the record: no voltage channels")
    pre_text = f"{PRE_TEST:g} s: motor at rest, no current" + (
        f", voltage {v:.3g} pu" if len(groups) > 1 else "")
    lines = [f"Motor start at {v:.3g} pu terminal voltage ({profile.get('label', '')}): the study's RMS current "
             f"against time{volts}",
             f"Pre-test {pre_text}",
             f"Start from {PRE_TEST:g} s: {i[0]:.4g} A primary falling to {i[-1]:.4g} A at {span:.3g} s, "
             f"held for {hold:.3g} s",
             f"Expected: {outcome}"]
    return Design(stem, f"{record.get('tag', '')} revision {record.get('revision', '')}, start "
                        f"{profile.get('label', '')}", groups, states, total, PRE_TEST, segments, wide, None, None,
                  pre_text, lines)


def stall_delay(record: dict) -> tuple[float, bool] | None:
    """The 51LR stall delay [s] and whether it is supervised by a zero-speed switch, from the record."""
    for f in record.get("functions") or []:
        if f.get("id") == "51LR":
            s = f.get("settings") or {}
            delay = (s.get("time_delay") or {}).get("value")
            switch = bool((s.get("speed_switch_required") or {}).get("value"))
            return (float(delay), switch) if isinstance(delay, (int, float)) and delay > 0 else None
    return None


def design_stall(record: dict, profile: dict, system: System, stem: str) -> Design:
    """A locked rotor at the profile's voltage: its initial (locked-rotor) current held past the 51LR delay."""
    found = stall_delay(record)
    if found is None:
        raise NoWaveform("record", "the record has no 51LR stall delay to hold the locked rotor past")
    delay, switch = found
    current = profile.get("current") or []
    if not current:
        raise NoWaveform("record", f"start profile {profile.get('label')!r} has no current")
    i_lr = float(current[0])
    hold = delay + max(MARGIN_MIN, MARGIN_FRACTION * delay)
    groups, states = _motor_states(system, profile, np.array([0.0]), np.array([i_lr]))
    total = PRE_TEST + hold
    wide = _levels(groups, states)
    tol = operate_time_tolerance(delay)
    band = (delay - tol, delay + tol)
    segments = plan_segments(total, PRE_TEST, PRE_TEST + band[0] - FULL_RATE_HEAD, system.frequency,
                             system.frequency, sum(len(g.names) for g in groups), wide)
    v = float(profile.get("voltage") or 1.0)
    pre_text = f"{PRE_TEST:g} s: motor at rest, no current" + (f", voltage {v:.3g} pu" if len(groups) > 1 else "")
    lines = [f"Stall: locked-rotor current {i_lr:.4g} A primary at {v:.3g} pu, held {hold:.4g} s",
             f"Pre-test {pre_text}",
             "Speed-switch input: open (rotor at standstill)" if switch else "No speed switch: 51LR by time alone",
             f"Expected: 51LR operates {delay:.4g} s after the current starts; accepted {band[0]:.4g} to "
             f"{band[1]:.4g} s"]
    return Design(stem, f"{record.get('tag', '')} revision {record.get('revision', '')}, stall", groups, states,
                  total, PRE_TEST, segments, wide, delay, band, pre_text, lines)


# ---------------------------------------------------------------------------------------------------- sampling


def render(design: Design, station: str, device: str, start: dt.datetime, line_frequency: float) -> Recording:
    """Sample a design into a COMTRADE recording (``line_frequency``: the system's, for the .cfg)."""
    times, rates = sample_times(design.segments)
    values = {(g.key, j): np.zeros(times.size) for g in design.groups for j in range(len(g.names))}
    theta0 = {g.key: 0.0 for g in design.groups}  # each group's reference angle, continuous across states
    for k, s in enumerate(design.states):
        end = design.states[k + 1].start if k + 1 < len(design.states) else math.inf
        lo, hi = np.searchsorted(times, [s.start - 1e-9, end - 1e-9])
        t = times[lo:hi]
        for key, phasors in s.phasors.items():
            if not any(abs(x) > 0 for x in phasors):
                continue
            theta = theta0[key] + 2.0 * math.pi * s.frequency_of(key) * (t - s.start)
            cos, sin = np.cos(theta), np.sin(theta)  # √2·|X|·cos(θ + ∠X) = √2·(Re X·cos θ − Im X·sin θ)
            env = s.envelopes.get(key)
            scale = SQRT2 if env is None else SQRT2 * np.interp(t - s.start, env[0], env[1])
            for j, x in enumerate(phasors):
                if abs(x) > 0:
                    values[(key, j)][lo:hi] = scale * (x.real * cos - x.imag * sin)
        if math.isfinite(end):
            for key in theta0:
                theta0[key] += 2.0 * math.pi * s.frequency_of(key) * (end - s.start)
    channels = [Channel(name, ph, g.circuit, g.unit, g.ratio.primary if g.ratio else 1.0,
                        g.ratio.secondary if g.ratio else 1.0, values[(g.key, j)])
                for g in design.groups for j, (name, ph) in enumerate(zip(g.names, g.phases))]
    return Recording(station, device, line_frequency, rates, times, design.trigger, channels, start, design.wide)


def header_text(design: Design, record: dict) -> str:
    """The ``.hdr`` (free text for a person) of a design: what it plays and what to expect, with the caution."""
    rates = ", ".join(f"{r:g} Hz to {e:.4g} s" for r, e in design.segments)
    return "\r\n".join([f"relaywright test waveform: {design.title}", *design.lines,
                        f"Length {design.total:.4g} s; trigger (start of the injection) at {design.trigger:g} s; "
                        f"sampling {rates}",
                        "Values are relay-side (CT/VT secondary); the .cfg gives each channel's ratio.",
                        CAUTION_LINE]) + "\r\n"


# ---------------------------------------------------------------------------------------------------- the set


@dataclass
class Entry:
    """One test point of the plan: its function, the file that plays it (or why there is none)."""

    fid: str
    tp: dict
    design: Design | None
    skip: NoWaveform | None


def _stem(tag: str, revision, part: str) -> str:
    return f"{safe_file_stem(tag)}-rev{revision}-{part}"


def waveform_set(record: dict) -> tuple[list[Entry], list[Design], list[str]]:
    """Every test point (with its design or the reason it has none), the motor's start and stall designs, and
    notes on what could not be designed. File stems are unique."""
    system = system_of(record)
    tag, rev = record.get("tag", ""), record.get("revision", 0)
    seen: set[str] = set()

    def unique(stem: str) -> str:
        out, k = stem, 2
        while out.lower() in seen:
            out, k = f"{stem}-{k}", k + 1
        seen.add(out.lower())
        return out

    entries: list[Entry] = []
    for f in record.get("functions") or []:
        fid = f.get("id", "")
        tps = f.get("test_points") or []
        longest = max((float(t["expected_time"]) for t in tps if t.get("expected_time") is not None), default=None)
        for tp in tps:
            ident = safe_file_stem(str(tp.get("id") or fid).replace("/", "_"), "test")
            try:
                d = design_test(record, fid, tp, system, unique(_stem(tag, rev, ident)), longest)
                entries.append(Entry(fid, tp, d, None))
            except NoWaveform as e:
                entries.append(Entry(fid, tp, None, e))
    extras: list[Design] = []
    notes: list[str] = []
    profiles = record.get("start_profiles") or []
    for p in profiles:
        stem = unique(_stem(tag, rev, "start-" + safe_file_stem(str(p.get("label") or "profile"), "profile")))
        try:
            extras.append(design_start(record, p, system, stem))
        except NoWaveform as e:
            notes.append(f"start {p.get('label')}: {e.reason}")
    if profiles:
        lowest = min(profiles, key=lambda p: float(p.get("voltage") or 1.0))
        try:
            extras.append(design_stall(record, lowest, system, unique(_stem(tag, rev, "stall"))))
        except NoWaveform as e:
            notes.append(f"stall: {e.reason}")
    return entries, extras, notes


def start_date(record: dict) -> dt.datetime:
    """The date given to the first sample: the sheet's revision date (midnight), else 1 January 2000."""
    text = str((record.get("sheet") or {}).get("date") or "")
    try:
        return dt.datetime.combine(dt.date.fromisoformat(text), dt.time())
    except ValueError:
        return dt.datetime(2000, 1, 1)
