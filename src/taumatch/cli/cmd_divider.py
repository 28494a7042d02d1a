"""``taumatch divider``: design a compensated divider, optionally with a Monte Carlo, and
write it as a chain spec."""

from __future__ import annotations

import click

from ..errors import InputError
from ..units import parse_quantity
from ._common import emit_json, save_figure, write_text
from .options import spec_output
from .progress import progress_bar, progress_wanted
from .reporting import command_inputs, report_option, start_report


def _q(text, unit, option, name, *, integer=False):
    """``text`` in engineering notation, checked against the range of ``name``."""
    from ..design.ranges import check

    if text is None:
        return None
    value = text if integer else parse_quantity(text, unit, field=f"--{option}")
    return check(name, value, label=f"--{option}", integer=integer, given=text)


def _choice(value, option, valid):
    v = value.strip().lower() if isinstance(value, str) else value
    if v not in valid:
        raise InputError(f"--{option}: must be one of {', '.join(valid)}, got {value!r}")
    return v


@click.command("divider")
@click.option("--ratio", required=True, help="Target ratio, e.g. 100 for 100:1.")
@click.option("--input-resistance", default=None,
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
@click.option("--arm", default="shunt", show_default=True,
              help="Arm holding the trimmer: shunt or tip.")
@click.option("--voltage", default=None,
              help="Peak working voltage (V, e.g. 5k; for ac give the peak: 230 V rms is 325 V).")
@click.option("--voltage-kind", default="unknown", show_default=True,
              help="ac, dc or unknown (caution threshold 30 V rms / 60 V dc).")
@click.option("--limiting-voltage", default=None,
              help="Limiting voltage of each resistor (V); default 200 V with a warning.")
@click.option("--power-rating", default=None, help="Power rating of each resistor (W).")
@click.option("--margin", default="50%", show_default=True,
              help="Fraction of limiting voltage and power rating each resistor may use.")
@click.option("--stray-c", default=None, help="Stray capacitance to earth per section (F).")
@click.option("--sections", type=int, default=None, help="Number of column sections.")
@click.option("--column-height", default=None,
              help="Estimate the earth capacitance from the column's height (m) ...")
@click.option("--column-diameter", default=None, help="... and diameter (m) ...")
@click.option("--column-base", default=None,
              help="... and height of its lower end above the earthed floor (m; default "
                   "one diameter).")
@click.option("--grading-limit", default="1%", show_default=True,
              help="Allowed midpoint-voltage error of the graded column.")
@click.option("--tip-c", default=None, help="Use this tip-arm capacitance (F).")
@click.option("--monte-carlo", "draws", type=int, default=0, show_default=True,
              help="Number of Monte Carlo draws (0: none; at most 1000000).")
@click.option("--seed", type=int, default=None,
              help="Seed of the Monte Carlo generator (0 to 2^32-1).")
@click.option("--yield", "yield_", default="99%", show_default=True,
              help="Yield wanted for the trimmer range.")
@click.option("--trimmer", "trimmer_range", default=None, metavar="MIN,MAX",
              help="Report the Monte Carlo yield of this trimmer range (F, e.g. 2p,30p) "
                   "instead of the design's.")
@click.option("--distribution", default="uniform", show_default=True,
              help="uniform (within ± tolerance) or normal (tolerance = 3 sigma).")
@click.option("--spec", "spec_path", type=click.Path(dir_okay=False), default=None,
              metavar="OUT.toml",
              help="Write the designed divider as a chain spec (for bandwidth, trim, predict, "
                   "netlist).")
@click.option("--plot", "plot_path", type=click.Path(dir_okay=False), default=None,
              help="Draw the frequency response (trimmed vs untrimmed worst case) to this file.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
@report_option
@click.pass_context
def command(ctx, ratio, input_resistance, instrument, cable_c, series, capacitor_series,
            tolerance_r, tolerance_c, instrument_tolerance_r, arm, voltage, voltage_kind, limiting_voltage,
            power_rating, margin, stray_c, sections, column_height, column_diameter,
            column_base, grading_limit, tip_c, draws, seed, yield_,
            trimmer_range, distribution, spec_path, plot_path, as_json, report_path):
    """Design a compensated divider: resistors, compensation, trimmer and ratio error.

    The tip arm is a string of preferred-value resistors (split as the voltage and
    power demand), the shunt arm the instrument input with an optional shunt
    resistor and fixed capacitor; a trimmer in one arm makes R1*C1 = R2*C2. With
    --stray-c the tip arm is treated as a high-voltage column with earth
    capacitance and grading capacitors. Safety cautions are printed with every
    result above 30 V rms / 60 V dc. --spec writes the design as a chain spec that
    bandwidth, trim, predict and netlist read.

    \b
    Examples:
      taumatch divider --ratio 100 --input-resistance 10M --instrument "1M||14p" --cable-c 90p
      taumatch divider --ratio 100 --input-resistance 10M --cable-c 90p --spec divider.toml
      taumatch divider --ratio 100 --input-resistance 10M --instrument "1M||14p" --cable-c 90p \\
          --voltage 5k --stray-c 2p --sections 10 --monte-carlo 100000 --seed 1
    """
    from ..design.column import Column
    from ..design.divider import design_divider
    from ..design.ranges import MAX_PART_DRAWS, MAX_SPEC_SECTIONS
    from ..design.rating import Rating
    from ..design.study import DividerStudy
    from ..design.tolerance import Tolerances, monte_carlo, toleranced_parts

    spec_out = spec_output(spec_path, plot_path)
    start_report(report_path, [])
    ratio_v = _q(ratio, None, "ratio", "ratio")
    n_draws = _q(draws, None, "monte-carlo", "draws", integer=True)
    seed_v = _q(seed, None, "seed", "seed", integer=True)
    y = _q(yield_, None, "yield", "yield")
    n_sec = _q(sections, None, "sections", "sections", integer=True)
    grading = _q(grading_limit, None, "grading-limit", "grading_limit")
    column = None
    if column_height is not None or column_diameter is not None:
        if column_height is None or column_diameter is None:
            raise InputError("--column-height and --column-diameter go together")
        if stray_c is not None:
            raise InputError("--stray-c: give either the stray capacitance or the column "
                             "geometry, not both")
        column = Column.from_geometry(
            _q(column_height, "m", "column-height", "column_height"),
            _q(column_diameter, "m", "column-diameter", "column_diameter"),
            _q(column_base, "m", "column-base", "column_base"), n_sec or 1, grading)
    elif column_base is not None:
        raise InputError("--column-base: give --column-height and --column-diameter as well")
    elif stray_c is not None:
        column = Column.per_section(_q(stray_c, "F", "stray-c", "stray_capacitance"),
                                    n_sec or 1, grading)
    elif n_sec is not None:
        raise InputError("--sections: give --stray-c (stray capacitance per section) or the "
                         "column geometry as well")
    if spec_out is not None and column is not None and column.sections > MAX_SPEC_SECTIONS:
        raise InputError(f"--spec: a column of {column.sections} sections is a chain of "
                         f"{2 * column.sections + 5} parts or so, which the chain commands take "
                         f"minutes over; at most {MAX_SPEC_SECTIONS} sections can be written")
    v = _q(voltage, "V", "voltage", "voltage")
    rating = None
    if v is not None:
        rating = Rating(v, _choice(voltage_kind, "voltage-kind", ("unknown", "ac", "dc")),
                        _q(limiting_voltage, "V", "limiting-voltage", "limiting_voltage"),
                        _q(power_rating, "W", "power-rating", "power_rating"),
                        _q(margin, None, "margin", "margin"))
    elif limiting_voltage is not None or power_rating is not None:
        raise InputError("--limiting-voltage and --power-rating size the string for a "
                         "--voltage; give the voltage as well")
    tol = Tolerances(_q(tolerance_r, None, "tolerance-r", "tolerance"),
                     _q(tolerance_c, None, "tolerance-c", "tolerance"),
                     _q(instrument_tolerance_r, None, "instrument-tolerance-r", "tolerance"),
                     distribution=_choice(distribution, "distribution", ("uniform", "normal")))
    trim = None
    if trimmer_range is not None:
        items = trimmer_range.split(",")
        if len(items) != 2:
            raise InputError(f"--trimmer: expected MIN,MAX such as 2p,30p, got {trimmer_range!r}")
        trim = tuple(_q(v.strip(), "F", "trimmer", "trimmer") for v in items)
        if trim[0] > trim[1]:
            raise InputError(f"--trimmer: MIN must not exceed MAX, got {trimmer_range!r}")
        if not n_draws:
            raise InputError("--trimmer: needs --monte-carlo N to estimate a yield")
    if n_draws == 1:
        raise InputError("--monte-carlo: need at least 2 draws (or 0 for none), got 1")
    design = design_divider(
        ratio_v, _q(input_resistance, "ohm", "input-resistance", "input_resistance"),
        instrument, _q(cable_c, "F", "cable-c", "cable_capacitance"),
        arm=_choice(arm, "arm", ("shunt", "tip")), series=series,
        capacitor_series=capacitor_series, tolerances=tol, rating=rating, column=column,
        tip_capacitance=_q(tip_c, "F", "tip-c", "tip_capacitance"))
    if n_draws and n_draws * toleranced_parts(design) > MAX_PART_DRAWS:
        most = MAX_PART_DRAWS // toleranced_parts(design)
        raise InputError(f"--monte-carlo: {n_draws} draws of this design's "
                         f"{toleranced_parts(design)} toleranced parts would take more than "
                         f"seconds; use at most {most}")
    chain = design.to_chain() if spec_out is not None else None
    mc = None
    if n_draws:
        with progress_bar(n_draws, "Monte Carlo", progress_wanted(as_json)) as advance:
            mc = monte_carlo(design, n_draws, seed=seed_v, yield_target=y, trimmer=trim,
                             progress=lambda done, total: advance(done))
    if plot_path:
        fig, _ = design.plot()
        save_figure(fig, plot_path)
    if report_path:
        from ..report import divider_report, write_report

        write_report(divider_report(design, mc, title=f"Divider design {ratio_v:g}:1",
                                    inputs=command_inputs(ctx)), report_path)
    if spec_out is not None:
        from ..chain.write import dumps
        from ..design.as_chain import spec_comment

        write_text(spec_out, dumps(chain, spec_comment(design)), option="--spec")
    result = DividerStudy(design, mc)
    if as_json:
        emit_json({**result.to_dict(), **({"spec": str(spec_out)} if spec_out is not None else {})})
        return
    click.echo(result.summary())
    if spec_out is not None:
        click.echo(f"chain spec written to {spec_out}")
