"""Shared assertion helpers for the test suite."""

from __future__ import annotations

import numpy as np
import pytest


def match_roots(got, want, rtol=1e-9, atol=0.0):
    """Assert that two collections of complex numbers agree regardless of order.

    Greedy nearest matching; tolerances relative to the magnitude of each wanted value.
    """
    got = list(np.atleast_1d(np.asarray(got, dtype=complex)))
    want = list(np.atleast_1d(np.asarray(want, dtype=complex)))
    assert len(got) == len(want), f"{len(got)} values, expected {len(want)}: {got} vs {want}"
    for w in want:
        k = int(np.argmin([abs(g - w) for g in got]))
        g = got.pop(k)
        assert abs(g - w) <= atol + rtol * abs(w), f"{g} != {w} (rtol={rtol}, atol={atol})"


@pytest.fixture
def roots_match():
    return match_roots
