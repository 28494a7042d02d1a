"""The fast-edge fit against the same number of exact frequency-response evaluations in
bare numpy, side by side in one run.

The fit: :func:`taumatch.fit.chain_fit.fit_chain_step` on the worked example's capture
(examples/fast-edge-capture.csv: a probe with a lossy cable, 1,590 samples) with four free
fields -- the compensation branch's R and C, the cable's loss and delay -- besides the
amplitude, offset and edge instant; then the whole diagnosis (:func:`diagnose_edge`, the
candidates the capture resolves, the targets, their errors and budget).

The reference: the chain's exact response written out in bare numpy (ABCD matrices, the
cable by the telegrapher's equations, the source edge and the front end), evaluated at as
many complex frequencies as the fit asked of the model, in blocks of the model's term count.
That is the floor of any fit on the exact model: the rest (the inverse transform's FFTs,
the spline, the least squares, the chain's values) is the overhead the ratio shows.

One BLAS thread, as the command line runs.  Prints times and ratios; asserts nothing
(tests never assert wall-clock times).  Run as ``python bench/bench_edge.py``.
"""

from __future__ import annotations

import math
import os
import sys
from pathlib import Path

for _var in ("OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
from timing import best_of

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = ROOT / "examples"


def bare_response(chain, s):
    """The chain's exact ``V_out / V_s`` at complex ``s`` [rad/s], in bare numpy."""
    src, lead, tip, line, box, inp = chain.source, *chain.parts
    a, b, c, d = (np.ones_like(s), np.zeros_like(s), np.zeros_like(s), np.ones_like(s))

    def times(p, q, r, u):
        return a * p + b * r, a * q + b * u, c * p + d * r, c * q + d * u

    a, b, c, d = times(1, lead.r + s * lead.inductance, 0, 1)
    a, b, c, d = times(1, 1 / (1 / tip.r + s * tip.c), 0, 1)
    zs, yp = line.r + s * line.l, line.g + s * line.c
    gd, z0 = np.sqrt(zs * yp) * line.length, np.sqrt(zs / yp)
    a, b, c, d = times(np.cosh(gd), z0 * np.sinh(gd), np.sinh(gd) / z0, np.cosh(gd))
    y = s * box.c + 1 / (box.branch.r + 1 / (s * box.branch.c)) + 1 / inp.r + s * inp.c
    a, b, c, d = times(1, 0, y, 1)
    w = 2 * math.pi * inp.bandwidth / 0.7861513777574233  # Bessel: -3 dB at the bandwidth
    front = w * w / (s * s + math.sqrt(3) * w * s + w * w)
    return front / (a + c * src.resistance) / (1 + s * src.rise_time / math.log(9))


def main():
    from taumatch.capture import read
    from taumatch.chain import load
    from taumatch.edge_diagnosis import diagnose_edge
    from taumatch.fit.chain_fields import ChainField
    from taumatch.fit.chain_fit import fit_chain_step
    from taumatch.fit.step_model import StepModel

    cap = read(EXAMPLES / "fast-edge-capture.csv")
    chain = load(EXAMPLES / "fast-edge-probe.toml")
    t, v = np.asarray(cap.time), np.asarray(cap.channel("CH1"))
    dt = float(t[1] - t[0])
    fields = [ChainField(4, "branch.r", "adjust", "shunt"),
              ChainField(4, "branch.c", "adjust", "shunt"),
              ChainField(3, "r", "parasitic", "line"), ChainField(3, "delay", "parasitic", "line")]
    # the edge's instant and the parasitics not fitted here from the whole diagnosis; the
    # four fields start from the spec's values
    d = diagnose_edge(cap, chain)  # warms the imports too
    base = d.found
    for f in fields:
        base = f.set(base, f.get(chain))
    keep = (t >= d.fit.t[0]) & (t <= d.fit.t[-1])
    state = {}

    def fit():
        model = StepModel(d.fit.t[-1] - d.fit.t0 + 20e-9, dt, 1 / d.edge_constant)
        out = fit_chain_step(t[keep], v[keep], base, fields, noise=d.fit.noise_rms,
                             model=model, t0=d.fit.t0, dt=dt, t0_range=5e-9)
        state["model"] = model
        return out

    t_fit, result = best_of(fit, repeat=3)
    model = state["model"]
    evaluations, terms = model.evaluations, model.terms
    s = 1e7 + 1j * np.arange(terms) * math.pi / (2 * model.t_end)

    def reference():
        for _ in range(evaluations):
            bare_response(chain, s)

    t_ref, _ = best_of(reference, repeat=3)
    print(f"fast-edge fit, 4 free fields (+ amplitude, offset, edge instant), "
          f"{int(keep.sum())} samples: {t_fit:.2f} s, {evaluations} evaluations of "
          f"{terms} terms")
    print(f"  bare numpy, the same {evaluations} x {terms} exact responses: {t_ref:.2f} s")
    print(f"  ratio fit / bare responses: {t_fit / t_ref:.1f}")
    for f in result.free:
        print(f"  {f.describe():36s} {result.values[f.key]:.4g} ± {result.stderr[f.key]:.2g}")
    t_all, d = best_of(lambda: diagnose_edge(cap, chain), repeat=2)
    print(f"whole diagnosis (every candidate the capture resolves, targets, errors, budget): "
          f"{t_all:.2f} s, {d.fit.nfev} evaluations; ratio to the 4-field fit "
          f"{t_all / t_fit:.1f}")


if __name__ == "__main__":
    main()
