"""Fitting the two-arm divider model to one averaged period with lmfit.

Free by default: tip capacitance C1, total shunt capacitance C2, amplitude, offset, the
delay of the edge and the source edge time; the resistances R1 (tip) and R2 (shunt,
usually the instrument input) are known.  Derived quantities — the high/low-frequency
gain error and the trims — are lmfit ``expr`` parameters, so their standard errors come
from the full covariance.  A parameter the data cannot fix is held, and the result says so.
"""

from __future__ import annotations

import math
import warnings

import numpy as np

from ..chain.two_arm import EXPRESSIONS, TwoArm
from ..errors import ComputationError, InputError
from .guess import plateau_guess
from .models import chain_rational, series_c, square_model
from .reduce import reduce_period
from .result import DividerFit, Estimate, estimates_from
from .systematics import edge_free, held_ends, held_table, near_edges

__all__ = ["DEFAULT_SHUNT_C", "DividerFit", "Estimate", "fit_divider"]

#: Shunt capacitance assumed when a capture cannot fix it (common practice: cable 60–200 pF
#: plus an instrument input of 10–50 pF; no source).
DEFAULT_SHUNT_C = 110e-12

PF = 1e-12
#: Least drop of the plateaus' residual sum of squares, in units of the noise variance,
#: for their exponential tail to count as seen.  Three parameters more than flat plateaus
#: (τ and two amplitudes) lower it by about 3 by chance with independent noise; averaged,
#: interpolated and quantised samples are correlated, so the bar is set well above that
#: (flat real 8-bit captures reach about 30; a 1 % mis-compensation at 40 dB about 2500).
TAIL_CHI2 = 100.0
#: A fitted time constant beyond this many periods means a DC gain the capture never shows.
BRANCH_PERIODS = 5.0
#: A tip capacitance beyond this multiple of the compensating value R2·C2/R1 (a gain error
#: past about +500 % on a 10:1 probe) ...
BRANCH_RATIO_HIGH = 20.0
#: ... or below this fraction of it (−98 %) is no physical probe (common practice, no source).
BRANCH_RATIO_LOW = 50.0
#: The physical reading replaces an unphysical one when its χ² is at most this much larger.
ALT_CHISQR = 1.25
#: A fitted source edge counts as resolved from this many sample intervals on (10–90 %), with
#: a standard error under a third of it.  Averaging periods aligned to a fraction of a sample
#: smears an ideal step over about one sample interval (a textbook step sampled at 500 ns
#: fits as about 600 ns), so a shorter fitted edge is the smear, not the source.
EDGE_RESOLVED = 3.0
#: The fit without the edges leaves out this many edge times after each edge's 50 %
#: instant (a first-order edge's tail is down to 0.1 % after 3.1 times its 10–90 %; own
#: derivation: ln(1000)/ln 9), and one edge time before it.
EDGE_GUARD = 3.0


def _measure_edge(t, v, lo, hi, dt):
    """10–90 % time of the fast part of the rising edge between levels lo and hi (s)."""
    if not hi > lo:
        return 0.0
    win = (t > -50 * dt) & (t < 200 * dt)
    tw, vw = t[win], v[win]
    x = (vw - lo) / (hi - lo)

    def cross(level):
        above = np.flatnonzero(x >= level)
        if above.size == 0 or above[0] == 0:
            return None
        k = above[0]
        return tw[k - 1] + (level - x[k - 1]) * (tw[k] - tw[k - 1]) / (x[k] - x[k - 1])

    a, b = cross(0.1), cross(0.9)
    if a is None or b is None:
        return 0.0
    return max(b - a, 0.0)


def _correlation_factor(res: np.ndarray, mask: np.ndarray, lags: int = 20) -> float:
    """1 + 2·Σ ρ_k over runs of the masked residuals (≥ 1; ρ_k summed while positive).

    A lag whose pairs are not both inside the mask adds nothing (a short or gappy mask
    leaves no pairs at long lags)."""
    if np.count_nonzero(mask) < 3:
        return 1.0
    r = res - res[mask].mean()
    var = float(np.mean(r[mask] ** 2))
    if not var > 0:
        return 1.0
    total = 0.0
    for k in range(1, lags + 1):
        both = mask[k:] & mask[:-k]
        if not both.any():
            break
        rho = float(np.mean(r[k:][both] * r[:-k][both])) / var
        if not np.isfinite(rho) or rho <= 0:
            break
        total += rho
    return 1.0 + 2.0 * total


def _shifted(e: Estimate, offset: float) -> Estimate:
    return Estimate(e.value + offset, e.stderr, e.unit, e.determined, e.held, e.note)


def _edge_bound(par, est: Estimate, measured: float, dt: float) -> float | None:
    """Upper bound (s) on the source edge when the sampling does not resolve it, else None.

    The displayed edge is never faster than the source's (averaging and the divider only
    slow it), so the larger of the measured 10–90 % of the averaged edge, the fitted edge
    plus two standard errors and one sample interval bounds it."""
    if (par.vary and par.value >= EDGE_RESOLVED and est.stderr is not None
            and est.stderr < est.value / 3):
        return None
    upper = est.value + 2 * est.stderr if est.stderr is not None else est.value
    return float(max(measured, upper, dt))


def _steepest_rise(t, v, period: float, duty: float) -> float:
    """Time (s) of the largest sample-to-sample rise near the rising edge at t ≈ 0."""
    near = np.flatnonzero((t > -0.25 * (1 - duty) * period) & (t < 0.5 * duty * period))
    if near.size < 3:
        return 0.0
    dv = np.diff(v[near])
    k = int(np.argmax(dv))
    return float(0.5 * (t[near[k]] + t[near[k + 1]]))


def _plateau_slope(t, v, period: float, duty: float, skip: float) -> float:
    """Change (V) over the upper plateau of a straight line fitted to it."""
    tm = np.mod(t, period)
    hi = (tm > skip) & (tm < duty * period - 0.02 * period)
    if hi.sum() < 5:
        return 0.0
    slope = np.polyfit(tm[hi], v[hi], 1)[0]
    return float(abs(slope) * duty * period)


def _at_bound(par, rel: float = 1e-6) -> bool:
    """True when a parameter sits on one of its bounds (to ``rel`` of the bounded span)."""
    span = (par.max - par.min) if np.isfinite(par.max) and np.isfinite(par.min) else abs(par.value)
    tol = rel * max(span, abs(par.value), 1e-300)
    return bool(abs(par.value - par.min) <= tol or abs(par.max - par.value) <= tol)


def _branch_problem(p, r1: float, r2: float, period: float) -> str | None:
    """Why fitted parameters ``p`` (C in pF) are no physical divider, or None."""
    c1, c2 = p["c1"].value * PF, p["c2"].value * PF
    d = TwoArm(r1, c1, r2, c2)
    comp = d.required("tip")
    tau = d.tau
    if tau > BRANCH_PERIODS * period:
        return (f"a time constant of {tau:.3g} s, {tau / period:.0f} periods, far beyond the "
                "averaged period, so the DC gain it implies is never reached")
    if c1 > BRANCH_RATIO_HIGH * comp or c1 < comp / BRANCH_RATIO_LOW:
        return (f"a tip capacitance of {c1 / PF:.4g} pF against the {comp / PF:.4g} pF that "
                "would compensate, outside any physical probe's range")
    c1_se = p["c1"].stderr * PF if p["c1"].stderr is not None else None
    e = p["hf_dc_error"]
    if (c1_se is not None and c1_se > c1 and e.stderr is not None
            and e.stderr < 0.2 * abs(e.value)):
        return (f"a tip capacitance of {c1 / PF:.4g} ± {c1_se / PF:.3g} pF beside a gain error "
                f"of {100 * e.value:+.3g} ± {100 * e.stderr:.2g} %: error bars that contradict "
                "each other")
    return None


def fit_divider(t, v, period: float, duty: float = 0.5, *, noise_rms: float | None = None,
                r1: float = 9e6, r2: float = 1e6, shunt_nominal: float | None = None,
                lead: tuple | None = None, max_points: int = 1500,
                shunt_tolerance: float | None = None) -> DividerFit:
    """Fit tip and shunt capacitance (and amplitude, offset, delay, edge) to one averaged period.

    Parameters
    ----------
    t, v : array_like
        One averaged period: time (s) with the rising edge near t = 0, and voltage (V).
    period : float
        Period of the square wave (s).
    duty : float
        Fraction of the period at the upper level.
    noise_rms : float, optional
        Noise RMS of one averaged sample (V); estimated from the plateau fit if not given.
    r1, r2 : float
        Tip-arm and shunt-arm resistance (ohm); defaults: a 10:1 probe on a 1 MΩ input.
    shunt_nominal : float, optional
        Shunt capacitance (F) to hold when the capture cannot fix it; default 110 pF.
    lead : (float, float), optional
        Nominal ground-lead inductance (H) and series resistance (ohm) of the loop; the lead
        rings with C1 in series with C2.  Fitted when the sampling resolves the ringing
        (f0 below a tenth of the sample rate), else held at these values.
    max_points : int
        Points the fit works on after reduction.
    shunt_tolerance : float, optional
        ± half-width (F) of the shunt capacitance when it is held: the fit is repeated with
        it held at both ends, so that a large tolerance is carried through the model as it
        is, not only through the slope at the nominal value (``DividerFit.held_ends``).

    Returns
    -------
    DividerFit

    Raises
    ------
    InputError
        Bad arguments.
    ComputationError
        When the fit does not converge.
    """
    import lmfit

    t = np.asarray(t, dtype=float)
    v_in = np.asarray(v, dtype=float)
    # fit in units of a power of two near the largest sample (exact), so that the solver's
    # squares and products stay inside the float range for any voltage scale
    peak = float(np.max(np.abs(v_in))) if v_in.size and np.all(np.isfinite(v_in)) else 0.0
    vscale = 2.0 ** round(math.log2(peak)) if peak > 0 else 1.0
    v = v_in / vscale
    noise_rms = noise_rms / vscale if noise_rms is not None else None
    for name, val in (("r1", r1), ("r2", r2), ("period", period)):
        if not (math.isfinite(val) and val > 0):
            raise InputError(f"{name} must be positive, got {val!r}")
    if t.size < 20:
        raise InputError(f"a fit needs at least 20 samples of the averaged period, got {t.size}")
    dt = float(np.median(np.diff(t)))
    notes = []
    c2_hold = DEFAULT_SHUNT_C if shunt_nominal is None else float(shunt_nominal)
    nominal = TwoArm(r1, 0.0, r2, 1.0)  # unit total capacitance: τ per farad is R1‖R2
    g = nominal.dc_gain
    rpar = nominal.tau

    # The averaged period is aligned on its 50 % crossing, which trails the real edge when
    # the high-frequency jump is less than half the swing (a strongly under-compensated
    # divider): re-centre on the steepest sample-to-sample rise near the rising edge.
    t_shift = _steepest_rise(t, v, period, duty)
    t = t - t_shift
    # leave the edge and fast parasitics out of the plateau guess: 30 samples, but no more
    # than 2 % of the period when the sampling is coarse (then the edge is a sample or two)
    skip = max(min(30 * dt, 0.02 * period), 3 * dt, 0.004 * period)
    try:
        pg = plateau_guess(t, v, period, duty, skip)
    except ValueError as exc:
        raise ComputationError(f"cannot fit: {exc}") from exc
    swing = pg.flat_high - pg.flat_low
    if not abs(swing) > 0 or not pg.residual < abs(swing) / 3:
        raise ComputationError("cannot fit: no step between two plateaus was found in the "
                               "averaged period")
    noise = noise_rms if noise_rms and noise_rms > 0 else max(pg.residual, 1e-12 * abs(swing))
    if pg.tau_at_bound and pg.tau > period and _plateau_slope(t, v, period, duty, skip) > 6 * noise:
        raise ComputationError(
            "the square wave is too fast for the divider's time constant (more than about "
            f"{pg.tau:.3g} s against a period of {period:.3g} s): the DC gain is not visible in "
            "the capture; use a period of at least five time constants (a slower reference)")
    # the time constant is visible only if the plateaus are not flat: the tail must lower
    # their residual by far more than the noise would by chance
    tilt_visible = (not pg.tau_at_bound and abs(pg.jump - (pg.high - pg.low)) > 6 * noise
                    and pg.tail_rss > TAIL_CHI2 * max(noise, pg.residual) ** 2)
    if tilt_visible:
        swing = pg.high - pg.low
        ratio = pg.jump / swing  # hf/dc gain ratio
    else:
        ratio = 1.0  # flat plateaus: start from the compensated divider
    ctot = pg.tau / rpar
    c1_0 = max(ratio * g * ctot, 0.05 * PF)
    c2_0 = max(ctot - c1_0, 0.05 * PF)
    lo0, jump0 = (pg.low, pg.jump) if tilt_visible else (pg.flat_low, swing)
    edge_meas = _measure_edge(t, v, lo0, lo0 + jump0, dt)
    edge_resolved = edge_meas > 1.2 * dt

    params = lmfit.Parameters()
    params.add("r1", value=r1 / 1e6, vary=False)
    params.add("r2", value=r2 / 1e6, vary=False)
    params.add("c1", value=c1_0 / PF, min=1e-3, max=1e5)
    if tilt_visible:
        params.add("c2", value=c2_0 / PF, min=1e-3, max=1e6)
    else:
        params.add("c2", value=c2_hold / PF, vary=False)
        params["c1"].value = max(ratio * g * (c2_hold / (1 - ratio * g)), 0.05 * PF) / PF \
            if ratio * g < 1 else c1_0 / PF
        notes.append(
            f"the plateaus are flat within the noise, so the divider time constant and the total "
            f"shunt capacitance cannot be fixed from this capture; shunt capacitance held at "
            f"{c2_hold / PF:.4g} pF (give the shunt capacitance or a chain spec); trims scale with it")
    params.add("amp", value=swing / g)
    params.add("offset", value=pg.low if tilt_visible else pg.flat_low)
    params.add("delay", value=0.0, min=-50.0, max=50.0)  # in sample intervals
    # the falling edge's place is seen only through the edge's own shape
    params.add("duty", value=duty, min=max(duty - 0.02, 0.01), max=min(duty + 0.02, 0.99),
               vary=bool(edge_resolved))
    if edge_resolved:
        params.add("edge", value=max(edge_meas / dt, 0.5), min=0.05, max=1e4)  # sample intervals
    else:
        params.add("edge", value=0.5, vary=False)
        notes.append("the source edge is too fast for the sampling to resolve: edge time held "
                     "at half a sample interval; fast parasitics (ground-lead inductance, source "
                     "and cable resistance) are not resolvable and not fitted")
    ring_free = False
    if lead is not None:
        l0, rl0 = float(lead[0]), max(float(lead[1]), 0.0)
        cs0 = series_c(params["c1"].value * PF, params["c2"].value * PF)
        f0 = 1 / (2 * math.pi * math.sqrt(l0 * cs0)) if l0 > 0 else math.inf
        ring_free = l0 > 0 and f0 < 0.1 / dt
        params.add("lead_l", value=l0 / 1e-9, min=l0 / 1e-9 / 20, max=l0 / 1e-9 * 20, vary=ring_free)
        params.add("lead_r", value=max(rl0, 1.0), min=0.0, max=1e4, vary=ring_free)
        if not ring_free:
            notes.append(f"ground-lead ringing near {f0 / 1e6:.4g} MHz is beyond what "
                         f"{1e-6 / dt:.4g} MS/s resolves: lead inductance and loop resistance "
                         "held at the chain's values")
    for name, text in EXPRESSIONS.items():  # the two-arm model's gain error and trims
        params.add(name, expr=text)

    red = reduce_period(t, v, period, [0.0, duty * period], lead=max(20 * dt, 3 * edge_meas),
                        max_points=max_points)
    weight = np.sqrt(red.n) / noise

    def model_from(p, tt):
        H = chain_rational(p["r1"] * 1e6, p["c1"] * PF, p["r2"] * 1e6, p["c2"] * PF,
                           p["edge"] * dt,
                           (p["lead_l"] * 1e-9, p["lead_r"]) if lead is not None else None)
        return square_model(tt, H, period, p["duty"], p["amp"], p["offset"], p["delay"] * dt)

    def residual_of(vals, w=weight):
        return (model_from(vals, red.t) - red.v) * w

    def residual(p, w=weight):
        return residual_of(p.valuesdict(), w)

    mini = lmfit.Minimizer(residual, params, nan_policy="raise")

    def run(prm, minimizer=mini):
        try:
            with warnings.catch_warnings():
                # lmfit takes the square root of the covariance diagonal, which comes out
                # negative for a parameter the data do not fix; its error is then NaN and
                # the estimate says "not determined"
                warnings.filterwarnings("ignore", "invalid value encountered in sqrt",
                                        RuntimeWarning)
                out = minimizer.minimize(method="least_squares", params=prm, max_nfev=4000)
        except (ValueError, ArithmeticError) as exc:
            raise ComputationError(f"the fit failed: {exc}") from exc
        if not out.success:
            raise ComputationError(f"the fit did not converge: {out.message}")
        return out

    def refit(prm, weights=None):
        """The fit again from ``prm``, with other weights if given."""
        if weights is None:
            return run(prm)
        return run(prm, lmfit.Minimizer(residual, prm, fcn_kws={"w": weights}, nan_policy="raise"))

    try:
        res = run(params)
    except ComputationError:
        if not params["c2"].vary:
            raise
        # a faint tail leaves the shunt capacitance free to wander: hold it and try again
        params["c2"].set(value=c2_hold / PF, vary=False)
        params["c1"].set(value=r2 * c2_hold / r1 / PF)
        notes.append(f"the fit with the shunt capacitance free did not settle; shunt capacitance "
                     f"held at {c2_hold / PF:.4g} pF")
        res = run(params)
    # Hold what the data cannot fix and fit again (at most once per parameter).
    for _ in range(3):
        held_now = []
        edge_p = res.params["edge"]
        if edge_p.vary and (_at_bound(edge_p) or edge_p.stderr is None
                            or edge_p.stderr > abs(edge_p.value)):
            params["edge"].set(value=min(max(edge_p.value, 0.3), 1.0), vary=False)
            params["duty"].set(value=res.params["duty"].value, vary=False)
            held_now.append("edge")
            notes.append("the source edge is too fast for the sampling to resolve: edge time held "
                         f"at {min(max(edge_p.value, 0.3), 1.0):.2g} sample interval; fast "
                         "parasitics are not fitted")
        c2_p = res.params["c2"]
        if c2_p.vary and "edge" not in held_now:
            corr = (res.params["c1"].correl or {}).get("c2")
            se = c2_p.stderr
            if (corr is not None and abs(corr) > 0.9999) or se is None or se > 0.2 * abs(c2_p.value):
                params["c2"].set(value=c2_hold / PF, vary=False)
                held_now.append("c2")
                notes.append(f"tip and shunt capacitance cannot be separated by this capture; "
                             f"shunt capacitance held at {c2_hold / PF:.4g} pF")
        if not held_now:
            break
        for name in ("c1", "amp", "offset", "delay"):
            params[name].set(value=res.params[name].value)
        res = run(params)

    # A fit can settle on a branch no divider has (a tip capacitance without bound, a time
    # constant of many periods); prefer the physical reading when it fits about as well.
    branch = _branch_problem(res.params, r1, r2, period)
    if branch is not None:
        alt = params.copy()
        c2_p = res.params["c2"]
        alt["c2"].set(value=c2_hold / PF if c2_p.vary else c2_p.value, vary=False)
        comp = r2 * alt["c2"].value / r1
        alt["c1"].set(value=comp, min=comp / BRANCH_RATIO_LOW, max=comp * BRANCH_RATIO_HIGH)
        alt["amp"].set(value=(pg.flat_high - pg.flat_low) / g)
        alt["offset"].set(value=pg.flat_low)
        try:
            res_alt = run(alt)
        except ComputationError:
            res_alt = None
        if (res_alt is not None and _branch_problem(res_alt.params, r1, r2, period) is None
                and not _at_bound(res_alt.params["c1"])
                and res_alt.chisqr <= ALT_CHISQR * res.chisqr):
            notes.append(f"a second reading, {branch}, describes the capture about as well; no "
                         "divider is like that, so the physical reading is given")
            res, branch = res_alt, None

    p = res.params
    vals = p.valuesdict()
    full_res = model_from(vals, t) - v
    # quality on the flat parts: samples on an edge carry the alignment jitter of averaging
    duty = float(vals["duty"])
    tm = np.mod(t - vals["delay"] * dt, period)
    guard = max(10 * dt, 5 * vals["edge"] * dt)
    flat = ((tm > guard) & (tm < duty * period - guard)) | (tm > duty * period + guard) & (
        tm < period - guard)
    residual_rms = float(np.sqrt(np.mean(full_res[flat] ** 2))) if flat.sum() > 10 else float(
        np.sqrt(np.mean(full_res**2)))
    # Averaging with sub-sample alignment (and quantisation) correlates neighbouring samples;
    # the weights assume independent noise, so widen the errors by the effective-sample factor
    # 1 + 2·Σρ_k of the residuals on the flat parts (lags up to 20, positive part only).
    inflate = math.sqrt(_correlation_factor(full_res, flat))

    scales = {"c1": PF, "c2": PF, "amp": vscale, "offset": vscale, "delay": dt, "edge": dt,
              "lead_l": 1e-9, "lead_r": 1.0, "r1": 1e6, "r2": 1e6, "duty": 1.0}
    estimates, derived = estimates_from(p, scales, inflate, lead is not None)
    estimates["delay"] = _shifted(estimates["delay"], t_shift)
    bound = _edge_bound(p["edge"], estimates["edge_time"], edge_meas, dt)
    e = estimates["edge_time"]
    if bound is not None:
        estimates["edge_time"] = Estimate(e.value, None, "s", False, e.held,
                                          "not resolved by the sampling", bound=bound)
    else:  # the model's edge is first order: its 10–90 % differs from the samples' own
        shape = abs(e.value - edge_meas) / math.sqrt(3.0)
        estimates["edge_time"] = Estimate(e.value, math.hypot(e.stderr, shape), "s", True,
                                          False, "first-order edge; the shape's share included")
    c1v, c2v = estimates["tip_capacitance"].value, estimates["shunt_capacitance"].value
    estimates["time_constant"] = Estimate(TwoArm(r1, c1v, r2, c2v).tau, None, "s", True, False,
                                          "(R1‖R2)(C1+C2), from the fitted capacitances")
    correlations = {}
    names = {"c1": "tip_capacitance", "c2": "shunt_capacitance", "amp": "amplitude",
             "offset": "offset", "delay": "delay", "edge": "edge_time"}
    for a, na in names.items():
        for b, cval in (p[a].correl or {}).items():
            if b in names and names[b] > na:
                correlations[f"{na}:{names[b]}"] = float(cval)
    # what the fit's covariance leaves out: held values moved, the edges left out
    sensitivity = held_table(residual_of, p, scales, names)
    ends = held_ends(p, refit, shunt_tolerance / PF if shunt_tolerance else None,
                     sensitivity.get("tip_capacitance", {}).get("c2", 0.0))
    reach = EDGE_GUARD * max(vals["edge"], bound / dt if bound is not None else 0.0, 2.0) * dt
    edges = (vals["delay"] * dt, vals["delay"] * dt + duty * period)
    free_of_edges = edge_free(p, refit, weight * ~near_edges(red.t, period, edges, reach,
                                                             reach / EDGE_GUARD))
    return DividerFit(
        r1=r1, r2=r2, period=period, duty=duty, estimates=estimates, derived=derived,
        correlations=correlations, residual_rms=residual_rms * vscale,
        noise_rms=float(noise) * vscale,
        points=int(red.t.size), redchi=float(res.redchi), nfev=int(res.nfev), notes=tuple(notes),
        degenerate=branch, sensitivity=sensitivity, held_ends=ends, edge_free=free_of_edges,
        sample_interval=dt,
        t=t + t_shift, v=v_in,
    )
