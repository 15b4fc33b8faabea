"""The settings record as a terminal table (rich). Layout only.

Every string from the record passes through :func:`_esc`: rich markup escaped, and control and bidirectional
formatting characters shown as escapes (``\\x1b``, ``\\u202e``), so that a tag or description can neither
style the table nor act on the terminal (clear it, retitle it, hide or reverse text).
"""

from __future__ import annotations

from machines.record import SettingsRecord
from reports.formatting import label_of, quantity, setting_primary, setting_secondary

_MARK = {"fail": "FAIL", "warn": "warn", "ok": "ok"}


def record_rows(record: SettingsRecord) -> list[tuple[str, str, str, str, str, str]]:
    """Rows of the settings table: (id, function, setting, primary, relay side, source)."""
    rows = []
    for f in record.functions:
        data = f.to_json()
        first = True
        for key, s in data["settings"].items():
            rows.append((f.id if first else "", f.title if first else "", label_of(key, s),
                         setting_primary(s), setting_secondary(s), s.get("source", "")))
            first = False
        if first:  # a function with no settings still shows its line
            rows.append((f.id, f.title, "—", "", "", ""))
    return rows


def print_record(record: SettingsRecord, caution: str = "", file=None) -> None:
    """Print findings (failures first), derived quantities and every setting with its source and basis."""
    from rich.console import Console
    from rich.table import Table

    con = Console(file=file, highlight=False, soft_wrap=False)
    con.print(f"[bold]{_esc(record.tag)}[/bold]  {_esc(record.kind)}  revision {_esc(record.revision)}  "
              f"practice {_esc(record.practice)}")
    con.print(f"inputs {_esc(record.inputs_fingerprint)}")
    if caution:
        con.print(f"[yellow]{_esc(caution)}[/yellow]")

    findings = [(fid, c) for fid, c in record.all_checks() if c.status != "ok"]
    if findings:
        t = Table(title="Findings", title_justify="left", show_lines=False, expand=False)
        t.add_column("status")
        t.add_column("id")
        t.add_column("finding", overflow="fold")
        for fid, c in findings:
            style = "bold red" if c.status == "fail" else "yellow"
            t.add_row(f"[{style}]{_MARK[c.status]}[/{style}]", _esc(fid), _esc(c.message))
        con.print(t)
    else:
        con.print("Findings: none (every check passed)")

    if record.derived:
        t = Table(title="Derived quantities", title_justify="left")
        t.add_column("quantity")
        t.add_column("value", justify="right")
        t.add_column("note", overflow="fold")
        for key, s in record.derived.items():
            t.add_row(_esc(label_of(key, s.to_json())), _esc(quantity(s.value, s.unit)), _esc(s.note))
        con.print(t)

    t = Table(title="Settings", title_justify="left")
    for name, justify in (("id", "left"), ("function", "left"), ("setting", "left"), ("primary", "right"),
                          ("relay side", "right"), ("source", "left")):
        t.add_column(name, justify=justify, overflow="fold")
    for row in record_rows(record):
        t.add_row(*(_esc(x) for x in row))
    con.print(t)
    if not record.functions:
        con.print("No protection functions are computed for this machine yet.")
    for f in record.functions:
        con.print(f"[bold]{_esc(f.id)}[/bold] {_esc(f.title)}: {_esc(f.basis)}"
                  + (f"  [dim]({_esc('; '.join(f.references))})[/dim]" if f.references else ""))


def _esc(text: object) -> str:
    """``text`` safe to print with rich: no markup, no control or bidirectional formatting characters."""
    from rich.markup import escape

    from machines.errors import printable

    return escape(printable(text))
