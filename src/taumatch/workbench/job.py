"""One capture file diagnosed with fixed settings, and its outcome as one row.

The watch loop, the batch and the comparison all diagnose files the same way: read the
capture, diagnose it with the settings the user gave once, and keep either the diagnosis
or the one-line reason it could not be had.  A row never holds a number the diagnosis did
not give.
"""

from __future__ import annotations

import warnings as _warnings
from dataclasses import dataclass, field, replace
from pathlib import Path

from ..errors import ComputationError, InputError, TaumatchError

__all__ = [
    "COLUMNS",
    "STATUSES",
    "DiagnosisSettings",
    "Outcome",
    "diagnose_file",
    "diagnose_outcome",
    "outcome_of",
    "run_quietly",
]

#: what became of a file: diagnosed; refused by the diagnosis (a clipped, edgeless or badly
#: fitted capture); unreadable (not a capture the reader takes); failed (anything else)
STATUSES = ("diagnosed", "refused", "unreadable", "failed")


@dataclass(frozen=True)
class DiagnosisSettings:
    """How every capture of a run is read and diagnosed (SI units).

    Attributes
    ----------
    channel : str or None
        Channel to use (name or number).
    read_options : tuple of (str, object)
        Further keyword arguments of :func:`taumatch.read_capture` (``delimiter``,
        ``decimal``, ``time_column``, ``sample_interval``).
    tip_r, shunt_r : float or None
        Tip-arm and shunt-arm resistance (ohm).
    shunt_c : float or None
        Nominal shunt capacitance (F).
    accept : float
        Gain error accepted as compensated (fraction).
    chain : object or None
        The two-arm facts of a chain spec (what ``--chain`` gives the diagnosis).
    force : bool
        Give a trim past a refusal (with a warning).
    """

    channel: str | None = None
    read_options: tuple = ()
    tip_r: float | None = None
    shunt_r: float | None = None
    shunt_c: float | None = None
    accept: float = 0.01
    chain: object = None
    force: bool = False

    def __post_init__(self):
        if not 0 < self.accept < 1:
            raise InputError(f"accept must lie between 0 and 100 %, got {self.accept!r}")


def diagnose_file(path, settings: DiagnosisSettings):
    """Read ``path`` and diagnose it; returns ``(capture, diagnosis)``.

    Raises
    ------
    InputError
        The file is not a capture the reader takes, or the options do not fit it.
    ComputationError
        The diagnosis refuses the capture or its fit does not converge.
    """
    from .. import diagnose, read_capture

    cap = read_capture(path, settings.channel, **dict(settings.read_options))
    d = diagnose(cap, settings.channel, tip_r=settings.tip_r, shunt_r=settings.shunt_r,
                 shunt_c=settings.shunt_c, accept=settings.accept, chain=settings.chain,
                 force=settings.force)
    return cap, d


@dataclass(frozen=True)
class Outcome:
    """What became of one file: its status and, when diagnosed, the figures (SI units,
    gain error as a fraction, standard errors beside each)."""

    file: str
    status: str
    verdict: str | None = None
    gain_error: float | None = None
    gain_error_stderr: float | None = None
    shunt_change: float | None = None
    shunt_change_stderr: float | None = None
    tip_change: float | None = None
    tip_change_stderr: float | None = None
    warnings: tuple = ()
    error: str | None = None
    report: str | None = None
    extra: dict = field(default_factory=dict, compare=False)

    def __post_init__(self):
        if self.status not in STATUSES:
            raise ValueError(f"status must be one of {', '.join(STATUSES)}, got {self.status!r}")

    @property
    def ok(self) -> bool:
        return self.status == "diagnosed"

    def to_dict(self) -> dict:
        out = {k: getattr(self, k) for k in COLUMNS}
        out["warnings"] = list(self.warnings)
        return out


#: the columns of a summary table, in order
COLUMNS = ("file", "status", "verdict", "gain_error", "gain_error_stderr", "shunt_change",
           "shunt_change_stderr", "tip_change", "tip_change_stderr", "warnings", "error", "report")


def outcome_of(path, d=None, error: BaseException | None = None, report=None) -> Outcome:
    """The row of a diagnosis ``d``, or of the error that stopped it."""
    name = str(path)
    if error is not None:
        if isinstance(error, ComputationError):
            status = "refused"
        elif isinstance(error, (InputError, OSError)):
            status = "unreadable"
        else:
            status = "failed"
        text = str(error) if isinstance(error, (TaumatchError, OSError)) else \
            f"internal error ({type(error).__name__}: {error})"
        return Outcome(name, status, error=" ".join(text.split()))
    data = d.to_dict()
    e = data.get("hf_dc_error") or {}
    tr = data.get("trim") or {}
    arms = data.get("arm_trims") or {}
    shunt, tip = arms.get("shunt") or {}, arms.get("tip") or {}
    warns = [*data.get("warnings", ())]
    if data.get("refused"):
        warns.insert(0, f"forced past a refusal: {data['refused']}")
    return Outcome(name, "diagnosed", verdict=data.get("verdict"), gain_error=e.get("value"),
                   gain_error_stderr=e.get("stderr"), shunt_change=shunt.get("change"),
                   shunt_change_stderr=shunt.get("change_stderr"),
                   tip_change=tip.get("change"), tip_change_stderr=tip.get("change_stderr"),
                   warnings=tuple(warns), report=None if report is None else str(report),
                   extra={"trimmer": {k: tr[k] for k in ("part", "present", "required",
                                                         "required_stderr", "in_range")
                                      if k in tr}} if tr.get("part") is not None else {})


def run_quietly(fn, *args, **kwargs):
    """Call ``fn`` with numerical warnings kept off stderr (they say nothing a user can act on
    that the diagnosis's own warnings do not)."""
    import numpy as np

    with _warnings.catch_warnings(), np.errstate(all="ignore"):
        _warnings.simplefilter("ignore")
        return fn(*args, **kwargs)


def diagnose_outcome(path, settings: DiagnosisSettings, report_path=None, report_inputs=()):
    """Diagnose ``path`` and return ``(outcome, diagnosis or None)``; never raises for a bad
    file.  With ``report_path`` the HTML report of a diagnosed capture is written there."""
    try:
        cap, d = run_quietly(diagnose_file, path, settings)
    except Exception as exc:  # noqa: BLE001 - a bad file is one row, never the end of the run
        return outcome_of(path, error=exc), None
    written = None
    if report_path is not None:
        from ..report import diagnosis_report, write_report

        try:
            title = f"Compensation diagnosis: {Path(path).name}"
            write_report(run_quietly(diagnosis_report, d, title=title,
                                     inputs=(("capture", str(path)), *report_inputs),
                                     notes=cap.notes), report_path, option="report")
            written = report_path
        except Exception as exc:  # noqa: BLE001
            o = outcome_of(path, d)
            return replace(o, warnings=o.warnings + (f"report not written: {exc}",)), d
    return outcome_of(path, d, report=written), d
