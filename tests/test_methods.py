"""machines/METHODS.md holds every section the code and the tests cite, with the check values they quote, and no
file cites notes kept outside the repository."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
METHODS = ROOT / "machines" / "METHODS.md"
SKIP_DIRS = {".git", "__pycache__", "build", "dist", ".hypothesis", ".pytest_cache", ".ruff_cache"}
#: citations of notes kept outside the repository (spelt in pieces so that this file does not match itself)
OUTSIDE_NOTES = re.compile("REFERENCE" + r" [0-9]|DESIGN\.md|STACK" + r"\.md")
CITATION = re.compile(r"METHODS\.md §(\d+(?:\.\d+)?(?:\s*(?:,|/|–|and)\s*\d+(?:\.\d+)?)*)")
HEADING = re.compile(r"^#{2,3} (\d+(?:\.\d+)?)\.? ", re.MULTILINE)
NUMBER = re.compile(r"\d+(?:\.\d+)?")


def repository_texts():
    """(path, text) of every text file in the repository."""
    for path in sorted(ROOT.rglob("*")):
        rel = path.relative_to(ROOT)
        if not path.is_file() or SKIP_DIRS & set(rel.parts) or rel.parts[0].endswith(".egg-info"):
            continue
        try:
            yield rel, path.read_text("utf-8")
        except (UnicodeDecodeError, OSError):
            continue  # binary files


def cited(text: str) -> list[tuple[list[str], int]]:
    """The sections each citation in ``text`` names, with the end offset of the citation."""
    out = []
    for m in CITATION.finditer(text):
        parts = re.split(r"\s*(?:,|/|and)\s*", m.group(1))
        names = []
        for part in parts:
            if "–" in part:  # a range such as §6–12: both ends must exist
                names += [x.strip() for x in part.split("–")]
            else:
                names.append(part.strip())
        out.append((names, m.end()))
    return out


def sections() -> dict[str, str]:
    """The text under each numbered heading of METHODS.md (a top-level section includes its subsections)."""
    text = METHODS.read_text("utf-8")
    heads = [(m.group(1), m.start()) for m in HEADING.finditer(text)]
    out = {}
    for i, (name, start) in enumerate(heads):
        depth = name.count(".")
        end = next((s for n, s in heads[i + 1:] if n.count(".") <= depth), len(text))
        out[name] = text[start:end]
    return out


def test_no_file_cites_notes_outside_the_repository():
    found = [f"{rel}:{text[:m.start()].count(chr(10)) + 1}" for rel, text in repository_texts()
             for m in OUTSIDE_NOTES.finditer(text)]
    assert not found, f"citations of notes outside the repository: {found}"


def test_every_cited_section_exists():
    known = sections()
    missing = sorted({f"§{name} ({rel})" for rel, text in repository_texts() for names, _ in cited(text)
                      for name in names if name not in known})
    assert not missing, f"cited but not in machines/METHODS.md: {missing}"


def test_the_code_cites_every_numbered_topic():
    cites = {name.split(".")[0] for _, text in repository_texts() for names, _ in cited(text) for name in names}
    for top in map(str, range(1, 14)):
        assert top in cites, f"METHODS.md §{top} is cited nowhere"


def test_each_standards_module_points_to_its_section():
    known = sections()
    for path in sorted((ROOT / "machines" / "standards").glob("[!_]*.py")):
        doc = path.read_text("utf-8").split('"""')[1]
        names = [n for names, _ in cited(doc) for n in names]
        assert names, f"{path.name}: the module docstring cites no METHODS.md section"
        assert all(n in known for n in names), path.name


def _close(x: str, y: str) -> bool:
    """Two numbers as printed agree at the precision of the shorter one."""
    places = min(len(x.partition(".")[2]), len(y.partition(".")[2]))
    return round(float(x), places) == round(float(y), places)


#: names of standards and their clauses, left out before numbers are read (IEC 60255-151, IEEE C37.112, ...)
STANDARD = re.compile(r"\b(?:IEC|IEEE|NEMA|NFPA|UL|BS|MG|Std|SP)\s+[A-Z]?\d[\w.\-]*|\bC\d\d\.\d+|\b\d+\.\d+\([A-Z]\)\(\d\)")


def _quoted(line: str, end: int) -> list[str]:
    """Check values quoted after the last citation of a line: numbers with at least three significant figures."""
    tail = STANDARD.sub(" ", line[end:])
    if not tail.lstrip().startswith((":", "(")) and "→" not in tail and "=" not in tail:
        return []
    return [n for n in NUMBER.findall(tail) if len(n.replace(".", "").lstrip("0")) >= 3]


def quoted_check_values():
    """(file, line, section names, number) for each value a test or docstring quotes after METHODS.md citations:
    the numbers after the last citation of a line, against every section the line cites."""
    for rel, text in repository_texts():
        if rel.suffix != ".py":
            continue
        for i, line in enumerate(text.splitlines(), start=1):
            found = cited(line)
            if found:
                names = [n for ns, _ in found for n in ns]
                for number in _quoted(line, found[-1][1]):
                    yield f"{rel}:{i}", names, number


def _searched(known: dict[str, str], name: str) -> str:
    """The text a value cited with §name may be found in: the section and its topic's check-value subsection."""
    top = name.split(".")[0]
    checks = [t for n, t in known.items() if n.startswith(top + ".") and "heck values" in t.splitlines()[0]]
    return " ".join([known.get(name, ""), *checks])


def test_quoted_check_values_appear_in_their_sections():
    known = sections()
    missing = []
    for where, names, number in quoted_check_values():
        text = " ".join(_searched(known, n) for n in names)
        if not any(_close(number, other) for other in NUMBER.findall(text)):
            missing.append(f"{where}: {number} not in §{', '.join(names)}")
    assert not missing, "\n".join(missing)


@pytest.mark.parametrize("text, names", [
    ("check value METHODS.md §2.5 (1212 s)", ["2.5"]),
    ("against METHODS.md §2.3, 3.1, 3.4, 4.2, 5.2, 5.5, 10.", ["2.3", "3.1", "3.4", "4.2", "5.2", "5.5", "10"]),
    ("METHODS.md §3.2/3.4: no delay window", ["3.2", "3.4"]),
    ("digitised for METHODS.md §2.3, 3.1 and 5.2.", ["2.3", "3.1", "5.2"]),
    ("against METHODS.md §6–12 check values", ["6", "12"]),
])
def test_citations_are_read_as_written(text, names):
    assert cited(text)[0][0] == names
