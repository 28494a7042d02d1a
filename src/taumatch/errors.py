"""One exception family for everything taumatch raises on purpose.

``TaumatchError`` subclasses ``ValueError`` so that callers who already catch
``ValueError`` keep working.  The command line turns an ``InputError`` into one
line on stderr and exit status 2, and a ``ComputationError`` into exit status 1.
"""

from __future__ import annotations

__all__ = ["ComputationError", "InputError", "TaumatchError", "path_text", "shown"]


class TaumatchError(ValueError):
    """Root of taumatch's own errors; the message is meant for the user."""

    exit_code = 2


class InputError(TaumatchError):
    """The user's input (an expression, a file, an option, a spec) is not valid."""

    exit_code = 2


class ComputationError(TaumatchError):
    """A valid request whose computation could not succeed (e.g. a fit that did not converge)."""

    exit_code = 1


def shown(value, limit: int = 80) -> str:
    """``repr(value)`` for a message, cut to about ``limit`` characters: an input of thirty
    thousand characters is echoed by its start and its length, not whole.

    >>> shown("11.5p")
    "'11.5p'"
    >>> shown("9" * 30000)
    "'9999999999999999999999999999999999999999999999999999999999999999999999999999…' (30000 characters)"
    """
    text = repr(value)
    if len(text) <= limit:
        return text
    if isinstance(value, (str, bytes)):
        quote = text[-1]
        return f"{text[: limit - 3]}…{quote} ({len(value)} characters)"
    return text[: limit - 1] + "…"


def path_text(path, limit: int = 80) -> str:
    """A file name for an error line: whole up to ``limit`` characters, else its start and
    its end around "...", so that a name of thousands of characters stays one short line.

    >>> path_text("probe.csv")
    'probe.csv'
    >>> len(path_text("a" * 3000 + ".csv"))
    80
    """
    text = str(path)
    return text if len(text) <= limit else f"{text[:limit - 20]}...{text[-17:]}"
