"""The printable settings sheet: a reportlab story built from a settings record.

Order (what the engineer signs, what the contractor hands over, what maintenance files): identification, machine
and system data as entered, derived values, the settings table with each function's basis, findings (fails first),
the safety notice; then the drawings, the commissioning test table, the revision history, the sign-off block and
the inputs fingerprint. Every page carries a footer with the tag, revision, status, inputs fingerprint and
"page x of y". The tag, revision and fingerprint are also written to the PDF's /Keywords so that
``relaywright verify`` can compare a sheet with a machine file.

Layout only: the rows come from :mod:`reports.tables`, the drawings from :mod:`reports.plots`; every user string is
escaped by :func:`reports.fonts.markup` before it reaches a Paragraph. Built with ``invariant=True``, so the same
record gives the same bytes.
"""

from __future__ import annotations

import io
from functools import lru_cache, partial
from typing import NamedTuple

from machines.errors import InputError, one_line
from reports.notices import SAFETY_NOTICE
from reports import tables
from reports.fonts import SANS, SANS_BOLD, SANS_BOLD_ITALIC, SANS_ITALIC, in_main_font, markup, plain, register
from reports.plots import ACCENT_HEX, render

PAGE_SIZES = ("A4", "letter")
KEYWORDS_PREFIX = "relaywright settings sheet"
_MARGIN_X, _MARGIN_TOP, _MARGIN_BOTTOM = 40.0, 40.0, 50.0


def page_size_of(name: str | None):
    """reportlab page size for ``"A4"`` or ``"letter"`` (any letter case)."""
    from reportlab.lib.pagesizes import A4, letter

    key = (name or "A4").strip().lower()
    if key == "a4":
        return A4
    if key == "letter":
        return letter
    raise InputError("page_size", f"expected A4 or letter, got {one_line(name)}")


def keywords(record) -> str:
    """The /Keywords entry: fixed prefix, inputs fingerprint, revision, and the tag last (it may hold anything)."""
    return (f"{KEYWORDS_PREFIX}; inputs_fingerprint={record.inputs_fingerprint}; "
            f"revision={record.sheet.get('revision', record.revision)}; tag={plain(record.tag)}")


@lru_cache(maxsize=1)
def _version() -> str:
    from machines import __version__  # importlib.metadata would cost a sheet process about 20 ms

    return __version__


# ---------------------------------------------------------------------------------------------------- styles


class _Styles:
    def __init__(self):
        from reportlab.lib.colors import HexColor, black
        from reportlab.lib.enums import TA_RIGHT
        from reportlab.lib.styles import ParagraphStyle

        self.accent = HexColor(ACCENT_HEX)
        self.grey = HexColor("#555555")
        base = ParagraphStyle("body", fontName=SANS, fontSize=8.5, leading=10.8, textColor=black)
        self.body = base
        self.cell = ParagraphStyle("cell", base, fontSize=7.8, leading=9.4)
        self.cell_bold = ParagraphStyle("cellb", self.cell, fontName=SANS_BOLD)
        self.cell_right = ParagraphStyle("cellr", self.cell, alignment=TA_RIGHT)
        self.basis = ParagraphStyle("basis", self.cell, fontName=SANS_ITALIC, fontSize=7.3, leading=8.9,
                                    textColor=HexColor("#222222"))
        self.head = ParagraphStyle("head", self.cell, fontName=SANS_BOLD, textColor=self.accent)
        self.small = ParagraphStyle("small", base, fontSize=7.2, leading=8.8, textColor=self.grey)
        self.footer = ParagraphStyle("footer", base, fontSize=7.5, leading=9, textColor=self.grey)
        self.label = ParagraphStyle("label", base, fontSize=6.3, leading=7.5, textColor=self.grey)
        self.value = ParagraphStyle("value", base, fontSize=9.5, leading=11.5)
        self.kicker = ParagraphStyle("kicker", base, fontName=SANS_BOLD, fontSize=9, leading=11,
                                     textColor=self.accent)
        self.tag = ParagraphStyle("tag", base, fontName=SANS_BOLD, fontSize=17, leading=20.5, spaceBefore=2)
        self.description = ParagraphStyle("description", base, fontSize=10, leading=12.5, spaceAfter=6)
        self.h1 = ParagraphStyle("h1", base, fontName=SANS_BOLD, fontSize=11, leading=13.5, textColor=self.accent,
                                 spaceBefore=10, spaceAfter=3)
        self.h2 = ParagraphStyle("h2", base, fontName=SANS_BOLD, fontSize=9, leading=11, spaceBefore=6,
                                 spaceAfter=2)
        self.notice = ParagraphStyle("notice", base, fontSize=8.3, leading=10.6)
        self.alarm = ParagraphStyle("alarm", base, fontName=SANS_BOLD, fontSize=9, leading=11.5, spaceAfter=4)


def _p(text: object, style) -> object:
    return _p_raw(markup(text, bold=style.fontName in (SANS_BOLD, SANS_BOLD_ITALIC)), style)


@lru_cache(maxsize=1)
def _paragraph_class():
    from reportlab.platypus import Paragraph

    class SheetParagraph(Paragraph):
        """A Paragraph that keeps its line breaks for a width it was already wrapped to.

        reportlab wraps a table cell's paragraph to the same column width several times (row heights, page split,
        drawing); the line breaks depend on the width alone, so the second and later wraps reuse the first.
        """

        _wrapped_for = None

        def wrap(self, availWidth, availHeight):
            if self._wrapped_for == availWidth:
                return self.width, self.height
            result = super().wrap(availWidth, availHeight)
            self._wrapped_for = availWidth
            return result

        def split(self, availWidth, availHeight):
            self._wrapped_for = None
            return super().split(availWidth, availHeight)

    return SheetParagraph


@lru_cache(maxsize=1)
def _table_class():
    from reportlab.platypus import Table

    class SheetTable(Table):
        """A Table that writes its one-line, left-aligned text cells in one text object.

        reportlab draws each text cell as its own text object (with its own font, colour and width computation);
        here the cells' strings are collected while the table draws and written together, each at the same origin,
        in the same font and colour, just before the table's lines. Cells do not overlap, so the page looks the same.
        Any other cell (a Paragraph, text with a line break, other alignment, a link) is drawn by reportlab.
        """

        def _drawCell(self, cellval, cellstyle, pos, size):
            if type(cellval) is not str or cellstyle.alignment != "LEFT" or "\n" in cellval or \
                    cellstyle.direction or cellstyle.shaping or cellstyle.href or cellstyle.destination or \
                    cellstyle.valign not in ("TOP", "BOTTOM", "MIDDLE"):
                return super()._drawCell(cellval, cellstyle, pos, size)
            if not cellval:
                return None  # an empty cell draws nothing
            colpos, rowpos = pos
            rowheight = size[1]
            leading, fontsize = cellstyle.leading, cellstyle.fontsize
            if cellstyle.valign == "TOP":
                y = rowpos + rowheight - cellstyle.topPadding - fontsize
            elif cellstyle.valign == "BOTTOM":
                y = rowpos + cellstyle.bottomPadding + leading - fontsize
            else:
                y = rowpos + (cellstyle.bottomPadding + rowheight - cellstyle.topPadding + leading) / 2.0 - fontsize
            pending = self.__dict__.setdefault("_sheet_text", [])
            pending.append((colpos + cellstyle.leftPadding, y, cellval, cellstyle))
            return None

        def _drawLines(self):
            pending = self.__dict__.pop("_sheet_text", None)
            if pending:
                t = self.canv.beginText()
                font = color = None
                for x, y, text, cs in pending:
                    if font != (cs.fontname, cs.fontsize, cs.leading):
                        font = (cs.fontname, cs.fontsize, cs.leading)
                        t.setFont(*font)
                    if color is None or cs.color != color:
                        color = cs.color
                        t.setFillColor(color)
                    t.setTextOrigin(x, y)
                    t._textOut(text)
                self.canv.drawText(t)
            return super()._drawLines()

    return SheetTable


def _heading(text: str, st: _Styles) -> list:
    from reportlab.platypus import CondPageBreak, HRFlowable, Paragraph

    rule = HRFlowable(width="100%", thickness=0.8, color=st.accent, spaceBefore=0, spaceAfter=4)
    return [CondPageBreak(90), Paragraph(markup(text, bold=True), st.h1), rule]


class _Cell(NamedTuple):
    """A table cell's user text and style, resolved by :func:`_table` into a plain string or a Paragraph."""

    text: str
    style: object


def _c(text: object, style) -> _Cell:
    return _Cell(plain(text), style)


_PAD = 3.0


def _table(rows, widths, style_cmds, repeat: int = 0):
    """A Table; a text cell that fits its column on one line in the sheet font is drawn as a plain string.

    A plain string is not parsed as markup (so it needs no escaping) and costs a fraction of a Paragraph, which
    reportlab wraps several times per table; text that needs wrapping or the fallback font stays a Paragraph.
    """
    from reportlab.pdfbase.pdfmetrics import stringWidth
    from reportlab.lib.colors import black
    from reportlab.platypus import TableStyle

    cmds: list = []
    out_rows = []
    blocks: dict[tuple, list] = {}  # open blocks of plain-string cells: [first row, last row, c0, c1, style]
    done: list[list] = []
    for r, row in enumerate(rows):
        out_row = []
        runs: list[list] = []  # [first column, last column, style] of plain-string cells in one style
        for c, cell in enumerate(row):
            if isinstance(cell, _Cell):
                st = cell.style
                text = cell.text
                if not text:
                    out_row.append("")
                elif "\n" not in text and in_main_font(text) and \
                        stringWidth(text, st.fontName, st.fontSize) <= widths[c] - 2 * _PAD:
                    if runs and runs[-1][1] == c - 1 and runs[-1][2] is st:
                        runs[-1][1] = c
                    else:
                        runs.append([c, c, st])
                    out_row.append(text)
                else:
                    out_row.append(_p(text, st))
            else:
                out_row.append(cell)
        for c0, c1, st in runs:  # a run continuing the same columns and style from the row above extends its block
            key = (c0, c1, id(st))
            block = blocks.get(key)
            if block and block[1] == r - 1:
                block[1] = r
            else:
                if block:
                    done.append(block)
                blocks[key] = [r, r, c0, c1, st]
        out_rows.append(out_row)
    for r0, r1, c0, c1, st in sorted(done + list(blocks.values()), key=lambda b: (b[0], b[2])):
        a, b = (c0, r0), (c1, r1)  # one set of style commands per block of cells, not per cell
        if st.fontName != SANS:
            cmds.append(("FONTNAME", a, b, st.fontName))
        cmds += [("FONTSIZE", a, b, st.fontSize), ("LEADING", a, b, st.leading)]
        if st.textColor != black:
            cmds.append(("TEXTCOLOR", a, b, st.textColor))
    t = _table_class()(out_rows, colWidths=widths, repeatRows=repeat, hAlign="LEFT")
    base = [("FONTNAME", (0, 0), (-1, -1), SANS), ("VALIGN", (0, 0), (-1, -1), "TOP"),
            ("LEFTPADDING", (0, 0), (-1, -1), _PAD),
            ("RIGHTPADDING", (0, 0), (-1, -1), _PAD), ("TOPPADDING", (0, 0), (-1, -1), 2),
            ("BOTTOMPADDING", (0, 0), (-1, -1), 2.5)]
    t.setStyle(TableStyle(base + cmds + list(style_cmds)))
    return t


# ---------------------------------------------------------------------------------------------------- sections


def _identification(record, st: _Styles, width: float) -> list:
    from reportlab.platypus import Paragraph

    rows = dict(tables.identification_rows(record))
    out = [Paragraph("PROTECTION SETTINGS SHEET", st.kicker), _p(rows["Tag"], st.tag)]
    if rows["Description"]:
        out.append(_p(rows["Description"], st.description))

    def box(label: str, bold: bool = False):
        value = markup(rows[label], bold=bold) or "&nbsp;"
        return [Paragraph(label.upper(), st.label),
                Paragraph(f"<b>{value}</b>" if bold else value, st.value)]

    issued = (record.sheet or {}).get("status") == "issued"
    grid = [[box("Site"), "", box("Machine"), box("Practice")],
            [box("Revision"), box("Date"), box("Status", bold=True), ""]]
    w = width / 4
    out.append(_table(grid, [w] * 4, [
        ("SPAN", (0, 0), (1, 0)), ("SPAN", (2, 1), (3, 1)),
        ("BOX", (0, 0), (-1, -1), 0.8, st.accent), ("INNERGRID", (0, 0), (-1, -1), 0.4, st.grey),
        ("TOPPADDING", (0, 0), (-1, -1), 3), ("BOTTOMPADDING", (0, 0), (-1, -1), 4),
    ] + ([] if issued else [("LINEBELOW", (2, 1), (3, 1), 1.6, st.accent)])))
    return out


def _pairs_table(sections, st: _Styles, width: float):
    """Label/value pairs two to a row, with a heading row per section."""
    rows, cmds = [], []
    for title, pairs in sections:
        if title:
            cmds += [("SPAN", (0, len(rows)), (-1, len(rows))),
                     ("LINEBELOW", (0, len(rows)), (-1, len(rows)), 0.4, st.grey)]
            if rows:
                cmds.append(("TOPPADDING", (0, len(rows)), (-1, len(rows)), 6))
            rows.append([_c(title, st.cell_bold), "", "", ""])
        for i in range(0, len(pairs), 2):
            row = []
            for label, value, *note in pairs[i:i + 2]:
                cell = markup(value)
                if note and note[0]:
                    cell += f"<br/><font size='6.5' color='#555555'>{markup(note[0])}</font>"
                row += [_c(label, st.small), _p_raw(cell, st.cell)]
            rows.append(row + [""] * (4 - len(row)))
    return _table(rows, [width * f for f in (0.2, 0.3, 0.2, 0.3)], cmds)


def _inputs(record, st: _Styles, width: float) -> list:
    out = _heading("Machine and system data, as entered", st)
    sections = tables.input_sections(record)
    out.append(_pairs_table(sections, st, width) if sections else _p("No data entered.", st.body))
    derived = tables.derived_rows(record)
    derived_tables = tables.derived_tables(record)
    if derived or derived_tables:
        out += [_condbreak(60), _p("Derived by the study", st.h2)]
    if derived:
        out.append(_pairs_table([("", derived)], st, width))
    for title, header, rows in derived_tables:
        n = len(header)
        body = [[_c(h, st.head) for h in header]] + [[_c(v, st.cell) for v in row] for row in rows]
        out += [_condbreak(50), _p(title, st.cell_bold),
                _table(body, [width * 0.8 / n] * n, [("LINEBELOW", (0, 0), (-1, 0), 0.6, st.accent),
                                                     ("LINEBELOW", (0, 1), (-1, -1), 0.25, st.grey)], repeat=1)]
    return out


def _condbreak(height: float):
    from reportlab.platypus import CondPageBreak

    return CondPageBreak(height)


_SETTINGS_COLS = (("ID", 0.065), ("Function", 0.175), ("Setting", 0.18), ("Primary", 0.13),
                  ("Relay side (secondary)", 0.115), ("Source", 0.145), ("Note", 0.19))


def _settings(record, st: _Styles, width: float) -> list:
    out = _heading("Settings", st)
    blocks = tables.settings_blocks(record)
    if not blocks:
        return out + [_p("The study produced no settings for this machine.", st.body)]
    rows = [[_c(name, st.head) for name, _ in _SETTINGS_COLS]]
    cmds = [("LINEBELOW", (0, 0), (-1, 0), 1.0, st.accent)]
    for block in blocks:
        first = len(rows)
        for r in block.rows:
            rows.append([_c(r.fid, st.cell_bold), _c(r.function, st.cell_bold), _c(r.setting, st.cell),
                         _c(r.primary, st.cell), _c(r.relay_side, st.cell), _c(r.source, st.cell),
                         _c(r.note, st.cell)])
        basis = markup(block.basis) if block.basis else ""
        if block.references:
            basis += ("  " if basis else "") + f"<font name='{SANS}'>[{markup(block.references)}]</font>"
        if basis:
            rows.append(["", _p_raw(f"Basis: {basis}", st.basis), "", "", "", "", ""])
            cmds.append(("SPAN", (1, len(rows) - 1), (-1, len(rows) - 1)))
        cmds.append(("LINEBELOW", (0, len(rows) - 1), (-1, len(rows) - 1), 0.5, st.grey))
        cmds.append(("NOSPLIT", (0, first), (-1, len(rows) - 1)))
        if first > 1:
            cmds.append(("TOPPADDING", (0, first), (-1, first), 4))
    legend = ("Source: <b>standard</b> the cited standard's rule; <b>common practice</b> a usual default without a "
              "published limit, to be reviewed; <b>maker data</b> or <b>entered</b> from the machine file; "
              "<b>override</b> the engineer's value in place of the computed one, checked the same way; "
              "<b>derived</b> computed from the values above.")
    return out + [_table(rows, [width * f for _, f in _SETTINGS_COLS], cmds, repeat=1), _spacer(3),
                  _p_raw(legend, st.small)]


def _p_raw(markup_text: str, style):
    return _paragraph_class()(markup_text, style)


def _findings(record, st: _Styles, width: float) -> list:
    out = _heading("Findings", st)
    rows = tables.finding_rows(record)
    counts = {w: sum(1 for r in rows if r.status == w) for w in ("FAIL", "WARN", "ok")}
    if counts["FAIL"]:
        out.append(_p(f"{counts['FAIL']} check(s) failed. Do not apply these settings until every failed check is "
                      "resolved and the sheet is reissued.", st.alarm))
    if not rows:
        return out + [_p("The study reported no findings.", st.body)]
    out.append(_p(f"{counts['FAIL']} failed, {counts['WARN']} warning(s), {counts['ok']} passed.", st.small))
    body = [[_c("Result", st.head), _c("Function", st.head), _c("Finding", st.head)]]
    cmds = [("LINEBELOW", (0, 0), (-1, 0), 1.0, st.accent), ("LINEBELOW", (0, 1), (-1, -1), 0.3, st.grey)]
    for r in rows:
        style = st.cell_bold if r.status in ("FAIL", "WARN") else st.cell
        body.append([_c(r.status, style), _c(r.fid or "machine", st.cell), _c(r.message, style)])
        if r.status == "FAIL":
            cmds.append(("BOX", (0, len(body) - 1), (0, len(body) - 1), 1.2, st.accent))
    return out + [_table(body, [width * 0.08, width * 0.1, width * 0.82], cmds, repeat=1)]


def _notice(st: _Styles, width: float) -> list:
    from reportlab.platypus import Paragraph, Spacer

    cell = [Paragraph("Safety notice", st.h2), _p(SAFETY_NOTICE, st.notice)]
    return [Spacer(1, 8), _table([[cell]], [width], [("BOX", (0, 0), (-1, -1), 1.2, st.accent),
                                                     ("LEFTPADDING", (0, 0), (-1, -1), 7),
                                                     ("RIGHTPADDING", (0, 0), (-1, -1), 7),
                                                     ("BOTTOMPADDING", (0, 0), (-1, -1), 6)])]


def _drawings(record, st: _Styles, width: float, frame_height: float) -> list:
    from reportlab.platypus import KeepTogether

    drawings = list(record.drawings)
    for f in record.functions:
        drawings += f.drawings
    out = _heading("Drawings", st)
    if not drawings:
        return out + [_p("The study produced no drawings for this machine.", st.body)]
    height = min((frame_height - 60) / 2 - 24, width * 0.72) if len(drawings) > 1 else \
        min(frame_height * 0.62, width * 0.85)
    for d in drawings:
        out.append(KeepTogether([_p(d.title, st.h2), render(d, width, height)]))
    return out


_TEST_COLS = (("No.", 0.08), ("Test (initial state)", 0.30), ("Applied, primary", 0.1),
              ("Applied, relay side", 0.1), ("Expected time", 0.09), ("Accepted band", 0.145),
              ("Measured time", 0.11), ("Pass / fail", 0.075))


def _tests(record, st: _Styles, width: float) -> list:
    out = _heading("Commissioning tests", st)
    rows = tables.commissioning_rows(record)
    if not rows:
        return out + [_p("The study produced no test points.", st.body)]
    out.append(_p("Inject each value with the settings of this sheet applied to the relay, starting from the "
                  "initial state given; write the measured operate time and pass or fail. The accepted band is the "
                  "expected time plus and minus its tolerance; the letter in brackets points to the tolerance rule "
                  "under the table.", st.small))
    body = [[_c(name, st.head) for name, _ in _TEST_COLS]]
    for r in rows:
        test = markup(r.test)
        if r.initial_state and r.initial_state != "—":
            test += f"<br/><font color='#555555'>initial state: {markup(r.initial_state)}</font>"
        body.append([_c(r.number, st.cell_bold), _p_raw(test, st.cell),
                     _c(r.applied_primary, st.cell), _c(r.applied_secondary, st.cell), _c(r.expected, st.cell),
                     _c(r.band + (f" [{r.tolerance_key}]" if r.tolerance_key else ""), st.cell), "", ""])
    cmds = [("LINEBELOW", (0, 0), (-1, 0), 1.0, st.accent), ("LINEBELOW", (0, 1), (-1, -1), 0.3, st.grey),
            ("BOX", (-2, 1), (-1, -1), 0.6, st.grey), ("INNERGRID", (-2, 1), (-1, -1), 0.6, st.grey),
            ("TOPPADDING", (0, 1), (-1, -1), 4), ("BOTTOMPADDING", (0, 1), (-1, -1), 6)]
    out.append(_table(body, [width * f for _, f in _TEST_COLS], cmds, repeat=1))
    for key, rule in tables.tolerance_notes(record):
        out.append(_p(f"[{key}] tolerance: {rule}", st.small))
    blanks = [[_c("Tested by", st.small), "", _c("Date", st.small), "", _c("Relay and firmware", st.small), "",
               _c("Test set", st.small), ""]]
    out.append(_table(blanks, [width * f for f in (0.09, 0.16, 0.05, 0.12, 0.14, 0.18, 0.08, 0.18)],
                      [("LINEBELOW", (1, 0), (1, 0), 0.5, st.grey), ("LINEBELOW", (3, 0), (3, 0), 0.5, st.grey),
                       ("LINEBELOW", (5, 0), (5, 0), 0.5, st.grey), ("LINEBELOW", (7, 0), (7, 0), 0.5, st.grey),
                       ("TOPPADDING", (0, 0), (-1, -1), 14)]))
    return out


def _history(record, st: _Styles, width: float) -> list:
    out = _heading("Revision history", st)
    body = [[_c(h, st.head) for h in ("Revision", "Date", "By", "Reason")]]
    for rev, date, by, reason in tables.history_rows(record):
        body.append([_c(rev, st.cell), _c(date, st.cell), _c(by, st.cell), _c(reason, st.cell)])
    return out + [_table(body, [width * f for f in (0.1, 0.14, 0.22, 0.54)],
                         [("LINEBELOW", (0, 0), (-1, 0), 1.0, st.accent),
                          ("LINEBELOW", (0, 1), (-1, -1), 0.3, st.grey)], repeat=1)]


def _signoff(record, st: _Styles, width: float) -> list:
    from reportlab.platypus import KeepTogether

    out = _heading("Sign-off", st)
    body = [[_c(h, st.head) for h in ("", "Name", "Date", "Signature")]]
    for role, name, date in tables.signoff_rows(record):
        body.append([_c(role, st.cell_bold), _c(name, st.value), _c(date, st.value), ""])
    cmds = [("LINEBELOW", (1, 1), (-1, -1), 0.6, st.grey), ("TOPPADDING", (0, 1), (-1, -1), 16),
            ("VALIGN", (0, 1), (-1, -1), "BOTTOM")]
    out.append(_table(body, [width * f for f in (0.14, 0.32, 0.18, 0.36)], cmds))
    fp = _p(f"Inputs fingerprint: {record.inputs_fingerprint}", st.cell)
    expl = _p("The fingerprint identifies the validated machine data these settings were computed from. "
              "To check that a sheet still matches its machine file: relaywright verify SHEET.pdf --machine FILE.",
              st.small)
    return [KeepTogether(out + [_spacer(8), fp, expl])]


def _spacer(h: float):
    from reportlab.platypus import Spacer

    return Spacer(1, h)


# ---------------------------------------------------------------------------------------------------- pages


def _footer_lines(record) -> tuple[str, str]:
    sheet = record.sheet or {}
    status = "issued" if sheet.get("status") == "issued" else "DRAFT"
    rev = sheet.get("revision", record.revision)
    return (f"{plain(record.tag)} · revision {rev} · {status}",
            f"inputs fingerprint {record.inputs_fingerprint}")


@lru_cache(maxsize=1)
def _canvas_class():
    from reportlab.pdfgen.canvas import Canvas

    class SheetCanvas(Canvas):
        """Holds the pages until the end so that every footer can say 'page x of y'."""

        def __init__(self, *args, footer=None, **kwargs):
            super().__init__(*args, **kwargs)
            self._pages: list[dict] = []
            self._footer = footer

        def showPage(self):
            self._pages.append(dict(self.__dict__))
            self._startPage()

        def save(self):
            total = len(self._pages)
            for number, state in enumerate(self._pages, start=1):
                self.__dict__.update(state)
                self._footer(self, number, total)
                super().showPage()
            super().save()

    return SheetCanvas


def _draw_footer(canvas, number: int, total: int, *, lines, st: _Styles, width: float):
    from reportlab.platypus import Paragraph

    canvas.saveState()
    y = _MARGIN_BOTTOM - 22
    canvas.setStrokeColor(st.accent)
    canvas.setLineWidth(0.6)
    canvas.line(_MARGIN_X, y + 12, _MARGIN_X + width, y + 12)
    canvas.setFont(SANS_BOLD, 7.5)
    canvas.drawRightString(_MARGIN_X + width, y + 2, f"page {number} of {total}")
    left_w = width - 90
    first = Paragraph(markup(_fit(lines[0], left_w, 7.5)), st.footer)
    first.wrapOn(canvas, left_w, 10)
    first.drawOn(canvas, _MARGIN_X, y)
    canvas.setFont(SANS, 6.5)
    canvas.setFillColor(st.grey)
    canvas.drawString(_MARGIN_X, y - 9, lines[1])
    canvas.restoreState()


def _fit(text: str, width: float, size: float) -> str:
    """``text`` cut with an ellipsis to fit ``width`` at ``size`` (the full tag is on page 1)."""
    from reportlab.pdfbase.pdfmetrics import stringWidth

    if stringWidth(text, SANS, size) <= width:
        return text
    while text and stringWidth(text + "…", SANS, size) > width:
        text = text[:-1]
    return text + "…"


def build_sheet(record, page_size: str | None = None) -> bytes:
    """The PDF settings sheet for ``record`` as bytes (A4 or letter; default the record's ``sheet.page_size``)."""
    from reportlab.platypus import BaseDocTemplate, Frame, PageBreak, PageTemplate

    register()
    size = page_size_of(page_size or (record.sheet or {}).get("page_size") or "A4")
    st = _Styles()
    page_w, page_h = size
    width = page_w - 2 * _MARGIN_X
    frame_h = page_h - _MARGIN_TOP - _MARGIN_BOTTOM
    buf = io.BytesIO()
    sheet = record.sheet or {}
    rev = sheet.get("revision", record.revision)
    doc = BaseDocTemplate(
        buf, pagesize=size, invariant=True, leftMargin=_MARGIN_X, rightMargin=_MARGIN_X, topMargin=_MARGIN_TOP,
        bottomMargin=_MARGIN_BOTTOM, title=f"{plain(record.tag)} protection settings, revision {rev}",
        author=plain(sheet.get("prepared_by") or ""), subject=f"Protection settings sheet for {plain(record.tag)}",
        keywords=keywords(record), creator=f"relaywright {_version()}".strip(), lang="en",
        initialFontName=SANS, initialFontSize=8.5)
    frame = Frame(_MARGIN_X, _MARGIN_BOTTOM, width, frame_h, leftPadding=0, rightPadding=0, topPadding=0,
                  bottomPadding=0, id="body")
    doc.addPageTemplates([PageTemplate(id="sheet", frames=[frame], pagesize=size)])

    story: list = []
    story += _identification(record, st, width)
    story += _inputs(record, st, width)
    story += _settings(record, st, width)
    story += _findings(record, st, width)
    story += _notice(st, width)
    story.append(PageBreak())
    story += _drawings(record, st, width, frame_h)
    story.append(PageBreak())
    story += _tests(record, st, width)
    story += _history(record, st, width)
    story += _signoff(record, st, width)

    footer = partial(_draw_footer, lines=_footer_lines(record), st=st, width=width)
    from reportlab import rl_config

    a85, rl_config.useA85 = rl_config.useA85, 0  # binary compressed streams: smaller and about 5 % faster
    try:
        doc.build(story, canvasmaker=partial(_canvas_class(), footer=footer))
    finally:
        rl_config.useA85 = a85
    return buf.getvalue()
