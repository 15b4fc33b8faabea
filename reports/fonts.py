"""The sheet's fonts, and user text made safe for a reportlab Paragraph.

The sheet is set in Bitstream Vera, which ships inside reportlab (so every installation draws the same sheet).
Vera covers Latin-1 and the symbols the sheet prints (Ω, µ, ², ·, ≥, —) but not Greek, Cyrillic and the like. A tag such
as ``Насос-3`` must still print as written, so characters Vera lacks are set in DejaVu Sans when the system has it
(Debian's fonts-dejavu-core); a character neither font holds would print as an empty box, and
:func:`missing_glyphs` names such characters so a caller can warn.

Every user string goes through :func:`markup` before it reaches a Paragraph: it is escaped (a tag like
``M-101 <spare> & co`` prints as written instead of being parsed as markup) and runs of characters Vera lacks are
wrapped in a ``<font>`` tag for the fallback font.
"""

from __future__ import annotations

import os
import re
from functools import lru_cache
from html import escape as _html_escape  # xml.sax.saxutils would pull in urllib, ssl and email (~20 ms)

SANS, SANS_BOLD, SANS_ITALIC, SANS_BOLD_ITALIC = "RW-Sans", "RW-Sans-Bold", "RW-Sans-Italic", "RW-Sans-BoldItalic"
FALLBACK, FALLBACK_BOLD = "RW-Fallback", "RW-Fallback-Bold"

_VERA = {SANS: "Vera.ttf", SANS_BOLD: "VeraBd.ttf", SANS_ITALIC: "VeraIt.ttf", SANS_BOLD_ITALIC: "VeraBI.ttf"}
_DEJAVU_DIRS = ("/usr/share/fonts/truetype/dejavu", "/usr/share/fonts/dejavu", "/usr/share/fonts/TTF",
                "/usr/local/share/fonts", "/Library/Fonts")
_DEJAVU = {FALLBACK: "DejaVuSans.ttf", FALLBACK_BOLD: "DejaVuSans-Bold.ttf"}


@lru_cache(maxsize=1)
def register() -> bool:
    """Register the sheet's fonts with reportlab (once per process). Returns True when the fallback font exists."""
    import reportlab
    from reportlab.lib.fonts import addMapping
    from reportlab.pdfbase import pdfmetrics
    from reportlab.pdfbase.ttfonts import TTFont

    folder = os.path.join(os.path.dirname(reportlab.__file__), "fonts")
    for name, file in _VERA.items():
        pdfmetrics.registerFont(TTFont(name, os.path.join(folder, file)))
    pdfmetrics.registerFontFamily(SANS, normal=SANS, bold=SANS_BOLD, italic=SANS_ITALIC, boldItalic=SANS_BOLD_ITALIC)
    have_fallback = False
    for directory in _DEJAVU_DIRS:
        paths = {name: os.path.join(directory, file) for name, file in _DEJAVU.items()}
        if all(os.path.isfile(p) for p in paths.values()):
            for name, path in paths.items():
                pdfmetrics.registerFont(TTFont(name, path))
            # the last mapping of a name decides how a <font name=...> tag reads it: regular, resp. bold
            addMapping(FALLBACK, 0, 1, FALLBACK)
            addMapping(FALLBACK, 1, 1, FALLBACK_BOLD)
            addMapping(FALLBACK, 0, 0, FALLBACK)
            addMapping(FALLBACK, 1, 0, FALLBACK_BOLD)
            have_fallback = True
            break
    return have_fallback


@lru_cache(maxsize=4)
def _charset(name: str) -> frozenset[int]:
    from reportlab.pdfbase import pdfmetrics

    register()
    try:
        font = pdfmetrics.getFont(name)
    except KeyError:
        return frozenset()
    return frozenset(font.face.charToGlyph)


@lru_cache(maxsize=1)
def _main_or_break() -> frozenset[int]:
    return _charset(SANS) | {ord("\n"), ord("\t")}


def _in_main(ch: str) -> bool:
    return ord(ch) in _main_or_break()


def in_main_font(text: str) -> bool:
    """True when every character of ``text`` is in the sheet font (no fallback needed)."""
    return _charset(SANS).issuperset(map(ord, text))


def missing_glyphs(text: str) -> list[str]:
    """Characters of ``text`` that neither the sheet font nor the fallback font can draw (in order, once each)."""
    main, fallback = _charset(SANS), _charset(FALLBACK)
    out: list[str] = []
    for ch in text:
        if ord(ch) not in main and ord(ch) not in fallback and ch not in out and ch.isprintable():
            out.append(ch)
    return out


def plain(text: object) -> str:
    """User text as one printable string: control characters (other than newline) shown as spaces."""
    s = "" if text is None else str(text)
    if s.isprintable():  # nearly always: no need to look at each character
        return s
    return "".join(ch if ch.isprintable() or ch == "\n" else " " for ch in s)


def markup(text: object, bold: bool = False) -> str:
    """Paragraph markup that prints ``text`` exactly as written (``bold``: the paragraph is set in bold).

    >>> markup("M-101 <spare> & co")
    'M-101 &lt;spare&gt; &amp; co'
    >>> markup("line one\\nline two")
    'line one<br/>line two'
    """
    s = plain(text)
    if _main_or_break().issuperset(map(ord, s)):
        return escape(s).replace("\n", "<br/>")
    has_fallback = register()
    parts: list[str] = []
    run: list[str] = []
    run_main = True
    for ch in s:
        is_main = _in_main(ch)
        if is_main != run_main and run:
            parts.append(_piece("".join(run), run_main, has_fallback, bold))
            run = []
        run_main = is_main
        run.append(ch)
    if run:
        parts.append(_piece("".join(run), run_main, has_fallback, bold))
    return "".join(parts)


def escape(text: str) -> str:
    """``&``, ``<`` and ``>`` as entities (quotes are left alone: they are plain text in a Paragraph).

    >>> escape('a < b & "c"')
    'a &lt; b &amp; "c"'
    """
    return _html_escape(text, quote=False)


def _piece(text: str, main: bool, has_fallback: bool, bold: bool) -> str:
    body = escape(text).replace("\n", "<br/>")
    if main or not has_fallback:
        return body
    return f'<font name="{FALLBACK_BOLD if bold else FALLBACK}">{body}</font>'


# ---------------------------------------------------------------------------------------------------- formulas

SUB, SUPER = "sub", "super"
_SUPER_GROUP = re.compile(r"\^\(([^()]*)\)|\^([0-9A-Za-z−+-]+)")
_SUBSCRIPT = re.compile(
    r"(?<![A-Za-z])([A-Za-zα-ωΑ-Ω])_([A-Za-z0-9]{1,10})(?![A-Za-z0-9_])"  # I_LR, t_st, 3I_C0, V_rated
    r"|(?<![A-Za-z0-9'])([IVXZKC])([0-2])(?![A-Za-z0-9.])"  # I2, V1, C0, K2
    r"|(?<![A-Za-z0-9])(X'{0,2})([dq])(?![A-Za-z0-9])"  # Xd, X'd, X''d, Xq
)


def formula_segments(text: object) -> list[tuple[str, tuple[str, ...]]]:
    """A formula written in plain text, as segments with their level: ``()``, ``("sub",)``, ``("super", "sub")``.

    The study writes formulas the way one types them: ``I_LR`` (subscript LR), ``e^(−t_st/τ)`` (superscript with a
    subscript inside), ``I2``, ``V1``, ``C0`` (sequence and zero-sequence subscripts), ``Xd``, ``X'd`` (reactance
    subscripts). Anything else is text.

    >>> formula_segments("k·I_B")
    [('k·I', ()), ('B', ('sub',))]
    >>> formula_segments("e^(−t_st/τ)")
    [('e', ()), ('−t', ('super',)), ('st', ('super', 'sub')), ('/τ', ('super',))]
    >>> formula_segments("I2/I1 and Xd")
    [('I', ()), ('2', ('sub',)), ('/I', ()), ('1', ('sub',)), (' and X', ()), ('d', ('sub',))]
    """
    out: list[tuple[str, tuple[str, ...]]] = []
    s = plain(text)
    pos = 0
    for m in _SUPER_GROUP.finditer(s):
        out += _subscripts(s[pos:m.start()], ())
        out += _subscripts(m.group(1) if m.group(1) is not None else m.group(2), (SUPER,))
        pos = m.end()
    out += _subscripts(s[pos:], ())
    merged: list[tuple[str, tuple[str, ...]]] = []
    for seg, level in out:
        if merged and merged[-1][1] == level:
            merged[-1] = (merged[-1][0] + seg, level)
        elif seg:
            merged.append((seg, level))
    return merged


def _subscripts(text: str, level: tuple[str, ...]) -> list[tuple[str, tuple[str, ...]]]:
    out = []
    pos = 0
    for m in _SUBSCRIPT.finditer(text):
        base, sub = next((m.group(i), m.group(i + 1)) for i in (1, 3, 5) if m.group(i) is not None)
        out += [(text[pos:m.start()] + base, level), (sub, level + (SUB,))]
        pos = m.end()
    out.append((text[pos:], level))
    return out


def formula(text: object, bold: bool = False) -> str:
    """Paragraph markup of study text with its formulas set properly (sub- and superscripts), escaped like markup.

    >>> formula("Pickup current k·I_B")
    'Pickup current k·I<sub>B</sub>'
    >>> formula("3 < I_LR^2")
    '3 &lt; I<sub>LR</sub><super>2</super>'
    """
    parts = []
    for seg, level in formula_segments(text):
        body = markup(seg, bold=bold)
        for tag in reversed(level):
            body = f"<{tag}>{body}</{tag}>"
        parts.append(body)
    return "".join(parts)


def font_files() -> dict[str, str]:
    """The TrueType files of the fonts registered for the sheet, by the name the PDF uses (for the benchmark floor)."""
    import reportlab

    have_fallback = register()
    folder = os.path.join(os.path.dirname(reportlab.__file__), "fonts")
    out = {name: os.path.join(folder, file) for name, file in _VERA.items()}
    if have_fallback:
        for directory in _DEJAVU_DIRS:
            paths = {name: os.path.join(directory, file) for name, file in _DEJAVU.items()}
            if all(os.path.isfile(p) for p in paths.values()):
                out.update(paths)
                break
    return out


def in_fallback(ch: str) -> bool:
    """True when ``ch`` is not in the sheet font (it is set in the fallback font where there is one)."""
    return not _in_main(ch)
