"""Text for a terminal: wrapped at word boundaries to its width, never cut, never broken inside a word.

Standard library only, so the command line can use it without slowing ``--help``. A word longer than the line (a
long file path) is kept whole on a line of its own: the terminal folds it, but no character is lost.
"""

from __future__ import annotations

import shutil
import sys
import textwrap

MAX_WIDTH = 110  #: longer lines are hard to read even on a wide terminal
MIN_WIDTH = 30


def columns() -> int:
    """The terminal's width in columns (``COLUMNS`` wins, as everywhere; 80 when there is no terminal)."""
    return shutil.get_terminal_size((80, 24)).columns


def rows() -> int:
    """The terminal's height in lines (``LINES`` wins; 24 when there is no terminal)."""
    return shutil.get_terminal_size((80, 24)).lines


def line_width(width: int | None = None) -> int:
    """The width text is wrapped to: one less than the terminal (so no line ends in its last column), at most 110."""
    w = columns() if width is None else width
    return max(min(w - 1, MAX_WIDTH), MIN_WIDTH)


def wrap(text: str, width: int | None = None, indent: str | None = None) -> list[str]:
    """``text`` as lines of at most ``width`` columns, broken between words; continuation lines indented.

    An indented line continues two columns further in (a hanging indent, so the next item stands out); a line that
    starts at the margin continues at the margin.

    >>> wrap("Caution: settings must be reviewed and approved by a competent, licensed engineer", 30)
    ['Caution: settings must be', 'reviewed and approved by a', 'competent, licensed engineer']
    >>> wrap("  ! a warning that goes on for a while", 20)
    ['  ! a warning that', '    goes on for a', '    while']
    """
    w = line_width(width) if width is None else width
    if not text:
        return [""]
    out: list[str] = []
    for paragraph in text.split("\n"):
        lead = len(paragraph) - len(paragraph.lstrip())
        sub = indent if indent is not None else " " * (lead + 2 if lead else 0)
        lines = textwrap.wrap(paragraph, width=w, subsequent_indent=sub, break_long_words=False,
                              break_on_hyphens=False, drop_whitespace=True)
        out += lines or [""]
    return out


def shown(text: object) -> str:
    """``text`` with every character a terminal would act on escaped (ESC, BEL, NUL, bidirectional overrides),
    line breaks kept: what is printed is what was written, never a command to the terminal.

    >>> shown("P-101\\x1b[2J\\nnext")
    'P-101\\\\x1b[2J\\nnext'
    """
    from machines.errors import printable

    return "\n".join(printable(line) for line in str(text).split("\n"))


def say(text: str = "", wrap_it: bool = True, file=None) -> None:
    """Print ``text`` wrapped to the terminal (``wrap_it=False``: as it is, e.g. a command to copy), control
    characters escaped."""
    stream = file or sys.stdout
    if not wrap_it:
        print(shown(text), file=stream, flush=True)
        return
    print("\n".join(wrap(shown(text))), file=stream, flush=True)


def for_stream(text: str, stream) -> str:
    """``text`` wrapped to the terminal when ``stream`` is one; as one line for a pipe or a file (scripts read it)."""
    try:
        tty = stream.isatty()
    except (AttributeError, ValueError):
        tty = False
    return "\n".join(wrap(shown(text))) if tty else shown(text)
