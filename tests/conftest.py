"""Shared assertion helpers for the test suite."""

from __future__ import annotations

import os
import sys

# One BLAS thread, as the command line runs (taumatch.cli sets the same before numpy loads):
# the small dense problems of the fits lose more to thread start-up and contention on a
# shared machine than they gain.  Only before numpy is first imported; a value set is kept.
if "numpy" not in sys.modules:
    for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
        os.environ.setdefault(_var, "1")

import numpy as np  # noqa: E402
import pytest  # noqa: E402


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


# Property tests are repeatable: the same examples on every run (CI included), so a
# failure is a real regression, not the luck of the draw.
from hypothesis import settings as _hyp_settings  # noqa: E402

import os as _os  # noqa: E402

_hyp_settings.register_profile("taumatch", derandomize=True, deadline=None)
_hyp_settings.register_profile("explore", derandomize=False, deadline=None)
# TAUMATCH_EXPLORE=1 draws fresh examples, for hunting bugs by hand
_hyp_settings.load_profile("explore" if _os.environ.get("TAUMATCH_EXPLORE") else "taumatch")


# Real oscilloscope captures live beside the clone (../shared/real-captures, see its README);
# they are never copied into the project. TAUMATCH_SHARED points elsewhere if needed.
from pathlib import Path as _Path  # noqa: E402

SHARED = _Path(_os.environ.get("TAUMATCH_SHARED", _Path(__file__).resolve().parents[1].parent / "shared"))
REAL_CAPTURES = SHARED / "real-captures"
BAD_INPUTS = SHARED / "bad-inputs"


def _shared_dir(path: _Path, what: str) -> _Path:
    if not path.is_dir():
        pytest.skip(f"{what} not found at {path} (they live beside the clone in ../shared/; "
                    "set TAUMATCH_SHARED to their parent folder)")
    return path


@pytest.fixture
def real_captures() -> _Path:
    """The folder of real instrument captures; the test skips, saying why, where it is absent."""
    return _shared_dir(REAL_CAPTURES, "real instrument captures")


@pytest.fixture
def bad_inputs() -> _Path:
    """The folder of inputs that once broke the tool; the test skips where it is absent."""
    return _shared_dir(BAD_INPUTS, "bad-input reproducers")
