"""lmfit imported for the command line without the picture library it would load for itself.

``import lmfit`` loads matplotlib, only to offer plots of its own results (taumatch draws its
own, and only when a picture is asked for).  A command that fits and draws nothing calls
:func:`import_fit_library` first: ``sys.modules["matplotlib"]`` is ``None`` while lmfit is
imported, so its optional ``import matplotlib`` fails as it would without the library
installed; the entry is removed at once, and matplotlib imports normally afterwards.  Done
only in the command line's own process, where nothing else uses lmfit's plotting; the
library (``taumatch.fit``) imports lmfit as it is.

Importing lmfit in a thread beside the capture's reading was measured too
(bench/bench_diagnose.py's method, fresh processes, medians of alternated runs): it saved
nothing, since the parser holds the interpreter lock for most of its work, so it is not done.
"""

from __future__ import annotations

import sys

__all__ = ["import_fit_library"]


def import_fit_library(pictures: bool) -> None:
    """Import lmfit, without matplotlib unless ``pictures`` (see the module text)."""
    if "lmfit" in sys.modules:
        return
    blocked = not pictures and "matplotlib" not in sys.modules
    if blocked:
        sys.modules["matplotlib"] = None  # lmfit's `try: import matplotlib` then fails
    try:
        import lmfit  # noqa: F401
    finally:
        if blocked and "matplotlib" in sys.modules and sys.modules["matplotlib"] is None:
            del sys.modules["matplotlib"]
