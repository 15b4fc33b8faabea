"""The printable settings sheet, built from a settings record in two steps: a layout, then the PDF.

:func:`sheet_layout` turns a record into a layout: plain data (JSON-ready) naming every block in order —
paragraphs with their markup and style, tables with their cells, widths and style commands, drawings as lists of
drawing operations — and the page furniture (footer lines, draft mark, document information). :func:`render_layout`
sets a layout with reportlab's public API. ``benchmarks/floor_sheet.py`` sets the same saved layout with plain
reportlab, so the benchmark's floor is the same document.

Order (what the engineer signs, what the technician keys in, what maintenance files): identification, machine and
system data as entered, derived values, the settings with each function's basis and the values they rest on, the
derived tables, findings (fails first), the safety notice; the keying list; the drawings; the commissioning test
table, the revision history (with what changed since the previous revision), the sign-off block and the inputs
fingerprint. Every page carries a footer with the tag, revision, status, inputs fingerprint and "page x of y"; a
sheet that is not issued says DRAFT at the top of every page. The tag, revision and fingerprint are also written to
the PDF's /Keywords so that ``relaywright verify`` can compare a sheet with a machine file. The PDF is dated with
the revision date and is otherwise invariant: the same record gives the same bytes.
"""

from __future__ import annotations

import io
from functools import lru_cache
from typing import NamedTuple

from machines.errors import InputError, one_line
from reports import tables
from reports.fonts import SANS, SANS_BOLD, SANS_BOLD_ITALIC, SANS_ITALIC, font_files, formula, in_main_font, \
    markup, plain, register
from reports.formatting import glue_units
from reports.notices import SAFETY_NOTICE
from reports.plots import ACCENT_HEX, figure

PAGE_SIZES = ("A4", "letter")
KEYWORDS_PREFIX = "relaywright settings sheet"
LAYOUT_FORMAT = "relaywright.layout/1"
MARGIN_X, MARGIN_TOP, MARGIN_BOTTOM = 40.0, 40.0, 50.0
PAGES_FORM = "rwPageTotal"  #: the form holding the page count, drawn after "page x of" on every page
GREY, DARK, RULE_GREY = "#555555", "#222222", "#8a8a8a"
_SIZES = {"a4": (595.2755905511812, 841.8897637795277), "letter": (612.0, 792.0)}
_PAD = 3.0


class SignatureBox(NamedTuple):
    """Where the approver's signature goes: page index (0-based) and the rectangle (x1, y1, x2, y2) in points."""

    page: int
    box: tuple[float, float, float, float]


def page_size_of(name: str | None) -> tuple[float, float]:
    """Page size in points for ``"A4"`` or ``"letter"`` (any letter case)."""
    key = (name or "A4").strip().lower()
    if key in _SIZES:
        return _SIZES[key]
    raise InputError("page_size", f"expected A4 or letter, got {one_line(name)}")


def keywords(record) -> str:
    """The /Keywords entry: fixed prefix, inputs fingerprint, revision, and the tag last (it may hold anything)."""
    return (f"{KEYWORDS_PREFIX}; inputs_fingerprint={record.inputs_fingerprint}; "
            f"revision={record.sheet.get('revision', record.revision)}; tag={plain(record.tag)}")


@lru_cache(maxsize=1)
def _version() -> str:
    from machines import __version__  # importlib.metadata would cost a sheet process about 20 ms

    return __version__


def pdf_date(iso: str | None) -> str:
    """The PDF date string of an ISO date (midnight UTC); reportlab's fixed date when there is none.

    >>> pdf_date("2026-11-20"), pdf_date("")
    ("D:20261120000000+00'00'", "D:20000101000000+00'00'")
    """
    text = str(iso or "")
    if len(text) == 10 and text[4] == "-" and text[7] == "-" and (text[:4] + text[5:7] + text[8:]).isdigit():
        return f"D:{text[:4]}{text[5:7]}{text[8:]}000000+00'00'"
    return "D:20000101000000+00'00'"


# ---------------------------------------------------------------------------------------------------- styles

#: paragraph styles by name (reportlab ParagraphStyle arguments; colours as hex)
STYLES: dict[str, dict] = {
    "body": dict(fontName=SANS, fontSize=8.5, leading=10.8),
    "cell": dict(fontName=SANS, fontSize=7.8, leading=9.4),
    "cellb": dict(fontName=SANS_BOLD, fontSize=7.8, leading=9.4),
    "set": dict(fontName=SANS_BOLD, fontSize=8.2, leading=9.6),
    "basis": dict(fontName=SANS_ITALIC, fontSize=7.3, leading=8.9, textColor=DARK),
    "head": dict(fontName=SANS_BOLD, fontSize=7.8, leading=9.4, textColor=ACCENT_HEX),
    "small": dict(fontName=SANS, fontSize=7.2, leading=8.8, textColor=GREY),
    "label": dict(fontName=SANS, fontSize=6.3, leading=7.5, textColor=GREY),
    "value": dict(fontName=SANS, fontSize=9.5, leading=11.5),
    "valueb": dict(fontName=SANS_BOLD, fontSize=9.5, leading=11.5),
    "kicker": dict(fontName=SANS_BOLD, fontSize=9, leading=11, textColor=ACCENT_HEX),
    "tag": dict(fontName=SANS_BOLD, fontSize=17, leading=20.5, spaceBefore=2),
    "description": dict(fontName=SANS, fontSize=10, leading=12.5, spaceAfter=6),
    "h1": dict(fontName=SANS_BOLD, fontSize=11, leading=13.5, textColor=ACCENT_HEX, spaceBefore=10, spaceAfter=3),
    "h2": dict(fontName=SANS_BOLD, fontSize=9, leading=11, spaceBefore=6, spaceAfter=2),
    "notice": dict(fontName=SANS, fontSize=8.3, leading=10.6),
    "alarm": dict(fontName=SANS_BOLD, fontSize=9, leading=11.5, spaceAfter=4),
}
_BOLD = (SANS_BOLD, SANS_BOLD_ITALIC)


def _para(text: object, style: str, *, study: bool = False) -> list:
    """A paragraph block: ``study`` text (labels, notes, sentences) gets its formulas set, user text is escaped."""
    bold = STYLES[style]["fontName"] in _BOLD
    body = _f(text, bold=bold) if study else markup(text, bold=bold)
    return ["p", glue_units(body), style]


def _f(text: object, bold: bool = False) -> str:
    """Markup of study text: machine-file keys named as the sheet names them, formulas set."""
    return formula(tables.readable_keys(plain(text)), bold=bold)


def _raw(markup_text: str, style: str) -> list:
    return ["p", glue_units(markup_text), style]


class _Cell(NamedTuple):
    text: str
    style: str
    study: bool = False


def _c(text: object, style: str = "cell", study: bool = False) -> _Cell:
    return _Cell(plain(text), style, study)


def _one_line(cell: _Cell, width: float) -> bool:
    """True when a cell can be drawn as a plain string: one line in the sheet font, no formula to set."""
    return _plain_width(cell.text, cell.style, cell.study) <= width - 2 * _PAD


@lru_cache(maxsize=8192)
def _plain_width(text: str, style: str, study: bool) -> float:
    """The width [pt] of ``text`` set as a plain string in ``style``; infinite when it cannot be one (a line break,
    a character of the fallback font, a formula or key to set). Cells repeat across a sheet and a batch (sources,
    outputs, units), so the answer is kept."""
    from reportlab.pdfbase.pdfmetrics import stringWidth

    if "\n" in text or not in_main_font(text):
        return float("inf")
    if study and (formula(text) != markup(text) or tables.readable_keys(text) != text):
        return float("inf")
    st = STYLES[style]
    return stringWidth(text, st["fontName"], st["fontSize"])


def _table(rows, widths, cmds=(), repeat: int = 0) -> dict:
    """A table block; a text cell that fits its column on one line is a plain string (styled by commands)."""
    out_rows, extra = [], []
    for r, row in enumerate(rows):
        out_row = []
        for c, cell in enumerate(row):
            if isinstance(cell, _Cell):
                if not cell.text:
                    out_row.append("")
                elif _one_line(cell, widths[c]):
                    out_row.append(cell.text)
                    st = STYLES[cell.style]
                    if st["fontName"] != SANS:
                        extra.append(["FONTNAME", [c, r], [c, r], st["fontName"]])
                    if st["fontSize"] != 7.8:
                        extra.append(["FONTSIZE", [c, r], [c, r], st["fontSize"]])
                        extra.append(["LEADING", [c, r], [c, r], st["leading"]])
                    if st.get("textColor"):
                        extra.append(["TEXTCOLOR", [c, r], [c, r], st["textColor"]])
                else:
                    out_row.append(_para(cell.text, cell.style, study=cell.study))
            else:
                out_row.append(cell)
        out_rows.append(out_row)
    base = [["FONTNAME", [0, 0], [-1, -1], SANS], ["FONTSIZE", [0, 0], [-1, -1], 7.8],
            ["LEADING", [0, 0], [-1, -1], 9.4], ["VALIGN", [0, 0], [-1, -1], "TOP"],
            ["LEFTPADDING", [0, 0], [-1, -1], _PAD], ["RIGHTPADDING", [0, 0], [-1, -1], _PAD],
            ["TOPPADDING", [0, 0], [-1, -1], 2], ["BOTTOMPADDING", [0, 0], [-1, -1], 2.5]]
    return {"t": "table", "rows": out_rows, "widths": [round(w, 3) for w in widths],
            "cmds": base + _merge_cmds(extra) + [_cmd(c) for c in cmds], "repeat": repeat}


def _merge_cmds(cmds: list) -> list:
    """Per-cell style commands of consecutive cells of one row merged into one command per run."""
    out: list = []
    for c in cmds:
        last = out[-1] if out else None
        if last and last[0] == c[0] and last[3:] == c[3:] and last[2][1] == c[1][1] and last[2][0] == c[1][0] - 1:
            last[2] = [c[2][0], c[2][1]]
        else:
            out.append([c[0], list(c[1]), list(c[2])] + list(c[3:]))
    return out


def _cmd(c) -> list:
    return [c[0], list(c[1]), list(c[2])] + list(c[3:])


def _heading(text: str) -> list:
    return [{"t": "cond", "h": 90}, {"t": "p", **_pd(_para(text, "h1"))},
            {"t": "rule", "thickness": 0.8, "color": ACCENT_HEX, "after": 4}]


def _pd(p: list) -> dict:
    return {"text": p[1], "style": p[2]}


def _p(text: object, style: str, study: bool = False) -> dict:
    return {"t": "p", **_pd(_para(text, style, study=study))}


# ---------------------------------------------------------------------------------------------------- sections


def _identification(record, width: float) -> list:
    rows = dict(tables.identification_rows(record))
    out = [{"t": "p", "text": "PROTECTION SETTINGS SHEET", "style": "kicker"}, _p(rows["Tag"], "tag")]
    if rows["Description"]:
        out.append(_p(rows["Description"], "description"))

    def box(label: str, bold: bool = False):
        return ["stack", [["p", label.upper(), "label"],
                          _para(rows[label], "valueb" if bold else "value") if rows[label] else
                          ["p", "&nbsp;", "value"]]]

    issued = tables.status_of(record) == "issued"
    grid = [[box("Site"), "", box("Machine"), box("Practice")],
            [box("Revision"), box("Date"), box("Status", bold=True), ""]]
    w = width / 4
    cmds = [("SPAN", (0, 0), (1, 0)), ("SPAN", (2, 1), (3, 1)), ("BOX", (0, 0), (-1, -1), 0.8, ACCENT_HEX),
            ("INNERGRID", (0, 0), (-1, -1), 0.4, GREY), ("TOPPADDING", (0, 0), (-1, -1), 3),
            ("BOTTOMPADDING", (0, 0), (-1, -1), 4)]
    if not issued:
        cmds.append(("LINEBELOW", (2, 1), (3, 1), 1.6, ACCENT_HEX))
    out.append(_table(grid, [w] * 4, cmds))
    return out


def _pairs_table(sections, width: float, changed: set[str] = frozenset(), study: bool = False) -> dict:
    """Label/value pairs two to a row, with a heading row per section; a changed pair gets a bar."""
    rows, cmds = [], []
    for title, pairs in sections:
        if title:
            cmds += [("SPAN", (0, len(rows)), (-1, len(rows))),
                     ("LINEBELOW", (0, len(rows)), (-1, len(rows)), 0.4, GREY)]
            if rows:
                cmds.append(("TOPPADDING", (0, len(rows)), (-1, len(rows)), 6))
            rows.append([_c(title, "cellb"), "", "", ""])
        for i in range(0, len(pairs), 2):
            row = []
            for k, (label, value, *rest) in enumerate(pairs[i:i + 2]):
                note = rest[0] if rest else ""
                key = rest[1] if len(rest) > 1 else ""
                text = markup(value)
                if note:
                    text += f"<br/><font size='6.5' color='{GREY}'>{_f(note) if study else markup(note)}</font>"
                row += [_c(label, "small", study=True), _raw(text, "cell")]
                if key and key in changed:
                    cmds.append(("LINEBEFORE", (2 * k, len(rows)), (2 * k, len(rows)), 2.5, ACCENT_HEX))
            rows.append(row + [""] * (4 - len(row)))
    return _table(rows, [width * f for f in (0.2, 0.3, 0.2, 0.3)], cmds)


def _inputs(record, width: float, changed: set[str]) -> list:
    out = _heading("Machine and system data, as entered")
    sections = []
    for (title, pairs), section in zip(tables.input_sections(record), [s for s, t in (record.inputs or {}).items()
                                                                       if isinstance(t, dict) and t]):
        keys = list((record.inputs or {}).get(section) or {})
        sections.append((title, [(label, value, note, f"{section}.{key}") for (label, value, note), key
                                 in zip(pairs, keys)]))
    out.append(_pairs_table(sections, width, changed) if sections else _p("No data entered.", "body"))
    derived = [(label, value, note, f"derived.{key}") for (label, value, note), key
               in zip(tables.derived_rows(record), [k for k, s in record.derived.items()
                                                    if not tables._is_table(s.value)])]
    if derived:
        out += [{"t": "cond", "h": 60}, _p("Derived by the study", "h2"),
                _pairs_table([("", derived)], width, changed, study=True)]
    return out


_SETTINGS_COLS = (("ID", 0.06), ("Function", 0.16), ("Setting", 0.19), ("Primary", 0.105),
                  ("Set on relay", 0.125), ("Source", 0.115), ("Note", 0.245))


def _settings(record, width: float, changed: set[str]) -> list:
    out = [{"t": "cond", "h": 220}] + _heading("Settings")  # the heading goes with the first function's rows
    blocks = tables.settings_blocks(record)
    if not blocks:
        return out + [_p("The study produced no settings for this machine.", "body")]
    out.append(_p("Set on relay: the value to key in, relay side (secondary) where a CT or VT applies, rounded to "
                  "the relay's setting step; every check and test on this sheet uses it.", "small"))
    rows = [[_c(name, "head") for name, _ in _SETTINGS_COLS]]
    cmds = [("LINEBELOW", (0, 0), (-1, 0), 1.0, ACCENT_HEX)]
    for block in blocks:
        first = len(rows)
        for r in block.rows:
            to_set = _c(r.relay_side, "set") if not r.step else _raw(
                f"{markup(r.relay_side, bold=True)}<br/><font name='{SANS}' size='6.5' color='{GREY}'>step "
                f"{markup(r.step)}</font>", "set")
            rows.append([_c(r.fid, "cellb"), _c(r.function, "cellb", True), _c(r.setting, "cell", True),
                         _c(r.primary), to_set, _c(r.source), _c(r.note, "cell", True)])
            if f"{block.fid}.{r.key}" in changed or (r is block.rows[0] and block.fid in changed):
                cmds.append(("LINEBEFORE", (0, len(rows) - 1), (0, len(rows) - 1), 2.5, ACCENT_HEX))
        basis = _f(block.basis) if block.basis else ""
        if block.references:
            basis += ("  " if basis else "") + f"<font name='{SANS}'>[{_f(block.references)}]</font>"
        if basis:
            rows.append(["", _raw(f"Basis: {basis}", "basis"), "", "", "", "", ""])
            cmds.append(("SPAN", (1, len(rows) - 1), (-1, len(rows) - 1)))
        cmds.append(("LINEBELOW", (0, len(rows) - 1), (-1, len(rows) - 1), 0.5, GREY))
        cmds.append(("NOSPLIT", (0, first), (-1, len(rows) - 1)))
        if first > 1:
            cmds.append(("TOPPADDING", (0, first), (-1, first), 4))
    legend = ("Source: <b>standard</b> the cited standard's rule; <b>common practice</b> a usual default without a "
              "published limit, to be reviewed; <b>maker data</b> or <b>entered</b> from the machine file; "
              "<b>override</b> the engineer's value in place of the computed one, checked the same way.")
    out += [_table(rows, [width * f for _, f in _SETTINGS_COLS], cmds, repeat=1), _spacer(3), _raw(legend, "small")]
    out = [b if isinstance(b, dict) else {"t": "p", **_pd(b)} for b in out]
    out += _function_values(blocks, width, changed)
    out += _derived_tables(record, width)
    return out


def _function_values(blocks, width: float, changed: set[str]) -> list:
    """Each function's values that are not keyed into the relay: what the settings achieve, windows, sizes."""
    rows = [[_c(h, "head") for h in ("ID", "Value", "", "Note")]]
    cmds = [("LINEBELOW", (0, 0), (-1, 0), 1.0, ACCENT_HEX), ("LINEBELOW", (0, 1), (-1, -1), 0.25, GREY)]
    for block in blocks:
        for i, d in enumerate(block.derived):
            rows.append([_c(block.fid if i == 0 else "", "cellb"), _c(d.label, "cell", True), _c(d.value),
                         _c(d.note, "cell", True)])
            if f"{block.fid}.{d.key}" in changed:
                cmds.append(("LINEBEFORE", (0, len(rows) - 1), (0, len(rows) - 1), 2.5, ACCENT_HEX))
    if len(rows) == 1:
        return []
    return [{"t": "cond", "h": 80}, _p("Values the settings rest on (not keyed into the relay)", "h2"),
            _table(rows, [width * f for f in (0.06, 0.39, 0.2, 0.35)], cmds, repeat=1)]


def _derived_tables(record, width: float) -> list:
    out = []
    for title, header, rows in tables.derived_tables(record):
        n = len(header)
        body = [[_c(h, "head", True) for h in header]] + [[_c(v) for v in row] for row in rows]
        out += [{"t": "cond", "h": 80}, _p(title, "h2", study=True),
                _table(body, [width * 0.8 / n] * n, [("LINEBELOW", (0, 0), (-1, 0), 0.6, ACCENT_HEX),
                                                     ("LINEBELOW", (0, 1), (-1, -1), 0.25, GREY)], repeat=1)]
    return out


def _findings(record, width: float) -> list:
    out = _heading("Findings")
    rows = tables.finding_rows(record)
    counts = {w: sum(1 for r in rows if r.status == w) for w in ("FAIL", "WARN", "ok")}
    if counts["FAIL"]:
        out.append(_p(f"{counts['FAIL']} check(s) failed. Do not apply these settings until every failed check is "
                      "resolved and the sheet is reissued.", "alarm"))
    if not rows:
        return out + [_p("The study reported no findings.", "body")]
    out.append(_p(f"{counts['FAIL']} failed, {counts['WARN']} warning(s), {counts['ok']} passed.", "small"))
    body = [[_c("Result", "head"), _c("Function", "head"), _c("Finding", "head")]]
    cmds = [("LINEBELOW", (0, 0), (-1, 0), 1.0, ACCENT_HEX), ("LINEBELOW", (0, 1), (-1, -1), 0.3, GREY)]
    for r in rows:
        style = "cellb" if r.status in ("FAIL", "WARN") else "cell"
        body.append([_c(r.status, style), _c(r.fid or "machine"), _c(r.message, style, True)])
        if r.status == "FAIL":
            cmds.append(("BOX", (0, len(body) - 1), (0, len(body) - 1), 1.2, ACCENT_HEX))
    return out + [_table(body, [width * 0.08, width * 0.1, width * 0.82], cmds, repeat=1)]


def _notice(width: float) -> list:
    cell = ["stack", [["p", "Safety notice", "h2"], _para(SAFETY_NOTICE, "notice")]]
    return [_spacer(8), _table([[cell]], [width], [("BOX", (0, 0), (-1, -1), 1.2, ACCENT_HEX),
                                                   ("LEFTPADDING", (0, 0), (-1, -1), 7),
                                                   ("RIGHTPADDING", (0, 0), (-1, -1), 7),
                                                   ("BOTTOMPADDING", (0, 0), (-1, -1), 6)])]


def _keying(record, width: float, changed: set[str]) -> list:
    out = _heading("Keying list (for the relay technician)")
    out.append(_p("Key these values into the relay in this order: first the setup, then each function. Values are "
                  "relay side (secondary), rounded to the relay's setting step. Functions marked off are left out of "
                  "service. " + tables.OUTPUTS_NOTE, "small"))
    setup = [[_c("Relay setup", "head"), _c("Value", "head")]]
    for label, value in tables.keying_setup(record):
        setup.append([_c(label, "cell", True), _c(value, "set")])
    out.append(_table(setup, [width * 0.4, width * 0.6], [("LINEBELOW", (0, 0), (-1, 0), 1.0, ACCENT_HEX),
                                                          ("LINEBELOW", (0, 1), (-1, -1), 0.25, GREY)]))
    out.append(_spacer(6))
    cols = (("ID", 0.07), ("Function / setting", 0.39), ("Value to key in", 0.19), ("Step", 0.1),
            ("Output", 0.17), ("Done", 0.08))
    rows = [[_c(h, "head") for h, _ in cols]]
    cmds = [("LINEBELOW", (0, 0), (-1, 0), 1.0, ACCENT_HEX)]
    for f in tables.keying_list(record):
        first = len(rows)
        state = "ON" if f.state == "on" else "OFF (out of service)"
        rows.append([_c(f.fid, "cellb"), _c(f.title, "cellb", True), _c(state, "set"), "", _c(f.outputs, "small"),
                     ""])
        cmds += [("SPAN", (3, first), (3, first)), ("LINEABOVE", (0, first), (-1, first), 0.6, GREY)]
        for r in f.rows:
            rows.append(["", _c(r.label, "cell", True), _c(r.value, "set"), _c(r.step, "small"),
                         _c(r.output, "small"), ""])
            cmds.append(("BOX", (5, len(rows) - 1), (5, len(rows) - 1), 0.5, GREY))
            if f"{f.fid}.{r.key}" in changed:
                cmds.append(("LINEBEFORE", (0, len(rows) - 1), (0, len(rows) - 1), 2.5, ACCENT_HEX))
        cmds.append(("NOSPLIT", (0, first), (-1, len(rows) - 1)))
    out.append(_table(rows, [width * f for _, f in cols], cmds, repeat=1))
    return out


def _ct_ratio(record) -> tuple[float, str] | None:
    """(primary amperes per relay-side ampere, the ratio as written) of the phase CT, from the machine file."""
    import re

    text = str(((record.inputs or {}).get("instruments") or {}).get("phase_ct") or "")
    m = re.fullmatch(r"\s*([0-9.]+)\s*/\s*([0-9.]+)\s*A\s*", text)
    if not m:
        return None
    try:
        primary, secondary = float(m.group(1)), float(m.group(2))
    except ValueError:
        return None
    return (primary / secondary, f"{m.group(1)}/{m.group(2)} A") if primary > 0 and secondary > 0 else None


def _drawings(record, width: float, frame_height: float) -> list:
    drawings = list(record.drawings)
    for f in record.functions:
        drawings += f.drawings
    out = _heading("Drawings")
    if not drawings:
        return out + [_p("The study produced no drawings for this machine.", "body")]
    ct = _ct_ratio(record)
    full = frame_height - 60
    half = (frame_height - 60) / 2 - 24
    for i, d in enumerate(drawings):
        main = d.kind == "time-current" and i == 0 and record.kind == "induction-motor"
        # the motor's time-current drawing and the R-X plane (zones, capability and limiter close together, a long
        # legend) take a page each; the other drawings half a page
        height = full if (main or d.kind == "r-x" or len(drawings) == 1) else half
        if i and main is False and len(drawings) > 1 and i == 1 and drawings[0].kind == "time-current" \
                and record.kind == "induction-motor":
            out.append({"t": "break"})
        fig = figure(d, width, height, ct_ratio=ct)
        out.append({"t": "keep", "items": [_p(d.title, "h2", study=True), {"t": "figure", **fig}]})
    return out


_TEST_COLS = (("No.", 0.09), ("Test (initial state)", 0.29), ("Applied, primary", 0.1),
              ("Applied, relay side", 0.1), ("Expected time", 0.09), ("Accepted band", 0.145),
              ("Measured time", 0.11), ("Pass / fail", 0.075))


def _tests(record, width: float) -> list:
    out = _heading("Commissioning tests")
    rows = tables.commissioning_rows(record)
    if not rows:
        return out + [_p("The study produced no test points.", "body")]
    out.append(_p("Inject each value with the settings of this sheet applied to the relay, starting from the "
                  "initial state given; write the measured operate time and pass or fail. The accepted band is the "
                  "expected time plus and minus its tolerance; the letter in brackets points to the tolerance rule "
                  "under the table.", "small"))
    body = [[_c(name, "head") for name, _ in _TEST_COLS]]
    for r in rows:
        test = _f(r.test)
        if r.initial_state and r.initial_state != "—":
            test += f"<br/><font color='{GREY}'>initial state: {_f(r.initial_state)}</font>"
        body.append([_c(r.number, "cellb"), _raw(test, "cell"), _c(r.applied_primary), _c(r.applied_secondary),
                     _c(r.expected), _c(r.band + (f" [{r.tolerance_key}]" if r.tolerance_key else "")), "", ""])
    cmds = [("LINEBELOW", (0, 0), (-1, 0), 1.0, ACCENT_HEX), ("LINEBELOW", (0, 1), (-1, -1), 0.3, GREY),
            ("BOX", (-2, 1), (-1, -1), 0.6, GREY), ("INNERGRID", (-2, 1), (-1, -1), 0.6, GREY),
            ("TOPPADDING", (0, 1), (-1, -1), 4), ("BOTTOMPADDING", (0, 1), (-1, -1), 6)]
    out.append(_table(body, [width * f for _, f in _TEST_COLS], cmds, repeat=1))
    for key, rule in tables.tolerance_notes(record):
        out.append(_p(f"[{key}] tolerance: {rule}", "small", study=True))
    blanks = [[_c("Tested by", "small"), "", _c("Date", "small"), "", _c("Relay and firmware", "small"), "",
               _c("Test set", "small"), ""]]
    out.append(_table(blanks, [width * f for f in (0.09, 0.16, 0.05, 0.12, 0.14, 0.18, 0.08, 0.18)],
                      [("LINEBELOW", (1, 0), (1, 0), 0.5, GREY), ("LINEBELOW", (3, 0), (3, 0), 0.5, GREY),
                       ("LINEBELOW", (5, 0), (5, 0), 0.5, GREY), ("LINEBELOW", (7, 0), (7, 0), 0.5, GREY),
                       ("TOPPADDING", (0, 0), (-1, -1), 14)]))
    return out


def _history(record, width: float, changes) -> list:
    out = _heading("Revision history")
    body = [[_c(h, "head") for h in ("Revision", "Date", "By", "Reason")]]
    for rev, date, by, reason in tables.history_rows(record):
        body.append([_c(rev), _c(date), _c(by), _c(reason)])
    out.append(_table(body, [width * f for f in (0.1, 0.14, 0.22, 0.54)],
                      [("LINEBELOW", (0, 0), (-1, 0), 1.0, ACCENT_HEX),
                       ("LINEBELOW", (0, 1), (-1, -1), 0.3, GREY)], repeat=1))
    if changes is not None:
        previous, items = changes
        out.append(_p(f"Changed since revision {previous}", "h2"))
        if not items:
            out.append(_p("Nothing that the sheet prints has changed.", "body"))
        else:
            out.append(_p("Rows marked with a bar in the left margin of the tables above changed; old → new.",
                          "small"))
            body = [[_c(h, "head") for h in ("Changed", "Was", "Now")]]
            for what, old, new in items:
                body.append([_c(what, "cell", True), _c(old), _c(new, "cellb")])
            out.append(_table(body, [width * f for f in (0.4, 0.3, 0.3)],
                              [("LINEBELOW", (0, 0), (-1, 0), 1.0, ACCENT_HEX),
                               ("LINEBELOW", (0, 1), (-1, -1), 0.25, GREY),
                               ("LINEBEFORE", (0, 1), (0, -1), 2.5, ACCENT_HEX)], repeat=1))
    return out


def _signoff(record, width: float) -> list:
    out = _heading("Sign-off")
    body = [[_c(h, "head") for h in ("", "Name", "Date", "Signature")]]
    sig_w, sig_h = width * 0.36 - 2 * _PAD, 34.0
    for role, name, date in tables.signoff_rows(record):
        cell = ["spot", round(sig_w, 2), sig_h] if role == "Approved" else ""
        body.append([_c(role, "cellb"), _c(name, "value"), _c(date, "value"), cell])
    cmds = [("LINEBELOW", (1, 1), (-1, -1), 0.6, GREY), ("TOPPADDING", (0, 1), (-1, -1), 16),
            ("VALIGN", (0, 1), (-1, -1), "BOTTOM"), ("TOPPADDING", (3, 3), (3, 3), 2)]
    out.append(_table(body, [width * f for f in (0.14, 0.32, 0.18, 0.36)], cmds))
    fp = _p(f"Inputs fingerprint: {record.inputs_fingerprint}", "cell")
    expl = _p("The fingerprint identifies the validated machine data these settings were computed from. "
              "To check that a sheet still matches its machine file: relaywright verify SHEET.pdf --machine FILE.",
              "small")
    return [{"t": "keep", "items": out + [_spacer(8), fp, expl]}]


def _spacer(h: float) -> dict:
    return {"t": "space", "h": h}


# ---------------------------------------------------------------------------------------------------- changes


def _change_view(changes, previous: int | None):
    """(previous revision, [(what, old, new)]) and the set of changed keys, from :class:`machines.compare.Changes`."""
    if changes is None:
        return None, frozenset()
    keys: set[str] = set()
    items = []
    for c in changes:
        keys.add(c.key)
        items.append((_change_label(c.key), c.old, c.new))
    return (previous if previous is not None else "", items), frozenset(keys)


def _change_label(key: str) -> str:
    section, _, name = key.partition(".")
    if section in tables.SECTION_TITLE and name and "." not in name:
        return f"{tables.SECTION_TITLE[section]}: {tables.printed_label(name)[:1].lower()}" \
               f"{tables.printed_label(name)[1:]}"
    if section == "derived":
        return f"Derived: {tables.printed_label(name).lower()}"
    return f"{section} {tables.printed_label(name)}".strip() if name else section


# ---------------------------------------------------------------------------------------------------- the layout


def sheet_layout(record, page_size: str | None = None, changes=None, previous_revision: int | None = None) -> dict:
    """The sheet of ``record`` as plain data (see the module docstring); ``changes`` (from
    :func:`machines.compare.compare`) against ``previous_revision`` marks what changed."""
    register()
    size = page_size_of(page_size or (record.sheet or {}).get("page_size") or "A4")
    page_w, page_h = size
    width = page_w - 2 * MARGIN_X
    frame_h = page_h - MARGIN_TOP - MARGIN_BOTTOM
    sheet = record.sheet or {}
    rev = sheet.get("revision", record.revision)
    status = tables.status_of(record)
    change_view, changed = _change_view(changes, previous_revision)

    blocks: list = []
    blocks += _identification(record, width)
    blocks += _inputs(record, width, changed)
    blocks += _settings(record, width, changed)
    blocks += _findings(record, width)
    blocks += _notice(width)
    blocks.append({"t": "break"})
    blocks += _keying(record, width, changed)
    blocks.append({"t": "break"})
    blocks += _drawings(record, width, frame_h)
    blocks.append({"t": "break"})
    blocks += _tests(record, width)
    blocks += _history(record, width, change_view)
    blocks += _signoff(record, width)
    blocks = [b if isinstance(b, dict) else {"t": "p", **_pd(b)} for b in blocks]

    status_word = "issued" if status == "issued" else "DRAFT" + ("" if status == "draft" else f" ({status})")
    return {
        "format": LAYOUT_FORMAT,
        "page": {"size": [page_w, page_h], "margin_x": MARGIN_X, "margin_top": MARGIN_TOP,
                 "margin_bottom": MARGIN_BOTTOM},
        "fonts": font_files(),
        "styles": STYLES,
        "info": {"title": f"{plain(record.tag)} protection settings, revision {rev}",
                 "author": plain(sheet.get("prepared_by") or ""),
                 "subject": f"Protection settings sheet for {plain(record.tag)}, revision {rev}, {status}",
                 "keywords": keywords(record), "creator": f"relaywright {_version()}".strip(),
                 "date": pdf_date(sheet.get("date"))},
        "footer": _footer(record, status, status_word, size),
        "blocks": blocks,
    }


# ---------------------------------------------------------------------------------------------------- rendering


def build_sheet(record, page_size: str | None = None, changes=None, previous_revision: int | None = None) -> bytes:
    """The PDF settings sheet for ``record`` as bytes (A4 or letter; default the record's ``sheet.page_size``)."""
    return render_layout(sheet_layout(record, page_size, changes, previous_revision))[0]


def build_sheet_for_signing(record, page_size: str | None = None, changes=None,
                            previous_revision: int | None = None) -> tuple[bytes, SignatureBox | None]:
    """The sheet's bytes and where the approver's signature goes (for a visible signature)."""
    return render_layout(sheet_layout(record, page_size, changes, previous_revision))


def render_layout(layout: dict) -> tuple[bytes, SignatureBox | None]:
    """Set a layout with reportlab: the PDF bytes and the signature box (public reportlab API only)."""
    from reportlab import rl_config
    from reportlab.platypus import BaseDocTemplate, Frame, PageTemplate

    register()
    page = layout["page"]
    size = tuple(page["size"])
    mx, mt, mb = page["margin_x"], page["margin_top"], page["margin_bottom"]
    width = size[0] - 2 * mx
    styles = _paragraph_styles(layout["styles"])
    spots: list = []
    story = [_flowable(b, styles, spots) for b in layout["blocks"]]
    info = layout["info"]
    buf = io.BytesIO()
    doc = BaseDocTemplate(
        buf, pagesize=size, invariant=True, leftMargin=mx, rightMargin=mx, topMargin=mt, bottomMargin=mb,
        title=info["title"], author=info["author"], subject=info["subject"], keywords=info["keywords"],
        creator=info["creator"], lang="en", initialFontName=SANS, initialFontSize=8.5)
    frame = Frame(mx, mb, width, size[1] - mt - mb, leftPadding=0, rightPadding=0, topPadding=0, bottomPadding=0,
                  id="body")
    footer = layout["footer"]
    doc.addPageTemplates([PageTemplate(id="sheet", frames=[frame], pagesize=size,
                                       onPage=lambda canv, _doc: _decorate(canv, footer))])
    a85, rl_config.useA85 = rl_config.useA85, 0  # binary compressed streams: smaller and about 5 % faster
    try:
        doc.build(story, canvasmaker=_canvas_maker(info["date"]))
    finally:
        rl_config.useA85 = a85
    box = None
    if spots and spots[-1]:
        number, (x1, y1, x2, y2) = spots[-1]
        box = SignatureBox(number - 1, (round(x1, 2), round(y1, 2), round(x2, 2), round(y2, 2)))
    return buf.getvalue(), box


def _paragraph_styles(spec: dict) -> dict:
    from reportlab.lib.colors import HexColor
    from reportlab.lib.styles import ParagraphStyle

    out = {}
    for name, kw in spec.items():
        kw = dict(kw)
        if "textColor" in kw:
            kw["textColor"] = HexColor(kw["textColor"])
        out[name] = ParagraphStyle(name, **kw)
    return out


def _flowable(block, styles, spots):
    """One layout block as a reportlab flowable."""
    from reportlab.lib.colors import HexColor
    from reportlab.platypus import CondPageBreak, HRFlowable, KeepTogether, PageBreak, Paragraph, Spacer, Table, \
        TableStyle

    kind = block["t"]
    if kind == "p":
        return Paragraph(block["text"], styles[block["style"]])
    if kind == "table":
        rows = [[_cell(c, styles, spots) for c in row] for row in block["rows"]]
        cmds = []
        for c in block["cmds"]:
            args = [HexColor(a) if isinstance(a, str) and a.startswith("#") else a for a in c[3:]]
            cmds.append((c[0], tuple(c[1]), tuple(c[2]), *args))
        t = Table(rows, colWidths=block["widths"], repeatRows=block["repeat"], hAlign="LEFT")
        t.setStyle(TableStyle(cmds))
        return t
    if kind == "space":
        return Spacer(1, block["h"])
    if kind == "cond":
        return CondPageBreak(block["h"])
    if kind == "break":
        return PageBreak()
    if kind == "rule":
        return HRFlowable(width="100%", thickness=block["thickness"], color=HexColor(block["color"]),
                          spaceBefore=0, spaceAfter=block["after"])
    if kind == "keep":
        return KeepTogether([_flowable(b, styles, spots) for b in block["items"]])
    if kind == "figure":
        return _figure_class()(block["w"], block["h"], block["ops"])
    raise ValueError(f"unknown layout block {kind!r}")


def _cell(c, styles, spots):
    from reportlab.platypus import Paragraph

    if isinstance(c, str):
        return c
    if c[0] == "p":
        return Paragraph(c[1], styles[c[2]])
    if c[0] == "stack":
        return [_cell(x, styles, spots) for x in c[1]]
    if c[0] == "spot":
        return _spot_class()(c[1], c[2], spots)
    raise ValueError(f"unknown table cell {c[0]!r}")


@lru_cache(maxsize=1)
def _figure_class():
    from reportlab.platypus import Flowable

    from reports.plots import draw_ops

    class Figure(Flowable):
        """A laid-out drawing: its operations replayed on the page."""

        def __init__(self, width, height, ops):
            super().__init__()
            self.width, self.height, self.ops = width, height, ops

        def wrap(self, availWidth, availHeight):
            return self.width, self.height

        def draw(self):
            draw_ops(self.canv, self.ops)

    return Figure


@lru_cache(maxsize=1)
def _spot_class():
    from reportlab.platypus import Flowable

    class SignatureSpot(Flowable):
        """An empty box that notes where it was drawn (page number and rectangle) for the visible signature."""

        def __init__(self, width, height, found):
            super().__init__()
            self.width, self.height, self.found = width, height, found

        def wrap(self, availWidth, availHeight):
            return self.width, self.height

        def draw(self):
            x1, y1 = self.canv.absolutePosition(0, 0)
            x2, y2 = self.canv.absolutePosition(self.width, self.height)
            self.found.append((self.canv.getPageNumber(), (x1, y1, x2, y2)))

    return SignatureSpot


def _canvas_maker(date: str):
    """A canvas class dated ``date`` whose saving defines the page-count form used by every footer."""
    from reportlab.pdfgen.canvas import Canvas

    class SheetCanvas(Canvas):
        def __init__(self, *args, **kwargs):
            super().__init__(*args, **kwargs)
            self.setDateFormatter(lambda *parts: date)

        def save(self):
            self.beginForm(PAGES_FORM)
            self.setFont(SANS_BOLD, 7.5)
            self.drawString(0, 0, str(self.getPageNumber() - 1))
            self.endForm()
            super().save()

    return SheetCanvas


def _footer(record, status: str, status_word: str, size) -> dict:
    """The page furniture as drawing operations (the same on every page) and the page-number position."""
    from reportlab.pdfbase.pdfmetrics import stringWidth

    from reports.plots import text_runs

    width = size[0] - 2 * MARGIN_X
    y = MARGIN_BOTTOM - 22
    first = _fit(f"{plain(record.tag)} · revision {record.sheet.get('revision', record.revision)} · {status_word}",
                 width - 90, 7.5)
    ops = [["path", ACCENT_HEX, 0.6, None, [[MARGIN_X, y + 12, MARGIN_X + width, y + 12]], None],
           ["text", MARGIN_X, y + 2, text_runs(first, 7.5, formulas=False), GREY, 0],
           ["text", MARGIN_X, y - 7, [[f"inputs fingerprint {record.inputs_fingerprint}", SANS, 6.5, 0.0]], GREY,
            0]]
    if status != "issued":
        text = "DRAFT · not for use" if status == "draft" else f"DRAFT · {status}, not issued · not for use"
        ops.append(["text", round(MARGIN_X + width - stringWidth(text, SANS_BOLD, 9), 2), size[1] - 26,
                    [[text, SANS_BOLD, 9, 0.0]], ACCENT_HEX, 0])
    return {"ops": ops, "page_number": [MARGIN_X + width - 58, y + 2, SANS_BOLD, 7.5]}


def _decorate(canv, footer: dict) -> None:
    """Every page's furniture: footer, draft mark, and "page x of" followed by the page-count form."""
    from reportlab.pdfbase.pdfmetrics import stringWidth

    from reports.plots import draw_ops

    draw_ops(canv, footer["ops"])
    x, y, font, size = footer["page_number"]
    label = f"page {canv.getPageNumber()} of "
    canv.saveState()
    canv.setFont(font, size)
    canv.drawString(x, y, label)
    canv.translate(x + stringWidth(label, font, size), y)
    canv.doForm(PAGES_FORM)
    canv.restoreState()


def _fit(text: str, width: float, size: float) -> str:
    """``text`` cut with an ellipsis to fit ``width`` at ``size`` (the full tag is on page 1)."""
    from reportlab.pdfbase.pdfmetrics import stringWidth

    if stringWidth(text, SANS, size) <= width:
        return text
    while text and stringWidth(text + "…", SANS, size) > width:
        text = text[:-1]
    return text + "…"
