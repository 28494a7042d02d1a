"""Design: preferred values, divider arms, trims, tolerances and high-voltage columns.

Each concept lives in its own module (``eseries``, ``divider``, ``tolerance``, ``hv``,
``trim``); import from the module that holds it.
"""
