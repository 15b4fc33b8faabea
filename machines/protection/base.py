"""What every protection rule shares: the study context, overrides, and building settings and test points.

A rule module (one per protection function) exposes ``settings(ctx) -> FunctionSettings | None`` (None when the
function does not apply to this machine). It computes each value by its guide's rule, then passes it through
:meth:`StudyContext.choose`, which substitutes the engineer's override when there is one and rounds the value to
the relay's setting step (relay-side, ``[relay]`` of the machine file); the rule then checks the value it got
back, so an override and the rounding are checked exactly like a computed value, and the test points are computed
from what the relay will actually hold.

Methods: machines/METHODS.md §12 (test points and their tolerances).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field
from typing import Any, Literal

from machines.errors import InputError, one_line, unsafe_character
from machines.model import MachineCase, Ratio
from machines.record import Setting, Source, TestPoint
from machines.standards.accuracy import operate_time_tolerance, tolerance_rule_text
from machines.units import parse_quantity


#: ``via`` default of :meth:`StudyContext.choose`: the phase CT for a current, the phase VT for a voltage
PHASE = object()
Rounding = Literal["nearest", "up", "down"]


@dataclass
class StudyContext:
    """The validated case plus what earlier steps derived.

    ``derived`` goes into the record as it is (SI values with units). ``extras`` holds machine-specific results
    the rules share (e.g. the motor start simulation) and never reaches the record directly.
    """

    case: MachineCase
    rated_current: float
    derived: dict[str, Setting] = field(default_factory=dict)
    extras: dict[str, Any] = field(default_factory=dict)
    used_overrides: set[str] = field(default_factory=set)
    #: the relay-side setting step of every rounded setting, by ``(function id, setting key)``
    steps: dict[tuple[str, str], float] = field(default_factory=dict)

    @property
    def ct(self) -> Ratio:
        return self.case.instruments.phase_ct

    def choose(self, fid: str, key: str, computed: Any, kind: str, unit: str = "",
               source: Source = "standard", *, via: Ratio | None | object = PHASE,
               rounding: Rounding = "nearest", step_kind: str | None = None) -> tuple[Any, Source]:
        """The engineer's override for ``fid.key`` if there is one, else ``computed`` with its ``source``;
        a number comes back rounded to the relay's setting step.

        ``kind`` is a kind from ``machines.units.KINDS``, or ``"boolean"``, ``"integer"``, ``"text"``;
        ``unit`` the SI unit the float is returned in. ``via`` is the instrument transformer the relay sees the
        quantity through (default: the phase CT for currents, the phase VT for voltages; None for none): the step
        applies to the relay-side value. ``rounding`` is ``"nearest"``, ``"up"`` or ``"down"`` (choose the
        direction that keeps a margin; an override is always rounded to the nearest step). ``step_kind`` picks
        the step when the kind alone does not (``"time_constant"``, ``"dial"``).
        """
        okey = f"{fid}.{key}"
        text = self.case.override(okey)
        if text is None:
            value = computed
        else:
            self.used_overrides.add(okey)
            value, source = self._parse_override(okey, text, kind, unit), "override"
            self._refuse_beyond_any_relay(okey, value, kind, self._ratio(kind, via))
            rounding = "nearest"
        if kind == "integer" and isinstance(value, int) and not isinstance(value, bool):
            self.steps[(fid, key)] = 1.0
            return value, source
        if isinstance(value, bool) or not isinstance(value, (int, float)) or kind in ("text", "boolean"):
            return value, source
        step = self.step_for(kind, key, step_kind)
        if step is None or not math.isfinite(value):
            return value, source
        ratio = self._ratio(kind, via)
        self.steps[(fid, key)] = step
        return self.round_to_step(value, step, ratio, rounding), source

    #: settings that may be zero: delays (0 s is instantaneous), the least operate time, the offset of a mho
    #: circle (0 is a circle through the origin), the voltage of a fault checked (0 at the terminals); every other
    #: number a relay holds is positive
    ZERO_ALLOWED = ("delay", "minimum_time", "offset", "check_voltage")
    #: settings that are a share of something whole (a fraction of the winding, a share of the rated I2)
    AT_MOST_ONE = ("coverage",)
    MAX_WHOLE = 1000  #: the largest whole-number setting (starts in succession, counts)

    def _parse_override(self, okey: str, text: str, kind: str, unit: str) -> Any:
        """The engineer's value for ``okey`` as the rule's kind, or InputError naming ``overrides.<okey>``.

        What no relay can hold is refused here, for every function at once: zero or a negative value where the
        setting is a pickup, a time constant, a multiplier, a count or a reach; a whole number out of range;
        a fraction above 1; text that is not the kind asked for (METHODS.md §14.7).
        """
        path = f"overrides.{okey}"
        name = okey.partition(".")[2]
        shown = one_line(text)
        if kind == "boolean":
            low = text.strip().lower()
            if low not in ("true", "false"):
                raise InputError(path, f"expected true or false, got {shown}")
            return low == "true"
        if kind == "integer":
            if not re.fullmatch(r"\s*\d{1,4}\s*", text):
                raise InputError(path, f"expected a whole number from 1 to {self.MAX_WHOLE}, got {shown}")
            value = int(text)
            if not 1 <= value <= self.MAX_WHOLE:
                raise InputError(path, f"expected a whole number from 1 to {self.MAX_WHOLE}, got {value}")
            return value
        if kind == "text":
            if unsafe_character(text) is not None or len(text) > 60:
                raise InputError(path, f"expected a short plain name, got {shown}")
            return text
        zero_ok = any(part in name for part in self.ZERO_ALLOWED)
        value = parse_quantity(text, kind, unit or None, key=path, default_unit="pu" if kind == "per_unit" else None,
                               allow_zero=zero_ok)
        if not math.isfinite(value):  # pragma: no cover - parse_quantity refuses non-finite numbers
            raise InputError(path, f"expected a finite number, got {shown}")
        if name in self.AT_MOST_ONE and value > 1.0:
            raise InputError(path, f"expected a fraction of at most 1 (100 %), got {shown}")
        return value

    #: the most a relay input can be set to, in multiples of the instrument transformer's primary rating: relay
    #: current inputs are set up to some tens of times their rated current, voltage inputs up to about twice their
    #: rated voltage; these bounds are generous on purpose, they catch only a slip of the keyboard (METHODS.md §14.7)
    MAX_CURRENT_MULTIPLE = 100.0
    MAX_VOLTAGE_MULTIPLE = 3.0
    MAX_TIME = 1.0e6  #: [s], about 11.6 days: longer than any relay's time setting

    def _refuse_beyond_any_relay(self, okey: str, value: Any, kind: str, ratio: Ratio | None) -> None:
        """InputError for an override no relay input can hold: a current or voltage far beyond its instrument
        transformer's rating, or a time beyond any relay's range."""
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            return
        limit, unit, what = {
            "current": (ratio and self.MAX_CURRENT_MULTIPLE * ratio.primary, "A", "100 × the CT's primary rating"),
            "voltage": (ratio and self.MAX_VOLTAGE_MULTIPLE * ratio.primary, "V", "3 × the VT's primary rating"),
            "time": (self.MAX_TIME, "s", "longer than any relay's time range"),
        }.get(kind, (None, "", ""))
        if limit and value > limit:
            shown = one_line(self.case.override(okey) or "")
            raise InputError(f"overrides.{okey}", f"expected at most {limit:.4g} {unit} ({what}), got {shown}")

    def _ratio(self, kind: str, via: Ratio | None | object) -> Ratio | None:
        if via is not PHASE:
            return via  # type: ignore[return-value]
        if kind == "current":
            return self.case.instruments.phase_ct
        if kind == "voltage":
            return self.case.instruments.vt
        return None

    def step_for(self, kind: str, key: str = "", step_kind: str | None = None) -> float | None:
        """The relay's setting step for a quantity of ``kind`` (relay-side SI units), or None (not stepped)."""
        r = self.case.relay
        sk = step_kind or ("time_constant" if kind == "time" and "time_constant" in key else
                           "dial" if key in ("time_dial", "time_multiplier") else kind)
        return {"current": r.current_step, "voltage": r.voltage_step, "time": r.time_step,
                "time_constant": r.time_constant_step, "frequency": r.frequency_step, "per_unit": r.per_unit_step,
                "impedance": r.impedance_step, "active_power": r.power_step, "dial": r.dial_step}.get(sk)

    @staticmethod
    def round_to_step(value: float, step: float, ratio: Ratio | None = None, rounding: Rounding = "nearest") -> float:
        """``value`` (primary) rounded so that its relay-side value (through ``ratio``) is a whole number of
        ``step``; a positive value never rounds to zero.

        >>> StudyContext.round_to_step(0.6933, 0.01)
        0.69
        >>> StudyContext.round_to_step(223.2, 0.01, Ratio(300.0, 5.0))   # 3.72 A secondary
        223.2
        >>> StudyContext.round_to_step(9.935, 0.01, rounding="up")
        9.94
        """
        factor = 1.0 if ratio is None else ratio.factor
        n = value / factor / step
        if rounding == "up":
            k = math.ceil(n - 1e-9)
        elif rounding == "down":
            k = math.floor(n + 1e-9)
        else:
            k = math.floor(n + 0.5)
        if value > 0 and k <= 0:
            k = 1
        digits = max(0, -math.floor(math.log10(step)) + 2)
        relay_side = round(k * step, digits)
        return relay_side if ratio is None else relay_side * factor

    def stepped(self, fid: str, key: str, value: float, kind: str, *, via: Ratio | None | object = PHASE,
                rounding: Rounding = "nearest", step_kind: str | None = None) -> float:
        """``value`` rounded like :meth:`choose` rounds, for a value that cannot be overridden by itself
        (an entry of a list of stages, say); records the step under ``fid.key``."""
        step = self.step_for(kind, key, step_kind)
        if step is None or not math.isfinite(value):
            return value
        self.steps[(fid, key)] = step
        return self.round_to_step(value, step, self._ratio(kind, via), rounding)


def current_setting(value: float, ct: Ratio | None, source: Source, label: str = "", note: str = "") -> Setting:
    """A current setting in primary amperes with its CT-secondary value."""
    return Setting(value, "A", source, secondary=None if ct is None else ct.to_secondary(value),
                   secondary_unit="" if ct is None else "A", label=label, note=note)


def voltage_setting(value: float, vt: Ratio | None, source: Source, label: str = "", note: str = "") -> Setting:
    """A voltage setting in primary volts with its VT-secondary value."""
    return Setting(value, "V", source, secondary=None if vt is None else vt.to_secondary(value),
                   secondary_unit="" if vt is None else "V", label=label, note=note)


def phasor(magnitude: float, angle: float = 0.0) -> dict:
    """One phasor of a test point: magnitude (relay-side A or V) and angle [degrees]."""
    return {"magnitude": float(magnitude), "angle": float(angle)}


def balanced(magnitude: float, angle: float = 0.0) -> list[dict]:
    """A balanced positive-sequence set A-B-C (B lags A by 120°).

    >>> [p["angle"] for p in balanced(1.0)]
    [0.0, -120.0, 120.0]
    """
    return [phasor(magnitude, angle), phasor(magnitude, _wrap(angle - 120.0)), phasor(magnitude, _wrap(angle + 120.0))]


def single(magnitude: float, angle: float = 0.0) -> list[dict]:
    """A single-channel injection (earth-fault or neutral input): the channel and two zero phasors."""
    return [phasor(magnitude, angle), phasor(0.0), phasor(0.0)]


def from_sequence(i1: complex, i2: complex = 0j, i0: complex = 0j) -> list[dict]:
    """The phase phasors A-B-C of the sequence components (a = 1∠120°): I_A = I0 + I1 + I2,
    I_B = I0 + a²·I1 + a·I2, I_C = I0 + a·I1 + a²·I2 (Fortescue, symmetrical components).

    >>> [round(p["magnitude"], 4) for p in from_sequence(1.0, 0.2)]
    [1.2, 0.9165, 0.9165]
    """
    a = complex(math.cos(2 * math.pi / 3), math.sin(2 * math.pi / 3))
    out = []
    for z in (i0 + i1 + i2, i0 + a * a * i1 + a * i2, i0 + a * i1 + a * a * i2):
        mag = abs(z)
        out.append(phasor(mag, _wrap(math.degrees(math.atan2(z.imag, z.real))) if mag > 1e-12 else 0.0))
    return out


def _wrap(angle: float) -> float:
    """An angle in (−180°, 180°]."""
    a = (angle + 180.0) % 360.0 - 180.0
    return 180.0 if a == -180.0 else round(a, 9)


def timed_test_point(quantity: str, applied_secondary: float, unit: str, expected_time: float | None, *,
                     applied_primary: float | None = None, primary_unit: str = "", initial_state: str = "",
                     description: str = "", phases: list[dict] | None = None, voltage_phases: list[dict] | None = None,
                     current_phases: list[dict] | None = None, input: str = "phase", frequency: float | None = None,
                     duration: float | None = None, prefault: dict | None = None) -> TestPoint:
    """A test point whose accepted band follows :func:`operate_time_tolerance`.

    With no ``phases``, a phase current or voltage test injects a balanced three-phase set of the applied
    magnitude (a phase-to-phase voltage is injected as its phase-to-neutral set, magnitude / √3), and a
    single-channel test (``input`` ground or neutral) the applied magnitude on the first channel.
    """
    if phases is None and unit in ("A", "V"):
        if input in ("ground", "neutral"):
            phases = single(applied_secondary)
        elif unit == "V" and "phase-to-phase" in quantity:
            phases = balanced(applied_secondary / math.sqrt(3.0), 30.0)
        else:
            phases = balanced(applied_secondary)
    tol = 0.0 if expected_time is None else operate_time_tolerance(expected_time)
    return TestPoint(quantity=quantity, applied=applied_secondary, applied_unit=unit, expected_time=expected_time,
                     tolerance_time=tol, secondary=True, initial_state=initial_state,
                     applied_primary=applied_primary, applied_primary_unit=primary_unit,
                     description=description, tolerance_rule=tolerance_rule_text() if expected_time else
                     "must not operate", input=input, phases=phases, voltage_phases=voltage_phases,
                     current_phases=current_phases, frequency=frequency, duration=duration, prefault=prefault)
