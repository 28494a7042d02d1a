"""taumatch: the measurement chain between a circuit and an instrument, in the s-domain.

Layers, lowest first (see DESIGN.md); the names below are imported on first use so that
``import taumatch`` stays fast:

* :mod:`taumatch.lti` — rational transfer functions in three forms, partial fractions,
  closed-form responses (:class:`Rational`).
* :mod:`taumatch.network` — lumped and distributed linear networks by modified nodal
  analysis: exact responses, impedances, descriptor systems, transfer functions.
* :mod:`taumatch.chain` — the parts of a measurement chain and the TOML chain spec
  (:func:`load_chain`).
* :mod:`taumatch.capture` — instrument exports (CSV/TSV/semicolon text, .npy, .npz) read
  into a Capture (:func:`read_capture`).
* :mod:`taumatch.pulse` — edges, coherent averaging, IEEE Std 181 pulse metrics and
  data-quality flags (:func:`measure`).
* :mod:`taumatch.fit` — the divider fitted to an averaged period with lmfit.
* :mod:`taumatch.diagnosis`, :mod:`taumatch.correct` — verdict, trim with uncertainty,
  software correction (:func:`diagnose`); :mod:`taumatch.edge_diagnosis` — a chain's
  high-frequency adjustments from a fast edge (:func:`diagnose_edge`).
* :mod:`taumatch.analysis`, :mod:`taumatch.design` — bandwidth, rise time, loading,
  ringing, trim of a chain; divider design, E-series, tolerances, high-voltage columns.
* :mod:`taumatch.units`, :mod:`taumatch.errors` — engineering notation, the exception family.
"""

from importlib import import_module

from .errors import ComputationError, InputError, TaumatchError
from .units import format_quantity, parse_quantity

__version__ = "0.1.0"

_LAZY = {
    "Rational": ("taumatch.lti", "Rational"),
    "Network": ("taumatch.network", "Network"),
    "load_chain": ("taumatch.chain", "load"),
    "read_capture": ("taumatch.capture", "read"),
    "measure": ("taumatch.pulse", "measure"),
    "fit_divider": ("taumatch.fit", "fit_divider"),
    "diagnose": ("taumatch.diagnosis", "diagnose"),
    "diagnose_edge": ("taumatch.edge_diagnosis", "diagnose_edge"),
    "chain_figures": ("taumatch.analysis", "chain_figures"),
    "design_divider": ("taumatch.design.divider", "design_divider"),
}

__all__ = [
    "TaumatchError",
    "InputError",
    "ComputationError",
    "parse_quantity",
    "format_quantity",
    "__version__",
    *_LAZY,
]


def __getattr__(name):
    if name in _LAZY:
        module, attr = _LAZY[name]
        value = getattr(import_module(module), attr)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'taumatch' has no attribute {name!r}")
