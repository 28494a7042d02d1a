"""Read a capture file into a ``Capture``: text exports, NumPy arrays, binary waveform
files, and any of these compressed or archived."""

from __future__ import annotations

import os
from pathlib import Path

from ..errors import InputError, path_text
from ..units import parse_quantity
from .arrays import read_npy, read_npz
from .containers import open_payload
from .limits import MAX_FIELD_CHARS, check_interval
from .model import Capture
from .scopes import read_scope
from .text import read_text

__all__ = ["read"]


def read(path, channel: str | None = None, *, delimiter: str | None = None,
         decimal: str | None = None, time_column=None, sample_interval=None) -> Capture:
    """Read a capture file.

    Parameters
    ----------
    path : str or os.PathLike
        A text export (``.csv``, ``.tsv``, ``.txt``, ...; UTF-8, Latin-1 or UTF-16), a
        NumPy ``.npy`` array or ``.npz`` archive, or an oscilloscope's binary waveform file
        (with the optional extra ``taumatch[scopes]``); any of these may be gzip, bzip2,
        xz or Zstandard compressed, or the one file in a zip or tar archive.  What the file
        holds is found from its bytes, not its name; the layout of text is sniffed (see
        ``docs/captures.md``).
    channel : str, optional
        Keep only this channel: its name as in the file (case is ignored) or its number
        (``"2"`` for ``CH2``).
    delimiter : str, optional
        Cell delimiter, overriding the guess: ``","``, ``";"``, ``"\\t"``, ``"|"`` or
        ``"whitespace"``.
    decimal : str, optional
        Decimal mark, ``"."`` or ``","``, overriding the guess.
    time_column : str or int, optional
        Name or 0-based index of the time column, overriding the guess.
    sample_interval : float or str, optional
        Sample interval in seconds (``1e-6`` or ``"1u"``), 1 fs to 10 ks.  When given, time
        is built from it and from a start time found in the metadata (else 0), and no column
        is taken as time (a column named like time is left out; a column of sample numbers
        gives the sample's place); do not combine with ``time_column``.

    Returns
    -------
    Capture
        Time in seconds; channels in volts (scaled by the prefix of their unit); ``notes``
        saying anything about the reading a user should know.

    Raises
    ------
    InputError
        One line naming the file (and line, where there is one): unreadable, empty,
        damaged or over-size files, non-numeric cells, non-finite values, time not
        increasing, duplicate time stamps, too few samples, unknown channel names.
    """
    source = os.fspath(path) if isinstance(path, (str, os.PathLike)) else None
    if source is None:
        raise InputError(f"capture path must be a file name, got {path!r}")
    if decimal not in (None, ".", ","):
        raise InputError(f"{source}: decimal mark must be '.' or ',', got {decimal!r}")
    if delimiter is not None and (not isinstance(delimiter, str) or delimiter == ""
                                  or (len(delimiter) > 1 and delimiter not in ("whitespace", r"\s+",
                                                                               "\\t", "tab"))):
        raise InputError(
            f"{source}: delimiter must be one character, 'tab' or 'whitespace', got {delimiter!r}"
        )
    if delimiter in ("\\t", "tab"):
        delimiter = "\t"
    dt = None
    if isinstance(sample_interval, str) and len(sample_interval) > MAX_FIELD_CHARS:
        raise InputError(f"{source}: sample interval: {len(sample_interval)} characters is "
                         "not a number")
    if sample_interval is not None:
        dt = parse_quantity(sample_interval, "s", field=f"{source}: sample interval")
        check_interval(dt, f"{source}: sample interval")
    p = Path(source)
    try:
        if p.is_dir():
            raise InputError(f"{source}: is a folder, not a capture file")
        payload = open_payload(p, source)
    except OSError as exc:  # a name too long for the file system fails in stat() already
        raise InputError(f"{path_text(source)}: cannot open ({exc.strerror or exc})") from None
    if payload.kind == "npy":
        cap = read_npy(payload, time_column, dt)
    elif payload.kind == "npz":
        cap = read_npz(payload, time_column, dt)
    elif payload.kind == "binary":
        cap = read_scope(payload)
    else:
        cap = read_text(payload, delimiter, decimal, time_column, dt)
    if channel is not None:
        name = cap.channel_name(channel)
        cap = Capture(cap.time, {name: cap.channels[name]}, cap.metadata, cap.source,
                      {name: cap.units[name]}, cap.notes)
    return cap
