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
