"""Error types shared by every layer (no third-party imports)."""

from __future__ import annotations


class InputError(ValueError):
    """A bad value the user supplied.

    ``where`` names the file and the row or key (``"strings/demo.toml:
    section[2].wall"``); ``message`` says what was expected, with units.
    ``str(err)`` is the one-line message shown to the user.
    """

    def __init__(self, where: str, message: str):
        self.where = where
        self.message = message
        super().__init__(f"{where}: {message}" if where else message)
