"""Estimating chain parameters from a capture with lmfit (physics in :mod:`.models`)."""

from .divider import DEFAULT_SHUNT_C, DividerFit, Estimate, fit_divider

__all__ = ["DEFAULT_SHUNT_C", "DividerFit", "Estimate", "fit_divider"]
