"""``taumatch divider``: design a compensated divider, optionally with a Monte Carlo."""

from __future__ import annotations

import click

from ..errors import InputError
from ..units import parse_quantity
from ._common import emit_json, save_figure
from .progress import progress_bar, progress_wanted
from .reporting import command_inputs, report_option, start_report


def _q(text, unit, option, positive=False, allow_zero=True):
    if text is None:
        return None
    value = parse_quantity(text, unit, field=f"--{option}")
    if positive and not value > 0:
        raise InputError(f"--{option}: must be positive, got {text!r}")
    if not allow_zero and value == 0:
        raise InputError(f"--{option}: must not be zero, got {text!r}")
    if value < 0:
        raise InputError(f"--{option}: must not be negative, got {text!r}")
    return value


def _fraction(text, option):
    """'1%', '0.01' → 0.01."""
    value = parse_quantity(text, field=f"--{option}")
    if not 0 <= value < 1:
        raise InputError(f"--{option}: expected a fraction such as 1% or 0.01, got {text!r}")
    return value


def _choice(value, option, valid):
    v = value.strip().lower() if isinstance(value, str) else value
    if v not in valid:
        raise InputError(f"--{option}: must be one of {', '.join(valid)}, got {value!r}")
    return v


@click.command("divider")
@click.option("--ratio", required=True, help="Target ratio, e.g. 100 for 100:1.")
@click.option("--input-r", default=None,
              help="Wanted input resistance R1+R2 (ohm, e.g. 10M); default ratio x instrument R.")
@click.option("--instrument", default="1M||14p", show_default=True,
              help="Instrument input R||C (also written R//C).")
@click.option("--cable-c", default="0", show_default=True, help="Cable capacitance (F, e.g. 90p).")
@click.option("--series", default="E96", show_default=True, help="Resistor series E3 ... E192.")
@click.option("--capacitor-series", default="E12", show_default=True,
              help="Series for fixed capacitors.")
@click.option("--tolerance-r", default="1%", show_default=True, help="Resistor tolerance.")
@click.option("--tolerance-c", default="5%", show_default=True,
              help="Capacitor tolerance (fixed parts, instrument, cable, stray).")
@click.option("--instrument-tolerance-r", default="0", show_default=True,
              help="Tolerance of the instrument's input resistance.")
@click.option("--arm", default="bottom", show_default=True,
              help="Arm holding the trimmer: bottom or top.")
@click.option("--voltage", default=None, help="Peak working voltage (V, e.g. 5k; for ac give the peak: 230 V rms is 325 V).")
@click.option("--voltage-kind", default="unknown", show_default=True,
              help="ac, dc or unknown (caution threshold 30 V rms / 60 V dc).")
@click.option("--limiting-voltage", default=None,
              help="Limiting voltage of each resistor (V); default 200 V with a warning.")
@click.option("--power-rating", default=None, help="Power rating of each resistor (W).")
@click.option("--margin", default="50%", show_default=True,
              help="Fraction of limiting voltage and power rating each resistor may use.")
@click.option("--stray-c", default=None, help="Stray capacitance to earth per section (F).")
@click.option("--sections", default=None, type=int, help="Number of column sections.")
@click.option("--column-height", default=None,
              help="Estimate the earth capacitance from the column's height (m) ...")
@click.option("--column-diameter", default=None, help="... and diameter (m) ...")
@click.option("--column-base", default=None,
              help="... and height of its lower end above the earthed floor (m; default "
                   "one diameter).")
@click.option("--grading-limit", default="1%", show_default=True,
              help="Allowed midpoint-voltage error of the graded column.")
@click.option("--top-c", default=None, help="Use this top-arm capacitance (F).")
@click.option("--monte-carlo", "draws", default=0, type=int, show_default=True,
              help="Number of Monte Carlo draws (0: none).")
@click.option("--seed", default=None, type=int, help="Seed of the Monte Carlo generator.")
@click.option("--yield", "yield_", default="99%", show_default=True,
              help="Yield wanted for the trimmer range.")
@click.option("--trimmer", "trimmer_range", default=None, metavar="MIN,MAX",
              help="Report the Monte Carlo yield of this trimmer range (F, e.g. 2p,30p) "
                   "instead of the design's.")
@click.option("--distribution", default="uniform", show_default=True,
              help="uniform (within ± tolerance) or normal (tolerance = 3 sigma).")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), default=None,
              help="Draw the frequency response (trimmed vs untrimmed worst case) to this file.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
@report_option
@click.pass_context
def command(ctx, ratio, input_r, instrument, cable_c, series, capacitor_series, tolerance_r,
            tolerance_c, instrument_tolerance_r, arm, voltage, voltage_kind, limiting_voltage,
            power_rating, margin, stray_c, sections, column_height, column_diameter,
            column_base, grading_limit, top_c, draws, seed, yield_,
            trimmer_range, distribution, plot_path, as_json, report_path):
    """Design a compensated divider: resistors, compensation, trimmer and ratio error.

    The top arm is a string of preferred-value resistors (split as the voltage and
    power demand), the bottom arm the instrument input with an optional shunt
    resistor and fixed capacitor; a trimmer in one arm makes R1*C1 = R2*C2. With
    --stray-c the top arm is treated as a high-voltage column with earth
    capacitance and grading capacitors. Safety cautions are printed with every
    result above 30 V rms / 60 V dc.

    \b
    Examples:
      taumatch divider --ratio 100 --input-r 10M --instrument "1M||14p" --cable-c 90p
      taumatch divider --ratio 100 --input-r 10M --instrument "1M||14p" --cable-c 90p \\
          --voltage 5k --stray-c 2p --sections 10 --monte-carlo 100000 --seed 1
    """
    from ..design.divider import design_divider
    from ..design.tolerance import monte_carlo

    start_report(report_path, [])
    ratio_v = parse_quantity(ratio, field="--ratio")
    if draws < 0:
        raise InputError(f"--monte-carlo: number of draws must be >= 0, got {draws}")
    geometry = None
    if column_height is not None or column_diameter is not None:
        if column_height is None or column_diameter is None:
            raise InputError("--column-height and --column-diameter go together")
        geometry = (_q(column_height, "m", "column-height", positive=True),
                    _q(column_diameter, "m", "column-diameter", positive=True))
        if column_base is not None:
            geometry += (_q(column_base, "m", "column-base"),)
    elif column_base is not None:
        raise InputError("--column-base: give --column-height and --column-diameter as well")
    if sections is not None and stray_c is None and geometry is None:
        raise InputError("--sections: give --stray-c (stray capacitance per section) or the "
                         "column geometry as well")
    y = _fraction(yield_, "yield")
    if not y > 0:
        raise InputError(f"--yield: must be above 0, got {yield_!r}")
    design = design_divider(
        ratio_v, _q(input_r, "ohm", "input-r", positive=True), instrument,
        _q(cable_c, "F", "cable-c"), series=series, capacitor_series=capacitor_series,
        tolerance_r=_fraction(tolerance_r, "tolerance-r"),
        tolerance_c=_fraction(tolerance_c, "tolerance-c"),
        instrument_tolerance_r=_fraction(instrument_tolerance_r, "instrument-tolerance-r"),
        arm=_choice(arm, "arm", ("bottom", "top")),
        voltage=_q(voltage, "V", "voltage", positive=True),
        voltage_kind=_choice(voltage_kind, "voltage-kind", ("unknown", "ac", "dc")),
        limiting_voltage=_q(limiting_voltage, "V", "limiting-voltage", positive=True),
        power_rating=_q(power_rating, "W", "power-rating", positive=True),
        margin=parse_quantity(margin, field="--margin"),
        stray_capacitance=_q(stray_c, "F", "stray-c"),
        sections=sections, column_geometry=geometry,
        grading_limit=_fraction(grading_limit, "grading-limit"),
        top_capacitance=_q(top_c, "F", "top-c", positive=True),
        distribution=_choice(distribution, "distribution", ("uniform", "normal")))
    trim = None
    if trimmer_range is not None:
        items = trimmer_range.split(",")
        if len(items) != 2:
            raise InputError(f"--trimmer: expected MIN,MAX such as 2p,30p, got {trimmer_range!r}")
        trim = tuple(_q(v.strip(), "F", "trimmer") for v in items)
        if trim[0] > trim[1]:
            raise InputError(f"--trimmer: MIN must not exceed MAX, got {trimmer_range!r}")
        if not draws:
            raise InputError("--trimmer: needs --monte-carlo N to estimate a yield")
    mc = None
    if draws:
        with progress_bar(draws, "Monte Carlo", progress_wanted(as_json)) as advance:
            mc = monte_carlo(design, draws, seed=seed, yield_target=y, trimmer=trim,
                             progress=lambda done, total: advance(done))
    if plot_path:
        fig, _ = design.plot()
        save_figure(fig, plot_path)
    if report_path:
        from ..report import divider_report, write_report

        write_report(divider_report(design, mc, title=f"Divider design {ratio_v:g}:1",
                                    inputs=command_inputs(ctx)), report_path)
    if as_json:
        out = design.to_dict()
        if mc is not None:
            out["monte_carlo"] = mc.to_dict()
            out["yield"] = mc.yield_of_trimmer
        emit_json(out)
        return
    click.echo(design.summary())
    if mc is not None:
        click.echo(mc.summary())
