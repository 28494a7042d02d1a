"""``measure``: IEEE Std 181 pulse metrics of a square-wave capture, with quality flags."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..errors import InputError
from ..units import format_quantity
from . import quality
from .averaging import AveragedPeriod, as_arrays, average_from_edges
from .clipping import code_step, find_rails
from .edges import find_edges
from .levels import StateLevels, state_levels, step_strength
from .transitions import Transition, core, first_transition, measure_transitions

__all__ = ["PulseMetrics", "measure"]


@dataclass(frozen=True)
class PulseMetrics:
    """Pulse metrics of one channel of a capture.

    Times in s, levels in V, aberrations as fractions (``to_dict`` gives them in %).

    Attributes
    ----------
    levels : StateLevels
        Lower and upper state levels (V) of the measured waveform.
    rising, falling : Transition or None
        The positive- and negative-going transitions (of the averaged period when there
        is one, else the first of each in the record).
    period, duty : float
        Period (s) and fraction of it in the upper state; NaN for a single step.
    edges : int
        Transitions found in the record.
    periods_averaged : int
        Full periods averaged (0: measured on the raw record).
    noise_rms, noise_rms_averaged : float
        Noise RMS (V) of the raw samples and of the averaged period.
    sample_interval : float
        Record sample interval (s).
    clipped : bool
        True when samples pile on a rail (see :mod:`taumatch.pulse.clipping`).
    rails : tuple of Rail
        The rails the samples pile on, with their levels and the share of the record lost.
    code : float
        The record's code step (V): the smallest spacing between distinct sample values
        (tiny for unquantised data).
    dither : float
        Noise RMS (V) of the raw record from the median sample-to-sample change: the noise
        that moves the samples over the codes (zero when most consecutive samples repeat
        a code: averaging then cannot resolve levels finer than the codes).
    tilt_high, tilt_low : float
        Plateau tilt, fraction of the amplitude over one state's duration.
    flags : tuple of str
        Short names of the quality problems found.
    warnings : tuple of str
        One sentence per problem.
    averaged : AveragedPeriod or None
        The averaged period (for fitting), when the record held a full period.
    waveform : (numpy.ndarray, numpy.ndarray) or None
        The raw record (s, V) when there was no full period to average.
    channel, source : str or None
        What was measured.
    """

    levels: StateLevels
    rising: Transition | None
    falling: Transition | None
    period: float
    duty: float
    edges: int
    periods_averaged: int
    noise_rms: float
    noise_rms_averaged: float
    sample_interval: float
    clipped: bool
    rails: tuple = ()
    code: float = 0.0
    dither: float = 0.0
    tilt_high: float = float("nan")
    tilt_low: float = float("nan")
    settle_band: float = 0.02
    flags: tuple = ()
    warnings: tuple = ()
    averaged: AveragedPeriod | None = field(default=None, repr=False)
    channel: str | None = None
    source: str | None = None
    waveform: tuple | None = field(default=None, repr=False)

    def __post_init__(self):
        if not isinstance(self.levels, StateLevels):
            raise InputError(f"pulse metrics: levels must be StateLevels, got {self.levels!r}")
        if not 0 < self.settle_band < 0.5:
            raise InputError(f"pulse metrics: settling band must be between 0 and 50 %, "
                             f"got {self.settle_band!r}")
        if self.periods_averaged < 0 or self.edges < 0:
            raise InputError(f"pulse metrics: counts must not be negative, got "
                             f"{self.periods_averaged} periods, {self.edges} edges")
        if self.rails and not self.clipped:
            raise InputError("pulse metrics: clipped must be True when rails are given")
        object.__setattr__(self, "flags", tuple(self.flags))
        object.__setattr__(self, "rails", tuple(self.rails))
        object.__setattr__(self, "warnings", tuple(self.warnings))

    @property
    def frequency(self) -> float:
        """1 / period (Hz)."""
        return 1.0 / self.period if self.period > 0 else float("nan")

    @property
    def amplitude(self) -> float:
        """Upper minus lower state level (V)."""
        return self.levels.amplitude

    @property
    def snr_db(self) -> float:
        """Amplitude over raw noise RMS (dB)."""
        return quality.snr_db(self.amplitude, self.noise_rms)

    @property
    def snr_db_averaged(self) -> float:
        """Amplitude over the averaged period's noise RMS (dB)."""
        return quality.snr_db(self.amplitude, self.noise_rms_averaged)

    # ------------------------------------------------------------ what the picture draws
    #: most samples the picture draws of a record without a full period
    PLOT_SAMPLES = 200_000

    @property
    def shown_record(self) -> tuple | None:
        """``(t, v)`` of a record without a full period, every k-th sample so that at most
        :attr:`PLOT_SAMPLES` are drawn (None when there is an averaged period)."""
        if self.averaged is not None or self.waveform is None:
            return None
        t, v = self.waveform
        step = max(1, t.size // self.PLOT_SAMPLES)
        return t[::step], v[::step]

    @property
    def reference_levels(self) -> tuple:
        """``(fraction, level)``: the state levels (0, 1) and the 10/50/90 % reference levels
        (V)."""
        return tuple((f, self.levels.reference(f)) for f in (0.0, 0.1, 0.5, 0.9, 1.0))

    @property
    def crossings(self) -> tuple:
        """``(transition, times, levels)`` of the rising and the falling transition: their
        10/50/90 % reference-level instants (s) and levels (V), those found only."""
        out = []
        for tr in (self.rising, self.falling):
            if tr is None:
                continue
            pts = [(tr.start, 0.1), (tr.middle, 0.5), (tr.end, 0.9)]
            if tr.polarity == "falling":
                pts = [(tr.start, 0.9), (tr.middle, 0.5), (tr.end, 0.1)]
            found = [(x, self.levels.reference(f)) for x, f in pts if math.isfinite(x)]
            out.append((tr, tuple(x for x, _ in found), tuple(y for _, y in found)))
        return tuple(out)

    def to_dict(self) -> dict:
        """What ``taumatch measure --json`` prints (times s, levels V, aberrations %)."""
        r, f = self.rising, self.falling
        first = r if r is not None else f  # a lone negative-going step reports its own
        return {
            "source": self.source, "channel": self.channel,
            "high": self.levels.high, "low": self.levels.low, "amplitude": self.amplitude,
            "levels_method": self.levels.method,
            "rise_time": r.duration if r else None,
            "fall_time": f.duration if f else None,
            "overshoot": 100 * first.overshoot if first else None,
            "undershoot": 100 * first.undershoot if first else None,
            "preshoot": 100 * first.preshoot if first else None,
            "settling_time": first.settling_time if first else None,
            "settle_band": 100 * self.settle_band,
            "period": self.period, "frequency": self.frequency, "duty": self.duty,
            "edges": self.edges, "periods_averaged": self.periods_averaged,
            "sample_interval": self.sample_interval,
            "noise_rms": self.noise_rms, "noise_rms_averaged": self.noise_rms_averaged,
            "snr_db": self.snr_db, "snr_db_averaged": self.snr_db_averaged,
            "clipped": self.clipped, "rails": [r.to_dict() for r in self.rails],
            "code": self.code, "dither": self.dither, "tilt_high": 100 * self.tilt_high,
            "tilt_low": 100 * self.tilt_low,
            "rising": r.to_dict() if r else None, "falling": f.to_dict() if f else None,
            "flags": list(self.flags), "warnings": list(self.warnings),
        }

    def summary(self) -> str:
        """A few lines of text with units in engineering notation."""
        q = format_quantity
        lines = [f"channel {self.channel or '?'}"
                 + (f" of {self.source}" if self.source else "")]
        lines.append(f"  levels ({self.levels.method}): low {q(self.levels.low, 'V')}, "
                     f"high {q(self.levels.high, 'V')}, amplitude {q(self.amplitude, 'V')}")
        if math.isfinite(self.period):
            lines.append(f"  period {q(self.period, 's')} ({q(self.frequency, 'Hz')}), "
                         f"duty {100 * self.duty:.1f} %, {self.edges} edges, "
                         f"{self.periods_averaged} periods averaged")
        else:
            lines.append(f"  {self.edges} edges, no full period (raw record measured)")
        for name, tr in (("rising", self.rising), ("falling", self.falling)):
            if tr is None:
                continue
            settle = (q(tr.settling_time, "s") if tr.settled else "not settled")
            lines.append(
                f"  {name}: 10-90 % {q(tr.duration, 's')}, overshoot {100 * tr.overshoot:.2f} %, "
                f"undershoot {100 * tr.undershoot:.2f} %, preshoot {100 * tr.preshoot:.2f} %, "
                f"settling ({100 * tr.band:g} %) {settle}")
        lines.append(f"  noise {q(self.noise_rms, 'V')} rms raw, "
                     f"{q(self.noise_rms_averaged, 'V')} rms averaged "
                     f"(SNR {self.snr_db_averaged:.1f} dB)")
        for w in self.warnings:
            lines.append(f"  warning: {w}")
        return "\n".join(lines)

    def plot(self, ax=None):
        """Draw the measured waveform with its levels and crossings; returns ``(fig, ax)``."""
        from ..plot.pulse import plot_pulse_metrics

        return plot_pulse_metrics(self, ax=ax)


def measure(data, channel: str | None = None, *, levels: str = "mode",
            settle_band: float = 0.02, hysteresis: float = 0.4) -> PulseMetrics:
    """Measure a square-wave (or single-step) capture.

    All full periods are averaged coherently first (see :func:`average_period`), and the
    metrics are taken on the averaged period; a record with no full period is measured
    on its first rising and first falling transitions.

    Parameters
    ----------
    data : Capture or (array_like, array_like)
        A capture or time (s) and samples (V).
    channel : str, optional
        Channel of a capture.
    levels : {"mode", "mean"}
        State-level method (IEEE Std 181 histogram mode, or mean).
    settle_band : float
        Settling band, fraction of the amplitude (0.02 = 2 %).
    hysteresis : float
        Hysteresis band for finding edges, fraction of the amplitude.

    Returns
    -------
    PulseMetrics

    Raises
    ------
    InputError
        When the channel has no step in it or the options are out of range.
    """
    if not 0 < settle_band < 0.5:
        raise InputError(f"settling band must be between 0 and 50 %, got {settle_band!r}")
    t, v, name = as_arrays(data, channel)
    source = getattr(data, "source", None)
    where = f"{source}: " if source else ""
    try:
        rec_levels = state_levels(v, levels)
    except InputError as exc:
        raise InputError(f"{where}channel {name}: {exc}") from None
    if not step_strength(v, rec_levels) > 0:
        raise InputError(
            f"{where}channel {name}: no step in it (the two histogram states are not 5 noise "
            "RMS apart, or one holds under 1 % of the samples)"
        )
    edges = find_edges(t, v, rec_levels, hysteresis=hysteresis)
    if edges.count == 0:
        raise InputError(
            f"{where}channel {name}: no step in it (no transition crosses both the "
            f"{100 * (0.5 - hysteresis / 2):g} % and {100 * (0.5 + hysteresis / 2):g} % levels)"
        )
    dt_rec = float((t[-1] - t[0]) / (t.size - 1))
    flags, warnings = [], []
    try:
        ap = average_from_edges(t, v, edges)
    except InputError:
        ap = None
    if ap is not None:
        lv = state_levels(ap.v, levels)
        rising, falling = _periodic_transitions(ap, lv, settle_band)
        noise, noise_avg = ap.noise_rms_before, ap.noise_rms_after
        low_mask, high_mask = ap.plateau_masks()
        tilt_high = quality.plateau_tilt(ap.t, ap.v, high_mask, ap.duty * ap.period, lv.amplitude)
        tilt_low = -quality.plateau_tilt(ap.t, ap.v, low_mask, (1 - ap.duty) * ap.period,
                                         lv.amplitude)
        period, duty, n_avg = ap.period, ap.duty, ap.n_periods
    else:
        lv = rec_levels
        rising, falling = _raw_transitions(t, v, lv, settle_band)
        noise = noise_avg = quality.robust_noise(v)
        tilt_high = tilt_low = float("nan")
        period, duty, n_avg = edges.period, edges.duty, 0
    if rising is None and falling is None:
        raise InputError(
            f"{where}channel {name}: no complete transition (from below 30 % to above 70 % "
            "of the amplitude, or back) in the record"
        )
    if n_avg < quality.MIN_PERIODS:
        flags.append("few_periods")
        warnings.append(
            f"only {n_avg} full period(s) to average (need {quality.MIN_PERIODS}); "
            "capture more periods to average the noise down")
    rails = find_rails(v, rec_levels.low, rec_levels.high)
    if rails:
        flags.append("clipped")
        warnings.extend(r.describe(period if n_avg else None) for r in rails)
    for tr in (rising, falling):
        if tr is None:
            continue
        if math.isfinite(tr.duration) and tr.duration < 2 * dt_rec:
            if "edge_unresolved" not in flags:
                flags.append("edge_unresolved")
            warnings.append(
                f"{tr.polarity} edge 10-90 % {format_quantity(tr.duration, 's')} is under two "
                f"sample intervals (2 × {format_quantity(dt_rec, 's')}): poorly resolved, "
                "sample faster")
        if not tr.settled:
            if "not_settled" not in flags:
                flags.append("not_settled")
            warnings.append(
                f"{tr.polarity} edge has not settled into the {100 * settle_band:g} % band "
                "before the next edge or the record end: lengthen the record or the period")
    tilts = [x for x in (tilt_high, tilt_low) if math.isfinite(x)]
    if tilts and max(abs(x) for x in tilts) > quality.TILT_LIMIT:
        flags.append("tilt")
        warnings.append(
            f"plateaus still slope at the end of each state (upper {100 * tilt_high:.2f} %, "
            f"lower {100 * tilt_low:.2f} % of the amplitude per state): AC coupling, or a "
            "settling slower than the half period")
    snr = quality.snr_db(lv.amplitude, noise_avg)
    if snr < quality.SNR_LIMIT_DB:
        flags.append("low_snr")
        warnings.append(f"signal-to-noise ratio {snr:.1f} dB after averaging is under "
                        f"{quality.SNR_LIMIT_DB:g} dB: aberrations below the noise are not seen")
    if ap is not None and ap.resampled:
        warnings.append("time base not uniform: the record was resampled linearly first")
    return PulseMetrics(
        levels=lv, rising=rising, falling=falling, period=period, duty=duty,
        edges=edges.count, periods_averaged=n_avg, noise_rms=noise,
        noise_rms_averaged=noise_avg, sample_interval=dt_rec, clipped=bool(rails), rails=rails,
        code=code_step(v), dither=quality.robust_noise(v),
        tilt_high=tilt_high, tilt_low=tilt_low, settle_band=settle_band,
        flags=tuple(flags), warnings=tuple(warnings), averaged=ap, channel=name,
        source=source, waveform=None if ap is not None else (t, v),
    )


def _periodic_transitions(ap: AveragedPeriod, lv: StateLevels, band: float):
    """Rising and falling transitions of an averaged period, treating it as periodic."""
    m = ap.t.size
    t2 = np.concatenate([ap.t, ap.t + ap.period])
    v2 = np.concatenate([ap.v, ap.v])
    y_r = (v2 - lv.low) / lv.amplitude
    y_f = 1.0 - y_r
    r = first_transition(y_r[:m], 0)
    if r is None:
        return None, None
    f = first_transition(y_f, r)
    if f is None or f >= m + r:
        (rising,) = measure_transitions(t2[:m], v2[:m], lv, [r], ["rising"], band=band)
        return rising, None
    jr10, _, jr90 = core(t2, y_r, r)[:3]
    jf10 = core(t2, y_f, f)[0]
    rising, falling = measure_transitions(
        t2, v2, lv, [r, f], ["rising", "falling"], band=band,
        bounds=[(0, jf10 + 1), (jr90, jr10 + m + 1)])
    return rising, falling


def _raw_transitions(t, v, lv: StateLevels, band: float):
    """First rising and first falling transition of a raw record.

    The edge after the later of the two bounds its plateau (a record of one and a half
    periods holds a third edge), so its aberrations and settling are measured on its own
    plateau only.
    """
    y_r = (v - lv.low) / lv.amplitude
    y_f = 1.0 - y_r
    found = []
    r = first_transition(y_r, 0)
    f = first_transition(y_f, 0)
    if r is not None:
        found.append((r, "rising"))
    if f is not None:
        found.append((f, "falling"))
    found.sort()
    if len(found) == 2:
        last, pol = found[-1]
        nxt = first_transition(y_r if pol == "falling" else y_f, last)
        if nxt is not None:
            found.append((nxt, "rising" if pol == "falling" else "falling"))
    result = measure_transitions(t, v, lv, [c for c, _ in found], [p for _, p in found],
                                 band=band)
    by = {}
    for tr in result:
        by.setdefault(tr.polarity, tr)
    return by.get("rising"), by.get("falling")
