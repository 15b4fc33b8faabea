"""The rendering floor: a plain reportlab PDF with the same amount of content as a settings sheet.

It has nothing of relaywright (no units, no study, no record): a document of the given number of pages holding
tables (the given rows and cells, as many of them Paragraphs as on the sheet), the same number of Paragraphs with
the same number of characters of words, and log-log line plots (the given number of plots and points), set in the
TrueType font the sheet embeds (Bitstream Vera, shipped with reportlab). What the sheet
costs beyond this is relaywright's own overhead; ``bench_batch.py`` prints each figure as a ratio to this floor.

Run it the same ways as the sheet::

    python benchmarks/floor_sheet.py --pages 8 --rows 155 --cells 880 --cell-paragraphs 741 --paragraphs 900 \\
        --chars 40000 --plots 1 --points 300 -o floor.pdf
    python benchmarks/floor_sheet.py --batch 200 --workers 2 --contents contents.json OUTDIR  # spawn pool
"""

from __future__ import annotations

import argparse
import io
import os
import sys
from dataclasses import dataclass
from pathlib import Path


@dataclass(frozen=True)
class Content:
    """How much a sheet holds, as drawn: pages; table rows and cells, and the cells holding a Paragraph; all
    Paragraphs (in table cells and outside) and their characters; plots and plotted points."""

    pages: int
    rows: int
    cells: int
    cell_paragraphs: int
    paragraphs: int
    chars: int
    plots: int
    points: int
    breaks: int = 0  #: empty pages added at the end to reach ``pages`` (see :func:`fitted`)


_WORDS = ("pickup", "105.6", "A", "thermal", "replica", "of", "the", "stator", "at", "1.15", "pu", "service",
          "factor", "IEC", "60255-149", "time", "constant", "612", "s", "with", "relay", "side", "0.704")


def filler(n: int, seed: int) -> str:
    """``n`` characters of words such as a sheet prints (deterministic)."""
    out, i = [], seed
    length = 0
    while length < n:
        w = _WORDS[i % len(_WORDS)]
        out.append(w)
        length += len(w) + 1
        i += 7
    return " ".join(out)[:max(n, 1)]


def _fonts():
    import reportlab
    from reportlab.pdfbase import pdfmetrics
    from reportlab.pdfbase.ttfonts import TTFont

    if "Floor-Sans" not in pdfmetrics.getRegisteredFontNames():
        folder = os.path.join(os.path.dirname(reportlab.__file__), "fonts")
        pdfmetrics.registerFont(TTFont("Floor-Sans", os.path.join(folder, "Vera.ttf")))
        pdfmetrics.registerFont(TTFont("Floor-Sans-Bold", os.path.join(folder, "VeraBd.ttf")))


def _plot(points: int, width: float, height: float):
    """A log-log line plot of ``points`` points in three series."""
    from reportlab.graphics.charts.axes import LogXValueAxis, LogYValueAxis
    from reportlab.graphics.charts.lineplots import LinePlot
    from reportlab.graphics.shapes import Drawing

    drawing = Drawing(width, height)
    lp = LinePlot()
    lp.x, lp.y, lp.width, lp.height = 50, 30, width - 70, height - 45
    lp.xValueAxis, lp.yValueAxis = LogXValueAxis(), LogYValueAxis()
    lp.xValueAxis.valueMin, lp.xValueAxis.valueMax = 10.0, 1e4
    lp.yValueAxis.valueMin, lp.yValueAxis.valueMax = 0.01, 1e3
    lp.xValueAxis.subTickNum = lp.yValueAxis.subTickNum = 10
    series = []
    for s in range(3):
        n = max(2, points // 3 + (1 if s < points % 3 else 0))
        series.append([(10.0 * 1000 ** (k / (n - 1)) * (1 + 0.1 * s), 0.02 * 40000 ** (1 - k / (n - 1)))
                       for k in range(n)])
    lp.data = series
    drawing.add(lp)
    return drawing


def build_floor(c: Content) -> bytes:
    """The floor PDF for the content ``c`` (A4)."""
    from reportlab.lib.pagesizes import A4
    from reportlab.lib.styles import ParagraphStyle
    from reportlab.platypus import PageBreak, Paragraph, SimpleDocTemplate, Table, TableStyle

    _fonts()
    cell = ParagraphStyle("cell", fontName="Floor-Sans", fontSize=7.8, leading=9.4)
    body = ParagraphStyle("body", cell, fontSize=8.5, leading=10.8)
    width = A4[0] - 80
    cols = max(1, round(c.cells / max(c.rows, 1)))
    every = c.cells / max(c.cell_paragraphs, 1)  # one cell in ``every`` holds a Paragraph, the others plain text
    per_paragraph = c.chars // max(c.paragraphs, 1)
    serial = 0

    def cell_of(r: int, k: int):
        nonlocal serial
        serial += 1
        if c.cell_paragraphs and serial % every < 1:
            return Paragraph(filler(per_paragraph, serial), cell)
        return f"{r}.{k}"

    free = max(c.paragraphs - c.cell_paragraphs, 0)
    story: list = [Paragraph(filler(per_paragraph, 1000 + i), body) for i in range(free)]
    if c.rows:
        table = Table([[cell_of(r, k) for k in range(cols)] for r in range(c.rows)], colWidths=[width / cols] * cols,
                      repeatRows=1)
        table.setStyle(TableStyle([("VALIGN", (0, 0), (-1, -1), "TOP"),
                                   ("LINEBELOW", (0, 0), (-1, -1), 0.3, "#555555")]))
        story.append(table)
    for i in range(c.plots):
        story.append(_plot(max(c.points // max(c.plots, 1), 6), width, 250))
    for _ in range(c.breaks):
        story += [PageBreak(), Paragraph(" ", body)]
    buf = io.BytesIO()
    doc = SimpleDocTemplate(buf, pagesize=A4, invariant=True, leftMargin=40, rightMargin=40, topMargin=40,
                            bottomMargin=50)
    doc.build(story)
    return buf.getvalue()


def fitted(c: Content) -> Content:
    """``c`` with the empty pages that bring the floor to the sheet's page count (one untimed trial build)."""
    from dataclasses import replace

    natural = page_count(build_floor(replace(c, breaks=0)))
    return replace(c, breaks=max(c.pages - natural, 0))


def page_count(pdf: bytes) -> int:
    """Pages of a PDF (counted by its page objects; enough for reportlab's output)."""
    import re

    return len(re.findall(rb"/Type\s*/Page[^s]", pdf))


def _job(args: tuple[Content, str]) -> int:
    content, path = args
    Path(path).write_bytes(build_floor(content))
    return 1


def run_batch(contents: list[Content], out: Path, workers: int) -> None:
    """Build one floor per content into ``out``: in this process for one worker, else a spawn pool (like batch)."""
    import multiprocessing

    out.mkdir(parents=True, exist_ok=True)
    jobs = [(c, str(out / f"floor-{i:04d}.pdf")) for i, c in enumerate(contents)]
    if workers == 1:
        for job in jobs:
            _job(job)
        return
    with multiprocessing.get_context("spawn").Pool(workers) as pool:
        for _ in pool.imap_unordered(_job, jobs, chunksize=1):
            pass


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    for name in Content.__dataclass_fields__:
        ap.add_argument(f"--{name.replace('_', '-')}", type=int, default=1)
    ap.add_argument("--contents", type=Path, help="JSON list of contents for --batch, used in turn")
    ap.add_argument("-o", "--output", type=Path, help="one floor PDF to write")
    ap.add_argument("--batch", type=int, help="build this many floors into OUTDIR")
    ap.add_argument("--workers", type=int, default=os.cpu_count() or 1)
    ap.add_argument("outdir", nargs="?", type=Path)
    a = ap.parse_args(argv)
    content = Content(**{name: getattr(a, name) for name in Content.__dataclass_fields__})
    if a.batch:
        import json

        kinds = [Content(**d) for d in json.loads(a.contents.read_text())] if a.contents else [content]
        run_batch([kinds[i % len(kinds)] for i in range(a.batch)], a.outdir, a.workers)
    else:
        a.output.write_bytes(build_floor(content))
    return 0


if __name__ == "__main__":
    sys.exit(main())
