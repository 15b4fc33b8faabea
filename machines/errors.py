"""The one error type for bad input, raised with the key path, the value and what was expected."""

from __future__ import annotations


class InputError(ValueError):
    """Bad input from a person or a file.

    The message is a single line: ``key: expected <what>, got <value>``. Commands print it as it is and exit 2.
    """

    def __init__(self, key: str, message: str, source: str = ""):
        self.key = key
        self.detail = message
        self.source = source
        text = f"{key}: {message}" if key else message
        super().__init__(f"{source}: {text}" if source and source != key else text)

    def at(self, source: object) -> "InputError":
        """The same error, said of a file: ``examples/m.toml: machine.rated_current: ...``."""
        return InputError(self.key, self.detail, str(source))


def one_line(text: object, limit: int = 60) -> str:
    """Quote a user value for an error message: one line, at most ``limit`` characters."""
    s = str(text).replace("\n", "\\n").replace("\r", "\\r")
    if len(s) > limit:
        s = s[: limit - 1] + "…"
    return repr(s) if isinstance(text, str) else s
