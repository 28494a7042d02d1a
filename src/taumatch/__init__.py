"""taumatch: the measurement chain between a circuit and an instrument, in the s-domain.

The public API is small and grows by layer (see DESIGN.md):

* :mod:`taumatch.lti` — rational transfer functions, partial fractions, closed-form responses.
* :mod:`taumatch.units` — engineering notation at the edges.
* :mod:`taumatch.errors` — the exception family.
"""

from .errors import ComputationError, InputError, TaumatchError
from .units import format_quantity, parse_quantity

__version__ = "0.1.0"

__all__ = [
    "TaumatchError",
    "InputError",
    "ComputationError",
    "parse_quantity",
    "format_quantity",
    "__version__",
]
