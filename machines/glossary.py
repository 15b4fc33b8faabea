"""The machine-file glossary of DEVELOPERS.md, generated from the field specs of :mod:`machines.model`.

Every key is declared once, in the model; this module turns the declarations into the Markdown tables the
contributor guide shows between the markers ``<!-- glossary:start -->`` and ``<!-- glossary:end -->``.
``tests/test_docs.py`` checks that the guide holds exactly this text; after adding a key, regenerate it with

    python -m machines.glossary DEVELOPERS.md
"""

from __future__ import annotations

import sys
from dataclasses import fields
from pathlib import Path

from machines.model import FieldSpec

START, END = "<!-- glossary:start -->", "<!-- glossary:end -->"


def _kind(spec: FieldSpec) -> str:
    if spec.kind == "choice":
        return "choice: " + ", ".join(f"`{c}`" for c in spec.choices)
    if spec.kind == "current_time_points":
        return "(current, time) pairs"
    if spec.kind == "per_unit_list":
        return "list of per unit"
    return spec.kind.replace("_", " ").replace("current or pu", "current or pu")


def _need(spec: FieldSpec) -> str:
    if spec.required:
        return "required"
    if spec.default is not None:
        return f"default `{spec.default}`"
    return "optional"


def _table(cls) -> list[str]:
    rows = ["| key | kind | written in | | meaning |", "|---|---|---|---|---|"]
    for f in fields(cls):
        spec = f.metadata.get("spec")
        if spec is None:
            continue
        rows.append(f"| `{f.name}` | {_kind(spec)} | {spec.unit or '—'} | {_need(spec)} | {spec.help} |")
    return rows


def _rows_line(title: str, cls) -> str:
    parts = []
    for f in fields(cls):
        spec = f.metadata.get("spec")
        if spec is not None:
            unit = f", {spec.unit}" if spec.unit and spec.kind not in ("text", "choice", "integer") else ""
            parts.append(f"`{f.name}` ({spec.help}{unit})")
    return f"{title} rows: " + ", ".join(parts) + "."


def glossary_markdown() -> str:
    """The glossary block (without the markers): one table per section, then the rows of every table key."""
    from machines.files import MACHINE_KINDS, SECTIONS

    out: list[str] = []
    tables: dict[str, list[str]] = {}
    order = [(name, cls) for name, cls in SECTIONS.items() if name != "machine"]
    order.insert(2, ("machine", MACHINE_KINDS["induction-motor"]))
    order.append(("machine", MACHINE_KINDS["synchronous-generator"]))
    for name, cls in order:
        if name == "machine":
            kind = "induction-motor" if cls is MACHINE_KINDS["induction-motor"] else "synchronous-generator"
            out += [f'`[machine]`, kind = "{kind}"', ""]
        else:
            out += [f"`[{name}]`", ""]
        out += _table(cls) + [""]
        for f in fields(cls):
            spec = f.metadata.get("spec")
            if spec is not None and spec.kind in ("table", "subtable") and spec.item is not None:
                tables.setdefault(spec.item.__name__, []).append(f"{name}.{f.name}")
                tables[spec.item.__name__ + ":cls"] = [spec.item]  # type: ignore[list-item]
                tables[spec.item.__name__ + ":kind"] = [spec.kind]  # type: ignore[list-item]
    for item_name, keys in tables.items():
        if item_name.endswith((":cls", ":kind")):
            continue
        cls = tables[item_name + ":cls"][0]
        if tables[item_name + ":kind"][0] == "subtable":
            title = " and ".join(f"`[{k}]`" for k in dict.fromkeys(keys))
            out += [_rows_line(title, cls).replace(" rows: ", " keys: ", 1), ""]  # type: ignore[arg-type]
            continue
        title = " and ".join(f"`[[{k}]]`" for k in dict.fromkeys(keys))
        out += [_rows_line(title, cls), ""]  # type: ignore[arg-type]
    return "\n".join(out).rstrip() + "\n"


def replace_block(text: str, block: str) -> str:
    """``text`` with the part between the glossary markers replaced by ``block``."""
    head, _, rest = text.partition(START)
    _, _, tail = rest.partition(END)
    return f"{head}{START}\n{block}{END}{tail}"


def main(argv: list[str]) -> int:  # pragma: no cover - a maintenance command
    path = Path(argv[0] if argv else "DEVELOPERS.md")
    text = path.read_text("utf-8")
    if START not in text or END not in text:
        sys.stderr.write(f"{path}: the markers {START} and {END} are missing\n")
        return 2
    path.write_text(replace_block(text, glossary_markdown()), "utf-8")
    return 0


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main(sys.argv[1:]))
