"""What changed between two revisions, on screen: plain lines or a table, old → new.

Layout only; :func:`machines.compare.compare` finds the changes.
"""

from __future__ import annotations

NO_CHANGES = "no changes"
_GROUPS = (("inputs", "Inputs"), ("settings", "Settings"), ("derived", "Derived values"))


def format_changes(changes) -> list[str]:
    """One plain line per change, ``"machine.rated_current: 186 A → 190 A"``; ``["no changes"]`` when empty.

    >>> from machines.compare import Change, Changes
    >>> format_changes(Changes(inputs=[Change("machine.rated_current", "186 A", "190 A")]))
    ['machine.rated_current: 186 A → 190 A']
    >>> format_changes(Changes())
    ['no changes']
    """
    if changes.empty:
        return [NO_CHANGES]
    return [f"{c.key}: {c.old} → {c.new}" for c in changes]


def print_changes(changes, console=None) -> None:
    """Print the changes as a table grouped into inputs, settings and derived values (or "no changes")."""
    from rich.console import Console
    from rich.table import Table

    console = console or Console(highlight=False)
    if changes.empty:
        console.print(NO_CHANGES)
        return
    table = Table(show_header=True, header_style="bold", box=None, pad_edge=False)
    table.add_column("changed")
    table.add_column("was")
    table.add_column("")
    table.add_column("now", style="bold")
    for attr, title in _GROUPS:
        items = getattr(changes, attr)
        if not items:
            continue
        table.add_row(f"[underline]{title}[/underline]", "", "", "")
        for c in items:
            table.add_row(_plain(c.key), _plain(c.old), "→", _plain(c.new))
    console.print(table)
    counts = ", ".join(f"{len(getattr(changes, a))} {t.lower()}" for a, t in _GROUPS if getattr(changes, a))
    console.print(f"{sum(1 for _ in changes)} changes ({counts})")


def _plain(text: str):
    """A user string as rich text that is never parsed as markup."""
    from rich.text import Text

    return Text(text)
