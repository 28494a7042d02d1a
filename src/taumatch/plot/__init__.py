"""Pictures of taumatch results.  Only this package imports matplotlib, and only inside
functions, so that ``import taumatch`` stays fast and works without a display.

One module per kind of picture (``response``, ``pulse``, ...); each function takes an
optional ``ax`` and returns ``(fig, ax)``.
"""

from __future__ import annotations

__all__ = ["new_axes", "new_figure"]


def _pyplot():
    """matplotlib's pyplot, on the Agg backend unless the host program chose one."""
    import matplotlib

    if matplotlib.get_backend().lower() not in ("agg", "module://matplotlib_inline.backend_inline"):
        try:
            matplotlib.use("Agg")
        except Exception:  # pragma: no cover - backend already fixed by the host program
            pass
    import matplotlib.pyplot as plt

    return plt


def new_figure(figsize=(9, 6)):
    """A new empty figure (for layouts of panels of different sizes)."""
    return _pyplot().figure(figsize=figsize)


def new_axes(ax=None, nrows: int = 1, ncols: int = 1, **kwargs):
    """Return ``(fig, ax)``: the given axes' figure, or a new figure on the Agg backend."""
    if ax is not None:
        return ax.figure, ax
    plt = _pyplot()

    kwargs.setdefault("figsize", (8, 4.5) if nrows * ncols == 1 else (9, 3.2 * nrows))
    fig, axes = plt.subplots(nrows, ncols, **kwargs)
    return fig, axes
