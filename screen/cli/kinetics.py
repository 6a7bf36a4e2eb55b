"""``runaway-screen kinetics``: decomposition kinetics from DSC runs (thin command module)."""
from __future__ import annotations

import click

from screen.analyses.kinetics import analyse_kinetics
from screen.errors import ScreenError
from screen.cli.common import deliver
from screen.io.fileio import check_writable
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
@click.option("--adiabatic", metavar="RUN.csv",
              help="Adiabatic heat-wait-search run (time_s, temperature_degC, optional "
                   "pressure_bar) instead of DSC data: phi-corrected onset, rise, TMRad and "
                   "kinetics.")
@click.option("--phi", type=float, default=None,
              help="Thermal inertia of the adiabatic run (or give --sample-mass, "
                   "--specific-heat, --cell-mass and --cell-specific-heat).")
@click.option("--cell-mass", metavar="'9.5 g'", help="Mass of the adiabatic test cell.")
@click.option("--cell-specific-heat", metavar="'0.52 J/(g K)'",
              help="c'p of the adiabatic test cell.")
@click.option("--rate-threshold", default="0.02 K/min", show_default=True,
              help="Self-heat rate that marks the exotherm of an adiabatic run.")
@click.option("--cell-free-volume", metavar="'5 mL'",
              help="Gas volume of the adiabatic cell: permanent gas in mol per kg of sample "
                   "(needs --sample-mass).")
@click.pass_context
def kinetics_command(ctx, thermograms, peaks, sample_mass, heating_rate, exo_up, baseline,
                     integration_range, model, onset, energy, detection_limit, specific_heat,
                     confidence, as_json, output, force, png_dir, adiabatic, phi, cell_mass,
                     cell_specific_heat, rate_threshold, cell_free_volume):
    """Decomposition kinetics from DSC runs: Kissinger (ASTM E698), Friedman and
    Flynn-Wall-Ozawa activation energies, decomposition energy, a fitted model for
    extrapolation and TD24 estimates.

    \b
    Examples:
      runaway-screen kinetics --peaks peaks.csv
      runaway-screen kinetics run_2K.csv run_4K.csv run_8K.csv --sample-mass '2.1 mg'
      runaway-screen kinetics run_*.csv --json -o decomposition.toml --png-dir figures
      runaway-screen kinetics --onset '185 degC' --energy '650 J/g'
      runaway-screen kinetics --adiabatic run.csv --phi 1.75 --specific-heat '1.9 J/(g K)'

    With --adiabatic RUN.csv: an adiabatic heat-wait-search run instead, corrected for the
    thermal inertia phi (Townsend & Tou 1980; onset after Fisher et al. 1992).

    \f

    Parameters
    ----------
    ctx : click.Context
        Click context (tells which options were given).
    thermograms : tuple of str
        THERMOGRAM.csv arguments: dynamic DSC runs.
    peaks : str or None
        ``--peaks``: peak table CSV.
    sample_mass : tuple of str
        ``--sample-mass``: sample mass with unit, once or once per file.
    heating_rate : tuple of str
        ``--heating-rate``: nominal heating rate with unit, once or once per file.
    exo_up : bool or None
        ``--exo-up/--exo-down``: direction of exotherms; None detects it.
    baseline : str
        ``--baseline``: ``linear`` or ``sigmoidal``.
    integration_range : tuple of float or None
        ``--range LOW HIGH``: integration limits. [degC]
    model : str
        ``--model``: ``auto``, ``nth-order`` or ``autocatalytic``.
    onset : str or None
        ``--onset``: DSC onset temperature with unit, for the crude TD24 estimate.
    energy : str or None
        ``--energy``: decomposition energy with unit.
    detection_limit : str
        ``--detection-limit``: heat release rate with unit taken as the DSC detection limit.
    specific_heat : str
        ``--specific-heat``: c'p of the reaction mass with unit.
    confidence : float
        ``--confidence``: two-sided confidence level. [-]
    as_json : bool
        ``--json``: print one JSON object instead of text.
    output : str or None
        ``-o/--output``: write a [decomposition] case-file section.
    force : bool
        ``--force``: allow -o to replace an existing file.
    png_dir : str or None
        ``--png-dir``: write the figures as PNG files there.
    adiabatic : str or None
        ``--adiabatic``: adiabatic heat-wait-search run CSV instead of DSC data.
    phi : float or None
        ``--phi``: thermal inertia of the adiabatic run. [-]
    cell_mass : str or None
        ``--cell-mass``: mass of the adiabatic test cell with unit.
    cell_specific_heat : str or None
        ``--cell-specific-heat``: c'p of the test cell with unit.
    rate_threshold : str
        ``--rate-threshold``: self-heat rate with unit that marks the exotherm.
    cell_free_volume : str or None
        ``--cell-free-volume``: gas volume of the adiabatic cell with unit.
    """
    from screen.cli.common import handle_errors

    if adiabatic is not None:
        given = {name: ctx.get_parameter_source(name).name != "DEFAULT"
                 for name in ctx.params}
        handle_errors(_run_adiabatic)(ctx.params, given)
        return
    for name in ("phi", "cell_mass", "cell_specific_heat", "rate_threshold", "cell_free_volume"):
        if ctx.get_parameter_source(name).name != "DEFAULT":
            handle_errors(_reject)(f"--{name.replace('_', '-')}",
                                   "applies to an adiabatic run only; give --adiabatic RUN.csv")

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
    deliver(result, to_dict=result_to_dict, summary=format_summary,
            fragment=decomposition_toml, write_pngs=write_pngs, output=output, force=force,
            png_dir=png_dir, as_json=as_json, written_what="[decomposition] section",
            inputs=list(thermograms) + ([peaks] if peaks else []))


def _reject(option, message):
    from screen.errors import CaseError

    raise CaseError(message, key=option)


def _run_adiabatic(params, given):
    """Body of ``kinetics --adiabatic`` (errors are reported by the caller)."""
    from screen.analyses.adiabatic_run import analyse_adiabatic
    from screen.cli.heat_flow import positive_quantity
    from screen.errors import CaseError
    from screen.report import adiabatic_run as present

    for name in ("thermograms", "peaks", "heating_rate", "exo_up", "integration_range",
                 "onset", "energy", "detection_limit", "confidence", "baseline", "model"):
        if given.get(name):
            option = "THERMOGRAM.csv" if name == "thermograms" else (
                "--range" if name == "integration_range" else
                "--exo-up/--exo-down" if name == "exo_up" else f"--{name.replace('_', '-')}")
            raise CaseError("applies to DSC data, not to an adiabatic run; leave it out",
                            key=option)
    masses = params["sample_mass"]
    if len(masses) > 1:
        raise CaseError("give the sample mass of the adiabatic run once", key="--sample-mass")
    sample_mass = positive_quantity(masses[0], "mass", "--sample-mass") if masses else None
    cp = (positive_quantity(params["specific_heat"], "specific_heat", "--specific-heat")
          if given.get("specific_heat") else None)
    cell_mass = (positive_quantity(params["cell_mass"], "mass", "--cell-mass")
                 if params["cell_mass"] is not None else None)
    cell_cp = (positive_quantity(params["cell_specific_heat"], "specific_heat",
                                 "--cell-specific-heat")
               if params["cell_specific_heat"] is not None else None)
    threshold_value = _rate(params["rate_threshold"])
    free_volume = (positive_quantity(params["cell_free_volume"], "volume", "--cell-free-volume")
                   if params["cell_free_volume"] is not None else None)
    output, force = params["output"], params["force"]
    if output:
        check_writable(output, force)
    result = analyse_adiabatic(params["adiabatic"], phi=params["phi"], sample_mass=sample_mass,
                               specific_heat=cp, cell_mass=cell_mass,
                               cell_specific_heat=cell_cp, threshold=threshold_value,
                               free_volume=free_volume)
    deliver(result, to_dict=present.result_to_dict, summary=present.format_summary,
            fragment=present.decomposition_toml, write_pngs=present.write_pngs, output=output,
            force=force, png_dir=params["png_dir"], as_json=params["as_json"],
            written_what="[decomposition] section", inputs=[params["adiabatic"]])


def _rate(text):
    """Self-heat rate option ('0.02 K/min') in K/s."""
    from screen.io.thermograms import parse_quantity

    return parse_quantity(text, "heating_rate", "--rate-threshold")
