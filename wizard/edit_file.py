"""Change a machine file's values in place: the person's comments, key order and layout are kept (tomlkit).

``relaywright revise`` writes the next revision of a file that a person may have written by hand, with comments
("# from the rewind report") and an order of their own. Only what changed is touched: a changed value is replaced
where it stands (its comment stays beside it), a key that no longer applies is removed, a new key goes at the end of
its table, a new table at the end of the file, and rows added to a list of tables (the revision history) are
appended after the rows already there.
"""

from __future__ import annotations

from typing import Any


def edited(text: str, new_data: dict) -> str:
    """``text`` (a TOML document) changed to hold ``new_data``, with everything that did not change left as it was.

    >>> text = 'format = "x"\\n\\n[machine]\\nrated_current = "186 A"  # nameplate\\npower_factor = 0.89\\n'
    >>> print(edited(text, {"format": "x", "machine": {"rated_current": "190 A", "power_factor": 0.89}}), end="")
    format = "x"
    <BLANKLINE>
    [machine]
    rated_current = "190 A"  # nameplate
    power_factor = 0.89
    """
    import tomlkit

    doc = tomlkit.parse(text)
    _merge(doc, new_data)
    return tomlkit.dumps(doc)


def _merge(table: Any, new: dict) -> None:
    import tomlkit

    for key in [k for k in table.keys() if k not in new]:
        del table[key]
    for key, value in new.items():
        if key not in table:
            table[key] = _item(value)
            continue
        old = _plain(table[key])
        if old == value:
            continue
        if isinstance(value, dict) and isinstance(old, dict):
            _merge(table[key], value)
        elif _rows(value) and _rows(old) and value[:len(old)] == old and isinstance(table[key], tomlkit.items.AoT):
            for row in value[len(old):]:
                table[key].append(_row(row))
        else:
            table[key] = _item(value)


def _plain(item: Any) -> Any:
    return item.unwrap() if hasattr(item, "unwrap") else item


def _rows(value: Any) -> bool:
    return isinstance(value, list) and bool(value) and all(isinstance(r, dict) for r in value)


def _row(row: dict):
    """One table of a list of tables, followed by a blank line (as a person lays them out)."""
    import tomlkit

    t = tomlkit.table()
    t.update(row)
    t.add(tomlkit.nl())
    return t


def _item(value: Any) -> Any:
    """A new value as tomlkit lays it out: a list of tables as ``[[...]]`` blocks, a table as ``[...]``."""
    import tomlkit

    if _rows(value):
        aot = tomlkit.aot()
        for row in value:
            aot.append(_row(row))
        return aot
    if isinstance(value, dict):
        t = tomlkit.table()
        for k, v in value.items():
            t[k] = _item(v)
        return t
    return value
