"""`knockproof estimate`: one run of pipe, on the spot, without a building file."""

from __future__ import annotations

import typer


def command(
    material: str = typer.Option(..., "--material", help="Pipe material key, e.g. copper-L."),
    size: str = typer.Option(..., "--size", help="Nominal size: 1/2, 3/4, 1-1/4 or DN20."),
    length: str = typer.Option(..., "--length", help="Length of the run: '40 ft', '15 m'."),
    flow: str = typer.Option(..., "--flow", help="Flow stopped by the valve: '5 gpm', '0.3 L/s'."),
    closure: str = typer.Option(..., "--closure", help="Valve closure time: '20 ms'."),
    static: str = typer.Option(..., "--static", help="Static pressure: '60 psi', '400 kPa'."),
    temperature: str = typer.Option("15 degC", "--temperature", help="Water temperature."),
    restraint: str = typer.Option("anchored", "--restraint", help="anchored, upstream or joints."),
    units: str = typer.Option("us", "--units", help="Unit system of bare numbers and output."),
    format: str = typer.Option("text", "--format", "-f", help="text or json."),
) -> int:
    """Surge for one run of pipe closed at its end by a valve."""
    from knockproof.errors import UsageError

    if units not in ("us", "si"):
        raise UsageError(f"--units: expected us or si, found '{units}'")
    if format not in ("text", "json"):
        raise UsageError(f"--format: expected text or json, found '{format}'")
    if restraint not in ("anchored", "upstream", "joints"):
        raise UsageError(f"--restraint: expected anchored, upstream or joints, found '{restraint}'")
    from knockproof.model.units import QuantityError, parse_quantity

    values = {}
    for name, raw, kind in (
        ("length", length, "length"),
        ("flow", flow, "flow"),
        ("closure", closure, "time"),
        ("static", static, "pressure"),
        ("temperature", temperature, "temperature"),
    ):
        try:
            values[name] = parse_quantity(_number_or_text(raw), kind, units)  # type: ignore[arg-type]
        except QuantityError as e:
            raise UsageError(f"--{name}: {e}") from None
        if kind != "temperature" and values[name] <= 0:
            raise UsageError(f"--{name}: must be more than zero, found '{raw}'")
    if not 1.0 <= values["temperature"] <= 99.0:
        raise UsageError(
            f"--temperature: expected liquid water, 1 to 99 degC, found '{temperature}'"
        )
    from knockproof import catalog
    from knockproof.analysis.single_run import estimate_run

    try:
        r = estimate_run(
            material,
            size,
            values["length"],
            values["flow"],
            values["closure"],
            values["static"],
            values["temperature"],
            restraint,
        )
    except (KeyError, ValueError) as e:
        raise UsageError(str(e.args[0]) if e.args else str(e)) from None
    _ = catalog
    if format == "json":
        from knockproof.cli.output import write_text
        from knockproof.report.estimate_out import estimate_json

        write_text(estimate_json(r))
    else:
        from knockproof.cli.output import out
        from knockproof.report.estimate_out import render_estimate

        render_estimate(out(), r, units)
    return 0


def _number_or_text(raw: str) -> str | float:
    try:
        return float(raw)
    except ValueError:
        return raw
