"""Binary waveform files of bench oscilloscopes, decoded by the open-source ``RigolWFM``
package (BSD-3-Clause, on PyPI), the optional extra ``pip install 'taumatch[scopes]'``.

It reads many makers' formats (its documentation lists them): Rigol ``.wfm``/``.bin``,
Teledyne LeCroy ``.trc``, Tektronix ``.wfm``/``.isf``, Keysight/Agilent, Siglent, Yokogawa
and Rohde & Schwarz files. Without it, a file that carries one of the common signatures
below is refused in one line naming the extra.
"""

from __future__ import annotations

import warnings

import numpy as np

from ..errors import InputError
from .containers import Payload
from .limits import check_size
from .model import Capture, SampleProblem

__all__ = ["EXTRA", "looks_like_scope_file", "read_scope"]

EXTRA = "pip install 'taumatch[scopes]'"
# (offset, bytes) of common bench-oscilloscope waveform files, for the message when the
# decoder is absent (the decoder itself recognises these and more)
_SIGNATURES = [
    (0, b"\xa5\xa5\xa4\x01"), (0, b"\xa1\xa5\x00\x00"), (0, b"\x01\xff\xff\xff"),
    (0, b"\xa5\xa5\x38\x00"), (0, b"\xa5\xa5\x00\x00"), (0, b"RG01"), (0, b"RG03"),
    (0, b"AG01"), (0, b"AG03"), (0, b"AG10"), (3, b"WFM#"),
]


def looks_like_scope_file(head: bytes) -> bool:
    """True for bytes that start like a common oscilloscope waveform file."""
    return (any(head[k:k + len(sig)] == sig for k, sig in _SIGNATURES)
            or b"WAVEDESC" in head[:8192] or b"LLWFM" in head[:8])


def _decoder(payload: Payload):
    try:
        from RigolWFM import wfm
    except ImportError:
        what = ("an oscilloscope's binary waveform file" if looks_like_scope_file(payload.head)
                else "a binary file, not a text export or a NumPy array")
        raise InputError(f"{payload.source}: {what}; reading binary waveform files needs "
                         f"the optional decoder: {EXTRA}") from None
    return wfm


def read_scope(payload: Payload) -> Capture:
    """Every enabled channel of a binary waveform file, named ``CH1``, ``CH2``, ...

    Time is the decoder's time axis (s); values are in the channel's unit (V unless the
    file says A), with the probe ratio the file records already applied.
    """
    where = payload.source
    wfm = _decoder(payload)
    path = str(payload.path)
    try:
        model = wfm.detect_model(path)
    except (wfm.Parse_WFM_Error, OSError, ValueError) as exc:
        raise InputError(f"{where}: a binary file the waveform decoder does not recognise "
                         f"({_short(exc)}); expected a text export, a NumPy array or an "
                         "oscilloscope's waveform file") from None
    try:
        # a damaged file can make the decoder's own arithmetic warn (NaN casts): the values
        # are checked below, so its warnings are not the user's
        with warnings.catch_warnings(), np.errstate(all="ignore"):
            warnings.simplefilter("ignore")
            decoded = wfm.Wfm.from_file(path, model)
            found = [(ch, np.asarray(ch.times, np.float64), np.asarray(ch.volts, np.float64))
                     for ch in decoded.channels if getattr(ch, "enabled", True)]
    except Exception as exc:  # noqa: BLE001 - a third-party decoder on a damaged file
        raise InputError(f"{where}: the waveform decoder could not read this {model} file "
                         f"({type(exc).__name__}: {_short(exc)})") from None
    if not found:
        raise InputError(f"{where}: the waveform file holds no enabled channel")
    time = found[0][1]
    check_size(time.size, len(found) + 1, where)
    channels, units, notes = {}, {}, []
    for ch, t, v in found:
        name = f"CH{ch.channel_number}"
        if t.shape != time.shape or v.shape != time.shape or not np.allclose(t, time):
            notes.append(f"{name} has a time base of its own: left out")
            continue
        channels[name] = v
        unit = getattr(getattr(ch, "unit", None), "name", "v")
        units[name] = "A" if str(unit).lower() == "a" else "V"
    metadata = {"decoder": f"RigolWFM {_version(wfm)}", "file model": str(model),
                "instrument": str(getattr(decoded, "header_name", "") or "")}
    try:
        return Capture(time, channels, metadata, where, units, tuple(payload.notes) + tuple(notes))
    except SampleProblem as exc:
        raise InputError(str(exc)) from None


def _short(exc) -> str:
    return (str(exc).splitlines() or [""])[0][:120]


def _version(wfm) -> str:
    from importlib.metadata import PackageNotFoundError, version

    try:
        return version("RigolWFM")
    except PackageNotFoundError:
        return "?"
