"""The sheet's cheaper drawing paths draw the same thing as reportlab's own (layout only, no published source)."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from machines.files import load_case
from machines.study import run_study
from reports import plots

EXAMPLES = sorted((Path(__file__).resolve().parent.parent / "examples").glob("*.toml"))


def _drawings(path):
    record = run_study(*load_case(path))
    return list(record.drawings) + [d for f in record.functions for d in f.drawings]


def _ops(drawing) -> str:
    from reportlab.graphics import renderPDF
    from reportlab.pdfgen.canvas import Canvas

    canvas = Canvas(None, invariant=True)
    renderPDF.draw(drawing, canvas, 0, 0)
    return "\n".join(canvas._code)


def _segments(ops: str) -> int:
    """Straight strokes drawn (the 'l' operators), text strings left out."""
    return len(re.findall(r"(?<![\w.\\])l\b", re.sub(r"\((?:\\.|[^\\)])*\)", "()", ops)))


def _saves(ops: str) -> int:
    return len(re.findall(r"(?m)^q$|(?<= )q(?= |$)", ops))


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.stem)
def test_shape_check_finds_nothing_and_changes_nothing(path, monkeypatch):
    # common practice, no published source: reportlab's attribute check is a development aid
    for d in _drawings(path):
        fast = _ops(plots.render(d, 500.0, 320.0))
        monkeypatch.setattr(plots, "CHECK_SHAPES", True)
        checked = _ops(plots.render(d, 500.0, 320.0))
        monkeypatch.setattr(plots, "CHECK_SHAPES", False)
        assert fast == checked


@pytest.mark.parametrize("path", EXAMPLES, ids=lambda p: p.stem)
def test_lean_drawing_draws_every_stroke_and_label(path, monkeypatch):
    # common practice, no published source: merging lines must keep every stroke and every string
    full = {}
    monkeypatch.setattr(plots, "lean", lambda drawing: drawing)
    for i, d in enumerate(_drawings(path)):
        full[i] = _ops(plots.render(d, 500.0, 320.0))
    monkeypatch.undo()
    for i, d in enumerate(_drawings(path)):
        lean = _ops(plots.render(d, 500.0, 320.0))
        assert _segments(lean) == _segments(full[i])
        assert re.findall(r"\((.*?)\) Tj", lean) == re.findall(r"\((.*?)\) Tj", full[i])
        assert _saves(lean) < _saves(full[i])
