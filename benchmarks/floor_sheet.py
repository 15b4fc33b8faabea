"""The rendering floor: the same settings sheet set by a plain reportlab script, from the sheet's saved layout.

relaywright builds a sheet in two steps: the record becomes a layout (``reports.sheet.sheet_layout``: every
paragraph with its markup and style, every table cell, width and style command, every drawing as paths, markers and
text runs, the page furniture), then reportlab sets it. This script does the second step on its own, with nothing of
relaywright imported: it reads a layout saved as JSON and sets it with reportlab's usual classes (Paragraph, Table,
a Flowable replaying the drawings), the same fonts under the same names (so the same subsets), the same stream
settings (compressed, not ASCII85) and the same page furniture. What the sheet costs beyond this floor is
relaywright's own work: reading the file, the study and the layout. ``tests/test_floor.py`` checks that the two
PDFs hold the same pages, text objects, path points and fonts.

Save a layout (``bench_batch.py`` saves one per example) and run the floor::

    python -c "import json, sys; from machines.files import load_case; from machines.study import run_study; \\
        from reports.sheet import sheet_layout; print(json.dumps(sheet_layout(run_study(*load_case(sys.argv[1])))))" \\
        examples/chiller-compressor-motor.toml > layout.json
    python benchmarks/floor_sheet.py layout.json -o floor.pdf
    python benchmarks/floor_sheet.py --batch 200 --workers 2 --layouts layouts.json OUTDIR  # spawn pool
"""

from __future__ import annotations

import argparse
import io
import json
import os
import sys
from pathlib import Path

_FORM = "rwPageTotal"


def _fonts(files: dict[str, str]) -> None:
    from reportlab.lib.fonts import addMapping
    from reportlab.pdfbase import pdfmetrics
    from reportlab.pdfbase.ttfonts import TTFont

    known = set(pdfmetrics.getRegisteredFontNames())
    for name, path in files.items():
        if name not in known:
            pdfmetrics.registerFont(TTFont(name, path))
    names = sorted(files)
    regular = [n for n in names if n.endswith("Sans")]
    if regular:
        base = regular[0]
        pdfmetrics.registerFontFamily(base, normal=base, bold=base + "-Bold", italic=base + "-Italic",
                                      boldItalic=base + "-BoldItalic")
    for name in names:
        if name.endswith("Fallback"):
            for bold in (0, 1):
                for italic in (0, 1):
                    addMapping(name, bold, italic, name + ("-Bold" if bold else ""))


def _replay(canv, ops) -> None:
    from reportlab.lib.colors import HexColor

    canv.saveState()
    canv.setLineJoin(1)
    for op in ops:
        if op[0] == "path":
            _, stroke, width, dash, subpaths, fill = op
            p = canv.beginPath()
            for sp in subpaths:
                p.moveTo(sp[0], sp[1])
                for k in range(2, len(sp), 2):
                    p.lineTo(sp[k], sp[k + 1])
                if fill:
                    p.close()
            if stroke:
                canv.setStrokeColor(HexColor(stroke))
                canv.setLineWidth(width)
                canv.setDash(dash, 0) if dash else canv.setDash()
            if fill:
                canv.setFillColor(HexColor(fill))
            canv.drawPath(p, stroke=1 if stroke else 0, fill=1 if fill else 0)
        elif op[0] == "markers":
            _, shape, size, color, filled, flat = op
            p = canv.beginPath()
            r = size / 2
            for k in range(0, len(flat), 2):
                x, y = flat[k], flat[k + 1]
                if shape == "circle":
                    p.circle(x, y, r)
                elif shape == "square":
                    p.rect(x - r * 0.85, y - r * 0.85, 1.7 * r, 1.7 * r)
                elif shape == "triangle":
                    p.moveTo(x, y + r * 1.1)
                    p.lineTo(x - r, y - r * 0.7)
                    p.lineTo(x + r, y - r * 0.7)
                    p.close()
                elif shape == "diamond":
                    p.moveTo(x, y + r * 1.15)
                    p.lineTo(x + r, y)
                    p.lineTo(x, y - r * 1.15)
                    p.lineTo(x - r, y)
                    p.close()
                elif shape == "cross":
                    p.moveTo(x - r, y - r)
                    p.lineTo(x + r, y + r)
                    p.moveTo(x - r, y + r)
                    p.lineTo(x + r, y - r)
                else:
                    p.moveTo(x - r, y)
                    p.lineTo(x + r, y)
                    p.moveTo(x, y - r)
                    p.lineTo(x, y + r)
            canv.setStrokeColor(HexColor(color))
            canv.setLineWidth(0.8)
            canv.setDash()
            lines = shape in ("cross", "plus")
            if filled:
                canv.setFillColor(HexColor(color))
            elif not lines:
                canv.setFillColor(HexColor("#ffffff"))
            canv.drawPath(p, stroke=1, fill=0 if lines else 1)
        elif op[0] == "text":
            _, x, y, runs, color, angle = op
            canv.setFillColor(HexColor(color))
            if angle:
                canv.saveState()
                canv.translate(x, y)
                canv.rotate(angle)
                t = canv.beginText(0, 0)
            else:
                t = canv.beginText(x, y)
            for text, font, size, rise in runs:
                t.setFont(font, size)
                t.setRise(rise)
                t.textOut(text)
            canv.drawText(t)
            if angle:
                canv.restoreState()
    canv.restoreState()


def build_floor(layout: dict) -> bytes:
    """The floor PDF of a saved sheet layout."""
    from reportlab import rl_config
    from reportlab.lib.colors import HexColor
    from reportlab.lib.styles import ParagraphStyle
    from reportlab.pdfbase.pdfmetrics import stringWidth
    from reportlab.pdfgen.canvas import Canvas
    from reportlab.platypus import (BaseDocTemplate, CondPageBreak, Flowable, Frame, HRFlowable, KeepTogether,
                                    PageBreak, PageTemplate, Paragraph, Spacer, Table, TableStyle)

    _fonts(layout["fonts"])
    styles = {}
    for name, kw in layout["styles"].items():
        kw = dict(kw)
        if "textColor" in kw:
            kw["textColor"] = HexColor(kw["textColor"])
        styles[name] = ParagraphStyle(name, **kw)

    class Drawn(Flowable):
        def __init__(self, width, height, ops):
            super().__init__()
            self.width, self.height, self.ops = width, height, ops

        def wrap(self, aw, ah):
            return self.width, self.height

        def draw(self):
            _replay(self.canv, self.ops)

    def cell(c):
        if isinstance(c, str):
            return c
        if c[0] == "p":
            return Paragraph(c[1], styles[c[2]])
        if c[0] == "stack":
            return [cell(x) for x in c[1]]
        return Spacer(c[1], c[2])  # the signature spot: an empty box of the same size

    def flowable(b):
        t = b["t"]
        if t == "p":
            return Paragraph(b["text"], styles[b["style"]])
        if t == "table":
            table = Table([[cell(c) for c in row] for row in b["rows"]], colWidths=b["widths"],
                          repeatRows=b["repeat"], hAlign="LEFT")
            table.setStyle(TableStyle([(c[0], tuple(c[1]), tuple(c[2]),
                                        *[HexColor(a) if isinstance(a, str) and a.startswith("#") else a
                                          for a in c[3:]]) for c in b["cmds"]]))
            return table
        if t == "space":
            return Spacer(1, b["h"])
        if t == "cond":
            return CondPageBreak(b["h"])
        if t == "break":
            return PageBreak()
        if t == "rule":
            return HRFlowable(width="100%", thickness=b["thickness"], color=HexColor(b["color"]), spaceBefore=0,
                              spaceAfter=b["after"])
        if t == "keep":
            return KeepTogether([flowable(x) for x in b["items"]])
        return Drawn(b["w"], b["h"], b["ops"])

    page, info, footer = layout["page"], layout["info"], layout["footer"]
    size = tuple(page["size"])
    mx, mt, mb = page["margin_x"], page["margin_top"], page["margin_bottom"]
    width = size[0] - 2 * mx
    regular = min(n for n in layout["fonts"] if n.endswith("Sans"))
    bold = regular + "-Bold"

    def decorate(canv, _doc):
        _replay(canv, footer["ops"])
        x, y, font, fsize = footer["page_number"]
        label = f"page {canv.getPageNumber()} of "
        canv.saveState()
        canv.setFont(font, fsize)
        canv.drawString(x, y, label)
        canv.translate(x + stringWidth(label, font, fsize), y)
        canv.doForm(_FORM)
        canv.restoreState()

    class PagedCanvas(Canvas):
        def __init__(self, *a, **kw):
            super().__init__(*a, **kw)
            self.setDateFormatter(lambda *parts: info["date"])

        def save(self):
            self.beginForm(_FORM)
            self.setFont(bold, 7.5)
            self.drawString(0, 0, str(self.getPageNumber() - 1))
            self.endForm()
            super().save()

    buf = io.BytesIO()
    doc = BaseDocTemplate(buf, pagesize=size, invariant=True, leftMargin=mx, rightMargin=mx, topMargin=mt,
                          bottomMargin=mb, title=info["title"], author=info["author"], subject=info["subject"],
                          keywords=info["keywords"], creator=info["creator"], lang="en", initialFontName=regular,
                          initialFontSize=8.5)
    doc.addPageTemplates([PageTemplate(id="sheet", pagesize=size, onPage=decorate, frames=[
        Frame(mx, mb, width, size[1] - mt - mb, leftPadding=0, rightPadding=0, topPadding=0, bottomPadding=0)])])
    a85, rl_config.useA85 = rl_config.useA85, 0
    try:
        doc.build([flowable(b) for b in layout["blocks"]], canvasmaker=PagedCanvas)
    finally:
        rl_config.useA85 = a85
    return buf.getvalue()


def _job(args: tuple[str, str]) -> int:
    layout_json, path = args
    Path(path).write_bytes(build_floor(json.loads(layout_json)))
    return 1


def run_batch(layouts: list[dict], out: Path, workers: int) -> None:
    """Build one floor per layout into ``out``: in this process for one worker, else a spawn pool (like batch)."""
    import multiprocessing

    out.mkdir(parents=True, exist_ok=True)
    jobs = [(json.dumps(layout), str(out / f"floor-{i:04d}.pdf")) for i, layout in enumerate(layouts)]
    if workers == 1:
        for job in jobs:
            _job(job)
        return
    with multiprocessing.get_context("spawn").Pool(workers) as pool:
        for _ in pool.imap_unordered(_job, jobs, chunksize=1):
            pass


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("layout", nargs="?", type=Path, help="a saved sheet layout (JSON) to set once")
    ap.add_argument("-o", "--output", type=Path, help="the floor PDF to write")
    ap.add_argument("--layouts", type=Path, help="JSON list of layouts for --batch, used in turn")
    ap.add_argument("--batch", type=int, help="build this many floors into OUTDIR")
    ap.add_argument("--workers", type=int, default=os.cpu_count() or 1)
    ap.add_argument("outdir", nargs="?", type=Path)
    a = ap.parse_args(argv)
    if a.batch:
        kinds = json.loads(a.layouts.read_text("utf-8"))
        run_batch([kinds[i % len(kinds)] for i in range(a.batch)], a.outdir or a.layout, a.workers)
    else:
        a.output.write_bytes(build_floor(json.loads(a.layout.read_text("utf-8"))))
    return 0


if __name__ == "__main__":
    sys.exit(main())
