"""The batch index PDF: one line per machine file with tag, description, revision, findings and fingerprint.

Layout only. The rows are built as plain strings by :func:`index_rows` (a pure function) and set in a table on
landscape pages, black on white with the sheet's one accent colour for the title and the header rule, so it reads
when photocopied; every font is the sheet's own, embedded. The PDF is built with ``invariant=True``: the same rows give the same bytes.
"""

from __future__ import annotations

import io
from dataclasses import dataclass
from typing import NamedTuple

from reports.notices import CAUTION_LINE
from reports.fonts import SANS, SANS_BOLD, markup, register
from reports.plots import ACCENT_HEX

TITLE = "Protection settings sheets: index"
HEADER = ("Tag", "Description", "Rev.", "Findings", "Sheet", "Inputs fingerprint")
WIDTHS = (80, 186, 28, 72, 110, 266)  # points; landscape A4 and letter leave 770 pt between the margins
MARGIN = 36
FONT_SIZE = 7.5
FINGERPRINT_SIZE = 5.8  # points: "sha256:" and 64 hex digits fit the column on one line


@dataclass
class IndexRow:
    """One machine file of the batch. ``status``: ok | warn | fail | bad (bad input: ``message`` says why)."""

    path: str
    status: str
    tag: str = ""
    description: str = ""
    revision: int | None = None
    warnings: int = 0
    failures: int = 0
    fingerprint: str = ""
    sheet: str = ""
    message: str = ""


class PrintedRow(NamedTuple):
    """The strings of one index line, as printed."""

    tag: str
    description: str
    revision: str
    findings: str
    sheet: str
    fingerprint: str


def findings_text(warnings: int, failures: int) -> str:
    """``"none"``, ``"2 warnings"``, ``"1 failed, 1 warning"``.

    >>> findings_text(0, 0), findings_text(2, 0), findings_text(1, 1)
    ('none', '2 warnings', '1 failed, 1 warning')
    """
    parts = []
    if failures:
        parts.append(f"{failures} failed")
    if warnings:
        parts.append(f"{warnings} warning{'s' if warnings != 1 else ''}")
    return ", ".join(parts) or "none"


def index_rows(rows: list[IndexRow]) -> list[PrintedRow]:
    """The printed lines, in the order given; a file with bad input shows its error and no sheet.

    >>> index_rows([IndexRow("a.toml", "warn", "P-1", "Pump", 2, 1, 0, "sha256:ab", "P-1-rev2.pdf")])
    [PrintedRow(tag='P-1', description='Pump', revision='2', findings='1 warning', sheet='P-1-rev2.pdf', \
fingerprint='sha256:ab')]
    >>> index_rows([IndexRow("b.toml", "bad", message="machine.frequency: expected a frequency")])[0][:4]
    ('b.toml', 'bad input in b.toml: machine.frequency: expected a frequency', '—', '—')
    """
    out = []
    for r in rows:
        if r.status == "bad":
            out.append(PrintedRow(r.tag or r.path, f"bad input in {r.path}: {r.message}", "—", "—", "not written",
                                  ""))
        else:
            out.append(PrintedRow(r.tag, r.description, "" if r.revision is None else str(r.revision),
                                  findings_text(r.warnings, r.failures), r.sheet, r.fingerprint))
    return out


def totals_text(rows: list[IndexRow]) -> str:
    """One line of totals for the head of the index.

    >>> totals_text([IndexRow("a", "ok"), IndexRow("b", "fail"), IndexRow("c", "bad")])
    '3 machine files: 2 sheets, 1 with failed checks, 0 with warnings; 1 with bad input (no sheet)'
    """
    n = {s: sum(1 for r in rows if r.status == s) for s in ("ok", "warn", "fail", "bad")}
    text = (f"{len(rows)} machine file{'s' if len(rows) != 1 else ''}: {len(rows) - n['bad']} sheets, "
            f"{n['fail']} with failed checks, {n['warn']} with warnings")
    if n["bad"]:
        text += f"; {n['bad']} with bad input (no sheet)"
    return text


def build_index(rows: list[IndexRow], page_size: str = "A4", site: str = "") -> bytes:
    """The index PDF for ``rows`` (landscape ``page_size``: "A4" or "letter")."""
    from reportlab.lib.colors import HexColor, black, white
    from reportlab.lib.pagesizes import A4, landscape, letter
    from reportlab.lib.styles import ParagraphStyle
    from reportlab.platypus import Paragraph, SimpleDocTemplate, Spacer, Table, TableStyle

    register()
    accent = HexColor(ACCENT_HEX)
    body = ParagraphStyle("index-body", fontName=SANS, fontSize=FONT_SIZE, leading=FONT_SIZE * 1.2)
    bold = ParagraphStyle("index-bold", parent=body, fontName=SANS_BOLD)
    small = ParagraphStyle("index-small", parent=body, fontSize=FINGERPRINT_SIZE, leading=FONT_SIZE * 1.2)
    title = ParagraphStyle("index-title", fontName=SANS_BOLD, fontSize=15, leading=19, textColor=accent)
    sub = ParagraphStyle("index-sub", parent=body, fontSize=9, leading=12)

    printed = index_rows(rows)
    data = [[Paragraph(markup(h), bold) for h in HEADER]]
    for r, p in zip(rows, printed):
        strong = bold if r.status in ("fail", "bad") else body
        data.append([Paragraph(markup(p.tag), bold), Paragraph(markup(p.description), body),
                     Paragraph(markup(p.revision), body), Paragraph(markup(p.findings), strong),
                     Paragraph(markup(p.sheet), body), Paragraph(markup(p.fingerprint), small)])
    table = Table(data, colWidths=WIDTHS, repeatRows=1)
    table.setStyle(TableStyle([
        ("FONTNAME", (0, 0), (-1, -1), SANS),  # else an empty cell would bring in an unembedded Helvetica
        ("VALIGN", (0, 0), (-1, -1), "TOP"),
        ("LINEBELOW", (0, 0), (-1, 0), 1.2, accent),
        ("LINEBELOW", (0, 1), (-1, -1), 0.25, black),
        ("BACKGROUND", (0, 0), (-1, -1), white),
        ("LEFTPADDING", (0, 0), (-1, -1), 3), ("RIGHTPADDING", (0, 0), (-1, -1), 3),
        ("TOPPADDING", (0, 0), (-1, -1), 2.5), ("BOTTOMPADDING", (0, 0), (-1, -1), 2.5),
    ]))
    sites = sorted({site} if site else set())
    story = [Paragraph(markup(TITLE), title),
             Paragraph(markup(" · ".join(sites + [totals_text(rows)])), sub), Spacer(1, 8), table]

    size = landscape(letter if page_size == "letter" else A4)
    buf = io.BytesIO()

    def footer(canvas, doc) -> None:
        canvas.saveState()
        canvas.setFont(SANS, 6.5)
        canvas.setFillColor(black)
        canvas.drawString(MARGIN, MARGIN / 2, CAUTION_LINE)
        canvas.drawRightString(size[0] - MARGIN, MARGIN / 2 + 9, f"page {doc.page}")
        canvas.restoreState()

    doc = SimpleDocTemplate(buf, pagesize=size, leftMargin=MARGIN, rightMargin=MARGIN, topMargin=MARGIN,
                            bottomMargin=MARGIN + 6, title=TITLE, author="relaywright", invariant=True,
                            initialFontName=SANS, initialFontSize=FONT_SIZE)
    doc.build(story, onFirstPage=footer, onLaterPages=footer)
    return buf.getvalue()
