"""`knockproof new`: write a commented starter building file."""

from __future__ import annotations

from pathlib import Path

import typer


def command(
    file: Path = typer.Argument(..., help="Where to write the starter file."),
    force: bool = typer.Option(False, "--force", help="Overwrite an existing file."),
) -> int:
    """Write a commented starter building file to FILE."""
    from importlib.resources import files

    from knockproof.cli.output import err
    from knockproof.errors import UsageError

    if file.exists() and not force:
        raise UsageError(f"{file}: already exists; choose another name or pass --force")
    if file.exists() and file.is_dir():
        raise UsageError(f"{file}: is a directory")
    text = (files("knockproof") / "examples" / "starter.toml").read_text(encoding="utf-8")
    from knockproof.report.files import write_atomic

    write_atomic(file, text)
    err().print(f"wrote {file}; edit it, then run: knockproof check {file}")
    return 0
