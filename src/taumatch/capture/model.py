"""The ``Capture`` value: a recorded waveform with its time base and metadata."""

from __future__ import annotations

import re
import types
from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

from ..errors import InputError
from .limits import INTERVAL_RANGE

__all__ = ["Capture", "SampleProblem", "few", "match_channel"]

#: Fewest samples a capture may hold: an edge needs samples before, during and after it.
MIN_SAMPLES = 4


class SampleProblem(InputError):
    """A bad sample at a known row; the reader turns the row into a file line number."""

    def __init__(self, message: str, row: int, what: str):
        super().__init__(message)
        self.row = row
        self.what = what


def _frozen_view(values, name: str, where: str) -> np.ndarray:
    try:
        arr = np.asarray(values, dtype=np.float64)
    except (TypeError, ValueError) as exc:
        raise InputError(f"{where}{name}: values are not numbers ({exc})") from None
    if arr.ndim != 1:
        raise InputError(f"{where}{name}: expected a 1-D array, got shape {arr.shape}")
    view = arr.view()
    view.flags.writeable = False
    return view


@dataclass(frozen=True)
class Capture:
    """A recorded waveform: one time base shared by one or more channels.

    Parameters
    ----------
    time : array_like
        Sample instants in seconds, strictly increasing.
    channels : mapping of str to array_like
        Channel name to samples in volts (or the unit named in ``units``), each as long
        as ``time``.
    metadata : mapping of str to str, optional
        Key/value lines found in the file (text exports) or arrays' scalars (``.npz``).
    source : str, optional
        Path of the file the capture was read from (used in messages).
    units : mapping of str to str, optional
        Unit of each channel after scaling (``"V"`` unless the file said otherwise).
    notes : tuple of str, optional
        One line each on how the file was read that a user should know (a time base
        rebuilt from coarse stamps, a suffix that lied); commands print them.

    Notes
    -----
    The arrays are read-only views; the caller's arrays are not modified or copied.

    Examples
    --------
    >>> cap = Capture([0.0, 1e-6, 2e-6, 3e-6], {"CH1": [0.0, 0.0, 1.0, 1.0]})
    >>> cap.names, len(cap), cap.sample_interval
    (('CH1',), 4, 1e-06)
    """

    time: np.ndarray
    channels: Mapping[str, np.ndarray]
    metadata: Mapping[str, str] = field(default_factory=dict)
    source: str | None = None
    units: Mapping[str, str] | None = None
    notes: tuple = ()

    def __post_init__(self):
        where = f"{self.source}: " if self.source else ""
        time = _frozen_view(self.time, "time", where)
        if not isinstance(self.channels, Mapping) or not self.channels:
            raise InputError(f"{where}a capture needs at least one channel, got {self.channels!r}")
        chans = {}
        for name, values in self.channels.items():
            if not isinstance(name, str) or not name:
                raise InputError(f"{where}channel names must be non-empty strings, got {name!r}")
            arr = _frozen_view(values, f"channel {name!r}", where)
            if arr.shape != time.shape:
                raise InputError(
                    f"{where}channel {name!r} has {arr.size} samples but time has {time.size}"
                )
            chans[name] = arr
        if time.size < MIN_SAMPLES:
            raise InputError(
                f"{where}only {time.size} samples; an edge needs at least {MIN_SAMPLES}"
            )
        _check_samples(time, chans, where)
        lo, hi = INTERVAL_RANGE
        interval = float((time[-1] - time[0]) / (time.size - 1))
        if not lo <= interval <= hi:
            raise InputError(
                f"{where}time base: a mean sample interval of {interval:.6g} s is outside "
                f"what taumatch can work with, 1 fs to 10 ks"
            )
        notes = self.notes
        if isinstance(notes, str) or not all(isinstance(n, str) for n in notes):
            raise InputError(f"{where}notes must be a tuple of strings, got {notes!r}")
        object.__setattr__(self, "notes", tuple(notes))
        units = {name: "V" for name in chans}
        if self.units:
            units.update({k: str(v) for k, v in self.units.items() if k in chans})
        object.__setattr__(self, "time", time)
        object.__setattr__(self, "channels", types.MappingProxyType(chans))
        object.__setattr__(self, "metadata", types.MappingProxyType(dict(self.metadata or {})))
        object.__setattr__(self, "units", types.MappingProxyType(units))

    # ------------------------------------------------------------------ access
    @property
    def names(self) -> tuple[str, ...]:
        """Channel names, in file order."""
        return tuple(self.channels)

    def __len__(self) -> int:
        return int(self.time.size)

    @property
    def sample_interval(self) -> float:
        """Mean sample interval in seconds (record span over samples − 1)."""
        return float((self.time[-1] - self.time[0]) / (self.time.size - 1))

    @property
    def duration(self) -> float:
        """Record length in seconds (last minus first sample instant)."""
        return float(self.time[-1] - self.time[0])

    def channel_name(self, name: str | None = None) -> str:
        """The channel ``channel(name)`` would return.

        With several channels and no name, the one with the clearest step is chosen
        (largest ratio of state-level amplitude to sample noise).

        Raises
        ------
        InputError
            Unknown name, or no channel with a step when the choice is ambiguous.
        """
        where = f"{self.source}: " if self.source else ""
        if name is not None:
            found = match_channel(name, self.names)
            if found is not None:
                return found
            numbers = [n for n in (_channel_number(k) for k in self.names) if n is not None]
            by_number = f" (or their numbers {few(numbers)})" if numbers else ""
            raise InputError(
                f"{where}no channel named {name!r}; channels are {few(self.names)}{by_number}"
            )
        if len(self.channels) == 1:
            return self.names[0]
        from ..pulse.levels import step_strength

        scores = {k: step_strength(v) for k, v in self.channels.items()}
        best = max(scores, key=scores.get)
        if not scores[best] > 0:
            raise InputError(
                f"{where}no channel with a step in it among {few(self.names)}; "
                "name one with channel="
            )
        return best

    def channel(self, name: str | None = None) -> np.ndarray:
        """Samples of the named channel, the only channel, or the one with a step (V)."""
        return self.channels[self.channel_name(name)]

    def summary(self) -> str:
        """Source, channels, length and time base, then the notes of the reading."""
        from ..units import format_quantity as q

        plural = "s" if len(self.names) != 1 else ""
        head = (f"{self.source or 'capture'}: {len(self.names)} channel{plural} "
                f"({few(self.names)}), {len(self)} samples of {q(self.sample_interval, 's')}, "
                f"{q(self.duration, 's')} from {q(float(self.time[0]), 's')}")
        lines = [head] + [f"note: {n}" for n in self.notes]
        return "\n".join(lines)

    #: most samples a picture draws of each channel
    PLOT_SAMPLES = 200_000

    @property
    def curves(self) -> dict:
        """``{channel: (t, v)}`` for the picture: every channel, every k-th sample so that at
        most :attr:`PLOT_SAMPLES` are drawn [s, V]."""
        step = max(1, len(self) // self.PLOT_SAMPLES)
        t = np.asarray(self.time[::step], dtype=float)
        return {k: (t, np.asarray(v[::step], dtype=float)) for k, v in self.channels.items()}

    def plot(self, ax=None):
        """Every channel against time; returns ``(fig, ax)``."""
        from ..plot.response import plot_time_response

        fig = None
        for name, (t, v) in self.curves.items():
            fig, ax = plot_time_response(t, v, ax=ax, label=name, ylabel="voltage",
                                         title=self.source or "capture")
        return fig, ax

    def to_dict(self) -> dict:
        """A short description (no samples): source, channels, length, time base."""
        return {
            "source": self.source,
            "channels": list(self.names),
            "units": dict(self.units),
            "samples": len(self),
            "sample_interval": self.sample_interval,
            "start": float(self.time[0]),
            "duration": self.duration,
            "metadata": dict(self.metadata),
            "notes": list(self.notes),
        }


def few(items, shown: int = 6) -> str:
    """``a, b, c and 12 more``: a list for a message, kept short.

    >>> few(["CH1", "CH2"]), few([f"CH{k}" for k in range(1, 11)], 3)
    ('CH1, CH2', 'CH1, CH2, CH3 and 7 more')
    """
    items = [str(i) for i in items]
    if len(items) <= shown:
        return ", ".join(items)
    return f"{', '.join(items[:shown])} and {len(items) - shown} more"


def _channel_number(name: str) -> int | None:
    """The number in a channel name (``CH1``, ``Channel 2``, ``C3``), if it has one."""
    digits = re.findall(r"\d+", name)
    return int(digits[0]) if len(digits) == 1 else None


def match_channel(name, names) -> str | None:
    """The channel ``name`` means: itself, the same name in another case, or its number
    (``"1"`` for ``CH1``; by position, from 1, when no name carries a number).

    >>> match_channel("ch2", ["CH1", "CH2"]), match_channel("2", ["CH1", "CH2"])
    ('CH2', 'CH2')
    >>> match_channel("2", ["Reference", "Probe"]), match_channel("CH3", ["CH1"]) is None
    ('Probe', True)
    """
    text = str(name).strip()
    if text in names:
        return text
    folded = {k.casefold(): k for k in names}
    if text.casefold() in folded:
        return folded[text.casefold()]
    if text.isascii() and text.isdigit():
        wanted = int(text)
        numbered = {k: _channel_number(k) for k in names}
        if any(n is not None for n in numbered.values()):
            hits = [k for k, n in numbered.items() if n == wanted]
            return hits[0] if len(hits) == 1 else None
        if 1 <= wanted <= len(names):
            return list(names)[wanted - 1]
    return None


def _check_samples(time: np.ndarray, chans: dict, where: str) -> None:
    """Raise ``SampleProblem`` at the first non-finite value or non-increasing time."""
    for name, arr in [("time", time), *chans.items()]:
        finite = np.isfinite(arr)
        if not finite.all():
            row = int(np.argmin(finite))
            raise SampleProblem(
                f"{where}sample {row}: {name} is {float(arr[row])!r}; values must be finite numbers",
                row, name,
            )
    if np.all(time[1:] > time[:-1]):
        return
    step = np.diff(time)
    bad = step <= 0
    if bad.any():
        row = int(np.argmax(bad)) + 1
        kind = "duplicate time stamp" if step[row - 1] == 0 else "time goes backwards"
        raise SampleProblem(
            f"{where}sample {row}: {kind}: {float(time[row]):.9g} s after "
            f"{float(time[row - 1]):.9g} s; "
            "time must increase strictly",
            row, kind,
        )
