"""Orchestration: run the protection functions a machine needs and assemble the settings record.

The machine family (``machines.protection.motor`` or ``machines.protection.generator``) supplies three things:
``prepare(case) -> StudyContext`` (derived quantities, e.g. the motor start), ``RULES`` (the setting rules, in
the order the sheet lists them) and ``drawings(ctx, functions)`` (the curves the sheet draws).
"""

from __future__ import annotations

from machines.errors import InputError
from machines.model import MachineCase
from machines.record import Check, SettingsRecord, inputs_fingerprint


def _family(case: MachineCase):
    if case.is_motor:
        from machines.protection import motor as family
    else:
        from machines.protection import generator as family
    return family


def run_study(case: MachineCase, warnings: list[str] | tuple[str, ...] = ()) -> SettingsRecord:
    """Compute every setting for ``case``; ``warnings`` are the validation warnings to carry as findings."""
    family = _family(case)
    ctx = family.prepare(case)
    functions = [fs for rule in family.RULES if (fs := rule(ctx)) is not None]
    _check_overrides(case, ctx.used_overrides, functions)
    _number_and_step(functions, ctx.steps)
    checks = [Check("warn", w) for w in warnings] + list(ctx.extras.get("checks", []))
    return SettingsRecord(
        tag=case.sheet.tag,
        kind=case.machine.kind,
        revision=case.sheet.revision,
        practice=case.study.practice,
        inputs_fingerprint=inputs_fingerprint(case),
        derived=ctx.derived,
        functions=functions,
        checks=checks,
        drawings=family.drawings(ctx, functions),
        sheet=sheet_data(case),
        inputs=entered_inputs(case),
        start_profiles=list(ctx.extras.get("start_profiles", [])),
    )


def _number_and_step(functions, steps: dict[tuple[str, str], float]) -> None:
    """Number every test point as the sheet prints it (``"49.1"``) and give every rounded setting its step."""
    for f in functions:
        for i, tp in enumerate(f.test_points, 1):
            tp.id = f"{f.id}.{i}"
        for key, setting in f.settings.items():
            if setting.step is None and (f.id, key) in steps:
                setting.step = steps[(f.id, key)]


def _check_overrides(case: MachineCase, used: set[str], functions) -> None:
    by_id = {f.id: f for f in functions}
    for key, _ in case.overrides:
        if key in used:
            continue
        fid, _, name = key.partition(".")
        path = f"overrides.{key}"
        if fid not in by_id:
            raise InputError(path, f"no function '{fid}' in this study; functions are: {', '.join(by_id)}")
        names = sorted(by_id[fid].settings)
        if name not in by_id[fid].settings:
            raise InputError(path, f"function {fid} has no setting '{name}'; its settings are: {', '.join(names)}")
        raise InputError(path, f"the setting '{name}' of {fid} is derived and cannot be overridden")


def sheet_data(case: MachineCase) -> dict:
    """Identification and sign-off data for the sheet (plain data)."""
    s = case.sheet
    return {
        "tag": s.tag, "description": s.description, "site": s.site, "prepared_by": s.prepared_by,
        "checked_by": s.checked_by, "approved_by": s.approved_by, "revision": s.revision, "date": s.date,
        "checked_on": s.checked_on, "approved_on": s.approved_on,
        "status": s.status, "page_size": s.page_size,
        "history": [{"revision": h.revision, "date": h.date, "by": h.by, "reason": h.reason} for h in s.history],
    }


def entered_inputs(case: MachineCase) -> dict:
    """The machine data as written in the file, by section, for printing 'as entered'."""
    out = {}
    for section in ("study", "machine", "load", "supply", "grounding", "instruments", "overrides"):
        table = case.entered.get(section)
        if isinstance(table, dict) and table:
            out[section] = {k: v for k, v in table.items()}
    return out
