"""Design: preferred values, divider arms, tolerances and high-voltage columns.

Each concept lives in its own module (``eseries``, ``divider``, ``tolerance``, ``hv``);
import from the module that holds it.  (The trim of a chain is an analysis of the chain:
:mod:`taumatch.analysis.trim`.)
"""
