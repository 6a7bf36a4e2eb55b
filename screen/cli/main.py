"""Command-line interface ``runaway-screen``: the command group and its commands.

Each command lives in its own thin module (argument parsing, calling the library, exit status).
Every user error is printed as one line on stderr with exit status 2, never a traceback
(:mod:`screen.cli.common`). Heavy modules are imported inside the commands so that ``--help``
stays instant.
"""

from __future__ import annotations

import click

from screen import __version__
from screen.cli import batch, check, compare, heat_flow, kinetics, limits, report
from screen.cli.common import OneLineGroup


@click.group(cls=OneLineGroup, context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="runaway-screen")
def main():
    """Thermal-runaway screening of exothermic reactions from a TOML case file.

    A screening aid: results depend on input data quality; a qualified process-safety review,
    local codes and regulations, and licensed practice decide.
    """


main.add_command(check.check_command)
main.add_command(report.report_command)
main.add_command(compare.compare_command)
main.add_command(compare.sweep_command)
main.add_command(kinetics.kinetics_command)
main.add_command(batch.batch_command)
main.add_command(heat_flow.heat_flow_command)
main.add_command(limits.limits_command)

if __name__ == "__main__":  # pragma: no cover
    main()
