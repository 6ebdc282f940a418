"""The knockproof command line: wires the commands (one module each) into one typer app.

Exit status: 0 the building passes, 1 it fails a check, 2 bad input or usage. Heavy imports are
deferred to the commands that need them so that ``knockproof --help`` is instant.
"""

from __future__ import annotations

import sys

import typer

from knockproof.cli import (
    advise_cmd,
    catalog_cmd,
    check,
    estimate,
    new,
    report_cmd,
    schema,
    simulate_cmd,
)

app = typer.Typer(
    name="knockproof",
    help="Water-hammer screening for building water-supply piping. Results are screening "
    "estimates: a qualified person must check the design; local codes and the authority having "
    "jurisdiction govern.",
    no_args_is_help=True,
    add_completion=False,
    pretty_exceptions_enable=False,
    rich_markup_mode=None,
)


@app.callback()
def _root(
    debug: bool = typer.Option(False, "--debug", help="Show a traceback on errors."),
) -> None:
    from knockproof.cli import state

    state.DEBUG = debug


app.command("check")(check.command)
app.command("estimate")(estimate.command)
app.command("simulate")(simulate_cmd.command)
app.command("advise")(advise_cmd.command)
app.command("report")(report_cmd.command)
app.command("catalog")(catalog_cmd.command)
app.command("schema")(schema.command)
app.command("new")(new.command)


def main() -> None:
    """Entry point of the console script and of ``python -m knockproof``."""
    from knockproof.cli.state import run_app

    sys.exit(run_app(app))
