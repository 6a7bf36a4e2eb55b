"""``runaway-screen kinetics``: decomposition kinetics from DSC runs (thin command module)."""
from __future__ import annotations

import json

import click

from screen.analyses.kinetics import analyse_kinetics
from screen.errors import ScreenError
from screen.io.fileio import check_writable, write_atomic
from screen.report.kinetics import (
    decomposition_toml,
    format_summary,
    result_to_dict,
    write_pngs,
)


@click.command("kinetics")
@click.argument("thermograms", nargs=-1, metavar="[THERMOGRAM.csv]...")
@click.option("--peaks", metavar="FILE.csv",
              help="Peak table with columns heating_rate_K_per_min, peak_temperature_degC "
                   "(optional onset_temperature_degC, energy_J_per_g).")
@click.option("--sample-mass", multiple=True, metavar="'2.35 mg'",
              help="Sample mass, once for all thermograms or once per file in order.")
@click.option("--heating-rate", multiple=True, metavar="'4 K/min'",
              help="Nominal heating rate, once for all thermograms or once per file.")
@click.option("--exo-up/--exo-down", "exo_up", default=None,
              help="Direction of exotherms in the thermograms [default: from the file, else "
                   "detected from the integral sign].")
@click.option("--baseline", type=click.Choice(["linear", "sigmoidal"]), default="linear",
              show_default=True, help="Baseline between the integration limits.")
@click.option("--range", "integration_range", nargs=2, type=float, default=None,
              metavar="LOW HIGH", help="Integration limits in degC for all thermograms "
                                       "[default: found automatically].")
@click.option("--model", type=click.Choice(["auto", "nth-order", "autocatalytic"]),
              default="auto", show_default=True, help="Reaction model for extrapolation.")
@click.option("--onset", metavar="'185 degC'",
              help="A DSC onset for the crude TD24 estimate (alone when nothing else exists).")
@click.option("--energy", metavar="'650 J/g'",
              help="Decomposition energy for a peak table or a single onset.")
@click.option("--detection-limit", default="20 W/kg", show_default=True,
              help="Heat release rate taken as the DSC detection limit.")
@click.option("--specific-heat", default="1.5 kJ/(kg K)", show_default=True,
              help="c'p of the reaction mass for the TD24 estimates.")
@click.option("--confidence", type=float, default=0.95, show_default=True,
              help="Two-sided confidence level of the intervals.")
@click.option("--json", "as_json", is_flag=True, help="Print one JSON object instead of text.")
@click.option("-o", "--output", metavar="FILE.toml",
              help="Write a [decomposition] case-file section (never overwrites without --force).")
@click.option("--force", is_flag=True, help="Allow -o to replace an existing file.")
@click.option("--png-dir", metavar="DIR", help="Write the figures as PNG files into DIR.")
def kinetics_command(thermograms, peaks, sample_mass, heating_rate, exo_up, baseline,
                     integration_range, model, onset, energy, detection_limit, specific_heat,
                     confidence, as_json, output, force, png_dir):
    """Decomposition kinetics from DSC runs: Kissinger (ASTM E698), Friedman and
    Flynn-Wall-Ozawa activation energies, decomposition energy, a fitted model for
    extrapolation and TD24 estimates.

    \b
    Examples:
      runaway-screen kinetics --peaks peaks.csv
      runaway-screen kinetics run_2K.csv run_4K.csv run_8K.csv --sample-mass '2.1 mg'
      runaway-screen kinetics run_*.csv --json -o decomposition.toml --png-dir figures
      runaway-screen kinetics --onset '185 degC' --energy '650 J/g'
    """
    from screen.cli.common import handle_errors

    @handle_errors
    def run():
        try:
            _run_kinetics(thermograms, peaks, sample_mass, heating_rate, exo_up, baseline,
                          integration_range, model, onset, energy, detection_limit,
                          specific_heat, confidence, as_json, output, force, png_dir)
        except ScreenError as exc:
            if exc.path is None and not (exc.key or "").startswith("--") and (peaks or
                                                                                thermograms):
                # A method failed on the data as a whole: name the data files.
                exc.path = peaks or ", ".join(thermograms)
            raise

    run()


def _run_kinetics(thermograms, peaks, sample_mass, heating_rate, exo_up, baseline,
                  integration_range, model, onset, energy, detection_limit, specific_heat,
                  confidence, as_json, output, force, png_dir):
    """Body of the kinetics command (errors are reported by kinetics_command)."""
    result = analyse_kinetics(
        thermograms, peaks, sample_mass, heating_rate, exo_up, baseline, integration_range,
        model, onset, energy, detection_limit, specific_heat, confidence,
    )
    text = decomposition_toml(result) if output else None
    if output:
        check_writable(output, force)  # before any figure is written: no partial output
    written = write_pngs(result, png_dir) if png_dir else []
    if output:
        write_atomic(output, text.encode("utf-8"), force=force)
    if as_json:
        payload = result_to_dict(result)
        if output:
            payload["output"] = str(output)
        if written:
            payload["figures"] = [str(p) for p in written]
        click.echo(json.dumps(payload, indent=2, ensure_ascii=False, allow_nan=False))
    else:
        click.echo(format_summary(result))
        if output:
            click.echo(f"\n[decomposition] section written to {output}")
        for path in written:
            click.echo(f"figure written: {path}")

