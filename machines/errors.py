"""The one error type for bad input, raised with the key path, the value and what was expected; and the one way
text from files, certificates and file names is made safe to print on a terminal."""

from __future__ import annotations

import re
import unicodedata

#: characters a terminal may act on instead of showing: C0 and C1 controls, DEL, and the invisible format
#: characters (bidirectional embeddings, overrides and isolates, zero-width characters, the byte-order mark) and
#: line/paragraph separators, which can make printed text read other than it is (Unicode TR #9, TR #36)
UNSAFE = _UNSAFE = re.compile(r"[\x00-\x1f\x7f-\x9f\u00ad\u061c\u180e\u200b-\u200f\u2028-\u202e\u2060-\u206f\ufeff"
                     r"\ufff9-\ufffb\U000e0000-\U000e007f]")


def _escape(m: re.Match) -> str:
    ch = m.group(0)
    if ch == "\n":
        return "\\n"
    if ch == "\r":
        return "\\r"
    if ch == "\t":
        return "\\t"
    code = ord(ch)
    return f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}" if code < 0x10000 else f"\\U{code:08x}"


def printable(text: object) -> str:
    """``text`` as one line that a terminal shows as written: control and invisible format characters escaped.

    Escape sequences (ESC), bell, NUL, C1 controls and bidirectional overrides can clear a screen, set a window
    title or make text read backwards; they are shown as ``\\x1b``, ``\\u202e`` and so on. Other characters, any
    script, are kept.

    >>> printable("P-101\\x1b[2J"), printable("abc\\u202edcba"), printable("Насос-3\\n")
    ('P-101\\\\x1b[2J', 'abc\\\\u202edcba', 'Насос-3\\\\n')
    """
    s = str(text)
    return _UNSAFE.sub(_escape, s) if _UNSAFE.search(s) else s


def unsafe_character(text: str) -> str | None:
    """The first character of ``text`` that :func:`printable` would escape, named (``U+001B``), or None.

    >>> unsafe_character("CW-P-201"), unsafe_character("a\\x00b"), unsafe_character("x\\u202ey")
    (None, 'U+0000 (a control character)', 'U+202E (an invisible formatting character)')
    """
    m = _UNSAFE.search(text)
    if m is None:
        return None
    ch = m.group(0)
    what = "a control character" if unicodedata.category(ch) == "Cc" else "an invisible formatting character"
    return f"U+{ord(ch):04X} ({what})"


class InputError(ValueError):
    """Bad input from a person or a file.

    The message is a single line: ``key: expected <what>, got <value>``. Commands print it as it is and exit 2.
    Whatever the message quotes (keys, values, file names) is made printable: one line, no control characters.
    """

    def __init__(self, key: str, message: str, source: str = ""):
        self.key = key
        self.detail = message
        self.source = source
        text = f"{key}: {message}" if key else message
        super().__init__(printable(f"{source}: {text}" if source and source != key else text))

    def at(self, source: object) -> "InputError":
        """The same error, said of a file: ``examples/m.toml: machine.rated_current: ...``."""
        return InputError(self.key, self.detail, str(source))


def one_line(text: object, limit: int = 60) -> str:
    """Quote a user value for an error message: one line, at most ``limit`` characters, nothing a terminal acts on.

    >>> one_line("abc"), one_line(12), one_line("x" * 70)[-2:], one_line("a\\x07b")
    ("'abc'", '12', "…'", "'a\\\\x07b'")
    """
    if isinstance(text, int) and not isinstance(text, bool) and abs(text) >= 10 ** 15:
        return f"a number of {int(abs(text).bit_length() * 0.30103) + 1} digits"  # str() of it may be refused
    s = printable(text)
    if len(s) > limit:
        s = s[: limit - 1] + "…"
    return repr(s).replace("\\\\", "\\") if isinstance(text, str) else s
