"""Reducing an averaged period for fitting: full resolution near the edges, blocks elsewhere."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["Reduced", "reduce_period"]


@dataclass(frozen=True)
class Reduced:
    """Block-averaged samples: time (s), value (V) and how many samples each point averages."""

    t: np.ndarray
    v: np.ndarray
    n: np.ndarray


def reduce_period(t, v, edges, keep: float, max_points: int = 3000) -> Reduced:
    """Keep every sample within ``keep`` seconds after each edge time; average the rest in blocks.

    Parameters
    ----------
    t, v : array_like
        One averaged period (s, V), uniformly sampled.
    edges : sequence of float
        Edge instants (s) on the same time base.
    keep : float
        Span (s) after (and a tenth of it before) each edge kept at full resolution.
    max_points : int
        Rough upper bound for the number of points returned.
    """
    t = np.asarray(t, dtype=float)
    v = np.asarray(v, dtype=float)
    near = np.zeros(t.size, dtype=bool)
    for e in edges:
        near |= (t >= e - 0.1 * keep) & (t <= e + keep)
    n_near = int(near.sum())
    if n_near > max_points // 2:  # too many: thin the kept region too
        idx = np.flatnonzero(near)
        near[:] = False
        near[idx[:: int(np.ceil(n_near / (max_points // 2)))]] = True
        n_near = int(near.sum())
    far_count = t.size - n_near
    budget = max(max_points - n_near, 50)
    block = max(1, int(np.ceil(far_count / budget)))
    out_t, out_v, out_n = [t[near]], [v[near]], [np.ones(n_near)]
    # contiguous runs of far samples, each cut into blocks
    far = ~near
    if far.any():
        idx = np.flatnonzero(far)
        breaks = np.flatnonzero(np.diff(idx) > 1) + 1
        for run in np.split(idx, breaks):
            m = run.size // block * block
            if m:
                tb = t[run[:m]].reshape(-1, block).mean(axis=1)
                vb = v[run[:m]].reshape(-1, block).mean(axis=1)
                out_t.append(tb)
                out_v.append(vb)
                out_n.append(np.full(tb.size, block, dtype=float))
            if m < run.size:
                out_t.append([t[run[m:]].mean()])
                out_v.append([v[run[m:]].mean()])
                out_n.append([float(run.size - m)])
    tt = np.concatenate([np.asarray(a, dtype=float) for a in out_t])
    vv = np.concatenate([np.asarray(a, dtype=float) for a in out_v])
    nn = np.concatenate([np.asarray(a, dtype=float) for a in out_n])
    order = np.argsort(tt)
    return Reduced(tt[order], vv[order], nn[order])
