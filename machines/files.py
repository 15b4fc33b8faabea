"""Machine files, format ``relaywright.machine/1`` (TOML): read, validate, write atomically.

Reading goes text → ``tomllib`` → plain dict → :func:`case_from_dict` → :class:`~machines.model.MachineCase`.
Every problem raises :class:`~machines.errors.InputError` whose message starts with the key path
(``machine.rated_current: ...``). Unknown keys are errors with a "did you mean" suggestion.

Writing takes the plain dict (values as a person writes them, e.g. ``"6.6 kV"``), serialises it with ``tomli_w``
to a temporary file in the same folder and renames it over the target, so a crash never leaves half a file. A file
whose ``sheet.revision`` is higher than the one being written is never overwritten.
"""

from __future__ import annotations

import difflib
import hashlib
import os
import re
import stat
import tempfile
import tomllib
import unicodedata
from dataclasses import fields
from pathlib import Path
from typing import Any

from machines.errors import InputError, one_line, unsafe_character
from machines.model import (
    FieldSpec, Grounding, InductionMotor, Instruments, MachineCase, MotorLoad, Ratio, RelaySteps, SheetInfo,
    StudyOptions, Supply, SynchronousGenerator, field_specs, motor_rated_current, validate_case,
)
from machines.units import KINDS, convert, parse_quantity

FORMAT = "relaywright.machine/1"
MAX_FILE_BYTES = 1_000_000
MAX_TEXT = 500  #: characters of a text field
MAX_DIGITS = 15  #: a whole number in a file longer than this is no quantity anyone measured
MAX_STEM_BYTES = 150  #: a file name made from a tag, extension left out (file systems allow 255 bytes)
MACHINE_KINDS = {"induction-motor": InductionMotor, "synchronous-generator": SynchronousGenerator}
SECTIONS = {"sheet": SheetInfo, "study": StudyOptions, "machine": None, "load": MotorLoad, "supply": Supply,
            "grounding": Grounding, "instruments": Instruments, "relay": RelaySteps}
TOP_KEYS = ("format", *SECTIONS, "overrides")
NEMA_LETTERS = tuple("ABCDEFGHJKLMNPRSTUV")


def _suggest(name: str, known) -> str:
    close = difflib.get_close_matches(name, list(known), n=1, cutoff=0.6)
    return f" (did you mean '{close[0]}'?)" if close else ""


def unknown_key(path: str, name: str, known) -> InputError:
    return InputError(path, f"unknown key{_suggest(name, known)}; expected one of: {', '.join(sorted(known))}")


def _show(value: float, si_unit: str, unit: str) -> str:
    """A range limit in the unit the field is written in."""
    if unit and unit not in ("pu", si_unit):
        value = convert(value, si_unit, unit)
    return f"{value:.4g} {unit or si_unit}".strip()


def parse_ratio(raw: Any, key: str, unit: str) -> Ratio:
    """Read an instrument-transformer ratio such as ``"200/1 A"``, ``"150:5 A"`` or ``"6600/110 V"``.

    >>> parse_ratio("150:5", "instruments.phase_ct", "A"), parse_ratio("150:5 A", "instruments.phase_ct", "A")
    (Ratio(primary=150.0, secondary=5.0), Ratio(primary=150.0, secondary=5.0))
    """
    example = "'200/1 A'" if unit == "A" else "'6600/110 V'"
    if not isinstance(raw, str):
        raise InputError(key, f"expected a ratio such as {example}, got {one_line(raw)}")
    m = re.fullmatch(r"\s*(\d{1,7}(?:\.\d{1,6})?)\s*[/:]\s*(\d{1,7}(?:\.\d{1,6})?)\s*([A-Za-z]{1,3})?\s*", raw)
    if not m:
        raise InputError(key, f"expected a ratio such as {example}, got {one_line(raw)}")
    primary, secondary = float(m.group(1)), float(m.group(2))
    if m.group(3):
        scale = {"A": 1.0, "kA": 1e3, "V": 1.0, "kV": 1e3}.get(m.group(3))
        if scale is None or m.group(3)[-1] != unit:
            raise InputError(key, f"expected a ratio in {unit} such as {example}, got {one_line(raw)}")
    if primary <= 0 or secondary <= 0:
        raise InputError(key, f"expected a ratio with a positive primary and secondary such as {example}, "
                              f"got {one_line(raw)}")
    if primary < secondary:
        raise InputError(key, f"expected primary/secondary with the primary first such as {example}, "
                              f"got {one_line(raw)}")
    return Ratio(primary, secondary)


def parse_value(spec: FieldSpec, raw: Any, key: str, *, rated_current: float | None = None,
                default_unit: str | None = None) -> Any:
    """Turn one raw value into the model's value (SI float, int, str, Ratio), or raise InputError naming ``key``.

    The wizard calls this too, so a refused answer gets the same message as a refused file value.
    """
    kind = spec.kind
    if isinstance(raw, int) and not isinstance(raw, bool) and abs(raw) >= 10 ** MAX_DIGITS:
        raise InputError(key, f"expected a number of at most {MAX_DIGITS} digits, got {one_line(raw)}")
    bad = _unsafe_text(raw)
    if bad is not None:
        # control and bidirectional formatting characters: in no value, of any kind (they would reach terminals)
        raise InputError(key, f"expected plain text, got {unsafe_character(bad)} at position "
                              f"{_first_unsafe(bad) + 1} of {one_line(bad)}")
    if kind == "text":
        if not isinstance(raw, str):
            raise InputError(key, f"expected text in quotes, got {one_line(raw)}")
        if len(raw) > MAX_TEXT:
            raise InputError(key, f"expected at most {MAX_TEXT} characters of text, got {len(raw)}")
        return raw.strip()
    if kind == "choice":
        if not isinstance(raw, str) or raw not in spec.choices:
            hint = _suggest(str(raw), spec.choices) if isinstance(raw, str) else ""
            raise InputError(key, f"expected one of {', '.join(spec.choices)}, got {one_line(raw)}{hint}")
        return raw
    if kind == "integer":
        if isinstance(raw, str) and re.fullmatch(r"\s*\d{1,6}\s*", raw):
            raw = int(raw)
        if isinstance(raw, bool) or not isinstance(raw, int):
            raise InputError(key, f"expected a whole number, got {one_line(raw)}")
        if (spec.lo is not None and raw < spec.lo) or (spec.hi is not None and raw > spec.hi):
            raise InputError(key, f"expected a whole number from {spec.lo:g} to {spec.hi:g}, got {raw}")
        return raw
    if kind == "boolean":
        if not isinstance(raw, bool):
            raise InputError(key, f"expected true or false, got {one_line(raw)}")
        return raw
    if kind == "letter":
        if not isinstance(raw, str) or raw.strip().upper() not in NEMA_LETTERS:
            raise InputError(key, f"expected a NEMA MG 1 code letter A–V (not I, O, Q), got {one_line(raw)}")
        return raw.strip().upper()
    if kind == "ratio":
        return parse_ratio(raw, key, spec.unit)
    if kind == "ct_class":
        from machines.standards.ct_saturation import check_relaying_class

        if not isinstance(raw, str) or len(raw) > 20 or not raw.strip():
            raise InputError(key, f"expected a CT class such as 'C200' or '5P20', got {one_line(raw)}")
        return check_relaying_class(raw, key)
    if kind == "current_or_pu":
        text = raw
        if isinstance(raw, (int, float)) and not isinstance(raw, bool):
            text = f"{raw} {default_unit or 'pu'}"
        elif isinstance(raw, str) and re.fullmatch(r"\s*[\d.eE+-]+\s*", raw) and default_unit is None:
            text = f"{raw.strip()} pu"  # a bare number is per-unit, as for the per-unit-only keys
        if isinstance(text, str) and re.search(r"(pu|p\.u\.|%)\s*$", text.strip()) or (
                isinstance(text, str) and default_unit in ("pu", "%") and re.fullmatch(r"\s*[\d.eE+-]+\s*", text)):
            pu = parse_quantity(text, "per_unit", key=key, default_unit=default_unit)
            if rated_current is None:
                raise InputError(key, "a per-unit value needs the rated current")
            value = pu * rated_current
        else:
            value = parse_quantity(text, "current", key=key, default_unit=default_unit)
        _check_range(spec, value, key, "A")
        return value
    if kind == "per_unit_list":
        return parse_per_unit_list(raw, key)
    if kind == "current_time_points":
        return parse_current_time_points(raw, key, spec.unit, rated_current)
    if kind == "subtable":
        if isinstance(raw, str):
            raw = _subtable_from_text(raw, key, spec.item)
        if not isinstance(raw, dict):
            raise InputError(key, f"expected a table ([{key}]), got {one_line(raw)}")
        return spec.item(**_section(spec.item, raw, key, rated_current=rated_current))
    if kind in KINDS:
        k = KINDS[kind]
        value = parse_quantity(raw, k, key=key, allow_zero=spec.allow_zero,
                               default_unit=default_unit or ("pu" if kind == "per_unit" else None))
        _check_range(spec, value, key, k.si_unit)
        return value
    raise ValueError(f"{key}: field kind {kind!r} is not readable")  # a programming error, not bad input


def _unsafe_text(raw: Any, depth: int = 0) -> str | None:
    """The first string in ``raw`` (a value, or a list or table of them) holding a character a terminal acts on."""
    if isinstance(raw, str):
        return raw if unsafe_character(raw) is not None else None
    if depth < 4 and isinstance(raw, (list, tuple, dict)):
        for item in (raw.values() if isinstance(raw, dict) else raw):
            found = _unsafe_text(item, depth + 1)
            if found is not None:
                return found
    return None


def _first_unsafe(text: str) -> int:
    return next(i for i, ch in enumerate(text) if unsafe_character(ch) is not None)


MAX_POINTS = 60  #: entries of a curve a file may give


def _items(raw: Any, key: str, what: str) -> list:
    """A TOML array, or text with entries separated by ';' or ',' (how the wizard takes a curve on one line)."""
    if isinstance(raw, str):
        if len(raw) > 2000:
            raise InputError(key, f"expected at most 2000 characters, got {len(raw)}")
        raw = [part.strip() for part in re.split(r"[;,]", raw) if part.strip()]
    if not isinstance(raw, (list, tuple)):
        raise InputError(key, f"expected a list of {what}, got {one_line(raw)}")
    if not raw:
        raise InputError(key, f"expected a list of {what}, got an empty list")
    if len(raw) > MAX_POINTS:
        raise InputError(key, f"expected at most {MAX_POINTS} entries, got {len(raw)}")
    return list(raw)


def parse_per_unit_list(raw: Any, key: str) -> tuple[float, ...]:
    """A list of per-unit numbers, e.g. ``[0, 0.2, 0.4]`` or ``"0, 0.2, 0.4"``.

    >>> parse_per_unit_list("0, 0.2, 40 %", "machine.speed_curve.speed")
    (0.0, 0.2, 0.4)
    """
    out = []
    for i, item in enumerate(_items(raw, key, "per-unit numbers")):
        text = item.strip() if isinstance(item, str) else item
        if isinstance(text, str) and re.fullmatch(r"[+-]?[\d.]+(?:[eE][+-]?\d+)?", text):
            text = float(text)
        out.append(parse_quantity(text, "per_unit", key=f"{key}[{i}]", allow_zero=True))
    return tuple(out)


def parse_current_time_points(raw: Any, key: str, unit: str = "A", rated_current: float | None = None
                              ) -> tuple[tuple[float, float], ...]:
    """(current [A], time [s]) pairs: ``[["1.5 pu", "900 s"], ["2000 A", "10 s"]]`` or ``"1.5 pu 900 s; …"``.

    Currents are amperes, or per unit of ``rated_current`` where the field is written in pu (a per-unit current
    read without a rated current, as the wizard checks a single answer, is returned in pu).

    >>> parse_current_time_points("2000 A 10 s; 4000 A 0.5 s", "supply.fuse.points")
    ((2000.0, 10.0), (4000.0, 0.5))
    """
    out = []
    for i, item in enumerate(_items(raw, key, "(current, time) pairs")):
        where = f"{key}[{i}]"
        if isinstance(item, str):
            m = re.fullmatch(r"\s*(\S+(?:\s*[A-Za-z%]+)?)\s+(\S+\s*[A-Za-z]+)\s*", item)
            item = [m.group(1), m.group(2)] if m else item
        if not isinstance(item, (list, tuple)) or len(item) != 2:
            raise InputError(where, f"expected a pair such as [\"2 pu\", \"330 s\"], got {one_line(item)}")
        current_text, time_text = item
        if unit == "pu" and (isinstance(current_text, (int, float)) and not isinstance(current_text, bool)
                             or isinstance(current_text, str) and re.search(r"(pu|p\.u\.|%)\s*$", current_text)):
            pu = parse_quantity(current_text, "per_unit", key=where)
            current = pu * (rated_current if rated_current is not None else 1.0)
        else:
            current = parse_quantity(current_text, "current", key=where)
        out.append((current, parse_quantity(time_text, "time", key=where)))
    return tuple(out)


def _subtable_from_text(text: str, key: str, item: type) -> dict:
    """A sub-table written on one line, ``"name: value; name: value"`` (entries of a list separated by spaces)."""
    names = field_specs(item)
    out: dict[str, Any] = {}
    for part in re.split(r"\s*\|\s*|\s*;\s*(?=[a-z_]+\s*[:=])", text.strip()):
        if not part:
            continue
        m = re.fullmatch(r"([a-z_]+)\s*[:=]\s*(.+)", part, re.S)
        if not m or m.group(1) not in names:
            raise InputError(key, f"expected 'name: value' entries ({', '.join(names)}), got {one_line(part)}")
        value = m.group(2).strip()
        if names[m.group(1)].kind == "per_unit_list":
            value = re.split(r"[\s,]+", value)
        out[m.group(1)] = value
    return out


def _check_range(spec: FieldSpec, value: float, key: str, si_unit: str) -> None:
    lo, hi = spec.lo, spec.hi
    if spec.allow_zero and value == 0:
        return
    if (lo is not None and value < lo) or (hi is not None and value > hi):
        unit = spec.unit if spec.kind != "current_or_pu" else "A"
        got = _show(value, si_unit, unit)
        raise InputError(key, f"expected between {_show(lo, si_unit, unit)} and {_show(hi, si_unit, unit)}, "
                              f"got {got}, which is not plausible for this field")


def _section(cls, table: Any, path: str, *, rated_current: float | None = None, skip=()) -> dict[str, Any]:
    """Parse a table against a dataclass's specs; return the constructor keywords."""
    if not isinstance(table, dict):
        raise InputError(path, f"expected a table ([{path}]), got {one_line(table)}")
    specs = field_specs(cls)
    for name in table:
        if name not in specs and name not in skip:
            raise unknown_key(f"{path}.{name}", name, specs)
    out: dict[str, Any] = {}
    for name, spec in specs.items():
        key = f"{path}.{name}"
        if name in table:
            raw = table[name]
            if spec.kind == "table":
                if not isinstance(raw, list) or not all(isinstance(r, dict) for r in raw):
                    raise InputError(key, f"expected a list of tables ([[{key}]]), got {one_line(raw)}")
                if len(raw) > 50:
                    raise InputError(key, f"expected at most 50 rows, got {len(raw)}")
                out[name] = tuple(spec.item(**_section(spec.item, row, f"{key}[{i}]", rated_current=rated_current))
                                  for i, row in enumerate(raw))
            else:
                out[name] = parse_value(spec, raw, key, rated_current=rated_current)
        elif spec.required:
            example = KINDS[spec.kind].example if spec.kind in KINDS else ""
            hint = f" such as '{example}'" if example else (f" ({', '.join(spec.choices)})" if spec.choices else "")
            raise InputError(key, f"required key is missing; expected {spec.kind.replace('_', ' ')}{hint}")
        elif spec.default is not None:
            out[name] = parse_value(spec, spec.default, key, rated_current=rated_current)
    return out


def case_from_dict(data: Any) -> tuple[MachineCase, list[str]]:
    """Validate a machine file's plain data. Returns the case and the warnings; raises InputError."""
    if not isinstance(data, dict):
        raise InputError("", "a machine file must be a TOML table")
    fmt = data.get("format")
    if fmt != FORMAT:
        raise InputError("format", f"expected \"{FORMAT}\" (a relaywright machine file), got "
                                   f"{one_line(fmt) if fmt is not None else 'nothing'}")
    for name in data:
        if name not in TOP_KEYS:
            raise unknown_key(name, name, TOP_KEYS)
    for name in SECTIONS:
        if name in data and not isinstance(data[name], dict):
            raise InputError(name, f"expected a table ([{name}]), got {one_line(data[name])}")
    for name in ("sheet", "machine", "supply", "grounding", "instruments"):
        if name == "supply" and isinstance(data.get("machine"), dict) \
                and data["machine"].get("kind") == "synchronous-generator":
            continue  # a generator without [supply] is studied alone
        if name not in data:
            raise InputError(name, f"required table [{name}] is missing")
    mtable = data["machine"]
    if not isinstance(mtable, dict):
        raise InputError("machine", f"expected a table ([machine]), got {one_line(mtable)}")
    kind = mtable.get("kind")
    if not isinstance(kind, str) or kind not in MACHINE_KINDS:
        raise InputError("machine.kind", f"expected one of {', '.join(MACHINE_KINDS)}, got "
                                         f"{one_line(kind) if kind is not None else 'nothing'}"
                                         f"{_suggest(str(kind), MACHINE_KINDS) if isinstance(kind, str) else ''}")
    cls = MACHINE_KINDS[kind]
    rated = None
    if cls is InductionMotor:
        per_unit_of_rated = ("locked_rotor_current", "thermal_limit")
        partial = {k: v for k, v in mtable.items() if k not in per_unit_of_rated}
        probe = InductionMotor(**_section(InductionMotor, partial, "machine", skip=("kind", *per_unit_of_rated)))
        rated = motor_rated_current(probe)
    machine = cls(**_section(cls, mtable, "machine", rated_current=rated, skip=("kind",)))
    if cls is SynchronousGenerator and "load" in data:
        raise InputError("load", "a generator has no [load] table; the prime mover is machine.prime_mover")
    load = MotorLoad(**_section(MotorLoad, data["load"], "load")) if "load" in data else None
    sheet = SheetInfo(**_section(SheetInfo, data["sheet"], "sheet"))
    study_kw = _section(StudyOptions, data.get("study", {}), "study")
    study_kw.setdefault("practice", "IEC" if machine.frequency < 55.0 else "IEEE")
    overrides = data.get("overrides", {})
    if not isinstance(overrides, dict):
        raise InputError("overrides", f"expected a table of \"id.setting\" = value, got {one_line(overrides)}")
    over = []
    for k, v in overrides.items():
        if not re.fullmatch(r"[0-9A-Za-z]{1,6}(?:/[0-9A-Za-z]{1,6})?\.[a-z0-9_]{1,40}", k):
            raise InputError(f"overrides.{k}", "expected a key like \"49.pickup_current\" (function id, a dot, "
                                               "the setting name)")
        if not isinstance(v, (str, int, float, bool)):
            raise InputError(f"overrides.{k}", f"expected a value such as \"180 A\", got {one_line(v)}")
        if isinstance(v, str) and unsafe_character(v) is not None:
            raise InputError(f"overrides.{k}", f"expected plain text, got {unsafe_character(v)} in {one_line(v)}")
        if isinstance(v, int) and not isinstance(v, bool) and abs(v) >= 10 ** MAX_DIGITS:
            raise InputError(f"overrides.{k}", f"expected a number of at most {MAX_DIGITS} digits, got {one_line(v)}")
        over.append((k, v if isinstance(v, str) else str(v).lower() if isinstance(v, bool) else str(v)))
    supply_given = "supply" in data
    supply_table = data["supply"] if supply_given else {"nominal_voltage": f"{machine.rated_voltage!r} V"}
    case = MachineCase(
        sheet=sheet, study=StudyOptions(**study_kw), machine=machine, load=load,
        supply=Supply(**_section(Supply, supply_table, "supply")), supply_given=supply_given,
        grounding=Grounding(**_section(Grounding, data["grounding"], "grounding")),
        instruments=Instruments(**_section(Instruments, data["instruments"], "instruments")),
        relay=RelaySteps(**_section(RelaySteps, data.get("relay", {}), "relay")),
        overrides=tuple(sorted(over)), entered=data,
    )
    return case, validate_case(case)


_NOT_REGULAR = ((stat.S_ISFIFO, "a named pipe (FIFO)"), (stat.S_ISCHR, "a device"), (stat.S_ISBLK, "a device"),
                (stat.S_ISSOCK, "a socket"))


def _file_kind(mode: int) -> str:
    return next((name for test, name in _NOT_REGULAR if test(mode)), "not a regular file")


def read_bytes(path: str | Path, what: str = "a machine file (.toml)", limit: int | None = MAX_FILE_BYTES) -> bytes:
    """A regular file's bytes, or InputError naming the path: missing, a folder, a pipe or a device (never read:
    they may never end), unreadable, or larger than ``limit`` (checked before reading, and again while reading)."""
    p = Path(path)
    try:
        st = os.stat(p)  # through a symbolic link: what is read is its target
        if stat.S_ISDIR(st.st_mode):
            raise InputError(str(path), f"expected {what}, got a folder")
        if not stat.S_ISREG(st.st_mode):
            raise InputError(str(path), f"expected {what}, got {_file_kind(st.st_mode)}; only regular files are "
                                        "read")
        if limit is not None and st.st_size > limit:
            raise InputError(str(path), f"expected {what} of at most {_size(limit)}, got {st.st_size} bytes")
        fd = os.open(p, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0))
        with os.fdopen(fd, "rb") as fh:
            if not stat.S_ISREG(os.fstat(fh.fileno()).st_mode):  # replaced between the two looks
                raise InputError(str(path), f"expected {what}, got a file that is not a regular file")
            data = fh.read(-1 if limit is None else limit + 1)
    except FileNotFoundError:
        raise InputError(str(path), "no such file" + (" (a symbolic link to nothing)" if p.is_symlink() else "")) \
            from None
    except PermissionError:
        raise InputError(str(path), "the file cannot be read (permission denied)") from None
    except OSError as e:
        raise InputError(str(path), f"the file cannot be read ({e.strerror or e})") from None
    if limit is not None and len(data) > limit:
        raise InputError(str(path), f"expected {what} of at most {_size(limit)}, got a file that grew beyond it")
    return data


def _size(limit: int) -> str:
    return f"{limit / 1e6:g} MB" if limit >= 1_000_000 else f"{limit / 1e3:g} kB"


def read_text(path: str | Path) -> str:
    """A machine file's text (UTF-8), or InputError naming the path."""
    raw = read_bytes(path)
    try:
        return raw.decode("utf-8-sig")  # a byte-order mark (some Windows editors write one) is not part of the text
    except UnicodeDecodeError as e:
        raise InputError(str(path), f"expected UTF-8 text, got a byte that is not UTF-8 at position {e.start}") \
            from None


def parse_toml(text: str, name: str = "") -> dict:
    """The TOML document as plain data, or InputError naming ``name``, the line and, for a key given twice, the
    key."""
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as e:
        first = str(e).splitlines()[0]
        if first.startswith(("Cannot overwrite a value", "Cannot declare")):
            raise InputError(name, f"not valid TOML: {duplicate_key(text) or first}") from None
        raise InputError(name, f"not valid TOML: {first}") from None
    except RecursionError:
        raise InputError(name, "not valid TOML: nested too deeply") from None
    except ValueError:  # Python refuses to read a whole number of more than 4300 digits
        raise InputError(name, "not valid TOML: a number far too long to read") from None


_HEADER = re.compile(r"\s*\[\[?\s*([^\]]*?)\s*\]\]?\s*(?:#.*)?$")


def duplicate_key(text: str) -> str:
    """Which key a TOML document gives twice, as ``the key 'machine.rated_current' is given twice (line 14)``.

    tomllib reports only where it noticed (sometimes "at end of document"); the first line whose prefix of the
    document gives the same complaint is the one that repeats a key (parsing is sequential, so that is monotone and
    found by bisection).

    >>> duplicate_key('[machine]\\nkind = "x"\\nrated_current = "1 A"\\nrated_current = "2 A"\\n')
    "the key 'machine.rated_current' is given twice (line 4)"
    >>> duplicate_key('[sheet]\\ntag = "a"\\n[sheet]\\n')
    'the table [sheet] is given twice (line 3)'
    """
    lines = text.split("\n")

    def repeats(n: int) -> bool:
        try:
            tomllib.loads("\n".join(lines[:n]))
        except tomllib.TOMLDecodeError as e:
            return str(e).startswith(("Cannot overwrite a value", "Cannot declare"))
        except (RecursionError, ValueError):
            return False
        return False

    lo, hi = 1, len(lines)
    if not repeats(hi):
        return ""
    while lo < hi:
        mid = (lo + hi) // 2
        if repeats(mid):
            hi = mid
        else:
            lo = mid + 1
    line = lines[lo - 1]
    header = _HEADER.match(line)
    if header and "=" not in line.split("]")[0]:
        return f"the table [{one_line(header.group(1), 80)[1:-1]}] is given twice (line {lo})"
    table = next((m.group(1) for m in map(_HEADER.match, reversed(lines[:lo - 1])) if m), "")
    key = line.split("=", 1)[0].strip()
    full = f"{table}.{key}" if table else key
    return f"the key {one_line(full, 80)} is given twice (line {lo})"


def load_case(path: str | Path) -> tuple[MachineCase, list[str]]:
    """Read and validate a machine file. Raises InputError; returns the case and its warnings."""
    data = parse_toml(read_text(path), str(path))
    try:
        return case_from_dict(data)
    except InputError as e:
        raise e.at(path) from None


# ---------------------------------------------------------------------------------------------------- writing


def safe_file_stem(text: str, fallback: str = "machine", max_bytes: int = MAX_STEM_BYTES) -> str:
    """A file name made from a tag: letters, digits, ``-``, ``_`` and ``.`` only, no leading dot, no ``..``.

    A name longer than ``max_bytes`` (UTF-8) is shortened and given a short digest of the whole text, and a text with
    nothing usable becomes ``fallback`` and that digest, so two different texts do not end up with one name by being
    cut or emptied.

    >>> safe_file_stem("CW-P-201"), safe_file_stem("../../etc/passwd"), safe_file_stem("M-101 <spare>/2")
    ('CW-P-201', 'etc_passwd', 'M-101_spare_2')
    >>> safe_file_stem("Насос-3"), safe_file_stem("..."), safe_file_stem("CON")
    ('Насос-3', 'machine-ab5df625', 'CON_')
    >>> len(safe_file_stem("P" * 300)), safe_file_stem("P" * 300)[-10:]
    (150, 'P-1785d15a')
    """
    s = unicodedata.normalize("NFKC", str(text))
    s = "".join(ch if ch.isalnum() or ch in "-_." else "_" for ch in s)
    s = re.sub(r"\.{2,}", "_", s)
    s = re.sub(r"_{2,}", "_", s).strip("._-")
    if not s:
        return f"{fallback}-{_digest(text)}" if str(text) else fallback
    if s.split(".")[0].upper() in {"CON", "PRN", "AUX", "NUL", *(f"COM{i}" for i in range(10)),
                                   *(f"LPT{i}" for i in range(10))}:
        s += "_"
    if len(s.encode("utf-8")) > max_bytes:
        keep = s.encode("utf-8")[:max_bytes - 9].decode("utf-8", "ignore").rstrip("._-")
        s = f"{keep}-{_digest(text)}"
    return s


def sheet_stem(tag: str, revision: int, fallback: str = "sheet") -> str:
    """``<tag>-rev<N>`` for a sheet or record: the tag part is shortened when it must be, never the revision.

    >>> sheet_stem("CW-P-201", 2), sheet_stem("X" * 400, 12)[-16:]
    ('CW-P-201-rev2', 'X-127682a2-rev12')
    """
    suffix = f"-rev{revision}"
    return safe_file_stem(tag, fallback, MAX_STEM_BYTES - len(suffix)) + suffix


def _digest(text: object) -> str:
    return hashlib.sha256(str(text).encode("utf-8", "surrogatepass")).hexdigest()[:8]


def file_revision(path: str | Path) -> int | None:
    """The ``sheet.revision`` of an existing file, or None when there is no readable file."""
    try:
        data = tomllib.loads(read_bytes(path).decode("utf-8-sig"))
    except (InputError, UnicodeDecodeError, ValueError):  # TOMLDecodeError is a ValueError
        return None
    rev = data.get("sheet", {}).get("revision", 0) if isinstance(data.get("sheet"), dict) else 0
    return rev if isinstance(rev, int) and not isinstance(rev, bool) else None


def dumps(data: dict) -> str:
    import tomli_w

    ordered = {k: data[k] for k in TOP_KEYS if k in data}
    return tomli_w.dumps(ordered)


def write_atomic(path: str | Path, text: str | bytes, *, follow_symlinks: bool = True) -> None:
    """Write ``text`` to ``path`` through a temporary file in the same folder and a rename.

    A symbolic link is written through: its target gets the new text and the link stays a link (with
    ``follow_symlinks=False`` a link is refused instead). Only a regular file is ever replaced. Any failure (a full
    disk, a read-only folder) is an InputError naming the file; the file is then as it was.
    """
    p = Path(path)
    if p.is_symlink():
        if not follow_symlinks:
            raise InputError(str(p), "is a symbolic link; it is not replaced (write elsewhere, or remove the link); "
                                     "nothing was written")
        p = Path(os.path.realpath(p))
    try:
        st = os.stat(p)
    except OSError:
        st = None
    if st is not None and not stat.S_ISREG(st.st_mode):
        what = "a folder" if stat.S_ISDIR(st.st_mode) else _file_kind(st.st_mode)
        raise InputError(str(path), f"is {what}, not a regular file; it is not replaced; nothing was written")
    data = text.encode("utf-8") if isinstance(text, str) else text
    try:
        p.parent.mkdir(parents=True, exist_ok=True)
        fd, tmp = tempfile.mkstemp(prefix=f".{p.name}.", suffix=".tmp", dir=p.parent)
    except OSError as e:
        raise InputError(str(p), f"cannot write here ({e.strerror or e}); nothing was written") from None
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        os.chmod(tmp, _mode_for(p))  # mkstemp makes 0600; keep the target's mode, else the umask's default
        os.replace(tmp, p)
    except BaseException as e:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        if isinstance(e, OSError):
            kept = "it was left as it was" if st is not None else "nothing was written"
            raise InputError(str(path), f"cannot write ({e.strerror or e}); {kept}") from None
        raise


def _mode_for(path: Path) -> int:
    try:
        return path.stat().st_mode & 0o777
    except OSError:
        umask = os.umask(0)
        os.umask(umask)
        return 0o666 & ~umask


def write_machine_file(path: str | Path, data: dict) -> None:
    """Validate ``data`` and write it atomically; refuse to replace a file of higher revision."""
    case_from_dict(data)  # never write what could not be read back
    new_rev = data.get("sheet", {}).get("revision", 0)
    old_rev = file_revision(path)
    if old_rev is not None and old_rev > new_rev:
        raise InputError(str(path), f"holds revision {old_rev}, newer than the revision {new_rev} being written; "
                                    "nothing was written")
    write_atomic(path, dumps(data))


def section_specs(kind: str) -> dict[str, dict[str, FieldSpec]]:
    """All field specs of a machine kind, by section (the wizard asks through these)."""
    out = {}
    for name, cls in SECTIONS.items():
        cls = MACHINE_KINDS[kind] if name == "machine" else cls
        if name == "load" and kind != "induction-motor":
            continue
        out[name] = {f.name: f.metadata["spec"] for f in fields(cls) if "spec" in f.metadata}
    return out
