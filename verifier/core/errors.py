"""Error types of the engine.

One base class, `GdofError`, so that the command line can turn every expected failure into a one-line
message and exit code 2.  Each subclass also inherits the matching builtin (a parse error is a
`ValueError`) so that callers who do not know our classes still catch them sensibly.
"""

from __future__ import annotations


class GdofError(Exception):
    """Base of every error the tool raises on purpose (bad input, unsupported request)."""


class InputError(GdofError, ValueError):
    """Bad user input.  `position` is a 0-based character offset into `source` when known."""

    def __init__(self, message: str, source: str | None = None, position: int | None = None):
        self.message = message
        self.source = source
        self.position = position
        super().__init__(self.one_line())

    @property
    def column(self) -> int | None:
        """1-based column of the problem (counting within the offending line), or None."""
        if self.position is None:
            return None
        if self.source is None:
            return self.position + 1
        line_start = self.source.rfind("\n", 0, self.position) + 1
        return self.position - line_start + 1

    @property
    def line(self) -> int | None:
        """1-based line of the problem within `source`, or None."""
        if self.position is None or self.source is None:
            return None
        return self.source.count("\n", 0, self.position) + 1

    def one_line(self) -> str:
        if self.column is None:
            return self.message
        return f"{self.message} at column {self.column}"


class ParseError(InputError):
    """Text that does not follow the grammar."""


class NonlinearError(InputError):
    """A product or quotient of two non-constant expressions: outside piecewise-linear arithmetic."""


class UnknownNameError(InputError):
    """A parameter or function name that the context does not declare."""


class RegionError(InputError):
    """A region that is empty or otherwise unusable."""


class CaseFileError(InputError):
    """A problem in a case file; the message names the file and the key."""


class SolverError(GdofError, RuntimeError):
    """A backend that is missing or failed in a way that is not a plain 'unknown'."""
