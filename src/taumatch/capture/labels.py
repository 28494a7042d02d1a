"""What the words in an export's header mean: units, time and sample-number columns, and
the metadata keys that give the time base."""

from __future__ import annotations

import re

from ..errors import InputError
from ..units import PREFIXES, parse_quantity
from .limits import MAX_FIELD_CHARS

__all__ = ["INTERVAL_KEYS", "RATE_KEYS", "START_KEYS", "is_index_word", "is_time_name",
           "is_unit_cell", "key_of", "meta_number", "split_unit", "unit_scale"]

_BASE_UNITS = {
    "s": "s", "sec": "s", "secs": "s", "second": "s", "seconds": "s",
    "v": "V", "volt": "V", "volts": "V",
    "a": "A", "amp": "A", "amps": "A", "ampere": "A", "amperes": "A",
    "hz": "Hz", "sa/s": "Hz", "s/s": "Hz",
}
_TIME_NAMES = {"time", "t", "times", "sec", "secs", "second", "seconds", "s", "x", "xaxis",
               "timestamp", "timestamps"}
#: Words that name a column of sample numbers (as a name or as its unit).
_INDEX_WORDS = {"sequence", "seq", "index", "idx", "sample", "samples", "samplenumber",
                "sampleno", "point", "points", "pointnumber", "pointno", "pts", "no", "number"}
#: Metadata keys (lower case, letters and digits only) of the time base.
INTERVAL_KEYS = {"sampleinterval", "samplinginterval", "dt", "timestep", "sampleperiod",
                 "samplingperiod", "timeinterval", "deltat", "interval", "timeresolution",
                 "increment", "xincrement", "timeincrement"}
RATE_KEYS = {"samplerate", "samplingrate", "fs", "samplingfrequency", "samplefrequency"}
START_KEYS = {"starttime", "start", "t0", "tstart", "timeoffset", "firsttime",
              "timeoffirstsample", "firstsample", "xorigin", "xstart"}


def unit_scale(unit: str) -> tuple[float, str] | None:
    """``("mV") -> (1e-3, "V")``; None when the text is not a unit we know."""
    u = unit.strip().replace("μ", "µ")
    if not u:
        return None
    if u.lower() in _BASE_UNITS:
        return 1.0, _BASE_UNITS[u.lower()]
    if len(u) >= 2 and u[0] in PREFIXES and u[1:].lower() in _BASE_UNITS:
        return PREFIXES[u[0]], _BASE_UNITS[u[1:].lower()]
    return None


def split_unit(text: str) -> tuple[str, str | None]:
    """``"CH1 [mV]" -> ("CH1", "mV")``; ``"CH1" -> ("CH1", None)``.

    The unit is the text inside the last bracket pair that closes the name.

    >>> split_unit("Time (s)"), split_unit("a(b)(c)"), split_unit("(V)"), split_unit("x(y]z)")
    (('Time', 's'), ('a(b)', 'c'), ('(V)', None), ('x(y]z)', None))
    """
    s = text.strip()
    if not s or s[-1] not in ")]":
        return s, None
    body = s[:-1]
    k = max(body.rfind("("), body.rfind("["))
    if k < 0:
        return s, None
    unit, name = body[k + 1:], body[:k].strip()
    if not name or ")" in unit or "]" in unit:
        return s, None
    return name, unit.strip()


def key_of(text: str) -> str:
    """A header word reduced to lower-case letters and digits (``"Sample Interval"`` →
    ``"sampleinterval"``)."""
    return re.sub(r"[^a-z0-9]", "", text.lower())


def is_time_name(name: str) -> bool:
    """True for column names that mean time (``Time``, ``t``, ``Seconds``, ``Time (s)``)."""
    key = re.sub(r"[^a-z]", "", split_unit(name)[0].lower())
    return key in _TIME_NAMES or key.startswith("time")


def is_index_word(text: str) -> bool:
    """True for words that name sample numbers (``Sequence``, ``Index``, ``Point``)."""
    key = re.sub(r"[^a-z]", "", split_unit(text)[0].lower())
    return key in _INDEX_WORDS


def is_unit_cell(text: str) -> bool:
    """True for a cell that is only a unit (``s``, ``(mV)``, ``[V]``)."""
    t = text.strip().strip("()[]").strip()
    return unit_scale(t) is not None


def meta_number(metadata: dict, lines: dict, keys: set, source: str, unit: str,
                decimal: str = "."):
    """``(value in SI, key)`` of the first metadata entry whose key is in ``keys``, or
    ``(None, None)``; a unit in the key (``Sample Interval (us)``) or the value (``2 us``)
    is honoured.

    Raises
    ------
    InputError
        Naming the line, when the value is not a number of that unit.
    """
    for key, value in metadata.items():
        name, key_unit = split_unit(key)
        if key_of(name) not in keys:
            continue
        field = f"{source}: line {lines.get(key)}: {key}"
        text = value.strip()
        if len(text) > MAX_FIELD_CHARS:
            raise InputError(f"{field}: a value of {len(text)} characters is not a number")
        if decimal == ",":
            text = text.replace(",", ".")
        text = text.split()[0] if text and key_unit else text
        number = parse_quantity(text, None if key_unit else unit, field=field)
        if key_unit:
            scale = unit_scale(key_unit)
            if scale is None or scale[1] != unit:
                raise InputError(f"{field}: unit {key_unit!r} is not a unit of {unit}")
            number *= scale[0]
        return number, key
    return None, None
