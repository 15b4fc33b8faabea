"""The benchmark's floor sets the same document as the sheet: the same pages, text objects, path points and fonts.

Counted in the PDFs' decompressed content streams with pypdf (an independent reader): pages; text objects (BT);
path points (the operands of m, l and c, re counting four); fonts by their embedded subset names. Layout only,
no published source.
"""

from __future__ import annotations

import json
import re
import sys
from collections import Counter
from pathlib import Path

import pytest
from pypdf import PdfReader

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = sorted((ROOT / "examples").glob("*.toml"))
sys.path.insert(0, str(ROOT / "benchmarks"))


def counts(pdf: bytes) -> dict:
    import io

    reader = PdfReader(io.BytesIO(pdf))
    out: Counter = Counter()
    fonts: set = set()
    out["pages"] = len(reader.pages)

    def stream_ops(data: bytes):
        text = re.sub(rb"\((?:\\.|[^\\)])*\)", b"()", data)  # strings may hold anything
        out["text objects"] += len(re.findall(rb"(?<![\w.])BT(?![\w.])", text))
        out["path points"] += len(re.findall(rb"(?<![\w.])[mlc](?![\w.])", text))
        out["path points"] += 4 * len(re.findall(rb"(?<![\w.])re(?![\w.])", text))

    for page in reader.pages:
        stream_ops(page.get_contents().get_data() if page.get_contents() is not None else b"")
        res = page["/Resources"]
        for ref in (res.get("/Font") or {}).values():
            fonts.add(str(ref.get_object()["/BaseFont"]))
        for ref in (res.get("/XObject") or {}).values():
            x = ref.get_object()
            stream_ops(x.get_data())
            for f in ((x.get("/Resources") or {}).get("/Font") or {}).values():
                fonts.add(str(f.get_object()["/BaseFont"]))
    out["fonts"] = len(fonts)
    return dict(out), sorted(fonts)


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.stem)
def test_floor_sets_the_same_document(path):
    from floor_sheet import build_floor

    from machines.files import load_case
    from machines.study import run_study
    from reports.sheet import render_layout, sheet_layout

    layout = sheet_layout(run_study(*load_case(path)))
    sheet, _ = render_layout(layout)
    floor = build_floor(json.loads(json.dumps(layout)))  # as saved to a file
    (ours, our_fonts), (theirs, their_fonts) = counts(sheet), counts(floor)
    assert ours == theirs
    assert our_fonts == their_fonts  # the same subsets of the same fonts
    assert ours["pages"] >= 5 and ours["text objects"] > 100 and ours["path points"] > 1000
