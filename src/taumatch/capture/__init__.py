"""Captures: instrument exports read into a ``Capture`` (time in s, channels in V).

>>> from taumatch.capture import Capture, read   # doctest: +SKIP
"""

from .model import Capture
from .read import read

__all__ = ["Capture", "read"]
