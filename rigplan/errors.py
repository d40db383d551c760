"""Error types shared by every layer (no third-party imports)."""

from __future__ import annotations

import re

_CONTROL = re.compile(r"[\x00-\x08\x0b-\x1f\x7f\u2028\u2029]")


def one_line(text: str) -> str:
    """``text`` on one line: line breaks become spaces, other control
    characters (a terminal escape in a file name) are shown escaped."""
    text = " ".join(str(text).split("\n"))
    text = text.replace("\r", " ").replace("\t", " ")
    return _CONTROL.sub(lambda m: repr(m.group())[1:-1], text)


class InputError(ValueError):
    """A bad value the user supplied.

    ``where`` names the file and the row or key (``"strings/demo.toml:
    section[2].wall"``); ``message`` says what was expected, with units.
    ``str(err)`` is the one-line message shown to the user (line breaks and
    control characters in either part are made printable on that line).
    """

    def __init__(self, where: str, message: str):
        self.where = one_line(where)
        self.message = one_line(message)
        super().__init__(f"{self.where}: {self.message}" if self.where else self.message)
