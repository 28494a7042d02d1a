"""Capture files for the workbench tests: textbook divider captures (divider_synth, from the
compensated-divider formulas of Millman & Taub / Boylestad) written as an instrument's CSV."""

import io

import numpy as np
from divider_synth import c1_for_error, capture


def capture_text(error: float, seed: int, **kwargs) -> str:
    """The CSV text of a textbook capture whose high/low-frequency gain error is ``error``."""
    t, v = capture(c1_for_error(error), seed=seed, **kwargs)
    buf = io.StringIO()
    buf.write("Time (s),CH1 (V)\n")
    np.savetxt(buf, np.column_stack([t, v]), delimiter=",", fmt="%.9g")
    return buf.getvalue()


def write_capture(path, error: float, seed: int, **kwargs):
    path.write_text(capture_text(error, seed, **kwargs))
    return path


def shunt_trim_truth(error: float, r1=9e6, r2=1e6, c2=100e-12) -> float:
    """The shunt-arm change that compensates (R1·C1/R2 − C2, textbook condition R1C1 = R2C2)."""
    return r1 * c1_for_error(error) / r2 - c2
