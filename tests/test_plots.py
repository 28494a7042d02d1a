"""Pictures: each has its expected axes, labels, units and lines (not image comparisons).

Common checks: tick labels in engineering notation with their unit (``100 µs``, ``200 mV``),
titles in words (no snake_case), legends that sit outside the plot area, frequency axes
limited to where the response changes. Expected values come from the textbook divider
(Millman & Taub / Boylestad: HF/DC gain ratio (C1/(C1+C2))/(R2/(R1+R2)), corner
1/(2π τ) with τ = (R1‖R2)(C1+C2)) on captures made by divider_synth.
"""

import math

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt
import numpy as np
import pytest
from divider_synth import c1_for_error, capture
from matplotlib.ticker import EngFormatter
from workbench_files import write_capture

from taumatch.pulse import measure
from taumatch.workbench import DiagnosisSettings, diagnose_file

E = 0.05                              # the capture's gain error (textbook)
R1, R2, C2 = 9e6, 1e6, 100e-12       # divider_synth's defaults


@pytest.fixture(scope="module")
def diagnosis(tmp_path_factory):
    path = write_capture(tmp_path_factory.mktemp("plots") / "p.csv", E, seed=61, periods=4)
    return diagnose_file(path, DiagnosisSettings(tip_r=R1, shunt_r=R2))[1]


@pytest.fixture(autouse=True)
def _close():
    yield
    plt.close("all")


def unit_of(axis):
    fmt = axis.get_major_formatter()
    return fmt.unit if isinstance(fmt, EngFormatter) else None


def tick_texts(fig, axis):
    fig.canvas.draw()
    return [t.get_text() for t in axis.get_ticklabels() if t.get_text()]


def assert_legend_clear(fig, ax):
    """The legend's box does not overlap the plot area (it never covers data)."""
    leg = ax.get_legend()
    assert leg is not None
    fig.canvas.draw()
    a, b = ax.get_window_extent(), leg.get_window_extent()
    overlap = min(a.x1, b.x1) > max(a.x0, b.x0) and min(a.y1, b.y1) > max(a.y0, b.y0)
    assert not overlap, (a, b)


def assert_words(fig):
    for ax in fig.axes:
        assert "_" not in ax.get_title(loc="left") + ax.get_title(), ax.get_title(loc="left")


def test_diagnosis_picture(diagnosis):
    fig, axes = diagnosis.plot()
    period, residual, corner, gain, phase = axes
    # the averaged capture, the fit drawn thinner and dashed on top, the prediction
    lines = period.get_lines()
    assert [ln.get_label() for ln in lines] == ["capture (averaged period)", "fitted divider",
                                               "predicted after the trim"]
    assert lines[1].get_linestyle() == "--" and lines[1].get_linewidth() < lines[0].get_linewidth()
    assert lines[1].get_zorder() >= lines[0].get_zorder()
    for ax in (period, residual, corner):
        assert unit_of(ax.xaxis) == "s" and unit_of(ax.yaxis) == "V"
    assert any("µs" in t for t in tick_texts(fig, residual.xaxis))
    assert any("mV" in t for t in tick_texts(fig, period.yaxis))
    assert residual.get_xlabel() == "time from the rising edge"
    assert "over-compensated" in period.get_title(loc="left")
    assert_legend_clear(fig, period)
    assert_legend_clear(fig, corner)
    assert_words(fig)
    # the corner: three curves, from just before the edge to three time constants at most
    tau = R1 * R2 / (R1 + R2) * (c1_for_error(E) + C2)
    assert len(corner.get_lines()) == 3
    lo, hi = corner.get_xlim()
    assert lo < 0 < hi <= min(3.3 * tau, 0.5e-3)     # 3 fitted τ; the fit holds τ within 10 %
    # Bode: as found steps up by the HF/DC ratio 1 + E; as trimmed is flat
    assert [ln.get_label() for ln in gain.get_lines()] == ["as found", "as trimmed"]
    assert len(phase.get_lines()) == 2
    assert unit_of(gain.xaxis) == "Hz" and unit_of(phase.xaxis) == "Hz"
    assert gain.get_xscale() == "log"
    assert any(t.endswith("dB") for t in tick_texts(fig, gain.yaxis))
    assert any(t.endswith("°") for t in tick_texts(fig, phase.yaxis))
    found, trimmed = (ln.get_ydata() for ln in gain.get_lines())
    assert found[-1] == pytest.approx(20 * math.log10(1 + E), abs=0.05)
    assert np.max(np.abs(trimmed)) < 0.01
    f0, f1 = gain.get_xlim()
    fc = 1 / (2 * math.pi * tau)
    assert f0 < fc < f1 and math.log10(f1 / f0) <= 4    # the band around the corner only
    assert_legend_clear(fig, gain)


def test_two_given_axes_draw_period_and_residual(diagnosis):
    _fig, ax = plt.subplots(2, 1)
    _, axes = diagnosis.plot(ax=ax)
    assert len(axes) == 2 and len(axes[0].get_lines()) == 3 and len(axes[1].get_lines()) == 2


def test_one_given_axes_draws_the_period(diagnosis):
    _fig, ax = plt.subplots()
    _, axes = diagnosis.plot(ax=ax)
    assert len(axes) == 1 and len(axes[0].get_lines()) == 3
    assert axes[0].get_xlabel() == "time from the rising edge"


def test_trim_picture():
    """Before and after the trim of the mistrimmed probe: the trimmed square is flat
    (R1·C1 = R2·C2, Millman & Taub), the untrimmed one peaks at its leading corner."""
    from pathlib import Path

    from taumatch import load_chain
    from taumatch.analysis.predict import trim_prediction

    spec = Path(__file__).resolve().parents[1] / "examples" / "mistrimmed-probe.toml"
    tp = trim_prediction(load_chain(spec))
    fig, ax = tp.plot()
    assert [ln.get_label() for ln in ax.get_lines()] == ["as it is", "after the trim"]
    assert unit_of(ax.xaxis) == "s" and unit_of(ax.yaxis) == "V"
    assert "square-wave response before and after the trim" in ax.get_title(loc="left")
    assert_legend_clear(fig, ax)
    plateau = (tp.t > 0.05e-3) & (tp.t < 0.45e-3)
    after, before = tp.after[plateau], tp.before[plateau]
    assert np.ptp(after) < 1e-3 * np.max(after) < np.ptp(before)
    assert tp.to_dict()["trim"] == tp.trim.to_dict()


def test_pulse_picture_flags_in_words():
    t, v = capture(c1_for_error(E), seed=62, periods=2)
    m = measure((t, v))
    assert "few_periods" in m.flags and "edge_unresolved" in m.flags
    fig, ax = m.plot()
    title = ax.get_title(loc="left")
    assert "few periods" in title and "edge not resolved" in title and "_" not in title
    assert unit_of(ax.xaxis) == "s" and unit_of(ax.yaxis) == "V"
    # the averaged period, then the rising and falling 10/50/90 % points
    assert len([ln for ln in ax.get_lines() if ln.get_label()[0] != "_"]) == 3
    assert len(ax.lines) == 3 + 5      # plus the five level lines
    assert_legend_clear(fig, ax)


def test_chain_picture(tmp_path):
    from pathlib import Path

    from taumatch import chain_figures, load_chain

    spec = Path(__file__).resolve().parents[1] / "examples" / "bench-probe.toml"
    figs = chain_figures(load_chain(spec))
    fig, (mag, step, zin) = figs.plot()
    assert unit_of(mag.xaxis) == "Hz" and unit_of(step.xaxis) == "s" and unit_of(zin.xaxis) == "Hz"
    assert unit_of(zin.yaxis) == "Ω"
    bw = figs.bandwidth.upper
    assert mag.get_xlim()[1] <= 30.0001 * bw          # not swept on to 10 GHz
    assert zin.get_xlim() == mag.get_xlim()
    assert any("MHz" in t for t in tick_texts(fig, mag.xaxis))
    assert len(mag.get_lines()) == 2 and len(step.get_lines()) == 2
    for ax in (mag, step, zin):
        assert_legend_clear(fig, ax)
    assert_words(fig)


def test_divider_and_monte_carlo_pictures():
    from taumatch.design.divider import design_divider
    from taumatch.design.tolerance import monte_carlo

    d = design_divider(10, 10e6, "1M||14p", 90e-12)
    fig, ax = d.plot()
    assert len(ax.get_lines()) == 3      # worst untrimmed, trimmed, the 0 dB rule
    f0, f1 = ax.get_xlim()
    taus = [d.r1 * d.c1, d.r2 * d.c2]
    corners = [1 / (2 * math.pi * t) for t in taus]
    # the step of the untrimmed divider sits near its corner 1/(2π R‖ C): shown, and little more
    assert f0 < min(corners) and max(corners) < f1 and math.log10(f1 / f0) <= 4
    assert unit_of(ax.xaxis) == "Hz"
    assert_legend_clear(fig, ax)
    mc = monte_carlo(d, 2000, seed=5)
    fig, ax = mc.plot()
    assert unit_of(ax.xaxis) == "F" and ax.get_ylabel() == "draws"
    assert any("pF" in t for t in tick_texts(fig, ax.xaxis))
    assert_legend_clear(fig, ax)


def test_batch_picture(tmp_path):
    from taumatch.workbench import batch_diagnose

    files = [write_capture(tmp_path / f"{k}.csv", e, seed=70 + k, periods=4)
             for k, e in enumerate((0.05, -0.02))]
    (tmp_path / "bad.csv").write_text("x\n")
    res = batch_diagnose([*files, tmp_path / "bad.csv"], DiagnosisSettings(), jobs=1)
    fig, ax = res.plot()
    assert [t.get_text() for t in ax.get_yticklabels()] == ["0.csv", "1.csv"]
    assert ax.get_title(loc="left") == "2 captures diagnosed, 1 not"
    assert any(t.endswith("%") for t in tick_texts(fig, ax.xaxis))
    assert_legend_clear(fig, ax)


def test_capture_fit_and_averaged_period_have_summary_and_picture(diagnosis):
    """The reader's, the averager's and the fit's results: text and a picture each.  The
    textbook capture of 5 % gain error (Millman & Taub) fits to +5 % within its error."""
    from taumatch.capture import Capture

    f = diagnosis.fit
    text = f.summary()
    assert text.startswith("fitted divider: tip 9 MΩ ∥ ") and "shunt 1 MΩ ∥ " in text
    e = f.derived["hf_dc_error"]
    assert abs(e.value - E) <= 3 * e.stderr and f"{100 * e.value:+.2f} %" in text
    _fig, ax = f.plot()
    assert [ln.get_label() for ln in ax.get_lines()] == ["capture (averaged period)",
                                                         "fitted divider"]
    assert unit_of(ax.xaxis) == "s"
    ap = diagnosis.metrics.averaged
    assert ap.summary().startswith(f"average of {ap.n_periods} periods of 1 ms")
    t, v = capture(c1_for_error(E), seed=63, periods=3)
    cap = Capture(t, {"CH1": v, "CH2": -v}, source="two.csv")
    assert cap.summary().startswith(f"two.csv: 2 channels (CH1, CH2), {t.size} samples")
    _fig, ax = cap.plot()
    assert [ln.get_label() for ln in ax.get_lines()] == ["CH1", "CH2"]
    assert ax.get_lines()[0].get_xdata().size == t.size      # fewer than PLOT_SAMPLES
