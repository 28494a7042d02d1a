"""Captures: instrument exports read into a ``Capture`` (time in s, channels in V).

* :func:`read` — CSV/TSV/semicolon text (layout sniffed, every guess overridable),
  ``.npy`` and ``.npz``.
* :class:`Capture` — the frozen value: ``time``, ``channels``, ``metadata``, ``source``,
  ``units``; ``channel(name=None)`` picks the named, only, or stepped channel.

See ``docs/captures.md`` for the layouts accepted.
"""

from .model import Capture
from .read import read

__all__ = ["Capture", "read"]
