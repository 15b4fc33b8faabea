"""What changed between two revisions, as lines for the screen: grouped, labelled, old → new.

Layout only; :func:`machines.compare.compare` finds the changes. Settings to key into the relay come first (what a
technician must re-enter), then the inputs that changed, then derived values and what is not keyed. The lines are
not cut to any width: the caller wraps them at word boundaries to its terminal.
"""

from __future__ import annotations

NO_CHANGES = "no changes"
GROUPS = (("settings", "Settings to key into the relay"), ("inputs", "Inputs"),
          ("derived", "Derived values (not keyed into the relay)"))


def format_changes(changes) -> list[str]:
    """The changes as lines: warnings first, then each group with a heading and one line per change.

    >>> from machines.compare import Change, Changes
    >>> format_changes(Changes(inputs=[Change("machine.rated_current", "186 A", "190 A", "Full-load current")]))
    ['Inputs (1):', '  Full-load current: 186 A → 190 A']
    >>> format_changes(Changes())
    ['no changes']
    """
    lines = [f"warning: {w}" for w in changes.warnings]
    if changes.empty:
        return lines + [NO_CHANGES]
    for attr, title in GROUPS:
        items = getattr(changes, attr)
        if items:
            lines.append(f"{title} ({len(items)}):")
            lines += [f"  {c.name}: {c.old} → {c.new}" for c in items]
    return lines
