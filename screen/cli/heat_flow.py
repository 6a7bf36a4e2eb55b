"""``runaway-screen heat-flow``: heat of reaction, accumulation and MTSR(t) from a heat-flow
trace (thin command module)."""
from __future__ import annotations

import click


def positive_quantity(text, kind, option):
    """SI value of an option like ``'1.2 kg'``; raises CaseError unless finite and > 0.

    Parameters
    ----------
    text : str
        Value with its unit.
    kind : str
        A kind of :data:`screen.units.DIMENSIONS`.
    option : str
        Option name for the message.

    Returns
    -------
    float
        [SI unit of ``kind``]
    """
    from screen.errors import CaseError
    from screen.units import parse_quantity

    value = parse_quantity(text, kind, option).value
    if kind != "temperature" and not value > 0:
        raise CaseError(f"{text!r} must be positive", key=option)
    return value


@click.command("heat-flow")
@click.argument("trace", metavar="TRACE.csv")
@click.option("--initial-mass", required=True, metavar="'1.2 kg'",
              help="Reaction mass before dosing (the whole mass for a batch run).")
@click.option("--specific-heat", required=True, metavar="'1.9 kJ/(kg K)'",
              help="c'p of the reaction mass.")
@click.option("--limiting-amount", metavar="'1.5 mol'",
              help="Limiting reagent in the run: gives the molar enthalpy.")
@click.option("--feed-temperature", metavar="'20 degC'",
              help="Temperature of the feed as dosed (for the dosing heat correction).")
@click.option("--feed-specific-heat", metavar="'1.7 kJ/(kg K)'",
              help="c'p of the feed [default: that of the reaction mass].")
@click.option("--baseline", type=click.Choice(["linear", "dosing", "conversion"]),
              default="linear", show_default=True,
              help="Baseline between the steady heat flow before and after the reaction: "
                   "linear in time, or in proportion to the dosed mass or the conversion.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
@click.option("-o", "--output", metavar="FRAGMENT.toml",
              help="Write [synthesis] and [process] case-file keys (never overwrites without "
                   "--force).")
@click.option("--force", is_flag=True, help="Allow -o to replace an existing file.")
@click.option("--png-dir", metavar="DIR", help="Write the figures as PNG files into DIR.")
def heat_flow_command(trace, initial_mass, specific_heat, limiting_amount, feed_temperature,
                      feed_specific_heat, baseline, as_json, output, force, png_dir):
    """Heat of reaction, thermal accumulation and MTSR over time from the heat-flow trace of
    an isothermal semi-batch or batch run (columns time_s, reactor_temperature_degC,
    heat_flow_W positive exothermic, dosed_mass_kg cumulative).

    \b
    Examples:
      runaway-screen heat-flow run.csv --initial-mass '1.2 kg' --specific-heat '1.9 kJ/(kg K)'
      runaway-screen heat-flow run.csv --initial-mass '1.2 kg' --specific-heat '1.9 kJ/(kg K)' \\
          --limiting-amount '1.5 mol' --feed-temperature '20 degC' --json -o synthesis.toml

    \f

    Parameters
    ----------
    trace : str
        TRACE.csv argument: the heat-flow trace of the run.
    initial_mass : str
        ``--initial-mass``: reaction mass before dosing, with unit.
    specific_heat : str
        ``--specific-heat``: c'p of the reaction mass, with unit.
    limiting_amount : str or None
        ``--limiting-amount``: limiting reagent, with unit.
    feed_temperature : str or None
        ``--feed-temperature``: temperature of the feed, with unit.
    feed_specific_heat : str or None
        ``--feed-specific-heat``: c'p of the feed, with unit.
    baseline : str
        ``--baseline``: ``linear``, ``dosing`` or ``conversion``.
    as_json : bool
        ``--json``: print one JSON object instead of text.
    output : str or None
        ``-o/--output``: write [synthesis] and [process] case-file keys.
    force : bool
        ``--force``: allow -o to replace an existing file.
    png_dir : str or None
        ``--png-dir``: write the figures as PNG files there.
    """
    from screen.cli.common import handle_errors

    @handle_errors
    def run():
        _run(trace, initial_mass, specific_heat, limiting_amount, feed_temperature,
             feed_specific_heat, baseline, as_json, output, force, png_dir)

    run()


def _run(trace, initial_mass, specific_heat, limiting_amount, feed_temperature,
         feed_specific_heat, baseline, as_json, output, force, png_dir):
    from screen.analyses.heat_flow import analyse_heat_flow
    from screen.cli.common import deliver
    from screen.io.fileio import check_writable
    from screen.report import heat_flow as present

    m0 = positive_quantity(initial_mass, "mass", "--initial-mass")
    cp = positive_quantity(specific_heat, "specific_heat", "--specific-heat")
    amount = (positive_quantity(limiting_amount, "amount_of_substance", "--limiting-amount")
              if limiting_amount is not None else None)
    t_feed = (positive_quantity(feed_temperature, "temperature", "--feed-temperature")
              if feed_temperature is not None else None)
    cp_feed = (positive_quantity(feed_specific_heat, "specific_heat", "--feed-specific-heat")
               if feed_specific_heat is not None else None)
    if output:
        check_writable(output, force, [trace])  # fail before the work, leave nothing behind
    result = analyse_heat_flow(trace, m0, cp, amount, t_feed, cp_feed, baseline)
    deliver(result, to_dict=present.result_to_dict, summary=present.format_summary,
            fragment=present.case_fragment, write_pngs=present.write_pngs, output=output,
            force=force, png_dir=png_dir, as_json=as_json,
            written_what="[synthesis] and [process] keys", inputs=[trace])
