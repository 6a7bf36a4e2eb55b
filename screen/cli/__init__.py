"""The ``runaway-screen`` command line (one thin module per command)."""

from screen.cli.common import run_check, timestamp
from screen.cli.main import main

__all__ = ["main", "run_check", "timestamp"]
