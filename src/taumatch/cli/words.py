"""The library's words for its parameters, as the command line spells them.

A library message that tells the user what to give names the parameter as a keyword
(``force=True``, ``sample_interval=``, ``chain=``): what a Python caller passes.  The
commands print the same message with the option instead (``--force``,
``--sample-interval``, ``--chain``); :func:`cli_words` makes that change, for the names
below only and only where the keyword stands as one (an ``=`` followed by a space, a
punctuation mark or the end), so a value such as ``chain=1`` in a file name is left alone.
"""

from __future__ import annotations

import re

__all__ = ["OPTIONS", "cli_words"]

#: library parameter -> command-line option
OPTIONS = {
    "channel": "--channel",
    "chain": "--chain",
    "force": "--force",
    "pattern": "--pattern",
    "sample_interval": "--sample-interval",
    "shunt_c": "--shunt-c",
    "shunt_r": "--shunt-r",
    "slow": "--slow",
    "time_column": "--time-column",
    "tip_r": "--tip-r",
    "tolerances": "--tol",
}

_KEYWORD = re.compile(r"\b(" + "|".join(OPTIONS) + r")=(?:True\b)?(?=[\s,;:.)\]'\"]|$)")


def cli_words(text: str) -> str:
    """``text`` with the library's parameter keywords as command-line options.

    >>> cli_words("no trim: clipped (use force=True to override)")
    'no trim: clipped (use --force to override)'
    >>> cli_words("give tip_r= or chain= if a divider is there; file chain=1.csv")
    'give --tip-r or --chain if a divider is there; file chain=1.csv'
    """
    return _KEYWORD.sub(lambda m: OPTIONS[m.group(1)], text)


def cli_words_in(data):
    """:func:`cli_words` applied to every string in a JSON-like structure."""
    if isinstance(data, str):
        return cli_words(data)
    if isinstance(data, dict):
        return {k: cli_words_in(v) for k, v in data.items()}
    if isinstance(data, (list, tuple)):
        return [cli_words_in(v) for v in data]
    return data


def cli_rows(result):
    """A batch's result with each row's error and warnings in the command line's words
    (what ``taumatch batch`` prints, files and reports)."""
    from dataclasses import replace

    def row(r):
        return replace(r, error=None if r.error is None else cli_words(r.error),
                       warnings=tuple(cli_words(w) for w in r.warnings))

    return replace(result, rows=tuple(row(r) for r in result.rows))
