"""What every protection rule shares: the study context, overrides, and building settings and test points.

A rule module (one per protection function) exposes ``settings(ctx) -> FunctionSettings | None`` (None when the
function does not apply to this machine). It computes each value by its guide's rule, then passes it through
:meth:`StudyContext.choose`, which substitutes the engineer's override when there is one; the rule then checks the
value it got back, so an override is checked exactly like a computed value.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from machines.errors import InputError
from machines.model import MachineCase, Ratio
from machines.record import Setting, Source, TestPoint
from machines.standards.accuracy import operate_time_tolerance, tolerance_rule_text
from machines.units import parse_quantity


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

    @property
    def ct(self) -> Ratio:
        return self.case.instruments.phase_ct

    def choose(self, fid: str, key: str, computed: Any, kind: str, unit: str = "",
               source: Source = "standard") -> tuple[Any, Source]:
        """The engineer's override for ``fid.key`` if there is one, else ``computed`` with its ``source``.

        ``kind`` is a kind from ``machines.units.KINDS``, or ``"boolean"``, ``"integer"``, ``"text"``;
        ``unit`` the SI unit the float is returned in.
        """
        okey = f"{fid}.{key}"
        text = self.case.override(okey)
        if text is None:
            return computed, source
        self.used_overrides.add(okey)
        path = f"overrides.{okey}"
        if kind == "boolean":
            low = text.strip().lower()
            if low not in ("true", "false"):
                raise InputError(path, f"expected true or false, got {text!r}")
            return low == "true", "override"
        if kind == "integer":
            if not text.strip().isdigit():
                raise InputError(path, f"expected a whole number, got {text!r}")
            return int(text), "override"
        if kind == "text":
            return text, "override"
        return parse_quantity(text, kind, unit or None, key=path, default_unit="pu" if kind == "per_unit" else None,
                              allow_zero=True), "override"


def current_setting(value: float, ct: Ratio | None, source: Source, label: str = "", note: str = "") -> Setting:
    """A current setting in primary amperes with its CT-secondary value."""
    return Setting(value, "A", source, secondary=None if ct is None else ct.to_secondary(value),
                   secondary_unit="" if ct is None else "A", label=label, note=note)


def voltage_setting(value: float, vt: Ratio | None, source: Source, label: str = "", note: str = "") -> Setting:
    """A voltage setting in primary volts with its VT-secondary value."""
    return Setting(value, "V", source, secondary=None if vt is None else vt.to_secondary(value),
                   secondary_unit="" if vt is None else "V", label=label, note=note)


def timed_test_point(quantity: str, applied_secondary: float, unit: str, expected_time: float | None, *,
                     applied_primary: float | None = None, primary_unit: str = "", initial_state: str = "",
                     description: str = "") -> TestPoint:
    """A test point whose accepted band follows :func:`operate_time_tolerance`."""
    tol = 0.0 if expected_time is None else operate_time_tolerance(expected_time)
    return TestPoint(quantity=quantity, applied=applied_secondary, applied_unit=unit, expected_time=expected_time,
                     tolerance_time=tol, secondary=True, initial_state=initial_state,
                     applied_primary=applied_primary, applied_primary_unit=primary_unit,
                     description=description, tolerance_rule=tolerance_rule_text() if expected_time else
                     "must not operate")
