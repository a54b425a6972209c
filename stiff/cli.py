"""The ``stiff`` command line: parse, call the library, print, map errors to exit codes."""

from __future__ import annotations

import sys

import click

from stiff import __version__
from stiff.errors import StiffError


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="stiff")
def cli() -> None:
    """Stiffness, wobble and strength of tube-and-printed-joint linkages, before you print.

    Exit codes: 0 all checks met, 1 a check or target not met, 2 bad input,
    3 the model cannot be solved (a mechanism or an unreachable pose).
    """


def main() -> None:
    """Console entry point: run the group and turn a StiffError into one line and an exit code."""
    try:
        cli.main(standalone_mode=False)
    except StiffError as err:
        click.echo(f"stiff: error: {err}", err=True)
        sys.exit(err.exit_code)
    except click.exceptions.Abort:
        click.echo("stiff: aborted", err=True)
        sys.exit(1)
    except click.ClickException as err:
        err.show()
        sys.exit(2)
    sys.exit(0)
