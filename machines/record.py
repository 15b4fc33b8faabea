"""The settings record (format ``relaywright.settings/1``) and its JSON form.

A study returns a :class:`SettingsRecord`; the terminal table, the JSON and the PDF sheet are all drawn from it.
Values are SI numbers in primary terms, with the relay-side (secondary) value beside them where an instrument
transformer applies. The record also carries what the sheet needs to draw (curves as point lists, circles,
bands), so that ``reports`` only lays out.

The inputs fingerprint is the SHA-256 of a canonical JSON form of the validated inputs: SI floats rounded to
ten significant figures, keys sorted, sheet-only data (names, dates, revision, status) left out. The same machine
therefore gives the same fingerprint whatever order its keys were written in and whatever units were used.
"""

from __future__ import annotations

import dataclasses
import hashlib
import json
import math
from dataclasses import field
from typing import Any, Literal

from machines.errors import UNSAFE
from machines.frozen import mutable

FORMAT = "relaywright.settings/1"

Source = Literal["standard", "common-practice", "maker-data", "entered", "override", "derived"]
Status = Literal["ok", "warn", "fail"]


@mutable
class Setting:
    """One setting or derived value: primary value and unit, relay-side value where a CT/VT applies.

    ``value`` is a float (SI), a bool, a string (curve names) or a list of dicts (stages). ``label`` is the
    name printed on the sheet ("Pickup current"); ``note`` a short remark ("upper bound of code range").
    ``step`` is the relay's setting step, relay-side: the ``secondary`` value where an instrument transformer
    applies (else ``value``) is a whole multiple of it. ``keyed`` is False for an entry that is not keyed into the
    relay (equipment sized by the study, such as a grounding resistor, or what a setting achieves, such as the
    share of a winding covered).
    """

    value: Any
    unit: str = ""
    source: Source = "standard"
    secondary: float | None = None
    secondary_unit: str = ""
    label: str = ""
    note: str = ""
    step: float | None = None
    keyed: bool = True

    def to_json(self) -> dict:
        out: dict[str, Any] = {"value": _clean(self.value), "unit": self.unit}
        if self.secondary is not None:
            out["secondary"] = _clean(self.secondary)
            out["secondary_unit"] = self.secondary_unit
        out["source"] = self.source
        if self.label:
            out["label"] = self.label
        if self.note:
            out["note"] = self.note
        if self.step is not None:
            out["step"] = _clean(self.step)
        if not self.keyed:
            out["keyed"] = False
        return out


@mutable
class Check:
    """A finding: ``ok``, ``warn`` or ``fail`` with a sentence a practitioner understands."""

    status: Status
    message: str

    def to_json(self) -> dict:
        return {"status": self.status, "message": self.message}


@mutable
class TestPoint:
    """A commissioning injection: apply ``applied`` (secondary units when ``secondary``) and expect a time.

    ``expected_time`` None means "must not operate" (e.g. a pickup test just below the setting).
    ``tolerance_time`` is the half-width of the accepted time band [s]; ``tolerance_rule`` says how it was got.

    What to inject, relay-side, for a three-phase test set:

    - ``id``: the test point's number as the sheet prints it, ``"<function id>.<n>"`` (given by the study).
    - ``input``: the relay input under test: ``"phase"`` (phase CTs/VTs), ``"ground"`` (core-balance or residual
      earth-fault input), ``"neutral"`` (neutral CT or neutral VT of a generator), ``"differential"`` (one side of
      a differential zone).
    - ``phases``: three phasors ``{"magnitude", "angle"}`` (A-B-C, angles in degrees) of the quantity in
      ``applied_unit`` (amperes or volts, phase-to-neutral for voltages); for a single-channel input (ground,
      neutral) the first phasor is the channel and the other two are zero.
    - ``voltage_phases``: the phase-to-neutral voltages that go with a current test (power, impedance, restrained
      overcurrent, or healthy voltage), or None.
    - ``current_phases``: the phase currents that go with a voltage or frequency test, or None.
    - ``frequency``: the injection frequency when it is not the system's [Hz], or None.
    - ``duration``: how long to inject a "must not operate" test, or a test longer than the usual margin [s].
    - ``prefault``: the initial state to inject before the test, as phasors (``{"phases": [...],
      "voltage_phases": [...]}``), or None for no pre-test injection (cold replica, de-energised).
    """

    __test__ = False  # a record type, not a pytest test class

    quantity: str
    applied: float
    applied_unit: str
    expected_time: float | None
    tolerance_time: float = 0.0
    secondary: bool = True
    initial_state: str = ""
    applied_primary: float | None = None
    applied_primary_unit: str = ""
    description: str = ""
    tolerance_rule: str = ""
    id: str = ""
    input: str = "phase"
    phases: list[dict] | None = None
    voltage_phases: list[dict] | None = None
    current_phases: list[dict] | None = None
    frequency: float | None = None
    duration: float | None = None
    prefault: dict | None = None

    def to_json(self) -> dict:
        return {k: _clean(v) for k, v in dataclasses.asdict(self).items()}


@mutable
class Series:
    """A polyline or point set of a drawing, in the drawing's axis units."""

    label: str
    points: list[tuple[float, float]]
    style: Literal["line", "dashed", "dotted", "points", "step"] = "line"

    def to_json(self) -> dict:
        return {"label": self.label, "style": self.style, "points": [[_clean(x), _clean(y)] for x, y in self.points]}


@mutable
class Circle:
    """A circle of an R-X drawing: centre (r, x) and radius, in the drawing's axis units."""

    label: str
    center: tuple[float, float]
    radius: float
    style: Literal["line", "dashed", "dotted"] = "line"

    def to_json(self) -> dict:
        return {"label": self.label, "center": [_clean(c) for c in self.center], "radius": _clean(self.radius),
                "style": self.style}


@mutable
class Drawing:
    """What a sheet drawing shows. ``kind``: ``time-current`` (log-log), ``r-x``, ``frequency``, ``i2-time``."""

    kind: str
    title: str
    x_label: str
    y_label: str
    log_x: bool = False
    log_y: bool = False
    series: list[Series] = field(default_factory=list)
    circles: list[Circle] = field(default_factory=list)
    x_range: tuple[float, float] | None = None
    y_range: tuple[float, float] | None = None

    def to_json(self) -> dict:
        out = {"kind": self.kind, "title": self.title, "x_label": self.x_label, "y_label": self.y_label,
               "log_x": self.log_x, "log_y": self.log_y, "series": [s.to_json() for s in self.series],
               "circles": [c.to_json() for c in self.circles]}
        if self.x_range:
            out["x_range"] = [_clean(v) for v in self.x_range]
        if self.y_range:
            out["y_range"] = [_clean(v) for v in self.y_range]
        return out


@mutable
class FunctionSettings:
    """What one protection function's rule returns."""

    id: str
    title: str
    settings: dict[str, Setting]
    basis: str
    references: list[str] = field(default_factory=list)
    checks: list[Check] = field(default_factory=list)
    test_points: list[TestPoint] = field(default_factory=list)
    drawings: list[Drawing] = field(default_factory=list)
    enabled: bool = True

    def to_json(self) -> dict:
        return {"id": self.id, "title": self.title, "enabled": self.enabled,
                "settings": {k: v.to_json() for k, v in self.settings.items()},
                "basis": self.basis, "references": list(self.references),
                "checks": [c.to_json() for c in self.checks],
                "test_points": [t.to_json() for t in self.test_points]}


@mutable
class SettingsRecord:
    """The whole study result for one machine."""

    tag: str
    kind: str
    revision: int
    practice: str
    inputs_fingerprint: str
    derived: dict[str, Setting]
    functions: list[FunctionSettings]
    checks: list[Check]
    drawings: list[Drawing] = field(default_factory=list)
    sheet: dict[str, Any] = field(default_factory=dict)
    inputs: dict[str, Any] = field(default_factory=dict)
    #: motors: the simulated starts the sheet draws and a test set can play back, each
    #: ``{"label", "voltage" [pu], "time" [s], "current" [A primary, RMS], "accelerates"}``
    start_profiles: list[dict[str, Any]] = field(default_factory=list)

    def all_checks(self) -> list[tuple[str, Check]]:
        """Every finding with the id of the function it belongs to ('' for machine-wide), fails first."""
        items = [("", c) for c in self.checks]
        for f in self.functions:
            items += [(f.id, c) for c in f.checks]
        order = {"fail": 0, "warn": 1, "ok": 2}
        return sorted(items, key=lambda ic: order[ic[1].status])

    @property
    def worst(self) -> Status:
        statuses = {c.status for _, c in self.all_checks()}
        return "fail" if "fail" in statuses else "warn" if "warn" in statuses else "ok"

    def function(self, fid: str) -> FunctionSettings | None:
        return next((f for f in self.functions if f.id == fid), None)

    def to_json(self) -> dict:
        drawings = list(self.drawings)
        for f in self.functions:
            drawings += f.drawings
        return {
            "format": FORMAT,
            "tag": self.tag,
            "kind": self.kind,
            "revision": self.revision,
            "practice": self.practice,
            "inputs_fingerprint": self.inputs_fingerprint,
            "derived": {k: v.to_json() for k, v in self.derived.items()},
            "functions": [f.to_json() for f in self.functions],
            "checks": [c.to_json() for c in self.checks],
            "drawings": [d.to_json() for d in drawings],
            "sheet": _finite(self.sheet),
            "inputs": _finite(self.inputs),
            "start_profiles": _clean(self.start_profiles),
        }

    def dumps(self, indent: int | None = 2) -> str:
        """The JSON text; ``indent=None`` gives the compact form (for files other programs read)."""
        return dumps_json(self.to_json(), indent)


def dumps_json(data: dict, indent: int | None = 2) -> str:
    """JSON text of a record's plain data (compact when ``indent`` is None: Python's fast encoder).

    Characters a terminal acts on (controls, bidirectional overrides) are written as ``\\uXXXX`` escapes, so the
    text is safe to print and reads back the same.

    >>> dumps_json({"tag": "P\\u202e1"}, None)
    '{"tag":"P\\\\u202e1"}'
    """
    separators = None if indent is not None else (",", ":")
    text = json.dumps(data, indent=indent, ensure_ascii=False, allow_nan=False, separators=separators)
    return UNSAFE.sub(_json_escape, text) if UNSAFE.search(text) else text


def _json_escape(m) -> str:
    ch = m.group(0)
    if ch in "\n\r\t":  # JSON's own whitespace between values (inside strings json.dumps escaped them)
        return ch
    code = ord(ch)
    if code < 0x10000:
        return f"\\u{code:04x}"
    code -= 0x10000
    return f"\\u{0xD800 + (code >> 10):04x}\\u{0xDC00 + (code & 0x3FF):04x}"


def _finite(v: Any) -> Any:
    """Entered data as it was written, with a non-finite float (TOML allows ``inf`` and ``nan``) as None."""
    if isinstance(v, float) and not math.isfinite(v):
        return None
    if isinstance(v, dict):
        return {k: _finite(x) for k, x in v.items()}
    if isinstance(v, (list, tuple)):
        return [_finite(x) for x in v]
    return v


def _clean(v: Any) -> Any:
    """JSON-safe value: floats rounded to 6 significant figures, non-finite floats as None."""
    if isinstance(v, bool) or v is None or isinstance(v, (str, int)):
        return v
    if isinstance(v, float):
        if not math.isfinite(v):
            return None
        return float(f"{v:.6g}")
    if isinstance(v, dict):
        return {k: _clean(x) for k, x in v.items()}
    if isinstance(v, (list, tuple)):
        return [_clean(x) for x in v]
    if hasattr(v, "item"):  # numpy scalar
        return _clean(v.item())
    return str(v)


# ---------------------------------------------------------------------------------------------------- fingerprint

_SHEET_ONLY = {"sheet"}  # names, dates, revision, status: not inputs to the study (the tag is added back)


def canonical_inputs(case) -> dict:
    """The validated inputs as plain data: SI floats to 10 significant figures, sorted keys, no sheet data."""

    def plain(obj: Any) -> Any:
        if dataclasses.is_dataclass(obj):
            return {f.name: plain(getattr(obj, f.name)) for f in dataclasses.fields(obj)
                    if f.name != "entered" and f.name not in _SHEET_ONLY}
        if isinstance(obj, float):
            return float(f"{obj:.10g}")
        if isinstance(obj, (list, tuple)):
            return [plain(x) for x in obj]
        return obj

    data = plain(case)
    data["tag"] = case.sheet.tag
    data["overrides"] = sorted([list(p) for p in case.overrides])
    return data


def inputs_fingerprint(case) -> str:
    """``sha256:<hex>`` of the canonical inputs (see module docstring)."""
    text = json.dumps(canonical_inputs(case), sort_keys=True, separators=(",", ":"), ensure_ascii=True)
    return "sha256:" + hashlib.sha256(text.encode("ascii")).hexdigest()
