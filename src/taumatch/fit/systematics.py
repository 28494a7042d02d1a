"""What a fit's own covariance leaves out, measured by moving the fit.

The covariance of a least-squares fit says how the noise moves the estimates; it says
nothing of the values the fit was told or held, nor of where the model itself is too
simple.  Three measurements of that, each a small job for the fit's own machinery:

* :func:`held_table` — how far the fitted capacitances (and amplitude) move per unit
  change of each held value, by the linearised refit of
  :func:`taumatch.fit.sensitivity.held_sensitivities`;
* :func:`held_ends` — for a held shunt capacitance with a wide tolerance, the tip
  capacitance refitted with it held at both ends (the trim is far from linear in it);
* :func:`edge_free` — the capacitances fitted again without the samples near the edges,
  where the model's first-order source edge speaks for the jump.

:mod:`taumatch.budget` turns them into terms of a diagnosis's uncertainty.
"""

from __future__ import annotations

import numpy as np

from ..errors import ComputationError
from .sensitivity import held_sensitivities

__all__ = ["HELD_INPUTS", "edge_free", "held_ends", "held_table", "near_edges"]

#: Held parameters whose assumed values can move the fit (the arm resistances, a shunt
#: capacitance the capture cannot fix, an unresolved edge, a ground lead beyond the sampling).
HELD_INPUTS = ("r1", "r2", "c2", "edge", "lead_l", "lead_r")
_PF = 1e-12


def held_table(residual_of, params, scales: dict, names: dict) -> dict:
    """``{estimate: {held parameter: d estimate / d held}}`` (SI per SI) for the fitted tip
    and shunt capacitance and amplitude.

    ``residual_of(values)`` is the fit's weighted residual, ``scales`` the SI value of one
    unit of each parameter, ``names`` the estimates' names by parameter.
    """
    vals = params.valuesdict()
    free = [n for n, par in params.items() if par.vary]
    held = [n for n in HELD_INPUTS if n in params and not params[n].vary
            and params[n].expr is None]
    try:
        raw = held_sensitivities(residual_of, vals, free, held)
    except (ValueError, ArithmeticError) as exc:
        raise ComputationError(f"the fit's sensitivity to its held values failed: {exc}") from None
    return {names.get(a, a): {b: d * scales[a] / scales[b] for b, d in row.items()}
            for a, row in raw.items() if a in ("c1", "c2", "amp")}


def held_ends(params, refit, half_width_pf: float | None, slope: float = 0.0) -> dict:
    """``{"c2": ((c2, c1), (c2, c1))}`` (F): the tip capacitance refitted with a held shunt
    capacitance at each end of ± ``half_width_pf`` (pF), each refit starting from the
    linearised prediction (``slope`` = dC1/dC2); empty when C2 was fitted, no tolerance is
    given or a refit fails."""
    if not half_width_pf or params["c2"].vary:
        return {}
    ends = []
    c2 = params["c2"].value
    for sign in (-1.0, 1.0):
        prm = params.copy()
        c2_end = max(c2 + sign * half_width_pf, 0.01 * c2)
        prm["c2"].set(value=c2_end, vary=False)
        c1 = prm["c1"]
        c1.set(value=min(max(c1.value + slope * (c2_end - c2), c1.min), c1.max))
        try:
            ends.append((c2_end * _PF, refit(prm).params["c1"].value * _PF))
        except ComputationError:
            return {}
    return {"c2": tuple(ends)}


def near_edges(t, period: float, edges, after: float, before: float) -> np.ndarray:
    """True for times (s, folded into the period) within ``before`` ahead of or ``after``
    behind any of the ``edges`` (s)."""
    t = np.asarray(t, dtype=float)
    near = np.zeros(t.size, dtype=bool)
    for at in edges:
        x = np.mod(t - at + 0.5 * period, period) - 0.5 * period
        near |= (x > -before) & (x < after)
    return near


def edge_free(params, refit, weights) -> dict | None:
    """``{"c1", "c2"}`` (F) fitted again with ``weights`` (zero near the edges), the edge's
    own parameters and a lead held; None when too few points remain or the fit fails."""
    if np.count_nonzero(weights) < 10:
        return None
    prm = params.copy()
    for name in ("edge", "duty", "lead_l", "lead_r"):
        if name in prm:
            prm[name].set(vary=False)
    try:
        alt = refit(prm, weights).params
    except ComputationError:
        return None
    return {"c1": alt["c1"].value * _PF, "c2": alt["c2"].value * _PF}
