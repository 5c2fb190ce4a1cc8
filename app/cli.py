"""The ``stresslens`` command line: a thin dispatcher to one module per subcommand.

``stresslens [LAYOUT] [--screenshot OUT.png]`` opens the GUI; the subcommands
``solve``, ``report``, ``export`` and ``sweep`` run headless.  Each subcommand module
has ``add_arguments(parser)`` and ``run(args) -> int``; exit status 0 on success, 2 on a
bad layout or bad arguments (message on stderr).
"""

from __future__ import annotations

import argparse
import importlib
import logging
import sys
from collections.abc import Sequence

SUBCOMMANDS = {
    "solve": ("app.cli_solve", "solve a layout headless and print the results"),
    "report": ("app.cli_report", "write the report figure(s) to PDF, PNG or SVG"),
    "export": ("app.cli_export", "export surface-field and grid samples as CSV"),
    "sweep": ("app.cli_sweep", "sweep one parameter; optionally seek a goal"),
}


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the ``stresslens`` console script."""
    from .logging_setup import install_logging

    install_logging()
    args = list(sys.argv[1:] if argv is None else argv)
    if args and args[0] in SUBCOMMANDS:
        name = args.pop(0)
        module_name, help_text = SUBCOMMANDS[name]
        module = importlib.import_module(module_name)
        parser = argparse.ArgumentParser(prog=f"stresslens {name}", description=help_text)
        module.add_arguments(parser)
        status = int(module.run(parser.parse_args(args)))
        logging.getLogger("app.cli").info("stresslens %s: exit status %d", name, status)
        return status
    from . import cli_gui

    parser = argparse.ArgumentParser(
        prog="stresslens",
        description="Sketch high-voltage electrode cross-sections and see the field. "
        "Subcommands: " + ", ".join(SUBCOMMANDS) + " (stresslens SUBCOMMAND --help).")
    cli_gui.add_arguments(parser)
    return int(cli_gui.run(parser.parse_args(args)))


if __name__ == "__main__":
    sys.exit(main())
