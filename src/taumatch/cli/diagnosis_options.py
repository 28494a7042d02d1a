"""Options of the commands that diagnose several captures with one set of settings
(``watch``, ``compare``, ``batch``): the reader's and the divider's options, the acceptance
band, ``--force``; turned into one :class:`~taumatch.workbench.DiagnosisSettings`."""

from __future__ import annotations

import click

from .options import capture_options, chain_facts, divider_options

__all__ = ["diagnosis_options", "settings_from"]

_READ_KEYS = ("delimiter", "decimal", "time_column", "sample_interval")


def diagnosis_options(fn):
    """Add the reader's options, the divider's, ``--accept`` and ``--force``."""
    fn = click.option("--force", is_flag=True,
                      help="Give a trim even from a clipped or badly fitted capture (warned).")(fn)
    fn = click.option("--accept", default="1%", show_default=True,
                      help="Gain error accepted as compensated (1% or 0.01).")(fn)
    return capture_options(divider_options(fn))


def settings_from(params: dict):
    """The settings of a run from the parsed options (which it removes from ``params``)."""
    from ..workbench import DiagnosisSettings
    from .cmd_diagnose import _percent

    delim = params.pop("delimiter", None)
    read = {"delimiter": "\t" if delim == "tab" else delim}
    for k in _READ_KEYS[1:]:
        read[k] = params.pop(k, None)
    read = tuple((k, v) for k, v in read.items() if v is not None)
    return DiagnosisSettings(
        channel=params.pop("channel", None), read_options=read,
        tip_r=params.pop("tip_r", None), shunt_r=params.pop("shunt_r", None),
        shunt_c=params.pop("shunt_c", None), accept=_percent(params.pop("accept", "1%")),
        chain=chain_facts(params.pop("chain_path", None)), force=params.pop("force", False))
