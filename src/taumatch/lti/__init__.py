"""Rational transfer functions: three forms, partial fractions, closed-form responses.

Pure mathematics; knows nothing of probes.  See :class:`Rational`.
"""

from .checks import Check
from .partial_fractions import PartialFractions, Term
from .rational import Rational

__all__ = ["Check", "PartialFractions", "Rational", "Term"]
