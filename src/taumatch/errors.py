"""One exception family for everything taumatch raises on purpose.

``TaumatchError`` subclasses ``ValueError`` so that callers who already catch
``ValueError`` keep working.  The command line turns an ``InputError`` into one
line on stderr and exit status 2, and a ``ComputationError`` into exit status 1.
"""

from __future__ import annotations

__all__ = ["ComputationError", "InputError", "TaumatchError", "shown"]


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
    """``repr(value)`` for an error message, cut to about ``limit`` characters: a value echoed
    back must not turn one line of error into a screenful.

    >>> shown(12.5)
    '12.5'
    >>> shown("9" * 200)
    "'99999999999999999999999999999999999999999999999999999999999...' (200 characters)"
    """
    text = repr(value)
    if len(text) <= limit:
        return text
    if isinstance(value, str):
        return f"{text[:limit - 20]}...{text[0]} ({len(value)} characters)"
    return f"{text[:limit - 20]}... ({len(text)} characters written out)"
