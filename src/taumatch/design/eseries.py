"""Preferred numbers of IEC 60063:2015: the E3 ... E192 series, nearest values and pairs.

The series are tabulated, not computed: E3 to E24 differ from the geometric rule
(E24 has 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7 and 8.2 where rounding ``10**(k/24)``
would give other values).  E48 and E96 are written out from memory; the test suite
checks them against the rule "``10**(k/n)`` rounded to three significant figures",
which they follow throughout.  E192 is the same rule with one published exception,
9.20 where rounding gives 9.19 (medium confidence, from memory); no other exception
is known to us.

Examples
--------
>>> nearest(4.6e3, "E24")
4700.0
>>> bracket(5.0e3, "E12")
(4700.0, 5600.0)
>>> best = best_pairs(1234.0, "E24", count=1, kinds=("series",))[0]
>>> best.kind, best.parts, round(best.value, 3)
('series', (1200.0, 33.0), 1233.0)
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError

__all__ = ["SERIES", "Combination", "best_pairs", "bracket", "check_series", "mantissas", "nearest",
           "values"]

_E3 = "10 22 47"
_E6 = "10 15 22 33 47 68"
_E12 = "10 12 15 18 22 27 33 39 47 56 68 82"
_E24 = "10 11 12 13 15 16 18 20 22 24 27 30 33 36 39 43 47 51 56 62 68 75 82 91"
_E48 = (
    "100 105 110 115 121 127 133 140 147 154 162 169 178 187 196 205 215 226 237 249 261 274 "
    "287 301 316 332 348 365 383 402 422 442 464 487 511 536 562 590 619 649 681 715 750 787 "
    "825 866 909 953"
)
_E96 = (
    "100 102 105 107 110 113 115 118 121 124 127 130 133 137 140 143 147 150 154 158 162 165 "
    "169 174 178 182 187 191 196 200 205 210 215 221 226 232 237 243 249 255 261 267 274 280 "
    "287 294 301 309 316 324 332 340 348 357 365 374 383 392 402 412 422 432 442 453 464 475 "
    "487 499 511 523 536 549 562 576 590 604 619 634 649 665 681 698 715 732 750 768 787 806 "
    "825 845 866 887 909 931 953 976"
)
# Generated once by the rounding rule, then the exception 9.20 (for 9.19) applied.
_E192 = (
    "100 101 102 104 105 106 107 109 110 111 113 114 115 117 118 120 121 123 124 126 127 129 "
    "130 132 133 135 137 138 140 142 143 145 147 149 150 152 154 156 158 160 162 164 165 167 "
    "169 172 174 176 178 180 182 184 187 189 191 193 196 198 200 203 205 208 210 213 215 218 "
    "221 223 226 229 232 234 237 240 243 246 249 252 255 258 261 264 267 271 274 277 280 284 "
    "287 291 294 298 301 305 309 312 316 320 324 328 332 336 340 344 348 352 357 361 365 370 "
    "374 379 383 388 392 397 402 407 412 417 422 427 432 437 442 448 453 459 464 470 475 481 "
    "487 493 499 505 511 517 523 530 536 542 549 556 562 569 576 583 590 597 604 612 619 626 "
    "634 642 649 657 665 673 681 690 698 706 715 723 732 741 750 759 768 777 787 796 806 816 "
    "825 835 845 856 866 876 887 898 909 920 931 942 953 965 976 988"
)


def _table(text: str) -> tuple[float, ...]:
    ints = [int(x) for x in text.split()]
    scale = 10 ** (len(text.split()[0]) - 1)
    return tuple(i / scale for i in ints)


SERIES: dict[str, tuple[float, ...]] = {
    "E3": _table(_E3),
    "E6": _table(_E6),
    "E12": _table(_E12),
    "E24": _table(_E24),
    "E48": _table(_E48),
    "E96": _table(_E96),
    "E192": _table(_E192),
}
"""Mantissas in [1, 10) of each series, as published in IEC 60063:2015."""


def check_series(series: str) -> str:
    """The canonical name (``"E96"``) of a preferred-number series written any way (``"e96"``)."""
    key = str(series).strip().upper()
    if key not in SERIES:
        raise InputError(f"series: unknown preferred-number series {series!r}; "
                         f"valid: {', '.join(SERIES)}")
    return key


def mantissas(series: str) -> np.ndarray:
    """The series' values in one decade, [1, 10), as a float array."""
    return np.array(SERIES[check_series(series)])


def _check_target(target, field="target") -> float:
    value = float(target)
    if not (math.isfinite(value) and value > 0):
        raise InputError(f"{field}: must be a positive finite number, got {target!r}")
    return value


def values(series: str, low: float, high: float) -> np.ndarray:
    """All values of a series between ``low`` and ``high`` (inclusive, same unit as them).

    Parameters
    ----------
    series : str
        ``"E3"`` ... ``"E192"``.
    low, high : float
        Range, any unit (ohm, farad); both positive.
    """
    low = _check_target(low, "low")
    high = _check_target(high, "high")
    if high < low:
        raise InputError(f"high: must not be below low ({low!r}), got {high!r}")
    m = mantissas(series)
    d0 = math.floor(math.log10(low)) - 1
    d1 = math.floor(math.log10(high)) + 1
    decades = 10.0 ** np.arange(d0, d1 + 1)
    grid = _round_sig((m[None, :] * decades[:, None]).ravel())
    return grid[(grid >= low * (1 - 1e-12)) & (grid <= high * (1 + 1e-12))]


def _round_sig(x: np.ndarray, digits: int = 6) -> np.ndarray:
    """Remove the binary noise of ``mantissa * 10**d`` (e.g. 4.7e3 exactly)."""
    x = np.asarray(x, dtype=float)
    exp = np.floor(np.log10(x))
    scale = 10.0 ** (digits - 1 - exp)
    return np.round(x * scale) / scale


def bracket(target: float, series: str) -> tuple[float, float]:
    """The series values just below (or equal to) and just above (or equal to) ``target``."""
    target = _check_target(target)
    grid = values(series, target / 10.0, target * 10.0)
    below = grid[grid <= target * (1 + 1e-12)]
    above = grid[grid >= target * (1 - 1e-12)]
    return float(below[-1]), float(above[0])


def nearest(target: float, series: str) -> float:
    """The series value nearest to ``target`` in relative (logarithmic) distance."""
    lo, hi = bracket(target, series)
    target = float(target)
    return lo if abs(math.log(target / lo)) <= abs(math.log(hi / target)) else hi


@dataclass(frozen=True)
class Combination:
    """A one- or two-part combination of preferred values.

    Attributes
    ----------
    kind : str
        ``"single"``, ``"series"`` (values add) or ``"parallel"`` (reciprocals add).
    parts : tuple of float
        The preferred values used, largest first (unit of the target: ohm or farad).
    value : float
        The combination's value.
    error : float
        Relative error ``value / target - 1``.
    """

    kind: str
    parts: tuple
    value: float
    error: float

    def __post_init__(self):
        if self.kind not in ("single", "series", "parallel"):
            raise InputError(f"kind: must be single, series or parallel, got {self.kind!r}")
        if len(self.parts) != (1 if self.kind == "single" else 2):
            raise InputError(f"parts: {self.kind} needs {1 if self.kind == 'single' else 2} "
                             f"values, got {self.parts!r}")

    def to_dict(self) -> dict:
        return {"kind": self.kind, "parts": list(self.parts), "value": self.value,
                "error": self.error}


def best_pairs(target: float, series: str, count: int = 5, kinds=("series", "parallel"),
               decades: int = 3) -> list[Combination]:
    """The best two-part combinations for ``target``, searched over several decades.

    For resistors, ``"series"`` adds the two values and ``"parallel"`` takes the
    reciprocal sum; for capacitors the meanings swap, so pass the kind you will build.
    All pairs are evaluated at once (numpy outer sums); ties are broken by preferring
    the pair whose smaller part is larger (less sensitive to that part's tolerance).

    Parameters
    ----------
    target : float
        Wanted value (ohm or farad).
    series : str
        ``"E3"`` ... ``"E192"``.
    count : int
        How many combinations to return, best first.
    kinds : sequence of str
        ``"series"`` and/or ``"parallel"``.
    decades : int
        How many decades below (series) or above (parallel) the target to search.

    Returns
    -------
    list of Combination
        Sorted by absolute relative error.
    """
    target = _check_target(target)
    if int(count) < 1:
        raise InputError(f"count: must be at least 1, got {count!r}")
    if int(decades) < 1:
        raise InputError(f"decades: must be at least 1, got {decades!r}")
    found = []
    for kind in kinds:
        if kind == "series":
            grid = values(series, target * 10.0 ** -decades, target)
            a, b = np.meshgrid(grid, grid, indexing="ij")
            total = a + b
        elif kind == "parallel":
            grid = values(series, target, target * 10.0 ** decades)
            a, b = np.meshgrid(grid, grid, indexing="ij")
            total = a * b / (a + b)
        else:
            raise InputError(f"kinds: each must be 'series' or 'parallel', got {kind!r}")
        keep = a >= b if kind == "series" else a <= b
        err = np.where(keep, total / target - 1.0, np.inf)
        flat = np.argsort(np.abs(err), axis=None, kind="stable")[: int(count)]
        for idx in flat:
            i, j = np.unravel_index(idx, err.shape)
            if not np.isfinite(err[i, j]):
                continue
            parts = tuple(sorted((float(a[i, j]), float(b[i, j])), reverse=True))
            found.append(Combination(kind, parts, float(total[i, j]), float(err[i, j])))
    found.sort(key=lambda c: (abs(c.error), -min(c.parts)))
    return found[: int(count)]
