"""The one family of errors a user can cause.

Every error raised because of bad input is a :class:`DomegenError` (a
``ValueError``).  It carries the field, the bad value and, for scene files,
the file, line and column, so the command line can print one located line
and exit with status 2 instead of a traceback.
"""

from __future__ import annotations


class DomegenError(ValueError):
    """Bad input or an impossible request; ``str()`` is the one-line message."""

    def __init__(self, message: str, *, field: str | None = None, value=None,
                 file: str | None = None, line: int | None = None,
                 column: int | None = None, hint: str | None = None):
        super().__init__(message)
        self.message = message
        self.field = field
        self.value = value
        self.file = file
        self.line = line
        self.column = column
        self.hint = hint

    def location(self) -> str:
        """``file:line:column`` as far as known, else an empty string."""
        if not self.file:
            return ""
        loc = str(self.file)
        if self.line is not None:
            loc += f":{self.line}"
            if self.column is not None:
                loc += f":{self.column}"
        return loc

    def __str__(self) -> str:
        parts = []
        loc = self.location()
        if loc:
            parts.append(loc + ":")
        if self.field:
            parts.append(f"{self.field}:")
        parts.append(self.message)
        text = " ".join(parts)
        if self.hint:
            text += f" ({self.hint})"
        return text


class InputError(DomegenError):
    """A command-line value or library argument that cannot be used."""


class OutOfRangeError(InputError):
    """A date outside the ephemeris, a latitude past the pole, a size too large."""


class NotFoundError(DomegenError):
    """An unknown place, body, event or eclipse."""


class SceneError(DomegenError):
    """A scene file that cannot be loaded or validated."""
